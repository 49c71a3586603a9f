//! The netlist model: components, library parts, nets and nodes of a KiCad netlist, in one
//! shape for both dialects (version "D" of KiCad 4-5 and "E" of KiCad 6-9), every item
//! keeping its span in the file.
//!
//! Built from the syntax tree by [`build`]. Reading never stops at a bad item: problems
//! (a pin on two nets, a node naming a missing component, a missing field) become
//! diagnostics in [`Netlist::diagnostics`] and reading goes on. This layer knows nothing of
//! logic families; it only reports what the file says.

mod build;
mod model_text;
mod pintype;
pub mod stream;
mod ties;

use std::marker::PhantomData;

use hashbrown::HashTable;
use thin_vec::ThinVec;

pub use build::build;
pub use model_text::Text;
pub use pintype::PinType;
pub use stream::read;

use crate::diag::Diag;
use crate::source::Span;

/// A text of the model: borrowed from the file's text, or owned where unescaping or the
/// schematic reader made a new one. Two words where `std::borrow::Cow` takes four: the
/// model holds a few of them for every pin and node. Its lengths are 32-bit, as `Span`'s
/// offsets are: both readers refuse a file of 1 GiB or more, so every text fits.
pub type Str<'a> = beef::lean::Cow<'a, str>;

/// Which dialect the file is written in.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Dialect {
    /// Version "D": KiCad 4 and 5 (bare atoms, `tstamp`, pin types like `BiDi`, `3state`).
    D,
    /// Version "E": KiCad 6 to 9 (quoted atoms, `tstamps`, node `pintype`s).
    E,
    /// A version netmargin does not know; read as "E" is read.
    Other,
}

/// The `(design ...)` header.
#[derive(Debug, Clone, Default)]
pub struct Design<'a> {
    pub source: Option<Text<'a>>,
    pub date: Option<Text<'a>>,
    pub tool: Option<Text<'a>>,
    pub title: Option<Text<'a>>,
    pub company: Option<Text<'a>>,
    pub rev: Option<Text<'a>>,
}

/// `(field (name N) V)` or `(property (name N) (value V))`.
#[derive(Debug, Clone)]
pub struct Field<'a> {
    pub name: Text<'a>,
    /// KiCad 8 may write a field with no text.
    pub value: Option<Text<'a>>,
    pub span: Span,
}

#[derive(Debug, Clone)]
pub struct LibSource<'a> {
    pub lib: Option<Text<'a>>,
    pub part: Option<Text<'a>>,
    pub description: Option<Text<'a>>,
}

/// Where one pin of a component is connected.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Connection {
    /// On a net with at least one other pin.
    Net { net: u32, node: u32 },
    /// Alone on a one-node net: placed but wired to nothing (`Net-(U5-Pad4)`,
    /// `unconnected-(U1-Pad4)`), or a label used once.
    Alone { net: u32, node: u32 },
    /// In the part's library pins but on no net at all: with KiCad 5, a gate unit (possibly
    /// the power unit) that was never placed.
    Absent,
}

impl Connection {
    pub fn net(self) -> Option<usize> {
        match self {
            Connection::Net { net, .. } | Connection::Alone { net, .. } => Some(net as usize),
            Connection::Absent => None,
        }
    }
    /// True when the pin reaches no other pin.
    pub fn is_unconnected(self) -> bool {
        !matches!(self, Connection::Net { .. })
    }
}

/// One pin of a placed component, merged from its library part and the nets. Its number
/// and name are not copied here (a board has several pins for every node): they are read
/// through the library pin or the node it stands for ([`CompPin::num`], [`CompPin::name`]).
/// Sixteen bytes: its library pin, pin type and no-connect mark share one word.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CompPin {
    pub connection: Connection,
    /// The library pin (bits 0 to 26): an index into [`Netlist`]'s table of every library
    /// part's pins (one number where a library part's and its pin's would take two), `NONE`
    /// when the pin is only the nets'; the symbol's pin type (bits 27 to 30: the node's
    /// `pintype` when present, else the libpart's; read it with [`CompPin::ptype`]); and
    /// the no-connect mark (bit 31: [`CompPin::no_connect`]).
    bits: u32,
}

