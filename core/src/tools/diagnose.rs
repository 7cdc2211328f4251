//! Loose-neutral diagnosis from meter readings on a split-phase service.
//!
//! The electrician reads L1-N, L2-N (and optionally L1-L2), both leg currents and, with a
//! power-quality clamp, their power factors; switches a known load on one leg, and reads again.
//! With the hot legs' resistance R_h (each) and the service neutral's resistance R_n, and the
//! source's open-circuit half voltages E₁ and E₂, every reading obeys, in phasors (each leg
//! current i referred to its own leg's voltage, lagging by its power factor, and the neutral
//! carrying n = i₁ − i₂):
//!
//! - V₁ = |E₁ − R_h·i₁ − R_n·n|
//! - V₂ = |E₂ − R_h·i₂ + R_n·n|
//! - V₁₂ = |E₁ + E₂ − R_h·(i₁ + i₂)|
//!
//! Loading a leg lowers its own voltage through the hot and the neutral and raises the other leg
//! by the neutral's drop (Ohm's law and Kirchhoff's laws on the three-wire circuit; common
//! practice). The four unknowns are fitted to the magnitudes by least squares (Gauss–Newton). Their
//! uncertainty combines the meters' resolution (σ = resolution/√12 for a quantised reading, or
//! the fit's residuals if larger) with the model's bias (the same fit with reactive conductors,
//! X/R 0.4). A verdict is given only when the whole interval lies on one side of each threshold;
//! otherwise the diagnosis is inconclusive and says how large a test load would settle it. A fit
//! that no conductor can have (negative resistance beyond its uncertainty) or that no steady
//! supply explains is reported as such, not as a verdict.

use crate::fields::{Checker, Problem, Rule};
use crate::figures::{fixed, plain};
use crate::job::{file_form, FromJson, JobFile, Raw, SystemFile};
pub use crate::job::{MeterFile, ReadingFile, ReadingSetFile};
use crate::system::SystemKind;
use crate::validate::validate_system;
use crate::validate::{METER_KEYS, READING_KEYS};
use crate::validated::Job;
use num_complex::Complex64;
use serde::Serialize;

/// Readings format version.
pub const READINGS_VERSION: u32 = 1;

/// Neutral resistance thresholds, ohms (common practice, no source): up to 0.12 Ω a 10 A
/// imbalance moves the neutral by at most 1.2 V (1 % of 120 V); above 0.6 Ω it moves by more than
/// 6 V (5 %), enough to damage appliances when the imbalance grows.
pub const HEALTHY_MAX_OHMS: f64 = 0.12;
/// See [`HEALTHY_MAX_OHMS`].
pub const SUSPECT_MAX_OHMS: f64 = 0.6;
/// The least change of a leg current between readings that makes the fit meaningful, amperes.
pub const MIN_CURRENT_CHANGE_A: f64 = 0.5;

file_form! {
    /// The readings file, forgiving like the job file.
    pub struct ReadingsFile {
        pub version: Raw<u32>,
        pub system: Raw<SystemFile>,
        pub meter: Raw<MeterFile>,
        pub readings: Raw<Vec<Raw<ReadingFile>>>,
    }
}

/// Where a reading was taken.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Place {
    Panel,
    Meter,
}

/// A validated reading.
#[derive(Clone, Debug, PartialEq)]
pub struct Reading {
    pub label: String,
    pub at: Place,
    pub v1: f64,
    pub v2: f64,
    pub v12: Option<f64>,
    pub i1: f64,
    pub i2: f64,
    /// Lagging power factors of the leg currents, in (0, 1].
    pub pf1: f64,
    pub pf2: f64,
}

/// Validated readings.
#[derive(Clone, Debug, PartialEq)]
pub struct Readings {
    pub readings: Vec<Reading>,
    pub volts_resolution: f64,
    pub amps_resolution: f64,
}

/// The verdict on the neutral.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Verdict {
    Healthy,
    Suspect,
    Dangerous,
    /// The resistance's interval straddles a threshold: the readings cannot tell.
    Inconclusive,
    /// The fit is physically impossible (a negative resistance beyond its uncertainty, or
    /// readings that no single service explains): no verdict.
    NotPhysical,
}

impl Verdict {
    /// Its spelling in the report: `healthy`, …, `not_physical`.
    pub fn code(self) -> &'static str {
        match self {
            Verdict::Healthy => "healthy",
            Verdict::Suspect => "suspect",
            Verdict::Dangerous => "dangerous",
            Verdict::Inconclusive => "inconclusive",
            Verdict::NotPhysical => "not_physical",
        }
    }

    /// In words: `healthy`, …, `not physical`.
    pub fn word(self) -> &'static str {
        match self {
            Verdict::NotPhysical => "not physical",
            other => other.code(),
        }
    }

    /// Which verdict wins when two are combined: what cannot be trusted first, then the worse.
    fn rank(self) -> u8 {
        match self {
            Verdict::Healthy => 0,
            Verdict::Suspect => 1,
            Verdict::Inconclusive => 2,
            Verdict::Dangerous => 3,
            Verdict::NotPhysical => 4,
        }
    }

    fn worse(self, other: Verdict) -> Verdict {
        if other.rank() > self.rank() {
            other
        } else {
            self
        }
    }
}

