//! Worked examples from data books and textbooks, computed through the library on small
//! netlists (text -> netlist model -> classification -> electrical model -> budgets and
//! checks), so each number is the one `netmargin check` would use.
//!
//! Figures and their sources (the shipped families table carries the same ones):
//! * DM7403 (National, open-collector 7403): IOL 16 mA at VOL 0.4 V, ICEX (off-state
//!   leakage) 250 uA at VO 5.5 V.
//! * DM7400 (Fairchild DS006613): IOL 16 mA, IOH -0.4 mA, IIL -1.6 mA, IIH 40 uA, VOH 2.4 V.
//! * SN74LS00 (TI SDLS025B): IOL 8 mA (VOL 0.5 V), IOH -0.4 mA, IIL -0.4 mA, IIH 20 uA,
//!   VIH 2.0 V, VOH 2.7 V at -0.4 mA.
//! * 74LS05 (NTE74LS05): IOL 8 mA at VOL 0.5 V, off-state IOH 0.1 mA at 5.5 V.
//! * MM74HC04 (onsemi): VIH 3.15 V at VCC 4.5 V, 4.2 V at 6.0 V.
//! * The pull-up equations printed on the National DM74LS03 / DM74LS12 / DM74S09 open-collector
//!   sheets: R_MAX = (VCC(min) - VOH) / (N1 IOH + N2 IIH), R_MIN = (VCC(max) - VOL) /
//!   (IOL - N3 IIL); netmargin takes the required high level VOH as the loads' VIH min.

mod support;

use netmargin::checks::CheckOptions;
use netmargin::circuit::ModelOptions;
use netmargin::classify::classifier::Rules;
use netmargin::diag::Severity;
use netmargin::pipeline::{check_source, RunOptions};
use netmargin::source::SourceFile;
use support::{budget, net_index, with_circuit, Board};

fn close(got: f64, want: f64, tol: f64, what: &str) {
    assert!(
        (got - want).abs() <= tol,
        "{what}: got {got}, want {want} (within {tol})"
    );
}

/// Findings of one check on a board.
fn findings(b: &Board, id: &str, model: ModelOptions) -> Vec<(Severity, String)> {
    let src = SourceFile::new("bench.net", b.text());
    let opts = RunOptions {
        model,
        checks: CheckOptions {
            disabled: netmargin::checks::REGISTRY
                .iter()
                .map(|c| c.id.to_string())
                .filter(|c| c != id)
                .collect(),
            ..CheckOptions::default()
        },
        ..RunOptions::default()
    };
    let checked = check_source(&src, &Rules::builtin(), &opts).expect("bench netlist checks");
    checked
        .diags
        .into_iter()
        .filter(|d| d.code == id)
        .map(|d| (d.severity, d.message.into()))
        .collect()
}

/// A 7403 gate (inputs tied high) whose output 1Y drives five 74LS00 inputs on `/WIRED_N`,
/// with the given pull-ups to +5V.
fn oc_board(pull_ups: &[&str]) -> Board {
    let mut b = Board::default();
    b.logic14("U1", "7403", "+5V").net("+5V", &["U1.1", "U1.2"]);
    b.logic14("U2", "74LS00", "+5V")
        .logic14("U3", "74LS00", "+5V");
    b.net(
        "/WIRED_N",
        &["U1.3", "U2.1", "U2.2", "U2.4", "U2.5", "U3.1"],
    );
    for (i, r) in pull_ups.iter().enumerate() {
        b.resistor(&format!("R{}", i + 1), r, "+5V", "/WIRED_N");
    }
    b
}

#[test]
fn open_collector_pull_up_window_for_a_7403_with_five_74ls_loads() {
    // R_min = (5.0 - 0.4) / (16 mA - 5 x 0.4 mA) = 4.6 / 14 mA = 328.57 Ohm
    // R_max = (5.0 - 2.0) / (1 x 250 uA + 5 x 20 uA) = 3.0 / 350 uA = 8571.4 Ohm
    with_circuit(&oc_board(&["4K7"]).text(), ModelOptions::default(), |cx| {
        let w = budget(cx, "/WIRED_N")
            .window
            .expect("an open-collector net has a window");
        close(w.iol, 16e-3, 1e-12, "IOL, DM7403");
        close(w.vol, 0.4, 1e-12, "VOL, DM7403");
        close(w.sum_iil, 5.0 * 0.4e-3, 1e-12, "N3 x IIL, SN74LS00");
        close(
            w.sum_high,
            250e-6 + 5.0 * 20e-6,
            1e-12,
            "N1 x IOH + N2 x IIH",
        );
        close(w.r_min, 4.6 / 14e-3, 1e-6, "R_min");
        close(
            w.r_max.expect("loads set R_max"),
            3.0 / 350e-6,
            1e-6,
            "R_max",
        );
        close(
            w.fitted.expect("R1 is fitted"),
            4700.0,
            1e-9,
            "fitted pull-up",
        );
    });
}

