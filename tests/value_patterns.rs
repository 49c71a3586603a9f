//! Component values in the makers' marking styles, read into (series, family, function).
//!
//! Where a part number below appears in a data sheet cited in the project's reference list,
//! the source tag is given ([S1], [S12b] ...: see `reference-values.md` in the design notes);
//! the meaning of prefix and suffix letters is the makers' ordering-code convention, stated
//! beside each group and marked "from memory" where it is.

use netmargin::classify::pattern::{match_value, near_misses, Series, ValueMatch};
use proptest::prelude::*;

use Series::{S4000, S74};

/// (value, series, family, function, prefix, suffix, military); "" = none.
type Row = (
    &'static str,
    Series,
    &'static str,
    &'static str,
    &'static str,
    &'static str,
    bool,
);

fn check(rows: &[Row]) {
    let mut failures = Vec::new();
    for (value, series, family, function, prefix, suffix, military) in rows {
        let want = (
            series.clone(),
            family.to_string(),
            function.to_string(),
            (!prefix.is_empty()).then(|| prefix.to_string()),
            (!suffix.is_empty()).then(|| suffix.to_string()),
            *military,
        );
        match match_value(value) {
            Some(m) => {
                let got = (
                    m.series.clone(),
                    m.family.clone(),
                    m.function.clone(),
                    m.prefix.clone(),
                    m.suffix.clone(),
                    m.military,
                );
                if got != want {
                    failures.push(format!("{value:?}: got {got:?}, want {want:?}"));
                }
            }
            None => failures.push(format!("{value:?}: no match, want {want:?}")),
        }
    }
    assert!(
        failures.is_empty(),
        "{} wrong:\n{}",
        failures.len(),
        failures.join("\n")
    );
}

// Texas Instruments: `SN` prefix; `N` = plastic DIP, `D` = SOIC, `J` = ceramic DIP, `NS` = SOP,
// `PW` = TSSOP, `DR` = SOIC on tape and reel; `E4` ending = lead-free finish; `SNJ` = military
// screened. The letter `A` right after the function is a die revision (`ALS00A`, `LV00A`).
// Conventions from memory; part numbers as in the cited data sheets.
#[test]
fn texas_instruments_markings() {
    check(&[
        ("SN7400N", S74, "74", "00", "SN", "N", false), // [S1]
        ("SN7400", S74, "74", "00", "SN", "", false),   // [S1]
        ("SN74LS00N", S74, "74LS", "00", "SN", "N", false), // [S1]
        ("SN74LS00", S74, "74LS", "00", "SN", "", false), // [S1]
        ("SN74LS00PSRE4", S74, "74LS", "00", "SN", "PSRE4", false), // [S1a]
        ("SN74LS04NE4", S74, "74LS", "04", "SN", "NE4", false),
        ("SN74S00NS", S74, "74S", "00", "SN", "NS", false), // [S1]
        ("SN74ALS00AN", S74, "74ALS", "00", "SN", "AN", false), // [S7]
        ("SN74AS00N", S74, "74AS", "00", "SN", "N", false), // [S7]
        ("SN74AS1008AD", S74, "74AS", "1008", "SN", "AD", false), // [S9]
        ("SN74ACT00DR", S74, "74ACT", "00", "SN", "DR", false), // [S15a]
        ("SN74LV00A", S74, "74LV-A", "00", "SN", "A", false), // [S20]
        ("SN74LV00APWR", S74, "74LV-A", "00", "SN", "APWR", false),
        ("SN74LVC125AD", S74, "74LVC", "125", "SN", "AD", false),
        ("SN7406N", S74, "74", "06", "SN", "N", false), // [S22g]
        ("SN7416N", S74, "74", "16", "SN", "N", false), // [S22g]
        ("SN7407N", S74, "74", "07", "SN", "N", false), // [S22h]
        ("SN74LS138N", S74, "74LS", "138", "SN", "N", false),
        ("SN74LS245N", S74, "74LS", "245", "SN", "N", false),
        ("SN74HC595N", S74, "74HC", "595", "SN", "N", false),
        ("SN74HC04N", S74, "74HC", "04", "SN", "N", false),
        ("SN74F00N", S74, "74F", "00", "SN", "N", false),
        ("SN74AHC04PW", S74, "74AHC", "04", "SN", "PW", false),
        ("SN74AHCT125D", S74, "74AHCT", "125", "SN", "D", false),
        ("SN74L00N", S74, "74L", "00", "SN", "N", false),
        ("SN74H00N", S74, "74H", "00", "SN", "N", false),
        ("SN74ALS245AN", S74, "74ALS", "245", "SN", "AN", false),
        ("SN74LS123N", S74, "74LS", "123", "SN", "N", false),
        ("SN74121N", S74, "74", "121", "SN", "N", false),
        ("SN74LS688N", S74, "74LS", "688", "SN", "N", false),
        ("SN74HCT245N", S74, "74HCT", "245", "SN", "N", false),
        ("SN74LS04D", S74, "74LS", "04", "SN", "D", false),
        ("SN74LS47N", S74, "74LS", "47", "SN", "N", false),
        // 54 = military temperature range (-55 to 125 C), common practice
        ("SN54LS00J", S74, "74LS", "00", "SN", "J", true), // [S1]
        ("SNJ54LS00J", S74, "74LS", "00", "SNJ", "J", true),
        ("SN5400J", S74, "74", "00", "SN", "J", true), // [S1]
        ("SN54AS00FK", S74, "74AS", "00", "SN", "FK", true), // [S7a]
    ]);
}

