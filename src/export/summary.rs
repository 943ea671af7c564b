//! The run summary (`summary.json`): every figure of the run, its inputs and settings, the cautions.
//!
//! It holds no timings or dates, so the same inputs always give the same bytes.

use crate::ingest::source::InputRecord;
use serde::Serialize;
use std::collections::BTreeMap;

/// Name and version of the program that wrote the outputs.
#[derive(Debug, Clone, Serialize)]
pub struct Tool {
    /// Always "reknit".
    pub name: &'static str,
    /// The crate version.
    pub version: &'static str,
}

impl Default for Tool {
    fn default() -> Self {
        Tool {
            name: "reknit",
            version: env!("CARGO_PKG_VERSION"),
        }
    }
}

/// How coordinates were interpreted and lengths measured.
#[derive(Debug, Clone, Serialize)]
pub struct Geodesy {
    /// Coordinate reference system of the road layer.
    pub input_crs: String,
    /// How edge lengths were measured.
    pub length_method: String,
    /// Coordinate reference system of every output layer.
    pub output_crs: String,
    /// Unit of every length in the outputs.
    pub length_unit: &'static str,
    /// Accuracy notes about the conversion to WGS84 (datum shifts without grids, and the like).
    pub note: Option<String>,
}

/// Counts from reading and noding.
#[derive(Debug, Clone, Default, Serialize)]
pub struct Counts {
    /// Features in the road layer.
    pub features_read: usize,
    /// Features that contributed lines.
    pub features_used: usize,
    /// Features skipped, by reason.
    pub features_skipped: BTreeMap<String, usize>,
    /// Features that lost part of their geometry at the file's edge (OpenStreetMap ways cut at the
    /// extract's boundary, kept as their located runs); omitted when none.
    #[serde(skip_serializing_if = "crate::export::summary::is_zero")]
    pub features_cut_at_edge: usize,
    /// Line parts read.
    pub line_parts: usize,
    /// Vertices read.
    pub vertices: usize,
    /// Vertices moved by snapping.
    pub vertices_moved: usize,
    /// Largest snapping move, metres.
    pub max_move_m: f64,
    /// Lines that collapsed to a point, dropped.
    pub zero_length_parts_dropped: usize,
    /// Duplicate edges dropped.
    pub duplicate_edges_dropped: usize,
    /// Dangling ends joined to a nearby line (undershoots).
    pub undershoots_joined: usize,
    /// Short dangling pieces past a junction removed (overshoots).
    pub overshoots_trimmed: usize,
    /// Edges within the tolerance of another between the same junctions, removed.
    pub near_duplicates_dropped: usize,
    /// Crossings without a shared vertex found (joined with --node-crossings).
    pub crossings: usize,
    /// QA points in qa.geojson, by kind.
    pub qa: BTreeMap<String, usize>,
    /// Junctions in the network.
    pub junctions: usize,
    /// Edges in the network.
    pub edges: usize,
    /// Edges with damage factor 0.
    pub edges_intact: usize,
    /// Edges with damage factor above 0.
    pub edges_damaged: usize,
    /// Edges marked impassable.
    pub edges_closed: usize,
    /// Damage zone polygons read.
    pub damage_zones: usize,
    /// Edges whose cost the zones changed.
    pub edges_in_zones: usize,
    /// Connected components of the usable network (isolated junctions included).
    pub components: usize,
    /// Total length of all edges, metres.
    pub network_length_m: f64,
}

/// What the plan is and what it costs.
#[derive(Debug, Clone, Serialize)]
pub struct PlanFigures {
    /// Plain description of what the plan connects.
    pub kind: &'static str,
    /// Algorithm used.
    pub algorithm: &'static str,
    /// Trees in the plan (components with at least one edge).
    pub trees: usize,
    /// Plan edges that need repair (cost above 0).
    pub repair_edges: usize,
    /// False when the lower bound stopped at its work budget (it still holds, but may be weak).
    pub bound_complete: bool,
}

/// A site the plan does not join to the hub, and why.
#[derive(Debug, Clone, Serialize)]
pub struct NotJoinedSite {
    /// The site's id.
    pub id: String,
    /// Its name, when it has one.
    pub name: Option<String>,
    /// Its status code in `sites.geojson` (`not_attached`, `left_out_by_budget`, `unreachable`).
    pub status: &'static str,
    /// The status in words, as in `sites.geojson`.
    pub status_label: &'static str,
    /// Why it is not joined to the hub.
    pub reason: String,
    /// Distance to the nearest road (not attached) or attachment distance, metres.
    pub distance_m: Option<f64>,
}

/// One group of sites that can reach each other over usable roads.
#[derive(Debug, Clone, Serialize)]
pub struct GroupFigures {
    /// Site ids in the group.
    pub sites: Vec<String>,
    /// True for the group holding the hub: only its sites can be joined to the hub.
    pub hub: bool,
    /// Repair cost of the tree joining all the group's sites, repair-metres.
    pub cost: f64,
    /// Repair cost of the plan's edges in the group's part of the network (less than `cost` when a
    /// budget left some of the group out), repair-metres.
    pub cost_in_plan: f64,
    /// Proven lower bound for the group, repair-metres.
    pub lower_bound: f64,
    /// (cost − bound) / bound; null when only the bound is 0.
    pub gap: Option<f64>,
    /// Vertices and edges of the reduced graph searched.
    pub reduced_graph: [usize; 2],
}

