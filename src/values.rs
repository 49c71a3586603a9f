//! Component values: resistances and resistor networks read from a netlist's value
//! field, and the engineering formatting of ohms, volts and amps used in messages.
//!
//! # What is read
//!
//! A value field holds the resistance first, then optional fields separated by
//! spaces (any Unicode space, U+00A0 included) or by commas: a tolerance (`1%`,
//! `±1%`, `+/-5 %`) and a power rating (`1/4W`, `0.25W`, `250mW`). Anything else
//! after the resistance (a package size, a material, a note) is not read, unless it
//! is itself a resistance such as `4K7`: two values in one field are an error.
//!
//! The resistance itself is written in one of two ways:
//!
//! * the letter-and-digit code of IEC 60062 (for resistance: `R` = 1, `K` = 1e3,
//!   `M` = 1e6, `G` = 1e9, `T` = 1e12, and `L` = 1e-3 for milliohms), where the
//!   letter stands in place of the decimal point: `4K7` = 4.7 kOhm, `R47` = 0.47 Ohm,
//!   `1M0` = 1 MOhm, `470R` = 470 Ohm, `M47` = 470 kOhm. `k` and `K` are both read.
//!   `E` in place of `R` (`4E7` = 4.7 Ohm, `10E` = 10 Ohm) is a common variant on
//!   parts lists and schematics, not part of the standard;
//! * a decimal number with an SI prefix and an optional unit: `4.7k`, `4.7 kOhm`,
//!   `10 kΩ` (U+03A9 or the ohm sign U+2126), `1Meg` (the SPICE spelling), `220`,
//!   `0.47`, `100 mOhm`, `4.7e3`. A decimal comma is read (`4,7k`).
//!
//! # Choices where spellings collide
//!
//! A value that could mean two things is reported, never guessed:
//!
//! * `M` is always mega. A lone lowercase `m` (`100m`, `1m0`) is rejected: SPICE
//!   and SI read it as milli, but on a schematic a pull resistor written `1m` is far
//!   more often a megohm typed in lowercase, and the two readings differ by 1e9.
//!   Milliohms are read when the unit follows (`100 mOhm`, `100mΩ`) or in the code
//!   form `L` (`1L5`). `meg`, `Meg` and `MEG` are mega, as in SPICE.
//! * `E` between digits is the ohm letter when written uppercase (`4E7` = 4.7 Ohm)
//!   and an exponent when the mantissa has a decimal point or the exponent a sign
//!   (`4.7e3`, `1e-3`, `1E+6`). So `1E3` is 1.3 Ohm, not 1000. A lowercase `e`
//!   between plain digits (`4e7`, `1e3`) is rejected: it reads either way.
//! * A comma before exactly three digits (`1,000`, `2,200k`) is rejected: it is a
//!   thousands separator in some countries and a decimal comma in others.
//! * In a network, `10x10` is rejected: either number could be the element count.
//!
//! Values that mark a part as not fitted (`DNP`, `DNF`, `NF`, `NP`, `NM`, ...) get
//! their own error, [`ValueError::NotFitted`], so a check can treat the part as
//! absent rather than as unreadable.

use thiserror::Error;

/// A resistor's value.
#[derive(Debug, Clone, PartialEq)]
pub struct Resistance {
    /// Resistance in ohms; finite and not negative (`0R` is a link and reads as 0).
    pub ohms: f64,
    /// Tolerance in per cent, when the value field states one.
    pub tolerance_pct: Option<f64>,
    /// Power rating in watts, when the value field states one.
    pub watts: Option<f64>,
}

/// A resistor network's value: the resistance of each element and, when the value
/// field says, how many elements it has.
#[derive(Debug, Clone, PartialEq)]
pub struct ResistorNetwork {
    /// Resistance of each element in ohms.
    pub ohms: f64,
    /// Number of resistor elements (`4K7x8` -> 8; `10k 9-pin bussed` -> 8).
    pub elements: Option<u32>,
}

/// Why a value field cannot be read as a resistance. Every message names the
/// whole value as written.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum ValueError {
    /// The field is empty, blank, or KiCad's `~` placeholder.
    #[error("cannot read an empty value as a resistance")]
    Empty,
    /// The field marks the part as not fitted (`DNP`, `NF`, ...).
    #[error("cannot read `{0}` as a resistance: it marks a part that is not fitted")]
    NotFitted(String),
    /// There are no digits where the resistance should be.
    #[error("cannot read `{0}` as a resistance: no number")]
    NoNumber(String),
    /// A letter or symbol that is neither a multiplier nor an ohm unit.
    #[error(
        "cannot read `{text}` as a resistance: `{unit}` is not a resistance unit or multiplier"
    )]
    UnknownUnit { text: String, unit: String },
    /// Two multiplier letters, as in `10kk` or `4K7K`.
    #[error("cannot read `{0}` as a resistance: two multiplier letters")]
    TwoMultipliers(String),
    /// Two decimal points, or a decimal point and a code letter (`1.2.3k`, `1.2k3`).
    #[error("cannot read `{0}` as a resistance: two decimal points")]
    TwoDecimalPoints(String),
    /// The spelling reads two ways; `why` says which and how to write it.
    #[error("cannot read `{text}` as a resistance: {why}")]
    Ambiguous { text: String, why: String },
    /// The number is negative.
    #[error("cannot read `{0}` as a resistance: the number is negative")]
    Negative(String),
    /// The number overflows (or is otherwise not finite).
    #[error("cannot read `{0}` as a resistance: the number is too large")]
    NotFinite(String),
    /// A field ending in `%` that is not a tolerance between 0 and 100 %.
    #[error("cannot read `{text}` as a resistance: `{field}` is not a tolerance")]
    BadTolerance { text: String, field: String },
    /// A field ending in `W` that is not a positive power rating.
    #[error("cannot read `{text}` as a resistance: `{field}` is not a power rating")]
    BadPower { text: String, field: String },
    /// A second resistance after the first (`10k 4K7`).
    #[error("cannot read `{text}` as a resistance: it holds a second value `{field}`")]
    SecondValue { text: String, field: String },
    /// A network's element count that cannot be read.
    #[error("cannot read `{text}` as a resistor network: {why}")]
    BadElementCount { text: String, why: String },
}

