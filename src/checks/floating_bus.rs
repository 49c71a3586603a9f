//! Finds nets driven only by three-state (or bidirectional) outputs, with CMOS loads and no
//! pull resistor: when every driver is off, nothing holds the net and the CMOS inputs float.
//! The finding names the enables that turn the drivers off and computes a pull resistor that
//! holds a valid level against the leakage of the drivers and the loads. When the net leaves
//! the board through a connector, the pull resistor (or another driver) may be on the other
//! side: the finding says so.
//!
//! Why it matters: a floating CMOS input drifts into its threshold band, where both input
//! transistors conduct: the part draws supply current, the output can oscillate, and the
//! logic reads whatever noise couples in. On a bus that is idle most of the time, that is most
//! of the time.
//!
//! Example: a 74HC244 output 1Y1 (enable 1OE~ on `/ARM_HC`) into a 74HC04 input. When
//! `/ARM_HC` is high the buffer is off and the input floats.
//!
//! Fix: a pull-down (or pull-up) on the net, small enough to hold the level against the
//! leakage: R <= VIL / (sum of IOZ + input currents) for a pull-down. The message computes
//! the bound and suggests a round value in the 100 kOhm class, half the bound or less.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "floating-bus",
    severity: crate::diag::Severity::Warning,
    summary: "a net driven only by three-state outputs with CMOS loads and no pull resistor",
};

use super::common::{ground_rail_name, supply_rail_name};
use super::Context;
use crate::circuit::enables::{gate, literal_text, Gate};
use crate::circuit::{Circuit, PinRef};
use crate::classify::PinRole;
use crate::diag::Diag;
use crate::values::{format_amps, format_ohms, format_volts};
use crate::values::{series_at_most, E3};

/// Pull resistors above this are slow to settle and pick up noise (common practice).
const PULL_CAP_OHMS: f64 = 100e3;

/// The leakage budget of a floating bus.
#[derive(Debug, Clone, PartialEq)]
pub(super) struct Leakage {
    /// Sum of the drivers' off-state leakage (IOZ).
    pub ioz: f64,
    /// Sum of the other loads' input currents at a low level (|IIL|) and at a high (IIH).
    pub inputs_low: f64,
    pub inputs_high: f64,
    /// The lowest VIL max of the loads, and the highest VIH min.
    pub vil: f64,
    pub vih: f64,
    /// True when a TTL input is among the loads (it needs a pull-up: its IIL is large).
    pub ttl: bool,
}

impl Leakage {
    /// The current a pull-down must take away to hold a low.
    pub fn low(&self) -> f64 {
        self.ioz + self.inputs_low
    }
    /// The current a pull-up must supply to hold a high.
    pub fn high(&self) -> f64 {
        self.ioz + self.inputs_high
    }
}

/// The largest pull-down that holds VIL against the leakage.
pub(super) fn pull_down_max(l: &Leakage) -> f64 {
    if l.low() > 0.0 {
        l.vil / l.low()
    } else {
        f64::INFINITY
    }
}

/// The largest pull-up to `vcc` that holds VIH against the leakage.
pub(super) fn pull_up_max(l: &Leakage, vcc: f64) -> f64 {
    if l.high() > 0.0 {
        (vcc - l.vih).max(0.0) / l.high()
    } else {
        f64::INFINITY
    }
}

/// The suggested value: from the 1 - 2.2 - 4.7 series, at most half the bound and at most
/// 100 kOhm.
pub(super) fn suggest(r_max: f64) -> Option<f64> {
    series_at_most((r_max / 2.0).min(PULL_CAP_OHMS), &E3)
}

