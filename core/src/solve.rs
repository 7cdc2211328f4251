//! The solver: nodal analysis in complex numbers at the fundamental, with an iteration for
//! voltage-dependent loads, then a linear solve for each harmonic order that electronic loads inject.
//!
//! At each step the node voltages V solve Y·V = I, where Y holds the source admittance
//! Y_s = Z_s⁻¹ on the hot bars, the neutral conductor's and the earth path's admittances from the
//! neutral bar to the reference, each shared neutral between its node and the neutral bar, and
//! each load's admittance (in series with its branch conductors) between its two nodes; I holds
//! the Norton currents Y_s·E of the source and, at harmonic orders, the loads' harmonic currents.
//! Nodes held at a fixed voltage (a stiff source, a neutral of zero impedance) are moved to the
//! right-hand side; nodes with no path to either are floating and have no voltage. A solve either
//! converges or returns a [`SolveError`]; it never returns NaN.

use crate::linalg::{div, inv, solve_in_place};
use crate::loads::{Model, Shape, State};
use crate::network::{at_harmonic, Network, NeutralPath, Node, Source, NEUTRAL_INDEX};
use crate::validated::NeutralState;
use num_complex::Complex64;
use std::cell::Cell;

/// Most fixed-point iterations for one set of load states.
pub const MAX_ITERATIONS: usize = 200;

/// Convergence: the largest change of any load's terminal voltage between iterations, as a fraction
/// of the system's line-to-neutral voltage. One part in ten million is 12 µV on 120 V, four orders
/// of magnitude below the 0.1 V the app shows and a meter resolves; the voltages handed back are
/// still the exact solution for the admittances handed back, so every current balances to
/// rounding whatever this is.
pub const TOLERANCE: f64 = 1e-7;

const ZERO: Complex64 = Complex64::new(0.0, 0.0);

/// |z| as √(re² + im²), for the voltages of a solution on the hot path: validation bounds every
/// voltage far below where the squares could overflow (and one so small that its square
/// underflows is zero volts to any use), so `hypot`'s slower care buys nothing here.
pub fn magnitude(z: Complex64) -> f64 {
    z.norm_sqr().sqrt()
}

/// Why a solve failed.
#[derive(Clone, Debug, PartialEq)]
pub enum SolveError {
    /// A node has no path to a defined voltage.
    Singular,
    /// The load iteration did not settle.
    NoConvergence { iterations: usize },
    /// A figure of the report came out infinite or not a number (named by its path); the report
    /// is withheld rather than shown wrong.
    NotFinite { path: String },
}

impl std::fmt::Display for SolveError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            SolveError::Singular => f.write_str("the network has a part with no path to the source"),
            SolveError::NoConvergence { iterations } => write!(
                f,
                "the load voltages did not settle after {iterations} iterations; the loads may be more than this service can supply"
            ),
            SolveError::NotFinite { path } => write!(
                f,
                "{path} came out infinite or undefined; the inputs are beyond what this engine can compute"
            ),
        }
    }
}

impl std::error::Error for SolveError {}

/// One load's result. Currents flow from the load's first node to its second (hot to neutral, or
/// the lower-numbered leg to the higher).
#[derive(Clone, Debug, PartialEq)]
pub struct LoadResult {
    /// Voltage between the load's two nodes; `None` when one of them floats.
    pub panel_v: Option<Complex64>,
    /// Voltage at the appliance, after its branch conductors; `None` when a node floats.
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

/// Currents and the neutral bar's voltage at one harmonic order.
#[derive(Clone, Debug, PartialEq)]
pub struct HarmonicResult {
    pub order: u32,
    pub leg_current: [Complex64; 3],
    /// In the service neutral conductor, panel to source.
    pub neutral_current: Complex64,
    /// In the earth path, panel to source.
    pub earth_current: Complex64,
    /// The panel neutral bar's voltage to the transformer neutral; `None` when it floats.
    pub neutral_v: Option<Complex64>,
    /// In each shared neutral, from its circuit towards the panel neutral bar.
    pub shared_current: Vec<Complex64>,
}

/// The solved network.
#[derive(Clone, Debug, PartialEq)]
pub struct Solution {
    /// Node voltages to the source neutral (L1, L2, L3, N, then each shared neutral's far end);
    /// `None` for a floating node or an absent leg.
    pub node_v: Vec<Option<Complex64>>,
    /// Fundamental current in each hot leg, source to panel.
    pub leg_current: [Complex64; 3],
    /// Fundamental current in the service neutral conductor, panel to source.
    pub neutral_current: Complex64,
    /// Fundamental current in the earth path, panel to source.
    pub earth_current: Complex64,
    /// Fundamental current in each shared neutral, from its circuit towards the neutral bar.
    pub shared_current: Vec<Complex64>,
    pub loads: Vec<LoadResult>,
    pub harmonics: Vec<HarmonicResult>,
    pub iterations: usize,
}

fn rss(fundamental: Complex64, harmonics: impl Iterator<Item = Complex64>) -> f64 {
    let h: f64 = harmonics.map(|c| c.norm_sqr()).sum();
    (fundamental.norm_sqr() + h).sqrt()
}

impl Solution {
    /// Voltage of a leg to the panel neutral; `None` when the neutral bar floats.
    pub fn volts_to_neutral(&self, leg_index: usize) -> Option<Complex64> {
        Some(self.node_v[leg_index]? - self.node_v[NEUTRAL_INDEX]?)
    }

    /// Total rms current of a leg including harmonics, amperes.
    pub fn leg_rms(&self, leg_index: usize) -> f64 {
        rss(
            self.leg_current[leg_index],
            self.harmonics.iter().map(|r| r.leg_current[leg_index]),
        )
    }

    /// Total rms current of the service neutral conductor including harmonics, amperes.
    pub fn neutral_rms(&self) -> f64 {
        rss(
            self.neutral_current,
            self.harmonics.iter().map(|r| r.neutral_current),
        )
    }

    /// Total rms current of the earth path including harmonics, amperes.
    pub fn earth_rms(&self) -> f64 {
        rss(
            self.earth_current,
            self.harmonics.iter().map(|r| r.earth_current),
        )
    }

    /// Total rms current of shared neutral `k` including harmonics, amperes.
    pub fn shared_rms(&self, k: usize) -> f64 {
        rss(
            self.shared_current[k],
            self.harmonics.iter().map(|r| r.shared_current[k]),
        )
    }

    /// Root-sum-square of the neutral bar's harmonic voltages, volts (`None` when it floats).
    pub fn neutral_harmonic_v(&self) -> Option<f64> {
        let mut sq = 0.0;
        for h in &self.harmonics {
            sq += h.neutral_v?.norm_sqr();
        }
        Some(sq.sqrt())
    }
}

/// Marks a node that stands for the reference (the transformer neutral) in a stamp.
const REFERENCE: usize = usize::MAX;

/// The nodal equations as stamped so far: the admittance matrix (n × n, row-major), the
/// right-hand side, and which nodes an element ties to the reference.
#[derive(Clone, Default)]
struct Stamped {
    y: Vec<Complex64>,
    rhs: Vec<Complex64>,
    grounded: Vec<bool>,
}

impl Stamped {
    /// Becomes the empty equations of an n-node network, keeping its buffers.
    fn clear_to(&mut self, n: usize) {
        self.y.clear();
        self.y.resize(n * n, ZERO);
        self.rhs.clear();
        self.rhs.resize(n, ZERO);
        self.grounded.clear();
        self.grounded.resize(n, false);
    }

