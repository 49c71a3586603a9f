//! The short format: one line per finding, `path:line:column: severity: message [check]`,
//! as editors and pre-commit hooks read them. A file that could not be checked gets a line
//! of the same form for its fatal error. Nothing at all when there is nothing to report.
//!
//! Paths and messages pass through [`crate::text::sanitize`]: no control character, line
//! break or bidi override from an input reaches the terminal, so one finding is one line.

use std::io::{self, Write};

use super::primary_place;
use crate::diag::Diag;
use crate::pipeline::FileOutcome;
use crate::text::sanitize;

/// The line for one diagnostic (without the line end).
pub fn line(f: &FileOutcome, d: &Diag) -> String {
    let path = sanitize(super::file_name(f, d));
    let place = match primary_place(d, f.source.as_ref()) {
        Some(p) => format!(":{}:{}", p.line, p.column),
        None => String::new(),
    };
    format!(
        "{path}{place}: {}: {} [{}]",
        d.severity,
        sanitize(&d.message),
        sanitize(&d.code)
    )
}

pub fn write(files: &[FileOutcome], out: &mut dyn Write) -> io::Result<()> {
    for f in files {
        for d in f.fatal.iter().chain(&f.diags) {
            writeln!(out, "{}", line(f, d))?;
        }
    }
    Ok(())
}
