//! The audit as Markdown (GitHub-flavoured tables): the same sections as the HTML page, with
//! each chart's numbers as a table. Netlist text is escaped so it cannot open markup, links
//! or raw HTML, nor break a table.

use std::fmt::Write;

use super::charts::margin_text;
use super::{Audit, Block};
use crate::text::sanitize;
use crate::values::{format_amps, format_volts};

/// Escapes text for a Markdown paragraph or table cell.
pub fn md(s: &str) -> String {
    let flat = s.replace(['\r', '\n'], " ");
    let s = sanitize(&flat);
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '|' => out.push_str("\\|"),
            '*' | '[' | ']' | '\\' => {
                out.push('\\');
                out.push(c);
            }
            c => out.push(c),
        }
    }
    out
}

fn block_md(o: &mut String, title: &str, b: &Block) {
    let _ = writeln!(o, "### {title}\n");
    let from = if b.ran {
        format!("from the findings of `{}`", b.check)
    } else {
        format!("`{}` is turned off in this run: not reviewed", b.check)
    };
    if b.rows.is_empty() {
        let _ = writeln!(o, "None found ({from}).\n");
        return;
    }
    let _ = writeln!(o, "{from}\n\n| part | what | line |\n| --- | --- | ---: |");
    for r in &b.rows {
        let _ = writeln!(
            o,
            "| {} | {} | {} |",
            md(&r.subject),
            md(&r.text),
            r.line.map_or(String::new(), |l| l.to_string())
        );
    }
    o.push('\n');
}

fn count(x: f64) -> String {
    if x.is_finite() {
        format!("{x:.0}")
    } else {
        "unlimited".into()
    }
}

