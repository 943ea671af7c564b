//! The options that mean nothing without an input or a kind of plan: one table of (option, what
//! it needs, why), read by one loop ([`unmet`]). A run that gives such an option without what it
//! needs is refused rather than recording the option and ignoring it.

use super::options::Options;
use crate::ingest::reader::Format;
use crate::ingest::sites::reads_as_csv;
use crate::ingest::source::Source;

/// What an option needs to mean something.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Needs {
    /// A sites layer (`--sites`).
    Sites,
    /// A CSV sites file (`.csv` or `.txt`).
    CsvSites,
    /// A sites file holding layers (GeoPackage or zipped Shapefile).
    LayeredSites,
    /// Sites from an OpenStreetMap extract.
    OsmSites,
    /// A sites plan: `--sites` and not `--whole-network`.
    SitesPlan,
    /// A whole-network plan: no sites, or `--whole-network`.
    WholeNetworkPlan,
    /// Field reports (`--damage-points`, or a re-plan's earlier ones).
    Points,
    /// A CSV field reports file.
    CsvPoints,
    /// A field reports file holding layers.
    LayeredPoints,
    /// Damage zones (`--damage-zones`).
    Zones,
    /// A GeoPackage damage-zones file.
    GpkgZones,
    /// A road file holding layers.
    LayeredRoads,
    /// A crew capacity (`--crew-capacity`).
    CrewCapacity,
}

/// One option that needs an input: its flag, whether a run gives it, what it needs and the
/// message that refuses it without.
pub struct Rule {
    /// The option's flag.
    pub option: &'static str,
    /// True when the options give it.
    pub given: fn(&Options) -> bool,
    /// What it needs.
    pub needs: Needs,
    /// What the refusal says.
    pub why: &'static str,
}

const fn rule(
    option: &'static str,
    given: fn(&Options) -> bool,
    needs: Needs,
    why: &'static str,
) -> Rule {
    Rule {
        option,
        given,
        needs,
        why,
    }
}

const SITES: &str = "this option is about the sites layer: give --sites";
const COLUMNS: &str = "only a CSV sites file (.csv or .txt) has coordinate columns; other sites \
                       are read by their geometry";
const REPORT_COLUMNS: &str = "only a CSV damage reports file (.csv or .txt) has coordinate \
                              columns; other reports are read by their geometry";
const SITES_PLAN: &str =
    "this option is about a sites plan: give --sites (and not --whole-network)";

use Needs::*;

