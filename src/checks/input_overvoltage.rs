//! Finds inputs driven above what they take at their supply: a driver's high level, a
//! pull-up's rail or a rail the input is tied to, above the load's limit. The limit is the
//! family's absolute maximum input voltage for bipolar TTL (7 V for 74LS), the supply plus the
//! clamp allowance for CMOS inputs clamped to their supply (VCC + 0.5 V for 74HC), and the
//! tolerant rating for 5 V tolerant families (5.5 V for 74LVC and 74AHC, whatever their
//! supply).
//!
//! A CMOS driver's high is taken as its supply (the highest it can go), and the message also
//! gives its guaranteed light-load VOH; a bipolar driver's high is its guaranteed VOH (its
//! unloaded level is not published, so the check is then a lower bound).
//!
//! Why it matters: above the limit, a TTL input's emitter junction breaks down and a CMOS
//! input's clamp diode conducts into its supply: the part is damaged, or it back-powers its
//! rail through the input and can latch up.
//!
//! Example: a CD4011B on +12V driving a 74LS00 input: a 12.00 V high against the 7.00 V
//! absolute maximum, over by 5.00 V. Or a 74HC00 on +5V into a 74HC04 on +3V3: 5.00 V
//! against 3.30 V + 0.5 V = 3.80 V.
//!
//! Fix: run the driver from the load's supply, shift the level down with a buffer on the
//! load's supply whose inputs take the higher level, use a tolerant family for the load, or
//! pull up (or tie) to the load's own supply.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "input-overvoltage",
    severity: crate::diag::Severity::Error,
    summary: "a driver's high level above what a load's input can take at its supply",
};

use std::collections::BTreeMap;

use super::common::{pin_list, supply_rail_name};
use super::Context;
use crate::circuit::{Circuit, PinRef};
use crate::classify::family::{Family, Technology};
use crate::classify::PinRole;
use crate::diag::Diag;
use crate::values::{format_ohms, format_volts};

/// What puts the high level on the net.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) enum Source {
    /// A driver; `light` is its guaranteed light-load VOH.
    Driver {
        at: PinRef,
        level: f64,
        light: f64,
        cmos: bool,
    },
    /// A pull-up resistor to a rail.
    PullUp { index: usize, level: f64 },
    /// The net is a rail.
    Rail { level: f64 },
}

impl Source {
    pub fn level(&self) -> f64 {
        match *self {
            Source::Driver { level, .. }
            | Source::PullUp { level, .. }
            | Source::Rail { level } => level,
        }
    }
}

/// The highest level an input of `fam` takes at supply `vcc`.
fn limit_volts(fam: &Family, vcc: f64) -> f64 {
    let clamped = vcc + fam.clamp_above_supply_v.unwrap_or(0.0);
    match fam.input_max_v {
        Some(m) if m >= clamped => m,
        _ => clamped,
    }
}

/// The highest level an input of `fam` takes at supply `vcc`, and how the limit reads.
fn limit(fam: &Family, vcc: f64) -> (f64, String) {
    let clamped = vcc + fam.clamp_above_supply_v.unwrap_or(0.0);
    match fam.input_max_v {
        Some(m) if m >= clamped => {
            let text = if fam.technology == Technology::Bipolar {
                format!(
                    "{} (the family's absolute maximum input voltage)",
                    format_volts(m)
                )
            } else {
                format!(
                    "{} (a tolerant input, rated to {} whatever its supply)",
                    format_volts(m),
                    format_volts(m)
                )
            };
            (m, text)
        }
        _ => (
            clamped,
            format!(
                "{} (clamped to the supply: {} + {})",
                format_volts(clamped),
                format_volts(vcc),
                format_volts(fam.clamp_above_supply_v.unwrap_or(0.0))
            ),
        ),
    }
}

