//! The electrical model of a classified netlist: rails, each part's supply, and for every
//! net its drivers, loads, pull resistors and what else hangs on it. The checks read this;
//! they never go back to the syntax tree.
//!
//! Family figures are taken at each part's own supply (the rail its supply pin sits on); a
//! part whose supply is unknown is taken at its family's nominal supply, and findings say
//! so.

pub mod budget;
pub mod display;
pub mod enables;
pub mod in_place;
pub mod per_part;
pub mod rails;

use std::sync::Arc;

use thin_vec::ThinVec;

use crate::classify::classifier::{Classified, PartKind, RoleSource, Rules};
use crate::classify::family::{Drive, Family, Levels};
use crate::classify::function::DriveClass;
use crate::classify::PinRole;
use crate::netlist::{Connection, Netlist};
use crate::values::{self, ValueError};
use in_place::{InPlace1, InPlace2};
use per_part::{PerPart, PerPartBuilder};

/// Options that change the model.
#[derive(Debug, Clone)]
pub struct ModelOptions {
    /// Rails declared by the user: (net name, volts). Overrides what the name says.
    pub rails: Vec<(String, f64)>,
    /// Rail tolerance as a fraction (0.05 = 5 %): each inequality is checked at its worst end.
    pub rail_tolerance: f64,
    /// Forward voltage assumed for an LED (common practice: 1.7 V for a red LED).
    pub led_vf: f64,
    /// Connectors whose pins are driven by a known family: (reference, family id).
    pub connector_families: Vec<(String, String)>,
}

impl Default for ModelOptions {
    fn default() -> Self {
        ModelOptions {
            rails: Vec::new(),
            rail_tolerance: 0.0,
            led_vf: 1.7,
            connector_families: Vec::new(),
        }
    }
}

/// Why a net is a rail.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RailSource {
    Name,
    PowerOutput,
    User,
    /// The supply or ground pins of the parts on it say so, whatever its name.
    Usage,
}

/// How a rail's voltage was inferred when neither its name nor the configuration gave it.
#[derive(Debug, Clone, PartialEq)]
pub enum Inferred {
    /// A fixed regulator's output is on it.
    Regulator { comp: usize },
    /// It powers parts of families specified at one supply only (74LS, 74HCT ...).
    Families {
        comps: Vec<usize>,
        families: Vec<String>,
    },
}

/// A rail whose voltage (or whose being a rail) was inferred: stated once per file.
#[derive(Debug, Clone, PartialEq)]
pub struct RailNote {
    pub net: usize,
    /// The voltage inferred, when one was.
    pub volts: Option<f64>,
    pub why: Option<Inferred>,
    /// True when the net is a rail by its pins alone (its name does not say so).
    pub by_usage: bool,
    pub ground: bool,
    /// Supply or ground pins on it, for the message.
    pub power_pins: usize,
}

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Rail {
    /// Nominal voltage; `None` when nothing says it (a `VCC` net with no declaration).
    pub volts: Option<f64>,
    pub ground: bool,
    pub source: RailSource,
}

impl Rail {
    /// The voltage, or 0 for ground.
    pub fn v(&self) -> Option<f64> {
        if self.ground {
            Some(0.0)
        } else {
            self.volts
        }
    }
}

pub use pin_ref::PinRef;

mod pin_ref {
    /// A pin, by component and index into its pins, each held as a `u32` (a board holds one
    /// in every driver, load and pin list of its nets) and read as a `usize` (`p.comp()`,
    /// `p.pin()`). Ordered by component, then pin.
    #[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
    pub struct PinRef {
        comp: u32,
        pin: u32,
    }

    impl PinRef {
        /// Every part and pin is read from a source of under 4 GiB (whose places are `u32`s
        /// too, `Span`), so both indices fit.
        #[inline]
        pub fn new(comp: usize, pin: usize) -> PinRef {
            debug_assert!(comp <= u32::MAX as usize && pin <= u32::MAX as usize);
            PinRef {
                comp: comp as u32,
                pin: pin as u32,
            }
        }

        /// The component's index.
        #[inline]
        pub fn comp(self) -> usize {
            self.comp as usize
        }

        /// The pin's index among its component's pins.
        #[inline]
        pub fn pin(self) -> usize {
            self.pin as usize
        }
    }
}

/// A part's supply as the model sees it.
#[derive(Debug, Clone)]
pub struct PartSupply {
    /// The supply voltage the family figures are taken at.
    pub vcc: f64,
    /// True when `vcc` comes from a rail; false when it is the family's nominal supply.
    pub known: bool,
    /// The net of the (first connected) supply pin and of the ground pin ([`Self::supply_net`],
    /// [`Self::ground_net`]), held as `u32`s, `NO_NET` for none: a board has one per part.
    supply_net: u32,
    ground_net: u32,
}

/// A part supply's net where it has none.
const NO_NET: u32 = u32::MAX;

impl PartSupply {
    /// The net of the (first connected) supply pin.
    pub fn supply_net(&self) -> Option<usize> {
        (self.supply_net != NO_NET).then_some(self.supply_net as usize)
    }

    /// The net of the (first connected) ground pin.
    pub fn ground_net(&self) -> Option<usize> {
        (self.ground_net != NO_NET).then_some(self.ground_net as usize)
    }
}

/// A part's family id as the circuit's per-part table holds it: one shared copy per family
/// behind a one-word pointer, read as a `str` (`d.family(cx)`).
#[derive(Clone, PartialEq, Eq)]
pub struct FamilyId(Arc<Box<str>>);

impl FamilyId {
    pub fn new(id: &str) -> Self {
        FamilyId(Arc::new(Box::from(id)))
    }
}

impl std::ops::Deref for FamilyId {
    type Target = str;
    fn deref(&self) -> &str {
        &self.0
    }
}

impl std::fmt::Debug for FamilyId {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        std::fmt::Debug::fmt(&**self, f)
    }
}

/// A driving pin on a net. What it shares with its part's other pins (its family and the
/// family's figures at the part's supply) is read from the circuit's per-part table
/// (`d.levels(cx)`, `d.family(cx)`): a board holds one `Driver` or `Load` per logic pin.
#[derive(Debug, Clone)]
pub struct Driver {
    pub at: PinRef,
    pub role: PinRole,
    /// True when the role comes only from the symbol's pin type (an unclassified part): a hint,
    /// never proof.
    pub symbol_only: bool,
}

impl Driver {
    /// The family's figures at the part's supply, when the part is classified (a connector's
    /// pins driven by a configured family: that family's at its nominal supply).
    #[inline]
    pub fn levels<'c>(&self, cx: &'c Circuit<'_, '_>) -> Option<&'c Arc<Levels>> {
        cx.part_logic[self.at.comp()].levels.as_ref()
    }

    /// The part's family id (a driven connector's: its configured family).
    #[inline]
    pub fn family<'c>(&self, cx: &'c Circuit<'_, '_>) -> Option<&'c str> {
        cx.part_logic[self.at.comp()].family.as_deref()
    }
}

/// A logic input on a net; its part's data is read from the circuit as for a [`Driver`].
#[derive(Debug, Clone)]
pub struct Load {
    pub at: PinRef,
    pub role: PinRole,
    /// Two flags read often, kept in what would be padding: a TTL (bipolar) input, and an
    /// input that draws one of its family's input currents in each state (no entry in its
    /// part's unit loads).
    ttl: bool,
    one_unit: bool,
}

impl Load {
    /// The family's figures at the part's supply, when the part is classified.
    #[inline]
    pub fn levels<'c>(&self, cx: &'c Circuit<'_, '_>) -> Option<&'c Arc<Levels>> {
        cx.part_logic[self.at.comp()].levels.as_ref()
    }

    /// The part's family id.
    #[inline]
    pub fn family<'c>(&self, cx: &'c Circuit<'_, '_>) -> Option<&'c str> {
        cx.part_logic[self.at.comp()].family.as_deref()
    }

    /// True for TTL (bipolar) inputs that source current when low.
    #[inline]
    pub fn ttl(&self) -> bool {
        self.ttl
    }

    /// How many of its family's input currents this input draws, low and high: (1, 1) for
    /// most inputs; more for those the function table names (a counter's clock, a
    /// flip-flop's clear).
    #[inline]
    pub fn unit_loads(&self, cx: &Circuit<'_, '_>) -> (f64, f64) {
        if self.one_unit {
            return (1.0, 1.0);
        }
        cx.cl.parts[self.at.comp()].input_loads[self.at.pin()].unwrap_or((1.0, 1.0))
    }

    /// The input's low-state current magnitude (its family's IIL times its unit loads).
    #[inline]
    pub fn iil(&self, cx: &Circuit<'_, '_>) -> Option<f64> {
        self.levels(cx)
            .map(|l| l.iil_max.abs() * self.unit_loads(cx).0)
    }

    /// The input's high-state current magnitude (its family's IIH times its unit loads).
    #[inline]
    pub fn iih(&self, cx: &Circuit<'_, '_>) -> Option<f64> {
        self.levels(cx)
            .map(|l| l.iih_max.abs() * self.unit_loads(cx).1)
    }
}

/// What a part's logic pins share, kept once per part ([`Circuit::part_logic`]).
#[derive(Debug, Clone, Default)]
pub struct PartLogic {
    /// The family's figures at the part's supply, one shared copy per family, supply and
    /// drive; `None` for a part of no known family or supply (and for a part with no logic
    /// pin on a net, which no driver or load reads).
    pub levels: Option<Arc<Levels>>,
    /// The part's family id, one shared copy per family.
    pub family: Option<FamilyId>,
}

/// A resistor from this net to a rail.
#[derive(Debug, Clone)]
pub struct Pull {
    pub resistor: usize,
    /// The resistor's pin on this net.
    pub at: PinRef,
    pub rail_net: usize,
    pub rail_volts: f64,
    pub ohms: f64,
    /// True when the rail is above ground (a pull-up).
    pub up: bool,
}

/// A non-logic load found by following resistors and LEDs from a net to ground.
#[derive(Debug, Clone)]
pub struct LedPath {
    /// The first part on the path (on this net).
    pub at: PinRef,
    pub leds: Vec<usize>,
    pub resistors: Vec<usize>,
    pub ohms: f64,
    /// Sum of the LEDs' assumed forward voltages.
    pub vf: f64,
    /// The rail the path ends on, and its voltage (0 for ground).
    pub rail_net: usize,
    pub rail_volts: f64,
    /// The path ends in a display whose common is open: it is the path the display makes
    /// once its common is wired as its kind needs (a common cathode to ground), and no
    /// current flows in it today.
    pub open_common: Option<usize>,
}

