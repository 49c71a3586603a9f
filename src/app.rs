//! The `check` command: find the files, load each one's configuration, check them in
//! parallel, apply waivers, and hand every outcome to the reporter in a stable order.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use rayon::prelude::*;

use crate::cli::{CheckArgs, SettingsArgs};
use crate::config::{self, Config, ConfigError};
use crate::diag::{Diag, Severity};
use crate::pipeline::{self, FileOutcome, ReadOptions, RunOptions};

/// Expands folders into the `*.net` files below them (honouring `.gitignore`), keeping files
/// and `-` as given. Sorted within each folder, so the order is stable.
pub fn expand_paths(paths: &[String]) -> Vec<String> {
    let mut out = Vec::new();
    for p in paths {
        let path = Path::new(p);
        if p != "-" && path.is_dir() {
            let mut found: Vec<String> = ignore::WalkBuilder::new(path)
                .require_git(false)
                .hidden(true)
                .build()
                .flatten()
                .filter(|e| {
                    e.file_type().is_some_and(|t| t.is_file())
                        && e.path().extension().is_some_and(|x| x == "net")
                })
                .map(|e| e.path().display().to_string())
                .collect();
            found.sort();
            out.extend(found);
        } else {
            out.push(p.clone());
        }
    }
    out
}

/// A configuration, loaded once, with its rules and what its waivers matched.
struct Loaded {
    config: Config,
    rules: crate::classify::classifier::Rules,
}

/// What a run produced.
#[derive(Debug)]
pub struct Run {
    /// The netlists' outcomes in order, then those of configuration (and baseline) files
    /// that have something to say.
    pub outcomes: Vec<FileOutcome>,
    /// How many of `outcomes` (from the start) are netlists.
    pub netlists: usize,
    /// A configuration or the baseline could not be used.
    pub config_failed: bool,
}

/// Runs `check`: the outcomes in order (netlists, then configuration and baseline files
/// that have something to say) and whether a configuration or the baseline could not be
/// used. With `--baseline`, the baseline's findings are taken out after the waivers.
pub fn check(args: &CheckArgs, read: &ReadOptions) -> (Vec<FileOutcome>, bool) {
    let cwd = std::env::current_dir().unwrap_or_else(|_| PathBuf::from("."));
    let baseline = match &args.baseline {
        None => None,
        Some(p) => match crate::baseline::load(p, &cwd) {
            Ok(b) => Some(b),
            Err(e) => return (vec![error_outcome(e)], true),
        },
    };
    let mut run = check_paths(&args.paths, &args.settings, read);
    if let Some(b) = baseline {
        let (_, stale) = b.apply(&mut run.outcomes[..run.netlists], &cwd, args.verbose);
        run.outcomes.extend(stale);
    }
    (run.outcomes, run.config_failed)
}

/// The outcome that shows a configuration's (or a baseline's) errors.
fn error_outcome(e: ConfigError) -> FileOutcome {
    FileOutcome {
        name: e.source.name().to_string(),
        source: Some(e.source.clone()),
        fatal: e.diags.first().cloned(),
        diags: e.diags.iter().skip(1).cloned().collect(),
        summary: Default::default(),
        coverage: None,
        waived: 0,
    }
}

/// Which configuration file a netlist named `f` uses under these settings.
pub fn config_for(f: &str, args: &SettingsArgs) -> Option<PathBuf> {
    if args.no_config {
        return None;
    }
    if let Some(c) = &args.config {
        return Some(c.clone());
    }
    if f == "-" {
        return config::discover(&std::env::current_dir().ok()?);
    }
    config::discover(Path::new(f))
}

/// The options a netlist is checked with: the defaults, then the configuration, then the
/// command line.
pub fn run_options(cfg: Option<&Config>, args: &SettingsArgs, read: &ReadOptions) -> RunOptions {
    let mut run = RunOptions {
        read: read.clone(),
        ..Default::default()
    };
    if let Some(c) = cfg {
        c.apply(&mut run);
    }
    // the command line wins over the configuration
    if !args.only.is_empty() {
        run.checks.disabled = crate::checks::REGISTRY
            .iter()
            .map(|c| c.id.to_string())
            .filter(|id| !args.only.contains(id))
            .collect();
    }
    run.checks.disabled.extend(args.disable.iter().cloned());
    // the model takes the first declaration of a rail: the command line's go first
    let from_config = std::mem::take(&mut run.model.rails);
    run.model.rails = args.rail.iter().cloned().chain(from_config).collect();
    run
}

