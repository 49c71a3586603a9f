//! The electrical model of a classified netlist: rails, each part's supply, and for every
//! net its drivers, loads, pull resistors and what else hangs on it. The checks read this;
//! they never go back to the syntax tree.
//!
//! Family figures are taken at each part's own supply (the rail its supply pin sits on); a
//! part whose supply is unknown is taken at its family's nominal supply, and findings say
//! so.

pub mod budget;
pub mod rails;

use std::sync::Arc;

use crate::classify::classifier::{Classified, PartKind, Rules};
use crate::classify::family::{Drive, Family, Levels};
use crate::classify::function::DriveClass;
use crate::classify::PinRole;
use crate::netlist::{Connection, Netlist};
use crate::values::{self, ValueError};

/// Options that change the model.
#[derive(Debug, Clone)]
pub struct ModelOptions {
    /// Rails declared by the user: (net name, volts). Overrides what the name says.
    pub rails: Vec<(String, f64)>,
    /// Rail tolerance as a fraction (0.05 = 5 %): each inequality is checked at its worst end.
    pub rail_tolerance: f64,
    /// Forward voltage assumed for an LED (common practice: 1.7 V for a red LED).
    pub led_vf: f64,
    /// Connectors whose pins are driven by a known family: (reference, family id).
    pub connector_families: Vec<(String, String)>,
}

impl Default for ModelOptions {
    fn default() -> Self {
        ModelOptions {
            rails: Vec::new(),
            rail_tolerance: 0.0,
            led_vf: 1.7,
            connector_families: Vec::new(),
        }
    }
}

/// Why a net is a rail.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RailSource {
    Name,
    PowerOutput,
    User,
}

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Rail {
    /// Nominal voltage; `None` when nothing says it (a `VCC` net with no declaration).
    pub volts: Option<f64>,
    pub ground: bool,
    pub source: RailSource,
}

impl Rail {
    /// The voltage, or 0 for ground.
    pub fn v(&self) -> Option<f64> {
        if self.ground {
            Some(0.0)
        } else {
            self.volts
        }
    }
}

/// A pin, by component and index into its pins.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct PinRef {
    pub comp: usize,
    pub pin: usize,
}

/// A part's supply as the model sees it.
#[derive(Debug, Clone)]
pub struct PartSupply {
    /// The supply voltage the family figures are taken at.
    pub vcc: f64,
    /// True when `vcc` comes from a rail; false when it is the family's nominal supply.
    pub known: bool,
    /// The net of the (first connected) supply pin, and its name.
    pub supply_net: Option<usize>,
    pub ground_net: Option<usize>,
}

/// A driving pin on a net.
#[derive(Debug, Clone)]
pub struct Driver {
    pub at: PinRef,
    pub role: PinRole,
    /// The family's figures at the part's supply, when the part is classified.
    pub levels: Option<Arc<Levels>>,
    pub family: Option<String>,
}

/// A logic input on a net.
#[derive(Debug, Clone)]
pub struct Load {
    pub at: PinRef,
    pub role: PinRole,
    pub levels: Option<Arc<Levels>>,
    pub family: Option<String>,
    /// The highest voltage this input takes at its supply.
    pub input_limit: Option<f64>,
    /// True for TTL (bipolar) inputs that source current when low.
    pub ttl: bool,
}

/// A resistor from this net to a rail.
#[derive(Debug, Clone)]
pub struct Pull {
    pub resistor: usize,
    /// The resistor's pin on this net.
    pub at: PinRef,
    pub rail_net: usize,
    pub rail_volts: f64,
    pub ohms: f64,
    /// True when the rail is above ground (a pull-up).
    pub up: bool,
}

/// A non-logic load found by following resistors and LEDs from a net to ground.
#[derive(Debug, Clone)]
pub struct LedPath {
    /// The first part on the path (on this net).
    pub at: PinRef,
    pub leds: Vec<usize>,
    pub resistors: Vec<usize>,
    pub ohms: f64,
    /// Sum of the LEDs' assumed forward voltages.
    pub vf: f64,
}

/// Everything on one net.
#[derive(Debug, Clone, Default)]
pub struct NetModel {
    pub rail: Option<Rail>,
    pub drivers: Vec<Driver>,
    pub loads: Vec<Load>,
    pub pulls: Vec<Pull>,
    /// Connector pins: the net leaves the board.
    pub connectors: Vec<PinRef>,
    /// Pins whose role no source could tell.
    pub unknown: Vec<PinRef>,
    /// Resistors whose value could not be read.
    pub unreadable: Vec<(usize, ValueError)>,
    /// Capacitors, diodes and other passives not counted above.
    pub passives: Vec<PinRef>,
    pub led_paths: Vec<LedPath>,
    /// Supply and ground pins on this net.
    pub power_pins: Vec<PinRef>,
}

