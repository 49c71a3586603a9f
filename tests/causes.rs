//! The electrical model's causes of false findings on real boards, each shown fixed on a small
//! card of our own (`fixtures/causes/`, written by `fixtures/gen/causes.py`). Every card holds
//! the wiring that was once reported wrongly and a near case that must still be reported, so each
//! test fails if the model slips either way. The real binary runs on each card
//! (`check --format json`), and the findings are asserted net by net: check, severity, and what
//! must not be there.
//!
//! Figures asserted, and where they come from:
//! - 74HC at 5.0 V: VIH 3.50 V (JEDEC JESD7A gives 3.15 V at 4.5 V and 3.85 V at 5.5 V; the line
//!   through them passes 3.50 V at 5.0 V).
//! - 74LS high output: VOH 2.70 V minimum at IOH -0.4 mA (TI SDLS025B, SN74LS00/SN74LS04).
//! - A bipolar TTL input left open floats high; a CMOS input left open has no defined level and
//!   must be tied (common practice).
//! - 74LS393 1CLR (pin 2) is an active-high clear (Motorola SN54/74LS393 data sheet, FAST and LS
//!   TTL Data); 74LS90 and 74LS93 R0(1) (pin 2) and R0(2) (pin 3) reset the counter to zero when
//!   both are high (from memory, as the 7490 and 7493 pinouts in rules/functions.toml); 74x74 pin 1 is the active-low clear 1CLR~ (TI SN74AHC74
//!   pin functions, the pinout shared by the 74LS74).
//! - 74HC245: DIR high passes A to B, so the A side receives (TI SCLS020H, SN74HCT245 function
//!   table, the same for the 74HC245: from memory).
//! - An enable pin (CE, OE~, WE) of a memory or peripheral is an input (JEDEC memory pinouts:
//!   common practice).

use std::path::Path;
use std::process::Command;

use serde_json::Value;

#[derive(Debug, Clone)]
struct Found {
    check: String,
    severity: String,
    net: Option<String>,
    pins: Vec<String>,
    message: String,
}

/// One card's findings, and its text (to check that a net asserted quiet exists at all).
struct Run {
    found: Vec<Found>,
    text: String,
}

impl std::fmt::Debug for Run {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        self.found.fmt(f)
    }
}

impl std::ops::Deref for Run {
    type Target = [Found];
    fn deref(&self) -> &[Found] {
        &self.found
    }
}

fn run(name: &str) -> Run {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("fixtures/causes")
        .join(format!("{name}.net"));
    let out = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(["check", "--no-config", "--format", "json"])
        .arg(&path)
        .output()
        .expect("run netmargin");
    let v: Value = serde_json::from_slice(&out.stdout).unwrap_or_else(|e| {
        panic!(
            "{name}: no JSON ({e}); stderr: {}",
            String::from_utf8_lossy(&out.stderr)
        )
    });
    let file = &v["files"][0];
    assert!(
        file["error"].is_null(),
        "{name}: not checked: {}",
        file["error"]
    );
    let found = file["findings"]
        .as_array()
        .expect("findings")
        .iter()
        .map(|d| Found {
            check: d["check"].as_str().unwrap_or_default().to_string(),
            severity: d["severity"].as_str().unwrap_or_default().to_string(),
            net: d["net"].as_str().map(str::to_string),
            pins: d["pins"]
                .as_array()
                .map(|a| {
                    a.iter()
                        .filter_map(|p| p.as_str().map(str::to_string))
                        .collect()
                })
                .unwrap_or_default(),
            message: d["message"].as_str().unwrap_or_default().to_string(),
        })
        .collect();
    let text = std::fs::read_to_string(&path).expect("read the card");
    Run { found, text }
}

/// True when `check` names the finding's check; a pattern ending in `*` is a prefix.
fn is(f: &Found, check: &str) -> bool {
    match check.strip_suffix('*') {
        Some(prefix) => f.check.starts_with(prefix),
        None => f.check == check,
    }
}

