//! Reports IC-like parts (reference `U`, `IC`, `Z` ..., or a value that looks like logic)
//! whose value no mapping matched, with the near misses one transcription slip away (the
//! letter O for zero, S for 5, a doubled digit ...), and whether their pins were judged from
//! the symbol's pin types or not at all. Also reports a logic part whose function is not in
//! the function table (its pins are judged from the symbol), and one whose `Logic family`
//! field names a family the family table does not have.
//!
//! Why it matters: every other check skips what it cannot classify, so a mistyped value is
//! a part nobody reviewed. A recaptured schematic read from a scan is full of them.
//!
//! Example: a component valued `74LSOO` (letters O for zeros): did you mean `74LS00`?
//!
//! Fix: correct the value; or add a `Logic family` field (and a `Logic function` field)
//! to the component; or add an entry (`[[part]]` with `values`, `family`, `function`) to
//! a project parts file.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "unclassified-part",
    severity: crate::diag::Severity::Info,
    summary: "an IC-like part whose value no mapping matched; near misses suggested",
};

use super::Context;
use crate::classify::classifier::{Method, PartClass, PartKind};
use crate::classify::pattern::match_value;
use crate::diag::Diag;

/// Why a part is reported.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Gap {
    /// IC-like, no mapping matched; `judged` when the symbol's pin types were used.
    Unmatched { judged: bool },
    /// A logic part whose function (named by the value or a field) is not in the table.
    FunctionMissing(String),
    /// A logic part whose family is not in the family table.
    FamilyUnknown(String),
    /// Drawn as a function (`AND2`, `CNT`) with no part number: no family can be known.
    FunctionSymbol,
}

