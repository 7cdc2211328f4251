//! Validation: a forgiving [`JobFile`] becomes a [`Job`] that cannot be invalid, or a list of every
//! problem found, each with the JSON path of its field (`loads[2].watts`).
//!
//! Defaults filled here (and nowhere else): system 120 V to neutral at 60 Hz, wye with 3 phases,
//! transformer X/R 1.5, tap 0 %, supply at the primary rating, connection single-phase for a
//! split-phase service and delta-wye for a wye; a service without a neutral conductor gets one like
//! its hots; conductors in PVC at 75 °C (AWG) or 70 °C (metric), one set; a load on, rated at the
//! system's voltage for its connection, power factor 1, movable; a shared-neutral cable in PVC at
//! 75 °C.
//!
//! Every number has a physical minimum and maximum, named in its message; keys the format does not
//! define are refused (see [`crate::fields`]).

use crate::conductors::{Conductor, Conduit, Material, Size, FEET_PER_METRE};
use crate::fields::{Checker, Rule};
use crate::figures::plain;
use crate::job::{ConductorFile, JobFile, LoadFile, NeutralFile, Raw, SystemFile, JOB_VERSION};
use crate::loads::{
    Connection, Load, LockedRotor, LockedRotorBasis, Model, CODE_LETTERS, ELECTRONIC_DEFAULT_RANGE,
    LOCKED_ROTOR_MULTIPLE, LOCKED_ROTOR_PF,
};
use crate::system::{System, SystemKind};
use crate::transformer::{Connection as Winding, Transformer, TAP_STEPS_PCT};
use serde_json::Value;

pub use crate::fields::Problem;
pub use crate::validated::{Job, Multiwire, NeutralState, Service};

/// Largest accepted values: beyond them a number is surely a typo (an extra zero or a unit mix-up).
/// Smallest accepted values: below them a number makes no physical sense for a service (a
/// system of microvolts, a kettle of a billionth of a watt) and would only push the arithmetic
/// towards underflow.
const MAX_VOLTS: f64 = 1000.0;
const SYSTEM_VOLTS: (f64, f64) = (50.0, MAX_VOLTS);
const WATTS: (f64, f64) = (0.1, 1_000_000.0);
const KVA: (f64, f64) = (0.5, 100_000.0);
const PRIMARY_V: (f64, f64) = (100.0, 100_000.0);
const MAX_LENGTH_M: f64 = 100_000.0;
const MAX_OHMS: f64 = 1_000_000.0;
/// An earth path below 0.01 Ω is a conductor, not the earth (common practice, no source).
const EARTH_OHMS: (f64, f64) = (0.01, MAX_OHMS);
/// A load's rating as a fraction of its connection's nominal voltage: outside half to twice
/// nominal the load belongs on another service, and the entry is surely a typo.
const RATED_V_FRACTION: (f64, f64) = (0.5, 2.0);

/// The keys each object of the job format defines (version 1); anything else is refused.
pub const JOB_KEYS: &[&str] = &[
    "version",
    "name",
    "notes",
    "system",
    "transformer",
    "service",
    "neutral",
    "loads",
    "multiwire",
    "readings",
];
/// See [`JOB_KEYS`]: one dated set of readings in a job.
pub const READING_SET_KEYS: &[&str] = &["taken", "note", "meter", "readings"];
/// See [`JOB_KEYS`]: the meters' resolution.
pub const METER_KEYS: &[&str] = &["volts_resolution", "amps_resolution"];
/// See [`JOB_KEYS`]: one reading, in a job's set or a readings file.
pub const READING_KEYS: &[&str] = &[
    "label", "at", "l1_n_v", "l2_n_v", "l1_l2_v", "l1_a", "l2_a", "l1_pf", "l2_pf",
];
/// See [`JOB_KEYS`].
pub const SYSTEM_KEYS: &[&str] = &["kind", "volts_to_neutral", "frequency_hz", "phases"];
/// See [`JOB_KEYS`].
pub const TRANSFORMER_KEYS: &[&str] = &[
    "kva",
    "primary_v",
    "impedance_pct",
    "x_over_r",
    "tap_pct",
    "supply_v",
    "connection",
];
/// See [`JOB_KEYS`].
pub const SERVICE_KEYS: &[&str] = &["hot", "neutral"];
/// See [`JOB_KEYS`].
pub const CONDUCTOR_KEYS: &[&str] = &[
    "material",
    "size",
    "length_m",
    "length_ft",
    "sets",
    "conduit",
    "temperature_c",
    "r_ohm",
    "x_ohm",
];
/// See [`JOB_KEYS`].
pub const NEUTRAL_KEYS: &[&str] = &["state", "ohms", "earth_return_ohms", "found"];
/// See [`JOB_KEYS`].
pub const LOAD_KEYS: &[&str] = &[
    "name",
    "connect",
    "model",
    "watts",
    "rated_v",
    "power_factor",
    "on",
    "branch",
    "input_min_v",
    "input_max_v",
    "harmonics",
    "appliance",
    "circuit",
    "movable",
    "slot",
    "multiwire",
    "locked_rotor_a",
    "code_letter",
    "hp",
    "locked_rotor_multiple",
    "start_pf",
    "planned",
];
/// See [`JOB_KEYS`].
pub const MULTIWIRE_KEYS: &[&str] = &[
    "id",
    "material",
    "size",
    "length_m",
    "length_ft",
    "column_c",
];

