//! Panel balancing: which leg each movable 120 V circuit should be on so the service neutral
//! carries the least current, with every load at its rated current and nominal voltage.
//!
//! A circuit's current on leg k is I = (P − jQ)/V · e^{jφ_k} (its rated current at its power
//! factor, rotated to the leg's phase), and the neutral carries the phasor sum over the line-to-
//! neutral circuits (Kirchhoff's current law at the neutral bar; power factor counts). Line-to-line
//! loads put nothing on the neutral and stay where they are.
//!
//! The search is exact branch and bound, not a greedy guess: circuits in order of falling current,
//! a node pruned when no way of placing the remaining circuits could beat the best by more than
//! the tolerance (a lower bound from projecting the partial sum and the remaining circuits' reach
//! on twelve directions). A first pass finds the least neutral
//! current within τ = 0.005 A; a second finds the fewest moves that stay within another 0.005 A of
//! it, so the answer is within 0.01 A of the best assignment and moves nothing it need not.

use crate::loads::Connection;
use crate::system::{Leg, System, SystemKind};
use crate::validate::Job;
use num_complex::Complex64;
use serde::Serialize;
use std::collections::BTreeMap;

/// How far from the least neutral current the answer may be, amperes (split between the passes).
pub const TOLERANCE_A: f64 = 0.01;

/// Breaker positions to legs.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Layout {
    /// The usual North American bus: positions 1 and 2 (the first row) on L1, 3 and 4 on L2, and
    /// so on alternating row by row (L1, L2, L3 in turn on a three-phase panel).
    Standard,
    /// The same with the legs the other way round.
    Flipped,
}

impl Layout {
    /// The leg of breaker position `slot` (1-based) on a panel with `legs` legs.
    pub fn leg_of_slot(self, slot: u32, legs: &[Leg]) -> Leg {
        let row = (slot.max(1) - 1) / 2;
        let k = (row as usize) % legs.len();
        match self {
            Layout::Standard => legs[k],
            Layout::Flipped => legs[(legs.len() - 1) - k],
        }
    }

    pub fn describe(self) -> &'static str {
        match self {
            Layout::Standard => "positions 1-2 on L1, 3-4 on L2, then alternating by row",
            Layout::Flipped => {
                "flipped: positions 1-2 on L2 (the last leg), then alternating by row"
            }
        }
    }
}

/// A breaker circuit: the loads that move together.
#[derive(Clone, Debug, PartialEq)]
pub struct Circuit {
    pub id: String,
    pub loads: Vec<usize>,
    /// The leg it is on now, when all its loads are line-to-neutral on one leg.
    pub leg: Option<Leg>,
    pub movable: bool,
    /// Rated current referred to a leg at 0°, amperes (P − jQ)/V.
    pub base: Complex64,
    pub slot: Option<u32>,
}

/// The legs' and neutral's currents for one assignment.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Currents {
    pub neutral_current_a: f64,
    pub legs: BTreeMap<String, f64>,
}

/// One circuit to move.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Move {
    pub circuit: String,
    pub from: &'static str,
    pub to: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub slot: Option<u32>,
}

/// Two moves done as one breaker swap.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Swap {
    pub circuits: [String; 2],
    #[serde(skip_serializing_if = "Option::is_none")]
    pub slots: Option<[u32; 2]>,
    pub text: String,
}

/// The result.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Balance {
    pub before: Currents,
    pub after: Currents,
    pub moves: Vec<Move>,
    pub swaps: Vec<Swap>,
    pub layout: &'static str,
    pub within_a: f64,
    pub notes: Vec<String>,
}

/// Groups a job's loads into circuits (a load with no `circuit` is its own).
pub fn circuits(job: &Job) -> Vec<Circuit> {
    let mut out: Vec<Circuit> = Vec::new();
    for (i, load) in job.loads().iter().enumerate() {
        let id = load
            .circuit()
            .map(str::to_string)
            .unwrap_or_else(|| load.name().to_string());
        let leg = match load.connection() {
            Connection::ToNeutral(l) => Some(l),
            Connection::Across(..) => None,
        };
        // Rated current at rated voltage and power factor: |I| = P/(pf·V_r), lagging by θ.
        let base = if leg.is_some() {
            Complex64::from_polar(load.rated_current(), -load.power_factor().acos())
        } else {
            Complex64::new(0.0, 0.0)
        };
        match out.iter_mut().find(|c| c.id == id) {
            Some(c) => {
                c.loads.push(i);
                c.base += base;
                if c.leg != leg {
                    c.leg = None;
                }
                c.movable &= load.movable() && leg.is_some();
                c.slot = c.slot.or(load.slot());
            }
            None => out.push(Circuit {
                id,
                loads: vec![i],
                leg,
                movable: load.movable() && leg.is_some(),
                base,
                slot: load.slot(),
            }),
        }
    }
    for c in out.iter_mut() {
        if c.leg.is_none() {
            c.movable = false;
        }
    }
    out
}

