//! Finds every other guaranteed-level failure on a net: a driver's guaranteed low level
//! above a load's VIL max, or a guaranteed high level below a load's VIH min where the
//! driver is not a TTL output into CMOS (that case is `ttl-high-into-cmos`): a 3.3 V
//! output's high into a 5 V CMOS input, an overloaded output whose VOL has risen, an
//! open-collector net whose pull-up is too weak to reach the loads' VIH.
//!
//! Why it matters: the data-book levels are the only guarantee that a load reads what the
//! driver means; a level inside the undefined band reads either way.
//!
//! Example: a 74LVC04 on 3.3 V (VOH 3.10 V at -100 uA) into a 74HC00 on 5 V (VIH 3.50 V):
//! short by 0.40 V.
//!
//! Fix: a load with thresholds the driver meets (74HCT on 5 V reads 2.0 V as high), a level
//! translator, or a driver on the load's supply.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "level-mismatch",
    severity: crate::diag::Severity::Error,
    summary: "a guaranteed low level above a load's VIL, or another high-level shortfall",
};

use super::Context;
use crate::diag::{Diag, Severity};
use crate::values::{format_ohms, format_volts};

/// The fix for a high-level shortfall: for a net pulled up by a resistor (an open
/// collector), the largest pull-up that reaches every load's VIH; otherwise a different load,
/// a translator or a driver on the load's supply.
fn high_fix(
    ctx: &Context<'_, '_, '_>,
    b: crate::circuit::budget::NetBudgetRef<'_>,
    pulled_up: bool,
) -> String {
    match b.window.filter(|_| pulled_up).and_then(|w| w.r_max.map(|r| (w, r))) {
        Some((w, rmax)) if rmax > w.r_min => format!(
            "a smaller pull-up: between {} and {} to {} reaches every load's VIH",
            format_ohms(w.r_min),
            format_ohms(rmax),
            ctx.cx.net_name(w.rail_net)
        ),
        _ => "use a load whose VIH the driver meets (a 74HCT part reads 2.0 V as high on 5 V), a level translator, or a driver on the load's supply".to_string(),
    }
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for (net, b) in ctx.budgets.iter().enumerate() {
        let nm = &cx.nets[net];
        for m in b.margins(cx, net) {
            let m = &m;
            let d = &nm.drivers[m.driver];
            let l = &nm.loads[m.load];
            let db = b
                .drivers
                .iter()
                .find(|x| x.driver() == m.driver)
                .expect("margin has a driver budget");
            if let Some(hm) = m.high_margin {
                let covered = ctx.cx.ttl_output(d.at.comp()) && !l.ttl();
                let sev = if hm < 0.0 && !covered {
                    Some(Severity::Error)
                } else if hm >= 0.0 && hm < ctx.opts.min_margin_v {
                    Some(Severity::Warning)
                } else {
                    None
                };
                if let Some(sev) = sev {
                    let high = db.high_level().unwrap_or(0.0);
                    let how = if db.high().is_none() {
                        "pulls the net up to".to_string()
                    } else {
                        "guarantees".to_string()
                    };
                    let gap = if hm < 0.0 {
                        format!("short by {}", format_volts(-hm))
                    } else {
                        format!(
                            "margin only {} (below the configured {})",
                            format_volts(hm),
                            format_volts(ctx.opts.min_margin_v)
                        )
                    };
                    out.push(
                        Diag::new(
                            "level-mismatch",
                            sev,
                            format!(
                                "{} needs {} for a high at {}{}; {} {} {}: {gap}",
                                cx.describe(l.at),
                                format_volts(m.vih),
                                cx.supply_text(l.at.comp()),
                                super::common::vih_supply_note(m),
                                cx.describe(d.at),
                                how,
                                format_volts(high)
                            ),
                        )
                        .at(cx.pin_span(l.at), format!("needs {}", format_volts(m.vih)))
                        .also(
                            cx.pin_span(d.at),
                            format!("high level {}", format_volts(high)),
                        )
                        .on_net(cx.net_name(net))
                        .with_pin_list(super::common::pin_names(cx, [l.at, d.at]))
                        .with_help(high_fix(ctx, b, db.high().is_none())),
                    );
                }
            }
            if let Some(lm) = m.low_margin {
                if lm < 0.0 {
                    let low = db.low_level().unwrap_or(0.0);
                    out.push(
                        Diag::error(
                            "level-mismatch",
                            format!(
                                "{} reads a low only below {}{}; {} guarantees {} at its load: short by {}",
                                cx.describe(l.at),
                                format_volts(m.vil),
                                m.thresholds_at.as_deref().map_or(String::new(), |&(_, lo)| format!(
                                    " (VIL taken at {}, the bottom of the rail tolerance)",
                                    format_volts(lo)
                                )),
                                cx.describe(d.at),
                                format_volts(low),
                                format_volts(-lm)
                            ),
                        )
                        .at(cx.pin_span(l.at), format!("VIL {}", format_volts(m.vil)))
                        .also(cx.pin_span(d.at), format!("low level {}", format_volts(low)))
                        .on_net(cx.net_name(net))
                        .with_pin_list(super::common::pin_names(cx, [l.at, d.at]))
                        .with_help("lighten the driver's low-state load (fewer loads, a larger pull-up) or use a driver with a lower VOL"),
                    );
                }
            }
        }
    }
}
