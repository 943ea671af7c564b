//! Flags shared by every subcommand that plans, and printing of the result.

use clap::{Args, ValueEnum};
use reknit::export::Summary;
use reknit::ingest::RoadSettings;
use reknit::ingest::damage::DamageRule;
use reknit::progress::Progress;
use reknit::solve::MstAlgorithm;

#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum MstChoice {
    /// Sort all edges by cost and join components greedily (fastest).
    Kruskal,
    /// Grow each tree from one junction with a priority queue.
    Prim,
}

/// Settings for reading roads and building the network.
#[derive(Debug, Args)]
pub struct NetworkArgs {
    /// Merge road vertices closer than this many metres (0 joins only identical coordinates).
    #[arg(long, value_name = "METRES", default_value_t = 0.5)]
    pub snap: f64,

    /// Road property holding the damage factor: 0 intact, 1.0 full rebuild, more for harder work,
    /// a negative number or the closed value for impassable.
    #[arg(long, value_name = "FIELD", default_value = "damage")]
    pub damage_field: String,

    /// Damage factor for roads without a damage value (1.0: assume the road needs full repair).
    #[arg(long, value_name = "FACTOR", default_value_t = 1.0)]
    pub default_damage: f64,

    /// Damage value (text) that marks a road impassable: kept on the map, left out of the plan.
    #[arg(long, value_name = "TEXT", default_value = "closed")]
    pub closed_value: String,

    /// Road property holding each feature's id (default: the GeoJSON id, else a field such as id,
    /// osm_id, fid or objectid).
    #[arg(long, value_name = "FIELD")]
    pub id_field: Option<String>,

    /// Algorithm for the whole-network plan; both give a forest of the same minimum total.
    #[arg(long, value_enum, default_value = "kruskal")]
    pub mst: MstChoice,
}

impl NetworkArgs {
    pub fn road_settings(&self) -> RoadSettings {
        RoadSettings {
            snap_m: self.snap,
            damage: DamageRule {
                field: self.damage_field.clone(),
                default: self.default_damage,
                closed_value: self.closed_value.clone(),
            },
            id_field: self.id_field.clone(),
        }
    }

    pub fn mst(&self) -> MstAlgorithm {
        match self.mst {
            MstChoice::Kruskal => MstAlgorithm::Kruskal,
            MstChoice::Prim => MstAlgorithm::Prim,
        }
    }
}

/// Output and terminal flags.
#[derive(Debug, Args)]
pub struct OutputArgs {
    /// Replace outputs already in the output folder.
    #[arg(long)]
    pub force: bool,

    /// Print nothing but errors.
    #[arg(long, short)]
    pub quiet: bool,

    /// Print the time each stage took (on stderr).
    #[arg(long, short)]
    pub verbose: bool,
}

impl OutputArgs {
    pub fn progress(&self) -> Progress {
        Progress {
            quiet: self.quiet,
            verbose: self.verbose,
        }
    }
}

/// Prints the headline figures of a finished run.
pub fn print_result(summary: &Summary, out: &std::path::Path, progress: &Progress) {
    if progress.quiet {
        return;
    }
    let c = &summary.counts;
    eprintln!(
        "{} junctions, {} edges ({} damaged, {} closed) in {} component(s)",
        c.junctions, c.edges, c.edges_damaged, c.edges_closed, c.components
    );
    eprintln!(
        "plan: {} edges, {} to repair, {:.3} repair-metres over {:.3} m of road",
        summary.plan_edges, summary.plan.repair_edges, summary.total_cost, summary.repair_length_m
    );
    eprintln!("outputs written to {}", out.display());
    eprintln!("caution: decision support only; field-verify every segment before sending crews.");
}
