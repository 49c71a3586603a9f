//! Finds a classified part whose symbol's pin types (or power pin names) disagree with the
//! function table's pinout for its value: pins typed input where the part has outputs, a
//! pin named VCC where the part has an input, logic pins typed passive. One finding per
//! component lists every disagreeing pin.
//!
//! Agreeing pairs (symbol type ~ table role): input ~ input or schmitt input; output ~
//! push-pull; open collector ~ open collector; tri-state ~ three-state; bidirectional or
//! tri-state ~ bidirectional; open emitter ~ open emitter; power input ~ supply or ground.
//! A table pin that is not connected inside the part, or an analogue switch pin, takes any
//! signal type; an extra supply outside the logic levels (an 8080's VDD at +12 V, which the
//! table marks analogue) may be typed power input. A pin whose type the netlist does not give
//! is not compared.
//!
//! Why it matters: the symbol was most likely drawn for another part, or from another
//! part's template. netmargin goes by the value and the table, but the schematic's own
//! electrical rules, and anyone reading it, go by the symbol.
//!
//! Example: a 74LS02 drawn with a 7400-style symbol: pins 1, 4, 10 and 13 are typed input,
//! but a 74LS02 drives them (outputs 1Y to 4Y), and its inputs are typed output.
//!
//! Fix: use a symbol for the part in the value (or correct the symbol's pin types).

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "pin-role-mismatch",
    severity: crate::diag::Severity::Warning,
    summary: "the netlist's pin types disagree with the function table for the part (wrong symbol)",
};

use super::Context;
use crate::circuit::PinRef;
use crate::classify::classifier::{is_ground_name_upper, RoleSource};
use crate::classify::PinRole;
use crate::diag::Diag;
use crate::netlist::PinType;

/// True when the symbol's pin type agrees with the table's role.
pub fn types_agree(role: PinRole, ptype: PinType) -> bool {
    use PinRole as R;
    use PinType as T;
    match role {
        R::Input | R::SchmittInput => ptype == T::Input,
        R::PushPull => ptype == T::Output,
        R::OpenCollector => ptype == T::OpenCollector,
        // an emitter follower drives high like any output; symbol libraries draw a display
        // driver's segment outputs (a 4511's) as outputs, and that misleads no one
        R::OpenEmitter => matches!(ptype, T::OpenEmitter | T::Output),
        R::ThreeState => ptype == T::TriState,
        R::Bidirectional => matches!(ptype, T::Bidirectional | T::TriState),
        R::PulledUpIo => matches!(ptype, T::Input | T::OpenCollector | T::Bidirectional),
        R::Supply | R::Ground => ptype == T::PowerIn,
        R::NoConnect | R::Analog => !matches!(ptype, T::PowerIn | T::PowerOut),
        R::Passive | R::Unknown => true,
    }
}

/// An extra supply outside the logic levels (an 8080's VBB and VDD, a line driver's VCC+ and
/// VCC-) is an analogue pin in the table, so that it sets no logic supply; a symbol that types
/// it power-in draws it rightly.
pub fn extra_supply(role: PinRole, ptype: PinType, table_name: Option<&str>) -> bool {
    role == PinRole::Analog
        && ptype == PinType::PowerIn
        && table_name.is_some_and(|n| {
            let up = n.trim().to_ascii_uppercase();
            ["VDD", "VBB", "VCC", "VEE", "VSS", "VPP"]
                .iter()
                .any(|s| up.starts_with(s))
        })
}

/// True when the symbol's pin name says power where the table says otherwise, or the other
/// side of the supply: `VCC` on a table input, `GND` on a table supply pin.
pub fn names_disagree(role: PinRole, name: Option<&str>) -> bool {
    let Some(n) = name.map(str::trim).filter(|n| !n.is_empty() && *n != "~") else {
        return false;
    };
    let up = n.to_ascii_uppercase();
    let supply = up.starts_with("VCC") || up.starts_with("VDD");
    let ground = is_ground_name_upper(&up) && up != "COM";
    match role {
        PinRole::Supply => ground,
        PinRole::Ground => supply,
        _ => supply || ground,
    }
}

