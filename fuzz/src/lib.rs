//! Shared pieces of the fuzz targets: the invariants every diagnostic must keep, rendering
//! through the same handler the command line uses, and the structured netlist generator.

use arbitrary::{Arbitrary, Unstructured};
use netmargin::diag::Diag;
use netmargin::report::human::{self, HumanStyle};
use netmargin::sexpr::{self, Tree};
use netmargin::source::SourceFile;

/// Every label of `d` lies inside the text, and the diagnostic renders like the binary
/// renders it (the renderer slices the text at the spans).
pub fn check_diag(d: &Diag, source: &SourceFile) {
    let len = source.text().len();
    for l in &d.labels {
        assert!(
            l.span.start <= l.span.end,
            "{}: span {:?} runs backwards",
            d.code,
            l.span
        );
        assert!(
            l.span.end as usize <= len,
            "{}: span {:?} past the end ({len} bytes)",
            d.code,
            l.span
        );
    }
    assert!(!d.code.is_empty());
    assert!(!d.message.is_empty());
    let h = human::handler(HumanStyle {
        color: false,
        width: 100,
    });
    let out = human::render(&h, d, source);
    assert!(!out.is_empty());
}

/// Walks the whole tree: every node's span is inside its parent's and on character
/// boundaries, siblings are in order, and the re-printed tree reads back to the same shape.
pub fn check_tree(tree: &Tree<'_>) {
    let text = tree.source();
    let mut stack = vec![tree.root()];
    let mut seen = 0usize;
    while let Some(id) = stack.pop() {
        seen += 1;
        let sp = tree.span(id);
        assert!(text.is_char_boundary(sp.start as usize) && text.is_char_boundary(sp.end as usize));
        assert!(sp.start < sp.end);
        let mut prev_end = sp.start;
        for c in tree.children(id) {
            let cs = tree.span(c);
            assert!(
                cs.start >= prev_end && cs.end <= sp.end,
                "child {cs:?} outside {sp:?}"
            );
            prev_end = cs.end;
            stack.push(c);
        }
        let _ = tree.text(id);
    }
    assert_eq!(seen, tree.len(), "every node is reachable from the root");
    let printed = tree.print(tree.root());
    let again = sexpr::parse(&printed).expect("a re-printed tree reads back");
    assert_eq!(
        again.print(again.root()),
        printed,
        "printing is a fixed point"
    );
    assert_eq!(again.len(), tree.len());
}

/// The whole path the command line takes for one file's bytes: load, sniff, parse, model,
/// render every diagnostic.
pub fn run_model(bytes: &[u8]) {
    let source = match netmargin::input::load("fuzz.net", bytes.to_vec()) {
        Ok(s) => s,
        Err(e) => {
            check_diag(&e.diag, &e.source);
            return;
        }
    };
    match netmargin::pipeline::model_text(&source) {
        Ok((diags, summary)) => {
            for d in &diags {
                check_diag(d, &source);
            }
            assert!(summary.pins_on_no_net <= summary.pins);
        }
        Err(d) => check_diag(&d, &source),
    }
}

// ---------------------------------------------------------------------------------------
// Structured input: mostly-valid netlists, so the fuzzer spends its time in the model.

/// A value drawn from a small pool (so references, pins and codes collide often), or a
/// free string, written quoted or bare.
#[derive(Debug)]
pub struct Word(pub String, pub bool);

const POOL: &[&str] = &[
    "U1",
    "U2",
    "R1",
    "C1",
    "U1A",
    "1",
    "2",
    "3",
    "7",
    "14",
    "A1",
    "~",
    "",
    "74HC00",
    "74LS04",
    "CD4011B",
    "R",
    "C",
    "GND",
    "+5V",
    "VCC",
    "/A",
    "Net-(U1-Pad3)",
    "input",
    "output",
    "power_in",
    "passive",
    "tri_state",
    "open_collector",
    "bidirectional",
    "no_connect",
    "input+no_connect",
    "unspecified",
    "E",
    "D",
    "x",
    "4K7",
    "100n",
    "\u{3a9}",
    "\u{e9}\u{301}",
];

impl<'a> Arbitrary<'a> for Word {
    fn arbitrary(u: &mut Unstructured<'a>) -> arbitrary::Result<Self> {
        let quoted = u.arbitrary()?;
        let s = if u.ratio(7, 8)? {
            (*u.choose(POOL)?).to_string()
        } else {
            let s: String = u.arbitrary()?;
            s.chars().take(24).collect()
        };
        Ok(Word(s, quoted))
    }
}

