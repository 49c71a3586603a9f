//! LEDs and resistors on logic outputs: the operating points the model solves
//! (`circuit::budget::OperatingPoint`) against a hand calculation with the data-sheet figures
//! named beside each value, and against ngspice's DC operating point of the same elements
//! (Debian's `ngspice`; without it the cross-check fails under `CI` and otherwise says so and
//! passes).
//!
//! The model takes an output as its supply (or ground) behind the resistance its rated
//! data-sheet row implies, and an LED as a constant forward voltage by colour (red 1.7 V,
//! white 3.0 V, green 2.1 V: common practice, from memory). ngspice is given exactly those
//! elements, so it checks the solver and the wiring the model found, not the LED physics.

mod support;

#[path = "notice/mod.rs"]
mod notice;

use std::fmt::Write as _;
use std::process::Command;

use netmargin::circuit::budget::{net_budget, OperatingPoint};
use netmargin::circuit::ModelOptions;
use support::{net_index, with_circuit};

const FIXTURE: &str = "fixtures/checks/output-load-current.net";

/// The operating point of the first driver on `net` in the high (`high`) or low state.
fn point(net: &str, high: bool) -> OperatingPoint {
    let text = std::fs::read_to_string(FIXTURE).unwrap();
    with_circuit(&text, ModelOptions::default(), |cx| {
        let b = net_budget(cx, net_index(cx, net));
        let d = &b.drivers[0];
        if high {
            d.drive_high().cloned()
        } else {
            d.drive_low().cloned()
        }
        .unwrap_or_else(|| panic!("{net}: no operating point"))
    })
}

fn near(got: f64, want: f64, tol: f64, what: &str) {
    assert!(
        (got - want).abs() <= tol,
        "{what}: got {got}, want {want} (+-{tol})"
    );
}

#[test]
fn a_74hc_output_and_a_red_led_by_hand() {
    // 74HC at 5.0 V, a third of the way from the onsemi MM74HC04 rows at 4.5 V (VOH 3.84 V at
    // -4.0 mA) to 6.0 V (5.34 V at -5.2 mA): VOH 4.34 V at -4.4 mA, so (5.0 - 4.34) / 4.4 mA
    // = 150 Ohm. Red LED 1.7 V (common practice, from memory).
    let p = point("/IND_RUN", true);
    near(p.r_out, 150.0, 0.5, "74HC high-state resistance");
    near(p.rating, 4.4e-3, 1e-6, "74HC IOH at 5 V");
    // 100 Ohm: (5.0 - 1.7) / (100 + 150) = 13.2 mA; the pin at 5.0 - 13.2 mA x 150 = 3.02 V
    near(p.total, 13.2e-3, 2e-5, "100 Ohm and a red LED");
    near(p.level, 3.02, 0.005, "the pin's level");
    assert!(p.total > p.rating, "over the rated IOH");
    // 1 kOhm: 3.3 / 1150 = 2.87 mA, within the rating
    let p = point("/IND_HOLD", true);
    near(p.total, 3.3 / 1150.0, 2e-6, "1 kOhm and a red LED");
    assert!(p.total < p.rating);
    // sunk from +5 V with no resistor: VOL 0.33 V at 4.4 mA is 75 Ohm, 3.3 / 75 = 44 mA,
    // beyond the 25 mA absolute maximum of TI SCLS181E (from memory; TI SCLS062F, read, gives
    // the same for the 74HCT00)
    let p = point("/IND_OVF", false);
    near(p.r_out, 75.0, 0.5, "74HC low-state resistance");
    near(p.total, 0.044, 5e-5, "a bare LED sunk");
    assert!(p.total > 0.025);
}

#[test]
fn a_4000b_output_and_its_transistor_dissipation_by_hand() {
    // National CD4011BC at 5 V: IOH -0.36 mA at VO 4.6 V (85 C), so 0.4 V / 0.36 mA = 1.11 kOhm
    let p = point("/IND_AUX", true);
    near(p.r_out, 0.4 / 0.36e-3, 0.5, "CD4011B high-state resistance");
    // 470 Ohm and a red LED: 3.3 / (470 + 1111) = 2.09 mA, 580 % of the rated 0.36 mA
    near(
        p.total,
        3.3 / (470.0 + 0.4 / 0.36e-3),
        2e-6,
        "470 Ohm and a red LED",
    );
    assert!(p.total > p.rating);
    // the output transistor drops 2.09 mA x 1.11 kOhm = 2.32 V: 4.8 mW, within the 100 mW
    // a TI CD4027B sheet (JAJSM64D) rates per output transistor
    let watts = p.total * (p.rail - p.level);
    near(
        watts,
        4.84e-3,
        0.05e-3,
        "dissipation in the output transistor",
    );
}

