//! The shipped logic-family table checked against the documents its figures come from, the
//! worked examples computed from it, and the loader's merge and error behaviour.

use netmargin::classify::family::{
    Basis, Drive, Family, FamilyTable, InputKind, Levels, Technology,
};

const MA: f64 = 1e-3;
const UA: f64 = 1e-6;

fn table() -> FamilyTable {
    FamilyTable::builtin()
}

fn fam(t: &FamilyTable, id: &str) -> Family {
    t.get(id)
        .unwrap_or_else(|| panic!("family {id} is in the shipped table"))
        .clone()
}

fn at(t: &FamilyTable, id: &str, vcc: f64) -> Levels {
    fam(t, id).levels(vcc, Drive::Standard)
}

#[track_caller]
fn near(actual: f64, expected: f64, what: &str) {
    let tol = 1e-9 * expected.abs().max(1.0);
    assert!(
        (actual - expected).abs() <= tol,
        "{what}: expected {expected}, got {actual}"
    );
}

#[track_caller]
fn voh(l: &Levels, a: f64) -> f64 {
    l.voh_at(a)
        .unwrap_or_else(|| panic!("a VOH guarantee at {a} A"))
}

#[track_caller]
fn vol(l: &Levels, a: f64) -> f64 {
    l.vol_at(a)
        .unwrap_or_else(|| panic!("a VOL guarantee at {a} A"))
}

/// Fan-out of `driver` into `load`, each at its own published point: (low state, high state).
fn fanout(t: &FamilyTable, driver: &str, load: &str) -> (u32, u32) {
    let d = at(t, driver, 5.0);
    let l = at(t, load, 5.0);
    // A small slack so that 16 mA / 1.6 mA counts as 10 and not 9.999...
    let low = (d.iol_max / -l.iil_max + 1e-9).floor() as u32;
    let high = (-d.ioh_max / l.iih_max + 1e-9).floor() as u32;
    (low, high)
}

// ----- the table as a whole ------------------------------------------------------------------

#[test]
fn shipped_table_loads_with_every_required_family() {
    let t = table();
    for id in [
        "74", "74L", "74H", "74S", "74LS", "74ALS", "74AS", "74F", "74HC", "74HCT", "74AC",
        "74ACT", "74AHC", "74AHCT", "74LV", "74LV-A", "74LVC", "4000B", "4000UB", "LVTTL",
        "LVCMOS33", "NMOS",
    ] {
        let f = fam(&t, id);
        assert!(!f.points.is_empty(), "{id} has points");
        assert!(f.shipped, "{id} is marked as shipped");
        assert!(!f.source.is_empty(), "{id} names its source");
        // The span is the family's own header in the shipped text.
        assert_eq!(
            &FamilyTable::builtin_text()[f.span.clone()],
            "[[family]]",
            "{id} span"
        );
    }
}

#[test]
fn lookups_are_case_insensitive_on_ids_and_aliases() {
    let t = table();
    assert_eq!(t.get("ls").map(|f| f.id.as_str()), Some("74LS"));
    assert_eq!(t.get("74ls").map(|f| f.id.as_str()), Some("74LS"));
    assert_eq!(t.get("HC").map(|f| f.id.as_str()), Some("74HC"));
    assert_eq!(t.get("hct").map(|f| f.id.as_str()), Some("74HCT"));
    assert_eq!(t.get("cd4000b").map(|f| f.id.as_str()), Some("4000B"));
    assert!(t.get("74XYZ").is_none());
}

#[test]
fn input_kinds_and_technologies() {
    let t = table();
    for id in ["74", "74L", "74H", "74S", "74LS", "74ALS", "74AS", "74F"] {
        let f = fam(&t, id);
        assert_eq!(f.input, InputKind::Ttl, "{id}");
        assert_eq!(f.technology, Technology::Bipolar, "{id}");
        assert!(!f.is_cmos_input());
    }
    for id in [
        "74HC", "74HCT", "74AC", "74ACT", "74AHC", "74AHCT", "74LV", "74LV-A", "74LVC", "4000B",
        "4000UB",
    ] {
        let f = fam(&t, id);
        assert!(f.is_cmos_input(), "{id}");
        assert_eq!(f.technology, Technology::Cmos, "{id}");
    }
    // NMOS inputs are MOS gates: high impedance, they must not float.
    let n = fam(&t, "NMOS");
    assert_eq!(n.technology, Technology::Nmos);
    assert!(n.is_cmos_input());
}

// ----- one test per family, against its source -----------------------------------------------

#[test]
fn standard_ttl_against_dm7400() {
    // Fairchild DM7400 DS006613: VIH 2.0, VIL 0.8, VOH 2.4 V @ -0.4 mA, VOL 0.4 V @ 16 mA,
    // IIH 40 uA, IIL -1.6 mA, VCC 4.75-5.25 V, input 5.5 V abs max
    let t = table();
    let f = fam(&t, "74");
    let l = f.levels(5.0, Drive::Standard);
    assert_eq!(l.basis, Basis::Published);
    near(l.vih_min, 2.0, "VIH");
    near(l.vil_max, 0.8, "VIL");
    near(voh(&l, -0.4 * MA), 2.4, "VOH");
    near(vol(&l, 16.0 * MA), 0.4, "VOL");
    near(l.iih_max, 40.0 * UA, "IIH");
    near(l.iil_max, -1.6 * MA, "IIL");
    near(l.ioh_max, -0.4 * MA, "IOH");
    near(l.iol_max, 16.0 * MA, "IOL");
    near(f.supply_min, 4.75, "VCC min");
    near(f.supply_max, 5.25, "VCC max");
    assert_eq!(f.input_max_v, Some(5.5));
    // National DM7403: ICEX 250 uA
    near(l.oc_leakage, 250.0 * UA, "ICEX");
}

