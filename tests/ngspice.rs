//! Cross-check of the per-net DC budgets against ngspice (Debian's `ngspice` package), a
//! general-purpose circuit simulator.
//!
//! Each case is a small netlist read through the library (text -> netlist model ->
//! classification -> electrical model -> budget). From the electrical model's own elements
//! a SPICE deck is written, one sub-circuit per driver state, and ngspice solves its DC
//! operating point (`op`):
//! * a driver in the low state is a voltage source at its rated VOL (the level the model
//!   takes the pull-up currents at); in the high state a source at its light-load VOH;
//! * a driver's published output rows become a Thevenin source through the two rows that
//!   bracket the current (V0 and R_out of the straight line through them), to check the
//!   guaranteed level at the budget's total current;
//! * an open-collector output that is off is a current sink of its off-state leakage;
//! * a three-state output that is off is a current source of its IOZ;
//! * a load is a current source at its rated input current: IIL out of the input in the low
//!   state, IIH into it in the high state;
//! * pull-up and pull-down resistors go to voltage sources at their rails.
//!
//! ngspice's node voltages and source currents must agree with netmargin's `StateBudget`
//! totals, the guaranteed levels and the pull-up high levels within 1 mV and 1 uA.
//!
//! Without ngspice on the machine the test fails when `CI` is set, and otherwise prints a
//! notice and passes.

mod support;

#[path = "notice/mod.rs"]
mod notice;
use std::fmt::Write as _;
use std::process::Command;

use netmargin::circuit::budget::{net_budget, ItemKind};
use netmargin::circuit::ModelOptions;
use netmargin::classify::family::VI;
use netmargin::classify::PinRole;
use support::{net_index, with_circuit, Board};

const V_TOL: f64 = 1e-3;
const I_TOL: f64 = 1e-6;

/// Input pins of the quad 2-input gates used as loads.
fn load_pins(value: &str) -> [&'static str; 8] {
    if value.starts_with("CD40") {
        ["1", "2", "5", "6", "8", "9", "12", "13"]
    } else {
        ["1", "2", "4", "5", "9", "10", "12", "13"]
    }
}

/// (output pin, supply pin, ground pin) of a driver package.
fn driver_pins(value: &str) -> (&'static str, &'static str, &'static str) {
    if value.ends_with("244") {
        ("18", "20", "10")
    } else if value.ends_with("03") || value.starts_with("CD40") {
        ("3", "14", "7")
    } else {
        ("2", "14", "7")
    }
}

/// One net: drivers (value, rail), loads (value, count, rail), resistors to rails.
struct Case {
    name: &'static str,
    drivers: Vec<(&'static str, &'static str)>,
    loads: Vec<(&'static str, usize, &'static str)>,
    resistors: Vec<(&'static str, &'static str)>,
}

fn case(
    name: &'static str,
    drivers: &[(&'static str, &'static str)],
    loads: &[(&'static str, usize, &'static str)],
    resistors: &[(&'static str, &'static str)],
) -> Case {
    Case {
        name,
        drivers: drivers.to_vec(),
        loads: loads.to_vec(),
        resistors: resistors.to_vec(),
    }
}

