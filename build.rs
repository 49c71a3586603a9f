//! Collects the `//!` doc comment of every check in `src/checks/` so that `explain`, the
//! SARIF rule metadata and the generated docs are the check's own doc comment, never a copy;
//! and the list of checks (`REGISTRY`, `RUNS`) from the files themselves, so a check is
//! declared once, in its own file (its `INFO` and `run`), and cannot be left out of a list.

//!
//! It also reads the shipped tables (`rules/*.toml`) with the crate's own table code (the
//! modules below, compiled into this script too) and writes each in postcard's compact form
//! to `OUT_DIR`, so the binary decodes them at start-up instead of parsing TOML.

use std::fmt::Write;

// the crate's table code, as `crate::classify::...` and `super::...` expect to find it
#[allow(dead_code)]
#[path = "src/classify/family.rs"]
mod family;
#[allow(dead_code)]
#[path = "src/classify/function.rs"]
mod function;
#[allow(dead_code)]
#[path = "src/classify/parts.rs"]
mod parts;
#[allow(dead_code)]
#[path = "src/classify/roles.rs"]
mod roles;
mod classify {
    pub use super::roles::RuleError;
}
use roles::{PinRole, RuleError};

/// Reads the shipped tables and writes their compact form; a table that does not read stops
/// the build with every problem and its byte range.
fn tables(out_dir: &std::path::Path) {
    for f in [
        "rules/families.toml",
        "rules/functions.toml",
        "rules/parts.toml",
    ] {
        println!("cargo:rerun-if-changed={f}");
    }
    for f in ["family", "function", "parts", "roles"] {
        println!("cargo:rerun-if-changed=src/classify/{f}.rs");
    }
    fn fail(file: &str, errors: Vec<RuleError>) -> ! {
        let all: Vec<String> = errors
            .iter()
            .map(|e| format!("{:?}: {}", e.span, e.message))
            .collect();
        panic!("rules/{file} does not read:\n{}", all.join("\n"));
    }
    let write = |name: &str, bytes: Vec<u8>| {
        std::fs::write(out_dir.join(format!("{name}.postcard")), bytes).unwrap();
    };
    let families =
        family::FamilyTable::parse_shipped().unwrap_or_else(|e| fail("families.toml", e));
    // each family on its own, as the functions below: an index of (id, aliases, start, end),
    // ids and aliases in capitals, and the families' bytes one after another
    let mut blob = Vec::new();
    let mut index = Vec::new();
    for (id, aliases, bytes) in families.to_compact() {
        let start = blob.len() as u32;
        blob.extend(bytes);
        index.push((id, aliases, start, blob.len() as u32));
    }
    write("families", blob);
    // the index as Rust data, so start-up decodes nothing to know which families there are
    let mut code = String::from(
        "/// Each shipped family's id and aliases (capitals) and its bytes in `families.postcard`.\n\
         static FAMILY_INDEX: &[(&str, &[&str], u32, u32)] = &[\n",
    );
    for (id, aliases, a, b) in &index {
        let _ = writeln!(code, "    ({id:?}, &{aliases:?}, {a}, {b}),");
    }
    code.push_str("];\n\n");
    let functions =
        function::FunctionTable::parse_shipped().unwrap_or_else(|e| fail("functions.toml", e));
    // each function on its own, so the binary decodes only those a board uses: an index of
    // (series, id, start, end) and the functions' bytes one after another
    let mut blob = Vec::new();
    let mut ranges = Vec::new();
    // for each series, its ids sorted (looked up by binary search) with their function's place
    let mut ids: [Vec<(String, u32)>; 3] = Default::default();
    for (i, f) in functions.iter().enumerate() {
        let start = blob.len() as u32;
        blob.extend(postcard::to_allocvec(f).unwrap());
        ranges.push((start, blob.len() as u32));
        ids[f.series as usize].push((f.id.clone(), i as u32));
    }
    write("functions", blob);
    let _ = writeln!(
        code,
        "/// For each series, its shipped functions' ids, sorted, each with the function's place\n\
         /// in `FUNCTION_RANGES`.\nstatic FUNCTION_IDS: [&[(&str, u32)]; 3] = ["
    );
    for list in &mut ids {
        list.sort();
        for w in list.windows(2) {
            assert!(
                w[0].0 != w[1].0,
                "rules/functions.toml: `{}` twice in one series",
                w[0].0
            );
        }
        let _ = writeln!(code, "    &{list:?},");
    }
    code.push_str("];\n\n");
    let _ = writeln!(
        code,
        "/// Each shipped function's bytes in `functions.postcard`, in the file's order.\n\
         static FUNCTION_RANGES: &[(u32, u32)] = &{ranges:?};\n"
    );
    let parts = parts::PartTable::parse_shipped().unwrap_or_else(|e| fail("parts.toml", e));
    // the part entries as Rust code: start-up builds them without decoding anything
    code.push_str(
        "/// The shipped part entries (`rules/parts.toml`), as build.rs read them.\n\
         fn shipped_part_entries() -> Vec<PartEntry> {\n    vec![\n",
    );
    let text = |t: &Option<parts::EntryText>| match t {
        Some(t) => format!("Some(t({:?}))", &**t),
        None => "None".to_string(),
    };
    for e in &parts.entries {
        assert!(
            e.shipped && e.origin.is_none(),
            "a shipped entry has no origin"
        );
        let values: Vec<String> = e.values.iter().map(|v| format!("t({:?})", &**v)).collect();
        let _ = writeln!(
            code,
            "        PartEntry {{ values: vec![{}], kind: EntryKind::{:?}, family: {}, series: Series::{:?}, \
             function: {}, note: {}, span: {}..{}, shipped: true, origin: None }},",
            values.join(", "),
            e.kind,
            text(&e.family),
            e.series,
            text(&e.function),
            text(&e.note),
            e.span.start,
            e.span.end
        );
    }
    code.push_str("    ]\n}\n");
    std::fs::write(out_dir.join("shipped_tables.rs"), code).unwrap();
    // PinRole is read by the function table; named here so the import is used
    let _ = PinRole::Unknown;
}

