//! The output formats, from the same outcomes: snapshots of every format on the model-error
//! fixtures and on hand-built outcomes, the shape of the JSON and SARIF documents, the
//! fingerprints, the annotation escaping and a hostile netlist through every format.

use netmargin::diag::{Diag, Severity};
use netmargin::netlist::Summary;
use netmargin::pipeline::{self, FileOutcome, ReadOptions};
use netmargin::report::{self, github, Format, ReportOptions, TOOL_VERSION};
use netmargin::source::{SourceFile, Span};
use serde_json::Value;

/// The working directory and root the tests pretend to run in.
const ROOT: &str = "/project";

fn render(format: Format, files: &[FileOutcome]) -> String {
    render_with(&ReportOptions::new(format, ROOT), files)
}

fn render_with(opts: &ReportOptions, files: &[FileOutcome]) -> String {
    let mut out = Vec::new();
    report::write_report(opts, files, &mut out).expect("writing to a Vec cannot fail");
    String::from_utf8(out).expect("reports are UTF-8")
}

/// Replaces the version, so snapshots survive a release.
fn normalized(s: &str) -> String {
    s.replace(&format!("\"{TOOL_VERSION}\""), "\"[version]\"")
}

/// The model-error fixtures, one malformed file and one that does not exist, read by the
/// pipeline from paths relative to the package root (cargo runs tests there).
fn fixture_outcomes() -> Vec<FileOutcome> {
    let mut names: Vec<String> = std::fs::read_dir("fixtures/model-errors")
        .expect("the fixtures are in the package")
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "net"))
        .map(|p| p.to_string_lossy().replace('\\', "/"))
        .collect();
    names.sort();
    names.push("fixtures/malformed/unclosed-list.net".into());
    names.push("fixtures/no-such-file.net".into());
    names
        .iter()
        .map(|n| pipeline::read_file(n, &ReadOptions::default()))
        .collect()
}

/// A small invented board: a 74HC14 Schmitt trigger fed by an RC network, an LED and a
/// 74LS00 with a spare input.
const BOARD: &str = r#"(export (version "E")
  (components
    (comp (ref "U1") (value "74HC14"))
    (comp (ref "U2") (value "74LS00"))
    (comp (ref "R1") (value "100k"))
    (comp (ref "D1") (value "LED")))
  (nets
    (net (code "1") (name "/RESET_N")
      (node (ref "U1") (pin "1"))
      (node (ref "R1") (pin "2")))
    (net (code "2") (name "/LED_K")
      (node (ref "U2") (pin "3"))
      (node (ref "D1") (pin "1")))
    (net (code "3") (name "unconnected-(U1-Pad3)")
      (node (ref "U1") (pin "3")))))
"#;

fn span_of(text: &str, needle: &str) -> Span {
    let at = text
        .find(needle)
        .unwrap_or_else(|| panic!("`{needle}` is in the text"));
    Span::new(at, at + needle.len())
}

fn outcome(
    name: &str,
    text: &str,
    diags: Vec<Diag>,
    coverage: Option<(usize, usize)>,
) -> FileOutcome {
    FileOutcome {
        name: name.to_string(),
        source: Some(SourceFile::new(name, text)),
        fatal: None,
        diags: diags.into(),
        summary: Summary {
            parts: 4,
            nets: 3,
            pins: 6,
            pins_on_no_net: 0,
        },
        coverage,
        waived: 0,
    }
}

