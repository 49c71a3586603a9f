//! Per-net DC budgets, as an engineer lays them out with the data books open: for each
//! driver, the current it must sink in the low state and source in the high state, item by
//! item, against its rating; the levels it then guarantees; and each load's margin against
//! them. The checks, the `net` command and the audit charts all read these numbers; none
//! recomputes them.

use std::sync::Arc;

use super::{Circuit, PinRef};
use crate::classify::family::{Drive, HighOutput, Technology};
use crate::classify::PinRole;
use crate::values::{format_amps, format_ohms};

/// One contribution to a state's current. What it is stays structured; its pin
/// ([`Item::at`]), unit loads ([`Item::unit_loads`]) and words ([`Item::describe`]) are read
/// from the model only when asked. A budget keeps no items: [`DriverBudget::items`] lists
/// them when a check, the `net` report or the audit asks.
#[derive(Debug, Clone)]
pub struct Item {
    pub kind: ItemKind,
    /// Magnitude in amperes.
    pub amps: f64,
}

/// What a budget item is. Indices are `u32` to keep the item small: a budget holds one per
/// input of every net.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ItemKind {
    /// A logic input's current in the low state (IIL) or the high state (IIH): load `load`
    /// of net `net`, on the driver's own net or, `through` a series part, on a net it feeds.
    Input {
        net: u32,
        load: u32,
        low: bool,
        through: Option<u32>,
    },
    /// Pull resistor `pull` of net `net` to a rail above ground, against the driver's rated
    /// low level `vol`.
    PullUp { net: u32, pull: u32, vol: f64 },
    /// Pull resistor `pull` of net `net` to ground (or below), against the driver's light
    /// high level `voh`.
    PullDown { net: u32, pull: u32, voh: f64 },
    /// LED path `path` of net `net`'s `sink_paths`, from a rail, sunk at `vol`.
    Sink { net: u32, path: u32, vol: f64 },
    /// Another output's off-state leakage; `ioz` names it IOZ (a three-state output in the
    /// low-state budget).
    Leakage { pin: PinRef, ioz: bool },
}

impl Item {
    /// The pin the item is at: the input, the pull resistor's or the LED path's first pin on
    /// the net, the other output.
    pub fn at(&self, cx: &Circuit<'_, '_>) -> PinRef {
        match self.kind {
            ItemKind::Input { net, load, .. } => cx.nets[net as usize].loads[load as usize].at,
            ItemKind::PullUp { net, pull, .. } | ItemKind::PullDown { net, pull, .. } => {
                cx.nets[net as usize].pulls()[pull as usize].at
            }
            ItemKind::Sink { net, path, .. } => {
                cx.nets[net as usize].sink_paths()[path as usize].at
            }
            ItemKind::Leakage { pin, .. } => pin,
        }
    }

    /// For a logic input that draws more than one of its family's input currents in this
    /// state: how many.
    pub fn unit_loads(&self, cx: &Circuit<'_, '_>) -> Option<f64> {
        match self.kind {
            ItemKind::Input { net, load, low, .. } => {
                let l = &cx.nets[net as usize].loads[load as usize];
                several(if low {
                    l.unit_loads(cx).0
                } else {
                    l.unit_loads(cx).1
                })
            }
            _ => None,
        }
    }

    /// True for a logic input's current (directly on the net or through a series part).
    pub fn is_input(&self) -> bool {
        matches!(self.kind, ItemKind::Input { .. })
    }

    /// True for a logic input reached through a series part.
    pub fn is_through(&self) -> bool {
        matches!(
            self.kind,
            ItemKind::Input {
                through: Some(_),
                ..
            }
        )
    }

    /// The item's words, as the `net` report and the messages print them:
    /// `U2.1 input low current (IIL), through R5`, `R3 pull-up 4.7 kOhm to +5V (5.00 V -
    /// 0.40 V) / R`, `U7.3 off-state leakage (IOZ)`.
    pub fn describe(&self, cx: &Circuit<'_, '_>) -> String {
        match self.kind {
            ItemKind::Input {
                net,
                load,
                low,
                through,
            } => {
                let l = &cx.nets[net as usize].loads[load as usize];
                let (each, units, what) = if low {
                    (
                        l.levels(cx).map_or(0.0, |ll| ll.iil_max.abs()),
                        l.unit_loads(cx).0,
                        "input low current (IIL)",
                    )
                } else {
                    (
                        l.levels(cx).map_or(0.0, |ll| ll.iih_max.abs()),
                        l.unit_loads(cx).1,
                        "input high current (IIH)",
                    )
                };
                let mut text = format!("{} {what}", cx.pin_name(l.at));
                if let Some(part) = through {
                    text.push_str(", through ");
                    text.push_str(cx.nl.components[part as usize].reference.as_str());
                }
                if (units - 1.0).abs() > 1e-9 {
                    let n = if (units - units.round()).abs() < 1e-9 {
                        format!("{units:.0}")
                    } else {
                        format!("{units:.1}")
                    };
                    let name = cx.cl.parts[l.at.comp()].table_names[l.at.pin()]
                        .as_deref()
                        .unwrap_or("the input");
                    let family = l.family(cx).unwrap_or("its family");
                    text.push_str(&format!(
                        ": {name} draws {n} unit loads ({n} x the {family} input's {})",
                        format_amps(each)
                    ));
                }
                text
            }
            ItemKind::PullUp { net, pull, vol } => {
                let p = &cx.nets[net as usize].pulls()[pull as usize];
                format!(
                    "{} pull-up {} to {} ({:.2} V - {:.2} V) / R",
                    cx.nl.components[p.resistor].reference,
                    format_ohms(p.ohms),
                    cx.net_name(p.rail_net),
                    p.rail_volts,
                    vol
                )
            }
            ItemKind::PullDown { net, pull, voh } => {
                let p = &cx.nets[net as usize].pulls()[pull as usize];
                format!(
                    "{} pull-down {} to {} ({:.2} V / R)",
                    cx.nl.components[p.resistor].reference,
                    format_ohms(p.ohms),
                    cx.net_name(p.rail_net),
                    voh
                )
            }
            ItemKind::Sink { net, path, vol } => {
                let p = &cx.nets[net as usize].sink_paths()[path as usize];
                let names: Vec<&str> = p
                    .resistors
                    .iter()
                    .chain(&p.leds)
                    .map(|&c| cx.nl.components[c].reference.as_str())
                    .collect();
                format!(
                    "{} from {} ({:.2} V - {:.2} V VF - {:.2} V) / {}",
                    names.join(" and "),
                    cx.net_name(p.rail_net),
                    p.rail_volts,
                    p.vf,
                    vol,
                    format_ohms(p.ohms)
                )
            }
            ItemKind::Leakage { pin, ioz } => format!(
                "{} off-state leakage{}",
                cx.pin_name(pin),
                if ioz { " (IOZ)" } else { "" }
            ),
        }
    }
}

/// `units` when it is more (or less) than one unit load.
fn several(units: f64) -> Option<f64> {
    ((units - 1.0).abs() > 1e-9).then_some(units)
}

