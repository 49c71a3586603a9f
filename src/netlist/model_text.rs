//! [`Text`]: a text of the model with its span, in two words.
//!
//! Most texts of a netlist are borrowed from the file and their span is the token they were
//! read from: an atom (the span is the text) or a quoted string with no escape (the span is
//! the text and its two quotes). For those the text's length follows from the span, so a
//! `Text` keeps a pointer, the span's start, and the span's end with two bits saying which
//! of the two it is (spans end below 1 GiB: both readers refuse larger files). A text
//! borrowed from the file with a span of another place (the schematic reader's: a library
//! name within a symbol's `lib_id`, with the span of the item) keeps the span's length and its
//! own beside its kind instead, when they fit in 14 and 16 bits. Any other text (unescaped,
//! made by the schematic reader, or with a span too long for that) is copied once into a
//! block of its own that also holds its length and the span's end.
//!
//! Sixteen bytes where a copy-on-write string and a span take twenty-four; `Option<Text>`
//! is sixteen bytes too. The model holds about ten of them for every component, one for
//! every node and two for every net.

use std::alloc::{alloc, dealloc, handle_alloc_error, Layout};
use std::marker::PhantomData;
use std::ptr::NonNull;

use super::Str;
use crate::source::Span;

/// The text is the whole span (an atom).
const ATOM: u32 = 0;
/// The text is the span without its first and last byte (a quoted string).
const QUOTED: u32 = 1 << 30;
/// The text is in a block of its own: `[len: u32][end: u32][bytes]`.
const OWNED: u32 = 2 << 30;
/// The text is borrowed from the file, its span is another place: the span's length (below
/// `SLICE_SPAN`) and the text's (below `SLICE_LEN`) are kept beside the kind, the span's end
/// follows from its start.
const SLICE: u32 = 3 << 30;
const KIND: u32 = 3 << 30;
/// The longest span and text a `SLICE` keeps: 14 and 16 bits.
const SLICE_SPAN: u32 = 1 << 14;
const SLICE_LEN: u32 = 1 << 16;
/// The largest span end kept in the 30 bits beside the kind.
const END: u32 = (1 << 30) - 1;
/// The owned block's header: the text's length and the span's end.
const HEADER: usize = 8;
const _: () = assert!(ATOM >> 29 == 0 && QUOTED >> 29 == 2);

/// A text value from the file (unescaped) with its span.
pub struct Text<'a> {
    /// The text's first byte (borrowed), or the owned block.
    ptr: NonNull<u8>,
    start: u32,
    /// The kind in the two high bits; for a borrowed text, the span's end below them.
    tail: u32,
    _text: PhantomData<&'a str>,
}

// A `Text` is a shared `&'a str` or a block it owns and never changes: both may be sent and
// shared between threads as a `&str` and a `Box<str>` may.
unsafe impl Send for Text<'_> {}
unsafe impl Sync for Text<'_> {}

