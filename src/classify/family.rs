//! Logic families: the DC characteristics of each family at its published supply points,
//! read from `rules/families.toml` (embedded) or a project's own families file.
//!
//! Figures are stored in SI units (volts, amperes). Current out of a pin is negative (IOH,
//! IIL), current into a pin positive. [`Family::levels`] gives a family's figures at any
//! supply, saying how they were obtained ([`Basis`]).

use std::borrow::Cow;
use std::fmt;
use std::ops::Range;

use serde::Deserialize;
use toml::Spanned;

use crate::classify::RuleError;

/// The families file shipped with the tool.
const BUILTIN_TEXT: &str = include_str!("../../rules/families.toml");

/// How an input behaves when nothing drives it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
pub enum InputKind {
    /// Bipolar input that sources current when low: it floats high through its internal resistor.
    Ttl,
    /// High-impedance input that must never float.
    Cmos,
}

impl InputKind {
    pub fn as_str(self) -> &'static str {
        match self {
            InputKind::Ttl => "ttl",
            InputKind::Cmos => "cmos",
        }
    }
}

impl fmt::Display for InputKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// The process a family is built in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
pub enum Technology {
    Bipolar,
    Cmos,
    Nmos,
}

impl Technology {
    pub fn as_str(self) -> &'static str {
        match self {
            Technology::Bipolar => "bipolar",
            Technology::Cmos => "cmos",
            Technology::Nmos => "nmos",
        }
    }
}

impl fmt::Display for Technology {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// How far a family's output high reaches, beyond its VOH rows.
#[derive(
    Debug, Clone, Copy, PartialEq, Eq, Hash, Default, serde::Serialize, serde::Deserialize,
)]
pub enum HighOutput {
    /// The rows say it all: a CMOS output published down to light loads, or a bipolar / NMOS
    /// output (whose technology already says that its high stops near 3.5 V at 5 V).
    #[default]
    Rows,
    /// A TTL-level output stage in a CMOS or BiCMOS part (an NMOS pull-up, as in 74ABT and
    /// 74FCT-T): its high stays near TTL levels whatever the load.
    Ttl,
    /// A CMOS output whose data sheet guarantees the high only at TTL levels at its rated
    /// current (a CMOS SRAM's 2.4 V at -1 mA): at a light CMOS load it rises towards the
    /// supply, but no figure says how far.
    RatedAtTtl,
}

/// A guaranteed level at a load current: `v` volts at `a` amperes (signed: out of the pin is
/// negative).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct VI {
    pub v: f64,
    pub a: f64,
}

/// Which outputs of a family: ordinary gate outputs, or the bus-driver / buffer outputs
/// (244, 245, 240, 541, 374 class).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
pub enum Drive {
    Standard,
    Buffer,
}

/// The output figures of one kind of output at one supply point.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Output {
    /// Rated high-level output current (negative).
    pub ioh_max: f64,
    /// Rated low-level output current.
    pub iol_max: f64,
    /// Guaranteed VOH min at stated currents, lightest load first.
    pub voh: Vec<VI>,
    /// Guaranteed VOL max at stated currents, lightest load first.
    pub vol: Vec<VI>,
}

/// A family's published figures at one supply voltage, in volts and amperes.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Point {
    pub vcc: f64,
    pub vih_min: f64,
    pub vil_max: f64,
    /// Into the input at VIH.
    pub iih_max: f64,
    /// Out of the input at VIL (negative).
    pub iil_max: f64,
    /// Three-state off leakage (magnitude).
    pub ioz: f64,
    /// Open-collector / open-drain off-state leakage (magnitude).
    pub oc_leakage: f64,
    /// Standard outputs.
    pub output: Output,
    /// Bus-driver outputs, when the family makes them.
    pub buffer: Option<Output>,
    /// Byte range of the `[[family.point]]` header in its file.
    pub span: Range<usize>,
}

/// How the figures in a [`Levels`] were obtained.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Basis {
    /// The supply is one of the published points.
    Published,
    /// Linear between the two published points around the supply.
    Interpolated { below: f64, above: f64 },
    /// Outside the published points (or, for a single-point family, outside its supply
    /// range): linear from the two nearest points, or the single point's figures unchanged.
    Extrapolated { nearest: f64 },
    /// A single-point family used inside its supply range away from its point: its figures
    /// unchanged (TTL thresholds do not scale with VCC).
    Nominal,
}

impl Basis {
    /// A short phrase for messages: "published", "interpolated between 4.50 V and 6.00 V", ...
    pub fn describe(&self) -> String {
        match *self {
            Basis::Published => "published".to_string(),
            Basis::Interpolated { below, above } => {
                format!("interpolated between {below:.2} V and {above:.2} V")
            }
            Basis::Extrapolated { nearest } => {
                format!("extrapolated beyond the published {nearest:.2} V")
            }
            Basis::Nominal => "the family's nominal-supply figures".to_string(),
        }
    }
}

/// The family's figures at one supply voltage.
#[derive(Debug, Clone, PartialEq)]
pub struct Levels {
    pub vcc: f64,
    pub vih_min: f64,
    pub vil_max: f64,
    pub iih_max: f64,
    pub iil_max: f64,
    pub ioz: f64,
    pub oc_leakage: f64,
    pub ioh_max: f64,
    pub iol_max: f64,
    pub voh: Vec<VI>,
    pub vol: Vec<VI>,
    /// Which output figures these are: `Standard` when `Buffer` was asked of a family that
    /// publishes no buffer outputs.
    pub drive: Drive,
    /// how the figures were obtained at this supply
    pub basis: Basis,
}

