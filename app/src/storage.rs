//! The only module that touches browser storage.
//!
//! Storage schema, version 1 (local storage, one key per item so one bad item cannot spoil the
//! rest):
//! - `tapline.v1.job.<id>`: `{"saved_ms": <ms since 1970>, "revision": <n>, "job": <job file,
//!   format version 1>}` (the job is exactly what `tapline solve` reads; `revision` counts the
//!   saves, 0 when absent, so a tab can tell that another one saved since it read the job);
//! - `tapline.v1.aside.<id>`: a job item that could not be read (corrupt, or written by a newer
//!   version), moved here untouched and reported, never deleted;
//! - `tapline.v1.draft.<id>`: the job file as being edited, valid or not, kept on every
//!   keystroke while it differs from the saved job (removed once a valid version is saved), so
//!   nothing typed is lost on a reload; the saved job stays the last valid version;
//! - `tapline.v1.settings`: `{"units": "ft" | "m", "cautions_seen": bool, "lang": "en" | "es",
//!   "wires": "na" | "iec", "tech_name": text, "licence": text}` (a missing or mistyped
//!   key takes its default, so older settings still read);
//! - `tapline.v1.seeded`: `true` once the demo job has been offered, so deleting it sticks.
//!
//! Every failure is a [`StorageError`] returned to the caller; nothing here panics. When local
//! storage is missing (private mode, blocked) the app keeps computing and says so.

use serde::Serialize;
use serde_json::Value;
use tapline_core::job::{FromJson, JobFile, Raw, JOB_VERSION};

const JOB_PREFIX: &str = "tapline.v1.job.";
const ASIDE_PREFIX: &str = "tapline.v1.aside.";
const DRAFT_PREFIX: &str = "tapline.v1.draft.";
const SETTINGS_KEY: &str = "tapline.v1.settings";
const SEEDED_KEY: &str = "tapline.v1.seeded";

/// What went wrong with storage.
#[derive(Clone, Debug, PartialEq)]
pub enum StorageError {
    /// Local storage is missing or blocked (private browsing, a locked-down browser).
    Unavailable,
    /// The browser refused to write, usually because storage is full.
    WriteRefused(String),
    /// An item could not be read and was set aside under `aside_key`.
    SetAside { key: String, reason: String },
}

impl std::fmt::Display for StorageError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            StorageError::Unavailable => f.write_str(
                "This browser is not letting Tapline save (private mode or storage blocked). Results still work; export jobs to keep them.",
            ),
            StorageError::WriteRefused(why) => write!(
                f,
                "Could not save: the browser refused ({why}). Storage may be full; export jobs to keep them."
            ),
            StorageError::SetAside { key, reason } => {
                write!(f, "A saved job could not be read and was set aside as {key}: {reason}")
            }
        }
    }
}

/// A saved job as stored.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct StoredJob {
    pub saved_ms: f64,
    /// How many times the job was saved; a save checks it is still the revision it read.
    pub revision: u64,
    pub job: JobFile,
}

impl StoredJob {
    /// A job saved for the first time, now.
    pub fn first(job: JobFile, saved_ms: f64) -> StoredJob {
        StoredJob {
            saved_ms,
            revision: 1,
            job,
        }
    }
}

/// User settings.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Settings {
    pub units: String,
    pub cautions_seen: bool,
    /// The homeowner view's language (a code of [`crate::messages::LANGS`]).
    pub lang: String,
    /// Conductor colours in the drawing: `na` (North America) or `iec`.
    pub wires: String,
    /// The technician and licence number printed on the page left with the homeowner.
    pub tech_name: String,
    pub licence: String,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            units: "ft".to_string(),
            cautions_seen: false,
            lang: "en".to_string(),
            wires: "na".to_string(),
            tech_name: String::new(),
            licence: String::new(),
        }
    }
}

fn raw() -> Result<web_sys::Storage, StorageError> {
    web_sys::window()
        .and_then(|w| w.local_storage().ok().flatten())
        .ok_or(StorageError::Unavailable)
}

/// A stored item as read from its JSON value. Each is read by hand, as the engine reads a job
/// file, so that the module carries one reader of JSON text and no reader of JSON values.
trait Stored: Sized {
    fn from_value(value: Value) -> Result<Self, String>;
}

impl Stored for StoredJob {
    /// `saved_ms` must be a number and `job` an object; `revision` is 0 when absent (a job saved
    /// before revisions were counted); other keys are ignored.
    fn from_value(value: Value) -> Result<StoredJob, String> {
        let Value::Object(mut map) = value else {
            return Err("not a JSON object".to_string());
        };
        let saved_ms = map
            .get("saved_ms")
            .and_then(Value::as_f64)
            .ok_or("saved_ms: missing or not a number")?;
        let revision = match map.get("revision") {
            None | Some(Value::Null) => 0,
            Some(v) => v.as_u64().ok_or("revision: not a whole number")?,
        };
        let job = JobFile::from_value(map.remove("job").unwrap_or(Value::Null))
            .map_err(|_| "job: missing or not a JSON object")?;
        Ok(StoredJob {
            saved_ms,
            revision,
            job,
        })
    }
}

