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
    let n = name.trim_start_matches('/').trim().to_ascii_uppercase();
    if n.is_empty() || n.starts_with("NET-(") || n.starts_with("UNCONNECTED-(") {
        return None;
    }
    if is_ground(&n) {
        return Some(NameRail::Ground);
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
    let v = voltage_in_name(&n);
    let supply_word = ["VCC", "VDD", "VEE", "V+", "V-", "VBAT", "VIN", "VPP"]
        .iter()
        .any(|w| n.starts_with(w));
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