/// What the table calls a role, for messages: (one, several).
fn role_words(role: PinRole) -> (&'static str, &'static str) {
    match role {
        PinRole::Input | PinRole::SchmittInput => ("input", "inputs"),
        PinRole::PushPull => ("output", "outputs"),
        PinRole::OpenCollector => ("open-collector output", "open-collector outputs"),
        PinRole::OpenEmitter => ("open-emitter output", "open-emitter outputs"),
        PinRole::ThreeState => ("three-state output", "three-state outputs"),
        PinRole::Bidirectional => ("bidirectional pin", "bidirectional pins"),
        PinRole::PulledUpIo => ("pulled-up input/output", "pulled-up input/outputs"),
        PinRole::Supply => ("supply pin", "supply pins"),
        PinRole::Ground => ("ground pin", "ground pins"),
        PinRole::NoConnect => ("unconnected pin", "unconnected pins"),
        PinRole::Analog => ("analogue pin", "analogue pins"),
        PinRole::Passive | PinRole::Unknown => ("pin", "pins"),
    }
}

/// Groups roles the way the message names them.
fn role_group(role: PinRole) -> PinRole {
    match role {
        PinRole::SchmittInput => PinRole::Input,
        r => r,
    }
}

fn short_list(items: &[String]) -> String {
    if items.len() <= 4 {
        items.join(", ")
    } else {
        format!("{}, {} ... {}", items[0], items[1], items[items.len() - 1])
    }
}

fn and_list(items: &[String]) -> String {
    match items.len() {
        0 => String::new(),
        1 => items[0].clone(),
        _ => format!(
            "{} and {}",
            items[..items.len() - 1].join(", "),
            items[items.len() - 1]
        ),
    }
}

