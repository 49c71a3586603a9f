//! The power, package, pin-type, classification and value checks run on small netlists built
//! here, with the figures they must report checked against the documents they come from:
//! supply ranges from the manufacturers' recommended operating conditions, pin counts and
//! pinouts from the data sheets' pin diagrams, resistor codes from IEC 60062. Each value
//! names its source; "from memory" marks one not confirmed against a document here.

use netmargin::classify::classifier::Rules;
use netmargin::diag::Diag;
use netmargin::pipeline::{self, RunOptions};
use netmargin::source::SourceFile;

// ---------------------------------------------------------------------------------------------
// a tiny KiCad 5 netlist writer

/// SN7400 pinout (TI SDLS025B pin diagram): 1A 1B 1Y 2A 2B 2Y GND 3Y 3A 3B 4Y 4A 4B VCC.
const NAND2: &str = "1:1A:input 2:1B:input 3:1Y:output 4:2A:input 5:2B:input 6:2Y:output \
                     7:GND:power_in 8:3Y:output 9:3A:input 10:3B:input 11:4Y:output 12:4A:input \
                     13:4B:input 14:VCC:power_in";
/// An invented op-amp symbol: V+ pin 8, V- pin 4.
const AMP: &str = "1:OUT:output 2:IN-:input 3:IN+:input 4:V-:power_in 8:V+:power_in";
/// An invented regulator symbol: the input and ground typed power in, the output power out.
const REG: &str = "1:VI:power_in 2:GND:power_in 3:VO:power_out";
/// Power pins of an octal buffer in a 20-pin package (TI SDLS144D: GND 10, VCC 20).
const BUF20: &str = "1:~1OE:input 2:1A1:input 18:1Y1:3state 10:GND:power_in 20:VCC:power_in";
const RES: &str = "1:~:passive 2:~:passive";

struct Comp<'a> {
    reference: &'a str,
    value: &'a str,
    symbol: &'a str,
    footprint: &'a str,
}

fn c<'a>(reference: &'a str, value: &'a str, symbol: &'a str, footprint: &'a str) -> Comp<'a> {
    Comp {
        reference,
        value,
        symbol,
        footprint,
    }
}

fn q(s: &str) -> String {
    if s.is_empty() || s.chars().any(|ch| " ()\"#".contains(ch)) {
        format!("\"{}\"", s.replace('"', "\\\""))
    } else {
        s.to_string()
    }
}

