//! The one diagnostic shape every layer produces (reader errors, netlist-model problems,
//! and later the checks' findings) and its miette rendering.
//!
//! Layers build [`Diag`] values as plain data; only the reporters decide how they look.

use std::borrow::Cow;
use std::fmt;

use miette::{Diagnostic, LabeledSpan, SourceCode};
use serde::Serialize;

use crate::source::{SourceFile, Span};

/// How serious a diagnostic is. Ordered: `Info < Warning < Error`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Severity {
    Info,
    Warning,
    Error,
}

impl Severity {
    pub fn as_str(self) -> &'static str {
        match self {
            Severity::Info => "info",
            Severity::Warning => "warning",
            Severity::Error => "error",
        }
    }
}

impl fmt::Display for Severity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// A labelled place in the source.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Label {
    pub span: Span,
    /// Most label texts are fixed words (`open TTL input`, `unused gate`): those are held
    /// without an allocation.
    pub text: Cow<'static, str>,
    pub primary: bool,
}

/// One diagnostic: a code, a severity, a message with the numbers, places in the file, a fix.
///
/// A board can have hundreds of thousands of findings, so a finding holds no more than it
/// says: the code (a check's `INFO.id`, a `&'static str`), fixed label and help texts are
/// borrowed, not copied, and the label and pin lists are allocated to their length.
#[derive(Debug, Clone, PartialEq)]
pub struct Diag {
    /// Stable kebab-case id, e.g. `unclosed-list` or `floating-cmos-input`.
    pub code: Cow<'static, str>,
    pub severity: Severity,
    pub message: String,
    /// The first primary label is the diagnostic's location.
    pub labels: Vec<Label>,
    pub help: Option<Cow<'static, str>>,
    /// The net the finding is about, by name.
    pub net: Option<String>,
    /// The pins involved, as `REF.PIN`, the offending one first.
    pub pins: Vec<String>,
}

impl Diag {
    pub fn new(
        code: impl Into<Cow<'static, str>>,
        severity: Severity,
        message: impl Into<String>,
    ) -> Diag {
        let mut message = message.into();
        // a formatted message carries spare capacity; a finding is held to the end of the run
        message.shrink_to_fit();
        Diag {
            code: code.into(),
            severity,
            message,
            labels: Vec::new(),
            help: None,
            net: None,
            pins: Vec::new(),
        }
    }
    pub fn error(code: impl Into<Cow<'static, str>>, message: impl Into<String>) -> Diag {
        Diag::new(code, Severity::Error, message)
    }
    pub fn warning(code: impl Into<Cow<'static, str>>, message: impl Into<String>) -> Diag {
        Diag::new(code, Severity::Warning, message)
    }
    pub fn info(code: impl Into<Cow<'static, str>>, message: impl Into<String>) -> Diag {
        Diag::new(code, Severity::Info, message)
    }
    /// Adds the primary place.
    pub fn at(mut self, span: Span, text: impl Into<Cow<'static, str>>) -> Diag {
        self.push_label(Label {
            span,
            text: text.into(),
            primary: true,
        });
        self
    }
    /// Adds a secondary place.
    pub fn also(mut self, span: Span, text: impl Into<Cow<'static, str>>) -> Diag {
        self.push_label(Label {
            span,
            text: text.into(),
            primary: false,
        });
        self
    }
    /// Most findings have one label: the first gets room for one, not the four a growing
    /// list starts with.
    fn push_label(&mut self, label: Label) {
        if self.labels.capacity() == 0 {
            self.labels.reserve_exact(1);
        }
        self.labels.push(label);
    }
    pub fn with_help(mut self, help: impl Into<Cow<'static, str>>) -> Diag {
        let mut help = help.into();
        if let Cow::Owned(h) = &mut help {
            h.shrink_to_fit();
        }
        self.help = Some(help);
        self
    }
    pub fn on_net(mut self, net: impl Into<String>) -> Diag {
        self.net = Some(net.into());
        self
    }
    pub fn with_pins<I: IntoIterator<Item = S>, S: Into<String>>(mut self, pins: I) -> Diag {
        let pins = pins.into_iter();
        // room for what is given, not a growing list's spare
        self.pins.reserve_exact(pins.size_hint().0);
        self.pins.extend(pins.map(Into::into));
        self
    }
    /// The primary span, if any.
    pub fn primary_span(&self) -> Option<Span> {
        self.labels
            .iter()
            .find(|l| l.primary)
            .or(self.labels.first())
            .map(|l| l.span)
    }
}

