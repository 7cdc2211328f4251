//! Validation: a forgiving [`JobFile`] becomes a [`Job`] that cannot be invalid, or a list of every
//! problem found, each with the JSON path of its field (`loads[2].watts`).
//!
//! Defaults filled here (and nowhere else): system 120 V to neutral at 60 Hz, wye with 3 phases,
//! transformer X/R 1.5, tap 0 %, supply at the primary rating; a service without a neutral conductor
//! gets one like its hots; conductors in PVC at 75 °C (AWG) or 70 °C (metric), one set; a load on,
//! rated at the system's voltage for its connection, power factor 1, movable.

use crate::conductors::{Conductor, Conduit, Material, Size, FEET_PER_METRE};
use crate::job::{ConductorFile, JobFile, LoadFile, Raw, JOB_VERSION};
use crate::loads::{Connection, Load, Model, ELECTRONIC_DEFAULT_RANGE};
use crate::system::{System, SystemKind};
use crate::transformer::{Transformer, TAP_STEPS_PCT};
use serde_json::Value;

/// One problem with the input: the JSON path of the field and what is wrong, lowercase.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Problem {
    pub path: String,
    pub message: String,
}

impl std::fmt::Display for Problem {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}: {}", self.path, self.message)
    }
}

/// The state of the service neutral between the panel and the transformer.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum NeutralState {
    /// Connected through its conductor.
    Intact,
    /// Connected through its conductor plus a series resistance at the service (a loose or
    /// corroded lug or splice), ohms ≥ 0.
    Loose { ohms: f64 },
    /// Broken. The panel neutral may still reach the transformer through the grounding electrode
    /// and the earth, a resistance in ohms > 0.
    Open { earth_return_ohms: Option<f64> },
}

impl NeutralState {
    /// `intact`, `loose` or `open`.
    pub fn code(self) -> &'static str {
        match self {
            NeutralState::Intact => "intact",
            NeutralState::Loose { .. } => "loose",
            NeutralState::Open { .. } => "open",
        }
    }
}

/// The service conductors (one run for each hot leg, one for the neutral).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Service {
    pub hot: Conductor,
    pub neutral: Conductor,
}

/// A validated job: everything the network builder needs, with no invalid value possible.
#[derive(Clone, Debug, PartialEq)]
pub struct Job {
    pub(crate) name: String,
    pub(crate) system: System,
    pub(crate) transformer: Option<Transformer>,
    pub(crate) service: Service,
    pub(crate) neutral: NeutralState,
    pub(crate) loads: Vec<Load>,
    pub(crate) multiwire: Vec<Multiwire>,
}

/// A validated shared-neutral branch circuit.
#[derive(Clone, Debug, PartialEq)]
pub struct Multiwire {
    pub id: String,
    pub material: Material,
    /// The size's label (`12 AWG`).
    pub size_label: String,
    /// NEC Table 310.16 ampacity at the chosen column; `None` for sizes the table lacks.
    pub ampacity_a: Option<f64>,
    pub column_c: f64,
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
    pub fn loads(&self) -> &[Load] {
        &self.loads
    }
    pub fn multiwire(&self) -> &[Multiwire] {
        &self.multiwire
    }

    /// The same job with another neutral state (for the what-if and the sweep).
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

/// Largest accepted values: beyond them a number is surely a typo (an extra zero or a unit mix-up).
const MAX_VOLTS: f64 = 1000.0;
const MAX_WATTS: f64 = 1_000_000.0;
const MAX_KVA: f64 = 100_000.0;
const MAX_PRIMARY_V: f64 = 100_000.0;
const MAX_LENGTH_M: f64 = 100_000.0;
const MAX_OHMS: f64 = 1_000_000.0;

/// Collects problems while walking a file (jobs here; readings in [`crate::tools::diagnose`]).
pub(crate) struct Checker {
    pub(crate) problems: Vec<Problem>,
}

/// What a number must be.
#[derive(Clone, Copy)]
pub(crate) enum Rule {
    /// Finite, > 0 and ≤ max.
    Positive(f64),
    /// Finite, ≥ 0 and ≤ max.
    NonNegative(f64),
    /// Finite, lo ≤ x ≤ hi.
    Between(f64, f64),
}

impl Checker {
    pub(crate) fn fail(&mut self, path: &str, message: impl Into<String>) {
        self.problems.push(Problem {
            path: path.to_string(),
            message: message.into(),
        });
    }

