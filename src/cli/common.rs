//! Flags shared by every subcommand that plans, and printing of the result.

use clap::{Args, ValueEnum};
use reknit::export::Summary;
use reknit::export::geojson::fixed;
use reknit::export::text::terminal;
use reknit::ingest::RoadSettings;
use reknit::ingest::cost_table::{CostTable, RoadFilter};
use reknit::ingest::damage::DamageRule;
use reknit::ingest::sites::SiteSettings;
use reknit::job::PlanJob;
use reknit::progress::Progress;
use reknit::solve::MstAlgorithm;
use reknit::solve::steiner::Effort;
use std::path::PathBuf;

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
    #[arg(
        long,
        value_name = "FACTOR",
        default_value_t = 1.0,
        allow_negative_numbers = true
    )]
    pub default_damage: f64,

    /// Damage value (text) that marks a road impassable: kept on the map, left out of the plan.
    #[arg(long, value_name = "TEXT", default_value = "closed")]
    pub closed_value: String,

    /// Road property holding each feature's id (default: the GeoJSON id, else a field such as id,
    /// osm_id, fid or objectid).
    #[arg(long, value_name = "FIELD")]
    pub id_field: Option<String>,

    /// The road layer's coordinate reference system as EPSG:NNNN, overriding its .prj or GeoJSON
    /// crs member (GeoJSON is WGS84 longitude/latitude otherwise).
    #[arg(long, value_name = "EPSG:CODE")]
    pub crs: Option<String>,

    /// Road property holding a damage category (e.g. debris, washed-out, collapsed) instead of a
    /// numeric factor; categories map to factors through --cost-table (or the documented default).
    #[arg(long, value_name = "FIELD")]
    pub category_field: Option<String>,

    /// TOML cost table: [categories] (name = factor or "closed") and optional [classes] (field =
    /// "NAME" and a rate per road class, multiplying the repair effort per metre).
    #[arg(long, value_name = "FILE")]
    pub cost_table: Option<std::path::PathBuf>,

    /// Keep only roads whose FIELD has one of the values, e.g. highway=primary,secondary (repeatable).
    #[arg(long, value_name = "FIELD=V1,V2")]
    pub keep_where: Vec<String>,

    /// Leave out roads whose FIELD has one of the values, e.g. highway=footway,path,steps (repeatable).
    #[arg(long, value_name = "FIELD=V1,V2")]
    pub drop_where: Vec<String>,

    /// Join lines where they cross without a shared vertex (for data digitised without junction
    /// vertices). Off by default: such crossings are usually overpasses.
    #[arg(long)]
    pub node_crossings: bool,

    /// Road property saying a road lies on a bridge, culvert or tunnel (any value but empty, no,
    /// false, 0, n, f or none). Default: the fields bridge, tunnel, culvert and structure (also
    /// upper case, capitalised and is_bridge-style), OpenStreetMap's bridge and tunnel tags among
    /// them. Planned roads and repairs on a structure are flagged for inspection.
    #[arg(long, value_name = "FIELD")]
    pub structure_field: Option<String>,

    /// Attribution the road data's source asks for, carried into summary.json, every layer, the
    /// picture and the report. OpenStreetMap data (osm_id or @id fields, or an .osm.pbf file)
    /// always carries "© OpenStreetMap contributors (ODbL)".
    #[arg(long, value_name = "TEXT")]
    pub attribution: Option<String>,
}

/// Damage evidence and planning choices: for the commands that plan (not `check`).
#[derive(Debug, Args)]
pub struct PlanningArgs {
    /// Damage zones (flood extents, landslide areas): GeoJSON polygons with a damage factor each; a
    /// road's cost inside a zone uses the zone's factor when larger than its own.
    #[arg(long, value_name = "FILE")]
    pub damage_zones: Option<std::path::PathBuf>,

    /// Zone property holding the damage factor (or "closed"); a zone without one counts as 1.0.
    #[arg(long, value_name = "FIELD", default_value = "damage")]
    pub zone_damage_field: String,

    /// The damage zones' CRS as EPSG:NNNN (default WGS84 longitude/latitude).
    #[arg(long, value_name = "EPSG:CODE")]
    pub zones_crs: Option<String>,

