//! Reporters: each turns the same outcomes into one output format, writing to `dyn Write`.
//!
//! - [`human`]: miette's graphical rendering, per-file lines and a summary line for the run;
//! - [`short`]: one `path:line:column: severity: message [check]` line per finding;
//! - [`json`]: one documented JSON document (`docs/json-format.md`);
//! - [`sarif`]: SARIF 2.1.0, one run;
//! - [`github`]: workflow-command annotation lines for the CI platform.
//!
//! Everything the formats share lives here: the options, the places of a diagnostic in
//! line/column and byte terms, the fingerprints, paths relative to a root and the totals.
//! Text from a netlist is untrusted: every reporter escapes it for its own medium.

pub mod docs;
pub mod explain;
pub mod github;
pub mod human;
pub mod json;
pub mod net;
pub mod parts;
pub(crate) mod pretty;
pub mod sarif;
pub mod settings;
pub mod short;
pub mod starter;

use std::io::{self, Write};
use std::path::{Component, Path, PathBuf};

use clap::ValueEnum;

use crate::diag::{Diag, DiagRef, LabelRef, Severity};
use crate::pipeline::FileOutcome;
use crate::source::{LineCursor, SourceFile, Span};

/// The program's name and version, as the machine formats report them.
pub const TOOL_NAME: &str = "netmargin";
pub const TOOL_VERSION: &str = env!("CARGO_PKG_VERSION");

/// An output format.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, ValueEnum)]
pub enum Format {
    /// Diagnostics with the source lines they point at, and summary lines
    #[default]
    Human,
    /// One `path:line:column: severity: message [check]` line per finding; nothing when clean
    Short,
    /// One JSON document (see docs/json-format.md)
    Json,
    /// SARIF 2.1.0, for code-scanning tools
    Sarif,
    /// Annotation lines (`::error file=...::message`) for CI workflow logs
    Github,
}

/// Everything a reporter needs to know besides the outcomes.
#[derive(Debug, Clone)]
pub struct ReportOptions {
    pub format: Format,
    pub quiet: bool,
    /// Colour in the human format.
    pub color: bool,
    /// Line width of the human format.
    pub width: usize,
    /// Absolute directory that SARIF URIs and annotation paths are made relative to.
    pub root: PathBuf,
    /// Absolute directory that relative input paths are relative to (the current directory).
    pub cwd: PathBuf,
    /// How many outcomes, from the start, are netlists (the rest are configuration and
    /// baseline files with something to say, not counted as checked files); `None`: all.
    pub netlists: Option<usize>,
}

impl ReportOptions {
    /// Options for `format` with the root and the working directory both `dir`.
    pub fn new(format: Format, dir: impl Into<PathBuf>) -> ReportOptions {
        let dir = dir.into();
        ReportOptions {
            format,
            quiet: false,
            color: false,
            width: 100,
            root: dir.clone(),
            cwd: dir,
            netlists: None,
        }
    }
}

/// Writes the report of a whole run in the chosen format.
pub fn write_report(
    opts: &ReportOptions,
    files: &[FileOutcome],
    out: &mut dyn Write,
) -> io::Result<()> {
    match opts.format {
        Format::Human => human::write(opts, files, out),
        Format::Short => short::write(files, out),
        Format::Json => json::write(opts, files, out),
        Format::Sarif => sarif::write(opts, files, out),
        Format::Github => github::write(opts, files, out),
    }
}

// ---------------------------------------------------------------------------
// places

/// Where a span is, in every unit a format wants. Lines and columns are 1-based, columns
/// count characters; `end_*` is the position just after the span (exclusive).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Place {
    pub line: usize,
    pub column: usize,
    pub end_line: usize,
    pub end_column: usize,
    pub byte_offset: usize,
    pub byte_length: usize,
}

impl Place {
    /// The place of `span` in `source` (clamped to the text).
    pub fn of(source: &SourceFile, span: Span) -> Place {
        Place::at(&mut source.cursor(), span)
    }

    /// [`Place::of`] through a cursor kept over many places of one source.
    pub fn at(lines: &mut LineCursor<'_>, span: Span) -> Place {
        let source = lines.source();
        let len = source.text().len();
        let start = (span.start as usize).min(len);
        let end = (span.end as usize).clamp(start, len);
        let a = lines.line_col(start);
        let b = lines.line_col_after(start, a, end);
        // in a source made of several files, offsets count from the start of the file
        let base = source.part_at(start).map_or(0, |p| p.start as usize);
        Place {
            line: a.line,
            column: a.column,
            end_line: b.line,
            end_column: b.column,
            byte_offset: start - base,
            byte_length: end - start,
        }
    }
}

