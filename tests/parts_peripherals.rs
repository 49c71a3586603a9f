//! The memories and peripherals around the logic added for real boards: their pinouts against
//! the documents named beside each expected value (written out here, not read back from the
//! table), the value forms that name them, and the look-alikes that must not be taken for them.

use netmargin::classify::classifier::{classify, PartKind, Rules};
use netmargin::classify::function::{FunctionTable, Series};
use netmargin::classify::PinRole::{self, *};

fn table() -> FunctionTable {
    FunctionTable::builtin()
}

/// Checks (pin, name, role) of a series-"other" function and its package size.
fn expect_pins(id: &str, package: u32, expected: &[(u32, &str, PinRole)]) {
    let t = table();
    let f = t
        .get(Series::Other, id)
        .unwrap_or_else(|| panic!("function {id} missing"));
    assert_eq!(f.package_pins, package, "{id}: package pins");
    for &(pin, name, role) in expected {
        let p = f
            .pin(&pin.to_string())
            .unwrap_or_else(|| panic!("{id}: pin {pin} missing"));
        assert_eq!(p.name, name, "{id}: pin {pin} name");
        assert_eq!(p.role, role, "{id}: pin {pin} ({name}) role");
    }
}

/// Classifies one component per (reference, value, highest pin number) and returns (kind,
/// family, function) for each.
fn classify_values(items: &[(&str, &str, u32)]) -> Vec<(PartKind, Option<String>, Option<String>)> {
    let mut comps = String::new();
    let mut libparts = String::new();
    for (i, (r, v, n)) in items.iter().enumerate() {
        comps.push_str(&format!(
            "    (comp (ref \"{r}\") (value \"{v}\") (libsource (lib \"x\") (part \"P{i}\")))\n"
        ));
        let pins: String = (1..=*n)
            .map(|p| format!("(pin (num \"{p}\") (name \"P{p}\") (type \"passive\"))"))
            .collect();
        libparts.push_str(&format!(
            "    (libpart (lib \"x\") (part \"P{i}\") (pins {pins}))\n"
        ));
    }
    let text = format!(
        "(export (version \"E\")\n  (components\n{comps})\n  (libparts\n{libparts})\n  (nets))\n"
    );
    let tree = netmargin::sexpr::parse(&text).unwrap();
    let nl = netmargin::netlist::build(&tree).unwrap();
    let cl = classify(&nl, &Rules::builtin());
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
fn uart_dip40_matches_the_ti_terminal_table() {
    // TI SLLS177I (TL16C550C), terminal functions, N package (pins read in the table)
    expect_pins(
        "16550",
        40,
        &[
            (28, "A0", Input),
            (27, "A1", Input),
            (26, "A2", Input),
            (25, "~ADS", Input),
            (15, "~BAUDOUT", PushPull),
            (12, "CS0", Input),
            (13, "CS1", Input),
            (14, "~CS2", Input),
            (36, "~CTS", Input),
        ],
    );
    // from memory (National PC16550D pin description): data bus, supplies, interrupt, reset
    expect_pins(
        "16550",
        40,
        &[
            (1, "D0", Bidirectional),
            (8, "D7", Bidirectional),
            (20, "VSS", Ground),
            (40, "VCC", Supply),
            (30, "INTR", PushPull),
            (35, "MR", Input),
            (11, "SOUT", PushPull),
            (10, "SIN", Input),
        ],
    );
}

#[test]
fn uart_plcc44_matches_the_ti_terminal_table() {
    // TI SLLS177I (TL16C550C), terminal functions, FN package (pins read in the table)
    expect_pins(
        "16550-plcc44",
        44,
        &[
            (31, "A0", Input),
            (30, "A1", Input),
            (29, "A2", Input),
            (28, "~ADS", Input),
            (17, "~BAUDOUT", PushPull),
            (14, "CS0", Input),
            (15, "CS1", Input),
            (16, "~CS2", Input),
            (40, "~CTS", Input),
        ],
    );
    // from memory: the four corner pins of the PLCC are not connected; power at 22 and 44
    expect_pins(
        "16550-plcc44",
        44,
        &[
            (1, "NC", NoConnect),
            (12, "NC", NoConnect),
            (23, "NC", NoConnect),
            (34, "NC", NoConnect),
            (22, "VSS", Ground),
            (44, "VCC", Supply),
            (33, "INTR", PushPull),
        ],
    );
}

#[test]
fn clock_generator_8224_matches_the_published_pin_list() {
    // Intel 8224 pins 1-13 as listed in the 8080 support-chip notes; the 12 V clock drivers and
    // the +12 V supply are analog (outside the TTL figures), per the Intel 8080 manual's 8224
    // functional description ("two high level drivers")
    expect_pins(
        "8224",
        16,
        &[
            (1, "RESET", PushPull),
            (2, "~RESIN", SchmittInput),
            (3, "RDYIN", Input),
            (4, "READY", PushPull),
            (5, "SYNC", Input),
            (6, "PHI2(TTL)", PushPull),
            (7, "~STSTB", PushPull),
            (8, "GND", Ground),
            (9, "VDD", Analog),
            (10, "PHI2", Analog),
            (11, "PHI1", Analog),
            (12, "OSC", PushPull),
            (13, "TANK", Analog),
            (16, "VCC", Supply), // from memory
        ],
    );
}

#[test]
fn crt_controller_8275_pinout() {
    // from memory: Intel 8275 pin configuration (the light pen input and the supplies, the
    // data bus and the interrupt request)
    expect_pins(
        "8275",
        40,
        &[
            (11, "LPEN", Input),
            (12, "DB0", Bidirectional),
            (19, "DB7", Bidirectional),
            (20, "GND", Ground),
            (40, "VCC", Supply),
            (31, "IRQ", PushPull),
            (5, "DRQ", PushPull),
            (6, "~DACK", Input),
            (30, "CCLK", Input),
        ],
    );
}

#[test]
fn static_ram_5101_and_line_driver_75150_pinouts() {
    // NTE65101 (a 5101 replacement): 22-lead DIP, VSS on pin 8 (read); the rest from memory
    expect_pins(
        "5101",
        22,
        &[
            (8, "GND", Ground),
            (22, "VCC", Supply),
            (4, "A0", Input),
            (9, "DI1", Input),
            (10, "DO1", ThreeState),
            (16, "DO4", ThreeState),
            (19, "~CE1", Input),
            (20, "R/~W", Input),
        ],
    );
    // from memory: TI SN75150: TTL inputs, outputs at RS-232 levels, no 5 V supply pin
    expect_pins(
        "75150",
        8,
        &[
            (1, "S", Input),
            (2, "1A", Input),
            (3, "2A", Input),
            (4, "GND", Ground),
            (5, "VCC-", Analog),
            (7, "1Y", Analog),
            (8, "VCC+", Analog),
        ],
    );
}

#[test]
fn value_forms_name_their_parts() {
    // (value, highest pin, family, function): makers' markings and library symbol names
    let cases: &[(&str, u32, &str, &str)] = &[
        ("8275/КР580ВГ75", 40, "NMOS", "8275"),
        ("P8275", 40, "NMOS", "8275"),
        ("8224/КР580ГФ24", 16, "74LS", "8224"),
        ("D8224", 16, "74LS", "8224"),
        ("SN75150P/К170АП2", 8, "74", "75150"),
        ("SN75150N", 8, "74", "75150"),
        ("16C550", 40, "CMOS-TTL", "16550"),
        ("16C550", 44, "CMOS-TTL", "16550-plcc44"),
        ("TL16C550CN", 40, "CMOS-TTL", "16550"),
        ("TL16C550CFN", 44, "CMOS-TTL", "16550-plcc44"),
        ("INS8250N", 40, "NMOS", "16550"),
        ("NS16450N", 40, "NMOS", "16550"),
        ("NS16550AFN", 40, "NMOS", "16550"),
        ("RAM_5501", 22, "CMOS-TTL", "5101"),
        ("TC5501P", 22, "CMOS-TTL", "5101"),
        ("RAM_2016", 24, "CMOS-TTL", "6116"),
        ("TMM2016AP-10", 24, "CMOS-TTL", "6116"),
        ("ROM_2764", 28, "NMOS-EPROM", "2764"),
        ("2764", 28, "NMOS-EPROM", "2764"),
    ];
    let items: Vec<(&str, &str, u32)> = cases.iter().map(|(v, n, _, _)| ("U1", *v, *n)).collect();
    let got = classify_values(&items);
    for ((v, n, fam, func), (kind, f, fu)) in cases.iter().zip(&got) {
        assert_eq!(*kind, PartKind::Logic, "{v} ({n} pins)");
        assert_eq!(f.as_deref(), Some(*fam), "{v} ({n} pins): family");
        assert_eq!(fu.as_deref(), Some(*func), "{v} ({n} pins): function");
    }
}

#[test]
fn look_alikes_are_not_taken_for_these_parts() {
    // (value, highest pin, the function it must be, or None when it must stay unclassified)
    let cases: &[(&str, u32, Option<&str>)] = &[
        // 74-series shift register, not the 4164 DRAM
        ("74LS164", 14, Some("164")),
        ("DM74164N", 14, Some("164")),
        ("54164", 14, Some("164")),
        // the quad bilateral switch, not a 2016 static RAM
        ("CD4016BE", 14, Some("4016")),
        // a 74-series latch, not the SN75150
        ("74LS75", 16, Some("75")),
        // a symbol of eight 4116 DRAMs with its own pin numbering (1 to 26) is no 16-pin 4116
        ("MK4116x8", 26, None),
        // a 16550 in a 48-pin package the table does not hold
        ("16C550", 48, None),
    ];
    let items: Vec<(&str, &str, u32)> = cases.iter().map(|(v, n, _)| ("U1", *v, *n)).collect();
    let got = classify_values(&items);
    for ((v, n, want), (_, _, fu)) in cases.iter().zip(&got) {
        assert_eq!(fu.as_deref(), *want, "{v} ({n} pins)");
    }
}

#[test]
fn word_wide_eproms_match_their_data_sheets() {
    // ST M27C322 data sheet (April 2000), Figure 2A, DIP connections (read)
    let left = [
        "A18", "A17", "A7", "A6", "A5", "A4", "A3", "A2", "A1", "A0", "~E", "VSS", "~GVPP", "Q0",
        "Q8", "Q1", "Q9", "Q2", "Q10", "Q3", "Q11",
    ];
    let right = [
        "A19", "A8", "A9", "A10", "A11", "A12", "A13", "A14", "A15", "A16", "A20", "VSS", "Q15",
        "Q7", "Q14", "Q6", "Q13", "Q5", "Q12", "Q4", "VCC",
    ];
    let role = |n: &str| match n {
        "VSS" => Ground,
        "VCC" => Supply,
        q if q.starts_with('Q') => ThreeState,
        _ => Input,
    };
    let mut want: Vec<(u32, &str, PinRole)> = Vec::new();
    for (i, n) in left.iter().enumerate() {
        want.push((i as u32 + 1, n, role(n)));
    }
    for (i, n) in right.iter().enumerate() {
        want.push((42 - i as u32, n, role(n)));
    }
    expect_pins("m27c322", 42, &want);
    // from memory: JEDEC 40-pin word-wide EPROM (Atmel AT27C1024: 40-lead PDIP read in its
    // data sheet's features; the pin numbers are not)
    expect_pins(
        "27c1024",
        40,
        &[
            (1, "VPP", Input),
            (2, "~CE", Input),
            (3, "O15", ThreeState),
            (11, "GND", Ground),
            (19, "O0", ThreeState),
            (20, "~OE", Input),
            (21, "A0", Input),
            (30, "GND", Ground),
            (37, "A15", Input),
            (39, "~PGM", Input),
            (40, "VCC", Supply),
        ],
    );
}

#[test]
fn z80_peripherals_and_the_6845_pinouts() {
    // ~INT of the CTC is an open-drain output: Zilog CTC pin description ("output, open drain,
    // active Low"), read as quoted in a Memotech MTX service manual; pin numbers from memory
    expect_pins(
        "z80-ctc",
        28,
        &[
            (12, "~INT", OpenCollector),
            (5, "GND", Ground),
            (24, "VCC", Supply),
            (7, "ZC/TO0", PushPull),
            (23, "CLK/TRG0", Input),
            (25, "D0", Bidirectional),
        ],
    );
    // from memory: Zilog Z8420 PIO; the port pins' direction is the program's
    expect_pins(
        "z80-pio",
        40,
        &[
            (23, "~INT", OpenCollector),
            (11, "GND", Ground),
            (26, "VCC", Supply),
            (15, "PA0", Unknown),
            (27, "PB0", Unknown),
            (19, "D0", Bidirectional),
        ],
    );
    // from memory: Motorola MC6845
    expect_pins(
        "6845",
        40,
        &[
            (1, "VSS", Ground),
            (20, "VCC", Supply),
            (3, "LPSTB", Input),
            (4, "MA0", PushPull),
            (33, "D0", Bidirectional),
            (39, "HSYNC", PushPull),
            (40, "VSYNC", PushPull),
        ],
    );
}

#[test]
fn more_value_forms_name_their_parts() {
    let cases: &[(&str, u32, &str, &str)] = &[
        ("M27C322-100F1", 42, "CMOS-EPROM", "m27c322"),
        ("AT27C1024-70PU", 40, "CMOS-EPROM", "27c1024"),
        ("Z84C3008PEC", 28, "CMOS-TTL", "z80-ctc"),
        ("Z8430APS", 28, "NMOS", "z80-ctc"),
        ("Z80A-CTC", 28, "NMOS", "z80-ctc"),
        ("Z80PIO", 40, "NMOS", "z80-pio"),
        ("Z84C2008PEC", 40, "CMOS-TTL", "z80-pio"),
        ("MC6845P", 40, "NMOS", "6845"),
        ("HD46505SP", 40, "NMOS", "6845"),
    ];
    let items: Vec<(&str, &str, u32)> = cases.iter().map(|(v, n, _, _)| ("U1", *v, *n)).collect();
    let got = classify_values(&items);
    for ((v, n, fam, func), (kind, f, fu)) in cases.iter().zip(&got) {
        assert_eq!(*kind, PartKind::Logic, "{v} ({n} pins)");
        assert_eq!(f.as_deref(), Some(*fam), "{v} ({n} pins): family");
        assert_eq!(fu.as_deref(), Some(*func), "{v} ({n} pins): function");
    }
    // the 64-pin MC68450 DMA controller is no 6845
    let got = classify_values(&[("U1", "MC68450", 64)]);
    assert_ne!(got[0].2.as_deref(), Some("6845"));
}

#[test]
fn line_driver_1488_inputs_are_ttl_and_its_outputs_are_not_logic() {
    // from memory: MC1488 / SN75188 pin assignment; the input currents that make its inputs TTL
    // loads are TI SLLS094B's (IIL -1.6 mA max at VI 0)
    expect_pins(
        "1488",
        14,
        &[
            (1, "VCC-", Analog),
            (2, "1A", Input),
            (3, "1Y", Analog),
            (7, "GND", Ground),
            (12, "4A", Input),
            (13, "4B", Input),
            (14, "VCC+", Analog),
        ],
    );
    let got = classify_values(&[
        ("U1", "MC1488P", 14),
        ("U2", "SN75188N", 14),
        ("U3", "MC1489P", 14),
    ]);
    assert_eq!(got[0].2.as_deref(), Some("1488"));
    assert_eq!(got[0].1.as_deref(), Some("74"));
    assert_eq!(got[1].2.as_deref(), Some("1488"));
    // the receiver is a logic part on its output side (its own entry below)
    assert_eq!(got[2].2.as_deref(), Some("1489"));
}

/// A small netlist: an RS-232 driver on +-12 V with one input open and one driven, and a CRT
/// controller with its light-pen input open.
fn open_inputs_netlist() -> String {
    let comp = |r: &str, v: &str| {
        format!("    (comp (ref {r}) (value \"{v}\") (libsource (lib x) (part {r})))\n")
    };
    let node = |r: &str, p: u32| format!("(node (ref {r}) (pin {p}))");
    let net = |code: u32, name: &str, nodes: &[(&str, u32)]| {
        let n: String = nodes.iter().map(|(r, p)| node(r, *p)).collect();
        format!("    (net (code {code}) (name \"{name}\") {n})\n")
    };
    let mut s = String::from("(export (version D)\n  (components\n");
    s += &comp("U1", "SN75150P");
    s += &comp("U2", "74LS04");
    s += &comp("U3", "P8275");
    s += "  )\n  (nets\n";
    s += &net(1, "+5V", &[("U2", 14), ("U3", 40), ("U1", 1)]);
    s += &net(2, "GND", &[("U1", 4), ("U2", 7), ("U3", 20), ("U2", 1)]);
    s += &net(3, "+12V", &[("U1", 8)]);
    s += &net(4, "-12V", &[("U1", 5)]);
    s += &net(5, "Net-(U1-Pad2)", &[("U1", 2)]);
    s += &net(6, "TXD", &[("U2", 2), ("U1", 3)]);
    s += &net(7, "LINE", &[("U1", 6)]);
    s += &net(8, "Net-(U3-Pad11)", &[("U3", 11)]);
    s += "  ))\n";
    s
}

/// Runs `netmargin check --format json` on a netlist written to a temporary file.
fn check_json(name: &str, text: &str) -> serde_json::Value {
    let dir = std::env::temp_dir().join(format!("netmargin-periph-{name}-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join(format!("{name}.net"));
    std::fs::write(&path, text).unwrap();
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(["check", "--no-config", "--format", "json"])
        .arg(&path)
        .output()
        .unwrap();
    let _ = std::fs::remove_dir_all(&dir);
    serde_json::from_slice(&out.stdout).unwrap()
}

/// (check, severity, pins) of every finding of the first file.
fn findings(v: &serde_json::Value) -> Vec<(String, String, Vec<String>)> {
    v["files"][0]["findings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| {
            (
                f["check"].as_str().unwrap().to_string(),
                f["severity"].as_str().unwrap().to_string(),
                f["pins"]
                    .as_array()
                    .unwrap()
                    .iter()
                    .map(|p| p.as_str().unwrap().to_string())
                    .collect(),
            )
        })
        .collect()
}

#[test]
fn an_open_driver_input_and_an_open_light_pen_input_are_found() {
    let v = check_json("open-inputs", &open_inputs_netlist());
    let found = findings(&v);
    let at = |pin: &str| -> Vec<(&str, &str)> {
        found
            .iter()
            .filter(|f| f.2.iter().any(|p| p == pin))
            .map(|f| (f.0.as_str(), f.1.as_str()))
            .collect()
    };
    // SN75150 input 1A open: a TTL input floats high (from memory: IIL -1.6 mA, a standard-TTL
    // input); an assumption about the level, so a warning
    assert!(
        at("U1.2").contains(&("floating-ttl-input", "warning")),
        "{found:?}"
    );
    // its driven input 2A is not reported
    assert!(
        at("U1.3").iter().all(|f| f.0 != "floating-ttl-input"),
        "{found:?}"
    );
    // 8275 LPEN open: a MOS input with no pull-up floats (from memory), an error
    assert!(
        at("U3.11").contains(&("floating-cmos-input", "error")),
        "{found:?}"
    );
    // and the message names it for what it is: an NMOS input, not a CMOS one
    let lpen = v["files"][0]["findings"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["check"] == "floating-cmos-input" && f["pins"][0] == "U3.11")
        .map(|f| f["message"].as_str().unwrap().to_string())
        .unwrap_or_default();
    assert!(lpen.contains("an NMOS input must never float"), "{lpen}");
    // the driver's +-12 V supplies are outside the logic levels: no power finding for U1
    assert!(
        found
            .iter()
            .all(|f| !(f.2.iter().any(|p| p.starts_with("U1."))
                && (f.0 == "power-pin-miswired" || f.0 == "unpowered-part"))),
        "{found:?}"
    );
}

#[test]
fn processors_8086_and_8088_match_the_intel_pin_tables() {
    // Intel 8086 data sheet, Table 1 Pin Description: pin numbers and types (read); the order of
    // the bits inside AD15-AD0 (2-16, 39) and A19-A16 (35-38) from memory
    expect_pins(
        "8086",
        40,
        &[
            (1, "GND", Ground),
            (20, "GND", Ground),
            (40, "VCC", Supply),
            (16, "AD0", Bidirectional), // from memory (bit order)
            (2, "AD14", Bidirectional), // from memory (bit order)
            (39, "AD15", Bidirectional),
            (35, "A19/S6", ThreeState), // floats in hold acknowledge (read)
            (38, "A16/S3", ThreeState),
            (34, "~BHE/S7", ThreeState),
            (17, "NMI", Input),
            (18, "INTR", Input),
            (19, "CLK", Input),
            (21, "RESET", Input),
            (22, "READY", Input),
            (23, "~TEST", Input),
            (32, "~RD", ThreeState),
            (33, "MN/~MX", Input),
            // ALE "is never floated" (minimum mode), QS0 a queue status output (maximum mode)
            (25, "ALE/QS0", PushPull),
            (24, "~INTA/QS1", PushPull),
            // minimum mode M/IO, WR, DEN, DT/R float in hold acknowledge; maximum mode S2-S0 too
            (28, "M/~IO/~S2", ThreeState),
            (29, "~WR/~LOCK", ThreeState),
            // HLDA / HOLD in minimum mode, the pulled-up RQ/GT pins in maximum mode: unknown
            (30, "HLDA/~RQ/~GT1", Unknown),
            (31, "HOLD/~RQ/~GT0", Unknown),
        ],
    );
    // Intel 8088 data sheet, Table 1 Pin Description: AD7-AD0 on 9-16 (I/O), A15-A8 on 2-8 and 39
    // (O, float in hold acknowledge), RD 32, RQ/GT0 and RQ/GT1 on 30 and 31 (internal pull-up)
    expect_pins(
        "8088",
        40,
        &[
            (9, "AD7", Bidirectional),
            (16, "AD0", Bidirectional),
            (2, "A14", ThreeState), // from memory (bit order)
            (8, "A8", ThreeState),
            (39, "A15", ThreeState),
            (32, "~RD", ThreeState),
            (28, "IO/~M/~S2", ThreeState), // from memory
            (34, "~SS0", ThreeState),      // from memory
            (30, "HLDA/~RQ/~GT1", Unknown),
            (31, "HOLD/~RQ/~GT0", Unknown),
            (40, "VCC", Supply),
        ],
    );
}

#[test]
fn interrupt_controller_8259_matches_the_intel_pin_table() {
    // Intel 8259A data sheet (231468-003), Table 1 Pin Description (read); bit order from memory
    expect_pins(
        "8259",
        28,
        &[
            (1, "~CS", Input),
            (2, "~WR", Input),
            (3, "~RD", Input),
            (4, "D7", Bidirectional),
            (11, "D0", Bidirectional),
            (12, "CAS0", Unknown), // outputs on a master, inputs on a slave
            (15, "CAS2", Unknown),
            (14, "GND", Ground),
            (16, "~SP/~EN", Unknown), // input, or an output in buffered mode
            (17, "INT", PushPull),
            // internal pull-ups: ILIR -300 uA at VIN 0 (Intel 8259A D.C. characteristics)
            (18, "IR0", Unknown),
            (25, "IR7", Unknown),
            (26, "~INTA", Input),
            (27, "A0", Input),
            (28, "VCC", Supply),
        ],
    );
}

#[test]
fn commodore_6510_and_6526_pinouts() {
    // from memory: MOS 6510 pin configuration (secondary pin lists agree)
    expect_pins(
        "6510",
        40,
        &[
            (1, "PHI0", Input),
            (5, "AEC", Input),
            (6, "VCC", Supply),
            (7, "A0", ThreeState),
            (20, "A13", ThreeState),
            (21, "GND", Ground),
            (23, "A15", ThreeState),
            (24, "P5", Unknown),
            (29, "P0", Unknown),
            (30, "D7", Bidirectional),
            (37, "D0", Bidirectional),
            (39, "PHI2", PushPull),
            (40, "~RES", Input),
        ],
    );
    // the address pins float when AEC is low
    let t = table();
    let f = t.get(Series::Other, "6510").unwrap();
    let a0 = f.pin("7").unwrap();
    assert_eq!(a0.enable, vec!["5".to_string()]);
    assert!(!a0.enable_active_low);
    // MOS 6526 data sheet (11/81), pin configuration (read); IRQ open drain (its interface
    // description)
    expect_pins(
        "6526",
        40,
        &[
            (1, "VSS", Ground),
            (2, "PA0", Unknown),
            (17, "PB7", Unknown),
            (20, "VCC", Supply),
            (21, "~IRQ", OpenCollector),
            (22, "R/~W", Input),
            (23, "~CS", Input),
            (25, "PHI2", Input),
            (26, "DB7", Bidirectional),
            (33, "DB0", Bidirectional),
            (34, "~RES", Input),
            (35, "RS3", Input),
            (38, "RS0", Input),
            (39, "SP", Unknown),
            (40, "CNT", Unknown),
        ],
    );
}

#[test]
fn processors_and_controllers_of_the_second_batch_are_named_by_their_markings() {
    let cases: &[(&str, u32, &str, &str)] = &[
        ("8088", 40, "NMOS", "8088"),
        ("P8088", 40, "NMOS", "8088"),
        ("D8088-2", 40, "NMOS", "8088"),
        ("8086-2", 40, "NMOS", "8086"),
        ("C8086", 40, "NMOS", "8086"),
        ("80C88", 40, "CMOS-TTL", "8088"),
        ("CP80C88", 40, "CMOS-TTL", "8088"),
        ("MSM80C86A-10RS", 40, "CMOS-TTL", "8086"),
        ("P8259A", 28, "NMOS", "8259"),
        ("8259A-2", 28, "NMOS", "8259"),
        ("82C59A", 28, "CMOS-TTL", "8259"),
        ("MOS6510", 40, "NMOS", "6510"),
        ("6510", 40, "NMOS", "6510"),
        ("MOS6526", 40, "NMOS", "6526"),
        ("6526A", 40, "NMOS", "6526"),
    ];
    let items: Vec<(&str, &str, u32)> = cases.iter().map(|(v, n, _, _)| ("U1", *v, *n)).collect();
    let got = classify_values(&items);
    for ((v, n, fam, func), (kind, f, fu)) in cases.iter().zip(&got) {
        assert_eq!(*kind, PartKind::Logic, "{v} ({n} pins)");
        assert_eq!(f.as_deref(), Some(*fam), "{v} ({n} pins): family");
        assert_eq!(fu.as_deref(), Some(*func), "{v} ({n} pins): function");
    }
    // look-alikes: (value, highest pin, a function it must not be)
    let not: &[(&str, u32, &str)] = &[
        // a 74-series-looking value is never a processor
        ("74LS8088", 16, "8088"),
        // the i860 (a PGA far beyond 40 pins) is no 8086
        ("80860XR", 168, "8086"),
        // the 6510T (drive processor) has another pinout
        ("6510T", 40, "6510"),
        // the 8259A in its 28-pin DIP is not the 16-pin 74LS259 latch, nor the other way round
        ("74LS259", 16, "8259"),
    ];
    let items: Vec<(&str, &str, u32)> = not.iter().map(|(v, n, _)| ("U1", *v, *n)).collect();
    let got = classify_values(&items);
    for ((v, n, bad), (_, _, fu)) in not.iter().zip(&got) {
        assert_ne!(fu.as_deref(), Some(*bad), "{v} ({n} pins)");
    }
    // and the 74LS259 stays the latch
    assert_eq!(got[3].2.as_deref(), Some("259"));
}

#[test]
fn line_receiver_1489_and_rs485_transceiver_75176_check_only_their_logic_side() {
    // from memory: MC1489 / SN75189 pin assignment (TI's MC1489 product page: a low-power
    // Schottky part on one 5 V supply, 14-pin PDIP): line inputs and response-control pins take
    // RS-232 levels or a capacitor, analog; outputs totem-pole
    expect_pins(
        "1489",
        14,
        &[
            (1, "1A", Analog),
            (2, "1CONT", Analog),
            (3, "1Y", PushPull),
            (7, "GND", Ground),
            (8, "3Y", PushPull),
            (10, "3A", Analog),
            (11, "4Y", PushPull),
            (13, "4A", Analog),
            (14, "VCC", Supply),
        ],
    );
    // TI SLLS376G (SN75LBC176A), Table 4-1 Pin Functions (read); the SN75176B shares it
    expect_pins(
        "75176",
        8,
        &[
            (1, "R", ThreeState),
            (2, "~RE", Input),
            (3, "DE", Input),
            (4, "D", Input),
            (5, "GND", Ground),
            (6, "A", Analog),
            (7, "B", Analog),
            (8, "VCC", Supply),
        ],
    );
    // R is on while RE is low (SLLS376G: "receiver enable, active low")
    let t = table();
    let r = t
        .get(Series::Other, "75176")
        .unwrap()
        .pin("1")
        .unwrap()
        .clone();
    assert_eq!(r.enable, vec!["2".to_string()]);
    assert!(r.enable_active_low);
    let got = classify_values(&[
        ("U1", "MC1489AP", 14),
        ("U2", "SN75189N", 14),
        ("U3", "SN75176BP", 8),
        ("U4", "DS75176BN", 8),
        // still not logic: the charge-pump RS-232 transceiver and the driver array
        ("U5", "MAX232CPE", 16),
        ("U6", "ULN2003A", 16),
        // the 7-pin 75176 look-alike with more pins than the package is not taken
        ("U7", "SN75176BP", 14),
    ]);
    for (i, func) in [(0, "1489"), (1, "1489"), (2, "75176"), (3, "75176")] {
        assert_eq!(got[i].0, PartKind::Logic, "{i}");
        assert_eq!(got[i].1.as_deref(), Some("74LS"), "{i}");
        assert_eq!(got[i].2.as_deref(), Some(func), "{i}");
    }
    assert_eq!(got[4].0, PartKind::NotLogic);
    assert_eq!(got[5].0, PartKind::NotLogic);
    assert_ne!(got[6].2.as_deref(), Some("75176"));
}

#[test]
fn bipolar_proms_256x4_and_their_markings() {
    // from memory: the 256 x 4 PROM pinout; a circuit simulator's 74S287 description agrees on
    // the grouping (addresses 1-7 and 15, outputs 9-12, enables 13 and 14)
    let addr = [1u32, 2, 3, 4, 5, 6, 7, 15];
    for (id, out) in [("prom256x4", ThreeState), ("prom256x4-oc", OpenCollector)] {
        let want: Vec<(u32, &str, PinRole)> = vec![
            (5, "A0", Input),
            (15, "A7", Input),
            (8, "GND", Ground),
            (12, "Q0", out),
            (9, "Q3", out),
            (13, "~G1", Input),
            (14, "~G2", Input),
            (16, "VCC", Supply),
        ];
        let t = table();
        let f = t.get(Series::Other, id).unwrap();
        for p in addr {
            assert_eq!(f.pin(&p.to_string()).unwrap().role, Input, "{id} pin {p}");
        }
        expect_pins(id, 16, &want);
    }
    // three-state outputs on while both enables are low
    let t = table();
    let q = t
        .get(Series::Other, "prom256x4")
        .unwrap()
        .pin("9")
        .unwrap()
        .clone();
    assert_eq!(q.enable, vec!["13".to_string(), "14".to_string()]);
    assert!(q.enable_active_low);
    // p-n-p inputs (TI 1975 PROM bulletin): the 74LS figures stand in, never the 74S ones
    let cases: &[(&str, &str)] = &[
        ("74S287", "prom256x4"),
        ("SN74S287N", "prom256x4"),
        ("DM74S287AN", "prom256x4"),
        ("N82S129N", "prom256x4"),
        ("82S129", "prom256x4"),
        ("DM93427N", "prom256x4"),
        ("74S387", "prom256x4-oc"),
        ("N82S126N", "prom256x4-oc"),
    ];
    let items: Vec<(&str, &str, u32)> = cases.iter().map(|(v, _)| ("U1", *v, 16)).collect();
    let got = classify_values(&items);
    for ((v, func), (kind, fam, fu)) in cases.iter().zip(&got) {
        assert_eq!(*kind, PartKind::Logic, "{v}");
        assert_eq!(fam.as_deref(), Some("74LS"), "{v}");
        assert_eq!(fu.as_deref(), Some(*func), "{v}");
    }
    // the 16 x 4 RAMs go by the 74 pattern: family from the letters, function from the table
    let got = classify_values(&[
        ("U1", "74LS189", 16),
        ("U2", "7489", 16),
        ("U3", "SN74S189N", 16),
        ("U4", "74LS89", 16),
        // look-alikes: the 82S123 (32 x 8 PROM) and the 74S288 are other parts
        ("U5", "82S123", 16),
        ("U6", "74S288", 16),
        // the CMOS MM74C89 has three-state outputs (Fairchild MM74C89): not the 7489's table
        ("U7", "MM74C89N", 16),
    ]);
    assert_ne!(got[6].2.as_deref(), Some("89"), "{:?}", got[6]);
    assert_eq!(
        (got[0].1.as_deref(), got[0].2.as_deref()),
        (Some("74LS"), Some("189"))
    );
    assert_eq!(
        (got[1].1.as_deref(), got[1].2.as_deref()),
        (Some("74"), Some("89"))
    );
    assert_eq!(
        (got[2].1.as_deref(), got[2].2.as_deref()),
        (Some("74S"), Some("189"))
    );
    // the 89 table is the standard-TTL 7489's; an LS "89" is not taken for it (from memory: the
    // Schottky open-collector versions are numbered 289)
    assert_eq!(got[3].2.as_deref(), None);
    assert!(
        got[4].2.as_deref().is_none_or(|f| !f.starts_with("prom")),
        "{:?}",
        got[4]
    );
    assert!(
        got[5].2.as_deref().is_none_or(|f| !f.starts_with("prom")),
        "{:?}",
        got[5]
    );
}

/// A small board of the new parts: an 8088 in minimum mode with HOLD open and RESET open, an
/// 8259A with seven IR inputs open, a 6526 whose open-drain ~IRQ reaches the 6510's ~IRQ with
/// no pull-up, a 75176 whose DE is open, and an MC1489 whose line inputs are open.
fn second_batch_netlist() -> String {
    let comp = |r: &str, v: &str| {
        format!("    (comp (ref {r}) (value \"{v}\") (libsource (lib x) (part {r})))\n")
    };
    let node = |r: &str, p: u32| format!("(node (ref {r}) (pin {p}))");
    let net = |code: u32, name: &str, nodes: &[(&str, u32)]| {
        let n: String = nodes.iter().map(|(r, p)| node(r, *p)).collect();
        format!("    (net (code {code}) (name \"{name}\") {n})\n")
    };
    let mut s = String::from("(export (version D)\n  (components\n");
    for (r, v) in [
        ("U1", "P8088"),
        ("U2", "P8259A"),
        ("U3", "MOS6510"),
        ("U4", "MOS6526"),
        ("U5", "SN75176BP"),
        ("U6", "MC1489P"),
    ] {
        s += &comp(r, v);
    }
    s += "  )\n  (nets\n";
    s += &net(
        1,
        "+5V",
        &[
            ("U1", 40),
            ("U1", 33),
            ("U2", 28),
            ("U3", 6),
            ("U3", 5),
            ("U4", 20),
            ("U5", 8),
            ("U6", 14),
        ],
    );
    s += &net(
        2,
        "GND",
        &[
            ("U1", 1),
            ("U1", 20),
            ("U2", 14),
            ("U3", 21),
            ("U4", 1),
            ("U5", 5),
            ("U6", 7),
        ],
    );
    // 8259A INT drives the 8088's INTR; IR0 driven by the 1489's output, IR1-IR7 open
    s += &net(3, "INTR", &[("U2", 17), ("U1", 18)]);
    s += &net(4, "IRQ0", &[("U6", 3), ("U2", 18)]);
    s += &net(5, "Net-(U1-Pad31)", &[("U1", 31)]);
    s += &net(6, "Net-(U1-Pad21)", &[("U1", 21)]);
    // 6526 ~IRQ into the 6510's ~IRQ, nothing else
    s += &net(7, "CIAIRQ", &[("U4", 21), ("U3", 3)]);
    s += &net(8, "Net-(U5-Pad3)", &[("U5", 3)]);
    s += &net(9, "Net-(U6-Pad1)", &[("U6", 1)]);
    s += "  ))\n";
    s
}

#[test]
fn the_second_batch_finds_what_is_wrong_and_nothing_else_on_its_pins() {
    let v = check_json("second-batch", &second_batch_netlist());
    let found = findings(&v);
    let at = |pin: &str| -> Vec<(&str, &str)> {
        found
            .iter()
            .filter(|f| f.2.iter().any(|p| p == pin))
            .map(|f| (f.0.as_str(), f.1.as_str()))
            .collect()
    };
    // 8088 RESET (Intel 8088 Table 1: active high, must be held low to run) left open: an error
    assert!(
        at("U1.21").iter().any(|f| f.1 == "error"),
        "8088 RESET open: {found:?}"
    );
    // HOLD / RQ/GT0 depends on MN/MX: an open pin 31 is never called floating
    assert!(at("U1.31").is_empty(), "8088 pin 31: {found:?}");
    // the 8259A's IR inputs have internal pull-ups (Intel 8259A ILIR): no finding for IR1-IR7
    for p in 19..=25 {
        assert!(
            at(&format!("U2.{p}")).is_empty(),
            "8259A IR pin {p}: {found:?}"
        );
    }
    // the 6526's ~IRQ is open drain (MOS 6526 data sheet): with no pull-up, an error
    assert!(
        at("U4.21").contains(&("missing-pull-up", "error")),
        "6526 IRQ: {found:?}"
    );
    // the 75176's DE open: a TTL input floating high, a warning (its levels a stand-in)
    assert!(
        at("U5.3").contains(&("floating-ttl-input", "warning")),
        "75176 DE: {found:?}"
    );
    // the 1489's line input takes RS-232 levels: never a logic finding
    assert!(at("U6.1").is_empty(), "1489 line input: {found:?}");
    // no power finding for parts whose supplies are wired
    assert!(
        found
            .iter()
            .all(|f| f.0 != "unpowered-part" && f.0 != "power-pin-miswired"),
        "{found:?}"
    );
}

#[test]
fn z80_sio2_bonding_and_its_markings() {
    // from memory: Zilog Z8442 (SIO/2); an emulator's SIO pin diagram agrees on these pins
    expect_pins(
        "z80-sio2",
        40,
        &[
            (40, "D0", Bidirectional),
            (1, "D1", Bidirectional),
            (5, "~INT", OpenCollector),
            // sources disagree on the order of IEI and IEO: neither is judged
            (6, "IEI/IEO", Unknown),
            (7, "IEO/IEI", Unknown),
            (9, "VCC", Supply),
            (31, "GND", Ground),
            (10, "~W/RDYA", Unknown),
            (30, "~W/RDYB", Unknown),
            (11, "~SYNCA", Unknown),
            (13, "~RxCA", Input),
            (14, "~TxCA", Input),
            (15, "TxDA", PushPull),
            (20, "CLK", Input),
            (21, "~RESET", Input),
            // the SIO/2 bonding: DTRB, TxCB, RxCB kept, SYNCB given up (Zilog, as quoted)
            (25, "~DTRB", PushPull),
            (26, "TxDB", PushPull),
            (27, "~TxCB", Input),
            (28, "~RxCB", Input),
            (29, "RxDB", Input),
        ],
    );
    let got = classify_values(&[
        ("U1", "Z8442APS", 40),
        ("U2", "Z84C4208PEC", 40),
        ("U3", "Z80SIO/2", 40),
        // the SIO/0 and SIO/1 bond pins 25-29 otherwise: never the SIO/2 table
        ("U4", "Z8440APS", 40),
        ("U5", "Z84C4008PEC", 40),
        ("U6", "Z80SIO/0", 40),
    ]);
    assert_eq!(
        (got[0].1.as_deref(), got[0].2.as_deref()),
        (Some("NMOS"), Some("z80-sio2"))
    );
    assert_eq!(
        (got[1].1.as_deref(), got[1].2.as_deref()),
        (Some("CMOS-TTL"), Some("z80-sio2"))
    );
    assert_eq!(got[2].2.as_deref(), Some("z80-sio2"));
    for g in &got[3..] {
        assert_ne!(g.2.as_deref(), Some("z80-sio2"), "{g:?}");
    }
}

#[test]
fn display_processor_tms9918a_and_9928a_pinouts() {
    // from memory; a TI data-manual pin diagram (TMS9118 family with a TMS9918A column) and a
    // replacement board's pin map agree on these pins
    let common: &[(u32, &str, PinRole)] = &[
        (1, "~RAS", PushPull),
        (2, "~CAS", PushPull),
        (10, "AD0", PushPull),
        (11, "R/~W", PushPull),
        (12, "VSS", Ground),
        (13, "MODE", Input),
        (14, "~CSW", Input),
        (15, "~CSR", Input),
        (16, "~INT", Unknown), // open drain not confirmed
        (17, "CD7", Bidirectional),
        (24, "CD0", Bidirectional),
        (25, "RD7", Unknown),
        (32, "RD0", Unknown),
        (33, "VCC", Supply),
        (34, "~RESET/SYNC", Input),
        (37, "GROMCLK", PushPull),
        (39, "XTAL2", Analog),
        (40, "XTAL1", Analog),
    ];
    expect_pins("tms9918a", 40, common);
    expect_pins("tms9928a", 40, common);
    expect_pins(
        "tms9918a",
        40,
        &[
            (35, "EXTVDP", Analog),
            (36, "COMVID", Analog),
            (38, "CPUCLK", PushPull),
        ],
    );
    expect_pins(
        "tms9928a",
        40,
        &[(35, "B-Y", Analog), (36, "Y", Analog), (38, "R-Y", Analog)],
    );
    let got = classify_values(&[
        ("U1", "TMS9918ANL", 40),
        ("U2", "TMS9929ANL", 40),
        ("U3", "TMS9928A", 40),
        // the V9938 (a 64-pin successor) is another part
        ("U4", "V9938", 64),
        // the TMS9118 has no GROMCLK on pin 37 (TI data-manual pin diagram, as excerpted)
        ("U5", "TMS9118NL", 40),
    ]);
    assert_eq!(got[4].2.as_deref(), None);
    assert_eq!(
        (got[0].1.as_deref(), got[0].2.as_deref()),
        (Some("NMOS"), Some("tms9918a"))
    );
    assert_eq!(got[1].2.as_deref(), Some("tms9928a"));
    assert_eq!(got[2].2.as_deref(), Some("tms9928a"));
    assert!(got[3].2.as_deref().is_none_or(|f| !f.starts_with("tms99")));
}
