//! `netmargin audit FILE`: the board report, gathered from the same analysis `check` uses
//! (settings, findings with waivers, budgets), then rendered.

use std::io::{self, Write};

use crate::audit::{from_board, html, markdown, write_charts};
use crate::cli::{AuditArgs, AuditFormat, ColorChoice};
use crate::input::ReadOptions;

/// Runs `netmargin audit`; returns the exit code (0 written, 2 the file or configuration
/// could not be used).
pub fn command(args: &AuditArgs, read: &ReadOptions, color: ColorChoice) -> io::Result<u8> {
    let (settings, source) = match super::open_one(&args.path, &args.settings, read, color)? {
        Ok(x) => x,
        Err(code) => return Ok(code),
    };
    let a = match super::analyse(&source, &settings, color)? {
        Ok(a) => a,
        Err(code) => return Ok(code),
    };
    let board = a.circuit();
    let audit = match from_board(&board, &args.net) {
        Ok(x) => x,
        Err(d) => {
            super::to_stderr(&[crate::pipeline::fatal_outcome(&source, d)], color)?;
            return Ok(2);
        }
    };
    let text = match args.format {
        AuditFormat::Html => html::render(&audit),
        AuditFormat::Markdown => markdown::render(&audit),
    };
    if let Some(dir) = &args.chart_out {
        write_charts(&audit, dir).map_err(|e| {
            io::Error::new(
                e.kind(),
                format!("cannot write the charts into `{}`: {e}", dir.display()),
            )
        })?;
    }
    match &args.output {
        Some(p) => crate::atomic::write(p, text.as_bytes()).map_err(|e| {
            io::Error::new(e.kind(), format!("cannot write `{}`: {e}", p.display()))
        })?,
        None => {
            let mut out = io::stdout().lock();
            out.write_all(text.as_bytes())?;
            out.flush()?;
        }
    }
    Ok(0)
}
