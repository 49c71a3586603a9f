//! The contributor guide's invariants about the code's shape, each checked on the source
//! (DEVELOPERS.md, "Invariants"): data flows one way (no module reaches back up: the import
//! graph has no loop), one analysis per file (only `src/analysis.rs` runs the stages), budgets
//! computed once, the tree reader only a reference, checks that never look at the tree nor
//! import each other, reporters that never compute, and a check list that cannot drift.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Every `.rs` file under `src/`, as (path from the crate root, text without comment lines
/// and without `#[cfg(test)]` modules at the end of a file).
fn sources() -> Vec<(String, String)> {
    let mut out = Vec::new();
    let mut stack = vec![root().join("src")];
    while let Some(d) = stack.pop() {
        for e in std::fs::read_dir(&d).unwrap().flatten() {
            let p = e.path();
            if p.is_dir() {
                stack.push(p);
            } else if p.extension().is_some_and(|x| x == "rs") {
                let text = std::fs::read_to_string(&p).unwrap();
                // unit tests may use anything; they sit at the end of a file
                let code = match text.find("#[cfg(test)]\nmod tests") {
                    Some(i) => &text[..i],
                    None => &text[..],
                };
                let code: String = code
                    .lines()
                    .filter(|l| !l.trim_start().starts_with("//"))
                    .collect::<Vec<_>>()
                    .join("\n");
                let rel = p
                    .strip_prefix(root())
                    .unwrap()
                    .to_string_lossy()
                    .into_owned();
                out.push((rel, code));
            }
        }
    }
    out.sort();
    assert!(out.len() > 40, "the scan found {} files", out.len());
    out
}

/// The top-level module a file belongs to: `src/report/json.rs` -> `report`.
fn module_of(path: &str) -> String {
    let rel = path.strip_prefix("src/").unwrap();
    let first = rel.split('/').next().unwrap();
    first.trim_end_matches(".rs").to_string()
}

fn modules() -> BTreeSet<String> {
    sources().iter().map(|(p, _)| module_of(p)).collect()
}

/// `from -> to` for every `crate::to` (or, in main.rs, `netmargin::to`) a module names.
fn graph() -> BTreeMap<String, BTreeSet<String>> {
    let mods = modules();
    let mut g: BTreeMap<String, BTreeSet<String>> = BTreeMap::new();
    for (path, text) in sources() {
        let from = module_of(&path);
        let prefix = if from == "main" {
            "netmargin::"
        } else {
            "crate::"
        };
        let mut names: Vec<String> = Vec::new();
        for (i, _) in text.match_indices(prefix) {
            let rest = &text[i + prefix.len()..];
            if let Some(group) = rest.strip_prefix('{') {
                // `use crate::{a, b::c}`
                let inner = &group[..group.find('}').unwrap_or(group.len())];
                for item in inner.split(',') {
                    names.push(item.trim().split("::").next().unwrap_or("").to_string());
                }
            } else {
                let n: String = rest
                    .chars()
                    .take_while(|c| c.is_ascii_lowercase() || *c == '_')
                    .collect();
                names.push(n);
            }
        }
        for n in names {
            if n != from && mods.contains(&n) {
                g.entry(from.clone()).or_default().insert(n);
            }
        }
    }
    g
}

