//! Building the [`Netlist`] from a syntax tree.

use std::borrow::Cow;
use std::cell::RefCell;

use rustc_hash::FxHashMap as HashMap;

use super::*;
use crate::sexpr::{NodeId, Tree};

/// Builds the model from a parsed file. `Err` only when the root is not `(export ...)`;
/// every other problem is a diagnostic in the result.
pub fn build<'a>(tree: &Tree<'a>) -> Result<Netlist<'a>, Diag> {
    let root = tree.root();
    let head = tree.head(root);
    if head != Some("export") {
        let span = tree
            .first_child(root)
            .map_or(tree.span(root), |c| tree.span(c));
        let what = match head {
            Some(h) => format!("the file's root list is `({h} ...)`"),
            None => "the file's root list has no name".to_string(),
        };
        return Err(Diag::error(
            "not-a-netlist",
            format!("{what}; a KiCad netlist's is `(export ...)`"),
        )
        .at(span, "expected `export`")
        .with_help("give netmargin the `.net` file KiCad exports (File > Export > Netlist)"));
    }
    let b = Builder {
        t: tree,
        diags: RefCell::new(Vec::new()),
    };
    let mut nl = Netlist {
        version: None,
        dialect: Dialect::Other,
        design: Design::default(),
        components: Vec::new(),
        libparts: Vec::new(),
        nets: Vec::new(),
        diagnostics: Vec::new(),
        span: tree.span(root),
        by_ref: HashMap::default(),
        by_net_name: HashMap::default(),
    };
    for sec in tree.children(root).skip(1) {
        match tree.head(sec) {
            Some("version") => nl.version = b.value(sec),
            Some("design") => nl.design = b.design(sec),
            Some("components") => {
                for c in tree.children(sec).skip(1) {
                    if tree.head(c) == Some("comp") {
                        if let Some(comp) = b.component(c) {
                            nl.components.push(comp);
                        }
                    }
                }
            }
            Some("libparts") => {
                for c in tree.children(sec).skip(1) {
                    if tree.head(c) == Some("libpart") {
                        if let Some(lp) = b.libpart(c) {
                            nl.libparts.push(lp);
                        }
                    }
                }
            }
            Some("nets") => {
                for c in tree.children(sec).skip(1) {
                    if tree.head(c) == Some("net") {
                        nl.nets.push(b.net(c));
                    }
                }
            }
            _ => {} // `libraries` and anything newer: not needed, ignored
        }
    }
    nl.dialect = match nl.version.as_ref().map(|v| v.as_str()) {
        Some("D") => Dialect::D,
        Some("E") => Dialect::E,
        Some(other) => {
            let v = nl.version.as_ref().expect("version is some");
            b.diags.borrow_mut().push(
                Diag::info("netlist-version", format!("netlist version `{other}` is not one netmargin knows (D: KiCad 4-5, E: KiCad 6-9); reading it as version E"))
                    .at(v.span, "version"),
            );
            Dialect::Other
        }
        None => {
            b.diags.borrow_mut().push(
                Diag::warning(
                    "missing-field",
                    "the netlist has no `(version ...)`; reading it as version E",
                )
                .at(
                    Span::new(nl.span.start as usize, nl.span.start as usize + 7),
                    "no version in this export",
                ),
            );
            Dialect::Other
        }
    };
    b.link(&mut nl);
    nl.diagnostics = b.diags.into_inner();
    Ok(nl)
}

struct Builder<'t, 'a> {
    t: &'t Tree<'a>,
    diags: RefCell<Vec<Diag>>,
}

