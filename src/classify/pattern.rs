//! Reading a component value (`74LS00`, `SN74HC04N`, `MC14011BCP`, `CD4049UBE` ...) into a
//! logic family and a function number, purely from the text.
//!
//! This module knows the family codes and the makers' marking grammar; it does not know which
//! functions exist. The caller checks that through the function table, and asks
//! [`near_misses`] for suggestions when a value does not read or names no known function.
//!
//! # What is read
//! Matching is case-insensitive. The value is trimmed, and only its first *token* is read: the
//! text up to the first whitespace, `(`, `[`, `,`, `;` or `/`. So `74LS00 (spare)`,
//! `74HC595N/T` and `N74F00N,602` read as `74LS00`, `74HC595N` and `N74F00N`; text after the
//! token is taken as a comment or an ordering code and ignored. A value with a space inside the
//! part number (`74 LS 00`) does not match.
//!
//! 74-series grammar: `[maker prefix] (54|74) [family letters] function [-] [suffix]`
//! * the maker prefix is one of [`PREFIXES_74`];
//! * `54` marks the military temperature range ([`ValueMatch::military`]);
//! * the family letters are one of the known codes (none = standard TTL, "74"); `LV` with a
//!   suffix starting with `A` (`SN74LV00A`, `SN74LV00APWR`) is the "74LV-A" family;
//! * the function is 2 to 5 digits, read greedily (`74LS1381` is function 1381); the suffix
//!   starts at the first letter after the digits (or after a `-`) and holds package, grade and
//!   revision letters (`N`, `AN`, `PC`, `NE4`);
//! * a function of 4 or 5 digits starting with `40` or `45` on a 74 family (`74HC4060`,
//!   `74HCT4538`) is a 4000-series function in that family's technology: the match has series
//!   [`Series::S4000`], the 74 family, and the 4000 function id.
//!
//! 4000-series grammar: `[maker prefix] number [UB|U|B] [-] [suffix]`
//! * the maker prefix is one of [`PREFIXES_4000`];
//! * the number is `40xx`, `45xx` or `40xxx`, or the `14xxx` numbering (`MC14011` is 4011;
//!   `MC14106` is 40106: after `14`, a number starting with 1 or 2 takes the five-digit `40`
//!   form, any other the four-digit `4` form);
//! * `UB` (or a lone `U`) right after the number is the unbuffered family "4000UB"; `B` or
//!   nothing is "4000B"; `A` right after the number (the older A series, whose family we do
//!   not describe) does not match.

use std::cmp::Ordering;

/// Which numbering, and so which pinout table, a function id belongs to.
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Series {
    /// 74-series functions (`00`, `138`, `245`).
    S74,
    /// 4000-series functions (`4011`, `40106`), also when made in a 74 family (`74HC4060`).
    S4000,
}

/// What a value reads as.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ValueMatch {
    pub series: Series,
    /// Canonical family id as used in `rules/families.toml`: "74", "74L", "74H", "74S", "74LS",
    /// "74ALS", "74AS", "74F", "74HC", "74HCT", "74AC", "74ACT", "74AHC", "74AHCT", "74LV",
    /// "74LV-A", "74LVC", "74C", "74ABT", "74BCT", "74FCT", "74LVT", "74ALVC", "4000B", "4000UB"
    /// (`VHC` and `VHCT` read as "74AHC" and "74AHCT").
    pub family: String,
    /// The function id: "00", "04", "245"; for 4000-series functions the full "4011", "40106",
    /// "4060".
    pub function: String,
    /// Maker prefix, upper case ("SN", "DM", "MC", "CD", "HEF" ...).
    pub prefix: Option<String>,
    /// A 54-range (military temperature) part. Always false for the 4000 numbering.
    pub military: bool,
    /// Package, grade and revision letters after the function, upper case, without a leading
    /// `-` ("N", "AN", "PC", "NE4", "E", "CP"). For 4000-series parts the `B` / `UB` family
    /// letters are not part of the suffix (`MC14011BCP` has suffix "CP").
    pub suffix: Option<String>,
    /// The token that was read, as written (after trimming; without any trailing comment).
    pub text: String,
}

