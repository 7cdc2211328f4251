//! The solver: nodal analysis in complex numbers at the fundamental, with an iteration for
//! voltage-dependent loads, then a linear solve for each harmonic order that electronic loads inject.
//!
//! At each step the panel node voltages V solve Y·V = I, where Y holds the source admittance
//! Y_s = Z_s⁻¹ on the hot bars, the neutral path's admittance on the neutral bar, and each load's
//! admittance (in series with its branch conductors) between its two nodes; I holds the Norton
//! currents Y_s·E of the source. Nodes held at a fixed voltage (a stiff source, a neutral of zero
//! impedance) are moved to the right-hand side. A solve either converges or returns a
//! [`SolveError`]; it never returns NaN.

use crate::linalg::{solve_dense, MAX_NODES};
use crate::loads::{Model, State};
use crate::network::{at_harmonic, Network, NeutralPath, Node, Source, NEUTRAL_INDEX};
use num_complex::Complex64;

/// Most fixed-point iterations for one set of load states.
pub const MAX_ITERATIONS: usize = 200;

/// Convergence: the largest change of any load's terminal voltage between iterations, as a fraction
/// of the system's line-to-neutral voltage.
pub const TOLERANCE: f64 = 1e-9;

/// Why a solve failed.
#[derive(Clone, Debug, PartialEq)]
pub enum SolveError {
    /// A node has no path to a defined voltage (for example an electronic load alone on an open
    /// neutral at a harmonic frequency).
    Singular,
    /// The load iteration did not settle.
    NoConvergence { iterations: usize },
}

impl std::fmt::Display for SolveError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            SolveError::Singular => f.write_str("the network has a part with no path to the source"),
            SolveError::NoConvergence { iterations } => write!(
                f,
                "the load voltages did not settle after {iterations} iterations; the loads may be more than this service can supply"
            ),
        }
    }
}

impl std::error::Error for SolveError {}

/// One load's result. Currents flow from the load's first node to its second (hot to neutral, or
/// the lower-numbered leg to the higher).
#[derive(Clone, Debug, PartialEq)]
pub struct LoadResult {
    /// Voltage between the load's two panel bars; `None` when one bar floats.
    pub panel_v: Option<Complex64>,
    /// Voltage at the appliance, after its branch conductors; `None` when a bar floats.
    pub terminal_v: Option<Complex64>,
    /// Fundamental current, amperes (zero when off).
    pub current: Complex64,
    /// Root-sum-square of the harmonic currents, amperes.
    pub harmonic_rms: f64,
    pub state: State,
}

impl LoadResult {
    /// Total rms current, fundamental and harmonics: √(|I₁|² + Σ|I_h|²).
    pub fn rms_current(&self) -> f64 {
        (self.current.norm_sqr() + self.harmonic_rms * self.harmonic_rms).sqrt()
    }
}

/// Currents at one harmonic order.
#[derive(Clone, Debug, PartialEq)]
pub struct HarmonicResult {
    pub order: u32,
    pub leg_current: [Complex64; 3],
    pub neutral_current: Complex64,
}

/// The solved network.
#[derive(Clone, Debug, PartialEq)]
pub struct Solution {
    /// Panel bar voltages to the source neutral (L1, L2, L3, N); `None` for a floating bar.
    pub node_v: [Option<Complex64>; MAX_NODES],
    /// Fundamental current in each hot leg, source to panel.
    pub leg_current: [Complex64; 3],
    /// Fundamental current in the service neutral, panel to source (zero when open).
    pub neutral_current: Complex64,
    /// Fundamental current through the earth return when the neutral is open.
    pub earth_current: Complex64,
    pub loads: Vec<LoadResult>,
    pub harmonics: Vec<HarmonicResult>,
    /// True when electronic loads carry harmonics but the neutral is open, so they were not solved.
    pub harmonics_skipped: bool,
    pub iterations: usize,
}

impl Solution {
    /// Voltage of a leg to the panel neutral; `None` when the neutral bar floats.
    pub fn volts_to_neutral(&self, leg_index: usize) -> Option<Complex64> {
        Some(self.node_v[leg_index]? - self.node_v[NEUTRAL_INDEX]?)
    }

    /// Total rms current of a leg including harmonics, amperes.
    pub fn leg_rms(&self, leg_index: usize) -> f64 {
        let h: f64 = self
            .harmonics
            .iter()
            .map(|r| r.leg_current[leg_index].norm_sqr())
            .sum();
        (self.leg_current[leg_index].norm_sqr() + h).sqrt()
    }

