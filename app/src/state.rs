//! Application state: signals for what is on screen, and memos that hand the draft job to the
//! engine. Every number shown comes from these memos.

use crate::edit;
use crate::storage::{self, Settings, StoredJob};
use leptos::prelude::*;
use tapline_core::job::{JobFile, Raw};
use tapline_core::report::{analyze, Report};
use tapline_core::tools::balance::{balance, schedule, Balance, Layout, Row};
use tapline_core::tools::diagnose::{history, History};
use tapline_core::tools::plan::{plan, Plan};
use tapline_core::validate::{validate, Problem};
use tapline_core::validated::Job;
use tapline_core::whatif::{sweep, sweep_points, what_if, Sweep, WhatIf};

/// Points in the app's neutral sweep plot.
pub const SWEEP_POINTS: usize = 160;

/// Which screen is showing.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Screen {
    Jobs,
    Job,
    Cautions,
}

/// Which part of a job is showing.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Tab {
    Service,
    Loads,
    Results,
    WhatIf,
    Panel,
    Readings,
}

/// A saved job in the list.
#[derive(Clone, Debug, PartialEq)]
pub struct Entry {
    pub id: String,
    pub stored: StoredJob,
}

/// The app's state, passed through context as small `Copy` handles.
#[derive(Clone, Copy)]
pub struct AppState {
    pub jobs: RwSignal<Vec<Entry>>,
    pub open_id: RwSignal<Option<String>>,
    pub draft: RwSignal<JobFile>,
    /// Bumped when loads are added or removed or a job is opened, so forms re-read their values.
    pub structure: RwSignal<u64>,
    pub screen: RwSignal<Screen>,
    pub tab: RwSignal<Tab>,
    pub banners: RwSignal<Vec<String>>,
    pub settings: RwSignal<Settings>,
    /// The last deleted job, for undo.
    pub deleted: RwSignal<Option<Entry>>,
    /// Messages from the last import.
    pub import_problems: RwSignal<Vec<String>>,
    /// The draft validated: the one validation every result below derives from.
    pub job: Memo<Result<Job, Vec<Problem>>>,
    pub problems: Memo<Vec<Problem>>,
    pub report: Memo<Option<Result<Report, String>>>,
    pub what_if: Memo<Option<Result<WhatIf, String>>>,
    pub sweep: Memo<Option<Result<Sweep, String>>>,
    /// Every dated set of the job's readings diagnosed (none while the job itself has problems).
    pub diagnosis: Memo<Option<History>>,
    /// True when breaker position 1 is on L2 in this panel.
    pub flipped: RwSignal<bool>,
    pub balance: Memo<Option<Balance>>,
    /// The panel schedule in position order, checked against the layout.
    pub schedule: Memo<Option<Vec<Row>>>,
    /// The job as found beside the job with its planned appliances (none without planned ones).
    pub plan: Memo<Option<Result<Plan, String>>>,
    /// The last edit that can be undone (balancing moves applied, an appliance removed): what it
    /// did, in words, and the job as it was before.
    pub undo: RwSignal<Option<(String, JobFile)>>,
}

/// Milliseconds since 1970, from the browser's clock.
pub fn now_ms() -> f64 {
    js_sys::Date::now()
}

/// The browser's local time as a reading set's date, `2026-12-02 09:40`.
pub fn taken_now() -> String {
    let d = js_sys::Date::new_0();
    format!(
        "{:04}-{:02}-{:02} {:02}:{:02}",
        d.get_full_year(),
        d.get_month() + 1,
        d.get_date(),
        d.get_hours(),
        d.get_minutes()
    )
}

fn new_id() -> String {
    // Time plus a random part: unique enough for one person's jobs, stable as a storage key.
    format!(
        "{:x}{:04x}",
        now_ms() as u64,
        (js_sys::Math::random() * 65535.0) as u32
    )
}

