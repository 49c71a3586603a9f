//! Reading the [`Netlist`] straight from the text, in one pass over the tokens and with no
//! syntax tree: the same model, diagnostics and syntax errors as [`crate::sexpr::parse`]
//! followed by [`build`](super::build), in less time and memory.
//!
//! The lexer is the syntax tree's, byte for byte (the same token rules, the same errors in
//! the same order). Each open list the model needs gets a small frame saying what it is
//! (a component, a node, a `(key value)` pair...); a list the model does not need, such as
//! `libraries` or a section a newer KiCad adds, is passed over by counting its depth, and
//! none of its contents is kept. Nothing recurses, and no input makes it panic.

use rustc_hash::FxHashMap as HashMap;

use super::*;
use crate::sexpr::{bom_len, errors, unescape, MAX_DEPTH};

/// The largest file the syntax tree can index; the same limit, so both readers agree.
const MAX_LEN: usize = (1 << 30) - 1;

/// Byte classes, as the syntax tree's lexer has them.
const WS: u8 = 1;
const DELIM: u8 = 2;
static CLASS: [u8; 256] = {
    let mut t = [0u8; 256];
    t[b' ' as usize] = WS;
    t[b'\t' as usize] = WS;
    t[b'\n' as usize] = WS;
    t[b'\r' as usize] = WS;
    t[0x0c] = WS;
    t[b'(' as usize] = DELIM;
    t[b')' as usize] = DELIM;
    t
};

/// Reads `text` (already known to be UTF-8, and already past [`crate::sexpr::sniff`]) into
/// the netlist model. `Err` for a syntax error or a root list that is not `(export ...)`;
/// every other problem is a diagnostic in the result.
pub fn read(text: &str) -> Result<Netlist<'_>, Diag> {
    if text.len() >= MAX_LEN {
        return Err(Diag::error(
            "too-large",
            format!(
                "the file is {} bytes; netmargin reads files up to {} bytes",
                text.len(),
                MAX_LEN
            ),
        ));
    }
    let b = text.as_bytes();
    let n = b.len();
    let mut rd = Reader::new(text);
    // start of each open list
    let mut open: Vec<u32> = Vec::with_capacity(16);
    let mut i = bom_len(text);
    let mut root_end: Option<usize> = None;
    let mut any = false;
    while i < n {
        let c = b[i];
        if CLASS[c as usize] == WS {
            i += 1;
            continue;
        }
        if let Some(root_end) = root_end {
            if c == b')' {
                return Err(errors::stray_close_after_root(i, root_end));
            }
            return Err(errors::trailing_text(text, i));
        }
        any = true;
        match c {
            b'(' => {
                if open.len() >= MAX_DEPTH {
                    return Err(errors::too_deep(i));
                }
                open.push(i as u32);
                rd.open();
                i += 1;
            }
            b')' => {
                let Some(start) = open.pop() else {
                    return Err(errors::stray_close(i));
                };
                i += 1;
                rd.close(Span {
                    start,
                    end: i as u32,
                });
                if open.is_empty() {
                    root_end = Some(i);
                }
            }
            b'"' => {
                if open.is_empty() {
                    return Err(errors::outside(i, i + 1));
                }
                let start = i;
                let mut j = i + 1;
                let mut escaped = false;
                loop {
                    // most strings are short: look at a few bytes before calling memchr
                    let near = (j + 24).min(n);
                    let hit = match b[j..near].iter().position(|&c| c == b'"' || c == b'\\') {
                        Some(p) => Some(j + p),
                        None => memchr::memchr2(b'"', b'\\', &b[near..]).map(|p| near + p),
                    };
                    match hit {
                        None => return Err(errors::unterminated_string(text, start)),
                        Some(at) => {
                            if b[at] == b'\\' {
                                escaped = true;
                                j = (at + 2).min(n);
                            } else {
                                j = at + 1;
                                break;
                            }
                        }
                    }
                }
                rd.token(start, j, if escaped { Tok::Escaped } else { Tok::Str });
                i = j;
            }
            _ => {
                let start = i;
                let mut j = i + 1;
                while j < n && CLASS[b[j] as usize] == 0 {
                    j += 1;
                }
                if open.is_empty() {
                    return Err(errors::outside(start, j));
                }
                rd.token(start, j, Tok::Atom);
                i = j;
            }
        }
    }
    if let Some(&o) = open.last() {
        return Err(errors::unclosed_list(text, o as usize, open.len()));
    }
    if !any {
        return Err(errors::no_expression());
    }
    rd.finish()
}

/// A token that is not a parenthesis.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Tok {
    Atom,
    /// A quoted string with no backslash in it.
    Str,
    /// A quoted string holding a backslash (maybe an escape).
    Escaped,
}

/// Where the value of a `(key value)` list goes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Slot {
    Version,
    Source,
    Date,
    Tool,
    Title,
    Company,
    Rev,
    Ref,
    Value,
    Footprint,
    Datasheet,
    Tstamp,
    FieldName,
    FieldValue,
    LsLib,
    LsPart,
    LsDescription,
    SpNames,
    SpTstamps,
    LpLib,
    LpPart,
    LpDescription,
    LpDocs,
    Alias,
    Fp,
    PinNum,
    PinName,
    PinType,
    NetCode,
    NetName,
    NodeRef,
    NodePin,
    NodeFunction,
    NodeType,
}

