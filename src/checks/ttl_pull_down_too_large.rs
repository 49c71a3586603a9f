//! Finds TTL inputs held low through a resistor to ground that is too large for their input
//! current: with no driver on the net, the inputs' low-state current (IIL) flows out through
//! the resistor, and IIL x R above VIL max means the input reads high or undefined. The
//! largest resistor that holds VIL is R_max = VIL / (sum of |IIL| over the inputs on the net).
//!
//! Why it matters: a bipolar TTL input sources current when low (0.4 mA for a 74LS input,
//! 1.6 mA for standard TTL). A pull-down sized for CMOS (10 kOhm, 100 kOhm) lets the input
//! rise to its own threshold: the "low" the designer meant is read as a high.
//!
//! Example: a 74LS00 input with 10 kOhm to ground: 0.4 mA x 10 kOhm = 4.0 V (the input
//! settles at its threshold), far above VIL 0.8 V. The largest pull-down that holds 0.8 V is
//! 0.8 V / 0.4 mA = 2.0 kOhm.
//!
//! Fix: a resistor of at most R_max (the message suggests an E12 value at half of it, keeping
//! half of VIL as margin), or tie the input straight to ground.
//!
//! When the net leaves the board through a connector, the resistor sets the level only while
//! nothing drives it from outside: the finding says so.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "ttl-pull-down-too-large",
    severity: crate::diag::Severity::Error,
    summary: "a TTL input held low through a resistor too large for its input current",
};

use super::Context;
use crate::circuit::{Circuit, PinRef};
use crate::diag::Diag;
use crate::values::{format_amps, format_ohms, format_volts, series_at_most, E12};

/// A TTL input net held low by pull-downs that are too large.
#[derive(Debug, Clone, PartialEq)]
pub(super) struct PullDown {
    /// The pull-downs in parallel.
    pub ohms: f64,
    /// Sum of |IIL| over every input on the net.
    pub iil: f64,
    /// The lowest VIL max of the TTL inputs.
    pub vil: f64,
}

impl PullDown {
    /// IIL x R: the level the inputs' current would raise the net to.
    pub fn level(&self) -> f64 {
        self.iil * self.ohms
    }
    /// The largest pull-down that holds VIL.
    pub fn r_max(&self) -> f64 {
        self.vil / self.iil
    }
    /// True when IIL x R is above VIL (the input reads high or undefined).
    pub fn too_large(&self) -> bool {
        self.level() > self.vil + 1e-9
    }
}

