use netmargin::classify::function::{FunctionTable, Series};

#[test]
fn builtin_loads() {
    let t = match FunctionTable::parse(netmargin::classify::function::BUILTIN_TEXT) {
        Ok(t) => t,
        Err(e) => panic!("{e:#?}"),
    };
    assert!(t.get(Series::S74, "00").is_some());
}
