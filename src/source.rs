//! Source text shared by every layer: the file's name, its text behind an `Arc` (never
//! copied per report), byte spans, and a line-start index so that line/column lookups and
//! miette's source rendering cost O(log n) instead of a scan from byte 0. The index is built
//! on first use: a file that yields no diagnostic to render never pays for it.

use std::sync::{Arc, OnceLock};

use miette::{MietteError, MietteSpanContents, SourceCode, SourceSpan, SpanContents};

/// A byte range in a source text. `u32` offsets keep syntax nodes small; inputs are limited
/// to 4 GiB by the reader.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Default, serde::Serialize)]
pub struct Span {
    pub start: u32,
    pub end: u32,
}

impl Span {
    pub fn new(start: usize, end: usize) -> Span {
        Span {
            start: start as u32,
            end: end as u32,
        }
    }
    pub fn len(self) -> usize {
        (self.end - self.start) as usize
    }
    pub fn is_empty(self) -> bool {
        self.end == self.start
    }
    pub fn range(self) -> std::ops::Range<usize> {
        self.start as usize..self.end as usize
    }
}

impl From<Span> for SourceSpan {
    fn from(s: Span) -> SourceSpan {
        SourceSpan::new((s.start as usize).into(), s.len())
    }
}

/// One input file: its display name, its text and the index of its line starts.
#[derive(Debug, Clone)]
pub struct SourceFile {
    name: Arc<str>,
    /// Kept as the `String` it was read into, or as the mapped file (a large one), so
    /// loading a file copies nothing.
    text: Arc<Held>,
    /// `Arc<str>` handed out by [`SourceFile::shared_text`], made on first call.
    shared: Arc<OnceLock<Arc<str>>>,
    /// Built on first use.
    line_starts: Arc<OnceLock<LineIndex>>,
    /// For a source made of several files (a schematic's sheets, see
    /// [`SourceFile::from_files`]): where each file starts in the text, in order. Empty for
    /// a single file.
    files: Arc<[FilePart]>,
}

/// A source's text: a `String` it was read into or made as, or a large file mapped into
/// memory ([`SourceFile::from_mapped`]), whose pages are the system's cache of the file: not
/// copied, and not memory the process takes afresh. Read as a `str` either way.
#[derive(Debug)]
enum Held {
    Owned(String),
    /// Checked to be UTF-8 when it was made.
    Mapped(memmap2::Mmap),
}

impl std::ops::Deref for Held {
    type Target = str;
    fn deref(&self) -> &str {
        match self {
            Held::Owned(s) => s,
            // SAFETY: `from_mapped` takes only a map whose bytes are UTF-8, and the map is
            // read only
            Held::Mapped(m) => unsafe { std::str::from_utf8_unchecked(m) },
        }
    }
}

/// One file of a source made of several: its name, and where its text starts.
#[derive(Debug, Clone)]
pub struct FilePart {
    pub name: Arc<str>,
    /// Byte offset of the file's first byte in the joined text.
    pub start: u32,
    /// Byte length of the file's own text (without the line break added after it).
    pub len: u32,
}

/// A 1-based line and 1-based column (counted in characters, as editors count them).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub struct LineCol {
    pub line: usize,
    pub column: usize,
}

impl SourceFile {
    pub fn new(name: impl Into<Arc<str>>, text: impl Into<Arc<str>>) -> SourceFile {
        let shared: Arc<str> = text.into();
        SourceFile {
            name: name.into(),
            text: Arc::new(Held::Owned(shared.to_string())),
            shared: Arc::new(OnceLock::from(shared)),
            line_starts: Arc::default(),
            files: Arc::from([]),
        }
    }

    /// A source that takes over `text` without copying it.
    pub fn from_string(name: impl Into<Arc<str>>, text: String) -> SourceFile {
        SourceFile {
            name: name.into(),
            text: Arc::new(Held::Owned(text)),
            shared: Arc::default(),
            line_starts: Arc::default(),
            files: Arc::from([]),
        }
    }

