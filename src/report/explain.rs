//! `netmargin explain`: the registry and each check's own doc comment.

use std::io::{self, Write};

use crate::checks::REGISTRY;

pub fn write_list(out: &mut dyn Write) -> io::Result<()> {
    let w = REGISTRY.iter().map(|c| c.id.len()).max().unwrap_or(10);
    for c in REGISTRY {
        writeln!(
            out,
            "{:<w$}  {:<7}  {}",
            c.id,
            c.severity.as_str(),
            c.summary,
            w = w
        )?;
    }
    writeln!(out, "\n`netmargin explain <check>` shows what a check finds, why it matters, an example and the fix")
}

/// `Ok(false)` when no check has that id.
pub fn write_one(out: &mut dyn Write, id: &str) -> io::Result<bool> {
    let Some(c) = REGISTRY.iter().find(|c| c.id == id) else {
        return Ok(false);
    };
    writeln!(out, "{} (default severity: {})\n", c.id, c.severity)?;
    writeln!(out, "{}", c.summary)?;
    let doc = c.doc();
    if !doc.is_empty() {
        writeln!(out, "\n{doc}")?;
    }
    Ok(true)
}
