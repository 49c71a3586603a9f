//! The built-in function table against published pinouts, its structural invariants, and the
//! loader's errors. Expected pinouts are written out here from the named data sheets, not read
//! back from the table.

use netmargin::classify::function::{Function, FunctionTable, Series, BUILTIN_TEXT};
use netmargin::classify::PinRole;
use PinRole::*;

fn table() -> FunctionTable {
    match FunctionTable::parse(BUILTIN_TEXT) {
        Ok(t) => t,
        Err(e) => panic!("built-in table does not load: {e:#?}"),
    }
}

fn func<'a>(t: &'a FunctionTable, series: Series, id: &str) -> &'a Function {
    t.get(series, id)
        .unwrap_or_else(|| panic!("function {id} missing"))
}

/// Checks each (pin, role) and that the package has `pins` pins.
fn expect_roles(
    t: &FunctionTable,
    series: Series,
    id: &str,
    pins: u32,
    expected: &[(u32, PinRole)],
) {
    let f = func(t, series, id);
    assert_eq!(f.package_pins, pins, "{id}: package pins");
    for &(pin, role) in expected {
        let p = f
            .pin(&pin.to_string())
            .unwrap_or_else(|| panic!("{id}: pin {pin} missing"));
        assert_eq!(p.role, role, "{id}: pin {pin} ({}) role", p.name);
    }
}

/// Checks that the listed pins form one unit (gate, flip-flop, switch).
fn same_unit(t: &FunctionTable, series: Series, id: &str, pins: &[u32]) {
    let f = func(t, series, id);
    let units: Vec<Option<String>> = pins
        .iter()
        .map(|p| f.pin(&p.to_string()).and_then(|d| d.unit.clone()))
        .collect();
    assert!(units[0].is_some(), "{id}: pin {} has no unit", pins[0]);
    assert!(
        units.iter().all(|u| u == &units[0]),
        "{id}: pins {pins:?} are not one unit: {units:?}"
    );
}

const S74: Series = Series::S74;
const S40: Series = Series::S4000;

// ---------------------------------------------------------------------------------------
// Pinouts against data sheets (source named beside each).

#[test]
fn gates_quad_2_input() {
    let t = table();
    // TI SCHS118D (CD74HC08) pin functions: 1A=1 1B=2 1Y=3 2A=4 2B=5 2Y=6 GND=7 3Y=8 3A=9 3B=10
    // 4Y=11 4A=12 4B=13 VCC=14
    let q = [
        (1, Input),
        (2, Input),
        (3, PushPull),
        (4, Input),
        (5, Input),
        (6, PushPull),
        (7, Ground),
        (8, PushPull),
        (9, Input),
        (10, Input),
        (11, PushPull),
        (12, Input),
        (13, Input),
        (14, Supply),
    ];
    expect_roles(&t, S74, "08", 14, &q);
    // TI SCLS229L (SN74AHCT00): 1A=1 1B=2 1Y=3 2A=4 2B=5 2Y=6 GND=7 VCC=14 (the rest as the '08)
    expect_roles(&t, S74, "00", 14, &q);
    same_unit(&t, S74, "00", &[1, 2, 3]);
    same_unit(&t, S74, "00", &[8, 9, 10]);
    same_unit(&t, S74, "00", &[11, 12, 13]);
}

#[test]
fn hex_schmitt_inverter_14() {
    let t = table();
    // TI SCHS402 (CD74HCT14): 1A=1 1Y=2 2A=3 2Y=4 3A=5 3Y=6 GND=7 4Y=8 4A=9 5Y=10 5A=11 6Y=12
    // 6A=13 VCC=14
    let s = SchmittInput;
    expect_roles(
        &t,
        S74,
        "14",
        14,
        &[
            (1, s),
            (2, PushPull),
            (3, s),
            (4, PushPull),
            (5, s),
            (6, PushPull),
            (7, Ground),
            (8, PushPull),
            (9, s),
            (10, PushPull),
            (11, s),
            (12, PushPull),
            (13, s),
            (14, Supply),
        ],
    );
    same_unit(&t, S74, "14", &[9, 8]);
    same_unit(&t, S74, "14", &[13, 12]);
}

#[test]
fn dual_4_input_20_and_21() {
    let t = table();
    // TI SCLS791A (SN74HCS20) and SCHS418 (CD74HCT21): 1A=1 1B=2 NC=3 1C=4 1D=5 1Y=6 GND=7 2Y=8
    // 2A=9 2B=10 NC=11 2C=12 2D=13 VCC=14
    let e = [
        (1, Input),
        (2, Input),
        (3, NoConnect),
        (4, Input),
        (5, Input),
        (6, PushPull),
        (7, Ground),
        (8, PushPull),
        (9, Input),
        (10, Input),
        (11, NoConnect),
        (12, Input),
        (13, Input),
        (14, Supply),
    ];
    expect_roles(&t, S74, "20", 14, &e);
    expect_roles(&t, S74, "21", 14, &e);
    same_unit(&t, S74, "20", &[1, 2, 4, 5, 6]);
    same_unit(&t, S74, "20", &[8, 9, 10, 12, 13]);
}

#[test]
fn dual_d_flip_flop_74() {
    let t = table();
    // TI SN74AHC74 (JAJSQP0N) and SN74AC74 (SCAS521): 1CLR=1 1D=2 1CLK=3 1PRE=4 1Q=5 1Q~=6 GND=7
    // 2Q~=8 2Q=9 2PRE=10 2CLK=11 2D=12 2CLR=13 VCC=14
    expect_roles(
        &t,
        S74,
        "74",
        14,
        &[
            (1, Input),
            (2, Input),
            (3, Input),
            (4, Input),
            (5, PushPull),
            (6, PushPull),
            (7, Ground),
            (8, PushPull),
            (9, PushPull),
            (10, Input),
            (11, Input),
            (12, Input),
            (13, Input),
            (14, Supply),
        ],
    );
    same_unit(&t, S74, "74", &[1, 2, 3, 4, 5, 6]);
    same_unit(&t, S74, "74", &[8, 9, 10, 11, 12, 13]);
}

#[test]
fn decoder_138() {
    let t = table();
    // TI SCLS266N (SN74AHCT138): A=1 B=2 C=3 G2A=4 G2B=5 G1=6 Y7=7 GND=8 Y6..Y0=9..15 VCC=16
    let mut e = vec![
        (1, Input),
        (2, Input),
        (3, Input),
        (4, Input),
        (5, Input),
        (6, Input),
        (7, PushPull),
        (8, Ground),
    ];
    e.extend((9..=15).map(|p| (p, PushPull)));
    e.push((16, Supply));
    expect_roles(&t, S74, "138", 16, &e);
    let f = func(&t, S74, "138");
    assert!(f.pin("15").unwrap().name.contains("Y0"));
    assert!(f.pin("7").unwrap().name.contains("Y7"));
}

#[test]
fn transceiver_245() {
    let t = table();
    // TI SCLS020H (SN74HCT245): DIR=1 A1..A8=2..9 GND=10 B8..B1=11..18 OE~=19 VCC=20
    let mut e = vec![(1, Input), (10, Ground), (19, Input), (20, Supply)];
    e.extend((2..=9).map(|p| (p, Bidirectional)));
    e.extend((11..=18).map(|p| (p, Bidirectional)));
    expect_roles(&t, S74, "245", 20, &e);
    let f = func(&t, S74, "245");
    let a1 = f.pin("2").unwrap();
    assert!(a1.enable.contains(&"19".to_string()) && a1.enable_active_low);
    assert_eq!(f.pin("18").unwrap().name, "B1");
    same_unit(&t, S74, "245", &[2, 18]);
    same_unit(&t, S74, "245", &[9, 11]);
}

#[test]
fn counter_161() {
    let t = table();
    // TI CD74AC161 (JAJSUO2D): CLR=1 CLK=2 A..D=3..6 ENP=7 GND=8 LOAD=9 ENT=10 QD=11 QC=12 QB=13
    // QA=14 RCO=15 VCC=16
    let e = [
        (1, Input),
        (2, Input),
        (3, Input),
        (4, Input),
        (5, Input),
        (6, Input),
        (7, Input),
        (8, Ground),
        (9, Input),
        (10, Input),
        (11, PushPull),
        (12, PushPull),
        (13, PushPull),
        (14, PushPull),
        (15, PushPull),
        (16, Supply),
    ];
    expect_roles(&t, S74, "161", 16, &e);
    // counter clear and load are plain inputs (common practice)
    assert_eq!(func(&t, S74, "163").pin("1").unwrap().role, Input);
}

#[test]
fn shift_register_595() {
    let t = table();
    // onsemi MC74HC595A/D Rev. 8, pin assignment: QB=1 QC=2 QD=3 QE=4 QF=5 QG=6 QH=7 GND=8
    // SQH=9 RESET=10 SHIFT CLOCK=11 LATCH CLOCK=12 OUTPUT ENABLE=13 A (serial data)=14 QA=15
    // VCC=16. Its pin descriptions: output enable is active low and puts QA-QH in the
    // high-impedance state; the serial output is not affected by it; reset is active low.
    // TI SN74LV594A (JAJSPE6K) has the same arrangement with RCLR on pin 13.
    let z = ThreeState;
    expect_package(
        &t,
        S74,
        "595",
        &[
            z, z, z, z, z, z, z, Ground, PushPull, Input, Input, Input, Input, Input, z, Supply,
        ],
    );
    expect_enables(&t, S74, "595", &[1, 2, 3, 4, 5, 6, 7, 15], &["13"], true);
    expect_name(&t, S74, "595", 13, "OE~");
    expect_name(&t, S74, "595", 10, "SRCLR~");
    expect_name(&t, S74, "595", 14, "SER");
}

#[test]
fn cd4027_jk() {
    let t = table();
    // TI SCHS032D (CD4027B): Q2=1 Q2~=2 CLOCK2=3 RESET2=4 K2=5 J2=6 SET2=7 VSS=8 SET1=9 J1=10
    // K1=11 RESET1=12 CLOCK1=13 Q1~=14 Q1=15 VDD=16
    expect_roles(
        &t,
        S40,
        "4027",
        16,
        &[
            (1, PushPull),
            (2, PushPull),
            (3, Input),
            (4, Input),
            (5, Input),
            (6, Input),
            (7, Input),
            (8, Ground),
            (9, Input),
            (10, Input),
            (11, Input),
            (12, Input),
            (13, Input),
            (14, PushPull),
            (15, PushPull),
            (16, Supply),
        ],
    );
    same_unit(&t, S40, "4027", &[1, 2, 3, 4, 5, 6, 7]);
    same_unit(&t, S40, "4027", &[9, 10, 11, 12, 13, 14, 15]);
}

#[test]
fn analogue_multiplexers_4051_4052_4053() {
    let t = table();
    // TI SCHS047 (CD4051B): CH4=1 CH6=2 COM=3 CH7=4 CH5=5 INH=6 VEE=7 VSS=8 C=9 B=10 A=11 CH3=12
    // CH0=13 CH1=14 CH2=15 VDD=16
    let a = Analog;
    expect_roles(
        &t,
        S40,
        "4051",
        16,
        &[
            (1, a),
            (2, a),
            (3, a),
            (4, a),
            (5, a),
            (6, Input),
            (7, Ground),
            (8, Ground),
            (9, Input),
            (10, Input),
            (11, Input),
            (12, a),
            (13, a),
            (14, a),
            (15, a),
            (16, Supply),
        ],
    );
    assert_eq!(func(&t, S40, "4051").pin("7").unwrap().name, "VEE");
    // TI SCHS047 (CD4052B): Y0=1 Y2=2 YCOM=3 Y3=4 Y1=5 INH=6 VEE=7 VSS=8 B=9 A=10 X3=11
    expect_roles(
        &t,
        S40,
        "4052",
        16,
        &[
            (1, a),
            (2, a),
            (3, a),
            (4, a),
            (5, a),
            (6, Input),
            (7, Ground),
            (8, Ground),
            (9, Input),
            (10, Input),
            (11, a),
        ],
    );
    // TI SCHS354C (CD4053B-Q1): BY=1 BX=2 CY=3 CCOM=4 CX=5 INH=6 VEE=7 VSS=8 C=9 B=10 A=11
    expect_roles(
        &t,
        S40,
        "4053",
        16,
        &[
            (1, a),
            (2, a),
            (3, a),
            (4, a),
            (5, a),
            (6, Input),
            (7, Ground),
            (8, Ground),
            (9, Input),
            (10, Input),
            (11, Input),
        ],
    );
    assert_eq!(func(&t, S40, "4053").pin("7").unwrap().name, "VEE");
    // the 74HC4051 copies the CD4051B pinout
    let hc = func(&t, S74, "4051");
    assert_eq!(hc.pins, func(&t, S40, "4051").pins);
    assert!(hc.available_in("74HC") && !hc.available_in("74LS"));
}

