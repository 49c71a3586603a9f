//! The one diagnostic shape every layer produces (reader errors, netlist-model problems,
//! and later the checks' findings) and its miette rendering.
//!
//! Layers build [`Diag`] values as plain data; only the reporters decide how they look.

use std::borrow::Cow;
use std::fmt;
use std::ops::Deref;
use std::sync::Arc;

use miette::{Diagnostic, LabeledSpan, SourceCode};
use serde::Serialize;

use crate::source::{SourceFile, Span};

mod list;
pub use list::{
    cmp_part_lists, cmp_parts, Around, DiagList, DiagRef, LabelRef, Labels, MessageParts,
    PartsIter, Piece, Raw, RawShared, SharedId,
};

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

/// A text a finding holds that many findings may say alike (a help): a fixed text, or one
/// made once and shared by every finding that says it (the help for all parts of a kind).
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Text {
    Fixed(&'static str),
    Shared(Arc<str>),
}

impl Deref for Text {
    type Target = str;
    fn deref(&self) -> &str {
        match self {
            Text::Fixed(s) => s,
            Text::Shared(s) => s,
        }
    }
}

impl fmt::Display for Text {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self)
    }
}

impl From<&'static str> for Text {
    fn from(s: &'static str) -> Text {
        Text::Fixed(s)
    }
}

impl From<String> for Text {
    fn from(s: String) -> Text {
        Text::Shared(Arc::from(s))
    }
}

impl From<Arc<str>> for Text {
    fn from(s: Arc<str>) -> Text {
        Text::Shared(s)
    }
}

impl From<Cow<'static, str>> for Text {
    fn from(s: Cow<'static, str>) -> Text {
        match s {
            Cow::Borrowed(s) => Text::Fixed(s),
            Cow::Owned(s) => s.into(),
        }
    }
}

/// One diagnostic: a code, a severity, a message with the numbers, places in the file, a fix.
///
/// A board can have hundreds of thousands of findings, so a finding holds no more than it
/// says: the code (a check's `INFO.id`, a `&'static str`), fixed label and help texts are
/// borrowed, not copied, a help worded once for many findings is shared ([`Text`]), the texts
/// are allocated to their length and the label and pin lists too.
#[derive(Debug, Clone, PartialEq)]
pub struct Diag {
    /// Stable kebab-case id, e.g. `unclosed-list` or `floating-cmos-input`.
    pub code: Cow<'static, str>,
    pub severity: Severity,
    pub message: Box<str>,
    /// The first primary label is the diagnostic's location.
    pub labels: Box<[Label]>,
    pub help: Option<Text>,
    /// The net the finding is about, by name.
    pub net: Option<Box<str>>,
    /// The pins involved, as `REF.PIN`, the offending one first (read with [`Diag::pins`]).
    pub pins: PinList,
}

/// The pins a finding names, held as one text: the names joined by NUL, which no name holds
/// (the reader refuses a file with a NUL byte and no escape makes one; a NUL given anyway is
/// written as U+FFFD). `None` is no pins, so one empty name is still one pin. One allocation
/// for all of a finding's pins, in place of one per pin and one for the list.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct PinList(Option<Box<str>>);

const PIN_SEP: char = '\0';

impl PinList {
    /// The list of `names`, in order.
    pub fn of<I: IntoIterator<Item = S>, S: AsRef<str>>(names: I) -> PinList {
        let mut w = PinListWriter::default();
        for n in names {
            let n = n.as_ref();
            let out = w.next_pin();
            if n.contains(PIN_SEP) {
                out.push_str(&n.replace(PIN_SEP, "\u{fffd}"));
            } else {
                out.push_str(n);
            }
        }
        w.finish()
    }

    /// The names, in order.
    pub fn iter(&self) -> Pins<'_> {
        Pins(self.0.as_deref())
    }

    pub fn is_empty(&self) -> bool {
        self.0.is_none()
    }
}

/// Writes a [`PinList`] name by name, straight into its text (no text per name).
#[derive(Debug, Default)]
pub struct PinListWriter {
    text: String,
    any: bool,
}

impl PinListWriter {
    /// A writer with room for `bytes` of text (the names and one separator between each two).
    pub fn with_capacity(bytes: usize) -> PinListWriter {
        PinListWriter {
            text: String::with_capacity(bytes),
            any: false,
        }
    }

