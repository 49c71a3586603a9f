//! The S-expression reader: text in, a flat tree of lists, atoms and quoted strings out,
//! every node keeping its byte span.
//!
//! * Zero-copy: atoms are slices of the input; quoted strings are unescaped on demand
//!   ([`Tree::text`]).
//! * Not recursive: an explicit stack, and a depth limit ([`MAX_DEPTH`]) that turns a
//!   pathological file into a clear error instead of a stack overflow.
//! * KiCad's lexical rules, not Lisp's: `;` is an ordinary character, atoms such as
//!   `5ACE05B6`, `#PWR01`, `+5V`, `/D[0]`, `C:\dir\x` stay whole and are never turned into
//!   numbers, and a backslash is an escape only inside a quoted string.
//!
//! This layer knows nothing of netlists beyond recognising, from the first bytes, the
//! files people commonly feed it by mistake ([`sniff`]).

use std::borrow::Cow;

use crate::diag::Diag;
use crate::source::Span;

/// Lists nested deeper than this are refused. KiCad netlists nest about seven levels.
pub const MAX_DEPTH: usize = 1000;

pub(crate) mod errors;

/// The kind of a syntax node.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    List,
    /// An unquoted atom.
    Atom,
    /// A quoted string (the span includes the quotes).
    Str,
}

/// Index of a node in its [`Tree`].
pub type NodeId = u32;

const KIND_SHIFT: u32 = 30;
const NEXT_MASK: u32 = (1 << KIND_SHIFT) - 1;

/// 12 bytes: span and (kind, next sibling). The first child of a list is the next node in
/// the arena when that node starts inside the list's span (the arena is in pre-order).
#[derive(Debug, Clone, Copy)]
struct Node {
    start: u32,
    end: u32,
    next_kind: u32,
}

impl Node {
    fn kind(self) -> Kind {
        match self.next_kind >> KIND_SHIFT {
            0 => Kind::List,
            1 => Kind::Atom,
            _ => Kind::Str,
        }
    }
    fn next(self) -> u32 {
        self.next_kind & NEXT_MASK
    }
}

/// A parsed file. Node 0 is the root list.
#[derive(Debug, Clone)]
pub struct Tree<'a> {
    text: &'a str,
    nodes: Vec<Node>,
}

