//! The fixture of the `reknit replan` tests: a folder holding the invented sample district, its
//! first plan, a sheet handed back by crews, and readers of the outputs they check.

use super::{read_json, reknit, sample_roads, sample_sites, stderr, tmp};
use reknit::export::text::csv_text;
use serde_json::Value;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::process::Output;

/// A scratch folder the runs start from (relative paths as a user would give them).
pub struct District {
    dir: tempfile::TempDir,
}

impl District {
    /// A folder holding a copy of the sample district's roads (`roads.geojson`) and sites
    /// (`sites.geojson`).
    pub fn sample() -> District {
        let d = District::empty();
        std::fs::copy(sample_roads(), d.join("roads.geojson")).unwrap();
        std::fs::copy(sample_sites(), d.join("sites.geojson")).unwrap();
        d
    }

    /// An empty folder.
    pub fn empty() -> District {
        District { dir: tmp() }
    }

    /// The sample district with its first plan in `r1`: with the sites unless `whole`.
    pub fn planned(whole: bool) -> District {
        let d = District::sample();
        let mut a = vec!["plan", "--roads", "roads.geojson", "--out", "r1", "-q"];
        if !whole {
            a.extend(["--sites", "sites.geojson"]);
        }
        d.ok(&a);
        d
    }

    /// The folder.
    pub fn path(&self) -> &Path {
        self.dir.path()
    }

    /// A path inside the folder.
    pub fn join(&self, p: &str) -> PathBuf {
        self.dir.path().join(p)
    }

    /// Runs reknit from the folder.
    pub fn run(&self, args: &[&str]) -> Output {
        self.run_in(self.path(), args)
    }

    /// Runs reknit from `dir`.
    pub fn run_in(&self, dir: &Path, args: &[&str]) -> Output {
        self.run_env(dir, &[], args)
    }

    /// Runs reknit from `dir` with the environment variables `env` set.
    pub fn run_env(&self, dir: &Path, env: &[(&str, &str)], args: &[&str]) -> Output {
        let mut c = reknit();
        c.current_dir(dir).args(args);
        for (k, v) in env {
            c.env(k, v);
        }
        c.output().unwrap()
    }

    /// Runs reknit from the folder and checks that it succeeded.
    pub fn ok(&self, args: &[&str]) -> Output {
        ok(self.run(args))
    }

    /// `reknit replan r1 --finished back.csv --out r2 -q`, then `extra`; checks that it succeeded.
    pub fn replan(&self, extra: &[&str]) -> Output {
        self.replan_env(&[], extra)
    }

    /// [`District::replan`] with the environment variables `env` set (a thread count).
    pub fn replan_env(&self, env: &[(&str, &str)], extra: &[&str]) -> Output {
        let mut a = vec![
            "replan",
            "r1",
            "--finished",
            "back.csv",
            "--out",
            "r2",
            "-q",
        ];
        a.extend(extra);
        ok(self.run_env(self.path(), env, &a))
    }

    /// Writes `back.csv` from the work orders of `r1`, comma-separated (see [`sheet`]).
    pub fn sheet(&self, status: impl Fn(usize) -> &'static str) {
        sheet(
            &self.join("back.csv"),
            &self.join("r1"),
            b',',
            false,
            status,
        );
    }
}

/// Checks that a run succeeded, showing its messages when it did not.
pub fn ok(o: Output) -> Output {
    assert!(o.status.success(), "{}", stderr(&o));
    o
}

/// The previous plan's work orders (the `plan` rows), each as header → cell (prefix removed).
pub fn work_orders(out: &Path) -> (Vec<String>, Vec<BTreeMap<String, String>>) {
    let mut r = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
    let h: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    let rows = r
        .records()
        .map(|rec| {
            let rec = rec.unwrap();
            h.iter()
                .cloned()
                .zip(rec.iter().map(|c| csv_text(c).to_string()))
                .collect()
        })
        .filter(|m: &BTreeMap<String, String>| m["purpose"] == "plan")
        .collect();
    (h, rows)
}

/// Writes the sheet as a spreadsheet saves it: `sep`-separated, CRLF, with a byte-order mark
/// when `bom`; `status(i)` fills row i's status.
pub fn sheet(path: &Path, prev: &Path, sep: u8, bom: bool, status: impl Fn(usize) -> &'static str) {
    let (h, rows) = work_orders(prev);
    let mut buf = Vec::new();
    if bom {
        buf.extend_from_slice("\u{feff}".as_bytes());
    }
    {
        let mut w = csv::WriterBuilder::new()
            .delimiter(sep)
            .terminator(csv::Terminator::CRLF)
            .from_writer(&mut buf);
        w.write_record(&h).unwrap();
        for (i, r) in rows.iter().enumerate() {
            let cells: Vec<&str> = h
                .iter()
                .map(|c| {
                    if c == "status" {
                        status(i)
                    } else {
                        r[c].as_str()
                    }
                })
                .collect();
            w.write_record(&cells).unwrap();
        }
    }
    std::fs::write(path, buf).unwrap();
}

/// The summary of a plan folder.
pub fn summary(out: &Path) -> Value {
    read_json(&out.join("summary.json"))
}

/// Keys of the plan's repairs with their costs.
pub fn repairs(out: &Path) -> BTreeMap<String, f64> {
    read_json(&out.join("plan.geojson"))["features"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| &f["properties"])
        .filter(|p| p["repair"] == true)
        .map(|p| {
            (
                p["work_order"].as_str().unwrap().to_string(),
                p["cost"].as_f64().unwrap(),
            )
        })
        .collect()
}

/// Finished repair-metres: the previous plan's costs of the rows `done` marks.
pub fn finished_m(prev: &Path, done: impl Fn(usize) -> bool) -> f64 {
    let (_, rows) = work_orders(prev);
    rows.iter()
        .enumerate()
        .filter(|(i, _)| done(*i))
        .map(|(_, r)| r["cost"].parse::<f64>().unwrap())
        .sum()
}

/// A midpoint of a LineString feature's coordinates (a vertex in its middle, or halfway along
/// its only segment).
pub fn middle(f: &Value) -> [f64; 2] {
    let c = f["geometry"]["coordinates"].as_array().unwrap();
    let p = |v: &Value| [v[0].as_f64().unwrap(), v[1].as_f64().unwrap()];
    if c.len() > 2 {
        p(&c[c.len() / 2])
    } else {
        let (a, b) = (p(&c[0]), p(&c[1]));
        [(a[0] + b[0]) / 2.0, (a[1] + b[1]) / 2.0]
    }
}

/// Every file of a folder with its SHA-256 (FIPS 180-4, through the sha2 crate).
pub fn hashes(dir: &Path) -> BTreeMap<PathBuf, String> {
    use sha2::{Digest, Sha256};
    let mut out = BTreeMap::new();
    for e in std::fs::read_dir(dir).unwrap().flatten() {
        let bytes = std::fs::read(e.path()).unwrap();
        out.insert(e.path(), format!("{:x}", Sha256::digest(&bytes)));
    }
    out
}
