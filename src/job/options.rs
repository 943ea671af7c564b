//! The options of a planning run as the user gave them, before any check: the command line and
//! the manifest keys both fill an [`Options`], and [`super::settings::build`] alone turns it into
//! the checked, typed [`super::PlanJob`].

use crate::ingest::source::Source;
use crate::solve::MstAlgorithm;
use crate::solve::steiner::Effort;
use std::path::PathBuf;

/// Options of reading roads and building the network (all that `check` takes).
#[derive(Debug, Clone)]
pub struct RoadOptions {
    /// `--snap`, metres.
    pub snap_m: f64,
    /// `--damage-field`.
    pub damage_field: String,
    /// `--default-damage` (negative: closed).
    pub default_damage: f64,
    /// `--closed-value`; it applies to zones and reports too.
    pub closed_value: String,
    /// `--id-field`.
    pub id_field: Option<String>,
    /// `--crs`, as written (`EPSG:NNNN`).
    pub crs: Option<String>,
    /// `--roads-layer`: the layer of a GeoPackage holding several.
    pub roads_layer: Option<String>,
    /// `--category-field`.
    pub category_field: Option<String>,
    /// `--cost-table`: the file, read by `build`.
    pub cost_table: Option<PathBuf>,
    /// `--keep-where` texts, `FIELD=V1,V2` each.
    pub keep_where: Vec<String>,
    /// `--drop-where` texts, `FIELD=V1,V2` each.
    pub drop_where: Vec<String>,
    /// `--node-crossings`.
    pub node_crossings: bool,
    /// `--structure-field`.
    pub structure_field: Option<String>,
    /// `--attribution`.
    pub attribution: Option<String>,
}

impl Default for RoadOptions {
    fn default() -> Self {
        RoadOptions {
            snap_m: 0.5,
            damage_field: "damage".into(),
            default_damage: 1.0,
            closed_value: "closed".into(),
            id_field: None,
            crs: None,
            roads_layer: None,
            category_field: None,
            cost_table: None,
            keep_where: Vec::new(),
            drop_where: Vec::new(),
            node_crossings: false,
            structure_field: None,
            attribution: None,
        }
    }
}

/// How one field reports file is read, as given: its `--damage-points-crs`, `-delimiter`,
/// `-layer`, `-lon-column` and `-lat-column`.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct ReportOptions {
    /// The layer's CRS (`EPSG:NNNN`).
    pub crs: Option<String>,
    /// The CSV separator: `,`, `;` or `tab`.
    pub delimiter: Option<String>,
    /// The GeoPackage layer or zipped set.
    pub layer: Option<String>,
    /// The CSV longitude column.
    pub lon_column: Option<String>,
    /// The CSV latitude column.
    pub lat_column: Option<String>,
}