/// The net carries `check` at `severity`, and that check at no other severity.
#[track_caller]
fn fires<'a>(found: &'a [Found], net: &str, check: &str, severity: &str) -> &'a Found {
    let on: Vec<&Found> = found
        .iter()
        .filter(|f| f.net.as_deref() == Some(net) && is(f, check))
        .collect();
    assert!(
        !on.is_empty(),
        "expected {check} ({severity}) on {net}; found: {found:#?}"
    );
    for f in &on {
        assert_eq!(f.severity, severity, "{check} on {net}: {f:#?}");
    }
    on[0]
}

/// No finding of any of `checks` on the net.
#[track_caller]
fn quiet(found: &Run, net: &str, checks: &[&str]) {
    // a net the card does not have would pass vacuously
    assert!(
        found.text.contains(&format!("(name \"{net}\")"))
            || found.text.contains(&format!("(name {net})")),
        "no net {net} in the card"
    );
    let bad: Vec<&Found> = found
        .iter()
        .filter(|f| f.net.as_deref() == Some(net) && checks.iter().any(|c| is(f, c)))
        .collect();
    assert!(bad.is_empty(), "nothing of {checks:?} on {net}: {bad:#?}");
}

/// No finding of any of `checks` naming a pin of the part `reference`.
#[track_caller]
fn part_quiet(found: &[Found], reference: &str, checks: &[&str]) {
    let prefix = format!("{reference}.");
    let bad: Vec<&Found> = found
        .iter()
        .filter(|f| {
            checks.iter().any(|c| is(f, c))
                && (f.pins.iter().any(|p| p.starts_with(&prefix))
                    || f.message.starts_with(&format!("{reference} ")))
        })
        .collect();
    assert!(
        bad.is_empty(),
        "nothing of {checks:?} for {reference}: {bad:#?}"
    );
}

/// A finding of `check` at `severity` naming exactly `pin` (whatever its net).
#[track_caller]
fn fires_at(found: &[Found], pin: &str, check: &str, severity: &str) {
    let on: Vec<&Found> = found
        .iter()
        .filter(|f| is(f, check) && f.pins.iter().any(|p| p == pin))
        .collect();
    assert!(
        !on.is_empty(),
        "expected {check} ({severity}) at {pin}; found: {found:#?}"
    );
    for f in on {
        assert_eq!(f.severity, severity, "{check} at {pin}: {f:#?}");
    }
}

#[track_caller]
fn says(f: &Found, parts: &[&str]) {
    for p in parts {
        assert!(f.message.contains(p), "expected `{p}` in: {}", f.message);
    }
}

const FLOATING: &[&str] = &["floating-*"];

// ---------------------------------------------------------------------------------------------
// 1. open-collector outputs

#[test]
fn open_collector_into_an_led_or_a_key_row_needs_no_pull_up() {
    let f = run("oc-loads");
    // an LED lit from +5V through R1: the LED and resistor are the output's load
    quiet(
        &f,
        "/LAMP_RUN_N",
        &["missing-pull-up", "pull-up-out-of-range"],
    );
    // a key-matrix row with only switches and diodes: the pull-ups sit on the columns
    quiet(&f, "/ROW0_N", &["missing-pull-up", "pull-up-out-of-range"]);
    quiet(&f, "/COL0_N", FLOATING);
    quiet(&f, "/COL1_N", FLOATING);
}

#[test]
fn open_collector_read_by_a_logic_input_without_pull_up_is_an_error() {
    let f = run("oc-loads");
    let d = fires(&f, "/TRIP_N", "missing-pull-up", "error");
    assert!(d.pins.contains(&"U1.6".to_string()), "{d:#?}");
}

#[test]
fn open_collector_read_only_by_an_unknown_part_is_a_warning_naming_the_assumption() {
    let f = run("oc-loads");
    let d = fires(&f, "/TRIP_MON_N", "missing-pull-up", "warning");
    assert!(d.message.contains("assuming the symbol is right"), "{d:#?}");
}

// ---------------------------------------------------------------------------------------------
// 2. parts no table knows

