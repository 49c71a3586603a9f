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
        let span = tree.first_child(root).map_or(tree.span(root), |c| tree.span(c));
        let what = match head {
            Some(h) => format!("the file's root list is `({h} ...)`"),
            None => "the file's root list has no name".to_string(),
        };
        return Err(Diag::error("not-a-netlist", format!("{what}; a KiCad netlist's is `(export ...)`"))
            .at(span, "expected `export`")
            .with_help("give netmargin the `.net` file KiCad exports (File > Export > Netlist)"));
    }
    let b = Builder { t: tree, diags: RefCell::new(Vec::new()) };
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
                Diag::warning("missing-field", "the netlist has no `(version ...)`; reading it as version E")
                    .at(Span::new(nl.span.start as usize, nl.span.start as usize + 7), "no version in this export"),
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
        Some(Text { s: self.t.text(id)?, span: self.t.span(id) })
    }

    /// The value of `(key VALUE)`: `None` when missing; a diagnostic when a list stands
    /// where the value belongs.
    fn value(&self, list: NodeId) -> Option<Text<'a>> {
        let v = self.t.children(list).nth(1)?;
        if self.t.is_list(v) {
            let key = self.t.head(list).unwrap_or("?");
            self.diags.borrow_mut().push(
                Diag::error("bad-field", format!("`({key} ...)` holds a list where its value belongs"))
                    .at(self.t.span(v), "expected a name or a quoted string")
                    .with_help("the file was edited by hand or damaged: export the netlist again"),
            );
            return None;
        }
        self.text(v)
    }

    /// Children of `list` as `(key value)` pairs, for the keys the caller wants.
    fn each(&self, list: NodeId) -> impl Iterator<Item = (&'a str, NodeId)> + '_ {
        self.t.children(list).skip(1).filter_map(|c| self.t.head(c).map(|h| (h, c)))
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
            Some(name) => Some(Field { name, value, span: self.t.span(f) }),
            None => {
                let what = self.t.head(f).unwrap_or("field");
                self.diags.borrow_mut().push(Diag::warning("missing-field", format!("a `{what}` without a `(name ...)` is ignored")).at(self.t.span(f), "no name"));
                None
            }
        }
    }

    fn component(&self, c: NodeId) -> Option<Component<'a>> {
        let mut comp = Component {
            reference: Text { s: Cow::Borrowed(""), span: self.t.span(c) },
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
                    let mut ls = LibSource { lib: None, part: None, description: None };
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
                    let mut sp = SheetPath { names: None, tstamps: None };
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
                            Some(num) => pins.push(LibPin { num, name, ptype, span: self.t.span(p) }),
                            None => self.diags.borrow_mut().push(
                                Diag::warning("missing-field", "a library pin without a `(num ...)` is ignored").at(self.t.span(p), "no pin number"),
                            ),
                        }
                    }
                }
                _ => {}
            }
        }
        let Some(part) = part else {
            self.diags.borrow_mut().push(Diag::warning("missing-field", "a `libpart` without a `(part ...)` is ignored").at(self.t.span(c), "no part name"));
            return None;
        };
        Some(LibPart { lib, part, aliases: lp_aliases, description, docs, footprints, fields, pins, span: self.t.span(c) })
    }

    fn net(&self, c: NodeId) -> Net<'a> {
        let mut net = Net { code: None, name: Text { s: Cow::Borrowed(""), span: self.t.span(c) }, nodes: Vec::new(), span: self.t.span(c) };
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
                                format!("a node without {} is left out", if r.is_none() { "a `(ref ...)`" } else { "a `(pin ...)`" }),
                            )
                            .at(self.t.span(n), "incomplete node")
                            .with_help("the file was edited by hand or damaged: export the netlist again"),
                        ),
                    }
                }
                _ => {}
            }
        }
        if net.code.is_none() {
            self.diags.borrow_mut().push(Diag::warning("missing-field", "a net without a `(code ...)`").at(self.t.span(c), "no code"));
        }
        if !have_name {
            self.diags.borrow_mut().push(Diag::warning("missing-field", "a net without a `(name ...)`; it is read as unnamed").at(self.t.span(c), "no name"));
        }
        net
    }

    /// Cross-references: refs, libparts, node components, pin lists and connections.
    fn link(&self, nl: &mut Netlist<'a>) {
        // refs
        let mut by_ref: HashMap<String, usize> = HashMap::with_capacity_and_hasher(nl.components.len(), Default::default());
        for (i, c) in nl.components.iter().enumerate() {
            if let Some(&first) = by_ref.get(c.reference.as_str()) {
                self.diags.borrow_mut().push(
                    Diag::error("duplicate-ref", format!("two components share the reference `{}`", c.reference))
                        .at(c.reference.span, "this one is checked as written but its nets may be confused")
                        .also(nl.components[first].reference.span, "first use")
                        .with_help("re-annotate the schematic so every reference is unique, then export again"),
                );
            } else {
                by_ref.insert(c.reference.s.to_string(), i);
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
            let (Some(part), lib) = (&ls.part, ls.lib.as_ref().map_or("", |l| l.as_str())) else { continue };
            resolved[i] = by_lib_part
                .get(&(lib, part.as_str()))
                .copied()
                .or_else(|| by_part.get(part.as_str()).copied().flatten());
            if resolved[i].is_none() && !nl.libparts.is_empty() {
                self.diags.borrow_mut().push(
                    Diag::info(
                        "missing-libpart",
                        format!("no library part `{}:{}` for {}: its pins on no net cannot be listed", lib, part, c.reference),
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
        let mut codes: HashMap<&str, usize> = HashMap::with_capacity_and_hasher(nl.nets.len(), Default::default());
        let mut entries: Vec<(u32, u32, u32)> = Vec::new(); // (component, net, node)
        for (ni, net) in nl.nets.iter_mut().enumerate() {
            if let Some(code) = &net.code {
                if let Some(&first) = codes.get(code.as_str()) {
                    self.diags.borrow_mut().push(
                        Diag::warning("duplicate-net-code", format!("two nets share the code {}", code))
                            .at(code.span, format!("also used by net #{}", first + 1)),
                    );
                } else {
                    codes.insert(self.t.source().get(code.span.range()).map_or("", |_| code_key(code)), ni);
                }
            }
            if !net.name.s.is_empty() {
                by_net_name.entry(net.name.s.to_string()).or_insert(ni);
            }
            for (k, node) in net.nodes.iter_mut().enumerate() {
                match by_ref.get(node.reference.as_str()) {
                    Some(&ci) => {
                        node.component = Some(ci);
                        entries.push((ci as u32, ni as u32, k as u32));
                    }
                    None => self.diags.borrow_mut().push(
                        Diag::error("unknown-component", format!("net `{}` names {}, which is not among the components", net.name, node.reference))
                            .at(node.reference.span, "no component has this reference")
                            .with_help("the netlist is out of step with the schematic: export it again"),
                    ),
                }
            }
        }
        drop(codes);
        {
            let nets = &nl.nets;
            let pin = |e: &(u32, u32, u32)| nets[e.1 as usize].nodes[e.2 as usize].pin.as_str();
            entries.sort_unstable_by(|a, b| a.0.cmp(&b.0).then_with(|| pin(a).cmp(pin(b))).then(a.1.cmp(&b.1)).then(a.2.cmp(&b.2)));
        }
        // keep the first (component, pin) of each group; a repeat in the same net is dropped
        // quietly, one in another net is a diagnostic
        let mut keep: Vec<Vec<bool>> = nl.nets.iter().map(|n| vec![false; n.nodes.len()]).collect();
        let mut twice: Vec<(usize, usize, Span, String)> = Vec::new();
        let mut first_of_group = 0;
        for i in 0..entries.len() {
            let e = entries[i];
            let same = i > 0 && {
                let f = entries[first_of_group];
                f.0 == e.0 && nl.nets[f.1 as usize].nodes[f.2 as usize].pin.s == nl.nets[e.1 as usize].nodes[e.2 as usize].pin.s
            };
            if !same {
                first_of_group = i;
                keep[e.1 as usize][e.2 as usize] = true;
                continue;
            }
            let f = entries[first_of_group];
            if f.1 != e.1 && entries[i - 1].1 != e.1 {
                let node = &nl.nets[e.1 as usize].nodes[e.2 as usize];
                twice.push((f.1 as usize, e.1 as usize, node.span, format!("{}.{}", node.reference, node.pin)));
            }
        }
        // drop the repeats and renumber the kept nodes
        let mut new_index: Vec<Vec<u32>> = Vec::with_capacity(nl.nets.len());
        for (net, keep) in nl.nets.iter_mut().zip(&keep) {
            let mut map = vec![u32::MAX; keep.len()];
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
            new_index.push(map);
        }
        drop(keep);
        // per component, its kept (pin, net, node) sorted by pin
        let mut pin_nets: Vec<(u32, u32, u32)> = entries
            .into_iter()
            .filter_map(|(c, ni, k)| {
                let nk = new_index[ni as usize][k as usize];
                (nk != u32::MAX).then_some((c, ni, nk))
            })
            .collect();
        pin_nets.shrink_to_fit();
        drop(new_index);
        for (first, second, span, pin) in twice {
            let (f, n) = (&nl.nets[first], &nl.nets[second]);
            self.diags.borrow_mut().push(
                Diag::error("pin-on-two-nets", format!("{pin} is on two nets: `{}` and `{}`", f.name, n.name))
                    .at(span, "second net")
                    .also(f.name.span, "first net")
                    .with_help("the netlist is inconsistent: export it again; if it persists, look for overlapping wires or labels at this pin"),
            );
        }

        // component pins: the libpart's, then any the nets name that it lacks
        let mut at = 0usize;
        for (ci, c) in nl.components.iter_mut().enumerate() {
            let start = at;
            while at < pin_nets.len() && pin_nets[at].0 as usize == ci {
                at += 1;
            }
            let mine = &pin_nets[start..at];
            let nets = &nl.nets;
            let find = |num: &str| {
                mine.binary_search_by(|e| nets[e.1 as usize].nodes[e.2 as usize].pin.as_str().cmp(num))
                    .ok()
                    .map(|i| (mine[i].1 as usize, mine[i].2 as usize))
            };
            let mut pins: Vec<CompPin<'a>> = Vec::new();
            let mut used = vec![false; mine.len()];
            if let Some(li) = c.libpart {
                let lpins = &nl.libparts[li].pins;
                pins.reserve(lpins.len());
                for (pi, lpin) in lpins.iter().enumerate() {
                    if pins.len() < 64 && pins.iter().any(|p| p.num == lpin.num.s) {
                        continue; // stacked pins listed twice
                    }
                    let found = find(lpin.num.as_str());
                    let connection = match found {
                        Some((net, node)) => {
                            if let Ok(i) = mine.binary_search_by(|e| nets[e.1 as usize].nodes[e.2 as usize].pin.as_str().cmp(lpin.num.as_str())) {
                                if used[i] {
                                    continue; // stacked pins listed twice
                                }
                                used[i] = true;
                            }
                            connection(nets, net, node)
                        }
                        None => Connection::Absent,
                    };
                    let mut ptype = lpin.ptype;
                    let mut no_connect = lpin.ptype == PinType::NoConnect;
                    let mut name = lpin.name.as_ref().map(|n| n.s.clone());
                    if let Some((net, node)) = found {
                        let nd = &nets[net].nodes[node];
                        if let Some(t) = nd.pintype {
                            ptype = t;
                        }
                        no_connect |= nd.no_connect;
                        if name.is_none() {
                            name = nd.pinfunction.as_ref().map(|f| f.s.clone());
                        }
                    }
                    pins.push(CompPin { num: lpin.num.s.clone(), name, ptype, no_connect, connection, libpin: Some(pi) });
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