/// Most elements a network may have; a larger count is a typing mistake.
const MAX_ELEMENTS: u32 = 64;

/// Markers for a part that is not fitted, compared without case.
const NOT_FITTED: &[&str] = &[
    "nc",
    "n/c",
    "n.c.",
    "dnp",
    "dnf",
    "dni",
    "nf",
    "np",
    "nm",
    "nopop",
    "no-pop",
    "unfitted",
    "unpopulated",
];

/// Reads a resistor's value field.
///
/// ```
/// use netmargin::values::parse_resistance;
/// assert_eq!(parse_resistance("4K7").unwrap().ohms, 4700.0);
/// let r = parse_resistance("10k 1% 1/4W").unwrap();
/// assert_eq!((r.ohms, r.tolerance_pct, r.watts), (10_000.0, Some(1.0), Some(0.25)));
/// assert!(parse_resistance("DNP").is_err());
/// ```
pub fn parse_resistance(text: &str) -> Result<Resistance, ValueError> {
    let trimmed = text.trim();
    if trimmed.is_empty() || trimmed == "~" {
        return Err(ValueError::Empty);
    }
    let fields = split_fields(trimmed, text)?;
    if fields.iter().any(|f| is_not_fitted(f)) || is_not_fitted_phrase(trimmed) {
        return Err(ValueError::NotFitted(text.to_string()));
    }
    let Some((first, rest)) = fields.split_first() else {
        return Err(ValueError::Empty);
    };
    let ohms = parse_value_token(first, text)?;
    let mut tolerance_pct = None;
    let mut watts = None;
    for field in rest {
        if field.ends_with('%') {
            let t = parse_tolerance(field).ok_or_else(|| ValueError::BadTolerance {
                text: text.to_string(),
                field: field.clone(),
            })?;
            if tolerance_pct.replace(t).is_some() {
                return Err(ValueError::BadTolerance {
                    text: text.to_string(),
                    field: field.clone(),
                });
            }
        } else if looks_like_power(field) {
            let w = parse_power(field).ok_or_else(|| ValueError::BadPower {
                text: text.to_string(),
                field: field.clone(),
            })?;
            if watts.replace(w).is_some() {
                return Err(ValueError::BadPower {
                    text: text.to_string(),
                    field: field.clone(),
                });
            }
        } else if is_unit_word(field) {
            // a unit or multiplier that could not be joined to a number: `4K7 K` is
            // joined, so this is e.g. a unit after a tolerance
            return Err(ValueError::TwoMultipliers(text.to_string()));
        } else if field.chars().any(|c| c.is_ascii_digit())
            && field.chars().any(char::is_alphabetic)
            && parse_value_token(field, text).is_ok()
        {
            return Err(ValueError::SecondValue {
                text: text.to_string(),
                field: field.clone(),
            });
        }
        // anything else (a package size, a material, a note) is not read
    }
    Ok(Resistance {
        ohms,
        tolerance_pct,
        watts,
    })
}

/// Reads a resistor network's value field: the element resistance and an optional
/// element count, written `4K7x8`, `8x10k`, `4.7K*8`, `10K×8`, `8 x 4K7`, or as a
/// pin count with `bussed`/`common` (N pins hold N - 1 elements) or `isolated`
/// (N pins hold N / 2 elements), as in `10k 9-pin bussed`.
///
/// ```
/// use netmargin::values::parse_network;
/// let n = parse_network("4K7x8").unwrap();
/// assert_eq!((n.ohms, n.elements), (4700.0, Some(8)));
/// assert_eq!(parse_network("10k").unwrap().elements, None);
/// ```
// ---------------------------------------------------------------------------
// preferred values (IEC 60063)

/// The E12 series (IEC 60063), one decade.
pub const E12: [f64; 12] = [1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2];
/// The 1 - 2.2 - 4.7 steps (E3, IEC 60063), the usual choice for pull resistors.
pub const E3: [f64; 3] = [1.0, 2.2, 4.7];

