//! Property tests of the reader and the netlist model.
//!
//! * A generated tree, written with arbitrary white space, reads back as the tree it was, and
//!   `Tree::print` of it reads back to the same tree again.
//! * Real fixtures, damaged (cut at a random point, bytes flipped, ranges duplicated, deleted
//!   or moved), give a model or an error whose places lie inside the input and start on a
//!   character boundary; nothing panics.
//! * The model does not depend on the order of components, library parts, nets, nodes or the
//!   root's sections: the summary, the diagnostics (less their places) and every
//!   component's pin-to-net map stay the same when the fixtures' lists are shuffled.
//! * Neither do the checks' findings (code, severity, net, pins, the words of the message);
//!   and renaming references consistently renames the findings' pins and the references in
//!   their messages, and changes nothing else.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use netmargin::diag::Diag;
use netmargin::netlist::{self, Connection, Netlist};
use netmargin::sexpr::{self, Kind, NodeId, Tree};
use netmargin::source::SourceFile;
use proptest::prelude::*;

// ---------------------------------------------------------------------------------------------
// Generated trees

#[derive(Debug, Clone)]
enum G {
    Atom(String),
    Str(String),
    /// Children, each with the white space written before it.
    List(Vec<(String, G)>),
}

fn ws() -> impl Strategy<Value = String> {
    prop::sample::select(vec![" ", "  ", "\n", "\t", "\r\n", "\n    ", "\r", "\x0c"])
        .prop_map(String::from)
}

fn atom() -> impl Strategy<Value = String> {
    // KiCad-like atoms and a few non-ASCII ones (U+00A0 is not a separator for KiCad)
    prop_oneof![
        "[A-Za-z0-9_+#/~.:;{}$*<>=!?&|,'-]{1,10}",
        "[µΩé日\u{a0}\u{feff}a-z]{1,4}",
        Just("\\".to_string()),
        Just("5ACE05B6".to_string()),
    ]
}

fn gtree() -> impl Strategy<Value = G> {
    let leaf = prop_oneof![atom().prop_map(G::Atom), any::<String>().prop_map(G::Str)];
    leaf.prop_recursive(6, 96, 8, |inner| {
        prop::collection::vec((ws(), inner), 0..8).prop_map(G::List)
    })
}

fn groot() -> impl Strategy<Value = G> {
    (prop::collection::vec((ws(), gtree()), 0..8), ws()).prop_map(|(kids, _)| G::List(kids))
}

fn write_g(g: &G, out: &mut String) {
    match g {
        G::Atom(a) => out.push_str(a),
        G::Str(s) => {
            out.push('"');
            for c in s.chars() {
                match c {
                    '"' => out.push_str("\\\""),
                    '\\' => out.push_str("\\\\"),
                    c => out.push(c),
                }
            }
            out.push('"');
        }
        G::List(kids) => {
            out.push('(');
            for (w, k) in kids {
                out.push_str(w);
                write_g(k, out);
            }
            out.push(')');
        }
    }
}

/// The tree under `id` is `g`: same kinds, atoms' text, strings' unescaped text.
fn same(t: &Tree<'_>, id: NodeId, g: &G) -> Result<(), String> {
    match (t.kind(id), g) {
        (Kind::Atom, G::Atom(a)) if t.raw(id) == a => Ok(()),
        (Kind::Str, G::Str(s)) if t.text(id).as_deref() == Some(s.as_str()) => Ok(()),
        (Kind::List, G::List(kids)) => {
            let ids: Vec<NodeId> = t.children(id).collect();
            if ids.len() != kids.len() {
                return Err(format!(
                    "list at {:?}: {} children, expected {}",
                    t.span(id),
                    ids.len(),
                    kids.len()
                ));
            }
            for (c, (_, k)) in ids.iter().zip(kids) {
                same(t, *c, k)?;
            }
            Ok(())
        }
        (k, g) => Err(format!(
            "node {:?} `{}` is {k:?}, expected {g:?}",
            t.span(id),
            t.raw(id)
        )),
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, ..ProptestConfig::default() })]

    #[test]
    fn generated_trees_read_back_and_print_to_the_same_tree(g in groot(), lead in ws(), trail in ws(), bom in any::<bool>()) {
        let mut text = String::new();
        if bom {
            text.push('\u{feff}');
        }
        text.push_str(&lead);
        write_g(&g, &mut text);
        text.push_str(&trail);
        let t = sexpr::parse(&text).map_err(|d| TestCaseError::fail(format!("{}: {}", d.code, d.message)))?;
        same(&t, t.root(), &g).map_err(TestCaseError::fail)?;
        let printed = t.print(t.root());
        let t2 = sexpr::parse(&printed).map_err(|d| TestCaseError::fail(format!("re-read: {}: {}", d.code, d.message)))?;
        same(&t2, t2.root(), &g).map_err(TestCaseError::fail)?;
        prop_assert_eq!(t2.print(t2.root()), printed);
    }
}