/// The tolerant CMOS families (shipped or the project's) whose inputs take `level` at a supply
/// of `vcc`: the fix a level shift needs.
pub(super) fn tolerant_families(cx: &Circuit<'_, '_>, level: f64, vcc: f64) -> Vec<String> {
    cx.rules
        .families
        .iter()
        .filter(|f| f.technology == Technology::Cmos)
        .filter(|f| vcc >= f.supply_min - 1e-9 && vcc <= f.supply_max + 1e-9)
        .filter(|f| f.input_max_v.is_some_and(|m| m >= level - 1e-9))
        .map(|f| f.id.clone())
        .collect()
}

/// The sources of a high level on `net`, at the top of the rail tolerance.
pub(super) fn sources(cx: &Circuit<'_, '_>, net: usize) -> Vec<Source> {
    let nm = &cx.nets[net];
    let mut out = Vec::new();
    if let Some(v) = nm.rail().and_then(|r| r.v()) {
        out.push(Source::Rail {
            level: cx.rail_range(v).1,
        });
        return out;
    }
    for d in &nm.drivers {
        if !matches!(
            d.role,
            PinRole::PushPull | PinRole::ThreeState | PinRole::Bidirectional | PinRole::OpenEmitter
        ) {
            continue;
        }
        let (Some(lv), Some(fam), Some(s)) = (
            &d.levels(cx),
            cx.family(d.at.comp()),
            cx.supplies[d.at.comp()].as_ref(),
        ) else {
            continue;
        };
        let Some(light) = lv.voh.first().map(|p| p.v) else {
            continue;
        };
        let cmos = fam.technology == Technology::Cmos;
        let level = if cmos { cx.rail_range(s.vcc).1 } else { light };
        out.push(Source::Driver {
            at: d.at,
            level,
            light,
            cmos,
        });
    }
    for (i, p) in nm.pulls().iter().enumerate().filter(|(_, p)| p.up) {
        out.push(Source::PullUp {
            index: i,
            level: cx.rail_range(p.rail_volts).1,
        });
    }
    out
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for net in 0..cx.nets.len() {
        let nm = &cx.nets[net];
        for src in sources(cx, net) {
            // loads over the limit, by component
            let mut over: BTreeMap<usize, (Vec<PinRef>, f64, String)> = BTreeMap::new();
            for l in &nm.loads {
                if matches!(src, Source::Driver { at, .. } if at == l.at || at.comp() == l.at.comp())
                {
                    continue;
                }
                let (Some(fam), Some(s)) =
                    (cx.family(l.at.comp()), cx.supplies[l.at.comp()].as_ref())
                else {
                    continue;
                };
                // one rail is at one end of its tolerance at a time: a source and a load on
                // the same rail are compared at the same (top) end
                let src_rail = match &src {
                    Source::Rail { .. } => Some(net),
                    Source::Driver { at, .. } => {
                        cx.supplies[at.comp()].as_ref().and_then(|x| x.supply_net())
                    }
                    Source::PullUp { index, .. } => Some(nm.pulls()[*index].rail_net),
                };
                let same_rail = src_rail.is_some() && src_rail == s.supply_net();
                let end = if same_rail {
                    cx.rail_range(s.vcc).1
                } else {
                    cx.rail_range(s.vcc).0
                };
                // the limit's words only for an input over it
                if src.level() > limit_volts(fam, end) + 1e-9 {
                    over.entry(l.at.comp())
                        .or_insert_with(|| {
                            let (lim, text) = limit(fam, end);
                            (Vec::new(), lim, text)
                        })
                        .0
                        .push(l.at);
                }
            }
            for (comp, (pins, lim, text)) in over {
                out.push(diag(ctx, net, &src, comp, &pins, lim, &text));
            }
        }
    }
}

