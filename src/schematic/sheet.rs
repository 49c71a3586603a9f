//! One sheet file read a root item at a time, each from its own syntax tree (or from the
//! whole sheet's tree where that stops, for the error): the library symbols embedded in it,
//! the placed symbols with their instance data, wires, buses, bus entries, junctions,
//! no-connect flags, labels and sub-sheets. Nothing is connected here; every item keeps its span (offsets into
//! the project's joined text, so they point into this sheet's file).

use rustc_hash::FxHashMap as HashMap;

use crate::diag::Diag;
use crate::netlist::PinType;
use crate::sexpr::{self, NodeId, Tree};
use crate::source::Span;

/// A text of a sheet: borrowed from the file's text where it is written as it reads
/// (almost always), owned where it had escapes to undo. Two words where `std`'s
/// `Cow<str>` takes three: a sheet holds several for every symbol placed on it.
pub type SText<'a> = crate::netlist::Str<'a>;

/// A point in the sheet, in 0.1 µm (KiCad's own schematic unit), so positions read from
/// millimetres compare exactly.
pub type Pt = (i64, i64);

/// How a power symbol's name joins nets.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Power {
    /// Not a power symbol.
    No,
    /// Joins every net of the same name in the project.
    Global,
    /// Joins nets of the same name on its own sheet only.
    Local,
}

#[derive(Debug, Clone)]
pub struct LibPin<'a> {
    pub num: SText<'a>,
    pub name: SText<'a>,
    pub ptype: PinType,
    pub hidden: bool,
    /// The connection point, in the symbol's own coordinates (y up).
    pub at: Pt,
    /// 0: common to every unit.
    pub unit: u32,
    /// 0: common to every body style.
    pub style: u32,
    pub span: Span,
}

#[derive(Debug, Clone)]
pub struct LibSym<'a> {
    pub name: SText<'a>,
    pub power: Power,
    pub pins: Vec<LibPin<'a>>,
    /// Highest unit number of its sub-symbols (1 for a single-unit symbol).
    pub unit_count: u32,
    pub span: Span,
}

/// A property of a placed symbol.
#[derive(Debug, Clone)]
pub struct Prop<'a> {
    pub name: SText<'a>,
    pub name_span: Span,
    pub value: SText<'a>,
    pub value_span: Span,
}

