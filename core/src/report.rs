//! The report: what `tapline solve` prints and what the app shows, as serialise-only wire types.
//!
//! Report format, version 1 (abridged sample; every number comes from the solve):
//!
//! ```json
//! { "report_version": 1, "name": "9 Quarry Lane", "system": "120/240 V split-phase",
//!   "neutral": { "state": "loose", "ohms": 2.5, "panel_neutral_shift_v": 14.2, "floating": false },
//!   "transformer": { "turns_ratio": 30.0, "full_load_a": 104.2, "available_fault_a": 5208.3,
//!                    "available_fault_ln_a": 8020.1, "open_circuit_v": 120.0 },
//!   "legs": { "L1": { "current_a": 12.5, "volts_to_neutral": 106.1, "voltage_drop_v": 13.9,
//!                     "ansi_range": "outside" }, "L2": { … } },
//!   "neutral_current_a": 9.6, "neutral_fundamental_a": 9.6, "earth_current_a": 0.0,
//!   "loads": [ { "name": "Shop heater", "connect": "L1-N", "model": "resistive",
//!                "voltage_v": 106.0, "percent_of_rated": 88.3, "current_a": 11.0, "power_w": 1170.7,
//!                "rated_w": 1500.0, "outcome": "under_voltage", "reason": "gets 106 V: …" } ],
//!   "notes": [] }
//! ```
//!
//! Voltages are rms magnitudes in volts, currents rms amperes including harmonics unless named
//! `_fundamental_`, angles in degrees with the convention of [`crate::system`].

use crate::classify::{classify, service_range, Outcome};
use crate::network::{Network, NeutralPath, NEUTRAL_INDEX};
use crate::solve::{solve, Solution, SolveError};
use crate::validate::{Job, NeutralState};
use serde::Serialize;
use std::collections::BTreeMap;

/// The report format version.
pub const REPORT_VERSION: u32 = 1;

/// The whole report.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Report {
    pub report_version: u32,
    pub name: String,
    pub system: String,
    pub nominal_volts_to_neutral: f64,
    pub neutral: NeutralReport,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub transformer: Option<TransformerReport>,
    pub legs: BTreeMap<String, LegReport>,
    /// Service neutral current, rms including harmonics, amperes.
    pub neutral_current_a: f64,
    /// Its fundamental (phasor-sum) part, amperes.
    pub neutral_fundamental_a: f64,
    /// Voltage across the service neutral conductor itself, volts.
    pub neutral_conductor_drop_v: f64,
    /// Current through the earth return when the neutral is open, amperes.
    pub earth_current_a: f64,
    /// Harmonic currents in the neutral by order, amperes (empty without electronic harmonics).
    pub neutral_harmonics: Vec<HarmonicLine>,
    pub loads: Vec<LoadReport>,
    /// Shared-neutral (multiwire) branch circuits, when the job lists any.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub multiwire: Vec<crate::tools::multiwire::MultiwireReport>,
    pub worst_outcome: Outcome,
    pub notes: Vec<String>,
}

/// The neutral's state and the panel neutral's shift from the source neutral.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct NeutralReport {
    pub state: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub ohms: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub earth_return_ohms: Option<f64>,
    /// |V_N|: how far the panel neutral bar sits from the transformer neutral, volts.
    pub panel_neutral_shift_v: Option<f64>,
    /// True when nothing connects the panel neutral bar, so voltages to it are undefined.
    pub floating: bool,
}

/// Transformer figures.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct TransformerReport {
    pub kva: f64,
    pub turns_ratio: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub half_winding_ratio: Option<f64>,
    pub open_circuit_v: f64,
    pub full_load_a: f64,
    pub available_fault_a: f64,
    pub available_fault_ln_a: f64,
    pub impedance_r_ohm: f64,
    pub impedance_x_ohm: f64,
    /// Largest leg current as a percentage of full-load current.
    pub loading_pct: f64,
}

/// One hot leg at the panel.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct LegReport {
    pub current_a: f64,
    pub fundamental_a: f64,
    pub current_angle_deg: f64,
    pub volts_to_neutral: Option<f64>,
    /// Nominal minus actual leg-to-neutral voltage at the panel (transformer, hot and neutral drops
    /// together), volts; negative when the leg sits above nominal.
    pub voltage_drop_v: Option<f64>,
    pub voltage_drop_pct: Option<f64>,
    /// Voltage across this leg's service hot conductor, volts.
    pub hot_conductor_drop_v: f64,
    pub ansi_range: Option<&'static str>,
}

/// A harmonic order's current.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct HarmonicLine {
    pub order: u32,
    pub current_a: f64,
}

/// One appliance.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct LoadReport {
    pub name: String,
    pub connect: String,
    pub model: &'static str,
    pub on: bool,
    /// Voltage at the appliance, volts; `None` when its neutral floats.
    pub voltage_v: Option<f64>,
    pub percent_of_rated: Option<f64>,
    pub current_a: f64,
    pub power_w: f64,
    pub rated_w: f64,
    pub power_percent: f64,
    pub branch_drop_v: f64,
    pub state: &'static str,
    pub outcome: Outcome,
    pub reason: String,
}

/// Validated job → network → solve → classify → report.
///
/// # Errors
/// A [`SolveError`] when the network does not solve.
pub fn analyze(job: &Job) -> Result<Report, SolveError> {
    let net = Network::new(job);
    let sol = solve(&net)?;
    Ok(build(job, &net, &sol))
}

