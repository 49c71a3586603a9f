//! `netmargin init [NETLIST]`: a commented starter `netmargin.toml` from the netlists' rails
//! and connectors, read through the same analysis as `check` (the shipped rules and defaults:
//! the file being written is the project's configuration).

use std::io::Write;

use crate::analysis::{Analysis, Overrides, Settings};
use crate::classify::classifier::PartKind;
use crate::cli::{ColorChoice, InitArgs};
use crate::config;
use crate::diag::DiagRef;
use crate::input::ReadOptions;
use crate::pipeline::{self, FileOutcome};
use crate::report::starter::{ConnectorSeen, Facts, FindingSeen, RailSeen};

/// What `init` reads from the netlists: their rails, connectors and a finding to shape the
/// example waiver on. A file that cannot be read comes back as its outcome.
pub fn init_facts(files: &[String], read: &ReadOptions) -> Result<Facts, Box<FileOutcome>> {
    let settings = Settings::builtin(&Overrides::default(), read);
    let rules = &settings.rules;
    let example_family = ["74LS", "74HC"]
        .into_iter()
        .find(|f| rules.families.get(f).is_some())
        .map(str::to_string)
        .or_else(|| rules.families.iter().next().map(|f| f.id.clone()))
        .unwrap_or_default();
    let (y, m, d) = config::today();
    let mut facts = Facts {
        netlists: files.to_vec(),
        example_family,
        derating: settings.run.checks.derating,
        expires: (y + 1, m, d.min(28)),
        ..Default::default()
    };
    for f in files {
        let source = pipeline::open_source(f, read)?;
        let a = Analysis::new(&source, &settings)
            .map_err(|d| Box::new(pipeline::fatal_outcome(&source, d)))?;
        let board = a.circuit();
        let (nl, cx) = (&a.nl, &board.cx);
        for (i, net) in cx.nets.iter().enumerate() {
            let Some(rail) = net.rail() else { continue };
            let name = nl.nets[i].name.as_str().to_string();
            if facts.rails.iter().any(|r| r.name == name) {
                continue;
            }
            // an inferred voltage is for the user to confirm: the starter asks for it
            let inferred = cx.rail_notes.iter().any(|n| n.net == i && n.why.is_some());
            facts.rails.push(RailSeen {
                name,
                volts: if inferred { None } else { rail.v() },
                ground: rail.ground,
                pins: nl.nets[i].node_count(),
            });
        }
        for (ci, c) in nl.components.iter().enumerate() {
            if a.cl.parts[ci].kind != PartKind::Connector {
                continue;
            }
            let reference = c.reference.as_str().to_string();
            if facts.connectors.iter().any(|x| x.reference == reference) {
                continue;
            }
            let pins = c
                .pins
                .iter()
                .filter(|p| p.connection.net().is_some())
                .count();
            facts.connectors.push(ConnectorSeen {
                reference,
                value: c.value_str().to_string(),
                pins,
            });
        }
        if facts.finding.is_none() {
            let is_check =
                |d: &DiagRef<'_>| crate::checks::info(d.code()).is_some() && d.has_pins();
            facts.finding = board
                .findings()
                .diags
                .iter()
                .find(is_check)
                .map(|d| FindingSeen {
                    check: d.code().to_string(),
                    pins: d.pins().map(String::from).collect(),
                });
        }
    }
    Ok(facts)
}

pub fn command(args: &InitArgs, read: &ReadOptions, color: ColorChoice) -> std::io::Result<u8> {
    let files = match &args.netlist {
        Some(n) => vec![n.clone()],
        None => super::check::expand_paths(&[".".to_string()])
            .into_iter()
            .map(|f| f.strip_prefix("./").map(str::to_string).unwrap_or(f))
            .collect(),
    };
    if !args.force && args.output.exists() {
        eprintln!(
            "netmargin: `{}` already exists; not replaced (use --force to replace it)",
            args.output.display()
        );
        return Ok(2);
    }
    let facts = match init_facts(&files, read) {
        Ok(f) => f,
        Err(o) => {
            super::to_stderr(&[*o], color)?;
            eprintln!("netmargin: {} not written", args.output.display());
            return Ok(2);
        }
    };
    let text = crate::report::starter::render(&facts);
    let mode = if args.force {
        crate::atomic::Existing::Replace
    } else {
        crate::atomic::Existing::Keep
    };
    if let Err(e) = crate::atomic::write_with(&args.output, text.as_bytes(), mode) {
        if e.kind() == std::io::ErrorKind::AlreadyExists {
            eprintln!(
                "netmargin: `{}` already exists; not replaced (use --force to replace it)",
                args.output.display()
            );
        } else {
            eprintln!("netmargin: cannot write `{}`: {e}", args.output.display());
        }
        return Ok(2);
    }
    let supplies = facts.rails.iter().filter(|r| !r.ground).count();
    let unknown = facts
        .rails
        .iter()
        .filter(|r| !r.ground && r.volts.is_none())
        .count();
    let mut out = std::io::stdout().lock();
    writeln!(
        out,
        "wrote {}: {} supply rail{} ({} without a voltage to set), {} connector{} to review",
        args.output.display(),
        supplies,
        if supplies == 1 { "" } else { "s" },
        unknown,
        facts.connectors.len(),
        if facts.connectors.len() == 1 { "" } else { "s" }
    )?;
    // a netlist that would not find the new file
    let written = std::fs::canonicalize(&args.output).ok();
    for f in &files {
        let found =
            config::discover(std::path::Path::new(f)).and_then(|p| std::fs::canonicalize(p).ok());
        if written.is_some() && found != written {
            writeln!(out, "note: {f} is not in the folder of {} or below it, so it does not use it; pass --config {}", args.output.display(), args.output.display())?;
        }
    }
    Ok(0)
}