/// One use of a placed symbol in one sheet path (KiCad 7 and later keep it in the symbol,
/// KiCad 6 in the root sheet's `symbol_instances`).
#[derive(Debug, Clone)]
pub struct Instance<'a> {
    pub path: SText<'a>,
    pub reference: SText<'a>,
    pub reference_span: Span,
    pub unit: Option<u32>,
    /// KiCad 6 only, and rare there: boxed, so the many instances of later files stay small.
    pub value: Option<Box<(SText<'a>, Span)>>,
    pub footprint: Option<Box<(SText<'a>, Span)>>,
}

#[derive(Debug, Clone)]
pub struct Placed<'a> {
    /// The key of its library symbol in `lib_symbols` (`lib_name` when present, else
    /// `lib_id`).
    pub lib_key: SText<'a>,
    pub lib_key_span: Span,
    pub lib_id: SText<'a>,
    pub at: Pt,
    pub rot: i32,
    pub mirror_x: bool,
    pub mirror_y: bool,
    pub unit: u32,
    pub style: u32,
    pub in_bom: bool,
    pub on_board: bool,
    pub dnp: bool,
    pub uuid: SText<'a>,
    pub props: Box<[Prop<'a>]>,
    /// The `(pin "N" (uuid ..))` entries: where each pin of this symbol is written.
    pub pin_spans: Box<[(SText<'a>, Span)]>,
    pub instances: Box<[Instance<'a>]>,
    pub span: Span,
}

impl<'a> Placed<'a> {
    pub fn prop(&self, name: &str) -> Option<&Prop<'a>> {
        self.props.iter().find(|p| p.name == name)
    }
    pub fn pin_span(&self, num: &str) -> Option<Span> {
        self.pin_spans.iter().find(|p| p.0 == num).map(|p| p.1)
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LabelKind {
    Local,
    Global,
    Hier,
}

#[derive(Debug, Clone)]
pub struct Label<'a> {
    pub kind: LabelKind,
    pub text: SText<'a>,
    pub at: Pt,
    pub span: Span,
}

#[derive(Debug, Clone)]
pub struct SheetPin<'a> {
    pub text: SText<'a>,
    pub at: Pt,
    pub span: Span,
}

#[derive(Debug, Clone)]
pub struct SubSheet<'a> {
    pub uuid: SText<'a>,
    pub name: SText<'a>,
    pub file: SText<'a>,
    /// The sheet-file property's value, to point at when the file cannot be read.
    pub file_span: Span,
    pub pins: Vec<SheetPin<'a>>,
    /// KiCad 7 and later: (sheet path, page number) of each use of this sheet symbol.
    pub pages: Vec<(SText<'a>, SText<'a>)>,
    pub span: Span,
}

#[derive(Debug, Clone, Copy)]
pub struct Segment {
    pub a: Pt,
    pub b: Pt,
}

#[derive(Debug, Clone, Default)]
pub struct Sheet<'a> {
    pub version: u32,
    pub uuid: SText<'a>,
    pub lib: HashMap<SText<'a>, LibSym<'a>>,
    pub symbols: Vec<Placed<'a>>,
    pub wires: Vec<Segment>,
    pub buses: Vec<Segment>,
    pub entries: Vec<Segment>,
    pub junctions: Vec<Pt>,
    pub no_connects: Vec<Pt>,
    pub labels: Vec<Label<'a>>,
    pub sheets: Vec<SubSheet<'a>>,
    /// KiCad 6: the root sheet's `symbol_instances`, by path.
    pub symbol_instances: Vec<Instance<'a>>,
    /// KiCad 6: the root sheet's `sheet_instances`, (path, page number).
    pub sheet_instances: Vec<(SText<'a>, SText<'a>)>,
    pub span: Span,
}

impl Sheet<'_> {
    /// Gives back what the lists of items hold beyond their length.
    fn trim(&mut self) {
        self.symbols.shrink_to_fit();
        self.wires.shrink_to_fit();
        self.buses.shrink_to_fit();
        self.entries.shrink_to_fit();
        self.junctions.shrink_to_fit();
        self.no_connects.shrink_to_fit();
        self.labels.shrink_to_fit();
        self.sheets.shrink_to_fit();
        self.symbol_instances.shrink_to_fit();
        self.sheet_instances.shrink_to_fit();
    }
}

/// Reads a tree of a `.kicad_sch` file. `base` is the offset of the file in the joined
/// text: every span is moved by it.
pub struct Reader<'t, 'a> {
    pub t: &'t Tree<'a>,
    pub base: u32,
}

fn mm(s: &str) -> Option<i64> {
    let v: f64 = s.parse().ok()?;
    if !v.is_finite() || v.abs() > 1e9 {
        return None;
    }
    Some((v * 10_000.0).round() as i64)
}

