//! `rules/parts.toml`: explicit value-to-part entries, checked before the 74-series and
//! 4000-series patterns. They name parts the patterns do not cover (an oscillator module, a
//! microprocessor), mark IC-like parts that are not logic (regulators, op-amps), and correct
//! a pattern where a maker's numbering misleads.
//!
//! ```toml
//! [[part]]
//! values = ["OSC*MHZ*", "XO-*"]   # globs on the component value, case-insensitive (`*`, `?`)
//! family = "74HC"                 # the family whose DC data applies (logic parts)
//! series = "other"                # "74", "4000" or "other" (default "other")
//! function = "osc-dip14"          # a function id in that series
//! note = "full-size DIP-14 oscillator can, HCMOS output"
//!
//! [[part]]
//! values = ["LM358*", "NE555*"]
//! kind = "not-logic"              # known, and outside netmargin's checks
//!
//! [[part]]
//! values = ["HDSP-*"]
//! kind = "display"                # an LED display: its segments are LED loads
//! ```

use std::borrow::Cow;
use std::ops::Range;

use serde::Deserialize;
use toml::Spanned;

use super::function::Series;
use super::RuleError;

pub const BUILTIN_TEXT: &str = include_str!("../../rules/parts.toml");

#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum EntryKind {
    Logic,
    NotLogic,
    /// An LED display: known, not logic; its segments are LEDs to its commons.
    Display,
}

/// A text of an entry: borrowed from the table compiled into the binary (decoding the
/// shipped table then allocates no text), owned when read from a project's file.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
#[serde(transparent)]
pub struct EntryText(pub Cow<'static, str>);

impl std::ops::Deref for EntryText {
    type Target = str;
    fn deref(&self) -> &str {
        &self.0
    }
}

impl std::borrow::Borrow<str> for EntryText {
    fn borrow(&self) -> &str {
        &self.0
    }
}

impl From<String> for EntryText {
    fn from(s: String) -> EntryText {
        EntryText(Cow::Owned(s))
    }
}

impl std::fmt::Display for EntryText {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.0)
    }
}

/// Decoded only from bytes that live as long as the program (the compiled table): the text
/// is borrowed when the decoder can lend it, copied when it cannot.
impl<'de: 'static> Deserialize<'de> for EntryText {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<EntryText, D::Error> {
        struct V;
        impl<'de: 'static> serde::de::Visitor<'de> for V {
            type Value = EntryText;
            fn expecting(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
                f.write_str("a string")
            }
            fn visit_borrowed_str<E>(self, v: &'de str) -> Result<EntryText, E> {
                Ok(EntryText(Cow::Borrowed(v)))
            }
            fn visit_str<E>(self, v: &str) -> Result<EntryText, E> {
                Ok(EntryText(Cow::Owned(v.to_string())))
            }
        }
        d.deserialize_str(V)
    }
}

/// One explicit entry.
#[derive(Debug, Clone, serde::Serialize, serde::Deserialize)]
#[serde(bound(deserialize = "'de: 'static"))]
pub struct PartEntry {
    pub values: Vec<EntryText>,
    pub kind: EntryKind,
    pub family: Option<EntryText>,
    pub series: Series,
    pub function: Option<EntryText>,
    pub note: Option<EntryText>,
    /// Span of the entry in its file.
    pub span: Range<usize>,
    /// True for the shipped file, false for a project's.
    pub shipped: bool,
    /// For a project entry: its file and 1-based line.
    pub origin: Option<(String, usize)>,
}

impl PartEntry {
    pub fn matches(&self, value: &str) -> bool {
        self.values.iter().any(|g| glob_match(g, value.trim()))
    }
}

/// The entries of the shipped file and any project file (project entries first).
#[derive(Debug, Clone, Default, serde::Serialize, serde::Deserialize)]
#[serde(bound(deserialize = "'de: 'static"))]
pub struct PartTable {
    /// Change it only through [`PartTable::parse`] and [`PartTable::merge_over`]: the index
    /// below is built from it on first use.
    pub entries: Vec<PartEntry>,
    /// Which entries a value can match, by the value's first letter; built on first use.
    #[serde(skip)]
    index: std::sync::OnceLock<FirstLetters>,
}

/// The entries whose globs a value can match, told by the value's first byte: a glob that
/// begins with an ASCII letter or digit takes only values that begin with it (in either
/// case); any other glob (`*`, `?`, a non-ASCII letter) may take any value.
#[derive(Debug, Clone, Default)]
struct FirstLetters {
    /// For each lower-case ASCII byte `b`, `items[starts[b]..starts[b + 1]]` are the entries
    /// with a glob that begins with it, in entry order; an entry that may take any value is
    /// not repeated there. Two allocations, however many entries.
    starts: Vec<u32>,
    items: Vec<u32>,
    /// The entries with a glob that may take a value beginning with anything, in order.
    any: Vec<u32>,
}

