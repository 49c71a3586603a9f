//! The rough edges a new user meets on a first run, each pinned by a test: an empty folder,
//! configuration errors, what counts as a checked file, mistyped ids and names, every code
//! `explain` must know, and the parts-file documentation.

use std::path::{Path, PathBuf};
use std::process::Command;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

struct Scratch(PathBuf);

impl Scratch {
    fn new(tag: &str) -> Scratch {
        let nanos = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.subsec_nanos());
        let d = std::env::temp_dir().join(format!(
            "netmargin-first-run-{tag}-{}-{nanos}",
            std::process::id()
        ));
        std::fs::create_dir_all(&d).expect("scratch folder");
        Scratch(d)
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

/// (exit code, stdout, stderr)
fn run(dir: &Path, args: &[&str]) -> (i32, String, String) {
    let o = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(args)
        .current_dir(dir)
        .env("NO_COLOR", "1")
        .output()
        .expect("the binary runs");
    let err = String::from_utf8_lossy(&o.stderr).into_owned();
    assert!(!err.contains("panicked"), "{args:?} panicked:\n{err}");
    (
        o.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&o.stdout).into_owned(),
        err,
    )
}

#[test]
fn a_folder_without_netlists_says_so_and_fails_only_when_files_are_required() {
    let s = Scratch::new("empty");
    std::fs::create_dir_all(s.0.join("hw")).unwrap();
    std::fs::write(s.0.join("hw/notes.txt"), "no netlist here\n").unwrap();
    let (code, out, err) = run(&s.0, &["check", "hw"]);
    assert_eq!(code, 0, "{err}");
    assert!(out.is_empty(), "{out}");
    assert!(err.contains("no `.net` files in hw"), "{err}");
    assert!(err.contains("nothing checked"), "{err}");
    let (code, _, err) = run(&s.0, &["check", "--require-files", "hw"]);
    assert_eq!(code, 2, "{err}");

    // every netlist ignored by .gitignore: the same
    std::fs::copy(
        root().join("fixtures/boards/clean-k5.net"),
        s.0.join("hw/old.net"),
    )
    .unwrap();
    std::fs::write(s.0.join("hw/.gitignore"), "*.net\n").unwrap();
    let (code, _, err) = run(&s.0, &["check", "--require-files", "hw"]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("honouring .gitignore"), "{err}");
    // and a netlist found: the switch changes nothing
    std::fs::remove_file(s.0.join("hw/.gitignore")).unwrap();
    let (code, _, err) = run(&s.0, &["check", "--require-files", "hw"]);
    assert_eq!(code, 0, "{err}");
}

#[test]
fn every_configuration_error_is_reported_in_our_words_at_its_line() {
    let s = Scratch::new("config");
    std::fs::copy(
        root().join("fixtures/boards/clean-k5.net"),
        s.0.join("board.net"),
    )
    .unwrap();
    std::fs::write(
        s.0.join("netmargin.toml"),
        "rail_tolerance = \"5 %\"\n\n[rails]\nVCC = \"5V\"\n\n[checks]\nderating = 0.8\ncolour = 1\nseverity = { \"floating-cmos-inptu\" = \"off\" }\n\n[[waiver]]\ncheck = \"fanout-overrun\"\nrefs = \"U1\"\nreason = \"bench unit\"\n",
    )
    .unwrap();
    let (code, out, err) = run(&s.0, &["check", "--format", "short", "board.net"]);
    assert_eq!(code, 2, "{out}{err}");
    let text = format!("{out}{err}");
    // one line per problem, each at its own line of the file
    for (line, words) in [
        (1, "rail_tolerance must be a number, such as 0.05, not text"),
        (4, "rail `VCC` must be a number, such as 5.0, not text"),
        (8, "unknown key `colour` in [checks]"),
        (9, "no check `floating-cmos-inptu`"),
        (13, "a waiver's `refs` must be a list of text"),
    ] {
        let want = format!("netmargin.toml:{line}:");
        assert!(
            text.lines().any(|l| l.contains(&want) && l.contains(words)),
            "no `{words}` at line {line}:\n{text}"
        );
    }
    // no words of the library that read the file
    for library in [
        "expected f64",
        "invalid type",
        "expected a sequence",
        "unknown field",
    ] {
        assert!(!text.contains(library), "`{library}` in:\n{text}");
    }
    // the human format shows all of them too, with the did-you-mean
    let (_, out, err) = run(&s.0, &["check", "board.net"]);
    let all = format!("{out}{err}");
    assert!(all.contains("cannot be used: 5 problems"), "{all}");
    assert!(all.contains("did you mean `floating-cmos-input`?"), "{all}");
    // config --show reads the same settings and reports the same problems
    let (code, _, err) = run(&s.0, &["config", "--show", "board.net"]);
    assert_eq!(code, 2);
    assert!(err.contains("unknown key `colour`"), "{err}");
}

