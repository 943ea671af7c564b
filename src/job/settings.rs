//! The settings of a job: every option checked once, before any input is read, into the typed
//! [`PlanJob`] the stages take (their record in `summary.json` is [`super::record`]).
//!
//! [`build`] is the only way to a `PlanJob`: `reknit plan`, `reknit demo` and every manifest
//! district fill an [`Options`] and call it, so a setting is read and checked the same way wherever
//! it is given. [`road_settings`] is its part for `reknit check`.

use super::options::{Options, ReportOptions, RoadOptions};
use super::{Checked, MAX_ATTACH_LIMIT_M, PlanJob};
use crate::decimal::shown;
use crate::ingest::reports::ReportSettings;

/// Longest `--time-limit`, seconds (a week): a clock so far out is a mistake, not a plan.
pub const MAX_TIME_LIMIT_S: f64 = 604_800.0;
use crate::ingest::cost_table::{CostTable, RoadFilter};
use crate::ingest::crs::Crs;
use crate::ingest::damage::DamageRule;
use crate::ingest::sites::SiteSettings;
use crate::ingest::{IngestError, RoadSettings};

fn refuse(name: &'static str, message: impl Into<String>) -> IngestError {
    IngestError::Setting {
        name,
        message: message.into(),
    }
}

/// A CRS option parsed now, so a wrong code is refused before any work rather than when its layer
/// is read.
fn check_crs(name: &'static str, crs: Option<&str>) -> Result<(), IngestError> {
    match crs {
        Some(c) => Crs::from_user(c).map(|_| ()).map_err(|m| refuse(name, m)),
        None => Ok(()),
    }
}

/// Reading and noding settings from their options, for `reknit check`: options it would ignore
/// refused, filters parsed, the cost table read, every range checked.
pub fn road_settings(o: &RoadOptions) -> Result<RoadSettings, IngestError> {
    if let Some((name, why)) = road_ignored(o, false).into_iter().next() {
        return Err(refuse(name, why));
    }
    typed_road_settings(o)
}

/// The road options given that the reading would ignore: the damage field and closed value
/// when damage comes from a category (unless zones or reports read the closed value).
fn road_ignored(o: &RoadOptions, later_damage: bool) -> Vec<(&'static str, &'static str)> {
    let category = o.category_field.is_some();
    let mut out = Vec::new();
    if category && o.damage_field != "damage" {
        out.push((
            "--damage-field",
            "with --category-field the damage comes from the category: leave one of them out",
        ));
    }
    if category && o.closed_value != "closed" && !later_damage {
        out.push((
            "--closed-value",
            "with --category-field a road is closed by its category (\"closed\" in the cost \
             table): leave --closed-value out",
        ));
    }
    out
}

/// Reading and noding settings from options already found to apply.
fn typed_road_settings(o: &RoadOptions) -> Result<RoadSettings, IngestError> {
    let cost_table =
        CostTable::from_file(o.cost_table.as_deref()).map_err(|m| refuse("--cost-table", m))?;
    let mut filters = Vec::new();
    for (list, keep, name) in [
        (&o.keep_where, true, "--keep-where"),
        (&o.drop_where, false, "--drop-where"),
    ] {
        for f in list {
            filters.push(RoadFilter::parse(f, keep).map_err(|m| refuse(name, m))?);
        }
    }
    // A table without [categories] keeps the documented default ones: only its own are refused
    // (a copy of the defaults changes nothing either way).
    if o.cost_table.is_some()
        && !cost_table.categories.is_empty()
        && cost_table.categories != CostTable::default().categories
        && o.category_field.is_none()
    {
        return Err(refuse(
            "--cost-table",
            "its [categories] are read only with --category-field (the damage field holds \
             factors): give --category-field, or leave [categories] out",
        ));
    }
    check_crs("--crs", o.crs.as_deref())?;
    let s = RoadSettings {
        snap_m: o.snap_m,
        damage: DamageRule {
            field: o.damage_field.clone(),
            default: o.default_damage,
            closed_value: o.closed_value.clone(),
        },
        id_field: o.id_field.clone(),
        crs: o.crs.clone(),
        layer: o.roads_layer.clone(),
        node_crossings: o.node_crossings,
        category_field: o.category_field.clone(),
        cost_table,
        cost_table_file: o.cost_table.clone(),
        filters,
        structure_field: o.structure_field.clone(),
        attribution: o.attribution.clone(),
    };
    s.validate()?;
    Ok(s)
}