/// Everything on one net. Its drivers and loads hold the first one or two in place
/// ([`in_place`]: most nets have one driver and a load or two); its other lists are `ThinVec`s
/// (one pointer, no allocation while empty); each is trimmed to its length once the model is
/// built. The lists most nets leave empty (pull
/// resistors, series and switch links, LED paths ...) are kept apart in one boxed
/// [`NetExtras`], allocated only for a net that has one of them, and read through accessors
/// (`nm.pulls()`, `nm.series()` ...): a board has about as many nets as it has pins.
#[derive(Debug, Clone, Default)]
pub struct NetModel {
    /// Its rail's voltage, when it is a rail whose voltage is known ([`RAIL_VOLTS`]).
    volts: f64,
    /// Its rail, read as a [`Rail`] ([`NetModel::rail`]): whether it is one ([`RAIL`]), its
    /// voltage known ([`RAIL_VOLTS`]), ground ([`RAIL_GROUND`]), and why it is one (a
    /// [`RailSource`] above [`RAIL_SOURCE_SHIFT`]). The rail, the source and the flags take
    /// what one `Option<Rail>` took: a board has about as many nets as it has pins.
    rail_bits: u8,
    /// What sets its level, read as a [`Source`] ([`NetModel::source`]): one of the
    /// `SOURCE_*` kinds, with the link's index in `through` for [`Source::Through`].
    source_kind: u8,
    /// [`RAIL_NAMED_LOCAL`] and [`HAS_UNREADABLE`].
    flags: u8,
    through: u32,
    /// Its outputs (and bidirectional pins): the first in place.
    pub drivers: InPlace1<Driver>,
    /// Its logic inputs (and bidirectional pins): the first two in place.
    pub loads: InPlace2<Load>,
    /// Connector pins: the net leaves the board.
    pub connectors: ThinVec<PinRef>,
    /// Capacitors, diodes and other passives not counted above. (Supply and ground pins are
    /// in no list: what they power is read from the parts' supplies, [`Circuit::supplies`].)
    pub passives: ThinVec<PinRef>,
    /// The rarer lists; `None` while all of them are empty.
    extras: Option<Box<NetExtras>>,
}

/// [`NetModel::rail_bits`]: the net is a rail.
const RAIL: u8 = 1;
/// The rail's voltage is known (in [`NetModel::volts`]).
const RAIL_VOLTS: u8 = 2;
/// The rail is ground.
const RAIL_GROUND: u8 = 4;
/// The rail's [`RailSource`], in the bits above this.
const RAIL_SOURCE_SHIFT: u32 = 3;
/// [`NetModel::source_kind`]: nothing found sets the level (in some state).
const SOURCE_NONE: u8 = 0;
const SOURCE_OWN: u8 = 1;
const SOURCE_THROUGH: u8 = 2;
const SOURCE_SELECTOR: u8 = 3;
/// [`NetModel::flags`]: the net's name says rail (`/disp/VDD`) but it is a sheet-local net
/// that reaches no rail: outputs typed by an unknown symbol on it are taken as the symbol's
/// slip.
const RAIL_NAMED_LOCAL: u8 = 1;
/// A resistor whose value could not be read joins it to a rail: the resistors are listed by
/// the circuit ([`Circuit::unreadable`]), since on most boards no net has one and on a board
/// of misread values every such net has one.
const HAS_UNREADABLE: u8 = 2;

/// The lists of a net that most nets leave empty (see [`NetModel`]).
#[derive(Debug, Clone, Default)]
pub struct NetExtras {
    pub pulls: ThinVec<Pull>,
    /// Pins whose role no source could tell.
    pub unknown: ThinVec<PinRef>,
    pub led_paths: ThinVec<LedPath>,
    /// LEDs (with their resistors) from a positive rail down to this net: the driver sinks
    /// their current in its low state.
    pub sink_paths: ThinVec<LedPath>,
    /// Resistors from this net to a rail whose voltage is unknown, and one-pin pull-up or
    /// pull-down parts: they hold the net at a level that cannot be computed.
    pub held: ThinVec<usize>,
    /// Series elements (a resistor, a resistor-network element, an inductor or ferrite bead)
    /// from this net to another net that is not a rail.
    pub series: ThinVec<SeriesLink>,
    /// Switch and jumper elements from this net to another net.
    pub switches: ThinVec<SwitchLink>,
    /// Switch elements whose opening leaves this net with nothing to set its level (the
    /// net is held only through them): it floats when all of them are open.
    pub floats_open: ThinVec<SwitchLink>,
    /// Nets whose only source is this net, through a series element (directly or through
    /// further series elements): their loads are this net's drivers' loads too. Each is
    /// (the net fed, the series part its own source runs through).
    pub feeds: ThinVec<(u32, u32)>,
}

impl NetExtras {
    fn is_empty(&self) -> bool {
        self.pulls.is_empty()
            && self.unknown.is_empty()
            && self.led_paths.is_empty()
            && self.sink_paths.is_empty()
            && self.held.is_empty()
            && self.series.is_empty()
            && self.switches.is_empty()
            && self.floats_open.is_empty()
            && self.feeds.is_empty()
    }

    fn fit(&mut self) {
        self.pulls.shrink_to_fit();
        self.unknown.shrink_to_fit();
        self.led_paths.shrink_to_fit();
        self.sink_paths.shrink_to_fit();
        self.held.shrink_to_fit();
        self.series.shrink_to_fit();
        self.switches.shrink_to_fit();
        self.floats_open.shrink_to_fit();
        self.feeds.shrink_to_fit();
    }
}

/// A list of the net's [`NetExtras`], empty when the net has none.
macro_rules! extra_list {
    ($(#[$doc:meta])* $name:ident: $t:ty) => {
        $(#[$doc])*
        pub fn $name(&self) -> &[$t] {
            match &self.extras {
                Some(e) => &e.$name,
                None => &[],
            }
        }
    };
}

impl NetModel {
    extra_list!(
        /// Resistors from this net to a rail of known voltage.
        pulls: Pull
    );
    extra_list!(
        /// Pins whose role no source could tell.
        unknown: PinRef
    );
    extra_list!(
        /// LED paths from this net to ground (or a lower rail).
        led_paths: LedPath
    );
    extra_list!(
        /// LEDs (with their resistors) from a positive rail down to this net.
        sink_paths: LedPath
    );
    extra_list!(
        /// Resistors to a rail of unknown voltage, and one-pin pull parts.
        held: usize
    );
    extra_list!(
        /// Series elements from this net to another net that is not a rail.
        series: SeriesLink
    );
    extra_list!(
        /// Switch and jumper elements from this net to another net.
        switches: SwitchLink
    );
    extra_list!(
        /// Switch elements whose opening leaves this net with nothing to set its level.
        floats_open: SwitchLink
    );
    extra_list!(
        /// Nets whose only source is this net through a series element: (net fed, series part).
        feeds: (u32, u32)
    );

    /// The rarer lists, to be filled while the model is built (allocated on first use).
    fn extras_mut(&mut self) -> &mut NetExtras {
        self.extras.get_or_insert_with(Default::default)
    }
}

/// A two-terminal series element from one net to another.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SeriesLink {
    pub part: usize,
    /// The element's pin on this net.
    pub at: PinRef,
    pub other_net: usize,
    /// Its resistance, when known (an inductor or bead counts as 0).
    pub ohms: Option<f64>,
}

/// One switch or jumper element from this net to another.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SwitchLink {
    pub part: usize,
    pub at: PinRef,
    pub other_net: usize,
}

/// What sets a net's level.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Source {
    /// Something on the net itself: a rail, a driver, a pull resistor, a connector.
    Own,
    /// A net that has a source, through a series element: the index of its link in the
    /// net's `series` (a small index keeps every net's model small).
    Through(u32),
    /// Two or more switch positions each join it to a net with a source (a selector).
    Selector,
}

impl NetModel {
    /// The net's rail, if it is one.
    #[inline]
    pub fn rail(&self) -> Option<Rail> {
        if self.rail_bits & RAIL == 0 {
            return None;
        }
        Some(Rail {
            volts: (self.rail_bits & RAIL_VOLTS != 0).then_some(self.volts),
            ground: self.rail_bits & RAIL_GROUND != 0,
            source: match self.rail_bits >> RAIL_SOURCE_SHIFT {
                0 => RailSource::Name,
                1 => RailSource::PowerOutput,
                2 => RailSource::User,
                _ => RailSource::Usage,
            },
        })
    }

    /// Makes the net a rail (`Some`) or not (`None`).
    pub fn set_rail(&mut self, rail: Option<Rail>) {
        let Some(r) = rail else {
            self.rail_bits = 0;
            self.volts = 0.0;
            return;
        };
        let source = match r.source {
            RailSource::Name => 0,
            RailSource::PowerOutput => 1,
            RailSource::User => 2,
            RailSource::Usage => 3,
        };
        self.volts = r.volts.unwrap_or(0.0);
        self.rail_bits = RAIL
            | if r.volts.is_some() { RAIL_VOLTS } else { 0 }
            | if r.ground { RAIL_GROUND } else { 0 }
            | source << RAIL_SOURCE_SHIFT;
    }

    /// What sets the level, as the model found it (`None`: nothing, in some state).
    #[inline]
    pub fn source(&self) -> Option<Source> {
        match self.source_kind {
            SOURCE_NONE => None,
            SOURCE_OWN => Some(Source::Own),
            SOURCE_THROUGH => Some(Source::Through(self.through)),
            _ => Some(Source::Selector),
        }
    }

    fn set_source(&mut self, source: Option<Source>) {
        (self.source_kind, self.through) = match source {
            None => (SOURCE_NONE, 0),
            Some(Source::Own) => (SOURCE_OWN, 0),
            Some(Source::Through(l)) => (SOURCE_THROUGH, l),
            Some(Source::Selector) => (SOURCE_SELECTOR, 0),
        };
    }

    /// The net's name says rail (`/disp/VDD`) but it is a sheet-local net that reaches no
    /// rail: outputs typed by an unknown symbol on it are taken as the symbol's slip.
    #[inline]
    pub fn rail_named_local(&self) -> bool {
        self.flags & RAIL_NAMED_LOCAL != 0
    }

    fn set_flag(&mut self, flag: u8, on: bool) {
        if on {
            self.flags |= flag;
        } else {
            self.flags &= !flag;
        }
    }

    /// Trims every list to its length: a list grown by pushes holds room for four or more,
    /// and a board has as many nets as it has pins. Extras left empty are dropped.
    fn fit(&mut self) {
        self.drivers.shrink_to_fit();
        self.loads.shrink_to_fit();
        self.connectors.shrink_to_fit();
        self.passives.shrink_to_fit();
        match &mut self.extras {
            Some(e) if e.is_empty() => self.extras = None,
            Some(e) => e.fit(),
            None => {}
        }
    }

