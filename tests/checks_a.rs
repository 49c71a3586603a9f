//! The checks output-contention, floating-bus, ttl-pull-down-too-large, input-overvoltage and
//! weak-high-drive run through the library on their fixtures and on the demo board. Each test
//! states which nets must fire and which must not, and checks the numbers in the findings
//! against the documents they come from (named beside each value).

use std::collections::BTreeSet;

use netmargin::checks::CheckOptions;
use netmargin::circuit::ModelOptions;
use netmargin::classify::classifier::Rules;
use netmargin::diag::{Diag, Severity};
use netmargin::pipeline::{check_file, RunOptions};

fn run_with(path: &str, check: &str, model: ModelOptions, checks: CheckOptions) -> Vec<Diag> {
    let path = format!("{}/{path}", env!("CARGO_MANIFEST_DIR"));
    let out = check_file(
        &path,
        &Rules::builtin(),
        &RunOptions {
            model,
            checks,
            ..Default::default()
        },
    );
    assert!(out.fatal.is_none(), "{path}: {:?}", out.fatal);
    out.diags.into_iter().filter(|d| d.code == check).collect()
}

fn run(path: &str, check: &str) -> Vec<Diag> {
    run_with(
        path,
        check,
        ModelOptions::default(),
        CheckOptions::default(),
    )
}

fn nets(diags: &[Diag]) -> BTreeSet<String> {
    diags
        .iter()
        .filter_map(|d| d.net.as_deref().map(String::from))
        .collect()
}

fn set(items: &[&str]) -> BTreeSet<String> {
    items.iter().map(|s| s.to_string()).collect()
}

#[track_caller]
fn on<'a>(diags: &'a [Diag], net: &str) -> &'a Diag {
    let found: Vec<&Diag> = diags
        .iter()
        .filter(|d| d.net.as_deref() == Some(net))
        .collect();
    assert_eq!(found.len(), 1, "one finding on {net}: {diags:#?}");
    found[0]
}

#[track_caller]
fn says(d: &Diag, parts: &[&str]) {
    let text = format!("{}\n{}", d.message, d.help.as_deref().unwrap_or(""));
    for p in parts {
        assert!(text.contains(p), "expected `{p}` in:\n{text}");
    }
}

// ---------------------------------------------------------------------------------------------
// output-contention

#[test]
fn output_contention_fixture_fires_where_outputs_fight_and_nowhere_else() {
    for f in [
        "fixtures/checks/output-contention.net",
        "fixtures/checks/output-contention--k8.net",
    ] {
        let d = run(f, "output-contention");
        let errors: Vec<Diag> = d
            .iter()
            .filter(|x| x.severity == Severity::Error)
            .cloned()
            .collect();
        let infos: Vec<Diag> = d
            .iter()
            .filter(|x| x.severity == Severity::Info)
            .cloned()
            .collect();
        // distinct enables, a '125/'126 pair on one select line, wired-AND open collectors,
        // enables tied off, and opposite transceiver sides must not appear
        assert_eq!(
            nets(&errors),
            set(&["+5V", "GND", "/SYNC_N", "/MIX", "/BUS0", "/BUS1", "/LINE_N", "/D0"]),
            "{f}"
        );
        assert_eq!(nets(&infos), set(&["/CLK_BUF"]), "{f}");
        assert_eq!(d.len(), 9, "{f}: {d:#?}");
        // the three-state output tied to GND with its enable tied off is not reported
        assert_eq!(on(&errors, "GND").pins().collect::<Vec<_>>(), vec!["U3.2"]);
        assert_eq!(on(&errors, "+5V").pins().collect::<Vec<_>>(), vec!["U3.4"]);
        // Motorola SN74LS245 truth table: DIR low puts bus B data on bus A, so the A sides of
        // two transceivers sharing DIR are on together
        says(on(&errors, "/D0"), &["/DIR low"]);
        says(on(&errors, "/BUS0"), &["/EN_A_N low"]);
    }
}

#[test]
fn paralleled_gates_report_the_summed_ratings() {
    // TI SDLS025B SN74LS04/LS00: IOL 8 mA, IOH -0.4 mA per output; two outputs: 16 mA, 0.8 mA.
    // Loads: two 74LS inputs, IIL 0.4 mA and IIH 20 uA each (same sheet): 0.8 mA and 40 uA.
    let d = run("fixtures/checks/output-contention.net", "output-contention");
    let p = on(&d, "/CLK_BUF");
    assert_eq!(p.severity, Severity::Info);
    says(
        p,
        &[
            "low 0.80 mA of 16.00 mA IOL (5%)",
            "high 40 uA of 0.80 mA IOH (5%)",
        ],
    );
    assert_eq!(p.pins().collect::<Vec<_>>(), vec!["U9.2", "U9.4"]);
}