/// Whose list a field belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Owner {
    /// `(fields (field ...))` of a component.
    CompField,
    /// `(property ...)` of a component.
    CompProperty,
    /// `(fields (field ...))` of a library part.
    LibPart,
}

/// What an open list is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Role {
    /// Opened; its head (first child) has not been read yet.
    Pending,
    /// Not needed: its contents are counted, not kept.
    Skip,
    /// The root list is not `(export ...)`; the rest is only checked for syntax.
    NotExport,
    /// The first child of such a root is a list: its span is the error's place.
    NotExportHead,
    Root,
    /// `(key value)`: child 1 is the value.
    Value(Slot),
    /// A list where a value belongs.
    BadValue,
    Design,
    Sheet,
    TitleBlock,
    Components,
    Comp,
    CompFields,
    Field(Owner),
    LibSource,
    SheetPath,
    LibParts,
    LibPart,
    Aliases,
    Footprints,
    LibFields,
    Pins,
    Pin,
    Nets,
    Net,
    Node,
}

impl Role {
    /// Lists whose contents are only counted.
    fn skips(self) -> bool {
        matches!(
            self,
            Role::Skip | Role::NotExport | Role::NotExportHead | Role::BadValue
        )
    }
}

#[derive(Debug, Clone, Copy)]
struct Frame {
    role: Role,
    /// Children read so far (the head included).
    children: u32,
}

/// A library part being read.
#[derive(Default)]
struct LibPartAcc<'a> {
    lib: Option<Text<'a>>,
    part: Option<Text<'a>>,
    aliases: Vec<Text<'a>>,
    description: Option<Text<'a>>,
    docs: Option<Text<'a>>,
    footprints: Vec<Text<'a>>,
    fields: Vec<Field<'a>>,
    pins: Vec<LibPin<'a>>,
}

#[derive(Default)]
struct NodeAcc<'a> {
    reference: Option<Text<'a>>,
    pin: Option<Text<'a>>,
    pinfunction: Option<Text<'a>>,
    pintype: Option<PinType>,
    no_connect: bool,
}

fn empty_component<'a>() -> Component<'a> {
    let span = Span { start: 0, end: 0 };
    Component::new(Text::empty(span), span)
}

/// The model being built, and the open lists it cares about.
struct Reader<'a> {
    text: &'a str,
    frames: Vec<Frame>,
    /// Depth inside the innermost skipped list.
    skip: u32,
    nl: Netlist<'a>,
    diags: Vec<Diag>,
    /// Set when the root is not `(export ...)`: the root's head, when it is an atom, and
    /// the place of its first child (`None` until known).
    not_export: Option<(Option<&'a str>, Option<Span>)>,
    /// The current `(key value)` list's key and value.
    key: &'a str,
    val: Option<Text<'a>>,
    design: Design<'a>,
    comp: Component<'a>,
    have_ref: bool,
    field_name: Option<Text<'a>>,
    field_value: Option<Text<'a>>,
    libsource: LibSource<'a>,
    libpart: LibPartAcc<'a>,
    pin_num: Option<Text<'a>>,
    pin_name: Option<Text<'a>>,
    pin_type: PinType,
    net: Net<'a>,
    have_name: bool,
    node: NodeAcc<'a>,
    /// The open component's lists, gathered here and moved into the model with one
    /// allocation of their exact length when the list closes (no growing, no trimming).
    fields: Vec<Field<'a>>,
    properties: Vec<Field<'a>>,
    /// Where the open net's nodes start in the model's list of all nodes.
    net_first: usize,
}

impl<'a> Reader<'a> {
    fn new(text: &'a str) -> Reader<'a> {
        let span = Span { start: 0, end: 0 };
        Reader {
            text,
            frames: Vec::with_capacity(16),
            skip: 0,
            nl: Netlist {
                version: None,
                dialect: Dialect::Other,
                design: Design::default(),
                components: Vec::new(),
                libparts: Vec::new(),
                nets: Vec::new(),
                nodes: Vec::new(),
                diagnostics: Vec::new(),
                span,
                node_texts: NodeTexts::new(text),
                by_ref: hashbrown::HashTable::new(),
                by_net_name: hashbrown::HashTable::new(),
                lib_pin_at: Vec::new(),
                lib_pin_part: Vec::new(),
            },
            diags: Vec::new(),
            not_export: None,
            key: "",
            val: None,
            design: Design::default(),
            comp: empty_component(),
            have_ref: false,
            field_name: None,
            field_value: None,
            libsource: LibSource {
                lib: None,
                part: None,
                description: None,
            },
            libpart: LibPartAcc::default(),
            pin_num: None,
            pin_name: None,
            pin_type: PinType::Unknown,
            net: Net::new(None, Text::empty(span), span),
            have_name: false,
            node: NodeAcc::default(),
            fields: Vec::new(),
            properties: Vec::new(),
            net_first: 0,
        }
    }

    /// The value of an atom or a quoted string token.
    fn text_of(&self, start: usize, end: usize, tok: Tok) -> Text<'a> {
        let t = self.text;
        let span = Span::new(start, end);
        match tok {
            Tok::Atom => Text::token(t, start, end, false),
            Tok::Str => Text::token(t, start, end, true),
            Tok::Escaped => match unescape(&t[start + 1..end - 1]) {
                std::borrow::Cow::Borrowed(s) => Text::borrowed(s, span),
                std::borrow::Cow::Owned(s) => Text::owned(&s, span),
            },
        }
    }