#[test]
fn bilateral_switch_4066() {
    let t = table();
    // TI SN74HC4066 (JAJSGT1K), the CD4066B arrangement: 1A=1 1B=2 2B=3 2A=4 2C=5 3C=6 GND=7 3A=8
    // 3B=9 4B=10 4A=11 4C=12 1C=13 VCC=14 (C = control)
    let a = Analog;
    expect_roles(
        &t,
        S40,
        "4066",
        14,
        &[
            (1, a),
            (2, a),
            (3, a),
            (4, a),
            (5, Input),
            (6, Input),
            (7, Ground),
            (8, a),
            (9, a),
            (10, a),
            (11, a),
            (12, Input),
            (13, Input),
            (14, Supply),
        ],
    );
    same_unit(&t, S40, "4066", &[1, 2, 13]);
    same_unit(&t, S40, "4066", &[3, 4, 5]);
    same_unit(&t, S40, "4066", &[8, 9, 6]);
    same_unit(&t, S40, "4066", &[10, 11, 12]);
}

#[test]
fn triple_3_input_4023() {
    let t = table();
    // CD4023B pin table (secondary page, matches memory): gate 1 = 1,2,8 -> 9; gate 2 = 3,4,5 -> 6;
    // gate 3 = 11,12,13 -> 10; VSS=7 VDD=14
    same_unit(&t, S40, "4023", &[1, 2, 8, 9]);
    same_unit(&t, S40, "4023", &[3, 4, 5, 6]);
    same_unit(&t, S40, "4023", &[11, 12, 13, 10]);
    expect_roles(
        &t,
        S40,
        "4023",
        14,
        &[
            (9, PushPull),
            (6, PushPull),
            (10, PushPull),
            (7, Ground),
            (14, Supply),
            (8, Input),
        ],
    );
}

/// Checks every pin of the package: `roles[i]` is the role of pin `i + 1`.
fn expect_package(t: &FunctionTable, series: Series, id: &str, roles: &[PinRole]) {
    let all: Vec<(u32, PinRole)> = roles
        .iter()
        .enumerate()
        .map(|(i, &r)| (i as u32 + 1, r))
        .collect();
    expect_roles(t, series, id, roles.len() as u32, &all);
}

/// Checks that each listed output is three-state, enabled by `enables` with the given polarity.
fn expect_enables(
    t: &FunctionTable,
    series: Series,
    id: &str,
    outputs: &[u32],
    enables: &[&str],
    active_low: bool,
) {
    let f = func(t, series, id);
    let want: Vec<String> = enables.iter().map(|e| e.to_string()).collect();
    for &o in outputs {
        let p = f
            .pin(&o.to_string())
            .unwrap_or_else(|| panic!("{id}: pin {o} missing"));
        assert_eq!(p.role, ThreeState, "{id}: pin {o} role");
        assert_eq!(p.enable, want, "{id}: pin {o} enables");
        assert_eq!(p.enable_active_low, active_low, "{id}: pin {o} polarity");
    }
}

fn expect_name(t: &FunctionTable, series: Series, id: &str, pin: u32, name: &str) {
    let f = func(t, series, id);
    let p = f
        .pin(&pin.to_string())
        .unwrap_or_else(|| panic!("{id}: pin {pin} missing"));
    assert_eq!(p.name, name, "{id}: pin {pin} name");
}

#[test]
fn jk_flip_flop_73_non_corner_supply() {
    let t = table();
    // Motorola SN54/74LS73A (FAST and LS TTL Data, p. 5-68) connection diagram: CP1=1 CD1=2 K1=3
    // VCC=4 CP2=5 CD2=6 J2=7 Q2~=8 Q2=9 K2=10 GND=11 Q1=12 Q1~=13 J1=14; NXP 74HC73 Rev. 04 agrees
    expect_package(
        &t,
        S74,
        "73",
        &[
            Input, Input, Input, Supply, Input, Input, Input, PushPull, PushPull, Input, Ground,
            PushPull, PushPull, Input,
        ],
    );
    same_unit(&t, S74, "73", &[1, 2, 3, 12, 13, 14]);
    same_unit(&t, S74, "73", &[5, 6, 7, 8, 9, 10]);
    expect_name(&t, S74, "73", 13, "1Q~");
}

#[test]
fn adder_83_non_corner_supply() {
    let t = table();
    // Motorola SN54/74LS83A (FAST and LS TTL Data, p. 5-81) connection diagram: A4=1 S3=2 A3=3
    // B3=4 VCC=5 S2=6 B2=7 A2=8 S1=9 A1=10 B1=11 GND=12 C0=13 C4=14 S4=15 B4=16
    expect_package(
        &t,
        S74,
        "83",
        &[
            Input, PushPull, Input, Input, Supply, PushPull, Input, Input, PushPull, Input, Input,
            Ground, Input, PushPull, PushPull, Input,
        ],
    );
    expect_name(&t, S74, "83", 13, "C0");
    expect_name(&t, S74, "83", 14, "C4");
}

#[test]
fn monostables_122_123() {
    let t = table();
    // Motorola SN54/74LS122 (FAST and LS TTL Data, p. 5-1): A1=1 A2=2 B1=3 B2=4 CLR=5 Q~=6 GND=7
    // Q=8 RINT=9 NC=10 CEXT=11 NC=12 REXT/CEXT=13 VCC=14 (which of 6 and 8 is Q~ from memory)
    let a = Analog;
    expect_package(
        &t,
        S74,
        "122",
        &[
            Input, Input, Input, Input, Input, PushPull, Ground, PushPull, a, NoConnect, a,
            NoConnect, a, Supply,
        ],
    );
    // Motorola SN54/74LS123 (same page): 1A=1 1B=2 1CLR=3 1Q~=4 2Q=5 2CEXT=6 2REXT/CEXT=7 GND=8
    // 2A=9 2B=10 2CLR=11 2Q~=12 1Q=13 1CEXT=14 1REXT/CEXT=15 VCC=16
    expect_package(
        &t,
        S74,
        "123",
        &[
            Input, Input, Input, PushPull, PushPull, a, a, Ground, Input, Input, Input, PushPull,
            PushPull, a, a, Supply,
        ],
    );
    same_unit(&t, S74, "123", &[1, 2, 3, 4, 13, 14, 15]);
    same_unit(&t, S74, "123", &[5, 6, 7, 9, 10, 11, 12]);
}

#[test]
fn bus_buffers_125_126() {
    let t = table();
    // TI SCLS752C (SN74HCS125-Q1): 1OE~=1 1A=2 1Y=3 2OE~=4 2A=5 2Y=6 GND=7 3Y=8 3A=9 3OE~=10
    // 4Y=11 4A=12 4OE~=13 VCC=14; TI SCLS103F (SN74HC126): the same pins, enables active high
    let roles = [
        Input, Input, ThreeState, Input, Input, ThreeState, Ground, ThreeState, Input, Input,
        ThreeState, Input, Input, Supply,
    ];
    for (id, low) in [("125", true), ("126", false)] {
        expect_package(&t, S74, id, &roles);
        expect_enables(&t, S74, id, &[3], &["1"], low);
        expect_enables(&t, S74, id, &[6], &["4"], low);
        expect_enables(&t, S74, id, &[8], &["10"], low);
        expect_enables(&t, S74, id, &[11], &["13"], low);
        same_unit(&t, S74, id, &[8, 9, 10]);
    }
}

#[test]
fn multiplexers_151_153_157() {
    let t = table();
    // onsemi SN74LS151/D Rev. 6: I3=1 I2=2 I1=3 I0=4 Z=5 Z~=6 E~=7 GND=8 S2=9 S1=10 S0=11 I7=12
    // I6=13 I5=14 I4=15 VCC=16
    let mut r = vec![Input; 16];
    r[4] = PushPull;
    r[5] = PushPull;
    r[7] = Ground;
    r[15] = Supply;
    expect_package(&t, S74, "151", &r);
    expect_name(&t, S74, "151", 5, "Y");
    expect_name(&t, S74, "151", 6, "W");
    expect_name(&t, S74, "151", 11, "A");
    // onsemi SN74LS153/D Rev. 6 and Motorola MC74HC153: Ea~=1 S1=2 I3a..I0a=3..6 Za=7 GND=8
    // Zb=9 I0b..I3b=10..13 S0=14 Eb~=15 VCC=16
    let mut r = vec![Input; 16];
    r[6] = PushPull;
    r[7] = Ground;
    r[8] = PushPull;
    r[15] = Supply;
    expect_package(&t, S74, "153", &r);
    same_unit(&t, S74, "153", &[1, 3, 4, 5, 6, 7]);
    same_unit(&t, S74, "153", &[9, 10, 11, 12, 13, 15]);
    let f = func(&t, S74, "153");
    for select in ["2", "14"] {
        assert!(f.pin(select).unwrap().unit.is_none(), "153 pin {select}");
    }
    expect_name(&t, S74, "153", 2, "B");
    expect_name(&t, S74, "153", 14, "A");
    // Motorola SN54/74LS157 (p. 5-268): S=1 I0a=2 I1a=3 Za=4 I0b=5 I1b=6 Zb=7 GND=8 Zd=9 I1d=10
    // I0d=11 Zc=12 I1c=13 I0c=14 E~=15 VCC=16
    let mut r = vec![Input; 16];
    for p in [4, 7, 9, 12] {
        r[p - 1] = PushPull;
    }
    r[7] = Ground;
    r[15] = Supply;
    expect_package(&t, S74, "157", &r);
    same_unit(&t, S74, "157", &[2, 3, 4]);
    same_unit(&t, S74, "157", &[5, 6, 7]);
    same_unit(&t, S74, "157", &[9, 10, 11]);
    same_unit(&t, S74, "157", &[12, 13, 14]);
}

#[test]
fn shift_registers_164_165() {
    let t = table();
    // TI JAJSU12 (SN74AHCT164): A=1 B=2 QA..QD=3..6 GND=7 CLK=8 CLR~=9 QE..QH=10..13 VCC=14
    let p = PushPull;
    expect_package(
        &t,
        S74,
        "164",
        &[
            Input, Input, p, p, p, p, Ground, Input, Input, p, p, p, p, Supply,
        ],
    );
    // Motorola SN54/74LS165: PL~=1 CP1=2 P4..P7=3..6 Q7~=7 GND=8 Q7=9 DS=10 P0..P3=11..14
    // CP2=15 VCC=16
    let mut r = vec![Input; 16];
    r[6] = PushPull;
    r[7] = Ground;
    r[8] = PushPull;
    r[15] = Supply;
    expect_package(&t, S74, "165", &r);
    expect_name(&t, S74, "165", 9, "QH");
}