#[test]
fn the_import_graph_has_no_loop() {
    let g = graph();
    // the scan sees the layers (a scan that sees nothing proves nothing)
    assert!(g["commands"].contains("analysis"), "{g:?}");
    assert!(g["analysis"].contains("checks"), "{g:?}");
    fn reaches(g: &BTreeMap<String, BTreeSet<String>>, from: &str, to: &str) -> bool {
        let mut seen = BTreeSet::new();
        let mut stack = vec![from.to_string()];
        while let Some(m) = stack.pop() {
            for n in g.get(&m).into_iter().flatten() {
                if n == to {
                    return true;
                }
                if seen.insert(n.clone()) {
                    stack.push(n.clone());
                }
            }
        }
        false
    }
    let mut loops = Vec::new();
    for (a, tos) in &g {
        for b in tos {
            if reaches(&g, b, a) {
                loops.push(format!("{a} -> {b} -> ... -> {a}"));
            }
        }
    }
    assert!(loops.is_empty(), "modules that reach back up: {loops:#?}");
    // the lower layers never name the upper ones
    for low in ["sexpr", "netlist", "classify", "circuit", "checks"] {
        for high in [
            "analysis", "pipeline", "commands", "cli", "report", "audit", "config",
        ] {
            assert!(
                !g.get(low).is_some_and(|t| t.contains(high)),
                "{low} names {high}"
            );
        }
    }
    // the command line is parsed apart from the analysis
    assert!(!g["analysis"].contains("cli"), "analysis names cli");
    assert!(!g["cli"].contains("commands"));
}

/// Files that contain `needle`, in code (not comments, not unit tests).
fn files_with(needle: &str) -> Vec<String> {
    sources()
        .into_iter()
        .filter(|(_, t)| t.contains(needle))
        .map(|(p, _)| p)
        .collect()
}

#[test]
fn only_the_analysis_runs_the_stages() {
    // one analysis per file: no command or reporter builds the circuit, classifies or runs
    // the checks itself
    for (needle, allowed) in [
        ("circuit::build(", &["src/analysis.rs"][..]),
        ("checks::run_all(", &["src/analysis.rs"][..]),
        (
            "classify(&",
            &["src/analysis.rs", "src/classify/classifier.rs"][..],
        ),
        (
            "netlist::read(",
            // `pipeline::model_text` reads the model only (no classification): for tools and tests
            &["src/analysis.rs", "src/pipeline.rs"][..],
        ),
    ] {
        let found = files_with(needle);
        assert!(
            found.iter().any(|f| f == allowed[0]),
            "`{needle}` not found where expected: {found:?}"
        );
        for f in &found {
            assert!(
                allowed.contains(&f.as_str()),
                "{f} runs a stage itself (`{needle}`): read it from crate::analysis"
            );
        }
    }
    // every command reads the analysis (or, for the lists, the shipped tables)
    for (path, text) in sources() {
        if !path.starts_with("src/commands/") {
            continue;
        }
        let lists = ["explain.rs", "families.rs", "shell.rs", "mod.rs"]
            .iter()
            .any(|f| path.ends_with(f));
        let reads = text.contains("analys")
            || text.contains("Settings")
            || text.contains("check_paths")
            || text.contains("super::check::");
        assert!(lists || reads, "{path} does not read the analysis");
    }
}

#[test]
fn budgets_are_computed_once() {
    let mut found = files_with("net_budget(");
    found.extend(files_with("Budgets::build("));
    found.sort();
    found.dedup();
    let mut found: Vec<&str> = found.iter().map(String::as_str).collect();
    found.sort();
    assert_eq!(
        found,
        ["src/analysis.rs", "src/circuit/budget.rs"],
        "net_budget is called outside the analysis"
    );
}

#[test]
fn the_tree_reader_is_only_a_reference() {
    for needle in ["sexpr::parse(", "netlist::build("] {
        for f in files_with(needle) {
            // the schematic reader reads each root item of a sheet from its own tree (it looks
            // an item's parts up by head, in any order), and a whole sheet's tree for its error
            assert!(
                f.starts_with("src/sexpr/")
                    || f.starts_with("src/netlist/")
                    || f.starts_with("src/schematic/")
                    || f == "src/synth.rs",
                "{f} uses the tree reader (`{needle}`) in production code"
            );
        }
    }
    // and synth uses it only in its tests
    let synth = std::fs::read_to_string(root().join("src/synth.rs")).unwrap();
    let code = &synth[..synth.find("#[cfg(test)]").unwrap_or(synth.len())];
    assert!(
        !code.contains("netlist::build("),
        "synth builds from the tree"
    );
}

