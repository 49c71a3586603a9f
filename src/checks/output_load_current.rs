//! Finds CMOS outputs (74HC, HCT, AC, ACT, AHC, LV, LVC, 4000B and the CMOS chips around
//! them) whose LEDs or resistors draw more than the output is rated for, or more than it may
//! ever carry; and LED strings, on any output, whose forward voltages add up to more than the
//! output can reach, so they never light.
//!
//! The model solves each output's operating point: the output is its supply (or ground)
//! behind the resistance its data-sheet row implies, (VCC - VOH) / IOH in the high state and
//! VOL / IOL in the low state at the rated current; each LED path conducts (V - Vf) / R. The
//! guaranteed row is the weakest part the maker ships, so the current found is the least a
//! real part delivers and the level the furthest from its rail.
//!
//! Why it matters: a CMOS output guarantees its levels only up to its rated current (74HC:
//! 4 mA at 4.5 V); beyond its absolute maximum (74HC: 25 mA per pin) it may be damaged. An
//! output that lights an LED and also drives logic inputs loses its level when the LED pulls
//! it towards its forward voltage.
//!
//! Example: a 74HC04 output at 5 V lights a red LED through 100 Ohm to ground: the output's
//! resistance is (5.00 V - 4.34 V) / 4.40 mA = 150 Ohm, so (5.00 V - 1.70 V) / 250 Ohm =
//! 13.2 mA: 300 % of the rated IOH, within the 25 mA absolute maximum; the output then stands
//! at 3.02 V, below the 3.50 V a 74HC input needs.
//!
//! Severity: error over the absolute maximum (per pin, or per output transistor for the
//! 4000 series), or when a logic input on the same net loses its level; warning when only
//! the rated IOH or IOL is exceeded (levels are not guaranteed there; a rating exceeded by
//! pull resistors alone, or by LEDs sunk through a resistor, is `fanout-overrun`'s), and for LEDs that
//! never light (their forward voltages are typical figures: the message says which). A
//! display whose common is open today (`display-common-open`) lights nothing yet: its
//! segments are judged as wired, one step lower, and not at all when only the rating is
//! exceeded.
//!
//! Fix: a larger series resistor (the help computes the smallest E12 value within the
//! rating), or a driver made for the load (a 74HC595 sinks more than it sources; a ULN2003,
//! a transistor); for a string that never lights, fewer LEDs in series or a higher supply.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "output-load-current",
    severity: crate::diag::Severity::Error,
    summary: "a CMOS output whose LEDs or resistors draw beyond its rating or absolute maximum, or LEDs an output cannot light",
};

use super::common::pct;
use super::Context;
use crate::circuit::budget::{LoadKind, OperatingPoint, ResistiveLoad};
use crate::circuit::enables::{gate, Gate};
use crate::circuit::PinRef;
use crate::classify::family::Technology;
use crate::diag::{Diag, Severity};
use crate::values::{format_amps, format_ohms, format_volts, series_at_least, E12};

/// The smallest E12 resistor that keeps one load within `amps` when the output stands at
/// `v_out` (high: the load runs to `rail` below it; low: from `rail` above it) and the load
/// needs `vf`.
pub(super) fn resistor_within(
    high: bool,
    v_out: f64,
    vf: f64,
    rail: f64,
    amps: f64,
) -> Option<f64> {
    let v = if high {
        v_out - vf - rail
    } else {
        rail - vf - v_out
    };
    if amps <= 0.0 || v <= 0.0 {
        return None;
    }
    series_at_least(v / amps, &E12)
}

fn lower(s: Severity) -> Severity {
    match s {
        Severity::Error => Severity::Warning,
        _ => Severity::Info,
    }
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for (net, nm) in cx.nets.iter().enumerate() {
        for db in ctx.budgets.net(net).drivers {
            let d = &nm.drivers[db.driver()];
            if d.symbol_only || d.levels(cx).is_none() || gate(cx, d.at) == Gate::Never {
                continue;
            }
            for op in [db.drive_high(), db.drive_low()].into_iter().flatten() {
                dark(ctx, net, d.at, op, out);
                let cmos = cx
                    .family(d.at.comp())
                    .is_some_and(|f| f.technology == Technology::Cmos);
                if cmos {
                    current(ctx, net, db.driver(), op, out);
                }
            }
        }
    }
}