/// Validates a job file.
///
/// # Errors
/// Every problem found, in file order, each naming its field's JSON path.
///
/// # Example
/// ```
/// use tapline_core::{job::parse_job, validate::validate};
/// let ok = parse_job(r#"{"version":1,"system":{"kind":"split-phase"},"loads":[]}"#).unwrap();
/// assert!(validate(&ok).is_ok());
/// let bad = parse_job(r#"{"system":{"kind":"split-phase"},"loads":[{"connect":"L1-N","model":"resistive","watts":-5}]}"#).unwrap();
/// let problems = validate(&bad).unwrap_err();
/// assert_eq!(problems[0].path, "loads[0].watts");
/// ```
pub fn validate(file: &JobFile) -> Result<Job, Vec<Problem>> {
    let mut c = Checker::new();
    c.unknown_keys(&file.unknown, "", JOB_KEYS);
    match &file.version {
        Raw::Absent => {}
        Raw::Given(v) if *v == JOB_VERSION => {}
        Raw::Given(v) if *v > JOB_VERSION => c.fail(
            "version",
            format!("job format {v} is newer than this version of tapline reads ({JOB_VERSION})"),
        ),
        _ => c.fail("version", format!("must be {JOB_VERSION}")),
    }
    let name = c
        .text(&file.name, "name")
        .unwrap_or("Untitled job")
        .to_string();
    if name.trim().is_empty() {
        c.fail("name", "must not be empty");
    }
    let _ = c.text(&file.notes, "notes");

    let system = validate_system(&mut c, &file.system);
    let transformer = system.and_then(|s| validate_transformer(&mut c, file, &s));
    let service = system.map(|s| validate_service(&mut c, file, &s));
    let (neutral, earth_ohms) = validate_neutral(&mut c, file);
    let loads = system.map(|s| validate_loads(&mut c, file, &s));
    let multiwire = system
        .map(|s| validate_multiwire(&mut c, file, loads.as_deref().unwrap_or(&[]), &s))
        .unwrap_or_default();
    check_reading_sets(&mut c, file);

    match (system, service, loads) {
        (Some(system), Some(service), Some(loads)) if c.problems.is_empty() => {
            // Planned appliances are kept apart: the job as found is what is installed.
            let (planned, loads): (Vec<Load>, Vec<Load>) =
                loads.into_iter().partition(|l| l.planned);
            Ok(Job {
                name,
                system,
                transformer: transformer.flatten(),
                service,
                neutral,
                earth_ohms,
                loads,
                planned,
                multiwire,
            })
        }
        _ => Err(c.problems),
    }
}

/// Checks the shape of the job's reading sets: a typo in a key is refused like anywhere else, but
/// the readings' numbers are left to the diagnosis, so a half-typed reading never stops the job
/// from solving or being saved.
fn check_reading_sets(c: &mut Checker, file: &JobFile) {
    let sets = match &file.readings {
        Raw::Absent => return,
        Raw::Invalid(_) => {
            c.fail("readings", "must be a list of dated sets of readings");
            return;
        }
        Raw::Given(l) => l,
    };
    for (i, raw) in sets.iter().enumerate() {
        let at = format!("readings[{i}]");
        let Some(set) = c.object(raw, &at) else {
            continue;
        };
        c.unknown_keys(&set.unknown, &at, READING_SET_KEYS);
        let _ = c.text(&set.taken, &format!("{at}.taken"));
        let _ = c.text(&set.note, &format!("{at}.note"));
        if let Some(m) = c.object(&set.meter, &format!("{at}.meter")) {
            c.unknown_keys(&m.unknown, &format!("{at}.meter"), METER_KEYS);
        }
        match &set.readings {
            Raw::Absent => {}
            Raw::Invalid(_) => c.fail(&format!("{at}.readings"), "must be a list of readings"),
            Raw::Given(list) => {
                for (k, r) in list.iter().enumerate() {
                    let path = format!("{at}.readings[{k}]");
                    if let Some(r) = c.object(r, &path) {
                        c.unknown_keys(&r.unknown, &path, READING_KEYS);
                    }
                }
            }
        }
    }
}