/// The places of one file's findings, looked up one after another: a cursor over the line
/// index, and a small table of the spans looked up lately with their places (findings of one
/// kind point at the same pins of a part's description, over and over). A place is worked out
/// the same way whether it comes from the table or not.
pub(crate) struct Places<'a> {
    lines: Option<LineCursor<'a>>,
    recent: Vec<Option<(Span, Place)>>,
}

impl<'a> Places<'a> {
    /// Spans kept (a power of two): a table slot per span, by its offsets.
    pub(crate) const KEPT: usize = 64;

    /// Places in `source` (`None`: the text is not known, so there are none).
    pub(crate) fn new(source: Option<&'a SourceFile>) -> Places<'a> {
        Places {
            lines: source.map(SourceFile::cursor),
            recent: Vec::new(),
        }
    }

    /// The source looked up in.
    pub(crate) fn source(&self) -> Option<&'a SourceFile> {
        self.lines.as_ref().map(LineCursor::source)
    }

    /// The slot of `span` in the table.
    pub(crate) fn slot(span: Span) -> usize {
        let h = (span.start ^ span.end.rotate_left(16)).wrapping_mul(0x9e37_79b1);
        (h >> 26) as usize % Self::KEPT
    }

    /// [`Place::of`] `span`, when the text is known.
    pub(crate) fn of(&mut self, span: Span) -> Option<Place> {
        let lines = self.lines.as_mut()?;
        if self.recent.is_empty() {
            self.recent = vec![None; Self::KEPT];
        }
        let slot = &mut self.recent[Self::slot(span)];
        match slot {
            Some((s, p)) if *s == span => Some(*p),
            _ => {
                let p = Place::at(lines, span);
                *slot = Some((span, p));
                Some(p)
            }
        }
    }
}

/// The primary label of a diagnostic (the first primary one, else the first).
pub fn primary_label(d: DiagRef<'_>) -> Option<LabelRef<'_>> {
    primary_index(d).and_then(|i| d.labels().nth(i))
}

fn primary_index(d: DiagRef<'_>) -> Option<usize> {
    let mut labels = d.labels();
    let any = labels.len() > 0;
    labels.position(|l| l.primary).or(any.then_some(0))
}

/// The labels other than the primary one: the secondary places (driver, resistor, other loads).
pub fn related_labels(d: DiagRef<'_>) -> impl Iterator<Item = LabelRef<'_>> {
    let primary = primary_index(d);
    d.labels()
        .enumerate()
        .filter(move |(i, _)| Some(*i) != primary)
        .map(|(_, l)| l)
}

/// The file a diagnostic points into: for a schematic project (a source made of several
/// sheet files) the sheet where its primary span lies, otherwise the input's own name.
pub fn file_name<'a>(f: &'a crate::pipeline::FileOutcome, d: DiagRef<'_>) -> &'a str {
    match (f.source.as_ref(), primary_label(d)) {
        (Some(src), Some(l)) if !src.files().is_empty() => src.file_at(l.span.start as usize),
        _ => &f.name,
    }
}

/// The place of the diagnostic's primary span, when it has one and the text is known.
pub fn primary_place(d: DiagRef<'_>, source: Option<&SourceFile>) -> Option<Place> {
    Some(Place::of(source?, primary_label(d)?.span))
}

/// The name of a file as the line formats show it ([`file_name`] of each finding), worked
/// out once for each name and kept while the findings name the same file.
pub(crate) struct ShownName<'a> {
    last: Option<(&'a str, String)>,
}

impl<'a> ShownName<'a> {
    pub(crate) fn new() -> ShownName<'a> {
        ShownName { last: None }
    }

    /// `show(name)`, from the last call's result when `name` is the same.
    pub(crate) fn get(&mut self, name: &'a str, show: impl FnOnce(&str) -> String) -> &str {
        match &self.last {
            Some((n, _)) if *n == name => {}
            _ => self.last = Some((name, show(name))),
        }
        &self.last.as_ref().expect("set above").1
    }
}

// ---------------------------------------------------------------------------
// fingerprints

/// FNV-1a, 64 bits.
pub fn fnv1a64(bytes: &[u8]) -> u64 {
    fnv1a64_more(0xcbf2_9ce4_8422_2325, bytes)
}

/// FNV-1a 64 of the bytes hashed into `h` followed by `bytes`.
#[inline]
fn fnv1a64_more(h: u64, bytes: &[u8]) -> u64 {
    fnv1a64_mapped(h, bytes, |b| b)
}

/// FNV-1a 64 of the bytes hashed into `h` followed by `bytes`, each byte taken as `map` gives
/// it. Eight bytes at a time, so the loop's own steps are taken once for eight.
#[inline(always)]
fn fnv1a64_mapped(mut h: u64, bytes: &[u8], map: impl Fn(u8) -> u8) -> u64 {
    const PRIME: u64 = 0x0100_0000_01b3;
    let mut chunks = bytes.chunks_exact(8);
    for c in &mut chunks {
        for &b in c {
            h ^= u64::from(map(b));
            h = h.wrapping_mul(PRIME);
        }
    }
    for &b in chunks.remainder() {
        h ^= u64::from(map(b));
        h = h.wrapping_mul(PRIME);
    }
    h
}

/// What identifies a finding regardless of where it sits in the file: the check, the net and
/// the pins (which name the parts); when it names neither a net nor a pin, the text of its
/// primary element with white space collapsed. Never a line number or an offset.
pub fn fingerprint_key(d: DiagRef<'_>, source: Option<&SourceFile>) -> String {
    let mut key = String::new();
    write_fingerprint_key(d, source, &mut key);
    key
}

/// [`fingerprint_key`] written into `key` (cleared first), so one buffer serves every finding.
fn write_fingerprint_key(d: DiagRef<'_>, source: Option<&SourceFile>, key: &mut String) {
    key.clear();
    key.push_str(d.code());
    key.push('\u{1f}');
    key.push_str(d.net().unwrap_or(""));
    for p in d.pins() {
        key.push('\u{1f}');
        key.push_str(p);
    }
    if d.net().is_none() && !d.has_pins() {
        key.push('\u{1e}');
        if let (Some(src), Some(l)) = (source, primary_label(d)) {
            let text = src.text().get(l.span.range()).unwrap_or("");
            let mut first = true;
            for word in text.split_whitespace() {
                if !first {
                    key.push(' ');
                }
                key.push_str(word);
                first = false;
            }
        }
    }
}

/// The fingerprints of a file's findings, in order: 16 hex digits of FNV-1a 64 of the key.
/// Findings with the same key in one file are told apart by their rank among them (the
/// findings come in a stable order), so each fingerprint is unique within its file.
pub fn fingerprints(f: &FileOutcome) -> Vec<String> {
    fingerprint_hashes(f)
        .into_iter()
        .map(|h| format!("{h:016x}"))
        .collect()
}

/// [`fingerprints`] as numbers.
pub fn fingerprint_hashes(f: &FileOutcome) -> Vec<u64> {
    fingerprint_hash_iter(f).collect()
}

/// [`fingerprint_hashes`] one at a time, in order, for a reporter that writes each as it
/// goes: the hashes are worked out once, and only keys that may be met more than once are
/// looked up ([`key_ranks`]).
pub fn fingerprint_hash_iter(f: &FileOutcome) -> impl Iterator<Item = u64> + '_ {
    key_ranks(f, fingerprint_hash).map(|(h, n)| {
        // the hash of the key, carried on over `\u{1d}<rank>` for a repeated key
        if n > 0 {
            fnv1a64_more(h, format!("\u{1d}{n}").as_bytes())
        } else {
            h
        }
    })
}

