//! The function table: for each logic function ("00", "74", "4011" ...) the package pins
//! with their roles, names, units and, for three-state outputs, the enables that control them.
//!
//! The built-in table is `rules/functions.toml`, embedded in the binary; a project may load
//! its own file of the same form and [`FunctionTable::merge`] it over the built-in one.
//!
//! File form (our own design, unknown keys are rejected):
//!
//! ```toml
//! [[function]]
//! id = "00"                 # number after the family letters; 4000-series use "4011"
//! summary = "quad 2-input NAND"
//! series = "74"             # "74" or "4000"
//! package_pins = 14         # DIP pin count
//! drive = "buffer"          # optional, "standard" (default) or "buffer"
//! families = ["74HC"]       # optional: the function exists only in these families
//! source = "where the pinout was checked"
//! pins = [ { pin = 1, name = "1A", role = "input", unit = "A" }, ... ]
//! variants = [ { families = ["74HC"], outputs = "push-pull" } ]
//! ```
//!
//! A function may copy another's pins with `like = "00"` (then `pins` is omitted, and
//! `package_pins` may be too; `like_series = "4000"` copies from the other series); `outputs = "open-collector"` then turns the copied push-pull
//! outputs into that role (the 7403 is a 7400 with open-collector outputs). A three-state or
//! bidirectional pin names its enables: `enable = [1], enable_active = "low"`. A control input
//! that must be held (a processor's `~WAIT`, `~INT`, `~RESET`) says where: `idle = "high"`. `unit = "common"`
//! (or no unit) marks a pin shared by the whole device.
//!
//! An input that draws more than the family's input current (a flip-flop's clear, a
//! counter's clock) says how much, per family, as a multiple of the family's IIL and IIH:
//! `loads = { "74LS" = 2.0, "74" = { low = 2.0, high = 3.0 } }` (one number: the same
//! multiple in both states). A family not listed draws one unit load. An output whose
//! rating the data sheet tests with one of the package's own inputs on it says which:
//! `rated_with = [1]` (a counter's QA, tested at IOL plus its second clock's IIL).

use std::borrow::Cow;
use std::collections::HashSet;
use std::ops::Range;

use rustc_hash::FxHashMap as HashMap;

use serde::Deserialize;
use toml::Spanned;

use super::{PinRole, RuleError};

/// The built-in table's text.
pub const BUILTIN_TEXT: &str = include_str!("../../rules/functions.toml");

/// The numbering series a function belongs to.
#[derive(
    Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize, serde::Deserialize,
)]
pub enum Series {
    /// 54/74-series numbering (74LS00, 74HC4051 are both "74").
    S74,
    /// CD4000 / MC14000 / HEF4000 numbering.
    S4000,
    /// Anything else (a microprocessor, an oscillator module, a bus transceiver): named by the
    /// explicit entries of `rules/parts.toml`.
    Other,
}

impl Series {
    pub fn as_str(self) -> &'static str {
        match self {
            Series::S74 => "74",
            Series::S4000 => "4000",
            Series::Other => "other",
        }
    }
}

/// How strongly a function's outputs drive: bus drivers have their own (larger) ratings.
#[derive(
    Debug, Clone, Copy, PartialEq, Eq, Hash, Default, serde::Serialize, serde::Deserialize,
)]
pub enum DriveClass {
    #[default]
    Standard,
    Buffer,
}

/// One package pin of a function.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct PinDef {
    /// The pin number as text ("1" .. "40").
    pub pin: String,
    pub name: String,
    pub role: PinRole,
    /// Gate / flip-flop / section the pin belongs to; `None` for pins shared device-wide.
    pub unit: Option<String>,
    /// For three-state and bidirectional pins: the pins that enable the output.
    pub enable: Vec<String>,
    /// True when the enables turn the output on when low.
    pub enable_active_low: bool,
    /// For a control input that must be held (a processor's wait, interrupt, bus-request or
    /// reset input): the level at which the part runs undisturbed, `Some(true)` for high. An
    /// unused one is tied there, never to the other rail.
    pub idle_high: Option<bool>,
    /// For an input that draws more than one unit load in some families: per family, the
    /// multiples of the family's input currents it draws.
    pub loads: Vec<PinLoad>,
    /// For an output whose rating the data sheet already tests with one of the package's
    /// own inputs on it (a counter's QA feeding its second clock): those input pins, which
    /// a budget does not count against the output again.
    pub rated_with: Vec<String>,
}

/// What one input draws in one family, as multiples of the family's IIL and IIH.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct PinLoad {
    pub family: String,
    /// Multiple of the family's IIL (the low-state input current).
    pub low: f64,
    /// Multiple of the family's IIH (the high-state input current).
    pub high: f64,
}

