//! `netmargin parts`: every component with its classification, and `netmargin families`.

use std::io::{self, Write};

use serde::Serialize;

use crate::classify::classifier::{Classified, Method, PartKind, Rules};
use crate::classify::family::Drive;
use crate::netlist::Netlist;
use crate::text::sanitize;

#[derive(Serialize)]
struct PartRow<'a> {
    reference: &'a str,
    value: &'a str,
    kind: PartKind,
    family: Option<&'a str>,
    function: Option<String>,
    method: &'static str,
    suggestions: Vec<String>,
}

fn rows<'a>(nl: &'a Netlist<'_>, cl: &'a Classified) -> Vec<PartRow<'a>> {
    nl.components
        .iter()
        .zip(&cl.parts)
        .map(|(c, p)| PartRow {
            reference: c.reference.as_str(),
            value: c.value_str(),
            kind: p.kind,
            family: p.family.as_deref(),
            function: p.function.as_ref().map(|(_, f)| f.clone()).or_else(|| {
                p.named_function
                    .as_ref()
                    .map(|f| format!("{f} (not in the function table)"))
            }),
            method: p.method.as_str(),
            suggestions: p
                .suggestions
                .iter()
                .map(|s| format!("{} ({})", s.value, s.change))
                .collect(),
        })
        .collect()
}

/// Writes the parts list as text or JSON.
pub fn write_parts(
    out: &mut dyn Write,
    name: &str,
    nl: &Netlist<'_>,
    cl: &Classified,
    json: bool,
) -> io::Result<()> {
    let rows = rows(nl, cl);
    let (classified, ic) = cl.coverage;
    if json {
        #[derive(Serialize)]
        struct Doc<'a> {
            format_version: u32,
            path: &'a str,
            parts: Vec<PartRow<'a>>,
            coverage: Coverage,
        }
        #[derive(Serialize)]
        struct Coverage {
            classified: usize,
            ic_like: usize,
            function_symbols: usize,
        }
        let doc = Doc {
            format_version: 1,
            path: name,
            parts: rows,
            coverage: Coverage {
                classified,
                ic_like: ic,
                function_symbols: cl.function_symbols,
            },
        };
        serde_json::to_writer_pretty(&mut *out, &doc).map_err(io::Error::other)?;
        return writeln!(out);
    }
    // columns as wide as their widest entry, two spaces apart, so long references and values
    // (`SYS_RAM1`, `MK4116x8`) never run together
    let kinds: Vec<String> = rows
        .iter()
        .map(|r| format!("{:?}", r.kind).to_lowercase())
        .collect();
    let funcs: Vec<String> = rows
        .iter()
        .map(|r| r.function.clone().unwrap_or_else(|| "-".into()))
        .collect();
    let width = |head: &str, cells: &mut dyn Iterator<Item = usize>| {
        cells.fold(head.chars().count(), usize::max) + 2
    };
    let len = |s: &str| sanitize(s).chars().count();
    let wr = width("ref", &mut rows.iter().map(|r| len(r.reference)));
    let wv = width("value", &mut rows.iter().map(|r| len(r.value)));
    let wk = width("kind", &mut kinds.iter().map(|k| k.chars().count()));
    let wf = width(
        "family",
        &mut rows.iter().map(|r| len(r.family.unwrap_or("-"))),
    );
    let wn = width("function", &mut funcs.iter().map(|f| len(f)));
    let w = |s: &str, n: usize| format!("{:<n$}", sanitize(s), n = n);
    writeln!(
        out,
        "{}{}{}{}{}method",
        w("ref", wr),
        w("value", wv),
        w("kind", wk),
        w("family", wf),
        w("function", wn)
    )?;
    for (i, r) in rows.iter().enumerate() {
        writeln!(
            out,
            "{}{}{}{}{}{}",
            w(r.reference, wr),
            w(r.value, wv),
            w(&kinds[i], wk),
            w(r.family.unwrap_or("-"), wf),
            w(&funcs[i], wn),
            r.method
        )?;
        for s in &r.suggestions {
            writeln!(out, "{}did you mean {}?", " ".repeat(wr), sanitize(s))?;
        }
    }
    let pct = if ic == 0 {
        100.0
    } else {
        classified as f64 * 100.0 / ic as f64
    };
    let symbols = match cl.function_symbols {
        0 => String::new(),
        1 => "; 1 part drawn as a function with no part number, not counted".to_string(),
        n => format!("; {n} parts drawn as functions with no part number, not counted"),
    };
    if ic == 0 {
        writeln!(out, "{}: no IC-like parts{symbols}", sanitize(name))?;
    } else {
        writeln!(
            out,
            "{}: {classified} of {ic} IC-like parts classified ({pct:.0} %){symbols}",
            sanitize(name)
        )?;
    }
    let _ = Method::Pattern;
    Ok(())
}

