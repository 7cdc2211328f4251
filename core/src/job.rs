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

use serde::{Serialize, Serializer};
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

impl<T: FromJson> Raw<T> {
    /// Reads one field's value: `null` is absent, a value `T` reads is given, and any other value
    /// is kept as it stood.
    pub fn read(value: Value) -> Raw<T> {
        if value.is_null() {
            Raw::Absent
        } else if T::fits(&value) {
            Raw::Given(T::take(value))
        } else {
            Raw::Invalid(value)
        }
    }
}

/// A type a file's JSON value is read into, field by field, without failing.
///
/// The file's forms are read by hand rather than through serde's derived readers: those route a
/// struct's unknown keys through a buffer of every value (serde's `flatten`) and read each field
/// twice (as a JSON value, then as its type), which made the JSON reading the largest single
/// function of the phone app. Reading here follows serde_json's own rules for each type, so a
/// file reads as it did: an `f64` is any JSON number, a `u32` an integer from 0 to 4294967295 (not
/// `3.0`), a pair a two-element array, a file struct any object.
pub trait FromJson: Sized {
    /// True when `value` reads as this type.
    fn fits(value: &Value) -> bool;
    /// Reads `value`, which [`FromJson::fits`].
    fn take(value: Value) -> Self;
}

impl FromJson for f64 {
    fn fits(value: &Value) -> bool {
        value.is_number()
    }
    fn take(value: Value) -> f64 {
        value.as_f64().unwrap_or(0.0)
    }
}

impl FromJson for u32 {
    fn fits(value: &Value) -> bool {
        value.as_u64().is_some_and(|n| u32::try_from(n).is_ok())
    }
    fn take(value: Value) -> u32 {
        value
            .as_u64()
            .and_then(|n| u32::try_from(n).ok())
            .unwrap_or(0)
    }
}

impl FromJson for bool {
    fn fits(value: &Value) -> bool {
        value.is_boolean()
    }
    fn take(value: Value) -> bool {
        value.as_bool().unwrap_or(false)
    }
}

impl FromJson for String {
    fn fits(value: &Value) -> bool {
        value.is_string()
    }
    fn take(value: Value) -> String {
        match value {
            Value::String(s) => s,
            _ => String::new(),
        }
    }
}

/// Any value but `null` (which [`Raw::read`] takes for absent).
impl FromJson for Value {
    fn fits(_: &Value) -> bool {
        true
    }
    fn take(value: Value) -> Value {
        value
    }
}

/// A list: an array whose every element reads.
impl<T: FromJson> FromJson for Vec<T> {
    fn fits(value: &Value) -> bool {
        value.as_array().is_some_and(|a| a.iter().all(T::fits))
    }
    fn take(value: Value) -> Vec<T> {
        match value {
            Value::Array(a) => a.into_iter().map(T::take).collect(),
            _ => Vec::new(),
        }
    }
}

/// A field of a list, which never fails to read: its wrong values are kept.
impl<T: FromJson> FromJson for Raw<T> {
    fn fits(_: &Value) -> bool {
        true
    }
    fn take(value: Value) -> Raw<T> {
        Raw::read(value)
    }
}

/// A pair such as a harmonic's order and fraction: an array of exactly two elements.
impl<A: FromJson, B: FromJson> FromJson for (A, B) {
    fn fits(value: &Value) -> bool {
        matches!(value.as_array().map(Vec::as_slice), Some([a, b]) if A::fits(a) && B::fits(b))
    }
    fn take(value: Value) -> (A, B) {
        let mut items = match value {
            Value::Array(a) => a.into_iter(),
            _ => Vec::new().into_iter(),
        };
        let a = A::take(items.next().unwrap_or(Value::Null));
        let b = B::take(items.next().unwrap_or(Value::Null));
        (a, b)
    }
}

