//! A *capture* is one board's connectivity as the user has it: a KiCad netlist, or a KiCad
//! 6-9 schematic project read from its root sheet. Both read into the same model; the
//! `nets` command lists it and `compare` sets two captures side by side, pin by pin.

use std::collections::{BTreeMap, BTreeSet};
use std::io::{self, Write};

use serde::Serialize;

use crate::input::ReadOptions;
use crate::netlist::Netlist;
use crate::pipeline::{self, FileOutcome};
use crate::source::SourceFile;
use crate::text::sanitize;

/// The text of a capture (a netlist, or a schematic project's sheets joined), kept so its
/// model can borrow it.
pub struct Capture(SourceFile);

impl Capture {
    /// Reads `path` (a netlist, `-` for standard input, or a schematic's root sheet or any of
    /// its sheets' project root). `Err` is an outcome carrying the fatal diagnostic, shown as
    /// `check` shows it.
    pub fn open(path: &str, opts: &ReadOptions) -> Result<Capture, Box<FileOutcome>> {
        pipeline::open_source(path, opts).map(Capture)
    }

    pub fn source(&self) -> &SourceFile {
        &self.0
    }

    /// The model, read by the analysis's reading stage; `Err` is an outcome for a capture
    /// that could not be modelled.
    pub fn model(&self) -> Result<Netlist<'_>, Box<FileOutcome>> {
        crate::analysis::read_model(&self.0)
            .map_err(|d| Box::new(pipeline::fatal_outcome(&self.0, d)))
    }
}

// ---------------------------------------------------------------------------
// nets

#[derive(Serialize)]
struct NetsDoc<'a> {
    format_version: u32,
    components: Vec<CompOut<'a>>,
    nets: Vec<NetOut<'a>>,
}

#[derive(Serialize)]
struct CompOut<'a> {
    #[serde(rename = "ref")]
    reference: &'a str,
    value: &'a str,
    footprint: &'a str,
}

#[derive(Serialize)]
struct NetOut<'a> {
    name: &'a str,
    nodes: Vec<NodeOut<'a>>,
}

#[derive(Serialize)]
struct NodeOut<'a> {
    #[serde(rename = "ref")]
    reference: &'a str,
    pin: &'a str,
}

/// Lists every net with its name and pins: as text (one net a line, `name: REF.PIN ...`)
/// or as JSON (`docs/nets-format.md`).
pub fn write_nets(out: &mut dyn Write, nl: &Netlist<'_>, json: bool) -> io::Result<()> {
    if json {
        let doc = NetsDoc {
            format_version: 1,
            components: nl
                .components
                .iter()
                .map(|c| CompOut {
                    reference: c.reference.as_str(),
                    value: c.value_str(),
                    footprint: c.footprint.as_ref().map_or("", |f| f.as_str()),
                })
                .collect(),
            nets: nl
                .nets
                .iter()
                .map(|n| NetOut {
                    name: n.name.as_str(),
                    nodes: n
                        .nodes(nl)
                        .iter()
                        .map(|x| NodeOut {
                            reference: x.reference(nl),
                            pin: x.pin(nl),
                        })
                        .collect(),
                })
                .collect(),
        };
        serde_json::to_writer_pretty(&mut *out, &doc)?;
        return writeln!(out);
    }
    for n in &nl.nets {
        let pins: Vec<String> = n
            .nodes(nl)
            .iter()
            .map(|x| sanitize(&format!("{}.{}", x.reference(nl), x.pin(nl))).into_owned())
            .collect();
        writeln!(out, "{}: {}", sanitize(n.name.as_str()), pins.join(" "))?;
    }
    Ok(())
}

// ---------------------------------------------------------------------------
// compare

/// A pin: (reference, pin number).
type Pin = (String, String);

/// What one capture says: every pin's net (as the set of its pins), and every part's value
/// and footprint.
struct Side {
    net_of: BTreeMap<Pin, usize>,
    nets: Vec<BTreeSet<Pin>>,
    names: Vec<String>,
    parts: BTreeMap<String, (String, String)>,
}

fn side(nl: &Netlist<'_>) -> Side {
    let mut s = Side {
        net_of: BTreeMap::new(),
        nets: Vec::new(),
        names: Vec::new(),
        parts: BTreeMap::new(),
    };
    for n in &nl.nets {
        let pins: BTreeSet<Pin> = n
            .nodes(nl)
            .iter()
            .map(|x| (x.reference(nl).to_string(), x.pin(nl).to_string()))
            .collect();
        let i = s.nets.len();
        for p in &pins {
            s.net_of.entry(p.clone()).or_insert(i);
        }
        s.nets.push(pins);
        s.names.push(n.name.as_str().to_string());
    }
    for c in &nl.components {
        s.parts.insert(
            c.reference.as_str().to_string(),
            (
                c.value_str().to_string(),
                c.footprint.as_ref().map_or("", |f| f.as_str()).to_string(),
            ),
        );
    }
    s
}

