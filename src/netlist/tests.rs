use super::*;
use crate::sexpr::parse;

fn read(text: &str) -> Netlist<'_> {
    let t = parse(text).unwrap();
    // the model borrows the text, not the tree
    let nl = build(&t).unwrap();
    nl
}

const K5: &str = r#"(export (version D)
  (design
    (source C:\restore\board.sch)
    (tool "Eeschema 5.1.9")
    (sheet (number 1) (name /) (tstamps /)
      (title_block (title "Logic board") (company) (rev B))))
  (components
    (comp (ref U1)
      (value 74LS00)
      (footprint Package_DIP:DIP-14_W7.62mm)
      (libsource (lib 74xx) (part 74LS00) (description "quad NAND"))
      (sheetpath (names /) (tstamps /))
      (tstamp 5ACE05B6))
    (comp (ref R1)
      (value 4K7)
      (fields (field (name "Logic family") LS))
      (libsource (lib Device) (part R))
      (tstamp 5ACE05B7)))
  (libparts
    (libpart (lib 74xx) (part 7400)
      (aliases (alias 74LS00) (alias 74HC00))
      (pins
        (pin (num 1) (name ~) (type input))
        (pin (num 2) (name ~) (type input))
        (pin (num 3) (name ~) (type output))
        (pin (num 7) (name GND) (type power_in))
        (pin (num 14) (name VCC) (type power_in))))
    (libpart (lib Device) (part R)
      (pins (pin (num 1) (name ~) (type passive)) (pin (num 2) (name ~) (type passive)))))
  (nets
    (net (code 1) (name +5V)
      (node (ref U1) (pin 14))
      (node (ref R1) (pin 1)))
    (net (code 2) (name /A)
      (node (ref U1) (pin 1))
      (node (ref U1) (pin 1))
      (node (ref R1) (pin 2))
      (node (ref U1) (pin 2)))
    (net (code 3) (name "Net-(U1-Pad3)")
      (node (ref U1) (pin 3)))))
"#;

#[test]
fn reads_kicad5_with_alias_resolution_and_absent_pins() {
    let nl = read(K5);
    assert_eq!(nl.dialect, Dialect::D);
    assert!(nl.diagnostics.is_empty(), "{:?}", nl.diagnostics);
    assert_eq!(nl.design.title.as_ref().unwrap().as_str(), "Logic board");
    assert_eq!(
        nl.design.source.as_ref().unwrap().as_str(),
        "C:\\restore\\board.sch"
    );
    let u1 = &nl.components[nl.component("U1").unwrap()];
    assert_eq!(
        u1.libpart,
        Some(0),
        "74LS00 resolves through the alias in libpart 7400"
    );
    // the time stamp is not kept, but the component's span covers it
    assert!(K5[u1.span.range()].contains("(tstamp 5ACE05B6)"));
    assert_eq!(u1.pins.len(), 5);
    // pin 1 listed twice in /A: once
    assert_eq!(nl.nets[1].node_count(), 3);
    assert!(matches!(
        u1.pin(&nl, "1").unwrap().connection,
        Connection::Net { net: 1, .. }
    ));
    assert!(matches!(
        u1.pin(&nl, "3").unwrap().connection,
        Connection::Alone { net: 2, .. }
    ));
    assert_eq!(u1.pin(&nl, "7").unwrap().connection, Connection::Absent);
    assert_eq!(u1.pin(&nl, "14").unwrap().ptype(), PinType::PowerIn);
    let r1 = &nl.components[nl.component("R1").unwrap()];
    assert_eq!(
        r1.field("logic family")
            .unwrap()
            .value
            .as_ref()
            .unwrap()
            .as_str(),
        "LS"
    );
    let s = nl.summary();
    assert_eq!(
        s,
        Summary {
            parts: 2,
            nets: 3,
            pins: 7,
            pins_on_no_net: 2
        }
    );
}