/// One fitted location (all readings at the panel, or all at the meter).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Fit {
    pub neutral_ohms: f64,
    /// Three standard uncertainties of the meters' part (about 99.7 %) combined with the model's
    /// bias, ohms.
    pub neutral_ohms_uncertainty: f64,
    pub hot_ohms: f64,
    pub hot_ohms_uncertainty: f64,
    /// The part of the neutral's uncertainty that comes from the model (conductor reactance
    /// neglected), ohms; included in `neutral_ohms_uncertainty`.
    pub model_bias_ohms: f64,
    pub source_v: [f64; 2],
    pub residual_rms_v: f64,
    /// The meters' own noise per reading (resolution/√12), volts.
    pub meter_noise_v: f64,
    pub degrees_of_freedom: usize,
    /// The largest change of a leg current between the readings, amperes.
    pub current_change_a: f64,
    pub readings_used: usize,
}

/// The diagnosis.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Diagnosis {
    pub neutral_ohms: f64,
    pub neutral_ohms_uncertainty: f64,
    pub hot_ohms: f64,
    pub hot_ohms_uncertainty: f64,
    /// The worse of the neutral's and the hots' verdicts, at the panel and at the meter.
    pub verdict: Verdict,
    pub reason: String,
    /// The hot conductors' own verdict, against the same thresholds.
    pub hot_verdict: Verdict,
    /// When inconclusive: the change of leg current a resistive test load should make between
    /// readings to settle it, amperes.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub settle_with_test_load_a: Option<f64>,
    pub thresholds_ohms: [f64; 2],
    pub thresholds_source: &'static str,
    pub at_panel: Option<Fit>,
    pub at_meter: Option<Fit>,
    /// `utility side`, `building side` or `unknown`.
    pub likely_location: &'static str,
    pub location_reason: String,
    pub cautions: Vec<&'static str>,
}

/// Why readings could not be used.
#[derive(Clone, Debug, PartialEq)]
pub enum DiagnoseError {
    Invalid(Vec<Problem>),
    /// The equations have no unique solution (the readings do not vary enough).
    Degenerate(String),
}

impl std::fmt::Display for DiagnoseError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            DiagnoseError::Invalid(ps) => {
                let lines: Vec<String> = ps.iter().map(|p| p.to_string()).collect();
                f.write_str(&lines.join("\n"))
            }
            DiagnoseError::Degenerate(m) => f.write_str(m),
        }
    }
}

impl std::error::Error for DiagnoseError {}

/// Parses and validates a readings file.
///
/// # Errors
/// Every problem, with its JSON path (`readings[1].l2_n_v`).
pub fn parse_readings(text: &str) -> Result<Readings, DiagnoseError> {
    let one = |path: &str, message: String| {
        DiagnoseError::Invalid(vec![Problem {
            path: path.to_string(),
            message,
        }])
    };
    let value: serde_json::Value = serde_json::from_str(text)
        .map_err(|e| one("readings file", format!("not valid JSON ({e})")))?;
    if !value.is_object() {
        return Err(one("readings file", "must be a JSON object".to_string()));
    }
    validate_readings(&ReadingsFile::take(value))
}

/// Validates a readings file.
///
/// # Errors
/// Every problem found.
pub fn validate_readings(file: &ReadingsFile) -> Result<Readings, DiagnoseError> {
    let mut c = Checker::new();
    c.unknown_keys(
        &file.unknown,
        "",
        &["version", "system", "meter", "readings"],
    );
    match &file.version {
        Raw::Absent => {}
        Raw::Given(v) if *v == READINGS_VERSION => {}
        _ => c.fail("version", format!("must be {READINGS_VERSION}")),
    }
    if file.system.is_absent() {
        c.fail("system", "is required: an object with kind split-phase");
    } else if let Some(system) = validate_system(&mut c, &file.system) {
        if system.kind() != SystemKind::SplitPhase {
            c.fail("system.kind", SPLIT_PHASE_ONLY);
        }
    }
    let readings = check_readings(&mut c, "", &file.meter, &file.readings);
    match readings {
        Some(r) if c.problems.is_empty() => Ok(r),
        _ => Err(DiagnoseError::Invalid(c.problems)),
    }
}