fn refs(ctx: &Context<'_, '_, '_>, ids: &[usize]) -> String {
    ids.iter()
        .map(|&i| ctx.cx.nl.components[i].reference.to_string())
        .collect::<Vec<_>>()
        .join(", ")
}

/// The parts of one load, for a message: `R3 and D2`, `R7`.
fn load_parts(
    ctx: &Context<'_, '_, '_>,
    net: usize,
    op: &OperatingPoint,
    l: &ResistiveLoad,
) -> String {
    let nm = &ctx.cx.nets[net];
    match l.kind {
        LoadKind::Led(i) => {
            let p = if op.high {
                &nm.led_paths()[i]
            } else {
                &nm.sink_paths()[i]
            };
            let mut ids = p.resistors.clone();
            ids.extend(&p.leds);
            refs(ctx, &ids)
        }
        LoadKind::Pull(i) => ctx.cx.nl.components[nm.pulls()[i].resistor]
            .reference
            .to_string(),
    }
}

fn open_note(ctx: &Context<'_, '_, '_>, l: &ResistiveLoad) -> String {
    match l.open_common {
        Some(c) => format!(
            " (once the common of {} is wired: it is open today, so nothing lights yet)",
            ctx.cx.nl.components[c].reference
        ),
        None => String::new(),
    }
}

/// LEDs whose forward voltages need more than the output reaches.
fn dark(
    ctx: &Context<'_, '_, '_>,
    net: usize,
    at: PinRef,
    op: &OperatingPoint,
    out: &mut crate::diag::DiagList,
) {
    let cx = ctx.cx;
    let nm = &cx.nets[net];
    for l in op.loads.iter().filter(|l| l.dark) {
        let l_at = l.at(nm, op.high);
        let parts = load_parts(ctx, net, op, l);
        let (need, reach) = if op.high {
            (
                format!(
                    "{} of forward voltage{}",
                    format_volts(l.vf),
                    if l.rail_volts == 0.0 {
                        String::new()
                    } else {
                        format!(" above {}", format_volts(l.rail_volts))
                    }
                ),
                format!("its high reaches at most {}", format_volts(op.reach)),
            )
        } else {
            (
                format!(
                    "{} of forward voltage from {}",
                    format_volts(l.vf),
                    format_volts(l.rail_volts)
                ),
                format!(
                    "which leaves {} while the output's low is at least {}",
                    format_volts(l.rail_volts - l.vf),
                    format_volts(op.reach)
                ),
            )
        };
        let sev = if l.open_common.is_some() {
            Severity::Info
        } else {
            Severity::Warning
        };
        let message = format!(
            "{} cannot light {parts}: the LEDs need {need}, and {reach}, so they never light{} (forward voltages are the typical figures of their colours, common practice: a string that needs more than the supply never conducts)",
            cx.describe(at),
            open_note(ctx, l)
        );
        out.push(
            Diag::new(INFO.id, sev, message)
                .at(cx.pin_span(l_at), "LEDs that never light")
                .on_net(cx.net_name(net))
                .with_pin_list(super::common::pin_names(cx, [at, l_at]))
                .also(cx.pin_span(at), "the output")
                .with_help(
                    "put fewer LEDs in series (or parallel strings, each with its own resistor), or drive the string from a higher supply through a transistor",
                ),
        );
    }
}