#[test]
fn a_configuration_with_something_to_say_is_not_counted_as_a_checked_file() {
    let s = Scratch::new("counted");
    std::fs::copy(
        root().join("fixtures/boards/clean-k5.net"),
        s.0.join("board.net"),
    )
    .unwrap();
    std::fs::write(
        s.0.join("netmargin.toml"),
        "[[waiver]]\ncheck = \"fanout-overrun\"\nrefs = [\"U99\"]\nreason = \"bench unit\"\n",
    )
    .unwrap();
    let (code, out, err) = run(&s.0, &["check", "board.net"]);
    assert_eq!(code, 0, "{out}{err}");
    // the stale waiver is reported ...
    assert!(out.contains("matched no finding"), "{out}");
    // ... but the run checked one file, not two
    let last = out.lines().last().unwrap_or("");
    assert!(last.starts_with("1 file,"), "{last}");
}

#[test]
fn mistyped_check_ids_and_net_names_get_a_suggestion() {
    let r = root();
    let (code, _, err) = run(
        &r,
        &[
            "check",
            "--only",
            "floating-cmos-inptu",
            "fixtures/boards/clean-k5.net",
        ],
    );
    assert_eq!(code, 2);
    assert!(err.contains("did you mean `floating-cmos-input`?"), "{err}");
    let (code, _, err) = run(&r, &["explain", "fanout-overun"]);
    assert_eq!(code, 2);
    assert!(err.contains("did you mean `fanout-overrun`?"), "{err}");
    let (code, _, err) = run(&r, &["net", "fixtures/demo/counter-timer.net", "/ARN_N"]);
    assert_eq!(code, 2);
    assert!(err.contains("no net `/ARN_N`"), "{err}");
    assert!(err.contains("did you mean `/ARM_N`"), "{err}");
    // nothing close: no guess
    let (_, _, err) = run(&r, &["net", "fixtures/demo/counter-timer.net", "/QQQQQQQQ"]);
    assert!(!err.contains("did you mean"), "{err}");
}

#[test]
fn only_takes_a_comma_separated_list() {
    let r = root();
    let (code, out, err) = run(
        &r,
        &[
            "check",
            "--format",
            "json",
            "--only",
            "fanout-overrun,missing-pull-up",
            "fixtures/demo/counter-timer.net",
        ],
    );
    assert_eq!(code, 1, "{err}");
    let doc: serde_json::Value = serde_json::from_str(&out).unwrap();
    let mut seen: Vec<String> = doc["files"][0]["findings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| f["check"].as_str().unwrap().to_string())
        .filter(|c| netmargin::checks::info(c).is_some())
        .collect();
    seen.sort();
    seen.dedup();
    // the demo has findings of both (fixtures/demo/README.md), and of others
    assert_eq!(seen, ["fanout-overrun", "missing-pull-up"]);
}

/// Every code a diagnostic is built with anywhere in the source: `Diag::error("code"` ...
fn codes_in_source() -> Vec<String> {
    let mut codes = Vec::new();
    let mut stack = vec![root().join("src")];
    while let Some(d) = stack.pop() {
        for e in std::fs::read_dir(&d).unwrap().flatten() {
            let p = e.path();
            if p.is_dir() {
                stack.push(p);
                continue;
            }
            if p.extension().is_none_or(|x| x != "rs") {
                continue;
            }
            let text = std::fs::read_to_string(&p).unwrap();
            for ctor in [
                "Diag::error(",
                "Diag::warning(",
                "Diag::info(",
                "Diag::new(",
            ] {
                for (i, _) in text.match_indices(ctor) {
                    let rest = text[i + ctor.len()..].trim_start();
                    if let Some(r) = rest.strip_prefix('"') {
                        let code = &r[..r.find('"').unwrap()];
                        let plain = code
                            .chars()
                            .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '-');
                        if plain && !code.is_empty() && !codes.iter().any(|c| c == code) {
                            codes.push(code.to_string());
                        }
                    }
                }
            }
        }
    }
    codes.sort();
    codes
}

