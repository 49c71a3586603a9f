//! Bus names and their members: a vector bus `D[0..7]` (members `D0` to `D7`, in the order
//! written, so `D[7..0]` runs downwards), a group bus `{CTRL RD WR}` or a named group
//! `MEM{A[0..3] RD}` (members `MEM.A0` ... `MEM.RD`), groups holding vectors.

/// True when a label or pin text names a bus rather than a net.
pub fn is_bus(text: &str) -> bool {
    vector(text).is_some() || group(text).is_some()
}

/// `PREFIX[a..b]` -> the prefix and the indices in order.
fn vector(text: &str) -> Option<(&str, Vec<i64>)> {
    let open = text.find('[')?;
    let rest = text[open + 1..].strip_suffix(']')?;
    let (a, b) = rest.split_once("..")?;
    let a: i64 = a.trim().parse().ok()?;
    let b: i64 = b.trim().parse().ok()?;
    let prefix = &text[..open];
    if prefix.is_empty() || prefix.contains([' ', '{', '}']) || (a - b).abs() > 4096 {
        return None;
    }
    let v = if a <= b {
        (a..=b).collect()
    } else {
        (b..=a).rev().collect()
    };
    Some((prefix, v))
}

/// `NAME{a b c}` or `{a b c}` -> the name (may be empty) and the member texts.
fn group(text: &str) -> Option<(&str, Vec<&str>)> {
    let open = text.find('{')?;
    let inner = text[open + 1..].strip_suffix('}')?;
    let name = &text[..open];
    // `~{RESET}` and `A_{8}` are markup, not groups
    if name.ends_with('~') || name.ends_with('_') || name.ends_with('^') {
        return None;
    }
    let members: Vec<&str> = inner.split([' ', ',']).filter(|s| !s.is_empty()).collect();
    if members.is_empty() {
        return None;
    }
    Some((name, members))
}

/// The net members of a bus text, flattened (vectors inside a group expanded), each as the
/// net name it joins. Empty when `text` is not a bus.
pub fn members(text: &str) -> Vec<String> {
    if let Some((prefix, idx)) = vector(text) {
        return idx.iter().map(|i| format!("{prefix}{i}")).collect();
    }
    if let Some((name, ms)) = group(text) {
        let mut out = Vec::new();
        for m in ms {
            let sub = if vector(m).is_some() {
                members(m)
            } else {
                vec![m.to_string()]
            };
            for s in sub {
                if name.is_empty() {
                    out.push(s);
                } else {
                    out.push(format!("{name}.{s}"));
                }
            }
        }
        return out;
    }
    Vec::new()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn vector_buses_expand_in_the_order_written() {
        assert_eq!(members("D[0..3]"), ["D0", "D1", "D2", "D3"]);
        assert_eq!(members("DRB[8..6]"), ["DRB8", "DRB7", "DRB6"]);
        assert!(is_bus("A[0..15]"));
        assert!(!is_bus("A[3]"));
        assert!(!is_bus("D0"));
    }

    #[test]
    fn groups_prefix_their_members_with_the_group_name() {
        assert_eq!(members("{RD WR}"), ["RD", "WR"]);
        assert_eq!(members("CTRL{RD WR}"), ["CTRL.RD", "CTRL.WR"]);
        assert_eq!(members("MEM{A[0..1] CS}"), ["MEM.A0", "MEM.A1", "MEM.CS"]);
        // markup is not a group
        assert!(!is_bus("~{RESET}"));
        assert!(!is_bus("A_{8}"));
    }
}