impl<'t, 'a> Reader<'t, 'a> {
    fn span(&self, id: NodeId) -> Span {
        let s = self.t.span(id);
        Span {
            start: s.start + self.base,
            end: s.end + self.base,
        }
    }
    /// The n-th child (0 is the head).
    fn nth(&self, id: NodeId, n: usize) -> Option<NodeId> {
        self.t.children(id).nth(n)
    }
    fn text(&self, id: NodeId) -> Option<SText<'a>> {
        self.t.text(id).map(SText::from)
    }
    /// The first child list with head `head`.
    fn child(&self, id: NodeId, head: &str) -> Option<NodeId> {
        self.t
            .children(id)
            .find(|&c| self.t.is_list(c) && self.t.head_is(c, head))
    }
    /// `(head value)`: the value's text.
    fn value_of(&self, id: NodeId, head: &str) -> Option<SText<'a>> {
        self.child(id, head)
            .and_then(|c| self.nth(c, 1))
            .and_then(|v| self.text(v))
    }
    /// `(head yes|no)`; the bare flag `head` inside a list counts as yes.
    fn flag(&self, id: NodeId, head: &str) -> Option<bool> {
        for c in self.t.children(id) {
            if self.t.is_list(c) {
                if self.t.head(c) == Some(head) {
                    return Some(
                        self.nth(c, 1)
                            .and_then(|v| self.text(v))
                            .is_none_or(|v| v != "no"),
                    );
                }
            } else if self.t.raw(c) == head {
                return Some(true);
            }
        }
        None
    }
    /// `(at x y [angle])`.
    fn at(&self, id: NodeId) -> Option<(Pt, i32)> {
        let c = self.child(id, "at")?;
        let x = mm(&self.text(self.nth(c, 1)?)?)?;
        let y = mm(&self.text(self.nth(c, 2)?)?)?;
        let rot = self
            .nth(c, 3)
            .and_then(|r| self.text(r))
            .and_then(|r| r.parse::<f64>().ok())
            .map_or(0, |r| r.round() as i32);
        Some(((x, y), rot))
    }
    fn xy(&self, id: NodeId) -> Option<Pt> {
        Some((
            mm(&self.text(self.nth(id, 1)?)?)?,
            mm(&self.text(self.nth(id, 2)?)?)?,
        ))
    }
    fn bad(&self, id: NodeId, what: &str) -> Diag {
        Diag::error(
            "malformed-schematic",
            format!("this {what} is not written as KiCad writes it"),
        )
        .at(self.span(id), format!("a {what}"))
        .with_help("the sheet was damaged or edited by hand: open and save it in KiCad")
    }

    /// Reads the whole sheet; items that cannot be read are reported in `diags` and
    /// skipped, as the netlist reader does.
    pub fn sheet(&self, diags: &mut Vec<Diag>) -> Result<Sheet<'a>, Diag> {
        let root = self.t.root();
        if !self.t.head_is(root, "kicad_sch") {
            return Err(Diag::error(
                "not-a-schematic",
                "this is not a KiCad schematic sheet: it does not begin with `(kicad_sch`",
            )
            .at(self.span(root), "expected `(kicad_sch`"));
        }
        let version = self
            .value_of(root, "version")
            .and_then(|v| v.parse::<u32>().ok())
            .unwrap_or(0);
        let mut sh = Sheet {
            version,
            uuid: self.value_of(root, "uuid").unwrap_or_default(),
            span: self.span(root),
            ..Default::default()
        };
        for c in self.t.children(root).skip(1) {
            if self.t.is_list(c) {
                self.item(c, &mut sh, diags);
            }
        }
        sh.trim();
        Ok(sh)
    }

    /// One of the root's lists, read into the sheet: the library symbols, a placed symbol,
    /// a wire, bus, bus entry, junction, no-connect flag, label, sheet symbol or KiCad 6
    /// instance list; other lists are passed over.
    fn item(&self, c: NodeId, sh: &mut Sheet<'a>, diags: &mut Vec<Diag>) {
        match self.t.head(c).unwrap_or("") {
            "lib_symbols" => {
                for s in self.t.children(c).skip(1) {
                    if self.t.head_is(s, "symbol") {
                        match self.lib_symbol(s) {
                            Some(l) => {
                                sh.lib.insert(l.name.clone(), l);
                            }
                            None => diags.push(self.bad(s, "library symbol")),
                        }
                    }
                }
            }
            "symbol" => match self.placed(c) {
                Some(p) => sh.symbols.push(p),
                None => diags.push(self.bad(c, "symbol")),
            },
            h @ ("wire" | "bus") => match self.segment(c) {
                Some(s) if h == "wire" => sh.wires.push(s),
                Some(s) => sh.buses.push(s),
                None => diags.push(self.bad(c, h)),
            },
            "bus_entry" => {
                let size = self.child(c, "size").and_then(|s| self.xy(s));
                match (self.at(c), size) {
                    (Some((a, _)), Some(d)) => sh.entries.push(Segment {
                        a,
                        b: (a.0 + d.0, a.1 + d.1),
                    }),
                    _ => diags.push(self.bad(c, "bus entry")),
                }
            }
            "junction" => match self.at(c) {
                Some((p, _)) => sh.junctions.push(p),
                None => diags.push(self.bad(c, "junction")),
            },
            "no_connect" => match self.at(c) {
                Some((p, _)) => sh.no_connects.push(p),
                None => diags.push(self.bad(c, "no-connect flag")),
            },
            h @ ("label" | "global_label" | "hierarchical_label") => {
                let kind = match h {
                    "label" => LabelKind::Local,
                    "global_label" => LabelKind::Global,
                    _ => LabelKind::Hier,
                };
                let text = self.nth(c, 1).filter(|&n| !self.t.is_list(n));
                match (text.and_then(|n| self.text(n)), self.at(c)) {
                    (Some(text), Some((at, _))) => sh.labels.push(Label {
                        kind,
                        text,
                        at,
                        span: self.span(text_node_or(c, text_node(self, c))),
                    }),
                    _ => diags.push(self.bad(c, "label")),
                }
            }
            "sheet" => match self.subsheet(c) {
                Some(s) => sh.sheets.push(s),
                None => diags.push(
                    Diag::error(
                        "malformed-schematic",
                        "this sheet symbol has no sheet file: its sheet cannot be read",
                    )
                    .at(self.span(c), "a sheet without `Sheetfile`")
                    .with_help("open the project in KiCad and give the sheet its file"),
                ),
            },
            "sheet_instances" => {
                for p in self.t.children(c).skip(1) {
                    if let Some(x) = self.page(p) {
                        sh.sheet_instances.push(x);
                    }
                }
            }
            "symbol_instances" => {
                for p in self.t.children(c).skip(1) {
                    if let Some(i) = self.instance(p) {
                        sh.symbol_instances.push(i);
                    }
                }
            }
            _ => {}
        }
    }

    fn segment(&self, id: NodeId) -> Option<Segment> {
        let pts = self.child(id, "pts")?;
        let mut it = self
            .t
            .children(pts)
            .skip(1)
            .filter(|&c| self.t.head_is(c, "xy"));
        let a = self.xy(it.next()?)?;
        let b = self.xy(it.next()?)?;
        Some(Segment { a, b })
    }

    fn lib_symbol(&self, id: NodeId) -> Option<LibSym<'a>> {
        let name = self.text(self.nth(id, 1)?)?;
        let power = match self.child(id, "power") {
            None => Power::No,
            Some(p) => match self.nth(p, 1).and_then(|v| self.text(v)).as_deref() {
                Some("local") => Power::Local,
                _ => Power::Global,
            },
        };
        let mut sym = LibSym {
            name,
            power,
            pins: Vec::new(),
            unit_count: 1,
            span: self.span(id),
        };
        for sub in self.t.children(id).skip(1) {
            if !self.t.head_is(sub, "symbol") {
                if self.t.head_is(sub, "pin") {
                    if let Some(p) = self.lib_pin(sub, 0, 0) {
                        sym.pins.push(p);
                    }
                }
                continue;
            }
            let sname = self.nth(sub, 1).and_then(|n| self.text(n))?;
            // `NAME_UNIT_STYLE`
            let mut parts = sname.rsplitn(3, '_');
            let style = parts.next().and_then(|s| s.parse().ok()).unwrap_or(0);
            let unit = parts.next().and_then(|s| s.parse().ok()).unwrap_or(0);
            sym.unit_count = sym.unit_count.max(unit);
            for p in self.t.children(sub).skip(1) {
                if self.t.head_is(p, "pin") {
                    sym.pins.push(self.lib_pin(p, unit, style)?);
                }
            }
        }
        Some(sym)
    }

    fn lib_pin(&self, id: NodeId, unit: u32, style: u32) -> Option<LibPin<'a>> {
        let etype = self.nth(id, 1).and_then(|n| self.text(n))?;
        let (at, _) = self.at(id)?;
        let hidden = self.flag(id, "hide").unwrap_or(false);
        let name = self.value_of(id, "name").unwrap_or_default();
        let num = self.value_of(id, "number").unwrap_or_default();
        Some(LibPin {
            num,
            name,
            ptype: PinType::parse(&etype).0,
            hidden,
            at,
            unit,
            style,
            span: self.span(id),
        })
    }

    fn prop(&self, id: NodeId) -> Option<Prop<'a>> {
        let n = self.nth(id, 1)?;
        let v = self.nth(id, 2)?;
        Some(Prop {
            name: self.text(n)?,
            name_span: self.span(n),
            value: self.text(v)?,
            value_span: self.span(v),
        })
    }

    fn placed(&self, id: NodeId) -> Option<Placed<'a>> {
        let lib_id_node = self.child(id, "lib_id")?;
        let lib_id = self.text(self.nth(lib_id_node, 1)?)?;
        let (lib_key, key_node) = match self.child(id, "lib_name") {
            Some(n) => (self.text(self.nth(n, 1)?)?, n),
            None => (lib_id.clone(), lib_id_node),
        };
        let (at, rot) = self.at(id)?;
        let mirror = self.value_of(id, "mirror");
        let mut p = Placed {
            lib_key,
            lib_key_span: self.span(key_node),
            lib_id,
            at,
            rot,
            mirror_x: mirror.as_deref() == Some("x"),
            mirror_y: mirror.as_deref() == Some("y"),
            unit: self
                .value_of(id, "unit")
                .and_then(|u| u.parse().ok())
                .unwrap_or(1),
            style: self
                .value_of(id, "convert")
                .or_else(|| self.value_of(id, "body_style"))
                .and_then(|u| u.parse().ok())
                .unwrap_or(1),
            in_bom: self.flag(id, "in_bom").unwrap_or(true),
            on_board: self.flag(id, "on_board").unwrap_or(true),
            dnp: self.flag(id, "dnp").unwrap_or(false),
            uuid: self.value_of(id, "uuid").unwrap_or_default(),
            props: Box::default(),
            pin_spans: Box::default(),
            instances: Box::default(),
            span: self.span(id),
        };
        // counted first, so each list is allocated once at its length: a sheet holds
        // these three lists for every symbol placed on it
        let (mut props, mut pins, mut paths) = (0, 0, 0);
        for c in self.t.children(id).skip(1) {
            match self.t.head(c) {
                Some("property") => props += 1,
                Some("pin") => pins += 1,
                Some("instances") => {
                    for proj in self.t.children(c).skip(1) {
                        paths += self.t.children(proj).skip(1).count();
                    }
                }
                _ => {}
            }
        }
        let mut prop_list = Vec::with_capacity(props);
        let mut pin_list = Vec::with_capacity(pins);
        let mut inst_list = Vec::with_capacity(paths);
        for c in self.t.children(id).skip(1) {
            match self.t.head(c) {
                Some("property") => {
                    if let Some(pr) = self.prop(c) {
                        prop_list.push(pr);
                    }
                }
                Some("pin") => {
                    if let Some(n) = self.nth(c, 1).and_then(|n| self.text(n)) {
                        pin_list.push((n, self.span(c)));
                    }
                }
                Some("instances") => {
                    for proj in self.t.children(c).skip(1) {
                        for path in self.t.children(proj).skip(1) {
                            if let Some(i) = self.instance(path) {
                                inst_list.push(i);
                            }
                        }
                    }
                }
                _ => {}
            }
        }
        p.props = prop_list.into_boxed_slice();
        p.pin_spans = pin_list.into_boxed_slice();
        p.instances = inst_list.into_boxed_slice();
        Some(p)
    }

    /// `(path "/a/b" (reference "R1") (unit 1) [(value ..) (footprint ..)])`.
    fn instance(&self, id: NodeId) -> Option<Instance<'a>> {
        if !self.t.head_is(id, "path") {
            return None;
        }
        let path = self.text(self.nth(id, 1)?)?;
        let r = self.child(id, "reference")?;
        let rv = self.nth(r, 1)?;
        let with_span = |head: &str| {
            let c = self.child(id, head)?;
            let v = self.nth(c, 1)?;
            Some((self.text(v)?, self.span(v)))
        };
        Some(Instance {
            path,
            reference: self.text(rv)?,
            reference_span: self.span(rv),
            unit: self.value_of(id, "unit").and_then(|u| u.parse().ok()),
            value: with_span("value").map(Box::new),
            footprint: with_span("footprint").map(Box::new),
        })
    }

    /// `(path "/a/b" (page "3"))`.
    fn page(&self, id: NodeId) -> Option<(SText<'a>, SText<'a>)> {
        if !self.t.head_is(id, "path") {
            return None;
        }
        Some((self.text(self.nth(id, 1)?)?, self.value_of(id, "page")?))
    }

    fn subsheet(&self, id: NodeId) -> Option<SubSheet<'a>> {
        let mut name = None;
        let mut pages = Vec::new();
        let mut file = None;
        let mut pins = Vec::new();
        for c in self.t.children(id).skip(1) {
            match self.t.head(c) {
                Some("property") => {
                    if let Some(pr) = self.prop(c) {
                        match pr.name.as_ref() {
                            "Sheetname" | "Sheet name" => name = Some(pr.value),
                            "Sheetfile" | "Sheet file" => file = Some((pr.value, pr.value_span)),
                            _ => {}
                        }
                    }
                }
                Some("instances") => {
                    for proj in self.t.children(c).skip(1) {
                        for path in self.t.children(proj).skip(1) {
                            if let Some(x) = self.page(path) {
                                pages.push(x);
                            }
                        }
                    }
                }
                Some("pin") => {
                    if let (Some(text), Some((at, _))) =
                        (self.nth(c, 1).and_then(|n| self.text(n)), self.at(c))
                    {
                        pins.push(SheetPin {
                            text,
                            at,
                            span: self.span(self.nth(c, 1).unwrap_or(c)),
                        });
                    }
                }
                _ => {}
            }
        }
        let (file, file_span) = file?;
        Some(SubSheet {
            uuid: self.value_of(id, "uuid").unwrap_or_default(),
            name: name.unwrap_or_default(),
            file,
            file_span,
            pins,
            pages,
            span: self.span(id),
        })
    }
}