/// What [`fingerprint_hash`] keeps from one finding to the next: a buffer for a key that is
/// written out, and the hash of the last code met with the separator after it, by the code's
/// address and length (the findings of one check come in a row, and say their code with one
/// text). Used for the findings of one file, which are not changed while it lives.
#[derive(Default)]
struct KeyHasher {
    key: String,
    code: Option<(usize, usize, u64)>,
}

/// FNV-1a 64 of [`fingerprint_key`]: of its pieces one after another, with no key written,
/// when the finding names a net or a pin (the code's part taken from `st` when the last code
/// was this one); otherwise of the key written into `st`.
fn fingerprint_hash(d: DiagRef<'_>, source: Option<&SourceFile>, st: &mut KeyHasher) -> u64 {
    let (net, pins) = d.net_and_pins_joined();
    if net.is_none() && pins.is_none() {
        write_fingerprint_key(d, source, &mut st.key);
        return fnv1a64(st.key.as_bytes());
    }
    let code = d.code();
    let at = (code.as_ptr() as usize, code.len());
    let mut h = match st.code {
        Some((p, n, h)) if (p, n) == at => h,
        _ => {
            let h = fnv1a64_more(fnv1a64(code.as_bytes()), b"\x1f");
            st.code = Some((at.0, at.1, h));
            h
        }
    };
    h = fnv1a64_more(h, net.unwrap_or("").as_bytes());
    // the key's pins are each after a separator; the list holds them joined by NUL bytes, so
    // the separator before the first and the joined names with each NUL taken as one are
    // the same bytes, hashed in one pass
    if let Some(pins) = pins {
        h = fnv1a64_more(h, b"\x1f");
        h = fnv1a64_mapped(h, pins.as_bytes(), |b| if b == 0 { 0x1f } else { b });
    }
    h
}