// ---------------------------------------------------------------------------------------------
// Damaged fixtures

fn fixture_files() -> Vec<PathBuf> {
    let base = Path::new(env!("CARGO_MANIFEST_DIR")).join("fixtures");
    let mut out = Vec::new();
    for dir in ["boards", "demo", "model-errors", "quirks"] {
        for e in std::fs::read_dir(base.join(dir))
            .expect("fixture folder")
            .flatten()
        {
            let p = e.path();
            if p.extension().is_some_and(|x| x == "net") {
                out.push(p);
            }
        }
    }
    out.sort();
    assert!(out.len() >= 15, "fixtures missing: {out:?}");
    out
}

fn fixtures() -> &'static [(String, Vec<u8>)] {
    static F: std::sync::OnceLock<Vec<(String, Vec<u8>)>> = std::sync::OnceLock::new();
    F.get_or_init(|| {
        fixture_files()
            .into_iter()
            .map(|p| {
                (
                    p.file_name().unwrap().to_string_lossy().into_owned(),
                    std::fs::read(&p).expect("fixture"),
                )
            })
            .collect()
    })
}

#[derive(Debug, Clone)]
enum Damage {
    Truncate(f64),
    Flip(f64, u8),
    Duplicate(f64, usize, f64),
    Delete(f64, usize),
    Move(f64, usize, f64),
    Insert(f64, Vec<u8>),
}

fn damage() -> impl Strategy<Value = Damage> {
    let interesting = prop::sample::select(vec![
        b"(".to_vec(),
        b")".to_vec(),
        b"\"".to_vec(),
        b"\\".to_vec(),
        b"\x00".to_vec(),
        b"\xff".to_vec(),
        b"\xe2\x82".to_vec(),
        "\u{feff}".as_bytes().to_vec(),
        "Ω".as_bytes().to_vec(),
        b"\r".to_vec(),
        b"(ref U1)".to_vec(),
        b"(node (ref U1) (pin 1))".to_vec(),
        b"(export".to_vec(),
    ]);
    prop_oneof![
        (0.0..1.0f64).prop_map(Damage::Truncate),
        (0.0..1.0f64, 1..=255u8).prop_map(|(a, x)| Damage::Flip(a, x)),
        (0.0..1.0f64, 1..400usize, 0.0..1.0f64).prop_map(|(a, n, b)| Damage::Duplicate(a, n, b)),
        (0.0..1.0f64, 1..400usize).prop_map(|(a, n)| Damage::Delete(a, n)),
        (0.0..1.0f64, 1..400usize, 0.0..1.0f64).prop_map(|(a, n, b)| Damage::Move(a, n, b)),
        (0.0..1.0f64, interesting).prop_map(|(a, v)| Damage::Insert(a, v)),
    ]
}

fn apply(bytes: &mut Vec<u8>, d: &Damage) {
    let at = |f: f64, len: usize| ((len as f64 * f) as usize).min(len);
    let len = bytes.len();
    match d {
        Damage::Truncate(f) => bytes.truncate(at(*f, len)),
        Damage::Flip(f, x) => {
            if len > 0 {
                let i = at(*f, len - 1);
                bytes[i] ^= x;
            }
        }
        Damage::Duplicate(f, n, g) => {
            let s = at(*f, len);
            let e = (s + n).min(len);
            let range = bytes[s..e].to_vec();
            let to = at(*g, len);
            bytes.splice(to..to, range);
        }
        Damage::Delete(f, n) => {
            let s = at(*f, len);
            let e = (s + n).min(len);
            bytes.drain(s..e);
        }
        Damage::Move(f, n, g) => {
            let s = at(*f, len);
            let e = (s + n).min(len);
            let range: Vec<u8> = bytes.drain(s..e).collect();
            let to = at(*g, bytes.len());
            bytes.splice(to..to, range);
        }
        Damage::Insert(f, v) => {
            let to = at(*f, len);
            bytes.splice(to..to, v.iter().copied());
        }
    }
}

