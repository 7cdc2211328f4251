//! The dip when a motor starts: the network solved at the instant of starting, the motor held at
//! locked rotor (its starting current at its starting power factor, constant impedance, since the
//! rotor has not turned yet), every other appliance as it runs. Compared with the same network a
//! moment before (the motor not yet on), it gives each appliance's voltage dip, whether lights
//! flicker visibly at the motor's starting rate, and whether the motor itself can start.
//!
//! A loose neutral makes the dip worse on the motor's own leg and raises the other leg: the usual
//! first symptom of a loose neutral is "the lights dim when the air conditioner starts".

use crate::figures::{fixed, plain};
use crate::loads::{LockedRotorBasis, Model};
use crate::network::Network;
use crate::solve::{solve_fundamental, SolveError};
use crate::validated::Job;
use serde::Serialize;

/// Locked-rotor torque of a small induction motor as a multiple of its full-load torque at rated
/// voltage: NEMA design B motors of a few horsepower develop about 1.5 to 2.75 times (NEMA MG 1
/// §12.38, from memory); 1.5 is taken, the low end. Torque ∝ V², and the motor is taken to start
/// when its starting torque at the dipped voltage still meets the full-load torque of a
/// compressor or pump starting against its load (common practice, no source).
pub const LOCKED_ROTOR_TORQUE: f64 = 1.5;

/// Voltage dips (percent) at the border of visible flicker for incandescent lighting, by how
/// often they occur: the "borderline of visibility" of the flicker curve in IEEE Std 141 and
/// IEEE Std 519-1992 (from memory: read off the curve, roughly 1 % at one dip a minute, rising to
/// about 2 % at a few dips an hour).
pub const FLICKER_VISIBLE: [(f64, f64); 5] = [
    // (dips per hour, percent)
    (1.0, 2.0),
    (10.0, 1.5),
    (60.0, 1.0),
    (600.0, 0.6),
    (3600.0, 0.5),
];

/// The flicker threshold at `per_hour` dips, percent, interpolated on the logarithm of the rate.
pub fn flicker_threshold_pct(per_hour: f64) -> f64 {
    let r = per_hour.max(FLICKER_VISIBLE[0].0);
    for w in FLICKER_VISIBLE.windows(2) {
        let ((r0, p0), (r1, p1)) = (w[0], w[1]);
        if r <= r1 {
            let t = (r.ln() - r0.ln()) / (r1.ln() - r0.ln());
            return p0 + t * (p1 - p0);
        }
    }
    FLICKER_VISIBLE[FLICKER_VISIBLE.len() - 1].1
}

/// One appliance while the motor starts.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Dip {
    pub name: String,
    pub connect: String,
    /// Before the motor starts, volts.
    pub before_v: Option<f64>,
    /// At the instant of starting, volts.
    pub during_v: Option<f64>,
    /// Before minus during, volts (negative: the voltage rises, as on the other leg of a loose
    /// neutral).
    pub dip_v: Option<f64>,
    pub dip_pct: Option<f64>,
    /// True for a lamp whose dip is above the flicker threshold at the motor's starting rate.
    pub flicker_visible: bool,
}

/// The motor start.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Start {
    pub motor: String,
    /// Locked-rotor amperes at rated voltage, and where the figure came from.
    pub locked_rotor_a: f64,
    pub locked_rotor_basis: String,
    pub start_pf: f64,
    /// Its own voltage at the instant of starting, volts and percent of rated.
    pub motor_v: Option<f64>,
    pub motor_pct: Option<f64>,
    /// Its starting torque at that voltage as a percentage of full-load torque, (V/V_r)²·LRT.
    pub starting_torque_pct: Option<f64>,
    pub can_start: bool,
    pub starts_per_hour: f64,
    /// The flicker threshold used, percent.
    pub flicker_threshold_pct: f64,
    pub flicker_source: &'static str,
    pub appliances: Vec<Dip>,
    pub notes: Vec<String>,
}

/// Why a start could not be worked out.
#[derive(Clone, Debug, PartialEq)]
pub enum StartError {
    /// No load of that name.
    NoSuchLoad(String),
    /// The load is not a motor.
    NotAMotor(String),
    Solve(SolveError),
}

impl std::fmt::Display for StartError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            StartError::NoSuchLoad(n) => write!(f, "--load: the job has no appliance named {n:?}"),
            StartError::NotAMotor(n) => write!(f, "--load: {n:?} is not a motor"),
            StartError::Solve(e) => write!(f, "{e}"),
        }
    }
}

