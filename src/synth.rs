//! A synthetic netlist generator for benchmarks, scale tests and fuzzing seeds: a board of
//! repeated logic cells (a 74HC00, a 74LS04, a pull-up resistor, a decoupling capacitor),
//! written in KiCad's version "E" layout. Deterministic for a given size.

use std::fmt::Write;

/// Writes a netlist of about `target_bytes` bytes.
pub fn netlist(target_bytes: usize) -> String {
    // one cell is about 2.6 kB of components and nets
    let cells = (target_bytes / 2600).max(1);
    let mut s = String::with_capacity(target_bytes + 8192);
    s.push_str("(export (version \"E\")\n  (design\n    (source \"/synthetic/board.kicad_sch\")\n    (date \"2026-01-01T00:00:00\")\n    (tool \"Eeschema 8.0.0\")\n    (sheet (number \"1\") (name \"/\") (tstamps \"/\")\n      (title_block\n        (title \"synthetic benchmark board\"))))\n  (components\n");
    for c in 0..cells {
        for (prefix, value, lib, fp) in [
            ("U", "74HC00", "74HC00", "Package_DIP:DIP-14_W7.62mm"),
            ("V", "74LS04", "74LS04", "Package_DIP:DIP-14_W7.62mm"),
            ("R", "4K7", "R", "Resistor_THT:R_Axial_DIN0207"),
            ("C", "100n", "C", "Capacitor_THT:C_Disc_D3.0mm"),
        ] {
            let _ = write!(
                s,
                "    (comp (ref \"{prefix}{c}\")\n      (value \"{value}\")\n      (footprint \"{fp}\")\n      (libsource (lib \"x\") (part \"{lib}\") (description \"\"))\n      (sheetpath (names \"/\") (tstamps \"/\"))\n      (tstamps \"{:08x}-0000-4000-8000-{:012x}\"))\n",
                c, c
            );
        }
    }
    s.push_str("  )\n  (libparts\n");
    for (part, pins) in [("74HC00", 14), ("74LS04", 14), ("R", 2), ("C", 2)] {
        let _ = write!(
            s,
            "    (libpart (lib \"x\") (part \"{part}\")\n      (pins\n"
        );
        for p in 1..=pins {
            let t = match (part, p) {
                (_, 7) | (_, 14) if pins == 14 => "power_in",
                ("74HC00", 3 | 6 | 8 | 11) | ("74LS04", 2 | 4 | 6 | 8 | 10 | 12) => "output",
                _ if pins == 2 => "passive",
                _ => "input",
            };
            let _ = writeln!(s, "        (pin (num \"{p}\") (name \"~\") (type \"{t}\"))");
        }
        s.push_str("      ))\n");
    }
    s.push_str("  )\n  (nets\n");
    let mut code = 1;
    let mut net = |s: &mut String, name: &str, nodes: &[(&str, usize, u32, &str)]| {
        let _ = writeln!(s, "    (net (code \"{code}\") (name \"{name}\")");
        for (p, c, pin, t) in nodes {
            let _ = writeln!(
                s,
                "      (node (ref \"{p}{c}\") (pin \"{pin}\") (pintype \"{t}\"))"
            );
        }
        s.truncate(s.len() - 1);
        s.push_str(")\n");
        code += 1;
    };
    for c in 0..cells {
        let n = format!("/cell{c}/A");
        net(
            &mut s,
            &n,
            &[
                ("V", c, 2, "output"),
                ("U", c, 1, "input"),
                ("U", c, 2, "input"),
                ("R", c, 2, "passive"),
            ],
        );
        let n = format!("/cell{c}/Y");
        net(
            &mut s,
            &n,
            &[
                ("U", c, 3, "output"),
                ("V", c, 1, "input"),
                ("U", c, 4, "input"),
                ("U", c, 5, "input"),
            ],
        );
        let n = format!("Net-(U{c}-Pad6)");
        net(&mut s, &n, &[("U", c, 6, "output"), ("V", c, 3, "input")]);
    }
    let mut vcc: Vec<(&str, usize, u32, &str)> = Vec::new();
    let mut gnd: Vec<(&str, usize, u32, &str)> = Vec::new();
    for c in 0..cells {
        vcc.extend([
            ("U", c, 14, "power_in"),
            ("V", c, 14, "power_in"),
            ("R", c, 1, "passive"),
            ("C", c, 1, "passive"),
        ]);
        gnd.extend([
            ("U", c, 7, "power_in"),
            ("V", c, 7, "power_in"),
            ("C", c, 2, "passive"),
        ]);
    }
    net(&mut s, "+5V", &vcc);
    net(&mut s, "GND", &gnd);
    s.push_str("  )\n)\n");
    s
}

