//! `netmargin net FILE NET`: one net's whole DC budget, laid out the way an engineer checks
//! it by hand, from the same numbers the checks use.

use std::io::{self, Write};

use crate::circuit::budget::{Item, LoadKind, NetBudgetRef, StateBudget};
use crate::circuit::Circuit;
use crate::text::sanitize;
use crate::values::{format_amps, format_ohms, format_volts};

fn state(
    out: &mut dyn Write,
    cx: &Circuit<'_, '_>,
    name: &str,
    verb: &str,
    sb: &StateBudget,
    items: &[Item],
) -> io::Result<()> {
    writeln!(
        out,
        "    {name} state: must {verb} {} against a rating of {} ({:.0}%)",
        format_amps(sb.total),
        format_amps(sb.rating),
        sb.ratio() * 100.0
    )?;
    for it in items {
        writeln!(
            out,
            "      {:>10}  {}",
            format_amps(it.amps),
            sanitize(&it.describe(cx))
        )?;
    }
    match sb.level {
        Some(v) => writeln!(
            out,
            "      guaranteed {} level at that current: {}",
            if name == "low" { "VOL max" } else { "VOH min" },
            format_volts(v)
        ),
        None => writeln!(
            out,
            "      no level is guaranteed at that current (beyond the published rows)"
        ),
    }
}