/// How many library pins [`CompPin`] can number: more than a file under 1 GiB can list,
/// since a library pin takes at least 12 bytes (`(pin(num 1))`).
const LIB_PIN_BITS: u32 = 27;
const LIB_PIN_MASK: u32 = (1 << LIB_PIN_BITS) - 1;
/// No library pin.
const NONE: u32 = LIB_PIN_MASK;
const NO_CONNECT_BIT: u32 = 1 << 31;

impl CompPin {
    fn pack(libpin: u32, ptype: PinType, no_connect: bool, connection: Connection) -> CompPin {
        // a file the readers accept cannot number `NONE` library pins (see `LIB_PIN_BITS`)
        debug_assert!(libpin <= NONE);
        CompPin {
            connection,
            bits: libpin.min(NONE)
                | (u32::from(ptype as u8) << LIB_PIN_BITS)
                | if no_connect { NO_CONNECT_BIT } else { 0 },
        }
    }
    /// A pin from library pin `libpin`, in the numbering of all library pins
    /// ([`Netlist::number_lib_pins`]).
    pub(crate) fn from_libpin(
        libpin: u32,
        ptype: PinType,
        no_connect: bool,
        connection: Connection,
    ) -> CompPin {
        CompPin::pack(libpin, ptype, no_connect, connection)
    }
    /// A pin the nets name but no library part lists: `connection` holds its node.
    pub(crate) fn from_node(ptype: PinType, no_connect: bool, connection: Connection) -> CompPin {
        CompPin::pack(NONE, ptype, no_connect, connection)
    }
    /// The library pin's number, or `NONE`.
    #[inline]
    fn lib_pin_raw(&self) -> u32 {
        self.bits & LIB_PIN_MASK
    }
    /// The symbol's pin type (the node's `pintype` when present, else the libpart's).
    #[inline]
    pub fn ptype(&self) -> PinType {
        PinType::ALL[((self.bits >> LIB_PIN_BITS) & 0xF) as usize]
    }
    /// The node's pintype carried `+no_connect`, or the symbol marks the pin no-connect.
    #[inline]
    pub fn no_connect(&self) -> bool {
        self.bits & NO_CONNECT_BIT != 0
    }
    /// The library pin's number in the netlist's numbering of all library parts' pins
    /// (below [`Netlist::lib_pin_count`]; read it with [`Netlist::lib_pin`]), `None` for a
    /// pin only the nets name. Pins of one library pin share it.
    pub fn lib_pin_number(&self) -> Option<u32> {
        (self.lib_pin_raw() != NONE).then_some(self.lib_pin_raw())
    }
    /// Index into the component's library part's pins.
    pub fn libpin(&self, nl: &Netlist<'_>) -> Option<u32> {
        (self.lib_pin_raw() != NONE).then(|| nl.lib_pin_of(self.lib_pin_raw()).1)
    }
    #[inline]
    fn lib<'n>(&self, nl: &'n Netlist<'_>) -> Option<&'n LibPin<'n>> {
        let g = self.lib_pin_raw();
        if g == NONE {
            return None;
        }
        let (part, pin) = nl.lib_pin_of(g);
        Some(&nl.libparts[part as usize].pins[pin as usize])
    }
    #[inline]
    fn node<'n, 'a>(&self, nl: &'n Netlist<'a>) -> Option<&'n Node<'a>> {
        match self.connection {
            Connection::Net { net, node } | Connection::Alone { net, node } => {
                Some(nl.node(net as usize, node as usize))
            }
            Connection::Absent => None,
        }
    }
    /// The pin number: the library pin's, else the node's.
    #[inline]
    pub fn num<'n>(&self, nl: &'n Netlist<'_>) -> &'n str {
        match self.lib(nl) {
            Some(lp) => lp.num.as_str(),
            None => self.node(nl).map_or("", |n| n.pin(nl)),
        }
    }
    /// The symbol's pin name (`~` or empty when unnamed), from the libpart or the node's
    /// `pinfunction`.
    #[inline]
    pub fn name<'n>(&self, nl: &'n Netlist<'_>) -> Option<&'n str> {
        self.lib(nl)
            .and_then(|lp| lp.name.as_ref().map(|n| n.as_str()))
            .or_else(|| self.node(nl).and_then(|n| n.pinfunction(nl)))
    }
    /// True when both pins have the same number and name (of parts alike, most often the
    /// same library pin, which is not read twice).
    pub fn same_texts(&self, other: &CompPin, nl: &Netlist<'_>) -> bool {
        if self.lib_pin_raw() != NONE && self.lib_pin_raw() == other.lib_pin_raw() {
            if self.lib(nl).is_some_and(|lp| lp.name.is_some()) {
                return true;
            }
            return self.name(nl) == other.name(nl);
        }
        self.num(nl) == other.num(nl) && self.name(nl) == other.name(nl)
    }
}

