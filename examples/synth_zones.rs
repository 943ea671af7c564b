//! Writes synthetic damage zones over a synthetic road layer's area:
//! `synth_zones COUNT FEATURES OUT.geojson [SEED]`.

fn main() -> std::io::Result<()> {
    let a: Vec<String> = std::env::args().collect();
    if a.len() < 4 {
        eprintln!("usage: synth_zones COUNT FEATURES OUT.geojson [SEED]");
        std::process::exit(2);
    }
    let count: usize = a[1].parse().expect("COUNT");
    let features: usize = a[2].parse().expect("FEATURES");
    let seed: u64 = a.get(4).map(|s| s.parse().expect("SEED")).unwrap_or(1);
    let f = std::io::BufWriter::new(std::fs::File::create(&a[3])?);
    reknit::synthetic::write_grid_zones(f, count, features, seed)
}
