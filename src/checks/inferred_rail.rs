//! States, once per rail, what netmargin inferred about a rail that neither its name nor the
//! configuration describes: a net that is a rail because supply or ground pins sit on it
//! (`Hi`, `Lo`, `VBUS_LOGIC`), and a rail whose voltage comes from the fixed regulator that
//! makes it (`7805`, `AMS1117-3.3`) or from the families it powers (a rail that powers 74LS or
//! 74HCT parts is 5 V: those families are specified at 5 V only).
//!
//! Why it matters: every level, budget and window on the board is computed at that voltage.
//! An inference can be wrong (a 74HC part on a 3.3 V rail next to a 74HCT part that should
//! not be there); saying it once lets the reader check it, and the configuration overrides it.
//!
//! Example: a net named `VCC` with the supply pins of a 74LS00 and a 74HCT04: taken as 5.00 V.
//!
//! Fix: nothing, when the inference is right. Otherwise declare the rail: `--rail VCC=3.3` or
//! `[rails] VCC = 3.3` in `netmargin.toml`.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "inferred-rail",
    severity: crate::diag::Severity::Info,
    summary: "a rail whose existence or voltage netmargin inferred from its pins, its regulator or the families it powers",
};

use super::Context;
use crate::circuit::Inferred;
use crate::diag::Diag;
use crate::values::format_volts;

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for note in &cx.rail_notes {
        let name = cx.net_name(note.net);
        let what = if note.ground {
            "ground".to_string()
        } else {
            match note.volts {
                Some(v) => format!("a {} supply rail", format_volts(v)),
                None => "a supply rail of unknown voltage".to_string(),
            }
        };
        let mut reasons = Vec::new();
        if note.by_usage {
            reasons.push(format!(
                "the {} pins of {} part{} sit on it",
                if note.ground { "ground" } else { "supply" },
                note.power_pins,
                if note.power_pins == 1 { "" } else { "s" }
            ));
        }
        match &note.why {
            Some(Inferred::Regulator { comp }) => {
                let c = &cx.nl.components[*comp];
                reasons.push(format!(
                    "it is the output of {} ({}), a fixed regulator",
                    c.reference,
                    c.value_str()
                ));
            }
            Some(Inferred::Families { comps, families }) => {
                let shown: Vec<String> = comps
                    .iter()
                    .take(3)
                    .map(|&ci| {
                        let c = &cx.nl.components[ci];
                        format!("{} ({})", c.reference, c.value_str())
                    })
                    .collect();
                let more = comps.len().saturating_sub(3);
                reasons.push(format!(
                    "it powers {}{} of famil{} {}, specified at one supply only",
                    shown.join(", "),
                    if more > 0 {
                        format!(" and {more} more")
                    } else {
                        String::new()
                    },
                    if families.len() == 1 { "y" } else { "ies" },
                    families.join(", ")
                ));
            }
            None => {}
        }
        let declare = match (note.ground, note.volts) {
            (true, _) => format!("--rail {}=0", name.trim_start_matches('/')),
            (false, Some(v)) => format!("--rail {}={v}", name.trim_start_matches('/')),
            (false, None) => format!("--rail {}=VOLTS", name.trim_start_matches('/')),
        };
        let d = Diag::info(
            "inferred-rail",
            format!("`{name}` is taken as {what}: {}", reasons.join("; ")),
        )
        .at(cx.nl.nets[note.net].name.span(), "rail by inference")
        .on_net(name.clone())
        .with_help(format!(
            "if that is wrong, declare it ({declare}, or under [rails] in netmargin.toml)"
        ));
        out.push(d);
    }
}
