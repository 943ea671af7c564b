//! `reknit replan`: the next round from a previous plan's folder and the sheet crews handed back.

use super::common::{OutputArgs, print_result};
use clap::Args;
use reknit::ingest::source::Source;
use reknit::replan::{Request, run};
use std::path::PathBuf;
use std::process::ExitCode;

/// Plan the next round: finished repairs count as intact, started ones stay in the plan at their
/// full cost, new damage is added, and changes.geojson lists what changed.
///
/// Settings and inputs are read back from PREV_DIR/summary.json (inputs found where the previous
/// run was started, then in PREV_DIR, and checked by SHA-256); PREV_DIR is never written.
#[derive(Debug, Args)]
pub struct ReplanArgs {
    /// The previous plan's output folder (a plan or a re-plan).
    #[arg(value_name = "PREV_DIR")]
    previous: PathBuf,

    /// The previous plan's work-orders.csv as crews hand it back: status done (also yes, y, true,
    /// 1, x) or started; `,` `;` or tab separated, with or without a byte-order mark.
    #[arg(long, value_name = "WORK_ORDERS.csv")]
    finished: PathBuf,

    /// Output folder for the new round (created if absent; never PREV_DIR).
    #[arg(long, value_name = "DIR")]
    out: PathBuf,

    /// Damage points found since the previous plan, added to the earlier ones (each earlier
    /// round's file is read as its round read it).
    #[arg(long, value_name = "FILE")]
    damage_points: Option<PathBuf>,

    /// The CRS of the --damage-points given anew as EPSG:NNNN (default: the one recorded, else
    /// its .prj or GeoPackage SRS, or WGS84 longitude/latitude).
    #[arg(long, value_name = "EPSG:CODE")]
    damage_points_crs: Option<String>,

    /// Field separator of a CSV --damage-points given anew: `,` `;` or `tab` (default: the one
    /// recorded, else told from the header line).
    #[arg(long, value_name = "SEPARATOR")]
    damage_points_delimiter: Option<String>,

    /// The layer of a GeoPackage (or the set of a zipped Shapefile) --damage-points given anew
    /// that holds several.
    #[arg(long, value_name = "NAME")]
    damage_points_layer: Option<String>,

    /// CSV column with the longitudes of the --damage-points given anew (default: the one
    /// recorded, else lon, lng, longitude or x).
    #[arg(long, value_name = "COLUMN")]
    damage_points_lon_column: Option<String>,

    /// CSV column with the latitudes of the --damage-points given anew (default: the one
    /// recorded, else lat, latitude or y).
    #[arg(long, value_name = "COLUMN")]
    damage_points_lat_column: Option<String>,

    /// Damage zones given anew, replacing the earlier ones.
    #[arg(long, value_name = "FILE")]
    damage_zones: Option<PathBuf>,

    /// Sites given anew, replacing the earlier ones.
    #[arg(long, value_name = "FILE")]
    sites: Option<PathBuf>,

    /// The road layers given anew, matched to the previous plan by work-order keys: give --roads
    /// once per layer the previous plan read (as many layers, in the same order).
    #[arg(long, value_name = "FILE")]
    roads: Vec<PathBuf>,

    /// A label for this round in the history (a date, a shift); none by default.
    #[arg(long, value_name = "TEXT")]
    label: Option<String>,

    #[command(flatten)]
    output: OutputArgs,
}

pub fn run_replan(a: ReplanArgs) -> anyhow::Result<ExitCode> {
    let progress = a.output.progress();
    let req = Request {
        previous: a.previous,
        finished: a.finished,
        out: a.out.clone(),
        force: a.output.force,
        roads: a.roads.into_iter().map(Source::File).collect(),
        damage_points: a.damage_points.map(Source::File),
        damage_points_read: reknit::job::ReportOptions {
            crs: a.damage_points_crs,
            delimiter: a.damage_points_delimiter,
            layer: a.damage_points_layer,
            lon_column: a.damage_points_lon_column,
            lat_column: a.damage_points_lat_column,
        },
        damage_zones: a.damage_zones.map(Source::File),
        sites: a.sites.map(Source::File),
        label: a.label,
        output_format: a.output.format(),
    };
    let summary = run(&req, &progress)?;
    // Work orders that matched nothing are listed, never guessed: say so where it is seen.
    if let Some(r) = summary.replan.as_ref().filter(|_| !progress.quiet) {
        if !r.rows_matching_nothing.is_empty() {
            reknit::say!(
                "note: {} line(s) of the sheet marked started name no work order of the previous plan (summary.json replan.rows_matching_nothing)",
                r.rows_matching_nothing.len()
            );
        }
        if !r.keys_matching_nothing.is_empty() {
            reknit::say!(
                "note: {} work order(s) name no piece of the new road network (summary.json replan.keys_matching_nothing)",
                r.keys_matching_nothing.len()
            );
        }
    }
    print_result(&summary, &a.out, &progress);
    Ok(ExitCode::SUCCESS)
}
