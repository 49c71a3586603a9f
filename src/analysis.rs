//! One analysis per file: the settings resolved once, then each stage computed once and
//! handed down. Every command reads what it shows from here, so `check`, `net`, `parts`,
//! `audit`, `init` and `config --show` see the same circuit for the same file.
//!
//! ```text
//! Settings::resolve (defaults < netmargin.toml < command line, project mapping files)
//!   └─ Analysis::new   text -> netlist (one-pass reader) -> classification
//!        └─ .circuit()  rails, supplies, per-net model, every net's budget
//!             └─ .findings()  the model's diagnostics and the checks' findings, waivers applied
//! ```
//!
//! Nothing here parses the command line: commands turn their arguments into [`Overrides`].

use std::cell::OnceCell;
use std::path::{Path, PathBuf};

use crate::checks::{self, CheckOptions};
use crate::circuit::budget::Budgets;
use crate::circuit::{self, Circuit, ModelOptions};
use crate::classify::classifier::{classify, Classified, Rules};
use crate::config::{self, Config, ConfigError, Setting, Waiver};
use crate::diag::{Diag, DiagList, Severity};
use crate::input::ReadOptions;
use crate::netlist::{self, Netlist};
use crate::sexpr;
use crate::source::SourceFile;

/// Everything that shapes a run.
#[derive(Debug, Clone, Default)]
pub struct RunOptions {
    pub read: ReadOptions,
    pub model: ModelOptions,
    pub checks: CheckOptions,
}

/// What the command line says over the configuration.
#[derive(Debug, Clone, Default)]
pub struct Overrides {
    /// Run only these checks.
    pub only: Vec<String>,
    /// Turn these checks off.
    pub disable: Vec<String>,
    /// Rails and their voltages, over the configuration's.
    pub rail: Vec<(String, f64)>,
    /// The configuration file to use instead of the nearest one.
    pub config: Option<PathBuf>,
    /// Use no configuration file.
    pub no_config: bool,
}

/// The settings one file is analysed with, resolved once.
#[derive(Debug, Clone)]
pub struct Settings {
    /// The configuration file used, if any.
    pub config_path: Option<PathBuf>,
    pub config: Option<Config>,
    /// The shipped rules with the project's mapping files over them (borrowed from
    /// [`Rules::shipped`] when there are none).
    pub rules: std::borrow::Cow<'static, Rules>,
    pub run: RunOptions,
    /// The waivers in force (from the configuration).
    pub waivers: Vec<Waiver>,
}

/// Which configuration file a netlist named `f` uses: `--no-config`, `--config FILE`, or the
/// nearest `netmargin.toml` at or above it (standard input: above the current folder).
pub fn config_for(f: &str, over: &Overrides) -> Option<PathBuf> {
    if over.no_config {
        return None;
    }
    if let Some(c) = &over.config {
        return Some(c.clone());
    }
    if f == "-" {
        return config::discover(&std::env::current_dir().ok()?);
    }
    config::discover(Path::new(f))
}

/// The options a file is analysed with: the defaults, then the configuration, then the
/// command line.
pub fn run_options(cfg: Option<&Config>, over: &Overrides, read: &ReadOptions) -> RunOptions {
    let mut run = RunOptions {
        read: read.clone(),
        ..Default::default()
    };
    if let Some(c) = cfg {
        for r in &c.rails {
            run.model.rails.push(r.value.clone());
        }
        if let Some(t) = &c.rail_tolerance {
            run.model.rail_tolerance = t.value;
        }
        if let Some(d) = &c.derating {
            run.checks.derating = d.value;
        }
        if let Some(m) = &c.min_margin_v {
            run.checks.min_margin_v = m.value;
        }
        for s in &c.checks {
            match s.value.1 {
                Setting::Off => run.checks.disabled.push(s.value.0.clone()),
                Setting::Severity(sev) => run.checks.severity.push((s.value.0.clone(), sev)),
            }
        }
        run.model.connector_families = c.connectors.iter().map(|c| c.value.clone()).collect();
    }
    // the command line wins over the configuration
    if !over.only.is_empty() {
        run.checks.disabled = checks::REGISTRY
            .iter()
            .map(|c| c.id.to_string())
            .filter(|id| !over.only.contains(id))
            .collect();
    }
    run.checks.disabled.extend(over.disable.iter().cloned());
    // the model takes the first declaration of a rail: the command line's go first
    let from_config = std::mem::take(&mut run.model.rails);
    run.model.rails = over.rail.iter().cloned().chain(from_config).collect();
    run
}

