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

use toml::de::{DeTable, DeValue};
use toml::Spanned;

use crate::classify::classifier::Rules;
use crate::classify::family::FamilyTable;
use crate::classify::function::FunctionTable;
use crate::classify::parts::{glob_match, PartTable};
use crate::diag::{Diag, Severity};
use crate::source::{SourceFile, Span};

pub const FILE_NAME: &str = "netmargin.toml";

#[derive(Debug, Default)]
struct RawConfig {
    rail_tolerance: Option<Spanned<f64>>,
    rails: std::collections::BTreeMap<String, Spanned<f64>>,
    connectors: std::collections::BTreeMap<String, Spanned<String>>,
    checks: Option<RawChecks>,
    rules: Option<RawRules>,
    waiver: Vec<RawWaiver>,
}

#[derive(Debug, Default)]
struct RawChecks {
    derating: Option<Spanned<f64>>,
    min_margin_v: Option<Spanned<f64>>,
    severity: std::collections::BTreeMap<Spanned<String>, Spanned<String>>,
}

#[derive(Debug, Default)]
struct RawRules {
    families: Vec<Spanned<String>>,
    functions: Vec<Spanned<String>>,
    parts: Vec<Spanned<String>>,
}

#[derive(Debug, Default)]
struct RawWaiver {
    check: Option<Spanned<String>>,
    refs: Vec<String>,
    pins: Vec<String>,
    nets: Vec<String>,
    reason: Option<Spanned<String>>,
    expires: Option<Spanned<toml::value::Datetime>>,
    /// The `[[waiver]]` table's span.
    span: std::ops::Range<usize>,
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
    pub fn covers(&self, d: crate::diag::DiagRef<'_>) -> bool {
        if self.check != "*" && self.check != d.code() {
            return false;
        }
        let refs: Vec<&str> = d
            .pins()
            .map(|p| p.split_once('.').map_or(p, |(r, _)| r))
            .collect();
        let refs_ok = self.refs.is_empty()
            || refs
                .iter()
                .any(|r| self.refs.iter().any(|g| glob_match(g, r)));
        let pins_ok =
            self.pins.is_empty() || d.pins().any(|p| self.pins.iter().any(|g| glob_match(g, p)));
        let nets_ok = self.nets.is_empty()
            || d.net()
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
    let mut diags = Vec::new();
    let raw = read_raw(source.text(), &mut diags);
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
                        .with_help(check_help(id.get_ref())),
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
        let span = sp(w.span.clone());
        let Some(check) = &w.check else {
            diags.push(
                Diag::error("config", "a waiver needs a `check`: the check id it accepts, or \"*\"")
                    .at(span, "no check")
                    .with_help("add `check = \"<check id>\"` to this [[waiver]]; `netmargin explain` lists the ids"),
            );
            continue;
        };
        if check.get_ref() != "*" && crate::checks::info(check.get_ref()).is_none() {
            diags.push(
                Diag::error(
                    "config",
                    format!("waiver for an unknown check `{}`", check.get_ref()),
                )
                .at(sp(check.span()), "unknown check")
                .with_help(check_help(check.get_ref())),
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
            check: check.get_ref().clone(),
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
        diags.sort_by_key(|d| d.primary_span().map_or(0, |s| s.start));
        Err(err(diags))
    }
}

fn check_help(id: &str) -> String {
    let close = crate::text::closest(id, crate::checks::REGISTRY.iter().map(|c| c.id), 2);
    match close.first() {
        Some(c) => format!("did you mean `{c}`? `netmargin explain` lists the checks"),
        None => "`netmargin explain` lists the checks".to_string(),
    }
}

/// Reads the document into the raw shape, noting every problem (syntax, unknown keys, wrong
/// kinds of value) at its place, in the words of this file's documentation, and going on.
fn read_raw(text: &str, diags: &mut Vec<Diag>) -> RawConfig {
    let (doc, errors) = DeTable::parse_recoverable(text);
    for e in errors {
        let mut d = Diag::error(
            "config",
            format!("this is not valid TOML: {}", e.message().trim_end()),
        );
        if let Some(s) = e.span() {
            d = d.at(sp(s), "here");
        }
        diags.push(d.with_help("see the README's configuration section for the file's form"));
    }
    let mut r = Reader { diags };
    let mut raw = RawConfig::default();
    let top = doc.get_ref();
    r.known(
        top,
        "",
        &[
            "rail_tolerance",
            "rails",
            "connectors",
            "checks",
            "rules",
            "waiver",
        ],
    );
    if let Some(v) = top.get("rail_tolerance") {
        raw.rail_tolerance = r.number(v, "rail_tolerance", "0.05");
    }
    if let Some(t) = top.get("rails").and_then(|v| r.table(v, "[rails]")) {
        for (k, v) in t {
            if let Some(n) = r.number(v, &format!("rail `{}`", k.get_ref()), "5.0") {
                raw.rails.insert(k.get_ref().to_string(), n);
            }
        }
    }
    if let Some(t) = top
        .get("connectors")
        .and_then(|v| r.table(v, "[connectors]"))
    {
        for (k, v) in t {
            if let Some(f) = r.string(v, &format!("connector `{}`", k.get_ref()), "\"74LS\"") {
                raw.connectors.insert(k.get_ref().to_string(), f);
            }
        }
    }
    if let Some(t) = top.get("checks").and_then(|v| r.table(v, "[checks]")) {
        r.known(t, "checks", &["derating", "min_margin_v", "severity"]);
        let mut c = RawChecks::default();
        if let Some(v) = t.get("derating") {
            c.derating = r.number(v, "checks.derating", "0.8");
        }
        if let Some(v) = t.get("min_margin_v") {
            c.min_margin_v = r.number(v, "checks.min_margin_v", "0.2");
        }
        if let Some(s) = t
            .get("severity")
            .and_then(|v| r.table(v, "checks.severity"))
        {
            for (k, v) in s {
                if let Some(x) = r.string(
                    v,
                    &format!("the severity of `{}`", k.get_ref()),
                    "\"warning\"",
                ) {
                    c.severity
                        .insert(Spanned::new(k.span(), k.get_ref().to_string()), x);
                }
            }
        }
        raw.checks = Some(c);
    }
    if let Some(t) = top.get("rules").and_then(|v| r.table(v, "[rules]")) {
        r.known(t, "rules", &["families", "functions", "parts"]);
        let mut rr = RawRules::default();
        for (key, list) in [
            ("families", &mut rr.families),
            ("functions", &mut rr.functions),
            ("parts", &mut rr.parts),
        ] {
            if let Some(v) = t.get(key) {
                *list = r.strings(v, &format!("rules.{key}"), "[\"rules/parts.toml\"]");
            }
        }
        raw.rules = Some(rr);
    }
    if let Some(v) = top.get("waiver") {
        match v.get_ref() {
            DeValue::Array(items) => {
                for item in items {
                    let Some(t) = r.table(item, "[[waiver]]") else {
                        continue;
                    };
                    r.known(
                        t,
                        "waiver",
                        &["check", "refs", "pins", "nets", "reason", "expires"],
                    );
                    let mut w = RawWaiver {
                        span: item.span(),
                        ..Default::default()
                    };
                    if let Some(v) = t.get("check") {
                        w.check = r.string(v, "a waiver's `check`", "\"floating-ttl-input\"");
                    }
                    for (key, list) in [
                        ("refs", &mut w.refs),
                        ("pins", &mut w.pins),
                        ("nets", &mut w.nets),
                    ] {
                        if let Some(v) = t.get(key) {
                            *list = r
                                .strings(v, &format!("a waiver's `{key}`"), "[\"U24\"]")
                                .into_iter()
                                .map(Spanned::into_inner)
                                .collect();
                        }
                    }
                    if let Some(v) = t.get("reason") {
                        w.reason = r.string(v, "a waiver's `reason`", "\"spare gates\"");
                    }
                    if let Some(v) = t.get("expires") {
                        match v.get_ref() {
                            DeValue::Datetime(d) => w.expires = Some(Spanned::new(v.span(), *d)),
                            other => r.wrong(
                                v.span(),
                                "a waiver's `expires`",
                                "a date such as 2027-06-30",
                                other,
                            ),
                        }
                    }
                    raw.waiver.push(w);
                }
            }
            other => r.wrong(v.span(), "`waiver`", "a list of [[waiver]] tables", other),
        }
    }
    raw
}

/// Walks the parsed document, noting problems as it goes.
struct Reader<'d> {
    diags: &'d mut Vec<Diag>,
}

fn kind_of(v: &DeValue<'_>) -> &'static str {
    match v {
        DeValue::String(_) => "text",
        DeValue::Integer(_) | DeValue::Float(_) => "a number",
        DeValue::Boolean(_) => "true or false",
        DeValue::Datetime(_) => "a date",
        DeValue::Array(_) => "a list",
        DeValue::Table(_) => "a table",
    }
}

impl Reader<'_> {
    fn wrong(&mut self, span: std::ops::Range<usize>, what: &str, want: &str, found: &DeValue<'_>) {
        self.diags.push(
            Diag::error(
                "config",
                format!("{what} must be {want}, not {}", kind_of(found)),
            )
            .at(sp(span), format!("expected {want}")),
        );
    }

    /// Notes every key of `t` not in `known`, with the closest known key.
    fn known(&mut self, t: &DeTable<'_>, section: &str, known: &[&str]) {
        for k in t.keys() {
            if known.contains(&k.get_ref().as_ref()) {
                continue;
            }
            let place = if section.is_empty() {
                "at the top of the file".to_string()
            } else {
                format!("in [{section}]")
            };
            let close = crate::text::closest(k.get_ref(), known.iter().copied(), 1);
            let help = match close.first() {
                Some(c) => format!(
                    "did you mean `{c}`? the keys {place} are: {}",
                    known.join(", ")
                ),
                None => format!("the keys {place} are: {}", known.join(", ")),
            };
            self.diags.push(
                Diag::error("config", format!("unknown key `{}` {place}", k.get_ref()))
                    .at(sp(k.span()), "unknown key")
                    .with_help(help),
            );
        }
    }

    fn table<'v, 'i>(
        &mut self,
        v: &'v Spanned<DeValue<'i>>,
        what: &str,
    ) -> Option<&'v DeTable<'i>> {
        match v.get_ref() {
            DeValue::Table(t) => Some(t),
            other => {
                self.wrong(v.span(), what, "a table", other);
                None
            }
        }
    }

    fn number(
        &mut self,
        v: &Spanned<DeValue<'_>>,
        what: &str,
        example: &str,
    ) -> Option<Spanned<f64>> {
        let x = match v.get_ref() {
            DeValue::Float(f) => f.as_str().replace('_', "").parse::<f64>().ok(),
            DeValue::Integer(i) => i64::from_str_radix(&i.as_str().replace('_', ""), i.radix())
                .ok()
                .map(|n| n as f64),
            other => {
                self.wrong(
                    v.span(),
                    what,
                    &format!("a number, such as {example}"),
                    other,
                );
                return None;
            }
        };
        match x {
            Some(x) => Some(Spanned::new(v.span(), x)),
            None => {
                self.diags.push(
                    Diag::error("config", format!("{what}: this number cannot be read"))
                        .at(sp(v.span()), "here"),
                );
                None
            }
        }
    }

    fn string(
        &mut self,
        v: &Spanned<DeValue<'_>>,
        what: &str,
        example: &str,
    ) -> Option<Spanned<String>> {
        match v.get_ref() {
            DeValue::String(s) => Some(Spanned::new(v.span(), s.to_string())),
            other => {
                self.wrong(
                    v.span(),
                    what,
                    &format!("text in quotes, such as {example}"),
                    other,
                );
                None
            }
        }
    }

    fn strings(
        &mut self,
        v: &Spanned<DeValue<'_>>,
        what: &str,
        example: &str,
    ) -> Vec<Spanned<String>> {
        match v.get_ref() {
            DeValue::Array(items) => items
                .iter()
                .filter_map(|i| self.string(i, &format!("each item of {what}"), "\"U24\""))
                .collect(),
            other => {
                self.wrong(
                    v.span(),
                    what,
                    &format!("a list of text, such as {example}"),
                    other,
                );
                Vec::new()
            }
        }
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
        self.all_rules().map_err(|mut e| e.swap_remove(0))
    }

    /// [`Config::rules`], reading every mapping file even after one has errors: the errors of
    /// all of them, one `ConfigError` per file, in the order listed.
    pub fn all_rules(&self) -> Result<Rules, Vec<ConfigError>> {
        let mut rules = Rules::builtin();
        let mut errors = Vec::new();
        macro_rules! read {
            ($f:expr, $parse:expr) => {
                match self.read_rule_file(&$f.value, $f.span) {
                    Err(e) => {
                        errors.push(e);
                        None
                    }
                    Ok((src, text)) => match $parse(&text) {
                        Err(e) => {
                            errors.push(rule_errors(&src, e));
                            None
                        }
                        Ok(t) => Some((src, t)),
                    },
                }
            };
        }
        for f in &self.families {
            let Some((src, t)) = read!(f, FamilyTable::parse) else {
                continue;
            };
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
            let Some((src, t)) = read!(f, FunctionTable::parse) else {
                continue;
            };
            for fun in t.iter() {
                rules.project_functions.push((
                    fun.series,
                    fun.id.clone(),
                    src.name().to_string(),
                    src.line_col(fun.span.start).line,
                ));
            }
            rules.functions.merge(t);
            rules.sources.push(format!("project {}", f.value.display()));
        }
        // read in the order listed (so errors come in that order), merged last to first: a
        // later file wins over an earlier one
        let mut parts = Vec::new();
        for f in &self.parts {
            let Some((src, mut t)) = read!(f, |text: &str| PartTable::parse(text, false)) else {
                continue;
            };
            for e in &mut t.entries {
                e.origin = Some((src.name().to_string(), src.line_col(e.span.start).line));
            }
            parts.push((f, t));
        }
        for (f, t) in parts.into_iter().rev() {
            rules.parts.merge_over(t);
            rules.sources.push(format!("project {}", f.value.display()));
        }
        if errors.is_empty() {
            Ok(rules)
        } else {
            Err(errors)
        }
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
        assert!(c.waivers[0].covers(d.view()));
        let d2 = Diag::warning("floating-ttl-input", "x").with_pins(["U9.5"]);
        assert!(!c.waivers[0].covers(d2.view()));
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
