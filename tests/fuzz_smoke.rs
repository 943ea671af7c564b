//! Garbage-input smoke run for every fuzz target (fuzz/, run with cargo-fuzz): the seed corpus
//! and deterministic mutations of it (bit flips, truncations, insertions, duplications, splices,
//! extreme numbers) must never panic. The long runs happen under cargo-fuzz; this keeps CI honest.

use reknit::fuzzing::TARGETS;
use reknit::rng::Rng;
use std::path::Path;

const MUTATIONS_PER_SEED: usize = 150;

const TOKENS: &[&[u8]] = &[
    b"NaN",
    b"1e308",
    b"-1e309",
    b"-0",
    b"null",
    b"[]",
    b"{}",
    b"\"",
    b"\\u0000",
    b"[[[[[[[[[[[[[[[[",
    b"\xff\xfe",
    b"18446744073709551616",
    b"\"type\":\"Polygon\"",
    b"\"coordinates\":[[180,90],[-180,-90]]",
    b",",
    b"\n",
];

fn mutate(rng: &mut Rng, seed: &[u8], other: &[u8]) -> Vec<u8> {
    let mut d = seed.to_vec();
    for _ in 0..1 + rng.below(4) {
        let len = d.len().max(1) as u64;
        let at = rng.below(len) as usize;
        match rng.below(7) {
            0 if !d.is_empty() => {
                let i = at.min(d.len() - 1);
                d[i] ^= 1 << rng.below(8);
            }
            1 => d.truncate(at),
            2 => {
                let t = TOKENS[rng.below(TOKENS.len() as u64) as usize];
                let at = at.min(d.len());
                d.splice(at..at, t.iter().copied());
            }
            3 if !d.is_empty() => {
                let at = at.min(d.len() - 1);
                let end = (at + 1 + rng.below(64) as usize).min(d.len());
                let piece = d[at..end].to_vec();
                d.splice(at..at, piece);
            }
            4 if !other.is_empty() => {
                let from = rng.below(other.len() as u64) as usize;
                let at = at.min(d.len());
                d.truncate(at);
                d.extend_from_slice(&other[from..]);
            }
            5 if !d.is_empty() => {
                let at = at.min(d.len() - 1);
                let end = (at + 1 + rng.below(16) as usize).min(d.len());
                d.drain(at..end);
            }
            _ => {
                // Replace a run of digits with an extreme number.
                if let Some(p) = d.iter().skip(at).position(|b| b.is_ascii_digit()) {
                    let s = at + p;
                    let mut e = s;
                    while e < d.len() && (d[e].is_ascii_digit() || d[e] == b'.') {
                        e += 1;
                    }
                    let t: &[u8] =
                        [&b"1e300"[..], b"0", b"99999999999", b"-1"][rng.below(4) as usize];
                    d.splice(s..e, t.iter().copied());
                }
            }
        }
    }
    d
}

#[test]
fn every_fuzz_target_survives_its_seeds_and_their_mutations() {
    let seeds_root = Path::new(env!("CARGO_MANIFEST_DIR")).join("fuzz/seeds");
    let mut rng = Rng::new(0x5eed);
    for (name, run) in TARGETS {
        let dir = seeds_root.join(name);
        let mut seeds: Vec<Vec<u8>> = std::fs::read_dir(&dir)
            .unwrap_or_else(|e| panic!("{}: {e} (run scripts/fuzz-seeds.py)", dir.display()))
            .map(|e| std::fs::read(e.unwrap().path()).unwrap())
            .collect();
        seeds.sort();
        assert!(!seeds.is_empty(), "{name}: no seeds");
        // Regression inputs found by fuzzing, kept beside the seeds.
        let found = seeds_root.join("../regressions").join(name);
        if let Ok(rd) = std::fs::read_dir(&found) {
            for e in rd {
                seeds.push(std::fs::read(e.unwrap().path()).unwrap());
            }
        }
        let mut runs = 0;
        for (i, s) in seeds.iter().enumerate() {
            run(s);
            let other = &seeds[(i + 1) % seeds.len()];
            for _ in 0..MUTATIONS_PER_SEED {
                run(&mutate(&mut rng, s, other));
                runs += 1;
            }
        }
        eprintln!("{name}: {} seeds, {runs} mutations", seeds.len());
    }
}
