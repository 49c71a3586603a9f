//! The schematic reader on our own projects (`fixtures/schematics/`, written by
//! `fixtures/gen/schematics.py` from the nets each project is drawn to have): one project per
//! connectivity feature must read into exactly its intended nets, and each broken project
//! must stop with its error at the place the generator recorded.

use std::path::{Path, PathBuf};

use netmargin::capture::{self, Capture};
use netmargin::classify::classifier::Rules;
use netmargin::pipeline::{self, ReadOptions, RunOptions};

fn projects() -> Vec<(PathBuf, PathBuf)> {
    let mut out = Vec::new();
    for e in std::fs::read_dir("fixtures/schematics").unwrap().flatten() {
        let dir = e.path();
        let expected = dir.join("expected-nets.txt");
        if !expected.exists() {
            continue;
        }
        out.push((dir, expected));
    }
    out.sort();
    assert!(out.len() >= 5, "the generated projects are missing");
    out
}

/// The root sheet: the one no other sheet of the folder names.
fn root_of(dir: &Path) -> PathBuf {
    let any = std::fs::read_dir(dir)
        .unwrap()
        .flatten()
        .map(|e| e.path())
        .find(|p| p.extension().is_some_and(|x| x == "kicad_sch"))
        .unwrap();
    netmargin::schematic::load::project_root(&any)
}

#[test]
fn each_project_reads_into_the_nets_it_was_drawn_with() {
    for (dir, expected) in projects() {
        let root = root_of(&dir);
        let cap = Capture::open(root.to_str().unwrap(), &ReadOptions::default())
            .unwrap_or_else(|f| panic!("{}: {:?}", dir.display(), f.fatal));
        let nl = cap.model().unwrap_or_else(|f| panic!("{:?}", f.fatal));
        let mut out = Vec::new();
        capture::write_nets(&mut out, &nl, false).unwrap();
        let got = String::from_utf8(out).unwrap();
        let want = std::fs::read_to_string(&expected).unwrap();
        assert_eq!(got, want, "{}", dir.display());
        // nothing went wrong while reading (no pin on two nets, no unknown reference)
        let errors: Vec<_> = nl
            .diagnostics
            .iter()
            .filter(|d| d.severity == netmargin::diag::Severity::Error)
            .map(|d| &d.message)
            .collect();
        assert!(errors.is_empty(), "{}: {errors:?}", dir.display());
    }
}

#[test]
fn kicad6_instances_give_references_values_and_footprints_and_leave_off_board_parts_out() {
    let cap = Capture::open(
        "fixtures/schematics/kicad6/counter.kicad_sch",
        &ReadOptions::default(),
    )
    .unwrap_or_else(|f| panic!("{:?}", f.fatal));
    let nl = cap.model().unwrap_or_else(|f| panic!("{:?}", f.fatal));
    let refs: Vec<&str> = nl.components.iter().map(|c| c.reference.as_str()).collect();
    assert_eq!(refs, ["R1", "R31"]);
    let r31 = &nl.components[1];
    assert_eq!(r31.value_str(), "10k");
    assert_eq!(r31.footprint.as_ref().unwrap().as_str(), "tally:R_Axial");
    assert_eq!(nl.components[0].value_str(), "4k7");
    // R31 is drawn in the sub-sheet: its reference points there
    let src = cap.source();
    assert!(src
        .file_at(r31.reference.span().start as usize)
        .ends_with("divider.kicad_sch"));
}

#[test]
fn broken_projects_stop_with_a_located_error() {
    let rules = Rules::builtin();
    let mut seen = 0;
    for e in std::fs::read_dir("fixtures/schematics/broken")
        .unwrap()
        .flatten()
    {
        let dir = e.path();
        let line = std::fs::read_to_string(dir.join("expected-error.txt")).unwrap();
        let parts: Vec<&str> = line.split_whitespace().collect();
        let (root, code, place) = (parts[0], parts[1], parts[2]);
        let root = dir.join(root);
        let out = pipeline::check_file(root.to_str().unwrap(), &rules, &RunOptions::default());
        let d = out
            .fatal
            .as_ref()
            .unwrap_or_else(|| panic!("{}: no error", dir.display()));
        assert_eq!(d.code, code, "{}: {}", dir.display(), d.message);
        let src = out
            .source
            .as_ref()
            .expect("the text is kept to show the place");
        let span = d.primary_span().expect("a place");
        let lc = src.line_col(span.start as usize);
        let file = src.file_at(span.start as usize);
        let got = format!(
            "{}:{}:{}",
            Path::new(file).file_name().unwrap().to_string_lossy(),
            lc.line,
            lc.column
        );
        assert_eq!(got, place, "{}: {}", dir.display(), d.message);
        seen += 1;
    }
    assert!(seen >= 5);
}

