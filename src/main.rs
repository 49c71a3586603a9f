use std::io::{IsTerminal, Write};
use std::process::ExitCode;

use clap::{CommandFactory, Parser};

use netmargin::cli::{BaselineArgs, Cli, ColorChoice, Command, ConfigArgs, InitArgs, SettingsArgs};
use netmargin::pipeline::FileOutcome;
use netmargin::pipeline::{self, ReadOptions};
use netmargin::report::human::{self, HumanStyle};

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    match run(cli) {
        Ok(code) => ExitCode::from(code),
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("netmargin: {e}");
            ExitCode::from(2)
        }
    }
}

fn color_on(choice: ColorChoice, stream_is_tty: bool) -> bool {
    match choice {
        ColorChoice::Always => true,
        ColorChoice::Never => false,
        ColorChoice::Auto => {
            stream_is_tty && std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty())
        }
    }
}

/// Shows a file's fatal error on standard error, as `check` shows it; the exit code is 2.
fn show_fatal(f: &pipeline::FileOutcome, color: ColorChoice) -> std::io::Result<u8> {
    let stderr = std::io::stderr();
    let eh = human::handler(HumanStyle {
        color: color_on(color, stderr.is_terminal()),
        width: 100,
    });
    human::write_file(&mut stderr.lock(), &eh, f)?;
    Ok(2)
}