/// Builds the report of a solved network.
pub fn build(job: &Job, net: &Network, sol: &Solution) -> Report {
    let system = job.system();
    let nominal = system.volts_to_neutral();
    let mut legs = BTreeMap::new();
    for leg in system.legs() {
        let k = leg.index();
        let v = sol.volts_to_neutral(k).map(|v| v.norm());
        let i = sol.leg_current[k];
        legs.insert(
            leg.name().to_string(),
            LegReport {
                current_a: sol.leg_rms(k),
                fundamental_a: i.norm(),
                current_angle_deg: if i.norm() > 0.0 {
                    i.arg().to_degrees()
                } else {
                    0.0
                },
                volts_to_neutral: v,
                voltage_drop_v: v.map(|v| nominal - v),
                voltage_drop_pct: v.map(|v| (nominal - v) / nominal * 100.0),
                hot_conductor_drop_v: (i * net.service_hot()).norm(),
                ansi_range: v.map(|v| service_range(v, nominal).code()),
            },
        );
    }
    let loads: Vec<LoadReport> = net
        .loads()
        .iter()
        .zip(&sol.loads)
        .map(|(p, r)| {
            let load = &p.load;
            let v = r.terminal_v.map(|v| v.norm());
            let power = r
                .terminal_v
                .map(|v| (v * r.current.conj()).re)
                .unwrap_or(0.0);
            let (outcome, reason) = match v {
                Some(v) => {
                    let (o, why) = classify(load, v, r.state, load.is_on());
                    (o, why.to_string())
                }
                None => (
                    Outcome::Off,
                    "its neutral floats: nothing connects it".to_string(),
                ),
            };
            LoadReport {
                name: load.name().to_string(),
                connect: load.connection().label(),
                model: load.model().code(),
                on: load.is_on(),
                voltage_v: v,
                percent_of_rated: v.map(|v| v / load.rated_v() * 100.0),
                current_a: r.rms_current(),
                power_w: power,
                rated_w: load.rated_w(),
                power_percent: power / load.rated_w() * 100.0,
                branch_drop_v: (r.current * p.branch).norm(),
                state: match r.state {
                    crate::loads::State::Running => "running",
                    crate::loads::State::Stalled => "stalled",
                    crate::loads::State::DroppedOut => "dropped_out",
                },
                outcome,
                reason,
            }
        })
        .collect();
    let transformer = job.transformer().map(|t| {
        let z = t.winding_impedance(system);
        let fl = t.full_load_a(system);
        let max_leg = (0..net.leg_count())
            .map(|k| sol.leg_rms(k))
            .fold(0.0, f64::max);
        TransformerReport {
            kva: t.kva(),
            turns_ratio: t.turns_ratio(system),
            half_winding_ratio: matches!(system.kind(), crate::system::SystemKind::SplitPhase)
                .then(|| 2.0 * t.turns_ratio(system)),
            open_circuit_v: t.open_circuit_volts_to_neutral(system),
            full_load_a: fl,
            available_fault_a: t.available_fault_a(system),
            available_fault_ln_a: t.available_fault_ln_a(system),
            impedance_r_ohm: z.re,
            impedance_x_ohm: z.im,
            loading_pct: max_leg / fl * 100.0,
        }
    });
    let (ohms, earth) = match job.neutral() {
        NeutralState::Intact => (None, None),
        NeutralState::Loose { ohms } => (Some(ohms), None),
        NeutralState::Open { earth_return_ohms } => (None, earth_return_ohms),
    };
    let floating = sol.node_v[NEUTRAL_INDEX].is_none();
    let mut notes = Vec::new();
    if floating {
        notes.push("The panel neutral is open and nothing connects to it, so voltages to neutral are undefined.".to_string());
    }
    if sol.harmonics_skipped {
        notes.push("Harmonic currents are not computed while the neutral is open.".to_string());
    }
    if matches!(
        net.neutral(),
        NeutralPath::Open {
            earth_ohms: Some(_)
        }
    ) {
        notes.push("With the neutral open, the unbalanced current returns through the grounding electrode and the earth; touching the neutral or grounding conductors can be dangerous.".to_string());
    }
    let worst_outcome = loads
        .iter()
        .map(|l| l.outcome)
        .max_by_key(|o| o.severity())
        .unwrap_or(Outcome::Normal);
    Report {
        report_version: REPORT_VERSION,
        name: job.name().to_string(),
        system: system.label(),
        nominal_volts_to_neutral: nominal,
        neutral: NeutralReport {
            state: job.neutral().code(),
            ohms,
            earth_return_ohms: earth,
            panel_neutral_shift_v: sol.node_v[NEUTRAL_INDEX].map(|v| v.norm()),
            floating,
        },
        transformer,
        legs,
        neutral_current_a: sol.neutral_rms(),
        neutral_fundamental_a: sol.neutral_current.norm(),
        neutral_conductor_drop_v: (sol.neutral_current * net.service_neutral()).norm(),
        earth_current_a: sol.earth_current.norm(),
        neutral_harmonics: sol
            .harmonics
            .iter()
            .map(|h| HarmonicLine {
                order: h.order,
                current_a: h.neutral_current.norm(),
            })
            .collect(),
        loads,
        multiwire: crate::tools::multiwire::check(job, sol),
        worst_outcome,
        notes,
    }
}