#[test]
fn a_sub_sheet_stands_for_its_project() {
    let root = netmargin::schematic::load::project_root(Path::new(
        "fixtures/schematics/hierarchy/stage.kicad_sch",
    ));
    assert!(root.ends_with("tally.kicad_sch"), "{}", root.display());
    let paths = netmargin::commands::check::expand_paths(&[
        "fixtures/schematics/hierarchy/stage.kicad_sch".to_string(),
        "fixtures/schematics/hierarchy".to_string(),
    ]);
    assert_eq!(paths, ["fixtures/schematics/hierarchy/tally.kicad_sch"]);
}

/// Damaged sheets never panic and every diagnostic stays inside the text: each fixture
/// sheet cut short at many places, and with single characters that matter replaced
/// (parentheses, quotes, digits), read as a one-sheet project.
#[test]
fn damaged_sheets_give_diagnostics_not_panics() {
    let mut sheets: Vec<PathBuf> = Vec::new();
    for e in std::fs::read_dir("fixtures/schematics").unwrap().flatten() {
        for f in std::fs::read_dir(e.path()).into_iter().flatten().flatten() {
            if f.path().extension().is_some_and(|x| x == "kicad_sch") {
                sheets.push(f.path());
            }
        }
    }
    sheets.sort();
    let mut runs = 0;
    let read = |text: String| match netmargin::schematic::load::single("damaged.kicad_sch", text) {
        Err(f) => {
            if let Some(src) = &f.source {
                for l in &f.diag.labels {
                    assert!(l.span.start <= l.span.end && l.span.end as usize <= src.text().len());
                }
            }
        }
        Ok(files) => {
            let len = files.source.text().len();
            let diags = match netmargin::schematic::read(&files) {
                Ok(nl) => nl.diagnostics,
                Err(d) => vec![d],
            };
            for d in diags {
                for l in &d.labels {
                    assert!(
                        l.span.start <= l.span.end && l.span.end as usize <= len,
                        "{d:?}"
                    );
                }
            }
        }
    };
    for p in &sheets {
        let text = std::fs::read_to_string(p).unwrap();
        let step = (text.len() / 150).max(1);
        for cut in (0..text.len()).step_by(step) {
            if text.is_char_boundary(cut) {
                read(text[..cut].to_string());
                runs += 1;
            }
        }
        for (i, c) in text.char_indices().step_by(step) {
            let swap = match c {
                '(' => ")",
                ')' => "(",
                '"' => "x",
                '0'..='9' => "-",
                _ => continue,
            };
            let mut t = text.clone();
            t.replace_range(i..i + 1, swap);
            read(t);
            runs += 1;
        }
    }
    assert!(runs > 1000, "{runs}");
}

/// The benchmark's synthetic schematic reads into the nets it is built with: the labelled
/// chain and one inner net per cell, every resistor pin on a net.
#[test]
fn the_synthetic_schematic_reads_into_its_nets() {
    let (text, nets) = netmargin::synth::schematic(60_000);
    let files = netmargin::schematic::load::single("synthetic.kicad_sch", text).unwrap();
    let nl = netmargin::schematic::read(&files).unwrap();
    assert_eq!(nl.nets.len(), nets);
    // only the two ends of the chain (N0 and the last label) hold a single pin
    assert_eq!(nl.summary().pins_on_no_net, 2);
    // N0 holds the first resistor's outer pin alone; N1 joins cell 0's last pin to cell 1's first
    let n1 = nl.net_by_name("/N1").expect("/N1");
    let pins: Vec<String> = nl.nets[n1]
        .nodes(&nl)
        .iter()
        .map(|n| format!("{}.{}", n.reference(&nl), n.pin(&nl)))
        .collect();
    assert_eq!(pins, ["R1.2", "R2.1"]);
}