/// Each finding's `hash` of its key, and its rank among the file's findings with that key,
/// in order.
///
/// Most keys are met once. The hashes are worked out first, in order, and each marks a slot
/// of a table of two bits a slot (eight slots a finding), by its hash: met, and met again. A
/// finding whose slot was met once has a key no other finding has: rank 0, with nothing
/// looked up. Only the others are counted, by hash, each hash with the first finding that had
/// it; a hash met again is checked against that finding's key, and a different key with the
/// same hash is counted apart by its text. Findings with one key have one hash and one slot,
/// so all of them are counted. What is held is a quarter of a word a finding for the slots
/// while the hashes are first worked out, then half that (only "met again" is read after),
/// and the table of the findings counted: each hash is worked out again as its finding is
/// given (the code's part of it once for a run of findings of one check), not kept, and no
/// key is kept as text unless two differ with one hash.
fn key_ranks(
    f: &FileOutcome,
    hash: fn(DiagRef<'_>, Option<&SourceFile>, &mut KeyHasher) -> u64,
) -> impl Iterator<Item = (u64, usize)> + '_ {
    key_ranks_in(f, hash, SLOT_BATCH, SLOTS_IN_CACHE)
}

/// Findings whose slots are looked up together when the table is grouped.
const SLOT_BATCH: usize = 1 << 14;
/// The largest table of slots (in bytes, at two bits a slot) marked and read in the
/// findings' order; a larger one, which outgrows a core's own cache, is marked and read a
/// batch of findings at a time, grouped by where their slots lie.
const SLOTS_IN_CACHE: usize = 1 << 20;

/// [`key_ranks`] with the batch and the size of table above which slots are grouped given
/// (the tests try small batches and both ways).
///
/// A table larger than a core's cache is probed at random once per finding in each pass, and
/// each probe waits on memory. Grouped, a batch of findings' slots are put in order of their
/// top eight bits (a counting sort into a second buffer) and marked or read in that order, so
/// the table is swept from its start to its end once a batch, in steps the processor sees
/// coming. Marks do not depend on their order; a batch's "met again" bits are read so into a
/// bit per finding and handed out in the findings' order with the hashes kept for the batch.
fn key_ranks_in(
    f: &FileOutcome,
    hash: fn(DiagRef<'_>, Option<&SourceFile>, &mut KeyHasher) -> u64,
    batch: usize,
    grouped_above: usize,
) -> impl Iterator<Item = (u64, usize)> + '_ {
    use std::collections::hash_map::Entry;
    let source = f.source.as_ref();
    let n = f.diags.len();
    let (mut key, mut first_key) = (String::new(), String::new());
    let mut st = KeyHasher::default();
    // a power of two, at least eight slots a finding
    let bits = (n * 8).next_power_of_two().max(64).trailing_zeros();
    let slot = move |h: u64| (h.wrapping_mul(0x9e37_79b9_7f4a_7c15) >> (64 - bits)) as usize;
    let mut slots = vec![0u64; (1usize << bits) / 32];
    let grouped = slots.len() * 8 > grouped_above;
    let batch = batch.clamp(1, 1 << 16).min(n.max(1));
    // a batch's slots (or hashes), and the same grouped by place: reused
    let (mut at, mut by_place) = if grouped {
        (Vec::with_capacity(batch), Vec::with_capacity(batch))
    } else {
        (Vec::new(), Vec::new())
    };
    // met (01), then met again (11)
    let mark = |slots: &mut [u64], s: usize| {
        let (word, at) = (s / 32, 2 * (s % 32));
        let met = (slots[word] >> at) & 1;
        slots[word] |= (1 | (met << 1)) << at;
    };
    if grouped {
        let mut from = 0;
        while from < n {
            let to = (from + batch).min(n);
            at.clear();
            at.extend((from..to).map(|i| {
                let d = f.diags.get(i).expect("in the list");
                slot(hash(d, source, &mut st)) as u64
            }));
            group_by_place(at.len(), |k| at[k], &mut by_place, bits, false);
            for &s in &by_place {
                mark(&mut slots, s as usize);
            }
            from = to;
        }
    } else {
        for d in f.diags.iter() {
            mark(&mut slots, slot(hash(d, source, &mut st)));
        }
    }
    // only "met again" is read from here on: one bit a slot, packed into the table's first
    // half in place and the rest given back (each word's 32 bits are read from the words at
    // and after it, which are not yet written over)
    let words = slots.len().div_ceil(2);
    for w in 0..words {
        let low = again_bits(slots[2 * w]);
        let high = slots.get(2 * w + 1).map_or(0, |&x| again_bits(x));
        slots[w] = low | (high << 32);
    }
    slots.truncate(words);
    slots.shrink_to_fit();
    let again = move |s: usize| (slots[s / 64] >> (s % 64)) & 1 != 0;
    // a hash of a finding counted -> (the first finding with it, how many findings had its
    // key so far)
    let mut seen: rustc_hash::FxHashMap<u64, (u32, u32)> = rustc_hash::FxHashMap::default();
    let mut collided: rustc_hash::FxHashMap<String, usize> = rustc_hash::FxHashMap::default();
    let mut rank = move |i: usize, d: DiagRef<'_>, h: u64| match seen.entry(h) {
        Entry::Vacant(e) => {
            e.insert((i as u32, 1));
            0
        }
        Entry::Occupied(mut e) => {
            let (first, count) = e.get_mut();
            write_fingerprint_key(d, source, &mut key);
            let first_d = f.diags.get(*first as usize).expect("an earlier finding");
            write_fingerprint_key(first_d, source, &mut first_key);
            if first_key == key {
                *count += 1;
                *count as usize - 1
            } else {
                let n = collided.entry(key.clone()).or_insert(0);
                *n += 1;
                *n - 1
            }
        }
    };
    // grouped: the batch's hashes in order (in `at`), and a bit a finding of the batch
    // whose slot was met again
    let mut again_in: Vec<u64> = Vec::new();
    let mut next = 0;
    (0..n).map(move |i| {
        let d = f.diags.get(i).expect("in the list");
        let (h, met_again) = if grouped {
            let k = i % batch;
            if k == 0 {
                at.clear();
                at.extend(
                    (i..(i + batch).min(n))
                        .map(|j| hash(f.diags.get(j).expect("in the list"), source, &mut st)),
                );
                // (slot, place in the batch), grouped by the slot's place
                group_by_place(at.len(), |k| slot(at[k]) as u64, &mut by_place, bits, true);
                again_in.clear();
                again_in.resize(at.len().div_ceil(64), 0);
                for &x in &by_place {
                    let k = (x & 0xffff) as usize;
                    if again((x >> 16) as usize) {
                        again_in[k / 64] |= 1 << (k % 64);
                    }
                }
                next = i;
            }
            let k = i - next;
            (at[k], (again_in[k / 64] >> (k % 64)) & 1 != 0)
        } else {
            let h = hash(d, source, &mut st);
            (h, again(slot(h)))
        };
        if !met_again {
            return (h, 0);
        }
        (h, rank(i, d, h))
    })
}

