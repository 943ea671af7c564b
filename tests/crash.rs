//! Crash safety: reknit killed with SIGKILL at random moments while it replaces an output set
//! leaves the previous complete set, no output folder, or the new complete set — never a mix of old
//! and new files, never a half-written file — and the next run cleans up after it. Inputs are never
//! modified. (Invariant of the staging design, docs/architecture.md; common practice, no source.)

mod common;
use common::*;
use std::collections::BTreeMap;
use std::path::Path;
use std::time::{Duration, Instant};

type Set = BTreeMap<String, Vec<u8>>;

/// The visible files of a folder with their bytes (None when the folder does not exist).
fn read_set(dir: &Path) -> Option<Set> {
    let rd = std::fs::read_dir(dir).ok()?;
    Some(
        rd.flatten()
            .filter(|e| !e.file_name().to_string_lossy().starts_with('.'))
            .map(|e| {
                (
                    e.file_name().to_string_lossy().into_owned(),
                    std::fs::read(e.path()).unwrap(),
                )
            })
            .collect(),
    )
}

fn args<'a>(roads: &'a str, sites: &'a str, out: &'a str, variant: bool) -> Vec<&'a str> {
    let mut a = vec![
        "plan", "--roads", roads, "--sites", sites, "--out", out, "--force", "-q",
    ];
    if variant {
        a.extend(["--crew-capacity", "2000", "--redundancy"]);
    }
    a
}

#[test]
fn sigkill_at_random_moments_never_leaves_a_mix() {
    let d = tmp();
    let base = d.path();
    let roads = base.join("roads.geojson");
    let sites = base.join("sites.geojson");
    let sample = sample_roads();
    std::fs::copy(&sample, &roads).unwrap();
    std::fs::copy(sample.with_file_name("sites.geojson"), &sites).unwrap();
    let input_before = (
        std::fs::read(&roads).unwrap(),
        std::fs::metadata(&roads).unwrap().modified().unwrap(),
    );
    let (r, s) = (roads.to_str().unwrap(), sites.to_str().unwrap());

    // The two complete sets, made undisturbed.
    let mut sets = Vec::new();
    let mut full_run = Duration::ZERO;
    for variant in [false, true] {
        let out = base.join(format!("ref{}", variant as u8));
        let t = Instant::now();
        let o = run(&args(r, s, out.to_str().unwrap(), variant));
        full_run = full_run.max(t.elapsed());
        assert!(o.status.success(), "{}", stderr(&o));
        sets.push(read_set(&out).unwrap());
    }
    assert_ne!(sets[0], sets[1]);

    let out = base.join("out");
    let o_str = out.to_str().unwrap();
    assert!(run(&args(r, s, o_str, false)).status.success());
    let mut current = 0usize;
    let mut rng = reknit::rng::Rng::new(99);
    let (mut old, mut none, mut new) = (0, 0, 0);
    let budget_us = (full_run.as_micros() as u64).max(1000) * 12 / 10;
    for _ in 0..40 {
        let next = 1 - current;
        let mut child = reknit()
            .args(args(r, s, o_str, next == 1))
            .stdout(std::process::Stdio::null())
            .stderr(std::process::Stdio::null())
            .spawn()
            .unwrap();
        std::thread::sleep(Duration::from_micros(rng.below(budget_us)));
        let _ = child.kill(); // SIGKILL on Unix
        let _ = child.wait();
        match read_set(&out) {
            None => {
                none += 1;
                // Nothing there: an undisturbed run puts the previous set back.
                assert!(run(&args(r, s, o_str, current == 1)).status.success());
            }
            Some(got) if got == sets[current] => old += 1,
            Some(got) if got == sets[next] => {
                new += 1;
                current = next;
            }
            Some(got) => {
                let names: Vec<&String> = got.keys().collect();
                panic!("a mixed or partial set after SIGKILL: {names:?}");
            }
        }
        assert_eq!(read_set(&out).unwrap(), sets[current]);
    }
    eprintln!("40 kills: previous set {old}, no folder {none}, new set {new}");
    // One more undisturbed run leaves no staging or retired folders behind.
    assert!(run(&args(r, s, o_str, current == 1)).status.success());
    let hidden: Vec<String> = listing(base)
        .into_iter()
        .filter(|n| n.starts_with(".reknit"))
        .collect();
    assert!(hidden.is_empty(), "left behind: {hidden:?}");
    assert!(
        listing(&out)
            .iter()
            .all(|n| !n.starts_with('.') || n == ".reknit-outputs")
    );
    assert_eq!(
        (
            std::fs::read(&roads).unwrap(),
            std::fs::metadata(&roads).unwrap().modified().unwrap()
        ),
        input_before,
        "the input changed"
    );
}

#[test]
fn a_folder_with_other_files_is_replaced_file_by_file_with_the_marker_last() {
    let d = tmp();
    let out = d.path().join("out");
    std::fs::create_dir(&out).unwrap();
    std::fs::write(out.join("notes.txt"), "field notes").unwrap();
    let o = run(&["demo", "--out", out.to_str().unwrap(), "-q", "--force"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(
        std::fs::read_to_string(out.join("notes.txt")).unwrap(),
        "field notes"
    );
    assert!(out.join("summary.json").exists());
    let o = run(&[
        "demo",
        "--out",
        out.to_str().unwrap(),
        "-q",
        "--force",
        "--crew-capacity",
        "2000",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(
        std::fs::read_to_string(out.join("notes.txt")).unwrap(),
        "field notes"
    );
    assert!(listing(d.path()).iter().all(|n| !n.starts_with(".reknit")));
}