fn cases() -> Vec<Case> {
    let v5 = "+5V";
    vec![
        case("ls-one-ls", &[("74LS04", v5)], &[("74LS00", 1, v5)], &[]),
        case("ls-eight-ls", &[("74LS04", v5)], &[("74LS00", 8, v5)], &[]),
        case("ls-three-std", &[("74LS04", v5)], &[("7400", 3, v5)], &[]),
        case("std-ten-std", &[("7404", v5)], &[("7400", 10, v5)], &[]),
        case("std-twelve-ls", &[("7404", v5)], &[("74LS00", 12, v5)], &[]),
        case("s-six-s", &[("74S04", v5)], &[("74S00", 6, v5)], &[]),
        case("hc-four-hc", &[("74HC04", v5)], &[("74HC00", 4, v5)], &[]),
        case("hc-two-ls", &[("74HC04", v5)], &[("74LS00", 2, v5)], &[]),
        case("hct-five-ls", &[("74HCT04", v5)], &[("74LS00", 5, v5)], &[]),
        case(
            "hc-3v3-hc",
            &[("74HC04", "+3V3")],
            &[("74HC00", 3, "+3V3")],
            &[],
        ),
        case(
            "b-10v-b",
            &[("CD4011B", "+10V")],
            &[("CD4011B", 4, "+10V")],
            &[],
        ),
        case(
            "b-15v-b",
            &[("CD4011B", "+15V")],
            &[("CD4011B", 2, "+15V")],
            &[],
        ),
        case("b-5v-hct", &[("CD4011B", v5)], &[("74HCT00", 1, v5)], &[]),
        case(
            "ls244-twenty-ls",
            &[("74LS244", v5)],
            &[("74LS00", 20, v5)],
            &[],
        ),
        case(
            "ls244-twelve-std",
            &[("74LS244", v5)],
            &[("7400", 12, v5)],
            &[],
        ),
        case(
            "hc244-eight-ls",
            &[("74HC244", v5)],
            &[("74LS00", 8, v5)],
            &[],
        ),
        case(
            "ls05-4k7-three-ls",
            &[("74LS05", v5)],
            &[("74LS00", 3, v5)],
            &[("4K7", v5)],
        ),
        case(
            "ls05-two-10k-five-ls",
            &[("74LS05", v5)],
            &[("74LS00", 5, v5)],
            &[("10k", v5), ("10k", v5)],
        ),
        case(
            "7403-8k2-five-ls",
            &[("7403", v5)],
            &[("74LS00", 5, v5)],
            &[("8K2", v5)],
        ),
        case(
            "7403-1k-four-std",
            &[("7403", v5)],
            &[("7400", 4, v5)],
            &[("1k", v5)],
        ),
        case(
            "wired-or-ls05-pair",
            &[("74LS05", v5), ("74LS05", v5)],
            &[("74LS00", 4, v5)],
            &[("3K3", v5)],
        ),
        case(
            "wired-or-7403-ls05-hct",
            &[("7403", v5), ("74LS05", v5)],
            &[("74HCT00", 2, v5)],
            &[("2K2", v5)],
        ),
        case(
            "ls05-10k-three-hc",
            &[("74LS05", v5)],
            &[("74HC00", 3, v5)],
            &[("10k", v5)],
        ),
        case(
            "7406-12v-b",
            &[("7406", v5)],
            &[("CD4011B", 2, "+12V")],
            &[("10k", "+12V")],
        ),
        case(
            "ls-1k-pull-down",
            &[("74LS04", v5)],
            &[("74LS00", 2, v5)],
            &[("1k", "GND")],
        ),
        case(
            "hc-10k-pull-down",
            &[("74HC04", v5)],
            &[("74HC00", 3, v5)],
            &[("10k", "GND")],
        ),
        case(
            "hc-to-minus-5",
            &[("74HC04", v5)],
            &[("74HC00", 1, v5)],
            &[("4K7", "-5V")],
        ),
        case(
            "ls244-bus-pair",
            &[("74LS244", v5), ("74LS244", v5)],
            &[("74LS00", 4, v5)],
            &[],
        ),
        case(
            "hct244-bus-pair",
            &[("74HCT244", v5), ("74HCT244", v5)],
            &[("74HCT00", 6, v5)],
            &[],
        ),
        case(
            "lvc-3v3-lvc",
            &[("74LVC04", "+3V3")],
            &[("74LVC00", 4, "+3V3")],
            &[],
        ),
        case(
            "lvc-into-5v-ttl",
            &[("74LVC04", "+3V3")],
            &[("74HCT00", 1, v5), ("74LS00", 1, v5)],
            &[],
        ),
        case(
            "als-ten-als",
            &[("74ALS04", v5)],
            &[("74ALS00", 10, v5)],
            &[],
        ),
        case(
            "f-mixed",
            &[("74F04", v5)],
            &[("74F00", 5, v5), ("74LS00", 2, v5)],
            &[],
        ),
        case(
            "ac-680-pull-down",
            &[("74AC04", v5)],
            &[("74AC00", 3, v5)],
            &[("680", "GND")],
        ),
        case(
            "ls-mixed-families",
            &[("74LS04", v5)],
            &[
                ("7400", 2, v5),
                ("74LS00", 3, v5),
                ("74HC00", 2, v5),
                ("CD4011B", 1, v5),
            ],
            &[],
        ),
        case(
            "ls-pull-up-push-pull",
            &[("74LS04", v5)],
            &[("74LS00", 6, v5)],
            &[("2K2", v5)],
        ),
    ]
}

