//! Sizing a run for its drop: every standard size of one run side by side, with its voltage drop
//! at the load's power factor, its NEC Table 310.16 ampacity at the chosen column, and the
//! smallest size that meets both.
//!
//! The drop of one conductor is VD ≈ I·(R·cos θ + X·sin θ) (IEEE Std 141, chapter 3), with R and
//! X from NEC Chapter 9 Table 9 (AWG/kcmil) or IEC 60228 with an assumed reactance (metric), for
//! the run's one-way length. The circuit's drop adds the conductors the current passes through:
//! a two-wire line-to-neutral run, its hot and its neutral (the neutral carrying the given neutral
//! current when the run is multiwire or unbalanced, which raises the lighter leg by as much); a
//! line-to-line run, both hots; a balanced three-phase run, √3 times one conductor's.
//!
//! # Run format, version 1
//!
//! ```json
//! { "version": 1, "system": { "kind": "split-phase", "volts_to_neutral": 120 },
//!   "run": { "kind": "branch", "connect": "L1-N", "amps": 16, "power_factor": 0.9,
//!            "length_ft": 100, "material": "cu", "conduit": "pvc", "column_c": 75,
//!            "target_pct": 3, "neutral_amps": 4, "units": "awg" } }
//! ```
//!
//! `kind` is `branch` (default target 3 %), `feeder` or `service` (default 5 %, the NEC
//! informational notes' figure for feeder plus branch); `connect` is a leg to neutral, two legs, or
//! `3-phase` (balanced, wye services); `amps` or `watts` (with `power_factor`, default 1); one of
//! `length_ft`, `length_m`; `conduit` `pvc` (default), `aluminum` or `steel`; `temperature_c` the
//! conductor temperature for the resistance (default 75 °C); `column_c` 60, 75 (default) or 90;
//! `neutral_amps` the neutral's current when it is not the hot's (a line-to-neutral run only);
//! `units` `awg` (default) or `metric` (IEC 60228 sizes, with no NEC ampacity). Unknown keys are
//! refused with the nearest known one.

use crate::conductors::ampacity::ampacity;
use crate::conductors::drop::approximate_drop;
use crate::conductors::{Conductor, Conduit, Material, Size, FEET_PER_METRE};
use crate::fields::{Checker, Problem, Rule};
use crate::figures::{fixed, plain};
use crate::job::{file_form, FromJson, Raw, SystemFile};
use crate::system::SystemKind;
use crate::validate::validate_system;
use serde::Serialize;

file_form! {
    /// The run file, forgiving like the job file.
    pub struct RunFile {
        pub version: Raw<u32>,
        pub system: Raw<SystemFile>,
        pub run: Raw<RunFields>,
    }
}

file_form! {
    /// The run itself.
    pub struct RunFields {
        pub kind: Raw<String>,
        pub connect: Raw<String>,
        pub amps: Raw<f64>,
        pub watts: Raw<f64>,
        pub power_factor: Raw<f64>,
        pub length_ft: Raw<f64>,
        pub length_m: Raw<f64>,
        pub material: Raw<String>,
        pub conduit: Raw<String>,
        pub temperature_c: Raw<f64>,
        pub column_c: Raw<f64>,
        pub target_pct: Raw<f64>,
        pub neutral_amps: Raw<f64>,
        pub units: Raw<String>,
    }
}

const RUN_KEYS: &[&str] = &[
    "kind",
    "connect",
    "amps",
    "watts",
    "power_factor",
    "length_ft",
    "length_m",
    "material",
    "conduit",
    "temperature_c",
    "column_c",
    "target_pct",
    "neutral_amps",
    "units",
];

/// How the current flows in the run.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Path {
    /// A hot and a neutral; the neutral carries `neutral_amps`.
    ToNeutral { neutral_amps: f64 },
    /// Two hots.
    LineToLine,
    /// A balanced three-phase run.
    ThreePhase,
}

/// A validated run.
#[derive(Clone, Debug, PartialEq)]
pub struct Run {
    pub kind: &'static str,
    pub path: Path,
    pub amps: f64,
    pub power_factor: f64,
    pub length_ft: f64,
    pub material: Material,
    pub conduit: Conduit,
    pub temperature_c: f64,
    pub column_c: f64,
    pub target_pct: f64,
    /// The voltage the percentage refers to: line to neutral, or line to line.
    pub circuit_v: f64,
    pub frequency_hz: f64,
    pub metric: bool,
}