#[test]
fn two_unclassified_outputs_on_one_net_are_info_only() {
    let f = run("unknown-parts");
    fires(&f, "/PRB_SUM", "output-contention", "info");
    // symbol pin types of unknown parts never make an error, on any net
    assert!(
        !f.iter()
            .any(|x| x.check == "output-contention" && x.severity == "error"),
        "{f:#?}"
    );
}

#[test]
fn an_unclassified_output_against_a_74ls_output_is_a_warning() {
    let f = run("unknown-parts");
    let d = fires(&f, "/PRB_CLASH", "output-contention", "warning");
    assert!(d.pins.contains(&"U1.2".to_string()) && d.pins.contains(&"U3.1".to_string()));
}

#[test]
fn a_net_driven_only_by_an_unclassified_output_is_not_floating() {
    let f = run("unknown-parts");
    quiet(&f, "/PRB_LEVEL", FLOATING);
    quiet(&f, "/PRB_SUM", FLOATING);
    // near case: an unknown part's input beside a CMOS input, nothing driving
    fires(&f, "/PRB_SENSE", "floating-cmos-input", "error");
}

#[test]
fn an_enable_pin_typed_output_on_an_unclassified_part_is_an_input() {
    let f = run("unknown-parts");
    // CE, OE~ and WE typed output on TW-PRB7, each driven by a 74LS04 output: no contention
    quiet(&f, "/PRB_CE", &["output-contention"]);
    quiet(&f, "/PRB_CE2", &["output-contention"]);
    quiet(&f, "/PRB_OE_N", &["output-contention"]);
    quiet(&f, "/PRB_WE", &["output-contention"]);
}

// ---------------------------------------------------------------------------------------------
// 3. rails by their pins

#[test]
fn nets_carrying_every_supply_and_ground_pin_are_rails() {
    let f = run("rails-by-pins");
    for part in ["U1", "U2"] {
        part_quiet(&f, part, &["power-pin-miswired", "unpowered-part"]);
    }
    quiet(&f, "Hi", FLOATING);
    quiet(&f, "Lo", FLOATING);
    quiet(&f, "Hi", &["output-contention"]);
    quiet(&f, "Lo", &["output-contention"]);
    let hi = fires(&f, "Hi", "inferred-rail", "info");
    // the 74LS04 on it is specified at one supply, 4.75 V to 5.25 V (TI SDLS025B): 5 V
    says(hi, &["5.00 V"]);
    fires(&f, "Lo", "inferred-rail", "info");
}

#[test]
fn a_supply_pin_on_a_net_named_ground_is_still_miswired() {
    let f = run("rails-by-pins");
    fires(&f, "GND", "power-pin-miswired", "error");
    fires_at(&f, "U3.14", "power-pin-miswired", "error");
}

#[test]
fn a_pull_up_to_vcc_of_unknown_voltage_holds_the_net() {
    let f = run("rails-by-pins");
    quiet(&f, "/TEST_N", FLOATING);
    // near case: the same switch to Lo with no pull-up floats while open
    fires(&f, "/LAMP_N", "floating-cmos-input", "error");
}

#[test]
fn a_supply_pin_alone_on_a_one_pin_plus_5v_net_is_on_that_rail() {
    let f = run("rails-by-pins");
    part_quiet(&f, "U5", &["power-pin-miswired", "unpowered-part"]);
    // near case: a supply pin on no net at all
    let d: Vec<&Found> = f
        .iter()
        .filter(|x| {
            (x.check == "unpowered-part" || x.check == "power-pin-miswired")
                && x.pins.iter().any(|p| p == "U6.14")
        })
        .collect();
    assert!(!d.is_empty(), "U6.14 on no net must be reported: {f:#?}");
    assert!(d.iter().all(|x| x.severity == "error"), "{d:#?}");
}

// ---------------------------------------------------------------------------------------------
// 4. paths through passives