/// What the diagnosis supports, said where a wye service's readings are given.
pub const SPLIT_PHASE_ONLY: &str = "diagnosis from readings supports split-phase (120/240 V) services only; on a wye service read each phase to neutral and compare them with the job's solve instead";

/// Checks one list of readings and the meters' resolution; `prefix` is where they sit in the file
/// (`""` in a readings file, `readings[2].` in a job), so each problem names its field.
fn check_readings(
    c: &mut Checker,
    prefix: &str,
    meter: &Raw<MeterFile>,
    list: &Raw<Vec<Raw<ReadingFile>>>,
) -> Option<Readings> {
    let meter_path = format!("{prefix}meter");
    let meter = c.object(meter, &meter_path).cloned().unwrap_or_default();
    c.unknown_keys(&meter.unknown, &meter_path, METER_KEYS);
    let vres = c
        .number(
            &meter.volts_resolution,
            &format!("{meter_path}.volts_resolution"),
            Rule::Positive(10.0),
        )
        .unwrap_or(0.1);
    let ares = c
        .number(
            &meter.amps_resolution,
            &format!("{meter_path}.amps_resolution"),
            Rule::Positive(10.0),
        )
        .unwrap_or(0.1);
    let list_path = format!("{prefix}readings");
    let list = match list {
        Raw::Given(l) => l.clone(),
        Raw::Absent => {
            c.fail(&list_path, "is required: at least two sets of readings");
            Vec::new()
        }
        Raw::Invalid(_) => {
            c.fail(&list_path, "must be a list of readings");
            Vec::new()
        }
    };
    let before = c.problems.len();
    let mut readings = Vec::new();
    for (i, raw) in list.iter().enumerate() {
        let at_path = format!("{list_path}[{i}]");
        let path = |f: &str| format!("{at_path}.{f}");
        let Some(r) = c.object(raw, &at_path) else {
            continue;
        };
        c.unknown_keys(&r.unknown, &at_path, READING_KEYS);
        let v1 = c.required_number(&r.l1_n_v, &path("l1_n_v"), Rule::Positive(1000.0));
        let v2 = c.required_number(&r.l2_n_v, &path("l2_n_v"), Rule::Positive(1000.0));
        let v12 = c.number(&r.l1_l2_v, &path("l1_l2_v"), Rule::Positive(2000.0));
        let i1 = c.required_number(&r.l1_a, &path("l1_a"), Rule::NonNegative(10_000.0));
        let i2 = c.required_number(&r.l2_a, &path("l2_a"), Rule::NonNegative(10_000.0));
        let pf1 = c
            .number(&r.l1_pf, &path("l1_pf"), Rule::Between(0.05, 1.0))
            .or(r.l1_pf.is_absent().then_some(1.0));
        let pf2 = c
            .number(&r.l2_pf, &path("l2_pf"), Rule::Between(0.05, 1.0))
            .or(r.l2_pf.is_absent().then_some(1.0));
        let at = match c.text(&r.at, &path("at")) {
            None | Some("panel") => Some(Place::Panel),
            Some("meter") => Some(Place::Meter),
            Some(other) => {
                c.fail(
                    &path("at"),
                    format!("must be panel or meter (got {other:?})"),
                );
                None
            }
        };
        let label = c.text(&r.label, &path("label")).unwrap_or("").to_string();
        if let (Some(v1), Some(v2), Some(i1), Some(i2), Some(at), Some(pf1), Some(pf2)) =
            (v1, v2, i1, i2, at, pf1, pf2)
        {
            readings.push(Reading {
                label: if label.is_empty() {
                    format!("reading {}", i + 1)
                } else {
                    label
                },
                at,
                v1,
                v2,
                v12,
                i1,
                i2,
                pf1,
                pf2,
            });
        }
    }
    if c.problems.len() == before {
        for place in [Place::Panel, Place::Meter] {
            let here: Vec<&Reading> = readings.iter().filter(|r| r.at == place).collect();
            if here.is_empty() {
                continue;
            }
            let name = match place {
                Place::Panel => "panel",
                Place::Meter => "meter",
            };
            if here.len() < 2 {
                c.fail(&list_path, format!("need at least two readings at the {name} (one before and one after switching a load)"));
                continue;
            }
            let spread = |f: fn(&Reading) -> f64| {
                let lo = here.iter().map(|r| f(r)).fold(f64::INFINITY, f64::min);
                let hi = here.iter().map(|r| f(r)).fold(f64::NEG_INFINITY, f64::max);
                hi - lo
            };
            if spread(|r| r.i1).max(spread(|r| r.i2)) < MIN_CURRENT_CHANGE_A {
                c.fail(
                    &list_path,
                    format!(
                        "the readings at the {name} show no change in leg current: switch a known load on one leg (at least {} A) between readings",
                        plain(MIN_CURRENT_CHANGE_A)
                    ),
                );
            }
        }
    }
    (c.problems.len() == before).then_some(Readings {
        readings,
        volts_resolution: vres,
        amps_resolution: ares,
    })
}