/// The slots of a batch's `n` entries (`slot_of` the slot of each, in a table of `bits` bits
/// of slots), put into `to` in order of their top eight bits by a counting sort; each with
/// its entry's place in the batch in the low 16 bits beside it (`with_place`; a batch then
/// holds at most 65 536), or alone.
fn group_by_place(
    n: usize,
    slot_of: impl Fn(usize) -> u64,
    to: &mut Vec<u64>,
    bits: u32,
    with_place: bool,
) {
    let shift = bits.saturating_sub(8);
    let mut start = [0usize; 257];
    for k in 0..n {
        start[(slot_of(k) >> shift) as usize + 1] += 1;
    }
    for g in 1..257 {
        start[g] += start[g - 1];
    }
    to.clear();
    to.resize(n, 0);
    for k in 0..n {
        let s = slot_of(k);
        let g = (s >> shift) as usize;
        to[start[g]] = if with_place { (s << 16) | k as u64 } else { s };
        start[g] += 1;
    }
}

/// The "met again" bits of a word of two-bit slots (the odd bits), gathered into its low
/// 32 bits in order.
#[inline]
fn again_bits(x: u64) -> u64 {
    let mut x = (x >> 1) & 0x5555_5555_5555_5555;
    x = (x | (x >> 1)) & 0x3333_3333_3333_3333;
    x = (x | (x >> 2)) & 0x0f0f_0f0f_0f0f_0f0f;
    x = (x | (x >> 4)) & 0x00ff_00ff_00ff_00ff;
    x = (x | (x >> 8)) & 0x0000_ffff_0000_ffff;
    (x | (x >> 16)) & 0x0000_0000_ffff_ffff
}

/// The fingerprint of a file's fatal diagnostic.
pub fn fatal_fingerprint(d: &Diag, source: Option<&SourceFile>) -> String {
    format!(
        "{:016x}",
        fnv1a64(fingerprint_key(d.view(), source).as_bytes())
    )
}

// ---------------------------------------------------------------------------
// paths

/// Where an input lies relative to the root.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum RootedPath {
    /// Under the root: the path from it, `/`-separated.
    Relative(String),
    /// Outside the root: the absolute path, `/`-separated, with a leading `/` (or a drive).
    Absolute(String),
    /// Standard input: no path.
    Stdin,
}

/// Resolves an input's name (as given) against `cwd` and expresses it relative to `root`.
/// Purely lexical: `.` and `..` are folded, links are not followed.
pub fn rooted_path(name: &str, root: &Path, cwd: &Path) -> RootedPath {
    if name == "<stdin>" {
        return RootedPath::Stdin;
    }
    let abs = normalize(&cwd.join(name));
    let root = normalize(&cwd.join(root));
    match abs.strip_prefix(&root) {
        Ok(rel) if rel.as_os_str().is_empty() => RootedPath::Relative(".".to_string()),
        Ok(rel) => RootedPath::Relative(slashed(rel)),
        Err(_) => {
            let s = slashed(&abs);
            RootedPath::Absolute(if s.starts_with('/') {
                s
            } else {
                format!("/{s}")
            })
        }
    }
}

