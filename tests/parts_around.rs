//! The chips around the logic: processors, peripherals, memories, programmable logic, timers and
//! displays. Each value reads as the part and family named beside it; the headline figures of the
//! families these parts use are checked against the documents named beside each value; the
//! classification slips that matched a value by its digits alone stay fixed.

use netmargin::classify::classifier::{classify, Method, PartKind, Rules};
use netmargin::classify::family::{Drive, FamilyTable, HighOutput};
use netmargin::classify::function::{FunctionTable, Series};
use netmargin::classify::pattern::{match_value, near_misses, Series as PSeries};
use netmargin::classify::PinRole::{self, *};

fn netlist(comps: &str) -> String {
    format!("(export (version \"E\")\n  (components\n{comps})\n  (libparts)\n  (nets))\n")
}

/// One component to classify: its value, the symbol's name, how many pins the symbol numbers,
/// their pin type, and a footprint if any.
struct Part<'a> {
    reference: &'a str,
    value: &'a str,
    symbol: Option<&'a str>,
    pins: u32,
    pin_type: &'a str,
    footprint: Option<String>,
}

/// Classifies the parts as one netlist.
fn classify_parts(items: &[Part<'_>]) -> netmargin::classify::classifier::Classified {
    let mut comps = String::new();
    let mut libparts = String::new();
    for (i, p) in items.iter().enumerate() {
        let symbol = p.symbol.map_or(format!("P{i}"), str::to_string);
        let footprint = p
            .footprint
            .as_ref()
            .map_or(String::new(), |f| format!(" (footprint \"{f}\")"));
        comps.push_str(&format!(
            "    (comp (ref \"{}\") (value \"{}\"){footprint} (libsource (lib \"x\") (part \"{symbol}\")))\n",
            p.reference, p.value
        ));
        let pins: String = (1..=p.pins)
            .map(|n| {
                format!(
                    "(pin (num \"{n}\") (name \"P{n}\") (type \"{}\"))",
                    p.pin_type
                )
            })
            .collect();
        libparts.push_str(&format!(
            "    (libpart (lib \"x\") (part \"{symbol}\") (pins {pins}))\n"
        ));
    }
    let text = netlist(&comps).replace("(libparts)", &format!("(libparts\n{libparts})"));
    let tree = netmargin::sexpr::parse(&text).unwrap();
    let nl = netmargin::netlist::build(&tree).unwrap();
    classify(&nl, &Rules::builtin())
}

/// Classifies one component per (reference, value, highest pin number); returns (kind, family,
/// function) per component.
fn classify_values(items: &[(&str, &str, u32)]) -> Vec<(PartKind, Option<String>, Option<String>)> {
    let parts: Vec<Part<'_>> = items
        .iter()
        .map(|&(reference, value, pins)| Part {
            reference,
            value,
            symbol: None,
            pins,
            pin_type: "passive",
            footprint: None,
        })
        .collect();
    let cl = classify_parts(&parts);
    cl.parts
        .iter()
        .map(|p| {
            (
                p.kind,
                p.family.clone(),
                p.function.as_ref().map(|(_, id)| id.clone()),
            )
        })
        .collect()
}

#[test]
fn processor_peripheral_and_memory_markings_read_as_their_parts() {
    // (value, pins, family, function): the markings are the makers' own (common practice)
    let cases: &[(&str, u32, &str, &str)] = &[
        ("Z8400A", 40, "NMOS", "z80"),
        ("Z80CPU", 40, "NMOS", "z80"),
        ("Z84C0010PEC", 40, "CMOS-TTL", "z80"),
        ("8080A/КР580ВМ80А", 40, "NMOS", "8080"),
        ("MC68B09P", 40, "NMOS", "6809"),
        ("R6502P", 40, "NMOS", "6502"),
        ("W65C02S6TPG-14", 40, "CMOS-TTL", "w65c02s"),
        ("R65C02P2", 40, "CMOS-TTL", "6502"),
        ("MC68000P8", 64, "NMOS", "68000"),
        ("P8255A-5", 40, "NMOS", "8255"),
        ("CP82C55A", 40, "CMOS-TTL", "8255"),
        ("P8251A", 28, "NMOS", "8251"),
        ("P8254", 24, "NMOS", "8253"),
        ("YM2149F", 40, "NMOS", "ay-3-8910"),
        ("HM6116LP-3", 24, "CMOS-TTL", "6116"),
        ("AS6C6264-55PCN", 28, "CMOS-TTL", "6264"),
        ("HM62256BLP-7", 28, "CMOS-TTL", "62256"),
        ("AS6C1008-55PCN", 32, "CMOS-TTL", "628128"),
        ("AS6C4008-55PCN", 32, "CMOS-TTL", "628512"),
        ("MK4116N-3", 16, "NMOS", "4116"),
        ("TMS4164-15NL", 16, "NMOS", "4164"),
        ("D41464C-12", 18, "NMOS", "41464"),
        ("2716/КР573РФ5", 24, "NMOS-EPROM", "2716"),
        ("D2764A-2", 28, "NMOS-EPROM", "2764"),
        ("27C512-15", 28, "CMOS-EPROM", "27512"),
        ("AT28C64B-15PU", 28, "CMOS-EPROM", "28c64"),
        ("SST39SF040-70-4C-PHE", 32, "CMOS-EPROM", "39sf040"),
        ("GAL16V8D-15LP", 20, "PLD-TTL", "16v8"),
        ("ATF22V10C-15PU", 24, "PLD-TTL", "22v10"),
        ("PAL16L8ACN", 20, "PLD-TTL", "16v8"),
        ("NE555P", 8, "NE555", "555"),
        ("TLC555CP", 8, "CMOS555", "555"),
        ("ICM7555IPA", 8, "CMOS555", "555"),
        ("NE556N", 14, "NE555", "556"),
    ];
    let items: Vec<(&str, &str, u32)> = cases.iter().map(|c| ("U1", c.0, c.1)).collect();
    let got = classify_values(&items);
    for (c, g) in cases.iter().zip(&got) {
        assert_eq!(g.0, PartKind::Logic, "{}", c.0);
        assert_eq!(g.1.as_deref(), Some(c.2), "{}: family", c.0);
        assert_eq!(g.2.as_deref(), Some(c.3), "{}: function", c.0);
    }
}

#[test]
fn parts_that_are_not_logic_are_known() {
    let got = classify_values(&[
        ("U1", "HDSP-A153", 10),
        ("U2", "LM2940CT-5.0", 3),
        ("U3", "TPIC6B595N", 20),
        ("U4", "DS1233-10+", 3),
        ("U5", "MAX232CPE", 16),
        // (the SN75176B RS-485 transceiver is now checked on its logic side: parts_peripherals)
        ("U6", "ULN2003AN", 16),
        ("U7", "YSLB-102510R3-10", 20),
    ]);
    for (i, g) in got.iter().enumerate() {
        // LED displays are known as displays: not logic, their segments LED loads
        let want = if matches!(i, 0 | 6) {
            PartKind::Display
        } else {
            PartKind::NotLogic
        };
        assert_eq!(g.0, want, "component {i}");
    }
}

#[test]
fn the_missing_logic_families_read_from_their_letters() {
    for (v, fam, func) in [
        ("MM74C00N", "74C", "00"),
        ("74C04", "74C", "04"),
        ("MC74VHC1G00", "74AHC", "1"),
        ("74VHC00M", "74AHC", "00"),
        ("74VHCT244AMTC", "74AHCT", "244"),
        ("SN74ABT244N", "74ABT", "244"),
        ("SN74BCT244N", "74BCT", "244"),
        ("IDT74FCT244ATSO", "74FCT", "244"),
        ("CY74FCT245TSOC", "74FCT", "245"),
        ("SN74LVT245BDW", "74LVT", "245"),
        ("SN74ALVC08D", "74ALVC", "08"),
    ] {
        if func == "1" {
            // a single-gate marking (1G00) is not a 74 function number: it does not read
            assert!(match_value(v).is_none(), "{v}");
            continue;
        }
        let m = match_value(v).unwrap_or_else(|| panic!("{v} does not read"));
        assert_eq!((m.family.as_str(), m.function.as_str()), (fam, func), "{v}");
    }
}

#[test]
fn a_value_that_matches_only_by_its_digits_is_not_that_part() {
    // The MC4044 is a bipolar phase-frequency detector (Motorola's CMOS numbering is MC14xxx):
    // not the 4000-series 4044 latch. The MC14044B and CD4044BE still are.
    assert!(match_value("MC4044P").is_none());
    assert!(match_value("MC4024P").is_none());
    assert_eq!(match_value("MC14044BCP").unwrap().function, "4044");
    assert_eq!(match_value("CD4044BE").unwrap().function, "4044");
    // A bare 4164 is a DRAM, not a 54164 with its 5 lost: no digit is put in front of a number.
    let t = FunctionTable::builtin();
    let known = |s: &PSeries, f: &str| {
        let s = match s {
            PSeries::S74 => Series::S74,
            PSeries::S4000 => Series::S4000,
        };
        t.get(s, f).is_some()
    };
    let s = near_misses("4164", &known, 5);
    assert!(
        s.iter()
            .all(|x| !x.value.starts_with("54") && !x.value.starts_with("74")),
        "{s:?}"
    );
    // ... and it classifies as the DRAM
    let got = classify_values(&[("U1", "4164", 16)]);
    assert_eq!(got[0].2.as_deref(), Some("4164"));
    // a lost digit inside a number with letters is still offered: 74LS0 -> 74LS00
    let s = near_misses("74LS0", &known, 5);
    assert!(s.iter().any(|x| x.value == "74LS00"), "{s:?}");
}

#[test]
fn a_symbol_that_draws_more_pins_than_the_part_or_a_socket_is_not_that_part() {
    let text = netlist(concat!(
        "    (comp (ref \"J1\") (value \"68000_SOCKET\") (libsource (lib \"x\") (part \"S\")))\n",
        "    (comp (ref \"U1\") (value \"MK4116x8\") (libsource (lib \"x\") (part \"M\")))\n",
        "    (comp (ref \"X1\") (value \"ECS-100AX-035\") (libsource (lib \"x\") (part \"O\")))\n",
    ));
    let pins = |n: u32| -> String {
        (1..=n)
            .map(|p| format!("(pin (num \"{p}\") (name \"P{p}\") (type \"passive\"))"))
            .collect()
    };
    let text = text.replace(
        "(libparts)",
        &format!(
            "(libparts (libpart (lib \"x\") (part \"S\") (pins {})) (libpart (lib \"x\") (part \"M\") (pins {})) (libpart (lib \"x\") (part \"O\") (pins {})))",
            pins(64),
            pins(40),
            pins(14)
        ),
    );
    let tree = netmargin::sexpr::parse(&text).unwrap();
    let nl = netmargin::netlist::build(&tree).unwrap();
    let cl = classify(&nl, &Rules::builtin());
    assert_eq!(
        cl.parts[0].kind,
        PartKind::Connector,
        "a socket named for its CPU"
    );
    assert!(
        cl.parts[1].function.is_none(),
        "eight DRAMs drawn as one symbol"
    );
    // an oscillator can keeps its X reference and is still read
    assert_eq!(cl.parts[2].method, Method::ShippedEntry);
    assert_eq!(
        cl.parts[2].function.as_ref().map(|f| f.1.as_str()),
        Some("osc-dip14")
    );
}

fn role(f: &str, pin: &str) -> PinRole {
    let t = FunctionTable::builtin();
    t.get(Series::Other, f)
        .unwrap_or_else(|| panic!("no {f}"))
        .pin(pin)
        .unwrap_or_else(|| panic!("{f} has no pin {pin}"))
        .role
}

#[test]
fn timer_pinout_matches_the_data_sheet() {
    // TI SLFS078C (TLC555-Q1) pin functions: 1 GND, 2 TRIG, 3 OUT, 4 RESET, 5 CONT, 6 THRES,
    // 7 DISCH (open collector into the timing network), 8 VDD; the same in TI SLFS022I (NE555)
    let t = FunctionTable::builtin();
    let f = t.get(Series::Other, "555").unwrap();
    let names: Vec<&str> = f.pins.iter().map(|p| p.name.as_str()).collect();
    assert_eq!(
        names,
        ["GND", "TRIG", "OUT", "~RESET", "CONT", "THRES", "DISCH", "VCC"]
    );
    assert_eq!(
        f.pins.iter().map(|p| p.role).collect::<Vec<_>>(),
        [Ground, Analog, PushPull, Input, Analog, Analog, Analog, Supply]
    );
}

#[test]
fn processor_control_inputs_are_inputs_and_bus_pins_float_on_a_grant() {
    // Zilog Z80 CPU product specification (1978), pin description (from memory): ~INT 16,
    // ~NMI 17, ~WAIT 24, ~BUSRQ 25, ~RESET 26 are inputs; ~BUSAK 23 is an output, and the
    // address bus floats while it is low.
    for p in ["16", "17", "24", "25", "26"] {
        assert_eq!(role("z80", p), Input, "Z80 pin {p}");
    }
    assert_eq!(role("z80", "23"), PushPull);
    let t = FunctionTable::builtin();
    let a0 = t.get(Series::Other, "z80").unwrap().pin("30").unwrap();
    assert_eq!((a0.name.as_str(), a0.role), ("A0", ThreeState));
    assert_eq!(
        (a0.enable.as_slice(), a0.enable_active_low),
        (&["23".to_string()][..], false)
    );
    // Intel 8080A (from memory): READY 23, HOLD 13, INT 14, RESET 12 inputs; the 12 V clock
    // pins and the -5 V / +12 V supplies are analog, so only pin 20 sets the logic supply.
    for p in ["12", "13", "14", "23"] {
        assert_eq!(role("8080", p), Input, "8080 pin {p}");
    }
    for p in ["11", "15", "22", "28"] {
        assert_eq!(role("8080", p), Analog, "8080 pin {p}");
    }
    // a programmable part's I/O: direction unknown, never floating and never in contention
    assert_eq!(role("16v8", "15"), PinRole::Unknown);
    assert_eq!(role("8255", "4"), PinRole::Unknown);
}

/// A guaranteed level equal to `v` volts at `a` amperes (the table stores milliamperes).
fn close(x: netmargin::classify::family::VI, v: f64, a: f64) {
    assert!(
        (x.v - v).abs() < 1e-9 && (x.a - a).abs() < 1e-12,
        "{x:?} is not {v} V at {a} A"
    );
}

fn fams() -> FamilyTable {
    FamilyTable::builtin()
}

#[test]
fn early_cmos_74c_figures_match_the_data_sheet() {
    // Fairchild (National) MM74C00 DS005877: VIN(1) 3.5 V and VIN(0) 1.5 V at VCC 5 V; 8.0 and
    // 2.0 V at 10 V; VOUT(1) 4.5 V at -10 uA; the TTL interface rows 2.4 V at -360 uA and
    // 0.4 V at 360 uA (VCC 4.75 V)
    let t = fams();
    let f = t.get("74C").unwrap();
    let l5 = f.levels(5.0, Drive::Standard);
    assert_eq!((l5.vih_min, l5.vil_max), (3.5, 1.5));
    close(l5.voh[0], 4.5, -10e-6);
    close(l5.voh[1], 2.4, -360e-6);
    close(l5.vol[1], 0.4, 360e-6);
    let l10 = f.levels(10.0, Drive::Standard);
    assert_eq!((l10.vih_min, l10.vil_max), (8.0, 2.0));
}

#[test]
fn memory_families_match_their_data_sheets() {
    let t = fams();
    // Sharp LH52256C: VOH 2.4 V at -1.0 mA, VOL 0.4 V at 2.1 mA, ILI and ILO 1 uA;
    // Motorola MCM6206D: VIH 2.2 V, VIL 0.8 V
    let f = t.get("CMOS-TTL").unwrap();
    let l = f.levels(5.0, Drive::Standard);
    assert_eq!((l.vih_min, l.vil_max), (2.2, 0.8));
    close(l.voh[0], 2.4, -1e-3);
    close(l.vol[0], 0.4, 2.1e-3);
    assert_eq!(f.high_output, HighOutput::RatedAtTtl);
    // Hitachi HN27C256HG: VIH 2.2 V, VIL 0.8 V, VOH2 VCC - 0.7 V at -100 uA, VOH1 2.4 V at
    // -1.0 mA, VOL 0.45 V at 2.1 mA
    let f = t.get("CMOS-EPROM").unwrap();
    let l = f.levels(5.0, Drive::Standard);
    assert_eq!((l.vih_min, l.vil_max), (2.2, 0.8));
    assert!((l.voh[0].v - (5.0 - 0.7)).abs() < 1e-9 && l.voh[0].a == -100e-6);
    close(l.voh[1], 2.4, -1e-3);
    close(l.vol[0], 0.45, 2.1e-3);
    assert_eq!(f.high_output, HighOutput::Rows);
}

#[test]
fn a_bipolar_555_high_is_not_a_cmos_high() {
    // TI SLFS022I (NE555): supply 4.5 V to 16 V; VOH 2.75 V min at -100 mA, VCC 5 V (from
    // memory of the same sheet): below a 74HC input's 3.15 V at 4.5 V (onsemi MM74HC04)
    let t = fams();
    let f = t.get("NE555").unwrap();
    assert_eq!((f.supply_min, f.supply_max), (4.5, 16.0));
    let l = f.levels(5.0, Drive::Standard);
    assert_eq!(l.voh[0].v, 2.75);
    let hc = t.get("74HC").unwrap().levels(4.5, Drive::Standard);
    assert!(l.voh[0].v < hc.vih_min);
}

#[test]
fn every_new_part_entry_names_a_family_and_function_that_exist() {
    let rules = Rules::builtin();
    for e in &rules.parts.entries {
        if let (Some(fam), Some(func)) = (&e.family, &e.function) {
            assert!(
                rules.families.get(fam).is_some(),
                "{:?}: family {fam}",
                e.values
            );
            assert!(
                rules.functions.get(e.series, func).is_some(),
                "{:?}: function {func}",
                e.values
            );
        }
    }
}

#[test]
fn an_open_control_input_is_held_at_its_idle_level_with_a_computed_pull() {
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args([
            "check",
            "--no-config",
            "--format",
            "json",
            "--only",
            "open-control-input",
            "fixtures/checks/open-control-input.net",
        ])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let found: Vec<(String, String)> = v["files"][0]["findings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| {
            (
                f["pins"][0].as_str().unwrap().to_string(),
                format!("{} {}", f["message"], f["help"]),
            )
        })
        .collect();
    let pins: Vec<&str> = found.iter().map(|f| f.0.as_str()).collect();
    // open: ~WAIT, ~BUSRQ (only an HC input on its net), the EPROM's VPP, the 555's ~RESET;
    // held: ~INT (4K7 pull-up), ~RESET (an HC04 output), ~NMI (tied to +5V)
    let mut sorted = pins.clone();
    sorted.sort();
    assert_eq!(sorted, ["U3.24", "U3.25", "U4.1", "U5.4"]);
    let of = |p: &str| &found.iter().find(|f| f.0 == p).unwrap().1;
    // Zilog Z80 (secondary quote of the 1978 spec, the NMOS family): VIH 2.0 V, leakage 10 uA:
    // (5.00 V - 2.0 V) / 10 uA = 300 kOhm holds it; 10 kOhm is the usual value (common practice)
    assert!(of("U3.24").contains("must be held high"), "{}", of("U3.24"));
    assert!(of("U3.24").contains("300 kOhm"), "{}", of("U3.24"));
    assert!(of("U3.24").contains("at most 10 kOhm"), "{}", of("U3.24"));
    // TI SLFS022I (NE555, from memory): reset high above 1.0 V, 0.1 mA: (5.00 - 1.0) / 0.1 mA
    assert!(of("U5.4").contains("40 kOhm"), "{}", of("U5.4"));
    // the advice never names the wrong rail for an active-low control input
    assert!(!of("U3.24").contains("GND"), "{}", of("U3.24"));
}

