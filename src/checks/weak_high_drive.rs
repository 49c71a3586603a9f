//! Finds TTL outputs whose high state must source a load other than logic inputs: an LED and
//! its series resistor to ground (or LEDs in series). The current is (VOH - n x Vf) / R,
//! added to the logic loads' IIH, against the output's rated IOH. Above the derating (80 %
//! unless configured) it is reported.
//!
//! Why it matters: a bipolar totem-pole output is strong low and weak high (a 74LS output is
//! rated to sink 8 mA but to source only 0.4 mA). Sourcing an LED pulls the high level down
//! into the loads' undefined band, and the LED is dim.
//!
//! Example: a 74LS04 output, 330 Ohm and a red LED to ground: (2.7 V - 1.7 V) / 330 Ohm =
//! 3.0 mA against IOH 0.4 mA (758 %).
//!
//! Fix: sink the LED instead: LED and resistor from the supply to the output, which lights it
//! in the low state (within IOL: the message computes the resistor); or drive it from an
//! open-collector buffer (a 7406 or 7407 sinks 40 mA).
//!
//! The LED's forward voltage is the model's (`1.7 V` for a red LED unless configured: common
//! practice). An LED whose anode and cathode can be told from its pin names (A, K) and that is
//! reversed (cathode towards the output) never conducts from the high state and is skipped.
//! A display segment is an LED to the display's common; a common cathode left open is taken
//! as wired to ground, and the message says the display is dark until it is.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "weak-high-drive",
    severity: crate::diag::Severity::Warning,
    summary: "a TTL output that must source a non-logic load (an LED to ground) in its high state",
};

use super::common::pct;
use super::Context;
use crate::circuit::enables::gate;
use crate::circuit::enables::Gate;
use crate::circuit::{Circuit, LedPath, PinRef};
use crate::classify::classifier::PartKind;
use crate::classify::PinRole;
use crate::diag::Diag;
use crate::netlist::Connection;
use crate::values::{format_amps, format_ohms, format_volts};
use crate::values::{series_at_least, E12};

/// Which way an LED is wired on a path from the output to ground.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Polarity {
    /// Anode towards the output: it conducts from the high state.
    Forward,
    /// Cathode towards the output.
    Reversed,
    /// The pin names do not say.
    Unknown,
}

/// An LED pin's side from its name: `A` / `anode` / `+`, `K` / `C` / `cathode` / `-`.
pub(super) fn pin_side(name: &str) -> Option<bool> {
    match name.trim().to_ascii_uppercase().as_str() {
        "A" | "ANODE" | "+" => Some(true),
        "K" | "C" | "CATHODE" | "-" => Some(false),
        _ => None,
    }
}

/// The polarity of every LED on the path, walking it from the output as the model does.
fn polarities(cx: &Circuit<'_, '_>, path: &LedPath) -> Vec<Polarity> {
    let nl = cx.nl;
    let mut out = Vec::new();
    let mut cur = path.at;
    for _ in 0..(path.leds.len() + path.resistors.len()) {
        let c = &nl.components[cur.comp()];
        if c.pins.len() != 2 {
            break;
        }
        if cx.cl.parts[cur.comp()].kind == PartKind::Led {
            let side = c.pins[cur.pin()].name(nl).and_then(pin_side);
            out.push(match side {
                Some(true) => Polarity::Forward,
                Some(false) => Polarity::Reversed,
                None => Polarity::Unknown,
            });
        }
        let Connection::Net { net, .. } = c.pins[1 - cur.pin()].connection else {
            break;
        };
        let net = net as usize;
        if cx.nets[net].rail().is_some() {
            break;
        }
        let Some(next) = nl.nets[net]
            .nodes(nl)
            .iter()
            .find(|n| n.component() != Some(cur.comp() as u32))
        else {
            break;
        };
        let Some(ci) = next.component().map(|c| c as usize) else {
            break;
        };
        let Some(pi) = nl.components[ci]
            .pins
            .iter()
            .position(|p| p.num(nl) == next.pin(nl))
        else {
            break;
        };
        cur = PinRef::new(ci, pi);
    }
    out
}

