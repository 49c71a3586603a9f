//! Text from a netlist is untrusted: it may hold terminal escape sequences or control
//! characters. Everything printed to a terminal passes through [`sanitize`].

use std::borrow::Cow;

/// Replaces control characters (C0 except tab, DEL, C1) with visible escapes such as `\u{1b}`,
/// so no escape sequence from an input reaches a terminal.
pub fn sanitize(s: &str) -> Cow<'_, str> {
    if !s.chars().any(is_unsafe) {
        return Cow::Borrowed(s);
    }
    let mut out = String::with_capacity(s.len() + 8);
    for c in s.chars() {
        if is_unsafe(c) {
            out.push_str(&format!("\\u{{{:x}}}", c as u32));
        } else {
            out.push(c);
        }
    }
    Cow::Owned(out)
}

fn is_unsafe(c: char) -> bool {
    (c.is_control() && c != '\t')
        || matches!(c, '\u{200e}' | '\u{200f}' | '\u{202a}'..='\u{202e}' | '\u{2066}'..='\u{2069}')
}

/// The names closest to `want` (case-insensitive edit distance, within a third of its
/// length and at least 2): those at the smallest distance, at most `n`, for "did you mean"
/// hints.
pub fn closest<'a>(want: &str, names: impl IntoIterator<Item = &'a str>, n: usize) -> Vec<String> {
    let w = want.trim_start_matches('/').to_ascii_lowercase();
    let limit = (w.chars().count() / 3).max(2);
    let mut scored: Vec<(usize, &str)> = names
        .into_iter()
        .filter_map(|name| {
            let d = strsim::levenshtein(&w, &name.trim_start_matches('/').to_ascii_lowercase());
            (d <= limit).then_some((d, name))
        })
        .collect();
    scored.sort();
    scored.dedup_by(|a, b| a.1 == b.1);
    let best = scored.first().map_or(0, |s| s.0);
    scored.retain(|s| s.0 == best);
    scored
        .into_iter()
        .take(n)
        .map(|(_, s)| sanitize(s).into_owned())
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn closest_names_within_a_third_of_the_length() {
        let names = ["/CNT_RESET", "/ARM_N", "/ALARM_N", "+5V"];
        assert_eq!(closest("/ARN_N", names, 3), ["/ARM_N"]);
        assert_eq!(closest("CNT_RESTE", names, 3), ["/CNT_RESET"]);
        assert!(closest("/DATA7", names, 3).is_empty());
    }
    #[test]
    fn escapes_control_characters() {
        assert_eq!(sanitize("a\x1b[31mb"), "a\\u{1b}[31mb");
        assert_eq!(sanitize("x\ny"), "x\\u{a}y");
        assert_eq!(sanitize("tab\tok µΩ"), "tab\tok µΩ");
        assert!(matches!(sanitize("plain"), Cow::Borrowed(_)));
        assert_eq!(sanitize("\u{202e}evil"), "\\u{202e}evil");
    }
}
