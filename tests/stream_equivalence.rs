//! The one-pass reader (`netlist::read`) against the two-step one (`sexpr::parse` then
//! `netlist::build`): on every fixture, on generated netlists of several sizes, on
//! hand-written corner cases and on mutated fixture texts (truncations, byte flips,
//! duplicated ranges), both must give the same outcome: the same error (code, message,
//! every label and the help), or models equal field by field, diagnostics and spans
//! included.

use std::fmt::Write;
use std::path::{Path, PathBuf};

use netmargin::netlist::{self, Netlist};
use netmargin::sexpr;
use proptest::prelude::*;

/// Every field of the model, in order, plus the lookups by reference and by net name.
fn dump(nl: &Netlist<'_>) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "version {:?}", nl.version);
    let _ = writeln!(s, "dialect {:?}", nl.dialect);
    let _ = writeln!(s, "design {:?}", nl.design);
    let _ = writeln!(s, "span {:?}", nl.span);
    for (i, c) in nl.components.iter().enumerate() {
        let _ = writeln!(s, "component {i} {c:?}");
        let _ = writeln!(s, "  lookup {:?}", nl.component(c.reference.as_str()));
    }
    for (i, lp) in nl.libparts.iter().enumerate() {
        let _ = writeln!(s, "libpart {i} {lp:?}");
    }
    for (i, net) in nl.nets.iter().enumerate() {
        let _ = writeln!(
            s,
            "net {i} code {:?} name {:?} span {:?} lookup {:?}",
            net.code,
            net.name,
            net.span,
            nl.net_by_name(net.name.as_str())
        );
        for (k, node) in net.nodes(nl).iter().enumerate() {
            let _ = writeln!(
                s,
                "  node {k} {node:?} ref {:?} at {:?} pin {:?} function {:?}",
                node.reference(nl),
                node.reference_span(nl),
                node.pin(nl),
                node.pinfunction(nl)
            );
        }
    }
    for d in &nl.diagnostics {
        let _ = writeln!(s, "diag {d:?}");
    }
    let _ = writeln!(s, "summary {:?}", nl.summary());
    s
}

fn two_step(text: &str) -> Result<String, String> {
    let tree = sexpr::parse(text).map_err(|d| format!("{d:?}"))?;
    let nl = netlist::build(&tree).map_err(|d| format!("{d:?}"))?;
    Ok(dump(&nl))
}

fn one_pass(text: &str) -> Result<String, String> {
    let nl = netlist::read(text).map_err(|d| format!("{d:?}"))?;
    Ok(dump(&nl))
}

/// Fails with the first differing line when the two readers disagree.
fn same(text: &str, what: &str) -> Result<(), String> {
    let a = two_step(text);
    let b = one_pass(text);
    if a == b {
        return Ok(());
    }
    let (la, lb) = match (&a, &b) {
        (Ok(x), Ok(y)) | (Err(x), Err(y)) => (x.clone(), y.clone()),
        (Ok(x), Err(y)) => (format!("model\n{x}"), format!("error {y}")),
        (Err(x), Ok(y)) => (format!("error {x}"), format!("model\n{y}")),
    };
    let diff = la
        .lines()
        .zip(lb.lines())
        .find(|(x, y)| x != y)
        .map(|(x, y)| format!("parse+build: {x}\nread:        {y}"))
        .unwrap_or_else(|| {
            format!(
                "one output is longer ({} vs {} lines)",
                la.lines().count(),
                lb.lines().count()
            )
        });
    Err(format!("{what}: the readers disagree\n{diff}"))
}

fn fixture_paths() -> Vec<PathBuf> {
    let mut out = Vec::new();
    let mut stack = vec![Path::new(env!("CARGO_MANIFEST_DIR")).join("fixtures")];
    while let Some(d) = stack.pop() {
        let rd = std::fs::read_dir(&d).expect("the fixtures folder is readable");
        for e in rd.flatten() {
            let p = e.path();
            if p.is_dir() {
                stack.push(p);
            } else {
                out.push(p);
            }
        }
    }
    out.sort();
    out
}

/// The fixture texts; a file that is not UTF-8 is read as the loader would show it.
fn fixture_texts() -> Vec<(String, String)> {
    fixture_paths()
        .into_iter()
        .map(|p| {
            let bytes = std::fs::read(&p).expect("a fixture is readable");
            let text = String::from_utf8_lossy(&bytes).into_owned();
            (p.display().to_string(), text)
        })
        .collect()
}

