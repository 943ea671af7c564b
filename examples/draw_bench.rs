//! Times drawing the plan picture (SVG and PNG) on a synthetic layer, apart from everything else:
//! `draw_bench ROADS.geojson`. Prints seconds for the SVG and the PNG, and the sizes.

use reknit::export::picture::write_svg;
use reknit::export::raster::render_png;
use reknit::ingest::roads::{RoadSettings, read_roads};
use reknit::ingest::source::Source;
use std::time::Instant;

fn main() {
    let path = std::env::args()
        .nth(1)
        .expect("usage: draw_bench ROADS.geojson");
    let s = RoadSettings::default();
    let layer = read_roads(&Source::File(path.into()), &s).expect("read");
    let (net, _) = reknit::ingest::build_network(layer, &s, false).expect("node");
    let g = net.weighted_edges();
    let plan = reknit::solve::minimum_spanning_forest(&g, Default::default()).expect("plan");
    let scene = reknit::export::scene::Scene {
        title: "bench",
        net: &net,
        plan_edges: &plan.edges,
        steps: &[],
        backup_edges: &[],
        zones: &[],
        sites: &[],
        scheduled: false,
        caution: "caution",
        attribution: None,
    };
    let t = Instant::now();
    let mut svg = std::io::sink();
    write_svg(&mut svg, &scene, true).expect("svg");
    let svg_s = t.elapsed().as_secs_f64();
    let t = Instant::now();
    let png = render_png(&scene).expect("png");
    let png_s = t.elapsed().as_secs_f64();
    println!(
        "{} edges: SVG {svg_s:.2} s, PNG {png_s:.2} s ({} bytes)",
        net.edges.len(),
        png.len()
    );
}
