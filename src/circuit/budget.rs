//! Per-net DC budgets, as an engineer lays them out with the data books open: for each
//! driver, the current it must sink in the low state and source in the high state, item by
//! item, against its rating; the levels it then guarantees; and each load's margin against
//! them. The checks, the `net` command and the audit charts all read these numbers; none
//! recomputes them.

use super::{Circuit, PinRef};
use crate::classify::family::{Drive, HighOutput, Technology};
use crate::classify::PinRole;
use crate::values::{format_amps, format_ohms};

/// One contribution to a state's current.
#[derive(Debug, Clone)]
pub struct Item {
    pub what: String,
    pub at: Option<PinRef>,
    /// Magnitude in amperes.
    pub amps: f64,
    /// For a logic input that draws more than one of its family's input currents in this
    /// state: how many.
    pub unit_loads: Option<f64>,
}

/// One state (low or high) of one driver.
#[derive(Debug, Clone)]
pub struct StateBudget {
    pub items: Vec<Item>,
    /// Total current magnitude, amperes.
    pub total: f64,
    /// The driver's rated current magnitude in this state.
    pub rating: f64,
    /// The guaranteed level at `total` (VOL max or VOH min); `None` beyond the published rows.
    pub level: Option<f64>,
}

impl StateBudget {
    pub fn ratio(&self) -> f64 {
        if self.rating > 0.0 {
            self.total / self.rating
        } else if self.total > 0.0 {
            f64::INFINITY
        } else {
            0.0
        }
    }
}

/// A pull-up's effect on the high level.
#[derive(Debug, Clone)]
pub struct PullUpHigh {
    pub rail_net: usize,
    pub rail_volts: f64,
    /// Pull-ups in parallel.
    pub ohms: f64,
    /// Current the pull-up supplies to the loads and leakages in the high state.
    pub current: f64,
    pub level: f64,
}

#[derive(Debug, Clone)]
pub struct DriverBudget {
    /// Index into the net's drivers.
    pub driver: usize,
    pub low: Option<StateBudget>,
    /// `None` for an open-collector output (it does not drive high).
    pub high: Option<StateBudget>,
    pub pull_up: Option<PullUpHigh>,
    /// The level the net reaches in the high state: the driver's VOH, raised by a pull-up;
    /// for an open collector, the pull-up's level. `None` when nothing guarantees it.
    pub high_level: Option<f64>,
    pub low_level: Option<f64>,
    /// The output's operating point with the LEDs and resistors it lights or holds in its
    /// high state (LEDs to ground, pull-downs) and in its low state (LEDs from a rail,
    /// pull-ups); `None` when there are none in that state. Boxed: most outputs have none,
    /// and a budget is kept for every net.
    pub drive_high: Option<Box<OperatingPoint>>,
    pub drive_low: Option<Box<OperatingPoint>>,
}

/// What a resistive load on an output is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LoadKind {
    /// `NetModel::led_paths[i]` (high state) or `NetModel::sink_paths[i]` (low state).
    Led(usize),
    /// `NetModel::pulls[i]`.
    Pull(usize),
}

/// One resistive load at the operating point.
#[derive(Debug, Clone)]
pub struct ResistiveLoad {
    pub kind: LoadKind,
    pub at: PinRef,
    /// Current through it at the operating point, amperes (0 when it cannot conduct).
    pub amps: f64,
    /// Its LEDs' forward voltages added (0 for a resistor).
    pub vf: f64,
    pub ohms: f64,
    /// The rail it ends on.
    pub rail_volts: f64,
    /// LEDs that need more than the output can reach: they never light.
    pub dark: bool,
    /// The path runs into a display whose common is open (`LedPath::open_common`).
    pub open_common: Option<usize>,
}

