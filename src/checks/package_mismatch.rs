//! Finds a classified part whose footprint has a different number of pins from its
//! function's package: a 14-pin gate on a 16-pin footprint. The count is read from the
//! footprint's name where the name states one for a dual-row package (`DIP-14_W7.62mm`,
//! `SOIC-16_3.9x9.9mm_P1.27mm`, `TSSOP-20`, `SO-14`, `PDIP-16`, `CDIP-14`, `SSOP-20`); when
//! the component has no such footprint, from the symbol's footprint filters (`DIP-16*`).
//! Packages whose pin count differs from the dual-in-line count for the same chip (a
//! 20-pad chip carrier for a 14-pin gate, a leadless package with an exposed pad) are not
//! read, nor is a footprint name that states no count.
//!
//! Why it matters: the board is laid out for another chip. The pads under the function's
//! pins carry the wrong signals, and the power pins are not where the chip has them.
//!
//! Example: a 74LS04 (14 pins) with footprint `Package_DIP:DIP-16_W7.62mm`.
//!
//! Fix: give the component a footprint with the function's pin count, or correct the value
//! if the footprint is right and the part is another one.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "package-mismatch",
    severity: crate::diag::Severity::Warning,
    summary: "the footprint's pin count disagrees with the classified function's package",
};

use super::Context;
use crate::classify::classifier::PartClass;
use crate::diag::Diag;

/// Dual-row package families whose pin count is the chip's DIP pin count.
const PACKAGES: &[&str] = &[
    "DIP", "PDIP", "CDIP", "SDIP", "DIL", "SOIC", "SO", "SOP", "SSOP", "TSSOP", "QSOP", "TVSOP",
    "VSSOP",
];

/// The pin count a footprint name states, and the package family that states it:
/// `Package_DIP:DIP-14_W7.62mm` -> (14, "DIP"). The library part before `:` is ignored; the
/// package name must start at the beginning or after a separator, and be followed by an
/// optional `-` and the count.
pub fn footprint_pins(footprint: &str) -> Option<(u32, &'static str)> {
    let name = footprint.rsplit(':').next().unwrap_or(footprint);
    let b = name.as_bytes();
    let mut i = 0;
    while i < b.len() {
        let starts = i == 0 || !b[i - 1].is_ascii_alphanumeric();
        if !starts || !b[i].is_ascii_alphabetic() {
            i += 1;
            continue;
        }
        let mut j = i;
        while j < b.len() && b[j].is_ascii_alphabetic() {
            j += 1;
        }
        let word = &name[i..j];
        if let Some(pkg) = PACKAGES.iter().find(|p| p.eq_ignore_ascii_case(word)) {
            let mut k = j;
            if k < b.len() && b[k] == b'-' {
                k += 1;
            }
            let d0 = k;
            while k < b.len() && b[k].is_ascii_digit() {
                k += 1;
            }
            if k > d0 {
                if let Ok(n) = name[d0..k].parse::<u32>() {
                    if n > 0 {
                        return Some((n, pkg));
                    }
                }
            }
        }
        i = j;
    }
    None
}

/// Where the count came from.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Stated {
    /// The component's footprint.
    Footprint(u32, &'static str),
    /// Every footprint filter of the symbol that states a count (all disagreeing).
    Filters(Vec<(String, u32)>),
}

