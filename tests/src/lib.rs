//! Workspace-level checks of `stillsky`. The library part holds what both the integration tests
//! and the fuzz crate (fuzz/, outside the workspace) use.

pub mod fixtures;
pub mod fuzz_targets;
