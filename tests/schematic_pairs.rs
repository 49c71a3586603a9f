//! The schematic reader against KiCad itself: for every project in
//! `../shared/real-boards/pairs/` (a KiCad 6-9 schematic and the netlist KiCad exported from
//! it at the same commit), the pins read from the schematic must fall into exactly KiCad's
//! nets, and every net KiCad names must carry the same name. Passes with a notice when the
//! folder is absent.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};
use std::time::Instant;

use netmargin::netlist::{self, Netlist};
use netmargin::schematic;

const PAIRS: &str = "../shared/real-boards/pairs";

/// (root schematic, exported netlist) of each pair folder.
fn pairs() -> Vec<(String, PathBuf, PathBuf)> {
    let Ok(dir) = std::fs::read_dir(PAIRS) else {
        return Vec::new();
    };
    let mut out = Vec::new();
    let mut dirs: Vec<PathBuf> = dir.flatten().map(|e| e.path()).collect();
    dirs.sort();
    for d in dirs {
        let files: Vec<PathBuf> = std::fs::read_dir(&d)
            .into_iter()
            .flatten()
            .flatten()
            .map(|e| e.path())
            .collect();
        let Some(net) = files
            .iter()
            .find(|p| p.extension().is_some_and(|e| e == "net"))
        else {
            continue;
        };
        // the root sheet carries the project's name, as the netlist does
        let stem = net.file_stem().unwrap().to_owned();
        let root = d.join(Path::new(&stem).with_extension("kicad_sch"));
        if root.exists() {
            out.push((
                d.file_name().unwrap().to_string_lossy().into_owned(),
                root,
                net.clone(),
            ));
        }
    }
    out
}

/// (ref, pin) -> net name, and net name -> its pins, without nets of no pins.
fn partition(nl: &Netlist<'_>) -> BTreeMap<BTreeSet<(String, String)>, String> {
    let mut out = BTreeMap::new();
    for n in &nl.nets {
        let pins: BTreeSet<(String, String)> = n
            .nodes(nl)
            .iter()
            .map(|x| (x.reference(nl).to_string(), x.pin(nl).to_string()))
            .collect();
        if !pins.is_empty() {
            out.insert(pins, n.name.as_str().to_string());
        }
    }
    out
}

fn is_automatic(name: &str) -> bool {
    name.starts_with("Net-(") || name.starts_with("unconnected-(")
}

/// Every difference between the two partitions and every named net whose name differs, as
/// lines (empty when they agree), and the automatic names (`Net-(..)`, `unconnected-(..)`)
/// that differ, apart: KiCad's choice among several pins is not always the lowest name,
/// and the issue asks for the same names on named nets.
fn compare(sch: &Netlist<'_>, net: &Netlist<'_>) -> (Vec<String>, Vec<String>) {
    let a = partition(sch);
    let b = partition(net);
    let mut out = Vec::new();
    let mut auto_diff = Vec::new();
    for (pins, name) in &b {
        match a.get(pins) {
            None => {
                // the read nets that hold its pins, and the pins that differ
                let holders: Vec<(&BTreeSet<(String, String)>, &String)> =
                    a.iter().filter(|(p, _)| !p.is_disjoint(pins)).collect();
                let mut differ: Vec<String> = Vec::new();
                for (p, n) in &holders {
                    for x in p.symmetric_difference(pins) {
                        if p.contains(x) {
                            differ.push(format!("+{}.{} (read in `{n}`)", x.0, x.1));
                        }
                    }
                }
                for x in pins {
                    if !holders.iter().any(|(p, _)| p.contains(x)) {
                        differ.push(format!("-{}.{}", x.0, x.1));
                    }
                }
                differ.truncate(8);
                out.push(format!(
                    "KiCad's net `{name}` ({} pins) is not one net in the schematic read: {}",
                    pins.len(),
                    differ.join(" ")
                ));
            }
            Some(ours) if ours != name => {
                if is_automatic(name) && is_automatic(ours) {
                    auto_diff.push(format!("automatic name: KiCad `{name}`, read `{ours}`"));
                } else {
                    out.push(format!("named net: KiCad `{name}`, read `{ours}`"));
                }
            }
            _ => {}
        }
    }
    for (pins, name) in &a {
        if !b.contains_key(pins) {
            let mut v: Vec<String> = pins.iter().map(|(r, p)| format!("{r}.{p}")).collect();
            v.truncate(8);
            out.push(format!(
                "read net `{name}` ({} pins: {}) is not one of KiCad's nets",
                pins.len(),
                v.join(" ")
            ));
        }
    }
    (out, auto_diff)
}

