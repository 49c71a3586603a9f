//! A writer of JSON in the reports' layout ([`super::json::Pretty`]: objects and arrays over
//! lines, two spaces a level), for the records a report holds by the hundred thousand (the
//! JSON format's findings, SARIF's results).
//!
//! serde_json looks at every byte of every key and string on its way out, and the reports
//! then look at every byte again for what a terminal could act on
//! ([`super::json::escape_unsafe`]). Here keys are fixed words, written as they are, and a
//! string is checked once for any byte either escape could take (a check the compiler runs
//! many bytes at a time); a string with none is written at once, any other goes through
//! serde_json and the terminal escape. The bytes are those of the serde path.
//!
//! The text is gathered in a buffer and handed on in large pieces.

use std::io::{self, Write};

use serde::Serialize;

use crate::source::Span;

/// How much text is gathered before it is handed on.
const CHUNK: usize = 1 << 16;

/// Pieces of text that many records repeat (the fields of a place many findings point at),
/// each kept with the span it was written for and the writer's state it was written in: a
/// small table with a slot per span, by its offsets.
pub(crate) struct Repeats {
    slots: Vec<Option<Kept>>,
}

struct Kept {
    span: Span,
    /// The depth, and whether the open object had no member, before the piece.
    depth: usize,
    first: bool,
    /// Whether it still had none after.
    first_after: bool,
    text: Vec<u8>,
}

impl Repeats {
    pub(crate) fn new() -> Repeats {
        Repeats { slots: Vec::new() }
    }
}

/// A JSON writer in the reports' pretty layout. Callers open and close objects and arrays
/// and write keys and values in order; the layout (commas, line breaks, indents) is its own.
pub(crate) struct PrettyOut<'o> {
    buf: Vec<u8>,
    out: &'o mut dyn Write,
    depth: usize,
    /// Whether the open object or array has no item yet.
    first: bool,
}

