//! `netmargin check`: find the files, resolve each configuration once, analyse the files in
//! parallel (each through [`crate::analysis`]), report stale waivers and unused mapping
//! entries, and hand every outcome to the reporter in a stable order.

use std::collections::BTreeMap;
use std::io::Write;
use std::path::{Path, PathBuf};

use rayon::prelude::*;

use crate::analysis::{config_for, Overrides, Settings};
use crate::cli::{CheckArgs, SettingsArgs};
use crate::config::{self, ConfigError};
use crate::diag::{Diag, Severity};
use crate::pipeline::{self, FileOutcome, ReadOptions};

/// Expands folders into the `*.net` files and KiCad schematics (`*.kicad_sch`) below them
/// (honouring `.gitignore`), keeping files and `-` as given. Sorted within each folder, so
/// the order is stable. A schematic sheet stands for its project: it is replaced by the
/// project's root sheet, and each root is checked once.
pub fn expand_paths(paths: &[String]) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for p in expand_files(paths) {
        let path = Path::new(&p);
        let p = if path.extension().is_some_and(|x| x == "kicad_sch") && path.is_file() {
            crate::schematic::load::project_root(path)
                .display()
                .to_string()
        } else {
            p
        };
        if p == "-" || !out.contains(&p) {
            out.push(p);
        }
    }
    out
}

fn expand_files(paths: &[String]) -> Vec<String> {
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
                        && e.path()
                            .extension()
                            .is_some_and(|x| x == "net" || x == "kicad_sch")
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
pub fn check(args: &CheckArgs, read: &ReadOptions) -> Run {
    let cwd = std::env::current_dir().unwrap_or_else(|_| PathBuf::from("."));
    let baseline = match &args.baseline {
        None => None,
        Some(p) => match crate::baseline::load(p, &cwd) {
            Ok(b) => Some(b),
            Err(e) => {
                return Run {
                    outcomes: vec![error_outcome(e)],
                    netlists: 0,
                    config_failed: true,
                }
            }
        },
    };
    let mut run = check_paths(&args.paths, &args.settings, read);
    if let Some(b) = baseline {
        let (_, stale) = b.apply(&mut run.outcomes[..run.netlists], &cwd, args.verbose);
        run.outcomes.extend(stale);
    }
    run
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

/// Checks the netlists named by `paths` (folders expanded) with their configurations and
/// waivers.
pub fn check_paths(paths: &[String], args: &SettingsArgs, read: &ReadOptions) -> Run {
    check_files(&expand_paths(paths), &Overrides::from(args), read)
}

/// Checks `files` with their configurations (each resolved once) and waivers. For the
/// commands only (`check`, `baseline`): with one file, its model is not freed (see
/// [`pipeline::Model::LeftToExit`]).
pub fn check_files(files: &[String], over: &Overrides, read: &ReadOptions) -> Run {
    // which configuration each file uses
    let per_file: Vec<Option<PathBuf>> = files.iter().map(|f| config_for(f, over)).collect();
    let mut loaded: BTreeMap<PathBuf, Result<Settings, Vec<ConfigError>>> = BTreeMap::new();
    for p in per_file.iter().flatten() {
        if !loaded.contains_key(p) {
            loaded.insert(p.clone(), Settings::load(Some(p), over, read));
        }
    }
    // one file's model is left to the process's exit: the commands that call this only
    // report and exit after it; with more files, each model is freed before the next
    let model = if files.len() == 1 {
        pipeline::Model::LeftToExit
    } else {
        pipeline::Model::Free
    };
    // the shipped settings, made only when a file has no configuration of its own
    let builtin = std::sync::OnceLock::new();
    let one = |(f, cp): (&String, &Option<PathBuf>)| -> (FileOutcome, pipeline::Usage) {
        match cp.as_ref().map(|p| loaded.get(p).expect("loaded above")) {
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
                    diags: Default::default(),
                    summary: Default::default(),
                    coverage: None,
                    waived: 0,
                },
                Default::default(),
            ),
            Some(Ok(s)) => pipeline::check_file_leaving(f, s, model),
            None => pipeline::check_file_leaving(
                f,
                builtin.get_or_init(|| Settings::builtin(over, read)),
                model,
            ),
        }
    };
    // one file needs no thread pool (starting one is a noticeable part of a hook's run)
    let results: Vec<(FileOutcome, pipeline::Usage)> = if files.len() == 1 {
        files.iter().zip(per_file.iter()).map(one).collect()
    } else {
        files.par_iter().zip(per_file.par_iter()).map(one).collect()
    };
    let (outcomes, usage): (Vec<FileOutcome>, Vec<pipeline::Usage>) = results.into_iter().unzip();

    // stale waivers and unused mapping entries, per configuration
    let today = config::today();
    let mut config_outcomes = Vec::new();
    let mut config_failed = false;
    for (path, l) in &loaded {
        let l = match l {
            Ok(l) => l,
            Err(errors) => {
                config_failed = true;
                for e in errors {
                    config_outcomes.push(error_outcome(ConfigError {
                        source: e.source.clone(),
                        diags: e.diags.clone(),
                    }));
                }
                continue;
            }
        };
        let mine: Vec<&pipeline::Usage> = usage
            .iter()
            .zip(&per_file)
            .filter(|(_, cp)| cp.as_ref() == Some(path))
            .map(|(u, _)| u)
            .collect();
        let used: Vec<bool> = (0..l.waivers.len())
            .map(|i| {
                mine.iter()
                    .any(|u| u.waivers.get(i).copied().unwrap_or(false))
            })
            .collect();
        let mut diags = Vec::new();
        // project mapping entries that matched nothing in this run
        for (i, e) in l.rules.parts.entries.iter().enumerate() {
            if e.shipped || mine.iter().any(|u| u.rules.entries.contains(&i)) {
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
            if !mine
                .iter()
                .any(|u| u.rules.families.iter().any(|f| f == id))
            {
                diags.push(Diag::info(
                    "unused-rule",
                    format!("the family `{id}` at {file}:{line} was used by no part in this run"),
                ));
            }
        }
        for (series, id, file, line) in &l.rules.project_functions {
            if !mine.iter().any(|u| {
                u.rules
                    .functions
                    .iter()
                    .any(|(s, f)| s == series && f.eq_ignore_ascii_case(id))
            }) {
                diags.push(Diag::info("unused-rule", format!("the function `{id}` ({} series) at {file}:{line} was used by no part in this run", series.as_str())));
            }
        }
        for (i, w) in l.waivers.iter().enumerate() {
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
                source: l.config.as_ref().and_then(|c| c.source.clone()),
                fatal: None,
                diags: diags.into(),
                summary: Default::default(),
                coverage: None,
                waived: 0,
            });
        }
    }
    let netlists = outcomes.len();
    let mut outcomes = outcomes;
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
        .any(|o| o.diags.iter().any(|d| d.severity() >= fail_on))
    {
        1
    } else {
        0
    }
}

