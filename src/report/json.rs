//! The JSON format: one document for the whole run. Every field is described in
//! `docs/json-format.md`; `format_version` changes when a field changes meaning or goes away
//! (new fields may be added without a change).
//!
//! serde_json escapes the C0 controls; [`escape_unsafe`] then escapes what it leaves raw and
//! a terminal could still act on (DEL, C1 controls, bidi overrides, line and paragraph
//! separators), so the document can be shown on a terminal as it is and reads back the same.
//! The document is written record by record by [`super::pretty::PrettyOut`], whose text is
//! that of `escape_unsafe(serde_json::to_string_pretty(..))` in [`Pretty`]'s layout
//! ([`write_safe_pretty`], kept for the parts written through serde).

use std::io::{self, Write};

#[cfg(test)]
use serde::Serialize;

use super::pretty::{PrettyOut, Repeats};
use super::{
    fingerprint_hash_iter, fingerprint_key, fnv1a64, primary_label, related_labels, Places,
    ReportOptions, Totals, TOOL_NAME, TOOL_VERSION,
};
use crate::diag::DiagRef;
use crate::pipeline::FileOutcome;
use crate::source::Span;

/// The version of this document's layout.
pub const FORMAT_VERSION: u32 = 1;

/// Where a finding or a related place is, written as fields of the object that holds it.
#[derive(Default)]
struct PlaceOut<'a> {
    /// The sheet file the place is in, for a schematic project (absent for a netlist: the
    /// file's `path` says it).
    file: Option<&'a str>,
    line: Option<usize>,
    column: Option<usize>,
    end_line: Option<usize>,
    end_column: Option<usize>,
    byte_offset: Option<usize>,
    byte_length: Option<usize>,
}

impl PlaceOut<'_> {
    fn write(&self, w: &mut PrettyOut<'_>) {
        if let Some(file) = self.file {
            w.key("file").str(file);
        }
        w.key("line").opt_num(self.line);
        w.key("column").opt_num(self.column);
        w.key("end_line").opt_num(self.end_line);
        w.key("end_column").opt_num(self.end_column);
        w.key("byte_offset").opt_num(self.byte_offset);
        w.key("byte_length").opt_num(self.byte_length);
    }
}