/// Maker prefixes accepted before a 54/74 number.
pub const PREFIXES_74: &[&str] = &[
    "SN", "SNJ", "DM", "MC", "N", "S", "HD", "TC", "MM", "M", "CD", "IN", "UPD", "MB", "T", "KS",
    "GD", "MN", "NTE", "IDT", "CY", "QS",
];

/// Maker prefixes accepted before a 4000-series number.
pub const PREFIXES_4000: &[&str] = &[
    "CD", "MC", "HEF", "HCF", "HCC", "TC", "HD", "BU", "MB", "NTE",
];

/// 74-series family letters and the canonical family id each reads as.
const FAMILIES_74: &[(&str, &str)] = &[
    ("", "74"),
    ("L", "74L"),
    ("H", "74H"),
    ("S", "74S"),
    ("LS", "74LS"),
    ("ALS", "74ALS"),
    ("AS", "74AS"),
    ("F", "74F"),
    ("HC", "74HC"),
    ("HCT", "74HCT"),
    ("AC", "74AC"),
    ("ACT", "74ACT"),
    ("AHC", "74AHC"),
    ("AHCT", "74AHCT"),
    ("LV", "74LV"),
    ("LVC", "74LVC"),
    ("C", "74C"),
    ("VHC", "74AHC"),
    ("VHCT", "74AHCT"),
    ("ABT", "74ABT"),
    ("BCT", "74BCT"),
    ("FCT", "74FCT"),
    ("LVT", "74LVT"),
    ("ALVC", "74ALVC"),
];

/// Letters no maker's package code starts with that OCR takes for digits (O, I, L, Z, G);
/// S and B are left out because `SC`, `SJ` and `B1` are real package codes.
const DIGIT_LIKE_LETTERS: &[char] = &['O', 'I', 'L', 'Z', 'G'];

/// Longest token [`near_misses`] will try edits on; no part marking comes near it.
const MAX_NEAR_MISS_LEN: usize = 40;

/// The result of the grammar, with where the suffix starts (char index in the token).
struct Parsed {
    series: Series,
    family: &'static str,
    function: String,
    prefix: String,
    military: bool,
    suffix: String,
    suffix_start: usize,
}

/// Reads a component value as a logic part; `None` when it does not follow the grammar
/// described in the module documentation.
pub fn match_value(value: &str) -> Option<ValueMatch> {
    let trimmed = value.trim();
    let (token, _) = split_token(trimmed);
    let chars: Vec<char> = token.chars().collect();
    let p = parse(&chars)?;
    Some(ValueMatch {
        series: p.series,
        family: p.family.to_string(),
        function: p.function,
        prefix: (!p.prefix.is_empty()).then_some(p.prefix),
        military: p.military,
        suffix: (!p.suffix.is_empty()).then_some(p.suffix),
        text: token.to_string(),
    })
}

/// A suggested reading of a value that is one slip away from a known part.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Suggestion {
    /// The corrected value (the trimmed value with the edit applied; any comment kept).
    pub value: String,
    /// What the corrected value reads as, when it is a 74 or 4000 number; `None` when it is
    /// a part-table entry (a processor, a memory ...), described by `reads_as`.
    pub matched: Option<ValueMatch>,
    /// What the corrected value is, in words: `74LS00`, `4011 (4000B)`, `z80 (NMOS)`.
    pub reads_as: String,
    /// What was changed, with 1-based character positions in the trimmed value:
    /// "O read as 0 at position 5", "doubled 8 at position 8 removed".
    pub change: String,
}