    pub(crate) fn number(&mut self, raw: &Raw<f64>, path: &str, rule: Rule) -> Option<f64> {
        let v = match raw {
            Raw::Absent => return None,
            Raw::Invalid(_) => {
                self.fail(path, rule_message(rule));
                return None;
            }
            Raw::Given(v) => *v,
        };
        let ok = v.is_finite()
            && match rule {
                Rule::Positive(max) => v > 0.0 && v <= max,
                Rule::NonNegative(max) => (0.0..=max).contains(&v),
                Rule::Between(lo, hi) => (lo..=hi).contains(&v),
            };
        if ok {
            Some(v)
        } else {
            self.fail(path, format!("{} (got {v})", rule_message(rule)));
            None
        }
    }

    pub(crate) fn required_number(
        &mut self,
        raw: &Raw<f64>,
        path: &str,
        rule: Rule,
    ) -> Option<f64> {
        if raw.is_absent() {
            self.fail(
                path,
                format!(
                    "is required: {}",
                    rule_message(rule).trim_start_matches("must be ")
                ),
            );
            return None;
        }
        self.number(raw, path, rule)
    }

    pub(crate) fn text<'a>(&mut self, raw: &'a Raw<String>, path: &str) -> Option<&'a str> {
        match raw {
            Raw::Absent => None,
            Raw::Invalid(_) => {
                self.fail(path, "must be text");
                None
            }
            Raw::Given(s) => Some(s.as_str()),
        }
    }

    pub(crate) fn flag(&mut self, raw: &Raw<bool>, path: &str) -> Option<bool> {
        match raw {
            Raw::Absent => None,
            Raw::Invalid(_) => {
                self.fail(path, "must be true or false");
                None
            }
            Raw::Given(b) => Some(*b),
        }
    }

    pub(crate) fn object<'a, T>(&mut self, raw: &'a Raw<T>, path: &str) -> Option<&'a T> {
        match raw {
            Raw::Absent => None,
            Raw::Invalid(_) => {
                self.fail(path, "must be an object");
                None
            }
            Raw::Given(v) => Some(v),
        }
    }
}

fn rule_message(rule: Rule) -> String {
    match rule {
        Rule::Positive(max) => format!("must be a positive number up to {max}"),
        Rule::NonNegative(max) => format!("must be a number from 0 to {max}"),
        Rule::Between(lo, hi) => format!("must be a number from {lo} to {hi}"),
    }
}

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
    let mut c = Checker {
        problems: Vec::new(),
    };
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

    let system = validate_system(&mut c, file);
    let transformer = system.and_then(|s| validate_transformer(&mut c, file, &s));
    let service = system.map(|s| validate_service(&mut c, file, &s));
    let neutral = validate_neutral(&mut c, file);
    let loads = system.map(|s| validate_loads(&mut c, file, &s));
    let multiwire = validate_multiwire(&mut c, file, loads.as_deref().unwrap_or(&[]));

    match (system, service, loads) {
        (Some(system), Some(service), Some(loads)) if c.problems.is_empty() => Ok(Job {
            name,
            system,
            transformer: transformer.flatten(),
            service,
            neutral,
            loads,
            multiwire,
        }),
        _ => Err(c.problems),
    }
}

pub(crate) fn validate_system_raw(
    c: &mut Checker,
    system: &Raw<crate::job::SystemFile>,
) -> Option<System> {
    let file = JobFile {
        system: system.clone(),
        ..JobFile::default()
    };
    validate_system(c, &file)
}