impl Word {
    fn write(&self, out: &mut String) {
        let bare_ok = !self.0.is_empty()
            && !self
                .0
                .bytes()
                .any(|b| matches!(b, b' ' | b'\t' | b'\n' | b'\r' | 0x0c | b'(' | b')' | b'"'));
        if self.1 || !bare_ok {
            out.push('"');
            for c in self.0.chars() {
                match c {
                    '"' => out.push_str("\\\""),
                    '\\' => out.push_str("\\\\"),
                    '\n' => out.push_str("\\n"),
                    c => out.push(c),
                }
            }
            out.push('"');
        } else {
            out.push_str(&self.0);
        }
    }
}

/// An item that may be replaced by something wrong in its place.
#[derive(Debug, Arbitrary)]
pub enum Slot<T> {
    Good(T),
    Missing,
    /// A list where a value belongs, or a stray extra item.
    Junk(Junk),
}

#[derive(Debug, Arbitrary)]
pub enum Junk {
    EmptyList,
    Nested(Word),
    Atom(Word),
    Deep(u8),
}

impl Junk {
    fn write(&self, out: &mut String) {
        match self {
            Junk::EmptyList => out.push_str("()"),
            Junk::Nested(w) => {
                out.push('(');
                w.write(out);
                out.push(')');
            }
            Junk::Atom(w) => w.write(out),
            Junk::Deep(n) => {
                let n = *n as usize % 40;
                out.push_str(&"(".repeat(n + 1));
                out.push_str(&")".repeat(n + 1));
            }
        }
    }
}

fn field(out: &mut String, key: &str, v: &Slot<Word>) {
    match v {
        Slot::Good(w) => {
            out.push_str(" (");
            out.push_str(key);
            out.push(' ');
            w.write(out);
            out.push(')');
        }
        Slot::Missing => {}
        Slot::Junk(j) => {
            out.push_str(" (");
            out.push_str(key);
            out.push(' ');
            j.write(out);
            out.push(')');
        }
    }
}

#[derive(Debug, Arbitrary)]
pub struct Comp {
    pub reference: Slot<Word>,
    pub value: Slot<Word>,
    pub lib: Slot<Word>,
    pub part: Slot<Word>,
    pub fields: Vec<(Slot<Word>, Slot<Word>)>,
    pub property: Option<(Slot<Word>, Slot<Word>)>,
    pub extra: Option<Junk>,
}

#[derive(Debug, Arbitrary)]
pub struct LibPin {
    pub num: Slot<Word>,
    pub name: Slot<Word>,
    pub ptype: Slot<Word>,
}

#[derive(Debug, Arbitrary)]
pub struct LibPart {
    pub lib: Slot<Word>,
    pub part: Slot<Word>,
    pub aliases: Vec<Slot<Word>>,
    pub pins: Vec<LibPin>,
}

#[derive(Debug, Arbitrary)]
pub struct NetNode {
    pub reference: Slot<Word>,
    pub pin: Slot<Word>,
    pub pinfunction: Slot<Word>,
    pub pintype: Slot<Word>,
}

#[derive(Debug, Arbitrary)]
pub struct NetItem {
    pub code: Slot<Word>,
    pub name: Slot<Word>,
    pub nodes: Vec<NetNode>,
    pub extra: Option<Junk>,
}

/// Where the generated text is damaged, if at all.
#[derive(Debug, Arbitrary)]
pub enum Damage {
    None,
    /// Cut the text at this fraction (in 1/65536) of its length, on a character boundary.
    Truncate(u16),
    /// Insert a byte-level snippet at a fraction of the length.
    Insert(u16, Junk),
    /// Put text after the root list.
    Trailing(Word),
}

#[derive(Debug, Arbitrary)]
pub struct GenNetlist {
    pub version: Slot<Word>,
    pub design: Option<(Slot<Word>, Slot<Word>)>,
    pub components: Vec<Comp>,
    pub libparts: Vec<LibPart>,
    pub nets: Vec<NetItem>,
    pub unknown_section: Option<Junk>,
    pub crlf: bool,
    pub bom: bool,
    pub damage: Damage,
}

