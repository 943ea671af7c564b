//! The previous run's recorded settings and inputs turned back into [`Options`].
//!
//! [`SETTINGS`] is the one table from a setting's name in `summary.json` to the option it came
//! from: renaming a setting means changing its row here, nowhere else. [`INPUTS`] does the same
//! for input roles, [`JOINED_FIELDS`] for the sites layer's joined flag.

use super::ReplanError;
use super::previous::{Previous, RecordedInput};
use crate::export::sink::OutputFormat;
use crate::ingest::limits::excerpt;
use crate::ingest::source::Source;
use crate::job::Options;
use crate::solve::MstAlgorithm;
use crate::solve::steiner::Effort;
use serde_json::Value;
use std::path::{Path, PathBuf};

/// The sites layer's property telling whether a site was joined to the hub.
pub const JOINED_FIELDS: &[&str] = &["joined_to_hub"];

type Set = fn(&mut Options, &Value) -> Result<(), String>;

/// A recorded value for a message, cut when long (a damaged summary may hold anything).
fn shown(v: &Value) -> String {
    excerpt(&v.to_string())
}

fn text(v: &Value) -> Result<Option<String>, String> {
    match v {
        Value::Null => Ok(None),
        Value::String(s) => Ok(Some(s.clone())),
        _ => Err(format!("{} is not text", shown(v))),
    }
}
fn num(v: &Value) -> Result<Option<f64>, String> {
    match v {
        Value::Null => Ok(None),
        _ => v
            .as_f64()
            .map(Some)
            .ok_or_else(|| format!("{} is not a number", shown(v))),
    }
}
fn flag(v: &Value) -> Result<bool, String> {
    v.as_bool()
        .ok_or_else(|| format!("{} is not true or false", shown(v)))
}
fn named<T: Copy>(v: &Value, all: &[T], name: fn(T) -> &'static str) -> Result<Option<T>, String> {
    match text(v)? {
        None => Ok(None),
        Some(t) => all
            .iter()
            .copied()
            .find(|&a| name(a) == t)
            .map(Some)
            .ok_or_else(|| format!("\"{}\" is not known", excerpt(&t))),
    }
}