#[test]
fn low_power_ttl_74l() {
    // Wikipedia 7400-series families table (secondary): IOH -0.2 mA, IOL 3.6 mA. The rest is from
    // memory (VOH 2.4 V, VOL 0.4 V, IIL -0.18 mA) and is checked here only for consistency.
    let t = table();
    let l = at(&t, "74L", 5.0);
    near(l.ioh_max, -0.2 * MA, "IOH");
    near(l.iol_max, 3.6 * MA, "IOL");
    near(voh(&l, -0.2 * MA), 2.4, "VOH");
    near(vol(&l, 3.6 * MA), 0.4, "VOL");
    near(l.iil_max, -0.18 * MA, "IIL");
}

#[test]
fn high_speed_ttl_against_74h30() {
    // ITT 74H30: VOH 2.4 V @ -0.5 mA, VOL 0.4 V @ 20 mA, IIH 50 uA, IIL -2 mA; NTE74H11: IOL 20 mA
    let t = table();
    let l = at(&t, "74H", 5.0);
    near(voh(&l, -0.5 * MA), 2.4, "VOH");
    near(vol(&l, 20.0 * MA), 0.4, "VOL");
    near(l.iih_max, 50.0 * UA, "IIH");
    near(l.iil_max, -2.0 * MA, "IIL");
    near(l.iol_max, 20.0 * MA, "IOL");
}

#[test]
fn schottky_ttl_against_dm74s00() {
    // Fairchild DM74S00 DS006489: IOH -1 mA, IOL 20 mA, input 5.5 V abs max;
    // DM74S02 DS006490: VOH 2.7 V @ IOH max. VOL 0.5 V @ 20 mA and IIL -2 mA from memory.
    let t = table();
    let f = fam(&t, "74S");
    let l = f.levels(5.0, Drive::Standard);
    near(l.ioh_max, -MA, "IOH");
    near(l.iol_max, 20.0 * MA, "IOL");
    near(voh(&l, -MA), 2.7, "VOH");
    near(vol(&l, 20.0 * MA), 0.5, "VOL");
    assert_eq!(f.input_max_v, Some(5.5));
}

#[test]
fn low_power_schottky_against_sdls025b() {
    // TI SDLS025B SN74LS00 electrical characteristics: VOH 2.7 V @ -0.4 mA, VOL 0.4 V @ 4 mA and
    // 0.5 V @ 8 mA, IIH 20 uA, IIL -0.4 mA, IOL 8 mA; abs max input 7 V
    let t = table();
    let f = fam(&t, "74LS");
    let l = f.levels(5.0, Drive::Standard);
    near(voh(&l, -0.4 * MA), 2.7, "VOH");
    near(vol(&l, 4.0 * MA), 0.4, "VOL @ 4 mA");
    near(vol(&l, 8.0 * MA), 0.5, "VOL @ 8 mA");
    near(vol(&l, 6.0 * MA), 0.45, "VOL between the rows");
    near(l.iih_max, 20.0 * UA, "IIH");
    near(l.iil_max, -0.4 * MA, "IIL");
    near(l.iol_max, 8.0 * MA, "IOL");
    assert_eq!(f.input_max_v, Some(7.0));
    // Fairchild DM74LS244 DS008442: IOZ 20 uA; NTE74LS05: off-state 0.1 mA
    near(l.ioz, 20.0 * UA, "IOZ");
    near(l.oc_leakage, 100.0 * UA, "OC leakage");
}

#[test]
fn ls_bus_driver_against_dm74ls244() {
    // Fairchild DM74LS244 DS008442: IOH -15 mA, IOL 24 mA; VOH 2.7 V @ -1 mA, 2.4 V @ -3 mA,
    // 2.0 V @ -15 mA; VOL 0.4 V @ 12 mA, 0.5 V @ 24 mA
    let t = table();
    let b = fam(&t, "74LS").levels(5.0, Drive::Buffer);
    assert_eq!(b.drive, Drive::Buffer);
    near(b.ioh_max, -15.0 * MA, "IOH");
    near(b.iol_max, 24.0 * MA, "IOL");
    near(voh(&b, -3.0 * MA), 2.4, "VOH @ -3 mA");
    near(voh(&b, -15.0 * MA), 2.0, "VOH @ -15 mA");
    near(vol(&b, 24.0 * MA), 0.5, "VOL @ 24 mA");
    // Between the rows: linear. -2 mA lies halfway from -1 to -3 mA: 2.55 V. -9 mA: halfway
    // from -3 to -15 mA: 2.2 V. 18 mA: halfway from 12 to 24 mA: 0.45 V.
    near(voh(&b, -2.0 * MA), 2.55, "VOH @ -2 mA");
    near(voh(&b, -9.0 * MA), 2.2, "VOH @ -9 mA");
    near(vol(&b, 18.0 * MA), 0.45, "VOL @ 18 mA");
    // Below the lightest row: that row's level. Beyond the heaviest: no guarantee.
    near(voh(&b, -0.1 * MA), 2.7, "VOH @ -0.1 mA");
    near(vol(&b, 1.0 * MA), 0.4, "VOL @ 1 mA");
    assert_eq!(b.voh_at(-16.0 * MA), None);
    assert_eq!(b.vol_at(25.0 * MA), None);
}

