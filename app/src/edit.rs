//! Pure editing of a job file: what each form control does to the job, with no browser and no
//! reactive code, so it is tested natively. Unit conversion lives here too; components only call
//! these functions.

use serde_json::Value;
use tapline_core::conductors::FEET_PER_METRE;
use tapline_core::fields::decimal;
use tapline_core::figures::fixed;
use tapline_core::job::{
    ConductorFile, JobFile, LoadFile, MultiwireFile, NeutralFile, Raw, SystemFile, TransformerFile,
    JOB_VERSION,
};
use tapline_core::library::{Appliance, Hookup};
use tapline_core::validate::Problem;

pub mod neutral;
pub mod panel;
pub mod readings;
pub mod sizing;

/// Reads a number typed by a user. Empty text is "absent"; a comma decimal separator is accepted
/// (`12,5`), except where it could as well be a thousands separator (`1,500`: one to three digits,
/// not starting with zero, then exactly three), which is refused rather than guessed: 1.5 W read
/// for 1500 W would be a confident wrong answer. Anything that is not a number is kept as typed so
/// validation can name the field.
pub fn number_from_text(text: &str) -> Raw<f64> {
    let t = text.trim();
    if t.is_empty() {
        return Raw::Absent;
    }
    if looks_like_thousands(t) {
        return Raw::Invalid(Value::String(t.to_string()));
    }
    match decimal(&t.replace(',', ".")) {
        Some(v) => Raw::Given(v),
        None => Raw::Invalid(Value::String(t.to_string())),
    }
}

/// True for `1,500` or `-12,000`: a comma after one to three digits (the first not zero) and
/// before exactly three, with nothing else.
fn looks_like_thousands(t: &str) -> bool {
    let unsigned = t.strip_prefix(['-', '+']).unwrap_or(t);
    let Some((whole, rest)) = unsigned.split_once(',') else {
        return false;
    };
    let digits = |s: &str| s.bytes().all(|b| b.is_ascii_digit());
    (1..=3).contains(&whole.len())
        && !whole.starts_with('0')
        && digits(whole)
        && rest.len() == 3
        && digits(rest)
}

/// The text a number field shows for a stored value.
pub fn text_of_number(raw: &Raw<f64>) -> String {
    match raw {
        Raw::Absent => String::new(),
        Raw::Given(v) => trim_float(*v),
        Raw::Invalid(Value::String(s)) => s.clone(),
        Raw::Invalid(v) => v.to_string(),
    }
}

/// A float as short text: no trailing zeros, at most 6 decimals.
pub fn trim_float(v: f64) -> String {
    let s = fixed(v, 6).to_string();
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" {
        "0".to_string()
    } else {
        s.to_string()
    }
}

/// The text of an optional string field.
pub fn text_of(raw: &Raw<String>) -> String {
    match raw {
        Raw::Given(s) => s.clone(),
        Raw::Invalid(v) => v.to_string(),
        Raw::Absent => String::new(),
    }
}

/// Length units for conductor runs.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Units {
    Feet,
    Metres,
}

impl Units {
    pub fn parse(s: &str) -> Units {
        if s == "m" {
            Units::Metres
        } else {
            Units::Feet
        }
    }
    pub fn code(self) -> &'static str {
        match self {
            Units::Feet => "ft",
            Units::Metres => "m",
        }
    }
}

/// A fresh job: split-phase 120/240 V, neutral intact, no loads.
pub fn new_job(name: &str) -> JobFile {
    JobFile {
        version: Raw::Given(JOB_VERSION),
        name: Raw::Given(name.to_string()),
        system: Raw::Given(SystemFile {
            kind: Raw::Given("split-phase".to_string()),
            volts_to_neutral: Raw::Given(120.0),
            frequency_hz: Raw::Given(60.0),
            phases: Raw::Absent,
            ..SystemFile::default()
        }),
        neutral: Raw::Given(NeutralFile {
            state: Raw::Given("intact".to_string()),
            ..NeutralFile::default()
        }),
        loads: Raw::Given(Vec::new()),
        ..JobFile::default()
    }
}

