//! File input and output: text and TOML documents, recordings, PSD files, atomic writes.
//! The only module of `core` that touches the file system (besides `Psd::read_csv`).

pub mod atomic;
pub mod series;
pub mod text;
pub mod toml_doc;

pub use text::read_text_capped;
