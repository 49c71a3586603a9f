//! The checks. One check, one file (`src/checks/<id>.rs`, the id with `_` for `-`): a doc
//! comment that says what it finds, why it matters, an example and the fix, then the code.
//! [`REGISTRY`] lists every check with its id, default severity and summary; `explain`,
//! the SARIF rule metadata and the docs are generated from it and from the doc comments, so
//! they never drift.

use crate::diag::Severity;

include!(concat!(env!("OUT_DIR"), "/check_docs.rs"));

/// What every check declares about itself.
#[derive(Debug, Clone, Copy)]
pub struct CheckInfo {
    /// Stable kebab-case id.
    pub id: &'static str,
    pub severity: Severity,
    /// One line, lowercase, no final period.
    pub summary: &'static str,
}

impl CheckInfo {
    /// The check's doc comment (from its source file).
    pub fn doc(&self) -> &'static str {
        CHECK_DOCS
            .iter()
            .find(|(id, _)| *id == self.id)
            .map_or("", |(_, d)| d)
    }
}

macro_rules! registry {
    ($($id:literal, $sev:ident, $summary:literal;)*) => {
        /// Every check, in the order `explain` lists them.
        pub static REGISTRY: &[CheckInfo] = &[
            $(CheckInfo { id: $id, severity: Severity::$sev, summary: $summary },)*
        ];
    };
}

registry! {
    "floating-cmos-input", Error, "a CMOS input with nothing to set its level: no driver, no rail, no pull resistor";
    "floating-ttl-input", Warning, "a TTL input left open: it floats high on the bench and picks up noise in service";
    "open-control-input", Error, "a processor's, peripheral's or memory's control input left open instead of held at its idle level";
    "floating-bus", Warning, "a net driven only by three-state outputs with CMOS loads and no pull resistor";
    "fanout-overrun", Error, "an output's low- or high-state current budget exceeds its rating (or the derating)";
    "ttl-high-into-cmos", Error, "a driver's guaranteed high level is below a CMOS load's VIH";
    "level-mismatch", Error, "a guaranteed low level above a load's VIL, or another high-level shortfall";
    "missing-pull-up", Error, "an open-collector or open-drain output with no pull-up resistor to a rail";
    "pull-up-out-of-range", Error, "a pull-up outside the window set by the output's IOL and the loads' currents";
    "output-contention", Error, "two push-pull outputs on one net, or a push-pull output tied to a rail";
    "ttl-pull-down-too-large", Error, "a TTL input held low through a resistor too large for its input current";
    "input-overvoltage", Error, "a driver's high level above what a load's input can take at its supply";
    "power-pin-miswired", Error, "a supply pin on ground, a ground pin on a supply, or a supply pin on no net";
    "unpowered-part", Error, "a classified part whose supply or ground pin is on no net or absent";
    "weak-high-drive", Warning, "a TTL output that must source a non-logic load (an LED to ground) in its high state";
    "package-mismatch", Warning, "the footprint's pin count disagrees with the classified function's package";
    "pin-role-mismatch", Warning, "the netlist's pin types disagree with the function table for the part (wrong symbol)";
    "unclassified-part", Info, "an IC-like part whose value no mapping matched; near misses suggested";
    "unreadable-value", Warning, "a resistor whose value cannot be read, so its pull current is unknown";
    "inferred-rail", Info, "a rail whose existence or voltage netmargin inferred from its pins, its regulator or the families it powers";
}

/// Looks a check up by id.
pub fn info(id: &str) -> Option<&'static CheckInfo> {
    REGISTRY.iter().find(|c| c.id == id)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ids_are_unique_kebab_case_and_summaries_follow_the_style() {
        let mut seen = std::collections::HashSet::new();
        for c in REGISTRY {
            assert!(seen.insert(c.id), "duplicate {}", c.id);
            assert!(
                c.id.chars().all(|ch| ch.is_ascii_lowercase() || ch == '-'),
                "{}",
                c.id
            );
            assert!(!c.summary.ends_with('.'), "{}", c.id);
            assert!(
                c.summary
                    .chars()
                    .next()
                    .is_some_and(|ch| !ch.is_uppercase()),
                "{}",
                c.id
            );
        }
    }
}