/// A copy of a job under a new name.
pub fn duplicate(job: &JobFile) -> JobFile {
    let mut copy = job.clone();
    copy.name = Raw::Given(format!("{} (copy)", text_of(&job.name)));
    copy
}

/// The systems offered in the service form.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Preset {
    Split120240,
    TwoOfWye208,
    Wye208,
    Wye480,
    Wye400,
    CustomSplit,
    CustomWye,
}

impl Preset {
    pub const ALL: [Preset; 7] = [
        Preset::Split120240,
        Preset::TwoOfWye208,
        Preset::Wye208,
        Preset::Wye480,
        Preset::Wye400,
        Preset::CustomSplit,
        Preset::CustomWye,
    ];

    pub fn code(self) -> &'static str {
        match self {
            Preset::Split120240 => "split",
            Preset::TwoOfWye208 => "wye2-208",
            Preset::Wye208 => "wye-208",
            Preset::Wye480 => "wye-480",
            Preset::Wye400 => "wye-400",
            Preset::CustomSplit => "custom-split",
            Preset::CustomWye => "custom-wye",
        }
    }

    pub fn label(self) -> &'static str {
        match self {
            Preset::Split120240 => "120/240 V split-phase",
            Preset::TwoOfWye208 => "120/208 V, two phases of a wye",
            Preset::Wye208 => "120/208 V three-phase wye",
            Preset::Wye480 => "277/480 V three-phase wye",
            Preset::Wye400 => "230/400 V three-phase wye (50 Hz)",
            Preset::CustomSplit => "Other split-phase voltage",
            Preset::CustomWye => "Other wye voltage",
        }
    }

    pub fn from_code(code: &str) -> Option<Preset> {
        Preset::ALL.into_iter().find(|p| p.code() == code)
    }

    /// (kind, phases, volts to neutral, hertz); `None` volts for the custom entries.
    fn spec(self) -> (&'static str, Option<u32>, Option<f64>, f64) {
        match self {
            Preset::Split120240 => ("split-phase", None, Some(120.0), 60.0),
            Preset::TwoOfWye208 => ("wye", Some(2), Some(120.0), 60.0),
            Preset::Wye208 => ("wye", Some(3), Some(120.0), 60.0),
            Preset::Wye480 => ("wye", Some(3), Some(277.0), 60.0),
            Preset::Wye400 => ("wye", Some(3), Some(230.0), 50.0),
            Preset::CustomSplit => ("split-phase", None, None, 60.0),
            Preset::CustomWye => ("wye", Some(3), None, 60.0),
        }
    }
}

/// The preset that describes a job's system (custom when none matches exactly).
pub fn preset_of(job: &JobFile) -> Preset {
    let Some(sys) = job.system.given() else {
        return Preset::Split120240;
    };
    let kind = sys
        .kind
        .given()
        .map(String::as_str)
        .unwrap_or("split-phase");
    let phases = sys.phases.given().copied().unwrap_or(3);
    let v = sys.volts_to_neutral.given().copied();
    let f = sys.frequency_hz.given().copied().unwrap_or(60.0);
    for p in Preset::ALL {
        let (k, ph, pv, pf) = p.spec();
        if pv.is_some()
            && k == kind
            && (k == "split-phase" || ph == Some(phases))
            && pv == v
            && pf == f
        {
            return p;
        }
    }
    if kind == "wye" {
        Preset::CustomWye
    } else {
        Preset::CustomSplit
    }
}

