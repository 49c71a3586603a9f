//! Finds outputs loaded beyond their rating: the current a driver must sink in its low state
//! (every TTL load's IIL, every pull-up's current, the leakage of outputs that are off) or
//! source in its high state (every load's IIH, every pull-down's current, leakages) is above
//! its rated IOL or IOH. Above the rating it is an error; above the derating (80 % of the
//! rating unless configured) a warning.
//!
//! Why it matters: the data book guarantees VOL and VOH only up to the rated current. Past
//! it the low level rises and the high level falls into the undefined band between the
//! loads' thresholds, the noise margin is gone, and the output runs hot.
//!
//! Example: one 74LS04 output driving 25 74LS inputs must sink 25 x 0.4 mA = 10 mA against
//! its rated 8 mA (125 %). An input the function table says draws more (a 74LS90's clock
//! input, six unit loads: 2.4 mA) counts at its own current, and the message says so.
//!
//! Fix: split the load across two outputs, or buffer it with a bus driver (a 74LS244 sinks
//! 24 mA), or use a family whose inputs draw less (74HCT inputs draw about 1 uA).

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "fanout-overrun",
    severity: crate::diag::Severity::Error,
    summary: "an output's low- or high-state current budget exceeds its rating (or the derating)",
};

use super::common::pct;
use super::Context;
use crate::diag::{Diag, Severity};
use crate::values::format_amps;

/// Relative slack for sums of published currents: in binary, 16 x 0.4 mA comes to a hair
/// above 6.4 mA, and a load at exactly its rating (or the derating) is not above it.
const SLACK: f64 = 1e-9;

/// The finding for a load `ratio` (total / rating): above 1 an error, above the derating a
/// warning, otherwise none.
fn grade(ratio: f64, derating: f64) -> Option<Severity> {
    if ratio > 1.0 + SLACK {
        Some(Severity::Error)
    } else if ratio > derating * (1.0 + SLACK) {
        Some(Severity::Warning)
    } else {
        None
    }
}

/// A number of unit loads: `6`, `2.5`.
fn unit_text(u: f64) -> String {
    if (u - u.round()).abs() < 1e-9 {
        format!("{u:.0}")
    } else {
        format!("{u:.1}")
    }
}

