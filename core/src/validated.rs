//! The validated job: the types [`crate::validate`] produces from a job file. None of them can hold
//! an invalid value; the network builder, the solver and every tool start from here and never go
//! back to the file form.

use crate::conductors::{Conductor, Material};
use crate::loads::{Connection, Load};
use crate::system::System;
use crate::transformer::Transformer;

/// The state of the service neutral conductor between the panel and the transformer. Whatever its
/// state, the panel's neutral bar may also reach the transformer neutral through the earth (the
/// grounding electrode, a bonded water pipe); that path is [`Job::earth_ohms`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum NeutralState {
    /// Connected through its conductor.
    Intact,
    /// Connected through its conductor plus a series resistance at the service (a loose or
    /// corroded lug or splice), ohms ≥ 0.
    Loose { ohms: f64 },
    /// The conductor is broken.
    Open,
}

impl NeutralState {
    /// `intact`, `loose` or `open`.
    pub fn code(self) -> &'static str {
        match self {
            NeutralState::Intact => "intact",
            NeutralState::Loose { .. } => "loose",
            NeutralState::Open => "open",
        }
    }
}

/// The service conductors (one run for each hot leg, one for the neutral).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Service {
    pub hot: Conductor,
    pub neutral: Conductor,
}

/// A validated shared-neutral (multiwire) branch circuit: one cable whose hots are on different
/// legs and whose single neutral returns all of their currents.
#[derive(Clone, Debug, PartialEq)]
pub struct Multiwire {
    pub id: String,
    pub material: Material,
    /// The size's label (`12 AWG`).
    pub size_label: String,
    /// NEC Table 310.16 ampacity at the chosen column; `None` for sizes the table lacks.
    pub ampacity_a: Option<f64>,
    pub column_c: f64,
    /// The cable's one-way run: the shared neutral conductor, and the hot of any member load that
    /// gives no branch of its own. Ideal when the job gives no length.
    pub conductor: Conductor,
    /// True when the job gave the cable's length, so the shared neutral's drop is counted.
    pub has_length: bool,
}

/// A validated job: everything the network builder needs, with no invalid value possible.
#[derive(Clone, Debug, PartialEq)]
pub struct Job {
    pub(crate) name: String,
    pub(crate) system: System,
    pub(crate) transformer: Option<Transformer>,
    pub(crate) service: Service,
    pub(crate) neutral: NeutralState,
    /// Resistance of the earth path from the panel neutral bar to the transformer neutral, ohms.
    pub(crate) earth_ohms: Option<f64>,
    /// The appliances as found on site.
    pub(crate) loads: Vec<Load>,
    /// Appliances planned but not installed (`"planned": true`), kept apart from the job as found.
    pub(crate) planned: Vec<Load>,
    pub(crate) multiwire: Vec<Multiwire>,
}

impl Job {
    pub fn name(&self) -> &str {
        &self.name
    }
    pub fn system(&self) -> &System {
        &self.system
    }
    pub fn transformer(&self) -> Option<&Transformer> {
        self.transformer.as_ref()
    }
    pub fn service(&self) -> &Service {
        &self.service
    }
    pub fn neutral(&self) -> NeutralState {
        self.neutral
    }
    /// The earth path beside the service neutral, ohms, when the job gives one.
    pub fn earth_ohms(&self) -> Option<f64> {
        self.earth_ohms
    }
    pub fn loads(&self) -> &[Load] {
        &self.loads
    }
    pub fn multiwire(&self) -> &[Multiwire] {
        &self.multiwire
    }
    /// Appliances planned but not installed yet.
    pub fn planned(&self) -> &[Load] {
        &self.planned
    }

    /// The job once its planned appliances are added, in file order.
    pub fn with_planned(&self) -> Job {
        let mut job = self.clone();
        job.loads.append(&mut job.planned);
        crate::order::sort_by_key(&mut job.loads, |l| l.file_index);
        for l in job.loads.iter_mut() {
            l.planned = false;
        }
        job
    }

    /// Indices of the loads on shared-neutral circuit `k` of [`Job::multiwire`].
    pub fn multiwire_members(&self, k: usize) -> Vec<usize> {
        let id = self.multiwire[k].id.as_str();
        self.loads
            .iter()
            .enumerate()
            .filter(|(_, l)| l.multiwire() == Some(id))
            .map(|(i, _)| i)
            .collect()
    }

    /// The same job with another neutral state (for the what-if and the sweep); the earth path
    /// stays.
    pub fn with_neutral(&self, neutral: NeutralState) -> Job {
        Job {
            neutral,
            ..self.clone()
        }
    }

    /// The same job with each load's connection replaced by `f(index, load)` (for balancing).
    pub fn with_connections(&self, f: impl Fn(usize, &Load) -> Connection) -> Job {
        let mut job = self.clone();
        for (i, load) in job.loads.iter_mut().enumerate() {
            load.connection = f(i, &self.loads[i]);
        }
        job
    }
}