/// Applies a preset; the custom entries keep the voltage already typed.
pub fn set_preset(job: &mut JobFile, preset: Preset) {
    let (kind, phases, volts, hz) = preset.spec();
    let old = job.system.given().cloned().unwrap_or_default();
    job.system = Raw::Given(SystemFile {
        kind: Raw::Given(kind.to_string()),
        volts_to_neutral: volts.map(Raw::Given).unwrap_or(old.volts_to_neutral),
        frequency_hz: Raw::Given(hz),
        phases: phases.map(Raw::Given).unwrap_or_default(),
        unknown: old.unknown,
    });
    // Loads on a leg the new system lacks are moved to L1 so the job stays valid.
    let legs = legs_of(job);
    if let Raw::Given(loads) = &mut job.loads {
        for l in loads.iter_mut() {
            if let Raw::Given(load) = l {
                let c = text_of(&load.connect);
                if !connect_options_for(&legs).contains(&c.as_str()) {
                    load.connect =
                        Raw::Given(if c.contains('N') { "L1-N" } else { "L1-L2" }.to_string());
                }
            }
        }
    }
}

/// Sets the custom line-to-neutral voltage.
pub fn set_volts(job: &mut JobFile, text: &str) {
    let mut sys = job.system.given().cloned().unwrap_or_default();
    sys.volts_to_neutral = number_from_text(text);
    job.system = Raw::Given(sys);
}

/// The hot legs of a job's system.
pub fn legs_of(job: &JobFile) -> Vec<&'static str> {
    let sys = job.system.given();
    let wye = sys.and_then(|s| s.kind.given()).is_some_and(|k| k == "wye");
    let phases = sys.and_then(|s| s.phases.given()).copied().unwrap_or(3);
    if wye && phases == 3 {
        vec!["L1", "L2", "L3"]
    } else {
        vec!["L1", "L2"]
    }
}

fn connect_options_for(legs: &[&str]) -> Vec<&'static str> {
    if legs.len() == 3 {
        vec!["L1-N", "L2-N", "L3-N", "L1-L2", "L2-L3", "L3-L1"]
    } else {
        vec!["L1-N", "L2-N", "L1-L2"]
    }
}

/// Where a load may be connected on this job's system.
pub fn connect_options(job: &JobFile) -> Vec<&'static str> {
    connect_options_for(&legs_of(job))
}

/// The same as (value, label) pairs for a select field.
pub fn connect_choices(job: &JobFile) -> Vec<(String, String)> {
    connect_options(job)
        .into_iter()
        .map(|c| (c.to_string(), c.to_string()))
        .collect()
}

/// Turns the transformer on (with typical pole-mount values to edit) or off.
pub fn set_transformer(job: &mut JobFile, on: bool) {
    job.transformer = if on {
        Raw::Given(TransformerFile {
            kva: Raw::Given(25.0),
            primary_v: Raw::Given(7200.0),
            impedance_pct: Raw::Given(2.0),
            x_over_r: Raw::Given(1.5),
            ..TransformerFile::default()
        })
    } else {
        Raw::Absent
    };
}

/// A number field of the transformer.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum TransformerField {
    Kva,
    PrimaryV,
    ImpedancePct,
    XOverR,
    TapPct,
}

fn transformer_number(t: &mut TransformerFile, field: TransformerField) -> &mut Raw<f64> {
    match field {
        TransformerField::Kva => &mut t.kva,
        TransformerField::PrimaryV => &mut t.primary_v,
        TransformerField::ImpedancePct => &mut t.impedance_pct,
        TransformerField::XOverR => &mut t.x_over_r,
        TransformerField::TapPct => &mut t.tap_pct,
    }
}

/// Sets a transformer number as typed.
pub fn set_transformer_field(job: &mut JobFile, field: TransformerField, text: &str) {
    let mut t = job.transformer.given().cloned().unwrap_or_default();
    *transformer_number(&mut t, field) = number_from_text(text);
    job.transformer = Raw::Given(t);
}

/// Reads a transformer number as text.
pub fn transformer_text(job: &JobFile, field: TransformerField) -> String {
    let mut t = job.transformer.given().cloned().unwrap_or_default();
    text_of_number(transformer_number(&mut t, field))
}

