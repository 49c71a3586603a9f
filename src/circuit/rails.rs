//! Rails from net names: `GND`, `0V`, `VSS` are ground; `+5V`, `5V`, `+3V3`, `3.3V`, `-12V`,
//! `VCC`, `VDD`, `VEE` are supplies, with their voltage read from the name where it says one.

/// What a net's name says about it as a rail.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum NameRail {
    Ground,
    /// A supply; the voltage when the name states it.
    Supply(Option<f64>),
}

/// Reads a voltage from a rail-like name: `+5V` 5, `5V0` 5, `3V3` 3.3, `+3.3V` 3.3, `-12V`
/// -12, `12V_A` 12, `VCC5` 5, `+15` 15. `None` when the name states no voltage.
pub fn voltage_in_name(name: &str) -> Option<f64> {
    let n = name.trim_start_matches('/').to_ascii_uppercase();
    let n = n.trim();
    let bytes = n.as_bytes();
    // find a run: [+-]? digits [V digits | .digits V? | V]
    let mut i = 0;
    while i < bytes.len() {
        let sign_at = i;
        let mut j = i;
        let mut neg = false;
        if bytes[j] == b'+' || bytes[j] == b'-' {
            neg = bytes[j] == b'-';
            j += 1;
        }
        let d0 = j;
        while j < bytes.len() && bytes[j].is_ascii_digit() {
            j += 1;
        }
        if j == d0 {
            i = sign_at + 1;
            continue;
        }
        let int: f64 = n[d0..j].parse().ok()?;
        let mut value = int;
        let mut has_v = false;
        if j < bytes.len() && (bytes[j] == b'V' || bytes[j] == b'.') {
            let sep = bytes[j];
            let f0 = j + 1;
            let mut k = f0;
            while k < bytes.len() && bytes[k].is_ascii_digit() {
                k += 1;
            }
            if k > f0 {
                let frac: f64 = format!("0.{}", &n[f0..k]).parse().ok()?;
                value += frac;
            }
            if sep == b'V' {
                has_v = true;
            } else if k < bytes.len() && bytes[k] == b'V' {
                has_v = true;
                k += 1;
            }
            j = k;
        }
        let signed = bytes[sign_at] == b'+' || neg;
        // a bare number counts only when signed (`+15`) or after VCC/VDD (`VCC5`)
        let after_supply = n[..sign_at].ends_with("VCC") || n[..sign_at].ends_with("VDD");
        if has_v || signed || after_supply {
            let _ = j;
            return Some(if neg { -value } else { value });
        }
        i = j.max(sign_at + 1);
    }
    None
}

/// True when a net name marks ground.
pub fn is_ground(name: &str) -> bool {
    crate::classify::classifier::is_ground_name(name) && !name.to_ascii_uppercase().contains("VEE")
}