fn main() {
    let out_dir = std::path::PathBuf::from(std::env::var("OUT_DIR").unwrap());
    tables(&out_dir);
    let dir = std::path::Path::new("src/checks");
    println!("cargo:rerun-if-changed=src/checks");
    let mut entries: Vec<(String, String)> = Vec::new();
    if let Ok(rd) = std::fs::read_dir(dir) {
        for e in rd.flatten() {
            let p = e.path();
            if p.extension().is_none_or(|x| x != "rs") || p.file_stem().is_some_and(|s| s == "mod")
            {
                continue;
            }
            println!("cargo:rerun-if-changed={}", p.display());
            let text = std::fs::read_to_string(&p).unwrap_or_default();
            let doc: Vec<&str> = text
                .lines()
                .take_while(|l| l.starts_with("//!") || l.trim().is_empty())
                .filter_map(|l| l.strip_prefix("//!"))
                .map(|l| l.strip_prefix(' ').unwrap_or(l))
                .collect();
            let stem = p.file_stem().unwrap().to_string_lossy().replace('_', "-");
            entries.push((stem, doc.join("\n").trim().to_string()));
        }
    }
    entries.sort();
    let mut out = String::from("/// (check id, doc comment) for every file in src/checks.\npub static CHECK_DOCS: &[(&str, &str)] = &[\n");
    for (id, doc) in entries {
        let _ = writeln!(out, "    ({id:?}, {doc:?}),");
    }
    out.push_str("];\n");
    std::fs::write(out_dir.join("check_docs.rs"), out).unwrap();

    // the list of checks: every file but `mod.rs` and the shared helpers
    let mod_rs = std::fs::read_to_string(dir.join("mod.rs")).unwrap_or_default();
    let mut checks: Vec<String> = Vec::new();
    if let Ok(rd) = std::fs::read_dir(dir) {
        for e in rd.flatten() {
            let p = e.path();
            let Some(stem) = p.file_stem().map(|s| s.to_string_lossy().into_owned()) else {
                continue;
            };
            if p.extension().is_none_or(|x| x != "rs") || stem == "mod" || stem == "common" {
                continue;
            }
            // declared in mod.rs too, so rustfmt and other tools find the file
            assert!(
                mod_rs.lines().any(|l| l.trim() == format!("mod {stem};")),
                "src/checks/{stem}.rs is not declared in src/checks/mod.rs: add `mod {stem};`"
            );
            checks.push(stem);
        }
    }
    checks.sort();
    let mut list = String::from(
        "/// Every check, in id order: each file's own `INFO`.\npub static REGISTRY: &[CheckInfo] = &[\n",
    );
    for c in &checks {
        let _ = writeln!(list, "    {c}::INFO,");
    }
    list.push_str("];\n\n/// Each check's declaration and its `run`.\nstatic RUNS: &[(&CheckInfo, CheckFn)] = &[\n");
    for c in &checks {
        let _ = writeln!(list, "    (&{c}::INFO, {c}::run),");
    }
    list.push_str("];\n");
    std::fs::write(out_dir.join("check_list.rs"), list).unwrap();
}
