//! Independent cross-check: generated linear networks solved by the engine and by ngspice (the
//! Debian package, an independent circuit solver) agree on every panel node voltage within 1e-6
//! relative.
//!
//! The netlists are written here from the job's own parameters, not from the engine's network:
//! load impedances from watts, power factor and rated voltage (Z = V_r²/S*), transformer impedance
//! from kVA, %Z and X/R, and the center-tapped winding as an ideal transformer with a primary
//! impedance and two half-winding impedances (controlled sources in SPICE). The test fails if
//! ngspice is missing: the README's test command installs it.

use num_complex::Complex64;
use serde_json::{json, Value};
use std::f64::consts::PI;
use std::fmt::Write as _;
use std::process::Command;
use tapline_core::network::{Network, NEUTRAL_INDEX};
use tapline_core::solve::solve;

/// A small deterministic generator (xorshift64*), so every run checks the same networks.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        (self.0.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11) as f64 / (1u64 << 53) as f64
    }
    fn range(&mut self, lo: f64, hi: f64) -> f64 {
        lo + (hi - lo) * self.next()
    }
    fn pick<'a, T>(&mut self, items: &'a [T]) -> &'a T {
        &items[((self.next() * items.len() as f64) as usize).min(items.len() - 1)]
    }
}

const FREQ: f64 = 60.0;

/// One generated case: the job JSON and the facts the netlist needs.
fn generate(rng: &mut Rng, case: usize) -> Value {
    let kind = *rng.pick(&["split", "wye2", "wye3"]);
    let v = rng.range(100.0, 290.0);
    let (system, connects): (Value, Vec<&str>) = match kind {
        "split" => (
            json!({"kind":"split-phase","volts_to_neutral":v}),
            vec!["L1-N", "L2-N", "L1-L2"],
        ),
        "wye2" => (
            json!({"kind":"wye","phases":2,"volts_to_neutral":v}),
            vec!["L1-N", "L2-N", "L1-L2"],
        ),
        _ => (
            json!({"kind":"wye","volts_to_neutral":v}),
            vec!["L1-N", "L2-N", "L3-N", "L1-L2", "L2-L3", "L3-L1"],
        ),
    };
    let n_loads = 1 + (rng.next() * 7.0) as usize;
    let mut loads = Vec::new();
    for _ in 0..n_loads {
        let c = *rng.pick(&connects);
        let linear = *rng.pick(&["resistive", "impedance"]);
        let mut l = json!({"connect":c,"model":linear,"watts":rng.range(20.0, 6000.0)});
        if linear == "impedance" {
            l["power_factor"] = json!(rng.range(0.4, 1.0));
        }
        if rng.next() < 0.4 {
            l["branch"] = json!({"r_ohm":rng.range(0.0, 0.4),"x_ohm":rng.range(0.0, 0.1)});
        }
        loads.push(l);
    }
    // Keep one load on the neutral so the open-neutral cases never leave the bar floating.
    loads.push(json!({"connect":"L1-N","model":"resistive","watts":rng.range(20.0, 2000.0)}));
    let neutral = match case % 4 {
        0 => json!({"state":"intact"}),
        1 => json!({"state":"loose","ohms":rng.range(0.05, 20.0)}),
        2 => json!({"state":"open","earth_return_ohms":rng.range(2.0, 100.0)}),
        _ => json!({"state":"open"}),
    };
    let mut job = json!({"version":1,"name":format!("case {case}"),"system":system,
        "service":{"hot":{"r_ohm":rng.range(0.001, 0.1),"x_ohm":rng.range(0.0, 0.05)},
                   "neutral":{"r_ohm":rng.range(0.001, 0.1),"x_ohm":rng.range(0.0, 0.05)}},
        "neutral":neutral,"loads":loads});
    if rng.next() < 0.6 {
        job["transformer"] = json!({"kva":rng.range(15.0, 300.0),"primary_v":12470,
            "impedance_pct":rng.range(1.0, 5.0),"x_over_r":rng.range(0.5, 4.0)});
    }
    job
}