/// Classifies one component per (reference, value, pins) and returns each part's suggestions
/// as (value, reads as).
fn suggestions_for(items: &[(&str, &str, u32)]) -> Vec<Vec<(String, String)>> {
    let parts: Vec<Part<'_>> = items
        .iter()
        .map(|&(reference, value, pins)| Part {
            reference,
            value,
            symbol: None,
            pins,
            pin_type: "input",
            footprint: Some(format!("Package_DIP:DIP-{pins}_W15.24mm")),
        })
        .collect();
    let cl = classify_parts(&parts);
    cl.parts
        .iter()
        .map(|p| {
            p.suggestions
                .iter()
                .map(|s| (s.value.clone(), s.reads_as.clone()))
                .collect()
        })
        .collect()
}

#[test]
fn transcription_slips_in_processor_and_memory_values_are_suggested() {
    // letters read for digits (O for 0, l for 1, Z for 2) in makers' markings (common practice
    // of scanned part lists); the corrected value must read as the part named
    let got = suggestions_for(&[
        ("U1", "Z8OA", 40),
        ("U2", "4l64", 16),
        ("U3", "MC68BO9", 40),
        ("U4", "62Z56", 28),
        ("U5", "NOTHING-LIKE-IT", 40),
    ]);
    let first = |i: usize| got[i].first().cloned().unwrap_or_default();
    assert_eq!(first(0).0, "Z80A", "{got:?}");
    assert!(
        first(0).1.contains("z80") && first(0).1.contains("NMOS"),
        "{got:?}"
    );
    assert_eq!(first(1).0, "4164", "{got:?}");
    assert_eq!(first(2).0, "MC68B09", "{got:?}");
    assert!(first(2).1.contains("6809"), "{got:?}");
    assert_eq!(first(3).0, "62256", "{got:?}");
    assert!(got[4].is_empty(), "{got:?}");
}