/// One dated set of a job's readings and what its diagnosis found.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SetOutcome {
    /// Where the set sits in the job's `readings` list.
    pub index: usize,
    pub taken: String,
    pub note: String,
    /// The diagnosis, when the set's readings allow one.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub diagnosis: Option<Diagnosis>,
    /// Why there is no diagnosis: each problem names its field in the job file.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub problems: Vec<Problem>,
}

/// Every set of a job's readings diagnosed, and the latest compared with the first.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct History {
    pub sets: Vec<SetOutcome>,
    /// The first diagnosed set against the latest, when there are two: did the repair help?
    #[serde(skip_serializing_if = "Option::is_none")]
    pub comparison: Option<String>,
}

/// Diagnoses each of a job's reading sets on the job's own service.
///
/// The service kind comes from the validated job; the readings themselves stay in the job file as
/// typed and are validated here, each problem named by its path in the job
/// (`readings[1].readings[0].l2_n_v`).
pub fn history(job: &Job, file: &JobFile) -> History {
    let sets = file.readings.given().cloned().unwrap_or_default();
    let mut out = Vec::new();
    for (index, raw) in sets.iter().enumerate() {
        let prefix = format!("readings[{index}].");
        let mut c = Checker::new();
        let set = c
            .object(raw, &format!("readings[{index}]"))
            .cloned()
            .unwrap_or_default();
        if job.system().kind() != SystemKind::SplitPhase {
            c.fail("system.kind", SPLIT_PHASE_ONLY);
        }
        let readings = check_readings(&mut c, &prefix, &set.meter, &set.readings);
        let (diagnosis, problems) = match readings {
            Some(r) if c.problems.is_empty() => match diagnose(&r) {
                Ok(d) => (Some(d), Vec::new()),
                Err(DiagnoseError::Invalid(p)) => (None, p),
                Err(DiagnoseError::Degenerate(m)) => (
                    None,
                    vec![Problem {
                        path: format!("{prefix}readings"),
                        message: m,
                    }],
                ),
            },
            _ => (None, c.problems),
        };
        out.push(SetOutcome {
            index,
            taken: set.taken.given().cloned().unwrap_or_default(),
            note: set.note.given().cloned().unwrap_or_default(),
            diagnosis,
            problems,
        });
    }
    let comparison = compare(&out);
    History {
        sets: out,
        comparison,
    }
}

/// "On 2026-11-30 the neutral measured 0.52 ± 0.05 Ω (dangerous); on 2026-12-02 0.04 ± 0.03 Ω
/// (healthy): 0.48 Ω less." A change within the two sets' combined uncertainty is said to be
/// none (the uncertainties are about 99.7 % intervals, so their sum is a safe bound).
fn compare(sets: &[SetOutcome]) -> Option<String> {
    let done: Vec<(&SetOutcome, &Diagnosis)> = sets
        .iter()
        .filter_map(|s| s.diagnosis.as_ref().map(|d| (s, d)))
        .collect();
    let (&(s0, d0), &(s1, d1)) = (done.first()?, done.last()?);
    if s0.index == s1.index {
        return None;
    }
    let when = |s: &SetOutcome| {
        if s.taken.trim().is_empty() {
            format!("set {}", s.index + 1)
        } else {
            s.taken.trim().to_string()
        }
    };
    let change = d1.neutral_ohms - d0.neutral_ohms;
    let bound = d0.neutral_ohms_uncertainty + d1.neutral_ohms_uncertainty;
    let verdict = if change.abs() <= bound {
        format!(
            "no change beyond the readings' uncertainty (±{bound} Ω)",
            bound = fixed(bound, 3)
        )
    } else if change < 0.0 {
        format!("{} Ω less", fixed(-change, 3))
    } else {
        format!(
            "{change} Ω more: the connection is getting worse",
            change = fixed(change, 3)
        )
    };
    Some(format!(
        "First test ({}): neutral {} ± {} Ω, {}. Latest ({}): {} ± {} Ω, {}. That is {verdict}.",
        when(s0),
        fixed(d0.neutral_ohms, 3),
        fixed(d0.neutral_ohms_uncertainty, 3),
        d0.verdict.word(),
        when(s1),
        fixed(d1.neutral_ohms, 3),
        fixed(d1.neutral_ohms_uncertainty, 3),
        d1.verdict.word()
    ))
}

/// The conductors' reactance as a fraction of their resistance assumed by the second fit that
/// measures the model's bias: a loose connection is resistive, but the hot and neutral conductors
/// of a service drop have X/R of roughly 0.3 to 0.5 (common practice, no source).
pub const BIAS_X_OVER_R: f64 = 0.4;

