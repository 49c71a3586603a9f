use std::process::ExitCode;

use clap::{CommandFactory, FromArgMatches};

use netmargin::cli::Cli;

fn main() -> ExitCode {
    // what `Cli::try_parse` does, but the command tree it builds (every subcommand and
    // option, a few thousand allocations) is left to the process's exit, not freed first
    let mut command = Cli::command();
    let parsed = command
        .try_get_matches_from_mut(std::env::args_os())
        .and_then(|mut m| Cli::from_arg_matches_mut(&mut m))
        .map_err(|e| e.format(&mut command));
    std::mem::forget(command);
    let cli = match parsed {
        Ok(c) => c,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    match netmargin::commands::run(cli) {
        Ok(code) => ExitCode::from(code),
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("netmargin: {e}");
            ExitCode::from(2)
        }
    }
}