// Fairchild / National: `DM` prefix for bipolar TTL, `MM` for HC CMOS; `N` = molded DIP,
// `M` = SOIC, `J` = ceramic DIP, `WM` = wide SOIC, `SJ` = EIAJ SOP, `X` = tape and reel;
// 74F / FAST and unprefixed 74LS: `PC` = plastic DIP commercial, `DC` = ceramic DIP commercial,
// `SC` = SOIC commercial, `QR` = rail/reel code. Conventions from memory.
#[test]
fn fairchild_national_markings() {
    check(&[
        ("DM7400N", S74, "74", "00", "DM", "N", false), // [S2]
        ("DM7403N", S74, "74", "03", "DM", "N", false), // [S22a]
        ("DM7405N", S74, "74", "05", "DM", "N", false),
        ("DM7438N", S74, "74", "38", "DM", "N", false), // [S22c]
        ("DM7438MX", S74, "74", "38", "DM", "MX", false), // [S22c]
        ("DM74LS00N", S74, "74LS", "00", "DM", "N", false), // [S3]
        ("DM74LS00M", S74, "74LS", "00", "DM", "M", false),
        ("DM74LS00SJX", S74, "74LS", "00", "DM", "SJX", false), // [S3]
        ("DM74S00M", S74, "74S", "00", "DM", "M", false),       // [S5]
        ("DM74S02CW", S74, "74S", "02", "DM", "CW", false),     // [S5b]
        ("DM74S05N", S74, "74S", "05", "DM", "N", false),       // [S22j]
        ("DM74LS244WMX", S74, "74LS", "244", "DM", "WMX", false), // [S24a]
        ("DM74LS126AN", S74, "74LS", "126", "DM", "AN", false), // [S24b]
        ("DM74LS09M", S74, "74LS", "09", "DM", "M", false),     // [S22k]
        ("DM74LS12N", S74, "74LS", "12", "DM", "N", false),     // [S22f]
        ("DM54LS00J", S74, "74LS", "00", "DM", "J", true),
        ("74LS00PC", S74, "74LS", "00", "", "PC", false),
        ("74LS05PCQR", S74, "74LS", "05", "", "PCQR", false), // [S22j]
        ("74LS09DCQM", S74, "74LS", "09", "", "DCQM", false), // [S22k]
        ("74F00PC", S74, "74F", "00", "", "PC", false),
        ("74F00SC", S74, "74F", "00", "", "SC", false),
        ("74F373SC", S74, "74F", "373", "", "SC", false), // [S10b]
        ("74AC00SC", S74, "74AC", "00", "", "SC", false), // [S14b]
        ("74ACT00PC", S74, "74ACT", "00", "", "PC", false),
        ("MM74HC04N", S74, "74HC", "04", "MM", "N", false), // [S11a]
        ("MM74HC04M", S74, "74HC", "04", "MM", "M", false), // [S11a]
        ("MM74HCT00N", S74, "74HCT", "00", "MM", "N", false), // [S12a]
        ("MM74HCT00M", S74, "74HCT", "00", "MM", "M", false), // [S12a]
        ("MM54HC242J", S74, "74HC", "242", "MM", "J", true), // [S11c]
        ("MM74HC4060N", S4000, "74HC", "4060", "MM", "N", false),
        ("MM74HC4066N", S4000, "74HC", "4066", "MM", "N", false),
        // National CD4000: `BC` = B series commercial range, `N` = DIP, `M` = SOIC, `MJ` =
        // military ceramic (from memory)
        ("CD4001BCN", S4000, "4000B", "4001", "CD", "CN", false),
        ("CD4011BCN", S4000, "4000B", "4011", "CD", "CN", false), // [S17]
        ("CD4011BCM", S4000, "4000B", "4011", "CD", "CM", false), // [S17b]
        ("CD4001BMJ", S4000, "4000B", "4001", "CD", "MJ", false), // [S17a]
    ]);
}

