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

#[cfg(test)]
mod tests {
    use super::*;
    #[test]
    fn escapes_control_characters() {
        assert_eq!(sanitize("a\x1b[31mb"), "a\\u{1b}[31mb");
        assert_eq!(sanitize("x\ny"), "x\\u{a}y");
        assert_eq!(sanitize("tab\tok µΩ"), "tab\tok µΩ");
        assert!(matches!(sanitize("plain"), Cow::Borrowed(_)));
        assert_eq!(sanitize("\u{202e}evil"), "\\u{202e}evil");
    }
}
