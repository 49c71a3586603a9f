//! `config --show`: the configuration a netlist is checked with, merged from the defaults,
//! its netmargin.toml and the command line, each value with where it came from. Written as
//! TOML with a comment per value, so it can be read (and copied) as a configuration.

use std::fmt::Write as _;

use crate::analysis::Overrides as SettingsArgs;
use crate::checks::{CheckOptions, REGISTRY};
use crate::circuit::ModelOptions;
use crate::config::{Config, Setting};
use crate::source::Span;

/// Where a value came from.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Origin {
    Default,
    /// The configuration file, at this 1-based line.
    File(usize),
    /// A command-line option.
    CommandLine(&'static str),
}

/// A TOML basic string (also used for keys): the escapes TOML and JSON share.
pub fn toml_string(s: &str) -> String {
    serde_json::to_string(s).expect("a string serializes")
}

/// A TOML key: bare when it may be, else quoted.
pub fn toml_key(s: &str) -> String {
    if !s.is_empty()
        && s.bytes()
            .all(|b| b.is_ascii_alphanumeric() || b == b'_' || b == b'-')
    {
        s.to_string()
    } else {
        toml_string(s)
    }
}

/// A number as TOML writes a float (`5.0`, `0.05`).
pub fn toml_float(v: f64) -> String {
    let s = format!("{v}");
    if s.contains('.') || s.contains('e') || s.contains("inf") || s.contains("NaN") {
        s
    } else {
        format!("{s}.0")
    }
}

struct Out {
    lines: Vec<(String, Option<String>)>,
}

impl Out {
    fn line(&mut self, text: impl Into<String>) {
        self.lines.push((text.into(), None));
    }
    fn value(&mut self, text: impl Into<String>, origin: String) {
        self.lines.push((text.into(), Some(origin)));
    }
    fn finish(self) -> String {
        let width = self
            .lines
            .iter()
            .filter(|(_, o)| o.is_some())
            .map(|(t, _)| t.chars().count())
            .max()
            .unwrap_or(0)
            .min(48);
        let mut s = String::new();
        for (t, o) in self.lines {
            match o {
                Some(o) => {
                    let pad = width.saturating_sub(t.chars().count());
                    let _ = writeln!(s, "{t}{}  # {o}", " ".repeat(pad));
                }
                None => {
                    let _ = writeln!(s, "{t}");
                }
            }
        }
        s
    }
}

