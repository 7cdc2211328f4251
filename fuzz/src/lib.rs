//! Shared pieces of the fuzz targets: structure-aware generators of valid-shaped inputs with
//! extreme numbers (so most inputs get past parsing and reach the solver), and the oracle that
//! every entry point's answer must satisfy.

use arbitrary::Unstructured;
use serde_json::{json, Value};

/// Numbers a site throws at the engine, and the edges of every range.
const EDGES: &[f64] = &[
    0.0,
    -0.0,
    1e-300,
    5e-324,
    1e-200,
    1e-30,
    1e-9,
    1e-6,
    0.01,
    0.05,
    0.1,
    0.5,
    1.0,
    2.0,
    12.0,
    49.0,
    50.0,
    60.0,
    100.0,
    120.0,
    208.0,
    240.0,
    277.0,
    400.0,
    480.0,
    1000.0,
    1e4,
    1e5,
    1e6,
    1e9,
    1e300,
    f64::MAX,
];

/// A number: an edge value, a value in a plausible range, or any f64 bit pattern (NaN and
/// infinity cannot be written in JSON, so they become null on the way in, as in a real file).
pub fn number(u: &mut Unstructured, lo: f64, hi: f64) -> arbitrary::Result<f64> {
    Ok(match u.int_in_range(0..=9)? {
        0..=2 => EDGES[u.choose_index(EDGES.len())?],
        3 => f64::from_bits(u.arbitrary()?),
        _ => lo + (hi - lo) * (f64::from(u.int_in_range(0..=1_000_000u32)?) / 1e6),
    })
}

fn pick<'a>(u: &mut Unstructured, items: &[&'a str]) -> arbitrary::Result<&'a str> {
    Ok(items[u.choose_index(items.len())?])
}

fn num(x: f64) -> Value {
    serde_json::Number::from_f64(x).map_or(Value::Null, Value::Number)
}

/// A valid-shaped job: every key spelt right, values drawn from edges and plausible ranges; the
/// loads are often identical (many rounded circuits), some share a neutral.
pub fn job(u: &mut Unstructured) -> arbitrary::Result<Value> {
    let kind = pick(u, &["split-phase", "wye"])?;
    let phases = if kind == "wye" {
        u.int_in_range(2..=3)?
    } else {
        2
    };
    let frequency = if u.arbitrary()? { 60.0 } else { 50.0 };
    let mut system = json!({"kind":kind,"volts_to_neutral":num(number(u, 100.0, 300.0)?),
        "frequency_hz":num(frequency)});
    if kind == "wye" {
        system["phases"] = json!(phases);
    }
    let connects: &[&str] = if phases == 3 {
        &["L1-N", "L2-N", "L3-N", "L1-L2", "L2-L3", "L3-L1"]
    } else {
        &["L1-N", "L2-N", "L1-L2"]
    };
    let models = ["resistive", "impedance", "lamp", "motor", "electronic"];
    let n = u.int_in_range(0..=24)?;
    let identical = u.arbitrary::<bool>()?;
    let mut loads = Vec::new();
    let mut shared = false;
    for k in 0..n {
        let model = pick(u, &models)?;
        let watts = if identical {
            1200.0
        } else {
            number(u, 1.0, 5000.0)?
        };
        let mut l = json!({"name":format!("l{k}"),"connect":pick(u, connects)?,"model":model,
            "watts":num(watts),"circuit":format!("{}", u.int_in_range(1..=42)?)});
        if matches!(model, "impedance" | "motor" | "electronic") {
            l["power_factor"] = num(number(u, 0.3, 1.0)?);
        }
        if model == "electronic" && u.arbitrary()? {
            l["harmonics"] = json!([[3, num(number(u, 0.0, 1.0)?)], [5, 0.4]]);
        }
        if model == "motor" && u.arbitrary()? {
            l["code_letter"] = json!(pick(u, &["A", "F", "G", "L", "V"])?);
            l["hp"] = num(number(u, 0.1, 10.0)?);
        }
        if u.arbitrary()? {
            l["branch"] =
                json!({"r_ohm":num(number(u, 0.0, 1.0)?),"x_ohm":num(number(u, 0.0, 0.2)?)});
        }
        if u.arbitrary()? {
            l["on"] = json!(false);
        }
        if u.ratio(1, 4)? && l["connect"].as_str().unwrap_or("").ends_with("-N") {
            l["multiwire"] = json!("M");
            shared = true;
        }
        loads.push(l);
    }
    let state = pick(u, &["intact", "loose", "open"])?;
    let mut neutral = json!({"state":state});
    if state == "loose" {
        neutral["ohms"] = num(number(u, 0.0, 1000.0)?);
    }
    if u.arbitrary()? {
        neutral["earth_return_ohms"] = num(number(u, 0.01, 1000.0)?);
    }
    let mut job = json!({"version":1,"name":"fuzz","system":system,"neutral":neutral,
        "service":{"hot":{"r_ohm":num(number(u, 0.0, 0.5)?),"x_ohm":num(number(u, 0.0, 0.2)?)},
                   "neutral":{"r_ohm":num(number(u, 0.0, 0.5)?),"x_ohm":num(number(u, 0.0, 0.2)?)}},
        "loads":loads});
    if shared {
        job["multiwire"] = json!([{"id":"M","material":"cu","size":"12",
            "length_ft":num(number(u, 0.0, 200.0)?)}]);
    }
    if u.arbitrary()? {
        job["transformer"] = json!({"kva":num(number(u, 0.5, 500.0)?),"primary_v":12470,
            "impedance_pct":num(number(u, 0.1, 25.0)?),"x_over_r":num(number(u, 0.0, 10.0)?)});
    }
    if u.arbitrary()? {
        let sets = u.int_in_range(1..=2)?;
        let mut list = Vec::new();
        for k in 0..sets {
            list.push(json!({"taken":format!("2026-12-0{} 09:40", k + 1),
                "readings":readings(u)?["readings"].clone()}));
        }
        job["readings"] = json!(list);
    }
    Ok(job)
}

