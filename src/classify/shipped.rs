//! The shipped tables as the binary loads them: `build.rs` reads `rules/*.toml` at compile
//! time with the same code the project files are read with at run time (`parse_shipped`),
//! checks them, and writes each table in postcard's compact binary form to `OUT_DIR`; start-up
//! decodes those bytes instead of parsing and validating TOML. The functions and the families
//! are written one by one behind an index and each is decoded only when a run asks for it.
//! `rules/*.toml` stay the source that is edited; a change to them rebuilds the binary.

use std::borrow::Cow;

use super::family::FamilyTable;
use super::function::{FunctionTable, Series};
use super::parts::{EntryKind, EntryText, PartEntry, PartTable};

// FAMILY_INDEX, FUNCTION_IDS, FUNCTION_RANGES and shipped_part_entries(), written by build.rs
include!(concat!(env!("OUT_DIR"), "/shipped_tables.rs"));

/// A text of the shipped part table, borrowed from the binary.
fn t(s: &'static str) -> EntryText {
    EntryText(Cow::Borrowed(s))
}

impl FamilyTable {
    /// The shipped table (`rules/families.toml`, read at compile time): an index of each
    /// family's id and aliases, compiled in as Rust data, and each family decoded the first
    /// time a run asks for it.
    pub fn builtin() -> FamilyTable {
        static BYTES: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/families.postcard"));
        FamilyTable::from_compact(
            FAMILY_INDEX
                .iter()
                .map(|&(id, aliases, a, b)| (id, aliases.to_vec(), &BYTES[a as usize..b as usize])),
        )
    }
}

impl FunctionTable {
    /// The shipped table (`rules/functions.toml`, read at compile time): the ids, sorted per
    /// series, are compiled in as Rust data and looked up where they lie; each function is
    /// decoded the first time a run asks for it.
    pub fn builtin() -> FunctionTable {
        static BYTES: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/functions.postcard"));
        FunctionTable::from_static(FUNCTION_IDS, FUNCTION_RANGES, BYTES)
    }
}

impl PartTable {
    /// The shipped table (`rules/parts.toml`, read at compile time): its entries are built
    /// by code build.rs wrote, their texts borrowed from the binary.
    pub fn builtin() -> PartTable {
        PartTable::from_entries(shipped_part_entries())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The compiled tables are the text's tables: what the binary loads is what a project
    /// file with the same text would give.
    #[test]
    fn compiled_tables_equal_the_tables_read_from_the_text() {
        assert_eq!(
            FamilyTable::builtin(),
            FamilyTable::parse_shipped().unwrap()
        );
        let (a, b) = (
            FunctionTable::builtin(),
            FunctionTable::parse_shipped().unwrap(),
        );
        assert_eq!(
            format!("{:?}", a.iter().collect::<Vec<_>>()),
            format!("{:?}", b.iter().collect::<Vec<_>>())
        );
        for f in b.iter() {
            assert_eq!(a.get(f.series, &f.id), Some(f), "{}", f.id);
        }
        assert!(b.iter().next().is_some());
        let (a, b) = (PartTable::builtin(), PartTable::parse_shipped().unwrap());
        assert_eq!(format!("{:?}", a.entries), format!("{:?}", b.entries));
        assert!(!a.entries.is_empty());
    }
}