impl<'a> Builder<'_, 'a> {
    fn text(&self, id: NodeId) -> Option<Text<'a>> {
        Some(Text {
            s: self.t.text(id)?,
            span: self.t.span(id),
        })
    }

    /// The value of `(key VALUE)`: `None` when missing; a diagnostic when a list stands
    /// where the value belongs.
    fn value(&self, list: NodeId) -> Option<Text<'a>> {
        let v = self.t.children(list).nth(1)?;
        if self.t.is_list(v) {
            let key = self.t.head(list).unwrap_or("?");
            self.diags.borrow_mut().push(
                Diag::error(
                    "bad-field",
                    format!("`({key} ...)` holds a list where its value belongs"),
                )
                .at(self.t.span(v), "expected a name or a quoted string")
                .with_help("the file was edited by hand or damaged: export the netlist again"),
            );
            return None;
        }
        self.text(v)
    }

    /// Children of `list` as `(key value)` pairs, for the keys the caller wants.
    fn each(&self, list: NodeId) -> impl Iterator<Item = (&'a str, NodeId)> + '_ {
        self.t
            .children(list)
            .skip(1)
            .filter_map(|c| self.t.head(c).map(|h| (h, c)))
    }

    fn design(&self, sec: NodeId) -> Design<'a> {
        let mut d = Design::default();
        for (k, c) in self.each(sec) {
            match k {
                "source" => d.source = self.value(c),
                "date" => d.date = self.value(c),
                "tool" => d.tool = self.value(c),
                "sheet" => {
                    // the first sheet's title block names the board
                    if d.title.is_none() {
                        for (_, tbl) in self.each(c).filter(|(k, _)| *k == "title_block") {
                            for (k2, c2) in self.each(tbl) {
                                match k2 {
                                    "title" => d.title = self.value(c2),
                                    "company" => d.company = self.value(c2),
                                    "rev" => d.rev = self.value(c2),
                                    _ => {}
                                }
                            }
                        }
                    }
                }
                _ => {}
            }
        }
        d
    }

    fn field(&self, f: NodeId) -> Option<Field<'a>> {
        // (field (name N) V)  |  (property (name N) (value V))
        let mut name = None;
        let mut value = None;
        for c in self.t.children(f).skip(1) {
            match self.t.head(c) {
                Some("name") => name = self.value(c),
                Some("value") => value = self.value(c),
                _ if !self.t.is_list(c) => value = self.text(c),
                _ => {}
            }
        }
        match name {
            Some(name) => Some(Field {
                name,
                value,
                span: self.t.span(f),
            }),
            None => {
                let what = self.t.head(f).unwrap_or("field");
                self.diags.borrow_mut().push(
                    Diag::warning(
                        "missing-field",
                        format!("a `{what}` without a `(name ...)` is ignored"),
                    )
                    .at(self.t.span(f), "no name"),
                );
                None
            }
        }
    }

    fn component(&self, c: NodeId) -> Option<Component<'a>> {
        let mut comp = Component {
            reference: Text {
                s: Cow::Borrowed(""),
                span: self.t.span(c),
            },
            value: None,
            footprint: None,
            datasheet: None,
            fields: Vec::new(),
            properties: Vec::new(),
            libsource: None,
            sheetpath: None,
            tstamps: Vec::new(),
            span: self.t.span(c),
            libpart: None,
            pins: Vec::new(),
        };
        let mut have_ref = false;
        for (k, n) in self.each(c) {
            match k {
                "ref" => {
                    if let Some(r) = self.value(n) {
                        comp.reference = r;
                        have_ref = true;
                    }
                }
                "value" => comp.value = self.value(n),
                "footprint" => comp.footprint = self.value(n),
                "datasheet" => comp.datasheet = self.value(n),
                "fields" => {
                    for f in self.each(n).filter(|(k, _)| *k == "field").map(|(_, f)| f) {
                        if let Some(f) = self.field(f) {
                            comp.fields.push(f);
                        }
                    }
                }
                "property" => {
                    if let Some(f) = self.field(n) {
                        comp.properties.push(f);
                    }
                }
                "libsource" => {
                    let mut ls = LibSource {
                        lib: None,
                        part: None,
                        description: None,
                    };
                    for (k2, c2) in self.each(n) {
                        match k2 {
                            "lib" => ls.lib = self.value(c2),
                            "part" => ls.part = self.value(c2),
                            "description" => ls.description = self.value(c2),
                            _ => {}
                        }
                    }
                    comp.libsource = Some(ls);
                }
                "sheetpath" => {
                    let mut sp = SheetPath {
                        names: None,
                        tstamps: None,
                    };
                    for (k2, c2) in self.each(n) {
                        match k2 {
                            "names" => sp.names = self.value(c2),
                            "tstamps" => sp.tstamps = self.value(c2),
                            _ => {}
                        }
                    }
                    comp.sheetpath = Some(sp);
                }
                "tstamp" | "tstamps" => {
                    if let Some(v) = self.value(n) {
                        comp.tstamps.push(v);
                    }
                }
                _ => {}
            }
        }
        if !have_ref || comp.reference.s.is_empty() {
            self.diags.borrow_mut().push(
                Diag::error("missing-field", "a component without a reference (`(ref ...)`) is left out")
                    .at(self.t.span(c), "this `comp` has no `ref`")
                    .with_help("annotate the schematic (every symbol needs a reference such as U1) and export the netlist again"),
            );
            return None;
        }
        // a vector grows to 4 items at its first push; give back what one or two don't use
        comp.tstamps.shrink_to_fit();
        comp.fields.shrink_to_fit();
        comp.properties.shrink_to_fit();
        Some(comp)
    }

    fn libpart(&self, c: NodeId) -> Option<LibPart<'a>> {
        let mut lib = None;
        let mut part = None;
        let mut lp_aliases = Vec::new();
        let mut description = None;
        let mut docs = None;
        let mut footprints = Vec::new();
        let mut fields = Vec::new();
        let mut pins = Vec::new();
        for (k, n) in self.each(c) {
            match k {
                "lib" => lib = self.value(n),
                "part" => part = self.value(n),
                "description" => description = self.value(n),
                "docs" => docs = self.value(n),
                "aliases" => {
                    for a in self.each(n).filter(|(k, _)| *k == "alias").map(|(_, a)| a) {
                        if let Some(v) = self.value(a) {
                            lp_aliases.push(v);
                        }
                    }
                }
                "footprints" => {
                    for a in self.each(n).filter(|(k, _)| *k == "fp").map(|(_, a)| a) {
                        if let Some(v) = self.value(a) {
                            footprints.push(v);
                        }
                    }
                }
                "fields" => {
                    for f in self.each(n).filter(|(k, _)| *k == "field").map(|(_, f)| f) {
                        if let Some(f) = self.field(f) {
                            fields.push(f);
                        }
                    }
                }
                "pins" => {
                    for p in self.each(n).filter(|(k, _)| *k == "pin").map(|(_, p)| p) {
                        let mut num = None;
                        let mut name = None;
                        let mut ptype = PinType::Unknown;
                        for (k2, c2) in self.each(p) {
                            match k2 {
                                "num" => num = self.value(c2),
                                "name" => name = self.value(c2),
                                "type" => {
                                    if let Some(v) = self.value(c2) {
                                        ptype = PinType::parse(v.as_str()).0;
                                    }
                                }
                                _ => {}
                            }
                        }
                        match num {
                            Some(num) => pins.push(LibPin {
                                num,
                                name,
                                ptype,
                                span: self.t.span(p),
                            }),
                            None => self.diags.borrow_mut().push(
                                Diag::warning(
                                    "missing-field",
                                    "a library pin without a `(num ...)` is ignored",
                                )
                                .at(self.t.span(p), "no pin number"),
                            ),
                        }
                    }
                }
                _ => {}
            }
        }
        let Some(part) = part else {
            self.diags.borrow_mut().push(
                Diag::warning(
                    "missing-field",
                    "a `libpart` without a `(part ...)` is ignored",
                )
                .at(self.t.span(c), "no part name"),
            );
            return None;
        };
        Some(LibPart {
            lib,
            part,
            aliases: lp_aliases,
            description,
            docs,
            footprints,
            fields,
            pins,
            span: self.t.span(c),
        })
    }

    fn net(&self, c: NodeId) -> Net<'a> {
        let mut net = Net {
            code: None,
            name: Text {
                s: Cow::Borrowed(""),
                span: self.t.span(c),
            },
            nodes: Vec::new(),
            span: self.t.span(c),
        };
        let mut have_name = false;
        for n in self.t.children(c).skip(1) {
            match self.t.head(n) {
                Some("code") => net.code = self.value(n),
                Some("name") => {
                    if let Some(v) = self.value(n) {
                        net.name = v;
                        have_name = true;
                    }
                }
                Some("node") => {
                    let mut reference = None;
                    let mut pin = None;
                    let mut pinfunction = None;
                    let mut pintype = None;
                    let mut no_connect = false;
                    for k in self.t.children(n).skip(1) {
                        match self.t.head(k) {
                            Some("ref") => reference = self.value(k),
                            Some("pin") => pin = self.value(k),
                            Some("pinfunction") => pinfunction = self.value(k),
                            Some("pintype") => {
                                if let Some(v) = self.value(k) {
                                    let (t, nc) = PinType::parse(v.as_str());
                                    pintype = Some(t);
                                    no_connect = nc;
                                }
                            }
                            _ => {}
                        }
                    }
                    match (reference, pin) {
                        (Some(reference), Some(pin)) => net.nodes.push(Node {
                            reference,
                            pin,
                            pinfunction,
                            pintype,
                            no_connect,
                            span: self.t.span(n),
                            component: None,
                        }),
                        (r, _) => self.diags.borrow_mut().push(
                            Diag::error(
                                "missing-field",
                                format!(
                                    "a node without {} is left out",
                                    if r.is_none() {
                                        "a `(ref ...)`"
                                    } else {
                                        "a `(pin ...)`"
                                    }
                                ),
                            )
                            .at(self.t.span(n), "incomplete node")
                            .with_help(
                                "the file was edited by hand or damaged: export the netlist again",
                            ),
                        ),
                    }
                }
                _ => {}
            }
        }
        if net.code.is_none() {
            self.diags.borrow_mut().push(
                Diag::warning("missing-field", "a net without a `(code ...)`")
                    .at(self.t.span(c), "no code"),
            );
        }
        if !have_name {
            self.diags.borrow_mut().push(
                Diag::warning(
                    "missing-field",
                    "a net without a `(name ...)`; it is read as unnamed",
                )
                .at(self.t.span(c), "no name"),
            );
        }
        net.nodes.shrink_to_fit();
        net
    }

    /// Cross-references: refs, libparts, node components, pin lists and connections.
    fn link(&self, nl: &mut Netlist<'a>) {
        // refs
        let mut by_ref: HashMap<Cow<'a, str>, usize> =
            HashMap::with_capacity_and_hasher(nl.components.len(), Default::default());
        for (i, c) in nl.components.iter().enumerate() {
            if let Some(&first) = by_ref.get(c.reference.as_str()) {
                self.diags.borrow_mut().push(
                    Diag::error(
                        "duplicate-ref",
                        format!("two components share the reference `{}`", c.reference),
                    )
                    .at(
                        c.reference.span,
                        "this one is checked as written but its nets may be confused",
                    )
                    .also(nl.components[first].reference.span, "first use")
                    .with_help(
                        "re-annotate the schematic so every reference is unique, then export again",
                    ),
                );
            } else {
                by_ref.insert(c.reference.s.clone(), i);
            }
        }
        // libparts by (lib, part) and (lib, alias), and by part alone as a fallback
        let mut by_lib_part: HashMap<(&str, &str), usize> = HashMap::default();
        let mut by_part: HashMap<&str, Option<usize>> = HashMap::default();
        for (i, lp) in nl.libparts.iter().enumerate() {
            let lib = lp.lib.as_ref().map_or("", |l| l.as_str());
            for name in std::iter::once(&lp.part).chain(lp.aliases.iter()) {
                by_lib_part.entry((lib, name.as_str())).or_insert(i);
                by_part
                    .entry(name.as_str())
                    .and_modify(|e| {
                        if *e != Some(i) {
                            *e = None
                        }
                    })
                    .or_insert(Some(i));
            }
        }
        let mut resolved = vec![None; nl.components.len()];
        for (i, c) in nl.components.iter().enumerate() {
            let Some(ls) = &c.libsource else { continue };
            let (Some(part), lib) = (&ls.part, ls.lib.as_ref().map_or("", |l| l.as_str())) else {
                continue;
            };
            resolved[i] = by_lib_part
                .get(&(lib, part.as_str()))
                .copied()
                .or_else(|| by_part.get(part.as_str()).copied().flatten());
            if resolved[i].is_none() && !nl.libparts.is_empty() {
                self.diags.borrow_mut().push(
                    Diag::info(
                        "missing-libpart",
                        format!(
                            "no library part `{}:{}` for {}: its pins on no net cannot be listed",
                            lib, part, c.reference
                        ),
                    )
                    .at(part.span, "not found in `libparts`"),
                );
            }
        }
        for (c, r) in nl.components.iter_mut().zip(resolved) {
            c.libpart = r;
        }
        drop(by_lib_part);
        drop(by_part);

        // nodes: component links, de-duplication, pins on two nets. Sorting every
        // (component, pin, net, node) once keeps this O(n log n) whatever the shape.
        let mut by_net_name = HashMap::with_capacity_and_hasher(nl.nets.len(), Default::default());
        let mut codes: HashMap<&str, usize> =
            HashMap::with_capacity_and_hasher(nl.nets.len(), Default::default());
        let mut entries: Vec<(u32, u32, u32)> = Vec::new(); // (component, net, node)
        for (ni, net) in nl.nets.iter_mut().enumerate() {
            if let Some(code) = &net.code {
                if let Some(&first) = codes.get(code.as_str()) {
                    self.diags.borrow_mut().push(
                        Diag::warning(
                            "duplicate-net-code",
                            format!("two nets share the code {}", code),
                        )
                        .at(code.span, format!("also used by net #{}", first + 1)),
                    );
                } else {
                    codes.insert(
                        self.t
                            .source()
                            .get(code.span.range())
                            .map_or("", |_| code_key(code)),
                        ni,
                    );
                }
            }
            if !net.name.s.is_empty() {
                by_net_name.entry(net.name.s.clone()).or_insert(ni);
            }
            for (k, node) in net.nodes.iter_mut().enumerate() {
                match by_ref.get(node.reference.as_str()) {
                    Some(&ci) => {
                        node.component = Some(ci);
                        entries.push((ci as u32, ni as u32, k as u32));
                    }
                    None => self.diags.borrow_mut().push(
                        Diag::error(
                            "unknown-component",
                            format!(
                                "net `{}` names {}, which is not among the components",
                                net.name, node.reference
                            ),
                        )
                        .at(node.reference.span, "no component has this reference")
                        .with_help(
                            "the netlist is out of step with the schematic: export it again",
                        ),
                    ),
                }
            }
        }
        drop(codes);

        // Pin numbers as integers: each distinct pin text gets its rank in text order, so
        // sorting by rank sorts exactly as comparing the texts would.
        let mut pin_ids: HashMap<Cow<'a, str>, u32> = HashMap::default();
        let mut pin_of: Vec<u32> = Vec::with_capacity(entries.len()); // id, then rank, per entry
        for &(_, ni, k) in &entries {
            let pin = &nl.nets[ni as usize].nodes[k as usize].pin.s;
            let next = pin_ids.len() as u32;
            let id = match pin_ids.get(pin.as_ref()) {
                Some(&id) => id,
                None => {
                    pin_ids.insert(pin.clone(), next);
                    next
                }
            };
            pin_of.push(id);
        }
        let mut by_text: Vec<(&str, u32)> =
            pin_ids.iter().map(|(k, &id)| (k.as_ref(), id)).collect();
        by_text.sort_unstable();
        let mut rank_of_id = vec![0u32; by_text.len()];
        for (rank, &(_, id)) in by_text.iter().enumerate() {
            rank_of_id[id as usize] = rank as u32;
        }
        drop(by_text);
        for id in pin_ids.values_mut() {
            *id = rank_of_id[*id as usize];
        }
        for p in &mut pin_of {
            *p = rank_of_id[*p as usize];
        }
        drop(rank_of_id);

        // Group the entries by component (a counting sort: linear, and it keeps each
        // component's entries in net and node order), then sort each group by pin rank.
        let ncomp = nl.components.len();
        let mut comp_at = vec![0u32; ncomp + 1];
        for e in &entries {
            comp_at[e.0 as usize + 1] += 1;
        }
        for c in 0..ncomp {
            comp_at[c + 1] += comp_at[c];
        }
        let mut fill: Vec<u32> = comp_at[..ncomp].to_vec();
        // (pin rank, net, node)
        let mut sorted: Vec<(u32, u32, u32)> = vec![(0, 0, 0); entries.len()];
        for (e, &rank) in entries.iter().zip(&pin_of) {
            let at = &mut fill[e.0 as usize];
            sorted[*at as usize] = (rank, e.1, e.2);
            *at += 1;
        }
        drop(fill);
        drop(pin_of);
        drop(entries);
        for c in 0..ncomp {
            let group = &mut sorted[comp_at[c] as usize..comp_at[c + 1] as usize];
            if group.len() > 1 {
                group.sort_unstable();
            }
        }

        // Flat per-node tables: node `k` of net `ni` is at `net_at[ni] + k`.
        let mut net_at: Vec<u32> = Vec::with_capacity(nl.nets.len() + 1);
        let mut total = 0u32;
        for net in &nl.nets {
            net_at.push(total);
            total += net.nodes.len() as u32;
        }
        net_at.push(total);

        // keep the first (component, pin) of each group; a repeat in the same net is dropped
        // quietly, one in another net is a diagnostic
        let mut keep = vec![false; total as usize];
        let mut twice: Vec<(usize, usize, Span, String)> = Vec::new();
        for c in 0..ncomp {
            let group = &sorted[comp_at[c] as usize..comp_at[c + 1] as usize];
            let mut first_of_run = 0;
            for i in 0..group.len() {
                let e = group[i];
                if i == 0 || group[first_of_run].0 != e.0 {
                    first_of_run = i;
                    keep[(net_at[e.1 as usize] + e.2) as usize] = true;
                    continue;
                }
                let f = group[first_of_run];
                if f.1 != e.1 && group[i - 1].1 != e.1 {
                    let node = &nl.nets[e.1 as usize].nodes[e.2 as usize];
                    twice.push((
                        f.1 as usize,
                        e.1 as usize,
                        node.span,
                        format!("{}.{}", node.reference, node.pin),
                    ));
                }
            }
        }
        // drop the repeats and renumber the kept nodes (`new_index` reuses the flat layout)
        let mut new_index = vec![u32::MAX; total as usize];
        for (ni, net) in nl.nets.iter_mut().enumerate() {
            let base = net_at[ni] as usize;
            let keep = &keep[base..base + net.nodes.len()];
            let map = &mut new_index[base..base + net.nodes.len()];
            let mut n = 0u32;
            for (k, &kp) in keep.iter().enumerate() {
                if kp {
                    map[k] = n;
                    n += 1;
                }
            }
            if (n as usize) < keep.len() {
                let mut k = 0;
                net.nodes.retain(|_| {
                    k += 1;
                    keep[k - 1]
                });
            }
        }
        drop(keep);
        // per component, its kept (pin rank, net, node), still sorted by pin
        let mut pin_nets: Vec<(u32, u32, u32)> = Vec::with_capacity(sorted.len());
        let mut pins_at: Vec<u32> = Vec::with_capacity(ncomp + 1);
        for c in 0..ncomp {
            pins_at.push(pin_nets.len() as u32);
            for &(rank, ni, k) in &sorted[comp_at[c] as usize..comp_at[c + 1] as usize] {
                let nk = new_index[(net_at[ni as usize] + k) as usize];
                if nk != u32::MAX {
                    pin_nets.push((rank, ni, nk));
                }
            }
        }
        pins_at.push(pin_nets.len() as u32);
        drop(sorted);
        drop(new_index);
        drop(comp_at);
        drop(net_at);
        for (first, second, span, pin) in twice {
            let (f, n) = (&nl.nets[first], &nl.nets[second]);
            self.diags.borrow_mut().push(
                Diag::error("pin-on-two-nets", format!("{pin} is on two nets: `{}` and `{}`", f.name, n.name))
                    .at(span, "second net")
                    .also(f.name.span, "first net")
                    .with_help("the netlist is inconsistent: export it again; if it persists, look for overlapping wires or labels at this pin"),
            );
        }

        // per library part, once: each pin's rank among the pin texts the nets use, and
        // whether an earlier pin of the part has the same number (a stacked pin)
        let lib_pins: Vec<(Vec<Option<u32>>, Vec<bool>)> = nl
            .libparts
            .iter()
            .map(|lp| {
                let mut seen: HashMap<&str, ()> =
                    HashMap::with_capacity_and_hasher(lp.pins.len(), Default::default());
                let ranks = lp
                    .pins
                    .iter()
                    .map(|p| pin_ids.get(p.num.as_str()).copied())
                    .collect();
                let repeats = lp
                    .pins
                    .iter()
                    .map(|p| seen.insert(p.num.as_str(), ()).is_some())
                    .collect();
                (ranks, repeats)
            })
            .collect();
        let mut used: Vec<bool> = Vec::new();
        // component pins: the libpart's, then any the nets name that it lacks
        for (ci, c) in nl.components.iter_mut().enumerate() {
            let mine = &pin_nets[pins_at[ci] as usize..pins_at[ci + 1] as usize];
            let nets = &nl.nets;
            let mut pins: Vec<CompPin<'a>> = Vec::new();
            used.clear();
            used.resize(mine.len(), false);
            if let Some(li) = c.libpart {
                let lpins = &nl.libparts[li].pins;
                let (ranks, repeats) = &lib_pins[li];
                pins.reserve(lpins.len());
                for (pi, lpin) in lpins.iter().enumerate() {
                    // only a number an earlier pin had can be among the pins so far
                    if repeats[pi] && pins.len() < 64 && pins.iter().any(|p| p.num == lpin.num.s) {
                        continue; // stacked pins listed twice
                    }
                    let found =
                        ranks[pi].and_then(|rank| mine.binary_search_by(|e| e.0.cmp(&rank)).ok());
                    let connection = match found {
                        Some(i) => {
                            if used[i] {
                                continue; // stacked pins listed twice
                            }
                            used[i] = true;
                            connection(nets, mine[i].1 as usize, mine[i].2 as usize)
                        }
                        None => Connection::Absent,
                    };
                    let mut ptype = lpin.ptype;
                    let mut no_connect = lpin.ptype == PinType::NoConnect;
                    let mut name = lpin.name.as_ref().map(|n| n.s.clone());
                    if let Some(i) = found {
                        let nd = &nets[mine[i].1 as usize].nodes[mine[i].2 as usize];
                        if let Some(t) = nd.pintype {
                            ptype = t;
                        }
                        no_connect |= nd.no_connect;
                        if name.is_none() {
                            name = nd.pinfunction.as_ref().map(|f| f.s.clone());
                        }
                    }
                    pins.push(CompPin {
                        num: lpin.num.s.clone(),
                        name,
                        ptype,
                        no_connect,
                        connection,
                        libpin: Some(pi),
                    });
                }
            }
            // pins named by nodes but missing from the libpart (or no libpart at all)
            for (i, e) in mine.iter().enumerate() {
                if used[i] {
                    continue;
                }
                let node = &nets[e.1 as usize].nodes[e.2 as usize];
                pins.push(CompPin {
                    num: node.pin.s.clone(),
                    name: node.pinfunction.as_ref().map(|f| f.s.clone()),
                    ptype: node.pintype.unwrap_or(PinType::Unknown),
                    no_connect: node.no_connect,
                    connection: connection(nets, e.1 as usize, e.2 as usize),
                    libpin: None,
                });
            }
            c.pins = pins;
        }
        nl.by_ref = by_ref;
        nl.by_net_name = by_net_name;
    }
}

