//! "What if we add this": the job as found beside the job with its planned appliances
//! (`"planned": true` in the job file), each solved in full by the pipeline.
//!
//! Both sides are the engine's own reports of the two jobs, so every figure obeys the same
//! network (Kirchhoff's laws, the transformer's and conductors' impedance, the loads at their
//! power factors and models): leg currents, the neutral current (the phasor sum, harmonics
//! included), the voltage at every appliance with its outcome, the transformer's loading as a
//! percentage of its full-load current, the fault current at the service equipment (a property
//! of the source and service, so adding load does not change it; shown because the person
//! planning asks), and how far each leg sits below nominal at the panel.

use crate::classify::Outcome;
use crate::figures::fixed;
use crate::report::{analyze, Report};
use crate::solve::SolveError;
use crate::transformer::Faults;
use crate::validated::Job;
use serde::Serialize;
use std::collections::BTreeMap;

/// One side of the comparison.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Side {
    /// Each leg's current, amperes (rms, harmonics included).
    pub legs_a: BTreeMap<String, f64>,
    /// Each leg's voltage to neutral at the panel, volts (`None` with the neutral open).
    pub legs_v: BTreeMap<String, Option<f64>>,
    /// How far each leg's voltage at the panel is below nominal, percent (negative above it).
    pub below_nominal_pct: BTreeMap<String, Option<f64>>,
    pub neutral_current_a: f64,
    /// Largest leg current as a percentage of the transformer's full-load current, when the job
    /// gives a transformer.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub transformer_loading_pct: Option<f64>,
    /// Fault current at the service equipment, when the job gives a transformer.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub fault_at_service: Option<Faults>,
    pub worst_outcome: Outcome,
}

/// One appliance in the comparison.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Appliance {
    pub name: String,
    pub planned: bool,
    /// Its voltage and outcome as found (`None` for a planned appliance, not there yet).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub before_v: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub before: Option<Outcome>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub after_v: Option<f64>,
    pub after: Outcome,
}

/// The job as found and with its planned appliances, side by side.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Plan {
    /// The planned appliances' names.
    pub planned: Vec<String>,
    pub before: Side,
    pub after: Side,
    pub appliances: Vec<Appliance>,
    pub notes: Vec<String>,
}

fn side(r: &Report) -> Side {
    let nominal = r.nominal_volts_to_neutral;
    Side {
        legs_a: crate::order::map_of(r.legs.iter().map(|(k, l)| (k.clone(), l.current_a))),
        legs_v: crate::order::map_of(r.legs.iter().map(|(k, l)| (k.clone(), l.volts_to_neutral))),
        below_nominal_pct: crate::order::map_of(r.legs.iter().map(|(k, l)| {
            (
                k.clone(),
                l.volts_to_neutral.map(|v| (nominal - v) / nominal * 100.0),
            )
        })),
        neutral_current_a: r.neutral_current_a,
        transformer_loading_pct: r.transformer.as_ref().map(|t| t.loading_pct),
        fault_at_service: r.fault_at_service,
        worst_outcome: r.worst_outcome,
    }
}

/// Solves the job as found and with its planned appliances.
///
/// # Errors
/// Either network failing to solve.
pub fn plan(job: &Job) -> Result<Plan, SolveError> {
    let now = analyze(job)?;
    let with = job.with_planned();
    let after = analyze(&with)?;
    let planned: Vec<String> = job.planned().iter().map(|l| l.name().to_string()).collect();
    // Each appliance of the "after" report is matched to the as-found report by its place in the
    // job file; a planned one has none.
    let appliances = after
        .loads
        .iter()
        .map(|a| {
            let before = now.loads.iter().find(|b| b.index == a.index);
            Appliance {
                name: a.name.clone(),
                planned: before.is_none(),
                before_v: before.and_then(|b| b.voltage_v),
                before: before.map(|b| b.outcome),
                after_v: a.voltage_v,
                after: a.outcome,
            }
        })
        .collect();
    let mut notes = Vec::new();
    if planned.is_empty() {
        notes.push("No appliance is marked as planned: before and after are the same.".to_string());
    }
    if let Some(t) = &after.transformer {
        if t.loading_pct > 100.0 {
            notes.push(format!(
                "With the planned appliances the transformer carries {} % of its full-load current: tell the utility before adding them.",
                fixed(t.loading_pct, 0)
            ));
        }
    }
    Ok(Plan {
        planned,
        before: side(&now),
        after: side(&after),
        appliances,
        notes,
    })
}