/// Values at one OCR or transcription slip from one that [`match_value`] accepts and whose
/// function `known(series, function)` says exists; best first, at most `limit`.
///
/// Slips tried: the character confusions O/0, S/5, I/L/1, B/8, Z/2, G/6; a doubled letter or
/// digit (one copy removed); a dropped letter or digit (one inserted); two adjacent digits
/// swapped. Two confusions together are offered only when they lead to a single part.
///
/// Ranking: fewer changes first; then edits that leave the package suffix alone (a slip
/// "fixed" by turning a digit into a package letter says little about the part); then by
/// kind: confusions, doubled characters, swaps, dropped letters, dropped digits; then by
/// position and text, so the order is stable. A bare number gets no digit put in front of it
/// (`4164` is a DRAM, not a `54164` with its 5 lost). A candidate whose package suffix starts right
/// after the number with O, I, L, Z or G (letters read for digits) is not offered. Only the best suggestion for each part (series,
/// family, function) is kept, and none for the part the value already reads as.
pub fn near_misses(
    value: &str,
    known: &dyn Fn(&Series, &str) -> bool,
    limit: usize,
) -> Vec<Suggestion> {
    let trimmed = value.trim();
    let (token, tail) = split_token(trimmed);
    let chars: Vec<char> = token.chars().collect();
    if limit == 0 || chars.is_empty() || chars.len() > MAX_NEAR_MISS_LEN {
        return Vec::new();
    }
    let own = parse(&chars).map(|p| key_of(&p));
    let lower = chars.iter().any(|c| c.is_ascii_lowercase())
        && !chars.iter().any(|c| c.is_ascii_uppercase());
    let case = |c: char| if lower { c.to_ascii_lowercase() } else { c };

    // a bare number (`4164`) is another maker's part number far more often than a 54/74 number
    // with its first digit lost: no digit is put in front of it
    let bare_number = chars.iter().all(|c| c.is_ascii_digit());
    let mut single: Vec<Candidate> = Vec::new();
    for edit in single_edits(&chars, &case) {
        if bare_number && edit.kind == 4 && edit.at == 0 {
            continue;
        }
        if let Some(c) = evaluate(edit, known, own.as_ref()) {
            single.push(c);
        }
    }
    single.sort_by(Candidate::rank);
    let mut out = dedupe(single);

    let mut double: Vec<Candidate> = Vec::new();
    for edit in double_confusions(&chars, &case) {
        if let Some(c) = evaluate(edit, known, own.as_ref()) {
            if !out.iter().any(|o| o.key == c.key) {
                double.push(c);
            }
        }
    }
    double.sort_by(Candidate::rank);
    let double = dedupe(double);
    if double.len() == 1 {
        out.extend(double);
    }

    out.into_iter()
        .take(limit)
        .map(|c| {
            let p = c.parsed;
            let text: String = c.chars.iter().collect();
            let reads_as = match p.series {
                Series::S74 => format!("{}{}", p.family, p.function),
                Series::S4000 => format!("{} ({})", p.function, p.family),
            };
            Suggestion {
                value: format!("{text}{tail}"),
                matched: Some(ValueMatch {
                    series: p.series,
                    family: p.family.to_string(),
                    function: p.function,
                    prefix: (!p.prefix.is_empty()).then_some(p.prefix),
                    military: p.military,
                    suffix: (!p.suffix.is_empty()).then_some(p.suffix),
                    text,
                }),
                reads_as,
                change: c.change,
            }
        })
        .collect()
}

/// The values one slip away from `value` (one confusable character, a doubled character, two
/// neighbours swapped), and two confusions together, each with what was changed; for matching
/// against tables that are not number patterns (the part table's globs). The part-number
/// token alone is edited; any comment after it is kept.
pub fn slips(value: &str) -> Vec<(String, String, usize)> {
    let trimmed = value.trim();
    let (token, tail) = split_token(trimmed);
    let chars: Vec<char> = token.chars().collect();
    if chars.is_empty() || chars.len() > MAX_NEAR_MISS_LEN {
        return Vec::new();
    }
    let lower = chars.iter().any(|c| c.is_ascii_lowercase())
        && !chars.iter().any(|c| c.is_ascii_uppercase());
    let case = |c: char| if lower { c.to_ascii_lowercase() } else { c };
    single_edits(&chars, &case)
        .into_iter()
        .chain(double_confusions(&chars, &case))
        .map(|e| {
            let text: String = e.chars.iter().collect();
            (format!("{text}{tail}"), e.change, e.changes)
        })
        .collect()
}