/// Validates a `system` object; jobs and readings files share it.
pub fn validate_system(c: &mut Checker, system: &Raw<SystemFile>) -> Option<System> {
    let Some(sys) = c.object(system, "system") else {
        if system.is_absent() {
            c.fail(
                "system",
                "is required: an object with kind split-phase or wye",
            );
        }
        return None;
    };
    c.unknown_keys(&sys.unknown, "system", SYSTEM_KEYS);
    let kind = match c.text(&sys.kind, "system.kind") {
        None if sys.kind.is_absent() => {
            c.fail("system.kind", "is required: split-phase or wye");
            None
        }
        None => None,
        Some(k) => match k.trim().to_ascii_lowercase().as_str() {
            "split-phase" | "split" | "single-phase" => Some(SystemKind::SplitPhase),
            "wye" | "three-phase" => {
                let phases = match &sys.phases {
                    Raw::Absent => Some(3),
                    Raw::Given(p) if *p == 2 || *p == 3 => Some(*p as u8),
                    _ => {
                        c.fail("system.phases", "must be 2 or 3");
                        None
                    }
                };
                phases.map(|phases| SystemKind::Wye { phases })
            }
            other => {
                c.fail(
                    "system.kind",
                    format!("must be split-phase or wye (got {other:?})"),
                );
                None
            }
        },
    };
    let v = c
        .number(
            &sys.volts_to_neutral,
            "system.volts_to_neutral",
            Rule::Between(SYSTEM_VOLTS.0, SYSTEM_VOLTS.1),
        )
        .or(sys.volts_to_neutral.is_absent().then_some(120.0));
    let f = c
        .number(
            &sys.frequency_hz,
            "system.frequency_hz",
            Rule::Between(10.0, 400.0),
        )
        .or(sys.frequency_hz.is_absent().then_some(60.0));
    System::new(kind?, v?, f?)
}

fn validate_transformer(
    c: &mut Checker,
    file: &JobFile,
    system: &System,
) -> Option<Option<Transformer>> {
    if file.transformer.is_absent() {
        return Some(None);
    }
    let t = c.object(&file.transformer, "transformer")?;
    c.unknown_keys(&t.unknown, "transformer", TRANSFORMER_KEYS);
    let kva = c.required_number(&t.kva, "transformer.kva", Rule::Between(KVA.0, KVA.1));
    let primary = c.required_number(
        &t.primary_v,
        "transformer.primary_v",
        Rule::Between(PRIMARY_V.0, PRIMARY_V.1),
    );
    let default_winding = match system.kind() {
        SystemKind::SplitPhase => Winding::SinglePhase,
        SystemKind::Wye { .. } => Winding::DeltaWye,
    };
    let winding = match c.text(&t.connection, "transformer.connection") {
        None => t.connection.is_absent().then_some(default_winding),
        Some(text) => match (Winding::parse(text), system.kind()) {
            (None, _) => {
                c.fail(
                    "transformer.connection",
                    format!("must be single-phase, delta-wye or wye-wye (got {text:?})"),
                );
                None
            }
            (Some(Winding::SinglePhase), SystemKind::SplitPhase) => Some(Winding::SinglePhase),
            (Some(Winding::SinglePhase), SystemKind::Wye { .. }) => {
                c.fail(
                    "transformer.connection",
                    "a wye service is fed by a three-phase connection: delta-wye or wye-wye",
                );
                None
            }
            (Some(_), SystemKind::SplitPhase) => {
                c.fail(
                    "transformer.connection",
                    "a split-phase service is fed by a single-phase, center-tapped transformer",
                );
                None
            }
            (Some(w), SystemKind::Wye { .. }) => Some(w),
        },
    };
    let z = c.required_number(
        &t.impedance_pct,
        "transformer.impedance_pct",
        Rule::Between(0.1, 25.0),
    );
    let xr = c
        .number(
            &t.x_over_r,
            "transformer.x_over_r",
            Rule::Between(0.0, 100.0),
        )
        .or(t.x_over_r.is_absent().then_some(1.5));
    let tap = match &t.tap_pct {
        Raw::Absent => Some(0.0),
        Raw::Given(v) if TAP_STEPS_PCT.iter().any(|s| (s - v).abs() < 1e-9) => Some(*v),
        _ => {
            c.fail("transformer.tap_pct", "must be one of -5, -2.5, 0, 2.5, 5");
            None
        }
    };
    let supply = c
        .number(
            &t.supply_v,
            "transformer.supply_v",
            Rule::Between(PRIMARY_V.0 / 2.0, PRIMARY_V.1 * 1.5),
        )
        .or(t.supply_v.is_absent().then_some(primary?));
    if let (Some(p), Some(s)) = (primary, supply) {
        if s < 0.5 * p || s > 1.5 * p {
            c.fail(
                "transformer.supply_v",
                format!("must be within 50 % of primary_v ({} V)", plain(p)),
            );
            return None;
        }
        if p <= system.volts_line_to_line() {
            c.fail(
                "transformer.primary_v",
                format!(
                    "must be above the secondary's {} V",
                    plain(system.volts_line_to_line())
                ),
            );
            return None;
        }
    }
    Some(Transformer::new(
        kva?, primary?, z?, xr?, tap?, supply?, winding?,
    ))
}

