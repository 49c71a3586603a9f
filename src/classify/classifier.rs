//! From a netlist to a classified circuit: for every component, what kind of part it is,
//! its logic family and function where it is logic, how that was decided, and the role of
//! every pin.
//!
//! Precedence, strongest first: a component field (`Logic family`, optionally `Logic
//! function`); a project's explicit entry; a shipped explicit entry (`rules/parts.toml`);
//! the 74-series and 4000-series value patterns; the netlist's own pin types. Pin roles come
//! from the function table when the function is known, else from the netlist's pin types.

use std::sync::Arc;

use serde::Serialize;

use super::family::FamilyTable;
use super::function::{FunctionTable, Series};
use super::parts::{EntryKind, PartTable};
use super::pattern::{self, Suggestion, ValueMatch};
use super::PinRole;
use crate::netlist::{Component, Netlist, PinType};

/// The rule tables a run uses.
#[derive(Debug, Clone)]
pub struct Rules {
    pub families: FamilyTable,
    pub functions: FunctionTable,
    pub parts: PartTable,
    /// Where the tables came from, for reports ("shipped rules/families.toml", a project file).
    pub sources: Vec<String>,
    /// Families a project file defined: (id, file, line).
    pub project_families: Vec<(String, String, usize)>,
    /// Functions a project file defined: (series, id, file, line).
    pub project_functions: Vec<(Series, String, String, usize)>,
}

impl Rules {
    /// The shipped tables, decoded once per process on first use and never freed: a run
    /// with no project mapping files borrows them (settings hold a `Cow`), so neither a
    /// second decoding nor freeing them at exit is paid.
    pub fn shipped() -> &'static Rules {
        static SHIPPED: std::sync::OnceLock<Rules> = std::sync::OnceLock::new();
        SHIPPED.get_or_init(Rules::builtin)
    }

    /// The shipped tables, embedded in the binary.
    pub fn builtin() -> Rules {
        Rules {
            families: FamilyTable::builtin(),
            functions: FunctionTable::builtin(),
            parts: PartTable::builtin(),
            sources: vec![
                "shipped rules/families.toml".into(),
                "shipped rules/functions.toml".into(),
                "shipped rules/parts.toml".into(),
            ],
            project_families: Vec::new(),
            project_functions: Vec::new(),
        }
    }
}

/// How a component was classified.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Method {
    /// A `Logic family` field on the component.
    ComponentField,
    /// An explicit entry in a project's parts file.
    ProjectOverride,
    /// An explicit entry in the shipped `rules/parts.toml`.
    ShippedEntry,
    /// The 74-series or 4000-series value pattern.
    Pattern,
    /// Not classified; pin roles from the netlist's pin types.
    NetlistOnly,
    /// IC-like, and neither classified nor carrying usable pin types.
    NotClassified,
    /// Drawn as a function, not a part: the value names a logic function (`AND2`, `CNT`,
    /// `MUX2x7`) or, with no footprint, a cell (`CMPD`), and carries no part number, so no
    /// family can be found for it. Not counted among the IC-like parts; pin roles from the
    /// symbol's pin types.
    FunctionSymbol,
    /// Not an IC (resistor, capacitor, connector ...): classified by its reference.
    Reference,
}

impl Method {
    pub fn as_str(self) -> &'static str {
        match self {
            Method::ComponentField => "component field",
            Method::ProjectOverride => "project override",
            Method::ShippedEntry => "shipped entry",
            Method::Pattern => "pattern",
            Method::NetlistOnly => "netlist only",
            Method::NotClassified => "not classified",
            Method::FunctionSymbol => "function symbol",
            Method::Reference => "reference",
        }
    }
}

/// What a component is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum PartKind {
    Logic,
    /// IC-like but not a logic part (regulator, op-amp, timer).
    NotLogic,
    /// IC-like and unknown.
    UnknownIc,
    Resistor,
    ResistorNetwork,
    Capacitor,
    Led,
    /// An LED display (seven-segment digits, bar graphs): LEDs sharing common pins.
    Display,
    Diode,
    Connector,
    /// A switch, jumper or DIP shunt: joins its pins in some positions and not in others.
    Switch,
    /// An inductor or ferrite bead: a DC path of almost no resistance.
    Inductor,
    Other,
}

/// Where a pin's role came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum RoleSource {
    Table,
    Netlist,
    Unknown,
}

/// One component, classified.
#[derive(Debug, Clone)]
pub struct PartClass {
    pub kind: PartKind,
    pub method: Method,
    /// Family id (as in `rules/families.toml`).
    pub family: Option<String>,
    /// The function, when it is in the function table.
    pub function: Option<(Series, String)>,
    /// The function the value names, even when the table lacks it.
    pub named_function: Option<String>,
    /// What the value reads as, shared by every part of the run with the same value.
    pub value_match: Option<Arc<ValueMatch>>,
    /// Near misses, for an unclassified IC-like part.
    pub suggestions: Vec<Suggestion>,
    pub ic_like: bool,
    /// Its per-pin data (`part.roles[i]` and the like read through it: `PartClass` derefs to
    /// it), one copy shared by every part of the run alike.
    pub pins: Arc<PinTable>,
    /// Index of the explicit entry used, if any.
    pub entry: Option<usize>,
    /// When the symbol's own name (the library part) reads as another part than the value
    /// does: what it reads as. The value decides; this only records the disagreement.
    pub symbol_reads_as: Option<Box<SymbolReading>>,
}

/// A part's per-pin data, each list in the order of `Component::pins`. It follows from the
/// part's function, family and kind and its pins' numbers, types and names alone, so the parts
/// of a board that agree in these (most of them, on a board of many alike) share one copy.
#[derive(Debug, Clone, PartialEq)]
pub struct PinTable {
    /// Each pin's role (shared with the circuit's wired roles of a part whose wiring changes
    /// none of them).
    pub roles: Arc<[PinRole]>,
    pub role_source: Vec<RoleSource>,
    /// The function table's pin name and unit, per pin, shared by every part of the run that
    /// names the same text.
    pub table_names: Vec<Option<Arc<str>>>,
    pub units: Vec<Option<Arc<str>>>,
    /// For a three-state pin: indices (into the component's pins) of its enables.
    pub enables: Vec<Vec<usize>>,
    /// For an input the function table says draws more than one unit load in this part's
    /// family: the multiples of the family's (IIL, IIH) it draws.
    pub input_loads: Vec<Option<(f64, f64)>>,
    /// For an output the data sheet rates with some of the package's own inputs on it:
    /// indices (into the component's pins) of those inputs.
    pub rated_with: Vec<Vec<usize>>,
    /// For a control input the function table says must be held (`idle`): the level at which
    /// the part runs undisturbed, `Some(true)` for high (read through `Circuit::idle_level`).
    pub idle_high: Vec<Option<bool>>,
}