#[test]
fn open_collector_window_takes_each_end_at_its_worst_supply() {
    // The sheets' equations use VCC(max) for R_min and VCC(min) for R_max: at 5 V +- 5 %
    // (4.75..5.25 V, the 74-series recommended range): R_min = (5.25 - 0.4) / 14 mA = 346.43 Ohm,
    // R_max = (4.75 - 2.0) / 350 uA = 7857.1 Ohm.
    let opts = ModelOptions {
        rail_tolerance: 0.05,
        ..ModelOptions::default()
    };
    with_circuit(&oc_board(&["4K7"]).text(), opts, |cx| {
        let w = budget(cx, "/WIRED_N").window.expect("window");
        close(w.r_min, 4.85 / 14e-3, 1e-6, "R_min at VCC max");
        close(
            w.r_max.expect("R_max"),
            2.75 / 350e-6,
            1e-6,
            "R_max at VCC min",
        );
    });
}

#[test]
fn open_collector_high_level_counts_its_own_leakage() {
    // The high state of an open collector is the output turned off: V = VCC - R (N1 IOH + N2 IIH)
    // = 5.0 - 8.2 kOhm x 350 uA = 2.13 V for the 7403 and five 74LS loads.
    with_circuit(&oc_board(&["8K2"]).text(), ModelOptions::default(), |cx| {
        let b = budget(cx, "/WIRED_N");
        let pu = b.drivers[0].pull_up().expect("a pull-up");
        close(
            pu.current,
            350e-6,
            1e-12,
            "current through the pull-up in the high state",
        );
        close(pu.level, 5.0 - 8200.0 * 350e-6, 1e-9, "high level");
        close(
            b.drivers[0]
                .high_level()
                .expect("the pull-up sets the high"),
            2.13,
            1e-9,
            "high level",
        );
    });
}

#[test]
fn pull_ups_on_either_side_of_the_window() {
    // 220 Ohm < R_min 328.6 Ohm: error; 10 kOhm > R_max 8.57 kOhm: warning; 4K7 and 330 Ohm inside
    let f = findings(
        &oc_board(&["220"]),
        "pull-up-out-of-range",
        ModelOptions::default(),
    );
    assert_eq!(f.len(), 1, "{f:?}");
    assert_eq!(f[0].0, Severity::Error);
    assert!(
        f[0].1
            .contains("R_min = (5.00 V - 0.40 V) / (16.00 mA - 2.00 mA) = 329 Ohm"),
        "{}",
        f[0].1
    );
    let f = findings(
        &oc_board(&["10k"]),
        "pull-up-out-of-range",
        ModelOptions::default(),
    );
    assert_eq!(f.len(), 1, "{f:?}");
    assert_eq!(f[0].0, Severity::Warning);
    assert!(f[0].1.contains("8.57 kOhm"), "{}", f[0].1);
    for inside in ["330", "4K7", "8K2"] {
        let f = findings(
            &oc_board(&[inside]),
            "pull-up-out-of-range",
            ModelOptions::default(),
        );
        assert!(f.is_empty(), "{inside}: {f:?}");
    }
    // two 560 Ohm in parallel are 280 Ohm: below R_min
    let f = findings(
        &oc_board(&["560", "560"]),
        "pull-up-out-of-range",
        ModelOptions::default(),
    );
    assert_eq!(f.len(), 1, "{f:?}");
    assert!(f[0].1.contains("280 Ohm"), "{}", f[0].1);
}

/// A 74LS04 output (1Y) into a 74HC00 input (1A) on `/CLK`; the 74LS04 on +5V, the 74HC00 on
/// `hc_rail`.
fn ls_into_hc(hc_rail: &str) -> Board {
    let mut b = Board::default();
    b.logic14("U1", "74LS04", "+5V").net("GND", &["U1.1"]);
    b.logic14("U2", "74HC00", hc_rail).net("GND", &["U2.2"]);
    b.net("/CLK", &["U1.2", "U2.1"]);
    b
}