#[test]
fn advanced_low_power_schottky() {
    // TI SDAS187A SN74ALS00A: IOH -0.4 mA, IOL 8 mA, VCC 4.5-5.5 V;
    // Philips 74ALS00A: 1 ALS unit load = 20 uA high, 0.1 mA low
    let t = table();
    let f = fam(&t, "74ALS");
    let l = f.levels(5.0, Drive::Standard);
    near(l.ioh_max, -0.4 * MA, "IOH");
    near(l.iol_max, 8.0 * MA, "IOL");
    near(l.iih_max, 20.0 * UA, "IIH");
    near(l.iil_max, -0.1 * MA, "IIL");
    near(f.supply_min, 4.5, "VCC min");
    // Philips: an ALS output drives 20 ALS unit loads high and 80 low.
    assert_eq!(fanout(&t, "74ALS", "74ALS"), (80, 20));
}

#[test]
fn advanced_schottky() {
    // TI SDAS187A SN74AS00: IOH -2 mA, IOL 20 mA; TI SDAS071B SN74AS1008A: IIL -0.5 mA,
    // IIH 20 uA, VOH VCC - 2 V @ -2 mA (2.5 V at VCC 4.5 V)
    let t = table();
    let l = at(&t, "74AS", 5.0);
    near(l.ioh_max, -2.0 * MA, "IOH");
    near(l.iol_max, 20.0 * MA, "IOL");
    near(l.iil_max, -0.5 * MA, "IIL");
    near(l.iih_max, 20.0 * UA, "IIH");
    near(voh(&l, -2.0 * MA), 4.5 - 2.0, "VOH");
}

#[test]
fn fast_ttl_against_philips_74f00() {
    // Philips 74F00 (1990): VOH 2.5 V @ -1 mA (VCC +-10 %), VOL 0.5 V @ 20 mA, IIH 20 uA,
    // IIL -0.6 mA, input 7 V abs max
    let t = table();
    let f = fam(&t, "74F");
    let l = f.levels(5.0, Drive::Standard);
    near(voh(&l, -MA), 2.5, "VOH");
    near(vol(&l, 20.0 * MA), 0.5, "VOL");
    near(l.iih_max, 20.0 * UA, "IIH");
    near(l.iil_max, -0.6 * MA, "IIL");
    assert_eq!(f.input_max_v, Some(7.0));
}

#[test]
fn hc_against_mm74hc04() {
    // onsemi MM74HC04 DC table, -40..85 C: VIH 1.5 / 3.15 / 4.2 V and VIL 0.5 / 1.35 / 1.8 V at
    // 2.0 / 4.5 / 6.0 V; VOH 3.84 V @ -4 mA (4.5 V), 5.34 V @ -5.2 mA (6.0 V); VOL 0.33 V
    let t = table();
    let f = fam(&t, "74HC");
    for (vcc, vih, vil) in [(2.0, 1.5, 0.5), (4.5, 3.15, 1.35), (6.0, 4.2, 1.8)] {
        let l = f.levels(vcc, Drive::Standard);
        assert_eq!(l.basis, Basis::Published, "{vcc} V");
        near(l.vih_min, vih, "VIH");
        near(l.vil_max, vil, "VIL");
    }
    let l45 = f.levels(4.5, Drive::Standard);
    // VIH 3.15 V exactly at 4.5 V: a published row, not a computed 0.7 VCC.
    assert_eq!(l45.vih_min, 3.15);
    near(voh(&l45, -4.0 * MA), 3.84, "VOH @ -4 mA");
    near(vol(&l45, 4.0 * MA), 0.33, "VOL @ 4 mA");
    near(voh(&l45, -20.0 * UA), 4.4, "VOH @ -20 uA");
    let l60 = f.levels(6.0, Drive::Standard);
    near(voh(&l60, -5.2 * MA), 5.34, "VOH @ -5.2 mA");
    // Only the 20 uA rows are published at 2.0 V: no guarantee at 1 mA.
    assert_eq!(f.levels(2.0, Drive::Standard).voh_at(-MA), None);
    // Nexperia 74HC00: clamp current flows above VCC + 0.5 V
    near(f.input_limit_v(5.0), 5.5, "input limit at 5 V");
    near(f.input_limit_v(3.3), 3.8, "input limit at 3.3 V");
}

#[test]
fn hc_at_five_volts_is_interpolated() {
    // 5.0 V is not an HC table row (onsemi MM74HC04 lists 2.0 / 4.5 / 6.0 V). A third of the way
    // from 4.5 to 6.0 V: VIH 3.15 + (4.2 - 3.15) / 3 = 3.50 V, VIL 1.35 + 0.45 / 3 = 1.50 V;
    // the -4 / -5.2 mA rows pair up: 3.84 + 1.5 / 3 = 4.34 V at -4.4 mA.
    let t = table();
    let l = at(&t, "74HC", 5.0);
    assert_eq!(
        l.basis,
        Basis::Interpolated {
            below: 4.5,
            above: 6.0
        }
    );
    near(l.vih_min, 3.5, "VIH");
    near(l.vil_max, 1.5, "VIL");
    near(l.voh[1].v, 4.34, "VOH row 2 level");
    near(l.voh[1].a, -4.4 * MA, "VOH row 2 current");
    near(l.ioh_max, -4.4 * MA, "IOH");
    // onsemi MM74HC04 note: "the VIH value at 5.5 V is 3.85 V"; interpolating gives the same.
    near(at(&t, "74HC", 5.5).vih_min, 3.85, "VIH at 5.5 V");
}

#[test]
fn hc_bus_outputs_from_mm54hc242() {
    // National MM54HC242: bus outputs 6 mA at 4.5 V, 7.8 mA at 6 V
    let t = table();
    let f = fam(&t, "74HC");
    near(f.levels(4.5, Drive::Buffer).iol_max, 6.0 * MA, "IOL 4.5 V");
    near(f.levels(6.0, Drive::Buffer).ioh_max, -7.8 * MA, "IOH 6 V");
    // National MM54HC242: IOZ 5 uA at 85 C
    near(f.levels(6.0, Drive::Standard).ioz, 5.0 * UA, "IOZ");
}

