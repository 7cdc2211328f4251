//! The report: what `tapline solve` prints and what the app shows, as serialise-only wire types.
//!
//! Report format, version 1 (abridged sample; every number comes from the solve):
//!
//! ```json
//! { "report_version": 1, "name": "9 Quarry Lane", "system": "120/240 V split-phase",
//!   "standard": "ANSI C84.1",
//!   "neutral": { "state": "loose", "ohms": 2.5, "earth_return_ohms": 25.0,
//!                "panel_neutral_shift_v": 14.2, "floating": false, "touch_voltage_warning": false },
//!   "transformer": { "connection": "single-phase", "turns_ratio": 30.0, "line_voltage_ratio": 30.0,
//!                    "half_winding_ratio": 60.0, "full_load_a": 104.2,
//!                    "fault_at_terminals": { "line_to_line_a": 5208.3, "line_to_neutral_a": 8020.1 },
//!                    "open_circuit_v": 120.0, … },
//!   "fault_at_service": { "line_to_line_a": 4003.5, "line_to_neutral_a": 2527.2 },
//!   "legs": { "L1": { "current_a": 12.5, "volts_to_neutral": 106.1, "voltage_drop_v": 13.9,
//!                     "band": "outside", "ansi_range": "outside" }, "L2": { … } },
//!   "neutral_current_a": 9.6, "neutral_fundamental_a": 9.6, "earth_current_a": 0.5,
//!   "neutral_harmonics": [ { "order": 3, "current_a": 2.1, "earth_current_a": 0.1, "volts": 5.3 } ],
//!   "neutral_harmonic_v": 5.3,
//!   "loads": [ { "name": "Shop heater", "connect": "L1-N", "model": "resistive",
//!                "voltage_v": 106.0, "percent_of_rated": 88.3, "current_a": 11.0, "power_w": 1170.7,
//!                "rated_w": 1500.0, "outcome": "under_voltage", "decided_by": "system_band",
//!                "reason": "gets 106 V: …" } ],
//!   "notes": [] }
//! ```
//!
//! Voltages are rms magnitudes in volts, currents rms amperes including harmonics unless named
//! `_fundamental_`, angles in degrees with the convention of [`crate::system`]. A `null` (or an
//! absent key) means "not applicable", never "could not compute": `volts_to_neutral`,
//! `voltage_drop_v`, `voltage_drop_pct`, `band`, `ansi_range`, `panel_neutral_shift_v`,
//! `voltage_v`, `percent_of_rated`, `neutral_harmonics[].volts` and `neutral_harmonic_v` are
//! `null` while the panel neutral bar floats (nothing connects it); `ansi_range` is `null` on a
//! service judged by IEC 60038; `transformer`, `fault_at_service`, `ohms`, `earth_return_ohms`,
//! `half_winding_ratio`, `three_phase_a`, `ampacity_a` and `if_neutral_opens_error` are absent
//! or `null` when the job has no such part. Every number is finite: [`analyze`] withholds a
//! report that would hold anything else.

use crate::classify::{classify, service_band, Context, Decider, Outcome, Standard};
use crate::figures::fixed;
use crate::finite::first_non_finite;
use crate::network::{Network, NEUTRAL_INDEX};
use crate::solve::{solve, Solution, SolveError};
use crate::system::SystemKind;
use crate::transformer::Faults;
use crate::validated::{Job, NeutralState};
use serde::Serialize;
use std::collections::BTreeMap;

/// The report format version.
pub const REPORT_VERSION: u32 = 1;

/// Every key of the engine's answers (report, what-if, sweep, tools) that may be `null`, each
/// meaning "not applicable" as documented beside it; any other `null` would be a figure gone
/// wrong. The tests and the fuzzing oracle walk answers against this list.
pub const NOT_APPLICABLE_KEYS: &[&str] = &[
    "volts_to_neutral",
    "voltage_drop_v",
    "voltage_drop_pct",
    "band",
    "ansi_range",
    "panel_neutral_shift_v",
    "voltage_v",
    "percent_of_rated",
    "volts",
    "neutral_harmonic_v",
    "ampacity_a",
    // The sweep's last point is the open neutral (see `whatif::Sweep`).
    "neutral_ohms",
    // A motor start: voltages where a bar floats.
    "before_v",
    "during_v",
    "dip_v",
    "dip_pct",
    "motor_v",
    "motor_pct",
    "starting_torque_pct",
    // A diagnosis fits only the places it has readings for.
    "at_panel",
    "at_meter",
];

