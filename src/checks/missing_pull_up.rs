//! Finds open-collector and open-drain outputs on a net with no pull-up resistor to a rail.
//! When the net leaves the board through a connector, the pull-up may be on the other side:
//! the finding is then a warning that says so.
//!
//! Why it matters: an open-collector output only pulls low. With no pull-up the high level
//! is whatever the loads make of an open net: a TTL input floats high (slowly, and noisily),
//! a CMOS input floats anywhere.
//!
//! Example: a 74LS05 inverter output wired straight to a 74LS00 input.
//!
//! Fix: a pull-up from the net to the loads' supply, inside the window set by the output's
//! IOL and the loads' currents (the message computes it).

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "missing-pull-up",
    severity: crate::diag::Severity::Error,
    summary: "an open-collector or open-drain output with no pull-up resistor to a rail",
};

use super::Context;
use crate::classify::PinRole;
use crate::diag::Diag;
use crate::values::format_ohms;

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for (net, nm) in cx.nets.iter().enumerate() {
        // a pull-up to a rail of unknown voltage, or a pull-up part, still sets the high
        if nm.rail().is_some() || nm.pulls().iter().any(|p| p.up) || !nm.held().is_empty() {
            continue;
        }
        // a pull-up reached through a series resistor or a jumper counts too
        if matches!(nm.source(), Some(crate::circuit::Source::Through(_))) {
            continue;
        }
        let oc: Vec<_> = nm
            .drivers
            .iter()
            .filter(|d| d.role == PinRole::OpenCollector)
            .collect();
        if oc.is_empty() || oc.len() < nm.drivers.len() {
            continue; // a push-pull driver on the net sets the high level
        }
        // wired-OR outputs: name them all, the first by reference (not by file order)
        let mut oc = oc;
        oc.sort_by_key(|d| {
            let c = &cx.nl.components[d.at.comp()];
            (
                c.reference.as_str().to_string(),
                c.pins[d.at.pin()].num(cx.nl).to_string(),
            )
        });
        let d = oc[0];
        let loads: Vec<String> = nm
            .loads
            .iter()
            .filter(|l| !oc.iter().any(|o| o.at == l.at))
            .map(|l| cx.pin_name(l.at))
            .collect();
        // a pull-up matters only where a logic input reads the net: an output that sinks an
        // LED, a lamp, a relay or a key-matrix row through its load needs none
        if loads.is_empty() && nm.connectors.is_empty() {
            continue;
        }
        let window = ctx.budgets.net(net).window;
        let fix = match window {
            Some(w) => match w.r_max {
                Some(rmax) if rmax > w.r_min => format!(
                    "fit a pull-up between {} and {} to {}",
                    format_ohms(w.r_min),
                    format_ohms(rmax),
                    cx.net_name(w.rail_net)
                ),
                _ => format!(
                    "fit a pull-up of at least {} to {}",
                    format_ohms(w.r_min),
                    cx.net_name(w.rail_net)
                ),
            },
            None => "fit a pull-up to the loads' supply".to_string(),
        };
        let mut diag = if let (Some(&j), true) = (nm.connectors.first(), loads.is_empty()) {
            Diag::info(
                "missing-pull-up",
                format!(
                    "{} has no pull-up on this board and no input here reads it; the net leaves through {} pin {}, where the pull-up belongs to the other side",
                    cx.describe(d.at),
                    cx.nl.components[j.comp()].reference,
                    cx.nl.components[j.comp()].pins[j.pin()].num(cx.nl)
                ),
            )
            .also(cx.pin_span(j), "leaves the board")
            .with_help(format!("check that the other side of the connector has a pull-up; if it has none, {fix}"))
        } else if let Some(&j) = nm.connectors.first() {
            Diag::warning(
                "missing-pull-up",
                format!(
                    "{} has no pull-up on this board; the net leaves through {} pin {}, where one may be fitted",
                    cx.describe(d.at),
                    cx.nl.components[j.comp()].reference,
                    cx.nl.components[j.comp()].pins[j.pin()].num(cx.nl)
                ),
            )
            .also(cx.pin_span(j), "leaves the board")
            .with_help(format!("check the other side of the connector; if it has none, {fix}"))
        } else {
            Diag::error(
                "missing-pull-up",
                format!(
                    "{} has no pull-up: nothing sets the net's high level{}",
                    cx.describe(d.at),
                    if loads.is_empty() {
                        String::new()
                    } else {
                        format!(" for {}", loads.join(", "))
                    }
                ),
            )
            .with_help(fix)
        };
        // an input known only from a symbol's pin type (a part netmargin does not know) is an
        // assumption: the output is known, the reader is not
        let known_reader = nm
            .loads
            .iter()
            .any(|l| l.family(cx).is_some() && !oc.iter().any(|o| o.at == l.at));
        if !known_reader && !loads.is_empty() && diag.severity == crate::diag::Severity::Error {
            diag.severity = crate::diag::Severity::Warning;
            diag.extend_message(" (assuming the symbol is right that these pins are inputs: the parts are ones netmargin does not know)");
        }
        if d.symbol_only && diag.severity > crate::diag::Severity::Info {
            diag.severity = crate::diag::Severity::Info;
            diag.extend_message(&format!(
                " (this rests on the symbol, which types the pin open-collector; {} is a part netmargin does not know)",
                cx.nl.components[d.at.comp()].reference
            ));
        }
        diag = diag
            .at(cx.pin_span(d.at), "open-collector output, no pull-up")
            .on_net(cx.net_name(net))
            .with_pins(oc.iter().map(|o| cx.pin_name(o.at)).chain(loads));
        // the primary label goes first
        diag.labels.rotate_right(1);
        out.push(diag);
    }
}
