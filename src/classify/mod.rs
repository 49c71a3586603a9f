//! Part classification: logic families, functions and pin roles from component values,
//! through the mapping files under `rules/` (embedded in the binary) and project overrides.

pub mod classifier;
pub mod family;
pub mod function;
pub mod parts;
pub mod pattern;
mod roles;
mod shipped;

pub use roles::{in_our_words, PinRole, RuleError};
