//! Finds a TTL-output driver (bipolar, or NMOS with TTL-compatible outputs: a processor, a
//! peripheral, an NMOS RAM or EPROM; a 555 timer; a BiCMOS bus driver) whose guaranteed high
//! level is below a CMOS load's VIH: the classic 2.4-2.7 V TTL high into a 74HC or 4000-series
//! input that needs 3.5 V at 5 V. A CMOS part whose data sheet guarantees its high only at TTL
//! levels at a rated current (a CMOS static RAM: 2.4 V at -1 mA) is reported as a warning that
//! names this: at a light CMOS load its output rises towards the supply, but no figure says how
//! far.
//!
//! Why it matters: the load sees a level inside its undefined band. It usually works on
//! the bench (typical TTL highs are near 3.4 V), and fails with a weak part, a hot day or a
//! supply at the top of its tolerance; the CMOS input stage also draws current at that level.
//!
//! Example: a 74LS04 output (VOH 2.70 V at -0.4 mA) into a 74HC00 input at 5 V (VIH 3.50 V):
//! short by 0.80 V.
//!
//! Fix: a TTL-threshold CMOS load (74HCT, 74ACT, 74AHCT: VIH 2.0 V), or a pull-up to the
//! load's supply from the net, within the computed window.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "ttl-high-into-cmos",
    severity: crate::diag::Severity::Error,
    summary: "a driver's guaranteed high level is below a CMOS load's VIH",
};

use super::Context;
use crate::classify::family::HighOutput;
use crate::diag::{Diag, Severity};
use crate::values::{format_ohms, format_volts};

/// True when the driver is a CMOS output guaranteed only at TTL levels at its rated current.
fn rated_at_ttl(ctx: &Context<'_, '_, '_>, comp: usize) -> bool {
    ctx.cx
        .family(comp)
        .is_some_and(|f| f.high_output == HighOutput::RatedAtTtl)
}

/// The TTL-threshold variant of a CMOS family, if there is one: 74HC -> 74HCT.
pub(super) fn ttl_threshold_variant(family: &str) -> Option<&'static str> {
    match family {
        "74HC" => Some("74HCT"),
        "74AC" => Some("74ACT"),
        "74AHC" => Some("74AHCT"),
        _ => None,
    }
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for (net, b) in ctx.budgets.iter().enumerate() {
        let nm = &cx.nets[net];
        for m in b.margins(cx, net) {
            let m = &m;
            let Some(hm) = m.high_margin else { continue };
            if hm >= 0.0 {
                continue;
            }
            let d = &nm.drivers[m.driver];
            let l = &nm.loads[m.load];
            if !ctx.cx.ttl_output(d.at.comp()) || l.ttl() || l.levels(cx).is_none() {
                continue;
            }
            let db = &b
                .drivers
                .iter()
                .find(|x| x.driver() == m.driver)
                .expect("margin has a driver budget");
            let high = db.high_level().unwrap_or(0.0);
            let load_comp = &cx.nl.components[l.at.comp()];
            let load_vcc = cx.supplies[l.at.comp()].as_ref().map_or(5.0, |s| s.vcc);
            let mut fixes = Vec::new();
            if let Some(alt) = l.family(cx).and_then(ttl_threshold_variant) {
                if let Some(af) = cx.rules.families.get(alt) {
                    let alv = af.levels(load_vcc, crate::classify::family::Drive::Standard);
                    let value = load_comp.value_str();
                    let from = l.family(cx).unwrap_or("");
                    let suffix = from.trim_start_matches("74");
                    let alt_value =
                        value
                            .to_ascii_uppercase()
                            .replacen(&format!("74{suffix}"), alt, 1);
                    fixes.push(format!(
                        "a {} in place of {} reads {} as high (margin {:+.2} V)",
                        if alt_value != value.to_ascii_uppercase() {
                            alt_value
                        } else {
                            alt.to_string()
                        },
                        load_comp.reference,
                        format_volts(alv.vih_min),
                        high - alv.vih_min
                    ));
                }
            }
            // a pull-up to the load's supply
            if let (Some(dl), Some(s)) = (d.levels(cx), cx.supplies[l.at.comp()].as_ref()) {
                let v = s.vcc;
                let vol = dl.vol.last().map_or(0.4, |p| p.v);
                let iol = dl.iol_max.abs();
                let sum_iil: f64 = nm.loads.iter().filter_map(|x| x.iil(cx)).sum();
                let sum_iih: f64 = nm.loads.iter().filter_map(|x| x.iih(cx)).sum();
                let vih_max = nm
                    .loads
                    .iter()
                    .filter_map(|x| x.levels(cx))
                    .map(|x| x.vih_min)
                    .fold(0.0, f64::max);
                if iol > sum_iil && v > vih_max {
                    let rmin = (v - vol) / (iol - sum_iil);
                    let rmax = if sum_iih > 0.0 {
                        ((v - vih_max) / sum_iih).min(10e3)
                    } else {
                        10e3
                    };
                    if rmin < rmax {
                        let rail = s
                            .supply_net()
                            .filter(|_| s.known)
                            .map(|n| cx.net_name(n))
                            .unwrap_or_else(|| format_volts(v));
                        fixes.push(format!(
                            "a pull-up between {} and {} from `{}` to {} (10 kOhm caps the rise time: common practice)",
                            format_ohms(rmin),
                            format_ohms(rmax),
                            cx.net_name(net),
                            rail
                        ));
                    }
                }
            }
            let rated = rated_at_ttl(ctx, d.at.comp());
            let diag = Diag::new(
                "ttl-high-into-cmos",
                if rated {
                    Severity::Warning
                } else {
                    Severity::Error
                },
                format!(
                    "{} needs {} for a high at {}{}; {} guarantees {}: short by {}{}",
                    cx.describe(l.at),
                    format_volts(m.vih),
                    cx.supply_text(l.at.comp()),
                    super::common::vih_supply_note(m),
                    cx.describe(d.at),
                    format_volts(high),
                    format_volts(-hm),
                    if rated {
                        format!(
                            " (assuming the {} family's high is no better at this light load than its guarantee at its rated current: its data sheet gives no light-load figure)",
                            cx.family(d.at.comp()).map_or("driver's", |f| f.id.as_str())
                        )
                    } else {
                        String::new()
                    }
                ),
            )
            .at(cx.pin_span(l.at), format!("needs {}", format_volts(m.vih)))
            .also(
                cx.pin_span(d.at),
                format!("guarantees {}", format_volts(high)),
            )
            .on_net(cx.net_name(net))
            .with_pin_list(super::common::pin_names(cx, [l.at, d.at]))
            .with_help(if fixes.is_empty() {
                "use a CMOS load with TTL thresholds, or a level translator".to_string()
            } else {
                fixes.join(", or ")
            });
            out.push(diag);
        }
    }
}