    #[inline]
    fn open(&mut self) {
        if self.skip > 0 {
            self.skip += 1;
            return;
        }
        let Some(top) = self.frames.last_mut() else {
            self.frames.push(Frame {
                role: Role::Pending,
                children: 0,
            });
            return;
        };
        let index = top.children;
        top.children += 1;
        let role = top.role;
        let child = match role {
            r if r.skips() => {
                self.skip = 1;
                return;
            }
            Role::Pending => {
                // a list as a list's head: the list has no name
                if self.frames.len() == 1 {
                    self.frames[0].role = Role::NotExport;
                    self.not_export = Some((None, None));
                    Role::NotExportHead
                } else {
                    self.frames.last_mut().expect("a frame is open").role = Role::Skip;
                    self.skip = 1;
                    return;
                }
            }
            Role::Value(_) => {
                if index == 1 {
                    Role::BadValue
                } else {
                    self.skip = 1;
                    return;
                }
            }
            _ => Role::Pending,
        };
        self.frames.push(Frame {
            role: child,
            children: 0,
        });
    }

    /// An atom or a quoted string.
    #[inline]
    fn token(&mut self, start: usize, end: usize, tok: Tok) {
        if self.skip > 0 {
            return;
        }
        let depth = self.frames.len();
        let Some(top) = self.frames.last_mut() else {
            return; // the lexer refuses text outside the root
        };
        let index = top.children;
        top.children += 1;
        match top.role {
            Role::Pending => {
                let role = if tok != Tok::Atom {
                    None
                } else {
                    let head = &self.text[start..end];
                    let parent = if depth >= 2 {
                        Some(self.frames[depth - 2].role)
                    } else {
                        None
                    };
                    Some(self.role_of(parent, head, Span::new(start, end)))
                };
                let role = match role {
                    Some(r) => r,
                    None if depth == 1 => {
                        self.not_export = Some((None, Some(Span::new(start, end))));
                        Role::NotExport
                    }
                    None => Role::Skip,
                };
                self.frames.last_mut().expect("a frame is open").role = role;
            }
            Role::Value(_) if index == 1 => self.val = Some(self.text_of(start, end, tok)),
            Role::Field(_) => self.field_value = Some(self.text_of(start, end, tok)),
            _ => {}
        }
    }

    /// The role of a list by its parent's role and its head, and the state it starts.
    fn role_of(&mut self, parent: Option<Role>, head: &'a str, span: Span) -> Role {
        let value = |me: &mut Self, slot| {
            me.key = head;
            me.val = None;
            Role::Value(slot)
        };
        let Some(parent) = parent else {
            if head == "export" {
                return Role::Root;
            }
            self.not_export = Some((Some(head), Some(span)));
            return Role::NotExport;
        };
        match (parent, head) {
            (Role::Root, "version") => value(self, Slot::Version),
            (Role::Root, "design") => {
                self.design = Design::default();
                Role::Design
            }
            (Role::Root, "components") => Role::Components,
            (Role::Root, "libparts") => Role::LibParts,
            (Role::Root, "nets") => Role::Nets,
            (Role::Design, "source") => value(self, Slot::Source),
            (Role::Design, "date") => value(self, Slot::Date),
            (Role::Design, "tool") => value(self, Slot::Tool),
            // the first sheet's title block names the board
            (Role::Design, "sheet") if self.design.title.is_none() => Role::Sheet,
            (Role::Sheet, "title_block") => Role::TitleBlock,
            (Role::TitleBlock, "title") => value(self, Slot::Title),
            (Role::TitleBlock, "company") => value(self, Slot::Company),
            (Role::TitleBlock, "rev") => value(self, Slot::Rev),
            (Role::Components, "comp") => {
                self.comp = empty_component();
                self.fields.clear();
                self.properties.clear();
                self.have_ref = false;
                Role::Comp
            }
            (Role::Comp, "ref") => value(self, Slot::Ref),
            (Role::Comp, "value") => value(self, Slot::Value),
            (Role::Comp, "footprint") => value(self, Slot::Footprint),
            (Role::Comp, "datasheet") => value(self, Slot::Datasheet),
            (Role::Comp, "fields") => Role::CompFields,
            (Role::Comp, "property") => self.start_field(Owner::CompProperty),
            (Role::Comp, "libsource") => {
                self.libsource = LibSource {
                    lib: None,
                    part: None,
                    description: None,
                };
                Role::LibSource
            }
            (Role::Comp, "sheetpath") => Role::SheetPath,
            (Role::Comp, "tstamp" | "tstamps") => value(self, Slot::Tstamp),
            (Role::CompFields, "field") => self.start_field(Owner::CompField),
            (Role::Field(_), "name") => value(self, Slot::FieldName),
            (Role::Field(_), "value") => value(self, Slot::FieldValue),
            (Role::LibSource, "lib") => value(self, Slot::LsLib),
            (Role::LibSource, "part") => value(self, Slot::LsPart),
            (Role::LibSource, "description") => value(self, Slot::LsDescription),
            (Role::SheetPath, "names") => value(self, Slot::SpNames),
            (Role::SheetPath, "tstamps") => value(self, Slot::SpTstamps),
            (Role::LibParts, "libpart") => {
                self.libpart = LibPartAcc::default();
                Role::LibPart
            }
            (Role::LibPart, "lib") => value(self, Slot::LpLib),
            (Role::LibPart, "part") => value(self, Slot::LpPart),
            (Role::LibPart, "description") => value(self, Slot::LpDescription),
            (Role::LibPart, "docs") => value(self, Slot::LpDocs),
            (Role::LibPart, "aliases") => Role::Aliases,
            (Role::LibPart, "footprints") => Role::Footprints,
            (Role::LibPart, "fields") => Role::LibFields,
            (Role::LibPart, "pins") => Role::Pins,
            (Role::Aliases, "alias") => value(self, Slot::Alias),
            (Role::Footprints, "fp") => value(self, Slot::Fp),
            (Role::LibFields, "field") => self.start_field(Owner::LibPart),
            (Role::Pins, "pin") => {
                self.pin_num = None;
                self.pin_name = None;
                self.pin_type = PinType::Unknown;
                Role::Pin
            }
            (Role::Pin, "num") => value(self, Slot::PinNum),
            (Role::Pin, "name") => value(self, Slot::PinName),
            (Role::Pin, "type") => value(self, Slot::PinType),
            (Role::Nets, "net") => {
                self.net = Net::new(None, Text::empty(span), span);
                self.net_first = self.nl.nodes.len();
                self.have_name = false;
                Role::Net
            }
            (Role::Net, "code") => value(self, Slot::NetCode),
            (Role::Net, "name") => value(self, Slot::NetName),
            (Role::Net, "node") => {
                self.node = NodeAcc::default();
                Role::Node
            }
            (Role::Node, "ref") => value(self, Slot::NodeRef),
            (Role::Node, "pin") => value(self, Slot::NodePin),
            (Role::Node, "pinfunction") => value(self, Slot::NodeFunction),
            (Role::Node, "pintype") => value(self, Slot::NodeType),
            _ => Role::Skip,
        }
    }