impl<'a> Tree<'a> {
    pub fn root(&self) -> NodeId {
        0
    }
    pub fn source(&self) -> &'a str {
        self.text
    }
    pub fn len(&self) -> usize {
        self.nodes.len()
    }
    pub fn is_empty(&self) -> bool {
        self.nodes.is_empty()
    }
    pub fn kind(&self, id: NodeId) -> Kind {
        self.nodes[id as usize].kind()
    }
    pub fn span(&self, id: NodeId) -> Span {
        let n = self.nodes[id as usize];
        Span {
            start: n.start,
            end: n.end,
        }
    }
    /// The node's text exactly as written (quotes and escapes included).
    pub fn raw(&self, id: NodeId) -> &'a str {
        let n = self.nodes[id as usize];
        &self.text[n.start as usize..n.end as usize]
    }
    pub fn is_list(&self, id: NodeId) -> bool {
        self.kind(id) == Kind::List
    }
    /// The value of an atom or string (strings unescaped); `None` for a list.
    pub fn text(&self, id: NodeId) -> Option<Cow<'a, str>> {
        let n = self.nodes[id as usize];
        match n.kind() {
            Kind::List => None,
            Kind::Atom => Some(Cow::Borrowed(&self.text[n.start as usize..n.end as usize])),
            Kind::Str => Some(unescape(
                &self.text[n.start as usize + 1..n.end as usize - 1],
            )),
        }
    }
    /// The first child of a list.
    pub fn first_child(&self, id: NodeId) -> Option<NodeId> {
        let n = self.nodes[id as usize];
        if n.kind() != Kind::List {
            return None;
        }
        let c = id as usize + 1;
        match self.nodes.get(c) {
            Some(child) if child.start < n.end && child.start > n.start => Some(c as NodeId),
            _ => None,
        }
    }
    pub fn next_sibling(&self, id: NodeId) -> Option<NodeId> {
        match self.nodes[id as usize].next() {
            0 => None,
            n => Some(n),
        }
    }
    /// The children of a list (none for an atom).
    pub fn children(&self, id: NodeId) -> Children<'_, 'a> {
        Children {
            tree: self,
            next: self.first_child(id),
        }
    }
    /// The head of a list when it is an atom: `(net (code 1))` -> `net`.
    pub fn head(&self, id: NodeId) -> Option<&'a str> {
        let c = self.first_child(id)?;
        match self.kind(c) {
            Kind::Atom => Some(self.raw(c)),
            _ => None,
        }
    }
    /// True when `id` is a list whose head is the atom `name` (`head(id) == Some(name)`),
    /// told by comparing bytes, without making the head's `str`.
    #[inline]
    pub fn head_is(&self, id: NodeId, name: &str) -> bool {
        let Some(c) = self.first_child(id) else {
            return false;
        };
        let n = self.nodes[c as usize];
        n.kind() == Kind::Atom
            && (n.end - n.start) as usize == name.len()
            && self.text.as_bytes().get(n.start as usize..n.end as usize) == Some(name.as_bytes())
    }
    /// Number of children.
    pub fn child_count(&self, id: NodeId) -> usize {
        self.children(id).count()
    }
    /// Re-prints the tree in a canonical layout (one space between items); reading the
    /// result gives the same tree shape and atom texts.
    pub fn print(&self, id: NodeId) -> String {
        let mut out = String::new();
        if !self.is_list(id) {
            out.push_str(self.raw(id));
            return out;
        }
        out.push('(');
        // each entry: the next child to print in an open list
        let mut stack: Vec<Option<NodeId>> = vec![self.first_child(id)];
        while let Some(top) = stack.pop() {
            match top {
                None => out.push(')'),
                Some(n) => {
                    stack.push(self.next_sibling(n));
                    if !out.ends_with('(') {
                        out.push(' ');
                    }
                    if self.is_list(n) {
                        out.push('(');
                        stack.push(self.first_child(n));
                    } else {
                        out.push_str(self.raw(n));
                    }
                }
            }
        }
        out
    }
}

/// Iterator over a list's children.
pub struct Children<'t, 'a> {
    tree: &'t Tree<'a>,
    next: Option<NodeId>,
}

impl Iterator for Children<'_, '_> {
    type Item = NodeId;
    fn next(&mut self) -> Option<NodeId> {
        let cur = self.next?;
        self.next = self.tree.next_sibling(cur);
        Some(cur)
    }
}

/// Undoes KiCad's string escapes: `\"`, `\\`, `\n`, `\t`, `\r`. Any other backslash is kept
/// as written.
pub fn unescape(s: &str) -> Cow<'_, str> {
    if !s.contains('\\') {
        return Cow::Borrowed(s);
    }
    let mut out = String::with_capacity(s.len());
    let mut chars = s.chars();
    while let Some(c) = chars.next() {
        if c != '\\' {
            out.push(c);
            continue;
        }
        match chars.next() {
            Some('"') => out.push('"'),
            Some('\\') => out.push('\\'),
            Some('n') => out.push('\n'),
            Some('t') => out.push('\t'),
            Some('r') => out.push('\r'),
            Some(other) => {
                out.push('\\');
                out.push(other);
            }
            None => out.push('\\'),
        }
    }
    Cow::Owned(out)
}

/// Byte classes for the lexer.
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

/// Length of a UTF-8 byte-order mark at the start of `text` (0 or 3).
pub fn bom_len(text: &str) -> usize {
    if text.starts_with('\u{feff}') {
        3
    } else {
        0
    }
}