/// Solves the 4 × 4 normal equations by Gaussian elimination with partial pivoting; returns the
/// solution and the inverse's diagonal (for the uncertainties), or `None` when singular.
fn solve4(ata: [[f64; 4]; 4], atb: [f64; 4]) -> Option<([f64; 4], [f64; 4])> {
    // Augment with the identity to get the inverse's diagonal at the same time.
    let mut m = [[0.0; 9]; 4];
    for i in 0..4 {
        m[i][..4].copy_from_slice(&ata[i]);
        m[i][4] = atb[i];
        m[i][5 + i] = 1.0;
    }
    let scale = ata.iter().flatten().fold(0.0f64, |a, b| a.max(b.abs()));
    for col in 0..4 {
        let p = (col..4).max_by(|&a, &b| m[a][col].abs().total_cmp(&m[b][col].abs()))?;
        if m[p][col].abs() <= 1e-12 * scale {
            return None;
        }
        m.swap(col, p);
        let pivot = m[col][col];
        for v in m[col].iter_mut() {
            *v /= pivot;
        }
        for row in 0..4 {
            if row != col {
                let f = m[row][col];
                let src = m[col];
                for (dst, s) in m[row].iter_mut().zip(src) {
                    *dst -= f * s;
                }
            }
        }
    }
    let x = [m[0][4], m[1][4], m[2][4], m[3][4]];
    let diag = [m[0][5], m[1][6], m[2][7], m[3][8]];
    Some((x, diag))
}

/// One measured magnitude and how the model's phasor for it depends on the unknowns
/// p = (E₁, E₂, R_h, R_n): V = c₀·E₁ + c₁·E₂ + c₂·R_h + c₃·R_n (complex coefficients).
struct Row {
    coef: [Complex64; 4],
    measured: f64,
}

impl Row {
    fn phasor(&self, p: &[f64; 4]) -> Complex64 {
        self.coef.iter().zip(p).map(|(c, x)| c * x).sum()
    }
}

/// The model's equations for one place's readings, in phasors. Each leg current is referred to
/// its own leg's voltage, lagging by its power factor: i₁ = I₁∠−acos pf₁, i₂ = I₂∠−acos pf₂, and
/// the neutral carries n = i₁ − i₂ (the legs are 180° apart). With the conductors' impedance
/// Z = R·(1 + jk) (k = X/R):
///
/// - V₁ = E₁ − Z_h·i₁ − Z_n·n
/// - V₂ = E₂ − Z_h·i₂ + Z_n·n
/// - V₁₂ = E₁ + E₂ − Z_h·(i₁ + i₂)
///
/// Kirchhoff's voltage law on the three-wire circuit (common practice); the meters read
/// magnitudes.
///
/// A clamp measures each current's angle against its own leg's voltage at the panel, which the
/// drops turn away from the source's by δ; `angles` holds each reading's (δ₁, δ₂), radians.
fn rows(readings: &[&Reading], k: f64, angles: &[(f64, f64)]) -> Vec<Row> {
    let zk = Complex64::new(1.0, k);
    let one = Complex64::new(1.0, 0.0);
    let zero = Complex64::new(0.0, 0.0);
    let mut out = Vec::new();
    for (r, (d1, d2)) in readings.iter().zip(angles) {
        let i1 = Complex64::from_polar(r.i1, d1 - r.pf1.acos());
        let i2 = Complex64::from_polar(r.i2, d2 - r.pf2.acos());
        let n = i1 - i2;
        out.push(Row {
            coef: [one, zero, -zk * i1, -zk * n],
            measured: r.v1,
        });
        out.push(Row {
            coef: [zero, one, -zk * i2, zk * n],
            measured: r.v2,
        });
        if let Some(v12) = r.v12 {
            out.push(Row {
                coef: [one, one, -zk * (i1 + i2), zero],
                measured: v12,
            });
        }
    }
    out
}

