//! Finds outputs that fight: two or more push-pull outputs on one net, a push-pull output
//! tied straight to a rail, a push-pull output on the same net as a three-state or an
//! open-collector output, and three-state outputs that are enabled by the same signal at the
//! same level (so both are on at once).
//!
//! Why it matters: when two outputs disagree, the one driving low sinks whatever the other
//! can source, with nothing to limit the current but the output stages. The level sits in the
//! undefined band, the parts run hot, and the supply carries current spikes at every change.
//! An output tied to ground or to the supply is the same fault against a rail.
//!
//! Not reported: open-collector outputs wired together (wired-AND, with a pull-up), three-state
//! outputs whose enables are on different nets (the design may multiplex them) or on one net
//! at opposite levels (a 74LS125 and a 74LS126 sharing a select line), and a three-state output
//! whose enable is tied to its off level. Gates of one package paralleled for drive (same input
//! nets, outputs tied) are deliberate practice: they are reported as info with the combined
//! budget, the paralleled outputs' IOL and IOH summed against the net's load.
//!
//! Example: the outputs 2Y of a 74LS00 and 1Y of another 74LS00 both on `/START_N`.
//!
//! Fix: keep one driver on the net. To combine two signals, feed both into a gate, or use
//! open-collector outputs (wired-AND) with a pull-up; to share a bus, use three-state outputs
//! with enables decoded so that only one is on at a time.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "output-contention",
    severity: crate::diag::Severity::Error,
    summary: "two push-pull outputs on one net, or a push-pull output tied to a rail",
};

use super::common::pct;
use super::Context;
use crate::circuit::enables::{enabled_together, gate, literal_text, Gate, Literal};
use crate::circuit::{Circuit, PinRef};
use crate::classify::PinRole;
use crate::diag::Diag;
use crate::netlist::Connection;
use crate::values::format_amps;

/// The units of one package whose outputs are paralleled on purpose: every output is a
/// push-pull output of one component, each in its own unit, each unit with exactly one
/// output and its inputs on the same nets as the others', and the package sharing nothing
/// between units but its supply pins (a gate package, not a register with a common clock).
pub(super) fn paralleled_units(cx: &Circuit<'_, '_>, outs: &[PinRef]) -> Option<Vec<String>> {
    let comp = outs.first()?.comp();
    if outs.len() < 2 || outs.iter().any(|o| o.comp() != comp) {
        return None;
    }
    let part = &cx.cl.parts[comp];
    let pins = &cx.nl.components[comp].pins;
    let shared_only_power = (0..pins.len())
        .filter(|&i| part.units[i].is_none())
        .all(|i| {
            matches!(
                part.roles[i],
                PinRole::Supply | PinRole::Ground | PinRole::NoConnect
            )
        });
    if !shared_only_power {
        return None;
    }
    let mut units: Vec<String> = Vec::new();
    let mut inputs: Option<Vec<usize>> = None;
    for o in outs {
        if part.roles[o.pin()] != PinRole::PushPull {
            return None;
        }
        let unit = part.units[o.pin()].as_deref().map(String::from)?;
        if units.contains(&unit) {
            return None;
        }
        let in_unit = |i: &usize| part.units[*i].as_deref() == Some(unit.as_str());
        if (0..pins.len())
            .filter(in_unit)
            .filter(|&i| part.roles[i].is_output())
            .count()
            != 1
        {
            return None;
        }
        let mut nets = Vec::new();
        for i in (0..pins.len())
            .filter(in_unit)
            .filter(|&i| matches!(part.roles[i], PinRole::Input | PinRole::SchmittInput))
        {
            match pins[i].connection {
                Connection::Net { net, .. } => nets.push(net as usize),
                _ => return None,
            }
        }
        nets.sort_unstable();
        if nets.is_empty() || inputs.as_ref().is_some_and(|n| *n != nets) {
            return None;
        }
        inputs = Some(nets);
        units.push(unit);
    }
    Some(units)
}

/// What is wrong on one net.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(super) enum Finding {
    /// Push-pull outputs (or three-state ones enabled through rails) that always drive.
    Fight(Vec<PinRef>),
    /// Deliberately paralleled gates of one package.
    Paralleled(Vec<PinRef>),
    /// An output on a rail.
    OnRail(PinRef),
    /// Always-driving outputs and a three-state output that drives when enabled.
    AgainstEnabled { always: Vec<PinRef>, gated: PinRef },
    /// Always-driving outputs and open-collector outputs.
    AgainstOpenCollector {
        always: Vec<PinRef>,
        oc: Vec<PinRef>,
    },
    /// Three-state outputs enabled together.
    SameEnable(Vec<PinRef>),
}