/// The differences between two captures.
#[derive(Debug, Default, PartialEq, Eq)]
pub struct Differences {
    /// (pin, pins it reaches only in A, pins it reaches only in B, its net's name in A, in B)
    pub pins: Vec<(String, Vec<String>, Vec<String>, String, String)>,
    pub added: Vec<String>,
    pub removed: Vec<String>,
    /// (reference, what changed, in A, in B)
    pub changed: Vec<(String, &'static str, String, String)>,
}

impl Differences {
    pub fn is_empty(&self) -> bool {
        self.pins.is_empty()
            && self.added.is_empty()
            && self.removed.is_empty()
            && self.changed.is_empty()
    }
}

fn pin_text(p: &Pin) -> String {
    format!("{}.{}", p.0, p.1)
}

/// Compares two models by pins: each pin's connections (the other pins on its net), never
/// the nets' names; and the parts by reference, value and footprint.
pub fn compare(a: &Netlist<'_>, b: &Netlist<'_>) -> Differences {
    let (sa, sb) = (side(a), side(b));
    let mut d = Differences::default();
    let empty = BTreeSet::new();
    let all: BTreeSet<&Pin> = sa.net_of.keys().chain(sb.net_of.keys()).collect();
    for p in all {
        let na = sa.net_of.get(p).map(|&i| &sa.nets[i]).unwrap_or(&empty);
        let nb = sb.net_of.get(p).map(|&i| &sb.nets[i]).unwrap_or(&empty);
        let only_a: Vec<String> = na
            .difference(nb)
            .filter(|q| *q != p)
            .map(pin_text)
            .collect();
        let only_b: Vec<String> = nb
            .difference(na)
            .filter(|q| *q != p)
            .map(pin_text)
            .collect();
        if only_a.is_empty() && only_b.is_empty() {
            continue;
        }
        let name = |s: &Side| {
            s.net_of
                .get(p)
                .map_or("(no net)".to_string(), |&i| s.names[i].clone())
        };
        d.pins
            .push((pin_text(p), only_a, only_b, name(&sa), name(&sb)));
    }
    for (r, (va, fa)) in &sa.parts {
        match sb.parts.get(r) {
            None => d.removed.push(r.clone()),
            Some((vb, fb)) => {
                if va != vb {
                    d.changed.push((r.clone(), "value", va.clone(), vb.clone()));
                }
                if fa != fb {
                    d.changed
                        .push((r.clone(), "footprint", fa.clone(), fb.clone()));
                }
            }
        }
    }
    for r in sb.parts.keys() {
        if !sa.parts.contains_key(r) {
            d.added.push(r.clone());
        }
    }
    d
}

/// Writes the differences as text, A and B named by their paths.
pub fn write_differences(out: &mut dyn Write, d: &Differences, a: &str, b: &str) -> io::Result<()> {
    let (a, b) = (sanitize(a), sanitize(b));
    if d.is_empty() {
        return writeln!(
            out,
            "{a} and {b} connect every pin alike and hold the same parts"
        );
    }
    for (pin, only_a, only_b, na, nb) in &d.pins {
        writeln!(
            out,
            "{}: connections differ (net `{}` in A, `{}` in B)",
            sanitize(pin),
            sanitize(na),
            sanitize(nb)
        )?;
        if !only_a.is_empty() {
            writeln!(out, "  only in A: {}", sanitize(&only_a.join(" ")))?;
        }
        if !only_b.is_empty() {
            writeln!(out, "  only in B: {}", sanitize(&only_b.join(" ")))?;
        }
    }
    for r in &d.removed {
        writeln!(out, "{}: only in A (removed in B)", sanitize(r))?;
    }
    for r in &d.added {
        writeln!(out, "{}: only in B (added in B)", sanitize(r))?;
    }
    for (r, what, va, vb) in &d.changed {
        writeln!(
            out,
            "{}: {what} `{}` in A, `{}` in B",
            sanitize(r),
            sanitize(va),
            sanitize(vb)
        )?;
    }
    writeln!(
        out,
        "A = {a}\nB = {b}\n{} pin(s) connected differently, {} part(s) added, {} removed, {} changed",
        d.pins.len(),
        d.added.len(),
        d.removed.len(),
        d.changed.len()
    )
}