/// Above this voltage between the panel's neutral bar (and so every bonded case, pipe and
/// appliance frame) and the earth, touching them can shock: IEC 60364-4-41 takes 50 V AC as the
/// conventional touch-voltage limit for normal conditions (from memory).
pub const TOUCH_VOLTAGE_LIMIT_V: f64 = 50.0;

/// The whole report.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Report {
    pub report_version: u32,
    pub name: String,
    pub system: String,
    pub nominal_volts_to_neutral: f64,
    /// The voltage standard the bands refer to: ANSI C84.1 (60 Hz) or IEC 60038 (50 Hz).
    pub standard: Standard,
    pub neutral: NeutralReport,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub transformer: Option<TransformerReport>,
    /// Bolted fault currents at the service equipment, through the service conductors (NEC 110.24
    /// asks for the available fault current to be marked there); only with a transformer.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub fault_at_service: Option<Faults>,
    pub legs: BTreeMap<String, LegReport>,
    /// Service neutral conductor current, rms including harmonics, amperes.
    pub neutral_current_a: f64,
    /// Its fundamental (phasor-sum) part, amperes.
    pub neutral_fundamental_a: f64,
    /// Voltage across the service neutral conductor itself, volts.
    pub neutral_conductor_drop_v: f64,
    /// Current through the earth path beside the neutral, rms including harmonics, amperes.
    pub earth_current_a: f64,
    /// Its fundamental part, amperes.
    pub earth_fundamental_a: f64,
    /// The neutral's harmonic currents and the neutral bar's harmonic voltage by order (empty
    /// without electronic harmonics).
    pub neutral_harmonics: Vec<HarmonicLine>,
    /// Root-sum-square of the neutral bar's harmonic voltages, volts.
    pub neutral_harmonic_v: Option<f64>,
    pub loads: Vec<LoadReport>,
    /// Shared-neutral (multiwire) branch circuits, when the job lists any.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub multiwire: Vec<crate::multiwire::MultiwireReport>,
    pub worst_outcome: Outcome,
    pub notes: Vec<String>,
}

/// The neutral's state and the panel neutral's shift from the source neutral.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct NeutralReport {
    pub state: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub ohms: Option<f64>,
    /// The earth path beside the neutral conductor, in every state.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub earth_return_ohms: Option<f64>,
    /// |V_N|: how far the panel neutral bar sits from the transformer neutral, volts.
    pub panel_neutral_shift_v: Option<f64>,
    /// True when nothing connects the panel neutral bar, so voltages to it are undefined.
    pub floating: bool,
    /// True when the neutral bar sits (or may sit) more than [`TOUCH_VOLTAGE_LIMIT_V`] from
    /// earth: bonded metal can shock.
    pub touch_voltage_warning: bool,
}

/// Transformer figures.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct TransformerReport {
    pub kva: f64,
    /// `single-phase`, `delta-wye` or `wye-wye`.
    pub connection: &'static str,
    /// The winding ratio a turns-ratio tester reads (see
    /// [`crate::transformer::Transformer::turns_ratio`]).
    pub turns_ratio: f64,
    /// Primary over secondary line-to-line voltage.
    pub line_voltage_ratio: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub half_winding_ratio: Option<f64>,
    pub open_circuit_v: f64,
    pub full_load_a: f64,
    /// Bolted fault currents at the transformer's secondary terminals (infinite primary).
    pub fault_at_terminals: Faults,
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
    /// The service voltage's band under [`Report::standard`]: `A`, `B` (ANSI only) or `outside`.
    pub band: Option<&'static str>,
    /// The same under ANSI C84.1; `null` on an IEC 60038 service.
    pub ansi_range: Option<&'static str>,
}