/// A diagnostic bound to its source, ready for miette's graphical handler.
pub struct Rendered<'a> {
    pub diag: &'a Diag,
    pub source: &'a SourceFile,
}

impl fmt::Debug for Rendered<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        fmt::Debug::fmt(self.diag, f)
    }
}

/// A message may quote names from the file, which can be megabytes long; the report shows at
/// most this many characters of it (both ends, the middle left out), so N such diagnostics
/// cannot turn a small file into gigabytes of output.
const MAX_SHOWN_MESSAGE: usize = 1000;

impl fmt::Display for Rendered<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let m = crate::text::sanitize(&self.diag.message);
        let n = m.chars().count();
        if n <= MAX_SHOWN_MESSAGE {
            return f.write_str(&m);
        }
        let keep = MAX_SHOWN_MESSAGE / 2;
        let head: String = m.chars().take(keep).collect();
        let tail: String = m.chars().skip(n - keep).collect();
        write!(
            f,
            "{head} [... {} characters left out ...] {tail}",
            n - 2 * keep
        )
    }
}

impl std::error::Error for Rendered<'_> {}

/// miette pads up to a label's column with a format width, which panics past 65 535
/// columns; a label further than this many bytes along its line is not drawn, and its place
/// is named in the help instead.
const MAX_DRAWN_COLUMN: usize = 4000;

impl Rendered<'_> {
    /// The `[name:line:column]` of the primary place, when a label lies too far along its
    /// line to be drawn (column in bytes, as the drawn header counts it).
    fn too_far(&self) -> Option<String> {
        let bytes = self.source.text().as_bytes();
        let far = |off: usize| {
            let off = off.min(bytes.len());
            off > MAX_DRAWN_COLUMN
                && memchr::memrchr2(b'\n', b'\r', &bytes[off - MAX_DRAWN_COLUMN..off]).is_none()
        };
        if !self
            .diag
            .labels
            .iter()
            .any(|l| far(l.span.start as usize) || far(l.span.end as usize))
        {
            return None;
        }
        let off = (self.diag.primary_span()?.start as usize).min(bytes.len());
        let idx = self.source.line_index(off);
        let line = self.source.line_text(idx + 1);
        let line_start = line.as_ptr() as usize - self.source.text().as_ptr() as usize;
        Some(format!(
            "[{}:{}:{}]",
            crate::text::sanitize(self.source.name()),
            idx + 1,
            off.saturating_sub(line_start) + 1
        ))
    }
}

