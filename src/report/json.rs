//! The JSON format: one document for the whole run. Every field is described in
//! `docs/json-format.md`; `format_version` changes when a field changes meaning or goes away
//! (new fields may be added without a change).
//!
//! serde_json escapes the C0 controls; [`escape_unsafe`] then escapes what it leaves raw and
//! a terminal could still act on (DEL, C1 controls, bidi overrides, line and paragraph
//! separators), so the document can be shown on a terminal as it is and reads back the same.

use std::io::{self, Write};

use serde::Serialize;

use super::{
    fingerprint_hashes, fingerprint_key, fnv1a64, primary_label, related_labels, Place,
    ReportOptions, Totals, TOOL_NAME, TOOL_VERSION,
};
use crate::diag::{Diag, Severity};
use crate::pipeline::FileOutcome;
use crate::source::{SourceFile, Span};

/// The version of this document's layout.
pub const FORMAT_VERSION: u32 = 1;

#[derive(Serialize)]
struct Document<'a> {
    format_version: u32,
    tool: Tool,
    files: Vec<File<'a>>,
    totals: TotalsOut,
}

#[derive(Serialize)]
struct Tool {
    name: &'static str,
    version: &'static str,
}

#[derive(Serialize)]
struct File<'a> {
    path: &'a str,
    checked: bool,
    error: Option<Finding<'a>>,
    summary: Option<SummaryOut>,
    findings: Findings<'a>,
}

/// A file's findings, each made into its [`Finding`] as it is written (never all at once:
/// a board can have hundreds of thousands).
struct Findings<'a> {
    diags: &'a [Diag],
    source: Option<&'a SourceFile>,
    fingerprints: Vec<u64>,
}

impl Serialize for Findings<'_> {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_seq(
            self.diags
                .iter()
                .zip(&self.fingerprints)
                .map(|(d, &fp)| finding(d, self.source, fp)),
        )
    }
}

/// A fingerprint, written as 16 hex digits.
struct Fingerprint(u64);

impl Serialize for Fingerprint {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        const HEX: &[u8; 16] = b"0123456789abcdef";
        let mut digits = [0u8; 16];
        for (i, d) in digits.iter_mut().enumerate() {
            *d = HEX[((self.0 >> (60 - 4 * i)) & 0xf) as usize];
        }
        s.serialize_str(std::str::from_utf8(&digits).expect("hex digits are ASCII"))
    }
}

#[derive(Serialize)]
struct SummaryOut {
    parts: usize,
    nets: usize,
    pins: usize,
    pins_on_no_net: usize,
    classified: Option<usize>,
    ic_like: Option<usize>,
}

#[derive(Serialize)]
struct Finding<'a> {
    check: &'a str,
    severity: Severity,
    message: &'a str,
    net: Option<&'a str>,
    pins: &'a [String],
    label: Option<&'a str>,
    #[serde(flatten)]
    place: PlaceOut,
    help: Option<&'a str>,
    related: Vec<Related<'a>>,
    fingerprint: Fingerprint,
}

#[derive(Serialize)]
struct Related<'a> {
    message: &'a str,
    #[serde(flatten)]
    place: PlaceOut,
}

#[derive(Serialize, Default)]
struct PlaceOut {
    /// The sheet file the place is in, for a schematic project (absent for a netlist: the
    /// file's `path` says it).
    #[serde(skip_serializing_if = "Option::is_none")]
    file: Option<String>,
    line: Option<usize>,
    column: Option<usize>,
    end_line: Option<usize>,
    end_column: Option<usize>,
    byte_offset: Option<usize>,
    byte_length: Option<usize>,
}

impl PlaceOut {
    fn of(source: Option<&SourceFile>, span: Option<Span>) -> PlaceOut {
        match (source, span) {
            (Some(src), Some(span)) => {
                let p = Place::of(src, span);
                PlaceOut {
                    file: (!src.files().is_empty())
                        .then(|| src.file_at(span.start as usize).to_string()),
                    line: Some(p.line),
                    column: Some(p.column),
                    end_line: Some(p.end_line),
                    end_column: Some(p.end_column),
                    byte_offset: Some(p.byte_offset),
                    byte_length: Some(p.byte_length),
                }
            }
            _ => PlaceOut::default(),
        }
    }
}

#[derive(Serialize)]
struct TotalsOut {
    files: usize,
    checked: usize,
    not_checked: usize,
    parts: usize,
    nets: usize,
    pins: usize,
    errors: usize,
    warnings: usize,
    infos: usize,
    classified: Option<usize>,
    ic_like: Option<usize>,
}