    fn start_field(&mut self, owner: Owner) -> Role {
        self.field_name = None;
        self.field_value = None;
        Role::Field(owner)
    }

    /// A `(key value)` list's value, where it belongs.
    fn put(&mut self, slot: Slot, v: Option<Text<'a>>) {
        match slot {
            Slot::Version => self.nl.version = v,
            Slot::Source => self.design.source = v,
            Slot::Date => self.design.date = v,
            Slot::Tool => self.design.tool = v,
            Slot::Title => self.design.title = v,
            Slot::Company => self.design.company = v,
            Slot::Rev => self.design.rev = v,
            Slot::Ref => {
                if let Some(r) = v {
                    self.comp.reference = r;
                    self.have_ref = true;
                }
            }
            Slot::Value => self.comp.value = v,
            Slot::Footprint => self.comp.footprint = v,
            // read (a list where the value belongs is a diagnostic) but not kept: nothing
            // reads them after reading
            Slot::Datasheet | Slot::Tstamp | Slot::SpNames | Slot::SpTstamps => {}
            Slot::FieldName => self.field_name = v,
            Slot::FieldValue => self.field_value = v,
            Slot::LsLib => self.libsource.lib = v,
            Slot::LsPart => self.libsource.part = v,
            Slot::LsDescription => self.libsource.description = v,
            Slot::LpLib => self.libpart.lib = v,
            Slot::LpPart => self.libpart.part = v,
            Slot::LpDescription => self.libpart.description = v,
            Slot::LpDocs => self.libpart.docs = v,
            Slot::Alias => {
                if let Some(v) = v {
                    self.libpart.aliases.push(v);
                }
            }
            Slot::Fp => {
                if let Some(v) = v {
                    self.libpart.footprints.push(v);
                }
            }
            Slot::PinNum => self.pin_num = v,
            Slot::PinName => self.pin_name = v,
            Slot::PinType => {
                if let Some(v) = v {
                    self.pin_type = PinType::parse(v.as_str()).0;
                }
            }
            Slot::NetCode => self.net.code = v,
            Slot::NetName => {
                if let Some(v) = v {
                    self.net.name = v;
                    self.have_name = true;
                }
            }
            Slot::NodeRef => self.node.reference = v,
            Slot::NodePin => self.node.pin = v,
            Slot::NodeFunction => self.node.pinfunction = v,
            Slot::NodeType => {
                if let Some(v) = v {
                    let (t, nc) = PinType::parse(v.as_str());
                    self.node.pintype = Some(t);
                    self.node.no_connect = nc;
                }
            }
        }
    }