    /// A source whose text is a file mapped into memory, without a copy: `Err` gives the map
    /// back with where it stops being UTF-8.
    pub fn from_mapped(
        name: impl Into<Arc<str>>,
        map: memmap2::Mmap,
    ) -> Result<SourceFile, (memmap2::Mmap, std::str::Utf8Error)> {
        if let Err(e) = std::str::from_utf8(&map) {
            return Err((map, e));
        }
        Ok(SourceFile {
            name: name.into(),
            text: Arc::new(Held::Mapped(map)),
            shared: Arc::default(),
            line_starts: Arc::default(),
            files: Arc::from([]),
        })
    }

    /// One source for several files (the sheets of a schematic project): the texts are
    /// joined, each ending in a line break (one is added where a file lacks it), so spans
    /// stay plain byte offsets into one text while lines, columns and names are given per
    /// file ([`SourceFile::file_at`], [`SourceFile::line_col`]). `name` names the whole
    /// (the root sheet's path).
    pub fn from_files(name: impl Into<Arc<str>>, files: Vec<(String, String)>) -> SourceFile {
        let total: usize = files.iter().map(|(_, t)| t.len() + 1).sum();
        let mut text = String::new();
        let mut parts = Vec::with_capacity(files.len());
        for (fname, t) in files {
            let start = text.len() as u32;
            let len = t.len() as u32;
            let ends = t.ends_with('\n') || t.ends_with('\r');
            if parts.is_empty() {
                // the first file's text is taken over, not copied; each later one is freed
                // once copied, so the files are not held twice
                text = t;
                text.reserve(total - text.len());
            } else {
                text.push_str(&t);
            }
            parts.push(FilePart {
                name: fname.into(),
                start,
                len,
            });
            if !ends {
                text.push('\n');
            }
        }
        SourceFile {
            name: name.into(),
            text: Arc::new(Held::Owned(text)),
            shared: Arc::default(),
            line_starts: Arc::default(),
            files: parts.into(),
        }
    }

    /// The text, taken out of the source without a copy when it was read into a `String`
    /// and no other handle shares it.
    pub fn into_text(self) -> String {
        match Arc::try_unwrap(self.text) {
            Ok(Held::Owned(s)) => s,
            Ok(held) => held.to_string(),
            Err(shared) => shared.to_string(),
        }
    }

    /// The files of a source made of several (empty for a single file).
    pub fn files(&self) -> &[FilePart] {
        &self.files
    }

    /// The file holding byte `offset`, for a source made of several files.
    pub fn part_at(&self, offset: usize) -> Option<&FilePart> {
        if self.files.is_empty() {
            return None;
        }
        let i = match self
            .files
            .binary_search_by(|p| (p.start as usize).cmp(&offset))
        {
            Ok(i) => i,
            Err(0) => 0,
            Err(i) => i - 1,
        };
        self.files.get(i)
    }

    /// The name of the file holding byte `offset`: the source's own name for a single file,
    /// the sheet's path for a schematic project.
    pub fn file_at(&self, offset: usize) -> &str {
        self.part_at(offset).map_or(&self.name, |p| &p.name)
    }

    /// 0-based index of the first line of the file holding `offset` (0 for a single file).
    fn first_line_of(&self, offset: usize) -> usize {
        match self.part_at(offset) {
            Some(p) => self.line_index(p.start as usize),
            None => 0,
        }
    }

    fn starts(&self) -> &LineIndex {
        self.line_starts
            .get_or_init(|| LineIndex::new(self.text.as_bytes()))
    }

    pub fn name(&self) -> &str {
        &self.name
    }

    pub fn text(&self) -> &str {
        &self.text
    }

    /// The text as a shared `Arc<str>` (copied from the loaded text once, on first call).
    pub fn shared_text(&self) -> Arc<str> {
        self.shared.get_or_init(|| Arc::from(&**self.text)).clone()
    }

