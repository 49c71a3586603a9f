//! The audit's charts, drawn as SVG documents with the `svg` crate: a level chart per driver
//! (its guaranteed output bands beside each load family's input bands on one voltage axis,
//! with the margins or shortfalls marked) and a fan-out bar per driver (each state's current
//! against the rating and the derating).
//!
//! Every number comes from a [`DriverView`], which holds the net budget's figures. Netlist
//! text only ever goes into text nodes (which the crate escapes), never into an attribute.

use svg::node::element::{Group, Line, Rectangle, Text, Title};
use svg::Document;

use super::{DriverView, LoadGroup};
use crate::classify::PinRole;
use crate::text::sanitize;
use crate::values::{format_amps, format_volts};

const OUT_FILL: &str = "#bcd4ee";
const OUT_STROKE: &str = "#2f5f8f";
const IN_FILL: &str = "#d5ecd4";
const IN_STROKE: &str = "#3c7a3a";
const GAP_FILL: &str = "#eeeeee";
const OK: &str = "#1f6f1f";
const SHORT: &str = "#b00020";
const AMBER: &str = "#9a6a00";

const LEFT: f64 = 64.0;
const TOP: f64 = 44.0;
const PLOT_H: f64 = 280.0;
const COL_W: f64 = 340.0;
const BAND_W: f64 = 70.0;
const BOTTOM: f64 = 58.0;

fn text(x: f64, y: f64, s: &str) -> Text {
    Text::new(sanitize(s).into_owned()).set("x", x).set("y", y)
}

fn line(x1: f64, y1: f64, x2: f64, y2: f64, stroke: &str) -> Line {
    Line::new()
        .set("x1", x1)
        .set("y1", y1)
        .set("x2", x2)
        .set("y2", y2)
        .set("stroke", stroke)
}

fn rect(x: f64, y1: f64, y2: f64, w: f64, fill: &str, stroke: &str) -> Rectangle {
    let (top, bottom) = (y1.min(y2), y1.max(y2));
    Rectangle::new()
        .set("x", x)
        .set("y", top)
        .set("width", w)
        .set("height", (bottom - top).max(0.5))
        .set("fill", fill)
        .set("stroke", stroke)
}

/// A signed margin as the report writes it: `+0.70 V`, or `short 0.80 V`.
pub fn margin_text(m: f64) -> String {
    if m >= 0.0 {
        format!("+{m:.2} V")
    } else {
        format!("short {:.2} V", -m)
    }
}

fn axis_max(d: &DriverView) -> f64 {
    let mut top: f64 = d.vcc.unwrap_or(5.0);
    for v in [d.high_level, d.top_level, d.pull_up.map(|p| p.1)]
        .into_iter()
        .flatten()
    {
        top = top.max(v);
    }
    for l in &d.loads {
        top = top.max(l.vcc.unwrap_or(0.0)).max(l.vih);
        if let (Some(lim), Some(t)) = (l.input_limit, d.top_level) {
            if t > lim {
                top = top.max(lim);
            }
        }
    }
    let m = (top * 1.08).ceil();
    if m.is_finite() && m > 0.0 {
        m
    } else {
        5.0
    }
}

/// A vertical bracket from `a` to `b` volts at `x`, coloured and labelled by the margin.
fn bracket(x: f64, ya: f64, yb: f64, margin: f64, what: &str) -> Group {
    let colour = if margin >= 0.0 { OK } else { SHORT };
    let mut g = Group::new().set(
        "class",
        if margin >= 0.0 {
            "margin-ok"
        } else {
            "margin-short"
        },
    );
    g = g
        .add(line(x, ya, x, yb, colour).set("stroke-width", 2))
        .add(line(x - 4.0, ya, x + 4.0, ya, colour).set("stroke-width", 2))
        .add(line(x - 4.0, yb, x + 4.0, yb, colour).set("stroke-width", 2));
    let mark = if margin >= 0.0 { "ok" } else { "SHORT" };
    let label = format!("{what} {} {mark}", margin_text(margin));
    let ym = (ya + yb) / 2.0 + 4.0;
    g.add(
        text(x + 7.0, ym, &label)
            .set("fill", colour)
            .set("font-weight", "bold"),
    )
}