#[test]
fn hct_against_mm74hct00() {
    // Fairchild MM74HCT00: VIH 2.0, VIL 0.8 V over 4.5-5.5 V; VOH 3.84 V @ -4 mA (4.5 V),
    // 4.84 V @ -4.8 mA (5.5 V); VOL 0.33 V @ 4 / 4.8 mA
    let t = table();
    let f = fam(&t, "74HCT");
    let l = f.levels(4.5, Drive::Standard);
    near(l.vih_min, 2.0, "VIH");
    near(l.vil_max, 0.8, "VIL");
    near(voh(&l, -4.0 * MA), 3.84, "VOH");
    near(vol(&l, 4.0 * MA), 0.33, "VOL");
    let l55 = f.levels(5.5, Drive::Standard);
    near(voh(&l55, -4.8 * MA), 4.84, "VOH 5.5 V");
    // TTL-level thresholds do not move with the supply.
    let l5 = f.levels(5.0, Drive::Standard);
    near(l5.vih_min, 2.0, "VIH 5 V");
    near(l5.vil_max, 0.8, "VIL 5 V");
}

#[test]
fn ac_against_mc74ac32() {
    // onsemi MC74AC32 (-40..85 C): VIH 2.1 / 3.15 / 3.85 V at 3.0 / 4.5 / 5.5 V; VOH 2.46 V @ -12 mA
    // (3 V), 3.76 V @ -24 mA (4.5 V), 4.76 V @ -24 mA (5.5 V); VOL 0.44 V
    let t = table();
    let f = fam(&t, "74AC");
    near(f.levels(3.0, Drive::Standard).vih_min, 2.1, "VIH 3 V");
    near(f.levels(5.5, Drive::Standard).vih_min, 3.85, "VIH 5.5 V");
    near(
        voh(&f.levels(3.0, Drive::Standard), -12.0 * MA),
        2.46,
        "VOH 3 V",
    );
    let l = f.levels(4.5, Drive::Standard);
    near(voh(&l, -24.0 * MA), 3.76, "VOH 4.5 V");
    near(vol(&l, 24.0 * MA), 0.44, "VOL 4.5 V");
    near(
        voh(&f.levels(5.5, Drive::Standard), -24.0 * MA),
        4.76,
        "VOH 5.5 V",
    );
}

#[test]
fn act_against_sn74act00() {
    // TI SCAS523D SN74ACT00 (-40..85 C): VIH 2.0, VIL 0.8 V; VOH 3.76 V @ -24 mA; VOL 0.44 V @ 24 mA
    let t = table();
    let l = at(&t, "74ACT", 4.5);
    near(l.vih_min, 2.0, "VIH");
    near(l.vil_max, 0.8, "VIL");
    near(voh(&l, -24.0 * MA), 3.76, "VOH");
    near(vol(&l, 24.0 * MA), 0.44, "VOL");
}

#[test]
fn ahc_against_74ahc04() {
    // NXP 74AHC04 Rev.6 (-40..85 C): VIH 2.1 V and VOH 2.48 V @ -4 mA at 3.0 V; VOH 3.80 V @ -8 mA
    // at 4.5 V; VOL 0.44 V; inputs take 5.5 V whatever the supply
    let t = table();
    let f = fam(&t, "74AHC");
    let l3 = f.levels(3.0, Drive::Standard);
    near(l3.vih_min, 2.1, "VIH 3 V");
    near(voh(&l3, -4.0 * MA), 2.48, "VOH 3 V");
    let l45 = f.levels(4.5, Drive::Standard);
    near(voh(&l45, -8.0 * MA), 3.80, "VOH 4.5 V");
    near(vol(&l45, 8.0 * MA), 0.44, "VOL 4.5 V");
    assert_eq!(f.input_max_v, Some(5.5));
    near(f.input_limit_v(3.3), 5.5, "5 V tolerant at 3.3 V");
    // NXP 74AHC04: VIH 3.85 V and VIL 1.65 V at 5.5 V; IOH/IOL 8 mA over 4.5-5.5 V, so 5.0 V
    // (interpolated) must not claim more than 8 mA.
    let l55 = f.levels(5.5, Drive::Standard);
    assert_eq!(l55.basis, Basis::Published);
    near(l55.vih_min, 3.85, "VIH 5.5 V");
    near(l55.vil_max, 1.65, "VIL 5.5 V");
    let l5 = f.levels(5.0, Drive::Standard);
    near(l5.iol_max, 8.0 * MA, "IOL 5 V");
    near(l5.vih_min, 3.5, "VIH 5 V");
}

#[test]
fn ahct_against_74ahct04() {
    // NXP 74AHCT04 (-40..85 C): VIH 2.0, VIL 0.8 V; VOH 3.80 V @ -8 mA; VOL 0.44 V @ 8 mA
    let t = table();
    let f = fam(&t, "74AHCT");
    let l = f.levels(4.5, Drive::Standard);
    near(l.vih_min, 2.0, "VIH");
    near(voh(&l, -8.0 * MA), 3.80, "VOH");
    near(vol(&l, 8.0 * MA), 0.44, "VOL");
    // One published point, used unchanged across 4.5-5.5 V.
    assert_eq!(f.levels(5.0, Drive::Standard).basis, Basis::Nominal);
}