/// Recognises the inputs people commonly give by mistake, from the first bytes alone, so a
/// 40 MB PCB file is refused before it is parsed. `None` means "looks like an
/// S-expression; parse it".
pub fn sniff(text: &str) -> Option<Diag> {
    let start = bom_len(text);
    let body = &text[start..];
    let trimmed = body.trim_start();
    let at = start + (body.len() - trimmed.len());
    if trimmed.is_empty() {
        let msg = if text.is_empty() {
            "the file is empty".to_string()
        } else {
            "the file holds only white space".to_string()
        };
        return Some(
            Diag::error("empty-file", msg)
                .with_help("export the netlist again from KiCad's schematic editor (File > Export > Netlist, KiCad format)"),
        );
    }
    let first_line_end = trimmed.find(['\n', '\r']).unwrap_or(trimmed.len());
    let first_line = &trimmed[..first_line_end];
    let span = Span::new(at, at + first_line.len().min(60));
    if first_line.starts_with("EESchema Schematic File") {
        return Some(
            Diag::error("wrong-format", "this is a legacy KiCad schematic (`.sch`, \"EESchema Schematic File\"), not a netlist")
                .at(span, "schematic header")
                .with_help("export a netlist from it (File > Export > Netlist, KiCad format) and check the `.net` file, or open and save the project in KiCad 6 or newer and check its `.kicad_sch`"),
        );
    }
    let compact: String = first_line
        .chars()
        .filter(|c| !c.is_whitespace())
        .take(40)
        .collect();
    if compact.starts_with("({EESchemaNetlist") || compact.starts_with("({") {
        return Some(
            Diag::error(
                "wrong-format",
                "this is the older KiCad netlist format (\"( { EESchema Netlist Version ... }\"), not the S-expression export",
            )
            .at(span, "old-format header")
            .with_help("export the netlist again in KiCad's S-expression format (Eeschema: Netlist > KiCad tab, or kicad-cli sch export netlist)"),
        );
    }
    if trimmed.starts_with('{') || trimmed.starts_with('[') {
        return Some(
            Diag::error(
                "wrong-format",
                "this looks like JSON, not a KiCad S-expression netlist",
            )
            .at(Span::new(at, at + 1), "a netlist starts with `(export`")
            .with_help("give netmargin the `.net` file KiCad exports"),
        );
    }
    if trimmed.starts_with(')') {
        return Some(
            Diag::error(
                "stray-close",
                "the file begins with `)`, which closes a list that was never opened",
            )
            .at(Span::new(at, at + 1), "no matching `(`")
            .with_help("the file is damaged or not a netlist: export it again from KiCad"),
        );
    }
    if !trimmed.starts_with('(') {
        return Some(
            Diag::error(
                "not-a-netlist",
                "this is not a KiCad S-expression netlist: it does not begin with `(`",
            )
            .at(
                Span::new(at, at + first_line.chars().next().map_or(1, char::len_utf8)),
                "expected `(export`",
            )
            .with_help("give netmargin the `.net` file KiCad exports (File > Export > Netlist)"),
        );
    }
    // `(kicad_sch`, `(kicad_pcb` ... : read the head atom.
    let after = trimmed[1..].trim_start();
    let head_at = at + (trimmed.len() - after.len());
    let head_len = after
        .bytes()
        .position(|b| CLASS[b as usize] != 0 || b == b'"')
        .unwrap_or(after.len());
    let head = &after[..head_len];
    let hspan = Span::new(head_at, head_at + head_len);
    let wrong = |what: &str| {
        Some(
            Diag::error("wrong-format", format!("this is {what}, not a netlist"))
                .at(hspan, "this file's kind")
                .with_help("export a netlist from the schematic (KiCad: File > Export > Netlist, or `kicad-cli sch export netlist board.kicad_sch`) and check that"),
        )
    };
    match head {
        "kicad_sch" => Some(
            Diag::error("wrong-format", "this is a KiCad schematic (`.kicad_sch`) given where a netlist was read")
                .at(hspan, "this file's kind")
                .with_help("give netmargin the sheet's path: it reads KiCad 6-9 schematic projects from their files (standard input is read as one sheet)"),
        ),
        "kicad_pcb" => wrong("a KiCad board layout (`.kicad_pcb`)"),
        "kicad_symbol_lib" => wrong("a KiCad symbol library (`.kicad_sym`)"),
        "footprint" | "module" => wrong("a KiCad footprint (`.kicad_mod`)"),
        "fp_lib_table" | "sym_lib_table" => wrong("a KiCad library table"),
        "kicad_wks" | "page_layout" => wrong("a KiCad drawing-sheet file"),
        _ => None,
    }
}