impl Levels {
    /// Guaranteed VOH min when the output sources `a` amperes (taken by magnitude; out of the
    /// pin is negative). Linear between the published points; below the lightest published
    /// load, that point's level (conservative); beyond the heaviest, `None` (no guarantee).
    pub fn voh_at(&self, a: f64) -> Option<f64> {
        level_at(&self.voh, a)
    }

    /// Guaranteed VOL max when sinking `a` amperes (taken by magnitude); same rules as
    /// [`Levels::voh_at`].
    pub fn vol_at(&self, a: f64) -> Option<f64> {
        level_at(&self.vol, a)
    }
}

fn level_at(rows: &[VI], a: f64) -> Option<f64> {
    let m = a.abs();
    let first = rows.first()?;
    if m <= first.a.abs() {
        return Some(first.v);
    }
    for pair in rows.windows(2) {
        let (lo, hi) = (pair[0], pair[1]);
        let (ml, mh) = (lo.a.abs(), hi.a.abs());
        if m <= mh {
            let t = (m - ml) / (mh - ml);
            return Some(lo.v + t * (hi.v - lo.v));
        }
    }
    let last = rows[rows.len() - 1];
    // A hair of rounding slack at the last published current.
    if m <= last.a.abs() * (1.0 + 1e-9) {
        Some(last.v)
    } else {
        None
    }
}

/// One logic family.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Family {
    pub id: String,
    pub name: String,
    pub input: InputKind,
    pub technology: Technology,
    pub supply_min: f64,
    pub supply_nominal: f64,
    pub supply_max: f64,
    /// Absolute input voltage the input takes whatever its supply (5 V tolerant parts).
    pub input_max_v: Option<f64>,
    /// How far above its supply an input may go (clamp diode).
    pub clamp_above_supply_v: Option<f64>,
    /// TTL only: the input's internal resistor.
    pub internal_input_pullup_ohm: Option<f64>,
    /// How far the output high reaches beyond the published rows.
    pub high_output: HighOutput,
    /// Absolute maximum continuous current through one output pin, amperes (the data
    /// sheet's IO), when the family publishes one.
    pub output_abs_max_a: Option<f64>,
    /// Absolute maximum dissipation of one output transistor, watts (4000-series sheets
    /// rate this instead of a current).
    pub output_transistor_abs_max_w: Option<f64>,
    pub source: String,
    pub aliases: Vec<String>,
    /// Published points, sorted by supply; never empty for a family from a [`FamilyTable`].
    pub points: Vec<Point>,
    /// Byte range of the `[[family]]` header in its file.
    pub span: Range<usize>,
    /// True for a family of the shipped table, false for one from a project file (its spans
    /// point into that file).
    pub shipped: bool,
}

impl Family {
    /// The family's figures at supply `vcc`.
    ///
    /// Several points: between two published supplies every figure is linear (thresholds,
    /// input currents, leakages, ratings, and the VOH/VOL rows paired by index, levels and
    /// currents both). Outside them, thresholds, input currents and leakages continue the line
    /// through the two nearest points; the outputs are the nearest point's, with its rated
    /// currents and each VOH row's drop below VCC kept (VOL rows unchanged), because a line
    /// through two ratings soon claims drive nobody published, or a current of the wrong sign.
    /// Extrapolated levels stay within 0..vcc; currents never change sign.
    ///
    /// One point: its figures unchanged, `Published` at the point, `Nominal` elsewhere in the
    /// supply range, `Extrapolated` outside it.
    pub fn levels(&self, vcc: f64, drive: Drive) -> Levels {
        let points = &self.points;
        assert!(
            !points.is_empty(),
            "a family from FamilyTable has at least one point"
        );
        let use_buffer = drive == Drive::Buffer && points.iter().all(|p| p.buffer.is_some());
        let used = if use_buffer {
            Drive::Buffer
        } else {
            Drive::Standard
        };

        if let Some(p) = points.iter().find(|p| same_v(p.vcc, vcc)) {
            return from_point(p, used, Basis::Published);
        }
        if points.len() == 1 {
            let p = &points[0];
            let inside = vcc >= self.supply_min - 1e-9 && vcc <= self.supply_max + 1e-9;
            let basis = if inside {
                Basis::Nominal
            } else {
                Basis::Extrapolated { nearest: p.vcc }
            };
            return from_point(p, used, basis);
        }
        let n = points.len();
        let (a, b, basis) = if vcc < points[0].vcc {
            (
                &points[0],
                &points[1],
                Basis::Extrapolated {
                    nearest: points[0].vcc,
                },
            )
        } else if vcc > points[n - 1].vcc {
            (
                &points[n - 2],
                &points[n - 1],
                Basis::Extrapolated {
                    nearest: points[n - 1].vcc,
                },
            )
        } else {
            let i = points
                .windows(2)
                .position(|w| vcc > w[0].vcc && vcc < w[1].vcc)
                .unwrap_or(0);
            (
                &points[i],
                &points[i + 1],
                Basis::Interpolated {
                    below: points[i].vcc,
                    above: points[i + 1].vcc,
                },
            )
        };
        let t = (vcc - a.vcc) / (b.vcc - a.vcc);
        let lerp = |x: f64, y: f64| x + t * (y - x);
        let volts = |x: f64, y: f64| lerp(x, y).clamp(0.0, vcc.max(0.0));
        let out_a = pick(a, use_buffer);
        let out_b = pick(b, use_buffer);
        let rows = |ra: &[VI], rb: &[VI]| -> Vec<VI> {
            ra.iter()
                .zip(rb.iter())
                .map(|(x, y)| VI {
                    v: volts(x.v, y.v),
                    a: keep_sign(lerp(x.a, y.a), x.a),
                })
                .collect()
        };
        let (ioh_max, iol_max, voh, vol) = match basis {
            Basis::Extrapolated { nearest } => {
                let near = if same_v(nearest, a.vcc) { out_a } else { out_b };
                let shift = vcc - nearest;
                let top = vcc.max(0.0);
                let voh = near
                    .voh
                    .iter()
                    .map(|r| VI {
                        v: (r.v + shift).clamp(0.0, top),
                        a: r.a,
                    })
                    .collect();
                let vol = near
                    .vol
                    .iter()
                    .map(|r| VI {
                        v: r.v.clamp(0.0, top),
                        a: r.a,
                    })
                    .collect();
                (near.ioh_max, near.iol_max, voh, vol)
            }
            _ => (
                keep_sign(lerp(out_a.ioh_max, out_b.ioh_max), -1.0),
                keep_sign(lerp(out_a.iol_max, out_b.iol_max), 1.0),
                rows(&out_a.voh, &out_b.voh),
                rows(&out_a.vol, &out_b.vol),
            ),
        };
        Levels {
            vcc,
            vih_min: volts(a.vih_min, b.vih_min),
            vil_max: volts(a.vil_max, b.vil_max),
            iih_max: keep_sign(lerp(a.iih_max, b.iih_max), a.iih_max),
            iil_max: keep_sign(lerp(a.iil_max, b.iil_max), a.iil_max),
            ioz: keep_sign(lerp(a.ioz, b.ioz), 1.0),
            oc_leakage: keep_sign(lerp(a.oc_leakage, b.oc_leakage), 1.0),
            ioh_max,
            iol_max,
            voh,
            vol,
            drive: used,
            basis,
        }
    }