#[test]
fn lv_against_74lv27() {
    // Philips 74LV27: VIH 1.4 V at 2.0 V, 2.0 V at 2.7-3.6 V, 0.7 VCC at 4.5-5.5 V; inputs clamp
    // above VCC + 0.5 V (not 5 V tolerant)
    let t = table();
    let f = fam(&t, "74LV");
    near(f.levels(2.0, Drive::Standard).vih_min, 1.4, "VIH 2 V");
    for vcc in [2.7, 3.0, 3.3, 3.6] {
        near(f.levels(vcc, Drive::Standard).vih_min, 2.0, "VIH 2.7-3.6 V");
    }
    near(
        f.levels(4.5, Drive::Standard).vih_min,
        0.7 * 4.5,
        "VIH 4.5 V",
    );
    near(
        f.levels(5.5, Drive::Standard).vih_min,
        0.7 * 5.5,
        "VIH 5.5 V",
    );
    near(f.levels(5.0, Drive::Standard).vil_max, 0.3 * 5.0, "VIL 5 V");
    assert_eq!(f.input_max_v, None);
    near(f.input_limit_v(3.3), 3.8, "input limit at 3.3 V");
}

#[test]
fn lv_a_against_hd74lv20a() {
    // Hitachi HD74LV20A: IOH/IOL 6 mA at 3.0-3.6 V, 12 mA at 4.5-5.5 V; VIH(max) 5.5 V at any VCC
    let t = table();
    let f = fam(&t, "74LV-A");
    for vcc in [3.0, 3.3, 3.6] {
        near(
            f.levels(vcc, Drive::Standard).iol_max,
            6.0 * MA,
            "IOL 3.0-3.6 V",
        );
    }
    for vcc in [4.5, 5.0, 5.5] {
        near(
            f.levels(vcc, Drive::Standard).iol_max,
            12.0 * MA,
            "IOL 4.5-5.5 V",
        );
    }
    near(f.input_limit_v(3.3), 5.5, "5 V tolerant");
    // From memory: 0.7 VCC / 0.3 VCC thresholds; interpolation between 0.7 VCC points is exact.
    near(
        f.levels(3.3, Drive::Standard).vih_min,
        0.7 * 3.3,
        "VIH 3.3 V",
    );
}

#[test]
fn lvc_against_hd74lvc04() {
    // Hitachi HD74LVC04 (-40..85 C): VIH 2.0 / VIL 0.8 V at 2.7-3.6 V; VOH 2.2 V @ -12 mA (2.7 V),
    // 2.4 V @ -12 mA and 2.0 V @ -24 mA (3.0 V), 3.8 V @ -24 mA (4.5 V); VOL 0.55 V @ 24 mA;
    // IIN 5 uA at VIN 5.5 V
    let t = table();
    let f = fam(&t, "74LVC");
    let l27 = f.levels(2.7, Drive::Standard);
    near(voh(&l27, -12.0 * MA), 2.2, "VOH 2.7 V");
    let l3 = f.levels(3.0, Drive::Standard);
    near(voh(&l3, -24.0 * MA), 2.0, "VOH 3 V @ -24 mA");
    near(vol(&l3, 24.0 * MA), 0.55, "VOL 3 V");
    // The -12 mA row at 3.0 V is left out of the file; the line from -0.1 to -24 mA must still
    // give at least Hitachi's 2.4 V there.
    assert!(
        voh(&l3, -12.0 * MA) >= 2.4 - 0.005,
        "VOH 3 V @ -12 mA: {}",
        voh(&l3, -12.0 * MA)
    );
    near(
        voh(&f.levels(4.5, Drive::Standard), -24.0 * MA),
        3.8,
        "VOH 4.5 V",
    );
    near(l3.iih_max, 5.0 * UA, "IIN");
    near(f.input_limit_v(3.3), 5.5, "5 V tolerant");
    for vcc in [2.7, 3.0, 3.3, 3.6] {
        near(f.levels(vcc, Drive::Standard).vih_min, 2.0, "VIH");
        near(f.levels(vcc, Drive::Standard).vil_max, 0.8, "VIL");
    }
}

#[test]
fn cd4000b_against_cd4011bc() {
    // National CD4011BC: VIH 3.5 / 7.0 / 11.0 V, VIL 1.5 / 3.0 / 4.0 V at 5 / 10 / 15 V;
    // IOL 0.36 / 0.9 / 2.4 mA at 85 C
    let t = table();
    let f = fam(&t, "4000B");
    for (vcc, vih, vil, iol) in [
        (5.0, 3.5, 1.5, 0.36),
        (10.0, 7.0, 3.0, 0.9),
        (15.0, 11.0, 4.0, 2.4),
    ] {
        let l = f.levels(vcc, Drive::Standard);
        assert_eq!(l.basis, Basis::Published);
        near(l.vih_min, vih, "VIH");
        near(l.vil_max, vil, "VIL");
        near(l.iol_max, iol * MA, "IOL");
        near(-l.ioh_max, iol * MA, "IOH");
    }
}

#[test]
fn cd4000b_at_12_v_is_interpolated_and_at_18_v_extrapolated() {
    let t = table();
    let f = fam(&t, "4000B");
    // 12 V: 2/5 of the way from 10 to 15 V: VIH 7 + 0.4 * 4 = 8.6 V, VIL 3 + 0.4 * 1 = 3.4 V
    let l = f.levels(12.0, Drive::Standard);
    assert_eq!(
        l.basis,
        Basis::Interpolated {
            below: 10.0,
            above: 15.0
        }
    );
    near(l.vih_min, 8.6, "VIH 12 V");
    near(l.vil_max, 3.4, "VIL 12 V");
    // 18 V (the B-series abs max, JEDEC 13-B): the 10-15 V line continued: VIH 11 + 0.6 * 4 = 13.4 V
    let l = f.levels(18.0, Drive::Standard);
    assert_eq!(l.basis, Basis::Extrapolated { nearest: 15.0 });
    near(l.vih_min, 13.4, "VIH 18 V");
    near(l.vil_max, 4.6, "VIL 18 V");
}

