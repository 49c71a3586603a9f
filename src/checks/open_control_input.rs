//! Finds a control input of a processor, peripheral or memory that must be held and is left
//! open: a Z80's ~WAIT, ~INT, ~NMI, ~BUSRQ or ~RESET, an 8080's READY or HOLD, a 6502's RDY,
//! ~IRQ, ~NMI or SO, a 68000's ~BR or ~IPL lines, an EPROM's VPP or ~PGM, a RAM's ~WE, a 555's
//! ~RESET. The function table marks each such pin with the level at which the part runs
//! undisturbed (`idle`); the finding names it and the tie or pull resistor that holds it there.
//! These pins are left to this check by `floating-cmos-input` and `floating-ttl-input`, whose
//! general advice (tie to either rail) would be wrong for them.
//!
//! Why it matters: an open MOS input drifts; a processor whose ~WAIT or ~BUSRQ wanders low
//! stalls or gives its bus away, one whose ~NMI picks up noise jumps to its handler, an EPROM
//! whose ~PGM floats low is put in program mode. Tying such a pin to the wrong rail (the usual
//! fix for a spare gate input) halts the part outright.
//!
//! Example: a Z80's ~WAIT (pin 24) on no net: it must be held high; a pull-up to +5V of at most
//! 10 kOhm (the input leaks 10 uA and needs 2.0 V: up to 275 kOhm would hold it; 10 kOhm is the
//! usual value for a line an open-collector source may pull low, common practice).
//!
//! Fix: for a line something may drive (wait, interrupt, bus request), a pull-up (or pull-down)
//! of the computed value; for one nothing will ever drive, a straight tie to the rail named; for
//! ~RESET, the board's reset circuit.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "open-control-input",
    severity: crate::diag::Severity::Error,
    summary: "a processor's, peripheral's or memory's control input left open instead of held at its idle level",
};

use super::common::{ground_rail_name, supply_rail_name, Float};
use super::Context;
use crate::circuit::PinRef;
use crate::classify::family::Drive;
use crate::diag::Diag;
use crate::values::format_ohms;

/// Largest resistor that holds the input at its idle level against its own leakage, capped at
/// 10 kOhm (common practice: a value an open-collector source on the line can still pull
/// through, and fast enough for a control line).
fn pull_value(ctx: &Context<'_, '_, '_>, comp: usize, high: bool) -> Option<(f64, f64)> {
    let cx = ctx.cx;
    let fam = cx.family(comp)?;
    let vcc = cx.supplies[comp]
        .as_ref()
        .map_or(fam.supply_nominal, |s| s.vcc);
    let l = fam.levels(vcc, Drive::Standard);
    let r = if high {
        (vcc - l.vih_min) / l.iih_max.abs().max(1e-9)
    } else {
        l.vil_max / l.iil_max.abs().max(1e-9)
    };
    Some((r, r.min(10e3)))
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for (ci, c) in cx.nl.components.iter().enumerate() {
        let part = &cx.cl.parts[ci];
        if !part.is_logic() || part.function.is_none() {
            continue;
        }
        for (pi, p) in c.pins.iter().enumerate() {
            let Some(high) = ctx.cx.idle_level(ci, pi) else {
                continue;
            };
            if !cx.roles[ci][pi].is_input() {
                continue;
            }
            let Some(why) = super::common::floats(cx, p.connection) else {
                continue;
            };
            let at = PinRef::new(ci, pi);
            let name = part.table_names[pi].clone().unwrap_or_default();
            let level = if high { "high" } else { "low" };
            let how = match &why {
                Float::Absent => "is on no net".to_string(),
                Float::Alone(_) => "is connected to nothing".to_string(),
                Float::Undriven(net) => format!(
                    "is on net `{}`, which nothing drives (no output, rail or pull resistor)",
                    cx.net_name(*net)
                ),
                Float::SwitchOpen(net, _) => format!(
                    "is on net `{}`, which only a switch or jumper sets: open, it floats",
                    cx.net_name(*net)
                ),
            };
            let rail = if high {
                supply_rail_name(ctx, ci)
            } else {
                ground_rail_name(ctx, ci)
            };
            let help = match pull_value(ctx, ci, high) {
                Some((r, usual)) => format!(
                    "hold {name} {level}: a pull-{} to {rail} of at most {} (its leakage at the \
                     input's {} threshold allows up to {}), or, if nothing will ever drive it, a \
                     straight tie to {rail}",
                    if high { "up" } else { "down" },
                    format_ohms(usual),
                    if high { "high" } else { "low" },
                    format_ohms(r)
                ),
                None => format!("hold {name} {level}: tie or pull it to {rail}"),
            };
            let mut d = Diag::error(
                "open-control-input",
                format!(
                    "{} {how}: it is a control input that must be held {level} for {} ({}) to run",
                    cx.describe(at),
                    c.reference,
                    c.value_str()
                ),
            )
            .at(cx.pin_span(at), format!("must be held {level}"))
            .with_help(help)
            .with_pin_list(super::common::pin_names(cx, [at]));
            if let Float::Undriven(net) | Float::Alone(net) | Float::SwitchOpen(net, _) = why {
                d = d.on_net(cx.net_name(net));
            }
            out.push(d);
        }
    }
}
