//! The project configuration end to end: discovery next to the netlist, rails, waivers (used,
//! unused, expired), project mapping files over the shipped ones, unused entries reported,
//! errors at their line with exit code 2.

use std::path::Path;
use std::process::Command;

fn run(dir: &Path, args: &[&str]) -> (i32, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(args)
        .current_dir(dir)
        .output()
        .unwrap();
    let text = format!(
        "{}{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(!text.contains("panicked"), "{text}");
    (out.status.code().unwrap_or(-1), text)
}

fn scratch(name: &str) -> std::path::PathBuf {
    let d = std::env::temp_dir().join(format!("netmargin-config-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(d.join("hw")).unwrap();
    let demo = std::fs::read(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("fixtures/demo/counter-timer.net"),
    )
    .unwrap();
    std::fs::write(d.join("hw/board.net"), demo).unwrap();
    d
}

#[test]
fn waivers_suppress_and_stale_ones_are_reported() {
    let d = scratch("waivers");
    std::fs::write(
        d.join("netmargin.toml"),
        r#"
[[waiver]]
check = "floating-cmos-input"
refs = ["U20"]
pins = ["U20.12", "U20.13"]
reason = "U20's unused gate D, tied on the replacement board"

[[waiver]]
check = "fanout-overrun"
refs = ["U99"]
reason = "a part that is not on this board"

[[waiver]]
check = "missing-pull-up"
nets = ["/OVF_N"]
reason = "expired long ago"
expires = 2001-01-01
"#,
    )
    .unwrap();
    let (code, out) = run(&d, &["check", "--format", "short", "hw/board.net"]);
    assert_eq!(code, 1, "{out}");
    assert!(
        !out.contains("gate D of U20"),
        "waived finding still reported:\n{out}"
    );
    assert!(
        out.contains("U20 pin 10 (74HC00 input 3B) is connected to nothing"),
        "a finding the waiver's pins do not cover must remain:\n{out}"
    );
    assert!(
        out.contains(
            "netmargin.toml:8:1: warning: this waiver for `fanout-overrun` matched no finding"
        ),
        "{out}"
    );
    assert!(out.contains("expired on 2001-01-01"), "{out}");
    assert!(
        out.contains("U15 pin 2 (74LS05 open-collector output 1Y) has no pull-up"),
        "an expired waiver no longer applies:\n{out}"
    );
    let (_, human) = run(&d, &["check", "hw/board.net"]);
    assert!(human.contains("suppressed"), "{human}");
}

#[test]
fn config_errors_point_at_the_line_and_exit_2() {
    let d = scratch("errors");
    std::fs::write(
        d.join("netmargin.toml"),
        "[checks]\nderating = 0.8\ncolour = \"red\"\n",
    )
    .unwrap();
    let (code, out) = run(&d, &["check", "--format", "short", "hw/board.net"]);
    assert_eq!(code, 2, "{out}");
    assert!(out.contains("netmargin.toml:3:1: error:"), "{out}");
    assert!(out.contains("colour"), "{out}");
    let (code, _) = run(
        &d,
        &["check", "--no-config", "--format", "short", "hw/board.net"],
    );
    assert_eq!(code, 1);
}

#[test]
fn project_mapping_files_override_and_unused_entries_are_reported() {
    let d = scratch("rules");
    std::fs::write(d.join("netmargin.toml"), "[rules]\nparts = [\"parts.toml\"]\n\n[checks]\nseverity = { \"unclassified-part\" = \"off\" }\n").unwrap();
    std::fs::write(
        d.join("parts.toml"),
        "[[part]]\nvalues = [\"74LSOO\"]\nfamily = \"74LS\"\nseries = \"74\"\nfunction = \"00\"\nnote = \"the schematic's OCR slip, confirmed on the board\"\n\n[[part]]\nvalues = [\"NOTHING-LIKE-THIS\"]\nkind = \"not-logic\"\n",
    )
    .unwrap();
    let (_, out) = run(&d, &["check", "--format", "short", "hw/board.net"]);
    assert!(
        out.contains("parts.toml:8) matched no component")
            || out.contains("parts.toml:8 (NOTHING-LIKE-THIS) matched no component"),
        "{out}"
    );
    assert!(
        !out.contains("parts.toml:1 (74LSOO) matched no component"),
        "{out}"
    );
    // the project entry classifies U22: its gates are now checked as a 74LS00
    let (_, parts) = run(&d, &["check", "--format", "json", "hw/board.net"]);
    assert!(
        parts.contains("\"format_version\": 1") || parts.contains("\"format_version\":1"),
        "{parts}"
    );
}

#[test]
fn rails_from_the_command_line_and_config() {
    let d = scratch("rails");
    let text = std::fs::read_to_string(d.join("hw/board.net")).unwrap();
    // rename +5V to an unrevealing name: its supply pins still make it a rail, and the 74LS
    // parts it powers (specified at 5 V only: TI SDLS025B) give it 5 V, said once as an info
    std::fs::write(
        d.join("hw/board.net"),
        text.replace("(name +5V)", "(name LOGIC_SUPPLY)"),
    )
    .unwrap();
    let (_, out) = run(
        &d,
        &[
            "check",
            "--format",
            "short",
            "--only",
            "ttl-high-into-cmos",
            "--only",
            "inferred-rail",
            "hw/board.net",
        ],
    );
    assert!(out.contains("at LOGIC_SUPPLY (5.00 V)"), "{out}");
    assert!(
        out.contains("`LOGIC_SUPPLY` is taken as a 5.00 V supply rail"),
        "{out}"
    );
    let (_, out) = run(
        &d,
        &[
            "check",
            "--format",
            "short",
            "--only",
            "ttl-high-into-cmos",
            "--rail",
            "LOGIC_SUPPLY=5",
            "hw/board.net",
        ],
    );
    assert!(out.contains("at LOGIC_SUPPLY (5.00 V)"), "{out}");
    std::fs::write(d.join("netmargin.toml"), "[rails]\nLOGIC_SUPPLY = 5.0\n").unwrap();
    let (_, out) = run(
        &d,
        &[
            "check",
            "--format",
            "short",
            "--only",
            "ttl-high-into-cmos",
            "hw/board.net",
        ],
    );
    assert!(out.contains("at LOGIC_SUPPLY (5.00 V)"), "{out}");
}