/// One state (low or high) of one driver: its total against its rating and the level it
/// guarantees there. Returned by value ([`DriverBudget::low`], [`DriverBudget::high`]); its
/// items are listed when asked ([`DriverBudget::items`]).
#[derive(Debug, Clone, Copy)]
pub struct StateBudget {
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

/// One driver's budget. A board keeps one for every driver of every net, so its numbers
/// (which of them are present in `flags`) are one shared copy for every driver whose numbers
/// are the same (outputs alike driving loads alike: a board of alike cells has a few), and
/// its rarer parts (a pull-up's high level, the operating points with LEDs and resistors)
/// are one shared copy too, made only for the outputs that have them. Its items are not kept: [`DriverBudget::items`] lists
/// them, from the model, when asked (a board holds two for every input).
#[derive(Debug, Clone)]
pub struct DriverBudget {
    nums: Arc<Numbers>,
    /// Index into the net's drivers.
    driver: u32,
    flags: u8,
    rare: Option<Arc<RareBudget>>,
}

/// A driver budget's numbers, shared by the drivers whose numbers are the same (a number
/// the driver does not have is 0).
#[derive(Debug, Clone, Copy, Default, PartialEq)]
struct Numbers {
    low_total: f64,
    low_rating: f64,
    low_level: f64,
    high_total: f64,
    high_rating: f64,
    high_state_level: f64,
    /// The level the net reaches in the high state (the driver's, raised by a pull-up).
    high_level: f64,
}

impl Numbers {
    /// The numbers as bits: drivers whose numbers have the same bits share one copy.
    fn bits(&self) -> [u64; 7] {
        [
            self.low_total.to_bits(),
            self.low_rating.to_bits(),
            self.low_level.to_bits(),
            self.high_total.to_bits(),
            self.high_rating.to_bits(),
            self.high_state_level.to_bits(),
            self.high_level.to_bits(),
        ]
    }
}

/// The parts of a driver's budget that most outputs lack. The operating points are a list
/// of their own (each says which state it is, `OperatingPoint::high`), holding only those
/// the output has: a pulled-up output has a low one and no high one. Drivers whose rare
/// parts are the same share one copy (outputs alike with pull-ups alike).
#[derive(Debug, Clone, Default)]
struct RareBudget {
    pull_up: Option<PullUpHigh>,
    points: thin_vec::ThinVec<OperatingPoint>,
}

impl RareBudget {
    /// Every number and index it holds, as bits, onto `key`: two with the same key are the
    /// same.
    fn key(&self, key: &mut Vec<u64>) {
        key.clear();
        match &self.pull_up {
            Some(p) => key.extend([
                1,
                p.rail_net as u64,
                p.rail_volts.to_bits(),
                p.ohms.to_bits(),
                p.current.to_bits(),
                p.level.to_bits(),
            ]),
            None => key.push(0),
        }
        for op in &self.points {
            key.extend([
                u64::from(op.high),
                op.rail.to_bits(),
                op.row.0.to_bits(),
                op.row.1.to_bits(),
                op.r_out.to_bits(),
                op.level.to_bits(),
                op.total.to_bits(),
                op.logic.to_bits(),
                op.rating.to_bits(),
                op.reach.to_bits(),
                op.loads.len() as u64,
            ]);
            for l in &op.loads {
                let (led, i) = match l.kind {
                    LoadKind::Led(i) => (1, i),
                    LoadKind::Pull(i) => (0, i),
                };
                key.extend([
                    led,
                    i as u64,
                    l.amps.to_bits(),
                    l.vf.to_bits(),
                    l.ohms.to_bits(),
                    l.rail_volts.to_bits(),
                    u64::from(l.dark),
                    l.open_common.map_or(0, |c| c as u64 + 1),
                ]);
            }
        }
    }
}

/// [`DriverBudget::flags`]: which of its numbers are present.
const HAS_LOW: u8 = 1;
const HAS_HIGH: u8 = 2;
const HAS_LOW_LEVEL: u8 = 4;
const HAS_HIGH_STATE_LEVEL: u8 = 8;
const HAS_HIGH_LEVEL: u8 = 16;

impl DriverBudget {
    /// A driver with nothing to budget (no family figures, or an open-emitter output).
    fn none(driver: usize, solved: &mut Scratch) -> Self {
        DriverBudget {
            nums: solved.numbers(Numbers::default()),
            driver: index(driver),
            flags: 0,
            rare: None,
        }
    }

    /// Index into the net's drivers.
    pub fn driver(&self) -> usize {
        self.driver as usize
    }

    /// The low state (this driver low, every other driver high or off).
    pub fn low(&self) -> Option<StateBudget> {
        (self.flags & HAS_LOW != 0).then(|| StateBudget {
            total: self.nums.low_total,
            rating: self.nums.low_rating,
            level: (self.flags & HAS_LOW_LEVEL != 0).then_some(self.nums.low_level),
        })
    }

    /// The high state; `None` for an output that does not drive high (an open collector).
    pub fn high(&self) -> Option<StateBudget> {
        (self.flags & HAS_HIGH != 0).then(|| StateBudget {
            total: self.nums.high_total,
            rating: self.nums.high_rating,
            level: (self.flags & HAS_HIGH_STATE_LEVEL != 0).then_some(self.nums.high_state_level),
        })
    }

    /// The level the net reaches in the low state (the low state's guaranteed level); `None`
    /// when nothing guarantees it.
    pub fn low_level(&self) -> Option<f64> {
        self.low().and_then(|l| l.level)
    }

    /// The level the net reaches in the high state: the driver's VOH, raised by a pull-up;
    /// for an open collector, the pull-up's level. `None` when nothing guarantees it.
    pub fn high_level(&self) -> Option<f64> {
        (self.flags & HAS_HIGH_LEVEL != 0).then_some(self.nums.high_level)
    }

    /// The pull-up's effect on the high level, when the net has a pull-up.
    pub fn pull_up(&self) -> Option<&PullUpHigh> {
        self.rare.as_ref()?.pull_up.as_ref()
    }

    /// The output's operating point with the LEDs and resistors it lights or holds in its
    /// high state (LEDs to ground, pull-downs); `None` when there are none.
    pub fn drive_high(&self) -> Option<&OperatingPoint> {
        self.rare.as_ref()?.points.iter().find(|p| p.high)
    }

    /// The output's operating point with the LEDs and resistors it sinks or holds in its low
    /// state (LEDs from a rail, pull-ups); `None` when there are none.
    pub fn drive_low(&self) -> Option<&OperatingPoint> {
        self.rare.as_ref()?.points.iter().find(|p| !p.high)
    }

    /// The items of the low (`low`) or high state of this driver of net `net`, in the order
    /// they add up to the state's total; empty when the driver has no such state. Listed
    /// from the model each time: the budget keeps only the totals.
    pub fn items(&self, cx: &Circuit<'_, '_>, net: usize, low: bool) -> Vec<Item> {
        let mut items = Vec::new();
        let state = if low { HAS_LOW } else { HAS_HIGH };
        if self.flags & state == 0 {
            return items;
        }
        let nm = &cx.nets[net];
        let di = self.driver();
        let d = &nm.drivers[di];
        let Some(lv) = d.levels(cx).map(|l| &**l) else {
            return items;
        };
        if low {
            low_items(cx, net, di, lv, &mut items);
        } else {
            high_items(cx, net, di, lv, true, &mut items);
        }
        items
    }
}

/// What a resistive load on an output is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LoadKind {
    /// `NetModel::led_paths[i]` (high state) or `NetModel::sink_paths[i]` (low state).
    Led(usize),
    /// `NetModel::pulls[i]`.
    Pull(usize),
}