/// Writes net `net` of the circuit with its budget `b` (the one the checks read).
pub fn write_net(
    out: &mut dyn Write,
    cx: &Circuit<'_, '_>,
    b: NetBudgetRef<'_>,
    net: usize,
) -> io::Result<()> {
    let nm = &cx.nets[net];
    writeln!(out, "net {}", sanitize(&cx.net_name(net)))?;
    if let Some(r) = nm.rail() {
        writeln!(
            out,
            "  a rail: {}",
            r.v().map_or("voltage unknown".into(), format_volts)
        )?;
    }
    writeln!(out, "  drivers:")?;
    if nm.drivers.is_empty() {
        writeln!(out, "    (none)")?;
    }
    for d in &nm.drivers {
        let fam = d.family(cx).unwrap_or("unknown family");
        let oc = d.role == crate::classify::PinRole::OpenCollector;
        let ratings = d.levels(cx).map_or(String::new(), |l| {
            if oc {
                return format!(
                    "; IOL {} (VOL {}), off-state leakage {}, {}",
                    format_amps(l.iol_max),
                    l.vol
                        .iter()
                        .map(|p| format!("{:.2} V @ {}", p.v, format_amps(p.a)))
                        .collect::<Vec<_>>()
                        .join(", "),
                    format_amps(l.oc_leakage),
                    l.basis.describe()
                );
            }
            format!(
                "; IOL {} (VOL {}), IOH {} (VOH {}), {}",
                format_amps(l.iol_max),
                l.vol
                    .iter()
                    .map(|p| format!("{:.2} V @ {}", p.v, format_amps(p.a)))
                    .collect::<Vec<_>>()
                    .join(", "),
                format_amps(l.ioh_max),
                l.voh
                    .iter()
                    .map(|p| format!("{:.2} V @ {}", p.v, format_amps(p.a)))
                    .collect::<Vec<_>>()
                    .join(", "),
                l.basis.describe()
            )
        });
        writeln!(
            out,
            "    {} [{}, {}] at {}{}",
            sanitize(&cx.describe(d.at)),
            d.role,
            fam,
            sanitize(&cx.supply_text(d.at.comp())),
            ratings
        )?;
    }
    writeln!(out, "  loads:")?;
    if nm.loads.is_empty() {
        writeln!(out, "    (none)")?;
    }
    for l in &nm.loads {
        let fig = l.levels(cx).map_or("no family data".to_string(), |lv| {
            // an input that draws more than one unit load shows its own currents
            let (low, high) = l.unit_loads(cx);
            let units = if low != 1.0 || high != 1.0 {
                format!(" ({low} and {high} unit loads, low and high)")
            } else {
                String::new()
            };
            format!(
                "VIH {} VIL {} IIH {} IIL {}{units}",
                format_volts(lv.vih_min),
                format_volts(lv.vil_max),
                format_amps(lv.iih_max * high),
                format_amps(lv.iil_max * low)
            )
        });
        writeln!(
            out,
            "    {} [{}]: {}",
            sanitize(&cx.describe(l.at)),
            l.family(cx).unwrap_or("unknown family"),
            fig
        )?;
    }
    if !nm.pulls().is_empty() {
        writeln!(out, "  pull resistors:")?;
        for p in nm.pulls() {
            writeln!(
                out,
                "    {} {} to {} ({})",
                sanitize(cx.nl.components[p.resistor].reference.as_str()),
                format_ohms(p.ohms),
                sanitize(&cx.net_name(p.rail_net)),
                format_volts(p.rail_volts)
            )?;
        }
    }
    for ci in cx.unreadable(net) {
        // the model lists a resistor here only when its reading is an error
        let Some(Err(e)) = cx.resistor_value(ci) else {
            continue;
        };
        writeln!(
            out,
            "  unreadable resistor value: {} `{}`: {}",
            cx.nl.components[ci].reference,
            sanitize(cx.nl.components[ci].value_str()),
            e
        )?;
    }
    for j in &nm.connectors {
        writeln!(out, "  leaves the board through {}", cx.pin_name(*j))?;
    }
    for p in nm.led_paths() {
        writeln!(
            out,
            "  LED load: {} LED(s), {} in series to ground (Vf {} assumed)",
            p.leds.len(),
            format_ohms(p.ohms),
            format_volts(p.vf)
        )?;
    }
    for db in b.drivers.iter() {
        let d = &nm.drivers[db.driver()];
        writeln!(out, "  budget of {}:", cx.pin_name(d.at))?;
        if let Some(sb) = &db.low() {
            state(out, cx, "low", "sink", sb, &db.items(cx, net, true))?;
        }
        if let Some(sb) = &db.high() {
            state(out, cx, "high", "source", sb, &db.items(cx, net, false))?;
        }
        if let Some(pu) = db.pull_up() {
            writeln!(
                out,
                "    pull-up {} to {}: supplies {} to the loads, high level {}",
                format_ohms(pu.ohms),
                format_volts(pu.rail_volts),
                format_amps(pu.current),
                format_volts(pu.level)
            )?;
        }
        for op in [db.drive_high(), db.drive_low()].into_iter().flatten() {
            writeln!(
                out,
                "    {} state with its LEDs and resistors: {} behind {} (from {} at {}) stands at {} and {} {}",
                if op.high { "high" } else { "low" },
                format_volts(op.rail),
                format_ohms(op.r_out),
                if op.high { "VOH" } else { "VOL" },
                format_amps(op.row.1),
                format_volts(op.level),
                if op.high { "sources" } else { "sinks" },
                format_amps(op.total)
            )?;
            for l in &op.loads {
                let parts: Vec<usize> = match l.kind {
                    LoadKind::Led(i) => {
                        let p = if op.high {
                            &nm.led_paths()[i]
                        } else {
                            &nm.sink_paths()[i]
                        };
                        p.resistors.iter().chain(&p.leds).copied().collect()
                    }
                    LoadKind::Pull(i) => vec![nm.pulls()[i].resistor],
                };
                let names: Vec<String> = parts
                    .iter()
                    .map(|&c| sanitize(cx.nl.components[c].reference.as_str()).to_string())
                    .collect();
                writeln!(
                    out,
                    "      {}: {}{}{}",
                    names.join(", "),
                    format_amps(l.amps),
                    if l.dark {
                        " (its LEDs need more than the output reaches: dark)"
                    } else {
                        ""
                    },
                    if l.open_common.is_some() {
                        " (once the display's common is wired)"
                    } else {
                        ""
                    }
                )?;
            }
        }
        for m in b.margins(cx, net).filter(|m| m.driver == db.driver()) {
            let m = &m;
            let l = &nm.loads[m.load];
            let f = |x: Option<f64>| x.map_or("-".to_string(), |v| format!("{v:+.2} V"));
            writeln!(
                out,
                "    margin at {}: high {} (VIH {}), low {} (VIL {})",
                cx.pin_name(l.at),
                f(m.high_margin),
                format_volts(m.vih),
                f(m.low_margin),
                format_volts(m.vil)
            )?;
        }
    }
    if let Some(w) = &b.window {
        writeln!(
            out,
            "  open-collector pull-up window to {} ({}):",
            sanitize(&cx.net_name(w.rail_net)),
            format_volts(w.rail_volts)
        )?;
        writeln!(
            out,
            "    R_min = ({} - {}) / ({} - {}) = {}",
            format_volts(w.rail_volts),
            format_volts(w.vol),
            format_amps(w.iol),
            format_amps(w.sum_iil),
            format_ohms(w.r_min)
        )?;
        match (w.r_max, w.vih_max) {
            (Some(r), Some(v)) => writeln!(
                out,
                "    R_max = ({} - {}) / {} = {}",
                format_volts(w.rail_volts),
                format_volts(v),
                format_amps(w.sum_high),
                format_ohms(r)
            )?,
            _ => writeln!(out, "    R_max: no load sets one")?,
        }
        writeln!(
            out,
            "    fitted: {}",
            w.fitted.map_or("none".into(), format_ohms)
        )?;
    }
    Ok(())
}