fn run(cli: Cli) -> std::io::Result<u8> {
    let opts = ReadOptions {
        max_bytes: cli.global.max_bytes,
    };
    match cli.command {
        Command::Check(args) => {
            if !known_checks(&args.settings) {
                return Ok(2);
            }
            let (outcomes, config_failed) = netmargin::app::check(&args, &opts);
            let code = netmargin::app::exit_code(&outcomes, config_failed, args.fail_on.severity());
            let stdout = std::io::stdout();
            let color = color_on(cli.global.color, stdout.is_terminal());
            let ropts = args.report.options(color, 100)?;
            let mut out = stdout.lock();
            let written = netmargin::report::write_report(&ropts, &outcomes, &mut out)
                .and_then(|()| out.flush());
            match written {
                // the reader stopped reading (`| head`): the run is complete, its code stands
                Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(code),
                Err(e) => Err(e),
                Ok(()) => Ok(code),
            }
        }
        Command::Baseline(args) => {
            if !known_checks(&args.settings) {
                return Ok(2);
            }
            baseline(&args, &opts, cli.global.color)
        }
        Command::Config(args) => show_config(&args, cli.global.color),
        Command::Init(args) => init(&args, &opts, cli.global.color),
        Command::Completions(args) => {
            // generated into memory first: the generators do not pass write errors on
            let mut buf = Vec::new();
            clap_complete::generate(args.shell, &mut Cli::command(), "netmargin", &mut buf);
            let mut out = std::io::stdout().lock();
            out.write_all(&buf)?;
            out.flush()?;
            Ok(0)
        }
        Command::Man => {
            let mut buf = Vec::new();
            clap_mangen::Man::new(Cli::command()).render(&mut buf)?;
            let mut out = std::io::stdout().lock();
            out.write_all(&buf)?;
            out.flush()?;
            Ok(0)
        }
        Command::Parts(args) => {
            let rules = netmargin::classify::classifier::Rules::builtin();
            let mut out = std::io::stdout().lock();
            let fail = |f: &pipeline::FileOutcome| -> std::io::Result<u8> {
                let stderr = std::io::stderr();
                let eh = human::handler(HumanStyle {
                    color: color_on(cli.global.color, stderr.is_terminal()),
                    width: 100,
                });
                human::write_file(&mut stderr.lock(), &eh, f)?;
                Ok(2)
            };
            // a netlist or a schematic's root sheet
            let cap = match netmargin::capture::Capture::open(&args.path, &opts) {
                Ok(c) => c,
                Err(f) => return fail(&f),
            };
            let source = cap.source();
            let nl = match cap.model() {
                Ok(nl) => nl,
                Err(f) => return fail(&f),
            };
            let cl = netmargin::classify::classifier::classify(&nl, &rules);
            netmargin::report::parts::write_parts(
                &mut out,
                source.name(),
                &nl,
                &cl,
                args.format == netmargin::cli::ListFormat::Json,
            )?;
            out.flush()?;
            Ok(0)
        }
        Command::Explain(args) => {
            let mut out = std::io::stdout().lock();
            match args.check {
                None => netmargin::report::explain::write_list(&mut out)?,
                Some(id) => {
                    if !netmargin::report::explain::write_one(&mut out, &id)? {
                        eprintln!("netmargin: no check `{id}`; `netmargin explain` lists them");
                        return Ok(2);
                    }
                }
            }
            Ok(0)
        }
        Command::Net(args) => {
            let fail = |f: &pipeline::FileOutcome| -> std::io::Result<u8> {
                let stderr = std::io::stderr();
                let eh = human::handler(HumanStyle {
                    color: color_on(cli.global.color, stderr.is_terminal()),
                    width: 100,
                });
                human::write_file(&mut stderr.lock(), &eh, f)?;
                Ok(2)
            };
            // a netlist or a schematic's root sheet
            let cap = match netmargin::capture::Capture::open(&args.path, &opts) {
                Ok(c) => c,
                Err(f) => return fail(&f),
            };
            let source = cap.source();
            let nl = match cap.model() {
                Ok(nl) => nl,
                Err(f) => return fail(&f),
            };
            let rules = netmargin::classify::classifier::Rules::builtin();
            let cl = netmargin::classify::classifier::classify(&nl, &rules);
            let model = netmargin::circuit::ModelOptions {
                rails: args.rail.clone(),
                ..Default::default()
            };
            let cx = netmargin::circuit::build(&nl, &cl, &rules, model);
            let want = args.net.trim_start_matches('/');
            let Some(net) = (0..nl.nets.len()).find(|&i| {
                nl.nets[i].name.as_str() == args.net
                    || nl.nets[i].name.as_str().trim_start_matches('/') == want
            }) else {
                eprintln!("netmargin: no net `{}` in {}", args.net, source.name());
                return Ok(2);
            };
            let mut out = std::io::stdout().lock();
            netmargin::report::net::write_net(&mut out, &cx, net)?;
            Ok(0)
        }
        Command::Nets(args) => {
            let fail = |f: &pipeline::FileOutcome| show_fatal(f, cli.global.color);
            let cap = match netmargin::capture::Capture::open(&args.path, &opts) {
                Ok(c) => c,
                Err(f) => return fail(&f),
            };
            let nl = match cap.model() {
                Ok(nl) => nl,
                Err(f) => return fail(&f),
            };
            let mut out = std::io::stdout().lock();
            let json = args.format == netmargin::cli::ListFormat::Json;
            match netmargin::capture::write_nets(&mut out, &nl, json).and_then(|()| out.flush()) {
                Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => Err(e),
                _ => Ok(0),
            }
        }
        Command::Compare(args) => {
            let fail = |f: &pipeline::FileOutcome| show_fatal(f, cli.global.color);
            let open = |p: &str| netmargin::capture::Capture::open(p, &opts);
            let (ca, cb) = match (open(&args.a), open(&args.b)) {
                (Ok(a), Ok(b)) => (a, b),
                (a, b) => {
                    for f in [a.err(), b.err()].into_iter().flatten() {
                        fail(&f)?;
                    }
                    return Ok(2);
                }
            };
            let (na, nb) = match (ca.model(), cb.model()) {
                (Ok(a), Ok(b)) => (a, b),
                (a, b) => {
                    for f in [a.err(), b.err()].into_iter().flatten() {
                        fail(&f)?;
                    }
                    return Ok(2);
                }
            };
            let d = netmargin::capture::compare(&na, &nb);
            let mut out = std::io::stdout().lock();
            netmargin::capture::write_differences(&mut out, &d, &args.a, &args.b)?;
            out.flush()?;
            Ok(if d.is_empty() { 0 } else { 1 })
        }
        Command::Audit(args) => netmargin::audit::command(
            &args,
            &opts,
            color_on(cli.global.color, std::io::stderr().is_terminal()),
        ),
        Command::Families(args) => {
            let rules = netmargin::classify::classifier::Rules::builtin();
            let mut out = std::io::stdout().lock();
            netmargin::report::parts::write_families(
                &mut out,
                &rules,
                args.supply,
                args.format == netmargin::cli::ListFormat::Json,
            )?;
            out.flush()?;
            Ok(0)
        }
    }
}