#[test]
fn every_fixture_reads_the_same() {
    let texts = fixture_texts();
    // the set must include the malformed and model-error folders, or the test says little
    assert!(texts.iter().any(|(p, _)| p.contains("malformed")));
    assert!(texts.iter().any(|(p, _)| p.contains("model-errors")));
    let mut models = 0;
    let mut errors = 0;
    for (p, t) in &texts {
        same(t, p).unwrap_or_else(|e| panic!("{e}"));
        match netlist::read(t) {
            Ok(_) => models += 1,
            Err(_) => errors += 1,
        }
    }
    // both outcomes are exercised
    assert!(models >= 15, "{models} fixtures gave a model");
    assert!(errors >= 10, "{errors} fixtures gave an error");
}

#[test]
fn generated_netlists_read_the_same() {
    for size in [1, 2_000, 30_000, 300_000, 2_000_000] {
        let t = netmargin::synth::netlist(size);
        same(&t, &format!("synthetic {size} bytes")).unwrap_or_else(|e| panic!("{e}"));
        let nl = netlist::read(&t).expect("a generated netlist reads");
        assert!(!nl.components.is_empty() && !nl.nets.is_empty());
    }
}

/// Corner cases of the builder's rules, each written to make one rule matter.
#[test]
fn corner_cases_read_the_same() {
    let cases: &[&str] = &[
        // roots that are not `(export ...)`, with and without a later syntax error
        "()",
        "(\"export\" (version \"E\"))",
        "((export) (version \"E\"))",
        "(kicad_thing (a b))",
        "(kicad_thing (a b)))",
        "(kicad_thing (a \"b",
        "(kicad_thing) x",
        "(export",
        "(export))",
        "(export) (export)",
        "x (export)",
        "\"x\" (export)",
        "\u{feff}(export (version \"E\"))",
        "  \n\t ",
        "",
        "(export (version))",
        "(export (version (D)))",
        "(export (version \"D\") (version \"Q\"))",
        "(export (version \"E\") (version))",
        // design: later sections win, the first titled sheet names the board
        "(export (version E) (design (source a) (date (x)) (tool t (y))) (design (tool u)))",
        "(export (version E) (design (sheet (title_block (company c))) (sheet (title_block (title t1) (rev r))) (sheet (title_block (title t2) (company d)))))",
        "(export (version E) (design (sheet (title_block (title (bad)) (title t0)) (title_block (title t1)))))",
        "(export (version E) (design (sheet (title_block (title t0)) (title_block (title t1) (rev (r))))))",
        // components: refs, repeated keys, fields, properties, quoted heads, atoms
        "(export (version E) (components (comp (ref U1) (ref) (value a) (value) (tstamp 1) (tstamps (2)) (tstamps 3)) (comp (value x)) (comp (ref \"\")) (comp (ref (U2))) (\"comp\" (ref U9)) comp (comp (\"ref\" U8))))",
        "(export (version E) (components (comp (ref R1) (fields (field (name A) v1 v2) (field (name B) (value c) d) (field v3) (field (name C) (value (x))) (\"field\" (name D)) (fields (field (name E)))) (property (name P) (value q)) (property (value r)) (property (name (n)))))",
        "(export (version E) (components (comp (ref R1) (libsource (lib a) (part b) (description c)) (libsource (part d)) (sheetpath (names \"/a\\\"b\") (tstamps (t))) (sheetpath (names x)))))",
        "(export (version E) (components (comp (ref R1) (libsource (lib x) (part R)))) (libparts (libpart (lib x) (part R) (aliases (alias R2) (alias) (alias (z))) (footprints (fp a) (fp b)) (fields (field (name F) g)) (pins (pin (num 1) (name A) (type input)) (pin (num 2) (type (x))) (pin (name q)) (pin (num 1) (type output)))) (libpart (lib y)) (libpart (part (R))) (libpart (part R) (lib x) (description d) (docs e))))",
        // nets and nodes: missing fields, repeats, unknown refs, pins on two nets
        "(export (version E) (components (comp (ref U1)) (comp (ref U2))) (nets (net (code 1) (name A) (node (ref U1) (pin 1)) (node (ref U1) (pin 1)) (node (ref U3) (pin 2))) (net (name B) (node (ref U1) (pin 1) (pintype input+no_connect)) (node (pin 3)) (node (ref U2))) (net (code 1) (node (ref U2) (pin 1) (pinfunction f) (pintype (t)))) (net (code (2)) (name (n))) (net)))",
        "(export (version D) (components (comp (ref U1) (libsource (lib x) (part P)))) (libparts (libpart (lib x) (part P) (pins (pin (num 1) (type BiDi)) (pin (num 2) (type 3state)) (pin (num 2) (type input))))) (nets (net (code 1) (name \"\") (node (ref U1) (pin 2) (pinfunction \"a\\\\b\"))) (net (code 2) (name N) (node (ref U1) (pin 9)) (node (ref U1) (pin 1)))))",
        // duplicate references, unknown sections, deep skipped lists
        "(export (version E) (libraries (library (logical x) (uri (a (b (c (d))))))) (components (comp (ref U1)) (comp (ref U1))) (future (nets (net (code 9)))) (nets (net (code 1) (name A) (node (ref U1) (pin 1)))))",
        "(export (version E) (components (comp (ref U1) ((ref U2)) (\"x\") (ref U1 extra (list))) (comp (ref \"U\\n2\"))))",
    ];
    for (i, c) in cases.iter().enumerate() {
        same(c, &format!("case {i}: {c}")).unwrap_or_else(|e| panic!("{e}"));
    }
}

