//! Entry points for the fuzz targets (fuzz/) and the garbage-input tests (tests/fuzz_smoke.rs):
//! each takes arbitrary bytes, runs one reader (and, when it accepts the input, the stages after
//! it), and must return without panicking, whatever the bytes. Errors are the expected outcome
//! for most inputs; a panic, a hang or an abort is a finding.

use crate::ingest::roads::{RoadSettings, read_roads};
use crate::ingest::sites::{SiteSettings, read_sites};
use crate::ingest::source::Source;
use crate::solve::graph::{EdgeList, UNUSABLE};
use std::io::Write;
use std::sync::Arc;

/// A fuzz target: arbitrary bytes in, no panic out.
pub type Target = fn(&[u8]);

/// Every fuzz target by name, for the replay test.
pub const TARGETS: &[(&str, Target)] = &[
    ("roads_geojson", roads_geojson),
    ("plan_pieces", plan_pieces),
    ("sites_csv", sites_csv),
    ("sites_geojson", sites_geojson),
    ("zones", zones),
    ("reports", reports),
    ("cost_table", cost_table),
    ("manifest", manifest),
    ("stp", stp),
    ("shapefile", shapefile),
    ("graph", graph),
    ("zipped_shapefile", zipped_shapefile),
    ("gpkg_geometry", gpkg_geometry),
];

fn memory(name: &str, data: &[u8]) -> Source {
    Source::Memory {
        name: name.into(),
        bytes: Arc::from(data),
    }
}

/// Roads as GeoJSON, then noding, the forest, fragility and the written network layer.
pub fn roads_geojson(data: &[u8]) {
    let settings = RoadSettings::default();
    let Ok(layer) = read_roads(&memory("roads.geojson", data), &settings) else {
        return;
    };
    let Ok((net, _)) = crate::ingest::build_network(layer, &settings, true) else {
        return;
    };
    let g = net.weighted_edges();
    let comps = crate::solve::components::components(&g);
    let plan = crate::solve::minimum_spanning_forest(&g, crate::solve::MstAlgorithm::Kruskal)
        .expect("the forest of a valid network verifies");
    let _ = crate::solve::fragility::fragility(&g, &[]);
    let _ = plan;
    crate::export::write_network(std::io::sink(), &net, &comps, None).expect("sink");
}

/// Splits `data` at the first `0xFF` byte (the rest goes to `rest`).
fn split(data: &[u8]) -> (&[u8], &[u8]) {
    match data.iter().position(|&b| b == 0xFF) {
        Some(i) => (&data[..i], &data[i + 1..]),
        None => (data, &[]),
    }
}

/// Roads and sites (GeoJSON, split at the first 0xFF byte): noding, attachment, the sites plan,
/// the repair order, backup links and a budget plan.
pub fn plan_pieces(data: &[u8]) {
    let (roads, sites) = split(data);
    let settings = RoadSettings::default();
    let Ok(layer) = read_roads(&memory("roads.geojson", roads), &settings) else {
        return;
    };
    let Ok(sl) = read_sites(&memory("sites.geojson", sites), &SiteSettings::default()) else {
        return;
    };
    let Ok((mut net, _)) = crate::ingest::build_network(layer, &settings, false) else {
        return;
    };
    let att = crate::ingest::attach::attach_sites(&mut net, &sl.sites, 250.0);
    let g = net.weighted_edges();
    let comps = crate::solve::components::components(&g);
    let junctions: Vec<Option<u32>> = att.iter().map(|a| a.junction).collect();
    let sp = crate::solve::site_plan::plan_sites(
        &g,
        &comps,
        &junctions,
        crate::solve::steiner::Effort::Quick,
    )
    .expect("site plans verify");
    let terms: Vec<u32> = junctions.iter().flatten().copied().collect();
    if let Some(&root) = terms.first() {
        let mut free: Vec<bool> = g.cost.iter().map(|&c| c == 0).collect();
        for &e in &sp.edges {
            free[e as usize] = true;
        }
        crate::solve::backup::backup_links(&g, &free, root, &terms[1..])
            .expect("backup plans verify");
        let targets: Vec<crate::solve::order::Target> = terms
            .iter()
            .enumerate()
            .map(|(i, &j)| crate::solve::order::Target {
                junction: j,
                weight: 1.0 + i as f64,
                id: i,
            })
            .collect();
        let b = crate::solve::budget::within_budget(&g, &sp.edges, &[root], &targets, sp.cost / 2);
        assert!(b.cost <= sp.cost / 2, "budget exceeded");
    }
}

/// Sites as CSV.
pub fn sites_csv(data: &[u8]) {
    let _ = read_sites(&memory("sites.csv", data), &SiteSettings::default());
}

/// Sites as GeoJSON.
pub fn sites_geojson(data: &[u8]) {
    let _ = read_sites(&memory("sites.geojson", data), &SiteSettings::default());
}

/// Damage zones (GeoJSON polygons), applied to a small fixed network.
pub fn zones(data: &[u8]) {
    let Ok(zl) = crate::ingest::zones::read_zones(
        &memory("zones.geojson", data),
        &Default::default(),
        None,
        None,
    ) else {
        return;
    };
    let roads = br#"{"type":"FeatureCollection","features":[
      {"type":"Feature","properties":{"damage":0.5},"geometry":{"type":"LineString","coordinates":[[0,0],[0.01,0],[0.01,0.01]]}},
      {"type":"Feature","properties":{"damage":0},"geometry":{"type":"LineString","coordinates":[[0,0],[-0.01,0.005]]}}]}"#;
    let settings = RoadSettings::default();
    let layer = read_roads(&memory("roads.geojson", roads), &settings).expect("fixed roads");
    let (mut net, _) = crate::ingest::build_network(layer, &settings, false).expect("noding");
    crate::ingest::zones::apply_zones(&mut net, &zl);
}