fn series_values(r: f64, series: &[f64]) -> impl Iterator<Item = f64> + '_ {
    let decade = if r > 0.0 && r.is_finite() {
        r.log10().floor() as i32
    } else {
        0
    };
    (decade - 1..=decade + 1)
        .flat_map(move |d| series.iter().map(move |m| round_value(m * 10f64.powi(d))))
}

/// Removes the rounding noise of `m x 10^d` (4.7 x 1000 = 4700.000000000001).
fn round_value(x: f64) -> f64 {
    let scale = 10f64.powi(x.log10().floor() as i32 - 3);
    (x / scale).round() * scale
}

/// The largest value of `series` (any decade) not above `r`.
pub fn series_at_most(r: f64, series: &[f64]) -> Option<f64> {
    if !r.is_finite() || r <= 0.0 {
        return None;
    }
    series_values(r, series)
        .filter(|v| *v <= r * (1.0 + 1e-9))
        .reduce(f64::max)
}

/// The smallest value of `series` (any decade) not below `r`.
pub fn series_at_least(r: f64, series: &[f64]) -> Option<f64> {
    if !r.is_finite() || r <= 0.0 {
        return None;
    }
    series_values(r, series)
        .filter(|v| *v >= r * (1.0 - 1e-9))
        .reduce(f64::min)
}

/// Between 2 and 16: an element count of a resistor network rather than a resistance.
fn plausible_count(t: &str) -> bool {
    t.parse::<u32>().is_ok_and(|n| (2..=16).contains(&n))
}

pub fn parse_network(text: &str) -> Result<ResistorNetwork, ValueError> {
    let chars: Vec<char> = text.chars().collect();
    let mut count: Option<u32> = None;
    let mut value_text = text.to_string();
    for (i, &c) in chars.iter().enumerate() {
        if !matches!(c, 'x' | 'X' | '*' | '×') {
            continue;
        }
        let (left_start, left) = token_before(&chars, i);
        let (right_end, right) = token_after(&chars, i);
        if left.is_empty() || right.is_empty() {
            continue;
        }
        let left_int = left.chars().all(|c| c.is_ascii_digit());
        let right_int = right.chars().all(|c| c.is_ascii_digit());
        let (count_text, value) = match (left_int, right_int) {
            (false, false) => continue,
            // `330x8`: a count is a handful of elements, a resistance in bare ohms is not
            (true, true) if plausible_count(&right) && !plausible_count(&left) => (right, left),
            (true, true) if plausible_count(&left) && !plausible_count(&right) => (left, right),
            (true, true) => {
                return Err(ValueError::Ambiguous {
                    text: text.to_string(),
                    why: format!(
                        "either `{left}` or `{right}` could be the element count: \
                         write the resistance with its unit, as in `{left}Rx{right}`"
                    ),
                })
            }
            (true, false) => (left, right),
            (false, true) => (right, left),
        };
        count = Some(parse_count(&count_text, text)?);
        let before: String = chars[..left_start].iter().collect();
        let after: String = chars[right_end..].iter().collect();
        value_text = format!("{before}{value}{after}");
        break;
    }
    // `47k_Pack05_SIP`: a library-style name whose first word is the resistance
    let r = match parse_resistance(&value_text) {
        Ok(r) => r,
        Err(e) => match value_text.split_once('_') {
            Some((head, _)) if !head.is_empty() && !matches!(e, ValueError::NotFitted(_)) => {
                parse_resistance(head).map_err(|_| rename_text(e, text))?
            }
            _ => return Err(rename_text(e, text)),
        },
    };
    let from_pins = elements_from_pins(text)?;
    let elements = match (count, from_pins) {
        (Some(c), Some(p)) if c != p => {
            return Err(ValueError::BadElementCount {
                text: text.to_string(),
                why: format!("the count says {c} elements but the pin count gives {p}"),
            })
        }
        (Some(c), _) => Some(c),
        (None, p) => p,
    };
    Ok(ResistorNetwork {
        ohms: r.ohms,
        elements,
    })
}

/// Formats a resistance the way an engineer writes it on a schematic: 3 significant
/// figures, no trailing zeros, with the prefix that leaves 1 to 999 before it:
/// 347 -> `347 Ohm`, 6700 -> `6.7 kOhm`, 1e6 -> `1 MOhm`, 0.47 -> `470 mOhm`.
pub fn format_ohms(ohms: f64) -> String {
    if !ohms.is_finite() {
        return format!("{ohms} Ohm");
    }
    if ohms == 0.0 {
        return "0 Ohm".to_string();
    }
    let (sign, digits, exp) = round_sig3(ohms);
    // choose the prefix from the rounded value, so 999.7 becomes 1 kOhm
    let prefix_exp = (exp.div_euclid(3) * 3).clamp(-3, 12);
    let prefix = match prefix_exp {
        -3 => "m",
        0 => "",
        3 => "k",
        6 => "M",
        9 => "G",
        _ => "T",
    };
    let number = place_point(&digits, exp - prefix_exp);
    format!("{sign}{number} {prefix}Ohm")
}

/// Formats a voltage with two decimals: 2.7 -> `2.70 V`, -0.4 -> `-0.40 V`.
pub fn format_volts(v: f64) -> String {
    format!("{} V", fixed2(v))
}

