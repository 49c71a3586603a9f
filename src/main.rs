use std::io::{IsTerminal, Write};
use std::process::ExitCode;

use clap::Parser;

use netmargin::cli::{Cli, ColorChoice, Command};
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
        ColorChoice::Auto => stream_is_tty && std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty()),
    }
}

fn run(cli: Cli) -> std::io::Result<u8> {
    let opts = ReadOptions { max_bytes: cli.global.max_bytes };
    match cli.command {
        Command::Check(args) => {
            for id in args.only.iter().chain(&args.disable) {
                if netmargin::checks::info(id).is_none() {
                    eprintln!("netmargin: unknown check `{id}`; `netmargin explain` lists them");
                    return Ok(2);
                }
            }
            let (outcomes, config_failed) = netmargin::app::check(&args, &opts);
            let stdout = std::io::stdout();
            let color = color_on(cli.global.color, stdout.is_terminal());
            let ropts = args.report.options(color, 100)?;
            let mut out = stdout.lock();
            netmargin::report::write_report(&ropts, &outcomes, &mut out)?;
            out.flush()?;
            Ok(netmargin::app::exit_code(&outcomes, config_failed, args.fail_on.severity()))
        }
        Command::Parts(args) => {
            let f = pipeline::read_file(&args.path, &opts);
            let rules = netmargin::classify::classifier::Rules::builtin();
            let mut out = std::io::stdout().lock();
            if f.fatal.is_some() {
                let stderr = std::io::stderr();
                let eh = human::handler(HumanStyle { color: color_on(cli.global.color, stderr.is_terminal()), width: 100 });
                human::write_file(&mut stderr.lock(), &eh, &f)?;
                return Ok(2);
            }
            let source = f.source.as_ref().expect("read");
            let tree = netmargin::sexpr::parse(source.text()).expect("parsed once already");
            let nl = netmargin::netlist::build(&tree).expect("built once already");
            let cl = netmargin::classify::classifier::classify(&nl, &rules);
            netmargin::report::parts::write_parts(&mut out, &f.name, &nl, &cl, args.format == netmargin::cli::ListFormat::Json)?;
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
            let f = pipeline::read_file(&args.path, &opts);
            if f.fatal.is_some() {
                let stderr = std::io::stderr();
                let eh = human::handler(HumanStyle { color: color_on(cli.global.color, stderr.is_terminal()), width: 100 });
                human::write_file(&mut stderr.lock(), &eh, &f)?;
                return Ok(2);
            }
            let rules = netmargin::classify::classifier::Rules::builtin();
            let source = f.source.as_ref().expect("read");
            let tree = netmargin::sexpr::parse(source.text()).expect("parsed once already");
            let nl = netmargin::netlist::build(&tree).expect("built once already");
            let cl = netmargin::classify::classifier::classify(&nl, &rules);
            let model = netmargin::circuit::ModelOptions { rails: args.rail.clone(), ..Default::default() };
            let cx = netmargin::circuit::build(&nl, &cl, &rules, model);
            let want = args.net.trim_start_matches('/');
            let Some(net) = (0..nl.nets.len()).find(|&i| nl.nets[i].name.as_str() == args.net || nl.nets[i].name.as_str().trim_start_matches('/') == want) else {
                eprintln!("netmargin: no net `{}` in {}", args.net, f.name);
                return Ok(2);
            };
            let mut out = std::io::stdout().lock();
            netmargin::report::net::write_net(&mut out, &cx, net)?;
            Ok(0)
        }
        Command::Audit(args) => netmargin::audit::command(&args, &opts, color_on(cli.global.color, std::io::stderr().is_terminal())),
        Command::Families(args) => {
            let rules = netmargin::classify::classifier::Rules::builtin();
            let mut out = std::io::stdout().lock();
            netmargin::report::parts::write_families(&mut out, &rules, args.supply, args.format == netmargin::cli::ListFormat::Json)?;
            out.flush()?;
            Ok(0)
        }
    }
}