    /// The 0-based line holding byte `offset`.
    pub fn line_index(&self, offset: usize) -> usize {
        self.starts().line_of(offset as u32).0
    }

    /// 1-based line and character column of byte `offset` (clamped to the text), within
    /// the file that holds it ([`SourceFile::file_at`]).
    pub fn line_col(&self, offset: usize) -> LineCol {
        let bytes = self.text.as_bytes();
        let offset = offset.min(bytes.len());
        let (i, line_start, _) = self.starts().line_of(offset as u32);
        LineCol {
            line: i + 1 - self.first_line_of(offset),
            column: count_columns(&bytes[line_start..offset]) + 1,
        }
    }

    /// The text of the line holding byte `offset`, without its line ending.
    pub fn line_text_at(&self, offset: usize) -> &str {
        self.line_text(self.line_index(offset.min(self.text.len())) + 1)
    }

    /// The text of 1-based line `line` of the whole text (for a source made of several
    /// files, lines count across them: use [`SourceFile::line_text_at`]), without its line
    /// ending.
    pub fn line_text(&self, line: usize) -> &str {
        let starts = self.starts();
        let i = line.saturating_sub(1).min(starts.len() - 1);
        let start = starts.start(i);
        let end = if i + 1 < starts.len() {
            starts.start(i + 1)
        } else {
            self.text.len()
        };
        self.text[start..end].trim_end_matches(['\n', '\r'])
    }

    pub fn line_count(&self) -> usize {
        self.starts().len()
    }

    /// A cursor for many [`SourceFile::line_col`] lookups in a row (a report's places).
    pub fn cursor(&self) -> LineCursor<'_> {
        let starts = self.starts();
        let next = if starts.len() > 1 {
            starts.start(1)
        } else {
            usize::MAX
        };
        LineCursor {
            source: self,
            starts,
            line: 0,
            line_start: 0,
            next,
        }
    }

    /// The index in [`SourceFile::files`] of the file holding byte `offset` (`None` for a
    /// single file).
    pub fn part_index_at(&self, offset: usize) -> Option<usize> {
        let p = self.part_at(offset)?;
        Some((p as *const FilePart as usize - self.files.as_ptr() as usize) / size_of::<FilePart>())
    }
}

/// [`SourceFile::line_col`] for offsets that come near each other: a finding's start and end,
/// findings of one part. The line of the last lookup is tried before a binary search.
pub struct LineCursor<'a> {
    source: &'a SourceFile,
    starts: &'a LineIndex,
    /// 0-based index of the line of the last lookup, where it starts and where the next
    /// starts (`usize::MAX` after the last line).
    line: usize,
    line_start: usize,
    next: usize,
}

impl<'a> LineCursor<'a> {
    /// The source looked up in.
    pub fn source(&self) -> &'a SourceFile {
        self.source
    }

    /// The same as [`SourceFile::line_col`].
    pub fn line_col(&mut self, offset: usize) -> LineCol {
        let bytes = self.source.text.as_bytes();
        let offset = offset.min(bytes.len());
        let here = self.line_start <= offset && offset < self.next;
        if !here {
            (self.line, self.line_start, self.next) = self.starts.line_of(offset as u32);
        }
        let line_start = self.line_start;
        let column = count_columns(&bytes[line_start..offset]) + 1;
        let first = if self.source.files.is_empty() {
            0
        } else {
            self.source.first_line_of(offset)
        };
        LineCol {
            line: self.line + 1 - first,
            column,
        }
    }

    /// The same as [`LineCursor::line_col`] of `offset`, given that the last lookup was of
    /// `from` (at most `offset`) and gave `at`: on the same line, only the characters between
    /// the two are counted (the end of a place is mostly on its start's line).
    pub fn line_col_after(&mut self, from: usize, at: LineCol, offset: usize) -> LineCol {
        let bytes = self.source.text.as_bytes();
        let offset = offset.min(bytes.len());
        let same_line = from <= offset && offset < self.next;
        if !same_line {
            return self.line_col(offset);
        }
        LineCol {
            line: at.line,
            column: at.column + count_columns(&bytes[from..offset]),
        }
    }
}