fn finding<'a>(d: &'a Diag, source: Option<&SourceFile>, fingerprint: u64) -> Finding<'a> {
    let primary = primary_label(d);
    Finding {
        check: &d.code,
        severity: d.severity,
        message: &d.message,
        net: d.net.as_deref(),
        pins: &d.pins,
        label: primary.map(|l| &*l.text).filter(|t| !t.is_empty()),
        place: PlaceOut::of(source, primary.map(|l| l.span)),
        help: d.help.as_deref(),
        related: related_labels(d)
            .map(|l| Related {
                message: &l.text,
                place: PlaceOut::of(source, Some(l.span)),
            })
            .collect(),
        fingerprint: Fingerprint(fingerprint),
    }
}

fn document(files: &[FileOutcome], netlists: Option<usize>) -> Document<'_> {
    let t = Totals::of_run(files, netlists);
    let out_files = files
        .iter()
        .map(|f| {
            let src = f.source.as_ref();
            let checked = f.fatal.is_none();
            File {
                path: &f.name,
                checked,
                error: f
                    .fatal
                    .as_ref()
                    .map(|d| finding(d, src, fnv1a64(fingerprint_key(d, src).as_bytes()))),
                summary: checked.then(|| SummaryOut {
                    parts: f.summary.parts,
                    nets: f.summary.nets,
                    pins: f.summary.pins,
                    pins_on_no_net: f.summary.pins_on_no_net,
                    classified: f.coverage.map(|c| c.0),
                    ic_like: f.coverage.map(|c| c.1),
                }),
                findings: Findings {
                    diags: &f.diags,
                    source: src,
                    fingerprints: fingerprint_hashes(f),
                },
            }
        })
        .collect();
    Document {
        format_version: FORMAT_VERSION,
        tool: Tool {
            name: TOOL_NAME,
            version: TOOL_VERSION,
        },
        files: out_files,
        totals: TotalsOut {
            files: t.files,
            checked: t.files - t.not_checked,
            not_checked: t.not_checked,
            parts: t.parts,
            nets: t.nets,
            pins: t.pins,
            errors: t.errors,
            warnings: t.warnings,
            infos: t.infos,
            classified: t.coverage.map(|c| c.0),
            ic_like: t.coverage.map(|c| c.1),
        },
    }
}

/// Escapes, as `\uXXXX`, the characters serde_json leaves raw that a terminal could act on.
/// serde_json's output is ASCII outside strings, so each such character is inside a string
/// and the escape reads back as the same character.
pub fn escape_unsafe(json: String) -> String {
    if unsafe_at(json.as_bytes()).next().is_none() {
        return json;
    }
    let mut out = String::with_capacity(json.len() + 16);
    for c in json.chars() {
        if needs_escape(c) {
            out.push_str(&format!("\\u{:04x}", c as u32));
        } else {
            out.push(c);
        }
    }
    out
}

fn needs_escape(c: char) -> bool {
    // all are in the Basic Multilingual Plane: one `\uXXXX` each
    c == '\u{7f}'
        || ('\u{80}'..='\u{9f}').contains(&c)
        || matches!(c, '\u{200e}' | '\u{200f}' | '\u{202a}'..='\u{202e}' | '\u{2066}'..='\u{2069}' | '\u{2028}' | '\u{2029}')
}

/// Where the characters [`needs_escape`] takes start in UTF-8 `text`, with each character
/// (`None` when the text ends inside it). Each is DEL, or starts with the byte 0xC2 (the C1
/// controls) or 0xE2 (the others): only those bytes are looked at.
fn unsafe_at(text: &[u8]) -> impl Iterator<Item = (usize, Option<char>)> + '_ {
    memchr::memchr3_iter(0x7f, 0xc2, 0xe2, text).filter_map(move |i| {
        let len = match text[i] {
            0x7f => 1,
            0xc2 => 2,
            _ => 3,
        };
        let Some(bytes) = text.get(i..i + len) else {
            return Some((i, None));
        };
        let c = std::str::from_utf8(bytes).ok()?.chars().next()?;
        needs_escape(c).then_some((i, Some(c)))
    })
}

/// A writer that passes UTF-8 text on with [`escape_unsafe`]'s escapes, so a document is
/// escaped as it is written, never held whole. A character cut between two writes is kept
/// until the rest of it comes.
struct Escaping<'w> {
    out: &'w mut dyn Write,
    /// The start of a character a write ended inside.
    pending: Vec<u8>,
}