/// Field damage reports (GeoJSON points).
pub fn reports(data: &[u8]) {
    let _ = crate::ingest::reports::read_reports(
        &memory("reports.geojson", data),
        &Default::default(),
        &Default::default(),
    );
}

/// The cost table (TOML) and lookups in it.
pub fn cost_table(data: &[u8]) {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Ok(t) = crate::ingest::cost_table::CostTable::from_toml(text) {
        let _ = t.category("debris");
        let _ = t.rate(Some(&"primary".into()));
        let _ = t.rate(None);
    }
    let _ = crate::ingest::cost_table::RoadFilter::parse(text, true);
}

/// A private temporary folder per process for the readers that need files.
fn scratch() -> std::path::PathBuf {
    let d = std::env::temp_dir().join(format!("reknit-fuzz-{}", std::process::id()));
    let _ = std::fs::create_dir_all(&d);
    d
}

fn put(path: &std::path::Path, data: &[u8]) {
    let mut f = std::fs::File::create(path).expect("scratch file");
    f.write_all(data).expect("scratch write");
}

/// A batch manifest, read as TOML and as CSV.
pub fn manifest(data: &[u8]) {
    let d = scratch();
    for name in ["m.toml", "m.csv"] {
        let p = d.join(name);
        put(&p, data);
        let _ = crate::batch::manifest::read_manifest(&p);
    }
}

/// A SteinLib STP instance; small accepted ones are solved.
pub fn stp(data: &[u8]) {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Ok(inst) = crate::solve::stp::parse(text)
        && inst.graph.vertices <= 2_000
        && inst.graph.len() <= 10_000
    {
        let _ = crate::solve::steiner::steiner_tree(
            &inst.graph,
            &inst.terminals,
            crate::solve::steiner::Effort::Quick,
        );
    }
}

/// A Shapefile set: three parts (.shp, .shx, .dbf), each preceded by its length as 2 bytes.
pub fn shapefile(data: &[u8]) {
    let d = scratch();
    let mut rest = data;
    for ext in ["shp", "shx", "dbf"] {
        let n = if rest.len() >= 2 {
            u16::from_le_bytes([rest[0], rest[1]]) as usize
        } else {
            0
        };
        rest = rest.get(2..).unwrap_or(&[]);
        let n = n.min(rest.len());
        put(&d.join(format!("roads.{ext}")), &rest[..n]);
        rest = &rest[n..];
    }
    let settings = RoadSettings {
        crs: Some("EPSG:32633".into()),
        ..RoadSettings::default()
    };
    if let Ok(layer) = read_roads(&Source::File(d.join("roads.shp")), &settings) {
        let _ = crate::ingest::build_network(layer, &settings, false);
    }
}

/// A `.zip` archive, read as a zipped Shapefile road layer (archive parsing, member choice,
/// bounded inflating, then the Shapefile set), then noded.
pub fn zipped_shapefile(data: &[u8]) {
    let settings = RoadSettings {
        crs: Some("EPSG:32633".into()),
        ..RoadSettings::default()
    };
    if let Ok(layer) = read_roads(&memory("roads.zip", data), &settings) {
        let _ = crate::ingest::build_network(layer, &settings, false);
    }
}

/// A GeoPackage geometry blob (header and WKB), decoded; lines are walked part by part.
pub fn gpkg_geometry(data: &[u8]) {
    if let Ok(crate::ingest::wkb::Decoded::Lines(c)) = crate::ingest::wkb::decode(data) {
        for part in c.part_slices() {
            let _ = part.iter().map(|p| p[0] + p[1]).sum::<f64>();
        }
    }
}

/// Bytes as a small graph (3 bytes per edge: ends and a cost class): the forest by Kruskal and
/// Prim must agree, and the Steiner tree and backup links must pass their own checks.
pub fn graph(data: &[u8]) {
    let n = (data.first().copied().unwrap_or(0) as usize % 40) + 1;
    let mut ends = Vec::new();
    let mut cost = Vec::new();
    for c in data.get(1..).unwrap_or(&[]).chunks_exact(3).take(200) {
        ends.push([c[0] as u32 % n as u32, c[1] as u32 % n as u32]);
        cost.push(match c[2] {
            0..=20 => UNUSABLE,
            21..=60 => 0,
            x => x as u64 * 37,
        });
    }
    let g = EdgeList {
        vertices: n,
        ends,
        cost,
    };
    use crate::solve::{MstAlgorithm, minimum_spanning_forest};
    let k = minimum_spanning_forest(&g, MstAlgorithm::Kruskal).expect("kruskal verifies");
    let p = minimum_spanning_forest(&g, MstAlgorithm::Prim).expect("prim verifies");
    assert_eq!(k.total_cost, p.total_cost, "Kruskal and Prim disagree");
    let terms: Vec<u32> = (0..n as u32).step_by(3).collect();
    let comps = crate::solve::components::components(&g);
    let same: Vec<u32> = terms
        .iter()
        .copied()
        .filter(|&t| comps.of[t as usize] == comps.of[0])
        .collect();
    let t = crate::solve::steiner::steiner_tree(&g, &same, crate::solve::steiner::Effort::Quick)
        .expect("steiner verifies");
    let mut free: Vec<bool> = g.cost.iter().map(|&c| c == 0).collect();
    for &e in &t.edges {
        free[e as usize] = true;
    }
    crate::solve::backup::backup_links(&g, &free, 0, &same).expect("backup verifies");
}
