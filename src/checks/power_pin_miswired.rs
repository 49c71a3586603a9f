//! Finds power pins on the wrong net, for any part, classified or not: a pin is a supply or
//! ground pin by the function table's pinout, else by its name on the symbol (`VCC`, `VDD`,
//! `V+`; `GND`, `VSS`, `VEE`, `V-`):
//!
//! - a ground pin on a positive rail;
//! - a supply pin on ground, on a negative rail, or on a signal net (a net that is not a
//!   rail and carries logic inputs or outputs); a ground pin on a signal net;
//! - a supply or ground pin on no net, for a part whose power pins come from its symbol
//!   (classified parts with a pinout: see `unpowered-part`);
//! - a classified logic part on a rail outside its family's supply range (a 74LS00 on
//!   +12V: the 74LS family runs from 4.75 V to 5.25 V).
//!
//! A supply pin on an unnamed net that holds only power pins and passives (a filtered local
//! supply, `Net-(L1-Pad2)`) is not reported: nothing says what it is.
//!
//! Why it matters: a part with its supply on ground is unpowered; with ground on a supply
//! it shorts the rail through the substrate; on the wrong voltage it is overstressed, or
//! its thresholds and drive are not the data book's.
//!
//! Example: a 74LS74 whose pin 14 (VCC) was drawn onto the GND net: both its power pins
//! are on ground, and its outputs are dead.
//!
//! Fix: move the pin to the rail the part's data sheet asks for (the message names one on
//! the board, and the family's supply range).

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "power-pin-miswired",
    severity: crate::diag::Severity::Error,
    summary: "a supply pin on ground, a ground pin on a supply, or a supply pin on no net",
};

use super::common::{concat, push_all, push_pin_name};
use super::Context;
use crate::circuit::{NetModel, PinRef};
use crate::classify::classifier::{is_ground_name, PartKind, RoleSource};
use crate::classify::PinRole;
use crate::diag::Diag;
use crate::diag::Piece::{Own, Said};
use crate::netlist::{Connection, PinType};
use crate::values::format_volts;

/// Which side of the supply a power pin belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Side {
    Supply,
    Ground,
}

/// A positive-supply pin name: `VCC`, `VCC1`, `VDD`, `VDDIO`, `V+`.
pub fn is_supply_name(name: &str) -> bool {
    let n = name.trim().to_ascii_uppercase();
    n.starts_with("VCC") || n.starts_with("VDD") || n == "V+"
}

/// The power side of a pin. With a pinout from the function table, its role says it. From
/// the symbol, the name says it (`VCC`, `VDD`, `V+`; `GND`, `VSS`, `VEE`, `V-`, `0V`), on a
/// pin typed power, passive or not at all: a pin typed power with another name (an exposed
/// pad `EP`, a regulator's `VI`) says nothing sure, and a `COM` pin (a driver array's clamp
/// common) goes to a supply.
pub fn side_of(role: PinRole, source: RoleSource, name: Option<&str>) -> Option<Side> {
    if source == RoleSource::Table {
        return match role {
            PinRole::Supply => Some(Side::Supply),
            PinRole::Ground => Some(Side::Ground),
            _ => None,
        };
    }
    if !matches!(
        role,
        PinRole::Supply | PinRole::Ground | PinRole::Unknown | PinRole::Passive
    ) {
        return None;
    }
    let name = name.unwrap_or("").trim();
    if is_supply_name(name) {
        Some(Side::Supply)
    } else if is_ground_name(name) && !name.eq_ignore_ascii_case("COM") {
        Some(Side::Ground)
    } else {
        None
    }
}

/// What a net is, as far as a power pin cares.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum NetKind {
    Ground,
    /// A positive rail, with its voltage when known.
    Positive(Option<f64>),
    Negative(Option<f64>),
    /// Not a rail, and logic inputs or outputs are on it.
    Signal,
    /// Not a rail, and nothing on it but power pins, passives and connectors.
    Unrailed,
}

/// Classifies a net: rails by their voltage (a rail with no voltage is negative when its
/// name is a negative-supply name such as `VEE`), other nets by what is on them.
pub fn net_kind(nm: &NetModel, name: &str) -> NetKind {
    match nm.rail() {
        Some(r) if r.ground => NetKind::Ground,
        Some(r) => match r.volts {
            Some(v) if v < 0.0 => NetKind::Negative(Some(v)),
            Some(0.0) => NetKind::Ground,
            Some(v) => NetKind::Positive(Some(v)),
            None if is_ground_name(name) => NetKind::Negative(None),
            None => NetKind::Positive(None),
        },
        None if !nm.drivers.is_empty() || !nm.loads.is_empty() => NetKind::Signal,
        None => NetKind::Unrailed,
    }
}

