//! A file's findings held together: one fixed-size record per finding, one text for all
//! their own words (messages, nets, pins), one list of all their places, one table of the
//! texts many findings say alike (codes, label words, helps, the shared parts of a message),
//! each kept once, and one table of the sets of those texts findings of one kind share (a
//! code, a help, a message's head and tail). A board can have hundreds of thousands of
//! findings; held this way a finding costs a record of 24 bytes, its own words
//! and twelve bytes a place, and no allocation of its own.
//!
//! Read a finding through [`DiagRef`], which reads a single [`Diag`] the same way.

use std::borrow::Cow;
use std::hash::BuildHasher;

use super::{Diag, Label, Pins, Severity, Text};
use crate::source::Span;

/// No text: a length or a shared text's number that is not there.
const NONE: u32 = u32::MAX;

/// One finding: where its words are, in 16 bytes. Its own texts follow each other in one
/// piece of the list's text, after their lengths ([`put_len`]): the length of the message's
/// own part (unless [`REF_IN_PINS`]), of the net (when it has one) and of the pin list (when
/// it is [`LONG`]; else it is in the record), then the message's own part, the net and the
/// pin list. A finding with [`MANY_LABELS`] places or more has their count written after
/// its texts.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct Rec {
    /// Where its texts start in [`DiagList::text`]: the piece above [`TEXT_SHIFT`] bits, the
    /// offset in it below.
    at: u32,
    /// Where its first place is, in one piece of [`DiagList::labels`] (the piece above
    /// [`LABEL_SHIFT`] bits, the offset in it below).
    first_label: u32,
    /// Its shared texts: a number in [`DiagList::shapes`].
    shape: u32,
    /// Its severity in the top two bits; below, how many places it has (from `first_label`
    /// on), or [`MANY_LABELS`]; for a [`REF_IN_PINS`] finding, the length of its message's
    /// own part in the next seven bits and the count of places in the last seven (or
    /// [`MANY_REF_LABELS`]).
    sev_labels: u16,
    /// Whether it names a net ([`HAS_NET`]) and pins ([`HAS_PINS`]), whether its pin list's
    /// length is written before its texts ([`LONG`]) and whether its message is read from
    /// its pin list ([`REF_IN_PINS`]), in the top four bits; below, its pin list's length
    /// (below [`PINS_MAX`]; not used for a [`LONG`] one).
    has_pins: u16,
}

const HAS_NET: u8 = 1;
const HAS_PINS: u8 = 2;
const LONG: u8 = 4;
/// The message's own part is the start of the pin list (an unused gate's reference, `U4`,
/// before `U4.1`), and shorter than 128 bytes: only the pin list is written, and the message
/// is read from it, its length held in the record. Only for a finding with no net.
const REF_IN_PINS: u8 = 8;
/// A count of places of a [`REF_IN_PINS`] finding that is written after the texts.
const MANY_REF_LABELS: u16 = (1 << 7) - 1;
/// A pin list this long or longer has its length written before the texts.
const PINS_MAX: usize = (1 << 12) - 1;
/// A count of places that is written after the texts.
const MANY_LABELS: u16 = (1 << 14) - 1;
/// The bits of a text's offset in its piece, in [`Rec::at`].
const TEXT_SHIFT: u32 = 20;

impl Rec {
    #[inline]
    fn severity(&self) -> Severity {
        match self.sev_labels >> 14 {
            0 => Severity::Info,
            1 => Severity::Warning,
            _ => Severity::Error,
        }
    }

    fn set_severity(&mut self, s: Severity) {
        let bits = match s {
            Severity::Info => 0,
            Severity::Warning => 1,
            Severity::Error => 2,
        };
        self.sev_labels = (self.sev_labels & MANY_LABELS) | (bits << 14);
    }

    /// The count of places the record holds, and whether it is the mark of a count written
    /// after the texts.
    #[inline]
    fn labels(&self) -> (usize, bool) {
        let (n, many) = if self.has() & REF_IN_PINS != 0 {
            (self.sev_labels & MANY_REF_LABELS, MANY_REF_LABELS)
        } else {
            (self.sev_labels & MANY_LABELS, MANY_LABELS)
        };
        (usize::from(n), n == many)
    }

    #[inline]
    fn has(&self) -> u8 {
        (self.has_pins >> 12) as u8
    }

    #[inline]
    fn piece(&self) -> usize {
        (self.at >> TEXT_SHIFT) as usize
    }

    #[inline]
    fn offset(&self) -> usize {
        (self.at & ((1 << TEXT_SHIFT) - 1)) as usize
    }
}

/// The shared texts of a finding (numbers in [`DiagList::shared`]; `NONE`: none): the code,
/// the help, the parts of the message before and after its own part, and the words between
/// the pieces of its own part (a number in [`DiagList::join_sets`]; `NONE`: its own part is
/// one piece). Findings of one kind have the same, so it is kept once in the list for all of
/// them.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
struct Shape {
    code: u32,
    help: u32,
    head: u32,
    tail: u32,
    joins: u32,
}

/// Where a text at `offset` in the piece `piece` is, as a record holds it.
fn text_at(piece: usize, offset: usize) -> u32 {
    // 4 096 pieces of a mebibyte or more: more finding text than a machine holds
    assert!(
        piece < 1 << (32 - TEXT_SHIFT),
        "at most 4 096 pieces of text"
    );
    debug_assert!(offset < 1 << TEXT_SHIFT);
    ((piece as u32) << TEXT_SHIFT) | offset as u32
}

/// Where a finding's own texts were written ([`DiagList::put_texts`]).
struct Texts {
    /// As [`Rec::at`].
    at: u32,
    /// As [`Rec::has_pins`].
    has_pins: u16,
    /// The length of the message's own part, for a [`REF_IN_PINS`] finding.
    own: u16,
}

impl Texts {
    fn new(piece: usize, offset: usize, has: u8, pins: usize, own: usize) -> Texts {
        let pins = if has & LONG != 0 { 0 } else { pins };
        Texts {
            at: text_at(piece, offset),
            has_pins: (u16::from(has) << 12) | pins as u16,
            own: if has & REF_IN_PINS != 0 {
                own as u16
            } else {
                0
            },
        }
    }
}

/// A place of a finding in the list.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct LabelRec {
    span: Span,
    /// A shared text's number, times two, plus one for a primary place.
    text: u32,
}

impl LabelRec {
    fn new(span: Span, text: u32, primary: bool) -> LabelRec {
        LabelRec {
            span,
            text: (text << 1) | u32::from(primary),
        }
    }

    fn text(self) -> u32 {
        self.text >> 1
    }

    fn primary(self) -> bool {
        self.text & 1 == 1
    }
}

/// Writes the length `n` in as few bytes as it takes, six bits to a byte, lowest first: a
/// byte of `0x40` and above says more follow. Every byte is ASCII, so the text holding it
/// stays UTF-8 and the texts after it start on a character boundary.
fn put_len(t: &mut String, mut n: usize) {
    while n >= 0x40 {
        t.push(char::from(0x40 | (n & 0x3f) as u8));
        n >>= 6;
    }
    t.push(char::from(n as u8));
}

/// The bytes [`put_len`] writes for `n`.
fn len_size(mut n: usize) -> usize {
    let mut k = 1;
    while n >= 0x40 {
        n >>= 6;
        k += 1;
    }
    k
}

/// Reads a length written by [`put_len`] at `*at`, and moves `*at` past it.
fn get_len(b: &[u8], at: &mut usize) -> usize {
    let (mut n, mut shift) = (0, 0);
    loop {
        let x = b[*at];
        *at += 1;
        n |= usize::from(x & 0x3f) << shift;
        if x < 0x40 {
            return n;
        }
        shift += 6;
    }
}

/// Whether the message's own part `own` is read from the start of the pin list `pins`
/// ([`REF_IN_PINS`]).
fn ref_in_pins(own: &str, pins: &[u8]) -> bool {
    !own.is_empty() && own.len() <= usize::from(MANY_REF_LABELS) && pins.starts_with(own.as_bytes())
}

/// Records a piece of [`DiagList::recs`] holds (a power of two).
const REC_CHUNK: usize = 1 << 14;
/// The most findings [`DiagList::sort_by_keys`] sorts whole, among themselves: by insertion
/// up to [`SORT_INSERT`] (or in a small buffer, when they lie across two pieces).
const SORT_SMALL: usize = 16;
/// The most findings sorted by insertion.
const SORT_INSERT: usize = 16;
/// The size of a piece of the places or of the text. A finding's places, or texts, are never
/// split between two pieces: a finding that does not fit in what is left of the last piece
/// starts a new one, made whole at once (or as large as the finding, if it is larger), so a
/// piece never grows past the size it was made with. The first piece grows as a small list
/// does, up to this size.
const LABEL_CHUNK: usize = 1 << 16;
const TEXT_CHUNK: usize = 1 << 20;
/// A place's offset in its piece: below `LABEL_CHUNK` (a finding starts in a piece only where
/// it fits, and a piece made for one larger finding holds it from offset 0).
const LABEL_SHIFT: u32 = 17;

/// The findings of a file, in order (see the module's documentation).
///
/// Records, places and texts are each held in pieces of a fixed size, added as the list
/// grows: a list of hundreds of thousands of findings is never copied to grow, and never held
/// twice.
#[derive(Default, Clone)]
pub struct DiagList {
    /// The records, `REC_CHUNK` to a piece.
    recs: Vec<Vec<Rec>>,
    len: usize,
    labels: Vec<Vec<LabelRec>>,
    text: Vec<String>,
    shared: Vec<Text>,
    /// The shared texts by content, as numbers into `shared`.
    index: hashbrown::HashTable<u32>,
    /// The sets of shared texts of the findings, each kept once, and the last one given (a
    /// check pushes findings of one kind in a row).
    shapes: Vec<Shape>,
    shape_index: hashbrown::HashTable<u32>,
    /// By a shared text's number, the set last given whose most telling text it is.
    shape_hint: Vec<u32>,
    /// By a set of shared texts' number, the places last written for a finding of that set
    /// (where the first is and how many, as in [`Rec`]): a finding of that set with the same
    /// places points at them instead of writing them again (findings of one kind of part, on
    /// pins that are on no net, point at the same pins of the library part).
    shape_labels: Vec<(u32, u16)>,
    /// The words said between the pieces of a message's own part ([`DiagList::push_pieces`]),
    /// as numbers in `shared`, each list of them once: where it starts in `joins` and how
    /// long it is, by its number; found by content, the last one given first.
    joins: Vec<u32>,
    join_sets: Vec<(u32, u32)>,
    join_index: hashbrown::HashTable<u32>,
    /// A message given in pieces, gathered: its pieces' words one after another, and each
    /// run of pieces of one kind (said alike, and where its words are in `piece_buf`).
    piece_buf: String,
    piece_runs: Vec<(bool, u32, u32)>,
    /// The own part of a message in pieces, as it is written (see [`DiagList::push_pieces`]),
    /// and the numbers of the words between its pieces.
    own_buf: String,
    join_buf: Vec<u32>,
    /// A finding's pin list and places, gathered before they are written into the pieces
    /// (their sizes are then known, and a piece is never grown past its size).
    pin_buf: String,
    label_buf: Vec<LabelRec>,
    /// The last text shared and its number, by its address and length: findings in a row say
    /// the same fixed words, found again with no hashing.
    last: [(usize, usize, u32); SLOTS],
    /// This list's mark in its [`SharedId`]s (0 until the first is given).
    token: u32,
}

