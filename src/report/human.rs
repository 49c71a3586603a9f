//! The human format: miette's graphical rendering of each diagnostic, with the source
//! lines, then a summary line per file and one for the whole run.
//!
//! miette prints the source lines as they are, so the text it is given is a copy in which
//! every character that could steer a terminal (controls, bidi overrides) is replaced by a
//! visible one of the same UTF-8 length: spans and columns stay right.

use std::borrow::Cow;
use std::io::{self, Write};

use miette::{GraphicalReportHandler, GraphicalTheme};

use super::{count, ReportOptions, Totals};
use crate::diag::{Diag, DiagRef, Rendered};
use crate::pipeline::FileOutcome;
use crate::source::SourceFile;
use crate::text::sanitize;

/// Rendering settings.
#[derive(Debug, Clone, Copy)]
pub struct HumanStyle {
    pub color: bool,
    pub width: usize,
}

pub fn handler(style: HumanStyle) -> GraphicalReportHandler {
    let theme = if style.color {
        GraphicalTheme::unicode()
    } else {
        GraphicalTheme::unicode_nocolor()
    };
    GraphicalReportHandler::new_themed(theme)
        .with_links(false)
        .with_width(style.width)
}

/// Labels further apart than this many lines are shown as separate excerpts, with the lines
/// between left out, instead of one excerpt of every line between them.
pub const EXCERPT_GAP_LINES: usize = 8;

/// Renders one diagnostic against its source. miette prints source lines as they are: pass
/// the source through [`safe_source`] first (once per file). Labels far apart are shown as
/// one excerpt each, the primary one first, with a marker that says how many lines were left
/// out between them.
pub fn render(h: &GraphicalReportHandler, diag: DiagRef<'_>, source: &SourceFile) -> String {
    let groups = label_groups(diag, source);
    if groups.len() <= 1 {
        return render_one(h, diag, source);
    }
    let diag = &diag.to_diag();
    let pick = |g: &[usize]| {
        g.iter()
            .map(|&i| diag.labels[i].clone())
            .collect::<Vec<_>>()
    };
    // the help comes after the last excerpt
    let main = Diag {
        labels: pick(&groups[0].1).into(),
        help: None,
        ..diag.clone()
    };
    let mut s = render_one(h, main.view(), source);
    for (i, (lines, g)) in groups.iter().enumerate().skip(1) {
        let primary = groups[0].0;
        let message = if lines.0 > primary.1 {
            // after the primary excerpt: the lines between it and the excerpt shown before it
            let prev_end = groups
                .iter()
                .take(i)
                .map(|(l, _)| l.1)
                .filter(|&end| end < lines.0)
                .max()
                .unwrap_or(primary.1);
            format!(
                "... {} lines left out; continued at line {} ...",
                lines.0 - prev_end - 1,
                lines.0
            )
        } else {
            format!(
                "... and above it, at line {} ({} lines before line {}) ...",
                lines.0,
                primary.0 - lines.1 - 1,
                primary.0
            )
        };
        let part = Diag {
            code: "".into(),
            severity: crate::diag::Severity::Info,
            message: message.into(),
            labels: pick(g).into(),
            help: if i + 1 == groups.len() {
                diag.help.clone()
            } else {
                None
            },
            net: None,
            pins: Default::default(),
        };
        s.push_str(&render_one(h, part.view(), source));
    }
    s
}

fn render_one(h: &GraphicalReportHandler, diag: DiagRef<'_>, source: &SourceFile) -> String {
    let mut s = String::new();
    let r = Rendered { diag, source };
    if h.render_report(&mut s, &r).is_err() {
        s = format!("{}: {}\n", diag.severity(), sanitize(&diag.message()));
    }
    s
}

