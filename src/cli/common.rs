//! Flags shared by every subcommand that plans, and printing of the result.

use clap::{Args, ValueEnum};
use reknit::decimal::fixed;
use reknit::export::Summary;
use reknit::export::text::terminal;
use reknit::ingest::source::Source;
use reknit::job::{Options, RoadOptions};
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

    /// The layer of a GeoPackage road file that holds several, or the Shapefile set of a .zip
    /// that holds several (its name without .shp, or its path inside the archive); the message
    /// lists them. With several --roads it chooses in each input holding several layers; one
    /// holding a single layer is read whole.
    #[arg(long, value_name = "NAME")]
    pub roads_layer: Option<String>,

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

    /// Damage zone property holding the damage factor (or "closed"), default damage; a zone
    /// without one counts as 1.0. Only with --damage-zones.
    #[arg(long, value_name = "FIELD")]
    pub zone_damage_field: Option<String>,

    /// The damage zones' CRS as EPSG:NNNN (default WGS84 longitude/latitude); only with
    /// --damage-zones.
    #[arg(long, value_name = "EPSG:CODE")]
    pub zones_crs: Option<String>,

    /// The layer of a GeoPackage damage-zones file that holds several (the message lists them).
    #[arg(long, value_name = "NAME")]
    pub zones_layer: Option<String>,

    /// Field damage reports: points with a damage factor (or "closed") in --damage-points-field,
    /// from GeoJSON, CSV with lon/lat (or x/y) columns, a Shapefile (also zipped) or a GeoPackage;
    /// each is applied to the nearest road within --point-match-distance (the worst report wins).
    #[arg(long, value_name = "FILE")]
    pub damage_points: Option<std::path::PathBuf>,

    /// Field report property holding the damage factor (or "closed"), default damage; a report
    /// without one counts as 1.0. Only with --damage-points.
    #[arg(long, value_name = "FIELD")]
    pub damage_points_field: Option<String>,

    /// Largest distance in metres from a field report to the road it is matched to, default 50;
    /// farther reports are listed. Only with --damage-points.
    #[arg(long, value_name = "METRES")]
    pub point_match_distance: Option<f64>,

    /// The field reports layer's CRS as EPSG:NNNN (default: its .prj or GeoPackage SRS, or WGS84
    /// longitude/latitude). Only with --damage-points.
    #[arg(long, value_name = "EPSG:CODE")]
    pub damage_points_crs: Option<String>,

    /// Field separator of a CSV field reports file: `,` `;` or `tab` (default: told from the
    /// header line). With `;` or tab a decimal comma is read (12,5).
    #[arg(long, value_name = "SEPARATOR")]
    pub damage_points_delimiter: Option<String>,

    /// The layer of a GeoPackage (or the set of a zipped Shapefile) field reports file that holds
    /// several (the message lists them).
    #[arg(long, value_name = "NAME")]
    pub damage_points_layer: Option<String>,

    /// CSV column with the field reports' longitudes (default: lon, lng, longitude or x). Only
    /// with a CSV --damage-points file.
    #[arg(long, value_name = "COLUMN")]
    pub damage_points_lon_column: Option<String>,

    /// CSV column with the field reports' latitudes (default: lat, latitude or y). Only with a
    /// CSV --damage-points file.
    #[arg(long, value_name = "COLUMN")]
    pub damage_points_lat_column: Option<String>,

    /// Most repair-metres to spend (with --sites): when joining every site costs more, the sites
    /// giving the most priority per repair-metre are joined to the hub first, within the budget;
    /// the rest are listed with the cost to add each.
    #[arg(long, value_name = "REPAIR_METRES")]
    pub budget: Option<f64>,

    /// Also plan backup links: the cheapest further repairs that give roads with no way round a
    /// way round, so every site stays joined to the hub when any one road fails (written to
    /// backup.geojson, after the plan's repairs).
    #[arg(long)]
    pub redundancy: bool,

    /// Repair-metres a crew completes per day: spreads the repairs over days (a repair longer
    /// than a day spans days); without it the repairs are not scheduled by day.
    #[arg(long, value_name = "REPAIR_METRES")]
    pub crew_capacity: Option<f64>,

    /// Crews working side by side, default 1 (with --crew-capacity): each starts a repair only
    /// once its hub-side end can be reached over intact or finished roads.
    #[arg(long, value_name = "N")]
    pub crews: Option<u32>,

    /// Flags sites whose corridor from the hub is longer than R times the same trip on the
    /// undamaged network, and offers the cheapest further repairs bringing each under R (optional
    /// work orders, purpose `detour`). With --sites.
    #[arg(long, value_name = "R")]
    pub max_detour: Option<f64>,

    /// Algorithm for the whole-network plan, default kruskal; both give a forest of the same
    /// minimum total. Not with a sites plan (a Steiner tree).
    #[arg(long, value_enum)]
    pub mst: Option<MstChoice>,
}