#[test]
fn inputs_fed_through_a_resistor_bead_or_inductor_are_driven() {
    let f = run("series-paths");
    for net in ["/CLK_R", "/SYNC_F", "/SYNC_L"] {
        quiet(&f, net, FLOATING);
    }
}

#[test]
fn a_gate_and_crystal_oscillator_input_is_driven() {
    let f = run("series-paths");
    quiet(&f, "/OSC_IN", FLOATING);
    quiet(&f, "/OSC_OUT", FLOATING);
}

#[test]
fn an_input_fed_only_through_a_capacitor_floats() {
    let f = run("series-paths");
    fires(&f, "/EDGE_AC", "floating-cmos-input", "error");
}

// ---------------------------------------------------------------------------------------------
// 5. resistors by symbol and footprint

#[test]
fn resistors_known_by_symbol_or_footprint_are_pulls() {
    let f = run("resistor-kinds");
    // RG3 (symbol R), RIO1 (footprint Resistor_SMD)
    quiet(&f, "/OPT_A", FLOATING);
    quiet(&f, "/OPT_B", FLOATING);
}

#[test]
fn resistor_networks_bussed_and_isolated() {
    let f = run("resistor-kinds");
    // R_Network08: common pin 1; R_Pack08 `330x8`: pins 1 and 16; R_Pack04: pins 1 and 8;
    // R_Network05 `47k_Pack05_SIP`: common pin 1
    for net in ["/OPT_C", "/OPT_D", "/OPT_F", "/OPT_G"] {
        quiet(&f, net, FLOATING);
        quiet(&f, net, &["unreadable-value"]);
    }
    // near case: pin 14 of the R_Pack08 pairs with pin 3, which is on no net
    fires(&f, "/OPT_E", "floating-cmos-input", "error");
}

#[test]
fn a_pull_up_marked_dnp_is_not_fitted() {
    let f = run("resistor-kinds");
    fires(&f, "/OPT_H", "floating-cmos-input", "error");
}

#[test]
fn a_pull_up_marked_nc_is_not_fitted() {
    let f = run("resistor-kinds");
    fires(&f, "/OPT_J", "floating-ttl-input", "warning");
    quiet(&f, "/OPT_J", &["unreadable-value"]);
}

// ---------------------------------------------------------------------------------------------
// 6. switches and jumpers

#[test]
fn a_three_pin_jumper_selecting_between_rails_drives_its_common_pin() {
    let f = run("switches");
    quiet(&f, "/MODE", FLOATING);
    // a switch to GND with a pull-up
    quiet(&f, "/ARM_N", FLOATING);
}

#[test]
fn inputs_held_only_through_an_open_jumper_or_switch_float() {
    let f = run("switches");
    // end pins of a 3-pin jumper: open in the other position
    fires(&f, "/RANGE_LO", "floating-cmos-input", "error");
    fires(&f, "/RANGE_HI", "floating-ttl-input", "warning");
    // a 2-pin jumper and a push switch to one rail, no pull resistor
    fires(&f, "/TEST_N", "floating-cmos-input", "error");
    fires(&f, "/HOLD_N", "floating-ttl-input", "warning");
}

// ---------------------------------------------------------------------------------------------
// 7. a transceiver with its direction fixed

#[test]
fn a_74ls_output_into_the_receiving_side_of_a_74hc245_is_short_of_vih() {
    let f = run("fixed-direction");
    let d = fires(&f, "/D0", "ttl-high-into-cmos", "error");
    // VIH 3.50 V for 74HC at 5 V (JEDEC JESD7A), VOH 2.70 V for 74LS (TI SDLS025B)
    says(d, &["needs 3.50 V", "guarantees 2.70 V"]);
    quiet(
        &f,
        "/D1",
        &["ttl-high-into-cmos", "floating-*", "output-contention"],
    );
}

#[test]
fn the_driving_side_of_a_fixed_transceiver_is_a_driver_not_a_load() {
    let f = run("fixed-direction");
    // /SRC feeds U4's receiving side: its A pin is an input there, not a three-state driver
    for net in ["/BD0", "/BD1", "/BD0_N", "/SHARED", "/SRC"] {
        quiet(
            &f,
            net,
            &["floating-*", "ttl-high-into-cmos", "output-contention"],
        );
    }
}

