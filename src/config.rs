//! The project configuration, `netmargin.toml`: found in the netlist's folder or the nearest
//! one above it, or named with `--config`. Read with spans, so a bad key or value is shown at
//! its line; unknown keys are errors.
//!
//! ```toml
//! rail_tolerance = 0.05            # check each inequality at the worst end of +-5 %
//!
//! [rails]                          # rails and their voltages (also nets whose names hide it)
//! "+5V" = 5.0
//! VCC = 5.0
//! VREF_LOGIC = 3.3
//!
//! [connectors]                     # connectors whose pins are driven by a known family
//! J3 = "74LS"
//!
//! [checks]
//! derating = 0.8                   # fan-out above 80 % of the rating is a warning
//! min_margin_v = 0.2               # a level margin below 0.2 V is still a warning
//! severity = { "floating-ttl-input" = "error", "package-mismatch" = "off" }
//!
//! [rules]                          # project mapping files, over the shipped ones
//! families = ["rules/families.toml"]
//! functions = ["rules/functions.toml"]
//! parts = ["rules/parts.toml"]
//!
//! [[waiver]]
//! check = "floating-ttl-input"
//! refs = ["U24"]                   # globs; any of refs / pins / nets narrows the waiver
//! pins = ["U24.9", "U24.1?"]
//! nets = ["/SPARE_*"]
//! reason = "spare gates, tied on the replacement board"
//! expires = 2027-06-30             # optional
//! ```
//!
//! Precedence of the mapping files: a component field on the symbol over the project files
//! (in the order listed, later over earlier), over the shipped `rules/`.

use std::path::{Path, PathBuf};

use serde::Deserialize;
use toml::Spanned;

use crate::classify::classifier::Rules;
use crate::classify::family::FamilyTable;
use crate::classify::function::FunctionTable;
use crate::classify::parts::{glob_match, PartTable};
use crate::diag::{Diag, Severity};
use crate::source::{SourceFile, Span};