fn validate_service(c: &mut Checker, file: &JobFile, system: &System) -> Service {
    let ideal = Service {
        hot: Conductor::ideal(),
        neutral: Conductor::ideal(),
    };
    let Some(s) = c.object(&file.service, "service") else {
        return ideal;
    };
    c.unknown_keys(&s.unknown, "service", SERVICE_KEYS);
    let hot = match &s.hot {
        Raw::Absent => Some(Conductor::ideal()),
        raw => c
            .object(raw, "service.hot")
            .and_then(|h| validate_conductor(c, h, "service.hot", system)),
    };
    let neutral = match &s.neutral {
        Raw::Absent => hot,
        raw => c
            .object(raw, "service.neutral")
            .and_then(|n| validate_conductor(c, n, "service.neutral", system)),
    };
    Service {
        hot: hot.unwrap_or(ideal.hot),
        neutral: neutral.unwrap_or(ideal.neutral),
    }
}

/// Validates a conductor given either by table size and length or by explicit impedance.
fn validate_conductor(
    c: &mut Checker,
    f: &ConductorFile,
    path: &str,
    system: &System,
) -> Option<Conductor> {
    c.unknown_keys(&f.unknown, path, CONDUCTOR_KEYS);
    let explicit = !f.r_ohm.is_absent() || !f.x_ohm.is_absent();
    let tabled = !f.material.is_absent() || !f.size.is_absent();
    if explicit && tabled {
        c.fail(
            &format!("{path}.r_ohm"),
            "give either r_ohm/x_ohm or material/size/length, not both",
        );
        return None;
    }
    if explicit {
        let r = c
            .number(
                &f.r_ohm,
                &format!("{path}.r_ohm"),
                Rule::NonNegative(1000.0),
            )
            .or(f.r_ohm.is_absent().then_some(0.0));
        let x = c
            .number(
                &f.x_ohm,
                &format!("{path}.x_ohm"),
                Rule::NonNegative(1000.0),
            )
            .or(f.x_ohm.is_absent().then_some(0.0));
        return Some(Conductor::explicit(r?, x?));
    }
    let material = match c.text(&f.material, &format!("{path}.material")) {
        Some(m) => Material::parse(m).or_else(|| {
            c.fail(&format!("{path}.material"), "must be cu or al");
            None
        }),
        None => {
            if f.material.is_absent() {
                c.fail(&format!("{path}.material"), "is required: cu or al");
            }
            None
        }
    };
    let size_text = match &f.size {
        Raw::Absent => {
            c.fail(
                &format!("{path}.size"),
                "is required: for example 12, 4/0, 250 or 16 mm2",
            );
            None
        }
        Raw::Given(Value::String(s)) => Some(s.clone()),
        Raw::Given(Value::Number(n)) => Some(n.to_string()),
        _ => {
            c.fail(
                &format!("{path}.size"),
                "must be a size such as 12, 4/0, 250 or 16 mm2",
            );
            None
        }
    };
    let size = size_text.and_then(|t| {
        Size::parse(&t).or_else(|| {
            c.fail(
                &format!("{path}.size"),
                format!("{t:?} is not a known size (14 AWG to 1000 kcmil, or IEC 60228 mm²)"),
            );
            None
        })
    });
    let length_ft = match (&f.length_m, &f.length_ft) {
        (Raw::Absent, Raw::Absent) => {
            c.fail(&format!("{path}.length_m"), "is required (or length_ft)");
            None
        }
        (m, Raw::Absent) => c
            .number(
                m,
                &format!("{path}.length_m"),
                Rule::NonNegative(MAX_LENGTH_M),
            )
            .map(|m| m * FEET_PER_METRE),
        (Raw::Absent, ft) => c.number(
            ft,
            &format!("{path}.length_ft"),
            Rule::NonNegative(MAX_LENGTH_M * FEET_PER_METRE),
        ),
        _ => {
            c.fail(
                &format!("{path}.length_ft"),
                "give length_m or length_ft, not both",
            );
            None
        }
    };
    let sets = match &f.sets {
        Raw::Absent => Some(1),
        Raw::Given(n) if (1..=20).contains(n) => Some(*n),
        _ => {
            c.fail(
                &format!("{path}.sets"),
                "must be a whole number from 1 to 20",
            );
            None
        }
    };
    let conduit = match c.text(&f.conduit, &format!("{path}.conduit")) {
        None => f.conduit.is_absent().then_some(Conduit::Pvc),
        Some(t) => Conduit::parse(t).or_else(|| {
            c.fail(&format!("{path}.conduit"), "must be pvc, aluminum or steel");
            None
        }),
    };
    let default_temp = match size {
        Some(Size::Metric(_)) => 70.0,
        _ => 75.0,
    };
    let temp = c
        .number(
            &f.temperature_c,
            &format!("{path}.temperature_c"),
            Rule::Between(-40.0, 150.0),
        )
        .or(f.temperature_c.is_absent().then_some(default_temp));
    let (material, size) = (material?, size?);
    match Conductor::from_table(
        material,
        size,
        conduit?,
        length_ft?,
        sets?,
        temp?,
        system.frequency_hz(),
    ) {
        Ok(cond) => Some(cond),
        Err(e) => {
            c.fail(&format!("{path}.size"), e.to_string());
            None
        }
    }
}