fn load_column(g: Group, x: f64, y: &dyn Fn(f64) -> f64, d: &DriverView, l: &LoadGroup) -> Group {
    let mut g = g;
    let top_v = l.vcc.unwrap_or(d.vcc.unwrap_or(5.0)).max(l.vih);
    g = g
        .add(rect(x, y(0.0), y(l.vil), BAND_W, IN_FILL, IN_STROKE))
        .add(rect(x, y(l.vil), y(l.vih), BAND_W, GAP_FILL, "#999999"))
        .add(rect(x, y(l.vih), y(top_v), BAND_W, IN_FILL, IN_STROKE))
        .add(text(x + 4.0, y(l.vil / 2.0) + 4.0, "reads low"))
        .add(text(x + 4.0, y((l.vil + l.vih) / 2.0) + 4.0, "undefined").set("fill", "#555555"))
        .add(text(x + 4.0, y((l.vih + top_v) / 2.0) + 4.0, "reads high"))
        .add(text(
            x + BAND_W + 4.0,
            y(l.vil) + 12.0,
            &format!("VIL max {}", format_volts(l.vil)),
        ))
        .add(text(
            x + BAND_W + 4.0,
            y(l.vih) - 4.0,
            &format!("VIH min {}", format_volts(l.vih)),
        ));
    if let Some(v) = l.vcc {
        g = g.add(line(x, y(v), x + BAND_W, y(v), "#333333").set("stroke-dasharray", "4 2"));
    }
    if let (Some(h), Some(m)) = (d.high_level, l.high_margin) {
        g = g.add(bracket(x + BAND_W + 112.0, y(h), y(l.vih), m, "high"));
    }
    if let (Some(v), Some(m)) = (d.low_level, l.low_margin) {
        g = g.add(bracket(x + BAND_W + 112.0, y(v), y(l.vil), m, "low"));
    }
    if let (Some(lim), Some(t)) = (l.input_limit, d.top_level) {
        if t > lim {
            g = g
                .add(
                    line(x - 6.0, y(lim), x + BAND_W + 6.0, y(lim), SHORT)
                        .set("stroke-width", 2)
                        .set("stroke-dasharray", "6 3"),
                )
                .add(
                    text(
                        x + BAND_W + 10.0,
                        y(lim) - 4.0,
                        &format!(
                            "input limit {}: over by {:.2} V OVER",
                            format_volts(lim),
                            t - lim
                        ),
                    )
                    .set("fill", SHORT)
                    .set("font-weight", "bold"),
                );
        }
    }
    let n = l.pins.len();
    let who = if n <= 3 {
        l.pins.join(", ")
    } else {
        format!("{}, {} and {} more", l.pins[0], l.pins[1], n - 2)
    };
    let base = TOP + PLOT_H;
    g.add(
        text(
            x,
            base + 18.0,
            &format!(
                "load {} ({} input{})",
                l.family,
                n,
                if n == 1 { "" } else { "s" }
            ),
        )
        .set("font-weight", "bold"),
    )
    .add(text(x, base + 32.0, &who))
    .add(text(
        x,
        base + 46.0,
        &l.vcc.map_or("supply unknown".to_string(), |v| {
            format!("at {}", format_volts(v))
        }),
    ))
}