impl GenNetlist {
    /// Writes the netlist in KiCad's layout.
    pub fn to_text(&self) -> String {
        let nl = if self.crlf { "\r\n" } else { "\n" };
        let mut s = String::new();
        if self.bom {
            s.push('\u{feff}');
        }
        s.push_str("(export");
        field(&mut s, "version", &self.version);
        s.push_str(nl);
        if let Some((src, tool)) = &self.design {
            s.push_str("  (design");
            field(&mut s, "source", src);
            field(&mut s, "tool", tool);
            s.push_str(" (sheet (number 1) (name /) (title_block (title \"t\"))))");
            s.push_str(nl);
        }
        s.push_str("  (components");
        for c in &self.components {
            s.push_str(nl);
            s.push_str("    (comp");
            field(&mut s, "ref", &c.reference);
            field(&mut s, "value", &c.value);
            s.push_str(" (libsource");
            field(&mut s, "lib", &c.lib);
            field(&mut s, "part", &c.part);
            s.push(')');
            if !c.fields.is_empty() {
                s.push_str(" (fields");
                for (n, v) in &c.fields {
                    s.push_str(" (field");
                    field(&mut s, "name", n);
                    if let Slot::Good(w) = v {
                        s.push(' ');
                        w.write(&mut s);
                    }
                    s.push(')');
                }
                s.push(')');
            }
            if let Some((n, v)) = &c.property {
                s.push_str(" (property");
                field(&mut s, "name", n);
                field(&mut s, "value", v);
                s.push(')');
            }
            if let Some(j) = &c.extra {
                s.push(' ');
                j.write(&mut s);
            }
            s.push(')');
        }
        s.push(')');
        s.push_str(nl);
        s.push_str("  (libparts");
        for lp in &self.libparts {
            s.push_str(nl);
            s.push_str("    (libpart");
            field(&mut s, "lib", &lp.lib);
            field(&mut s, "part", &lp.part);
            if !lp.aliases.is_empty() {
                s.push_str(" (aliases");
                for a in &lp.aliases {
                    field(&mut s, "alias", a);
                }
                s.push(')');
            }
            s.push_str(" (pins");
            for p in &lp.pins {
                s.push_str(" (pin");
                field(&mut s, "num", &p.num);
                field(&mut s, "name", &p.name);
                field(&mut s, "type", &p.ptype);
                s.push(')');
            }
            s.push_str("))");
        }
        s.push(')');
        if let Some(j) = &self.unknown_section {
            s.push_str(nl);
            s.push_str("  ");
            j.write(&mut s);
        }
        s.push_str(nl);
        s.push_str("  (nets");
        for n in &self.nets {
            s.push_str(nl);
            s.push_str("    (net");
            field(&mut s, "code", &n.code);
            field(&mut s, "name", &n.name);
            for nd in &n.nodes {
                s.push_str(nl);
                s.push_str("      (node");
                field(&mut s, "ref", &nd.reference);
                field(&mut s, "pin", &nd.pin);
                field(&mut s, "pinfunction", &nd.pinfunction);
                field(&mut s, "pintype", &nd.pintype);
                s.push(')');
            }
            if let Some(j) = &n.extra {
                s.push(' ');
                j.write(&mut s);
            }
            s.push(')');
        }
        s.push_str("))");
        s.push_str(nl);
        match &self.damage {
            Damage::None => {}
            Damage::Truncate(f) => {
                let mut at = s.len() * *f as usize / 65536;
                while !s.is_char_boundary(at) {
                    at -= 1;
                }
                s.truncate(at);
            }
            Damage::Insert(f, j) => {
                let mut at = s.len() * *f as usize / 65536;
                while !s.is_char_boundary(at) {
                    at -= 1;
                }
                let mut ins = String::new();
                j.write(&mut ins);
                s.insert_str(at, &ins);
            }
            Damage::Trailing(w) => w.write(&mut s),
        }
        s
    }
}

/// The schematic reader on one sheet's bytes: load, sniff, parse, connect, name, model;
/// every diagnostic rendered, every span inside the text.
pub fn run_sheet(bytes: &[u8]) {
    let source = match netmargin::input::load("fuzz.kicad_sch", bytes.to_vec()) {
        Ok(s) => s,
        Err(e) => {
            check_diag(&e.diag, &e.source);
            return;
        }
    };
    match netmargin::schematic::load::single("fuzz.kicad_sch", source.text().to_string()) {
        Err(f) => {
            if let Some(src) = &f.source {
                check_diag(&f.diag, src);
            }
        }
        Ok(files) => match netmargin::schematic::read(&files) {
            Ok(nl) => {
                for d in &nl.diagnostics {
                    check_diag(d, &files.source);
                }
                let s = nl.summary();
                assert!(s.pins_on_no_net <= s.pins);
            }
            Err(d) => check_diag(&d, &files.source),
        },
    }
}