/// The neutral's state and the earth path beside it (in any state).
fn validate_neutral(c: &mut Checker, file: &JobFile) -> (NeutralState, Option<f64>) {
    let Some(n) = c.object(&file.neutral, "neutral") else {
        return (NeutralState::Intact, None);
    };
    c.unknown_keys(&n.unknown, "neutral", NEUTRAL_KEYS);
    let earth = c.number(
        &n.earth_return_ohms,
        "neutral.earth_return_ohms",
        Rule::Between(EARTH_OHMS.0, EARTH_OHMS.1),
    );
    c.text(&n.found, "neutral.found");
    (neutral_state(c, n), earth)
}

/// The state and loose resistance of a neutral (`neutral.state`, `neutral.ohms`).
fn neutral_state(c: &mut Checker, n: &NeutralFile) -> NeutralState {
    let state = match c.text(&n.state, "neutral.state") {
        None => "intact".to_string(),
        Some(s) => s.trim().to_ascii_lowercase(),
    };
    match state.as_str() {
        "intact" => NeutralState::Intact,
        "loose" => match c.required_number(&n.ohms, "neutral.ohms", Rule::NonNegative(MAX_OHMS)) {
            Some(ohms) => NeutralState::Loose { ohms },
            None => NeutralState::Intact,
        },
        "open" => NeutralState::Open,
        other => {
            c.fail(
                "neutral.state",
                format!("must be intact, loose or open (got {other:?})"),
            );
            NeutralState::Intact
        }
    }
}

/// A neutral state to explore (the app's what-if), checked by the same rules as a job's
/// `neutral.state` and `neutral.ohms`; the job's own neutral and earth path are not touched.
///
/// # Errors
/// The problems found, at `neutral.state` or `neutral.ohms`.
pub fn what_if_neutral(n: &NeutralFile) -> Result<NeutralState, Vec<Problem>> {
    let mut c = Checker::new();
    let state = neutral_state(&mut c, n);
    if c.problems.is_empty() {
        Ok(state)
    } else {
        Err(c.problems)
    }
}

fn validate_loads(c: &mut Checker, file: &JobFile, system: &System) -> Vec<Load> {
    let list = match &file.loads {
        Raw::Absent => return Vec::new(),
        Raw::Invalid(_) => {
            c.fail("loads", "must be a list of loads");
            return Vec::new();
        }
        Raw::Given(list) => list,
    };
    list.iter()
        .enumerate()
        .filter_map(|(i, raw)| {
            let path = format!("loads[{i}]");
            let lf = c.object(raw, &path).or_else(|| {
                if raw.is_absent() {
                    c.fail(&path, "must be an object");
                }
                None
            })?;
            validate_load(c, lf, &path, i, system)
        })
        .collect()
}