impl<'o> PrettyOut<'o> {
    pub(crate) fn new(out: &'o mut dyn Write) -> PrettyOut<'o> {
        PrettyOut {
            buf: Vec::with_capacity(CHUNK + 4096),
            out,
            depth: 0,
            first: true,
        }
    }

    /// `,` unless first, a line break and the indent of the current depth.
    #[inline]
    fn line(&mut self) {
        const BREAK: &[u8; 2 + 64] =
            b",\n                                                                ";
        let from = usize::from(self.first);
        let want = 2 + 2 * self.depth;
        self.first = false;
        if want <= 64 {
            // a copy of one known length (a few moves, no call), cut back to the indent
            let len = self.buf.len();
            self.buf.extend_from_slice(&BREAK[from..from + 64]);
            self.buf.truncate(len + want - from);
        } else {
            self.buf.extend_from_slice(&BREAK[from..2]);
            for _ in 0..self.depth {
                self.buf.extend_from_slice(b"  ");
            }
        }
    }

    /// Hands the gathered text on once there is a chunk of it. Call between records.
    pub(crate) fn flush_some(&mut self) -> io::Result<()> {
        if self.buf.len() >= CHUNK {
            // up to the last line break: a line-buffered standard output then hands the
            // piece on in one write and keeps nothing back to write before the next
            let cut = memchr::memrchr(b'\n', &self.buf).map_or(self.buf.len(), |i| i + 1);
            self.out.write_all(&self.buf[..cut])?;
            self.buf.drain(..cut);
        }
        Ok(())
    }

    /// Hands everything on, with the final line end.
    pub(crate) fn finish(mut self) -> io::Result<()> {
        self.buf.push(b'\n');
        self.out.write_all(&self.buf)
    }

    /// The key of the next member: a fixed word with nothing to escape. (Inlined, so that
    /// each key is copied as the constant it is.)
    #[inline(always)]
    pub(crate) fn key(&mut self, key: &'static str) -> &mut Self {
        debug_assert!(clean(key.as_bytes()), "a key is a plain word");
        self.line();
        // `"key": ` as one copy of a known length (most keys are short)
        const ROOM: usize = 24;
        if key.len() + 4 <= ROOM {
            let mut quoted = [b' '; ROOM];
            quoted[0] = b'"';
            quoted[1..1 + key.len()].copy_from_slice(key.as_bytes());
            quoted[1 + key.len()..3 + key.len()].copy_from_slice(b"\":");
            self.buf.extend_from_slice(&quoted[..key.len() + 4]);
        } else {
            self.buf.push(b'"');
            self.buf.extend_from_slice(key.as_bytes());
            self.buf.extend_from_slice(b"\": ");
        }
        self
    }

    /// Starts the next item of an array.
    #[inline]
    pub(crate) fn item(&mut self) -> &mut Self {
        self.line();
        self
    }

    #[inline]
    pub(crate) fn open_object(&mut self) {
        self.depth += 1;
        self.first = true;
        self.buf.push(b'{');
    }

    #[inline]
    pub(crate) fn close_object(&mut self) {
        self.close(b'}');
    }

    #[inline]
    pub(crate) fn open_array(&mut self) {
        self.depth += 1;
        self.first = true;
        self.buf.push(b'[');
    }

    #[inline]
    pub(crate) fn close_array(&mut self) {
        self.close(b']');
    }

    #[inline]
    fn close(&mut self, bracket: u8) {
        self.depth -= 1;
        if !self.first {
            self.first = true;
            self.line();
        }
        self.buf.push(bracket);
        self.first = false;
    }

    /// A fixed word, with nothing to escape (a severity, a level).
    #[inline(always)]
    pub(crate) fn word(&mut self, s: &'static str) {
        debug_assert!(clean(s.as_bytes()), "a plain word");
        self.buf.push(b'"');
        self.buf.extend_from_slice(s.as_bytes());
        self.buf.push(b'"');
    }

    /// A string, escaped as serde_json and then [`super::json::escape_unsafe`] escape it.
    pub(crate) fn str(&mut self, s: &str) {
        if clean(s.as_bytes()) {
            self.buf.reserve(s.len() + 2);
            self.buf.push(b'"');
            self.buf.extend_from_slice(s.as_bytes());
            self.buf.push(b'"');
        } else {
            self.buf.extend_from_slice(escaped(s).as_bytes());
        }
    }

    /// The string made of `parts` one after another, written with no copy of it made when
    /// no part needs an escape.
    pub(crate) fn str_parts(&mut self, parts: [&str; 3]) {
        if parts.iter().all(|p| clean(p.as_bytes())) {
            self.buf
                .reserve(parts.iter().map(|p| p.len()).sum::<usize>() + 2);
            self.buf.push(b'"');
            for p in parts {
                self.buf.extend_from_slice(p.as_bytes());
            }
            self.buf.push(b'"');
        } else {
            self.str(&parts.concat());
        }
    }

    /// [`PrettyOut::str_parts`] for any number of parts.
    pub(crate) fn str_part_list<'s>(&mut self, parts: impl Iterator<Item = &'s str> + Clone) {
        if parts.clone().all(|p| clean(p.as_bytes())) {
            self.buf.push(b'"');
            for p in parts {
                self.buf.extend_from_slice(p.as_bytes());
            }
            self.buf.push(b'"');
        } else {
            self.str(&parts.collect::<String>());
        }
    }

    pub(crate) fn opt_str(&mut self, s: Option<&str>) {
        match s {
            Some(s) => self.str(s),
            None => self.null(),
        }
    }

    #[inline]
    pub(crate) fn num(&mut self, n: usize) {
        self.buf
            .extend_from_slice(itoa::Buffer::new().format(n).as_bytes());
    }

    #[inline]
    pub(crate) fn opt_num(&mut self, n: Option<usize>) {
        match n {
            Some(n) => self.num(n),
            None => self.null(),
        }
    }

    pub(crate) fn bool(&mut self, b: bool) {
        self.buf
            .extend_from_slice(if b { b"true" } else { b"false" });
    }

    pub(crate) fn null(&mut self) {
        self.buf.extend_from_slice(b"null");
    }