/// Which conductor run: the service hots, the service neutral, or load `i`'s branch circuit.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Run {
    Hot,
    Neutral,
    Branch(usize),
}

impl Run {
    pub fn key(self) -> &'static str {
        match self {
            Run::Hot => "hot",
            Run::Neutral => "neutral",
            Run::Branch(_) => "branch",
        }
    }

    /// The JSON path of the conductor in the job file.
    pub fn path(self) -> String {
        match self {
            Run::Hot | Run::Neutral => format!("service.{}", self.key()),
            Run::Branch(i) => format!("loads[{i}].branch"),
        }
    }
}

fn conductor(job: &JobFile, run: Run) -> Option<&ConductorFile> {
    if let Run::Branch(i) = run {
        return job.loads.given()?.get(i)?.given()?.branch.given();
    }
    let s = job.service.given()?;
    match run {
        Run::Hot => s.hot.given(),
        _ => s.neutral.given(),
    }
}

/// A branch circuit's conductor, made present (12 AWG copper, 15 m, as a typical 20 A branch)
/// when the load has none. `None` when there is no such load.
fn branch_mut(job: &mut JobFile, i: usize) -> Option<&mut ConductorFile> {
    let Some(Raw::Given(load)) = loads_mut(job).get_mut(i) else {
        return None;
    };
    if load.branch.given().is_none() {
        load.branch = Raw::Given(ConductorFile {
            material: Raw::Given("cu".to_string()),
            size: Raw::Given(Value::String("12".to_string())),
            length_m: Raw::Given(15.0),
            ..ConductorFile::default()
        });
    }
    match &mut load.branch {
        Raw::Given(c) => Some(c),
        _ => None,
    }
}

/// The conductor made present with typical values; `None` only for a branch of a load that is
/// not there.
fn conductor_mut(job: &mut JobFile, run: Run) -> Option<&mut ConductorFile> {
    if let Run::Branch(i) = run {
        return branch_mut(job, i);
    }
    if job.service.given().is_none() {
        job.service = Raw::Given(Default::default());
    }
    let Raw::Given(s) = &mut job.service else {
        unreachable!("set just above")
    };
    let slot = match run {
        Run::Hot => &mut s.hot,
        _ => &mut s.neutral,
    };
    if slot.given().is_none() {
        *slot = Raw::Given(ConductorFile {
            material: Raw::Given("al".to_string()),
            size: Raw::Given(Value::String(
                if run == Run::Hot { "4/0" } else { "2/0" }.to_string(),
            )),
            length_m: Raw::Given(30.0),
            ..ConductorFile::default()
        });
    }
    let Raw::Given(c) = slot else {
        unreachable!("set just above")
    };
    Some(c)
}

/// True when the job gives this service conductor.
pub fn has_conductor(job: &JobFile, run: Run) -> bool {
    conductor(job, run).is_some()
}

/// Adds (with typical aluminum service values) or removes a service conductor.
pub fn set_conductor_present(job: &mut JobFile, run: Run, on: bool) {
    if on {
        conductor_mut(job, run);
    } else if let Run::Branch(i) = run {
        if let Some(Raw::Given(load)) = loads_mut(job).get_mut(i) {
            load.branch = Raw::Absent;
        }
    } else if let Raw::Given(s) = &mut job.service {
        match run {
            Run::Hot => s.hot = Raw::Absent,
            _ => s.neutral = Raw::Absent,
        }
    }
}

/// A text field of a conductor.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ConductorField {
    /// `cu` or `al`.
    Material,
    /// `12`, `4/0`, `250` (kcmil) or a metric size.
    Size,
}

/// Sets a conductor's material or size.
pub fn set_conductor_text(job: &mut JobFile, run: Run, field: ConductorField, text: &str) {
    let Some(c) = conductor_mut(job, run) else {
        return;
    };
    match field {
        ConductorField::Material => c.material = Raw::Given(text.to_string()),
        ConductorField::Size => c.size = Raw::Given(Value::String(text.to_string())),
    }
}