/// Formats a current for a message: from 1 A up in amps and from 0.1 mA up in
/// milliamps, both with two decimals (-0.0004 -> `-0.40 mA`, 0.016 -> `16.00 mA`);
/// below 0.1 mA in microamps with 3 significant figures and no trailing zeros
/// (20e-6 -> `20 uA`, 1e-7 -> `0.1 uA`). Microamps are written `uA` so that logs
/// that are not UTF-8 clean still read them.
pub fn format_amps(a: f64) -> String {
    if !a.is_finite() {
        return format!("{a} A");
    }
    if a == 0.0 {
        return "0.00 mA".to_string();
    }
    // decide on the rounded figures, so a value just below a boundary that rounds
    // up is written in the larger unit
    let ma = fixed2(a * 1e3);
    if ma.trim_start_matches('-').len() > "999.99".len() {
        return format!("{} A", fixed2(a));
    }
    if a.abs() >= 1e-4 {
        return format!("{ma} mA");
    }
    let (sign, digits, exp) = round_sig3(a * 1e6);
    if exp >= 2 {
        return format!("{ma} mA");
    }
    format!("{sign}{} uA", place_point(&digits, exp))
}

// ---------------------------------------------------------------------------
// splitting a field into its parts

/// Splits the value field into fields on spaces and on commas or semicolons that
/// are not a decimal comma, turns decimal commas into points, and joins a unit
/// written apart (`4.7 kOhm`, `5 %`, `1/4 W`) to the field before it.
fn split_fields(trimmed: &str, text: &str) -> Result<Vec<String>, ValueError> {
    let chars: Vec<char> = trimmed.chars().collect();
    let mut raw: Vec<String> = Vec::new();
    let mut cur = String::new();
    for (i, &c) in chars.iter().enumerate() {
        let digit_before = i > 0 && chars[i - 1].is_ascii_digit();
        let digit_after = chars.get(i + 1).is_some_and(|c| c.is_ascii_digit());
        if c == ',' && digit_before && digit_after {
            let run = chars[i + 1..]
                .iter()
                .take_while(|c| c.is_ascii_digit())
                .count();
            if run == 3 {
                return Err(ValueError::Ambiguous {
                    text: text.to_string(),
                    why: "a comma before three digits reads as a thousands separator or as a \
                          decimal comma: write `1000` or `1.000`"
                        .to_string(),
                });
            }
            cur.push('.');
        } else if c.is_whitespace() || c == ',' || c == ';' {
            if !cur.is_empty() {
                raw.push(std::mem::take(&mut cur));
            }
        } else {
            cur.push(c);
        }
    }
    if !cur.is_empty() {
        raw.push(cur);
    }
    let mut fields: Vec<String> = Vec::new();
    for f in raw {
        match fields.last_mut() {
            Some(last) if is_unit_word(&f) => last.push_str(&f),
            _ => fields.push(f),
        }
    }
    Ok(fields)
}

fn is_not_fitted(field: &str) -> bool {
    let lower = field.to_lowercase();
    NOT_FITTED.contains(&lower.as_str())
}

fn is_not_fitted_phrase(trimmed: &str) -> bool {
    let lower: String = trimmed
        .to_lowercase()
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ");
    [
        "not fitted",
        "do not fit",
        "do not populate",
        "not populated",
        "not mounted",
        "no pop",
    ]
    .iter()
    .any(|p| lower.contains(p))
}

/// An ohm unit written as a word or symbol.
fn ohm_unit_len(s: &str) -> Option<usize> {
    for sym in ['\u{3a9}', '\u{2126}'] {
        if s.starts_with(sym) {
            return Some(sym.len_utf8());
        }
    }
    let lower = s.to_ascii_lowercase();
    if lower.starts_with("ohms") {
        Some(4)
    } else if lower.starts_with("ohm") {
        Some(3)
    } else {
        None
    }
}

/// A field that is only a unit, a multiplier, or both: joined to the number before.
fn is_unit_word(s: &str) -> bool {
    if matches!(s, "%" | "W" | "w" | "mW" | "R" | "r" | "E") {
        return true;
    }
    let rest = ["Meg", "meg", "MEG", "k", "K", "M", "G", "g", "T", "t", "m"]
        .iter()
        .find_map(|p| s.strip_prefix(p));
    match rest {
        Some("") => true,
        Some(r) => ohm_unit_len(r) == Some(r.len()),
        None => ohm_unit_len(s) == Some(s.len()),
    }
}

// ---------------------------------------------------------------------------
// the resistance itself

/// What the letter after (or in place of) the number stands for.
enum Code {
    /// A code letter of IEC 60062 (or `E`): may stand in place of the decimal point.
    Letter(i32),
    /// An SI prefix that never stands in the decimal point's place (`Meg`, `m` before a unit).
    Prefix(i32),
    /// An ohm unit directly after the number.
    Unit,
    /// Nothing follows the number.
    None,
}