fn code_key<'a>(code: &'a Text<'_>) -> &'a str {
    code.as_str()
}

fn connection(nets: &[Net<'_>], net: usize, node: usize) -> Connection {
    if nets[net].nodes.len() > 1 {
        Connection::Net { net, node }
    } else {
        Connection::Alone { net, node }
    }
}

#[cfg(test)]
mod link_tests {
    use std::fmt::Write;

    use crate::netlist::{build, Connection};
    use crate::sexpr::parse;

    /// A component whose library part has 100 000 pins, every pin on a net of its own and
    /// named twice there (the repeat is dropped), and pin 7 also on a second net.
    #[test]
    fn a_component_with_100_000_pins_links_every_pin() {
        const N: usize = 100_000;
        let mut s = String::from("(export (version \"E\") (components (comp (ref \"U1\") (libsource (lib \"x\") (part \"BIG\"))))\n(libparts (libpart (lib \"x\") (part \"BIG\") (pins\n");
        for p in 1..=N {
            let _ = writeln!(s, "(pin (num \"{p}\") (name \"P{p}\") (type \"input\"))");
        }
        s.push_str(")))\n(nets\n");
        for p in 1..=N {
            let _ = writeln!(s, "(net (code \"{p}\") (name \"N{p}\") (node (ref \"U1\") (pin \"{p}\")) (node (ref \"U1\") (pin \"{p}\")))");
        }
        s.push_str("(net (code \"0\") (name \"EXTRA\") (node (ref \"U1\") (pin \"7\")) (node (ref \"U1\") (pin \"100001\")))))");
        let t = parse(&s).unwrap();
        let nl = build(&t).unwrap();
        let u1 = &nl.components[0];
        // the libpart's pins in their order, then the one only a net names
        assert_eq!(u1.pins.len(), N + 1);
        assert_eq!(u1.pins[0].num, "1");
        assert_eq!(u1.pins[N - 1].num, "100000");
        assert_eq!(u1.pins[N].num, "100001");
        assert_eq!(u1.pins[N].libpin, None);
        // each net keeps one node: the pin is alone on it
        assert!(nl.nets[..N].iter().all(|n| n.nodes.len() == 1));
        assert_eq!(
            u1.pins[41].connection,
            Connection::Alone { net: 41, node: 0 }
        );
        // U1.7 stays on its first net: EXTRA keeps only pin 100001
        assert_eq!(u1.pins[6].connection, Connection::Alone { net: 6, node: 0 });
        assert_eq!(nl.nets[N].nodes.len(), 1);
        assert_eq!(u1.pins[N].connection, Connection::Alone { net: N, node: 0 });
        let two: Vec<&str> = nl
            .diagnostics
            .iter()
            .filter(|d| d.code == "pin-on-two-nets")
            .map(|d| d.message.as_str())
            .collect();
        assert_eq!(two, ["U1.7 is on two nets: `N7` and `EXTRA`"]);
    }

    /// One net of 1 000 000 nodes: 500 components of 1000 pins, with each node written
    /// twice in the net; the repeats are dropped.
    #[test]
    fn a_net_of_1_000_000_nodes_is_deduplicated() {
        const C: usize = 500;
        const P: usize = 1000;
        let mut s = String::from("(export (version \"E\") (components\n");
        for c in 0..C {
            let _ = writeln!(s, "(comp (ref \"R{c}\"))");
        }
        s.push_str(") (nets (net (code \"1\") (name \"BUS\")\n");
        for _ in 0..2 {
            for c in 0..C {
                for p in 0..P {
                    let _ = writeln!(s, "(node (ref \"R{c}\") (pin \"{p}\"))");
                }
            }
        }
        s.push_str(")))");
        let t = parse(&s).unwrap();
        let nl = build(&t).unwrap();
        assert!(nl.diagnostics.is_empty(), "{:?}", nl.diagnostics.first());
        assert_eq!(nl.nets[0].nodes.len(), C * P);
        let r7 = &nl.components[nl.component("R7").unwrap()];
        assert_eq!(r7.pins.len(), P);
        // pins without a libpart come in text order: "0", "1", "10", "100", ...
        assert_eq!(r7.pins[2].num, "10");
        let node = match r7.pins[2].connection {
            Connection::Net { net: 0, node } => node,
            other => panic!("{other:?}"),
        };
        assert_eq!(nl.nets[0].nodes[node].reference.as_str(), "R7");
        assert_eq!(nl.nets[0].nodes[node].pin.as_str(), "10");
        assert_eq!(node, 7 * P + 10);
    }

    /// A library part that lists a pin number twice (stacked pins) gives the component
    /// one pin for it, early in the list and after the 64th pin alike.
    #[test]
    fn stacked_library_pins_are_listed_once() {
        let mut s = String::from("(export (version \"E\") (components (comp (ref \"U1\") (libsource (lib \"x\") (part \"S\"))))\n(libparts (libpart (lib \"x\") (part \"S\") (pins\n");
        for p in ["1", "2", "1", "3"] {
            let _ = writeln!(s, "(pin (num \"{p}\") (type \"input\"))");
        }
        for p in 4..=70 {
            let _ = writeln!(s, "(pin (num \"{p}\") (type \"input\"))");
        }
        s.push_str("(pin (num \"40\") (type \"output\")))))\n(nets (net (code \"1\") (name \"A\") (node (ref \"U1\") (pin \"1\")) (node (ref \"U1\") (pin \"40\")))))");
        let t = parse(&s).unwrap();
        let nl = build(&t).unwrap();
        let nums: Vec<&str> = nl.components[0]
            .pins
            .iter()
            .map(|p| p.num.as_ref())
            .collect();
        let want: Vec<String> = (1..=70).map(|p| p.to_string()).collect();
        assert_eq!(nums, want);
        assert_eq!(
            nl.components[0].pins[0].connection,
            Connection::Net { net: 0, node: 0 }
        );
        assert_eq!(
            nl.components[0].pins[39].connection,
            Connection::Net { net: 0, node: 1 }
        );
        assert_eq!(nl.components[0].pins[1].connection, Connection::Absent);
    }
}