/// A family-dependent change of output kind: the open-collector outputs of the function
/// become `outputs` in `families`.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Variant {
    pub families: Vec<String>,
    pub outputs: PinRole,
}

/// One function of the table.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Function {
    pub id: String,
    pub summary: String,
    pub series: Series,
    pub package_pins: u32,
    pub drive: DriveClass,
    /// When set, the function exists only in these families.
    pub families: Option<Vec<String>>,
    pub source: String,
    /// Pins in package order.
    pub pins: Vec<PinDef>,
    pub variants: Vec<Variant>,
    /// Byte span of the function's entry in the file it came from.
    pub span: Range<usize>,
}

impl Function {
    /// The pin with this number, if the package has it.
    pub fn pin(&self, number: &str) -> Option<&PinDef> {
        let number = number.trim();
        self.pins.iter().find(|p| p.pin == number)
    }

    /// The pins with their roles as they are in `family_id` (variants applied).
    pub fn pins_for_family(&self, family_id: &str) -> Vec<PinDef> {
        let variant = self.variants.iter().find(|v| {
            v.families
                .iter()
                .any(|f| f.eq_ignore_ascii_case(family_id.trim()))
        });
        self.pins
            .iter()
            .map(|p| {
                let mut p = p.clone();
                if let Some(v) = variant {
                    if p.role == PinRole::OpenCollector {
                        p.role = v.outputs;
                    }
                }
                p
            })
            .collect()
    }

    /// The role of one pin in `family_id` (variants applied).
    pub fn role_for_family(&self, number: &str, family_id: &str) -> Option<PinRole> {
        let pin = self.pin(number)?;
        let variant = self.variants.iter().find(|v| {
            v.families
                .iter()
                .any(|f| f.eq_ignore_ascii_case(family_id.trim()))
        });
        match variant {
            Some(v) if pin.role == PinRole::OpenCollector => Some(v.outputs),
            _ => Some(pin.role),
        }
    }

    /// The multiples of `family_id`'s (IIL, IIH) that pin `number` draws, when the table
    /// gives them for that family.
    pub fn load_for_family(&self, number: &str, family_id: &str) -> Option<(f64, f64)> {
        self.pin(number)?
            .loads
            .iter()
            .find(|l| l.family.eq_ignore_ascii_case(family_id.trim()))
            .map(|l| (l.low, l.high))
    }

    /// True when the function exists in `family_id` (no `families` restriction, or listed).
    pub fn available_in(&self, family_id: &str) -> bool {
        match &self.families {
            None => true,
            Some(list) => list
                .iter()
                .any(|f| f.eq_ignore_ascii_case(family_id.trim())),
        }
    }

    /// Distinct units, in pin order (shared pins have none and are not counted).
    pub fn units(&self) -> Vec<String> {
        let mut out: Vec<String> = Vec::new();
        for p in &self.pins {
            if let Some(u) = &p.unit {
                if !out.contains(u) {
                    out.push(u.clone());
                }
            }
        }
        out
    }

    /// The pins of one unit, in pin order.
    pub fn unit_pins<'a>(&'a self, unit: &'a str) -> impl Iterator<Item = &'a PinDef> + 'a {
        self.pins
            .iter()
            .filter(move |p| p.unit.as_deref() == Some(unit))
    }

    pub fn supply_pins(&self) -> impl Iterator<Item = &PinDef> {
        self.pins.iter().filter(|p| p.role == PinRole::Supply)
    }

    pub fn ground_pins(&self) -> impl Iterator<Item = &PinDef> {
        self.pins.iter().filter(|p| p.role == PinRole::Ground)
    }
}

/// All functions, keyed by series and id.
#[derive(Debug, Clone, Default)]
pub struct FunctionTable {
    functions: Vec<Entry>,
    /// For each series (by `Series as usize`), each id in capitals to its function; a shipped
    /// id is borrowed from the compiled table.
    index: [HashMap<Cow<'static, str>, usize>; 3],
    /// For each series, the shipped ids (capitals), sorted, each with its function's place
    /// in `functions`: compiled into the binary and searched where they lie. An id parsed
    /// from a file goes into `index`, which is asked first.
    shipped: [&'static [(&'static str, u32)]; 3],
}

/// One function of a table: parsed from a file, or a shipped one still in the compact form
/// `build.rs` wrote, decoded the first time a run asks for it (a board uses a few dozen of
/// the hundreds shipped, so start-up decodes none of them).
#[derive(Debug, Clone)]
struct Entry {
    /// The compact form (postcard) of a shipped function; empty for a parsed one.
    bytes: &'static [u8],
    func: std::sync::OnceLock<Function>,
}

impl Entry {
    fn parsed(f: Function) -> Entry {
        Entry {
            bytes: &[],
            func: std::sync::OnceLock::from(f),
        }
    }

    fn get(&self) -> &Function {
        self.func.get_or_init(|| decode_function(self.bytes))
    }