// Motorola / onsemi: `MC` prefix; HC: `A` = revision, `N` = plastic DIP, `D` = SOIC, `G` =
// lead-free; 4000 series numbered MC14xxx: `B` = B series, then `CP` = plastic DIP, `CL` =
// ceramic (from memory). MC14xxx maps to the 40xx number; MC141xx to 401xx (MC14106B is the
// hex Schmitt trigger 40106, from memory).
#[test]
fn motorola_onsemi_markings() {
    check(&[
        ("MC74HC00AN", S74, "74HC", "00", "MC", "AN", false),
        ("MC74HC00AD", S74, "74HC", "00", "MC", "AD", false),
        ("MC74HC4060AN", S4000, "74HC", "4060", "MC", "AN", false),
        ("MC74HCT245AN", S74, "74HCT", "245", "MC", "AN", false),
        ("MC74AC32N", S74, "74AC", "32", "MC", "N", false), // [S14a]
        ("MC74ACT32NG", S74, "74ACT", "32", "MC", "NG", false), // [S14a]
        ("MC74F10N", S74, "74F", "10", "MC", "N", false),   // [S10c]
        ("MC54F10J", S74, "74F", "10", "MC", "J", true),    // [S10c]
        ("MC14011BCP", S4000, "4000B", "4011", "MC", "CP", false),
        ("MC14001BCP", S4000, "4000B", "4001", "MC", "CP", false), // [S18d]
        ("MC14011B", S4000, "4000B", "4011", "MC", "", false),
        ("MC14011", S4000, "4000B", "4011", "MC", "", false),
        ("MC14023BCP", S4000, "4000B", "4023", "MC", "CP", false), // [S18d]
        ("MC14049UB", S4000, "4000UB", "4049", "MC", "", false),
        ("MC14069UBCP", S4000, "4000UB", "4069", "MC", "CP", false),
        ("MC14538BCP", S4000, "4000B", "4538", "MC", "CP", false),
        ("MC14518BCP", S4000, "4000B", "4518", "MC", "CP", false),
        ("MC14106BCP", S4000, "4000B", "40106", "MC", "CP", false),
        ("MC14174BCP", S4000, "4000B", "40174", "MC", "CP", false),
        ("MC14013BCP", S4000, "4000B", "4013", "MC", "CP", false),
        ("MC14093BCL", S4000, "4000B", "4093", "MC", "CL", false),
        ("MC14017BCP", S4000, "4000B", "4017", "MC", "CP", false),
        ("MC14066BCP", S4000, "4000B", "4066", "MC", "CP", false),
        ("MC14040BCP", S4000, "4000B", "4040", "MC", "CP", false),
    ]);
}

// Signetics / Philips / NXP: `N` prefix = commercial range, `S` = military range; `N` suffix =
// plastic DIP, `F` = ceramic DIP, `D` = SO; later NXP parts carry no prefix: `D` = SO, `N` =
// DIP, `PW` = TSSOP, `DB` = SSOP, `,602` / `,652` = packing code. HEF4000: `B` series, `P` =
// plastic DIP, `T` = SO. Conventions from memory.
#[test]
fn signetics_philips_nxp_markings() {
    check(&[
        ("N74F00N", S74, "74F", "00", "N", "N", false), // [S10a]
        ("N74F00N,602", S74, "74F", "00", "N", "N", false), // [S10a]
        ("N7400A", S74, "74", "00", "N", "A", false),
        ("N7400N", S74, "74", "00", "N", "N", false),
        ("N74LS00N", S74, "74LS", "00", "N", "N", false),
        ("N74S00N", S74, "74S", "00", "N", "N", false),
        ("S54LS00F", S74, "74LS", "00", "S", "F", true),
        ("74ALS00AD", S74, "74ALS", "00", "", "AD", false), // [S8]
        ("74F00D", S74, "74F", "00", "", "D", false),
        ("74HC00D", S74, "74HC", "00", "", "D", false), // [S13]
        ("74HC00D,652", S74, "74HC", "00", "", "D", false), // [S13]
        ("74HC00N", S74, "74HC", "00", "", "N", false),
        ("74HC00PW", S74, "74HC", "00", "", "PW", false),
        ("74HCT00D", S74, "74HCT", "00", "", "D", false), // [S13]
        ("74HC03D", S74, "74HC", "03", "", "D", false),   // [S23b]
        ("74AHC04PW", S74, "74AHC", "04", "", "PW", false), // [S16a]
        ("74AHCT04D", S74, "74AHCT", "04", "", "D", false), // [S16a]
        ("74LV27D", S74, "74LV", "27", "", "D", false),   // [S20a]
        ("74LV00N", S74, "74LV", "00", "", "N", false),
        ("74LVC04D", S74, "74LVC", "04", "", "D", false),
        // an `A` after an LVC number is a revision, not the LV-A family
        ("74LVC125APW", S74, "74LVC", "125", "", "APW", false),
        ("74HC4060D", S4000, "74HC", "4060", "", "D", false),
        ("74HC4046AN", S4000, "74HC", "4046", "", "AN", false),
        ("74HC4538D", S4000, "74HC", "4538", "", "D", false),
        ("74HC40105D", S4000, "74HC", "40105", "", "D", false),
        ("HEF4011BP", S4000, "4000B", "4011", "HEF", "P", false),
        ("HEF4011BT", S4000, "4000B", "4011", "HEF", "T", false),
        ("HEF4049BP", S4000, "4000B", "4049", "HEF", "P", false),
        ("HEF4069UBP", S4000, "4000UB", "4069", "HEF", "P", false),
        ("HEF40240BP", S4000, "4000B", "40240", "HEF", "P", false),
        ("HEF4017BP", S4000, "4000B", "4017", "HEF", "P", false),
        ("HEF4060BT", S4000, "4000B", "4060", "HEF", "T", false),
        ("HEF4538BP", S4000, "4000B", "4538", "HEF", "P", false),
    ]);
}

