//! `netmargin audit FILE`: one report of a (recaptured) schematic for the engineer who must
//! decide whether the board can be powered: what the board is, where its logic interfaces are
//! wrong (with level charts and fan-out bars), which family pairs on it are safe, what the
//! recapture may have got wrong, and where the figures came from.
//!
//! [`gather`] runs the pipeline once and keeps everything a report needs as owned data; the
//! renderers ([`html`], [`markdown`], [`charts`]) only lay that data out. Chart and table
//! numbers are the budget structs' ([`net_budget`]), never recomputed here; the family
//! matrix is the one place that asks the family table directly, because it is about families,
//! not nets.

pub mod charts;
pub mod html;
pub mod markdown;

use std::collections::BTreeMap;
use std::io;
use std::path::{Path, PathBuf};

use crate::analysis::{Analysis, Board, RunOptions, Settings};
use crate::circuit::budget::{NetBudgetRef, StateBudget};
use crate::circuit::{Circuit, RailSource};
use crate::classify::classifier::{PartKind, Rules};
use crate::classify::family::Drive;
use crate::classify::PinRole;
use crate::config;
use crate::diag::{Diag, DiagRef, Severity};
use crate::netlist::{self, Connection};
use crate::source::SourceFile;

/// Checks whose findings are about levels or fan-out: each gets a level chart.
pub const CHARTED_CHECKS: &[&str] = &[
    "fanout-overrun",
    "ttl-high-into-cmos",
    "level-mismatch",
    "input-overvoltage",
    "pull-up-out-of-range",
    "weak-high-drive",
];

/// A pass that is closer than this to failing is marked marginal in the family matrix (our
/// own threshold; `min_margin_v` raises it).
pub const MARGINAL_V: f64 = 0.2;

// ---------------------------------------------------------------------------
// the gathered data

