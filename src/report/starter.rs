//! `init`: a commented starter `netmargin.toml` from what the netlists at hand show: their
//! rails (with the voltages their names state, and a question where a name states none),
//! their connectors (commented out, to be given a family), the default derating and an
//! example waiver, commented out. Every commented line is valid once uncommented.

use std::fmt::Write as _;

use super::settings::{toml_float, toml_key, toml_string};

/// A rail the netlists show.
#[derive(Debug, Clone, PartialEq)]
pub struct RailSeen {
    pub name: String,
    /// The voltage the name states (0 for ground), `None` when it states none.
    pub volts: Option<f64>,
    pub ground: bool,
    /// Pins on the net.
    pub pins: usize,
}

/// A connector the netlists show.
#[derive(Debug, Clone, PartialEq)]
pub struct ConnectorSeen {
    pub reference: String,
    pub value: String,
    pub pins: usize,
}

/// A finding to shape the example waiver on.
#[derive(Debug, Clone, PartialEq)]
pub struct FindingSeen {
    pub check: String,
    pub pins: Vec<String>,
}

/// What the starter is made from.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Facts {
    /// The netlists read, as named.
    pub netlists: Vec<String>,
    pub rails: Vec<RailSeen>,
    pub connectors: Vec<ConnectorSeen>,
    pub finding: Option<FindingSeen>,
    /// A family id to show in the connector lines (one the shipped table has).
    pub example_family: String,
    /// The default fan-out derating.
    pub derating: f64,
    /// The example waiver's expiry date.
    pub expires: (i32, u32, u32),
}

fn comment_text(s: &str) -> String {
    // a TOML comment takes no control character but tab; names go in as TOML strings
    toml_string(s)
}

/// The starter text.
pub fn render(f: &Facts) -> String {
    let mut s = String::new();
    let from = if f.netlists.is_empty() {
        "no netlist (none was found)".to_string()
    } else {
        f.netlists
            .iter()
            .map(|n| comment_text(n))
            .collect::<Vec<_>>()
            .join(", ")
    };
    let _ = writeln!(
        s,
        "# netmargin.toml: the project configuration, started by `netmargin init` from {from}."
    );
    s.push_str("# netmargin uses the nearest netmargin.toml in a netlist's folder or above it.\n");
    s.push_str("# `netmargin config --show <netlist>` shows what is in force and where each value comes from.\n\n");

    s.push_str(
        "# Check each level and current inequality at the worst end of the rails' tolerance\n",
    );
    s.push_str("# (0.05 = +-5 %); off by default.\n");
    s.push_str("# rail_tolerance = 0.05\n\n");

    s.push_str("[rails]\n");
    s.push_str(
        "# Rails are read from net names. Declare one here when its name hides the voltage, or\n",
    );
    s.push_str("# to correct what the name says. The values below are what the names state.\n");
    let supplies: Vec<&RailSeen> = f.rails.iter().filter(|r| !r.ground).collect();
    if supplies.is_empty() {
        s.push_str("# (the netlist has no supply net with a rail-like name)\n");
        s.push_str("# VCC = 5.0\n");
    }
    for r in &supplies {
        let key = toml_key(&r.name);
        match r.volts {
            Some(v) => {
                let _ = writeln!(
                    s,
                    "{key} = {}  # from the name; {} pins",
                    toml_float(v),
                    r.pins
                );
            }
            None => {
                let _ = writeln!(
                    s,
                    "# {key} = 5.0  # what voltage is {}? the name does not say; until it is set, parts on it are checked at their family's nominal supply",
                    comment_text(&r.name)
                );
            }
        }
    }
    let grounds: Vec<String> = f
        .rails
        .iter()
        .filter(|r| r.ground)
        .map(|r| comment_text(&r.name))
        .collect();
    if !grounds.is_empty() {
        let _ = writeln!(
            s,
            "# ground: {} (read from the name{})",
            grounds.join(", "),
            if grounds.len() == 1 { "" } else { "s" }
        );
    }
    s.push('\n');

    s.push_str("[connectors]\n");
    s.push_str("# A connector's pins are driven from off the board. Name the logic family that drives them\n");
    let _ = writeln!(
        s,
        "# (`netmargin families` lists them) and netmargin checks them as outputs of it, e.g. {}.",
        toml_string(&f.example_family)
    );
    if f.connectors.is_empty() {
        s.push_str("# (the netlist has no connector)\n");
        let _ = writeln!(s, "# J1 = {}", toml_string(&f.example_family));
    }
    for c in &f.connectors {
        let _ = writeln!(
            s,
            "# {} = {}  # {}, {} pins on nets",
            toml_key(&c.reference),
            toml_string(&f.example_family),
            comment_text(&c.value),
            c.pins
        );
    }
    s.push('\n');

    s.push_str("[checks]\n");
    let _ = writeln!(
        s,
        "derating = {}  # fan-out above {:.0} % of an output's rating is a warning (above 100 % an error)",
        toml_float(f.derating),
        f.derating * 100.0
    );
    s.push_str("# min_margin_v = 0.2  # a level margin below 0.2 V is still a warning\n");
    s.push_str(
        "# severity = { \"unclassified-part\" = \"off\", \"floating-ttl-input\" = \"error\" }\n\n",
    );

    s.push_str("# [rules]  # project mapping files, over the shipped ones (paths from this file's folder)\n");
    s.push_str("# parts = [\"rules/parts.toml\"]\n\n");

    s.push_str("# A waiver accepts findings for a stated reason; `netmargin check` warns when one matches\n");
    s.push_str("# nothing or has expired. refs, pins and nets take globs and narrow it.\n");
    let (check, pins) = match &f.finding {
        Some(x) => (
            x.check.clone(),
            x.pins.iter().take(2).cloned().collect::<Vec<_>>(),
        ),
        None => ("floating-ttl-input".to_string(), vec!["U1.9".to_string()]),
    };
    let refs: Vec<String> = pins
        .iter()
        .filter_map(|p| p.split_once('.').map(|(r, _)| r.to_string()))
        .take(1)
        .collect();
    let list = |v: &[String]| {
        v.iter()
            .map(|x| toml_string(x))
            .collect::<Vec<_>>()
            .join(", ")
    };
    s.push_str("# [[waiver]]\n");
    let _ = writeln!(s, "# check = {}", toml_string(&check));
    if !refs.is_empty() {
        let _ = writeln!(s, "# refs = [{}]", list(&refs));
    }
    if !pins.is_empty() {
        let _ = writeln!(s, "# pins = [{}]", list(&pins));
    }
    s.push_str("# reason = \"say why the finding is accepted, and who accepted it\"\n");
    let (y, m, d) = f.expires;
    let _ = writeln!(s, "# expires = {y:04}-{m:02}-{d:02}");
    s
}