/// Where the root list's `(` is: after a byte-order mark and white space. `None` when the
/// text does not begin so, or is too large for [`parse`].
fn root_open(text: &str) -> Option<usize> {
    let b = text.as_bytes();
    let n = b.len();
    if n >= NEXT_MASK as usize {
        return None;
    }
    let mut i = bom_len(text);
    while i < n && CLASS[b[i] as usize] == WS {
        i += 1;
    }
    (i < n && b[i] == b'(').then_some(i)
}

/// The lists among the root list's children whose head is the atom `head`, as spans,
/// found without building a tree: the text is read by the lexical rules of [`parse`], but
/// only brackets and strings are looked at (atoms and white space inside lists cannot make
/// a text unreadable). `None` when the text is not one root list that [`parse`] reads
/// without an error (or when in doubt): [`parse`] it then, for the tree or the error.
pub fn root_lists(text: &str, head: &str) -> Option<Vec<Span>> {
    let b = text.as_bytes();
    let n = b.len();
    let mut i = root_open(text)?;
    let mut out = Vec::new();
    let mut depth = 0usize;
    // the start of the root's child being kept, and the end of the last quoted string
    let mut open: Option<usize> = None;
    let mut string_end = usize::MAX;
    // brackets come every few bytes in these files: a byte at a time beats a search
    while i < n {
        let p = i;
        match b[p] {
            b'(' => {
                depth += 1;
                if depth > MAX_DEPTH {
                    return None;
                }
                if depth == 2 {
                    let mut j = p + 1;
                    while j < n && CLASS[b[j] as usize] == WS {
                        j += 1;
                    }
                    let mut k = j;
                    while k < n && CLASS[b[k] as usize] == 0 {
                        k += 1;
                    }
                    // an atom head (a string is not one), spelled as asked
                    if j < n && b[j] != b'"' && &b[j..k] == head.as_bytes() {
                        open = Some(p);
                    }
                }
                i = p + 1;
            }
            b')' => {
                if depth == 0 {
                    return None;
                }
                depth -= 1;
                if depth == 1 {
                    if let Some(start) = open.take() {
                        out.push(Span::new(start, p + 1));
                    }
                }
                if depth == 0 {
                    // the root is closed: only white space may follow
                    return b[p + 1..]
                        .iter()
                        .all(|&c| CLASS[c as usize] == WS)
                        .then_some(out);
                }
                i = p + 1;
            }
            b'"' => {
                // a quote starts a string where a token starts (after white space, a bracket
                // or another string); anywhere else it is inside an atom, which runs to the
                // next white space or bracket
                let starts = CLASS[b[p - 1] as usize] != 0 || string_end == p;
                if starts {
                    let mut j = p + 1;
                    loop {
                        let at = j + memchr::memchr2(b'"', b'\\', &b[j..])?;
                        if b[at] == b'\\' {
                            j = (at + 2).min(n);
                        } else {
                            j = at + 1;
                            break;
                        }
                    }
                    string_end = j;
                    i = j;
                } else {
                    let mut k = p + 1;
                    while k < n && CLASS[b[k] as usize] == 0 {
                        k += 1;
                    }
                    i = k;
                }
            }
            _ => i += 1,
        }
    }
    // a list left open
    None
}

/// The root list's children read one at a time, so a large file is never held as one tree:
/// each list among them is parsed into a tree of its own (the list is node 0, its spans
/// offsets into the whole text, as [`parse`] gives them), which the next list's tree
/// replaces; atoms and strings among them are passed over. The lexical rules are those of
/// [`parse`]; where [`parse`] would fail (or in doubt) the reading stops with `Err(())`, and
/// the caller parses the whole text for the error.
pub struct Items<'a> {
    text: &'a str,
    /// The next byte to read inside the root list.
    pos: usize,
    root_start: usize,
    /// The root list's end, once read.
    root_end: Option<usize>,
    head: Option<&'a str>,
    /// The last list read; its nodes are reused for the next.
    tree: Tree<'a>,
    /// The lists open within the one being read: (node, last child or 0).
    stack: Vec<(u32, u32)>,
}