/// Everything a report shows, owned.
#[derive(Debug, Clone)]
pub struct Audit {
    /// The file's name as given.
    pub file: String,
    /// The netlist header: (label, value), in the order title, source, tool, date, company, revision.
    pub header: Vec<(&'static str, String)>,
    pub version: Option<String>,
    pub summary: netlist::Summary,
    pub supplies: Vec<SupplyRow>,
    /// Logic parts by family.
    pub families: Vec<FamilyCount>,
    /// Other parts by kind: (kind, count).
    pub kinds: Vec<(&'static str, usize)>,
    /// (classified, IC-like).
    pub coverage: (usize, usize),
    /// Parts drawn as functions with no part number, not among the IC-like parts.
    pub function_symbols: usize,
    pub findings: Vec<Finding>,
    pub by_check: Vec<CheckCount>,
    /// Findings removed by the project's waivers.
    pub waived: usize,
    pub interfaces: Vec<Interface>,
    pub matrix: Matrix,
    pub recapture: Recapture,
    pub sources: Sources,
    pub derating: f64,
    pub rail_tolerance: f64,
}

#[derive(Debug, Clone)]
pub struct SupplyRow {
    pub net: String,
    pub volts: Option<f64>,
    pub ground: bool,
    /// "net name", "declared", "power output".
    pub basis: &'static str,
    /// Pins on the net.
    pub pins: usize,
    /// Logic parts whose supply (or ground) pin is on it.
    pub parts: usize,
}

#[derive(Debug, Clone)]
pub struct FamilyCount {
    pub id: String,
    pub name: String,
    pub count: usize,
    /// The parts' references.
    pub parts: Vec<String>,
}

#[derive(Debug, Clone)]
pub struct Finding {
    /// Anchor for cross references (`f1`, `f2` ...).
    pub id: String,
    pub code: String,
    pub severity: Severity,
    pub message: String,
    pub help: Option<String>,
    pub net: Option<String>,
    pub pins: Vec<String>,
    /// The parts named by `pins`, in order, de-duplicated.
    pub parts: Vec<String>,
    /// 1-based line of the primary place and its text.
    pub line: Option<usize>,
    pub line_text: Option<String>,
}

#[derive(Debug, Clone)]
pub struct CheckCount {
    pub code: String,
    pub summary: String,
    pub error: usize,
    pub warning: usize,
    pub info: usize,
}

/// One net that gets charts.
#[derive(Debug, Clone)]
pub struct Interface {
    pub net: String,
    /// Check ids that put it here, or `requested` for `--net`.
    pub why: Vec<String>,
    pub drivers: Vec<DriverView>,
    /// Loads with no family data (not charted).
    pub unknown_loads: Vec<String>,
}

/// A state's current against the rating, from [`StateBudget`].
#[derive(Debug, Clone, Copy)]
pub struct Usage {
    pub total: f64,
    pub rating: f64,
    pub ratio: f64,
    pub items: usize,
}

impl Usage {
    fn of(sb: &StateBudget, items: usize) -> Usage {
        Usage {
            total: sb.total,
            rating: sb.rating,
            ratio: sb.ratio(),
            items,
        }
    }
}

#[derive(Debug, Clone)]
pub struct DriverView {
    pub pin: String,
    pub describe: String,
    pub role: PinRole,
    pub family: Option<String>,
    pub vcc: Option<f64>,
    pub supply_known: bool,
    /// VOL max at the computed low-state current.
    pub low_level: Option<f64>,
    /// VOH min at the computed high-state current (raised by a pull-up).
    pub high_level: Option<f64>,
    pub low: Option<Usage>,
    pub high: Option<Usage>,
    /// (ohms, rail volts) of the pull-up, when there is one.
    pub pull_up: Option<(f64, f64)>,
    /// The highest level the output reaches (light load), for the overvoltage mark.
    pub top_level: Option<f64>,
    /// The family's last published (VOL max, IOL) and (VOH min, IOH) rows: what holds up to
    /// the rating, shown when the computed current is beyond them.
    pub rated_low: Option<(f64, f64)>,
    pub rated_high: Option<(f64, f64)>,
    pub loads: Vec<LoadGroup>,
}

/// The loads of one family (at one supply) on a net, against one driver.
#[derive(Debug, Clone)]
pub struct LoadGroup {
    pub family: String,
    pub pins: Vec<String>,
    pub vcc: Option<f64>,
    pub vih: f64,
    pub vil: f64,
    /// The worst over the group.
    pub high_margin: Option<f64>,
    pub low_margin: Option<f64>,
    pub input_limit: Option<f64>,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Verdict {
    Pass,
    Marginal,
    Fail,
}

impl Verdict {
    pub fn as_str(self) -> &'static str {
        match self {
            Verdict::Pass => "pass",
            Verdict::Marginal => "marginal",
            Verdict::Fail => "fail",
        }
    }
    /// The text mark shown in a cell (colour is never the only carrier).
    pub fn mark(self) -> &'static str {
        match self {
            Verdict::Pass => "PASS",
            Verdict::Marginal => "MARGINAL",
            Verdict::Fail => "FAIL",
        }
    }
}

/// A family at one of the board's supplies.
#[derive(Debug, Clone)]
pub struct FamilyAt {
    pub id: String,
    pub name: String,
    pub vcc: f64,
}

impl FamilyAt {
    pub fn label(&self) -> String {
        format!("{} at {:.2} V", self.id, self.vcc)
    }
}

#[derive(Debug, Clone)]
pub struct Cell {
    /// VOH min (at the rated IOH) - VIH min.
    pub high_margin: f64,
    /// VIL max - VOL max (at the rated IOL).
    pub low_margin: f64,
    /// IOL max / |IIL max|, IOH max / IIH max (whole inputs).
    pub fanout_low: f64,
    pub fanout_high: f64,
    /// How far the driver's highest level is above the input's limit.
    pub over_limit: Option<f64>,
    pub verdict: Verdict,
    /// Why it is not a pass.
    pub reason: Option<String>,
}

#[derive(Debug, Clone, Default)]
pub struct Matrix {
    pub drivers: Vec<FamilyAt>,
    pub loads: Vec<FamilyAt>,
    /// `cells[driver][load]`.
    pub cells: Vec<Vec<Cell>>,
    pub marginal_v: f64,
}

/// One line of the recapture section: what it is about, what, where.
#[derive(Debug, Clone)]
pub struct Row {
    pub subject: String,
    pub text: String,
    pub line: Option<usize>,
}

/// Rows of a recapture question that a check answers: its findings (waived ones too,
/// marked), never derived again here.
#[derive(Debug, Clone)]
pub struct Block {
    pub check: &'static str,
    /// False when the check is turned off in this run: the question was not asked.
    pub ran: bool,
    pub rows: Vec<Row>,
}

#[derive(Debug, Clone)]
pub struct Unclassified {
    pub reference: String,
    pub value: String,
    pub libpart: Option<String>,
    pub method: &'static str,
    /// (suggested value, what changed, what it reads as).
    pub suggestions: Vec<(String, String, String)>,
    pub line: Option<usize>,
}

#[derive(Debug, Clone)]
pub struct PartPins {
    pub reference: String,
    pub value: String,
    /// Pins in the part's library pins but on no net at all.
    pub absent: Vec<String>,
    /// Pins alone on a one-node net.
    pub alone: Vec<String>,
}

#[derive(Debug, Clone)]
pub struct Recapture {
    pub unclassified: Vec<Unclassified>,
    pub roles: Block,
    pub packages: Block,
    pub unpowered: Block,
    /// One-node nets named like labels: (net, the pin on it, line).
    pub label_nets: Vec<Row>,
    pub pins_off: Vec<PartPins>,
}

#[derive(Debug, Clone)]
pub struct Sources {
    pub tables: Vec<String>,
    /// (id, name, source, shipped) of the families on the board.
    pub families: Vec<(String, String, String, bool)>,
    /// (series:id, source) of the functions on the board.
    pub functions: Vec<(String, String)>,
    pub config: Option<String>,
}

impl Audit {
    /// The parts findings name, in reference order (`U9` before `U10`).
    pub fn finding_parts(&self) -> Vec<&str> {
        let mut parts: Vec<&str> = Vec::new();
        for f in &self.findings {
            for p in &f.parts {
                if !parts.contains(&p.as_str()) {
                    parts.push(p);
                }
            }
        }
        parts.sort_by_key(|x| natural_key(x));
        parts
    }