/// A text shared once in a list ([`DiagList::share_id`]) and given by number to the findings
/// pushed into it afterwards ([`DiagList::push_shared`]): no text is looked up per finding.
/// It holds the mark of the list that gave it, and only that list (or a copy of it) takes it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SharedId {
    list: u32,
    id: u32,
}

/// The marks of lists that gave out [`SharedId`]s.
static TOKENS: std::sync::atomic::AtomicU32 = std::sync::atomic::AtomicU32::new(1);

/// What a finding written straight into a list with its shared texts given by number
/// ([`DiagList::push_shared`]) says besides its pins and places.
#[derive(Debug, Clone)]
pub struct RawShared<'t> {
    pub code: SharedId,
    pub severity: Severity,
    /// The message: `head`, `own`, `tail`.
    pub head: Option<SharedId>,
    pub own: &'t str,
    pub tail: Option<SharedId>,
    pub help: Option<SharedId>,
    pub net: Option<&'t str>,
}

/// Texts remembered by address: the code, the help, the message's head and tail, the first
/// label and the others.
const SLOTS: usize = 6;

/// Orders the texts made of `a`'s parts and of `b`'s as the texts themselves are ordered
/// (byte by byte), with no text made.
#[inline]
pub fn cmp_parts(a: [&str; 3], b: [&str; 3]) -> std::cmp::Ordering {
    let (mut a, mut b) = (a.map(str::as_bytes), b.map(str::as_bytes));
    let (mut i, mut j) = (0, 0);
    loop {
        while i < 3 && a[i].is_empty() {
            i += 1;
        }
        while j < 3 && b[j].is_empty() {
            j += 1;
        }
        match (i < 3, j < 3) {
            (false, false) => return std::cmp::Ordering::Equal,
            (false, true) => return std::cmp::Ordering::Less,
            (true, false) => return std::cmp::Ordering::Greater,
            _ => {}
        }
        // one text on both sides (the shared words of findings alike): passed over unread
        if std::ptr::eq(a[i], b[j]) {
            i += 1;
            j += 1;
            continue;
        }
        let n = a[i].len().min(b[j].len());
        match a[i][..n].cmp(&b[j][..n]) {
            std::cmp::Ordering::Equal => {}
            other => return other,
        }
        a[i] = &a[i][n..];
        b[j] = &b[j][n..];
    }
}

/// The parts of a message said by many findings, around the words of one finding.
#[derive(Debug, Clone, Default)]
pub struct Around<'t> {
    pub head: Option<&'t Text>,
    pub tail: Option<&'t Text>,
}

/// A piece of a message given in pieces ([`DiagList::push_pieces`]): words many findings say
/// alike, or the finding's own.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Piece<'t> {
    Own(&'t str),
    Said(&'t str),
}

/// What a finding written straight into a list ([`DiagList::push_raw`]) says besides its pins
/// and places.
#[derive(Debug, Clone)]
pub struct Raw<'t> {
    pub code: &'static str,
    pub severity: Severity,
    /// The message: `around.head`, `own`, `around.tail`.
    pub around: Around<'t>,
    pub own: &'t str,
    pub help: Option<&'t Text>,
    pub net: Option<&'t str>,
}

fn hash(s: &str) -> u64 {
    rustc_hash::FxBuildHasher.hash_one(s)
}

impl DiagList {
    pub fn new() -> DiagList {
        DiagList::default()
    }

    pub fn len(&self) -> usize {
        self.len
    }

    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    fn rec(&self, i: usize) -> &Rec {
        &self.recs[i / REC_CHUNK][i % REC_CHUNK]
    }

    fn rec_mut(&mut self, i: usize) -> &mut Rec {
        &mut self.recs[i / REC_CHUNK][i % REC_CHUNK]
    }

    fn push_rec(&mut self, r: Rec) {
        if self.len.is_multiple_of(REC_CHUNK) {
            // the first piece grows as a small list does; the others are made whole
            self.recs.push(if self.len == 0 {
                Vec::new()
            } else {
                Vec::with_capacity(REC_CHUNK)
            });
        }
        self.recs.last_mut().expect("a piece").push(r);
        self.len += 1;
    }

    fn swap(&mut self, i: usize, j: usize) {
        let (a, b) = (*self.rec(i), *self.rec(j));
        *self.rec_mut(i) = b;
        *self.rec_mut(j) = a;
    }

    /// The piece of the text `need` more bytes are written into: the last, when they fit in
    /// it; the last grown, when it is smaller than a whole piece (the first piece of a list
    /// grows as a small list does) and they fit in a whole one; else a new one.
    #[inline]
    fn text_room(&mut self, need: usize) -> usize {
        match self.text.last() {
            Some(t) if t.len() + need <= t.capacity() && t.len() < TEXT_CHUNK => {
                self.text.len() - 1
            }
            _ => self.text_room_new(need),
        }
    }

    /// [`DiagList::text_room`] when the last piece is full (or there is none).
    #[cold]
    fn text_room_new(&mut self, need: usize) -> usize {
        if self.text.is_empty() {
            self.text.push(String::new());
        }
        let last = self.text.len() - 1;
        let t = &mut self.text[last];
        let len = t.len();
        if len + need <= t.capacity() && len < TEXT_CHUNK {
            return last;
        }
        if t.capacity() < TEXT_CHUNK && len + need <= TEXT_CHUNK {
            let want = (t.capacity() * 2).max(len + need).max(64).min(TEXT_CHUNK);
            t.reserve_exact(want - len);
            return last;
        }
        self.text.push(String::with_capacity(need.max(TEXT_CHUNK)));
        last + 1
    }

    /// Writes a finding's own texts and their lengths (see [`Rec`]). Gives where they are,
    /// which of net and pins the finding has, and its pin list's length.
    /// `plain`: the message's own part is words of its own (not pieces with their lengths), so
    /// it may be read from the start of the pin list.
    fn put_texts(
        &mut self,
        message: &str,
        net: Option<&str>,
        pins: Option<&str>,
        plain: bool,
    ) -> Texts {
        let ref_in =
            plain && net.is_none() && pins.is_some_and(|p| ref_in_pins(message, p.as_bytes()));
        let pins_len = pins.map_or(0, str::len);
        let long = pins_len >= PINS_MAX;
        let mut need = pins_len;
        if !ref_in {
            need += len_size(message.len()) + message.len();
        }
        if let Some(n) = net {
            need += len_size(n.len()) + n.len();
        }
        if long {
            need += len_size(pins_len);
        }
        let piece = self.text_room(need);
        let t = &mut self.text[piece];
        let at = t.len();
        if !ref_in {
            put_len(t, message.len());
        }
        if let Some(n) = net {
            put_len(t, n.len());
        }
        if long {
            put_len(t, pins_len);
        }
        if !ref_in {
            t.push_str(message);
        }
        if let Some(n) = net {
            t.push_str(n);
        }
        if let Some(p) = pins {
            t.push_str(p);
        }
        let has = net.map_or(0, |_| HAS_NET)
            | pins.map_or(0, |_| HAS_PINS)
            | if long { LONG } else { 0 }
            | if ref_in { REF_IN_PINS } else { 0 };
        Texts::new(piece, at, has, pins_len, message.len())
    }

    /// Writes the places gathered in `label_buf` into the last piece of the places, or a new
    /// one as [`DiagList::text_room`] chooses for the text. Gives where the first is and how
    /// many there are.
    fn put_labels(&mut self) -> (u32, u16) {
        let n = self.label_buf.len();
        if n == 0 {
            return (0, 0);
        }
        let last = self.label_room(n);
        let l = &mut self.labels[last];
        let from = l.len() as u32;
        l.extend_from_slice(&self.label_buf);
        self.label_buf.clear();
        // `push_label` keeps at most `u16::MAX` places
        (((last as u32) << LABEL_SHIFT) | from, n as u16)
    }

    /// The piece of the places `n` more are written into, chosen as [`DiagList::text_room`]
    /// chooses for the text.
    #[inline]
    fn label_room(&mut self, n: usize) -> usize {
        match self.labels.last() {
            Some(l) if l.len() + n <= l.capacity() => self.labels.len() - 1,
            _ => self.label_room_new(n),
        }
    }

    /// [`DiagList::label_room`] when the last piece is full (or there is none).
    #[cold]
    fn label_room_new(&mut self, n: usize) -> usize {
        if self.labels.is_empty() {
            self.labels.push(Vec::new());
        }
        let last = self.labels.len() - 1;
        let l = &mut self.labels[last];
        let len = l.len();
        if len + n <= l.capacity() {
            return last;
        }
        if l.capacity() < LABEL_CHUNK && len + n <= LABEL_CHUNK {
            let want = (l.capacity() * 2).max(len + n).max(16).min(LABEL_CHUNK);
            l.reserve_exact(want - len);
            return last;
        }
        self.labels.push(Vec::with_capacity(n.max(LABEL_CHUNK)));
        last + 1
    }

    /// The number of the set of shared texts `s` (added the first time).
    fn shape(&mut self, s: Shape) -> u32 {
        // findings of many kinds come in turn (the gates of parts): the set last given with
        // the same most telling text (the message's tail, else its head, help or code) is
        // tried first, with no hashing
        let key = if s.tail != NONE {
            s.tail
        } else if s.head != NONE {
            s.head
        } else if s.help != NONE {
            s.help
        } else {
            s.code
        } as usize;
        if let Some(&id) = self.shape_hint.get(key) {
            if self.shapes.get(id as usize) == Some(&s) {
                return id;
            }
        }
        let h = rustc_hash::FxBuildHasher.hash_one(s);
        let shapes = &self.shapes;
        let id = match self.shape_index.find(h, |&i| shapes[i as usize] == s) {
            Some(&i) => i,
            None => {
                let i = self.shapes.len() as u32;
                self.shapes.push(s);
                let shapes = &self.shapes;
                self.shape_index.insert_unique(h, i, |&j| {
                    rustc_hash::FxBuildHasher.hash_one(shapes[j as usize])
                });
                i
            }
        };
        if self.shape_hint.len() <= key {
            self.shape_hint.resize(self.shared.len().max(key + 1), NONE);
        }
        self.shape_hint[key] = id;
        id
    }

    /// Ends a finding whose texts are written and whose places are gathered.
    fn finish(&mut self, texts: Texts, shape: Shape, severity: Severity) {
        let shape = self.shape(shape);
        let (first_label, labels) = self.put_labels_of(shape);
        self.end(texts, first_label, labels, shape, severity);
    }

    /// Writes the places gathered in `label_buf` for a finding of the set of shared texts
    /// `shape`, as [`DiagList::put_labels`] does; when they are the places last written for a
    /// finding of that set, those are given instead, and nothing is written. Gives where the
    /// first is and how many there are.
    fn put_labels_of(&mut self, shape: u32) -> (u32, u16) {
        let n = self.label_buf.len();
        if n == 0 {
            return (0, 0);
        }
        let shape = shape as usize;
        if let Some(&(last, count)) = self.shape_labels.get(shape) {
            if usize::from(count) == n {
                let piece = &self.labels[(last >> LABEL_SHIFT) as usize];
                let from = (last & ((1 << LABEL_SHIFT) - 1)) as usize;
                if piece[from..from + n] == self.label_buf[..] {
                    self.label_buf.clear();
                    return (last, count);
                }
            }
        }
        let (first, count) = self.put_labels();
        if self.shape_labels.len() <= shape {
            self.shape_labels
                .resize(self.shapes.len().max(shape + 1), (0, 0));
        }
        self.shape_labels[shape] = (first, count);
        (first, count)
    }