#[test]
fn up_down_counters_192_193() {
    let t = table();
    // Motorola SN54/74LS192/193 (p. 5-1) and TI SCLS122B (SN74HC193): P1/B=1 Q1/QB=2 Q0/QA=3
    // CPD/DOWN=4 CPU/UP=5 Q2/QC=6 Q3/QD=7 GND=8 P3/D=9 P2/C=10 PL~/LOAD~=11 TCU~/CO~=12
    // TCD~/BO~=13 MR/CLR=14 P0/A=15 VCC=16
    let p = PushPull;
    let r = [
        Input, p, p, Input, Input, p, p, Ground, Input, Input, Input, p, p, Input, Input, Supply,
    ];
    for id in ["192", "193"] {
        expect_package(&t, S74, id, &r);
        expect_name(&t, S74, id, 14, "CLR");
        expect_name(&t, S74, id, 12, "CO~");
    }
}

#[test]
fn octal_buffers_240_244_541() {
    let t = table();
    // TI SCAS293L (SN74LVC240A), JAJSQV2G (SN74ACT244), SDLS144D (SN74LS240/244): 1OE~=1
    // 1A1=2 2Y4=3 1A2=4 2Y3=5 1A3=6 2Y2=7 1A4=8 2Y1=9 GND=10 2A1=11 1Y4=12 2A2=13 1Y3=14 2A3=15
    // 1Y2=16 2A4=17 1Y1=18 2OE~=19 VCC=20
    let ts = ThreeState;
    let r = [
        Input, Input, ts, Input, ts, Input, ts, Input, ts, Ground, Input, ts, Input, ts, Input, ts,
        Input, ts, Input, Supply,
    ];
    for id in ["240", "244"] {
        expect_package(&t, S74, id, &r);
        expect_enables(&t, S74, id, &[18, 16, 14, 12], &["1"], true);
        expect_enables(&t, S74, id, &[9, 7, 5, 3], &["19"], true);
        same_unit(&t, S74, id, &[2, 18]);
        same_unit(&t, S74, id, &[8, 12]);
        same_unit(&t, S74, id, &[11, 9]);
        same_unit(&t, S74, id, &[17, 3]);
    }
    // TI SCAS298N (SN74LVC541A): OE1~=1 A1..A8=2..9 GND=10 Y8..Y1=11..18 OE2~=19 VCC=20
    let mut r = vec![Input; 20];
    for p in 11..=18 {
        r[p - 1] = ts;
    }
    r[9] = Ground;
    r[19] = Supply;
    expect_package(&t, S74, "541", &r);
    expect_enables(
        &t,
        S74,
        "541",
        &[11, 12, 13, 14, 15, 16, 17, 18],
        &["1", "19"],
        true,
    );
    for k in 0..8 {
        same_unit(&t, S74, "541", &[2 + k, 18 - k]);
    }
}

#[test]
fn octal_registers_374_574() {
    let t = table();
    // TI SCBS019D (SN74BCT374): OE~=1 1Q=2 1D=3 2D=4 2Q=5 3Q=6 3D=7 4D=8 4Q=9 GND=10 CLK=11
    // 5Q=12 5D=13 6D=14 6Q=15 7Q=16 7D=17 8D=18 8Q=19 VCC=20
    let ts = ThreeState;
    let r = [
        Input, ts, Input, Input, ts, ts, Input, Input, ts, Ground, Input, ts, Input, Input, ts, ts,
        Input, Input, ts, Supply,
    ];
    expect_package(&t, S74, "374", &r);
    expect_enables(&t, S74, "374", &[2, 5, 6, 9, 12, 15, 16, 19], &["1"], true);
    for (d, q) in [
        (3, 2),
        (4, 5),
        (7, 6),
        (8, 9),
        (13, 12),
        (14, 15),
        (17, 16),
        (18, 19),
    ] {
        same_unit(&t, S74, "374", &[d, q]);
    }
    expect_name(&t, S74, "374", 1, "OE~");
    // TI JAJSQC3F (SN74ACT574): OE~=1 D1..D8=2..9 GND=10 CLK=11 Q8..Q1=12..19 VCC=20
    let mut r = vec![Input; 20];
    for p in 12..=19 {
        r[p - 1] = ts;
    }
    r[9] = Ground;
    r[19] = Supply;
    expect_package(&t, S74, "574", &r);
    expect_enables(
        &t,
        S74,
        "574",
        &[12, 13, 14, 15, 16, 17, 18, 19],
        &["1"],
        true,
    );
    for k in 0..8 {
        same_unit(&t, S74, "574", &[2 + k, 19 - k]);
    }
    expect_name(&t, S74, "574", 1, "OE~");
}

#[test]
fn ripple_counters_390_393() {
    let t = table();
    // Motorola SN54/74LS390 (p. 5-1): CP0=1 MR=2 Q0=3 CP1=4 Q1=5 Q2=6 Q3=7 GND=8 Q3=9 Q2=10
    // Q1=11 CP1=12 Q0=13 MR=14 CP0=15 VCC=16
    let p = PushPull;
    expect_package(
        &t,
        S74,
        "390",
        &[
            Input, Input, p, Input, p, p, p, Ground, p, p, p, Input, p, Input, Input, Supply,
        ],
    );
    same_unit(&t, S74, "390", &[1, 2, 3, 4, 5, 6, 7]);
    same_unit(&t, S74, "390", &[9, 10, 11, 12, 13, 14, 15]);
    // Motorola SN54/74LS393 (same page): CP=1 MR=2 Q0..Q3=3..6 GND=7 Q3..Q0=8..11 MR=12 CP=13
    // VCC=14
    expect_package(
        &t,
        S74,
        "393",
        &[
            Input, Input, p, p, p, p, Ground, p, p, p, p, Input, Input, Supply,
        ],
    );
    same_unit(&t, S74, "393", &[1, 2, 3, 4, 5, 6]);
    same_unit(&t, S74, "393", &[8, 9, 10, 11, 12, 13]);
}

#[test]
fn triple_3_input_10() {
    let t = table();
    // TI SCLS083E (SN74HC10) functional pinout: 1A=1 1B=2 2A=3 2B=4 2C=5 2Y=6 GND=7 3Y=8 3A=9
    // 3B=10 3C=11 1Y=12 1C=13 VCC=14
    let p = PushPull;
    expect_package(
        &t,
        S74,
        "10",
        &[
            Input, Input, Input, Input, Input, p, Ground, p, Input, Input, Input, p, Input, Supply,
        ],
    );
    same_unit(&t, S74, "10", &[1, 2, 13, 12]);
    same_unit(&t, S74, "10", &[3, 4, 5, 6]);
    same_unit(&t, S74, "10", &[9, 10, 11, 8]);
}

#[test]
fn counter_oscillator_hc4060() {
    let t = table();
    // TI SCLS161D (SN74HC4060): QL=1 QM=2 QN=3 QF=4 QE=5 QG=6 QD=7 GND=8 CLKO=9 CLKO~=10
    // CLKI=11 CLR=12 QI=13 QH=14 QJ=15 VCC=16 (which of 9 and 10 is the complement from memory)
    let p = PushPull;
    let a = Analog;
    expect_package(
        &t,
        S74,
        "4060",
        &[p, p, p, p, p, p, p, Ground, a, a, a, Input, p, p, p, Supply],
    );
    assert!(func(&t, S74, "4060").available_in("74HC"));
    // QD is the fourth stage, QN the fourteenth (SCLS161D names stages by letter)
    expect_name(&t, S74, "4060", 7, "Q4");
    expect_name(&t, S74, "4060", 3, "Q14");
}

#[test]
fn hex_buffers_4049_4050() {
    let t = table();
    // TI SCHS046 (CD4049UB, CD4050B): VCC=1 G=2 A=3 H=4 B=5 I=6 C=7 VSS=8 D=9 J=10 E=11 K=12
    // NC=13 F=14 L=15 NC=16
    let p = PushPull;
    let r = [
        Supply, p, Input, p, Input, p, Input, Ground, Input, p, Input, p, NoConnect, Input, p,
        NoConnect,
    ];
    for id in ["4049", "4050"] {
        expect_package(&t, S40, id, &r);
        for (i, o) in [(3, 2), (5, 4), (7, 6), (9, 10), (11, 12), (14, 15)] {
            same_unit(&t, S40, id, &[i, o]);
        }
    }
}

#[test]
fn cmos_quad_2_input_4001_4070_4071_4081() {
    let t = table();
    // NXP HEF4001B Rev. 9, pin configuration: 1A=1 1B=2 1Y=3 2Y=4 2A=5 2B=6 VSS=7 3A=8 3B=9
    // 3Y=10 4Y=11 4A=12 4B=13 VDD=14 (pin description: nA 1, 5, 8, 12; nB 2, 6, 9, 13;
    // nY 3, 4, 10, 11). The same arrangement, pin for pin, in NXP HEF4071B Rev. 06 and
    // HEF4081B Rev. 7 (pin configurations) and Nexperia HEF4070B Rev. 5 (pin description:
    // 1A-4A 1, 5, 8, 12; 1B-4B 2, 6, 9, 13; 1Y-4Y 3, 4, 10, 11; VSS 7; VDD 14).
    let (i, p) = (Input, PushPull);
    let r = [i, i, p, p, i, i, Ground, i, i, p, p, i, i, Supply];
    for id in ["4001", "4070", "4071", "4081"] {
        expect_package(&t, S40, id, &r);
        for gate in [[1, 2, 3], [5, 6, 4], [8, 9, 10], [12, 13, 11]] {
            same_unit(&t, S40, id, &gate);
        }
        expect_name(&t, S40, id, 7, "VSS");
        expect_name(&t, S40, id, 14, "VDD");
    }
}

#[test]
fn schmitt_nand_4093() {
    let t = table();
    // NXP HEF4093B Rev. 8, functional diagram and pin configuration: 1A=1 1B=2 1Y=3 2Y=4 2A=5
    // 2B=6 VSS=7 3A=8 3B=9 3Y=10 4Y=11 4A=12 4B=13 VDD=14; every input is a Schmitt trigger
    let (s, p) = (SchmittInput, PushPull);
    expect_package(
        &t,
        S40,
        "4093",
        &[s, s, p, p, s, s, Ground, s, s, p, p, s, s, Supply],
    );
    for gate in [[1, 2, 3], [5, 6, 4], [8, 9, 10], [12, 13, 11]] {
        same_unit(&t, S40, "4093", &gate);
    }
}

#[test]
fn hex_schmitt_inverter_40106() {
    let t = table();
    // Motorola MC14106B (pin for pin the CD40106B), logic diagram: 1->2 3->4 5->6 9->8 11->10
    // 13->12, VDD = pin 14, VSS = pin 7. TI SCHS097F (CD40106B) logic diagram, A 1 (3, 5, 9,
    // 11, 13) -> G 2 (4, 6, 8, 10, 12), and Nexperia HEF40106B (1A 1 -> 1Y 2 ... 6A 13 -> 6Y 12)
    // agree on the pairs.
    let (s, p) = (SchmittInput, PushPull);
    expect_package(
        &t,
        S40,
        "40106",
        &[s, p, s, p, s, p, Ground, p, s, p, s, p, s, Supply],
    );
    for (a, y) in [(1, 2), (3, 4), (5, 6), (9, 8), (11, 10), (13, 12)] {
        same_unit(&t, S40, "40106", &[a, y]);
    }
}

