//! The human format: miette's graphical rendering of each diagnostic, with the source
//! lines, then a summary line per file.

use std::io::{self, Write};

use miette::{GraphicalReportHandler, GraphicalTheme};

use crate::diag::{Diag, Rendered};
use crate::pipeline::FileOutcome;
use crate::source::SourceFile;

/// Rendering settings.
#[derive(Debug, Clone, Copy)]
pub struct HumanStyle {
    pub color: bool,
    pub width: usize,
}

pub fn handler(style: HumanStyle) -> GraphicalReportHandler {
    let theme = if style.color { GraphicalTheme::unicode() } else { GraphicalTheme::unicode_nocolor() };
    GraphicalReportHandler::new_themed(theme).with_links(false).with_width(style.width)
}

/// Renders one diagnostic against its source.
pub fn render(h: &GraphicalReportHandler, diag: &Diag, source: &SourceFile) -> String {
    let mut s = String::new();
    let r = Rendered { diag, source };
    if h.render_report(&mut s, &r).is_err() {
        s = format!("{}: {}\n", diag.severity, diag.message);
    }
    s
}

/// Writes one file's diagnostics and its summary line.
pub fn write_file(out: &mut dyn Write, h: &GraphicalReportHandler, f: &FileOutcome) -> io::Result<()> {
    let empty;
    let source = match &f.source {
        Some(s) => s,
        None => {
            empty = SourceFile::new(f.name.as_str(), "");
            &empty
        }
    };
    if let Some(d) = &f.fatal {
        write!(out, "{}", render(h, d, source))?;
        writeln!(out, "{}: not checked: {}", crate::text::sanitize(&f.name), d.code)?;
        return Ok(());
    }
    for d in &f.diags {
        write!(out, "{}", render(h, d, source))?;
    }
    let s = f.summary;
    writeln!(
        out,
        "{}: {} parts, {} nets, {} pins, {} pins on no net",
        crate::text::sanitize(&f.name),
        s.parts,
        s.nets,
        s.pins,
        s.pins_on_no_net
    )
}