/// One candidate size.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Candidate {
    pub size: String,
    /// The size as a job file spells it (`4/0`, `35 mm2`), to put the choice into a job.
    pub code: String,
    pub drop_v: f64,
    pub drop_pct: f64,
    /// NEC Table 310.16 at the chosen column; `None` for metric sizes and sizes the table lacks.
    pub ampacity_a: Option<f64>,
    pub meets_drop: bool,
    /// `None` when there is no ampacity to judge by.
    pub meets_ampacity: Option<bool>,
}

/// The sizing table.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Sizing {
    pub kind: &'static str,
    pub amps: f64,
    pub power_factor: f64,
    pub length_ft: f64,
    pub circuit_v: f64,
    pub target_pct: f64,
    pub column_c: f64,
    pub candidates: Vec<Candidate>,
    /// The smallest size that meets the drop target and (where the table gives one) the
    /// ampacity; `None` when none does.
    pub smallest: Option<String>,
    pub notes: Vec<String>,
}

/// Parses and validates a run file; problems name their JSON path.
///
/// # Errors
/// Every problem found.
pub fn parse_run(text: &str) -> Result<Run, Vec<Problem>> {
    let one = |message: String| {
        vec![Problem {
            path: "run file".to_string(),
            message,
        }]
    };
    let value: serde_json::Value =
        serde_json::from_str(text).map_err(|e| one(format!("not valid JSON ({e})")))?;
    if !value.is_object() {
        return Err(one("must be a JSON object".to_string()));
    }
    validate_run(&RunFile::take(value))
}

