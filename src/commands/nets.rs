//! `netmargin nets FILE`: every net with its name and pins, from a netlist or a schematic.

use std::io::Write;

use crate::capture::{self, Capture};
use crate::cli::{ColorChoice, ListFormat, NetsArgs};
use crate::input::ReadOptions;

pub fn command(args: &NetsArgs, read: &ReadOptions, color: ColorChoice) -> std::io::Result<u8> {
    let cap = match Capture::open(&args.path, read) {
        Ok(c) => c,
        Err(f) => {
            super::to_stderr(&[*f], color)?;
            return Ok(2);
        }
    };
    let nl = match crate::analysis::read_model(cap.source()) {
        Ok(nl) => nl,
        Err(d) => {
            super::to_stderr(&[crate::pipeline::fatal_outcome(cap.source(), d)], color)?;
            return Ok(2);
        }
    };
    let mut out = std::io::stdout().lock();
    capture::write_nets(&mut out, &nl, args.format == ListFormat::Json)?;
    out.flush()?;
    Ok(0)
}
