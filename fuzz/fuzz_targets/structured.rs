//! Structured input: a generated, mostly-valid netlist (colliding references, pins and
//! codes; missing fields; lists where values belong; truncation and insertions), through
//! the whole model path.
#![no_main]

use libfuzzer_sys::fuzz_target;
use netmargin_fuzz::GenNetlist;

fuzz_target!(|g: GenNetlist| {
    let text = g.to_text();
    netmargin_fuzz::run_model(text.as_bytes());
    // an undamaged netlist with an `export` root always builds a model
    if matches!(g.damage, netmargin_fuzz::Damage::None) {
        let tree = netmargin::sexpr::parse(&text).expect("generated text reads");
        netmargin_fuzz::check_tree(&tree);
        netmargin::netlist::build(&tree).expect("an `export` root builds a model");
    }
});
