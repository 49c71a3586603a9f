//! Finds classified logic parts whose supply or ground pin (by the function table's pinout)
//! is on no net: absent from the netlist, or placed but wired to nothing. When every power
//! pin is absent, the symbol's power unit was most likely never placed: with KiCad 5
//! libraries the power pins of a multi-unit symbol can sit in a unit of their own, and a
//! chip whose power unit is left off the sheet has no VCC or GND at all in the netlist.
//!
//! Why it matters: an unpowered chip does nothing, or is powered backwards through its
//! input clamp diodes from whatever drives it, at levels nobody designed for.
//!
//! Example: a 74LS00 with its four gates placed and wired to the edge connector, but no
//! power unit: pins 7 (GND) and 14 (VCC) are in no net.
//!
//! Fix: place the power unit (or draw the power pins) and wire the supply pin to the
//! family's rail and the ground pin to ground.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "unpowered-part",
    severity: crate::diag::Severity::Error,
    summary: "a classified part whose supply or ground pin is on no net or absent",
};

use super::common::{push_all, write_and};
use super::Context;
use crate::circuit::PinRef;
use crate::classify::function::PinDef;
use crate::classify::PinRole;
use crate::diag::{Diag, Text};
use crate::netlist::Connection;
use crate::values::format_volts;

/// How one power pin is missing.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Missing {
    /// The symbol has no pin of that number at all.
    NoSuchPin,
    /// The pin is in the symbol but on no net (its unit was never placed).
    Absent,
    /// Placed, but alone on its net.
    Unwired,
}

/// How a pin of the component is missing, if it is (`None`: the symbol has no such pin).
pub fn missing(pin: Option<Connection>) -> Option<Missing> {
    match pin {
        None => Some(Missing::NoSuchPin),
        Some(Connection::Absent) => Some(Missing::Absent),
        Some(Connection::Alone { .. }) => Some(Missing::Unwired),
        Some(Connection::Net { .. }) => None,
    }
}

