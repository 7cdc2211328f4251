//! Solves the benchmark's 40-load job (or sweeps it over 500 neutral resistances) N times, for
//! counting instructions under callgrind: `scripts/instructions.sh` runs it for N and 2N and takes
//! the difference over N, which leaves out building the job and starting the process.
//!
//! Usage: `solve_loop solve|sweep N`.

use std::hint::black_box;
use tapline_core::network::Network;
use tapline_core::solve::solve;
use tapline_core::whatif::{sweep, sweep_points};

#[path = "../benches/jobs/mod.rs"]
mod jobs;

fn main() {
    let mut args = std::env::args().skip(1);
    let (what, n) = match (
        args.next(),
        args.next().and_then(|n| n.parse::<usize>().ok()),
    ) {
        (Some(what), Some(n)) if what == "solve" || what == "sweep" => (what, n),
        _ => {
            eprintln!("usage: solve_loop solve|sweep N");
            std::process::exit(2);
        }
    };
    let job = jobs::forty_load_job();
    if what == "solve" {
        let net = Network::new(&job);
        for _ in 0..n {
            black_box(solve(black_box(&net)).expect("the benchmark job solves"));
        }
    } else {
        let points = sweep_points(500);
        for _ in 0..n {
            black_box(sweep(black_box(&job), &points).expect("the benchmark job sweeps"));
        }
    }
}
