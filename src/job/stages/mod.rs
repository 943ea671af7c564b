//! The stages of one district, in the order [`super::run_plan`] calls them: each takes the typed
//! results of the one before and returns its own.

pub(super) mod ingest;
pub(super) mod layers;
pub(super) mod network;
pub(super) mod plan;