#[test]
fn cd4000b_noise_margins_meet_jedec_13b() {
    // JEDEC Std No. 13-B: guaranteed noise margins 1 V at 5 V, 2 V at 10 V, 2.5 V at 15 V.
    // From the table: high margin VOH min - VIH min, low margin VIL max - VOL max, with CMOS
    // loads (1 uA) and at the rated output current (0.36 / 0.9 / 2.4 mA), where the National
    // rows give 1.1 / 2.5 / 2.5 V.
    let t = table();
    let f = fam(&t, "4000B");
    for (vcc, margin) in [(5.0, 1.0), (10.0, 2.0), (15.0, 2.5)] {
        let l = f.levels(vcc, Drive::Standard);
        for (ioh, iol) in [(-UA, UA), (l.ioh_max, l.iol_max)] {
            let high = voh(&l, ioh) - l.vih_min;
            let low = l.vil_max - vol(&l, iol);
            assert!(
                high >= margin - 1e-9,
                "at {vcc} V, {ioh} A: high margin {high} V below {margin} V"
            );
            assert!(
                low >= margin - 1e-9,
                "at {vcc} V, {iol} A: low margin {low} V below {margin} V"
            );
        }
    }
}

#[test]
fn cd4000ub_thresholds_are_20_and_80_percent() {
    // JEDEC 13-B (via the Harris CD4000B technical overview): UB VIL 20 %, VIH 80 % of VDD
    let t = table();
    let f = fam(&t, "4000UB");
    for vcc in [5.0, 10.0, 15.0, 7.5, 12.0] {
        let l = f.levels(vcc, Drive::Standard);
        near(l.vih_min, 0.8 * vcc, "VIH");
        near(l.vil_max, 0.2 * vcc, "VIL");
    }
}

#[test]
fn lvttl_and_lvcmos_against_io_standard_tables() {
    // Intel single-ended I/O table: LVTTL VOH 2.4 V / VOL 0.4 V at -2 / 2 mA; LVCMOS VOH
    // VCCIO - 0.2 V / VOL 0.2 V at -0.1 / 0.1 mA. Microchip: LVTTL VIH 2.0 V, VIL 0.8 V.
    let t = table();
    let l = at(&t, "LVTTL", 3.3);
    near(voh(&l, -2.0 * MA), 2.4, "LVTTL VOH");
    near(vol(&l, 2.0 * MA), 0.4, "LVTTL VOL");
    near(l.vih_min, 2.0, "LVTTL VIH");
    near(l.vil_max, 0.8, "LVTTL VIL");
    let c = at(&t, "LVCMOS33", 3.3);
    assert_eq!(
        c.basis,
        Basis::Interpolated {
            below: 3.0,
            above: 3.6
        }
    );
    near(voh(&c, -0.1 * MA), 3.3 - 0.2, "LVCMOS VOH");
    near(vol(&c, 0.1 * MA), 0.2, "LVCMOS VOL");
    assert_eq!(c.voh_at(-MA), None);
}

#[test]
fn nmos_against_z80_figures() {
    // Zilog Z80 CPU product specification (1978), as quoted in a secondary source: VIH 2.0 V,
    // VIL 0.8 V, VOH 2.4 V @ -250 uA, VOL 0.4 V @ 2.0 mA, input leakage 10 uA
    let t = table();
    let l = at(&t, "NMOS", 5.0);
    near(l.vih_min, 2.0, "VIH");
    near(l.vil_max, 0.8, "VIL");
    near(voh(&l, -0.25 * MA), 2.4, "VOH");
    near(vol(&l, 2.0 * MA), 0.4, "VOL");
    near(l.iih_max, 10.0 * UA, "ILI");
    // An NMOS CPU output drives one standard TTL input low? 2.0 mA against 1.6 mA: one.
    assert_eq!(fanout(&t, "NMOS", "74"), (1, 6));
    // And five LS inputs low (2.0 / 0.4 mA).
    assert_eq!(fanout(&t, "NMOS", "74LS").0, 5);
}

// ----- worked examples -----------------------------------------------------------------------

#[test]
fn fanout_worked_examples() {
    // Textbook worked examples (common practice):
    // standard TTL into standard TTL: 16 mA / 1.6 mA = 10 low, 0.4 mA / 40 uA = 10 high.
    let t = table();
    assert_eq!(fanout(&t, "74", "74"), (10, 10));
    // 74LS into 74LS: 8 / 0.4 = 20 low, 0.4 mA / 20 uA = 20 high.
    assert_eq!(fanout(&t, "74LS", "74LS"), (20, 20));
    // standard into 74LS: limited to 20 by the high state (16 / 0.4 = 40 low).
    let (low, high) = fanout(&t, "74", "74LS");
    assert_eq!((low, high), (40, 20));
    assert_eq!(low.min(high), 20);
    // 74LS into standard: limited to 5 by the low state (8 / 1.6 = 5; 0.4 / 0.04 = 10 high).
    let (low, high) = fanout(&t, "74LS", "74");
    assert_eq!((low, high), (5, 10));
    assert_eq!(low.min(high), 5);
}