impl<'a> PlaceOut<'a> {
    fn of(places: &mut Places<'a>, span: Option<Span>) -> PlaceOut<'a> {
        match (span, places.source()) {
            (Some(span), Some(src)) => {
                let p = places.of(span).expect("the text is known");
                PlaceOut {
                    file: (!src.files().is_empty()).then(|| src.file_at(span.start as usize)),
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

    /// The place's fields, copied from `kept` when the same span was written in the same
    /// state before (the fields depend on nothing but the span and the source).
    fn write_at(
        w: &mut PrettyOut<'_>,
        places: &mut Places<'a>,
        kept: &mut Repeats,
        span: Option<Span>,
    ) {
        match span {
            Some(span) if places.source().is_some() => {
                w.repeat(kept, span, |w| PlaceOut::of(places, Some(span)).write(w))
            }
            _ => PlaceOut::default().write(w),
        }
    }
}

/// One finding as an object: its place's fields sit among its own.
fn write_finding<'a>(
    w: &mut PrettyOut<'_>,
    d: DiagRef<'a>,
    places: &mut Places<'a>,
    kept: &mut Repeats,
    fingerprint: u64,
) {
    let primary = primary_label(d);
    w.open_object();
    w.key("check").str(d.code());
    w.key("severity").word(d.severity().as_str());
    let parts = d.message_parts();
    match parts.three() {
        Some(three) => w.key("message").str_parts(three),
        None => w.key("message").str_part_list(parts.iter()),
    }
    w.key("net").opt_str(d.net());
    w.key("pins").strs(d.pins());
    w.key("label")
        .opt_str(primary.map(|l| l.text).filter(|t| !t.is_empty()));
    PlaceOut::write_at(w, places, kept, primary.map(|l| l.span));
    w.key("help").opt_str(d.help());
    w.key("related").open_array();
    for l in related_labels(d) {
        w.item().open_object();
        w.key("message").str(l.text);
        PlaceOut::write_at(w, places, kept, Some(l.span));
        w.close_object();
    }
    w.close_array();
    w.key("fingerprint").hex64(fingerprint);
    w.close_object();
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

/// Whether UTF-8 `text` holds a character [`needs_escape`] takes.
pub(crate) fn has_escapes(text: &[u8]) -> bool {
    unsafe_at(text).next().is_some()
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

/// serde_json's pretty layout (objects and arrays over lines, two spaces a level), with each
/// line break and its indent written at once (serde_json's own writes the indent a level at a
/// time).
pub(crate) struct Pretty {
    depth: usize,
    has_value: bool,
}

impl Pretty {
    #[cfg(test)]
    pub(crate) fn new() -> Pretty {
        Pretty::at_depth(0)
    }

    /// The layout of a value written inside `depth` open objects and arrays.
    pub(crate) fn at_depth(depth: usize) -> Pretty {
        Pretty {
            depth,
            has_value: false,
        }
    }

    /// `,` when not the first item, a line break and the indent of the current depth.
    fn line<W: ?Sized + Write>(&self, w: &mut W, comma: bool) -> io::Result<()> {
        const BREAK: &[u8] = b",\n                                                                ";
        let from = usize::from(!comma);
        let want = 2 + 2 * self.depth;
        if want <= BREAK.len() {
            w.write_all(&BREAK[from..want])
        } else {
            w.write_all(&BREAK[from..2])?;
            for _ in 0..self.depth {
                w.write_all(b"  ")?;
            }
            Ok(())
        }
    }

    fn close<W: ?Sized + Write>(&mut self, w: &mut W, bracket: &[u8]) -> io::Result<()> {
        self.depth -= 1;
        if self.has_value {
            self.line(w, false)?;
        }
        w.write_all(bracket)
    }
}

impl serde_json::ser::Formatter for Pretty {
    fn begin_array<W: ?Sized + Write>(&mut self, w: &mut W) -> io::Result<()> {
        self.depth += 1;
        self.has_value = false;
        w.write_all(b"[")
    }

    fn end_array<W: ?Sized + Write>(&mut self, w: &mut W) -> io::Result<()> {
        self.close(w, b"]")
    }

    fn begin_array_value<W: ?Sized + Write>(&mut self, w: &mut W, first: bool) -> io::Result<()> {
        self.line(w, !first)
    }

    fn end_array_value<W: ?Sized + Write>(&mut self, _w: &mut W) -> io::Result<()> {
        self.has_value = true;
        Ok(())
    }

    fn begin_object<W: ?Sized + Write>(&mut self, w: &mut W) -> io::Result<()> {
        self.depth += 1;
        self.has_value = false;
        w.write_all(b"{")
    }

    fn end_object<W: ?Sized + Write>(&mut self, w: &mut W) -> io::Result<()> {
        self.close(w, b"}")
    }

    fn begin_object_key<W: ?Sized + Write>(&mut self, w: &mut W, first: bool) -> io::Result<()> {
        self.line(w, !first)
    }

    fn begin_object_value<W: ?Sized + Write>(&mut self, w: &mut W) -> io::Result<()> {
        w.write_all(b": ")
    }

    fn end_object_value<W: ?Sized + Write>(&mut self, _w: &mut W) -> io::Result<()> {
        self.has_value = true;
        Ok(())
    }
}

/// (The serde path the reports took before [`PrettyOut`]; kept as the reference its tests
/// compare with.)
///
/// A writer that passes UTF-8 text on with [`escape_unsafe`]'s escapes, so a document is
/// escaped as it is written, never held whole. A character cut between two writes is kept
/// until the rest of it comes.
#[cfg(test)]
struct Escaping<'w> {
    out: &'w mut dyn Write,
    /// The start of a character a write ended inside.
    pending: Vec<u8>,
}

#[cfg(test)]
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

#[cfg(test)]
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

/// Writes `value` to `out` in [`Pretty`]'s layout, escaped on the way (the text is
/// `escape_unsafe(to_string_pretty(value))`), with a final line end. The document is never
/// held whole.
#[cfg(test)]
pub(crate) fn write_safe_pretty<T: Serialize + ?Sized>(
    value: &T,
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
    let mut ser = serde_json::Serializer::with_formatter(&mut w, Pretty::new());
    value.serialize(&mut ser).map_err(io::Error::from)?;
    w.into_inner()
        .map_err(io::IntoInnerError::into_error)?
        .finish()
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

/// The document written to `out`, record by record (never held whole), with a final line
/// end. The fields and their order are those of `docs/json-format.md`.
fn write_run(
    files: &[FileOutcome],
    netlists: Option<usize>,
    out: &mut dyn Write,
) -> io::Result<()> {
    let t = Totals::of_run(files, netlists);
    let mut w = PrettyOut::new(out);
    w.open_object();
    w.key("format_version").num(FORMAT_VERSION as usize);
    w.key("tool").open_object();
    w.key("name").str(TOOL_NAME);
    w.key("version").str(TOOL_VERSION);
    w.close_object();
    w.key("files").open_array();
    for f in files {
        let src = f.source.as_ref();
        let checked = f.fatal.is_none();
        w.item().open_object();
        w.key("path").str(&f.name);
        w.key("checked").bool(checked);
        w.key("error");
        match &f.fatal {
            Some(d) => {
                let d = d.view();
                let fp = fnv1a64(fingerprint_key(d, src).as_bytes());
                write_finding(&mut w, d, &mut Places::new(src), &mut Repeats::new(), fp);
            }
            None => w.null(),
        }
        w.key("summary");
        if checked {
            w.open_object();
            w.key("parts").num(f.summary.parts);
            w.key("nets").num(f.summary.nets);
            w.key("pins").num(f.summary.pins);
            w.key("pins_on_no_net").num(f.summary.pins_on_no_net);
            w.key("classified").opt_num(f.coverage.map(|c| c.0));
            w.key("ic_like").opt_num(f.coverage.map(|c| c.1));
            w.close_object();
        } else {
            w.null();
        }
        w.key("findings").open_array();
        // findings of one part come together: their lines are looked up near each other
        let mut places = Places::new(src);
        let mut kept = Repeats::new();
        for (d, fp) in f.diags.iter().zip(fingerprint_hash_iter(f)) {
            w.item();
            write_finding(&mut w, d, &mut places, &mut kept, fp);
            w.flush_some()?;
        }
        w.close_array();
        w.close_object();
    }
    w.close_array();
    w.key("totals").open_object();
    w.key("files").num(t.files);
    w.key("checked").num(t.files - t.not_checked);
    w.key("not_checked").num(t.not_checked);
    w.key("parts").num(t.parts);
    w.key("nets").num(t.nets);
    w.key("pins").num(t.pins);
    w.key("errors").num(t.errors);
    w.key("warnings").num(t.warnings);
    w.key("infos").num(t.infos);
    w.key("classified").opt_num(t.coverage.map(|c| c.0));
    w.key("ic_like").opt_num(t.coverage.map(|c| c.1));
    w.close_object();
    w.close_object();
    w.finish()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The layout is serde_json's pretty one with the whole-text escape applied: nested,
    /// empty and deep objects and arrays, keys and strings with characters to escape.
    #[test]
    fn safe_pretty_writes_the_escaped_pretty_text() {
        let deep = (0..40).fold(
            serde_json::json!([1, "x\u{202e}"]),
            |v, i| serde_json::json!({ format!("k{i}"): v, "e": [], "o": {} }),
        );
        let doc = serde_json::json!({
            "a": "x\u{7f}µ\u{9b}\u{202e}Ω\u{2028}\u{2066}\u{2069}\u{2070}é\u{a0}\"\\\n\u{1b}",
            "k\u{2029}ey": [1, 2.5, null, true, [], {}, [[]], {"x": {"y": []}}],
            "empty": {},
            "list": [{"m": "\u{200e}", "n": -3}, "s"],
            "deep": deep,
        });
        let mut out = Vec::new();
        write_safe_pretty(&doc, &mut out).unwrap();
        let want = escape_unsafe(serde_json::to_string_pretty(&doc).unwrap()) + "\n";
        assert_eq!(String::from_utf8(out).unwrap(), want);
        // U+2070 and U+00A0 start with the bytes looked at but are left as they are
        assert!(want.contains("\u{2070}é\u{a0}"));
        assert!(!want.contains('\u{2069}') && want.contains("\\u2069"));
    }

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