    #[inline]
    fn close(&mut self, span: Span) {
        if self.skip > 0 {
            self.skip -= 1;
            return;
        }
        let Some(frame) = self.frames.pop() else {
            return; // the lexer refuses a `)` with no list open
        };
        match frame.role {
            Role::Pending => {
                // an empty list
                if self.frames.is_empty() {
                    self.not_export = Some((None, Some(span)));
                }
            }
            Role::Skip | Role::NotExport => {}
            Role::NotExportHead => {
                if let Some((_, at)) = &mut self.not_export {
                    *at = Some(span);
                }
            }
            Role::Root => self.nl.span = span,
            Role::Value(slot) => {
                let v = self.val.take();
                self.put(slot, v);
            }
            Role::BadValue => {
                let key = self.key;
                self.diags.push(
                    Diag::error(
                        "bad-field",
                        format!("`({key} ...)` holds a list where its value belongs"),
                    )
                    .at(span, "expected a name or a quoted string")
                    .with_help("the file was edited by hand or damaged: export the netlist again"),
                );
            }
            Role::Design => self.nl.design = std::mem::take(&mut self.design),
            Role::Sheet | Role::TitleBlock => {}
            Role::Components | Role::LibParts | Role::Nets => {}
            Role::CompFields | Role::Aliases | Role::Footprints | Role::LibFields | Role::Pins => {}
            Role::Comp => self.end_comp(span),
            Role::Field(owner) => self.end_field(owner, span),
            Role::LibSource => {
                let ls = LibSource {
                    lib: self.libsource.lib.take(),
                    part: self.libsource.part.take(),
                    description: self.libsource.description.take(),
                };
                self.comp.libsource = Some(ls);
            }
            Role::SheetPath => {}
            Role::LibPart => self.end_libpart(span),
            Role::Pin => match self.pin_num.take() {
                Some(num) => self.libpart.pins.push(LibPin {
                    num,
                    name: self.pin_name.take(),
                    ptype: self.pin_type,
                    span,
                }),
                None => self.diags.push(
                    Diag::warning(
                        "missing-field",
                        "a library pin without a `(num ...)` is ignored",
                    )
                    .at(span, "no pin number"),
                ),
            },
            Role::Net => self.end_net(span),
            Role::Node => self.end_node(span),
        }
    }

    fn end_comp(&mut self, span: Span) {
        let mut comp = std::mem::replace(&mut self.comp, empty_component());
        if !self.have_ref || comp.reference.as_str().is_empty() {
            self.diags.push(
                Diag::error("missing-field", "a component without a reference (`(ref ...)`) is left out")
                    .at(span, "this `comp` has no `ref`")
                    .with_help("annotate the schematic (every symbol needs a reference such as U1) and export the netlist again"),
            );
            return;
        }
        comp.span = span;
        comp.set_fields(self.fields.drain(..), self.properties.drain(..));
        self.nl.components.push(comp);
    }

    fn end_field(&mut self, owner: Owner, span: Span) {
        let value = self.field_value.take();
        let Some(name) = self.field_name.take() else {
            let what = match owner {
                Owner::CompProperty => "property",
                Owner::CompField | Owner::LibPart => "field",
            };
            self.diags.push(
                Diag::warning(
                    "missing-field",
                    format!("a `{what}` without a `(name ...)` is ignored"),
                )
                .at(span, "no name"),
            );
            return;
        };
        let f = Field { name, value, span };
        match owner {
            Owner::CompField => self.fields.push(f),
            Owner::CompProperty => self.properties.push(f),
            Owner::LibPart => self.libpart.fields.push(f),
        }
    }

    fn end_libpart(&mut self, span: Span) {
        let lp = std::mem::take(&mut self.libpart);
        let Some(part) = lp.part else {
            self.diags.push(
                Diag::warning(
                    "missing-field",
                    "a `libpart` without a `(part ...)` is ignored",
                )
                .at(span, "no part name"),
            );
            return;
        };
        self.nl.libparts.push(LibPart {
            lib: lp.lib,
            part,
            aliases: lp.aliases,
            description: lp.description,
            docs: lp.docs,
            footprints: lp.footprints,
            fields: lp.fields,
            pins: lp.pins,
            span,
        });
    }

    fn end_net(&mut self, span: Span) {
        let mut net = std::mem::replace(&mut self.net, Net::new(None, Text::empty(span), span));
        net.span = span;
        if net.code.is_none() {
            self.diags.push(
                Diag::warning("missing-field", "a net without a `(code ...)`").at(span, "no code"),
            );
        }
        if !self.have_name {
            net.name.set_span(span);
            self.diags.push(
                Diag::warning(
                    "missing-field",
                    "a net without a `(name ...)`; it is read as unnamed",
                )
                .at(span, "no name"),
            );
        }
        net.set_nodes(self.net_first, self.nl.nodes.len() - self.net_first);
        self.nl.nets.push(net);
    }

    fn end_node(&mut self, span: Span) {
        // read in place: the next `(node ...)` starts from a new `NodeAcc`
        let nd = &self.node;
        match (&nd.reference, &nd.pin) {
            (Some(reference), Some(pin)) => {
                let node = self.nl.node_texts.node(
                    span,
                    reference,
                    pin,
                    nd.pinfunction.as_ref(),
                    nd.pintype,
                    nd.no_connect,
                );
                self.nl.nodes.push(node);
            }
            (r, _) => self.diags.push(
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
                .at(span, "incomplete node")
                .with_help("the file was edited by hand or damaged: export the netlist again"),
            ),
        }
    }