impl Settings {
    /// The shipped rules and defaults, with the command line over them (no configuration).
    pub fn builtin(over: &Overrides, read: &ReadOptions) -> Settings {
        Settings {
            config_path: None,
            config: None,
            rules: std::borrow::Cow::Borrowed(Rules::shipped()),
            run: run_options(None, over, read),
            waivers: Vec::new(),
        }
    }

    /// Settings from explicit rules and options (library use and tests).
    pub fn with(rules: Rules, run: RunOptions) -> Settings {
        Settings {
            config_path: None,
            config: None,
            rules: std::borrow::Cow::Owned(rules),
            run,
            waivers: Vec::new(),
        }
    }

    /// Loads the configuration at `path` (or none) and resolves the settings. The errors are
    /// every problem found: the configuration's, or those of each of its mapping files.
    pub fn load(
        path: Option<&Path>,
        over: &Overrides,
        read: &ReadOptions,
    ) -> Result<Settings, Vec<ConfigError>> {
        let Some(path) = path else {
            return Ok(Settings::builtin(over, read));
        };
        let config = config::load(path).map_err(|e| vec![e])?;
        let rules = config.all_rules()?;
        Ok(Settings {
            config_path: Some(path.to_path_buf()),
            run: run_options(Some(&config), over, read),
            waivers: config.waivers.clone(),
            config: Some(config),
            rules: std::borrow::Cow::Owned(rules),
        })
    }

    /// The settings for the netlist `f` (`-` is standard input).
    pub fn resolve(
        f: &str,
        over: &Overrides,
        read: &ReadOptions,
    ) -> Result<Settings, Vec<ConfigError>> {
        Settings::load(config_for(f, over).as_deref(), over, read)
    }

    /// True when the check `id` runs under these settings.
    pub fn runs(&self, id: &str) -> bool {
        !self.run.checks.disabled.iter().any(|d| d == id)
    }
}

/// Which project mapping entries a file used (so entries that matched nothing in a run can
/// be reported).
#[derive(Debug, Clone, Default)]
pub struct UsedRules {
    /// Indices into `Rules::parts.entries`.
    pub entries: Vec<usize>,
    /// Family ids the classified parts use.
    pub families: Vec<String>,
    /// (series, function id) the classified parts use.
    pub functions: Vec<(crate::classify::function::Series, String)>,
}

/// Reads a source into the model: a schematic project (opened by `pipeline::open_source` as
/// its sheets joined) with the schematic reader, anything else with the one-pass netlist
/// reader. The only place either runs for the commands.
pub fn read_model(source: &SourceFile) -> Result<Netlist<'_>, Diag> {
    if crate::schematic::is_sheet(source.text()) {
        return crate::schematic::read_source(source);
    }
    if let Some(d) = sexpr::sniff(source.text()) {
        return Err(d);
    }
    netlist::read(source.text())
}

/// One file, read and classified.
pub struct Analysis<'a> {
    pub source: &'a SourceFile,
    pub settings: &'a Settings,
    pub nl: Netlist<'a>,
    pub cl: Classified,
}