/// A placed component. What nothing reads after reading (the data-sheet link, the sheet
/// path, the time stamps) is not kept: the component's span covers it in the file.
#[derive(Debug, Clone)]
pub struct Component<'a> {
    pub reference: Text<'a>,
    pub value: Option<Text<'a>>,
    pub footprint: Option<Text<'a>>,
    /// The `(fields (field ...))`, then the `(property ...)` items, in one list: they are
    /// looked up together ([`Component::field`]), fields first.
    fields: ThinVec<Field<'a>>,
    pub libsource: Option<LibSource<'a>>,
    pub span: Span,
    /// The resolved library part (by lib and part, or through an alias).
    pub libpart: Option<u32>,
    /// Every pin: the library part's, plus any the nets name that it lacks.
    pub pins: Box<[CompPin]>,
}

impl<'a> Component<'a> {
    /// A component with reference `reference` at `span`, and nothing else yet.
    pub(crate) fn new(reference: Text<'a>, span: Span) -> Component<'a> {
        Component {
            reference,
            value: None,
            footprint: None,
            fields: ThinVec::new(),
            libsource: None,
            span,
            libpart: None,
            pins: Box::default(),
        }
    }
    /// Sets the component's fields and properties, read in that order: one allocation of
    /// their exact length.
    pub(crate) fn set_fields(
        &mut self,
        fields: impl ExactSizeIterator<Item = Field<'a>>,
        properties: impl ExactSizeIterator<Item = Field<'a>>,
    ) {
        let mut all = ThinVec::with_capacity(fields.len() + properties.len());
        all.extend(fields);
        all.extend(properties);
        self.fields = all;
    }
    /// The fields, then the properties.
    pub fn fields(&self) -> &[Field<'a>] {
        &self.fields
    }
    pub fn value_str(&self) -> &str {
        self.value.as_ref().map_or("", |v| v.as_str())
    }
    /// A field or property by name (case-insensitive), fields first.
    pub fn field(&self, name: &str) -> Option<&Field<'a>> {
        self.fields
            .iter()
            .find(|f| f.name.as_str().eq_ignore_ascii_case(name))
    }
    /// A pin by number.
    pub fn pin(&self, nl: &Netlist<'_>, num: &str) -> Option<&CompPin> {
        self.pins.iter().find(|p| p.num(nl) == num)
    }
}

#[derive(Debug, Clone)]
pub struct LibPin<'a> {
    pub num: Text<'a>,
    pub name: Option<Text<'a>>,
    pub ptype: PinType,
    pub span: Span,
}

#[derive(Debug, Clone)]
pub struct LibPart<'a> {
    pub lib: Option<Text<'a>>,
    pub part: Text<'a>,
    pub aliases: Vec<Text<'a>>,
    pub description: Option<Text<'a>>,
    pub docs: Option<Text<'a>>,
    pub footprints: Vec<Text<'a>>,
    pub fields: Vec<Field<'a>>,
    pub pins: Vec<LibPin<'a>>,
    pub span: Span,
}

/// Where one of a node's texts lies: its offset from the node's span's start and its
/// length, in bytes.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
struct At {
    off: u16,
    len: u16,
}

/// Where the nodes' texts are read: the file's text, which holds nearly all of them as
/// tokens within each node's span, and two lists for the others (unescaped, in a node longer
/// than 64 kB, or made by the schematic reader): references, and (pin number, pin function)
/// pairs. A node whose texts are kept apart holds an index into each, so nodes that name the
/// same reference (the pins of one placed symbol in one use of its sheet) or the same library
/// pin share one entry.
#[derive(Debug, Clone, Default)]
pub struct NodeTexts<'a> {
    text: &'a str,
    refs: Vec<Text<'a>>,
    pins: Vec<(Str<'a>, Option<Str<'a>>)>,
}

