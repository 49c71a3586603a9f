//! `netmargin completions SHELL` and `netmargin man`, generated from the clap definitions.

use std::io::Write;

use clap::CommandFactory;

use crate::cli::Cli;

pub fn completions(shell: clap_complete::Shell) -> std::io::Result<u8> {
    // generated into memory first: the generators do not pass write errors on
    let mut buf = Vec::new();
    clap_complete::generate(shell, &mut Cli::command(), "netmargin", &mut buf);
    let mut out = std::io::stdout().lock();
    out.write_all(&buf)?;
    out.flush()?;
    Ok(0)
}

pub fn man() -> std::io::Result<u8> {
    let mut buf = Vec::new();
    clap_mangen::Man::new(Cli::command()).render(&mut buf)?;
    let mut out = std::io::stdout().lock();
    out.write_all(&buf)?;
    out.flush()?;
    Ok(0)
}
