//! Helpers the checks share: finding floating inputs grouped by gate, formatting.

use super::Context;
use crate::circuit::Circuit;
use crate::circuit::PinRef;
use crate::classify::PinRole;
use crate::diag::{DiagList, PinList, PinListWriter, RawShared, Severity, SharedId, Text};
use crate::netlist::Connection;

/// Why an input floats.
#[derive(Debug, Clone)]
pub enum Float {
    /// On no net at all (its gate unit was never placed, or it is absent from the netlist).
    Absent,
    /// Placed, but wired to nothing (a one-node net).
    Alone(usize),
    /// On a net with nothing that sets a level: the other pins are inputs or passives.
    Undriven(usize),
    /// On a net held only through one switch or jumper element: it floats when that is open.
    SwitchOpen(usize, Vec<crate::circuit::SwitchLink>),
}

/// One floating input.
#[derive(Debug, Clone)]
pub struct Floating {
    pub at: PinRef,
    pub why: Float,
}

/// A whole gate whose inputs all float and whose outputs go nowhere.
#[derive(Debug, Clone, Copy)]
pub struct UnusedGate<'n, 'g> {
    pub comp: usize,
    /// The unit's name in the function table (`A`, `B` ...).
    pub unit: &'n str,
    /// Every input of the unit, in pin order.
    pub inputs: &'g [Floating],
    /// Every output of the unit, in pin order.
    pub outputs: &'g [PinRef],
}

/// One part's unused gates as [`floating_inputs`] gathers them, whose pins are kept in two
/// lists for all of them; reused from part to part, so the check phase never holds a board's
/// gates at once (a board can have one on every part).
#[derive(Debug, Default)]
struct FloatingInputs<'n> {
    gate_inputs: Vec<Floating>,
    gate_outputs: Vec<PinRef>,
    /// (part, unit, end of its inputs, end of its outputs): each gate's pins follow the
    /// previous gate's.
    gates: Vec<(usize, &'n str, usize, usize)>,
}

impl<'n> FloatingInputs<'n> {
    /// The unused gates, in the order found.
    fn gates(&self) -> impl Iterator<Item = UnusedGate<'n, '_>> + '_ {
        let mut from = (0, 0);
        self.gates.iter().map(move |&(comp, unit, ins, outs)| {
            let g = UnusedGate {
                comp,
                unit,
                inputs: &self.gate_inputs[from.0..ins],
                outputs: &self.gate_outputs[from.1..outs],
            };
            from = (ins, outs);
            g
        })
    }

    fn clear(&mut self) {
        self.gate_inputs.clear();
        self.gate_outputs.clear();
        self.gates.clear();
    }
}

/// Why an input on `connection` floats, or `None` when something sets its level in every
/// position of the switches: on no net, alone on a net that is not a rail, or on a net with no
/// source (or one only a switch gives).
pub fn floats(cx: &crate::circuit::Circuit<'_, '_>, connection: Connection) -> Option<Float> {
    match connection {
        Connection::Absent => Some(Float::Absent),
        Connection::Alone { net, .. } if cx.nets[net as usize].rail().is_none() => {
            Some(Float::Alone(net as usize))
        }
        Connection::Net { net, .. } => {
            let net = net as usize;
            let nm = &cx.nets[net];
            if nm.has_source() {
                None
            } else if nm.floats_open().is_empty() {
                Some(Float::Undriven(net))
            } else {
                Some(Float::SwitchOpen(net, nm.floats_open().to_vec()))
            }
        }
        _ => None,
    }
}

fn is_logic_input(role: PinRole) -> bool {
    matches!(role, PinRole::Input | PinRole::SchmittInput)
}