#[test]
fn demo_contention_and_paralleled_buffer() {
    let d = run("fixtures/demo/counter-timer.net", "output-contention");
    assert_eq!(nets(&d), set(&["/START_N", "/TB_BUF"]));
    let c = on(&d, "/START_N");
    assert_eq!(c.severity, Severity::Error);
    assert_eq!(c.pins().collect::<Vec<_>>(), vec!["U9.6", "U13.3"]);
    // demo README #17: three 74LS loads, 3 x 0.4 mA = 1.2 mA (TI SDLS025B IIL), against
    // two gates' 2 x 8 mA
    let p = on(&d, "/TB_BUF");
    assert_eq!(p.severity, Severity::Info);
    says(
        p,
        &["low 1.20 mA of 16.00 mA IOL", "high 60 uA of 0.80 mA IOH"],
    );
}

// ---------------------------------------------------------------------------------------------
// floating-bus

#[test]
fn floating_bus_fixture() {
    let d = run("fixtures/checks/floating-bus.net", "floating-bus");
    // a pull-down, TTL loads only, an enable tied on and a push-pull driver keep the others quiet
    assert_eq!(
        nets(&d),
        set(&["/SELA", "/SELB", "/SELC", "/DATA0", "/SELM", "/LATCH_CLK"])
    );
    // a bus that floats between transfers is normal practice (info); it is a warning where a
    // clock input (74HC74 1CLK) sits on it
    for x in &d {
        let want = if x.net.as_deref() == Some("/LATCH_CLK") {
            Severity::Warning
        } else {
            Severity::Info
        };
        assert_eq!(x.severity, want, "{}", x.message);
    }
    says(on(&d, "/LATCH_CLK"), &["U7.3 clocks or latches on it"]);
    // 74HC244 IOZ 5 uA (National MM54HC242, 85 C), 74HC04 input 1 uA (onsemi MM74HC04),
    // VIL at 5.0 V 1.50 V (linear between MM74HC04's 1.35 V at 4.5 V and 1.8 V at 6.0 V):
    // 1.50 V / 6 uA = 250 kOhm; 100 kOhm holds 0.60 V
    says(
        on(&d, "/SELA"),
        &[
            "U1.1 (1OE~) on /EN1_N is high",
            "pull-down of 100 kOhm",
            "6 uA",
            "0.60 V",
            "250 kOhm",
        ],
    );
    // two drivers: 10 uA + 1 uA = 11 uA, 1.50 V / 11 uA = 136 kOhm; half of it rounds to 47 kOhm
    says(
        on(&d, "/SELB"),
        &["/EN2_N", "/EN3_N", "136 kOhm", "47 kOhm", "0.52 V"],
    );
    says(
        on(&d, "/SELC"),
        &["leaves the board through J1.9", "check the other side"],
    );
    // the transceiver is off when DIR selects the other side or OE~ is high
    says(
        on(&d, "/DATA0"),
        &["U5.1 (DIR) on /DIR is high or U5.19 (OE~) on /OE_N is high"],
    );
    // a 74LS load: a pull-up supplying IOZ 5 uA + HC 1 uA + LS IIH 20 uA (TI SDLS025B) = 26 uA
    // against 5.0 - 3.5 V: 57.7 kOhm, so 22 kOhm
    says(
        on(&d, "/SELM"),
        &["pull-up of 22 kOhm to +5V", "26 uA", "57.7 kOhm"],
    );
}

#[test]
fn demo_select_buffer_floats() {
    let d = run("fixtures/demo/counter-timer.net", "floating-bus");
    assert_eq!(nets(&d), set(&["/SEL0", "/SEL1"]));
    // demo README #8: IOZ 5 uA + II 1 uA = 6 uA, 100 kOhm gives 0.60 V
    for n in ["/SEL0", "/SEL1"] {
        says(
            on(&d, n),
            &["U17.1 (1OE~) on /ARM_HC is high", "100 kOhm", "0.60 V"],
        );
    }
}

// ---------------------------------------------------------------------------------------------
// ttl-pull-down-too-large