    fn into_function(self) -> Function {
        let bytes = self.bytes;
        self.func
            .into_inner()
            .unwrap_or_else(|| decode_function(bytes))
    }
}

/// Decodes one shipped function. The bytes were written from the same type by the same
/// build (`build.rs`), so decoding cannot fail unless the build itself is broken.
fn decode_function(bytes: &[u8]) -> Function {
    postcard::from_bytes(bytes)
        .unwrap_or_else(|e| panic!("a shipped function built by build.rs decodes: {e}"))
}

impl FunctionTable {
    /// The shipped table read from its text, `rules/functions.toml`. `build.rs` calls this
    /// at compile time; the binary loads its result (`builtin`, in `shipped.rs`).
    pub fn parse_shipped() -> Result<FunctionTable, Vec<RuleError>> {
        FunctionTable::parse(BUILTIN_TEXT)
    }

    /// Parses and validates a function file; every problem found is returned, with its span.
    pub fn parse(text: &str) -> Result<FunctionTable, Vec<RuleError>> {
        let raw: RawFile = toml::from_str(text).map_err(|e| vec![RuleError::from_toml(&e)])?;
        build(raw)
    }

    /// The shipped table in its compiled form: for each series its ids, sorted, with the
    /// place of each function's postcard bytes (`ranges`, in `bytes`), decoded when first
    /// asked for.
    pub fn from_static(
        ids: [&'static [(&'static str, u32)]; 3],
        ranges: &'static [(u32, u32)],
        bytes: &'static [u8],
    ) -> FunctionTable {
        FunctionTable {
            functions: ranges
                .iter()
                .map(|&(a, b)| Entry {
                    bytes: &bytes[a as usize..b as usize],
                    func: std::sync::OnceLock::new(),
                })
                .collect(),
            index: Default::default(),
            shipped: ids,
        }
    }

    /// The place in `functions` of the function with this series and id, as written.
    fn place(&self, series: Series, id: &str) -> Option<usize> {
        let s = series as usize;
        self.index[s].get(id).copied().or_else(|| {
            let shipped = self.shipped[s];
            shipped
                .binary_search_by(|&(k, _)| k.cmp(id))
                .ok()
                .map(|j| shipped[j].1 as usize)
        })
    }

    /// Adds `over`'s functions; one with the same series and id replaces the existing one.
    pub fn merge(&mut self, over: FunctionTable) {
        for e in over.functions {
            let f = e.into_function();
            match self.place(f.series, &f.id) {
                Some(i) => self.functions[i] = Entry::parsed(f),
                None => {
                    self.index[f.series as usize]
                        .insert(Cow::Owned(f.id.clone()), self.functions.len());
                    self.functions.push(Entry::parsed(f));
                }
            }
        }
    }

    /// A function by series and id (case-insensitive, spaces around it ignored).
    pub fn get(&self, series: Series, id: &str) -> Option<&Function> {
        // the ids the classifier passes are written as in the table: no copy needed
        self.place(series, id)
            .or_else(|| self.place(series, id.trim().to_ascii_uppercase().as_str()))
            .map(|i| self.functions[i].get())
    }

    pub fn iter(&self) -> impl Iterator<Item = &Function> {
        self.functions.iter().map(Entry::get)
    }

    pub fn len(&self) -> usize {
        self.functions.len()
    }

    pub fn is_empty(&self) -> bool {
        self.functions.is_empty()
    }
}

