//! Naming nets as KiCad names them. Each piece of a net has candidate names, each with a
//! strength; the piece takes its strongest (ties: the lowest name, a name with a pad number
//! after one without); across the hierarchy a chain of pieces takes the best of its pieces'
//! names, preferring global names, then strong names (labels) over weak ones (pins, sheet
//! pins), then higher strength, then the shallower sheet, then the lower name.

/// How strongly an item names the net it is on (KiCad's order).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Strength {
    Pin = 1,
    SheetPin = 2,
    HierLabel = 3,
    LocalLabel = 4,
    Power = 5,
    Global = 6,
}

impl Strength {
    /// Labels and stronger: a name the user gave.
    pub fn is_strong(self) -> bool {
        self >= Strength::HierLabel
    }
}

/// One candidate name of a piece.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Candidate {
    pub strength: Strength,
    pub name: String,
    /// A pin of a power symbol (preferred over a hidden power pin of another part).
    pub power_symbol: bool,
    /// A sheet pin whose shape is an output (preferred among sheet pins).
    pub output: bool,
}

/// `a` is a better name than `b` for the same piece.
fn better(a: &Candidate, b: &Candidate) -> bool {
    if a.strength != b.strength {
        return a.strength > b.strength;
    }
    if a.strength == Strength::Power && a.power_symbol != b.power_symbol {
        return a.power_symbol;
    }
    if a.strength == Strength::SheetPin && a.output != b.output {
        return a.output;
    }
    let (la, lb) = (a.name.contains("-Pad"), b.name.contains("-Pad"));
    if la != lb {
        return lb;
    }
    a.name < b.name
}

/// The name a piece takes from its candidates.
pub fn best(cands: &[Candidate]) -> Option<&Candidate> {
    best_at(cands.iter()).map(|i| &cands[i])
}

/// Where [`best`] is among candidates given in order.
pub fn best_at<'c>(mut it: impl Iterator<Item = &'c Candidate>) -> Option<usize> {
    let mut b = it.next()?;
    let mut at = 0;
    for (i, c) in it.enumerate() {
        if better(c, b) {
            b = c;
            at = i + 1;
        }
    }
    Some(at)
}

/// A piece's chosen name in a chain across the hierarchy, with its sheet depth.
#[derive(Debug, Clone)]
pub struct Chosen<'c> {
    pub cand: &'c Candidate,
    pub depth: usize,
}

/// The name a chain of pieces joined through sheet pins takes: starting from the topmost
/// piece, a later piece's name wins when it is global or power, when it is strong and the
/// best so far is weak, when it is strong and stronger, when it is as strong and strong and
/// on a shallower sheet, or when it is as strong, as strong-or-weak, no deeper, and lower.
pub fn chain<'c>(pieces: &[Chosen<'c>]) -> Option<&'c Candidate> {
    let start = pieces.iter().min_by_key(|p| p.depth)?;
    let mut best = start;
    if best.cand.strength >= Strength::Power {
        // the top is global: nothing below overrides it, except a stronger global
        for p in pieces {
            if p.cand.strength > best.cand.strength
                || (p.cand.strength == best.cand.strength && p.cand.name < best.cand.name)
            {
                best = p;
            }
        }
        return Some(best.cand);
    }
    for p in pieces {
        if std::ptr::eq(p, start) {
            continue;
        }
        let (ps, bs) = (p.cand.strength, best.cand.strength);
        let strong = ps.is_strong();
        let best_strong = bs.is_strong();
        let shorter = p.depth < best.depth;
        let as_good = p.depth <= best.depth;
        if ps >= Strength::Power
            || (!best_strong && strong)
            || (ps > bs && strong)
            || (ps == bs && strong && shorter)
            || (best_strong == strong && as_good && ps == bs && p.cand.name < best.cand.name)
        {
            best = p;
        }
    }
    Some(best.cand)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn c(strength: Strength, name: &str) -> Candidate {
        Candidate {
            strength,
            name: name.into(),
            power_symbol: false,
            output: false,
        }
    }

    #[test]
    fn a_piece_takes_its_strongest_then_lowest_name() {
        let v = vec![
            c(Strength::LocalLabel, "/B"),
            c(Strength::LocalLabel, "/A"),
            c(Strength::Pin, "Net-(R1-Pad1)"),
        ];
        assert_eq!(best(&v).unwrap().name, "/A");
        let v = vec![c(Strength::Global, "VCC"), c(Strength::LocalLabel, "/A")];
        assert_eq!(best(&v).unwrap().name, "VCC");
        // a pin name without a pad number beats one with
        let v = vec![
            c(Strength::Pin, "Net-(R1-Pad1)"),
            c(Strength::Pin, "Net-(U1-CLK)"),
        ];
        assert_eq!(best(&v).unwrap().name, "Net-(U1-CLK)");
    }

    #[test]
    fn across_sheets_a_label_beats_a_sheet_pin_and_the_top_wins_ties() {
        let top = c(Strength::SheetPin, "/X");
        let child = c(Strength::HierLabel, "/sub/X");
        let v = vec![
            Chosen {
                cand: &top,
                depth: 0,
            },
            Chosen {
                cand: &child,
                depth: 1,
            },
        ];
        assert_eq!(chain(&v).unwrap().name, "/sub/X");
        let top = c(Strength::LocalLabel, "/Z");
        let child = c(Strength::LocalLabel, "/sub/A");
        let v = vec![
            Chosen {
                cand: &top,
                depth: 0,
            },
            Chosen {
                cand: &child,
                depth: 1,
            },
        ];
        assert_eq!(chain(&v).unwrap().name, "/Z");
    }
}
