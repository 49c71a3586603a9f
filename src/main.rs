use std::process::ExitCode;

use clap::Parser;

use netmargin::cli::Cli;

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
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