/// Least squares of the magnitudes |V(p)| against the readings, by Gauss–Newton from the
/// in-phase (first-order) solution; returns p, the inverse normal matrix's diagonal and the
/// residuals' sum of squares.
fn least_squares(rows: &[Row]) -> Option<([f64; 4], [f64; 4], f64)> {
    let normal = |jac: &dyn Fn(&Row) -> ([f64; 4], f64)| {
        let mut ata = [[0.0; 4]; 4];
        let mut atb = [0.0; 4];
        for row in rows {
            let (a, b) = jac(row);
            for i in 0..4 {
                atb[i] += a[i] * b;
                for j in 0..4 {
                    ata[i][j] += a[i] * a[j];
                }
            }
        }
        (ata, atb)
    };
    // First order: |V| ≈ Re(V) when the drops are small against the source voltage.
    let (ata, atb) = normal(&|row: &Row| {
        (
            [
                row.coef[0].re,
                row.coef[1].re,
                row.coef[2].re,
                row.coef[3].re,
            ],
            row.measured,
        )
    });
    let (mut p, mut inv) = solve4(ata, atb)?;
    for _ in 0..20 {
        // d|V|/dp = Re(conj(V)·dV/dp)/|V|; the step solves JᵀJ·Δ = Jᵀ·(measured − |V|).
        let (ata, atb) = normal(&|row: &Row| {
            let v = row.phasor(&p);
            let mag = v.norm().max(1e-9);
            let a = std::array::from_fn(|i| (v.conj() * row.coef[i]).re / mag);
            (a, row.measured - v.norm())
        });
        let (step, diag) = solve4(ata, atb)?;
        inv = diag;
        for (x, d) in p.iter_mut().zip(step) {
            *x += d;
        }
        if step.iter().map(|d| d.abs()).fold(0.0, f64::max) < 1e-12 {
            break;
        }
    }
    let rss = rows
        .iter()
        .map(|row| (row.measured - row.phasor(&p).norm()).powi(2))
        .sum();
    Some((p, inv, rss))
}

/// A fit's rows, unknowns (E₁, E₂, R_h, R_n), inverse normal diagonal and residual sum of squares.
type Referred = (Vec<Row>, [f64; 4], [f64; 4], f64);

/// The least-squares fit with each current referred to its leg's own voltage: the angles δ of
/// the model's leg voltages are found by fixed-point iteration around the fit (they are a few
/// degrees at most, and settle in a handful of rounds).
fn fit_referred(readings: &[&Reading], k: f64) -> Option<Referred> {
    let mut angles = vec![(0.0, 0.0); readings.len()];
    let mut last = None;
    for _ in 0..30 {
        let rs = rows(readings, k, &angles);
        let (p, inv, rss) = least_squares(&rs)?;
        // Each reading's rows start with V₁ and V₂ (then V₁₂ if read).
        let mut at = 0;
        let mut moved: f64 = 0.0;
        for (r, a) in readings.iter().zip(angles.iter_mut()) {
            let new = (rs[at].phasor(&p).arg(), rs[at + 1].phasor(&p).arg());
            moved = moved.max((new.0 - a.0).abs()).max((new.1 - a.1).abs());
            *a = new;
            at += if r.v12.is_some() { 3 } else { 2 };
        }
        last = Some((rs, p, inv, rss));
        if moved < 1e-12 {
            break;
        }
    }
    last
}

/// The uncertainty is this many standard uncertainties of the meters' part (about 99.7 % for a
/// normal error): the readings are rounded, not random, and a verdict beside energized equipment
/// should be wrong very rarely, so the interval is wide rather than narrow.
const COVERAGE: f64 = 3.0;

/// The resolution of a power-quality clamp's power-factor display (common practice, no source).
const PF_RESOLUTION: f64 = 0.01;

/// Fits E₁, E₂, R_h and R_n to one place's readings.
fn fit(readings: &[&Reading], vres: f64, ares: f64) -> Result<Fit, DiagnoseError> {
    let degenerate = || {
        DiagnoseError::Degenerate("the readings do not separate the hot and neutral resistances: change the load on one leg by a few amperes between readings".to_string())
    };
    let (main, x, inv_diag, rss) = fit_referred(readings, 0.0).ok_or_else(degenerate)?;
    // The model's bias: the same fit with reactive conductors. The difference is what neglecting
    // the conductors' reactance can do to the answer (zero when every current is in phase).
    let (_, xb, _, _) = fit_referred(readings, BIAS_X_OVER_R).ok_or_else(degenerate)?;
    let dof = main.len().saturating_sub(4);
    // Quantisation noise of a reading: resolution/√12 (common practice). Current errors enter
    // through the resistances they multiply.
    // A clamp that shows power factor to two places (0.01) moves the in-phase part of a current
    // by up to half of that of the current.
    let pf_shown = readings.iter().any(|r| r.pf1 < 1.0 || r.pf2 < 1.0);
    let i_max = readings.iter().map(|r| r.i1.max(r.i2)).fold(0.0, f64::max);
    let pf_amps = if pf_shown { PF_RESOLUTION * i_max } else { 0.0 };
    let sigma_meter_sq =
        (vres * vres + (x[2] * x[2] + x[3] * x[3]) * (ares * ares + pf_amps * pf_amps)) / 12.0;
    let sigma_sq = if dof > 0 {
        sigma_meter_sq.max(rss / dof as f64)
    } else {
        sigma_meter_sq
    };
    let meter_n = COVERAGE * (sigma_sq * inv_diag[3].max(0.0)).sqrt();
    let meter_h = COVERAGE * (sigma_sq * inv_diag[2].max(0.0)).sqrt();
    let bias_n = (xb[3] - x[3]).abs();
    let bias_h = (xb[2] - x[2]).abs();
    Ok(Fit {
        neutral_ohms: x[3],
        neutral_ohms_uncertainty: meter_n.hypot(bias_n),
        hot_ohms: x[2],
        hot_ohms_uncertainty: meter_h.hypot(bias_h),
        model_bias_ohms: bias_n,
        source_v: [x[0], x[1]],
        residual_rms_v: (rss / main.len() as f64).sqrt(),
        meter_noise_v: sigma_meter_sq.sqrt(),
        degrees_of_freedom: dof,
        current_change_a: current_change(readings),
        readings_used: readings.len(),
    })
}

