//! Reports a classified part whose symbol is named for another part than its value: a symbol
//! drawn for a `Z80CPU` (an NMOS Z80) on a component whose value says `Z84C0010PEC` (the CMOS
//! Z80), or a `74LS02` symbol valued `74LS00`. netmargin goes by the value: the family's levels
//! and the function's pinout follow it. The symbol's name is read by the same patterns and
//! part table as values; a symbol named for no part (`Conn_01x04`, a generic gate) is not
//! compared, nor a 74 or 4000 symbol of the value's own function (libraries draw one symbol
//! per function, named for one family: a `74LS00` symbol placed as a 74HCT00 is normal).
//!
//! Why it matters: in a recaptured schematic the value is usually what was read off the part
//! or the parts list, and the symbol what was at hand; but either can be the slip. When the
//! function differs, the symbol's pin numbers may not be the part's (`pin-role-mismatch` then
//! reports the pins); when only the family differs, every level on the part's nets depends on
//! which one is right.
//!
//! Example: U4, symbol `Z80CPU`, value `Z84C0010PEC`: checked as the CMOS Z80 (CMOS-TTL levels).
//!
//! Fix: nothing, when the value is right (a substituted family is common); otherwise correct
//! the value. Using a symbol drawn for the part in the value keeps the two in step.

/// The declaration `explain`, the SARIF rules and `docs/checks.md` are generated from (with
/// the doc comment above).
pub(super) const INFO: super::CheckInfo = super::CheckInfo {
    id: "symbol-other-part",
    severity: crate::diag::Severity::Info,
    summary: "a part whose symbol is named for another part than its value; the value decides",
};

use super::Context;
use crate::diag::Diag;

pub fn run(ctx: &Context<'_, '_, '_>, out: &mut crate::diag::DiagList) {
    let cx = ctx.cx;
    for (ci, c) in cx.nl.components.iter().enumerate() {
        let part = &cx.cl.parts[ci];
        let Some(s) = part.symbol_reads_as.as_ref() else {
            continue;
        };
        let describe = |family: Option<&str>, function: Option<&str>| match (function, family) {
            (Some(f), Some(fam)) => format!("function {f}, {fam} family"),
            (Some(f), None) => format!("function {f}"),
            (None, Some(fam)) => format!("{fam} family"),
            (None, None) => "an unknown part".to_string(),
        };
        let value = c.value_str();
        let what_differs = if s.function.as_deref() != part.named_function.as_deref() {
            "its pinout is taken from the value's function, not the symbol's"
        } else {
            "its input and output levels are the value's family's, not the symbol's"
        };
        let span = c.value.as_ref().map_or(c.reference.span(), |v| v.span());
        out.push(
            Diag::info(
                "symbol-other-part",
                format!(
                    "{} has a symbol named for `{}` ({}) but its value is `{}` ({}): netmargin goes by the value, so {}",
                    c.reference,
                    s.symbol,
                    describe(s.family.as_deref(), s.function.as_deref()),
                    value,
                    describe(part.family.as_deref(), part.named_function.as_deref()),
                    what_differs
                ),
            )
            .at(span, "the value decides")
            .with_help(format!(
                "if the part fitted is a {}, nothing to do; if it is a {}, correct the value",
                value, s.symbol
            )),
        );
    }
}
