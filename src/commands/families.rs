//! `netmargin families`: the shipped family table at a supply.

use std::io::Write;

use crate::cli::{FamiliesArgs, ListFormat};

pub fn command(args: &FamiliesArgs) -> std::io::Result<u8> {
    let rules = crate::classify::classifier::Rules::builtin();
    let mut out = std::io::stdout().lock();
    crate::report::parts::write_families(
        &mut out,
        &rules,
        args.supply,
        args.format == ListFormat::Json,
    )?;
    out.flush()?;
    Ok(0)
}
