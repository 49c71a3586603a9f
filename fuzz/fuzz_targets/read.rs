//! The reader alone: bytes -> source (NUL, UTF-8) -> sniff -> syntax tree. Every error
//! points inside the input and renders; every tree is well-formed and re-prints to itself.
#![no_main]

use libfuzzer_sys::fuzz_target;
use netmargin_fuzz::{check_diag, check_tree};

fuzz_target!(|data: &[u8]| {
    let source = match netmargin::input::load("fuzz.net", data.to_vec()) {
        Ok(s) => s,
        Err(e) => {
            check_diag(&e.diag, &e.source);
            return;
        }
    };
    if let Some(d) = netmargin::sexpr::sniff(source.text()) {
        check_diag(&d, &source);
        return;
    }
    match netmargin::sexpr::parse(source.text()) {
        Ok(tree) => check_tree(&tree),
        Err(d) => check_diag(&d, &source),
    }
});