/// Splits a trimmed value into the part-number token and the ignored rest.
fn split_token(trimmed: &str) -> (&str, &str) {
    let end = trimmed
        .find(|c: char| c.is_whitespace() || matches!(c, '(' | '[' | ',' | ';' | '/'))
        .unwrap_or(trimmed.len());
    trimmed.split_at(end)
}

/// Upper-cases for matching; the micro sign of `µPD` reads as `U`.
fn norm(c: char) -> char {
    match c {
        '\u{b5}' | '\u{3bc}' => 'U',
        c => c.to_ascii_uppercase(),
    }
}

fn parse(token: &[char]) -> Option<Parsed> {
    let up: Vec<char> = token.iter().map(|&c| norm(c)).collect();
    let pre_end = up.iter().take_while(|c| c.is_ascii_uppercase()).count();
    let prefix: String = up[..pre_end].iter().collect();
    let rest = &up[pre_end..];
    match rest {
        ['7', '4', ..] | ['5', '4', ..] => {
            if !prefix.is_empty() && !PREFIXES_74.contains(&prefix.as_str()) {
                return None;
            }
            parse_74(&up, pre_end, prefix)
        }
        ['4', ..] | ['1', '4', ..] => {
            if !prefix.is_empty() && !PREFIXES_4000.contains(&prefix.as_str()) {
                return None;
            }
            // Motorola numbers its CMOS MC14xxx; an MC40xx or MC45xx is another part (the MC4044
            // phase-frequency detector and the MC4024 oscillator are bipolar)
            if prefix == "MC" && rest.first() == Some(&'4') {
                return None;
            }
            parse_4000(&up, pre_end, prefix)
        }
        _ => None,
    }
}

fn parse_74(up: &[char], start: usize, prefix: String) -> Option<Parsed> {
    let military = up[start] == '5';
    let fam_start = start + 2;
    let fam_end = fam_start
        + up[fam_start..]
            .iter()
            .take_while(|c| c.is_ascii_uppercase())
            .count();
    let letters: String = up[fam_start..fam_end].iter().collect();
    let &(_, mut family) = FAMILIES_74.iter().find(|(l, _)| *l == letters)?;
    let fn_end = fam_end
        + up[fam_end..]
            .iter()
            .take_while(|c| c.is_ascii_digit())
            .count();
    let function: String = up[fam_end..fn_end].iter().collect();
    if !(2..=5).contains(&function.len()) {
        return None;
    }
    let (suffix, suffix_start) = parse_suffix(up, fn_end)?;
    if family == "74LV" && suffix.starts_with('A') {
        family = "74LV-A";
    }
    let series =
        if function.len() >= 4 && (function.starts_with("40") || function.starts_with("45")) {
            Series::S4000
        } else {
            Series::S74
        };
    Some(Parsed {
        series,
        family,
        function,
        prefix,
        military,
        suffix,
        suffix_start,
    })
}

fn parse_4000(up: &[char], start: usize, prefix: String) -> Option<Parsed> {
    let num_end = start
        + up[start..]
            .iter()
            .take_while(|c| c.is_ascii_digit())
            .count();
    let digits: String = up[start..num_end].iter().collect();
    let d = digits.as_bytes();
    let function = match d.len() {
        5 if digits.starts_with("14") => {
            let tail = &digits[2..];
            if matches!(d[2], b'1' | b'2') {
                format!("40{tail}")
            } else {
                format!("4{tail}")
            }
        }
        4 if digits.starts_with("40") || digits.starts_with("45") => digits,
        5 if digits.starts_with("40") => digits,
        _ => return None,
    };
    let mut i = num_end;
    let family = match up.get(i) {
        Some('U') => {
            i += 1;
            if up.get(i) == Some(&'B') {
                i += 1;
            }
            "4000UB"
        }
        Some('B') => {
            i += 1;
            "4000B"
        }
        Some('A') => return None,
        _ => "4000B",
    };
    let (suffix, suffix_start) = parse_suffix(up, i)?;
    Some(Parsed {
        series: Series::S4000,
        family,
        function,
        prefix,
        military: false,
        suffix,
        suffix_start,
    })
}

