//! reknit: which damaged road segments to repair first so that a district's road network, or its
//! critical sites, reconnect at the least repair effort.
//!
//! # A tour of the stages
//! Data flows one way:
//!
//! 1. [`ingest`] reads a road centerline layer (GeoJSON or Shapefile, any supported CRS) feature by
//!    feature, reads each road's damage, merges vertices within a snapping tolerance, repairs
//!    undershoots and overshoots, splits lines at shared vertices and measures every piece. The
//!    result is a [`Network`]; sites, damage zones and field reports attach to it.
//! 2. [`network`] holds junctions and edges in dense arrays with integer costs in
//!    milli-repair-metres (one repair-metre = one metre of road at damage factor 1.0).
//! 3. [`solve`] sees only compact edge arrays and returns a [`Plan`]: the minimum spanning forest by
//!    Kruskal (Prim as an independent check) or a Steiner tree over the sites, then the repair
//!    order, the single points of failure, backup links and plans within a budget.
//! 4. [`export`] writes GeoJSON layers and `summary.json` through a staging folder, all or nothing.
//!
//! [`job`] strings the stages together for one district and [`batch`] runs many; the `reknit`
//! binary is a thin command line over them. [`fuzzing`] holds the entry points the fuzz targets and
//! the garbage-input tests drive.

pub mod batch;
pub mod cautions;
pub mod decimal;
pub mod export;
pub mod fuzzing;
mod fxhash;
pub mod heap;
pub mod ingest;
pub mod job;
pub mod network;
pub mod progress;
pub mod replan;
pub mod rng;
pub mod sample;
pub mod solve;
pub mod synthetic;
pub mod texts;

pub use job::{JobError, PlanJob, run_plan};
pub use network::Network;
pub use solve::Plan;