    /// True when something on the net itself can set its level.
    pub fn own_source(&self) -> bool {
        // a resistor to a rail whose value cannot be read still holds the net (`unreadable-value`
        // reports it); calling the inputs floating as well would be a cascade
        self.rail_bits & RAIL != 0
            || self
                .drivers
                .iter()
                .any(|d| !(d.symbol_only && self.rail_named_local()))
            || !self.pulls().is_empty()
            || !self.held().is_empty()
            || !self.connectors.is_empty()
            || self.has_unreadable()
            || !self.unknown().is_empty()
    }

    /// True when a resistor whose value could not be read joins the net to a rail (which
    /// ones: [`Circuit::unreadable`]).
    #[inline]
    pub fn has_unreadable(&self) -> bool {
        self.flags & HAS_UNREADABLE != 0
    }

    /// True when something on this board or off it can set the net's level in every
    /// position of its switches: on the net, through a series element, or by a selector.
    pub fn has_source(&self) -> bool {
        self.source_kind != SOURCE_NONE || self.own_source()
    }
}

/// Each net's rail as its model holds it (`nets[i].rail()`), read by net index
/// (`rail.get(i)`) while the model is built, and written while rails are inferred from their
/// pins (`rail.set(i, ...)`): the rails are kept in the nets' models from the start, with no
/// table of their own.
pub struct RailsOf<N>(N);

impl RailsOf<&[NetModel]> {
    #[inline]
    pub fn get(&self, net: usize) -> Option<Rail> {
        self.0[net].rail()
    }
}

impl RailsOf<&mut [NetModel]> {
    #[inline]
    pub fn get(&self, net: usize) -> Option<Rail> {
        self.0[net].rail()
    }

    #[inline]
    pub fn set(&mut self, net: usize, rail: Option<Rail>) {
        self.0[net].set_rail(rail);
    }
}

/// The classified circuit.
pub struct Circuit<'n, 'a> {
    pub nl: &'n Netlist<'a>,
    pub cl: &'n Classified,
    pub rules: &'n Rules,
    pub opts: ModelOptions,
    /// Each part's supply, read by part (`supplies[comp]`); parts on the same rails with the
    /// same supply share one entry ([`PerPart`]).
    pub supplies: PerPart<Option<PartSupply>>,
    pub nets: Vec<NetModel>,
    /// Each pin's role once the wiring is known: a transceiver whose direction pin is tied to
    /// a rail has inputs on one side and outputs on the other.
    /// Shared with the classification for a part whose wiring changes none of its roles, and
    /// read by part (`roles[comp]`) from one entry per distinct list ([`PerPart`]).
    pub roles: PerPart<Arc<[PinRole]>>,
    /// Rails the model inferred (by their pins, or their voltage), for the info finding.
    pub rail_notes: Vec<RailNote>,
    /// LED displays: their commons, segments and whether the commons reach anything.
    pub displays: Vec<display::Display>,
    /// Every resistor's and resistor network's value as read, once per distinct text
    /// ([`Circuit::resistor_value`]).
    pub values: ValueReadings<'n>,
    /// (net, resistor) for each resistor from a net to a rail whose value could not be read,
    /// in net order ([`Circuit::unreadable`]).
    unreadable: Vec<(u32, u32)>,
    /// Each part's family's table entry, looked up once ([`Circuit::family`]), read by part
    /// from one entry per family ([`PerPart`]).
    families: PerPart<Option<&'n Family>>,
    /// Each part's figures and family id as its drivers and loads read them
    /// ([`Driver::levels`], [`Load::family`] ...).
    /// Parts alike on the same supply share one entry ([`PerPart`]).
    pub part_logic: PerPart<PartLogic>,
}

/// A resistor's or resistor network's value as read: its ohms (each element's, for a
/// network), or why it cannot be read.
pub type ValueReading = Result<f64, ValueError>;

/// Reads a resistor's or resistor network's value; `None` for any other kind of part.
pub fn read_resistor_value(kind: PartKind, value: &str) -> Option<ValueReading> {
    match kind {
        PartKind::Resistor => Some(values::parse_resistance(value).map(|r| r.ohms)),
        PartKind::ResistorNetwork => Some(values::parse_network(value).map(|r| r.ohms)),
        _ => None,
    }
}

/// Resistor values read once per distinct text and kind: a board repeats a few values on
/// many parts, and the model and the checks ask for each part's more than once.
#[derive(Debug, Default)]
pub struct ValueReadings<'n> {
    resistors: rustc_hash::FxHashMap<&'n str, ValueReading>,
    networks: rustc_hash::FxHashMap<&'n str, ValueReading>,
}

impl<'n> ValueReadings<'n> {
    /// The reading of `value` for a part of `kind`, read the first time it is asked.
    fn read(&mut self, kind: PartKind, value: &'n str) -> Option<&ValueReading> {
        let map = match kind {
            PartKind::Resistor => &mut self.resistors,
            PartKind::ResistorNetwork => &mut self.networks,
            _ => return None,
        };
        Some(
            map.entry(value)
                .or_insert_with(|| read_resistor_value(kind, value).expect("a resistor kind")),
        )
    }

    /// The reading of `value` for a part of `kind`, when it was read.
    pub fn get(&self, kind: PartKind, value: &str) -> Option<&ValueReading> {
        match kind {
            PartKind::Resistor => self.resistors.get(value),
            PartKind::ResistorNetwork => self.networks.get(value),
            _ => None,
        }
    }
}

impl<'n, 'a> Circuit<'n, 'a> {
    /// The part's family's table entry (looked up once per part when the model is built).
    pub fn family(&self, comp: usize) -> Option<&'n Family> {
        self.families[comp]
    }

    /// True when the part's family has TTL-level outputs (bipolar or NMOS, or a family whose
    /// `high_output` says its high stops at TTL levels or is guaranteed only there).
    pub fn ttl_output(&self, comp: usize) -> bool {
        self.family(comp).is_some_and(|f| {
            matches!(
                f.technology,
                crate::classify::family::Technology::Bipolar
                    | crate::classify::family::Technology::Nmos
            ) || f.high_output != crate::classify::family::HighOutput::Rows
        })
    }

    /// The level at which a processor's, peripheral's or memory's control input lets the part
    /// run undisturbed (`idle` in the function table): `Some(true)` high, `Some(false)` low,
    /// `None` for any other pin.
    /// Read from the part's pin table, where the function table's entry was looked up once.
    pub fn idle_level(&self, comp: usize, pin: usize) -> Option<bool> {
        self.cl.parts[comp].idle_high[pin]
    }

    /// A resistor's or resistor network's value as the model read it; `None` for any other
    /// part.
    pub fn resistor_value(&self, comp: usize) -> Option<&ValueReading> {
        self.values.get(
            self.cl.parts[comp].kind,
            self.nl.components[comp].value_str(),
        )
    }

    /// The resistors from net `net` to a rail whose values could not be read, in the order
    /// the model found them (why each cannot be read: [`Circuit::resistor_value`]).
    pub fn unreadable(&self, net: usize) -> impl Iterator<Item = usize> + '_ {
        let found: &[(u32, u32)] = if self.nets[net].has_unreadable() {
            let net = small(net);
            let from = self.unreadable.partition_point(|&(n, _)| n < net);
            let to = from + self.unreadable[from..].partition_point(|&(n, _)| n == net);
            &self.unreadable[from..to]
        } else {
            &[]
        };
        found.iter().map(|&(_, r)| r as usize)
    }

    pub fn role(&self, p: PinRef) -> PinRole {
        self.roles[p.comp()][p.pin()]
    }

    /// The highest voltage input `l` takes at its part's supply (its family's limit there);
    /// `None` for an input of no known family or supply.
    pub fn input_limit(&self, l: &Load) -> Option<f64> {
        let vcc = self.supplies[l.at.comp()].as_ref().map(|s| s.vcc);
        self.family(l.at.comp())
            .zip(vcc)
            .map(|(f, v)| f.input_limit_v(v))
    }

    /// `U4.6`
    pub fn pin_name(&self, p: PinRef) -> String {
        let c = &self.nl.components[p.comp()];
        let (r, n) = (c.reference.as_str(), c.pins[p.pin()].num(self.nl));
        let mut s = String::with_capacity(r.len() + 1 + n.len());
        s.push_str(r);
        s.push('.');
        s.push_str(n);
        s
    }

    /// `U4 pin 6 (74LS04 output 3Y)`
    pub fn describe(&self, p: PinRef) -> String {
        let c = &self.nl.components[p.comp()];
        let part = &self.cl.parts[p.comp()];
        let pin = &c.pins[p.pin()];
        let name = part.table_names[p.pin()]
            .as_deref()
            .or_else(|| pin.name(self.nl))
            .filter(|n| *n != "~" && !n.is_empty());
        let what = match part.roles[p.pin()] {
            PinRole::Input | PinRole::SchmittInput => "input",
            PinRole::PushPull => "output",
            PinRole::OpenCollector => "open-collector output",
            PinRole::OpenEmitter => "open-emitter output",
            PinRole::ThreeState => "three-state output",
            PinRole::Bidirectional => "bidirectional pin",
            PinRole::Supply => "supply pin",
            PinRole::Ground => "ground pin",
            _ => "pin",
        };
        // written piece by piece into one text of its length (a finding's message quotes it)
        let (r, num, value) = (c.reference.as_str(), pin.num(self.nl), c.value_str());
        let pieces = [r, " pin ", num, " (", value, " ", what];
        let tail = name.map_or(0, |n| n.len() + 1) + 1;
        let mut s = String::with_capacity(pieces.iter().map(|x| x.len()).sum::<usize>() + tail);
        for x in pieces {
            s.push_str(x);
        }
        if let Some(n) = name {
            s.push(' ');
            s.push_str(n);
        }
        s.push(')');
        s
    }

    /// The net's display name (`Net-(U5-Pad4)`, `/CLK`; `#7` when unnamed).
    pub fn net_name(&self, net: usize) -> String {
        let n = &self.nl.nets[net];
        if n.name.as_str().is_empty() {
            format!(
                "#{}",
                n.code
                    .as_ref()
                    .map_or((net + 1).to_string(), |c| c.as_str().to_string())
            )
        } else {
            n.name.as_str().to_string()
        }
    }

    /// The span of a pin's node in the nets section, or the component when it is on no net.
    pub fn pin_span(&self, p: PinRef) -> crate::source::Span {
        let c = &self.nl.components[p.comp()];
        match c.pins[p.pin()].connection {
            Connection::Net { net, node } | Connection::Alone { net, node } => {
                self.nl.node(net as usize, node as usize).span
            }
            Connection::Absent => match (c.libpart, c.pins[p.pin()].libpin(self.nl)) {
                (Some(lp), Some(li)) => self.nl.libparts[lp as usize].pins[li as usize].span,
                _ => c.reference.span(),
            },
        }
    }

    /// The supply description used in messages: `+5V (5.00 V)` or `5.00 V (the family's
    /// nominal supply: U4's supply pin is on no rail)`.
    pub fn supply_text(&self, comp: usize) -> String {
        match &self.supplies[comp] {
            Some(s) if s.known => {
                let net = s.supply_net().map(|n| self.net_name(n)).unwrap_or_default();
                format!("{net} ({})", values::format_volts(s.vcc))
            }
            Some(s) => {
                let why = match s.supply_net() {
                    Some(n) if self.nets[n].rail().is_some() => format!(
                        "the voltage of {} is not known: declare it with --rail",
                        self.net_name(n)
                    ),
                    Some(n) => format!("its supply pin is on {}, not a rail", self.net_name(n)),
                    None => "its supply pin is on no net".to_string(),
                };
                format!(
                    "{} (the family's nominal supply; {why})",
                    values::format_volts(s.vcc)
                )
            }
            None => "an unknown supply".to_string(),
        }
    }

    /// The worst-case ends of a rail voltage under the configured tolerance.
    pub fn rail_range(&self, v: f64) -> (f64, f64) {
        let t = self.opts.rail_tolerance.abs();
        let (a, b) = (v * (1.0 - t), v * (1.0 + t));
        (a.min(b), a.max(b))
    }
}