fn validate_load(
    c: &mut Checker,
    f: &LoadFile,
    path: &str,
    index: usize,
    system: &System,
) -> Option<Load> {
    let p = |field: &str| format!("{path}.{field}");
    c.unknown_keys(&f.unknown, path, LOAD_KEYS);
    let name = match c.text(&f.name, &p("name")) {
        Some(n) if n.trim().is_empty() => {
            c.fail(&p("name"), "must not be empty");
            None
        }
        Some(n) => Some(n.trim().to_string()),
        None => f.name.is_absent().then(|| format!("Load {}", index + 1)),
    };
    let connection = match c.text(&f.connect, &p("connect")) {
        None => {
            if f.connect.is_absent() {
                c.fail(
                    &p("connect"),
                    "is required: L1-N, L2-N, L3-N, L1-L2, L2-L3 or L3-L1",
                );
            }
            None
        }
        Some(t) => match Connection::parse(t) {
            None => {
                c.fail(
                    &p("connect"),
                    format!("must be L1-N, L2-N, L3-N, L1-L2, L2-L3 or L3-L1 (got {t:?})"),
                );
                None
            }
            Some(conn) => {
                let missing = conn.legs().into_iter().find(|l| !system.has_leg(*l));
                if let Some(l) = missing {
                    c.fail(
                        &p("connect"),
                        format!("{} is not a leg of a {}", l.name(), system.label()),
                    );
                    None
                } else {
                    Some(conn)
                }
            }
        },
    };
    let model_name = match c.text(&f.model, &p("model")) {
        None => {
            if f.model.is_absent() {
                c.fail(
                    &p("model"),
                    "is required: resistive, impedance, lamp, motor or electronic",
                );
            }
            None
        }
        Some(m) => {
            let m = m.trim().to_ascii_lowercase();
            if ["resistive", "impedance", "lamp", "motor", "electronic"].contains(&m.as_str()) {
                Some(m)
            } else {
                c.fail(
                    &p("model"),
                    format!("must be resistive, impedance, lamp, motor or electronic (got {m:?})"),
                );
                None
            }
        }
    };
    let watts = c.required_number(&f.watts, &p("watts"), Rule::Between(WATTS.0, WATTS.1));
    let default_v = connection.map(|conn| match conn {
        Connection::ToNeutral(_) => system.volts_to_neutral(),
        Connection::Across(..) => system.volts_line_to_line(),
    });
    let rated_rule = match default_v {
        Some(nominal) => Rule::Between(
            RATED_V_FRACTION.0 * nominal,
            (RATED_V_FRACTION.1 * nominal).min(MAX_VOLTS),
        ),
        None => Rule::Between(RATED_V_FRACTION.0 * SYSTEM_VOLTS.0, MAX_VOLTS),
    };
    let rated_v = c
        .number(&f.rated_v, &p("rated_v"), rated_rule)
        .or(if f.rated_v.is_absent() {
            default_v
        } else {
            None
        });
    let pf = c
        .number(
            &f.power_factor,
            &p("power_factor"),
            Rule::Between(0.05, 1.0),
        )
        .or(f.power_factor.is_absent().then_some(1.0));
    if let (Some(m), Some(pfv)) = (&model_name, pf) {
        if (m == "resistive" || m == "lamp") && pfv < 1.0 {
            c.fail(
                &p("power_factor"),
                format!("a {m} load has power factor 1; use model impedance for a lagging load"),
            );
        }
    }
    let on = c.flag(&f.on, &p("on")).unwrap_or(true);
    let movable = c.flag(&f.movable, &p("movable")).unwrap_or(true);
    let circuit = c
        .text(&f.circuit, &p("circuit"))
        .map(|s| s.trim().to_string());
    let slot = match &f.slot {
        Raw::Absent => None,
        Raw::Given(s) if (1..=84).contains(s) => Some(*s),
        _ => {
            c.fail(&p("slot"), "must be a breaker position from 1 to 84");
            None
        }
    };
    let _ = c.text(&f.appliance, &p("appliance"));
    let multiwire = c
        .text(&f.multiwire, &p("multiwire"))
        .map(|s| s.trim().to_string());
    // A member of a shared-neutral circuit returns through the circuit's shared neutral, which
    // the network holds as its own branch, so its branch is its hot conductor alone.
    let shared = matches!(&f.multiwire, Raw::Given(id) if !id.trim().is_empty());
    let branch = match &f.branch {
        Raw::Absent => Some(None),
        raw => c
            .object(raw, &p("branch"))
            .and_then(|b| validate_conductor(c, b, &p("branch"), system))
            .map(|cond| {
                let z = cond.impedance();
                // The branch is given one way; the loop is the outgoing and the return conductor.
                let k = if shared { 1.0 } else { 2.0 };
                Some(Conductor::explicit(k * z.re, k * z.im))
            }),
    };
    let harmonics = match &f.harmonics {
        Raw::Absent => Some(Vec::new()),
        Raw::Invalid(_) => {
            c.fail(&p("harmonics"), "must be a list of [order, fraction] pairs");
            None
        }
        Raw::Given(list) => {
            let mut ok = true;
            for (k, (order, frac)) in list.iter().enumerate() {
                if *order < 2 || *order > 49 {
                    c.fail(
                        &format!("{path}.harmonics[{k}][0]"),
                        "must be a harmonic order from 2 to 49",
                    );
                    ok = false;
                }
                if !(frac.is_finite() && (0.0..=2.0).contains(frac)) {
                    c.fail(
                        &format!("{path}.harmonics[{k}][1]"),
                        "must be a fraction of the fundamental from 0 to 2",
                    );
                    ok = false;
                }
            }
            ok.then(|| list.clone())
        }
    };
    let model = match (model_name.as_deref(), rated_v) {
        (Some("resistive"), _) => Some(Model::Resistive),
        (Some("impedance"), _) => Some(Model::Impedance),
        (Some("lamp"), _) => Some(Model::Lamp),
        (Some("motor"), _) => Some(Model::Motor),
        (Some("electronic"), Some(vr)) => {
            let lo = c
                .number(
                    &f.input_min_v,
                    &p("input_min_v"),
                    Rule::Between(1.0, MAX_VOLTS),
                )
                .or(f
                    .input_min_v
                    .is_absent()
                    .then_some(ELECTRONIC_DEFAULT_RANGE.0 * vr));
            let hi = c
                .number(
                    &f.input_max_v,
                    &p("input_max_v"),
                    Rule::Between(1.0, MAX_VOLTS),
                )
                .or(f
                    .input_max_v
                    .is_absent()
                    .then_some(ELECTRONIC_DEFAULT_RANGE.1 * vr));
            match (lo, hi) {
                (Some(lo), Some(hi)) if lo < vr && vr < hi => Some(Model::Electronic {
                    min_v: lo,
                    max_v: hi,
                }),
                (Some(_), Some(_)) => {
                    c.fail(
                        &p("input_min_v"),
                        format!("the input range must contain rated_v ({} V)", plain(vr)),
                    );
                    None
                }
                _ => None,
            }
        }
        _ => None,
    };
    if !matches!(model, Some(Model::Electronic { .. }))
        && (!f.input_min_v.is_absent() || !f.input_max_v.is_absent())
        && model.is_some()
    {
        c.fail(
            &p("input_min_v"),
            "only an electronic load has an input range",
        );
    }
    let locked_rotor = match (&model, rated_v, pf, watts) {
        (Some(Model::Motor), Some(vr), Some(pf), Some(w)) => {
            locked_rotor(c, f, path, vr, w / (pf * vr))
        }
        _ => {
            for (raw_absent, field) in [
                (f.locked_rotor_a.is_absent(), "locked_rotor_a"),
                (f.code_letter.is_absent(), "code_letter"),
                (f.hp.is_absent(), "hp"),
                (f.locked_rotor_multiple.is_absent(), "locked_rotor_multiple"),
                (f.start_pf.is_absent(), "start_pf"),
            ] {
                if !raw_absent && model.is_some() {
                    c.fail(&p(field), "only a motor has a starting draw");
                }
            }
            Some(None)
        }
    };
    Some(Load {
        locked_rotor: locked_rotor?,
        name: name?,
        connection: connection?,
        model: model?,
        rated_w: watts?,
        rated_v: rated_v?,
        power_factor: pf?,
        on,
        branch: branch?,
        harmonics: harmonics?,
        circuit,
        movable,
        slot,
        multiwire,
        file_index: index,
        planned: c.flag(&f.planned, &p("planned")).unwrap_or(false),
    })
}