/// Checks the netlists named by `paths` (folders expanded) with their configurations and
/// waivers.
pub fn check_paths(paths: &[String], args: &SettingsArgs, read: &ReadOptions) -> Run {
    let files = expand_paths(paths);
    // which configuration each file uses
    let per_file: Vec<Option<PathBuf>> = files.iter().map(|f| config_for(f, args)).collect();
    let mut loaded: BTreeMap<PathBuf, Result<Loaded, ConfigError>> = BTreeMap::new();
    for p in per_file.iter().flatten() {
        if !loaded.contains_key(p) {
            let l = config::load(p).and_then(|config| {
                let rules = config.rules()?;
                Ok(Loaded { config, rules })
            });
            loaded.insert(p.clone(), l);
        }
    }
    let builtin = crate::classify::classifier::Rules::builtin();
    let base = |cfg: Option<&Config>| run_options(cfg, args, read);
    let results: Vec<(FileOutcome, pipeline::UsedRules)> = files
        .par_iter()
        .zip(per_file.par_iter())
        .map(
            |(f, cp)| match cp.as_ref().map(|p| loaded.get(p).expect("loaded above")) {
                Some(Err(_)) => (
                    FileOutcome {
                        name: if f == "-" {
                            "<stdin>".into()
                        } else {
                            f.clone()
                        },
                        source: None,
                        fatal: Some(Diag::error(
                            "config",
                            format!(
                                "not checked: its configuration `{}` has errors (shown below)",
                                cp.as_ref().expect("some").display()
                            ),
                        )),
                        diags: Vec::new(),
                        summary: Default::default(),
                        coverage: None,
                        waived: 0,
                    },
                    Default::default(),
                ),
                Some(Ok(l)) => pipeline::check_file_with_usage(f, &l.rules, &base(Some(&l.config))),
                None => pipeline::check_file_with_usage(f, &builtin, &base(None)),
            },
        )
        .collect();
    let (mut outcomes, usage): (Vec<FileOutcome>, Vec<pipeline::UsedRules>) =
        results.into_iter().unzip();

    // waivers
    let today = config::today();
    let mut config_outcomes = Vec::new();
    let mut config_failed = false;
    for (path, l) in &loaded {
        let l = match l {
            Ok(l) => l,
            Err(e) => {
                config_failed = true;
                config_outcomes.push(error_outcome(ConfigError {
                    source: e.source.clone(),
                    diags: e.diags.clone(),
                }));
                continue;
            }
        };
        let mut used = vec![false; l.config.waivers.len()];
        for (o, cp) in outcomes.iter_mut().zip(&per_file) {
            if cp.as_ref() != Some(path) {
                continue;
            }
            let before = o.diags.len();
            o.diags.retain(|d| {
                for (i, w) in l.config.waivers.iter().enumerate() {
                    if !w.expired(today) && w.covers(d) {
                        used[i] = true;
                        return false;
                    }
                }
                true
            });
            o.waived += before - o.diags.len();
        }
        let mut diags = Vec::new();
        // project mapping entries that matched nothing in this run
        let mine: Vec<&pipeline::UsedRules> = usage
            .iter()
            .zip(&per_file)
            .filter(|(_, cp)| cp.as_ref() == Some(path))
            .map(|(u, _)| u)
            .collect();
        for (i, e) in l.rules.parts.entries.iter().enumerate() {
            if e.shipped || mine.iter().any(|u| u.entries.contains(&i)) {
                continue;
            }
            let (file, line) = e.origin.clone().unwrap_or_default();
            diags.push(
                Diag::warning(
                    "unused-rule",
                    format!(
                        "the part entry at {file}:{line} ({}) matched no component in this run",
                        e.values.join(", ")
                    ),
                )
                .with_help("remove it, or correct its value globs"),
            );
        }
        for (id, file, line) in &l.rules.project_families {
            if !mine.iter().any(|u| u.families.iter().any(|f| f == id)) {
                diags.push(Diag::info(
                    "unused-rule",
                    format!("the family `{id}` at {file}:{line} was used by no part in this run"),
                ));
            }
        }
        for (series, id, file, line) in &l.rules.project_functions {
            if !mine.iter().any(|u| {
                u.functions
                    .iter()
                    .any(|(s, f)| s == series && f.eq_ignore_ascii_case(id))
            }) {
                diags.push(Diag::info("unused-rule", format!("the function `{id}` ({} series) at {file}:{line} was used by no part in this run", series.as_str())));
            }
        }
        for (i, w) in l.config.waivers.iter().enumerate() {
            if w.expired(today) {
                let (y, m, d) = w.expires.expect("expired has a date");
                diags.push(
                    Diag::warning("stale-waiver", format!("this waiver for `{}` expired on {y:04}-{m:02}-{d:02}; its findings are reported again", w.check))
                        .at(w.span, "expired")
                        .with_help("fix the findings, or renew the waiver with a new `expires` date and reason"),
                );
            } else if !used[i] {
                diags.push(
                    Diag::warning(
                        "stale-waiver",
                        format!(
                            "this waiver for `{}` matched no finding in this run",
                            w.check
                        ),
                    )
                    .at(w.span, "matched nothing")
                    .with_help("remove it, or correct its refs, pins or nets"),
                );
            }
        }
        if !diags.is_empty() {
            config_outcomes.push(FileOutcome {
                name: path.display().to_string(),
                source: l.config.source.clone(),
                fatal: None,
                diags,
                summary: Default::default(),
                coverage: None,
                waived: 0,
            });
        }
    }
    let netlists = outcomes.len();
    outcomes.extend(config_outcomes);
    Run {
        outcomes,
        netlists,
        config_failed,
    }
}