    /// True when the family's inputs are high impedance (must never float).
    pub fn is_cmos_input(&self) -> bool {
        self.input == InputKind::Cmos
    }

    /// The highest voltage an input of this family takes at supply `vcc`: its absolute
    /// rating when it is tolerant, else the supply plus its clamp allowance (none when the
    /// file gives none).
    pub fn input_limit_v(&self, vcc: f64) -> f64 {
        let clamped = vcc + self.clamp_above_supply_v.unwrap_or(0.0);
        match self.input_max_v {
            Some(m) => m.max(clamped),
            None => clamped,
        }
    }

    /// True when `name` is this family's id or one of its aliases (case-insensitive).
    pub fn answers_to(&self, name: &str) -> bool {
        self.id.eq_ignore_ascii_case(name)
            || self.aliases.iter().any(|a| a.eq_ignore_ascii_case(name))
    }
}

fn same_v(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-9 * a.abs().max(b.abs()).max(1.0)
}

/// `x`, or zero when it has crossed to the other sign from `sign_of`.
fn keep_sign(x: f64, sign_of: f64) -> f64 {
    if sign_of < 0.0 {
        x.min(0.0)
    } else {
        x.max(0.0)
    }
}

fn pick(p: &Point, buffer: bool) -> &Output {
    match (&p.buffer, buffer) {
        (Some(b), true) => b,
        _ => &p.output,
    }
}

fn from_point(p: &Point, drive: Drive, basis: Basis) -> Levels {
    let out = pick(p, drive == Drive::Buffer);
    Levels {
        vcc: p.vcc,
        vih_min: p.vih_min,
        vil_max: p.vil_max,
        iih_max: p.iih_max,
        iil_max: p.iil_max,
        ioz: p.ioz,
        oc_leakage: p.oc_leakage,
        ioh_max: out.ioh_max,
        iol_max: out.iol_max,
        voh: out.voh.clone(),
        vol: out.vol.clone(),
        drive,
        basis,
    }
}

/// The set of known families: the shipped table, possibly with a project's file over it.
#[derive(Debug, Clone, Default)]
pub struct FamilyTable {
    families: Vec<Entry>,
    /// Each family's id, in capitals, to its index (rebuilt by [`FamilyTable::reindex`]); a
    /// shipped id is borrowed from the compiled table.
    by_id: rustc_hash::FxHashMap<Cow<'static, str>, usize>,
    /// Each alias, in capitals, to the last family that names it.
    by_alias: rustc_hash::FxHashMap<Cow<'static, str>, usize>,
}

/// One family of a table: parsed from a file, or a shipped one still in the compact form
/// `build.rs` wrote, decoded the first time a run asks for it (a board uses a few of the
/// dozens shipped). Its id and aliases, in capitals, are kept beside it for the index.
#[derive(Debug, Clone)]
struct Entry {
    id: Cow<'static, str>,
    aliases: Vec<Cow<'static, str>>,
    /// The compact form (postcard) of a shipped family; empty for a parsed one.
    bytes: &'static [u8],
    family: std::sync::OnceLock<Family>,
}

impl Entry {
    fn parsed(f: Family) -> Entry {
        Entry {
            id: Cow::Owned(f.id.to_ascii_uppercase()),
            aliases: f
                .aliases
                .iter()
                .map(|a| Cow::Owned(a.to_ascii_uppercase()))
                .collect(),
            bytes: &[],
            family: std::sync::OnceLock::from(f),
        }
    }

    fn get(&self) -> &Family {
        self.family.get_or_init(|| decode_family(self.bytes))
    }
}

/// Decodes one shipped family. The bytes were written from the same type by the same build
/// (`build.rs`), so decoding cannot fail unless the build itself is broken.
fn decode_family(bytes: &[u8]) -> Family {
    postcard::from_bytes(bytes)
        .unwrap_or_else(|e| panic!("a shipped family built by build.rs decodes: {e}"))
}

impl PartialEq for FamilyTable {
    fn eq(&self, other: &FamilyTable) -> bool {
        self.iter().eq(other.iter())
    }
}

