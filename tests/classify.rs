//! The classifier's precedence and the `parts` / `families` commands.

use std::process::Command;

use netmargin::classify::classifier::{classify, Method, PartKind, Rules};
use netmargin::classify::parts::PartTable;
use netmargin::classify::PinRole;

fn netlist(comps: &str, libparts: &str, nets: &str) -> String {
    format!("(export (version \"E\")\n  (components\n{comps})\n  (libparts\n{libparts})\n  (nets\n{nets}))\n")
}

const NAND_SYMBOL_WRONG: &str = r#"    (libpart (lib "x") (part "GATE14")
      (pins
        (pin (num "1") (name "A") (type "output"))
        (pin (num "3") (name "Y") (type "input"))
        (pin (num "7") (name "GND") (type "unspecified"))
        (pin (num "14") (name "VCC") (type "unspecified"))))
"#;

fn comp(r: &str, value: &str, extra: &str) -> String {
    format!("    (comp (ref \"{r}\") (value \"{value}\") (libsource (lib \"x\") (part \"GATE14\")){extra})\n")
}

#[test]
fn precedence_field_over_project_over_shipped_over_pattern() {
    let comps = [
        comp("U1", "74LS00", ""),
        comp("U2", "74LS00", " (fields (field (name \"Logic family\") \"HCT\"))"),
        comp("U3", "CUSTOM-NAND", ""),
        comp("U4", "LM358N", ""),
        comp("U5", "74LSOO", ""),
        comp("U6", "74LS00", " (fields (field (name \"Logic family\") \"HC\") (field (name \"Logic function\") \"02\"))"),
    ]
    .concat();
    let text = netlist(&comps, NAND_SYMBOL_WRONG, "");
    let tree = netmargin::sexpr::parse(&text).unwrap();
    let nl = netmargin::netlist::build(&tree).unwrap();
    let mut rules = Rules::builtin();
    let project = PartTable::parse(
        "[[part]]\nvalues = [\"CUSTOM-*\"]\nfamily = \"74S\"\nseries = \"74\"\nfunction = \"00\"\n",
        false,
    )
    .unwrap();
    rules.parts.merge_over(project);
    let cl = classify(&nl, &rules);
    let p = |i: usize| &cl.parts[i];
    assert_eq!(
        (p(0).method, p(0).family.as_deref()),
        (Method::Pattern, Some("74LS"))
    );
    assert_eq!(
        (p(1).method, p(1).family.as_deref()),
        (Method::ComponentField, Some("74HCT")),
        "the field wins over the value"
    );
    assert_eq!(
        (p(2).method, p(2).family.as_deref()),
        (Method::ProjectOverride, Some("74S"))
    );
    assert_eq!(
        (p(3).method, p(3).kind),
        (Method::ShippedEntry, PartKind::NotLogic)
    );
    assert_eq!(p(4).kind, PartKind::UnknownIc);
    assert_eq!(
        p(4).suggestions.first().map(|s| s.value.as_str()),
        Some("74LS00")
    );
    assert_eq!(
        p(5).function.as_ref().map(|f| f.1.as_str()),
        Some("02"),
        "a Logic function field names the function"
    );
    // the value is the truth: the table's roles win over the symbol's wrong pin types
    let u1 = &nl.components[0];
    let role = |num: &str| p(0).roles[u1.pins.iter().position(|x| x.num(&nl) == num).unwrap()];
    assert_eq!(role("1"), PinRole::Input);
    assert_eq!(role("3"), PinRole::PushPull);
    assert_eq!(role("14"), PinRole::Supply);
    assert_eq!(role("7"), PinRole::Ground);
    // coverage: 6 IC-like parts, U5 unclassified
    assert_eq!(cl.coverage, (5, 6));
}

#[test]
fn netlist_only_parts_take_the_symbols_pin_types() {
    let lib = r#"    (libpart (lib "x") (part "MYSTERY")
      (pins
        (pin (num "1") (name "IN") (type "input"))
        (pin (num "2") (name "OUT") (type "open_collector"))
        (pin (num "3") (name "GND") (type "power_in"))
        (pin (num "4") (name "VCC") (type "power_in"))
        (pin (num "5") (name "NC") (type "no_connect"))))
"#;
    let text = netlist(
        "    (comp (ref \"U1\") (value \"XR-2206Q\") (libsource (lib \"x\") (part \"MYSTERY\")))\n",
        lib,
        "",
    );
    let tree = netmargin::sexpr::parse(&text).unwrap();
    let nl = netmargin::netlist::build(&tree).unwrap();
    let cl = classify(&nl, &Rules::builtin());
    assert_eq!(cl.parts[0].method, Method::NetlistOnly);
    assert_eq!(
        cl.parts[0].roles.to_vec(),
        vec![
            PinRole::Input,
            PinRole::OpenCollector,
            PinRole::Ground,
            PinRole::Supply,
            PinRole::NoConnect
        ]
    );
}

#[test]
fn parts_command_text_and_json() {
    let run = |args: &[&str]| {
        let o = Command::new(env!("CARGO_BIN_EXE_netmargin"))
            .args(args)
            .current_dir(env!("CARGO_MANIFEST_DIR"))
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        String::from_utf8(o.stdout).unwrap()
    };
    let text = run(&["parts", "fixtures/demo/counter-timer.net"]);
    assert!(text.contains("U22  74LSOO"), "{text}");
    assert!(text.contains("did you mean 74LS00"), "{text}");
    assert!(
        text.contains("25 of 26 IC-like parts classified (96 %)"),
        "{text}"
    );
    let json = run(&[
        "parts",
        "--format",
        "json",
        "fixtures/demo/counter-timer.net",
    ]);
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    assert_eq!(v["coverage"]["classified"], 25);
    assert_eq!(v["coverage"]["ic_like"], 26);
    let u23 = v["parts"]
        .as_array()
        .unwrap()
        .iter()
        .find(|p| p["reference"] == "U23")
        .unwrap();
    assert_eq!(u23["family"], "4000B");
    assert_eq!(u23["method"], "pattern");
}

