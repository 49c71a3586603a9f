//! `docs/checks.md` is generated from the registry; this keeps the committed copy current.

#[test]
fn checks_reference_is_current() {
    let want = netmargin::report::docs::checks_markdown();
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/checks.md");
    if std::env::var_os("NETMARGIN_UPDATE_DOCS").is_some() {
        std::fs::create_dir_all(path.parent().unwrap()).unwrap();
        std::fs::write(&path, &want).unwrap();
    }
    let have = std::fs::read_to_string(&path).unwrap_or_default();
    assert!(
        have == want,
        "docs/checks.md is out of date: run `NETMARGIN_UPDATE_DOCS=1 cargo test --test docs`"
    );
    for c in netmargin::checks::REGISTRY {
        assert!(have.contains(&format!("## {}", c.id)), "{} missing", c.id);
    }
}

fn root() -> std::path::PathBuf {
    std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn netmargin(args: &[&str]) -> (i32, String) {
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(args)
        .current_dir(root())
        .env("NO_COLOR", "1")
        .output()
        .expect("the binary runs");
    (
        o.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&o.stdout).into_owned(),
    )
}

fn readme() -> String {
    std::fs::read_to_string(root().join("README.md")).unwrap()
}

#[test]
fn readme_opens_with_the_job_then_the_demo_and_the_tests() {
    let r = readme();
    let first_block = r
        .split("```sh\n")
        .nth(1)
        .and_then(|b| b.split("```").next())
        .expect("a first code block");
    let lines: Vec<&str> = first_block.lines().collect();
    assert_eq!(
        lines,
        [
            "cargo run --release -- check fixtures/demo/counter-timer.net",
            "cargo test"
        ]
    );
    // the job paragraph comes first
    let before = r.split("```sh\n").next().unwrap();
    assert!(before.contains("netmargin reads the KiCad"), "{before}");
    assert!(r.contains("cargo install --path ."));
}

/// `N word` in `text`, e.g. `13 errors`.
fn count_before(text: &str, word: &str) -> usize {
    let i = text
        .find(&format!(" {word}"))
        .unwrap_or_else(|| panic!("no `{word}` in: {text}"));
    text[..i]
        .rsplit(|c: char| !c.is_ascii_digit())
        .next()
        .and_then(|n| n.parse().ok())
        .unwrap_or_else(|| panic!("no count before `{word}` in: {text}"))
}

#[test]
fn readme_figures_of_the_demo_are_true() {
    let r = readme();
    let (code, out) = netmargin(&["check", "fixtures/demo/counter-timer.net"]);
    assert_eq!(code, 1, "the README says the demo exits with 1");
    let total = out.lines().last().unwrap().to_string();
    // "1 file, 42 parts, 144 nets: 13 errors, 8 warnings, 3 info; ..."
    let sentence = r
        .split("so the first command exits with 1: ")
        .nth(1)
        .and_then(|s| s.split('.').next())
        .expect("the demo's figures");
    for (readme_word, run_word) in [
        ("parts", "parts"),
        ("nets", "nets"),
        ("errors", "errors"),
        ("warnings", "warnings"),
        ("infos", "info"),
    ] {
        assert_eq!(
            count_before(sentence, readme_word),
            count_before(&total, run_word),
            "README: `{sentence}`; the run: `{total}`"
        );
    }
    // the audit's figures and charted nets
    let (code, md) = netmargin(&[
        "audit",
        "--format",
        "markdown",
        "fixtures/demo/counter-timer.net",
    ]);
    assert_eq!(code, 0);
    let said = r
        .split("On the demo board the report finds ")
        .nth(1)
        .and_then(|s| s.split("for the recapture review").next())
        .expect("the audit sentence");
    let totals = md
        .lines()
        .find(|l| l.starts_with("| total |"))
        .expect("a totals row");
    let cells: Vec<usize> = totals
        .split('|')
        .filter_map(|c| c.trim().parse().ok())
        .collect();
    assert_eq!(
        [
            count_before(said, "errors"),
            count_before(said, "warnings"),
            count_before(said, "infos")
        ],
        [cells[0], cells[1], cells[2]],
        "{said}\n{totals}"
    );
    let charted: Vec<&str> = md
        .lines()
        .filter_map(|l| l.strip_prefix("### Net "))
        .collect();
    for n in &charted {
        assert!(
            said.contains(&format!("`{n}`")),
            "{n} is charted but the README does not say so"
        );
    }
    let named = said.matches("`/").count();
    assert_eq!(
        named,
        charted.len(),
        "the README names a net that is not charted: {said}"
    );
}

#[test]
fn readme_net_examples_exist_on_the_demo() {
    let r = readme();
    let mut seen = 0;
    for l in r.lines() {
        let Some(rest) = l.trim().strip_prefix("netmargin net board.net ") else {
            continue;
        };
        let net = rest.split_whitespace().next().unwrap();
        let (code, out) = netmargin(&["net", "fixtures/demo/counter-timer.net", net]);
        assert_eq!(
            code, 0,
            "the README's example net {net} is not on the demo board"
        );
        assert!(out.starts_with(&format!("net {net}")), "{out}");
        seen += 1;
    }
    assert!(seen > 0, "no `netmargin net` example found");
}

#[test]
fn readme_lists_every_reference_the_tests_compare_against() {
    let r = readme();
    let table = r
        .split("## Reference tools used by the tests")
        .nth(1)
        .expect("the section");
    for e in std::fs::read_dir(root().join("tests")).unwrap().flatten() {
        let p = e.path();
        if p.extension().is_none_or(|x| x != "rs") {
            continue;
        }
        let text = std::fs::read_to_string(&p).unwrap();
        if p.file_name().is_some_and(|n| n != "docs.rs") && text.contains("notice::skipped(") {
            let name = format!("`tests/{}`", p.file_name().unwrap().to_string_lossy());
            assert!(
                table.contains(&name),
                "{name} compares against a tool the README does not list"
            );
        }
    }
}

#[test]
fn the_severity_policy_is_the_same_in_explain_and_the_guide() {
    let guide = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("DEVELOPERS.md"),
    )
    .unwrap();
    let policy = netmargin::report::explain::SEVERITY_POLICY;
    // the same three rules and the same limit on symbols, in both places
    for phrase in [
        "follows from known data",
        "in at least one state the circuit reaches",
        "rests on\nan assumption",
        "cannot tell",
        "A symbol's pin types alone\nnever make an error",
    ] {
        let flat = |s: &str| s.split_whitespace().collect::<Vec<_>>().join(" ");
        assert!(
            flat(policy).contains(&flat(phrase)),
            "explain lacks {phrase:?}"
        );
        assert!(
            flat(&guide).contains(&flat(phrase)),
            "the guide lacks {phrase:?}"
        );
    }
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .arg("explain")
        .output()
        .unwrap();
    assert!(String::from_utf8_lossy(&out.stdout).starts_with("severity: an error when"));
}
