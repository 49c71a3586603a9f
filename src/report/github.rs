//! Annotations for CI workflow logs: one workflow command per finding,
//! `::error file=PATH,line=L,col=C,endLine=L,endColumn=C,title=TITLE::MESSAGE`, with
//! `::warning` for warnings and `::notice` for info. Paths are relative to the root.
//!
//! The runner reads a command only at the start of a line, and the properties up to the
//! first `::`. So the message escapes `%`, CR and LF (`%25`, `%0D`, `%0A`) and property values
//! also escape `:` and `,` (`%3A`, `%2C`): no text from a netlist can end a line, close the
//! properties or start a second command. Other control characters and bidi overrides are
//! shown as `\u{..}`, as on a terminal.

use std::io::{self, Write};

use super::{display_path, primary_place, ReportOptions};
use crate::diag::{Diag, Severity};
use crate::pipeline::FileOutcome;

/// The command for a severity.
pub fn command(s: Severity) -> &'static str {
    match s {
        Severity::Error => "error",
        Severity::Warning => "warning",
        Severity::Info => "notice",
    }
}

fn escape_with(s: &str, property: bool) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '%' => out.push_str("%25"),
            '\r' => out.push_str("%0D"),
            '\n' => out.push_str("%0A"),
            ':' if property => out.push_str("%3A"),
            ',' if property => out.push_str("%2C"),
            c => out.push_str(&crate::text::sanitize(c.encode_utf8(&mut [0; 4]))),
        }
    }
    out
}

/// Escapes a message (the text after `::`).
pub fn escape_data(s: &str) -> String {
    escape_with(s, false)
}

/// Escapes a property value (`file=`, `title=`).
pub fn escape_property(s: &str) -> String {
    escape_with(s, true)
}

/// The command line for one diagnostic (without the line end).
pub fn line(f: &FileOutcome, d: &Diag, opts: &ReportOptions) -> String {
    let mut props = vec![format!(
        "file={}",
        escape_property(&display_path(super::file_name(f, d), opts))
    )];
    if let Some(p) = primary_place(d, f.source.as_ref()) {
        props.push(format!("line={}", p.line));
        props.push(format!("col={}", p.column));
        props.push(format!("endLine={}", p.end_line));
        props.push(format!("endColumn={}", p.end_column));
    }
    props.push(format!(
        "title={}",
        escape_property(&format!("{} {}", super::TOOL_NAME, d.code))
    ));
    let mut message = d.message.to_string();
    if let Some(h) = &d.help {
        message.push_str("\nhelp: ");
        message.push_str(h);
    }
    format!(
        "::{} {}::{}",
        command(d.severity),
        props.join(","),
        escape_data(&message)
    )
}

pub fn write(opts: &ReportOptions, files: &[FileOutcome], out: &mut dyn Write) -> io::Result<()> {
    for f in files {
        for d in f.fatal.iter().chain(&f.diags) {
            writeln!(out, "{}", line(f, d, opts))?;
        }
    }
    Ok(())
}