/// Reads one resistance (`4K7`, `4.7kOhm`, `1Meg`) with the whole field `text`
/// for the messages.
fn parse_value_token(tok: &str, text: &str) -> Result<f64, ValueError> {
    let err_text = || text.to_string();
    let s: Vec<char> = tok.chars().collect();
    let mut i = 0;
    if matches!(s.first(), Some('-' | '−')) {
        return if s.iter().any(|c| c.is_ascii_digit()) {
            Err(ValueError::Negative(err_text()))
        } else {
            Err(ValueError::NoNumber(err_text()))
        };
    }
    if s.first() == Some(&'+') {
        i += 1;
    }
    let int_digits = take_digits(&s, &mut i);
    let mut frac_digits = String::new();
    let mut has_point = false;
    if s.get(i) == Some(&'.') {
        has_point = true;
        i += 1;
        frac_digits = take_digits(&s, &mut i);
    }
    let has_number = !int_digits.is_empty() || !frac_digits.is_empty();
    if has_point && !has_number {
        return Err(ValueError::NoNumber(err_text()));
    }
    if s.get(i) == Some(&'.') {
        return Err(ValueError::TwoDecimalPoints(err_text()));
    }

    // an exponent: `4.7e3`, `1e-3`, `1E+6`
    let mut exp10: i64 = 0;
    let mut has_exponent = false;
    if has_number && matches!(s.get(i), Some('e' | 'E')) {
        let signed = matches!(s.get(i + 1), Some('+' | '-'))
            && s.get(i + 2).is_some_and(|c| c.is_ascii_digit());
        let digit_next = s.get(i + 1).is_some_and(|c| c.is_ascii_digit());
        if signed || (digit_next && has_point) {
            let negative = s.get(i + 1) == Some(&'-');
            i += if signed { 2 } else { 1 };
            let digits = take_digits(&s, &mut i);
            // more than 6 digits cannot give a finite number once applied
            let magnitude: i64 = if digits.len() > 6 {
                1_000_000
            } else {
                digits.parse().unwrap_or(1_000_000)
            };
            exp10 = if negative { -magnitude } else { magnitude };
            has_exponent = true;
        } else if digit_next && s[i] == 'e' {
            return Err(ValueError::Ambiguous {
                text: err_text(),
                why: "a lowercase `e` between digits reads as an exponent or as the ohm letter: \
                      write `4.7e3` for an exponent or `4E7` or `4R7` for the ohm letter"
                    .to_string(),
            });
        }
    }

    // without a number, only a code letter before digits can follow (`R47`, `K47`)
    if !has_number {
        let letter_first = s.get(i).is_some_and(|c| "RrEeLlkKMmGgTt".contains(*c));
        let digit_next = s.get(i + 1).is_some_and(|c| c.is_ascii_digit());
        if !(letter_first && digit_next) {
            return Err(ValueError::NoNumber(err_text()));
        }
    }
    // the letter, prefix or unit after the number
    let rest: String = s[i..].iter().collect();
    let (code, code_len) = read_code(&rest, text)?;
    if !has_number && !matches!(code, Code::Letter(_)) {
        return Err(ValueError::NoNumber(err_text()));
    }
    if has_exponent && !matches!(code, Code::None | Code::Unit) {
        return Err(ValueError::TwoMultipliers(err_text()));
    }
    i += rest[..code_len].chars().count();

    let mut mult_exp = 0;
    if let Code::Letter(e) | Code::Prefix(e) = code {
        mult_exp = e;
    }
    // a code letter in place of the decimal point: `4K7`, `R47`
    if let Code::Letter(_) = code {
        if s.get(i).is_some_and(|c| c.is_ascii_digit()) {
            if has_point {
                return Err(ValueError::TwoDecimalPoints(err_text()));
            }
            frac_digits = take_digits(&s, &mut i);
        } else if !has_number {
            return Err(ValueError::NoNumber(err_text()));
        }
    }
    // an optional unit after a letter or prefix: `4.7kOhm`, `4K7Ω`
    if !matches!(code, Code::Unit) {
        let tail: String = s[i..].iter().collect();
        if let Some(n) = ohm_unit_len(&tail) {
            i += tail[..n].chars().count();
        }
    }
    let tail: String = s[i..].iter().collect();
    if !tail.is_empty() {
        return Err(trailing_error(&tail, text));
    }

    let int_part = if int_digits.is_empty() {
        "0"
    } else {
        &int_digits
    };
    let frac_part = if frac_digits.is_empty() {
        "0"
    } else {
        &frac_digits
    };
    let exponent = exp10 + i64::from(mult_exp);
    let number = format!("{int_part}.{frac_part}e{exponent}");
    let ohms: f64 = number
        .parse()
        .map_err(|_| ValueError::NoNumber(err_text()))?;
    if !ohms.is_finite() {
        return Err(ValueError::NotFinite(err_text()));
    }
    Ok(ohms)
}