    /// The findings about `part` (it is named first), then those that only name it.
    pub fn findings_of(&self, part: &str) -> (Vec<&Finding>, Vec<&Finding>) {
        let about = self
            .findings
            .iter()
            .filter(|f| f.parts.first().is_some_and(|p| p == part))
            .collect();
        let named = self
            .findings
            .iter()
            .filter(|f| f.parts.iter().skip(1).any(|p| p == part))
            .collect();
        (about, named)
    }

    /// The distinct nets of the findings, in finding order (`None`: not on one net).
    pub fn finding_nets(&self) -> Vec<Option<&str>> {
        let mut nets: Vec<Option<&str>> = Vec::new();
        for f in &self.findings {
            if !nets.contains(&f.net.as_deref()) {
                nets.push(f.net.as_deref());
            }
        }
        nets
    }
}

/// Sort key that puts `U9` before `U10`.
pub fn natural_key(s: &str) -> (String, u64, String) {
    let p = s.find(|c: char| c.is_ascii_digit()).unwrap_or(s.len());
    let rest = &s[p..];
    let d = rest
        .find(|c: char| !c.is_ascii_digit())
        .unwrap_or(rest.len());
    (
        s[..p].to_string(),
        rest[..d].parse().unwrap_or(0),
        rest[d..].to_string(),
    )
}

// ---------------------------------------------------------------------------
// gathering

/// What shapes an audit besides the rules.
#[derive(Debug, Clone, Default)]
pub struct AuditOptions {
    pub run: RunOptions,
    /// Nets to chart whatever they hold, by name (a leading `/` may be left off).
    pub nets: Vec<String>,
    /// Waivers to apply (from the project configuration).
    pub waivers: Vec<config::Waiver>,
    /// The configuration file used, for the data sources section.
    pub config: Option<String>,
}

fn line_of(source: &SourceFile, d: DiagRef<'_>) -> (Option<usize>, Option<String>) {
    match crate::report::primary_place(d, Some(source)) {
        Some(p) => (
            Some(p.line),
            Some(source.line_text(p.line).trim().to_string()),
        ),
        None => (None, None),
    }
}

fn ref_of(pin: &str) -> &str {
    pin.rsplit_once('.').map_or(pin, |(r, _)| r)
}

fn kind_name(k: PartKind) -> &'static str {
    match k {
        PartKind::Logic => "logic (family unknown)",
        PartKind::NotLogic => "other ICs",
        PartKind::UnknownIc => "unclassified ICs",
        PartKind::Resistor => "resistors",
        PartKind::ResistorNetwork => "resistor networks",
        PartKind::Capacitor => "capacitors",
        PartKind::Led => "LEDs",
        PartKind::Display => "LED displays",
        PartKind::Diode => "diodes",
        PartKind::Connector => "connectors",
        PartKind::Switch => "switches and jumpers",
        PartKind::Inductor => "inductors and ferrite beads",
        PartKind::Other => "other parts",
    }
}

/// Analyses `source` with these rules and options and gathers the report's data.
pub fn gather(source: &SourceFile, rules: &Rules, opts: &AuditOptions) -> Result<Audit, Diag> {
    let settings = Settings {
        config_path: opts.config.as_ref().map(PathBuf::from),
        config: None,
        rules: std::borrow::Cow::Owned(rules.clone()),
        run: opts.run.clone(),
        waivers: opts.waivers.clone(),
    };
    let a = Analysis::new(source, &settings)?;
    let board = a.circuit();
    from_board(&board, &opts.nets)
}