#[test]
fn ls_high_into_hc_input_at_4v5_and_5v() {
    // 74LS VOH 2.7 V (SN74LS00) against 74HC VIH 3.15 V at 4.5 V (MM74HC04): short by 0.45 V.
    // At 5.0 V the HC figure lies between the 4.5 and 6.0 V rows: 3.15 + (4.2 - 3.15) x 0.5 / 1.5
    // = 3.50 V (the textbook 0.7 VCC), short by 0.80 V.
    for (rail, vih, short) in [("+4V5", 3.15, 0.45), ("+5V", 3.50, 0.80)] {
        with_circuit(&ls_into_hc(rail).text(), ModelOptions::default(), |cx| {
            let b = budget(cx, "/CLK");
            close(
                b.drivers[0].high_level().expect("VOH"),
                2.7,
                1e-9,
                "74LS VOH",
            );
            let m = b
                .margins(cx, net_index(cx, "/CLK"))
                .next()
                .expect("a margin");
            close(m.vih, vih, 1e-9, "74HC VIH");
            close(m.high_margin.expect("margin"), -short, 1e-9, "high margin");
        });
        let f = findings(
            &ls_into_hc(rail),
            "ttl-high-into-cmos",
            ModelOptions::default(),
        );
        assert_eq!(f.len(), 1, "{rail}: {f:?}");
        assert!(
            f[0].1.contains(&format!("short by {short:.2} V")),
            "{}",
            f[0].1
        );
    }
}

/// A driver (`drv`, a 14-pin hex inverter or quad NAND value, output on pin 2 or 3) into `n`
/// inputs of `load` quad NANDs on `/FAN`.
fn fan_board(drv: &str, load: &str, n: usize) -> Board {
    let mut b = Board::default();
    b.logic14("U1", drv, "+5V");
    let out = if drv.ends_with("04") { "U1.2" } else { "U1.3" };
    let mut nodes = vec![out.to_string()];
    for k in 0..n.div_ceil(4) {
        let r = format!("U{}", k + 2);
        b.logic14(&r, load, "+5V");
        for p in ["1", "2", "4", "5"] {
            if nodes.len() <= n {
                nodes.push(format!("{r}.{p}"));
            }
        }
    }
    let refs: Vec<&str> = nodes.iter().map(|s| s.as_str()).collect();
    b.net("/FAN", &refs);
    b
}

/// The largest number of loads whose low- and high-state budgets both stay within the
/// driver's ratings, by the library's own budgets.
fn fan_out(drv: &str, load: &str) -> (usize, &'static str) {
    let mut last = (0, "");
    for n in 1..=45 {
        let (lo, hi) = with_circuit(
            &fan_board(drv, load, n).text(),
            ModelOptions::default(),
            |cx| {
                let b = budget(cx, "/FAN");
                let d = &b.drivers[0];
                (
                    d.low().expect("low").ratio(),
                    d.high().expect("high").ratio(),
                )
            },
        );
        if lo > 1.0 + 1e-9 || hi > 1.0 + 1e-9 {
            return last;
        }
        last = (n, if lo >= hi { "low" } else { "high" });
    }
    panic!("{drv} into {load}: no limit within 45 loads")
}

#[test]
fn fan_out_by_unit_load_arithmetic() {
    // fan-out = min(IOL / IIL, IOH / IIH), the data-book unit-load arithmetic:
    //   7400 into 7400:   16 / 1.6 = 10,  0.4 / 0.04 = 10  -> 10
    //   74LS into 74LS:   8 / 0.4 = 20,   0.4 / 0.02 = 20  -> 20
    //   7400 into 74LS:   16 / 0.4 = 40,  0.4 / 0.02 = 20  -> 20, set by the high state
    //   74LS into 7400:   8 / 1.6 = 5,    0.4 / 0.04 = 10  -> 5, set by the low state
    assert_eq!(fan_out("7404", "7400").0, 10);
    assert_eq!(fan_out("74LS04", "74LS00").0, 20);
    assert_eq!(fan_out("7404", "74LS00"), (20, "high"));
    assert_eq!(fan_out("74LS04", "7400"), (5, "low"));
}