impl PinTable {
    /// `n` pins whose roles no source tells.
    pub fn unknown(n: usize) -> PinTable {
        PinTable {
            roles: vec![PinRole::Unknown; n].into(),
            role_source: vec![RoleSource::Unknown; n],
            table_names: vec![None; n],
            units: vec![None; n],
            enables: vec![Vec::new(); n],
            input_loads: vec![None; n],
            rated_with: vec![Vec::new(); n],
            idle_high: vec![None; n],
        }
    }
}

impl std::ops::Deref for PartClass {
    type Target = PinTable;

    fn deref(&self) -> &PinTable {
        &self.pins
    }
}

/// What a component's library part name reads as, when that differs from its value.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SymbolReading {
    /// The library part name (`Z80CPU`, `74LS00`).
    pub symbol: String,
    pub family: Option<String>,
    pub function: Option<String>,
}

impl PartClass {
    /// True when the part is logic and its family is known.
    pub fn is_logic(&self) -> bool {
        self.kind == PartKind::Logic && self.family.is_some()
    }
}

/// The whole board, classified.
#[derive(Debug, Clone)]
pub struct Classified {
    /// Each component's classification, by component index (read as `cl.parts[i].kind`). Parts
    /// alike share one: a board of many alike holds one pointer per part.
    pub parts: Vec<Arc<PartClass>>,
    /// (classified, IC-like): how many IC-like parts have a family or a known non-logic entry.
    pub coverage: (usize, usize),
    /// Parts drawn as a function with no part number (`Method::FunctionSymbol`), left out of
    /// the IC-like count.
    pub function_symbols: usize,
    /// Entries of project files that matched no component.
    pub unused_project_entries: Vec<usize>,
}

/// The reference's letter prefix: `U12` -> `U`, `RN3` -> `RN`, `IC4A` -> `IC`.
pub fn ref_prefix(reference: &str) -> &str {
    let end = reference
        .find(|c: char| !c.is_ascii_alphabetic())
        .unwrap_or(reference.len());
    &reference[..end]
}

/// What says a part is an LED display.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DisplayEvidence {
    /// Its value, library part, description or footprint names an LED display (`HDSP-A153`,
    /// `Display:CA56-12EWA`, `7SEGMENT`, "common cathode").
    Named,
    /// Only its pins say so: segment names (`a` to `g`) beside a common (`CA`, `CC`, `COM`).
    Pins,
}

/// Value prefixes of LED displays: digits and bar graphs of the usual makers' series.
const DISPLAY_PREFIXES: &[&str] = &[
    "hdsp-", "hdsp_", "lts-", "ltd-", "ltc-", "lta-", "sa52-", "sc52-", "sa56-", "sc56-", "sa39-",
    "sc39-", "sa08-", "sc08-", "sa10-", "sc10-", "ca56-", "cc56-", "dc56-", "dc10-", "tdsr",
    "tdsg", "tdsy", "tdcr", "tdcg", "hdsm-",
];

/// Tells an LED display from its value, library part, description, footprint or pins.
pub fn display_evidence(nl: &Netlist<'_>, c: &Component<'_>) -> Option<DisplayEvidence> {
    if c.pins.len() < 3 {
        return None;
    }
    let low = |t: Option<&str>| t.unwrap_or("").to_ascii_lowercase();
    let (lib, part, desc) = c.libsource.as_ref().map_or_else(
        || (String::new(), String::new(), String::new()),
        |l| {
            (
                low(l.lib.as_ref().map(|x| x.as_str())),
                low(l.part.as_ref().map(|x| x.as_str())),
                low(l.description.as_ref().map(|x| x.as_str())),
            )
        },
    );
    let value = c.value_str().to_ascii_lowercase();
    let fp = c
        .footprint
        .as_ref()
        .map_or(String::new(), |f| f.as_str().to_ascii_lowercase());
    let seg = |s: &str| {
        let s: String = s.chars().filter(|c| c.is_ascii_alphanumeric()).collect();
        s.contains("7seg") || s.contains("sevenseg") || s.contains("14seg") || s.contains("16seg")
    };
    let common = |s: &str| s.contains("common anode") || s.contains("common cathode");
    // a decoder or driver "for 7-segment displays" is logic, not a display
    let drives_one = ["decoder", "driver", "latch", "counter", "controller"]
        .iter()
        .any(|w| desc.contains(w) || part.contains(w));
    if drives_one || pattern::match_value(c.value_str()).is_some() {
        return None;
    }
    let named = [&value, &part]
        .iter()
        .any(|s| DISPLAY_PREFIXES.iter().any(|p| s.starts_with(p)) || seg(s))
        || seg(&desc)
        || common(&desc)
        || common(&part)
        || fp.starts_with("display_7segment")
        || (lib.starts_with("display") && (seg(&part) || common(&desc)));
    if named {
        return Some(DisplayEvidence::Named);
    }
    // the pins alone: at least seven of the segments a..g and a common (a display has a few
    // dozen pins at most)
    if c.pins.len() > 64 {
        return None;
    }
    let names: Vec<String> = c
        .pins
        .iter()
        .filter_map(|p| p.name(nl).map(|n| n.to_ascii_uppercase()))
        .collect();
    let segments = ["A", "B", "C", "D", "E", "F", "G"]
        .iter()
        .filter(|s| names.iter().any(|n| n == *s))
        .count();
    let commons = names.iter().any(|n| display_common_name(n).is_some());
    (segments == 7 && commons).then_some(DisplayEvidence::Pins)
}

/// A display's common pin by name: `Some(true)` for a common anode (`CA`, `CA1`, `+`),
/// `Some(false)` for a common cathode (`CC`, `K`, `CK`), `None` inside for a common whose
/// name does not say which (`COM`, `COMMON`). Returns `None` for a segment or other pin.
pub fn display_common_name(name: &str) -> Option<Option<bool>> {
    let n = name.trim().to_ascii_uppercase();
    let base = n.trim_end_matches(|c: char| c.is_ascii_digit());
    match base {
        "CA" | "COMA" | "ANODE" | "COMMONANODE" | "COM_A" => Some(Some(true)),
        "CC" | "CK" | "COMK" | "COMC" | "CATHODE" | "COMMONCATHODE" | "COM_K" | "COM_C" => {
            Some(Some(false))
        }
        "COM" | "COMMON" | "DIG" | "DIGIT" => Some(None),
        _ => None,
    }
}

