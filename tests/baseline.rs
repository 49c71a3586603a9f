//! Adopting netmargin on an existing project, through the real binary in scratch folders:
//! `baseline` and `check --baseline`, `init` and `config --show`; and the small commands
//! (`completions`, `man`) and a reader that stops early (`| head -1`).

use std::io::{BufRead, BufReader};
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// A folder removed when the test ends.
struct Scratch(PathBuf);

impl Scratch {
    fn new(tag: &str) -> Scratch {
        let nanos = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.subsec_nanos());
        let d = std::env::temp_dir().join(format!(
            "netmargin-adopt-{tag}-{}-{nanos}",
            std::process::id()
        ));
        let _ = std::fs::remove_dir_all(&d);
        std::fs::create_dir_all(&d).expect("scratch folder");
        Scratch(d)
    }
    fn path(&self, p: &str) -> PathBuf {
        self.0.join(p)
    }
    fn put(&self, p: &str, text: &str) {
        let path = self.path(p);
        std::fs::create_dir_all(path.parent().unwrap()).unwrap();
        std::fs::write(path, text).unwrap();
    }
    fn fixture(&self, from: &str, to: &str) {
        self.put(to, &std::fs::read_to_string(root().join(from)).unwrap());
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

fn run_in(dir: &Path, args: &[&str]) -> Output {
    let o = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(args)
        .current_dir(dir)
        .env_remove("NO_COLOR")
        .output()
        .expect("the binary runs");
    assert!(
        !String::from_utf8_lossy(&o.stderr).contains("panicked"),
        "{args:?} panicked:\n{}",
        String::from_utf8_lossy(&o.stderr)
    );
    o
}

fn out(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn err(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

fn short_lines(o: &Output) -> Vec<String> {
    out(o).lines().map(str::to_string).collect()
}

/// The demo board (11 findings, 2 of them floating-cmos-input) and the hobby board (2: a
/// level-mismatch and a floating-cmos-input), as a project's `hardware/` folder.
fn project(tag: &str) -> Scratch {
    let s = Scratch::new(tag);
    s.fixture(
        "fixtures/demo/counter-timer.net",
        "hardware/counter-timer.net",
    );
    s.fixture("fixtures/boards/hobby-k8.net", "hardware/hobby.net");
    s
}

#[test]
fn a_baseline_holds_every_finding_with_the_reports_fingerprints() {
    let s = project("write");
    let before = run_in(
        &s.0,
        &[
            "check",
            "--format",
            "short",
            "--fail-on",
            "info",
            "hardware",
        ],
    );
    let n = short_lines(&before).len();
    assert!(n >= 10, "{}", out(&before));
    let o = run_in(
        &s.0,
        &["baseline", "hardware", "-o", "ci/netmargin-baseline.json"],
    );
    assert_eq!(o.status.code(), Some(0), "{}", err(&o));
    assert_eq!(
        out(&o),
        format!("wrote ci/netmargin-baseline.json: {n} findings in 2 files\n")
    );
    // written atomically: no temporary file is left beside it
    let names: Vec<String> = std::fs::read_dir(s.path("ci"))
        .unwrap()
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .collect();
    assert_eq!(names, vec!["netmargin-baseline.json"]);
    let text = std::fs::read_to_string(s.path("ci/netmargin-baseline.json")).unwrap();
    let doc: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert_eq!(doc["format_version"], 1);
    let files = doc["files"].as_object().unwrap();
    // paths relative to the baseline's folder
    assert_eq!(
        files.keys().collect::<Vec<_>>(),
        vec!["../hardware/counter-timer.net", "../hardware/hobby.net"]
    );
    // the same fingerprints as the JSON report gives its findings
    let json = run_in(&s.0, &["check", "--format", "json", "hardware"]);
    let report: serde_json::Value = serde_json::from_slice(&json.stdout).unwrap();
    let mut from_report: Vec<String> = Vec::new();
    collect_fingerprints(&report, &mut from_report);
    let mut from_baseline: Vec<String> = files
        .values()
        .flat_map(|v| v.as_array().unwrap())
        .map(|e| e["fingerprint"].as_str().unwrap().to_string())
        .collect();
    from_report.sort();
    from_baseline.sort();
    assert_eq!(from_baseline.len(), n);
    assert_eq!(from_baseline, from_report);
    let hobby = &files["../hardware/hobby.net"];
    let cmos = hobby
        .as_array()
        .unwrap()
        .iter()
        .find(|e| e["check"] == "floating-cmos-input")
        .expect("the hobby board's floating input");
    assert_eq!(cmos["pins"], serde_json::json!(["U2.12", "U2.13"]));
    assert!(cmos["message"]
        .as_str()
        .unwrap()
        .starts_with("gate D of U2 (74HC00) is unused"));
}

fn collect_fingerprints(v: &serde_json::Value, out: &mut Vec<String>) {
    match v {
        serde_json::Value::Object(m) => {
            for (k, x) in m {
                if k == "fingerprint" {
                    if let Some(s) = x.as_str() {
                        out.push(s.to_string());
                    }
                } else {
                    collect_fingerprints(x, out);
                }
            }
        }
        serde_json::Value::Array(a) => a.iter().for_each(|x| collect_fingerprints(x, out)),
        _ => {}
    }
}

#[test]
fn check_with_a_baseline_reports_only_new_findings_and_survives_unrelated_edits() {
    let s = project("check");
    // the baseline made without the level check: its finding on the hobby board is new
    let o = run_in(
        &s.0,
        &["baseline", "hardware", "--disable", "level-mismatch"],
    );
    assert_eq!(o.status.code(), Some(0), "{}", err(&o));
    let all = short_lines(&run_in(&s.0, &["check", "--format", "short", "hardware"])).len();

    let o = run_in(
        &s.0,
        &[
            "check",
            "--format",
            "short",
            "--baseline",
            "netmargin-baseline.json",
            "hardware",
        ],
    );
    assert_eq!(o.status.code(), Some(1));
    let lines = short_lines(&o);
    // the two level-mismatch findings (one per board) are the new ones
    assert_eq!(lines.len(), 2, "{lines:?}");
    assert!(
        lines.iter().all(|l| l.ends_with("[level-mismatch]")),
        "{lines:?}"
    );
    assert!(
        lines.iter().any(|l| l.starts_with(
            "hardware/hobby.net:472:7: error: U2 pin 1 (74HC00 input 1A) needs 3.50 V"
        )),
        "{lines:?}"
    );
    let o = run_in(
        &s.0,
        &[
            "check",
            "--color",
            "never",
            "--baseline",
            "netmargin-baseline.json",
            "hardware",
        ],
    );
    let summary = out(&o).lines().last().unwrap_or_default().to_string();
    assert!(
        summary.ends_with(&format!("; {} suppressed", all - 2)),
        "{summary}"
    );

    // unrelated edits: lines inserted above every finding, the date changed, a part added
    for f in ["hardware/counter-timer.net", "hardware/hobby.net"] {
        let text = std::fs::read_to_string(s.path(f)).unwrap();
        let edited = text.replacen(
            "(components",
            "\n\n\n(components\n    (comp (ref \"R99\") (value \"10k\"))",
            1,
        );
        let edited = edited.replacen("(date \"", "(date \"edited ", 1);
        assert_ne!(edited, text);
        s.put(f, &edited);
    }
    let o = run_in(
        &s.0,
        &[
            "check",
            "--format",
            "short",
            "--disable",
            "level-mismatch",
            "--baseline",
            "netmargin-baseline.json",
            "hardware",
        ],
    );
    assert_eq!(
        (o.status.code(), out(&o)),
        (Some(0), String::new()),
        "{}",
        err(&o)
    );

    // run from another folder: the keys are relative to the baseline, not to the cwd
    let o = run_in(
        &s.path("hardware"),
        &[
            "check",
            "--format",
            "short",
            "--disable",
            "level-mismatch",
            "--baseline",
            "../netmargin-baseline.json",
            ".",
        ],
    );
    assert_eq!(
        (o.status.code(), out(&o)),
        (Some(0), String::new()),
        "{}",
        err(&o)
    );

    // the same fault on another part is a new finding: U2 renamed U7 on the hobby board, so
    // its floating gate is reported and the old entry is gone
    let text = std::fs::read_to_string(s.path("hardware/hobby.net")).unwrap();
    assert!(!text.contains("(ref \"U7\")"));
    s.put(
        "hardware/hobby.net",
        &text.replace("(ref \"U2\")", "(ref \"U7\")"),
    );
    let o = run_in(
        &s.0,
        &[
            "check",
            "--format",
            "short",
            "--disable",
            "level-mismatch",
            "--baseline",
            "netmargin-baseline.json",
            "hardware",
        ],
    );
    assert_eq!(o.status.code(), Some(1));
    let lines = short_lines(&o);
    assert_eq!(lines.len(), 2, "{lines:?}");
    assert!(
        lines[0].starts_with("hardware/hobby.net:")
            && lines[0].contains("gate D of U7 (74HC00) is unused")
            && lines[0].ends_with("[floating-cmos-input]"),
        "{}",
        lines[0]
    );
    assert!(
        lines[1].ends_with(
            "hardware/hobby.net: 1 of its 1 baseline entries match no finding now [stale-baseline]"
        ),
        "{}",
        lines[1]
    );
}

#[test]
fn gone_entries_are_reported_so_the_baseline_can_be_tightened() {
    let s = project("stale");
    assert_eq!(
        run_in(&s.0, &["baseline", "hardware"]).status.code(),
        Some(0)
    );
    // the floating-input findings "fixed" (their check off): 2 on the demo, 1 on the hobby board
    let o = run_in(
        &s.0,
        &[
            "check",
            "--format",
            "short",
            "--disable",
            "floating-cmos-input",
            "--baseline",
            "netmargin-baseline.json",
            "hardware",
        ],
    );
    assert_eq!(
        o.status.code(),
        Some(0),
        "info lines do not fail the run:\n{}",
        out(&o)
    );
    let lines = short_lines(&o);
    assert_eq!(lines.len(), 2, "{lines:?}");
    assert_eq!(lines[0], "netmargin-baseline.json:5:5: info: hardware/counter-timer.net: 2 of its 29 baseline entries match no finding now [stale-baseline]");
    assert!(lines[1].ends_with(": info: hardware/hobby.net: 1 of its 2 baseline entries match no finding now [stale-baseline]"), "{}", lines[1]);
    // --verbose: one line per entry, at its fingerprint
    let o = run_in(
        &s.0,
        &[
            "check",
            "--format",
            "short",
            "-v",
            "--disable",
            "floating-cmos-input",
            "--baseline",
            "netmargin-baseline.json",
            "hardware",
        ],
    );
    let lines = short_lines(&o);
    assert_eq!(lines.len(), 3, "{lines:?}");
    assert!(
        lines
            .iter()
            .all(|l| l.contains("the baseline entry for `floating-cmos-input` on U")),
        "{lines:?}"
    );
    assert!(
        lines.iter().any(|l| l.contains("on U2.12, U2.13")),
        "{lines:?}"
    );
    // with --fail-on info they fail it
    let o = run_in(
        &s.0,
        &[
            "check",
            "--format",
            "short",
            "--fail-on",
            "info",
            "--disable",
            "floating-cmos-input",
            "--disable",
            "unclassified-part",
            "--baseline",
            "netmargin-baseline.json",
            "hardware",
        ],
    );
    assert_eq!(o.status.code(), Some(1));
}

#[test]
fn a_malformed_baseline_is_an_error_at_its_line() {
    let s = project("malformed");
    s.put("base.json", "{\n  \"format_version\": 1,\n  \"files\": {\n    \"hardware/hobby.net\": [ { \"fingerprint\": \"0123456789abcdef\" \"check\": \"x\" } ]\n  }\n}\n");
    let o = run_in(
        &s.0,
        &[
            "check",
            "--format",
            "short",
            "--baseline",
            "base.json",
            "hardware",
        ],
    );
    assert_eq!(o.status.code(), Some(2));
    let text = out(&o);
    assert!(text.starts_with("base.json:4:"), "{text}");
    assert!(
        text.contains("error: in the baseline: expected `,` or `}`"),
        "{text}"
    );
    // the human format shows the line
    let o = run_in(
        &s.0,
        &[
            "check",
            "--color",
            "never",
            "--baseline",
            "base.json",
            "hardware",
        ],
    );
    assert!(out(&o).contains("[base.json:4:"), "{}", out(&o));
    // a missing one
    let o = run_in(
        &s.0,
        &[
            "check",
            "--format",
            "short",
            "--baseline",
            "nope.json",
            "hardware",
        ],
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(
        out(&o).contains("cannot read the baseline `nope.json`: no such file"),
        "{}",
        out(&o)
    );
    // a newer format
    s.put("v9.json", "{ \"format_version\": 9, \"files\": {} }");
    let o = run_in(
        &s.0,
        &[
            "check",
            "--format",
            "short",
            "--baseline",
            "v9.json",
            "hardware",
        ],
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(out(&o).contains("v9.json:1:3: error: baseline format_version 9 is not one this netmargin reads (it reads 1)"), "{}", out(&o));
}

#[test]
fn no_baseline_is_written_when_a_file_cannot_be_checked() {
    let s = project("refuse");
    s.fixture(
        "fixtures/malformed/unclosed-list.net",
        "hardware/broken.net",
    );
    let o = run_in(&s.0, &["baseline", "hardware"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        err(&o).contains("baseline not written: 1 file could not be checked"),
        "{}",
        err(&o)
    );
    assert!(!s.path("netmargin-baseline.json").exists());
    // and an existing one is left as it was
    std::fs::remove_file(s.path("hardware/broken.net")).unwrap();
    assert_eq!(
        run_in(&s.0, &["baseline", "hardware"]).status.code(),
        Some(0)
    );
    let good = std::fs::read_to_string(s.path("netmargin-baseline.json")).unwrap();
    s.fixture(
        "fixtures/malformed/unclosed-list.net",
        "hardware/broken.net",
    );
    assert_eq!(
        run_in(&s.0, &["baseline", "hardware"]).status.code(),
        Some(2)
    );
    assert_eq!(
        std::fs::read_to_string(s.path("netmargin-baseline.json")).unwrap(),
        good
    );
}

#[test]
fn init_writes_a_starter_that_loads_and_refuses_to_overwrite() {
    let s = project("init");
    let o = run_in(&s.0, &["init", "hardware/counter-timer.net"]);
    assert_eq!(o.status.code(), Some(0), "{}", err(&o));
    assert_eq!(out(&o), "wrote netmargin.toml: 4 supply rails (1 without a voltage to set), 3 connectors to review\n");
    let text = std::fs::read_to_string(s.path("netmargin.toml")).unwrap();
    // the demo's rails with the voltages their names state, its connectors commented
    for line in [
        "\"+5V\" = 5.0",
        "\"+12V\" = 12.0",
        "-12V = -12.0",
        "# J3 = \"74LS\"",
        "derating = 0.8",
    ] {
        assert!(
            text.lines().any(|l| l.starts_with(line)),
            "no `{line}` in\n{text}"
        );
    }
    // it loads back: a check with it runs clean of configuration errors, and the rails
    // and derating show as coming from it
    let o = run_in(
        &s.0,
        &["check", "--format", "short", "hardware/counter-timer.net"],
    );
    assert_eq!(o.status.code(), Some(1), "{}{}", out(&o), err(&o));
    assert!(!out(&o).contains("netmargin.toml"), "{}", out(&o));
    let o = run_in(&s.0, &["config", "--show", "hardware/counter-timer.net"]);
    assert_eq!(o.status.code(), Some(0), "{}", err(&o));
    let show = out(&o);
    let line = show
        .lines()
        .find(|l| l.starts_with("\"+5V\" = 5.0"))
        .unwrap_or_else(|| panic!("{show}"));
    let n = text
        .lines()
        .position(|l| l.starts_with("\"+5V\" = 5.0"))
        .unwrap()
        + 1;
    assert!(
        line.ends_with(&format!("netmargin.toml line {n}")),
        "{line}"
    );
    // refuses to overwrite, then replaces with --force
    std::fs::write(s.path("netmargin.toml"), "# mine\n").unwrap();
    let o = run_in(&s.0, &["init", "hardware/counter-timer.net"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(err(&o).contains("already exists; not replaced (use --force to replace it)"));
    assert_eq!(
        std::fs::read_to_string(s.path("netmargin.toml")).unwrap(),
        "# mine\n"
    );
    let o = run_in(&s.0, &["init", "--force", "hardware/hobby.net"]);
    assert_eq!(o.status.code(), Some(0), "{}", err(&o));
    assert!(std::fs::read_to_string(s.path("netmargin.toml"))
        .unwrap()
        .contains("started by `netmargin init` from \"hardware/hobby.net\""));
}

#[test]
fn init_asks_for_the_voltage_of_a_rail_whose_name_states_none() {
    let s = Scratch::new("vcc");
    let text = std::fs::read_to_string(root().join("fixtures/boards/hobby-k8.net")).unwrap();
    assert!(text.contains("(name \"+5V\")"));
    s.put(
        "board.net",
        &text.replace("(name \"+5V\")", "(name \"VCC\")"),
    );
    // no argument: the netlists in the current folder
    let o = run_in(&s.0, &["init"]);
    assert_eq!(o.status.code(), Some(0), "{}", err(&o));
    assert!(
        out(&o).contains("2 supply rails (1 without a voltage to set)"),
        "{}",
        out(&o)
    );
    let starter = std::fs::read_to_string(s.path("netmargin.toml")).unwrap();
    assert!(
        starter.contains("# VCC = 5.0  # what voltage is \"VCC\"? the name does not say"),
        "{starter}"
    );
    assert_eq!(run_in(&s.0, &["config", "--show"]).status.code(), Some(0));
}

#[test]
fn config_show_names_the_origin_of_each_value() {
    let s = project("show");
    s.put("hardware/netmargin.toml", "# project\nrail_tolerance = 0.05\n\n[rails]\nVREF = 2.5\n\n[checks]\nseverity = { \"floating-ttl-input\" = \"error\" }\n");
    let o = run_in(
        &s.0,
        &[
            "config",
            "--show",
            "--rail",
            "VLOGIC=3.3",
            "--disable",
            "unclassified-part",
            "hardware/hobby.net",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{}", err(&o));
    let show = out(&o);
    let find = |start: &str| {
        show.lines()
            .find(|l| l.starts_with(start))
            .unwrap_or_else(|| panic!("no `{start}` in\n{show}"))
            .to_string()
    };
    assert!(find("rail_tolerance = 0.05").ends_with("netmargin.toml line 2"));
    assert!(find("VREF = 2.5").ends_with("netmargin.toml line 5"));
    assert!(find("VLOGIC = 3.3").ends_with("# command line (--rail)"));
    assert!(find("floating-ttl-input = \"error\"").ends_with("netmargin.toml line 8"));
    assert!(find("unclassified-part = \"off\"").ends_with("# command line (--disable)"));
    assert!(find("derating = 0.8").ends_with("# default"));
    // the output is TOML
    let t: toml::Table = toml::from_str(&show).unwrap();
    assert_eq!(t["rails"]["VREF"].as_float(), Some(2.5));
    // a bad configuration: its error at its line, exit 2
    s.put("hardware/netmargin.toml", "[checks]\nderating = 7\n");
    let o = run_in(&s.0, &["config", "--show", "hardware"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        err(&o).contains("checks.derating must be between"),
        "{}",
        err(&o)
    );
    // no such path
    let o = run_in(&s.0, &["config", "--show", "nowhere.net"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(err(&o).contains("no file or folder `nowhere.net`"));
}

#[test]
fn completions_and_man_page() {
    let dir = root();
    for (shell, needle) in [
        ("bash", "complete -F"),
        ("zsh", "#compdef netmargin"),
        ("fish", "complete -c netmargin"),
        ("elvish", "arg-completer[netmargin]"),
        ("powershell", "Register-ArgumentCompleter"),
    ] {
        let o = run_in(&dir, &["completions", shell]);
        assert_eq!(o.status.code(), Some(0), "{shell}");
        let text = out(&o);
        assert!(text.contains(needle), "{shell}: no `{needle}`");
        // the subcommands and options are in it
        assert!(
            text.contains("baseline") && text.contains("fail-on"),
            "{shell}"
        );
    }
    assert_eq!(
        run_in(&dir, &["completions", "tcsh"]).status.code(),
        Some(2)
    );
    let o = run_in(&dir, &["man"]);
    assert_eq!(o.status.code(), Some(0));
    let man = out(&o);
    assert!(
        man.contains(".TH netmargin 1"),
        "{}",
        &man[..man.len().min(300)]
    );
    assert!(
        man.contains(".SH NAME\nnetmargin \\- Checks KiCad netlists"),
        "{}",
        &man[..man.len().min(300)]
    );
    // every subcommand is listed, with the examples
    for sub in ["check", "baseline", "config", "init", "completions", "man"] {
        assert!(
            man.contains(&format!("netmargin\\-{sub}(1)")),
            "no {sub} in the man page"
        );
    }
    assert!(man.contains("netmargin baseline hardware/"));
}

#[test]
fn help_shows_examples() {
    let o = run_in(&root(), &["--help"]);
    assert!(
        out(&o).contains("Examples:\n  netmargin check board.net"),
        "{}",
        out(&o)
    );
    let o = run_in(&root(), &["baseline", "--help"]);
    assert!(
        out(&o).contains("netmargin check --baseline ci/netmargin-baseline.json hardware/"),
        "{}",
        out(&o)
    );
}

#[test]
fn a_reader_that_stops_early_is_a_clean_exit() {
    // `netmargin check ... | head -1`: far more output than a pipe holds, the reader gone
    // after one line; no panic, no error message, the run's own exit code (1: findings)
    let mut args = vec!["check".to_string(), "--color".into(), "never".into()];
    args.extend(std::iter::repeat_n(
        "fixtures/demo/counter-timer.net".to_string(),
        80,
    ));
    let mut child = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(&args)
        .current_dir(root())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("spawns");
    let mut first = String::new();
    BufReader::new(child.stdout.take().expect("piped"))
        .read_line(&mut first)
        .expect("one line");
    // the reader is dropped here, as `head -1` exits
    let o = child.wait_with_output().expect("exits");
    assert!(!first.is_empty());
    assert_eq!(err(&o), "", "stderr on a closed pipe");
    assert_eq!(o.status.code(), Some(1));

    // and through a real shell pipe
    let sh = Command::new("sh").arg("-c").arg(format!("\"{}\" check --format short $(printf 'fixtures/demo/counter-timer.net %.0s' $(seq 1 200)) | head -1", env!("CARGO_BIN_EXE_netmargin"))).current_dir(root()).output().expect("sh runs");
    assert_eq!(String::from_utf8_lossy(&sh.stdout).lines().count(), 1);
    assert_eq!(String::from_utf8_lossy(&sh.stderr), "");
}
