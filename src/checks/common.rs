//! Helpers the checks share: finding floating inputs grouped by gate, formatting.

use std::collections::BTreeMap;

use super::Context;
use crate::circuit::PinRef;
use crate::classify::PinRole;
use crate::netlist::Connection;

/// Why an input floats.
#[derive(Debug, Clone)]
pub enum Float {
    /// On no net at all (its gate unit was never placed, or it is absent from the netlist).
    Absent,
    /// Placed, but wired to nothing (a one-node net).
    Alone(usize),
    /// On a net with nothing that sets a level: the other pins are inputs or passives.
    Undriven(usize),
    /// On a net held only through one switch or jumper element: it floats when that is open.
    SwitchOpen(usize, Vec<crate::circuit::SwitchLink>),
}

/// One floating input.
#[derive(Debug, Clone)]
pub struct Floating {
    pub at: PinRef,
    pub why: Float,
}

/// A whole gate whose inputs all float and whose outputs go nowhere.
#[derive(Debug, Clone)]
pub struct UnusedGate {
    pub comp: usize,
    pub unit: String,
    pub inputs: Vec<Floating>,
    pub outputs: Vec<PinRef>,
}

/// Why an input on `connection` floats, or `None` when something sets its level in every
/// position of the switches: on no net, alone on a net that is not a rail, or on a net with no
/// source (or one only a switch gives).
pub fn floats(cx: &crate::circuit::Circuit<'_, '_>, connection: Connection) -> Option<Float> {
    match connection {
        Connection::Absent => Some(Float::Absent),
        Connection::Alone { net, .. } if cx.nets[net as usize].rail.is_none() => {
            Some(Float::Alone(net as usize))
        }
        Connection::Net { net, .. } => {
            let net = net as usize;
            let nm = &cx.nets[net];
            if nm.has_source() {
                None
            } else if nm.floats_open.is_empty() {
                Some(Float::Undriven(net))
            } else {
                Some(Float::SwitchOpen(net, nm.floats_open.to_vec()))
            }
        }
        _ => None,
    }
}

/// Floating logic inputs of classified parts whose family has TTL inputs (`ttl` true) or
/// CMOS inputs (`ttl` false), with the whole unused gates gathered up.
pub fn floating_inputs(ctx: &Context<'_, '_, '_>, ttl: bool) -> (Vec<Floating>, Vec<UnusedGate>) {
    let cx = ctx.cx;
    let mut singles = Vec::new();
    let mut gates = Vec::new();
    for (ci, c) in cx.nl.components.iter().enumerate() {
        let part = &cx.cl.parts[ci];
        let Some(fam) = cx.family(ci).filter(|_| part.is_logic()) else {
            continue;
        };
        if fam.is_cmos_input() == ttl {
            continue;
        }
        let mut by_unit: BTreeMap<&str, Vec<Floating>> = BTreeMap::new();
        let mut found = Vec::new();
        // the part's function-table entry, looked up once (not once per input)
        let function = part
            .function
            .as_ref()
            .and_then(|(series, id)| cx.rules.functions.get(*series, id));
        for (pi, p) in c.pins.iter().enumerate() {
            // a no-connect flag silences the schematic editor; it does not tie the pin
            if !matches!(cx.roles[ci][pi], PinRole::Input | PinRole::SchmittInput) {
                continue;
            }
            // a control input that must be held at one level is `open-control-input`'s
            // (`Circuit::idle_level`, with the entry looked up above)
            if function
                .and_then(|f| f.pin(&p.num))
                .is_some_and(|d| d.idle_high.is_some())
            {
                continue;
            }
            let Some(why) = floats(cx, p.connection) else {
                continue;
            };
            found.push(Floating {
                at: PinRef { comp: ci, pin: pi },
                why,
            });
        }
        for f in found {
            match part.units[f.at.pin].as_deref() {
                Some(u) => by_unit.entry(u).or_default().push(f),
                None => singles.push(f),
            }
        }
        for (unit, floats) in by_unit {
            // every input of the unit floats, and its outputs reach nothing
            let unit_inputs: Vec<usize> = (0..c.pins.len())
                .filter(|&i| {
                    part.units[i].as_deref() == Some(unit)
                        && matches!(cx.roles[ci][i], PinRole::Input | PinRole::SchmittInput)
                })
                .collect();
            let unit_outputs: Vec<PinRef> = (0..c.pins.len())
                .filter(|&i| part.units[i].as_deref() == Some(unit) && cx.roles[ci][i].is_output())
                .map(|i| PinRef { comp: ci, pin: i })
                .collect();
            let outputs_unused = unit_outputs
                .iter()
                .all(|o| c.pins[o.pin].connection.is_unconnected());
            if floats.len() == unit_inputs.len() && unit_inputs.len() > 0 && outputs_unused {
                gates.push(UnusedGate {
                    comp: ci,
                    unit: unit.to_string(),
                    inputs: floats,
                    outputs: unit_outputs,
                });
            } else {
                singles.extend(floats);
            }
        }
    }
    (singles, gates)
}

/// `pins 12 (4A) and 13 (4B)`
pub fn pin_list(ctx: &Context<'_, '_, '_>, pins: &[PinRef]) -> String {
    let cx = ctx.cx;
    numbered_list(pins.iter().map(|p| {
        (
            cx.nl.components[p.comp].pins[p.pin].num.as_ref(),
            cx.cl.parts[p.comp].table_names[p.pin].as_deref(),
        )
    }))
}