fn diag(
    ctx: &Context<'_, '_, '_>,
    net: usize,
    src: &Source,
    comp: usize,
    pins: &[PinRef],
    lim: f64,
    text: &str,
) -> Diag {
    let cx = ctx.cx;
    let nm = &cx.nets[net];
    let c = &cx.nl.components[comp];
    let loads = if pins.len() == 1 {
        cx.describe(pins[0])
    } else {
        format!(
            "{} {} ({} inputs)",
            c.reference,
            pin_list(ctx, pins),
            c.value_str()
        )
    };
    let level = src.level();
    let load_rail = supply_rail_name(ctx, comp);
    let (what, fix, at, label) = match *src {
        Source::Driver {
            at, light, cmos, ..
        } => {
            let high = if cmos {
                format!(
                    "a high of {} (its supply {}; {} guaranteed at light load)",
                    format_volts(level),
                    cx.supply_text(at.comp()),
                    format_volts(light)
                )
            } else {
                format!(
                    "a high of at least {} (its guaranteed VOH at {})",
                    format_volts(level),
                    cx.supply_text(at.comp())
                )
            };
            (
                format!("{} drives {high} into {loads}", cx.describe(at)),
                {
                    let vcc = cx.supplies[comp].as_ref().map_or(5.0, |s| s.vcc);
                    let names = tolerant_families(cx, level, vcc);
                    let shift = if names.is_empty() {
                        format!("put a level translator on {load_rail} between them")
                    } else {
                        format!(
                            "buffer the signal with a {} part on {load_rail}, whose inputs take {}",
                            match names.split_last() {
                                Some((last, rest)) if !rest.is_empty() =>
                                    format!("{} or {last}", rest.join(", ")),
                                _ => names.join(""),
                            },
                            format_volts(level)
                        )
                    };
                    format!(
                        "run {} from {load_rail}, or {shift}",
                        cx.nl.components[at.comp()].reference
                    )
                },
                Some(at),
                format!("drives {}", format_volts(level)),
            )
        }
        Source::PullUp { index, .. } => {
            let p = &nm.pulls()[index];
            (
                format!(
                    "{} {} pulls {} up to {} ({}) into {loads}",
                    cx.nl.components[p.resistor].reference,
                    format_ohms(p.ohms),
                    cx.net_name(net),
                    cx.net_name(p.rail_net),
                    format_volts(level)
                ),
                format!("pull the net up to {load_rail}, the load's own supply"),
                Some(p.at),
                format!("pull-up to {}", format_volts(level)),
            )
        }
        Source::Rail { .. } => (
            format!(
                "{loads} {} tied to {} ({})",
                if pins.len() == 1 { "is" } else { "are" },
                cx.net_name(net),
                format_volts(level)
            ),
            format!(
                "tie the input{} to {load_rail}, the load's own supply",
                if pins.len() == 1 { "" } else { "s" }
            ),
            None,
            String::new(),
        ),
    };
    let even = match *src {
        Source::Driver {
            light, cmos: true, ..
        } if light < level && light > lim => format!(
            " ({} even at the guaranteed level)",
            format_volts(light - lim)
        ),
        _ => String::new(),
    };
    let message = format!(
        "{what}; {} at most {text} at {}: over by {}{even}",
        if pins.len() == 1 {
            "it takes"
        } else {
            "they take"
        },
        cx.supply_text(comp),
        format_volts(level - lim)
    );
    let mut d = Diag::error("input-overvoltage", message)
        .at(
            cx.pin_span(pins[0]),
            format!("takes at most {}", format_volts(lim)),
        )
        .on_net(cx.net_name(net))
        .with_pin_list(super::common::pin_names(
            cx,
            pins.iter().chain(at.iter()).copied(),
        ));
    for p in &pins[1..] {
        d = d.also(cx.pin_span(*p), "input");
    }
    if let Some(a) = at {
        d = d.also(cx.pin_span(a), label);
    }
    d.with_help(fix)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The limit compared without its words is the limit the words state, for every shipped
    /// family at the supplies the tables publish and between them.
    #[test]
    fn the_limit_without_words_is_the_limit_with_them() {
        let families = crate::classify::family::FamilyTable::builtin();
        let mut n = 0;
        for fam in families.iter() {
            for vcc in [2.0, 3.3, 4.5, 5.0, 5.5, 10.0, 15.0] {
                assert_eq!(
                    limit_volts(fam, vcc),
                    limit(fam, vcc).0,
                    "{} at {vcc}",
                    fam.id
                );
                n += 1;
            }
        }
        assert!(n > 100, "{n}");
    }
}