#[test]
fn checks_never_look_at_the_tree_nor_import_each_other() {
    let ids: Vec<String> = netmargin::checks::REGISTRY
        .iter()
        .map(|c| c.id.replace('-', "_"))
        .collect();
    for (path, text) in sources() {
        let Some(name) = path.strip_prefix("src/checks/") else {
            continue;
        };
        assert!(!text.contains("sexpr"), "{path} looks at the syntax tree");
        let me = name.trim_end_matches(".rs");
        for other in &ids {
            if other == me || name == "mod.rs" {
                continue;
            }
            for form in [format!("super::{other}::"), format!("checks::{other}::")] {
                assert!(!text.contains(&form), "{path} imports the check {other}");
            }
        }
    }
}

#[test]
fn reporters_never_compute() {
    for (path, text) in sources() {
        if !(path.starts_with("src/report/") || path.starts_with("src/audit/")) {
            continue;
        }
        for needle in [
            "net_budget(",
            "circuit::build(",
            "run_all(",
            "classify(&",
            "netlist::read(",
            "footprint_pins(",
        ] {
            assert!(!text.contains(needle), "{path} computes (`{needle}`)");
        }
    }
}

#[test]
fn every_check_file_is_registered_and_every_registered_check_has_a_file() {
    let dir = root().join("src/checks");
    let files: BTreeSet<String> = std::fs::read_dir(&dir)
        .unwrap()
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "rs"))
        .map(|p| p.file_stem().unwrap().to_string_lossy().replace('_', "-"))
        .filter(|s| s != "mod" && s != "common")
        .collect();
    let registered: BTreeSet<String> = netmargin::checks::REGISTRY
        .iter()
        .map(|c| c.id.to_string())
        .collect();
    assert_eq!(files, registered);
    // declared once: no check's id is written anywhere in src/ but its own file
    for (path, text) in sources() {
        for c in netmargin::checks::REGISTRY {
            let own = format!("src/checks/{}.rs", c.id.replace('-', "_"));
            if path != own {
                assert!(
                    !text.contains(&format!("id: \"{}\"", c.id)),
                    "{path} declares {}",
                    c.id
                );
            }
        }
    }
    let mod_rs = std::fs::read_to_string(dir.join("mod.rs")).unwrap();
    for c in netmargin::checks::REGISTRY {
        assert!(
            !mod_rs.contains(&format!("\"{}\"", c.id)),
            "src/checks/mod.rs names {}: a check is declared in its own file",
            c.id
        );
    }
    for c in netmargin::checks::REGISTRY {
        assert!(!c.doc().is_empty(), "{} has no doc comment", c.id);
        let fixture = root().join(format!("fixtures/checks/{}.net", c.id));
        assert!(Path::new(&fixture).is_file(), "{} has no fixture", c.id);
        let snap = root().join(format!("fixtures/checks/{}.snap", c.id));
        assert!(snap.is_file(), "{} has no snapshot", c.id);
    }
}

#[test]
fn the_audit_names_only_checks_that_exist() {
    // the audit charts the findings of these checks; a renamed check must not drop out silently
    for id in netmargin::audit::CHARTED_CHECKS {
        assert!(
            netmargin::checks::info(id).is_some(),
            "the audit charts `{id}`, which is no check"
        );
    }
}

/// Text is written when it is printed: a budget item holds what it is, never its words, and
/// no check decides anything by reading an item's words.
#[test]
fn budget_items_hold_no_words() {
    let budget = sources()
        .into_iter()
        .find(|(p, _)| p == "src/circuit/budget.rs")
        .expect("budget.rs")
        .1;
    let start = budget.find("pub struct Item {").expect("struct Item");
    let body = &budget[start..start + budget[start..].find('}').expect("end of Item")];
    assert!(!body.contains("String"), "budget::Item holds text: {body}");
    for (p, t) in sources() {
        if !p.starts_with("src/checks/") {
            continue;
        }
        for line in t.lines().filter(|l| l.contains(".describe(")) {
            assert!(
                !["contains(", "starts_with(", "ends_with(", "find("]
                    .iter()
                    .any(|m| line.contains(m)),
                "{p} decides by an item's words: {line}"
            );
        }
    }
}