// RCA / Harris / TI CD parts: `CD` prefix; `B` = B series (JEDEC 13-B), `UB` = unbuffered B
// series (JEDEC 13-B [S18b]); `E` = plastic DIP, `F` = ceramic DIP, `F3A` = ceramic, military
// screened, `M` = SOIC, `PWR` = TSSOP on reel, `MS` = radiation-hardened grade (Intersil)
// (package letters from memory). CD74 parts are the same firms' 74 CMOS families.
#[test]
fn cd_markings() {
    check(&[
        ("CD4011BE", S4000, "4000B", "4011", "CD", "E", false),
        ("CD4011B", S4000, "4000B", "4011", "CD", "", false),
        ("CD4011", S4000, "4000B", "4011", "CD", "", false),
        ("CD4001BE", S4000, "4000B", "4001", "CD", "E", false),
        ("CD4049UBE", S4000, "4000UB", "4049", "CD", "E", false),
        ("CD4069UBE", S4000, "4000UB", "4069", "CD", "E", false),
        ("CD4007UB", S4000, "4000UB", "4007", "CD", "", false), // [S18b]
        ("CD40106BE", S4000, "4000B", "40106", "CD", "E", false),
        ("CD4502BE", S4000, "4000B", "4502", "CD", "E", false), // [S18c]
        ("CD4502BMS", S4000, "4000B", "4502", "CD", "MS", false), // [S18c]
        ("CD4011BF3A", S4000, "4000B", "4011", "CD", "F3A", false),
        ("CD4013BM", S4000, "4000B", "4013", "CD", "M", false),
        ("CD4017BE", S4000, "4000B", "4017", "CD", "E", false),
        ("CD4060BE", S4000, "4000B", "4060", "CD", "E", false),
        ("CD4093BE", S4000, "4000B", "4093", "CD", "E", false),
        ("CD4511BE", S4000, "4000B", "4511", "CD", "E", false),
        ("CD4040BE", S4000, "4000B", "4040", "CD", "E", false),
        ("CD40174BE", S4000, "4000B", "40174", "CD", "E", false),
        ("CD4066BE", S4000, "4000B", "4066", "CD", "E", false),
        ("CD4051BE", S4000, "4000B", "4051", "CD", "E", false),
        ("CD4011BPWR", S4000, "4000B", "4011", "CD", "PWR", false),
        ("CD74HC00E", S74, "74HC", "00", "CD", "E", false),
        ("CD74HCT125M", S74, "74HCT", "125", "CD", "M", false), // [S12c]
        ("CD74ACT240E", S74, "74ACT", "240", "CD", "E", false), // [S15c]
        ("CD74HC4060E", S4000, "74HC", "4060", "CD", "E", false),
        ("CD74HCT4046AE", S4000, "74HCT", "4046", "CD", "AE", false),
    ]);
}

// ST: `HCF` = 4000B commercial, `HCC` = extended range; `BE` = B series in plastic DIP, `BEY` =
// lead-free, `M013TR` = SO on reel; `M74HC` with `B1` = plastic DIP, `M1` = SO, `F1` = ceramic.
// Toshiba: `TC` prefix, `A` = revision, `P` = plastic DIP, `F` = SOP. Hitachi: `HD` prefix, `P`
// = plastic DIP, `FP` = SOP. Others: Integral `IN`, NEC `µPD` (`C` = DIP), Fujitsu `MB`,
// Goldstar `GD`, Rohm `BU`, NTE replacements `NTE`. Conventions from memory.
#[test]
fn st_toshiba_hitachi_and_other_markings() {
    check(&[
        ("HCF4011BE", S4000, "4000B", "4011", "HCF", "E", false),
        ("HCF4011BEY", S4000, "4000B", "4011", "HCF", "EY", false),
        (
            "HCF4011M013TR",
            S4000,
            "4000B",
            "4011",
            "HCF",
            "M013TR",
            false,
        ),
        ("HCC4011BF", S4000, "4000B", "4011", "HCC", "F", false),
        ("M74HC00B1", S74, "74HC", "00", "M", "B1", false),
        ("M74HCT125B1", S74, "74HCT", "125", "M", "B1", false), // [S12c]
        ("M74HC4060B1", S4000, "74HC", "4060", "M", "B1", false),
        ("M74HC540M1", S74, "74HC", "540", "M", "M1", false),
        ("M54HC699F1", S74, "74HC", "699", "M", "F1", true), // [S30]
        ("74ACT08B", S74, "74ACT", "08", "", "B", false),    // [S15b]
        ("TC74HCT00AP", S74, "74HCT", "00", "TC", "AP", false), // [S12b]
        ("TC74HCT00AF", S74, "74HCT", "00", "TC", "AF", false), // [S12b]
        ("TC74HC04AP", S74, "74HC", "04", "TC", "AP", false),
        ("TC74HC4060AP", S4000, "74HC", "4060", "TC", "AP", false),
        ("TC74AC00P", S74, "74AC", "00", "TC", "P", false),
        ("TC4011BP", S4000, "4000B", "4011", "TC", "P", false),
        ("TC4069UBP", S4000, "4000UB", "4069", "TC", "P", false),
        ("TC4013BP", S4000, "4000B", "4013", "TC", "P", false),
        ("HD74LS00P", S74, "74LS", "00", "HD", "P", false),
        ("HD74LVC04", S74, "74LVC", "04", "HD", "", false), // [S19a]
        ("HD74LV20A", S74, "74LV-A", "20", "HD", "A", false), // [S20b]
        ("HD74LV20AFP", S74, "74LV-A", "20", "HD", "AFP", false),
        ("HD74HC00P", S74, "74HC", "00", "HD", "P", false),
        ("HD14011BP", S4000, "4000B", "4011", "HD", "P", false),
        ("IN74LS05N", S74, "74LS", "05", "IN", "N", false), // [S22e]
        ("IN74HC00AN", S74, "74HC", "00", "IN", "AN", false),
        ("UPD74HC00C", S74, "74HC", "00", "UPD", "C", false),
        ("\u{b5}PD74HC00C", S74, "74HC", "00", "UPD", "C", false),
        ("MB74LS00M", S74, "74LS", "00", "MB", "M", false),
        ("GD74LS00", S74, "74LS", "00", "GD", "", false),
        ("BU4069UBF", S4000, "4000UB", "4069", "BU", "F", false),
        ("NTE74LS00", S74, "74LS", "00", "NTE", "", false),
        ("NTE4011B", S4000, "4000B", "4011", "NTE", "", false),
    ]);
}