    /// Field damage reports: GeoJSON points with a damage factor (or "closed") in --zone-damage-field,
    /// each applied to the nearest road within --report-distance (the worst report wins).
    #[arg(long, value_name = "FILE")]
    pub damage_points: Option<std::path::PathBuf>,

    /// Largest distance in metres from a damage report to its road; farther reports are listed.
    #[arg(long, value_name = "METRES", default_value_t = 50.0)]
    pub report_distance: f64,

    /// Most repair-metres to spend (with --sites): when joining every site costs more, the sites
    /// giving the most priority per repair-metre are joined to the hub first, within the budget;
    /// the rest are listed with the cost to add each.
    #[arg(long, value_name = "REPAIR_METRES")]
    pub budget: Option<f64>,

    /// Also plan backup links: the cheapest further repairs after which every site stays joined
    /// to the hub when any one road fails (written to backup.geojson, after the plan's repairs).
    #[arg(long)]
    pub redundancy: bool,

    /// Repair-metres a crew completes per day: groups the ordered repairs into day-phases.
    #[arg(long, value_name = "REPAIR_METRES")]
    pub crew_capacity: Option<f64>,

    /// Algorithm for the whole-network plan; both give a forest of the same minimum total.
    #[arg(long, value_enum, default_value = "kruskal")]
    pub mst: MstChoice,
}

impl NetworkArgs {
    pub fn road_settings(&self) -> anyhow::Result<RoadSettings> {
        let cost_table =
            CostTable::from_file(self.cost_table.as_deref()).map_err(anyhow::Error::msg)?;
        let mut filters = Vec::new();
        for (list, keep) in [(&self.keep_where, true), (&self.drop_where, false)] {
            for f in list {
                filters.push(RoadFilter::parse(f, keep).map_err(|e| {
                    anyhow::anyhow!(
                        "invalid setting --{}-where: {e}",
                        if keep { "keep" } else { "drop" }
                    )
                })?);
            }
        }
        Ok(RoadSettings {
            snap_m: self.snap,
            damage: DamageRule {
                field: self.damage_field.clone(),
                default: self.default_damage,
                closed_value: self.closed_value.clone(),
            },
            id_field: self.id_field.clone(),
            crs: self.crs.clone(),
            node_crossings: self.node_crossings,
            category_field: self.category_field.clone(),
            cost_table,
            cost_table_file: self.cost_table.clone(),
            filters,
            structure_field: self.structure_field.clone(),
            attribution: self.attribution.clone(),
        })
    }
}

impl PlanningArgs {
    /// Copies the damage evidence and planning settings into a job (zones and reports read
    /// "closed" as the roads do).
    pub fn apply(&self, job: &mut PlanJob, closed_value: &str) {
        job.zones = self
            .damage_zones
            .clone()
            .map(reknit::ingest::source::Source::File);
        job.zone_damage = DamageRule {
            field: self.zone_damage_field.clone(),
            default: 1.0,
            closed_value: closed_value.to_string(),
        };
        job.mst = self.mst();
        job.zones_crs = self.zones_crs.clone();
        job.reports = self
            .damage_points
            .clone()
            .map(reknit::ingest::source::Source::File);
        job.report_distance_m = self.report_distance;
        job.crew_capacity = self.crew_capacity;
        job.budget = self.budget;
        job.redundancy = self.redundancy;
    }

    fn mst(&self) -> MstAlgorithm {
        match self.mst {
            MstChoice::Kruskal => MstAlgorithm::Kruskal,
            MstChoice::Prim => MstAlgorithm::Prim,
        }
    }
}

#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum EffortChoice {
    /// One improvement start and a short bound computation.
    Quick,
    /// Several starts, local search, a full bound on most networks.
    Normal,
    /// Many starts and an unlimited bound computation.
    Thorough,
}

/// Critical sites and the plan that joins them.
#[derive(Debug, Args)]
pub struct SiteArgs {
    /// Critical sites (hospitals, shelters, depots…): GeoJSON points, or CSV with lon/lat columns.
    /// With sites, the plan joins the sites only (a Steiner tree) instead of the whole network.
    #[arg(long, value_name = "FILE")]
    pub sites: Option<PathBuf>,