/// What the symbol, its library and its footprint say the part is, before the reference
/// does: real boards name resistors `RG4`, `RIO2`, `RCPU1`, connectors `BUS1` or `U7`.
fn kind_by_symbol(nl: &Netlist<'_>, c: &Component<'_>) -> Option<PartKind> {
    let (lib, part) = c
        .libsource
        .as_ref()
        .map_or((String::new(), String::new()), |l| {
            (
                l.lib
                    .as_ref()
                    .map_or(String::new(), |x| x.as_str().to_ascii_lowercase()),
                l.part
                    .as_ref()
                    .map_or(String::new(), |x| x.as_str().to_ascii_lowercase()),
            )
        });
    let fp = c
        .footprint
        .as_ref()
        .map_or(String::new(), |f| f.as_str().to_ascii_lowercase());
    let (fp_lib, fp_name) = fp.split_once(':').unwrap_or(("", fp.as_str()));
    let value = c.value_str().to_ascii_lowercase();
    let n = c.pins.len();
    let words = |s: &str, w: &[&str]| w.iter().any(|x| s.contains(x));
    // switches and jumpers first: a DIP shunt is often drawn with a resistor-pack symbol
    if words(
        &part,
        &["jumper", "sw_", "switch", "sw_dip", "solderjumper"],
    ) || part == "sw"
        || words(&value, &["jumper", "switch", "shunt", "dip-sw", "dipsw"])
        || fp_lib.starts_with("button_switch")
        || fp_lib.starts_with("jumper")
    {
        return Some(PartKind::Switch);
    }
    let resistor_part = matches!(
        part.as_str(),
        "r" | "r_small" | "r_us" | "r_small_us" | "resistor" | "r_pot" | "r_pot_small"
    ) || part.starts_with("r_pack")
        || part.starts_with("r_network")
        || part.starts_with("r_array")
        || part.starts_with("resistor_");
    let resistor_fp = fp_lib.starts_with("resistor")
        || fp_name.starts_with("r_array")
        || fp_name.starts_with("r_axial")
        || fp_name.starts_with("r_pack")
        || fp_name.starts_with("r_0")
        || fp_name.starts_with("r_1")
        || fp_name.starts_with("r_2");
    if resistor_part || (resistor_fp && !part.starts_with("conn")) {
        return Some(if n <= 2 {
            PartKind::Resistor
        } else {
            PartKind::ResistorNetwork
        });
    }
    if part.starts_with("ferritebead")
        || part == "l"
        || part == "l_small"
        || part.starts_with("inductor")
        || fp_lib.starts_with("inductor")
    {
        return Some(PartKind::Inductor);
    }
    if display_evidence(nl, c).is_some() {
        return Some(PartKind::Display);
    }
    let connector_part = part.starts_with("conn")
        || lib.starts_with("connector")
        || lib == "conn"
        || part.starts_with("bus_")
        || part.contains("edge_connector")
        || part.contains("header");
    let connector_fp = fp_lib.starts_with("connector")
        || fp_lib.starts_with("pin_header")
        || fp_name.contains("pinheader")
        || fp_name.contains("pin_header")
        || fp_name.contains("pinsocket")
        || fp_name.contains("idc")
        || fp_name.contains("dsub")
        || fp_name.contains("edge")
        || fp_name.contains("bus_");
    if connector_part || (connector_fp && !fp_name.contains("dip")) {
        // a 2- or 3-pin header whose value says what it selects is a jumper
        let selects = n <= 3
            && (value.contains('|')
                || words(
                    &value,
                    &["jumper", "link", "select", "enable", "pull", "strap"],
                ));
        return Some(if selects {
            PartKind::Switch
        } else {
            PartKind::Connector
        });
    }
    None
}

fn kind_by_reference(nl: &Netlist<'_>, c: &Component<'_>) -> PartKind {
    if let Some(k) = kind_by_symbol(nl, c) {
        return k;
    }
    let p = ref_prefix(c.reference.as_str()).to_ascii_uppercase();
    let value = c.value_str().to_ascii_uppercase();
    let lib = c
        .libsource
        .as_ref()
        .and_then(|l| l.part.as_ref())
        .map_or(String::new(), |p| p.as_str().to_ascii_uppercase());
    match p.as_str() {
        "R" | "VR" if c.pins.len() <= 2 => PartKind::Resistor,
        "R" | "RN" | "RP" | "RR" | "RA" | "RM" => PartKind::ResistorNetwork,
        "C" => PartKind::Capacitor,
        "LED" | "DS" => PartKind::Led,
        "D" if value.contains("LED") || lib.contains("LED") => PartKind::Led,
        "D" => PartKind::Diode,
        "JP" | "SW" | "S" => PartKind::Switch,
        "FB" | "L" if c.pins.len() == 2 => PartKind::Inductor,
        "J" | "P" | "CN" | "CON" | "CONN" | "X" | "XS" | "XP" | "K" | "H" | "TP" | "BUS"
        | "SLOT" => PartKind::Connector,
        "U" | "IC" | "Z" | "Q" if p != "Q" => PartKind::UnknownIc,
        _ => {
            let many = c.pins.len() > 4;
            let logicish = pattern::match_value(c.value_str()).is_some()
                || value.starts_with("74")
                || value.contains("40");
            // a part whose symbol types pins as outputs or supplies is an active part,
            // whatever its reference (`CPU1`, `VRAM1`, `1J1`, a module `A1`)
            let active = c.pins.len() >= 3
                && c.pins.iter().any(|p| {
                    matches!(
                        p.ptype(),
                        PinType::Output
                            | PinType::TriState
                            | PinType::Bidirectional
                            | PinType::OpenCollector
                            | PinType::OpenEmitter
                            | PinType::PowerIn
                    )
                });
            if (many && logicish) || active {
                PartKind::UnknownIc
            } else {
                PartKind::Other
            }
        }
    }
}

/// False when the entry names a function whose package has fewer pins than the component
/// numbers (an `MK4116x8` symbol that draws eight DRAMs in one is not a 16-pin 4116).
fn fits_package(
    nl: &Netlist<'_>,
    c: &Component<'_>,
    e: &super::parts::PartEntry,
    rules: &Rules,
) -> bool {
    let Some(f) = e
        .function
        .as_ref()
        .and_then(|id| rules.functions.get(e.series, id))
    else {
        return true;
    };
    c.pins
        .iter()
        .filter_map(|p| p.num(nl).trim().parse::<u32>().ok())
        .all(|n| n <= f.package_pins)
}

/// A connector whose reference says it is a socket or header (`J`, `P`, `CN` ...): its value
/// may name the part that plugs into it (`68000_SOCKET`), but it is not that part. `X` is left
/// out: oscillator cans and crystals are often `X1`.
fn socket_like(c: &Component<'_>, kind: PartKind) -> bool {
    kind == PartKind::Connector && !ref_prefix(c.reference.as_str()).eq_ignore_ascii_case("X")
}

