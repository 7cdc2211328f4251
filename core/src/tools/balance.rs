//! Panel balancing: which leg each movable 120 V circuit should be on so the service neutral
//! carries the least current, with every load at its rated current and nominal voltage.
//!
//! A circuit's current on leg k at harmonic order h is I_h·u_k^h, with u_k the leg's unit phasor:
//! at the fundamental I₁ = (P − jQ)/V (its rated current at its power factor); at a harmonic
//! order I_h = fraction·|I₁|, its pulses on the leg's voltage peaks (the engine's Norton source
//! into a stiff bus). The neutral carries the phasor sum at each order (Kirchhoff's current law at
//! the neutral bar; power factor counts; the triplens of a wye's legs are in phase and add
//! whatever the arrangement), and its rms current is √(Σ_h |Σ I_h·u_k^h|²). Line-to-line loads
//! put nothing on the neutral and stay where they are.
//!
//! What moves: a breaker's circuit (the loads given the same `circuit`), or a whole shared-
//! neutral (multiwire) circuit as one handle-tied unit whose hots always stay on different legs
//! (NEC 210.4(B)): its choices are only the arrangements that keep them apart, and one that is on
//! one leg by mistake is always moved apart.
//!
//! The search is exact branch and bound, not a greedy guess. Identical breakers (same currents,
//! same leg now) are one group whose choices are how many go to each leg, so a panel of many
//! alike circuits is not searched once per permutation. A node is pruned when no way of placing
//! the rest could beat the best: a lower bound from projecting each order's partial sum and the
//! rest's reach on twelve directions. A first pass finds the least neutral current L* to within
//! 1e-7 A; a second finds, among every arrangement within [`TOLERANCE_A`] of it, the one with the
//! fewest moves.

use crate::figures::fixed;
use crate::loads::{Connection, Model};
use crate::system::{Leg, System, SystemKind};
use crate::validated::Job;
use num_complex::Complex64;
use serde::Serialize;
use std::collections::BTreeMap;

/// How far from the least neutral current the answer may be, amperes.
pub const TOLERANCE_A: f64 = 0.01;

/// A panel with at most this many arrangements has its least neutral current found exactly
/// (to 1e-9 A), so the fewest moves within [`TOLERANCE_A`] of it are exact too.
const EXACT_ARRANGEMENTS: f64 = 1_048_576.0;

/// Nodes each pass may visit (about a tenth of a second on a phone-class core): a panel harder
/// than that gets the best arrangement found and says how close to the best possible it is proven
/// to be, rather than freezing the phone.
const NODE_BUDGET: u64 = 250_000;

/// Above [`EXACT_ARRANGEMENTS`] the first pass stops at a neutral current this small, or once it
/// has proved the least within this much, amperes; the answer is then within 0.01 A of the least
/// and has the fewest moves of every arrangement within 0.01 − 0.005 A of it.
const LARGE_PANEL_RESOLUTION_A: f64 = 0.005;

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

/// What to balance for.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum Basis {
    /// Every appliance at its rating, switched on or not: the panel is balanced for what it can
    /// draw.
    #[default]
    Rated,
    /// Only the appliances running now.
    RunningNow,
}

/// A breaker circuit: the loads on one hot.
#[derive(Clone, Debug, PartialEq)]
pub struct Circuit {
    pub id: String,
    pub loads: Vec<usize>,
    /// The leg it is on now, when all its loads are line-to-neutral on one leg.
    pub leg: Option<Leg>,
    pub movable: bool,
    /// Its current at each order of [`Panel::orders`], referred to a leg at 0°, amperes.
    pub spectrum: Vec<Complex64>,
    pub slot: Option<u32>,
    /// The shared-neutral circuit it belongs to.
    pub multiwire: Option<String>,
}

/// The panel as the balancer sees it.
#[derive(Clone, Debug, PartialEq)]
pub struct Panel {
    /// Harmonic orders carried, the fundamental first.
    pub orders: Vec<u32>,
    pub circuits: Vec<Circuit>,
}

/// The legs' and neutral's currents for one arrangement.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Currents {
    /// Rms over every order, amperes.
    pub neutral_current_a: f64,
    /// The fundamental alone, amperes.
    pub neutral_fundamental_a: f64,
    pub legs: BTreeMap<String, f64>,
}

/// One circuit to move.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Move {
    pub circuit: String,
    pub from: &'static str,
    pub to: &'static str,
    /// Its breaker position now.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub slot: Option<u32>,
    /// The position it goes to: its partner's in a swap, else the lowest free position on its new
    /// leg in the layout (none when positions are not given or the panel has no free one).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub to_slot: Option<u32>,
    /// The appliances on it.
    pub appliances: Vec<String>,
    /// The shared-neutral circuit it moves with, handle-tied.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub multiwire: Option<String>,
}

/// One step a person can carry out in the panel: two breakers swapped, a breaker moved to a free
/// position, or a handle-tied shared-neutral breaker moved as one.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Swap {
    pub circuits: Vec<String>,
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub slots: Vec<u32>,
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
    /// `rated` (every appliance at its rating) or `running` (only what runs now).
    pub basis: &'static str,
    /// True when a shared-neutral circuit had its hots on one leg and is moved apart: that
    /// correction (NEC 210.4(B)) comes first, even if the service neutral then carries more.
    pub separates_shared_neutral: bool,
    pub within_a: f64,
    pub notes: Vec<String>,
}