// ---------------------------------------------------------------------------------------
// The file as written.

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    #[serde(default)]
    function: Vec<Spanned<RawFunction>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFunction {
    id: Spanned<String>,
    summary: String,
    series: Spanned<String>,
    package_pins: Option<Spanned<u32>>,
    drive: Option<Spanned<String>>,
    families: Option<Vec<String>>,
    source: String,
    like: Option<Spanned<String>>,
    like_series: Option<Spanned<String>>,
    outputs: Option<Spanned<String>>,
    pins: Option<Spanned<Vec<Spanned<RawPin>>>>,
    #[serde(default)]
    variants: Vec<Spanned<RawVariant>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawPin {
    pin: Spanned<u32>,
    name: String,
    role: Spanned<String>,
    unit: Option<String>,
    enable: Option<Vec<Spanned<u32>>>,
    enable_active: Option<Spanned<String>>,
    idle: Option<Spanned<String>>,
    loads: Option<Spanned<std::collections::BTreeMap<String, RawLoad>>>,
    rated_with: Option<Vec<Spanned<u32>>>,
}

/// One family's load of an input: one multiple for both states, or each state's.
#[derive(Deserialize)]
#[serde(untagged)]
enum RawLoad {
    Both(f64),
    Split { low: f64, high: f64 },
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawVariant {
    families: Vec<String>,
    outputs: Spanned<String>,
}

fn role_from(s: &Spanned<String>, errors: &mut Vec<RuleError>) -> Option<PinRole> {
    let role = match s.get_ref().as_str() {
        "input" => PinRole::Input,
        "schmitt-input" => PinRole::SchmittInput,
        "push-pull" => PinRole::PushPull,
        "open-collector" => PinRole::OpenCollector,
        "open-emitter" => PinRole::OpenEmitter,
        "three-state" => PinRole::ThreeState,
        "bidirectional" => PinRole::Bidirectional,
        "supply" => PinRole::Supply,
        "ground" => PinRole::Ground,
        "pulled-up-io" => PinRole::PulledUpIo,
        "analog" => PinRole::Analog,
        "passive" => PinRole::Passive,
        "no-connect" => PinRole::NoConnect,
        "unknown" => PinRole::Unknown,
        other => {
            errors.push(RuleError::new(
                Some(s.span()),
                format!(
                    "unknown pin role `{other}`: expected one of input, schmitt-input, push-pull, \
                     open-collector, open-emitter, three-state, bidirectional, supply, ground, \
                     pulled-up-io, analog, passive, no-connect, unknown"
                ),
            ));
            return None;
        }
    };
    Some(role)
}

/// A function's pins before `like` is resolved.
struct Pending {
    func: Function,
    like: Option<Spanned<String>>,
    /// The series `like` names (the function's own unless `like_series` says otherwise).
    like_series: Series,
    outputs: Option<PinRole>,
    package_pins_given: Option<Spanned<u32>>,
    /// True when the entry names its `drive`; a copy that does not takes the original's.
    drive_given: bool,
}

fn build(raw: RawFile) -> Result<FunctionTable, Vec<RuleError>> {
    let mut errors = Vec::new();
    let mut pending: Vec<Pending> = Vec::new();
    let mut seen: HashMap<(Series, String), Range<usize>> = HashMap::default();

    for sf in raw.function {
        let span = sf.span();
        let rf = sf.into_inner();
        let id = rf.id.get_ref().trim().to_ascii_uppercase();
        if id.is_empty() {
            errors.push(RuleError::new(Some(rf.id.span()), "function id is empty"));
        }
        let series = match rf.series.get_ref().as_str() {
            "74" => Series::S74,
            "4000" => Series::S4000,
            "other" => Series::Other,
            other => {
                errors.push(RuleError::new(
                    Some(rf.series.span()),
                    format!("unknown series `{other}`: expected \"74\" or \"4000\""),
                ));
                continue;
            }
        };
        if let Some(first) = seen.get(&(series, id.clone())) {
            errors.push(RuleError::new(
                Some(rf.id.span()),
                format!(
                    "function `{id}` of series {} is defined twice (first at byte {})",
                    series.as_str(),
                    first.start
                ),
            ));
            continue;
        }
        seen.insert((series, id.clone()), span.clone());

        let drive_given = rf.drive.is_some();
        let drive = match rf.drive.as_ref().map(|d| d.get_ref().as_str()) {
            None | Some("standard") => DriveClass::Standard,
            Some("buffer") => DriveClass::Buffer,
            Some(other) => {
                let d = rf.drive.as_ref().expect("matched Some above");
                errors.push(RuleError::new(
                    Some(d.span()),
                    format!("unknown drive `{other}`: expected \"standard\" or \"buffer\""),
                ));
                DriveClass::Standard
            }
        };

        let like_series = match rf.like_series.as_ref().map(|s| s.get_ref().as_str()) {
            None => series,
            Some("74") => Series::S74,
            Some("4000") => Series::S4000,
            Some("other") => Series::Other,
            Some(other) => {
                let s = rf.like_series.as_ref().expect("matched Some above");
                errors.push(RuleError::new(
                    Some(s.span()),
                    format!("unknown like_series `{other}`: expected \"74\" or \"4000\""),
                ));
                series
            }
        };
        if let (Some(s), None) = (&rf.like_series, &rf.like) {
            errors.push(RuleError::new(
                Some(s.span()),
                format!("function `{id}`: `like_series` applies only with `like`"),
            ));
        }
        let outputs = rf.outputs.as_ref().and_then(|o| role_from(o, &mut errors));
        if let (Some(o), None) = (&rf.outputs, &rf.like) {
            errors.push(RuleError::new(
                Some(o.span()),
                format!("function `{id}`: `outputs` applies only with `like`"),
            ));
        }

        let mut variants = Vec::new();
        for sv in &rf.variants {
            let v = sv.get_ref();
            if let Some(outputs) = role_from(&v.outputs, &mut errors) {
                if v.families.is_empty() {
                    errors.push(RuleError::new(
                        Some(sv.span()),
                        format!("function `{id}`: a variant names no families"),
                    ));
                }
                variants.push(Variant {
                    families: v.families.clone(),
                    outputs,
                });
            }
        }

        let mut pins = Vec::new();
        match (&rf.pins, &rf.like) {
            (Some(_), Some(l)) => errors.push(RuleError::new(
                Some(l.span()),
                format!("function `{id}` has both `pins` and `like`: give one"),
            )),
            (None, None) => errors.push(RuleError::new(
                Some(rf.id.span()),
                format!("function `{id}` has neither `pins` nor `like`"),
            )),
            _ => {}
        }
        if let Some(list) = &rf.pins {
            pins = build_pins(&id, list, &mut errors);
        }

        let package_pins = rf.package_pins.as_ref().map(|p| *p.get_ref()).unwrap_or(0);
        if rf.package_pins.is_none() && rf.like.is_none() {
            errors.push(RuleError::new(
                Some(rf.id.span()),
                format!("function `{id}` has no `package_pins`"),
            ));
        }

        pending.push(Pending {
            func: Function {
                id,
                summary: rf.summary,
                series,
                package_pins,
                drive,
                families: rf.families,
                source: rf.source,
                pins,
                variants,
                span,
            },
            like: rf.like,
            like_series,
            outputs,
            package_pins_given: rf.package_pins,
            drive_given,
        });
    }

    // Resolve `like` (one level: the source must itself list its pins).
    let by_key: HashMap<(Series, String), usize> = pending
        .iter()
        .enumerate()
        .map(|(i, p)| ((p.func.series, p.func.id.clone()), i))
        .collect();
    let mut copies: Vec<(usize, Vec<PinDef>, u32, DriveClass)> = Vec::new();
    for (i, p) in pending.iter().enumerate() {
        let Some(like) = &p.like else { continue };
        let target = like.get_ref().trim().to_ascii_uppercase();
        match by_key.get(&(p.like_series, target.clone())) {
            None => errors.push(RuleError::new(
                Some(like.span()),
                format!(
                    "function `{}` is `like` `{target}`, which is not a {}-series function here",
                    p.func.id,
                    p.like_series.as_str()
                ),
            )),
            Some(&j) if pending[j].like.is_some() => errors.push(RuleError::new(
                Some(like.span()),
                format!(
                    "function `{}` is `like` `{target}`, which is itself a copy: name the original",
                    p.func.id
                ),
            )),
            Some(&j) => {
                let src = &pending[j].func;
                let mut pins = src.pins.clone();
                if let Some(o) = p.outputs {
                    for pd in &mut pins {
                        if matches!(
                            pd.role,
                            PinRole::PushPull | PinRole::OpenCollector | PinRole::OpenEmitter
                        ) {
                            pd.role = o;
                        }
                    }
                }
                if let Some(given) = &p.package_pins_given {
                    if *given.get_ref() != src.package_pins {
                        errors.push(RuleError::new(
                            Some(given.span()),
                            format!(
                                "function `{}` has {} package pins but is `like` `{target}`, \
                                 which has {}",
                                p.func.id,
                                given.get_ref(),
                                src.package_pins
                            ),
                        ));
                    }
                }
                let drive = if p.drive_given {
                    p.func.drive
                } else {
                    src.drive
                };
                copies.push((i, pins, src.package_pins, drive));
            }
        }
    }
    for (i, pins, n, drive) in copies {
        pending[i].func.pins = pins;
        pending[i].func.package_pins = n;
        pending[i].func.drive = drive;
    }

    // Whole-function checks on listed pins.
    for p in &pending {
        if p.like.is_some() {
            continue;
        }
        let f = &p.func;
        let n = f.package_pins as usize;
        if n > 0 && f.pins.len() != n && !f.pins.is_empty() {
            let listed: HashSet<&str> = f.pins.iter().map(|p| p.pin.as_str()).collect();
            let missing: Vec<String> = (1..=n)
                .map(|k| k.to_string())
                .filter(|k| !listed.contains(k.as_str()))
                .collect();
            let span = p
                .package_pins_given
                .as_ref()
                .map(|s| s.span())
                .unwrap_or(f.span.clone());
            let detail = if missing.is_empty() {
                String::new()
            } else {
                format!(" (missing {})", missing.join(", "))
            };
            errors.push(RuleError::new(
                Some(span),
                format!(
                    "function `{}` lists {} pins for a {}-pin package{detail}",
                    f.id,
                    f.pins.len(),
                    n
                ),
            ));
        }
        if let Some(given) = &p.package_pins_given {
            for pd in &f.pins {
                let k: u32 = pd.pin.parse().unwrap_or(0);
                if k == 0 || k > *given.get_ref() {
                    errors.push(RuleError::new(
                        Some(f.span.clone()),
                        format!(
                            "function `{}`: pin {} is outside the {}-pin package",
                            f.id,
                            pd.pin,
                            given.get_ref()
                        ),
                    ));
                }
            }
        }
    }

    if !errors.is_empty() {
        return Err(errors);
    }
    let mut table = FunctionTable::default();
    for p in pending {
        table.index[p.func.series as usize].insert(p.func.id.clone().into(), table.functions.len());
        table.functions.push(Entry::parsed(p.func));
    }
    Ok(table)
}

fn build_pins(
    id: &str,
    list: &Spanned<Vec<Spanned<RawPin>>>,
    errors: &mut Vec<RuleError>,
) -> Vec<PinDef> {
    let mut out = Vec::new();
    let mut numbers: HashMap<u32, Range<usize>> = HashMap::default();
    for sp in list.get_ref() {
        let rp = sp.get_ref();
        let n = *rp.pin.get_ref();
        if numbers.contains_key(&n) {
            errors.push(RuleError::new(
                Some(rp.pin.span()),
                format!("function `{id}`: pin {n} is listed twice"),
            ));
            continue;
        }
        numbers.insert(n, sp.span());
        // an unknown role is reported once; the pin still counts, so no knock-on errors
        let role = role_from(&rp.role, errors).unwrap_or(PinRole::Unknown);
        let unit = rp
            .unit
            .as_ref()
            .map(|u| u.trim().to_string())
            .filter(|u| !u.is_empty() && !u.eq_ignore_ascii_case("common"));
        let has_enable_role = matches!(role, PinRole::ThreeState | PinRole::Bidirectional);
        if role == PinRole::ThreeState && rp.enable.as_ref().is_none_or(|e| e.is_empty()) {
            errors.push(RuleError::new(
                Some(sp.span()),
                format!(
                    "function `{id}`: three-state pin {n} ({}) names no enable",
                    rp.name
                ),
            ));
        }
        if !has_enable_role && (rp.enable.is_some() || rp.enable_active.is_some()) {
            errors.push(RuleError::new(
                Some(sp.span()),
                format!(
                    "function `{id}`: pin {n} ({}) is {role}, which has no enable",
                    rp.name
                ),
            ));
        }
        let enable_active_low = match rp.enable_active.as_ref().map(|s| s.get_ref().as_str()) {
            None | Some("low") => true,
            Some("high") => false,
            Some(other) => {
                let s = rp.enable_active.as_ref().expect("matched Some above");
                errors.push(RuleError::new(
                    Some(s.span()),
                    format!("unknown enable_active `{other}`: expected \"low\" or \"high\""),
                ));
                true
            }
        };
        let idle_high = match rp.idle.as_ref().map(|s| s.get_ref().as_str()) {
            None => None,
            Some("high") => Some(true),
            Some("low") => Some(false),
            Some(other) => {
                let s = rp.idle.as_ref().expect("matched Some above");
                errors.push(RuleError::new(
                    Some(s.span()),
                    format!("unknown idle `{other}`: expected \"low\" or \"high\""),
                ));
                None
            }
        };
        if idle_high.is_some() && !role.is_input() {
            errors.push(RuleError::new(
                Some(sp.span()),
                format!(
                    "function `{id}`: pin {n} ({}) is {role}; `idle` applies to inputs",
                    rp.name
                ),
            ));
        }
        let mut loads = Vec::new();
        if let Some(l) = &rp.loads {
            if !role.is_input() {
                errors.push(RuleError::new(
                    Some(l.span()),
                    format!(
                        "function `{id}`: pin {n} ({}) is {role}; `loads` applies to inputs",
                        rp.name
                    ),
                ));
            }
            for (family, raw) in l.get_ref() {
                let (low, high) = match raw {
                    RawLoad::Both(x) => (*x, *x),
                    RawLoad::Split { low, high } => (*low, *high),
                };
                if !(low.is_finite() && high.is_finite() && low > 0.0 && high > 0.0) {
                    errors.push(RuleError::new(
                        Some(l.span()),
                        format!(
                            "function `{id}`: pin {n} ({}): the load in `{family}` must be a \
                             positive multiple of the family's input current",
                            rp.name
                        ),
                    ));
                    continue;
                }
                loads.push(PinLoad {
                    family: family.trim().to_string(),
                    low,
                    high,
                });
            }
        }
        if rp.rated_with.is_some() && !role.is_output() {
            errors.push(RuleError::new(
                Some(sp.span()),
                format!(
                    "function `{id}`: pin {n} ({}) is {role}; `rated_with` applies to outputs",
                    rp.name
                ),
            ));
        }
        out.push(PinDef {
            loads,
            rated_with: rp
                .rated_with
                .as_ref()
                .map(|e| e.iter().map(|k| k.get_ref().to_string()).collect())
                .unwrap_or_default(),
            pin: n.to_string(),
            name: rp.name.clone(),
            role,
            unit,
            enable: rp
                .enable
                .as_ref()
                .map(|e| e.iter().map(|k| k.get_ref().to_string()).collect())
                .unwrap_or_default(),
            enable_active_low,
            idle_high,
        });
    }
    // Enables must name pins of this package.
    for sp in list.get_ref() {
        let rp = sp.get_ref();
        for e in rp.rated_with.iter().flatten() {
            if !numbers.contains_key(e.get_ref()) {
                errors.push(RuleError::new(
                    Some(e.span()),
                    format!(
                        "function `{id}`: pin {} is rated with pin {}, which is not listed",
                        rp.pin.get_ref(),
                        e.get_ref()
                    ),
                ));
            }
        }
        for e in rp.enable.iter().flatten() {
            if !numbers.contains_key(e.get_ref()) {
                errors.push(RuleError::new(
                    Some(e.span()),
                    format!(
                        "function `{id}`: pin {} names enable pin {}, which is not listed",
                        rp.pin.get_ref(),
                        e.get_ref()
                    ),
                ));
            }
        }
    }
    out.sort_by_key(|p| p.pin.parse::<u32>().unwrap_or(u32::MAX));
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    const SMALL: &str = r#"
[[function]]
id = "00"
summary = "quad 2-input NAND"
series = "74"
package_pins = 14
source = "test"
pins = [
  { pin = 1, name = "1A", role = "input", unit = "A" },
  { pin = 2, name = "1B", role = "input", unit = "A" },
  { pin = 3, name = "1Y", role = "push-pull", unit = "A" },
  { pin = 4, name = "2A", role = "input", unit = "B" },
  { pin = 5, name = "2B", role = "input", unit = "B" },
  { pin = 6, name = "2Y", role = "push-pull", unit = "B" },
  { pin = 7, name = "GND", role = "ground" },
  { pin = 8, name = "3Y", role = "push-pull", unit = "C" },
  { pin = 9, name = "3A", role = "input", unit = "C" },
  { pin = 10, name = "3B", role = "input", unit = "C" },
  { pin = 11, name = "4Y", role = "push-pull", unit = "D" },
  { pin = 12, name = "4A", role = "input", unit = "D" },
  { pin = 13, name = "4B", role = "input", unit = "D" },
  { pin = 14, name = "VCC", role = "supply", unit = "common" },
]

[[function]]
id = "03"
summary = "quad 2-input NAND, open collector"
series = "74"
source = "test"
like = "00"
outputs = "open-collector"
variants = [ { families = ["74HC"], outputs = "push-pull" } ]
"#;

    fn errs(text: &str) -> Vec<RuleError> {
        match FunctionTable::parse(text) {
            Ok(_) => panic!("expected errors for:\n{text}"),
            Err(e) => e,
        }
    }

    #[test]
    fn small_file_loads_and_like_copies() {
        let t = FunctionTable::parse(SMALL).unwrap();
        assert_eq!(t.len(), 2);
        let f = t.get(Series::S74, "03").unwrap();
        assert_eq!(f.package_pins, 14);
        assert_eq!(f.pin("3").unwrap().role, PinRole::OpenCollector);
        assert_eq!(f.pin("1").unwrap().role, PinRole::Input);
        assert_eq!(f.role_for_family("3", "74LS"), Some(PinRole::OpenCollector));
        assert_eq!(f.role_for_family("3", "74hc"), Some(PinRole::PushPull));
        assert_eq!(f.units(), vec!["A", "B", "C", "D"]);
        assert_eq!(f.pin("14").unwrap().unit, None);
        assert_eq!(f.supply_pins().count(), 1);
        assert_eq!(f.ground_pins().next().unwrap().pin, "7");
        assert!(t.get(Series::S4000, "00").is_none());
    }

    #[test]
    fn a_copy_takes_the_originals_drive_unless_it_names_its_own() {
        let text = SMALL.replace(
            "package_pins = 14\n",
            "package_pins = 14\ndrive = \"buffer\"\n",
        );
        let t = FunctionTable::parse(&text).unwrap();
        assert_eq!(t.get(Series::S74, "00").unwrap().drive, DriveClass::Buffer);
        assert_eq!(t.get(Series::S74, "03").unwrap().drive, DriveClass::Buffer);
        let text = text.replace("like = \"00\"\n", "like = \"00\"\ndrive = \"standard\"\n");
        let t = FunctionTable::parse(&text).unwrap();
        assert_eq!(
            t.get(Series::S74, "03").unwrap().drive,
            DriveClass::Standard
        );
        // the shipped table: the 74244 is a bus driver like the 74240 it copies
        let b = FunctionTable::builtin();
        assert_eq!(b.get(Series::S74, "244").unwrap().drive, DriveClass::Buffer);
    }

    #[test]
    fn merge_replaces_same_id() {
        let mut t = FunctionTable::parse(SMALL).unwrap();
        let over = SMALL.replace("quad 2-input NAND\"", "replaced\"");
        let over = FunctionTable::parse(&over).unwrap();
        t.merge(over);
        assert_eq!(t.len(), 2);
        assert_eq!(t.get(Series::S74, "00").unwrap().summary, "replaced");
    }

    #[test]
    fn unknown_role_has_its_span() {
        let text = SMALL.replace(
            r#"name = "2Y", role = "push-pull""#,
            r#"name = "2Y", role = "totem""#,
        );
        let e = errs(&text);
        assert_eq!(e.len(), 1);
        let span = e[0].span.clone().unwrap();
        assert_eq!(&text[span], "\"totem\"");
        assert!(e[0].message.contains("totem"));
    }

    #[test]
    fn duplicate_pin_and_missing_pin() {
        let text = SMALL.replace("{ pin = 13,", "{ pin = 12,");
        let e = errs(&text);
        assert!(
            e.iter()
                .any(|e| e.message.contains("pin 12 is listed twice")),
            "{e:?}"
        );
        assert!(e.iter().any(|e| e.message.contains("missing 13")), "{e:?}");
    }

    #[test]
    fn unknown_like_and_key() {
        let e = errs(&SMALL.replace("like = \"00\"", "like = \"99\""));
        assert!(e[0].message.contains("`99`"), "{e:?}");
        let e = errs(&SMALL.replace(
            "source = \"test\"\nlike",
            "source = \"test\"\ncolour = 1\nlike",
        ));
        assert!(e[0].message.contains("colour"), "{e:?}");
        assert!(e[0].span.is_some());
    }

    #[test]
    fn input_loads_by_family_one_number_or_each_state() {
        let text = SMALL.replace(
            r#"name = "1A", role = "input", unit = "A""#,
            r#"name = "1A", role = "input", unit = "A", loads = { "74LS" = 6.0, "74" = { low = 2.0, high = 3.0 } }"#,
        );
        let t = FunctionTable::parse(&text).unwrap();
        let f = t.get(Series::S74, "00").unwrap();
        assert_eq!(f.load_for_family("1", "74LS"), Some((6.0, 6.0)));
        assert_eq!(f.load_for_family("1", "74ls"), Some((6.0, 6.0)));
        assert_eq!(f.load_for_family("1", "74"), Some((2.0, 3.0)));
        assert_eq!(f.load_for_family("1", "74HC"), None);
        assert_eq!(f.load_for_family("2", "74LS"), None);
        // a copy carries its original's loads
        let c = t.get(Series::S74, "03").unwrap();
        assert_eq!(c.load_for_family("1", "74LS"), Some((6.0, 6.0)));
    }

    #[test]
    fn loads_apply_to_inputs_and_are_positive() {
        let text = SMALL.replace(
            r#"name = "1Y", role = "push-pull""#,
            r#"name = "1Y", role = "push-pull", loads = { "74LS" = 2.0 }"#,
        );
        assert!(errs(&text)[0].message.contains("`loads` applies to inputs"));
        let text = SMALL.replace(
            r#"name = "1A", role = "input""#,
            r#"name = "1A", role = "input", loads = { "74LS" = 0.0 }"#,
        );
        assert!(errs(&text)[0].message.contains("positive multiple"));
        let text = SMALL.replace(
            r#"name = "1Y", role = "push-pull""#,
            r#"name = "1Y", role = "push-pull", rated_with = [15]"#,
        );
        assert!(errs(&text)[0].message.contains("rated with pin 15"));
        let text = SMALL.replace(
            r#"name = "1A", role = "input""#,
            r#"name = "1A", role = "input", rated_with = [2]"#,
        );
        assert!(errs(&text)[0]
            .message
            .contains("`rated_with` applies to outputs"));
    }

    #[test]
    fn enable_must_exist_and_three_state_needs_one() {
        let text = SMALL.replace(
            r#"name = "1Y", role = "push-pull""#,
            r#"name = "1Y", role = "three-state", enable = [15]"#,
        );
        let e = errs(&text);
        assert!(e[0].message.contains("enable pin 15"), "{e:?}");
        assert_eq!(&text[e[0].span.clone().unwrap()], "15");
        let text = SMALL.replace(
            r#"name = "1Y", role = "push-pull""#,
            r#"name = "1Y", role = "three-state""#,
        );
        assert!(errs(&text)[0].message.contains("names no enable"));
    }

    #[test]
    fn duplicate_id() {
        let text = format!(
            "{SMALL}\n{}",
            &SMALL[SMALL.find("[[function]]\nid = \"03\"").unwrap()..]
        );
        let e = errs(&text);
        assert!(e[0].message.contains("defined twice"), "{e:?}");
    }
}