/// Reads a sheet's text one root item at a time ([`sexpr::Items`]): each item's tree is
/// dropped once the item is read, so only the largest item is ever held as a tree, never the
/// whole sheet. The sheet, and the diagnostics pushed onto `diags`, are those of
/// [`Reader::sheet`] on the whole tree. `None` (with `diags` as it was) where the text is not
/// one root list headed `kicad_sch` that [`sexpr::parse`] reads without an error: parse it
/// whole then, for the sheet or the error. `base` is the text's offset in the joined text.
pub fn read_by_items<'a>(text: &'a str, base: u32, diags: &mut Vec<Diag>) -> Option<Sheet<'a>> {
    let mut items = sexpr::Items::new(text)?;
    if items.head() != Some("kicad_sch") {
        return None;
    }
    let had = diags.len();
    let mut sh = Sheet::default();
    // the value of the first `(version ..)` and `(uuid ..)`, as `Reader::value_of` finds them
    let (mut version, mut uuid) = (None, None);
    loop {
        let t = match items.next_list() {
            Ok(Some(t)) => t,
            Ok(None) => break,
            Err(()) => {
                diags.truncate(had);
                return None;
            }
        };
        let r = Reader { t, base };
        let c = t.root();
        match t.head(c) {
            Some("version") if version.is_none() => {
                version = Some(r.nth(c, 1).and_then(|v| r.text(v)))
            }
            Some("uuid") if uuid.is_none() => uuid = Some(r.nth(c, 1).and_then(|v| r.text(v))),
            _ => r.item(c, &mut sh, diags),
        }
    }
    let root = items.root_span()?;
    sh.trim();
    sh.version = version
        .flatten()
        .and_then(|v| v.parse::<u32>().ok())
        .unwrap_or(0);
    sh.uuid = uuid.flatten().unwrap_or_default();
    sh.span = Span {
        start: root.start + base,
        end: root.end + base,
    };
    Some(sh)
}