/// Validates a run file.
///
/// # Errors
/// Every problem found.
pub fn validate_run(file: &RunFile) -> Result<Run, Vec<Problem>> {
    let mut c = Checker::new();
    c.unknown_keys(&file.unknown, "", &["version", "system", "run"]);
    if !matches!(file.version, Raw::Absent | Raw::Given(1)) {
        c.fail("version", "must be 1");
    }
    let system = validate_system(&mut c, &file.system);
    let Some(r) = c.object(&file.run, "run") else {
        if file.run.is_absent() {
            c.fail("run", "is required: the run to size");
        }
        return Err(c.problems);
    };
    c.unknown_keys(&r.unknown, "run", RUN_KEYS);
    let kind = match c.text(&r.kind, "run.kind").map(str::trim) {
        None | Some("branch") => Some("branch"),
        Some("feeder") => Some("feeder"),
        Some("service") => Some("service"),
        Some(other) => {
            c.fail(
                "run.kind",
                format!("must be branch, feeder or service (got {other:?})"),
            );
            None
        }
    };
    let connect = c
        .text(&r.connect, "run.connect")
        .unwrap_or("L1-N")
        .trim()
        .to_ascii_uppercase();
    let pf = c
        .number(
            &r.power_factor,
            "run.power_factor",
            Rule::Between(0.05, 1.0),
        )
        .or(r.power_factor.is_absent().then_some(1.0));
    let path = match (connect.as_str(), system.map(|s| s.kind())) {
        ("3-PHASE", Some(SystemKind::Wye { phases: 3 })) => Some(Path::ThreePhase),
        ("3-PHASE", _) => {
            c.fail("run.connect", "3-phase needs a three-phase wye system");
            None
        }
        (t, _) => {
            match crate::loads::Connection::parse(t) {
                Some(crate::loads::Connection::ToNeutral(_)) => Some(Path::ToNeutral {
                    neutral_amps: f64::NAN,
                }),
                Some(crate::loads::Connection::Across(..)) => Some(Path::LineToLine),
                None => {
                    c.fail(
                    "run.connect",
                    format!("must be a leg to neutral (L1-N), two legs (L1-L2) or 3-phase (got {t:?})"),
                );
                    None
                }
            }
        }
    };
    let circuit_v = match (path, system) {
        (Some(Path::ToNeutral { .. }), Some(s)) => Some(s.volts_to_neutral()),
        (Some(_), Some(s)) => Some(s.volts_line_to_line()),
        _ => None,
    };
    let amps = match (&r.amps, &r.watts) {
        (Raw::Absent, Raw::Absent) => {
            c.fail("run.amps", "is required (or watts)");
            None
        }
        (a, Raw::Absent) => c.number(a, "run.amps", Rule::Between(0.01, 10_000.0)),
        (Raw::Absent, w) => {
            let w = c.number(w, "run.watts", Rule::Between(0.1, 10_000_000.0));
            match (w, pf, circuit_v, path) {
                (Some(w), Some(pf), Some(v), Some(Path::ThreePhase)) => {
                    Some(w / (3f64.sqrt() * v * pf))
                }
                (Some(w), Some(pf), Some(v), _) => Some(w / (v * pf)),
                _ => None,
            }
        }
        _ => {
            c.fail("run.watts", "give amps or watts, not both");
            None
        }
    };
    let length_ft = match (&r.length_ft, &r.length_m) {
        (Raw::Absent, Raw::Absent) => {
            c.fail("run.length_ft", "is required (or length_m)");
            None
        }
        (f, Raw::Absent) => c.number(f, "run.length_ft", Rule::Between(1.0, 100_000.0)),
        (Raw::Absent, m) => c
            .number(m, "run.length_m", Rule::Between(0.3, 30_000.0))
            .map(|m| m * FEET_PER_METRE),
        _ => {
            c.fail("run.length_m", "give length_ft or length_m, not both");
            None
        }
    };
    let material = match c.text(&r.material, "run.material") {
        None => r.material.is_absent().then_some(Material::Copper),
        Some(t) => Material::parse(t).or_else(|| {
            c.fail("run.material", "must be cu or al");
            None
        }),
    };
    let conduit = match c.text(&r.conduit, "run.conduit") {
        None => r.conduit.is_absent().then_some(Conduit::Pvc),
        Some(t) => Conduit::parse(t).or_else(|| {
            c.fail("run.conduit", "must be pvc, aluminum or steel");
            None
        }),
    };
    let temperature_c = c
        .number(
            &r.temperature_c,
            "run.temperature_c",
            Rule::Between(-40.0, 150.0),
        )
        .or(r.temperature_c.is_absent().then_some(75.0));
    let column_c = match &r.column_c {
        Raw::Absent => Some(75.0),
        Raw::Given(v) if [60.0, 75.0, 90.0].contains(v) => Some(*v),
        _ => {
            c.fail("run.column_c", "must be 60, 75 or 90");
            None
        }
    };
    let default_target = if kind == Some("branch") { 3.0 } else { 5.0 };
    let target_pct = c
        .number(&r.target_pct, "run.target_pct", Rule::Between(0.1, 20.0))
        .or(r.target_pct.is_absent().then_some(default_target));
    let path = match (path, amps) {
        (Some(Path::ToNeutral { .. }), Some(a)) => {
            let n = c
                .number(
                    &r.neutral_amps,
                    "run.neutral_amps",
                    Rule::Between(0.0, 10_000.0),
                )
                .or(r.neutral_amps.is_absent().then_some(a));
            n.map(|n| Path::ToNeutral { neutral_amps: n })
        }
        (Some(Path::ToNeutral { .. }), None) => None,
        (Some(p), _) => {
            if !r.neutral_amps.is_absent() {
                c.fail(
                    "run.neutral_amps",
                    "only a line-to-neutral run has a neutral carrying the load's current",
                );
            }
            Some(p)
        }
        _ => None,
    };
    let metric = match c.text(&r.units, "run.units") {
        None | Some("awg") => Some(false),
        Some("metric") => Some(true),
        Some(other) => {
            c.fail(
                "run.units",
                format!("must be awg or metric (got {other:?})"),
            );
            None
        }
    };
    // Every missing part above has named its problem, so with none there is a whole run.
    let run = (|| {
        Some(Run {
            kind: kind?,
            path: path?,
            amps: amps?,
            power_factor: pf?,
            length_ft: length_ft?,
            material: material?,
            conduit: conduit?,
            temperature_c: temperature_c?,
            column_c: column_c?,
            target_pct: target_pct?,
            circuit_v: circuit_v?,
            frequency_hz: system?.frequency_hz(),
            metric: metric?,
        })
    })();
    match run {
        Some(run) if c.problems.is_empty() => Ok(run),
        _ => Err(c.problems),
    }
}

/// The circuit's drop for one conductor's impedance R + jX (ohms, one way), volts.
pub fn circuit_drop(run: &Run, r: f64, x: f64) -> f64 {
    let one = |amps: f64| approximate_drop(amps, r, x, run.power_factor);
    match run.path {
        Path::ToNeutral { neutral_amps } => one(run.amps) + one(neutral_amps),
        Path::LineToLine => 2.0 * one(run.amps),
        Path::ThreePhase => 3f64.sqrt() * one(run.amps),
    }
}