/// Where text `t` lies from `base` in `text` (within its quotes with `inner`), and whether
/// it is a quoted string: `None` unless it is a token of `text` at most 64 kB from `base`.
#[inline(always)]
fn place(text: &str, base: u32, t: &Text<'_>, inner: bool) -> Option<(At, bool)> {
    let (s, e, q) = t.token_in(text)?;
    let d = u32::from(q & inner);
    let off = (s + d).wrapping_sub(base);
    let len = (e - s) - 2 * d;
    if off > 0xFFFF || len > 0xFFFF {
        return None;
    }
    Some((
        At {
            off: off as u16,
            len: len as u16,
        },
        q,
    ))
}

/// [`Node`]'s `bits`: the reference is a quoted string, the node has a pin function, its
/// texts are kept apart.
const REF_QUOTED: u8 = 1;
const HAS_FUNCTION: u8 = 2;
const APART: u8 = 4;

impl<'a> NodeTexts<'a> {
    /// The texts of the nodes of a file whose text is `text`.
    pub fn new(text: &'a str) -> NodeTexts<'a> {
        NodeTexts {
            text,
            refs: Vec::new(),
            pins: Vec::new(),
        }
    }

    /// A node at `span` of the file, from the texts read within it: kept as their places in
    /// the file's text (from the span's start) when they are tokens of it, else copied
    /// beside the nodes.
    #[inline(always)]
    pub fn node(
        &mut self,
        span: Span,
        reference: &Text<'a>,
        pin: &Text<'a>,
        pinfunction: Option<&Text<'a>>,
        pintype: Option<PinType>,
        no_connect: bool,
    ) -> Node<'a> {
        let (text, base) = (self.text, span.start);
        let r = place(text, base, reference, false);
        let p = place(text, base, pin, true);
        let f = match pinfunction {
            None => Some((At::default(), false)),
            Some(t) => place(text, base, t, true),
        };
        if let (Some((r, rq)), Some((p, _)), Some((f, _))) = (r, p, f) {
            let mut bits = if rq { REF_QUOTED } else { 0 };
            if pinfunction.is_some() {
                bits |= HAS_FUNCTION;
            }
            return Node {
                span,
                comp: None,
                at: [r, p, f],
                pintype,
                no_connect,
                bits,
                _text: PhantomData,
            };
        }
        self.copied(span, reference, pin, pinfunction, pintype, no_connect)
    }

    /// A node whose texts are not all tokens of the file: they are kept apart.
    #[cold]
    #[inline(never)]
    fn copied(
        &mut self,
        span: Span,
        reference: &Text<'a>,
        pin: &Text<'a>,
        pinfunction: Option<&Text<'a>>,
        pintype: Option<PinType>,
        no_connect: bool,
    ) -> Node<'a> {
        self.apart(
            span,
            reference.clone(),
            pin.to_str(),
            pinfunction.map(|f| f.to_str()),
            pintype,
            no_connect,
        )
    }

    /// A node at `span` whose texts are kept beside the nodes, in entries of its own.
    pub fn apart(
        &mut self,
        span: Span,
        reference: Text<'a>,
        pin: Str<'a>,
        pinfunction: Option<Str<'a>>,
        pintype: Option<PinType>,
        no_connect: bool,
    ) -> Node<'a> {
        let r = self.reference(reference);
        let p = self.pin(pin, pinfunction);
        Node::apart(span, r, p, pintype, no_connect)
    }

    /// Keeps a reference beside the nodes, for the nodes that name it ([`NodeTexts::shared`]).
    pub fn reference(&mut self, reference: Text<'a>) -> u32 {
        let i = u32::try_from(self.refs.len()).expect("fewer than 2^32 nodes");
        self.refs.push(reference);
        i
    }

    /// Keeps a pin number and pin function beside the nodes, for the nodes of that pin
    /// ([`NodeTexts::shared`]).
    pub fn pin(&mut self, pin: Str<'a>, pinfunction: Option<Str<'a>>) -> u32 {
        let i = u32::try_from(self.pins.len()).expect("fewer than 2^32 nodes");
        self.pins.push((pin, pinfunction));
        i
    }

    /// The reference kept beside the nodes at `i` ([`NodeTexts::reference`]).
    pub fn reference_at(&self, i: u32) -> &Text<'a> {
        &self.refs[i as usize]
    }

    /// How many pin entries are kept beside the nodes: the index the next one takes.
    pub fn pin_count(&self) -> u32 {
        u32::try_from(self.pins.len()).expect("fewer than 2^32 nodes")
    }

    /// A node at `span` whose reference and pin texts are entries kept beside the nodes
    /// ([`NodeTexts::reference`], [`NodeTexts::pin`]), shared with other nodes.
    pub fn shared(
        &self,
        span: Span,
        reference: u32,
        pin: u32,
        pintype: Option<PinType>,
        no_connect: bool,
    ) -> Node<'a> {
        debug_assert!((reference as usize) < self.refs.len() && (pin as usize) < self.pins.len());
        Node::apart(span, reference, pin, pintype, no_connect)
    }

    /// The nodes' texts not kept in place, once the nodes are built (none for a netlist as
    /// KiCad writes it).
    pub(crate) fn shrink_to_fit(&mut self) {
        self.refs.shrink_to_fit();
        self.pins.shrink_to_fit();
    }

    /// How many references are kept apart (one for each node whose texts are not in its
    /// span, unless nodes share them).
    pub fn apart_count(&self) -> usize {
        self.refs.len()
    }
}