    /// Ends a finding whose texts and places are written (`shape`: the number of its set of
    /// shared texts).
    fn end(&mut self, texts: Texts, first_label: u32, labels: u16, shape: u32, severity: Severity) {
        let many = if texts.has_pins >> 12 & u16::from(REF_IN_PINS) != 0 {
            MANY_REF_LABELS
        } else {
            MANY_LABELS
        };
        let mut count = if labels >= many {
            // written after the finding's texts, the last in their piece
            put_len(
                &mut self.text[(texts.at >> TEXT_SHIFT) as usize],
                usize::from(labels),
            );
            many
        } else {
            labels
        };
        count |= texts.own << 7;
        let mut r = Rec {
            at: texts.at,
            first_label,
            shape,
            sev_labels: count,
            has_pins: texts.has_pins,
        };
        r.set_severity(severity);
        self.push_rec(r);
    }

    /// The number of the shared text `s` (added the first time it is given). `slot` says
    /// which of the remembered last texts to try first.
    fn share(&mut self, s: &str, owned: Option<&Text>, slot: usize) -> u32 {
        let key = (s.as_ptr() as usize, s.len());
        let (p, l, id) = self.last[slot];
        if (p, l) == key && id != 0 {
            return id - 1;
        }
        let id = self.intern(s, owned);
        // a text held by the list keeps its address: remember it by that
        if let Some(t) = owned.filter(|t| matches!(t, Text::Fixed(_))) {
            self.last[slot] = (t.as_ptr() as usize, t.len(), id + 1);
        } else {
            let held = &self.shared[id as usize];
            self.last[slot] = (held.as_ptr() as usize, held.len(), id + 1);
        }
        id
    }

    /// The number of the shared text `s`, found by content (added the first time).
    fn intern(&mut self, s: &str, owned: Option<&Text>) -> u32 {
        let h = hash(s);
        let shared = &self.shared;
        let id = match self.index.find(h, |&i| &*shared[i as usize] == s) {
            Some(&i) => i,
            None => {
                let i = self.shared.len() as u32;
                let t = match owned {
                    Some(t) => t.clone(),
                    None => Text::Shared(s.into()),
                };
                self.shared.push(t);
                let shared = &self.shared;
                self.index
                    .insert_unique(h, i, |&j| hash(&shared[j as usize]));
                i
            }
        };
        id
    }

    /// Shares `t` once in the list and gives its number, for the findings pushed with
    /// [`DiagList::push_shared`].
    pub fn share_id(&mut self, t: &Text) -> SharedId {
        if self.token == 0 {
            self.token = TOKENS.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
        }
        SharedId {
            list: self.token,
            id: self.intern(t, Some(t)),
        }
    }

    /// The number in this list of a text it gave out.
    fn shared_id(&self, s: SharedId) -> u32 {
        assert_eq!(s.list, self.token, "a shared text of another list");
        s.id
    }

    fn share_cow(&mut self, s: &Cow<'static, str>, slot: usize) -> u32 {
        match s {
            Cow::Borrowed(b) => self.share(b, Some(&Text::Fixed(b)), slot),
            Cow::Owned(o) => self.share(o, None, slot),
        }
    }

    /// Adds a finding at the end.
    pub fn push(&mut self, d: Diag) {
        self.push_parts(&d, &d.message, Around::default());
    }

    /// Adds `d` at the end with the message `around.head`, `message`, `around.tail`, the
    /// message of `d` left out: the parts shared by many findings are kept once.
    pub fn push_parts(&mut self, d: &Diag, message: &str, around: Around<'_>) {
        self.push_view(d.view(), message, around);
    }

    fn push_view(&mut self, d: DiagRef<'_>, message: &str, around: Around<'_>) {
        let texts = self.put_texts(message, d.net(), d.pin_text(), true);
        let head = around.head.map(|t| self.share(t, Some(t), 2));
        let tail = around.tail.map(|t| self.share(t, Some(t), 3));
        self.push_rest(d, texts, head.unwrap_or(NONE), tail.unwrap_or(NONE), NONE);
    }

    /// Ends [`DiagList::push_view`] and [`DiagList::push_pieces`]: the code, the help and the
    /// places of `d`, with its texts written and its message's shared parts given.
    fn push_rest(&mut self, d: DiagRef<'_>, texts: Texts, head: u32, tail: u32, joins: u32) {
        let code = match d.0 {
            Inner::One(one) => self.share_cow(&one.code, 0),
            Inner::In(..) => self.share(d.code(), None, 0),
        };
        let help = match d.0 {
            Inner::One(one) => one.help.as_ref().map(|h| self.share(h, Some(h), 1)),
            Inner::In(..) => d.help().map(|h| self.share(h, None, 1)),
        };
        match d.0 {
            Inner::One(one) => {
                for (k, l) in one.labels.iter().enumerate() {
                    let text = self.share_cow(&l.text, 4 + k.min(1));
                    self.push_label(l.span, text, l.primary);
                }
            }
            Inner::In(..) => {
                for (k, l) in d.labels().enumerate() {
                    let text = self.share(l.text, None, 4 + k.min(1));
                    self.push_label(l.span, text, l.primary);
                }
            }
        }
        let shape = Shape {
            code,
            help: help.unwrap_or(NONE),
            head,
            tail,
            joins,
        };
        self.finish(texts, shape, d.severity());
    }

    /// Adds `d` at the end with its message in `pieces`, the message of `d` left out: the
    /// words said alike by many findings (a part's pin and value, a net's rail) kept once in
    /// the list, the finding's own (a reference, a net's name) written with it. The pieces
    /// before the first of its own and after the last are the message's head and tail; those
    /// between are kept once as a list for all the findings that say them, and the own pieces
    /// are written one after another, the lengths of all but the last before them (as
    /// [`put_len`] writes a length). Empty pieces are left out and neighbours of one kind read
    /// as one.
    pub fn push_pieces(&mut self, d: &Diag, pieces: &[Piece<'_>]) {
        self.push_view_pieces(d.view(), pieces.iter().copied());
    }

    fn push_view_pieces<'p>(&mut self, d: DiagRef<'_>, pieces: impl Iterator<Item = Piece<'p>>) {
        let mut buf = std::mem::take(&mut self.piece_buf);
        let mut runs = std::mem::take(&mut self.piece_runs);
        buf.clear();
        runs.clear();
        for p in pieces {
            let (said, words) = match p {
                Piece::Own(w) => (false, w),
                Piece::Said(w) => (true, w),
            };
            if words.is_empty() {
                continue;
            }
            let from = buf.len() as u32;
            buf.push_str(words);
            match runs.last_mut() {
                Some(r) if r.0 == said => r.2 = buf.len() as u32,
                _ => runs.push((said, from, buf.len() as u32)),
            }
        }
        let words = |r: &(bool, u32, u32)| &buf[r.1 as usize..r.2 as usize];
        let mut mid = &runs[..];
        let head = match mid.first() {
            Some(r) if r.0 => {
                mid = &mid[1..];
                self.share(words(r), None, 2)
            }
            _ => NONE,
        };
        let tail = match mid.last() {
            Some(r) if r.0 => {
                mid = &mid[..mid.len() - 1];
                self.share(words(r), None, 3)
            }
            _ => NONE,
        };
        // `mid` is own words, then (words said alike, own words) pairs
        let mut own = std::mem::take(&mut self.own_buf);
        let mut joins = std::mem::take(&mut self.join_buf);
        own.clear();
        joins.clear();
        let texts = if mid.len() <= 1 {
            let message = mid.first().map_or("", words);
            self.put_texts(message, d.net(), d.pin_text(), true)
        } else {
            for r in mid.iter().step_by(2).take(mid.len() / 2) {
                put_len(&mut own, words(r).len());
            }
            for r in mid {
                if r.0 {
                    joins.push(self.intern(words(r), None));
                } else {
                    own.push_str(words(r));
                }
            }
            self.put_texts(&own, d.net(), d.pin_text(), false)
        };
        let join_set = if joins.is_empty() {
            NONE
        } else {
            self.join_set(&joins)
        };
        self.piece_buf = buf;
        self.piece_runs = runs;
        self.own_buf = own;
        self.join_buf = joins;
        self.push_rest(d, texts, head, tail, join_set);
    }

    /// The number of the list of words between the pieces of a message's own part (added the
    /// first time it is given).
    fn join_set(&mut self, ids: &[u32]) -> u32 {
        let (joins, sets) = (&self.joins, &self.join_sets);
        let set = |i: u32| {
            let (from, n) = sets[i as usize];
            &joins[from as usize..(from + n) as usize]
        };
        // findings of one kind come in a row: the last set given first
        if let Some(last) = sets.len().checked_sub(1) {
            if set(last as u32) == ids {
                return last as u32;
            }
        }
        let h = rustc_hash::FxBuildHasher.hash_one(ids);
        if let Some(&i) = self.join_index.find(h, |&i| set(i) == ids) {
            return i;
        }
        let i = self.join_sets.len() as u32;
        self.join_sets
            .push((self.joins.len() as u32, ids.len() as u32));
        self.joins.extend_from_slice(ids);
        let (joins, sets) = (&self.joins, &self.join_sets);
        self.join_index.insert_unique(h, i, |&j| {
            let (from, n) = sets[j as usize];
            rustc_hash::FxBuildHasher.hash_one(&joins[from as usize..(from + n) as usize])
        });
        i
    }

    /// Gathers a place of the finding being pushed.
    fn push_label(&mut self, span: Span, text: u32, primary: bool) {
        // more places than a record counts are left out (no finding has near so many)
        if self.label_buf.len() < usize::from(u16::MAX) {
            self.label_buf.push(LabelRec::new(span, text, primary));
        }
    }