/// A motor's locked-rotor draw from whichever of its three forms the job gives (at most one).
fn locked_rotor(
    c: &mut Checker,
    f: &LoadFile,
    path: &str,
    rated_v: f64,
    running_a: f64,
) -> Option<Option<LockedRotor>> {
    let p = |field: &str| format!("{path}.{field}");
    let pf = c
        .number(&f.start_pf, &p("start_pf"), Rule::Between(0.05, 1.0))
        .or(f.start_pf.is_absent().then_some(LOCKED_ROTOR_PF))?;
    let given = [
        !f.locked_rotor_a.is_absent(),
        !f.code_letter.is_absent() || !f.hp.is_absent(),
        !f.locked_rotor_multiple.is_absent(),
    ];
    if given.iter().filter(|g| **g).count() > 1 {
        c.fail(
            &p("locked_rotor_a"),
            "give one of locked_rotor_a, code_letter with hp, or locked_rotor_multiple",
        );
        return None;
    }
    let (amps, basis) = if given[0] {
        let a = c.number(
            &f.locked_rotor_a,
            &p("locked_rotor_a"),
            Rule::Between(running_a, 50.0 * running_a.max(1.0)),
        )?;
        (a, LockedRotorBasis::Given)
    } else if given[1] {
        let letter = c
            .text(&f.code_letter, &p("code_letter"))
            .map(|t| t.trim().to_ascii_uppercase());
        let kva_per_hp = match letter.as_deref().and_then(|t| {
            let ch = t.chars().next()?;
            (t.len() == 1).then_some(ch)
        }) {
            Some(ch) => CODE_LETTERS
                .iter()
                .find(|(l, _)| *l == ch && ch != '-')
                .map(|(l, k)| (*l, *k)),
            None => None,
        };
        let Some((letter, kva)) = kva_per_hp else {
            c.fail(
                &p("code_letter"),
                "is required with hp: a letter A to V (NEC Table 430.7(B); no I, O or Q)",
            );
            return None;
        };
        let hp = c.required_number(&f.hp, &p("hp"), Rule::Between(0.05, 500.0))?;
        (
            kva * hp * 1000.0 / rated_v,
            LockedRotorBasis::CodeLetter { letter, hp },
        )
    } else {
        let m = c
            .number(
                &f.locked_rotor_multiple,
                &p("locked_rotor_multiple"),
                Rule::Between(1.0, 12.0),
            )
            .or(f
                .locked_rotor_multiple
                .is_absent()
                .then_some(LOCKED_ROTOR_MULTIPLE))?;
        (m * running_a, LockedRotorBasis::Multiple(m))
    };
    Some(Some(LockedRotor {
        amps,
        power_factor: pf,
        basis,
    }))
}