/// Gathers the report's data from an analysis: its findings (waivers applied), its budgets,
/// its model. `nets` are charted whatever they hold.
pub fn from_board(board: &Board<'_, '_>, nets: &[String]) -> Result<Audit, Diag> {
    let a = board.analysis;
    let (source, nl, cl, cx) = (a.source, &a.nl, &a.cl, &board.cx);
    let found = board.findings();
    let diags = &found.diags;
    let waived = found.waived.len();
    let mut wanted = Vec::new();
    for n in nets {
        wanted.push(a.find_net(n)?);
    }

    let d = &nl.design;
    let t = |x: &Option<netlist::Text<'_>>| {
        x.as_ref()
            .map(|t| t.as_str().to_string())
            .filter(|s| !s.is_empty())
    };
    let header: Vec<(&'static str, String)> = [
        ("title", t(&d.title)),
        ("source", t(&d.source)),
        ("tool", t(&d.tool)),
        ("date", t(&d.date)),
        ("company", t(&d.company)),
        ("revision", t(&d.rev)),
    ]
    .into_iter()
    .filter_map(|(k, v)| v.map(|v| (k, v)))
    .collect();

    let findings = gather_findings(source, diags);
    let by_check = count_by_check(&findings);

    let supplies = gather_supplies(cx);
    let (families, kinds) = gather_parts(cx);

    // interfaces: nets with a level or fan-out finding, then the requested ones
    let mut chart_nets: Vec<(usize, Vec<String>)> = Vec::new();
    for f in findings
        .iter()
        .filter(|f| CHARTED_CHECKS.contains(&f.code.as_str()))
    {
        let Some(n) = f
            .net
            .as_deref()
            .and_then(|n| nl.net_by_name(n).or_else(|| a.find_net(n).ok()))
        else {
            continue;
        };
        match chart_nets.iter_mut().find(|(i, _)| *i == n) {
            Some((_, why)) => {
                if !why.contains(&f.code) {
                    why.push(f.code.clone());
                }
            }
            None => chart_nets.push((n, vec![f.code.clone()])),
        }
    }
    for n in wanted {
        match chart_nets.iter_mut().find(|(i, _)| *i == n) {
            Some((_, why)) => why.push("requested".into()),
            None => chart_nets.push((n, vec!["requested".into()])),
        }
    }
    let interfaces = chart_nets
        .into_iter()
        .map(|(n, why)| gather_interface(cx, board.budgets.net(n), n, why))
        .collect();

    let run = &a.settings.run;
    let matrix = gather_matrix(cx, run.checks.min_margin_v.max(MARGINAL_V));
    let recapture = gather_recapture(a, cx, found);
    let sources = gather_sources(
        cx,
        a.settings
            .config_path
            .as_ref()
            .map(|p| p.display().to_string()),
    );

    Ok(Audit {
        file: source.name().to_string(),
        header,
        version: nl.version.as_ref().map(|v| v.as_str().to_string()),
        summary: nl.summary(),
        supplies,
        families,
        kinds,
        coverage: cl.coverage,
        function_symbols: cl.function_symbols,
        findings,
        by_check,
        waived,
        interfaces,
        matrix,
        recapture,
        sources,
        derating: run.checks.derating,
        rail_tolerance: run.model.rail_tolerance,
    })
}

fn gather_findings(source: &SourceFile, diags: &crate::diag::DiagList) -> Vec<Finding> {
    diags
        .iter()
        .enumerate()
        .map(|(i, d)| {
            let (line, line_text) = line_of(source, d);
            let mut parts: Vec<String> = Vec::new();
            for p in d.pins() {
                let r = ref_of(p).to_string();
                if !parts.contains(&r) {
                    parts.push(r);
                }
            }
            Finding {
                id: format!("f{}", i + 1),
                code: d.code().to_string(),
                severity: d.severity(),
                message: d.message().into_owned(),
                help: d.help().map(String::from),
                net: d.net().map(String::from),
                pins: d.pins().map(String::from).collect(),
                parts,
                line,
                line_text,
            }
        })
        .collect()
}