/// Every option that needs an input, in the order they are checked (the first unmet one is the
/// refusal).
pub const RULES: &[Rule] = &[
    rule(
        "--damage-points-crs",
        |o| o.damage_points_crs.is_some(),
        Points,
        "this is the field reports' CRS: give --damage-points",
    ),
    rule(
        "--damage-points-delimiter",
        |o| o.damage_points_delimiter.is_some(),
        CsvPoints,
        "only a CSV damage reports file (.csv or .txt) has a field separator",
    ),
    rule(
        "--damage-points-layer",
        |o| o.damage_points_layer.is_some(),
        LayeredPoints,
        "only a GeoPackage or zipped Shapefile damage reports file (--damage-points FILE.gpkg \
         or FILE.zip) holds layers to choose from",
    ),
    rule(
        "--damage-points-lon-column",
        |o| o.damage_points_lon_column.is_some(),
        CsvPoints,
        REPORT_COLUMNS,
    ),
    rule(
        "--damage-points-lat-column",
        |o| o.damage_points_lat_column.is_some(),
        CsvPoints,
        REPORT_COLUMNS,
    ),
    rule(
        "--sites-delimiter",
        |o| o.sites_delimiter.is_some(),
        CsvSites,
        "only a CSV sites file (.csv or .txt) has a field separator",
    ),
    rule(
        "--sites-layer",
        |o| o.sites_layer.is_some(),
        LayeredSites,
        "only a GeoPackage or zipped Shapefile sites file (--sites FILE.gpkg or FILE.zip) holds \
         layers to choose from",
    ),
    rule(
        "--zones-layer",
        |o| o.zones_layer.is_some(),
        GpkgZones,
        "only a GeoPackage damage-zones file (--damage-zones FILE.gpkg) holds layers to choose \
         from",
    ),
    rule(
        "--roads-layer",
        |o| o.road.roads_layer.is_some(),
        LayeredRoads,
        "only a GeoPackage or zipped Shapefile road file (--roads FILE.gpkg or FILE.zip) holds \
         layers to choose from",
    ),
    rule(
        "--site-tags",
        |o| !o.site_tags.is_empty(),
        OsmSites,
        "only sites from an OpenStreetMap extract (--sites FILE.osm.pbf) are chosen by tag",
    ),
    rule(
        "--hub",
        |o| o.hub.is_some(),
        Sites,
        "the hub is one of the sites: give --sites",
    ),
    rule("--max-attach", |o| o.max_attach_m.is_some(), Sites, SITES),
    rule(
        "--site-id-field",
        |o| o.site_id_field.is_some(),
        Sites,
        SITES,
    ),
    rule(
        "--site-name-field",
        |o| o.site_name_field.is_some(),
        Sites,
        SITES,
    ),
    rule(
        "--priority-field",
        |o| o.priority_field.is_some(),
        Sites,
        SITES,
    ),
    rule("--sites-crs", |o| o.sites_crs.is_some(), Sites, SITES),
    rule(
        "--lon-column",
        |o| o.lon_column.is_some(),
        CsvSites,
        COLUMNS,
    ),
    rule(
        "--lat-column",
        |o| o.lat_column.is_some(),
        CsvSites,
        COLUMNS,
    ),
    rule(
        "--redundancy",
        |o| o.redundancy,
        SitesPlan,
        "backup links join sites to the hub: give --sites (and not --whole-network)",
    ),
    rule(
        "--budget",
        |o| o.budget.is_some(),
        SitesPlan,
        "a budget chooses which sites to join first: give --sites (and not --whole-network)",
    ),
    rule("--effort", |o| o.effort.is_some(), SitesPlan, SITES_PLAN),
    rule(
        "--crews",
        |o| o.crews.is_some(),
        CrewCapacity,
        "crews share out the days of work: give --crew-capacity",
    ),
    rule(
        "--max-detour",
        |o| o.max_detour.is_some(),
        SitesPlan,
        "corridors run from the hub to the sites: give --sites (and not --whole-network)",
    ),
    rule(
        "--time-limit",
        |o| o.time_limit_s.is_some(),
        SitesPlan,
        SITES_PLAN,
    ),
    rule(
        "--mst",
        |o| o.mst.is_some(),
        WholeNetworkPlan,
        "the algorithm is for the whole-network plan; with --sites the plan is a Steiner tree: \
         give --whole-network, or leave --mst out",
    ),
    rule(
        "--zones-crs",
        |o| o.zones_crs.is_some(),
        Zones,
        "this is the damage zones' CRS: give --damage-zones",
    ),
    rule(
        "--point-match-distance",
        |o| o.point_match_distance_m.is_some(),
        Points,
        "this is how far a field report may lie from its road: give --damage-points",
    ),
    rule(
        "--damage-points-field",
        |o| o.damage_points_field.is_some(),
        Points,
        "this field is read from the field reports: give --damage-points",
    ),
    rule(
        "--zone-damage-field",
        |o| o.zone_damage_field.is_some(),
        Zones,
        "this field is read from the damage zones: give --damage-zones (field reports have \
         --damage-points-field)",
    ),
];