/// Figures about the critical sites.
#[derive(Debug, Clone, Serialize)]
pub struct SitesFigures {
    /// Sites read.
    pub total: usize,
    /// Sites attached to a usable road.
    pub attached: usize,
    /// Sites joined to the hub over intact roads and the plan's repairs, the hub included.
    pub joined_to_hub: usize,
    /// The hub (depot) site's id.
    pub hub: Option<String>,
    /// Groups of sites that can reach each other, with their trees' figures.
    pub groups: Vec<GroupFigures>,
    /// Sites not joined to the hub, each with its status and the reason.
    pub not_joined: Vec<NotJoinedSite>,
    /// A note on trivial cases (no sites, one site).
    pub note: Option<String>,
}

/// One day of work (with `--crew-capacity`).
#[derive(Debug, Clone, Serialize)]
pub struct DayFigures {
    /// Day number (1-based).
    pub day: u32,
    /// What each crew does that day (crews with no work that day left out).
    pub crews: Vec<CrewDay>,
    /// Sites joined to the hub by the repairs finished that day.
    pub sites_joined: Vec<String>,
    /// Share of all sites joined to the hub by the end of the day (null without sites).
    pub cumulative_share_of_sites: Option<f64>,
}

/// One crew's day.
#[derive(Debug, Clone, Serialize)]
pub struct CrewDay {
    /// The crew, 1-based.
    pub crew: u32,
    /// Work orders it finishes that day, in order.
    pub finishes: Vec<String>,
    /// The work order it is still on at the end of the day, if any.
    pub continues: Option<String>,
    /// Repair-metres it works that day.
    pub repair_metres: f64,
}

/// The whole `summary.json`.
#[derive(Debug, Clone, Serialize)]
pub struct Summary {
    /// Program name and version.
    pub tool: Tool,
    /// Cautions that go with the plan (second, so no reader can miss them).
    pub cautions: Vec<&'static str>,
    /// The attribution the data's licence asks for (OpenStreetMap's, or `--attribution`), if any.
    pub attribution: Option<String>,
    /// Input files with their SHA-256.
    pub inputs: Vec<InputRecord>,
    /// SHA-256 of the inputs' digests and the settings: unchanged inputs and settings, same value.
    pub fingerprint: String,
    /// Settings in force.
    pub settings: serde_json::Value,
    /// False when `--time-limit` let the exact search run on the clock: the same inputs and
    /// settings may then give another plan on another run or machine.
    pub deterministic: bool,
    /// Every file of this output set, `summary.json` last: a folder lacking any is incomplete.
    pub outputs: Vec<&'static str>,
    /// Coordinate handling.
    pub geodesy: Geodesy,
    /// Counts from reading and noding.
    pub counts: Counts,
    /// Plan description.
    pub plan: PlanFigures,
    /// Field damage reports: read, applied, and the ones with no road near enough.
    pub damage_reports: Option<crate::ingest::reports::ReportFigures>,
    /// Roads whose single failure would cut sites off the hub after the plan (plans with sites;
    /// null otherwise).
    pub single_failures: Option<super::single_failures::SingleFailureFigures>,
    /// Backup links (with --redundancy; null otherwise): cost, repairs and the single failures
    /// left after.
    pub backup: Option<super::backup::BackupFigures>,
    /// The days of work by crew (with `--crew-capacity`; null without it).
    pub days: Option<Vec<DayFigures>>,
    /// Corridors from the hub to the joined sites (plans with a hub on the roads; else null).
    pub corridors: Option<super::corridors::CorridorFigures>,
    /// Figures about the critical sites (null for a whole-network plan without sites).
    pub sites: Option<SitesFigures>,
    /// Total repair cost of the plan, repair-metres.
    pub total_cost: f64,
    /// Proven lower bound on the cost of any plan connecting the same things, repair-metres.
    pub lower_bound: f64,
    /// (total_cost − lower_bound) / lower_bound; 0 when both are 0; null when only the bound is 0.
    pub gap: Option<f64>,
    /// True when the plan is proven optimal (gap 0).
    pub optimal: bool,
    /// Unit of every cost: one metre of road at damage factor 1.0.
    pub cost_unit: &'static str,
    /// Length of road to repair in the plan, metres.
    pub repair_length_m: f64,
    /// Edges in the plan.
    pub plan_edges: usize,
    /// Defaults and choices of this run that change the answer, each announced.
    pub notes: Vec<Note>,
    /// The plan's roads on bridges, culverts and tunnels: inspect before use.
    pub structures: Option<super::structures::StructureFigures>,
    /// The rounds of the operation: round 1 is the first plan, each re-plan adds one.
    pub history: Vec<crate::replan::history::Round>,
    /// What a re-plan took from the previous round (null for a first plan).
    pub replan: Option<crate::replan::ReplanFigures>,
}

/// A default or a choice the run made that changes the answer (a road without a damage value, a
/// site without an id, the hub picked among equals, …): printed on stderr, written to
/// `summary.json` and shown in the report.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Note {
    /// Stable code for programs, such as `damage_defaulted`.
    pub code: &'static str,
    /// One plain sentence for people.
    pub message: String,
}

impl Summary {
    /// True when `--budget` cut the plan down (its note says so): no bound applies then.
    pub fn within_budget(&self) -> bool {
        self.notes.iter().any(|n| n.code == "budget_limits_plan")
    }
}

/// Rounds to 3 decimals (millimetres, milli-repair-metres) for printing; never −0 (an empty sum
/// of floats is −0, which would print as "-0.0").
pub fn round3(x: f64) -> f64 {
    (x * 1000.0).round() / 1000.0 + 0.0
}

/// True for a zero count (left out of summary.json).
pub fn is_zero(n: &usize) -> bool {
    *n == 0
}

#[cfg(test)]
mod tests {
    #[test]
    fn rounding_never_gives_negative_zero() {
        let empty: f64 = std::iter::empty::<f64>().sum();
        assert_eq!(super::round3(empty).to_string(), "0");
        assert_eq!(super::round3(-0.0004).to_string(), "0");
        assert_eq!(super::round3(1.23456), 1.235);
    }
}