/// Floating logic inputs of classified parts whose family has TTL inputs (`ttl` true) or
/// CMOS inputs (`ttl` false), with the whole unused gates gathered up: each unused gate is
/// handed to `on_gate` as its part is read (in part order, then unit-name order), and the
/// single inputs are returned (each part's inputs outside a unit first among its singles).
pub fn floating_inputs<'n>(
    ctx: &Context<'_, 'n, '_>,
    ttl: bool,
    mut on_gate: impl FnMut(UnusedGate<'n, '_>),
) -> Vec<Floating> {
    let cx = ctx.cx;
    let cl: &'n crate::classify::classifier::Classified = cx.cl;
    let mut singles = Vec::new();
    // the part's unused gates, handed on once the part is read: reused
    let mut out = FloatingInputs::default();
    // one part's floating inputs by unit (none first), each unit's in pin order: reused
    let mut found: Vec<(Option<&'n str>, Floating)> = Vec::new();
    for (ci, c) in cx.nl.components.iter().enumerate() {
        let part = &cl.parts[ci];
        let Some(fam) = cx.family(ci).filter(|_| part.is_logic()) else {
            continue;
        };
        if fam.is_cmos_input() == ttl {
            continue;
        }
        let roles = &cx.roles[ci];
        found.clear();
        for (pi, p) in c.pins.iter().enumerate() {
            // a no-connect flag silences the schematic editor; it does not tie the pin
            if !is_logic_input(roles[pi]) {
                continue;
            }
            // a control input that must be held at one level is `open-control-input`'s
            // (`Circuit::idle_level`)
            if part.idle_high[pi].is_some() {
                continue;
            }
            let Some(why) = floats(cx, p.connection) else {
                continue;
            };
            let f = Floating {
                at: PinRef::new(ci, pi),
                why,
            };
            found.push((part.units[pi].as_deref(), f));
        }
        if found.is_empty() {
            continue;
        }
        // stable: pin order within a unit (a part's inputs mostly come unit by unit already)
        if !found.is_sorted_by(|a, b| !unit_after(a.0, b.0)) {
            found.sort_by(|a, b| a.0.cmp(&b.0));
        }
        let mut i = 0;
        while i < found.len() {
            let unit = found[i].0;
            let mut j = i + 1;
            while j < found.len() && same_unit(found[j].0, unit) {
                j += 1;
            }
            let group = found[i..j].iter().map(|(_, f)| f.clone());
            let Some(unit) = unit else {
                singles.extend(group);
                i = j;
                continue;
            };
            // every input of the unit floats, and its outputs reach nothing
            let mut unit_inputs = 0;
            let mut outputs_unused = true;
            let outputs_from = out.gate_outputs.len();
            for k in 0..c.pins.len() {
                if !same_unit(part.units[k].as_deref(), Some(unit)) {
                    continue;
                }
                if is_logic_input(roles[k]) {
                    unit_inputs += 1;
                }
                if roles[k].is_output() {
                    outputs_unused &= c.pins[k].connection.is_unconnected();
                    out.gate_outputs.push(PinRef::new(ci, k));
                }
            }
            if j - i == unit_inputs && unit_inputs > 0 && outputs_unused {
                out.gate_inputs.extend(group);
                out.gates
                    .push((ci, unit, out.gate_inputs.len(), out.gate_outputs.len()));
            } else {
                out.gate_outputs.truncate(outputs_from);
                singles.extend(group);
            }
            i = j;
        }
        for g in out.gates() {
            on_gate(g);
        }
        out.clear();
    }
    singles
}

/// Whether two units' names are the same. A part's units are shared texts, so the same name
/// is mostly the same text, and different ones mostly differ in their first letter: the
/// bytes are compared only when neither tells.
#[inline]
fn same_unit(a: Option<&str>, b: Option<&str>) -> bool {
    match (a, b) {
        (Some(a), Some(b)) => {
            std::ptr::eq(a, b)
                || (a.len() == b.len() && a.as_bytes().first() == b.as_bytes().first() && a == b)
        }
        (a, b) => a.is_none() && b.is_none(),
    }
}

/// Whether unit `a` sorts after unit `b` (no unit first, then by name).
#[inline]
fn unit_after(a: Option<&str>, b: Option<&str>) -> bool {
    !same_unit(a, b) && a > b
}

/// What the words of an unused gate's finding follow from, beside its part's reference and
/// value: the part's pin table (its pins' numbers, table names and units, and its family:
/// one table is shared by every part alike), its roles as wired, the unit, the rails its fix
/// names and whether the inputs are on no net. Parts alike give the same key, so a check makes
/// those words once per key, not once per part.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct GateKey<'n> {
    table: *const crate::classify::classifier::PinTable,
    roles: *const [PinRole],
    family: Option<&'n str>,
    unit: &'n str,
    supply: Option<usize>,
    ground: Option<usize>,
    absent: bool,
    value: &'n str,
}