impl FamilyTable {
    /// The shipped table read from its text, `rules/families.toml`. `build.rs` calls this
    /// at compile time; the binary loads its result (`builtin`, in `shipped.rs`).
    pub fn parse_shipped() -> Result<FamilyTable, Vec<RuleError>> {
        let mut table = FamilyTable::parse(BUILTIN_TEXT)?;
        for e in &mut table.families {
            if let Some(f) = e.family.get_mut() {
                f.shipped = true;
            }
        }
        Ok(table)
    }

    /// The text of the shipped families file (for `config --show` and for error rendering).
    pub fn builtin_text() -> &'static str {
        BUILTIN_TEXT
    }

    /// parse a families file (shipped or a project override); `Err` lists every problem with its span
    pub fn parse(text: &str) -> Result<FamilyTable, Vec<RuleError>> {
        let raw: RawFile = toml::from_str(text).map_err(|e| vec![RuleError::from_toml(&e)])?;
        let mut errors = Vec::new();
        let mut families: Vec<Family> = Vec::new();
        for rf in raw.family {
            let span = rf.span();
            if let Some(f) = convert_family(rf.into_inner(), span, &mut errors) {
                families.push(f);
            }
        }
        check_names(&families, &mut errors);
        if errors.is_empty() {
            Ok(FamilyTable::new(families))
        } else {
            Err(errors)
        }
    }

    /// A table of these families, indexed.
    pub fn new(families: Vec<Family>) -> FamilyTable {
        let mut t = FamilyTable {
            families: families.into_iter().map(Entry::parsed).collect(),
            ..Default::default()
        };
        t.reindex();
        t
    }

    /// A table of shipped families in their compact form: each family's id and aliases (in
    /// capitals) with the postcard bytes of its [`Family`], decoded when first asked for.
    pub fn from_compact(
        entries: impl IntoIterator<Item = (&'static str, Vec<&'static str>, &'static [u8])>,
    ) -> FamilyTable {
        let mut t = FamilyTable {
            families: entries
                .into_iter()
                .map(|(id, aliases, bytes)| Entry {
                    id: Cow::Borrowed(id),
                    aliases: aliases.into_iter().map(Cow::Borrowed).collect(),
                    bytes,
                    family: std::sync::OnceLock::new(),
                })
                .collect(),
            ..Default::default()
        };
        t.reindex();
        t
    }

    /// The compact form [`FamilyTable::from_compact`] reads, for `build.rs`: each family's id
    /// and aliases in capitals, and its postcard bytes.
    pub fn to_compact(&self) -> Vec<(String, Vec<String>, Vec<u8>)> {
        self.families
            .iter()
            .map(|e| {
                (
                    e.id.to_string(),
                    e.aliases.iter().map(|a| a.to_string()).collect(),
                    postcard::to_allocvec(e.get()).expect("a family encodes"),
                )
            })
            .collect()
    }

    /// Rebuilds the lookup by id and alias (after decoding or merging).
    pub fn reindex(&mut self) {
        self.by_id.clear();
        self.by_alias.clear();
        for (i, e) in self.families.iter().enumerate() {
            self.by_id.entry(e.id.clone()).or_insert(i);
            for a in &e.aliases {
                // the family added last wins an alias
                self.by_alias.insert(a.clone(), i);
            }
        }
    }

    /// a project file over this one: a family with the same id replaces the shipped one; new ids are added
    pub fn merge(&mut self, over: FamilyTable) {
        for e in over.families {
            match self.by_id.get(e.id.as_ref()) {
                Some(&i) => self.families[i] = e,
                None => {
                    self.by_id.insert(e.id.clone(), self.families.len());
                    self.families.push(e);
                }
            }
        }
        self.reindex();
    }

    /// A family by id or alias, case-insensitive. Ids are looked at first; among aliases, the
    /// family added last (a project's) wins.
    pub fn get(&self, id_or_alias: &str) -> Option<&Family> {
        let name = id_or_alias.trim();
        // the ids the model passes around are written as in the table: no copy needed
        if let Some(&i) = self.by_id.get(name) {
            return Some(self.families[i].get());
        }
        let key = name.to_ascii_uppercase();
        self.by_id
            .get(key.as_str())
            .or_else(|| self.by_alias.get(key.as_str()))
            .map(|&i| self.families[i].get())
    }

    pub fn iter(&self) -> impl Iterator<Item = &Family> {
        self.families.iter().map(Entry::get)
    }

    pub fn len(&self) -> usize {
        self.families.len()
    }

    pub fn is_empty(&self) -> bool {
        self.families.is_empty()
    }
}

// ----- the file as written -------------------------------------------------------------------

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    #[serde(default)]
    family: Vec<Spanned<RawFamily>>,
}

#[derive(Deserialize, Clone, Copy)]
#[serde(rename_all = "lowercase")]
enum RawInput {
    Ttl,
    Cmos,
}