/// An index into a list of [`NodeTexts`] in the two halves of an [`At`].
#[inline]
fn split(i: u32) -> At {
    At {
        off: (i >> 16) as u16,
        len: i as u16,
    }
}

#[inline]
fn joined(at: At) -> usize {
    ((u32::from(at.off) << 16) | u32::from(at.len)) as usize
}

/// One `(node ...)` of a net: a component's pin. Its texts are not copied here (a board
/// has one node for nearly every pin): they are read through the netlist
/// ([`Node::reference`], [`Node::pin`], [`Node::pinfunction`]), which finds them in the
/// file's text within the node's span or, for the few nodes whose texts are not tokens
/// there, in a list beside the nodes ([`NodeTexts`]).
#[derive(Clone)]
pub struct Node<'a> {
    pub span: Span,
    /// The component this node names, if it exists, plus one (four bytes where an
    /// `Option<u32>` takes eight); read it with [`Node::component`].
    comp: Option<std::num::NonZeroU32>,
    /// The reference's token, the pin number and the pin function in the span; with
    /// `APART`, the indices of the reference and of the pin texts kept apart
    /// ([`NodeTexts`]), each in the two halves of one `At`.
    at: [At; 3],
    pub pintype: Option<PinType>,
    /// The node's pintype ended in `+no_connect`.
    pub no_connect: bool,
    bits: u8,
    _text: PhantomData<&'a str>,
}

impl<'a> Node<'a> {
    /// The component this node names, if it exists.
    pub fn component(&self) -> Option<u32> {
        self.comp.map(|c| c.get() - 1)
    }
    /// Links the node to component `ci`.
    pub(crate) fn set_component(&mut self, ci: u32) {
        self.comp = std::num::NonZeroU32::new(ci.wrapping_add(1));
    }