/// One resistive load at the operating point. It holds what it is (`kind`) and its numbers,
/// not its pin ([`ResistiveLoad::at`] reads it from the net's model): outputs alike with
/// loads alike then have equal operating points, which their budgets share.
#[derive(Debug, Clone)]
pub struct ResistiveLoad {
    pub kind: LoadKind,
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

impl ResistiveLoad {
    /// The load's first pin on net `nm` (the LED path's or the pull resistor's) in the
    /// operating point of the high (`high`) or low state: an LED load is one of the net's
    /// LED paths in the high state and one of its sink paths in the low state.
    pub fn at(&self, nm: &super::NetModel, high: bool) -> PinRef {
        match self.kind {
            LoadKind::Led(i) if high => nm.led_paths()[i].at,
            LoadKind::Led(i) => nm.sink_paths()[i].at,
            LoadKind::Pull(i) => nm.pulls()[i].at,
        }
    }
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

/// What a board's budgets reuse from net to net: a buffer for a state's items while its total
/// is added up, and the operating points' levels solved so far, by the numbers each follows
/// from (the output's state, supply, resistance and logic current, and each resistive load's
/// forward voltage, resistance and rail, as bits), and one copy of each distinct set of a
/// driver budget's numbers.
#[derive(Default)]
struct Scratch {
    items: Vec<Item>,
    key: Vec<u64>,
    levels: rustc_hash::FxHashMap<Box<[u64]>, f64>,
    numbers: rustc_hash::FxHashMap<[u64; 7], Arc<Numbers>>,
    /// The last few distinct numbers made or found, looked at before the table: alike
    /// nets often come in turn (a board of cells repeats each cell's nets in order).
    recent: [Option<Arc<Numbers>>; 4],
    next_recent: usize,
    rare: rustc_hash::FxHashMap<Box<[u64]>, Arc<RareBudget>>,
}

impl Scratch {
    /// The shared copy of `nums`: the first driver with these numbers makes it.
    fn numbers(&mut self, nums: Numbers) -> Arc<Numbers> {
        let bits = nums.bits();
        if let Some(n) = self.recent.iter().flatten().find(|n| n.bits() == bits) {
            return n.clone();
        }
        let n = self
            .numbers
            .entry(bits)
            .or_insert_with(|| Arc::new(nums))
            .clone();
        self.recent[self.next_recent] = Some(n.clone());
        self.next_recent = (self.next_recent + 1) % self.recent.len();
        n
    }

    /// The shared copy of `rare`: the first driver with these rare parts makes it.
    fn rare(&mut self, rare: RareBudget) -> Arc<RareBudget> {
        rare.key(&mut self.key);
        if let Some(r) = self.rare.get(self.key.as_slice()) {
            return r.clone();
        }
        let r = Arc::new(rare);
        self.rare
            .insert(self.key.clone().into_boxed_slice(), r.clone());
        r
    }
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
        // a and b are neighbouring numbers: every further step would leave them as they are
        // (f(a) > 0 and f(b) <= 0 hold throughout), so the answer is already fixed
        if m == a || m == b {
            break;
        }
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
            vf: 0.0,
            ohms: p.ohms,
            rail_volts: p.rail_volts,
            open_common: None,
        });
    leds.chain(resistors).collect()
}

/// Solves the output's operating point in one state. `knees` conduct towards their rail;
/// `logic` is the logic inputs' current (IIH or IIL), drawn at any level.
#[allow(clippy::too_many_arguments)]
fn operating_point(
    high: bool,
    vcc: f64,
    row: (f64, f64),
    rating: f64,
    logic: f64,
    reach: f64,
    knees: Vec<Knee>,
    solved: &mut Scratch,
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
    // outputs alike with loads alike (a board of many alike cells) meet at the same level:
    // it is solved once for each set of numbers it follows from
    let key = &mut solved.key;
    key.clear();
    key.extend([
        u64::from(high),
        vcc.to_bits(),
        r_out.to_bits(),
        logic.to_bits(),
    ]);
    for k in &knees {
        key.extend([k.vf.to_bits(), k.ohms.to_bits(), k.rail_volts.to_bits()]);
    }
    let level = match solved.levels.get(key.as_slice()) {
        Some(&level) => level,
        None => {
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
            solved.levels.insert(key.clone().into_boxed_slice(), level);
            level
        }
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
    solved: &mut Scratch,
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
        let knees = knees(nm.led_paths(), nm.pulls(), |p| !p.up);
        // how far the high can go with no load: a CMOS output to its supply; a totem pole
        // (bipolar, NMOS, a TTL-level stage) about two base-emitter drops, 1.4 V, below it
        // (common practice; its guaranteed VOH is a minimum, not a ceiling)
        let reach = if stops_short { lv.vcc - 1.4 } else { lv.vcc };
        strongest(&lv.voh).and_then(|row| {
            operating_point(
                true,
                lv.vcc,
                row,
                lv.ioh_max.abs(),
                iih,
                reach,
                knees,
                solved,
            )
        })
    } else {
        None
    };
    let low = if drives_low {
        // an open collector's pull-up is the open-collector window's (`PullUpWindow`)
        let own_pulls = d.role != PinRole::OpenCollector;
        let knees = knees(nm.sink_paths(), nm.pulls(), |p| p.up && own_pulls);
        // the low can go down to ground: LEDs that need more than their rail never light
        let reach = 0.0;
        strongest(&lv.vol).and_then(|row| {
            operating_point(
                false,
                lv.vcc,
                row,
                lv.iol_max.abs(),
                iil,
                reach,
                knees,
                solved,
            )
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
    /// they are the nominal supply's. Boxed: only a rail tolerance sets it.
    pub thresholds_at: Option<Box<(f64, f64)>>,
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

/// One net's budget, owned: what [`net_budget`] works out for a single net. A whole board's
/// are kept in one [`Budgets`] and read as [`NetBudgetRef`]s (`b.as_ref()` reads this one so).
#[derive(Debug, Clone, Default)]
pub struct NetBudget {
    pub drivers: Box<[DriverBudget]>,
    /// Boxed: only an open-collector net has one.
    pub window: Option<Box<PullUpWindow>>,
}

impl NetBudget {
    /// The budget as the board's store gives it.
    pub fn as_ref(&self) -> NetBudgetRef<'_> {
        NetBudgetRef {
            drivers: &self.drivers,
            window: self.window.as_deref(),
        }
    }

    /// Each load's margins against each driver of net `net` ([`NetBudgetRef::margins`]).
    pub fn margins<'b, 'n, 'a>(
        &'b self,
        cx: &'b Circuit<'n, 'a>,
        net: usize,
    ) -> impl Iterator<Item = LoadMargin> + use<'b, 'n, 'a> {
        self.as_ref().margins(cx, net)
    }
}

/// One net's budget as the board keeps it: its drivers' budgets and, for an open-collector
/// net, the pull-up window. The loads' margins are not kept: each is two subtractions from
/// the driver's levels and the load's thresholds, and a net holds one per driver and load,
/// so [`NetBudgetRef::margins`] works them out when asked.
#[derive(Debug, Clone, Copy)]
pub struct NetBudgetRef<'b> {
    pub drivers: &'b [DriverBudget],
    pub window: Option<&'b PullUpWindow>,
}

