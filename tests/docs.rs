//! `docs/checks.md` is generated from the registry; this keeps the committed copy current.

#[test]
fn checks_reference_is_current() {
    let want = netmargin::report::docs::checks_markdown();
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/checks.md");
    if std::env::var_os("NETMARGIN_UPDATE_DOCS").is_some() {
        std::fs::create_dir_all(path.parent().unwrap()).unwrap();
        std::fs::write(&path, &want).unwrap();
    }
    let have = std::fs::read_to_string(&path).unwrap_or_default();
    assert!(
        have == want,
        "docs/checks.md is out of date: run `NETMARGIN_UPDATE_DOCS=1 cargo test --test docs`"
    );
    for c in netmargin::checks::REGISTRY {
        assert!(have.contains(&format!("## {}", c.id)), "{} missing", c.id);
    }
}