/// Reads a conductor's material or size.
pub fn conductor_text(job: &JobFile, run: Run, field: ConductorField) -> String {
    let Some(c) = conductor(job, run) else {
        return String::new();
    };
    match field {
        ConductorField::Material => text_of(&c.material),
        ConductorField::Size => match &c.size {
            Raw::Given(Value::String(s)) => s.clone(),
            Raw::Given(v) | Raw::Invalid(v) => v.to_string(),
            Raw::Absent => String::new(),
        },
    }
}

/// Sets a conductor's one-way length in the chosen units; the job keeps one length field.
pub fn set_length(job: &mut JobFile, run: Run, text: &str, units: Units) {
    let Some(c) = conductor_mut(job, run) else {
        return;
    };
    let v = number_from_text(text);
    match units {
        Units::Feet => {
            c.length_ft = v;
            c.length_m = Raw::Absent;
        }
        Units::Metres => {
            c.length_m = v;
            c.length_ft = Raw::Absent;
        }
    }
}

/// A conductor's length as text in the chosen units (converted when stored in the other unit).
pub fn length_text(job: &JobFile, run: Run, units: Units) -> String {
    let Some(c) = conductor(job, run) else {
        return String::new();
    };
    match (units, &c.length_ft, &c.length_m) {
        (Units::Feet, Raw::Absent, Raw::Given(m)) => {
            trim_float((m * FEET_PER_METRE * 10.0).round() / 10.0)
        }
        (Units::Metres, Raw::Given(ft), Raw::Absent) => {
            trim_float((ft / FEET_PER_METRE * 10.0).round() / 10.0)
        }
        (Units::Feet, ft, _) if !ft.is_absent() => text_of_number(ft),
        (_, _, m) => text_of_number(m),
    }
}

/// The JSON path of a conductor's length field in the chosen units.
pub fn length_path(run: Run, units: Units) -> String {
    format!("{}.length_{}", run.path(), units.code())
}

/// Marks load `i` as planned (not installed yet) or as found.
pub fn set_planned(job: &mut JobFile, i: usize, planned: bool) {
    if let Some(Raw::Given(load)) = loads_mut(job).get_mut(i) {
        load.planned = if planned {
            Raw::Given(true)
        } else {
            Raw::Absent
        };
    }
}

fn loads_mut(job: &mut JobFile) -> &mut Vec<Raw<LoadFile>> {
    entries_mut(&mut job.loads)
}

/// The entries of a list field as given (unreadable entries show as defaults).
fn entries<T: Clone + Default>(list: &Raw<Vec<Raw<T>>>) -> Vec<T> {
    list.given()
        .map(|l| {
            l.iter()
                .map(|r| r.given().cloned().unwrap_or_default())
                .collect()
        })
        .unwrap_or_default()
}

/// A list field made editable (an absent or unreadable list becomes an empty one).
fn entries_mut<T>(list: &mut Raw<Vec<Raw<T>>>) -> &mut Vec<Raw<T>> {
    if list.given().is_none() {
        *list = Raw::Given(Vec::new());
    }
    match list {
        Raw::Given(l) => l,
        _ => unreachable!("set just above"),
    }
}

/// The loads as given (unreadable entries show as defaults).
pub fn loads(job: &JobFile) -> Vec<LoadFile> {
    entries(&job.loads)
}

/// Adds a library appliance on `connect`, numbering its name if the job has one already.
pub fn add_appliance(job: &mut JobFile, appliance: &Appliance, connect: &str) {
    let existing = loads(job)
        .iter()
        .filter(|l| text_of(&l.name).starts_with(appliance.name))
        .count();
    let name = if existing == 0 {
        appliance.name.to_string()
    } else {
        format!("{} {}", appliance.name, existing + 1)
    };
    let connect = default_connect(job, appliance, connect);
    let mut load = appliance.to_load(&name, &connect);
    // Rate 240 V appliances at the system's line-to-line voltage class they are used on.
    if appliance.hookup == Hookup::Across {
        load.rated_v = Raw::Absent;
    }
    loads_mut(job).push(Raw::Given(load));
}