fn board(c: &Case) -> Board {
    let mut b = Board::default();
    let mut nodes: Vec<String> = Vec::new();
    let mut n = 0;
    for (value, rail) in &c.drivers {
        n += 1;
        let r = format!("U{n}");
        let (out, vcc, gnd) = driver_pins(value);
        b.part(&r, value)
            .net(rail, &[&format!("{r}.{vcc}")])
            .net("GND", &[&format!("{r}.{gnd}")]);
        nodes.push(format!("{r}.{out}"));
    }
    for (value, count, rail) in &c.loads {
        let mut left = *count;
        while left > 0 {
            n += 1;
            let r = format!("U{n}");
            b.logic14(&r, value, rail);
            for p in load_pins(value).iter().take(left.min(8)) {
                nodes.push(format!("{r}.{p}"));
            }
            left -= left.min(8);
        }
    }
    let refs: Vec<&str> = nodes.iter().map(|s| s.as_str()).collect();
    b.net("/N", &refs);
    for (i, (value, rail)) in c.resistors.iter().enumerate() {
        b.resistor(&format!("R{}", i + 1), value, rail, "/N");
        // a decoupling capacitor on the rail, as the board would have (DC: nothing)
        b.part(&format!("C{}", i + 1), "100n")
            .net(rail, &[&format!("C{}.1", i + 1)])
            .net("GND", &[&format!("C{}.2", i + 1)]);
    }
    b
}

/// The straight line through the two published rows that bracket `amps`: (V0, R_out) with
/// V = V0 + slope x |I|, or `None` outside the rows.
fn line_through(rows: &[VI], amps: f64) -> Option<(f64, f64)> {
    rows.windows(2)
        .find(|w| w[0].a.abs() <= amps && amps <= w[1].a.abs())
        .map(|w| {
            let slope = (w[1].v - w[0].v) / (w[1].a.abs() - w[0].a.abs());
            (w[0].v - slope * w[0].a.abs(), slope)
        })
}

/// What ngspice must reproduce: the vector, netmargin's value, the tolerance, the sign
/// ngspice reports it with.
struct Probe {
    case: &'static str,
    what: String,
    vector: String,
    want: f64,
    tol: f64,
    sign: f64,
}

