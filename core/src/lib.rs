//! Tapline's electrical engine: what every appliance on a split-phase or wye service sees when the
//! neutral is intact, loose or open.
//!
//! The pipeline, one module per step: [`job`] (the JSON-facing input) → [`validate`] (with the
//! shared field checker [`fields`]) into [`validated`] (types that cannot be invalid) →
//! [`network`] (the circuit) → [`solve`] (phasor nodal analysis) → [`classify`] (outcome bands with
//! their sources) and [`multiwire`] (shared-neutral circuits) → [`report`] (the JSON-facing
//! output, checked by [`finite`]). Supporting modules hold the physics: [`system`],
//! [`transformer`], [`conductors`], [`loads`], [`library`]; [`whatif`] runs the neutral what-if
//! and sweep; [`tools`] holds the field tools (diagnosis from meter readings, panel balancing);
//! [`order`] is the one sort every module calls.
//!
//! This crate does no file, network or browser IO.

pub mod classify;
pub mod conductors;
pub mod demo;
pub mod fields;
pub mod figures;
pub mod finite;
pub mod job;
pub mod library;
pub mod linalg;
pub mod loads;
pub mod multiwire;
pub mod network;
pub mod order;
pub mod report;
pub mod solve;
pub mod system;
pub mod tools;
pub mod transformer;
pub mod validate;
pub mod validated;
pub mod whatif;

use fields::Problem;
use job::JobFile;

/// Everything that can go wrong between a job's text and its report.
#[derive(Clone, Debug, PartialEq)]
pub enum EngineError {
    /// The text is not a JSON object.
    Parse(job::ParseError),
    /// Fields are wrong; every problem is listed.
    Invalid(Vec<Problem>),
    /// The network did not solve.
    Solve(solve::SolveError),
}

impl std::fmt::Display for EngineError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            EngineError::Parse(e) => write!(f, "{e}"),
            EngineError::Invalid(ps) => {
                let lines: Vec<String> = ps.iter().map(|p| p.to_string()).collect();
                f.write_str(&lines.join("\n"))
            }
            EngineError::Solve(e) => write!(f, "{e}"),
        }
    }
}

impl std::error::Error for EngineError {}

/// Parses and validates a job's JSON text.
///
/// # Errors
/// [`EngineError::Parse`] or [`EngineError::Invalid`].
pub fn load_job(text: &str) -> Result<(JobFile, validate::Job), EngineError> {
    let file = job::parse_job(text).map_err(EngineError::Parse)?;
    let valid = validate::validate(&file).map_err(EngineError::Invalid)?;
    Ok((file, valid))
}

/// The whole pipeline from JSON text to a report.
///
/// # Errors
/// Any [`EngineError`].
pub fn solve_text(text: &str) -> Result<report::Report, EngineError> {
    let (_, job) = load_job(text)?;
    report::analyze(&job).map_err(EngineError::Solve)
}