#[test]
fn explain_covers_every_code_the_tool_can_print() {
    let codes = codes_in_source();
    // the scan finds the codes (a scan that finds nothing proves nothing)
    assert!(codes.len() > 30, "{codes:?}");
    for must in [
        "config",
        "unclosed-list",
        "floating-cmos-input",
        "stale-waiver",
    ] {
        assert!(
            codes.iter().any(|c| c == must),
            "{must} not found: {codes:?}"
        );
    }
    let r = root();
    for c in &codes {
        let (code, out, err) = run(&r, &["explain", c]);
        assert_eq!(code, 0, "`explain {c}` fails: {err}");
        assert!(out.starts_with(c.as_str()), "{out}");
    }
    // and the list names them all
    let (_, list, _) = run(&r, &["explain"]);
    for c in &codes {
        assert!(
            list.lines()
                .any(|l| l.split_whitespace().next() == Some(c.as_str())),
            "`explain` does not list {c}"
        );
    }
}

#[test]
fn the_parts_file_documentation_covers_every_key_and_its_example_reads() {
    let doc = std::fs::read_to_string(root().join("docs/project-files.md")).unwrap();
    let section = doc
        .split("## Parts file")
        .nth(1)
        .and_then(|s| s.split("\n## ").next())
        .expect("a parts file section");
    // the example is a parts file the reader takes
    let example = section
        .split("```toml\n")
        .nth(1)
        .and_then(|s| s.split("```").next())
        .expect("an example");
    let t = netmargin::classify::parts::PartTable::parse(example, false)
        .unwrap_or_else(|e| panic!("the documented example does not read: {e:?}"));
    assert_eq!(t.entries.len(), 3);
    // the reader's own list of keys, from its answer to an unknown one
    let err = netmargin::classify::parts::PartTable::parse(
        "[[part]]\nvalues = [\"X\"]\nno_such_key = 1\n",
        false,
    )
    .expect_err("unknown keys are errors");
    let msg = &err[0].message;
    // "unknown key `no_such_key`; the keys here are `values`, `kind`, ..."
    let keys: Vec<&str> = msg
        .split("the keys here are ")
        .nth(1)
        .unwrap_or_else(|| panic!("no list of keys in: {msg}"))
        .split('`')
        .skip(1)
        .step_by(2)
        .collect();
    assert!(
        keys.contains(&"values") && keys.contains(&"series"),
        "{msg}"
    );
    for k in keys {
        assert!(
            section.contains(&format!("| `{k}` |")),
            "the parts file key `{k}` is not in the table of docs/project-files.md"
        );
    }
}