/// Every label inside the text, the primary one starting on a character boundary.
fn places_inside(d: &Diag, text: &str) -> Result<(), TestCaseError> {
    for l in &d.labels {
        prop_assert!(
            l.span.start <= l.span.end,
            "{}: {:?} runs backwards",
            d.code,
            l.span
        );
        prop_assert!(
            l.span.end as usize <= text.len(),
            "{}: {:?} past the end ({} bytes)",
            d.code,
            l.span,
            text.len()
        );
    }
    if let Some(s) = d.primary_span() {
        prop_assert!(
            text.is_char_boundary(s.start as usize),
            "{}: {:?} starts inside a character",
            d.code,
            s
        );
    }
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 512, ..ProptestConfig::default() })]

    #[test]
    fn damaged_fixtures_give_a_model_or_an_error_inside_the_input(
        which in any::<prop::sample::Index>(),
        damages in prop::collection::vec(damage(), 1..5),
    ) {
        let (name, original) = &fixtures()[which.index(fixtures().len())];
        let mut bytes = original.clone();
        for d in &damages {
            apply(&mut bytes, d);
        }
        let len = bytes.len();
        match netmargin::input::load(name, bytes) {
            Err(e) => {
                for l in &e.diag.labels {
                    prop_assert!(l.span.end as usize <= len);
                }
                prop_assert!(e.diag.code == "binary-file" || e.diag.code == "invalid-utf8", "{}", e.diag.code);
            }
            Ok(src) => match netmargin::pipeline::model_text(&src) {
                Ok((diags, summary)) => {
                    for d in &diags {
                        places_inside(d, src.text())?;
                    }
                    prop_assert!(summary.pins_on_no_net <= summary.pins);
                }
                Err(d) => places_inside(&d, src.text())?,
            },
        }
    }
}

// ---------------------------------------------------------------------------------------------
// Order invariance

/// A small deterministic permutation source (the proptest seed picks the order).
struct Mix(u64);

impl Mix {
    fn next(&mut self) -> u64 {
        // splitmix64
        self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }
    fn shuffle<T>(&mut self, v: &mut [T]) {
        for i in (1..v.len()).rev() {
            let j = (self.next() % (i as u64 + 1)) as usize;
            v.swap(i, j);
        }
    }
}

/// Re-prints `id`, shuffling the items of the lists whose order the model must not depend on:
/// the root's sections, `components`, `libparts`, `nets` and the nodes of each `net`. The
/// head of a list stays first; a net's `code` and `name` may move among its nodes.
fn print_shuffled(
    t: &Tree<'_>,
    id: NodeId,
    parent_head: Option<&str>,
    mix: &mut Mix,
    out: &mut String,
) {
    if !t.is_list(id) {
        out.push_str(t.raw(id));
        return;
    }
    let head = t.head(id);
    let mut kids: Vec<NodeId> = t.children(id).collect();
    let shuffle = matches!(
        head,
        Some("export" | "components" | "libparts" | "nets" | "net")
    ) && parent_head != Some("node");
    if shuffle && kids.len() > 2 {
        mix.shuffle(&mut kids[1..]);
    }
    out.push('(');
    for (i, k) in kids.iter().enumerate() {
        if i > 0 {
            out.push(if mix.next().is_multiple_of(4) {
                '\n'
            } else {
                ' '
            });
        }
        print_shuffled(t, *k, head, mix, out);
    }
    out.push(')');
}