/// Which of its net's lists a connected pin goes to.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Slot {
    Driver,
    Load,
    Connector,
    Passive,
    /// A supply or ground pin: in no list of its net (the parts' supplies say what it powers).
    Power,
    /// In the net's extras, allocated on first use.
    Unknown,
    /// A bidirectional pin: a driver and a load.
    DriverAndLoad,
}

/// The lists counted per net ([`Slot`] up to `Passive`).
const SLOT_LISTS: usize = 4;

/// Where a pin of a part of `kind` with `role` goes: a connector's pins are the net leaving
/// the board (a driver too, when the configuration names the family driving it); passives'
/// pins and a one-pin pull part's (`pull_part`, which holds its net) count as passives; a
/// small part whose symbol types a pin as a logic input or output (a probe, a stimulus, a
/// module's pin) takes part by that type, as a hint.
fn pin_slot(kind: PartKind, pull_part: bool, role: PinRole) -> Slot {
    match kind {
        PartKind::Connector => return Slot::Connector,
        PartKind::Resistor
        | PartKind::ResistorNetwork
        | PartKind::Capacitor
        | PartKind::Led
        | PartKind::Display
        | PartKind::Diode
        | PartKind::Switch
        | PartKind::Inductor => return Slot::Passive,
        PartKind::Other if pull_part => return Slot::Passive,
        PartKind::Other
            if matches!(
                role,
                PinRole::Passive | PinRole::Unknown | PinRole::NoConnect | PinRole::Analog
            ) =>
        {
            return Slot::Passive
        }
        _ => {}
    }
    match role {
        PinRole::Input | PinRole::SchmittInput => Slot::Load,
        PinRole::PushPull
        | PinRole::OpenCollector
        | PinRole::OpenEmitter
        | PinRole::ThreeState
        | PinRole::PulledUpIo => Slot::Driver,
        PinRole::Bidirectional => Slot::DriverAndLoad,
        PinRole::Supply | PinRole::Ground => Slot::Power,
        PinRole::Unknown => Slot::Unknown,
        PinRole::Analog | PinRole::Passive | PinRole::NoConnect => Slot::Passive,
    }
}

/// Counts one more pin for a list: a byte, which stops at 255 (a longer list grows from
/// there, and is trimmed once built).
#[inline]
fn count(n: &mut u8) {
    *n = n.saturating_add(1);
}

/// An index as the model's compact lists hold it.
fn small(i: usize) -> u32 {
    u32::try_from(i).expect("fewer than 2^32 nets and parts")
}

fn component_kind_passive(k: PartKind) -> bool {
    matches!(
        k,
        PartKind::Resistor
            | PartKind::ResistorNetwork
            | PartKind::Capacitor
            | PartKind::Led
            | PartKind::Display
            | PartKind::Diode
            | PartKind::Connector
            | PartKind::Other
    )
}