fn text_node(r: &Reader<'_, '_>, id: NodeId) -> Option<NodeId> {
    r.nth(id, 1)
}

fn text_node_or(id: NodeId, n: Option<NodeId>) -> NodeId {
    n.unwrap_or(id)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The sheet as the whole tree reads it, with the diagnostics, as text to compare.
    fn whole(text: &str, base: u32) -> Result<String, String> {
        let tree = sexpr::parse(text).map_err(|d| format!("{d:?}"))?;
        let mut diags = Vec::new();
        let sheet = Reader { t: &tree, base }
            .sheet(&mut diags)
            .map_err(|d| format!("{d:?}"))?;
        Ok(format!("{sheet:?} {diags:?}"))
    }

    /// A sheet read item by item is the sheet read from its whole tree (every item, span
    /// and diagnostic), and where the item reading gives up the whole reading fails (so the
    /// error is the whole reading's) or the root is not `kicad_sch`: every sheet of the
    /// fixtures, generated sheets, and a damaged sheet cut at every byte and with a bracket,
    /// quote or letter put in at every byte.
    #[test]
    fn a_sheet_read_item_by_item_is_the_sheet_read_whole() {
        let mut texts = crate::schematic::tests::fixture_sheets();
        let fixtures = texts.len();
        assert!(fixtures > 10, "{fixtures}");
        texts.push(crate::synth::schematic(40_000).0);
        texts.extend(crate::synth::hierarchy(60_000).0.into_iter().map(|f| f.1));
        let small = "(kicad_sch (version 20231120) (uuid \"u\") (lib_symbols (symbol \"D:R\" (symbol \"R_1_1\" (pin passive line (at 0 1 270) (name \"~\") (number \"1\")))))\n\
                     (symbol (lib_id \"D:R\") (at 1 2 90) (uuid \"s\") (property \"Reference\" \"R\\\"1\" (at 0 0 0)) (pin \"1\" (uuid \"p\")))\n\
                     (wire (pts (xy 1 2) (xy 3 2))) (label \"N(1)\" (at 3 2 0)) (junction (at 3 2)) (no_connect (at 9 9)) (bus_entry (at 1 1) (size 1 1))\n\
                     (sheet (property \"Sheetname\" \"a\") (property \"Sheetfile\" \"a.kicad_sch\") (pin \"IN\" input (at 0 0 0)))\n\
                     (version 1) (wire (pts (xy 1 2))) (label (at 1 1)) (sheet (property \"Sheetname\" \"b\")))\n";
        texts.push(small.to_string());
        for (cut, _) in small.char_indices() {
            texts.push(small[..cut].to_string());
            for ins in ["(", ")", "\"", "x"] {
                texts.push(format!("{}{ins}{}", &small[..cut], &small[cut..]));
            }
        }
        texts.push("(export (version 1))".into());
        let (mut same, mut whole_only) = (0, 0);
        for t in &texts {
            let want = whole(t, 7);
            let mut diags = vec![Diag::error("malformed-schematic", "read before")];
            match read_by_items(t, 7, &mut diags) {
                Some(sheet) => {
                    diags.remove(0);
                    assert_eq!(Ok(format!("{sheet:?} {diags:?}")), want, "{t}");
                    same += 1;
                }
                None => {
                    assert_eq!(diags.len(), 1, "{t}");
                    let head = sexpr::parse(t)
                        .ok()
                        .and_then(|tr| tr.head(0).map(str::to_string));
                    assert!(want.is_err() || head.as_deref() != Some("kicad_sch"), "{t}");
                    whole_only += 1;
                }
            }
        }
        assert!(
            same > fixtures + 200 && whole_only > 200,
            "{same} {whole_only}"
        );
    }
}