    /// Adds a finding written straight into the list, with no diagnostic of its own made
    /// first: its pins each as pieces joined (`["U4", ".", "6"]`, holding no NUL), its places
    /// as (span, fixed words, primary).
    pub fn push_raw<'p>(
        &mut self,
        raw: Raw<'_>,
        pins: impl IntoIterator<Item = [&'p str; 3]>,
        labels: impl IntoIterator<Item = (Span, &'static str, bool)>,
    ) {
        let texts = self.put_raw_texts(raw.own, raw.net, pins);
        let code = self.share(raw.code, Some(&Text::Fixed(raw.code)), 0);
        let help = raw.help.map(|h| self.share(h, Some(h), 1));
        let head = raw.around.head.map(|t| self.share(t, Some(t), 2));
        let tail = raw.around.tail.map(|t| self.share(t, Some(t), 3));
        for (k, (span, text, primary)) in labels.into_iter().enumerate() {
            let text = self.share(text, Some(&Text::Fixed(text)), 4 + k.min(1));
            self.push_label(span, text, primary);
        }
        let shape = Shape {
            code,
            help: help.unwrap_or(NONE),
            head: head.unwrap_or(NONE),
            tail: tail.unwrap_or(NONE),
            joins: NONE,
        };
        self.finish(texts, shape, raw.severity);
    }

    /// Adds a finding written straight into the list as [`DiagList::push_raw`] does, its
    /// shared texts given by the numbers the list gave them ([`DiagList::share_id`]): no
    /// text is looked up.
    pub fn push_shared<'p>(
        &mut self,
        raw: RawShared<'_>,
        pins: impl IntoIterator<Item = [&'p str; 3]>,
        labels: impl IntoIterator<Item = (Span, SharedId, bool)>,
    ) {
        let texts = self.put_raw_texts(raw.own, raw.net, pins);
        let id = |s: Option<SharedId>| s.map_or(NONE, |s| self.shared_id(s));
        let shape = Shape {
            code: self.shared_id(raw.code),
            help: id(raw.help),
            head: id(raw.head),
            tail: id(raw.tail),
            joins: NONE,
        };
        let shape = self.shape(shape);
        // gathered first: findings of one kind of part on pins that are on no net have the
        // places the last of their kind had, and those are not written again
        for (span, text, primary) in labels {
            let text = self.shared_id(text);
            self.push_label(span, text, primary);
        }
        let (first_label, labels) = self.put_labels_of(shape);
        self.end(texts, first_label, labels, shape, raw.severity);
    }

    /// Writes the own texts of a finding written straight into the list: its own words, net
    /// and pins (each as pieces joined, gathered first in `pin_buf`).
    fn put_raw_texts<'p>(
        &mut self,
        own: &str,
        net: Option<&str>,
        pins: impl IntoIterator<Item = [&'p str; 3]>,
    ) -> Texts {
        // written straight into the last piece while they fit in it; otherwise (the piece
        // is full, or the pin list is long) gathered in `pin_buf` and written as a whole
        let net_text = net.unwrap_or("");
        let mut pins = pins.into_iter().peekable();
        // the own words are the first pin's reference (an unused gate's): only the pins are
        // written, the message read from their start
        let ref_in = net.is_none()
            && !own.is_empty()
            && own.len() <= usize::from(MANY_REF_LABELS)
            && pins
                .peek()
                .is_some_and(|p| std::ptr::eq(p[0], own) || p[0] == own);
        let own_text = if ref_in { "" } else { own };
        let mut need = own_text.len() + net_text.len();
        if !ref_in {
            need += len_size(own.len());
        }
        if net.is_some() {
            need += len_size(net_text.len());
        }
        let piece = self.text_room(need);
        let t = &mut self.text[piece];
        let at = t.len();
        if !ref_in {
            put_len(t, own.len());
        }
        if net.is_some() {
            put_len(t, net_text.len());
        }
        if !own_text.is_empty() {
            t.push_str(own_text);
        }
        if !net_text.is_empty() {
            t.push_str(net_text);
        }
        let pins_at = t.len();
        let (mut any, mut spilt) = (false, None);
        for p in pins.by_ref() {
            let need = usize::from(any) + p[0].len() + p[1].len() + p[2].len();
            if t.len() + need > t.capacity() || t.len() + need - pins_at >= PINS_MAX {
                spilt = Some(p);
                break;
            }
            if any {
                t.push(super::PIN_SEP);
            }
            any = true;
            for x in p {
                t.push_str(x);
            }
        }
        if spilt.is_none() {
            let has = net.map_or(0, |_| HAS_NET)
                | if any { HAS_PINS } else { 0 }
                | if ref_in { REF_IN_PINS } else { 0 };
            return Texts::new(piece, at, has, t.len() - pins_at, own.len());
        }
        let mut buf = std::mem::take(&mut self.pin_buf);
        buf.clear();
        buf.push_str(&t[pins_at..]);
        t.truncate(at);
        for p in spilt.into_iter().chain(pins) {
            if any {
                buf.push(super::PIN_SEP);
            }
            any = true;
            for x in p {
                buf.push_str(x);
            }
        }
        let texts = self.put_texts(own, net, any.then_some(buf.as_str()), true);
        self.pin_buf = buf;
        texts
    }

    /// Adds a copy of a finding read from another list (or a single one).
    pub fn push_ref(&mut self, d: DiagRef<'_>) {
        let parts = d.message_parts();
        if parts.three().is_none() {
            // its own words in pieces: given as they are read
            let mut i = 0;
            self.push_view_pieces(
                d,
                parts.iter().map(|p| {
                    // head, own, said, own ... own, tail
                    i += 1;
                    if i % 2 == 0 {
                        Piece::Own(p)
                    } else {
                        Piece::Said(p)
                    }
                }),
            );
            return;
        }
        let message = d.own_message();
        let around_head = d.head().map(|s| Text::Shared(s.into()));
        let around_tail = d.tail().map(|s| Text::Shared(s.into()));
        self.push_view(
            d,
            message,
            Around {
                head: around_head.as_ref(),
                tail: around_tail.as_ref(),
            },
        );
    }

    /// The finding at `i`.
    pub fn get(&self, i: usize) -> Option<DiagRef<'_>> {
        (i < self.len).then(|| DiagRef::in_list(self, self.rec(i)))
    }

    /// The findings, in order.
    pub fn iter(&self) -> Iter<'_> {
        Iter {
            list: self,
            front: 0,
            back: self.len,
        }
    }

    /// The findings as single diagnostics of their own, each copied out.
    pub fn to_vec(&self) -> Vec<Diag> {
        self.iter().map(|d| d.to_diag()).collect()
    }

    /// Sets the severity of the findings from `from` on.
    pub fn set_severity_from(&mut self, from: usize, severity: Severity) {
        for i in from..self.len {
            self.rec_mut(i).set_severity(severity);
        }
    }

    /// Keeps the findings `keep` says yes to, in order.
    pub fn retain(&mut self, mut keep: impl FnMut(DiagRef<'_>) -> bool) {
        // the kept records are moved down in place
        let mut kept = 0;
        for i in 0..self.len {
            if keep(DiagRef::in_list(self, self.rec(i))) {
                let r = *self.rec(i);
                *self.rec_mut(kept) = r;
                kept += 1;
            }
        }
        self.len = kept;
        self.recs.truncate(kept.div_ceil(REC_CHUNK));
        let pieces = self.recs.len();
        if let Some(last) = self.recs.last_mut() {
            last.truncate(kept - (pieces - 1) * REC_CHUNK);
        }
    }

    /// Puts the findings of `first` before this list's.
    pub fn prepend(&mut self, first: impl IntoIterator<Item = Diag>) {
        let at = self.len;
        for d in first {
            self.push(d);
        }
        let added = self.len - at;
        if added == 0 {
            return;
        }
        // the new records (few: the model's diagnostics) set aside, the others moved up by
        // their count in one pass from the end, and the new ones put first: each record is
        // read and written once, in memory order
        let new: Vec<Rec> = (at..self.len).map(|i| *self.rec(i)).collect();
        for i in (0..at).rev() {
            *self.rec_mut(i + added) = *self.rec(i);
        }
        for (i, r) in new.into_iter().enumerate() {
            *self.rec_mut(i) = r;
        }
    }

    /// Sorts the findings by `keys`, one a finding and all different, each record moved with
    /// its key (`keys` ends sorted). A radix sort on the keys' top bits, eight at a time, in
    /// place: each pass counts the keys of a range by their next eight bits and moves every
    /// record into its group by swaps, so the writes go to 256 places that each advance in
    /// memory order, never to one place at random per record as a permutation by cycles
    /// does; each pass takes as many bits as make groups of about 16, up to eight, and a
    /// group of [`SORT_SMALL`] or fewer is sorted whole by insertion.
    pub(crate) fn sort_by_keys(&mut self, keys: &mut [u64]) {
        self.sort_by_keys_small(keys, SORT_SMALL);
    }

    /// [`DiagList::sort_by_keys`] with groups of up to `small` sorted whole (the tests sort
    /// small lists by passes too).
    fn sort_by_keys_small(&mut self, keys: &mut [u64], small: usize) {
        assert_eq!(keys.len(), self.len, "a key a finding");
        let bits = 64 - keys.iter().fold(0, |a, &k| a | k).leading_zeros();
        let mut buf = Vec::new();
        self.sort_range(keys, 0, bits, (small, &mut buf));
    }

    /// [`DiagList::sort_by_keys`] of the records from `from` on, whose keys are `keys`, all
    /// alike above their lowest `bits` bits; a group of up to `small.0` sorted whole in
    /// `small.1`.
    fn sort_range(
        &mut self,
        keys: &mut [u64],
        from: usize,
        bits: u32,
        small: (usize, &mut Vec<(u64, Rec)>),
    ) {
        let (most, buf) = small;
        if keys.len() <= most || bits == 0 {
            let small = buf;
            small.clear();
            // the records read and written as one slice when they lie in one piece
            let (piece, at) = (from / REC_CHUNK, from % REC_CHUNK);
            if at + keys.len() <= REC_CHUNK && keys.len() <= SORT_INSERT {
                // a few: each put in its place among those before it
                let recs = &mut self.recs[piece][at..at + keys.len()];
                for i in 1..keys.len() {
                    let (k, r) = (keys[i], recs[i]);
                    let mut j = i;
                    while j > 0 && keys[j - 1] > k {
                        keys[j] = keys[j - 1];
                        recs[j] = recs[j - 1];
                        j -= 1;
                    }
                    keys[j] = k;
                    recs[j] = r;
                }
            } else if at + keys.len() <= REC_CHUNK {
                let recs = &mut self.recs[piece][at..at + keys.len()];
                small.extend(keys.iter().copied().zip(recs.iter().copied()));
                small.sort_unstable_by_key(|e| e.0);
                for ((k, r), &(sk, sr)) in keys.iter_mut().zip(recs).zip(small.iter()) {
                    (*k, *r) = (sk, sr);
                }
            } else {
                small.extend(
                    keys.iter()
                        .enumerate()
                        .map(|(i, &k)| (k, *self.rec(from + i))),
                );
                small.sort_unstable_by_key(|e| e.0);
                for (i, &(k, r)) in small.iter().enumerate() {
                    keys[i] = k;
                    *self.rec_mut(from + i) = r;
                }
            }
            return;
        }
        // as many bits as make groups of about 16, up to eight (256 groups)
        let width = (usize::BITS - (keys.len() / 16).leading_zeros())
            .clamp(1, 8)
            .min(bits);
        let shift = bits - width;
        let groups = 1usize << width;
        let group = |k: u64| ((k >> shift) as usize) & (groups - 1);
        let mut count = [0usize; 256];
        for &k in keys.iter() {
            count[group(k)] += 1;
        }
        // each group's next free place and its end
        let (mut next, mut end) = ([0usize; 256], [0usize; 256]);
        let mut at = 0;
        for g in 0..groups {
            next[g] = at;
            at += count[g];
            end[g] = at;
        }
        for g in 0..groups {
            while next[g] < end[g] {
                // the key at the group's next place is carried to its own group's next
                // place, and the one there taken up in turn, until one of this group is held
                let mut k = keys[next[g]];
                let mut r = *self.rec(from + next[g]);
                loop {
                    let to = group(k);
                    if to == g {
                        break;
                    }
                    let p = next[to];
                    next[to] += 1;
                    std::mem::swap(&mut k, &mut keys[p]);
                    std::mem::swap(&mut r, self.rec_mut(from + p));
                }
                keys[next[g]] = k;
                *self.rec_mut(from + next[g]) = r;
                next[g] += 1;
            }
        }
        let mut start = 0;
        for &n in &count[..groups] {
            if n > 1 {
                self.sort_range(
                    &mut keys[start..start + n],
                    from + start,
                    shift,
                    (most, buf),
                );
            }
            start += n;
        }
    }

    /// Rearranges the findings so that the finding at `i` is the one that was at `order[i]`
    /// (`order` a permutation; it is used up).
    #[cfg(test)]
    pub(crate) fn apply_order(&mut self, order: &mut [u64]) {
        assert_eq!(order.len(), self.len, "an order of every finding");
        self.apply_order_at(0, order);
    }

    /// Rearranges the findings from `start` on, as many as `order` holds, so that the finding
    /// at `start + i` is the one that was at `start + order[i]` (`order` a permutation; it is
    /// used up).
    pub(crate) fn apply_order_at(&mut self, start: usize, order: &mut [u64]) {
        const DONE: u64 = u64::MAX;
        for i in 0..order.len() {
            if order[i] == DONE {
                continue;
            }
            let mut cur = i;
            loop {
                let next = std::mem::replace(&mut order[cur], DONE) as usize;
                if next == i {
                    break;
                }
                self.swap(start + cur, start + next);
                cur = next;
            }
        }
    }

    /// The list held to its length (it is kept to the end of the run).
    pub fn shrink_to_fit(&mut self) {
        // only the last pieces have room left (a finding that did not fit in a piece started
        // a new one, and the others are full but for less than a finding); the allocator
        // gives the end of a block back in place
        if let Some(r) = self.recs.last_mut() {
            r.shrink_to_fit();
        }
        if let Some(l) = self.labels.last_mut() {
            l.shrink_to_fit();
        }
        if let Some(t) = self.text.last_mut() {
            t.shrink_to_fit();
        }
        self.recs.shrink_to_fit();
        self.labels.shrink_to_fit();
        self.text.shrink_to_fit();
        self.shapes.shrink_to_fit();
        // the places of the findings pushed after this are not looked for among these
        self.shape_labels = Vec::new();
        self.joins.shrink_to_fit();
        self.join_sets.shrink_to_fit();
        self.piece_buf = String::new();
        self.piece_runs = Vec::new();
        self.own_buf = String::new();
        self.join_buf = Vec::new();
        self.pin_buf = String::new();
        self.label_buf = Vec::new();
    }

    /// The bytes the list holds, for measuring.
    pub fn heap_bytes(&self) -> usize {
        self.recs.iter().map(|r| r.capacity()).sum::<usize>() * size_of::<Rec>()
            + self.labels.iter().map(|l| l.capacity()).sum::<usize>() * size_of::<LabelRec>()
            + self.text.iter().map(|t| t.capacity()).sum::<usize>()
            + self.shared.capacity() * size_of::<Text>()
            + self.index.capacity() * size_of::<u32>()
            + self.shapes.capacity() * size_of::<Shape>()
            + self.shape_index.capacity() * size_of::<u32>()
            + self.shape_hint.capacity() * size_of::<u32>()
            + self.shape_labels.capacity() * size_of::<(u32, u16)>()
            + self.joins.capacity() * size_of::<u32>()
            + self.join_sets.capacity() * size_of::<(u32, u32)>()
            + self.join_index.capacity() * size_of::<u32>()
            + self.piece_buf.capacity()
            + self.own_buf.capacity()
            + self.pin_buf.capacity()
            + self.label_buf.capacity() * size_of::<LabelRec>()
    }
}