/// The text with every `# key = value` line uncommented (the lines a user would enable);
/// for testing that each example is valid.
pub fn uncomment_examples(text: &str) -> String {
    let mut out = String::new();
    for line in text.lines() {
        let body = line.strip_prefix("# ");
        let enable = body.is_some_and(|b| {
            let b = b.trim_start();
            b.starts_with('[') && (b.starts_with("[[waiver]]") || b.starts_with("[rules]"))
                || b.split_once(" = ").is_some_and(|(k, _)| {
                    k.starts_with('"')
                        || (!k.is_empty()
                            && k.bytes()
                                .all(|c| c.is_ascii_alphanumeric() || c == b'_' || c == b'-'))
                })
        });
        match body {
            Some(b) if enable => out.push_str(b),
            _ => out.push_str(line),
        }
        out.push('\n');
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::source::SourceFile;

    fn facts() -> Facts {
        Facts {
            netlists: vec!["hw/sequencer.net".into()],
            rails: vec![
                RailSeen {
                    name: "+5V".into(),
                    volts: Some(5.0),
                    ground: false,
                    pins: 40,
                },
                RailSeen {
                    name: "VCC".into(),
                    volts: None,
                    ground: false,
                    pins: 12,
                },
                RailSeen {
                    name: "/VREF\"X".into(),
                    volts: None,
                    ground: false,
                    pins: 1,
                },
                RailSeen {
                    name: "GND".into(),
                    volts: Some(0.0),
                    ground: true,
                    pins: 41,
                },
            ],
            connectors: vec![ConnectorSeen {
                reference: "J3".into(),
                value: "Conn_01x10".into(),
                pins: 8,
            }],
            finding: Some(FindingSeen {
                check: "floating-ttl-input".into(),
                pins: vec!["U24.9".into(), "U24.10".into(), "U24.12".into()],
            }),
            example_family: "74LS".into(),
            derating: 0.8,
            expires: (2027, 6, 30),
        }
    }

    #[test]
    fn the_starter_loads_as_written_and_with_every_example_enabled() {
        let text = render(&facts());
        let c = crate::config::parse(&SourceFile::new("netmargin.toml", text.as_str()))
            .unwrap_or_else(|e| panic!("{:?}\n{text}", e.diags));
        // as written: the rail whose name states its voltage, the default derating
        assert_eq!(
            c.rails.iter().map(|r| r.value.clone()).collect::<Vec<_>>(),
            vec![("+5V".to_string(), 5.0)]
        );
        assert_eq!(c.derating.as_ref().map(|d| d.value), Some(0.8));
        assert!(c.connectors.is_empty() && c.waivers.is_empty());
        assert!(text.contains("what voltage is \"VCC\"?"), "{text}");
        assert!(text.contains("# ground: \"GND\""));
        let all = uncomment_examples(&text);
        let c = crate::config::parse(&SourceFile::new("netmargin.toml", all.as_str()))
            .unwrap_or_else(|e| panic!("{:?}\n{all}", e.diags));
        assert_eq!(c.rails.len(), 3, "{all}");
        assert_eq!(
            c.connectors[0].value,
            ("J3".to_string(), "74LS".to_string())
        );
        assert_eq!(c.rail_tolerance.as_ref().map(|t| t.value), Some(0.05));
        assert_eq!(c.min_margin_v.as_ref().map(|t| t.value), Some(0.2));
        assert_eq!(c.checks.len(), 2);
        assert_eq!(c.parts.len(), 1);
        let w = &c.waivers[0];
        assert_eq!(
            (w.check.as_str(), w.refs.clone(), w.pins.clone()),
            (
                "floating-ttl-input",
                vec!["U24".to_string()],
                vec!["U24.9".to_string(), "U24.10".to_string()]
            )
        );
        assert_eq!(w.expires, Some((2027, 6, 30)));
    }

    #[test]
    fn an_empty_netlist_still_gives_a_valid_starter() {
        let f = Facts {
            example_family: "74HC".into(),
            derating: 0.8,
            expires: (2030, 1, 2),
            ..Default::default()
        };
        let text = render(&f);
        crate::config::parse(&SourceFile::new("netmargin.toml", text.as_str()))
            .unwrap_or_else(|e| panic!("{:?}\n{text}", e.diags));
        let all = uncomment_examples(&text);
        let c = crate::config::parse(&SourceFile::new("netmargin.toml", all.as_str()))
            .unwrap_or_else(|e| panic!("{:?}\n{all}", e.diags));
        assert_eq!(c.rails[0].value, ("VCC".to_string(), 5.0));
        assert_eq!(c.connectors[0].value.0, "J1");
    }
}