fn role_from_netlist(t: PinType, name: Option<&str>) -> (PinRole, RoleSource) {
    let r = match t {
        PinType::Input => PinRole::Input,
        PinType::Output => PinRole::PushPull,
        PinType::Bidirectional => PinRole::Bidirectional,
        PinType::TriState => PinRole::ThreeState,
        PinType::Passive => PinRole::Passive,
        PinType::OpenCollector => PinRole::OpenCollector,
        PinType::OpenEmitter => PinRole::OpenEmitter,
        PinType::NoConnect => PinRole::NoConnect,
        PinType::PowerIn | PinType::PowerOut => {
            if name.is_some_and(is_ground_name) {
                PinRole::Ground
            } else {
                PinRole::Supply
            }
        }
        PinType::Unspecified | PinType::Free | PinType::Unknown => {
            return (PinRole::Unknown, RoleSource::Unknown)
        }
    };
    (r, RoleSource::Netlist)
}

/// A pin name that is a memory's or peripheral's control input by convention (JEDEC
/// memory pinouts: chip enable, output enable, write enable, chip select), with or without
/// an active-low mark: `CE`, `CEn`, `~{OE}`, `/WE`, `CS#`, `OE_N`.
pub fn is_enable_input_name(name: &str) -> bool {
    let n = name
        .trim()
        .trim_start_matches(['~', '/', '!', '{'])
        .trim_end_matches(['}', '#', '*'])
        .to_ascii_uppercase();
    let n = n.trim_start_matches("~{").trim_end_matches('}');
    let n = n
        .strip_suffix("_N")
        .or_else(|| n.strip_suffix("_B"))
        .or_else(|| n.strip_suffix('N').filter(|b| b.len() >= 2))
        .unwrap_or(n);
    let n = n.trim_end_matches(|c: char| c.is_ascii_digit());
    matches!(n, "CE" | "OE" | "WE" | "CS" | "PGM")
}

/// A pin or net name that means ground: GND, GNDD, AGND, DGND, 0V, VSS, VEE ...
pub fn is_ground_name(name: &str) -> bool {
    is_ground_name_upper(&name.to_ascii_uppercase())
}

/// [`is_ground_name`] for a name already in capitals (no copy made).
pub fn is_ground_name_upper(name: &str) -> bool {
    let n = name.trim_start_matches('/');
    n.starts_with("GND")
        || n.ends_with("GND")
        || n == "0V"
        || n.starts_with("VSS")
        || n.starts_with("VEE")
        || n == "V-"
        || n == "COM"
}

fn map_series(s: &pattern::Series) -> Series {
    match s {
        pattern::Series::S74 => Series::S74,
        pattern::Series::S4000 => Series::S4000,
    }
}

/// Reads a `Logic function` field: `00`, `74:00`, `4011`, `4000:4011`, `other:osc-dip14`.
fn parse_function_field(s: &str) -> (Series, String) {
    let s = s.trim();
    if let Some((series, id)) = s.split_once(':') {
        let series = match series.trim() {
            "74" => Series::S74,
            "4000" => Series::S4000,
            _ => Series::Other,
        };
        return (series, id.trim().to_string());
    }
    let digits = s.chars().all(|c| c.is_ascii_digit());
    if digits && s.len() >= 4 && (s.starts_with("40") || s.starts_with("45")) {
        (Series::S4000, s.to_string())
    } else if digits {
        (Series::S74, s.to_string())
    } else {
        (Series::Other, s.to_string())
    }
}