#[test]
fn families_command_at_a_supply() {
    let o = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(["families", "--supply", "4.5", "--format", "json"])
        .output()
        .unwrap();
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let hc = v
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["id"] == "74HC")
        .unwrap();
    // MM74HC04 (onsemi) DC table: VIH 3.15 V at VCC = 4.5 V
    assert_eq!(hc["vih_min"], 3.15);
    assert_eq!(hc["basis"], "published");
    // TI SDLS025B: 74LS is specified for VCC 4.75 to 5.25 V, so it is not listed at 4.5 V ...
    assert!(v.as_array().unwrap().iter().all(|f| f["id"] != "74LS"));
    // ... and at 5 V it is, with IOL 8 mA
    let o = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(["families", "--supply", "5", "--format", "json"])
        .output()
        .unwrap();
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let ls = v
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["id"] == "74LS")
        .unwrap();
    assert_eq!(ls["iol_max_ma"], 8.0);
    // the text form names what it leaves out: no 74AHCT (4.5 to 5.5 V) figures at 3.3 V
    let o = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(["families", "--supply", "3.3"])
        .output()
        .unwrap();
    let text = String::from_utf8_lossy(&o.stdout);
    assert!(!text.lines().any(|l| l.starts_with("74AHCT ")), "{text}");
    assert!(
        text.contains("not specified at 3.30 V, so not listed: ")
            && text.contains("74AHCT (4.50 to 5.50 V)"),
        "{text}"
    );
}

#[test]
fn parts_columns_never_run_together_and_unnamed_nets_can_be_asked_about() {
    let run = |args: &[&str]| {
        let o = Command::new(env!("CARGO_BIN_EXE_netmargin"))
            .args(args)
            .current_dir(env!("CARGO_MANIFEST_DIR"))
            .output()
            .unwrap();
        (
            o.status.code(),
            String::from_utf8_lossy(&o.stdout).into_owned(),
        )
    };
    // every row keeps two spaces between the reference and the value, however long either is
    let (_, text) = run(&["parts", "fixtures/quirks/netnames-k8.net"]);
    let header = text.lines().next().unwrap();
    let value_at = header.find("value").unwrap();
    for line in text
        .lines()
        .skip(1)
        .filter(|l| !l.starts_with(' ') && !l.contains(':'))
    {
        assert!(
            line[..value_at].ends_with("  "),
            "columns run together: {line}"
        );
    }
    // an unnamed net is shown as `#CODE` in findings; `net` finds it by that name
    let (code, text) = run(&["net", "fixtures/quirks/netnames-k8.net", "#1"]);
    assert_eq!(code, Some(0), "{text}");
    assert!(text.contains("#1"), "{text}");
}

#[test]
fn parts_alike_share_one_pin_table_and_parts_that_differ_do_not() {
    // the same unknown chip drawn with two symbols: pin 2 open collector in one, push-pull in
    // the other
    let mystery = |part: &str, two: &str| {
        format!(
            r#"    (libpart (lib "x") (part "{part}")
      (pins
        (pin (num "1") (name "IN") (type "input"))
        (pin (num "2") (name "OUT") (type "{two}"))
        (pin (num "3") (name "GND") (type "power_in"))
        (pin (num "4") (name "VCC") (type "power_in"))))
"#
        )
    };
    let libs = [
        mystery("MYSTERY", "open_collector"),
        mystery("MYSTERY_PP", "output"),
        NAND_SYMBOL_WRONG.to_string(),
    ]
    .concat();
    let chip = |r: &str, part: &str| {
        format!("    (comp (ref \"{r}\") (value \"XR-2206Q\") (libsource (lib \"x\") (part \"{part}\")))\n")
    };
    let comps = [
        chip("U1", "MYSTERY"),
        chip("U2", "MYSTERY"),
        chip("U3", "MYSTERY_PP"),
        comp("U4", "74LS00", ""),
        comp("U5", "74LS00", ""),
        comp("U6", "74HCT00", ""),
    ]
    .concat();
    let text = netlist(&comps, &libs, "");
    let tree = netmargin::sexpr::parse(&text).unwrap();
    let nl = netmargin::netlist::build(&tree).unwrap();
    let cl = classify(&nl, &Rules::builtin());
    let shared = |a: usize, b: usize| std::sync::Arc::ptr_eq(&cl.parts[a].pins, &cl.parts[b].pins);
    // the symbol's pin types decide an unclassified part's roles: same symbol, one table
    assert!(shared(0, 1));
    assert!(!shared(0, 2), "U3's symbol types pin 2 otherwise");
    assert_eq!(cl.parts[0].roles[1], PinRole::OpenCollector);
    assert_eq!(cl.parts[2].roles[1], PinRole::PushPull);
    // a classified part's roles come from the table (74LS00: pin 1 an input, pin 3 the
    // output, whatever the symbol says); another family is another table
    assert!(shared(3, 4));
    assert!(!shared(3, 5), "74HCT00 is another family");
    for i in 3..6 {
        let role = |num: &str| {
            let at = nl.components[i]
                .pins
                .iter()
                .position(|x| x.num(&nl) == num)
                .unwrap();
            cl.parts[i].roles[at]
        };
        assert_eq!((role("1"), role("3")), (PinRole::Input, PinRole::PushPull));
        assert_eq!(
            cl.parts[i].table_names[0].as_deref(),
            Some("1A"),
            "U{}",
            i + 1
        );
    }
}