impl std::error::Error for StartError {}

/// Starts the motor named `name` in `job`, `starts_per_hour` times an hour.
///
/// # Errors
/// [`StartError`] when there is no such motor or a network does not solve.
pub fn start(job: &Job, name: &str, starts_per_hour: f64) -> Result<Start, StartError> {
    let k = job
        .loads()
        .iter()
        .position(|l| l.name() == name)
        .ok_or_else(|| StartError::NoSuchLoad(name.to_string()))?;
    let motor = &job.loads()[k];
    if motor.model() != Model::Motor {
        return Err(StartError::NotAMotor(name.to_string()));
    }
    // A moment before: the motor not yet on. The dip is a fundamental-frequency event, so both
    // instants are solved at the fundamental only (the harmonics' few tenths of a volt of rms do
    // not move it), on one network built once.
    let mut before_net = Network::new(job);
    let mut during_net = before_net.clone();
    before_net.loads[k].load.on = false;
    let before_sol = solve_fundamental(&before_net).map_err(StartError::Solve)?;
    // The instant of starting: the motor at locked rotor.
    during_net.set_starting(Some(k));
    let during_sol = solve_fundamental(&during_net).map_err(StartError::Solve)?;
    let volts = |sol: &crate::solve::Solution, i: usize| sol.loads[i].terminal_v.map(|v| v.norm());
    let threshold = flicker_threshold_pct(starts_per_hour);
    let appliances: Vec<Dip> = job
        .loads()
        .iter()
        .enumerate()
        .filter(|(i, _)| *i != k)
        .map(|(i, load)| {
            let (b, d) = (volts(&before_sol, i), volts(&during_sol, i));
            let dip = b.zip(d).map(|(x, y)| x - y);
            let pct = dip.zip(b).map(|(dv, v)| dv / v * 100.0);
            Dip {
                name: load.name().to_string(),
                connect: load.connection().label(),
                before_v: b,
                during_v: d,
                dip_v: dip,
                dip_pct: pct,
                flicker_visible: load.model() == Model::Lamp
                    && load.is_on()
                    && pct.is_some_and(|p| p > threshold),
            }
        })
        .collect();
    let lr = motor
        .locked_rotor()
        .expect("a validated motor has its locked-rotor draw");
    let motor_v = during_sol.loads[k].terminal_v.map(|v| v.norm());
    let motor_pct = motor_v.map(|v| v / motor.rated_v() * 100.0);
    let torque = motor_pct.map(|p| (p / 100.0).powi(2) * LOCKED_ROTOR_TORQUE * 100.0);
    let can_start = torque.is_some_and(|t| t >= 100.0);
    let mut notes = Vec::new();
    if let Some(worst) = appliances
        .iter()
        .filter_map(|a| a.dip_pct)
        .fold(None, |m: Option<f64>, p| Some(m.map_or(p, |m| m.max(p))))
    {
        if appliances
            .iter()
            .any(|a| a.dip_pct.is_some_and(|p| p < 0.0))
        {
            notes.push(format!(
                "While it starts one leg dips by up to {worst} % and the other rises: the neutral shifts, so the dip is worse than the service alone explains. Check the neutral.",
                worst = fixed(worst, 1)
            ));
        }
    }
    if !can_start {
        notes.push("At this voltage the motor may not develop the torque to start: it stalls at locked rotor until its overload trips.".to_string());
    }
    notes.push("Figures at the instant of starting; the dip lasts until the motor comes up to speed (a fraction of a second to a few seconds). Verify with a recording meter.".to_string());
    Ok(Start {
        motor: motor.name().to_string(),
        locked_rotor_a: lr.amps,
        locked_rotor_basis: match lr.basis {
            LockedRotorBasis::Given => "given".to_string(),
            LockedRotorBasis::CodeLetter { letter, hp } => {
                format!(
                    "code letter {letter}, {hp} hp (NEC Table 430.7(B), top of the range)",
                    hp = plain(hp)
                )
            }
            LockedRotorBasis::Multiple(m) => format!("{} × running current", plain(m)),
        },
        start_pf: lr.power_factor,
        motor_v,
        motor_pct,
        starting_torque_pct: torque,
        can_start,
        starts_per_hour,
        flicker_threshold_pct: threshold,
        flicker_source:
            "borderline of visibility, IEEE Std 141 / IEEE Std 519-1992 flicker curve (from memory)",
        appliances,
        notes,
    })
}