/// The level chart of one driver and the load families it feeds.
pub fn level_chart(net: &str, d: &DriverView) -> Document {
    let vmax = axis_max(d);
    let y = move |v: f64| TOP + PLOT_H * (1.0 - (v / vmax).clamp(0.0, 1.0));
    let cols = 1 + d.loads.len();
    let width = (LEFT + COL_W * cols as f64).max(660.0);
    let height = TOP + PLOT_H + BOTTOM;
    let fam = d.family.as_deref().unwrap_or("unknown family");
    let summary = format!(
        "levels on {net}: driver {} ({fam}) {}; {}",
        d.pin,
        [
            d.low_level.map(|v| format!("VOL max {}", format_volts(v))),
            d.high_level.map(|v| format!("VOH min {}", format_volts(v)))
        ]
        .into_iter()
        .flatten()
        .collect::<Vec<_>>()
        .join(", "),
        d.loads
            .iter()
            .map(|l| format!(
                "{} VIL {} VIH {} high {} low {}",
                l.family,
                format_volts(l.vil),
                format_volts(l.vih),
                l.high_margin.map_or("-".into(), margin_text),
                l.low_margin.map_or("-".into(), margin_text)
            ))
            .collect::<Vec<_>>()
            .join("; ")
    );
    let mut doc = Document::new()
        .set("viewBox", (0, 0, width as i64, height as i64))
        .set("width", width as i64)
        .set("height", height as i64)
        .set("role", "img")
        .set("class", "level-chart")
        .set("font-family", "sans-serif")
        .set("font-size", 11)
        .add(Title::new(sanitize(&summary).into_owned()))
        .add(Rectangle::new().set("x", 0).set("y", 0).set("width", width).set("height", height).set("fill", "#ffffff"))
        .add(text(LEFT, 18.0, &format!("{net}: {} ({fam}) and its loads", d.pin)).set("font-size", 13).set("font-weight", "bold"))
        .add(text(LEFT, 33.0, "guaranteed bands on one voltage axis; brackets mark the margin (green, ok) or shortfall (red, SHORT)").set("fill", "#444444"));

    // axis
    let mut axis = Group::new().set("class", "axis").add(line(
        LEFT - 8.0,
        y(0.0),
        LEFT - 8.0,
        y(vmax),
        "#333333",
    ));
    let step = if vmax > 10.0 { 2.0 } else { 1.0 };
    let mut v = 0.0;
    while v <= vmax + 1e-9 {
        axis = axis
            .add(line(LEFT - 12.0, y(v), LEFT - 8.0, y(v), "#333333"))
            .add(line(LEFT - 8.0, y(v), width - 20.0, y(v), "#e4e4e4"))
            .add(text(LEFT - 44.0, y(v) + 4.0, &format!("{v:.0} V")));
        v += step;
    }
    doc = doc.add(axis);

    // driver column
    let x = LEFT;
    let mut g = Group::new().set("class", "driver");
    let vcc = d.vcc.unwrap_or(vmax);
    match d.low_level {
        Some(vol) => {
            g = g
                .add(rect(x, y(0.0), y(vol), BAND_W, OUT_FILL, OUT_STROKE))
                .add(text(
                    x + BAND_W + 4.0,
                    y(vol) - 4.0,
                    &format!("VOL max {}", format_volts(vol)),
                ));
        }
        None => match d.rated_low {
            Some((v, a)) => {
                g = g
                    .add(
                        rect(x, y(0.0), y(v), BAND_W, "none", SHORT).set("stroke-dasharray", "4 3"),
                    )
                    .add(
                        text(
                            x + BAND_W + 4.0,
                            y(v) - 16.0,
                            &format!(
                                "VOL max {} holds only to {}:",
                                format_volts(v),
                                format_amps(a)
                            ),
                        )
                        .set("fill", SHORT),
                    )
                    .add(
                        text(
                            x + BAND_W + 4.0,
                            y(v) - 4.0,
                            "no low guaranteed at this load",
                        )
                        .set("fill", SHORT)
                        .set("font-weight", "bold"),
                    );
            }
            None => g = g.add(text(x + 4.0, y(0.3), "no guaranteed low").set("fill", SHORT)),
        },
    }
    let high_top = if d.role == PinRole::OpenCollector {
        d.pull_up.map_or(vcc, |p| p.1)
    } else {
        vcc
    };
    match d.high_level {
        Some(voh) => {
            let label = if d.role == PinRole::OpenCollector {
                format!("high (pull-up) {}", format_volts(voh))
            } else {
                format!("VOH min {}", format_volts(voh))
            };
            g = g
                .add(rect(
                    x,
                    y(voh),
                    y(high_top.max(voh)),
                    BAND_W,
                    OUT_FILL,
                    OUT_STROKE,
                ))
                .add(text(x + BAND_W + 4.0, y(voh) + 12.0, &label));
            g = g.add(
                line(x, y(voh), width - 20.0, y(voh), OUT_STROKE).set("stroke-dasharray", "2 3"),
            );
        }
        None => match d.rated_high {
            Some((v, a)) => {
                g = g
                    .add(
                        rect(x, y(v), y(high_top.max(v)), BAND_W, "none", SHORT)
                            .set("stroke-dasharray", "4 3"),
                    )
                    .add(
                        text(
                            x + BAND_W + 4.0,
                            y(v) + 12.0,
                            &format!(
                                "VOH min {} holds only to {}:",
                                format_volts(v),
                                format_amps(a)
                            ),
                        )
                        .set("fill", SHORT),
                    )
                    .add(
                        text(
                            x + BAND_W + 4.0,
                            y(v) + 24.0,
                            "no high guaranteed at this load",
                        )
                        .set("fill", SHORT)
                        .set("font-weight", "bold"),
                    );
            }
            None => {
                let why = if d.role == PinRole::OpenCollector {
                    "no high: open collector, no pull-up"
                } else {
                    "no guaranteed high"
                };
                g = g.add(text(x + 4.0, y(vcc * 0.8), why).set("fill", SHORT));
            }
        },
    }
    if let Some(vol) = d.low_level {
        g = g.add(line(x, y(vol), width - 20.0, y(vol), OUT_STROKE).set("stroke-dasharray", "2 3"));
    }
    if let Some(v) = d.vcc {
        g = g
            .add(line(x, y(v), x + BAND_W, y(v), "#333333").set("stroke-dasharray", "4 2"))
            .add(text(
                x + BAND_W + 4.0,
                y(v) + 4.0,
                &format!("supply {}", format_volts(v)),
            ));
    }
    let base = TOP + PLOT_H;
    g = g
        .add(text(x, base + 18.0, &format!("driver {}", d.pin)).set("font-weight", "bold"))
        .add(text(x, base + 32.0, &format!("{fam}, {}", d.role)))
        .add(text(
            x,
            base + 46.0,
            &d.vcc.map_or("supply unknown".to_string(), |v| {
                format!(
                    "at {}{}",
                    format_volts(v),
                    if d.supply_known { "" } else { " (nominal)" }
                )
            }),
        ));
    doc = doc.add(g);

    for (i, l) in d.loads.iter().enumerate() {
        let x = LEFT + COL_W * (i + 1) as f64;
        doc = doc.add(load_column(Group::new().set("class", "load"), x, &y, d, l));
    }
    doc
}