impl<'a> Items<'a> {
    /// Starts reading `text`: `None` when it does not begin (after a byte-order mark and
    /// white space) with the root's `(`, or is too large for [`parse`].
    pub fn new(text: &'a str) -> Option<Items<'a>> {
        let b = text.as_bytes();
        let n = b.len();
        let mut i = root_open(text)?;
        let root_start = i;
        i += 1;
        while i < n && CLASS[b[i] as usize] == WS {
            i += 1;
        }
        // the head: the first child when it is an atom (it runs to white space or a bracket)
        let mut head = None;
        if i < n && CLASS[b[i] as usize] == 0 && b[i] != b'"' {
            let s = i;
            while i < n && CLASS[b[i] as usize] == 0 {
                i += 1;
            }
            head = Some(&text[s..i]);
        }
        Some(Items {
            text,
            pos: i,
            root_start,
            root_end: None,
            head,
            tree: Tree {
                text,
                nodes: Vec::new(),
            },
            stack: Vec::new(),
        })
    }

    /// The root list's head (`kicad_sch`), as [`Tree::head`] gives it.
    pub fn head(&self) -> Option<&'a str> {
        self.head
    }

    /// The root list's span, once [`Items::next_list`] has read to its end.
    pub fn root_span(&self) -> Option<Span> {
        self.root_end.map(|e| Span::new(self.root_start, e))
    }

    /// The next list among the root's children, as a tree whose node 0 is the list;
    /// `Ok(None)` once the root list has closed with only white space after it; `Err(())`
    /// where [`parse`] would fail.
    #[allow(clippy::result_unit_err)]
    pub fn next_list(&mut self) -> Result<Option<&Tree<'a>>, ()> {
        if self.root_end.is_some() {
            return Ok(None);
        }
        let b = self.text.as_bytes();
        let n = b.len();
        let mut i = self.pos;
        loop {
            while i < n && CLASS[b[i] as usize] == WS {
                i += 1;
            }
            if i == n {
                return Err(());
            }
            match b[i] {
                b'(' => break,
                b')' => {
                    if !b[i + 1..].iter().all(|&c| CLASS[c as usize] == WS) {
                        return Err(());
                    }
                    self.root_end = Some(i + 1);
                    self.pos = n;
                    return Ok(None);
                }
                b'"' => i = string_end(b, i).ok_or(())?,
                _ => {
                    while i < n && CLASS[b[i] as usize] == 0 {
                        i += 1;
                    }
                }
            }
        }
        self.pos = self.list(i)?;
        Ok(Some(&self.tree))
    }

    /// Reads the list opening at `i` (a child of the root) into `self.tree`; returns the
    /// byte after its `)`.
    fn list(&mut self, mut i: usize) -> Result<usize, ()> {
        let b = self.text.as_bytes();
        let n = b.len();
        let nodes = &mut self.tree.nodes;
        let stack = &mut self.stack;
        nodes.clear();
        stack.clear();
        macro_rules! link {
            ($idx:expr) => {
                if let Some(top) = stack.last_mut() {
                    if top.1 != 0 {
                        let prev = top.1 as usize;
                        nodes[prev].next_kind |= $idx;
                    }
                    top.1 = $idx;
                }
            };
        }
        loop {
            if i == n {
                return Err(());
            }
            let c = b[i];
            if CLASS[c as usize] == WS {
                i += 1;
                continue;
            }
            match c {
                b'(' => {
                    // the root list is open around this one
                    if stack.len() + 1 >= MAX_DEPTH {
                        return Err(());
                    }
                    let idx = nodes.len() as u32;
                    link!(idx);
                    nodes.push(Node {
                        start: i as u32,
                        end: 0,
                        next_kind: 0,
                    });
                    stack.push((idx, 0));
                    i += 1;
                }
                b')' => {
                    let (idx, _) = stack.pop().ok_or(())?;
                    nodes[idx as usize].end = (i + 1) as u32;
                    i += 1;
                    if stack.is_empty() {
                        return Ok(i);
                    }
                }
                b'"' => {
                    let j = string_end(b, i).ok_or(())?;
                    let idx = nodes.len() as u32;
                    link!(idx);
                    nodes.push(Node {
                        start: i as u32,
                        end: j as u32,
                        next_kind: 2 << KIND_SHIFT,
                    });
                    i = j;
                }
                _ => {
                    let start = i;
                    let mut j = i + 1;
                    while j < n && CLASS[b[j] as usize] == 0 {
                        j += 1;
                    }
                    let idx = nodes.len() as u32;
                    link!(idx);
                    nodes.push(Node {
                        start: start as u32,
                        end: j as u32,
                        next_kind: 1 << KIND_SHIFT,
                    });
                    i = j;
                }
            }
        }
    }
}