// Generic and schematic-library spellings, without maker letters.
#[test]
fn generic_spellings() {
    check(&[
        ("7400", S74, "74", "00", "", "", false),
        ("7474", S74, "74", "74", "", "", false),
        ("74123", S74, "74", "123", "", "", false),
        ("74688", S74, "74", "688", "", "", false),
        ("7447", S74, "74", "47", "", "", false),
        ("7401", S74, "74", "01", "", "", false), // [S22i]
        ("7426", S74, "74", "26", "", "", false), // [S22l]
        ("74LS00", S74, "74LS", "00", "", "", false),
        ("74LS00A", S74, "74LS", "00", "", "A", false),
        ("74ALS00A", S74, "74ALS", "00", "", "A", false),
        ("74F00N", S74, "74F", "00", "", "N", false),
        ("7400N", S74, "74", "00", "", "N", false),
        ("74LS138", S74, "74LS", "138", "", "", false),
        // digits are greedy: the function is 1381, not 138 with a suffix
        ("74LS1381", S74, "74LS", "1381", "", "", false),
        ("74LS47", S74, "74LS", "47", "", "", false),
        ("74LS249", S74, "74LS", "249", "", "", false),
        ("74LS596", S74, "74LS", "596", "", "", false),
        ("74S05N", S74, "74S", "05", "", "N", false), // [S22j]
        ("74H11", S74, "74H", "11", "", "", false),   // [S6b]
        ("74H30", S74, "74H", "30", "", "", false),   // [S6a]
        ("74L00", S74, "74L", "00", "", "", false),
        ("74HCT245", S74, "74HCT", "245", "", "", false),
        ("74HCT4060", S4000, "74HCT", "4060", "", "", false),
        ("74HCT4040", S4000, "74HCT", "4040", "", "", false),
        ("74HC4017", S4000, "74HC", "4017", "", "", false),
        ("74HCT4538", S4000, "74HCT", "4538", "", "", false),
        // 4245 is a 74-series level translator, not a 4000 number
        ("74LVC4245A", S74, "74LVC", "4245", "", "A", false),
        ("74ACT244PW", S74, "74ACT", "244", "", "PW", false),
        ("74AC04", S74, "74AC", "04", "", "", false),
        ("5400", S74, "74", "00", "", "", true),
        ("54LS00J", S74, "74LS", "00", "", "J", true),
        ("4011", S4000, "4000B", "4011", "", "", false),
        ("4011B", S4000, "4000B", "4011", "", "", false),
        ("14011", S4000, "4000B", "4011", "", "", false),
        ("14106", S4000, "4000B", "40106", "", "", false),
        ("4049UB", S4000, "4000UB", "4049", "", "", false),
        ("4069U", S4000, "4000UB", "4069", "", "", false),
        ("40106", S4000, "4000B", "40106", "", "", false),
        ("4538", S4000, "4000B", "4538", "", "", false),
    ]);
}

// Case, whitespace, separators and trailing comments.
#[test]
fn spelling_variants() {
    check(&[
        ("74hc04", S74, "74HC", "04", "", "", false),
        ("cd4011be", S4000, "4000B", "4011", "CD", "E", false),
        ("Sn74Ls00n", S74, "74LS", "00", "SN", "N", false),
        ("  74LS00  ", S74, "74LS", "00", "", "", false),
        ("74LS00 (spare)", S74, "74LS", "00", "", "", false),
        ("74LS00(spare)", S74, "74LS", "00", "", "", false),
        ("74LS00 spare gate", S74, "74LS", "00", "", "", false),
        ("74LS00\tU12", S74, "74LS", "00", "", "", false),
        ("74LS00-N", S74, "74LS", "00", "", "N", false),
        ("74HC595N/T", S74, "74HC", "595", "", "N", false),
        ("74LS00/", S74, "74LS", "00", "", "", false),
        ("74LS00;old", S74, "74LS", "00", "", "", false),
        ("SN74LS04N-00", S74, "74LS", "04", "SN", "N-00", false),
        ("74LS00-1", S74, "74LS", "00", "", "1", false),
    ]);
}