/// The harmonic orders any load on the neutral carries, the fundamental first.
fn orders_of(job: &Job) -> Vec<u32> {
    let mut orders = vec![1];
    for load in job.loads() {
        if matches!(load.model(), Model::Electronic { .. })
            && matches!(load.connection(), Connection::ToNeutral(_))
        {
            orders.extend(
                load.harmonics()
                    .iter()
                    .filter(|(_, f)| *f > 0.0)
                    .map(|(h, _)| *h),
            );
        }
    }
    crate::order::sort_by(&mut orders[1..], Ord::cmp);
    orders.dedup();
    orders
}

/// Groups a job's loads into breaker circuits (a load with no `circuit` is its own) with their
/// currents at each order.
pub fn panel(job: &Job, basis: Basis) -> Panel {
    let orders = orders_of(job);
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
        let counted = leg.is_some() && (basis == Basis::Rated || load.is_on());
        // Rated current at rated voltage and power factor: |I| = P/(pf·V_r), lagging by θ.
        let i1 = Complex64::from_polar(load.rated_current(), -load.power_factor().acos());
        let spectrum: Vec<Complex64> = orders
            .iter()
            .map(|&h| match (counted, h) {
                (false, _) => Complex64::new(0.0, 0.0),
                (true, 1) => i1,
                (true, h) if matches!(load.model(), Model::Electronic { .. }) => {
                    let frac: f64 = load
                        .harmonics()
                        .iter()
                        .filter(|(o, _)| *o == h)
                        .map(|(_, f)| f)
                        .sum();
                    Complex64::new(frac * i1.norm(), 0.0)
                }
                _ => Complex64::new(0.0, 0.0),
            })
            .collect();
        match out.iter_mut().find(|c| c.id == id) {
            Some(c) => {
                c.loads.push(i);
                for (a, b) in c.spectrum.iter_mut().zip(&spectrum) {
                    *a += b;
                }
                if c.leg != leg {
                    c.leg = None;
                }
                c.movable &= load.movable() && leg.is_some();
                c.slot = c.slot.or(load.slot());
                if c.multiwire.is_none() {
                    c.multiwire = load.multiwire().map(str::to_string);
                }
            }
            None => out.push(Circuit {
                id,
                loads: vec![i],
                leg,
                movable: load.movable() && leg.is_some(),
                spectrum,
                slot: load.slot(),
                multiwire: load.multiwire().map(str::to_string),
            }),
        }
    }
    for c in out.iter_mut() {
        if c.leg.is_none() {
            c.movable = false;
        }
    }
    Panel {
        orders,
        circuits: out,
    }
}

/// Leg and neutral currents with circuit `k` on `legs[k]`.
fn currents(job: &Job, panel: &Panel, legs: &[Option<Leg>], basis: Basis) -> Currents {
    let sys = job.system();
    let n_orders = panel.orders.len();
    let mut leg_i = vec![[Complex64::new(0.0, 0.0); 3]; n_orders];
    let mut neutral = vec![Complex64::new(0.0, 0.0); n_orders];
    for (c, leg) in panel.circuits.iter().zip(legs) {
        if let Some(l) = leg {
            for (o, &h) in panel.orders.iter().enumerate() {
                let i = c.spectrum[o] * sys.leg_unit(*l).powu(h);
                leg_i[o][l.index()] += i;
                neutral[o] += i;
            }
        }
    }
    for load in job.loads() {
        if let Connection::Across(a, b) = load.connection() {
            if basis == Basis::RunningNow && !load.is_on() {
                continue;
            }
            // Across two legs: I = (P − jQ)/V_r rotated to the line-to-line voltage's angle.
            let vab = sys.leg_unit(a) - sys.leg_unit(b);
            let i = Complex64::from_polar(load.rated_current(), -load.power_factor().acos())
                * (vab / vab.norm());
            leg_i[0][a.index()] += i;
            leg_i[0][b.index()] -= i;
        }
    }
    let rms = |values: &mut dyn Iterator<Item = Complex64>| -> f64 {
        values.map(|c| c.norm_sqr()).sum::<f64>().sqrt()
    };
    Currents {
        neutral_current_a: rms(&mut neutral.iter().copied()),
        neutral_fundamental_a: neutral[0].norm(),
        legs: crate::order::map_of(sys.legs().iter().map(|l| {
            (
                l.name().to_string(),
                rms(&mut leg_i.iter().map(|o| o[l.index()])),
            )
        })),
    }
}

/// Directions the partial sums are projected on for the lower bound.
const DIRECTIONS: usize = 12;

/// Something the search places: one breaker, a handle-tied shared-neutral circuit, or a group of
/// identical breakers on one leg. Each choice adds a contribution (one phasor per order) and costs
/// a number of moves.
struct Item {
    /// The units (circuits of the panel, or for a multiwire unit its hots) this item places.
    members: Vec<usize>,
    choices: Vec<Choice>,
    /// The choice that leaves everything where it is, when that is allowed.
    stay: Option<usize>,
}

#[derive(Clone)]
struct Choice {
    contribution: Vec<Complex64>,
    moves: usize,
    /// The leg index of each member under this choice.
    legs: Vec<usize>,
}

