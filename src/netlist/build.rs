//! Building the [`Netlist`] from a syntax tree.

use std::cell::RefCell;

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
        node_texts: RefCell::new(NodeTexts::new(tree.source())),
        nodes: RefCell::new(Vec::new()),
    };
    let mut nl = Netlist {
        version: None,
        dialect: Dialect::Other,
        design: Design::default(),
        components: Vec::new(),
        libparts: Vec::new(),
        nets: Vec::new(),
        nodes: Vec::new(),
        diagnostics: Vec::new(),
        span: tree.span(root),
        node_texts: NodeTexts::default(),
        by_ref: hashbrown::HashTable::new(),
        by_net_name: hashbrown::HashTable::new(),
        lib_pin_at: Vec::new(),
        lib_pin_part: Vec::new(),
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
                    .at(v.span(), "version"),
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
    let mut diags = b.diags.into_inner();
    nl.node_texts = b.node_texts.into_inner();
    nl.nodes = b.nodes.into_inner();
    super::stream::link(tree.source(), &mut nl, &mut diags);
    nl.diagnostics = diags;
    Ok(nl)
}

struct Builder<'t, 'a> {
    t: &'t Tree<'a>,
    diags: RefCell<Vec<Diag>>,
    node_texts: RefCell<NodeTexts<'a>>,
    /// Every net's nodes, net after net.
    nodes: RefCell<Vec<Node<'a>>>,
}

impl<'a> Builder<'_, 'a> {
    fn text(&self, id: NodeId) -> Option<Text<'a>> {
        Some(Text::new(self.t.text(id)?.into(), self.t.span(id)))
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
                "sheet"
                    // the first sheet's title block names the board
                    if d.title.is_none() => {
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
        let mut comp = Component::new(Text::empty(self.t.span(c)), self.t.span(c));
        let (mut fields, mut properties) = (Vec::new(), Vec::new());
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
                // read (a list where the value belongs is a diagnostic) but not kept
                "datasheet" => drop(self.value(n)),
                "fields" => {
                    for f in self.each(n).filter(|(k, _)| *k == "field").map(|(_, f)| f) {
                        if let Some(f) = self.field(f) {
                            fields.push(f);
                        }
                    }
                }
                "property" => {
                    if let Some(f) = self.field(n) {
                        properties.push(f);
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
                    for (k2, c2) in self.each(n) {
                        if matches!(k2, "names" | "tstamps") {
                            drop(self.value(c2));
                        }
                    }
                }
                "tstamp" | "tstamps" => drop(self.value(n)),
                _ => {}
            }
        }
        if !have_ref || comp.reference.as_str().is_empty() {
            self.diags.borrow_mut().push(
                Diag::error("missing-field", "a component without a reference (`(ref ...)`) is left out")
                    .at(self.t.span(c), "this `comp` has no `ref`")
                    .with_help("annotate the schematic (every symbol needs a reference such as U1) and export the netlist again"),
            );
            return None;
        }
        comp.set_fields(fields.into_iter(), properties.into_iter());
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
        let mut net = Net::new(None, Text::empty(self.t.span(c)), self.t.span(c));
        let first = self.nodes.borrow().len();
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
                        (Some(reference), Some(pin)) => {
                            self.nodes
                                .borrow_mut()
                                .push(self.node_texts.borrow_mut().node(
                                    self.t.span(n),
                                    &reference,
                                    &pin,
                                    pinfunction.as_ref(),
                                    pintype,
                                    no_connect,
                                ))
                        }
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
        net.set_nodes(first, self.nodes.borrow().len() - first);
        net
    }
}