#[test]
fn text_is_the_token_as_written() {
    let m = match_value("  sn74ls00n (spare)  ").expect("matches");
    assert_eq!(m.text, "sn74ls00n");
    assert_eq!(m.prefix.as_deref(), Some("SN"));
    let m = match_value("N74F00N,602").expect("matches");
    assert_eq!(m.text, "N74F00N");
}

#[test]
fn rejects_non_logic_and_unknown_families() {
    let rejected = [
        "",
        "   ",
        "7",
        "74",
        "74LS",
        "74LS0",
        "LM358",
        "NE555",
        "10k",
        "4K7",
        "100n",
        "Z80",
        "1N4148",
        "1N4001",
        "LM7805",
        "470",
        "4700",
        "LED",
        // a near miss, not a match
        "74LSOO",
        "74LSO4",
        // six function digits
        "74LS123456",
        // unknown maker prefix
        "XX7400",
        "LM7400",
        // 4000 A series, and number ranges outside 40xx / 45xx / 14xxx
        "CD4011AE",
        "4111",
        "CD4111BE",
        "1401",
        "4",
        // families this tool does not describe (reading them as a neighbour would misstate
        // their thresholds)
        "74HCU04",
        "74LCX112SJX",
        // Motorola's bipolar MC40xx parts are not 4000-series CMOS
        "MC4044P",
        // single-gate parts (a one-digit count before the letter) are not read
        "74AHC1G00",
        "74LVC1G14",
        // spaces inside the number, stray characters
        "74 LS 00",
        "CD4011BE!",
        "74LS00_DIP",
        "74LS00-",
        "SN74LS00N\u{e9}",
    ];
    let wrongly: Vec<(&str, ValueMatch)> = rejected
        .iter()
        .filter_map(|v| match_value(v).map(|m| (*v, m)))
        .collect();
    assert!(wrongly.is_empty(), "matched but should not: {wrongly:?}");
}

#[test]
fn a_thin_slip_can_still_read_as_a_real_family() {
    // `74L500` reads textually (74L family, function 500); only the function table can say
    // that no such part exists, which is why near_misses takes a predicate
    let m = match_value("74L500").expect("matches textually");
    assert_eq!((m.family.as_str(), m.function.as_str()), ("74L", "500"));
}

// ---------------------------------------------------------------- near misses

const KNOWN_74: &[&str] = &[
    "00", "02", "04", "05", "08", "10", "14", "32", "47", "50", "74", "86", "123", "138", "164",
    "240", "244", "245", "283", "373", "374", "595",
];
const KNOWN_4000: &[&str] = &[
    "4001", "4011", "4013", "4017", "4049", "4060", "4069", "40106",
];

fn known(series: &Series, function: &str) -> bool {
    match series {
        Series::S74 => KNOWN_74.contains(&function),
        Series::S4000 => KNOWN_4000.contains(&function),
    }
}

fn suggest(value: &str) -> Vec<(String, String)> {
    near_misses(value, &known, 10)
        .into_iter()
        .map(|s| (s.value, s.change))
        .collect()
}

#[test]
fn near_miss_top_suggestions() {
    // (value, top suggestion, change)
    let cases: &[(&str, &str, &str)] = &[
        ("74LSO4", "74LS04", "O read as 0 at position 5"),
        ("74LS0O", "74LS00", "O read as 0 at position 6"),
        ("74L500", "74LS00", "5 read as S at position 4"),
        ("CD4O11BE", "CD4011BE", "O read as 0 at position 4"),
        ("74HCI4", "74HC14", "I read as 1 at position 5"),
        ("74HCl4", "74HC14", "l read as 1 at position 5"),
        ("74LSl38", "74LS138", "l read as 1 at position 5"),
        ("74LS1388", "74LS138", "doubled 8 at position 8 removed"),
        (
            "74lsoo",
            "74ls00",
            "o read as 0 at position 5, o read as 0 at position 6",
        ),
        ("cd4o11be", "cd4011be", "o read as 0 at position 4"),
        ("SN74LS0ON", "SN74LS00N", "O read as 0 at position 8"),
        ("74HC559", "74HC595", "5 and 9 at positions 6 and 7 swapped"),
        (
            "CD4101BE",
            "CD4011BE",
            "1 and 0 at positions 4 and 5 swapped",
        ),
        ("CD40111BE", "CD4011BE", "doubled 1 at position 6 removed"),
        ("74LSS00", "74LS00", "doubled S at position 5 removed"),
        ("74HT04", "74HCT04", "missing C inserted at position 4"),
        ("74HC59", "74HC595", "missing 5 inserted at position 7"),
        ("74LSZ44", "74LS244", "Z read as 2 at position 5"),
        ("74LS2B3", "74LS283", "B read as 8 at position 6"),
        ("74LS1G4", "74LS164", "G read as 6 at position 6"),
        ("74HC13B", "74HC138", "B read as 8 at position 7"),
        ("MC14O11BCP", "MC14011BCP", "O read as 0 at position 5"),
        ("5N74LS00N", "SN74LS00N", "5 read as S at position 1"),
        ("CD4O69UBE", "CD4069UBE", "O read as 0 at position 4"),
        ("74HCT24O", "74HCT240", "O read as 0 at position 8"),
        (
            "74LSOO (spare)",
            "74LS00 (spare)",
            "O read as 0 at position 5, O read as 0 at position 6",
        ),
        (
            "74LSOO",
            "74LS00",
            "O read as 0 at position 5, O read as 0 at position 6",
        ),
    ];
    let mut failures = Vec::new();
    for (value, want, change) in cases {
        let got = suggest(value);
        match got.first() {
            Some((v, c)) if v == want && c == change => {}
            other => failures.push(format!(
                "{value:?}: top {other:?}, want ({want:?}, {change:?})"
            )),
        }
    }
    assert!(
        failures.is_empty(),
        "{} wrong:\n{}",
        failures.len(),
        failures.join("\n")
    );
}