impl NetModel {
    /// True when something on this board or off it can set the net's level.
    pub fn has_source(&self) -> bool {
        // a resistor to a rail whose value cannot be read still holds the net (`unreadable-value`
        // reports it); calling the inputs floating as well would be a cascade
        self.rail.is_some()
            || !self.drivers.is_empty()
            || !self.pulls.is_empty()
            || !self.connectors.is_empty()
            || !self.unreadable.is_empty()
    }
}

/// The classified circuit.
pub struct Circuit<'n, 'a> {
    pub nl: &'n Netlist<'a>,
    pub cl: &'n Classified,
    pub rules: &'n Rules,
    pub opts: ModelOptions,
    pub supplies: Vec<Option<PartSupply>>,
    pub nets: Vec<NetModel>,
}

impl<'n, 'a> Circuit<'n, 'a> {
    pub fn family(&self, comp: usize) -> Option<&'n Family> {
        self.cl.parts[comp]
            .family
            .as_deref()
            .and_then(|f| self.rules.families.get(f))
    }

    pub fn role(&self, p: PinRef) -> PinRole {
        self.cl.parts[p.comp].roles[p.pin]
    }

    /// `U4.6`
    pub fn pin_name(&self, p: PinRef) -> String {
        let c = &self.nl.components[p.comp];
        format!("{}.{}", c.reference, c.pins[p.pin].num)
    }

    /// `U4 pin 6 (74LS04 output 3Y)`
    pub fn describe(&self, p: PinRef) -> String {
        let c = &self.nl.components[p.comp];
        let part = &self.cl.parts[p.comp];
        let pin = &c.pins[p.pin];
        let mut s = format!("{} pin {}", c.reference, pin.num);
        let name = part.table_names[p.pin]
            .clone()
            .or_else(|| pin.name.as_ref().map(|n| n.to_string()))
            .filter(|n| n != "~" && !n.is_empty());
        let what = match part.roles[p.pin] {
            PinRole::Input | PinRole::SchmittInput => "input",
            PinRole::PushPull => "output",
            PinRole::OpenCollector => "open-collector output",
            PinRole::ThreeState => "three-state output",
            PinRole::Bidirectional => "bidirectional pin",
            PinRole::Supply => "supply pin",
            PinRole::Ground => "ground pin",
            _ => "pin",
        };
        let value = c.value_str();
        match name {
            Some(n) => s.push_str(&format!(" ({value} {what} {n})")),
            None => s.push_str(&format!(" ({value} {what})")),
        }
        s
    }

    /// The net's display name (`Net-(U5-Pad4)`, `/CLK`; `#7` when unnamed).
    pub fn net_name(&self, net: usize) -> String {
        let n = &self.nl.nets[net];
        if n.name.s.is_empty() {
            format!(
                "#{}",
                n.code
                    .as_ref()
                    .map_or((net + 1).to_string(), |c| c.s.to_string())
            )
        } else {
            n.name.s.to_string()
        }
    }

    /// The span of a pin's node in the nets section, or the component when it is on no net.
    pub fn pin_span(&self, p: PinRef) -> crate::source::Span {
        let c = &self.nl.components[p.comp];
        match c.pins[p.pin].connection {
            Connection::Net { net, node } | Connection::Alone { net, node } => {
                self.nl.nets[net].nodes[node].span
            }
            Connection::Absent => match (c.libpart, c.pins[p.pin].libpin) {
                (Some(lp), Some(li)) => self.nl.libparts[lp].pins[li].span,
                _ => c.reference.span,
            },
        }
    }

    /// The supply description used in messages: `+5V (5.00 V)` or `5.00 V (the family's
    /// nominal supply: U4's supply pin is on no rail)`.
    pub fn supply_text(&self, comp: usize) -> String {
        match &self.supplies[comp] {
            Some(s) if s.known => {
                let net = s.supply_net.map(|n| self.net_name(n)).unwrap_or_default();
                format!("{net} ({})", values::format_volts(s.vcc))
            }
            Some(s) => format!(
                "{} (the family's nominal supply; the part's supply rail is unknown)",
                values::format_volts(s.vcc)
            ),
            None => "an unknown supply".to_string(),
        }
    }

    /// The worst-case ends of a rail voltage under the configured tolerance.
    pub fn rail_range(&self, v: f64) -> (f64, f64) {
        let t = self.opts.rail_tolerance.abs();
        let (a, b) = (v * (1.0 - t), v * (1.0 + t));
        (a.min(b), a.max(b))
    }
}