/// Builds the electrical model.
pub fn build<'n, 'a>(
    nl: &'n Netlist<'a>,
    cl: &'n Classified,
    rules: &'n Rules,
    opts: ModelOptions,
) -> Circuit<'n, 'a> {
    let n_nets = nl.nets.len();
    let families = part_families(cl, rules);
    // every net's model is made first, empty, and holds the net's rail from the start: the
    // model keeps no table by net beside it while it is built (a table freed once the model
    // stands leaves a hole the rest of the board's data does not fill)
    let mut nets: Vec<NetModel> = (0..n_nets).map(|_| NetModel::default()).collect();
    // rails: user declarations, names, power outputs, then the pins on them
    let mut rail = RailsOf(&mut nets[..]);
    for (i, net) in nl.nets.iter().enumerate() {
        if let Some((_, v)) = opts.rails.iter().find(|(n, _)| {
            n == net.name.as_str()
                || n.trim_start_matches('/') == net.name.as_str().trim_start_matches('/')
        }) {
            rail.set(
                i,
                Some(Rail {
                    volts: Some(*v),
                    ground: *v == 0.0,
                    source: RailSource::User,
                }),
            );
            continue;
        }
        match rails::rail_from_name(net.name.as_str()) {
            Some(rails::NameRail::Ground) => rail.set(
                i,
                Some(Rail {
                    volts: Some(0.0),
                    ground: true,
                    source: RailSource::Name,
                }),
            ),
            Some(rails::NameRail::Supply(v)) => rail.set(
                i,
                Some(Rail {
                    volts: v,
                    ground: false,
                    source: RailSource::Name,
                }),
            ),
            None => {}
        }
    }
    // power outputs, then rails by the pins on them: one walk over the pins does both
    let mut rail_notes = rails_by_usage(nl, cl, &families, &mut rail);
    let rail = RailsOf(&nets[..]);

    // supplies
    // parts alike on the same rails share one entry, told by its numbers
    let mut supplies = PerPartBuilder::with_capacity(nl.components.len());
    for (ci, c) in nl.components.iter().enumerate() {
        let part = &cl.parts[ci];
        let Some(fam) = families[ci].filter(|_| part.is_logic()) else {
            supplies.push(None, || None);
            continue;
        };
        let mut supply_net = None;
        let mut ground_net = None;
        for (pi, p) in c.pins.iter().enumerate() {
            let Some(net) = p.connection.net() else {
                continue;
            };
            match part.roles[pi] {
                PinRole::Supply if supply_net.is_none() => supply_net = Some(small(net)),
                PinRole::Ground if ground_net.is_none() => ground_net = Some(small(net)),
                _ => {}
            }
        }
        let railv = supply_net
            .map(|n: u32| n as usize)
            .and_then(|n| rail.get(n))
            .and_then(|r| r.v())
            .filter(|v| *v > 0.0);
        // thresholds are taken against 0 V: a ground pin on a rail other than 0 V is the
        // business of `power-pin-miswired`, and a 4051's VEE is an analogue supply
        let (vcc, known) = match railv {
            Some(v) => (v, true),
            None => (fam.supply_nominal, false),
        };
        let supply = PartSupply {
            vcc,
            known,
            supply_net: supply_net.unwrap_or(NO_NET),
            ground_net: ground_net.unwrap_or(NO_NET),
        };
        let key = (vcc.to_bits(), known, supply.supply_net, supply.ground_net);
        supplies.push(Some(key), || Some(supply));
    }
    let supplies = supplies.finish();

    // roles once the wiring is known
    let roles = enables::wired_roles(nl, cl, &rail);

    // one `Levels` per family, supply and drive, shared by every pin of every part alike
    let mut level_table: rustc_hash::FxHashMap<(&str, u64, Drive), Arc<Levels>> =
        Default::default();
    // a part's drive class, looked up in the function table once per distinct part (parts
    // alike share one classification)
    let mut drives: rustc_hash::FxHashMap<*const crate::classify::classifier::PartClass, Drive> =
        Default::default();
    let mut levels = |ci: usize| -> Option<Arc<Levels>> {
        let part = &cl.parts[ci];
        let fam = families[ci]?;
        let s = supplies[ci].as_ref()?;
        let drive = *drives.entry(Arc::as_ptr(part)).or_insert_with(|| {
            match part
                .function
                .as_ref()
                .and_then(|(sr, id)| rules.functions.get(*sr, id))
                .map(|f| f.drive)
            {
                Some(DriveClass::Buffer) => Drive::Buffer,
                _ => Drive::Standard,
            }
        });
        let lv = level_table
            .entry((fam.id.as_str(), s.vcc.to_bits(), drive))
            .or_insert_with(|| Arc::new(fam.levels(s.vcc, drive)));
        Some(lv.clone())
    };
    // one copy of each family id
    let mut family_ids: rustc_hash::FxHashMap<&str, FamilyId> = Default::default();

    // each pin's place in its net's lists, counted first so that every list is allocated
    // once at its length (a list grown by pushes holds room for four); a count is a byte
    // (a board has as many nets as pins), and a list of 255 or more grows from there
    let connector_family = |ci: usize| -> Option<&'n Family> {
        let reference = nl.components[ci].reference.as_str();
        let (_, fam) = opts
            .connector_families
            .iter()
            .find(|(r, _)| r == reference)?;
        rules.families.get(fam)
    };
    let mut counts: Vec<[u8; SLOT_LISTS]> = vec![[0; SLOT_LISTS]; n_nets];
    for (ci, c) in nl.components.iter().enumerate() {
        let part = &cl.parts[ci];
        let pull_part = part.kind == PartKind::Other && is_pull_part(c);
        let fed = part.kind == PartKind::Connector && connector_family(ci).is_some();
        for (pi, p) in c.pins.iter().enumerate() {
            let Connection::Net { net, .. } = p.connection else {
                continue;
            };
            let n = &mut counts[net as usize];
            match pin_slot(part.kind, pull_part, roles[ci][pi]) {
                Slot::Connector => {
                    count(&mut n[Slot::Connector as usize]);
                    if fed {
                        count(&mut n[Slot::Driver as usize]);
                    }
                }
                Slot::DriverAndLoad => {
                    count(&mut n[Slot::Driver as usize]);
                    count(&mut n[Slot::Load as usize]);
                }
                Slot::Power | Slot::Unknown => {}
                slot => count(&mut n[slot as usize]),
            }
        }
    }
    for (nm, n) in nets.iter_mut().zip(&counts) {
        let list = |slot: Slot| usize::from(n[slot as usize]);
        nm.drivers = InPlace1::with_capacity(list(Slot::Driver));
        nm.loads = InPlace2::with_capacity(list(Slot::Load));
        nm.connectors = ThinVec::with_capacity(list(Slot::Connector));
        nm.passives = ThinVec::with_capacity(list(Slot::Passive));
    }
    drop(counts);
    // parts with the same figures and family share one entry, told by their addresses
    let mut part_logic = PerPartBuilder::with_capacity(nl.components.len());
    // (net, part) of each one-pin pull-up or pull-down part, in part order, found on the way
    // (held once the resistors are): no walk over every part of its own
    let mut pull_parts: Vec<(u32, u32)> = Vec::new();
    for (ci, c) in nl.components.iter().enumerate() {
        let part = &cl.parts[ci];
        let mut logic = PartLogic {
            levels: None,
            family: part.family.as_deref().map(|f| {
                family_ids
                    .entry(f)
                    .or_insert_with(|| FamilyId::new(f))
                    .clone()
            }),
        };
        let one_pin_pull = is_pull_part(c);
        if one_pin_pull {
            if let Some(net) = c.pins[0].connection.net() {
                pull_parts.push((small(net), small(ci)));
            }
        }
        let pull_part = part.kind == PartKind::Other && one_pin_pull;
        // a connector's pins driven by a configured family take that family's figures at its
        // nominal supply; any other part's figures at its supply are looked up once, when a
        // pin of it is the first to drive or load a net
        let fed = match part.kind {
            PartKind::Connector => connector_family(ci),
            _ => None,
        };
        if let Some(f) = fed {
            logic.levels = Some(Arc::new(f.levels(f.supply_nominal, Drive::Standard)));
            logic.family = Some(FamilyId::new(f.id.as_str()));
        }
        let ttl = families[ci].is_some_and(|f| !f.is_cmos_input());
        let mut looked_up = false;
        for (pi, p) in c.pins.iter().enumerate() {
            let Connection::Net { net, .. } = p.connection else {
                continue;
            };
            let net = net as usize;
            let at = PinRef::new(ci, pi);
            let role = roles[ci][pi];
            let symbol_only = part.role_source[pi] != RoleSource::Table;
            let nm = &mut nets[net];
            let slot = pin_slot(part.kind, pull_part, role);
            let load = || Load {
                at,
                role,
                ttl,
                one_unit: part.input_loads[pi].is_none(),
            };
            if matches!(slot, Slot::Load | Slot::Driver | Slot::DriverAndLoad) && !looked_up {
                looked_up = true;
                logic.levels = levels(ci);
            }
            match slot {
                Slot::Connector => {
                    nm.connectors.push(at);
                    if fed.is_some() {
                        nm.drivers.push(Driver {
                            at,
                            role: PinRole::PushPull,
                            symbol_only: false,
                        });
                    }
                }
                Slot::Passive => nm.passives.push(at),
                Slot::Load => nm.loads.push(load()),
                Slot::Driver => nm.drivers.push(Driver {
                    at,
                    role,
                    symbol_only,
                }),
                Slot::DriverAndLoad => {
                    nm.drivers.push(Driver {
                        at,
                        role,
                        symbol_only,
                    });
                    nm.loads.push(load());
                }
                Slot::Power => {}
                Slot::Unknown => nm.extras_mut().unknown.push(at),
            }
        }
        let key = (
            logic.levels.as_ref().map(Arc::as_ptr),
            logic.family.as_ref().map(|f| Arc::as_ptr(&f.0)),
        );
        part_logic.push(key, || logic);
    }
    let part_logic = part_logic.finish();

    let mut readings = ValueReadings::default();
    // (net, resistor) for each resistor to a rail whose value cannot be read, in the order
    // found; put in net order once all are found
    let mut unreadable: Vec<(u32, u32)> = Vec::new();
    // resistors: to a rail a pull (or a hold, when the rail's voltage is unknown), between
    // two signal nets a series element
    for (ci, c) in nl.components.iter().enumerate() {
        let part = &cl.parts[ci];
        if !matches!(part.kind, PartKind::Resistor | PartKind::ResistorNetwork) {
            continue;
        }
        let (ohms, err) = match readings.read(part.kind, c.value_str()) {
            Some(Ok(ohms)) => (Some(*ohms), None),
            Some(Err(e)) => (None, Some(e)),
            None => (None, None),
        };
        if matches!(err, Some(ValueError::NotFitted(_))) {
            continue; // not on the board
        }
        for ((pa, na), (pb, nb)) in resistor_elements(nl, c, part.kind, &RailsOf(&nets[..])) {
            if na == nb {
                continue;
            }
            for ((p_here, n_here), n_other) in [((pa, na), nb), ((pb, nb), na)] {
                if nets[n_here].rail().is_some() {
                    continue;
                }
                let at = PinRef::new(ci, p_here);
                let Some(r) = nets[n_other].rail() else {
                    nets[n_here].extras_mut().series.push(SeriesLink {
                        part: ci,
                        at,
                        other_net: n_other,
                        ohms,
                    });
                    continue;
                };
                match (ohms, err) {
                    (Some(o), _) => match r.v() {
                        Some(v) => nets[n_here].extras_mut().pulls.push(Pull {
                            resistor: ci,
                            at,
                            rail_net: n_other,
                            rail_volts: v,
                            ohms: o,
                            up: v > 0.0,
                        }),
                        None => nets[n_here].extras_mut().held.push(ci),
                    },
                    (None, Some(_)) => {
                        unreadable.push((small(n_here), small(ci)));
                        nets[n_here].set_flag(HAS_UNREADABLE, true);
                    }
                    _ => {}
                }
            }
        }
    }
    // one-pin pull-up and pull-down parts (simulation and sketch libraries)
    for (net, ci) in pull_parts {
        nets[net as usize].extras_mut().held.push(ci as usize);
    }
    // sheet-local nets share their last names (`/cell7/CLK`): each is read once
    let mut rail_named: rustc_hash::FxHashMap<&str, bool> = Default::default();
    for (i, net) in nl.nets.iter().enumerate() {
        let name = net.name.as_str();
        let local = name.trim_start_matches('/').contains('/');
        if local && nets[i].rail().is_none() {
            let last = name.rsplit('/').next().unwrap_or("");
            let named = *rail_named
                .entry(last)
                .or_insert_with(|| rails::rail_from_name(last).is_some());
            nets[i].set_flag(RAIL_NAMED_LOCAL, named);
        }
    }
    // inductors and ferrite beads: series elements of no resistance to speak of
    for (ci, c) in nl.components.iter().enumerate() {
        if cl.parts[ci].kind != PartKind::Inductor || c.pins.len() != 2 {
            continue;
        }
        let (Some(na), Some(nb)) = (c.pins[0].connection.net(), c.pins[1].connection.net()) else {
            continue;
        };
        if na == nb {
            continue;
        }
        for (pi, here, other) in [(0, na, nb), (1, nb, na)] {
            if nets[here].rail().is_none() {
                nets[here].extras_mut().series.push(SeriesLink {
                    part: ci,
                    at: PinRef::new(ci, pi),
                    other_net: other,
                    ohms: Some(0.0),
                });
            }
        }
    }
    // switches and jumpers: each element joins two nets in some positions only
    for (ci, c) in nl.components.iter().enumerate() {
        if cl.parts[ci].kind != PartKind::Switch {
            continue;
        }
        for (pa, pb) in switch_elements(nl, c) {
            let (Some(na), Some(nb)) = (c.pins[pa].connection.net(), c.pins[pb].connection.net())
            else {
                continue;
            };
            if na == nb {
                continue;
            }
            for (pi, here, other) in [(pa, na, nb), (pb, nb, na)] {
                nets[here].extras_mut().switches.push(SwitchLink {
                    part: ci,
                    at: PinRef::new(ci, pi),
                    other_net: other,
                });
            }
        }
    }
    settle_sources(&mut nets);

    // LED paths: net -> (R | LED)* -> ground, at most eight parts deep; a display's segment
    // leads to its common
    let displays = display::find(nl, cl);
    for net in 0..n_nets {
        if nets[net].drivers.is_empty() {
            continue;
        }
        let mut found = ThinVec::new();
        let mut sinks = ThinVec::new();
        for &start in &nets[net].passives {
            let kind = cl.parts[start.comp()].kind;
            if !matches!(kind, PartKind::Resistor | PartKind::Led | PartKind::Display) {
                continue;
            }
            if let Some(path) = follow_to_ground(
                nl,
                cl,
                &RailsOf(&nets[..]),
                &displays,
                &mut readings,
                start,
                opts.led_vf,
            ) {
                if path.leds.is_empty() {
                    continue;
                }
                if path.rail_volts == 0.0 {
                    found.push(path);
                } else if path.rail_volts > 0.0 && leds_point_to(nl, &path, start, true) {
                    // an LED, lamp or relay from the supply: the output sinks it when low
                    sinks.push(path);
                }
            }
        }
        if !found.is_empty() || !sinks.is_empty() {
            let e = nets[net].extras_mut();
            e.led_paths = found;
            e.sink_paths = sinks;
        }
    }
    rail_notes.retain(|n| n.by_usage || n.volts.is_some());
    for nm in &mut nets {
        nm.fit();
    }
    // stable: each net's resistors stay in the order found
    unreadable.sort_by_key(|&(net, _)| net);
    unreadable.shrink_to_fit();

    Circuit {
        nl,
        cl,
        rules,
        opts,
        supplies,
        nets,
        roles,
        rail_notes,
        displays,
        values: readings,
        unreadable,
        families,
        part_logic,
    }
}

/// Each part's family's table entry: looked up once per distinct family text (parts alike
/// share one), so the model and the checks never look a family up by its name again.
fn part_families<'n>(cl: &Classified, rules: &'n Rules) -> PerPart<Option<&'n Family>> {
    let mut last: Option<(&str, Option<&'n Family>)> = None;
    let mut table = PerPartBuilder::with_capacity(cl.parts.len());
    for part in &cl.parts {
        let f = part.family.as_deref().and_then(|id| match last {
            Some((l, f)) if l == id => f,
            _ => {
                let f = rules.families.get(id);
                last = Some((id, f));
                f
            }
        });
        // told by the entry's address: one family is one entry of the table
        table.push(f.map(std::ptr::from_ref), || f);
    }
    table.finish()
}

/// A one-pin part that stands for a pull-up or pull-down (`PULLUP`, `rpullup`, `pull_down`).
fn is_pull_part(c: &crate::netlist::Component<'_>) -> bool {
    if c.pins.len() != 1 {
        return false;
    }
    let says = |t: &str| {
        let t = t.to_ascii_lowercase().replace(['_', '-', ' '], "");
        t.contains("pullup") || t.contains("pulldown")
    };
    let symbol = c
        .libsource
        .as_ref()
        .and_then(|l| l.part.as_ref())
        .map_or("", |p| p.as_str());
    says(c.value_str()) || says(symbol)
}