impl std::fmt::Debug for DiagList {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_list().entries(self.iter()).finish()
    }
}

impl PartialEq for DiagList {
    fn eq(&self, other: &DiagList) -> bool {
        self.len() == other.len() && self.iter().zip(other.iter()).all(|(a, b)| a == b)
    }
}

impl FromIterator<Diag> for DiagList {
    fn from_iter<I: IntoIterator<Item = Diag>>(iter: I) -> DiagList {
        let mut l = DiagList::new();
        for d in iter {
            l.push(d);
        }
        l
    }
}

impl From<Vec<Diag>> for DiagList {
    fn from(v: Vec<Diag>) -> DiagList {
        v.into_iter().collect()
    }
}

impl Extend<Diag> for DiagList {
    fn extend<I: IntoIterator<Item = Diag>>(&mut self, iter: I) {
        for d in iter {
            self.push(d);
        }
    }
}

/// The findings as single diagnostics of their own, each copied out (for tools and tests:
/// a report reads the list through [`DiagList::iter`]).
impl IntoIterator for DiagList {
    type Item = Diag;
    type IntoIter = std::vec::IntoIter<Diag>;
    fn into_iter(self) -> Self::IntoIter {
        self.to_vec().into_iter()
    }
}

impl<'a> IntoIterator for &'a DiagList {
    type Item = DiagRef<'a>;
    type IntoIter = Iter<'a>;
    fn into_iter(self) -> Iter<'a> {
        self.iter()
    }
}

/// The findings of a [`DiagList`], in order.
#[derive(Clone)]
pub struct Iter<'a> {
    list: &'a DiagList,
    front: usize,
    back: usize,
}

impl<'a> Iterator for Iter<'a> {
    type Item = DiagRef<'a>;
    fn next(&mut self) -> Option<DiagRef<'a>> {
        if self.front == self.back {
            return None;
        }
        self.front += 1;
        Some(DiagRef::in_list(self.list, self.list.rec(self.front - 1)))
    }
    fn size_hint(&self) -> (usize, Option<usize>) {
        (self.back - self.front, Some(self.back - self.front))
    }
}

impl ExactSizeIterator for Iter<'_> {}

impl<'a> DoubleEndedIterator for Iter<'a> {
    fn next_back(&mut self) -> Option<DiagRef<'a>> {
        if self.front == self.back {
            return None;
        }
        self.back -= 1;
        Some(DiagRef::in_list(self.list, self.list.rec(self.back)))
    }
}

/// One finding, read: from a [`DiagList`] or a single [`Diag`] alike.
#[derive(Clone, Copy)]
pub struct DiagRef<'a>(Inner<'a>);

#[derive(Clone, Copy)]
enum Inner<'a> {
    One(&'a Diag),
    In(&'a DiagList, &'a Rec),
}

/// The parts of a finding's message, read ([`DiagRef::message_parts`]): the head, the
/// finding's own words and the tail; own words in pieces have the words said between them.
#[derive(Debug, Clone, Copy)]
pub struct MessageParts<'a> {
    head: &'a str,
    /// The own words; in pieces, the lengths of all but the last piece before them.
    own: &'a str,
    tail: &'a str,
    /// The words between the pieces, as numbers in `shared` (none: one piece).
    joins: &'a [u32],
    shared: &'a [Text],
}

impl<'a> MessageParts<'a> {
    /// The head, own words and tail, when the own words are one piece.
    #[inline]
    pub fn three(&self) -> Option<[&'a str; 3]> {
        self.joins
            .is_empty()
            .then_some([self.head, self.own, self.tail])
    }

    /// Every part in order: the head, the own pieces with the words between them, the tail.
    pub fn iter(&self) -> PartsIter<'a> {
        // the own pieces' words start after their lengths
        let mut data = 0;
        for _ in self.joins {
            get_len(self.own.as_bytes(), &mut data);
        }
        PartsIter {
            parts: *self,
            step: 0,
            lens: 0,
            data,
        }
    }
}

/// The parts of a message in order ([`MessageParts::iter`]).
#[derive(Debug, Clone)]
pub struct PartsIter<'a> {
    parts: MessageParts<'a>,
    /// 0: the head; then the own pieces and the words between them, each in turn; then the
    /// tail.
    step: usize,
    /// Where the next own piece's length and words are in the own words.
    lens: usize,
    data: usize,
}

impl<'a> Iterator for PartsIter<'a> {
    type Item = &'a str;
    fn next(&mut self) -> Option<&'a str> {
        let p = &self.parts;
        let k = p.joins.len();
        let step = self.step;
        self.step += 1;
        if step == 0 {
            return Some(p.head);
        }
        let i = step - 1;
        if i > 2 * k + 1 {
            return None;
        }
        if i == 2 * k + 1 {
            return Some(p.tail);
        }
        if i % 2 == 1 {
            return Some(&p.shared[p.joins[i / 2] as usize]);
        }
        if k == 0 {
            return Some(p.own);
        }
        let from = self.data;
        if i / 2 == k {
            // the last piece: the rest
            self.data = p.own.len();
        } else {
            self.data += get_len(p.own.as_bytes(), &mut self.lens);
        }
        Some(&p.own[from..self.data])
    }
}

/// Orders the texts made of the parts `a` and `b` give as the texts themselves are ordered
/// (byte by byte), with no text made; as [`cmp_parts`], for messages of any number of parts.
pub fn cmp_part_lists<'x>(
    mut a: impl Iterator<Item = &'x str>,
    mut b: impl Iterator<Item = &'x str>,
) -> std::cmp::Ordering {
    let (mut x, mut y): (&[u8], &[u8]) = (b"", b"");
    loop {
        while x.is_empty() {
            match a.next() {
                Some(p) => x = p.as_bytes(),
                None => break,
            }
        }
        while y.is_empty() {
            match b.next() {
                Some(p) => y = p.as_bytes(),
                None => break,
            }
        }
        match (x.is_empty(), y.is_empty()) {
            (true, true) => return std::cmp::Ordering::Equal,
            (true, false) => return std::cmp::Ordering::Less,
            (false, true) => return std::cmp::Ordering::Greater,
            _ => {}
        }
        // one text on both sides (the shared words of findings alike): passed over unread
        if std::ptr::eq(x, y) {
            (x, y) = (b"", b"");
            continue;
        }
        let n = x.len().min(y.len());
        match x[..n].cmp(&y[..n]) {
            std::cmp::Ordering::Equal => {}
            other => return other,
        }
        x = &x[n..];
        y = &y[n..];
    }
}

/// A place of a finding, read.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct LabelRef<'a> {
    pub span: Span,
    pub text: &'a str,
    pub primary: bool,
}

impl<'a> From<&'a Diag> for DiagRef<'a> {
    fn from(d: &'a Diag) -> DiagRef<'a> {
        DiagRef(Inner::One(d))
    }
}