fn component_kind_passive(k: PartKind) -> bool {
    matches!(
        k,
        PartKind::Resistor
            | PartKind::ResistorNetwork
            | PartKind::Capacitor
            | PartKind::Led
            | PartKind::Diode
            | PartKind::Connector
            | PartKind::Other
    )
}

/// Builds the electrical model.
pub fn build<'n, 'a>(
    nl: &'n Netlist<'a>,
    cl: &'n Classified,
    rules: &'n Rules,
    opts: ModelOptions,
) -> Circuit<'n, 'a> {
    let n_nets = nl.nets.len();
    // rails: user declarations, names, power outputs
    let mut rail: Vec<Option<Rail>> = vec![None; n_nets];
    for (i, net) in nl.nets.iter().enumerate() {
        if let Some((_, v)) = opts.rails.iter().find(|(n, _)| {
            n == net.name.as_str()
                || n.trim_start_matches('/') == net.name.as_str().trim_start_matches('/')
        }) {
            rail[i] = Some(Rail {
                volts: Some(*v),
                ground: *v == 0.0,
                source: RailSource::User,
            });
            continue;
        }
        match rails::rail_from_name(net.name.as_str()) {
            Some(rails::NameRail::Ground) => {
                rail[i] = Some(Rail {
                    volts: Some(0.0),
                    ground: true,
                    source: RailSource::Name,
                })
            }
            Some(rails::NameRail::Supply(v)) => {
                rail[i] = Some(Rail {
                    volts: v,
                    ground: false,
                    source: RailSource::Name,
                })
            }
            None => {}
        }
    }
    for (ci, c) in nl.components.iter().enumerate() {
        for p in &c.pins {
            if p.ptype == crate::netlist::PinType::PowerOut && !cl.parts[ci].is_logic() {
                if let Connection::Net { net, .. } = p.connection {
                    if rail[net].is_none() {
                        rail[net] = Some(Rail {
                            volts: None,
                            ground: false,
                            source: RailSource::PowerOutput,
                        });
                    }
                }
            }
        }
    }

    // supplies
    let mut supplies = Vec::with_capacity(nl.components.len());
    for (ci, c) in nl.components.iter().enumerate() {
        let part = &cl.parts[ci];
        let fam = part.family.as_deref().and_then(|f| rules.families.get(f));
        let Some(fam) = fam.filter(|_| part.is_logic()) else {
            supplies.push(None);
            continue;
        };
        let mut supply_net = None;
        let mut ground_net = None;
        for (pi, p) in c.pins.iter().enumerate() {
            let Some(net) = p.connection.net() else {
                continue;
            };
            match part.roles[pi] {
                PinRole::Supply if supply_net.is_none() => supply_net = Some(net),
                PinRole::Ground if ground_net.is_none() => ground_net = Some(net),
                _ => {}
            }
        }
        let railv = supply_net
            .and_then(|n| rail[n])
            .and_then(|r| r.v())
            .filter(|v| *v > 0.0);
        // thresholds are taken against 0 V: a ground pin on a rail other than 0 V is the
        // business of `power-pin-miswired`, and a 4051's VEE is an analogue supply
        let (vcc, known) = match railv {
            Some(v) => (v, true),
            None => (fam.supply_nominal, false),
        };
        supplies.push(Some(PartSupply {
            vcc,
            known,
            supply_net,
            ground_net,
        }));
    }

    let levels_of = |ci: usize| -> Option<Arc<Levels>> {
        let part = &cl.parts[ci];
        let fam = part.family.as_deref().and_then(|f| rules.families.get(f))?;
        let s = supplies[ci].as_ref()?;
        let drive = match part
            .function
            .as_ref()
            .and_then(|(sr, id)| rules.functions.get(*sr, id))
            .map(|f| f.drive)
        {
            Some(DriveClass::Buffer) => Drive::Buffer,
            _ => Drive::Standard,
        };
        Some(Arc::new(fam.levels(s.vcc, drive)))
    };
    // one `Levels` per part, shared by all its pins
    let mut level_cache: Vec<Option<Option<Arc<Levels>>>> = vec![None; nl.components.len()];
    let mut levels = |ci: usize| -> Option<Arc<Levels>> {
        if level_cache[ci].is_none() {
            level_cache[ci] = Some(levels_of(ci));
        }
        level_cache[ci].clone().flatten()
    };

    let mut nets: Vec<NetModel> = (0..n_nets)
        .map(|i| NetModel {
            rail: rail[i],
            ..Default::default()
        })
        .collect();
    for (ci, c) in nl.components.iter().enumerate() {
        let part = &cl.parts[ci];
        for (pi, p) in c.pins.iter().enumerate() {
            let Connection::Net { net, .. } = p.connection else {
                continue;
            };
            let at = PinRef { comp: ci, pin: pi };
            let role = part.roles[pi];
            let nm = &mut nets[net];
            match part.kind {
                PartKind::Connector => {
                    nm.connectors.push(at);
                    let reference = c.reference.as_str();
                    if let Some((_, fam)) =
                        opts.connector_families.iter().find(|(r, _)| r == reference)
                    {
                        if let Some(f) = rules.families.get(fam) {
                            nm.drivers.push(Driver {
                                at,
                                role: PinRole::PushPull,
                                levels: Some(Arc::new(f.levels(f.supply_nominal, Drive::Standard))),
                                family: Some(f.id.clone()),
                            });
                        }
                    }
                    continue;
                }
                PartKind::Resistor
                | PartKind::ResistorNetwork
                | PartKind::Capacitor
                | PartKind::Led
                | PartKind::Diode
                | PartKind::Other => {
                    nm.passives.push(at);
                    continue;
                }
                _ => {}
            }
            let fam = part.family.as_deref().and_then(|f| rules.families.get(f));
            match role {
                PinRole::Input | PinRole::SchmittInput => {
                    let lv = levels(ci);
                    let vcc = supplies[ci].as_ref().map(|s| s.vcc);
                    nm.loads.push(Load {
                        at,
                        role,
                        input_limit: fam.zip(vcc).map(|(f, v)| f.input_limit_v(v)),
                        ttl: fam.is_some_and(|f| !f.is_cmos_input()),
                        levels: lv,
                        family: part.family.clone(),
                    });
                }
                PinRole::PushPull
                | PinRole::OpenCollector
                | PinRole::OpenEmitter
                | PinRole::ThreeState
                | PinRole::PulledUpIo => {
                    nm.drivers.push(Driver {
                        at,
                        role,
                        levels: levels(ci),
                        family: part.family.clone(),
                    });
                }
                PinRole::Bidirectional => {
                    let lv = levels(ci);
                    let vcc = supplies[ci].as_ref().map(|s| s.vcc);
                    nm.drivers.push(Driver {
                        at,
                        role,
                        levels: lv.clone(),
                        family: part.family.clone(),
                    });
                    nm.loads.push(Load {
                        at,
                        role,
                        input_limit: fam.zip(vcc).map(|(f, v)| f.input_limit_v(v)),
                        ttl: fam.is_some_and(|f| !f.is_cmos_input()),
                        levels: lv,
                        family: part.family.clone(),
                    });
                }
                PinRole::Supply | PinRole::Ground => nm.power_pins.push(at),
                PinRole::Unknown => nm.unknown.push(at),
                PinRole::Analog | PinRole::Passive | PinRole::NoConnect => nm.passives.push(at),
            }
        }
    }

    // resistors to rails: pulls
    for (ci, c) in nl.components.iter().enumerate() {
        let part = &cl.parts[ci];
        if !matches!(part.kind, PartKind::Resistor | PartKind::ResistorNetwork) {
            continue;
        }
        // a rail net may hold nothing but this resistor (a `-5V` label with one pull-down): its
        // one-node net still counts when it is a rail
        let pin_nets: Vec<(usize, usize)> = c
            .pins
            .iter()
            .enumerate()
            .filter_map(|(pi, p)| match p.connection {
                Connection::Net { net, .. } => Some((pi, net)),
                Connection::Alone { net, .. } if rail[net].is_some() => Some((pi, net)),
                _ => None,
            })
            .collect();
        let (ohms, err) = if part.kind == PartKind::Resistor {
            match values::parse_resistance(c.value_str()) {
                Ok(r) => (Some(r.ohms), None),
                Err(e) => (None, Some(e)),
            }
        } else {
            match values::parse_network(c.value_str()) {
                Ok(r) => (Some(r.ohms), None),
                Err(e) => (None, Some(e)),
            }
        };
        // element pairs: a two-pin resistor; a bussed network (one pin on a rail) as one
        // element per other pin; an isolated network as pins i and N+1-i
        let mut elements: Vec<((usize, usize), (usize, usize))> = Vec::new();
        if part.kind == PartKind::Resistor || c.pins.len() == 2 {
            if pin_nets.len() == 2 {
                elements.push((pin_nets[0], pin_nets[1]));
            }
        } else {
            let on_rail: Vec<&(usize, usize)> = pin_nets
                .iter()
                .filter(|(_, n)| rail[*n].is_some())
                .collect();
            if on_rail.len() == 1 {
                let common = *on_rail[0];
                for &pn in &pin_nets {
                    if pn != common {
                        elements.push((pn, common));
                    }
                }
            } else {
                let n = c.pins.len();
                for &(pi, net) in &pin_nets {
                    let mate = n - 1 - pi;
                    if pi < mate {
                        if let Some(&m) = pin_nets.iter().find(|(q, _)| *q == mate) {
                            elements.push(((pi, net), m));
                        }
                    }
                }
            }
        }
        for ((pa, na), (pb, nb)) in elements {
            for ((p_here, n_here), n_other) in [((pa, na), nb), ((pb, nb), na)] {
                if n_here == n_other || rail[n_here].is_some() {
                    continue;
                }
                let Some(r) = rail[n_other] else { continue };
                let at = PinRef {
                    comp: ci,
                    pin: p_here,
                };
                match (ohms, &err) {
                    (Some(o), _) => {
                        if let Some(v) = r.v() {
                            nets[n_here].pulls.push(Pull {
                                resistor: ci,
                                at,
                                rail_net: n_other,
                                rail_volts: v,
                                ohms: o,
                                up: v > 0.0,
                            });
                        }
                    }
                    (None, Some(e)) => nets[n_here].unreadable.push((ci, e.clone())),
                    _ => {}
                }
            }
        }
    }

    // LED paths: net -> (R | LED)* -> ground, at most four parts deep
    for net in 0..n_nets {
        if nets[net].drivers.is_empty() {
            continue;
        }
        let mut found = Vec::new();
        for &start in &nets[net].passives {
            let kind = cl.parts[start.comp].kind;
            if !matches!(kind, PartKind::Resistor | PartKind::Led) {
                continue;
            }
            if let Some(path) = follow_to_ground(nl, cl, &rail, start, opts.led_vf) {
                if !path.leds.is_empty() {
                    found.push(path);
                }
            }
        }
        nets[net].led_paths = found;
    }

    Circuit {
        nl,
        cl,
        rules,
        opts,
        supplies,
        nets,
    }
}