    /// A list of strings.
    pub(crate) fn strs<'s>(&mut self, items: impl IntoIterator<Item = &'s str>) {
        self.open_array();
        for s in items {
            self.item().str(s);
        }
        self.close_array();
    }

    /// A fingerprint, as 16 hex digits.
    pub(crate) fn hex64(&mut self, h: u64) {
        let mut digits = [b'"'; 18];
        digits[1..9].copy_from_slice(&hex8(h >> 32));
        digits[9..17].copy_from_slice(&hex8(h & 0xffff_ffff));
        self.buf.extend_from_slice(&digits);
    }

    /// What `write` writes for `span` here, copied from `kept` when it was written for the
    /// same span at the same depth and place in its object. `write` must write the same text
    /// whenever it is given the same span in the same state, close what it opens and not hand
    /// anything on.
    pub(crate) fn repeat(&mut self, kept: &mut Repeats, span: Span, write: impl FnOnce(&mut Self)) {
        if kept.slots.is_empty() {
            kept.slots = (0..crate::report::Places::KEPT).map(|_| None).collect();
        }
        let slot = &mut kept.slots[crate::report::Places::slot(span)];
        if let Some(k) = slot {
            if k.span == span && k.depth == self.depth && k.first == self.first {
                self.buf.extend_from_slice(&k.text);
                self.first = k.first_after;
                return;
            }
        }
        let (depth, first, from) = (self.depth, self.first, self.buf.len());
        write(self);
        debug_assert_eq!(self.depth, depth, "a repeated piece is closed");
        let k = slot.get_or_insert_with(|| Kept {
            span,
            depth,
            first,
            first_after: first,
            text: Vec::new(),
        });
        k.span = span;
        k.depth = depth;
        k.first = first;
        k.first_after = self.first;
        k.text.clear();
        k.text.extend_from_slice(&self.buf[from..]);
    }

    /// Any value, through serde_json in the same layout and escaped as [`PrettyOut::str`]
    /// escapes (for the parts of a report written once, not per record).
    pub(crate) fn serde<T: Serialize + ?Sized>(&mut self, value: &T) -> io::Result<()> {
        let mut text = Vec::new();
        let mut ser = serde_json::Serializer::with_formatter(
            &mut text,
            super::json::Pretty::at_depth(self.depth),
        );
        value.serialize(&mut ser).map_err(io::Error::from)?;
        let text = String::from_utf8(text).expect("serde_json writes UTF-8");
        self.buf
            .extend_from_slice(super::json::escape_unsafe(text).as_bytes());
        Ok(())
    }
}

/// The 8 lower-case hex digits of 32-bit `x`, most significant first: each nibble spread into
/// a byte of its own, then made a digit, 8 at a time.
fn hex8(x: u64) -> [u8; 8] {
    let x = (x | (x << 16)) & 0x0000_ffff_0000_ffff;
    let x = (x | (x << 8)) & 0x00ff_00ff_00ff_00ff;
    let x = (x | (x << 4)) & 0x0f0f_0f0f_0f0f_0f0f;
    // 1 in each byte whose nibble is 10 or more
    let letters = ((x + 0x0606_0606_0606_0606) >> 4) & 0x0101_0101_0101_0101;
    // nibble i sits in byte i: the first digit is the highest byte
    (x + 0x3030_3030_3030_3030 + letters * (b'a' - b'0' - 10) as u64).to_be_bytes()
}

/// `s` as a JSON string, the way the serde path writes it.
fn escaped(s: &str) -> String {
    super::json::escape_unsafe(serde_json::to_string(s).expect("a string serializes"))
}

/// Whether no byte of `bytes` can be escaped by serde_json (`"`, `\`, the C0 controls) or by
/// [`super::json::escape_unsafe`] (whose characters are DEL or start with 0xC2 or 0xE2). A
/// few strings with those bytes are clean all the same (`µ`, `Ω`); they take the slow way.
fn clean(bytes: &[u8]) -> bool {
    const BLOCK: usize = 16;
    let n = bytes.len();
    if n < BLOCK {
        // a short string (a pin, a label) in one block: its first and last 8 (or 4) bytes,
        // overlapping, which cover it, with plain bytes after
        let mut block = [b'a'; BLOCK];
        if n >= 8 {
            block[..8].copy_from_slice(&bytes[..8]);
            block[8..].copy_from_slice(&bytes[n - 8..]);
        } else if n >= 4 {
            block[..4].copy_from_slice(&bytes[..4]);
            block[4..8].copy_from_slice(&bytes[n - 4..]);
        } else {
            return !bytes.iter().any(|&b| special(b));
        }
        return !any_special(&block);
    }
    let mut blocks = bytes.chunks_exact(BLOCK);
    if blocks.any(any_special) {
        return false;
    }
    // the last block, overlapping the one before, covers what is left
    blocks.remainder().is_empty() || !any_special(&bytes[bytes.len() - BLOCK..])
}