/// The labels in groups of nearby lines: ((first line, last line), label indices), the
/// primary label's group first, the rest in file order.
fn label_groups(diag: DiagRef<'_>, source: &SourceFile) -> Vec<((usize, usize), Vec<usize>)> {
    let len = source.text().len();
    let line = |off: u32| source.line_index((off as usize).min(len)) + 1;
    let mut order: Vec<(usize, usize, usize)> = diag
        .labels()
        .enumerate()
        .map(|(i, l)| (line(l.span.start), line(l.span.end.max(l.span.start)), i))
        .collect();
    order.sort();
    let mut groups: Vec<((usize, usize), Vec<usize>)> = Vec::new();
    for (a, b, i) in order {
        match groups.last_mut() {
            Some((lines, g)) if a <= lines.1 + EXCERPT_GAP_LINES => {
                lines.1 = lines.1.max(b);
                g.push(i);
            }
            _ => groups.push(((a, b), vec![i])),
        }
    }
    if let Some(p) = groups.iter().position(|(_, g)| {
        g.iter()
            .any(|&i| diag.labels().nth(i).is_some_and(|l| l.primary))
    }) {
        let first = groups.remove(p);
        groups.insert(0, first);
    }
    groups
}

/// The source as it may be shown on a terminal: the same text, byte for byte the same
/// length, with each unsafe character replaced; the name sanitized.
pub fn safe_source(source: &SourceFile) -> Cow<'_, SourceFile> {
    let name = sanitize(source.name());
    let unsafe_text = has_unsafe(source.text().as_bytes());
    if !unsafe_text && matches!(name, Cow::Borrowed(_)) {
        return Cow::Borrowed(source);
    }
    let text: String = if unsafe_text {
        source.text().chars().map(same_width_stand_in).collect()
    } else {
        source.text().to_string()
    };
    Cow::Owned(SourceFile::new(name.into_owned(), text))
}

/// Whether `text` holds a character [`is_unsafe`] takes: a C0 control other than a line end
/// or a tab (looked for a block at a time, without an early exit, which the compiler turns
/// into wide steps), or one of those the JSON format escapes.
fn has_unsafe(text: &[u8]) -> bool {
    let c0 = |block: &[u8]| {
        block.iter().fold(0u8, |m, &b| {
            m | u8::from(b < 0x20 && b != b'\t' && b != b'\n' && b != b'\r')
        }) != 0
    };
    text.chunks(1 << 12).any(c0) || super::json::has_escapes(text)
}

/// Characters that must not reach a terminal inside a source line. Line ends stay: they
/// are line ends to miette as to the line index.
fn is_unsafe(c: char) -> bool {
    if c == '\n' || c == '\r' || c == '\t' {
        return false;
    }
    c.is_control()
        || matches!(c, '\u{200e}' | '\u{200f}' | '\u{202a}'..='\u{202e}' | '\u{2066}'..='\u{2069}' | '\u{2028}' | '\u{2029}')
}

fn same_width_stand_in(c: char) -> char {
    if !is_unsafe(c) {
        return c;
    }
    match c.len_utf8() {
        1 => '?',
        2 => '\u{bf}',
        _ => '\u{fffd}',
    }
}

/// Writes one file's diagnostics and its summary line.
pub fn write_file(
    out: &mut dyn Write,
    h: &GraphicalReportHandler,
    f: &FileOutcome,
) -> io::Result<()> {
    write_file_with(out, h, f, false)
}