#[test]
fn fanout_check_at_the_limit_and_one_past_it() {
    // at exactly the rated fan-out a warning (above the 80 % derating), one more an error
    for (drv, load, n) in [
        ("7404", "7400", 10),
        ("74LS04", "74LS00", 20),
        ("74LS04", "7400", 5),
    ] {
        let at = findings(
            &fan_board(drv, load, n),
            "fanout-overrun",
            ModelOptions::default(),
        );
        assert!(
            !at.is_empty() && at.iter().all(|(s, _)| *s == Severity::Warning),
            "{drv} x{n}: {at:?}"
        );
        let past = findings(
            &fan_board(drv, load, n + 1),
            "fanout-overrun",
            ModelOptions::default(),
        );
        assert!(
            past.iter().any(|(s, _)| *s == Severity::Error),
            "{drv} x{}: {past:?}",
            n + 1
        );
    }
    // 74LS into 74LS: 16 loads are 80 %, not above the derating; 17 are
    let f = findings(
        &fan_board("74LS04", "74LS00", 16),
        "fanout-overrun",
        ModelOptions::default(),
    );
    assert!(f.is_empty(), "{f:?}");
    let f = findings(
        &fan_board("74LS04", "74LS00", 17),
        "fanout-overrun",
        ModelOptions::default(),
    );
    assert_eq!(f.len(), 2, "{f:?}");
    assert!(
        f[0].1.contains("6.80 mA") && f[0].1.contains("85%"),
        "{}",
        f[0].1
    );
}

#[test]
fn weak_pull_up_on_an_open_collector_reported_with_its_level() {
    // 74LS05 (off-state 0.1 mA, NTE74LS05) and one 74LS00 input (IIH 20 uA, VIH 2.0 V) on
    // 33 kOhm: 5.0 - 33 kOhm x 120 uA = 1.04 V, short of 2.0 V by 0.96 V; on 22 kOhm 2.36 V
    let board = |r: &str| {
        let mut b = Board::default();
        b.logic14("U1", "74LS05", "+5V")
            .logic14("U2", "74LS00", "+5V");
        b.net("/IRQ_N", &["U1.2", "U2.1"])
            .resistor("R1", r, "+5V", "/IRQ_N");
        b
    };
    let f = findings(&board("33k"), "level-mismatch", ModelOptions::default());
    assert_eq!(f.len(), 1, "{f:?}");
    assert!(
        f[0].1
            .contains("pulls the net up to 1.04 V: short by 0.96 V"),
        "{}",
        f[0].1
    );
    let f = findings(&board("22k"), "level-mismatch", ModelOptions::default());
    assert!(f.is_empty(), "{f:?}");
}

/// A rail whose only pin is the pull resistor (KiCad writes it as a one-node net) is still a
/// rail: the resistor is a pull-down to it. IIL x R = 0.4 mA x 10 kOhm = 4.0 V > VIL 0.8 V
/// (TI SDLS025B figures), so the input is held high, not low.
#[test]
fn a_rail_net_holding_only_the_pull_resistor_still_counts() {
    let text = r#"(export (version "E")
  (components
    (comp (ref "U1") (value "74LS00") (libsource (lib "x") (part "74LS00")))
    (comp (ref "R1") (value "10k") (libsource (lib "x") (part "R"))))
  (libparts
    (libpart (lib "x") (part "74LS00")
      (pins (pin (num "1") (name "1A") (type "input")) (pin (num "2") (name "1B") (type "input"))
            (pin (num "7") (name "GND") (type "power_in")) (pin (num "14") (name "VCC") (type "power_in"))))
    (libpart (lib "x") (part "R") (pins (pin (num "1") (name "~") (type "passive")) (pin (num "2") (name "~") (type "passive")))))
  (nets
    (net (code "1") (name "+5V") (node (ref "U1") (pin "14")) (node (ref "U1") (pin "2")))
    (net (code "2") (name "/HOLD") (node (ref "U1") (pin "1")) (node (ref "R1") (pin "1")))
    (net (code "3") (name "GNDREF") (node (ref "R1") (pin "2")))
    (net (code "4") (name "GND") (node (ref "U1") (pin "7")))))
