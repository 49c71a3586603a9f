//! Finds pull-ups on open-collector nets outside the window the data books give:
//! R_min = (V_rail - VOL_max) / (IOL - sum IIL) and
//! R_max = (V_rail - VIH_min of the loads) / (sum IIH + sum off-state output leakage).
//! Below R_min the output cannot sink the pull-up's current plus the loads' and still
//! guarantee VOL (error); above R_max the loads' and outputs' leakage pulls the high level
//! below VIH (warning).
//!
//! Why it matters: too small a resistor overloads the output in the low state; too large a
//! one leaves the high level undefined and the rising edge slow.
//!
//! Example: a 74LS05 output (IOL 8 mA at 0.5 V) with one 74LS load and a 100 Ohm pull-up to
//! 5 V: R_min = (5.00 - 0.5) / (8 mA - 0.4 mA) = 592 Ohm.
//!
//! Fix: a value inside the window, nearer R_min for speed, nearer R_max for power.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "pull-up-out-of-range",
    severity: crate::diag::Severity::Error,
    summary: "a pull-up outside the window set by the output's IOL and the loads' currents",
};

use super::Context;
use crate::diag::Diag;
use crate::values::{format_amps, format_ohms, format_volts};

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for (net, b) in ctx.budgets.iter().enumerate() {
        let Some(w) = &b.window else { continue };
        let Some(fitted) = w.fitted else { continue };
        let nm = &cx.nets[net];
        let d = &nm.drivers[w.driver];
        let pulls: Vec<_> = nm.pulls().iter().filter(|p| p.up).collect();
        let names: Vec<String> = pulls
            .iter()
            .map(|p| cx.nl.components[p.resistor].reference.to_string())
            .collect();
        let window_text = match w.r_max {
            Some(rmax) => format!(
                "the window is {} to {}",
                format_ohms(w.r_min),
                format_ohms(rmax)
            ),
            None => format!("the minimum is {}", format_ohms(w.r_min)),
        };
        let rmin_text = format!(
            "R_min = ({} - {}) / ({} - {}) = {}",
            format_volts(w.v_high),
            format_volts(w.vol),
            format_amps(w.iol),
            format_amps(w.sum_iil),
            format_ohms(w.r_min)
        );
        let rmax_text = match (w.r_max, w.vih_max) {
            (Some(r), Some(vih)) => format!(
                "R_max = ({} - {}) / {} = {}",
                format_volts(w.v_low),
                format_volts(vih),
                format_amps(w.sum_high),
                format_ohms(r)
            ),
            _ => String::new(),
        };
        let mk = |sev_error: bool, msg: String| {
            let mut diag = if sev_error {
                Diag::error("pull-up-out-of-range", msg)
            } else {
                Diag::warning("pull-up-out-of-range", msg)
            };
            diag = diag.at(
                cx.pin_span(pulls[0].at),
                format!("{} to {}", format_ohms(fitted), cx.net_name(w.rail_net)),
            );
            diag = diag.also(cx.pin_span(d.at), "open-collector output");
            diag.on_net(cx.net_name(net))
                .with_pins(
                    pulls
                        .iter()
                        .map(|p| cx.pin_name(p.at))
                        .chain(std::iter::once(cx.pin_name(d.at))),
                )
                .with_help(format!(
                    "fit a pull-up between {} and {} to {}",
                    format_ohms(w.r_min),
                    w.r_max.map_or("any larger value".into(), format_ohms),
                    cx.net_name(w.rail_net)
                ))
        };
        if fitted < w.r_min {
            let sink = (w.v_high - w.vol) / fitted + w.sum_iil;
            out.push(mk(
                true,
                format!(
                    "pull-up {} ({}) on {} is below R_min: {}; with it the output must sink {} against IOL {} ({:.0}%); {}",
                    names.join(" || "),
                    format_ohms(fitted),
                    cx.describe(d.at),
                    rmin_text,
                    format_amps(sink),
                    format_amps(w.iol),
                    sink / w.iol * 100.0,
                    window_text
                ),
            ));
        } else if let Some(rmax) = w.r_max {
            if fitted > rmax {
                out.push(mk(
                    false,
                    format!(
                        "pull-up {} ({}) on {} is above R_max: {}; the high level falls to {} against VIH {}; {}",
                        names.join(" || "),
                        format_ohms(fitted),
                        cx.describe(d.at),
                        rmax_text,
                        format_volts((w.v_low - fitted * w.sum_high).max(0.0)),
                        format_volts(w.vih_max.unwrap_or(0.0)),
                        window_text
                    ),
                ));
            }
        }
    }
}