/// How many items of `each` amperes fit within `derating` of `rating`.
fn fits(rating: f64, each: f64, derating: f64) -> usize {
    if each <= 0.0 {
        return 0;
    }
    (derating * rating / each * (1.0 + SLACK)).floor() as usize
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for (net, b) in ctx.budgets.iter().enumerate() {
        let nm = &cx.nets[net];
        for db in b.drivers.iter() {
            let d = &nm.drivers[db.driver()];
            for (state, sb) in [("low", db.low()), ("high", db.high())] {
                let Some(sb) = sb else { continue };
                // a pull-up below R_min is reported by `pull-up-out-of-range`, with the window
                if state == "low"
                    && b.window
                        .as_ref()
                        .is_some_and(|w| w.fitted.is_some_and(|f| f < w.r_min))
                {
                    continue;
                }
                let r = sb.ratio();
                let Some(sev) = grade(r, ctx.opts.derating) else {
                    continue;
                };
                let (verb, rating) = if state == "low" {
                    ("sink", "IOL")
                } else {
                    ("source", "IOH")
                };
                // the items are listed only for an output over its rating
                let items = db.items(cx, net, state == "low");
                let n_inputs = items.iter().filter(|i| i.is_input()).count();
                let same = items
                    .windows(2)
                    .all(|w| (w[0].amps - w[1].amps).abs() < 1e-12)
                    && n_inputs == items.len();
                let through = items.iter().filter(|i| i.is_through()).count();
                let through_note = if through > 0 {
                    format!(" ({through} of them through a series element)")
                } else {
                    String::new()
                };
                // inputs that draw more than one unit load (a counter's clock): say how many
                let heavy: Vec<&crate::circuit::budget::Item> = items
                    .iter()
                    .filter(|i| i.unit_loads(cx).is_some())
                    .collect();
                let heavy_note = match heavy.first().and_then(|i| i.unit_loads(cx)) {
                    Some(u) if heavy.len() == items.len() && same => {
                        format!(", {} unit loads each", unit_text(u))
                    }
                    Some(u) if heavy.iter().all(|i| i.unit_loads(cx) == Some(u)) => {
                        format!(", {} of them {} unit loads each", heavy.len(), unit_text(u))
                    }
                    Some(_) => {
                        let units: f64 = heavy.iter().filter_map(|i| i.unit_loads(cx)).sum();
                        format!(
                            ", {} of them {} unit loads in all",
                            heavy.len(),
                            unit_text(units)
                        )
                    }
                    None => String::new(),
                };
                let detail = if same && !items.is_empty() {
                    format!(
                        "{} input{} x {}{heavy_note}{through_note}",
                        n_inputs,
                        if n_inputs == 1 { "" } else { "s" },
                        format_amps(items[0].amps)
                    )
                } else {
                    let other = items.len() - n_inputs;
                    let inputs = format!(
                        "{} input{}{heavy_note}{through_note}",
                        n_inputs,
                        if n_inputs == 1 { "" } else { "s" },
                    );
                    if other == 0 {
                        inputs
                    } else {
                        format!(
                            "{inputs} and {} other item{}",
                            other,
                            if other == 1 { "" } else { "s" }
                        )
                    }
                };
                let level = match sb.level {
                    Some(v) => format!("; the guaranteed {} level there is {v:.2} V", state),
                    None => format!("; no {} level is guaranteed at that current", state),
                };
                let over = if sev == Severity::Error {
                    String::new()
                } else {
                    format!(", above the {} derating", pct(ctx.opts.derating))
                };
                let mut diag = Diag::new(
                    "fanout-overrun",
                    sev,
                    format!(
                        "{} must {verb} {} in the {state} state ({detail}) against its rated {rating} {} at {}: {} of the rating{over}{level}",
                        cx.describe(d.at),
                        format_amps(sb.total),
                        format_amps(sb.rating),
                        cx.supply_text(d.at.comp()),
                        pct(r),
                    ),
                )
                .at(cx.pin_span(d.at), format!("{} {} against {}", verb, format_amps(sb.total), format_amps(sb.rating)))
                .on_net(cx.net_name(net))
                .with_pins(std::iter::once(cx.pin_name(d.at)).chain(items.iter().map(|i| cx.pin_name(i.at(cx)))));
                let keep = fits(
                    sb.rating,
                    sb.total / items.len().max(1) as f64,
                    ctx.opts.derating,
                );
                diag = diag.with_help(format!(
                    "split the load: at about {} per item this output can take {} of the {} within the {} derating; drive the rest from a second output or a bus driver (a 74LS244 sinks 24 mA)",
                    format_amps(sb.total / items.len().max(1) as f64),
                    keep,
                    items.len(),
                    pct(ctx.opts.derating)
                ));
                for it in items.iter().map(|i| i.at(cx)).take(3) {
                    diag = diag.also(cx.pin_span(it), "load");
                }
                out.push(diag);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_load_at_exactly_the_rating_or_the_derating_is_not_above_it() {
        // 74LS: IOL 8 mA, IIL 0.4 mA (TI SDLS025B); 7400: IOL 16 mA, IIL 1.6 mA (Fairchild DM7400)
        let sum = |n: usize, each: f64| (0..n).map(|_| each).sum::<f64>();
        assert_eq!(
            grade(sum(16, 0.4e-3) / 8e-3, 0.8),
            None,
            "16 x 0.4 mA is 80 % of 8 mA"
        );
        assert_eq!(grade(sum(17, 0.4e-3) / 8e-3, 0.8), Some(Severity::Warning));
        assert_eq!(
            grade(sum(20, 0.4e-3) / 8e-3, 0.8),
            Some(Severity::Warning),
            "20 x 0.4 mA is 100 %"
        );
        assert_eq!(grade(sum(21, 0.4e-3) / 8e-3, 0.8), Some(Severity::Error));
        assert_eq!(
            grade(sum(10, 1.6e-3) / 16e-3, 0.8),
            Some(Severity::Warning),
            "10 x 1.6 mA is 100 %"
        );
        assert_eq!(grade(sum(11, 1.6e-3) / 16e-3, 0.8), Some(Severity::Error));
        assert_eq!(fits(8e-3, 0.4e-3, 0.8), 16);
        assert_eq!(fits(0.4e-3, 20e-6, 0.8), 16);
        assert_eq!(fits(16e-3, 1.6e-3, 1.0), 10);
        assert_eq!(fits(8e-3, 0.0, 0.8), 0);
    }
}