/// `symbols`: (name, pins as `num:name:type` words); `nets`: (name, `REF.PIN` nodes).
fn netlist(comps: &[Comp<'_>], symbols: &[(&str, &str)], nets: &[(&str, &[&str])]) -> String {
    let mut s = String::from("(export (version D)\n  (components\n");
    for cp in comps {
        s += &format!(
            "    (comp (ref {}) (value {})",
            q(cp.reference),
            q(cp.value)
        );
        if !cp.footprint.is_empty() {
            s += &format!(" (footprint {})", q(cp.footprint));
        }
        s += &format!(" (libsource (lib t) (part {})) (tstamp 1))\n", q(cp.symbol));
    }
    s += "  )\n  (libparts\n";
    for (name, pins) in symbols {
        s += &format!("    (libpart (lib t) (part {})\n      (pins", q(name));
        for w in pins.split_whitespace() {
            let mut it = w.split(':');
            let (num, pname, ty) = (it.next().unwrap(), it.next().unwrap(), it.next().unwrap());
            s += &format!(" (pin (num {}) (name {}) (type {}))", q(num), q(pname), ty);
        }
        s += "))\n";
    }
    s += "  )\n  (nets\n";
    for (i, (name, nodes)) in nets.iter().enumerate() {
        s += &format!("    (net (code {}) (name {})", i + 1, q(name));
        for n in *nodes {
            let (r, p) = n.rsplit_once('.').unwrap();
            s += &format!(" (node (ref {}) (pin {}))", q(r), q(p));
        }
        s += ")\n";
    }
    s += "  ))\n";
    s
}

fn run(text: &str, code: &str, tolerance: f64) -> Vec<Diag> {
    let src = SourceFile::new("test.net", text.to_string());
    let rules = Rules::builtin();
    let mut opts = RunOptions::default();
    opts.model.rail_tolerance = tolerance;
    let checked =
        pipeline::check_source(&src, &rules, &opts).unwrap_or_else(|d| panic!("{}", d.message));
    checked
        .diags
        .into_iter()
        .filter(|d| d.code == code)
        .collect()
}

/// One 14-pin part with its supply pin on `rail` and its ground pin on `ground`.
fn one_part(value: &str, rail: &str, ground: &str) -> String {
    netlist(
        &[
            c("U1", value, "NAND2", "Package_DIP:DIP-14_W7.62mm"),
            c("J1", "PWR", "CONN", ""),
        ],
        &[("NAND2", NAND2), ("CONN", "1:P1:passive 2:P2:passive")],
        &[(rail, &["J1.1", "U1.14"]), (ground, &["J1.2", "U1.7"])],
    )
}

// ---------------------------------------------------------------------------------------------
// power-pin-miswired: the family's supply range

#[test]
fn supply_ranges_of_the_families() {
    // (value, rail, tolerance, fires, what the message must say); ranges are the makers'
    // recommended operating supply
    let cases: &[(&str, &str, f64, bool, &[&str])] = &[
        // TI SDLS025B, SN74LS00: VCC 4.75 V min, 5 V nom, 5.25 V max
        ("74LS00", "+5V", 0.0, false, &[]),
        ("74LS00", "+5V", 0.05, false, &[]), // 5 V +-5 % is exactly the range
        (
            "74LS00",
            "+5V",
            0.10,
            true,
            &["4.50 V to 5.50 V", "4.75 V to 5.25 V"],
        ),
        (
            "74LS00",
            "+12V",
            0.0,
            true,
            &["12.00 V", "4.75 V to 5.25 V", "74LS"],
        ),
        ("74LS00", "+3V3", 0.0, true, &["3.30 V", "4.75 V to 5.25 V"]),
        // Fairchild DM7400 DS006613: VCC 4.75 V to 5.25 V
        ("7400", "+12V", 0.0, true, &["4.75 V to 5.25 V"]),
        // onsemi MM74HC04: recommended VCC 2 V to 6 V
        ("74HC00", "+3V3", 0.0, false, &[]),
        ("74HC00", "+2V", 0.0, false, &[]),
        ("74HC00", "+12V", 0.0, true, &["2.00 V to 6.00 V"]),
        // Fairchild MM74HCT00: recommended VCC 4.5 V to 5.5 V
        (
            "74HCT00",
            "+3V3",
            0.0,
            true,
            &["3.30 V", "4.50 V to 5.50 V"],
        ),
        ("74HCT00", "+5V", 0.10, false, &[]),
        ("74HCT00", "+2V", 0.0, true, &["2.00 V", "4.50 V to 5.50 V"]), // the +2V rail is read
        // National CD4011BC: operating VDD 3 V to 15 V (18 V is the absolute maximum)
        ("CD4011B", "+15V", 0.0, false, &[]),
        ("CD4011B", "+3V3", 0.0, false, &[]),
        (
            "CD4011B",
            "+18V",
            0.0,
            true,
            &["18.00 V", "3.00 V to 15.00 V"],
        ),
    ];
    for (value, rail, tol, fires, says) in cases {
        let found = run(&one_part(value, rail, "GND"), "power-pin-miswired", *tol);
        assert_eq!(
            found.len(),
            usize::from(*fires),
            "{value} on {rail} at {tol}: {found:#?}"
        );
        for d in &found {
            for s in *says {
                assert!(
                    d.message.contains(s),
                    "{value} on {rail}: `{s}` not in `{}`",
                    d.message
                );
            }
            assert_eq!(d.pins().collect::<Vec<_>>(), vec!["U1.14".to_string()]);
            assert_eq!(d.net.as_deref(), Some(*rail));
        }
    }
}

#[test]
fn a_split_supply_counts_from_ground_pin_to_supply_pin() {
    // CD4011B between +12V and -12V: 24 V across the part, above the 15 V of National
    // CD4011BC; between +5V and -5V: 10 V, inside 3 V to 15 V. VSS on a negative rail is
    // where a split-supply CMOS part's ground pin belongs.
    let text = |pos: &str, neg: &str| {
        netlist(
            &[c("U1", "CD4011B", "NAND2", ""), c("J1", "PWR", "CONN", "")],
            &[("NAND2", NAND2), ("CONN", "1:P1:passive 2:P2:passive")],
            &[(pos, &["J1.1", "U1.14"]), (neg, &["J1.2", "U1.7"])],
        )
    };
    let found = run(&text("+12V", "-12V"), "power-pin-miswired", 0.0);
    assert_eq!(found.len(), 1, "{found:#?}");
    assert!(
        found[0]
            .message
            .contains("above its ground rail at -12.00 V"),
        "{}",
        found[0].message
    );
    assert!(
        found[0].message.contains("3.00 V to 15.00 V"),
        "{}",
        found[0].message
    );
    assert!(run(&text("+5V", "-5V"), "power-pin-miswired", 0.0).is_empty());
}

// ---------------------------------------------------------------------------------------------
// power-pin-miswired: pins on the wrong net

#[test]
fn supply_pin_on_ground_and_ground_pin_on_the_supply() {
    let found = run(&one_part("74LS00", "GND", "+5V"), "power-pin-miswired", 0.0);
    // both pins: VCC (14) on GND and GND (7) on +5V (SN7400 pinout, TI SDLS025B)
    let pins: Vec<&str> = found.iter().flat_map(|d| d.pins()).collect();
    assert_eq!(found.len(), 2, "{found:#?}");
    assert!(
        pins.contains(&"U1.14") && pins.contains(&"U1.7"),
        "{pins:?}"
    );
    assert!(found
        .iter()
        .any(|d| d.message.contains("is on the ground rail GND")));
    assert!(found
        .iter()
        .any(|d| d.message.contains("is on the positive rail +5V (5.00 V)")));
}

#[test]
fn unclassified_parts_by_their_pin_names() {
    let board = |vplus: &str, vminus: &str| {
        netlist(
            &[
                c("U1", "TW-AMP1", "AMP", ""),
                c("U2", "TW-REG", "REG", ""),
                c("J1", "PWR", "CONN", ""),
            ],
            &[
                ("AMP", AMP),
                ("REG", REG),
                (
                    "CONN",
                    "1:P1:passive 2:P2:passive 3:P3:passive 4:P4:passive",
                ),
            ],
            &[
                (vplus, &["J1.1", "U1.8"]),
                (vminus, &["J1.2", "U1.4"]),
                ("+12V", &["J1.3", "U2.1"]),
                ("GND", &["J1.4", "U2.2"]),
                ("+5V", &["U2.3"]),
            ],
        )
    };
    // V+ on +12V and V- on -12V, the regulator's input on +12V: all where they belong
    assert!(run(&board("+12V", "-12V"), "power-pin-miswired", 0.0).is_empty());
    // V+ on the negative rail
    let found = run(&board("-12V", "+12V"), "power-pin-miswired", 0.0);
    assert!(
        found
            .iter()
            .any(|d| d.pins().collect::<Vec<_>>() == ["U1.8"]
                && d.message.contains("negative rail -12V")),
        "{found:#?}"
    );
    assert!(
        found
            .iter()
            .any(|d| d.pins().collect::<Vec<_>>() == ["U1.4"]
                && d.message.contains("positive rail +12V")),
        "{found:#?}"
    );
}

// ---------------------------------------------------------------------------------------------
// unpowered-part

#[test]
fn power_pins_on_no_net() {
    // SN7400 power pins: GND 7, VCC 14 (TI SDLS025B)
    let board = |powered: bool| {
        let mut nets: Vec<(&str, &[&str])> =
            vec![("/A", &["J1.3", "U1.1", "U1.2"]), ("/Y", &["U1.3", "J1.4"])];
        if powered {
            nets.push(("+5V", &["J1.1", "U1.14"]));
            nets.push(("GND", &["J1.2", "U1.7"]));
        }
        netlist(
            &[c("U1", "74LS00", "NAND2", ""), c("J1", "IO", "CONN", "")],
            &[
                ("NAND2", NAND2),
                (
                    "CONN",
                    "1:P1:passive 2:P2:passive 3:P3:passive 4:P4:passive",
                ),
            ],
            &nets,
        )
    };
    let found = run(&board(false), "unpowered-part", 0.0);
    assert_eq!(found.len(), 1, "{found:#?}");
    assert!(
        found[0]
            .message
            .contains("pins 7 (GND) and 14 (VCC) are on no net"),
        "{}",
        found[0].message
    );
    assert!(
        found[0].message.contains("power unit seems never placed"),
        "{}",
        found[0].message
    );
    assert_eq!(found[0].pins().collect::<Vec<_>>(), ["U1.7", "U1.14"]);
    assert!(run(&board(true), "unpowered-part", 0.0).is_empty());
}

#[test]
fn a_decade_counter_is_powered_on_pins_5_and_10() {
    // SN7490: VCC pin 5, GND pin 10 (from memory, as the function table's pinout); its pins 7
    // and 14 are R9(2) and CKA, not power pins, so leaving them off the power rails is no
    // unpowered part
    let text = netlist(
        &[c("U1", "74LS90", "NAND2", ""), c("J1", "PWR", "CONN", "")],
        &[
            (
                "NAND2",
                "1:CKB:input 5:VCC:power_in 7:R92:input 10:GND:power_in 14:CKA:input",
            ),
            ("CONN", "1:P1:passive 2:P2:passive"),
        ],
        &[("+5V", &["J1.1", "U1.5"]), ("GND", &["J1.2", "U1.10"])],
    );
    assert!(run(&text, "unpowered-part", 0.0).is_empty());
}

// ---------------------------------------------------------------------------------------------
// package-mismatch

#[test]
fn footprint_pin_counts_against_the_packages() {
    // SN74LS00: 14-pin DIP/SOIC (TI SDLS025B); SN74LS244: 20-pin DIP/SOIC (TI SDLS144D)
    let cases: &[(&str, &str, &str, Option<(u32, u32)>)] = &[
        ("74LS00", "NAND2", "Package_DIP:DIP-14_W7.62mm", None),
        (
            "74LS00",
            "NAND2",
            "Package_SO:SOIC-14_3.9x8.7mm_P1.27mm",
            None,
        ),
        (
            "74LS00",
            "NAND2",
            "Package_DIP:DIP-16_W7.62mm",
            Some((14, 16)),
        ),
        (
            "74LS00",
            "NAND2",
            "Package_SO:TSSOP-20_4.4x6.5mm_P0.65mm",
            Some((14, 20)),
        ),
        (
            "74LS244",
            "BUF20",
            "Package_SO:SOIC-20W_7.5x12.8mm_P1.27mm",
            None,
        ),
        (
            "74LS244",
            "BUF20",
            "Package_DIP:DIP-14_W7.62mm",
            Some((20, 14)),
        ),
        // no count in the name: nothing to compare
        ("74LS244", "BUF20", "tw714:SOCKET_TURNED", None),
        ("74LS00", "NAND2", "", None),
    ];
    for (value, symbol, fp, want) in cases {
        let text = netlist(
            &[c("U1", value, symbol, fp)],
            &[("NAND2", NAND2), ("BUF20", BUF20)],
            &[],
        );
        let found = run(&text, "package-mismatch", 0.0);
        match want {
            None => assert!(found.is_empty(), "{value} on {fp}: {found:#?}"),
            Some((part, pads)) => {
                assert_eq!(found.len(), 1, "{value} on {fp}");
                let m = &found[0].message;
                assert!(
                    m.contains(&format!("a {part}-pin part"))
                        && m.contains(&format!("on the {pads}-pin footprint")),
                    "{m}"
                );
            }
        }
    }
}

// ---------------------------------------------------------------------------------------------
// pin-role-mismatch

#[test]
fn a_nor_drawn_with_a_nand_symbol() {
    // SN7402 pinout (TI SCLS065G, SN74HCT02): 1Y 1A 1B 2Y 2A 2B GND 3A 3B 3Y 4A 4B 4Y VCC.
    // Drawn with the SN7400 symbol (TI SDLS025B), the outputs 1, 4, 10 and 13 are typed input
    // and the inputs 3, 6, 8 and 11 typed output; pins 2, 5, 9 and 12 are inputs on both.
    let text = netlist(
        &[
            c("U1", "74LS02", "NAND2", ""),
            c("U2", "74LS00", "NAND2", ""),
        ],
        &[("NAND2", NAND2)],
        &[],
    );
    let found = run(&text, "pin-role-mismatch", 0.0);
    assert_eq!(
        found.len(),
        1,
        "the 74LS00 on its own symbol agrees: {found:#?}"
    );
    let m = &found[0].message;
    assert!(m.starts_with("U1 (74LS02)"), "{m}");
    assert!(m.contains("at 8 pins"), "{m}");
    assert!(m.contains("pins 1, 4, 10 and 13 are typed input but a 74LS02 drives them (outputs 1Y, 2Y, 3Y, 4Y)"), "{m}");
    assert!(m.contains("pins 3, 6, 8 and 11 are typed output but they are the 74LS02's inputs (1B, 2B, 3A, 4A)"), "{m}");
    assert_eq!(
        found[0].pins().collect::<Vec<_>>(),
        ["U1.1", "U1.3", "U1.4", "U1.6", "U1.8", "U1.10", "U1.11", "U1.13"]
    );
    assert!(found[0].help.as_deref().unwrap_or("").contains("swapped"));
}

// ---------------------------------------------------------------------------------------------
// unreadable-value and unclassified-part

#[test]
fn resistor_codes() {
    // IEC 60062 letter code: the letter stands for the decimal point and the multiplier
    // (4K7 = 4.7 kOhm, R47 = 0.47 Ohm, 1M0 = 1 MOhm); two letters read no way
    let board = |value: &str| {
        netlist(
            &[c("U1", "74LS00", "NAND2", ""), c("R1", value, "R", "")],
            &[("NAND2", NAND2), ("R", RES)],
            &[
                ("+5V", &["R1.1", "U1.14"]),
                ("/A", &["R1.2", "U1.1", "U1.2"]),
                ("GND", &["U1.7"]),
            ],
        )
    };
    for ok in ["4K7", "4.7k", "R47", "1M0", "10k 1%"] {
        assert!(run(&board(ok), "unreadable-value", 0.0).is_empty(), "{ok}");
    }
    for bad in ["4K7K", "10kk", "1,000"] {
        let found = run(&board(bad), "unreadable-value", 0.0);
        assert_eq!(found.len(), 1, "{bad}");
        let m = &found[0].message;
        assert!(
            m.contains(&format!("`{bad}`")) && m.contains("pull-up on /A to +5V"),
            "{m}"
        );
        assert_eq!(found[0].pins().collect::<Vec<_>>(), ["R1.2"]);
    }
    // not fitted: absent, not unreadable
    assert!(run(&board("DNP"), "unreadable-value", 0.0).is_empty());
}

#[test]
fn a_value_read_from_a_scan() {
    // the letter O for the digit 0: a common OCR and transcription slip (common practice)
    let text = netlist(
        &[
            c("U1", "74LSOO", "NAND2", ""),
            c("U2", "74LS00", "NAND2", ""),
        ],
        &[("NAND2", NAND2)],
        &[],
    );
    let found = run(&text, "unclassified-part", 0.0);
    assert_eq!(found.len(), 1, "{found:#?}");
    assert!(
        found[0].message.contains("`74LS00`"),
        "{}",
        found[0].message
    );
    assert!(
        found[0]
            .message
            .contains("judged from the symbol's pin types"),
        "{}",
        found[0].message
    );
}

// ---------------------------------------------------------------------------------------------
// input-overvoltage: one rail is at one end of its tolerance at a time

#[test]
fn a_driver_and_its_load_on_one_rail_share_the_rails_end() {
    // a 74HC00 output into a 74HC00 input, both on +5V at +-10 %: the output's high is at most
    // the rail (5.50 V at the top), and the input takes the rail plus its clamp at that same
    // rail: no overvoltage. (Comparing the top of the rail for the driver with the bottom for
    // the load, 4.50 V plus the clamp, would call it one; common practice: a rail is one
    // voltage at a time.)
    let text = netlist(
        &[
            c("U1", "74HC00", "NAND2", "Package_DIP:DIP-14_W7.62mm"),
            c("U2", "74HC00", "NAND2", "Package_DIP:DIP-14_W7.62mm"),
            c("J1", "PWR", "CONN", ""),
        ],
        &[("NAND2", NAND2), ("CONN", "1:P1:passive 2:P2:passive")],
        &[
            ("+5V", &["J1.1", "U1.14", "U2.14", "U1.1", "U1.2", "U2.2"]),
            ("GND", &["J1.2", "U1.7", "U2.7"]),
            ("/Y", &["U1.3", "U2.1"]),
        ],
    );
    assert!(run(&text, "input-overvoltage", 0.10).is_empty());
    assert!(run(&text, "input-overvoltage", 0.0).is_empty());
}

// ---------------------------------------------------------------------------------------------
// fanout-overrun: an open-collector output sinking an LED from the supply

#[test]
fn an_led_sunk_from_the_supply_is_in_the_low_state_budget() {
    // 74LS05 (TI SN74LS05): IOL 8 mA at VOL 0.5 V. A red LED (1.7 V, common practice) from +5V
    // through 330 Ohm: (5.00 - 1.70 - 0.50) / 330 = 8.48 mA, over the 8 mA rating; through
    // 1 kOhm 2.80 mA, well inside it. No pull-up is asked for: nothing reads the net.
    let board = |ohms: &str| {
        netlist(
            &[
                c("U1", "74LS05", "NAND2", "Package_DIP:DIP-14_W7.62mm"),
                c("R1", ohms, "RES", ""),
                c("D1", "RED", "LED", ""),
                c("J1", "PWR", "CONN", ""),
            ],
            &[
                ("NAND2", NAND2),
                ("RES", "1:~:passive 2:~:passive"),
                ("LED", "1:K:passive 2:A:passive"),
                ("CONN", "1:P1:passive 2:P2:passive"),
            ],
            &[
                ("+5V", &["J1.1", "U1.14", "R1.1"]),
                ("GND", &["J1.2", "U1.7", "U1.1"]),
                ("/LAMP_A", &["R1.2", "D1.2"]),
                ("/LAMP_K", &["D1.1", "U1.2"]),
            ],
        )
    };
    let over = run(&board("330"), "fanout-overrun", 0.0);
    assert_eq!(over.len(), 1, "{over:?}");
    assert!(over[0].message.contains("8.48 mA"), "{}", over[0].message);
    assert!(run(&board("1k"), "fanout-overrun", 0.0).is_empty());
    assert!(run(&board("330"), "missing-pull-up", 0.0).is_empty());
}

// ---------------------------------------------------------------------------------------------
// fanout-overrun: loads reached through a series resistor

#[test]
fn loads_behind_a_series_resistor_count_against_the_driver() {
    // a 74HC00 output (IOL 4 mA at 4.5 V: onsemi MM74HC00; 4.40 mA at 5 V, interpolated) through
    // a 33 Ohm series resistor into twelve 74LS00 inputs (IIL 0.4 mA each: TI SDLS025B):
    // 4.80 mA, over the rating.
    // The inputs are driven (no floating-ttl-input), and their current is the driver's.
    let mut comps = vec![
        c("U1", "74HC00", "NAND2", "Package_DIP:DIP-14_W7.62mm"),
        c("R1", "33", "RES", ""),
        c("J1", "PWR", "CONN", ""),
    ];
    let mut far: Vec<String> = Vec::new();
    let mut vcc: Vec<String> = vec!["J1.1".into(), "U1.14".into(), "U1.1".into(), "U1.2".into()];
    let mut gnd: Vec<String> = vec!["J1.2".into(), "U1.7".into()];
    for (k, r) in [(2, "U2"), (3, "U3"), (4, "U4")] {
        comps.push(c(r, "74LS00", "NAND2", "Package_DIP:DIP-14_W7.62mm"));
        for p in [1, 2, 4, 5] {
            far.push(format!("U{k}.{p}"));
        }
        vcc.push(format!("U{k}.14"));
        gnd.push(format!("U{k}.7"));
        for p in [9, 10, 12, 13] {
            gnd.push(format!("U{k}.{p}"));
        }
    }
    fn refs(v: &[String]) -> Vec<&str> {
        v.iter().map(|s| s.as_str()).collect()
    }
    let (far_r, vcc_r, gnd_r) = (refs(&far), refs(&vcc), refs(&gnd));
    let mut far_net = vec!["R1.2"];
    far_net.extend(far_r.iter().copied());
    let text = netlist(
        &comps,
        &[
            ("NAND2", NAND2),
            ("RES", "1:~:passive 2:~:passive"),
            ("CONN", "1:P1:passive 2:P2:passive"),
        ],
        &[
            ("+5V", &vcc_r),
            ("GND", &gnd_r),
            ("/OUT", &["U1.3", "R1.1"]),
            ("/FAR", &far_net),
        ],
    );
    let over = run(&text, "fanout-overrun", 0.0);
    assert_eq!(over.len(), 1, "{over:?}");
    assert!(over[0].message.contains("4.80 mA"), "{}", over[0].message);
    assert!(
        over[0]
            .message
            .contains("12 inputs x 0.40 mA (12 of them through a series element)"),
        "{}",
        over[0].message
    );
    assert!(run(&text, "floating-ttl-input", 0.0).is_empty());
}

// ---------------------------------------------------------------------------------------------
// one-pin pull parts

#[test]
fn a_one_pin_pull_up_part_holds_its_net_and_drives_nothing() {
    // simulation libraries draw a pull-up as one pin (typed three-state here): it holds a CMOS
    // input that nothing else drives, and it is not a three-state driver of a floating bus
    let board = |pull: bool| {
        let mut comps = vec![
            c("U1", "74HC00", "NAND2", "Package_DIP:DIP-14_W7.62mm"),
            c("J1", "PWR", "CONN", ""),
        ];
        let mut en = vec!["U1.1"];
        if pull {
            comps.push(c("PU1", "pull_up", "PULL", ""));
            en.push("PU1.1");
        }
        netlist(
            &comps,
            &[
                ("NAND2", NAND2),
                ("PULL", "1:~:tri_state"),
                ("CONN", "1:P1:passive 2:P2:passive"),
            ],
            &[
                ("+5V", &["J1.1", "U1.14", "U1.2"]),
                ("GND", &["J1.2", "U1.7"]),
                ("/EN", &en),
            ],
        )
    };
    let floats = |t: &str| {
        run(t, "floating-cmos-input", 0.0)
            .into_iter()
            .filter(|d| d.net.as_deref() == Some("/EN") || d.pins().any(|p| p == "U1.1"))
            .count()
    };
    assert_eq!(floats(&board(false)), 1);
    assert_eq!(floats(&board(true)), 0);
    assert!(run(&board(true), "floating-bus", 0.0).is_empty());
}

/// `n` 74HC04s whose first inputs share the undriven net `/FLOAT`; each first gate's output
/// drives its second gate, so the first gate is in use and its input is a single finding.
fn undriven_inputs(n: usize) -> String {
    let comps: String = (0..n)
        .map(|i| {
            format!("    (comp (ref U{i}) (value 74HC04) (libsource (lib 74xx) (part 74HC04)))\n")
        })
        .collect();
    let inputs: String = (0..n)
        .map(|i| format!("      (node (ref U{i}) (pin 1) (pintype input))\n"))
        .collect();
    let rail = |pin: u32| -> String {
        (0..n)
            .map(|i| format!("      (node (ref U{i}) (pin {pin}) (pintype power_in))\n"))
            .collect()
    };
    let outs: String = (0..n)
        .map(|i| {
            format!(
                "    (net (code {}) (name \"/O{i}\")\n      (node (ref U{i}) (pin 2) (pintype output))\n      (node (ref U{i}) (pin 3) (pintype input)))\n",
                10 + i
            )
        })
        .collect();
    format!(
        "(export (version D)\n  (components\n{comps}  )\n  (nets\n    (net (code 1) (name \"/FLOAT\")\n{inputs}    )\n    (net (code 2) (name \"GND\")\n{}    )\n    (net (code 3) (name \"+5V\")\n{}    )\n{outs}  )\n)\n",
        rail(7),
        rail(14)
    )
}

/// A finding about an input on an undriven net names at most eight of the net's other pins
/// and counts the rest: every input of the net is a finding, so naming them all in each
/// would make the report grow with the square of the net.
#[test]
fn an_undriven_net_names_eight_other_pins_and_counts_the_rest() {
    let tolerance = RunOptions::default().model.rail_tolerance;
    let on_float = |d: &Diag| d.message.contains("on net `/FLOAT`");
    // 40 inputs: 39 others, 8 named and 31 counted
    let found = run(&undriven_inputs(40), "floating-cmos-input", tolerance);
    let undriven: Vec<&Diag> = found.iter().filter(|d| on_float(d)).collect();
    assert_eq!(undriven.len(), 40, "{found:#?}");
    for d in &undriven {
        let (_, listed) = d.message.split_once("(only ").expect("names the others");
        let (names, more) = listed.split_once(" and ").expect("counts the rest");
        assert_eq!(names.split(", ").count(), 8, "{}", d.message);
        assert_eq!(more, "31 more)", "{}", d.message);
        let own = d.pins().next().expect("the finding's pin").to_string();
        assert!(!names.split(", ").any(|n| n == own), "{}", d.message);
    }
    // 9 inputs: 8 others, all named, nothing counted
    let found = run(&undriven_inputs(9), "floating-cmos-input", tolerance);
    let undriven: Vec<&Diag> = found.iter().filter(|d| on_float(d)).collect();
    assert_eq!(undriven.len(), 9);
    for d in &undriven {
        let (_, listed) = d.message.split_once("(only ").expect("names the others");
        assert_eq!(
            listed.trim_end_matches(')').split(", ").count(),
            8,
            "{}",
            d.message
        );
        assert!(!listed.contains(" more"), "{}", d.message);
    }
}
