//! The command line's own plumbing, apart from its arguments (`main.rs`):
//! reading and writing files, and the sweep's streaming and interruption.

pub(crate) mod files;
pub(crate) mod sweep;