#[inline(always)]
fn special(b: u8) -> bool {
    b < 0x20 || b == b'"' || b == b'\\' || b == 0x7f || b & 0xdf == 0xc2
}

/// Whether any of 16 bytes is [`special`], with SSE2 (part of every x86-64 processor): a
/// handful of instructions for the 16, where the compiler's own vectorising of the loop
/// below takes several times as many.
#[cfg(target_arch = "x86_64")]
#[inline(always)]
fn any_special(block: &[u8]) -> bool {
    use std::arch::x86_64::*;
    debug_assert_eq!(block.len(), 16);
    // SAFETY: SSE2 is part of the x86-64 baseline; the load reads the block's 16 bytes
    // (unaligned load, checked length above)
    unsafe {
        let b = _mm_loadu_si128(block.as_ptr().cast());
        let eq = |c: u8| _mm_cmpeq_epi8(b, _mm_set1_epi8(c as i8));
        // b < 0x20 (unsigned) exactly when min(b, 0x1f) == b
        let control = _mm_cmpeq_epi8(_mm_min_epu8(b, _mm_set1_epi8(0x1f)), b);
        let lead = _mm_cmpeq_epi8(
            _mm_and_si128(b, _mm_set1_epi8(0xdfu8 as i8)),
            _mm_set1_epi8(0xc2u8 as i8),
        );
        let any = _mm_or_si128(
            _mm_or_si128(control, lead),
            _mm_or_si128(_mm_or_si128(eq(b'"'), eq(b'\\')), eq(0x7f)),
        );
        _mm_movemask_epi8(any) != 0
    }
}