/// Everything that fights on net `net`.
pub(super) fn assess(cx: &Circuit<'_, '_>, net: usize) -> Vec<Finding> {
    let nm = &cx.nets[net];
    let mut out = Vec::new();
    if nm.rail().is_some() {
        for d in &nm.drivers {
            let g = gate(cx, d.at);
            let report = match d.role {
                PinRole::PushPull | PinRole::ThreeState => g != Gate::Never,
                // an unused transceiver pin tied to a rail is fine unless its side always drives
                PinRole::Bidirectional => g == Gate::Always,
                _ => false,
            };
            if report {
                out.push(Finding::OnRail(d.at));
            }
        }
        return out;
    }
    let mut always = Vec::new();
    let mut gated: Vec<(PinRef, Vec<Literal>)> = Vec::new();
    let mut oc = Vec::new();
    for d in &nm.drivers {
        match d.role {
            PinRole::OpenCollector => oc.push(d.at),
            PinRole::PushPull | PinRole::ThreeState | PinRole::Bidirectional => {
                match gate(cx, d.at) {
                    Gate::Always => always.push(d.at),
                    Gate::When(l) => gated.push((d.at, l)),
                    Gate::Never | Gate::Unknown => {}
                }
            }
            _ => {}
        }
    }
    if always.len() >= 2 {
        if paralleled_units(cx, &always).is_some() {
            out.push(Finding::Paralleled(always.clone()));
        } else {
            out.push(Finding::Fight(always.clone()));
        }
    }
    if !always.is_empty() {
        for (g, _) in &gated {
            out.push(Finding::AgainstEnabled {
                always: always.clone(),
                gated: *g,
            });
        }
        if !oc.is_empty() {
            out.push(Finding::AgainstOpenCollector {
                always: always.clone(),
                oc,
            });
        }
    }
    // three-state outputs enabled together, grouped
    let mut done = vec![false; gated.len()];
    for i in 0..gated.len() {
        if done[i] {
            continue;
        }
        let mut group = vec![gated[i].0];
        for j in i + 1..gated.len() {
            if !done[j] && enabled_together(&gated[i].1, &gated[j].1) {
                done[j] = true;
                group.push(gated[j].0);
            }
        }
        if group.len() >= 2 {
            out.push(Finding::SameEnable(group));
        }
    }
    out
}

fn list(cx: &Circuit<'_, '_>, pins: &[PinRef]) -> String {
    let items: Vec<String> = pins.iter().map(|p| cx.describe(*p)).collect();
    match items.len() {
        0 => String::new(),
        1 => items[0].clone(),
        n => format!("{} and {}", items[..n - 1].join(", "), items[n - 1]),
    }
}

/// `rated IOH 0.40 mA and IOL 8.00 mA at +5V (5.00 V)`
fn ratings(cx: &Circuit<'_, '_>, net: usize, p: PinRef) -> String {
    match cx.nets[net]
        .drivers
        .iter()
        .find(|d| d.at == p)
        .and_then(|d| d.levels(cx))
    {
        Some(lv) => format!(
            "each rated to source {} (IOH) and sink {} (IOL) at {}",
            format_amps(lv.ioh_max.abs()),
            format_amps(lv.iol_max.abs()),
            cx.supply_text(p.comp())
        ),
        None => "with ratings unknown: its family is not known".to_string(),
    }
}

/// How a gated output is turned on: `when U4.1 (1OE~) on /EN_A is low`
fn on_text(cx: &Circuit<'_, '_>, p: PinRef) -> String {
    match gate(cx, p) {
        Gate::When(l) => format!(
            "when {}",
            l.iter()
                .map(|x| literal_text(cx, p.comp(), x, true))
                .collect::<Vec<_>>()
                .join(" and ")
        ),
        Gate::Always => "all the time".to_string(),
        _ => "when enabled".to_string(),
    }
}

/// The shared enable condition, by net: `/EN_A_N low`, `/DIR low and /OE_N low`.
fn together_text(cx: &Circuit<'_, '_>, p: PinRef) -> String {
    match gate(cx, p) {
        Gate::When(l) => l
            .iter()
            .map(|x| {
                format!(
                    "{} {}",
                    cx.net_name(x.net),
                    if x.high { "high" } else { "low" }
                )
            })
            .collect::<Vec<_>>()
            .join(" and "),
        _ => "the same enable".to_string(),
    }
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for net in 0..cx.nets.len() {
        for f in assess(cx, net) {
            let mut d = diag(ctx, net, &f);
            // an unclassified part's pin types are a hint, never proof
            let pins = finding_pins(&f);
            let hinted: Vec<PinRef> = pins
                .iter()
                .copied()
                .filter(|p| {
                    cx.nets[net]
                        .drivers
                        .iter()
                        .any(|d| d.at == *p && d.symbol_only)
                })
                .collect();
            if !hinted.is_empty() && d.severity > crate::diag::Severity::Info {
                let all = hinted.len() == pins.len();
                d.severity = if all {
                    crate::diag::Severity::Info
                } else {
                    crate::diag::Severity::Warning
                };
                let mut refs: Vec<&str> = hinted
                    .iter()
                    .map(|p| cx.nl.components[p.comp()].reference.as_str())
                    .collect();
                refs.dedup();
                d.extend_message(&format!(
                    " (this rests on the symbol's pin types of {}, which netmargin does not know: check that {} really drive{} all the time)",
                    refs.join(", "),
                    if refs.len() == 1 { "its pins" } else { "their pins" },
                    ""
                ));
            }
            out.push(d);
        }
    }
}