impl<'b> NetBudgetRef<'b> {
    /// Each load's margins against each driver of net `net` (whose budget this is): by
    /// driver, then by load; a load that is the driver's own pin, or of no known family, has
    /// none.
    ///
    /// A CMOS input's thresholds scale with its supply: with a rail tolerance, VIH is taken
    /// at the top of it and VIL at the bottom (TTL thresholds do not move).
    pub fn margins<'n, 'a>(
        self,
        cx: &'b Circuit<'n, 'a>,
        net: usize,
    ) -> impl Iterator<Item = LoadMargin> + use<'b, 'n, 'a> {
        let nm = &cx.nets[net];
        let t = cx.opts.rail_tolerance.abs();
        // the net's lists and each driver's levels are read once, not for every load
        let (drivers, loads): (&'b [super::Driver], &'b [super::Load]) = (&nm.drivers, &nm.loads);
        self.drivers.iter().flat_map(move |db| {
            let (di, at) = (db.driver(), drivers[db.driver()].at);
            let (high, low) = (db.high_level(), db.low_level());
            loads.iter().enumerate().filter_map(move |(li, l)| {
                if l.at == at {
                    return None;
                }
                let ll = l.levels(cx)?;
                let scaled = if t > 0.0 {
                    scaled_thresholds(cx, l)
                } else {
                    None
                };
                let (vih, vil) = scaled.map_or((ll.vih_min, ll.vil_max), |(h, l, _, _)| (h, l));
                Some(LoadMargin {
                    driver: di,
                    load: li,
                    vih,
                    vil,
                    high_margin: high.map(|h| h - vih),
                    low_margin: low.map(|v| vil - v),
                    thresholds_at: scaled.map(|(_, _, hi, lo)| Box::new((hi, lo))),
                })
            })
        })
    }
}

/// Every net's budget, worked out once for the board ([`Budgets::build`], called by the
/// analysis only) and read by net ([`Budgets::net`], [`Budgets::iter`]). Every net's drivers'
/// budgets are held in one list, net after net, each net's found by where it starts (one
/// `u32` a net, where a list of its own would cost a pointer, a length and a block); the
/// open-collector windows, which few nets have, are a list of their own by net.
#[derive(Debug, Clone, Default)]
pub struct Budgets {
    /// Every net's drivers' budgets, net after net, each net's in the order of its drivers.
    drivers: Vec<DriverBudget>,
    /// Where each net's drivers' budgets start in `drivers`, and one more: where they end.
    starts: Vec<u32>,
    /// The open-collector windows, by net, in net order.
    windows: Vec<(u32, PullUpWindow)>,
}

impl Budgets {
    /// Every net's budget, with one buffer and one table of solved levels for the board.
    pub fn build(cx: &Circuit<'_, '_>) -> Budgets {
        let mut scratch = Scratch::default();
        // one budget for each driver of each net: the list is allocated once at its length
        let total: usize = cx.nets.iter().map(|nm| nm.drivers.len()).sum();
        let mut drivers = Vec::with_capacity(total);
        let mut starts = Vec::with_capacity(cx.nets.len() + 1);
        let mut windows = Vec::new();
        for net in 0..cx.nets.len() {
            starts.push(index(drivers.len()));
            if let Some(w) = budget_into(cx, net, &mut scratch, &mut drivers) {
                windows.push((index(net), w));
            }
        }
        starts.push(index(drivers.len()));
        windows.shrink_to_fit();
        Budgets {
            drivers,
            starts,
            windows,
        }
    }

    /// How many nets the store holds.
    pub fn len(&self) -> usize {
        self.starts.len().saturating_sub(1)
    }

    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Net `net`'s drivers' budgets.
    #[inline]
    fn drivers_of(&self, net: usize) -> &[DriverBudget] {
        &self.drivers[self.starts[net] as usize..self.starts[net + 1] as usize]
    }

    /// Net `net`'s budget.
    #[inline]
    pub fn net(&self, net: usize) -> NetBudgetRef<'_> {
        let drivers = self.drivers_of(net);
        // only a net with drivers has a window
        let window = if drivers.is_empty() {
            None
        } else {
            self.windows
                .binary_search_by_key(&index(net), |(n, _)| *n)
                .ok()
                .map(|i| &self.windows[i].1)
        };
        NetBudgetRef { drivers, window }
    }

    /// Every net's budget, in net order (the windows walked alongside, not searched).
    pub fn iter(&self) -> impl Iterator<Item = NetBudgetRef<'_>> + '_ {
        let mut windows = self.windows.iter().peekable();
        self.starts.windows(2).enumerate().map(move |(net, ends)| {
            let window = windows.next_if(|(n, _)| *n as usize == net).map(|(_, w)| w);
            NetBudgetRef {
                drivers: &self.drivers[ends[0] as usize..ends[1] as usize],
                window,
            }
        })
    }
}

/// A CMOS load's thresholds at the worst ends of its supply under the rail tolerance: (VIH
/// at the top, VIL at the bottom, the top, the bottom); `None` for any other load.
fn scaled_thresholds(cx: &Circuit<'_, '_>, l: &super::Load) -> Option<(f64, f64, f64, f64)> {
    match (cx.family(l.at.comp()), cx.supplies[l.at.comp()].as_ref()) {
        (Some(f), Some(s)) if f.is_cmos_input() => {
            let (lo, hi) = cx.rail_range(s.vcc);
            Some((
                f.levels(hi, Drive::Standard).vih_min,
                f.levels(lo, Drive::Standard).vil_max,
                hi,
                lo,
            ))
        }
        _ => None,
    }
}

/// True when input `l` counts against driver `d`'s rating: not the driver's own pin, and
/// not one of its package's inputs the data sheet already rates the output with (a
/// counter's QA is tested at IOL plus its second clock's IIL).
fn counted(cx: &Circuit<'_, '_>, d: &super::Driver, l: &super::Load) -> bool {
    l.at != d.at
        && !(l.at.comp() == d.at.comp()
            && cx.cl.parts[d.at.comp()].rated_with[d.at.pin()].contains(&l.at.pin()))
}

/// A logic input's line in a state's budget: load `load` of net `net`, its current, and
/// when it draws more than one of its family's input currents, how many (`6 unit loads: 6 x
/// 0.40 mA` in its words).
fn input_item(
    cx: &Circuit<'_, '_>,
    net: usize,
    load: usize,
    l: &super::Load,
    low: bool,
    through: Option<usize>,
) -> Option<Item> {
    let amps = if low { l.iil(cx)? } else { l.iih(cx)? };
    Some(Item {
        kind: ItemKind::Input {
            net: index(net),
            load: index(load),
            low,
            through: through.map(index),
        },
        amps,
    })
}

/// An index as an item holds it.
fn index(i: usize) -> u32 {
    u32::try_from(i).expect("fewer than 2^32 nets, parts and pins")
}

fn parallel(rs: impl Iterator<Item = f64>) -> Option<f64> {
    let g: f64 = rs.filter(|r| *r > 0.0).map(|r| 1.0 / r).sum();
    (g > 0.0).then(|| 1.0 / g)
}

