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
//! its rated 8 mA (125 %).
//!
//! Fix: split the load across two outputs, or buffer it with a bus driver (a 74LS244 sinks
//! 24 mA), or use a family whose inputs draw less (74HCT inputs draw about 1 uA).

use super::common::pct;
use super::Context;
use crate::diag::{Diag, Severity};
use crate::values::format_amps;

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut Vec<Diag>) {
    let cx = ctx.cx;
    for (net, b) in ctx.budgets.iter().enumerate() {
        let nm = &cx.nets[net];
        for db in &b.drivers {
            let d = &nm.drivers[db.driver];
            for (state, sb) in [("low", db.low.as_ref()), ("high", db.high.as_ref())] {
                let Some(sb) = sb else { continue };
                // a pull-up below R_min is reported by `pull-up-out-of-range`, with the window
                if state == "low" && b.window.as_ref().is_some_and(|w| w.fitted.is_some_and(|f| f < w.r_min)) {
                    continue;
                }
                let r = sb.ratio();
                let sev = if r > 1.0 {
                    Severity::Error
                } else if r > ctx.opts.derating {
                    Severity::Warning
                } else {
                    continue;
                };
                let (verb, rating) = if state == "low" { ("sink", "IOL") } else { ("source", "IOH") };
                let n_inputs = sb.items.iter().filter(|i| i.what.contains("input")).count();
                let same = sb.items.windows(2).all(|w| (w[0].amps - w[1].amps).abs() < 1e-12) && n_inputs == sb.items.len();
                let detail = if same && !sb.items.is_empty() {
                    format!("{} inputs x {}", n_inputs, format_amps(sb.items[0].amps))
                } else {
                    let other = sb.items.len() - n_inputs;
                    format!("{} input{} and {} other item{}", n_inputs, if n_inputs == 1 { "" } else { "s" }, other, if other == 1 { "" } else { "s" })
                };
                let level = match sb.level {
                    Some(v) => format!("; the guaranteed {} level there is {v:.2} V", state),
                    None => format!("; no {} level is guaranteed at that current", state),
                };
                let over = if sev == Severity::Error { String::new() } else { format!(", above the {} derating", pct(ctx.opts.derating)) };
                let mut diag = Diag::new(
                    "fanout-overrun",
                    sev,
                    format!(
                        "{} must {verb} {} in the {state} state ({detail}) against its rated {rating} {} at {}: {} of the rating{over}{level}",
                        cx.describe(d.at),
                        format_amps(sb.total),
                        format_amps(sb.rating),
                        cx.supply_text(d.at.comp),
                        pct(r),
                    ),
                )
                .at(cx.pin_span(d.at), format!("{} {} against {}", verb, format_amps(sb.total), format_amps(sb.rating)))
                .on_net(cx.net_name(net))
                .with_pins(std::iter::once(cx.pin_name(d.at)).chain(sb.items.iter().filter_map(|i| i.at).map(|p| cx.pin_name(p))));
                let keep = (ctx.opts.derating * sb.rating / (sb.total / sb.items.len().max(1) as f64)).floor() as usize;
                diag = diag.with_help(format!(
                    "split the load: at about {} per item this output can take {} of the {} within the {} derating; drive the rest from a second output or a bus driver (a 74LS244 sinks 24 mA)",
                    format_amps(sb.total / sb.items.len().max(1) as f64),
                    keep,
                    sb.items.len(),
                    pct(ctx.opts.derating)
                ));
                for it in sb.items.iter().filter_map(|i| i.at).take(3) {
                    diag = diag.also(cx.pin_span(it), "load");
                }
                out.push(diag);
            }
        }
    }
}