impl<'n> GateKey<'n> {
    pub fn of(ctx: &Context<'_, 'n, '_>, g: &UnusedGate<'n, '_>) -> GateKey<'n> {
        let cx = ctx.cx;
        let cl: &'n crate::classify::classifier::Classified = cx.cl;
        let part = &cl.parts[g.comp];
        GateKey {
            table: std::sync::Arc::as_ptr(&part.pins),
            roles: std::sync::Arc::as_ptr(&cx.roles[g.comp]),
            family: part.family.as_deref(),
            unit: g.unit,
            supply: supply_rail(ctx, g.comp),
            ground: ground_rail(ctx, g.comp),
            absent: g.inputs.iter().all(|f| matches!(f.why, Float::Absent)),
            value: cx.nl.components[g.comp].value_str(),
        }
    }
}

/// Words made once per key and shared by every finding that is given them (one text for
/// all the parts of a kind).
pub struct Words<K, V>(rustc_hash::FxHashMap<K, V>);

impl<K: std::hash::Hash + Eq, V> Words<K, V> {
    pub fn new() -> Words<K, V> {
        Words(Default::default())
    }

    /// The words for `key`, made by `make` the first time it is asked.
    pub fn get(&mut self, key: K, make: impl FnOnce() -> V) -> &V {
        self.0.entry(key).or_insert_with(make)
    }
}

/// The words of an unused gate's finding that parts alike share, each shared once in the
/// findings list and given to every finding by number: the code, the message before the
/// part's reference and after it, the help, and the places' words.
pub struct GateWords {
    code: SharedId,
    head: SharedId,
    tail: SharedId,
    help: SharedId,
    first: SharedId,
    other: SharedId,
}

impl GateWords {
    /// The words for `g` reported under `code` in `out`: "gate B of {reference} (74HC00) is
    /// unused and {tail}", and `help`.
    pub fn new(
        out: &mut DiagList,
        cx: &Circuit<'_, '_>,
        g: &UnusedGate<'_, '_>,
        code: &'static str,
        tail: &str,
        help: String,
    ) -> GateWords {
        let c = &cx.nl.components[g.comp];
        GateWords {
            code: out.share_id(&Text::Fixed(code)),
            head: out.share_id(&concat(&["gate ", g.unit, " of "]).into()),
            tail: out.share_id(&concat(&[" (", c.value_str(), ") is unused and ", tail]).into()),
            help: out.share_id(&help.into()),
            first: out.share_id(&Text::Fixed("unused gate")),
            other: out.share_id(&Text::Fixed("")),
        }
    }
}

/// The finding for an unused gate whose inputs float: "gate B of U1 (74HC00) is unused and
/// {tail}", at its first floating input (labelled "unused gate"), its other inputs beside it,
/// its pins listed, with the words the caller made for parts alike ([`GateWords`], of the
/// same key, shared in `out`: its reference is the finding's only words of its own).
pub fn push_unused_gate(
    out: &mut DiagList,
    cx: &Circuit<'_, '_>,
    g: &UnusedGate<'_, '_>,
    severity: Severity,
    words: &GateWords,
) {
    let c = &cx.nl.components[g.comp];
    let reference = c.reference.as_str();
    out.push_shared(
        RawShared {
            code: words.code,
            severity,
            head: Some(words.head),
            own: reference,
            tail: Some(words.tail),
            help: Some(words.help),
            net: None,
        },
        g.inputs
            .iter()
            .map(|f| [reference, ".", c.pins[f.at.pin()].num(cx.nl)]),
        // one place per input: the first input's, then the others beside it
        g.inputs.iter().enumerate().map(|(i, f)| {
            let text = if i == 0 { words.first } else { words.other };
            (cx.pin_span(f.at), text, i == 0)
        }),
    );
}

/// The pins' names (`U4.6`, as [`Circuit::pin_name`] writes them) as a finding's pin list,
/// written straight into one text of its length: no text per pin.
pub fn pin_names<I>(cx: &Circuit<'_, '_>, pins: I) -> PinList
where
    I: IntoIterator<Item = PinRef>,
    I::IntoIter: Clone,
{
    let pins = pins.into_iter();
    let name = |p: PinRef| {
        let c = &cx.nl.components[p.comp()];
        (c.reference.as_str(), c.pins[p.pin()].num(cx.nl))
    };
    // each name, a `.`, and a separator between each two
    let len: usize = pins
        .clone()
        .map(|p| {
            let (r, n) = name(p);
            r.len() + n.len() + 2
        })
        .sum();
    let mut w = PinListWriter::with_capacity(len.saturating_sub(1));
    for p in pins {
        push_pin_name(w.next_pin(), cx, p);
    }
    w.finish()
}

/// Adds a pin's name (`U4.6`, as [`Circuit::pin_name`] writes it) to the end of `s`.
pub fn push_pin_name(s: &mut String, cx: &Circuit<'_, '_>, p: PinRef) {
    let c = &cx.nl.components[p.comp()];
    push_all(s, &[c.reference.as_str(), ".", c.pins[p.pin()].num(cx.nl)]);
}

/// A net's display name, as [`Circuit::net_name`] gives it, borrowed from the netlist when
/// the net is named (no text made for a net a check only looks at).
pub fn net_name_of<'n>(cx: &'n Circuit<'_, '_>, net: usize) -> std::borrow::Cow<'n, str> {
    let name = cx.nl.nets[net].name.as_str();
    if name.is_empty() {
        cx.net_name(net).into()
    } else {
        name.into()
    }
}

