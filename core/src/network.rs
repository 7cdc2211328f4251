//! The network: a validated job turned into the circuit the solver works on.
//!
//! Nodes are the panel's hot bars (L1, L2, L3), the panel neutral bar (N) and the far end of each
//! shared-neutral (multiwire) circuit's neutral. The reference node (0 V) is the transformer's
//! neutral terminal, the center tap of a split-phase winding or the star point of a wye. Each hot
//! bar is fed from an ideal source E (the open-circuit secondary voltage) through the source
//! impedance matrix Z_s, which holds the transformer's impedance and the service hot conductors.
//! The panel neutral bar returns to the reference through two paths in parallel: the service
//! neutral conductor (plus any loose-connection resistance, or nothing when it is open) and the
//! earth path (grounding electrode, bonded water pipe) when the job gives one. A shared neutral is
//! a branch of its own from its circuit's node to the neutral bar. Loads sit between two nodes; a
//! load's own branch conductors are in series with it.

use crate::linalg::{invert3, SOLID_OHMS};
use crate::loads::{Characteristic, Connection, Load};
use crate::system::{Leg, System};
use crate::validated::{Job, NeutralState};
use num_complex::Complex64;

/// A node of the network.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Node {
    Hot(Leg),
    /// The panel neutral bar.
    Neutral,
    /// The far end of shared-neutral circuit `k` (in the job's `multiwire` order).
    Shared(usize),
}

/// Index of the panel neutral in node arrays (legs use 0..=2).
pub const NEUTRAL_INDEX: usize = 3;

/// Nodes before the shared-neutral nodes: L1, L2, L3 and N.
pub const PANEL_NODES: usize = 4;

impl Node {
    /// Index into node arrays: L1 0, L2 1, L3 2, N 3, shared neutral k at 4 + k.
    pub fn index(self) -> usize {
        match self {
            Node::Hot(l) => l.index(),
            Node::Neutral => NEUTRAL_INDEX,
            Node::Shared(k) => PANEL_NODES + k,
        }
    }
}

/// How the hot bars are fed.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Source {
    /// No impedance at all: the hot bars are held at the source voltages.
    Stiff,
    /// Through the impedance matrix `z` (ohms at the fundamental); see
    /// [`crate::transformer::Transformer::source_matrix`].
    Thevenin { z: [[Complex64; 3]; 3] },
}

/// The service neutral conductor's path from the panel neutral bar to the reference.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum NeutralPath {
    /// No impedance: the panel neutral is the reference.
    Solid,
    /// Through the service neutral (plus a loose connection): ohms at the fundamental.
    Conductor(Complex64),
    /// The conductor is broken.
    Open,
}

/// A shared neutral conductor of a multiwire branch circuit.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SharedNeutral {
    /// One-way impedance of the shared neutral conductor, ohms at the fundamental.
    pub z: Complex64,
    /// True when the shared neutral is broken (the "if it opens" case).
    pub open: bool,
}

impl SharedNeutral {
    /// True when the conductor is so short that its far end is the panel neutral bar itself.
    pub fn is_solid(&self) -> bool {
        !self.open && self.z.norm() < SOLID_OHMS
    }
}

/// A load placed in the network.
#[derive(Clone, Debug, PartialEq)]
pub struct Placed {
    pub load: Load,
    pub a: Node,
    pub b: Node,
    /// Impedance of the branch conductors in series with the load, ohms (zero without one): the
    /// loop of an ordinary circuit, the hot alone of a shared-neutral circuit's load.
    pub branch: Complex64,
    /// The load's characteristic with its constants precomputed.
    pub characteristic: Characteristic,
}