/// The current the high state sends down the path: (VOH - Vf) / R, zero when the LEDs need
/// more than VOH, infinite with no resistor.
pub(super) fn led_current(voh: f64, vf: f64, ohms: f64) -> f64 {
    let v = voh - vf;
    if v <= 0.0 {
        0.0
    } else if ohms <= 0.0 {
        f64::INFINITY
    } else {
        v / ohms
    }
}

/// The series resistor for sinking the LED from `vcc` into an output at `vol`, within
/// `available` amperes: the next E12 value up from (VCC - Vf - VOL) / available.
pub(super) fn sink_resistor(vcc: f64, vf: f64, vol: f64, available: f64) -> Option<f64> {
    let v = vcc - vf - vol;
    if v <= 0.0 || available <= 0.0 {
        return None;
    }
    series_at_least(v / available, &E12)
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for (net, nm) in cx.nets.iter().enumerate() {
        if nm.led_paths().is_empty() {
            continue;
        }
        let paths: Vec<&LedPath> = nm
            .led_paths()
            .iter()
            .filter(|p| !polarities(cx, p).contains(&Polarity::Reversed))
            .collect();
        if paths.is_empty() {
            continue;
        }
        for (di, d) in nm.drivers.iter().enumerate() {
            if !matches!(
                d.role,
                PinRole::PushPull | PinRole::ThreeState | PinRole::Bidirectional
            ) || !ctx.cx.ttl_output(d.at.comp())
                || gate(cx, d.at) == Gate::Never
            {
                continue;
            }
            let Some(lv) = d.levels(cx) else { continue };
            let voh = lv.voh.first().map_or(2.4, |p| p.v);
            let ioh = lv.ioh_max.abs();
            let db = ctx
                .budgets
                .net(net)
                .drivers
                .iter()
                .find(|b| b.driver() == di);
            let logic = db.and_then(|b| b.high()).map_or(0.0, |h| h.total);
            let currents: Vec<f64> = paths
                .iter()
                .map(|p| led_current(voh, p.vf, p.ohms))
                .collect();
            let led: f64 = currents.iter().sum();
            let total = led + logic;
            if led <= 0.0 || ioh <= 0.0 || total <= ctx.opts.derating * ioh {
                continue;
            }
            out.push(diag(ctx, net, di, &paths, &currents, voh, logic));
        }
    }
}