#[test]
fn ttl_pull_down_fixture() {
    let d = run(
        "fixtures/checks/ttl-pull-down-too-large.net",
        "ttl-pull-down-too-large",
    );
    // 1 kOhm (0.40 V), 2.0 kOhm (exactly 0.80 V), a CMOS input, a driven net and a pull-up pass
    assert_eq!(
        nets(&d),
        set(&["/TEST_EN", "/MODE", "/STD_LINK", "/EXT_EN", "/LINK_C"])
    );
    // TI SDLS025B SN74LS00: IIL -0.4 mA, VIL 0.8 V: 0.4 mA x 10 kOhm = 4.0 V, R_max 2.0 kOhm
    says(
        on(&d, "/TEST_EN"),
        &[
            "0.40 mA x 10 kOhm = 4.00 V",
            "VIL 0.80 V",
            "at most 2 kOhm",
            "1 kOhm (0.40 V",
        ],
    );
    // two inputs: 0.8 mA x 1.5 kOhm = 1.2 V; R_max 0.8 V / 0.8 mA = 1.0 kOhm
    says(
        on(&d, "/MODE"),
        &["0.80 mA x 1.5 kOhm = 1.20 V", "at most 1 kOhm"],
    );
    // Fairchild DM7400 DS006613: IIL -1.6 mA: 1.6 V on 1 kOhm, R_max 500 Ohm
    says(
        on(&d, "/STD_LINK"),
        &["1.60 mA x 1 kOhm = 1.60 V", "at most 500 Ohm"],
    );
    says(
        on(&d, "/EXT_EN"),
        &["while nothing drives the net through J1.3"],
    );
    // 2.2 kOhm: 0.88 V, just above VIL
    says(on(&d, "/LINK_C"), &["0.88 V"]);
}

#[test]
fn demo_test_enable_pull_down() {
    let d = run("fixtures/demo/counter-timer.net", "ttl-pull-down-too-large");
    assert_eq!(nets(&d), set(&["/TEST_EN"]));
    // demo README #7 (TI SDLS025B figures): 4.0 V, at most 2.0 kOhm
    says(on(&d, "/TEST_EN"), &["4.00 V", "2 kOhm"]);
}

// ---------------------------------------------------------------------------------------------
// input-overvoltage

#[test]
fn input_overvoltage_fixture() {
    let d = run("fixtures/checks/input-overvoltage.net", "input-overvoltage");
    // 5 V into 74LVC and 74AHC inputs on +3V3 (5.5 V tolerant: Hitachi HD74LVC04, NXP
    // 74AHC04), a 74LS high (2.7 V) into a 3.3 V HC input, and a +12V pull-up into CD4011B
    // inputs on +12V pass
    assert_eq!(
        nets(&d),
        set(&["/HV_OUT", "/HV_CMOS", "/HC_TO_LV", "/PULL_12", "+5V"])
    );
    // TI SDLS025B: 74LS abs max input 7 V; the CD4011B high is its 12 V supply (National
    // CD4011BC: VOH VDD - 0.05 V guaranteed at light load, 11.95 V)
    says(
        on(&d, "/HV_OUT"),
        &[
            "12.00 V",
            "11.95 V",
            "7.00 V",
            "over by 5.00 V",
            "4.95 V even",
        ],
    );
    // Nexperia 74HC00: clamp at VCC + 0.5 V: 5.50 V at 5 V, 3.80 V at 3.3 V
    says(on(&d, "/HV_CMOS"), &["5.50 V", "over by 6.50 V"]);
    says(
        on(&d, "/HC_TO_LV"),
        &["3.80 V", "over by 1.20 V", "74AHC, 74LV-A, 74LVC or 74LVT"],
    );
    says(
        on(&d, "/PULL_12"),
        &["R1 10 kOhm", "over by 5.00 V", "pull the net up to +5V"],
    );
    says(
        on(&d, "+5V"),
        &["U3 pin 3", "3.80 V", "tie the input to +3V3"],
    );
}

#[test]
fn rail_tolerance_moves_both_ends() {
    // 5 % rails: the 74HC output on +5V reaches 5.25 V, the 3.3 V input's limit drops to
    // 3.135 + 0.5 = 3.635 V: over by 1.615 V (printed 1.62 V)
    let model = ModelOptions {
        rail_tolerance: 0.05,
        ..Default::default()
    };
    let d = run_with(
        "fixtures/checks/input-overvoltage.net",
        "input-overvoltage",
        model,
        CheckOptions::default(),
    );
    says(on(&d, "/HC_TO_LV"), &["5.25 V", "3.63 V", "over by 1.62 V"]);
}