/// The circuit to solve. Built only from a validated [`Job`], so it is always well formed.
#[derive(Clone, Debug, PartialEq)]
pub struct Network {
    pub(crate) system: System,
    pub(crate) emf: [Complex64; 3],
    pub(crate) source: Source,
    /// Z_s⁻¹ at the fundamental, worked out once (`None` when stiff or singular).
    pub(crate) source_y1: Option<[[Complex64; 3]; 3]>,
    /// Z_s⁻¹ at every harmonic order a load injects, worked out once: every neutral state and
    /// every solve of this network uses the same.
    pub(crate) source_yh: Vec<(u32, Option<[[Complex64; 3]; 3]>)>,
    pub(crate) neutral: NeutralPath,
    /// The earth path's resistance beside the neutral conductor, ohms.
    pub(crate) earth_ohms: Option<f64>,
    pub(crate) service_hot: Complex64,
    pub(crate) service_neutral: Complex64,
    pub(crate) shared: Vec<SharedNeutral>,
    pub(crate) loads: Vec<Placed>,
    /// The motor held at locked rotor (the instant it starts), by index into `loads`.
    pub(crate) starting: Option<usize>,
}

/// An impedance below [`SOLID_OHMS`] is a solid connection.
fn snap(z: Complex64) -> Complex64 {
    if z.norm() < SOLID_OHMS {
        Complex64::new(0.0, 0.0)
    } else {
        z
    }
}

impl Network {
    /// Builds the network of a job.
    pub fn new(job: &Job) -> Network {
        let system = *job.system();
        let v_oc = job
            .transformer()
            .map(|t| t.open_circuit_volts_to_neutral(&system))
            .unwrap_or(system.volts_to_neutral());
        let mut emf = [Complex64::new(0.0, 0.0); 3];
        for leg in system.legs() {
            emf[leg.index()] = system.leg_unit(*leg) * v_oc;
        }
        let service = job.service();
        let mut z = job
            .transformer()
            .map(|t| t.source_matrix(&system))
            .unwrap_or([[Complex64::new(0.0, 0.0); 3]; 3]);
        let hot = snap(service.hot.impedance());
        for leg in system.legs() {
            z[leg.index()][leg.index()] += hot;
        }
        let stiff = z.iter().flatten().all(|c| c.norm() < SOLID_OHMS);
        let source = if stiff {
            Source::Stiff
        } else {
            Source::Thevenin { z }
        };
        let shared: Vec<SharedNeutral> = job
            .multiwire()
            .iter()
            .map(|m| SharedNeutral {
                z: snap(m.conductor.impedance()),
                open: false,
            })
            .collect();
        let loads = job
            .loads()
            .iter()
            .map(|load| {
                let circuit = load
                    .multiwire()
                    .and_then(|id| job.multiwire().iter().position(|m| m.id == id));
                let (a, b) = match (load.connection(), circuit) {
                    (Connection::ToNeutral(l), Some(k)) => (Node::Hot(l), Node::Shared(k)),
                    (Connection::ToNeutral(l), None) => (Node::Hot(l), Node::Neutral),
                    (Connection::Across(x, y), _) => (Node::Hot(x), Node::Hot(y)),
                };
                // A shared-neutral load without a branch of its own runs its hot in the circuit's
                // cable.
                let branch = match (load.branch(), circuit) {
                    (Some(c), _) => c.impedance(),
                    (None, Some(k)) => job.multiwire()[k].conductor.impedance(),
                    (None, None) => Complex64::new(0.0, 0.0),
                };
                Placed {
                    load: load.clone(),
                    a,
                    b,
                    branch: snap(branch),
                    characteristic: load.characteristic(),
                }
            })
            .collect();
        let mut net = Network {
            system,
            emf,
            source,
            source_y1: None,
            source_yh: Vec::new(),
            neutral: NeutralPath::Solid,
            earth_ohms: job.earth_ohms(),
            service_hot: hot,
            service_neutral: snap(service.neutral.impedance()),
            shared,
            loads,
            starting: None,
        };
        net.set_neutral(job.neutral());
        net.source_y1 = net.source_y_at(1);
        let mut orders: Vec<u32> = job
            .loads()
            .iter()
            .flat_map(|l| l.harmonics().iter().map(|(h, _)| *h))
            .collect();
        crate::order::sort_by(&mut orders, Ord::cmp);
        orders.dedup();
        net.source_yh = orders.iter().map(|&h| (h, net.source_y_at(h))).collect();
        net
    }