impl AppState {
    /// Builds the state, loads saved jobs and offers the demo job on first start.
    pub fn new() -> AppState {
        let draft = RwSignal::new(edit::new_job("New job"));
        // Validate once per edit; every result below derives from this one memo.
        let valid = Memo::new(move |_| draft.with(validate));
        let problems =
            Memo::new(move |_| valid.with(|v| v.as_ref().err().cloned().unwrap_or_default()));
        let report = Memo::new(move |_| {
            valid.with(|v| {
                v.as_ref()
                    .ok()
                    .map(|j| analyze(j).map_err(|e| e.to_string()))
            })
        });
        let what_if = Memo::new(move |_| {
            valid.with(|v| {
                v.as_ref()
                    .ok()
                    .map(|j| what_if(j).map_err(|e| e.to_string()))
            })
        });
        let sweep = Memo::new(move |_| {
            valid.with(|v| {
                v.as_ref()
                    .ok()
                    .map(|j| sweep(j, &sweep_points(SWEEP_POINTS)).map_err(|e| e.to_string()))
            })
        });
        let diagnosis = Memo::new(move |_| {
            valid.with(|v| v.as_ref().ok().map(|j| draft.with(|file| history(j, file))))
        });
        let flipped = RwSignal::new(false);
        let balance = Memo::new(move |_| {
            let layout = if flipped.get() {
                Layout::Flipped
            } else {
                Layout::Standard
            };
            valid.with(|v| v.as_ref().ok().map(|j| balance(j, layout)))
        });
        let schedule = Memo::new(move |_| {
            let layout = if flipped.get() {
                Layout::Flipped
            } else {
                Layout::Standard
            };
            valid.with(|v| v.as_ref().ok().map(|j| schedule(j, layout)))
        });
        let state = AppState {
            jobs: RwSignal::new(Vec::new()),
            open_id: RwSignal::new(None),
            draft,
            structure: RwSignal::new(0),
            screen: RwSignal::new(Screen::Jobs),
            tab: RwSignal::new(Tab::Results),
            banners: RwSignal::new(Vec::new()),
            settings: RwSignal::new(storage::load_settings()),
            deleted: RwSignal::new(None),
            import_problems: RwSignal::new(Vec::new()),
            problems,
            report,
            what_if,
            sweep,
            diagnosis,
            flipped,
            balance,
            schedule,
            job: valid,
            plan: Memo::new(move |_| {
                valid.with(|v| {
                    v.as_ref()
                        .ok()
                        .filter(|j| !j.planned().is_empty())
                        .map(|j| plan(j).map_err(|e| e.to_string()))
                })
            }),
            undo: RwSignal::new(None),
        };
        state.load();
        state
    }

    fn load(&self) {
        let mut banners = Vec::new();
        if !storage::available() {
            banners.push(storage::StorageError::Unavailable.to_string());
        }
        let (jobs, problems) = storage::load_jobs();
        banners.extend(problems.iter().map(|p| p.to_string()));
        let mut entries: Vec<Entry> = jobs
            .into_iter()
            .map(|(id, stored)| Entry { id, stored })
            .collect();
        if storage::available() && !storage::seeded() {
            if let Ok(demo) = tapline_core::job::parse_job(tapline_core::demo::DEMO_JOB) {
                let entry = Entry {
                    id: new_id(),
                    stored: StoredJob {
                        saved_ms: now_ms(),
                        job: demo,
                    },
                };
                match storage::save_job(&entry.id, &entry.stored)
                    .and_then(|_| storage::mark_seeded())
                {
                    Ok(()) => entries.insert(0, entry),
                    Err(e) => banners.push(e.to_string()),
                }
            }
        } else if !storage::available() {
            // Without storage the demo still opens, so the app is useful; nothing is saved.
            if let Ok(demo) = tapline_core::job::parse_job(tapline_core::demo::DEMO_JOB) {
                entries.push(Entry {
                    id: new_id(),
                    stored: StoredJob {
                        saved_ms: now_ms(),
                        job: demo,
                    },
                });
            }
        }
        self.jobs.set(entries);
        self.banners.set(banners);
    }

