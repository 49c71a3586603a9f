//! `check`, `net`, `parts` and `audit` read one analysis: the same file with the same project
//! configuration (a `netmargin.toml` that declares a rail and lists a project parts file)
//! must show the same circuit in all four, and the command line must win over the file in
//! all four alike.

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
            "netmargin-consistency-{tag}-{}-{nanos}",
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

fn run(dir: &Path, args: &[&str]) -> (i32, String, String) {
    let o = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(args)
        .current_dir(dir)
        .env("NO_COLOR", "1")
        .output()
        .expect("the binary runs");
    (
        o.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

/// The demo board in a project whose netmargin.toml says +12V is 5 V (the board's CD4011B is
/// then at 5 V) and whose parts file reads the recapture's `74LSOO` as a 74LS00.
fn project() -> Scratch {
    let s = Scratch::new("project");
    std::fs::copy(
        root().join("fixtures/demo/counter-timer.net"),
        s.0.join("board.net"),
    )
    .expect("copy the demo");
    std::fs::write(
        s.0.join("netmargin.toml"),
        "[rails]\n\"+12V\" = 5.0\n\n[rules]\nparts = [\"parts.toml\"]\n",
    )
    .unwrap();
    std::fs::write(
        s.0.join("parts.toml"),
        "[[part]]\nvalues = [\"74LSOO\"]\nfamily = \"74LS\"\nseries = \"74\"\nfunction = \"00\"\nnote = \"a slip of the recapture\"\n",
    )
    .unwrap();
    s
}

/// What each command says about the +12V rail's voltage and about U22.
#[derive(Debug, PartialEq)]
struct Seen {
    rail: String,
    u22_classified: bool,
    u23_fanout_at: Option<String>,
}

fn seen(dir: &Path, extra: &[&str]) -> [Seen; 4] {
    let with = |base: &[&str]| -> Vec<String> {
        base.iter()
            .chain(extra)
            .map(|s| s.to_string())
            .collect::<Vec<_>>()
    };
    fn args(v: &[String]) -> Vec<&str> {
        v.iter().map(String::as_str).collect()
    }

    // check: the findings (JSON)
    let (code, out, err) = run(
        dir,
        &args(&with(&["check", "--format", "json", "board.net"])),
    );
    assert_eq!(code, 1, "{err}");
    let doc: serde_json::Value = serde_json::from_str(&out).expect("JSON");
    let diags = doc["files"][0]["findings"]
        .as_array()
        .expect("diagnostics")
        .clone();
    let msg = |d: &serde_json::Value| d["message"].as_str().unwrap_or("").to_string();
    let fanout = |m: &str| -> Option<String> {
        // "... at +12V (5.00 V): ..." or "its supply +12V (12.00 V)" -> "+12V (5.00 V)"
        let i = m.find("+12V (")?;
        let rest = &m[i..];
        Some(rest[..rest.find(')')? + 1].to_string())
    };
    let check = Seen {
        rail: diags
            .iter()
            .map(msg)
            .find_map(|m| fanout(&m))
            .map(|s| {
                s.trim_start_matches("+12V (")
                    .trim_end_matches(')')
                    .to_string()
            })
            .unwrap_or_default(),
        u22_classified: !diags
            .iter()
            .any(|d| d["check"] == "unclassified-part" && msg(d).contains("U22")),
        u23_fanout_at: diags
            .iter()
            .filter(|d| d["check"] == "fanout-overrun")
            .map(msg)
            .find(|m| m.starts_with("U23 pin 3"))
            .and_then(|m| fanout(&m)),
    };

    // net: the rail's voltage, and U23's output net
    let (code, out, err) = run(dir, &args(&with(&["net", "board.net", "+12V"])));
    assert_eq!(code, 0, "{err}");
    let rail = out
        .lines()
        .find_map(|l| l.trim().strip_prefix("a rail: "))
        .expect("the rail line")
        .to_string();
    let parts_json = {
        let (code, out, err) = run(
            dir,
            &args(&with(&["parts", "--format", "json", "board.net"])),
        );
        assert_eq!(code, 0, "{err}");
        serde_json::from_str::<serde_json::Value>(&out).expect("JSON")
    };
    let u22 = parts_json["parts"]
        .as_array()
        .expect("parts")
        .iter()
        .find(|p| p["reference"] == "U22")
        .expect("U22 listed")
        .clone();
    let net = Seen {
        rail: rail.clone(),
        u22_classified: check.u22_classified,
        u23_fanout_at: check.u23_fanout_at.clone(),
    };
    let parts = Seen {
        rail: rail.clone(),
        u22_classified: u22["family"].as_str().is_some(),
        u23_fanout_at: check.u23_fanout_at.clone(),
    };

    // audit: the supplies table, the unclassified list, the findings
    let (code, out, err) = run(
        dir,
        &args(&with(&["audit", "--format", "markdown", "board.net"])),
    );
    assert_eq!(code, 0, "{err}");
    let audit_rail = out
        .lines()
        .find(|l| l.starts_with("| +12V |"))
        .and_then(|l| l.split('|').nth(2))
        .map(|s| s.trim().to_string())
        .expect("a supplies row for +12V");
    let unclassified_section = out
        .split("### Unclassified parts")
        .nth(1)
        .map(|s| s.split("\n### ").next().unwrap_or(""))
        .unwrap_or("");
    let audit = Seen {
        rail: audit_rail,
        u22_classified: !unclassified_section.contains("| U22 |"),
        u23_fanout_at: out
            .lines()
            .find(|l| l.contains("`fanout-overrun`: U23 pin 3"))
            .and_then(|l| l.find("at +12V (").and_then(|i| fanout(&l[i..]))),
    };
    [check, net, parts, audit]
}

#[test]
fn check_net_parts_and_audit_show_one_circuit() {
    let p = project();
    let [check, net, parts, audit] = seen(&p.0, &[]);
    // the project's rail and parts file are in force in every command
    assert_eq!(check.rail, "5.00 V", "{check:?}");
    assert_eq!(net.rail, "5.00 V", "net ignores netmargin.toml: {net:?}");
    assert_eq!(audit.rail, "5.00 V", "{audit:?}");
    assert!(check.u22_classified && parts.u22_classified && audit.u22_classified);
    assert_eq!(check.u23_fanout_at.as_deref(), Some("+12V (5.00 V)"));
    assert_eq!(audit.u23_fanout_at, check.u23_fanout_at);

    // the command line wins over netmargin.toml, in every command alike
    let [check, net, _, audit] = seen(&p.0, &["--rail", "+12V=12"]);
    assert_eq!(check.rail, "12.00 V", "{check:?}");
    assert_eq!(net.rail, "12.00 V");
    assert_eq!(audit.rail, "12.00 V");
    assert_eq!(audit.u23_fanout_at, check.u23_fanout_at);

    // and --no-config leaves the project out of every command alike
    let [check, net, parts, audit] = seen(&p.0, &["--no-config"]);
    assert_eq!(net.rail, "12.00 V");
    assert_eq!(audit.rail, "12.00 V");
    assert!(!check.u22_classified && !parts.u22_classified && !audit.u22_classified);
}

/// `config --show` prints what the analysis resolved: the same rails, derating, margins and
/// checks turned off, with the command line over the file.
#[test]
fn config_show_prints_the_settings_the_analysis_uses() {
    use netmargin::analysis::{Overrides, Settings};
    let p = project();
    std::fs::write(
        p.0.join("netmargin.toml"),
        "rail_tolerance = 0.05\n[rails]\n\"+12V\" = 5.0\nVREF = 2.5\n[checks]\nderating = 0.7\nseverity = { \"package-mismatch\" = \"off\", \"floating-bus\" = \"error\" }\n",
    )
    .unwrap();
    let over = Overrides {
        rail: vec![("VREF".into(), 3.3)],
        disable: vec!["floating-ttl-input".into()],
        ..Default::default()
    };
    let board = p.0.join("board.net");
    let s = Settings::resolve(board.to_str().unwrap(), &over, &Default::default())
        .expect("the project's settings");
    let shown = netmargin::report::settings::show("board.net", s.config.as_ref(), &over);
    let t: toml::Table = toml::from_str(&shown).expect("config --show prints TOML");
    assert_eq!(
        t["rail_tolerance"].as_float(),
        Some(s.run.model.rail_tolerance)
    );
    assert_eq!(
        t["checks"]["derating"].as_float(),
        Some(s.run.checks.derating)
    );
    assert_eq!(
        t["checks"]["min_margin_v"].as_float(),
        Some(s.run.checks.min_margin_v)
    );
    // rails: the first declaration of a name is the one the model takes
    let rails = t["rails"].as_table().unwrap();
    let mut first: Vec<(String, f64)> = Vec::new();
    for (n, v) in &s.run.model.rails {
        if !first.iter().any(|(m, _)| m == n) {
            first.push((n.clone(), *v));
        }
    }
    assert_eq!(rails.len(), first.len(), "{shown}");
    for (n, v) in &first {
        assert_eq!(rails[n].as_float(), Some(*v), "{n} in {shown}");
    }
    // every check: off exactly when the analysis turns it off, else its severity
    let sev = t["checks"]["severity"].as_table().unwrap();
    for c in netmargin::checks::REGISTRY {
        let said = sev[c.id].as_str().unwrap();
        if !s.runs(c.id) {
            assert_eq!(said, "off", "{}", c.id);
        } else {
            let want = s
                .run
                .checks
                .severity
                .iter()
                .find(|(i, _)| i == c.id)
                .map_or(c.severity, |(_, v)| *v);
            assert_eq!(said, want.as_str(), "{}", c.id);
        }
    }
    assert_eq!(sev["floating-ttl-input"].as_str(), Some("off"));
    assert_eq!(sev["floating-bus"].as_str(), Some("error"));
}