fn default_connect(job: &JobFile, appliance: &Appliance, wanted: &str) -> String {
    let options = connect_options(job);
    let across = appliance.hookup == Hookup::Across;
    if options.contains(&wanted) && wanted.contains('N') != across {
        return wanted.to_string();
    }
    if across { "L1-L2" } else { "L1-N" }.to_string()
}

/// Adds a custom resistive load.
pub fn add_custom(job: &mut JobFile) {
    add_custom_on(job, "L1-N");
}

/// Adds a custom 1000 W resistive load on `connect` (L1-N when the service has no such
/// connection).
pub fn add_custom_on(job: &mut JobFile, connect: &str) {
    let n = loads(job).len() + 1;
    let connect = if connect_options(job).contains(&connect) {
        connect
    } else {
        "L1-N"
    };
    loads_mut(job).push(Raw::Given(LoadFile {
        name: Raw::Given(format!("Load {n}")),
        connect: Raw::Given(connect.to_string()),
        model: Raw::Given("resistive".to_string()),
        watts: Raw::Given(1000.0),
        ..LoadFile::default()
    }));
}

/// Removes load `i`.
pub fn remove_load(job: &mut JobFile, i: usize) {
    let l = loads_mut(job);
    if i < l.len() {
        l.remove(i);
    }
}

/// One edit of an appliance's own fields, as typed.
#[derive(Clone, Debug, PartialEq)]
pub enum LoadEdit {
    Name(String),
    /// `L1-N`, `L1-L2`, …
    Connect(String),
    /// `resistive`, `impedance`, `lamp`, `motor` or `electronic`; fields that only the old model
    /// used are dropped, so they cannot be refused for a model that has no use for them.
    Model(String),
    Watts(String),
    PowerFactor(String),
    RatedV(String),
    On(bool),
    /// The shared-neutral circuit's id, blank for none.
    Multiwire(String),
}

/// Applies one edit to load `i` (nothing happens when there is no such load).
pub fn set_load(job: &mut JobFile, i: usize, edit: LoadEdit) {
    let Some(Raw::Given(load)) = loads_mut(job).get_mut(i) else {
        return;
    };
    match edit {
        LoadEdit::Name(t) => load.name = Raw::Given(t),
        LoadEdit::Connect(t) => load.connect = Raw::Given(t),
        LoadEdit::Model(t) => {
            if t == "resistive" || t == "lamp" {
                load.power_factor = Raw::Absent;
            }
            if t != "electronic" {
                load.input_min_v = Raw::Absent;
                load.input_max_v = Raw::Absent;
                load.harmonics = Raw::Absent;
            }
            load.model = Raw::Given(t);
        }
        LoadEdit::Watts(t) => load.watts = number_from_text(&t),
        LoadEdit::PowerFactor(t) => load.power_factor = number_from_text(&t),
        LoadEdit::RatedV(t) => load.rated_v = number_from_text(&t),
        LoadEdit::On(on) => load.on = Raw::Given(on),
        LoadEdit::Multiwire(t) => {
            load.multiwire = if t.trim().is_empty() {
                Raw::Absent
            } else {
                Raw::Given(t.trim().to_string())
            }
        }
    }
}

/// The circuit a load belongs to, as the balancing tool names it: its `circuit`, else its name.
pub fn circuit_of(load: &LoadFile) -> String {
    match load.circuit.given() {
        Some(c) => c.trim().to_string(),
        None => text_of(&load.name).trim().to_string(),
    }
}