/// True when the run has what `needs` names.
pub fn has(o: &Options, needs: Needs) -> bool {
    let sites = o.sites.as_ref();
    // Replan reads the earlier rounds' reports again with the same choices.
    let mut reports = o.damage_points.iter().chain(&o.earlier_damage_points);
    let layered = |s: &Source| Format::of(s).has_layers();
    match needs {
        Sites => sites.is_some(),
        CsvSites => sites.is_some_and(reads_as_csv),
        LayeredSites => sites.is_some_and(layered),
        OsmSites => sites.is_some_and(|s| Format::of(s) == Format::OsmPbf),
        SitesPlan => sites.is_some() && !o.whole_network,
        WholeNetworkPlan => sites.is_none() || o.whole_network,
        Points => reports.next().is_some(),
        CsvPoints => reports.any(reads_as_csv),
        LayeredPoints => reports.any(layered),
        Zones => o.damage_zones.is_some(),
        GpkgZones => o
            .damage_zones
            .as_ref()
            .is_some_and(|s| Format::of(s) == Format::GeoPackage),
        LayeredRoads => std::iter::once(&o.roads).chain(&o.more_roads).any(layered),
        CrewCapacity => o.crew_capacity.is_some(),
    }
}

/// The options given that this run would ignore, by flag, each with what it needs.
pub fn unmet(o: &Options) -> impl Iterator<Item = (&'static str, &'static str)> + '_ {
    RULES
        .iter()
        .filter(|r| (r.given)(o) && !has(o, r.needs))
        .map(|r| (r.option, r.why))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::batch::values::{Kind, from_cell};
    use crate::ingest::IngestError;
    use std::path::{Path, PathBuf};

    /// Options of a run on GeoJSON roads that gives `option` (through its manifest key, as the
    /// flag would) and lacks what it needs.
    fn giving(option: &str, needs: Needs) -> crate::job::Options {
        let mut o = crate::job::Options::new(
            Source::File(PathBuf::from("roads.geojson")),
            PathBuf::from("out"),
        );
        if needs == WholeNetworkPlan {
            o.sites = Some(Source::File(PathBuf::from("sites.geojson")));
        }
        let key = crate::batch::keys::find(&option[2..].replace('-', "_"))
            .unwrap_or_else(|| panic!("{option} is no manifest key"));
        let cell = match key.kind {
            Kind::Number => "1",
            Kind::Bool => "true",
            Kind::Choice(words) => words[0],
            Kind::Filters => "highway=hospital",
            _ => "x",
        };
        let value = from_cell(key.kind, cell, Path::new(".")).unwrap();
        (key.set)(&mut o, &value).unwrap();
        o
    }

    #[test]
    fn each_rule_refuses_its_option_without_what_it_needs() {
        for r in RULES {
            let o = giving(r.option, r.needs);
            assert!((r.given)(&o), "{} not seen as given", r.option);
            assert!(!has(&o, r.needs), "{}", r.option);
            match crate::job::settings::build(&o) {
                Err(IngestError::Setting { name, message }) => {
                    assert_eq!((name, message.as_str()), (r.option, r.why));
                }
                other => panic!("{} was not refused: {other:?}", r.option),
            }
        }
    }

    #[test]
    fn every_layer_option_is_in_the_table() {
        // The manifest keys are the `reknit plan` flags (tests/batch_keys.rs checks them against
        // `plan --help`): each option about one input's CRS, layer, separator or columns means
        // nothing without that input, so it must have a rule. `--crs` is the roads' (always
        // given).
        let suffixes = ["_crs", "_layer", "_delimiter", "_column"];
        let mut checked = Vec::new();
        for key in crate::batch::keys::KEYS {
            if key.name != "crs" && suffixes.iter().any(|s| key.name.ends_with(s)) {
                let flag = format!("--{}", key.name.replace('_', "-"));
                assert!(
                    RULES.iter().any(|r| r.option == flag),
                    "{flag} has no rule in job::needs::RULES"
                );
                checked.push(flag);
            }
        }
        // The suffixes do find the options of every kind of layer.
        for flag in [
            "--sites-crs",
            "--zones-layer",
            "--damage-points-delimiter",
            "--lon-column",
        ] {
            assert!(checked.iter().any(|c| c == flag), "{flag}: {checked:?}");
        }
    }
}
