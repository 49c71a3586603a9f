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

use super::{display_path, primary_label, primary_place, Places, ReportOptions, ShownName};
use crate::diag::{Diag, DiagRef, Severity};
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
    escape_into(&mut out, s, property);
    out
}

/// [`escape_with`] appended to `out`. A text with no byte that could be escaped (most) is
/// copied at once; any other is escaped character by character.
fn escape_into(out: &mut String, s: &str, property: bool) {
    let plain = !crate::text::may_be_unsafe(s.as_bytes())
        && !s.bytes().fold(false, |any, b| {
            any | (b == b'%') | (property & ((b == b':') | (b == b',')))
        });
    if plain {
        out.push_str(s);
    } else {
        escape_chars(out, s, property);
    }
}

/// [`escape_into`] one character at a time.
fn escape_chars(out: &mut String, s: &str, property: bool) {
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
pub fn line(f: &FileOutcome, d: DiagRef<'_>, opts: &ReportOptions) -> String {
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
        escape_property(&format!("{} {}", super::TOOL_NAME, d.code()))
    ));
    let mut message = d.message().into_owned();
    if let Some(h) = d.help() {
        message.push_str("\nhelp: ");
        message.push_str(h);
    }
    format!(
        "::{} {}::{}",
        command(d.severity()),
        props.join(","),
        escape_data(&message)
    )
}

pub fn write(opts: &ReportOptions, files: &[FileOutcome], out: &mut dyn Write) -> io::Result<()> {
    // the lines of [`line`], gathered and handed on in large pieces; a file's places are
    // looked up through one cursor, its path worked out once
    let mut buf = String::with_capacity(CHUNK + 1024);
    for f in files {
        let mut places = Places::new(f.source.as_ref());
        let mut shown = ShownName::new();
        for d in f.fatal.iter().map(Diag::view).chain(&f.diags) {
            buf.push_str("::");
            buf.push_str(command(d.severity()));
            buf.push_str(" file=");
            buf.push_str(shown.get(super::file_name(f, d), |n| {
                escape_property(&display_path(n, opts))
            }));
            if let Some(p) = primary_label(d).and_then(|l| places.of(l.span)) {
                let mut n = itoa::Buffer::new();
                for (key, v) in [
                    (",line=", p.line),
                    (",col=", p.column),
                    (",endLine=", p.end_line),
                    (",endColumn=", p.end_column),
                ] {
                    buf.push_str(key);
                    buf.push_str(n.format(v));
                }
            }
            buf.push_str(",title=");
            escape_into(&mut buf, super::TOOL_NAME, true);
            escape_into(&mut buf, " ", true);
            escape_into(&mut buf, d.code(), true);
            buf.push_str("::");
            escape_into(&mut buf, &d.message(), false);
            if let Some(h) = d.help() {
                escape_into(&mut buf, "\nhelp: ", false);
                escape_into(&mut buf, h, false);
            }
            buf.push('\n');
            if buf.len() >= CHUNK {
                out.write_all(buf.as_bytes())?;
                buf.clear();
            }
        }
    }
    out.write_all(buf.as_bytes())
}

/// How much text is gathered before it is handed on.
const CHUNK: usize = 1 << 16;

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// The report is the line of each finding, one after another.
    #[test]
    fn the_report_is_each_findings_line() {
        let files = super::super::sample_outcomes();
        let opts = ReportOptions::new(super::super::Format::Github, "/repo");
        let mut want = String::new();
        for f in &files {
            for d in f.fatal.iter().map(Diag::view).chain(&f.diags) {
                want.push_str(&line(f, d, &opts));
                want.push('\n');
            }
        }
        let mut out = Vec::new();
        write(&opts, &files, &mut out).unwrap();
        assert!(want.len() > 2 * CHUNK && want.contains("file=sub/\\u{1b}[2Jb.kicad_sch,line="));
        assert_eq!(String::from_utf8(out).unwrap(), want);
    }

    proptest! {
        /// Texts copied at once are those escaping one character at a time leaves alone.
        #[test]
        fn texts_copied_at_once_are_escaped_as_one_character_at_a_time(
            s in "\\PC*|[ -~\t\r\n\u{7f}-\u{a0}\u{2000}-\u{2070}%:,µΩ]{0,60}",
            property: bool,
        ) {
            let mut fast = String::new();
            escape_into(&mut fast, &s, property);
            let mut slow = String::new();
            escape_chars(&mut slow, &s, property);
            prop_assert_eq!(fast, slow);
        }
    }
}