    /// Total rms current of the service neutral including harmonics, amperes.
    pub fn neutral_rms(&self) -> f64 {
        let h: f64 = self
            .harmonics
            .iter()
            .map(|r| r.neutral_current.norm_sqr())
            .sum();
        (self.neutral_current.norm_sqr() + h).sqrt()
    }
}

/// A two-terminal admittance or current source between node indices.
struct Element {
    a: usize,
    b: usize,
    y: Complex64,
}

/// A current source drawing `i` out of node `a` and returning it into node `b`.
struct Injection {
    a: usize,
    b: usize,
    i: Complex64,
}

/// Solves the node voltages at harmonic order `h` (1 = fundamental, where the source EMFs act).
fn nodal(
    net: &Network,
    h: u32,
    elements: &[Element],
    injections: &[Injection],
) -> Result<[Option<Complex64>; MAX_NODES], SolveError> {
    let legs = net.leg_count();
    let zero = Complex64::new(0.0, 0.0);
    let mut fixed: [Option<Complex64>; MAX_NODES] = [None; MAX_NODES];
    let mut present = [false; MAX_NODES];
    for p in present.iter_mut().take(legs) {
        *p = true;
    }
    let source_y = match net.source() {
        Source::Stiff => {
            for (k, f) in fixed.iter_mut().enumerate().take(legs) {
                *f = Some(if h == 1 { net.emf()[k] } else { zero });
            }
            None
        }
        Source::Thevenin { .. } if h == 1 => Some(net.source_y1.ok_or(SolveError::Singular)?),
        Source::Thevenin { .. } => Some(net.source_y_at(h).ok_or(SolveError::Singular)?),
    };
    let touches_n = elements
        .iter()
        .any(|e| e.b == NEUTRAL_INDEX || e.a == NEUTRAL_INDEX)
        || injections
            .iter()
            .any(|e| e.b == NEUTRAL_INDEX || e.a == NEUTRAL_INDEX);
    let neutral_y = match net.neutral() {
        NeutralPath::Solid => {
            fixed[NEUTRAL_INDEX] = Some(zero);
            None
        }
        NeutralPath::Conductor(z) => Some(at_harmonic(z, h).inv()),
        NeutralPath::Open { earth_ohms } => earth_ohms.map(|r| Complex64::new(1.0 / r, 0.0)),
    };
    present[NEUTRAL_INDEX] = fixed[NEUTRAL_INDEX].is_some() || neutral_y.is_some() || touches_n;

    let mut y = [[zero; MAX_NODES]; MAX_NODES];
    let mut rhs = [zero; MAX_NODES];
    if let Some(ys) = source_y {
        for i in 0..legs {
            for j in 0..legs {
                y[i][j] += ys[i][j];
                if h == 1 {
                    rhs[i] += ys[i][j] * net.emf()[j];
                }
            }
        }
    }
    if let Some(yn) = neutral_y {
        y[NEUTRAL_INDEX][NEUTRAL_INDEX] += yn;
    }
    for e in elements {
        y[e.a][e.a] += e.y;
        y[e.b][e.b] += e.y;
        y[e.a][e.b] -= e.y;
        y[e.b][e.a] -= e.y;
    }
    for s in injections {
        rhs[s.a] -= s.i;
        rhs[s.b] += s.i;
    }

    let unknown: Vec<usize> = (0..MAX_NODES)
        .filter(|&k| present[k] && fixed[k].is_none())
        .collect();
    let mut a = [[zero; MAX_NODES]; MAX_NODES];
    let mut b = [zero; MAX_NODES];
    for (r, &i) in unknown.iter().enumerate() {
        b[r] = rhs[i];
        for (k, f) in fixed.iter().enumerate() {
            if let Some(v) = f {
                b[r] -= y[i][k] * v;
            }
        }
        for (c, &j) in unknown.iter().enumerate() {
            a[r][c] = y[i][j];
        }
    }
    let x = solve_dense(&mut a, &mut b, unknown.len()).ok_or(SolveError::Singular)?;
    let mut v = fixed;
    for (r, &i) in unknown.iter().enumerate() {
        v[i] = Some(x[r]);
    }
    Ok(v)
}

/// Equivalent admittance of a load admittance `y` in series with its branch loop `zb`:
/// y_eq = y / (1 + zb·y).
fn with_branch(y: Complex64, zb: Complex64) -> Complex64 {
    // Most loads have no branch conductors given; skip the division for them.
    if zb.re == 0.0 && zb.im == 0.0 {
        y
    } else {
        y / (Complex64::new(1.0, 0.0) + zb * y)
    }
}