/// The likely cause, from the kinds of disagreement.
pub fn likely_cause(pairs: &[(PinType, PinRole)]) -> &'static str {
    let typed_in_drives = pairs
        .iter()
        .any(|(t, r)| *t == PinType::Input && r.is_output());
    let typed_out_reads = pairs.iter().any(|(t, r)| {
        matches!(
            t,
            PinType::Output | PinType::TriState | PinType::OpenCollector
        ) && matches!(r, PinRole::Input | PinRole::SchmittInput)
    });
    let power = pairs
        .iter()
        .any(|(t, r)| (*t == PinType::PowerIn) != matches!(r, PinRole::Supply | PinRole::Ground));
    let untyped = pairs
        .iter()
        .all(|(t, _)| matches!(t, PinType::Passive | PinType::Unspecified | PinType::Free));
    if untyped {
        "a generic symbol whose pins carry no types"
    } else if power {
        "the power pins are not where this part has them: a symbol for another pinout"
    } else if typed_in_drives && typed_out_reads {
        "the inputs and outputs are swapped: a symbol drawn for another part, or from another part's template"
    } else {
        "a symbol for another part"
    }
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    // the pins whose symbol disagrees with the table, found once per kind of part: parts
    // that share one classification are alike in their pins' types and names
    let mut by_kind: rustc_hash::FxHashMap<
        *const crate::classify::classifier::PartClass,
        Vec<usize>,
    > = Default::default();
    for (ci, c) in cx.nl.components.iter().enumerate() {
        let part = &cx.cl.parts[ci];
        if part.function.is_none() {
            continue;
        }
        let disagreeing = || {
            let mut bad: Vec<usize> = Vec::new();
            for (pi, p) in c.pins.iter().enumerate() {
                if part.role_source[pi] != RoleSource::Table || p.ptype() == PinType::Unknown {
                    continue;
                }
                let role = part.roles[pi];
                if extra_supply(role, p.ptype(), part.table_names[pi].as_deref()) {
                    continue;
                }
                if !types_agree(role, p.ptype()) || names_disagree(role, p.name(cx.nl)) {
                    bad.push(pi);
                }
            }
            bad
        };
        let bad = by_kind
            .entry(std::sync::Arc::as_ptr(part))
            .or_insert_with(disagreeing);
        debug_assert_eq!(*bad, disagreeing());
        if bad.is_empty() {
            continue;
        }
        let bad = bad.clone();
        let value = c.value_str();
        // groups of (symbol type, table role), in pin order of their first pin
        let mut groups: Vec<((PinType, PinRole), Vec<usize>)> = Vec::new();
        for &pi in &bad {
            let key = (c.pins[pi].ptype(), role_group(part.roles[pi]));
            match groups.iter_mut().find(|(k, _)| *k == key) {
                Some((_, v)) => v.push(pi),
                None => groups.push((key, vec![pi])),
            }
        }
        let clauses: Vec<String> = groups
            .iter()
            .map(|((t, r), pins)| {
                let nums: Vec<String> = pins
                    .iter()
                    .map(|&i| c.pins[i].num(cx.nl).to_string())
                    .collect();
                let names: Vec<String> = pins
                    .iter()
                    .filter_map(|&i| part.table_names[i].as_deref().map(String::from))
                    .collect();
                let (pin_word, verb) = if pins.len() == 1 {
                    ("pin", "is")
                } else {
                    ("pins", "are")
                };
                let named: Vec<String> = pins
                    .iter()
                    .filter_map(|&i| {
                        c.pins[i]
                            .name(cx.nl)
                            .map(str::to_string)
                            .filter(|n| names_disagree(part.roles[i], Some(n)))
                    })
                    .collect();
                let typed = if types_agree(*r, *t) && !named.is_empty() {
                    format!("named {}", and_list(&named))
                } else {
                    format!("typed {}", t.as_str())
                };
                let one = pins.len() == 1;
                let words = if one {
                    role_words(*r).0
                } else {
                    role_words(*r).1
                };
                let names = if names.is_empty() {
                    String::new()
                } else {
                    format!(" {}", short_list(&names))
                };
                let table = if r.is_output() {
                    format!(
                        "a {value} drives {} ({words}{names})",
                        if one { "it" } else { "them" }
                    )
                } else {
                    format!(
                        "{} the {value}'s {words}{}",
                        if one { "it is" } else { "they are" },
                        if names.is_empty() {
                            String::new()
                        } else {
                            format!(" ({})", names.trim_start())
                        }
                    )
                };
                format!("{pin_word} {} {verb} {typed} but {table}", and_list(&nums))
            })
            .collect();
        let pairs: Vec<(PinType, PinRole)> = groups.iter().map(|(k, _)| *k).collect();
        let first = PinRef::new(ci, bad[0]);
        let mut diag = Diag::warning(
            "pin-role-mismatch",
            format!("{} ({value}): the symbol disagrees with the {value} pinout at {} pin{}: {}", c.reference.as_str(), bad.len(), if bad.len() == 1 { "" } else { "s" }, clauses.join("; ")),
        )
        .at(cx.pin_span(first), format!("the symbol's pin {} is typed {}", c.pins[bad[0]].num(cx.nl), c.pins[bad[0]].ptype().as_str()))
        .with_pin_list(super::common::pin_names(cx, bad.iter().map(|&i| PinRef::new(ci, i))))
        .with_help(format!(
            "likely cause: {}; use a symbol for the {value} (or correct the pin types); netmargin goes by the value and reads these pins as the {value} pinout gives them",
            likely_cause(&pairs)
        ));
        for &pi in bad.iter().skip(1).take(3) {
            diag = diag.also(
                cx.pin_span(PinRef::new(ci, pi)),
                format!("typed {}", c.pins[pi].ptype().as_str()),
            );
        }
        out.push(diag);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn agreeing_pairs() {
        assert!(types_agree(PinRole::Input, PinType::Input));
        assert!(types_agree(PinRole::SchmittInput, PinType::Input));
        assert!(types_agree(PinRole::PushPull, PinType::Output));
        assert!(types_agree(PinRole::OpenCollector, PinType::OpenCollector));
        assert!(types_agree(PinRole::ThreeState, PinType::TriState));
        assert!(types_agree(PinRole::Bidirectional, PinType::Bidirectional));
        assert!(types_agree(PinRole::Bidirectional, PinType::TriState));
        assert!(types_agree(PinRole::Supply, PinType::PowerIn));
        assert!(types_agree(PinRole::Ground, PinType::PowerIn));
        assert!(types_agree(PinRole::NoConnect, PinType::NoConnect));
        assert!(types_agree(PinRole::NoConnect, PinType::Passive));
        assert!(types_agree(PinRole::Analog, PinType::Passive));
    }

    #[test]
    fn disagreeing_pairs() {
        assert!(!types_agree(PinRole::PushPull, PinType::Input));
        assert!(!types_agree(PinRole::Input, PinType::Output));
        assert!(!types_agree(PinRole::Input, PinType::Passive));
        assert!(!types_agree(PinRole::Input, PinType::Unspecified));
        assert!(!types_agree(PinRole::OpenCollector, PinType::Output));
        assert!(!types_agree(PinRole::ThreeState, PinType::Output));
        assert!(!types_agree(PinRole::Supply, PinType::Input));
        assert!(!types_agree(PinRole::Supply, PinType::Passive));
        assert!(!types_agree(PinRole::Input, PinType::PowerIn));
        assert!(!types_agree(PinRole::NoConnect, PinType::PowerIn));
    }

    #[test]
    fn power_names() {
        assert!(names_disagree(PinRole::Input, Some("VCC")));
        assert!(names_disagree(PinRole::PushPull, Some("GND")));
        assert!(names_disagree(PinRole::Supply, Some("GND")));
        assert!(names_disagree(PinRole::Ground, Some("VDD")));
        assert!(!names_disagree(PinRole::Supply, Some("VCC")));
        assert!(!names_disagree(PinRole::Ground, Some("VSS")));
        assert!(!names_disagree(PinRole::Input, Some("1A")));
        assert!(!names_disagree(PinRole::Input, Some("~")));
        // an 8080's +12 V VDD is an analogue pin in the table: typed power-in it agrees; a
        // crystal pin typed power-in does not
        assert!(extra_supply(PinRole::Analog, PinType::PowerIn, Some("VDD")));
        assert!(extra_supply(
            PinRole::Analog,
            PinType::PowerIn,
            Some("VCC+")
        ));
        assert!(!extra_supply(
            PinRole::Analog,
            PinType::PowerIn,
            Some("XTAL1")
        ));
        assert!(!extra_supply(PinRole::Input, PinType::PowerIn, Some("VPP")));
        assert!(!names_disagree(PinRole::Input, None));
    }

    #[test]
    fn causes() {
        assert!(likely_cause(&[
            (PinType::Input, PinRole::PushPull),
            (PinType::Output, PinRole::Input)
        ])
        .contains("swapped"));
        assert!(likely_cause(&[
            (PinType::PowerIn, PinRole::Input),
            (PinType::Input, PinRole::Supply)
        ])
        .contains("power pins"));
        assert!(likely_cause(&[
            (PinType::Passive, PinRole::Input),
            (PinType::Passive, PinRole::PushPull)
        ])
        .contains("generic"));
        assert!(likely_cause(&[(PinType::Output, PinRole::OpenCollector)]).contains("another part"));
        // a power disagreement outweighs swapped signal pins; untyped pins outweigh both
        assert!(likely_cause(&[
            (PinType::Input, PinRole::PushPull),
            (PinType::Output, PinRole::Input),
            (PinType::PowerIn, PinRole::Input)
        ])
        .contains("power pins"));
        assert!(likely_cause(&[
            (PinType::Passive, PinRole::Input),
            (PinType::Passive, PinRole::Supply)
        ])
        .contains("generic"));
    }
}