/// The byte after the quoted string opening at `start`, by [`parse`]'s rules (a backslash
/// escapes the next byte); `None` when it is never closed.
fn string_end(b: &[u8], start: usize) -> Option<usize> {
    let n = b.len();
    let mut j = start + 1;
    loop {
        let at = j + memchr::memchr2(b'"', b'\\', &b[j..])?;
        if b[at] == b'\\' {
            j = (at + 2).min(n);
        } else {
            return Some(at + 1);
        }
    }
}

/// Reads `text` (already known to be UTF-8) into a tree. One root list is expected, with
/// only white space around it.
pub fn parse(text: &str) -> Result<Tree<'_>, Diag> {
    if text.len() >= NEXT_MASK as usize {
        return Err(Diag::error(
            "too-large",
            format!(
                "the file is {} bytes; netmargin reads files up to {} bytes",
                text.len(),
                NEXT_MASK
            ),
        ));
    }
    let b = text.as_bytes();
    let mut nodes: Vec<Node> = Vec::with_capacity(b.len() / 6 + 4);
    // (list node index, last child index or 0)
    let mut stack: Vec<(u32, u32)> = Vec::with_capacity(16);
    let mut i = bom_len(text);
    let n = b.len();
    let mut root_done = false;

    macro_rules! link {
        ($idx:expr) => {
            if let Some(top) = stack.last_mut() {
                if top.1 != 0 {
                    let prev = top.1 as usize;
                    nodes[prev].next_kind |= $idx;
                }
                top.1 = $idx;
            }
        };
    }

    while i < n {
        let c = b[i];
        if CLASS[c as usize] == WS {
            i += 1;
            continue;
        }
        if root_done && c == b')' {
            return Err(errors::stray_close_after_root(i, nodes[0].end as usize));
        }
        if root_done {
            return Err(errors::trailing_text(text, i));
        }
        match c {
            b'(' => {
                if stack.len() >= MAX_DEPTH {
                    return Err(errors::too_deep(i));
                }
                let idx = nodes.len() as u32;
                link!(idx);
                nodes.push(Node {
                    start: i as u32,
                    end: 0,
                    next_kind: 0,
                });
                stack.push((idx, 0));
                i += 1;
            }
            b')' => {
                let Some((idx, _)) = stack.pop() else {
                    return Err(errors::stray_close(i));
                };
                nodes[idx as usize].end = (i + 1) as u32;
                i += 1;
                if stack.is_empty() {
                    root_done = true;
                }
            }
            b'"' => {
                if stack.is_empty() {
                    return Err(errors::outside(i, i + 1));
                }
                let start = i;
                let mut j = i + 1;
                loop {
                    match memchr::memchr2(b'"', b'\\', &b[j..]) {
                        None => return Err(errors::unterminated_string(text, start)),
                        Some(p) => {
                            let at = j + p;
                            if b[at] == b'\\' {
                                j = at + 2;
                                if j > n {
                                    j = n;
                                }
                            } else {
                                j = at + 1;
                                break;
                            }
                        }
                    }
                }
                let idx = nodes.len() as u32;
                link!(idx);
                nodes.push(Node {
                    start: start as u32,
                    end: j as u32,
                    next_kind: 2 << KIND_SHIFT,
                });
                i = j;
            }
            _ => {
                let start = i;
                let mut j = i + 1;
                while j < n && CLASS[b[j] as usize] == 0 {
                    j += 1;
                }
                if stack.is_empty() {
                    return Err(errors::outside(start, j));
                }
                let idx = nodes.len() as u32;
                link!(idx);
                nodes.push(Node {
                    start: start as u32,
                    end: j as u32,
                    next_kind: 1 << KIND_SHIFT,
                });
                i = j;
            }
        }
    }
    if let Some(&(open, _)) = stack.last() {
        return Err(errors::unclosed_list(
            text,
            nodes[open as usize].start as usize,
            stack.len(),
        ));
    }
    if nodes.is_empty() {
        return Err(errors::no_expression());
    }
    Ok(Tree { text, nodes })
}

#[cfg(test)]
mod tests;
