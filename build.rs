//! Collects the `//!` doc comment of every check in `src/checks/` so that `explain`, the
//! SARIF rule metadata and the generated docs are the check's own doc comment, never a copy.

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
    let dest = std::path::Path::new(&std::env::var("OUT_DIR").unwrap()).join("check_docs.rs");
    std::fs::write(dest, out).unwrap();
}
