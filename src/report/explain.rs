//! `netmargin explain`: the registry and each check's own doc comment.

use std::io::{self, Write};

use crate::checks::REGISTRY;
use crate::diag::INPUT_CODES;

/// How netmargin chooses a finding's severity; `explain` prints it, and the contributor
/// guide holds the same words.
pub const SEVERITY_POLICY: &str = "\
severity: an error when the problem follows from known data (classified parts, rails of known
or stated voltage) in at least one state the circuit reaches; a warning when it rests on an
assumption that the message names; info when netmargin cannot tell. A symbol's pin types alone
never make an error: findings that rest on an unclassified part's symbol are warnings or info,
whatever the check's usual severity below.";

pub fn write_list(out: &mut dyn Write) -> io::Result<()> {
    writeln!(out, "{SEVERITY_POLICY}\n")?;
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
    writeln!(
        out,
        "\ninput, configuration and baseline errors (always errors, unless marked in the output):"
    )?;
    let w = INPUT_CODES.iter().map(|(c, _)| c.len()).max().unwrap_or(10);
    for (c, s) in INPUT_CODES {
        writeln!(out, "{c:<w$}  {s}")?;
    }
    writeln!(out, "\n`netmargin explain <check>` shows what a check finds, why it matters, an example and the fix")
}

/// A "did you mean" suffix for an id that is neither a check nor an error code.
pub fn hint(id: &str) -> String {
    let ids = REGISTRY
        .iter()
        .map(|c| c.id)
        .chain(INPUT_CODES.iter().map(|(c, _)| *c));
    let close = crate::text::closest(id, ids, 2);
    if close.is_empty() {
        String::new()
    } else {
        let list: Vec<String> = close.iter().map(|c| format!("`{c}`")).collect();
        format!("; did you mean {}?", list.join(" or "))
    }
}

/// `Ok(false)` when no check has that id.
pub fn write_one(out: &mut dyn Write, id: &str) -> io::Result<bool> {
    let Some(c) = REGISTRY.iter().find(|c| c.id == id) else {
        let Some((code, summary)) = INPUT_CODES.iter().find(|(c, _)| *c == id) else {
            return Ok(false);
        };
        writeln!(
            out,
            "{code} (an input, configuration or baseline problem)\n"
        )?;
        writeln!(out, "{summary}")?;
        writeln!(
            out,
            "\nThe message names the file and, where there is one, the line and column. An error \
             of this kind stops that file (a configuration error: every file that uses it) with \
             exit code 2; a warning or a note is reported and the run goes on."
        )?;
        return Ok(true);
    };
    writeln!(out, "{} (default severity: {})\n", c.id, c.severity)?;
    writeln!(out, "{}", c.summary)?;
    let doc = c.doc();
    if !doc.is_empty() {
        writeln!(out, "\n{doc}")?;
    }
    Ok(true)
}
