//! A table with an entry for every part, where most parts share their entry with others (a
//! part's supply, its family's figures, its pin roles: a board repeats a few kinds of part
//! on the same rails). Each distinct entry is kept once and each part holds a `u32` index
//! into them, read by part as a plain list is (`table[comp]`, `table.iter()`).

use std::hash::Hash;
use std::ops::Index;

use rustc_hash::FxHashMap;

/// Every part's entry, each distinct one kept once.
#[derive(Debug, Clone)]
pub struct PerPart<T> {
    distinct: Vec<T>,
    /// Each part's index into `distinct`.
    of: Vec<u32>,
}

impl<T> Default for PerPart<T> {
    fn default() -> Self {
        PerPart {
            distinct: Vec::new(),
            of: Vec::new(),
        }
    }
}

impl<T> PerPart<T> {
    /// How many parts the table holds.
    pub fn len(&self) -> usize {
        self.of.len()
    }

    pub fn is_empty(&self) -> bool {
        self.of.is_empty()
    }

    /// Every part's entry, in part order.
    pub fn iter(&self) -> impl Iterator<Item = &T> + '_ {
        self.of.iter().map(|&i| &self.distinct[i as usize])
    }

    /// How many distinct entries the table keeps.
    pub fn distinct(&self) -> usize {
        self.distinct.len()
    }
}

impl<T> Index<usize> for PerPart<T> {
    type Output = T;
    #[inline]
    fn index(&self, comp: usize) -> &T {
        &self.distinct[self.of[comp] as usize]
    }
}

/// Fills a [`PerPart`] part by part: an entry is told by its key, and a part whose key was
/// seen before shares that entry.
pub struct PerPartBuilder<T, K> {
    table: PerPart<T>,
    seen: FxHashMap<K, u32>,
    /// The last few distinct keys seen and their entries, looked at before the map: a board
    /// repeats a few kinds of part in turn (a cell of a gate, a resistor and a capacitor).
    recent: [Option<(K, u32)>; RECENT],
    /// Where the next key seen goes in `recent`.
    next_recent: usize,
}

/// How many keys [`PerPartBuilder::recent`] holds.
const RECENT: usize = 4;

impl<T, K: Hash + Eq + Copy> PerPartBuilder<T, K> {
    /// A builder for `parts` parts.
    pub fn with_capacity(parts: usize) -> Self {
        PerPartBuilder {
            table: PerPart {
                distinct: Vec::new(),
                of: Vec::with_capacity(parts),
            },
            seen: FxHashMap::default(),
            recent: [None; RECENT],
            next_recent: 0,
        }
    }

    /// The next part's entry, told by `key`: `make` makes it when no part before had it.
    #[inline]
    pub fn push(&mut self, key: K, make: impl FnOnce() -> T) {
        let known = self
            .recent
            .iter()
            .flatten()
            .find(|(k, _)| *k == key)
            .map(|&(_, i)| i);
        let i = match known {
            Some(i) => i,
            None => {
                let next = u32::try_from(self.table.distinct.len()).expect("fewer than 2^32 parts");
                let i = *self.seen.entry(key).or_insert(next);
                if i == next {
                    self.table.distinct.push(make());
                }
                self.recent[self.next_recent] = Some((key, i));
                self.next_recent = (self.next_recent + 1) % RECENT;
                i
            }
        };
        self.table.of.push(i);
    }

    pub fn finish(mut self) -> PerPart<T> {
        self.table.distinct.shrink_to_fit();
        self.table
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Read by part, the table gives each part the entry pushed for it, whichever part
    /// first made it; alike entries are kept once.
    #[test]
    fn parts_read_back_their_entries_kept_once() {
        let keys = [3u8, 3, 1, 3, 2, 1, 1, 2];
        let mut b = PerPartBuilder::with_capacity(keys.len());
        let mut made = 0;
        for &k in &keys {
            b.push(k, || {
                made += 1;
                format!("entry {k}")
            });
        }
        let t = b.finish();
        assert_eq!(made, 3);
        assert_eq!(t.distinct(), 3);
        assert_eq!(t.len(), keys.len());
        for (ci, &k) in keys.iter().enumerate() {
            assert_eq!(t[ci], format!("entry {k}"));
        }
        let all: Vec<&String> = t.iter().collect();
        assert_eq!(all.len(), keys.len());
        assert_eq!(all[4], "entry 2");
        assert!(std::ptr::eq(&t[0], &t[3]));
    }
}
