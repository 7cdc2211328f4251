//! The benchmark's job, shared by the criterion benchmark (`engine.rs`) and the instruction
//! counter's loop (`examples/solve_loop.rs`), so that both measure the same network.

use serde_json::json;

/// A house-sized job: 40 loads of every model on both legs and across, a transformer, service
/// conductors and a loose neutral.
pub fn forty_load_job() -> tapline_core::validate::Job {
    let models = [
        ("resistive", 1500.0, 1.0),
        ("motor", 400.0, 0.8),
        ("electronic", 150.0, 0.95),
        ("lamp", 60.0, 1.0),
        ("impedance", 800.0, 0.9),
    ];
    let mut loads = Vec::new();
    for k in 0..40 {
        let (model, watts, pf) = models[k % models.len()];
        let connect = match k % 7 {
            6 => "L1-L2",
            n if n % 2 == 0 => "L1-N",
            _ => "L2-N",
        };
        let rated = if connect == "L1-L2" { 240.0 } else { 120.0 };
        let mut l = json!({"name":format!("load {k}"),"connect":connect,"model":model,
            "watts":watts * (1.0 + (k as f64) / 40.0) / 4.0,"rated_v":rated,"power_factor":pf});
        if model == "electronic" {
            l["harmonics"] = json!([[3, 0.8], [5, 0.6], [7, 0.4]]);
        }
        loads.push(l);
    }
    let job = json!({"version":1,"name":"bench","system":{"kind":"split-phase"},
        "transformer":{"kva":50,"primary_v":7200,"impedance_pct":2.0,"x_over_r":1.5},
        "service":{"hot":{"material":"al","size":"4/0","length_m":30},"neutral":{"material":"al","size":"2/0","length_m":30}},
        "neutral":{"state":"loose","ohms":0.5},"loads":loads});
    tapline_core::load_job(&job.to_string())
        .expect("bench job is valid")
        .1
}
