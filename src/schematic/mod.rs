//! The schematic reader: a KiCad 6-9 project read from its root sheet into the same
//! [`Netlist`] model the netlist readers build, so every check runs on a schematic
//! unchanged.
//!
//! * [`load`]: the root sheet and every sheet below it, read once each and joined into one
//!   [`SourceFile`] made of several files (spans point into the sheet where an item is
//!   drawn); the uses of sheets as a tree of sheet paths; missing sheets and recursion.
//! * [`sheet`]: one sheet file's items, each root item read from a syntax tree of its own.
//! * [`symbol`]: units, body styles and pin positions under rotation and mirroring.
//! * [`connect`]: items joined at their connection points into pieces, per use of a sheet.
//! * [`bus`]: bus names and their members.
//! * [`names`]: how a net takes its name.
//!
//! This module joins the pieces across the project (labels by name on a sheet, global
//! labels and power pins by name everywhere, sheet pins with the child's hierarchical
//! labels, bus members through sheet pins and global bus labels), names each net, and
//! builds the model. Like KiCad, nets that end with the same name are one net.

pub mod bus;
pub mod connect;
pub mod load;
pub mod names;
pub mod sheet;
pub mod symbol;

use std::borrow::Cow;

use rustc_hash::FxHashMap as HashMap;

use crate::diag::Diag;
use crate::netlist::{
    Component, Field, LibPart, LibPin as ModelLibPin, LibSource, Net, Netlist, Node, NodeTexts,
    PinType, Text,
};
use crate::source::{SourceFile, Span};

use connect::{Dsu, PinAt};
use load::{Failed, Files};
use names::{Candidate, Chosen, Strength};
use sheet::{LabelKind, LibSym, Placed, Power, SText};

pub use load::sniff_sheet;

/// Reads the root sheet `path` and every sheet below it (`max_bytes` per file).
pub fn open(path: &str, max_bytes: u64) -> Result<Files, Box<Failed>> {
    load::read_files(path, max_bytes)
}

/// True when `text` begins like a KiCad 6-9 sheet (`(kicad_sch`).
pub fn is_sheet(text: &str) -> bool {
    let t = text.trim_start_matches('\u{feff}').trim_start();
    t.strip_prefix('(')
        .map(|r| r.trim_start().starts_with("kicad_sch"))
        .unwrap_or(false)
}

fn txt<'a>(s: impl Into<Cow<'a, str>>, span: Span) -> Text<'a> {
    match s.into() {
        Cow::Borrowed(s) => Text::borrowed(s, span),
        Cow::Owned(s) => Text::owned(&s, span),
    }
}

/// [`txt`] of a text the sheet holds, without a copy of an owned one on the way.
fn txt_of<'a>(s: &SText<'a>, span: Span) -> Text<'a> {
    if s.is_borrowed() {
        Text::borrowed(s.clone().unwrap_borrowed(), span)
    } else {
        Text::owned(s, span)
    }
}

/// A symbol's library and part names (`lib:part`; no library without a colon), borrowed
/// from the file when its identifier is.
fn lib_and_part<'a>(id: &SText<'a>) -> (SText<'a>, SText<'a>) {
    if id.is_borrowed() {
        let s = id.clone().unwrap_borrowed();
        match s.split_once(':') {
            Some((l, p)) => (SText::borrowed(l), SText::borrowed(p)),
            None => (SText::borrowed(""), SText::borrowed(s)),
        }
    } else {
        match id.split_once(':') {
            Some((l, p)) => (SText::owned(l.to_string()), SText::owned(p.to_string())),
            None => (SText::borrowed(""), SText::owned(id.to_string())),
        }
    }
}

/// The reference of a symbol with neither instance data nor a `Reference` property.
static NO_REFERENCE: SText<'static> = SText::const_str("?");

/// One placed symbol in one use of a sheet, with its instance data resolved: a view made
/// when it is read ([`Placements::get`]), never kept.
#[derive(Clone, Copy)]
struct Placement<'p, 'a> {
    placed: &'p Placed<'a>,
    lib: &'p LibSym<'a>,
    /// The use's reference, with the span a diagnostic points at.
    reference: &'p Text<'a>,
    unit: u32,
    /// Where this placement is among all placements of all uses (its reference's index).
    at: usize,
    /// In the netlist: not a `#` reference (power symbols, flags) and on the board.
    listed: bool,
}

/// What a placed symbol is in every use of its sheet: its library symbol, found once per
/// sheet file.
struct Sym<'p, 'a> {
    placed: &'p Placed<'a>,
    lib: &'p LibSym<'a>,
}