/// An output's operating point with resistive loads: the output is taken as a source of its
/// supply (or ground) behind the resistance its data-sheet row implies, (VCC - VOH) / IOH in
/// the high state and VOL / IOL in the low state at the rated current. A guaranteed row is
/// the weakest output the maker ships, so the current computed is the least a real part
/// delivers and the level the furthest from the rail.
#[derive(Debug, Clone)]
pub struct OperatingPoint {
    /// True for the high state.
    pub high: bool,
    /// The supply the output pulls to (its VCC in the high state, 0 V in the low state).
    pub rail: f64,
    /// The data-sheet row the resistance comes from: (volts, amperes magnitude).
    pub row: (f64, f64),
    /// The output's resistance, ohms.
    pub r_out: f64,
    /// The output pin's voltage at the operating point.
    pub level: f64,
    /// The current through the output pin, amperes (resistive loads and logic inputs).
    pub total: f64,
    /// The logic inputs' share of it.
    pub logic: f64,
    /// The rated current in this state (IOH or IOL magnitude).
    pub rating: f64,
    /// The furthest the output goes with no load (VOH or VOL at its lightest row): LEDs that
    /// need more never light.
    pub reach: f64,
    pub loads: Vec<ResistiveLoad>,
}

/// The voltage at which `f` (decreasing in v) crosses zero in [lo, hi], by bisection.
fn crossing(lo: f64, hi: f64, f: impl Fn(f64) -> f64) -> f64 {
    let (mut a, mut b) = (lo, hi);
    if f(a) <= 0.0 {
        return a;
    }
    if f(b) >= 0.0 {
        return b;
    }
    for _ in 0..60 {
        let m = 0.5 * (a + b);
        if f(m) > 0.0 {
            a = m;
        } else {
            b = m;
        }
    }
    0.5 * (a + b)
}

/// One load as the solver sees it: it conducts when the output is beyond `knee` (above it
/// in the high state, below it in the low state) through `ohms`.
struct Knee {
    kind: LoadKind,
    at: PinRef,
    vf: f64,
    ohms: f64,
    rail_volts: f64,
    open_common: Option<usize>,
}

/// The loads that conduct towards a rail in one state: the LED paths of that state and the
/// pull resistors `keep` selects.
fn knees(
    paths: &[super::LedPath],
    pulls: &[super::Pull],
    keep: impl Fn(&super::Pull) -> bool,
) -> Vec<Knee> {
    let leds = paths.iter().enumerate().map(|(i, p)| Knee {
        kind: LoadKind::Led(i),
        at: p.at,
        vf: p.vf,
        ohms: p.ohms,
        rail_volts: p.rail_volts,
        open_common: p.open_common,
    });
    let resistors = pulls
        .iter()
        .enumerate()
        .filter(|(_, p)| keep(p))
        .map(|(i, p)| Knee {
            kind: LoadKind::Pull(i),
            at: p.at,
            vf: 0.0,
            ohms: p.ohms,
            rail_volts: p.rail_volts,
            open_common: None,
        });
    leds.chain(resistors).collect()
}

/// Solves the output's operating point in one state. `knees` conduct towards their rail;
/// `logic` is the logic inputs' current (IIH or IIL), drawn at any level.
fn operating_point(
    high: bool,
    vcc: f64,
    row: (f64, f64),
    rating: f64,
    logic: f64,
    reach: f64,
    knees: Vec<Knee>,
) -> Option<OperatingPoint> {
    if knees.is_empty() || row.1 <= 0.0 {
        return None;
    }
    let (rail, r_out) = if high {
        (vcc, (vcc - row.0) / row.1)
    } else {
        (0.0, row.0 / row.1)
    };
    if r_out <= 0.0 || !r_out.is_finite() {
        return None;
    }
    // a path with no resistor is limited by the output alone: a milliohm keeps the sums finite
    let conduct = |k: &Knee, v: f64| -> f64 {
        let r = k.ohms.max(1e-3);
        if high {
            ((v - k.vf - k.rail_volts) / r).max(0.0)
        } else {
            ((k.rail_volts - k.vf - v) / r).max(0.0)
        }
    };
    let level = if high {
        crossing(0.0, vcc, |v| {
            (vcc - v) / r_out - logic - knees.iter().map(|k| conduct(k, v)).sum::<f64>()
        })
    } else {
        // the low state rises from 0 V: the sunk current grows, the loads' current falls
        let top = knees.iter().map(|k| k.rail_volts).fold(vcc, f64::max);
        crossing(0.0, top, |v| {
            logic + knees.iter().map(|k| conduct(k, v)).sum::<f64>() - v / r_out
        })
    };
    let loads: Vec<ResistiveLoad> = knees
        .iter()
        .map(|k| {
            let dark = k.vf > 0.0
                && if high {
                    k.vf + k.rail_volts >= reach
                } else {
                    k.rail_volts - k.vf <= reach
                };
            ResistiveLoad {
                kind: k.kind,
                at: k.at,
                amps: conduct(k, level),
                vf: k.vf,
                ohms: k.ohms,
                rail_volts: k.rail_volts,
                dark,
                open_common: k.open_common,
            }
        })
        .collect();
    Some(OperatingPoint {
        high,
        rail,
        row,
        r_out,
        level,
        total: (rail - level).abs() / r_out,
        logic,
        rating,
        reach,
        loads,
    })
}