#[test]
fn strings_that_need_more_than_the_output_reaches_are_dark() {
    // two white LEDs, 3.0 V each (common practice): 6.0 V from a 5 V output
    let p = point("/IND_GATE_W", true);
    assert_eq!(p.loads.len(), 1);
    assert!(p.loads[0].dark, "two white LEDs from 5 V");
    near(p.loads[0].vf, 6.0, 1e-9, "two white LEDs");
    assert_eq!(p.loads[0].amps, 0.0);
    // red + green (1.7 + 2.1 V) from a 3.3 V 74LVC04
    let p = point("/IND_REM", true);
    assert!(p.loads[0].dark, "red and green from 3.3 V");
    near(p.loads[0].vf, 3.8, 1e-9, "red and green");
    // one red LED is not dark
    assert!(!point("/IND_RUN", true).loads[0].dark);
}

fn ngspice_present() -> bool {
    Command::new("ngspice")
        .arg("--version")
        .output()
        .is_ok_and(|o| o.status.success())
}

#[test]
fn operating_points_agree_with_ngspice() {
    if !ngspice_present() {
        notice::skipped(
            "LED operating points against ngspice",
            "apt-get install -y ngspice",
        );
        return;
    }
    notice::ran("LED operating points against ngspice");
    // (net, high state, series ohms of the load, forward volts, the load's rail)
    let cases = [
        ("/IND_RUN", true, 100.0, 1.7, 0.0),
        ("/IND_GATE", true, 100.0, 1.7, 0.0),
        ("/IND_HOLD", true, 1000.0, 1.7, 0.0),
        ("/IND_ARM", false, 1000.0, 1.7, 5.0),
        ("/IND_OVF", false, 0.0, 1.7, 5.0),
        ("/TEST_LOAD", true, 10.0, 0.0, 0.0),
        ("/IND_LOCAL", true, 2200.0, 2.1, 0.0),
        ("/IND_AUX", true, 470.0, 1.7, 0.0),
    ];
    let mut deck = String::from("netmargin LED cross-check\n");
    let mut want = Vec::new();
    for (k, (net, high, ohms, vf, rail)) in cases.iter().enumerate() {
        let p = point(net, *high);
        let r_load = if *ohms > 0.0 { *ohms } else { 1e-3 };
        if *high {
            // supply -> R_out -> pin -> R -> LED (a constant drop) -> rail; logic inputs as
            // a current source out of the pin
            let _ = writeln!(deck, "VS{k} s{k} 0 DC {}", p.rail);
            let _ = writeln!(deck, "RO{k} s{k} o{k} {}", p.r_out);
            let _ = writeln!(deck, "RL{k} o{k} a{k} {r_load}");
            let _ = writeln!(deck, "VF{k} a{k} r{k} DC {vf}");
            let _ = writeln!(deck, "VR{k} r{k} 0 DC {rail}");
            let _ = writeln!(deck, "IL{k} o{k} 0 DC {}", p.logic);
        } else {
            // rail -> LED -> R -> pin -> R_out -> ground; logic inputs as a current source
            // into the pin
            let _ = writeln!(deck, "VR{k} r{k} 0 DC {rail}");
            let _ = writeln!(deck, "VF{k} r{k} a{k} DC {vf}");
            let _ = writeln!(deck, "RL{k} a{k} o{k} {r_load}");
            let _ = writeln!(deck, "RO{k} o{k} 0 {}", p.r_out);
            let _ = writeln!(deck, "IL{k} 0 o{k} DC {}", p.logic);
        }
        want.push((k, *net, p.level, p.total));
    }
    deck.push_str(".control\nset numdgt=12\nop\n");
    for (k, ..) in &want {
        let _ = writeln!(deck, "print v(o{k}) i(vf{k})");
    }
    deck.push_str("quit 0\n.endc\n.end\n");
    let path = std::env::temp_dir().join(format!("netmargin-led-{}.cir", std::process::id()));
    std::fs::write(&path, &deck).unwrap();
    let out = Command::new("ngspice")
        .arg("-b")
        .arg(&path)
        .output()
        .unwrap();
    let _ = std::fs::remove_file(&path);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(out.status.success(), "ngspice failed:\n{stdout}");
    let value = |vector: &str| -> f64 {
        let prefix = format!("{vector} = ");
        let line = stdout
            .lines()
            .find(|l| l.starts_with(&prefix))
            .unwrap_or_else(|| panic!("ngspice printed no {vector}:\n{stdout}"));
        line[prefix.len()..].trim().parse().unwrap()
    };
    for (k, net, level, total) in want {
        let v = value(&format!("v(o{k})"));
        near(v, level, 1e-3, &format!("{net}: the pin's level, ngspice"));
        // the output's current: through R_out
        let p = point(net, cases[k].1);
        let i = (p.rail - v).abs() / p.r_out;
        near(
            i,
            total,
            1e-6,
            &format!("{net}: the output's current, ngspice"),
        );
        let i_led = value(&format!("i(vf{k})")).abs();
        near(
            i_led,
            p.loads[0].amps,
            1e-6,
            &format!("{net}: the load's current, ngspice"),
        );
    }
}
