#![allow(clippy::result_large_err)]
//! netmargin: reads KiCad S-expression netlists and checks every net against the DC
//! behaviour of the logic families on it. See `DEVELOPERS.md` for the architecture.
//!
//! Data flows one way: text -> [`sexpr`] (syntax tree with spans) -> [`netlist`] (the
//! netlist model) -> [`classify`] (families, functions, pin roles) -> checks -> reports.

pub mod analysis;
pub mod atomic;
pub mod audit;
pub mod baseline;
pub mod capture;
pub mod checks;
pub mod circuit;
pub mod classify;
pub mod cli;
pub mod commands;
pub mod config;
pub mod diag;
pub mod input;
pub mod netlist;
pub mod phases;
pub mod pipeline;
pub mod report;
pub mod schematic;
pub mod sexpr;
pub mod source;
#[doc(hidden)]
pub mod synth;
pub mod text;
pub mod values;