impl<'a> Analysis<'a> {
    /// Reads the text with the one-pass reader (or, for a schematic project, the schematic
    /// reader) and classifies every part. `Err` is the diagnostic that stops this file (not a
    /// netlist, malformed).
    pub fn new(source: &'a SourceFile, settings: &'a Settings) -> Result<Analysis<'a>, Diag> {
        let phase = crate::phases::start("read");
        let nl = read_model(source)?;
        drop(phase);
        let phase = crate::phases::start("classify");
        let cl = classify(&nl, &settings.rules);
        drop(phase);
        Ok(Analysis {
            source,
            settings,
            nl,
            cl,
        })
    }

    /// The circuit model and every net's budget, computed once for whoever asks.
    pub fn circuit(&self) -> Board<'_, 'a> {
        let _phase = crate::phases::start("circuit");
        let cx = circuit::build(
            &self.nl,
            &self.cl,
            &self.settings.rules,
            self.settings.run.model.clone(),
        );
        let budgets = Budgets::build(&cx);
        Board {
            analysis: self,
            cx,
            budgets,
            findings: OnceCell::new(),
        }
    }

    /// The project mapping entries, families and functions the classification used.
    pub fn used(&self) -> UsedRules {
        let mut used = UsedRules::default();
        // parts alike share one classification: each is read once
        let mut seen: rustc_hash::FxHashSet<*const crate::classify::classifier::PartClass> =
            Default::default();
        for p in &self.cl.parts {
            if !seen.insert(std::sync::Arc::as_ptr(p)) {
                continue;
            }
            if let Some(e) = p.entry {
                used.entries.push(e);
            }
            if let Some(f) = &p.family {
                used.families.push(f.clone());
            }
            if let Some(f) = &p.function {
                used.functions.push(f.clone());
            }
        }
        used.entries.sort_unstable();
        used.entries.dedup();
        used.families.sort();
        used.families.dedup();
        used.functions.sort();
        used.functions.dedup();
        used
    }

    /// The net named `want` (a leading `/` may be left off); else an error that suggests the
    /// closest names.
    pub fn find_net(&self, want: &str) -> Result<usize, Diag> {
        let bare = want.trim_start_matches('/');
        // an unnamed net is shown as `#CODE` (its code, or its place in the file): find it so
        if let Some(code) = want.strip_prefix('#') {
            let found = (0..self.nl.nets.len()).find(|&i| {
                let n = &self.nl.nets[i];
                n.name.as_str().is_empty()
                    && n.code
                        .as_ref()
                        .map_or((i + 1).to_string(), |c| c.as_str().to_string())
                        == code
            });
            if let Some(i) = found {
                return Ok(i);
            }
        }
        if let Some(i) = self.nl.net_by_name(want).or_else(|| {
            (0..self.nl.nets.len())
                .find(|&i| self.nl.nets[i].name.as_str().trim_start_matches('/') == bare)
        }) {
            return Ok(i);
        }
        let names = self.nl.nets.iter().map(|n| n.name.as_str());
        let close = crate::text::closest(want, names, 3);
        let mut d = Diag::error(
            "no-such-net",
            format!("no net `{want}` in {}", self.source.name()),
        );
        d = if close.is_empty() {
            d.with_help("give the net's name as the netlist writes it (`/CLK`, `Net-(U5-Pad4)`)")
        } else {
            d.with_help(format!(
                "did you mean {}?",
                close
                    .iter()
                    .map(|c| format!("`{c}`"))
                    .collect::<Vec<_>>()
                    .join(" or ")
            ))
        };
        Err(d)
    }
}

/// The circuit stage of an analysis: the model, every net's budget, and (on demand) the
/// findings.
pub struct Board<'n, 'a> {
    pub analysis: &'n Analysis<'a>,
    pub cx: Circuit<'n, 'a>,
    /// Every net's budget, by net index: computed once, read by the checks, `net` and the
    /// audit's charts.
    pub budgets: Budgets,
    findings: OnceCell<Findings>,
}

/// The findings of one file.
#[derive(Debug, Clone, Default)]
pub struct Findings {
    /// The model's diagnostics, then the checks' findings, in file order; waived ones left out.
    pub diags: DiagList,
    /// The findings waivers took out.
    pub waived: DiagList,
    /// For each waiver of the settings, whether it covered a finding here.
    pub waivers_used: Vec<bool>,
}

impl<'n, 'a> Board<'n, 'a> {
    /// The findings, computed once: every enabled check on the circuit and its budgets, then
    /// the waivers that have not expired.
    pub fn findings(&self) -> &Findings {
        self.findings.get_or_init(|| {
            let _phase = crate::phases::start("checks");
            let s = self.analysis.settings;
            let mut all = checks::run_all(&self.cx, &self.budgets, &s.run.checks);
            // the model's diagnostics go first; the findings stay where they are
            all.prepend(self.analysis.nl.diagnostics.iter().cloned());
            let mut out = Findings {
                waivers_used: vec![false; s.waivers.len()],
                ..Default::default()
            };
            if s.waivers.is_empty() {
                out.diags = all;
                return out;
            }
            let today = config::today();
            let Findings {
                waived,
                waivers_used,
                ..
            } = &mut out;
            all.retain(|d| {
                match s
                    .waivers
                    .iter()
                    .position(|w| !w.expired(today) && w.covers(d))
                {
                    Some(i) => {
                        waivers_used[i] = true;
                        waived.push_ref(d);
                        false
                    }
                    None => true,
                }
            });
            out.diags = all;
            out
        })
    }

    /// The findings, owned: computed if they were not yet, and the board given up.
    pub fn into_findings(mut self) -> Findings {
        self.take_findings()
    }

    /// The findings, moved out of the board (computed if they were not yet), so that the
    /// caller chooses what becomes of the circuit and its budgets: dropped, or left to the
    /// process's exit ([`crate::pipeline::Model::LeftToExit`]).
    pub fn take_findings(&mut self) -> Findings {
        self.findings();
        self.findings.take().unwrap_or_default()
    }

    /// The worst severity of the findings.
    pub fn worst(&self) -> Option<Severity> {
        self.findings().diags.iter().map(|d| d.severity()).max()
    }
}