#[derive(Deserialize, Clone, Copy)]
#[serde(rename_all = "lowercase")]
enum RawTechnology {
    Bipolar,
    Cmos,
    Nmos,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSupply {
    min: f64,
    nominal: f64,
    max: f64,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFamily {
    id: Spanned<String>,
    name: String,
    input: RawInput,
    technology: RawTechnology,
    supply: Spanned<RawSupply>,
    input_max_v: Option<Spanned<f64>>,
    input_clamp_above_supply_v: Option<Spanned<f64>>,
    internal_input_pullup_ohm: Option<Spanned<f64>>,
    output_abs_max_ma: Option<Spanned<f64>>,
    output_transistor_abs_max_mw: Option<Spanned<f64>>,
    #[serde(default)]
    high_output: Option<Spanned<String>>,
    source: String,
    #[serde(default)]
    aliases: Vec<Spanned<String>>,
    #[serde(default)]
    point: Vec<Spanned<RawPoint>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawVI {
    v: f64,
    ma: f64,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawOutput {
    ioh_max_ma: Spanned<f64>,
    iol_max_ma: Spanned<f64>,
    voh: Spanned<Vec<Spanned<RawVI>>>,
    vol: Spanned<Vec<Spanned<RawVI>>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawPoint {
    vcc: Spanned<f64>,
    vih_min: Spanned<f64>,
    vil_max: Spanned<f64>,
    iih_max_ua: Spanned<f64>,
    iil_max_ma: Spanned<f64>,
    ioz_ua: Spanned<f64>,
    oc_leakage_ua: Spanned<f64>,
    ioh_max_ma: Spanned<f64>,
    iol_max_ma: Spanned<f64>,
    voh: Spanned<Vec<Spanned<RawVI>>>,
    vol: Spanned<Vec<Spanned<RawVI>>>,
    buffer: Option<Spanned<RawOutput>>,
}

// ----- conversion and validation -------------------------------------------------------------

fn err(errors: &mut Vec<RuleError>, span: Range<usize>, message: String) {
    errors.push(RuleError::new(Some(span), message));
}

/// A number that must be finite (TOML allows `inf` and `nan`).
fn finite(errors: &mut Vec<RuleError>, x: &Spanned<f64>, key: &str) -> f64 {
    let v = *x.get_ref();
    if !v.is_finite() {
        err(
            errors,
            x.span(),
            format!("`{key}` must be a finite number, found {v}"),
        );
    }
    v
}

fn convert_family(
    rf: RawFamily,
    span: Range<usize>,
    errors: &mut Vec<RuleError>,
) -> Option<Family> {
    let before = errors.len();
    let id = rf.id.get_ref().trim().to_string();
    if id.is_empty() {
        err(errors, rf.id.span(), "family `id` is empty".to_string());
    }
    let supply_span = rf.supply.span();
    let supply = rf.supply.into_inner();
    for (x, key) in [
        (supply.min, "supply.min"),
        (supply.nominal, "supply.nominal"),
        (supply.max, "supply.max"),
    ] {
        if !x.is_finite() || x <= 0.0 {
            err(
                errors,
                supply_span.clone(),
                format!("family {id}: `{key}` must be a positive number of volts, found {x}"),
            );
        }
    }
    if !(supply.min <= supply.nominal && supply.nominal <= supply.max) {
        err(
            errors,
            supply_span.clone(),
            format!(
                "family {id}: supply must satisfy min <= nominal <= max, found {} / {} / {} V",
                supply.min, supply.nominal, supply.max
            ),
        );
    }
    let input = match rf.input {
        RawInput::Ttl => InputKind::Ttl,
        RawInput::Cmos => InputKind::Cmos,
    };
    let technology = match rf.technology {
        RawTechnology::Bipolar => Technology::Bipolar,
        RawTechnology::Cmos => Technology::Cmos,
        RawTechnology::Nmos => Technology::Nmos,
    };
    let input_max_v = rf.input_max_v.as_ref().map(|x| {
        let v = finite(errors, x, "input_max_v");
        if v <= 0.0 {
            err(
                errors,
                x.span(),
                format!("family {id}: `input_max_v` must be positive, found {v} V"),
            );
        }
        v
    });
    let clamp_above_supply_v = rf.input_clamp_above_supply_v.as_ref().map(|x| {
        let v = finite(errors, x, "input_clamp_above_supply_v");
        if v < 0.0 {
            err(
                errors,
                x.span(),
                format!(
                    "family {id}: `input_clamp_above_supply_v` must not be negative, found {v} V"
                ),
            );
        }
        v
    });
    let internal_input_pullup_ohm = rf.internal_input_pullup_ohm.as_ref().map(|x| {
        let v = finite(errors, x, "internal_input_pullup_ohm");
        if v <= 0.0 {
            err(errors, x.span(), format!("family {id}: `internal_input_pullup_ohm` must be positive, found {v} ohm"));
        }
        if input == InputKind::Cmos {
            err(
                errors,
                x.span(),
                format!("family {id}: `internal_input_pullup_ohm` applies to ttl inputs only, this family has cmos inputs"),
            );
        }
        v
    });
    let positive = |errors: &mut Vec<RuleError>, x: &Spanned<f64>, key: &str, unit: &str| {
        let v = finite(errors, x, key);
        if v <= 0.0 {
            err(
                errors,
                x.span(),
                format!("family {id}: `{key}` must be positive, found {v} {unit}"),
            );
        }
        v
    };
    let output_abs_max_a = rf
        .output_abs_max_ma
        .as_ref()
        .map(|x| positive(errors, x, "output_abs_max_ma", "mA") / 1000.0);
    let output_transistor_abs_max_w = rf
        .output_transistor_abs_max_mw
        .as_ref()
        .map(|x| positive(errors, x, "output_transistor_abs_max_mw", "mW") / 1000.0);
    let high_output = match rf.high_output.as_ref().map(|h| h.get_ref().as_str()) {
        None | Some("rows") => HighOutput::Rows,
        Some("ttl") => HighOutput::Ttl,
        Some("rated-at-ttl") => HighOutput::RatedAtTtl,
        Some(other) => {
            let h = rf.high_output.as_ref().expect("matched Some above");
            err(
                errors,
                h.span(),
                format!("family {id}: unknown high_output `{other}`: expected \"rows\", \"ttl\" or \"rated-at-ttl\""),
            );
            HighOutput::Rows
        }
    };
    if rf.point.is_empty() {
        err(
            errors,
            span.clone(),
            format!("family {id} has no `[[family.point]]`: at least one supply point is needed"),
        );
    }
    let mut points = Vec::new();
    for rp in rf.point {
        let pspan = rp.span();
        if let Some(p) = convert_point(
            &id,
            rp.into_inner(),
            pspan,
            (supply.min, supply.max),
            errors,
        ) {
            points.push(p);
        }
    }
    points.sort_by(|a, b| a.vcc.total_cmp(&b.vcc));
    for w in points.windows(2) {
        if same_v(w[0].vcc, w[1].vcc) {
            err(
                errors,
                w[1].span.clone(),
                format!("family {id}: two points at vcc {} V", w[1].vcc),
            );
        }
    }
    let with_buffer = points.iter().filter(|p| p.buffer.is_some()).count();
    if with_buffer != 0 && with_buffer != points.len() {
        if let Some(p) = points.iter().find(|p| p.buffer.is_none()) {
            err(
                errors,
                p.span.clone(),
                format!(
                    "family {id}: `buffer` is given at {with_buffer} of {} points; give it at every point or none",
                    points.len()
                ),
            );
        }
    }
    let aliases = rf
        .aliases
        .iter()
        .map(|a| a.get_ref().trim().to_string())
        .collect::<Vec<_>>();
    for a in &rf.aliases {
        if a.get_ref().trim().is_empty() {
            err(errors, a.span(), format!("family {id}: an alias is empty"));
        }
    }
    if errors.len() > before {
        return None;
    }
    Some(Family {
        id,
        name: rf.name,
        input,
        technology,
        supply_min: supply.min,
        supply_nominal: supply.nominal,
        supply_max: supply.max,
        input_max_v,
        clamp_above_supply_v,
        internal_input_pullup_ohm,
        high_output,
        output_abs_max_a,
        output_transistor_abs_max_w,
        source: rf.source,
        aliases,
        points,
        span,
        shipped: false,
    })
}

fn convert_point(
    id: &str,
    rp: RawPoint,
    span: Range<usize>,
    (smin, smax): (f64, f64),
    errors: &mut Vec<RuleError>,
) -> Option<Point> {
    let before = errors.len();
    let vcc = finite(errors, &rp.vcc, "vcc");
    if vcc.is_finite() && (vcc < smin - 1e-9 || vcc > smax + 1e-9) {
        err(
            errors,
            rp.vcc.span(),
            format!("family {id}: point vcc {vcc} V is outside the supply range {smin}..{smax} V"),
        );
    }
    let vih_min = finite(errors, &rp.vih_min, "vih_min");
    let vil_max = finite(errors, &rp.vil_max, "vil_max");
    if vih_min <= vil_max {
        err(
            errors,
            rp.vih_min.span(),
            format!(
                "family {id} at {vcc} V: vih_min {vih_min} V must be above vil_max {vil_max} V"
            ),
        );
    }
    if vih_min > vcc {
        err(
            errors,
            rp.vih_min.span(),
            format!("family {id} at {vcc} V: vih_min {vih_min} V is above vcc"),
        );
    }
    if vil_max < 0.0 {
        err(
            errors,
            rp.vil_max.span(),
            format!("family {id} at {vcc} V: vil_max {vil_max} V is negative"),
        );
    }
    let iih = finite(errors, &rp.iih_max_ua, "iih_max_ua");
    if iih < 0.0 {
        err(
            errors,
            rp.iih_max_ua.span(),
            format!(
                "family {id} at {vcc} V: iih_max_ua {iih} must not be negative (into the input)"
            ),
        );
    }
    let iil = finite(errors, &rp.iil_max_ma, "iil_max_ma");
    if iil > 0.0 {
        err(
            errors,
            rp.iil_max_ma.span(),
            format!("family {id} at {vcc} V: iil_max_ma {iil} must be negative or zero (current out of the input)"),
        );
    }
    let ioz = finite(errors, &rp.ioz_ua, "ioz_ua");
    if ioz < 0.0 {
        err(
            errors,
            rp.ioz_ua.span(),
            format!("family {id} at {vcc} V: ioz_ua {ioz} is a magnitude and must not be negative"),
        );
    }
    let ocl = finite(errors, &rp.oc_leakage_ua, "oc_leakage_ua");
    if ocl < 0.0 {
        err(
            errors,
            rp.oc_leakage_ua.span(),
            format!("family {id} at {vcc} V: oc_leakage_ua {ocl} is a magnitude and must not be negative"),
        );
    }
    let output = convert_output(
        id,
        vcc,
        "",
        &rp.ioh_max_ma,
        &rp.iol_max_ma,
        &rp.voh,
        &rp.vol,
        errors,
    );
    let buffer = rp.buffer.as_ref().map(|b| {
        let b = b.get_ref();
        convert_output(
            id,
            vcc,
            "buffer ",
            &b.ioh_max_ma,
            &b.iol_max_ma,
            &b.voh,
            &b.vol,
            errors,
        )
    });
    if errors.len() > before {
        return None;
    }
    Some(Point {
        vcc,
        vih_min,
        vil_max,
        iih_max: iih * 1e-6,
        iil_max: iil * 1e-3,
        ioz: ioz * 1e-6,
        oc_leakage: ocl * 1e-6,
        output,
        buffer,
        span,
    })
}

#[allow(clippy::too_many_arguments)]
fn convert_output(
    id: &str,
    vcc: f64,
    what: &str,
    ioh: &Spanned<f64>,
    iol: &Spanned<f64>,
    voh: &Spanned<Vec<Spanned<RawVI>>>,
    vol: &Spanned<Vec<Spanned<RawVI>>>,
    errors: &mut Vec<RuleError>,
) -> Output {
    let ioh_ma = finite(errors, ioh, "ioh_max_ma");
    if ioh_ma > 0.0 {
        err(
            errors,
            ioh.span(),
            format!("family {id} at {vcc} V: {what}ioh_max_ma {ioh_ma} must be negative (current out of the output)"),
        );
    }
    let iol_ma = finite(errors, iol, "iol_max_ma");
    if iol_ma < 0.0 {
        err(errors, iol.span(), format!("family {id} at {vcc} V: {what}iol_max_ma {iol_ma} must be positive (into the output)"));
    }
    let voh = convert_rows(id, vcc, what, "voh", voh, -1.0, errors);
    let vol = convert_rows(id, vcc, what, "vol", vol, 1.0, errors);
    Output {
        ioh_max: ioh_ma * 1e-3,
        iol_max: iol_ma * 1e-3,
        voh,
        vol,
    }
}

fn convert_rows(
    id: &str,
    vcc: f64,
    what: &str,
    key: &str,
    rows: &Spanned<Vec<Spanned<RawVI>>>,
    sign: f64,
    errors: &mut Vec<RuleError>,
) -> Vec<VI> {
    if rows.get_ref().is_empty() {
        err(errors, rows.span(), format!("family {id} at {vcc} V: {what}{key} has no rows: give at least one level and current"));
    }
    let mut out = Vec::new();
    let mut last_ma = -1.0;
    for row in rows.get_ref() {
        let r = row.get_ref();
        if !r.v.is_finite() || !r.ma.is_finite() {
            err(
                errors,
                row.span(),
                format!("family {id} at {vcc} V: {what}{key} row must hold finite numbers"),
            );
            continue;
        }
        if r.v < 0.0 || r.v > vcc {
            err(
                errors,
                row.span(),
                format!(
                    "family {id} at {vcc} V: {what}{key} level {} V is outside 0..{vcc} V",
                    r.v
                ),
            );
        }
        if r.ma * sign < 0.0 {
            let dir = if sign < 0.0 {
                "negative (out of the pin)"
            } else {
                "positive (into the pin)"
            };
            err(
                errors,
                row.span(),
                format!(
                    "family {id} at {vcc} V: {what}{key} current {} mA must be {dir}",
                    r.ma
                ),
            );
        }
        if r.ma.abs() <= last_ma {
            err(
                errors,
                row.span(),
                format!(
                    "family {id} at {vcc} V: {what}{key} rows must go from the lightest load to the heaviest; {} mA follows {last_ma} mA",
                    r.ma.abs()
                ),
            );
        }
        last_ma = r.ma.abs();
        out.push(VI {
            v: r.v,
            a: r.ma * 1e-3,
        });
    }
    out
}

/// Duplicate ids, and aliases that name two families.
fn check_names(families: &[Family], errors: &mut Vec<RuleError>) {
    for (i, f) in families.iter().enumerate() {
        for g in &families[..i] {
            if g.id.eq_ignore_ascii_case(&f.id) {
                err(
                    errors,
                    f.span.clone(),
                    format!("family id {} is defined twice (also as {})", f.id, g.id),
                );
            }
        }
        for a in &f.aliases {
            for (j, g) in families.iter().enumerate() {
                let clash_id = g.id.eq_ignore_ascii_case(a);
                let clash_alias = j < i && g.aliases.iter().any(|b| b.eq_ignore_ascii_case(a));
                if clash_id || clash_alias {
                    err(
                        errors,
                        f.span.clone(),
                        format!("family {}: alias {a} also names family {}", f.id, g.id),
                    );
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The shipped table decodes a family only when it is asked for, by id or alias, and a
    /// project's family of the same id replaces it without decoding the others.
    #[test]
    fn shipped_families_are_decoded_when_asked_for() {
        let decoded = |t: &FamilyTable| {
            t.families
                .iter()
                .filter(|e| e.family.get().is_some())
                .count()
        };
        let mut t = FamilyTable::builtin();
        assert!(t.len() > 20, "{}", t.len());
        assert_eq!(decoded(&t), 0);
        assert_eq!(t.get("74hc").map(|f| f.id.as_str()), Some("74HC"));
        assert_eq!(decoded(&t), 1);
        let (id, alias) = t
            .families
            .iter()
            .find_map(|e| Some((e.id.clone(), e.aliases.first()?.clone())))
            .expect("a shipped family with an alias");
        assert_eq!(
            t.get(&alias.to_ascii_lowercase())
                .map(|f| f.id.to_ascii_uppercase()),
            Some(id.to_string())
        );
        assert!(decoded(&t) <= 2);
        let mut over = FamilyTable::parse(BUILTIN_TEXT).expect("the shipped text parses");
        over.families.retain(|e| e.id == "74LS");
        over.families[0].family.get_mut().expect("parsed").name = "replaced".into();
        over.reindex();
        let n = t.len();
        t.merge(over);
        assert_eq!(t.len(), n);
        assert_eq!(t.get("74LS").map(|f| f.name.as_str()), Some("replaced"));
        assert!(decoded(&t) <= 3, "{}", decoded(&t));
        // every family decodes to what the text gives
        assert_eq!(
            FamilyTable::builtin(),
            FamilyTable::parse_shipped().expect("parses")
        );
    }

    const ONE: &str = r#"
[[family]]
id = "X"
name = "test family"
input = "cmos"
technology = "cmos"
supply = { min = 2.0, nominal = 4.0, max = 6.0 }
source = "invented for a unit test"

[[family.point]]
vcc = 2.0
vih_min = 1.5
vil_max = 0.5
iih_max_ua = 1
iil_max_ma = -0.001
ioz_ua = 5
oc_leakage_ua = 5
ioh_max_ma = -1
iol_max_ma = 1
voh = [{ v = 1.9, ma = -0.1 }, { v = 1.5, ma = -1 }]
vol = [{ v = 0.1, ma = 0.1 }, { v = 0.5, ma = 1 }]

[[family.point]]
vcc = 6.0
vih_min = 4.5
vil_max = 1.5
iih_max_ua = 1
iil_max_ma = -0.001
ioz_ua = 5
oc_leakage_ua = 5
ioh_max_ma = -5
iol_max_ma = 5
voh = [{ v = 5.9, ma = -0.1 }, { v = 5.0, ma = -5 }]
vol = [{ v = 0.1, ma = 0.1 }, { v = 0.6, ma = 5 }]
"#;

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() < 1e-9
    }

    #[test]
    fn midpoint_is_halfway_in_every_figure() {
        // Invented two-point family: at 4 V every figure is the mean of the 2 V and 6 V ones.
        let t = FamilyTable::parse(ONE).expect("test table parses");
        let f = t.get("x").expect("case-insensitive id");
        let l = f.levels(4.0, Drive::Standard);
        assert_eq!(
            l.basis,
            Basis::Interpolated {
                below: 2.0,
                above: 6.0
            }
        );
        assert!(close(l.vih_min, 3.0) && close(l.vil_max, 1.0));
        assert!(close(l.ioh_max, -3e-3) && close(l.iol_max, 3e-3));
        assert!(close(l.voh[1].v, 3.25) && close(l.voh[1].a, -3e-3));
        assert!(close(l.vol[1].v, 0.55) && close(l.vol[1].a, 3e-3));
    }

    #[test]
    fn extrapolation_continues_thresholds_and_keeps_the_nearest_outputs() {
        let t = FamilyTable::parse(ONE).expect("test table parses");
        let f = t.get("X").expect("present");
        // 1.0 V: thresholds on the 2-6 V line (VIH 1.5 - 0.75 = 0.75 V). The line through the
        // ratings (-1, -5 mA) would give 0 mA; the 2 V point's -1 mA is kept instead, with its
        // VOH drops (0.1 V, 0.5 V) below the new VCC.
        let l = f.levels(1.0, Drive::Standard);
        assert_eq!(l.basis, Basis::Extrapolated { nearest: 2.0 });
        assert!(close(l.vih_min, 0.75) && close(l.vil_max, 0.25));
        assert!(close(l.ioh_max, -1e-3) && close(l.iol_max, 1e-3));
        assert!(close(l.voh[0].v, 0.9) && close(l.voh[1].v, 0.5) && close(l.voh[1].a, -1e-3));
        assert!(close(l.vol[1].v, 0.5));
        // 8 V, above: 6 V ratings kept (5 mA, not 7 mA), VOH drop 1.0 V kept: 7.0 V @ -5 mA.
        let l = f.levels(8.0, Drive::Standard);
        assert_eq!(l.basis, Basis::Extrapolated { nearest: 6.0 });
        assert!(close(l.vih_min, 6.0));
        assert!(close(l.iol_max, 5e-3));
        assert!(close(l.voh[1].v, 7.0) && close(l.voh[1].a, -5e-3));
    }

    #[test]
    fn level_at_rules() {
        let rows = [
            VI { v: 2.7, a: -1e-3 },
            VI { v: 2.4, a: -3e-3 },
            VI { v: 2.0, a: -15e-3 },
        ];
        assert_eq!(level_at(&rows, 0.0), Some(2.7));
        assert_eq!(level_at(&rows, -0.5e-3), Some(2.7));
        assert!(close(level_at(&rows, -2e-3).unwrap_or(f64::NAN), 2.55));
        assert!(close(level_at(&rows, -9e-3).unwrap_or(f64::NAN), 2.2));
        assert_eq!(level_at(&rows, -15e-3), Some(2.0));
        assert_eq!(level_at(&rows, -15.1e-3), None);
        assert_eq!(level_at(&[], -1e-3), None);
    }

    #[test]
    fn every_problem_is_listed() {
        let bad = ONE
            .replace("vih_min = 1.5", "vih_min = 0.4")
            .replace("ioh_max_ma = -5", "ioh_max_ma = 5")
            .replace("{ v = 5.9, ma = -0.1 }", "{ v = 6.5, ma = -0.1 }");
        let errs = FamilyTable::parse(&bad).expect_err("three problems");
        assert_eq!(errs.len(), 3, "{errs:?}");
        assert!(errs.iter().all(|e| e.span.is_some()));
        assert!(errs.iter().any(|e| e
            .message
            .contains("vih_min 0.4 V must be above vil_max 0.5 V")));
        assert!(errs
            .iter()
            .any(|e| e.message.contains("ioh_max_ma 5 must be negative")));
        assert!(errs
            .iter()
            .any(|e| e.message.contains("voh level 6.5 V is outside 0..6 V")));
    }

    #[test]
    fn rows_out_of_order_are_refused() {
        let bad = ONE.replace(
            "voh = [{ v = 1.9, ma = -0.1 }, { v = 1.5, ma = -1 }]",
            "voh = [{ v = 1.5, ma = -1 }, { v = 1.9, ma = -0.1 }]",
        );
        let errs = FamilyTable::parse(&bad).expect_err("out of order");
        assert!(
            errs[0].message.contains("lightest load to the heaviest"),
            "{errs:?}"
        );
    }

    #[test]
    fn ttl_pullup_on_cmos_family_is_refused() {
        let bad = ONE.replace("source =", "internal_input_pullup_ohm = 4000\nsource =");
        let errs = FamilyTable::parse(&bad).expect_err("cmos with pull-up");
        assert!(errs[0].message.contains("ttl inputs only"), "{errs:?}");
    }

    #[test]
    fn buffer_falls_back_to_standard_when_absent() {
        let t = FamilyTable::parse(ONE).expect("parses");
        let l = t.get("X").expect("present").levels(2.0, Drive::Buffer);
        assert_eq!(l.drive, Drive::Standard);
        assert!(close(l.iol_max, 1e-3));
    }
}