"#;
    let src = netmargin::source::SourceFile::new("t.net", text);
    let rules = netmargin::classify::classifier::Rules::builtin();
    let out = netmargin::pipeline::check_source(&src, &rules, &Default::default()).unwrap();
    let codes: Vec<&str> = out.diags.iter().map(|d| d.code.as_ref()).collect();
    assert!(codes.contains(&"ttl-pull-down-too-large"), "{codes:?}");
    assert!(!codes.contains(&"floating-ttl-input"), "{codes:?}");
}

/// A bussed resistor network (`RN1`, `4K7x4`, common pin on +5V) is four pull-ups, one per
/// element: each open-collector net gets 4.7 kOhm. With one 74LS load the window is
/// R_min = (5.00 - 0.5) / (8 mA - 0.4 mA) = 592 Ohm and R_max = (5.00 - 2.0) / (20 uA + 100 uA)
/// = 25 kOhm (TI SDLS025B input figures; 74LS05 off-state leakage 0.1 mA, NTE74LS05), so
/// 4.7 kOhm is inside and no net is reported as missing its pull-up.
#[test]
fn a_bussed_resistor_network_is_one_pull_up_per_element() {
    let mut nets = String::new();
    for k in 0..4 {
        let out = [2, 4, 6, 8][k];
        let inp = [1, 2, 4, 5][k];
        nets.push_str(&format!(
            "    (net (code \"{c}\") (name \"/OC{k}\") (node (ref \"U1\") (pin \"{out}\")) (node (ref \"RN1\") (pin \"{p}\")) (node (ref \"U2\") (pin \"{inp}\")))\n",
            c = k + 10,
            p = k + 2
        ));
    }
    let text = format!(
        r#"(export (version "E")
  (components
    (comp (ref "U1") (value "74LS05") (libsource (lib "x") (part "74LS05")))
    (comp (ref "U2") (value "74LS00") (libsource (lib "x") (part "74LS00")))
    (comp (ref "RN1") (value "4K7x4") (libsource (lib "x") (part "RN5"))))
  (libparts
    (libpart (lib "x") (part "RN5")
      (pins (pin (num "1") (name "C") (type "passive")) (pin (num "2") (name "R1") (type "passive")) (pin (num "3") (name "R2") (type "passive"))
            (pin (num "4") (name "R3") (type "passive")) (pin (num "5") (name "R4") (type "passive")))))
  (nets
    (net (code "1") (name "+5V") (node (ref "RN1") (pin "1")) (node (ref "U1") (pin "14")) (node (ref "U2") (pin "14")))
    (net (code "2") (name "GND") (node (ref "U1") (pin "7")) (node (ref "U2") (pin "7")))
{nets}))
"#
    );
    let src = netmargin::source::SourceFile::new("rn.net", text.clone());
    let rules = netmargin::classify::classifier::Rules::builtin();
    let tree = netmargin::sexpr::parse(&text).unwrap();
    let nl = netmargin::netlist::build(&tree).unwrap();
    let cl = netmargin::classify::classifier::classify(&nl, &rules);
    let cx = netmargin::circuit::build(&nl, &cl, &rules, Default::default());
    for k in 0..4 {
        let net = nl.net_by_name(&format!("/OC{k}")).unwrap();
        let pulls = &cx.nets[net].pulls();
        assert_eq!(pulls.len(), 1, "/OC{k}: {pulls:?}");
        assert!(
            (pulls[0].ohms - 4700.0).abs() < 1e-9
                && pulls[0].up
                && (pulls[0].rail_volts - 5.0).abs() < 1e-12
        );
        let w = netmargin::circuit::budget::net_budget(&cx, net)
            .window
            .expect("an open-collector window");
        assert!((w.r_min - 4.5 / 7.6e-3).abs() < 1e-6, "{}", w.r_min);
        assert!(
            (w.r_max.unwrap() - 3.0 / 120e-6).abs() < 1e-6,
            "{:?}",
            w.r_max
        );
    }
    let out = netmargin::pipeline::check_source(&src, &rules, &Default::default()).unwrap();
    let codes: Vec<&str> = out.diags.iter().map(|d| d.code.as_ref()).collect();
    assert!(
        !codes.contains(&"missing-pull-up") && !codes.contains(&"pull-up-out-of-range"),
        "{codes:?}"
    );
}