    /// Becomes a copy of `other` without allocating.
    fn copy_from(&mut self, other: &Stamped) {
        self.y.copy_from_slice(&other.y);
        self.rhs.copy_from_slice(&other.rhs);
        self.grounded.copy_from_slice(&other.grounded);
    }

    /// Adds admittance `y` between nodes `a` and `b` (`b` may be [`REFERENCE`]).
    #[inline]
    fn admit(&mut self, n: usize, a: usize, b: usize, y: Complex64) {
        stamp(&mut self.y, &mut self.grounded, n, a, b, y);
    }

    /// Adds a current source drawing `i` out of node `a` into node `b`.
    #[inline]
    fn inject(&mut self, a: usize, b: usize, i: Complex64) {
        self.rhs[a] -= i;
        self.rhs[b] += i;
    }
}

/// The part of the nodal equations that does not depend on the loads at one order: the source,
/// the neutral conductor, the earth path and the shared neutrals, and the nodes held fixed.
#[derive(Default)]
struct Base {
    order: u32,
    eq: Stamped,
    fixed: Vec<Option<Complex64>>,
}

/// Adds admittance `y` between nodes `a` and `b` (`b` may be [`REFERENCE`]) of an n-node matrix.
#[inline]
fn stamp(
    y_mat: &mut [Complex64],
    grounded: &mut [bool],
    n: usize,
    a: usize,
    b: usize,
    y: Complex64,
) {
    y_mat[a * n + a] += y;
    if b == REFERENCE {
        grounded[a] = true;
    } else {
        y_mat[b * n + b] += y;
        y_mat[a * n + b] -= y;
        y_mat[b * n + a] -= y;
    }
}

impl Base {
    /// Restamps this base for `net` at order `h`, in place.
    // The admittance matrix is stamped by node index; indices read more clearly than iterators.
    #[allow(clippy::needless_range_loop)]
    fn fill(&mut self, net: &Network, h: u32) -> Result<(), SolveError> {
        let n = net.node_count();
        let legs = net.leg_count();
        let base = self;
        base.order = h;
        base.eq.clear_to(n);
        base.fixed.clear();
        base.fixed.resize(n, None);
        match net.source() {
            Source::Stiff => {
                for k in 0..legs {
                    base.fixed[k] = Some(if h == 1 { net.emf()[k] } else { ZERO });
                }
            }
            Source::Thevenin { .. } => {
                let ys = net.source_y(h).ok_or(SolveError::Singular)?;
                for i in 0..legs {
                    base.eq.grounded[i] = true;
                    for j in 0..legs {
                        base.eq.y[i * n + j] += ys[i][j];
                        if h == 1 {
                            base.eq.rhs[i] += ys[i][j] * net.emf()[j];
                        }
                    }
                }
            }
        }
        let eq = &mut base.eq;
        match net.neutral() {
            NeutralPath::Solid => base.fixed[NEUTRAL_INDEX] = Some(ZERO),
            NeutralPath::Conductor(_) => {
                eq.admit(n, NEUTRAL_INDEX, REFERENCE, neutral_y(net, h));
            }
            NeutralPath::Open => {}
        }
        if net.earth_ohms().is_some() {
            eq.admit(n, NEUTRAL_INDEX, REFERENCE, earth_y(net));
        }
        for (k, s) in net.shared().iter().enumerate() {
            if !s.open && !s.is_solid() {
                let ys = inv(at_harmonic(s.z, h));
                eq.admit(n, Node::Shared(k).index(), NEUTRAL_INDEX, ys);
            }
        }
        Ok(())
    }
}

/// What the load loop reads of each load, in flat arrays: the hot path touches nothing else.
#[derive(Default)]
struct LoadTable {
    /// The load's two node indices (see [`ends`]).
    ends: Vec<(usize, usize)>,
    /// Its branch conductors' impedance at the fundamental (zero when none).
    branch: Vec<Complex64>,
    on: Vec<bool>,
    /// Switched on and of a model whose admittance depends on its voltage (lamp, motor,
    /// electronic supply): its terminal voltage is watched for convergence.
    watched: Vec<bool>,
    /// Whether any load is watched (when none is, one step solves the network).
    any_watched: bool,
    /// Its admittance running at rated voltage, where every solve starts.
    rated_y: Vec<Complex64>,
    /// Which of `places` it sits on.
    place: Vec<usize>,
    /// The pairs of nodes that loads sit between, each once, in order of first use.
    places: Vec<Place>,
}

/// Two nodes that loads sit between, as placed (for the currents to the legs, the neutral bar and
/// the shared neutrals) and as indices (see [`ends`]). Loads on one place carry their currents to
/// the same conductors, so their sum is carried once: a house of forty loads has three places.
#[derive(Clone, Copy)]
struct Place {
    a: Node,
    b: Node,
    ra: usize,
    rb: usize,
}

impl LoadTable {
    /// Becomes the table of `net`'s loads, keeping its buffers.
    fn fill(&mut self, net: &Network) {
        let loads = net.loads();
        self.ends.clear();
        self.ends.extend(loads.iter().map(|p| ends(net, p)));
        self.places.clear();
        self.place.clear();
        for (p, &(ra, rb)) in loads.iter().zip(&self.ends) {
            let found = self.places.iter().position(|s| s.a == p.a && s.b == p.b);
            let at = found.unwrap_or_else(|| {
                self.places.push(Place {
                    a: p.a,
                    b: p.b,
                    ra,
                    rb,
                });
                self.places.len() - 1
            });
            self.place.push(at);
        }
        self.watched.clear();
        self.watched.extend(
            loads
                .iter()
                .map(|p| p.load.is_on() && p.load.model().is_nonlinear()),
        );
        self.any_watched = self.watched.iter().any(|w| *w);
        self.branch.clear();
        self.branch.extend(loads.iter().map(|p| p.branch));
        self.on.clear();
        self.on.extend(loads.iter().map(|p| p.load.is_on()));
        self.rated_y.clear();
        self.rated_y.extend(loads.iter().map(|p| {
            p.characteristic
                .admittance(p.load.rated_v(), State::Running)
        }));
    }
}

/// The solver's buffers. Each solve fills them afresh for its network (see
/// [`Workspace::prepare`]), so that only their allocations carry over from one solve to the next.
#[derive(Default)]
struct Workspace {
    n: usize,
    base: Base,
    /// The base with the loads a pass of the iteration holds constant.
    pass: Stamped,
    /// The equations being solved.
    eq: Stamped,
    /// The equations reduced to the unknown nodes (see [`reduce`]), and the copy being solved.
    a0: Vec<Complex64>,
    b0: Vec<Complex64>,
    a: Vec<Complex64>,
    b: Vec<Complex64>,
    /// The nodes whose voltage is unknown and defined, and each node's place among them.
    unknown: Vec<usize>,
    slot: Vec<Option<usize>>,
    reach: Vec<bool>,
    stack: Vec<usize>,
    /// The node voltages of the last solve.
    v: Vec<Option<Complex64>>,
    table: LoadTable,
    /// The grouping of the loads for the states last iterated, when `grouped`: it belongs to the
    /// network being solved only once [`iterate`] has made it for that network.
    grouping: Grouping,
    grouped: bool,
    scratch: Scratch,
    /// The loads' currents summed by place, in [`finish`].
    at_place: Vec<Complex64>,
    /// The lists of [`solve_harmonics`].
    harmonic: HarmonicLists,
}

impl Workspace {
    /// Makes this workspace `net`'s, with its base at the fundamental. Every buffer is refilled or
    /// emptied here, so nothing of a network solved before is left in it but allocations.
    fn prepare(&mut self, net: &Network) -> Result<(), SolveError> {
        let n = net.node_count();
        self.n = n;
        self.base.fill(net, 1)?;
        self.pass.clear_to(n);
        self.eq.clear_to(n);
        self.a0.clear();
        self.b0.clear();
        self.a.clear();
        self.b.clear();
        self.unknown.clear();
        self.slot.clear();
        self.slot.resize(n, None);
        self.reach.clear();
        self.reach.resize(n, false);
        self.stack.clear();
        self.v.clear();
        self.v.resize(n, None);
        self.table.fill(net);
        self.grouped = false;
        Ok(())
    }
}

thread_local! {
    /// The workspace of this thread's last solve, lent to its next one. A solve of forty loads
    /// makes some thirty buffers, and allocating and freeing them cost a sixth of its
    /// instructions (counted with callgrind); the live what-if solves at every edit, so the
    /// buffers are kept.
    static SPARE: Cell<Option<Box<Workspace>>> = const { Cell::new(None) };
}

/// Borrows the thread's spare workspace (an empty one when another solve holds it, as when a
/// sweep's callback solves) and prepares it for `net`. Hand it back with [`give_back`].
fn borrow_workspace(net: &Network) -> Result<Box<Workspace>, SolveError> {
    let mut ws = SPARE.take().unwrap_or_default();
    match ws.prepare(net) {
        Ok(()) => Ok(ws),
        Err(e) => {
            give_back(ws);
            Err(e)
        }
    }
}

/// Keeps `ws` as the thread's spare workspace, unless it grew for an unusually large network:
/// a house or a panel has a handful of nodes and at most some hundreds of loads, and a workspace
/// grown for thousands of either would hold megabytes on a phone for as long as the app runs.
fn give_back(ws: Box<Workspace>) {
    const KEEP_NODES: usize = 32;
    const KEEP_LOADS: usize = 4096;
    if ws.base.eq.y.capacity() <= KEEP_NODES * KEEP_NODES
        && ws.table.rated_y.capacity() <= KEEP_LOADS
    {
        SPARE.set(Some(ws));
    }
}

/// The neutral conductor's admittance at order `h`, zero when open.
fn neutral_y(net: &Network, h: u32) -> Complex64 {
    match net.neutral() {
        NeutralPath::Conductor(z) => inv(at_harmonic(z, h)),
        _ => ZERO,
    }
}

/// The earth path's admittance (frequency-independent), zero without one.
fn earth_y(net: &Network) -> Complex64 {
    net.earth_ohms()
        .map(|r| Complex64::new(1.0 / r, 0.0))
        .unwrap_or(ZERO)
}

/// Solves the equations stamped in `ws.eq` (at the order of `ws.base`, whose fixed nodes hold)
/// into the node voltages `ws.v`.
fn nodal(ws: &mut Workspace) -> Result<(), SolveError> {
    structure(ws);
    reduce(ws, Equations::Full);
    start_reduced(ws);
    solve_reduced(ws)
}

/// Which of the workspace's equations to reduce.
#[derive(Clone, Copy)]
enum Equations {
    /// `ws.eq`.
    Full,
    /// `ws.pass`, without the loads that vary in the pass.
    Pass,
}

/// Finds from `ws.eq` the nodes whose voltage is unknown and has a value (`ws.unknown`, with
/// each node's place among them in `ws.slot`): a node has a voltage when a chain of elements
/// joins it to the source or the reference.
// The admittance matrix is stamped by node index; indices read more clearly than iterators here.
#[allow(clippy::needless_range_loop)]
fn structure(ws: &mut Workspace) {
    let n = ws.n;
    let fixed = &ws.base.fixed;
    let eq = &ws.eq;
    ws.stack.clear();
    for k in 0..n {
        ws.reach[k] = fixed[k].is_some() || eq.grounded[k];
        if ws.reach[k] {
            ws.stack.push(k);
        }
    }
    while let Some(i) = ws.stack.pop() {
        for j in 0..n {
            if !ws.reach[j] && eq.y[i * n + j] != ZERO {
                ws.reach[j] = true;
                ws.stack.push(j);
            }
        }
    }
    ws.unknown.clear();
    ws.unknown
        .extend((0..n).filter(|&k| ws.reach[k] && fixed[k].is_none()));
    ws.slot.fill(None);
    for (r, &i) in ws.unknown.iter().enumerate() {
        ws.slot[i] = Some(r);
    }
}

/// Restricts `which` equations to the unknown nodes of [`structure`], moving the fixed nodes'
/// voltages to the right-hand side, into `ws.a0` (row-major) and `ws.b0`.
fn reduce(ws: &mut Workspace, which: Equations) {
    let n = ws.n;
    let fixed = &ws.base.fixed;
    let eq = match which {
        Equations::Full => &ws.eq,
        Equations::Pass => &ws.pass,
    };
    ws.a0.clear();
    ws.b0.clear();
    for &i in &ws.unknown {
        let mut r = eq.rhs[i];
        for (k, f) in fixed.iter().enumerate() {
            if let Some(v) = f {
                r -= eq.y[i * n + k] * v;
            }
        }
        ws.b0.push(r);
        for &j in &ws.unknown {
            ws.a0.push(eq.y[i * n + j]);
        }
    }
}

/// Where an admittance between two nodes lands in the reduced equations `ws.a`, `ws.b`, worked
/// out once per pass (see [`landing`]) so that each step of the iteration only adds.
#[derive(Clone, Copy)]
struct Landing {
    /// Entries of `ws.a` that gain the admittance (each unknown end's diagonal).
    gain: [usize; 2],
    /// Entries of `ws.a` that lose it (the off-diagonals between two unknown ends).
    lose: [usize; 2],
    /// Rows of `ws.b` that gain it times a held neighbour's voltage.
    rhs: [(usize, Complex64); 2],
}

/// Marks an unused place in a [`Landing`].
const NOWHERE: usize = usize::MAX;

/// The [`Landing`] of an admittance between nodes `a` and `b` (`b` may be [`REFERENCE`]): each
/// unknown end gains it on its diagonal and loses it towards an unknown other end; a held other
/// end moves its voltage's share to the right-hand side, as [`reduce`] does.
fn landing(ws: &Workspace, a: usize, b: usize) -> Landing {
    let m = ws.unknown.len();
    let slot = |k: usize| if k == REFERENCE { None } else { ws.slot[k] };
    let held = |k: usize| {
        if k == REFERENCE {
            Some(ZERO)
        } else {
            ws.base.fixed[k]
        }
    };
    let mut out = Landing {
        gain: [NOWHERE; 2],
        lose: [NOWHERE; 2],
        rhs: [(NOWHERE, ZERO); 2],
    };
    let (sa, sb) = (slot(a), slot(b));
    let (ha, hb) = (held(a), held(b));
    for (end, (this, other, other_held)) in [(sa, sb, hb), (sb, sa, ha)].into_iter().enumerate() {
        let Some(i) = this else { continue };
        out.gain[end] = i * m + i;
        match (other, other_held) {
            (Some(j), _) => out.lose[end] = i * m + j,
            (None, Some(v)) => out.rhs[end] = (i, v),
            (None, None) => {}
        }
    }
    out
}

/// Adds admittance `y` where `at` says it lands in `ws.a`, `ws.b`.
#[inline]
fn admit_reduced(ws: &mut Workspace, at: &Landing, y: Complex64) {
    for end in 0..2 {
        if at.gain[end] != NOWHERE {
            ws.a[at.gain[end]] += y;
        }
        if at.lose[end] != NOWHERE {
            ws.a[at.lose[end]] -= y;
        }
        let (row, v) = at.rhs[end];
        if row != NOWHERE {
            ws.b[row] += y * v;
        }
    }
}

/// Copies the reduced equations `ws.a0`, `ws.b0` (as [`reduce`] left them) into `ws.a`, `ws.b`,
/// for [`admit_reduced`] to add to and [`solve_reduced`] to solve.
fn start_reduced(ws: &mut Workspace) {
    ws.a.clear();
    ws.a.extend_from_slice(&ws.a0);
    ws.b.clear();
    ws.b.extend_from_slice(&ws.b0);
}

/// Solves `ws.a`·x = `ws.b` (see [`start_reduced`]) into the node voltages `ws.v`.
fn solve_reduced(ws: &mut Workspace) -> Result<(), SolveError> {
    let m = ws.unknown.len();
    solve_in_place(&mut ws.a, &mut ws.b, m).ok_or(SolveError::Singular)?;
    ws.v.copy_from_slice(&ws.base.fixed);
    for (r, &i) in ws.unknown.iter().enumerate() {
        ws.v[i] = Some(ws.b[r]);
    }
    Ok(())
}

/// Equivalent admittance of a load admittance `y` in series with its branch `zb`:
/// y_eq = y / (1 + zb·y).
fn with_branch(y: Complex64, zb: Complex64) -> Complex64 {
    // Most loads have no branch conductors given; skip the division for them.
    if zb == ZERO {
        y
    } else {
        div(y, Complex64::new(1.0, 0.0) + zb * y)
    }
}

/// The appliance's own voltage from the voltage across its two nodes: V_t = V / (1 + Z_b·y).
fn at_terminals(vp: Complex64, zb: Complex64, y: Complex64) -> Complex64 {
    if zb == ZERO {
        vp
    } else {
        div(vp, Complex64::new(1.0, 0.0) + zb * y)
    }
}

fn pair(v: &[Option<Complex64>], a: usize, b: usize) -> Option<Complex64> {
    Some(v[a]? - v[b]?)
}

/// A load's two node indices, with a negligible shared neutral folded into the neutral bar.
fn ends(net: &Network, p: &crate::network::Placed) -> (usize, usize) {
    (net.resolve(p.a).index(), net.resolve(p.b).index())
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

/// How one set of load states failed to settle.
enum Unsettled {
    Singular,
    /// The iteration did not converge; the terminal voltages it last reached.
    Collapse {
        iterations: usize,
        last_vt: Vec<Option<f64>>,
    },
}

/// The low state a constant-power load falls to: a motor stalls, a supply drops out.
fn low_state(model: Model) -> State {
    match model {
        Model::Motor => State::Stalled,
        _ => State::DroppedOut,
    }
}

/// True when a constant-power load's terminal voltage `vt` is below the limit at which it stalls
/// or drops out (a voltage that is not defined, a floating bar, counts as below).
fn below_limit(load: &crate::loads::Load, vt: Option<f64>) -> bool {
    match (vt, load.low_limit_v()) {
        (Some(v), Some(limit)) => v < limit * (1.0 - 1e-9),
        (None, Some(_)) => true,
        _ => false,
    }
}

/// The running load whose demand the supply cannot meet, largest first: among the running
/// constant-power loads below their low limit at `vt` (all of them when none is), the one of
/// largest rated apparent power, ties to the lower voltage. The list's order never decides.
fn gives_way(net: &Network, states: &[State], vt: &[Option<f64>], all: bool) -> Option<usize> {
    let candidates = |only_below: bool| {
        net.loads()
            .iter()
            .enumerate()
            .filter(|(k, p)| {
                p.load.is_on()
                    && net.starting != Some(*k)
                    && states[*k] == State::Running
                    && p.load.low_limit_v().is_some()
            })
            .filter(move |(k, p)| !only_below || below_limit(&p.load, vt[*k]))
            .max_by(|(i, a), (j, b)| {
                let sa = a.load.rated_complex_power().norm();
                let sb = b.load.rated_complex_power().norm();
                sa.total_cmp(&sb).then_with(|| {
                    let vi = vt[*i].unwrap_or(0.0) / a.load.rated_v();
                    let vj = vt[*j].unwrap_or(0.0) / b.load.rated_v();
                    vj.total_cmp(&vi)
                })
            })
            .map(|(k, _)| k)
    };
    candidates(true).or_else(|| if all { candidates(false) } else { None })
}

fn solve_with(net: &Network, harmonics: bool) -> Result<Solution, SolveError> {
    let mut ws = borrow_workspace(net)?;
    let out = solve_in(net, harmonics, &mut ws);
    give_back(ws);
    out
}

/// Solves the fundamental of `net` in each of the neutral `states` in turn (the sweep), handing
/// each solution to `each` with its index. The per-load table and the buffers are built once and
/// reused, since only the neutral changes between states; each state is solved from a cold start
/// exactly as [`solve_fundamental`] solves it alone.
///
/// The admittances are not carried over from the neighbouring state either: where a service has
/// two steady states, a constant-power load can keep running from its neighbour's admittance
/// while from its rated one the supply collapses and it stalls (seen on a wye service with two
/// motors, where the two starts put 203 V and 377 V on the same appliance).
///
/// # Errors
/// The first [`SolveError`] met, or the first error `each` returns.
pub fn solve_fundamental_each<E: From<SolveError>>(
    net: &mut Network,
    states: &[NeutralState],
    mut each: impl FnMut(usize, &Solution) -> Result<(), E>,
) -> Result<(), E> {
    let mut ws = borrow_workspace(net)?;
    let mut all = || {
        for (i, state) in states.iter().enumerate() {
            net.set_neutral(*state);
            ws.base.fill(net, 1)?;
            each(i, &solve_in(net, false, &mut ws)?)?;
        }
        Ok(())
    };
    let out = all();
    give_back(ws);
    out
}

/// [`solve_with`] in a workspace made for `net` whose base is at the fundamental.
fn solve_in(net: &Network, harmonics: bool, ws: &mut Workspace) -> Result<Solution, SolveError> {
    let mut scratch = std::mem::take(&mut ws.scratch);
    let out = solve_in_scratch(net, harmonics, ws, &mut scratch);
    ws.scratch = scratch;
    out
}

/// The per-load lists of [`solve_in`], kept in the workspace so that a sweep's points reuse them.
#[derive(Default)]
struct Scratch {
    states: Vec<State>,
    y: Vec<Complex64>,
    tried: Vec<bool>,
    vt: Vec<Option<f64>>,
}

/// [`solve_in`] with its lists.
fn solve_in_scratch(
    net: &Network,
    harmonics: bool,
    ws: &mut Workspace,
    scratch: &mut Scratch,
) -> Result<Solution, SolveError> {
    let n = net.loads().len();
    let Scratch {
        states,
        y,
        tried,
        vt,
    } = scratch;
    states.clear();
    states.resize(n, State::Running);
    // Every load starts running at its admittance at rated voltage, whatever was solved before:
    // a service can have more than one steady state (which motor stalls), and starting from a
    // neighbouring solution could land in another one than this state solved alone.
    y.clear();
    y.extend_from_slice(&ws.table.rated_y);
    // A motor at the instant of starting is held at locked rotor whatever its voltage.
    if let Some(k) = net.starting {
        states[k] = State::Stalled;
        y[k] = net.loads()[k]
            .characteristic
            .admittance(0.0, State::Stalled);
    }
    let held = |k: usize| net.starting == Some(k);
    // A restart is a trial: when it pulls any running load below its limit (or collapses the
    // supply), the states before it come back and that load stays down. Each load is tried once,
    // so the passes are bounded.
    tried.clear();
    tried.resize(n, false);
    let mut trial: Option<(Vec<State>, Vec<Complex64>)> = None;
    let mut total_iterations = 0;
    for _ in 0..4 * n + 4 {
        let (v, iterations) = match iterate(net, states, y, ws) {
            Ok(done) => done,
            Err(Unsettled::Singular) => return Err(SolveError::Singular),
            Err(Unsettled::Collapse {
                iterations,
                last_vt,
            }) => {
                total_iterations += iterations;
                if let Some((s, yy)) = trial.take() {
                    (*states, *y) = (s, yy);
                    continue;
                }
                // A constant-power load the service cannot supply has no steady state: its voltage
                // keeps sinking (voltage collapse). Physically the largest load whose demand cannot
                // be met stalls or drops out first; solve again without it.
                let Some(k) = gives_way(net, states, &last_vt, true) else {
                    return Err(SolveError::NoConvergence {
                        iterations: total_iterations,
                    });
                };
                states[k] = low_state(net.loads()[k].load.model());
                y[k] = net.loads()[k].characteristic.admittance(0.0, states[k]);
                continue;
            }
        };
        total_iterations += iterations;
        // Only a load with a low limit (a motor, an electronic supply) gives way or restarts, so
        // only its terminal voltage is needed here.
        vt.clear();
        vt.extend(net.loads().iter().enumerate().map(|(k, p)| {
            let (a, b) = ws.table.ends[k];
            p.load.low_limit_v()?;
            pair(&v, a, b).map(|vp| magnitude(at_terminals(vp, p.branch, y[k])))
        }));
        let below: Vec<usize> = net
            .loads()
            .iter()
            .enumerate()
            .filter(|(k, p)| {
                p.load.is_on()
                    && !held(*k)
                    && states[*k] == State::Running
                    // A floating load is not below its limit: it simply gets no voltage.
                    && vt[*k].is_some()
                    && below_limit(&p.load, vt[*k])
            })
            .map(|(k, _)| k)
            .collect();
        if !below.is_empty() {
            if let Some((s, yy)) = trial.take() {
                (*states, *y) = (s, yy);
                continue;
            }
            // Running loads below their limit give way all together (a set, so no order
            // decides); those that can run once the others are gone restart below.
            for k in below {
                states[k] = low_state(net.loads()[k].load.model());
                y[k] = net.loads()[k].characteristic.admittance(0.0, states[k]);
            }
            continue;
        }
        // Here any trial restart has held (its snapshot is replaced or dropped below). A load that
        // gave way restarts when its voltage, with it in its low state, is back above
        // its restart threshold (the hysteresis of [`crate::loads::Load::restart_v`]); the
        // smallest goes first, since it is the one the supply can most likely carry.
        let candidate = net
            .loads()
            .iter()
            .enumerate()
            .filter(|(k, p)| {
                p.load.is_on()
                    && !held(*k)
                    && states[*k] != State::Running
                    && !tried[*k]
                    && matches!((vt[*k], p.load.restart_v()), (Some(v), Some(r)) if v >= r)
            })
            .min_by(|(_, a), (_, b)| {
                a.load
                    .rated_complex_power()
                    .norm()
                    .total_cmp(&b.load.rated_complex_power().norm())
            })
            .map(|(k, _)| k);
        match candidate {
            Some(k) => {
                trial = Some((states.clone(), y.clone()));
                tried[k] = true;
                states[k] = State::Running;
                y[k] = net.loads()[k]
                    .characteristic
                    .admittance(vt[k].unwrap_or(0.0), State::Running);
            }
            None => return finish(net, states, y, v, total_iterations, harmonics, ws),
        }
    }
    Err(SolveError::NoConvergence {
        iterations: total_iterations,
    })
}

/// Loads whose admittance varies with their voltage in the same way on the same two nodes: they
/// see one terminal voltage, so the factor of their [`Shape`] is worked out once for all of them.
/// A load with branch conductors of its own has a terminal voltage of its own and is a group
/// alone.
struct Group {
    a: usize,
    b: usize,
    shape: Shape,
    /// Zero, or the branch impedance of the group's one load.
    branch: Complex64,
    /// The group's loads, as a range of the members list [`groups`] returns.
    members: std::ops::Range<usize>,
    /// The sum of the members' admittances at this step.
    y: Complex64,
    /// The sum of the members' admittances when the pass began, and of their coefficients.
    y_start: Complex64,
    coefficients: Complex64,
    /// Every member's admittance at this step is `kept`·(its admittance when the pass began) +
    /// `taken`·(its coefficient): see [`iterate`].
    kept: f64,
    taken: f64,
    /// The terminal voltage of the last step.
    last_vt: Option<Complex64>,
    /// How much the last step and the one before it moved `taken` (see [`extrapolate`]).
    moved: f64,
    last_moved: f64,
}

/// Gathers the loads whose admittance varies in `states` into [`Group`]s (`out`), with one list
/// of every group's loads and their coefficients (`members`, each group's in load order).
/// `tagged` is a buffer.
fn groups(
    net: &Network,
    table: &LoadTable,
    states: &[State],
    out: &mut Vec<Group>,
    members: &mut Vec<(usize, Complex64)>,
    tagged: &mut Vec<(usize, usize, Complex64)>,
) {
    out.clear();
    tagged.clear();
    for (k, state) in states.iter().enumerate() {
        if !table.watched[k] {
            continue;
        }
        let Some((shape, coefficient)) = net.loads()[k].characteristic.split(*state) else {
            continue;
        };
        let (a, b) = table.ends[k];
        let branch = table.branch[k];
        let joins = (branch == ZERO)
            .then(|| {
                out.iter()
                    .position(|g| g.a == a && g.b == b && g.shape == shape && g.branch == ZERO)
            })
            .flatten();
        let index = joins.unwrap_or_else(|| {
            out.push(Group {
                a,
                b,
                shape,
                branch,
                members: 0..0,
                y: ZERO,
                y_start: ZERO,
                coefficients: ZERO,
                kept: 1.0,
                taken: 0.0,
                last_vt: None,
                moved: 0.0,
                last_moved: 0.0,
            });
            out.len() - 1
        });
        tagged.push((index, k, coefficient));
    }
    // Each group's loads, in load order, side by side: a counting sort by group (the loads
    // arrive in load order), with each group's range end first counting its loads and then
    // serving as the place the next one goes.
    for (g, _, _) in tagged.iter() {
        out[*g].members.end += 1;
    }
    let mut start = 0;
    for g in out.iter_mut() {
        let count = g.members.end;
        g.members = start..start;
        start += count;
    }
    members.clear();
    members.resize(tagged.len(), (0, ZERO));
    for &(g, k, c) in tagged.iter() {
        let group = &mut out[g];
        members[group.members.end] = (k, c);
        group.members.end += 1;
        group.coefficients += c;
    }
}

/// The fixed-point iteration y ← load admittance at the voltage the last solve gave, damped when the
/// change grows.
///
/// The loads whose admittance cannot change in this pass (linear models, and a motor stalled or a
/// supply dropped out, whose admittance is a constant of its state) are stamped once; each step
/// restamps only the others, a [`Group`] at a time.
///
/// A step moves each member k of a group, of coefficient c_k, by the group's one factor f and the
/// damping s: y_k ← y_k + (c_k·f − y_k)·s = (1 − s)·y_k + s·f·c_k. By induction every member stays
/// y_k = kept·y_k,start + taken·c_k with two numbers per group (kept ← (1 − s)·kept, taken ←
/// (1 − s)·taken + s·f), and so does their sum; the members' own admittances are written out
/// once, when the pass ends, instead of at every step. While the steps are undamped (kept = 0)
/// and converge steadily, [`extrapolate`] moves `taken` ahead to where they were heading.
fn iterate(
    net: &Network,
    states: &[State],
    y: &mut [Complex64],
    ws: &mut Workspace,
) -> Result<(Vec<Option<Complex64>>, usize), Unsettled> {
    let tol = TOLERANCE * net.system().volts_to_neutral();
    let nonlinear = ws.table.any_watched;
    // The groups depend only on the load states, which a sweep's points and most passes share.
    let mut grouping = std::mem::take(&mut ws.grouping);
    if !(ws.grouped && grouping.states == states) {
        grouping.fill(net, &ws.table, states);
        ws.grouped = true;
    }
    let out = iterate_grouped(y, ws, &mut grouping, tol, nonlinear);
    ws.grouping = grouping;
    out
}

/// The loads of one set of states sorted for [`iterate`]: its [`Group`]s (reset at each use), the
/// list of their members with each one's coefficient, which loads vary, and the watched loads held
/// constant.
#[derive(Default)]
struct Grouping {
    states: Vec<State>,
    groups: Vec<Group>,
    members: Vec<(usize, Complex64)>,
    varies: Vec<bool>,
    steady: Vec<(usize, Option<Complex64>)>,
    /// Where each group lands in the reduced equations of the pass being solved.
    landings: Vec<Landing>,
    /// A buffer of [`groups`].
    tagged: Vec<(usize, usize, Complex64)>,
}

impl Grouping {
    /// Becomes the grouping of `net`'s loads (as in `table`) in `states`, keeping its buffers.
    fn fill(&mut self, net: &Network, table: &LoadTable, states: &[State]) {
        groups(
            net,
            table,
            states,
            &mut self.groups,
            &mut self.members,
            &mut self.tagged,
        );
        self.varies.clear();
        self.varies.resize(states.len(), false);
        for (k, _) in &self.members {
            self.varies[*k] = true;
        }
        // Watched loads held constant in this pass still count towards convergence.
        self.steady.clear();
        let varies = &self.varies;
        self.steady.extend(
            (0..states.len())
                .filter(|&k| table.watched[k] && !varies[k])
                .map(|k| (k, None)),
        );
        self.states.clear();
        self.states.extend_from_slice(states);
    }
}

/// [`iterate`] with the loads grouped.
fn iterate_grouped(
    y: &mut [Complex64],
    ws: &mut Workspace,
    grouping: &mut Grouping,
    tol: f64,
    nonlinear: bool,
) -> Result<(Vec<Option<Complex64>>, usize), Unsettled> {
    let n = ws.n;
    let mut last_change = f64::INFINITY;
    let mut step: f64 = 1.0;
    // Plain steps since the start or the last extrapolation (see [`extrapolate`]).
    let mut plain = 0;
    let Grouping {
        groups,
        members,
        varies,
        steady,
        landings,
        ..
    } = grouping;
    let members = &*members;
    for g in groups.iter_mut() {
        (g.y, g.y_start, g.kept, g.taken, g.last_vt) = (ZERO, ZERO, 1.0, 0.0, None);
        (g.moved, g.last_moved) = (0.0, 0.0);
    }
    for (_, last) in steady.iter_mut() {
        *last = None;
    }
    ws.pass.copy_from(&ws.base.eq);
    for k in 0..y.len() {
        if ws.table.on[k] && !varies[k] {
            let (a, b) = ws.table.ends[k];
            ws.pass
                .admit(n, a, b, with_branch(y[k], ws.table.branch[k]));
        }
    }
    // Which nodes have a voltage cannot change within the pass (no admittance here is ever
    // exactly zero), so it is found once, and each step restamps only the varying loads into the
    // pass's equations reduced to the unknown nodes.
    ws.eq.copy_from(&ws.pass);
    for g in groups.iter_mut() {
        for (k, _) in &members[g.members.clone()] {
            g.y_start += y[*k];
        }
        ws.eq.admit(n, g.a, g.b, with_branch(g.y_start, g.branch));
    }
    // The members' admittances at the current step (see above).
    let write_out = |groups: &[Group], y: &mut [Complex64]| {
        for g in groups {
            for (k, coefficient) in &members[g.members.clone()] {
                y[*k] = y[*k] * g.kept + coefficient * g.taken;
            }
        }
    };
    structure(ws);
    reduce(ws, Equations::Pass);
    landings.clear();
    landings.extend(groups.iter().map(|g| landing(ws, g.a, g.b)));
    for iteration in 1..=MAX_ITERATIONS {
        start_reduced(ws);
        for (g, at) in groups.iter_mut().zip(landings.iter()) {
            g.y = g.y_start * g.kept + g.coefficients * g.taken;
            admit_reduced(ws, at, with_branch(g.y, g.branch));
        }
        solve_reduced(ws).map_err(|_| Unsettled::Singular)?;
        let v = &ws.v;
        if !nonlinear {
            write_out(groups, y);
            return Ok((v.clone(), iteration));
        }
        // Work in squared magnitudes: this loop is the engine's hot path and hypot is slow.
        let mut change_sq: f64 = 0.0;
        let mut watch = |last: &mut Option<Complex64>, vt: Complex64| {
            change_sq = match *last {
                Some(prev) => change_sq.max((vt - prev).norm_sqr()),
                None => f64::INFINITY,
            };
            *last = Some(vt);
        };
        for g in groups.iter_mut() {
            if let Some(vp) = pair(v, g.a, g.b) {
                watch(&mut g.last_vt, at_terminals(vp, g.branch, g.y));
            }
        }
        for (k, last) in steady.iter_mut() {
            let (a, b) = ws.table.ends[*k];
            if let Some(vp) = pair(v, a, b) {
                watch(last, at_terminals(vp, ws.table.branch[*k], y[*k]));
            }
        }
        let change = change_sq.sqrt();
        // Return before updating the admittances, so the voltages handed back are exactly the
        // solution for the admittances handed back, and every current computed from them balances.
        // A step that follows an extrapolation is not taken as settled: the admittances it
        // solved were extrapolated, not worked out from a solved voltage.
        if change <= tol && plain > 0 {
            write_out(groups, y);
            return Ok((v.clone(), iteration));
        }
        for g in groups.iter_mut() {
            g.last_moved = g.moved;
            if let Some(vt) = g.last_vt {
                // hypot is slow and this is the hot path; the squares stay far from overflow.
                let factor = g.shape.factor(vt.norm_sqr().sqrt());
                g.kept *= 1.0 - step;
                let taken = g.taken * (1.0 - step) + factor * step;
                g.moved = taken - g.taken;
                g.taken = taken;
            } else {
                g.moved = 0.0;
            }
        }
        if change.is_finite() && change > last_change {
            step = (step * 0.5).max(0.05);
        }
        last_change = change;
        plain += 1;
        if step == 1.0 && plain >= 3 && extrapolate(groups) {
            // The jump is not a sign of divergence: the next change is not compared with this one.
            plain = 0;
            last_change = f64::INFINITY;
        }
    }
    write_out(groups, y);
    let mut last_vt: Vec<Option<f64>> = vec![None; y.len()];
    for g in groups.iter() {
        for (k, _) in &members[g.members.clone()] {
            last_vt[*k] = g.last_vt.map(|v| v.norm());
        }
    }
    for (k, last) in steady.iter() {
        last_vt[*k] = last.map(|v| v.norm());
    }
    Err(Unsettled::Collapse {
        iterations: MAX_ITERATIONS,
        last_vt,
    })
}

/// Aitken's extrapolation of the iteration's steady linear convergence, applied to the groups'
/// factors.
///
/// Undamped steps from a cold start converge linearly: near the solution each step's move Δ_k
/// of the vector of the groups' factors is ρ times the last one, Δ_k ≈ ρ·Δ_{k−1}, with ρ the
/// iteration's leading eigenvalue (about 0.45 with the two legs' loads in series behind a neutral
/// of hundreds of ohms, so a plain iteration needs some twenty steps). The remaining moves then sum
/// to Δ_k·ρ/(1 − ρ), and adding them at once is Aitken's Δ² method (A. C. Aitken, 1926; the
/// vector form along the leading direction). It is applied only when the last two moves point the
/// same way (cosine above 0.99) with 0.05 < ρ < 0.8, and when no factor moves by more than a
/// quarter of its value: a converging iteration is only hastened to the point it was approaching
/// (a jump eight times too long, tried once, moved a harmonic test's supply to another steady
/// state). Near voltage collapse, where ρ nears one, or with the steps damped, the iteration is
/// left as it was. Returns whether it extrapolated; each group's `moved` and `last_moved` hold
/// Δ_k and Δ_{k−1} on entry.
fn extrapolate(groups: &mut [Group]) -> bool {
    let (mut dot, mut last_sq, mut this_sq) = (0.0, 0.0, 0.0);
    for g in groups.iter() {
        dot += g.moved * g.last_moved;
        last_sq += g.last_moved * g.last_moved;
        this_sq += g.moved * g.moved;
    }
    if !(last_sq > 0.0 && this_sq > 0.0) {
        return false;
    }
    let rho = dot / last_sq;
    let cosine = dot / (last_sq.sqrt() * this_sq.sqrt());
    if !(cosine > 0.99 && rho > 0.05 && rho < 0.8) {
        return false;
    }
    let ahead = rho / (1.0 - rho);
    // Written so that a NaN anywhere refuses the jump.
    let bounded = groups
        .iter()
        .all(|g| (g.moved * ahead).abs() <= 0.25 * g.taken.abs());
    if !bounded {
        return false;
    }
    for g in groups.iter_mut() {
        g.taken += g.moved * ahead;
    }
    true
}

/// Adds a load's current to the hot legs it touches and to the current arriving at the neutral
/// bar, or at its shared neutral (which carries it on to the bar; see [`shared_into_neutral`]).
/// `a` and `b` are the load's nodes as placed, before a negligible shared neutral is folded away.
fn add_branch_current(
    legs: &mut [Complex64; 3],
    into_neutral: &mut Complex64,
    shared: &mut [Complex64],
    a: Node,
    b: Node,
    i: Complex64,
) {
    for (node, sign) in [(a, 1.0), (b, -1.0)] {
        match node {
            Node::Hot(l) => legs[l.index()] += i * sign,
            Node::Neutral => *into_neutral -= i * sign,
            Node::Shared(k) => shared[k] -= i * sign,
        }
    }
}

/// What the shared neutrals bring to the neutral bar: each one's current, zero for one that is
/// open (its loads are then in series and, by Kirchhoff's current law, sum to nothing).
fn shared_into_neutral(net: &Network, shared: &mut [Complex64]) -> Complex64 {
    let mut total = ZERO;
    for (k, s) in net.shared().iter().enumerate() {
        if s.open {
            shared[k] = ZERO;
        }
        total += shared[k];
    }
    total
}

/// How the current arriving at the neutral bar divides between the neutral conductor and the
/// earth path at order `h`: by their admittances from the bar's voltage, or all in the conductor
/// when the bar is held solid.
fn split_return(
    net: &Network,
    h: u32,
    v_n: Option<Complex64>,
    into_neutral: Complex64,
) -> (Complex64, Complex64) {
    match (net.neutral(), v_n) {
        (NeutralPath::Solid, _) => (into_neutral, ZERO),
        (_, Some(v)) => (v * neutral_y(net, h), v * earth_y(net)),
        (_, None) => (ZERO, ZERO),
    }
}

/// Currents at the fundamental, then the harmonic solves.
fn finish(
    net: &Network,
    states: &[State],
    y: &[Complex64],
    v: Vec<Option<Complex64>>,
    iterations: usize,
    harmonics: bool,
    ws: &mut Workspace,
) -> Result<Solution, SolveError> {
    let mut loads = Vec::with_capacity(y.len());
    let mut leg_current = [ZERO; 3];
    let mut into_neutral = ZERO;
    let mut shared_current = vec![ZERO; net.shared().len()];
    let at_place = &mut ws.at_place;
    at_place.clear();
    at_place.resize(ws.table.places.len(), ZERO);
    for (k, p) in net.loads().iter().enumerate() {
        let (a, b) = ws.table.ends[k];
        let panel_v = pair(&v, a, b);
        let (terminal_v, current) = match (p.load.is_on(), panel_v) {
            (true, Some(vp)) => {
                let i = with_branch(y[k], p.branch) * vp;
                (Some(vp - i * p.branch), i)
            }
            (_, vp) => (vp, ZERO),
        };
        at_place[ws.table.place[k]] += current;
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
    for (place, &i) in ws.table.places.iter().zip(&ws.at_place) {
        add_branch_current(
            &mut leg_current,
            &mut into_neutral,
            &mut shared_current,
            place.a,
            place.b,
            i,
        );
    }
    into_neutral += shared_into_neutral(net, &mut shared_current);
    let (neutral_current, earth_current) = split_return(net, 1, v[NEUTRAL_INDEX], into_neutral);
    let mut sol = Solution {
        node_v: v,
        leg_current,
        neutral_current,
        earth_current,
        shared_current,
        loads,
        harmonics: Vec::new(),
        iterations,
    };
    if harmonics {
        solve_harmonics(net, states, y, &mut sol, ws)?;
    }
    Ok(sol)
}

/// Harmonic currents of electronic loads, each a Norton source: a current source of
/// |I_h| = fraction·|I₁| at angle h·∠V_t (its current pulses sit on the voltage peaks) in parallel
/// with the admittance it presents at its fundamental operating point as a parallel R–L,
/// Y_h = G₁ − j·B₁/h. Into a stiff bus it draws exactly its spectrum; into a weak or open neutral
/// the parallel admittance limits what it can push, as a real supply's input stage does. (The
/// Norton form and its fundamental-frequency admittance are the usual representation of a load in
/// distribution harmonic studies, e.g. OpenDSS's harmonic mode; from memory.) Every other load is
/// its fundamental impedance with reactance scaled by h, and the source EMF is zero. Every order is
/// solved in every neutral state.
///
/// Kept out of line: it runs once a solve, and inlined into the solve it made the fundamental
/// path that every sweep point takes cost more (19.19 against 19.25 million instructions a sweep,
/// 63,800 against 64,200 a solve, by `scripts/instructions.sh`).
#[inline(never)]
fn solve_harmonics(
    net: &Network,
    states: &[State],
    y: &[Complex64],
    sol: &mut Solution,
    ws: &mut Workspace,
) -> Result<(), SolveError> {
    let mut lists = std::mem::take(&mut ws.harmonic);
    let out = solve_harmonics_in(net, states, y, sol, ws, &mut lists);
    ws.harmonic = lists;
    out
}

/// The lists of [`solve_harmonics`], kept in the workspace between solves.
#[derive(Default)]
struct HarmonicLists {
    /// The orders the sources inject, ascending.
    orders: Vec<u32>,
    between: Vec<Between>,
    /// The switched-on loads, passive ones and sources apart, each in load order.
    passive: Vec<Passive>,
    sources: Vec<Injector>,
}

/// [`solve_harmonics`] with its lists.
fn solve_harmonics_in(
    net: &Network,
    states: &[State],
    y: &[Complex64],
    sol: &mut Solution,
    ws: &mut Workspace,
    lists: &mut HarmonicLists,
) -> Result<(), SolveError> {
    let HarmonicLists {
        orders,
        between,
        passive,
        sources,
    } = lists;
    // The switched-on loads, each a source (an electronic load running) or passive.
    passive.clear();
    sources.clear();
    for (k, (yk, r)) in y.iter().zip(&sol.loads).enumerate() {
        if !ws.table.on[k] {
            continue;
        }
        let p = &net.loads()[k];
        let at = ws.table.place[k];
        let is_source =
            states[k] == State::Running && matches!(p.load.model(), Model::Electronic { .. });
        if is_source {
            // The unit phasor of the source's terminal voltage (angle zero when it has none): at
            // order h the source sits at h times that angle, which is the unit phasor's h-th
            // power, a few complex products instead of an arctangent and a sine and cosine per
            // order (the power drifts from unit length by about h·1e-16, far below anything
            // reported).
            let unit = match r.terminal_v.map(|v| (v, magnitude(v))) {
                Some((v, m)) if m > 0.0 => Complex64::new(v.re / m, v.im / m),
                _ => Complex64::new(1.0, 0.0),
            };
            sources.push(Injector {
                k,
                at,
                i1: r.current.norm(),
                unit,
                y1: *yk,
                branch: p.branch,
                y: ZERO,
                injected: ZERO,
                squares: 0.0,
            });
        } else {
            passive.push(Passive {
                k,
                at,
                z1: inv(*yk),
                branch: p.branch,
                y: ZERO,
                squares: 0.0,
            });
        }
    }
    // The orders any source injects, ascending and each once: a service has a handful of distinct
    // orders, so each is placed by a scan rather than by sorting every load's list together.
    orders.clear();
    for e in sources.iter() {
        for (h, f) in net.loads()[e.k].load.harmonics() {
            if *f > 0.0 {
                if let Err(at) = orders.binary_search(h) {
                    orders.insert(at, *h);
                }
            }
        }
    }
    if orders.is_empty() {
        return Ok(());
    }
    // Loads on one place see one voltage, so each order stamps their admittances and sources as
    // one sum and takes their current to the legs once. Each load's own current is still formed,
    // for its harmonic rms, whose squares are summed in the load's entry of the lists (small and
    // side by side, unlike the results) and written to its result at the end.
    between.clear();
    between.extend(ws.table.places.iter().map(|&place| Between {
        place,
        y: ZERO,
        injected: ZERO,
        vp: None,
    }));
    let n = ws.n;
    sol.harmonics.reserve_exact(orders.len());
    for &h in orders.iter() {
        if ws.base.order != h {
            ws.base.fill(net, h)?;
        }
        ws.eq.copy_from(&ws.base.eq);
        let hf = f64::from(h);
        for s in between.iter_mut() {
            s.y = ZERO;
            s.injected = ZERO;
        }
        for e in passive.iter_mut() {
            e.y = inv(at_harmonic(e.z1, h) + at_harmonic(e.branch, h));
            between[e.at].y += e.y;
        }
        for e in sources.iter_mut() {
            let frac: f64 = net.loads()[e.k]
                .load
                .harmonics()
                .iter()
                .filter(|(o, _)| *o == h)
                .map(|(_, f)| f)
                .sum();
            let i_src = e.unit.powu(h) * (frac * e.i1);
            let y_norton = Complex64::new(e.y1.re, e.y1.im / hf);
            let zb = at_harmonic(e.branch, h);
            (e.y, e.injected) = if zb == ZERO {
                (y_norton, i_src)
            } else {
                let through = Complex64::new(1.0, 0.0) + zb * y_norton;
                (div(y_norton, through), div(i_src, through))
            };
            let s = &mut between[e.at];
            s.y += e.y;
            s.injected += e.injected;
        }
        for s in between.iter() {
            let Place { ra, rb, .. } = s.place;
            ws.eq.admit(n, ra, rb, s.y);
            if s.injected != ZERO {
                ws.eq.inject(ra, rb, s.injected);
            }
        }
        nodal(ws)?;
        let v = &ws.v;
        let mut legs = [ZERO; 3];
        let mut into_neutral = ZERO;
        let mut shared = vec![ZERO; net.shared().len()];
        for s in between.iter_mut() {
            let Place { a, b, ra, rb } = s.place;
            s.vp = pair(v, ra, rb);
            let i = s.vp.map(|vp| vp * s.y).unwrap_or(ZERO) + s.injected;
            add_branch_current(&mut legs, &mut into_neutral, &mut shared, a, b, i);
        }
        for e in passive.iter_mut() {
            let through = between[e.at].vp.map(|vp| vp * e.y).unwrap_or(ZERO);
            e.squares += through.norm_sqr();
        }
        for e in sources.iter_mut() {
            let through = between[e.at].vp.map(|vp| vp * e.y).unwrap_or(ZERO);
            e.squares += (through + e.injected).norm_sqr();
        }
        into_neutral += shared_into_neutral(net, &mut shared);
        let (neutral_current, earth_current) = split_return(net, h, v[NEUTRAL_INDEX], into_neutral);
        sol.harmonics.push(HarmonicResult {
            order: h,
            leg_current: legs,
            neutral_current,
            earth_current,
            neutral_v: v[NEUTRAL_INDEX],
            shared_current: shared,
        });
    }
    for (k, squares) in passive
        .iter()
        .map(|e| (e.k, e.squares))
        .chain(sources.iter().map(|e| (e.k, e.squares)))
    {
        sol.loads[k].harmonic_rms = squares.sqrt();
    }
    Ok(())
}

/// The switched-on loads of one [`Place`], in the harmonic solves of [`solve_harmonics`].
struct Between {
    place: Place,
    /// At the order being solved: the sum of the loads' admittances and of their sources'
    /// currents, and the voltage from `a` to `b` (`None` when a node floats).
    y: Complex64,
    injected: Complex64,
    vp: Option<Complex64>,
}

/// A switched-on passive load in the harmonic solves of [`solve_harmonics`]: its fundamental
/// impedance with the reactance scaled by the order, behind its branch conductors alike.
struct Passive {
    /// The load's index, and its [`Place`] (an index of the load table's places).
    k: usize,
    at: usize,
    /// Its series impedance at the fundamental and its branch conductors' loop, ohms.
    z1: Complex64,
    branch: Complex64,
    /// At the order being solved: the admittance it presents with its branch, siemens.
    y: Complex64,
    /// The sum of the squares of its current at the orders solved so far, A².
    squares: f64,
}

/// A running electronic load in the harmonic solves of [`solve_harmonics`]: a Norton source.
struct Injector {
    /// The load's index, and its [`Place`] (an index of the load table's places).
    k: usize,
    at: usize,
    /// Its fundamental current magnitude, amperes, and the unit phasor of its terminal voltage.
    i1: f64,
    unit: Complex64,
    /// Its admittance at the fundamental operating point, siemens, and its branch conductors'
    /// loop, ohms.
    y1: Complex64,
    branch: Complex64,
    /// At the order being solved: the admittance it presents (with its branch) and the current its
    /// source injects.
    y: Complex64,
    injected: Complex64,
    /// The sum of the squares of its current at the orders solved so far, A².
    squares: f64,
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The thread keeps a workspace of a house's size for its next solve, and drops one grown for
    /// more than 32 nodes (each test runs on a thread of its own, so the spare starts empty).
    #[test]
    fn only_a_workspace_of_ordinary_size_is_kept() {
        let mut large = Box::<Workspace>::default();
        large.base.eq.clear_to(33);
        give_back(large);
        assert!(SPARE.take().is_none());
        let mut small = Box::<Workspace>::default();
        small.base.eq.clear_to(3);
        give_back(small);
        assert!(SPARE.take().is_some());
    }
}
