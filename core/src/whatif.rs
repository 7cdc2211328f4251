//! What-if: the same job with the neutral intact, loose and open, and a sweep of the neutral's
//! resistance from 0 to open for a plot of every appliance's voltage.

use crate::classify::{classify, Context, Outcome};
use crate::figures::fixed;
use crate::network::Network;
use crate::report::{build, checked, Report};
use crate::solve::{magnitude, solve, solve_fundamental_each, SolveError};
use crate::validate::{Job, NeutralState};
use serde::Serialize;

/// Loose-neutral resistance used by the what-if when the job's neutral is not loose, ohms: a badly
/// loosened lug or a corroded splice (common practice, no source).
pub const DEFAULT_LOOSE_OHMS: f64 = 2.0;

/// The three states side by side.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct WhatIf {
    pub intact: Report,
    pub loose: Report,
    pub open: Report,
}

/// Solves the job with the neutral intact, loose (the job's resistance or
/// [`DEFAULT_LOOSE_OHMS`]) and open; the job's earth path stays beside the neutral in all three.
///
/// # Errors
/// The first [`SolveError`] met.
pub fn what_if(job: &Job) -> Result<WhatIf, SolveError> {
    let loose = match job.neutral() {
        NeutralState::Loose { ohms } => ohms,
        _ => DEFAULT_LOOSE_OHMS,
    };
    let one = |state| -> Result<Report, SolveError> {
        let j = job.with_neutral(state);
        let net = Network::new(&j);
        checked(build(&j, &net, &solve(&net)?))
    };
    Ok(WhatIf {
        intact: one(NeutralState::Intact)?,
        loose: one(NeutralState::Loose { ohms: loose })?,
        open: one(NeutralState::Open)?,
    })
}

/// One appliance's voltages along the sweep.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SweepSeries {
    pub name: String,
    pub connect: String,
    pub rated_v: f64,
    /// Voltage at each point, volts (`None` where its neutral floats).
    pub volts: Vec<Option<f64>>,
    pub outcomes: Vec<Outcome>,
}

/// The sweep: neutral resistance points (`None` = open) and each appliance's series.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Sweep {
    pub neutral_ohms: Vec<Option<f64>>,
    pub loads: Vec<SweepSeries>,
}

/// Neutral resistances for a sweep of `n` points (n ≥ 3): 0, then n − 2 points spaced evenly on a
/// log scale from 0.01 Ω to 1000 Ω, then open.
pub fn sweep_points(n: usize) -> Vec<Option<f64>> {
    let n = n.max(3);
    let inner = n - 2;
    let mut out = Vec::with_capacity(n);
    out.push(Some(0.0));
    for k in 0..inner {
        let t = if inner == 1 {
            0.5
        } else {
            k as f64 / (inner - 1) as f64
        };
        out.push(Some(10f64.powf(-2.0 + 5.0 * t)));
    }
    out.push(None);
    out
}

/// Sweeps the neutral from solid to open over `points` (see [`sweep_points`]). The job's earth
/// path stays beside the neutral at every point, so the sweep runs continuously into "open".
///
/// # Errors
/// The first [`SolveError`] met.
pub fn sweep(job: &Job, points: &[Option<f64>]) -> Result<Sweep, SolveError> {
    let mut net = Network::new(job);
    let contexts: Vec<Context> = job
        .loads()
        .iter()
        .map(|l| Context::of(job.system(), l))
        .collect();
    let mut loads: Vec<SweepSeries> = job
        .loads()
        .iter()
        .map(|l| SweepSeries {
            name: l.name().to_string(),
            connect: l.connection().label(),
            rated_v: l.rated_v(),
            volts: Vec::with_capacity(points.len()),
            outcomes: Vec::with_capacity(points.len()),
        })
        .collect();
    // Each point is solved from a cold start, as the what-if solves it alone: a warm start from
    // the neighbouring point can settle in another steady state where the service has two (a
    // motor that stalls from cold keeps running when reached from a lighter neighbour).
    let states: Vec<NeutralState> = points
        .iter()
        .map(|p| match p {
            Some(ohms) => NeutralState::Loose { ohms: *ohms },
            None => NeutralState::Open,
        })
        .collect();
    solve_fundamental_each(&mut net, &states, |_, sol| {
        for (k, ((series, r), load)) in loads
            .iter_mut()
            .zip(&sol.loads)
            .zip(job.loads())
            .enumerate()
        {
            let v = r.terminal_v.map(magnitude);
            series.volts.push(v);
            series.outcomes.push(match v {
                Some(v) => classify(load, v, r.state, load.is_on(), contexts[k]).0,
                None => Outcome::Off,
            });
        }
        Ok::<(), SolveError>(())
    })?;
    Ok(Sweep {
        neutral_ohms: points.to_vec(),
        loads,
    })
}

/// The sweep as CSV: a header `neutral_ohms,<load names>` and one row per point, `open` for the
/// open neutral and an empty cell where a voltage is undefined.
pub fn sweep_csv(s: &Sweep) -> String {
    let mut out = String::from("neutral_ohms");
    for l in &s.loads {
        out.push(',');
        out.push_str(&csv_field(&l.name));
    }
    out.push('\n');
    for (k, p) in s.neutral_ohms.iter().enumerate() {
        match p {
            Some(r) => out.push_str(&fixed(*r, 6).to_string()),
            None => out.push_str("open"),
        }
        for l in &s.loads {
            out.push(',');
            if let Some(v) = l.volts[k] {
                out.push_str(&fixed(v, 3).to_string());
            }
        }
        out.push('\n');
    }
    out
}

fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}