impl<'a> DiagRef<'a> {
    /// The finding of `list` whose record is `r`.
    fn in_list(list: &'a DiagList, r: &'a Rec) -> DiagRef<'a> {
        DiagRef(Inner::In(list, r))
    }

    /// A finding's own texts in the list: its piece of text, where the message's own part,
    /// the net and the pin list start in it, and their lengths (0 for none).
    #[inline]
    fn own(list: &'a DiagList, r: &Rec) -> (&'a str, [usize; 3], [usize; 3]) {
        let text = &list.text[r.piece()];
        let b = text.as_bytes();
        let at = r.offset();
        let has = r.has();
        let p = usize::from(r.has_pins & 0x0fff);
        if has & (REF_IN_PINS | LONG) == REF_IN_PINS {
            // an unused gate's: its pin list alone, its reference at its start
            let m = usize::from((r.sev_labels >> 7) & MANY_REF_LABELS);
            return (text, [at, at, at], [m, 0, p]);
        }
        if has & (REF_IN_PINS | LONG | HAS_NET) == 0 && b[at] < 0x40 {
            // a message of fewer than 64 bytes, no net
            let m = usize::from(b[at]);
            return (text, [at + 1, at + 1 + m, at + 1 + m], [m, 0, p]);
        }
        Self::own_slow(text, r)
    }

    /// [`DiagRef::own`] for the other findings.
    fn own_slow(text: &'a str, r: &Rec) -> (&'a str, [usize; 3], [usize; 3]) {
        let b = text.as_bytes();
        let mut at = r.offset();
        let has = r.has();
        let short = |at: &mut usize| {
            let x = b[*at];
            if x < 0x40 {
                *at += 1;
                usize::from(x)
            } else {
                get_len(b, at)
            }
        };
        let m = if has & REF_IN_PINS != 0 {
            0
        } else {
            short(&mut at)
        };
        let n = if has & HAS_NET != 0 {
            short(&mut at)
        } else {
            0
        };
        let p = if has & HAS_PINS == 0 {
            0
        } else if has & LONG != 0 {
            get_len(b, &mut at)
        } else {
            usize::from(r.has_pins & 0x0fff)
        };
        if has & REF_IN_PINS != 0 {
            let m = usize::from((r.sev_labels >> 7) & MANY_REF_LABELS);
            return (text, [at, at, at], [m, 0, p]);
        }
        (text, [at, at + m, at + m + n], [m, n, p])
    }

    /// How many places the finding has.
    #[inline]
    fn label_count(list: &'a DiagList, r: &Rec) -> usize {
        match r.labels() {
            (n, false) => n,
            _ => Self::many_labels(list, r),
        }
    }

    /// [`DiagRef::label_count`] of a finding whose count is written after its texts.
    #[cold]
    fn many_labels(list: &'a DiagList, r: &Rec) -> usize {
        let (text, starts, lens) = Self::own(list, r);
        let mut end = starts[2] + lens[2];
        if r.has() & HAS_PINS == 0 {
            end = starts[1] + lens[1];
        }
        get_len(text.as_bytes(), &mut end)
    }

    fn shape(list: &'a DiagList, r: &Rec) -> Shape {
        list.shapes[r.shape as usize]
    }

    fn shared(list: &'a DiagList, id: u32) -> Option<&'a str> {
        (id != NONE).then(|| &*list.shared[id as usize])
    }

    /// Stable kebab-case id, e.g. `unclosed-list` or `floating-cmos-input`.
    #[inline]
    pub fn code(&self) -> &'a str {
        match self.0 {
            Inner::One(d) => &d.code,
            Inner::In(l, r) => &l.shared[Self::shape(l, r).code as usize],
        }
    }

    #[inline]
    pub fn severity(&self) -> Severity {
        match self.0 {
            Inner::One(d) => d.severity,
            Inner::In(_, r) => r.severity(),
        }
    }

    /// The finding's own words of the message (without the parts it shares).
    #[inline]
    fn own_message(&self) -> &'a str {
        match self.0 {
            Inner::One(d) => &d.message,
            Inner::In(l, r) => {
                let (text, [at, _, _], [m, _, _]) = Self::own(l, r);
                &text[at..at + m]
            }
        }
    }

    #[inline]
    fn head(&self) -> Option<&'a str> {
        match self.0 {
            Inner::One(_) => None,
            Inner::In(l, r) => Self::shared(l, Self::shape(l, r).head),
        }
    }

    #[inline]
    fn tail(&self) -> Option<&'a str> {
        match self.0 {
            Inner::One(_) => None,
            Inner::In(l, r) => Self::shared(l, Self::shape(l, r).tail),
        }
    }

    /// The words between the pieces of the message's own part (none: it is one piece).
    #[inline]
    fn joins(&self) -> &'a [u32] {
        match self.0 {
            Inner::One(_) => &[],
            Inner::In(l, r) => match Self::shape(l, r).joins {
                NONE => &[],
                i => {
                    let (from, n) = l.join_sets[i as usize];
                    &l.joins[from as usize..(from + n) as usize]
                }
            },
        }
    }

    /// The message, with the numbers.
    pub fn message(&self) -> Cow<'a, str> {
        let own = self.own_message();
        let (head, tail) = (self.head(), self.tail());
        if !self.joins().is_empty() {
            let parts = self.message_parts().iter();
            let mut m = String::with_capacity(parts.clone().map(str::len).sum());
            parts.for_each(|p| m.push_str(p));
            return Cow::Owned(m);
        }
        if head.is_none() && tail.is_none() {
            return Cow::Borrowed(own);
        }
        let (head, tail) = (head.unwrap_or(""), tail.unwrap_or(""));
        let mut m = String::with_capacity(head.len() + own.len() + tail.len());
        m.push_str(head);
        m.push_str(own);
        m.push_str(tail);
        Cow::Owned(m)
    }

    /// The message's parts in order (their concatenation is [`DiagRef::message`]).
    pub fn message_parts(&self) -> MessageParts<'a> {
        let shared: &'a [Text] = match self.0 {
            Inner::One(_) => &[],
            Inner::In(l, _) => &l.shared,
        };
        MessageParts {
            head: self.head().unwrap_or(""),
            own: self.own_message(),
            tail: self.tail().unwrap_or(""),
            joins: self.joins(),
            shared,
        }
    }

    /// The places; the first primary one is the finding's location.
    #[inline]
    pub fn labels(&self) -> Labels<'a> {
        match self.0 {
            Inner::One(d) => Labels(LabelsInner::One(d.labels.iter())),
            Inner::In(l, r) if r.labels().0 == 0 => Labels(LabelsInner::In(l, [].iter())),
            Inner::In(l, r) => {
                let piece = &l.labels[(r.first_label >> LABEL_SHIFT) as usize];
                let from = (r.first_label & ((1 << LABEL_SHIFT) - 1)) as usize;
                Labels(LabelsInner::In(
                    l,
                    piece[from..from + Self::label_count(l, r)].iter(),
                ))
            }
        }
    }

    #[inline]
    pub fn help(&self) -> Option<&'a str> {
        match self.0 {
            Inner::One(d) => d.help.as_deref(),
            Inner::In(l, r) => Self::shared(l, Self::shape(l, r).help),
        }
    }

    /// The net the finding is about, by name.
    #[inline]
    pub fn net(&self) -> Option<&'a str> {
        match self.0 {
            Inner::One(d) => d.net.as_deref(),
            Inner::In(l, r) => (r.has() & HAS_NET != 0).then(|| {
                let (text, [_, at, _], [_, n, _]) = Self::own(l, r);
                &text[at..at + n]
            }),
        }
    }

    /// The net ([`DiagRef::net`]) and the pins' names as the finding holds them, joined by
    /// NUL bytes (no name holds one), read together.
    #[inline]
    pub fn net_and_pins_joined(&self) -> (Option<&'a str>, Option<&'a str>) {
        match self.0 {
            Inner::One(d) => (d.net.as_deref(), d.pins.0.as_deref()),
            Inner::In(l, r) => {
                let has = r.has();
                if has & (HAS_NET | HAS_PINS) == 0 {
                    return (None, None);
                }
                let (text, [_, n_at, p_at], [_, n, p]) = Self::own(l, r);
                (
                    (has & HAS_NET != 0).then(|| &text[n_at..n_at + n]),
                    (has & HAS_PINS != 0).then(|| &text[p_at..p_at + p]),
                )
            }
        }
    }

    #[inline]
    fn pin_text(&self) -> Option<&'a str> {
        match self.0 {
            Inner::One(d) => d.pins.0.as_deref(),
            Inner::In(l, r) => (r.has() & HAS_PINS != 0).then(|| {
                let (text, [_, _, at], [_, _, p]) = Self::own(l, r);
                &text[at..at + p]
            }),
        }
    }

    /// The pins involved, as `REF.PIN`, the offending one first.
    #[inline]
    pub fn pins(&self) -> Pins<'a> {
        Pins(self.pin_text())
    }

    /// True when the finding names any pin.
    #[inline]
    pub fn has_pins(&self) -> bool {
        self.pin_text().is_some()
    }

    /// The primary span, if any.
    pub fn primary_span(&self) -> Option<Span> {
        let mut first = None;
        for l in self.labels() {
            if l.primary {
                return Some(l.span);
            }
            first = first.or(Some(l.span));
        }
        first
    }

    /// The finding as a single diagnostic of its own.
    pub fn to_diag(&self) -> Diag {
        if let Inner::One(d) = self.0 {
            return d.clone();
        }
        let mut d = Diag::new(
            Cow::Owned(self.code().to_string()),
            self.severity(),
            self.message().into_owned(),
        );
        d.labels = self
            .labels()
            .map(|l| Label {
                span: l.span,
                text: Cow::Owned(l.text.to_string()),
                primary: l.primary,
            })
            .collect();
        d.help = self.help().map(|h| Text::Shared(h.into()));
        d.net = self.net().map(Into::into);
        d.pins = super::PinList(self.pin_text().map(Into::into));
        d
    }
}

impl PartialEq for DiagRef<'_> {
    fn eq(&self, o: &DiagRef<'_>) -> bool {
        self.code() == o.code()
            && self.severity() == o.severity()
            && self.message() == o.message()
            && self.labels().eq(o.labels())
            && self.help() == o.help()
            && self.net() == o.net()
            && self.pin_text() == o.pin_text()
    }
}

impl std::fmt::Debug for DiagRef<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Diag")
            .field("code", &self.code())
            .field("severity", &self.severity())
            .field("message", &self.message())
            .field("labels", &self.labels().collect::<Vec<_>>())
            .field("help", &self.help())
            .field("net", &self.net())
            .field("pins", &self.pins().collect::<Vec<_>>())
            .finish()
    }
}

/// The places of a finding, in order.
#[derive(Clone)]
pub struct Labels<'a>(LabelsInner<'a>);

#[derive(Clone)]
enum LabelsInner<'a> {
    One(std::slice::Iter<'a, Label>),
    In(&'a DiagList, std::slice::Iter<'a, LabelRec>),
}

impl<'a> Iterator for Labels<'a> {
    type Item = LabelRef<'a>;
    fn next(&mut self) -> Option<LabelRef<'a>> {
        match &mut self.0 {
            LabelsInner::One(it) => it.next().map(|l| LabelRef {
                span: l.span,
                text: &l.text,
                primary: l.primary,
            }),
            LabelsInner::In(list, it) => it.next().map(|l| LabelRef {
                span: l.span,
                text: &list.shared[l.text() as usize],
                primary: l.primary(),
            }),
        }
    }
    fn size_hint(&self) -> (usize, Option<usize>) {
        match &self.0 {
            LabelsInner::One(it) => it.size_hint(),
            LabelsInner::In(_, it) => it.size_hint(),
        }
    }
}

impl ExactSizeIterator for Labels<'_> {}

#[cfg(test)]
mod tests {
    use super::Piece::{Own, Said};
    use super::*;

    // invented codes, held in constants so that no code is named where a finding is made
    const A: &str = "code-a";
    const B: &str = "code-b";

    /// A finding held in a list costs its record and its places, and no allocation.
    #[test]
    fn records_stay_small() {
        assert!(size_of::<Rec>() <= 16, "{}", size_of::<Rec>());
        assert!(size_of::<LabelRec>() <= 12, "{}", size_of::<LabelRec>());
        assert!(size_of::<DiagRef>() <= 24);
    }

    fn sample(i: usize) -> Diag {
        let d = Diag::warning(
            if i.is_multiple_of(2) { A } else { B },
            format!("message {i}"),
        )
        .at(Span::new(i, i + 1), "first")
        .also(Span::new(i + 2, i + 3), Cow::Owned(format!("made {i}")));
        let d = if i.is_multiple_of(3) {
            d.on_net(format!("N{i}"))
        } else {
            d
        };
        let d = if i.is_multiple_of(4) {
            d.with_help("fixed help")
        } else {
            d.with_help(format!("help {}", i % 2))
        };
        if i.is_multiple_of(5) {
            d
        } else {
            d.with_pins([format!("U{i}.1"), String::new(), format!("R{i}.2")])
        }
    }

    #[test]
    fn a_finding_reads_back_as_it_was_pushed() {
        let all: Vec<Diag> = (0..40).map(sample).collect();
        let list: DiagList = all.iter().cloned().collect();
        assert_eq!(list.len(), all.len());
        for (d, r) in all.iter().zip(list.iter()) {
            assert_eq!(DiagRef::from(d), r);
            assert_eq!(r.to_diag().view(), d.view());
            assert_eq!(r.code(), &*d.code);
            assert_eq!(r.message(), &*d.message);
            assert_eq!(r.net(), d.net.as_deref());
            assert_eq!(r.help(), d.help.as_deref());
            assert_eq!(r.pins().collect::<Vec<_>>(), d.pins().collect::<Vec<_>>());
            assert_eq!(r.has_pins(), d.has_pins());
            assert_eq!(r.primary_span(), d.primary_span());
            let texts: Vec<&str> = r.labels().map(|l| l.text).collect();
            let want: Vec<&str> = d.labels.iter().map(|l| &*l.text).collect();
            assert_eq!(texts, want);
        }
        // texts said alike are held once: two codes, two label words and 20 made ones, and
        // three helps
        assert_eq!(list.shared.len(), 2 + 1 + 40 + 3);
        // copied from one list to another, the same
        let mut copy = DiagList::new();
        for r in list.iter().rev() {
            copy.push_ref(r);
        }
        assert!(copy.iter().rev().eq(list.iter()));
    }