impl Item {
    fn size(&self) -> f64 {
        self.choices
            .iter()
            .map(|c| norm(&c.contribution))
            .fold(0.0, f64::max)
    }
}

fn norm(v: &[Complex64]) -> f64 {
    v.iter().map(|c| c.norm_sqr()).sum::<f64>().sqrt()
}

fn add(a: &[Complex64], b: &[Complex64]) -> Vec<Complex64> {
    a.iter().zip(b).map(|(x, y)| x + y).collect()
}

struct Search {
    items: Vec<Item>,
    dirs: [Complex64; DIRECTIONS],
    /// For each depth, order and direction: the least and greatest projection the remaining
    /// items can add over their choices.
    lo: Vec<Vec<[f64; DIRECTIONS]>>,
    hi: Vec<Vec<[f64; DIRECTIONS]>>,
    /// The remaining items' contribution if none of them moves, per depth (`None` when one of
    /// them must move).
    stay: Vec<Option<Vec<Complex64>>>,
    /// For each depth, the most each remaining move can change the neutral, largest first.
    reach: Vec<Vec<f64>>,
    choice: Vec<usize>,
    best: f64,
    best_choice: Vec<usize>,
    target: f64,
    best_moves: usize,
    /// Nodes visited, for the caller's statistics.
    nodes: u64,
    /// How exactly the first pass finds the least current, amperes.
    resolution: f64,
    /// The partial sum at each depth (the offset at depth 0).
    sums: Vec<Vec<Complex64>>,
    /// Each depth's choices in the order they are tried.
    order: Vec<Vec<(usize, f64)>>,
    /// The node count at which the present search stops exploring.
    budget: u64,
    /// The least lower bound left unexplored by the first pass.
    frontier: f64,
    /// True when a fewest-moves search stopped at its budget before proving its answer.
    exhausted: bool,
}

impl Search {
    /// A lower bound on the final rms neutral current from partial sums `p` at `depth`: for each
    /// order every completion N satisfies d·N ∈ [d·p + lo, d·p + hi] for each unit direction d,
    /// and |N| ≥ |d·N|; the orders add in squares.
    fn bound(&self, depth: usize, p: &[Complex64]) -> f64 {
        let mut sq = 0.0;
        for (o, po) in p.iter().enumerate() {
            let mut b: f64 = 0.0;
            for (k, d) in self.dirs.iter().enumerate() {
                let proj = d.re * po.re + d.im * po.im;
                b = b
                    .max(proj + self.lo[depth][o][k])
                    .max(-(proj + self.hi[depth][o][k]));
            }
            sq += b * b;
        }
        sq.sqrt()
    }

    /// Puts the choices of item `depth` into `self.order[depth]`, nearest to balance first, and,
    /// in `fewest`, staying first (it costs nothing).
    fn order_choices(&mut self, depth: usize, stay_first: bool) {
        let mut buf = std::mem::take(&mut self.order[depth]);
        buf.clear();
        let item = &self.items[depth];
        // Two choices with staying first need no sorting (most breakers on a split-phase panel).
        if let (true, Some(s), 2) = (stay_first, item.stay, item.choices.len()) {
            buf.push((s, 0.0));
            buf.push((1 - s, 0.0));
            self.order[depth] = buf;
            return;
        }
        let p = &self.sums[depth];
        for (k, c) in self.items[depth].choices.iter().enumerate() {
            let sq: f64 = p
                .iter()
                .zip(&c.contribution)
                .map(|(a, b)| (a + b).norm_sqr())
                .sum();
            buf.push((k, sq));
        }
        crate::order::sort_by(&mut buf, |a, b| a.1.total_cmp(&b.1));
        if let (true, Some(s)) = (stay_first, self.items[depth].stay) {
            if let Some(pos) = buf.iter().position(|(k, _)| *k == s) {
                let stay = buf.remove(pos);
                buf.insert(0, stay);
            }
        }
        self.order[depth] = buf;
    }

    /// Sets `self.sums[depth + 1]` to the partial sum with choice `k` of item `depth`.
    fn step(&mut self, depth: usize, k: usize) {
        let (head, tail) = self.sums.split_at_mut(depth + 1);
        let (from, to) = (&head[depth], &mut tail[0]);
        for ((t, f), c) in to
            .iter_mut()
            .zip(from)
            .zip(&self.items[depth].choices[k].contribution)
        {
            *t = f + c;
        }
    }

    /// First pass: the least rms neutral current, to within `resolution`. Past its node budget
    /// it explores no further, but keeps the least lower bound of what it left unexplored, so
    /// the least possible current is still known to be at least `min(best, frontier)`.
    fn least(&mut self, depth: usize) {
        self.nodes += 1;
        let bound = self.bound(depth, &self.sums[depth]);
        if bound >= self.best - self.resolution {
            return;
        }
        if self.nodes > self.budget {
            self.frontier = self.frontier.min(bound);
            return;
        }
        if depth == self.items.len() {
            let n = norm(&self.sums[depth]);
            if n < self.best {
                self.best = n;
                self.best_choice.clone_from(&self.choice);
            }
            return;
        }
        self.order_choices(depth, false);
        for idx in 0..self.order[depth].len() {
            let k = self.order[depth][idx].0;
            self.choice[depth] = k;
            self.step(depth, k);
            self.least(depth + 1);
            if self.best <= self.resolution {
                return;
            }
        }
    }