#[test]
fn every_pair_reads_into_kicads_nets() {
    let pairs = pairs();
    if pairs.is_empty() {
        eprintln!("note: {PAIRS} is absent: the schematic/netlist pairs were not compared");
        return;
    }
    let mut failures = Vec::new();
    for (name, root, net) in &pairs {
        let t0 = Instant::now();
        let text = std::fs::read_to_string(net).unwrap();
        let exported = netlist::read(&text).expect("KiCad's netlist reads");
        let t_net = t0.elapsed();
        let t1 = Instant::now();
        let files = schematic::open(root.to_str().unwrap(), u64::MAX)
            .unwrap_or_else(|f| panic!("{name}: {}", f.diag.message));
        let read = schematic::read(&files).unwrap_or_else(|d| panic!("{name}: {}", d.message));
        let t_sch = t1.elapsed();
        let (diffs, auto) = compare(&read, &exported);
        // `netmargin compare SCH NET` finds no difference (pins, parts, values, footprints)
        let d = netmargin::capture::compare(&read, &exported);
        if !d.is_empty() {
            failures.push(format!("{name}: compare reports {d:?}"));
        }
        eprintln!(
            "{name}: {} nets, {} parts; schematic {:.1} ms, netlist {:.1} ms; {} differences ({} automatic names)",
            exported.nets.len(),
            exported.components.len(),
            t_sch.as_secs_f64() * 1e3,
            t_net.as_secs_f64() * 1e3,
            diffs.len(),
            auto.len()
        );
        for d in diffs.iter().chain(&auto).take(30) {
            eprintln!("  {d}");
        }
        // the same parts
        let parts_a: BTreeSet<String> = read
            .components
            .iter()
            .map(|c| c.reference.as_str().to_string())
            .collect();
        let parts_b: BTreeSet<String> = exported
            .components
            .iter()
            .map(|c| c.reference.as_str().to_string())
            .collect();
        if parts_a != parts_b {
            let extra: Vec<_> = parts_a.difference(&parts_b).take(10).collect();
            let missing: Vec<_> = parts_b.difference(&parts_a).take(10).collect();
            eprintln!(
                "  parts: read but not exported {extra:?}; exported but not read {missing:?}"
            );
            failures.push(format!("{name}: parts differ"));
        }
        if !diffs.is_empty() {
            failures.push(format!("{name}: {} differences", diffs.len()));
        }
    }
    assert!(failures.is_empty(), "{failures:#?}");
}

/// The checks run on a schematic unchanged: every pair's schematic yields the same findings
/// (check, severity, pins) as its exported netlist, and the findings point into the sheet
/// files.
#[test]
fn checks_find_the_same_on_a_schematic_as_on_its_netlist() {
    use netmargin::classify::classifier::Rules;
    use netmargin::pipeline::{self, RunOptions};
    let pairs = pairs();
    if pairs.is_empty() {
        eprintln!("note: {PAIRS} is absent: the checks were not compared on schematics");
        return;
    }
    let rules = Rules::builtin();
    let opts = RunOptions::default();
    for (name, root, net) in &pairs {
        let key = |o: &pipeline::FileOutcome| {
            let mut v: Vec<String> = o
                .diags
                .iter()
                .map(|d| {
                    let mut pins: Vec<&str> = d.pins().collect();
                    pins.sort();
                    format!("{} {} {}", d.code(), d.severity(), pins.join(","))
                })
                .collect();
            v.sort();
            v
        };
        let a = pipeline::check_file(root.to_str().unwrap(), &rules, &opts);
        let b = pipeline::check_file(net.to_str().unwrap(), &rules, &opts);
        assert!(a.fatal.is_none(), "{name}: {:?}", a.fatal);
        let (ka, kb) = (key(&a), key(&b));
        let only_a: Vec<_> = ka.iter().filter(|k| !kb.contains(k)).take(5).collect();
        let only_b: Vec<_> = kb.iter().filter(|k| !ka.contains(k)).take(5).collect();
        assert_eq!(
            ka.len(),
            kb.len(),
            "{name}: schematic only {only_a:?}, netlist only {only_b:?}"
        );
        assert!(
            only_a.is_empty() && only_b.is_empty(),
            "{name}: {only_a:?} {only_b:?}"
        );
        // every finding with a place points into one of the project's sheet files
        let src = a.source.as_ref().unwrap();
        let sheets: Vec<&str> = src.files().iter().map(|f| &*f.name).collect();
        for d in &a.diags {
            if let Some(s) = d.primary_span() {
                let file = src.file_at(s.start as usize);
                assert!(
                    sheets.contains(&file) && file.ends_with(".kicad_sch"),
                    "{file}"
                );
            }
        }
        eprintln!("{name}: {} findings alike", ka.len());
    }
}