/// Each recorded setting and how it fills the options (a `null` leaves the default).
pub const SETTINGS: &[(&str, Set)] = &[
    ("name", |o, v| {
        o.name = text(v)?;
        Ok(())
    }),
    ("snap_m", |o, v| {
        o.road.snap_m = num(v)?.unwrap_or(o.road.snap_m);
        Ok(())
    }),
    ("damage_field", |o, v| {
        o.road.damage_field = text(v)?.unwrap_or(o.road.damage_field.clone());
        Ok(())
    }),
    ("default_damage", |o, v| {
        o.road.default_damage = num(v)?.unwrap_or(o.road.default_damage);
        Ok(())
    }),
    ("closed_value", |o, v| {
        o.road.closed_value = text(v)?.unwrap_or(o.road.closed_value.clone());
        Ok(())
    }),
    ("id_field", |o, v| {
        o.road.id_field = text(v)?;
        Ok(())
    }),
    ("mst", |o, v| {
        o.mst = named(
            v,
            &[MstAlgorithm::Kruskal, MstAlgorithm::Prim],
            MstAlgorithm::name,
        )?;
        Ok(())
    }),
    ("max_attach_m", |o, v| {
        o.max_attach_m = num(v)?;
        Ok(())
    }),
    ("hub", |o, v| {
        o.hub = text(v)?;
        Ok(())
    }),
    ("whole_network", |o, v| {
        o.whole_network = flag(v)?;
        Ok(())
    }),
    ("effort", |o, v| {
        o.effort = named(
            v,
            &[Effort::Quick, Effort::Normal, Effort::Thorough],
            Effort::name,
        )?;
        Ok(())
    }),
    ("site_id_field", |o, v| {
        o.site_id_field = text(v)?;
        Ok(())
    }),
    ("site_name_field", |o, v| {
        o.site_name_field = text(v)?;
        Ok(())
    }),
    ("priority_field", |o, v| {
        o.priority_field = text(v)?;
        Ok(())
    }),
    ("lon_column", |o, v| {
        o.lon_column = text(v)?;
        Ok(())
    }),
    ("lat_column", |o, v| {
        o.lat_column = text(v)?;
        Ok(())
    }),
    ("crs", |o, v| {
        o.road.crs = text(v)?;
        Ok(())
    }),
    ("node_crossings", |o, v| {
        o.road.node_crossings = flag(v)?;
        Ok(())
    }),
    ("zone_damage_field", |o, v| {
        o.zone_damage_field = text(v)?;
        Ok(())
    }),
    ("zones_crs", |o, v| {
        o.zones_crs = text(v)?;
        Ok(())
    }),
    ("damage_points_field", |o, v| {
        o.damage_points_field = text(v)?;
        Ok(())
    }),
    ("point_match_distance_m", |o, v| {
        o.point_match_distance_m = num(v)?;
        Ok(())
    }),
    ("time_limit_s", |o, v| {
        o.time_limit_s = num(v)?;
        Ok(())
    }),
    ("crews", |o, v| {
        o.crews = match v {
            serde_json::Value::Null => None,
            _ => Some(
                v.as_u64()
                    .and_then(|n| u32::try_from(n).ok())
                    .ok_or_else(|| format!("{} is not a whole number of crews", shown(v)))?,
            ),
        };
        Ok(())
    }),
    ("max_detour", |o, v| {
        o.max_detour = num(v)?;
        Ok(())
    }),
    ("crew_capacity", |o, v| {
        o.crew_capacity = num(v)?;
        Ok(())
    }),
    ("budget", |o, v| {
        o.budget = num(v)?;
        Ok(())
    }),
    ("redundancy", |o, v| {
        o.redundancy = flag(v)?;
        Ok(())
    }),
    ("category_field", |o, v| {
        o.road.category_field = text(v)?;
        Ok(())
    }),
    // The table itself is read again from its file (the "cost table" input).
    ("cost_table", |_, _| Ok(())),
    ("filters", |o, v| {
        for f in v.as_array().ok_or("not a list")? {
            let f = f.as_str().ok_or("not text")?;
            match f.split_once(' ') {
                Some(("keep", rule)) => o.road.keep_where.push(rule.into()),
                Some(("drop", rule)) => o.road.drop_where.push(rule.into()),
                _ => {
                    return Err(format!(
                        "\"{}\" is not `keep F=V` or `drop F=V`",
                        excerpt(f)
                    ));
                }
            }
        }
        Ok(())
    }),
    ("roads_layer", |o, v| {
        o.road.roads_layer = text(v)?;
        Ok(())
    }),
    ("site_tags", |o, v| {
        for t in v.as_array().ok_or("not a list")? {
            o.site_tags.push(t.as_str().ok_or("not text")?.into());
        }
        Ok(())
    }),
    ("sites_crs", |o, v| {
        o.sites_crs = text(v)?;
        Ok(())
    }),
    ("sites_delimiter", |o, v| {
        o.sites_delimiter = text(v)?;
        Ok(())
    }),
    ("sites_layer", |o, v| {
        o.sites_layer = text(v)?;
        Ok(())
    }),
    ("zones_layer", |o, v| {
        o.zones_layer = text(v)?;
        Ok(())
    }),
    ("damage_points_crs", |o, v| {
        o.damage_points_crs = text(v)?;
        Ok(())
    }),
    ("damage_points_delimiter", |o, v| {
        o.damage_points_delimiter = text(v)?;
        Ok(())
    }),
    ("damage_points_layer", |o, v| {
        o.damage_points_layer = text(v)?;
        Ok(())
    }),
    ("damage_points_lon_column", |o, v| {
        o.damage_points_lon_column = text(v)?;
        Ok(())
    }),
    ("damage_points_lat_column", |o, v| {
        o.damage_points_lat_column = text(v)?;
        Ok(())
    }),
    ("damage_points_earlier", |o, v| {
        if v.is_null() {
            return Ok(());
        }
        for r in v.as_array().ok_or("not a list")? {
            let get = |k: &str| text(r.get(k).unwrap_or(&Value::Null));
            o.earlier_damage_points_read
                .push(crate::job::ReportOptions {
                    crs: get("crs")?,
                    delimiter: get("delimiter")?,
                    layer: get("layer")?,
                    lon_column: get("lon_column")?,
                    lat_column: get("lat_column")?,
                });
        }
        Ok(())
    }),
    ("structure_field", |o, v| {
        o.road.structure_field = text(v)?;
        Ok(())
    }),
    ("attribution", |o, v| {
        o.road.attribution = text(v)?;
        Ok(())
    }),
    ("output_format", |o, v| {
        o.output_format = named(v, &OutputFormat::ALL, OutputFormat::name)?.unwrap_or_default();
        Ok(())
    }),
];

