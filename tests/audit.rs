//! `netmargin audit`: snapshots of the Markdown report (the demo board and a companion
//! board), the structure and the numbers of the HTML report, the escaping of a hostile
//! netlist, and the command's handling of bad arguments.
//!
//! The numbers checked come from published data, not from the tool:
//! - 74LS: IOL 8 mA at VOL 0.5 V, IOH -0.4 mA at VOH 2.7 V, IIL -0.4 mA, IIH 20 uA,
//!   VIH 2.0 V, VIL 0.8 V (TI SN74LS00 data sheet, SDLS025B). 25 inputs on one output, two
//!   of them 74LS74 clears at IIL -0.8 mA and IIH 40 uA (Fairchild DM74LS74A):
//!   23 x 0.4 + 2 x 0.8 = 10.80 mA against 8.00 mA; 23 x 20 + 2 x 40 uA = 0.54 mA against
//!   0.40 mA.
//!   Fan-out of 74LS into 74LS: 8 mA / 0.4 mA = 20 and 0.4 mA / 20 uA = 20 (the textbook
//!   figure of 20 unit loads).
//! - 74HC at 5.0 V: VIH 3.5 V (0.7 VCC; JEDEC JESD7A gives 3.15 V at 4.5 V and 3.85 V at
//!   5.5 V, whose line passes 3.50 V at 5.0 V). A 74LS high (2.70 V) into it is short by
//!   0.80 V; into a 74HCT input (VIH 2.0 V, JESD7A) it passes by 0.70 V.
//! - 74LS05 pull-up window at 5 V: R_min = (5.00 - 0.5) / (8 mA - 0.4 mA) = 592 Ohm (the
//!   worked calculation of the demo's README from the SN74LS05 figures).

use std::path::PathBuf;
use std::process::Command;

use netmargin::audit::{self, AuditOptions};
use netmargin::classify::classifier::Rules;
use netmargin::source::SourceFile;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn run(args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(args)
        .current_dir(root())
        .output()
        .expect("the binary runs");
    let stderr = String::from_utf8_lossy(&out.stderr).into_owned();
    assert!(
        !stderr.contains("panicked"),
        "the binary panicked on {args:?}:\n{stderr}"
    );
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        stderr,
    )
}

fn temp_dir(tag: &str) -> PathBuf {
    static N: std::sync::atomic::AtomicUsize = std::sync::atomic::AtomicUsize::new(0);
    let n = N.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
    let d = std::env::temp_dir().join(format!("netmargin-audit-{tag}-{}-{n}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).expect("temp dir");
    d
}

fn html_of(file: &str, extra: &[&str]) -> String {
    let dir = temp_dir(&file.replace(['/', '.'], "_"));
    let out = dir.join("report.html");
    let mut args = vec!["audit", file, "-o", out.to_str().expect("utf-8 path")];
    args.extend_from_slice(extra);
    let (code, stdout, stderr) = run(&args);
    assert_eq!(code, 0, "{stderr}");
    assert!(stdout.is_empty(), "with -o nothing goes to stdout");
    let html = std::fs::read_to_string(&out).expect("the report was written");
    // written atomically: no temporary file is left beside it
    let left: Vec<_> = std::fs::read_dir(&dir)
        .expect("dir")
        .flatten()
        .map(|e| e.file_name())
        .collect();
    assert_eq!(left.len(), 1, "only the report is left: {left:?}");
    let _ = std::fs::remove_dir_all(&dir);
    html
}

/// The text of the section with this id.
fn section<'a>(html: &'a str, id: &str) -> &'a str {
    let start = html
        .find(&format!("<section id=\"{id}\">"))
        .unwrap_or_else(|| panic!("no section {id}"));
    let end = html[start..].find("</section>").expect("closed") + start;
    &html[start..end]
}

#[test]
fn markdown_report_of_the_demo_board() {
    let (code, md, stderr) = run(&[
        "audit",
        "--format",
        "markdown",
        "fixtures/demo/counter-timer.net",
    ]);
    assert_eq!(code, 0, "{stderr}");
    insta::assert_snapshot!("audit_demo_markdown", md);
}

