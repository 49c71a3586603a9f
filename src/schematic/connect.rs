//! Connectivity inside one use of a sheet: every item's connection points (wire and bus
//! ends, junctions, no-connect flags, label anchors, placed pins, sheet pins, bus entries)
//! go into a point map, and items meeting at a point are joined (a union-find). Wires and
//! buses never join each other directly; a bus entry ties a wire to the bus it lands on
//! (anywhere along it) without joining their nets. Each joined group is a *piece*: a net
//! piece or a bus piece, with the labels, pins and sheet pins that name it.

use rustc_hash::FxHashMap as HashMap;

use super::bus;
use super::sheet::{LabelKind, Pt, Segment, Sheet};

/// A union-find with path halving and union by size.
#[derive(Debug, Clone, Default)]
pub struct Dsu {
    parent: Vec<u32>,
    size: Vec<u32>,
}

impl Dsu {
    pub fn new(n: usize) -> Dsu {
        Dsu {
            parent: (0..n as u32).collect(),
            size: vec![1; n],
        }
    }
    pub fn add(&mut self) -> usize {
        self.parent.push(self.parent.len() as u32);
        self.size.push(1);
        self.parent.len() - 1
    }
    pub fn len(&self) -> usize {
        self.parent.len()
    }
    pub fn is_empty(&self) -> bool {
        self.parent.is_empty()
    }
    pub fn find(&mut self, mut x: usize) -> usize {
        while self.parent[x] as usize != x {
            let p = self.parent[x] as usize;
            self.parent[x] = self.parent[p];
            x = self.parent[x] as usize;
        }
        x
    }
    pub fn union(&mut self, a: usize, b: usize) -> usize {
        let (mut a, mut b) = (self.find(a), self.find(b));
        if a == b {
            return a;
        }
        if self.size[a] < self.size[b] {
            std::mem::swap(&mut a, &mut b);
        }
        self.parent[b] = a as u32;
        self.size[a] += self.size[b];
        a
    }
}

/// A pin of a placed symbol in one use of the sheet: the symbol's index in the sheet and
/// the library pin's index in its library symbol.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct PinAt {
    pub symbol: usize,
    pub libpin: usize,
    pub at: Pt,
}

