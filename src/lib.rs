#![allow(clippy::result_large_err)]
//! netmargin: reads KiCad S-expression netlists and checks every net against the DC
//! behaviour of the logic families on it. See `DEVELOPERS.md` for the architecture.
//!
//! Data flows one way: text -> [`sexpr`] (syntax tree with spans) -> [`netlist`] (the
//! netlist model) -> [`classify`] (families, functions, pin roles) -> checks -> reports.

pub mod classify;
pub mod netlist;
pub mod sexpr;
pub mod source;
pub mod values;
pub mod diag;
pub mod text;
pub mod input;
pub mod cli;
pub mod pipeline;
pub mod report;
#[doc(hidden)]
pub mod synth;
pub mod checks;
pub mod circuit;
pub mod config;
pub mod app;
pub mod audit;
pub mod atomic;
pub mod baseline;
