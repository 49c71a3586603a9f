use super::*;
use crate::source::SourceFile;

/// Parses and returns (code, line, column) of the error's primary place.
fn err_at(text: &str) -> (String, usize, usize) {
    let d = match sniff(text) {
        Some(d) => d,
        None => parse(text).expect_err("expected an error"),
    };
    let src = SourceFile::new("t", text);
    let span = d.primary_span().unwrap_or_default();
    let lc = src.line_col(span.start as usize);
    (d.code.into_owned(), lc.line, lc.column)
}

fn atoms(text: &str) -> Vec<String> {
    let t = parse(text).unwrap();
    (0..t.len() as u32)
        .filter(|&i| !t.is_list(i))
        .map(|i| t.text(i).unwrap().into_owned())
        .collect()
}

#[test]
fn reads_lists_atoms_and_strings_with_spans() {
    let text = "(export (version \"E\")\n  (net (code 1) (name \"+5V\")))";
    let t = parse(text).unwrap();
    assert_eq!(t.head(0), Some("export"));
    let kids: Vec<_> = t.children(0).collect();
    assert_eq!(kids.len(), 3);
    assert_eq!(t.raw(kids[1]), "(version \"E\")");
    let net = kids[2];
    assert_eq!(t.head(net), Some("net"));
    let name = t.children(net).nth(2).unwrap();
    let s = t.children(name).nth(1).unwrap();
    assert_eq!(t.kind(s), Kind::Str);
    assert_eq!(t.text(s).unwrap(), "+5V");
    assert_eq!(&text[t.span(s).range()], "\"+5V\"");
    assert_eq!(t.span(0), Span::new(0, text.len()));
}

#[test]
fn kicad_atoms_stay_whole_and_are_not_numbers() {
    assert_eq!(
        atoms(
            "(a 5ACE05B6 #PWR01 +5V /D[0] 00012345 1.50 C:\\dir\\x.sch ~{RST} $x 'q' a;b *:.-+{})"
        ),
        vec![
            "a",
            "5ACE05B6",
            "#PWR01",
            "+5V",
            "/D[0]",
            "00012345",
            "1.50",
            "C:\\dir\\x.sch",
            "~{RST}",
            "$x",
            "'q'",
            "a;b",
            "*:.-+{}"
        ]
    );
}

