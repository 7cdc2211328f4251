//! The job file: the JSON that `tapline solve` reads and the app saves, exports and imports.
//!
//! This is the *wire* shape, deliberately forgiving: every field is a [`Raw`] that keeps whatever the
//! file held, so a job with a typo still loads, round-trips unchanged, and can be reported on field by
//! field. Nothing here is trusted; [`crate::validate`] turns a [`JobFile`] into a
//! [`crate::validate::Job`] or a list of problems, each naming its JSON path.
//!
//! # Format, version 1
//!
//! ```json
//! { "version": 1, "name": "9 Quarry Lane",
//!   "system": { "kind": "split-phase", "volts_to_neutral": 120, "frequency_hz": 60 },
//!   "transformer": { "kva": 25, "primary_v": 7200, "impedance_pct": 2.0, "x_over_r": 1.5 },
//!   "service": { "hot": { "material": "al", "size": "4/0", "length_m": 30 },
//!                "neutral": { "r_ohm": 0.05, "x_ohm": 0.02 } },
//!   "neutral": { "state": "loose", "ohms": 2.5 },
//!   "loads": [ { "name": "Shop heater", "connect": "L1-N", "model": "resistive",
//!                "watts": 1500, "rated_v": 120 } ] }
//! ```
//!
//! Optional fields beyond those: `notes` (free text such as an address), `system.phases` (2 or 3 for a
//! wye), `transformer.tap_pct` (−5, −2.5, 0, 2.5, 5), `transformer.supply_v` (the primary voltage
//! actually present) and `transformer.connection` (`single-phase`, the default for split-phase;
//! `delta-wye`, the default for wye; or `wye-wye`), per conductor `length_ft`, `sets` (parallel
//! sets), `conduit` (`pvc`, `aluminum`, `steel`) and `temperature_c`, `neutral.earth_return_ohms`
//! (the grounding electrode's path to the transformer neutral, beside the neutral conductor in every
//! state), `neutral.found` (how the neutral's state was found on site, in words), and per load
//! `on`, `branch` (a conductor, one-way length), `input_min_v`/`input_max_v` (electronic
//! supplies), `harmonics` (pairs of order and fraction of the fundamental current), `circuit`,
//! `movable`, `slot`, a motor's starting draw (`locked_rotor_a`, or `code_letter` with
//! `hp` per NEC Table 430.7(B), or `locked_rotor_multiple` of its running current; 5 if none is
//! given, common practice; and `start_pf`, 0.35 if absent) and `multiwire` (the id of a shared-neutral branch circuit listed at
//! the top level under `multiwire`, each with `id`, `material`, `size`, `length_m` or `length_ft`
//! (the cable's one-way length: its shared neutral, and the hot of each member load that gives no
//! `branch` of its own; a member's own `branch` is its hot alone), and `column_c`, the NEC Table
//! 310.16 column).
//!
//! A key the format does not define is kept verbatim (so the file round-trips) and refused by
//! validation with the nearest known key (`loads[0].wats: unknown field (did you mean watts?)`).

use serde::de::DeserializeOwned;
use serde::{Deserialize, Deserializer, Serialize, Serializer};
use serde_json::Value;

pub use crate::fields::Unknown;

/// The job format version this engine writes and reads.
pub const JOB_VERSION: u32 = 1;

/// One field as it stood in the file.
///
/// `Absent` covers a missing key and `null`; `Given` holds a value of the expected JSON type;
/// `Invalid` keeps a value of the wrong type verbatim so it can be reported and written back.
#[derive(Clone, Debug, PartialEq, Default)]
pub enum Raw<T> {
    #[default]
    Absent,
    Given(T),
    Invalid(Value),
}

impl<T> Raw<T> {
    /// True when the key was missing or `null`.
    pub fn is_absent(&self) -> bool {
        matches!(self, Raw::Absent)
    }

    /// The value when it had the expected type.
    pub fn given(&self) -> Option<&T> {
        match self {
            Raw::Given(v) => Some(v),
            _ => None,
        }
    }
}

impl<T> From<T> for Raw<T> {
    fn from(v: T) -> Self {
        Raw::Given(v)
    }
}

impl<T: Serialize> Serialize for Raw<T> {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        match self {
            Raw::Absent => s.serialize_none(),
            Raw::Given(v) => v.serialize(s),
            Raw::Invalid(v) => v.serialize(s),
        }
    }
}