/// Reads the code at the start of `rest`; returns it and its length in bytes.
fn read_code(rest: &str, text: &str) -> Result<(Code, usize), ValueError> {
    let Some(c) = rest.chars().next() else {
        return Ok((Code::None, 0));
    };
    if rest.len() >= 3 && rest.is_char_boundary(3) && rest[..3].eq_ignore_ascii_case("meg") {
        return Ok((Code::Prefix(6), 3));
    }
    if let Some(n) = ohm_unit_len(rest) {
        return Ok((Code::Unit, n));
    }
    let code = match c {
        'R' | 'r' | 'E' | 'e' => Code::Letter(0),
        'L' | 'l' => Code::Letter(-3),
        'k' | 'K' => Code::Letter(3),
        'M' => Code::Letter(6),
        'G' | 'g' => Code::Letter(9),
        'T' | 't' => Code::Letter(12),
        'm' => {
            let after = &rest[1..];
            if ohm_unit_len(after).is_some() {
                Code::Prefix(-3)
            } else {
                return Err(ValueError::Ambiguous {
                    text: text.to_string(),
                    why: "a lowercase `m` alone reads as milli or as mega: write `M` for \
                          megohms or `mOhm` for milliohms"
                        .to_string(),
                });
            }
        }
        _ => {
            return Err(ValueError::UnknownUnit {
                text: text.to_string(),
                unit: rest.to_string(),
            })
        }
    };
    Ok((code, c.len_utf8()))
}

/// The error for text left after a complete resistance.
fn trailing_error(tail: &str, text: &str) -> ValueError {
    let first = tail.chars().next().unwrap_or(' ');
    if first == '.' || first == ',' {
        ValueError::TwoDecimalPoints(text.to_string())
    } else if matches!(
        first,
        'R' | 'r' | 'E' | 'e' | 'L' | 'l' | 'k' | 'K' | 'M' | 'm' | 'G' | 'g' | 'T' | 't'
    ) {
        ValueError::TwoMultipliers(text.to_string())
    } else {
        ValueError::UnknownUnit {
            text: text.to_string(),
            unit: tail.to_string(),
        }
    }
}

fn take_digits(s: &[char], i: &mut usize) -> String {
    let start = *i;
    while s.get(*i).is_some_and(|c| c.is_ascii_digit()) {
        *i += 1;
    }
    s[start..*i].iter().collect()
}

// ---------------------------------------------------------------------------
// tolerance, power, element count

/// `1%`, `±1%`, `+/-0.5%`, `+-5%`: a tolerance above 0 and below 100 %.
fn parse_tolerance(field: &str) -> Option<f64> {
    let body = field.strip_suffix('%')?;
    let body = ["±", "+/-", "+-"]
        .iter()
        .find_map(|p| body.strip_prefix(p))
        .unwrap_or(body);
    let t = parse_plain_number(body)?;
    (t > 0.0 && t < 100.0).then_some(t)
}

fn looks_like_power(field: &str) -> bool {
    field.ends_with(['W', 'w'])
        && field
            .chars()
            .next()
            .is_some_and(|c| c.is_ascii_digit() || c == '.')
}

/// `1/4W`, `0.25W`, `250mW`, `2 W`: a positive, finite power in watts.
fn parse_power(field: &str) -> Option<f64> {
    let body = field.strip_suffix(['W', 'w'])?;
    let (body, scale) = match body.strip_suffix('m') {
        Some(b) => (b, 1e-3),
        None => (body, 1.0),
    };
    let w = match body.split_once('/') {
        Some((n, d)) => parse_plain_number(n)? / parse_plain_number(d)?,
        None => parse_plain_number(body)?,
    } * scale;
    (w.is_finite() && w > 0.0).then_some(w)
}

/// A plain decimal number (digits with at most one point), nothing else.
fn parse_plain_number(s: &str) -> Option<f64> {
    let ok = !s.is_empty()
        && s.chars().all(|c| c.is_ascii_digit() || c == '.')
        && s.chars().filter(|&c| c == '.').count() <= 1
        && s.chars().any(|c| c.is_ascii_digit());
    if ok {
        s.parse().ok()
    } else {
        None
    }
}

/// The whitespace-free token that ends just before `i` (after skipping spaces),
/// with its start index.
fn token_before(chars: &[char], i: usize) -> (usize, String) {
    let mut end = i;
    while end > 0 && chars[end - 1].is_whitespace() {
        end -= 1;
    }
    let mut start = end;
    while start > 0 && !chars[start - 1].is_whitespace() {
        start -= 1;
    }
    (start, chars[start..end].iter().collect())
}

/// The whitespace-free token that starts just after `i` (after skipping spaces),
/// with its end index.
fn token_after(chars: &[char], i: usize) -> (usize, String) {
    let mut start = i + 1;
    while start < chars.len() && chars[start].is_whitespace() {
        start += 1;
    }
    let mut end = start;
    while end < chars.len() && !chars[end].is_whitespace() {
        end += 1;
    }
    (end, chars[start..end].iter().collect())
}

fn parse_count(count: &str, text: &str) -> Result<u32, ValueError> {
    let bad = |why: String| ValueError::BadElementCount {
        text: text.to_string(),
        why,
    };
    match count.parse::<u32>() {
        Ok(0) => Err(bad("an element count of 0".to_string())),
        Ok(n) if n > MAX_ELEMENTS => Err(bad(format!(
            "an element count of {n} is more than {MAX_ELEMENTS}"
        ))),
        Ok(n) => Ok(n),
        Err(_) => Err(bad(format!(
            "an element count of `{count}` is more than {MAX_ELEMENTS}"
        ))),
    }
}