impl NetworkArgs {
    /// The road options as given, for [`reknit::job::settings::road_settings`].
    pub fn road_options(&self) -> RoadOptions {
        RoadOptions {
            snap_m: self.snap,
            damage_field: self.damage_field.clone(),
            default_damage: self.default_damage,
            closed_value: self.closed_value.clone(),
            id_field: self.id_field.clone(),
            crs: self.crs.clone(),
            roads_layer: self.roads_layer.clone(),
            category_field: self.category_field.clone(),
            cost_table: self.cost_table.clone(),
            keep_where: self.keep_where.clone(),
            drop_where: self.drop_where.clone(),
            node_crossings: self.node_crossings,
            structure_field: self.structure_field.clone(),
            attribution: self.attribution.clone(),
        }
    }
}

impl PlanningArgs {
    /// Copies the damage evidence and planning options into `o`.
    pub fn apply(&self, o: &mut Options) {
        o.damage_zones = self.damage_zones.clone().map(Source::File);
        o.zone_damage_field = self.zone_damage_field.clone();
        o.zones_crs = self.zones_crs.clone();
        o.zones_layer = self.zones_layer.clone();
        o.damage_points = self.damage_points.clone().map(Source::File);
        o.damage_points_field = self.damage_points_field.clone();
        o.point_match_distance_m = self.point_match_distance;
        o.damage_points_crs = self.damage_points_crs.clone();
        o.damage_points_delimiter = self.damage_points_delimiter.clone();
        o.damage_points_layer = self.damage_points_layer.clone();
        o.damage_points_lon_column = self.damage_points_lon_column.clone();
        o.damage_points_lat_column = self.damage_points_lat_column.clone();
        o.crew_capacity = self.crew_capacity;
        o.crews = self.crews;
        o.max_detour = self.max_detour;
        o.budget = self.budget;
        o.redundancy = self.redundancy;
        o.mst = self.mst.map(|m| match m {
            MstChoice::Kruskal => MstAlgorithm::Kruskal,
            MstChoice::Prim => MstAlgorithm::Prim,
        });
    }
}

#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum EffortChoice {
    /// One improvement start and a short bound computation.
    Quick,
    /// Several starts, local search, a full bound on most networks.
    Normal,
    /// Many starts, an unlimited bound and up to 500 search steps to prove the plan optimal; on
    /// networks of tens of thousands of junctions it can take many minutes.
    Thorough,
}

/// Critical sites and the plan that joins them.
#[derive(Debug, Args)]
pub struct SiteArgs {
    /// Critical sites (hospitals, shelters, depots…): points or polygons (a building outline,
    /// attached at the road nearest to it) from GeoJSON, a Shapefile or a GeoPackage, or CSV with
    /// lon/lat columns.
    /// With sites, the plan joins the sites only (a Steiner tree) instead of the whole network.
    #[arg(long, value_name = "FILE")]
    pub sites: Option<PathBuf>,

    /// Largest distance in metres from a site to the road it joins, default 250; farther sites are
    /// reported.
    #[arg(long, value_name = "METRES")]
    pub max_attach: Option<f64>,

    /// Id of the hub site (the depot crews start from); it must lie within --max-attach of a usable
    /// road. Default: the site on the roads with the highest priority (on ties, where the most
    /// sites can join it, then the first in the file).
    #[arg(long, value_name = "SITE_ID")]
    pub hub: Option<String>,

    /// Plan the whole network (every junction) even when sites are given.
    #[arg(long)]
    pub whole_network: bool,

    /// Time spent improving the sites plan, default normal; every effort gives the same result on
    /// every run. Not with --whole-network.
    #[arg(long, value_enum)]
    pub effort: Option<EffortChoice>,

    /// Let the exact search go on past its fixed step budget until the plan is proven optimal or
    /// SECONDS of wall time pass. The plan then depends on the machine's speed: summary.json records
    /// "deterministic": false. Not with --whole-network.
    #[arg(long, value_name = "SECONDS")]
    pub time_limit: Option<f64>,

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