/// The shapes of board the scale benchmark grows: [`netlist`]'s even cells, and shapes that
/// stress one dimension each.
pub const SHAPES: &[&str] = &["cells", "dense", "big-net", "two-pin", "identical", "deep"];

/// A netlist of about `target_bytes` bytes in one of the [`SHAPES`] (`None` for an unknown
/// name):
///
/// - `cells`: [`netlist`];
/// - `dense`: findings on every part: chips with their supply pin on no net and their ground
///   pin placed but wired to nothing, a chip with its supply pin on a signal net, floating
///   inputs, resistors with values that do not read; the rails are the last nets;
/// - `big-net`: every input of every chip on one net, driven by one output;
/// - `two-pin`: chains of inverters, every net joining one output to one input;
/// - `identical`: one part (a 74HC00) repeated, every input tied to ground, outputs open;
/// - `deep`: [`netlist`]'s cells, each on a sheet nested 40 levels deep, with net names to match.
pub fn shape(name: &str, target_bytes: usize) -> Option<String> {
    let mut b = Board::new();
    match name {
        "cells" => return Some(netlist(target_bytes)),
        "dense" => {
            // one cell: U (74HC00, VCC absent, GND alone, inputs floating, outputs alone),
            // V (74LS04, VCC on a signal net driven by U), R (unreadable value on that net)
            let cells = (target_bytes / 1700).max(1);
            for c in 0..cells {
                b.comp(&format!("U{c}"), "74HC00", "74HC00", "/");
                b.comp(&format!("V{c}"), "74LS04", "74LS04", "/");
                b.comp(&format!("R{c}"), "4K7Q", "R", "/");
                b.net(
                    &format!("Net-(U{c}-Pad7)"),
                    &[(format!("U{c}"), 7, "power_in")],
                );
                b.net(
                    &format!("/d{c}/S"),
                    &[
                        (format!("U{c}"), 3, "output"),
                        (format!("V{c}"), 14, "power_in"),
                        (format!("R{c}"), 1, "passive"),
                    ],
                );
                b.net(
                    &format!("/d{c}/F"),
                    &[(format!("U{c}"), 1, "input"), (format!("U{c}"), 2, "input")],
                );
            }
            let gnd: Vec<_> = (0..cells)
                .map(|c| (format!("V{c}"), 7, "power_in"))
                .collect();
            let vcc: Vec<_> = (0..cells)
                .map(|c| (format!("R{c}"), 2, "passive"))
                .collect();
            b.net("+5V", &vcc);
            b.net("GND", &gnd);
        }
        "big-net" => {
            // about 8 nodes and one component per 520 bytes
            let chips = (target_bytes / 1000).max(1);
            b.comp("D1", "74HC04", "74HC04", "/");
            let mut bus = vec![("D1".to_string(), 2, "output")];
            let (mut vcc, mut gnd) = (Vec::new(), Vec::new());
            for c in 0..chips {
                b.comp(&format!("U{c}"), "74HC00", "74HC00", "/");
                for p in [1, 2, 4, 5, 9, 10, 12, 13] {
                    bus.push((format!("U{c}"), p, "input"));
                }
                vcc.push((format!("U{c}"), 14, "power_in"));
                gnd.push((format!("U{c}"), 7, "power_in"));
            }
            b.net("/BUS", &bus);
            b.net("+5V", &vcc);
            b.net("GND", &gnd);
        }
        "two-pin" => {
            // a chain of 74HC04 gates: 1A of the first chip starts it, each output feeds the
            // next gate's input (the next chip after the sixth gate)
            let chips = (target_bytes / 2100).max(1);
            let (mut vcc, mut gnd) = (Vec::new(), Vec::new());
            const INS: [u32; 6] = [1, 3, 5, 9, 11, 13];
            const OUTS: [u32; 6] = [2, 4, 6, 8, 10, 12];
            for c in 0..chips {
                b.comp(&format!("U{c}"), "74HC04", "74HC04", "/");
                vcc.push((format!("U{c}"), 14, "power_in"));
                gnd.push((format!("U{c}"), 7, "power_in"));
            }
            gnd.push(("U0".to_string(), 1, "input"));
            for c in 0..chips {
                for g in 0..6 {
                    let (nc, ng) = if g == 5 { (c + 1, 0) } else { (c, g + 1) };
                    if nc == chips {
                        continue;
                    }
                    b.net(
                        &format!("Net-(U{c}-Pad{})", OUTS[g]),
                        &[
                            (format!("U{c}"), OUTS[g], "output"),
                            (format!("U{nc}"), INS[ng], "input"),
                        ],
                    );
                }
            }
            b.net("+5V", &vcc);
            b.net("GND", &gnd);
        }
        "identical" => {
            let chips = (target_bytes / 1000).max(1);
            let (mut vcc, mut gnd) = (Vec::new(), Vec::new());
            for c in 0..chips {
                b.comp(&format!("U{c}"), "74HC00", "74HC00", "/");
                vcc.push((format!("U{c}"), 14, "power_in"));
                gnd.push((format!("U{c}"), 7, "power_in"));
                for p in [1, 2, 4, 5, 9, 10, 12, 13] {
                    gnd.push((format!("U{c}"), p, "input"));
                }
            }
            b.net("+5V", &vcc);
            b.net("GND", &gnd);
        }
        "deep" => {
            let cells = (target_bytes / 4600).max(1);
            let (mut vcc, mut gnd) = (Vec::new(), Vec::new());
            for c in 0..cells {
                let sheet: String = (0..40).map(|d| format!("/s{}_{d}", c % 97)).collect();
                let sheet = format!("{sheet}/c{c}/");
                let (u, v, r) = (format!("U{c}"), format!("V{c}"), format!("R{c}"));
                b.comp(&u, "74HC00", "74HC00", &sheet);
                b.comp(&v, "74LS04", "74LS04", &sheet);
                b.comp(&r, "4K7", "R", &sheet);
                b.net(
                    &format!("{sheet}A"),
                    &[
                        (v.clone(), 2, "output"),
                        (u.clone(), 1, "input"),
                        (u.clone(), 2, "input"),
                        (r.clone(), 2, "passive"),
                    ],
                );
                b.net(
                    &format!("{sheet}Y"),
                    &[
                        (u.clone(), 3, "output"),
                        (v.clone(), 1, "input"),
                        (u.clone(), 4, "input"),
                        (u.clone(), 5, "input"),
                    ],
                );
                vcc.extend([
                    (u.clone(), 14, "power_in"),
                    (v.clone(), 14, "power_in"),
                    (r.clone(), 1, "passive"),
                ]);
                gnd.extend([(u.clone(), 7, "power_in"), (v.clone(), 7, "power_in")]);
            }
            b.net("+5V", &vcc);
            b.net("GND", &gnd);
        }
        _ => return None,
    }
    Some(b.finish())
}