    /// Every way into the list (a `Diag`, a finding written straight in, one with shared
    /// numbers, a copy from another list) reads back as the `Diag` it stands for: short
    /// findings, findings with a message, net or pin list of 65 535 bytes or more (their
    /// lengths written before their words), and findings whose pins do not fit in what is left
    /// of a piece. No piece grows past the size it was made with, but a piece made for one
    /// finding larger than a whole piece.
    #[test]
    fn every_way_in_reads_back_as_the_finding_it_stands_for() {
        let long = |c: &str, n: usize| c.repeat(n);
        let mut list = DiagList::new();
        let code = list.share_id(&Text::Fixed(A));
        let (head, tail) = (
            list.share_id(&Text::Fixed("gate A of ")),
            list.share_id(&Text::from(String::from(" is unused"))),
        );
        let (first, other) = (
            list.share_id(&Text::Fixed("unused gate")),
            list.share_id(&Text::Fixed("")),
        );
        let mut want = Vec::new();
        for i in 0..200usize {
            // own words, net and pins: short mostly, long now and then, in every mix
            let own = if i % 37 == 3 {
                long("o", 70_000)
            } else {
                format!("U{i}")
            };
            let net = match i % 5 {
                0 => None,
                1 if i % 3 == 0 => Some(long("n", 66_000)),
                _ => Some(format!("N{i}")),
            };
            let pin_count = if i % 23 == 5 { 10_000 } else { i % 4 };
            let pins: Vec<String> = (0..pin_count).map(|k| format!("{own}.{k}")).collect();
            let spans = [Span::new(i, i + 1), Span::new(i + 5, i + 9)];
            let mut d = Diag::error(A, format!("gate A of {own} is unused"))
                .at(spans[0], "unused gate")
                .also(spans[1], "")
                .with_pins(&pins);
            if let Some(n) = &net {
                d = d.on_net(n.clone());
            }
            match i % 4 {
                0 => list.push_shared(
                    RawShared {
                        code,
                        severity: Severity::Error,
                        head: Some(head),
                        own: &own,
                        tail: Some(tail),
                        help: None,
                        net: net.as_deref(),
                    },
                    pins.iter().map(|p| {
                        let (r, n) = p.split_once('.').unwrap();
                        [r, ".", n]
                    }),
                    // an iterator that does not tell its length, now and then
                    [(spans[0], first, true), (spans[1], other, false)]
                        .into_iter()
                        .filter(|_| true)
                        .take(if i % 8 == 0 { 2 } else { usize::MAX }),
                ),
                1 => list.push_raw(
                    Raw {
                        code: A,
                        severity: Severity::Error,
                        around: Around {
                            head: Some(&Text::Fixed("gate A of ")),
                            tail: Some(&Text::Fixed(" is unused")),
                        },
                        own: &own,
                        help: None,
                        net: net.as_deref(),
                    },
                    pins.iter().map(|p| {
                        let (r, n) = p.split_once('.').unwrap();
                        [r, ".", n]
                    }),
                    [(spans[0], "unused gate", true), (spans[1], "", false)],
                ),
                2 => list.push(d.clone()),
                _ => {
                    let mut one = DiagList::new();
                    one.push(d.clone());
                    list.push_ref(one.get(0).unwrap());
                }
            }
            want.push(d);
        }
        assert_eq!(list.len(), want.len());
        for (i, (r, d)) in list.iter().zip(&want).enumerate() {
            assert_eq!(r, d.view(), "{i}");
            assert_eq!(r.to_diag().view(), d.view(), "{i}");
            // the net and the pins read together are those read apart
            let (net, pins) = r.net_and_pins_joined();
            assert_eq!(net, d.net.as_deref(), "{i}");
            let pins: Option<Vec<&str>> = pins.map(|p| p.split('\0').collect());
            let apart: Vec<&str> = d.pins().collect();
            assert_eq!(pins, d.has_pins().then_some(apart), "{i}");
        }
        for t in &list.text {
            assert!(t.capacity() <= TEXT_CHUNK || t.len() == t.capacity());
        }
        for l in &list.labels {
            assert!(l.capacity() <= LABEL_CHUNK);
        }
        // cut to their length, the same findings
        list.shrink_to_fit();
        assert!(list.iter().zip(&want).all(|(r, d)| r == d.view()));
    }

    /// Findings of one set of shared texts at the same places point at one copy of them; an
    /// unused gate's reference, the start of its pin list, is not written twice. They read
    /// back as pushed, in any mix with findings at other places.
    #[test]
    fn places_said_again_and_references_in_pins_are_held_once() {
        let mut list = DiagList::new();
        let code = list.share_id(&Text::Fixed(A));
        let (head, tail) = (
            list.share_id(&Text::Fixed("gate A of ")),
            list.share_id(&Text::Fixed(" is unused")),
        );
        let (first, other) = (
            list.share_id(&Text::Fixed("unused gate")),
            list.share_id(&Text::Fixed("")),
        );
        let mut want = Vec::new();
        for i in 0..300usize {
            let own = format!("U{i}");
            // the first two hundred parts on the same two pins of the library part, the others
            // at their own
            let at = if i >= 200 { 100 + i } else { 7 };
            let spans = [Span::new(at, at + 2), Span::new(at + 3, at + 5)];
            let pins = [format!("{own}.1"), format!("{own}.2")];
            let d = Diag::error(A, format!("gate A of {own} is unused"))
                .at(spans[0], "unused gate")
                .also(spans[1], "")
                .with_pins(&pins);
            if i % 2 == 0 {
                list.push_shared(
                    RawShared {
                        code,
                        severity: Severity::Error,
                        head: Some(head),
                        own: &own,
                        tail: Some(tail),
                        help: None,
                        net: None,
                    },
                    [[own.as_str(), ".", "1"], [own.as_str(), ".", "2"]],
                    [(spans[0], first, true), (spans[1], other, false)],
                );
            } else {
                list.push_parts(
                    &d,
                    &own,
                    Around {
                        head: Some(&Text::Fixed("gate A of ")),
                        tail: Some(&Text::Fixed(" is unused")),
                    },
                );
            }
            want.push(d);
        }
        for (i, (r, d)) in list.iter().zip(&want).enumerate() {
            assert_eq!(r, d.view(), "{i}");
        }
        // the places at 7 written once, the others each time
        let places: usize = list.labels.iter().map(Vec::len).sum();
        assert_eq!(places, 2 + 2 * 100);
        // each finding's text is its pin list alone
        let text: usize = list.text.iter().map(String::len).sum();
        let pins: usize = want
            .iter()
            .map(|d| d.pins.0.as_deref().unwrap().len())
            .sum();
        assert_eq!(text, pins);
        // a finding with a net keeps its own words apart
        let d = Diag::error(A, "U1 x").on_net("N").with_pins(["U1.1"]);
        list.push(d.clone());
        assert_eq!(list.get(300).unwrap(), d.view());
    }

    /// A message given in pieces reads whole, in its parts, and ordered as its text; copied
    /// into another list, the same. Pieces of one kind side by side, empty pieces, pieces said
    /// alike first or last or not at all, own words long enough to take lengths of two bytes.
    #[test]
    fn a_message_in_pieces_reads_as_its_text() {
        let long = "n".repeat(300);
        let cases: Vec<Vec<Piece>> = vec![
            vec![Own("U1"), Said(" pin 1 is on net `"), Own("/A"), Said("`")],
            vec![
                Said("the "),
                Own("U2"),
                Said(" on "),
                Own(&long),
                Said(" to +5V"),
            ],
            vec![
                Own("R1"),
                Said(": "),
                Said("why"),
                Own(""),
                Said("; "),
                Own("N"),
                Own("2"),
            ],
            vec![Said("only said")],
            vec![Own("only own")],
            vec![],
            vec![Own("a"), Said("\u{0}"), Own("b"), Said("Ω"), Own("c")],
            vec![Said(""), Own("U3"), Said(" and "), Own("U4"), Said("")],
        ];
        let mut list = DiagList::new();
        let mut want = Vec::new();
        for (i, pieces) in cases.iter().enumerate() {
            let text: String = pieces
                .iter()
                .map(|p| match p {
                    Own(w) | Said(w) => *w,
                })
                .collect();
            let d = Diag::warning(A, String::new())
                .at(Span::new(i, i + 1), "x")
                .with_pins([format!("U{i}.1")]);
            list.push_pieces(&d, pieces);
            let mut whole = d.clone();
            whole.message = text.clone().into_boxed_str();
            want.push(whole);
        }
        for (i, (r, d)) in list.iter().zip(&want).enumerate() {
            assert_eq!(r, d.view(), "{i}");
            assert_eq!(
                r.message_parts().iter().collect::<String>(),
                &*d.message,
                "{i}"
            );
        }
        // ordered as their texts, each against each
        for a in list.iter() {
            for b in list.iter() {
                assert_eq!(
                    cmp_part_lists(a.message_parts().iter(), b.message_parts().iter()),
                    a.message().cmp(&b.message()),
                    "{a:?} {b:?}"
                );
            }
        }
        // copied, the same
        let mut copy = DiagList::new();
        for r in list.iter() {
            copy.push_ref(r);
        }
        assert!(copy.iter().eq(list.iter()));
        // the words said alike between own pieces are held once for findings that say them
        let sets = list.join_sets.len();
        list.push_pieces(
            &Diag::warning(A, String::new()),
            &[Own("U9"), Said(" pin 1 is on net `"), Own("/B"), Said("`")],
        );
        assert_eq!(list.join_sets.len(), sets);
        assert_eq!(
            list.get(list.len() - 1).unwrap().message(),
            "U9 pin 1 is on net `/B`"
        );
    }

    /// A record of 16 bytes holds its counts in few bits: a finding whose message is read
    /// from its pin list, or not, with more places than those bits count, and a pin list
    /// longer than the record counts, read back as pushed; and a severity set afterwards
    /// leaves the rest as it was.
    #[test]
    fn counts_beyond_the_record_s_bits_read_back() {
        let mut list = DiagList::new();
        let mut want = Vec::new();
        for (i, places) in [1usize, 126, 127, 128, 300, 16_382, 16_383, 20_000]
            .into_iter()
            .enumerate()
        {
            for own in [format!("U{i}"), format!("m{i}")] {
                let pins: Vec<String> = (0..(if i == 4 { 900 } else { 2 }))
                    .map(|k| format!("U{i}.{k}"))
                    .collect();
                let d = (0..places)
                    .fold(Diag::warning(A, own.clone()), |d, k| {
                        d.also(Span::new(k, k + 1), "")
                    })
                    .with_pins(&pins);
                list.push(d.clone());
                want.push(d);
            }
        }
        list.set_severity_from(3, Severity::Error);
        for (i, d) in want.iter_mut().enumerate().skip(3) {
            d.severity = Severity::Error;
            assert_eq!(list.get(i).unwrap(), d.view(), "{i}");
        }
        for (i, d) in want.iter().enumerate() {
            assert_eq!(list.get(i).unwrap(), d.view(), "{i}");
        }
    }