pub const FILE_NAME: &str = "netmargin.toml";

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawConfig {
    #[serde(default)]
    rail_tolerance: Option<Spanned<f64>>,
    #[serde(default)]
    rails: std::collections::BTreeMap<String, Spanned<f64>>,
    #[serde(default)]
    connectors: std::collections::BTreeMap<String, Spanned<String>>,
    #[serde(default)]
    checks: Option<RawChecks>,
    #[serde(default)]
    rules: Option<RawRules>,
    #[serde(default)]
    waiver: Vec<Spanned<RawWaiver>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawChecks {
    #[serde(default)]
    derating: Option<Spanned<f64>>,
    #[serde(default)]
    min_margin_v: Option<Spanned<f64>>,
    #[serde(default)]
    severity: std::collections::BTreeMap<Spanned<String>, Spanned<String>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRules {
    #[serde(default)]
    families: Vec<Spanned<String>>,
    #[serde(default)]
    functions: Vec<Spanned<String>>,
    #[serde(default)]
    parts: Vec<Spanned<String>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawWaiver {
    check: Spanned<String>,
    #[serde(default)]
    refs: Vec<String>,
    #[serde(default)]
    pins: Vec<String>,
    #[serde(default)]
    nets: Vec<String>,
    reason: Option<Spanned<String>>,
    #[serde(default)]
    expires: Option<Spanned<toml::value::Datetime>>,
}

/// A value with where it came from.
#[derive(Debug, Clone, PartialEq)]
pub struct At<T> {
    pub value: T,
    pub span: Span,
}

/// A check's configured severity, or off.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Setting {
    Off,
    Severity(Severity),
}

#[derive(Debug, Clone)]
pub struct Waiver {
    pub check: String,
    pub refs: Vec<String>,
    pub pins: Vec<String>,
    pub nets: Vec<String>,
    pub reason: String,
    /// (year, month, day)
    pub expires: Option<(i32, u32, u32)>,
    pub span: Span,
}

impl Waiver {
    /// True when the waiver covers the finding.
    pub fn covers(&self, d: &Diag) -> bool {
        if self.check != "*" && self.check != d.code {
            return false;
        }
        let refs: Vec<&str> = d
            .pins
            .iter()
            .map(|p| p.split_once('.').map_or(p.as_str(), |(r, _)| r))
            .collect();
        let refs_ok = self.refs.is_empty()
            || refs
                .iter()
                .any(|r| self.refs.iter().any(|g| glob_match(g, r)));
        let pins_ok = self.pins.is_empty()
            || d.pins
                .iter()
                .any(|p| self.pins.iter().any(|g| glob_match(g, p)));
        let nets_ok = self.nets.is_empty()
            || d.net
                .as_deref()
                .is_some_and(|n| self.nets.iter().any(|g| glob_match(g, n)));
        refs_ok && pins_ok && nets_ok
    }

    pub fn expired(&self, today: (i32, u32, u32)) -> bool {
        self.expires.is_some_and(|e| e < today)
    }
}

/// A loaded configuration.
#[derive(Debug, Clone, Default)]
pub struct Config {
    pub path: Option<PathBuf>,
    pub source: Option<SourceFile>,
    pub rail_tolerance: Option<At<f64>>,
    pub rails: Vec<At<(String, f64)>>,
    pub connectors: Vec<At<(String, String)>>,
    pub derating: Option<At<f64>>,
    pub min_margin_v: Option<At<f64>>,
    pub checks: Vec<At<(String, Setting)>>,
    pub families: Vec<At<PathBuf>>,
    pub functions: Vec<At<PathBuf>>,
    pub parts: Vec<At<PathBuf>>,
    pub waivers: Vec<Waiver>,
}

/// A configuration or mapping-file problem, shown against that file.
#[derive(Debug)]
pub struct ConfigError {
    pub source: SourceFile,
    pub diags: Vec<Diag>,
}

fn sp(r: std::ops::Range<usize>) -> Span {
    Span::new(r.start, r.end)
}

/// The nearest `netmargin.toml` in `start`'s folder or above it.
pub fn discover(start: &Path) -> Option<PathBuf> {
    let cwd = std::env::current_dir().ok()?;
    let abs = if start.is_absolute() {
        start.to_path_buf()
    } else {
        cwd.join(start)
    };
    let mut dir = if abs.is_dir() {
        Some(abs.as_path())
    } else {
        abs.parent()
    };
    while let Some(d) = dir {
        let c = d.join(FILE_NAME);
        if c.is_file() {
            // shown as the user would write it: relative to the current folder when below it
            return Some(match c.strip_prefix(&cwd) {
                Ok(rel) if !start.is_absolute() => rel.to_path_buf(),
                _ => c,
            });
        }
        dir = d.parent();
    }
    None
}

/// Reads and validates a configuration file.
pub fn load(path: &Path) -> Result<Config, ConfigError> {
    let name = path.display().to_string();
    let text = std::fs::read_to_string(path).map_err(|e| ConfigError {
        source: SourceFile::new(name.clone(), ""),
        diags: vec![Diag::error(
            "config",
            format!("cannot read the configuration `{name}`: {e}"),
        )],
    })?;
    let source = SourceFile::new(name, text);
    let mut cfg = parse(&source)?;
    cfg.path = Some(path.to_path_buf());
    Ok(cfg)
}

/// Parses a configuration text.
pub fn parse(source: &SourceFile) -> Result<Config, ConfigError> {
    let err = |diags: Vec<Diag>| ConfigError {
        source: source.clone(),
        diags,
    };
    let raw: RawConfig = toml::from_str(source.text()).map_err(|e| {
        let mut d = Diag::error(
            "config",
            format!("in the configuration: {}", e.message().trim_end()),
        );
        if let Some(s) = e.span() {
            d = d.at(sp(s), "here");
        }
        err(vec![d.with_help(
            "see `netmargin config --help` and the README's configuration section for the keys",
        )])
    })?;
    let mut diags = Vec::new();
    let mut cfg = Config {
        source: Some(source.clone()),
        ..Default::default()
    };
    let mut frac = |v: &Spanned<f64>, what: &str, lo: f64, hi: f64| -> Option<At<f64>> {
        let x = *v.get_ref();
        if !(lo..=hi).contains(&x) {
            diags.push(
                Diag::error(
                    "config",
                    format!("{what} must be between {lo} and {hi}, found {x}"),
                )
                .at(sp(v.span()), "out of range"),
            );
            None
        } else {
            Some(At {
                value: x,
                span: sp(v.span()),
            })
        }
    };
    cfg.rail_tolerance = raw
        .rail_tolerance
        .as_ref()
        .and_then(|v| frac(v, "rail_tolerance", 0.0, 0.5));
    if let Some(c) = &raw.checks {
        cfg.derating = c
            .derating
            .as_ref()
            .and_then(|v| frac(v, "checks.derating", 0.05, 1.0));
        cfg.min_margin_v = c
            .min_margin_v
            .as_ref()
            .and_then(|v| frac(v, "checks.min_margin_v", 0.0, 5.0));
    }
    for (name, v) in &raw.rails {
        if !v.get_ref().is_finite() || v.get_ref().abs() > 1000.0 {
            diags.push(
                Diag::error(
                    "config",
                    format!("rail `{name}`: {} is not a plausible voltage", v.get_ref()),
                )
                .at(sp(v.span()), "here"),
            );
            continue;
        }
        cfg.rails.push(At {
            value: (name.clone(), *v.get_ref()),
            span: sp(v.span()),
        });
    }
    let families = FamilyTable::builtin();
    for (r, fam) in &raw.connectors {
        if families.get(fam.get_ref()).is_none() {
            diags.push(
                Diag::error(
                    "config",
                    format!("connector {r}: no family `{}`", fam.get_ref()),
                )
                .at(sp(fam.span()), "unknown family")
                .with_help("`netmargin families` lists them"),
            );
            continue;
        }
        cfg.connectors.push(At {
            value: (r.clone(), fam.get_ref().clone()),
            span: sp(fam.span()),
        });
    }
    if let Some(c) = &raw.checks {
        for (id, setting) in &c.severity {
            if crate::checks::info(id.get_ref()).is_none() {
                diags.push(
                    Diag::error("config", format!("no check `{}`", id.get_ref()))
                        .at(sp(id.span()), "unknown check")
                        .with_help("`netmargin explain` lists the checks"),
                );
                continue;
            }
            let s = match setting.get_ref().as_str() {
                "off" => Setting::Off,
                "error" => Setting::Severity(Severity::Error),
                "warning" => Setting::Severity(Severity::Warning),
                "info" => Setting::Severity(Severity::Info),
                other => {
                    diags.push(
                        Diag::error(
                            "config",
                            format!("`{other}` is not a severity: use error, warning, info or off"),
                        )
                        .at(sp(setting.span()), "here"),
                    );
                    continue;
                }
            };
            cfg.checks.push(At {
                value: (id.get_ref().clone(), s),
                span: sp(setting.span()),
            });
        }
    }
    if let Some(r) = &raw.rules {
        let conv = |v: &Vec<Spanned<String>>| {
            v.iter()
                .map(|p| At {
                    value: PathBuf::from(p.get_ref()),
                    span: sp(p.span()),
                })
                .collect::<Vec<_>>()
        };
        cfg.families = conv(&r.families);
        cfg.functions = conv(&r.functions);
        cfg.parts = conv(&r.parts);
    }
    for w in &raw.waiver {
        let span = sp(w.span());
        let w = w.get_ref();
        if w.check.get_ref() != "*" && crate::checks::info(w.check.get_ref()).is_none() {
            diags.push(
                Diag::error(
                    "config",
                    format!("waiver for an unknown check `{}`", w.check.get_ref()),
                )
                .at(sp(w.check.span()), "unknown check"),
            );
            continue;
        }
        let reason = match &w.reason {
            Some(r) if !r.get_ref().trim().is_empty() => r.get_ref().clone(),
            _ => {
                diags.push(
                    Diag::error(
                        "config",
                        "a waiver needs a `reason`: say why the finding is accepted",
                    )
                    .at(span, "no reason")
                    .with_help("add `reason = \"...\"` to this [[waiver]]"),
                );
                continue;
            }
        };
        let expires = match &w.expires {
            None => None,
            Some(d) => match d.get_ref().date {
                Some(date) => Some((date.year as i32, date.month as u32, date.day as u32)),
                None => {
                    diags.push(
                        Diag::error("config", "`expires` must be a date such as 2027-06-30")
                            .at(sp(d.span()), "no date"),
                    );
                    continue;
                }
            },
        };
        cfg.waivers.push(Waiver {
            check: w.check.get_ref().clone(),
            refs: w.refs.clone(),
            pins: w.pins.clone(),
            nets: w.nets.clone(),
            reason,
            expires,
            span,
        });
    }
    if diags.is_empty() {
        Ok(cfg)
    } else {
        Err(err(diags))
    }
}

impl Config {
    fn base(&self) -> PathBuf {
        self.path
            .as_ref()
            .and_then(|p| p.parent())
            .map(Path::to_path_buf)
            .unwrap_or_default()
    }

    /// The shipped rules with the project's mapping files over them.
    pub fn rules(&self) -> Result<Rules, ConfigError> {
        let mut rules = Rules::builtin();
        for f in &self.families {
            let (src, text) = self.read_rule_file(&f.value, f.span)?;
            let t = FamilyTable::parse(&text).map_err(|e| rule_errors(&src, e))?;
            for fam in t.iter() {
                rules.project_families.push((
                    fam.id.clone(),
                    src.name().to_string(),
                    src.line_col(fam.span.start).line,
                ));
            }
            rules.families.merge(t);
            rules.sources.push(format!("project {}", f.value.display()));
        }
        for f in &self.functions {
            let (src, text) = self.read_rule_file(&f.value, f.span)?;
            let t = FunctionTable::parse(&text).map_err(|e| rule_errors(&src, e))?;
            for f in t.iter() {
                rules.project_functions.push((
                    f.series,
                    f.id.clone(),
                    src.name().to_string(),
                    src.line_col(f.span.start).line,
                ));
            }
            rules.functions.merge(t);
            rules.sources.push(format!("project {}", f.value.display()));
        }
        for f in self.parts.iter().rev() {
            let (src, text) = self.read_rule_file(&f.value, f.span)?;
            let mut t = PartTable::parse(&text, false).map_err(|e| rule_errors(&src, e))?;
            for e in &mut t.entries {
                e.origin = Some((src.name().to_string(), src.line_col(e.span.start).line));
            }
            rules.parts.merge_over(t);
            rules.sources.push(format!("project {}", f.value.display()));
        }
        Ok(rules)
    }

    fn read_rule_file(&self, rel: &Path, span: Span) -> Result<(SourceFile, String), ConfigError> {
        let p = self.base().join(rel);
        match std::fs::read_to_string(&p) {
            Ok(t) => Ok((SourceFile::new(p.display().to_string(), t.clone()), t)),
            Err(e) => Err(ConfigError {
                source: self
                    .source
                    .clone()
                    .unwrap_or_else(|| SourceFile::new("netmargin.toml", "")),
                diags: vec![Diag::error(
                    "config",
                    format!("cannot read the mapping file `{}`: {e}", p.display()),
                )
                .at(span, "listed here")],
            }),
        }
    }
}

fn rule_errors(src: &SourceFile, errs: Vec<crate::classify::RuleError>) -> ConfigError {
    ConfigError {
        source: src.clone(),
        diags: errs
            .into_iter()
            .map(|e| {
                let d = Diag::error("mapping-file", e.message.clone());
                match e.span {
                    Some(s) => d.at(sp(s), "here"),
                    None => d,
                }
            })
            .collect(),
    }
}

/// Today's date (UTC) as (year, month, day), from the system clock.
pub fn today() -> (i32, u32, u32) {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.as_secs() as i64);
    civil_from_days(secs.div_euclid(86_400))
}

/// Days since 1970-01-01 to a civil date (the proleptic Gregorian calendar).
pub fn civil_from_days(z: i64) -> (i32, u32, u32) {
    let z = z + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z.rem_euclid(146_097);
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let y = yoe + era * 400;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let m = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    ((if m <= 2 { y + 1 } else { y }) as i32, m, d)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn p(text: &str) -> Result<Config, ConfigError> {
        parse(&SourceFile::new("netmargin.toml", text))
    }

    #[test]
    fn reads_every_section() {
        let c = p(r#"
rail_tolerance = 0.05
[rails]
"+5V" = 5.0
VCC = 5
[connectors]
J3 = "74LS"
[checks]
derating = 0.7
severity = { "package-mismatch" = "off", "floating-ttl-input" = "error" }
[rules]
parts = ["my-parts.toml"]
[[waiver]]
check = "floating-ttl-input"
refs = ["U2?"]
reason = "spares"
expires = 2027-06-30
"#)
        .unwrap();
        assert_eq!(c.rails.len(), 2);
        assert_eq!(c.derating.as_ref().unwrap().value, 0.7);
        assert_eq!(c.checks.len(), 2);
        assert_eq!(c.waivers[0].expires, Some((2027, 6, 30)));
        let d = Diag::warning("floating-ttl-input", "x").with_pins(["U24.9"]);
        assert!(c.waivers[0].covers(&d));
        let d2 = Diag::warning("floating-ttl-input", "x").with_pins(["U9.5"]);
        assert!(!c.waivers[0].covers(&d2));
    }

    #[test]
    fn errors_point_at_their_line() {
        let text = "[checks]\nderating = 0.8\ncolour = 1\n";
        let e = p(text).unwrap_err();
        let span = e.diags[0].primary_span().unwrap();
        assert_eq!(e.source.line_col(span.start as usize).line, 3);
        let e = p("[[waiver]]\ncheck = \"fanout-overrun\"\n").unwrap_err();
        assert!(e.diags[0].message.contains("reason"));
        let e = p("[checks]\nseverity = { \"no-such\" = \"off\" }\n").unwrap_err();
        assert!(e.diags[0].message.contains("no check `no-such`"));
        let e = p("[checks]\nderating = 3\n").unwrap_err();
        assert!(e.diags[0].message.contains("between"));
    }

    #[test]
    fn civil_dates() {
        assert_eq!(civil_from_days(0), (1970, 1, 1));
        assert_eq!(civil_from_days(19_723), (2024, 1, 1));
        assert_eq!(civil_from_days(20_513), (2026, 3, 1));
        assert_eq!(civil_from_days(-1), (1969, 12, 31));
    }
}