/// The appliance's own voltage from the voltage across its panel bars: V_t = V / (1 + Z_b·y).
fn at_terminals(vp: Complex64, zb: Complex64, y: Complex64) -> Complex64 {
    if zb.re == 0.0 && zb.im == 0.0 {
        vp
    } else {
        vp / (Complex64::new(1.0, 0.0) + zb * y)
    }
}

fn pair(v: &[Option<Complex64>; MAX_NODES], a: Node, b: Node) -> Option<Complex64> {
    Some(v[a.index()]? - v[b.index()]?)
}

/// Solves a network.
///
/// # Errors
/// [`SolveError::NoConvergence`] when the load iteration does not settle, [`SolveError::Singular`]
/// when part of the network has no path to the source.
///
/// # Example
/// ```
/// use tapline_core::{job::parse_job, validate::validate, network::Network, solve::solve};
/// let job = validate(&parse_job(r#"{"system":{"kind":"split-phase"},
///   "loads":[{"connect":"L1-N","model":"resistive","watts":1440}]}"#).unwrap()).unwrap();
/// let sol = solve(&Network::new(&job)).unwrap();
/// assert!((sol.leg_current[0].norm() - 12.0).abs() < 1e-9); // 1440 W / 120 V on a stiff source
/// ```
pub fn solve(net: &Network) -> Result<Solution, SolveError> {
    solve_with(net, true)
}

/// Solves the fundamental only, leaving `harmonics` empty: for the sweep, which plots voltages.
///
/// # Errors
/// As [`solve`].
pub fn solve_fundamental(net: &Network) -> Result<Solution, SolveError> {
    solve_with(net, false)
}

fn solve_with(net: &Network, harmonics: bool) -> Result<Solution, SolveError> {
    let n = net.loads().len();
    let mut states = vec![State::Running; n];
    let mut y: Vec<Complex64> = net
        .loads()
        .iter()
        .map(|p| p.load.admittance(p.load.rated_v(), State::Running))
        .collect();
    let mut total_iterations = 0;
    // Each pass can only move loads into their low state, so at most n + 1 passes are needed.
    for _ in 0..=n + 1 {
        let (v, iterations) = match iterate(net, &states, &mut y) {
            Ok(done) => done,
            Err(SolveError::NoConvergence { iterations }) => {
                // A constant-power load the service cannot supply has no steady state: its voltage
                // keeps sinking (voltage collapse). Physically the weakest such load stalls or
                // drops out, so move it to its low state and solve again; with none left to move
                // the failure stands.
                total_iterations += iterations;
                if !collapse_weakest(net, &mut states, &mut y) {
                    return Err(SolveError::NoConvergence {
                        iterations: total_iterations,
                    });
                }
                continue;
            }
            Err(e) => return Err(e),
        };
        total_iterations += iterations;
        let mut changed = false;
        for (k, p) in net.loads().iter().enumerate() {
            if !p.load.is_on() || states[k] != State::Running {
                continue;
            }
            let Some(limit) = p.load.low_limit_v() else {
                continue;
            };
            let vt = pair(&v, p.a, p.b).map(|vp| at_terminals(vp, p.branch, y[k]));
            if vt.is_some_and(|vt| vt.norm() < limit * (1.0 - 1e-9)) {
                states[k] = match p.load.model() {
                    Model::Motor => State::Stalled,
                    _ => State::DroppedOut,
                };
                y[k] = p.load.admittance(0.0, states[k]);
                changed = true;
            }
        }
        if !changed {
            return finish(net, &states, &y, v, total_iterations, harmonics);
        }
    }
    Err(SolveError::NoConvergence {
        iterations: total_iterations,
    })
}

/// Moves the running constant-power load with the lowest voltage relative to its rating (as last
/// iterated, `y` holding its admittance) to its low state. Returns false when there is none.
fn collapse_weakest(net: &Network, states: &mut [State], y: &mut [Complex64]) -> bool {
    let weakest = net
        .loads()
        .iter()
        .enumerate()
        .filter(|(k, p)| {
            p.load.is_on() && states[*k] == State::Running && p.load.low_limit_v().is_some()
        })
        .map(|(k, p)| {
            // |V|² = P/G at constant power, so a larger conductance per watt means a lower voltage.
            let rated = p.load.admittance(p.load.rated_v(), State::Running).norm();
            (k, rated / y[k].norm())
        })
        .min_by(|a, b| a.1.total_cmp(&b.1));
    match weakest {
        Some((k, _)) => {
            let p = &net.loads()[k];
            states[k] = match p.load.model() {
                Model::Motor => State::Stalled,
                _ => State::DroppedOut,
            };
            y[k] = p.load.admittance(0.0, states[k]);
            true
        }
        None => false,
    }
}