    #[test]
    fn a_message_in_parts_reads_whole() {
        let head = Text::Fixed("gate A of ");
        let tail = Text::from(String::from(" (74HC00) is unused"));
        let mut list = DiagList::new();
        let d = Diag::error(A, "").at(Span::new(1, 2), "x");
        list.push_parts(
            &d,
            "U1",
            Around {
                head: Some(&head),
                tail: Some(&tail),
            },
        );
        list.push_parts(
            &d,
            "U2",
            Around {
                head: None,
                tail: Some(&tail),
            },
        );
        list.push(Diag::error(A, "whole"));
        let m: Vec<String> = list.iter().map(|r| r.message().into_owned()).collect();
        assert_eq!(
            m,
            [
                "gate A of U1 (74HC00) is unused",
                "U2 (74HC00) is unused",
                "whole"
            ]
        );
        assert_eq!(
            list.get(0).unwrap().message_parts().three().unwrap(),
            ["gate A of ", "U1", " (74HC00) is unused"]
        );
        // a copy keeps the words
        let mut copy = DiagList::new();
        copy.push_ref(list.get(0).unwrap());
        assert_eq!(copy.get(0).unwrap(), list.get(0).unwrap());
    }

    #[test]
    fn apply_order_moves_each_item_to_its_place() {
        // every permutation of five items, against building the ordered list afresh
        let mut perms = vec![vec![]];
        for n in 0..5usize {
            perms = perms
                .into_iter()
                .flat_map(|p: Vec<usize>| {
                    (0..=p.len()).map(move |at| {
                        let mut q = p.clone();
                        q.insert(at, n);
                        q
                    })
                })
                .collect();
        }
        assert_eq!(perms.len(), 120);
        for p in perms {
            let items: Vec<char> = "abcde".chars().collect();
            let want: Vec<String> = p.iter().map(|&i| items[i].to_string()).collect();
            let mut got: DiagList = items.iter().map(|c| Diag::info(A, c.to_string())).collect();
            got.apply_order(&mut p.iter().map(|&i| i as u64).collect::<Vec<_>>());
            let got: Vec<String> = got.iter().map(|d| d.message().into_owned()).collect();
            assert_eq!(got, want, "{p:?}");
        }
    }

    /// Sorting the records by keys in place, by passes over groups of any size, gives the
    /// order a plain sort of the keys gives, across the pieces the records are held in;
    /// prepending moves the others up by the count prepended, or leaves them.
    #[test]
    fn records_sorted_by_keys_in_place_are_those_sorted_by_key() {
        let n = 2 * REC_CHUNK + 77;
        let mk = |i: usize| Diag::warning(A, format!("m{i}")).with_pins([format!("U{i}.1")]);
        // keys of a place then the index: places with many findings, far apart and near
        let place =
            |i: usize| ((i * 7919) % 1013) as u64 * if i.is_multiple_of(3) { 1 << 20 } else { 5 };
        for small in [1, 3, 40, SORT_SMALL] {
            let mut list: DiagList = (0..n).map(mk).collect();
            let mut keys: Vec<u64> = (0..n).map(|i| place(i) << 32 | i as u64).collect();
            let mut want = keys.clone();
            want.sort_unstable();
            list.sort_by_keys_small(&mut keys, small);
            assert_eq!(keys, want, "{small}");
            for (at, k) in want.iter().enumerate() {
                let i = (k & 0xffff_ffff) as usize;
                assert_eq!(list.get(at).unwrap(), mk(i).view(), "{small} {at}");
            }
        }
        let mut list: DiagList = (0..n).map(mk).collect();
        list.prepend([]);
        assert!(list.iter().enumerate().all(|(i, d)| d == mk(i).view()));
        list.prepend([mk(n), mk(n + 1)]);
        let got: Vec<String> = list.iter().map(|d| d.message().into_owned()).collect();
        let want: Vec<String> = [n, n + 1]
            .into_iter()
            .chain(0..n)
            .map(|i| format!("m{i}"))
            .collect();
        assert_eq!(got, want);
    }

    /// Across the pieces records, places and texts are held in, a list reads, reorders, keeps
    /// and prepends as one list of its findings does.
    #[test]
    fn lists_of_many_pieces_read_as_one() {
        let n = 2 * REC_CHUNK + 77;
        let big = "x".repeat(TEXT_CHUNK / 3);
        let mk = |i: usize| {
            let d = Diag::warning(A, format!("m{i}")).with_pins([format!("U{i}.1")]);
            // a few findings with many places or a long net, to fill those pieces early
            let d = if i % 5000 == 1 {
                (0..30_000).fold(d, |d, k| d.also(Span::new(k, k + 1), ""))
            } else {
                d.at(Span::new(i, i + 1), "p")
            };
            if i % 9000 == 2 {
                d.on_net(big.clone())
            } else {
                d
            }
        };
        let mut list: DiagList = (0..n).map(mk).collect();
        assert!(list.recs.len() == 3 && list.text.len() > 1 && list.labels.len() > 1);
        for i in (0..n).step_by(97).chain([n - 1, REC_CHUNK - 1, REC_CHUNK]) {
            assert_eq!(list.get(i).unwrap(), mk(i).view(), "{i}");
        }
        assert!(list.get(n).is_none());
        assert_eq!(list.iter().rev().count(), n);
        // reversed
        let mut order: Vec<u64> = (0..n as u64).rev().collect();
        list.apply_order(&mut order);
        assert_eq!(list.get(0).unwrap(), mk(n - 1).view());
        assert_eq!(list.get(n - 1).unwrap(), mk(0).view());
        // every third kept
        list.retain(|d| d.message()[1..].parse::<usize>().unwrap() % 3 == 0);
        let want: Vec<usize> = (0..n).rev().filter(|i| i % 3 == 0).collect();
        assert_eq!(list.len(), want.len());
        list.prepend([mk(7)]);
        let got: Vec<String> = list.iter().map(|d| d.message().into_owned()).collect();
        let want: Vec<String> = [7]
            .into_iter()
            .chain(want)
            .map(|i| format!("m{i}"))
            .collect();
        assert_eq!(got, want);
    }

    #[test]
    fn a_finding_written_straight_in_reads_as_one_pushed() {
        let (head, tail, help) = (
            Text::Fixed("gate A of "),
            Text::from(String::from(" is unused")),
            Text::Fixed("tie it"),
        );
        let d = Diag::error(A, "gate A of U1 is unused")
            .at(Span::new(1, 2), "unused gate")
            .also(Span::new(3, 4), "")
            .with_help("tie it")
            .on_net("N1")
            .with_pins(["U1.1", "U1.2"]);
        let mut list = DiagList::new();
        for net in [Some("N1"), None] {
            list.push_raw(
                Raw {
                    code: "code-a",
                    severity: Severity::Error,
                    around: Around {
                        head: Some(&head),
                        tail: Some(&tail),
                    },
                    own: "U1",
                    help: Some(&help),
                    net,
                },
                [["U1", ".", "1"], ["U1", ".", "2"]],
                [
                    (Span::new(1, 2), "unused gate", true),
                    (Span::new(3, 4), "", false),
                ],
            );
        }
        list.push_raw(
            Raw {
                code: "code-a",
                severity: Severity::Info,
                around: Around::default(),
                own: "m",
                help: None,
                net: None,
            },
            [],
            [],
        );
        assert_eq!(list.get(0).unwrap(), d.view());
        assert_eq!(list.get(1).unwrap().net(), None);
        assert_eq!(
            list.get(1).unwrap().pins().collect::<Vec<_>>(),
            ["U1.1", "U1.2"]
        );
        let last = list.get(2).unwrap();
        assert_eq!(
            (last.has_pins(), last.labels().len(), last.help()),
            (false, 0, None)
        );
        assert_eq!(last.to_diag(), Diag::info(A, "m"));
    }

    #[test]
    fn a_finding_pushed_with_shared_numbers_reads_as_one_pushed() {
        let d = Diag::error(A, "gate A of U1 (74HC00) is unused")
            .at(Span::new(1, 2), "unused gate")
            .also(Span::new(3, 4), "")
            .with_help("tie it")
            .with_pins(["U1.1", "U1.2"]);
        let mut list = DiagList::new();
        // a finding pushed before, whose texts the numbers must not be confused with
        list.push(Diag::warning(B, "other").with_help("not this"));
        let code = list.share_id(&Text::Fixed(A));
        let head = list.share_id(&Text::from(String::from("gate A of ")));
        let tail = list.share_id(&Text::from(String::from(" (74HC00) is unused")));
        let help = list.share_id(&Text::Fixed("tie it"));
        let (first, other) = (
            list.share_id(&Text::Fixed("unused gate")),
            list.share_id(&Text::Fixed("")),
        );
        // the same text shared again has the same number
        assert_eq!(list.share_id(&Text::from(String::from("tie it"))), help);
        assert_ne!(head, tail);
        for own in ["U1", "U2"] {
            list.push_shared(
                RawShared {
                    code,
                    severity: Severity::Error,
                    head: Some(head),
                    own,
                    tail: Some(tail),
                    help: Some(help),
                    net: None,
                },
                [[own, ".", "1"], [own, ".", "2"]],
                [
                    (Span::new(1, 2), first, true),
                    (Span::new(3, 4), other, false),
                ],
            );
        }
        assert_eq!(list.len(), 3);
        assert_eq!(list.get(1).unwrap(), d.view());
        let second = list.get(2).unwrap();
        assert_eq!(second.message(), "gate A of U2 (74HC00) is unused");
        assert_eq!(second.pins().collect::<Vec<_>>(), ["U2.1", "U2.2"]);
        assert_eq!(list.get(0).unwrap().help(), Some("not this"));
    }

    #[test]
    #[should_panic(expected = "another list")]
    fn a_shared_number_of_another_list_is_refused() {
        let mut one = DiagList::new();
        let mut two = DiagList::new();
        let _ = two.share_id(&Text::Fixed("x"));
        let code = one.share_id(&Text::Fixed(A));
        two.push_shared(
            RawShared {
                code,
                severity: Severity::Info,
                head: None,
                own: "m",
                tail: None,
                help: None,
                net: None,
            },
            [],
            [],
        );
    }

    #[test]
    fn texts_in_parts_order_as_the_whole_texts() {
        let texts = ["", "a", "ab", "abc", "b", "ba", "Ω", "a\u{0}"];
        let mut splits = Vec::new();
        for t in texts {
            for i in 0..=t.len() {
                for j in i..=t.len() {
                    if t.is_char_boundary(i) && t.is_char_boundary(j) {
                        splits.push((t, [&t[..i], &t[i..j], &t[j..]]));
                    }
                }
            }
        }
        for (x, xs) in &splits {
            for (y, ys) in &splits {
                assert_eq!(cmp_parts(*xs, *ys), x.cmp(y), "{xs:?} {ys:?}");
            }
        }
    }

    #[test]
    fn lists_reorder_keep_and_prepend() {
        let mut list: DiagList = (0..6).map(sample).collect();
        let mut order: Vec<u64> = vec![5, 4, 3, 2, 1, 0];
        list.apply_order(&mut order);
        let m: Vec<String> = list.iter().map(|r| r.message().into_owned()).collect();
        assert_eq!(m[0], "message 5");
        assert_eq!(m[5], "message 0");
        list.retain(|r| r.code() == "code-a");
        let m: Vec<String> = list.iter().map(|r| r.message().into_owned()).collect();
        assert_eq!(m, ["message 4", "message 2", "message 0"]);
        list.prepend([sample(9)]);
        let m: Vec<String> = list.iter().map(|r| r.message().into_owned()).collect();
        assert_eq!(m, ["message 9", "message 4", "message 2", "message 0"]);
        list.set_severity_from(1, Severity::Error);
        let s: Vec<Severity> = list.iter().map(|r| r.severity()).collect();
        assert_eq!(
            s,
            [
                Severity::Warning,
                Severity::Error,
                Severity::Error,
                Severity::Error
            ]
        );
    }
}