/// An isolated network (a DIP-8 of four separate resistors, pins 1-8, 2-7, 3-6, 4-5; common
/// practice for the package) with pins 5 to 8 on +5V is four pull-ups of its element value.
#[test]
fn an_isolated_resistor_network_pairs_pins_across_the_package() {
    let mut nets = String::new();
    for k in 0..4 {
        nets.push_str(&format!(
            "    (net (code \"{c}\") (name \"/IN{k}\") (node (ref \"RN1\") (pin \"{p}\")) (node (ref \"U1\") (pin \"{inp}\")))\n",
            c = k + 10,
            p = k + 1,
            inp = [1, 2, 4, 5][k]
        ));
    }
    let text = format!(
        r#"(export (version "E")
  (components
    (comp (ref "U1") (value "74HC00") (libsource (lib "x") (part "74HC00")))
    (comp (ref "RN1") (value "10k 4x") (libsource (lib "x") (part "RN8"))))
  (libparts
    (libpart (lib "x") (part "RN8")
      (pins (pin (num "1") (type "passive")) (pin (num "2") (type "passive")) (pin (num "3") (type "passive")) (pin (num "4") (type "passive"))
            (pin (num "5") (type "passive")) (pin (num "6") (type "passive")) (pin (num "7") (type "passive")) (pin (num "8") (type "passive")))))
  (nets
    (net (code "1") (name "+5V") (node (ref "RN1") (pin "5")) (node (ref "RN1") (pin "6")) (node (ref "RN1") (pin "7")) (node (ref "RN1") (pin "8")) (node (ref "U1") (pin "14")))
    (net (code "2") (name "GND") (node (ref "U1") (pin "7")))
{nets}))
"#
    );
    let rules = netmargin::classify::classifier::Rules::builtin();
    let tree = netmargin::sexpr::parse(&text).unwrap();
    let nl = netmargin::netlist::build(&tree).unwrap();
    let cl = netmargin::classify::classifier::classify(&nl, &rules);
    let cx = netmargin::circuit::build(&nl, &cl, &rules, Default::default());
    for k in 0..4 {
        let net = nl.net_by_name(&format!("/IN{k}")).unwrap();
        let pulls = &cx.nets[net].pulls();
        assert_eq!(pulls.len(), 1, "/IN{k}: {pulls:?}");
        assert!((pulls[0].ohms - 10e3).abs() < 1e-9 && pulls[0].up);
    }
}

/// With a 10 % rail tolerance a 74HC input's VIH is checked at the top of its supply: at
/// 5.50 V it is 3.85 V (onsemi MM74HC04 data sheet: "the VIH value at 5.5 V is 3.85 V"), so a
/// 74LS high of 2.70 V (TI SDLS025B) is short by 1.15 V; the message says which supply it used.
#[test]
fn a_rail_tolerance_takes_a_cmos_vih_at_the_top_of_the_supply() {
    let text = r#"(export (version "E")
  (components
    (comp (ref "U1") (value "74LS04") (libsource (lib "x") (part "74LS04")))
    (comp (ref "U2") (value "74HC00") (libsource (lib "x") (part "74HC00"))))
  (nets
    (net (code "1") (name "+5V") (node (ref "U1") (pin "14")) (node (ref "U2") (pin "14")) (node (ref "U2") (pin "2")))
    (net (code "2") (name "GND") (node (ref "U1") (pin "7")) (node (ref "U2") (pin "7")) (node (ref "U1") (pin "1")))
    (net (code "3") (name "/X") (node (ref "U1") (pin "2")) (node (ref "U2") (pin "1")))))
"#;
    let src = netmargin::source::SourceFile::new("tol.net", text);
    let rules = netmargin::classify::classifier::Rules::builtin();
    let mut opts = netmargin::pipeline::RunOptions::default();
    let msg = |opts: &netmargin::pipeline::RunOptions| {
        let out = netmargin::pipeline::check_source(&src, &rules, opts).unwrap();
        out.diags
            .iter()
            .find(|d| d.code == "ttl-high-into-cmos")
            .map(|d| d.message.clone())
            .expect("the finding")
    };
    let nominal = msg(&opts);
    assert!(
        nominal.contains("needs 3.50 V") && nominal.contains("short by 0.80 V"),
        "{nominal}"
    );
    opts.model.rail_tolerance = 0.10;
    let worst = msg(&opts);
    assert!(worst.contains("needs 3.85 V"), "{worst}");
    assert!(
        worst.contains("(VIH taken at 5.50 V, the top of the rail tolerance)"),
        "{worst}"
    );
    assert!(worst.contains("short by 1.15 V"), "{worst}");
}
