//! Collects the `//!` doc comment of every check in `src/checks/` so that `explain`, the
//! SARIF rule metadata and the generated docs are the check's own doc comment, never a copy;
//! and the list of checks (`REGISTRY`, `RUNS`) from the files themselves, so a check is
//! declared once, in its own file (its `INFO` and `run`), and cannot be left out of a list.

use std::fmt::Write;

fn main() {
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
    let out_dir = std::path::PathBuf::from(std::env::var("OUT_DIR").unwrap());
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