/// A netlist written part by part (components, then libparts, then nets).
struct Board {
    comps: String,
    nets: String,
    code: usize,
}

impl Board {
    fn new() -> Board {
        Board {
            comps: String::new(),
            nets: String::new(),
            code: 1,
        }
    }

    fn comp(&mut self, reference: &str, value: &str, lib: &str, sheet: &str) {
        let n = self.code + self.comps.len();
        let _ = write!(
            self.comps,
            "    (comp (ref \"{reference}\")\n      (value \"{value}\")\n      (footprint \"Package_DIP:DIP-14_W7.62mm\")\n      (libsource (lib \"x\") (part \"{lib}\") (description \"\"))\n      (sheetpath (names \"{sheet}\") (tstamps \"{sheet}\"))\n      (tstamps \"{:08x}-0000-4000-8000-{:012x}\"))\n",
            n % 0xffff_ffff,
            n
        );
    }

    fn net(&mut self, name: &str, nodes: &[(String, u32, &str)]) {
        let _ = write!(
            self.nets,
            "    (net (code \"{}\") (name \"{name}\")",
            self.code
        );
        for (r, pin, t) in nodes {
            let _ = write!(
                self.nets,
                "\n      (node (ref \"{r}\") (pin \"{pin}\") (pintype \"{t}\"))"
            );
        }
        self.nets.push_str(")\n");
        self.code += 1;
    }