/// True when every power pin is absent or not in the symbol: the power unit seems never
/// placed.
pub fn power_unit_unplaced(found: &[Missing], power_pins: usize) -> bool {
    found.len() == power_pins
        && power_pins > 0
        && found
            .iter()
            .all(|m| matches!(m, Missing::Absent | Missing::NoSuchPin))
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    // a kind of part's power pins (its function's, in pin order, each with the index of the
    // symbol's pin of that number), found once per kind: parts that share one classification
    // are alike in their function and their pins' numbers, in order
    type Power<'f> = Option<Vec<(&'f PinDef, Option<usize>)>>;
    let mut by_kind: rustc_hash::FxHashMap<*const crate::classify::classifier::PartClass, Power> =
        Default::default();
    for (ci, c) in cx.nl.components.iter().enumerate() {
        let part = &cx.cl.parts[ci];
        if !part.is_logic() {
            continue;
        }
        let power = by_kind
            .entry(std::sync::Arc::as_ptr(part))
            .or_insert_with(|| {
                let func = part
                    .function
                    .as_ref()
                    .and_then(|(s, id)| cx.rules.functions.get(*s, id))?;
                let mut power: Vec<&PinDef> =
                    func.supply_pins().chain(func.ground_pins()).collect();
                power.sort_by_key(|d| d.pin.parse::<u32>().unwrap_or(u32::MAX));
                Some(
                    power
                        .into_iter()
                        .map(|d| (d, c.pins.iter().position(|p| p.num(cx.nl) == d.pin)))
                        .collect(),
                )
            });
        let Some(power) = power.as_ref() else {
            continue;
        };
        let mut found: Vec<(&PinDef, Missing, Option<usize>)> = Vec::new();
        for &(d, idx) in power {
            debug_assert_eq!(idx, c.pins.iter().position(|p| p.num(cx.nl) == d.pin));
            // alone on a rail net (one power symbol on one chip): on that rail
            if let Some(Connection::Alone { net, .. }) = idx.map(|i| c.pins[i].connection) {
                if cx.nets[net as usize].rail().is_some() {
                    continue;
                }
            }
            if let Some(m) = missing(idx.map(|i| c.pins[i].connection)) {
                found.push((d, m, idx));
            }
        }
        if found.is_empty() {
            continue;
        }
        let kinds: Vec<Missing> = found.iter().map(|f| f.1).collect();
        let unplaced = power_unit_unplaced(&kinds, power.len());
        let value = c.value_str();
        let reference = c.reference.as_str();
        // the words are written piece by piece into one text each: a board can have a part
        // like this in every cell
        let list = |s: &mut String| {
            write_and(s, &found, |s, (d, _, _)| {
                push_all(s, &[&d.pin, " (", &d.name, ")"]);
            })
        };
        let plural = found.len() > 1;
        let (pin_word, verb) = if plural {
            ("pins", "are")
        } else {
            ("pin", "is")
        };
        let no_symbol = c.libpart.is_none();
        let all_missing = kinds.iter().all(|m| *m == Missing::NoSuchPin);
        // room for the usual message and help at once (both are copied into the findings
        // list and dropped). The message is the part's reference, then words that parts alike
        // wired alike say alike: those are `what`, held once in the list for all of them
        let mut what = String::with_capacity(256);
        if unplaced && all_missing && no_symbol {
            push_all(
                &mut what,
                &[
                    " (",
                    value,
                    ") has no power in the netlist: ",
                    pin_word,
                    " ",
                ],
            );
            list(&mut what);
            push_all(
                &mut what,
                &[
                    " ",
                    verb,
                    " in no net, and the netlist has no library part for it",
                ],
            );
        } else if unplaced && all_missing {
            push_all(
                &mut what,
                &[
                    " (",
                    value,
                    ") has no power: its symbol has no ",
                    pin_word,
                    " ",
                ],
            );
            list(&mut what);
        } else if unplaced {
            push_all(&mut what, &[" (", value, ") has no power: ", pin_word, " "]);
            list(&mut what);
            push_all(
                &mut what,
                &[
                    " ",
                    verb,
                    " on no net; the symbol's power unit seems never placed",
                ],
            );
        } else {
            push_all(&mut what, &[" (", value, ") is not fully powered: "]);
            for (i, (d, m, _)) in found.iter().enumerate() {
                let how = match m {
                    Missing::NoSuchPin => "is not in the symbol",
                    Missing::Absent => "is on no net",
                    Missing::Unwired => "is placed but wired to nothing",
                };
                if i > 0 {
                    what.push_str(", ");
                }
                push_all(&mut what, &["pin ", &d.pin, " (", &d.name, ") ", how]);
            }
        }
        let supply_rail = cx.family(ci).and_then(|fam| {
            ctx.rails
                .find(|r| {
                    !r.ground
                        && r.volts
                            .is_some_and(|v| (v - fam.supply_nominal).abs() < 1e-9)
                })
                .map(|(n, _)| {
                    (
                        super::common::net_name_of(cx, n),
                        format_volts(fam.supply_nominal),
                    )
                })
        });
        let ground_rail = ctx
            .rails
            .find(|r| r.ground)
            .map_or("GND".into(), |(n, _)| super::common::net_name_of(cx, n));
        let wires = |s: &mut String| {
            write_and(s, &found, |s, (d, _, _)| {
                push_all(s, &["pin ", &d.pin, " (", &d.name, ") to "]);
                if d.role == PinRole::Ground {
                    s.push_str(&ground_rail);
                } else {
                    match &supply_rail {
                        Some((n, v)) => push_all(s, &[n, " (", v, ")"]),
                        None => s.push_str("the family's supply"),
                    }
                }
            })
        };
        let mut help = String::with_capacity(256);
        if unplaced && all_missing && no_symbol {
            push_all(
                &mut help,
                &["give ", reference, " its library part, then wire "],
            );
        } else if unplaced && all_missing {
            push_all(
                &mut help,
                &[
                    "use a symbol with the ",
                    value,
                    "'s power pins (or add them to this one) and wire ",
                ],
            );
        } else if unplaced {
            push_all(
                &mut help,
                &["place the power unit of ", reference, " and wire "],
            );
        } else {
            help.push_str("wire ");
        }
        wires(&mut help);
        let span_of = |idx: Option<usize>| match idx {
            Some(i) => cx.pin_span(PinRef::new(ci, i)),
            None => c.reference.span(),
        };
        let label = |m: Missing| match m {
            Missing::NoSuchPin if no_symbol => "no library part; power pins in no net",
            Missing::NoSuchPin => "the symbol has no power pins",
            Missing::Absent => "power pin on no net",
            Missing::Unwired => "power pin wired to nothing",
        };
        let (_, m0, i0) = found[0];
        let mut diag = Diag::error("unpowered-part", String::new())
            .at(span_of(i0), label(m0))
            .with_pin_list({
                let mut w = crate::diag::PinListWriter::default();
                for (d, _, _) in &found {
                    push_all(w.next_pin(), &[reference, ".", &d.pin]);
                }
                w.finish()
            })
            .with_help(help);
        for (_, m, i) in found.iter().skip(1) {
            if i.is_some() {
                diag = diag.also(span_of(*i), label(*m));
            }
        }
        out.push_parts(
            &diag,
            reference,
            crate::diag::Around {
                head: None,
                tail: Some(&Text::from(what)),
            },
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn how_a_pin_is_missing() {
        assert_eq!(missing(None), Some(Missing::NoSuchPin));
        assert_eq!(missing(Some(Connection::Absent)), Some(Missing::Absent));
        assert_eq!(
            missing(Some(Connection::Alone { net: 0, node: 0 })),
            Some(Missing::Unwired)
        );
        assert_eq!(missing(Some(Connection::Net { net: 0, node: 0 })), None);
    }

    #[test]
    fn unplaced_power_unit_needs_every_power_pin_absent() {
        assert!(power_unit_unplaced(&[Missing::Absent, Missing::Absent], 2));
        assert!(power_unit_unplaced(
            &[Missing::NoSuchPin, Missing::Absent],
            2
        ));
        assert!(!power_unit_unplaced(&[Missing::Absent], 2));
        assert!(!power_unit_unplaced(
            &[Missing::Absent, Missing::Unwired],
            2
        ));
        assert!(!power_unit_unplaced(&[], 0));
    }
}