/// Findings per code and severity, most errors first.
fn count_by_check(findings: &[Finding]) -> Vec<CheckCount> {
    let mut counts: BTreeMap<String, CheckCount> = BTreeMap::new();
    for f in findings {
        let summary = crate::checks::info(&f.code)
            .map(|c| c.summary.to_string())
            .or_else(|| {
                crate::diag::INPUT_CODES
                    .iter()
                    .find(|(c, _)| *c == f.code)
                    .map(|(_, s)| s.to_string())
            })
            .unwrap_or_default();
        let c = counts.entry(f.code.clone()).or_insert(CheckCount {
            code: f.code.clone(),
            summary,
            error: 0,
            warning: 0,
            info: 0,
        });
        match f.severity {
            Severity::Error => c.error += 1,
            Severity::Warning => c.warning += 1,
            Severity::Info => c.info += 1,
        }
    }
    let mut by_check: Vec<CheckCount> = counts.into_values().collect();
    by_check.sort_by(|a, b| {
        (b.error, b.warning, b.info)
            .cmp(&(a.error, a.warning, a.info))
            .then_with(|| a.code.cmp(&b.code))
    });
    by_check
}

fn gather_supplies(cx: &Circuit<'_, '_>) -> Vec<SupplyRow> {
    let mut rows: Vec<SupplyRow> = Vec::new();
    for (i, nm) in cx.nets.iter().enumerate() {
        let Some(r) = nm.rail() else { continue };
        let parts = cx
            .supplies
            .iter()
            .flatten()
            .filter(|s| s.supply_net() == Some(i) || s.ground_net() == Some(i))
            .count();
        rows.push(SupplyRow {
            net: cx.net_name(i),
            volts: r.v(),
            ground: r.ground,
            basis: match r.source {
                RailSource::Name => "net name",
                RailSource::PowerOutput => "power output",
                RailSource::User => "declared",
                RailSource::Usage => "supply pins on it",
            },
            pins: cx.nl.nets[i].node_count(),
            parts,
        });
    }
    rows.sort_by(|a, b| {
        b.ground
            .cmp(&a.ground)
            .then_with(|| {
                b.volts
                    .unwrap_or(f64::MIN)
                    .total_cmp(&a.volts.unwrap_or(f64::MIN))
            })
            .then_with(|| a.net.cmp(&b.net))
    });
    rows
}