    fn finish(self) -> String {
        let mut s = String::with_capacity(self.comps.len() + self.nets.len() + 4096);
        s.push_str("(export (version \"E\")\n  (design\n    (source \"/synthetic/board.kicad_sch\")\n    (date \"2026-01-01T00:00:00\")\n    (tool \"Eeschema 8.0.0\")\n    (sheet (number \"1\") (name \"/\") (tstamps \"/\")))\n  (components\n");
        s.push_str(&self.comps);
        s.push_str("  )\n  (libparts\n");
        for (part, pins) in [("74HC00", 14), ("74HC04", 14), ("74LS04", 14), ("R", 2)] {
            let _ = writeln!(s, "    (libpart (lib \"x\") (part \"{part}\")\n      (pins");
            for p in 1..=pins {
                let t = match (part, p) {
                    (_, 7) | (_, 14) if pins == 14 => "power_in",
                    ("74HC00", 3 | 6 | 8 | 11) => "output",
                    ("74HC04" | "74LS04", 2 | 4 | 6 | 8 | 10 | 12) => "output",
                    _ if pins == 2 => "passive",
                    _ => "input",
                };
                let _ = writeln!(s, "        (pin (num \"{p}\") (name \"~\") (type \"{t}\"))");
            }
            s.push_str("      ))\n");
        }
        s.push_str("  )\n  (nets\n");
        s.push_str(&self.nets);
        s.push_str("  )\n)\n");
        s
    }
}

/// The `i`-th variant of a netlist from [`netlist`]: every reference renamed (`U7` ->
/// `U3_7`), so a folder of them holds no two files with the same text.
pub fn variant(base: &str, i: usize) -> String {
    let mut text = base.to_string();
    for p in ["U", "V", "R", "C"] {
        text = text.replace(&format!("(ref \"{p}"), &format!("(ref \"{p}{i}_"));
    }
    text
}

/// The library symbols of a synthetic sheet: one resistor.
const SHEET_LIB: &str = "  (lib_symbols\n    (symbol \"Device:R\" (in_bom yes) (on_board yes)\n      (property \"Reference\" \"R\" (at 0 0 0))\n      (symbol \"R_1_1\"\n        (pin passive line (at 0 3.81 270) (length 1.27) (name \"~\") (number \"1\"))\n        (pin passive line (at 0 -3.81 90) (length 1.27) (name \"~\") (number \"2\")))))\n";

/// Writes `cells` resistor cells on a grid: each cell two resistors joined by a wire, their
/// outer ends on labels that join the next cell. `uses` are the instance paths the symbols
/// are placed under, each with the prefix of its references (`R` gives `R0`, `R1` ...);
/// `end_labels` names the chain's two ends with hierarchical labels (`IN`, `OUT`) instead of
/// local ones.
fn write_cells(s: &mut String, cells: usize, uses: &[(String, String)], end_labels: bool) {
    let mm = |v: f64| format!("{v:.2}");
    for c in 0..cells {
        let x0 = (c % 200) as f64 * 30.48;
        let y = (c / 200) as f64 * 20.32 + 10.16;
        for (k, xc) in [(0, x0 + 10.16), (1, x0 + 22.86)] {
            let r = 2 * c + k;
            let _ = write!(
                s,
                "  (symbol (lib_id \"Device:R\") (at {} {} 90) (unit 1) (in_bom yes) (on_board yes)\n    (uuid \"{:08x}-0000-4000-8000-{:012x}\")\n    (property \"Reference\" \"R{r}\" (at {} {} 0))\n    (property \"Value\" \"4k7\" (at {} {} 0))\n    (pin \"1\" (uuid \"{:08x}-0001-4000-8000-{:012x}\"))\n    (pin \"2\" (uuid \"{:08x}-0002-4000-8000-{:012x}\"))\n    (instances (project \"synthetic\"",
                mm(xc), mm(y), r, r, mm(xc), mm(y - 2.54), mm(xc), mm(y + 2.54), r, r, r, r
            );
            for (path, prefix) in uses {
                let _ = write!(s, " (path \"{path}\" (reference \"{prefix}{r}\") (unit 1))");
            }
            s.push_str(")))\n");
        }
        let wire = |s: &mut String, a: f64, b: f64, n: usize| {
            let _ = writeln!(
                s,
                "  (wire (pts (xy {} {}) (xy {} {})) (stroke (width 0) (type default)) (uuid \"{:08x}-0003-4000-8000-{:012x}\"))",
                mm(a), mm(y), mm(b), mm(y), c, n
            );
        };
        wire(s, x0 + 13.97, x0 + 19.05, 0);
        wire(s, x0 + 3.81, x0 + 6.35, 1);
        wire(s, x0 + 26.67, x0 + 29.21, 2);
        for (at, n) in [(x0 + 3.81, c), (x0 + 29.21, c + 1)] {
            let (kind, name) = match (end_labels, n) {
                (true, 0) => ("hierarchical_label", "IN".to_string()),
                (true, n) if n == cells => ("hierarchical_label", "OUT".to_string()),
                _ => ("label", format!("N{n}")),
            };
            let shape = if kind == "label" {
                ""
            } else {
                " (shape passive)"
            };
            let _ = writeln!(
                s,
                "  ({kind} \"{name}\"{shape} (at {} {} 0) (effects (font (size 1.27 1.27))) (uuid \"{:08x}-0004-4000-8000-{:012x}\"))",
                mm(at), mm(y), c, n
            );
        }
    }
}