#[cfg(not(target_arch = "x86_64"))]
#[inline(always)]
fn any_special(block: &[u8]) -> bool {
    block.iter().fold(false, |acc, &b| acc | special(b))
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn written(s: &str) -> String {
        let mut out = Vec::new();
        let mut w = PrettyOut::new(&mut out);
        w.str(s);
        w.finish().unwrap();
        String::from_utf8(out).unwrap()
    }

    fn serde_way(s: &str) -> String {
        super::super::json::escape_unsafe(serde_json::to_string(s).unwrap()) + "\n"
    }

    /// The block check agrees with the byte check for every byte at every place of a block.
    #[test]
    fn the_block_check_finds_every_special_byte_anywhere() {
        for b in 0..=255u8 {
            for at in 0..16 {
                let mut block = [b'a'; 16];
                block[at] = b;
                assert_eq!(any_special(&block), special(b), "byte {b:#x} at {at}");
            }
        }
    }

    /// The digits of a fingerprint are those `format!` writes, for every nibble at every place.
    #[test]
    fn hex_digits_are_those_format_writes() {
        let mut values: Vec<u64> = (0..16u64)
            .flat_map(|n| (0..16).map(move |i| n << (4 * i)))
            .collect();
        let mut state = 7u64;
        for _ in 0..1000 {
            state = state.wrapping_mul(6364136223846793005).wrapping_add(1);
            values.push(state);
        }
        for h in values.into_iter().chain([
            0,
            1,
            0xf,
            0x0123_4567_89ab_cdef,
            0x8000_0000_0000_0000,
            u64::MAX,
        ]) {
            let mut out = Vec::new();
            let mut w = PrettyOut::new(&mut out);
            w.hex64(h);
            w.finish().unwrap();
            assert_eq!(String::from_utf8(out).unwrap(), format!("\"{h:016x}\"\n"));
        }
    }

    /// Strings shorter than a block are checked whole: any special byte, at any place of a
    /// string of any short length, is seen.
    #[test]
    fn short_strings_are_checked_at_every_byte() {
        for len in 0..BLOCK_TEST {
            for at in 0..len {
                for b in 0..=255u8 {
                    let mut s = vec![b'a'; len];
                    s[at] = b;
                    assert_eq!(clean(&s), !special(b), "byte {b:#x} at {at} of {len}");
                }
            }
            assert!(clean(&vec![b'a'; len]));
        }
    }
    const BLOCK_TEST: usize = 17;

    #[test]
    fn every_character_that_is_escaped_is_escaped_as_the_serde_way() {
        let mut specials: Vec<char> = (0u32..0x100).filter_map(char::from_u32).collect();
        specials.extend([
            '\u{200e}', '\u{200f}', '\u{2028}', '\u{2029}', '\u{2070}', '\u{feff}',
        ]);
        specials.extend(
            (0x202a..=0x202e)
                .chain(0x2066..=0x2069)
                .filter_map(char::from_u32),
        );
        for c in specials {
            for s in [
                c.to_string(),
                format!("abc{c}"),
                format!("{}{c}{}", "x".repeat(31), "y".repeat(40)),
                format!("{}{c}", "z".repeat(64)),
            ] {
                assert_eq!(written(&s), serde_way(&s), "{:?}", c);
            }
        }
    }

    proptest! {
        #[test]
        fn strings_are_written_as_the_serde_way(s in "\\PC*|[\\x00-\\x7f\u{80}-\u{a0}\u{2000}-\u{2070}µΩ\"\\\\]{0,80}") {
            prop_assert_eq!(written(&s), serde_way(&s));
        }

        /// A string in parts, of any number, is written as the whole string.
        #[test]
        fn strings_in_parts_are_written_as_the_whole(parts in proptest::collection::vec("[a-c\"\u{2028}\\x01]{0,5}", 0..6)) {
            let whole: String = parts.concat();
            let mut out = Vec::new();
            let mut w = PrettyOut::new(&mut out);
            w.str_part_list(parts.iter().map(String::as_str));
            w.finish().unwrap();
            prop_assert_eq!(String::from_utf8(out).unwrap(), serde_way(&whole));
        }
    }

    /// The layout equals the serde path's for nested, empty and deep objects and arrays
    /// (the keys in the order serde_json's map keeps them, sorted).
    #[test]
    fn the_layout_is_the_serde_layout() {
        let mut out = Vec::new();
        let mut w = PrettyOut::new(&mut out);
        w.open_object();
        w.key("a").str("x\u{202e}\"");
        w.key("deep")
            .serde(&serde_json::json!({"k": [1, {"z": "\u{2028}"}], "y": []}))
            .unwrap();
        w.key("e").open_array();
        w.close_array();
        w.key("f").hex64(0x0123_4567_89ab_cdef);
        w.key("l").open_array();
        for i in 0..3 {
            w.item().open_object();
            w.key("b").bool(i == 1);
            w.key("m").opt_num(None);
            w.key("n").num(i);
            w.key("s").strs(["p", "q"]);
            w.close_object();
        }
        w.close_array();
        // deeper than the line-break table
        w.key("nest");
        for _ in 0..40 {
            w.open_object();
            w.key("d");
        }
        w.opt_str(None);
        for _ in 0..40 {
            w.close_object();
        }
        w.key("o").open_object();
        w.close_object();
        w.close_object();
        w.finish().unwrap();
        let mut nest = serde_json::Value::Null;
        for _ in 0..40 {
            nest = serde_json::json!({ "d": nest });
        }
        let want = serde_json::json!({
            "a": "x\u{202e}\"", "e": [], "o": {},
            "l": (0..3).map(|i| serde_json::json!({"n": i, "m": null, "b": i == 1, "s": ["p", "q"]})).collect::<Vec<_>>(),
            "deep": {"k": [1, {"z": "\u{2028}"}], "y": []},
            "f": "0123456789abcdef",
            "nest": nest,
        });
        let mut reference = Vec::new();
        super::super::json::write_safe_pretty(&want, &mut reference).unwrap();
        assert_eq!(
            String::from_utf8(out).unwrap(),
            String::from_utf8(reference).unwrap()
        );
    }
}