/// [`pin_list`]'s text from (number, function-table name) pairs, written into one string.
fn numbered_list<'p>(pins: impl ExactSizeIterator<Item = (&'p str, Option<&'p str>)>) -> String {
    use std::fmt::Write;
    let n = pins.len();
    let mut s = String::from(if n == 1 { "pin " } else { "pins " });
    for (i, (num, name)) in pins.enumerate() {
        if i > 0 {
            s.push_str(if i + 1 == n { " and " } else { ", " });
        }
        s.push_str(num);
        if let Some(name) = name {
            let _ = write!(s, " ({name})");
        }
    }
    s
}

/// The positive rail a part's supply pin sits on, by name, for fix messages.
pub fn supply_rail_name(ctx: &Context<'_, '_, '_>, comp: usize) -> String {
    let cx = ctx.cx;
    cx.supplies[comp]
        .as_ref()
        .and_then(|s| s.supply_net.filter(|_| s.known))
        .map(|n| cx.net_name(n))
        .unwrap_or_else(|| "the supply".into())
}

/// The ground rail a part's ground pin sits on, by name.
pub fn ground_rail_name(ctx: &Context<'_, '_, '_>, comp: usize) -> String {
    let cx = ctx.cx;
    cx.supplies[comp]
        .as_ref()
        .and_then(|s| s.ground_net)
        .filter(|&n| cx.nets[n].rail.is_some())
        .map(|n| cx.net_name(n))
        .unwrap_or_else(|| "GND".into())
}

/// `one` for a single item, `many` otherwise: `pin 13 is`, `pins 12 and 13 are`.
pub fn agree(n: usize, one: &'static str, many: &'static str) -> &'static str {
    if n == 1 {
        one
    } else {
        many
    }
}

/// Percentage with no decimals.
pub fn pct(x: f64) -> String {
    let v = (x * 100.0).round();
    // no `-0%` for a figure that rounds to nothing
    format!("{:.0}%", if v == 0.0 { 0.0 } else { v })
}

#[cfg(test)]
mod tests {
    use super::agree;

    /// The list as it was built before (items joined with `, ` and a final ` and `).
    fn joined(items: &[&str]) -> String {
        let j = match items.len() {
            0 => String::new(),
            1 => items[0].to_string(),
            _ => format!(
                "{} and {}",
                items[..items.len() - 1].join(", "),
                items[items.len() - 1]
            ),
        };
        format!("{} {j}", if items.len() == 1 { "pin" } else { "pins" })
    }

    #[test]
    fn pin_lists_read_as_before() {
        let pins = [
            ("12", Some("4A")),
            ("13", None),
            ("1", Some("1A")),
            ("9", Some("3B")),
        ];
        for n in 0..=pins.len() {
            let items: Vec<String> = pins[..n]
                .iter()
                .map(|(num, name)| match name {
                    Some(x) => format!("{num} ({x})"),
                    None => num.to_string(),
                })
                .collect();
            let items: Vec<&str> = items.iter().map(String::as_str).collect();
            assert_eq!(
                super::numbered_list(pins[..n].iter().copied()),
                joined(&items),
                "{n} pins"
            );
        }
        assert_eq!(
            super::numbered_list(pins[..2].iter().copied()),
            "pins 12 (4A) and 13"
        );
    }

    #[test]
    fn verbs_agree_with_the_number_of_pins() {
        assert_eq!(agree(1, "is", "are"), "is");
        assert_eq!(agree(2, "is", "are"), "are");
        assert_eq!(agree(1, "floats", "float"), "floats");
    }
}

/// ` (VIH taken at 5.25 V, the top of the rail tolerance)` when a tolerance moved the load's
/// threshold; empty otherwise.
pub fn vih_supply_note(m: &crate::circuit::budget::LoadMargin) -> String {
    m.thresholds_at.map_or(String::new(), |(hi, _)| {
        format!(
            " (VIH taken at {}, the top of the rail tolerance)",
            crate::values::format_volts(hi)
        )
    })
}

/// `J1` or `J1 and J3`: the switches a net is held through.
pub fn switch_names(ctx: &Context<'_, '_, '_>, links: &[crate::circuit::SwitchLink]) -> String {
    let mut refs: Vec<&str> = links
        .iter()
        .map(|l| ctx.cx.nl.components[l.part].reference.as_str())
        .collect();
    refs.dedup();
    match refs.len() {
        0 => String::new(),
        1 => refs[0].to_string(),
        n => format!("{} and {}", refs[..n - 1].join(", "), refs[n - 1]),
    }
}

/// The board's rail nets, gathered once per file so that a check asking "which rail should
/// this pin go to" for each finding never scans every net again.
#[derive(Debug, Default)]
pub struct RailIndex {
    /// The first net (in net order) of each distinct rail (ground or not, voltage): every
    /// question asked of the index depends on those two alone, so the first answer among
    /// these is the first among all rail nets, and the list stays as short as the board has
    /// kinds of rail.
    rails: Vec<(usize, crate::circuit::Rail)>,
}

impl RailIndex {
    pub fn new(cx: &crate::circuit::Circuit<'_, '_>) -> RailIndex {
        let mut seen = rustc_hash::FxHashSet::default();
        RailIndex {
            rails: cx
                .nets
                .iter()
                .enumerate()
                .filter_map(|(n, nm)| nm.rail.map(|r| (n, r)))
                .filter(|(_, r)| seen.insert((r.ground, r.volts.map(f64::to_bits))))
                .collect(),
        }
    }

    /// The first rail net (in net order) for which `f` holds.
    pub fn find(
        &self,
        f: impl Fn(&crate::circuit::Rail) -> bool,
    ) -> Option<(usize, crate::circuit::Rail)> {
        self.rails.iter().find(|(_, r)| f(r)).copied()
    }
}