    /// Opens a saved job in the editor.
    pub fn open(&self, id: &str) {
        let Some(entry) = self
            .jobs
            .with_untracked(|j| j.iter().find(|e| e.id == id).cloned())
        else {
            return;
        };
        // A draft kept from before a reload comes back, problems and all.
        let draft = storage::load_draft(&entry.id)
            .filter(|d| *d != entry.stored.job)
            .unwrap_or(entry.stored.job);
        self.draft.set(draft);
        self.open_id.set(Some(entry.id));
        self.undo.set(None);
        self.structure.update(|s| *s += 1);
        self.tab.set(Tab::Results);
        self.screen.set(Screen::Job);
    }

    /// Adds a job to the list and storage (a new id: nothing existing is overwritten) and opens it.
    pub fn add_and_open(&self, job: JobFile) {
        let entry = Entry {
            id: new_id(),
            stored: StoredJob {
                saved_ms: now_ms(),
                job,
            },
        };
        if let Err(e) = storage::save_job(&entry.id, &entry.stored) {
            self.banner(e.to_string());
        }
        let id = entry.id.clone();
        self.jobs.update(|j| j.insert(0, entry));
        self.open(&id);
    }

    /// Starts a job for a quick diagnosis: a new job with one dated set of readings, opened on its
    /// readings.
    pub fn new_diagnosis(&self) {
        let mut job = edit::new_job("Neutral diagnosis");
        edit::readings::add_set(&mut job, &taken_now(), "first test");
        self.add_and_open(job);
        self.tab.set(Tab::Readings);
    }

    /// Applies the balancing moves to the job, keeping the job as it was for undo.
    pub fn apply_moves(&self, moves: &[tapline_core::tools::balance::Move]) {
        self.undoable("Moves applied to the job.".to_string(), |j| {
            edit::panel::apply_moves(j, moves)
        });
    }

    /// Removes appliance `i`, keeping the job as it was for undo.
    pub fn remove_load(&self, i: usize) {
        let name = self.draft.with_untracked(|d| {
            edit::loads(d)
                .get(i)
                .map(|l| edit::text_of(&l.name))
                .unwrap_or_default()
        });
        self.undoable(format!("Removed “{name}”."), |j| {
            edit::remove_load(j, i)
        });
    }

    fn undoable(&self, what: String, f: impl FnOnce(&mut JobFile)) {
        let before = self.draft.get_untracked();
        self.edit_structure(f);
        self.undo.set(Some((what, before)));
    }

    /// Puts the job back as it was before the last undoable edit.
    pub fn undo_edit(&self) {
        if let Some((_, job)) = self.undo.get_untracked() {
            self.undo.set(None);
            self.edit_structure(|j| *j = job);
        }
    }

    /// Applies an edit to the draft and saves it if the result is valid. An invalid draft stays on
    /// screen with its field messages; the last valid version stays saved.
    pub fn edit(&self, f: impl FnOnce(&mut JobFile)) {
        // Undo restores the job as it was before one edit: once anything else changes, that
        // copy would throw the later change away, so it goes.
        if self.undo.with_untracked(Option::is_some) {
            self.undo.set(None);
        }
        self.draft.update(f);
        self.save_draft();
    }

    /// Like [`AppState::edit`] for edits that add or remove rows.
    pub fn edit_structure(&self, f: impl FnOnce(&mut JobFile)) {
        self.edit(f);
        self.structure.update(|s| *s += 1);
    }

    fn save_draft(&self) {
        let Some(id) = self.open_id.get_untracked() else {
            return;
        };
        let job = self.draft.get_untracked();
        // The draft's one validation, from the memo every result uses.
        if self.job.with_untracked(Result::is_err) {
            // Kept as typed, so a reload brings it back with its problems; the saved job stays
            // the last valid version.
            if let Err(e) = storage::save_draft(&id, &job) {
                self.banner(e.to_string());
            }
            return;
        }
        let stored = StoredJob {
            saved_ms: now_ms(),
            job,
        };
        match storage::save_job(&id, &stored) {
            Ok(()) => storage::clear_draft(&id),
            Err(e) => self.banner(e.to_string()),
        }
        self.jobs.update(|jobs| {
            if let Some(e) = jobs.iter_mut().find(|e| e.id == id) {
                e.stored = stored;
            }
        });
    }

