//! SteinLib quality and time per instance: `bench_steinlib DIR EFFORT` solves every instance listed
//! in DIR/optima.tsv and prints one JSON line each (name, published optimum, cost, bound, seconds).

use reknit::solve::steiner::{Effort, steiner_tree};
use reknit::solve::stp;
use std::time::Instant;

fn main() {
    let a: Vec<String> = std::env::args().collect();
    if a.len() != 3 {
        eprintln!("usage: bench_steinlib DIR quick|normal|thorough");
        std::process::exit(2);
    }
    let dir = std::path::Path::new(&a[1]);
    let effort = match a[2].as_str() {
        "quick" => Effort::Quick,
        "thorough" => Effort::Thorough,
        _ => Effort::Normal,
    };
    let optima = std::fs::read_to_string(dir.join("optima.tsv")).expect("optima.tsv");
    for line in optima.lines().skip(1) {
        let mut it = line.split('\t');
        let (Some(name), Some(opt)) = (it.next(), it.next()) else {
            continue;
        };
        let Ok(opt) = opt.trim().parse::<u64>() else {
            continue;
        };
        let text = std::fs::read_to_string(dir.join(format!("{name}.stp"))).expect("instance");
        let inst = stp::parse(&text).expect("STP");
        let t = Instant::now();
        let tree = steiner_tree(&inst.graph, &inst.terminals, effort).expect("solve");
        let s = t.elapsed().as_secs_f64();
        println!(
            "{{\"bench\":\"steinlib\",\"name\":\"{name}\",\"effort\":\"{}\",\"optimum\":{opt},\"cost\":{},\"bound\":{},\"seconds\":{s:.4}}}",
            effort.name(),
            tree.cost,
            tree.lower_bound
        );
    }
}
