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

mod alloc;

/// The memory allocator of every program built on this crate (the `siccant`
/// binary, its tests and benchmarks): mimalloc ([`alloc::Mimalloc`]). See
/// DEVELOPERS.md.
#[global_allocator]
static ALLOCATOR: alloc::Mimalloc = alloc::Mimalloc;