    /// A node whose texts are entries `reference` and `pin` of [`NodeTexts`].
    fn apart(
        span: Span,
        reference: u32,
        pin: u32,
        pintype: Option<PinType>,
        no_connect: bool,
    ) -> Node<'a> {
        Node {
            span,
            comp: None,
            at: [split(reference), split(pin), At::default()],
            pintype,
            no_connect,
            bits: APART,
            _text: PhantomData,
        }
    }

    /// The number of the reference kept apart ([`NodeTexts::reference`]), for a node whose
    /// texts are.
    pub(crate) fn reference_number(&self) -> Option<usize> {
        (self.bits & APART != 0).then(|| joined(self.at[0]))
    }
    /// The reference kept apart, for a node whose texts are.
    #[inline]
    fn apart_ref<'n>(&self, t: &'n NodeTexts<'a>) -> Option<&'n Text<'a>> {
        (self.bits & APART != 0).then(|| &t.refs[joined(self.at[0])])
    }
    /// The pin number and function kept apart, for a node whose texts are.
    #[inline]
    fn apart_pin<'n>(&self, t: &'n NodeTexts<'a>) -> Option<&'n (Str<'a>, Option<Str<'a>>)> {
        (self.bits & APART != 0).then(|| &t.pins[joined(self.at[1])])
    }
    #[inline]
    fn in_span<'n>(&self, t: &NodeTexts<'n>, at: At) -> &'n str {
        let s = (self.span.start + u32::from(at.off)) as usize;
        &t.text[s..s + usize::from(at.len)]
    }

    /// The component reference the node names.
    #[inline]
    pub fn reference<'n>(&self, nl: &'n Netlist<'a>) -> &'n str {
        self.reference_in(&nl.node_texts)
    }
    /// The place of the reference's token in the file.
    pub fn reference_span(&self, nl: &Netlist<'a>) -> Span {
        self.reference_span_in(&nl.node_texts)
    }
    /// The pin number (no span of its own: a diagnostic about a pin points at its node).
    #[inline]
    pub fn pin<'n>(&self, nl: &'n Netlist<'a>) -> &'n str {
        self.pin_in(&nl.node_texts)
    }
    /// The pin's function (name), when the node gives one.
    #[inline]
    pub fn pinfunction<'n>(&self, nl: &'n Netlist<'a>) -> Option<&'n str> {
        self.pinfunction_in(&nl.node_texts)
    }

    #[inline]
    pub fn reference_in<'n>(&self, t: &'n NodeTexts<'a>) -> &'n str {
        match self.apart_ref(t) {
            Some(a) => a.as_str(),
            None => {
                let q = u16::from(self.bits & REF_QUOTED != 0);
                let at = self.at[0];
                self.in_span(
                    t,
                    At {
                        off: at.off + q,
                        len: at.len - 2 * q,
                    },
                )
            }
        }
    }
    pub fn reference_span_in(&self, t: &NodeTexts<'a>) -> Span {
        match self.apart_ref(t) {
            Some(a) => a.span(),
            None => {
                let s = self.span.start + u32::from(self.at[0].off);
                Span {
                    start: s,
                    end: s + u32::from(self.at[0].len),
                }
            }
        }
    }
    #[inline]
    pub fn pin_in<'n>(&self, t: &'n NodeTexts<'a>) -> &'n str {
        match self.apart_pin(t) {
            Some(a) => &a.0,
            None => self.in_span(t, self.at[1]),
        }
    }
    /// The pin number as a model string, for as long as the file's text.
    pub(crate) fn pin_str_in(&self, t: &NodeTexts<'a>) -> Str<'a> {
        match self.apart_pin(t) {
            Some(a) => a.0.clone(),
            None => Str::borrowed(self.in_span(t, self.at[1])),
        }
    }
    #[inline]
    pub fn pinfunction_in<'n>(&self, t: &'n NodeTexts<'a>) -> Option<&'n str> {
        match self.apart_pin(t) {
            Some(a) => a.1.as_deref(),
            None => (self.bits & HAS_FUNCTION != 0).then(|| self.in_span(t, self.at[2])),
        }
    }
    /// The pin number is empty or white space (`pin.trim().is_empty()`), read without
    /// slicing the text for a pin number that starts with a printable ASCII character.
    pub(crate) fn pin_is_blank_in(&self, t: &NodeTexts<'a>) -> bool {
        if self.bits & APART == 0 {
            let at = self.at[1];
            if at.len == 0 {
                return true;
            }
            let first = t
                .text
                .as_bytes()
                .get((self.span.start + u32::from(at.off)) as usize);
            if first.is_some_and(|b| b.is_ascii_graphic()) {
                return false;
            }
        }
        self.pin_in(t).chars().all(char::is_whitespace)
    }
    /// The pin function becomes the pin number too (a symbol with unnumbered pins).
    pub(crate) fn number_by_function(&mut self, t: &mut NodeTexts<'a>) {
        if self.bits & APART != 0 {
            // an entry shared by nodes of one library pin: each of them would take the same
            let a = &mut t.pins[joined(self.at[1])];
            if let Some(f) = a.1.clone() {
                a.0 = f;
            }
        } else if self.bits & HAS_FUNCTION != 0 {
            self.at[1] = self.at[2];
        }
    }
}

impl std::fmt::Debug for Node<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Node")
            .field("span", &self.span)
            .field("component", &self.component())
            .field("pintype", &self.pintype)
            .field("no_connect", &self.no_connect)
            .finish_non_exhaustive()
    }
}