/// Checks the options and turns them into the job every stage reads; the error names the
/// setting by its flag (the manifest names it by its key).
pub fn build(o: &Options) -> Result<PlanJob, IngestError> {
    needs_input(o)?;
    typed(o)
}

/// Checks every value's range and form, leaving aside whether this run uses it: a manifest checks
/// its `[defaults]` this way before leaving out those a district has no use for.
pub fn check_values(o: &Options) -> Result<(), IngestError> {
    typed(o).map(|_| ())
}

/// The typed job, every value checked (the options found to apply).
fn typed(o: &Options) -> Result<PlanJob, IngestError> {
    let road_settings = typed_road_settings(&o.road)?;
    check_crs("--zones-crs", o.zones_crs.as_deref())?;
    check_crs("--sites-crs", o.sites_crs.as_deref())?;
    check_crs("--damage-points-crs", o.damage_points_crs.as_deref())?;
    let job = PlanJob {
        roads: o.roads.clone(),
        more_roads: o.more_roads.clone(),
        sites: o.sites.clone(),
        out: o.out.clone(),
        force: o.force,
        road_settings,
        site_settings: SiteSettings {
            id_field: o.site_id_field.clone(),
            name_field: o.site_name_field.clone(),
            priority_field: o.priority_field.clone(),
            lon_column: o.lon_column.clone(),
            lat_column: o.lat_column.clone(),
            crs: o.sites_crs.clone(),
            delimiter: o
                .sites_delimiter
                .as_deref()
                .map(crate::ingest::sites_csv::parse_delimiter)
                .transpose()
                .map_err(|m| refuse("--sites-delimiter", m))?,
            layer: o.sites_layer.clone(),
            osm_tags: o
                .site_tags
                .iter()
                .map(|t| RoadFilter::parse(t, true).map_err(|m| refuse("--site-tags", m)))
                .collect::<Result<_, _>>()?,
        },
        max_attach_m: o.max_attach_m.unwrap_or(250.0),
        hub: o.hub.clone(),
        whole_network: o.whole_network,
        mst: o.mst.unwrap_or_default(),
        effort: o.effort.unwrap_or(crate::solve::steiner::Effort::Normal),
        time_limit_s: o.time_limit_s,
        zones: o.damage_zones.clone(),
        // Zones and reports read "closed" as the roads do; one without a value counts as 1.0.
        zone_damage: DamageRule {
            field: o
                .zone_damage_field
                .clone()
                .unwrap_or_else(|| "damage".into()),
            default: 1.0,
            closed_value: o.road.closed_value.clone(),
        },
        report_damage: DamageRule {
            field: o
                .damage_points_field
                .clone()
                .unwrap_or_else(|| "damage".into()),
            default: 1.0,
            closed_value: o.road.closed_value.clone(),
        },
        report_settings: report_settings(&ReportOptions {
            crs: o.damage_points_crs.clone(),
            delimiter: o.damage_points_delimiter.clone(),
            layer: o.damage_points_layer.clone(),
            lon_column: o.damage_points_lon_column.clone(),
            lat_column: o.damage_points_lat_column.clone(),
        })?,
        earlier_report_settings: o
            .earlier_damage_points_read
            .iter()
            .map(report_settings)
            .collect::<Result<_, _>>()?,
        zones_crs: o.zones_crs.clone(),
        zones_layer: o.zones_layer.clone(),
        reports: o.damage_points.clone(),
        point_match_distance_m: o.point_match_distance_m.unwrap_or(50.0),
        crew_capacity: o.crew_capacity,
        crews: o.crews.unwrap_or(1),
        max_detour: o.max_detour,
        name: o.name.clone(),
        budget: o.budget,
        redundancy: o.redundancy,
        earlier_reports: o.earlier_damage_points.clone(),
        field_work: o.field_work.clone(),
        output_format: o.output_format,
        _checked: Checked(()),
    };
    ranges(&job)?;
    Ok(job)
}

