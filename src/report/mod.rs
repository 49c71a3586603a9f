//! Reporters: each turns the same outcomes into one output format, writing to `impl Write`.

pub mod explain;
pub mod human;
pub mod net;
pub mod parts;