impl Stored for JobFile {
    fn from_value(value: Value) -> Result<JobFile, String> {
        if JobFile::fits(&value) {
            Ok(JobFile::take(value))
        } else {
            Err("not a JSON object".to_string())
        }
    }
}

impl Stored for Settings {
    /// Each setting of the right type is kept; a missing or mistyped one takes its default.
    fn from_value(value: Value) -> Result<Settings, String> {
        let Value::Object(map) = value else {
            return Err("not a JSON object".to_string());
        };
        let mut out = Settings::default();
        let text = |key: &str, into: &mut String| {
            if let Some(Value::String(s)) = map.get(key) {
                into.clone_from(s);
            }
        };
        text("units", &mut out.units);
        text("lang", &mut out.lang);
        text("wires", &mut out.wires);
        text("tech_name", &mut out.tech_name);
        text("licence", &mut out.licence);
        if let Some(Value::Bool(b)) = map.get("cautions_seen") {
            out.cautions_seen = *b;
        }
        Ok(out)
    }
}

impl Stored for bool {
    fn from_value(value: Value) -> Result<bool, String> {
        value
            .as_bool()
            .ok_or_else(|| "not true or false".to_string())
    }
}

/// `text` read as a `T` through a JSON value.
fn read<T: Stored>(text: &str) -> Result<T, String> {
    let value: Value = serde_json::from_str(text).map_err(|e| e.to_string())?;
    T::from_value(value)
}

/// The item under `key` read as a `T`; `None` when there is none or it cannot be read.
fn get<T: Stored>(key: &str) -> Option<T> {
    let text = raw().ok()?.get_item(key).ok().flatten()?;
    read(&text).ok()
}

/// Writes `item` as JSON under `key`.
///
/// # Errors
/// [`StorageError::Unavailable`], or [`StorageError::WriteRefused`] with the browser's name for
/// the refusal (`QuotaExceededError` when storage is full).
fn set<T: Serialize>(key: &str, item: &T) -> Result<(), StorageError> {
    let s = raw()?;
    let text =
        serde_json::to_string(item).map_err(|e| StorageError::WriteRefused(e.to_string()))?;
    s.set_item(key, &text).map_err(|e| {
        let name = js_sys::Reflect::get(&e, &"name".into())
            .ok()
            .and_then(|n| n.as_string());
        StorageError::WriteRefused(name.unwrap_or_else(|| "no reason given".to_string()))
    })
}

/// True when local storage can be used.
pub fn available() -> bool {
    raw().is_ok()
}

fn keys_with(prefix: &str) -> Result<Vec<String>, StorageError> {
    let s = raw()?;
    let n = s.length().map_err(|_| StorageError::Unavailable)?;
    Ok((0..n)
        .filter_map(|i| s.key(i).ok().flatten())
        .filter(|k| k.starts_with(prefix))
        .collect())
}

/// Loads every saved job, with the problems met. A job that cannot be read (broken JSON, or a
/// newer format than this app reads) is moved aside untouched and reported; the others load.
pub fn load_jobs() -> (Vec<(String, StoredJob)>, Vec<StorageError>) {
    let keys = match keys_with(JOB_PREFIX) {
        Ok(k) => k,
        Err(e) => return (Vec::new(), vec![e]),
    };
    let Ok(s) = raw() else {
        return (Vec::new(), vec![StorageError::Unavailable]);
    };
    let mut jobs = Vec::new();
    let mut problems = Vec::new();
    for key in keys {
        let id = key.trim_start_matches(JOB_PREFIX).to_string();
        let text = s.get_item(&key).ok().flatten().unwrap_or_default();
        let parsed: Result<StoredJob, String> = read::<StoredJob>(&text)
            .map_err(|e| format!("not a readable job ({e})"))
            .and_then(|stored| match &stored.job.version {
                Raw::Given(v) if *v > JOB_VERSION => Err(format!(
                    "written in job format {v}, newer than this app reads ({JOB_VERSION})"
                )),
                _ => Ok(stored),
            });
        match parsed {
            Ok(stored) => jobs.push((id, stored)),
            Err(reason) => {
                let aside = format!("{ASIDE_PREFIX}{id}");
                // Copy first, remove second: if the copy fails the original stays put.
                if s.set_item(&aside, &text).is_ok() {
                    let _ = s.remove_item(&key);
                }
                problems.push(StorageError::SetAside { key: aside, reason });
            }
        }
    }
    tapline_core::order::sort_by(&mut jobs, |a, b| b.1.saved_ms.total_cmp(&a.1.saved_ms));
    (jobs, problems)
}

/// The job stored under `id` now (another tab may have saved or deleted it since this one read
/// it); `Ok(None)` when there is none.
///
/// # Errors
/// [`StorageError::Unavailable`], or [`StorageError::SetAside`] naming the item when it cannot be
/// read (it is left where it is).
pub fn load_job(id: &str) -> Result<Option<StoredJob>, StorageError> {
    let key = format!("{JOB_PREFIX}{id}");
    let Some(text) = raw()?.get_item(&key).ok().flatten() else {
        return Ok(None);
    };
    read(&text).map(Some).map_err(|e| StorageError::SetAside {
        key,
        reason: format!("not a readable job ({e})"),
    })
}