/// What is missing for a part, if anything. `family_known` says whether the part's family
/// id is in the family table.
pub fn gap(part: &PartClass, family_known: bool) -> Option<Gap> {
    match part.method {
        Method::NetlistOnly | Method::NotClassified if part.ic_like => {
            return Some(Gap::Unmatched {
                judged: part.method == Method::NetlistOnly,
            });
        }
        Method::FunctionSymbol => return Some(Gap::FunctionSymbol),
        _ => {}
    }
    if part.kind != PartKind::Logic {
        return None;
    }
    if let Some(f) = part.family.as_ref().filter(|_| !family_known) {
        return Some(Gap::FamilyUnknown(f.clone()));
    }
    match (&part.named_function, &part.function) {
        (Some(n), None) if !n.is_empty() => Some(Gap::FunctionMissing(n.clone())),
        _ => None,
    }
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for (ci, c) in cx.nl.components.iter().enumerate() {
        let part = &cx.cl.parts[ci];
        let Some(g) = gap(part, cx.family(ci).is_some()) else {
            continue;
        };
        let reference = c.reference.as_str();
        let value = c.value_str();
        let span = c.value.as_ref().map_or(c.reference.span(), |v| v.span());
        let diag = match g {
            Gap::Unmatched { judged } => {
                let near = if part.suggestions.is_empty() {
                    "no known part is one slip away".to_string()
                } else {
                    let s: Vec<String> = part.suggestions.iter().map(|s| format!("`{}` ({})", s.value, s.change)).collect();
                    format!("near miss{}: {}", if s.len() == 1 { "" } else { "es" }, s.join("; "))
                };
                let pins = if judged {
                    "its pins are judged from the symbol's pin types (netlist only)"
                } else {
                    "its pins are not judged at all: the symbol gives them no usable types"
                };
                let symbol = c
                    .libsource
                    .as_ref()
                    .and_then(|l| l.part.as_ref())
                    .map(|p| p.as_str())
                    .filter(|p| *p != value && match_value(p).is_some())
                    .map_or(String::new(), |p| format!("; its symbol is `{p}`"));
                let first = part.suggestions.first().map_or(String::new(), |s| format!(" (to `{}` if that is the part)", s.value));
                Diag::info("unclassified-part", format!("{reference} value `{value}` matches no part mapping ({near}{symbol}); {pins}"))
                    .at(span, "no mapping matched")
                    .with_help(format!(
                        "correct the value{first}, or add a `Logic family` field to {reference}, or an entry for `{value}` in a project parts file (`kind = \"not-logic\"` if it is not a logic part)"
                    ))
            }
            Gap::FunctionMissing(f) => {
                let fam = part.family.as_deref().unwrap_or("its family");
                let listed = cx.rules.functions.iter().any(|x| x.id == f);
                let why = if listed {
                    format!("function {f} is in the function table, but not for the {fam} family")
                } else {
                    format!("function {f} is not in the function table")
                };
                Diag::info("unclassified-part", format!("{reference} ({value}) is a {fam} part, but {why}: its pins are judged from the symbol's pin types"))
                    .at(span, "function not in the table")
                    .with_help(format!("check the value; or add function {f} to a project function table, or give {reference} a `Logic function` field naming a function the table has"))
            }
            Gap::FunctionSymbol => Diag::info("unclassified-part", format!("{reference} is drawn as a function (value `{value}`), with no part number: netmargin cannot know its logic family, so its pins are judged from the symbol's pin types only and it is not counted among the IC-like parts"))
                .at(span, "a function, not a part number")
                .with_help(format!("if {reference} stands for a real part, put its part number in the value (e.g. `74HC08`), or give it a `Logic family` field")),
            Gap::FamilyUnknown(f) => Diag::info("unclassified-part", format!("{reference} ({value}) names the logic family `{f}`, which the family table does not have: none of its pins are checked against family data"))
                .at(c.field("Logic family").and_then(|x| x.value.as_ref()).map_or(span, |v| v.span()), "unknown family")
                .with_help(format!("spell the family as the family table does (`netmargin families` lists them), or add `{f}` to a project family table")),
        };
        out.push(diag);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn part(kind: PartKind, method: Method) -> PartClass {
        PartClass {
            kind,
            method,
            family: None,
            function: None,
            named_function: None,
            value_match: None,
            suggestions: Vec::new(),
            ic_like: true,
            pins: std::sync::Arc::new(crate::classify::classifier::PinTable::unknown(1)),
            entry: None,
            symbol_reads_as: None,
        }
    }

    #[test]
    fn what_is_reported() {
        assert_eq!(
            gap(&part(PartKind::UnknownIc, Method::NetlistOnly), false),
            Some(Gap::Unmatched { judged: true })
        );
        assert_eq!(
            gap(&part(PartKind::UnknownIc, Method::NotClassified), false),
            Some(Gap::Unmatched { judged: false })
        );
        let mut p = part(PartKind::Logic, Method::Pattern);
        p.family = Some("74LS".into());
        p.named_function = Some("670".into());
        assert_eq!(gap(&p, true), Some(Gap::FunctionMissing("670".into())));
        assert_eq!(gap(&p, false), Some(Gap::FamilyUnknown("74LS".into())));
        let mut s = part(PartKind::UnknownIc, Method::FunctionSymbol);
        s.ic_like = false;
        assert_eq!(gap(&s, false), Some(Gap::FunctionSymbol));
    }

    #[test]
    fn what_is_not() {
        // classified, with its function in the table
        let mut p = part(PartKind::Logic, Method::Pattern);
        p.family = Some("74LS".into());
        p.named_function = Some("00".into());
        p.function = Some((crate::classify::function::Series::S74, "00".into()));
        assert_eq!(gap(&p, true), None);
        // known and not logic (a regulator entry), and passives
        assert_eq!(
            gap(&part(PartKind::NotLogic, Method::ShippedEntry), true),
            None
        );
        let mut r = part(PartKind::Resistor, Method::Reference);
        r.ic_like = false;
        assert_eq!(gap(&r, false), None);
        // not IC-like, though not classified
        let mut o = part(PartKind::Other, Method::NetlistOnly);
        o.ic_like = false;
        assert_eq!(gap(&o, false), None);
    }
}