fn validate_multiwire(
    c: &mut Checker,
    file: &JobFile,
    loads: &[Load],
    system: &System,
) -> Vec<Multiwire> {
    let list = match &file.multiwire {
        Raw::Absent => Vec::new(),
        Raw::Invalid(_) => {
            c.fail("multiwire", "must be a list of shared-neutral circuits");
            Vec::new()
        }
        Raw::Given(l) => l.clone(),
    };
    let mut out: Vec<Multiwire> = Vec::new();
    for (i, raw) in list.iter().enumerate() {
        let path = |f: &str| format!("multiwire[{i}].{f}");
        let Some(m) = c.object(raw, &format!("multiwire[{i}]")) else {
            continue;
        };
        c.unknown_keys(&m.unknown, &format!("multiwire[{i}]"), MULTIWIRE_KEYS);
        let id = match c.text(&m.id, &path("id")) {
            Some(id) if !id.trim().is_empty() => Some(id.trim().to_string()),
            _ => {
                c.fail(&path("id"), "is required: a name the loads refer to");
                None
            }
        };
        let material = match c.text(&m.material, &path("material")) {
            Some(t) => Material::parse(t).or_else(|| {
                c.fail(&path("material"), "must be cu or al");
                None
            }),
            None => m.material.is_absent().then_some(Material::Copper),
        };
        let size = match &m.size {
            Raw::Given(Value::String(s)) => Size::parse(s),
            Raw::Given(Value::Number(n)) => Size::parse(&n.to_string()),
            _ => None,
        };
        let size = match size {
            Some(Size::Awg(row)) => Some(row),
            _ => {
                c.fail(&path("size"), "must be an AWG size such as 14, 12 or 10");
                None
            }
        };
        let column = c
            .number(&m.column_c, &path("column_c"), Rule::Between(60.0, 90.0))
            .or(m.column_c.is_absent().then_some(60.0));
        if let Some(col) = column {
            if ![60.0, 75.0, 90.0].contains(&col) {
                c.fail(&path("column_c"), "must be 60, 75 or 90");
            }
        }
        let length_ft = match (&m.length_m, &m.length_ft) {
            (Raw::Absent, Raw::Absent) => Some(None),
            (l, Raw::Absent) => c
                .number(l, &path("length_m"), Rule::NonNegative(MAX_LENGTH_M))
                .map(|m| Some(m * FEET_PER_METRE)),
            (Raw::Absent, l) => c
                .number(
                    l,
                    &path("length_ft"),
                    Rule::NonNegative(MAX_LENGTH_M * FEET_PER_METRE),
                )
                .map(Some),
            _ => {
                c.fail(&path("length_ft"), "give length_m or length_ft, not both");
                None
            }
        };
        if let (Some(id), Some(material), Some(row), Some(col), Some(length_ft)) =
            (id, material, size, column, length_ft)
        {
            if out.iter().any(|o| o.id == id) {
                c.fail(&path("id"), format!("{id:?} is used twice"));
                continue;
            }
            let conductor = match Conductor::from_table(
                material,
                Size::Awg(row),
                Conduit::Pvc,
                length_ft.unwrap_or(0.0),
                1,
                75.0,
                system.frequency_hz(),
            ) {
                Ok(cond) => cond,
                Err(e) => {
                    c.fail(&path("size"), e.to_string());
                    continue;
                }
            };
            out.push(Multiwire {
                id,
                material,
                size_label: Size::Awg(row).label(),
                ampacity_a: crate::conductors::ampacity::ampacity(material, row.size, col),
                column_c: col,
                conductor,
                has_length: length_ft.is_some(),
            });
        }
    }
    for (i, load) in loads.iter().enumerate() {
        if let Some(id) = load.multiwire() {
            if !out.iter().any(|m| m.id == id) {
                c.fail(
                    &format!("loads[{i}].multiwire"),
                    format!("{id:?} is not listed under multiwire"),
                );
            } else if matches!(load.connection(), Connection::Across(..)) {
                c.fail(
                    &format!("loads[{i}].multiwire"),
                    "a load across two legs does not use the shared neutral",
                );
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn neutral(state: &str, ohms: Raw<f64>) -> NeutralFile {
        NeutralFile {
            state: Raw::Given(state.to_string()),
            ohms,
            ..NeutralFile::default()
        }
    }

    #[test]
    fn a_what_if_neutral_is_checked_by_the_job_rules() {
        assert_eq!(
            what_if_neutral(&neutral("loose", Raw::Given(2.5))),
            Ok(NeutralState::Loose { ohms: 2.5 })
        );
        assert_eq!(
            what_if_neutral(&neutral("open", Raw::Absent)),
            Ok(NeutralState::Open)
        );
        let p = what_if_neutral(&neutral("loose", Raw::Given(-1.0))).unwrap_err();
        assert_eq!(p[0].path, "neutral.ohms");
        assert_eq!(p[0].message, "must be a number from 0 to 1000000 (got -1)");
        let p = what_if_neutral(&neutral("loose", Raw::Absent)).unwrap_err();
        assert_eq!(p[0].path, "neutral.ohms");
        let p = what_if_neutral(&neutral("lose", Raw::Absent)).unwrap_err();
        assert_eq!(p[0].path, "neutral.state");
    }

    #[test]
    fn how_the_neutral_was_found_is_kept_and_must_be_text() {
        let mut file = crate::job::parse_job(crate::demo::DEMO_JOB).unwrap();
        let mut n = file.neutral.given().cloned().unwrap_or_default();
        n.found = Raw::Given("0.35 Ω measured at the meter base".to_string());
        file.neutral = Raw::Given(n.clone());
        assert!(validate(&file).is_ok());
        let text = crate::job::job_to_json(&file);
        assert!(text.contains("\"found\""), "{text}");
        n.found = Raw::Invalid(Value::from(3));
        file.neutral = Raw::Given(n);
        let p = validate(&file).unwrap_err();
        assert!(p.iter().any(|p| p.path == "neutral.found"), "{p:?}");
    }
}
