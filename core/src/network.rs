//! The network: a validated job turned into the circuit the solver works on.
//!
//! Nodes are the panel's hot bars (L1, L2, L3) and the panel neutral bar (N). The reference node
//! (0 V) is the transformer's neutral terminal, the center tap of a split-phase winding or the star
//! point of a wye. Each hot bar is fed from an ideal source E (the open-circuit secondary voltage)
//! through the source impedance matrix Z_s, which holds the transformer's impedance and the service
//! hot conductors; the panel neutral returns to the reference through the service neutral conductor
//! plus any loose-connection resistance, or, when the neutral is open, through the earth path if one
//! is given. Loads sit between two nodes; a load's own branch conductors are in series with it.

use crate::linalg::invert3;
use crate::loads::{Characteristic, Connection, Load};
use crate::system::{Leg, System};
use crate::validate::{Job, NeutralState};
use num_complex::Complex64;

/// A node of the panel.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Node {
    Hot(Leg),
    Neutral,
}

/// Index of the panel neutral in node arrays (legs use 0..=2).
pub const NEUTRAL_INDEX: usize = 3;

impl Node {
    /// Index into node arrays: L1 0, L2 1, L3 2, N 3.
    pub fn index(self) -> usize {
        match self {
            Node::Hot(l) => l.index(),
            Node::Neutral => NEUTRAL_INDEX,
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

/// How the panel neutral reaches the reference node.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum NeutralPath {
    /// No impedance: the panel neutral is the reference.
    Solid,
    /// Through the service neutral (plus a loose connection): ohms at the fundamental.
    Conductor(Complex64),
    /// The service neutral is open; the panel neutral reaches the reference only through the earth
    /// (a resistance in ohms) or not at all.
    Open { earth_ohms: Option<f64> },
}

/// A load placed in the network.
#[derive(Clone, Debug, PartialEq)]
pub struct Placed {
    pub load: Load,
    pub a: Node,
    pub b: Node,
    /// Loop impedance of the branch circuit, ohms (zero without one).
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
    pub(crate) neutral: NeutralPath,
    pub(crate) service_hot: Complex64,
    pub(crate) service_neutral: Complex64,
    pub(crate) loads: Vec<Placed>,
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
        for leg in system.legs() {
            z[leg.index()][leg.index()] += service.hot.impedance();
        }
        let zero = z.iter().flatten().all(|c| c.norm() == 0.0);
        let source = if zero {
            Source::Stiff
        } else {
            Source::Thevenin { z }
        };
        let zn = service.neutral.impedance();
        let loads = job
            .loads()
            .iter()
            .map(|load| {
                let (a, b) = match load.connection() {
                    Connection::ToNeutral(l) => (Node::Hot(l), Node::Neutral),
                    Connection::Across(x, y) => (Node::Hot(x), Node::Hot(y)),
                };
                Placed {
                    load: load.clone(),
                    a,
                    b,
                    branch: load.branch().map(|c| c.impedance()).unwrap_or_default(),
                    characteristic: load.characteristic(),
                }
            })
            .collect();
        let mut net = Network {
            system,
            emf,
            source,
            source_y1: None,
            neutral: NeutralPath::Solid,
            service_hot: service.hot.impedance(),
            service_neutral: zn,
            loads,
        };
        net.set_neutral(job.neutral());
        net.source_y1 = net.source_y_at(1);
        net
    }

    /// Changes the neutral's state in place (the sweep solves one network at many states).
    pub fn set_neutral(&mut self, state: NeutralState) {
        let zn = self.service_neutral;
        self.neutral = match state {
            NeutralState::Intact => path_of(zn),
            NeutralState::Loose { ohms } => path_of(zn + ohms),
            NeutralState::Open { earth_return_ohms } => NeutralPath::Open {
                earth_ohms: earth_return_ohms,
            },
        };
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

    pub fn loads(&self) -> &[Placed] {
        &self.loads
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
    if z.norm() == 0.0 {
        NeutralPath::Solid
    } else {
        NeutralPath::Conductor(z)
    }
}

/// An impedance R + jX at harmonic order h: R + j·h·X (skin effect neglected).
pub fn at_harmonic(z: Complex64, h: u32) -> Complex64 {
    Complex64::new(z.re, z.im * f64::from(h))
}
