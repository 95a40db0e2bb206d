//! File input and output: model files (TOML), recordings, PSD files, atomic writes.
//! The only module of `core` that touches the file system.

pub mod atomic;
pub mod series;