/// The fault of a power pin on a net of this kind, if any.
pub fn misplaced(side: Side, kind: NetKind) -> Option<&'static str> {
    match (side, kind) {
        (Side::Ground, NetKind::Positive(_)) => Some("positive rail"),
        (Side::Ground, NetKind::Signal) => Some("signal net"),
        (Side::Supply, NetKind::Ground) => Some("ground rail"),
        (Side::Supply, NetKind::Negative(_)) => Some("negative rail"),
        (Side::Supply, NetKind::Signal) => Some("signal net"),
        _ => None,
    }
}

/// True when a supply of `lo`..`hi` volts (the rail's worst-case ends) lies outside
/// `min`..`max`.
pub fn outside_range(lo: f64, hi: f64, min: f64, max: f64) -> bool {
    lo < min - 1e-9 || hi > max + 1e-9
}

fn rail_text(name: &str, v: Option<f64>) -> String {
    match v {
        Some(v) => format!("{name} ({})", format_volts(v)),
        None => name.to_string(),
    }
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    let mut rails = Suggestions::default();
    for (ci, c) in cx.nl.components.iter().enumerate() {
        let part = &cx.cl.parts[ci];
        if matches!(
            part.kind,
            PartKind::Resistor
                | PartKind::ResistorNetwork
                | PartKind::Capacitor
                | PartKind::Led
                | PartKind::Display
                | PartKind::Diode
                | PartKind::Connector
        ) {
            continue;
        }
        let mut wrong = false;
        for (pi, p) in c.pins.iter().enumerate() {
            if part.role_source[pi] != RoleSource::Table && p.ptype() == PinType::PowerOut {
                continue; // a power output makes its own rail
            }
            // a table's role says the side alone: the name is read only for other pins
            let source = part.role_source[pi];
            let name = if source == RoleSource::Table {
                None
            } else {
                p.name(cx.nl)
            };
            let Some(side) = side_of(part.roles[pi], source, name) else {
                continue;
            };
            let at = PinRef::new(ci, pi);
            let side_word = if side == Side::Supply {
                "supply"
            } else {
                "ground"
            };
            match p.connection {
                Connection::Net { net, .. } => {
                    let net = net as usize;
                    let nm = &cx.nets[net];
                    let name = super::common::net_name_of(cx, net);
                    let kind = net_kind(nm, &name);
                    let Some(fault) = misplaced(side, kind) else {
                        continue;
                    };
                    wrong = true;
                    // where the names of nets and pins are in `what`: a finding's own words,
                    // the rest is said alike by many
                    let mut owns: Vec<(usize, usize)> = Vec::new();
                    let (what, fix) = match kind {
                        NetKind::Signal => {
                            // `the signal net /S (driven by U1.3; read by U2.1, U3.4)`, the
                            // other parts' pins, up to three of each, written in place
                            let mut what = String::new();
                            push_all(&mut what, &["the ", fault, " "]);
                            owns.push((what.len(), what.len() + name.len()));
                            what.push_str(&name);
                            let mut open = false;
                            let mut list = |what: &mut String,
                                            word: &str,
                                            pins: &mut dyn Iterator<Item = PinRef>| {
                                for (i, q) in pins.filter(|q| q.comp() != ci).take(3).enumerate() {
                                    if i == 0 {
                                        what.push_str(if open { "; " } else { " (" });
                                        open = true;
                                        what.push_str(word);
                                    } else {
                                        what.push_str(", ");
                                    }
                                    let from = what.len();
                                    push_pin_name(what, cx, q);
                                    owns.push((from, what.len()));
                                }
                            };
                            list(
                                &mut what,
                                "driven by ",
                                &mut nm.drivers.iter().map(|d| d.at),
                            );
                            list(&mut what, "read by ", &mut nm.loads.iter().map(|l| l.at));
                            if open {
                                what.push(')');
                            }
                            (what, concat(&["move it to ", rails.get(ctx, ci, side)]))
                        }
                        NetKind::Positive(v) | NetKind::Negative(v) => (
                            format!("the {fault} {}", rail_text(&name, v)),
                            format!("move it to {}", rails.get(ctx, ci, side)),
                        ),
                        _ => (
                            format!("the {fault} {name}"),
                            format!("move it to {}", rails.get(ctx, ci, side)),
                        ),
                    };
                    let consequence = match (side, kind) {
                        (Side::Supply, NetKind::Ground) => ": the part has no supply",
                        (Side::Ground, NetKind::Positive(_)) => {
                            ": the rail is shorted through the part, or the part is unpowered"
                        }
                        _ => "",
                    };
                    // an unclassified part's pin names and types are a hint, never proof
                    let table = part.role_source[pi] == RoleSource::Table;
                    let mut d = if table {
                        // the message is given in pieces below
                        Diag::error("power-pin-miswired", String::new())
                    } else {
                        Diag::warning(
                            "power-pin-miswired",
                            format!(
                                "{} is on {what}{consequence} (by the symbol's pin name and type: {} is a part netmargin does not know)",
                                cx.describe(at),
                                c.reference
                            ),
                        )
                    }
                    .at(cx.pin_span(at), concat(&[side_word, " pin on the ", fault]))
                    .on_net(name)
                    .with_pin_list(super::common::pin_names(cx, [at]))
                    .with_help(fix);
                    if let NetKind::Signal = kind {
                        for q in nm
                            .drivers
                            .iter()
                            .map(|d| d.at)
                            .filter(|q| q.comp() != ci)
                            .take(2)
                        {
                            d = d.also(cx.pin_span(q), "drives the net");
                        }
                    }
                    if !table {
                        out.push(d);
                        continue;
                    }
                    // `U4 pin 14 (74LS04 supply pin VCC) is on {what}{consequence}`: the
                    // reference and the names in `what` are the finding's own words
                    let describe = cx.describe(at);
                    let (reference, pin) = describe.split_at(c.reference.as_str().len());
                    let mut pieces = vec![Own(reference), Said(pin), Said(" is on ")];
                    let mut from = 0;
                    for &(a, b) in &owns {
                        pieces.extend([Said(&what[from..a]), Own(&what[a..b])]);
                        from = b;
                    }
                    pieces.extend([Said(&what[from..]), Said(consequence)]);
                    out.push_pieces(&d, &pieces);
                }
                // a supply pin alone on a rail net (one power symbol on one chip) is on the rail
                Connection::Alone { net, .. } if cx.nets[net as usize].rail().is_some() => {}
                Connection::Alone { .. } | Connection::Absent
                    if part.role_source[pi] != RoleSource::Table =>
                {
                    wrong = true;
                    let how = if matches!(p.connection, Connection::Absent) {
                        "is on no net (its unit was never placed, or the pin is not in the netlist)"
                    } else if p.no_connect() {
                        "carries a no-connect flag, which leaves it open"
                    } else {
                        "is placed but wired to nothing"
                    };
                    // another pin of the same kind on a rail: an alternate or duplicate supply
                    // pin (a part with two supply inputs, used one at a time)
                    let other_on_rail = c.pins.iter().enumerate().any(|(qi, q)| {
                        qi != pi
                            && side_of(part.roles[qi], part.role_source[qi], q.name(cx.nl))
                                == Some(side)
                            && q.connection
                                .net()
                                .is_some_and(|n| cx.nets[n].rail().is_some())
                    });
                    let d = if other_on_rail {
                        Diag::info(
                            "power-pin-miswired",
                            format!(
                                "{} {how}, while another {side_word} pin of {} is on a rail: an alternate {side_word} input may be meant to stay open (by the symbol's pin names; {} is a part netmargin does not know)",
                                cx.describe(at),
                                c.reference,
                                c.reference
                            ),
                        )
                    } else {
                        Diag::warning(
                            "power-pin-miswired",
                            format!(
                                "{} {how}: the part is not powered through it (by the symbol's pin name and type: {} is a part netmargin does not know)",
                                cx.describe(at),
                                c.reference
                            ),
                        )
                    };
                    out.push(
                        d.at(
                            cx.pin_span(at),
                            if matches!(p.connection, Connection::Absent) {
                                format!("{side_word} pin on no net")
                            } else {
                                format!("{side_word} pin wired to nothing")
                            },
                        )
                        .with_pin_list(super::common::pin_names(cx, [at]))
                        .with_help(format!("wire it to {}", rails.get(ctx, ci, side))),
                    );
                }
                _ => {}
            }
        }
        if !wrong {
            supply_range(ctx, ci, out);
        }
    }
}