    /// Duplicates a saved job.
    pub fn duplicate(&self, id: &str) {
        if let Some(e) = self
            .jobs
            .with_untracked(|j| j.iter().find(|e| e.id == id).cloned())
        {
            let entry = Entry {
                id: new_id(),
                stored: StoredJob {
                    saved_ms: now_ms(),
                    job: edit::duplicate(&e.stored.job),
                },
            };
            if let Err(err) = storage::save_job(&entry.id, &entry.stored) {
                self.banner(err.to_string());
            }
            self.jobs.update(|j| j.insert(0, entry));
        }
    }

    /// Renames a saved job (an empty name is refused).
    pub fn rename(&self, id: &str, name: &str) {
        if name.trim().is_empty() {
            return;
        }
        let mut found = None;
        self.jobs.update(|jobs| {
            if let Some(e) = jobs.iter_mut().find(|e| e.id == id) {
                e.stored.job.name = Raw::Given(name.trim().to_string());
                e.stored.saved_ms = now_ms();
                found = Some(e.stored.clone());
            }
        });
        if let Some(stored) = found {
            if let Err(e) = storage::save_job(id, &stored) {
                self.banner(e.to_string());
            }
        }
    }

    /// Deletes a saved job, keeping it for undo.
    pub fn delete(&self, id: &str) {
        let mut removed = None;
        self.jobs.update(|jobs| {
            if let Some(pos) = jobs.iter().position(|e| e.id == id) {
                removed = Some(jobs.remove(pos));
            }
        });
        if let Some(entry) = removed {
            if let Err(e) = storage::delete_job(id) {
                self.banner(e.to_string());
            }
            self.deleted.set(Some(entry));
        }
    }

    /// Restores the last deleted job.
    pub fn undo_delete(&self) {
        if let Some(entry) = self.deleted.get_untracked() {
            if let Err(e) = storage::save_job(&entry.id, &entry.stored) {
                self.banner(e.to_string());
            }
            self.jobs.update(|j| j.insert(0, entry));
            self.deleted.set(None);
        }
    }

    /// Shows a message at the top of the screen.
    pub fn banner(&self, text: String) {
        self.banners.update(|b| {
            if !b.contains(&text) {
                b.push(text)
            }
        });
    }

    /// Changes the length units.
    pub fn set_units(&self, units: edit::Units) {
        self.settings.update(|s| s.units = units.code().to_string());
        self.structure.update(|s| *s += 1);
        if let Err(e) = storage::save_settings(&self.settings.get_untracked()) {
            self.banner(e.to_string());
        }
    }

    /// Records that the cautions were read.
    pub fn accept_cautions(&self) {
        self.settings.update(|s| s.cautions_seen = true);
        if let Err(e) = storage::save_settings(&self.settings.get_untracked()) {
            self.banner(e.to_string());
        }
    }

    /// The units setting.
    pub fn units(&self) -> edit::Units {
        edit::Units::parse(&self.settings.with(|s| s.units.clone()))
    }

    /// The problem message for a field path, if any (reactive).
    pub fn problem(&self, path: &str) -> Option<String> {
        self.problems.with(|p| edit::problem_at(p, path))
    }
}

impl Default for AppState {
    fn default() -> Self {
        AppState::new()
    }
}

/// The one-line status of a saved job for the list, from the engine (or why there is none).
pub fn status_of(job: &JobFile) -> String {
    match validate(job) {
        Err(p) => format!("{} field(s) to fix", p.len()),
        Ok(j) => match what_if(&j) {
            Ok(w) => {
                let now = match analyze(&j) {
                    Ok(r) => r,
                    Err(e) => return e.to_string(),
                };
                crate::format::status_line(&now, Some(&w.open))
            }
            Err(e) => e.to_string(),
        },
    }
}
