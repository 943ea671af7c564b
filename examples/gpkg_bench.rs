//! Size and write time of the map layers as GeoJSON files against one GeoPackage, same process,
//! interleaved: `gpkg_bench ROADS [ROUNDS]`.
//!
//! The road layer is read and noded once (default settings, whole-network plan by Kruskal), then
//! the `network`, `plan` and `qa` layers are written ROUNDS times (default 5) in each format
//! through the writers `reknit plan` uses, into a staging folder that is never committed (no
//! fsync for either). GeoJSON is written as a run writes it (network and plan side by side, then
//! qa); the GeoPackage by its one writer. Prints the medians and the ratios.

use reknit::export::guard::check_out;
use reknit::export::layer_set::{self, LayerJob};
use reknit::export::sink::OutputFormat;
use reknit::export::staging::Staging;
use reknit::export::{specs, work_order_id::WorkOrderIds, write_edges};
use reknit::ingest::source::Source;
use reknit::ingest::{RoadSettings, build_network, roads::read_roads};
use std::path::Path;
use std::time::Instant;

fn size(dir: &Path) -> u64 {
    std::fs::read_dir(dir)
        .unwrap()
        .flatten()
        .map(|e| e.metadata().unwrap().len())
        .sum()
}

fn median(v: &mut [f64]) -> f64 {
    v.sort_by(f64::total_cmp);
    v[v.len() / 2]
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let roads = Source::File(
        args.get(1)
            .expect("usage: gpkg_bench ROADS [ROUNDS]")
            .into(),
    );
    let rounds: usize = args.get(2).map_or(5, |r| r.parse().expect("ROUNDS"));
    let settings = RoadSettings::default();
    let layer = read_roads(&roads, &settings).expect("roads");
    let (net, noding) = build_network(layer, &settings, false).expect("network");
    let g = net.weighted_edges();
    let comps = reknit::solve::components::components(&g);
    let plan = reknit::solve::minimum_spanning_forest(&g, reknit::solve::MstAlgorithm::Kruskal)
        .expect("forest");
    let ids = WorkOrderIds::new(&net);
    let (net, comps, ids, qa) = (&net, &comps, &ids, &noding.qa_points[..]);
    let plan_edges = &plan.edges[..];
    let layers = vec![
        LayerJob::new(specs::edges("network", net, false), move |s| {
            write_edges(s, net, comps, None, None, ids)
        }),
        LayerJob::new(specs::edges("plan", net, true), move |s| {
            write_edges(s, net, comps, Some(plan_edges), None, ids)
        }),
        LayerJob::new(specs::qa(), move |s| reknit::export::write_qa(s, net, qa)),
    ];
    let tmp = tempfile::tempdir_in(Path::new(env!("CARGO_MANIFEST_DIR")).join("target"))
        .expect("scratch folder under target/");
    let out = check_out(&tmp.path().join("out"), &[]).expect("out");
    let mut times = [Vec::new(), Vec::new()];
    let mut sizes = [0u64; 2];
    for _ in 0..rounds {
        for (k, format) in OutputFormat::ALL.into_iter().enumerate() {
            let st = Staging::begin(&out, true).expect("staging");
            let t = Instant::now();
            match format {
                OutputFormat::GeoJson => {
                    layer_set::write_geojson(&st, &layers[..2], None, true).unwrap();
                    layer_set::write_geojson(&st, &layers[2..], None, false).unwrap();
                }
                OutputFormat::GeoPackage => layer_set::write_gpkg(&st, &layers, None).unwrap(),
            }
            times[k].push(t.elapsed().as_secs_f64());
            let dir = std::fs::read_dir(tmp.path())
                .unwrap()
                .flatten()
                .find(|e| {
                    e.file_name()
                        .to_string_lossy()
                        .starts_with(".reknit-staging-")
                })
                .unwrap()
                .path();
            sizes[k] = size(&dir);
            drop(st);
        }
    }
    let (gj, gp) = (median(&mut times[0]), median(&mut times[1]));
    println!(
        "{} edges, {} plan edges, {} qa points; {rounds} rounds",
        net.edges.len(),
        plan_edges.len(),
        qa.len()
    );
    println!(
        "geojson: {:.1} MB in {:.3} s (median); gpkg: {:.1} MB in {:.3} s (median)",
        sizes[0] as f64 / 1e6,
        gj,
        sizes[1] as f64 / 1e6,
        gp
    );
    println!(
        "gpkg / geojson: size {:.2}x, write time {:.2}x",
        sizes[1] as f64 / sizes[0] as f64,
        gp / gj
    );
}
