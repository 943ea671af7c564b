//! How a re-plan reads its field reports files: each earlier round's file as its own round read
//! it, and the file given anew with the options given anew.
//!
//! One set of `--damage-points-*` options cannot fit every round: the first round's reports may
//! be GeoJSON in longitude/latitude and the next one's a `;`-separated CSV in a national grid. So
//! `summary.json` records how each earlier file was read (`damage_points_earlier`, in the order of
//! the inputs) beside the options of the file given anew, and a re-plan takes those options anew.

use super::{ReplanError, Request, previous::Previous};
use crate::ingest::IngestError;
use crate::ingest::reader::Format;
use crate::ingest::sites::reads_as_csv;
use crate::job::{Options, ReportOptions};

/// Fills `o.earlier_damage_points_read` (one entry per earlier file) and sets the options of the
/// file given anew: each option given anew, else the recorded one where it means something for
/// that file (a separator and columns for a CSV, a layer for a GeoPackage or zip). An option given
/// anew without `--damage-points`, or meaning nothing for that file, is refused.
pub(super) fn choose(req: &Request, prev: &Previous, o: &mut Options) -> Result<(), ReplanError> {
    let recorded = ReportOptions {
        crs: o.damage_points_crs.clone(),
        delimiter: o.damage_points_delimiter.clone(),
        layer: o.damage_points_layer.clone(),
        lon_column: o.damage_points_lon_column.clone(),
        lat_column: o.damage_points_lat_column.clone(),
    };
    let earlier = o.earlier_damage_points.len();
    if o.earlier_damage_points_read.len() > earlier {
        return Err(prev.broken(format!(
            "setting `damage_points_earlier` describes {} reports file(s), but {earlier} are \
             recorded as inputs",
            o.earlier_damage_points_read.len()
        )));
    }
    // Summaries before per-file records, and the last round's file given anew: the recorded
    // options read them.
    o.earlier_damage_points_read
        .resize(earlier, recorded.clone());
    let given = &req.damage_points_read;
    let flags = [
        ("--damage-points-crs", given.crs.is_some()),
        ("--damage-points-delimiter", given.delimiter.is_some()),
        ("--damage-points-layer", given.layer.is_some()),
        ("--damage-points-lon-column", given.lon_column.is_some()),
        ("--damage-points-lat-column", given.lat_column.is_some()),
    ];
    let refuse = |name: &'static str, message: &str| {
        Err(ReplanError::Setting(IngestError::Setting {
            name,
            message: message.into(),
        }))
    };
    let Some(new) = &req.damage_points else {
        return match flags.iter().find(|(_, g)| *g) {
            Some(&(name, _)) => refuse(
                name,
                "this option is how the field reports given anew are read: give --damage-points \
                 (the earlier rounds' reports are read as their own rounds read them)",
            ),
            None => Ok(()),
        };
    };
    let (csv, layered) = (reads_as_csv(new), Format::of(new).has_layers());
    for (name, is_given) in flags {
        let used = match name {
            "--damage-points-crs" => true,
            "--damage-points-layer" => layered,
            _ => csv,
        };
        if is_given && !used {
            return refuse(
                name,
                if name == "--damage-points-layer" {
                    "only a GeoPackage or zipped Shapefile damage reports file (--damage-points \
                     FILE.gpkg or FILE.zip) holds layers to choose from"
                } else {
                    "only a CSV damage reports file (.csv or .txt) has a field separator and \
                     coordinate columns"
                },
            );
        }
    }
    let pick = |given: &Option<String>, kept: &Option<String>, used: bool| {
        given.clone().or_else(|| kept.clone().filter(|_| used))
    };
    o.damage_points_crs = pick(&given.crs, &recorded.crs, true);
    o.damage_points_delimiter = pick(&given.delimiter, &recorded.delimiter, csv);
    o.damage_points_layer = pick(&given.layer, &recorded.layer, layered);
    o.damage_points_lon_column = pick(&given.lon_column, &recorded.lon_column, csv);
    o.damage_points_lat_column = pick(&given.lat_column, &recorded.lat_column, csv);
    Ok(())
}