    /// Second pass: the fewest moves with an rms neutral current ≤ target.
    ///
    /// Besides the bound on the current, a node is pruned by the moves it must still make: leaving
    /// every remaining item where it is gives a gap to the target, and each further move can close
    /// at most its reach (the largest change one move of it makes), so the fewest further moves is
    /// found by a running sum of the largest reaches.
    fn fewest(&mut self, depth: usize, moves: usize) {
        self.nodes += 1;
        if moves >= self.best_moves {
            return;
        }
        if self.nodes > self.budget {
            self.exhausted = true;
            return;
        }
        if let Some(stay) = &self.stay[depth] {
            let sq: f64 = self.sums[depth]
                .iter()
                .zip(stay)
                .map(|(a, b)| (a + b).norm_sqr())
                .sum();
            let gap = sq.sqrt() - self.target;
            if gap <= 0.0 {
                // Leaving the rest where they are already meets the target.
                self.best_moves = moves;
                self.best_choice.clone_from(&self.choice);
                for d in depth..self.items.len() {
                    self.best_choice[d] = self.items[d].stay.unwrap_or(0);
                }
                return;
            }
            let mut needed = 0;
            let mut closed = 0.0;
            for reach in &self.reach[depth] {
                if closed >= gap {
                    break;
                }
                closed += reach;
                needed += 1;
            }
            if closed < gap || moves + needed >= self.best_moves {
                return;
            }
        }
        if depth == self.items.len() || self.bound(depth, &self.sums[depth]) > self.target {
            return;
        }
        self.order_choices(depth, true);
        for idx in 0..self.order[depth].len() {
            let k = self.order[depth][idx].0;
            self.choice[depth] = k;
            self.step(depth, k);
            let m = self.items[depth].choices[k].moves;
            self.fewest(depth + 1, moves + m);
        }
    }
}

/// Every way to put `count` identical breakers on `legs` legs: how many go on each.
fn distributions(count: usize, legs: usize) -> Vec<Vec<usize>> {
    if legs == 1 {
        return vec![vec![count]];
    }
    (0..=count)
        .flat_map(|first| {
            distributions(count - first, legs - 1)
                .into_iter()
                .map(move |mut rest| {
                    rest.insert(0, first);
                    rest
                })
        })
        .collect()
}

/// Every assignment of `hots` hots to distinct legs out of `legs`.
fn injective(hots: usize, legs: usize) -> Vec<Vec<usize>> {
    if hots == 0 {
        return vec![Vec::new()];
    }
    injective(hots - 1, legs)
        .into_iter()
        .flat_map(|prefix| {
            (0..legs)
                .filter(|l| !prefix.contains(l))
                .map(|l| {
                    let mut v = prefix.clone();
                    v.push(l);
                    v
                })
                .collect::<Vec<_>>()
        })
        .collect()
}

/// Finds the arrangement of movable circuits that minimises the neutral current (within
/// [`TOLERANCE_A`]) with the fewest moves, every appliance at its rating, and lists the moves.
pub fn balance(job: &Job, layout: Layout) -> Balance {
    balance_with(job, layout, Basis::Rated)
}