fn normalize(p: &Path) -> PathBuf {
    let mut out = PathBuf::new();
    for c in p.components() {
        match c {
            Component::CurDir => {}
            Component::ParentDir => {
                out.pop();
            }
            other => out.push(other.as_os_str()),
        }
    }
    out
}

fn slashed(p: &Path) -> String {
    let mut parts: Vec<String> = Vec::new();
    let mut rooted = false;
    for c in p.components() {
        match c {
            Component::Prefix(pre) => parts.push(pre.as_os_str().to_string_lossy().into_owned()),
            Component::RootDir => rooted = true,
            Component::Normal(s) => parts.push(s.to_string_lossy().into_owned()),
            Component::CurDir | Component::ParentDir => {
                parts.push(c.as_os_str().to_string_lossy().into_owned())
            }
        }
    }
    let joined = parts.join("/");
    if rooted && !matches!(p.components().next(), Some(Component::Prefix(_))) {
        format!("/{joined}")
    } else {
        joined
    }
}

/// `p` made absolute against `cwd`, folded and `/`-separated.
pub(crate) fn absolute_slashed(p: &Path, cwd: &Path) -> String {
    let s = slashed(&normalize(&cwd.join(p)));
    if s.starts_with('/') {
        s
    } else {
        format!("/{s}")
    }
}

/// The path shown for a file where a relative path is wanted (annotations): relative to the
/// root when under it, else absolute; `<stdin>` for standard input.
pub fn display_path(name: &str, opts: &ReportOptions) -> String {
    match rooted_path(name, &opts.root, &opts.cwd) {
        RootedPath::Relative(s) | RootedPath::Absolute(s) => s,
        RootedPath::Stdin => "<stdin>".to_string(),
    }
}

// ---------------------------------------------------------------------------
// totals

/// Counts over a whole run.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Totals {
    pub files: usize,
    /// Files that could not be read or modelled (their fatal diagnostic is not counted below).
    pub not_checked: usize,
    pub parts: usize,
    pub nets: usize,
    pub pins: usize,
    pub errors: usize,
    pub warnings: usize,
    pub infos: usize,
    /// (classified, IC-like) summed over the files that report coverage; `None` when none does.
    pub coverage: Option<(usize, usize)>,
    /// Findings suppressed by waivers or a baseline.
    pub waived: usize,
}

impl Totals {
    pub fn of(files: &[FileOutcome]) -> Totals {
        Totals::of_run(files, None)
    }

    /// The totals of a run whose first `netlists` outcomes are netlists (`None`: all): the
    /// others (a configuration's stale waivers, a baseline's notes) add their findings but are
    /// not counted as files.
    pub fn of_run(files: &[FileOutcome], netlists: Option<usize>) -> Totals {
        let n = netlists.unwrap_or(files.len()).min(files.len());
        let mut t = Totals {
            files: n,
            ..Totals::default()
        };
        for (i, f) in files.iter().enumerate() {
            if f.fatal.is_some() && i < n {
                t.not_checked += 1;
            }
            t.parts += f.summary.parts;
            t.nets += f.summary.nets;
            t.pins += f.summary.pins;
            t.waived += f.waived;
            for d in &f.diags {
                match d.severity() {
                    Severity::Error => t.errors += 1,
                    Severity::Warning => t.warnings += 1,
                    Severity::Info => t.infos += 1,
                }
            }
            if let Some((c, n)) = f.coverage {
                let (tc, tn) = t.coverage.unwrap_or((0, 0));
                t.coverage = Some((tc + c, tn + n));
            }
        }
        t
    }
}