fn write_file_with(
    out: &mut dyn Write,
    h: &GraphicalReportHandler,
    f: &FileOutcome,
    quiet: bool,
) -> io::Result<()> {
    let empty;
    let source = match &f.source {
        Some(s) => s,
        None => {
            empty = SourceFile::new(f.name.as_str(), "");
            &empty
        }
    };
    let shown = safe_source(source);
    let source: &SourceFile = &shown;
    if let Some(d) = &f.fatal {
        // a configuration or baseline holds every problem found in it: show them all
        for d in std::iter::once(d.view()).chain(&f.diags) {
            write!(out, "{}", render(h, d, source))?;
        }
        if !quiet {
            // a configuration, mapping file or baseline (a netlist stopped by its
            // configuration's errors has no source of its own)
            let settings_file =
                matches!(&*d.code, "config" | "mapping-file" | "baseline") && f.source.is_some();
            if settings_file {
                let n = 1 + f.diags.len();
                writeln!(
                    out,
                    "{}: cannot be used: {n} problem{}",
                    sanitize(&f.name),
                    if n == 1 { "" } else { "s" }
                )?;
            } else {
                writeln!(out, "{}: not checked: {}", sanitize(&f.name), d.code)?;
            }
        }
        return Ok(());
    }
    for group in fold(&f.diags) {
        let d = f.diags.get(group[0]).expect("a finding of the file");
        write!(out, "{}", render(h, d, source))?;
        if group.len() > 1 {
            // where each other finding is: its net, else its first pin, else the part its
            // message names first; a place named several times is named once, with a count
            let mut nets: Vec<(String, usize)> = Vec::new();
            // where each place is in `nets` (a group can hold a finding on every net)
            let mut at_index: rustc_hash::FxHashMap<String, usize> = Default::default();
            for &i in &group[1..] {
                let o = f.diags.get(i).expect("a finding of the file");
                let message = o.message();
                let at = o
                    .net()
                    .or_else(|| o.pins().next())
                    .or_else(|| message.split_whitespace().next())
                    .map(sanitize)
                    .unwrap_or_default();
                match at_index.get(&*at) {
                    Some(&k) => nets[k].1 += 1,
                    None => {
                        let at = at.into_owned();
                        at_index.insert(at.clone(), nets.len());
                        nets.push((at, 1));
                    }
                }
            }
            let count = group.len() - 1;
            let nets: Vec<String> = nets
                .into_iter()
                .map(|(n, k)| if k > 1 { format!("{n} (x{k})") } else { n })
                .collect();
            let shown = nets.len().min(FOLD_LIST);
            writeln!(
                out,
                "  ... and {} more {} like it ({}): {}{}\n",
                count,
                if count == 1 { "finding" } else { "findings" },
                d.code(),
                nets[..shown].join(", "),
                if nets.len() > shown {
                    format!(
                        ", ... ({} more places; every finding is in --format json or short)",
                        nets.len() - shown
                    )
                } else {
                    String::new()
                }
            )?;
        }
    }
    if quiet {
        return Ok(());
    }
    let s = f.summary;
    writeln!(
        out,
        "{}: {} parts, {} nets, {} pins, {} pins on no net",
        sanitize(&f.name),
        s.parts,
        s.nets,
        s.pins,
        s.pins_on_no_net
    )
}

/// Findings of one cause repeated at least this often are folded into the first.
const FOLD_AT: usize = 4;
/// Nets named in a fold line.
const FOLD_LIST: usize = 12;

/// A finding's shape: its check, severity and message with the names of places taken out
/// (every word that holds a digit, such as `U12`, `A7` or `/D3`, and quoted net names),
/// while figures with a decimal point (`2.70 V`) stay: findings of one shape are one cause
/// repeated across a bus or a row of parts.
#[cfg(test)]
fn shape(d: DiagRef<'_>) -> String {
    let mut out = String::new();
    shape_into(d, &mut out);
    out
}

/// [`shape`] written into `out` (cleared first), so one buffer serves every finding. A
/// message in ASCII (most) is cut into words a byte at a time; any other goes the way of
/// [`shape_chars`].
fn shape_into(d: DiagRef<'_>, out: &mut String) {
    out.clear();
    out.push_str(d.code());
    out.push('|');
    out.push_str(match d.severity() {
        crate::diag::Severity::Info => "Info",
        crate::diag::Severity::Warning => "Warning",
        crate::diag::Severity::Error => "Error",
    });
    out.push('|');
    let message = d.message();
    if !message.is_ascii() {
        shape_chars(&message, out);
        return;
    }
    // the separators of `shape_chars`, in ASCII (`char::is_whitespace` takes 0x09-0x0d and
    // the space)
    let sep = |b: u8| matches!(b, b'\t'..=b'\r' | b' ' | b'`' | b',' | b'(' | b')');
    let (m, bytes) = (&*message, message.as_bytes());
    let mut in_quote = false;
    // the text up to `run` is written; the word being read starts at `from`, and whether it
    // holds a digit or a point so far (a separator is neither)
    let (mut run, mut from, mut digit, mut point) = (0, 0, false, false);
    let mut word = |from: usize, end: usize, core_end: usize, digit: bool, point: bool| {
        let (first, last) = (bytes[from], bytes[end - 1]);
        if first == b'`' || in_quote {
            in_quote = last != b'`' || (end - from == 1 && !in_quote);
            out.push_str(&m[run..from]);
            out.push('@');
            run = end;
        } else if digit && !(point && (first.is_ascii_digit() || first == b'-')) {
            // the word without its separator (a backquote stays) holds a digit and is no
            // figure with a decimal point
            out.push_str(&m[run..from]);
            out.push('#');
            run = core_end;
        }
    };
    for (i, &b) in bytes.iter().enumerate() {
        if !sep(b) {
            digit |= b.is_ascii_digit();
            point |= b == b'.';
            continue;
        }
        word(from, i + 1, if b == b'`' { i + 1 } else { i }, digit, point);
        (from, digit, point) = (i + 1, false, false);
    }
    if from < bytes.len() {
        word(from, bytes.len(), bytes.len(), digit, point);
    }
    out.push_str(&m[run..]);
}