impl FirstLetters {
    fn of(entries: &[PartEntry]) -> FirstLetters {
        // the byte a glob must begin with, lower case; `None` for one that takes anything
        fn first(g: &str) -> Option<u8> {
            match g.as_bytes().first() {
                Some(&b) if b.is_ascii() && b != b'*' && b != b'?' => Some(b.to_ascii_lowercase()),
                _ => None,
            }
        }
        let fixed = |e: &PartEntry| e.values.iter().all(|g| first(g).is_some());
        // an entry goes once into each byte's list, however many of its globs begin with it:
        // `seen[b]` is the last entry (plus one) put into byte b's list
        let mut seen = [0u32; 128];
        let mut counts = [0u32; 129];
        let mut any = Vec::new();
        for (i, e) in entries.iter().enumerate() {
            if !fixed(e) {
                any.push(i as u32);
                continue;
            }
            for b in e.values.iter().filter_map(|g| first(g)) {
                if seen[b as usize] != i as u32 + 1 {
                    seen[b as usize] = i as u32 + 1;
                    counts[b as usize + 1] += 1;
                }
            }
        }
        for b in 0..128 {
            counts[b + 1] += counts[b];
        }
        let mut next = counts;
        let mut items = vec![0u32; counts[128] as usize];
        seen = [0; 128];
        for (i, e) in entries.iter().enumerate() {
            if !fixed(e) {
                continue;
            }
            for b in e.values.iter().filter_map(|g| first(g)) {
                if seen[b as usize] != i as u32 + 1 {
                    seen[b as usize] = i as u32 + 1;
                    items[next[b as usize] as usize] = i as u32;
                    next[b as usize] += 1;
                }
            }
        }
        FirstLetters {
            starts: counts.to_vec(),
            items,
            any,
        }
    }

    /// The entries that may match `value` (trimmed), in entry order; `None` when every
    /// entry may (a value that is empty or begins with a non-ASCII letter).
    fn candidates(&self, value: &str) -> Option<impl Iterator<Item = usize> + '_> {
        let b = *value.as_bytes().first()?;
        if !b.is_ascii() {
            return None;
        }
        let b = b.to_ascii_lowercase() as usize;
        let (mut a, mut b) = (
            self.items[self.starts[b] as usize..self.starts[b + 1] as usize]
                .iter()
                .peekable(),
            self.any.iter().peekable(),
        );
        // the two lists are sorted and disjoint: merge them in order
        Some(std::iter::from_fn(move || {
            let next = match (a.peek(), b.peek()) {
                (Some(&&x), Some(&&y)) if x < y => a.next(),
                (Some(_), Some(_)) => b.next(),
                (Some(_), None) => a.next(),
                (None, _) => b.next(),
            };
            next.map(|&i| i as usize)
        }))
    }
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    #[serde(default)]
    part: Vec<Spanned<RawPart>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawPart {
    values: Vec<String>,
    #[serde(default)]
    kind: Option<Spanned<String>>,
    #[serde(default)]
    family: Option<String>,
    #[serde(default)]
    series: Option<Spanned<String>>,
    #[serde(default)]
    function: Option<String>,
    #[serde(default)]
    note: Option<String>,
}

impl PartTable {
    /// The shipped table read from its text, `rules/parts.toml`. `build.rs` calls this at
    /// compile time; the binary loads its result (`builtin`, in `shipped.rs`).
    pub fn parse_shipped() -> Result<PartTable, Vec<RuleError>> {
        PartTable::parse(BUILTIN_TEXT, true)
    }