/// Input roles and the flag that gives each anew (`None`: it can only be put back in place).
pub const INPUTS: &[(&str, Option<&str>)] = &[
    ("roads", Some("--roads")),
    ("damage zones", Some("--damage-zones")),
    ("damage reports", Some("--damage-points")),
    ("sites", Some("--sites")),
    ("cost table", None),
    ("finished work", Some("--finished")),
];

/// Fills `o` with every recorded setting; an unknown setting or value is an error.
pub fn settings(prev: &Previous, o: &mut Options) -> Result<(), ReplanError> {
    for (key, v) in &prev.settings {
        let Some((_, set)) = SETTINGS.iter().find(|(k, _)| k == key) else {
            return Err(prev.broken(format!(
                "setting `{}` is not known to this version of reknit",
                excerpt(key)
            )));
        };
        set(o, v).map_err(|m| prev.broken(format!("setting `{key}`: {m}")))?;
    }
    Ok(())
}

/// The folders the previous run can have been started from, in the order they are tried: the
/// current folder (where a user re-plans from, as a rule), then every folder holding the previous
/// one, nearest first (an output folder given as a relative path lies below where the run began).
/// Nothing about the run's folder is recorded, so the same inputs give the same bytes wherever the
/// outputs go; the SHA-256 check makes trying several places safe.
fn start_folders(prev: &Previous) -> Vec<PathBuf> {
    let mut out: Vec<PathBuf> = std::env::current_dir().into_iter().collect();
    if let Ok(dir) = std::fs::canonicalize(&prev.dir) {
        out.extend(dir.ancestors().skip(1).map(Path::to_path_buf));
    }
    out
}

/// The file a recorded input names, found where the previous run can have been started, then in
/// the previous folder, and checked against its SHA-256; else an error asking for it anew.
pub fn input(prev: &Previous, rec: &RecordedInput) -> Result<Source, ReplanError> {
    let p = Path::new(&rec.path);
    let mut tried: Vec<PathBuf> = Vec::new();
    let bases = start_folders(prev);
    for (i, base) in bases.iter().chain([&prev.dir]).enumerate() {
        let cand = base.join(p);
        if tried.contains(&cand) {
            continue;
        }
        let src = Source::File(cand.clone());
        if let Ok(r) = crate::job::fingerprint::input_record(&rec.role, &src)
            && r.sha256 == rec.sha256
        {
            // Found from the current folder: the path stays as recorded, so the new summary
            // records it the same way.
            if i == 0 && p.is_relative() {
                return Ok(Source::File(p.to_path_buf()));
            }
            return Ok(src);
        }
        tried.push(cand);
    }
    let flag = INPUTS
        .iter()
        .find(|(r, _)| *r == rec.role)
        .and_then(|(_, f)| *f);
    let ask = match flag {
        Some(f) => format!("give it anew with {f}"),
        None => format!("put the file recorded back at {}", rec.path),
    };
    // Name the places looked at: the nearest few, then how many more (the ancestors go up to the
    // root).
    let mut looked: Vec<String> = tried
        .iter()
        .take(4)
        .map(|t| t.display().to_string())
        .collect();
    if tried.len() > 4 {
        let last = looked.pop().unwrap_or_default();
        looked.push(format!("{last} and {} more", tried.len() - 4));
    }
    Err(ReplanError::Input {
        role: rec.role.clone(),
        path: rec.path.clone(),
        message: format!(
            "missing or changed since the previous plan (looked at {}): {ask}",
            looked.join(", ")
        ),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every setting a run records has a row in the table, and every row is a recorded setting.
    #[test]
    fn every_recorded_setting_has_one_row() {
        let src = Source::Memory {
            name: "r.geojson".into(),
            bytes: std::sync::Arc::from(&b""[..]),
        };
        let job = crate::job::build(&Options::new(src, "out".into())).unwrap();
        let rec = crate::job::settings_json(&job);
        let recorded: Vec<&String> = rec.as_object().unwrap().keys().collect();
        for k in &recorded {
            assert!(SETTINGS.iter().any(|(r, _)| r == k), "no row for `{k}`");
        }
        for (r, _) in SETTINGS {
            assert!(
                recorded.iter().any(|k| k == r),
                "row `{r}` is not a recorded setting"
            );
        }
        // And a recorded set of settings turns back into options that record the same.
        let mut o = Options::new(job.roads.clone(), "out".into());
        for (k, v) in rec.as_object().unwrap() {
            let (_, set) = SETTINGS.iter().find(|(r, _)| r == k).unwrap();
            set(&mut o, v).unwrap();
        }
        assert_eq!(
            crate::job::settings_json(&crate::job::build(&o).unwrap()),
            rec
        );
    }
}
