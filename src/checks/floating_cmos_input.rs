//! Finds CMOS inputs with nothing to set their level: an input on no net, or on a net with
//! no driver, no rail and no pull resistor (a net of inputs only, or an input wired only to
//! a capacitor). A whole gate whose inputs all float and whose output goes nowhere is
//! reported once, by gate.
//!
//! Why it matters: a CMOS input is a pair of gates with no path to either rail. Left open it
//! drifts to mid-supply, where both transistors of its input stage conduct: the part draws
//! supply current, gets warm, and its output may oscillate and feed noise into the rest of
//! the package. This holds for every input of an unused gate too.
//!
//! Example: a 74HC00 whose fourth gate was never placed in the schematic (KiCad 5 leaves its
//! pins out of the netlist): inputs 12 and 13 float.
//!
//! Fix: tie unused inputs to ground or to the supply (or to a used input of the same gate);
//! drive every used input; leave unused outputs open.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "floating-cmos-input",
    severity: crate::diag::Severity::Error,
    summary: "a CMOS input with nothing to set its level: no driver, no rail, no pull resistor",
};

use super::common::{
    agree, floating_inputs, ground_rail_name, net_name_of, pin_list, push_all, push_pin_name,
    push_unused_gate, supply_rail_name, Float, GateKey, GateWords, Words,
};
use super::Context;
use crate::diag::Piece::{Own, Said};
use crate::diag::{Diag, Text};

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    // the words every part alike shares (the tail of the message, the help), made once
    let mut words = Words::new();
    let singles = floating_inputs(ctx, false, |g| {
        let key = GateKey::of(ctx, &g);
        let words = words.get(key, || {
            let pins: Vec<_> = g.inputs.iter().map(|f| f.at).collect();
            let list = pin_list(ctx, &pins);
            let n = pins.len();
            let absent = g.inputs.iter().all(|f| matches!(f.why, Float::Absent));
            GateWords::new(
                out,
                cx,
                &g,
                INFO.id,
                &format!(
                    "{}: {}{}",
                    agree(n, "its CMOS input floats", "its CMOS inputs float"),
                    list,
                    if absent {
                        format!(
                            " {} on no net (the gate was never placed)",
                            agree(n, "is", "are")
                        )
                    } else {
                        format!(" {} connected to nothing", agree(n, "is", "are"))
                    }
                ),
                format!(
                    "tie {} to {} (or to {}); leave the gate's output {} open",
                    list,
                    ground_rail_name(ctx, g.comp),
                    supply_rail_name(ctx, g.comp),
                    pin_list(ctx, g.outputs)
                ),
            )
        });
        push_unused_gate(out, cx, &g, crate::diag::Severity::Error, words);
    });
    // the wording that depends on the part alone, made once per part (a part has many
    // findings, in a row)
    let mut part_text: Option<(usize, &str, Text)> = None;
    let mut big_nets = LoadsOf::default();
    for f in singles {
        if part_text.as_ref().is_none_or(|(c, ..)| *c != f.at.comp()) {
            // an NMOS part's input (a processor, an EPROM) is no CMOS pair, but floats the same
            let input = if cx
                .family(f.at.comp())
                .is_some_and(|fam| fam.id.starts_with("NMOS"))
            {
                "an NMOS input"
            } else {
                "a CMOS input"
            };
            let help = format!(
                "drive it, or tie it to {} or {} (or to a used input of the same gate)",
                ground_rail_name(ctx, f.at.comp()),
                supply_rail_name(ctx, f.at.comp())
            );
            part_text = Some((f.at.comp(), input, Text::from(help)));
        }
        let (_, input, help) = part_text.as_ref().expect("set above");
        let input = *input;
        // the message in pieces: the part's reference and the net's name are the finding's
        // own words, the words about the pin and the net's state are said alike by every
        // part of a kind (held once in the list)
        let describe = cx.describe(f.at);
        let r = cx.nl.components[f.at.comp()].reference.as_str().len();
        let (reference, pin) = describe.split_at(r);
        let d = |label: std::borrow::Cow<'static, str>| {
            Diag::error("floating-cmos-input", String::new())
                .at(cx.pin_span(f.at), label)
                .with_help(help.clone())
                .with_pin_list(super::common::pin_names(cx, [f.at]))
        };
        match f.why {
            Float::Absent => {
                out.push_pieces(
                    &d("on no net".into()),
                    &[
                        Own(reference),
                        Said(pin),
                        Said(" is on no net: "),
                        Said(input),
                        Said(" must never float"),
                    ],
                );
            }
            Float::Alone(net) => {
                out.push_pieces(
                    &d("connected to nothing".into()).on_net(net_name_of(cx, net)),
                    &[
                        Own(reference),
                        Said(pin),
                        Said(" is connected to nothing: "),
                        Said(input),
                        Said(" must never float"),
                    ],
                );
            }
            Float::SwitchOpen(net, ref l) => out.push(
                Diag::error(
                    "floating-cmos-input",
                    format!(
                        "{describe} is on net `{}`, which only {} sets, and only while closed: in the open position the CMOS input floats",
                        cx.net_name(net),
                        super::common::switch_names(ctx, l)
                    ),
                )
                .at(
                    cx.pin_span(f.at),
                    format!("floats while {} open", super::common::switch_names(ctx, l)),
                )
                .with_help(help.clone())
                .with_pin_list(super::common::pin_names(cx, [f.at]))
                .on_net(net_name_of(cx, net)),
            ),
            Float::Undriven(net) => {
                let nm = &cx.nets[net];
                // the other pins on the net, written in place
                let mut others = String::new();
                let mut rest = nm
                    .loads
                    .iter()
                    .map(|l| l.at)
                    .filter(|&at| at != f.at)
                    .chain(nm.passives.iter().copied())
                    .peekable();
                if rest.peek().is_none() {
                    others.push_str("this input");
                }
                let mut listed = 0;
                for p in rest.by_ref().take(LISTED) {
                    if listed > 0 {
                        others.push_str(", ");
                    }
                    push_pin_name(&mut others, cx, p);
                    listed += 1;
                }
                // the rest are counted, not named: every input of a big undriven net is a
                // finding, and naming all the others in each would grow with the square of
                // the net
                if rest.peek().is_some() {
                    let own = big_nets.holds(nm, net, f.at);
                    let more = nm.loads.len() + nm.passives.len() - usize::from(own) - listed;
                    push_all(&mut others, &[" and ", &more.to_string(), " more"]);
                }
                let name = net_name_of(cx, net);
                out.push_pieces(
                    &d("no driver on this net".into()).on_net(name.clone()),
                    &[
                        Own(reference),
                        Said(pin),
                        Said(" is on net `"),
                        Own(&name),
                        Said("`, which nothing drives: no output, rail or pull resistor (only "),
                        Own(&others),
                        Said(")"),
                    ],
                );
            }
        }
    }
}

/// The most other pins a finding about an undriven net names; it counts the rest.
const LISTED: usize = 8;

/// The loads of each big net asked about, sorted once, to tell whether a pin is one of them
/// without a walk of the net for each of its findings.
#[derive(Default)]
struct LoadsOf(rustc_hash::FxHashMap<usize, Vec<crate::circuit::PinRef>>);

impl LoadsOf {
    /// True when `at` is one of `nm`'s loads (`nm` is net `net`).
    fn holds(
        &mut self,
        nm: &crate::circuit::NetModel,
        net: usize,
        at: crate::circuit::PinRef,
    ) -> bool {
        let sorted = self.0.entry(net).or_insert_with(|| {
            let mut v: Vec<_> = nm.loads.iter().map(|l| l.at).collect();
            v.sort_unstable();
            v
        });
        sorted.binary_search(&at).is_ok()
    }
}