impl<'a> Text<'a> {
    /// A text borrowed from `s`. Its span is kept as its end where it is `s`'s length or two
    /// more (the token the text was read from), else as its length; the text is copied only
    /// when neither fits (a span ending at 1 GiB or more, or longer than 16 kB where the text
    /// is not its token, a text of 64 kB or more).
    pub fn borrowed(s: &'a str, span: Span) -> Text<'a> {
        if span.end <= END && span.start <= span.end {
            let n = span.end - span.start;
            let kind = if n as usize == s.len() {
                Some(ATOM)
            } else if n >= 2 && (n - 2) as usize == s.len() {
                Some(QUOTED)
            } else {
                None
            };
            if let Some(kind) = kind {
                return Text {
                    ptr: NonNull::from(s.as_bytes()).cast(),
                    start: span.start,
                    tail: kind | span.end,
                    _text: PhantomData,
                };
            }
        }
        if span.start <= span.end
            && span.end - span.start < SLICE_SPAN
            && s.len() < SLICE_LEN as usize
        {
            return Text {
                ptr: NonNull::from(s.as_bytes()).cast(),
                start: span.start,
                tail: SLICE | ((span.end - span.start) << 16) | s.len() as u32,
                _text: PhantomData,
            };
        }
        Text::owned(s, span)
    }

    /// The token `text[start..end]`: an atom, or with `quoted` a quoted string whose text is
    /// within the quotes. Borrowed, with no test of lengths: the slice is the span's.
    #[inline]
    pub(crate) fn token(text: &'a str, start: usize, end: usize, quoted: bool) -> Text<'a> {
        let q = usize::from(quoted);
        let s = &text[start + q..end - q];
        if end > END as usize {
            return Text::owned(s, Span::new(start, end));
        }
        Text {
            ptr: NonNull::from(s.as_bytes()).cast(),
            start: start as u32,
            tail: if quoted { QUOTED } else { ATOM } | end as u32,
            _text: PhantomData,
        }
    }

    /// A copy of `s`.
    pub fn owned(s: &str, span: Span) -> Text<'a> {
        let len = u32::try_from(s.len()).expect("model texts are shorter than 4 GiB");
        let layout = Self::layout(len);
        // SAFETY: the layout has a non-zero size (the header); the block is written in full
        // before it is read: the header, then `len` bytes.
        let ptr = unsafe {
            let p = alloc(layout);
            let Some(p) = NonNull::new(p) else {
                handle_alloc_error(layout)
            };
            p.cast::<u32>().write(len);
            p.cast::<u32>().add(1).write(span.end);
            std::ptr::copy_nonoverlapping(s.as_ptr(), p.as_ptr().add(HEADER), s.len());
            p
        };
        Text {
            ptr,
            start: span.start,
            tail: OWNED,
            _text: PhantomData,
        }
    }

    /// A text from a model string: borrowed stays borrowed.
    pub fn new(s: Str<'a>, span: Span) -> Text<'a> {
        if s.is_borrowed() {
            Text::borrowed(s.unwrap_borrowed(), span)
        } else {
            Text::owned(&s, span)
        }
    }

    /// The empty text at `span`.
    pub fn empty(span: Span) -> Text<'a> {
        Text::borrowed("", span)
    }

    fn layout(len: u32) -> Layout {
        Layout::from_size_align(HEADER + len as usize, 4).expect("a small layout")
    }

    #[inline]
    fn kind(&self) -> u32 {
        self.tail & KIND
    }

    #[inline]
    fn owned_header(&self) -> (u32, u32) {
        // SAFETY: an owned text's pointer is its block, whose header was written by `owned`.
        unsafe {
            let p = self.ptr.cast::<u32>();
            (p.read(), p.add(1).read())
        }
    }

    #[inline]
    pub fn as_str(&self) -> &str {
        if self.tail < OWNED {
            return self.token_str();
        }
        self.other_str()
    }

    /// [`Text::as_str`] of a copy or of a text whose span is elsewhere: apart, so the
    /// tokens' path stays small where it is inlined.
    #[inline(never)]
    fn other_str(&self) -> &str {
        if self.kind() == OWNED {
            let (len, _) = self.owned_header();
            // SAFETY: the block holds `len` bytes of a `str` after its header.
            return unsafe {
                let bytes = std::slice::from_raw_parts(self.ptr.as_ptr().add(HEADER), len as usize);
                std::str::from_utf8_unchecked(bytes)
            };
        }
        self.borrowed_unchecked()
    }

    /// An atom's or quoted string's `str`: its span's length, less the two quotes of a
    /// quoted string.
    #[inline(always)]
    fn token_str(&self) -> &'a str {
        debug_assert!(self.tail < OWNED);
        // QUOTED >> 29 is 2, ATOM >> 29 is 0
        let len = (self.tail & END) - self.start - (self.kind() >> 29);
        // SAFETY: `borrowed` took the pointer from a `&'a str` of exactly this length.
        unsafe {
            std::str::from_utf8_unchecked(std::slice::from_raw_parts(
                self.ptr.as_ptr(),
                len as usize,
            ))
        }
    }