/// `9-pin bussed` -> 8, `16-pin isolated` -> 8; `None` without both words.
fn elements_from_pins(text: &str) -> Result<Option<u32>, ValueError> {
    let lower = text.to_lowercase();
    let words: Vec<&str> = lower
        .split(|c: char| c.is_whitespace() || c == ',' || c == '-')
        .filter(|w| !w.is_empty())
        .collect();
    let mut pins: Option<u32> = None;
    for (k, w) in words.iter().enumerate() {
        let number = if let Some(n) = w.strip_suffix("pins").or_else(|| w.strip_suffix("pin")) {
            if n.is_empty() {
                // `9 pin`: the number is the word before
                k.checked_sub(1).map(|j| words[j])
            } else {
                Some(n)
            }
        } else {
            None
        };
        if let Some(n) = number.and_then(|n| n.parse::<u32>().ok()) {
            pins = Some(n);
        }
    }
    let Some(pins) = pins else {
        return Ok(None);
    };
    let bussed = words
        .iter()
        .any(|w| matches!(*w, "bussed" | "bused" | "common"));
    let isolated = words.iter().any(|w| matches!(*w, "isolated" | "separate"));
    let bad = |why: String| ValueError::BadElementCount {
        text: text.to_string(),
        why,
    };
    match (bussed, isolated) {
        (true, true) => Err(bad("it says both bussed and isolated".to_string())),
        (true, false) if (2..=MAX_ELEMENTS + 1).contains(&pins) => Ok(Some(pins - 1)),
        (false, true) if pins % 2 == 0 && (2..=2 * MAX_ELEMENTS).contains(&pins) => {
            Ok(Some(pins / 2))
        }
        (false, false) => Ok(None),
        _ => Err(bad(format!(
            "{pins} pins cannot hold a {} network",
            if bussed { "bussed" } else { "isolated" }
        ))),
    }
}

/// Puts the network's whole text in an error raised on its value part.
fn rename_text(e: ValueError, text: &str) -> ValueError {
    let t = text.to_string();
    match e {
        ValueError::Empty => ValueError::Empty,
        ValueError::NotFitted(_) => ValueError::NotFitted(t),
        ValueError::NoNumber(_) => ValueError::NoNumber(t),
        ValueError::UnknownUnit { unit, .. } => ValueError::UnknownUnit { text: t, unit },
        ValueError::TwoMultipliers(_) => ValueError::TwoMultipliers(t),
        ValueError::TwoDecimalPoints(_) => ValueError::TwoDecimalPoints(t),
        ValueError::Ambiguous { why, .. } => ValueError::Ambiguous { text: t, why },
        ValueError::Negative(_) => ValueError::Negative(t),
        ValueError::NotFinite(_) => ValueError::NotFinite(t),
        ValueError::BadTolerance { field, .. } => ValueError::BadTolerance { text: t, field },
        ValueError::BadPower { field, .. } => ValueError::BadPower { text: t, field },
        ValueError::SecondValue { field, .. } => ValueError::SecondValue { text: t, field },
        ValueError::BadElementCount { why, .. } => ValueError::BadElementCount { text: t, why },
    }
}

// ---------------------------------------------------------------------------
// formatting

/// Rounds a finite non-zero number to 3 significant figures: the sign, the three
/// digits and the decimal exponent of the first (`6700` -> ("", "670", 3)).
fn round_sig3(x: f64) -> (&'static str, String, i32) {
    let sci = format!("{:.2e}", x.abs());
    let (mantissa, exp) = sci
        .split_once('e')
        .expect("`{:e}` always writes an exponent");
    let exp: i32 = exp.parse().expect("`{:e}` writes an integer exponent");
    let digits: String = mantissa.chars().filter(char::is_ascii_digit).collect();
    let sign = if x < 0.0 { "-" } else { "" };
    (sign, digits, exp)
}

/// Writes `digits` (d.dd) with the point after `1 + shift` digits, without trailing
/// zeros: ("670", 0) -> "6.7", ("470", 2) -> "470", ("100", 4) -> "10000",
/// ("470", -2) -> "0.0047".
fn place_point(digits: &str, shift: i32) -> String {
    let point = 1 + shift;
    let (int, frac) = if point <= 0 {
        let zeros = "0".repeat(usize::try_from(-point).unwrap_or(0));
        ("0".to_string(), format!("{zeros}{digits}"))
    } else {
        let p = usize::try_from(point).unwrap_or(0);
        if p >= digits.len() {
            (
                format!("{digits}{}", "0".repeat(p - digits.len())),
                String::new(),
            )
        } else {
            (digits[..p].to_string(), digits[p..].to_string())
        }
    };
    let frac = frac.trim_end_matches('0');
    if frac.is_empty() {
        int
    } else {
        format!("{int}.{frac}")
    }
}