impl<'de, T: DeserializeOwned> Deserialize<'de> for Raw<T> {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        let value = Value::deserialize(d)?;
        if value.is_null() {
            return Ok(Raw::Absent);
        }
        Ok(match serde_json::from_value::<T>(value.clone()) {
            Ok(v) => Raw::Given(v),
            Err(_) => Raw::Invalid(value),
        })
    }
}

/// The whole job file.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct JobFile {
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub version: Raw<u32>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub name: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub notes: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub system: Raw<SystemFile>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub transformer: Raw<TransformerFile>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub service: Raw<ServiceFile>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub neutral: Raw<NeutralFile>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub loads: Raw<Vec<Raw<LoadFile>>>,
    /// Shared-neutral (multiwire) branch circuits that loads may name.
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub multiwire: Raw<Vec<Raw<MultiwireFile>>>,
    /// Meter readings taken on site, one dated set per visit (the first test, the re-test after
    /// a repair). They are kept as typed: the job's solve does not depend on them, and the
    /// diagnosis names any reading it cannot use.
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub readings: Raw<Vec<Raw<ReadingSetFile>>>,
    /// Keys this format does not define, kept so the file round-trips; validation refuses them.
    #[serde(flatten, skip_serializing_if = "Unknown::is_empty")]
    pub unknown: Unknown,
}

/// One visit's meter readings, dated.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct ReadingSetFile {
    /// When the set was taken, as the person or the phone's clock wrote it (`2026-12-02 09:40`).
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub taken: Raw<String>,
    /// What the set was for ("first test", "after tightening the neutral lug").
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub note: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub meter: Raw<MeterFile>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub readings: Raw<Vec<Raw<ReadingFile>>>,
    /// Keys this format does not define; validation refuses them.
    #[serde(flatten, skip_serializing_if = "Unknown::is_empty")]
    pub unknown: Unknown,
}

/// A shared-neutral (multiwire) branch circuit: its id and its neutral conductor.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct MultiwireFile {
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub id: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub material: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub size: Raw<Value>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub length_m: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub length_ft: Raw<f64>,
    /// The NEC Table 310.16 temperature column, °C: 60, 75 or 90 (60 if absent).
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub column_c: Raw<f64>,
    /// Keys this format does not define, kept so the file round-trips; validation refuses them.
    #[serde(flatten, skip_serializing_if = "Unknown::is_empty")]
    pub unknown: Unknown,
}

/// `system`: what the utility delivers at the service.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct SystemFile {
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub kind: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub volts_to_neutral: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub frequency_hz: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub phases: Raw<u32>,
    /// Keys this format does not define, kept so the file round-trips; validation refuses them.
    #[serde(flatten, skip_serializing_if = "Unknown::is_empty")]
    pub unknown: Unknown,
}

/// `transformer`: the distribution transformer feeding the service.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct TransformerFile {
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub kva: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub primary_v: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub impedance_pct: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub x_over_r: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub tap_pct: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub supply_v: Raw<f64>,
    /// `single-phase`, `delta-wye` or `wye-wye`.
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub connection: Raw<String>,
    /// Keys this format does not define, kept so the file round-trips; validation refuses them.
    #[serde(flatten, skip_serializing_if = "Unknown::is_empty")]
    pub unknown: Unknown,
}

/// `service`: the conductors from the transformer to the panel.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct ServiceFile {
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub hot: Raw<ConductorFile>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub neutral: Raw<ConductorFile>,
    /// Keys this format does not define, kept so the file round-trips; validation refuses them.
    #[serde(flatten, skip_serializing_if = "Unknown::is_empty")]
    pub unknown: Unknown,
}

/// A conductor run: a table size and length, or an explicit whole-run impedance.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct ConductorFile {
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub material: Raw<String>,
    /// A size such as `"12"`, `"4/0"`, `"250"`, `"250 kcmil"` or `"16 mm2"`; a bare number is read too.
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub size: Raw<Value>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub length_m: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub length_ft: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub sets: Raw<u32>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub conduit: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub temperature_c: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub r_ohm: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub x_ohm: Raw<f64>,
    /// Keys this format does not define, kept so the file round-trips; validation refuses them.
    #[serde(flatten, skip_serializing_if = "Unknown::is_empty")]
    pub unknown: Unknown,
}

