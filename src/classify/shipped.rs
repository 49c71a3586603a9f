//! The shipped tables as the binary loads them: `build.rs` reads `rules/*.toml` at compile
//! time with the same code the project files are read with at run time (`parse_shipped`),
//! checks them, and writes each table in postcard's compact binary form to `OUT_DIR`; start-up
//! decodes those bytes instead of parsing and validating TOML. The functions and the families
//! are written one by one behind an index and each is decoded only when a run asks for it.
//! `rules/*.toml` stay the source that is edited; a change to them rebuilds the binary.

use super::family::FamilyTable;
use super::function::{FunctionTable, Series};
use super::parts::PartTable;

impl FamilyTable {
    /// The shipped table (`rules/families.toml`, read at compile time): an index of each
    /// family's id and aliases, borrowed from the compiled bytes, and each family decoded the
    /// first time a run asks for it.
    pub fn builtin() -> FamilyTable {
        static BYTES: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/families.postcard"));
        static INDEX: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/families-index.postcard"));
        // the ids and aliases are borrowed from the compiled index
        let index: Vec<(&'static str, Vec<&'static str>, u32, u32)> = postcard::from_bytes(INDEX)
            .unwrap_or_else(|e| {
                panic!("the shipped families index built by build.rs decodes: {e}")
            });
        FamilyTable::from_compact(
            index
                .into_iter()
                .map(|(id, aliases, a, b)| (id, aliases, &BYTES[a as usize..b as usize])),
        )
    }
}

impl FunctionTable {
    /// The shipped table (`rules/functions.toml`, read at compile time).
    pub fn builtin() -> FunctionTable {
        static BYTES: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/functions.postcard"));
        static INDEX: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/functions-index.postcard"));
        // the ids are borrowed from the compiled index
        let index: Vec<(Series, &'static str, u32, u32)> = postcard::from_bytes(INDEX)
            .unwrap_or_else(|e| {
                panic!("the shipped functions index built by build.rs decodes: {e}")
            });
        FunctionTable::from_compact(
            index
                .into_iter()
                .map(|(s, id, a, b)| (s, id, &BYTES[a as usize..b as usize])),
        )
    }
}

impl PartTable {
    /// The shipped table (`rules/parts.toml`, read at compile time); its texts are borrowed
    /// from the bytes compiled into the binary.
    pub fn builtin() -> PartTable {
        static BYTES: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/parts.postcard"));
        postcard::from_bytes(BYTES)
            .unwrap_or_else(|e| panic!("the shipped parts table built by build.rs decodes: {e}"))
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