/// A classified logic part on a rail outside its family's supply range.
fn supply_range(ctx: &Context<'_, '_, '_>, ci: usize, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    let part = &cx.cl.parts[ci];
    let Some(fam) = cx.family(ci).filter(|_| part.is_logic()) else {
        return;
    };
    let c = &cx.nl.components[ci];
    let rail_v = |pi: usize| {
        c.pins[pi]
            .connection
            .net()
            .and_then(|n| cx.nets[n].rail().and_then(|r| r.v()).map(|v| (n, v)))
    };
    let Some((spi, (snet, sv))) = (0..c.pins.len())
        .filter(|&pi| part.roles[pi] == PinRole::Supply)
        .find_map(|pi| rail_v(pi).map(|x| (pi, x)))
    else {
        return;
    };
    let ground_v = (0..c.pins.len())
        .filter(|&pi| part.roles[pi] == PinRole::Ground)
        .filter_map(|pi| rail_v(pi).map(|x| x.1))
        .fold(None, |m: Option<f64>, v| Some(m.map_or(v, |m| m.max(v))))
        .unwrap_or(0.0);
    let (lo, hi) = cx.rail_range(sv);
    let (lo, hi) = (lo - ground_v, hi - ground_v);
    if !outside_range(lo, hi, fam.supply_min, fam.supply_max) {
        return;
    }
    let at = PinRef::new(ci, spi);
    let level = if (hi - lo).abs() < 1e-12 {
        format_volts(hi)
    } else {
        format!(
            "{} to {} with the rail tolerance",
            format_volts(lo),
            format_volts(hi)
        )
    };
    let across = if ground_v == 0.0 {
        String::new()
    } else {
        format!(" above its ground rail at {}", format_volts(ground_v))
    };
    let nominal = sv - ground_v;
    let others: Vec<String> = cx
        .rules
        .families
        .iter()
        .filter(|f| {
            f.id != fam.id && f.supply_min <= nominal + 1e-9 && f.supply_max >= nominal - 1e-9
        })
        .take(3)
        .map(|f| {
            format!(
                "{} ({} to {})",
                f.id,
                format_volts(f.supply_min),
                format_volts(f.supply_max)
            )
        })
        .collect();
    let alt = if others.is_empty() {
        String::new()
    } else {
        format!(
            ", or use a family rated for {}: {}",
            format_volts(nominal),
            others.join(", ")
        )
    };
    out.push(
        Diag::error(
            "power-pin-miswired",
            format!(
                "{} ({}, a {} part) is supplied from {} at {level}{across}, outside the {} supply range {} to {}",
                c.reference.as_str(),
                c.value_str(),
                fam.id,
                cx.net_name(snet),
                fam.id,
                format_volts(fam.supply_min),
                format_volts(fam.supply_max)
            ),
        )
        .at(cx.pin_span(at), format!("{} supply pin on {}", fam.id, cx.net_name(snet)))
        .on_net(cx.net_name(snet))
        .with_pin_list(super::common::pin_names(cx, [at]))
        .with_help(format!("run it from a rail within {} to {}{alt}", format_volts(fam.supply_min), format_volts(fam.supply_max))),
    );
}