    /// Starts the next name and gives the text to write it into (the name must hold no NUL).
    pub fn next_pin(&mut self) -> &mut String {
        if self.any {
            self.text.push(PIN_SEP);
        }
        self.any = true;
        &mut self.text
    }

    pub fn finish(self) -> PinList {
        PinList(self.any.then(|| self.text.into_boxed_str()))
    }
}

/// The names of a [`PinList`], in order.
#[derive(Debug, Clone)]
pub struct Pins<'a>(Option<&'a str>);

impl<'a> Iterator for Pins<'a> {
    type Item = &'a str;
    fn next(&mut self) -> Option<&'a str> {
        let s = self.0?;
        // names are a few bytes: a plain scan is cheaper than a search routine's set-up
        match s.bytes().position(|b| b == PIN_SEP as u8) {
            Some(at) => {
                self.0 = Some(&s[at + 1..]);
                Some(&s[..at])
            }
            None => {
                self.0 = None;
                Some(s)
            }
        }
    }
    fn size_hint(&self) -> (usize, Option<usize>) {
        let n = self
            .0
            .map_or(0, |s| 1 + s.bytes().filter(|&b| b == 0).count());
        (n, Some(n))
    }
}

impl ExactSizeIterator for Pins<'_> {}

impl Diag {
    pub fn new(
        code: impl Into<Cow<'static, str>>,
        severity: Severity,
        message: impl Into<String>,
    ) -> Diag {
        Diag {
            code: code.into(),
            severity,
            // allocated to its length: a finding is held to the end of the run
            message: message.into().into_boxed_str(),
            labels: Box::default(),
            help: None,
            net: None,
            pins: PinList::default(),
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
    /// The list is held to its length (most findings have one label).
    fn push_label(&mut self, label: Label) {
        let mut labels = std::mem::take(&mut self.labels).into_vec();
        labels.push(label);
        self.labels = labels.into_boxed_slice();
    }
    /// A help: a fixed text, a `String` made for this finding, or a [`Text`] shared with
    /// the findings that say the same.
    pub fn with_help(mut self, help: impl Into<Text>) -> Diag {
        self.help = Some(help.into());
        self
    }
    pub fn on_net(mut self, net: impl Into<String>) -> Diag {
        self.net = Some(net.into().into_boxed_str());
        self
    }
    /// Adds `more` to the end of the message.
    pub fn extend_message(&mut self, more: &str) {
        let mut m = String::with_capacity(self.message.len() + more.len());
        m.push_str(&self.message);
        m.push_str(more);
        self.message = m.into_boxed_str();
    }
    /// Adds `pins` to the end of the pin list.
    pub fn with_pins<I: IntoIterator<Item = S>, S: AsRef<str>>(mut self, pins: I) -> Diag {
        if self.pins.is_empty() {
            self.pins = PinList::of(pins);
        } else {
            let pins: Vec<S> = pins.into_iter().collect();
            self.pins = PinList::of(self.pins.iter().chain(pins.iter().map(AsRef::as_ref)));
        }
        self
    }
    /// Adds the pins of `pins` (a list written by a [`PinListWriter`]) to the pin list.
    pub fn with_pin_list(mut self, pins: PinList) -> Diag {
        if self.pins.is_empty() {
            self.pins = pins;
            self
        } else {
            self.with_pins(pins.iter())
        }
    }
    /// Replaces the pin list.
    pub fn set_pins<I: IntoIterator<Item = S>, S: AsRef<str>>(&mut self, pins: I) {
        self.pins = PinList::of(pins);
    }
    /// The pins involved, as `REF.PIN`, the offending one first.
    pub fn pins(&self) -> Pins<'_> {
        self.pins.iter()
    }
    /// True when the finding names any pin.
    pub fn has_pins(&self) -> bool {
        !self.pins.is_empty()
    }
    /// The primary span, if any.
    pub fn primary_span(&self) -> Option<Span> {
        self.labels
            .iter()
            .find(|l| l.primary)
            .or(self.labels.first())
            .map(|l| l.span)
    }
    /// The diagnostic read as a finding of a list is read ([`DiagRef`]).
    pub fn view(&self) -> DiagRef<'_> {
        DiagRef::from(self)
    }
}

/// A diagnostic bound to its source, ready for miette's graphical handler.
pub struct Rendered<'a> {
    pub diag: DiagRef<'a>,
    pub source: &'a SourceFile,
}

impl fmt::Debug for Rendered<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        fmt::Debug::fmt(&self.diag, f)
    }
}

