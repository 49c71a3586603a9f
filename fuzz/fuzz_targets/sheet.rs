//! The schematic reader on one sheet: sniff, parse, place, connect, name, model.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    netmargin_fuzz::run_sheet(data);
});