/// The fan-out bars of one driver: each state's current against its rating, with the
/// derating line. `None` when the driver has no budget (no family data).
pub fn fanout_chart(net: &str, d: &DriverView, derating: f64) -> Option<Document> {
    let states: Vec<(&str, super::Usage)> = [("low (sink)", d.low), ("high (source)", d.high)]
        .into_iter()
        .filter_map(|(n, u)| u.map(|u| (n, u)))
        .collect();
    if states.is_empty() {
        return None;
    }
    const CAP: f64 = 3.0;
    let scale_max = states
        .iter()
        .map(|(_, u)| u.ratio)
        .fold(1.25_f64, f64::max)
        .min(CAP);
    let (x0, bar_w) = (120.0, 360.0);
    let row_h = 34.0;
    let width = x0 + bar_w + 340.0;
    let height = 50.0 + row_h * states.len() as f64 + 24.0;
    let xr = |r: f64| x0 + bar_w * (r.min(scale_max) / scale_max);
    let summary = format!(
        "fan-out of {} on {net}: {}",
        d.pin,
        states
            .iter()
            .map(|(n, u)| format!(
                "{n} {} of {} ({:.0}%)",
                format_amps(u.total),
                format_amps(u.rating),
                u.ratio * 100.0
            ))
            .collect::<Vec<_>>()
            .join(", ")
    );
    let mut doc = Document::new()
        .set("viewBox", (0, 0, width as i64, height as i64))
        .set("width", width as i64)
        .set("height", height as i64)
        .set("role", "img")
        .set("class", "fanout-chart")
        .set("font-family", "sans-serif")
        .set("font-size", 11)
        .add(Title::new(sanitize(&summary).into_owned()))
        .add(
            Rectangle::new()
                .set("x", 0)
                .set("y", 0)
                .set("width", width)
                .set("height", height)
                .set("fill", "#ffffff"),
        )
        .add(
            text(
                8.0,
                18.0,
                &format!(
                    "fan-out of {} on {net}: current used against the rating",
                    d.pin
                ),
            )
            .set("font-size", 13)
            .set("font-weight", "bold"),
        );
    let y0 = 34.0;
    for (i, (name, u)) in states.iter().enumerate() {
        let y = y0 + row_h * i as f64;
        let (colour, mark) = if u.ratio > 1.0 {
            (SHORT, "OVER")
        } else if u.ratio > derating {
            (AMBER, "ABOVE DERATING")
        } else {
            (OK, "ok")
        };
        doc = doc
            .add(text(8.0, y + 16.0, name))
            .add(
                Rectangle::new()
                    .set("x", x0)
                    .set("y", y + 4.0)
                    .set("width", bar_w)
                    .set("height", 18)
                    .set("fill", "#f2f2f2")
                    .set("stroke", "#bbbbbb"),
            )
            .add(
                Rectangle::new()
                    .set("x", x0)
                    .set("y", y + 4.0)
                    .set("width", (xr(u.ratio) - x0).max(1.0))
                    .set("height", 18)
                    .set("fill", colour)
                    .set("class", "bar"),
            );
        let cut = if u.ratio > CAP {
            format!(" (bar cut at {:.0}%)", CAP * 100.0)
        } else {
            String::new()
        };
        doc = doc.add(
            text(
                x0 + bar_w + 8.0,
                y + 17.0,
                &format!(
                    "{} of {} ({:.0}%) {mark}{cut}",
                    format_amps(u.total),
                    format_amps(u.rating),
                    u.ratio * 100.0
                ),
            )
            .set("fill", colour)
            .set("font-weight", "bold"),
        );
    }
    let bottom = y0 + row_h * states.len() as f64;
    doc = doc
        .add(line(xr(1.0), y0, xr(1.0), bottom, "#000000").set("stroke-width", 2))
        .add(text(xr(1.0) - 20.0, bottom + 14.0, "rating 100%"))
        .add(line(xr(derating), y0, xr(derating), bottom, "#000000").set("stroke-dasharray", "5 3"))
        .add(text(
            xr(derating) - 70.0,
            bottom + 14.0,
            &format!("derating {:.0}%", derating * 100.0),
        ));
    Some(doc)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::{LoadGroup, Usage};

    fn driver() -> DriverView {
        DriverView {
            pin: "U1.2".into(),
            describe: String::new(),
            role: PinRole::PushPull,
            family: Some("74LS".into()),
            vcc: Some(5.0),
            supply_known: true,
            low_level: Some(0.5),
            high_level: Some(2.7),
            low: Some(Usage {
                total: 0.010,
                rating: 0.008,
                ratio: 1.25,
                items: 25,
            }),
            high: Some(Usage {
                total: 0.0005,
                rating: 0.0004,
                ratio: 1.25,
                items: 25,
            }),
            pull_up: None,
            top_level: Some(3.4),
            rated_low: Some((0.5, 0.008)),
            rated_high: Some((2.7, 0.0004)),
            loads: vec![LoadGroup {
                family: "74HC<script>".into(),
                pins: vec!["U2.1".into()],
                vcc: Some(5.0),
                vih: 3.5,
                vil: 1.35,
                high_margin: Some(-0.8),
                low_margin: Some(0.85),
                input_limit: Some(5.5),
            }],
        }
    }

    #[test]
    fn level_chart_marks_the_shortfall_and_escapes_text() {
        let s = level_chart("/A&B", &driver()).to_string();
        assert!(s.contains("high short 0.80 V SHORT"), "{s}");
        assert!(s.contains("low +0.85 V ok"), "{s}");
        assert!(s.contains("VIH min 3.50 V"));
        assert!(s.contains("74HC&lt;script&gt;"));
        assert!(!s.contains("<script>"));
        assert!(s.contains("/A&amp;B"));
        assert!(
            !s.contains("holds only to"),
            "levels are known: no rated-row note"
        );
        let mut d = driver();
        d.low_level = None;
        let s = level_chart("/N", &d).to_string();
        assert!(s.contains("VOL max 0.50 V holds only to 8.00 mA:"), "{s}");
        assert!(
            !s.contains("low +0.85 V ok"),
            "no low-margin bracket without a low level"
        );
    }

    #[test]
    fn fanout_bars_show_the_numbers_and_the_derating() {
        let s = fanout_chart("/N", &driver(), 0.8)
            .expect("has a budget")
            .to_string();
        assert!(s.contains("10.00 mA of 8.00 mA (125%) OVER"), "{s}");
        assert!(s.contains("0.50 mA of 0.40 mA (125%) OVER"), "{s}");
        assert!(s.contains("derating 80%"));
        let mut d = driver();
        d.low = None;
        d.high = None;
        assert!(fanout_chart("/N", &d, 0.8).is_none());
    }

    #[test]
    fn margins_are_signed() {
        assert_eq!(margin_text(0.7), "+0.70 V");
        assert_eq!(margin_text(-0.8), "short 0.80 V");
    }
}