#[test]
fn unused_receiving_inputs_with_no_connect_flags_float() {
    let f = run("fixed-direction");
    for pin in 4..=9 {
        fires_at(&f, &format!("U1.{pin}"), "floating-cmos-input", "error");
    }
    // the driving side's unused pins are outputs: nothing
    for pin in 11..=16 {
        let p = format!("U1.{pin}");
        assert!(
            !f.iter()
                .any(|x| x.check.starts_with("floating-") && x.pins.contains(&p)),
            "{p}: {f:#?}"
        );
    }
}

// ---------------------------------------------------------------------------------------------
// 8. no-connect flags

#[test]
fn no_connect_flags_leave_inputs_open() {
    let f = run("no-connect-flags");
    fires(
        &f,
        "unconnected-(U1-4B-Pad13)",
        "floating-cmos-input",
        "error",
    );
    fires(
        &f,
        "unconnected-(U2-4B-Pad13)",
        "floating-ttl-input",
        "warning",
    );
}

#[test]
fn an_open_active_high_clear_holds_the_part_and_is_an_error() {
    let f = run("no-connect-flags");
    // 74LS393 1CLR (pin 2), 74LS90 R0(1) (pin 2): active high, an open TTL input floats high
    fires(
        &f,
        "unconnected-(U3-1CLR-Pad2)",
        "floating-ttl-input",
        "error",
    );
    // both reset-to-zero inputs of the 74LS90 open: both float high and hold it at zero
    for net in ["unconnected-(U4-R0(1)-Pad2)", "unconnected-(U4-R0(2)-Pad3)"] {
        fires(&f, net, "floating-ttl-input", "error");
    }
    // 74LS74 1CLR~ (pin 1): active low, floats to its inactive level
    fires(
        &f,
        "unconnected-(U5-~{1CLR}-Pad1)",
        "floating-ttl-input",
        "warning",
    );
}

#[test]
fn an_open_reset_input_whose_partner_is_grounded_holds_nothing() {
    let f = run("no-connect-flags");
    // 74LS93 reset/count function table: outputs reset to zero only when R0(1) and R0(2) are
    // both high (TI SN74LS93 data sheet: from memory)
    fires(
        &f,
        "unconnected-(U6-R0(1)-Pad2)",
        "floating-ttl-input",
        "warning",
    );
}

// ---------------------------------------------------------------------------------------------
// 9. connectors by symbol or footprint

#[test]
fn connectors_known_by_symbol_footprint_or_reference_drive_inputs() {
    let f = run("connectors");
    // Conn_02x20 under HDR1, a pin-header footprint under W1, BUS1, an edge connector as U7
    for net in ["/A0", "/A1", "/A2", "/A3"] {
        quiet(&f, net, FLOATING);
    }
    part_quiet(&f, "U7", &["unclassified-part", "unpowered-part"]);
    // near case: a mounting pad is no connector
    fires(&f, "/A4", "floating-cmos-input", "error");
}

// ---------------------------------------------------------------------------------------------
// 10. net ties

#[test]
fn a_driver_across_a_net_tie_drives_the_other_side() {
    let f = run("net-ties");
    // the joined net keeps the name of the first of its nets
    let d = fires(&f, "/CLK_TTL", "ttl-high-into-cmos", "error");
    // VIH 3.50 V for 74HC at 5 V (JEDEC JESD7A), VOH 2.70 V for 74LS (TI SDLS025B)
    says(d, &["needs 3.50 V", "guarantees 2.70 V"]);
    assert!(d.pins.contains(&"U2.1".to_string()), "{d:#?}");
    for net in ["/SEL", "/SEL_X", "/CLK_TTL", "/CLK_TTL_X"] {
        quiet(&f, net, FLOATING);
    }
    fires(&f, "/LOOSE", "floating-cmos-input", "error");
}

// ---------------------------------------------------------------------------------------------
// 11. pins without numbers

