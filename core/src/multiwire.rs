//! Shared-neutral (multiwire) branch circuits, a step of the report: two or three hots sharing one
//! neutral conductor, which is a branch of the network (see [`crate::network`]).
//!
//! The shared neutral carries the phasor sum of its circuit's load currents at every harmonic
//! order (Kirchhoff's current law): the difference when the hots are on opposite legs of a
//! split-phase service; on a wye the fundamentals largely cancel but the third harmonics of
//! line-to-neutral electronic loads add; and when every hot was put on the same leg by mistake, it
//! carries the sum, which can overload the neutral with no breaker to see it (NEC 210.4(B) asks
//! for the hots to be on different legs, with handle ties). The rms current is compared with the
//! conductor's NEC Table 310.16 ampacity. If the shared neutral opens, the circuit's loads on
//! different legs end up in series across the line-to-line voltage; that case is solved on the
//! job's own network with that branch opened.

use crate::classify::Outcome;
use crate::conductors::Material;
use crate::figures::fixed;
use crate::loads::Connection;
use crate::network::Network;
use crate::report::{load_reports, LoadReport};
use crate::solve::{solve, Solution};
use crate::validated::Job;
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
    /// Rms current in the shared neutral, fundamental and harmonics, amperes.
    pub neutral_current_a: f64,
    /// Its fundamental part, amperes.
    pub neutral_fundamental_a: f64,
    /// Voltage across the shared neutral conductor, volts (zero when the job gives no length).
    pub neutral_drop_v: f64,
    pub conductor: String,
    /// False when the job gives no length: the shared neutral's drop is then not counted.
    pub length_given: bool,
    pub ampacity_a: Option<f64>,
    pub column_c: f64,
    pub overloaded: bool,
    pub message: String,
    /// What each of the circuit's appliances gets if the shared neutral opens (empty with
    /// `if_neutral_opens_error` when that case did not solve).
    pub if_neutral_opens: Vec<IfOpen>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub if_neutral_opens_error: Option<String>,
}

/// Checks every shared-neutral circuit of a solved job.
pub fn check(job: &Job, net: &Network, sol: &Solution) -> Vec<MultiwireReport> {
    job.multiwire()
        .iter()
        .enumerate()
        .map(|(k, m)| {
            let members = job.multiwire_members(k);
            let mut legs: Vec<&'static str> = members
                .iter()
                .filter_map(|&i| match job.loads()[i].connection() {
                    Connection::ToNeutral(l) => Some(l.name()),
                    Connection::Across(..) => None,
                })
                .collect();
            crate::order::sort_by(&mut legs, Ord::cmp);
            legs.dedup();
            let amps = sol.shared_rms(k);
            let same_leg = legs.len() == 1 && members.len() > 1;
            let overloaded = m.ampacity_a.is_some_and(|a| amps > a);
            let rating = m
                .ampacity_a
                .map(|a| format!("{a} A at {} °C", fixed(m.column_c, 0), a = fixed(a, 0)))
                .unwrap_or_else(|| "no Table 310.16 rating".to_string());
            let message = match (same_leg, overloaded) {
                (true, true) => format!(
                    "DANGER: every hot is on {}, so the shared neutral carries the sum, {amps} A, over its {rating}. With the main off and the panel tested dead, move one hot to another leg and tie the handles.",
                    legs[0],
                    amps = fixed(amps, 1)
                ),
                (true, false) => format!(
                    "WARNING: every hot is on {}: the shared neutral carries the sum ({amps} A, rating {rating}) and no breaker protects it. With the main off and the panel tested dead, move one hot to another leg and tie the handles.",
                    legs[0],
                    amps = fixed(amps, 1)
                ),
                (false, true) => {
                    format!(
                        "The shared neutral carries {amps} A, over its {rating}.",
                        amps = fixed(amps, 1)
                    )
                }
                (false, false) => {
                    format!(
                        "The shared neutral carries {amps} A (rating {rating}).",
                        amps = fixed(amps, 1)
                    )
                }
            };
            let (if_neutral_opens, if_neutral_opens_error) = match if_open(job, net, k, &members) {
                Ok(list) => (list, None),
                Err(e) => (Vec::new(), Some(e)),
            };
            MultiwireReport {
                id: m.id.clone(),
                legs,
                same_leg,
                neutral_current_a: amps,
                neutral_fundamental_a: sol.shared_current[k].norm(),
                neutral_drop_v: (sol.shared_current[k] * m.conductor.impedance()).norm(),
                conductor: format!(
                    "{} {}",
                    m.size_label,
                    if m.material == Material::Copper {
                        "copper"
                    } else {
                        "aluminum"
                    }
                ),
                length_given: m.has_length,
                ampacity_a: m.ampacity_a,
                column_c: m.column_c,
                overloaded,
                message,
                if_neutral_opens,
                if_neutral_opens_error,
            }
        })
        .collect()
}

/// Solves the job's own network with shared neutral `k` opened and reports its members.
fn if_open(job: &Job, net: &Network, k: usize, members: &[usize]) -> Result<Vec<IfOpen>, String> {
    let mut open = net.clone();
    open.set_shared_open(k, true);
    let sol = solve(&open).map_err(|e| e.to_string())?;
    let reports: Vec<LoadReport> = load_reports(job, &open, &sol);
    Ok(members
        .iter()
        .map(|&i| {
            let l = &reports[i];
            IfOpen {
                name: l.name.clone(),
                voltage_v: l.voltage_v,
                outcome: l.outcome,
                reason: l.reason.clone(),
            }
        })
        .collect())
}