/// The fixed-point iteration y ← load admittance at the voltage the last solve gave, damped when the
/// change grows.
fn iterate(
    net: &Network,
    states: &[State],
    y: &mut [Complex64],
) -> Result<([Option<Complex64>; MAX_NODES], usize), SolveError> {
    let tol = TOLERANCE * net.system().volts_to_neutral();
    let mut last_vt: Vec<Option<Complex64>> = vec![None; y.len()];
    let mut last_change = f64::INFINITY;
    let mut step = 1.0;
    let nonlinear = net
        .loads()
        .iter()
        .any(|p| p.load.is_on() && p.load.model().is_nonlinear());
    let mut elements: Vec<Element> = Vec::with_capacity(y.len());
    for iteration in 1..=MAX_ITERATIONS {
        elements.clear();
        elements.extend(
            net.loads()
                .iter()
                .zip(y.iter())
                .filter(|(p, _)| p.load.is_on())
                .map(|(p, yk)| Element {
                    a: p.a.index(),
                    b: p.b.index(),
                    y: with_branch(*yk, p.branch),
                }),
        );
        let v = nodal(net, 1, &elements, &[])?;
        if !nonlinear {
            return Ok((v, iteration));
        }
        // Work in squared magnitudes: this loop is the engine's hot path and hypot is slow.
        let mut change_sq: f64 = 0.0;
        for (k, p) in net.loads().iter().enumerate() {
            if !p.load.is_on() || !p.load.model().is_nonlinear() {
                continue;
            }
            let Some(vp) = pair(&v, p.a, p.b) else {
                continue;
            };
            let vt = at_terminals(vp, p.branch, y[k]);
            change_sq = match last_vt[k] {
                Some(prev) => change_sq.max((vt - prev).norm_sqr()),
                None => f64::INFINITY,
            };
            last_vt[k] = Some(vt);
        }
        let change = change_sq.sqrt();
        // Return before updating the admittances, so the voltages handed back are exactly the
        // solution for the admittances handed back, and every current computed from them balances.
        if change <= tol {
            return Ok((v, iteration));
        }
        for (k, p) in net.loads().iter().enumerate() {
            if let (true, true, Some(vt)) =
                (p.load.is_on(), p.load.model().is_nonlinear(), last_vt[k])
            {
                let target = p.characteristic.admittance(vt.norm_sqr().sqrt(), states[k]);
                y[k] += (target - y[k]) * step;
            }
        }
        if change.is_finite() && change > last_change {
            step = (step * 0.5).max(0.05);
        }
        last_change = change;
    }
    Err(SolveError::NoConvergence {
        iterations: MAX_ITERATIONS,
    })
}

/// Currents at the fundamental, then the harmonic solves.
fn finish(
    net: &Network,
    states: &[State],
    y: &[Complex64],
    v: [Option<Complex64>; MAX_NODES],
    iterations: usize,
    harmonics: bool,
) -> Result<Solution, SolveError> {
    let zero = Complex64::new(0.0, 0.0);
    let mut loads = Vec::with_capacity(y.len());
    let mut leg_current = [zero; 3];
    let mut into_neutral = zero;
    for (k, p) in net.loads().iter().enumerate() {
        let panel_v = pair(&v, p.a, p.b);
        let (terminal_v, current) = match (p.load.is_on(), panel_v) {
            (true, Some(vp)) => {
                let i = with_branch(y[k], p.branch) * vp;
                (Some(vp - i * p.branch), i)
            }
            (_, vp) => (vp, zero),
        };
        add_branch_current(&mut leg_current, &mut into_neutral, p.a, p.b, current);
        loads.push(LoadResult {
            panel_v,
            terminal_v,
            current,
            harmonic_rms: 0.0,
            state: if p.load.is_on() {
                states[k]
            } else {
                State::Running
            },
        });
    }
    let (neutral_current, earth_current) = match net.neutral() {
        NeutralPath::Open { .. } => (zero, into_neutral),
        _ => (into_neutral, zero),
    };
    let mut sol = Solution {
        node_v: v,
        leg_current,
        neutral_current,
        earth_current,
        loads,
        harmonics: Vec::new(),
        harmonics_skipped: false,
        iterations,
    };
    if harmonics {
        solve_harmonics(net, states, y, &mut sol)?;
    }
    Ok(sol)
}