/// Every option of `reknit plan` (and of a manifest district). Options that only mean something
/// with another input (`--max-attach` with `--sites`, `--point-match-distance` with `--damage-points`)
/// are `None` unless given, so that giving one without its input can be refused.
#[derive(Debug, Clone)]
pub struct Options {
    /// `--roads` (the first, when given more than once).
    pub roads: Source,
    /// `--roads` given again: further road layers read into the same network.
    pub more_roads: Vec<Source>,
    /// `--out`.
    pub out: PathBuf,
    /// `--force`.
    pub force: bool,
    /// `--name`.
    pub name: Option<String>,
    /// Reading and noding.
    pub road: RoadOptions,
    /// `--damage-zones`.
    pub damage_zones: Option<Source>,
    /// `--zone-damage-field` (default `damage`).
    pub zone_damage_field: Option<String>,
    /// `--damage-points-field` (default `damage`).
    pub damage_points_field: Option<String>,
    /// `--zones-crs`.
    pub zones_crs: Option<String>,
    /// `--damage-points`.
    pub damage_points: Option<Source>,
    /// `--point-match-distance`, metres (default 50).
    pub point_match_distance_m: Option<f64>,
    /// `--damage-points-crs`.
    pub damage_points_crs: Option<String>,
    /// `--damage-points-delimiter`: `,`, `;` or `tab` (default: told from the header line).
    pub damage_points_delimiter: Option<String>,
    /// `--damage-points-layer`.
    pub damage_points_layer: Option<String>,
    /// `--damage-points-lon-column`: the CSV field reports' longitude column.
    pub damage_points_lon_column: Option<String>,
    /// `--damage-points-lat-column`: the CSV field reports' latitude column.
    pub damage_points_lat_column: Option<String>,
    /// `--budget`, repair-metres.
    pub budget: Option<f64>,
    /// `--redundancy`.
    pub redundancy: bool,
    /// `--crew-capacity`, repair-metres per day.
    pub crew_capacity: Option<f64>,
    /// `--crews` (default 1; needs `--crew-capacity`).
    pub crews: Option<u32>,
    /// `--max-detour`: the longest corridor, as a multiple of the undamaged trip.
    pub max_detour: Option<f64>,
    /// `--mst` (default Kruskal).
    pub mst: Option<MstAlgorithm>,
    /// `--sites`.
    pub sites: Option<Source>,
    /// `--max-attach`, metres (default 250).
    pub max_attach_m: Option<f64>,
    /// `--hub`.
    pub hub: Option<String>,
    /// `--whole-network`.
    pub whole_network: bool,
    /// `--effort` (default normal).
    pub effort: Option<Effort>,
    /// `--time-limit`, seconds: the exact search runs on the clock instead of its step budget.
    pub time_limit_s: Option<f64>,
    /// `--site-id-field`.
    pub site_id_field: Option<String>,
    /// `--site-name-field`.
    pub site_name_field: Option<String>,
    /// `--priority-field`.
    pub priority_field: Option<String>,
    /// `--lon-column`.
    pub lon_column: Option<String>,
    /// `--lat-column`.
    pub lat_column: Option<String>,
    /// `--sites-crs`.
    pub sites_crs: Option<String>,
    /// `--sites-delimiter`: `,`, `;` or `tab` (default: told from the header line).
    pub sites_delimiter: Option<String>,
    /// `--sites-layer`: the layer of a GeoPackage sites file holding several.
    pub sites_layer: Option<String>,
    /// `--zones-layer`: the layer of a GeoPackage damage-zones file holding several.
    pub zones_layer: Option<String>,
    /// Damage points of earlier rounds (`reknit replan`), applied before the finished work and
    /// before `damage_points`, which a re-plan fills only with points given anew.
    pub earlier_damage_points: Vec<Source>,
    /// How each of `earlier_damage_points` is read, as its own round read it (`reknit replan`);
    /// empty: every reports file is read with this run's `--damage-points-*` options.
    pub earlier_damage_points_read: Vec<ReportOptions>,
    /// What crews did since the previous plan (`reknit replan` only; `None` for a first plan).
    pub field_work: Option<std::sync::Arc<crate::replan::FieldWork>>,
    /// `--site-tags` texts, `KEY=V1,V2` each (sites of an OpenStreetMap extract).
    pub site_tags: Vec<String>,
    /// `--output-format` (default GeoJSON).
    pub output_format: crate::export::sink::OutputFormat,
}

impl Options {
    /// Options with every default, for the given roads and output folder.
    pub fn new(roads: Source, out: PathBuf) -> Options {
        Options {
            roads,
            more_roads: Vec::new(),
            out,
            force: false,
            name: None,
            road: RoadOptions::default(),
            damage_zones: None,
            zone_damage_field: None,
            damage_points_field: None,
            zones_crs: None,
            damage_points: None,
            point_match_distance_m: None,
            damage_points_crs: None,
            damage_points_delimiter: None,
            damage_points_layer: None,
            damage_points_lon_column: None,
            damage_points_lat_column: None,
            budget: None,
            redundancy: false,
            crew_capacity: None,
            crews: None,
            max_detour: None,
            mst: None,
            sites: None,
            max_attach_m: None,
            hub: None,
            whole_network: false,
            effort: None,
            time_limit_s: None,
            site_id_field: None,
            site_name_field: None,
            priority_field: None,
            lon_column: None,
            lat_column: None,
            sites_crs: None,
            sites_delimiter: None,
            sites_layer: None,
            zones_layer: None,
            earlier_damage_points: Vec::new(),
            earlier_damage_points_read: Vec::new(),
            field_work: None,
            site_tags: Vec::new(),
            output_format: Default::default(),
        }
    }
}
