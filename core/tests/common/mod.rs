//! Helpers shared by the integration tests.
#![allow(dead_code)]

use tapline_core::network::Network;
use tapline_core::report::Report;
use tapline_core::solve::{solve, Solution};
use tapline_core::validate::Job;

/// Asserts |a − b| ≤ tol, printing both values on failure.
#[track_caller]
pub fn close(a: f64, b: f64, tol: f64) {
    assert!(
        (a - b).abs() <= tol,
        "expected {b} ± {tol}, got {a} (off by {})",
        (a - b).abs()
    );
}

/// Asserts a relative difference of at most `rel`.
#[track_caller]
pub fn close_rel(a: f64, b: f64, rel: f64) {
    let scale = a.abs().max(b.abs()).max(1e-300);
    assert!(
        (a - b).abs() / scale <= rel,
        "expected {b} within {rel} relative, got {a}"
    );
}

/// The root of a hand model's equation `f` between `lo` and `hi`, by bisection (200 halvings, far
/// past f64 resolution); `f(lo)` > 0 > `f(hi)` is required, so the bracket is checked.
pub fn bisect(f: impl Fn(f64) -> f64, mut lo: f64, mut hi: f64) -> f64 {
    assert!(
        f(lo) > 0.0 && f(hi) < 0.0,
        "the bracket holds one sign change"
    );
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if f(mid) > 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

/// Parses and validates a job, panicking with the problems if it is invalid.
pub fn job(text: &str) -> Job {
    match tapline_core::load_job(text) {
        Ok((_, j)) => j,
        Err(e) => panic!("test job is invalid:\n{e}"),
    }
}

/// Solves a job's network.
pub fn solved(j: &Job) -> (Network, Solution) {
    let net = Network::new(j);
    let sol = solve(&net).expect("solves");
    (net, sol)
}

/// The report of a job's JSON text.
pub fn report(text: &str) -> Report {
    tapline_core::solve_text(text).expect("solves")
}

/// A resistive load's watts at `rated_v` for a resistance in ohms: P = V²/R.
pub fn watts_for_ohms(rated_v: f64, ohms: f64) -> f64 {
    rated_v * rated_v / ohms
}

/// Walks a serialized report (as a `serde_json::Value`, not its text) and fails on any number
/// that is not finite and on any `null` whose key is not documented as "not applicable": serde
/// writes NaN and infinity as `null`, so an undocumented `null` is a figure that went wrong.
#[track_caller]
pub fn assert_numbers_documented(value: &serde_json::Value, key: &str) {
    use serde_json::Value;
    match value {
        Value::Null => assert!(
            tapline_core::report::NOT_APPLICABLE_KEYS.contains(&key),
            "`{key}` is null but not documented as not applicable"
        ),
        Value::Number(n) => assert!(
            n.as_f64().is_some_and(f64::is_finite),
            "`{key}` is {n}, not a finite number"
        ),
        Value::Array(items) => items.iter().for_each(|v| assert_numbers_documented(v, key)),
        Value::Object(map) => map
            .iter()
            .for_each(|(k, v)| assert_numbers_documented(v, k)),
        _ => {}
    }
}