#[test]
fn markdown_report_of_the_lamp_sequencer() {
    let (code, md, stderr) = run(&[
        "audit",
        "--format",
        "markdown",
        "--net",
        "/STEP_N",
        "fixtures/boards/hobby-k8.net",
    ]);
    assert_eq!(code, 0, "{stderr}");
    // the 3.3 V 74LVC04 into the 5 V 74HC00: VOH 3.10 V (VCC - 0.2 V at -100 uA, TI
    // SN74LVC04A) against VIH 3.50 V: short by 0.40 V; into the 74HCT00: +1.10 V
    assert!(md.contains("| 74HC | U2.1 |"), "{md}");
    assert!(md.contains("short 0.40 V"), "{md}");
    assert!(md.contains("+1.10 V"), "{md}");
    insta::assert_snapshot!("audit_hobby_markdown", md);
}

#[test]
fn markdown_to_a_file_matches_stdout() {
    let dir = temp_dir("md");
    let p = dir.join("a.md");
    let (code, _, _) = run(&[
        "audit",
        "--format",
        "markdown",
        "fixtures/boards/clean-k8.net",
        "-o",
        p.to_str().expect("utf-8"),
    ]);
    assert_eq!(code, 0);
    let (_, stdout, _) = run(&[
        "audit",
        "--format",
        "markdown",
        "fixtures/boards/clean-k8.net",
    ]);
    assert_eq!(std::fs::read_to_string(&p).expect("written"), stdout);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn html_report_has_every_section_and_is_self_contained() {
    let html = html_of("fixtures/demo/counter-timer.net", &[]);
    assert!(html.starts_with("<!DOCTYPE html>"));
    for (id, heading) in [
        ("summary", "Summary"),
        ("findings", "Findings"),
        ("charts", "Level charts"),
        ("matrix", "Family compatibility"),
        ("recapture", "Recapture review"),
        ("sources", "Data sources"),
    ] {
        assert!(
            section(&html, id).contains(&format!("<h2>{heading}</h2>")),
            "{id}"
        );
    }
    // nothing fetched, nothing run (the SVG namespace is a name, not a fetch)
    let html = html.replace("xmlns=\"http://www.w3.org/2000/svg\"", "");
    for bad in [
        "<script", "<link", "src=", "url(", "@import", "http://", "https://",
    ] {
        assert!(!html.contains(bad), "the report must not hold `{bad}`");
    }
    assert!(html.contains("@media print"));
    // the netlist header
    let summary = section(&html, "summary");
    assert!(summary.contains("Model 714 counter-timer, logic board A2"));
    assert!(summary.contains("Eeschema 5.1.0-1"));
    // the rails of the demo's README: +5V, GND, +12V, -12V
    for rail in [
        "<td>+5V</td><td>5.00 V</td>",
        "<td>GND</td><td>ground (0.00 V)</td>",
        "<td>+12V</td><td>12.00 V</td>",
        "<td>-12V</td><td>-12.00 V</td>",
    ] {
        assert!(summary.contains(rail), "{rail}");
    }
    // one unclassified IC (U22 `74LSOO`) among 24
    assert!(summary.contains("25 of 26 IC-like parts classified"));
}

#[test]
fn html_report_carries_the_fanout_and_level_numbers() {
    let html = html_of("fixtures/demo/counter-timer.net", &[]);
    let charts = section(&html, "charts");
    // /CNT_RESET: 25 74LS inputs (27 unit loads) on one 74LS04 output
    assert!(charts.contains("net <code>/CNT_RESET</code>"));
    assert!(charts.contains("<td>U10.2</td><td>low</td><td class=\"num\">10.80 mA</td><td class=\"num\">8.00 mA</td><td class=\"num\">135 % OVER</td>"), "{charts}");
    assert!(charts.contains("<td>U10.2</td><td>high</td><td class=\"num\">0.54 mA</td><td class=\"num\">0.40 mA</td><td class=\"num\">135 % OVER</td>"));
    assert!(
        charts.contains("10.80 mA of 8.00 mA (135%) OVER"),
        "the fan-out bar is labelled"
    );
    assert!(charts.contains("derating 80%"));
    // /ARM_N: a 74LS04 high (2.70 V) into a 74HC00 input (3.50 V)
    assert!(charts.contains("net <code>/ARM_N</code>"));
    assert!(charts.contains("VOH min 2.70 V"));
    assert!(charts.contains("VIH min 3.50 V"));
    assert!(
        charts.contains("high short 0.80 V SHORT"),
        "the chart marks the shortfall"
    );
    assert!(charts.contains("<td>74HC</td><td>U20.1</td>"));
    assert!(charts.contains("short 0.80 V</td></tr>"));
    // one level chart per charted driver, each with a fan-out bar
    assert_eq!(
        charts.matches("class=\"level-chart\"").count(),
        charts.matches("<figure>").count()
    );
    assert!(charts.matches("class=\"level-chart\"").count() >= 2);

    // the matrix: 74LS into 74HC fails by 0.80 V, 74LS into 74LS passes with fan-out 20 / 20
    let m = section(&html, "matrix");
    let row = &m[m.find("<tr><th>74LS at 5.00 V</th>").expect("a 74LS row")..];
    let row = &row[..row.find("</tr>").expect("row end")];
    let cells: Vec<&str> = row.split("<td").skip(1).collect();
    let header = &m[m.find("driver \\ load").expect("header")..];
    let header = &header[..header.find("</tr>").expect("end")];
    let cols: Vec<&str> = header
        .split("<th>")
        .skip(1)
        .map(|c| c.trim_end_matches("</th>"))
        .collect();
    let col = |name: &str| {
        cols.iter()
            .position(|c| *c == name)
            .unwrap_or_else(|| panic!("no column {name} in {cols:?}"))
    };
    let hc = cells[col("74HC at 5.00 V")];
    assert!(
        hc.contains("cell-fail") && hc.contains("FAIL") && hc.contains("high short 0.80 V"),
        "{hc}"
    );
    let ls = cells[col("74LS at 5.00 V")];
    assert!(
        ls.contains("cell-pass") && ls.contains("PASS") && ls.contains("fan-out 20 L / 20 H"),
        "{ls}"
    );
    assert!(
        ls.contains("high +0.70 V") && ls.contains("low +0.30 V"),
        "2.7 - 2.0 and 0.8 - 0.5: {ls}"
    );
    // a 4000B output at 12 V into a 74LS input: far above its 7 V absolute maximum (TI SDLS025B)
    let row = &m[m
        .find("<tr><th>4000B at 12.00 V</th>")
        .expect("a 4000B row")..];
    let row = &row[..row.find("</tr>").expect("row end")];
    let cells: Vec<&str> = row.split("<td").skip(1).collect();
    assert!(
        cells[col("74LS at 5.00 V")].contains("above the input&#39;s limit 7.00 V"),
        "{}",
        cells[col("74LS at 5.00 V")]
    );
}

#[test]
fn html_report_reviews_the_recapture() {
    let html = html_of("fixtures/demo/counter-timer.net", &[]);
    let r = section(&html, "recapture");
    // the OCR slip of the demo's README (#10)
    assert!(
        r.contains("<td>U22</td><td><code>74LSOO</code></td>"),
        "{r}"
    );
    assert!(r.contains("<code>74LS00</code>"));
    // the wrong symbol (#11), the 16-pin footprint (#14), the unpowered parts (#9, #12)
    assert!(
        r.contains("U18 (74LS02): the symbol disagrees with the 74LS02 pinout at 12 pins: pins 1, 4, 10 and 13 are typed input"),
        "{r}"
    );
    assert!(
        r.contains(
            "<td>U14</td><td>U14 (74LS04) is a 14-pin part (hex inverter) on the 16-pin footprint"
        ),
        "{r}"
    );
    assert!(
        r.contains("U12 pin 14 (74LS74 supply pin VCC) is on the ground rail GND"),
        "{r}"
    );
    assert!(
        r.contains("U19 (74LS00) has no power: pins 7 (GND) and 14 (VCC) are on no net"),
        "{r}"
    );
    // U20's unit D was never placed: pins 11, 12, 13 on no net; pin 10 alone (#1)
    assert!(
        r.contains(
            "<tr><td>U20</td><td><code>74HC00</code></td><td>11, 12, 13</td><td>10</td></tr>"
        ),
        "{r}"
    );
    let s = section(&html, "sources");
    assert!(s.contains("shipped rules/families.toml"));
    assert!(s.contains("TI SDLS025B (SN74LS00)"));
}

#[test]
fn findings_are_grouped_by_net_and_by_part_with_the_netlist_line() {
    let html = html_of("fixtures/demo/counter-timer.net", &[]);
    let f = section(&html, "findings");
    assert!(f.contains("<h4>net <code>/ALARM_N</code></h4>"));
    assert!(f.contains("R_min = (5.00 V - 0.50 V) / (8.00 mA - 0.40 mA) = 592 Ohm"));
    assert!(f.contains("<b>fix:</b> fit a pull-up between 592 Ohm and 25 kOhm to +5V"));
    assert!(
        f.contains("<code class=\"line\">(node (ref U16) (pin 4))</code>")
            || f.contains("<code class=\"line\">(node (ref U20) (pin 1)))</code>")
    );
    let by_part = &f[f.find("<table id=\"by-part\">").expect("by part")..];
    let u15 = &by_part[by_part.find("<tr><td>U15</td>").expect("U15 has findings")..];
    let u15 = &u15[..u15.find("</tr>").expect("end")];
    assert_eq!(u15.matches("missing-pull-up").count(), 2, "{u15}");
    assert!(u15.contains("pull-up-out-of-range"));
}

#[test]
fn a_requested_net_is_charted_and_an_unknown_one_is_an_error() {
    let html = html_of("fixtures/demo/counter-timer.net", &["--net", "READY_N"]);
    let charts = section(&html, "charts");
    assert!(charts.contains("net <code>/READY_N</code>"));
    // R1 1k pull-up, one 74LS load: 4.5 mA + 0.4 mA = 4.90 mA of 8 mA (61 %), demo README #5b
    assert!(charts.contains("<td>U15.4</td><td>low</td><td class=\"num\">4.90 mA</td><td class=\"num\">8.00 mA</td><td class=\"num\">61 % ok</td>"), "{charts}");
    let (code, _, stderr) = run(&[
        "audit",
        "fixtures/demo/counter-timer.net",
        "--net",
        "/NO_SUCH",
        "--format",
        "markdown",
    ]);
    assert_eq!(code, 2);
    assert!(stderr.contains("no net `/NO_SUCH`"), "{stderr}");
}

#[test]
fn bad_input_and_bad_output_paths_fail_cleanly() {
    let (code, _, stderr) = run(&[
        "audit",
        "fixtures/malformed/unclosed-list.net",
        "--format",
        "markdown",
    ]);
    assert_eq!(code, 2);
    assert!(stderr.contains("unclosed-list"), "{stderr}");
    let (code, _, stderr) = run(&[
        "audit",
        "fixtures/demo/counter-timer.net",
        "-o",
        "/nonexistent-dir/x/report.html",
    ]);
    assert_eq!(code, 2);
    assert!(
        stderr.contains("cannot write `/nonexistent-dir/x/report.html`"),
        "{stderr}"
    );
}

#[test]
fn chart_out_writes_the_svg_files() {
    let dir = temp_dir("charts");
    let (code, _, stderr) = run(&[
        "audit",
        "fixtures/demo/counter-timer.net",
        "--format",
        "markdown",
        "-o",
        dir.join("r.md").to_str().expect("utf-8"),
        "--chart-out",
        dir.to_str().expect("utf-8"),
    ]);
    assert_eq!(code, 0, "{stderr}");
    let svg =
        std::fs::read_to_string(dir.join("ARM_N--U16_4-levels.svg")).expect("the /ARM_N chart");
    assert!(svg.starts_with("<svg") && svg.contains("high short 0.80 V SHORT"));
    assert!(dir.join("CNT_RESET--U10_2-fanout.svg").is_file());
    let _ = std::fs::remove_dir_all(&dir);
}

/// Header, values, references and net names that try to open markup in every place the
/// report shows them: a chart title, a table cell, the recapture tables.
const HOSTILE: &str = concat!(
    "(export (version \"E\")\n",
    "  (design (source \"x.kicad_sch\") (tool \"Eeschema 8\")\n",
    "    (sheet (number \"1\") (name \"/\") (tstamps \"/\")\n",
    "      (title_block (title \"<script>alert(1)</script>\") (company \"A&B\"))))\n",
    "  (components\n",
    "    (comp (ref \"U1\") (value \"74HC00\"))\n",
    "    (comp (ref \"U3\") (value \"74LS04\"))\n",
    "    (comp (ref \"U2\\\"><img src=x onerror=alert(1)>\") (value \"74HC<script>alert(4)</script>\")))\n",
    "  (nets\n",
    "    (net (code \"1\") (name \"/<svg onload=alert(3)>\")\n",
    "      (node (ref \"U3\") (pin \"2\"))\n",
    "      (node (ref \"U1\") (pin \"1\")))\n",
    "    (net (code \"2\") (name \"+5V\")\n",
    "      (node (ref \"U1\") (pin \"14\")) (node (ref \"U3\") (pin \"14\")))\n",
    "    (net (code \"3\") (name \"GND\")\n",
    "      (node (ref \"U1\") (pin \"7\")) (node (ref \"U3\") (pin \"7\")))\n",
    "    (net (code \"4\") (name \"/</script><script>alert(2)</script>\")\n",
    "      (node (ref \"U2\\\"><img src=x onerror=alert(1)>\") (pin \"3\")))\n",
    "    (net (code \"5\") (name \"/B\")\n",
    "      (node (ref \"U1\") (pin \"2\")) (node (ref \"U3\") (pin \"1\")))))\n",
);

#[test]
fn a_hostile_netlist_cannot_inject_markup() {
    let src = SourceFile::new("hostile.net", HOSTILE);
    let a = audit::gather(&src, &Rules::builtin(), &AuditOptions::default())
        .expect("the hostile netlist reads");
    // it did reach every place: a chart, the recapture review, the header
    assert!(
        a.interfaces
            .iter()
            .any(|i| i.net == "/<svg onload=alert(3)>"),
        "{:?}",
        a.interfaces.iter().map(|i| &i.net).collect::<Vec<_>>()
    );
    assert!(a
        .recapture
        .label_nets
        .iter()
        .any(|r| r.subject.contains("</script>")));
    assert!(a
        .recapture
        .unclassified
        .iter()
        .any(|u| u.value.contains("<script>")));
    let html = audit::html::render(&a);
    for bad in ["<script", "<img", "<svg onload"] {
        assert!(!html.contains(bad), "`{bad}` reached the HTML");
    }
    assert!(html.contains("&lt;script&gt;alert(1)&lt;/script&gt;"));
    assert!(html.contains("&lt;svg onload=alert(3)&gt;"));
    assert!(
        html.contains("U2&quot;&gt;&lt;img src=x onerror=alert(1)&gt;")
            || html.contains("U2\"&gt;&lt;img")
    );
    assert!(html.contains("A&amp;B"));
    let md = audit::markdown::render(&a);
    for bad in ["<script", "<img", "<svg"] {
        assert!(!md.contains(bad), "`{bad}` reached the Markdown");
    }
}