impl Diagnostic for Rendered<'_> {
    fn code<'b>(&'b self) -> Option<Box<dyn fmt::Display + 'b>> {
        // an excerpt continuing a finding carries no code of its own
        (!self.diag.code.is_empty()).then(|| Box::new(&self.diag.code) as Box<dyn fmt::Display>)
    }
    fn severity(&self) -> Option<miette::Severity> {
        Some(match self.diag.severity {
            Severity::Error => miette::Severity::Error,
            Severity::Warning => miette::Severity::Warning,
            Severity::Info => miette::Severity::Advice,
        })
    }
    fn help<'b>(&'b self) -> Option<Box<dyn fmt::Display + 'b>> {
        let help = self.diag.help.as_ref().map(|h| crate::text::sanitize(h));
        if let Some(place) = self.too_far() {
            let note = format!("the place, {place}, is too far along its line to draw");
            return Some(Box::new(match help {
                Some(h) => format!("{h}\n{note}"),
                None => note,
            }));
        }
        help.map(|h| Box::new(h) as Box<dyn fmt::Display>)
    }
    fn source_code(&self) -> Option<&dyn SourceCode> {
        if self.diag.labels.is_empty() || self.too_far().is_some() {
            None
        } else {
            Some(self.source)
        }
    }
    fn labels(&self) -> Option<Box<dyn Iterator<Item = LabeledSpan> + '_>> {
        if self.diag.labels.is_empty() || self.too_far().is_some() {
            return None;
        }
        Some(Box::new(self.diag.labels.iter().map(|l| {
            let text = if l.text.is_empty() {
                None
            } else {
                Some(crate::text::sanitize(&l.text).into_owned())
            };
            if l.primary {
                LabeledSpan::new_primary_with_span(text, l.span)
            } else {
                LabeledSpan::new_with_span(text, l.span)
            }
        })))
    }
}

/// The codes the reader and the netlist model use (the checks' ids are in
/// [`crate::checks::REGISTRY`]). `(code, summary)`; reporters use them as rule metadata.
pub static INPUT_CODES: &[(&str, &str)] = &[
    ("empty-file", "the file is empty or holds only white space"),
    (
        "wrong-format",
        "the file is a KiCad file of another kind, or an older netlist format",
    ),
    (
        "not-a-netlist",
        "the file is not a KiCad S-expression netlist",
    ),
    ("binary-file", "the file holds NUL bytes"),
    ("invalid-utf8", "the file is not valid UTF-8"),
    ("too-large", "the file is larger than the size limit"),
    ("unreadable", "the file cannot be read"),
    ("unclosed-list", "a list is never closed (a truncated file)"),
    ("stray-close", "a `)` closes a list that was never opened"),
    ("unterminated-string", "a quoted string is never closed"),
    ("trailing-text", "text after the end of the netlist"),
    ("too-deep", "lists nested deeper than any netlist nests"),
    ("bad-field", "a list where a value belongs"),
    (
        "missing-field",
        "a required field is missing; the item is left out or read as unnamed",
    ),
    ("duplicate-ref", "two components share one reference"),
    ("duplicate-net-code", "two nets share one code"),
    (
        "unknown-component",
        "a net names a component that is not in the netlist",
    ),
    ("pin-on-two-nets", "one pin is listed on two different nets"),
    (
        "missing-libpart",
        "a component's library part is not in the netlist",
    ),
    (
        "netlist-version",
        "a netlist version netmargin does not know",
    ),
    (
        "config",
        "the project configuration (netmargin.toml) has an error",
    ),
    (
        "mapping-file",
        "a project mapping file (families, functions, parts) has an error",
    ),
    (
        "stale-waiver",
        "a waiver that matched no finding, or has expired",
    ),
    (
        "unused-rule",
        "a project mapping entry that matched nothing in the run",
    ),
    (
        "baseline",
        "the baseline file cannot be read or is not a netmargin baseline",
    ),
    (
        "stale-baseline",
        "baseline entries that match no finding any more",
    ),
    (
        "no-such-net",
        "a net named on the command line is not in the netlist",
    ),
    (
        "not-a-schematic",
        "a sheet file is not a KiCad 6-9 schematic sheet",
    ),
    (
        "malformed-schematic",
        "an item of a schematic sheet is not written as KiCad writes it (it is left out)",
    ),
    (
        "missing-sheet",
        "a sub-sheet a schematic names does not exist or cannot be read",
    ),
    ("recursive-sheet", "schematic sheets include each other"),
    (
        "too-many-sheets",
        "a schematic hierarchy uses more sheets than netmargin reads",
    ),
    (
        "missing-library-symbol",
        "a placed symbol's library symbol is not in its sheet",
    ),
];