#[test]
fn far_apart_labels_are_shown_as_excerpts_with_the_lines_between_left_out() {
    let r = root();
    // the duplicate reference: first use at line 24, the second at line 42
    let (code, out, err) = run(
        &r,
        &[
            "check",
            "--color",
            "never",
            "fixtures/model-errors/duplicate-ref-k5.net",
        ],
    );
    assert!(code == 1 || code == 0, "{err}");
    let finding = out
        .split("duplicate-ref\n")
        .nth(1)
        .and_then(|s| s.split("  help:").next())
        .expect("the duplicate-ref finding");
    assert!(finding.contains("(17 lines before line 42)"), "{finding}");
    // both labelled lines are shown, the lines between them are not
    assert!(finding.contains(" 24 │     (comp (ref U2)"), "{finding}");
    assert!(finding.contains(" 42 │     (comp (ref U2)"), "{finding}");
    for between in 27..=39 {
        assert!(
            !finding.contains(&format!(" {between} │")),
            "line {between} shown:\n{finding}"
        );
    }
    // the demo: no finding shows more than a screenful of source lines
    let (_, out, _) = run(
        &r,
        &[
            "check",
            "--color",
            "never",
            "fixtures/demo/counter-timer.net",
        ],
    );
    let mut blocks: Vec<Vec<&str>> = Vec::new();
    for l in out.lines() {
        let head = l.starts_with("  × ")
            || l.starts_with("  ⚠ ")
            || (l.starts_with("  ☞ ") && !l.starts_with("  ☞ ... "));
        match blocks.last_mut() {
            Some(b) if !head => b.push(l),
            _ => blocks.push(vec![l]),
        }
    }
    assert!(blocks.len() > 20, "{} findings", blocks.len());
    for b in &blocks {
        let lines = b.iter().filter(|l| l.contains(" │ ")).count();
        assert!(lines <= 30, "{lines} source lines in:\n{}", b.join("\n"));
    }
}

#[test]
fn the_json_totals_count_netlists_not_the_configuration() {
    let s = Scratch::new("json-counted");
    std::fs::copy(
        root().join("fixtures/boards/clean-k5.net"),
        s.0.join("board.net"),
    )
    .unwrap();
    std::fs::write(
        s.0.join("netmargin.toml"),
        "[[waiver]]\ncheck = \"fanout-overrun\"\nrefs = [\"U99\"]\nreason = \"bench unit\"\n",
    )
    .unwrap();
    let (_, out, err) = run(&s.0, &["check", "--format", "json", "board.net"]);
    let doc: serde_json::Value =
        serde_json::from_str(&out).unwrap_or_else(|e| panic!("{e}: {err}"));
    // the configuration is listed, with its stale waiver ...
    assert_eq!(doc["files"].as_array().unwrap().len(), 2);
    // ... but one file was checked
    assert_eq!(doc["totals"]["files"], 1);
    assert_eq!(doc["totals"]["checked"], 1);
    assert_eq!(doc["totals"]["warnings"], 1);
}

#[test]
fn every_broken_mapping_file_is_reported_in_one_run() {
    let s = Scratch::new("mapping");
    std::fs::copy(
        root().join("fixtures/boards/clean-k5.net"),
        s.0.join("board.net"),
    )
    .unwrap();
    std::fs::write(
        s.0.join("netmargin.toml"),
        "[rules]\nparts = [\"a-parts.toml\", \"b-parts.toml\", \"missing.toml\"]\n",
    )
    .unwrap();
    std::fs::write(
        s.0.join("a-parts.toml"),
        "[[part]]\nvalues = \"74LSOO\"\nfamily = \"74LS\"\n",
    )
    .unwrap();
    std::fs::write(
        s.0.join("b-parts.toml"),
        "[[part]]\nvalues = [\"X*\"]\nfamliy = \"74LS\"\n",
    )
    .unwrap();
    let (code, out, err) = run(&s.0, &["check", "--format", "short", "board.net"]);
    assert_eq!(code, 2, "{out}{err}");
    let text = format!("{out}{err}");
    assert!(
        text.lines()
            .any(|l| l.contains("a-parts.toml:2:") && l.contains("expected a list, found text")),
        "{text}"
    );
    assert!(
        text.lines()
            .any(|l| l.contains("b-parts.toml:3:") && l.contains("unknown key `famliy`")),
        "{text}"
    );
    assert!(
        text.lines()
            .any(|l| l.contains("netmargin.toml:2:") && l.contains("missing.toml")),
        "{text}"
    );
    // the same from the commands that show one file
    let (code, _, err) = run(&s.0, &["parts", "board.net"]);
    assert_eq!(code, 2);
    assert!(
        err.contains("a-parts.toml") && err.contains("b-parts.toml"),
        "{err}"
    );
}