const K8: &str = r#"(export (version "E")
  (design (source "/home/x/hobby.kicad_sch") (tool "Eeschema 8.0.4"))
  (components
    (comp (ref "U1")
      (value "74HC14")
      (footprint "Package_SO:SOIC-14")
      (fields
        (field (name "Footprint") "Package_SO:SOIC-14")
        (field (name "Datasheet")))
      (libsource (lib "74xx") (part "74HC14") (description ""))
      (property (name "Sheetname") (value "Root"))
      (sheetpath (names "/") (tstamps "/"))
      (tstamps "0b1c2d3e-0000-4000-8000-000000000001")))
  (libparts
    (libpart (lib "74xx") (part "74HC14")
      (pins
        (pin (num "1") (name "~") (type "input"))
        (pin (num "2") (name "~") (type "output"))
        (pin (num "7") (name "GND") (type "power_in"))
        (pin (num "14") (name "VCC") (type "power_in")))))
  (nets
    (net (code "1") (name "GND")
      (node (ref "U1") (pin "7") (pinfunction "GND") (pintype "power_in")))
    (net (code "2") (name "unconnected-(U1-Pad2)")
      (node (ref "U1") (pin "2") (pintype "output+no_connect")))
    (net (code "3") (name "~{RESET}")
      (node (ref "U1") (pin "1") (pintype "input"))
      (node (ref "U9") (pin "1") (pintype "input")))
    (net (code "3") (name "/D[2]")
      (node (ref "U1") (pin "1") (pintype "input")))
    (future-section (x "y"))))
"#;

#[test]
fn reads_kicad8_and_reports_model_problems_with_spans() {
    let nl = read(K8);
    assert_eq!(nl.dialect, Dialect::E);
    let u1 = &nl.components[0];
    let fp = u1.field("Footprint").unwrap();
    assert_eq!(fp.value.as_ref().unwrap().as_str(), "Package_SO:SOIC-14");
    assert!(u1.field("Datasheet").unwrap().value.is_none());
    assert_eq!(
        u1.field("Sheetname")
            .unwrap()
            .value
            .as_ref()
            .unwrap()
            .as_str(),
        "Root"
    );
    let p2 = u1.pin(&nl, "2").unwrap();
    assert!(p2.no_connect());
    assert_eq!(p2.ptype(), PinType::Output);
    assert_eq!(u1.pin(&nl, "14").unwrap().connection, Connection::Absent);
    let codes: Vec<&str> = nl.diagnostics.iter().map(|d| &*d.code).collect();
    assert_eq!(
        codes,
        ["unknown-component", "duplicate-net-code", "pin-on-two-nets"]
    );
    let d = &nl.diagnostics[2];
    assert_eq!(&*d.message, "U1.1 is on two nets: `~{RESET}` and `/D[2]`");
    let at = d.primary_span().unwrap();
    assert!(K8[at.range()].starts_with("(node (ref \"U1\") (pin \"1\")"));
    assert_eq!(
        &K8[nl.diagnostics[0].primary_span().unwrap().range()],
        "\"U9\""
    );
}

#[test]
fn duplicate_refs_missing_fields_and_lists_for_atoms() {
    let text = r#"(export (version "E")
  (components
    (comp (ref "U1") (value "74LS04"))
    (comp (ref "U1") (value "74LS08"))
    (comp (value "orphan"))
    (comp (ref ("U3")) (value "x")))
  (nets (net (code "1") (name "A") (node (ref "U1")))))"#;
    let nl = read(text);
    let codes: Vec<&str> = nl.diagnostics.iter().map(|d| &*d.code).collect();
    assert_eq!(
        codes,
        [
            "missing-field",
            "bad-field",
            "missing-field",
            "missing-field",
            "duplicate-ref"
        ]
    );
    assert_eq!(nl.components.len(), 2);
}

#[test]
fn a_root_that_is_not_export_is_refused() {
    let t = parse("(foo (bar))").unwrap();
    let e = build(&t).unwrap_err();
    assert_eq!(e.code, "not-a-netlist");
    assert!(e.message.contains("`(foo ...)`"));
}

