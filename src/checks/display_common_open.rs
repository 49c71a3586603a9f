//! Finds LED displays (seven-segment digits, bar graphs with a common) whose common pins
//! reach nothing, while logic drives their segments: no segment can ever light.
//!
//! Why it matters: a display's segments are LEDs whose other ends meet at the common (the
//! anode of a common-anode digit, the cathode of a common-cathode one). With every common
//! unconnected, or marked with a no-connect flag (which silences the schematic editor but
//! ties nothing), the display stays dark whatever its drivers do. It is usually a symbol
//! whose common pins were never wired, or a flag put on the wrong pin.
//!
//! Example: a common-cathode digit `7SEG-CC-RED` whose two cathode pins (3 and 8) carry
//! no-connect flags, its segments driven by a 74HC04 through 2.2 kOhm: the digit never lights.
//!
//! Severity: error when the part is known as a display (its value, library part,
//! description or footprint names one); warning when only its pin names (segments `a` to
//! `g` and a common) say so.
//!
//! Fix: wire the commons: a common cathode to ground (or to its digit driver), a common
//! anode to the supply (or to its digit driver); remove the no-connect flags from them.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "display-common-open",
    severity: crate::diag::Severity::Error,
    summary: "an LED display whose common pins reach nothing while its segments are driven",
};

use super::Context;
use crate::circuit::PinRef;
use crate::diag::{Diag, Severity};
use crate::netlist::Connection;

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for d in cx.displays.iter().filter(|d| d.commons_open) {
        let c = &cx.nl.components[d.comp];
        // segments that logic drives, directly or through a series resistor
        let drives = |n: usize| cx.nets[n].drivers.iter().any(|dr| !dr.symbol_only);
        let driven: Vec<PinRef> = d
            .segments
            .iter()
            .map(|&pin| PinRef::new(d.comp, pin))
            .filter(|p| {
                c.pins[p.pin()].connection.net().is_some_and(|n| {
                    drives(n) || cx.nets[n].series().iter().any(|s| drives(s.other_net))
                })
            })
            .collect();
        if driven.is_empty() {
            continue;
        }
        let how = |pi: usize| match c.pins[pi].connection {
            Connection::Alone { .. } => "wired to nothing",
            Connection::Absent => "on no net",
            Connection::Net { .. } => "tied only to the display's own pins",
        };
        let uniform = d.commons.iter().all(|&pi| how(pi) == how(d.commons[0]));
        let commons: Vec<String> = d
            .commons
            .iter()
            .map(|&pi| {
                let p = &c.pins[pi];
                let name = p.name(cx.nl).unwrap_or("common");
                if uniform {
                    format!("{} ({name})", p.num(cx.nl))
                } else {
                    format!("{} ({name}, {})", p.num(cx.nl), how(pi))
                }
            })
            .collect();
        let state = if uniform {
            format!(
                " {} {}",
                if commons.len() == 1 { "is" } else { "are" },
                how(d.commons[0])
            )
        } else {
            String::new()
        };
        let kind = match d.common_anode {
            Some(true) => "common-anode ",
            Some(false) => "common-cathode ",
            None => "",
        };
        let (sev, basis) = if d.named {
            (Severity::Error, String::new())
        } else {
            (
                Severity::Warning,
                " (the part is taken for a display from its pin names alone: segments a to g and a common)".to_string(),
            )
        };
        let whither = match d.common_anode {
            Some(true) => "to the supply or to its digit driver",
            Some(false) => "to ground or to its digit driver",
            None => "to the rail or digit driver its kind needs",
        };
        let message = format!(
            "{} ({} {kind}display): its common {} {}{state}, so none of its segments can ever light, though {} of them {} driven{basis}",
            c.reference,
            c.value_str(),
            if commons.len() == 1 { "pin" } else { "pins" },
            match commons.split_last() {
                Some((last, rest)) if !rest.is_empty() => format!("{} and {last}", rest.join(", ")),
                _ => commons.join(""),
            },
            driven.len(),
            if driven.len() == 1 { "is" } else { "are" },
        );
        let first = PinRef::new(d.comp, d.commons[0]);
        let mut diag = Diag::new(INFO.id, sev, message)
            .at(cx.pin_span(first), "common reaches nothing")
            .with_pins(
                d.commons
                    .iter()
                    .map(|&pin| cx.pin_name(PinRef::new(d.comp, pin))),
            );
        for &pin in d.commons.iter().skip(1) {
            diag = diag.also(cx.pin_span(PinRef::new(d.comp, pin)), "common");
        }
        out.push(diag.with_help(format!(
            "wire the commons {whither}, and remove any no-connect flag from them"
        )));
    }
}
