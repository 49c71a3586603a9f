//! The short format: one line per finding, `path:line:column: severity: message [check]`,
//! as editors and pre-commit hooks read them. A file that could not be checked gets a line
//! of the same form for its fatal error. Nothing at all when there is nothing to report.
//!
//! Paths and messages pass through [`crate::text::sanitize`]: no control character, line
//! break or bidi override from an input reaches the terminal, so one finding is one line.

use std::io::{self, Write};

use super::{primary_label, primary_place, Places, ShownName};
use crate::diag::{Diag, DiagRef};
use crate::pipeline::FileOutcome;
use crate::text::sanitize;

/// The line for one diagnostic (without the line end).
pub fn line(f: &FileOutcome, d: DiagRef<'_>) -> String {
    let path = sanitize(super::file_name(f, d));
    let place = match primary_place(d, f.source.as_ref()) {
        Some(p) => format!(":{}:{}", p.line, p.column),
        None => String::new(),
    };
    format!(
        "{path}{place}: {}: {} [{}]",
        d.severity(),
        sanitize(&d.message()),
        sanitize(d.code())
    )
}

pub fn write(files: &[FileOutcome], out: &mut dyn Write) -> io::Result<()> {
    // the lines of [`line`], gathered and handed on in large pieces; a file's places are
    // looked up through one cursor, its name sanitized once
    let mut buf: Vec<u8> = Vec::with_capacity(CHUNK + 1024);
    for f in files {
        let mut places = Places::new(f.source.as_ref());
        let mut shown = ShownName::new();
        for d in f.fatal.iter().map(Diag::view).chain(&f.diags) {
            buf.extend_from_slice(
                shown
                    .get(super::file_name(f, d), |n| sanitize(n).into_owned())
                    .as_bytes(),
            );
            if let Some(p) = primary_label(d).and_then(|l| places.of(l.span)) {
                let mut n = itoa::Buffer::new();
                buf.push(b':');
                buf.extend_from_slice(n.format(p.line).as_bytes());
                buf.push(b':');
                buf.extend_from_slice(n.format(p.column).as_bytes());
            }
            buf.extend_from_slice(b": ");
            buf.extend_from_slice(d.severity().as_str().as_bytes());
            buf.extend_from_slice(b": ");
            buf.extend_from_slice(sanitize(&d.message()).as_bytes());
            buf.extend_from_slice(b" [");
            buf.extend_from_slice(sanitize(d.code()).as_bytes());
            buf.extend_from_slice(b"]\n");
            if buf.len() >= CHUNK {
                out.write_all(&buf)?;
                buf.clear();
            }
        }
    }
    out.write_all(&buf)
}

/// How much text is gathered before it is handed on.
const CHUNK: usize = 1 << 16;

#[cfg(test)]
mod tests {
    use super::*;

    /// The report is the line of each finding, one after another.
    #[test]
    fn the_report_is_each_findings_line() {
        let files = super::super::sample_outcomes();
        let mut want = String::new();
        for f in &files {
            for d in f.fatal.iter().map(Diag::view).chain(&f.diags) {
                want.push_str(&line(f, d));
                want.push('\n');
            }
        }
        let mut out = Vec::new();
        write(&files, &mut out).unwrap();
        assert!(want.len() > 2 * CHUNK && want.contains("sub/\\u{1b}[2Jb.kicad_sch:"));
        assert_eq!(String::from_utf8(out).unwrap(), want);
    }
}