#[test]
fn ripple_counters_4020_4040() {
    let t = table();
    let (i, p) = (Input, PushPull);
    // Motorola MC14020B (REV 3), logic diagram: CLOCK=10 RESET=11 Q1=9 Q4=7 Q5=5 Q6=4 Q7=6
    // Q8=13 Q9=12 Q10=14 Q11=15 Q12=1 Q13=2 Q14=3 VDD=16 VSS=8. Nexperia HEF4020B Rev. 11
    // (stages counted from Q0) agrees: CP 10, MR 11, Q0 9, Q3 7 ... Q13 3.
    expect_package(
        &t,
        S40,
        "4020",
        &[p, p, p, p, p, p, p, Ground, p, i, i, p, p, p, p, Supply],
    );
    for (pin, name) in [
        (1, "Q12"),
        (2, "Q13"),
        (3, "Q14"),
        (4, "Q6"),
        (5, "Q5"),
        (6, "Q7"),
        (7, "Q4"),
        (9, "Q1"),
        (12, "Q9"),
        (13, "Q8"),
        (14, "Q10"),
        (15, "Q11"),
    ] {
        expect_name(&t, S40, "4020", pin, name);
    }
    // Motorola MC14040B (REV 3), logic diagram: CLOCK=10 RESET=11 Q1=9 Q2=7 Q3=6 Q4=5 Q5=3
    // Q6=2 Q7=4 Q8=13 Q9=12 Q10=14 Q11=15 Q12=1 VDD=16 VSS=8; NXP HEF4040B Rev. 06 agrees.
    // Motorola MC54/74HC4040A (REV 1) gives the same pin assignment for the 74HC4040.
    let r = [p, p, p, p, p, p, p, Ground, p, i, i, p, p, p, p, Supply];
    expect_package(&t, S40, "4040", &r);
    expect_package(&t, S74, "4040", &r);
    for (pin, name) in [
        (1, "Q12"),
        (2, "Q6"),
        (3, "Q5"),
        (4, "Q7"),
        (5, "Q4"),
        (6, "Q3"),
        (7, "Q2"),
        (9, "Q1"),
        (12, "Q9"),
        (13, "Q8"),
        (14, "Q10"),
        (15, "Q11"),
    ] {
        expect_name(&t, S40, "4040", pin, name);
        expect_name(&t, S74, "4040", pin, name);
    }
    for (pin, name) in [(10, "CLK"), (11, "RESET")] {
        expect_name(&t, S40, "4020", pin, name);
        expect_name(&t, S40, "4040", pin, name);
    }
    assert!(func(&t, S74, "4040").available_in("74HC"));
}

#[test]
fn bcd_to_decimal_decoder_4028() {
    let t = table();
    // Nexperia HEF4028B Rev. 10, pin configuration: Y4=1 Y2=2 Y0=3 Y7=4 Y9=5 Y5=6 Y6=7 VSS=8
    // Y8=9 A0=10 A3=11 A2=12 A1=13 Y1=14 Y3=15 VDD=16. ST HCF4028B (September 2002) pin
    // description: A, B, C, D = 10, 13, 12, 11; outputs 0 to 9 = 3, 14, 2, 15, 1, 6, 7, 4, 9, 5;
    // VSS 8, VDD 16.
    let (i, p) = (Input, PushPull);
    expect_package(
        &t,
        S40,
        "4028",
        &[p, p, p, p, p, p, p, Ground, p, i, i, i, i, p, p, Supply],
    );
    for (n, pin) in [3, 14, 2, 15, 1, 6, 7, 4, 9, 5].into_iter().enumerate() {
        expect_name(&t, S40, "4028", pin, &format!("Q{n}"));
    }
    for (pin, name) in [(10, "A"), (13, "B"), (12, "C"), (11, "D")] {
        expect_name(&t, S40, "4028", pin, name);
    }
}

#[test]
fn partly_checked_4013_and_4511() {
    let t = table();
    let (i, p) = (Input, PushPull);
    // Nexperia HEF4013B Rev. 10, pin configuration: 1Q=1 1Q~=2 1CP=3 1CD=4 1D=5 1SD=6 VSS=7
    // 2SD=8 2D=9 2CD=10 2CP=11 2Q~=12 2Q=13 VDD=14 (the text lost the overbars, so which of 1/2
    // and 13/12 is the complement stays from memory; every role below is read). Motorola
    // MC14013B (REV 3): VDD = pin 14, VSS = pin 7.
    expect_package(
        &t,
        S40,
        "4013",
        &[p, p, i, i, i, i, Ground, i, i, i, i, p, p, Supply],
    );
    same_unit(&t, S40, "4013", &[1, 2, 3, 4, 5, 6]);
    same_unit(&t, S40, "4013", &[8, 9, 10, 11, 12, 13]);
    for (pin, name) in [(3, "CLK1"), (4, "RESET1"), (5, "D1"), (6, "SET1")] {
        expect_name(&t, S40, "4013", pin, name);
    }
    for (pin, name) in [(8, "SET2"), (9, "D2"), (10, "RESET2"), (11, "CLK2")] {
        expect_name(&t, S40, "4013", pin, name);
    }
    // NXP HEF4511B Rev. 7, functional diagram: D1=1 D2=2 LT~=3 BL~=4 LE=5 D3=6 D0=7 Qe=9 Qd=10
    // Qc=11 Qb=12 Qa=13 Qg=14 Qf=15 (LT and BL active LOW per its general description). The
    // supply pins (VSS=8, VDD=16) were not in the text read and stay from memory. Its general
    // description calls the segment outputs "NPN bipolar transistor" outputs: emitter
    // followers, open-emitter.
    let mut read = vec![];
    for pin in 1..=7 {
        read.push((pin, i));
    }
    for pin in 9..=15 {
        read.push((pin, OpenEmitter));
    }
    expect_roles(&t, S40, "4511", 16, &read);
    for (pin, name) in [
        (1, "B"),
        (2, "C"),
        (3, "LT~"),
        (4, "BL~"),
        (5, "LE"),
        (6, "D"),
        (7, "A"),
        (9, "e"),
        (10, "d"),
        (11, "c"),
        (12, "b"),
        (13, "a"),
        (14, "g"),
        (15, "f"),
    ] {
        expect_name(&t, S40, "4511", pin, name);
    }
}

#[test]
fn hc_triple_multiplexer_4053() {
    let t = table();
    // NXP 74HC4053; 74HCT4053 Rev. 8, pin description: E~=6 VEE=7 GND=8; S1, S2, S3 = 11, 10, 9;
    // 1Y0, 2Y0, 3Y0 = 12, 2, 5; 1Y1, 2Y1, 3Y1 = 13, 1, 3; 1Z, 2Z, 3Z = 14, 15, 4; VCC=16
    let (a, i) = (Analog, Input);
    expect_package(
        &t,
        S74,
        "4053",
        &[
            a, a, a, a, a, i, Ground, Ground, i, i, i, a, a, a, a, Supply,
        ],
    );
    // each switch with its select input: 1 = S1 11, Y0 12, Y1 13, Z 14; 2 = S2 10, Y0 2, Y1 1,
    // Z 15; 3 = S3 9, Y0 5, Y1 3, Z 4
    same_unit(&t, S74, "4053", &[11, 12, 13, 14]);
    same_unit(&t, S74, "4053", &[10, 2, 1, 15]);
    same_unit(&t, S74, "4053", &[9, 5, 3, 4]);
    expect_name(&t, S74, "4053", 7, "VEE");
    assert!(func(&t, S74, "4053").available_in("74HC"));
}

// From memory (no data sheet text at hand): common pinouts every bench technician knows.
#[test]
fn common_pinouts_from_memory() {
    let t = table();
    // 7402 (from memory): 1Y=1 1A=2 1B=3 ... GND=7, 3A=8 3B=9 3Y=10, 4A=11 4B=12 4Y=13, VCC=14
    expect_roles(
        &t,
        S74,
        "02",
        14,
        &[
            (1, PushPull),
            (2, Input),
            (3, Input),
            (10, PushPull),
            (13, PushPull),
            (7, Ground),
            (14, Supply),
        ],
    );
    same_unit(&t, S74, "02", &[1, 2, 3]);
    same_unit(&t, S74, "02", &[11, 12, 13]);
    // 74373 (from memory): OE~=1 LE=11 GND=10 VCC=20, 1D=3 -> 1Q=2, 8D=18 -> 8Q=19
    expect_roles(
        &t,
        S74,
        "373",
        20,
        &[
            (1, Input),
            (11, Input),
            (2, ThreeState),
            (19, ThreeState),
            (3, Input),
            (18, Input),
            (10, Ground),
            (20, Supply),
        ],
    );
    same_unit(&t, S74, "373", &[3, 2]);
    // CD4013B (from memory): Q1=1 Q1~=2 CLK1=3 RESET1=4 D1=5 SET1=6 VSS=7 ... VDD=14
    expect_roles(
        &t,
        S40,
        "4013",
        14,
        &[
            (1, PushPull),
            (2, PushPull),
            (3, Input),
            (4, Input),
            (5, Input),
            (6, Input),
            (7, Ground),
            (13, PushPull),
            (14, Supply),
        ],
    );
    // CD4017B (from memory): CO=12 CLK INH=13 CLK=14 RESET=15 VSS=8 VDD=16; Q0=3
    expect_roles(
        &t,
        S40,
        "4017",
        16,
        &[
            (3, PushPull),
            (12, PushPull),
            (13, Input),
            (14, Input),
            (15, Input),
            (8, Ground),
            (16, Supply),
        ],
    );
    // CD4060B (from memory; the SN74HC4060 arrangement is checked above): oscillator pins 9,
    // 10, 11 are analogue; RESET=12
    expect_roles(
        &t,
        S40,
        "4060",
        16,
        &[
            (9, Analog),
            (10, Analog),
            (11, Analog),
            (12, Input),
            (8, Ground),
            (16, Supply),
        ],
    );
    assert_eq!(func(&t, S74, "4060").pins, func(&t, S40, "4060").pins);
    // CD4046B (from memory): C1 on 6/7, VCO in 9, R1 11, R2 12 analogue; VCO out 4, comparator in 3
    expect_roles(
        &t,
        S40,
        "4046",
        16,
        &[
            (6, Analog),
            (7, Analog),
            (9, Analog),
            (11, Analog),
            (12, Analog),
            (4, PushPull),
            (3, Input),
            (5, Input),
            (8, Ground),
            (16, Supply),
        ],
    );
    // CD4094B (from memory): Q1..Q4 = 4..7 three-state, enabled by OE=15 (active high)
    let f = func(&t, S40, "4094");
    assert_eq!(f.pin("4").unwrap().enable, vec!["15".to_string()]);
    assert!(!f.pin("4").unwrap().enable_active_low);
    assert_eq!(f.pin("9").unwrap().role, PushPull);
}

#[test]
fn schmitt_inputs() {
    let t = table();
    for (s, id, pin) in [
        (S74, "14", 1),
        (S74, "132", 1),
        (S74, "132", 13),
        (S40, "4093", 1),
        (S40, "40106", 1),
        (S40, "4584", 13),
        (S74, "121", 5),
        (S74, "221", 2),
        (S74, "221", 10),
    ] {
        assert_eq!(
            func(&t, s, id).pin(&pin.to_string()).unwrap().role,
            SchmittInput,
            "{id} pin {pin}"
        );
    }
    // the 74221's A inputs are not Schmitt (from memory)
    assert_eq!(func(&t, S74, "221").pin("1").unwrap().role, Input);
}

#[test]
fn special_pins() {
    let t = table();
    // 7447 BI~/RBO~ (pin 4) has an internal pull-up and doubles as an output (from memory)
    let f = func(&t, S74, "47");
    assert_eq!(f.pin("4").unwrap().role, PulledUpIo);
    // segment a (pin 13) is open collector (from memory)
    assert_eq!(f.pin("13").unwrap().role, OpenCollector);
    // 74121 RINT (pin 9), CEXT (10), REXT/CEXT (11) are analogue (from memory)
    let f = func(&t, S74, "121");
    for p in ["9", "10", "11"] {
        assert_eq!(f.pin(p).unwrap().role, Analog, "121 pin {p}");
    }
    // 74181 A=B (pin 14) is open collector (from memory)
    assert_eq!(func(&t, S74, "181").pin("14").unwrap().role, OpenCollector);
}