/// Characters in UTF-8 `bytes` (lead bytes; an invalid byte counts as one).
fn count_columns(bytes: &[u8]) -> usize {
    bytes.iter().filter(|&&b| (b & 0xC0) != 0x80).count()
}

/// Byte offsets where each line starts. A line ends at `\n`, at `\r\n`, or at a lone `\r`
/// (as miette counts them).
pub fn line_starts(bytes: &[u8]) -> Vec<u32> {
    let mut v = Vec::with_capacity(bytes.len() / 64 + 1);
    for_each_line_start(bytes, |at| v.push(at));
    v
}

/// Calls `f` with the offset where each line starts ([`line_starts`]), in order.
fn for_each_line_start(bytes: &[u8], mut f: impl FnMut(u32)) {
    f(0);
    // the `\n` of a `\r\n`, already counted with its `\r`
    let mut skip = usize::MAX;
    for_each_break(bytes, |at| {
        if at == skip {
            return;
        }
        let next = if bytes[at] == b'\r' && bytes.get(at + 1) == Some(&b'\n') {
            skip = at + 1;
            at + 2
        } else {
            at + 1
        };
        f(next as u32);
    });
}

/// Lines a group of the [`LineIndex`] holds.
const GROUP: usize = 32;

/// Where each line of a text starts ([`line_starts`]), held in about a byte and a quarter a
/// line where the offsets take four: the lines in groups of [`GROUP`], each group's first
/// line's start in full, and each other line's start as the length of the line before it
/// (one byte: a line of a netlist or schematic is some fifty bytes). A group with a line of
/// 256 bytes or more keeps its starts in full instead.
#[derive(Debug, Default)]
pub(crate) struct LineIndex {
    /// The start of each group's first line.
    bases: Box<[u32]>,
    /// For each group, where its starts are in `wide` (`u32::MAX`: it has none there, its
    /// lines are in `steps`).
    wide_at: Box<[u32]>,
    /// For each line, its start less the start of the line before it (0 for a group's first
    /// line, and for every line of a group kept in `wide`).
    steps: Box<[u8]>,
    /// The starts of the groups with a long line, [`GROUP`] to a group (the last group's
    /// lines only, for the last).
    wide: Box<[u32]>,
}

/// A [`LineIndex`] being built.
#[derive(Default)]
struct Builder {
    bases: Vec<u32>,
    wide_at: Vec<u32>,
    steps: Vec<u8>,
    wide: Vec<u32>,
}

impl Builder {
    /// Adds the lines starting at `starts`, in groups (only the last may be short).
    fn add(&mut self, starts: &[u32]) {
        for group in starts.chunks(GROUP) {
            self.bases.push(group[0]);
            // the steps written at once, taken back if one does not fit in a byte
            let from = self.steps.len();
            let mut long = 0;
            self.steps.push(0);
            self.steps.extend(group.windows(2).map(|w| {
                let step = w[1] - w[0];
                long |= step >> 8;
                step as u8
            }));
            if long != 0 {
                self.steps[from..].fill(0);
                self.wide_at.push(self.wide.len() as u32);
                self.wide.extend_from_slice(group);
            } else {
                self.wide_at.push(u32::MAX);
            }
        }
    }
}

impl LineIndex {
    /// The index of the lines of `bytes`, built as they are found: the offsets are never all
    /// held at once.
    pub(crate) fn new(bytes: &[u8]) -> LineIndex {
        let mut index = Builder {
            steps: Vec::with_capacity(bytes.len() / 32 + 1),
            ..Builder::default()
        };
        // the starts gathered a block at a time (whole groups), then put in groups
        const BLOCK: usize = 64 * GROUP;
        let mut block: Vec<u32> = Vec::with_capacity(BLOCK);
        for_each_line_start(bytes, |at| {
            block.push(at);
            if block.len() == BLOCK {
                index.add(&block);
                block.clear();
            }
        });
        index.add(&block);
        LineIndex {
            bases: index.bases.into(),
            wide_at: index.wide_at.into(),
            steps: index.steps.into(),
            wide: index.wide.into(),
        }
    }