    /// The source admittance matrix at order `h` (worked out once per order when a load lists it),
    /// or `None` when stiff or singular.
    pub(crate) fn source_y(&self, h: u32) -> Option<[[Complex64; 3]; 3]> {
        match h {
            1 => self.source_y1,
            _ => match self.source_yh.iter().find(|(o, _)| *o == h) {
                Some((_, y)) => *y,
                None => self.source_y_at(h),
            },
        }
    }

    /// Changes the service neutral's state in place (the sweep solves one network at many
    /// states); the earth path stays.
    pub fn set_neutral(&mut self, state: NeutralState) {
        let zn = self.service_neutral;
        self.neutral = match state {
            NeutralState::Intact => path_of(zn),
            NeutralState::Loose { ohms } => path_of(zn + ohms),
            NeutralState::Open => NeutralPath::Open,
        };
    }

    /// Holds motor `k` at locked rotor, switched on, as at the instant it starts (`None`: no
    /// motor starting).
    pub fn set_starting(&mut self, k: Option<usize>) {
        self.starting = k;
        if let Some(k) = k {
            if let Some(p) = self.loads.get_mut(k) {
                p.load.on = true;
            }
        }
    }

    /// Opens or closes shared neutral `k` (for "if the shared neutral opens").
    pub fn set_shared_open(&mut self, k: usize, open: bool) {
        if let Some(s) = self.shared.get_mut(k) {
            s.open = open;
        }
    }

    pub fn system(&self) -> &System {
        &self.system
    }

    /// Open-circuit source voltage of each leg (zero for an absent leg), volts.
    pub fn emf(&self) -> [Complex64; 3] {
        self.emf
    }

    pub fn source(&self) -> Source {
        self.source
    }

    pub fn neutral(&self) -> NeutralPath {
        self.neutral
    }

    /// The earth path beside the neutral conductor, ohms.
    pub fn earth_ohms(&self) -> Option<f64> {
        self.earth_ohms
    }

    pub fn loads(&self) -> &[Placed] {
        &self.loads
    }

    /// The shared neutrals of the job's multiwire circuits, in the job's order.
    pub fn shared(&self) -> &[SharedNeutral] {
        &self.shared
    }

    /// Every node: the four panel nodes and one per shared neutral.
    pub fn node_count(&self) -> usize {
        PANEL_NODES + self.shared.len()
    }

    /// The node a load's second terminal really sits on: a shared neutral too short to matter is
    /// the panel neutral bar itself.
    pub(crate) fn resolve(&self, node: Node) -> Node {
        match node {
            Node::Shared(k) if self.shared[k].is_solid() => Node::Neutral,
            n => n,
        }
    }

    /// Impedance of one service hot conductor, ohms.
    pub fn service_hot(&self) -> Complex64 {
        self.service_hot
    }

    /// Impedance of the service neutral conductor alone, ohms.
    pub fn service_neutral(&self) -> Complex64 {
        self.service_neutral
    }

    /// The source impedance matrix at harmonic order `h` (reactances × h), or `None` when stiff.
    pub(crate) fn source_z_at(&self, h: u32) -> Option<[[Complex64; 3]; 3]> {
        match self.source {
            Source::Stiff => None,
            Source::Thevenin { z } => {
                let mut out = z;
                for row in out.iter_mut() {
                    for c in row.iter_mut() {
                        *c = at_harmonic(*c, h);
                    }
                }
                Some(out)
            }
        }
    }

    /// The source admittance matrix at order `h`, or `None` when stiff or singular.
    pub(crate) fn source_y_at(&self, h: u32) -> Option<[[Complex64; 3]; 3]> {
        invert3(&self.source_z_at(h)?, self.system.legs().len())
    }

    /// The number of hot legs.
    pub fn leg_count(&self) -> usize {
        self.system.legs().len()
    }
}

fn path_of(z: Complex64) -> NeutralPath {
    if z.norm() < SOLID_OHMS {
        NeutralPath::Solid
    } else {
        NeutralPath::Conductor(z)
    }
}

/// An impedance R + jX at harmonic order h: R + j·h·X (skin effect neglected).
pub fn at_harmonic(z: Complex64, h: u32) -> Complex64 {
    Complex64::new(z.re, z.im * f64::from(h))
}