#[test]
fn demo_cmos_on_twelve_volts_into_ttl() {
    let d = run("fixtures/demo/counter-timer.net", "input-overvoltage");
    // /DOOR_SW (100k to +12V into the CD4011B on +12V) must not fire
    assert_eq!(nets(&d), set(&["/HV_SENSE"]));
    // demo README #19: 11.95 V against 7 V, over by 4.95 V at the guaranteed level
    let h = on(&d, "/HV_SENSE");
    says(h, &["11.95 V", "7.00 V", "4.95 V"]);
    assert_eq!(
        h.pins().collect::<Vec<_>>(),
        vec!["U24.4", "U24.5", "U23.3"]
    );
}

// ---------------------------------------------------------------------------------------------
// weak-high-drive

#[test]
fn weak_high_drive_fixture() {
    for f in [
        "fixtures/checks/weak-high-drive.net",
        "fixtures/checks/weak-high-drive--k8.net",
    ] {
        let d = run(f, "weak-high-drive");
        // a sinking LED, a reversed LED, a CMOS driver, 10 kOhm (25 %), two LEDs in series
        // (3.4 V needed) and a 74LS125 bus output (IOH 15 mA) pass
        assert_eq!(
            nets(&d),
            set(&["/LAMP_GATE", "/LAMP_LOADED", "/LAMP_STD"]),
            "{f}"
        );
        // TI SDLS025B SN74LS04: VOH 2.7 V, IOH 0.4 mA; red LED 1.7 V (common practice)
        says(
            on(&d, "/LAMP_GATE"),
            &[
                "(2.70 V - 1.70 V) / 330 Ohm = 3.03 mA",
                "758%",
                "470 Ohm",
                "5.96 mA",
            ],
        );
        // 1.0 V / 3.3 kOhm = 0.30 mA plus three IIH of 20 uA: 0.36 mA, 91 % (above the 80 %
        // derating, below the rating)
        says(
            on(&d, "/LAMP_LOADED"),
            &["0.30 mA", "60 uA", "91%", "above the 80% derating"],
        );
        // Fairchild DM7400 family: VOH 2.4 V at -0.4 mA, IOL 16 mA at 0.4 V
        says(
            on(&d, "/LAMP_STD"),
            &[
                "(2.40 V - 1.70 V) / 1 kOhm = 0.70 mA",
                "175%",
                "IOL 16.00 mA",
            ],
        );
    }
}

#[test]
fn led_forward_voltage_and_derating_are_options() {
    // a green LED taken at 2.1 V (common practice, from memory): (2.7 - 2.1) / 330 = 1.82 mA
    let model = ModelOptions {
        led_vf: 2.1,
        ..Default::default()
    };
    let d = run_with(
        "fixtures/checks/weak-high-drive.net",
        "weak-high-drive",
        model,
        CheckOptions::default(),
    );
    says(on(&d, "/LAMP_GATE"), &["1.82 mA"]);
    // (2.7 - 2.1) / 3.3 kOhm + 60 uA = 0.24 mA: 60 %, below the derating now
    assert!(!nets(&d).contains("/LAMP_LOADED"));
    // with a 95 % derating the 91 % net passes
    let checks = CheckOptions {
        derating: 0.95,
        ..Default::default()
    };
    let d = run_with(
        "fixtures/checks/weak-high-drive.net",
        "weak-high-drive",
        ModelOptions::default(),
        checks,
    );
    assert_eq!(nets(&d), set(&["/LAMP_GATE", "/LAMP_STD"]));
}

#[test]
fn demo_gate_lamp() {
    let d = run("fixtures/demo/counter-timer.net", "weak-high-drive");
    assert_eq!(nets(&d), set(&["/GATE_LED"]));
    // demo README #13: 3.0 mA against 0.4 mA (758 %); 470 Ohm from +5V gives 6.0 mA
    says(
        on(&d, "/GATE_LED"),
        &["3.03 mA", "758%", "470 Ohm", "5.96 mA"],
    );
}

#[test]
fn clean_boards_stay_clean() {
    for f in [
        "fixtures/boards/clean-k5.net",
        "fixtures/boards/clean-k8.net",
        "fixtures/boards/hobby-k8.net",
    ] {
        for c in [
            "output-contention",
            "floating-bus",
            "ttl-pull-down-too-large",
            "input-overvoltage",
            "weak-high-drive",
        ] {
            let d = run(f, c);
            assert!(d.is_empty(), "{f}: {c}: {d:#?}");
        }
    }
}