/// Leg and neutral currents with circuit `k` on `legs[k]` (rated currents, nominal voltage).
fn currents(job: &Job, circuits: &[Circuit], legs: &[Option<Leg>]) -> Currents {
    let sys = job.system();
    let mut leg_i = [Complex64::new(0.0, 0.0); 3];
    let mut neutral = Complex64::new(0.0, 0.0);
    for (c, leg) in circuits.iter().zip(legs) {
        if let Some(l) = leg {
            let i = c.base * sys.leg_unit(*l);
            leg_i[l.index()] += i;
            neutral += i;
        }
    }
    for load in job.loads() {
        if let Connection::Across(a, b) = load.connection() {
            // Across two legs: I = (P − jQ)/V_r rotated to the line-to-line voltage's angle.
            let vab = sys.leg_unit(a) - sys.leg_unit(b);
            let i = Complex64::from_polar(load.rated_current(), -load.power_factor().acos())
                * (vab / vab.norm());
            leg_i[a.index()] += i;
            leg_i[b.index()] -= i;
        }
    }
    Currents {
        neutral_current_a: neutral.norm(),
        legs: sys
            .legs()
            .iter()
            .map(|l| (l.name().to_string(), leg_i[l.index()].norm()))
            .collect(),
    }
}

/// Directions the partial sums are projected on for the lower bound.
const DIRECTIONS: usize = 12;

struct Search<'a> {
    items: Vec<(usize, Complex64)>,
    /// For each direction d and depth: the least and greatest sum of d·(i·u) the remaining
    /// circuits can add, over their choices of leg.
    lo: Vec<[f64; DIRECTIONS]>,
    hi: Vec<[f64; DIRECTIONS]>,
    dirs: [Complex64; DIRECTIONS],
    units: Vec<Complex64>,
    legs: &'a [Leg],
    now: Vec<usize>,
    choice: Vec<usize>,
    best: f64,
    best_choice: Vec<usize>,
    target: f64,
    best_moves: usize,
    /// Sum of the remaining circuits' contributions if none of them moves, per depth.
    stay: Vec<Complex64>,
    /// The most that moving each circuit can change the neutral current, amperes.
    reach: Vec<f64>,
}

impl Search<'_> {
    /// A lower bound on the final |neutral| from a partial sum `p` at `depth`: every completion
    /// N satisfies d·N ∈ [d·p + lo, d·p + hi] for each unit direction d, and |N| ≥ |d·N|. With
    /// twelve directions this follows the shape of the reachable set far more tightly than
    /// |p| − Σ|i|.
    fn bound(&self, depth: usize, p: Complex64) -> f64 {
        let mut b: f64 = 0.0;
        for (k, d) in self.dirs.iter().enumerate() {
            let proj = d.re * p.re + d.im * p.im;
            b = b
                .max(proj + self.lo[depth][k])
                .max(-(proj + self.hi[depth][k]));
        }
        b
    }

    /// The legs to try for a circuit of current `i` after partial sum `p`, nearest to balance
    /// first, leaving out `skip`; a fixed array so the search allocates nothing per node.
    fn ordered(&self, p: Complex64, i: Complex64, skip: Option<usize>) -> ([usize; 3], usize) {
        let mut order = [0usize; 3];
        let mut count = 0;
        for k in 0..self.legs.len() {
            if Some(k) != skip {
                order[count] = k;
                count += 1;
            }
        }
        order[..count].sort_unstable_by(|&a, &b| {
            (p + i * self.units[a])
                .norm_sqr()
                .total_cmp(&(p + i * self.units[b]).norm_sqr())
        });
        (order, count)
    }

    /// First pass: the least |neutral| within τ/2.
    fn least(&mut self, depth: usize, p: Complex64) {
        let tau = TOLERANCE_A / 2.0;
        if self.bound(depth, p) >= self.best - tau {
            return;
        }
        if depth == self.items.len() {
            // The projection bound can sit slightly under |p|; keep only a true improvement.
            if p.norm() < self.best {
                self.best = p.norm();
                self.best_choice.clone_from(&self.choice);
            }
            return;
        }
        let i = self.items[depth].1;
        let (order, count) = self.ordered(p, i, None);
        for &k in &order[..count] {
            self.choice[depth] = k;
            self.least(depth + 1, p + i * self.units[k]);
            if self.best <= tau {
                return;
            }
        }
    }

    /// Second pass: the fewest moves with |neutral| ≤ target.
    ///
    /// Besides the bound on |neutral|, a node is pruned by the moves it must still make: leaving
    /// every remaining circuit where it is gives a gap to the target, and moving circuit c can
    /// close at most |i_c|·max|u − u_now| of it (2|i_c| on split-phase, √3·|i_c| on a wye); the
    /// circuits come largest first, so the fewest further moves is found by a running sum.
    fn fewest(&mut self, depth: usize, p: Complex64, moves: usize) {
        if moves >= self.best_moves {
            return;
        }
        let gap = (p + self.stay[depth]).norm_sqr().sqrt() - self.target;
        if gap <= 0.0 {
            // Leaving the rest where they are already meets the target with `moves` moves.
            self.best_moves = moves;
            self.best_choice.clone_from(&self.choice);
            for d in depth..self.items.len() {
                self.best_choice[d] = self.now[d];
            }
            return;
        }
        let mut needed = 0;
        let mut closed = 0.0;
        for reach in &self.reach[depth..] {
            if closed >= gap {
                break;
            }
            closed += reach;
            needed += 1;
        }
        // The cheap count above prunes most nodes; the projection bound catches the rest.
        if closed < gap
            || moves + needed >= self.best_moves
            || depth == self.items.len()
            || self.bound(depth, p) > self.target
        {
            return;
        }
        let i = self.items[depth].1;
        let stay = self.now[depth];
        self.choice[depth] = stay;
        self.fewest(depth + 1, p + i * self.units[stay], moves);
        let (order, count) = self.ordered(p, i, Some(stay));
        for &k in &order[..count] {
            self.choice[depth] = k;
            self.fewest(depth + 1, p + i * self.units[k], moves + 1);
        }
    }
}