/// Writes a one-sheet KiCad 8 schematic of about `target_bytes` bytes: a chain of resistor
/// cells on a grid, each cell two resistors joined by a wire, their outer ends on labels
/// that join the next cell, so the reader has wires, labels, placements and instance data
/// to work through. Returns the text and the number of nets it must read into.
pub fn schematic(target_bytes: usize) -> (String, usize) {
    // one cell is about 1.9 kB
    let cells = (target_bytes / 1900).max(1);
    let root = "00000000-0000-4000-8000-000000000000";
    let mut s = String::with_capacity(target_bytes + 8192);
    let _ = write!(
        s,
        "(kicad_sch (version 20231120) (generator \"eeschema\")\n  (uuid \"{root}\")\n  (paper \"A0\")\n{SHEET_LIB}"
    );
    write_cells(
        &mut s,
        cells,
        &[(format!("/{root}"), "R".to_string())],
        false,
    );
    s.push_str("  (sheet_instances (path \"/\" (page \"1\")))\n)\n");
    // the labelled chain nets N0 .. N{cells}, one inner net per cell
    (s, 2 * cells + 1)
}

/// Writes a hierarchical KiCad 8 project of about `target_bytes` bytes: a root sheet that
/// places `sheets` sheets, each a use of one of a few child files (a file is used by up to
/// four sheets, as a design reuses a channel), every child a chain of resistor cells (as in
/// [`schematic`]) from its hierarchical label `IN` to `OUT`. On the root, labels at the
/// sheet pins join each sheet's `OUT` to the next one's `IN`, so the chains make one chain
/// across the project. Returns the files (root first, names relative to the root's folder)
/// and the number of nets the project must read into.
pub fn hierarchy(target_bytes: usize) -> (Vec<(String, String)>, usize) {
    const USES_PER_FILE: usize = 4;
    // a cell's text (with its four instance paths) is about 2.4 kB; 60 cells a file
    let cells_written = (target_bytes / 2400).max(1);
    let per_sheet = 60.min(cells_written);
    let files = cells_written.div_ceil(per_sheet).max(1);
    let sheets = files * USES_PER_FILE;
    let root = "00000000-0000-4000-8000-000000000000";
    let sheet_uuid = |i: usize| format!("5eee0000-0000-4000-8000-{i:012x}");
    let mm = |v: f64| format!("{v:.2}");
    let mut top = String::new();
    let _ = write!(
        top,
        "(kicad_sch (version 20231120) (generator \"eeschema\")\n  (uuid \"{root}\")\n  (paper \"A0\")\n  (lib_symbols)\n"
    );
    for i in 0..sheets {
        let (x, y) = ((i % 20) as f64 * 40.64, (i / 20) as f64 * 25.4 + 10.16);
        let (pin_y, right) = (y + 5.08, x + 20.32);
        let _ = write!(
            top,
            "  (sheet (at {} {}) (size 20.32 10.16) (uuid \"{}\")\n    (property \"Sheetname\" \"cells_{i}\" (at {} {} 0))\n    (property \"Sheetfile\" \"cells_{}.kicad_sch\" (at {} {} 0))\n    (pin \"IN\" passive (at {} {} 180) (effects (font (size 1.27 1.27))) (uuid \"5eee0001-0000-4000-8000-{i:012x}\"))\n    (pin \"OUT\" passive (at {} {} 0) (effects (font (size 1.27 1.27))) (uuid \"5eee0002-0000-4000-8000-{i:012x}\"))\n    (instances (project \"synthetic\" (path \"/{root}\" (page \"{}\")))))\n",
            mm(x), mm(y), sheet_uuid(i), mm(x), mm(y - 1.0), i / USES_PER_FILE, mm(x), mm(y + 11.0),
            mm(x), mm(pin_y), mm(right), mm(pin_y), i + 2
        );
        for (at, n) in [(x, i), (right, i + 1)] {
            let _ = writeln!(
                top,
                "  (label \"L{n}\" (at {} {} 0) (effects (font (size 1.27 1.27))) (uuid \"5eee0003-{:04x}-4000-8000-{i:012x}\"))",
                mm(at), mm(pin_y), n % 2
            );
        }
    }
    top.push_str("  (sheet_instances (path \"/\" (page \"1\")))\n)\n");
    let mut out = vec![("root.kicad_sch".to_string(), top)];
    for f in 0..files {
        let mut s = String::with_capacity(per_sheet * 2500 + 4096);
        let _ = write!(
            s,
            "(kicad_sch (version 20231120) (generator \"eeschema\")\n  (uuid \"c0de0000-0000-4000-8000-{f:012x}\")\n  (paper \"A0\")\n{SHEET_LIB}"
        );
        let uses: Vec<(String, String)> = (f * USES_PER_FILE..(f + 1) * USES_PER_FILE)
            .map(|i| (format!("/{root}/{}", sheet_uuid(i)), format!("R{i}_")))
            .collect();
        write_cells(&mut s, per_sheet, &uses, true);
        s.push_str(")\n");
        out.push((format!("cells_{f}.kicad_sch"), s));
    }
    // per sheet: one inner net per cell and the chain's inner labels; on the root, the
    // labels L0 .. L{sheets} that join the sheets
    (out, sheets * (2 * per_sheet - 1) + sheets + 1)
}

