//! `netmargin compare A B`: two captures of a board (netlists or schematics) pin by pin.
//! Exit 0 when they match, 1 when they differ, 2 when either cannot be read.

use std::io::Write;

use crate::capture::{self, Capture};
use crate::cli::{ColorChoice, CompareArgs};
use crate::input::ReadOptions;

pub fn command(args: &CompareArgs, read: &ReadOptions, color: ColorChoice) -> std::io::Result<u8> {
    let (a, b) = (Capture::open(&args.a, read), Capture::open(&args.b, read));
    let (a, b) = match (a, b) {
        (Ok(a), Ok(b)) => (a, b),
        (a, b) => {
            let failed: Vec<_> = [a.err(), b.err()]
                .into_iter()
                .flatten()
                .map(|f| *f)
                .collect();
            super::to_stderr(&failed, color)?;
            return Ok(2);
        }
    };
    let (na, nb) = match (read_model(&a), read_model(&b)) {
        (Ok(x), Ok(y)) => (x, y),
        (x, y) => {
            let failed: Vec<_> = [x.err(), y.err()].into_iter().flatten().collect();
            super::to_stderr(&failed, color)?;
            return Ok(2);
        }
    };
    let d = capture::compare(&na, &nb);
    let mut out = std::io::stdout().lock();
    capture::write_differences(&mut out, &d, &args.a, &args.b)?;
    out.flush()?;
    Ok(if d.is_empty() { 0 } else { 1 })
}

/// The model of a capture, read by the analysis's reading stage.
fn read_model(c: &Capture) -> Result<crate::netlist::Netlist<'_>, crate::pipeline::FileOutcome> {
    crate::analysis::read_model(c.source())
        .map_err(|d| crate::pipeline::fatal_outcome(c.source(), d))
}
