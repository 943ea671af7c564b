//! The record of a job's settings in `summary.json` (and in its fingerprint).

use super::PlanJob;

/// Every setting of a job that can change its outputs, as recorded in `summary.json`; a setting
/// this run has no use for (the spanning-forest algorithm of a sites plan, the reach of reports
/// not given) is `null`, so the record never names a value that played no part.
pub fn settings_json(job: &PlanJob) -> serde_json::Value {
    let s = &job.road_settings;
    let ss = &job.site_settings;
    let sites_plan = job.sites.is_some() && !job.whole_network;
    let when = |used: bool, v: serde_json::Value| if used { v } else { serde_json::Value::Null };
    let evidence = job.zones.is_some() || job.has_reports();
    let mut all = serde_json::json!({
        "name": job.name,
        "snap_m": s.snap_m,
        "damage_field": when(s.category_field.is_none(), s.damage.field.clone().into()),
        "default_damage": s.damage.default,
        "closed_value": when(s.category_field.is_none() || evidence, s.damage.closed_value.clone().into()),
        "id_field": s.id_field,
        "mst": when(!sites_plan, job.mst.name().into()),
        "max_attach_m": when(job.sites.is_some(), job.max_attach_m.into()),
        "hub": job.hub,
        "whole_network": job.whole_network,
        "effort": when(sites_plan, job.effort.name().into()),
        "time_limit_s": when(sites_plan, job.time_limit_s.into()),
        "site_id_field": ss.id_field,
        "site_name_field": ss.name_field,
        "priority_field": ss.priority_field,
        "site_tags": ss.osm_tags.iter().map(|f| format!("{}={}", f.field, f.values.join(","))).collect::<Vec<_>>(),
        "lon_column": ss.lon_column,
        "lat_column": ss.lat_column,
        "crs": s.crs,
        "roads_layer": s.layer,
        "node_crossings": s.node_crossings,
        "zone_damage_field": when(job.zones.is_some(), job.zone_damage.field.clone().into()),
        "damage_points_field": when(job.has_reports(), job.report_damage.field.clone().into()),
        "zones_crs": job.zones_crs,
        "point_match_distance_m": when(job.has_reports(), job.point_match_distance_m.into()),
        "crew_capacity": job.crew_capacity,
        "crews": when(job.crew_capacity.is_some(), job.crews.into()),
        "max_detour": job.max_detour,
        "budget": job.budget,
        "redundancy": job.redundancy,
        "category_field": s.category_field,
        "cost_table": {
            "categories": when(s.category_field.is_some(), s.cost_table.categories.iter().map(|(k, v)| (k.clone(), match v.factor() {
                Some(f) => serde_json::json!(f),
                None => serde_json::json!("closed"),
            })).collect::<serde_json::Map<_, _>>().into()),
            "class_field": s.cost_table.class_field,
            "class_rates": s.cost_table.class_rates,
            "class_default": s.cost_table.class_default,
        },
        "filters": s.filters.iter().map(|f| format!("{} {}={}", if f.keep { "keep" } else { "drop" }, f.field, f.values.join(","))).collect::<Vec<_>>(),
        "sites_crs": ss.crs,
        "sites_delimiter": ss.delimiter.map(crate::ingest::sites_csv::delimiter_name),
        "sites_layer": ss.layer,
        "zones_layer": job.zones_layer,
        "structure_field": s.structure_field,
        "attribution": s.attribution,
        "output_format": job.output_format.name(),
    });
    // Apart: one macro call this long reaches the compiler's recursion limit.
    let r = &job.report_settings;
    let reports = serde_json::json!({
        "damage_points_crs": r.crs,
        "damage_points_delimiter": r.delimiter.map(crate::ingest::sites_csv::delimiter_name),
        "damage_points_layer": r.layer,
        "damage_points_lon_column": r.lon_column,
        "damage_points_lat_column": r.lat_column,
        // How each earlier round's reports file was read, in the order of the inputs.
        "damage_points_earlier": when(
            !job.earlier_reports.is_empty(),
            job.earlier_reports
                .iter()
                .enumerate()
                .map(|(i, _)| report_json(job.earlier_report_settings.get(i).unwrap_or(r)))
                .collect::<Vec<_>>()
                .into(),
        ),
    });
    if let (Some(all), serde_json::Value::Object(more)) = (all.as_object_mut(), reports) {
        all.extend(more);
    }
    all
}

/// How one reports file is read, as [`crate::replan::restore`] reads it back.
fn report_json(r: &crate::ingest::reports::ReportSettings) -> serde_json::Value {
    serde_json::json!({
        "crs": r.crs,
        "delimiter": r.delimiter.map(crate::ingest::sites_csv::delimiter_name),
        "layer": r.layer,
        "lon_column": r.lon_column,
        "lat_column": r.lat_column,
    })
}