impl Escaping<'_> {
    /// Writes `text`, escaped; keeps a cut character at its end for the next write.
    fn pass(&mut self, text: &[u8]) -> io::Result<()> {
        let mut from = 0;
        for (i, c) in unsafe_at(text) {
            self.out.write_all(&text[from..i])?;
            match c {
                Some(c) => {
                    write!(self.out, "\\u{:04x}", c as u32)?;
                    from = i + c.len_utf8();
                }
                None => {
                    self.pending.extend_from_slice(&text[i..]);
                    return Ok(());
                }
            }
        }
        self.out.write_all(&text[from..])
    }

    /// Writes what is left and the final line end.
    fn finish(self) -> io::Result<()> {
        self.out.write_all(&self.pending)?;
        self.out.write_all(b"\n")
    }
}

impl Write for Escaping<'_> {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        if self.pending.is_empty() {
            self.pass(buf)?;
        } else {
            let mut joined = std::mem::take(&mut self.pending);
            joined.extend_from_slice(buf);
            self.pass(&joined)?;
        }
        Ok(buf.len())
    }

    fn flush(&mut self) -> io::Result<()> {
        self.out.flush()
    }
}

/// The document as text, with a final line end.
pub fn to_string(files: &[FileOutcome]) -> String {
    to_string_run(files, None)
}

/// [`to_string`] for a run whose first `netlists` outcomes are netlists (`None`: all).
pub fn to_string_run(files: &[FileOutcome], netlists: Option<usize>) -> String {
    let mut out = Vec::new();
    write_run(files, netlists, &mut out).expect("a document of strings and numbers serializes");
    String::from_utf8(out).expect("serde_json writes UTF-8")
}

pub fn write(opts: &ReportOptions, files: &[FileOutcome], out: &mut dyn Write) -> io::Result<()> {
    write_run(files, opts.netlists, out)
}

/// The document written to `out` as it is serialized, escaped on the way, with a final line
/// end.
fn write_run(
    files: &[FileOutcome],
    netlists: Option<usize>,
    out: &mut dyn Write,
) -> io::Result<()> {
    // serde_json writes in small pieces: the escape looks at them in large ones
    let mut w = io::BufWriter::with_capacity(
        1 << 16,
        Escaping {
            out,
            pending: Vec::new(),
        },
    );
    serde_json::to_writer_pretty(&mut w, &document(files, netlists)).map_err(io::Error::from)?;
    w.into_inner()
        .map_err(io::IntoInnerError::into_error)?
        .finish()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The writer escapes as the whole-text escape does, however the text is cut into
    /// writes (here one byte at a time, so every character of more than one byte is cut).
    #[test]
    fn the_streaming_escape_equals_the_whole_text_escape() {
        let s = "x\u{7f}µ\u{9b}\u{202e}Ω\u{2028}\u{2066}\u{2069}\u{2070}é\u{a0}";
        let json = serde_json::to_string(s).unwrap();
        for chunk in [1, 2, 3, json.len()] {
            let mut out = Vec::new();
            let mut w = Escaping {
                out: &mut out,
                pending: Vec::new(),
            };
            for part in json.as_bytes().chunks(chunk) {
                w.write_all(part).unwrap();
            }
            w.finish().unwrap();
            let want = escape_unsafe(json.clone()) + "\n";
            assert_eq!(
                String::from_utf8(out).unwrap(),
                want,
                "writes of {chunk} bytes"
            );
        }
        // U+2070 and U+00A0 start with the bytes looked at but are left as they are
        assert!(escape_unsafe(json.clone()).contains("\u{2070}é\u{a0}"));
        assert!(!escape_unsafe(json).contains('\u{2069}'));
    }

    #[test]
    fn fingerprints_are_written_as_the_report_formats_them() {
        for h in [
            0u64,
            1,
            0xf,
            0x0123_4567_89ab_cdef,
            u64::MAX,
            0x8000_0000_0000_0000,
        ] {
            let json = serde_json::to_string(&Fingerprint(h)).unwrap();
            assert_eq!(json, format!("\"{h:016x}\""));
        }
    }

    #[test]
    fn escapes_what_serde_json_leaves_raw_and_reads_back_the_same() {
        let s = "a\u{7f}b\u{9b}c\u{202e}d\u{2028}e µΩ \u{1b}";
        let json = escape_unsafe(serde_json::to_string(s).unwrap());
        assert!(!json.chars().any(needs_escape));
        assert!(!json.contains('\u{1b}') && !json.contains('\u{202e}') && !json.contains('\u{9b}'));
        assert!(json.contains("\\u202e") && json.contains("\\u001b") && json.contains("µΩ"));
        let back: String = serde_json::from_str(&json).unwrap();
        assert_eq!(back, s);
    }
}