/// Two decimals, with no `-0.00`.
fn fixed2(x: f64) -> String {
    let s = format!("{x:.2}");
    if s == "-0.00" {
        "0.00".to_string()
    } else {
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ohms(s: &str) -> f64 {
        match parse_resistance(s) {
            Ok(r) => r.ohms,
            Err(e) => panic!("`{s}` did not parse: {e}"),
        }
    }

    fn err(s: &str) -> ValueError {
        match parse_resistance(s) {
            Ok(r) => panic!("`{s}` parsed as {r:?}"),
            Err(e) => e,
        }
    }

    #[test]
    fn messages_name_the_value_and_the_reason() {
        assert_eq!(
            err("4K7K").to_string(),
            "cannot read `4K7K` as a resistance: two multiplier letters"
        );
        assert_eq!(
            err("10kk").to_string(),
            "cannot read `10kk` as a resistance: two multiplier letters"
        );
        assert_eq!(
            err("1.2.3k").to_string(),
            "cannot read `1.2.3k` as a resistance: two decimal points"
        );
        assert_eq!(
            err("abc").to_string(),
            "cannot read `abc` as a resistance: no number"
        );
        assert_eq!(
            err("10uF").to_string(),
            "cannot read `10uF` as a resistance: `uF` is not a resistance unit or multiplier"
        );
        assert_eq!(
            err("-10k").to_string(),
            "cannot read `-10k` as a resistance: the number is negative"
        );
        assert_eq!(
            err("DNP").to_string(),
            "cannot read `DNP` as a resistance: it marks a part that is not fitted"
        );
        assert_eq!(
            err("").to_string(),
            "cannot read an empty value as a resistance"
        );
    }

    #[test]
    fn error_kinds() {
        assert_eq!(err(""), ValueError::Empty);
        assert_eq!(err("  \u{a0} "), ValueError::Empty);
        assert_eq!(err("~"), ValueError::Empty);
        assert_eq!(err("NF"), ValueError::NotFitted("NF".into()));
        assert_eq!(err("dnp"), ValueError::NotFitted("dnp".into()));
        assert_eq!(err("10k DNF"), ValueError::NotFitted("10k DNF".into()));
        assert_eq!(
            err("not fitted"),
            ValueError::NotFitted("not fitted".into())
        );
        assert_eq!(err("R"), ValueError::NoNumber("R".into()));
        assert_eq!(err("k"), ValueError::NoNumber("k".into()));
        assert_eq!(err("."), ValueError::NoNumber(".".into()));
        assert_eq!(err("Ohm"), ValueError::NoNumber("Ohm".into()));
        assert_eq!(err("inf"), ValueError::NoNumber("inf".into()));
        assert_eq!(err("1.2k3"), ValueError::TwoDecimalPoints("1.2k3".into()));
        assert_eq!(
            err("1e999"),
            ValueError::Ambiguous {
                text: "1e999".into(),
                why: "a lowercase `e` between digits reads as an exponent or as the ohm letter: \
                  write `4.7e3` for an exponent or `4E7` or `4R7` for the ohm letter"
                    .into()
            }
        );
        assert_eq!(err("1.0e999"), ValueError::NotFinite("1.0e999".into()));
        assert_eq!(
            err("1e+99999999999"),
            ValueError::NotFinite("1e+99999999999".into())
        );
        assert_eq!(
            err("1.0e300T"),
            ValueError::TwoMultipliers("1.0e300T".into())
        );
        assert_eq!(ohms("1.0e+300"), 1e300);
        assert!(matches!(err("100m"), ValueError::Ambiguous { .. }));
        assert!(matches!(err("1m0"), ValueError::Ambiguous { .. }));
        assert!(matches!(err("4e7"), ValueError::Ambiguous { .. }));
        assert!(matches!(err("1,000"), ValueError::Ambiguous { .. }));
        assert_eq!(
            err("10k 4K7"),
            ValueError::SecondValue {
                text: "10k 4K7".into(),
                field: "4K7".into()
            }
        );
        assert_eq!(
            err("10k 200%"),
            ValueError::BadTolerance {
                text: "10k 200%".into(),
                field: "200%".into()
            }
        );
        assert_eq!(
            err("10k 1/0W"),
            ValueError::BadPower {
                text: "10k 1/0W".into(),
                field: "1/0W".into()
            }
        );
        assert_eq!(err("4K7 K"), ValueError::TwoMultipliers("4K7 K".into()));
        assert_eq!(err("-0"), ValueError::Negative("-0".into()));
    }
}

#[cfg(test)]
mod preferred_value_tests {
    use super::*;

    // IEC 60063 E12 and E3 steps
    #[test]
    fn series_values_round_to_the_neighbours() {
        assert_eq!(series_at_most(1000.0, &E12), Some(1000.0));
        assert_eq!(series_at_most(999.0, &E12), Some(820.0));
        assert_eq!(series_at_most(4700.0, &E12), Some(4700.0));
        assert_eq!(series_at_least(437.5, &E12), Some(470.0));
        assert_eq!(series_at_least(821.0, &E12), Some(1000.0));
        assert_eq!(series_at_most(125e3, &E3), Some(100e3));
        assert_eq!(series_at_most(0.0, &E12), None);
        assert_eq!(series_at_most(f64::INFINITY, &E12), None);
    }
}
