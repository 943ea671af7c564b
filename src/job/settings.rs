//! The settings of a job: checked before any input is read, and recorded in `summary.json`.

use super::{MAX_ATTACH_LIMIT_M, PlanJob};
use crate::ingest::IngestError;

/// Checks every setting's range and combination before any input is read; the error names the
/// setting by its flag.
pub fn validate(job: &PlanJob) -> Result<(), IngestError> {
    job.road_settings.validate()?;
    if !(job.max_attach_m.is_finite()
        && job.max_attach_m >= 0.0
        && job.max_attach_m <= MAX_ATTACH_LIMIT_M)
    {
        return Err(IngestError::Setting {
            name: "--max-attach",
            message: format!(
                "{} m is outside 0 to {MAX_ATTACH_LIMIT_M} m",
                job.max_attach_m
            ),
        });
    }

    if let Some(b) = job.budget
        && !(b.is_finite() && b >= 0.0)
    {
        return Err(IngestError::Setting {
            name: "--budget",
            message: format!("{b} repair-metres is not a number ≥ 0"),
        });
    }
    if job.redundancy && (job.sites.is_none() || job.whole_network) {
        return Err(IngestError::Setting {
            name: "--redundancy",
            message: "backup links join sites to the hub: give --sites (and not --whole-network)"
                .into(),
        });
    }
    if job.budget.is_some() && (job.sites.is_none() || job.whole_network) {
        return Err(IngestError::Setting {
            name: "--budget",
            message:
                "a budget chooses which sites to join first: give --sites (and not --whole-network)"
                    .into(),
        });
    }
    if job.hub.is_some() && job.sites.is_none() {
        return Err(IngestError::Setting {
            name: "--hub",
            message: "the hub is one of the sites: give --sites".into(),
        });
    }
    if let Some(c) = job.crew_capacity
        && !(c.is_finite() && c >= 0.0005)
    {
        return Err(IngestError::Setting {
            name: "--crew-capacity",
            message: format!(
                "{c} repair-metres per day is not a positive number of at least 0.001 (costs are counted in thousandths)"
            ),
        });
    }
    if !(job.report_distance_m.is_finite()
        && (0.0..=MAX_ATTACH_LIMIT_M).contains(&job.report_distance_m))
    {
        return Err(IngestError::Setting {
            name: "--report-distance",
            message: format!(
                "{} m is outside 0 to {MAX_ATTACH_LIMIT_M} m",
                job.report_distance_m
            ),
        });
    }
    Ok(())
}

/// Every setting of a job that can change its outputs, as recorded in `summary.json`.
pub fn settings_json(job: &PlanJob) -> serde_json::Value {
    let s = &job.road_settings;
    let ss = &job.site_settings;
    serde_json::json!({
        "name": job.name,
        "snap_m": s.snap_m,
        "damage_field": s.damage.field,
        "default_damage": s.damage.default,
        "closed_value": s.damage.closed_value,
        "id_field": s.id_field,
        "mst": job.mst.name(),
        "max_attach_m": job.max_attach_m,
        "hub": job.hub,
        "whole_network": job.whole_network,
        "effort": job.effort.name(),
        "site_id_field": ss.id_field,
        "site_name_field": ss.name_field,
        "priority_field": ss.priority_field,
        "lon_column": ss.lon_column,
        "lat_column": ss.lat_column,
        "crs": s.crs,
        "node_crossings": s.node_crossings,
        "zone_damage_field": job.zone_damage.field,
        "zones_crs": job.zones_crs,
        "report_distance_m": job.report_distance_m,
        "crew_capacity": job.crew_capacity,
        "budget": job.budget,
        "redundancy": job.redundancy,
        "category_field": s.category_field,
        "cost_table": {
            "categories": s.cost_table.categories.iter().map(|(k, v)| (k.clone(), match v.factor() {
                Some(f) => serde_json::json!(f),
                None => serde_json::json!("closed"),
            })).collect::<serde_json::Map<_, _>>(),
            "class_field": s.cost_table.class_field,
            "class_rates": s.cost_table.class_rates,
            "class_default": s.cost_table.class_default,
        },
        "filters": s.filters.iter().map(|f| format!("{} {}={}", if f.keep { "keep" } else { "drop" }, f.field, f.values.join(","))).collect::<Vec<_>>(),
        "sites_crs": ss.crs,
        "structure_field": s.structure_field,
        "attribution": s.attribution,
    })
}