#[cfg(test)]
mod tests {
    #[test]
    fn every_shape_reads_cleanly_at_about_the_size_asked() {
        for name in super::SHAPES {
            let text = super::shape(name, 300_000).unwrap();
            assert!(
                // the cell sizes are estimates: within about a third of the size asked
                text.len() > 180_000 && text.len() < 400_000,
                "{name}: {}",
                text.len()
            );
            let nl = crate::netlist::read(&text).unwrap();
            assert!(
                nl.diagnostics.is_empty(),
                "{name}: {:?}",
                nl.diagnostics.first()
            );
        }
        assert!(super::shape("no such shape", 1000).is_none());
    }

    #[test]
    fn generated_netlist_reads_cleanly_at_about_the_size_asked() {
        let text = super::netlist(200_000);
        assert!(
            text.len() > 150_000 && text.len() < 260_000,
            "{}",
            text.len()
        );
        let tree = crate::sexpr::parse(&text).unwrap();
        let nl = crate::netlist::build(&tree).unwrap();
        assert!(nl.diagnostics.is_empty(), "{:?}", nl.diagnostics.first());
        let s = nl.summary();
        assert_eq!(s.parts % 4, 0);
        assert_eq!(s.pins, s.parts / 4 * 32);
        // a variant renames every reference and keeps the board
        let v = super::variant(&text, 7);
        assert_ne!(v, text);
        assert!(v.contains("(ref \"U7_0\")") && !v.contains("(ref \"U0\")"));
        let t2 = crate::sexpr::parse(&v).unwrap();
        let nl2 = crate::netlist::build(&t2).unwrap();
        assert!(nl2.diagnostics.is_empty());
        assert_eq!(nl2.summary(), s);
    }
}
