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
            message: err.message().to_string(),
        }
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