    pub fn parse(text: &str, shipped: bool) -> Result<PartTable, Vec<RuleError>> {
        let raw: RawFile = toml::from_str(text).map_err(|e| vec![RuleError::from_toml(&e)])?;
        let mut errors = Vec::new();
        let mut entries = Vec::new();
        for sp in raw.part {
            let span = sp.span();
            let r = sp.into_inner();
            let kind = match r.kind.as_ref().map(|k| k.get_ref().as_str()) {
                None | Some("logic") => EntryKind::Logic,
                Some("not-logic") => EntryKind::NotLogic,
                Some("display") => EntryKind::Display,
                Some(other) => {
                    let k = r.kind.as_ref().expect("some");
                    errors.push(RuleError::new(
                        Some(k.span()),
                        format!("unknown kind `{other}`: expected \"logic\", \"not-logic\" or \"display\""),
                    ));
                    continue;
                }
            };
            let series = match r.series.as_ref().map(|s| s.get_ref().as_str()) {
                None | Some("other") => Series::Other,
                Some("74") => Series::S74,
                Some("4000") => Series::S4000,
                Some(other) => {
                    let s = r.series.as_ref().expect("some");
                    errors.push(RuleError::new(
                        Some(s.span()),
                        format!("unknown series `{other}`: expected \"74\", \"4000\" or \"other\""),
                    ));
                    continue;
                }
            };
            if r.values.is_empty() {
                errors.push(RuleError::new(
                    Some(span.clone()),
                    "a part entry needs at least one value glob",
                ));
                continue;
            }
            if kind == EntryKind::Logic && (r.family.is_none() || r.function.is_none()) {
                errors.push(RuleError::new(
                    Some(span.clone()),
                    "a logic part entry needs `family` and `function`",
                ));
                continue;
            }
            entries.push(PartEntry {
                values: r.values.into_iter().map(EntryText::from).collect(),
                kind,
                family: r.family.map(EntryText::from),
                series,
                function: r.function.map(EntryText::from),
                note: r.note.map(EntryText::from),
                span,
                shipped,
                origin: None,
            });
        }
        if errors.is_empty() {
            Ok(PartTable {
                entries,
                index: Default::default(),
            })
        } else {
            Err(errors)
        }
    }

    /// Puts `over`'s entries in front, so they win.
    /// A table of these entries.
    pub fn from_entries(entries: Vec<PartEntry>) -> PartTable {
        PartTable {
            entries,
            index: Default::default(),
        }
    }

    pub fn merge_over(&mut self, over: PartTable) {
        let mut e = over.entries;
        e.append(&mut self.entries);
        self.entries = e;
        self.index = Default::default();
    }

    pub fn find(&self, value: &str) -> Option<(usize, &PartEntry)> {
        let i = self.matching(value).next()?.0;
        Some((i, &self.entries[i]))
    }

    /// Every entry whose globs take `value`, in order: the first that also fits the symbol
    /// wins, so one value can name a part in two packages (a UART in the DIP-40 and the
    /// PLCC-44) with the smaller package first.
    pub fn matching<'a>(
        &'a self,
        value: &'a str,
    ) -> impl Iterator<Item = (usize, &'a PartEntry)> + 'a {
        let index = self.index.get_or_init(|| FirstLetters::of(&self.entries));
        let value = value.trim();
        let some: Option<Box<dyn Iterator<Item = usize> + 'a>> = match index.candidates(value) {
            Some(c) => Some(Box::new(c)),
            None => None,
        };
        some.unwrap_or_else(|| Box::new(0..self.entries.len()))
            .map(|i| (i, &self.entries[i]))
            .filter(move |(_, e)| e.matches(value))
    }
}

/// Case-insensitive glob with `*` (any run) and `?` (one character).
pub fn glob_match(pattern: &str, text: &str) -> bool {
    // most globs begin with a letter or digit that most values do not: settle those first
    if let (Some(&p0), Some(&t0)) = (pattern.as_bytes().first(), text.as_bytes().first()) {
        if p0.is_ascii()
            && t0.is_ascii()
            && p0 != b'*'
            && p0 != b'?'
            && !p0.eq_ignore_ascii_case(&t0)
        {
            return false;
        }
    }
    if text.is_ascii() {
        if pattern.is_ascii() {
            return glob_ascii(pattern.as_bytes(), text.as_bytes());
        }
        // a letter whose lower case is not ASCII (`К`) meets no letter of an ASCII text: no
        // need to compare them as characters (a few, like the Kelvin sign, do lower to ASCII)
        if pattern
            .chars()
            .any(|c| !c.is_ascii() && c.to_lowercase().any(|l| !l.is_ascii()))
        {
            return false;
        }
    }
    let p: Vec<char> = pattern.chars().flat_map(char::to_lowercase).collect();
    let t: Vec<char> = text.chars().flat_map(char::to_lowercase).collect();
    glob_chars(&p, &t)
}