/// Writes R and L in series from node `a` to node `b` for the impedance `z` (ohms at 60 Hz).
fn impedance(net: &mut String, name: &str, a: &str, b: &str, z: Complex64) {
    let mid = format!("{name}_m");
    match (z.re > 0.0, z.im > 0.0) {
        (true, true) => {
            writeln!(net, "R{name} {a} {mid} {:.17e}", z.re).unwrap();
            writeln!(net, "L{name} {mid} {b} {:.17e}", z.im / (2.0 * PI * FREQ)).unwrap();
        }
        (true, false) => writeln!(net, "R{name} {a} {b} {:.17e}", z.re).unwrap(),
        (false, true) => {
            writeln!(net, "L{name} {a} {b} {:.17e}", z.im / (2.0 * PI * FREQ)).unwrap()
        }
        (false, false) => writeln!(net, "V{name} {a} {b} 0").unwrap(),
    }
}

fn node(leg: &str) -> &'static str {
    match leg {
        "L1" => "pl1",
        "L2" => "pl2",
        "L3" => "pl3",
        _ => "pn",
    }
}

fn num(v: &Value) -> f64 {
    v.as_f64().unwrap_or(0.0)
}

/// The SPICE netlist of a generated job.
fn netlist(job: &Value) -> String {
    let sys = &job["system"];
    let v = num(&sys["volts_to_neutral"]);
    let split = sys["kind"] == "split-phase";
    let legs: Vec<&str> = if split || sys["phases"] == 2 {
        vec!["L1", "L2"]
    } else {
        vec!["L1", "L2", "L3"]
    };
    let hot = Complex64::new(
        num(&job["service"]["hot"]["r_ohm"]),
        num(&job["service"]["hot"]["x_ohm"]),
    );
    let mut n = String::from("generated network\n");
    // Transformer winding impedance on the secondary: |Z| = %Z/100 · V_LL²/S, split by X/R.
    let v_ll = if split { 2.0 * v } else { 3f64.sqrt() * v };
    let z_full = job.get("transformer").map(|t| {
        let zmag = num(&t["impedance_pct"]) / 100.0 * v_ll * v_ll / (num(&t["kva"]) * 1000.0);
        let xr = num(&t["x_over_r"]);
        let r = zmag / (1.0 + xr * xr).sqrt();
        Complex64::new(r, r * xr)
    });
    if split {
        match z_full {
            Some(z) => {
                // Ideal center-tapped transformer: primary (referred to the full winding) behind
                // Z0 = 0.5R + j0.8X, halves behind Z1 = 0.25R + j0.1X each.
                let z0 = Complex64::new(0.5 * z.re, 0.8 * z.im);
                let z1 = Complex64::new(0.25 * z.re, 0.1 * z.im);
                writeln!(n, "VS s 0 AC {:.17e} 0", 2.0 * v).unwrap();
                impedance(&mut n, "P", "s", "p", z0);
                n.push_str("EA x1i 0 p 0 0.5\nVA x1i x1 0\nEB 0 x3i p 0 0.5\nVB x3i x3 0\nFA p 0 VA 0.5\nFB p 0 VB -0.5\n");
                impedance(&mut n, "H1", "x1", "pl1", z1 + hot);
                impedance(&mut n, "H2", "x3", "pl2", z1 + hot);
            }
            None => {
                writeln!(n, "VE1 e1 0 AC {:.17e} 0", v).unwrap();
                writeln!(n, "VE2 e2 0 AC {:.17e} 180", v).unwrap();
                impedance(&mut n, "H1", "e1", "pl1", hot);
                impedance(&mut n, "H2", "e2", "pl2", hot);
            }
        }
    } else {
        for (k, leg) in legs.iter().enumerate() {
            let angle = [0.0, -120.0, 120.0][k];
            writeln!(n, "VE{k} e{k} 0 AC {:.17e} {angle}", v).unwrap();
            impedance(
                &mut n,
                &format!("H{k}"),
                &format!("e{k}"),
                node(leg),
                hot + z_full.unwrap_or_default(),
            );
        }
    }
    let zn = Complex64::new(
        num(&job["service"]["neutral"]["r_ohm"]),
        num(&job["service"]["neutral"]["x_ohm"]),
    );
    match job["neutral"]["state"].as_str().unwrap() {
        "intact" => impedance(&mut n, "N", "pn", "0", zn),
        "loose" => impedance(&mut n, "N", "pn", "0", zn + num(&job["neutral"]["ohms"])),
        _ => {
            if let Some(e) = job["neutral"]["earth_return_ohms"].as_f64() {
                writeln!(n, "RE pn 0 {e:.17e}").unwrap();
            }
        }
    }
    for (k, l) in job["loads"].as_array().unwrap().iter().enumerate() {
        let (a, b) = l["connect"].as_str().unwrap().split_once('-').unwrap();
        let rated = if b == "N" { v } else { v_ll };
        let p = num(&l["watts"]);
        let pf = l["power_factor"].as_f64().unwrap_or(1.0);
        let s = Complex64::new(p, p * (1.0 - pf * pf).sqrt() / pf);
        // Z = V_r² / S*: the impedance that draws S at rated voltage.
        let z = rated * rated / s.conj();
        let branch = Complex64::new(
            2.0 * num(&l["branch"]["r_ohm"]),
            2.0 * num(&l["branch"]["x_ohm"]),
        );
        impedance(&mut n, &format!("D{k}"), node(a), node(b), z + branch);
    }
    n.push_str(".control\nset numdgt=15\nac lin 1 60 60\nprint");
    for leg in legs.iter().chain(["N"].iter()) {
        write!(n, " vr({0}) vi({0})", node(leg)).unwrap();
    }
    n.push_str("\nquit 0\n.endc\n.end\n");
    n
}