/// Every pin a finding names.
fn finding_pins(f: &Finding) -> Vec<PinRef> {
    match f {
        Finding::Fight(ps) | Finding::Paralleled(ps) | Finding::SameEnable(ps) => ps.clone(),
        Finding::OnRail(p) => vec![*p],
        Finding::AgainstEnabled { always, gated } => {
            always.iter().copied().chain([*gated]).collect()
        }
        Finding::AgainstOpenCollector { always, oc } => {
            always.iter().chain(oc.iter()).copied().collect()
        }
    }
}

fn diag(ctx: &Context<'_, '_, '_>, net: usize, f: &Finding) -> Diag {
    let cx = ctx.cx;
    let name = cx.net_name(net);
    let pins_of = |ps: &[PinRef]| ps.iter().map(|p| cx.pin_name(*p)).collect::<Vec<_>>();
    let combine = "keep one driver on the net: to combine the signals, feed them into a gate, or use open-collector outputs (wired-AND) with a pull-up";
    match f {
        Finding::Fight(ps) => {
            let mut d = Diag::error(
                "output-contention",
                format!(
                    "{} push-pull outputs drive {name}: {}; when they disagree, the one driving low sinks what the others source, limited only by the output stages ({}), and the level is undefined",
                    ps.len(),
                    list(cx, ps),
                    ratings(cx, net, ps[0])
                ),
            )
            .at(cx.pin_span(ps[0]), "push-pull output")
            .on_net(name)
            .with_pins(pins_of(ps));
            for p in &ps[1..] {
                d = d.also(cx.pin_span(*p), "another push-pull output");
            }
            let same_pkg = ps.iter().all(|p| p.comp() == ps[0].comp());
            let help = if same_pkg {
                format!("{combine} (these gates share a package, but their inputs are on different nets, so they are not a paralleled pair)")
            } else {
                combine.to_string()
            };
            d.with_help(help)
        }
        Finding::Paralleled(ps) => {
            let comp = ps[0].comp();
            let b = ctx.budgets.net(net);
            let nm = &cx.nets[net];
            let first = nm.drivers.iter().position(|d| d.at == ps[0]);
            let db = first.and_then(|i| b.drivers.iter().find(|x| x.driver() == i));
            let (iol, ioh): (f64, f64) = ps
                .iter()
                .filter_map(|p| {
                    nm.drivers
                        .iter()
                        .find(|d| d.at == *p)
                        .and_then(|d| d.levels(cx))
                })
                .fold((0.0, 0.0), |(l, h), lv| {
                    (l + lv.iol_max.abs(), h + lv.ioh_max.abs())
                });
            let units: Vec<String> = paralleled_units(cx, ps).unwrap_or_default();
            let budget = match db.and_then(|db| db.low().zip(db.high())) {
                Some((lo, hi)) => format!(
                    "; combined budget: low {} of {} IOL ({}), high {} of {} IOH ({}) at {}",
                    format_amps(lo.total),
                    format_amps(iol),
                    pct(if iol > 0.0 { lo.total / iol } else { 0.0 }),
                    format_amps(hi.total),
                    format_amps(ioh),
                    pct(if ioh > 0.0 { hi.total / ioh } else { 0.0 }),
                    cx.supply_text(comp)
                ),
                None => String::new(),
            };
            let mut d = Diag::info(
                "output-contention",
                format!(
                    "{} gates {} of {} ({}) are paralleled on {name}: same input nets, outputs {} tied{budget}",
                    ps.len(),
                    join_and(&units),
                    cx.nl.components[comp].reference,
                    cx.nl.components[comp].value_str(),
                    join_and(&pins_of(ps)),
                ),
            )
            .at(cx.pin_span(ps[0]), "paralleled output")
            .on_net(name)
            .with_pins(pins_of(ps));
            for p in &ps[1..] {
                d = d.also(cx.pin_span(*p), "paralleled output");
            }
            d.with_help("deliberate practice for more drive; the outputs of one package switch together, but do not count on them sharing the current evenly")
        }
        Finding::OnRail(p) => {
            let rail = cx.nets[net].rail().expect("assessed as a rail");
            let lv = cx.nets[net]
                .drivers
                .iter()
                .find(|d| d.at == *p)
                .and_then(|d| d.levels(cx));
            let (state, what, rating) = if rail.ground {
                (
                    "high",
                    "its high-side stage is shorted to ground",
                    lv.map(|l| {
                        format!(" (it is rated to source {})", format_amps(l.ioh_max.abs()))
                    }),
                )
            } else {
                (
                    "low",
                    "it sinks straight from the rail",
                    lv.map(|l| format!(" (it is rated to sink {})", format_amps(l.iol_max.abs()))),
                )
            };
            let when = match cx.role(*p) {
                PinRole::PushPull => String::new(),
                _ => format!(" {}", on_text(cx, *p)),
            };
            Diag::error(
                "output-contention",
                format!("{} is tied straight to {name}: whenever it drives {state}{when}, {what}{}", cx.describe(*p), rating.unwrap_or_default()),
            )
            .at(cx.pin_span(*p), format!("output on {name}"))
            .on_net(name)
            .with_pin_list(super::common::pin_names(cx, [*p]))
            .with_help("lift the output off the rail: an unused output is left open; if a fixed level was wanted, set it through the gate's inputs")
        }
        Finding::AgainstEnabled { always, gated } => {
            let mut d = Diag::error(
                "output-contention",
                format!(
                    "{} drives {name} {}, and {} drives it all the time: they fight whenever the three-state output is on",
                    cx.describe(*gated),
                    on_text(cx, *gated),
                    list(cx, always)
                ),
            )
            .at(cx.pin_span(*gated), "three-state output")
            .on_net(name)
            .with_pins(std::iter::once(cx.pin_name(*gated)).chain(pins_of(always)));
            for p in always {
                d = d.also(cx.pin_span(*p), "push-pull output, always on");
            }
            d.with_help("make every driver on the net three-state, with enables decoded so that only one is on at a time, or remove the push-pull driver")
        }
        Finding::AgainstOpenCollector { always, oc } => {
            let mut d = Diag::error(
                "output-contention",
                format!(
                    "{} drives {name} high and low, and the open-collector output{} {} pull{} it low: whenever it drives high against {}, it sources into a short ({})",
                    list(cx, always),
                    if oc.len() == 1 { "" } else { "s" },
                    list(cx, oc),
                    if oc.len() == 1 { "s" } else { "" },
                    if oc.len() == 1 { "it" } else { "them" },
                    ratings(cx, net, always[0])
                ),
            )
            .at(cx.pin_span(always[0]), "push-pull output")
            .on_net(name)
            .with_pins(pins_of(always).into_iter().chain(pins_of(oc)));
            for p in always[1..].iter().chain(oc) {
                d = d.also(
                    cx.pin_span(*p),
                    if oc.contains(p) {
                        "open-collector output"
                    } else {
                        "push-pull output"
                    },
                );
            }
            d.with_help("replace the push-pull driver by an open-collector gate (wired-AND, with a pull-up), or combine the signals in a gate")
        }
        Finding::SameEnable(ps) => {
            let mut d = Diag::error(
                "output-contention",
                format!("{} three-state outputs drive {name} and are turned on together by {}: {}; two drivers on at once fight", ps.len(), together_text(cx, ps[0]), list(cx, ps)),
            )
            .at(cx.pin_span(ps[0]), format!("enabled {}", on_text(cx, ps[0])))
            .on_net(name)
            .with_pins(pins_of(ps));
            for p in &ps[1..] {
                d = d.also(cx.pin_span(*p), format!("enabled {}", on_text(cx, *p)));
            }
            d.with_help("give each driver its own enable, decoded so that only one is on at a time (the outputs of a 74LS139 decoder are exclusive)")
        }
    }
}

fn join_and(items: &[String]) -> String {
    match items.len() {
        0 => String::new(),
        1 => items[0].clone(),
        n => format!("{} and {}", items[..n - 1].join(", "), items[n - 1]),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn lit(net: usize, high: bool) -> Literal {
        Literal { net, high, pin: 0 }
    }

    #[test]
    fn enables_on_one_net_at_one_level_are_on_together() {
        assert!(enabled_together(&[lit(3, false)], &[lit(3, false)]));
        // a '125 (active low) and a '126 (active high) on one select line: a multiplexer
        assert!(!enabled_together(&[lit(3, false)], &[lit(3, true)]));
        // different enable nets: the design may decode them
        assert!(!enabled_together(&[lit(3, false)], &[lit(4, false)]));
        assert!(!enabled_together(
            &[lit(3, false), lit(5, true)],
            &[lit(3, false)]
        ));
    }
}
