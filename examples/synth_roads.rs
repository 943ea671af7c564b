//! Writes a synthetic road layer for benchmarks: `synth_roads FEATURES OUT.geojson [SEED]`.

use std::io::BufWriter;

fn main() -> std::io::Result<()> {
    let args: Vec<String> = std::env::args().collect();
    if args.len() < 3 {
        eprintln!("usage: synth_roads FEATURES OUT.geojson [SEED]");
        std::process::exit(2);
    }
    let features: usize = args[1].parse().expect("FEATURES must be a whole number");
    let seed: u64 = args.get(3).map(|s| s.parse().expect("SEED")).unwrap_or(1);
    let f = std::fs::File::create(&args[2])?;
    let n = reknit::synthetic::write_grid_layer(BufWriter::new(f), features, seed)?;
    eprintln!("{}: {n} features of 8 vertices", args[2]);
    Ok(())
}
