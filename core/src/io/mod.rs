//! File input and output: model files (TOML), recordings, PSD files, atomic writes.
//! The only module of `core` that touches the file system (besides `Psd::read_csv`).

pub mod atomic;
pub mod model_file;
pub mod series;
pub mod text;

pub use model_file::{ModelFile, spec_to_toml};
pub use text::read_text_capped;