/// The merged configuration for `target` (the netlist or folder, as the user named it).
/// `config` is the configuration file in force, when there is one.
pub fn show(target: &str, config: Option<&Config>, args: &SettingsArgs) -> String {
    let cfg_name = config
        .and_then(|c| c.path.as_ref())
        .map(|p| p.display().to_string())
        .unwrap_or_else(|| crate::config::FILE_NAME.to_string());
    let line_of = |span: Span| -> usize {
        config
            .and_then(|c| c.source.as_ref())
            .map_or(0, |s| s.line_col(span.start as usize).line)
    };
    let say = |o: &Origin| -> String {
        match o {
            Origin::Default => "default".to_string(),
            Origin::File(l) => format!("{} line {l}", crate::text::sanitize(&cfg_name)),
            Origin::CommandLine(opt) => format!("command line ({opt})"),
        }
    };
    let model = ModelOptions::default();
    let checks = CheckOptions::default();
    let mut out = Out { lines: Vec::new() };
    out.line(format!(
        "# the configuration {} is checked with",
        crate::text::sanitize(target)
    ));
    match config {
        Some(_) => out.line(format!(
            "# configuration file: {}",
            crate::text::sanitize(&cfg_name)
        )),
        None if args.no_config => out.line("# configuration file: none (--no-config)"),
        None => out.line("# configuration file: none found in its folder or above"),
    }
    out.line(
        "# each value: default, a line of the configuration file, or the command line (which wins)",
    );
    out.line("");

    let (tol, tol_o) = match config.and_then(|c| c.rail_tolerance.as_ref()) {
        Some(t) => (t.value, Origin::File(line_of(t.span))),
        None => (model.rail_tolerance, Origin::Default),
    };
    out.value(format!("rail_tolerance = {}", toml_float(tol)), say(&tol_o));
    out.line("");

    out.line("[rails]");
    let mut rails: Vec<(String, f64, Origin)> = args
        .rail
        .iter()
        .map(|(n, v)| (n.clone(), *v, Origin::CommandLine("--rail")))
        .collect();
    for r in config.map(|c| c.rails.as_slice()).unwrap_or_default() {
        let same = |n: &str| n.trim_start_matches('/') == r.value.0.trim_start_matches('/');
        if rails.iter().any(|(n, _, _)| same(n)) {
            continue; // the command line's declaration wins
        }
        rails.push((r.value.0.clone(), r.value.1, Origin::File(line_of(r.span))));
    }
    if rails.is_empty() {
        out.line("# none declared: rails are read from net names (GND, +5V, 3V3, VCC ...)");
    }
    for (n, v, o) in &rails {
        out.value(format!("{} = {}", toml_key(n), toml_float(*v)), say(o));
    }
    out.line("");

    out.line("[connectors]");
    let conns = config.map(|c| c.connectors.as_slice()).unwrap_or_default();
    if conns.is_empty() {
        out.line("# none: what a connector's pins carry is not known (default)");
    }
    for c in conns {
        out.value(
            format!("{} = {}", toml_key(&c.value.0), toml_string(&c.value.1)),
            say(&Origin::File(line_of(c.span))),
        );
    }
    out.line("");

    out.line("[checks]");
    let (der, der_o) = match config.and_then(|c| c.derating.as_ref()) {
        Some(d) => (d.value, Origin::File(line_of(d.span))),
        None => (checks.derating, Origin::Default),
    };
    out.value(format!("derating = {}", toml_float(der)), say(&der_o));
    let (mm, mm_o) = match config.and_then(|c| c.min_margin_v.as_ref()) {
        Some(d) => (d.value, Origin::File(line_of(d.span))),
        None => (checks.min_margin_v, Origin::Default),
    };
    out.value(format!("min_margin_v = {}", toml_float(mm)), say(&mm_o));
    out.line("");
    out.line("[checks.severity]");
    for c in REGISTRY {
        let (setting, origin) = if !args.only.is_empty() && !args.only.iter().any(|o| o == c.id) {
            ("off".to_string(), Origin::CommandLine("--only"))
        } else if args.disable.iter().any(|d| d == c.id) {
            ("off".to_string(), Origin::CommandLine("--disable"))
        } else {
            match config.and_then(|cf| cf.checks.iter().rev().find(|s| s.value.0 == c.id)) {
                Some(s) => (
                    match s.value.1 {
                        Setting::Off => "off".to_string(),
                        Setting::Severity(sev) => sev.as_str().to_string(),
                    },
                    Origin::File(line_of(s.span)),
                ),
                None => (c.severity.as_str().to_string(), Origin::Default),
            }
        };
        out.value(
            format!("{} = {}", toml_key(c.id), toml_string(&setting)),
            say(&origin),
        );
    }
    out.line("");

    out.line("[rules]");
    let mut any_rules = false;
    if let Some(c) = config {
        for (what, files) in [
            ("families", &c.families),
            ("functions", &c.functions),
            ("parts", &c.parts),
        ] {
            if files.is_empty() {
                continue;
            }
            any_rules = true;
            let list: Vec<String> = files
                .iter()
                .map(|f| toml_string(&f.value.display().to_string()))
                .collect();
            out.value(
                format!("{what} = [{}]", list.join(", ")),
                say(&Origin::File(line_of(files[0].span))),
            );
        }
    }
    if !any_rules {
        out.line("# no project mapping files: the shipped rules only (default)");
    }

    let waivers = config.map(|c| c.waivers.as_slice()).unwrap_or_default();
    if !waivers.is_empty() {
        out.line("");
        let today = crate::config::today();
        for w in waivers {
            let mut what = format!("# [[waiver]] check = {}", toml_string(&w.check));
            for (k, v) in [("refs", &w.refs), ("pins", &w.pins), ("nets", &w.nets)] {
                if !v.is_empty() {
                    let list: Vec<String> = v.iter().map(|x| toml_string(x)).collect();
                    let _ = write!(what, ", {k} = [{}]", list.join(", "));
                }
            }
            if let Some((y, m, d)) = w.expires {
                let _ = write!(
                    what,
                    ", expires {y:04}-{m:02}-{d:02}{}",
                    if w.expired(today) { " (expired)" } else { "" }
                );
            }
            out.value(what, say(&Origin::File(line_of(w.span))));
        }
    }
    out.finish()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::source::SourceFile;

    fn cfg(text: &str) -> Config {
        let mut c =
            crate::config::parse(&SourceFile::new("hw/netmargin.toml", text)).expect("parses");
        c.path = Some("hw/netmargin.toml".into());
        c
    }

    fn find<'a>(text: &'a str, start: &str) -> &'a str {
        text.lines()
            .find(|l| l.starts_with(start))
            .unwrap_or_else(|| panic!("no line `{start}` in\n{text}"))
    }

    #[test]
    fn each_value_says_where_it_comes_from() {
        let c = cfg("rail_tolerance = 0.05\n\n[rails]\n\"+5V\" = 5.0\nVREF = 2.5\n\n[checks]\nderating = 0.7\nseverity = { \"package-mismatch\" = \"off\" }\n");
        let args = SettingsArgs {
            rail: vec![("VREF".into(), 3.3)],
            disable: vec!["floating-ttl-input".into()],
            ..Default::default()
        };
        let s = show("hw/board.net", Some(&c), &args);
        assert!(
            find(&s, "rail_tolerance = 0.05").ends_with("# hw/netmargin.toml line 1"),
            "{s}"
        );
        assert!(find(&s, "\"+5V\" = 5.0").ends_with("# hw/netmargin.toml line 4"));
        // the command line wins over line 5
        assert!(find(&s, "VREF = 3.3").ends_with("# command line (--rail)"));
        assert!(!s.contains("VREF = 2.5"));
        assert!(find(&s, "derating = 0.7").ends_with("line 8"));
        assert!(find(&s, "min_margin_v = 0.0").ends_with("# default"));
        assert!(find(&s, "package-mismatch = \"off\"").ends_with("line 9"));
        assert!(find(&s, "floating-ttl-input = \"off\"").ends_with("# command line (--disable)"));
        assert!(find(&s, "floating-cmos-input = \"error\"").ends_with("# default"));
    }

    #[test]
    fn without_a_file_everything_is_default_and_the_text_is_toml() {
        let s = show(
            "board.net",
            None,
            &SettingsArgs {
                only: vec!["fanout-overrun".into()],
                ..Default::default()
            },
        );
        assert!(s.contains("# configuration file: none found"));
        assert!(find(&s, "derating = 0.8").ends_with("# default"));
        assert!(find(&s, "fanout-overrun = \"error\"").ends_with("# default"));
        assert!(find(&s, "floating-cmos-input = \"off\"").ends_with("# command line (--only)"));
        let v: toml::Table = toml::from_str(&s).expect("the output is TOML");
        assert_eq!(v["checks"]["derating"].as_float(), Some(0.8));
        assert_eq!(
            v["checks"]["severity"].as_table().map(|t| t.len()),
            Some(REGISTRY.len())
        );
    }

    #[test]
    fn keys_and_numbers_are_toml() {
        assert_eq!(toml_key("VCC"), "VCC");
        assert_eq!(toml_key("+5V"), "\"+5V\"");
        assert_eq!(toml_key("/A\"B"), "\"/A\\\"B\"");
        assert_eq!(toml_float(5.0), "5.0");
        assert_eq!(toml_float(-12.0), "-12.0");
        assert_eq!(toml_float(3.3), "3.3");
    }
}