    /// How many lines (at least one).
    pub(crate) fn len(&self) -> usize {
        self.steps.len()
    }

    /// Where line `i` (0-based, below [`LineIndex::len`]) starts.
    pub(crate) fn start(&self, i: usize) -> usize {
        let (g, k) = (i / GROUP, i % GROUP);
        let w = self.wide_at[g];
        if w != u32::MAX {
            return self.wide[w as usize + k] as usize;
        }
        let from = g * GROUP;
        self.bases[g] as usize
            + self.steps[from + 1..=from + k]
                .iter()
                .map(|&s| usize::from(s))
                .sum::<usize>()
    }

    /// The line holding byte `offset` (the last line starting at or before it), where it
    /// starts, and where the next line starts (`usize::MAX` for the last line).
    pub(crate) fn line_of(&self, offset: u32) -> (usize, usize, usize) {
        // the first group starts at 0, so one starts at or before any offset
        let g = self.bases.partition_point(|&b| b <= offset) - 1;
        let from = g * GROUP;
        let lines = (self.len() - from).min(GROUP);
        let after = match self.bases.get(g + 1) {
            Some(&b) => b as usize,
            None => usize::MAX,
        };
        let w = self.wide_at[g];
        if w != u32::MAX {
            let starts = &self.wide[w as usize..w as usize + lines];
            let k = starts.partition_point(|&s| s <= offset) - 1;
            let next = starts.get(k + 1).map_or(after, |&s| s as usize);
            return (from + k, starts[k] as usize, next);
        }
        let offset = offset as usize;
        let mut start = self.bases[g] as usize;
        for k in 1..lines {
            let next = start + usize::from(self.steps[from + k]);
            if next > offset {
                return (from + k - 1, start, next);
            }
            start = next;
        }
        (from + lines - 1, start, after)
    }

    /// The bytes the index holds, for measuring.
    #[cfg(test)]
    pub(crate) fn heap_bytes(&self) -> usize {
        self.bases.len() * 4 + self.wide_at.len() * 4 + self.steps.len() + self.wide.len() * 4
    }
}

/// Calls `f` with the offset of every `\n` and `\r` in `bytes`, in order. Lines are short
/// (a netlist's are about 50 bytes): 16 bytes are looked at in one go and each break found
/// from a bit mask, where a search started again after every break costs more per line.
fn for_each_break(bytes: &[u8], mut f: impl FnMut(usize)) {
    let mut done = 0;
    #[cfg(target_arch = "x86_64")]
    {
        use std::arch::x86_64::*;
        for block in bytes.chunks_exact(16) {
            // SAFETY: SSE2 is part of the x86-64 baseline; the load reads the block's 16
            // bytes (unaligned load)
            let mut mask = unsafe {
                let b = _mm_loadu_si128(block.as_ptr().cast());
                let lf = _mm_cmpeq_epi8(b, _mm_set1_epi8(b'\n' as i8));
                let cr = _mm_cmpeq_epi8(b, _mm_set1_epi8(b'\r' as i8));
                _mm_movemask_epi8(_mm_or_si128(lf, cr)) as u32
            };
            while mask != 0 {
                f(done + mask.trailing_zeros() as usize);
                mask &= mask - 1;
            }
            done += 16;
        }
    }
    for (i, &b) in bytes[done..].iter().enumerate() {
        if b == b'\n' || b == b'\r' {
            f(done + i);
        }
    }
}

/// Line and column of `offset` in `bytes`, which need not be valid UTF-8 (columns count
/// UTF-8 lead bytes; an invalid byte counts as one column).
pub fn line_col_in(bytes: &[u8], starts: &[u32], offset: usize) -> LineCol {
    let offset = offset.min(bytes.len());
    let i = match starts.binary_search(&(offset as u32)) {
        Ok(i) => i,
        Err(i) => i - 1,
    };
    let line_start = starts[i] as usize;
    let column = count_columns(&bytes[line_start..offset]) + 1;
    LineCol {
        line: i + 1,
        column,
    }
}