/// The low-state items of driver `di` of net `net` (whose figures are `lv`), pushed onto
/// `items` in the order they add up: the inputs on the net, the pull-ups, the inputs on the
/// nets it feeds, the LEDs it sinks, the other outputs' leakage. Returns how many of them
/// are the inputs on the net itself (the first ones).
fn low_items(
    cx: &Circuit<'_, '_>,
    net: usize,
    di: usize,
    lv: &crate::classify::family::Levels,
    items: &mut Vec<Item>,
) -> usize {
    let nm = &cx.nets[net];
    let d = &nm.drivers[di];
    let vol_rated = lv.vol.last().map_or(0.4, |p| p.v);
    let start = items.len();
    for (li, l) in nm.loads.iter().enumerate() {
        if counted(cx, d, l) {
            items.extend(input_item(cx, net, li, l, true, None));
        }
    }
    let own = items.len() - start;
    for (pi, p) in nm.pulls().iter().enumerate().filter(|(_, p)| p.up) {
        let a = ((p.rail_volts - vol_rated) / p.ohms).max(0.0);
        items.push(Item {
            kind: ItemKind::PullUp {
                net: index(net),
                pull: index(pi),
                vol: vol_rated,
            },
            amps: a,
        });
    }
    // inputs on nets this one feeds through series resistors, beads or inductors
    for &(m, part) in nm.feeds() {
        let m = m as usize;
        for (li, l) in cx.nets[m].loads.iter().enumerate() {
            items.extend(input_item(cx, m, li, l, true, Some(part as usize)));
        }
    }
    // LEDs (lamps, relays) from a positive rail through their resistors: sunk in the low
    // state, (V_rail - VF - VOL) / R each
    for (si, p) in nm
        .sink_paths()
        .iter()
        .enumerate()
        .filter(|(_, p)| p.ohms > 0.0)
    {
        let a = ((p.rail_volts - p.vf - vol_rated) / p.ohms).max(0.0);
        items.push(Item {
            kind: ItemKind::Sink {
                net: index(net),
                path: index(si),
                vol: vol_rated,
            },
            amps: a,
        });
    }
    for (oi, o) in nm.drivers.iter().enumerate() {
        if oi == di {
            continue;
        }
        if let Some(ol) = o.levels(cx) {
            match o.role {
                PinRole::ThreeState | PinRole::Bidirectional => items.push(Item {
                    kind: ItemKind::Leakage {
                        pin: o.at,
                        ioz: true,
                    },
                    amps: ol.ioz.abs(),
                }),
                PinRole::OpenCollector => items.push(Item {
                    kind: ItemKind::Leakage {
                        pin: o.at,
                        ioz: false,
                    },
                    amps: ol.oc_leakage.abs(),
                }),
                _ => {}
            }
        }
    }
    own
}

/// The high-state items of driver `di` of net `net` (whose figures are `lv`), pushed onto
/// `items` in the order they add up: the inputs on the net and on the nets it feeds, the
/// other outputs' leakage, then (with `pulldowns`) the pull-downs. Returns how many come
/// before the pull-downs (what a pull-up supplies).
fn high_items(
    cx: &Circuit<'_, '_>,
    net: usize,
    di: usize,
    lv: &crate::classify::family::Levels,
    pulldowns: bool,
    items: &mut Vec<Item>,
) -> usize {
    let nm = &cx.nets[net];
    let d = &nm.drivers[di];
    let start = items.len();
    for (li, l) in nm.loads.iter().enumerate() {
        if counted(cx, d, l) {
            items.extend(input_item(cx, net, li, l, false, None));
        }
    }
    for &(m, part) in nm.feeds() {
        let m = m as usize;
        for (li, l) in cx.nets[m].loads.iter().enumerate() {
            items.extend(input_item(cx, m, li, l, false, Some(part as usize)));
        }
    }
    for (oi, o) in nm.drivers.iter().enumerate() {
        if oi == di {
            continue;
        }
        if let Some(ol) = o.levels(cx) {
            let a = match o.role {
                PinRole::ThreeState | PinRole::Bidirectional => ol.ioz.abs(),
                PinRole::OpenCollector => ol.oc_leakage.abs(),
                _ => continue,
            };
            items.push(Item {
                kind: ItemKind::Leakage {
                    pin: o.at,
                    ioz: false,
                },
                amps: a,
            });
        }
    }
    let before = items.len() - start;
    if pulldowns {
        let voh_light = lv.voh.first().map_or(2.4, |p| p.v);
        for (pi, p) in nm.pulls().iter().enumerate().filter(|(_, p)| !p.up) {
            let a = (voh_light - p.rail_volts).max(0.0) / p.ohms;
            items.push(Item {
                kind: ItemKind::PullDown {
                    net: index(net),
                    pull: index(pi),
                    voh: voh_light,
                },
                amps: a,
            });
        }
    }
    before
}

/// Computes the budget of one net (the board's are in [`Budgets`]).
pub fn net_budget(cx: &Circuit<'_, '_>, net: usize) -> NetBudget {
    let mut drivers = Vec::new();
    let window = budget_into(cx, net, &mut Scratch::default(), &mut drivers);
    NetBudget {
        drivers: drivers.into_boxed_slice(),
        window: window.map(Box::new),
    }
}