/// A harmonic order in the neutral.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct HarmonicLine {
    pub order: u32,
    /// In the neutral conductor, amperes.
    pub current_a: f64,
    /// In the earth path, amperes.
    pub earth_current_a: f64,
    /// The neutral bar's voltage to the transformer neutral at this order, volts.
    pub volts: Option<f64>,
}

/// One appliance.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct LoadReport {
    /// Its place in the job file's `loads` list (planned appliances are not in the report of the
    /// job as found, so this can differ from its place here).
    pub index: usize,
    pub name: String,
    pub connect: String,
    pub model: &'static str,
    pub on: bool,
    /// Voltage at the appliance, volts; `None` when its neutral floats.
    pub voltage_v: Option<f64>,
    pub percent_of_rated: Option<f64>,
    /// The system nominal voltage its connection is judged against, volts.
    pub nominal_v: f64,
    pub current_a: f64,
    pub power_w: f64,
    pub rated_w: f64,
    pub power_percent: f64,
    pub branch_drop_v: f64,
    pub state: &'static str,
    pub outcome: Outcome,
    /// Which rule decided the outcome: its nameplate, the system's band, or its switch.
    pub decided_by: Decider,
    pub reason: String,
}

/// Validated job → network → solve → classify → report.
///
/// # Errors
/// A [`SolveError`] when the network does not solve, or [`SolveError::NotFinite`] when a figure
/// would not be a finite number.
pub fn analyze(job: &Job) -> Result<Report, SolveError> {
    let net = Network::new(job);
    let sol = solve(&net)?;
    checked(build(job, &net, &sol))
}

/// Hands back `report` only when every number in it is finite.
///
/// # Errors
/// [`SolveError::NotFinite`] naming the first figure that is not.
pub fn checked(report: Report) -> Result<Report, SolveError> {
    match first_non_finite(&report) {
        None => Ok(report),
        Some(path) => Err(SolveError::NotFinite { path }),
    }
}

/// Every appliance's line of the report for a solved network.
pub fn load_reports(job: &Job, net: &Network, sol: &Solution) -> Vec<LoadReport> {
    let system = job.system();
    net.loads()
        .iter()
        .zip(&sol.loads)
        .map(|(p, r)| {
            let load = &p.load;
            let ctx = Context::of(system, load);
            let v = r.terminal_v.map(|v| v.norm());
            let power = r
                .terminal_v
                .map(|v| (v * r.current.conj()).re)
                .unwrap_or(0.0);
            let (outcome, decided_by, reason) = match v {
                Some(v) => {
                    let (o, why, d) = classify(load, v, r.state, load.is_on(), ctx);
                    (o, d, why.to_string())
                }
                None if load.is_on() => (
                    Outcome::UnderVoltage,
                    Decider::Nameplate,
                    "its neutral floats: nothing connects it, so it gets no voltage and does not run"
                        .to_string(),
                ),
                None => (Outcome::Off, Decider::Switch, "switched off".to_string()),
            };
            LoadReport {
                index: load.file_index(),
                name: load.name().to_string(),
                connect: load.connection().label(),
                model: load.model().code(),
                on: load.is_on(),
                voltage_v: v,
                percent_of_rated: v.map(|v| v / load.rated_v() * 100.0),
                nominal_v: ctx.nominal,
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
                decided_by,
                reason,
            }
        })
        .collect()
}