/// The pull-down budget of `net`, when it is a net of inputs held low only by resistors to
/// ground, with a TTL input among them.
pub(super) fn pull_down(cx: &Circuit<'_, '_>, net: usize) -> Option<PullDown> {
    let nm = &cx.nets[net];
    if nm.rail().is_some()
        || !nm.drivers.is_empty()
        || nm.pulls().is_empty()
        || !nm.unknown().is_empty()
        || nm.has_unreadable()
    {
        return None;
    }
    if nm.pulls().iter().any(|p| p.up || p.rail_volts != 0.0) {
        return None; // a divider or a pull to another rail: not a pull-down
    }
    let vil = nm
        .loads
        .iter()
        .filter(|l| l.ttl())
        .filter_map(|l| l.levels(cx))
        .map(|l| l.vil_max)
        .reduce(f64::min)?;
    let iil: f64 = nm.loads.iter().filter_map(|l| l.iil(cx)).sum();
    let g: f64 = nm
        .pulls()
        .iter()
        .filter(|p| p.ohms > 0.0)
        .map(|p| 1.0 / p.ohms)
        .sum();
    if g <= 0.0 || iil <= 0.0 {
        return None;
    }
    Some(PullDown {
        ohms: 1.0 / g,
        iil,
        vil,
    })
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for net in 0..cx.nets.len() {
        let Some(pd) = pull_down(cx, net).filter(|p| p.too_large()) else {
            continue;
        };
        let nm = &cx.nets[net];
        let ttl: Vec<PinRef> = nm
            .loads
            .iter()
            .filter(|l| l.ttl() && l.levels(cx).is_some())
            .map(|l| l.at)
            .collect();
        let first = ttl[0];
        let resistors: Vec<String> = nm
            .pulls()
            .iter()
            .map(|p| {
                format!(
                    "{} {}",
                    cx.nl.components[p.resistor].reference,
                    format_ohms(p.ohms)
                )
            })
            .collect();
        let rail = cx.net_name(nm.pulls()[0].rail_net);
        let n = nm.loads.iter().filter(|l| l.levels(cx).is_some()).count();
        let who = if n == 1 {
            cx.describe(first)
        } else {
            format!(
                "{} and {} other input{}",
                cx.describe(first),
                n - 1,
                if n == 2 { "" } else { "s" }
            )
        };
        let through = if resistors.len() == 1 {
            resistors[0].clone()
        } else {
            format!(
                "{} in parallel ({})",
                resistors.join(", "),
                format_ohms(pd.ohms)
            )
        };
        let outside = nm
            .connectors
            .first()
            .map(|j| format!(" while nothing drives the net through {}", cx.pin_name(*j)))
            .unwrap_or_default();
        let vcc = cx.supplies[first.comp()].as_ref().map_or(5.0, |s| s.vcc);
        let reads = if pd.level() >= vcc {
            // the product is only a budget: the input cannot rise above its open level
            "the resistor cannot hold it low at all, and it sits at its open-input level (a high)"
        } else {
            "the input reads high or undefined"
        };
        let message = format!(
            "{who} {} held low through {through} to {rail}, but IIL x R = {} x {} = {}, above VIL {} at {}: {reads}{outside}",
            if n == 1 { "is" } else { "are" },
            format_amps(pd.iil),
            format_ohms(pd.ohms),
            format_volts(pd.level()),
            format_volts(pd.vil),
            cx.supply_text(first.comp())
        );
        // a capacitor from the net to the supply beside the pull-down: a power-on delay,
        // drawn on purpose (the input is high at power-on and is meant to be)
        let rc = nm.passives.iter().find_map(|p| {
            let c = &cx.nl.components[p.comp()];
            (cx.cl.parts[p.comp()].kind == crate::classify::classifier::PartKind::Capacitor
                && c.pins.len() == 2)
                .then(|| c.pins[1 - p.pin()].connection.net())
                .flatten()
                .filter(|&n| cx.nets[n].rail().is_some_and(|r| !r.ground))
                .map(|_| c.reference.as_str().to_string())
        });
        let message = match &rc {
            Some(cap) => format!(
                "{message}; with {cap} to the supply this is a power-on delay, deliberate where the input is meant to read high"
            ),
            None => message,
        };
        let rmax = pd.r_max();
        let suggestion = series_at_most(rmax / 2.0, &E12)
            .map(|r| {
                format!(
                    ", e.g. {} ({} at the input)",
                    format_ohms(r),
                    format_volts(r * pd.iil)
                )
            })
            .unwrap_or_default();
        let help = format!(
            "use at most {} ({} / {}){suggestion}, or tie the input straight to {rail}",
            format_ohms(rmax),
            format_volts(pd.vil),
            format_amps(pd.iil)
        );
        let mut d = if rc.is_some() {
            Diag::info("ttl-pull-down-too-large", message)
        } else {
            Diag::error("ttl-pull-down-too-large", message)
        }
        .at(
            cx.pin_span(first),
            format!("IIL x R = {}", format_volts(pd.level())),
        )
        .on_net(cx.net_name(net))
        .with_pins(
            std::iter::once(cx.pin_name(first))
                .chain(
                    nm.loads
                        .iter()
                        .filter(|l| l.at != first && l.levels(cx).is_some())
                        .map(|l| cx.pin_name(l.at)),
                )
                .chain(nm.pulls().iter().map(|p| cx.pin_name(p.at))),
        );
        for p in nm.pulls() {
            d = d.also(
                cx.pin_span(p.at),
                format!("pull-down {}", format_ohms(p.ohms)),
            );
        }
        for l in nm
            .loads
            .iter()
            .filter(|l| l.at != first && l.levels(cx).is_some())
        {
            d = d.also(cx.pin_span(l.at), "input");
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

    #[test]
    fn one_ls_input_on_ten_kohm_reads_high() {
        // TI SDLS025B SN74LS00: IIL -0.4 mA at 0.4 V, VIL 0.8 V
        let pd = PullDown {
            ohms: 10e3,
            iil: 0.4e-3,
            vil: 0.8,
        };
        assert!((pd.level() - 4.0).abs() < 1e-9);
        assert!(pd.too_large());
        assert!((pd.r_max() - 2000.0).abs() < 1e-6);
    }

    #[test]
    fn the_bound_itself_holds() {
        // 0.4 mA x 2.0 kOhm = 0.80 V: at VIL, not above it
        let pd = PullDown {
            ohms: 2000.0,
            iil: 0.4e-3,
            vil: 0.8,
        };
        assert!(!pd.too_large());
        let pd = PullDown {
            ohms: 2200.0,
            iil: 0.4e-3,
            vil: 0.8,
        };
        assert!(pd.too_large());
    }
}