/// Writes the family table at a supply.
pub fn write_families(
    out: &mut dyn Write,
    rules: &Rules,
    supply: Option<f64>,
    json: bool,
) -> io::Result<()> {
    #[derive(Serialize)]
    struct Row {
        id: String,
        name: String,
        input: String,
        vcc: f64,
        basis: String,
        vih_min: f64,
        vil_max: f64,
        voh_min: Option<f64>,
        vol_max: Option<f64>,
        ioh_max_ma: f64,
        iol_max_ma: f64,
        iih_max_ua: f64,
        iil_max_ma: f64,
        source: String,
    }
    // at a stated supply, only the families specified for it: a 74LS or 74AHCT row at 3.3 V
    // would print figures no part guarantees
    let specified = |f: &&crate::classify::family::Family| {
        supply.is_none_or(|v| v >= f.supply_min - 1e-9 && v <= f.supply_max + 1e-9)
    };
    let unspecified: Vec<String> = rules
        .families
        .iter()
        .filter(|f| !specified(f))
        .map(|f| format!("{} ({:.2} to {:.2} V)", f.id, f.supply_min, f.supply_max))
        .collect();
    let rows: Vec<Row> = rules
        .families
        .iter()
        .filter(specified)
        .map(|f| {
            let vcc = supply.unwrap_or(f.supply_nominal);
            let l = f.levels(vcc, Drive::Standard);
            Row {
                id: f.id.clone(),
                name: f.name.clone(),
                input: f.input.as_str().to_string(),
                vcc,
                basis: l.basis.describe(),
                vih_min: l.vih_min,
                vil_max: l.vil_max,
                voh_min: l.voh.last().map(|p| p.v),
                vol_max: l.vol.last().map(|p| p.v),
                ioh_max_ma: l.ioh_max * 1e3,
                iol_max_ma: l.iol_max * 1e3,
                iih_max_ua: l.iih_max * 1e6,
                iil_max_ma: l.iil_max * 1e3,
                source: f.source.clone(),
            }
        })
        .collect();
    if json {
        serde_json::to_writer_pretty(&mut *out, &rows).map_err(io::Error::other)?;
        return writeln!(out);
    }
    writeln!(
        out,
        "{:<11}{:<6}{:>6} {:>6} {:>6} {:>6} {:>6} {:>8} {:>8} {:>8} {:>8}  basis",
        "family",
        "input",
        "VCC",
        "VIH",
        "VIL",
        "VOH",
        "VOL",
        "IOH mA",
        "IOL mA",
        "IIH uA",
        "IIL mA"
    )?;
    for r in rows {
        let f = |v: Option<f64>| v.map_or("-".to_string(), |v| format!("{v:.2}"));
        writeln!(
            out,
            "{:<11}{:<6}{:>6.2} {:>6.2} {:>6.2} {:>6} {:>6} {:>8.2} {:>8.2} {:>8.1} {:>8.2}  {}",
            r.id,
            r.input,
            r.vcc,
            r.vih_min,
            r.vil_max,
            f(r.voh_min),
            f(r.vol_max),
            r.ioh_max_ma,
            r.iol_max_ma,
            r.iih_max_ua,
            r.iil_max_ma,
            r.basis
        )?;
    }
    if let (Some(v), false) = (supply, unspecified.is_empty()) {
        writeln!(
            out,
            "not specified at {v:.2} V, so not listed: {}",
            unspecified.join(", ")
        )?;
    }
    writeln!(out, "VOH and VOL at each family's heaviest published load; `netmargin families --format json` adds the sources")
}