/// The model holds several of these for every pin, node and part of a board: a bound that
/// fails when a field grows them back (sizes on a 64-bit target).
#[test]
#[cfg(target_pointer_width = "64")]
fn model_items_stay_small() {
    use std::mem::size_of;
    assert!(size_of::<Str<'_>>() <= 16, "Str: {}", size_of::<Str<'_>>());
    assert!(
        size_of::<Text<'_>>() <= 16,
        "Text: {}",
        size_of::<Text<'_>>()
    );
    assert!(size_of::<Option<Text<'_>>>() <= 16);
    assert!(
        size_of::<Connection>() <= 12,
        "Connection: {}",
        size_of::<Connection>()
    );
    assert!(
        size_of::<CompPin>() <= 16,
        "CompPin: {}",
        size_of::<CompPin>()
    );
    assert!(
        size_of::<Node<'_>>() <= 28,
        "Node: {}",
        size_of::<Node<'_>>()
    );
    assert!(
        size_of::<Component<'_>>() <= 144,
        "Component: {}",
        size_of::<Component<'_>>()
    );
    assert!(size_of::<Net<'_>>() <= 48, "Net: {}", size_of::<Net<'_>>());
}

/// A text borrows the file where it is written as it reads, and owns its value only where
/// unescaping changed it; both readers agree on the value.
#[test]
fn texts_borrow_the_file_unless_unescaped() {
    let text = r#"(export (version "E")
  (components
    (comp (ref "U1") (value "74HC\"00\"")))
  (nets (net (code "1") (name "A\\B") (node (ref "U1") (pin "1")))))"#;
    for nl in [read(text), super::read(text).unwrap()] {
        let c = &nl.components[0];
        assert!(c.reference.is_borrowed());
        assert_eq!(c.reference.as_str(), "U1");
        let v = c.value.as_ref().unwrap();
        assert!(!v.is_borrowed());
        assert_eq!(v.as_str(), "74HC\"00\"");
        assert_eq!(&text[v.span().range()], r#""74HC\"00\"""#);
        assert_eq!(nl.nets[0].name.as_str(), "A\\B");
        assert_eq!(nl.net_by_name("A\\B"), Some(0));
        assert_eq!(nl.component("U1"), Some(0));
        assert_eq!(c.pins[0].num(&nl), "1");
        assert_eq!(c.pins[0].connection, Connection::Alone { net: 0, node: 0 });
        assert_eq!(nl.node(0, 0).component(), Some(0));
    }
}

/// A node's texts are read where they are written in its span (atoms and quoted strings
/// alike); one that had to be unescaped is kept apart, and a node whose pin number is empty
/// takes its pin function as its number either way. Both readers agree.
#[test]
fn node_texts_are_read_in_place_unless_unescaped() {
    let text = r#"(export (version "E")
  (components (comp (ref "U1")) (comp (ref "R\\1")) (comp (ref Q1)))
  (nets
    (net (code "1") (name "A")
      (node (ref "U1") (pin "1") (pinfunction "IN") (pintype "input"))
      (node (ref "R\\1") (pin "2"))
      (node (ref Q1) (pin "") (pinfunction B)))
    (net (code "2") (name "B")
      (node (ref "R\\1") (pin "") (pinfunction "X\\Y"))
      (node (ref "U9") (pin 3)))))"#;
    for nl in [read(text), super::read(text).unwrap()] {
        let a = nl.nets[0].nodes(&nl);
        let b = nl.nets[1].nodes(&nl);
        let texts = |n: &Node<'_>| {
            (
                n.reference(&nl).to_string(),
                n.pin(&nl).to_string(),
                n.pinfunction(&nl).map(str::to_string),
                &text[n.reference_span(&nl).range()],
            )
        };
        let s = |x: &str| x.to_string();
        assert_eq!(texts(&a[0]), (s("U1"), s("1"), Some(s("IN")), r#""U1""#));
        assert_eq!(texts(&a[1]), (s("R\\1"), s("2"), None, r#""R\\1""#));
        assert_eq!(texts(&a[2]), (s("Q1"), s("B"), Some(s("B")), "Q1"));
        assert_eq!(
            texts(&b[0]),
            (s("R\\1"), s("X\\Y"), Some(s("X\\Y")), r#""R\\1""#)
        );
        // a node naming no component is left out of its net, named by a diagnostic
        assert_eq!(b.len(), 1);
        assert_eq!(a[0].pintype, Some(PinType::Input));
        assert_eq!((a[0].component(), a[1].component()), (Some(0), Some(1)));
        // the two nodes with an escaped text, and only they, keep their texts apart
        assert_eq!(nl.node_texts().apart_count(), 2);
        // the unknown reference is named at its token
        let d = nl
            .diagnostics
            .iter()
            .find(|d| d.message.contains("U9"))
            .expect("a diagnostic for U9");
        assert_eq!(&text[d.primary_span().unwrap().range()], r#""U9""#);
    }
}

/// Every net's nodes lie in one list, net after net: a pin repeated in its net is dropped
/// and one on a second net is left in the first only, the nets after them moving down with
/// their connections still finding their own nodes.
#[test]
fn nets_share_one_list_of_nodes() {
    let text = r#"(export (version "E")
  (components (comp (ref "U1")) (comp (ref "R1")) (comp (ref "R2")))
  (nets
    (net (code "1") (name "A")
      (node (ref "U1") (pin "1")) (node (ref "R1") (pin "1")) (node (ref "U1") (pin "1")))
    (net (code "2") (name "B")
      (node (ref "R1") (pin "2")) (node (ref "U1") (pin "1")) (node (ref "R2") (pin "1")))
    (net (code "3") (name "C"))
    (net (code "4") (name "D")
      (node (ref "R2") (pin "2")) (node (ref "U1") (pin "2")))))"#;
    for nl in [read(text), super::read(text).unwrap()] {
        let on = |n: usize| -> Vec<String> {
            nl.nets[n]
                .nodes(&nl)
                .iter()
                .map(|x| format!("{}.{}", x.reference(&nl), x.pin(&nl)))
                .collect()
        };
        assert_eq!(on(0), ["U1.1", "R1.1"]);
        assert_eq!(on(1), ["R1.2", "R2.1"]);
        assert!(on(2).is_empty());
        assert_eq!(on(3), ["R2.2", "U1.2"]);
        assert_eq!(nl.all_nodes().len(), 6);
        assert_eq!(
            nl.nets.iter().map(|n| n.node_count()).collect::<Vec<_>>(),
            [2, 2, 0, 2]
        );
        assert!(nl
            .diagnostics
            .iter()
            .any(|d| d.message.contains("two nets")));
        for c in &nl.components {
            for p in c.pins.iter() {
                let Connection::Net { net, node } = p.connection else {
                    panic!("{} is on a net", c.reference);
                };
                let x = nl.node(net as usize, node as usize);
                assert_eq!(
                    (x.reference(&nl), x.pin(&nl)),
                    (c.reference.as_str(), p.num(&nl))
                );
            }
        }
    }
}

/// A pin's number and name are read through its library pin or its node: the library's
/// name first, the node's `pinfunction` where the library pin has none, the node's own for
/// a pin only the nets name; the same through a net tie's joined nodes and both readers.
#[test]
fn pin_numbers_and_names_resolve_through_libpin_or_node() {
    let text = r#"(export (version "E")
  (components
    (comp (ref "U1") (value "X") (libsource (lib "l") (part "P")))
    (comp (ref "NT1") (value "NetTie_2") (libsource (lib "l") (part "NetTie_2")))
    (comp (ref "Q1") (value "Y")))
  (libparts
    (libpart (lib "l") (part "P")
      (pins
        (pin (num "1") (name "A") (type "input"))
        (pin (num "2") (type "output"))
        (pin (num "3") (name "OE") (type "input"))
        (pin (num "3") (name "OE") (type "input"))
        (pin (num "4") (name "GND") (type "power_in"))))
    (libpart (lib "l") (part "NetTie_2")
      (pins (pin (num "1") (type "passive")) (pin (num "2") (type "passive")))))
  (nets
    (net (code "1") (name "N1")
      (node (ref "U1") (pin "1") (pinfunction "IN"))
      (node (ref "NT1") (pin "1")))
    (net (code "2") (name "N2")
      (node (ref "NT1") (pin "2"))
      (node (ref "U1") (pin "2") (pinfunction "Y"))
      (node (ref "U1") (pin "9") (pinfunction "EXTRA"))
      (node (ref "Q1") (pin "") (pinfunction "B") (pintype "input"))
      (node (ref "Q1") (pin "") (pinfunction "C") (pintype "passive")))))
"#;
    for nl in [read(text), super::read(text).unwrap()] {
        let u1 = &nl.components[0];
        let pins: Vec<(&str, Option<&str>, Option<u32>)> = u1
            .pins
            .iter()
            .map(|p| (p.num(&nl), p.name(&nl), p.libpin(&nl)))
            .collect();
        assert_eq!(
            pins,
            [
                ("1", Some("A"), Some(0)),   // the library's name, not the node's
                ("2", Some("Y"), Some(1)),   // no name in the library: the node's
                ("3", Some("OE"), Some(2)),  // stacked pin listed twice: once
                ("4", Some("GND"), Some(4)), // on no net: the library's
                ("9", Some("EXTRA"), None),  // only the nets name it
            ]
        );
        assert_eq!(u1.pins[3].connection, Connection::Absent);
        // the net tie joined N2 into N1: the nodes moved, the names still resolve
        assert_eq!(nl.nets[1].node_count(), 0);
        // N1 holds its own nodes, then N2's (less the pins only a name keyed twice)
        let on = |n: usize| -> Vec<String> {
            nl.nets[n]
                .nodes(&nl)
                .iter()
                .map(|x| format!("{}.{}", x.reference(&nl), x.pin(&nl)))
                .collect()
        };
        assert_eq!(
            on(0),
            ["U1.1", "NT1.1", "NT1.2", "U1.2", "U1.9", "Q1.B", "Q1.C"]
        );
        assert_eq!(nl.all_nodes().len(), 7);
        // every pin's connection finds its own node in the joined net
        for c in &nl.components {
            for p in c.pins.iter() {
                if let Connection::Net { net, node } = p.connection {
                    let x = nl.node(net as usize, node as usize);
                    assert_eq!(x.reference(&nl), c.reference.as_str());
                    assert_eq!(x.pin(&nl), p.num(&nl));
                }
            }
        }
        assert!(matches!(
            u1.pins[1].connection,
            Connection::Net { net: 0, .. }
        ));
        assert_eq!(u1.pin(&nl, "9").unwrap().name(&nl), Some("EXTRA"));
        // pins without numbers are keyed by their names
        let q1 = &nl.components[2];
        let q: Vec<(&str, Option<&str>)> =
            q1.pins.iter().map(|p| (p.num(&nl), p.name(&nl))).collect();
        assert_eq!(q, [("B", Some("B")), ("C", Some("C"))]);
        assert_eq!(q1.pins[0].ptype(), PinType::Input);
        assert_eq!(nl.net_by_name("N2"), Some(0));
        assert_eq!(nl.component("NT1"), Some(1));
        assert_eq!(nl.component("U9"), None);
    }
}

/// A component pin keeps its library pin, pin type and no-connect mark in one word: each
/// reads back as it was given, for every pin type and at both ends of the numbering.
#[test]
fn a_pin_reads_back_what_it_was_made_from() {
    let conn = Connection::Net { net: 7, node: 3 };
    for (i, &t) in PinType::ALL.iter().enumerate() {
        assert_eq!(
            t as usize, i,
            "PinType::ALL is in the order of the types' numbers"
        );
        for nc in [false, true] {
            for g in [0, 1, 12_345, NONE - 1] {
                let p = CompPin::from_libpin(g, t, nc, conn);
                assert_eq!(p.lib_pin_number(), Some(g));
                assert_eq!((p.ptype(), p.no_connect(), p.connection), (t, nc, conn));
            }
            let p = CompPin::from_node(t, nc, Connection::Absent);
            assert_eq!(p.lib_pin_number(), None);
            assert_eq!((p.ptype(), p.no_connect()), (t, nc));
            assert_eq!(p.connection, Connection::Absent);
        }
    }
}

/// The fields and the properties are one list, fields first; a field is found by name
/// whichever it was, and a property does not hide a field of the same name.
#[test]
fn fields_then_properties_in_one_list() {
    let text = r#"(export (version "E")
  (components
    (comp (ref "U1") (value "74HC00") (datasheet "~")
      (fields (field (name "Family") "HC") (field (name "Note") "a"))
      (property (name "Note") (value "b"))
      (property (name "dnp"))
      (sheetpath (names "/") (tstamps "/"))
      (tstamps "0b1c2d3e")))
  (nets))"#;
    for nl in [stream::read(text).unwrap(), read(text)] {
        let u1 = &nl.components[0];
        let all: Vec<(&str, Option<&str>)> = u1
            .fields()
            .iter()
            .map(|f| (f.name.as_str(), f.value.as_ref().map(|v| v.as_str())))
            .collect();
        assert_eq!(
            all,
            [
                ("Family", Some("HC")),
                ("Note", Some("a")),
                ("Note", Some("b")),
                ("dnp", None)
            ]
        );
        assert_eq!(
            u1.field("note").unwrap().value.as_ref().unwrap().as_str(),
            "a"
        );
        assert!(u1.field("DNP").is_some_and(|f| f.value.is_none()));
        assert!(
            u1.field("datasheet").is_none(),
            "the data-sheet link is not a field"
        );
    }
}

/// On a board large enough that the list of each component's nets is given back in steps
/// as the pins are made (`link_pins`, from 64 Ki entries), every pin on a net still points at
/// a node naming its own component and its own number, and every node is one pin's.
#[test]
fn every_pin_points_at_its_own_node_on_a_large_board() {
    let text = crate::synth::netlist(20 << 20);
    let nl = stream::read(&text).unwrap();
    let nodes = nl.all_nodes().len();
    assert!(
        nodes > 2 << 16,
        "{nodes} nodes: too few to give the list back in steps"
    );
    let mut on_nets = 0;
    for (ci, c) in nl.components.iter().enumerate() {
        for p in c.pins.iter() {
            if let Connection::Net { net, node } | Connection::Alone { net, node } = p.connection {
                let nd = nl.node(net as usize, node as usize);
                assert_eq!(nd.component(), Some(ci as u32), "{}", c.reference);
                assert_eq!(nd.pin(&nl), p.num(&nl), "{}", c.reference);
                on_nets += 1;
            }
        }
    }
    assert_eq!(on_nets, nodes, "every node is one pin's");
    assert_eq!(nl.components.capacity(), nl.components.len());
}

/// References are matched whole whatever their length: up to 15 bytes they are compared as
/// short keys, longer ones as text, and a key never matches a longer or shorter reference
/// that shares its bytes.
#[test]
fn nodes_find_their_components_by_references_short_and_long() {
    let text = r#"(export (version "E")
  (components
    (comp (ref "ABCDEFGHIJKLMN") (value "x"))
    (comp (ref "ABCDEFGHIJKLMNO") (value "x"))
    (comp (ref "ABCDEFGHIJKLMNOP") (value "x"))
    (comp (ref "ABCDEFGHIJKLMNOPQ") (value "x"))
    (comp (ref "ABCDEFGHIJKLMNOP") (value "y"))
    (comp (ref "U1") (value "x")))
  (nets
    (net (code "1") (name "A")
      (node (ref "ABCDEFGHIJKLMNOPQ") (pin "1"))
      (node (ref "ABCDEFGHIJKLMNOP") (pin "1"))
      (node (ref "ABCDEFGHIJKLMNO") (pin "1"))
      (node (ref "ABCDEFGHIJKLMN") (pin "1"))
      (node (ref "U1") (pin "1")))
    (net (code "2") (name "B")
      (node (ref "ABCDEFGHIJKLM") (pin "2"))
      (node (ref "ABCDEFGHIJKLMNOQ") (pin "2"))
      (node (ref "ABCDEFGHIJKLMNOPX") (pin "2"))
      (node (ref "U") (pin "2"))
      (node (ref "U10") (pin "2")))))"#;
    let nl = read(text);
    let codes: Vec<&str> = nl.diagnostics.iter().map(|d| &*d.code).collect();
    assert_eq!(
        codes,
        [
            "duplicate-ref",
            "unknown-component",
            "unknown-component",
            "unknown-component",
            "unknown-component",
            "unknown-component"
        ]
    );
    let linked: Vec<Option<u32>> = nl.nets[0]
        .nodes(&nl)
        .iter()
        .map(|n| n.component())
        .collect();
    // the first of two components that share a reference is the one its nodes name
    assert_eq!(linked, [Some(3), Some(2), Some(1), Some(0), Some(5)]);
    assert_eq!(nl.nets[1].node_count(), 0);
    assert_eq!(nl.component("ABCDEFGHIJKLMNOPQ"), Some(3));
    assert_eq!(nl.component("ABCDEFGHIJKLMNOP"), Some(2));
    assert_eq!(nl.component("ABCDEFGHIJKLMNOQ"), None);
}