mod common;
mod fanout_overrun;
mod floating_bus;
mod floating_cmos_input;
mod floating_ttl_input;
mod inferred_rail;
mod input_overvoltage;
mod level_mismatch;
mod missing_pull_up;
mod open_control_input;
mod output_contention;
mod package_mismatch;
mod pin_role_mismatch;
mod power_pin_miswired;
mod pull_up_out_of_range;
mod ttl_high_into_cmos;
mod ttl_pull_down_too_large;
mod unclassified_part;
mod unpowered_part;
mod unreadable_value;
mod weak_high_drive;

use crate::circuit::budget::{net_budget, NetBudget};
use crate::circuit::Circuit;
use crate::diag::Diag;

/// Options that change what the checks report.
#[derive(Debug, Clone)]
pub struct CheckOptions {
    /// Fan-out above this fraction of the rating is a warning (above 1.0 an error).
    pub derating: f64,
    /// A high-level margin below this (volts) is still a warning, though it passes.
    pub min_margin_v: f64,
    /// Checks turned off, by id.
    pub disabled: Vec<String>,
    /// Severity overrides, by id.
    pub severity: Vec<(String, Severity)>,
}

impl Default for CheckOptions {
    fn default() -> Self {
        CheckOptions {
            derating: 0.8,
            min_margin_v: 0.0,
            disabled: Vec::new(),
            severity: Vec::new(),
        }
    }
}

/// What a check sees: the circuit, every net's budget, the options.
pub struct Context<'c, 'n, 'a> {
    pub cx: &'c Circuit<'n, 'a>,
    pub budgets: Vec<NetBudget>,
    pub opts: &'c CheckOptions,
}

type CheckFn = fn(&Context<'_, '_, '_>, &mut Vec<Diag>);

/// The checks in the order they run (findings are sorted afterwards).
fn checks() -> Vec<(&'static str, CheckFn)> {
    vec![
        ("floating-cmos-input", floating_cmos_input::run),
        ("floating-ttl-input", floating_ttl_input::run),
        ("open-control-input", open_control_input::run),
        ("fanout-overrun", fanout_overrun::run),
        ("ttl-high-into-cmos", ttl_high_into_cmos::run),
        ("level-mismatch", level_mismatch::run),
        ("missing-pull-up", missing_pull_up::run),
        ("pull-up-out-of-range", pull_up_out_of_range::run),
        ("output-contention", output_contention::run),
        ("floating-bus", floating_bus::run),
        ("ttl-pull-down-too-large", ttl_pull_down_too_large::run),
        ("input-overvoltage", input_overvoltage::run),
        ("weak-high-drive", weak_high_drive::run),
        ("power-pin-miswired", power_pin_miswired::run),
        ("unpowered-part", unpowered_part::run),
        ("package-mismatch", package_mismatch::run),
        ("pin-role-mismatch", pin_role_mismatch::run),
        ("unclassified-part", unclassified_part::run),
        ("unreadable-value", unreadable_value::run),
        ("inferred-rail", inferred_rail::run),
    ]
}

/// Runs every enabled check and returns the findings in file order.
pub fn run_all(cx: &Circuit<'_, '_>, opts: &CheckOptions) -> Vec<Diag> {
    let budgets = (0..cx.nets.len()).map(|n| net_budget(cx, n)).collect();
    let ctx = Context { cx, budgets, opts };
    let mut out = Vec::new();
    for (id, f) in checks() {
        if opts.disabled.iter().any(|d| d == id) {
            continue;
        }
        let start = out.len();
        f(&ctx, &mut out);
        let sev = opts.severity.iter().find(|(i, _)| i == id).map(|(_, s)| *s);
        for d in &mut out[start..] {
            debug_assert_eq!(d.code, id, "a check reports under its own id");
            if let Some(s) = sev {
                d.severity = s;
            }
        }
    }
    out.sort_by(|a, b| {
        let sa = a.primary_span().map_or(0, |s| s.start);
        let sb = b.primary_span().map_or(0, |s| s.start);
        sa.cmp(&sb)
            .then_with(|| a.code.cmp(&b.code))
            .then_with(|| a.message.cmp(&b.message))
    });
    out
}