/// A CMOS output's current against its rating and absolute maximum, and the level it keeps.
fn current(
    ctx: &Context<'_, '_, '_>,
    net: usize,
    di: usize,
    op: &OperatingPoint,
    out: &mut crate::diag::DiagList,
) {
    let cx = ctx.cx;
    let nm = &cx.nets[net];
    let d = &nm.drivers[di];
    let lit: Vec<&ResistiveLoad> = op.loads.iter().filter(|l| l.amps > 0.0).collect();
    if lit.is_empty() {
        return;
    }
    let fam = cx.family(d.at.comp());
    let abs_i = fam.and_then(|f| f.output_abs_max_a);
    let abs_w = fam.and_then(|f| f.output_transistor_abs_max_w);
    let watts = op.total * (op.rail - op.level).abs();
    let over_abs_i = abs_i.is_some_and(|a| op.total > a);
    let over_abs_w = abs_w.is_some_and(|w| watts > w);
    // logic inputs on the net that the output no longer gives a level
    let lost: Vec<(PinRef, f64)> = ctx
        .budgets
        .net(net)
        .margins(cx, net)
        .filter(|m| m.driver == di)
        .filter_map(|m| {
            let short = if op.high {
                op.level < m.vih
            } else {
                op.level > m.vil
            };
            short.then(|| (nm.loads[m.load].at, if op.high { m.vih } else { m.vil }))
        })
        .collect();
    let over_rated = op.total > op.rating;
    let mut sev = if over_abs_i || over_abs_w || !lost.is_empty() {
        Severity::Error
    } else if over_rated {
        Severity::Warning
    } else {
        return;
    };
    // `fanout-overrun` budgets pull resistors in both states and LEDs with a resistor sunk from
    // a rail, at the rated level: a rating exceeded by those alone is its finding
    let budgeted = |l: &&ResistiveLoad| match l.kind {
        LoadKind::Pull(_) => true,
        LoadKind::Led(_) => !op.high && l.ohms > 0.0,
    };
    if sev == Severity::Warning && lit.iter().all(budgeted) {
        return;
    }
    let assumed = lit.iter().any(|l| l.open_common.is_some());
    let supply_known = cx.supplies[d.at.comp()].as_ref().is_some_and(|s| s.known);
    if assumed && sev == Severity::Warning {
        // a dark display's segments over the rating: `display-common-open` says enough
        return;
    }
    if assumed || (!supply_known && sev == Severity::Error) {
        sev = lower(sev);
    }
    let (state, i_name, v_name) = if op.high {
        ("high", "IOH", "VOH")
    } else {
        ("low", "IOL", "VOL")
    };
    let terms: Vec<String> = lit
        .iter()
        .map(|l| {
            let parts = load_parts(ctx, net, op, l);
            let drop = if l.vf > 0.0 {
                format!(" - {}", format_volts(l.vf))
            } else {
                String::new()
            };
            let (a, b) = if op.high {
                (format_volts(op.level), format_volts(l.rail_volts))
            } else {
                (format_volts(l.rail_volts), format_volts(op.level))
            };
            let b = if op.high && l.rail_volts == 0.0 {
                String::new()
            } else {
                format!(" - {b}")
            };
            if l.ohms > 0.0 {
                format!(
                    "{} through {parts} (({a}{b}{drop}) / {}){}",
                    format_amps(l.amps),
                    format_ohms(l.ohms),
                    open_note(ctx, l)
                )
            } else {
                format!(
                    "{} through {parts} with no series resistor (limited by the output alone){}",
                    format_amps(l.amps),
                    open_note(ctx, l)
                )
            }
        })
        .collect();
    let r_out = if op.high {
        format!(
            "({} - {}) / {} = {}",
            format_volts(op.rail),
            format_volts(op.row.0),
            format_amps(op.row.1),
            format_ohms(op.r_out)
        )
    } else {
        format!(
            "{} / {} = {}",
            format_volts(op.row.0),
            format_amps(op.row.1),
            format_ohms(op.r_out)
        )
    };
    let mut message = format!(
        "{} drives, in its {state} state, {}{}: {} through the output, against its rated {i_name} {} at {} ({} of it)",
        cx.describe(d.at),
        terms.join(" and "),
        if op.logic > 0.0 {
            format!(" plus {} of logic input current", format_amps(op.logic))
        } else {
            String::new()
        },
        format_amps(op.total),
        format_amps(op.rating),
        cx.supply_text(d.at.comp()),
        pct(op.total / op.rating.max(f64::MIN_POSITIVE))
    );
    if let Some(a) = abs_i {
        if over_abs_i {
            message.push_str(&format!(
                " and beyond its absolute maximum {} per output pin, by {}",
                format_amps(a),
                format_amps(op.total - a)
            ));
        } else {
            message.push_str(&format!(
                "; its absolute maximum is {} per output pin ({} margin)",
                format_amps(a),
                format_amps(a - op.total)
            ));
        }
    }
    if let Some(w) = abs_w {
        message.push_str(&format!(
            "; its output transistor dissipates {} x {} = {} against the absolute maximum {:.0} mW{}",
            format_amps(op.total),
            format_volts((op.rail - op.level).abs()),
            format!("{:.1} mW", watts * 1000.0),
            w * 1000.0,
            if over_abs_w { " (beyond it)" } else { "" }
        ));
    }
    message.push_str(&format!(
        ". The output's resistance, from its data-sheet row, is {r_out}; the pin then stands at {}",
        format_volts(op.level)
    ));
    if !lost.is_empty() {
        let names: Vec<String> = lost
            .iter()
            .map(|(p, v)| {
                format!(
                    "{} (V{}{} {})",
                    cx.pin_name(*p),
                    if op.high { "IH" } else { "IL" },
                    if op.high { " min" } else { " max" },
                    format_volts(*v)
                )
            })
            .collect();
        message.push_str(&format!(
            ", {} the level {}: {}",
            if op.high { "below" } else { "above" },
            if lost.len() == 1 {
                "the logic input on the net needs"
            } else {
                "the logic inputs on the net need"
            },
            names.join(", ")
        ));
    } else if over_rated {
        message.push_str(&format!(
            "; the data sheet guarantees {v_name} only up to the rated {i_name}"
        ));
    }
    if assumed {
        message.push_str(" (the display's common is open today, see display-common-open)");
    }
    // the fix: the smallest E12 resistor per load within the rating shared between the loads
    let share = (op.rating - op.logic).max(0.0) / lit.len() as f64;
    let fixes: Vec<String> = lit
        .iter()
        .filter_map(|l| {
            let r = resistor_within(op.high, op.row.0, l.vf, l.rail_volts, share)?;
            (r > l.ohms).then(|| format!("{} for {}", format_ohms(r), load_parts(ctx, net, op, l)))
        })
        .collect();
    let help = if fixes.is_empty() {
        "drive the load through a transistor or a driver made for it (a ULN2003 sinks 500 mA per channel)".to_string()
    } else {
        format!(
            "a series resistor of at least {} keeps the output within its rated {i_name} {} ({v_name} {}); or drive the load through a transistor or a driver made for it",
            fixes.join(", "),
            format_amps(op.rating),
            format_volts(op.row.0)
        )
    };
    let mut diag = Diag::new(INFO.id, sev, message)
        .at(
            cx.pin_span(d.at),
            format!(
                "{} {}",
                if op.high { "sources" } else { "sinks" },
                format_amps(op.total)
            ),
        )
        .on_net(cx.net_name(net))
        .with_pins(
            std::iter::once(cx.pin_name(d.at))
                .chain(lit.iter().map(|l| cx.pin_name(l.at(nm, op.high))))
                .chain(lost.iter().map(|(p, _)| cx.pin_name(*p))),
        );
    for l in &lit {
        diag = diag.also(cx.pin_span(l.at(nm, op.high)), "load");
    }
    out.push(diag.with_help(help));
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn resistor_for_a_74hc_led() {
        // 74HC at 4.5 V: VOH 3.84 V at -4 mA (onsemi MM74HC04); red LED 1.7 V (common
        // practice): (3.84 - 1.7) / 4 mA = 535 Ohm -> 560 Ohm (E12)
        assert_eq!(resistor_within(true, 3.84, 1.7, 0.0, 4e-3), Some(560.0));
        // low state, LED from 5 V: (5.0 - 1.7 - 0.33) / 4 mA = 742 Ohm -> 820 Ohm
        assert_eq!(resistor_within(false, 0.33, 1.7, 5.0, 4e-3), Some(820.0));
        assert_eq!(resistor_within(true, 3.0, 3.4, 0.0, 4e-3), None);
    }
}
