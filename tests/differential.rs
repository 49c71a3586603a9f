//! Differential test of the reader against an independent general-purpose S-expression
//! parser: the `sexp` crate (crates.io, version 1.1). Every well-formed fixture is read by
//! both and the trees must agree in shape and atom text.
//!
//! `sexp` reads some things differently from KiCad's lexical rules, and those differences
//! are normalised here, explicitly:
//! 1. it turns atoms that look like numbers into `i64`/`f64` (`00012345` -> 12345, `1.50` ->
//!    1.5): such an atom agrees when our text parses to the same number;
//! 2. it treats `;` as the start of a comment, and splits unquoted atoms at any Unicode white
//!    space (U+00A0 included) where KiCad splits only at ASCII white space: before handing
//!    the text to `sexp`, unquoted atoms holding `;` or non-ASCII white space are quoted;
//! 3. inside quoted strings it undoes only `\"` and `\\`, where we also undo `\n`, `\t`, `\r`:
//!    our string is compared after re-escaping those three;
//! 4. it does not skip a UTF-8 byte-order mark: the mark is removed first.
//! A fixture that `sexp` still cannot read fails the test; none is skipped.

use std::path::{Path, PathBuf};

use netmargin::sexpr::{self, Kind, NodeId, Tree};
use sexp::{Atom, Sexp};

fn fixtures() -> Vec<PathBuf> {
    let mut out = Vec::new();
    let mut stack = vec![Path::new(env!("CARGO_MANIFEST_DIR")).join("fixtures")];
    while let Some(d) = stack.pop() {
        let Ok(rd) = std::fs::read_dir(&d) else {
            continue;
        };
        for e in rd.flatten() {
            let p = e.path();
            if p.is_dir() {
                // malformed inputs (`malformed/`, `malformed-corpus/`) are meant to fail: tests/malformed.rs
                if p.file_name()
                    .is_some_and(|n| n.to_string_lossy().starts_with("malformed"))
                {
                    continue;
                }
                stack.push(p);
            } else if p.extension().is_some_and(|x| x == "net") {
                out.push(p);
            }
        }
    }
    out.sort();
    out
}

/// Quotes unquoted atoms that `sexp` would split or cut (normalisation 2).
fn normalise_for_sexp(tree: &Tree<'_>, text: &str) -> String {
    let mut out = String::with_capacity(text.len() + 64);
    let mut last = 0;
    for id in 0..tree.len() as NodeId {
        if tree.kind(id) != Kind::Atom {
            continue;
        }
        let raw = tree.raw(id);
        if raw.contains(';') || raw.chars().any(|c| c.is_whitespace()) {
            let sp = tree.span(id);
            out.push_str(&text[last..sp.start as usize]);
            out.push('"');
            out.push_str(&raw.replace('\\', "\\\\").replace('"', "\\\""));
            out.push('"');
            last = sp.end as usize;
        }
    }
    out.push_str(&text[last..]);
    out
}

fn ours_as_sexp_would_unescape(s: &str) -> String {
    s.replace('\n', "\\n")
        .replace('\t', "\\t")
        .replace('\r', "\\r")
}

fn compare(tree: &Tree<'_>, id: NodeId, theirs: &Sexp, path: &str, errors: &mut Vec<String>) {
    match (tree.kind(id), theirs) {
        (Kind::List, Sexp::List(items)) => {
            let kids: Vec<NodeId> = tree.children(id).collect();
            if kids.len() != items.len() {
                errors.push(format!(
                    "{path}: list of {} vs {} items at byte {}",
                    kids.len(),
                    items.len(),
                    tree.span(id).start
                ));
                return;
            }
            for (k, t) in kids.iter().zip(items) {
                compare(tree, *k, t, path, errors);
            }
        }
        (Kind::Atom | Kind::Str, Sexp::Atom(a)) => {
            let ours = tree.text(id).expect("atom has text");
            let ok = match a {
                Atom::S(s) => {
                    if tree.kind(id) == Kind::Str {
                        *s == ours_as_sexp_would_unescape(&ours)
                    } else {
                        *s == *ours
                    }
                }
                Atom::I(i) => ours.parse::<i64>().ok() == Some(*i),
                Atom::F(f) => ours
                    .parse::<f64>()
                    .map(|o| o == *f || (o.is_nan() && f.is_nan()))
                    .unwrap_or(false),
            };
            if !ok {
                errors.push(format!(
                    "{path}: atom {:?} vs {:?} at byte {}",
                    ours,
                    a,
                    tree.span(id).start
                ));
            }
        }
        (k, t) => errors.push(format!(
            "{path}: {:?} vs {} at byte {}",
            k,
            if matches!(t, Sexp::List(_)) {
                "list"
            } else {
                "atom"
            },
            tree.span(id).start
        )),
    }
}

fn check_text(name: &str, text: &str, errors: &mut Vec<String>) {
    let tree = match sexpr::parse(text) {
        Ok(t) => t,
        Err(d) => {
            errors.push(format!("{name}: our reader refused it: {}", d.message));
            return;
        }
    };
    let body = &text[sexpr::bom_len(text)..]; // normalisation 4
    let fixed = normalise_for_sexp(&sexpr::parse(body).expect("parsed above"), body);
    match sexp::parse(fixed.trim()) {
        Ok(theirs) => compare(&tree, tree.root(), &theirs, name, errors),
        Err(e) => errors.push(format!("{name}: the reference parser refused it: {e}")),
    }
}

#[test]
fn every_fixture_agrees_with_the_reference_parser() {
    let files = fixtures();
    let mut errors = Vec::new();
    for f in &files {
        let text = std::fs::read_to_string(f).unwrap_or_else(|e| panic!("{}: {e}", f.display()));
        check_text(&f.display().to_string(), &text, &mut errors);
    }
    assert!(
        errors.is_empty(),
        "{} disagreements:\n{}",
        errors.len(),
        errors.join("\n")
    );
    // a vacuous pass (no fixtures found) would prove nothing
    assert!(
        files.len() >= 5,
        "expected the fixture set, found {} files",
        files.len()
    );
}

#[test]
fn the_normalisations_are_needed_and_sufficient() {
    let mut errors = Vec::new();
    check_text(
        "inline",
        "\u{feff}(export (a 00012345 1.50 x;y \"q\\\"\\n\" u\u{a0}v) (b))",
        &mut errors,
    );
    assert!(errors.is_empty(), "{errors:?}");
    // and a real difference is caught
    let tree = sexpr::parse("(a b c)").unwrap();
    let theirs = sexp::parse("(a b)").unwrap();
    let mut errors = Vec::new();
    compare(&tree, 0, &theirs, "mismatch", &mut errors);
    assert_eq!(errors.len(), 1);
}