/// Adds the pieces to the end of `s`.
pub fn push_all(s: &mut String, pieces: &[&str]) {
    s.reserve(pieces.iter().map(|p| p.len()).sum());
    for p in pieces {
        s.push_str(p);
    }
}

/// Writes the items into `s` as `a`, `a and b`, `a, b and c` (each by `item`), straight into
/// the text: no text per item.
pub fn write_and<T>(s: &mut String, items: &[T], mut item: impl FnMut(&mut String, &T)) {
    let n = items.len();
    for (i, x) in items.iter().enumerate() {
        if i > 0 {
            s.push_str(if i + 1 == n { " and " } else { ", " });
        }
        item(s, x);
    }
}

/// The pieces joined into one string allocated to its length (a finding holds its words to
/// the end of the run).
pub fn concat(pieces: &[&str]) -> String {
    let mut s = String::with_capacity(pieces.iter().map(|p| p.len()).sum());
    for p in pieces {
        s.push_str(p);
    }
    s
}

/// `pins 12 (4A) and 13 (4B)`
pub fn pin_list(ctx: &Context<'_, '_, '_>, pins: &[PinRef]) -> String {
    let cx = ctx.cx;
    numbered_list(pins.iter().map(|p| {
        (
            cx.nl.components[p.comp()].pins[p.pin()].num(cx.nl),
            cx.cl.parts[p.comp()].table_names[p.pin()].as_deref(),
        )
    }))
}

/// [`pin_list`]'s text from (number, function-table name) pairs, written into one string.
fn numbered_list<'p>(pins: impl ExactSizeIterator<Item = (&'p str, Option<&'p str>)>) -> String {
    use std::fmt::Write;
    let n = pins.len();
    let mut s = String::from(if n == 1 { "pin " } else { "pins " });
    for (i, (num, name)) in pins.enumerate() {
        if i > 0 {
            s.push_str(if i + 1 == n { " and " } else { ", " });
        }
        s.push_str(num);
        if let Some(name) = name {
            let _ = write!(s, " ({name})");
        }
    }
    s
}

/// The net of the positive rail a part's supply pin sits on, when its voltage is known.
pub fn supply_rail(ctx: &Context<'_, '_, '_>, comp: usize) -> Option<usize> {
    ctx.cx.supplies[comp]
        .as_ref()
        .and_then(|s| s.supply_net().filter(|_| s.known))
}

/// The positive rail a part's supply pin sits on, by name, for fix messages.
pub fn supply_rail_name(ctx: &Context<'_, '_, '_>, comp: usize) -> String {
    supply_rail(ctx, comp)
        .map(|n| ctx.cx.net_name(n))
        .unwrap_or_else(|| "the supply".into())
}

/// The net of the ground rail a part's ground pin sits on.
pub fn ground_rail(ctx: &Context<'_, '_, '_>, comp: usize) -> Option<usize> {
    let cx = ctx.cx;
    cx.supplies[comp]
        .as_ref()
        .and_then(|s| s.ground_net())
        .filter(|&n| cx.nets[n].rail().is_some())
}