/// Every standard size of the run's family, smallest first, and the smallest that meets both
/// the drop target and the ampacity.
pub fn size(run: &Run) -> Sizing {
    let limit = run.circuit_v * run.target_pct / 100.0;
    let candidates: Vec<Candidate> = Size::all()
        .filter(|s| matches!(s, Size::Metric(_)) == run.metric)
        .filter_map(|size| {
            let cond = Conductor::from_table(
                run.material,
                size,
                run.conduit,
                run.length_ft,
                1,
                run.temperature_c,
                run.frequency_hz,
            )
            .ok()?;
            let z = cond.impedance();
            let drop_v = circuit_drop(run, z.re, z.im);
            let ampacity_a = match size {
                Size::Awg(row) => ampacity(run.material, row.size, run.column_c),
                Size::Metric(_) => None,
            };
            Some(Candidate {
                size: size.label(),
                code: size.code(),
                drop_v,
                drop_pct: drop_v / run.circuit_v * 100.0,
                ampacity_a,
                meets_drop: drop_v <= limit,
                meets_ampacity: ampacity_a.map(|a| a >= run.amps),
            })
        })
        .collect();
    let smallest = candidates
        .iter()
        .find(|c| c.meets_drop && c.meets_ampacity != Some(false))
        .map(|c| c.size.clone());
    let mut notes = vec![format!(
        "Drop target {} % of {} V ({}); the NEC's informational notes suggest 3 % for a branch circuit and 5 % for feeder and branch together.",
        plain(run.target_pct),
        fixed(run.circuit_v, 0),
        run.kind
    )];
    if run.metric {
        notes.push("Metric sizes carry no NEC Table 310.16 ampacity: check the current-carrying capacity under the local rules (IEC 60364-5-52).".to_string());
    }
    if smallest.is_none() {
        notes.push("No standard size meets the target: shorten the run, raise the voltage or split the load.".to_string());
    }
    notes.push("Ampacity from NEC Table 310.16 before any correction or adjustment factors (ambient, bundling); the overcurrent device and local codes decide.".to_string());
    Sizing {
        kind: run.kind,
        amps: run.amps,
        power_factor: run.power_factor,
        length_ft: run.length_ft,
        circuit_v: run.circuit_v,
        target_pct: run.target_pct,
        column_c: run.column_c,
        candidates,
        smallest,
        notes,
    }
}

/// What a run of the job carries, from the engine's report of it: the figures a sizing starts
/// from.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct RunLoad {
    /// The heavier hot's current, amperes.
    pub amps: f64,
    /// Real power over apparent power, lagging, in (0, 1].
    pub power_factor: f64,
    /// The neutral's current, for a run with a neutral, amperes.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub neutral_amps: Option<f64>,
}

/// The service's load from the job's report: the heavier leg's current, the neutral's, and the
/// power factor Σ P / Σ V·I over the legs at the panel (Σ P the appliances' real power).
pub fn service_load(report: &crate::report::Report) -> Option<RunLoad> {
    let amps = report
        .legs
        .values()
        .map(|l| l.current_a)
        .fold(0.0, f64::max);
    let apparent: f64 = report
        .legs
        .values()
        .map(|l| l.volts_to_neutral.unwrap_or(0.0) * l.current_a)
        .sum();
    let real: f64 = report.loads.iter().map(|l| l.power_w).sum();
    (amps > 0.0 && apparent > 0.0).then(|| RunLoad {
        amps,
        power_factor: (real / apparent).clamp(0.05, 1.0),
        neutral_amps: Some(report.neutral_current_a),
    })
}

/// One appliance's branch load, installed or planned, at its rating (a branch is sized for what
/// the appliance draws when on): I = P / (pf · V_rated) and its power factor; `index` is its
/// place in the job file's `loads` list.
pub fn appliance_load(job: &crate::validated::Job, index: usize) -> Option<RunLoad> {
    let l = job
        .loads()
        .iter()
        .chain(job.planned())
        .find(|l| l.file_index() == index)?;
    Some(RunLoad {
        amps: l.rated_current(),
        power_factor: l.power_factor(),
        neutral_amps: None,
    })
}