#[derive(Debug, Clone)]
pub struct Net<'a> {
    pub code: Option<Text<'a>>,
    /// May be empty; may hold KiCad markup (`~{RESET}`, `A_{8}`, `{slash}`).
    pub name: Text<'a>,
    pub span: Span,
    /// Where the net's nodes are in the netlist's one list of all nodes (`first`, then
    /// `count` of them): read them with [`Net::nodes`].
    first: u32,
    count: u32,
}

impl<'a> Net<'a> {
    /// A net with no nodes yet.
    pub fn new(code: Option<Text<'a>>, name: Text<'a>, span: Span) -> Net<'a> {
        Net {
            code,
            name,
            span,
            first: 0,
            count: 0,
        }
    }
    /// The net's nodes; de-duplicated: a (ref, pin) appears once.
    #[inline]
    pub fn nodes<'n>(&self, nl: &'n Netlist<'a>) -> &'n [Node<'a>] {
        &nl.nodes[self.range()]
    }
    /// How many nodes the net has.
    #[inline]
    pub fn node_count(&self) -> usize {
        self.count as usize
    }
    #[inline]
    fn range(&self) -> std::ops::Range<usize> {
        self.first as usize..(self.first + self.count) as usize
    }
    /// The net's nodes are `count` of the netlist's nodes from `first`.
    fn set_nodes(&mut self, first: usize, count: usize) {
        self.first = u32::try_from(first).expect("fewer than 2^32 nodes");
        self.count = u32::try_from(count).expect("fewer than 2^32 nodes");
    }
}

/// A whole netlist.
#[derive(Debug, Clone)]
pub struct Netlist<'a> {
    pub version: Option<Text<'a>>,
    pub dialect: Dialect,
    pub design: Design<'a>,
    pub components: Vec<Component<'a>>,
    pub libparts: Vec<LibPart<'a>>,
    pub nets: Vec<Net<'a>>,
    /// Every net's nodes, net after net ([`Net::nodes`]): one list where a list per net
    /// would take a header and a block of its own.
    nodes: Vec<Node<'a>>,
    /// Problems found while reading (reading went on).
    pub diagnostics: Vec<Diag>,
    pub span: Span,
    /// Where the nodes' texts are read.
    pub(crate) node_texts: NodeTexts<'a>,
    /// Components by reference: indices into `components`, hashed by the reference's text
    /// (the first component of a reference used twice).
    by_ref: HashTable<u32>,
    /// Nets by name: (the net whose name is the key, the net that name finds); a net tie's
    /// joined nets keep their names and find the net they were joined into.
    by_net_name: HashTable<(u32, u32)>,
    /// Where each library part's pins start in one numbering of all of them
    /// ([`CompPin`]'s `libpin`), and that numbering's (library part, pin) pairs.
    lib_pin_at: Vec<u32>,
    lib_pin_part: Vec<(u32, u32)>,
}

/// The hash of a text in the lookup tables.
pub(crate) fn text_hash(s: &str) -> u64 {
    use std::hash::BuildHasher;
    rustc_hash::FxBuildHasher.hash_one(s)
}

/// Counts for the per-file summary.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize)]
pub struct Summary {
    pub parts: usize,
    pub nets: usize,
    pub pins: usize,
    pub pins_on_no_net: usize,
}

impl<'a> Netlist<'a> {
    /// A netlist made by another reader (the schematic reader): its components, library
    /// parts and nets, and every node with its net's index (sorted by net), cross-referenced
    /// by the same linking pass the netlist readers end with (duplicate references, pins on
    /// two nets and the like become diagnostics). The text every span points into is
    /// `node_texts`'.
    pub fn assemble(
        components: Vec<Component<'a>>,
        libparts: Vec<LibPart<'a>>,
        mut nets: Vec<Net<'a>>,
        nodes: Vec<(u32, Node<'a>)>,
        node_texts: NodeTexts<'a>,
        mut diagnostics: Vec<Diag>,
        span: Span,
    ) -> Netlist<'a> {
        debug_assert!(nodes.windows(2).all(|w| w[0].0 <= w[1].0));
        let mut count = vec![0usize; nets.len()];
        for (n, _) in &nodes {
            count[*n as usize] += 1;
        }
        let mut first = 0;
        for (net, &c) in nets.iter_mut().zip(&count) {
            net.set_nodes(first, c);
            first += c;
        }
        drop(count);
        // in place: a node and its net's index take no more room than the pair did
        let mut nodes: Vec<Node<'a>> = nodes.into_iter().map(|(_, n)| n).collect();
        nodes.shrink_to_fit();
        let mut nl = Netlist {
            version: None,
            dialect: Dialect::E,
            design: Design::default(),
            components,
            libparts,
            nets,
            nodes,
            diagnostics: Vec::new(),
            span,
            node_texts,
            by_ref: HashTable::new(),
            by_net_name: HashTable::new(),
            lib_pin_at: Vec::new(),
            lib_pin_part: Vec::new(),
        };
        let text = nl.node_texts.text;
        stream::link(text, &mut nl, &mut diagnostics);
        nl.diagnostics = diagnostics;
        nl
    }