/// The suffix from `at` to the end: empty, or an optional `-` then a letter (a digit too after
/// the `-`) and then letters, digits, `-`, `.`, `+` or `#`.
fn parse_suffix(up: &[char], at: usize) -> Option<(String, usize)> {
    let mut rest = &up[at..];
    let mut start = at;
    if rest.is_empty() {
        return Some((String::new(), at));
    }
    let hyphen = rest[0] == '-';
    if hyphen {
        rest = &rest[1..];
        start += 1;
    }
    let first = *rest.first()?;
    if !(first.is_ascii_uppercase() || (hyphen && first.is_ascii_digit())) {
        return None;
    }
    if !rest
        .iter()
        .all(|c| c.is_ascii_alphanumeric() || matches!(c, '-' | '.' | '+' | '#'))
    {
        return None;
    }
    Some((rest.iter().collect(), start))
}

type Key = (Series, &'static str, String);

fn key_of(p: &Parsed) -> Key {
    (p.series.clone(), p.family, p.function.clone())
}

/// One edited token before it is checked.
struct Edit {
    chars: Vec<char>,
    /// Number of slips (1 or 2).
    changes: usize,
    /// 0 confusion, 1 doubled character, 2 swap, 3 dropped letter, 4 dropped digit.
    kind: u8,
    /// Char indices in the edited token that the edit wrote (none for a removal).
    touched: Vec<usize>,
    /// Leftmost char index the edit concerns, for a stable order.
    at: usize,
    change: String,
}

struct Candidate {
    chars: Vec<char>,
    changes: usize,
    in_suffix: bool,
    kind: u8,
    at: usize,
    change: String,
    key: Key,
    parsed: Parsed,
}

impl Candidate {
    fn rank(a: &Candidate, b: &Candidate) -> Ordering {
        (a.changes, a.in_suffix, a.kind, a.at)
            .cmp(&(b.changes, b.in_suffix, b.kind, b.at))
            .then_with(|| a.chars.cmp(&b.chars))
    }
}

fn evaluate(
    edit: Edit,
    known: &dyn Fn(&Series, &str) -> bool,
    own: Option<&Key>,
) -> Option<Candidate> {
    let parsed = parse(&edit.chars)?;
    if !known(&parsed.series, &parsed.function) {
        return None;
    }
    let key = key_of(&parsed);
    if own == Some(&key) {
        return None;
    }
    // a package suffix that starts, right after the number, with a letter that reads like a
    // digit (74L50O, 74LS10O) assumes one more unexplained slip: not a suggestion
    let joined = parsed.suffix_start > 0 && edit.chars[parsed.suffix_start - 1] != '-';
    if joined && parsed.suffix.starts_with(DIGIT_LIKE_LETTERS) {
        return None;
    }
    let in_suffix =
        !parsed.suffix.is_empty() && edit.touched.iter().any(|&i| i >= parsed.suffix_start);
    Some(Candidate {
        chars: edit.chars,
        changes: edit.changes,
        in_suffix,
        kind: edit.kind,
        at: edit.at,
        change: edit.change,
        key,
        parsed,
    })
}

/// Keeps the first candidate for each value and for each part, in order.
fn dedupe(sorted: Vec<Candidate>) -> Vec<Candidate> {
    let mut out: Vec<Candidate> = Vec::new();
    for c in sorted {
        if !out.iter().any(|o| o.key == c.key || o.chars == c.chars) {
            out.push(c);
        }
    }
    out
}

/// The characters an OCR or transcription slip can put in place of `c` (upper case).
fn confusions(c: char) -> &'static [char] {
    match c {
        'O' => &['0'],
        '0' => &['O'],
        'S' => &['5'],
        '5' => &['S'],
        'I' => &['1', 'L'],
        'L' => &['1', 'I'],
        '1' => &['I', 'L'],
        'B' => &['8'],
        '8' => &['B'],
        'Z' => &['2'],
        '2' => &['Z'],
        'G' => &['6'],
        '6' => &['G'],
        _ => &[],
    }
}

