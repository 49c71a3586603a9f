//! The syntax errors, built in one place for both lexers (`sexpr::parse` and the one-pass
//! `netlist::read`), so their codes, messages, places and help stay the same.

use crate::diag::Diag;
use crate::source::Span;

use super::MAX_DEPTH;

/// A `)` after the root list closed at `root_end`.
pub(crate) fn stray_close_after_root(at: usize, root_end: usize) -> Diag {
    Diag::error("stray-close", "a `)` closes a list that was never opened")
        .at(Span::new(at, at + 1), "no list is open here")
        .also(
            Span::new(root_end - 1, root_end),
            "the root list already closed here",
        )
        .with_help("a list above closes too early, or this `)` is extra: remove one `)`")
}

/// A `)` with no list open at all.
pub(crate) fn stray_close(at: usize) -> Diag {
    Diag::error("stray-close", "a `)` closes a list that was never opened")
        .at(Span::new(at, at + 1), "no matching `(`")
        .with_help("remove this parenthesis, or look above it for a list closed too early")
}

/// Text after the root list closed.
pub(crate) fn trailing_text(text: &str, at: usize) -> Diag {
    let n = text.len();
    let end = text[at..]
        .find(char::is_whitespace)
        .map_or(n, |p| at + p)
        .min(at + 40);
    Diag::error("trailing-text", "unexpected text after the end of the netlist")
        .at(Span::new(at, end.max(at + 1).min(n)), "after the closing `)` of the root list")
        .with_help("a netlist is one parenthesised list; the file may have been concatenated or edited by hand")
}

/// A `(` one level deeper than [`MAX_DEPTH`].
pub(crate) fn too_deep(at: usize) -> Diag {
    Diag::error(
        "too-deep",
        format!(
            "lists are nested more than {MAX_DEPTH} levels deep; a KiCad netlist nests about seven"
        ),
    )
    .at(Span::new(at, at + 1), format!("level {}", MAX_DEPTH + 1))
    .with_help("this file was not written by KiCad; export the netlist again")
}

/// A quoted string opened at `start` and never closed.
pub(crate) fn unterminated_string(text: &str, start: usize) -> Diag {
    let n = text.len();
    let line_end = text[start..].find(['\n', '\r']).map_or(n, |p| start + p);
    Diag::error("unterminated-string", "a quoted string is never closed")
        .at(
            Span::new(start, line_end.min(start + 60).max(start + 1)),
            "this string has no closing `\"`",
        )
        .with_help(
            "add the closing quote; inside a string, write a quote as \\\" and a backslash as \\\\",
        )
}

/// The file ends with `depth` lists open, the innermost opened at `open`.
pub(crate) fn unclosed_list(text: &str, open: usize, depth: usize) -> Diag {
    let n = text.len();
    let head_end = text[open..]
        .find(|ch: char| ch.is_whitespace() || ch == ')')
        .map_or(n, |p| open + p);
    // at most 40 bytes of the head, cut on a character boundary
    let mut cut = head_end.min(open + 40);
    while !text.is_char_boundary(cut) {
        cut -= 1;
    }
    let head = &text[open..cut];
    let last = text.trim_end().len().max(open + 1);
    let last_start = text[..last]
        .char_indices()
        .next_back()
        .map_or(0, |(p, _)| p);
    Diag::error(
        "unclosed-list",
        format!(
            "the file ends with {depth} list{} still open; the innermost, `{head}`, is never closed",
            if depth == 1 { "" } else { "s" }
        ),
    )
    .at(Span::new(open, open + 1), "this list is never closed")
    .with_help("the file looks truncated: export the netlist again, or add the missing `)`")
    .also(Span::new(last_start, last), "the file ends here")
}

/// Only white space (or nothing) where the root list should be.
pub(crate) fn no_expression() -> Diag {
    Diag::error("empty-file", "the file holds no S-expression")
}

/// An atom or string outside any list.
pub(crate) fn outside(start: usize, end: usize) -> Diag {
    Diag::error(
        "not-a-netlist",
        "text outside any list: a KiCad netlist is one parenthesised list",
    )
    .at(Span::new(start, end), "outside the root list")
    .with_help("give netmargin the `.net` file KiCad exports (File > Export > Netlist)")
}