/// Writes the sub-circuits of one case into `deck` and their probes into `probes`.
fn add_case(k: usize, c: &Case, deck: &mut String, probes: &mut Vec<Probe>) {
    with_circuit(&board(c).text(), ModelOptions::default(), |cx| {
        let net = net_index(cx, "/N");
        let nm = &cx.nets[net];
        let b = net_budget(cx, net);
        assert_eq!(
            nm.drivers.len(),
            c.drivers.len(),
            "{}: drivers in the model",
            c.name
        );
        let n_loads: usize = c.loads.iter().map(|l| l.1).sum();
        assert_eq!(nm.loads.len(), n_loads, "{}: loads in the model", c.name);
        assert_eq!(
            nm.pulls().len(),
            c.resistors.len(),
            "{}: pull resistors in the model",
            c.name
        );
        let has_up = nm.pulls().iter().any(|p| p.up);
        let has_down = nm.pulls().iter().any(|p| !p.up);
        let mut sub = 0;
        let mut open = |deck: &mut String| {
            sub += 1;
            let p = format!("c{k}s{sub}");
            let _ = writeln!(deck, "* {} / {p}", c.name);
            p
        };
        for db in &b.drivers {
            let d = &nm.drivers[db.driver()];
            let lv = d.levels(cx).expect("classified driver");
            // the elements other than this driver, in one state
            let others = |deck: &mut String, p: &str, node: &str, low: bool| {
                for (i, l) in nm.loads.iter().enumerate() {
                    let ll = l.levels(cx).expect("classified load");
                    if low {
                        let _ = writeln!(deck, "i{p}l{i} 0 {node} DC {:e}", ll.iil_max.abs());
                    } else {
                        let _ = writeln!(deck, "i{p}l{i} {node} 0 DC {:e}", ll.iih_max.abs());
                    }
                }
                for (i, o) in nm
                    .drivers
                    .iter()
                    .enumerate()
                    .filter(|(i, _)| *i != db.driver())
                {
                    let ol = o.levels(cx).expect("classified driver");
                    let a = match o.role {
                        PinRole::ThreeState | PinRole::Bidirectional => ol.ioz.abs(),
                        PinRole::OpenCollector => ol.oc_leakage.abs(),
                        r => panic!("{}: a second driver of role {r:?}", c.name),
                    };
                    if low {
                        let _ = writeln!(deck, "i{p}o{i} 0 {node} DC {a:e}");
                    } else {
                        let _ = writeln!(deck, "i{p}o{i} {node} 0 DC {a:e}");
                    }
                }
                for (i, pl) in nm
                    .pulls()
                    .iter()
                    .enumerate()
                    .filter(|(_, pl)| pl.up == low || !low && d.role == PinRole::OpenCollector)
                {
                    let _ = writeln!(deck, "v{p}r{i} {p}r{i} 0 DC {:e}", pl.rail_volts);
                    let _ = writeln!(deck, "r{p}p{i} {node} {p}r{i} {:e}", pl.ohms);
                }
            };
            // low state: an ideal source at the rated VOL
            let low = db.low().expect("a low state");
            if !has_down {
                let p = open(deck);
                let node = format!("{p}n");
                let vol = lv.vol.last().expect("VOL rows").v;
                let _ = writeln!(deck, "v{p}d {node} 0 DC {vol:e}");
                others(deck, &p, &node, true);
                probes.push(Probe {
                    case: c.name,
                    what: format!("driver {} low-state sink current", db.driver()),
                    vector: format!("i(v{p}d)"),
                    want: low.total,
                    tol: I_TOL,
                    sign: 1.0,
                });
            }
            // low state, the guaranteed VOL at the total: a Thevenin source
            if let (false, Some(level), Some((v0, slope))) = (
                has_up || has_down,
                low.level,
                line_through(&lv.vol, low.total),
            ) {
                let p = open(deck);
                let node = format!("{p}n");
                let _ = writeln!(deck, "v{p}d {p}x 0 DC {v0:e}");
                let _ = writeln!(deck, "r{p}o {node} {p}x {slope:e}");
                others(deck, &p, &node, true);
                probes.push(Probe {
                    case: c.name,
                    what: format!("driver {} VOL at {:e} A", db.driver(), low.total),
                    vector: format!("v({node})"),
                    want: level,
                    tol: V_TOL,
                    sign: 1.0,
                });
            }
            // high state of a push-pull or three-state driver
            if let Some(high) = db.high().filter(|_| !has_up) {
                let p = open(deck);
                let node = format!("{p}n");
                let voh = lv.voh.first().expect("VOH rows").v;
                let _ = writeln!(deck, "v{p}d {node} 0 DC {voh:e}");
                others(deck, &p, &node, false);
                probes.push(Probe {
                    case: c.name,
                    what: format!("driver {} high-state source current", db.driver()),
                    vector: format!("i(v{p}d)"),
                    want: high.total,
                    tol: I_TOL,
                    sign: -1.0,
                });
                for (i, it) in db.items(cx, net, false).iter().enumerate() {
                    // each item as ngspice sees it: the current in that element
                    let v = if matches!(it.kind, ItemKind::PullDown { .. }) {
                        let k = nm
                            .pulls()
                            .iter()
                            .position(|pl| pl.at == it.at(cx))
                            .expect("the item's resistor");
                        format!("i(v{p}r{k})")
                    } else {
                        continue;
                    };
                    probes.push(Probe {
                        case: c.name,
                        what: format!("high item {i}: {}", it.describe(cx)),
                        vector: v,
                        want: it.amps,
                        tol: I_TOL,
                        sign: 1.0,
                    });
                }
                if let (false, Some(level), Some((v0, slope))) =
                    (has_down, high.level, line_through(&lv.voh, high.total))
                {
                    let p = open(deck);
                    let node = format!("{p}n");
                    let _ = writeln!(deck, "v{p}d {p}x 0 DC {v0:e}");
                    // V = V0 + slope x I with a negative slope: R_out = -slope from the source to the node
                    let _ = writeln!(deck, "r{p}o {p}x {node} {:e}", -slope);
                    others(deck, &p, &node, false);
                    probes.push(Probe {
                        case: c.name,
                        what: format!("driver {} VOH at {:e} A", db.driver(), high.total),
                        vector: format!("v({node})"),
                        want: level,
                        tol: V_TOL,
                        sign: 1.0,
                    });
                }
            }
            // high state of an open collector: every open-collector output off, the pull-ups
            if d.role == PinRole::OpenCollector {
                let pu = db
                    .pull_up()
                    .expect("the cases give every open collector a pull-up");
                assert!(
                    pu.level > 0.0,
                    "{}: pick a case whose high level stays above 0 V",
                    c.name
                );
                let p = open(deck);
                let node = format!("{p}n");
                let _ = writeln!(deck, "i{p}d {node} 0 DC {:e}", lv.oc_leakage.abs());
                others(deck, &p, &node, false);
                probes.push(Probe {
                    case: c.name,
                    what: format!("driver {} open-collector high level", db.driver()),
                    vector: format!("v({node})"),
                    want: pu.level,
                    tol: V_TOL,
                    sign: 1.0,
                });
                assert_eq!(
                    db.high_level(),
                    Some(pu.level),
                    "{}: the pull-up sets the high level",
                    c.name
                );
                for (i, _) in nm.pulls().iter().enumerate().filter(|(_, pl)| pl.up) {
                    // one pull-up, or equal ones in parallel: each carries its share
                    let share = pu.current * pu.ohms / nm.pulls()[i].ohms;
                    probes.push(Probe {
                        case: c.name,
                        what: format!("pull-up {i} current"),
                        vector: format!("i(v{p}r{i})"),
                        want: share,
                        tol: I_TOL,
                        sign: -1.0,
                    });
                }
            }
        }
    });
}

