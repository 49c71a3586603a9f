//! LED displays (seven-segment digits, bar graphs with a common): which pins are the
//! commons, which are the segments, which way the LEDs point, and whether the commons reach
//! anything at all. The LED paths (`follow_to_ground` in `mod.rs`) pass through a display
//! from a segment to its common; `display-common-open` reads `Circuit::displays`.

use crate::classify::classifier::{display_common_name, display_evidence, Classified};
use crate::classify::classifier::{DisplayEvidence, PartKind};
use crate::netlist::{Connection, Netlist};

/// One LED display on the board.
#[derive(Debug, Clone)]
pub struct Display {
    pub comp: usize,
    /// True when its value, library part, description or footprint names a display; false
    /// when only its pin names (segments and a common) say so.
    pub named: bool,
    /// Indices of its common pins.
    pub commons: Vec<usize>,
    /// Indices of its segment pins (every named pin that is not a common nor marked unused).
    pub segments: Vec<usize>,
    /// `Some(true)`: common anode; `Some(false)`: common cathode; `None`: not told.
    pub common_anode: Option<bool>,
    /// True when no common pin reaches anything beyond the display itself: unconnected,
    /// no-connect flagged, or tied only to the display's other commons.
    pub commons_open: bool,
    /// The forward voltage its value or description names by colour (red 1.7 V ...).
    pub vf: Option<f64>,
}

impl Display {
    pub fn is_segment(&self, pin: usize) -> bool {
        self.segments.contains(&pin)
    }
}

/// A pin that a display's symbol marks as not used.
fn unused_pin_name(n: &str) -> bool {
    matches!(
        n.trim().to_ascii_uppercase().as_str(),
        "NC" | "N.C." | "N/C" | "DNC" | "~" | ""
    )
}

/// Every LED display of the board.
pub fn find(nl: &Netlist<'_>, cl: &Classified) -> Vec<Display> {
    let mut out = Vec::new();
    for (ci, c) in nl.components.iter().enumerate() {
        if cl.parts[ci].kind != PartKind::Display {
            continue;
        }
        let evidence = display_evidence(nl, c);
        let mut commons = Vec::new();
        let mut segments = Vec::new();
        let mut by_pins: Option<bool> = None;
        for (pi, p) in c.pins.iter().enumerate() {
            let Some(name) = p.name(nl) else {
                continue;
            };
            match display_common_name(name) {
                Some(side) => {
                    commons.push(pi);
                    by_pins = by_pins.or(side);
                }
                None if !unused_pin_name(name) => segments.push(pi),
                None => {}
            }
        }
        if commons.is_empty() {
            continue;
        }
        let text = format!(
            "{} {} {}",
            c.value_str(),
            c.libsource
                .as_ref()
                .and_then(|l| l.part.as_ref())
                .map_or("", |p| p.as_str()),
            c.libsource
                .as_ref()
                .and_then(|l| l.description.as_ref())
                .map_or("", |p| p.as_str()),
        )
        .to_ascii_lowercase();
        let by_text = if text.contains("common anode") || text.contains("common-anode") {
            Some(true)
        } else if text.contains("common cathode") || text.contains("common-cathode") {
            Some(false)
        } else {
            None
        };
        let common_nets: Vec<Option<usize>> = commons
            .iter()
            .map(|&pi| match c.pins[pi].connection {
                Connection::Net { net, .. } => Some(net as usize),
                _ => None,
            })
            .collect();
        let commons_open = common_nets.iter().all(|n| match n {
            None => true,
            Some(net) => nl.nets[*net]
                .nodes(nl)
                .iter()
                .all(|node| node.component() == Some(ci as u32)),
        });
        let vf = super::led_vf_by_colour(&text);
        out.push(Display {
            comp: ci,
            named: cl.parts[ci].entry.is_some() || evidence == Some(DisplayEvidence::Named),
            commons,
            segments,
            common_anode: by_pins.or(by_text),
            commons_open,
            vf,
        });
    }
    out
}