    /// The whole file has been read without a syntax error.
    fn finish(self) -> Result<Netlist<'a>, Diag> {
        if let Some((head, at)) = self.not_export {
            let span = at.unwrap_or(self.nl.span);
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
        let mut nl = self.nl;
        let mut diags = self.diags;
        nl.dialect = match nl.version.as_ref().map(|v| v.as_str()) {
            Some("D") => Dialect::D,
            Some("E") => Dialect::E,
            Some(other) => {
                let v = nl.version.as_ref().expect("version is some");
                diags.push(
                    Diag::info("netlist-version", format!("netlist version `{other}` is not one netmargin knows (D: KiCad 4-5, E: KiCad 6-9); reading it as version E"))
                        .at(v.span(), "version"),
                );
                Dialect::Other
            }
            None => {
                diags.push(
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
        link(self.text, &mut nl, &mut diags);
        nl.diagnostics = diags;
        Ok(nl)
    }
}

/// Cross-references: refs, libparts, node components, pin lists and connections. Both
/// readers ([`read`] and [`build`](super::build)) finish with it.
pub(crate) fn link<'a>(text: &'a str, nl: &mut Netlist<'a>, diags: &mut Vec<Diag>) {
    name_unnumbered_pins(nl);
    link_pins(text, nl, diags);
    super::ties::join_net_ties(nl);
    // grown by doubling as they were read: give back what the lists hold no item in
    nl.components.shrink_to_fit();
    nl.nets.shrink_to_fit();
}

/// A symbol drawn with pin names but no pin numbers (simulation and sketch libraries do it)
/// gives every node the pin `""`: keyed by number, all its pins would collapse into one pin
/// "on many nets". Such pins are keyed by their name instead, in the nodes and the libpart.
fn name_unnumbered_pins(nl: &mut Netlist<'_>) {
    let texts = &mut nl.node_texts;
    for nd in &mut nl.nodes {
        if nd.pin_is_blank_in(texts)
            && nd
                .pinfunction_in(texts)
                .is_some_and(|f| !f.trim().is_empty())
        {
            nd.number_by_function(texts);
        }
    }
    texts.shrink_to_fit();
    for lp in &mut nl.libparts {
        for p in &mut lp.pins {
            if p.num.as_str().trim().is_empty() {
                if let Some(n) = p.name.as_ref().filter(|n| !n.as_str().trim().is_empty()) {
                    p.num = Text::new(n.to_str(), p.num.span());
                }
            }
        }
    }
}

fn link_pins<'a>(text: &'a str, nl: &mut Netlist<'a>, diags: &mut Vec<Diag>) {
    // refs
    let comps = &nl.components;
    let ref_of = |i: &u32| comps[*i as usize].reference.as_str();
    // kept in the netlist: made before the keys below, which are given back once the nodes
    // are linked, so they leave no hole under it
    let mut by_ref: hashbrown::HashTable<u32> = hashbrown::HashTable::with_capacity(comps.len());
    // each component's reference as a short key, in one compact list: a node's look-up
    // compares keys there instead of reading the component and its text in the file (both
    // far apart on a big board); only a reference too long for a key reads the component
    let ref_keys: Vec<RefKey> = comps
        .iter()
        .map(|c| RefKey::of(c.reference.as_str()))
        .collect();
    for (i, c) in comps.iter().enumerate() {
        let h = text_hash(c.reference.as_str());
        let r = c.reference.as_str();
        if let Some(&first) = by_ref.find(h, |&j| same_ref(&ref_keys, comps, j, r, &ref_keys[i])) {
            let first = first as usize;
            diags.push(
                Diag::error(
                    "duplicate-ref",
                    format!("two components share the reference `{}`", c.reference),
                )
                .at(
                    c.reference.span(),
                    "this one is checked as written but its nets may be confused",
                )
                .also(nl.components[first].reference.span(), "first use")
                .with_help(
                    "re-annotate the schematic so every reference is unique, then export again",
                ),
            );
        } else {
            by_ref.insert_unique(h, i as u32, |j| text_hash(ref_of(j)));
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
            diags.push(
                Diag::info(
                    "missing-libpart",
                    format!(
                        "no library part `{}:{}` for {}: its pins on no net cannot be listed",
                        lib, part, c.reference
                    ),
                )
                .at(part.span(), "not found in `libparts`"),
            );
        }
    }
    for (c, r) in nl.components.iter_mut().zip(resolved) {
        c.libpart = r.map(|r| r as u32);
    }
    drop(by_lib_part);
    drop(by_part);

    // nodes: component links, de-duplication, pins on two nets. Sorting every
    // (component, pin, net, node) once keeps this O(n log n) whatever the shape.
    let mut codes: HashMap<&str, usize> =
        HashMap::with_capacity_and_hasher(nl.nets.len(), Default::default());
    // how many nodes name each component (from index 1, for the counting sort below); the
    // component itself is kept in the node
    let ncomp = nl.components.len();
    let mut comp_at = vec![0u32; ncomp + 1];
    let mut linked = 0usize;
    // Pin numbers as integers: each distinct pin text gets its rank in text order, so
    // sorting by rank sorts exactly as comparing the texts would. The texts are numbered
    // here as each node is linked (its pin's text lies beside its reference in the file),
    // then ranked below.
    let mut pin_ids: HashMap<Str<'a>, u32> = HashMap::default();
    // per node in the model's order: its pin's id, then rank (unused for a node naming no
    // component)
    let mut pin_of: Vec<u32> = vec![u32::MAX; nl.nodes.len()];
    for (ni, net) in nl.nets.iter_mut().enumerate() {
        let base = net.first as usize;
        if let Some(code) = &net.code {
            if let Some(&first) = codes.get(code.as_str()) {
                diags.push(
                    Diag::warning(
                        "duplicate-net-code",
                        format!("two nets share the code {}", code),
                    )
                    .at(code.span(), format!("also used by net #{}", first + 1)),
                );
            } else {
                codes.insert(
                    text.get(code.span().range()).map_or("", |_| code.as_str()),
                    ni,
                );
            }
        }
        for (k, node) in nl.nodes[net.range()].iter_mut().enumerate() {
            // a reader that made the components with the nodes (the schematic's) may have
            // linked a node already, to the component of its reference
            let found = node.component().or_else(|| {
                let r = node.reference_in(&nl.node_texts);
                let key = RefKey::of(r);
                let comps = &nl.components;
                by_ref
                    .find(text_hash(r), |&j| same_ref(&ref_keys, comps, j, r, &key))
                    .copied()
            });
            match found {
                Some(ci) => {
                    node.set_component(ci);
                    comp_at[ci as usize + 1] += 1;
                    linked += 1;
                    let pin = node.pin_in(&nl.node_texts);
                    let next = pin_ids.len() as u32;
                    pin_of[base + k] = match pin_ids.get(pin) {
                        Some(&id) => id,
                        None => {
                            pin_ids.insert(node.pin_str_in(&nl.node_texts), next);
                            next
                        }
                    };
                }
                None => diags.push(
                    Diag::error(
                        "unknown-component",
                        format!(
                            "net `{}` names {}, which is not among the components",
                            net.name,
                            node.reference_in(&nl.node_texts)
                        ),
                    )
                    .at(
                        node.reference_span_in(&nl.node_texts),
                        "no component has this reference",
                    )
                    .with_help("the netlist is out of step with the schematic: export it again"),
                ),
            }
        }
    }
    drop(codes);
    drop(ref_keys);
    // nets by name: the first net of a name
    let nets = &nl.nets;
    let name_of = |k: &(u32, u32)| nets[k.0 as usize].name.as_str();
    let mut by_net_name: hashbrown::HashTable<(u32, u32)> =
        hashbrown::HashTable::with_capacity(nets.len());
    for (ni, net) in nets.iter().enumerate() {
        let name = net.name.as_str();
        if name.is_empty() {
            continue;
        }
        let h = text_hash(name);
        if by_net_name.find(h, |k| name_of(k) == name).is_none() {
            by_net_name.insert_unique(h, (ni as u32, ni as u32), |k| text_hash(name_of(k)));
        }
    }

    let mut by_text: Vec<(&str, u32)> = pin_ids.iter().map(|(k, &id)| (k.as_ref(), id)).collect();
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
        if let Some(&rank) = rank_of_id.get(*p as usize) {
            *p = rank;
        }
    }
    drop(rank_of_id);