/// Classifies every component of a netlist.
pub fn classify(nl: &Netlist<'_>, rules: &Rules) -> Classified {
    let mut parts: Vec<Arc<PartClass>> = Vec::with_capacity(nl.components.len());
    let mut used_entries = vec![false; rules.parts.entries.len()];
    let (mut classified, mut ic_like, mut function_symbols) = (0, 0, 0);
    // many parts share a value: each distinct value meets the entries' globs and the value
    // patterns once
    let mut entry_of: rustc_hash::FxHashMap<&str, Vec<usize>> = Default::default();
    let mut pattern_of: rustc_hash::FxHashMap<&str, Option<Arc<ValueMatch>>> = Default::default();
    let mut near_of: rustc_hash::FxHashMap<&str, Vec<Suggestion>> = Default::default();
    // the tables' pin names and units, one shared copy of each text per run
    let mut shared: rustc_hash::FxHashMap<String, Arc<str>> = Default::default();
    let mut share = |text: &str| -> Arc<str> {
        if let Some(a) = shared.get(text) {
            return a.clone();
        }
        let a: Arc<str> = Arc::from(text);
        shared.insert(text.to_owned(), a.clone());
        a
    };
    let mut match_value = |value| {
        pattern_of
            .entry(value)
            .or_insert_with(|| pattern::match_value(value).map(Arc::new))
            .clone()
    };
    // near misses against the part table, by value and highest pin number (many parts share
    // both; the pin number decides which entries fit the package)
    let mut table_slips: std::collections::HashMap<(String, u32), Vec<pattern::Suggestion>> =
        std::collections::HashMap::new();
    // the pin tables made so far, by the hash of what they follow from
    let mut pin_tables: rustc_hash::FxHashMap<u64, Vec<SeenPins>> = Default::default();
    // parts alike classify alike: each distinct part is classified once, the others copy it
    let mut alike = Alike::new(nl);
    for (i, c) in nl.components.iter().enumerate() {
        if let Some(first) = alike.first_of(i, c) {
            let part = parts[first].clone();
            if part.ic_like {
                ic_like += 1;
                if matches!(part.kind, PartKind::Logic | PartKind::NotLogic) {
                    classified += 1;
                }
            }
            if part.method == Method::FunctionSymbol {
                function_symbols += 1;
            }
            parts.push(part);
            continue;
        }
        let mut kind = kind_by_reference(nl, c);
        let mut method = Method::Reference;
        let mut family = None;
        let mut function = None;
        let mut named_function = None;
        let mut value_match = None;
        let mut suggestions = Vec::new();
        let mut entry = None;
        let value = c.value_str();

        let field_family = c
            .field("Logic family")
            .and_then(|f| f.value.as_ref())
            .map(|v| v.as_str().to_string());
        let field_function = c
            .field("Logic function")
            .and_then(|f| f.value.as_ref())
            .map(|v| v.as_str().to_string());
        let ic = matches!(kind, PartKind::UnknownIc) || field_family.is_some();
        if let Some(ff) = field_family {
            kind = PartKind::Logic;
            method = Method::ComponentField;
            family = rules.families.get(&ff).map(|f| f.id.clone()).or(Some(ff));
            let m = match_value(value);
            let (series, id) = match (&field_function, &m) {
                (Some(f), _) => parse_function_field(f),
                (None, Some(m)) => (map_series(&m.series), m.function.clone()),
                (None, None) => (Series::Other, String::new()),
            };
            if !id.is_empty() {
                named_function = Some(id.clone());
                if rules.functions.get(series, &id).is_some() {
                    function = Some((series, id));
                }
            }
            value_match = m;
        } else if let Some((i, e)) = (ic || (c.pins.len() > 2 && !socket_like(c, kind)))
            .then(|| {
                entry_of
                    .entry(value)
                    .or_insert_with(|| rules.parts.matching(value).map(|(i, _)| i).collect())
                    .iter()
                    .map(|&i| (i, &rules.parts.entries[i]))
                    .find(|(_, e)| fits_package(nl, c, e, rules))
            })
            .flatten()
        {
            used_entries[i] = true;
            entry = Some(i);
            method = if e.shipped {
                Method::ShippedEntry
            } else {
                Method::ProjectOverride
            };
            match e.kind {
                EntryKind::NotLogic => kind = PartKind::NotLogic,
                EntryKind::Display => kind = PartKind::Display,
                EntryKind::Logic => {
                    kind = PartKind::Logic;
                    family = e.family.as_ref().map(|f| {
                        rules
                            .families
                            .get(f)
                            .map_or(f.to_string(), |x| x.id.clone())
                    });
                    if let Some(id) = &e.function {
                        named_function = Some(id.to_string());
                        if rules.functions.get(e.series, id).is_some() {
                            function = Some((e.series, id.to_string()));
                        }
                    }
                }
            }
        } else if let Some(m) = match_value(value).filter(|_| {
            !matches!(
                kind,
                PartKind::Resistor
                    | PartKind::ResistorNetwork
                    | PartKind::Capacitor
                    | PartKind::Connector
                    | PartKind::Led
                    | PartKind::Display
                    | PartKind::Diode
                    | PartKind::Switch
                    | PartKind::Inductor
            )
        }) {
            kind = PartKind::Logic;
            method = Method::Pattern;
            family = Some(m.family.clone());
            let series = map_series(&m.series);
            named_function = Some(m.function.clone());
            if rules
                .functions
                .get(series, &m.function)
                .is_some_and(|f| f.available_in(&m.family) || f.families.is_none())
            {
                function = Some((series, m.function.clone()));
            }
            value_match = Some(m);
        } else if ic && is_function_symbol(value, c.footprint.is_some()) {
            kind = PartKind::UnknownIc;
            method = Method::FunctionSymbol;
            function_symbols += 1;
        } else if ic {
            kind = PartKind::UnknownIc;
            let known =
                |s: &pattern::Series, f: &str| rules.functions.get(map_series(s), f).is_some();
            suggestions = near_of
                .entry(value)
                .or_insert_with(|| pattern::near_misses(value, &known, 3))
                .clone();
            if suggestions.is_empty() {
                let highest = c
                    .pins
                    .iter()
                    .filter_map(|p| p.num(nl).trim().parse::<u32>().ok())
                    .max()
                    .unwrap_or(0);
                suggestions = table_slips
                    .entry((value.to_string(), highest))
                    .or_insert_with(|| table_near_misses(nl, value, c, rules))
                    .clone();
            }
            method = if c.pins.iter().any(|p| {
                !matches!(
                    p.ptype(),
                    PinType::Unknown | PinType::Unspecified | PinType::Passive
                )
            }) {
                Method::NetlistOnly
            } else {
                Method::NotClassified
            };
        }
        // a display is LEDs in a package, not an IC, whatever its reference
        let is_ic = method != Method::FunctionSymbol
            && kind != PartKind::Display
            && (ic
                || matches!(
                    kind,
                    PartKind::Logic | PartKind::NotLogic | PartKind::UnknownIc
                ));
        if is_ic {
            ic_like += 1;
            if matches!(kind, PartKind::Logic | PartKind::NotLogic) {
                classified += 1;
            }
        }

        // pin roles: parts alike share one table
        let passive_kind = matches!(
            kind,
            PartKind::Resistor
                | PartKind::ResistorNetwork
                | PartKind::Capacitor
                | PartKind::Led
                | PartKind::Display
                | PartKind::Diode
                | PartKind::Connector
                | PartKind::Switch
                | PartKind::Inductor
        );
        let key = pin_table_key(nl, c, function.as_ref(), family.as_deref(), passive_kind);
        let alike = pin_tables.get(&key).and_then(|seen| {
            seen.iter().find(|t| {
                t.passive_kind == passive_kind
                    && t.function == function
                    && t.family == family
                    && same_pins(nl, &nl.components[t.comp].pins, &c.pins)
            })
        });
        let pins = match alike {
            Some(t) => t.table.clone(),
            None => {
                let table = Arc::new(pin_table(
                    nl,
                    c,
                    function.as_ref(),
                    family.as_deref(),
                    passive_kind,
                    rules,
                    &mut share,
                ));
                pin_tables.entry(key).or_default().push(SeenPins {
                    comp: parts.len(),
                    function: function.clone(),
                    family: family.clone(),
                    passive_kind,
                    table: table.clone(),
                });
                table
            }
        };
        let symbol_reads_as = match method {
            Method::Pattern | Method::ShippedEntry | Method::ProjectOverride => {
                symbol_reading(nl, c, rules, family.as_deref(), named_function.as_deref())
                    .map(Box::new)
            }
            _ => None,
        };
        parts.push(Arc::new(PartClass {
            symbol_reads_as,
            kind,
            method,
            family,
            function,
            named_function,
            value_match,
            suggestions,
            ic_like: is_ic,
            pins,
            entry,
        }));
    }
    let unused_project_entries = rules
        .parts
        .entries
        .iter()
        .enumerate()
        .filter(|(i, e)| !e.shipped && !used_entries[*i])
        .map(|(i, _)| i)
        .collect();
    Classified {
        parts,
        coverage: (classified, ic_like),
        function_symbols,
        unused_project_entries,
    }
}

/// Components by what their classification follows from: the letters of the reference, the
/// value, footprint and library symbol (library, part, description), the logic family and
/// function fields, and the pins' numbers, types and names, in order. Two components equal in
/// these classify alike: [`Alike::first_of`] gives the first one of each kind.
///
/// A component's key is written out as bytes (each text with its length, so no two keys
/// run together), hashed in one piece and compared in full when the hashes agree; only each
/// kind's first key is kept. The hash is keyed afresh for every run (std's `RandomState`:
/// SipHash with random keys), and so is the table of pin texts, so a crafted file cannot
/// choose components whose keys collide to make the look-ups quadratic. A pin enters the key
/// as its type and one number, its (number, name) texts' number in a table of the distinct
/// pairs: the texts of a library pin that names its pin are numbered once for all the pins
/// drawn from it (parts alike are drawn from the same library pins), the others (a pin named
/// by its node, a pin only the nets have) are looked up each time.
struct Alike<'c, 'a> {
    nl: &'c Netlist<'a>,
    state: std::hash::RandomState,
    /// Per library pin ([`crate::netlist::CompPin::lib_pin_number`]): its texts' number,
    /// [`Alike::UNSET`] before it is met, [`Alike::FROM_NODE`] when its name is its node's.
    lib_texts: Vec<u32>,
    /// The distinct (number, name) texts of pins, numbered in the order met.
    pin_texts: std::collections::HashMap<(&'c str, Option<&'c str>), u32, std::hash::RandomState>,
    /// Each kind's first component: (hash, kind).
    table: hashbrown::HashTable<(u64, u32)>,
    /// Each kind's first component and where its key lies in `keys`.
    kinds: Vec<(u32, std::ops::Range<usize>)>,
    /// The kinds' keys, one after the other.
    keys: Vec<u8>,
    /// The key of the component being looked up.
    buf: Vec<u8>,
}

