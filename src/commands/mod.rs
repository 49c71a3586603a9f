//! The commands, one per file. Each reads what it shows from [`crate::analysis`]: settings
//! resolved once, then the stages it needs. Parsing the command line stays in
//! [`crate::cli`]; nothing here assembles the pipeline by hand.

pub mod audit;
pub mod baseline;
pub mod check;
pub mod compare;
pub mod config;
pub mod explain;
pub mod families;
pub mod init;
pub mod net;
pub mod nets;
pub mod parts;
pub mod shell;

use std::io::IsTerminal;

use crate::analysis::{Analysis, Overrides, Settings};
use crate::cli::{Cli, ColorChoice, Command, SettingsArgs};
use crate::config::ConfigError;
use crate::input::ReadOptions;
use crate::pipeline::{self, FileOutcome};
use crate::report::human::{self, HumanStyle};
use crate::source::SourceFile;

/// Runs a parsed command line; returns the exit code.
pub fn run(cli: Cli) -> std::io::Result<u8> {
    let read = ReadOptions {
        max_bytes: cli.global.max_bytes,
    };
    let color = cli.global.color;
    match cli.command {
        Command::Check(args) => check::command(&args, &read, color),
        Command::Baseline(args) => baseline::command(&args, &read, color),
        Command::Config(args) => config::command(&args, &read, color),
        Command::Init(args) => init::command(&args, &read, color),
        Command::Completions(args) => shell::completions(args.shell),
        Command::Man => shell::man(),
        Command::Parts(args) => parts::command(&args, &read, color),
        Command::Explain(args) => explain::command(&args),
        Command::Net(args) => net::command(&args, &read, color),
        Command::Audit(args) => audit::command(&args, &read, color),
        Command::Families(args) => families::command(&args),
        Command::Nets(args) => nets::command(&args, &read, color),
        Command::Compare(args) => compare::command(&args, &read, color),
    }
}

/// Whether to colour a stream.
pub fn color_on(choice: ColorChoice, stream_is_tty: bool) -> bool {
    match choice {
        ColorChoice::Always => true,
        ColorChoice::Never => false,
        ColorChoice::Auto => {
            stream_is_tty && std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty())
        }
    }
}

/// Shows outcomes on standard error in the human format (findings and summary lines).
pub fn to_stderr(outcomes: &[FileOutcome], color: ColorChoice) -> std::io::Result<()> {
    let stderr = std::io::stderr();
    let eh = human::handler(HumanStyle {
        color: color_on(color, stderr.is_terminal()),
        width: 100,
    });
    let mut err = stderr.lock();
    for o in outcomes {
        human::write_file(&mut err, &eh, o)?;
    }
    Ok(())
}

/// The outcome that shows a configuration's (or a baseline's) errors.
pub fn error_outcome(e: &ConfigError) -> FileOutcome {
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

/// The "did you mean" hint for an unknown check id, or nothing.
pub fn check_hint(id: &str) -> String {
    let close = crate::text::closest(id, crate::checks::REGISTRY.iter().map(|c| c.id), 2);
    if close.is_empty() {
        String::new()
    } else {
        format!(
            "; did you mean {}?",
            close
                .iter()
                .map(|c| format!("`{c}`"))
                .collect::<Vec<_>>()
                .join(" or ")
        )
    }
}

/// False (after saying so) when `--only` or `--disable` names a check that does not exist.
pub fn known_checks(s: &SettingsArgs) -> bool {
    let mut ok = true;
    for id in s.only.iter().chain(&s.disable) {
        if crate::checks::info(id).is_none() {
            eprintln!(
                "netmargin: unknown check `{}`{}; `netmargin explain` lists them",
                crate::text::sanitize(id),
                check_hint(id)
            );
            ok = false;
        }
    }
    ok
}

/// One netlist with its settings resolved: what `net`, `parts` and `audit` start from. `Err`
/// is the exit code after the problem was shown.
pub fn open_one(
    path: &str,
    settings: &SettingsArgs,
    read: &ReadOptions,
    color: ColorChoice,
) -> std::io::Result<Result<(Settings, SourceFile), u8>> {
    if !known_checks(settings) {
        return Ok(Err(2));
    }
    let s = match Settings::resolve(path, &Overrides::from(settings), read) {
        Ok(s) => s,
        Err(errors) => {
            let shown: Vec<FileOutcome> = errors.iter().map(error_outcome).collect();
            to_stderr(&shown, color)?;
            return Ok(Err(2));
        }
    };
    match pipeline::open_source(path, read) {
        Ok(src) => Ok(Ok((s, src))),
        Err(f) => {
            to_stderr(&[*f], color)?;
            Ok(Err(2))
        }
    }
}

/// Analyses `source` with `settings`, or shows why it cannot be (exit code 2).
pub fn analyse<'a>(
    source: &'a SourceFile,
    settings: &'a Settings,
    color: ColorChoice,
) -> std::io::Result<Result<Analysis<'a>, u8>> {
    match Analysis::new(source, settings) {
        Ok(a) => Ok(Ok(a)),
        Err(d) => {
            to_stderr(&[pipeline::fatal_outcome(source, d)], color)?;
            Ok(Err(2))
        }
    }
}
