//! Finds resistors whose value cannot be read as a resistance (`4K7K`, `10kk`, `1.2.3k`,
//! `1,000`, an empty value), with the reader's reason. The value is never guessed: a pull
//! resistor that cannot be read is left out of its net's budget, so its pull current is
//! unknown, and the message names the nets it would pull. A value that marks the part as
//! not fitted (`DNP`, `NF`) is not reported: the part is treated as absent.
//!
//! Why it matters: every pull-up window, fan-out budget and LED current that runs through
//! the resistor is computed without it, so a check that passes may pass for the wrong
//! reason.
//!
//! Example: a resistor valued `4K7K` (two multiplier letters) tying four 74LS00 inputs to
//! +5V.
//!
//! Fix: write the value in one form: the IEC 60062 code (`4K7`, `R47`, `1M0`) or a number
//! with an SI prefix (`4.7k`, `10 kOhm`).

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "unreadable-value",
    severity: crate::diag::Severity::Warning,
    summary: "a resistor whose value cannot be read, so its pull current is unknown",
};

use super::common::net_name_of;
use super::Context;
use crate::circuit::PinRef;
use crate::circuit::ValueReading;
use crate::diag::Diag;
use crate::diag::Piece::{Own, Said};
use crate::values::ValueError;

/// Why a resistor's value, as the model read it, cannot be read: `None` when it reads, or
/// marks a part not fitted.
fn unreadable_reading(reading: Option<&ValueReading>) -> Option<&ValueError> {
    reading?
        .as_ref()
        .err()
        .filter(|e| !matches!(e, ValueError::NotFitted(_)))
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    // each reading's words, written once: parts with one value text share its reading
    let mut said: rustc_hash::FxHashMap<*const ValueError, String> = Default::default();
    for (ci, c) in cx.nl.components.iter().enumerate() {
        let Some(err) = unreadable_reading(cx.resistor_value(ci)) else {
            continue;
        };
        let err: &str = said
            .entry(std::ptr::from_ref(err))
            .or_insert_with(|| err.to_string());
        let reference = c.reference.as_str();
        // the nets it would pull, each with the resistor's pin there and the rail
        let mut pulled: Vec<(usize, PinRef, Option<usize>)> = Vec::new();
        // only the nets the part is on can list it (the pin lookup below needs one there)
        let mut nets: Vec<usize> = c.pins.iter().filter_map(|p| p.connection.net()).collect();
        nets.sort_unstable();
        nets.dedup();
        for net in nets {
            if !cx.unreadable(net).any(|r| r == ci) {
                continue;
            }
            let Some(pi) = c.pins.iter().position(|p| p.connection.net() == Some(net)) else {
                continue;
            };
            let rail = c
                .pins
                .iter()
                .filter_map(|p| p.connection.net())
                .find(|&n| n != net && cx.nets[n].rail().is_some());
            pulled.push((net, PinRef::new(ci, pi), rail));
        }
        // `R4: {why}; the pull-up on /S to +5V, the pull on /T is left out ...`, in pieces:
        // the reference and the pulled nets' names are the finding's own words, the rest is
        // said alike by every resistor with that value on those rails (held once in the list)
        let names: Vec<_> = pulled
            .iter()
            .map(|(net, _, rail)| {
                (
                    net_name_of(cx, *net),
                    rail.map(|r| {
                        let dir = match cx.nets[r].rail().and_then(|x| x.v()) {
                            Some(v) if v > 0.0 => "pull-up",
                            Some(0.0) => "pull-down",
                            _ => "pull",
                        };
                        (dir, net_name_of(cx, r))
                    }),
                )
            })
            .collect();
        let mut pieces = vec![Own(reference), Said(": "), Said(err), Said("; ")];
        if names.is_empty() {
            pieces.push(Said("it is left out of every budget"));
        } else {
            for (i, (net, rail)) in names.iter().enumerate() {
                if i > 0 {
                    pieces.push(Said(", "));
                }
                match rail {
                    Some((dir, r)) => {
                        pieces.extend([Said("the "), Said(dir), Said(" on "), Own(net)]);
                        pieces.extend([Said(" to "), Said(r)]);
                    }
                    None => pieces.extend([Said("the pull on "), Own(net)]),
                }
            }
            pieces.push(Said(
                " is left out of that net's budget, so its pull current is unknown",
            ));
        }
        let span = c.value.as_ref().map_or(c.reference.span(), |v| v.span());
        let mut diag = Diag::warning("unreadable-value", String::new())
            .at(span, "unreadable value")
            .with_pin_list(super::common::pin_names(cx, pulled.iter().map(|(_, p, _)| *p)))
            .with_help("write the value in one form: the IEC 60062 code (`4K7`, `R47`, `1M0`) or a number with an SI prefix (`4.7k`, `10 kOhm`); netmargin does not guess which was meant");
        if let Some((net, _, _)) = pulled.first() {
            diag = diag.on_net(net_name_of(cx, *net));
        }
        for (_, p, _) in pulled.iter().take(3) {
            diag = diag.also(cx.pin_span(*p), "pulls this net");
        }
        out.push_pieces(&diag, &pieces);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::classify::classifier::PartKind;

    /// Why a value cannot be read for a part of `kind`, read as the model reads it.
    fn unreadable(kind: PartKind, value: &str) -> Option<ValueError> {
        let reading = crate::circuit::read_resistor_value(kind, value);
        unreadable_reading(reading.as_ref()).cloned()
    }

    #[test]
    fn reasons_and_near_misses() {
        // IEC 60062 letter code: one multiplier letter in place of the decimal point
        assert_eq!(
            unreadable(PartKind::Resistor, "4K7K"),
            Some(ValueError::TwoMultipliers("4K7K".into()))
        );
        assert!(unreadable(PartKind::Resistor, "").is_some());
        assert!(unreadable(PartKind::Resistor, "1,000").is_some());
        for ok in ["4K7", "4.7k", "R47", "1M0", "10 kΩ", "470R"] {
            assert_eq!(unreadable(PartKind::Resistor, ok), None, "{ok}");
        }
        // not fitted: absent, not unreadable
        assert_eq!(unreadable(PartKind::Resistor, "DNP"), None);
        // only resistors are read
        assert_eq!(unreadable(PartKind::Capacitor, "4K7K"), None);
        assert_eq!(unreadable(PartKind::Logic, "74LSOO"), None);
    }
}