fn single_edits(chars: &[char], case: &dyn Fn(char) -> char) -> Vec<Edit> {
    let up: Vec<char> = chars.iter().map(|&c| norm(c)).collect();
    let mut edits = Vec::new();
    for (i, &u) in up.iter().enumerate() {
        for &alt in confusions(u) {
            let mut e = chars.to_vec();
            e[i] = case(alt);
            edits.push(Edit {
                chars: e,
                changes: 1,
                kind: 0,
                touched: vec![i],
                at: i,
                change: format!("{} read as {} at position {}", chars[i], case(alt), i + 1),
            });
        }
    }
    for i in 1..up.len() {
        if up[i] == up[i - 1] && up[i].is_ascii_alphanumeric() {
            let mut e = chars.to_vec();
            e.remove(i);
            edits.push(Edit {
                chars: e,
                changes: 1,
                kind: 1,
                touched: Vec::new(),
                at: i,
                change: format!("doubled {} at position {} removed", chars[i], i + 1),
            });
        }
        if up[i].is_ascii_digit() && up[i - 1].is_ascii_digit() && up[i] != up[i - 1] {
            let mut e = chars.to_vec();
            e.swap(i - 1, i);
            edits.push(Edit {
                chars: e,
                changes: 1,
                kind: 2,
                touched: vec![i - 1, i],
                at: i - 1,
                change: format!(
                    "{} and {} at positions {} and {} swapped",
                    chars[i - 1],
                    chars[i],
                    i,
                    i + 1
                ),
            });
        }
    }
    for i in 0..=chars.len() {
        for ins in ('A'..='Z').chain('0'..='9') {
            let ins = if ins.is_ascii_alphabetic() {
                case(ins)
            } else {
                ins
            };
            let mut e = chars.to_vec();
            e.insert(i, ins);
            edits.push(Edit {
                chars: e,
                changes: 1,
                kind: if ins.is_ascii_digit() { 4 } else { 3 },
                touched: vec![i],
                at: i,
                change: format!("missing {ins} inserted at position {}", i + 1),
            });
        }
    }
    edits
}

fn double_confusions(chars: &[char], case: &dyn Fn(char) -> char) -> Vec<Edit> {
    let up: Vec<char> = chars.iter().map(|&c| norm(c)).collect();
    let mut edits = Vec::new();
    for i in 0..up.len() {
        for j in i + 1..up.len() {
            for &a in confusions(up[i]) {
                for &b in confusions(up[j]) {
                    let mut e = chars.to_vec();
                    e[i] = case(a);
                    e[j] = case(b);
                    edits.push(Edit {
                        chars: e,
                        changes: 2,
                        kind: 0,
                        touched: vec![i, j],
                        at: i,
                        change: format!(
                            "{} read as {} at position {}, {} read as {} at position {}",
                            chars[i],
                            case(a),
                            i + 1,
                            chars[j],
                            case(b),
                            j + 1
                        ),
                    });
                }
            }
        }
    }
    edits
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn token_stops_at_comment_and_ordering_code() {
        assert_eq!(split_token("74LS00 (spare)"), ("74LS00", " (spare)"));
        assert_eq!(split_token("N74F00N,602"), ("N74F00N", ",602"));
        assert_eq!(split_token("74HC595N/T"), ("74HC595N", "/T"));
    }

    #[test]
    fn micro_sign_prefix_reads_as_upd() {
        let m = match_value("\u{b5}PD74HC00C").expect("matches");
        assert_eq!(m.prefix.as_deref(), Some("UPD"));
        assert_eq!(m.function, "00");
    }

    #[test]
    fn suffix_start_is_after_the_hyphen() {
        let chars: Vec<char> = "74LS00-N".chars().collect();
        let p = parse(&chars).expect("parses");
        assert_eq!((p.suffix.as_str(), p.suffix_start), ("N", 7));
    }
}