#[test]
fn nor_02_and_inverter_04() {
    let t = table();
    let (i, p) = (Input, PushPull);
    // TI SCHS304D (CD74AC02) pin functions: 1Y=1 1A=2 1B=3 2Y=4 2A=5 2B=6 GND=7 3A=8 3B=9 3Y=10
    // 4A=11 4B=12 4Y=13 VCC=14; the logic diagram of TI SCHS309B (CD74ACT02) agrees
    expect_package(
        &t,
        S74,
        "02",
        &[p, i, i, p, i, i, Ground, i, i, p, i, i, p, Supply],
    );
    for gate in [[1, 2, 3], [4, 5, 6], [8, 9, 10], [11, 12, 13]] {
        same_unit(&t, S74, "02", &gate);
    }
    expect_name(&t, S74, "02", 1, "1Y");
    expect_name(&t, S74, "02", 10, "3Y");
    // TI SCLS078F (SN74HC04), top view: 1A=1 1Y=2 2A=3 2Y=4 3A=5 3Y=6 GND=7 4Y=8 4A=9 5Y=10 5A=11
    // 6Y=12 6A=13 VCC=14
    expect_package(
        &t,
        S74,
        "04",
        &[i, p, i, p, i, p, Ground, p, i, p, i, p, i, Supply],
    );
    for (a, y) in [(1, 2), (3, 4), (5, 6), (9, 8), (11, 10), (13, 12)] {
        same_unit(&t, S74, "04", &[a, y]);
    }
}

#[test]
fn eight_input_nand_30() {
    let t = table();
    // TI SCLS800A (SN74HCS30) pin functions: A..F=1..6 GND=7 Y=8 NC=9, 10, 13 G=11 H=12 VCC=14;
    // TI SDAS010E (SN74ALS30A) top view agrees
    let i = Input;
    expect_package(
        &t,
        S74,
        "30",
        &[
            i, i, i, i, i, i, Ground, PushPull, NoConnect, NoConnect, i, i, NoConnect, Supply,
        ],
    );
    same_unit(&t, S74, "30", &[1, 2, 3, 4, 5, 6, 8, 11, 12]);
}

#[test]
fn identity_comparator_688() {
    let t = table();
    // TI SDAS228A (SN74ALS688), top view: G~=1 P0=2 Q0=3 P1=4 Q1=5 P2=6 Q2=7 P3=8 Q3=9 GND=10
    // P4=11 Q4=12 P5=13 Q5=14 P6=15 Q6=16 P7=17 Q7=18 P=Q~=19 VCC=20; totem-pole output
    let mut r = vec![Input; 20];
    r[9] = Ground;
    r[18] = PushPull;
    r[19] = Supply;
    expect_package(&t, S74, "688", &r);
    expect_name(&t, S74, "688", 2, "P0");
    expect_name(&t, S74, "688", 18, "Q7");
}

#[test]
fn hex_bus_driver_367() {
    let t = table();
    // TI SCLS398I (SN74LV367A) pin functions: 1OE~=1 1A1=2 1Y1=3 1A2=4 1Y2=5 1A3=6 1Y3=7 GND=8
    // 1Y4=9 1A4=10 2Y1=11 2A1=12 2Y2=13 2A2=14 2OE~=15 VCC=16
    let (i, z) = (Input, ThreeState);
    expect_package(
        &t,
        S74,
        "367",
        &[i, i, z, i, z, i, z, Ground, z, i, z, i, z, i, i, Supply],
    );
    expect_enables(&t, S74, "367", &[3, 5, 7, 9], &["1"], true);
    expect_enables(&t, S74, "367", &[11, 13], &["15"], true);
    for (a, y) in [(2, 3), (4, 5), (6, 7), (10, 9), (12, 11), (14, 13)] {
        same_unit(&t, S74, "367", &[a, y]);
    }
}

#[test]
fn cmos_nand_4011() {
    let t = table();
    // Tiger Electronic CD4011 data sheet, pin assignment and logic diagram: A=1 B=2 J=3 K=4 C=5
    // D=6 VSS=7 E=8 F=9 L=10 M=11 G=12 H=13 VDD=14, with J = A.B, K = C.D, L = E.F, M = G.H
    let (i, p) = (Input, PushPull);
    expect_package(
        &t,
        S40,
        "4011",
        &[i, i, p, p, i, i, Ground, i, i, p, p, i, i, Supply],
    );
    for gate in [[1, 2, 3], [5, 6, 4], [8, 9, 10], [12, 13, 11]] {
        same_unit(&t, S40, "4011", &gate);
    }
}

#[test]
fn partly_checked_175_and_238() {
    let t = table();
    let p = PushPull;
    // TI SCHS345A (CD74ACT175) pin functions, pins 1-8: CLR=1 1Q=2 1Q~=3 1D=4 2D=5 2Q, 2Q~=6, 7
    // GND=8 (which of 2/3 and 6/7 is the inverted output is not legible there)
    expect_roles(
        &t,
        S74,
        "175",
        16,
        &[
            (1, Input),
            (2, p),
            (3, p),
            (4, Input),
            (5, Input),
            (6, p),
            (7, p),
            (8, Ground),
        ],
    );
    same_unit(&t, S74, "175", &[2, 3, 4]);
    same_unit(&t, S74, "175", &[5, 6, 7]);
    // TI JAJSNC7J (CD74HC238) pin functions, pins 1-14: A0..A2=1..3 G0~=4 G1~=5 G2=6 Y7=7 GND=8
    // Y6..Y1=9..14
    let mut e: Vec<(u32, PinRole)> = (1..=6).map(|n| (n, Input)).collect();
    e.push((7, p));
    e.push((8, Ground));
    e.extend((9..=14).map(|n| (n, p)));
    expect_roles(&t, S74, "238", 16, &e);
    assert!(func(&t, S74, "238").pin("7").unwrap().name.contains("Y7"));
}

#[test]
fn quad_or_32() {
    let t = table();
    // TI JAJSV31E (SN74ACT32, Japanese edition) pin functions: 1A=1 1B=2 1Y=3 2A=4 2B=5 2Y=6
    // GND=7 3Y=8 3A=9 3B=10 4Y=11 4A=12 4B=13 VCC=14
    let (i, p) = (Input, PushPull);
    expect_package(
        &t,
        S74,
        "32",
        &[i, i, p, i, i, p, Ground, p, i, i, p, i, i, Supply],
    );
    for gate in [[1, 2, 3], [4, 5, 6], [9, 10, 8], [12, 13, 11]] {
        same_unit(&t, S74, "32", &gate);
    }
    expect_name(&t, S74, "32", 8, "3Y");
    expect_name(&t, S74, "32", 11, "4Y");
}

#[test]
fn open_collector_hex_05_07() {
    let t = table();
    let (i, o) = (Input, OpenCollector);
    let r = [i, o, i, o, i, o, Ground, o, i, o, i, o, i, Supply];
    // TI SDLS030A (SN7405, SN74LS05), J/N/D top view: 1A=1 1Y=2 2A=3 2Y=4 3A=5 3Y=6 GND=7 4Y=8
    // 4A=9 5Y=10 5A=11 6Y=12 6A=13 VCC=14; "the open-collector outputs require pullup resistors".
    // TI SCLS080F (SN74HC05, open drain) functional pinout: the same numbers.
    expect_package(&t, S74, "05", &r);
    // TI SDLS032H (SN7407, SN7417) pin functions and TI SDLS021D (SN74LS07): 1A=1 1Y=2 2A=3
    // 2Y=4 3A=5 3Y=6 GND=7 4Y=8 4A=9 5Y=10 5A=11 6Y=12 6A=13 VCC=14; open-collector outputs
    expect_package(&t, S74, "07", &r);
    for id in ["05", "07"] {
        for (a, y) in [(1, 2), (3, 4), (5, 6), (9, 8), (11, 10), (13, 12)] {
            same_unit(&t, S74, id, &[a, y]);
        }
    }
}

#[test]
fn octal_buffer_241_complementary_enables() {
    let t = table();
    // TI JAJSQC5E (SN74ACT241, Japanese edition) pin functions: 1OE=1 1A1=2 2Y4=3 1A2=4 2Y3=5
    // 1A3=6 2Y2=7 1A4=8 2Y1=9 GND=10 2A1=11 1Y4=12 2A2=13 1Y3=14 2A3=15 1Y2=16 2A4=17 1Y1=18
    // 2OE=19 VCC=20. Its function tables: 1OE L passes 1A to 1Y, H gives Z; 2OE H passes 2A to
    // 2Y, L gives Z.
    let (i, z) = (Input, ThreeState);
    expect_package(
        &t,
        S74,
        "241",
        &[
            i, i, z, i, z, i, z, i, z, Ground, i, z, i, z, i, z, i, z, i, Supply,
        ],
    );
    expect_enables(&t, S74, "241", &[18, 16, 14, 12], &["1"], true);
    expect_enables(&t, S74, "241", &[9, 7, 5, 3], &["19"], false);
    for (a, y) in [
        (2, 18),
        (4, 16),
        (6, 14),
        (8, 12),
        (11, 9),
        (13, 7),
        (15, 5),
        (17, 3),
    ] {
        same_unit(&t, S74, "241", &[a, y]);
    }
}

#[test]
fn cmos_hex_inverter_4069() {
    let t = table();
    // TI JAJSGW7E (CD4069UB, Japanese edition) pin functions: inputs A=1 B=3 C=5 D=9 E=11 F=13;
    // outputs G=A 2, H=B 4, I=C 6, J=D 8, K=E 10, L=F 12; VSS=7 VDD=14
    let (i, p) = (Input, PushPull);
    expect_package(
        &t,
        S40,
        "4069",
        &[i, p, i, p, i, p, Ground, p, i, p, i, p, i, Supply],
    );
    for (a, y) in [(1, 2), (3, 4), (5, 6), (9, 8), (11, 10), (13, 12)] {
        same_unit(&t, S40, "4069", &[a, y]);
    }
    expect_name(&t, S40, "4069", 8, "J");
}

#[test]
fn partly_checked_573() {
    let t = table();
    // TI JAJSQC1H (SN74AC573, Japanese edition) pin functions: OE=1 1D..8D=2..9 GND=10 LE=11
    // 8Q=12 7Q=13 6Q=14 5Q=15 4Q=16 3Q=17 2Q=18 1Q=19 VCC=20 (the overbar on OE is lost in the
    // copy read, so that it is active low stays from memory; hence not in the list below)
    let mut r = vec![Input; 20];
    r[9] = Ground;
    for q in 12..=19 {
        r[q - 1] = ThreeState;
    }
    r[19] = Supply;
    expect_package(&t, S74, "573", &r);
    for (d, q) in (2..=9).zip((12..=19).rev()) {
        same_unit(&t, S74, "573", &[d, q]);
    }
    for q in 12..=19 {
        assert_eq!(
            func(&t, S74, "573").pin(&q.to_string()).unwrap().enable,
            vec!["1".to_string()],
            "573 pin {q}"
        );
    }
    expect_name(&t, S74, "573", 11, "LE");
}

#[test]
fn quad_xor_86() {
    let t = table();
    // TI SN74AC86 data sheet (SCAS533) pin functions: 1A=1 1B=2 1Y=3 2A=4 2B=5 2Y=6 GND=7 3Y=8
    // 3A=9 3B=10 4Y=11 4A=12 4B=13 VCC=14
    let (i, p) = (Input, PushPull);
    expect_package(
        &t,
        S74,
        "86",
        &[i, i, p, i, i, p, Ground, p, i, i, p, i, i, Supply],
    );
    for gate in [[1, 2, 3], [4, 5, 6], [9, 10, 8], [12, 13, 11]] {
        same_unit(&t, S74, "86", &gate);
    }
    expect_name(&t, S74, "86", 8, "3Y");
}