/// True for a storage key that holds a saved job (for the storage events other tabs raise).
pub fn is_job_key(key: &str) -> bool {
    key.starts_with(JOB_PREFIX)
}

/// Saves one job under its id.
pub fn save_job(id: &str, stored: &StoredJob) -> Result<(), StorageError> {
    set(&format!("{JOB_PREFIX}{id}"), stored)
}

/// Deletes one job and its draft.
pub fn delete_job(id: &str) -> Result<(), StorageError> {
    let s = raw()?;
    let _ = s.remove_item(&format!("{DRAFT_PREFIX}{id}"));
    s.remove_item(&format!("{JOB_PREFIX}{id}"))
        .map_err(|_| StorageError::WriteRefused("remove failed".to_string()))
}

/// Keeps the draft of job `id` as typed, valid or not.
pub fn save_draft(id: &str, draft: &JobFile) -> Result<(), StorageError> {
    set(&format!("{DRAFT_PREFIX}{id}"), draft)
}

/// The draft of job `id`, when one was kept (an unreadable draft counts as none: the saved job
/// is still there).
pub fn load_draft(id: &str) -> Option<JobFile> {
    get(&format!("{DRAFT_PREFIX}{id}"))
}

/// Forgets the draft of job `id` (its valid version is saved).
pub fn clear_draft(id: &str) {
    if let Ok(s) = raw() {
        let _ = s.remove_item(&format!("{DRAFT_PREFIX}{id}"));
    }
}

/// Reads the settings (defaults when absent or unreadable).
pub fn load_settings() -> Settings {
    get(SETTINGS_KEY).unwrap_or_default()
}

/// Saves the settings.
pub fn save_settings(settings: &Settings) -> Result<(), StorageError> {
    set(SETTINGS_KEY, settings)
}

/// True when the demo job has already been offered once.
pub fn seeded() -> bool {
    get::<bool>(SEEDED_KEY).unwrap_or(false)
}

/// Records that the demo job has been offered.
pub fn mark_seeded() -> Result<(), StorageError> {
    set(SEEDED_KEY, &true)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_job_stored_before_revisions_reads_as_revision_0_and_round_trips() {
        let demo = tapline_core::job::parse_job(tapline_core::demo::DEMO_JOB).unwrap();
        let old = format!(
            r#"{{"saved_ms": 5, "job": {}}}"#,
            tapline_core::job::job_to_json(&demo)
        );
        let s: StoredJob = read(&old).unwrap();
        assert_eq!((s.revision, s.saved_ms), (0, 5.0));
        assert_eq!(s.job, demo);
        let again: StoredJob = read(&serde_json::to_string(&s).unwrap()).unwrap();
        assert_eq!(again, s);
        assert_eq!(StoredJob::first(demo, 7.0).revision, 1);
    }

    #[test]
    fn a_stored_item_of_the_wrong_shape_is_refused_naming_its_field() {
        assert_eq!(
            read::<StoredJob>(r#"{"job": {}}"#).unwrap_err(),
            "saved_ms: missing or not a number"
        );
        assert_eq!(
            read::<StoredJob>(r#"{"saved_ms": 1, "revision": -2, "job": {}}"#).unwrap_err(),
            "revision: not a whole number"
        );
        assert_eq!(
            read::<StoredJob>(r#"{"saved_ms": 1, "job": [1]}"#).unwrap_err(),
            "job: missing or not a JSON object"
        );
        assert_eq!(read::<StoredJob>("[]").unwrap_err(), "not a JSON object");
        assert!(read::<StoredJob>(r#"{"saved_ms": 1, "job": {not json"#).is_err());
        assert_eq!(read::<bool>("true"), Ok(true));
        assert!(read::<bool>("1").is_err());
    }

    #[test]
    fn settings_keep_each_readable_key_and_default_the_rest() {
        let s: Settings = read(r#"{"units": "m", "lang": 3, "cautions_seen": true}"#).unwrap();
        assert_eq!(
            s,
            Settings {
                units: "m".to_string(),
                cautions_seen: true,
                ..Settings::default()
            }
        );
        let back: Settings = read(&serde_json::to_string(&s).unwrap()).unwrap();
        assert_eq!(back, s);
    }

    #[test]
    fn job_keys_are_told_from_drafts_and_settings() {
        assert!(is_job_key("tapline.v1.job.abc"));
        assert!(!is_job_key("tapline.v1.draft.abc"));
        assert!(!is_job_key(SETTINGS_KEY));
    }

    #[test]
    fn storage_messages_are_plain_words() {
        assert!(StorageError::Unavailable
            .to_string()
            .contains("private mode"));
        let full = StorageError::WriteRefused("QuotaExceededError".into()).to_string();
        assert!(full.contains("Storage may be full"), "{full}");
    }
}
