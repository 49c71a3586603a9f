//! `netmargin baseline PATH...`: record today's findings so `check --baseline` reports only
//! new ones.

use std::io::Write;

use crate::cli::{BaselineArgs, ColorChoice};
use crate::input::ReadOptions;
use crate::pipeline::FileOutcome;

pub fn command(args: &BaselineArgs, opts: &ReadOptions, color: ColorChoice) -> std::io::Result<u8> {
    if !super::known_checks(&args.settings) {
        return Ok(2);
    }
    let files = super::check::expand_paths(&args.paths);
    if files.is_empty() {
        eprintln!(
            "netmargin: no `.net` files in {}; baseline not written",
            args.paths.join(", ")
        );
        return Ok(2);
    }
    let run = super::check::check_paths(&args.paths, &args.settings, opts);
    let (netlists, others) = run.outcomes.split_at(run.netlists);
    let failed: Vec<&FileOutcome> = netlists.iter().filter(|o| o.fatal.is_some()).collect();
    if run.config_failed || !failed.is_empty() {
        let bad: Vec<FileOutcome> = run
            .outcomes
            .into_iter()
            .filter(|o| o.fatal.is_some())
            .collect();
        super::to_stderr(&bad, color)?;
        eprintln!(
            "netmargin: baseline not written: {} could not be checked",
            if bad.len() == 1 {
                "1 file".to_string()
            } else {
                format!("{} files", bad.len())
            }
        );
        return Ok(2);
    }
    // stale or expired waivers: worth seeing, not a reason to refuse
    super::to_stderr(others, color)?;
    let cwd = std::env::current_dir()?;
    let base = crate::baseline::base_dir(&args.output, &cwd);
    let text = crate::baseline::render(netlists, &base, &cwd);
    let target = cwd.join(&args.output);
    let written = match target.parent() {
        Some(dir) => std::fs::create_dir_all(dir)
            .and_then(|()| crate::atomic::write(&target, text.as_bytes())),
        None => crate::atomic::write(&target, text.as_bytes()),
    };
    if let Err(e) = written {
        eprintln!(
            "netmargin: cannot write the baseline `{}`: {e}",
            args.output.display()
        );
        return Ok(2);
    }
    let findings: usize = netlists.iter().map(|o| o.diags.len()).sum();
    let waived: usize = netlists.iter().map(|o| o.waived).sum();
    let mut line = format!(
        "wrote {}: {} in {}",
        args.output.display(),
        if findings == 1 {
            "1 finding".to_string()
        } else {
            format!("{findings} findings")
        },
        if netlists.len() == 1 {
            "1 file".to_string()
        } else {
            format!("{} files", netlists.len())
        }
    );
    if waived > 0 {
        line.push_str(&format!(" ({waived} more covered by waivers, left out)"));
    }
    let mut out = std::io::stdout().lock();
    writeln!(out, "{line}")?;
    Ok(0)
}