/// What the footprint (or else the filters) says against the function's `package_pins`:
/// `None` when it agrees or states nothing.
pub fn disagreement(
    footprint: Option<&str>,
    filters: &[&str],
    package_pins: u32,
) -> Option<Stated> {
    if package_pins == 0 {
        return None;
    }
    if let Some((n, pkg)) = footprint.and_then(footprint_pins) {
        return (n != package_pins).then_some(Stated::Footprint(n, pkg));
    }
    let counted: Vec<(String, u32)> = filters
        .iter()
        .filter_map(|f| footprint_pins(f).map(|(n, _)| (f.to_string(), n)))
        .collect();
    if counted.is_empty() || counted.iter().any(|(_, n)| *n == package_pins) {
        return None;
    }
    Some(Stated::Filters(counted))
}

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    // what a kind of part's footprint says, worked out once per kind: its classification
    // (shared by parts alike), its symbol and its footprint
    type Said<'f> = Option<(&'f crate::classify::function::Function, Stated)>;
    let mut by_kind: rustc_hash::FxHashMap<(*const PartClass, Option<u32>, Option<&str>), Said> =
        Default::default();
    for (ci, c) in cx.nl.components.iter().enumerate() {
        let part = &cx.cl.parts[ci];
        let Some((series, id)) = &part.function else {
            continue;
        };
        let fp = c
            .footprint
            .as_ref()
            .map(|f| f.as_str())
            .filter(|f| !f.trim().is_empty());
        let said = by_kind
            .entry((std::sync::Arc::as_ptr(part), c.libpart, fp))
            .or_insert_with(|| {
                let func = cx.rules.functions.get(*series, id)?;
                let filters: Vec<&str> = c
                    .libpart
                    .map(|lp| {
                        cx.nl.libparts[lp as usize]
                            .footprints
                            .iter()
                            .map(|t| t.as_str())
                            .collect()
                    })
                    .unwrap_or_default();
                Some((func, disagreement(fp, &filters, func.package_pins)?))
            });
        let Some((func, stated)) = said.clone() else {
            continue;
        };
        let value = c.value_str();
        let want = func.package_pins;
        let reference = c.reference.as_str();
        let diag = match stated {
            Stated::Footprint(n, pkg) => {
                let span = c
                    .footprint
                    .as_ref()
                    .map_or(c.reference.span(), |f| f.span());
                Diag::warning(
                    "package-mismatch",
                    format!("{reference} ({value}) is a {want}-pin part ({}) on the {n}-pin footprint `{}`", func.summary, fp.unwrap_or("")),
                )
                .at(span, format!("{n} pins; a {value} has {want}"))
                .with_help(format!("use a {want}-pin {pkg} footprint for {reference}, or correct the value if the {n}-pin footprint is right"))
            }
            Stated::Filters(f) => {
                let lp = c.libpart.map(|lp| &cx.nl.libparts[lp as usize]);
                let span = lp
                    .and_then(|lp| {
                        lp.footprints
                            .iter()
                            .find(|t| footprint_pins(t.as_str()).is_some())
                            .map(|t| t.span())
                    })
                    .unwrap_or(c.reference.span());
                let list: Vec<String> =
                    f.iter().map(|(s, n)| format!("`{s}` ({n} pins)")).collect();
                let symbol = lp.map_or(String::from("its symbol"), |lp| {
                    format!("its symbol `{}`", lp.part.as_str())
                });
                Diag::warning(
                    "package-mismatch",
                    format!("{reference} ({value}) is a {want}-pin part ({}), but {symbol} only takes footprints {}", func.summary, list.join(", ")),
                )
                .at(span, format!("a {value} has {want} pins"))
                .with_help(format!("use a symbol for a {want}-pin {value}, or check the value"))
            }
        };
        out.push(diag);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn counts_from_footprint_names() {
        assert_eq!(
            footprint_pins("Package_DIP:DIP-14_W7.62mm"),
            Some((14, "DIP"))
        );
        assert_eq!(
            footprint_pins("Package_SO:SOIC-16_3.9x9.9mm_P1.27mm"),
            Some((16, "SOIC"))
        );
        assert_eq!(
            footprint_pins("Package_SO:TSSOP-20_4.4x6.5mm_P0.65mm"),
            Some((20, "TSSOP"))
        );
        assert_eq!(footprint_pins("SO-14"), Some((14, "SO")));
        assert_eq!(footprint_pins("PDIP-16"), Some((16, "PDIP")));
        assert_eq!(footprint_pins("DIP-8"), Some((8, "DIP")));
        assert_eq!(
            footprint_pins("SSOP-20_5.3x7.2mm_P0.65mm"),
            Some((20, "SSOP"))
        );
        assert_eq!(footprint_pins("CDIP-14"), Some((14, "CDIP")));
        assert_eq!(
            footprint_pins("Package_SO:SOIC-16W_7.5x10.3mm_P1.27mm"),
            Some((16, "SOIC"))
        );
        assert_eq!(
            footprint_pins("Package_DIP:DIP-16_W7.62mm_Socket"),
            Some((16, "DIP"))
        );
        assert_eq!(
            footprint_pins("Housings_DIP:DIP-14_W7.62mm"),
            Some((14, "DIP"))
        );
        assert_eq!(footprint_pins("DIP-16*"), Some((16, "DIP")));
        assert_eq!(footprint_pins("dil14"), Some((14, "DIL")));
    }

    #[test]
    fn no_count_no_reading() {
        for f in [
            "",
            "Package_DIP:DIP",
            "DIP*W7.62mm*",
            "SOIC*3.9x8.7mm*",
            "tw714:EDGE_30_P3.96mm",
            "Package_TO_SOT_SMD:SOT-23-5",
            "Package_LCC:PLCC-20",
            "Package_DFN_QFN:QFN-16-1EP_3x3mm_P0.5mm",
            "MYDIP-14",
            "Package_SO:SOT-223-3_TabPin2",
        ] {
            assert_eq!(footprint_pins(f), None, "{f}");
        }
    }

    #[test]
    fn which_count_wins() {
        assert_eq!(
            disagreement(Some("Package_DIP:DIP-16_W7.62mm"), &[], 14),
            Some(Stated::Footprint(16, "DIP"))
        );
        assert_eq!(
            disagreement(Some("Package_DIP:DIP-14_W7.62mm"), &["DIP-16*"], 14),
            None
        );
        assert_eq!(disagreement(Some("Package_DIP:DIP-14"), &[], 14), None);
        assert_eq!(disagreement(None, &["DIP*W7.62mm*"], 14), None);
        assert_eq!(
            disagreement(None, &["DIP-16*"], 14),
            Some(Stated::Filters(vec![("DIP-16*".into(), 16)]))
        );
        assert_eq!(disagreement(None, &["DIP-16*", "SOIC-14*"], 14), None);
        assert_eq!(
            disagreement(Some("tw714:SOCKET"), &["DIP-16*"], 14),
            Some(Stated::Filters(vec![("DIP-16*".into(), 16)]))
        );
        assert_eq!(
            disagreement(Some("Package_DIP:DIP-16_W7.62mm"), &[], 0),
            None
        );
    }
}