#[test]
fn unnumbered_pins_are_matched_by_name() {
    let f = run("unnumbered-pins");
    assert!(!f.iter().any(|x| x.check == "pin-on-two-nets"), "{f:#?}");
    quiet(&f, "/STIM", FLOATING);
    part_quiet(&f, "U1", &["power-pin-miswired", "unpowered-part"]);
    // near case: the block's pin named IN is an input, not a driver
    fires(&f, "/SENSE", "floating-cmos-input", "error");
}

// ---------------------------------------------------------------------------------------------
// 12. floating bus

#[test]
fn a_three_state_bus_floats_at_info_unless_a_clock_sits_on_it() {
    let f = run("floating-bus");
    fires(&f, "/BUS_A", "floating-bus", "info");
    // 74HC74 CLK inputs (pins 3 and 11) on the bus: an edge while it floats clocks the latch
    fires(&f, "/BUS_CK", "floating-bus", "warning");
    // a pull-down holds the bus
    quiet(&f, "/BUS_P", &["floating-*"]);
    // a floating bus is not a floating input
    quiet(&f, "/BUS_A", &["floating-cmos-input"]);
}

// ---------------------------------------------------------------------------------------------
// 13. inputs that draw more than one unit load; outputs that only source
//
// Figures: 74LS04 IOL 8 mA (TI SDLS025B, SN74LS04); 74LS90 IIL: A (CKA) -2.4 mA, B (CKB)
// -3.2 mA, against the 74LS unit load of -0.4 mA (Fairchild DM74LS90 electrical
// characteristics); QA is tested at IOL plus the B input's IIL (the same sheet, note 4); 4511
// segment outputs are NPN emitter followers (NXP HEF4511B Rev. 7, general description).

#[test]
fn a_counters_clock_input_counts_at_its_own_input_current() {
    let f = run("input-loads");
    // 5 x 2.4 mA = 12 mA against 8 mA: 150 %. At one unit load each (5 x 0.4 mA = 2 mA, 25 %)
    // nothing would be found
    let e = fires(&f, "/CLK_FAN", "fanout-overrun", "error");
    assert!(e.message.contains("12.00 mA"), "{}", e.message);
    assert!(e.message.contains("8.00 mA"), "{}", e.message);
    assert!(e.message.contains("150%"), "{}", e.message);
    assert!(e.message.contains("6 unit loads each"), "{}", e.message);
    // 2 x 2.4 mA = 4.8 mA: 60 %, below the 80 % derating
    quiet(&f, "/CLK_TWO", &["fanout-overrun"]);
    // three other packages' B inputs: 3 x 3.2 mA = 9.6 mA, 120 %; QA's own B input not counted
    let e = fires(&f, "/QA_U3", "fanout-overrun", "error");
    assert!(e.message.contains("9.60 mA"), "{}", e.message);
    assert!(e.message.contains("120%"), "{}", e.message);
}

#[test]
fn an_output_rated_with_its_own_input_does_not_count_it_again() {
    let f = run("input-loads");
    // QA into its own B input and ten 74LS inputs: 10 x 0.4 mA = 4 mA (50 %); counting the B
    // input's 3.2 mA would make 7.2 mA (90 %), above the 80 % derating
    quiet(&f, "/QA_U2", &["fanout-overrun"]);
    quiet(&f, "/QA_U7", &["fanout-overrun"]);
}

#[test]
fn display_driver_segment_outputs_only_source() {
    let f = run("input-loads");
    // 1 kOhm and a red LED from a 4511 segment: the emitter follower sources it; a 4000B gate's
    // output rating (well under 1 mA at 5 V) does not apply to it
    for net in ["/SEG_A", "/SEG_B"] {
        quiet(
            &f,
            net,
            &["output-load-current", "fanout-overrun", "output-contention"],
        );
    }
    // the symbol types the segment outputs as outputs: that is not a disagreement worth a
    // finding
    part_quiet(&f, "U11", &["pin-role-mismatch"]);
}