fn add_branch_current(
    legs: &mut [Complex64; 3],
    into_neutral: &mut Complex64,
    a: Node,
    b: Node,
    i: Complex64,
) {
    for (node, sign) in [(a, 1.0), (b, -1.0)] {
        match node {
            Node::Hot(l) => legs[l.index()] += i * sign,
            Node::Neutral => *into_neutral -= i * sign,
        }
    }
}

/// Harmonic currents of electronic loads: each running electronic load is a current source of
/// |I_h| = fraction·|I₁| at angle h·∠V (its current pulses sit on the voltage peaks), every other
/// load is its fundamental impedance with reactance scaled by h, and the source EMF is zero.
/// With an open neutral the electronic loads would interact with each other through the floating
/// bar, which this linear model does not capture, so harmonics are skipped there and said so.
fn solve_harmonics(
    net: &Network,
    states: &[State],
    y: &[Complex64],
    sol: &mut Solution,
) -> Result<(), SolveError> {
    let mut orders: Vec<u32> = net
        .loads()
        .iter()
        .zip(states)
        .filter(|(p, s)| {
            p.load.is_on()
                && **s == State::Running
                && matches!(p.load.model(), Model::Electronic { .. })
        })
        .flat_map(|(p, _)| {
            p.load
                .harmonics()
                .iter()
                .filter(|(_, f)| *f > 0.0)
                .map(|(h, _)| *h)
        })
        .collect();
    orders.sort_unstable();
    orders.dedup();
    if orders.is_empty() {
        return Ok(());
    }
    if matches!(net.neutral(), NeutralPath::Open { .. }) {
        sol.harmonics_skipped = true;
        return Ok(());
    }
    let zero = Complex64::new(0.0, 0.0);
    let mut harmonic_sq = vec![0.0; y.len()];
    // Each load's series impedance at the fundamental and its injected current's magnitude and
    // angle, worked out once for all orders.
    let z1: Vec<Complex64> = y.iter().map(|yk| yk.inv()).collect();
    let is_source: Vec<bool> = net
        .loads()
        .iter()
        .zip(states)
        .map(|(p, s)| {
            p.load.is_on()
                && *s == State::Running
                && matches!(p.load.model(), Model::Electronic { .. })
        })
        .collect();
    let mut elements = Vec::with_capacity(y.len());
    let mut injections = Vec::new();
    let mut current_of = vec![zero; y.len()];
    let mut y_h = vec![zero; y.len()];
    for h in orders {
        elements.clear();
        injections.clear();
        for (k, p) in net.loads().iter().enumerate() {
            if !p.load.is_on() {
                continue;
            }
            if is_source[k] {
                let frac: f64 = p
                    .load
                    .harmonics()
                    .iter()
                    .filter(|(o, _)| *o == h)
                    .map(|(_, f)| f)
                    .sum();
                let angle = sol.loads[k].terminal_v.map(|v| v.arg()).unwrap_or(0.0);
                let i =
                    Complex64::from_polar(frac * sol.loads[k].current.norm(), f64::from(h) * angle);
                injections.push(Injection {
                    a: p.a.index(),
                    b: p.b.index(),
                    i,
                });
                current_of[k] = i;
            } else {
                y_h[k] = (at_harmonic(z1[k], h) + at_harmonic(p.branch, h)).inv();
                elements.push(Element {
                    a: p.a.index(),
                    b: p.b.index(),
                    y: y_h[k],
                });
            }
        }
        let v = nodal(net, h, &elements, &injections)?;
        let mut legs = [zero; 3];
        let mut into_neutral = zero;
        for (k, p) in net.loads().iter().enumerate() {
            if !p.load.is_on() {
                continue;
            }
            let i = if is_source[k] {
                current_of[k]
            } else {
                pair(&v, p.a, p.b).map(|vp| vp * y_h[k]).unwrap_or(zero)
            };
            harmonic_sq[k] += i.norm_sqr();
            add_branch_current(&mut legs, &mut into_neutral, p.a, p.b, i);
        }
        sol.harmonics.push(HarmonicResult {
            order: h,
            leg_current: legs,
            neutral_current: into_neutral,
        });
    }
    for (r, sq) in sol.loads.iter_mut().zip(harmonic_sq) {
        r.harmonic_rms = sq.sqrt();
    }
    Ok(())
}
