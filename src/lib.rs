//! siccant: a unit-checked worksheet language for convective dryer design.
//!
//! Data flows one way: text -> [`syntax`] -> [`eval`] -> [`library`] (dimension
//! check, then typed [`engine`] code) -> [`value::Value`] -> [`render`] -> front end.

pub mod cli;
pub mod diag;
pub mod engine;
pub mod eval;
pub mod library;
pub mod record;
pub mod render;
pub mod repl;
pub mod session;
pub mod syntax;
pub mod units;
pub mod value;
