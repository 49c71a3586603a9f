//! KiCad's electrical pin types in both dialects, normalised to one enum.

/// A symbol pin's electrical type as the netlist states it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum PinType {
    Input,
    Output,
    Bidirectional,
    TriState,
    Passive,
    Unspecified,
    Free,
    PowerIn,
    PowerOut,
    OpenCollector,
    OpenEmitter,
    NoConnect,
    /// A type string netmargin does not know.
    Unknown,
}

impl PinType {
    /// Every pin type, in the order of their numbers (`t as u8`): `ALL[t as usize] == t`.
    pub const ALL: [PinType; 13] = [
        PinType::Input,
        PinType::Output,
        PinType::Bidirectional,
        PinType::TriState,
        PinType::Passive,
        PinType::Unspecified,
        PinType::Free,
        PinType::PowerIn,
        PinType::PowerOut,
        PinType::OpenCollector,
        PinType::OpenEmitter,
        PinType::NoConnect,
        PinType::Unknown,
    ];

    /// Reads a pin type from either dialect: version "D" (`input output BiDi 3state passive
    /// unspc power_in power_out openCol openEm NotConnected`) and version "E" (`input output
    /// bidirectional tri_state passive unspecified free power_in power_out open_collector
    /// open_emitter no_connect`). A version "E" node's `+no_connect` suffix is returned as
    /// the flag.
    pub fn parse(s: &str) -> (PinType, bool) {
        let (base, nc) = match s.strip_suffix("+no_connect") {
            Some(b) => (b, true),
            None => (s, false),
        };
        let t = match base {
            "input" => PinType::Input,
            "output" => PinType::Output,
            "BiDi" | "bidirectional" => PinType::Bidirectional,
            "3state" | "tri_state" => PinType::TriState,
            "passive" => PinType::Passive,
            "unspc" | "unspecified" => PinType::Unspecified,
            "free" => PinType::Free,
            "power_in" => PinType::PowerIn,
            "power_out" => PinType::PowerOut,
            "openCol" | "open_collector" => PinType::OpenCollector,
            "openEm" | "open_emitter" => PinType::OpenEmitter,
            "NotConnected" | "no_connect" => PinType::NoConnect,
            _ => PinType::Unknown,
        };
        (t, nc || t == PinType::NoConnect)
    }

    pub fn as_str(self) -> &'static str {
        match self {
            PinType::Input => "input",
            PinType::Output => "output",
            PinType::Bidirectional => "bidirectional",
            PinType::TriState => "tri-state",
            PinType::Passive => "passive",
            PinType::Unspecified => "unspecified",
            PinType::Free => "free",
            PinType::PowerIn => "power-in",
            PinType::PowerOut => "power-out",
            PinType::OpenCollector => "open-collector",
            PinType::OpenEmitter => "open-emitter",
            PinType::NoConnect => "no-connect",
            PinType::Unknown => "unknown",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    #[test]
    fn both_dialects_normalise() {
        let pairs = [
            ("BiDi", "bidirectional"),
            ("3state", "tri_state"),
            ("unspc", "unspecified"),
            ("openCol", "open_collector"),
            ("openEm", "open_emitter"),
            ("NotConnected", "no_connect"),
        ];
        for (d, e) in pairs {
            assert_eq!(PinType::parse(d).0, PinType::parse(e).0, "{d} vs {e}");
            assert_ne!(PinType::parse(d).0, PinType::Unknown);
        }
        assert_eq!(
            PinType::parse("passive+no_connect"),
            (PinType::Passive, true)
        );
        assert_eq!(PinType::parse("input"), (PinType::Input, false));
        assert_eq!(PinType::parse("weird").0, PinType::Unknown);
    }
}
