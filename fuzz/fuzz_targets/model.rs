//! Reader plus netlist model: the path of `netmargin check` for one file, every diagnostic
//! rendered as the command line renders it.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    netmargin_fuzz::run_model(data);
});