/// Finds the assignment of movable circuits that minimises the neutral current (within
/// [`TOLERANCE_A`]) with the fewest moves, and lists the moves as breaker swaps.
pub fn balance(job: &Job, layout: Layout) -> Balance {
    let sys: &System = job.system();
    let legs = sys.legs();
    let cs = circuits(job);
    let now: Vec<Option<Leg>> = cs.iter().map(|c| c.leg).collect();
    let before = currents(job, &cs, &now);
    let mut notes = Vec::new();
    if sys.kind() == (SystemKind::Wye { phases: 2 }) {
        notes.push("On two phases of a wye the legs are 120° apart, so even equal legs leave current in the neutral.".to_string());
    }
    for c in &cs {
        if let (Some(slot), Some(leg)) = (c.slot, c.leg) {
            let by_slot = layout.leg_of_slot(slot, legs);
            if by_slot != leg {
                notes.push(format!(
                    "Circuit {} is in position {slot}, which is on {} in the assumed layout, but the job puts it on {}; check the layout or the job.",
                    c.id,
                    by_slot.name(),
                    leg.name()
                ));
            }
        }
    }
    // Fixed circuits give a constant offset; movable ones are searched, largest first.
    let mut offset = Complex64::new(0.0, 0.0);
    let mut items: Vec<(usize, Complex64)> = Vec::new();
    for (k, c) in cs.iter().enumerate() {
        match (c.movable, c.leg) {
            (true, Some(_)) => items.push((k, c.base)),
            (false, Some(l)) => offset += c.base * sys.leg_unit(l),
            _ => {}
        }
    }
    items.sort_by(|a, b| b.1.norm().total_cmp(&a.1.norm()));
    let units: Vec<Complex64> = legs.iter().map(|l| sys.leg_unit(*l)).collect();
    let dirs: [Complex64; DIRECTIONS] = std::array::from_fn(|k| {
        Complex64::from_polar(1.0, std::f64::consts::PI * k as f64 / DIRECTIONS as f64)
    });
    let n = items.len();
    let mut lo = vec![[0.0; DIRECTIONS]; n + 1];
    let mut hi = vec![[0.0; DIRECTIONS]; n + 1];
    for d in (0..n).rev() {
        for (k, dir) in dirs.iter().enumerate() {
            let projections = units.iter().map(|u| {
                let z = items[d].1 * u;
                dir.re * z.re + dir.im * z.im
            });
            let (mn, mx) = projections.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), x| {
                (a.min(x), b.max(x))
            });
            lo[d][k] = lo[d + 1][k] + mn;
            hi[d][k] = hi[d + 1][k] + mx;
        }
    }
    let now_idx: Vec<usize> = items
        .iter()
        .map(|(k, _)| {
            legs.iter()
                .position(|l| Some(*l) == cs[*k].leg)
                .unwrap_or(0)
        })
        .collect();
    let mut stay = vec![Complex64::new(0.0, 0.0); n + 1];
    for d in (0..n).rev() {
        stay[d] = stay[d + 1] + items[d].1 * units[now_idx[d]];
    }
    let reach: Vec<f64> = (0..n)
        .map(|d| {
            let u_now = units[now_idx[d]];
            items[d].1.norm() * units.iter().map(|u| (u - u_now).norm()).fold(0.0, f64::max)
        })
        .collect();
    let mut s = Search {
        stay,
        reach,
        lo,
        hi,
        dirs,
        units,
        legs,
        choice: now_idx.clone(),
        best: before.neutral_current_a + TOLERANCE_A,
        best_choice: now_idx.clone(),
        now: now_idx.clone(),
        target: 0.0,
        best_moves: usize::MAX,
        items,
    };
    s.least(0, offset);
    let found = s.best_choice.clone();
    // The first pass proves the best is at least (its result − τ/2), so anything within τ of that
    // lower bound is within τ of the best.
    s.target = (s.best.min(before.neutral_current_a) - TOLERANCE_A / 2.0).max(0.0) + TOLERANCE_A;
    s.best_moves = found.iter().zip(&now_idx).filter(|(a, b)| a != b).count() + 1;
    s.best_choice = found;
    s.fewest(0, offset, 0);
    let mut after_legs = now.clone();
    for (d, (k, _)) in s.items.iter().enumerate() {
        after_legs[*k] = Some(legs[s.best_choice[d]]);
    }
    let after = currents(job, &cs, &after_legs);
    let moves: Vec<Move> = cs
        .iter()
        .zip(now.iter().zip(&after_legs))
        .filter(|(_, (a, b))| a != b)
        .map(|(c, (a, b))| Move {
            circuit: c.id.clone(),
            from: a.map(Leg::name).unwrap_or("-"),
            to: b.map(Leg::name).unwrap_or("-"),
            slot: c.slot,
        })
        .collect();
    let swaps = pair_swaps(&moves);
    Balance {
        before,
        after,
        moves,
        swaps,
        layout: layout.describe(),
        within_a: TOLERANCE_A,
        notes,
    }
}