/// The high and low operating points of driver `d` of net `nm` with its resistive loads.
fn drive_points(
    nm: &super::NetModel,
    d: &super::Driver,
    lv: &crate::classify::family::Levels,
    iih: f64,
    iil: f64,
    stops_short: bool,
) -> (Option<OperatingPoint>, Option<OperatingPoint>) {
    let drives_high = matches!(
        d.role,
        PinRole::PushPull | PinRole::ThreeState | PinRole::Bidirectional
    );
    let drives_low = drives_high || d.role == PinRole::OpenCollector;
    let strongest = |rows: &[crate::classify::family::VI]| {
        rows.iter()
            .max_by(|a, b| a.a.abs().total_cmp(&b.a.abs()))
            .map(|r| (r.v, r.a.abs()))
    };
    let high = if drives_high {
        let knees = knees(&nm.led_paths, &nm.pulls, |p| !p.up);
        // how far the high can go with no load: a CMOS output to its supply; a totem pole
        // (bipolar, NMOS, a TTL-level stage) about two base-emitter drops, 1.4 V, below it
        // (common practice; its guaranteed VOH is a minimum, not a ceiling)
        let reach = if stops_short { lv.vcc - 1.4 } else { lv.vcc };
        strongest(&lv.voh)
            .and_then(|row| operating_point(true, lv.vcc, row, lv.ioh_max.abs(), iih, reach, knees))
    } else {
        None
    };
    let low = if drives_low {
        // an open collector's pull-up is the open-collector window's (`PullUpWindow`)
        let own_pulls = d.role != PinRole::OpenCollector;
        let knees = knees(&nm.sink_paths, &nm.pulls, |p| p.up && own_pulls);
        // the low can go down to ground: LEDs that need more than their rail never light
        let reach = 0.0;
        strongest(&lv.vol).and_then(|row| {
            operating_point(false, lv.vcc, row, lv.iol_max.abs(), iil, reach, knees)
        })
    } else {
        None
    };
    (high, low)
}

/// A load's margins against one driver.
#[derive(Debug, Clone)]
pub struct LoadMargin {
    pub driver: usize,
    pub load: usize,
    pub vih: f64,
    pub vil: f64,
    /// high level - VIH (negative: short).
    pub high_margin: Option<f64>,
    /// VIL - low level (negative: short).
    pub low_margin: Option<f64>,
    /// With a rail tolerance, a CMOS load's thresholds are taken at the worst end of its
    /// supply (VIH at the top, VIL at the bottom): (VIH's supply, VIL's supply). `None` when
    /// they are the nominal supply's.
    pub thresholds_at: Option<(f64, f64)>,
}