/// [`balance`] for every appliance at its rating, or only for those running now.
pub fn balance_with(job: &Job, layout: Layout, basis: Basis) -> Balance {
    let sys: &System = job.system();
    let legs = sys.legs();
    let panel = panel(job, basis);
    let cs = &panel.circuits;
    let now: Vec<Option<Leg>> = cs.iter().map(|c| c.leg).collect();
    let before = currents(job, &panel, &now, basis);
    let mut notes = Vec::new();
    match basis {
        Basis::Rated => notes.push("Every appliance is counted at its rating, switched on or not: the panel is balanced for what it can draw.".to_string()),
        Basis::RunningNow => notes.push("Only the appliances running now are counted.".to_string()),
    }
    if panel.orders.len() > 1 {
        notes.push("Electronic loads' harmonic currents are counted; on a wye their third harmonics add in the neutral whatever the arrangement.".to_string());
    }
    if sys.kind() == (SystemKind::Wye { phases: 2 }) {
        notes.push("On two phases of a wye the legs are 120° apart, so even equal legs leave current in the neutral.".to_string());
    }
    for c in cs {
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
    let n_orders = panel.orders.len();
    let units: Vec<Complex64> = legs.iter().map(|l| sys.leg_unit(*l)).collect();
    let on_leg = |c: &Circuit, k: usize| -> Vec<Complex64> {
        panel
            .orders
            .iter()
            .enumerate()
            .map(|(o, &h)| c.spectrum[o] * units[k].powu(h))
            .collect()
    };
    let leg_index = |c: &Circuit| c.leg.and_then(|l| legs.iter().position(|x| *x == l));

    // Fixed circuits give a constant offset; shared-neutral circuits move as units; the other
    // movable circuits are grouped when identical.
    let mut offset = vec![Complex64::new(0.0, 0.0); n_orders];
    let mut items: Vec<Item> = Vec::new();
    let mut done = vec![false; cs.len()];
    let mut separates = false;
    for (k, c) in cs.iter().enumerate() {
        if done[k] {
            continue;
        }
        if let Some(id) = &c.multiwire {
            let hots: Vec<usize> = (0..cs.len())
                .filter(|&j| cs[j].multiwire.as_deref() == Some(id.as_str()))
                .collect();
            for &j in &hots {
                done[j] = true;
            }
            let now_legs: Vec<Option<usize>> = hots.iter().map(|&j| leg_index(&cs[j])).collect();
            let movable = hots.iter().all(|&j| cs[j].movable);
            let apart = {
                let mut l: Vec<Option<usize>> = now_legs.clone();
                crate::order::sort_by(&mut l, Ord::cmp);
                l.dedup();
                l.len() == hots.len() && l.iter().all(Option::is_some)
            };
            if !movable || hots.len() > legs.len() || now_legs.iter().any(Option::is_none) {
                if !apart {
                    notes.push(format!("Shared-neutral circuit {id} has hots on the same leg but cannot be moved here: it must be corrected by hand (NEC 210.4(B))."));
                }
                for (&j, l) in hots.iter().zip(&now_legs) {
                    if let Some(l) = l {
                        offset = add(&offset, &on_leg(&cs[j], *l));
                    }
                }
                continue;
            }
            if !apart {
                separates = true;
                notes.push(format!("Shared-neutral circuit {id} has two hots on one leg, so its neutral carries their sum: it is moved so its hots are on different legs (NEC 210.4(B))."));
            }
            let choices: Vec<Choice> = injective(hots.len(), legs.len())
                .into_iter()
                .map(|assign| {
                    let mut contribution = vec![Complex64::new(0.0, 0.0); n_orders];
                    for (&j, &l) in hots.iter().zip(&assign) {
                        contribution = add(&contribution, &on_leg(&cs[j], l));
                    }
                    let changed = assign.iter().zip(&now_legs).any(|(a, b)| Some(*a) != *b);
                    Choice {
                        contribution,
                        moves: usize::from(changed),
                        legs: assign,
                    }
                })
                .collect();
            let stay = apart
                .then(|| choices.iter().position(|c| c.moves == 0))
                .flatten();
            items.push(Item {
                members: hots,
                choices,
                stay,
            });
            continue;
        }
        done[k] = true;
        let Some(now_leg) = leg_index(c) else {
            continue;
        };
        if !c.movable {
            offset = add(&offset, &on_leg(c, now_leg));
            continue;
        }
        // Identical movable breakers on the same leg form one group.
        let mut members = vec![k];
        for (j, d) in cs.iter().enumerate().skip(k + 1) {
            if !done[j]
                && d.movable
                && d.multiwire.is_none()
                && leg_index(d) == Some(now_leg)
                && d.spectrum == c.spectrum
            {
                done[j] = true;
                members.push(j);
            }
        }
        let count = members.len();
        let per_leg: Vec<Vec<Complex64>> = (0..legs.len()).map(|l| on_leg(c, l)).collect();
        let choices: Vec<Choice> = distributions(count, legs.len())
            .into_iter()
            .map(|dist| {
                let mut contribution = vec![Complex64::new(0.0, 0.0); n_orders];
                for (l, &n) in dist.iter().enumerate() {
                    for (a, b) in contribution.iter_mut().zip(&per_leg[l]) {
                        *a += b * n as f64;
                    }
                }
                // The members that stay come first; the rest go to the other legs in order.
                let mut member_legs = vec![now_leg; dist[now_leg]];
                for (l, &n) in dist.iter().enumerate() {
                    if l != now_leg {
                        member_legs.extend(std::iter::repeat_n(l, n));
                    }
                }
                Choice {
                    contribution,
                    moves: count - dist[now_leg],
                    legs: member_legs,
                }
            })
            .collect();
        let stay = choices.iter().position(|c| c.moves == 0);
        items.push(Item {
            members,
            choices,
            stay,
        });
    }
    crate::order::sort_by(&mut items, |a, b| b.size().total_cmp(&a.size()));

    let dirs: [Complex64; DIRECTIONS] = std::array::from_fn(|k| {
        Complex64::from_polar(1.0, std::f64::consts::PI * k as f64 / DIRECTIONS as f64)
    });
    let n = items.len();
    let mut lo = vec![vec![[0.0; DIRECTIONS]; n_orders]; n + 1];
    let mut hi = vec![vec![[0.0; DIRECTIONS]; n_orders]; n + 1];
    let mut stay: Vec<Option<Vec<Complex64>>> = vec![None; n + 1];
    stay[n] = Some(vec![Complex64::new(0.0, 0.0); n_orders]);
    let mut reach: Vec<Vec<f64>> = vec![Vec::new(); n + 1];
    for d in (0..n).rev() {
        for o in 0..n_orders {
            for (k, dir) in dirs.iter().enumerate() {
                let (mn, mx) = items[d].choices.iter().fold(
                    (f64::INFINITY, f64::NEG_INFINITY),
                    |(a, b), c| {
                        let z = c.contribution[o];
                        let x = dir.re * z.re + dir.im * z.im;
                        (a.min(x), b.max(x))
                    },
                );
                lo[d][o][k] = lo[d + 1][o][k] + mn;
                hi[d][o][k] = hi[d + 1][o][k] + mx;
            }
        }
        stay[d] = match (&stay[d + 1], items[d].stay) {
            (Some(rest), Some(s)) => Some(add(rest, &items[d].choices[s].contribution)),
            _ => None,
        };
        // Each move of this item can change the sum by at most its largest change per move.
        let mut r = reach[d + 1].clone();
        if let Some(s) = items[d].stay {
            let base = &items[d].choices[s].contribution;
            let per_move = items[d]
                .choices
                .iter()
                .filter(|c| c.moves > 0)
                .map(|c| {
                    let delta: Vec<Complex64> = c
                        .contribution
                        .iter()
                        .zip(base)
                        .map(|(a, b)| a - b)
                        .collect();
                    norm(&delta) / c.moves as f64
                })
                .fold(0.0, f64::max);
            let most = items[d].choices.iter().map(|c| c.moves).max().unwrap_or(0);
            r.extend(std::iter::repeat_n(per_move, most));
            crate::order::sort_by(&mut r, |a, b| b.total_cmp(a));
        }
        reach[d] = r;
    }
    let start: Vec<usize> = items.iter().map(|i| i.stay.unwrap_or(0)).collect();
    let arrangements: f64 = items.iter().map(|i| i.choices.len() as f64).product();
    let resolution = if arrangements <= EXACT_ARRANGEMENTS {
        1e-9
    } else {
        LARGE_PANEL_RESOLUTION_A
    };
    let mut sums = vec![offset.clone(); n + 1];
    sums[0].clone_from(&offset);
    let mut s = Search {
        budget: NODE_BUDGET,
        frontier: f64::INFINITY,
        exhausted: false,
        resolution,
        sums,
        order: vec![Vec::new(); n + 1],
        items,
        dirs,
        lo,
        hi,
        stay,
        reach,
        choice: start.clone(),
        best: f64::INFINITY,
        best_choice: start,
        target: 0.0,
        best_moves: usize::MAX,
        nodes: 0,
    };
    s.least(0);
    let found = s.best_choice.clone();
    // Every arrangement is at least this far from balance: the best found less the resolution,
    // or what the search left unexplored when it reached its budget.
    let floor = (s.best - s.resolution).min(s.frontier).max(0.0);
    let least_gap = (s.best - floor).max(0.0);
    s.target = floor + TOLERANCE_A;
    let found_moves: usize = found
        .iter()
        .zip(&s.items)
        .map(|(&k, item)| item.choices[k].moves)
        .sum();
    // Iterative deepening on the number of moves: the first budget that meets the target is the
    // fewest, and a tight budget prunes far more than a loose one. Each budget gets its own share
    // of nodes; one that runs out is not proved impossible, so the count is then not proved least.
    s.best_choice = found;
    let mut proved = true;
    let mut spent = 0;
    for budget in 0..found_moves {
        s.best_moves = budget + 1;
        s.nodes = 0;
        s.budget = NODE_BUDGET / 4;
        s.exhausted = false;
        s.fewest(0, 0);
        spent += s.nodes;
        if s.best_moves <= budget {
            break;
        }
        proved &= !s.exhausted;
        if spent > NODE_BUDGET {
            proved = false;
            break;
        }
    }
    if least_gap > TOLERANCE_A / 2.0 {
        notes.push(format!(
            "This panel has more arrangements than the search could finish in time: the answer is proven within {} A of the least neutral current possible.",
            fixed(least_gap + TOLERANCE_A, 2)
        ));
    }
    if !proved {
        notes.push(
            "The search stopped before proving that no arrangement takes fewer moves.".to_string(),
        );
    }
    let mut after_legs = now.clone();
    for (item, &k) in s.items.iter().zip(&s.best_choice) {
        for (&member, &l) in item.members.iter().zip(&item.choices[k].legs) {
            after_legs[member] = Some(legs[l]);
        }
    }
    let after = currents(job, &panel, &after_legs, basis);
    let mut moves: Vec<Move> = cs
        .iter()
        .zip(now.iter().zip(&after_legs))
        .filter(|(_, (a, b))| a != b)
        .map(|(c, (a, b))| Move {
            circuit: c.id.clone(),
            from: a.map(Leg::name).unwrap_or("-"),
            to: b.map(Leg::name).unwrap_or("-"),
            slot: c.slot,
            to_slot: None,
            appliances: c
                .loads
                .iter()
                .map(|&i| job.loads()[i].name().to_string())
                .collect(),
            multiwire: c.multiwire.clone(),
        })
        .collect();
    let mut free = FreePositions::new(job, cs, layout);
    let swaps = pair_swaps(&mut moves, &mut free);
    Balance {
        before,
        after,
        moves,
        swaps,
        layout: layout.describe(),
        basis: match basis {
            Basis::Rated => "rated",
            Basis::RunningNow => "running",
        },
        separates_shared_neutral: separates,
        within_a: TOLERANCE_A.max(least_gap + TOLERANCE_A),
        notes,
    }
}

/// "position 7 (Refrigerator)" or "circuit 7 (Refrigerator)" when no position is given.
fn where_is(m: &Move) -> String {
    let names = m.appliances.join(", ");
    match m.slot {
        Some(s) => format!("position {s} ({names})"),
        None => format!("circuit {} ({names})", m.circuit),
    }
}

/// The breaker positions of a panel not taken by any circuit, for moves to a free position.
struct FreePositions {
    taken: std::collections::BTreeSet<u32>,
    layout: Layout,
    legs: Vec<Leg>,
    /// The highest position considered: a 42-space panel, or the highest one in use.
    last: u32,
}

impl FreePositions {
    fn new(job: &Job, cs: &[Circuit], layout: Layout) -> FreePositions {
        let mut taken = std::collections::BTreeSet::new();
        for c in cs {
            if let Some(p) = c.slot {
                taken.extend(poles(job, c).iter().map(|k| p + 2 * k));
            }
        }
        let last = taken.iter().next_back().copied().unwrap_or(0).max(42);
        FreePositions {
            taken,
            layout,
            legs: job.system().legs().to_vec(),
            last,
        }
    }

    /// The lowest position p with p, p + 2, … free and on `targets` in turn (a handle-tied
    /// breaker takes positions one row apart), marked taken; `None` when there is none.
    fn take(&mut self, targets: &[&'static str]) -> Option<u32> {
        let n = targets.len() as u32;
        let p = (1..=self.last.saturating_sub(2 * (n - 1))).find(|&p| {
            targets.iter().enumerate().all(|(k, t)| {
                let q = p + 2 * k as u32;
                !self.taken.contains(&q) && self.layout.leg_of_slot(q, &self.legs).name() == *t
            })
        })?;
        for k in 0..n {
            self.taken.insert(p + 2 * k);
        }
        Some(p)
    }
}

/// The positions a circuit's breaker takes, as offsets in rows from its first: one pole for a
/// 120 V circuit, two for a 240 V one.
fn poles(job: &Job, c: &Circuit) -> Vec<u32> {
    let two = c
        .loads
        .iter()
        .any(|&i| matches!(job.loads()[i].connection(), Connection::Across(..)));
    if two {
        vec![0, 1]
    } else {
        vec![0]
    }
}

/// Pairs opposite moves into breaker swaps and keeps each shared-neutral circuit's moves together;
/// a move left over goes to a free position on its new leg. Sets each move's `to_slot`.
fn pair_swaps(moves: &mut [Move], free: &mut FreePositions) -> Vec<Swap> {
    let mut used = vec![false; moves.len()];
    let mut out = Vec::new();
    for i in 0..moves.len() {
        if used[i] {
            continue;
        }
        if let Some(id) = moves[i].multiwire.clone() {
            let group: Vec<usize> = (i..moves.len())
                .filter(|&j| !used[j] && moves[j].multiwire.as_deref() == Some(id.as_str()))
                .collect();
            for &j in &group {
                used[j] = true;
            }
            // The handle-tied breaker goes to positions one row apart, its hots on their new legs.
            if group.iter().all(|&j| moves[j].slot.is_some()) {
                let targets: Vec<&'static str> = group.iter().map(|&j| moves[j].to).collect();
                if let Some(p) = free.take(&targets) {
                    for (k, &j) in group.iter().enumerate() {
                        moves[j].to_slot = Some(p + 2 * k as u32);
                    }
                }
            }
            let parts: Vec<String> = group
                .iter()
                .map(|&j| {
                    let to = match moves[j].to_slot {
                        Some(q) => format!("{} at position {q}", moves[j].to),
                        None => moves[j].to.to_string(),
                    };
                    format!("{} from {} to {to}", where_is(&moves[j]), moves[j].from)
                })
                .collect();
            out.push(Swap {
                circuits: group.iter().map(|&j| moves[j].circuit.clone()).collect(),
                slots: group.iter().filter_map(|&j| moves[j].slot).collect(),
                text: format!(
                    "Move shared-neutral circuit {id} as one handle-tied breaker, its hots kept on different legs: {}",
                    parts.join("; ")
                ),
            });
            continue;
        }
        let partner = (i + 1..moves.len()).find(|&j| {
            !used[j]
                && moves[j].multiwire.is_none()
                && moves[j].from == moves[i].to
                && moves[j].to == moves[i].from
        });
        used[i] = true;
        match partner {
            Some(j) => {
                used[j] = true;
                moves[i].to_slot = moves[j].slot;
                moves[j].to_slot = moves[i].slot;
                let (a, b) = (&moves[i], &moves[j]);
                out.push(Swap {
                    circuits: vec![a.circuit.clone(), b.circuit.clone()],
                    slots: a.slot.into_iter().chain(b.slot).collect(),
                    text: format!(
                        "Swap {} on {} with {} on {}",
                        where_is(a),
                        a.from,
                        where_is(b),
                        b.from
                    ),
                });
            }
            None => {
                if moves[i].slot.is_some() {
                    moves[i].to_slot = free.take(&[moves[i].to]);
                }
                let m = &moves[i];
                let to = match m.to_slot {
                    Some(q) => format!("to position {q} on {}", m.to),
                    None => format!("to a free position on {}", m.to),
                };
                out.push(Swap {
                    circuits: vec![m.circuit.clone()],
                    slots: m.slot.into_iter().collect(),
                    text: format!("Move {} from {} {to}", where_is(m), m.from),
                });
            }
        }
    }
    out
}

/// One line of a panel schedule: a breaker position and what is on it.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Row {
    /// The positions its breaker takes (two, a row apart, for a 240 V circuit); empty when the
    /// job does not give one.
    pub positions: Vec<u32>,
    /// Where its appliances are connected: `L1`, or `L1-L2` for a 240 V circuit.
    pub leg: String,
    /// The circuit's id (its `circuit`, else its appliance's name).
    pub circuit: String,
    pub appliances: Vec<String>,
    /// Indices of its loads in the job file's `loads` list.
    pub loads: Vec<usize>,
    /// Rated watts of every appliance on it, switched on or not.
    pub watts: f64,
    /// The shared-neutral circuit it belongs to.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub multiwire: Option<String>,
    /// True when the balancer leaves it where it is (240 V, marked not movable, or mixed legs).
    pub stays: bool,
    /// Set when the layout puts its position on another leg than the job connects it to.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub mismatch: Option<String>,
}

/// The job's panel as a schedule in position order (circuits with no position last, in job
/// order), each line checked against the bus layout.
pub fn schedule(job: &Job, layout: Layout) -> Vec<Row> {
    let panel = panel(job, Basis::Rated);
    let legs = job.system().legs();
    let mut rows: Vec<Row> = panel
        .circuits
        .iter()
        .map(|c| {
            let first = job.loads()[c.loads[0]].connection();
            let offsets = poles(job, c);
            let positions: Vec<u32> = c
                .slot
                .map(|p| offsets.iter().map(|k| p + 2 * k).collect())
                .unwrap_or_default();
            let wanted: Vec<&'static str> = first.legs().iter().map(|l| l.name()).collect();
            let by_layout: Vec<&'static str> = positions
                .iter()
                .map(|&q| layout.leg_of_slot(q, legs).name())
                .collect();
            let mismatch = (!positions.is_empty() && by_layout != wanted).then(|| {
                format!(
                    "position {} is on {} in this layout, but its appliances are connected to {}",
                    positions[0],
                    by_layout.join("-"),
                    wanted.join("-")
                )
            });
            Row {
                positions,
                leg: wanted.join("-"),
                circuit: c.id.clone(),
                appliances: c
                    .loads
                    .iter()
                    .map(|&i| job.loads()[i].name().to_string())
                    .collect(),
                loads: c
                    .loads
                    .iter()
                    .map(|&i| job.loads()[i].file_index())
                    .collect(),
                watts: c.loads.iter().map(|&i| job.loads()[i].rated_w()).sum(),
                multiwire: c.multiwire.clone(),
                stays: !c.movable,
                mismatch,
            }
        })
        .collect();
    crate::order::sort_by_key(&mut rows, |r| {
        r.positions.first().copied().unwrap_or(u32::MAX)
    });
    rows
}

/// Every arrangement a person may make, by brute force (for tests; up to 2ⁿ or 3ⁿ): each movable
/// breaker on any leg, each shared-neutral circuit's hots on any legs that keep them apart.
/// Returns (rms neutral current, moves) for each.
pub fn brute_force(job: &Job, basis: Basis) -> Vec<(f64, usize)> {
    let sys = job.system();
    let legs = sys.legs();
    let panel = panel(job, basis);
    let cs = &panel.circuits;
    // A shared-neutral circuit moves as one: if any of its hots may not move, none does.
    let unit_movable = |k: usize| match &cs[k].multiwire {
        None => cs[k].movable,
        Some(id) => cs
            .iter()
            .filter(|c| c.multiwire.as_deref() == Some(id.as_str()))
            .all(|c| c.movable),
    };
    let movable: Vec<usize> = (0..cs.len()).filter(|&k| unit_movable(k)).collect();
    let mut out = Vec::new();
    let combos = legs.len().pow(movable.len() as u32);
    for code in 0..combos {
        let mut assign: Vec<Option<Leg>> = cs.iter().map(|c| c.leg).collect();
        let mut x = code;
        for &k in &movable {
            assign[k] = Some(legs[x % legs.len()]);
            x /= legs.len();
        }
        // A shared neutral's hots must be on different legs.
        let mut ok = true;
        for a in 0..cs.len() {
            for b in a + 1..cs.len() {
                if cs[a].multiwire.is_some()
                    && cs[a].multiwire == cs[b].multiwire
                    && assign[a] == assign[b]
                {
                    ok = false;
                }
            }
        }
        if !ok {
            continue;
        }
        // A shared-neutral circuit that changes is one move, however many of its hots change.
        let mut moves = 0;
        let mut counted: Vec<&str> = Vec::new();
        for (k, c) in cs.iter().enumerate() {
            if assign[k] != c.leg {
                match &c.multiwire {
                    Some(id) if counted.contains(&id.as_str()) => {}
                    Some(id) => {
                        counted.push(id);
                        moves += 1;
                    }
                    None => moves += 1,
                }
            }
        }
        out.push((
            currents(job, &panel, &assign, basis).neutral_current_a,
            moves,
        ));
    }
    out
}

/// The least neutral current over every arrangement, by brute force (for tests).
pub fn brute_force_least(job: &Job) -> f64 {
    brute_force(job, Basis::Rated)
        .iter()
        .map(|(n, _)| *n)
        .fold(f64::INFINITY, f64::min)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn distributions_and_injections_count_right() {
        // Stars and bars: C(n + k − 1, k − 1); permutations: k!/(k − n)!.
        assert_eq!(distributions(4, 2).len(), 5);
        assert_eq!(distributions(4, 3).len(), 15);
        assert_eq!(injective(2, 2).len(), 2);
        assert_eq!(injective(2, 3).len(), 6);
        assert_eq!(injective(3, 3).len(), 6);
    }
}