/// `neutral`: the state of the service neutral.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct NeutralFile {
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub state: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub ohms: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub earth_return_ohms: Raw<f64>,
    /// How the state was found on site, in words ("0.35 Ω measured 2026-12-01, neutral lug
    /// warm"): the neutral in a job is the neutral as found, never a what-if.
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub found: Raw<String>,
    /// Keys this format does not define, kept so the file round-trips; validation refuses them.
    #[serde(flatten, skip_serializing_if = "Unknown::is_empty")]
    pub unknown: Unknown,
}

/// One appliance or load.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct LoadFile {
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub name: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub connect: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub model: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub watts: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub rated_v: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub power_factor: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub on: Raw<bool>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub branch: Raw<ConductorFile>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub input_min_v: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub input_max_v: Raw<f64>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub harmonics: Raw<Vec<(u32, f64)>>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub appliance: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub circuit: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub movable: Raw<bool>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub slot: Raw<u32>,
    /// The id of the shared-neutral branch circuit this load is on.
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub multiwire: Raw<String>,
    /// A motor's locked-rotor amperes at rated voltage.
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub locked_rotor_a: Raw<f64>,
    /// A motor's NEC Table 430.7(B) code letter (with `hp`).
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub code_letter: Raw<String>,
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub hp: Raw<f64>,
    /// A motor's locked-rotor current as a multiple of its running current.
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub locked_rotor_multiple: Raw<f64>,
    /// A motor's power factor while starting (locked rotor).
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub start_pf: Raw<f64>,
    /// True for an appliance planned but not installed yet: kept apart from the job as found,
    /// added only in the plan's "after".
    #[serde(skip_serializing_if = "Raw::is_absent")]
    pub planned: Raw<bool>,
    /// Keys this format does not define, kept so the file round-trips; validation refuses them.
    #[serde(flatten, skip_serializing_if = "Unknown::is_empty")]
    pub unknown: Unknown,
}

/// The meters' resolution.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct MeterFile {
    pub volts_resolution: Raw<f64>,
    pub amps_resolution: Raw<f64>,
    /// Keys this format does not define; validation refuses them.
    #[serde(flatten, skip_serializing_if = "Unknown::is_empty")]
    pub unknown: Unknown,
}

/// One set of readings.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct ReadingFile {
    pub label: Raw<String>,
    /// `panel` (default) or `meter`: where the voltages were read.
    pub at: Raw<String>,
    pub l1_n_v: Raw<f64>,
    pub l2_n_v: Raw<f64>,
    pub l1_l2_v: Raw<f64>,
    pub l1_a: Raw<f64>,
    pub l2_a: Raw<f64>,
    /// Each leg current's power factor (lagging), as a power-quality clamp shows; 1 if absent.
    pub l1_pf: Raw<f64>,
    pub l2_pf: Raw<f64>,
    /// Keys this format does not define; validation refuses them.
    #[serde(flatten, skip_serializing_if = "Unknown::is_empty")]
    pub unknown: Unknown,
}

/// Why a text could not be read as a job at all (before any field is looked at).
#[derive(Clone, Debug, PartialEq)]
pub struct ParseError {
    pub message: String,
}

impl std::fmt::Display for ParseError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.message)
    }
}

impl std::error::Error for ParseError {}

/// Reads a job file from JSON text.
///
/// Only broken JSON, or a top level that is not an object, fails here; wrong field types are kept
/// for [`crate::validate::validate`] to report with their paths.
///
/// # Errors
/// A [`ParseError`] naming the line and column of broken JSON.
pub fn parse_job(text: &str) -> Result<JobFile, ParseError> {
    let value: Value = serde_json::from_str(text).map_err(|e| ParseError {
        message: format!("job: not valid JSON ({e})"),
    })?;
    if !value.is_object() {
        return Err(ParseError {
            message: "job: must be a JSON object".to_string(),
        });
    }
    serde_json::from_value(value).map_err(|e| ParseError {
        message: format!("job: {e}"),
    })
}

/// Writes a job file as pretty JSON, the form the app exports.
pub fn job_to_json(job: &JobFile) -> String {
    // Serialising plain data with string keys cannot fail; fall back to an empty object regardless
    // so a caller never sees a panic.
    serde_json::to_string_pretty(job).unwrap_or_else(|_| "{}".to_string())
}