/// `1 file`, `2 files`.
pub(crate) fn count(n: usize, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

/// Outcomes with what the line formats must take care of: a schematic's sheets (findings in
/// each), names and messages with characters to escape, findings with no place, a help over
/// lines, a file that could not be read, and more text than one piece handed on at once.
#[cfg(test)]
pub(crate) fn sample_outcomes() -> Vec<FileOutcome> {
    let sheets = vec![
        (
            "top,1:a%.kicad_sch".to_string(),
            "(a)\n(b \"Ω\" x)\n".repeat(50),
        ),
        (
            "sub/\u{1b}[2Jb.kicad_sch".to_string(),
            "(c)\r\n(d)\n".repeat(50),
        ),
    ];
    let source = SourceFile::from_files("top,1:a%.kicad_sch", sheets);
    let len = source.text().len();
    let mut diags = Vec::new();
    for i in 0..3000usize {
        let at = (i * 37) % len;
        let mut d = Diag::warning(
            "floating-cmos-input",
            format!("U{i} pin {} % 100: line\nbreak \u{202e}Ω, `N{i}`", i % 14),
        )
        .with_pins([format!("U{i}.1")]);
        if i % 5 != 0 {
            d = d.at(Span::new(at, (at + i % 9).min(len)), "open input");
        }
        if i % 3 == 0 {
            d = d.with_help("tie it\r\nto GND: 0 V, 100%");
        }
        if i % 7 == 0 {
            d.severity = Severity::Info;
        }
        diags.push(d);
    }
    let checked = FileOutcome {
        name: "top,1:a%.kicad_sch".into(),
        source: Some(source),
        fatal: None,
        diags: diags.into(),
        summary: Default::default(),
        coverage: None,
        waived: 0,
    };
    let unread = FileOutcome {
        name: "gone\u{7}.net".into(),
        source: None,
        fatal: Some(Diag::error(
            "unreadable",
            "cannot read gone.net: no such file",
        )),
        diags: Default::default(),
        summary: Default::default(),
        coverage: None,
        waived: 0,
    };
    vec![checked, unread]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fnv1a64_matches_the_published_test_vectors() {
        // FNV-1a 64-bit test vectors published with the algorithm (the FNV authors' test
        // suite, also in the IETF FNV draft); values quoted from memory
        assert_eq!(fnv1a64(b""), 0xcbf29ce484222325);
        assert_eq!(fnv1a64(b"a"), 0xaf63dc4c8601ec8c);
        assert_eq!(fnv1a64(b"foobar"), 0x85944171f73967e8);
    }

    #[test]
    fn a_hash_carried_on_equals_the_hash_of_the_whole() {
        let whole = "floating-ttl-input\u{1f}\u{1f}U1.2\u{1d}3";
        let (a, b) = whole.split_at(whole.find('\u{1d}').unwrap());
        assert_eq!(
            fnv1a64_more(fnv1a64(a.as_bytes()), b.as_bytes()),
            fnv1a64(whole.as_bytes())
        );
    }

    /// The "met again" bits of two-bit slots come out one bit a slot, in slot order.
    #[test]
    fn again_bits_keep_each_slot_s_second_bit_in_order() {
        let mut x: u64 = 0x9e37_79b9_7f4a_7c15;
        for _ in 0..200 {
            x = x.rotate_left(13).wrapping_mul(0x0100_0000_01b3) ^ 0x5bd1_e995;
            let want = (0..32).fold(0u64, |w, k| w | (((x >> (2 * k + 1)) & 1) << k));
            assert_eq!(again_bits(x), want, "{x:#x}");
        }
        assert_eq!(again_bits(u64::MAX), 0xffff_ffff);
        assert_eq!(again_bits(0x5555_5555_5555_5555), 0);
        assert_eq!(again_bits(0b1000), 0b10);
    }

    /// Ranks counted by hash equal ranks counted by the key's text, even when every key
    /// has the same hash or keys of one length share one.
    #[test]
    fn key_ranks_count_each_key_apart_whatever_the_hash() {
        let mk = |code: &'static str, net: Option<&str>, pins: &[&str]| {
            let mut d = Diag::warning(code, "m");
            d.net = net.map(Into::into);
            d.set_pins(pins);
            d
        };
        let diags = vec![
            mk("a", Some("N1"), &["U1.1"]),
            mk("a", Some("N2"), &["U1.1"]),
            mk("a", Some("N1"), &["U1.1"]),
            mk("b", Some("N1"), &[]),
            mk("a", Some("N2"), &["U1.1"]),
            mk("a", Some("N1"), &["U1.1"]),
            mk("b", None, &["N1"]),
            mk("b", Some("N1"), &[]),
        ];
        let f = FileOutcome {
            name: "t.net".into(),
            source: None,
            fatal: None,
            diags: diags.into(),
            summary: Default::default(),
            coverage: None,
            waived: 0,
        };
        // each finding's rank among the findings before it with the same key, from the key's
        // text: what the hashed passes must give
        let ranks_by_text = |f: &FileOutcome| -> Vec<usize> {
            let mut by_text: std::collections::HashMap<String, usize> = Default::default();
            f.diags
                .iter()
                .map(|d| {
                    let n = by_text.entry(fingerprint_key(d, None)).or_insert(0);
                    *n += 1;
                    *n - 1
                })
                .collect()
        };
        let want = ranks_by_text(&f);
        assert_eq!(want, [0, 0, 1, 0, 1, 2, 0, 1]);
        type Hash = fn(DiagRef<'_>, Option<&SourceFile>, &mut KeyHasher) -> u64;
        for hash in [
            fingerprint_hash as Hash,
            |_, _, _| 7,
            |d, s, k| {
                write_fingerprint_key(d, s, &mut k.key);
                k.key.len() as u64
            },
        ] {
            let got: Vec<usize> = key_ranks(&f, hash).map(|(_, n)| n).collect();
            assert_eq!(got, want);
            // the slots marked and read a batch at a time, grouped by place: the same ranks
            // and hashes, whatever the batch
            let plain: Vec<(u64, usize)> = key_ranks_in(&f, hash, 4, usize::MAX).collect();
            for batch in [1, 3, 8, 1 << 16] {
                let got: Vec<(u64, usize)> = key_ranks_in(&f, hash, batch, 0).collect();
                assert_eq!(got, plain, "{batch}");
            }
        }
        // many findings, many keys met more than once, across many batches and slots
        let many = FileOutcome {
            diags: (0..5000)
                .map(|i| mk(["a", "b"][i % 2], Some(&format!("N{}", i % 1700)), &[]))
                .collect::<Vec<_>>()
                .into(),
            ..f
        };
        let want = ranks_by_text(&many);
        for (batch, above) in [(SLOT_BATCH, usize::MAX), (SLOT_BATCH, 0), (777, 0), (64, 0)] {
            let got: Vec<usize> = key_ranks_in(&many, fingerprint_hash, batch, above)
                .map(|(_, n)| n)
                .collect();
            assert_eq!(got, want, "{batch} {above}");
        }
        // the hash of the pieces is the hash of the key, for findings with a net, pins, both
        // or neither (whose key holds the text at their place)
        let mut key = KeyHasher::default();
        for d in f
            .diags
            .iter()
            .chain(sample_outcomes()[0].diags.iter().take(40))
            .chain([
                Diag::warning("floating-cmos-input", "m").view(),
                Diag::warning("floating-cmos-input", "m")
                    .at(Span::new(0, 9), "x")
                    .view(),
            ])
        {
            let src = SourceFile::new("t", "(a  b\n c)");
            for source in [None, Some(&src)] {
                let want = fnv1a64(fingerprint_key(d, source).as_bytes());
                assert_eq!(fingerprint_hash(d, source, &mut key), want);
            }
        }
    }

    #[test]
    fn paths_relative_to_the_root() {
        let root = Path::new("/repo");
        assert_eq!(
            rooted_path("boards/a.net", root, Path::new("/repo")),
            RootedPath::Relative("boards/a.net".into())
        );
        assert_eq!(
            rooted_path("./x/../a.net", root, Path::new("/repo/sub")),
            RootedPath::Relative("sub/a.net".into())
        );
        assert_eq!(
            rooted_path("/repo/b/c.net", root, Path::new("/elsewhere")),
            RootedPath::Relative("b/c.net".into())
        );
        assert_eq!(
            rooted_path("../c.net", root, Path::new("/repo")),
            RootedPath::Absolute("/c.net".into())
        );
        // a sibling whose name starts like the root is not under it
        assert_eq!(
            rooted_path("/repo2/c.net", root, Path::new("/")),
            RootedPath::Absolute("/repo2/c.net".into())
        );
        assert_eq!(
            rooted_path("<stdin>", root, Path::new("/repo")),
            RootedPath::Stdin
        );
    }

    /// Places from the table equal places worked out afresh, whatever the order of the
    /// spans and however many share a slot.
    #[test]
    fn places_kept_equal_places_worked_out() {
        let text: String = (0..300)
            .map(|i| format!("(pin (num {i}) (name \"Ω{i}\"))\n"))
            .collect();
        let src = SourceFile::new("t", text.as_str());
        let len = text.len();
        let mut places = Places::new(Some(&src));
        let mut state = 12345u64;
        for _ in 0..5000 {
            state = state
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            let start = (state >> 33) as usize % (len + 10);
            let end = start + (state >> 20) as usize % 90;
            // a few spans again and again, and many once
            let span = if state & 3 == 0 {
                Span::new(start, end)
            } else {
                Span::new(start % 7 * 40, start % 7 * 40 + 12)
            };
            assert_eq!(places.of(span), Some(Place::of(&src, span)), "{span:?}");
        }
        assert_eq!(Places::new(None).of(Span::new(0, 1)), None);
    }

    #[test]
    fn places_count_characters_and_end_after_the_span() {
        let src = SourceFile::new("t", "(a\n  (ref \"Ω1\") x)\n");
        // `"Ω1"` starts at byte 10 (line 2, column 8) and is 5 bytes, 4 characters
        let p = Place::of(&src, Span::new(10, 15));
        assert_eq!(
            p,
            Place {
                line: 2,
                column: 8,
                end_line: 2,
                end_column: 12,
                byte_offset: 10,
                byte_length: 5
            }
        );
        // a span past the end is clamped
        let q = Place::of(&src, Span::new(100, 200));
        assert_eq!((q.byte_offset, q.byte_length), (src.text().len(), 0));
    }
}