    /// The text for the whole lifetime of the file's text, when it is borrowed from it.
    #[inline]
    pub fn as_borrowed(&self) -> Option<&'a str> {
        (self.kind() != OWNED).then(|| self.borrowed_unchecked())
    }

    /// A borrowed text's `str`: a token's, or a `SLICE`'s of its own length.
    #[inline]
    fn borrowed_unchecked(&self) -> &'a str {
        debug_assert!(self.kind() != OWNED);
        if self.tail < OWNED {
            return self.token_str();
        }
        let len = self.tail & (SLICE_LEN - 1);
        // SAFETY: `borrowed` took the pointer from a `&'a str` of exactly this length.
        unsafe {
            std::str::from_utf8_unchecked(std::slice::from_raw_parts(
                self.ptr.as_ptr(),
                len as usize,
            ))
        }
    }

    /// Where the text is in the file.
    #[inline]
    pub fn span(&self) -> Span {
        let end = if self.tail < OWNED {
            self.tail & END
        } else {
            self.other_end()
        };
        Span {
            start: self.start,
            end,
        }
    }

    /// The span's end of a copy or of a text whose span is elsewhere.
    #[inline(never)]
    fn other_end(&self) -> u32 {
        if self.kind() == OWNED {
            self.owned_header().1
        } else {
            self.start + ((self.tail >> 16) & (SLICE_SPAN - 1))
        }
    }

    /// Points the text at another place (a copy is made if the text can no longer be told
    /// from its span).
    pub fn set_span(&mut self, span: Span) {
        *self = match self.as_borrowed() {
            Some(s) => Text::borrowed(s, span),
            None => Text::owned(self.as_str(), span),
        };
    }

    /// The text as a model string (borrowed when the text is).
    pub fn to_str(&self) -> Str<'a> {
        match self.as_borrowed() {
            Some(s) => Str::borrowed(s),
            None => Str::owned(self.as_str().to_string()),
        }
    }

    /// The token `(start, end, quoted)` this text is when it is borrowed from `text` where
    /// its span says (`None` for a copy or a text borrowed from elsewhere).
    #[inline]
    pub(crate) fn token_in(&self, text: &str) -> Option<(u32, u32, bool)> {
        // neither a copy nor a text whose span is elsewhere
        if self.tail >= OWNED {
            return None;
        }
        let kind = self.kind();
        let end = self.tail & END;
        let quoted = kind == QUOTED;
        // a borrowed text's span holds it (and its quotes): `start + quoted <= end`
        let at = self.start as usize + usize::from(quoted);
        (end as usize <= text.len()
            && std::ptr::eq(
                self.ptr.as_ptr().cast_const(),
                text.as_ptr().wrapping_add(at),
            ))
        .then_some((self.start, end, quoted))
    }

    /// True when the text is borrowed from the file's text.
    pub fn is_borrowed(&self) -> bool {
        self.kind() != OWNED
    }
}

impl Drop for Text<'_> {
    fn drop(&mut self) {
        if self.kind() == OWNED {
            let (len, _) = self.owned_header();
            // SAFETY: the block was allocated by `owned` with this layout.
            unsafe { dealloc(self.ptr.as_ptr(), Self::layout(len)) }
        }
    }
}

impl Clone for Text<'_> {
    fn clone(&self) -> Self {
        match self.as_borrowed() {
            Some(_) => Text {
                ptr: self.ptr,
                start: self.start,
                tail: self.tail,
                _text: PhantomData,
            },
            None => Text::owned(self.as_str(), self.span()),
        }
    }
}

impl PartialEq for Text<'_> {
    fn eq(&self, other: &Self) -> bool {
        self.as_str() == other.as_str() && self.span() == other.span()
    }
}

impl Eq for Text<'_> {}

impl std::fmt::Debug for Text<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Text")
            .field("s", &self.as_str())
            .field("span", &self.span())
            .finish()
    }
}