    // Group the linked nodes by component (a counting sort: linear, and it keeps each
    // component's nodes in net and node order), then sort each group by pin rank.
    for c in 0..ncomp {
        comp_at[c + 1] += comp_at[c];
    }
    let mut fill: Vec<u32> = comp_at[..ncomp].to_vec();
    // (pin rank, net, node)
    let mut sorted: Vec<(u32, u32, u32)> = vec![(0, 0, 0); linked];
    for (ni, net) in nl.nets.iter().enumerate() {
        let base = net.first as usize;
        for (k, node) in nl.nodes[net.range()].iter().enumerate() {
            if let Some(ci) = node.component() {
                let at = &mut fill[ci as usize];
                sorted[*at as usize] = (pin_of[base + k], ni as u32, k as u32);
                *at += 1;
            }
        }
    }
    drop(fill);
    drop(pin_of);
    for c in 0..ncomp {
        let group = &mut sorted[comp_at[c] as usize..comp_at[c + 1] as usize];
        if group.len() > 1 {
            group.sort_unstable();
        }
    }

    // Per-node tables in the model's order: node `k` of net `ni` is at `net_at[ni] + k`.
    let net_at: Vec<u32> = nl.nets.iter().map(|n| n.first).collect();
    let total = nl.nodes.len() as u32;

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
                let node = nl.node(e.1 as usize, e.2 as usize);
                twice.push((
                    f.1 as usize,
                    e.1 as usize,
                    node.span,
                    format!(
                        "{}.{}",
                        node.reference_in(&nl.node_texts),
                        node.pin_in(&nl.node_texts)
                    ),
                ));
            }
        }
    }
    // drop the repeats (and the nodes naming no component) and renumber the kept nodes
    // (`new_index` reuses the flat layout; none is needed when every node is kept)
    let dropped = keep.contains(&false);
    let mut new_index = Vec::new();
    if dropped {
        new_index = vec![u32::MAX; total as usize];
        for (ni, net) in nl.nets.iter().enumerate() {
            let base = net_at[ni] as usize;
            let keep = &keep[base..base + net.node_count()];
            let map = &mut new_index[base..base + net.node_count()];
            let mut n = 0u32;
            for (k, &kp) in keep.iter().enumerate() {
                if kp {
                    map[k] = n;
                    n += 1;
                }
            }
        }
        // the nets' nodes lie net after net: move each kept node down over the dropped
        let mut w = 0;
        for net in &mut nl.nets {
            let start = w;
            for k in net.range() {
                if keep[k] {
                    nl.nodes.swap(w, k);
                    w += 1;
                }
            }
            net.set_nodes(start, w - start);
        }
        nl.nodes.truncate(w);
    }
    nl.nodes.shrink_to_fit();
    drop(keep);
    // per component, its kept (pin rank, net, node), still sorted by pin: written over
    // `sorted` in place (an entry moves down or stays), with no second list
    let mut pins_at: Vec<u32> = Vec::with_capacity(ncomp + 1);
    let mut w = 0;
    for c in 0..ncomp {
        pins_at.push(w as u32);
        for r in comp_at[c] as usize..comp_at[c + 1] as usize {
            let (rank, ni, k) = sorted[r];
            let nk = if dropped {
                new_index[(net_at[ni as usize] + k) as usize]
            } else {
                k
            };
            if nk != u32::MAX {
                sorted[w] = (rank, ni, nk);
                w += 1;
            }
        }
    }
    pins_at.push(w as u32);
    sorted.truncate(w);
    let mut pin_nets = sorted;
    drop(new_index);
    drop(comp_at);
    drop(net_at);
    for (first, second, span, pin) in twice {
        let (f, n) = (&nl.nets[first], &nl.nets[second]);
        diags.push(
                Diag::error("pin-on-two-nets", format!("{pin} is on two nets: `{}` and `{}`", f.name, n.name))
                    .at(span, "second net")
                    .also(f.name.span(), "first net")
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
    nl.number_lib_pins();
    let lib_pin_at = &nl.lib_pin_at;
    // component pins: the libpart's, then any the nets name that it lacks. Made from the
    // last component to the first, so what is left to read of `pin_nets` is always its
    // start: its end is given back as the pins are made, and the two are never held whole
    // at once (a step of at least 64 Ki entries: a small board gives nothing back early).
    let step = (pin_nets.len() / 8).max(1 << 16);
    let mut kept = pin_nets.len();
    for (ci, c) in nl.components.iter_mut().enumerate().rev() {
        let end = pins_at[ci + 1] as usize;
        if kept - end >= step {
            pin_nets.truncate(end);
            pin_nets.shrink_to_fit();
            kept = end;
        }
        let mine = &pin_nets[pins_at[ci] as usize..end];
        let (nets, nodes) = (&nl.nets, &nl.nodes);
        let mut pins: Vec<CompPin> = Vec::new();
        used.clear();
        used.resize(mine.len(), false);
        if let Some(li) = c.libpart.map(|l| l as usize) {
            let lpins = &nl.libparts[li].pins;
            let (ranks, repeats) = &lib_pins[li];
            let first = lib_pin_at[li];
            pins.reserve(lpins.len());
            for (pi, lpin) in lpins.iter().enumerate() {
                // only a number an earlier pin had can be among the pins so far
                if repeats[pi]
                    && pins.len() < 64
                    && pins.iter().any(|p| {
                        p.lib_pin_number().is_some_and(|g| {
                            lpins[(g - first) as usize].num.as_str() == lpin.num.as_str()
                        })
                    })
                {
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
                        connection(nets, mine[i].1, mine[i].2)
                    }
                    None => Connection::Absent,
                };
                let mut ptype = lpin.ptype;
                let mut no_connect = lpin.ptype == PinType::NoConnect;
                if let Some(i) = found {
                    let nd = &nodes[nets[mine[i].1 as usize].first as usize + mine[i].2 as usize];
                    if let Some(t) = nd.pintype {
                        ptype = t;
                    }
                    no_connect |= nd.no_connect;
                }
                // the number and name are read through the library pin, or the node
                pins.push(CompPin::from_libpin(
                    first + pi as u32,
                    ptype,
                    no_connect,
                    connection,
                ));
            }
        }
        // pins named by nodes but missing from the libpart (or no libpart at all)
        for (i, e) in mine.iter().enumerate() {
            if used[i] {
                continue;
            }
            let node = &nodes[nets[e.1 as usize].first as usize + e.2 as usize];
            pins.push(CompPin::from_node(
                node.pintype.unwrap_or(PinType::Unknown),
                node.no_connect,
                connection(nets, e.1, e.2),
            ));
        }
        c.pins = pins.into_boxed_slice();
    }
    nl.by_ref = by_ref;
    nl.by_net_name = by_net_name;
}