/// Follows two-pin resistors and LEDs in series from `start` to a ground rail.
fn follow_to_ground(
    nl: &Netlist<'_>,
    cl: &Classified,
    rail: &[Option<Rail>],
    start: PinRef,
    vf: f64,
) -> Option<LedPath> {
    let mut leds = Vec::new();
    let mut resistors = Vec::new();
    let mut ohms = 0.0;
    let mut cur = start;
    for _ in 0..4 {
        let c = &nl.components[cur.comp];
        if c.pins.len() != 2 {
            return None;
        }
        let kind = cl.parts[cur.comp].kind;
        match kind {
            PartKind::Resistor => {
                ohms += values::parse_resistance(c.value_str()).ok()?.ohms;
                resistors.push(cur.comp);
            }
            PartKind::Led => leds.push(cur.comp),
            _ => return None,
        }
        let other = 1 - cur.pin;
        let net = c.pins[other].connection.net()?;
        if let Some(r) = rail[net] {
            let vf = vf * leds.len() as f64;
            return r.ground.then_some(LedPath {
                at: start,
                leds,
                resistors,
                ohms,
                vf,
            });
        }
        // the next part: exactly one other passive on a two-node net
        let nodes = &nl.nets[net].nodes;
        if nodes.len() != 2 {
            return None;
        }
        let next = nodes.iter().find(|n| n.component != Some(cur.comp))?;
        let ci = next.component?;
        let pi = nl.components[ci]
            .pins
            .iter()
            .position(|p| p.num == next.pin.s)?;
        if component_kind_passive(cl.parts[ci].kind) {
            cur = PinRef { comp: ci, pin: pi };
        } else {
            return None;
        }
    }
    None
}