#[test]
fn ttl_high_into_hc_is_short_and_into_hct_is_not() {
    // The classic interface check (common practice): an LS output guarantees 2.7 V, an HC input
    // at 5 V needs 3.5 V (short by 0.8 V); an HCT input needs 2.0 V (margin 0.7 V).
    let t = table();
    let ls = at(&t, "74LS", 5.0);
    let hc = at(&t, "74HC", 5.0);
    let hct = at(&t, "74HCT", 5.0);
    let level = voh(&ls, -(hc.iih_max));
    near(hc.vih_min - level, 0.8, "short into HC");
    near(level - hct.vih_min, 0.7, "margin into HCT");
}

#[test]
fn ttl_internal_input_resistors() {
    // Common practice (textbook 7400 schematic 4 kOhm; 74LS00 20 kOhm and 74S00 2.8 kOhm from
    // memory of the TI schematics)
    let t = table();
    assert_eq!(fam(&t, "74").internal_input_pullup_ohm, Some(4000.0));
    assert_eq!(fam(&t, "74LS").internal_input_pullup_ohm, Some(20000.0));
    assert_eq!(fam(&t, "74S").internal_input_pullup_ohm, Some(2800.0));
    assert_eq!(fam(&t, "74HC").internal_input_pullup_ohm, None);
}

#[test]
fn single_point_families_do_not_scale() {
    let t = table();
    let f = fam(&t, "74LS");
    assert_eq!(f.levels(5.0, Drive::Standard).basis, Basis::Published);
    let l = f.levels(4.8, Drive::Standard);
    assert_eq!(l.basis, Basis::Nominal);
    near(l.vih_min, 2.0, "VIH at 4.8 V");
    near(voh(&l, -0.4 * MA), 2.7, "VOH at 4.8 V");
    assert_eq!(
        f.levels(5.5, Drive::Standard).basis,
        Basis::Extrapolated { nearest: 5.0 }
    );
    assert_eq!(
        f.levels(3.3, Drive::Standard).basis,
        Basis::Extrapolated { nearest: 5.0 }
    );
}

#[test]
fn every_family_is_sane_across_its_supply_range() {
    // Properties of any guaranteed table: VIH above VIL, levels within the rails, currents signed.
    let t = table();
    for f in t.iter() {
        let steps = 20;
        for i in 0..=steps {
            let vcc = f.supply_min + (f.supply_max - f.supply_min) * i as f64 / steps as f64;
            for drive in [Drive::Standard, Drive::Buffer] {
                let l = f.levels(vcc, drive);
                let id = &f.id;
                assert!(
                    l.vih_min > l.vil_max,
                    "{id} at {vcc} V: VIH {} <= VIL {}",
                    l.vih_min,
                    l.vil_max
                );
                assert!(
                    l.vih_min <= vcc + 1e-9,
                    "{id} at {vcc} V: VIH above the supply"
                );
                assert!(
                    l.iil_max <= 0.0 && l.ioh_max < 0.0 && l.iol_max > 0.0,
                    "{id} at {vcc} V: signs"
                );
                assert!(
                    !l.voh.is_empty() && !l.vol.is_empty(),
                    "{id} at {vcc} V: rows"
                );
                // A family's guaranteed levels drive its own inputs at the lightest published
                // load; heavier rows fall with the load. (A heavier row may serve other loads
                // only: the 74C "TTL interface" row, 2.4 V at -360 uA, is for 74L inputs.)
                assert!(
                    l.voh
                        .iter()
                        .all(|r| r.a <= 0.0 && r.v > 0.0 && r.v <= vcc + 1e-9)
                        && l.voh.first().is_some_and(|r| r.v >= l.vih_min - 1e-9)
                        && l.voh
                            .windows(2)
                            .all(|w| w[1].a <= w[0].a && w[1].v <= w[0].v + 1e-9),
                    "{id} at {vcc} V: VOH rows"
                );
                // The one exception: a bipolar 555's only logic input is RESET, whose guaranteed
                // low (0.3 V, TI SLFS022I, from memory) is below the output's VOL at its rated
                // sink: one 555 is not guaranteed to reset another.
                assert!(
                    l.vol
                        .iter()
                        .all(|r| r.a >= 0.0 && (r.v <= l.vil_max + 1e-9 || id == "NE555")),
                    "{id} at {vcc} V: VOL rows"
                );
            }
        }
    }
}

// ----- merge and errors ----------------------------------------------------------------------

const OVERRIDE: &str = r#"
# a project's own families (invented figures for the test)
[[family]]
id = "74ls"
name = "LS as measured on our bench"
input = "ttl"
technology = "bipolar"
supply = { min = 4.75, nominal = 5.0, max = 5.25 }
source = "invented for a test"
aliases = ["LS"]

[[family.point]]
vcc = 5.0
vih_min = 2.0
vil_max = 0.8
iih_max_ua = 20
iil_max_ma = -0.4
ioz_ua = 20
oc_leakage_ua = 100
ioh_max_ma = -0.4
iol_max_ma = 4
voh = [{ v = 2.7, ma = -0.4 }]
vol = [{ v = 0.4, ma = 4 }]

[[family]]
id = "QX"
name = "an invented family"
input = "cmos"
technology = "cmos"
supply = { min = 3.0, nominal = 3.3, max = 3.6 }
source = "invented for a test"

[[family.point]]
vcc = 3.3
vih_min = 2.3
vil_max = 1.0
iih_max_ua = 1
iil_max_ma = -0.001
ioz_ua = 1
oc_leakage_ua = 1
ioh_max_ma = -1
iol_max_ma = 1
voh = [{ v = 3.0, ma = -1 }]
vol = [{ v = 0.3, ma = 1 }]
"#;