/// The rails [`suggest_rail`] names, made once per family and side: the words depend on
/// nothing else, and a board has many parts of one family.
#[derive(Default)]
struct Suggestions<'n>(rustc_hash::FxHashMap<(Option<&'n str>, Side), String>);

impl<'n> Suggestions<'n> {
    fn get(&mut self, ctx: &Context<'_, 'n, '_>, ci: usize, side: Side) -> &str {
        let cx = ctx.cx;
        let cl: &'n crate::classify::classifier::Classified = cx.cl;
        let part = &cl.parts[ci];
        // the family the suggestion reads, as `suggest_rail` reads it
        let family = part
            .family
            .as_deref()
            .filter(|_| side == Side::Supply && part.is_logic());
        self.0
            .entry((family, side))
            .or_insert_with(|| suggest_rail(ctx, ci, side))
    }
}

/// A rail on the board for a power pin of this part: for a supply pin of a classified
/// logic part, a rail within its family's range (the nominal voltage first); for a ground
/// pin, a ground rail.
fn suggest_rail(ctx: &Context<'_, '_, '_>, ci: usize, side: Side) -> String {
    let cx = ctx.cx;
    match side {
        Side::Ground => ctx
            .rails
            .find(|r| r.ground)
            .map(|(n, _)| cx.net_name(n))
            .unwrap_or_else(|| "the ground rail".into()),
        Side::Supply => {
            let Some(fam) = cx.family(ci).filter(|_| cx.cl.parts[ci].is_logic()) else {
                return "the part's positive supply".into();
            };
            let fits = |v: f64| v >= fam.supply_min - 1e-9 && v <= fam.supply_max + 1e-9;
            let nominal = ctx.rails.find(|r| {
                r.volts
                    .is_some_and(|v| (v - fam.supply_nominal).abs() < 1e-9)
            });
            let any = ctx.rails.find(|r| !r.ground && r.volts.is_some_and(fits));
            let range = format!(
                "the {} family runs from {} to {}",
                fam.id,
                format_volts(fam.supply_min),
                format_volts(fam.supply_max)
            );
            match nominal.or(any) {
                Some((n, r)) => format!(
                    "{} ({}; {range})",
                    cx.net_name(n),
                    format_volts(r.volts.unwrap_or(fam.supply_nominal))
                ),
                None => format!("a rail within its supply range ({range})"),
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::{Rail, RailSource};

    fn rail(volts: Option<f64>, ground: bool) -> NetModel {
        let mut nm = NetModel::default();
        nm.set_rail(Some(Rail {
            volts,
            ground,
            source: RailSource::Name,
        }));
        nm
    }

    #[test]
    fn names() {
        for n in ["VCC", "vcc", "VCC1", "VDD", "VDDIO", "V+"] {
            assert!(is_supply_name(n), "{n}");
        }
        for n in ["VEE", "GND", "VS", "VOUT", "VIN", "CLK"] {
            assert!(!is_supply_name(n), "{n}");
        }
    }

    #[test]
    fn sides() {
        assert_eq!(
            side_of(PinRole::Supply, RoleSource::Table, Some("VCC")),
            Some(Side::Supply)
        );
        assert_eq!(
            side_of(PinRole::Ground, RoleSource::Table, Some("GND")),
            Some(Side::Ground)
        );
        assert_eq!(
            side_of(PinRole::Input, RoleSource::Table, Some("VCC")),
            None
        );
        assert_eq!(
            side_of(PinRole::Ground, RoleSource::Netlist, Some("COM")),
            None
        );
        assert_eq!(
            side_of(PinRole::Unknown, RoleSource::Unknown, Some("VDD")),
            Some(Side::Supply)
        );
        assert_eq!(
            side_of(PinRole::Passive, RoleSource::Netlist, Some("GND")),
            Some(Side::Ground)
        );
        assert_eq!(
            side_of(PinRole::Ground, RoleSource::Netlist, Some("V-")),
            Some(Side::Ground)
        );
        assert_eq!(
            side_of(PinRole::Supply, RoleSource::Netlist, Some("V+")),
            Some(Side::Supply)
        );
        // a power pin with a name that says neither side
        assert_eq!(
            side_of(PinRole::Supply, RoleSource::Netlist, Some("EP")),
            None
        );
        assert_eq!(
            side_of(PinRole::Supply, RoleSource::Netlist, Some("VI")),
            None
        );
        assert_eq!(
            side_of(PinRole::Input, RoleSource::Netlist, Some("VCC")),
            None
        );
        assert_eq!(
            side_of(PinRole::Unknown, RoleSource::Unknown, Some("A1")),
            None
        );
    }

    #[test]
    fn kinds_and_faults() {
        assert_eq!(net_kind(&rail(Some(0.0), true), "GND"), NetKind::Ground);
        assert_eq!(
            net_kind(&rail(Some(5.0), false), "+5V"),
            NetKind::Positive(Some(5.0))
        );
        assert_eq!(
            net_kind(&rail(Some(-12.0), false), "-12V"),
            NetKind::Negative(Some(-12.0))
        );
        assert_eq!(net_kind(&rail(None, false), "VEE"), NetKind::Negative(None));
        assert_eq!(net_kind(&rail(None, false), "VCC"), NetKind::Positive(None));
        assert_eq!(
            net_kind(&NetModel::default(), "Net-(L1-Pad2)"),
            NetKind::Unrailed
        );

        assert!(misplaced(Side::Ground, NetKind::Positive(Some(5.0))).is_some());
        assert!(misplaced(Side::Supply, NetKind::Ground).is_some());
        assert!(misplaced(Side::Supply, NetKind::Negative(None)).is_some());
        assert!(misplaced(Side::Supply, NetKind::Signal).is_some());
        assert!(misplaced(Side::Ground, NetKind::Signal).is_some());
        // near misses: where these pins belong, or where nothing says what the net is
        assert!(misplaced(Side::Supply, NetKind::Positive(Some(5.0))).is_none());
        assert!(misplaced(Side::Ground, NetKind::Ground).is_none());
        assert!(misplaced(Side::Ground, NetKind::Negative(Some(-5.0))).is_none());
        assert!(misplaced(Side::Supply, NetKind::Unrailed).is_none());
    }

    #[test]
    fn range_edges() {
        // TI SDLS025B (SN74LS00) recommended VCC 4.75 V to 5.25 V
        assert!(!outside_range(4.75, 5.25, 4.75, 5.25));
        assert!(outside_range(4.5, 5.5, 4.75, 5.25));
        assert!(outside_range(12.0, 12.0, 4.75, 5.25));
        assert!(outside_range(3.3, 3.3, 4.75, 5.25));
    }
}
