//! The whole `netmargin check` pipeline: read, model, classify, check, render. Built only
//! with `--features check` (scripts/fuzz.sh adds it), for a netmargin whose
//! `pipeline::check_source` exists.
#![no_main]

use std::sync::OnceLock;

use libfuzzer_sys::fuzz_target;
use netmargin::classify::classifier::Rules;
use netmargin::pipeline::{check_source, RunOptions};

fn rules() -> &'static Rules {
    static R: OnceLock<Rules> = OnceLock::new();
    R.get_or_init(Rules::builtin)
}

fuzz_target!(|data: &[u8]| {
    // raw bytes, or (first byte odd) a generated netlist, so the checks see real parts
    let text;
    let bytes: &[u8] = if data.first().is_some_and(|b| b & 1 == 1) {
        let mut u = arbitrary::Unstructured::new(&data[1..]);
        match <netmargin_fuzz::GenNetlist as arbitrary::Arbitrary>::arbitrary(&mut u) {
            Ok(g) => {
                text = g.to_text();
                text.as_bytes()
            }
            Err(_) => return,
        }
    } else {
        data
    };
    let source = match netmargin::input::load("fuzz.net", bytes.to_vec()) {
        Ok(s) => s,
        Err(e) => {
            netmargin_fuzz::check_diag(&e.diag, &e.source);
            return;
        }
    };
    match check_source(&source, rules(), &RunOptions::default()) {
        Ok(c) => {
            for d in &c.diags {
                netmargin_fuzz::check_diag(d, &source);
            }
            assert!(
                c.coverage.0 <= c.coverage.1,
                "classified {} of {}",
                c.coverage.0,
                c.coverage.1
            );
        }
        Err(d) => netmargin_fuzz::check_diag(&d, &source),
    }
});