/// True when the net is a floating bus: only three-state drivers, none always on, CMOS loads,
/// nothing else to set the level.
fn floating_bus(cx: &Circuit<'_, '_>, net: usize) -> bool {
    let nm = &cx.nets[net];
    nm.rail().is_none()
        && !nm.drivers.is_empty()
        && nm.pulls().is_empty()
        && !nm.has_unreadable()
        && nm.held().is_empty()
        && nm.unknown().is_empty()
        && nm
            .drivers
            .iter()
            .all(|d| matches!(d.role, PinRole::ThreeState | PinRole::Bidirectional))
        && nm.drivers.iter().all(|d| gate(cx, d.at) != Gate::Always)
        && nm.loads.iter().any(|l| !l.ttl() && l.levels(cx).is_some())
}

fn leakage(cx: &Circuit<'_, '_>, net: usize) -> Option<Leakage> {
    let nm = &cx.nets[net];
    let ioz: f64 = nm
        .drivers
        .iter()
        .filter_map(|d| d.levels(cx))
        .map(|l| l.ioz.abs())
        .sum();
    // a bidirectional pin's leakage is its IOZ, counted once
    let others = nm
        .loads
        .iter()
        .filter(|l| !nm.drivers.iter().any(|d| d.at == l.at));
    let others: Vec<_> = others.collect();
    let inputs_low: f64 = others.iter().filter_map(|l| l.iil(cx)).sum();
    let inputs_high: f64 = others.iter().filter_map(|l| l.iih(cx)).sum();
    let lv = nm.loads.iter().filter_map(|l| l.levels(cx));
    let vil = lv.clone().map(|l| l.vil_max).reduce(f64::min)?;
    let vih = lv.map(|l| l.vih_min).reduce(f64::max)?;
    let ttl = nm.loads.iter().any(|l| l.ttl());
    Some(Leakage {
        ioz,
        inputs_low,
        inputs_high,
        vil,
        vih,
        ttl,
    })
}

/// How one driver is turned off: `U17.1 (1OE~) on /ARM_HC is high`.
/// `off when U4.1 (1OE~) on /EN_A is high`, `off always (its enable is tied off)`.
fn off_text(cx: &Circuit<'_, '_>, p: PinRef) -> String {
    match gate(cx, p) {
        Gate::When(l) => format!(
            "off when {}",
            l.iter()
                .map(|x| literal_text(cx, p.comp(), x, false))
                .collect::<Vec<_>>()
                .join(" or ")
        ),
        Gate::Never => "off always (its enable is tied off)".to_string(),
        _ => "off when disabled (its enable is not known)".to_string(),
    }
}