/// Nesting at and past the depth limit, inside a skipped section and at the root.
#[test]
fn depth_limits_read_the_same() {
    // `levels` lists nested in all: the root, then `levels - 1` inside it
    let nested = |levels: usize| {
        let inner = levels - 1;
        format!("(export{}{})", " (x".repeat(inner), ")".repeat(inner))
    };
    for levels in [sexpr::MAX_DEPTH - 1, sexpr::MAX_DEPTH, sexpr::MAX_DEPTH + 1] {
        same(&nested(levels), &format!("{levels} levels")).unwrap_or_else(|e| panic!("{e}"));
    }
    assert!(netlist::read(&nested(sexpr::MAX_DEPTH)).is_ok());
    let err = netlist::read(&nested(sexpr::MAX_DEPTH + 1)).unwrap_err();
    assert_eq!(err.code, "too-deep");
    // the refused `(` is the last one opened: 1 + 3 bytes per level before it
    let at = 7 + 3 * (sexpr::MAX_DEPTH - 1) + 1;
    assert_eq!(err.primary_span().map(|s| s.start as usize), Some(at));
}

/// A text derived from a fixture.
#[derive(Debug, Clone)]
enum Mutation {
    Truncate(usize),
    SetByte(usize, u8),
    Duplicate { from: usize, len: usize, to: usize },
    Delete { from: usize, len: usize },
}

fn apply(text: &str, m: &Mutation) -> String {
    let mut b = text.as_bytes().to_vec();
    let n = b.len().max(1);
    match *m {
        Mutation::Truncate(at) => b.truncate(at % n),
        Mutation::SetByte(at, v) => {
            if !b.is_empty() {
                b[at % n] = v;
            }
        }
        Mutation::Duplicate { from, len, to } => {
            let from = from % n;
            let end = (from + len).min(b.len());
            let piece = b[from.min(b.len())..end].to_vec();
            let to = to % n;
            let to = to.min(b.len());
            b.splice(to..to, piece);
        }
        Mutation::Delete { from, len } => {
            let from = (from % n).min(b.len());
            let end = (from + len).min(b.len());
            b.drain(from..end);
        }
    }
    String::from_utf8_lossy(&b).into_owned()
}

fn mutation() -> impl Strategy<Value = Mutation> {
    // bytes that matter to the lexer, and any byte
    let byte = prop_oneof![
        Just(b'('),
        Just(b')'),
        Just(b'"'),
        Just(b'\\'),
        Just(b' '),
        Just(b'x'),
        any::<u8>()
    ];
    prop_oneof![
        any::<usize>().prop_map(Mutation::Truncate),
        (any::<usize>(), byte).prop_map(|(a, v)| Mutation::SetByte(a, v)),
        (any::<usize>(), 0usize..400, any::<usize>())
            .prop_map(|(from, len, to)| Mutation::Duplicate { from, len, to }),
        (any::<usize>(), 0usize..400).prop_map(|(from, len)| Mutation::Delete { from, len }),
    ]
}

/// The fixtures worth mutating: the netlists (the deep-nesting file is covered above).
fn seeds() -> Vec<(String, String)> {
    fixture_texts()
        .into_iter()
        .filter(|(p, t)| p.ends_with(".net") && t.len() < 100_000)
        .collect()
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 600, ..ProptestConfig::default() })]

    #[test]
    fn mutated_fixtures_read_the_same(
        pick in any::<usize>(),
        ms in proptest::collection::vec(mutation(), 1..4),
    ) {
        let seeds = seeds();
        let (p, t) = &seeds[pick % seeds.len()];
        let mut text = t.clone();
        for m in &ms {
            text = apply(&text, m);
        }
        if let Err(e) = same(&text, &format!("{p} after {ms:?}")) {
            return Err(TestCaseError::fail(e));
        }
    }
}
