//! Net ties: a net-tie part (KiCad's `NetTie_2`, `NetTie_3` ...) is a deliberate short between
//! nets that are kept apart in the schematic (a ground star point, a kludge between two named
//! signals). Electrically its nets are one: the model joins them into the first of them, so a
//! driver on one side is seen by the loads on the other.

use super::{Component, Connection, Netlist};

/// True when the part is a net tie, by its symbol, value or footprint.
pub fn is_net_tie(c: &Component<'_>) -> bool {
    let starts = |s: &str| s.trim().to_ascii_lowercase().starts_with("nettie");
    c.libsource
        .as_ref()
        .and_then(|l| l.part.as_ref())
        .is_some_and(|p| starts(p.as_str()))
        || starts(c.value_str())
        || c.footprint
            .as_ref()
            .is_some_and(|f| f.as_str().rsplit(':').next().is_some_and(starts))
}

fn find(parent: &mut [usize], mut x: usize) -> usize {
    while parent[x] != x {
        parent[x] = parent[parent[x]];
        x = parent[x];
    }
    x
}

/// Joins the nets of every net tie. The joined net keeps the first net's name; the names of
/// the others still find it (`net_by_name`). Emptied nets stay, with no nodes.
pub fn join_net_ties(nl: &mut Netlist<'_>) {
    let mut parent: Vec<usize> = (0..nl.nets.len()).collect();
    let mut any = false;
    for c in &nl.components {
        if !is_net_tie(c) {
            continue;
        }
        let nets: Vec<usize> = c.pins.iter().filter_map(|p| p.connection.net()).collect();
        for w in nets.windows(2) {
            let (a, b) = (find(&mut parent, w[0]), find(&mut parent, w[1]));
            if a != b {
                parent[a.max(b)] = a.min(b);
                any = true;
            }
        }
    }
    if !any {
        return;
    }
    // each group is kept under its best name, whatever the order of the file: a name the
    // author gave before an automatic one, then the first in text order
    let n = nl.nets.len();
    let auto = |name: &str| {
        let l = name.to_ascii_lowercase();
        name.is_empty() || l.starts_with("net-(") || l.starts_with("unconnected-")
    };
    let mut best: Vec<usize> = (0..n).collect();
    for i in 0..n {
        let r = find(&mut parent, i);
        let (a, b) = (nl.nets[i].name.as_str(), nl.nets[best[r]].name.as_str());
        if (auto(a), a) < (auto(b), b) {
            best[r] = i;
        }
    }
    for i in 0..n {
        let r = find(&mut parent, i);
        let b = best[r];
        parent[i] = b;
        parent[b] = b;
    }
    // move the nodes: each kept net's own, then those of the nets joined into it in net
    // order; remember where each moved net's nodes start in its new net
    let mut moved_to: Vec<Option<(usize, usize)>> = vec![None; n];
    let mut joined: Vec<Vec<usize>> = vec![Vec::new(); n];
    let mut count: Vec<usize> = nl.nets.iter().map(|net| net.node_count()).collect();
    for i in 0..n {
        let r = find(&mut parent, i);
        if r == i {
            continue;
        }
        moved_to[i] = Some((r, count[r]));
        count[r] += count[i];
        count[i] = 0;
        joined[r].push(i);
        nl.name_finds(i, r);
    }
    let old = std::mem::take(&mut nl.nodes);
    let mut nodes = Vec::with_capacity(old.len());
    let ranges: Vec<std::ops::Range<usize>> = nl.nets.iter().map(|net| net.range()).collect();
    for r in 0..n {
        if moved_to[r].is_some() {
            nl.nets[r].set_nodes(nodes.len(), 0);
            continue;
        }
        let start = nodes.len();
        for &i in std::iter::once(&r).chain(&joined[r]) {
            nodes.extend(old[ranges[i].clone()].iter().cloned());
        }
        nl.nets[r].set_nodes(start, nodes.len() - start);
    }
    drop(old);
    nl.nodes = nodes;
    let nets = &nl.nets;
    for c in &mut nl.components {
        for p in &mut c.pins {
            let (net, node) = match p.connection {
                Connection::Net { net, node } | Connection::Alone { net, node } => {
                    (net as usize, node as usize)
                }
                Connection::Absent => continue,
            };
            let (net, node) = match moved_to[net] {
                Some((r, base)) => (r, node + base),
                None => (net, node),
            };
            let (net, node) = (net as u32, node as u32);
            p.connection = if nets[net as usize].node_count() > 1 {
                Connection::Net { net, node }
            } else {
                Connection::Alone { net, node }
            };
        }
    }
}
