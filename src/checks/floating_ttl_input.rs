//! Finds TTL inputs left open: on no net, or on a net with no driver, rail or pull resistor.
//! An unused gate is reported once, by gate.
//!
//! Why it matters: a bipolar TTL input floats high through its internal resistor (about
//! 4 kOhm in standard TTL, 20 kOhm in 74LS, 2.8 kOhm in 74S: common practice), so the
//! circuit works on the bench. The open input is a high-impedance antenna, though: it
//! picks up crosstalk and supply noise, reads low on a fast edge nearby, and slows the gate.
//!
//! Example: a 74LS00 whose input 2B was drawn but never wired.
//!
//! Fix: tie unused inputs high: directly to the supply for 74LS and later families, through
//! a resistor (1 kOhm, up to about 25 inputs per resistor) for standard TTL whose inputs
//! must not see more than 5.5 V; or tie them to a used input of the same gate.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "floating-ttl-input",
    severity: crate::diag::Severity::Warning,
    summary: "a TTL input left open: it floats high on the bench and picks up noise in service",
};

use super::common::{
    agree, floating_inputs, pin_list, push_unused_gate, supply_rail_name, Float, GateKey,
    GateWords, Words,
};
use super::Context;
use crate::diag::{Diag, Text};
use crate::values::format_ohms;

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    let inside = |comp: usize| {
        cx.family(comp)
            .and_then(|f| f.internal_input_pullup_ohm)
            .map(|r| format!(" through the input's internal ~{}", format_ohms(r)))
            .unwrap_or_default()
    };
    let tie = |comp: usize| {
        let rail = supply_rail_name(ctx, comp);
        match cx.family(comp).map(|f| f.id.as_str()) {
            Some("74") | Some("74H") | Some("74L") => format!("tie it to {rail} through 1 kOhm (standard TTL inputs must not see more than 5.5 V; one resistor holds up to about 25 inputs)"),
            _ => format!("tie it to {rail} (directly, or through 1 kOhm to share one resistor among several inputs)"),
        }
    };
    // the words every part alike shares (the tail of the message, the help), made once
    let mut words = Words::new();
    let singles = floating_inputs(ctx, true, |g| {
        let words = words.get(GateKey::of(ctx, &g), || {
            let pins: Vec<_> = g.inputs.iter().map(|f| f.at).collect();
            let list = pin_list(ctx, &pins);
            let n = pins.len();
            GateWords::new(
                out,
                cx,
                &g,
                INFO.id,
                &format!(
                    "{}: {} {} high{} and {} up noise",
                    agree(n, "its TTL input is open", "its TTL inputs are open"),
                    list,
                    agree(n, "floats", "float"),
                    inside(g.comp),
                    agree(n, "picks", "pick")
                ),
                format!(
                    "{}; the gate's output {} may stay open",
                    tie(g.comp).replacen("it", &list, 1),
                    pin_list(ctx, g.outputs)
                ),
            )
        });
        push_unused_gate(out, cx, &g, crate::diag::Severity::Warning, words);
    });
    // the wording that depends on the part alone, made once per part (a part has many
    // findings, in a row)
    let mut part_text: Option<(usize, String, Text)> = None;
    for f in singles {
        if part_text.as_ref().is_none_or(|(c, ..)| *c != f.at.comp()) {
            part_text = Some((
                f.at.comp(),
                inside(f.at.comp()),
                Text::from(tie(f.at.comp())),
            ));
        }
        let (_, inside, tie) = part_text.as_ref().expect("set above");
        let nc = cx.nl.components[f.at.comp()].pins[f.at.pin()].no_connect();
        let flag = if nc {
            " (its no-connect flag leaves it open; it does not tie it)"
        } else {
            ""
        };
        let (where_, net): (std::borrow::Cow<str>, _) = match f.why {
            Float::Absent => ("is on no net".into(), None),
            Float::Alone(n) => (format!("is connected to nothing{flag}").into(), Some(n)),
            Float::Undriven(n) => (
                format!("is on net `{}`, which nothing drives", cx.net_name(n)).into(),
                Some(n),
            ),
            Float::SwitchOpen(n, ref l) => (
                format!(
                    "is on net `{}`, which only {} sets, and only while closed",
                    cx.net_name(n),
                    super::common::switch_names(ctx, l)
                )
                .into(),
                Some(n),
            ),
        };
        let holds = cx.cl.parts[f.at.comp()].table_names[f.at.pin()]
            .as_deref()
            .is_some_and(holds_when_high)
            && partner_lets_it_hold(ctx, f.at);
        let mut d = if holds {
            Diag::error(
                "floating-ttl-input",
                format!(
                    "{} {where_}: it floats high{}, and a high on this active-high input holds the part in reset or clear",
                    cx.describe(f.at),
                    inside
                ),
            )
            .with_help(format!(
                "tie it to {} (or drive it) so the part runs",
                super::common::ground_rail_name(ctx, f.at.comp())
            ))
        } else {
            Diag::warning(
                "floating-ttl-input",
                format!(
                    "{} {where_}: it floats high{} and picks up noise",
                    cx.describe(f.at),
                    inside
                ),
            )
            .with_help(tie.clone())
        }
        .at(cx.pin_span(f.at), "open TTL input")
        .with_pin_list(super::common::pin_names(cx, [f.at]));
        if let Some(n) = net {
            d = d.on_net(super::common::net_name_of(cx, n));
        }
        out.push(d);
    }
}