#[test]
fn dual_decoder_139() {
    let t = table();
    // TI SCLS066B (SN74HCT139) terminal assignment: 1G=1 1A=2 1B=3 1Y0=4 1Y1=5 1Y2=6 1Y3=7
    // GND=8 2Y3=9 2Y2=10 2Y1=11 2Y0=12 2B=13 2A=14 2G=15 VCC=16; TI SDAS204A (SN74ALS139)
    // agrees. G is the active-low enable.
    let (i, p) = (Input, PushPull);
    expect_package(
        &t,
        S74,
        "139",
        &[i, i, i, p, p, p, p, Ground, p, p, p, p, i, i, i, Supply],
    );
    same_unit(&t, S74, "139", &[1, 2, 3, 4, 5, 6, 7]);
    same_unit(&t, S74, "139", &[9, 10, 11, 12, 13, 14, 15]);
    expect_name(&t, S74, "139", 4, "1Y0");
    expect_name(&t, S74, "139", 9, "2Y3");
    expect_name(&t, S74, "139", 15, "2G~");
}

#[test]
fn inverting_buffer_540() {
    let t = table();
    // TI SCLS268M (SN74AHCT540) terminal assignment: OE1=1 A1..A8=2..9 GND=10 Y8..Y1=11..18
    // OE2=19 VCC=20; its function table: the outputs drive only with OE1 and OE2 both low, and
    // either high gives Z. TI SCLS007D (SN74HC540) has the same terminal assignment.
    let mut r = vec![Input; 20];
    for p in 11..=18 {
        r[p - 1] = ThreeState;
    }
    r[9] = Ground;
    r[19] = Supply;
    expect_package(&t, S74, "540", &r);
    expect_enables(
        &t,
        S74,
        "540",
        &[11, 12, 13, 14, 15, 16, 17, 18],
        &["1", "19"],
        true,
    );
    for k in 0..8 {
        same_unit(&t, S74, "540", &[2 + k, 18 - k]);
    }
    expect_name(&t, S74, "540", 18, "Y1");
}

#[test]
fn hex_d_flip_flop_174() {
    let t = table();
    // Motorola MC74AC174/MC74ACT174 (FACT Data) connection diagram: MR=1 Q0=2 D0=3 D1=4 Q1=5
    // D2=6 Q2=7 GND=8 CP=9 Q3=10 D3=11 Q4=12 D4=13 D5=14 Q5=15 VCC=16; the logic symbol of
    // Motorola SN54/74LS174 (FAST and LS TTL Data) gives the same numbers (D0-D5 = 3, 4, 6, 11,
    // 13, 14; Q0-Q5 = 2, 5, 7, 10, 12, 15; CP=9, MR=1, active low). TI SCHS344A (CD74ACT174)
    // pins 1-6 agree: CLR=1 1Q=2 1D=3 2D=4 2Q=5 3D=6.
    let (i, p) = (Input, PushPull);
    expect_package(
        &t,
        S74,
        "174",
        &[i, p, i, i, p, i, p, Ground, i, p, i, p, i, i, p, Supply],
    );
    for (d, q) in [(3, 2), (4, 5), (6, 7), (11, 10), (13, 12), (14, 15)] {
        same_unit(&t, S74, "174", &[d, q]);
    }
    expect_name(&t, S74, "174", 1, "CLR~");
    expect_name(&t, S74, "174", 9, "CLK");
}

#[test]
fn octal_d_flip_flops_273_377() {
    let t = table();
    let (i, p) = (Input, PushPull);
    // TI SDLS090 (SN74LS273) terminal assignment: CLR=1 1Q=2 1D=3 2D=4 2Q=5 3Q=6 3D=7 4D=8 4Q=9
    // GND=10 CLK=11 5Q=12 5D=13 6D=14 6Q=15 7Q=16 7D=17 8D=18 8Q=19 VCC=20; function table: CLR
    // low clears. Motorola SN54/74LS273 (FAST and LS TTL Data) connection diagram agrees.
    // TI SCLS307B (SN74HC377): the same pins with CLKEN=1 (the clock acts when CLKEN is low).
    let r = [
        i, p, i, i, p, p, i, i, p, Ground, i, p, i, i, p, p, i, i, p, Supply,
    ];
    for id in ["273", "377"] {
        expect_package(&t, S74, id, &r);
        for (d, q) in [
            (3, 2),
            (4, 5),
            (7, 6),
            (8, 9),
            (13, 12),
            (14, 15),
            (17, 16),
            (18, 19),
        ] {
            same_unit(&t, S74, id, &[d, q]);
        }
        expect_name(&t, S74, id, 11, "CLK");
    }
    expect_name(&t, S74, "273", 1, "CLR~");
}

#[test]
fn synchronous_counter_163() {
    let t = table();
    // Motorola SN54/74LS160A-163A (FAST and LS TTL Data) connection diagram, the LS163A reading:
    // SR=1 CP=2 P0=3 P1=4 P2=5 P3=6 CEP=7 GND=8 PE=9 CET=10 Q3=11 Q2=12 Q1=13 Q0=14 TC=15
    // VCC=16 (SR, the synchronous reset, and PE are active low)
    let (i, p) = (Input, PushPull);
    expect_package(
        &t,
        S74,
        "163",
        &[i, i, i, i, i, i, i, Ground, i, i, p, p, p, p, p, Supply],
    );
    expect_name(&t, S74, "163", 14, "QA");
    expect_name(&t, S74, "163", 11, "QD");
    expect_name(&t, S74, "163", 15, "RCO");
}

#[test]
fn addressable_latch_259() {
    let t = table();
    // TI SDAS217A (SN74ALS259) terminal assignment: S0=1 S1=2 S2=3 Q0=4 Q1=5 Q2=6 Q3=7 GND=8
    // Q4=9 Q5=10 Q6=11 Q7=12 D=13 G=14 CLR=15 VCC=16; onsemi SN74LS259/D Rev. 6 (A0-A2, Q0-Q7,
    // D=13, E=14, C=15) agrees. G and CLR are active low.
    let (i, p) = (Input, PushPull);
    expect_package(
        &t,
        S74,
        "259",
        &[i, i, i, p, p, p, p, Ground, p, p, p, p, i, i, i, Supply],
    );
    expect_name(&t, S74, "259", 4, "Q0");
    expect_name(&t, S74, "259", 12, "Q7");
    expect_name(&t, S74, "259", 13, "D");
    expect_name(&t, S74, "259", 15, "CLR~");
}

#[test]
fn up_down_counter_191() {
    let t = table();
    // Motorola SN54/74LS190/191 (FAST and LS TTL Data) connection diagram and logic symbol:
    // P1=1 Q1=2 Q0=3 CE=4 U/D=5 Q2=6 Q3=7 GND=8 P3=9 P2=10 PL=11 TC=12 RC=13 CP=14 P0=15
    // VCC=16; CE and PL are active low, TC (terminal count) and RC (ripple clock) are outputs
    let (i, p) = (Input, PushPull);
    expect_package(
        &t,
        S74,
        "191",
        &[i, p, p, i, i, p, p, Ground, i, i, i, p, p, i, i, Supply],
    );
    expect_name(&t, S74, "191", 3, "QA");
    expect_name(&t, S74, "191", 11, "LOAD~");
    expect_name(&t, S74, "191", 14, "CLK");
}

#[test]
fn open_collector_high_voltage_06() {
    let t = table();
    // TI SDLS031A (SN7406, SN7416) terminal assignment: 1A=1 1Y=2 2A=3 2Y=4 3A=5 3Y=6 GND=7 4Y=8
    // 4A=9 5Y=10 5A=11 6Y=12 6A=13 VCC=14; high-voltage open-collector outputs
    let (i, o) = (Input, OpenCollector);
    expect_package(
        &t,
        S74,
        "06",
        &[i, o, i, o, i, o, Ground, o, i, o, i, o, i, Supply],
    );
    for (a, y) in [(1, 2), (3, 4), (5, 6), (9, 8), (11, 10), (13, 12)] {
        same_unit(&t, S74, "06", &[a, y]);
    }
}

#[test]
fn three_state_multiplexer_257() {
    let t = table();
    // Motorola SN54/74LS257B (FAST and LS TTL Data) connection diagram and logic diagram: S=1
    // I0a=2 I1a=3 Za=4 I0b=5 I1b=6 Zb=7 GND=8 Zd=9 I1d=10 I0d=11 Zc=12 I1c=13 I0c=14 EO=15
    // VCC=16; truth table: EO high gives (Z) on every output
    let (i, z) = (Input, ThreeState);
    expect_package(
        &t,
        S74,
        "257",
        &[i, i, i, z, i, i, z, Ground, z, i, i, z, i, i, i, Supply],
    );
    expect_enables(&t, S74, "257", &[4, 7, 9, 12], &["15"], true);
    for unit in [[2, 3, 4], [5, 6, 7], [11, 10, 9], [14, 13, 12]] {
        same_unit(&t, S74, "257", &unit);
    }
    assert!(func(&t, S74, "257").pin("1").unwrap().unit.is_none());
}

#[test]
fn jk_flip_flop_112() {
    let t = table();
    // Motorola SN54/74LS112A (FAST and LS TTL Data) logic diagram, pin numbers of the first
    // flip-flop with the second in brackets: CP=1(13) K=2(12) J=3(11) SD=4(10) Q=5(9) Q~=6(7)
    // CD=15(14); VCC=16 GND=8. SD and CD are active low.
    let (i, p) = (Input, PushPull);
    expect_package(
        &t,
        S74,
        "112",
        &[i, i, i, i, p, p, p, Ground, p, i, i, i, i, i, i, Supply],
    );
    same_unit(&t, S74, "112", &[1, 2, 3, 4, 5, 6, 15]);
    same_unit(&t, S74, "112", &[13, 12, 11, 10, 9, 7, 14]);
    expect_name(&t, S74, "112", 5, "1Q");
    expect_name(&t, S74, "112", 6, "1Q~");
    expect_name(&t, S74, "112", 7, "2Q~");
    expect_name(&t, S74, "112", 9, "2Q");
}

#[test]
fn parallel_load_shift_register_166() {
    let t = table();
    // Motorola SN54/74LS166 (FAST and LS TTL Data) connection diagram: serial input=1, parallel
    // inputs A-D=2-5, clock inhibit=6, clock=7, GND=8, clear=9, parallel inputs=10-12, QH=13,
    // H=14, shift/load=15, VCC=16 (QH is the only output)
    let mut r = vec![Input; 16];
    r[7] = Ground;
    r[12] = PushPull;
    r[15] = Supply;
    expect_package(&t, S74, "166", &r);
    expect_name(&t, S74, "166", 13, "QH");
    expect_name(&t, S74, "166", 15, "SH/LD~");
    expect_name(&t, S74, "166", 9, "CLR~");
}

#[test]
fn partly_checked_75_and_107() {
    let t = table();
    let p = PushPull;
    // Motorola SN54/74LS75 (FAST and LS TTL Data) connection diagram: Q0 outputs on 1 and 16,
    // D0=2 D1=3 E2-3=4 VCC=5 D2=6 D3=7, Q3 outputs on 8 and 9, Q2 outputs on 10 and 11, GND=12
    // E0-1=13, Q1 outputs on 14 and 15. Which pin of each pair is the complement is not legible
    // in the copy read, so the entry keeps "from memory" for those names.
    let i = Input;
    expect_package(
        &t,
        S74,
        "75",
        &[p, i, i, i, Supply, i, i, p, p, p, p, Ground, i, p, p, p],
    );
    same_unit(&t, S74, "75", &[1, 2, 16]);
    same_unit(&t, S74, "75", &[3, 14, 15]);
    same_unit(&t, S74, "75", &[6, 10, 11]);
    same_unit(&t, S74, "75", &[7, 8, 9]);
    // Motorola SN54/74LS107A (FAST and LS TTL Data) connection diagram and Hitachi
    // HD74AC107/HD74ACT107 pin arrangement: J1=1, Q1 outputs on 2 and 3, K1=4, Q2 outputs on 5
    // and 6, GND=7, J2=8, CP2=9, CD2=10, K2=11, CP1=12, CD1=13, VCC=14 (which of each output pair
    // is the complement is not legible there)
    expect_package(
        &t,
        S74,
        "107",
        &[i, p, p, i, p, p, Ground, i, i, i, i, i, i, Supply],
    );
    same_unit(&t, S74, "107", &[1, 2, 3, 4, 12, 13]);
    same_unit(&t, S74, "107", &[5, 6, 8, 9, 10, 11]);
}