/// A message may quote names from the file, which can be megabytes long; the report shows at
/// most this many characters of it (both ends, the middle left out), so N such diagnostics
/// cannot turn a small file into gigabytes of output.
const MAX_SHOWN_MESSAGE: usize = 1000;

impl fmt::Display for Rendered<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let m = self.diag.message();
        let m = crate::text::sanitize(&m);
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
            .labels()
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
        let code = self.diag.code();
        (!code.is_empty()).then(|| Box::new(code) as Box<dyn fmt::Display>)
    }
    fn severity(&self) -> Option<miette::Severity> {
        Some(match self.diag.severity() {
            Severity::Error => miette::Severity::Error,
            Severity::Warning => miette::Severity::Warning,
            Severity::Info => miette::Severity::Advice,
        })
    }
    fn help<'b>(&'b self) -> Option<Box<dyn fmt::Display + 'b>> {
        let help = self.diag.help().map(crate::text::sanitize);
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
        if self.diag.labels().len() == 0 || self.too_far().is_some() {
            None
        } else {
            Some(self.source)
        }
    }
    fn labels(&self) -> Option<Box<dyn Iterator<Item = LabeledSpan> + '_>> {
        if self.diag.labels().len() == 0 || self.too_far().is_some() {
            return None;
        }
        Some(Box::new(self.diag.labels().map(|l| {
            let text = if l.text.is_empty() {
                None
            } else {
                Some(crate::text::sanitize(l.text).into_owned())
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

#[cfg(test)]
mod tests {
    use super::*;

    /// A board can have hundreds of thousands of findings: a finding stays this small.
    #[test]
    fn a_finding_is_small() {
        assert!(size_of::<Diag>() <= 120, "{}", size_of::<Diag>());
        assert!(size_of::<PinList>() <= 16);
        assert!(size_of::<Text>() <= 24);
    }

    #[test]
    fn pin_lists_give_back_their_names_in_order() {
        // an invented code, held in a variable so that no code is named here
        let code = "code-a";
        let cases: &[&[&str]] = &[
            &[],
            &["U1.1"],
            &[""],
            &["", ""],
            &["U1.9", "U1.10", "U22.3"],
        ];
        for names in cases {
            let d = Diag::warning(code, "m").with_pins(names.iter());
            assert_eq!(d.pins().collect::<Vec<_>>(), *names);
            assert_eq!(d.pins().len(), names.len());
            assert_eq!(d.has_pins(), !names.is_empty());
            // written name by name, the same list
            let mut w = PinListWriter::default();
            for n in *names {
                w.next_pin().push_str(n);
            }
            assert_eq!(Diag::warning(code, "m").with_pin_list(w.finish()), d);
        }
        // added to, in order
        let d = Diag::warning(code, "m")
            .with_pins(["U1.1"])
            .with_pins(["U2.2", "U3.3"]);
        assert_eq!(d.pins().collect::<Vec<_>>(), ["U1.1", "U2.2", "U3.3"]);
        // a NUL cannot split a name in two
        let d = Diag::warning(code, "m").with_pins(["U1\0.1"]);
        assert_eq!(d.pins().collect::<Vec<_>>(), ["U1\u{fffd}.1"]);
        let mut d = d;
        d.set_pins(["R1.2"]);
        assert_eq!(d.pins().collect::<Vec<_>>(), ["R1.2"]);
    }

    #[test]
    fn a_message_extended_holds_both_parts() {
        let mut d = Diag::warning("missing-field", "first");
        d.extend_message(", then more");
        assert_eq!(&*d.message, "first, then more");
        let d = d
            .at(Span::new(1, 2), "a")
            .also(Span::new(3, 4), "b")
            .at(Span::new(5, 6), "c");
        let texts: Vec<&str> = d.labels.iter().map(|l| &*l.text).collect();
        assert_eq!(texts, ["a", "b", "c"]);
        assert_eq!(d.primary_span(), Some(Span::new(1, 2)));
    }

    #[test]
    fn texts_read_as_what_they_were_made_from() {
        let shared: Text = String::from("tie it high").into();
        assert!(matches!(shared, Text::Shared(_)));
        assert_eq!(&*shared, "tie it high");
        let fixed: Text = "fixed".into();
        assert!(matches!(fixed, Text::Fixed("fixed")));
        let owned: Text = Cow::<'static, str>::Owned("made".into()).into();
        assert_eq!((&*owned, owned.to_string()), ("made", "made".to_string()));
    }
}