/// Writes an optional text into a key: a mark, then its length and its bytes.
fn put_text(key: &mut Vec<u8>, t: Option<&str>) {
    match t {
        None => key.push(0),
        Some(t) => {
            key.push(1);
            key.extend_from_slice(&(t.len() as u32).to_le_bytes());
            key.extend_from_slice(t.as_bytes());
        }
    }
}

/// The text of an optional item.
fn text<'t>(t: &'t Option<crate::netlist::Text<'_>>) -> Option<&'t str> {
    t.as_ref().map(|t| t.as_str())
}

impl<'c, 'a> Alike<'c, 'a> {
    const UNSET: u32 = u32::MAX;
    const FROM_NODE: u32 = u32::MAX - 1;

    fn new(nl: &'c Netlist<'a>) -> Alike<'c, 'a> {
        Alike {
            nl,
            state: std::hash::RandomState::new(),
            lib_texts: vec![Self::UNSET; nl.lib_pin_count()],
            pin_texts: std::collections::HashMap::with_hasher(std::hash::RandomState::new()),
            table: hashbrown::HashTable::new(),
            kinds: Vec::new(),
            keys: Vec::new(),
            buf: Vec::new(),
        }
    }

    /// The number of the texts (number, name) of pin `p`.
    fn texts_of(&mut self, p: &crate::netlist::CompPin) -> u32 {
        let nl = self.nl;
        let lib = p.lib_pin_number();
        if let Some(g) = lib {
            let t = self.lib_texts[g as usize];
            if t < Self::FROM_NODE {
                return t;
            }
        }
        let next = self.pin_texts.len() as u32;
        let t = *self
            .pin_texts
            .entry((p.num(nl), p.name(nl)))
            .or_insert(next);
        if let Some(g) = lib {
            if self.lib_texts[g as usize] == Self::UNSET {
                // the texts are the library pin's own only when it names the pin
                self.lib_texts[g as usize] = if nl.lib_pin(g).name.is_some() {
                    t
                } else {
                    Self::FROM_NODE
                };
            }
        }
        t
    }

    /// The first component alike component `i` (`c`) in the order given, or `None` when `c`
    /// is the first of its kind (it is then remembered as such).
    fn first_of(&mut self, i: usize, c: &'c Component<'a>) -> Option<usize> {
        use std::hash::{BuildHasher, Hasher};
        let field = |name| {
            c.field(name)
                .and_then(|f| f.value.as_ref())
                .map(|v| v.as_str())
        };
        let mut key = std::mem::take(&mut self.buf);
        key.clear();
        put_text(&mut key, Some(ref_prefix(c.reference.as_str())));
        put_text(&mut key, Some(c.value_str()));
        put_text(&mut key, text(&c.footprint));
        match &c.libsource {
            None => key.push(0),
            Some(l) => {
                key.push(1);
                put_text(&mut key, text(&l.lib));
                put_text(&mut key, text(&l.part));
                put_text(&mut key, text(&l.description));
            }
        }
        put_text(&mut key, field("Logic family"));
        put_text(&mut key, field("Logic function"));
        key.extend_from_slice(&(c.pins.len() as u32).to_le_bytes());
        for p in &c.pins {
            let t = self.texts_of(p);
            key.extend_from_slice(&t.to_le_bytes());
            key.push(p.ptype() as u8);
        }
        let mut hasher = self.state.build_hasher();
        hasher.write(&key);
        let h = hasher.finish();
        let (kinds, keys) = (&self.kinds, &self.keys);
        let found = self.table.find(h, |&(kh, k)| {
            kh == h && keys[kinds[k as usize].1.clone()] == key[..]
        });
        let first = match found {
            Some(&(_, k)) => Some(self.kinds[k as usize].0 as usize),
            None => {
                let at = self.keys.len();
                self.keys.extend_from_slice(&key);
                let k = self.kinds.len() as u32;
                self.kinds.push((i as u32, at..self.keys.len()));
                self.table.insert_unique(h, (h, k), |&(kh, _)| kh);
                None
            }
        };
        self.buf = key;
        first
    }
}

/// A part whose pin table is kept for the parts alike that follow: what the table follows
/// from, and the table.
struct SeenPins {
    /// The component whose pins it was made from.
    comp: usize,
    function: Option<(Series, String)>,
    family: Option<String>,
    passive_kind: bool,
    table: Arc<PinTable>,
}

/// The hash of what a part's pin table follows from.
fn pin_table_key(
    nl: &Netlist<'_>,
    c: &Component<'_>,
    function: Option<&(Series, String)>,
    family: Option<&str>,
    passive_kind: bool,
) -> u64 {
    use std::hash::{Hash, Hasher};
    let mut h = rustc_hash::FxHasher::default();
    (function, family, passive_kind, c.pins.len()).hash(&mut h);
    for p in &c.pins {
        (p.num(nl), p.ptype(), p.name(nl)).hash(&mut h);
    }
    h.finish()
}

/// True when two parts' pins agree in number, type and name, in order.
fn same_pins(
    nl: &Netlist<'_>,
    a: &[crate::netlist::CompPin],
    b: &[crate::netlist::CompPin],
) -> bool {
    a.len() == b.len()
        && a.iter()
            .zip(b)
            .all(|(x, y)| x.ptype() == y.ptype() && x.same_texts(y, nl))
}

