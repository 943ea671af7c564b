//! `--time-limit`: the explicit opt-out of deterministic plans, recorded as such in summary.json,
//! and the progress line, which never reaches a pipe.

mod common;
use common::*;

/// The sample district at thorough effort, with and without a time limit: the limit is recorded
/// (`deterministic: false`, `settings.time_limit_s`), and since the budgeted steps still run first,
/// in the same order, the plan is no dearer and its bound no lower, however little time is given.
#[test]
fn a_time_limit_is_recorded_as_not_deterministic() {
    let d = tmp();
    let sites = sample_sites();
    let run_with = |name: &str, extra: &[&str]| {
        let out = d.path().join(name);
        let mut args = vec!["--sites", sites.to_str().unwrap(), "--effort", "thorough"];
        args.extend_from_slice(extra);
        let o = plan_cli(&sample_roads(), &out, &args);
        assert!(o.status.success(), "{}", stderr(&o));
        // stderr is a pipe here: the progress line must not be drawn into it.
        let err = stderr(&o);
        assert!(!err.contains("best plan"), "progress line on a pipe: {err}");
        read_json(&out.join("summary.json"))
    };
    let budgeted = run_with("budgeted", &[]);
    let clocked = run_with("clocked", &["--time-limit", "0.001"]);
    assert_eq!(budgeted["deterministic"], true);
    assert!(budgeted["settings"]["time_limit_s"].is_null());
    assert_eq!(clocked["deterministic"], false);
    assert_eq!(clocked["settings"]["time_limit_s"], 0.001);
    let f = |s: &serde_json::Value, k: &str| s[k].as_f64().unwrap();
    assert!(f(&clocked, "total_cost") <= f(&budgeted, "total_cost"));
    assert!(f(&clocked, "lower_bound") >= f(&budgeted, "lower_bound"));
    assert!(f(&clocked, "lower_bound") <= f(&clocked, "total_cost"));
    // A different setting, a different fingerprint (resume must not mix the two).
    assert_ne!(budgeted["fingerprint"], clocked["fingerprint"]);
}