/// The elements of a resistor or network as pairs of (pin, net): a two-pin resistor; a
/// bussed network (one common pin: the symbol says `R_Network`, or exactly one pin is on a
/// rail) as one element per other pin; an isolated network (`R_Pack`, `R_Array`) as pins i
/// and N+1-i.
fn resistor_elements(
    nl: &Netlist<'_>,
    c: &crate::netlist::Component<'_>,
    kind: PartKind,
    rail: &RailsOf<&[NetModel]>,
) -> Vec<((usize, usize), (usize, usize))> {
    // a rail net may hold nothing but this resistor (a `-5V` label with one pull-down): its
    // one-node net still counts when it is a rail
    let pin_nets: Vec<(usize, usize)> = c
        .pins
        .iter()
        .enumerate()
        .filter_map(|(pi, p)| match p.connection {
            Connection::Net { net, .. } => Some((pi, net as usize)),
            Connection::Alone { net, .. } if rail.get(net as usize).is_some() => {
                Some((pi, net as usize))
            }
            _ => None,
        })
        .collect();
    let mut elements = Vec::new();
    if kind == PartKind::Resistor || c.pins.len() == 2 {
        if pin_nets.len() == 2 {
            elements.push((pin_nets[0], pin_nets[1]));
        }
        return elements;
    }
    let symbol = c
        .libsource
        .as_ref()
        .and_then(|l| l.part.as_ref())
        .map_or(String::new(), |p| p.as_str().to_ascii_lowercase());
    let bussed_symbol = symbol.starts_with("r_network");
    let isolated_symbol = symbol.starts_with("r_pack") || symbol.starts_with("r_array");
    let on_rail: Vec<&(usize, usize)> = pin_nets
        .iter()
        .filter(|(_, n)| rail.get(*n).is_some())
        .collect();
    let common = if bussed_symbol {
        // the common pin is pin 1 on the usual SIP networks
        pin_nets
            .iter()
            .find(|(pi, _)| c.pins[*pi].num(nl) == "1")
            .or_else(|| on_rail.first().copied())
            .copied()
    } else if !isolated_symbol && on_rail.len() == 1 {
        Some(*on_rail[0])
    } else {
        None
    };
    match common {
        Some(common) => {
            for &pn in &pin_nets {
                if pn != common {
                    elements.push((pn, common));
                }
            }
        }
        None => {
            let mut order: Vec<usize> = (0..c.pins.len()).collect();
            order.sort_by_key(|&i| pin_number_key(c.pins[i].num(nl)));
            let n = order.len();
            for k in 0..n / 2 {
                let (a, b) = (order[k], order[n - 1 - k]);
                let na = pin_nets.iter().find(|(q, _)| *q == a);
                let nb = pin_nets.iter().find(|(q, _)| *q == b);
                if let (Some(&x), Some(&y)) = (na, nb) {
                    elements.push((x, y));
                }
            }
        }
    }
    elements
}

/// Sorts pin numbers as numbers where they are (`2` before `10`).
fn pin_number_key(num: &str) -> (u64, String) {
    (num.parse::<u64>().unwrap_or(u64::MAX), num.to_string())
}

/// The elements of a switch or jumper, as pin index pairs: a two-pin switch one element; a
/// three-pin switch or jumper (1-2 or 2-3) two elements sharing the middle pin; a DIP switch
/// or shunt with an even count of pins, pins i and N+1-i.
fn switch_elements(nl: &Netlist<'_>, c: &crate::netlist::Component<'_>) -> Vec<(usize, usize)> {
    let mut order: Vec<usize> = (0..c.pins.len()).collect();
    order.sort_by_key(|&i| pin_number_key(c.pins[i].num(nl)));
    match order.len() {
        0 | 1 => Vec::new(),
        2 => vec![(order[0], order[1])],
        3 => vec![(order[0], order[1]), (order[1], order[2])],
        n if n % 2 == 0 => (0..n / 2).map(|k| (order[k], order[n - 1 - k])).collect(),
        _ => Vec::new(),
    }
}

/// Which nets have something to set their level: on the net itself, through a series element
/// from a net that has (repeated until nothing changes), or through two or more switch
/// elements from nets that have (a selector: every position drives it). A net held only
/// through one switch element floats when that switch is open.
fn settle_sources(nets: &mut [NetModel]) {
    for nm in nets.iter_mut() {
        if nm.own_source() {
            nm.set_source(Some(Source::Own));
        }
    }
    loop {
        let mut changed = false;
        for i in 0..nets.len() {
            if nets[i].source().is_some() {
                continue;
            }
            let through = nets[i]
                .series()
                .iter()
                .position(|l| nets[l.other_net].source().is_some());
            if let Some(l) = through {
                let l = u32::try_from(l).expect("fewer than 2^32 series links on a net");
                nets[i].set_source(Some(Source::Through(l)));
                changed = true;
                continue;
            }
            // two positions of one switch or jumper that each join a net with a source:
            // the net is set in every position the part is made for
            let links: Vec<&SwitchLink> = nets[i]
                .switches()
                .iter()
                .filter(|l| nets[l.other_net].source().is_some())
                .collect();
            let selector = links
                .iter()
                .any(|a| links.iter().filter(|b| b.part == a.part).count() >= 2);
            if selector {
                nets[i].set_source(Some(Source::Selector));
                changed = true;
            }
        }
        if !changed {
            break;
        }
    }
    // the nets each net feeds through series elements, followed to the end of the chain
    let direct: Vec<Option<(usize, u32)>> = nets
        .iter()
        .map(|nm| match nm.source() {
            Some(Source::Through(l)) => {
                let l = &nm.series()[l as usize];
                Some((l.other_net, small(l.part)))
            }
            _ => None,
        })
        .collect();
    for (m, d) in direct.iter().enumerate() {
        let Some((mut up, part)) = *d else { continue };
        // walk up to the net with a source of its own; every net on the way feeds m
        for _ in 0..nets.len() {
            nets[up].extras_mut().feeds.push((small(m), part));
            match direct[up] {
                Some((next, _)) => up = next,
                None => break,
            }
        }
    }
    for i in 0..nets.len() {
        if nets[i].source().is_some() {
            continue;
        }
        let links: ThinVec<SwitchLink> = nets[i]
            .switches()
            .iter()
            .filter(|l| nets[l.other_net].source().is_some())
            .copied()
            .collect();
        if !links.is_empty() {
            nets[i].extras_mut().floats_open = links;
        }
    }
}