/// The largest change of a leg current between the readings, amperes.
fn current_change(readings: &[&Reading]) -> f64 {
    let spread = |f: fn(&Reading) -> f64| {
        let lo = readings.iter().map(|r| f(r)).fold(f64::INFINITY, f64::min);
        let hi = readings
            .iter()
            .map(|r| f(r))
            .fold(f64::NEG_INFINITY, f64::max);
        hi - lo
    };
    spread(|r| r.i1).max(spread(|r| r.i2))
}

/// What a resistance and its uncertainty say against the thresholds: a verdict only when the
/// whole interval R ± U lies on one side of every threshold.
fn judge(ohms: f64, uncertainty: f64) -> Verdict {
    if ohms + uncertainty < 0.0 {
        return Verdict::NotPhysical;
    }
    let (lo, hi) = (ohms - uncertainty, ohms + uncertainty);
    let straddles = |t: f64| lo < t && t < hi;
    if straddles(HEALTHY_MAX_OHMS) || straddles(SUSPECT_MAX_OHMS) {
        Verdict::Inconclusive
    } else if ohms <= HEALTHY_MAX_OHMS {
        Verdict::Healthy
    } else if ohms <= SUSPECT_MAX_OHMS {
        Verdict::Suspect
    } else {
        Verdict::Dangerous
    }
}

/// The verdict for a neutral resistance with its uncertainty, and its one-line reason.
pub fn verdict_for(ohms: f64, uncertainty: f64) -> (Verdict, String) {
    let shift = ohms * 10.0;
    let v = judge(ohms, uncertainty);
    let what = match v {
        Verdict::Healthy => "within what a sound service neutral shows",
        Verdict::Suspect => {
            "higher than a sound neutral: check and tighten the neutral connections"
        }
        Verdict::Dangerous => {
            "a loose or failing neutral: appliances are at risk; treat it as urgent"
        }
        Verdict::Inconclusive => {
            "the readings cannot tell which side of a threshold it is on: take them again with a larger test load"
        }
        Verdict::NotPhysical => {
            "a negative resistance, which no conductor has: the readings are inconsistent; take them again"
        }
    };
    (
        v,
        format!(
            "neutral {ohms} Ω ± {uncertainty} Ω moves the neutral about {shift} V per 10 A of imbalance: {what}",
            ohms = fixed(ohms, 3),
            uncertainty = fixed(uncertainty, 3),
            shift = fixed(shift, 1)
        ),
    )
}

/// Readings that scatter around the fit by more than this are not from a steady supply, volts
/// (common practice, no source: a steady utility supply holds within a few tenths of a volt over
/// the minute the readings take).
const MAX_STEADY_RESIDUAL_V: f64 = 0.25;

/// The change of leg current that would shrink the meters' part of the uncertainty enough to put
/// the neutral's interval on one side of the threshold it straddles (that part falls as one over
/// the current change), or `None` when the model's bias alone is too large for any test load.
fn settling_load(f: &Fit) -> Option<f64> {
    let distance = [HEALTHY_MAX_OHMS, SUSPECT_MAX_OHMS]
        .iter()
        .map(|t| (f.neutral_ohms - t).abs())
        .fold(f64::INFINITY, f64::min);
    let meter = (f.neutral_ohms_uncertainty.powi(2) - f.model_bias_ohms.powi(2))
        .max(0.0)
        .sqrt();
    let room = (distance * distance - f.model_bias_ohms * f.model_bias_ohms)
        .max(0.0)
        .sqrt();
    (room > 0.0 && meter > 0.0).then(|| f.current_change_a * meter / room * 1.1)
}

