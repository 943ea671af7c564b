//! Writes a synthetic road layer (and optionally sites) for benchmarks and the demo region:
//! `synth_roads FEATURES OUT.geojson [SEED] [SITES_OUT.csv SITES]`.

use std::io::{BufWriter, Write};

fn main() -> std::io::Result<()> {
    let args: Vec<String> = std::env::args().collect();
    if args.len() < 3 {
        eprintln!("usage: synth_roads FEATURES OUT.geojson [SEED] [SITES_OUT.csv SITES]");
        std::process::exit(2);
    }
    let features: usize = args[1].parse().expect("FEATURES must be a whole number");
    let seed: u64 = args.get(3).map(|s| s.parse().expect("SEED")).unwrap_or(1);
    let f = std::fs::File::create(&args[2])?;
    let n = reknit::synthetic::write_grid_layer(BufWriter::new(f), features, seed)?;
    if let (Some(path), Some(count)) = (args.get(4), args.get(5)) {
        let count: usize = count.parse().expect("SITES");
        let mut w = BufWriter::new(std::fs::File::create(path)?);
        writeln!(w, "site_id,name,priority,lon,lat")?;
        for (i, p) in reknit::synthetic::grid_layer_sites(n, count, seed)
            .iter()
            .enumerate()
        {
            writeln!(
                w,
                "P{},Post {},{},{:.7},{:.7}",
                i + 1,
                i + 1,
                1 + i % 3,
                p[0],
                p[1]
            )?;
        }
    }
    eprintln!("{}: {n} features of 8 vertices", args[2]);
    Ok(())
}