/// The ground rail a part's ground pin sits on, by name.
pub fn ground_rail_name(ctx: &Context<'_, '_, '_>, comp: usize) -> String {
    ground_rail(ctx, comp)
        .map(|n| ctx.cx.net_name(n))
        .unwrap_or_else(|| "GND".into())
}

/// `one` for a single item, `many` otherwise: `pin 13 is`, `pins 12 and 13 are`.
pub fn agree(n: usize, one: &'static str, many: &'static str) -> &'static str {
    if n == 1 {
        one
    } else {
        many
    }
}

/// Percentage with no decimals.
pub fn pct(x: f64) -> String {
    let v = (x * 100.0).round();
    // no `-0%` for a figure that rounds to nothing
    format!("{:.0}%", if v == 0.0 { 0.0 } else { v })
}

#[cfg(test)]
mod tests {
    use super::agree;

    /// Units compare as their names do, whether or not they are one text.
    #[test]
    fn units_compare_by_name() {
        use super::{same_unit, unit_after};
        let a = String::from("A");
        let a2 = String::from("A");
        let (b, ab) = (String::from("B"), String::from("AB"));
        let units = [
            None,
            Some(a.as_str()),
            Some(a2.as_str()),
            Some(b.as_str()),
            Some(ab.as_str()),
            Some(""),
        ];
        for x in units {
            for y in units {
                assert_eq!(same_unit(x, y), x == y, "{x:?} {y:?}");
                assert_eq!(unit_after(x, y), x > y, "{x:?} {y:?}");
            }
        }
    }

    /// The list as it was built before (items joined with `, ` and a final ` and `).
    fn joined(items: &[&str]) -> String {
        let j = match items.len() {
            0 => String::new(),
            1 => items[0].to_string(),
            _ => format!(
                "{} and {}",
                items[..items.len() - 1].join(", "),
                items[items.len() - 1]
            ),
        };
        format!("{} {j}", if items.len() == 1 { "pin" } else { "pins" })
    }

    #[test]
    fn pin_lists_read_as_before() {
        let pins = [
            ("12", Some("4A")),
            ("13", None),
            ("1", Some("1A")),
            ("9", Some("3B")),
        ];
        for n in 0..=pins.len() {
            let items: Vec<String> = pins[..n]
                .iter()
                .map(|(num, name)| match name {
                    Some(x) => format!("{num} ({x})"),
                    None => num.to_string(),
                })
                .collect();
            let items: Vec<&str> = items.iter().map(String::as_str).collect();
            assert_eq!(
                super::numbered_list(pins[..n].iter().copied()),
                joined(&items),
                "{n} pins"
            );
        }
        assert_eq!(
            super::numbered_list(pins[..2].iter().copied()),
            "pins 12 (4A) and 13"
        );
    }

    /// Each gate's pins are the run after the previous gate's, in the shared lists.
    #[test]
    fn unused_gates_read_their_own_pins_from_the_shared_lists() {
        use super::{Float, Floating, FloatingInputs, PinRef};
        let pin = |comp, pin| PinRef::new(comp, pin);
        let input = |comp, p| Floating {
            at: pin(comp, p),
            why: Float::Absent,
        };
        let found = FloatingInputs {
            gate_inputs: vec![input(1, 0), input(1, 1), input(2, 4)],
            gate_outputs: vec![pin(1, 2), pin(2, 5), pin(2, 6)],
            gates: vec![(1, "A", 2, 1), (2, "B", 3, 3)],
        };
        let gates: Vec<_> = found.gates().collect();
        assert_eq!(gates.len(), 2);
        assert_eq!((gates[0].comp, gates[0].unit), (1, "A"));
        let ins = |g: &super::UnusedGate<'_, '_>| g.inputs.iter().map(|f| f.at).collect::<Vec<_>>();
        assert_eq!(ins(&gates[0]), [pin(1, 0), pin(1, 1)]);
        assert_eq!(gates[0].outputs, [pin(1, 2)]);
        assert_eq!((gates[1].comp, gates[1].unit), (2, "B"));
        assert_eq!(ins(&gates[1]), [pin(2, 4)]);
        assert_eq!(gates[1].outputs, [pin(2, 5), pin(2, 6)]);
    }