fn ngspice_present() -> bool {
    Command::new("ngspice")
        .arg("--version")
        .output()
        .is_ok_and(|o| o.status.success())
}

#[test]
fn budgets_agree_with_ngspice_operating_points() {
    if !ngspice_present() {
        notice::skipped(
            "budgets against ngspice operating points",
            "apt-get install -y ngspice",
        );
        return;
    }
    notice::ran("budgets against ngspice operating points");
    let cases = cases();
    assert!(cases.len() >= 30);
    let mut deck = String::from("netmargin budget cross-check\n");
    let mut probes = Vec::new();
    for (k, c) in cases.iter().enumerate() {
        add_case(k, c, &mut deck, &mut probes);
    }
    deck.push_str(".control\nset numdgt=12\nop\n");
    for chunk in probes.chunks(8) {
        let vs: Vec<&str> = chunk.iter().map(|p| p.vector.as_str()).collect();
        let _ = writeln!(deck, "print {}", vs.join(" "));
    }
    // `quit 0`: in batch mode ngspice exits 1 after a control block that ends without it
    deck.push_str("quit 0\n.endc\n.end\n");
    let path = std::env::temp_dir().join(format!("netmargin-xcheck-{}.cir", std::process::id()));
    std::fs::write(&path, &deck).expect("write the deck");
    let out = Command::new("ngspice")
        .arg("-b")
        .arg(&path)
        .output()
        .expect("ngspice runs");
    let _ = std::fs::remove_file(&path);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        out.status.success(),
        "ngspice failed:\n{stdout}\n{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let value = |vector: &str| -> f64 {
        let prefix = format!("{vector} = ");
        let line = stdout
            .lines()
            .find(|l| l.starts_with(&prefix))
            .unwrap_or_else(|| panic!("ngspice printed no {vector}:\n{stdout}\n--- deck\n{deck}"));
        line[prefix.len()..]
            .trim()
            .parse()
            .unwrap_or_else(|e| panic!("{line}: {e}"))
    };
    let mut bad = Vec::new();
    let mut per_case = std::collections::BTreeMap::new();
    for p in &probes {
        let got = p.sign * value(&p.vector);
        *per_case.entry(p.case).or_insert(0) += 1;
        if (got - p.want).abs() > p.tol {
            bad.push(format!(
                "{}: {}: ngspice {got:e}, netmargin {:e}",
                p.case, p.what, p.want
            ));
        }
    }
    assert!(
        bad.is_empty(),
        "{} of {} values disagree:\n{}",
        bad.len(),
        probes.len(),
        bad.join("\n")
    );
    // every case was compared on something, and the kinds of value all came up
    for c in &cases {
        assert!(
            per_case.get(c.name).copied().unwrap_or(0) >= 1,
            "{}: nothing compared",
            c.name
        );
    }
    for kind in [
        "sink current",
        "source current",
        "VOL at",
        "VOH at",
        "open-collector high level",
        "pull-up",
        "pull-down",
    ] {
        assert!(
            probes.iter().any(|p| p.what.contains(kind)),
            "no {kind} compared"
        );
    }
    eprintln!(
        "ngspice agreed on {} values over {} nets",
        probes.len(),
        cases.len()
    );
}