/// The shared-neutral circuits as given.
pub fn multiwire_list(job: &JobFile) -> Vec<MultiwireFile> {
    entries(&job.multiwire)
}

fn multiwire_mut(job: &mut JobFile) -> &mut Vec<Raw<MultiwireFile>> {
    entries_mut(&mut job.multiwire)
}

/// Adds a shared-neutral circuit (12 AWG copper, 60 °C column) with the next free letter as id.
pub fn add_multiwire(job: &mut JobFile) {
    let used: Vec<String> = multiwire_list(job).iter().map(|m| text_of(&m.id)).collect();
    let id = ('A'..='Z')
        .map(String::from)
        .find(|c| !used.contains(c))
        .unwrap_or_else(|| "MW".to_string());
    multiwire_mut(job).push(Raw::Given(MultiwireFile {
        id: Raw::Given(id),
        material: Raw::Given("cu".to_string()),
        size: Raw::Given(Value::String("12".to_string())),
        column_c: Raw::Given(60.0),
        ..MultiwireFile::default()
    }));
}

/// Removes shared-neutral circuit `i` and clears it from the loads that named it.
pub fn remove_multiwire(job: &mut JobFile, i: usize) {
    let list = multiwire_mut(job);
    if i >= list.len() {
        return;
    }
    let id = list
        .remove(i)
        .given()
        .map(|m| text_of(&m.id))
        .unwrap_or_default();
    if let Raw::Given(loads) = &mut job.loads {
        for raw in loads.iter_mut() {
            if let Raw::Given(load) = raw {
                if load.multiwire.given().map(|s| s.as_str()) == Some(id.as_str()) {
                    load.multiwire = Raw::Absent;
                }
            }
        }
    }
}

/// A field of a shared-neutral circuit.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum MultiwireField {
    Id,
    Material,
    Size,
    /// The NEC Table 310.16 column, °C.
    ColumnC,
}

/// Edits a shared-neutral circuit's field as typed.
pub fn set_multiwire_field(job: &mut JobFile, i: usize, field: MultiwireField, text: &str) {
    let Some(Raw::Given(m)) = multiwire_mut(job).get_mut(i) else {
        return;
    };
    match field {
        MultiwireField::Id => m.id = Raw::Given(text.trim().to_string()),
        MultiwireField::Material => m.material = Raw::Given(text.to_string()),
        MultiwireField::Size => m.size = Raw::Given(Value::String(text.to_string())),
        MultiwireField::ColumnC => m.column_c = number_from_text(text),
    }
}

/// The group a load is listed under: its leg (`L1`) or its pair of legs (`L1-L2`).
pub fn group_of(load: &LoadFile) -> String {
    let c = text_of(&load.connect);
    c.strip_suffix("-N").map(str::to_string).unwrap_or(c)
}

/// The message for a field, if validation found a problem at exactly that path.
pub fn problem_at(problems: &[Problem], path: &str) -> Option<String> {
    problems
        .iter()
        .find(|p| p.path == path)
        .map(|p| p.message.clone())
}

#[cfg(test)]
mod tests {
    use super::*;
    use tapline_core::validate::validate;

    #[test]
    fn numbers_typed_by_hand() {
        assert_eq!(number_from_text(" 12.5 "), Raw::Given(12.5));
        assert_eq!(number_from_text("12,5"), Raw::Given(12.5));
        assert_eq!(number_from_text("0,125"), Raw::Given(0.125));
        assert_eq!(number_from_text("1,5000"), Raw::Given(1.5));
        assert_eq!(number_from_text(".5"), Raw::Given(0.5));
        // A comma that may group thousands is not guessed at (common practice, no source: both
        // readings are in everyday use, so either guess is wrong for someone).
        for t in ["1,500", "-12,000", "999,999"] {
            assert_eq!(number_from_text(t), Raw::Invalid(Value::String(t.into())));
        }
        assert_eq!(
            number_from_text("1,500.5"),
            Raw::Invalid(Value::String("1,500.5".into()))
        );
        assert_eq!(number_from_text(""), Raw::Absent);
        assert_eq!(
            number_from_text("abc"),
            Raw::Invalid(Value::String("abc".into()))
        );
        assert_eq!(text_of_number(&Raw::Given(1500.0)), "1500");
        assert_eq!(text_of_number(&Raw::Given(0.25)), "0.25");
    }

