//! The `check` command: find the files, load each one's configuration, check them in
//! parallel, apply waivers, and hand every outcome to the reporter in a stable order.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use rayon::prelude::*;

use crate::cli::CheckArgs;
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
                .filter(|e| e.file_type().is_some_and(|t| t.is_file()) && e.path().extension().is_some_and(|x| x == "net"))
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

/// Runs `check`: the outcomes in order (netlists, then configuration files that have
/// something to say) and whether a configuration could not be used.
pub fn check(args: &CheckArgs, read: &ReadOptions) -> (Vec<FileOutcome>, bool) {
    let files = expand_paths(&args.paths);
    // which configuration each file uses
    let cfg_path = |f: &str| -> Option<PathBuf> {
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
    };
    let per_file: Vec<Option<PathBuf>> = files.iter().map(|f| cfg_path(f)).collect();
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
    let base = |cfg: Option<&Config>| {
        let mut run = RunOptions { read: read.clone(), ..Default::default() };
        if let Some(c) = cfg {
            c.apply(&mut run);
        }
        // the command line wins over the configuration
        if !args.only.is_empty() {
            run.checks.disabled = crate::checks::REGISTRY.iter().map(|c| c.id.to_string()).filter(|id| !args.only.contains(id)).collect();
        }
        run.checks.disabled.extend(args.disable.iter().cloned());
        run.model.rails.extend(args.rail.iter().cloned());
        run
    };
    let results: Vec<(FileOutcome, pipeline::UsedRules)> = files
        .par_iter()
        .zip(per_file.par_iter())
        .map(|(f, cp)| match cp.as_ref().map(|p| loaded.get(p).expect("loaded above")) {
            Some(Err(_)) => (FileOutcome {
                name: if f == "-" { "<stdin>".into() } else { f.clone() },
                source: None,
                fatal: Some(Diag::error("config", format!("not checked: its configuration `{}` has errors (shown below)", cp.as_ref().expect("some").display()))),
                diags: Vec::new(),
                summary: Default::default(),
                coverage: None,
                waived: 0,
            }, Default::default()),
            Some(Ok(l)) => pipeline::check_file_with_usage(f, &l.rules, &base(Some(&l.config))),
            None => pipeline::check_file_with_usage(f, &builtin, &base(None)),
        })
        .collect();
    let (mut outcomes, usage): (Vec<FileOutcome>, Vec<pipeline::UsedRules>) = results.into_iter().unzip();

    // waivers
    let today = config::today();
    let mut config_outcomes = Vec::new();
    let mut config_failed = false;
    for (path, l) in &loaded {
        let l = match l {
            Ok(l) => l,
            Err(e) => {
                config_failed = true;
                config_outcomes.push(FileOutcome {
                    name: e.source.name().to_string(),
                    source: Some(e.source.clone()),
                    fatal: e.diags.first().cloned(),
                    diags: e.diags.iter().skip(1).cloned().collect(),
                    summary: Default::default(),
                    coverage: None,
                waived: 0,
                });
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
        let mine: Vec<&pipeline::UsedRules> = usage.iter().zip(&per_file).filter(|(_, cp)| cp.as_ref() == Some(path)).map(|(u, _)| u).collect();
        for (i, e) in l.rules.parts.entries.iter().enumerate() {
            if e.shipped || mine.iter().any(|u| u.entries.contains(&i)) {
                continue;
            }
            let (file, line) = e.origin.clone().unwrap_or_default();
            diags.push(Diag::warning("unused-rule", format!("the part entry at {file}:{line} ({}) matched no component in this run", e.values.join(", "))).with_help("remove it, or correct its value globs"));
        }
        for (id, file, line) in &l.rules.project_families {
            if !mine.iter().any(|u| u.families.iter().any(|f| f == id)) {
                diags.push(Diag::info("unused-rule", format!("the family `{id}` at {file}:{line} was used by no part in this run")));
            }
        }
        for (series, id, file, line) in &l.rules.project_functions {
            if !mine.iter().any(|u| u.functions.iter().any(|(s, f)| s == series && f.eq_ignore_ascii_case(id))) {
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
                    Diag::warning("stale-waiver", format!("this waiver for `{}` matched no finding in this run", w.check))
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
    outcomes.extend(config_outcomes);
    (outcomes, config_failed)
}

/// The exit code: 2 when a file or a configuration could not be used, 1 when a finding is
/// at or above the threshold, else 0.
pub fn exit_code(outcomes: &[FileOutcome], config_failed: bool, fail_on: Severity) -> u8 {
    if config_failed || outcomes.iter().any(|o| o.fatal.is_some()) {
        2
    } else if outcomes.iter().any(|o| o.diags.iter().any(|d| d.severity >= fail_on)) {
        1
    } else {
        0
    }
}