/// Builds the report of a solved network.
pub fn build(job: &Job, net: &Network, sol: &Solution) -> Report {
    let system = job.system();
    let standard = Standard::of(system);
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
                band: v.map(|v| service_band(standard, v, nominal).code()),
                ansi_range: v
                    .filter(|_| standard == Standard::AnsiC84_1)
                    .map(|v| service_band(standard, v, nominal).code()),
            },
        );
    }
    let loads = load_reports(job, net, sol);
    let transformer = job.transformer().map(|t| {
        let z = t.winding_impedance(system);
        let fl = t.full_load_a(system);
        let max_leg = (0..net.leg_count())
            .map(|k| sol.leg_rms(k))
            .fold(0.0, f64::max);
        TransformerReport {
            kva: t.kva(),
            connection: t.connection().code(),
            turns_ratio: t.turns_ratio(system),
            line_voltage_ratio: t.line_voltage_ratio(system),
            half_winding_ratio: matches!(system.kind(), SystemKind::SplitPhase)
                .then(|| 2.0 * t.turns_ratio(system)),
            open_circuit_v: t.open_circuit_volts_to_neutral(system),
            full_load_a: fl,
            fault_at_terminals: t.terminal_faults(system),
            impedance_r_ohm: z.re,
            impedance_x_ohm: z.im,
            loading_pct: max_leg / fl * 100.0,
        }
    });
    let fault_at_service = job
        .transformer()
        .map(|t| t.faults_through(system, net.service_hot(), net.service_neutral()));
    let ohms = match job.neutral() {
        NeutralState::Loose { ohms } => Some(ohms),
        _ => None,
    };
    let floating = sol.node_v[NEUTRAL_INDEX].is_none();
    let shift = sol.node_v[NEUTRAL_INDEX].map(|v| v.norm());
    // A floating bar can sit anywhere up to a leg's voltage, so it is treated as dangerous.
    let touch = floating || shift.is_some_and(|v| v > TOUCH_VOLTAGE_LIMIT_V);
    let mut notes = Vec::new();
    if floating {
        notes.push("The panel neutral is open and nothing connects to it, so voltages to neutral are undefined.".to_string());
    }
    if touch {
        let at = shift.map_or_else(
            || "an unknown voltage".to_string(),
            |v| format!("{} V", fixed(v, 0)),
        );
        notes.push(format!(
            "DANGER: the panel's neutral bar sits {at} from earth, above the {} V touch-voltage limit (IEC 60364-4-41). Bonded metal, pipes and appliance cases can shock: keep people away and treat everything as energized until the neutral is repaired.",
            fixed(TOUCH_VOLTAGE_LIMIT_V, 0)
        ));
    }
    let earth_rms = sol.earth_rms();
    if earth_rms > 0.0 && !matches!(job.neutral(), NeutralState::Intact) {
        notes.push(format!(
            "{earth_rms} A returns through the grounding electrode and the earth beside the neutral conductor's {} A; touching the neutral or grounding conductors can be dangerous.",
            fixed(sol.neutral_rms(), 1),
            earth_rms = fixed(earth_rms, 1)
        ));
    }
    if matches!(job.neutral(), NeutralState::Loose { .. }) {
        notes.push("A loose neutral is urgent to repair, even while every appliance is still within its range: the connection heats and gets worse.".to_string());
    }
    for m in job.multiwire().iter().filter(|m| !m.has_length) {
        notes.push(format!(
            "Shared-neutral circuit {} has no length, so its conductors' drop is not counted.",
            m.id
        ));
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
        standard,
        neutral: NeutralReport {
            state: job.neutral().code(),
            ohms,
            earth_return_ohms: job.earth_ohms(),
            panel_neutral_shift_v: shift,
            floating,
            touch_voltage_warning: touch,
        },
        transformer,
        fault_at_service,
        legs,
        neutral_current_a: sol.neutral_rms(),
        neutral_fundamental_a: sol.neutral_current.norm(),
        neutral_conductor_drop_v: (sol.neutral_current * net.service_neutral()).norm(),
        earth_current_a: earth_rms,
        earth_fundamental_a: sol.earth_current.norm(),
        neutral_harmonics: sol
            .harmonics
            .iter()
            .map(|h| HarmonicLine {
                order: h.order,
                current_a: h.neutral_current.norm(),
                earth_current_a: h.earth_current.norm(),
                volts: h.neutral_v.map(|v| v.norm()),
            })
            .collect(),
        neutral_harmonic_v: if sol.harmonics.is_empty() {
            shift.map(|_| 0.0)
        } else {
            sol.neutral_harmonic_v()
        },
        loads,
        multiwire: crate::multiwire::check(job, net, sol),
        worst_outcome,
        notes,
    }
}
