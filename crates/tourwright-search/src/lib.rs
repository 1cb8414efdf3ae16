//! Search: window maps (porkchop plots), the direct-transfer search, the date optimiser and the
//! sequence explorer. Each runs on all cores (rayon), is deterministic for a given seed, reports
//! progress and can be cancelled. All of them score designs through the mission crate's one
//! evaluation path.

pub mod direct;
pub mod explore;
pub mod job;
pub mod optimize;
pub mod period;
pub mod polish;
pub mod window;

pub use job::{Job, JobStatus, Progress};