    /// Field separator of a CSV sites file: `,` `;` or `tab` (default: told from the header
    /// line). With `;` or tab a decimal comma is read (12,5).
    #[arg(long, value_name = "SEPARATOR")]
    pub sites_delimiter: Option<String>,

    /// The layer of a GeoPackage sites file that holds several (the message lists them).
    #[arg(long, value_name = "NAME")]
    pub sites_layer: Option<String>,

    /// With --sites FILE.osm.pbf: tags choosing the sites, KEY=V1,V2 (repeatable; `*` any value).
    /// Default: amenity=hospital,clinic,school,fuel; healthcare=hospital,clinic;
    /// social_facility=shelter; emergency=assembly_point.
    #[arg(long, value_name = "KEY=V1,V2")]
    pub site_tags: Vec<String>,
}

impl SiteArgs {
    /// Copies the site options into `o`.
    pub fn apply(&self, o: &mut Options) {
        o.sites = self.sites.clone().map(Source::File);
        o.site_id_field = self.site_id_field.clone();
        o.site_name_field = self.site_name_field.clone();
        o.priority_field = self.priority_field.clone();
        o.lon_column = self.lon_column.clone();
        o.lat_column = self.lat_column.clone();
        o.sites_crs = self.sites_crs.clone();
        o.sites_delimiter = self.sites_delimiter.clone();
        o.sites_layer = self.sites_layer.clone();
        o.site_tags = self.site_tags.clone();
        o.max_attach_m = self.max_attach;
        o.hub = self.hub.clone();
        o.whole_network = self.whole_network;
        o.effort = self.effort.map(|e| match e {
            EffortChoice::Quick => Effort::Quick,
            EffortChoice::Normal => Effort::Normal,
            EffortChoice::Thorough => Effort::Thorough,
        });
        o.time_limit_s = self.time_limit;
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

    /// Format of the map layers: geojson (one RFC 7946 file per layer; the default) or gpkg
    /// (every layer in one GeoPackage, layers.gpkg). A re-plan keeps the previous plan's unless
    /// given.
    #[arg(long, value_name = "FORMAT", value_parser = ["geojson", "gpkg"])]
    pub output_format: Option<String>,
}

impl OutputArgs {
    /// The format given, if any.
    pub fn format(&self) -> Option<reknit::export::sink::OutputFormat> {
        self.output_format
            .as_deref()
            .and_then(reknit::export::sink::OutputFormat::from_name)
    }

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
    reknit::say!(
        "{} junctions, {} edges ({} damaged, {} closed) in {} component(s)",
        c.junctions,
        c.edges,
        c.edges_damaged,
        c.edges_closed,
        c.components
    );
    reknit::say!(
        "plan: {} edges, {} to repair, {} repair-metres over {} m of road",
        summary.plan_edges,
        summary.plan.repair_edges,
        fixed(summary.total_cost, 3),
        fixed(summary.repair_length_m, 3)
    );
    if let Some(s) = &summary.sites {
        reknit::say!(
            "sites: {} of {} joined to the hub; lower bound {} repair-metres ({})",
            s.joined_to_hub,
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
        for u in &s.not_joined {
            reknit::say!(
                "  {} {}: {}",
                terminal(&u.id),
                u.status_label,
                terminal(&u.reason)
            );
        }
        if let Some(n) = &s.note {
            reknit::say!("  note: {}", terminal(n));
        }
    }
    if let Some(f) = &summary.single_failures {
        reknit::say!(
            "single failures: {} road(s) with no way round would each cut sites off the hub; {} of \
             {} site(s) checked depend on one (single-failures.geojson){}",
            f.roads_cutting_off_sites,
            f.sites_with_a_single_failure,
            f.sites_checked,
            summary
                .backup
                .as_ref()
                .and_then(|b| b.single_failures_after.as_ref())
                .map_or(String::new(), |a| format!(
                    "; with the backup links, {} (no way round is possible for them)",
                    a.sites_with_a_single_failure
                ))
        );
    }
    if let Some(st) = summary.structures.as_ref().filter(|st| st.planned > 0) {
        reknit::say!(
            "structures: {} planned road(s) on a bridge, culvert or tunnel ({} to repair): inspect before use",
            st.planned,
            st.repairs
        );
    }
    reknit::say!("outputs written to {}", out.display());
    print_cautions(summary.attribution.as_deref());
}

/// Prints the cautions paragraph (the text of the picture's band) and any attribution.
pub fn print_cautions(attribution: Option<&str>) {
    reknit::say!("{}", reknit::cautions::SHORT);
    if let Some(a) = attribution {
        reknit::say!("{}", terminal(a));
    }
}