#[test]
fn a_project_file_replaces_same_ids_and_adds_new_ones() {
    let mut t = table();
    let shipped = t.len();
    let over = FamilyTable::parse(OVERRIDE).expect("override parses");
    t.merge(over);
    assert_eq!(t.len(), shipped + 1);
    let ls = t.get("74LS").expect("74LS");
    assert!(!ls.shipped);
    assert_eq!(ls.name, "LS as measured on our bench");
    near(
        ls.levels(5.0, Drive::Standard).iol_max,
        4.0 * MA,
        "replaced IOL",
    );
    assert!(
        ls.points[0].buffer.is_none(),
        "the whole family is replaced, buffer included"
    );
    assert_eq!(
        t.get("ls").map(|f| f.name.as_str()),
        Some("LS as measured on our bench")
    );
    assert_eq!(t.get("qx").map(|f| f.id.as_str()), Some("QX"));
    // Everything else is untouched.
    assert!(t.get("74HC").map(|f| f.shipped).unwrap_or(false));
}

fn line_of(text: &str, offset: usize) -> usize {
    text[..offset].matches('\n').count() + 1
}

fn line_containing(text: &str, needle: &str) -> usize {
    let at = text
        .find(needle)
        .unwrap_or_else(|| panic!("{needle} in the test text"));
    line_of(text, at)
}

#[test]
fn a_misspelt_key_is_reported_at_its_line() {
    let text = OVERRIDE.replace("vih_min = 2.3", "vih_mn = 2.3");
    let errs = FamilyTable::parse(&text).expect_err("unknown key");
    assert_eq!(errs.len(), 1);
    let span = errs[0].span.clone().expect("a span");
    assert_eq!(line_of(&text, span.start), line_containing(&text, "vih_mn"));
    assert!(errs[0].message.contains("vih_mn"), "{}", errs[0].message);
}

#[test]
fn a_misspelt_family_key_is_reported_at_its_line() {
    let text = OVERRIDE.replace("technology = \"cmos\"", "tecnology = \"cmos\"");
    let errs = FamilyTable::parse(&text).expect_err("unknown key");
    let span = errs[0].span.clone().expect("a span");
    assert_eq!(
        line_of(&text, span.start),
        line_containing(&text, "tecnology")
    );
}

#[test]
fn value_errors_point_at_their_values() {
    let text = OVERRIDE
        .replace("vih_min = 2.3", "vih_min = 0.9")
        .replace("iil_max_ma = -0.4", "iil_max_ma = 0.4");
    let errs = FamilyTable::parse(&text).expect_err("two problems");
    assert_eq!(errs.len(), 2, "{errs:?}");
    let vih = errs
        .iter()
        .find(|e| {
            e.message
                .contains("vih_min 0.9 V must be above vil_max 1 V")
        })
        .expect("VIH error");
    assert_eq!(&text[vih.span.clone().expect("span")], "0.9");
    let iil = errs
        .iter()
        .find(|e| e.message.contains("iil_max_ma 0.4"))
        .expect("IIL error");
    assert_eq!(&text[iil.span.clone().expect("span")], "0.4");
}

#[test]
fn duplicate_ids_and_empty_points_are_refused() {
    let dup = format!(
        "{OVERRIDE}\n{}",
        &OVERRIDE[OVERRIDE.find("[[family]]\nid = \"QX\"").expect("QX")..]
    );
    let errs = FamilyTable::parse(&dup).expect_err("QX twice");
    assert!(
        errs.iter()
            .any(|e| e.message.contains("family id QX is defined twice")),
        "{errs:?}"
    );
    let second = dup.rfind("[[family]]").expect("second QX");
    assert!(
        errs.iter()
            .any(|e| e.span.as_ref().map(|s| s.start) == Some(second)),
        "{errs:?}"
    );

    let empty = "[[family]]\nid = \"E\"\nname = \"e\"\ninput = \"cmos\"\ntechnology = \"cmos\"\n\
                 supply = { min = 3.0, nominal = 3.3, max = 3.6 }\nsource = \"test\"\n";
    let errs = FamilyTable::parse(empty).expect_err("no points");
    assert!(
        errs[0]
            .message
            .contains("family E has no `[[family.point]]`"),
        "{errs:?}"
    );
    assert_eq!(errs[0].span, Some(0..10));
}

#[test]
fn a_voh_above_the_supply_and_a_positive_ioh_are_refused() {
    let text = OVERRIDE.replace(
        "voh = [{ v = 3.0, ma = -1 }]",
        "voh = [{ v = 3.5, ma = -1 }]",
    );
    let errs = FamilyTable::parse(&text).expect_err("VOH above VCC");
    assert!(
        errs[0]
            .message
            .contains("voh level 3.5 V is outside 0..3.3 V"),
        "{errs:?}"
    );
    assert_eq!(
        &text[errs[0].span.clone().expect("span")],
        "{ v = 3.5, ma = -1 }"
    );

    let text = OVERRIDE.replace("ioh_max_ma = -1", "ioh_max_ma = 1");
    let errs = FamilyTable::parse(&text).expect_err("positive IOH");
    assert!(
        errs[0].message.contains("ioh_max_ma 1 must be negative"),
        "{errs:?}"
    );
}

#[test]
fn an_alias_naming_two_families_is_refused() {
    let text = OVERRIDE.replace(
        "source = \"invented for a test\"\n\n[[family.point]]\nvcc = 3.3",
        "source = \"invented for a test\"\naliases = [\"ls\"]\n\n[[family.point]]\nvcc = 3.3",
    );
    let errs = FamilyTable::parse(&text).expect_err("alias clash");
    assert!(
        errs.iter()
            .any(|e| e.message.contains("alias ls also names family 74ls")),
        "{errs:?}"
    );
}