#[test]
fn strings_unescape_on_demand_and_keep_parens_and_semicolons() {
    assert_eq!(
        atoms(r#"(a "q\"uote" "back\\slash" "(paren) ; semi" "" "line\nbreak" "C:\\x")"#),
        vec![
            "a",
            "q\"uote",
            "back\\slash",
            "(paren) ; semi",
            "",
            "line\nbreak",
            "C:\\x"
        ]
    );
}

#[test]
fn bom_crlf_tabs_and_non_ascii() {
    let text = "\u{feff}(export\r\n\t(value \"10 kΩ ±1% µ Räksmörgås Ж 日本\u{a0}x\")\r\n)";
    let t = parse(text).unwrap();
    assert_eq!(t.head(0), Some("export"));
    let v = t.children(0).nth(1).unwrap();
    assert_eq!(
        t.text(t.children(v).nth(1).unwrap()).unwrap(),
        "10 kΩ ±1% µ Räksmörgås Ж 日本\u{a0}x"
    );
}

#[test]
fn unclosed_list_points_at_innermost_open_paren_and_end_of_file() {
    let text = "(export\n  (nets\n    (net (code 1)\n";
    let d = parse(text).unwrap_err();
    assert_eq!(d.code, "unclosed-list");
    assert!(d.message.contains("3 lists still open"), "{}", d.message);
    let src = SourceFile::new("t", text);
    let lc = src.line_col(d.labels[0].span.start as usize);
    assert_eq!((lc.line, lc.column), (3, 5));
    assert_eq!(&text[d.labels[1].span.range()], ")");
}

#[test]
fn error_classes_with_line_and_column() {
    assert_eq!(err_at("(export (a))\n)"), ("stray-close".into(), 2, 1));
    assert_eq!(err_at("(export (a)))"), ("stray-close".into(), 1, 13));
    assert_eq!(err_at(")"), ("stray-close".into(), 1, 1));
    assert_eq!(
        err_at("(export\n  (value \"abc)\n)"),
        ("unterminated-string".into(), 2, 10)
    );
    assert_eq!(err_at("").0, "empty-file");
    assert_eq!(err_at("  \n\t\r\n").0, "empty-file");
    assert_eq!(err_at("\u{feff}").0, "empty-file");
    assert_eq!(
        err_at("(kicad_sch (version 20231120))"),
        ("wrong-format".into(), 1, 2)
    );
    assert_eq!(
        err_at("\n(kicad_pcb (version 20221018))"),
        ("wrong-format".into(), 2, 2)
    );
    assert_eq!(
        err_at("EESchema Schematic File Version 4\n"),
        ("wrong-format".into(), 1, 1)
    );
    assert_eq!(
        err_at("( { EESchema Netlist Version 1.1 created  x }\n"),
        ("wrong-format".into(), 1, 1)
    );
    assert_eq!(err_at("{\"export\": 1}"), ("wrong-format".into(), 1, 1));
    assert_eq!(err_at("hello"), ("not-a-netlist".into(), 1, 1));
    assert_eq!(err_at("(a) b"), ("trailing-text".into(), 1, 5));
}

#[test]
fn format_messages_name_the_format_and_the_fix() {
    let d = sniff("( { EESchema Netlist Version 1.1 }").unwrap();
    assert!(d.message.contains("older KiCad netlist format"));
    assert!(d.help.unwrap().contains("S-expression"));
    let d = sniff("(kicad_pcb (version 4))").unwrap();
    assert!(d.message.contains("board layout"));
    assert!(d.help.unwrap().contains("export a netlist"));
}

#[test]
fn deep_nesting_is_an_error_not_a_crash() {
    let text = "(".repeat(100_000) + &")".repeat(100_000);
    let d = parse(&text).unwrap_err();
    assert_eq!(d.code, "too-deep");
    assert_eq!(d.labels[0].span.start as usize, MAX_DEPTH);
    let ok = "(".repeat(MAX_DEPTH) + &")".repeat(MAX_DEPTH);
    assert_eq!(parse(&ok).unwrap().len(), MAX_DEPTH);
}

#[test]
fn print_round_trips() {
    let text = "(export (a \"b c\" d) () (e (f (g))) h)";
    let t = parse(text).unwrap();
    let p = t.print(0);
    assert_eq!(p, "(export (a \"b c\" d) () (e (f (g))) h)");
    let t2 = parse(&p).unwrap();
    assert_eq!(t2.print(0), p);
}

#[test]
fn empty_list_has_no_children() {
    let t = parse("(a () b)").unwrap();
    let kids: Vec<_> = t.children(0).collect();
    assert_eq!(kids.len(), 3);
    assert_eq!(t.first_child(kids[1]), None);
    assert_eq!(t.raw(kids[2]), "b");
}

proptest::proptest! {
    #[test]
    fn any_bytes_give_a_tree_or_an_error_inside_the_input(bytes in proptest::collection::vec(proptest::prelude::any::<u8>(), 0..200)) {
        match crate::input::load("p", bytes.clone()) {
            Err(e) => {
                if let Some(s) = e.diag.primary_span() { proptest::prop_assert!(s.end as usize <= bytes.len()); }
            }
            Ok(src) => {
                let r = sniff(src.text()).map(Err).unwrap_or_else(|| parse(src.text()).map(|_| ()));
                if let Err(d) = r {
                    for l in &d.labels { proptest::prop_assert!(l.span.end as usize <= bytes.len()); }
                }
            }
        }
    }

    #[test]
    fn structured_text_parses(s in "\\((export|a)( ([a-z0-9+/~#]{1,5}|\"[^\"\\\\]{0,5}\"|\\(\\)|\\([a-z]{1,3} [0-9]{1,3}\\)))*\\)") {
        let t = parse(&s).unwrap();
        let printed = t.print(0);
        let t2 = parse(&printed).unwrap();
        proptest::prop_assert_eq!(t2.print(0), printed);
    }
}

/// The spans of the root's children headed `head`, as the tree gives them.
fn heads_in_tree(text: &str, head: &str) -> Option<Vec<Span>> {
    let t = parse(text).ok()?;
    Some(
        t.children(t.root())
            .filter(|&c| t.head(c) == Some(head))
            .map(|c| t.span(c))
            .collect(),
    )
}

/// Finding the root's lists by head without a tree agrees with the tree on every text: a
/// small sheet with strings holding brackets, quotes and escapes, quotes inside atoms and
/// strings that touch; cut at every byte, and with a bracket, quote, backslash, space or
/// letter put in at every byte. Where the whole reading fails, the search gives nothing.
#[test]
fn root_lists_agree_with_the_tree_on_every_cut_and_insertion() {
    let base = "\u{feff} (kicad_sch (version 1) (sheet (at 1 2) (property \"Sheetfile\" \"a (1).kicad_sch\"))\n\
                (symbol (property \"x\\\"(\" \"y\\\\\") a\"b\"c) (sheet(property \"Sheet file\" \"q\")\"s\"\"t\"u\"v)\n\
                (\"sheet\" x) ( sheet ) (sheets) (sheet\"x\" y))\n";
    let mut texts: Vec<String> = vec![base.to_string()];
    for (cut, _) in base.char_indices() {
        texts.push(base[..cut].to_string());
        for ins in ["(", ")", "\"", "\\", " ", "x"] {
            texts.push(format!("{}{ins}{}", &base[..cut], &base[cut..]));
        }
    }
    let deep = format!(
        "(a {}{})",
        "(".repeat(MAX_DEPTH - 1),
        ")".repeat(MAX_DEPTH - 1)
    );
    let too_deep = format!("(a {}{})", "(".repeat(MAX_DEPTH), ")".repeat(MAX_DEPTH));
    texts.extend([
        deep,
        too_deep,
        "(a) (b)".into(),
        "x (a)".into(),
        String::new(),
    ]);
    let mut found = 0;
    for t in &texts {
        let want = heads_in_tree(t, "sheet");
        assert_eq!(root_lists(t, "sheet"), want, "{t:?}");
        found += want.map_or(0, |w| w.len());
    }
    // `(sheet"x" y)` is headed by the atom `sheet"x"`
    assert_eq!(heads_in_tree(base, "sheet").map(|v| v.len()), Some(3));
    assert!(found > 1000);
}

/// What a list's tree holds, node by node in pre-order: kind, span, and where its first
/// child and next sibling are counted from the list's own node (none for the list's own
/// sibling, which lies outside it).
fn shape_of(t: &Tree<'_>, list: NodeId) -> Vec<(Kind, Span, Option<u32>, Option<u32>)> {
    let end = t.span(list).end;
    let mut out = Vec::new();
    let mut id = list;
    while (id as usize) < t.len()
        && t.span(id).start < end
        && (id == list || t.span(id).start > t.span(list).start)
    {
        let sib = if id == list {
            None
        } else {
            t.next_sibling(id).map(|s| s - list)
        };
        out.push((
            t.kind(id),
            t.span(id),
            t.first_child(id).map(|c| c - list),
            sib,
        ));
        id += 1;
    }
    out
}

/// Reading the root's lists one at a time gives each list the tree the whole reading gives
/// it (every node's kind, span and links), the same head and root span, and stops exactly
/// where the whole reading fails: a small sheet with strings holding brackets, quotes and
/// escapes, atoms and strings among the root's children, cut at every byte and with a
/// bracket, quote, backslash, space or letter put in at every byte; lists at the depth limit.
#[test]
fn items_agree_with_the_tree_on_every_cut_and_insertion() {
    let base = "\u{feff} (kicad_sch (version 1) \"s(\" at (sheet (at 1 2) (property \"Sheetfile\" \"a (1).kicad_sch\"))\n\
                (symbol (property \"x\\\"(\" \"y\\\\\") a\"b\"c) (wire(pts(xy 1 2)(xy 3 4)))\"s\"\"t\"u\"v\n\
                () (\"q\" x) ( sheet ) (a (b (c \"d\")) e))\n";
    let mut texts: Vec<String> = vec![base.to_string()];
    for (cut, _) in base.char_indices() {
        texts.push(base[..cut].to_string());
        for ins in ["(", ")", "\"", "\\", " ", "x"] {
            texts.push(format!("{}{ins}{}", &base[..cut], &base[cut..]));
        }
    }
    let nest = |n: usize| format!("(a {}{})", "(".repeat(n), ")".repeat(n));
    texts.extend([
        nest(MAX_DEPTH - 1),
        nest(MAX_DEPTH),
        "(a) (b)".into(),
        "(a)".into(),
        "(\"a\" (b))".into(),
        "((a) b)".into(),
        "(a (b)".into(),
        "x (a)".into(),
        String::new(),
    ]);
    let (mut lists, mut failed) = (0, 0);
    for t in &texts {
        let whole = parse(t);
        let Some(mut items) = Items::new(t) else {
            assert!(whole.is_err(), "{t:?}");
            continue;
        };
        let mut got = Vec::new();
        let read = loop {
            match items.next_list() {
                Ok(Some(tree)) => got.push(shape_of(tree, tree.root())),
                Ok(None) => break Ok(()),
                Err(()) => break Err(()),
            }
        };
        match (&whole, read) {
            (Ok(tree), Ok(())) => {
                let root = tree.root();
                let want: Vec<_> = tree
                    .children(root)
                    .filter(|&c| tree.is_list(c))
                    .map(|c| shape_of(tree, c))
                    .collect();
                // the links are counted from each list's own node, as in an item's tree
                assert_eq!(want, got, "{t:?}");
                assert_eq!(
                    tree.children(root).filter(|&c| tree.is_list(c)).count(),
                    got.len()
                );
                assert_eq!(items.head(), tree.head(root), "{t:?}");
                assert_eq!(items.root_span(), Some(tree.span(root)), "{t:?}");
                lists += got.len();
            }
            (Err(_), Err(())) => failed += 1,
            (w, r) => panic!("whole {:?}, by items {r:?}: {t:?}", w.as_ref().map(|_| ())),
        }
    }
    assert!(lists > 1000 && failed > 100, "{lists} {failed}");
}

/// `head_is` answers as comparing `head` does, for every node: lists headed by an atom, by a
/// string or by a list, empty lists, atoms and strings, with names of the same length,
/// prefixes and longer names.
#[test]
fn head_is_agrees_with_head() {
    let text = "(kicad_sch (symbol (pin \"1\")) (\"symbol\" x) ((pin) y) () (pins) (pi) sym \"pin\" (é (x)))";
    let t = parse(text).unwrap();
    let names = [
        "kicad_sch",
        "symbol",
        "pin",
        "pins",
        "pi",
        "",
        "x",
        "é",
        "\"symbol\"",
        "sym",
    ];
    let mut headed = 0;
    for id in 0..t.len() as u32 {
        for name in names {
            assert_eq!(t.head_is(id, name), t.head(id) == Some(name), "{id} {name}");
            headed += usize::from(t.head_is(id, name));
        }
    }
    assert_eq!(headed, 8);
}