/// A counter's gated reset (`R0(1)` with `R0(2)`, `R9(1)` with `R9(2)`: the part resets only
/// while both are high, as the 74LS90/92/93 reset tables give it) holds the part only when its
/// partner input can be high too: open, or on a net that is not a ground rail. Any other
/// active-high reset holds on its own.
fn partner_lets_it_hold(ctx: &Context<'_, '_, '_>, at: crate::circuit::PinRef) -> bool {
    let cx = ctx.cx;
    let part = &cx.cl.parts[at.comp()];
    let Some(name) = part.table_names[at.pin()].as_deref() else {
        return true;
    };
    let partner = match name {
        "R0(1)" => "R0(2)",
        "R0(2)" => "R0(1)",
        "R9(1)" => "R9(2)",
        "R9(2)" => "R9(1)",
        _ => return true,
    };
    let Some(q) = part
        .table_names
        .iter()
        .position(|n| n.as_deref() == Some(partner))
    else {
        return true;
    };
    match cx.nl.components[at.comp()].pins[q].connection.net() {
        Some(n) => !cx.nets[n].rail().is_some_and(|r| r.ground),
        None => true,
    }
}

/// True for an active-high reset, clear or preset-to-nine input by its function-table name
/// (`CLR`, `1CLR`, `MR`, `R0(1)`, `R9(2)`, `RESET`): an open TTL input floats high and holds
/// the part. Active-low names carry `~` (`CLR~`) and float to their inactive level.
pub(crate) fn holds_when_high(name: &str) -> bool {
    if name.contains('~') {
        return false;
    }
    let n = name.to_ascii_uppercase();
    let n = n.trim_start_matches(|c: char| c.is_ascii_digit());
    n.starts_with("CLR")
        || n.starts_with("MR")
        || n.starts_with("R0(")
        || n.starts_with("R9(")
        || n.starts_with("RESET")
        || n.starts_with("RST")
        || n.starts_with("CLEAR")
}

#[cfg(test)]
mod tests {
    use super::holds_when_high;

    #[test]
    fn active_high_resets_by_name() {
        // names as in the function table (TI and Motorola pin functions)
        for yes in [
            "CLR", "1CLR", "2CLR", "MR", "R0(1)", "R9(2)", "RESET", "RESET_A",
        ] {
            assert!(holds_when_high(yes), "{yes}");
        }
        for no in ["CLR~", "1CLR~", "SRCLR~", "CLK", "1A", "D", "PRE~"] {
            assert!(!holds_when_high(no), "{no}");
        }
    }
}