/// How a field reports file is read, its options checked.
fn report_settings(r: &ReportOptions) -> Result<ReportSettings, IngestError> {
    check_crs("--damage-points-crs", r.crs.as_deref())?;
    Ok(ReportSettings {
        crs: r.crs.clone(),
        delimiter: r
            .delimiter
            .as_deref()
            .map(crate::ingest::sites_csv::parse_delimiter)
            .transpose()
            .map_err(|m| refuse("--damage-points-delimiter", m))?,
        layer: r.layer.clone(),
        lon_column: r.lon_column.clone(),
        lat_column: r.lat_column.clone(),
    })
}

/// Refuses options that only mean something with an input or a kind of plan this run does not
/// have: they would be accepted, recorded in `summary.json` and ignored.
fn needs_input(o: &Options) -> Result<(), IngestError> {
    match ignored(o).into_iter().next() {
        Some((name, why)) => Err(refuse(name, why)),
        None => Ok(()),
    }
}

/// The options given that this run would ignore, by flag, each with what it needs (the road
/// options' own rules, then the table of [`super::needs::RULES`]).
pub fn ignored(o: &Options) -> Vec<(&'static str, &'static str)> {
    let points = o.damage_points.is_some() || !o.earlier_damage_points.is_empty();
    let later_damage = o.damage_zones.is_some() || points;
    road_ignored(&o.road, later_damage)
        .into_iter()
        .chain(super::needs::unmet(o))
        .collect()
}

/// Most crews: far more than any district fields, and each crew is simulated.
const MAX_CREWS: u32 = 1000;

/// Checks every number's range.
fn ranges(job: &PlanJob) -> Result<(), IngestError> {
    if !(job.max_attach_m.is_finite()
        && job.max_attach_m >= 0.0
        && job.max_attach_m <= MAX_ATTACH_LIMIT_M)
    {
        return Err(refuse(
            "--max-attach",
            format!(
                "{} m is outside 0 to {MAX_ATTACH_LIMIT_M} m",
                shown(job.max_attach_m)
            ),
        ));
    }
    if let Some(b) = job.budget
        && !(b.is_finite() && b >= 0.0)
    {
        return Err(refuse(
            "--budget",
            format!("{} repair-metres is not a number ≥ 0", shown(b)),
        ));
    }
    if let Some(t) = job.time_limit_s
        && !(t.is_finite() && t > 0.0 && t <= MAX_TIME_LIMIT_S)
    {
        return Err(refuse(
            "--time-limit",
            format!(
                "{} seconds is not a number above 0 and at most {MAX_TIME_LIMIT_S}",
                shown(t)
            ),
        ));
    }
    if let Some(c) = job.crew_capacity
        && !(c.is_finite() && c >= 0.0005)
    {
        return Err(refuse(
            "--crew-capacity",
            format!(
                "{} repair-metres per day is not a positive number of at least 0.001 (costs are \
                 counted in thousandths)",
                shown(c)
            ),
        ));
    }
    if !(1..=MAX_CREWS).contains(&job.crews) {
        return Err(refuse(
            "--crews",
            format!("{} crews is outside 1 to {MAX_CREWS}", job.crews),
        ));
    }
    if let Some(r) = job.max_detour
        && !(r.is_finite() && r >= 1.0)
    {
        return Err(refuse(
            "--max-detour",
            format!(
                "{} is not a number ≥ 1 (a corridor is never shorter than the undamaged trip)",
                shown(r)
            ),
        ));
    }
    if !(job.point_match_distance_m.is_finite()
        && (0.0..=MAX_ATTACH_LIMIT_M).contains(&job.point_match_distance_m))
    {
        return Err(refuse(
            "--point-match-distance",
            format!(
                "{} m is outside 0 to {MAX_ATTACH_LIMIT_M} m",
                shown(job.point_match_distance_m)
            ),
        ));
    }
    Ok(())
}