/// Diagnoses validated readings.
///
/// # Errors
/// [`DiagnoseError::Degenerate`] when the readings cannot separate the resistances.
pub fn diagnose(r: &Readings) -> Result<Diagnosis, DiagnoseError> {
    let at =
        |place: Place| -> Vec<&Reading> { r.readings.iter().filter(|x| x.at == place).collect() };
    let panel = at(Place::Panel);
    let meter = at(Place::Meter);
    let at_panel = if panel.len() >= 2 {
        Some(fit(&panel, r.volts_resolution, r.amps_resolution)?)
    } else {
        None
    };
    let at_meter = if meter.len() >= 2 {
        Some(fit(&meter, r.volts_resolution, r.amps_resolution)?)
    } else {
        None
    };
    // The verdict rests on the whole path to where the customer's loads are: the panel when read
    // there, else the meter.
    let main = at_panel
        .as_ref()
        .or(at_meter.as_ref())
        .ok_or_else(|| DiagnoseError::Degenerate("no readings".into()))?;
    let (neutral_verdict, mut reason) =
        verdict_for(main.neutral_ohms, main.neutral_ohms_uncertainty);
    // Every fitted place and both conductors count: the verdict is the worst of them.
    let mut verdict = neutral_verdict;
    let mut hot_verdict = Verdict::Healthy;
    for f in at_panel.iter().chain(at_meter.iter()) {
        let n = judge(f.neutral_ohms, f.neutral_ohms_uncertainty);
        let h = judge(f.hot_ohms, f.hot_ohms_uncertainty);
        hot_verdict = hot_verdict.worse(h);
        verdict = verdict.worse(n).worse(h);
        // Readings that scatter far beyond the meters' noise cannot come from one service with
        // a steady supply (the supply voltage probably changed between readings).
        if f.degrees_of_freedom > 0
            && f.residual_rms_v > (4.0 * f.meter_noise_v).max(MAX_STEADY_RESIDUAL_V)
        {
            verdict = Verdict::NotPhysical;
            reason = format!(
                "the readings scatter by {} V around the best fit, far more than the meters' {} V: the supply voltage probably changed between readings; take them again in quick succession",
                fixed(f.residual_rms_v, 2),
                fixed(f.meter_noise_v, 2)
            );
        }
    }
    if verdict != neutral_verdict && verdict != Verdict::NotPhysical {
        reason.push_str(&format!(
            "; each hot {} Ω ± {} Ω",
            fixed(main.hot_ohms, 3),
            fixed(main.hot_ohms_uncertainty, 3)
        ));
    }
    let settle_with_test_load_a = (verdict == Verdict::Inconclusive)
        .then(|| settling_load(main))
        .flatten();
    if let Some(a) = settle_with_test_load_a {
        reason.push_str(&format!(
            "; a resistive test load changing one leg's current by about {a} A (a {} W heater at 120 V) would settle it",
            fixed(a * 120.0, 0),
            a = fixed(a, 0)
        ));
    }
    let (likely_location, location_reason) = match (&at_meter, &at_panel) {
        (Some(m), Some(p)) => {
            let building = p.neutral_ohms - m.neutral_ohms;
            let sound = |f: &Fit| judge(f.neutral_ohms, f.neutral_ohms_uncertainty) == Verdict::Healthy;
            if sound(m) && sound(p) {
                ("unknown", "the neutral reads healthy from both places".to_string())
            } else if m.neutral_ohms > building {
                (
                    "utility side",
                    format!(
                        "{} Ω of the neutral's {} Ω is before the meter (transformer, service drop, meter base): call the utility",
                        fixed(m.neutral_ohms, 3),
                        fixed(p.neutral_ohms, 3)
                    ),
                )
            } else {
                (
                    "building side",
                    format!(
                        "{building} Ω of the neutral's {} Ω is between the meter and the panel (service entrance conductors, panel neutral bar)",
                        fixed(p.neutral_ohms, 3),
                        building = fixed(building, 3)
                    ),
                )
            }
        }
        _ => (
            "unknown",
            "take the same readings at the meter base and at the panel to tell the utility side from the building side".to_string(),
        ),
    };
    Ok(Diagnosis {
        neutral_ohms: main.neutral_ohms,
        neutral_ohms_uncertainty: main.neutral_ohms_uncertainty,
        hot_ohms: main.hot_ohms,
        hot_ohms_uncertainty: main.hot_ohms_uncertainty,
        verdict,
        reason,
        hot_verdict,
        settle_with_test_load_a,
        thresholds_ohms: [HEALTHY_MAX_OHMS, SUSPECT_MAX_OHMS],
        thresholds_source: "common practice, no source: 1 % and 5 % of 120 V per 10 A of imbalance",
        at_panel,
        at_meter,
        likely_location,
        location_reason,
        cautions: vec![
            "Readings are taken on energized equipment: qualified persons only, with the protective equipment the task calls for.",
            "A loose or open neutral can put dangerous voltage on neutral and grounded parts; keep others clear.",
            "Confirm any finding with a second measurement before acting on it.",
        ],
    })
}