    #[test]
    fn words_are_made_once_per_key() {
        let mut words = super::Words::new();
        let mut made = 0;
        for key in [1, 2, 1, 1, 2, 3] {
            let w = words.get(key, || {
                made += 1;
                (
                    format!("tail {key}"),
                    super::Text::from(format!("help {key}")),
                )
            });
            assert_eq!(
                (w.0.as_str(), &*w.1),
                (&*format!("tail {key}"), &*format!("help {key}"))
            );
        }
        assert_eq!(made, 3);
        // a help handed out twice is one text, not two copies
        let (a, b) = (
            words.get(1, || unreachable!()).1.clone(),
            words.get(1, || unreachable!()).1.clone(),
        );
        match (a, b) {
            (super::Text::Shared(a), super::Text::Shared(b)) => {
                assert!(std::sync::Arc::ptr_eq(&a, &b))
            }
            other => panic!("not shared: {other:?}"),
        }
    }

    #[test]
    fn lists_written_in_place_read_as_joined() {
        let items = ["7 (GND)", "14 (VCC)", "8 (VEE)", "16 (VDD)"];
        for n in 0..=items.len() {
            let want = match n {
                0 => String::new(),
                1 => items[0].to_string(),
                _ => format!("{} and {}", items[..n - 1].join(", "), items[n - 1]),
            };
            let mut s = String::from("x");
            super::write_and(&mut s, &items[..n], |s, i| s.push_str(i));
            assert_eq!(s, format!("x{want}"), "{n} items");
        }
        let mut s = String::new();
        super::push_all(&mut s, &["pin ", "7", " (", "GND", ")"]);
        assert_eq!(s, "pin 7 (GND)");
    }

    #[test]
    fn pieces_join_into_a_string_of_their_length() {
        let s = super::concat(&["gate ", "A", " of ", "U1"]);
        assert_eq!(s, "gate A of U1");
        assert_eq!(s.capacity(), s.len());
        assert_eq!(super::concat(&[]), "");
    }

    #[test]
    fn verbs_agree_with_the_number_of_pins() {
        assert_eq!(agree(1, "is", "are"), "is");
        assert_eq!(agree(2, "is", "are"), "are");
        assert_eq!(agree(1, "floats", "float"), "floats");
    }
}

/// ` (VIH taken at 5.25 V, the top of the rail tolerance)` when a tolerance moved the load's
/// threshold; empty otherwise.
pub fn vih_supply_note(m: &crate::circuit::budget::LoadMargin) -> String {
    m.thresholds_at
        .as_deref()
        .map_or(String::new(), |&(hi, _)| {
            format!(
                " (VIH taken at {}, the top of the rail tolerance)",
                crate::values::format_volts(hi)
            )
        })
}

/// `J1` or `J1 and J3`: the switches a net is held through.
pub fn switch_names(ctx: &Context<'_, '_, '_>, links: &[crate::circuit::SwitchLink]) -> String {
    let mut refs: Vec<&str> = links
        .iter()
        .map(|l| ctx.cx.nl.components[l.part].reference.as_str())
        .collect();
    refs.dedup();
    match refs.len() {
        0 => String::new(),
        1 => refs[0].to_string(),
        n => format!("{} and {}", refs[..n - 1].join(", "), refs[n - 1]),
    }
}

/// The board's rail nets, gathered once per file so that a check asking "which rail should
/// this pin go to" for each finding never scans every net again.
#[derive(Debug, Default)]
pub struct RailIndex {
    /// The first net (in net order) of each distinct rail (ground or not, voltage): every
    /// question asked of the index depends on those two alone, so the first answer among
    /// these is the first among all rail nets, and the list stays as short as the board has
    /// kinds of rail.
    rails: Vec<(usize, crate::circuit::Rail)>,
}

impl RailIndex {
    pub fn new(cx: &crate::circuit::Circuit<'_, '_>) -> RailIndex {
        let mut seen = rustc_hash::FxHashSet::default();
        RailIndex {
            rails: cx
                .nets
                .iter()
                .enumerate()
                .filter_map(|(n, nm)| nm.rail().map(|r| (n, r)))
                .filter(|(_, r)| seen.insert((r.ground, r.volts.map(f64::to_bits))))
                .collect(),
        }
    }

    /// The first rail net (in net order) for which `f` holds.
    pub fn find(
        &self,
        f: impl Fn(&crate::circuit::Rail) -> bool,
    ) -> Option<(usize, crate::circuit::Rail)> {
        self.rails.iter().find(|(_, r)| f(r)).copied()
    }
}