/// The placed symbols of every use of a sheet: what is the same in every use kept once per
/// sheet file, and per use only what its instance data says of each symbol (a file used by
/// four sheets would otherwise hold four of everything). The instance data itself is read
/// once, as the uses are laid out, and given back then.
struct Placements<'p, 'a> {
    /// Per sheet file (empty for a file with no use yet), per placed symbol.
    syms: Vec<Vec<Sym<'p, 'a>>>,
    /// Each use's sheet file, and where its symbols start in the lists below.
    file: Vec<u32>,
    first: Vec<u32>,
    /// Per placement: its unit. Its reference (the text of its instance, else of its
    /// `Reference` property; the span of its own `Reference` property where it has one) is
    /// kept among the node texts at the same index, for its nodes to name.
    units: Vec<u32>,
    /// Per placement: listed in the netlist (not a `#` reference, such as a power symbol's
    /// or a flag's, and on the board); and how many are.
    listed: Vec<bool>,
    listed_count: usize,
    /// KiCad 6 only (empty in a later file): per placement, the value and footprint its
    /// instance gives, with the span of the symbol's own property where it says the same.
    kicad6: Vec<[Option<(SText<'a>, Span)>; 2]>,
}

impl<'p, 'a> Placements<'p, 'a> {
    /// The symbols of the sheet file `file`, each with its library symbol (a placed symbol
    /// with none in the sheet is an error at its library name).
    fn syms_of(sh: &'p sheet::Sheet<'a>) -> Result<Vec<Sym<'p, 'a>>, Diag> {
        let mut out = Vec::with_capacity(sh.symbols.len());
        for placed in &sh.symbols {
            let Some(lib) = sh.lib.get(&placed.lib_key) else {
                return Err(Diag::error(
                    "missing-library-symbol",
                    format!(
                        "the symbol `{}` is placed but its library symbol is not in the sheet's `lib_symbols`",
                        placed.lib_key
                    ),
                )
                .at(placed.lib_key_span, "no library symbol with this name in the file")
                .with_help("open the sheet in KiCad and save it, or update the symbol from its library, so the file carries the symbol it uses"));
            };
            out.push(Sym { placed, lib });
        }
        Ok(out)
    }

    /// Keeps what the instance data `inst` of `placed` says for one use (`None`: the symbol
    /// has none for it), the reference among the node texts `t`.
    fn add(
        &mut self,
        t: &mut NodeTexts<'a>,
        placed: &Placed<'a>,
        inst: Option<&sheet::Instance<'a>>,
        modern: bool,
    ) {
        let own = placed.prop("Reference");
        // a KiCad 6 instance lives in the root sheet: the reference points at the symbol's
        // own property in the sheet where it is drawn (even when that sheet's text is another
        // use's reference or `R?`)
        let (reference, span) = match (inst, own) {
            (Some(i), Some(p)) => (&i.reference, p.value_span),
            (Some(i), None) => (&i.reference, i.reference_span),
            (None, Some(p)) => (&p.value, p.value_span),
            (None, None) => (&NO_REFERENCE, placed.span),
        };
        let listed = !reference.starts_with('#') && placed.on_board;
        self.listed.push(listed);
        self.listed_count += usize::from(listed);
        let at = t.reference(txt_of(reference, span));
        debug_assert_eq!(at as usize, self.units.len());
        self.units
            .push(inst.and_then(|i| i.unit).unwrap_or(placed.unit));
        if !modern {
            // the span of the symbol's own property `name` when its text is the instance's
            let own_span = |name: &str, (v, s): &(SText<'a>, Span)| {
                let s = placed
                    .prop(name)
                    .filter(|p| p.value == *v)
                    .map_or(*s, |p| p.value_span);
                (v.clone(), s)
            };
            self.kicad6.push([
                inst.and_then(|i| i.value.as_deref())
                    .map(|v| own_span("Value", v)),
                inst.and_then(|i| i.footprint.as_deref())
                    .map(|v| own_span("Footprint", v)),
            ]);
        }
    }

    /// How many symbols use `ui` places.
    fn count(&self, ui: usize) -> usize {
        self.syms[self.file[ui] as usize].len()
    }

    /// The library symbol of symbol `s` in use `ui`.
    #[inline]
    fn lib(&self, ui: usize, s: usize) -> &'p LibSym<'a> {
        self.syms[self.file[ui] as usize][s].lib
    }

    /// Symbol `s` of use `ui`: the symbol, its library symbol, and where the placement is
    /// among all placements of all uses.
    #[inline(always)]
    fn sym(&self, ui: usize, s: usize) -> (&'p Placed<'a>, &'p LibSym<'a>, usize) {
        let sym = &self.syms[self.file[ui] as usize][s];
        (sym.placed, sym.lib, self.first[ui] as usize + s)
    }

    /// Symbol `s` of use `ui`, with that use's instance data (its reference among the node
    /// texts `t`).
    #[inline(always)]
    fn get<'r>(&'r self, t: &'r NodeTexts<'a>, ui: usize, s: usize) -> Placement<'r, 'a> {
        let sym = &self.syms[self.file[ui] as usize][s];
        let placed = sym.placed;
        let at = self.first[ui] as usize + s;
        let reference = t.reference_at(at as u32);
        Placement {
            placed,
            lib: sym.lib,
            reference,
            unit: self.units[at],
            at,
            listed: self.listed[at],
        }
    }

    /// The value and footprint a KiCad 6 instance gives placement `at` (none in a later
    /// file).
    fn kicad6(&self, at: usize) -> [Option<(SText<'a>, Span)>; 2] {
        self.kicad6.get(at).cloned().unwrap_or_default()
    }
}

/// Joins texts into one string (the many short names of a project, without the
/// formatting machinery).
fn cat(parts: &[&str]) -> String {
    let mut s = String::with_capacity(parts.iter().map(|p| p.len()).sum());
    for p in parts {
        s.push_str(p);
    }
    s
}

/// Two indices kept as `u32` (a pin's placement and library pin; a node's use and pin), as
/// indices.
fn wide((a, b): (u32, u32)) -> (usize, usize) {
    (a as usize, b as usize)
}

/// The paths a use of a sheet is known by in instance data, made once per use.
struct UsePaths {
    /// `/uuid/uuid` of the sheet symbols from the root down (empty for the root).
    chain: String,
    /// The chain after the root sheet's uuid (KiCad 7 and later).
    full: String,
}

impl UsePaths {
    fn of(root: &sheet::Sheet<'_>, u: &load::Use) -> UsePaths {
        let mut chain = String::new();
        for x in &u.uuids {
            chain.push('/');
            chain.push_str(x);
        }
        let full = cat(&["/", &root.uuid, &chain]);
        UsePaths { chain, full }
    }
}

/// The KiCad 6 instances of the root sheet's list, by path (`/sheet uuids/symbol uuid`): the
/// first of each path, as a search of the list in order finds it.
fn v6_index<'s>(list: &'s [sheet::Instance<'_>]) -> HashMap<&'s str, usize> {
    let mut ix: HashMap<&str, usize> = HashMap::default();
    ix.reserve(list.len());
    for (i, inst) in list.iter().enumerate() {
        ix.entry(inst.path.as_ref()).or_insert(i);
    }
    ix
}

/// The instance data of `placed` in the use whose paths are `paths`: its reference, unit,
/// value and footprint. `own` are the symbol's instances (KiCad 7 and later), `v6_list` the
/// root sheet's (KiCad 6) and `v6` their index.
fn instance<'i, 'a>(
    v6_list: &'i [sheet::Instance<'a>],
    v6: &HashMap<&str, usize>,
    paths: &UsePaths,
    placed: &Placed<'a>,
    own: &'i [sheet::Instance<'a>],
) -> Option<&'i sheet::Instance<'a>> {
    let chain = paths.chain.as_str();
    // KiCad 7 and later: in the symbol, by the path of sheets from the root's uuid
    if let Some(i) = own.iter().find(|i| i.path == paths.full) {
        return Some(i);
    }
    // KiCad 6: in the root's list, by the sheet path and the symbol's uuid
    if !v6.is_empty() {
        let v6_path = cat(&[chain, "/", &placed.uuid]);
        if let Some(&i) = v6.get(v6_path.as_str()) {
            return Some(&v6_list[i]);
        }
    }
    // another project's root: the same sheets below it
    if !chain.is_empty() {
        if let Some(i) = own.iter().find(|i| i.path.ends_with(chain)) {
            return Some(i);
        }
    } else if own.len() == 1 {
        return own.first();
    }
    None
}

/// KiCad's automatic name for a net whose strongest item is a pin.
fn pin_net_name(
    modern: bool,
    pl: &Placement<'_, '_>,
    pin: &sheet::LibPin<'_>,
    unconnected: bool,
) -> String {
    let head = if unconnected {
        "unconnected-("
    } else {
        "Net-("
    };
    let shown: &str = if pin.name == "~" { "" } else { &pin.name };
    if !modern {
        return cat(&[head, pl.reference.as_str(), "-Pad", &pin.num, ")"]);
    }
    if !shown.is_empty() && shown != pin.num {
        let letters = if pl.lib.unit_count > 1 {
            symbol::unit_letters(pl.unit)
        } else {
            String::new()
        };
        let has_multiple = symbol::unit_pins(pl.lib, pl.unit, pl.placed.style)
            .any(|p| p.name == pin.name && p.num != pin.num);
        if unconnected || has_multiple {
            cat(&[
                head,
                pl.reference.as_str(),
                &letters,
                "-",
                shown,
                "-Pad",
                &pin.num,
                ")",
            ])
        } else {
            cat(&[head, pl.reference.as_str(), &letters, "-", shown, ")"])
        }
    } else {
        cat(&[head, pl.reference.as_str(), "-Pad", &pin.num, ")"])
    }
}

/// Lists made for a use of a sheet, kept once for all the uses that share them and read by
/// use (`x[use]`, `x.iter()` in the order of the uses).
struct PerUse<T> {
    sets: Vec<T>,
    /// Each use's set.
    of: Vec<u32>,
}

impl<T> Default for PerUse<T> {
    fn default() -> Self {
        PerUse {
            sets: Vec::new(),
            of: Vec::new(),
        }
    }
}

impl<T> PerUse<T> {
    fn iter(&self) -> impl Iterator<Item = &T> {
        self.of.iter().map(|&s| &self.sets[s as usize])
    }
}

impl<T> std::ops::Index<usize> for PerUse<T> {
    type Output = T;
    fn index(&self, u: usize) -> &T {
        &self.sets[self.of[u] as usize]
    }
}

/// The power name of placed pin `k` among a set's (pin, name) pairs sorted by pin; empty
/// for a pin that names no power net.
fn power_name_of(names: &[(u32, String)], k: usize) -> &str {
    names
        .binary_search_by_key(&(k as u32), |e| e.0)
        .map_or("", |i| names[i].1.as_str())
}

/// A candidate moved out of its place, an empty name left behind.
fn take_candidate(c: &mut Candidate) -> Candidate {
    Candidate {
        name: std::mem::take(&mut c.name),
        ..*c
    }
}

/// The first KiCad 7 file version: automatic names carry pin names from it on.
const KICAD7: u32 = 20_220_000;
/// The file version of KiCad 7 releases: later versions name power nets by the symbol's
/// value.
const KICAD7_LAST: u32 = 20_230_121;

#[derive(Debug, Clone, PartialEq, Eq, Hash)]
enum Key<'s> {
    Local(usize, &'s str),
    Global(&'s str),
}

fn join_key<'s>(dsu: &mut Dsu, keys: &mut HashMap<Key<'s>, usize>, k: Key<'s>, x: usize) {
    let id = *keys.entry(k).or_insert_with(|| dsu.add());
    dsu.union(id, x);
}

/// Reads the loaded files into the netlist model.
pub fn read(files: &Files) -> Result<Netlist<'_>, Diag> {
    read_source(&files.source)
}

