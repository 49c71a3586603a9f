//! `netmargin parts FILE`: how every part was classified, with the project's mapping files.

use std::io::Write;

use crate::cli::{ColorChoice, ListFormat, PartsArgs};
use crate::input::ReadOptions;

pub fn command(args: &PartsArgs, read: &ReadOptions, color: ColorChoice) -> std::io::Result<u8> {
    let (settings, source) = match super::open_one(&args.path, &args.settings, read, color)? {
        Ok(x) => x,
        Err(code) => return Ok(code),
    };
    let a = match super::analyse(&source, &settings, color)? {
        Ok(a) => a,
        Err(code) => return Ok(code),
    };
    let mut out = std::io::stdout().lock();
    crate::report::parts::write_parts(
        &mut out,
        source.name(),
        &a.nl,
        &a.cl,
        args.format == ListFormat::Json,
    )?;
    out.flush()?;
    Ok(0)
}