#[test]
fn near_miss_carries_the_reading_of_the_suggestion() {
    let s = near_misses("CD4O69UBE", &known, 3);
    let m = &s.first().expect("a suggestion").matched.as_ref().expect("a 74 or 4000 reading");
    assert_eq!(
        (
            m.series.clone(),
            m.family.as_str(),
            m.function.as_str(),
            m.suffix.as_deref()
        ),
        (S4000, "4000UB", "4069", Some("E"))
    );
    assert_eq!(m.text, "CD4069UBE");
}

#[test]
fn confusions_rank_before_other_slips() {
    // 74L50 (a doubled 0 removed) also reads as a known part; the O/S confusion comes first
    assert_eq!(
        suggest("74L500"),
        vec![
            (
                "74LS00".to_string(),
                "5 read as S at position 4".to_string()
            ),
            (
                "74L50".to_string(),
                "doubled 0 at position 6 removed".to_string()
            ),
        ]
    );
    // 74HC24S: 74HC240S / 74HC244S (a dropped digit, S then a package letter) read too, but
    // after the S/5 confusion (the 4 inserted at position 6 is left of the 0 at position 7)
    let got = suggest("74HC24S");
    let values: Vec<&str> = got.iter().map(|(v, _)| v.as_str()).collect();
    assert_eq!(values, ["74HC245", "74HC244S", "74HC240S"]);
    // 74HCT24O: a dropped digit would leave the O as a package letter; only the confusion
    let got = suggest("74HCT24O");
    let values: Vec<&str> = got.iter().map(|(v, _)| v.as_str()).collect();
    assert_eq!(values, ["74HCT240"]);
}

#[test]
fn a_slip_into_the_package_letters_ranks_last() {
    // 74LS1388 -> 74LS13B8 (8 read as B) would read as function 13 with suffix B8; with 13
    // known it is offered, but after the suggestion that fixes the function itself
    let known13 = |s: &Series, f: &str| known(s, f) || (*s == S74 && f == "13");
    let got: Vec<String> = near_misses("74LS1388", &known13, 10)
        .into_iter()
        .map(|s| s.value)
        .collect();
    assert_eq!(got, ["74LS138", "74LS13B8"]);
}

#[test]
fn one_suggestion_per_part() {
    // 40111: removing any of the three 1s gives 4011; shown once
    let got = suggest("CD40111BE");
    assert_eq!(got.len(), 1, "{got:?}");
    // 74LS0O: 74LS00 by the O/0 confusion and 74LS00O by an inserted 0 are the same part
    let got = suggest("74LS0O");
    assert_eq!(got.len(), 1, "{got:?}");
}

#[test]
fn dropped_digit_candidates_are_all_offered_in_a_stable_order() {
    // "744" reads as nothing; a dropped digit gives four known parts, leftmost edit first
    let got: Vec<String> = suggest("744").into_iter().map(|(v, _)| v).collect();
    assert_eq!(got, ["7404", "7414", "7474", "7447"]);
}

#[test]
fn two_confusions_only_when_they_agree() {
    // 74LSOS: O->0 with S->5 gives 74LS05, S->5 with O->0 gives 74L50S (74L family, 50):
    // two different parts, so neither is offered
    assert_eq!(suggest("74LSOS"), Vec::<(String, String)>::new());
    // 74HCIO: only 74HC10
    assert_eq!(
        suggest("74HCIO"),
        vec![(
            "74HC10".to_string(),
            "I read as 1 at position 5, O read as 0 at position 6".to_string()
        )]
    );
}

#[test]
fn nothing_when_nothing_known_or_limit_zero() {
    assert!(near_misses("74LSOO", &|_, _| false, 5).is_empty());
    assert!(near_misses("74LSOO", &known, 0).is_empty());
    assert!(near_misses("", &known, 5).is_empty());
    assert!(near_misses("NE555", &known, 5).is_empty());
    assert_eq!(near_misses("744", &known, 2).len(), 2);
}