#[test]
fn a_slip_is_not_suggested_when_the_package_cannot_be_that_part() {
    // a 4164 DRAM has 16 pins: a 40-pin symbol valued `4l64` is not one
    let got = suggestions_for(&[("U1", "4l64", 40)]);
    assert!(got[0].iter().all(|s| s.0 != "4164"), "{got:?}");
}

#[test]
fn a_symbol_named_for_another_part_is_recorded_and_the_value_decides() {
    // (value, symbol, pins) -> what the symbol reads as, if it disagrees
    let cases: &[(&str, &str, u32, Option<(&str, &str)>)] = &[
        // the NMOS Z80's symbol on the CMOS Z80 (Zilog Z84C00 marking): levels follow the value
        ("Z84C0010PEC", "Z80CPU", 40, Some(("NMOS", "z80"))),
        // a NOR symbol on a NAND value: another function
        ("74LS00", "74LS02", 14, Some(("74LS", "02"))),
        // a 74LS symbol placed as the 74HCT part of the same function: libraries draw one
        // symbol per function (common practice), not a disagreement
        ("74HCT00", "74LS00", 14, None),
        ("74LS00", "74LS00", 14, None),
        // a symbol named for no part
        ("74LS00", "Generic_DIP14", 14, None),
    ];
    let parts: Vec<Part<'_>> = cases
        .iter()
        .map(|&(value, symbol, pins, _)| Part {
            reference: "U1",
            value,
            symbol: Some(symbol),
            pins,
            pin_type: "passive",
            footprint: None,
        })
        .collect();
    let cl = classify_parts(&parts);
    for (i, (v, sym, _, want)) in cases.iter().enumerate() {
        let got = cl.parts[i].symbol_reads_as.as_ref().map(|s| {
            (
                s.family.clone().unwrap_or_default(),
                s.function.clone().unwrap_or_default(),
            )
        });
        let want = want.map(|(f, g)| (f.to_string(), g.to_string()));
        assert_eq!(got, want, "value {v}, symbol {sym}");
    }
    // the value decides the family
    assert_eq!(cl.parts[0].family.as_deref(), Some("CMOS-TTL"));
}

#[test]
fn a_display_is_not_counted_among_the_ic_like_parts() {
    // an LED bar array with an IC-style reference: LEDs in a package, not an IC
    let cl = classify_parts(&[Part {
        reference: "U19",
        value: "YSLB-102510R3-10",
        symbol: None,
        pins: 20,
        pin_type: "passive",
        footprint: None,
    }]);
    assert_eq!(cl.parts[0].kind, PartKind::Display);
    assert_eq!(cl.coverage, (0, 0));
}

#[test]
fn a_slip_is_judged_per_package_even_for_one_value() {
    // the same slipped value on a 16-pin and a 40-pin symbol: only the 16-pin one can be a
    // 4164 DRAM, whichever comes first in the file
    let got = suggestions_for(&[("U1", "4l64", 40), ("U2", "4l64", 16)]);
    assert!(got[0].iter().all(|s| s.0 != "4164"), "{got:?}");
    assert!(got[1].iter().any(|s| s.0 == "4164"), "{got:?}");
}