/// Declares a struct of a file's form and its reading from a JSON object. Every field listed is a
/// [`Raw`]; the macro adds `unknown`, the keys the form does not define, kept verbatim so that the
/// file round-trips (validation refuses them). Reading sends each key that names a field to it and
/// every other key to `unknown` (a key spelt `unknown` too). The fields are listed once, so the
/// reader cannot miss one.
///
/// A form that begins with `omit_absent;` leaves its absent fields out when written; the others
/// write them as `null` (the readings and run files, whose every key is shown to the person filling
/// them in).
macro_rules! file_form {
    (
        omit_absent;
        $(#[$meta:meta])*
        pub struct $name:ident {
            $($(#[$field_meta:meta])* pub $field:ident: $ty:ty,)*
        }
    ) => {
        $crate::job::file_form!(@reader $name { $($field)* });
        $(#[$meta])*
        #[derive(Clone, Debug, PartialEq, Default, serde::Serialize)]
        pub struct $name {
            $(
                $(#[$field_meta])*
                #[serde(skip_serializing_if = "crate::job::Raw::is_absent")]
                pub $field: $ty,
            )*
            /// Keys this format does not define, kept so the file round-trips; validation refuses
            /// them.
            #[serde(flatten, skip_serializing_if = "crate::job::Unknown::is_empty")]
            pub unknown: $crate::job::Unknown,
        }
    };
    (
        $(#[$meta:meta])*
        pub struct $name:ident {
            $($(#[$field_meta:meta])* pub $field:ident: $ty:ty,)*
        }
    ) => {
        $crate::job::file_form!(@reader $name { $($field)* });
        $(#[$meta])*
        #[derive(Clone, Debug, PartialEq, Default, serde::Serialize)]
        pub struct $name {
            $($(#[$field_meta])* pub $field: $ty,)*
            /// Keys this format does not define, kept so the file round-trips; validation refuses
            /// them.
            #[serde(flatten, skip_serializing_if = "crate::job::Unknown::is_empty")]
            pub unknown: $crate::job::Unknown,
        }
    };
    (@reader $name:ident { $($field:ident)* }) => {
        impl $crate::job::FromJson for $name {
            fn fits(value: &serde_json::Value) -> bool {
                value.is_object()
            }
            fn take(value: serde_json::Value) -> $name {
                let mut out = $name::default();
                if let serde_json::Value::Object(map) = value {
                    for (key, value) in map {
                        match key.as_str() {
                            $(stringify!($field) => out.$field = $crate::job::Raw::read(value),)*
                            _ => {
                                out.unknown.insert(key, value);
                            }
                        }
                    }
                }
                out
            }
        }
    };
}
pub(crate) use file_form;

file_form! {
    omit_absent;
    /// The whole job file.
    pub struct JobFile {
        pub version: Raw<u32>,
        pub name: Raw<String>,
        pub notes: Raw<String>,
        pub system: Raw<SystemFile>,
        pub transformer: Raw<TransformerFile>,
        pub service: Raw<ServiceFile>,
        pub neutral: Raw<NeutralFile>,
        pub loads: Raw<Vec<Raw<LoadFile>>>,
        /// Shared-neutral (multiwire) branch circuits that loads may name.
        pub multiwire: Raw<Vec<Raw<MultiwireFile>>>,
        /// Meter readings taken on site, one dated set per visit (the first test, the re-test after
        /// a repair). They are kept as typed: the job's solve does not depend on them, and the
        /// diagnosis names any reading it cannot use.
        pub readings: Raw<Vec<Raw<ReadingSetFile>>>,
    }
}

file_form! {
    omit_absent;
    /// One visit's meter readings, dated.
    pub struct ReadingSetFile {
        /// When the set was taken, as the person or the phone's clock wrote it (`2026-12-02 09:40`).
        pub taken: Raw<String>,
        /// What the set was for ("first test", "after tightening the neutral lug").
        pub note: Raw<String>,
        pub meter: Raw<MeterFile>,
        pub readings: Raw<Vec<Raw<ReadingFile>>>,
    }
}

file_form! {
    omit_absent;
    /// A shared-neutral (multiwire) branch circuit: its id and its neutral conductor.
    pub struct MultiwireFile {
        pub id: Raw<String>,
        pub material: Raw<String>,
        pub size: Raw<Value>,
        pub length_m: Raw<f64>,
        pub length_ft: Raw<f64>,
        /// The NEC Table 310.16 temperature column, °C: 60, 75 or 90 (60 if absent).
        pub column_c: Raw<f64>,
    }
}

file_form! {
    omit_absent;
    /// `system`: what the utility delivers at the service.
    pub struct SystemFile {
        pub kind: Raw<String>,
        pub volts_to_neutral: Raw<f64>,
        pub frequency_hz: Raw<f64>,
        pub phases: Raw<u32>,
    }
}

file_form! {
    omit_absent;
    /// `transformer`: the distribution transformer feeding the service.
    pub struct TransformerFile {
        pub kva: Raw<f64>,
        pub primary_v: Raw<f64>,
        pub impedance_pct: Raw<f64>,
        pub x_over_r: Raw<f64>,
        pub tap_pct: Raw<f64>,
        pub supply_v: Raw<f64>,
        /// `single-phase`, `delta-wye` or `wye-wye`.
        pub connection: Raw<String>,
    }
}

file_form! {
    omit_absent;
    /// `service`: the conductors from the transformer to the panel.
    pub struct ServiceFile {
        pub hot: Raw<ConductorFile>,
        pub neutral: Raw<ConductorFile>,
    }
}

file_form! {
    omit_absent;
    /// A conductor run: a table size and length, or an explicit whole-run impedance.
    pub struct ConductorFile {
        pub material: Raw<String>,
        /// A size such as `"12"`, `"4/0"`, `"250"`, `"250 kcmil"` or `"16 mm2"`; a bare number is read too.
        pub size: Raw<Value>,
        pub length_m: Raw<f64>,
        pub length_ft: Raw<f64>,
        pub sets: Raw<u32>,
        pub conduit: Raw<String>,
        pub temperature_c: Raw<f64>,
        pub r_ohm: Raw<f64>,
        pub x_ohm: Raw<f64>,
    }
}

file_form! {
    omit_absent;
    /// `neutral`: the state of the service neutral.
    pub struct NeutralFile {
        pub state: Raw<String>,
        pub ohms: Raw<f64>,
        pub earth_return_ohms: Raw<f64>,
        /// How the state was found on site, in words ("0.35 Ω measured 2026-12-01, neutral lug
        /// warm"): the neutral in a job is the neutral as found, never a what-if.
        pub found: Raw<String>,
    }
}

file_form! {
    omit_absent;
    /// One appliance or load.
    pub struct LoadFile {
        pub name: Raw<String>,
        pub connect: Raw<String>,
        pub model: Raw<String>,
        pub watts: Raw<f64>,
        pub rated_v: Raw<f64>,
        pub power_factor: Raw<f64>,
        pub on: Raw<bool>,
        pub branch: Raw<ConductorFile>,
        pub input_min_v: Raw<f64>,
        pub input_max_v: Raw<f64>,
        pub harmonics: Raw<Vec<(u32, f64)>>,
        pub appliance: Raw<String>,
        pub circuit: Raw<String>,
        pub movable: Raw<bool>,
        pub slot: Raw<u32>,
        /// The id of the shared-neutral branch circuit this load is on.
        pub multiwire: Raw<String>,
        /// A motor's locked-rotor amperes at rated voltage.
        pub locked_rotor_a: Raw<f64>,
        /// A motor's NEC Table 430.7(B) code letter (with `hp`).
        pub code_letter: Raw<String>,
        pub hp: Raw<f64>,
        /// A motor's locked-rotor current as a multiple of its running current.
        pub locked_rotor_multiple: Raw<f64>,
        /// A motor's power factor while starting (locked rotor).
        pub start_pf: Raw<f64>,
        /// True for an appliance planned but not installed yet: kept apart from the job as found,
        /// added only in the plan's "after".
        pub planned: Raw<bool>,
    }
}

file_form! {
    /// The meters' resolution.
    pub struct MeterFile {
        pub volts_resolution: Raw<f64>,
        pub amps_resolution: Raw<f64>,
    }
}

file_form! {
    /// One set of readings.
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
    }
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
    Ok(JobFile::take(value))
}

/// Writes a job file as pretty JSON, the form the app exports.
pub fn job_to_json(job: &JobFile) -> String {
    // Serialising plain data with string keys cannot fail; fall back to an empty object regardless
    // so a caller never sees a panic.
    serde_json::to_string_pretty(job).unwrap_or_else(|_| "{}".to_string())
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    /// Values at the edges of each JSON type a field can hold.
    fn edges() -> Vec<Value> {
        let mut out = vec![
            json!(null),
            json!(true),
            json!(0),
            json!(-0.0),
            json!(3),
            json!(3.0),
            json!(-3),
            json!(4294967295u64),
            json!(4294967296u64),
            json!(u64::MAX),
            json!(i64::MIN),
            json!(1e308),
            json!(2.5e-320),
            json!(""),
            json!("12"),
            json!([]),
            json!({}),
            json!({"a": 1}),
        ];
        let pairs = [
            json!([3, 0.5]),
            json!([3.0, 0.5]),
            json!(["3", 0.5]),
            json!([3]),
            json!([3, 0.5, 1]),
            json!([-1, 0.5]),
        ];
        for p in pairs {
            out.push(json!([p.clone()]));
            out.push(json!([[5, 0.2], p.clone()]));
            out.push(p);
        }
        out
    }

    /// The readers here take exactly what serde_json's own readers of the same types take, and
    /// read the same value from it: serde_json read every job file before these readers did, so
    /// it is the independent model of which values a field accepts.
    #[test]
    fn each_field_type_reads_what_serde_json_reads() {
        fn same<T>(v: &Value)
        where
            T: FromJson + serde::de::DeserializeOwned + PartialEq + std::fmt::Debug,
        {
            let theirs = serde_json::from_value::<T>(v.clone()).ok();
            let ours = T::fits(v).then(|| T::take(v.clone()));
            assert_eq!(ours, theirs, "{v} as {}", std::any::type_name::<T>());
        }
        for v in edges() {
            same::<f64>(&v);
            same::<u32>(&v);
            same::<bool>(&v);
            same::<String>(&v);
            same::<Value>(&v);
            same::<(u32, f64)>(&v);
            same::<Vec<(u32, f64)>>(&v);
        }
    }

    /// A key the form does not define is kept verbatim (one spelt `unknown` too), a value of the
    /// wrong type is kept as it stood, and both survive the round trip.
    #[test]
    fn unknown_keys_and_wrong_values_are_kept() {
        let text = r#"{"version":3.0,"unknown":1,"wats":[2],"system":"split",
            "loads":[{"watts":"x","harmonics":[[3,0.5,1]],"slot":4294967296},7,null]}"#;
        let file = parse_job(text).unwrap();
        assert_eq!(file.version, Raw::Invalid(json!(3.0)));
        assert_eq!(file.unknown.get("unknown"), Some(&json!(1)));
        assert_eq!(file.unknown.get("wats"), Some(&json!([2])));
        assert_eq!(file.system, Raw::Invalid(json!("split")));
        let loads = file.loads.given().unwrap();
        assert_eq!(loads.len(), 3);
        let first = loads[0].given().unwrap();
        assert_eq!(first.watts, Raw::Invalid(json!("x")));
        assert_eq!(first.harmonics, Raw::Invalid(json!([[3, 0.5, 1]])));
        assert_eq!(first.slot, Raw::Invalid(json!(4294967296u64)));
        assert_eq!(loads[1], Raw::Invalid(json!(7)));
        assert_eq!(loads[2], Raw::Absent);
        assert_eq!(parse_job(&job_to_json(&file)).unwrap(), file);
    }
}