/// The benchmark's synthetic hierarchy reads into the nets it is built with: every sheet's
/// chain, joined to the next sheet's through the root's labels, each child file's symbols
/// named by the instance of every sheet that uses it.
#[test]
fn the_synthetic_hierarchy_reads_into_its_nets() {
    let (files, nets) = netmargin::synth::hierarchy(300_000);
    let dir = std::env::temp_dir().join(format!("netmargin-hier-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    for (name, text) in &files {
        std::fs::write(dir.join(name), text).unwrap();
    }
    let root = dir.join("root.kicad_sch");
    let loaded = netmargin::schematic::load::read_files(root.to_str().unwrap(), u64::MAX);
    let _ = std::fs::remove_dir_all(&dir);
    let loaded = loaded.unwrap_or_else(|f| panic!("{:?}", f.diag));
    let nl = netmargin::schematic::read(&loaded).unwrap();
    assert!(nl.diagnostics.is_empty(), "{:?}", nl.diagnostics.first());
    assert_eq!(nl.nets.len(), nets);
    // four sheets use each child file; 300 kB makes more than one file
    let sheets = (files.len() - 1) * 4;
    assert!(sheets >= 8, "{sheets}");
    assert_eq!(nl.components.len(), sheets * 60 * 2);
    // only the two ends of the whole chain hold a single pin
    assert_eq!(nl.summary().pins_on_no_net, 2);
    // L1 joins sheet 0's last resistor (its OUT) to sheet 1's first (its IN)
    let l1 = nl.net_by_name("/L1").expect("/L1");
    let mut pins: Vec<String> = nl.nets[l1]
        .nodes(&nl)
        .iter()
        .map(|n| format!("{}.{}", n.reference(&nl), n.pin(&nl)))
        .collect();
    pins.sort();
    assert_eq!(pins, ["R0_119.2", "R1_0.1"]);
}

/// Every output format points a finding into the sheet where the gate is drawn: the short
/// line, the GitHub annotation, the JSON place (with its `file`) and the SARIF location.
#[test]
fn findings_point_into_the_sheet_in_every_format() {
    let run = |format: &str| {
        let o = std::process::Command::new(env!("CARGO_BIN_EXE_netmargin"))
            .args(["check", "--no-config", "--format", format])
            .arg("fixtures/schematics/cmos/panel.kicad_sch")
            .output()
            .expect("runs");
        assert_eq!(o.status.code(), Some(1), "{format}");
        String::from_utf8(o.stdout).unwrap()
    };
    // the unplaced gate B's inputs: the library symbol's pin in logic.kicad_sch, line 14
    let short = run("short");
    assert!(
        short.contains("fixtures/schematics/cmos/logic.kicad_sch:14:9: error: gate B of U1"),
        "{short}"
    );
    let github = run("github");
    assert!(
        github.contains("file=fixtures/schematics/cmos/logic.kicad_sch,line=14,col=9"),
        "{github}"
    );
    let json: serde_json::Value = serde_json::from_str(&run("json")).unwrap();
    let file = &json["files"][0];
    assert_eq!(file["path"], "fixtures/schematics/cmos/panel.kicad_sch");
    let f = file["findings"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["message"].as_str().unwrap().starts_with("gate B of U1"))
        .expect("the gate B finding");
    assert_eq!(f["file"], "fixtures/schematics/cmos/logic.kicad_sch");
    assert_eq!(f["line"], 14);
    // the offset counts from the start of that sheet
    let sheet = std::fs::read_to_string("fixtures/schematics/cmos/logic.kicad_sch").unwrap();
    let off = f["byte_offset"].as_u64().unwrap() as usize;
    assert!(
        sheet[off..].starts_with("(pin input"),
        "{}",
        &sheet[off..off + 20]
    );
    let sarif = run("sarif");
    assert!(
        sarif.contains("\"uri\": \"fixtures/schematics/cmos/logic.kicad_sch\""),
        "{sarif}"
    );
}

/// A symbol marked do-not-populate stays on its nets and carries the `dnp` property, as KiCad
/// writes it in a netlist; the others do not.
#[test]
fn a_do_not_populate_symbol_carries_the_mark() {
    let cap = Capture::open(
        "fixtures/schematics/wires/wires.kicad_sch",
        &ReadOptions::default(),
    )
    .unwrap_or_else(|f| panic!("{:?}", f.fatal));
    let nl = cap.model().unwrap_or_else(|f| panic!("{:?}", f.fatal));
    let r5 = &nl.components[nl.component("R5").unwrap()];
    assert!(r5.field("dnp").is_some());
    assert!(r5.pins.iter().all(|p| !p.connection.is_unconnected()));
    let r1 = &nl.components[nl.component("R1").unwrap()];
    assert!(r1.field("dnp").is_none());
}

/// `compare` sets two captures side by side by pins: a copy of a project with one wire
/// taken away and one value changed differs exactly there (exit 1); a project against
/// itself, or against its own `nets` read back, matches (exit 0).
#[test]
fn compare_reports_pins_and_parts_that_differ() {
    let dir = std::env::temp_dir().join(format!("netmargin-compare-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let text = std::fs::read_to_string("fixtures/schematics/wires/wires.kicad_sch").unwrap();
    // R1's value, and the wire that brings R5.2 to R4.2's path
    let changed = text
        .replacen(
            "(property \"Value\" \"10k\"",
            "(property \"Value\" \"22k\"",
            1,
        )
        .replace(
            "  (wire (pts (xy 105.41 88.9) (xy 105.41 63.5))",
            "  (polyline (pts (xy 105.41 88.9) (xy 105.41 63.5))",
        );
    assert_ne!(changed, text);
    let b = dir.join("wires.kicad_sch");
    std::fs::write(&b, changed).unwrap();
    let run = |a: &str, b: &str| {
        std::process::Command::new(env!("CARGO_BIN_EXE_netmargin"))
            .args(["compare", a, b])
            .output()
            .expect("runs")
    };
    let o = run(
        "fixtures/schematics/wires/wires.kicad_sch",
        b.to_str().unwrap(),
    );
    let out = String::from_utf8_lossy(&o.stdout).into_owned();
    assert_eq!(o.status.code(), Some(1), "{out}");
    assert!(out.contains("R1: value `10k` in A, `22k` in B"), "{out}");
    // R4.2 and R5.2 no longer reach each other: both pins are reported, by pins
    assert!(out.contains("R4.2: connections differ"), "{out}");
    assert!(out.contains("  only in A: R5.2"), "{out}");
    assert!(out.contains("R5.2: connections differ"), "{out}");
    assert!(
        out.contains("2 pin(s) connected differently, 0 part(s) added, 0 removed, 1 changed"),
        "{out}"
    );
    let same = run(
        "fixtures/schematics/wires/wires.kicad_sch",
        "fixtures/schematics/wires/wires.kicad_sch",
    );
    assert_eq!(same.status.code(), Some(0));
    let _ = std::fs::remove_dir_all(&dir);
}

/// A project whose sheet sits in a sub-folder (named `parts/stage.kicad_sch` by the root):
/// the sheet stands for the root a folder above it, and the project reads into the same
/// nets as with the sheet beside the root.
#[test]
fn a_sheet_in_a_sub_folder_finds_its_root_above() {
    let dir = std::env::temp_dir().join(format!("netmargin-subfolder-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(dir.join("parts")).unwrap();
    let root = std::fs::read_to_string("fixtures/schematics/hierarchy/tally.kicad_sch").unwrap();
    let moved = root.replace("\"stage.kicad_sch\"", "\"parts/stage.kicad_sch\"");
    assert_ne!(root, moved);
    std::fs::write(dir.join("tally.kicad_sch"), moved).unwrap();
    std::fs::copy(
        "fixtures/schematics/hierarchy/stage.kicad_sch",
        dir.join("parts/stage.kicad_sch"),
    )
    .unwrap();
    let sub = dir.join("parts/stage.kicad_sch");
    let found = netmargin::schematic::load::project_root(&sub);
    assert_eq!(
        found.canonicalize().unwrap(),
        dir.join("tally.kicad_sch").canonicalize().unwrap()
    );
    let cap = Capture::open(sub.to_str().unwrap(), &ReadOptions::default())
        .unwrap_or_else(|f| panic!("{:?}", f.fatal));
    let nl = cap.model().unwrap_or_else(|f| panic!("{:?}", f.fatal));
    let mut out = Vec::new();
    capture::write_nets(&mut out, &nl, false).unwrap();
    let want = std::fs::read_to_string("fixtures/schematics/hierarchy/expected-nets.txt").unwrap();
    assert_eq!(String::from_utf8(out).unwrap(), want);
    let _ = std::fs::remove_dir_all(&dir);
}