/// Reads a project's joined sheets (or a single sheet's text) into the netlist model.
pub fn read_source(source: &SourceFile) -> Result<Netlist<'_>, Diag> {
    let text = source.text();
    // the reader's steps, each timed with `NETMARGIN_PHASES` (within the `read` phase): the
    // sheets read, the uses laid out, pieces joined, nets named, ordered, parts made, linked
    let tp = crate::phases::start("sch.sheets");
    let mut project = load::project(source)?;
    drop(tp);
    let tp = crate::phases::start("sch.place");
    let mut diags = project.diags.clone();
    let modern = project.sheets[0].version >= KICAD7;
    // the instance data (each placed symbol's, and KiCad 6's list in the root sheet), taken
    // out of the sheets: read once for each use as the uses are laid out, then given back
    let own_instances: Vec<Vec<Box<[sheet::Instance<'_>]>>> = project
        .sheets
        .iter_mut()
        .map(|sh| {
            sh.symbols
                .iter_mut()
                .map(|p| std::mem::take(&mut p.instances))
                .collect()
        })
        .collect();
    let v6_list = std::mem::take(&mut project.sheets[0].symbol_instances);

    // the nodes' texts: each placement's reference as the uses are laid out, each library
    // pin's number and name as its first node is made
    let mut node_texts = NodeTexts::new(text);
    // placements per use; placed pins and pieces per use, kept once for the uses of a sheet
    // file that place the same pins (a file used by several sheets, its units the same)
    let symbols: usize = project
        .uses
        .iter()
        .map(|u| project.sheets[u.file].symbols.len())
        .sum();
    let mut placements = Placements {
        syms: (0..project.sheets.len()).map(|_| Vec::new()).collect(),
        file: Vec::with_capacity(project.uses.len()),
        first: Vec::with_capacity(project.uses.len()),
        units: Vec::with_capacity(symbols),
        listed: Vec::with_capacity(symbols),
        listed_count: 0,
        kicad6: Vec::new(),
    };
    // (placement, libpin) per placed pin
    let mut pins_of: PerUse<Vec<(u32, u32)>> = PerUse::default();
    let mut pieces: PerUse<Vec<connect::Piece>> = PerUse::default();
    // the sets of pins made for each file so far
    let mut sets_of_file: Vec<Vec<u32>> = vec![Vec::new(); project.sheets.len()];
    let v6 = v6_index(&v6_list);
    let mut which: Vec<(u32, u32)> = Vec::new();
    for (ui, u) in project.uses.iter().enumerate() {
        let sh = &project.sheets[u.file];
        if placements.syms[u.file].is_empty() && !sh.symbols.is_empty() {
            placements.syms[u.file] = Placements::syms_of(sh)?;
        }
        let paths = UsePaths::of(&project.sheets[0], u);
        placements.file.push(u.file as u32);
        placements.first.push(placements.units.len() as u32);
        for (placed, own) in sh.symbols.iter().zip(&own_instances[u.file]) {
            let inst = instance(&v6_list, &v6, &paths, placed, own);
            placements.add(&mut node_texts, placed, inst, modern);
        }
        which.clear();
        for pi in 0..sh.symbols.len() {
            let (placed, lib, at) = placements.sym(ui, pi);
            let unit = placements.units[at];
            for (k, lp) in lib.pins.iter().enumerate() {
                if (lp.unit == 0 || lp.unit == unit) && (lp.style == 0 || lp.style == placed.style)
                {
                    which.push((pi as u32, k as u32));
                }
            }
        }
        let known = sets_of_file[u.file]
            .iter()
            .copied()
            .find(|&s| pins_of.sets[s as usize] == which);
        match known {
            Some(s) => {
                pins_of.of.push(s);
                pieces.of.push(s);
            }
            None => {
                // the pins' points, only for a set of pins not made before
                let at: Vec<PinAt> = which
                    .iter()
                    .map(|&(pi, k)| {
                        let (pi, k) = wide((pi, k));
                        let (placed, lib, _) = placements.sym(ui, pi);
                        PinAt {
                            symbol: pi,
                            libpin: k,
                            at: symbol::pin_point(placed, &lib.pins[k]),
                        }
                    })
                    .collect();
                let s = pins_of.sets.len() as u32;
                sets_of_file[u.file].push(s);
                pieces.sets.push(connect::pieces(sh, &at));
                let mut set = std::mem::take(&mut which);
                set.shrink_to_fit();
                pins_of.sets.push(set);
                pins_of.of.push(s);
                pieces.of.push(s);
            }
        }
    }
    drop(which);
    drop(v6);
    drop((v6_list, own_instances));

    // every piece of every use, then keys, in one union-find
    drop(tp);
    let tp = crate::phases::start("sch.join");
    let mut first: Vec<usize> = Vec::with_capacity(pieces.of.len());
    let mut n = 0;
    for p in pieces.iter() {
        first.push(n);
        n += p.len();
    }
    let mut dsu = Dsu::new(n);
    let mut keys: HashMap<Key<'_>, usize> = HashMap::default();
    // power pin names: a power symbol's name is its value from KiCad 8 on, its pin's before
    let value_names = project.sheets[0].version > KICAD7_LAST;
    let power_name = |pl: &Placement<'_, '_>, lp: &sheet::LibPin<'_>| -> String {
        if pl.lib.power != Power::No && value_names {
            if let Some(v) = pl.placed.prop("Value") {
                return v.value.to_string();
            }
        }
        lp.name.to_string()
    };
    let is_power_pin = |pl: &Placement<'_, '_>, lp: &sheet::LibPin<'_>| {
        lp.ptype == PinType::PowerIn && (lp.hidden || pl.lib.power != Power::No)
    };
    // the power names of each set of pins, read in a use that has it
    let mut power_names: PerUse<Vec<(u32, String)>> = PerUse {
        sets: Vec::with_capacity(pieces.sets.len()),
        of: pieces.of.clone(),
    };
    let mut first_use = vec![usize::MAX; pieces.sets.len()];
    for (ui, &s) in pieces.of.iter().enumerate().rev() {
        first_use[s as usize] = ui;
    }
    for (s, &ui) in first_use.iter().enumerate() {
        let mut names_here = Vec::new();
        for p in &pieces.sets[s] {
            if p.is_bus {
                continue;
            }
            for &k in &p.pins {
                let (s, lpi) = wide(pins_of[ui][k]);
                let pl = &placements.get(&node_texts, ui, s);
                let lp = &pl.lib.pins[lpi];
                if is_power_pin(pl, lp) {
                    names_here.push((k as u32, power_name(pl, lp)));
                }
            }
        }
        names_here.sort_unstable_by_key(|e| e.0);
        power_names.sets.push(names_here);
    }
    drop(first_use);
    for (ui, u) in project.uses.iter().enumerate() {
        let sh = &project.sheets[u.file];
        for (pi, p) in pieces[ui].iter().enumerate() {
            let g = first[ui] + pi;
            if p.is_bus {
                continue;
            }
            for &l in &p.labels {
                let lab = &sh.labels[l];
                match lab.kind {
                    LabelKind::Global => join_key(&mut dsu, &mut keys, Key::Global(&lab.text), g),
                    _ => join_key(&mut dsu, &mut keys, Key::Local(ui, &lab.text), g),
                }
            }
        }
    }
    for (ui, p) in pieces.iter().enumerate() {
        for (pi, piece) in p.iter().enumerate() {
            for &k in &piece.pins {
                let name = power_name_of(&power_names[ui], k);
                if !name.is_empty() {
                    let (s, _) = wide(pins_of[ui][k]);
                    let local = placements.lib(ui, s).power == Power::Local;
                    let key = if local {
                        Key::Local(ui, name)
                    } else {
                        Key::Global(name)
                    };
                    join_key(&mut dsu, &mut keys, key, first[ui] + pi);
                }
            }
        }
    }
    // sheet pins with the child's hierarchical labels; bus members through bus pins
    // the pieces (in order) each (use, sheet symbol, sheet pin) is on, found once
    let mut on_sheet_pin: HashMap<(usize, usize, usize), Vec<usize>> = HashMap::default();
    for (ui, ps) in pieces.iter().enumerate() {
        for (i, p) in ps.iter().enumerate() {
            for &(si, k) in &p.sheet_pins {
                let e = on_sheet_pin.entry((ui, si, k)).or_default();
                if e.last() != Some(&(first[ui] + i)) {
                    e.push(first[ui] + i);
                }
            }
        }
    }
    for (ci, u) in project.uses.iter().enumerate() {
        let Some((pu, si)) = u.parent else { continue };
        let parent_sheet = &project.sheets[project.uses[pu].file];
        let child_sheet = &project.sheets[u.file];
        let sub = &parent_sheet.sheets[si];
        for (k, spin) in sub.pins.iter().enumerate() {
            if bus::is_bus(&spin.text) {
                continue;
            }
            let parents: &[usize] = on_sheet_pin.get(&(pu, si, k)).map_or(&[], |v| v);
            for (i, p) in pieces[ci].iter().enumerate() {
                if p.is_bus {
                    continue;
                }
                let hit = p.labels.iter().any(|&l| {
                    let lab = &child_sheet.labels[l];
                    lab.kind == LabelKind::Hier && lab.text == spin.text
                });
                if hit {
                    for &pp in parents {
                        dsu.union(pp, first[ci] + i);
                    }
                }
            }
        }
    }
    // bus member names joined through bus sheet pins: owned names, keyed after the loop
    let mut member_links: Vec<(usize, usize, String)> = Vec::new();
    for (ci, u) in project.uses.iter().enumerate() {
        let Some((pu, si)) = u.parent else { continue };
        let sub = &project.sheets[project.uses[pu].file].sheets[si];
        for spin in &sub.pins {
            if bus::is_bus(&spin.text) {
                for m in bus::members(&spin.text) {
                    member_links.push((pu, ci, m));
                }
            }
        }
    }
    // nets on one bus that carry the name of the same member are one net; on a bus with a
    // global label, that member's name is global
    let mut global_members: Vec<(usize, String)> = Vec::new();
    let mut bus_members: Vec<(usize, usize, String)> = Vec::new(); // (net piece, bus piece, member)
    for (ui, u) in project.uses.iter().enumerate() {
        let sh = &project.sheets[u.file];
        for (bi, b) in pieces[ui].iter().enumerate() {
            if !b.is_bus {
                continue;
            }
            // the bus's names; the strongest (a global label, then a local label, a
            // hierarchical label, a sheet pin; ties by text) names its members, the others'
            // members are the same wires by position
            let mut named: Vec<(Strength, &str)> = Vec::new();
            for &l in &b.labels {
                let lab = &sh.labels[l];
                let st = match lab.kind {
                    LabelKind::Global => Strength::Global,
                    LabelKind::Local => Strength::LocalLabel,
                    LabelKind::Hier => Strength::HierLabel,
                };
                named.push((st, &lab.text));
            }
            for &(s, k) in &b.sheet_pins {
                named.push((Strength::SheetPin, &sh.sheets[s].pins[k].text));
            }
            let Some(&(dst, dtext)) = named
                .iter()
                .max_by(|a, b| a.0.cmp(&b.0).then_with(|| b.1.cmp(a.1)))
            else {
                continue;
            };
            let driver = bus::members(dtext);
            let lists: Vec<Vec<String>> = named.iter().map(|n| bus::members(n.1)).collect();
            for (ni, net) in pieces[ui].iter().enumerate() {
                if !net.buses.contains(&bi) {
                    continue;
                }
                for &nl in &net.labels {
                    let t = &sh.labels[nl].text;
                    let mut hit: Option<usize> = None;
                    for m in &lists {
                        if let Some(i) = m.iter().position(|x| x == t) {
                            hit = Some(if m.len() == driver.len() {
                                i
                            } else {
                                driver.iter().position(|x| x == t).unwrap_or(usize::MAX)
                            });
                            break;
                        }
                    }
                    let Some(i) = hit.filter(|&i| i < driver.len()) else {
                        continue;
                    };
                    bus_members.push((first[ui] + ni, first[ui] + bi, driver[i].clone()));
                    if dst == Strength::Global {
                        global_members.push((first[ui] + ni, driver[i].clone()));
                    }
                }
            }
        }
    }
    let mut bus_keys: HashMap<(usize, &str), usize> = HashMap::default();
    for (net, b, m) in &bus_members {
        let id = *bus_keys
            .entry((*b, m.as_str()))
            .or_insert_with(|| dsu.add());
        dsu.union(id, *net);
    }
    let owned: Vec<String> = member_links
        .iter()
        .map(|m| m.2.clone())
        .chain(global_members.iter().map(|g| g.1.clone()))
        .collect();
    let mut oi = 0;
    for (pu, ci, _) in &member_links {
        let m = owned[oi].as_str();
        oi += 1;
        let a = *keys.entry(Key::Local(*pu, m)).or_insert_with(|| dsu.add());
        let b = *keys.entry(Key::Local(*ci, m)).or_insert_with(|| dsu.add());
        dsu.union(a, b);
    }
    for (g, _) in &global_members {
        let m = owned[oi].as_str();
        oi += 1;
        let a = *keys.entry(Key::Global(m)).or_insert_with(|| dsu.add());
        dsu.union(a, *g);
    }

    // a local or hierarchical label named like a global label (or a member of a global bus
    // label) on the same sheet joins that global net
    let mut global_here: Vec<rustc_hash::FxHashSet<String>> = Vec::new();
    for u in &project.uses {
        let sh = &project.sheets[u.file];
        let mut set = rustc_hash::FxHashSet::default();
        for lab in sh.labels.iter().filter(|l| l.kind == LabelKind::Global) {
            if bus::is_bus(&lab.text) {
                set.extend(bus::members(&lab.text));
            } else {
                set.insert(lab.text.to_string());
            }
        }
        global_here.push(set);
    }
    let mut named_global: Vec<(usize, &str)> = Vec::new(); // (piece, name)
    for (ui, u) in project.uses.iter().enumerate() {
        if global_here[ui].is_empty() {
            continue;
        }
        let sh = &project.sheets[u.file];
        for (pi, p) in pieces[ui].iter().enumerate() {
            if p.is_bus {
                continue;
            }
            for &l in &p.labels {
                let lab = &sh.labels[l];
                if lab.kind != LabelKind::Global && global_here[ui].contains(lab.text.as_ref()) {
                    join_key(&mut dsu, &mut keys, Key::Global(&lab.text), first[ui] + pi);
                    named_global.push((first[ui] + pi, &lab.text));
                }
            }
        }
    }
    let mut global_member_of: HashMap<usize, Vec<&str>> = HashMap::default();
    for &(piece, name) in &named_global {
        global_member_of.entry(piece).or_default().push(name);
    }
    for (net, m) in &global_members {
        global_member_of.entry(*net).or_default().push(m.as_str());
    }
    drop(tp);
    let tp = crate::phases::start("sch.names");
    // candidates per (group, use)
    let depth = |ui: usize| project.uses[ui].uuids.len();
    // the candidate names of each piece group in each use, as ((group, use), candidate) in
    // the order found; its pins (placed pin, no-connect) apart, named only when nothing
    // stronger names the group
    let mut cands: Vec<((u32, u32), Candidate)> = Vec::new();
    let mut pin_cands: Vec<((u32, u32), u32, bool)> = Vec::new();
    // each group with a listed pin numbered in the order its first such pin is found (the
    // order of the nets before sorting), by the group's root in the union-find
    let mut rank_of: Vec<u32> = vec![u32::MAX; dsu.len()];
    let mut groups = 0u32;
    // (group's number, use, placed pin, no-connect) of every listed pin, as found
    let mut found: Vec<(u32, u32, u32, bool)> = Vec::new();
    for (ui, u) in project.uses.iter().enumerate() {
        let sh = &project.sheets[u.file];
        for (pi, p) in pieces[ui].iter().enumerate() {
            if p.is_bus {
                continue;
            }
            let g = dsu.find(first[ui] + pi);
            let key = (g as u32, ui as u32);
            for m in global_member_of
                .get(&(first[ui] + pi))
                .into_iter()
                .flatten()
            {
                cands.push((
                    key,
                    Candidate {
                        strength: Strength::Global,
                        name: m.to_string(),
                        power_symbol: false,
                        output: false,
                    },
                ));
            }
            for &l in &p.labels {
                let lab = &sh.labels[l];
                let (strength, name) = match lab.kind {
                    LabelKind::Global => (Strength::Global, lab.text.to_string()),
                    LabelKind::Local => (Strength::LocalLabel, cat(&[&u.path, &lab.text])),
                    LabelKind::Hier => (Strength::HierLabel, cat(&[&u.path, &lab.text])),
                };
                cands.push((
                    key,
                    Candidate {
                        strength,
                        name,
                        power_symbol: false,
                        output: false,
                    },
                ));
            }
            for &(s, k) in &p.sheet_pins {
                let t = &sh.sheets[s].pins[k].text;
                cands.push((
                    key,
                    Candidate {
                        strength: Strength::SheetPin,
                        name: cat(&[&u.path, t]),
                        power_symbol: false,
                        output: false,
                    },
                ));
            }
            for &k in &p.pins {
                let (s, lpi) = wide(pins_of[ui][k]);
                let pl = &placements.get(&node_texts, ui, s);
                let lp = &pl.lib.pins[lpi];
                let pname = power_name_of(&power_names[ui], k);
                if !pname.is_empty() {
                    let name = if pl.lib.power == Power::Local {
                        cat(&[&u.path, pname])
                    } else {
                        pname.to_string()
                    };
                    cands.push((
                        key,
                        Candidate {
                            strength: Strength::Power,
                            name,
                            power_symbol: pl.lib.power != Power::No,
                            output: false,
                        },
                    ));
                } else if pl.listed {
                    let alone = p.pins.len() == 1 && p.labels.is_empty() && p.sheet_pins.is_empty();
                    let nc = p.no_connect || lp.ptype == PinType::NoConnect || alone;
                    pin_cands.push((key, k as u32, nc));
                }
                if pl.listed {
                    if rank_of[g] == u32::MAX {
                        rank_of[g] = groups;
                        groups += 1;
                    }
                    found.push((rank_of[g], ui as u32, k as u32, p.no_connect));
                }
            }
        }
    }
    // what only the candidates needed
    drop((keys, global_member_of));
    drop((pieces, power_names, dsu, on_sheet_pin));
    // the name of each group with pins in each use, as (group's number, use, name); a pin's
    // name is made only where no stronger candidate names the piece (a pin is the weakest)
    // only groups with listed pins become nets; each (group, use) in one run, in the order
    // found within it
    cands.retain(|e| rank_of[e.0 .0 as usize] != u32::MAX);
    pin_cands.retain(|e| rank_of[e.0 .0 as usize] != u32::MAX);
    cands.sort_by_key(|e| e.0);
    pin_cands.sort_by_key(|e| e.0);
    let mut by_group: Vec<(u32, u32, Candidate)> = Vec::new();
    let (mut ci, mut pj) = (0, 0);
    while ci < cands.len() || pj < pin_cands.len() {
        let key = match (cands.get(ci), pin_cands.get(pj)) {
            (Some(c), Some(p)) => c.0.min(p.0),
            (Some(c), None) => c.0,
            (None, Some(p)) => p.0,
            (None, None) => break,
        };
        let c_end = ci + cands[ci..].iter().take_while(|e| e.0 == key).count();
        let p_end = pj + pin_cands[pj..].iter().take_while(|e| e.0 == key).count();
        let (g, ui) = (key.0 as usize, key.1 as usize);
        // the best name is moved out of its list, not copied
        let best = if c_end == ci {
            let mut named: Vec<Candidate> = pin_cands[pj..p_end]
                .iter()
                .map(|&(_, k, nc)| {
                    let (s, lpi) = wide(pins_of[ui][k as usize]);
                    let pl = &placements.get(&node_texts, ui, s);
                    Candidate {
                        strength: Strength::Pin,
                        name: pin_net_name(modern, pl, &pl.lib.pins[lpi], nc),
                        power_symbol: false,
                        output: false,
                    }
                })
                .collect();
            names::best_at(named.iter()).map(|i| named.swap_remove(i))
        } else {
            names::best_at(cands[ci..c_end].iter().map(|e| &e.1))
                .map(|i| take_candidate(&mut cands[ci + i].1))
        };
        if let Some(b) = best {
            by_group.push((rank_of[g], key.1, b));
        }
        (ci, pj) = (c_end, p_end);
    }
    drop((rank_of, cands, pin_cands));
    by_group.sort_unstable_by_key(|e| (e.0, e.1));
    // the pins by group, each group's in the order found
    found.sort_by_key(|e| e.0);
    let mut net_of_name: HashMap<&str, usize> = HashMap::default();
    // the nets, and every node with its net's index in one list (sorted by net below)
    // at most one net per group and one node per pin found: allocated once
    let mut nets: Vec<Net<'_>> = Vec::with_capacity(groups as usize);
    let mut has_nodes: Vec<bool> = Vec::with_capacity(groups as usize);
    let mut nodes: Vec<(u32, Node<'_>)> = Vec::with_capacity(found.len());
    // where each library symbol's pins start among the node texts; a node's reference is its
    // placement's, kept there as the uses were laid out
    let mut pins_from: HashMap<*const LibSym<'_>, u32> = HashMap::default();
    // both lists are sorted by rank: a cursor walks the pins once, in step with the groups,
    // where a search from the start for each group would jump about the whole list
    let mut pin_at = 0;
    for chosen in by_group.chunk_by(|a, b| a.0 == b.0) {
        let rank = chosen[0].0;
        while pin_at < found.len() && found[pin_at].0 < rank {
            pin_at += 1;
        }
        let pins_end = pin_at + found[pin_at..].iter().take_while(|e| e.0 == rank).count();
        let pins = &found[pin_at..pins_end];
        pin_at = pins_end;
        let ch: Vec<Chosen<'_>> = chosen
            .iter()
            .map(|(_, u, c)| Chosen {
                cand: c,
                depth: depth(*u as usize),
            })
            .collect();
        let Some(name) = names::chain(&ch).map(|c| c.name.as_str()) else {
            continue;
        };
        // a net's span is its first node's: the pin of its first pin found
        let span_of = |&(_, ui, k, _): &(u32, u32, u32, bool)| {
            let (ui, k) = wide((ui, k));
            let (s, lpi) = wide(pins_of[ui][k]);
            let (placed, lib, _) = placements.sym(ui, s);
            placed.pin_span(&lib.pins[lpi].num).unwrap_or(placed.span)
        };
        let idx = match net_of_name.get(name) {
            Some(&i) => i,
            None => {
                net_of_name.insert(name, nets.len());
                // named at its span at once where it has one, not copied again to move it
                let span = pins.first().map_or(Span::default(), span_of);
                nets.push(Net::new(None, Text::owned(name, span), span));
                has_nodes.push(!pins.is_empty());
                nets.len() - 1
            }
        };
        for &(_, ui, k, nc) in pins {
            let (ui, k) = wide((ui, k));
            let (s, lpi) = wide(pins_of[ui][k]);
            let (placed, lib, at) = placements.sym(ui, s);
            let lp = &lib.pins[lpi];
            let span = placed.pin_span(&lp.num).unwrap_or(placed.span);
            if !has_nodes[idx] {
                has_nodes[idx] = true;
                let net = &mut nets[idx];
                net.span = span;
                net.name.set_span(span);
            }
            // the reference kept once per placement, the pin texts once per library pin
            let base = *pins_from
                .entry(lib as *const LibSym<'_>)
                .or_insert_with(|| {
                    let base = node_texts.pin_count();
                    for lp in &lib.pins {
                        let name = (!lp.name.is_empty() && lp.name != "~").then(|| lp.name.clone());
                        node_texts.pin(lp.num.clone(), name);
                    }
                    base
                });
            let node = node_texts.shared(
                span,
                at as u32,
                base + lpi as u32,
                Some(lp.ptype),
                nc || lp.ptype == PinType::NoConnect,
            );
            nodes.push((idx as u32, node));
        }
    }

    drop(tp);
    let tp = crate::phases::start("sch.order");
    drop((net_of_name, pins_from));
    drop((by_group, found, pins_of));

    // KiCad lists nets by name (numbers in names compared as numbers) and each net's pins
    // by reference and number; a pin on two nets is kept in the first, as in its export
    // the names' keys in one list, each beside the next: sorting reads them there, not in an
    // allocation per key spread among the model's (on a large project, a miss a comparison)
    let mut key_bytes: Vec<u8> = Vec::new();
    let mut keyed: Vec<(usize, u32, u32)> = Vec::with_capacity(nets.len());
    for (i, net) in nets.iter().enumerate() {
        let at = key_bytes.len();
        natural_key_into(net.name.as_str(), &mut key_bytes);
        keyed.push((at, (key_bytes.len() - at) as u32, i as u32));
    }
    let key_of = |&(at, len, _): &(usize, u32, u32)| &key_bytes[at..at + len as usize];
    // names alike keep the order found
    keyed.sort_unstable_by(|a, b| key_of(a).cmp(key_of(b)).then(a.2.cmp(&b.2)));
    let order: Vec<usize> = keyed.iter().map(|k| k.2 as usize).collect();
    drop((keyed, key_bytes));
    let mut rank = vec![0u32; nets.len()];
    for (r, &i) in order.iter().enumerate() {
        rank[i] = r as u32;
    }
    let mut slots: Vec<Option<Net<'_>>> = nets.into_iter().map(Some).collect();
    let nets: Vec<Net<'_>> = order
        .iter()
        .map(|&i| slots[i].take().expect("each net once"))
        .collect();
    drop((slots, order, has_nodes));
    for e in &mut nodes {
        e.0 = rank[e.0 as usize];
    }
    drop(rank);
    // by net, in the order each net's nodes were found
    nodes.sort_by_key(|e| e.0);
    // one node per (reference, pin number) in a net, as KiCad writes it (of unnumbered pins
    // on one net, the one with the lowest name)
    let t = &node_texts;
    fn key<'n, 'a>(n: &Node<'a>, t: &'n NodeTexts<'a>) -> (&'n str, &'n str, Option<&'n str>) {
        (n.reference_in(t), n.pin_in(t), n.pinfunction_in(t))
    }
    for run in nodes.chunk_by_mut(|a, b| a.0 == b.0) {
        run.sort_by(|(_, a), (_, b)| key(a, t).cmp(&key(b, t)));
    }
    // the pins first: their texts are few and near, the references many and apart
    nodes.dedup_by(|(nb, b), (na, a)| {
        na == nb && a.pin_in(t) == b.pin_in(t) && a.reference_in(t) == b.reference_in(t)
    });

    drop(tp);
    let tp = crate::phases::start("sch.parts");
    // components (one per reference, units merged) and library parts, as KiCad lists
    // them: sheet by sheet in page order, by reference within a sheet
    let root_uuid = &project.sheets[0].uuid;
    let page_of = |ui: usize| -> String {
        let u = &project.uses[ui];
        let Some((pu, si)) = u.parent else {
            return String::new();
        };
        let chain: String = u.uuids.iter().map(|x| format!("/{x}")).collect();
        let parent_chain: String = project.uses[pu]
            .uuids
            .iter()
            .map(|x| format!("/{x}"))
            .collect();
        let sub = &project.sheets[project.uses[pu].file].sheets[si];
        let v7 = format!("/{root_uuid}{parent_chain}");
        sub.pages
            .iter()
            .find(|p| p.0 == v7)
            .or_else(|| {
                project.sheets[0]
                    .sheet_instances
                    .iter()
                    .find(|p| p.0 == chain)
            })
            .map_or(String::new(), |p| p.1.to_string())
    };
    let mut order: Vec<(usize, String)> =
        (0..project.uses.len()).map(|u| (u, page_of(u))).collect();
    order.sort_by(|a, b| {
        (a.0 != 0)
            .cmp(&(b.0 != 0))
            .then_with(|| natural_cmp(&a.1, &b.1))
    });
    // at most one component per listed placement: allocated once
    let listed = placements.listed_count;
    let mut components: Vec<Component<'_>> = Vec::with_capacity(listed);
    // each reference's component, and each placement's: a listed one's as the components
    // are made, an unlisted one's (a power symbol, a part not on the board) by its reference
    // once they are all made
    let mut comp_of: rustc_hash::FxHashMap<&str, u32> = rustc_hash::FxHashMap::default();
    let mut comp_of_placement: Vec<Option<u32>> = vec![None; placements.units.len()];
    let mut unlisted: Vec<usize> = Vec::new();
    let mut libparts: Vec<LibPart<'_>> = Vec::new();
    let mut lib_of: HashMap<&str, usize> = HashMap::default();
    for &(ui, _) in &order {
        let mut pls: Vec<Placement<'_, '_>> = (0..placements.count(ui))
            .map(|s| placements.get(&node_texts, ui, s))
            .collect();
        pls.sort_by(|a, b| natural_cmp(a.reference.as_str(), b.reference.as_str()));
        for pl in pls {
            if !pl.listed {
                unlisted.push(pl.at);
                continue;
            }
            match comp_of.entry(pl.reference.as_str()) {
                std::collections::hash_map::Entry::Occupied(e) => {
                    comp_of_placement[pl.at] = Some(*e.get());
                    continue;
                }
                std::collections::hash_map::Entry::Vacant(v) => {
                    v.insert(components.len() as u32);
                    comp_of_placement[pl.at] = Some(components.len() as u32);
                }
            }
            let placed = pl.placed;
            let (lib, part) = lib_and_part(&placed.lib_id);
            let key = placed.lib_key.as_ref();
            if !lib_of.contains_key(key) {
                lib_of.insert(key, libparts.len());
                let mut pins: Vec<ModelLibPin<'_>> = Vec::new();
                for lp in pl.lib.pins.iter().filter(|p| p.style <= 1) {
                    if pins.iter().any(|q| *q.num.as_str() == *lp.num) {
                        continue;
                    }
                    pins.push(ModelLibPin {
                        num: txt_of(&lp.num, lp.span),
                        name: (!lp.name.is_empty()).then(|| txt_of(&lp.name, lp.span)),
                        ptype: lp.ptype,
                        span: lp.span,
                    });
                }
                libparts.push(LibPart {
                    lib: Some(txt_of(&lib, placed.lib_key_span)),
                    part: txt_of(&part, placed.lib_key_span),
                    aliases: Vec::new(),
                    description: None,
                    docs: None,
                    footprints: Vec::new(),
                    fields: Vec::new(),
                    pins,
                    span: pl.lib.span,
                });
            }
            let prop_text = |name: &str| {
                placed
                    .prop(name)
                    .filter(|p| !p.value.is_empty())
                    .map(|p| txt_of(&p.value, p.value_span))
            };
            let [kicad6_value, kicad6_footprint] = placements.kicad6(pl.at);
            let value = kicad6_value
                .map(|(v, s)| txt_of(&v, s))
                .or_else(|| prop_text("Value"));
            let footprint = kicad6_footprint
                .filter(|f| !f.0.is_empty())
                .map(|(v, s)| txt_of(&v, s))
                .or_else(|| prop_text("Footprint"));
            let fields: Vec<Field<'_>> = placed
                .props
                .iter()
                .filter(|p| {
                    !matches!(
                        p.name.as_ref(),
                        "Reference" | "Value" | "Footprint" | "Datasheet"
                    )
                })
                .map(|p| Field {
                    name: txt_of(&p.name, p.name_span),
                    value: Some(txt_of(&p.value, p.value_span)),
                    span: p.name_span,
                })
                .collect();
            // as KiCad 8 and later write it in a netlist: `(property (name "dnp"))`
            let dnp = placed.dnp.then(|| Field {
                name: txt("dnp", placed.span),
                value: None,
                span: placed.span,
            });
            let mut comp = Component::new(pl.reference.clone(), placed.span);
            comp.value = value;
            comp.footprint = footprint;
            comp.set_fields(fields.into_iter(), dnp.into_iter());
            comp.libsource = Some(LibSource {
                lib: Some(txt_of(&lib, placed.lib_key_span)),
                part: Some(txt_of(&part, placed.lib_key_span)),
                description: None,
            });
            components.push(comp);
        }
    }
    for at in unlisted {
        comp_of_placement[at] = comp_of
            .get(node_texts.reference_at(at as u32).as_str())
            .copied();
    }
    // each node linked here to the component of its reference (the one component of that
    // reference, as the linking would find it, whether or not the node's placement is
    // listed), found once a placement instead of looked up once a node
    for (_, node) in &mut nodes {
        if let Some(ci) = node
            .reference_number()
            .and_then(|r| comp_of_placement.get(r).copied().flatten())
        {
            node.set_component(ci);
        }
    }
    drop(comp_of_placement);
    let root_span = project.sheets[0].span;
    // the sheets and what was read from them are done with: given back before the model
    // is linked, which needs lists of its own
    drop((comp_of, lib_of, order));
    drop(placements);
    drop(project);
    diags.sort_by_key(|d| d.primary_span().map(|s| s.start));
    drop(tp);
    let _tp = crate::phases::start("sch.link");
    Ok(Netlist::assemble(
        components, libparts, nets, nodes, node_texts, diags, root_span,
    ))
}

/// The whole project read into a model, as one call: the files are kept by the caller so
/// the model can borrow them.
pub fn load(path: &str, max_bytes: u64) -> Result<Files, Box<Failed>> {
    open(path, max_bytes)
}

/// Compares names as KiCad orders nets: runs of digits by their value, the rest by
/// character.
pub fn natural_cmp(a: &str, b: &str) -> std::cmp::Ordering {
    use std::cmp::Ordering;
    let (a, b) = (a.as_bytes(), b.as_bytes());
    // equal bytes compare equal however they are read: start at the first difference, or at
    // the start of the run of digits it falls in (names of one project share long prefixes)
    let mut same = a.iter().zip(b).take_while(|(x, y)| x == y).count();
    while same > 0 && a[same - 1].is_ascii_digit() {
        same -= 1;
    }
    let (mut i, mut j) = (same, same);
    while i < a.len() && j < b.len() {
        if a[i].is_ascii_digit() && b[j].is_ascii_digit() {
            let si = i;
            while i < a.len() && a[i].is_ascii_digit() {
                i += 1;
            }
            let sj = j;
            while j < b.len() && b[j].is_ascii_digit() {
                j += 1;
            }
            // digits are ASCII: the runs compare as bytes, without their leading zeros
            let (da, db) = (trim_zeros(&a[si..i]), trim_zeros(&b[sj..j]));
            let o = da.len().cmp(&db.len()).then_with(|| da.cmp(db));
            if o != Ordering::Equal {
                return o;
            }
        } else {
            if a[i] != b[j] {
                return a[i].cmp(&b[j]);
            }
            i += 1;
            j += 1;
        }
    }
    (a.len() - i).cmp(&(b.len() - j))
}

fn trim_zeros(digits: &[u8]) -> &[u8] {
    let z = digits.iter().take_while(|&&d| d == b'0').count();
    &digits[z..]
}

/// A key whose byte order is [`natural_cmp`]'s order of the names: each run of digits is
/// written as one `0` (any digit compares with any other byte as a `0` does), its length
/// without leading zeros (four bytes, most significant first) and those digits; every
/// other byte as it is. Sorting many names by their keys compares each pair with one
/// `memcmp` instead of reading the names token by token.
pub fn natural_key(name: &str) -> Vec<u8> {
    let mut key = Vec::with_capacity(name.len() + 8);
    natural_key_into(name, &mut key);
    key
}

/// [`natural_key`] written at the end of `key`.
fn natural_key_into(name: &str, key: &mut Vec<u8>) {
    let b = name.as_bytes();
    let mut i = 0;
    while i < b.len() {
        if b[i].is_ascii_digit() {
            let s = i;
            while i < b.len() && b[i].is_ascii_digit() {
                i += 1;
            }
            let d = trim_zeros(&b[s..i]);
            key.push(b'0');
            key.extend_from_slice(&(d.len() as u32).to_be_bytes());
            key.extend_from_slice(d);
        } else {
            key.push(b[i]);
            i += 1;
        }
    }
}

/// Where a span of a project points: the sheet file's name.
pub fn file_of(source: &SourceFile, span: Span) -> &str {
    source.file_at(span.start as usize)
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::cmp::Ordering;

    /// A project of a root sheet and one child sheet, `t/root.kicad_sch` and
    /// `t/child.kicad_sch`, joined into one source as the loader joins them.
    fn root_and_child(root: &str, child: &str) -> SourceFile {
        SourceFile::from_files(
            "t/root.kicad_sch",
            vec![
                ("t/root.kicad_sch".to_string(), root.to_string()),
                ("t/child.kicad_sch".to_string(), child.to_string()),
            ],
        )
    }

    /// The comparison read token by token from the first byte (runs of digits by value).
    fn from_the_start(a: &str, b: &str) -> Ordering {
        let (a, b) = (a.as_bytes(), b.as_bytes());
        let (mut i, mut j) = (0, 0);
        while i < a.len() && j < b.len() {
            if a[i].is_ascii_digit() && b[j].is_ascii_digit() {
                let (si, sj) = (i, j);
                while i < a.len() && a[i].is_ascii_digit() {
                    i += 1;
                }
                while j < b.len() && b[j].is_ascii_digit() {
                    j += 1;
                }
                let da = std::str::from_utf8(&a[si..i])
                    .unwrap()
                    .trim_start_matches('0');
                let db = std::str::from_utf8(&b[sj..j])
                    .unwrap()
                    .trim_start_matches('0');
                let o = da.len().cmp(&db.len()).then_with(|| da.cmp(db));
                if o != Ordering::Equal {
                    return o;
                }
            } else {
                if a[i] != b[j] {
                    return a[i].cmp(&b[j]);
                }
                i += 1;
                j += 1;
            }
        }
        (a.len() - i).cmp(&(b.len() - j))
    }

    /// Starting at the first difference (or its run of digits) orders every pair of names
    /// as reading from the start does: names built from digits, zeros, letters and `/`,
    /// with shared prefixes that end inside and after runs of digits.
    #[test]
    fn natural_order_from_the_first_difference_is_the_same() {
        let atoms = [
            "", "0", "1", "9", "10", "09", "00", "a", "/", "R", "-Pad", "2",
        ];
        let mut names: Vec<String> = Vec::new();
        for x in atoms {
            for y in atoms {
                for z in atoms {
                    names.push(format!("/s{x}{y}/R{z}"));
                    names.push(format!("{x}{y}{z}"));
                }
            }
        }
        let mut seen = 0;
        for a in &names {
            for b in names.iter().step_by(7) {
                assert_eq!(natural_cmp(a, b), from_the_start(a, b), "{a:?} {b:?}");
                seen += 1;
            }
        }
        assert!(seen > 100_000);
        // the sort key orders every pair as the comparison does
        let keys: Vec<Vec<u8>> = names.iter().map(|n| natural_key(n)).collect();
        for (a, ka) in names.iter().zip(&keys) {
            for (b, kb) in names.iter().zip(&keys).step_by(5) {
                assert_eq!(ka.cmp(kb), natural_cmp(a, b), "{a:?} {b:?}");
            }
        }
        let long = "9".repeat(300);
        assert_eq!(
            natural_key(&format!("N{long}")).cmp(&natural_key("N1")),
            Ordering::Greater
        );
        assert_eq!(natural_cmp("/cells_12/R9", "/cells_12/R10"), Ordering::Less);
        assert_eq!(natural_cmp("N10", "N010"), Ordering::Equal);
        assert_eq!(natural_cmp("N199", "N20"), Ordering::Greater);
    }

    /// A symbol's instance, held four times over for a sheet used four times, keeps the
    /// value and footprint only KiCad 6 writes in a box.
    #[test]
    fn an_instance_is_small() {
        assert!(std::mem::size_of::<sheet::Instance<'_>>() <= 80);
    }

    /// A sheet file used by two sheets whose instance data place different units of one
    /// symbol gets each use's own pins: the placed pins and pieces are shared between uses
    /// only when they are the same.
    #[test]
    fn uses_of_a_file_with_different_units_keep_their_own_pins() {
        let root = "(kicad_sch (version 20231120) (uuid \"r\") (lib_symbols)\n\
            (sheet (at 0 0) (size 9 9) (uuid \"sa\") (property \"Sheetname\" \"a\") (property \"Sheetfile\" \"child.kicad_sch\"))\n\
            (sheet (at 20 0) (size 9 9) (uuid \"sb\") (property \"Sheetname\" \"b\") (property \"Sheetfile\" \"child.kicad_sch\"))\n\
            (sheet (at 40 0) (size 9 9) (uuid \"sc\") (property \"Sheetname\" \"c\") (property \"Sheetfile\" \"child.kicad_sch\")))\n";
        let child = "(kicad_sch (version 20231120) (uuid \"c\")\n\
            (lib_symbols (symbol \"D:U\" (symbol \"U_1_1\" (pin passive line (at 0 2.54 270) (name \"~\") (number \"1\")))\n\
              (symbol \"U_2_1\" (pin passive line (at 0 2.54 270) (name \"~\") (number \"2\")))))\n\
            (symbol (lib_id \"D:U\") (at 10 10 0) (unit 1) (uuid \"s1\") (property \"Reference\" \"U\" (at 0 0 0))\n\
              (property \"Value\" \"x\" (at 0 0 0)) (pin \"1\" (uuid \"p1\")) (pin \"2\" (uuid \"p2\"))\n\
              (instances (project \"p\" (path \"/r/sa\" (reference \"U1\") (unit 1)) (path \"/r/sb\" (reference \"U1\") (unit 2))\n\
                (path \"/r/sc\" (reference \"U2\") (unit 1)))))\n\
            (label \"A\" (at 10 7.46 0)))\n";
        let source = root_and_child(root, child);
        let nl = read_source(&source).unwrap();
        let nets: Vec<(String, Vec<(String, String)>)> = nl
            .nets
            .iter()
            .map(|n| {
                let pins = n
                    .nodes(&nl)
                    .iter()
                    .map(|x| (x.reference(&nl).to_string(), x.pin(&nl).to_string()))
                    .collect();
                (n.name.as_str().to_string(), pins)
            })
            .collect();
        let pin = |r: &str, p: &str| (r.to_string(), p.to_string());
        assert_eq!(
            nets,
            vec![
                ("/a/A".to_string(), vec![pin("U1", "1")]),
                ("/b/A".to_string(), vec![pin("U1", "2")]),
                ("/c/A".to_string(), vec![pin("U2", "1")]),
            ]
        );
    }

    /// Nodes keep their reference once per placed symbol and use, and their pin's texts once
    /// per library pin, and each still reads its own: two uses of a sheet whose symbol has
    /// named pins (one of them unnumbered, so numbered by its name) give each node its use's
    /// reference, the span of the symbol's own `Reference` property, and its pin's number
    /// and name.
    #[test]
    fn nodes_share_their_texts_and_keep_their_own() {
        let root = "(kicad_sch (version 20231120) (uuid \"r\") (lib_symbols)\n\
            (sheet (at 0 0) (size 9 9) (uuid \"sa\") (property \"Sheetname\" \"a\") (property \"Sheetfile\" \"child.kicad_sch\"))\n\
            (sheet (at 20 0) (size 9 9) (uuid \"sb\") (property \"Sheetname\" \"b\") (property \"Sheetfile\" \"child.kicad_sch\")))\n";
        let child = "(kicad_sch (version 20231120) (uuid \"c\")\n\
            (lib_symbols (symbol \"D:U\" (symbol \"U_1_1\" (pin input line (at 0 2.54 270) (name \"IN\") (number \"1\"))\n\
              (pin output line (at 0 -2.54 90) (name \"OUT\") (number \"2\")) (pin input line (at 2.54 0 180) (name \"EN\") (number \"\")))))\n\
            (symbol (lib_id \"D:U\") (at 10 10 0) (unit 1) (uuid \"s1\") (property \"Reference\" \"U?\" (at 0 0 0))\n\
              (property \"Value\" \"x\" (at 0 0 0)) (pin \"1\" (uuid \"p1\")) (pin \"2\" (uuid \"p2\")) (pin \"\" (uuid \"p3\"))\n\
              (instances (project \"p\" (path \"/r/sa\" (reference \"U1\") (unit 1)) (path \"/r/sb\" (reference \"U7\") (unit 1)))))\n\
            (label \"A\" (at 10 7.46 0)) (label \"B\" (at 10 12.54 0)) (label \"C\" (at 12.54 10 0)))\n";
        let source = root_and_child(root, child);
        let nl = read_source(&source).unwrap();
        let text = source.text();
        let mut got = Vec::new();
        for n in &nl.nets {
            for x in n.nodes(&nl) {
                assert_eq!(&text[x.reference_span(&nl).range()], "\"U?\"");
                got.push(format!(
                    "{} {}.{}:{}",
                    n.name,
                    x.reference(&nl),
                    x.pin(&nl),
                    x.pinfunction(&nl).unwrap_or("-")
                ));
            }
        }
        assert_eq!(
            got,
            [
                "/a/A U1.1:IN",
                "/a/B U1.2:OUT",
                "/a/C U1.EN:EN",
                "/b/A U7.1:IN",
                "/b/B U7.2:OUT",
                "/b/C U7.EN:EN"
            ]
        );
        // one reference kept for each placed symbol in each use, not one for each node
        assert_eq!(nl.node_texts().apart_count(), 2);
        let refs: Vec<&str> = nl.components.iter().map(|c| c.reference.as_str()).collect();
        assert_eq!(refs, ["U1", "U7"]);
        for c in &nl.components {
            let pins: Vec<(&str, Option<&str>)> =
                c.pins.iter().map(|p| (p.num(&nl), p.name(&nl))).collect();
            assert_eq!(
                pins,
                [("1", Some("IN")), ("2", Some("OUT")), ("EN", Some("EN"))]
            );
            // the library and part names borrowed from the symbol's `lib_id`, with the
            // span of the item
            let ls = c.libsource.as_ref().unwrap();
            let (lib, part) = (ls.lib.as_ref().unwrap(), ls.part.as_ref().unwrap());
            assert_eq!((lib.as_str(), part.as_str()), ("D", "U"));
            assert!(lib.is_borrowed() && part.is_borrowed());
            assert_eq!(&text[lib.span().range()], "(lib_id \"D:U\")");
            assert_eq!(part.span(), lib.span());
        }
    }

    /// A KiCad 6 path listed twice in the root's instances is found at its first entry.
    #[test]
    fn kicad6_instances_by_path_take_the_first() {
        let inst = |path: &'static str, r: &'static str| sheet::Instance {
            path: path.into(),
            reference: r.into(),
            reference_span: Span::default(),
            unit: None,
            value: None,
            footprint: None,
        };
        let root = sheet::Sheet {
            symbol_instances: vec![inst("/a/x", "R1"), inst("/b/x", "R2"), inst("/a/x", "R3")],
            ..Default::default()
        };
        let ix = v6_index(&root.symbol_instances);
        assert_eq!(root.symbol_instances[ix["/a/x"]].reference, "R1");
        assert_eq!(root.symbol_instances[ix["/b/x"]].reference, "R2");
        assert_eq!(ix.len(), 2);
        assert_eq!(cat(&["/", "top", "/"]), "/top/");
    }

    /// The text of every `.kicad_sch` file under `fixtures/`, for tests that hold a reading
    /// to another over every sheet the project has.
    pub(crate) fn fixture_sheets() -> Vec<String> {
        let mut texts = Vec::new();
        let mut dirs = vec![std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("fixtures")];
        while let Some(d) = dirs.pop() {
            for e in std::fs::read_dir(&d).into_iter().flatten().flatten() {
                let p = e.path();
                if p.is_dir() {
                    dirs.push(p);
                } else if p.extension().is_some_and(|x| x == "kicad_sch") {
                    texts.extend(std::fs::read_to_string(&p).ok());
                }
            }
        }
        texts
    }

    /// The reader links each node to its component as it makes the components; the link
    /// must be the one the linking by reference makes (the first component of the node's
    /// reference, none where there is none): every schematic fixture, multi-unit parts and
    /// sheets used twice among them, every node.
    #[test]
    fn a_node_is_linked_to_the_component_of_its_reference() {
        let mut sheets = Vec::new();
        let mut dirs = vec![std::path::PathBuf::from("fixtures/schematics")];
        while let Some(d) = dirs.pop() {
            for e in std::fs::read_dir(&d).unwrap() {
                let p = e.unwrap().path();
                if p.is_dir() {
                    dirs.push(p);
                } else if p.extension().is_some_and(|x| x == "kicad_sch") {
                    sheets.push(p);
                }
            }
        }
        sheets.sort();
        let (mut read, mut nodes, mut linked) = (0, 0, 0);
        for path in &sheets {
            let Ok(files) = load(&path.to_string_lossy(), u64::MAX) else {
                continue;
            };
            let Ok(nl) = read_source(&files.source) else {
                continue;
            };
            read += 1;
            for x in nl.all_nodes() {
                let by_reference = nl.component(x.reference(&nl)).map(|c| c as u32);
                assert_eq!(
                    x.component(),
                    by_reference,
                    "{}: {}",
                    path.display(),
                    x.reference(&nl)
                );
                nodes += 1;
                linked += usize::from(x.component().is_some());
            }
        }
        // ten sheets read, 77 nodes, every one linked when this was written
        assert!(
            read >= 8 && linked >= 50,
            "{read} sheets, {nodes} nodes, {linked} linked"
        );
    }
}
