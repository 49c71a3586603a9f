//! Small netlists written as text (KiCad's version "E" layout, the nodes only: the built-in
//! function table gives the logic pins their roles), and the electrical model built from them
//! by the library itself, so tests check what `netmargin check` computes.

#![allow(dead_code)]

use std::fmt::Write;

use netmargin::circuit::budget::{net_budget, NetBudget};
use netmargin::circuit::{self, Circuit, ModelOptions};
use netmargin::classify::classifier::{classify, Rules};
use netmargin::source::SourceFile;
use netmargin::{netlist, sexpr};

/// A board: parts (reference, value) and nets (name, nodes as `REF.PIN`).
#[derive(Default, Clone)]
pub struct Board {
    pub parts: Vec<(String, String)>,
    pub nets: Vec<(String, Vec<String>)>,
}

impl Board {
    pub fn part(&mut self, reference: &str, value: &str) -> &mut Self {
        self.parts.push((reference.to_string(), value.to_string()));
        self
    }

    /// Adds `nodes` to the net `name` (creating it).
    pub fn net(&mut self, name: &str, nodes: &[&str]) -> &mut Self {
        match self.nets.iter_mut().find(|(n, _)| n == name) {
            Some((_, v)) => v.extend(nodes.iter().map(|s| s.to_string())),
            None => self.nets.push((
                name.to_string(),
                nodes.iter().map(|s| s.to_string()).collect(),
            )),
        }
        self
    }

    /// A 14-pin logic part (supply pin 14, ground pin 7) powered from `rail`.
    pub fn logic14(&mut self, reference: &str, value: &str, rail: &str) -> &mut Self {
        self.part(reference, value);
        let (vcc, gnd) = (format!("{reference}.14"), format!("{reference}.7"));
        self.net(rail, &[&vcc]).net("GND", &[&gnd])
    }

    /// A resistor `reference` of `value` between two nets.
    pub fn resistor(&mut self, reference: &str, value: &str, a: &str, b: &str) -> &mut Self {
        self.part(reference, value);
        let (p1, p2) = (format!("{reference}.1"), format!("{reference}.2"));
        self.net(a, &[&p1]).net(b, &[&p2])
    }

    pub fn text(&self) -> String {
        let mut s = String::from(
            "(export (version \"E\")\n  (design\n    (source \"/tw714/check/bench.kicad_sch\")\n    (date \"2024-10-01T09:00:00\")\n    (tool \"Eeschema 8.0.4\"))\n  (components\n",
        );
        for (i, (r, v)) in self.parts.iter().enumerate() {
            let lib = if r.starts_with('R') { "R" } else { v.as_str() };
            let _ = writeln!(
                s,
                "    (comp (ref \"{r}\")\n      (value \"{v}\")\n      (libsource (lib \"bench\") (part \"{lib}\") (description \"\"))\n      (sheetpath (names \"/\") (tstamps \"/\"))\n      (tstamps \"0000{i:04x}-0000-4000-8000-000000000000\"))"
            );
        }
        s.push_str("  )\n  (nets\n");
        for (i, (name, nodes)) in self.nets.iter().enumerate() {
            let _ = write!(s, "    (net (code \"{}\") (name \"{name}\")", i + 1);
            for n in nodes {
                let (r, p) = n.rsplit_once('.').expect("nodes are REF.PIN");
                let _ = write!(s, "\n      (node (ref \"{r}\") (pin \"{p}\"))");
            }
            s.push_str(")\n");
        }
        s.push_str("  ))\n");
        s
    }
}

/// Builds the model of `text` with the shipped rules and calls `f` with it.
pub fn with_circuit<R>(text: &str, opts: ModelOptions, f: impl FnOnce(&Circuit<'_, '_>) -> R) -> R {
    let src = SourceFile::new("bench.net", text.to_string());
    let tree = sexpr::parse(src.text())
        .unwrap_or_else(|d| panic!("bench netlist does not parse: {d:?}\n{text}"));
    let nl = netlist::build(&tree).unwrap_or_else(|d| panic!("bench netlist has no model: {d:?}"));
    let rules = Rules::builtin();
    let cl = classify(&nl, &rules);
    let cx = circuit::build(&nl, &cl, &rules, opts);
    f(&cx)
}

/// The index of the net called `name`.
pub fn net_index(cx: &Circuit<'_, '_>, name: &str) -> usize {
    cx.nl
        .nets
        .iter()
        .position(|n| n.name.as_str() == name)
        .unwrap_or_else(|| panic!("no net {name}"))
}

/// The budget of the net called `name`.
pub fn budget(cx: &Circuit<'_, '_>, name: &str) -> NetBudget {
    net_budget(cx, net_index(cx, name))
}