fn run_ngspice(
    netlist: &str,
    dir: &std::path::Path,
    case: usize,
) -> std::collections::HashMap<String, f64> {
    let path = dir.join(format!("case{case}.cir"));
    std::fs::write(&path, netlist).unwrap();
    let out = Command::new("ngspice")
        .arg("-b")
        .arg(&path)
        .output()
        .expect(
        "ngspice must be installed (apt-get install ngspice; the README's test command does this)",
    );
    assert!(
        out.status.success(),
        "ngspice failed on case {case}:\n{}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8_lossy(&out.stdout)
        .lines()
        .filter_map(|line| {
            let (k, v) = line.split_once(" = ")?;
            Some((k.trim().to_string(), v.trim().parse().ok()?))
        })
        .collect()
}

/// Source: ngspice (Debian package), AC analysis at 60 Hz, as an independent circuit solver.
#[test]
fn engine_agrees_with_ngspice_on_generated_networks() {
    let dir = std::env::temp_dir().join(format!("tapline-spice-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let mut rng = Rng(0x7A91_1E5C_0FFE_E123);
    let cases = 60;
    let mut worst: f64 = 0.0;
    for case in 0..cases {
        let job = generate(&mut rng, case);
        let valid = tapline_core::load_job(&job.to_string())
            .unwrap_or_else(|e| panic!("case {case}: {e}"))
            .1;
        let sol = solve(&Network::new(&valid)).unwrap();
        let spice = run_ngspice(&netlist(&job), &dir, case);
        let v_nom = num(&job["system"]["volts_to_neutral"]);
        let legs = if valid.system().legs().len() == 2 {
            vec!["L1", "L2"]
        } else {
            vec!["L1", "L2", "L3"]
        };
        for (k, leg) in legs.iter().chain(["N"].iter()).enumerate() {
            let index = if *leg == "N" { NEUTRAL_INDEX } else { k };
            let name = node(leg);
            let theirs =
                Complex64::new(spice[&format!("vr({name})")], spice[&format!("vi({name})")]);
            let ours = sol.node_v[index].unwrap();
            // Relative to the node's own voltage, with a floor of a millionth of nominal for bars
            // that sit near zero (an intact neutral).
            let err = (ours - theirs).norm() / ours.norm().max(theirs.norm()).max(1e-3 * v_nom);
            worst = worst.max(err);
            assert!(err <= 1e-6, "case {case} node {leg}: engine {ours} vs ngspice {theirs} (relative {err:e})\n{job}");
        }
    }
    std::fs::remove_dir_all(&dir).ok();
    println!("{cases} networks agree with ngspice; worst relative difference {worst:e}");
}