/// True for a clock, strobe or latch-enable input by its function-table name (`CLK`,
/// `1CLK`, `CKA`, `CP`, `LE`, `STB`, `SRCLK`): an edge or a transparent latch there acts on
/// whatever a floating net reads.
fn clocks(name: &str) -> bool {
    let n = name.to_ascii_uppercase();
    let n = n.trim_start_matches(|c: char| c.is_ascii_digit());
    n.contains("CLK") && !n.contains("INH")
        || n.starts_with("CK")
        || n.starts_with("CP")
        || n == "LE"
        || n == "LE~"
        || n.contains("STB")
        || n.contains("CLOCK")
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for net in 0..cx.nets.len() {
        if !floating_bus(cx, net) {
            continue;
        }
        let nm = &cx.nets[net];
        let Some(leak) = leakage(cx, net) else {
            continue;
        };
        let cmos: Vec<PinRef> = nm
            .loads
            .iter()
            .filter(|l| !l.ttl() && l.levels(cx).is_some())
            .map(|l| l.at)
            .collect();
        let first = cmos[0];
        let offs: Vec<String> = nm
            .drivers
            .iter()
            .map(|d| format!("{} is {}", cx.pin_name(d.at), off_text(cx, d.at)))
            .collect();
        let loads: Vec<String> = cmos.iter().map(|p| cx.describe(*p)).collect();
        let name = cx.net_name(net);
        let leaves = nm.connectors.first().map(|j| format!("; the net leaves the board through {}, where a pull resistor or another driver may be fitted", cx.pin_name(*j)));
        let message = format!(
            "{name} is driven only by three-state output{}: {}; with every driver off nothing holds the net and the CMOS input{} float{}: {}{}",
            if nm.drivers.len() == 1 { "" } else { "s" },
            offs.join(", "),
            if cmos.len() == 1 { "" } else { "s" },
            if cmos.len() == 1 { "s" } else { "" },
            loads.join(", "),
            leaves.clone().unwrap_or_default()
        );
        let parts = |total: f64, inputs: f64| {
            format!(
                "{} of leakage (IOZ {}, inputs {})",
                format_amps(total),
                format_amps(leak.ioz),
                format_amps(inputs)
            )
        };
        let at = cx.supply_text(first.comp());
        let help = if leak.ttl {
            // TTL inputs float high and draw their IIL from a pull-down: pull up instead
            let vcc = cx.supplies[first.comp()].as_ref().map_or(5.0, |s| s.vcc);
            let rmax = pull_up_max(&leak, vcc);
            let (total, parts) = (leak.high(), parts(leak.high(), leak.inputs_high));
            match suggest(rmax) {
                Some(r) => format!(
                    "fit a pull-up of {} to {}: the {parts} holds the net at {}, above VIH {} at {at} (the largest that holds VIH is {}); a pull-down would have to sink the TTL inputs' IIL",
                    format_ohms(r),
                    supply_rail_name(ctx, first.comp()),
                    format_volts(vcc - r * total),
                    format_volts(leak.vih),
                    format_ohms(rmax)
                ),
                None => format!("fit a pull-up to {}: no round value holds VIH {} against {parts}", supply_rail_name(ctx, first.comp()), format_volts(leak.vih)),
            }
        } else {
            let rmax = pull_down_max(&leak);
            let (total, parts) = (leak.low(), parts(leak.low(), leak.inputs_low));
            match suggest(rmax) {
                Some(r) => format!(
                    "fit a pull-down of {} to {}: the {parts} holds the net at {}, below VIL {} at {at} (the largest that holds VIL is {})",
                    format_ohms(r),
                    ground_rail_name(ctx, first.comp()),
                    format_volts(r * total),
                    format_volts(leak.vil),
                    format_ohms(rmax)
                ),
                None => format!("fit a pull-down to {}: no round value holds VIL {} against {parts}", ground_rail_name(ctx, first.comp()), format_volts(leak.vil)),
            }
        };
        let help = match &leaves {
            Some(_) => format!(
                "check the other side of the connector; if nothing holds the net there, {help}"
            ),
            None => help,
        };
        // a bus that floats between transfers is normal practice: it matters where an input
        // on it clocks or latches, and only the enables tell when the net floats
        let known = nm
            .drivers
            .iter()
            .all(|d| !d.symbol_only && matches!(gate(cx, d.at), Gate::When(_) | Gate::Never));
        let clocked: Vec<PinRef> = cmos
            .iter()
            .copied()
            .filter(|p| {
                cx.cl.parts[p.comp()].table_names[p.pin()]
                    .as_deref()
                    .is_some_and(clocks)
            })
            .collect();
        let severe = known && !clocked.is_empty();
        let message = if severe {
            format!(
                "{message}; {} {} on it, so an edge while it floats acts on noise",
                clocked
                    .iter()
                    .map(|p| cx.pin_name(*p))
                    .collect::<Vec<_>>()
                    .join(", "),
                if clocked.len() == 1 {
                    "clocks or latches"
                } else {
                    "clock or latch"
                }
            )
        } else if !known {
            format!("{message} (the drivers' enables are not known, so netmargin cannot tell when; a bus that floats between transfers is normal practice where nothing clocks on it)")
        } else {
            format!("{message} (a bus that floats between transfers is normal practice: no input on it clocks or latches)")
        };
        let mut d = if severe {
            Diag::warning("floating-bus", message)
        } else {
            Diag::info("floating-bus", message)
        }
        .at(cx.pin_span(first), "floats when every driver is off")
        .on_net(name)
        .with_pins(
            cmos.iter()
                .chain(nm.drivers.iter().map(|d| &d.at))
                .map(|p| cx.pin_name(*p)),
        );
        for p in &cmos[1..] {
            d = d.also(cx.pin_span(*p), "floats too");
        }
        for drv in &nm.drivers {
            d = d.also(cx.pin_span(drv.at), off_text(cx, drv.at));
        }
        if let Some(&j) = nm.connectors.first() {
            d = d.also(cx.pin_span(j), "leaves the board");
        }
        out.push(d.with_help(help));
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn leak(ioz: f64, inputs: f64, vil: f64) -> Leakage {
        let (inputs_low, inputs_high) = (inputs, inputs);
        Leakage {
            ioz,
            inputs_low,
            inputs_high,
            vil,
            vih: 3.5,
            ttl: false,
        }
    }

    #[test]
    fn pull_down_bound_is_vil_over_the_leakage() {
        // 74HC244 IOZ 5 uA (National MM54HC242, 85 C) + 74HC04 input 1 uA (onsemi MM74HC04),
        // VIL 1.35 V at 4.5 V (MM74HC04): 1.35 / 6 uA = 225 kOhm
        let l = leak(5e-6, 1e-6, 1.35);
        assert!((pull_down_max(&l) - 225e3).abs() < 1.0);
        // half of it is 112.5 kOhm: the suggestion is 100 kOhm, holding 0.60 V
        assert_eq!(suggest(pull_down_max(&l)), Some(100e3));
        assert!((100e3 * l.low() - 0.60).abs() < 1e-9);
    }

    #[test]
    fn suggestion_is_capped_and_rounded_down() {
        // 4000B: IOZ 0.4 uA (from memory) + 1 uA input (National CD4011BC), VIL 1.5 V:
        // bound about 1.07 MOhm, but the suggestion stays at 100 kOhm (common practice)
        let l = leak(0.4e-6, 1e-6, 1.5);
        assert!(pull_down_max(&l) > 1e6);
        assert_eq!(suggest(pull_down_max(&l)), Some(100e3));
        // a bound of 90 kOhm: half is 45 kOhm, the suggestion 22 kOhm
        assert_eq!(suggest(90e3), Some(22e3));
        assert_eq!(suggest(94e3), Some(47e3));
    }

    #[test]
    fn a_pull_up_supplies_iih_not_iil() {
        // 74HC244 IOZ 5 uA, 74HC04 1 uA (onsemi MM74HC04), 74LS04 IIH 20 uA and IIL 0.4 mA
        // (TI SDLS025B); highest VIH 3.5 V (74HC at 5 V, 0.7 VCC)
        let l = Leakage {
            ioz: 5e-6,
            inputs_low: 1e-6 + 0.4e-3,
            inputs_high: 1e-6 + 20e-6,
            vil: 0.8,
            vih: 3.5,
            ttl: true,
        };
        // (5.0 - 3.5) / 26 uA = 57.7 kOhm; half is 28.8 kOhm: 22 kOhm
        assert!((pull_up_max(&l, 5.0) - 57_692.3).abs() < 1.0);
        assert_eq!(suggest(pull_up_max(&l, 5.0)), Some(22e3));
        // a pull-down would have to hold 0.8 V against 0.406 mA: under 2 kOhm
        assert!(pull_down_max(&l) < 2000.0);
    }

    #[test]
    fn pull_up_bound_is_the_headroom_over_the_leakage() {
        // 5 V, VIH 3.5 V, 6 uA: (5 - 3.5) / 6 uA = 250 kOhm
        let l = leak(5e-6, 1e-6, 1.35);
        assert!((pull_up_max(&l, 5.0) - 250e3).abs() < 1.0);
    }
}