/// Every function whose whole pinout a test in this file checks against a named data sheet. Its
/// `source` (and the comment above the entry) must name that document, never "from memory".
const CHECKED_AGAINST_DATA_SHEETS: &[(Series, &str)] = &[
    (S74, "89"),
    (S74, "00"),
    (S74, "02"),
    (S74, "04"),
    (S74, "05"),
    (S74, "06"),
    (S74, "07"),
    (S74, "08"),
    (S74, "10"),
    (S74, "112"),
    (S74, "14"),
    (S74, "20"),
    (S74, "21"),
    (S74, "30"),
    (S74, "32"),
    (S74, "73"),
    (S74, "74"),
    (S74, "83"),
    (S74, "86"),
    (S74, "123"),
    (S74, "125"),
    (S74, "126"),
    (S74, "138"),
    (S74, "139"),
    (S74, "151"),
    (S74, "153"),
    (S74, "157"),
    (S74, "161"),
    (S74, "163"),
    (S74, "164"),
    (S74, "165"),
    (S74, "166"),
    (S74, "174"),
    (S74, "191"),
    (S74, "192"),
    (S74, "193"),
    (S74, "240"),
    (S74, "241"),
    (S74, "244"),
    (S74, "245"),
    (S74, "257"),
    (S74, "259"),
    (S74, "273"),
    (S74, "367"),
    (S74, "374"),
    (S74, "377"),
    (S74, "390"),
    (S74, "393"),
    (S74, "540"),
    (S74, "541"),
    (S74, "574"),
    (S74, "595"),
    (S74, "688"),
    (S74, "4040"),
    (S74, "4053"),
    (S40, "4001"),
    (S40, "4011"),
    (S40, "4020"),
    (S40, "4027"),
    (S40, "4028"),
    (S40, "4040"),
    (S40, "4049"),
    (S40, "4050"),
    (S40, "4051"),
    (S40, "4066"),
    (S40, "4069"),
    (S40, "4070"),
    (S40, "4071"),
    (S40, "4081"),
    (S40, "4093"),
    (S40, "40106"),
];

#[test]
fn checked_functions_name_their_data_sheet() {
    let t = table();
    let text = BUILTIN_TEXT;
    for &(series, id) in CHECKED_AGAINST_DATA_SHEETS {
        let f = func(&t, series, id);
        assert!(
            !f.source.to_lowercase().contains("from memory"),
            "{id}: source still says from memory: {:?}",
            f.source
        );
        // a document is named by its maker's literature number or page (letters and digits)
        assert!(
            f.source.chars().any(|c| c.is_ascii_digit())
                && f.source.chars().any(|c| c.is_ascii_uppercase()),
            "{id}: source names no document: {:?}",
            f.source
        );
        // the comment line above the entry says the same
        let series_name = if series == S74 { "74" } else { "4000" };
        let entry = format!("[[function]]\nid = \"{id}\"\n");
        let at = text
            .match_indices(&entry)
            .map(|(at, _)| at)
            .find(|&at| {
                text[at..]
                    .lines()
                    .take(6)
                    .any(|l| l == format!("series = \"{series_name}\""))
            })
            .unwrap_or_else(|| panic!("{id}: entry not found in the table text"));
        let comment = text[..at].lines().last().unwrap_or("");
        assert!(
            comment.starts_with('#') && !comment.to_lowercase().contains("from memory"),
            "{id}: comment above the entry: {comment:?}"
        );
    }
}

// ---------------------------------------------------------------------------------------
// Supply pins not on the corners: these matter to the power checks.

#[test]
fn non_corner_supply_pins() {
    let t = table();
    let cases: &[(&str, u32, &str, &str, &str)] = &[
        // (id, package pins, VCC pin, GND pin, source)
        ("73", 14, "4", "11", "Motorola SN54/74LS73A: VCC 4, GND 11"),
        (
            "75",
            16,
            "5",
            "12",
            "Motorola SN54/74LS75 connection diagram: VCC 5, GND 12",
        ),
        (
            "76",
            16,
            "5",
            "13",
            "secondary 74LS76 pin tables: VCC 5, GND 13",
        ),
        (
            "90",
            14,
            "5",
            "10",
            "secondary 7490 pin tables: VCC 5, GND 10",
        ),
        ("92", 14, "5", "10", "from memory (7492: VCC 5, GND 10)"),
        (
            "93",
            14,
            "5",
            "10",
            "secondary 74LS93 pin tables: VCC 5, GND 10",
        ),
        ("83", 16, "5", "12", "Motorola SN54/74LS83A: VCC 5, GND 12"),
    ];
    for &(id, n, vcc, gnd, src) in cases {
        let f = func(&t, S74, id);
        assert_eq!(f.package_pins, n, "{id} ({src})");
        let s: Vec<&str> = f.supply_pins().map(|p| p.pin.as_str()).collect();
        let g: Vec<&str> = f.ground_pins().map(|p| p.pin.as_str()).collect();
        assert_eq!(s, vec![vcc], "{id} supply ({src})");
        assert_eq!(g, vec![gnd], "{id} ground ({src})");
    }
    // 7490 and 7493 (secondary pin tables): pins 4 and 13 are not connected
    for id in ["90", "93"] {
        let f = func(&t, S74, id);
        assert_eq!(f.pin("4").unwrap().role, NoConnect);
        assert_eq!(f.pin("13").unwrap().role, NoConnect);
    }
    // 74283 is the 7483 with corner supply pins (from memory)
    let f = func(&t, S74, "283");
    assert_eq!(f.supply_pins().next().unwrap().pin, "16");
    assert_eq!(f.ground_pins().next().unwrap().pin, "8");
}

// ---------------------------------------------------------------------------------------
// Invariants over the whole table.

#[test]
fn every_function_lists_every_pin_once_with_power() {
    let t = table();
    for f in t.iter() {
        let mut seen = vec![false; f.package_pins as usize + 1];
        for p in &f.pins {
            let n: usize = p
                .pin
                .parse()
                .unwrap_or_else(|_| panic!("{}: pin {:?} not a number", f.id, p.pin));
            assert!(
                n >= 1 && n <= f.package_pins as usize,
                "{}: pin {n} outside package",
                f.id
            );
            assert!(!seen[n], "{}: pin {n} twice", f.id);
            seen[n] = true;
        }
        assert_eq!(f.pins.len(), f.package_pins as usize, "{}: pin count", f.id);
        // a part whose logic runs from supplies outside the logic levels (an RS-232 line driver
        // on +-12 V, with no 5 V pin) marks them analogue: it has no logic supply pin
        let extra_supplies_only = f
            .pins
            .iter()
            .any(|p| p.role == Analog && p.name.starts_with("VCC"));
        assert!(
            f.supply_pins().count() >= 1 || extra_supplies_only,
            "{}: no supply pin",
            f.id
        );
        assert!(f.ground_pins().count() >= 1, "{}: no ground pin", f.id);
        assert!(!f.source.is_empty(), "{}: no source", f.id);
        // "unknown" is for a pin whose direction a program or a fuse map sets (a PLD's I/O, a
        // peripheral's port): only parts outside the 74 and 4000 numbering have them
        assert!(
            f.series == Series::Other || f.pins.iter().all(|p| p.role != Unknown),
            "{}: unknown role",
            f.id
        );
    }
}

#[test]
fn three_state_outputs_name_existing_enables() {
    let t = table();
    let mut count = 0;
    for f in t.iter() {
        for p in &f.pins {
            if p.role == ThreeState {
                assert!(!p.enable.is_empty(), "{} pin {}: no enable", f.id, p.pin);
                count += 1;
            }
            for e in &p.enable {
                let en = f
                    .pin(e)
                    .unwrap_or_else(|| panic!("{} pin {}: enable {e} missing", f.id, p.pin));
                // a processor's bus floats when it grants the bus: the enable of its address
                // pins is its own grant-acknowledge output (Z80 ~BUSAK, 8080 HLDA, 6809 BA), or
                // a pin that is that output in one mode only (8086 HLDA, RQ/GT1 in maximum mode)
                let own_status = f.series == Series::Other && matches!(en.role, PushPull | Unknown);
                assert!(
                    en.role.is_input() || own_status,
                    "{} pin {}: enable {e} is {}",
                    f.id,
                    p.pin,
                    en.role
                );
            }
        }
    }
    assert!(count > 100, "only {count} three-state pins");
}

#[test]
fn units_have_an_input_and_an_output() {
    let t = table();
    for f in t.iter() {
        for u in f.units() {
            let pins: Vec<_> = f.unit_pins(&u).collect();
            let input = pins.iter().any(|p| p.role.is_input() || p.role == Analog);
            let output = pins.iter().any(|p| p.role.is_output() || p.role == Analog);
            assert!(
                input && output,
                "{} unit {u}: input {input}, output {output}",
                f.id
            );
            assert!(
                pins.iter().all(|p| !matches!(p.role, Supply | Ground)),
                "{} unit {u}: power pin in a unit",
                f.id
            );
        }
    }
}

#[test]
fn table_counts() {
    let t = table();
    let n74 = t.iter().filter(|f| f.series == S74).count();
    let n40 = t.iter().filter(|f| f.series == S40).count();
    assert!(n74 >= 80, "{n74} 74-series functions");
    assert!(n40 >= 30, "{n40} 4000-series functions");
    let required_74 = "00 02 04 08 10 11 14 20 27 30 32 86 132 01 03 05 06 07 09 12 15 16 17 22 26 33 38 \
        73 74 75 76 107 109 112 173 174 175 273 373 374 573 574 90 93 160 161 162 163 190 191 192 193 390 393 \
        42 47 138 139 145 151 153 154 157 158 251 253 257 125 126 240 241 244 245 540 541 640 645 \
        164 165 166 194 299 595 83 85 181 283 121 123 221 688";
    for id in required_74.split_whitespace() {
        assert!(t.get(S74, id).is_some(), "74-series {id} missing");
    }
    let required_40 =
        "4001 4011 4012 4013 4017 4020 4023 4024 4025 4027 4040 4046 4049 4050 4051 4052 4053 \
        4060 4066 4069 4070 4071 4073 4081 4082 4093 4094 4511 4518 4520 4538 40106";
    for id in required_40.split_whitespace() {
        assert!(t.get(S40, id).is_some(), "4000-series {id} missing");
    }
}

#[test]
fn open_collector_functions() {
    let t = table();
    // open-collector parts per the reference list (7401, 03, 05, 06, 07, 09, 12, 16, 17, 22, 26,
    // 33, 38, 136, 145, 156; 15 from secondary sources)
    for id in [
        "01", "03", "05", "06", "07", "09", "12", "15", "16", "17", "22", "26", "33", "38", "136",
        "145", "156", "266",
    ] {
        let f = func(&t, S74, id);
        let outs: Vec<_> = f.pins.iter().filter(|p| p.role.is_output()).collect();
        assert!(!outs.is_empty(), "{id}");
        assert!(
            outs.iter().all(|p| p.role == OpenCollector),
            "{id}: not all outputs open collector"
        );
    }
    // the copies keep the original's inputs
    assert_eq!(func(&t, S74, "03").pin("1").unwrap().role, Input);
    assert_eq!(
        func(&t, S74, "38").drive,
        netmargin::classify::function::DriveClass::Buffer
    );
}

