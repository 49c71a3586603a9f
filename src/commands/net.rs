//! `netmargin net FILE NET`: one net's whole DC budget, from the same analysis `check` uses.

use std::io::Write;

use crate::cli::{ColorChoice, NetArgs};
use crate::input::ReadOptions;

pub fn command(args: &NetArgs, read: &ReadOptions, color: ColorChoice) -> std::io::Result<u8> {
    let (settings, source) = match super::open_one(&args.path, &args.settings, read, color)? {
        Ok(x) => x,
        Err(code) => return Ok(code),
    };
    let a = match super::analyse(&source, &settings, color)? {
        Ok(a) => a,
        Err(code) => return Ok(code),
    };
    let net = match a.find_net(&args.net) {
        Ok(n) => n,
        Err(d) => {
            super::to_stderr(&[crate::pipeline::fatal_outcome(&source, d)], color)?;
            return Ok(2);
        }
    };
    let board = a.circuit();
    let mut out = std::io::stdout().lock();
    crate::report::net::write_net(&mut out, &board.cx, board.budgets.net(net), net)?;
    out.flush()?;
    Ok(0)
}
