//! Speed of the engine: a 40-load split-phase job with non-linear loads, a 500-point neutral
//! sweep of it, and, for comparison, ngspice solving the same network (linearised at the engine's
//! solution) in batch mode; balancing a 42-circuit panel and a diagnosis from readings.
//! Targets: solve < 20 µs, sweep < 10 ms, balance < 50 ms, diagnosis < 1 ms (medians).

use criterion::{criterion_group, criterion_main, Criterion};
use serde_json::json;
use std::fmt::Write as _;
use std::hint::black_box;
use tapline_core::network::{Network, Node};
use tapline_core::solve::solve;
use tapline_core::whatif::{sweep, sweep_points};

mod jobs;
use jobs::forty_load_job;

/// The same network as a SPICE netlist, each load as the linear impedance it settled at.
fn netlist(net: &Network) -> String {
    let sol = solve(net).expect("solves");
    let mut n = String::from("bench\n");
    for (k, e) in net.emf().iter().take(2).enumerate() {
        writeln!(n, "VE{k} e{k} 0 AC {} {}", e.norm(), e.arg().to_degrees()).unwrap();
        // A diagonal source stands in for the coupled one: ngspice's time is what is measured.
        writeln!(n, "RS{k} e{k} p{k} 0.03").unwrap();
    }
    n.push_str("RN pn 0 0.6\n");
    let name = |node: Node| match node {
        Node::Hot(l) => format!("p{}", l.index()),
        Node::Neutral => "pn".to_string(),
        Node::Shared(k) => format!("ps{k}"),
    };
    for (k, (p, r)) in net.loads().iter().zip(&sol.loads).enumerate() {
        let z = r.terminal_v.unwrap() / r.current;
        writeln!(n, "R{k} {} m{k} {}", name(p.a), z.re).unwrap();
        writeln!(
            n,
            "L{k} m{k} {} {}",
            name(p.b),
            z.im.max(1e-9) / (2.0 * std::f64::consts::PI * 60.0)
        )
        .unwrap();
    }
    n.push_str(".control\nac lin 1 60 60\nprint v(p0) v(p1) v(pn)\nquit 0\n.endc\n.end\n");
    n
}

/// A full 42-position panel of 120 V circuits with household-like ratings and power factors
/// (a fixed pseudo-random sequence, so every run measures the same panel).
fn forty_two_circuits() -> tapline_core::validate::Job {
    let mut x: u64 = 0x5EED_CAFE_F00D_1234;
    let mut next = move || {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        (x % 10_000) as f64 / 10_000.0
    };
    let loads: Vec<serde_json::Value> = (0..42)
        .map(|k| {
            let watts = 60.0 + 1740.0 * next() * next();
            let pf = 0.7 + 0.3 * next();
            json!({"name":format!("circuit {}", k + 1),"connect":if k % 4 < 2 { "L1-N" } else { "L2-N" },
                   "model":"impedance","watts":watts,"power_factor":pf,"circuit":format!("{}", k + 1),"slot":k + 1})
        })
        .collect();
    let job =
        json!({"version":1,"name":"42 circuits","system":{"kind":"split-phase"},"loads":loads});
    tapline_core::load_job(&job.to_string()).expect("valid").1
}

/// A generated 42-circuit panel: split-phase or three-phase, arbitrary ratings and power factors,
/// some electronic loads with harmonics, some circuits not movable, and (every third panel) runs
/// of identical circuits, the case that defeats a search without symmetry.
fn generated_panel(seed: u64) -> tapline_core::validate::Job {
    let mut x: u64 = seed.wrapping_mul(0x9E37_79B9_7F4A_7C15) | 1;
    let mut next = move || {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        (x % 1_000_000) as f64 / 1_000_000.0
    };
    let three = seed % 2 == 1;
    let legs = if three { 3 } else { 2 };
    let identical = seed % 3 == 0;
    let loads: Vec<serde_json::Value> = (0..42)
        .map(|k| {
            let (watts, pf) = if identical && k % 2 == 0 {
                (1200.0, 1.0)
            } else {
                (40.0 + 1900.0 * next() * next(), 0.5 + 0.5 * next())
            };
            let mut l = json!({"name":format!("c{}", k + 1),
                "connect":format!("L{}-N", (k / 2) % legs + 1),
                "model":"impedance","watts":watts,"power_factor":pf,
                "circuit":format!("{}", k + 1),"slot":k + 1,"movable":next() > 0.1});
            if next() < 0.15 {
                l["model"] = json!("electronic");
                l["harmonics"] = json!([[3, 0.8], [5, 0.5]]);
            }
            l
        })
        .collect();
    let system = if three {
        json!({"kind":"wye"})
    } else {
        json!({"kind":"split-phase"})
    };
    let job = json!({"version":1,"name":"generated","system":system,"loads":loads});
    tapline_core::load_job(&job.to_string()).expect("valid").1
}