/// Runs `netmargin check` and prints the report; returns the exit code.
pub fn command(
    args: &CheckArgs,
    read: &ReadOptions,
    color: crate::cli::ColorChoice,
) -> std::io::Result<u8> {
    if !super::known_checks(&args.settings) {
        return Ok(2);
    }
    if !args.paths.iter().any(|p| p == "-") && expand_paths(&args.paths).is_empty() {
        // a folder with no netlists (or all ignored) checks nothing: say so, never silently
        eprintln!(
            "netmargin: no `.net` files in {} (folders are searched for `*.net`, honouring .gitignore); nothing checked",
            args.paths.iter().map(|p| crate::text::sanitize(p).into_owned()).collect::<Vec<_>>().join(", ")
        );
        return Ok(if args.require_files { 2 } else { 0 });
    }
    let phase = crate::phases::start("analysis");
    let run = check(args, read);
    drop(phase);
    let code = exit_code(&run.outcomes, run.config_failed, args.fail_on.severity());
    let stdout = std::io::stdout();
    let color = super::color_on(color, std::io::IsTerminal::is_terminal(&stdout));
    let mut ropts = args.report.options(color, 100)?;
    ropts.netlists = Some(run.netlists);
    let phase = crate::phases::start("report");
    let mut out = std::io::BufWriter::with_capacity(1 << 16, stdout.lock());
    let written =
        crate::report::write_report(&ropts, &run.outcomes, &mut out).and_then(|()| out.flush());
    drop(phase);
    // the process ends when this returns: its memory goes back to the system at once, so the
    // findings (hundreds of thousands on a big board) are not freed one by one first
    std::mem::forget(run);
    match written {
        // the reader stopped reading (`| head`): the run is complete, its code stands
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(code),
        Err(e) => Err(e),
        Ok(()) => Ok(code),
    }
}
