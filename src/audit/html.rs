//! The audit as one self-contained HTML page: inline CSS and inline SVG, no scripts, no
//! fonts or anything else fetched, print styles for paper. All netlist text is escaped.

use std::fmt::Write;

use super::charts::{self, margin_text};
use super::{Audit, Block, Finding, Verdict};
use crate::diag::Severity;
use crate::text::sanitize;
use crate::values::{format_amps, format_volts};

/// Escapes text for HTML element content and quoted attribute values (control characters
/// are shown as `\u{..}`).
pub fn esc(s: &str) -> String {
    let s = sanitize(s);
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c => out.push(c),
        }
    }
    out
}

const STYLE: &str = r#"
:root { --ok: #1f6f1f; --warn: #8a5a00; --bad: #b00020; --ink: #1a1a1a; --rule: #c8c8c8; }
* { box-sizing: border-box; }
body { font-family: system-ui, sans-serif; color: var(--ink); margin: 0 auto; max-width: 1180px; padding: 1rem 1.5rem 3rem; line-height: 1.4; }
h1 { font-size: 1.6rem; margin-bottom: 0.2rem; }
h2 { border-bottom: 2px solid var(--ink); padding-bottom: 0.2rem; margin-top: 2.2rem; }
h3 { margin-top: 1.4rem; }
table { border-collapse: collapse; margin: 0.5rem 0 1rem; font-size: 0.92rem; }
th, td { border: 1px solid var(--rule); padding: 0.25rem 0.5rem; text-align: left; vertical-align: top; }
th { background: #f0f0f0; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
code, .line { font-family: ui-monospace, monospace; font-size: 0.88rem; }
.line { background: #f6f6f6; border-left: 3px solid var(--rule); padding: 0.15rem 0.4rem; display: block; white-space: pre-wrap; overflow-wrap: anywhere; }
.sev { font-weight: bold; text-transform: uppercase; font-size: 0.8rem; padding: 0 0.3rem; border-radius: 3px; }
.sev-error { color: #fff; background: var(--bad); }
.sev-warning { color: #000; background: #f3c969; }
.sev-info { color: #000; background: #cfe3f7; }
.finding { border: 1px solid var(--rule); border-radius: 4px; padding: 0.5rem 0.7rem; margin: 0.5rem 0; break-inside: avoid; }
.finding .help { margin: 0.3rem 0; }
.cell-pass { background: #dff0dc; }
.cell-marginal { background: #fbeec8; }
.cell-fail { background: #f7d4d8; }
.mark { font-weight: bold; }
figure { margin: 0.8rem 0 1.4rem; break-inside: avoid; overflow-x: auto; }
figcaption { font-size: 0.9rem; color: #333; }
nav ol { columns: 2; }
.caution { border: 2px solid var(--bad); padding: 0.5rem 0.8rem; margin: 1rem 0; }
.muted { color: #555; }
@media print {
  nav { display: none; }
  body { max-width: none; padding: 0; font-size: 10pt; }
  h2 { break-before: page; }
  #summary h2 { break-before: auto; }
  figure, table, .finding { break-inside: avoid; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  a { color: inherit; text-decoration: none; }
}
"#;

fn sev_badge(s: Severity) -> String {
    format!("<span class=\"sev sev-{0}\">{0}</span>", s.as_str())
}

fn finding_html(out: &mut String, f: &Finding, file: &str) {
    let _ = write!(
        out,
        "<div class=\"finding\" id=\"{}\">{} <code>{}</code> {}",
        esc(&f.id),
        sev_badge(f.severity),
        esc(&f.code),
        esc(&f.message)
    );
    if let Some(h) = &f.help {
        let _ = write!(out, "<div class=\"help\"><b>fix:</b> {}</div>", esc(h));
    }
    if !f.pins.is_empty() {
        let _ = write!(
            out,
            "<div class=\"muted\">pins: {}</div>",
            esc(&f.pins.join(", "))
        );
    }
    if let (Some(l), Some(t)) = (f.line, &f.line_text) {
        let _ = write!(
            out,
            "<div class=\"muted\">{}:{l}</div><code class=\"line\">{}</code>",
            esc(file),
            esc(t)
        );
    }
    out.push_str("</div>\n");
}

fn block_html(out: &mut String, title: &str, b: &Block) {
    let _ = write!(out, "<h3>{}</h3>", esc(title));
    let from = if b.ran {
        format!("from the findings of <code>{}</code>", esc(b.check))
    } else {
        format!(
            "<code>{}</code> is turned off in this run: not reviewed",
            esc(b.check)
        )
    };
    if b.rows.is_empty() {
        let _ = write!(out, "<p>None found ({from}).</p>");
        return;
    }
    let _ = write!(
        out,
        "<p class=\"muted\">{from}</p><table><tr><th>part</th><th>what</th><th>line</th></tr>"
    );
    for r in &b.rows {
        let _ = write!(
            out,
            "<tr><td>{}</td><td>{}</td><td class=\"num\">{}</td></tr>",
            esc(&r.subject),
            esc(&r.text),
            r.line.map_or(String::new(), |l| l.to_string())
        );
    }
    out.push_str("</table>\n");
}

fn fanout_count(x: f64) -> String {
    if x.is_finite() {
        format!("{x:.0}")
    } else {
        "unlimited".into()
    }
}

/// The whole report.
pub fn render(a: &Audit) -> String {
    let mut o = String::with_capacity(64 * 1024);
    let title = a
        .header
        .iter()
        .find(|(k, _)| *k == "title")
        .map_or(a.file.clone(), |(_, v)| v.clone());
    let _ = write!(
        o,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<title>netmargin audit: {}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n",
        esc(&title)
    );
    let _ = writeln!(o, "<header><h1>Audit of {}</h1><p class=\"muted\">netmargin {} on <code>{}</code></p></header>", esc(&title), env!("CARGO_PKG_VERSION"), esc(&a.file));
    o.push_str("<div class=\"caution\"><b>Caution.</b> Legacy equipment can hold mains and high voltages, and capacitors can stay charged after power is removed. This report aids review of the DC logic interfaces. It replaces no one's judgement, and local codes and licensed practice come first.</div>\n");
    o.push_str("<nav><b>Contents</b><ol><li><a href=\"#summary\">Summary</a></li><li><a href=\"#findings\">Findings</a></li><li><a href=\"#charts\">Level charts</a></li><li><a href=\"#matrix\">Family compatibility</a></li><li><a href=\"#recapture\">Recapture review</a></li><li><a href=\"#sources\">Data sources</a></li></ol></nav>\n");

    // summary
    o.push_str("<section id=\"summary\"><h2>Summary</h2>\n<h3>The board</h3><table>");
    for (k, v) in &a.header {
        let _ = write!(o, "<tr><th>{}</th><td>{}</td></tr>", esc(k), esc(v));
    }
    if let Some(v) = &a.version {
        let _ = write!(o, "<tr><th>netlist version</th><td>{}</td></tr>", esc(v));
    }
    let _ = writeln!(
        o,
        "<tr><th>contents</th><td>{} parts, {} nets, {} pins, {} pins on no net or alone on a net</td></tr></table>",
        a.summary.parts, a.summary.nets, a.summary.pins, a.summary.pins_on_no_net
    );
    o.push_str("<h3>Supplies found</h3>");
    if a.supplies.is_empty() {
        o.push_str("<p>No rails found: name them (<code>+5V</code>, <code>GND</code>) or declare them with <code>--rail</code>.</p>");
    } else {
        o.push_str("<table><tr><th>rail</th><th>voltage</th><th>from</th><th>pins</th><th>logic parts supplied</th></tr>");
        for s in &a.supplies {
            let v = if s.ground {
                "ground (0.00 V)".to_string()
            } else {
                s.volts.map_or("unknown".to_string(), format_volts)
            };
            let _ = write!(o, "<tr><td>{}</td><td>{}</td><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>", esc(&s.net), v, s.basis, s.pins, s.parts);
        }
        o.push_str("</table>");
        if a.rail_tolerance > 0.0 {
            let _ = write!(
                o,
                "<p>Rails are checked at &plusmn;{:.1} %.</p>",
                a.rail_tolerance * 100.0
            );
        }
    }
    o.push_str(
        "<h3>Parts by family</h3><table><tr><th>family</th><th>parts</th><th>references</th></tr>",
    );
    for f in &a.families {
        let _ = write!(o, "<tr><td>{} <span class=\"muted\">{}</span></td><td class=\"num\">{}</td><td>{}</td></tr>", esc(&f.id), esc(&f.name), f.count, esc(&f.parts.join(", ")));
    }
    for (k, n) in &a.kinds {
        let _ = write!(
            o,
            "<tr><td>{}</td><td class=\"num\">{n}</td><td></td></tr>",
            esc(k)
        );
    }
    o.push_str("</table>");
    let (c, n) = a.coverage;
    let pct = if n > 0 {
        c as f64 * 100.0 / n as f64
    } else {
        100.0
    };
    let _ = write!(o, "<p id=\"coverage\"><b>Classification coverage:</b> {c} of {n} IC-like parts classified ({pct:.0} %){}. Unclassified parts are listed in the <a href=\"#recapture\">recapture review</a>; the tool cannot judge their interfaces.</p>", symbols_note(a.function_symbols));
    o.push_str("<h3>Findings by check and severity</h3>");
    if a.by_check.is_empty() {
        o.push_str("<p>No findings.</p>");
    } else {
        o.push_str("<table id=\"by-check\"><tr><th>check</th><th>error</th><th>warning</th><th>info</th><th>what it finds</th></tr>");
        let (mut te, mut tw, mut ti) = (0, 0, 0);
        for c in &a.by_check {
            te += c.error;
            tw += c.warning;
            ti += c.info;
            let _ = write!(o, "<tr><td><code>{}</code></td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{}</td></tr>", esc(&c.code), c.error, c.warning, c.info, esc(&c.summary));
        }
        let _ = write!(o, "<tr><th>total</th><th class=\"num\">{te}</th><th class=\"num\">{tw}</th><th class=\"num\">{ti}</th><th></th></tr></table>");
    }
    if a.waived > 0 {
        let _ = write!(
            o,
            "<p>{} finding(s) waived by the project configuration are not shown.</p>",
            a.waived
        );
    }
    o.push_str("</section>\n");

    // findings
    o.push_str("<section id=\"findings\"><h2>Findings</h2>\n<h3>By net</h3>\n");
    let nets = a.finding_nets();
    if a.findings.is_empty() {
        o.push_str("<p>No findings.</p>");
    }
    for n in &nets {
        let _ = writeln!(
            o,
            "<h4>{}</h4>",
            n.map_or("not on one net".to_string(), |n| format!(
                "net <code>{}</code>",
                esc(n)
            ))
        );
        for f in a.findings.iter().filter(|f| f.net.as_deref() == *n) {
            finding_html(&mut o, f, &a.file);
        }
    }
    o.push_str("<h3>By part</h3>");
    let parts = a.finding_parts();
    if parts.is_empty() {
        o.push_str("<p>No finding names a part.</p>");
    } else {
        o.push_str("<table id=\"by-part\"><tr><th>part</th><th>findings about it</th><th>also named in</th></tr>");
        for p in parts {
            let (about, named) = a.findings_of(p);
            let links: Vec<String> = about
                .iter()
                .map(|f| {
                    format!(
                        "<a href=\"#{}\">{} <code>{}</code>{}</a>",
                        esc(&f.id),
                        f.severity.as_str(),
                        esc(&f.code),
                        f.net
                            .as_ref()
                            .map_or(String::new(), |n| format!(" on {}", esc(n)))
                    )
                })
                .collect();
            let mut also: Vec<String> = Vec::new();
            for f in named {
                let t = format!(
                    "<a href=\"#{}\"><code>{}</code>{}</a>",
                    esc(&f.id),
                    esc(&f.code),
                    f.net
                        .as_ref()
                        .map_or(String::new(), |n| format!(" on {}", esc(n)))
                );
                if !also.contains(&t) {
                    also.push(t);
                }
            }
            let _ = write!(
                o,
                "<tr><td>{}</td><td>{}</td><td>{}</td></tr>",
                esc(p),
                links.join("<br>"),
                also.join("<br>")
            );
        }
        o.push_str("</table>");
    }
    o.push_str("</section>\n");

    // charts
    let _ = write!(o, "<section id=\"charts\"><h2>Level charts</h2>\n<p>One chart per driver on every net with a level or fan-out finding, and on each net asked for with <code>--net</code>. The driver's guaranteed output bands (VOL max and VOH min at the current this net draws) stand beside each load family's input bands (VIL max, VIH min) at its own supply. The fan-out bars show each state's current against the output's rating; the dashed line is the {:.0} % derating.</p>\n", a.derating * 100.0);
    if a.interfaces.is_empty() {
        o.push_str("<p>No interface needs a chart.</p>");
    }
    for (k, i) in a.interfaces.iter().enumerate() {
        let _ = write!(
            o,
            "<h3 id=\"chart-{}\">net <code>{}</code></h3><p class=\"muted\">charted for: {}</p>",
            k + 1,
            esc(&i.net),
            esc(&i.why.join(", "))
        );
        if i.drivers.is_empty() {
            o.push_str("<p>Nothing drives this net.</p>");
        }
        for d in &i.drivers {
            let _ = write!(o, "<figure>{}", charts::level_chart(&i.net, d));
            if let Some(f) = charts::fanout_chart(&i.net, d, a.derating) {
                let _ = write!(o, "{f}");
            }
            let _ = writeln!(o, "<figcaption>{}</figcaption></figure>", esc(&d.describe));
            o.push_str("<table class=\"budget\"><tr><th>driver</th><th>state</th><th>used</th><th>rating</th><th>of rating</th><th>level there</th></tr>");
            for (name, u, lvl) in [("low", d.low, d.low_level), ("high", d.high, d.high_level)] {
                let Some(u) = u else { continue };
                let mark = if u.ratio > 1.0 {
                    "OVER"
                } else if u.ratio > a.derating {
                    "above derating"
                } else {
                    "ok"
                };
                let _ = write!(
                    o,
                    "<tr><td>{}</td><td>{name}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{:.0} % {mark}</td><td class=\"num\">{}</td></tr>",
                    esc(&d.pin),
                    format_amps(u.total),
                    format_amps(u.rating),
                    u.ratio * 100.0,
                    lvl.map_or("none guaranteed".into(), format_volts)
                );
            }
            o.push_str("</table><table class=\"margins\"><tr><th>load family</th><th>inputs</th><th>VIL max</th><th>VIH min</th><th>low margin</th><th>high margin</th></tr>");
            for l in &d.loads {
                let _ = write!(
                    o,
                    "<tr><td>{}</td><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>",
                    esc(&l.family),
                    esc(&l.pins.join(", ")),
                    format_volts(l.vil),
                    format_volts(l.vih),
                    l.low_margin.map_or("-".into(), margin_text),
                    l.high_margin.map_or("-".into(), margin_text)
                );
            }
            o.push_str("</table>\n");
        }
        if !i.unknown_loads.is_empty() {
            let _ = write!(
                o,
                "<p>Loads with no family data (not charted): {}</p>",
                esc(&i.unknown_loads.join(", "))
            );
        }
    }
    o.push_str("</section>\n");

    // matrix
    let m = &a.matrix;
    let _ = write!(o, "<section id=\"matrix\"><h2>Family compatibility</h2>\n<p>Each driver family on the board against each load family, at the supplies they run from here. High margin = VOH min at the rated IOH &minus; VIH min; low margin = VIL max &minus; VOL max at the rated IOL; fan-out = whole inputs per state (IOL / IIL, IOH / IIH), DC only. FAIL: a margin below 0 V, a high above the input's limit, or not one input; MARGINAL: a margin below {:.2} V.</p>\n", m.marginal_v);
    if m.drivers.is_empty() || m.loads.is_empty() {
        o.push_str("<p>No classified logic families on the board.</p>");
    } else {
        o.push_str("<table id=\"family-matrix\"><tr><th>driver \\ load</th>");
        for l in &m.loads {
            let _ = write!(o, "<th>{}</th>", esc(&l.label()));
        }
        o.push_str("</tr>");
        for (di, d) in m.drivers.iter().enumerate() {
            let _ = write!(o, "<tr><th>{}</th>", esc(&d.label()));
            for c in &m.cells[di] {
                let class = match c.verdict {
                    Verdict::Pass => "cell-pass",
                    Verdict::Marginal => "cell-marginal",
                    Verdict::Fail => "cell-fail",
                };
                let _ = write!(
                    o,
                    "<td class=\"{class}\"><span class=\"mark\">{}</span><br>high {}<br>low {}<br>fan-out {} L / {} H{}</td>",
                    c.verdict.mark(),
                    margin_text(c.high_margin),
                    margin_text(c.low_margin),
                    fanout_count(c.fanout_low),
                    fanout_count(c.fanout_high),
                    c.reason.as_ref().map_or(String::new(), |r| format!("<br><small>{}</small>", esc(r)))
                );
            }
            o.push_str("</tr>");
        }
        o.push_str("</table>");
    }
    o.push_str("</section>\n");

    // recapture
    let r = &a.recapture;
    o.push_str("<section id=\"recapture\"><h2>Recapture review</h2>\n<p>What the recapture of the schematic may have got wrong: values misread from the scan, symbols with the wrong pin types, footprints of the wrong size, labels that connect nothing, pins left off, parts without a supply.</p>\n<h3>Unclassified parts</h3>");
    if r.unclassified.is_empty() {
        o.push_str("<p>Every IC-like part was classified.</p>");
    } else {
        o.push_str("<table id=\"unclassified\"><tr><th>part</th><th>value</th><th>library part</th><th>how read</th><th>near misses (a slip away)</th><th>line</th></tr>");
        for u in &r.unclassified {
            let sugg = if u.suggestions.is_empty() {
                "none".to_string()
            } else {
                u.suggestions
                    .iter()
                    .map(|(v, ch, reads)| {
                        format!(
                            "<code>{}</code> ({}; reads as {})",
                            esc(v),
                            esc(ch),
                            esc(reads)
                        )
                    })
                    .collect::<Vec<_>>()
                    .join("<br>")
            };
            let _ = write!(
                o,
                "<tr><td>{}</td><td><code>{}</code></td><td>{}</td><td>{}</td><td>{sugg}</td><td class=\"num\">{}</td></tr>",
                esc(&u.reference),
                esc(&u.value),
                u.libpart.as_deref().map_or(String::new(), esc),
                u.method,
                u.line.map_or(String::new(), |l| l.to_string())
            );
        }
        o.push_str("</table>");
    }
    block_html(&mut o, "Pin types against the function table", &r.roles);
    block_html(&mut o, "Footprint pin counts", &r.packages);
    block_html(&mut o, "Parts with no supply", &r.unpowered);
    o.push_str("<h3>Labels used once</h3>");
    if r.label_nets.is_empty() {
        o.push_str("<p>No named net has only one pin.</p>");
    } else {
        o.push_str("<table id=\"label-nets\"><tr><th>net</th><th>what</th><th>line</th></tr>");
        for x in &r.label_nets {
            let _ = write!(
                o,
                "<tr><td><code>{}</code></td><td>{}</td><td class=\"num\">{}</td></tr>",
                esc(&x.subject),
                esc(&x.text),
                x.line.map_or(String::new(), |l| l.to_string())
            );
        }
        o.push_str("</table>");
    }
    o.push_str("<h3>Pins on no net</h3>");
    if r.pins_off.is_empty() {
        o.push_str("<p>Every pin is wired to another pin.</p>");
    } else {
        o.push_str("<table id=\"pins-off\"><tr><th>part</th><th>value</th><th>on no net (unit not placed)</th><th>alone on a net (placed, wired to nothing)</th></tr>");
        for p in &r.pins_off {
            let _ = write!(
                o,
                "<tr><td>{}</td><td><code>{}</code></td><td>{}</td><td>{}</td></tr>",
                esc(&p.reference),
                esc(&p.value),
                esc(&p.absent.join(", ")),
                esc(&p.alone.join(", "))
            );
        }
        o.push_str("</table>");
    }
    o.push_str("</section>\n");

    // sources
    let s = &a.sources;
    o.push_str("<section id=\"sources\"><h2>Data sources</h2>\n<h3>Tables</h3><ul>");
    for t in &s.tables {
        let _ = write!(o, "<li>{}</li>", esc(t));
    }
    if let Some(c) = &s.config {
        let _ = write!(o, "<li>project configuration <code>{}</code></li>", esc(c));
    }
    o.push_str("</ul><h3>Families on the board</h3><table><tr><th>family</th><th>name</th><th>from</th><th>source of the figures</th></tr>");
    for (id, name, src, shipped) in &s.families {
        let _ = write!(
            o,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
            esc(id),
            esc(name),
            if *shipped {
                "shipped table"
            } else {
                "project file"
            },
            esc(src)
        );
    }
    o.push_str("</table><h3>Functions on the board</h3><table><tr><th>function</th><th>source of the pinout</th></tr>");
    for (id, src) in &s.functions {
        let _ = write!(o, "<tr><td>{}</td><td>{}</td></tr>", esc(id), esc(src));
    }
    o.push_str("</table></section>\n</body>\n</html>\n");
    o
}

/// The clause after the coverage figure about parts drawn as functions, if any.
pub(crate) fn symbols_note(n: usize) -> String {
    match n {
        0 => String::new(),
        1 => "; 1 part is drawn as a function with no part number and is not counted".into(),
        n => format!("; {n} parts are drawn as functions with no part number and are not counted"),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escapes_markup_quotes_and_controls() {
        assert_eq!(
            esc("<script>\"a\" & 'b'</script>"),
            "&lt;script&gt;&quot;a&quot; &amp; &#39;b&#39;&lt;/script&gt;"
        );
        assert_eq!(esc("a\u{1b}[31m"), "a\\u{1b}[31m");
    }
}