/// What the model says, less the places and the order: the summary; each diagnostic's code,
/// severity, net, pins and the words of its message, sorted; and per component reference
/// (when references are unique and no pin is on two nets) its pins with their net's name and connection kind.
#[derive(Debug, PartialEq)]
struct Fingerprint {
    summary: netmargin::netlist::Summary,
    diags: Vec<(String, String, Option<String>, Vec<String>, Vec<String>)>,
    pins: Option<BTreeMap<String, Vec<(String, String, &'static str)>>>,
}

fn fingerprint(nl: &Netlist<'_>) -> Fingerprint {
    let mut diags: Vec<_> = nl
        .diagnostics
        .iter()
        .map(|d| {
            let mut words: Vec<String> = d.message.split_whitespace().map(String::from).collect();
            words.sort();
            let mut pins: Vec<String> = d.pins().map(String::from).collect();
            pins.sort();
            (
                d.code.to_string(),
                d.severity.to_string(),
                d.net.as_deref().map(String::from),
                pins,
                words,
            )
        })
        .collect();
    diags.sort();
    // with a reference used twice, or a pin on two nets, which item wins depends on the order
    let unique = !nl
        .diagnostics
        .iter()
        .any(|d| d.code == "duplicate-ref" || d.code == "pin-on-two-nets");
    let pins = unique.then(|| {
        nl.components
            .iter()
            .map(|c| {
                let mut v: Vec<(String, String, &'static str)> = c
                    .pins
                    .iter()
                    .map(|p| {
                        let (net, kind) = match p.connection {
                            Connection::Net { net, .. } => {
                                (nl.nets[net as usize].name.as_str().to_string(), "net")
                            }
                            Connection::Alone { net, .. } => {
                                (nl.nets[net as usize].name.as_str().to_string(), "alone")
                            }
                            Connection::Absent => (String::new(), "absent"),
                        };
                        (p.num(nl).to_string(), net, kind)
                    })
                    .collect();
                v.sort();
                (c.reference.as_str().to_string(), v)
            })
            .collect()
    });
    Fingerprint {
        summary: nl.summary(),
        diags,
        pins,
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    #[test]
    fn the_model_does_not_depend_on_the_order_of_items(which in any::<prop::sample::Index>(), seed in any::<u64>()) {
        let (name, bytes) = &fixtures()[which.index(fixtures().len())];
        let src = SourceFile::new(name.as_str(), String::from_utf8(bytes.clone()).expect("fixtures are UTF-8"));
        let tree = sexpr::parse(src.text()).expect("fixture reads");
        let nl = netlist::build(&tree).expect("fixture models");
        let want = fingerprint(&nl);

        let mut text = String::new();
        print_shuffled(&tree, tree.root(), None, &mut Mix(seed), &mut text);
        let tree2 = sexpr::parse(&text).expect("shuffled text reads");
        prop_assert_eq!(tree2.len(), tree.len());
        let nl2 = netlist::build(&tree2).expect("shuffled text models");
        prop_assert_eq!(fingerprint(&nl2), want, "{} shuffled with seed {}", name, seed);
    }
}

/// The shuffle really reorders: without this, the invariance test could pass on a printer
/// that kept the order.
#[test]
fn the_shuffle_moves_nets_and_nodes() {
    let (name, bytes) = fixtures()
        .iter()
        .find(|(n, _)| n == "counter-timer.net")
        .expect("demo board");
    let text = std::str::from_utf8(bytes).expect("UTF-8");
    let tree = sexpr::parse(text).expect("reads");
    let mut a = String::new();
    print_shuffled(&tree, tree.root(), None, &mut Mix(1), &mut a);
    let first_net = |s: &str| {
        s.find("(net ")
            .map(|p| s[p..].chars().take(40).collect::<String>())
    };
    let nl = netlist::build(&tree).expect("models");
    let t2 = sexpr::parse(&a).expect("reads");
    let nl2 = netlist::build(&t2).expect("models");
    let names = |n: &Netlist<'_>| {
        n.nets
            .iter()
            .map(|x| x.name.as_str().to_string())
            .collect::<Vec<_>>()
    };
    assert_ne!(names(&nl), names(&nl2), "{name}: net order unchanged");
    assert_ne!(first_net(text), first_net(&a));
    let refs = |n: &Netlist<'_>| {
        n.components
            .iter()
            .map(|c| c.reference.as_str().to_string())
            .collect::<Vec<_>>()
    };
    assert_ne!(refs(&nl), refs(&nl2), "{name}: component order unchanged");
}

// ---------------------------------------------------------------------------------------------
// The checks: order invariance and consistent renaming

/// A finding less its places, with its message's words sorted and stripped of punctuation
/// (a list of loads may come in another order).
fn finding_key(d: &Diag) -> (String, String, Option<String>, Vec<String>, Vec<String>) {
    let mut words: Vec<String> = d
        .message
        .split_whitespace()
        .map(|w| {
            w.trim_matches(|c: char| matches!(c, ',' | ';' | ':' | '(' | ')'))
                .to_string()
        })
        .filter(|w| !w.is_empty() && w != "and")
        .collect();
    words.sort();
    let mut pins: Vec<String> = d.pins().map(String::from).collect();
    pins.sort();
    (
        d.code.to_string(),
        d.severity.to_string(),
        d.net.as_deref().map(String::from),
        pins,
        words,
    )
}

fn findings(text: &str) -> Vec<(String, String, Option<String>, Vec<String>, Vec<String>)> {
    let src = SourceFile::new("p.net", text.to_string());
    let rules = netmargin::classify::classifier::Rules::builtin();
    let out = netmargin::pipeline::check_source(&src, &rules, &Default::default())
        .expect("fixture checks");
    let mut v: Vec<_> = out.diags.to_vec().iter().map(finding_key).collect();
    v.sort();
    v
}

fn check_fixtures() -> Vec<(String, String)> {
    let base = Path::new(env!("CARGO_MANIFEST_DIR")).join("fixtures");
    let mut v = Vec::new();
    for f in [
        "demo/counter-timer.net",
        "boards/hobby-k8.net",
        "boards/clean-k5.net",
    ] {
        v.push((
            f.to_string(),
            std::fs::read_to_string(base.join(f)).unwrap(),
        ));
    }
    let mut checks: Vec<PathBuf> = std::fs::read_dir(base.join("checks"))
        .unwrap()
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "net"))
        .collect();
    checks.sort();
    for p in checks {
        v.push((
            p.display().to_string(),
            std::fs::read_to_string(&p).unwrap(),
        ));
    }
    v
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 24, ..ProptestConfig::default() })]

    /// Shuffling components, library parts, nets and nodes changes no finding.
    #[test]
    fn the_findings_do_not_depend_on_the_order_of_items(which in any::<prop::sample::Index>(), seed in any::<u64>()) {
        let all = check_fixtures();
        let (name, text) = &all[which.index(all.len())];
        let want = findings(text);
        let tree = sexpr::parse(text).expect("fixture reads");
        let mut shuffled = String::new();
        print_shuffled(&tree, tree.root(), None, &mut Mix(seed), &mut shuffled);
        prop_assert_eq!(findings(&shuffled), want, "{} shuffled with seed {}", name, seed);
    }

    /// Renaming references consistently renames the findings' pins and the references in their
    /// messages, and changes nothing else.
    #[test]
    fn renaming_references_renames_the_findings_and_nothing_else(which in any::<prop::sample::Index>(), pick in any::<u64>()) {
        let all = check_fixtures();
        let (name, text) = &all[which.index(all.len())];
        let tree = sexpr::parse(text).expect("fixture reads");
        let nl = netlist::build(&tree).expect("fixture models");
        // rename about half the references: U9 -> U9Q (the letter prefix, and so the kind, stays)
        let mut map: BTreeMap<String, String> = BTreeMap::new();
        for (i, c) in nl.components.iter().enumerate() {
            if (pick >> (i % 64)) & 1 == 1 {
                map.insert(c.reference.as_str().to_string(), format!("{}Q", c.reference.as_str()));
            }
        }
        let mut renamed = String::new();
        let mut last = 0;
        // every `(ref X)` list (components and nodes) gets the new name
        for id in 0..tree.len() as NodeId {
            if tree.is_list(id) && tree.head(id) == Some("ref") {
                if let Some(v) = tree.children(id).nth(1) {
                    let old = tree.text(v).unwrap().into_owned();
                    if let Some(new) = map.get(&old) {
                        let sp = tree.span(v);
                        renamed.push_str(&text[last..sp.start as usize]);
                        renamed.push_str(&if tree.kind(v) == Kind::Str { format!("\"{new}\"") } else { new.clone() });
                        last = sp.end as usize;
                    }
                }
            }
        }
        renamed.push_str(&text[last..]);
        let rename_word = |w: &str| -> String {
            // `U9`, `U9.5`, `U9's` ...: the reference part is the leading run of letters and digits
            let end = w.find(|c: char| !c.is_ascii_alphanumeric()).unwrap_or(w.len());
            match map.get(&w[..end]) {
                Some(new) => format!("{new}{}", &w[end..]),
                None => w.to_string(),
            }
        };
        let src = SourceFile::new("p.net", text.to_string());
        let rules = netmargin::classify::classifier::Rules::builtin();
        let before = netmargin::pipeline::check_source(&src, &rules, &Default::default()).unwrap();
        let mut want: Vec<_> = before
            .diags
            .to_vec()
            .iter()
            .map(|d| {
                let mut d = d.clone();
                let renamed: Vec<String> = d.pins().map(rename_word).collect();
                d.set_pins(renamed);
                // net names are strings in the file: they keep their text (even `Net-(U5-Pad4)`)
                d.message = d.message.split(' ').map(|w| if w.contains("Net-(") || w.contains("unconnected-(") { w.to_string() } else { rename_word(w) }).collect::<Vec<_>>().join(" ").into();
                finding_key(&d)
            })
            .collect();
        want.sort();
        prop_assert_eq!(findings(&renamed), want, "{} with {:?}", name, map);
    }
}