    /// Largest distance in metres from a site to the road it joins; farther sites are reported.
    #[arg(long, value_name = "METRES", default_value_t = 250.0)]
    pub max_attach: f64,

    /// Id of the hub site (the depot crews start from); it must lie within --max-attach of a usable
    /// road. Default: the site on the roads with the highest priority (on ties, where the most
    /// sites can join it, then the first in the file).
    #[arg(long, value_name = "SITE_ID")]
    pub hub: Option<String>,

    /// Plan the whole network (every junction) even when sites are given.
    #[arg(long)]
    pub whole_network: bool,

    /// Time spent improving the sites plan; every effort gives the same result on every run.
    #[arg(long, value_enum, default_value = "normal")]
    pub effort: EffortChoice,

    /// Site property or column holding each site's id (default: id, site_id, fid or name).
    #[arg(long, value_name = "FIELD")]
    pub site_id_field: Option<String>,

    /// Site property or column holding a display name (default: name).
    #[arg(long, value_name = "FIELD")]
    pub site_name_field: Option<String>,

    /// Site property or column holding a priority, higher first (default: priority; absent = 1).
    #[arg(long, value_name = "FIELD")]
    pub priority_field: Option<String>,

    /// CSV column with longitudes (default: lon, lng, longitude or x).
    #[arg(long, value_name = "COLUMN")]
    pub lon_column: Option<String>,

    /// CSV column with latitudes (default: lat, latitude or y).
    #[arg(long, value_name = "COLUMN")]
    pub lat_column: Option<String>,

    /// The sites layer's CRS as EPSG:NNNN (default: its .prj, or WGS84 longitude/latitude).
    #[arg(long, value_name = "EPSG:CODE")]
    pub sites_crs: Option<String>,
}

impl SiteArgs {
    /// Copies the site settings into a job.
    pub fn apply(&self, job: &mut PlanJob) {
        job.site_settings = SiteSettings {
            id_field: self.site_id_field.clone(),
            name_field: self.site_name_field.clone(),
            priority_field: self.priority_field.clone(),
            lon_column: self.lon_column.clone(),
            lat_column: self.lat_column.clone(),
            crs: self.sites_crs.clone(),
        };
        job.max_attach_m = self.max_attach;
        job.hub = self.hub.clone();
        job.whole_network = self.whole_network;
        job.effort = match self.effort {
            EffortChoice::Quick => Effort::Quick,
            EffortChoice::Normal => Effort::Normal,
            EffortChoice::Thorough => Effort::Thorough,
        };
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
        "plan: {} edges, {} to repair, {} repair-metres over {} m of road",
        summary.plan_edges,
        summary.plan.repair_edges,
        fixed(summary.total_cost, 3),
        fixed(summary.repair_length_m, 3)
    );
    if let Some(s) = &summary.sites {
        eprintln!(
            "sites: {} of {} joined to the hub; lower bound {} repair-metres ({})",
            s.connected,
            s.total,
            fixed(summary.lower_bound, 3),
            match summary.gap {
                Some(0.0) => "the plan is optimal".to_string(),
                Some(g) => format!(
                    "the plan is at most {} % above optimal",
                    fixed(100.0 * g, 2)
                ),
                None if summary.within_budget() => {
                    "no gap: a plan within a budget has no bound".to_string()
                }
                None => "no gap: the bound is 0".to_string(),
            }
        );
        for u in &s.unconnected {
            eprintln!(
                "  {} {}: {}",
                terminal(&u.id),
                u.status,
                terminal(&u.reason)
            );
        }
        if let Some(n) = &s.note {
            eprintln!("  note: {}", terminal(n));
        }
    }
    if let Some(st) = summary.structures.as_ref().filter(|st| st.planned > 0) {
        eprintln!(
            "structures: {} planned road(s) on a bridge, culvert or tunnel ({} to repair): inspect before use",
            st.planned, st.repairs
        );
    }
    eprintln!("outputs written to {}", out.display());
    print_cautions(summary.attribution.as_deref());
}

/// Prints the cautions paragraph (the text of the picture's band) and any attribution.
pub fn print_cautions(attribution: Option<&str>) {
    eprintln!("{}", reknit::cautions::SHORT);
    if let Some(a) = attribution {
        eprintln!("{}", terminal(a));
    }
}