    /// Where the nodes' texts are read ([`Node::reference_in`] and the like, for a caller
    /// that holds a part of the netlist mutably).
    pub fn node_texts(&self) -> &NodeTexts<'a> {
        &self.node_texts
    }

    /// Node `k` of net `net`.
    #[inline]
    pub fn node(&self, net: usize, k: usize) -> &Node<'a> {
        &self.nodes[self.nets[net].first as usize + k]
    }
    /// Every net's nodes, net after net.
    pub fn all_nodes(&self) -> &[Node<'a>] {
        &self.nodes
    }

    /// The (library part, pin) of pin `g` in the numbering of all library pins.
    #[inline]
    fn lib_pin_of(&self, g: u32) -> (u32, u32) {
        self.lib_pin_part[g as usize]
    }
    /// How many library pins all library parts have ([`CompPin::lib_pin_number`]).
    pub fn lib_pin_count(&self) -> usize {
        self.lib_pin_part.len()
    }
    /// The library pin numbered `g` ([`CompPin::lib_pin_number`]).
    pub fn lib_pin(&self, g: u32) -> &LibPin<'a> {
        let (part, pin) = self.lib_pin_of(g);
        &self.libparts[part as usize].pins[pin as usize]
    }
    /// Numbers every library part's pins in one sequence, for [`CompPin`].
    pub(crate) fn number_lib_pins(&mut self) {
        let total: usize = self.libparts.iter().map(|lp| lp.pins.len()).sum();
        let mut at = Vec::with_capacity(self.libparts.len());
        let mut part = Vec::with_capacity(total);
        for (li, lp) in self.libparts.iter().enumerate() {
            at.push(part.len() as u32);
            part.extend((0..lp.pins.len()).map(|pi| (li as u32, pi as u32)));
        }
        self.lib_pin_at = at;
        self.lib_pin_part = part;
    }

    pub fn component(&self, reference: &str) -> Option<usize> {
        let comps = &self.components;
        self.by_ref
            .find(text_hash(reference), |&i| {
                comps[i as usize].reference.as_str() == reference
            })
            .map(|&i| i as usize)
    }
    pub fn net_by_name(&self, name: &str) -> Option<usize> {
        let nets = &self.nets;
        self.by_net_name
            .find(text_hash(name), |&(k, _)| {
                nets[k as usize].name.as_str() == name
            })
            .map(|&(_, n)| n as usize)
    }
    /// Net `net`'s name finds net `to` from now on (no effect for an unnamed net).
    pub(crate) fn name_finds(&mut self, net: usize, to: usize) {
        let nets = &self.nets;
        let name = nets[net].name.as_str();
        if name.is_empty() {
            return;
        }
        let h = text_hash(name);
        match self
            .by_net_name
            .find_mut(h, |&(k, _)| nets[k as usize].name.as_str() == name)
        {
            Some(e) => e.1 = to as u32,
            None => {
                self.by_net_name
                    .insert_unique(h, (net as u32, to as u32), |&(k, _)| {
                        text_hash(nets[k as usize].name.as_str())
                    });
            }
        }
    }
    pub fn summary(&self) -> Summary {
        let pins = self.components.iter().map(|c| c.pins.len()).sum();
        let pins_on_no_net = self
            .components
            .iter()
            .flat_map(|c| c.pins.iter())
            .filter(|p| p.connection.is_unconnected())
            .count();
        Summary {
            parts: self.components.len(),
            nets: self.nets.len(),
            pins,
            pins_on_no_net,
        }
    }
}

#[cfg(test)]
mod tests;