fn board_diags(text: &str) -> Vec<Diag> {
    vec![
        Diag::error("floating-cmos-input", "U1 pin 3 (74HC14 input) is on a net with no driver, no rail and no pull resistor")
            .at(span_of(text, r#"(node (ref "U1") (pin "3"))"#), "CMOS input on no driver")
            .with_help("tie the input to GND or VCC, or drive it")
            .on_net("unconnected-(U1-Pad3)")
            .with_pins(["U1.3"]),
        Diag::warning("weak-high-drive", "U2 pin 3 (74LS00 output) sources an LED to ground in its high state: 0.4 mA guaranteed")
            .at(span_of(text, r#"(node (ref "U2") (pin "3"))"#), "TTL output")
            .also(span_of(text, r#"(node (ref "D1") (pin "1"))"#), "LED")
            .with_help("sink the LED current in the low state instead")
            .on_net("/LED_K")
            .with_pins(["U2.3", "D1.1"]),
        Diag::info("unclassified-part", "`LED` matches no mapping").at(span_of(text, r#"(value "LED")"#), "value"),
    ]
}

fn hand_built() -> Vec<FileOutcome> {
    let unreadable = FileOutcome {
        name: "boards/gone.net".into(),
        source: None,
        fatal: Some(Diag::error(
            "unreadable",
            "cannot read `boards/gone.net`: no such file",
        )),
        diags: Default::default(),
        summary: Summary::default(),
        coverage: None,
        waived: 0,
    };
    vec![
        outcome(
            "boards/timer board.net",
            BOARD,
            board_diags(BOARD),
            Some((2, 3)),
        ),
        outcome("boards/clean.net", BOARD, Vec::new(), Some((3, 3))),
        unreadable,
    ]
}

// ---------------------------------------------------------------------------
// snapshots

#[test]
fn snapshot_fixtures_human() {
    insta::assert_snapshot!(render(Format::Human, &fixture_outcomes()));
}

#[test]
fn snapshot_fixtures_short() {
    insta::assert_snapshot!(render(Format::Short, &fixture_outcomes()));
}

#[test]
fn snapshot_fixtures_json() {
    insta::assert_snapshot!(normalized(&render(Format::Json, &fixture_outcomes())));
}

#[test]
fn snapshot_fixtures_sarif_results() {
    // the rules are the same in every log (see the hand-built snapshot): results only
    let sarif: Value =
        serde_json::from_str(&render(Format::Sarif, &fixture_outcomes())).expect("SARIF is JSON");
    let results = serde_json::to_string_pretty(&sarif["runs"][0]["results"]).expect("serializes");
    insta::assert_snapshot!(results);
}

#[test]
fn snapshot_fixtures_github() {
    insta::assert_snapshot!(render(Format::Github, &fixture_outcomes()));
}

#[test]
fn snapshot_hand_built_human() {
    insta::assert_snapshot!(render(Format::Human, &hand_built()));
}

#[test]
fn snapshot_hand_built_short() {
    insta::assert_snapshot!(render(Format::Short, &hand_built()));
}

#[test]
fn snapshot_hand_built_json() {
    insta::assert_snapshot!(normalized(&render(Format::Json, &hand_built())));
}

#[test]
fn snapshot_hand_built_sarif() {
    // the rules' texts are the checks' doc comments, which change on their own: keep the
    // rules' ids, names and levels here, and check the texts in `sarif_rules_are_the_registry`
    let mut log: Value =
        serde_json::from_str(&render(Format::Sarif, &hand_built())).expect("SARIF is JSON");
    for rule in log["runs"][0]["tool"]["driver"]["rules"]
        .as_array_mut()
        .expect("rules")
    {
        let short = serde_json::json!({
            "id": rule["id"],
            "name": rule["name"],
            "defaultConfiguration": rule["defaultConfiguration"],
        });
        *rule = short;
    }
    let text = serde_json::to_string_pretty(&log).expect("serializes");
    insta::assert_snapshot!(normalized(&text));
}

#[test]
fn sarif_rules_are_the_registry() {
    let log: Value = serde_json::from_str(&render(Format::Sarif, &[])).expect("SARIF is JSON");
    let rules = log["runs"][0]["tool"]["driver"]["rules"]
        .as_array()
        .expect("rules")
        .clone();
    for (rule, check) in rules.iter().zip(netmargin::checks::REGISTRY) {
        assert_eq!(rule["id"], check.id);
        assert_eq!(rule["shortDescription"]["text"], check.summary);
        let full = if check.doc().is_empty() {
            check.summary
        } else {
            check.doc()
        };
        assert_eq!(rule["fullDescription"]["text"], full, "{}", check.id);
        assert_eq!(rule["help"]["text"], full, "{}", check.id);
        let level = match check.severity {
            Severity::Error => "error",
            Severity::Warning => "warning",
            Severity::Info => "note",
        };
        assert_eq!(rule["defaultConfiguration"]["level"], level, "{}", check.id);
    }
    let inputs = &rules[netmargin::checks::REGISTRY.len()..];
    assert_eq!(inputs.len(), netmargin::diag::INPUT_CODES.len());
    for (rule, (code, summary)) in inputs.iter().zip(netmargin::diag::INPUT_CODES) {
        assert_eq!(rule["id"], *code);
        assert_eq!(rule["shortDescription"]["text"], *summary);
    }
    assert_eq!(log["runs"][0]["results"], serde_json::json!([]));
    assert_eq!(
        log["runs"][0]["invocations"][0]["executionSuccessful"],
        true
    );
}

#[test]
fn snapshot_hand_built_github() {
    insta::assert_snapshot!(render(Format::Github, &hand_built()));
}

// ---------------------------------------------------------------------------
// the formats' contents, checked against the fixtures' position tables

/// `fixtures/model-errors/README.md`: the place of each problem (line, column of its `(`).
const TABLE: &[(&str, usize, usize)] = &[
    ("pin-on-two-nets-k5.net", 179, 7),
    ("unknown-ref-k8.net", 185, 7),
    ("duplicate-ref-k5.net", 42, 5),
    ("missing-ref-k8.net", 23, 5),
    ("missing-net-code-k5.net", 167, 5),
    ("missing-libpart-k8.net", 90, 7),
];

#[test]
fn json_places_agree_with_the_fixture_tables() {
    let doc: Value =
        serde_json::from_str(&render(Format::Json, &fixture_outcomes())).expect("JSON");
    assert_eq!(doc["format_version"], 1);
    assert_eq!(doc["tool"]["name"], "netmargin");
    for &(file, line, column) in TABLE {
        let f = doc["files"]
            .as_array()
            .expect("files")
            .iter()
            .find(|f| f["path"].as_str().is_some_and(|p| p.ends_with(file)))
            .unwrap_or_else(|| panic!("{file} reported"));
        assert_eq!(f["checked"], true, "{file}");
        let findings = f["findings"].as_array().expect("findings");
        // a finding starts on the table's line, at the element's `(` or inside it (a
        // finding may point at the offending field of the element)
        let hit = findings.iter().any(|d| {
            let l = d["line"].as_u64().unwrap_or(0) as usize;
            let c = d["column"].as_u64().unwrap_or(0) as usize;
            l == line && c >= column
        });
        assert!(
            hit,
            "{file}: no finding at line {line} from column {column}: {findings:#?}"
        );
    }
    // the unreadable and the malformed file are not checked and say why
    let files = doc["files"].as_array().expect("files");
    let missing = files
        .iter()
        .find(|f| f["path"] == "fixtures/no-such-file.net")
        .expect("missing file reported");
    assert_eq!(missing["checked"], false);
    assert_eq!(missing["error"]["check"], "unreadable");
    assert_eq!(missing["error"]["line"], Value::Null);
    assert_eq!(missing["summary"], Value::Null);
    let unclosed = files
        .iter()
        .find(|f| f["path"] == "fixtures/malformed/unclosed-list.net")
        .expect("malformed file reported");
    assert_eq!(unclosed["error"]["check"], "unclosed-list");
    assert!(unclosed["error"]["line"].as_u64().is_some_and(|l| l >= 1));
    assert_eq!(doc["totals"]["not_checked"], 2);
    assert_eq!(doc["totals"]["files"], files.len());
}

#[test]
fn json_byte_offsets_point_at_the_spans() {
    let files = hand_built();
    let doc: Value = serde_json::from_str(&render(Format::Json, &files)).expect("JSON");
    let findings = doc["files"][0]["findings"].as_array().expect("findings");
    assert_eq!(findings.len(), 3);
    for (d, j) in files[0].diags.iter().zip(findings) {
        let off = j["byte_offset"].as_u64().expect("offset") as usize;
        let len = j["byte_length"].as_u64().expect("length") as usize;
        let span = d.primary_span().expect("a span");
        assert_eq!(&BOARD[off..off + len], &BOARD[span.range()]);
        assert_eq!(j["check"], d.code());
        assert_eq!(j["message"], &*d.message());
    }
    // `(node (ref "U1") (pin "3"))`: the 15th line, from column 7 to just after the `)`
    let line15 = BOARD.lines().nth(14).expect("15 lines");
    let col = line15.find("(node (ref \"U1\")").expect("the node") + 1;
    assert_eq!(col, 7);
    assert_eq!(
        (findings[0]["line"].as_u64(), findings[0]["column"].as_u64()),
        (Some(15), Some(7))
    );
    assert_eq!(
        findings[0]["end_column"].as_u64(),
        Some((col + r#"(node (ref "U1") (pin "3"))"#.len()) as u64)
    );
    assert_eq!(findings[1]["related"][0]["message"], "LED");
    assert_eq!(findings[1]["pins"], serde_json::json!(["U2.3", "D1.1"]));
    assert_eq!(findings[0]["net"], "unconnected-(U1-Pad3)");
    let t = &doc["totals"];
    assert_eq!(
        (
            t["errors"].as_u64(),
            t["warnings"].as_u64(),
            t["infos"].as_u64()
        ),
        (Some(1), Some(1), Some(1))
    );
    assert_eq!(
        (t["classified"].as_u64(), t["ic_like"].as_u64()),
        (Some(5), Some(6))
    );
}

#[test]
fn sarif_results_point_at_their_rules_and_relative_uris() {
    let files = hand_built();
    let log: Value = serde_json::from_str(&render(Format::Sarif, &files)).expect("SARIF is JSON");
    assert_eq!(log["version"], "2.1.0");
    let run = &log["runs"][0];
    assert_eq!(run["columnKind"], "unicodeCodePoints");
    assert_eq!(
        run["originalUriBaseIds"]["%SRCROOT%"]["uri"],
        "file:///project/"
    );
    let rules = run["tool"]["driver"]["rules"].as_array().expect("rules");
    assert_eq!(
        rules.len(),
        netmargin::checks::REGISTRY.len() + netmargin::diag::INPUT_CODES.len()
    );
    let results = run["results"].as_array().expect("results");
    assert_eq!(results.len(), 4);
    for r in results {
        let i = r["ruleIndex"]
            .as_u64()
            .expect("every code used here has a rule") as usize;
        assert_eq!(rules[i]["id"], r["ruleId"]);
        assert!(r["partialFingerprints"]["netmarginFinding/v1"]
            .as_str()
            .is_some_and(|f| f.len() == 16));
    }
    let loc = &results[0]["locations"][0]["physicalLocation"];
    // a space is percent-encoded; the path is relative to the root
    assert_eq!(loc["artifactLocation"]["uri"], "boards/timer%20board.net");
    assert_eq!(loc["artifactLocation"]["uriBaseId"], "%SRCROOT%");
    assert_eq!(loc["region"]["startLine"], 15);
    assert_eq!(loc["region"]["startColumn"], 7);
    assert_eq!(loc["region"]["endColumn"], 34);
    assert_eq!(loc["region"]["byteLength"], 27);
    assert_eq!(results[1]["level"], "warning");
    assert_eq!(results[2]["level"], "note");
    assert_eq!(results[1]["relatedLocations"][0]["message"]["text"], "LED");
    assert_eq!(
        results[1]["relatedLocations"][0]["physicalLocation"]["region"]["startLine"],
        13
    );
    let floating = rules
        .iter()
        .find(|r| r["id"] == "floating-cmos-input")
        .expect("a rule");
    assert_eq!(floating["defaultConfiguration"]["level"], "error");
    assert_eq!(floating["name"], "FloatingCmosInput");
    assert_eq!(results[3]["ruleId"], "unreadable");
    assert!(results[3]["locations"][0]["physicalLocation"]
        .get("region")
        .is_none());
    assert_eq!(run["invocations"][0]["executionSuccessful"], false);
}

#[test]
fn sarif_paths_outside_the_root_and_from_stdin() {
    let mut opts = ReportOptions::new(Format::Sarif, "/project/sub");
    opts.cwd = "/project".into();
    let mut files = hand_built();
    files[1].name = "../elsewhere/b#1.net".into();
    files[2].name = "<stdin>".into();
    let log: Value = serde_json::from_str(&render_with(&opts, &files)).expect("SARIF is JSON");
    let run = &log["runs"][0];
    assert_eq!(
        run["originalUriBaseIds"]["%SRCROOT%"]["uri"],
        "file:///project/sub/"
    );
    let results = run["results"].as_array().expect("results");
    // `boards/...` from /project is outside /project/sub: an absolute file URI
    let art = &results[0]["locations"][0]["physicalLocation"]["artifactLocation"];
    assert_eq!(art["uri"], "file:///project/boards/timer%20board.net");
    assert!(art.get("uriBaseId").is_none());
    let art = &results[3]["locations"][0]["physicalLocation"]["artifactLocation"];
    assert!(art.get("uri").is_none());
    assert_eq!(art["description"]["text"], "standard input");
}

// ---------------------------------------------------------------------------
// fingerprints

fn fingerprints_of(name: &str, text: &str) -> Vec<(String, String)> {
    let src = SourceFile::new(name, text);
    let (diags, summary) = pipeline::model_text(&src).expect("the netlist models");
    let f = FileOutcome {
        name: name.into(),
        source: Some(src),
        fatal: None,
        diags: diags.into(),
        summary,
        coverage: None,
        waived: 0,
    };
    let fps = report::fingerprints(&f);
    f.diags
        .iter()
        .map(|d| d.code().to_string())
        .zip(fps)
        .collect()
}

#[test]
fn fingerprints_survive_lines_inserted_above() {
    for file in [
        "pin-on-two-nets-k5.net",
        "duplicate-ref-k5.net",
        "unknown-ref-k8.net",
        "missing-libpart-k8.net",
    ] {
        let text =
            std::fs::read_to_string(format!("fixtures/model-errors/{file}")).expect("fixture");
        let before = fingerprints_of(file, &text);
        assert!(!before.is_empty(), "{file} gives findings");
        // a component and blank lines added at the top of the components
        let at = text.find("(components").expect("a components list") + "(components".len();
        let moved = format!(
            "{}\n\n    (comp (ref R77) (value 4k7))\n\n{}",
            &text[..at],
            &text[at..]
        );
        let after = fingerprints_of(file, &moved);
        assert_eq!(before, after, "{file}");
        // and the lines did move
        let src_a = SourceFile::new("a", text.as_str());
        let src_b = SourceFile::new("b", moved.as_str());
        let (da, _) = pipeline::model_text(&src_a).expect("models");
        let (db, _) = pipeline::model_text(&src_b).expect("models");
        let la = src_a
            .line_col(da[0].primary_span().expect("span").start as usize)
            .line;
        let lb = src_b
            .line_col(db[0].primary_span().expect("span").start as usize)
            .line;
        assert_eq!(lb, la + 4, "{file}");
    }
}

#[test]
fn fingerprints_follow_check_net_and_pins_not_places() {
    let text = BOARD;
    let base = board_diags(text);
    let fp = |d: Diag| {
        let f = outcome("x.net", text, vec![d], None);
        report::fingerprints(&f).remove(0)
    };
    let a = fp(base[0].clone());
    // the same finding at another place keeps it
    let mut moved = base[0].clone();
    moved.labels[0].span = span_of(text, r#"(node (ref "R1") (pin "2"))"#);
    moved.message = "a different wording, 5 V".into();
    assert_eq!(fp(moved), a);
    // a different pin, net or check changes it
    let mut other_pin = base[0].clone();
    other_pin.set_pins(["U1.5"]);
    assert_ne!(fp(other_pin), a);
    let mut other_net = base[0].clone();
    other_net.net = Some("/RESET_N".into());
    assert_ne!(fp(other_net), a);
    let mut other_check = base[0].clone();
    other_check.code = "floating-ttl-input".into();
    assert_ne!(fp(other_check), a);
    // two findings with the same key in one file are told apart
    let f = outcome("x.net", text, vec![base[0].clone(), base[0].clone()], None);
    let two = report::fingerprints(&f);
    assert_ne!(two[0], two[1]);
    assert_eq!(two[0], a);
}

// ---------------------------------------------------------------------------
// annotations and the short format

#[test]
fn annotation_escaping_table() {
    // the workflow-command escaping of the CI platform's runner and toolkit (from memory):
    // data: `%` `\r` `\n`; properties: also `:` and `,`
    let table: &[(&str, &str, &str)] = &[
        ("plain text", "plain text", "plain text"),
        ("100%", "100%25", "100%25"),
        ("a\r\nb", "a%0D%0Ab", "a%0D%0Ab"),
        ("::error::x", "::error::x", "%3A%3Aerror%3A%3Ax"),
        ("a,b=c", "a,b=c", "a%2Cb=c"),
        ("%0A", "%250A", "%250A"),
        ("C:\\dir\\f.net", "C:\\dir\\f.net", "C%3A\\dir\\f.net"),
        ("µΩ 4k7", "µΩ 4k7", "µΩ 4k7"),
        ("esc\x1b[2J", "esc\\u{1b}[2J", "esc\\u{1b}[2J"),
        ("\u{202e}rtl", "\\u{202e}rtl", "\\u{202e}rtl"),
    ];
    for &(input, data, property) in table {
        assert_eq!(github::escape_data(input), data, "data {input:?}");
        assert_eq!(
            github::escape_property(input),
            property,
            "property {input:?}"
        );
    }
}

#[test]
fn annotation_lines_carry_the_place_and_the_help() {
    let out = render(Format::Github, &hand_built());
    let lines: Vec<&str> = out.lines().collect();
    assert_eq!(lines.len(), 4);
    assert!(lines[0].starts_with("::error file=boards/timer board.net,line=15,col=7,endLine=15,endColumn=34,title=netmargin floating-cmos-input::U1 pin 3"), "{}", lines[0]);
    assert!(
        lines[0].ends_with("%0Ahelp: tie the input to GND or VCC, or drive it"),
        "{}",
        lines[0]
    );
    assert!(lines[1].starts_with("::warning "));
    assert!(lines[2].starts_with("::notice "));
    assert!(
        lines[3]
            .starts_with("::error file=boards/gone.net,title=netmargin unreadable::cannot read"),
        "{}",
        lines[3]
    );
}

#[test]
fn short_format_is_one_line_per_finding_and_quiet_when_clean() {
    let out = render(Format::Short, &hand_built());
    let lines: Vec<&str> = out.lines().collect();
    assert_eq!(
        lines,
        [
            "boards/timer board.net:15:7: error: U1 pin 3 (74HC14 input) is on a net with no driver, no rail and no pull resistor [floating-cmos-input]",
            "boards/timer board.net:12:7: warning: U2 pin 3 (74LS00 output) sources an LED to ground in its high state: 0.4 mA guaranteed [weak-high-drive]",
            "boards/timer board.net:6:22: info: `LED` matches no mapping [unclassified-part]",
            "boards/gone.net: error: cannot read `boards/gone.net`: no such file [unreadable]",
        ]
    );
    // clean files: nothing at all, not even a line end
    let clean: Vec<FileOutcome> = [
        "fixtures/boards/clean-k5.net",
        "fixtures/boards/clean-k8.net",
    ]
    .iter()
    .map(|p| pipeline::read_file(p, &ReadOptions::default()))
    .collect();
    assert!(clean
        .iter()
        .all(|f| f.fatal.is_none() && f.summary.parts > 0));
    assert_eq!(render(Format::Short, &clean), "");
    assert_eq!(render(Format::Short, &hand_built()[1..2]), "");
    assert_eq!(render(Format::Github, &clean), "");
}

#[test]
fn human_summary_line_and_quiet() {
    let out = render(Format::Human, &hand_built());
    let last = out.lines().last().expect("a summary line");
    assert_eq!(last, "3 files (1 not checked), 8 parts, 6 nets: 1 error, 1 warning, 1 info; 5 of 6 IC-like parts classified");
    let mut opts = ReportOptions::new(Format::Human, ROOT);
    opts.quiet = true;
    let quiet = render_with(&opts, &hand_built());
    assert!(
        !quiet.contains("IC-like")
            && !quiet.contains("not checked")
            && !quiet.contains("pins on no net")
    );
    assert!(quiet.contains("floating-cmos-input"));
    assert!(render_with(&opts, &hand_built()[1..2]).is_empty());
}

// ---------------------------------------------------------------------------
// a hostile netlist through every format

/// Refs, values and net names holding terminal escapes (CSI, OSC with BEL, a C1 CSI),
/// CR/LF written as `\r` `\n` escapes inside quoted strings, annotation syntax, `%0A`, `,`,
/// `:` and bidi overrides.
const HOSTILE: &str = concat!(
    "(export (version \"Z\u{1b}[5m\u{202e}\")\n",
    "  (components\n",
    "    (comp (ref \"U1\u{1b}]0;owned\u{7}\") (value \"74HC00\\n::error::fake\"))\n",
    "    (comp (ref \"U1\u{1b}]0;owned\u{7}\") (value \"74HC04\"))\n",
    "    (comp (ref \"R1\u{9b}2J\") (value \"10k\")))\n",
    "  (nets\n",
    "    (net (code \"1\") (name \"/A\\r\\n::error file=x,line=1::injected%0A,:\u{2066}\")\n",
    "      (node (ref \"R1\u{9b}2J\") (pin \"1\"))\n",
    "      (node (ref \"X9\u{202e}\u{1b}[2J\") (pin \"1\")))\n",
    "    (net (code \"2\") (name \"/B\u{1b}[2J\")\n",
    "      (node (ref \"R1\u{9b}2J\") (pin \"1\")))))\n",
);

fn hostile_outcome() -> FileOutcome {
    let name = "evil\u{1b}[31m\n::error::x\u{202e}.net";
    let src = SourceFile::new(name, HOSTILE);
    let (mut diags, summary) = pipeline::model_text(&src).expect("the hostile netlist models");
    // a finding that carries hostile text in every field
    diags.push(
        Diag::error(
            "floating-cmos-input",
            "net `/A\r\n::warning::x` floats \u{1b}[2J",
        )
        .at(Span::new(0, 7), "label\n::error::y\u{202d}")
        .also(Span::new(8, 9), "second\r\u{1b}]8;;x\u{7}")
        .with_help("help\n::notice::z %0A")
        .on_net("/A\r\n::error::n")
        .with_pins(["U1\u{1b}[0m.1", "R1,2:3"]),
    );
    FileOutcome {
        name: name.into(),
        source: Some(src),
        fatal: None,
        diags: diags.into(),
        summary,
        coverage: Some((1, 2)),
        waived: 0,
    }
}

fn is_steering(c: char) -> bool {
    (c.is_control() && c != '\n' && c != '\t')
        || matches!(c, '\u{200e}' | '\u{200f}' | '\u{202a}'..='\u{202e}' | '\u{2066}'..='\u{2069}' | '\u{2028}' | '\u{2029}')
}

#[test]
fn hostile_text_escapes_no_format() {
    let f = hostile_outcome();
    let codes: Vec<&str> = f.diags.iter().map(|d| d.code()).collect();
    // the netlist must actually carry its text into the findings
    for code in [
        "duplicate-ref",
        "unknown-component",
        "pin-on-two-nets",
        "netlist-version",
    ] {
        assert!(codes.contains(&code), "{code} not found in {codes:?}");
    }
    assert!(
        f.diags.iter().any(|d| d.message().contains('\u{1b}')),
        "a message holds an ESC"
    );
    assert!(
        f.diags.iter().any(|d| d.message().contains("\r\n::error")),
        "a net name holds CR LF"
    );
    let files = [f];
    let n = files[0].diags.len();

    for format in [
        Format::Human,
        Format::Short,
        Format::Github,
        Format::Json,
        Format::Sarif,
    ] {
        let out = render(format, &files);
        let bad: Vec<char> = out.chars().filter(|&c| is_steering(c)).collect();
        assert!(bad.is_empty(), "{format:?} lets through {bad:?}:\n{out}");
    }

    // short: exactly one line per finding, each starting with the sanitized path
    let short = render(Format::Short, &files);
    assert_eq!(short.lines().count(), n);
    assert!(
        short
            .lines()
            .all(|l| l.starts_with("evil\\u{1b}[31m\\u{a}::error::x\\u{202e}.net:")),
        "{short}"
    );

    // annotations: one command per finding, each line a single well-formed command whose
    // properties are only the known keys
    let gh = render(Format::Github, &files);
    assert_eq!(gh.lines().count(), n);
    for l in gh.lines() {
        let (cmd, rest) = l.split_once(' ').expect("a command and properties");
        assert!(["::error", "::warning", "::notice"].contains(&cmd), "{l}");
        let (props, _message) = rest.split_once("::").expect("properties end at `::`");
        for p in props.split(',') {
            let (k, _) = p.split_once('=').expect("key=value");
            assert!(
                ["file", "line", "col", "endLine", "endColumn", "title"].contains(&k),
                "property {k} in {l}"
            );
        }
    }

    // human, with colour: the only escape sequences are miette's own colours (SGR)
    let mut opts = ReportOptions::new(Format::Human, ROOT);
    opts.color = true;
    let coloured = render_with(&opts, &files);
    let mut rest = coloured.as_str();
    while let Some(at) = rest.find('\u{1b}') {
        let seq = &rest[at + 1..];
        let end = seq.find('m').expect("an SGR sequence ends in m");
        assert!(
            seq.starts_with('[') && seq[1..end].chars().all(|c| c.is_ascii_digit() || c == ';'),
            "non-SGR escape {:?}",
            &seq[..end.min(12)]
        );
        rest = &seq[end..];
    }
    assert!(
        !coloured.contains('\u{7}') && !coloured.contains('\u{9b}') && !coloured.contains('\r')
    );

    // JSON and SARIF: the text is kept exactly, only escaped
    let doc: Value = serde_json::from_str(&render(Format::Json, &files)).expect("JSON");
    let findings = doc["files"][0]["findings"].as_array().expect("findings");
    assert_eq!(findings.len(), n);
    for (d, j) in files[0].diags.iter().zip(findings) {
        assert_eq!(j["message"], &*d.message());
    }
    assert_eq!(doc["files"][0]["path"], files[0].name.as_str());
    let last = &findings[n - 1];
    assert_eq!(last["net"], "/A\r\n::error::n");
    assert_eq!(last["pins"][1], "R1,2:3");
    assert_eq!(last["help"], "help\n::notice::z %0A");
    let log: Value = serde_json::from_str(&render(Format::Sarif, &files)).expect("SARIF");
    let results = log["runs"][0]["results"].as_array().expect("results");
    assert_eq!(results.len(), n);
    for (d, r) in files[0].diags.iter().zip(results) {
        assert_eq!(r["message"]["text"], &*d.message());
    }
    assert_eq!(
        results[n - 1]["relatedLocations"][0]["message"]["text"],
        "second\r\u{1b}]8;;x\u{7}"
    );
}

#[test]
fn severity_counts_in_the_run_summary() {
    let t = report::Totals::of(&hand_built());
    assert_eq!(
        (t.files, t.not_checked, t.errors, t.warnings, t.infos),
        (3, 1, 1, 1, 1)
    );
    assert_eq!(t.coverage, Some((5, 6)));
    let sev: Vec<Severity> = hand_built()[0].diags.iter().map(|d| d.severity()).collect();
    assert_eq!(sev, [Severity::Error, Severity::Warning, Severity::Info]);
}

#[test]
fn snapshot_hostile_short_and_github() {
    let files = [hostile_outcome()];
    let both = format!(
        "{}\n{}",
        render(Format::Short, &files),
        render(Format::Github, &files)
    );
    insta::assert_snapshot!(both);
}