/// Classifies a net name as a rail.
pub fn rail_from_name(name: &str) -> Option<NameRail> {
    let t = name.trim_start_matches('/').trim();
    // KiCad's names for unnamed nets, the most common names on a board, are no rails: said
    // before the name is copied
    let starts = |p: &str| {
        t.as_bytes()
            .get(..p.len())
            .is_some_and(|b| b.eq_ignore_ascii_case(p.as_bytes()))
    };
    if t.is_empty() || starts("NET-(") || starts("UNCONNECTED-(") {
        return None;
    }
    // in capitals, on the stack for a name of usual length (every net's name is read)
    let mut buf = [0u8; 64];
    let owned;
    let n: &str = match buf.get_mut(..t.len()) {
        Some(b) => {
            b.copy_from_slice(t.as_bytes());
            b.make_ascii_uppercase();
            std::str::from_utf8(b).expect("a change of ASCII case keeps UTF-8")
        }
        None => {
            owned = t.to_ascii_uppercase();
            &owned
        }
    };
    // `n` is in capitals already: no second copy to look for VEE, nor to look for ground
    if crate::classify::classifier::is_ground_name_upper(n) && !n.contains("VEE") {
        return Some(NameRail::Ground);
    }
    // a supply is named by a supply word or starts with its voltage (`+5V`, `3V3`): any other
    // name is a signal, and the word-by-word reading below is spared on every such net
    let supply_word = ["VCC", "VDD", "VEE", "V+", "V-", "VBAT", "VIN", "VPP"]
        .iter()
        .any(|w| n.starts_with(w));
    let starts_with_volts = n.starts_with('+')
        || n.starts_with('-')
        || n.chars().next().is_some_and(|c| c.is_ascii_digit());
    if !(supply_word || starts_with_volts) {
        return None;
    }
    // a signal named after a rail (`5V_OK`, `/5V_TO_3V`, `12V_EN`) is not the rail
    const SIGNAL_WORDS: &[&str] = &[
        "TO", "EN", "ENA", "ENABLE", "SENSE", "SEN", "MON", "DET", "OK", "PG", "PGOOD", "FAULT",
        "FAIL", "CTRL", "SW", "ON", "OFF", "SEL", "REQ", "ACK", "N", "INT", "CLK", "DATA", "TX",
        "RX", "LED", "FB",
    ];
    if n.split(|c: char| !c.is_ascii_alphanumeric())
        .skip(1)
        .any(|w| SIGNAL_WORDS.contains(&w))
        || n.split(|c: char| !c.is_ascii_alphanumeric())
            .filter(|w| voltage_in_name(w).is_some())
            .count()
            > 1
    {
        return None;
    }
    let v = voltage_in_name(n);
    let voltage_like = v.is_some()
        && (n.starts_with('+')
            || n.starts_with('-')
            || n.chars().next().is_some_and(|c| c.is_ascii_digit())
            || supply_word);
    if supply_word || voltage_like {
        if n.starts_with("VEE") && v.is_none() {
            return Some(NameRail::Supply(None));
        }
        return Some(NameRail::Supply(v));
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A name longer than the stack buffer it is read in is read the same, from a copy.
    #[test]
    fn long_names_read_as_short_ones() {
        let tail = "A".repeat(70);
        for (name, want) in [
            (format!("VCC_{tail}"), Some(NameRail::Supply(None))),
            (
                format!("/vcc_{}", tail.to_lowercase()),
                Some(NameRail::Supply(None)),
            ),
            (format!("GND_{tail}"), Some(NameRail::Ground)),
            (format!("DATA_{tail}"), None),
        ] {
            assert!(name.len() > 64);
            assert_eq!(rail_from_name(&name), want, "{name}");
        }
        // and the same words, short
        assert_eq!(rail_from_name("VCC_A"), Some(NameRail::Supply(None)));
        assert_eq!(rail_from_name("/gnd_a"), Some(NameRail::Ground));
    }

    #[test]
    fn voltages_from_common_rail_names() {
        // common practice: KiCad's power symbols and hand-drawn labels
        for (name, v) in [
            ("+5V", 5.0),
            ("5V", 5.0),
            ("+3V3", 3.3),
            ("3V3", 3.3),
            ("+3.3V", 3.3),
            ("+12V", 12.0),
            ("-12V", -12.0),
            ("-5V", -5.0),
            ("5V0", 5.0),
            ("VCC5", 5.0),
            ("+15", 15.0),
            ("/+5V", 5.0),
            ("+1V8", 1.8),
            ("+5V_DIG", 5.0),
            ("+12V_A", 12.0),
        ] {
            assert_eq!(voltage_in_name(name), Some(v), "{name}");
            assert_eq!(
                rail_from_name(name),
                Some(NameRail::Supply(Some(v))),
                "{name}"
            );
        }
        for g in ["GND", "GNDD", "DGND", "AGND", "0V", "VSS", "/GND"] {
            assert_eq!(rail_from_name(g), Some(NameRail::Ground), "{g}");
        }
        assert_eq!(rail_from_name("VCC"), Some(NameRail::Supply(None)));
        assert_eq!(rail_from_name("VDD"), Some(NameRail::Supply(None)));
        assert_eq!(rail_from_name("VEE"), Some(NameRail::Supply(None)));
        for not in [
            "/CLK",
            "Net-(U1-Pad3)",
            "A5",
            "/D[2]",
            "unconnected-(U1-Pad4)",
            "/SEL0",
            "CNT5",
            "Q3V",
            "/5V_TO_3V",
            "5V_OK",
            "+12V_EN",
            "VCC_SENSE",
        ] {
            assert_eq!(rail_from_name(not), None, "{not}");
        }
    }
}

/// The output voltage a fixed regulator's part number states, with the pin its output is on
/// in the usual package when the symbol does not name it: `7805` / `LM7805` / `MC78L05` /
/// `L78M12` (TO-220 and TO-92 pin 3 is the output on the positive 78xx series: onsemi MC7800
/// and MC78L00A data sheets), `AMS1117-3.3` / `LM1117-3.3` (SOT-223 pin 2 is the output:
/// Advanced Monolithic Systems AMS1117 data sheet), `LM2940-5.0`, `LM3940` (3.3 V; TO-220 pin
/// 3: TI LM2940, LM3940 data sheets). `None` when the value names no fixed regulator.
pub fn fixed_regulator(value: &str) -> Option<(f64, &'static str)> {
    let v = value.trim().to_ascii_uppercase();
    // 78xx, 78Lxx, 78Mxx after an optional maker prefix
    if let Some(i) = v.find("78") {
        let prefix = &v[..i];
        if prefix.chars().all(|c| c.is_ascii_alphabetic()) && prefix.len() <= 3 {
            let rest = &v[i + 2..];
            let rest = rest
                .strip_prefix('L')
                .or_else(|| rest.strip_prefix('M'))
                .unwrap_or(rest);
            let digits: String = rest.chars().take_while(|c| c.is_ascii_digit()).collect();
            if digits.len() == 2 {
                let volts: f64 = digits.parse().ok()?;
                if (2.0..=24.0).contains(&volts) {
                    return Some((volts, "3"));
                }
            }
        }
    }
    if v.contains("3940") {
        return Some((3.3, "3"));
    }
    for (key, out_pin) in [
        ("1117", "2"),
        ("2940", "3"),
        ("2937", "3"),
        ("1084", "2"),
        ("1085", "2"),
        ("1086", "2"),
    ] {
        if let Some(i) = v.find(key) {
            let rest = &v[i + key.len()..];
            // `-3.3`, `-3V3`, `-5.0`, `CT-5.0`, `-33`
            let tail = rest.rsplit('-').next().unwrap_or("");
            let volts = if rest.contains('-') {
                voltage_in_name(&format!("{tail}V")).or_else(|| {
                    tail.parse::<f64>()
                        .ok()
                        .map(|x| if x >= 10.0 { x / 10.0 } else { x })
                })
            } else {
                None
            };
            if let Some(volts) = volts.filter(|x| (1.0..=15.0).contains(x)) {
                return Some((volts, out_pin));
            }
        }
    }
    None
}

#[cfg(test)]
mod regulator_tests {
    use super::fixed_regulator;

    #[test]
    fn fixed_regulators_name_their_output() {
        // output voltages as the part numbers state them (onsemi MC7800, MC78L00A; AMS1117;
        // TI LM2940, LM3940 data sheets)
        for (value, volts) in [
            ("7805", 5.0),
            ("LM7805", 5.0),
            ("MC78L05", 5.0),
            ("L7812CV", 12.0),
            ("78M09", 9.0),
            ("AMS1117-3.3", 3.3),
            ("LM1117-5.0", 5.0),
            ("LM2940CT-5.0", 5.0),
            ("LM3940", 3.3),
        ] {
            assert_eq!(fixed_regulator(value).map(|x| x.0), Some(volts), "{value}");
        }
        for not in ["LM317", "74LS78", "NE555", "AMS1117", "7400"] {
            assert_eq!(fixed_regulator(not), None, "{not}");
        }
    }
}