/// The words of [`shape`] for any message, a character at a time.
fn shape_chars(message: &str, out: &mut String) {
    let mut in_quote = false;
    for word in message.split_inclusive(|c: char| {
        c.is_whitespace() || c == '`' || c == ',' || c == '(' || c == ')'
    }) {
        if word.starts_with('`') || in_quote {
            in_quote = !word.ends_with('`') || (word == "`" && !in_quote);
            out.push('@');
            continue;
        }
        let core =
            word.trim_end_matches(|c: char| c.is_whitespace() || c == ',' || c == '(' || c == ')');
        let decimal = core.contains('.')
            && core
                .chars()
                .next()
                .is_some_and(|c| c.is_ascii_digit() || c == '-');
        if core.chars().any(|c| c.is_ascii_digit()) && !decimal {
            out.push('#');
            out.push_str(&word[core.len()..]);
        } else {
            out.push_str(word);
        }
    }
}

/// Groups findings of one shape, in the order of their first appearance; groups smaller than
/// [`FOLD_AT`] are split back into single findings.
fn fold(diags: &crate::diag::DiagList) -> Vec<Vec<usize>> {
    let mut by_shape: rustc_hash::FxHashMap<String, usize> = Default::default();
    let mut key = String::new();
    let mut groups: Vec<Vec<usize>> = Vec::new();
    for (i, d) in diags.iter().enumerate() {
        // only the checks' findings fold: every problem with the input is shown in full
        if crate::checks::info(d.code()).is_none() {
            groups.push(vec![i]);
            continue;
        }
        shape_into(d, &mut key);
        match by_shape.get(key.as_str()) {
            Some(&g) => groups[g].push(i),
            None => {
                by_shape.insert(key.clone(), groups.len());
                groups.push(vec![i]);
            }
        }
    }
    let mut out = Vec::new();
    for g in groups {
        if g.len() >= FOLD_AT {
            out.push(g);
        } else {
            out.extend(g.into_iter().map(|i| vec![i]));
        }
    }
    out.sort_by_key(|g| g[0]);
    out
}

/// The whole run in one line, e.g. `3 files, 57 parts, 131 nets: 2 errors, 5 warnings,
/// 1 info; 41 of 44 IC-like parts classified`.
pub fn run_summary(t: &Totals) -> String {
    let mut s = count(t.files, "file", "files");
    if t.not_checked > 0 {
        s.push_str(&format!(" ({} not checked)", t.not_checked));
    }
    s.push_str(&format!(
        ", {}, {}: {}, {}, {} info",
        count(t.parts, "part", "parts"),
        count(t.nets, "net", "nets"),
        count(t.errors, "error", "errors"),
        count(t.warnings, "warning", "warnings"),
        t.infos
    ));
    if let Some((classified, ic_like)) = t.coverage {
        s.push_str(&format!(
            "; {classified} of {ic_like} IC-like parts classified"
        ));
    }
    if t.waived > 0 {
        s.push_str(&format!("; {} suppressed", t.waived));
    }
    s
}