/// Pairs opposite moves into breaker swaps; a move left over is said as a move to a free space.
fn pair_swaps(moves: &[Move]) -> Vec<Swap> {
    let mut used = vec![false; moves.len()];
    let mut out = Vec::new();
    for i in 0..moves.len() {
        if used[i] {
            continue;
        }
        let partner = (i + 1..moves.len())
            .find(|&j| !used[j] && moves[j].from == moves[i].to && moves[j].to == moves[i].from);
        used[i] = true;
        match partner {
            Some(j) => {
                used[j] = true;
                let (a, b) = (&moves[i], &moves[j]);
                let slots = a.slot.zip(b.slot).map(|(x, y)| [x, y]);
                let at = |m: &Move| {
                    m.slot
                        .map(|s| format!(" (position {s})"))
                        .unwrap_or_default()
                };
                out.push(Swap {
                    circuits: [a.circuit.clone(), b.circuit.clone()],
                    slots,
                    text: format!(
                        "Swap circuit {}{} on {} with circuit {}{} on {}",
                        a.circuit,
                        at(a),
                        a.from,
                        b.circuit,
                        at(b),
                        b.from
                    ),
                });
            }
            None => {
                let m = &moves[i];
                out.push(Swap {
                    circuits: [m.circuit.clone(), String::new()],
                    slots: None,
                    text: format!(
                        "Move circuit {} from {} to a free position on {}",
                        m.circuit, m.from, m.to
                    ),
                });
            }
        }
    }
    out
}

/// The least neutral current over every assignment, by brute force (for tests; 2ⁿ or 3ⁿ).
pub fn brute_force_least(job: &Job) -> f64 {
    let sys = job.system();
    let legs = sys.legs();
    let cs = circuits(job);
    let movable: Vec<usize> = (0..cs.len()).filter(|&k| cs[k].movable).collect();
    let mut best = f64::INFINITY;
    let combos = legs.len().pow(movable.len() as u32);
    for code in 0..combos {
        let mut assign: Vec<Option<Leg>> = cs.iter().map(|c| c.leg).collect();
        let mut x = code;
        for &k in &movable {
            assign[k] = Some(legs[x % legs.len()]);
            x /= legs.len();
        }
        best = best.min(currents(job, &cs, &assign).neutral_current_a);
    }
    best
}