/// Nets that are rails by their pins: supply pins (or ground pins) of the parts on them and
/// no output of a classified part. Then the voltage of every supply rail that states none:
/// a fixed regulator's output, or the one supply of the families it powers. Returns what was
/// inferred, for the info finding.
fn rails_by_usage(
    nl: &Netlist<'_>,
    cl: &Classified,
    families: &PerPart<Option<&Family>>,
    rail: &mut RailsOf<&mut [NetModel]>,
) -> Vec<RailNote> {
    let n_nets = nl.nets.len();
    let mut supply_pins = vec![0usize; n_nets];
    let mut ground_pins = vec![0usize; n_nets];
    let mut logic_pins = vec![0usize; n_nets];
    let mut outputs = vec![false; n_nets];
    let mut powered: Vec<Vec<usize>> = vec![Vec::new(); n_nets];
    for (ci, c) in nl.components.iter().enumerate() {
        let part = &cl.parts[ci];
        for (pi, p) in c.pins.iter().enumerate() {
            // a power output of a part that is not logic (a regulator, a supply symbol) makes
            // its net a rail of unknown voltage, unless something already did; the counts
            // below read no rail, so this is the same as a walk of its own before them
            if p.ptype() == crate::netlist::PinType::PowerOut && !part.is_logic() {
                if let Connection::Net { net, .. } = p.connection {
                    let net = net as usize;
                    if rail.get(net).is_none() {
                        rail.set(
                            net,
                            Some(Rail {
                                volts: None,
                                ground: false,
                                source: RailSource::PowerOutput,
                            }),
                        );
                    }
                }
            }
            let Some(net) = p.connection.net() else {
                continue;
            };
            let role = part.roles[pi];
            let from_table = part.role_source[pi] == RoleSource::Table;
            match role {
                PinRole::Supply => {
                    supply_pins[net] += 1;
                    if part.is_logic() {
                        powered[net].push(ci);
                    }
                }
                PinRole::Ground => ground_pins[net] += 1,
                r if r.is_output() && from_table => outputs[net] = true,
                r if r.is_input() && from_table => logic_pins[net] += 1,
                _ => {}
            }
        }
    }
    let mut notes = Vec::new();
    for net in 0..n_nets {
        if rail.get(net).is_some() || outputs[net] {
            continue;
        }
        // a pin alone on its net is wired to nothing, whatever its type (the count read
        // first: the name lies elsewhere in memory)
        if nl.nets[net].node_count() < 2 || {
            let name = nl.nets[net].name.as_str().as_bytes();
            name.len() >= 12 && name[..12].eq_ignore_ascii_case(b"unconnected-")
        } {
            continue;
        }
        let (s, g) = (supply_pins[net], ground_pins[net]);
        let enough = |k: usize| k >= 2 || (k == 1 && logic_pins[net] == 0);
        if g > 0 && s == 0 && enough(g) {
            rail.set(
                net,
                Some(Rail {
                    volts: Some(0.0),
                    ground: true,
                    source: RailSource::Usage,
                }),
            );
            notes.push(RailNote {
                net,
                volts: Some(0.0),
                why: None,
                by_usage: true,
                ground: true,
                power_pins: g,
            });
        } else if s > 0 && g == 0 && enough(s) {
            rail.set(
                net,
                Some(Rail {
                    volts: None,
                    ground: false,
                    source: RailSource::Usage,
                }),
            );
            notes.push(RailNote {
                net,
                volts: None,
                why: None,
                by_usage: true,
                ground: false,
                power_pins: s,
            });
        }
    }
    // voltages: a fixed regulator's output first, then the families powered
    // (each distinct value read once: boards repeat values)
    let mut regulators: rustc_hash::FxHashMap<&str, Option<(f64, &'static str)>> =
        Default::default();
    // parts alike share one classification, and their values are alike: what a part's value
    // says is kept by its classification too, so a board of many alike parts reads a value
    // once per kind of part, not once a part (each value lies elsewhere in memory)
    let mut regulator_of: rustc_hash::FxHashMap<
        *const crate::classify::classifier::PartClass,
        Option<(f64, &'static str)>,
    > = Default::default();
    for (ci, c) in nl.components.iter().enumerate() {
        // a logic part is no regulator: its value is not read again
        if cl.parts[ci].is_logic() {
            continue;
        }
        let Some((volts, out_pin)) = *regulator_of
            .entry(Arc::as_ptr(&cl.parts[ci]))
            .or_insert_with(|| {
                *regulators
                    .entry(c.value_str())
                    .or_insert_with(|| rails::fixed_regulator(c.value_str()))
            })
        else {
            continue;
        };
        let by_name = c.pins.iter().find(|p| {
            p.name(nl).is_some_and(|n| {
                let n = n.to_ascii_uppercase();
                matches!(n.as_str(), "VO" | "VOUT" | "OUT" | "OUTPUT" | "V_OUT")
            })
        });
        let pin = by_name.or_else(|| c.pins.iter().find(|p| p.num(nl) == out_pin));
        let Some(net) = pin.and_then(|p| p.connection.net()) else {
            continue;
        };
        if let Some(mut r) = rail.get(net) {
            if r.volts.is_none() && !r.ground {
                r.volts = Some(volts);
                rail.set(net, Some(r));
                note_for(&mut notes, net, volts, Inferred::Regulator { comp: ci });
            }
        } else {
            rail.set(
                net,
                Some(Rail {
                    volts: Some(volts),
                    ground: false,
                    source: RailSource::PowerOutput,
                }),
            );
            note_for(&mut notes, net, volts, Inferred::Regulator { comp: ci });
        }
    }
    for net in 0..n_nets {
        let Some(mut r) = rail.get(net) else {
            continue;
        };
        if r.volts.is_some() || r.ground || r.source == RailSource::User {
            continue;
        }
        let mut fams: Vec<String> = Vec::new();
        let mut single: Option<f64> = None;
        let mut agree = !powered[net].is_empty();
        for &ci in &powered[net] {
            let Some(f) = families[ci] else {
                continue;
            };
            // a family specified at one supply (4.5 to 5.5 V and the like)
            let one = f.supply_max - f.supply_min <= 1.0 + 1e-9;
            if !one {
                continue;
            }
            match single {
                None => single = Some(f.supply_nominal),
                Some(v) if (v - f.supply_nominal).abs() < 1e-9 => {}
                Some(_) => agree = false,
            }
            if !fams.contains(&f.id) {
                fams.push(f.id.clone());
            }
        }
        if let (true, Some(v)) = (agree, single) {
            r.volts = Some(v);
            rail.set(net, Some(r));
            let comps = powered[net].clone();
            note_for(
                &mut notes,
                net,
                v,
                Inferred::Families {
                    comps,
                    families: fams,
                },
            );
        }
    }
    notes
}

fn note_for(notes: &mut Vec<RailNote>, net: usize, volts: f64, why: Inferred) {
    match notes.iter_mut().find(|n| n.net == net) {
        Some(n) => {
            n.volts = Some(volts);
            n.why = Some(why);
        }
        None => notes.push(RailNote {
            net,
            volts: Some(volts),
            why: Some(why),
            by_usage: false,
            ground: false,
            power_pins: 0,
        }),
    }
}

/// Follows two-pin resistors and LEDs in series from `start` to a rail. A display entered at
/// a segment leads to its common: the path ends on the rail the common is wired to, or, for
/// a common cathode left open, on the ground it needs (`LedPath::open_common`).
fn follow_to_ground<'n>(
    nl: &'n Netlist<'_>,
    cl: &Classified,
    rail: &RailsOf<&[NetModel]>,
    displays: &[display::Display],
    readings: &mut ValueReadings<'n>,
    start: PinRef,
    vf: f64,
) -> Option<LedPath> {
    let mut leds = Vec::new();
    let mut resistors = Vec::new();
    let mut ohms = 0.0;
    let mut cur = start;
    let sum_vf = |leds: &[usize]| -> f64 {
        leds.iter()
            .map(|&l| {
                displays
                    .iter()
                    .find(|d| d.comp == l)
                    .map_or_else(|| led_vf_by_colour(nl.components[l].value_str()), |d| d.vf)
                    .unwrap_or(vf)
            })
            .sum()
    };
    // a resistor and up to seven LEDs: a longer string is not left out of the budget
    for _ in 0..8 {
        let c = &nl.components[cur.comp()];
        let kind = cl.parts[cur.comp()].kind;
        if kind == PartKind::Display {
            let d = displays.iter().find(|d| d.comp == cur.comp())?;
            if !d.is_segment(cur.pin()) {
                return None;
            }
            leds.push(cur.comp());
            if d.commons_open {
                // only a common cathode says where it belongs (ground) without the driver
                if d.common_anode != Some(false) {
                    return None;
                }
                let net = d
                    .commons
                    .iter()
                    .find_map(|&pi| c.pins[pi].connection.net())?;
                return Some(LedPath {
                    at: start,
                    vf: sum_vf(&leds),
                    leds,
                    resistors,
                    ohms,
                    rail_net: net,
                    rail_volts: 0.0,
                    open_common: Some(cur.comp()),
                });
            }
            let (net, v) = d.commons.iter().find_map(|&pi| {
                let n = c.pins[pi].connection.net()?;
                Some((n, rail.get(n)?.v()?))
            })?;
            // a common cathode on a positive rail, or a common anode on ground, never lights
            // from this side
            match d.common_anode {
                Some(false) if v > 0.0 => return None,
                Some(true) if v == 0.0 => return None,
                _ => {}
            }
            return Some(LedPath {
                at: start,
                vf: sum_vf(&leds),
                leds,
                resistors,
                ohms,
                rail_net: net,
                rail_volts: v,
                open_common: None,
            });
        }
        if c.pins.len() != 2 {
            return None;
        }
        match kind {
            PartKind::Resistor => {
                ohms += readings.read(kind, c.value_str())?.as_ref().ok()?;
                resistors.push(cur.comp());
            }
            PartKind::Led => leds.push(cur.comp()),
            _ => return None,
        }
        let other = 1 - cur.pin();
        let net = c.pins[other].connection.net()?;
        if let Some(r) = rail.get(net) {
            return Some(LedPath {
                at: start,
                vf: sum_vf(&leds),
                leds,
                resistors,
                ohms,
                rail_net: net,
                rail_volts: r.v()?,
                open_common: None,
            });
        }
        // the next part: exactly one other passive on a two-node net
        let nodes = nl.nets[net].nodes(nl);
        if nodes.len() != 2 {
            return None;
        }
        let next = nodes
            .iter()
            .find(|n| n.component() != Some(cur.comp() as u32))?;
        let ci = next.component()? as usize;
        let pi = nl.components[ci]
            .pins
            .iter()
            .position(|p| p.num(nl) == next.pin(nl))?;
        if component_kind_passive(cl.parts[ci].kind) {
            cur = PinRef::new(ci, pi);
        } else {
            return None;
        }
    }
    None
}

/// True unless a pin name says an LED on the path points the other way: for a path from a
/// rail down to the net (`from_rail`), each LED's cathode (`K`) faces the net. LEDs whose pins
/// are not named `A`/`K` are taken as drawn the right way round.
fn leds_point_to(nl: &Netlist<'_>, path: &LedPath, start: PinRef, from_rail: bool) -> bool {
    let _ = start;
    path.leds.iter().all(|&l| {
        let c = &nl.components[l];
        if c.pins.len() != 2 {
            return true; // a display: its common's side was judged on the way
        }
        let name = |i: usize| c.pins[i].name(nl).map(|n| n.to_ascii_uppercase());
        // the pin nearer the net is the one whose net is not the rail side: follow the chain
        // order is not kept, so judge by which pin is named K and which net it is on
        let k = (0..c.pins.len()).find(|&i| name(i).as_deref() == Some("K"));
        let a = (0..c.pins.len()).find(|&i| name(i).as_deref() == Some("A"));
        match (k, a) {
            (Some(k), Some(a)) => {
                // the anode is on the rail side: its net is the rail or further from the net
                let on_rail = c.pins[a].connection.net() == Some(path.rail_net);
                let k_on_rail = c.pins[k].connection.net() == Some(path.rail_net);
                if from_rail {
                    !k_on_rail || on_rail
                } else {
                    !on_rail || k_on_rail
                }
            }
            _ => true,
        }
    })
}

/// The forward voltage usually taken for an LED of the colour its value names (`GREEN`,
/// `LED_YEL`, `blue 3mm`): red 1.7 V, orange, amber and yellow 2.0 V, green 2.1 V, blue and
/// white 3.0 V, infrared 1.2 V (common practice: typical figures of indicator LEDs at about
/// 10 mA, from memory). `None` when the value names no colour: the configured figure applies.
pub fn led_vf_by_colour(value: &str) -> Option<f64> {
    let v = value.to_ascii_uppercase();
    let words: Vec<&str> = v
        .split(|c: char| !c.is_ascii_alphanumeric())
        .filter(|w| !w.is_empty())
        .collect();
    let has = |ws: &[&str]| words.iter().any(|w| ws.contains(w));
    if has(&["BLUE", "BLU", "WHITE", "WHT", "WH"]) {
        Some(3.0)
    } else if has(&["GREEN", "GRN", "GN"]) {
        Some(2.1)
    } else if has(&["YELLOW", "YEL", "YE", "AMBER", "AMB", "ORANGE", "ORG"]) {
        Some(2.0)
    } else if has(&["RED", "RD"]) {
        Some(1.7)
    } else if has(&["IR", "INFRARED"]) {
        Some(1.2)
    } else {
        None
    }
}

#[cfg(test)]
mod value_tests {
    use super::{values, PartKind, ValueReadings};

    /// A value is read once per text and kind, and reads as the value parsers read it.
    #[test]
    fn resistor_values_read_once_per_text_and_kind() {
        let mut r = ValueReadings::default();
        let ohms = |t: &str| values::parse_resistance(t).map(|x| x.ohms);
        assert_eq!(
            r.read(PartKind::Resistor, "4K7").cloned(),
            Some(ohms("4K7"))
        );
        assert_eq!(
            r.read(PartKind::Resistor, "4K7").cloned(),
            Some(ohms("4K7"))
        );
        assert_eq!(
            r.read(PartKind::Resistor, "4K7K").cloned(),
            Some(ohms("4K7K"))
        );
        assert!(matches!(r.get(PartKind::Resistor, "4K7K"), Some(Err(_))));
        assert_eq!(r.resistors.len(), 2);
        // only resistors and networks are read
        assert_eq!(r.read(PartKind::Capacitor, "4K7"), None);
        assert_eq!(r.get(PartKind::Capacitor, "4K7"), None);
        // a network's text is read as a network, apart from a resistor's of the same text
        assert_eq!(r.get(PartKind::ResistorNetwork, "4K7"), None);
        let net = values::parse_network("8x4K7").map(|x| x.ohms);
        assert_eq!(
            r.read(PartKind::ResistorNetwork, "8x4K7").cloned(),
            Some(net)
        );
        assert_eq!(r.get(PartKind::Resistor, "8x4K7"), None);
        assert_eq!(r.networks.len(), 1);
    }
}

#[cfg(test)]
mod led_tests {
    use super::led_vf_by_colour;

    #[test]
    fn colours_in_led_values() {
        // common practice (from memory): typical indicator-LED forward voltages
        assert_eq!(led_vf_by_colour("RED"), Some(1.7));
        assert_eq!(led_vf_by_colour("LED_GREEN"), Some(2.1));
        assert_eq!(led_vf_by_colour("yel 5mm"), Some(2.0));
        assert_eq!(led_vf_by_colour("BLUE"), Some(3.0));
        assert_eq!(led_vf_by_colour("GATE"), None);
        assert_eq!(led_vf_by_colour("LED"), None);
    }
}

#[cfg(test)]
mod size_tests {
    use std::mem::size_of;

    use super::budget::{DriverBudget, NetBudget};
    use super::NetModel;

    /// A board has about as many nets as it has pins, and the model keeps a `NetModel` and a
    /// `NetBudget` (with a `DriverBudget` per driver and two items per load) for each: their
    /// size is held here so it cannot regrow unnoticed (440, 176 and 408 bytes when their
    /// lists were `Vec`s and the rare parts were inline; 200, 56 and 216, with 72-byte items
    /// and 88-byte margins, before a series link became an index, an item lost its copies of
    /// what the model holds and the rare pull-up level was boxed; 160, 40 and 160, with a
    /// 72-byte margin kept per driver and load, 48-byte drivers and 80-byte loads, before the
    /// rarer lists moved into one boxed `NetExtras`, margins were worked out when asked, the
    /// low level was read from the low state, a family id became one word and a load's input
    /// limit was read from its part's family and supply; a part's supply was 48 bytes while
    /// its nets were `usize`s; a driver's budget was 144 bytes, with two boxed item lists,
    /// before it kept its numbers flat, its rare parts in one box and no items; 72 while each
    /// kept its own numbers, where drivers with the same numbers now share one copy).
    #[test]
    fn per_net_structures_stay_small() {
        use super::budget::{Item, LoadMargin};
        use super::{Driver, Load};
        // 88 with its drivers and loads in lists of their own; a net with one driver and two
        // loads then held two blocks of 48 bytes besides; 128 while its drivers and loads
        // were `SmallVec`s (24 and 32 bytes, where its own lists take 16 and 24); 112 while
        // it kept a list of its supply pins and its rail (24 bytes), source (8) and flags
        // apart
        assert!(size_of::<NetModel>() <= 80, "{}", size_of::<NetModel>());
        assert!(
            size_of::<super::in_place::InPlace1<Driver>>() <= 16,
            "{}",
            size_of::<super::in_place::InPlace1<Driver>>()
        );
        assert!(
            size_of::<super::in_place::InPlace2<Load>>() <= 24,
            "{}",
            size_of::<super::in_place::InPlace2<Load>>()
        );
        assert!(size_of::<NetBudget>() <= 24, "{}", size_of::<NetBudget>());
        assert!(
            size_of::<DriverBudget>() <= 24,
            "{}",
            size_of::<DriverBudget>()
        );
        assert!(size_of::<Item>() <= 32, "{}", size_of::<Item>());
        assert!(size_of::<LoadMargin>() <= 72, "{}", size_of::<LoadMargin>());
        // a pin is two u32s; a driver or load adds its role (and a flag), its part's data is
        // read from the circuit's per-part table
        assert!(
            size_of::<super::PinRef>() <= 8,
            "{}",
            size_of::<super::PinRef>()
        );
        assert!(size_of::<Driver>() <= 12, "{}", size_of::<Driver>());
        assert!(size_of::<Load>() <= 12, "{}", size_of::<Load>());
        assert!(
            size_of::<super::PartLogic>() <= 16,
            "{}",
            size_of::<super::PartLogic>()
        );
        // one per part
        assert!(
            size_of::<Option<super::PartSupply>>() <= 24,
            "{}",
            size_of::<Option<super::PartSupply>>()
        );
    }

    /// An empty list costs one pointer and no allocation; a filled one is trimmed to its
    /// length once the model is built.
    #[test]
    fn a_net_model_fits_its_lists() {
        let mut nm = NetModel::default();
        for i in 0..5 {
            nm.extras_mut().held.push(i);
        }
        nm.fit();
        let extras = nm
            .extras
            .as_ref()
            .expect("a net with a held list keeps its extras");
        assert_eq!(extras.held.capacity(), 5);
        assert_eq!(nm.held(), &[0, 1, 2, 3, 4]);
        assert_eq!(extras.pulls.capacity(), 0);
        // no driver: its list holds no block
        assert!(!nm.drivers.spilled());
        // extras left empty are dropped: a net without them costs one pointer
        let mut bare = NetModel::default();
        bare.extras_mut();
        bare.fit();
        assert!(bare.extras.is_none());
        assert!(bare.pulls().is_empty() && bare.series().is_empty());
    }
}

#[cfg(test)]
mod packed_tests {
    use super::{NetModel, Rail, RailSource, Source};

    /// A net's rail, source and flags are held in a few bits beside one number: each reads
    /// back as it was set, whatever was set before, and setting one leaves the others.
    #[test]
    fn a_net_s_rail_source_and_flags_read_back_as_set() {
        let sources = [
            RailSource::Name,
            RailSource::PowerOutput,
            RailSource::User,
            RailSource::Usage,
        ];
        let mut rails = vec![None];
        for volts in [
            None,
            Some(0.0),
            Some(5.0),
            Some(-12.0),
            Some(3.3),
            Some(f64::NAN),
        ] {
            for ground in [false, true] {
                for source in sources {
                    rails.push(Some(Rail {
                        volts,
                        ground,
                        source,
                    }));
                }
            }
        }
        let net_sources = [
            None,
            Some(Source::Own),
            Some(Source::Through(0)),
            Some(Source::Through(7)),
            Some(Source::Through(u32::MAX)),
            Some(Source::Selector),
        ];
        // a `Rail` with a NaN voltage equals no other: compare the bits
        let same = |a: Option<Rail>, b: Option<Rail>| match (a, b) {
            (None, None) => true,
            (Some(a), Some(b)) => {
                a.volts.map(f64::to_bits) == b.volts.map(f64::to_bits)
                    && a.ground == b.ground
                    && a.source == b.source
            }
            _ => false,
        };
        let mut nm = NetModel::default();
        assert!(nm.rail().is_none() && nm.source().is_none());
        assert!(!nm.rail_named_local() && !nm.has_unreadable());
        for (k, &rail) in rails.iter().enumerate() {
            for (j, &source) in net_sources.iter().enumerate() {
                let (local, unreadable) = ((k + j) % 2 == 0, (k + j) % 3 == 0);
                nm.set_rail(rail);
                nm.set_source(source);
                nm.set_flag(super::RAIL_NAMED_LOCAL, local);
                nm.set_flag(super::HAS_UNREADABLE, unreadable);
                assert!(same(nm.rail(), rail), "{rail:?}");
                assert_eq!(nm.source(), source);
                assert_eq!(nm.rail_named_local(), local);
                assert_eq!(nm.has_unreadable(), unreadable);
                // a rail, a source or an unreadable resistor holds the net
                assert_eq!(
                    nm.has_source(),
                    rail.is_some() || source.is_some() || unreadable
                );
                // the rail set again leaves the source and the flags
                nm.set_rail(rails[(k + 1) % rails.len()]);
                assert_eq!(nm.source(), source);
                assert_eq!(nm.rail_named_local(), local);
                assert_eq!(nm.has_unreadable(), unreadable);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    /// Resistors to a rail whose values do not read are listed by the circuit, net by net in
    /// the order found (a resistor listed once for each of its elements on the net), each net
    /// marked; the reading each gives is its value's, and a net with only them holds no
    /// extras.
    #[test]
    fn each_net_lists_its_unreadable_resistors_in_order() {
        // values that do not read as resistances (IEC 60062: one multiplier letter): `4K7Q`,
        // `4K7K`; `4K7` reads
        const BOARD: &str = r#"(export (version "E")
  (components
    (comp (ref "U1") (value "74HC00") (libsource (lib "x") (part "74HC00")))
    (comp (ref "R1") (value "4K7Q") (libsource (lib "x") (part "R")))
    (comp (ref "R2") (value "4K7K") (libsource (lib "x") (part "R")))
    (comp (ref "R3") (value "4K7Q") (libsource (lib "x") (part "R")))
    (comp (ref "R4") (value "4K7") (libsource (lib "x") (part "R")))
    (comp (ref "R5") (value "4K7K") (libsource (lib "x") (part "R"))))
  (nets
    (net (code "1") (name "+5V") (node (ref "U1") (pin "14")) (node (ref "R1") (pin "2")) (node (ref "R2") (pin "2")) (node (ref "R3") (pin "2")) (node (ref "R4") (pin "2")))
    (net (code "2") (name "GND") (node (ref "U1") (pin "7")) (node (ref "R5") (pin "2")))
    (net (code "3") (name "/A") (node (ref "U1") (pin "1")) (node (ref "R3") (pin "1")) (node (ref "R4") (pin "1")))
    (net (code "4") (name "/B") (node (ref "U1") (pin "2")) (node (ref "R2") (pin "1")) (node (ref "R1") (pin "1")) (node (ref "R5") (pin "1")))
    (net (code "5") (name "/C") (node (ref "U1") (pin "3")) (node (ref "U1") (pin "4")))))
"#;
        let rules = crate::classify::classifier::Rules::builtin();
        let tree = crate::sexpr::parse(BOARD).expect("test board parses");
        let nl = crate::netlist::build(&tree).expect("test board builds");
        let cl = crate::classify::classifier::classify(&nl, &rules);
        let cx = super::build(&nl, &cl, &rules, Default::default());
        let net = |name: &str| nl.net_by_name(name).expect("net on the test board");
        let refs = |n: usize| -> Vec<&str> {
            cx.unreadable(n)
                .map(|c| nl.components[c].reference.as_str())
                .collect()
        };
        // in the order of the parts, whichever order the net's nodes are in
        assert_eq!(refs(net("/B")), ["R1", "R2", "R5"]);
        assert_eq!(refs(net("/A")), ["R3"]);
        for n in [net("/C"), net("+5V"), net("GND")] {
            assert!(refs(n).is_empty(), "{}", nl.nets[n].name.as_str());
            assert!(!cx.nets[n].has_unreadable());
        }
        for n in [net("/A"), net("/B")] {
            assert!(cx.nets[n].has_unreadable());
            // something holds the net: the checks do not call its inputs floating as well
            assert!(cx.nets[n].own_source());
            for c in cx.unreadable(n) {
                let value = nl.components[c].value_str();
                let want = crate::values::parse_resistance(value).map(|r| r.ohms);
                assert!(want.is_err(), "{value}");
                assert_eq!(cx.resistor_value(c), Some(&want));
            }
        }
        // /A's pull resistor R4 reads: a pull, in the net's extras; /B has nothing else
        assert_eq!(cx.nets[net("/A")].pulls().len(), 1);
        assert!(cx.nets[net("/B")].extras.is_none());
    }
}