/// The whole report.
pub fn render(a: &Audit) -> String {
    let mut o = String::with_capacity(32 * 1024);
    let title = a
        .header
        .iter()
        .find(|(k, _)| *k == "title")
        .map_or(a.file.clone(), |(_, v)| v.clone());
    let _ = writeln!(o, "# Audit of {}\n", md(&title));
    let _ = writeln!(o, "File: {}\n", md(&a.file));
    o.push_str("> **Caution.** Legacy equipment can hold mains and high voltages, and capacitors can stay charged after power is removed. This report aids review of the DC logic interfaces. It replaces no one's judgement, and local codes and licensed practice come first.\n\n");

    o.push_str("## Summary\n\n### The board\n\n| | |\n| --- | --- |\n");
    for (k, v) in &a.header {
        let _ = writeln!(o, "| {k} | {} |", md(v));
    }
    if let Some(v) = &a.version {
        let _ = writeln!(o, "| netlist version | {} |", md(v));
    }
    let _ = writeln!(
        o,
        "| contents | {} parts, {} nets, {} pins, {} pins on no net or alone on a net |\n",
        a.summary.parts, a.summary.nets, a.summary.pins, a.summary.pins_on_no_net
    );
    o.push_str("### Supplies found\n\n");
    if a.supplies.is_empty() {
        o.push_str("No rails found: name them (`+5V`, `GND`) or declare them with `--rail`.\n\n");
    } else {
        o.push_str("| rail | voltage | from | pins | logic parts supplied |\n| --- | --- | --- | ---: | ---: |\n");
        for s in &a.supplies {
            let v = if s.ground {
                "ground (0.00 V)".to_string()
            } else {
                s.volts.map_or("unknown".to_string(), format_volts)
            };
            let _ = writeln!(
                o,
                "| {} | {v} | {} | {} | {} |",
                md(&s.net),
                s.basis,
                s.pins,
                s.parts
            );
        }
        o.push('\n');
    }
    o.push_str("### Parts by family\n\n| family | parts | references |\n| --- | ---: | --- |\n");
    for f in &a.families {
        let _ = writeln!(
            o,
            "| {} ({}) | {} | {} |",
            md(&f.id),
            md(&f.name),
            f.count,
            md(&f.parts.join(", "))
        );
    }
    for (k, n) in &a.kinds {
        let _ = writeln!(o, "| {k} | {n} | |");
    }
    let (c, n) = a.coverage;
    let pct = if n > 0 {
        c as f64 * 100.0 / n as f64
    } else {
        100.0
    };
    let _ = writeln!(
        o,
        "\nClassification coverage: {c} of {n} IC-like parts classified ({pct:.0} %){}.\n",
        super::html::symbols_note(a.function_symbols)
    );
    o.push_str("### Findings by check and severity\n\n");
    if a.by_check.is_empty() {
        o.push_str("No findings.\n\n");
    } else {
        o.push_str("| check | error | warning | info |\n| --- | ---: | ---: | ---: |\n");
        for c in &a.by_check {
            let _ = writeln!(
                o,
                "| `{}` | {} | {} | {} |",
                c.code, c.error, c.warning, c.info
            );
        }
        let (te, tw, ti) = a.by_check.iter().fold((0, 0, 0), |t, c| {
            (t.0 + c.error, t.1 + c.warning, t.2 + c.info)
        });
        let _ = writeln!(o, "| total | {te} | {tw} | {ti} |\n");
    }
    if a.waived > 0 {
        let _ = writeln!(
            o,
            "{} finding(s) waived by the project configuration are not shown.\n",
            a.waived
        );
    }

    o.push_str("## Findings\n\n### By net\n\n");
    if a.findings.is_empty() {
        o.push_str("No findings.\n\n");
    }
    for n in a.finding_nets() {
        let _ = writeln!(
            o,
            "#### {}\n",
            n.map_or("Not on one net".to_string(), |n| format!("Net {}", md(n)))
        );
        for f in a.findings.iter().filter(|f| f.net.as_deref() == n) {
            let _ = writeln!(o, "- **{}** `{}`: {}", f.severity, f.code, md(&f.message));
            if let Some(h) = &f.help {
                let _ = writeln!(o, "  - fix: {}", md(h));
            }
            if let (Some(l), Some(t)) = (f.line, &f.line_text) {
                let _ = writeln!(o, "  - {}:{l}: {}", md(&a.file), md(t));
            }
        }
        o.push('\n');
    }
    o.push_str("### By part\n\n");
    let parts = a.finding_parts();
    if parts.is_empty() {
        o.push_str("No finding names a part.\n\n");
    } else {
        o.push_str("| part | findings about it | also named in |\n| --- | --- | --- |\n");
        for p in parts {
            let (about, named) = a.findings_of(p);
            let on = |f: &super::Finding| {
                f.net
                    .as_ref()
                    .map_or(String::new(), |n| format!(" on {}", md(n)))
            };
            let list: Vec<String> = about
                .iter()
                .map(|f| format!("{} `{}`{}", f.severity, f.code, on(f)))
                .collect();
            let mut also: Vec<String> = Vec::new();
            for f in named {
                let t = format!("`{}`{}", f.code, on(f));
                if !also.contains(&t) {
                    also.push(t);
                }
            }
            let _ = writeln!(
                o,
                "| {} | {} | {} |",
                md(p),
                list.join("; "),
                also.join("; ")
            );
        }
        o.push('\n');
    }

    o.push_str("## Level charts\n\n");
    let _ = writeln!(o, "The charts' numbers: each driver's guaranteed levels at the current the net draws, each load family's thresholds, the margins, and each state's current against the rating (derating {:.0} %). The HTML report draws them.\n", a.derating * 100.0);
    if a.interfaces.is_empty() {
        o.push_str("No interface needs a chart.\n\n");
    }
    for i in &a.interfaces {
        let _ = writeln!(
            o,
            "### Net {}\n\nCharted for: {}.\n",
            md(&i.net),
            i.why.join(", ")
        );
        for d in &i.drivers {
            let _ = writeln!(
                o,
                "Driver {} ({}, {}), VOL max {}, VOH min {}.\n",
                md(&d.describe),
                md(d.family.as_deref().unwrap_or("unknown family")),
                d.vcc.map_or("supply unknown".into(), |v| format!(
                    "at {}",
                    format_volts(v)
                )),
                d.low_level.map_or("none guaranteed".into(), format_volts),
                d.high_level.map_or("none guaranteed".into(), format_volts)
            );
            if d.low.is_some() || d.high.is_some() {
                o.push_str("| state | used | rating | of rating |\n| --- | ---: | ---: | ---: |\n");
                for (name, u) in [("low", d.low), ("high", d.high)] {
                    let Some(u) = u else { continue };
                    let mark = if u.ratio > 1.0 {
                        "OVER"
                    } else if u.ratio > a.derating {
                        "above derating"
                    } else {
                        "ok"
                    };
                    let _ = writeln!(
                        o,
                        "| {name} | {} | {} | {:.0} % {mark} |",
                        format_amps(u.total),
                        format_amps(u.rating),
                        u.ratio * 100.0
                    );
                }
                o.push('\n');
            }
            if !d.loads.is_empty() {
                o.push_str("| load family | inputs | VIL max | VIH min | low margin | high margin |\n| --- | --- | ---: | ---: | ---: | ---: |\n");
                for l in &d.loads {
                    let _ = writeln!(
                        o,
                        "| {} | {} | {} | {} | {} | {} |",
                        md(&l.family),
                        md(&l.pins.join(", ")),
                        format_volts(l.vil),
                        format_volts(l.vih),
                        l.low_margin.map_or("-".into(), margin_text),
                        l.high_margin.map_or("-".into(), margin_text)
                    );
                }
                o.push('\n');
            }
        }
        if !i.unknown_loads.is_empty() {
            let _ = writeln!(
                o,
                "Loads with no family data: {}.\n",
                md(&i.unknown_loads.join(", "))
            );
        }
    }

    let m = &a.matrix;
    o.push_str("## Family compatibility\n\n");
    let _ = writeln!(o, "Driver family (rows) against load family (columns) at the board's supplies: high margin (VOH min at rated IOH - VIH min), low margin (VIL max - VOL max at rated IOL), fan-out in whole inputs low / high. FAIL: a margin below 0 V, a high above the input's limit, or not one input; MARGINAL: a margin below {:.2} V.\n", m.marginal_v);
    if m.drivers.is_empty() || m.loads.is_empty() {
        o.push_str("No classified logic families on the board.\n\n");
    } else {
        o.push_str("| driver \\\\ load |");
        for l in &m.loads {
            let _ = write!(o, " {} |", md(&l.label()));
        }
        o.push_str("\n| --- |");
        for _ in &m.loads {
            o.push_str(" --- |");
        }
        o.push('\n');
        for (di, d) in m.drivers.iter().enumerate() {
            let _ = write!(o, "| {} |", md(&d.label()));
            for c in &m.cells[di] {
                let _ = write!(
                    o,
                    " {}: high {}, low {}, fan-out {} / {}{} |",
                    c.verdict.mark(),
                    margin_text(c.high_margin),
                    margin_text(c.low_margin),
                    count(c.fanout_low),
                    count(c.fanout_high),
                    c.reason
                        .as_ref()
                        .map_or(String::new(), |r| format!(" ({})", md(r)))
                );
            }
            o.push('\n');
        }
        o.push('\n');
    }

    let r = &a.recapture;
    o.push_str("## Recapture review\n\n### Unclassified parts\n\n");
    if r.unclassified.is_empty() {
        o.push_str("Every IC-like part was classified.\n\n");
    } else {
        o.push_str("| part | value | library part | how read | near misses | line |\n| --- | --- | --- | --- | --- | ---: |\n");
        for u in &r.unclassified {
            let s = if u.suggestions.is_empty() {
                "none".to_string()
            } else {
                u.suggestions
                    .iter()
                    .map(|(v, ch, reads)| format!("{} ({}; reads as {})", md(v), md(ch), md(reads)))
                    .collect::<Vec<_>>()
                    .join("; ")
            };
            let _ = writeln!(
                o,
                "| {} | {} | {} | {} | {s} | {} |",
                md(&u.reference),
                md(&u.value),
                u.libpart.as_deref().map_or(String::new(), md),
                u.method,
                u.line.map_or(String::new(), |l| l.to_string())
            );
        }
        o.push('\n');
    }
    block_md(&mut o, "Pin types against the function table", &r.roles);
    block_md(&mut o, "Footprint pin counts", &r.packages);
    block_md(&mut o, "Parts with no supply", &r.unpowered);
    o.push_str("### Labels used once\n\n");
    if r.label_nets.is_empty() {
        o.push_str("No named net has only one pin.\n\n");
    } else {
        o.push_str("| net | what | line |\n| --- | --- | ---: |\n");
        for x in &r.label_nets {
            let _ = writeln!(
                o,
                "| {} | {} | {} |",
                md(&x.subject),
                md(&x.text),
                x.line.map_or(String::new(), |l| l.to_string())
            );
        }
        o.push('\n');
    }
    o.push_str("### Pins on no net\n\n");
    if r.pins_off.is_empty() {
        o.push_str("Every pin is wired to another pin.\n\n");
    } else {
        o.push_str("| part | value | on no net (unit not placed) | alone on a net |\n| --- | --- | --- | --- |\n");
        for p in &r.pins_off {
            let _ = writeln!(
                o,
                "| {} | {} | {} | {} |",
                md(&p.reference),
                md(&p.value),
                md(&p.absent.join(", ")),
                md(&p.alone.join(", "))
            );
        }
        o.push('\n');
    }

    let s = &a.sources;
    o.push_str("## Data sources\n\n");
    for t in &s.tables {
        let _ = writeln!(o, "- {}", md(t));
    }
    if let Some(c) = &s.config {
        let _ = writeln!(o, "- project configuration {}", md(c));
    }
    o.push_str("\n| family | name | from | source of the figures |\n| --- | --- | --- | --- |\n");
    for (id, name, src, shipped) in &s.families {
        let _ = writeln!(
            o,
            "| {} | {} | {} | {} |",
            md(id),
            md(name),
            if *shipped {
                "shipped table"
            } else {
                "project file"
            },
            md(src)
        );
    }
    o.push_str("\n| function | source of the pinout |\n| --- | --- |\n");
    for (id, src) in &s.functions {
        let _ = writeln!(o, "| {} | {} |", md(id), md(src));
    }
    o
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn netlist_text_cannot_open_markup_or_break_a_table() {
        assert_eq!(md("a|b"), "a\\|b");
        assert_eq!(
            md("<img src=x onerror=alert(1)>"),
            "&lt;img src=x onerror=alert(1)&gt;"
        );
        assert_eq!(md("[x](javascript:y)"), "\\[x\\](javascript:y)");
        assert_eq!(md("two\nlines"), "two lines");
        assert_eq!(md("/CNT_RESET"), "/CNT_RESET");
    }
}
