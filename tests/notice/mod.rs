//! What the comparisons against outside references did, said past the test harness's output
//! capture, so a plain `cargo test` shows which ran and which were skipped (a tool missing
//! outside CI). Under `CI` a missing tool fails the test instead.

#![allow(dead_code)]

use std::io::Write;

/// A comparison against `reference` ran.
pub fn ran(reference: &str) {
    let _ = writeln!(std::io::stderr(), "reference comparison ran: {reference}");
}

/// A comparison against `reference` did not run: the tool is missing. Panics under CI.
pub fn skipped(reference: &str, install: &str) {
    if std::env::var_os("CI").is_some() {
        panic!("{reference}: not installed ({install}); CI must install it (`.ci/run` does)");
    }
    let _ = writeln!(
        std::io::stderr(),
        "reference comparison SKIPPED: {reference} (not installed: {install}; `.ci/run` installs it)"
    );
}