/// A part's per-pin data: from the function table for a pin the table has, else from the
/// netlist's pin type (every pin of a passive part is passive).
fn pin_table(
    nl: &Netlist<'_>,
    c: &Component<'_>,
    function: Option<&(Series, String)>,
    family: Option<&str>,
    passive_kind: bool,
    rules: &Rules,
    share: &mut impl FnMut(&str) -> Arc<str>,
) -> PinTable {
    let n = c.pins.len();
    let mut roles = Vec::with_capacity(n);
    let mut role_source = Vec::with_capacity(n);
    let mut table_names = vec![None; n];
    let mut units = vec![None; n];
    let mut enables = vec![Vec::new(); n];
    let mut input_loads = vec![None; n];
    let mut rated_with = vec![Vec::new(); n];
    let mut idle_high = vec![None; n];
    let func = function.and_then(|(s, id)| rules.functions.get(*s, id));
    let fam = family.unwrap_or_default();
    for (i, p) in c.pins.iter().enumerate() {
        let def = func.and_then(|f| f.pin(p.num(nl)));
        match (def, func) {
            (Some(d), Some(f)) => {
                roles.push(f.role_for_family(p.num(nl), fam).unwrap_or(d.role));
                role_source.push(RoleSource::Table);
                table_names[i] = Some(share(&d.name));
                units[i] = d.unit.as_deref().map(&mut *share);
                input_loads[i] = f.load_for_family(p.num(nl), fam);
                idle_high[i] = d.idle_high;
                rated_with[i] = d
                    .rated_with
                    .iter()
                    .filter_map(|e| c.pins.iter().position(|q| q.num(nl) == e.as_str()))
                    .collect();
                enables[i] = d
                    .enable
                    .iter()
                    .filter_map(|e| c.pins.iter().position(|q| q.num(nl) == e.as_str()))
                    .collect();
            }
            _ => {
                if passive_kind {
                    roles.push(PinRole::Passive);
                    role_source.push(RoleSource::Netlist);
                } else {
                    let (mut r, s) = role_from_netlist(p.ptype(), p.name(nl));
                    // a memory's chip, output or write enable is an input whatever
                    // the symbol types it
                    if r.is_output() && p.name(nl).is_some_and(is_enable_input_name) {
                        r = PinRole::Input;
                    }
                    roles.push(r);
                    role_source.push(s);
                }
            }
        }
    }
    PinTable {
        roles: roles.into(),
        role_source,
        table_names,
        units,
        enables,
        input_loads,
        rated_with,
        idle_high,
    }
}

/// What the component's library part name reads as (by the same patterns and part table the
/// value goes through), when it reads as a part and that part differs from the value's in
/// family or function; for a 74 or 4000 symbol on a 74 or 4000 value, in function only.
/// Symbols named for no part (`Conn_01x04`, `R`) read as nothing.
fn symbol_reading(
    nl: &Netlist<'_>,
    c: &Component<'_>,
    rules: &Rules,
    family: Option<&str>,
    function: Option<&str>,
) -> Option<SymbolReading> {
    let symbol = c.libsource.as_ref()?.part.as_ref()?.as_str().trim();
    if symbol.is_empty() || symbol.eq_ignore_ascii_case(c.value_str().trim()) {
        return None;
    }
    let (f, fun) = if let Some((_, e)) = rules
        .parts
        .find(symbol)
        .filter(|(_, e)| fits_package(nl, c, e, rules))
    {
        (
            e.family.as_ref().map(|f| {
                rules
                    .families
                    .get(f)
                    .map_or(f.to_string(), |x| x.id.clone())
            }),
            e.function.as_ref().map(|f| f.to_string()),
        )
    } else if let Some(m) = pattern::match_value(symbol) {
        // a 74 or 4000 symbol stands for its function: libraries draw one symbol per function
        // and name it for one family (`74LS00` placed as a 74HCT00), so only another function
        // is a disagreement (common practice)
        if pattern::match_value(c.value_str()).is_some() && function == Some(m.function.as_str()) {
            return None;
        }
        (Some(m.family), Some(m.function))
    } else {
        return None;
    };
    (f.as_deref() != family || fun.as_deref() != function).then(|| SymbolReading {
        symbol: symbol.to_string(),
        family: f,
        function: fun,
    })
}

/// Values one slip away from `value` that an entry of the part table (a processor, a memory,
/// a peripheral) takes, for a value no table took: `Z8OA` (letter O) reads as a Z80A, `4l64`
/// as a 4164 DRAM. One-slip readings first; two confusions only when they give the one reading.
fn table_near_misses(
    nl: &Netlist<'_>,
    value: &str,
    c: &Component<'_>,
    rules: &Rules,
) -> Vec<pattern::Suggestion> {
    let mut single = Vec::new();
    let mut double = Vec::new();
    for (cand, change, slips) in pattern::slips(value) {
        let Some((_, e)) = rules
            .parts
            .find(&cand)
            .filter(|(_, e)| fits_package(nl, c, e, rules))
        else {
            continue;
        };
        let what = match (&e.function, &e.family) {
            (Some(f), Some(fam)) => format!("{f} ({fam})"),
            (Some(f), None) => f.to_string(),
            (None, Some(fam)) => format!("a {fam} part"),
            (None, None) => "a listed part".to_string(),
        };
        let list = if slips == 1 { &mut single } else { &mut double };
        if !list.iter().any(|s: &pattern::Suggestion| s.value == cand) {
            list.push(pattern::Suggestion {
                value: cand,
                matched: None,
                reads_as: what,
                change,
            });
        }
    }
    if single.is_empty() && double.len() == 1 {
        single = double;
    }
    single.truncate(3);
    single
}

/// Generic words a schematic uses to draw a logic function without naming a part.
const FUNCTION_WORDS: &[&str] = &[
    "AND",
    "NAND",
    "OR",
    "NOR",
    "XOR",
    "XNOR",
    "NOT",
    "INV",
    "INVERTER",
    "BUF",
    "BUFFER",
    "DFF",
    "JKFF",
    "TFF",
    "SRFF",
    "FF",
    "SR",
    "RS",
    "LATCH",
    "MUX",
    "DEMUX",
    "CNT",
    "COUNTER",
    "DEC",
    "DECODE",
    "DECODER",
    "ENCODER",
    "REG",
    "REGISTER",
    "SHIFT",
    "SHIFTREG",
    "ADDER",
    "GATE",
    "CMP",
    "COMPARATOR",
];