#[test]
fn never_suggests_the_part_the_value_already_is() {
    for value in ["74LS00", "7400", "CD4011BE", "74HC14", "74LS138B"] {
        let own = match_value(value).expect("matches");
        for s in near_misses(value, &known, 20) {
            let m = s.matched.as_ref().expect("a 74 or 4000 reading");
            assert!(
                (m.family.as_str(), m.function.as_str())
                    != (own.family.as_str(), own.function.as_str()),
                "{value:?} suggested {s:?}"
            );
            assert!(known(&m.series, &m.function));
        }
    }
}

// ---------------------------------------------------------------- properties

const PREFIXES_74: &[&str] = &[
    "", "SN", "SNJ", "DM", "MC", "N", "S", "HD", "TC", "MM", "M", "CD", "IN", "UPD", "MB",
];
const FAMILIES: &[&str] = &[
    "", "L", "H", "S", "LS", "ALS", "AS", "F", "HC", "HCT", "AC", "ACT", "AHC", "AHCT", "LV", "LVC",
];
const SUFFIXES_74: &[&str] = &[
    "", "N", "AN", "PC", "D", "PW", "NE4", "J", "-N", "DR", "A", "APWR",
];
// "MC" is left out: Motorola numbers its CMOS MC14xxx (below), and an MC40xx is another part (the
// bipolar MC4044 phase detector)
const PREFIXES_4000: &[&str] = &["", "CD", "HEF", "HCF", "HCC", "TC", "HD", "BU"];
const SUFFIXES_4000: &[&str] = &["", "E", "P", "CP", "CN", "T", "M", "F3A", "PWR", "-E"];

fn pick(list: &'static [&'static str]) -> impl Strategy<Value = &'static str> {
    proptest::sample::select(list)
}

proptest! {
    #[test]
    fn match_value_never_panics(s in any::<String>()) {
        let _ = match_value(&s);
    }

    #[test]
    fn near_misses_never_panic(s in "[0-9A-Za-z \u{b5}()/,.+#-]{0,24}") {
        let _ = match_value(&s);
        for sug in near_misses(&s, &|_, _| true, 5) {
            // every suggestion reads back as what it claims
            let m = match_value(&sug.value).expect("a suggestion matches");
            prop_assert_eq!(Some(m.function), sug.matched.map(|x| x.function));
        }
    }

    #[test]
    fn formatted_74_values_read_back(
        prefix in pick(PREFIXES_74),
        military in any::<bool>(),
        family in pick(FAMILIES),
        function in prop_oneof!["[0-9]{2,3}", pick(&["4060", "4040", "4538", "40105", "4017"]).prop_map(String::from)],
        suffix in pick(SUFFIXES_74),
        lower in any::<bool>(),
    ) {
        let range = if military { "54" } else { "74" };
        let mut value = format!("{prefix}{range}{family}{function}{suffix}");
        if lower {
            value = value.to_lowercase();
        }
        let m = match_value(&value);
        prop_assert!(m.is_some(), "{} did not match", value);
        let m = m.expect("checked");
        let want_family = if family == "LV" && suffix.starts_with('A') {
            "74LV-A".to_string()
        } else {
            format!("74{family}")
        };
        let want_series = if function.len() >= 4 { S4000 } else { S74 };
        prop_assert_eq!(&m.family, &want_family, "{}", value);
        prop_assert_eq!(&m.function, &function, "{}", value);
        prop_assert_eq!(&m.series, &want_series, "{}", value);
        prop_assert_eq!(m.military, military, "{}", value);
        prop_assert_eq!(m.prefix.as_deref(), (!prefix.is_empty()).then_some(prefix), "{}", value);
        let want_suffix = suffix.trim_start_matches('-');
        prop_assert_eq!(m.suffix.as_deref(), (!want_suffix.is_empty()).then_some(want_suffix));
    }

    #[test]
    fn formatted_4000_values_read_back(
        prefix in pick(PREFIXES_4000),
        number in prop_oneof!["40[0-9]{2}", "45[0-9]{2}", "40[0-9]{3}"],
        marker in pick(&["", "B", "UB"]),
        suffix in pick(SUFFIXES_4000),
    ) {
        let value = format!("{prefix}{number}{marker}{suffix}");
        let m = match_value(&value);
        prop_assert!(m.is_some(), "{} did not match", value);
        let m = m.expect("checked");
        let want_family = if marker == "UB" { "4000UB" } else { "4000B" };
        prop_assert_eq!(m.series, S4000);
        prop_assert_eq!(m.family.as_str(), want_family, "{}", value);
        prop_assert_eq!(&m.function, &number, "{}", value);
    }

    #[test]
    fn motorola_14_numbers_read_as_40_numbers(
        rest in prop_oneof!["0[0-9]{2}", "5[0-9]{2}", "[12][0-9]{2}"],
        marker in pick(&["B", "UB"]),
        suffix in pick(&["", "CP", "CL"]),
    ) {
        let value = format!("MC14{rest}{marker}{suffix}");
        let m = match_value(&value);
        prop_assert!(m.is_some(), "{} did not match", value);
        let want = if rest.starts_with('1') || rest.starts_with('2') {
            format!("40{rest}")
        } else {
            format!("4{rest}")
        };
        prop_assert_eq!(m.expect("checked").function, want);
    }
}