    #[test]
    fn a_new_job_is_valid_and_loads_added_from_the_library_validate() {
        let mut job = new_job("Test");
        assert!(validate(&job).is_ok());
        for a in tapline_core::library::APPLIANCES {
            add_appliance(&mut job, a, "L2-N");
        }
        add_custom(&mut job);
        assert!(validate(&job).is_ok(), "{:?}", validate(&job).err());
        let ls = loads(&job);
        assert_eq!(text_of(&ls[0].connect), "L2-N");
        let heater = ls
            .iter()
            .find(|l| text_of(&l.name).starts_with("Water heater"))
            .unwrap();
        assert_eq!(text_of(&heater.connect), "L1-L2");
    }

    #[test]
    fn a_bad_field_is_reported_at_its_path_and_fixed_by_retyping() {
        let mut job = new_job("Test");
        add_custom(&mut job);
        set_load(&mut job, 0, LoadEdit::Watts("lots".into()));
        let problems = validate(&job).unwrap_err();
        assert!(problem_at(&problems, "loads[0].watts").is_some());
        set_load(&mut job, 0, LoadEdit::Watts("1500".into()));
        assert!(validate(&job).is_ok());
    }

    #[test]
    fn presets_round_trip_and_move_loads_off_missing_legs() {
        let mut job = new_job("Test");
        for p in Preset::ALL
            .into_iter()
            .filter(|p| !matches!(p, Preset::CustomSplit | Preset::CustomWye))
        {
            set_preset(&mut job, p);
            assert_eq!(preset_of(&job), p);
        }
        set_preset(&mut job, Preset::Wye208);
        add_custom(&mut job);
        set_load(&mut job, 0, LoadEdit::Connect("L3-N".into()));
        set_preset(&mut job, Preset::Split120240);
        assert_eq!(text_of(&loads(&job)[0].connect), "L1-N");
        assert!(validate(&job).is_ok());
    }

    #[test]
    fn lengths_follow_the_units_setting() {
        let mut job = new_job("Test");
        set_conductor_present(&mut job, Run::Hot, true);
        assert_eq!(length_text(&job, Run::Hot, Units::Metres), "30");
        assert_eq!(length_text(&job, Run::Hot, Units::Feet), "98.4");
        set_length(&mut job, Run::Hot, "100", Units::Feet);
        assert_eq!(length_text(&job, Run::Hot, Units::Feet), "100");
        assert_eq!(length_text(&job, Run::Hot, Units::Metres), "30.5");
        assert!(validate(&job).is_ok());
        set_length(&mut job, Run::Hot, "-4", Units::Feet);
        let problems = validate(&job).unwrap_err();
        assert!(problem_at(&problems, &length_path(Run::Hot, Units::Feet)).is_some());
    }

    #[test]
    fn shared_neutral_circuits_are_added_named_and_removed() {
        let mut job = new_job("Test");
        add_custom(&mut job);
        add_multiwire(&mut job);
        set_load(&mut job, 0, LoadEdit::Multiwire("A".into()));
        assert!(validate(&job).is_ok(), "{:?}", validate(&job).err());
        set_load(&mut job, 0, LoadEdit::Multiwire("B".into()));
        assert!(problem_at(&validate(&job).unwrap_err(), "loads[0].multiwire").is_some());
        set_load(&mut job, 0, LoadEdit::Multiwire("A".into()));
        remove_multiwire(&mut job, 0);
        assert!(loads(&job)[0].multiwire.is_absent());
        assert!(validate(&job).is_ok());
    }
}