/// One joined group of items in one use of a sheet.
#[derive(Debug, Clone, Default)]
pub struct Piece {
    pub is_bus: bool,
    /// Indices into the sheet's labels.
    pub labels: Vec<usize>,
    /// Indices into the placed pins of this use.
    pub pins: Vec<usize>,
    /// (sub-sheet index, pin index).
    pub sheet_pins: Vec<(usize, usize)>,
    pub no_connect: bool,
    /// For a net piece: the bus pieces its bus entries land on.
    pub buses: Vec<usize>,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Item {
    Wire(usize),
    Bus(usize),
    Junction,
    NoConnect,
    Label(usize, bool),
    Pin(usize),
    SheetPin(usize, usize, bool),
    Entry(usize),
}

/// True when `p` lies on the segment (ends included), for axis-aligned and diagonal
/// segments alike.
pub fn on_segment(s: &Segment, p: Pt) -> bool {
    let (ax, ay) = s.a;
    let (bx, by) = s.b;
    let cross = (bx - ax) as i128 * (p.1 - ay) as i128 - (by - ay) as i128 * (p.0 - ax) as i128;
    cross == 0 && p.0 >= ax.min(bx) && p.0 <= ax.max(bx) && p.1 >= ay.min(by) && p.1 <= ay.max(by)
}

/// Joins each label that lies inside a wire (or bus) to it.
fn join_along(sheet: &Sheet<'_>, items: &[Item], at: &[(Pt, u32)], dsu: &mut Dsu) {
    // axis-aligned segments by their line, the rest checked one by one
    let mut horiz: HashMap<i64, Vec<(i64, i64, usize)>> = HashMap::default();
    let mut vert: HashMap<i64, Vec<(i64, i64, usize)>> = HashMap::default();
    let mut other: Vec<usize> = Vec::new();
    let first_bus = sheet.wires.len();
    for (i, s) in sheet.wires.iter().chain(sheet.buses.iter()).enumerate() {
        if s.a.1 == s.b.1 {
            horiz
                .entry(s.a.1)
                .or_default()
                .push((s.a.0.min(s.b.0), s.a.0.max(s.b.0), i));
        } else if s.a.0 == s.b.0 {
            vert.entry(s.a.0)
                .or_default()
                .push((s.a.1.min(s.b.1), s.a.1.max(s.b.1), i));
        } else {
            other.push(i);
        }
    }
    let seg = |i: usize| {
        if i < first_bus {
            &sheet.wires[i]
        } else {
            &sheet.buses[i - first_bus]
        }
    };
    for group in points(at) {
        let p = &group[0].0;
        // a label at the end of a wire or bus joins that one only
        if group
            .iter()
            .any(|&(_, i)| matches!(items[i as usize], Item::Wire(_) | Item::Bus(_)))
        {
            continue;
        }
        for &(_, id) in group {
            let Item::Label(_, is_bus) = items[id as usize] else {
                continue;
            };
            let wanted = |i: usize| (i >= first_bus) == is_bus;
            let mut hits: Vec<usize> = Vec::new();
            if let Some(v) = horiz.get(&p.1) {
                hits.extend(v.iter().filter(|s| s.0 < p.0 && p.0 < s.1).map(|s| s.2));
            }
            if let Some(v) = vert.get(&p.0) {
                hits.extend(v.iter().filter(|s| s.0 < p.1 && p.1 < s.1).map(|s| s.2));
            }
            hits.extend(other.iter().copied().filter(|&i| on_segment(seg(i), *p)));
            for i in hits.into_iter().filter(|&i| wanted(i)) {
                // wires and buses are the first items, in this order
                dsu.union(id as usize, i);
            }
        }
    }
}

/// The runs of pairs at one point, of pairs sorted by point.
fn points(at: &[(Pt, u32)]) -> impl Iterator<Item = &[(Pt, u32)]> {
    at.chunk_by(|a, b| a.0 == b.0)
}

/// Joins the items of one use of `sheet`, whose placed pins are `pins`.
pub fn pieces(sheet: &Sheet<'_>, pins: &[PinAt]) -> Vec<Piece> {
    let segments = sheet.wires.len() + sheet.buses.len() + sheet.entries.len();
    let sheet_pins: usize = sheet.sheets.iter().map(|s| s.pins.len()).sum();
    let count = segments
        + sheet.junctions.len()
        + sheet.no_connects.len()
        + sheet.labels.len()
        + pins.len()
        + sheet_pins;
    let mut items: Vec<Item> = Vec::with_capacity(count);
    // every (point, item) pair, grouped by point once all are in
    let mut at: Vec<(Pt, u32)> = Vec::with_capacity(count + segments);
    let mut put = |items: &mut Vec<Item>, it: Item, p: Pt| {
        let id = items.len() as u32;
        items.push(it);
        at.push((p, id));
        id
    };
    // an item with two points goes in once and is found from both
    let mut second: Vec<(Pt, u32)> = Vec::with_capacity(segments);
    for (i, w) in sheet.wires.iter().enumerate() {
        let id = put(&mut items, Item::Wire(i), w.a);
        second.push((w.b, id));
    }
    for (i, w) in sheet.buses.iter().enumerate() {
        let id = put(&mut items, Item::Bus(i), w.a);
        second.push((w.b, id));
    }
    // a bus entry joins nets only at its end that is not on a bus: the end on the bus links
    // it to that bus, and a wire that happens to end there is not joined to it
    let on_bus = |p: Pt| sheet.buses.iter().any(|b| on_segment(b, p));
    for (i, e) in sheet.entries.iter().enumerate() {
        let ends: Vec<Pt> = [e.a, e.b].into_iter().filter(|&p| !on_bus(p)).collect();
        match ends.as_slice() {
            [] => {
                // both ends on buses: present at neither point
                items.push(Item::Entry(i));
            }
            [one] => {
                put(&mut items, Item::Entry(i), *one);
            }
            _ => {
                let id = put(&mut items, Item::Entry(i), e.a);
                second.push((e.b, id));
            }
        }
    }
    for &p in &sheet.junctions {
        put(&mut items, Item::Junction, p);
    }
    for &p in &sheet.no_connects {
        put(&mut items, Item::NoConnect, p);
    }
    for (i, l) in sheet.labels.iter().enumerate() {
        put(&mut items, Item::Label(i, bus::is_bus(&l.text)), l.at);
    }
    for (i, p) in pins.iter().enumerate() {
        put(&mut items, Item::Pin(i), p.at);
    }
    for (si, s) in sheet.sheets.iter().enumerate() {
        for (pi, p) in s.pins.iter().enumerate() {
            put(
                &mut items,
                Item::SheetPin(si, pi, bus::is_bus(&p.text)),
                p.at,
            );
        }
    }
    at.extend(second);
    // which items meet at a point is all that is read from a group: neither the order of
    // the groups nor the order within one changes the pieces (each piece lists its items
    // in item order below)
    at.sort_unstable_by_key(|e| e.0);

    let mut dsu = Dsu::new(items.len());
    // a label lands anywhere along a wire or bus, not only at its ends
    join_along(sheet, &items, &at, &mut dsu);
    for ids in points(&at) {
        let has_wire = ids
            .iter()
            .any(|&(_, i)| matches!(items[i as usize], Item::Wire(_)));
        let has_bus = ids
            .iter()
            .any(|&(_, i)| matches!(items[i as usize], Item::Bus(_)));
        let mut net_first: Option<usize> = None;
        let mut bus_first: Option<usize> = None;
        for &(_, i) in ids {
            let i = i as usize;
            let to_bus = match items[i] {
                Item::Bus(_) => true,
                Item::Label(_, b) | Item::SheetPin(_, _, b) => b,
                Item::Junction => has_bus && !has_wire,
                _ => false,
            };
            let first = if to_bus {
                &mut bus_first
            } else {
                &mut net_first
            };
            match *first {
                None => *first = Some(i),
                Some(f) => {
                    dsu.union(f, i);
                }
            }
        }
    }

    // group into pieces
    // the piece of each group, by its root item
    let mut piece_of: Vec<usize> = vec![usize::MAX; items.len()];
    let mut out: Vec<Piece> = Vec::new();
    let mut piece_index: Vec<usize> = vec![usize::MAX; items.len()];
    for i in 0..items.len() {
        let r = dsu.find(i);
        if piece_of[r] == usize::MAX {
            piece_of[r] = out.len();
            out.push(Piece::default());
        }
        let pi = piece_of[r];
        piece_index[i] = pi;
        let p = &mut out[pi];
        match items[i] {
            Item::Bus(_) => p.is_bus = true,
            Item::Label(l, b) => {
                p.labels.push(l);
                p.is_bus |= b;
            }
            Item::Pin(k) => p.pins.push(k),
            Item::SheetPin(s, k, b) => {
                p.sheet_pins.push((s, k));
                p.is_bus |= b;
            }
            Item::NoConnect => p.no_connect = true,
            _ => {}
        }
    }
    // bus entries: the bus pieces each entry's ends land on
    if !sheet.entries.is_empty() && !sheet.buses.is_empty() {
        let first_bus = sheet.wires.len();
        let first_entry = first_bus + sheet.buses.len();
        for (ei, e) in sheet.entries.iter().enumerate() {
            let net_piece = piece_index[first_entry + ei];
            for end in [e.a, e.b] {
                for (bi, b) in sheet.buses.iter().enumerate() {
                    if on_segment(b, end) {
                        let bp = piece_index[first_bus + bi];
                        if bp != net_piece && !out[net_piece].buses.contains(&bp) {
                            out[net_piece].buses.push(bp);
                        }
                    }
                }
            }
        }
    }
    let _ = LabelKind::Local;
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn points_on_segments() {
        let s = Segment {
            a: (0, 0),
            b: (100, 0),
        };
        assert!(on_segment(&s, (50, 0)));
        assert!(on_segment(&s, (100, 0)));
        assert!(!on_segment(&s, (101, 0)));
        assert!(!on_segment(&s, (50, 1)));
        let d = Segment {
            a: (0, 0),
            b: (10, 10),
        };
        assert!(on_segment(&d, (5, 5)));
        assert!(!on_segment(&d, (5, 4)));
    }

    #[test]
    fn union_find_joins_and_finds() {
        let mut d = Dsu::new(4);
        d.union(0, 1);
        d.union(2, 3);
        assert_eq!(d.find(1), d.find(0));
        assert_ne!(d.find(1), d.find(2));
        d.union(1, 3);
        assert_eq!(d.find(0), d.find(2));
    }
}