/// A valid-shaped readings file.
pub fn readings(u: &mut Unstructured) -> arbitrary::Result<Value> {
    let n = u.int_in_range(0..=5)?;
    let mut list = Vec::new();
    for _ in 0..n {
        let mut r = json!({"l1_n_v":num(number(u, 90.0, 140.0)?),"l2_n_v":num(number(u, 90.0, 140.0)?),
            "l1_a":num(number(u, 0.0, 100.0)?),"l2_a":num(number(u, 0.0, 100.0)?),
            "at":pick(u, &["panel", "meter"])?});
        if u.arbitrary()? {
            r["l1_pf"] = num(number(u, 0.05, 1.0)?);
            r["l2_pf"] = num(number(u, 0.05, 1.0)?);
        }
        if u.arbitrary()? {
            r["l1_l2_v"] = num(number(u, 180.0, 260.0)?);
        }
        list.push(r);
    }
    Ok(json!({"version":1,"system":{"kind":"split-phase"},"readings":list}))
}

/// A valid-shaped job drawn from `data`, as JSON and validated, when it validates.
pub fn valid_job(data: &[u8]) -> Option<(Value, tapline_core::validate::Job)> {
    let mut u = Unstructured::new(data);
    let value = job(&mut u).ok()?;
    let (_, job) = tapline_core::load_job(&value.to_string()).ok()?;
    Some((value, job))
}

/// The oracle: every number of a serialized answer is finite (walked through
/// `serde_json::Value`, not its text) and every `null` is a documented "not applicable".
pub fn assert_documented(value: &Value, key: &str) {
    match value {
        Value::Null => assert!(
            tapline_core::report::NOT_APPLICABLE_KEYS.contains(&key),
            "`{key}` is null"
        ),
        Value::Number(n) => assert!(n.as_f64().is_some_and(f64::is_finite), "`{key}` is {n}"),
        Value::Array(items) => items.iter().for_each(|v| assert_documented(v, key)),
        Value::Object(map) => map.iter().for_each(|(k, v)| assert_documented(v, k)),
        _ => {}
    }
}
