//! Shared-neutral (multiwire) branch circuits: two or three hots sharing one neutral conductor.
//!
//! The shared neutral carries the phasor sum of its circuit's load currents (Kirchhoff's current
//! law): the difference when the hots are on opposite legs of a split-phase service, but the sum
//! when both were put on the same leg by mistake, which can overload the neutral with no breaker
//! to see it. It is compared with the conductor's ampacity from NEC Table 310.16. If the shared
//! neutral opens, the circuit's loads on different legs end up in series across the line-to-line
//! voltage; that case is solved on a stiff source at nominal voltage.

use crate::classify::Outcome;
use crate::job::{JobFile, LoadFile, NeutralFile, Raw, SystemFile};
use crate::loads::Connection;
use crate::report::{analyze, Report};
use crate::solve::Solution;
use crate::system::SystemKind;
use crate::validate::{validate, Job};
use num_complex::Complex64;
use serde::Serialize;

/// One appliance if the shared neutral opens.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct IfOpen {
    pub name: String,
    pub voltage_v: Option<f64>,
    pub outcome: Outcome,
    pub reason: String,
}

/// The check of one shared-neutral circuit.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct MultiwireReport {
    pub id: String,
    pub legs: Vec<&'static str>,
    /// True when every hot of the circuit is on the same leg: the neutral carries the sum.
    pub same_leg: bool,
    pub neutral_current_a: f64,
    pub conductor: String,
    pub ampacity_a: Option<f64>,
    pub column_c: f64,
    pub overloaded: bool,
    pub message: String,
    pub if_neutral_opens: Vec<IfOpen>,
}

/// Checks every shared-neutral circuit of a solved job.
pub fn check(job: &Job, sol: &Solution) -> Vec<MultiwireReport> {
    job.multiwire()
        .iter()
        .map(|m| {
            let members: Vec<usize> = job
                .loads()
                .iter()
                .enumerate()
                .filter(|(_, l)| l.multiwire() == Some(m.id.as_str()))
                .map(|(i, _)| i)
                .collect();
            let mut legs: Vec<&'static str> = members
                .iter()
                .filter_map(|&i| match job.loads()[i].connection() {
                    Connection::ToNeutral(l) => Some(l.name()),
                    Connection::Across(..) => None,
                })
                .collect();
            legs.sort_unstable();
            legs.dedup();
            let current: Complex64 = members.iter().map(|&i| sol.loads[i].current).sum();
            let amps = current.norm();
            let same_leg = legs.len() == 1 && members.len() > 1;
            let overloaded = m.ampacity_a.is_some_and(|a| amps > a);
            let rating = m
                .ampacity_a
                .map(|a| format!("{a:.0} A at {:.0} °C", m.column_c))
                .unwrap_or_else(|| "no Table 310.16 rating".to_string());
            let message = match (same_leg, overloaded) {
                (true, true) => format!(
                    "DANGER: every hot is on {}, so the shared neutral carries the sum, {amps:.1} A, over its {rating}. Move one hot to the other leg.",
                    legs[0]
                ),
                (true, false) => format!(
                    "WARNING: every hot is on {}: the shared neutral carries the sum ({amps:.1} A, rating {rating}) and no breaker protects it. Move one hot to the other leg.",
                    legs[0]
                ),
                (false, true) => format!("The shared neutral carries {amps:.1} A, over its {rating}."),
                (false, false) => format!("The shared neutral carries {amps:.1} A (rating {rating})."),
            };
            MultiwireReport {
                id: m.id.clone(),
                legs,
                same_leg,
                neutral_current_a: amps,
                conductor: format!("{} {}", m.size_label, if m.material == crate::conductors::Material::Copper { "copper" } else { "aluminum" }),
                ampacity_a: m.ampacity_a,
                column_c: m.column_c,
                overloaded,
                message,
                if_neutral_opens: if_open(job, &members),
            }
        })
        .collect()
}

/// Solves the circuit's loads alone, on a stiff source at nominal voltage, with their neutral open.
fn if_open(job: &Job, members: &[usize]) -> Vec<IfOpen> {
    let sys = job.system();
    let (kind, phases) = match sys.kind() {
        SystemKind::SplitPhase => ("split-phase", None),
        SystemKind::Wye { phases } => ("wye", Some(u32::from(phases))),
    };
    let loads: Vec<Raw<LoadFile>> = members
        .iter()
        .map(|&i| {
            let l = &job.loads()[i];
            let (min_v, max_v, harmonics) = match l.model() {
                crate::loads::Model::Electronic { min_v, max_v } => {
                    (Raw::Given(min_v), Raw::Given(max_v), Raw::Absent)
                }
                _ => (Raw::Absent, Raw::Absent, Raw::Absent),
            };
            Raw::Given(LoadFile {
                name: Raw::Given(l.name().to_string()),
                connect: Raw::Given(l.connection().label()),
                model: Raw::Given(l.model().code().to_string()),
                watts: Raw::Given(l.rated_w()),
                rated_v: Raw::Given(l.rated_v()),
                power_factor: Raw::Given(l.power_factor()),
                on: Raw::Given(l.is_on()),
                input_min_v: min_v,
                input_max_v: max_v,
                harmonics,
                ..LoadFile::default()
            })
        })
        .collect();
    let file = JobFile {
        name: Raw::Given("shared neutral open".to_string()),
        system: Raw::Given(SystemFile {
            kind: Raw::Given(kind.to_string()),
            volts_to_neutral: Raw::Given(sys.volts_to_neutral()),
            frequency_hz: Raw::Given(sys.frequency_hz()),
            phases: phases.map(Raw::Given).unwrap_or_default(),
        }),
        neutral: Raw::Given(NeutralFile {
            state: Raw::Given("open".to_string()),
            ..NeutralFile::default()
        }),
        loads: Raw::Given(loads),
        ..JobFile::default()
    };
    let report: Option<Report> = validate(&file).ok().and_then(|j| analyze(&j).ok());
    report
        .map(|r| {
            r.loads
                .into_iter()
                .map(|l| IfOpen {
                    name: l.name,
                    voltage_v: l.voltage_v,
                    outcome: l.outcome,
                    reason: l.reason,
                })
                .collect()
        })
        .unwrap_or_default()
}