/// Works out net `net`'s budget: its drivers' budgets are pushed onto `drivers`, its
/// open-collector window returned. `scratch` holds a state's items while its total is added
/// up (the items are not kept).
fn budget_into(
    cx: &Circuit<'_, '_>,
    net: usize,
    scratch: &mut Scratch,
    drivers: &mut Vec<DriverBudget>,
) -> Option<PullUpWindow> {
    let nm = &cx.nets[net];
    if nm.drivers.is_empty() {
        return None;
    }
    let mut window = None;
    let pulls = nm.pulls();
    let has_pulldowns = pulls.iter().any(|p| !p.up);
    for (di, d) in nm.drivers.iter().enumerate() {
        // an open-emitter output (a display driver's emitter follower) only sources: it has no
        // low state to budget, and its high is rated by its own data sheet, not by its
        // family's logic outputs (a 4511 segment sources 25 mA where a 4000B gate gives
        // under 1 mA), so neither state is judged against the family's figures
        let levels = d
            .levels(cx)
            .map(|l| &**l)
            .filter(|_| d.role != PinRole::OpenEmitter);
        let Some(lv) = levels else {
            drivers.push(DriverBudget::none(di, scratch));
            continue;
        };
        let mut flags = HAS_LOW;
        // --- low state: this driver low, every other driver high or off
        scratch.items.clear();
        let own = low_items(cx, net, di, lv, &mut scratch.items);
        // the own net's inputs' IIL, for the operating point below
        let iil: f64 = scratch.items[..own].iter().map(|i| i.amps).sum();
        let low_total: f64 = scratch.items.iter().map(|i| i.amps).sum();
        let low_level = lv.vol_at(low_total);
        if low_level.is_some() {
            flags |= HAS_LOW_LEVEL;
        }

        // --- high state
        let drives_high = matches!(
            d.role,
            PinRole::PushPull | PinRole::ThreeState | PinRole::Bidirectional | PinRole::OpenEmitter
        );
        scratch.items.clear();
        let before = high_items(cx, net, di, lv, drives_high, &mut scratch.items);
        let mut load_high: f64 = 0.0;
        for it in &scratch.items[..before] {
            load_high += it.amps;
        }
        // an open collector's high state is the output turned off: its own off-state
        // leakage flows through the pull-up too (the data books' N1 x IOH term)
        if d.role == PinRole::OpenCollector {
            load_high += lv.oc_leakage.abs();
        }
        let (mut high_total, mut high_state_level) = (0.0, None);
        if drives_high {
            flags |= HAS_HIGH;
            high_total = scratch.items.iter().map(|i| i.amps).sum();
            high_state_level = lv.voh_at(-high_total);
        }
        let mut high_level = high_state_level;
        // a pull-up raises (or, for an open collector, makes) the high level
        let pull_up = parallel(pulls.iter().filter(|p| p.up).map(|p| p.ohms)).map(|r| {
            let p = pulls.iter().find(|p| p.up).expect("a pull-up");
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
        // read only when the high state has resistive loads (pull-downs, LEDs to ground):
        // with none there is no operating point to solve
        let stops_short = (!nm.led_paths().is_empty() || has_pulldowns)
            && cx.family(d.at.comp()).is_some_and(|f| {
                f.technology != Technology::Cmos || f.high_output == HighOutput::Ttl
            });
        let (drive_high, drive_low) = drive_points(nm, d, lv, iih, iil, stops_short, scratch);
        if high_state_level.is_some() {
            flags |= HAS_HIGH_STATE_LEVEL;
        }
        if high_level.is_some() {
            flags |= HAS_HIGH_LEVEL;
        }
        let rare = (pull_up.is_some() || drive_high.is_some() || drive_low.is_some()).then(|| {
            scratch.rare(RareBudget {
                pull_up,
                points: drive_high.into_iter().chain(drive_low).collect(),
            })
        });
        let nums = scratch.numbers(Numbers {
            low_total,
            low_rating: lv.iol_max.abs(),
            low_level: low_level.unwrap_or(0.0),
            high_total,
            high_rating: if drives_high { lv.ioh_max.abs() } else { 0.0 },
            high_state_level: high_state_level.unwrap_or(0.0),
            high_level: high_level.unwrap_or(0.0),
        });
        drivers.push(DriverBudget {
            nums,
            driver: index(di),
            flags,
            rare,
        });
    }
    // open-collector window
    let oc: Vec<usize> = (0..nm.drivers.len())
        .filter(|&i| {
            nm.drivers[i].role == PinRole::OpenCollector && nm.drivers[i].levels(cx).is_some()
        })
        .collect();
    if !oc.is_empty() && oc.len() == nm.drivers.len() {
        let rail = nm
            .pulls()
            .iter()
            .find(|p| p.up)
            .map(|p| (p.rail_net, p.rail_volts))
            .or_else(|| {
                // no pull-up: use the drivers' supply for the window the fix needs
                let s = cx.supplies[nm.drivers[oc[0]].at.comp()].as_ref()?;
                Some((s.supply_net()?, s.vcc))
            });
        if let Some((rail_net, v)) = rail {
            let weakest = *oc
                .iter()
                .min_by(|&&a, &&b| {
                    let ia = nm.drivers[a].levels(cx).map_or(0.0, |l| l.iol_max);
                    let ib = nm.drivers[b].levels(cx).map_or(0.0, |l| l.iol_max);
                    ia.partial_cmp(&ib).unwrap_or(std::cmp::Ordering::Equal)
                })
                .expect("oc is not empty");
            let lv = nm.drivers[weakest].levels(cx).expect("filtered on levels");
            let vol = lv.vol.last().map_or(0.4, |p| p.v);
            let iol = lv.iol_max.abs();
            let sum_iil: f64 = nm.loads.iter().filter_map(|l| l.iil(cx)).sum();
            let sum_high: f64 = nm.loads.iter().filter_map(|l| l.iih(cx)).sum::<f64>()
                + oc.iter()
                    .filter_map(|&i| nm.drivers[i].levels(cx))
                    .map(|l| l.oc_leakage.abs())
                    .sum::<f64>();
            let vih_max = nm
                .loads
                .iter()
                .filter_map(|l| l.levels(cx))
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
            let fitted = parallel(nm.pulls().iter().filter(|p| p.up).map(|p| p.ohms));
            window = Some(PullUpWindow {
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
            });
        }
    }
    window
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Two 74LS125 three-state outputs on `/BUS` with a 74LS00 input, a 74LS73 clock (2 unit
    /// loads low, 4 high: the function table's figures), a 74LS00 input on `/FED` behind
    /// R1, a pull-up, a pull-down and an LED from +5V; two 74LS05 open collectors on `/OC`.
    const BOARD: &str = r#"(export (version "E")
  (components
    (comp (ref "U1") (value "74LS125") (libsource (lib "x") (part "74LS125")))
    (comp (ref "U2") (value "74LS125") (libsource (lib "x") (part "74LS125")))
    (comp (ref "U3") (value "74LS00") (libsource (lib "x") (part "74LS00")))
    (comp (ref "U4") (value "74LS73") (libsource (lib "x") (part "74LS73")))
    (comp (ref "U5") (value "74LS05") (libsource (lib "x") (part "74LS05")))
    (comp (ref "R1") (value "100") (libsource (lib "x") (part "R")))
    (comp (ref "R2") (value "4K7") (libsource (lib "x") (part "R")))
    (comp (ref "R3") (value "47K") (libsource (lib "x") (part "R")))
    (comp (ref "R4") (value "330") (libsource (lib "x") (part "R")))
    (comp (ref "D1") (value "LED_RED") (libsource (lib "x") (part "LED"))))
  (nets
    (net (code "1") (name "+5V") (node (ref "U1") (pin "14")) (node (ref "U2") (pin "14")) (node (ref "U3") (pin "14")) (node (ref "U4") (pin "4")) (node (ref "U5") (pin "14")) (node (ref "R2") (pin "2")) (node (ref "R4") (pin "2")))
    (net (code "2") (name "GND") (node (ref "U1") (pin "7")) (node (ref "U2") (pin "7")) (node (ref "U3") (pin "7")) (node (ref "U4") (pin "11")) (node (ref "U5") (pin "7")) (node (ref "R3") (pin "2")) (node (ref "U1") (pin "1")) (node (ref "U1") (pin "2")) (node (ref "U2") (pin "2")))
    (net (code "3") (name "/BUS") (node (ref "U1") (pin "3")) (node (ref "U2") (pin "3")) (node (ref "U3") (pin "1")) (node (ref "U4") (pin "1")) (node (ref "R1") (pin "1")) (node (ref "R2") (pin "1")) (node (ref "R3") (pin "1")) (node (ref "D1") (pin "2")))
    (net (code "4") (name "/FED") (node (ref "R1") (pin "2")) (node (ref "U3") (pin "2")))
    (net (code "5") (name "/LEDA") (node (ref "R4") (pin "1")) (node (ref "D1") (pin "1")))
    (net (code "6") (name "/OE2") (node (ref "U2") (pin "1")) (node (ref "U5") (pin "2")))
    (net (code "7") (name "/OC") (node (ref "U5") (pin "4")) (node (ref "U3") (pin "4")) (node (ref "U5") (pin "6")))
  ))
"#;

    /// The test board read, classified and built into a circuit: binds its netlist and
    /// circuit to the two names given.
    macro_rules! test_board {
        ($nl:ident, $cx:ident) => {
            let rules = crate::classify::classifier::Rules::builtin();
            let tree = crate::sexpr::parse(BOARD).expect("test board parses");
            let $nl = crate::netlist::build(&tree).expect("test board builds");
            let cl = crate::classify::classifier::classify(&$nl, &rules);
            let $cx = crate::circuit::build(&$nl, &cl, &rules, Default::default());
        };
    }

    /// Each budget item of the first driver of `net`, low state then high state: (kind of
    /// item, its words).
    fn words(net: &str) -> (Vec<String>, Vec<String>) {
        test_board!(nl, cx);
        let n = nl.net_by_name(net).expect("net on the test board");
        let b = net_budget(&cx, n);
        let db = &b.drivers[0];
        let text = |low: bool| -> Vec<String> {
            db.items(&cx, n, low)
                .iter()
                .map(|i| i.describe(&cx))
                .collect()
        };
        (text(true), text(false))
    }

    /// The words are those the `net` report printed when each item carried its text, built
    /// as the budget was (the same board's report before the items were structured).
    #[test]
    fn items_describe_themselves_in_the_old_words() {
        let (low, high) = words("/BUS");
        assert_eq!(
            low,
            [
                "U3.1 input low current (IIL)",
                "U4.1 input low current (IIL): 1CLK draws 2 unit loads (2 x the 74LS input's 0.40 mA)",
                "R2 pull-up 4.7 kOhm to +5V (5.00 V - 0.50 V) / R",
                "U3.2 input low current (IIL), through R1",
                "R4 and D1 from +5V (5.00 V - 1.70 V VF - 0.50 V) / 330 Ohm",
                "U2.3 off-state leakage (IOZ)",
            ]
        );
        assert_eq!(
            high,
            [
                "U3.1 input high current (IIH)",
                "U4.1 input high current (IIH): 1CLK draws 4 unit loads (4 x the 74LS input's 20 uA)",
                "U3.2 input high current (IIH), through R1",
                "U2.3 off-state leakage",
                "R3 pull-down 47 kOhm to GND (2.70 V / R)",
            ]
        );
        // an open collector's leakage is not named IOZ
        let (low, high) = words("/OC");
        assert_eq!(
            low,
            ["U3.4 input low current (IIL)", "U5.6 off-state leakage"]
        );
        assert!(high.is_empty(), "{high:?}");
    }

    /// `fanout-overrun` counts inputs and inputs through a series part by the item's kind.
    #[test]
    fn items_say_whether_they_are_inputs_and_through_a_series_part() {
        test_board!(nl, cx);
        let n = nl.net_by_name("/BUS").expect("net");
        let b = net_budget(&cx, n);
        let low = b.drivers[0].items(&cx, n, true);
        let inputs: Vec<bool> = low.iter().map(Item::is_input).collect();
        assert_eq!(inputs, [true, true, false, true, false, false]);
        let through: Vec<bool> = low.iter().map(Item::is_through).collect();
        assert_eq!(through, [false, false, false, true, false, false]);
        assert_eq!(
            low[1].unit_loads(&cx),
            Some(2.0),
            "the 74LS73 clock's low unit loads"
        );
    }

    /// The budget keeps each state's total, not its items: the items listed when asked add
    /// up, in their order, to the total kept, on every net of the test board; a state the
    /// driver does not have lists none.
    #[test]
    fn items_listed_when_asked_add_up_to_the_kept_totals() {
        test_board!(nl, cx);
        let mut states = 0;
        let all = Budgets::build(&cx);
        assert_eq!(all.len(), nl.nets.len());
        // reading the store in net order gives each net's budget as reading it by net does:
        // the same drivers' budgets and the same window
        assert_eq!(all.iter().count(), nl.nets.len());
        for (n, b) in all.iter().enumerate() {
            let at = all.net(n);
            assert!(std::ptr::eq(b.drivers, at.drivers), "net {n}");
            assert_eq!(
                b.window.map(std::ptr::from_ref),
                at.window.map(std::ptr::from_ref),
                "net {n}"
            );
        }
        for n in 0..nl.nets.len() {
            let b = net_budget(&cx, n);
            assert_eq!(b.drivers.len(), cx.nets[n].drivers.len());
            // the board's store holds the same budget at the net's place
            let stored = all.net(n);
            assert_eq!(stored.drivers.len(), b.drivers.len(), "net {n}");
            assert_eq!(stored.window.is_some(), b.window.is_some(), "net {n}");
            for (di, (x, y)) in stored.drivers.iter().zip(b.drivers.iter()).enumerate() {
                // the store's list holds each net's budgets in the order of its drivers
                assert_eq!(x.driver(), di, "net {n}");
                assert_eq!(x.driver(), y.driver());
                let bits = |s: Option<StateBudget>| {
                    s.map(|s| {
                        (
                            s.total.to_bits(),
                            s.rating.to_bits(),
                            s.level.map(f64::to_bits),
                        )
                    })
                };
                assert_eq!(bits(x.low()), bits(y.low()));
                assert_eq!(bits(x.high()), bits(y.high()));
                let level = |v: Option<f64>| v.map(f64::to_bits);
                assert_eq!(level(x.high_level()), level(y.high_level()), "net {n}");
                let point = |p: Option<&OperatingPoint>| p.map(|p| (p.high, p.level.to_bits()));
                assert_eq!(point(x.drive_high()), point(y.drive_high()), "net {n}");
                assert_eq!(point(x.drive_low()), point(y.drive_low()), "net {n}");
                // an operating point is read back as the state it was solved for
                assert!(x.drive_high().is_none_or(|p| p.high), "net {n}");
                assert!(x.drive_low().is_none_or(|p| !p.high), "net {n}");
            }
            assert_eq!(
                stored.window.map(|w| (w.r_min.to_bits(), w.driver)),
                b.window.as_deref().map(|w| (w.r_min.to_bits(), w.driver)),
                "net {n}"
            );
            for db in b.drivers.iter() {
                for (low, sb) in [(true, db.low()), (false, db.high())] {
                    let items = db.items(&cx, n, low);
                    let Some(sb) = sb else {
                        assert!(items.is_empty(), "{items:?}");
                        continue;
                    };
                    states += 1;
                    let sum: f64 = items.iter().map(|i| i.amps).sum();
                    assert_eq!(sum.to_bits(), sb.total.to_bits(), "net {n}");
                }
            }
        }
        // /BUS: two three-state outputs, both states; /OC: two open collectors, low only;
        // and the other nets' outputs
        assert!(states >= 6, "{states}");
        // the /OC open collectors have no high state, the /BUS outputs have one
        let oc_net = nl.net_by_name("/OC").expect("net");
        assert!(
            all.net(oc_net).window.is_some(),
            "an open-collector net's window"
        );
        let oc = net_budget(&cx, oc_net);
        assert!(oc
            .drivers
            .iter()
            .all(|d| d.high().is_none() && d.low().is_some()));
        let bus = net_budget(&cx, nl.net_by_name("/BUS").expect("net"));
        assert!(bus.drivers.iter().all(|d| d.high().is_some()));
        assert!(bus.drivers[0].pull_up().is_some() && oc.drivers[0].pull_up().is_none());
        // the level the net reaches high is the higher of the driver's and the pull-up's
        // (an open collector's, the pull-up's alone)
        for db in bus.drivers.iter().chain(oc.drivers.iter()) {
            let state = db.high().and_then(|h| h.level);
            let pulled = db.pull_up().map(|p| p.level);
            let want = match (state, pulled) {
                (Some(h), Some(p)) => Some(h.max(p)),
                (h, p) => h.or(p),
            };
            assert_eq!(db.high_level(), want);
        }
        let oc_level = oc.drivers[0].high_level();
        assert!(oc_level.is_none(), "/OC has no pull-up: {oc_level:?}");
    }

    /// The per-part tables keep each distinct entry once and give every part its own: each
    /// logic part's supply is on the net of its first supply pin (read here from the netlist
    /// and the classifier's roles), and its roles are the classifier's where the wiring
    /// changes none.
    #[test]
    fn per_part_tables_give_every_part_its_own_entry() {
        test_board!(nl, cx);
        let parts = nl.components.len();
        assert_eq!(cx.supplies.len(), parts);
        assert_eq!(cx.roles.len(), parts);
        assert_eq!(cx.part_logic.len(), parts);
        // U1 and U2 are alike on the same rails, as are the five resistors and the LED's
        // none: fewer entries than parts
        assert!(cx.supplies.distinct() < parts, "{}", cx.supplies.distinct());
        assert!(cx.roles.distinct() < parts, "{}", cx.roles.distinct());
        let cl = cx.cl;
        for (ci, c) in nl.components.iter().enumerate() {
            let first = |role: PinRole| {
                c.pins
                    .iter()
                    .enumerate()
                    .find(|(pi, p)| cl.parts[ci].roles[*pi] == role && p.connection.net().is_some())
                    .and_then(|(_, p)| p.connection.net())
            };
            match &cx.supplies[ci] {
                Some(s) => {
                    assert_eq!(s.supply_net(), first(PinRole::Supply), "{}", c.reference);
                    assert_eq!(s.ground_net(), first(PinRole::Ground), "{}", c.reference);
                }
                None => assert!(cx.family(ci).is_none() || !cl.parts[ci].is_logic()),
            }
            assert_eq!(
                &cx.roles[ci][..],
                &cl.parts[ci].roles[..],
                "{}",
                c.reference
            );
            // each part's family entry and figures are its own family's, at its own supply
            let family = cl.parts[ci].family.as_deref();
            assert_eq!(cx.family(ci).map(|f| f.id.as_str()), family);
            assert_eq!(cx.part_logic[ci].family.as_deref(), family);
            if let Some(l) = &cx.part_logic[ci].levels {
                let (f, s) = (cx.family(ci).unwrap(), cx.supplies[ci].as_ref().unwrap());
                assert_eq!(**l, f.levels(s.vcc, l.drive), "{}", c.reference);
            }
        }
        // U1 and U2 (74HC, one supply) share their figures; the resistors share none
        assert!(
            cx.part_logic.distinct() < parts,
            "{}",
            cx.part_logic.distinct()
        );
        let all: Vec<_> = cx.supplies.iter().collect();
        assert_eq!(all.len(), parts);
        assert!(all
            .iter()
            .enumerate()
            .all(|(ci, s)| std::ptr::eq(*s, &cx.supplies[ci])));
    }

    /// Drivers whose numbers are the same share one copy of them, and drivers whose numbers
    /// differ do not: every driver reads back its own.
    #[test]
    fn drivers_with_the_same_numbers_share_one_copy() {
        test_board!(nl, cx);
        let all = Budgets::build(&cx);
        let budgets: Vec<&DriverBudget> = all.iter().flat_map(|b| b.drivers.iter()).collect();
        assert!(budgets.len() >= 4, "{}", budgets.len());
        let mut shared = 0;
        for a in &budgets {
            for b in &budgets {
                let same = a.nums.bits() == b.nums.bits();
                assert_eq!(Arc::ptr_eq(&a.nums, &b.nums), same);
                shared += usize::from(same && !std::ptr::eq(*a, *b));
            }
        }
        // the two /OC open collectors sink the same loads: one copy between them
        assert!(shared > 0, "no two drivers share their numbers");
        // the same for the rare parts (pull-ups, operating points)
        let mut rare = 0;
        let (mut ka, mut kb) = (Vec::new(), Vec::new());
        for a in &budgets {
            for b in &budgets {
                let (Some(ra), Some(rb)) = (&a.rare, &b.rare) else {
                    continue;
                };
                ra.key(&mut ka);
                rb.key(&mut kb);
                assert_eq!(Arc::ptr_eq(ra, rb), ka == kb);
                rare += 1;
            }
        }
        assert!(rare > 0, "the test board has pull-ups");
        let oc = all.net(nl.net_by_name("/OC").expect("net"));
        assert!(Arc::ptr_eq(&oc.drivers[0].nums, &oc.drivers[1].nums));
    }

    /// Margins are worked out when asked: each driver against each load but its own pin, by
    /// driver then load, from the driver's levels and the load's thresholds.
    #[test]
    fn margins_pair_each_driver_with_each_other_load() {
        test_board!(nl, cx);
        let n = nl.net_by_name("/BUS").expect("net");
        let b = net_budget(&cx, n);
        let ms: Vec<LoadMargin> = b.margins(&cx, n).collect();
        // two 74LS125 outputs; the 74LS00 input and the 74LS73 clock
        let pairs: Vec<(usize, usize)> = ms.iter().map(|m| (m.driver, m.load)).collect();
        assert_eq!(pairs, [(0, 0), (0, 1), (1, 0), (1, 1)]);
        for m in &ms {
            let db = &b.drivers[m.driver];
            // 74LS VIH 2.0 V, VIL 0.8 V (TI SDLS025, SN74LS00; from memory)
            assert!(
                (m.vih - 2.0).abs() < 1e-9 && (m.vil - 0.8).abs() < 1e-9,
                "{m:?}"
            );
            assert_eq!(m.high_margin, db.high_level().map(|h| h - m.vih));
            assert_eq!(m.low_margin, db.low_level().map(|v| m.vil - v));
            assert!(m.thresholds_at.is_none());
        }
        // the low level is the low state's
        assert_eq!(
            b.drivers[0].low_level(),
            b.drivers[0].low().and_then(|l| l.level)
        );
    }

    /// With a rail tolerance a CMOS load's VIH is taken at the top of its supply and its VIL
    /// at the bottom.
    #[test]
    fn margins_take_cmos_thresholds_at_the_worst_end_of_the_rail() {
        const HC: &str = r#"(export (version "E")
  (components
    (comp (ref "U1") (value "74HC04") (libsource (lib "x") (part "74HC04")))
    (comp (ref "U2") (value "74HC00") (libsource (lib "x") (part "74HC00"))))
  (nets
    (net (code "1") (name "+5V") (node (ref "U1") (pin "14")) (node (ref "U2") (pin "14")))
    (net (code "2") (name "GND") (node (ref "U1") (pin "7")) (node (ref "U2") (pin "7")))
    (net (code "3") (name "/A") (node (ref "U1") (pin "2")) (node (ref "U2") (pin "1")))))
"#;
        let rules = crate::classify::classifier::Rules::builtin();
        let tree = crate::sexpr::parse(HC).expect("test board parses");
        let nl = crate::netlist::build(&tree).expect("test board builds");
        let cl = crate::classify::classifier::classify(&nl, &rules);
        let opts = crate::circuit::ModelOptions {
            rail_tolerance: 0.1,
            ..Default::default()
        };
        let cx = crate::circuit::build(&nl, &cl, &rules, opts);
        let n = nl.net_by_name("/A").expect("net");
        let b = net_budget(&cx, n);
        let ms: Vec<LoadMargin> = b.margins(&cx, n).collect();
        assert_eq!(ms.len(), 1, "{ms:?}");
        let m = &ms[0];
        let (top, bottom) = *m.thresholds_at.as_deref().expect("thresholds at the ends");
        assert!((top - 5.5).abs() < 1e-9 && (bottom - 4.5).abs() < 1e-9);
        // 74HC VIH 3.15 V at 4.5 V and 4.2 V at 6.0 V, VIL 1.35 V at 4.5 V (onsemi MM74HC04):
        // at 5.5 V, 3.15 + 1.05 x 1.0 / 1.5 = 3.85 V
        assert!((m.vih - 3.85).abs() < 1e-9, "{}", m.vih);
        assert!((m.vil - 1.35).abs() < 1e-9, "{}", m.vil);
    }
}