impl SourceCode for SourceFile {
    fn read_span<'a>(
        &'a self,
        span: &SourceSpan,
        context_lines_before: usize,
        context_lines_after: usize,
    ) -> Result<Box<dyn SpanContents<'a> + 'a>, MietteError> {
        let bytes = self.text.as_bytes();
        let start = span.offset();
        let end = start + span.len();
        if end > bytes.len() {
            return Err(MietteError::OutOfBounds);
        }
        // Cut a window of whole lines around the span from the index, let miette's own
        // logic work on the window, then put the window's offsets back.
        let first_line = self.line_index(start).saturating_sub(context_lines_before);
        let last_line = self.line_index(end.saturating_sub(1).max(start)) + context_lines_after + 1;
        let starts = self.starts();
        let win_start = starts.start(first_line);
        let win_end = if last_line + 1 < starts.len() {
            starts.start(last_line + 1)
        } else {
            bytes.len()
        };
        let window = &bytes[win_start..win_end];
        let local = SourceSpan::new((start - win_start).into(), span.len());
        let inner = window.read_span(&local, context_lines_before, context_lines_after)?;
        let data = inner.data();
        let data_off = data.as_ptr() as usize - bytes.as_ptr() as usize;
        // lines are counted within the file that holds the span
        let file_line = self.first_line_of(start);
        Ok(Box::new(MietteSpanContents::new_named(
            self.file_at(start).to_string(),
            data,
            SourceSpan::new(data_off.into(), data.len()),
            inner.line() + first_line - file_line,
            inner.column(),
            inner.line_count() + first_line - file_line,
        )))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::Strategy;

    /// Line starts found by the scan equal those of a byte-by-byte reading: `\n`, `\r\n` and a
    /// lone `\r` end a line, at the start, the end and side by side.
    #[test]
    fn line_starts_equal_a_byte_by_byte_reading() {
        fn by_bytes(b: &[u8]) -> Vec<u32> {
            let mut v = vec![0];
            let mut i = 0;
            while i < b.len() {
                match b[i] {
                    b'\r' if b.get(i + 1) == Some(&b'\n') => i += 2,
                    b'\r' | b'\n' => i += 1,
                    _ => {
                        i += 1;
                        continue;
                    }
                }
                v.push(i as u32);
            }
            v
        }
        proptest::proptest!(|(s in "[ab\r\n]{0,80}")| {
            proptest::prop_assert_eq!(line_starts(s.as_bytes()), by_bytes(s.as_bytes()));
        });
        assert_eq!(line_starts(b"\r\n\r\r\n\n"), [0, 2, 3, 5, 6]);
    }

    /// The compact line index gives every line's start, and the line of every offset with
    /// its start and the next line's, as the plain list of line starts does: texts of many
    /// groups of lines, short lines and lines of 256 bytes and more mixed, every line ending.
    #[test]
    fn the_line_index_equals_the_line_starts() {
        fn check(text: &[u8]) -> Result<(), proptest::test_runner::TestCaseError> {
            let starts = line_starts(text);
            let index = LineIndex::new(text);
            proptest::prop_assert_eq!(index.len(), starts.len());
            for (i, &s) in starts.iter().enumerate() {
                proptest::prop_assert_eq!(index.start(i), s as usize);
            }
            for o in 0..=text.len() {
                let i = match starts.binary_search(&(o as u32)) {
                    Ok(i) => i,
                    Err(i) => i - 1,
                };
                let next = starts.get(i + 1).map_or(usize::MAX, |&n| n as usize);
                proptest::prop_assert_eq!(index.line_of(o as u32), (i, starts[i] as usize, next));
            }
            // at worst (every group with a long line) five bytes a line and eight a group
            let most = 5 * starts.len() + 8 * starts.len().div_ceil(GROUP);
            proptest::prop_assert!(index.heap_bytes() <= most);
            Ok(())
        }
        let line = (0usize..300, 0usize..3).prop_map(|(len, end)| {
            let mut l = "x".repeat(len);
            l.push_str(["\n", "\r\n", "\r"][end]);
            l
        });
        proptest::proptest!(|(lines in proptest::collection::vec(line, 0..120), last in "[ab]{0,3}")| {
            let text = lines.concat() + &last;
            check(text.as_bytes())?;
        });
        // short lines only: about a byte and a quarter a line
        let text = "ab\n".repeat(10 * GROUP);
        check(text.as_bytes()).unwrap();
        let index = LineIndex::new(text.as_bytes());
        let groups = index.len().div_ceil(GROUP);
        assert_eq!(index.heap_bytes(), index.len() + 8 * groups);
        check(b"").unwrap();
    }

    /// Line and column from a source (one lookup at a time, and by a cursor going forward,
    /// back and within a line) equal those read from the plain list of line starts.
    #[test]
    fn line_columns_from_the_index_equal_those_from_the_line_starts() {
        let line = (0usize..300, 0usize..3, proptest::bool::ANY).prop_map(|(len, end, wide)| {
            let mut l = if wide {
                "\u{e7}".repeat(len / 2)
            } else {
                "y".repeat(len)
            };
            l.push_str(["\n", "\r\n", "\r"][end]);
            l
        });
        proptest::proptest!(|(lines in proptest::collection::vec(line, 1..80), jumps in proptest::collection::vec(0usize..100_000, 1..40))| {
            let text = lines.concat();
            let starts = line_starts(text.as_bytes());
            let f = SourceFile::new("t", text.as_str());
            let mut cursor = f.cursor();
            let mut last = None;
            for j in jumps {
                let o = j % (text.len() + 1);
                let want = line_col_in(text.as_bytes(), &starts, o);
                proptest::prop_assert_eq!(f.line_col(o), want);
                proptest::prop_assert_eq!(f.line_index(o), want.line - 1);
                // the end of a place after its start, then the next place
                if let Some((from, at)) = last {
                    if from <= o {
                        proptest::prop_assert_eq!(cursor.line_col(from), at);
                        proptest::prop_assert_eq!(cursor.line_col_after(from, at, o), want);
                    }
                }
                proptest::prop_assert_eq!(cursor.line_col(o), want);
                last = Some((o, want));
            }
        });
    }

    #[test]
    fn line_col_counts_characters_and_crlf() {
        let f = SourceFile::new("t", "ab\r\nçd\ne\rf");
        assert_eq!(f.line_col(0), LineCol { line: 1, column: 1 });
        assert_eq!(f.line_col(4), LineCol { line: 2, column: 1 });
        // 'd' is after the two-byte 'ç': column 2
        assert_eq!(f.line_col(6), LineCol { line: 2, column: 2 });
        assert_eq!(f.line_col(8), LineCol { line: 3, column: 1 });
        assert_eq!(f.line_col(10), LineCol { line: 4, column: 1 });
        assert_eq!(f.line_text(2), "çd");
    }

    #[test]
    fn a_taken_over_string_reads_like_a_copied_one() {
        let text = "(a\r\n (b \"ç\")\n\r(c))";
        let copied = SourceFile::new("t", text);
        let taken = SourceFile::from_string("t", text.to_string());
        assert_eq!(taken.text(), text);
        assert_eq!(&*taken.shared_text(), text);
        assert_eq!(taken.line_count(), 4);
        for off in 0..=text.len() {
            assert_eq!(taken.line_col(off), copied.line_col(off), "offset {off}");
        }
        for line in 1..=4 {
            assert_eq!(taken.line_text(line), copied.line_text(line));
        }
        // a clone shares the index built through the original
        let twin = taken.clone();
        assert_eq!(twin.line_col(9), LineCol { line: 2, column: 6 });
    }

    #[test]
    fn a_cursor_gives_what_a_lookup_gives_in_any_order() {
        let one = SourceFile::new("t", "ab\r\nçd\ne\rf\n\n(g \"Ω\")");
        let several = SourceFile::from_files(
            "root",
            vec![
                ("root".into(), "(a\n (b))".into()),
                ("sub".into(), "(c\r\n  (dΩ))\n".into()),
            ],
        );
        for f in [&one, &several] {
            let n = f.text().len();
            // forwards, backwards, jumping about and past the end
            let order: Vec<usize> = (0..=n + 2)
                .chain((0..=n).rev())
                .chain((0..=n).map(|i| (i * 7) % (n + 1)))
                .collect();
            let mut c = f.cursor();
            for off in order {
                assert_eq!(c.line_col(off), f.line_col(off), "offset {off}");
            }
            // an end looked up after its start
            for start in 0..=n {
                for end in start..=n + 1 {
                    let at = c.line_col(start);
                    assert_eq!(
                        c.line_col_after(start, at, end),
                        f.line_col(end),
                        "{start}..{end}"
                    );
                }
            }
        }
        assert_eq!(several.part_index_at(0), Some(0));
        assert_eq!(several.part_index_at(several.text().len() - 1), Some(1));
        assert_eq!(one.part_index_at(3), None);
    }

    #[test]
    fn a_source_of_several_files_places_offsets_in_each_file() {
        let f = SourceFile::from_files(
            "root.kicad_sch",
            vec![
                ("root.kicad_sch".into(), "(a\n (b))".into()),
                ("sub/child.kicad_sch".into(), "(c\r\n  (d))\n".into()),
            ],
        );
        // the first file lacked a final line break: one was added
        assert_eq!(f.text(), "(a\n (b))\n(c\r\n  (d))\n");
        assert_eq!(f.files().len(), 2);
        assert_eq!(f.files()[1].start, 9);
        assert_eq!(f.file_at(0), "root.kicad_sch");
        assert_eq!(f.file_at(8), "root.kicad_sch");
        assert_eq!(f.file_at(9), "sub/child.kicad_sch");
        assert_eq!(f.line_col(5), LineCol { line: 2, column: 3 });
        // `(d)` is on line 2, column 3 of the second file
        let d = f.text().find("(d)").unwrap();
        assert_eq!(f.line_col(d), LineCol { line: 2, column: 3 });
        assert_eq!(f.line_col(9), LineCol { line: 1, column: 1 });
        assert_eq!(f.line_text_at(d), "  (d))");
        let shown = f.read_span(&SourceSpan::new(d.into(), 3), 0, 0).unwrap();
        assert_eq!(shown.name(), Some("sub/child.kicad_sch"));
        assert_eq!(shown.line(), 1);
        // a single file is its own only part
        let one = SourceFile::new("x.net", "(a)");
        assert_eq!(one.file_at(1), "x.net");
        assert!(one.files().is_empty());
    }

    #[test]
    fn windowed_read_span_matches_miettes_scan() {
        let text: String = (0..200).map(|i| format!("(line {i} \"x\")\r\n")).collect();
        let f = SourceFile::new("t.net", text.clone());
        for &(off, len) in &[
            (0usize, 1usize),
            (17, 5),
            (900, 12),
            (text.len() - 3, 2),
            (50, 0),
        ] {
            for ctx in 0..3 {
                let span = SourceSpan::new(off.into(), len);
                let ours = f.read_span(&span, ctx, ctx).unwrap();
                let theirs = text.as_str().read_span(&span, ctx, ctx).unwrap();
                assert_eq!(ours.data(), theirs.data(), "off {off} ctx {ctx}");
                assert_eq!(ours.line(), theirs.line());
                assert_eq!(ours.column(), theirs.column());
                assert_eq!(ours.span(), theirs.span());
                assert_eq!(ours.line_count(), theirs.line_count());
            }
        }
    }
}