/// Whether an unmatched IC-like part is drawn as a function rather than named as a part: its
/// value has no part number (no run of three digits or more, no spaces or punctuation) and is
/// either a generic function word (`AND`, `4AND`, `NOR3`, `DFFN`, `MUX2x10`, `decode_3_bit`,
/// `NOT_OC`) or, on a symbol with no footprint, a short cell name of letters and at most
/// single digits (`CMPD`, `LD3R`).
pub fn is_function_symbol(value: &str, has_footprint: bool) -> bool {
    let v = value.trim();
    if v.is_empty() || v == "~" || !v.chars().all(|c| c.is_ascii_alphanumeric() || c == '_') {
        return false;
    }
    let mut run = 0;
    let mut longest = 0;
    for c in v.chars() {
        run = if c.is_ascii_digit() { run + 1 } else { 0 };
        longest = longest.max(run);
    }
    if longest >= 3 {
        return false;
    }
    let upper = v.to_ascii_uppercase();
    // a leading count (`4AND`: a 4-input AND)
    let body = upper.trim_start_matches(|c: char| c.is_ascii_digit());
    // what follows an underscore names a variant (`NOT_OC`, `decode_3_bit`)
    let head = body.split('_').next().unwrap_or("");
    let word_end = head
        .find(|c: char| !c.is_ascii_alphabetic())
        .unwrap_or(head.len());
    let (word, rest) = head.split_at(word_end);
    // what may follow the word: input counts and widths (`3`, `2X7`)
    let rest_ok = rest.chars().all(|c| c.is_ascii_digit() || c == 'X');
    let known = |w: &str| FUNCTION_WORDS.contains(&w);
    // one letter of variant (`DFFN`, `DFFR`, `CMPD`) on a word of three letters or more
    let variant = word.len() >= 4 && {
        let stem = &word[..word.len() - 1];
        stem.len() >= 3 && known(stem)
    };
    if rest_ok && (known(word) || variant) {
        return true;
    }
    // a library cell with no footprint and no part number
    !has_footprint && longest < 2 && v.len() <= 8 && !v.contains('_')
}

#[cfg(test)]
mod tests {
    use super::is_function_symbol;

    /// Parts that differ only in their reference's number classify alike and are classified
    /// once; any other difference (reference letters, value, a logic field, a pin) makes a
    /// part of its own.
    #[test]
    fn parts_alike_classify_once_and_alike() {
        let text = r#"(export (version D)
  (components
    (comp (ref U1) (value 74HC00) (libsource (lib x) (part 74HC00)))
    (comp (ref U2) (value 74HC00) (libsource (lib x) (part 74HC00)))
    (comp (ref IC3) (value 74HC00) (libsource (lib x) (part 74HC00)))
    (comp (ref U4) (value 74HCT00) (libsource (lib x) (part 74HC00)))
    (comp (ref U5) (value 74HC00) (libsource (lib x) (part 74HC00))
      (fields (field (name "Logic family") 74AC)))
    (comp (ref U6) (value 74HC00) (libsource (lib y) (part 74HC00))))
  (libparts
    (libpart (lib x) (part 74HC00)
      (pins (pin (num 1) (name 1A) (type input)) (pin (num 3) (name 1Y) (type output))
        (pin (num 7) (name GND) (type power_in)) (pin (num 14) (name VCC) (type power_in))))
    (libpart (lib y) (part 74HC00)
      (pins (pin (num 1) (name A) (type input)) (pin (num 3) (name 1Y) (type output))
        (pin (num 7) (name GND) (type power_in)) (pin (num 14) (name VCC) (type power_in)))))
  (nets))"#;
        let nl = crate::netlist::read(text).expect("reads");
        assert_eq!(nl.components.len(), 6);
        let c = &nl.components;
        let mut alike = super::Alike::new(&nl);
        assert_eq!(alike.first_of(0, &c[0]), None);
        assert_eq!(alike.first_of(1, &c[1]), Some(0));
        for (i, why) in [
            (2, "reference letters"),
            (3, "value"),
            (4, "logic family field"),
            (5, "library and pin name"),
        ] {
            assert_eq!(alike.first_of(i, &c[i]), None, "{why}");
            // and is remembered as the first of its kind
            assert_eq!(alike.first_of(i + 10, &c[i]), Some(i), "{why}");
        }
        let rules = super::Rules::shipped();
        let cl = super::classify(&nl, rules);
        assert_eq!(format!("{:?}", cl.parts[0]), format!("{:?}", cl.parts[1]));
        // the copy shares the first one's pin table
        assert!(std::sync::Arc::ptr_eq(&cl.parts[0].pins, &cl.parts[1].pins));
        assert_eq!(cl.parts[0].family.as_deref(), Some("74HC"));
        assert_eq!(cl.parts[3].family.as_deref(), Some("74HCT"));
        assert_eq!(cl.parts[4].family.as_deref(), Some("74AC"));
        // every part counts, copied or not
        assert_eq!(cl.coverage, (6, 6));
    }

    /// One `PartClass` per component: its size is held here so it cannot regrow unnoticed
    /// (496 bytes when its per-pin lists and value reading were its own copies).
    #[test]
    fn a_part_class_stays_small() {
        let size = std::mem::size_of::<super::PartClass>();
        assert!(size <= 152, "{size}");
    }

    #[test]
    fn values_that_draw_a_function() {
        // generic function words, with input counts, widths, variants and suffixes
        for v in [
            "AND",
            "4AND",
            "NOR3",
            "OR6",
            "XOR",
            "DFF",
            "DFFN",
            "SR",
            "MUX",
            "MUX2x10",
            "CNT",
            "decode_3_bit",
            "NOT_OC",
            "BUF",
            "CMPD",
        ] {
            assert!(is_function_symbol(v, true), "{v} with a footprint");
            assert!(is_function_symbol(v, false), "{v} without a footprint");
        }
        // a short cell name is a function only when there is no footprint either
        for v in ["LD3R", "FAINB", "ULA"] {
            assert!(is_function_symbol(v, false), "{v} without a footprint");
            assert!(!is_function_symbol(v, true), "{v} with a footprint");
        }
    }

    #[test]
    fn values_that_name_a_part() {
        // part numbers (three digits or more), transcription slips that keep their digits,
        // empty values, values with spaces or punctuation, and words that only start like a
        // function word
        for v in [
            "74LSOO",
            "SN74LSOO",
            "NE555",
            "MK4116x8",
            "Z80",
            "V9938/V9958",
            "Flash ROM",
            "~",
            "",
            "ORANGE",
            "ANDROID",
            "Arduino_Nano_v3.x",
        ] {
            assert!(!is_function_symbol(v, true), "{v} with a footprint");
        }
        for v in [
            "74LSOO",
            "Z80",
            "8T26",
            "Flash ROM",
            "~",
            "MOS_7360_TED",
            "Relay_5V",
        ] {
            assert!(!is_function_symbol(v, false), "{v} without a footprint");
        }
    }
}

#[cfg(test)]
mod display_tests {
    use super::display_common_name;

    #[test]
    fn common_pins_by_name() {
        // KiCad's display symbols name a common cathode CC, a common anode CA (common practice)
        assert_eq!(display_common_name("CC"), Some(Some(false)));
        assert_eq!(display_common_name("CA2"), Some(Some(true)));
        assert_eq!(display_common_name("com"), Some(None));
        assert_eq!(display_common_name("DIG3"), Some(None));
        // segments and the decimal point are not commons
        for seg in ["a", "B", "g", "DP", "C", "K1"] {
            assert_eq!(display_common_name(seg), None, "{seg}");
        }
    }
}