fn gather_parts(cx: &Circuit<'_, '_>) -> (Vec<FamilyCount>, Vec<(&'static str, usize)>) {
    let mut fams: Vec<FamilyCount> = Vec::new();
    let mut kinds: Vec<(&'static str, usize)> = Vec::new();
    for (ci, p) in cx.cl.parts.iter().enumerate() {
        let reference = cx.nl.components[ci].reference.as_str().to_string();
        if p.is_logic() {
            let id = p.family.clone().unwrap_or_default();
            let name = cx.family(ci).map_or(id.clone(), |f| f.name.clone());
            match fams.iter_mut().find(|f| f.id == id) {
                Some(f) => {
                    f.count += 1;
                    f.parts.push(reference);
                }
                None => fams.push(FamilyCount {
                    id,
                    name,
                    count: 1,
                    parts: vec![reference],
                }),
            }
        } else {
            let k = kind_name(p.kind);
            match kinds.iter_mut().find(|(n, _)| *n == k) {
                Some((_, c)) => *c += 1,
                None => kinds.push((k, 1)),
            }
        }
    }
    fams.sort_by(|a, b| b.count.cmp(&a.count).then_with(|| a.id.cmp(&b.id)));
    kinds.sort_by(|a, b| b.1.cmp(&a.1).then_with(|| a.0.cmp(b.0)));
    (fams, kinds)
}

fn gather_interface(
    cx: &Circuit<'_, '_>,
    b: NetBudgetRef<'_>,
    net: usize,
    why: Vec<String>,
) -> Interface {
    let nm = &cx.nets[net];
    let mut drivers = Vec::new();
    for db in b.drivers.iter() {
        let d = &nm.drivers[db.driver()];
        let s = cx.supplies[d.at.comp()].as_ref();
        let mut loads: Vec<LoadGroup> = Vec::new();
        for m in b.margins(cx, net).filter(|m| m.driver == db.driver()) {
            let m = &m;
            let l = &nm.loads[m.load];
            let family = l.family(cx).unwrap_or("unknown").to_string();
            let vcc = l.levels(cx).map(|lv| lv.vcc);
            let same = |g: &LoadGroup| {
                g.family == family && (g.vih - m.vih).abs() < 1e-6 && (g.vil - m.vil).abs() < 1e-6
            };
            let worst = |a: Option<f64>, b: Option<f64>| match (a, b) {
                (Some(x), Some(y)) => Some(x.min(y)),
                (x, None) => x,
                (None, y) => y,
            };
            match loads.iter_mut().find(|g| same(g)) {
                Some(g) => {
                    g.pins.push(cx.pin_name(l.at));
                    g.high_margin = worst(g.high_margin, m.high_margin);
                    g.low_margin = worst(g.low_margin, m.low_margin);
                    g.input_limit = worst(g.input_limit, cx.input_limit(l));
                }
                None => loads.push(LoadGroup {
                    family,
                    pins: vec![cx.pin_name(l.at)],
                    vcc,
                    vih: m.vih,
                    vil: m.vil,
                    high_margin: m.high_margin,
                    low_margin: m.low_margin,
                    input_limit: cx.input_limit(l),
                }),
            }
        }
        drivers.push(DriverView {
            pin: cx.pin_name(d.at),
            describe: cx.describe(d.at),
            role: d.role,
            family: d.family(cx).map(String::from),
            vcc: s.map(|s| s.vcc).or_else(|| d.levels(cx).map(|l| l.vcc)),
            supply_known: s.is_some_and(|s| s.known),
            low_level: db.low_level(),
            high_level: db.high_level(),
            low: db
                .low()
                .map(|sb| Usage::of(&sb, db.items(cx, net, true).len())),
            high: db
                .high()
                .map(|sb| Usage::of(&sb, db.items(cx, net, false).len())),
            pull_up: db.pull_up().map(|p| (p.ohms, p.rail_volts)),
            top_level: match d.role {
                PinRole::OpenCollector => db.high_level(),
                _ => d
                    .levels(cx)
                    .and_then(|l| l.voh.first().map(|p| p.v))
                    .or(db.high_level()),
            },
            rated_low: d
                .levels(cx)
                .and_then(|l| l.vol.last().map(|p| (p.v, p.a.abs()))),
            rated_high: d
                .levels(cx)
                .filter(|_| d.role != PinRole::OpenCollector)
                .and_then(|l| l.voh.last().map(|p| (p.v, p.a.abs()))),
            loads,
        });
    }
    let unknown_loads = nm
        .loads
        .iter()
        .filter(|l| l.levels(cx).is_none())
        .map(|l| cx.pin_name(l.at))
        .collect();
    Interface {
        net: cx.net_name(net),
        why,
        drivers,
        unknown_loads,
    }
}

fn gather_matrix(cx: &Circuit<'_, '_>, marginal_v: f64) -> Matrix {
    // the families on the board at the supplies they run from
    let mut drivers: Vec<FamilyAt> = Vec::new();
    let mut loads: Vec<FamilyAt> = Vec::new();
    for (ci, p) in cx.cl.parts.iter().enumerate() {
        let (Some(f), Some(s)) = (cx.family(ci), cx.supplies[ci].as_ref()) else {
            continue;
        };
        let at = FamilyAt {
            id: f.id.clone(),
            name: f.name.clone(),
            vcc: (s.vcc * 100.0).round() / 100.0,
        };
        let drives = p.roles.iter().any(|r| r.is_output());
        let reads = p.roles.iter().any(|r| r.is_input());
        for (list, yes) in [(&mut drivers, drives), (&mut loads, reads)] {
            if yes
                && !list
                    .iter()
                    .any(|x| x.id == at.id && (x.vcc - at.vcc).abs() < 1e-9)
            {
                list.push(at.clone());
            }
        }
    }
    let key = |a: &FamilyAt, b: &FamilyAt| a.id.cmp(&b.id).then(a.vcc.total_cmp(&b.vcc));
    drivers.sort_by(key);
    loads.sort_by(key);
    let mut cells = Vec::new();
    for d in &drivers {
        let Some(df) = cx.rules.families.get(&d.id) else {
            continue;
        };
        let dl = df.levels(d.vcc, Drive::Standard);
        let voh = dl.voh.last().map_or(0.0, |p| p.v);
        let vol = dl.vol.last().map_or(0.0, |p| p.v);
        let top = dl.voh.first().map_or(voh, |p| p.v);
        let mut row = Vec::new();
        for l in &loads {
            let Some(lf) = cx.rules.families.get(&l.id) else {
                continue;
            };
            let ll = lf.levels(l.vcc, Drive::Standard);
            let high_margin = voh - ll.vih_min;
            let low_margin = ll.vil_max - vol;
            let fanout_low = if ll.iil_max.abs() > 0.0 {
                (dl.iol_max.abs() / ll.iil_max.abs()).floor()
            } else {
                f64::INFINITY
            };
            let fanout_high = if ll.iih_max.abs() > 0.0 {
                (dl.ioh_max.abs() / ll.iih_max.abs()).floor()
            } else {
                f64::INFINITY
            };
            let limit = lf.input_limit_v(l.vcc);
            let over_limit = (top > limit + 1e-9).then_some(top - limit);
            let mut reasons = Vec::new();
            if high_margin < 0.0 {
                reasons.push(format!("high short by {:.2} V", -high_margin));
            }
            if low_margin < 0.0 {
                reasons.push(format!("low short by {:.2} V", -low_margin));
            }
            if let Some(o) = over_limit {
                reasons.push(format!(
                    "high {:.2} V is {:.2} V above the input's limit {:.2} V",
                    top, o, limit
                ));
            }
            if fanout_low < 1.0 || fanout_high < 1.0 {
                reasons.push("cannot drive one input".to_string());
            }
            let verdict = if !reasons.is_empty() {
                Verdict::Fail
            } else if high_margin < marginal_v || low_margin < marginal_v {
                reasons.push(format!("a margin below {marginal_v:.2} V"));
                Verdict::Marginal
            } else {
                Verdict::Pass
            };
            row.push(Cell {
                high_margin,
                low_margin,
                fanout_low,
                fanout_high,
                over_limit,
                verdict,
                reason: (!reasons.is_empty()).then(|| reasons.join("; ")),
            });
        }
        cells.push(row);
    }
    drivers.retain(|d| cx.rules.families.get(&d.id).is_some());
    loads.retain(|l| cx.rules.families.get(&l.id).is_some());
    Matrix {
        drivers,
        loads,
        cells,
        marginal_v,
    }
}

/// The component whose node holds `d`'s primary place (a finding about a whole part points
/// at the part).
fn part_at(nl: &netlist::Netlist<'_>, d: DiagRef<'_>) -> Option<String> {
    let at = d.primary_span()?.start;
    nl.components
        .iter()
        .find(|c| c.span.start <= at && at < c.span.end)
        .map(|c| c.reference.as_str().to_string())
}

/// The rows of `checks`' findings (the first id names the block), waived ones marked.
fn block_from(
    a: &Analysis<'_>,
    found: &crate::analysis::Findings,
    checks: &[&'static str],
) -> Block {
    let row = |d: DiagRef<'_>, waived: bool| Row {
        subject: d
            .pins()
            .next()
            .map(|p| ref_of(p).to_string())
            .or_else(|| part_at(&a.nl, d))
            .or_else(|| d.net().map(String::from))
            .unwrap_or_default(),
        text: if waived {
            format!("{} (waived)", d.message())
        } else {
            d.message().into_owned()
        },
        line: line_of(a.source, d).0,
    };
    let mine = |d: &DiagRef<'_>| checks.contains(&d.code());
    let mut rows: Vec<(Option<usize>, Row)> = found
        .diags
        .iter()
        .filter(mine)
        .map(|d| (d.primary_span().map(|s| s.start as usize), row(d, false)))
        .chain(
            found
                .waived
                .iter()
                .filter(mine)
                .map(|d| (d.primary_span().map(|s| s.start as usize), row(d, true))),
        )
        .collect();
    rows.sort_by_key(|(at, _)| *at);
    Block {
        check: checks[0],
        ran: a.settings.runs(checks[0]),
        rows: rows.into_iter().map(|(_, r)| r).collect(),
    }
}

fn comp_line(source: &SourceFile, cx: &Circuit<'_, '_>, ci: usize) -> Option<usize> {
    Some(
        source
            .line_col(cx.nl.components[ci].span.start as usize)
            .line,
    )
}

fn gather_recapture(
    a: &Analysis<'_>,
    cx: &Circuit<'_, '_>,
    found: &crate::analysis::Findings,
) -> Recapture {
    let (source, nl) = (a.source, cx.nl);
    let unclassified = cx
        .cl
        .parts
        .iter()
        .enumerate()
        .filter(|(_, p)| {
            p.kind == PartKind::UnknownIc || (p.kind == PartKind::Logic && !p.is_logic())
        })
        .map(|(ci, p)| {
            let c = &nl.components[ci];
            Unclassified {
                reference: c.reference.as_str().to_string(),
                value: c.value_str().to_string(),
                libpart: c
                    .libsource
                    .as_ref()
                    .and_then(|l| l.part.as_ref())
                    .map(|p| p.as_str().to_string()),
                method: p.method.as_str(),
                suggestions: p
                    .suggestions
                    .iter()
                    .map(|s| (s.value.clone(), s.change.clone(), s.reads_as.clone()))
                    .collect(),
                line: comp_line(source, cx, ci),
            }
        })
        .collect();

    let roles = block_from(a, found, &["pin-role-mismatch"]);
    let packages = block_from(a, found, &["package-mismatch"]);
    // parts with no supply, and those whose supply pin sits on the wrong rail
    let unpowered = block_from(a, found, &["unpowered-part", "power-pin-miswired"]);

    let mut label_nets = Vec::new();
    for (i, n) in nl.nets.iter().enumerate() {
        let name = n.name.as_str();
        if n.node_count() != 1 || name.is_empty() {
            continue;
        }
        let bare = name.trim_start_matches('/');
        let auto = ["Net-(", "unconnected-(", "unconnected-", "Net-"]
            .iter()
            .any(|p| bare.starts_with(p));
        if auto {
            continue;
        }
        let node = &n.nodes(cx.nl)[0];
        label_nets.push(Row {
            subject: cx.net_name(i),
            text: format!("only {}.{} is on it: a label used once, probably meant to connect to a label of the same name", node.reference(cx.nl), node.pin(cx.nl)),
            line: Some(source.line_col(n.span.start as usize).line),
        });
    }

    let mut pins_off = Vec::new();
    for c in &nl.components {
        let absent: Vec<String> = c
            .pins
            .iter()
            .filter(|p| p.connection == Connection::Absent)
            .map(|p| p.num(nl).to_string())
            .collect();
        let alone: Vec<String> = c
            .pins
            .iter()
            .filter(|p| matches!(p.connection, Connection::Alone { .. }))
            .map(|p| p.num(nl).to_string())
            .collect();
        if absent.is_empty() && alone.is_empty() {
            continue;
        }
        pins_off.push(PartPins {
            reference: c.reference.as_str().to_string(),
            value: c.value_str().to_string(),
            absent,
            alone,
        });
    }

    Recapture {
        unclassified,
        roles,
        packages,
        unpowered,
        label_nets,
        pins_off,
    }
}

fn gather_sources(cx: &Circuit<'_, '_>, config: Option<String>) -> Sources {
    let mut families: Vec<(String, String, String, bool)> = Vec::new();
    let mut functions: Vec<(String, String)> = Vec::new();
    for (ci, p) in cx.cl.parts.iter().enumerate() {
        if let Some(f) = cx.family(ci) {
            if !families.iter().any(|x| x.0 == f.id) {
                families.push((f.id.clone(), f.name.clone(), f.source.clone(), f.shipped));
            }
        }
        if let Some((s, id)) = &p.function {
            if let Some(f) = cx.rules.functions.get(*s, id) {
                let key = format!("{}:{}", s.as_str(), f.id);
                if !functions.iter().any(|x| x.0 == key) {
                    functions.push((key, f.source.clone()));
                }
            }
        }
    }
    families.sort();
    functions.sort();
    Sources {
        tables: cx.rules.sources.clone(),
        families,
        functions,
        config,
    }
}

// ---------------------------------------------------------------------------
// the command

/// Writes `bytes` to `path` through a temporary file in the same folder and a rename, so a
/// reader never sees half a report.
fn write_atomic(path: &Path, bytes: &[u8]) -> io::Result<()> {
    // every file netmargin writes goes through one writer: temporary file, fsync, rename
    crate::atomic::write(path, bytes)
}

fn safe_file_part(s: &str) -> String {
    let t: String = s
        .trim_start_matches('/')
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '-' || c == '_' {
                c
            } else {
                '_'
            }
        })
        .collect();
    if t.is_empty() {
        "net".into()
    } else {
        t
    }
}

/// Writes every chart of the audit into `dir` as SVG files; returns their paths.
pub fn write_charts(audit: &Audit, dir: &Path) -> io::Result<Vec<PathBuf>> {
    std::fs::create_dir_all(dir)?;
    let mut out = Vec::new();
    for i in &audit.interfaces {
        for d in &i.drivers {
            let base = format!("{}--{}", safe_file_part(&i.net), safe_file_part(&d.pin));
            let p = dir.join(format!("{base}-levels.svg"));
            write_atomic(&p, charts::level_chart(&i.net, d).to_string().as_bytes())?;
            out.push(p);
            if let Some(doc) = charts::fanout_chart(&i.net, d, audit.derating) {
                let p = dir.join(format!("{base}-fanout.svg"));
                write_atomic(&p, doc.to_string().as_bytes())?;
                out.push(p);
            }
        }
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn references_sort_naturally() {
        let mut v = vec!["U10", "U9", "R1", "U1A"];
        v.sort_by_key(|x| natural_key(x));
        assert_eq!(v, ["R1", "U1A", "U9", "U10"]);
    }
}