fn known_checks(s: &SettingsArgs) -> bool {
    for id in s.only.iter().chain(&s.disable) {
        if netmargin::checks::info(id).is_none() {
            eprintln!("netmargin: unknown check `{id}`; `netmargin explain` lists them");
            return false;
        }
    }
    true
}

/// Shows outcomes on standard error in the human format (findings and summary lines).
fn to_stderr(outcomes: &[FileOutcome], color: ColorChoice) -> std::io::Result<()> {
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

fn baseline(args: &BaselineArgs, opts: &ReadOptions, color: ColorChoice) -> std::io::Result<u8> {
    let files = netmargin::app::expand_paths(&args.paths);
    if files.is_empty() {
        eprintln!(
            "netmargin: no `.net` files in {}; baseline not written",
            args.paths.join(", ")
        );
        return Ok(2);
    }
    let run = netmargin::app::check_paths(&args.paths, &args.settings, opts);
    let (netlists, others) = run.outcomes.split_at(run.netlists);
    let failed: Vec<&FileOutcome> = netlists.iter().filter(|o| o.fatal.is_some()).collect();
    if run.config_failed || !failed.is_empty() {
        let bad: Vec<FileOutcome> = run
            .outcomes
            .into_iter()
            .filter(|o| o.fatal.is_some())
            .collect();
        to_stderr(&bad, color)?;
        eprintln!(
            "netmargin: baseline not written: {} could not be checked",
            if bad.len() == 1 {
                "1 file".to_string()
            } else {
                format!("{} files", bad.len())
            }
        );
        return Ok(2);
    }
    // stale or expired waivers: worth seeing, not a reason to refuse
    to_stderr(others, color)?;
    let cwd = std::env::current_dir()?;
    let base = netmargin::baseline::base_dir(&args.output, &cwd);
    let text = netmargin::baseline::render(netlists, &base, &cwd);
    let target = cwd.join(&args.output);
    let written = match target.parent() {
        Some(dir) => std::fs::create_dir_all(dir)
            .and_then(|()| netmargin::atomic::write(&target, text.as_bytes())),
        None => netmargin::atomic::write(&target, text.as_bytes()),
    };
    if let Err(e) = written {
        eprintln!(
            "netmargin: cannot write the baseline `{}`: {e}",
            args.output.display()
        );
        return Ok(2);
    }
    let findings: usize = netlists.iter().map(|o| o.diags.len()).sum();
    let waived: usize = netlists.iter().map(|o| o.waived).sum();
    let mut line = format!(
        "wrote {}: {} in {}",
        args.output.display(),
        if findings == 1 {
            "1 finding".to_string()
        } else {
            format!("{findings} findings")
        },
        if netlists.len() == 1 {
            "1 file".to_string()
        } else {
            format!("{} files", netlists.len())
        }
    );
    if waived > 0 {
        line.push_str(&format!(" ({waived} more covered by waivers, left out)"));
    }
    let mut out = std::io::stdout().lock();
    writeln!(out, "{line}")?;
    Ok(0)
}

fn show_config(args: &ConfigArgs, color: ColorChoice) -> std::io::Result<u8> {
    if !known_checks(&args.settings) {
        return Ok(2);
    }
    let target = args.path.clone().unwrap_or_else(|| ".".to_string());
    if target != "-" && !std::path::Path::new(&target).exists() {
        eprintln!("netmargin: no file or folder `{target}`");
        return Ok(2);
    }
    let cfg_path = netmargin::app::config_for(&target, &args.settings);
    let config = match &cfg_path {
        None => None,
        Some(p) => match netmargin::config::load(p) {
            Ok(c) => Some(c),
            Err(e) => {
                let o = FileOutcome {
                    name: e.source.name().to_string(),
                    source: Some(e.source.clone()),
                    fatal: e.diags.first().cloned(),
                    diags: e.diags.iter().skip(1).cloned().collect(),
                    summary: Default::default(),
                    coverage: None,
                    waived: 0,
                };
                to_stderr(&[o], color)?;
                return Ok(2);
            }
        },
    };
    let mut text = netmargin::report::settings::show(&target, config.as_ref(), &args.settings);
    // in a folder, netlists below a netmargin.toml of their own use that one
    if std::path::Path::new(&target).is_dir() {
        let mut others: std::collections::BTreeMap<String, usize> = Default::default();
        for f in netmargin::app::expand_paths(std::slice::from_ref(&target)) {
            let c = netmargin::app::config_for(&f, &args.settings);
            if c != cfg_path {
                *others
                    .entry(c.map_or_else(
                        || "no configuration".to_string(),
                        |p| p.display().to_string(),
                    ))
                    .or_default() += 1;
            }
        }
        for (c, n) in others {
            text.push_str(&format!(
                "\n# note: {n} netlist{} below use {}\n",
                if n == 1 { "" } else { "s" },
                netmargin::text::sanitize(&c)
            ));
        }
    }
    let mut out = std::io::stdout().lock();
    out.write_all(text.as_bytes())?;
    out.flush()?;
    Ok(0)
}

fn init(args: &InitArgs, opts: &ReadOptions, color: ColorChoice) -> std::io::Result<u8> {
    let files = match &args.netlist {
        Some(n) => vec![n.clone()],
        None => netmargin::app::expand_paths(&[".".to_string()])
            .into_iter()
            .map(|f| f.strip_prefix("./").map(str::to_string).unwrap_or(f))
            .collect(),
    };
    if !args.force && args.output.exists() {
        eprintln!(
            "netmargin: `{}` already exists; not replaced (use --force to replace it)",
            args.output.display()
        );
        return Ok(2);
    }
    let facts = match netmargin::app::init_facts(&files, opts) {
        Ok(f) => f,
        Err(o) => {
            to_stderr(&[*o], color)?;
            eprintln!("netmargin: {} not written", args.output.display());
            return Ok(2);
        }
    };
    let text = netmargin::report::starter::render(&facts);
    let mode = if args.force {
        netmargin::atomic::Existing::Replace
    } else {
        netmargin::atomic::Existing::Keep
    };
    if let Err(e) = netmargin::atomic::write_with(&args.output, text.as_bytes(), mode) {
        if e.kind() == std::io::ErrorKind::AlreadyExists {
            eprintln!(
                "netmargin: `{}` already exists; not replaced (use --force to replace it)",
                args.output.display()
            );
        } else {
            eprintln!("netmargin: cannot write `{}`: {e}", args.output.display());
        }
        return Ok(2);
    }
    let supplies = facts.rails.iter().filter(|r| !r.ground).count();
    let unknown = facts
        .rails
        .iter()
        .filter(|r| !r.ground && r.volts.is_none())
        .count();
    let mut out = std::io::stdout().lock();
    write!(
        out,
        "wrote {}: {} supply rail{} ({} without a voltage to set), {} connector{} to review",
        args.output.display(),
        supplies,
        if supplies == 1 { "" } else { "s" },
        unknown,
        facts.connectors.len(),
        if facts.connectors.len() == 1 { "" } else { "s" }
    )?;
    writeln!(out)?;
    // a netlist that would not find the new file
    let written = std::fs::canonicalize(&args.output).ok();
    for f in &files {
        let found = netmargin::config::discover(std::path::Path::new(f))
            .and_then(|p| std::fs::canonicalize(p).ok());
        if written.is_some() && found != written {
            writeln!(out, "note: {f} is not in the folder of {} or below it, so it does not use it; pass --config {}", args.output.display(), args.output.display())?;
        }
    }
    Ok(0)
}