/// The resistor window for an open-collector net.
#[derive(Debug, Clone)]
pub struct PullUpWindow {
    pub rail_net: usize,
    /// The rail's nominal voltage.
    pub rail_volts: f64,
    /// The rail at the top of its tolerance (R_min is taken there) and at the bottom (R_max).
    pub v_high: f64,
    pub v_low: f64,
    /// The driver whose rating sets R_min (the weakest).
    pub driver: usize,
    pub vol: f64,
    pub iol: f64,
    pub sum_iil: f64,
    pub sum_high: f64,
    pub vih_max: Option<f64>,
    pub r_min: f64,
    pub r_max: Option<f64>,
    /// The fitted pull-ups in parallel.
    pub fitted: Option<f64>,
}

#[derive(Debug, Clone, Default)]
pub struct NetBudget {
    pub drivers: Vec<DriverBudget>,
    pub margins: Vec<LoadMargin>,
    /// Boxed: only an open-collector net has one.
    pub window: Option<Box<PullUpWindow>>,
}

impl NetBudget {
    /// Trims every list to its length: a list grown by pushes holds room for four or more,
    /// and a budget is kept for every net.
    fn fit(&mut self) {
        self.drivers.shrink_to_fit();
        self.margins.shrink_to_fit();
        for d in &mut self.drivers {
            for s in [&mut d.low, &mut d.high].into_iter().flatten() {
                s.items.shrink_to_fit();
            }
        }
    }
}

/// True when input `l` counts against driver `d`'s rating: not the driver's own pin, and
/// not one of its package's inputs the data sheet already rates the output with (a
/// counter's QA is tested at IOL plus its second clock's IIL).
fn counted(cx: &Circuit<'_, '_>, d: &super::Driver, l: &super::Load) -> bool {
    l.at != d.at
        && !(l.at.comp == d.at.comp
            && cx.cl.parts[d.at.comp].rated_with[d.at.pin].contains(&l.at.pin))
}

/// A logic input's line in a state's budget: its current, and when it draws more than one
/// of its family's input currents, how many (`6 unit loads: 6 x 0.40 mA`).
fn input_item(
    cx: &Circuit<'_, '_>,
    l: &super::Load,
    low: bool,
    through: Option<usize>,
) -> Option<Item> {
    let ll = l.levels.as_ref()?;
    let (amps, each, units, what) = if low {
        (
            l.iil()?,
            ll.iil_max.abs(),
            l.unit_loads.0,
            "input low current (IIL)",
        )
    } else {
        (
            l.iih()?,
            ll.iih_max.abs(),
            l.unit_loads.1,
            "input high current (IIH)",
        )
    };
    let mut text = format!("{} {what}", cx.pin_name(l.at));
    if let Some(part) = through {
        text.push_str(&format!(", through {}", cx.nl.components[part].reference));
    }
    if (units - 1.0).abs() > 1e-9 {
        let n = if (units - units.round()).abs() < 1e-9 {
            format!("{units:.0}")
        } else {
            format!("{units:.1}")
        };
        let name = cx.cl.parts[l.at.comp].table_names[l.at.pin]
            .clone()
            .unwrap_or_else(|| "the input".into());
        let family = l.family.as_deref().unwrap_or("its family");
        text.push_str(&format!(
            ": {name} draws {n} unit loads ({n} x the {family} input's {})",
            format_amps(each)
        ));
    }
    Some(Item {
        what: text,
        at: Some(l.at),
        amps,
        unit_loads: ((units - 1.0).abs() > 1e-9).then_some(units),
    })
}

fn parallel(rs: impl Iterator<Item = f64>) -> Option<f64> {
    let g: f64 = rs.filter(|r| *r > 0.0).map(|r| 1.0 / r).sum();
    (g > 0.0).then(|| 1.0 / g)
}