fn validate_system(c: &mut Checker, file: &JobFile) -> Option<System> {
    let Some(sys) = c.object(&file.system, "system") else {
        if file.system.is_absent() {
            c.fail(
                "system",
                "is required: an object with kind split-phase or wye",
            );
        }
        return None;
    };
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
            Rule::Positive(MAX_VOLTS),
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
    let kva = c.required_number(&t.kva, "transformer.kva", Rule::Positive(MAX_KVA));
    let primary = c.required_number(
        &t.primary_v,
        "transformer.primary_v",
        Rule::Positive(MAX_PRIMARY_V),
    );
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
            Rule::Positive(MAX_PRIMARY_V),
        )
        .or(t.supply_v.is_absent().then_some(primary?));
    if let (Some(p), Some(s)) = (primary, supply) {
        if s < 0.5 * p || s > 1.5 * p {
            c.fail(
                "transformer.supply_v",
                format!("must be within 50 % of primary_v ({p} V)"),
            );
            return None;
        }
        if p <= system.volts_line_to_line() {
            c.fail(
                "transformer.primary_v",
                format!(
                    "must be above the secondary's {} V",
                    system.volts_line_to_line()
                ),
            );
            return None;
        }
    }
    Some(Transformer::new(kva?, primary?, z?, xr?, tap?, supply?))
}

fn validate_service(c: &mut Checker, file: &JobFile, system: &System) -> Service {
    let ideal = Service {
        hot: Conductor::ideal(),
        neutral: Conductor::ideal(),
    };
    let Some(s) = c.object(&file.service, "service") else {
        return ideal;
    };
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

fn validate_neutral(c: &mut Checker, file: &JobFile) -> NeutralState {
    let Some(n) = c.object(&file.neutral, "neutral") else {
        return NeutralState::Intact;
    };
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
        "open" => NeutralState::Open {
            earth_return_ohms: c.number(
                &n.earth_return_ohms,
                "neutral.earth_return_ohms",
                Rule::Positive(MAX_OHMS),
            ),
        },
        other => {
            c.fail(
                "neutral.state",
                format!("must be intact, loose or open (got {other:?})"),
            );
            NeutralState::Intact
        }
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
    let watts = c.required_number(&f.watts, &p("watts"), Rule::Positive(MAX_WATTS));
    let default_v = connection.map(|conn| match conn {
        Connection::ToNeutral(_) => system.volts_to_neutral(),
        Connection::Across(..) => system.volts_line_to_line(),
    });
    let rated_v = c
        .number(&f.rated_v, &p("rated_v"), Rule::Positive(MAX_VOLTS))
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
    let branch = match &f.branch {
        Raw::Absent => Some(None),
        raw => c
            .object(raw, &p("branch"))
            .and_then(|b| validate_conductor(c, b, &p("branch"), system))
            .map(|cond| {
                // The branch is given one way; the loop is the outgoing and the return conductor.
                Some(Conductor::explicit(
                    2.0 * cond.impedance().re,
                    2.0 * cond.impedance().im,
                ))
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
                .number(&f.input_min_v, &p("input_min_v"), Rule::Positive(MAX_VOLTS))
                .or(f
                    .input_min_v
                    .is_absent()
                    .then_some(ELECTRONIC_DEFAULT_RANGE.0 * vr));
            let hi = c
                .number(&f.input_max_v, &p("input_max_v"), Rule::Positive(MAX_VOLTS))
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
                        format!("the input range must contain rated_v ({vr} V)"),
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
    Some(Load {
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
    })
}

fn validate_multiwire(c: &mut Checker, file: &JobFile, loads: &[Load]) -> Vec<Multiwire> {
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
        if let (Some(id), Some(material), Some(row), Some(col)) = (id, material, size, column) {
            if out.iter().any(|o| o.id == id) {
                c.fail(&path("id"), format!("{id:?} is used twice"));
                continue;
            }
            out.push(Multiwire {
                id,
                material,
                size_label: Size::Awg(row).label(),
                ampacity_a: crate::conductors::ampacity::ampacity(material, row.size, col),
                column_c: col,
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
