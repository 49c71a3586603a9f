//! When a three-state or bidirectional output drives its net: its enables (from the function
//! table) and where they are wired. An enable tied to a rail is settled once here; one on a
//! signal net is a condition the checks can compare between drivers.

use std::sync::Arc;

use super::{Circuit, PinRef};
use crate::classify::PinRole;
use crate::netlist::Connection;

/// One condition under which a three-state output drives: enable pin `pin` of the part on
/// net `net` at the level `high`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub struct Literal {
    pub net: usize,
    pub high: bool,
    /// The enable pin (index into the component's pins).
    pub pin: usize,
}

/// When an output drives its net.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Gate {
    /// All the time (a push-pull output, or a three-state one enabled through rails).
    Always,
    /// Never (an enable tied to its off level).
    Never,
    /// When every condition holds.
    When(Vec<Literal>),
    /// The enables are unknown or not wired.
    Unknown,
}

/// When the output at `p` drives. The enables come from the function table; a pin named
/// `DIR` (a transceiver's direction input) turns the A side on when low and the B side on when
/// high (Motorola SN74LS245 truth table: DIR L, bus B data to bus A).
pub fn gate(cx: &Circuit<'_, '_>, p: PinRef) -> Gate {
    let part = &cx.cl.parts[p.comp()];
    match cx.role(p) {
        PinRole::PushPull => return Gate::Always,
        PinRole::ThreeState | PinRole::Bidirectional => {}
        _ => return Gate::Unknown,
    }
    let enables = &part.enables[p.pin()];
    let comp = &cx.nl.components[p.comp()];
    let def = part
        .function
        .as_ref()
        .and_then(|(s, id)| cx.rules.functions.get(*s, id))
        .and_then(|f| f.pin(comp.pins[p.pin()].num(cx.nl)));
    let Some(def) = def.filter(|_| !enables.is_empty()) else {
        return Gate::Unknown;
    };
    let mut lits = Vec::new();
    for &e in enables {
        let name = part.table_names[e].as_deref().unwrap_or("");
        let want_high = if name.eq_ignore_ascii_case("DIR") {
            match def.name.chars().next() {
                Some('A') => false,
                Some('B') => true,
                _ => return Gate::Unknown,
            }
        } else {
            !def.enable_active_low
        };
        let Connection::Net { net, .. } = comp.pins[e].connection else {
            return Gate::Unknown;
        };
        let net = net as usize;
        match cx.nets[net].rail() {
            Some(r) => {
                let high = !r.ground && r.volts.is_none_or(|v| v > 0.0);
                if high != want_high {
                    return Gate::Never;
                }
            }
            None => lits.push(Literal {
                net,
                high: want_high,
                pin: e,
            }),
        }
    }
    if lits.is_empty() {
        Gate::Always
    } else {
        lits.sort();
        Gate::When(lits)
    }
}

/// True when two gated outputs are on together whenever either is: the same enable nets at
/// the same levels.
pub fn enabled_together(a: &[Literal], b: &[Literal]) -> bool {
    a.len() == b.len()
        && a.iter()
            .zip(b)
            .all(|(x, y)| x.net == y.net && x.high == y.high)
}

/// `U4.1 (1OE~) on /EN_A is low`
pub fn literal_text(cx: &Circuit<'_, '_>, comp: usize, l: &Literal, on: bool) -> String {
    let pin = PinRef::new(comp, l.pin);
    let name = cx.cl.parts[comp].table_names[l.pin]
        .as_deref()
        .map(|n| format!(" ({n})"))
        .unwrap_or_default();
    let level = if l.high == on { "high" } else { "low" };
    format!(
        "{}{name} on {} is {level}",
        cx.pin_name(pin),
        cx.net_name(l.net)
    )
}

/// True when a rail sits high (a supply above 0 V, or one of unknown voltage).
fn rail_high(r: &super::Rail) -> bool {
    !r.ground && r.volts.is_none_or(|v| v > 0.0)
}

/// Each pin's role once the wiring is known. A transceiver's data pin (bidirectional, with
/// an enable named `DIR`) whose direction pin is tied to a rail is an input on the side
/// that receives and a three-state output on the side that drives (SN74LS245 truth table:
/// DIR low, B data to A; DIR high, A data to B). Every other pin keeps the classifier's role,
/// and a part whose wiring changes no role shares the classifier's list.
pub fn wired_roles(
    nl: &crate::netlist::Netlist<'_>,
    cl: &crate::classify::classifier::Classified,
    rail: &super::RailsOf<&[super::NetModel]>,
) -> super::PerPart<Arc<[PinRole]>> {
    // a part's list is told by where it is: parts that share the classifier's list share
    // one entry
    let mut out = super::PerPartBuilder::with_capacity(nl.components.len());
    for (ci, c) in nl.components.iter().enumerate() {
        let part = &cl.parts[ci];
        // a copy only once a role changes
        let mut changed: Option<Vec<PinRole>> = None;
        for (pi, &role) in part.roles.iter().enumerate() {
            if role != PinRole::Bidirectional {
                continue;
            }
            let Some(dir) = part.enables[pi].iter().copied().find(|&e| {
                part.table_names[e]
                    .as_deref()
                    .is_some_and(|n| n.eq_ignore_ascii_case("DIR"))
            }) else {
                continue;
            };
            let Some(side) = part.table_names[pi]
                .as_deref()
                .and_then(|n| n.chars().next())
            else {
                continue;
            };
            let drives_when_high = match side {
                'A' => false,
                'B' => true,
                _ => continue,
            };
            let Some(r) = c.pins[dir].connection.net().and_then(|n| rail.get(n)) else {
                continue;
            };
            changed.get_or_insert_with(|| part.roles.to_vec())[pi] =
                if rail_high(&r) == drives_when_high {
                    PinRole::ThreeState
                } else {
                    PinRole::Input
                };
        }
        let roles: Arc<[PinRole]> = changed.map_or_else(|| part.roles.clone(), Arc::from);
        out.push(Arc::as_ptr(&roles) as *const PinRole as usize, || roles);
    }
    out.finish()
}