/// A component reference of up to 15 bytes, held whole: its bytes, zeros after them, and
/// its length in the last byte. Two references held whole are equal exactly when their keys
/// are. A longer reference is marked by a length of 255 and compared as text.
#[derive(Clone, Copy, PartialEq, Eq)]
struct RefKey([u8; 16]);

impl RefKey {
    const LONG: u8 = u8::MAX;

    #[inline]
    fn of(r: &str) -> RefKey {
        let mut k = [0u8; 16];
        if r.len() < 16 {
            k[..r.len()].copy_from_slice(r.as_bytes());
            k[15] = r.len() as u8;
        } else {
            k[15] = Self::LONG;
        }
        RefKey(k)
    }

    /// True when the key holds the whole reference (it is not a long one).
    #[inline]
    fn is_whole(&self) -> bool {
        self.0[15] != Self::LONG
    }
}

/// Component `j`'s reference is `r`, whose key is `key`.
#[inline]
fn same_ref(keys: &[RefKey], comps: &[Component<'_>], j: u32, r: &str, key: &RefKey) -> bool {
    let k = &keys[j as usize];
    if k.is_whole() {
        k == key
    } else {
        comps[j as usize].reference.as_str() == r
    }
}

fn connection(nets: &[Net<'_>], net: u32, node: u32) -> Connection {
    if nets[net as usize].node_count() > 1 {
        Connection::Net { net, node }
    } else {
        Connection::Alone { net, node }
    }
}