impl std::fmt::Display for Text<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn two_words() {
        assert_eq!(std::mem::size_of::<Text<'_>>(), 16);
        assert_eq!(std::mem::size_of::<Option<Text<'_>>>(), 16);
    }

    #[test]
    fn atoms_and_quoted_strings_are_borrowed_and_keep_their_span() {
        let file = "(ref U12) (value \"74HC00\")";
        let atom = Text::borrowed(&file[5..8], Span::new(5, 8));
        assert!(atom.is_borrowed());
        assert_eq!(atom.as_str(), "U12");
        assert_eq!(atom.span(), Span::new(5, 8));
        assert_eq!(atom.as_borrowed(), Some("U12"));
        let quoted = Text::borrowed(&file[18..24], Span::new(17, 25));
        assert!(quoted.is_borrowed());
        assert_eq!(quoted.as_str(), "74HC00");
        assert_eq!(quoted.span(), Span::new(17, 25));
        let empty = Text::borrowed(&file[18..18], Span::new(17, 19));
        assert_eq!((empty.as_str(), empty.span()), ("", Span::new(17, 19)));
        assert!(empty.is_borrowed());
    }

    #[test]
    fn tokens() {
        let file = "(ref U12) (value \"74HC00\")";
        let atom = Text::token(file, 5, 8, false);
        assert_eq!((atom.as_str(), atom.span()), ("U12", Span::new(5, 8)));
        let quoted = Text::token(file, 17, 25, true);
        assert_eq!(
            (quoted.as_str(), quoted.span()),
            ("74HC00", Span::new(17, 25))
        );
        assert!(atom.is_borrowed() && quoted.is_borrowed());
    }

    #[test]
    fn a_token_is_found_in_its_own_file_only() {
        let file = "(ref U12) (value \"74HC00\")";
        assert_eq!(
            Text::token(file, 5, 8, false).token_in(file),
            Some((5, 8, false))
        );
        assert_eq!(
            Text::token(file, 17, 25, true).token_in(file),
            Some((17, 25, true))
        );
        // the same characters in another string, a copy, a span elsewhere
        let other = file.to_string();
        assert_eq!(Text::token(&other, 5, 8, false).token_in(file), None);
        assert_eq!(Text::owned("U12", Span::new(5, 8)).token_in(file), None);
        assert_eq!(
            Text::borrowed(&file[5..8], Span::new(1, 4)).token_in(file),
            None
        );
    }

    #[test]
    fn a_span_elsewhere_keeps_the_text_borrowed() {
        // a span of another length than the text (the schematic reader's texts: a library
        // name within a symbol's `lib_id`, with the span of the whole item)
        let file = "(lib_id \"Device:R\") (ref U12)";
        let t = Text::borrowed(&file[9..15], Span::new(0, 19));
        assert!(t.is_borrowed());
        assert_eq!((t.as_str(), t.span()), ("Device", Span::new(0, 19)));
        assert_eq!(t.as_borrowed(), Some("Device"));
        assert_eq!(t.token_in(file), None);
        assert_eq!(t.clone().span(), Span::new(0, 19));
        assert_eq!(t, Text::owned("Device", Span::new(0, 19)));
        // the longest span and text kept so, and the shortest copied
        let long = "x".repeat(SLICE_LEN as usize);
        let t = Text::borrowed(&long[1..], Span::new(7, 7 + SLICE_SPAN as usize - 1));
        assert!(t.is_borrowed());
        assert_eq!(t.span(), Span::new(7, 7 + SLICE_SPAN as usize - 1));
        assert_eq!(t.as_str().len(), SLICE_LEN as usize - 1);
        let t = Text::borrowed(&long[1..], Span::new(7, 7 + SLICE_SPAN as usize));
        assert!(!t.is_borrowed());
        assert_eq!(t.span(), Span::new(7, 7 + SLICE_SPAN as usize));
        assert_eq!(t.as_str().len(), SLICE_LEN as usize - 1);
        let t = Text::borrowed(&long, Span::new(7, 9));
        assert!(!t.is_borrowed());
        assert_eq!((t.as_str(), t.span()), (long.as_str(), Span::new(7, 9)));
    }

    #[test]
    fn other_texts_are_copied_with_their_span() {
        // an end beyond the 30 bits kept beside the kind
        let far = Span::new(5, (1 << 30) + 7);
        let t = Text::borrowed("x", far);
        assert_eq!((t.as_str(), t.span()), ("x", far));
        // a span that ends before it starts
        let odd = Span { start: 9, end: 3 };
        let t = Text::borrowed("ab", odd);
        assert_eq!((t.as_str(), t.span()), ("ab", odd));
        let t = Text::owned("µΩ \"q\"", Span::new(0, 12));
        assert_eq!(t.as_str(), "µΩ \"q\"");
        let c = t.clone();
        drop(t);
        assert_eq!((c.as_str(), c.span()), ("µΩ \"q\"", Span::new(0, 12)));
        assert_eq!(Text::owned("", Span::default()).as_str(), "");
    }

    #[test]
    fn a_new_span_keeps_the_text() {
        let file = "(name \"/CLK\")";
        let mut t = Text::borrowed(&file[7..11], Span::new(6, 12));
        // a span of the same length keeps it borrowed
        t.set_span(Span::new(1, 5));
        assert!(t.is_borrowed());
        assert_eq!((t.as_str(), t.span()), ("/CLK", Span::new(1, 5)));
        // another length keeps it borrowed too, the span's length beside it
        t.set_span(Span::new(0, 13));
        assert!(t.is_borrowed());
        assert_eq!((t.as_str(), t.span()), ("/CLK", Span::new(0, 13)));
        // a span too long for that makes a copy, which keeps any span from then on
        t.set_span(Span::new(0, 40_000));
        assert!(!t.is_borrowed());
        assert_eq!((t.as_str(), t.span()), ("/CLK", Span::new(0, 40_000)));
        t.set_span(Span::new(6, 12));
        assert_eq!((t.as_str(), t.span()), ("/CLK", Span::new(6, 12)));
        let mut o = Text::owned("x\\y", Span::new(1, 2));
        o.set_span(Span::new(3, 9));
        assert_eq!((o.as_str(), o.span()), ("x\\y", Span::new(3, 9)));
    }

    #[test]
    fn equality_and_model_strings() {
        let a = Text::borrowed("R1", Span::new(0, 2));
        let b = Text::owned("R1", Span::new(0, 2));
        assert_eq!(a, b);
        assert_ne!(a, Text::owned("R1", Span::new(0, 3)));
        assert!(a.to_str().is_borrowed());
        assert!(!b.to_str().is_borrowed());
        assert_eq!(&*b.to_str(), "R1");
        let n = Text::new(Str::owned("C3".to_string()), Span::new(4, 9));
        assert_eq!((n.as_str(), n.span()), ("C3", Span::new(4, 9)));
        assert_eq!(format!("{n}"), "C3");
    }
}