/// Computes the budget of one net.
pub fn net_budget(cx: &Circuit<'_, '_>, net: usize) -> NetBudget {
    let nm = &cx.nets[net];
    let mut out = NetBudget {
        drivers: Vec::with_capacity(nm.drivers.len()),
        ..NetBudget::default()
    };
    let pullups: Vec<usize> = (0..nm.pulls.len()).filter(|&i| nm.pulls[i].up).collect();
    let pulldowns: Vec<usize> = (0..nm.pulls.len()).filter(|&i| !nm.pulls[i].up).collect();
    for (di, d) in nm.drivers.iter().enumerate() {
        // an open-emitter output (a display driver's emitter follower) only sources: it has no
        // low state to budget, and its high is rated by its own data sheet, not by its
        // family's logic outputs (a 4511 segment sources 25 mA where a 4000B gate gives
        // under 1 mA), so neither state is judged against the family's figures
        let levels = d.levels.as_ref().filter(|_| d.role != PinRole::OpenEmitter);
        let Some(lv) = levels else {
            out.drivers.push(DriverBudget {
                driver: di,
                low: None,
                high: None,
                pull_up: None,
                high_level: None,
                low_level: None,
                drive_high: None,
                drive_low: None,
            });
            continue;
        };
        let vol_rated = lv.vol.last().map_or(0.4, |p| p.v);
        let voh_light = lv.voh.first().map_or(2.4, |p| p.v);
        // --- low state: this driver low, every other driver high or off
        let mut items = Vec::new();
        for l in nm.loads.iter().filter(|l| counted(cx, d, l)) {
            items.extend(input_item(cx, l, true, None));
        }
        for &pi in &pullups {
            let p = &nm.pulls[pi];
            let a = ((p.rail_volts - vol_rated) / p.ohms).max(0.0);
            items.push(Item {
                what: format!(
                    "{} pull-up {} to {} ({:.2} V - {:.2} V) / R",
                    cx.nl.components[p.resistor].reference,
                    format_ohms(p.ohms),
                    cx.net_name(p.rail_net),
                    p.rail_volts,
                    vol_rated
                ),
                at: Some(p.at),
                amps: a,
                unit_loads: None,
            });
        }
        // inputs on nets this one feeds through series resistors, beads or inductors
        for &(m, link) in &nm.feeds {
            for l in &cx.nets[m].loads {
                items.extend(input_item(cx, l, true, Some(link.part)));
            }
        }
        // LEDs (lamps, relays) from a positive rail through their resistors: sunk in the low
        // state, (V_rail - VF - VOL) / R each
        for p in nm.sink_paths.iter().filter(|p| p.ohms > 0.0) {
            let a = ((p.rail_volts - p.vf - vol_rated) / p.ohms).max(0.0);
            let names: Vec<&str> = p
                .resistors
                .iter()
                .chain(&p.leds)
                .map(|&c| cx.nl.components[c].reference.as_str())
                .collect();
            items.push(Item {
                what: format!(
                    "{} from {} ({:.2} V - {:.2} V VF - {:.2} V) / {}",
                    names.join(" and "),
                    cx.net_name(p.rail_net),
                    p.rail_volts,
                    p.vf,
                    vol_rated,
                    format_ohms(p.ohms)
                ),
                at: Some(p.at),
                amps: a,
                unit_loads: None,
            });
        }
        for (oi, o) in nm.drivers.iter().enumerate() {
            if oi == di {
                continue;
            }
            if let Some(ol) = &o.levels {
                match o.role {
                    PinRole::ThreeState | PinRole::Bidirectional => items.push(Item {
                        what: format!("{} off-state leakage (IOZ)", cx.pin_name(o.at)),
                        at: Some(o.at),
                        amps: ol.ioz.abs(),
                        unit_loads: None,
                    }),
                    PinRole::OpenCollector => items.push(Item {
                        what: format!("{} off-state leakage", cx.pin_name(o.at)),
                        at: Some(o.at),
                        amps: ol.oc_leakage.abs(),
                        unit_loads: None,
                    }),
                    _ => {}
                }
            }
        }
        let total: f64 = items.iter().map(|i| i.amps).sum();
        let low = StateBudget {
            items,
            total,
            rating: lv.iol_max.abs(),
            level: lv.vol_at(total),
        };
        let low_level = low.level;

        // --- high state
        let mut high = None;
        let mut high_level = None;
        let drives_high = matches!(
            d.role,
            PinRole::PushPull | PinRole::ThreeState | PinRole::Bidirectional | PinRole::OpenEmitter
        );
        let mut load_high: f64 = 0.0;
        let mut items = Vec::new();
        for l in nm.loads.iter().filter(|l| counted(cx, d, l)) {
            if let Some(it) = input_item(cx, l, false, None) {
                load_high += it.amps;
                items.push(it);
            }
        }
        for &(m, link) in &nm.feeds {
            for l in &cx.nets[m].loads {
                if let Some(it) = input_item(cx, l, false, Some(link.part)) {
                    load_high += it.amps;
                    items.push(it);
                }
            }
        }
        for (oi, o) in nm.drivers.iter().enumerate() {
            if oi == di {
                continue;
            }
            if let Some(ol) = &o.levels {
                let a = match o.role {
                    PinRole::ThreeState | PinRole::Bidirectional => ol.ioz.abs(),
                    PinRole::OpenCollector => ol.oc_leakage.abs(),
                    _ => continue,
                };
                load_high += a;
                items.push(Item {
                    what: format!("{} off-state leakage", cx.pin_name(o.at)),
                    at: Some(o.at),
                    amps: a,
                    unit_loads: None,
                });
            }
        }
        // an open collector's high state is the output turned off: its own off-state
        // leakage flows through the pull-up too (the data books' N1 x IOH term)
        if d.role == PinRole::OpenCollector {
            load_high += lv.oc_leakage.abs();
        }
        if drives_high {
            for &pi in &pulldowns {
                let p = &nm.pulls[pi];
                let a = (voh_light - p.rail_volts).max(0.0) / p.ohms;
                items.push(Item {
                    what: format!(
                        "{} pull-down {} to {} ({:.2} V / R)",
                        cx.nl.components[p.resistor].reference,
                        format_ohms(p.ohms),
                        cx.net_name(p.rail_net),
                        voh_light
                    ),
                    at: Some(p.at),
                    amps: a,
                    unit_loads: None,
                });
            }
            let total: f64 = items.iter().map(|i| i.amps).sum();
            let level = lv.voh_at(-total);
            high_level = level;
            high = Some(StateBudget {
                items,
                total,
                rating: lv.ioh_max.abs(),
                level,
            });
        }
        // a pull-up raises (or, for an open collector, makes) the high level
        let pull_up = parallel(pullups.iter().map(|&i| nm.pulls[i].ohms)).map(|r| {
            let p = &nm.pulls[pullups[0]];
            // leakage cannot pull the net below ground: a level of 0 V means no high at all
            let level = (p.rail_volts - r * load_high).max(0.0);
            PullUpHigh {
                rail_net: p.rail_net,
                rail_volts: p.rail_volts,
                ohms: r,
                current: load_high,
                level,
            }
        });
        if let Some(pu) = &pull_up {
            high_level = Some(high_level.map_or(pu.level, |h| h.max(pu.level)));
        }
        let iih = load_high
            - if d.role == PinRole::OpenCollector {
                lv.oc_leakage.abs()
            } else {
                0.0
            };
        let iil: f64 = nm
            .loads
            .iter()
            .filter(|l| counted(cx, d, l))
            .filter_map(|l| l.iil())
            .sum();
        let stops_short = cx
            .family(d.at.comp)
            .is_some_and(|f| f.technology != Technology::Cmos || f.high_output == HighOutput::Ttl);
        let (drive_high, drive_low) = drive_points(nm, d, lv, iih, iil, stops_short);
        out.drivers.push(DriverBudget {
            driver: di,
            low: Some(low),
            high,
            pull_up,
            high_level,
            low_level,
            drive_high: drive_high.map(Box::new),
            drive_low: drive_low.map(Box::new),
        });
    }
    // margins
    for db in &out.drivers {
        let d = &nm.drivers[db.driver];
        for (li, l) in nm.loads.iter().enumerate() {
            if l.at == d.at {
                continue;
            }
            let Some(ll) = &l.levels else { continue };
            // a CMOS input's thresholds scale with its supply: with a rail tolerance, VIH is
            // checked at the top of it and VIL at the bottom (TTL thresholds do not move)
            let t = cx.opts.rail_tolerance.abs();
            let scaled = match (cx.family(l.at.comp), cx.supplies[l.at.comp].as_ref()) {
                (Some(f), Some(s)) if t > 0.0 && f.is_cmos_input() => {
                    let (lo, hi) = cx.rail_range(s.vcc);
                    Some((
                        f.levels(hi, Drive::Standard).vih_min,
                        f.levels(lo, Drive::Standard).vil_max,
                        hi,
                        lo,
                    ))
                }
                _ => None,
            };
            let (vih, vil) = scaled.map_or((ll.vih_min, ll.vil_max), |(h, l, _, _)| (h, l));
            out.margins.push(LoadMargin {
                driver: db.driver,
                load: li,
                vih,
                vil,
                high_margin: db.high_level.map(|h| h - vih),
                low_margin: db.low_level.map(|v| vil - v),
                thresholds_at: scaled.map(|(_, _, hi, lo)| (hi, lo)),
            });
        }
    }
    // open-collector window
    let oc: Vec<usize> = (0..nm.drivers.len())
        .filter(|&i| nm.drivers[i].role == PinRole::OpenCollector && nm.drivers[i].levels.is_some())
        .collect();
    if !oc.is_empty() && oc.len() == nm.drivers.len() {
        let rail = nm
            .pulls
            .iter()
            .find(|p| p.up)
            .map(|p| (p.rail_net, p.rail_volts))
            .or_else(|| {
                // no pull-up: use the drivers' supply for the window the fix needs
                let s = cx.supplies[nm.drivers[oc[0]].at.comp].as_ref()?;
                Some((s.supply_net?, s.vcc))
            });
        if let Some((rail_net, v)) = rail {
            let weakest = *oc
                .iter()
                .min_by(|&&a, &&b| {
                    let ia = nm.drivers[a].levels.as_ref().map_or(0.0, |l| l.iol_max);
                    let ib = nm.drivers[b].levels.as_ref().map_or(0.0, |l| l.iol_max);
                    ia.partial_cmp(&ib).unwrap_or(std::cmp::Ordering::Equal)
                })
                .expect("oc is not empty");
            let lv = nm.drivers[weakest]
                .levels
                .as_ref()
                .expect("filtered on levels");
            let vol = lv.vol.last().map_or(0.4, |p| p.v);
            let iol = lv.iol_max.abs();
            let sum_iil: f64 = nm.loads.iter().filter_map(|l| l.iil()).sum();
            let sum_high: f64 = nm.loads.iter().filter_map(|l| l.iih()).sum::<f64>()
                + oc.iter()
                    .filter_map(|&i| nm.drivers[i].levels.as_ref())
                    .map(|l| l.oc_leakage.abs())
                    .sum::<f64>();
            let vih_max = nm
                .loads
                .iter()
                .filter_map(|l| l.levels.as_ref())
                .map(|l| l.vih_min)
                .fold(None, |m: Option<f64>, v| Some(m.map_or(v, |m| m.max(v))));
            // each end at the supply that is worst for it (the data books' VCC max and min)
            let (v_low, v_high) = cx.rail_range(v);
            let r_min = if iol > sum_iil {
                (v_high - vol) / (iol - sum_iil)
            } else {
                f64::INFINITY
            };
            let r_max = vih_max
                .filter(|_| sum_high > 0.0)
                .map(|vih| (v_low - vih) / sum_high);
            let fitted = parallel(nm.pulls.iter().filter(|p| p.up).map(|p| p.ohms));
            out.window = Some(Box::new(PullUpWindow {
                rail_net,
                rail_volts: v,
                v_high,
                v_low,
                driver: weakest,
                vol,
                iol,
                sum_iil,
                sum_high,
                vih_max,
                r_min,
                r_max,
                fitted,
            }));
        }
    }
    out.fit();
    out
}