/// The same matcher on ASCII bytes, without allocating (every component's value meets every
/// entry's globs).
fn glob_ascii(p: &[u8], t: &[u8]) -> bool {
    let (mut pi, mut ti) = (0, 0);
    let (mut star, mut mark) = (None, 0);
    while ti < t.len() {
        if pi < p.len() && (p[pi] == b'?' || p[pi].eq_ignore_ascii_case(&t[ti])) {
            pi += 1;
            ti += 1;
        } else if pi < p.len() && p[pi] == b'*' {
            star = Some(pi);
            mark = ti;
            pi += 1;
        } else if let Some(s) = star {
            pi = s + 1;
            mark += 1;
            ti = mark;
        } else {
            return false;
        }
    }
    while pi < p.len() && p[pi] == b'*' {
        pi += 1;
    }
    pi == p.len()
}

fn glob_chars(p: &[char], t: &[char]) -> bool {
    let (mut pi, mut ti) = (0, 0);
    let (mut star, mut mark) = (None, 0);
    while ti < t.len() {
        if pi < p.len() && (p[pi] == '?' || p[pi] == t[ti]) {
            pi += 1;
            ti += 1;
        } else if pi < p.len() && p[pi] == '*' {
            star = Some(pi);
            mark = ti;
            pi += 1;
        } else if let Some(s) = star {
            pi = s + 1;
            mark += 1;
            ti = mark;
        } else {
            return false;
        }
    }
    while pi < p.len() && p[pi] == '*' {
        pi += 1;
    }
    pi == p.len()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn globs() {
        assert!(glob_match("LM358*", "lm358n"));
        assert!(glob_match("*555*", "NE555P"));
        assert!(glob_match("OSC?MHZ", "osc4mhz"));
        assert!(!glob_match("LM358*", "LM35"));
        assert!(glob_match("a*b*c", "aXXbYc"));
        assert!(!glob_match("a*b*c", "aXXbY"));
        // the non-ASCII path agrees
        assert!(glob_match("µ*Ω", "µ10kΩ"));
        assert!(!glob_match("µ*Ω", "µ10k"));
        assert!(glob_match("ÄB*", "äbc"));
        // a non-ASCII letter never matches an ASCII text, but one that lowers to ASCII does
        assert!(!glob_match("КР580ВМ80*", "KP580BM80A"));
        assert!(!glob_match("?80Ä*", "180AB"));
        assert!(glob_match("\u{212A}R*", "kr1"));
    }

    /// Every entry a linear scan of all globs finds, in the same order.
    fn scan(t: &PartTable, value: &str) -> Vec<usize> {
        let v = value.trim();
        (0..t.entries.len())
            .filter(|&i| t.entries[i].values.iter().any(|g| glob_match(g, v)))
            .collect()
    }

    #[test]
    fn the_first_letter_index_finds_what_a_scan_of_every_glob_finds() {
        let mut t = PartTable::builtin();
        // values made from the shipped globs themselves (wildcards filled in, case turned),
        // and values no glob begins with
        let mut values: Vec<String> = t
            .entries
            .iter()
            .flat_map(|e| e.values.iter())
            .flat_map(|g| {
                let filled = g.replace('*', "12").replace('?', "7");
                [filled.to_lowercase(), format!("  {filled} "), g.to_string()]
            })
            .collect();
        values.extend(
            [
                "", " ", "µ10k", "Ä1", "74LS00", "z80", "*", "?", "lm358n", "osc4mhz",
            ]
            .map(String::from),
        );
        let mut found = 0;
        for v in &values {
            let got: Vec<usize> = t.matching(v).map(|(i, _)| i).collect();
            assert_eq!(got, scan(&t, v), "{v:?}");
            found += got.len();
        }
        assert!(found > t.entries.len(), "the values match entries: {found}");
        // a project entry merged over the shipped ones is found first (the index is rebuilt)
        let project = PartTable::parse(
            "[[part]]\nvalues = [\"lm358*\", \"*X*\"]\nkind = \"not-logic\"\n",
            false,
        )
        .unwrap();
        t.merge_over(project);
        for v in &values {
            let got: Vec<usize> = t.matching(v).map(|(i, _)| i).collect();
            assert_eq!(got, scan(&t, v), "{v:?}");
        }
        assert_eq!(t.find("LM358N").map(|(i, _)| i), Some(0));
        assert_eq!(t.find("ax1").map(|(i, _)| i), Some(0));
    }

    #[test]
    fn shipped_file_loads_and_rejects_unknown_keys() {
        let t = PartTable::builtin();
        assert!(t.entries.len() >= 5);
        let text = "[[part]]\nvalues = [\"x\"]\nkind = \"not-logic\"\ncolour = 1\n";
        let e = PartTable::parse(text, false).unwrap_err();
        assert_eq!(e.len(), 1);
        assert_eq!(&text[e[0].span.clone().unwrap()], "colour");
        assert!(e[0].message.contains("colour"), "{}", e[0].message);
    }
}