/// The exit code: 2 when a file or a configuration could not be used, 1 when a finding is
/// at or above the threshold, else 0.
pub fn exit_code(outcomes: &[FileOutcome], config_failed: bool, fail_on: Severity) -> u8 {
    if config_failed || outcomes.iter().any(|o| o.fatal.is_some()) {
        2
    } else if outcomes
        .iter()
        .any(|o| o.diags.iter().any(|d| d.severity >= fail_on))
    {
        1
    } else {
        0
    }
}

/// What `init` reads from the netlists: their rails, connectors and a finding to shape the
/// example waiver on. A file that cannot be read comes back as its outcome.
pub fn init_facts(
    files: &[String],
    read: &ReadOptions,
) -> Result<crate::report::starter::Facts, Box<FileOutcome>> {
    use crate::report::starter::{ConnectorSeen, Facts, FindingSeen, RailSeen};
    let rules = crate::classify::classifier::Rules::builtin();
    let example_family = ["74LS", "74HC"]
        .into_iter()
        .find(|f| rules.families.get(f).is_some())
        .map(str::to_string)
        .or_else(|| rules.families.iter().next().map(|f| f.id.clone()))
        .unwrap_or_default();
    let (y, m, d) = config::today();
    let mut facts = Facts {
        netlists: files.to_vec(),
        example_family,
        derating: crate::checks::CheckOptions::default().derating,
        expires: (y + 1, m, d.min(28)),
        ..Default::default()
    };
    for f in files {
        let outcome = pipeline::check_file(
            f,
            &rules,
            &RunOptions {
                read: read.clone(),
                ..Default::default()
            },
        );
        if outcome.fatal.is_some() {
            return Err(Box::new(outcome));
        }
        let source = outcome.source.as_ref().expect("read when not fatal");
        // check_file parsed and built it without a fatal error
        let tree = crate::sexpr::parse(source.text()).expect("parsed once already");
        let nl = crate::netlist::build(&tree).expect("built once already");
        let cl = crate::classify::classifier::classify(&nl, &rules);
        let cx = crate::circuit::build(&nl, &cl, &rules, Default::default());
        for (i, net) in cx.nets.iter().enumerate() {
            let Some(rail) = net.rail else { continue };
            let name = nl.nets[i].name.as_str().to_string();
            if facts.rails.iter().any(|r| r.name == name) {
                continue;
            }
            // an inferred voltage is for the user to confirm: the starter asks for it
            let inferred = cx.rail_notes.iter().any(|n| n.net == i && n.why.is_some());
            facts.rails.push(RailSeen {
                name,
                volts: if inferred { None } else { rail.v() },
                ground: rail.ground,
                pins: nl.nets[i].nodes.len(),
            });
        }
        for (ci, c) in nl.components.iter().enumerate() {
            if cl.parts[ci].kind != crate::classify::classifier::PartKind::Connector {
                continue;
            }
            let reference = c.reference.as_str().to_string();
            if facts.connectors.iter().any(|x| x.reference == reference) {
                continue;
            }
            let pins = c
                .pins
                .iter()
                .filter(|p| p.connection.net().is_some())
                .count();
            facts.connectors.push(ConnectorSeen {
                reference,
                value: c.value_str().to_string(),
                pins,
            });
        }
        if facts.finding.is_none() {
            let is_check = |d: &&Diag| crate::checks::info(&d.code).is_some() && !d.pins.is_empty();
            facts.finding = outcome.diags.iter().find(is_check).map(|d| FindingSeen {
                check: d.code.clone(),
                pins: d.pins.clone(),
            });
        }
    }
    Ok(facts)
}
