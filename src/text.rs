//! Text from a netlist is untrusted: it may hold terminal escape sequences or control
//! characters. Everything printed to a terminal passes through [`sanitize`].

use std::borrow::Cow;

/// Replaces control characters (C0 except tab, DEL, C1) with visible escapes such as `\u{1b}`,
/// so no escape sequence from an input reaches a terminal.
pub fn sanitize(s: &str) -> Cow<'_, str> {
    if !may_be_unsafe(s.as_bytes()) || !s.chars().any(is_unsafe) {
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

/// Whether UTF-8 `bytes` may hold a character [`is_unsafe`] takes: a C0 control other than a
/// tab, DEL, or the first byte of a C1 control (0xC2) or of a bidi override (0xE2). Looked at
/// without an early exit, which the compiler runs many bytes at a time; a text with such a
/// byte is then looked at character by character.
pub(crate) fn may_be_unsafe(bytes: &[u8]) -> bool {
    bytes.iter().fold(false, |any, &b| {
        any | ((b < 0x20) & (b != b'\t')) | (b == 0x7f) | (b & 0xdf == 0xc2)
    })
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

    /// The byte check never passes a character the character check takes, alone or inside
    /// a longer text, so the fast path changes no output.
    #[test]
    fn the_byte_check_sees_every_unsafe_character() {
        for c in (0u32..0x3100)
            .chain([0xfeff, 0xfffd, 0x1f600])
            .filter_map(char::from_u32)
        {
            let s = format!("{}{c}{}", "a".repeat(17), "b".repeat(9));
            if is_unsafe(c) {
                assert!(may_be_unsafe(c.to_string().as_bytes()), "{c:?}");
                assert!(may_be_unsafe(s.as_bytes()), "{c:?} inside");
                assert_ne!(sanitize(&s), s.as_str(), "{c:?} is escaped");
            }
        }
        assert!(!may_be_unsafe(b"gate C of U0 (74HC00) is unused\t"));
        assert!(may_be_unsafe(b"x\x1b[31m"));
    }

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