#[test]
fn variants_266_open_collector_in_ls_push_pull_in_hc() {
    let t = table();
    let f = func(&t, S74, "266");
    let ls = f.pins_for_family("74LS");
    let hc = f.pins_for_family("74HC");
    // pin 3 is 1Y (from memory)
    assert_eq!(
        ls.iter().find(|p| p.pin == "3").unwrap().role,
        OpenCollector
    );
    assert_eq!(hc.iter().find(|p| p.pin == "3").unwrap().role, PushPull);
    assert_eq!(f.role_for_family("3", "74HCT"), Some(PushPull));
    // inputs are unaffected
    assert_eq!(hc.iter().find(|p| p.pin == "1").unwrap().role, Input);
    // the 74LS05 and the 74HC05 are both open collector / open drain
    let f = func(&t, S74, "05");
    assert_eq!(f.role_for_family("2", "74HC"), Some(OpenCollector));
    assert_eq!(f.role_for_family("2", "74LS"), Some(OpenCollector));
}

#[test]
fn like_copies_and_overrides() {
    let t = table();
    let a = func(&t, S74, "08");
    let b = func(&t, S74, "00");
    assert_eq!(a.pins, b.pins);
    let c = func(&t, S40, "4081");
    assert_eq!(c.pins, func(&t, S40, "4001").pins);
    // 40174 copies the 74174 across series
    assert_eq!(func(&t, S40, "40174").pins, func(&t, S74, "174").pins);

    // an override's `like` resolves inside its own file, and never to another copy
    let head = "[[function]]\nsummary = \"x\"\nseries = \"74\"\nsource = \"t\"\n";
    let e = FunctionTable::parse(&format!("{head}id = \"1\"\nlike = \"00\"\n")).unwrap_err();
    assert!(e[0].message.contains("not a 74-series function"), "{e:?}");
    let pins = "package_pins = 2\npins = [ { pin = 1, name = \"G\", role = \"ground\" }, { pin = 2, name = \"V\", role = \"supply\" } ]\n";
    let chain = format!("{head}id = \"1\"\n{pins}\n{head}id = \"2\"\nlike = \"1\"\n\n{head}id = \"3\"\nlike = \"2\"\n");
    let e = FunctionTable::parse(&chain).unwrap_err();
    assert_eq!(e.len(), 1, "{e:?}");
    assert!(e[0].message.contains("itself a copy"), "{e:?}");
    let ok = FunctionTable::parse(&format!(
        "{head}id = \"1\"\n{pins}\n{head}id = \"2\"\nlike = \"1\"\n"
    ))
    .unwrap();
    assert_eq!(ok.get(S74, "2").unwrap().package_pins, 2);
}

// ---------------------------------------------------------------------------------------
// Loader errors with spans.

const BAD: &str = r#"
[[function]]
id = "9000"
summary = "test"
series = "74"
package_pins = 8
source = "test"
pins = [
  { pin = 1, name = "A", role = "input", unit = "A" },
  { pin = 2, name = "Y", role = "three-state", unit = "A", enable = [9] },
  { pin = 2, name = "B", role = "input", unit = "A" },
  { pin = 4, name = "GND", role = "ground" },
  { pin = 5, name = "X", role = "totem-pole" },
  { pin = 8, name = "VCC", role = "supply" },
]

[[function]]
id = "9001"
summary = "copy of nothing"
series = "74"
source = "test"
like = "1234"
"#;

#[test]
fn bad_file_reports_every_problem_with_its_span() {
    let e = FunctionTable::parse(BAD).unwrap_err();
    let find = |needle: &str| {
        e.iter()
            .find(|x| x.message.contains(needle))
            .unwrap_or_else(|| panic!("no error with {needle:?} in {e:#?}"))
    };
    let span_text =
        |err: &netmargin::classify::RuleError| BAD[err.span.clone().expect("span")].to_string();
    assert_eq!(span_text(find("enable pin 9")), "9");
    let dup = find("pin 2 is listed twice");
    assert_eq!(span_text(dup), "2");
    assert!(
        BAD[..dup.span.clone().unwrap().start].contains("name = \"Y\""),
        "span points at the second pin 2"
    );
    assert_eq!(span_text(find("totem-pole")), "\"totem-pole\"");
    assert!(find("missing 3, 6, 7").message.contains("8-pin"));
    assert_eq!(span_text(find("`1234`")), "\"1234\"");
}

#[test]
fn unknown_key_and_duplicate_id() {
    let text = "[[function]]\nid = \"1\"\nsummary = \"x\"\nseries = \"74\"\npackage_pins = 2\nsource = \"t\"\ncolor = \"red\"\npins = []\n";
    let e = FunctionTable::parse(text).unwrap_err();
    assert!(e[0].message.contains("color"), "{e:?}");
    let span = e[0].span.clone().expect("span");
    assert!(text[span].contains("color"));

    let one = "[[function]]\nid = \"7\"\nsummary = \"x\"\nseries = \"74\"\npackage_pins = 2\nsource = \"t\"\npins = [ { pin = 1, name = \"G\", role = \"ground\" }, { pin = 2, name = \"V\", role = \"supply\" } ]\n";
    let two = format!("{one}\n{one}");
    let e = FunctionTable::parse(&two).unwrap_err();
    assert_eq!(e.len(), 1, "{e:?}");
    assert!(e[0].message.contains("defined twice"));
    assert!(e[0].span.clone().unwrap().start > one.len());
    // the same id in the other series is not a duplicate
    let other = one.replace("series = \"74\"", "series = \"4000\"");
    assert!(FunctionTable::parse(&format!("{one}\n{other}")).is_ok());
}

#[test]
fn merge_replaces_by_series_and_id() {
    let mut t = table();
    let before = t.len();
    let over = FunctionTable::parse(
        "[[function]]\nid = \"00\"\nsummary = \"replaced\"\nseries = \"74\"\npackage_pins = 2\nsource = \"t\"\npins = [ { pin = 1, name = \"G\", role = \"ground\" }, { pin = 2, name = \"V\", role = \"supply\" } ]\n",
    )
    .unwrap();
    t.merge(over);
    assert_eq!(t.len(), before);
    assert_eq!(func(&t, S74, "00").summary, "replaced");
    assert_eq!(func(&t, S74, "08").package_pins, 14);
}

#[test]
fn ram_16x4_89_and_189() {
    // TI SN7489 bulletin DL-S 7511386, J or N package: address A 1, ME 2, WE 3, DI1-DI4 on 4, 6,
    // 10, 12, open-collector DO1-DO4 on 5, 7, 9, 11, address D, C, B on 13-15; the 74189 as the
    // 7489 with three-state outputs (from memory)
    let t = table();
    let names = [
        (1u32, "A"),
        (2, "~ME"),
        (4, "DI1"),
        (5, "~DO1"),
        (11, "~DO4"),
        (13, "D"),
        (15, "B"),
    ];
    for (pin, name) in names {
        assert_eq!(
            func(&t, S74, "89").pin(&pin.to_string()).unwrap().name,
            name,
            "89 pin {pin}"
        );
    }
    let ins = [1u32, 2, 3, 4, 6, 10, 12, 13, 14, 15];
    let outs = [5u32, 7, 9, 11];
    let mut want: Vec<(u32, PinRole)> = ins.iter().map(|&p| (p, Input)).collect();
    want.extend(outs.iter().map(|&p| (p, OpenCollector)));
    want.push((8, Ground));
    want.push((16, Supply));
    expect_roles(&t, S74, "89", 16, &want);
    let mut want: Vec<(u32, PinRole)> = ins.iter().map(|&p| (p, Input)).collect();
    want.extend(outs.iter().map(|&p| (p, ThreeState)));
    expect_roles(&t, S74, "189", 16, &want);
    // the 74189's outputs are on while ~CS (pin 2) is low
    let q1 = func(&t, S74, "189").pin("5").unwrap();
    assert_eq!(q1.enable, vec!["2".to_string()]);
    assert!(q1.enable_active_low);
}

/// Inputs that draw more than one unit load: the table's multiples times the family's input
/// currents give each data sheet's own figure for that input.
#[test]
fn heavy_inputs_draw_their_data_sheet_currents() {
    use netmargin::classify::family::{Drive, FamilyTable};
    let t = table();
    let fams = FamilyTable::parse_shipped().expect("families load");
    let ls = fams.get("74LS").expect("74LS").levels(5.0, Drive::Standard);
    let current = |id: &str, pin: &str, fam: &str, iil: f64, iih: f64| -> (f64, f64) {
        let f = t.get(S74, id).expect(id);
        let (lo, hi) = f.load_for_family(pin, fam).unwrap_or((1.0, 1.0));
        (lo * iil.abs(), hi * iih.abs())
    };
    let close = |a: f64, b: f64| (a - b).abs() < 1e-9;
    let cases: &[(&str, &str, f64, f64, &str)] = &[
        // Fairchild DM74LS90 electrical characteristics: IIL A -2.4 mA, B -3.2 mA, reset
        // -0.4 mA; IIH A 40 uA, B 80 uA, reset 20 uA
        ("90", "14", 2.4e-3, 40e-6, "DM74LS90 A"),
        ("90", "1", 3.2e-3, 80e-6, "DM74LS90 B"),
        ("90", "2", 0.4e-3, 20e-6, "DM74LS90 reset"),
        // Fairchild DM74LS74A: IIL D and clock -0.4 mA, preset and clear -0.8 mA; IIH 20 and
        // 40 uA
        ("74", "1", 0.8e-3, 40e-6, "DM74LS74A clear"),
        ("74", "4", 0.8e-3, 40e-6, "DM74LS74A preset"),
        ("74", "2", 0.4e-3, 20e-6, "DM74LS74A D"),
        ("74", "3", 0.4e-3, 20e-6, "DM74LS74A clock"),
        // Fairchild DM74LS112A: IIL J, K -0.4 mA, clear, preset, clock -0.8 mA; IIH J, K
        // 20 uA, clear and preset 60 uA, clock 80 uA
        ("112", "15", 0.8e-3, 60e-6, "DM74LS112A clear"),
        ("112", "4", 0.8e-3, 60e-6, "DM74LS112A preset"),
        ("112", "1", 0.8e-3, 80e-6, "DM74LS112A clock"),
        ("112", "3", 0.4e-3, 20e-6, "DM74LS112A J"),
        // Fairchild DM74LS157: IIL S or G -0.8 mA, A or B -0.4 mA; IIH 40 and 20 uA
        ("157", "1", 0.8e-3, 40e-6, "DM74LS157 select"),
        ("157", "15", 0.8e-3, 40e-6, "DM74LS157 strobe"),
        ("157", "2", 0.4e-3, 20e-6, "DM74LS157 data"),
    ];
    // National DM74LS93: IIL A -2.4 mA, B -1.6 mA (its IIH not read: one unit load)
    assert!(close(
        current("93", "14", "74LS", ls.iil_max, ls.iih_max).0,
        2.4e-3
    ));
    assert!(close(
        current("93", "1", "74LS", ls.iil_max, ls.iih_max).0,
        1.6e-3
    ));
    for &(id, pin, iil, iih, what) in cases {
        let (lo, hi) = current(id, pin, "74LS", ls.iil_max, ls.iih_max);
        assert!(
            close(lo, iil),
            "{what}: IIL {lo} A, the sheet gives {iil} A"
        );
        assert!(
            close(hi, iih),
            "{what}: IIH {hi} A, the sheet gives {iih} A"
        );
    }
    // a family the entry does not name draws one unit load (74HC: no multiple given)
    assert_eq!(
        t.get(S74, "90").unwrap().load_for_family("14", "74HC"),
        None
    );
    // the 74LS90's QA is rated with its own B input on it (DM74LS90 note 4)
    assert_eq!(
        t.get(S74, "90").unwrap().pin("12").unwrap().rated_with,
        vec!["1"]
    );
}