/// The human report of a whole run.
pub fn write(opts: &ReportOptions, files: &[FileOutcome], out: &mut dyn Write) -> io::Result<()> {
    let h = handler(HumanStyle {
        color: opts.color,
        width: opts.width,
    });
    for f in files {
        write_file_with(out, &h, f, opts.quiet)?;
    }
    if !opts.quiet {
        writeln!(
            out,
            "{}",
            run_summary(&Totals::of_run(files, opts.netlists))
        )?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    proptest::proptest! {
        /// The shape cut a byte at a time equals the shape cut a character at a time.
        #[test]
        fn ascii_shapes_are_the_shapes_cut_by_characters(
            m in "[a-zA-Z0-9 .,()`/\\-\t\n\x0b\x0c\r_:;]{0,60}|[UR0-9 .`-]{0,20}|\\PC{0,30}"
        ) {
            let d = Diag::warning("floating-cmos-input", m.clone());
            let mut want = format!("{}|{:?}|", d.code, d.severity);
            shape_chars(&m, &mut want);
            proptest::prop_assert_eq!(shape(d.view()), want);
        }
    }

    #[test]
    fn stand_ins_keep_every_byte_offset() {
        let text = "(ref \"U\x1b[2J\u{9b}1\u{202e}x\")\r\n(b)";
        let src = SourceFile::new("a\x1bb.net", text);
        let shown = safe_source(&src);
        assert_eq!(shown.text().len(), text.len());
        assert_eq!(shown.text(), "(ref \"U?[2J\u{bf}1\u{fffd}x\")\r\n(b)");
        assert_eq!(shown.name(), "a\\u{1b}b.net");
        assert_eq!(shown.line_count(), src.line_count());
        // every character is found unsafe by the quick look exactly when it is by `is_unsafe`
        for c in (0..0x3000).filter_map(char::from_u32) {
            let text = format!("(a \"{c}\")\r\n\t");
            assert_eq!(has_unsafe(text.as_bytes()), is_unsafe(c), "{:#x}", c as u32);
        }
        let clean = SourceFile::new("ok.net", "(a)\n");
        assert!(matches!(safe_source(&clean), Cow::Borrowed(_)));
    }

    #[test]
    fn one_cause_across_a_bus_folds_and_different_causes_do_not() {
        let mk = |msg: &str, net: &str| {
            crate::diag::Diag::error("ttl-high-into-cmos", msg).on_net(net.to_string())
        };
        let diags: crate::diag::DiagList = (0..8)
            .map(|i| {
                mk(
                    &format!("U{} pin {} (74HC245 input A{i}) needs 3.50 V; U7 pin {} (74LS574 output {i}Q) guarantees 2.70 V: short by 0.80 V", 20 + i, 2 + i, 12 + i),
                    &format!("/D{i}"),
                )
            })
            .chain(std::iter::once(mk(
                "U30 pin 1 (74HC00 input 1A) needs 3.50 V; U8 pin 3 (74LS00 output 1Y) guarantees 2.40 V: short by 1.10 V",
                "/X",
            )))
            .collect();
        let groups = fold(&diags);
        assert_eq!(groups, vec![(0..8).collect::<Vec<_>>(), vec![8]]);
        // three of a kind stay apart
        let few: crate::diag::DiagList = diags.iter().take(3).map(|d| d.to_diag()).collect();
        assert_eq!(fold(&few).len(), 3);
    }

    #[test]
    fn run_summary_names_the_numbers() {
        let t = Totals {
            files: 3,
            not_checked: 0,
            parts: 57,
            nets: 131,
            pins: 0,
            errors: 2,
            warnings: 5,
            infos: 1,
            coverage: Some((41, 44)),
            waived: 0,
        };
        assert_eq!(run_summary(&t), "3 files, 57 parts, 131 nets: 2 errors, 5 warnings, 1 info; 41 of 44 IC-like parts classified");
        let one = Totals {
            files: 1,
            not_checked: 1,
            parts: 1,
            nets: 1,
            pins: 0,
            errors: 1,
            warnings: 1,
            infos: 0,
            coverage: None,
            waived: 0,
        };
        assert_eq!(
            run_summary(&one),
            "1 file (1 not checked), 1 part, 1 net: 1 error, 1 warning, 0 info"
        );
    }
}