/// Balancing's worst case, not just the demo: 200 generated panels, each balanced once, with the
/// median and the worst printed beside the criterion figures (targets: median < 50 ms, worst
/// < 200 ms).
fn balance_worst_case(_: &mut Criterion) {
    let mut times: Vec<f64> = (0..200)
        .map(|seed| {
            let panel = generated_panel(seed);
            let t = std::time::Instant::now();
            black_box(tapline_core::tools::balance::balance(
                black_box(&panel),
                tapline_core::tools::balance::Layout::Standard,
            ));
            t.elapsed().as_secs_f64() * 1e3
        })
        .collect();
    times.sort_by(f64::total_cmp);
    println!(
        "balance, 200 generated 42-circuit panels: median {:.2} ms, worst {:.2} ms",
        times[100], times[199]
    );
}

fn tools(c: &mut Criterion) {
    let panel = forty_two_circuits();
    c.bench_function("balance 42 circuits", |b| {
        b.iter(|| {
            tapline_core::tools::balance::balance(
                black_box(&panel),
                tapline_core::tools::balance::Layout::Standard,
            )
        })
    });
    let text = json!({"version":1,"system":{"kind":"split-phase"},"readings":[
        {"label":"baseline","l1_n_v":121.4,"l2_n_v":119.8,"l1_a":12.1,"l2_a":3.0},
        {"label":"kettle on L1","l1_n_v":114.9,"l2_n_v":124.1,"l1_a":24.4,"l2_a":3.0},
        {"label":"kettle on L2","l1_n_v":125.6,"l2_n_v":113.0,"l1_a":12.1,"l2_a":15.6}]})
    .to_string();
    let readings = tapline_core::tools::diagnose::parse_readings(&text).unwrap();
    c.bench_function("diagnose from three readings", |b| {
        b.iter(|| tapline_core::tools::diagnose::diagnose(black_box(&readings)).unwrap())
    });
    let run = tapline_core::tools::size::parse_run(
        &json!({"version":1,"system":{"kind":"split-phase"},
            "run":{"kind":"feeder","connect":"L1-N","amps":90,"power_factor":0.9,"length_ft":150,
                   "material":"al","neutral_amps":30}})
        .to_string(),
    )
    .unwrap();
    c.bench_function("size one run, every standard size", |b| {
        b.iter(|| tapline_core::tools::size::size(black_box(&run)))
    });
    let job = forty_load_job();
    let motor = job
        .loads()
        .iter()
        .find(|l| l.model() == tapline_core::loads::Model::Motor)
        .expect("the 40-load job has motors")
        .name()
        .to_string();
    c.bench_function("motor start, 40-load job", |b| {
        b.iter(|| tapline_core::tools::start::start(black_box(&job), &motor, 4.0).unwrap())
    });
}

fn benches(c: &mut Criterion) {
    let job = forty_load_job();
    let net = Network::new(&job);
    c.bench_function("solve 40-load split-phase job", |b| {
        b.iter(|| solve(black_box(&net)).unwrap())
    });
    let points = sweep_points(500);
    c.bench_function("sweep 500 neutral resistances", |b| {
        b.iter(|| sweep(black_box(&job), &points).unwrap())
    });
    let spice_ok = std::process::Command::new("ngspice")
        .arg("--version")
        .output()
        .is_ok();
    if spice_ok {
        let path = std::env::temp_dir().join("tapline-bench.cir");
        std::fs::write(&path, netlist(&net)).unwrap();
        let mut group = c.benchmark_group("ngspice");
        group.sample_size(20);
        group.bench_function("ngspice -b, same network (process start included)", |b| {
            b.iter(|| {
                let out = std::process::Command::new("ngspice")
                    .arg("-b")
                    .arg(&path)
                    .output()
                    .unwrap();
                assert!(out.status.success());
            })
        });
        group.finish();
    }
}

criterion_group!(engine, benches, tools, balance_worst_case);
criterion_main!(engine);
