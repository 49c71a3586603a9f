//! The pin roles and the rule-file error, shared by the tables (`family`, `function`,
//! `parts`) and by `build.rs`, which reads the shipped tables with the same code at compile
//! time.

use std::fmt;
use std::ops::Range;

/// An error in a mapping file (`rules/*.toml` or a project override), with the byte span
/// of the offending text when it is known.
#[derive(Debug, Clone, PartialEq)]
pub struct RuleError {
    /// Byte range in the mapping file's text.
    pub span: Option<Range<usize>>,
    pub message: String,
}

impl RuleError {
    pub fn new(span: Option<Range<usize>>, message: impl Into<String>) -> Self {
        RuleError {
            span,
            message: message.into(),
        }
    }

    /// Converts a `toml` deserialisation error, keeping its span.
    pub fn from_toml(err: &toml::de::Error) -> Self {
        RuleError {
            span: err.span(),
            message: in_our_words(err.message().trim_end()),
        }
    }
}

/// A TOML reader's message in the words the documentation uses: keys, numbers, text, lists.
pub fn in_our_words(msg: &str) -> String {
    let kind = |k: &str| -> String {
        let k = k.trim();
        match k {
            "f64" | "f32" => "a number".into(),
            "u8" | "u16" | "u32" | "u64" | "usize" | "i32" | "i64" => "a whole number".into(),
            "a string" | "string" => "text in quotes".into(),
            "a sequence" | "sequence" => "a list".into(),
            "a boolean" | "bool" => "true or false".into(),
            "a map" | "map" | "struct" => "a table".into(),
            other => other.trim_start_matches("a ").to_string(),
        }
    };
    if let Some(rest) = msg.strip_prefix("unknown field ") {
        // "unknown field `x`, expected one of `a`, `b`" / "..., expected `a`"
        let (field, expected) = rest.split_once(", expected ").unwrap_or((rest, ""));
        let keys = expected.trim_start_matches("one of ");
        return if keys.is_empty() {
            format!("unknown key {field}")
        } else {
            format!("unknown key {field}; the keys here are {keys}")
        };
    }
    if let Some(rest) = msg.strip_prefix("missing field ") {
        return format!("missing key {rest}");
    }
    if let Some(rest) = msg.strip_prefix("invalid type: ") {
        // "string \"5\", expected f64"
        if let Some((found, expected)) = rest.split_once(", expected ") {
            let found = match found.split_once(' ') {
                Some(("string", v)) => format!("text {v}"),
                Some(("integer", v)) | Some(("floating", v)) => format!("the number {v}"),
                _ => kind(found),
            };
            return format!("expected {}, found {found}", kind(expected));
        }
    }
    if let Some(rest) = msg.strip_prefix("invalid value: ") {
        return format!("a value that does not fit: {rest}");
    }
    msg.to_string()
}

#[cfg(test)]
mod words_tests {
    use super::in_our_words;

    #[test]
    fn reader_messages_in_our_words() {
        assert_eq!(
            in_our_words("unknown field `colour`, expected one of `values`, `kind`"),
            "unknown key `colour`; the keys here are `values`, `kind`"
        );
        assert_eq!(
            in_our_words("invalid type: string \"5V\", expected f64"),
            "expected a number, found text \"5V\""
        );
        assert_eq!(
            in_our_words("invalid type: string \"U1\", expected a sequence"),
            "expected a list, found text \"U1\""
        );
        assert_eq!(
            in_our_words("missing field `values`"),
            "missing key `values`"
        );
        assert_eq!(in_our_words("expected `=`"), "expected `=`");
    }
}

impl fmt::Display for RuleError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

/// The electrical role of one pin, from the function table (or, failing that, from the
/// netlist's own pin type).
#[derive(
    Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize, serde::Deserialize,
)]
#[serde(rename_all = "kebab-case")]
pub enum PinRole {
    /// A logic input: family thresholds and input currents apply.
    Input,
    /// An input with hysteresis: floating is still bad.
    SchmittInput,
    /// Totem-pole / complementary output.
    PushPull,
    /// Open collector or open drain: pulls low only.
    OpenCollector,
    /// Pulls high only.
    OpenEmitter,
    /// Push-pull with a disabled (high-impedance) state.
    ThreeState,
    /// Three-state output plus input (a data bus pin).
    Bidirectional,
    /// Positive supply pin (VCC, VDD).
    Supply,
    /// Ground / negative supply pin (GND, VSS, VEE).
    Ground,
    /// An input with an internal pull-up that is also an open-collector output
    /// (e.g. the BI/RBO pin of a 7447): leaving it open is legitimate.
    PulledUpIo,
    /// An analogue pin (switch terminal, timing R/C, VCO input): no logic rules apply.
    Analog,
    /// Passive: resistors, capacitors, connector contacts.
    Passive,
    /// Marked as not connected by the part itself.
    NoConnect,
    /// No source could tell.
    Unknown,
}

impl PinRole {
    pub fn as_str(self) -> &'static str {
        match self {
            PinRole::Input => "input",
            PinRole::SchmittInput => "schmitt-input",
            PinRole::PushPull => "push-pull",
            PinRole::OpenCollector => "open-collector",
            PinRole::OpenEmitter => "open-emitter",
            PinRole::ThreeState => "three-state",
            PinRole::Bidirectional => "bidirectional",
            PinRole::Supply => "supply",
            PinRole::Ground => "ground",
            PinRole::PulledUpIo => "pulled-up-io",
            PinRole::Analog => "analog",
            PinRole::Passive => "passive",
            PinRole::NoConnect => "no-connect",
            PinRole::Unknown => "unknown",
        }
    }

    /// True for roles that read a logic level (must not float).
    pub fn is_input(self) -> bool {
        matches!(
            self,
            PinRole::Input | PinRole::SchmittInput | PinRole::Bidirectional
        )
    }

    /// True for roles that can drive a net.
    pub fn is_output(self) -> bool {
        matches!(
            self,
            PinRole::PushPull
                | PinRole::OpenCollector
                | PinRole::OpenEmitter
                | PinRole::ThreeState
                | PinRole::Bidirectional
                | PinRole::PulledUpIo
        )
    }
}

impl fmt::Display for PinRole {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}