fn diag(
    ctx: &Context<'_, '_, '_>,
    net: usize,
    di: usize,
    paths: &[&LedPath],
    currents: &[f64],
    voh: f64,
    logic: f64,
) -> Diag {
    let cx = ctx.cx;
    let nm = &cx.nets[net];
    let d = &nm.drivers[di];
    let lv = d.levels(cx).expect("checked by the caller");
    let ioh = lv.ioh_max.abs();
    let led: f64 = currents.iter().sum();
    let total = led + logic;
    let refs = |ids: &[usize]| {
        ids.iter()
            .map(|&i| cx.nl.components[i].reference.to_string())
            .collect::<Vec<_>>()
            .join(", ")
    };
    let terms: Vec<String> = paths
        .iter()
        .zip(currents)
        .map(|(p, i)| {
            let via = if p.resistors.is_empty() {
                String::new()
            } else {
                format!(" through {}", refs(&p.resistors))
            };
            let open = match p.open_common {
                Some(c) => format!(
                    " (once the common of {} is wired: it is open today, so nothing lights yet)",
                    cx.nl.components[c].reference
                ),
                None => String::new(),
            };
            if p.ohms > 0.0 {
                format!(
                    "({} - {}) / {} = {} into {}{via}{open}",
                    format_volts(voh),
                    format_volts(p.vf),
                    format_ohms(p.ohms),
                    format_amps(*i),
                    refs(&p.leds)
                )
            } else {
                format!(
                    "{} with no series resistor (limited only by the output stage){open}",
                    refs(&p.leds)
                )
            }
        })
        .collect();
    let inputs = if logic > 0.0 {
        format!(", plus {} of input current (IIH)", format_amps(logic))
    } else {
        String::new()
    };
    let ratio = if !total.is_finite() {
        String::new()
    } else if total > ioh {
        format!(": {} of the rating", pct(total / ioh))
    } else {
        format!(
            ": {} of the rating, above the {} derating",
            pct(total / ioh),
            pct(ctx.opts.derating)
        )
    };
    let level = match lv.voh_at(-total) {
        Some(v) => format!("; the guaranteed high level there is {}", format_volts(v)),
        None => "; no high level is guaranteed at that current: the high collapses towards the LED's forward voltage".to_string(),
    };
    let message = format!(
        "{} must source, in the high state, {}{inputs}, against its rated IOH {} at {}{ratio}{level}",
        cx.describe(d.at),
        terms.join(" and "),
        format_amps(ioh),
        cx.supply_text(d.at.comp())
    );
    // the fix: sink the LED from the supply, within the derated IOL less the inputs' IIL
    let vcc = cx.supplies[d.at.comp()].as_ref().map_or(5.0, |s| s.vcc);
    let vol = lv.vol.last().map_or(0.4, |p| p.v);
    let iol = lv.iol_max.abs();
    let low_inputs = ctx
        .budgets
        .net(net)
        .drivers
        .iter()
        .find(|b| b.driver() == di)
        .and_then(|b| b.low())
        .map_or(0.0, |l| l.total);
    let vf = paths[0].vf;
    let available = (ctx.opts.derating * iol - low_inputs) / paths.len() as f64;
    let rail = super::common::supply_rail_name(ctx, d.at.comp());
    let sink = match sink_resistor(vcc, vf, vol, available) {
        Some(r) => {
            let i = (vcc - vf - vol) / r;
            format!(
                "sink the LED instead: LED and {} from {rail} to the output, which lights it in the low state (inverting the logic): ({} - {} - {}) / {} = {}, within IOL {} at the {} derating",
                format_ohms(r),
                format_volts(vcc),
                format_volts(vf),
                format_volts(vol),
                format_ohms(r),
                format_amps(i),
                format_amps(iol),
                pct(ctx.opts.derating)
            )
        }
        None => "sink the LED from the supply into the output's low state instead".to_string(),
    };
    let mut diag = Diag::warning("weak-high-drive", message)
        .at(
            cx.pin_span(d.at),
            format!(
                "sources {}",
                if total.is_finite() {
                    format_amps(total)
                } else {
                    "unlimited current".into()
                }
            ),
        )
        .on_net(cx.net_name(net))
        .with_pins(
            std::iter::once(cx.pin_name(d.at)).chain(paths.iter().map(|p| cx.pin_name(p.at))),
        );
    for p in paths {
        diag = diag.also(cx.pin_span(p.at), "LED path to ground");
    }
    diag.with_help(format!(
        "{sink}; or drive it from an open-collector buffer (a 7406 or 7407 sinks 40 mA)"
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn led_current_from_a_74ls_high() {
        // TI SDLS025B SN74LS00: VOH 2.7 V at -0.4 mA; red LED 1.7 V (common practice)
        let i = led_current(2.7, 1.7, 330.0);
        assert!((i - 3.0303e-3).abs() < 1e-6);
        // 758 % of IOH 0.4 mA
        assert_eq!(pct(i / 0.4e-3), "758%");
        // two red LEDs need 3.4 V, more than the guaranteed high
        assert_eq!(led_current(2.7, 3.4, 330.0), 0.0);
        assert!(led_current(2.7, 1.7, 0.0).is_infinite());
    }

    #[test]
    fn sinking_resistor_stays_within_the_derated_iol() {
        // 74LS IOL 8 mA at VOL 0.5 V (TI SDLS025B), 80 % derating: 6.4 mA;
        // (5.0 - 1.7 - 0.5) / 6.4 mA = 437.5 Ohm -> 470 Ohm (E12), 5.96 mA
        let r = sink_resistor(5.0, 1.7, 0.5, 0.8 * 8e-3).unwrap();
        assert_eq!(r, 470.0);
        assert!(((5.0 - 1.7 - 0.5) / r - 5.957e-3).abs() < 1e-5);
        assert_eq!(sink_resistor(2.0, 1.7, 0.5, 1e-3), None);
    }

    #[test]
    fn led_pin_names() {
        assert_eq!(pin_side("A"), Some(true));
        assert_eq!(pin_side("K"), Some(false));
        assert_eq!(pin_side("cathode"), Some(false));
        assert_eq!(pin_side("~"), None);
        assert_eq!(pin_side("1"), None);
    }
}
