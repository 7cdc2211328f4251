//! Application state: signals for what is on screen, and memos that hand the draft job to the
//! engine. Every number shown comes from these memos.

use crate::edit;
use crate::edit::neutral::Explore;
use crate::nav;
use crate::route::Route;
use crate::storage::{self, Settings, StoredJob};
use leptos::prelude::*;
use tapline_core::job::{JobFile, Raw};
use tapline_core::report::{analyze, Report};
use tapline_core::tools::balance::{balance, schedule, Balance, Layout, Row};
use tapline_core::tools::diagnose::{history, History};
use tapline_core::tools::plan::{plan, Plan};
use tapline_core::validate::{validate, what_if_neutral, Problem};
use tapline_core::validated::{Job, NeutralState};
use tapline_core::whatif::{sweep, sweep_points, Sweep};

/// Points in the app's neutral sweep plot.
pub const SWEEP_POINTS: usize = 160;

/// Which screen is showing.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Screen {
    Jobs,
    Job,
    Cautions,
    /// An address named a job that is not on this phone.
    Missing,
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

/// The what-if's neutral solved on the job: never saved into it.
#[derive(Clone, Debug, PartialEq)]
pub enum Explored {
    /// The neutral explored and the job's report with it.
    Ready {
        neutral: NeutralState,
        report: Box<Report>,
    },
    /// The resistance typed for a loose neutral is refused: the engine's message.
    Field(String),
    /// The job does not solve in that state.
    Failed(String),
}

/// A message at the top of the screen.
#[derive(Clone, Debug, PartialEq)]
pub struct Notice {
    pub text: String,
    /// A storage problem: cleared by itself once a save succeeds again.
    pub storage: bool,
}

impl From<storage::StorageError> for Notice {
    /// A storage problem in plain words; all but a job set aside go once storage works again.
    fn from(e: storage::StorageError) -> Notice {
        Notice {
            storage: !matches!(e, storage::StorageError::SetAside { .. }),
            text: e.to_string(),
        }
    }
}

/// Another tab or window saved or deleted the open job since this one read it.
#[derive(Clone, Debug, PartialEq)]
pub enum Conflict {
    /// Saved there: the version it saved.
    Changed(Box<StoredJob>),
    /// Deleted there.
    Deleted,
}

/// What a save of the open job does.
#[derive(Clone, Debug, PartialEq)]
pub enum SaveCheck {
    /// Nobody else wrote it: save as this revision.
    Write {
        revision: u64,
    },
    Conflict(Conflict),
}

/// Decides a save from the revision this tab last read or wrote (`None` when it never got into
/// storage) and what storage holds now. A save never overwrites a version it has not seen, and
/// never brings back a job deleted elsewhere.
pub fn check_save(base: Option<u64>, stored: Option<StoredJob>) -> SaveCheck {
    match (base, stored) {
        (None, None) => SaveCheck::Write { revision: 1 },
        (Some(_), None) => SaveCheck::Conflict(Conflict::Deleted),
        (Some(b), Some(s)) if s.revision == b => SaveCheck::Write { revision: b + 1 },
        (_, Some(s)) => SaveCheck::Conflict(Conflict::Changed(Box::new(s))),
    }
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
    /// Where the person is, as the address says (see [`crate::route`]).
    pub route: RwSignal<Route>,
    pub tab: RwSignal<Tab>,
    pub banners: RwSignal<Vec<Notice>>,
    pub settings: RwSignal<Settings>,
    /// The revision of the open job this tab last read or wrote (`None`: not in storage).
    pub base: RwSignal<Option<u64>>,
    /// Set when another tab saved or deleted the open job; saving waits for the person's choice.
    pub conflict: RwSignal<Option<Conflict>>,
    /// The last deleted job, for undo.
    pub deleted: RwSignal<Option<Entry>>,
    /// Messages from the last import.
    pub import_problems: RwSignal<Vec<String>>,
    /// The draft validated: the one validation every result below derives from.
    pub job: Memo<Result<Job, Vec<Problem>>>,
    pub problems: Memo<Vec<Problem>>,
    pub report: Memo<Option<Result<Report, String>>>,
    /// The job solved with its neutral open: the worst case the homeowner view and the job
    /// list speak of.
    pub open: Memo<Option<Result<Report, String>>>,
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
    /// The neutral state the what-if explores, apart from the job (the job keeps the neutral as
    /// found on site).
    pub explore: RwSignal<Explore>,
    /// The job solved with the explored neutral (none while the job has problems).
    pub explored: Memo<Option<Explored>>,
    /// The connection new appliances go on (`L1-N`, …), kept while several are added.
    pub add_on: RwSignal<String>,
    /// The appliance just added, whose line opens, scrolls into view and takes the focus.
    pub added: RwSignal<Option<usize>>,
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
        let open = Memo::new(move |_| {
            valid.with(|v| {
                v.as_ref().ok().map(|j| {
                    analyze(&j.with_neutral(NeutralState::Open)).map_err(|e| e.to_string())
                })
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
        let explore = RwSignal::new(Explore::Open);
        // The as-found and open states are solved once, by `report` and `open`; only a loose
        // neutral of the person's choosing needs a solve of its own.
        let explored = Memo::new(move |_| {
            let file = explore.with(Explore::to_file);
            valid.with(|v| {
                let job = v.as_ref().ok()?;
                let neutral = match file.map(|f| what_if_neutral(&f)) {
                    None => job.neutral(),
                    Some(Ok(n)) => n,
                    Some(Err(p)) => {
                        return Some(Explored::Field(
                            p.first().map(|p| p.message.clone()).unwrap_or_default(),
                        ))
                    }
                };
                let ready = |r: &Result<Report, String>| match r {
                    Ok(rep) => Explored::Ready {
                        neutral,
                        report: Box::new(rep.clone()),
                    },
                    Err(e) => Explored::Failed(e.clone()),
                };
                if neutral == job.neutral() {
                    return report.with(|r| r.as_ref().map(ready));
                }
                if neutral == NeutralState::Open {
                    return open.with(|r| r.as_ref().map(ready));
                }
                Some(ready(
                    &analyze(&job.with_neutral(neutral)).map_err(|e| e.to_string()),
                ))
            })
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
            route: RwSignal::new(Route::Jobs),
            tab: RwSignal::new(Tab::Results),
            banners: RwSignal::new(Vec::new()),
            base: RwSignal::new(None),
            conflict: RwSignal::new(None),
            settings: RwSignal::new(storage::load_settings()),
            deleted: RwSignal::new(None),
            import_problems: RwSignal::new(Vec::new()),
            problems,
            report,
            open,
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
            explore,
            explored,
            added: RwSignal::new(None),
            add_on: RwSignal::new("L1-N".to_string()),
            undo: RwSignal::new(None),
        };
        state.load();
        state
    }

    fn load(&self) {
        let mut banners = Vec::new();
        if !storage::available() {
            banners.push(storage::StorageError::Unavailable);
        }
        let (jobs, problems) = storage::load_jobs();
        banners.extend(problems);
        let mut entries: Vec<Entry> = jobs
            .into_iter()
            .map(|(id, stored)| Entry { id, stored })
            .collect();
        if storage::available() && !storage::seeded() {
            if let Ok(demo) = tapline_core::job::parse_job(tapline_core::demo::DEMO_JOB) {
                let entry = Entry {
                    id: new_id(),
                    stored: StoredJob::first(demo, now_ms()),
                };
                match storage::save_job(&entry.id, &entry.stored)
                    .and_then(|_| storage::mark_seeded())
                {
                    Ok(()) => entries.insert(0, entry),
                    Err(e) => banners.push(e),
                }
            }
        } else if !storage::available() {
            // Without storage the demo still opens, so the app is useful; nothing is saved.
            if let Ok(demo) = tapline_core::job::parse_job(tapline_core::demo::DEMO_JOB) {
                entries.push(Entry {
                    id: new_id(),
                    stored: StoredJob::first(demo, now_ms()),
                });
            }
        }
        self.jobs.set(entries);
        self.banners
            .set(banners.into_iter().map(Notice::from).collect());
    }

    /// Re-reads the saved jobs after another tab changed them, so the list shows what is stored.
    pub fn refresh_jobs(&self) {
        let (jobs, problems) = storage::load_jobs();
        for p in problems {
            self.storage_notice(p);
        }
        self.jobs.set(
            jobs.into_iter()
                .map(|(id, stored)| Entry { id, stored })
                .collect(),
        );
    }

    /// Follows an address: the screen, the job and the tab it names. A job that is not in the
    /// list (deleted, or never on this phone) shows the screen that says so.
    pub fn apply_route(&self, route: Route) {
        let screen = match &route {
            Route::Jobs => Screen::Jobs,
            Route::Cautions => Screen::Cautions,
            Route::Job { id, tab, .. } => {
                let listed = self
                    .jobs
                    .with_untracked(|j| j.iter().find(|e| &e.id == id).map(|e| e.stored.revision));
                if let Some(revision) = listed {
                    // Opened afresh when it is another job, or when the stored job moved on since
                    // it was loaded (renamed in the list, saved by another tab) and this tab has
                    // nothing unsaved; edits kept as a draft wait for the save check to ask.
                    let same = self
                        .open_id
                        .with_untracked(|o| o.as_deref() == Some(id.as_str()));
                    let moved_on = self.base.get_untracked().is_some_and(|b| b != revision)
                        && self.conflict.with_untracked(Option::is_none)
                        && storage::load_draft(id).is_none();
                    if !same || moved_on {
                        self.open(id);
                    }
                    if self.tab.get_untracked() != *tab {
                        self.tab.set(*tab);
                    }
                    Screen::Job
                } else {
                    Screen::Missing
                }
            }
        };
        if self.screen.get_untracked() != screen {
            self.screen.set(screen);
        }
        if self.route.with_untracked(|r| *r != route) {
            self.route.set(route);
        }
    }

    /// Goes to a place (a new entry in the browser's history).
    pub fn go(&self, route: Route) {
        nav::go(*self, route);
    }

    /// Loads a saved job into the editor (the address decides which tab shows).
    fn open(&self, id: &str) {
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
        self.base
            .set(storage::available().then_some(entry.stored.revision));
        self.conflict.set(None);
        self.open_id.set(Some(entry.id));
        self.undo.set(None);
        self.explore.set(Explore::Open);
        self.add_on.set("L1-N".to_string());
        self.structure.update(|s| *s += 1);
    }

    /// Adds a job to the list and storage (a new id: nothing existing is overwritten) and opens it.
    /// When the browser refuses to store it (full), the job is not listed, since it would be gone
    /// after a reload, and the person is told; without storage at all it opens unsaved, as the
    /// banner about storage says.
    pub fn add_and_open(&self, job: JobFile, tab: Tab) {
        let name = edit::text_of(&job.name);
        let entry = Entry {
            id: new_id(),
            stored: StoredJob::first(job, now_ms()),
        };
        match storage::save_job(&entry.id, &entry.stored) {
            Ok(()) => self.storage_works(),
            Err(e @ storage::StorageError::WriteRefused(_)) => {
                self.storage_notice(e);
                self.banner(format!(
                    "“{name}” was not added: the browser has no room to keep it. Export and delete jobs you no longer need, then try again."
                ));
                return;
            }
            Err(e) => self.storage_notice(e),
        }
        let id = entry.id.clone();
        self.jobs.update(|j| j.insert(0, entry));
        self.go(Route::job(&id, tab));
    }

    /// Starts a job for a quick diagnosis: a new job with one dated set of readings, opened on its
    /// readings.
    pub fn new_diagnosis(&self) {
        let mut job = edit::new_job("Neutral diagnosis");
        edit::readings::add_set(&mut job, &taken_now(), "first test");
        self.add_and_open(job, Tab::Readings);
    }

    /// Applies the balancing moves to the job, keeping the job as it was for undo.
    pub fn apply_moves(&self, moves: &[tapline_core::tools::balance::Move]) {
        self.undoable("Moves applied to the job.".to_string(), |j| {
            edit::panel::apply_moves(j, moves)
        });
    }

    /// Adds a library appliance on `connect` (a 240 V one goes across two legs).
    pub fn add_appliance(&self, a: &tapline_core::library::Appliance, connect: &str) {
        self.add_load(|j| edit::add_appliance(j, a, connect));
    }

    /// Adds a custom load on `connect`.
    pub fn add_custom(&self, connect: &str) {
        self.add_load(|j| edit::add_custom_on(j, connect));
    }

    /// Appends a load, whose line then opens with the focus.
    fn add_load(&self, f: impl FnOnce(&mut JobFile)) {
        self.added
            .set(Some(self.draft.with_untracked(|d| edit::loads(d).len())));
        self.edit_structure(f);
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
        self.close_detail();
        let before = self.draft.get_untracked();
        self.edit_structure(f);
        self.undo.set(Some((what, before)));
    }

    /// An appliance's address stops naming anything once the list changes under it.
    fn close_detail(&self) {
        let route = self.route.get_untracked();
        if route.detail().is_some() {
            nav::replace_with(*self, route.without_detail());
        }
    }

    /// Puts the job back as it was before the last undoable edit.
    pub fn undo_edit(&self) {
        if let Some((_, job)) = self.undo.get_untracked() {
            self.close_detail();
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
        let valid = self.job.with_untracked(Result::is_ok);
        if !valid || self.conflict.with_untracked(Option::is_some) {
            // Kept as typed, so a reload brings it back with its problems; the saved job stays
            // the last valid version (or the other tab's, until the person chooses).
            if let Err(e) = storage::save_draft(&id, &job) {
                self.storage_notice(e);
            }
            return;
        }
        if !storage::available() {
            return;
        }
        let now = match storage::load_job(&id) {
            Ok(now) => now,
            Err(e) => {
                self.storage_notice(e);
                return;
            }
        };
        match check_save(self.base.get_untracked(), now) {
            SaveCheck::Write { revision } => self.write(&id, job, revision),
            SaveCheck::Conflict(c) => {
                if let Err(e) = storage::save_draft(&id, &job) {
                    self.storage_notice(e);
                }
                self.conflict.set(Some(c));
            }
        }
    }

    /// Writes the open job as `revision` and lists it.
    fn write(&self, id: &str, job: JobFile, revision: u64) {
        let stored = StoredJob {
            saved_ms: now_ms(),
            revision,
            job,
        };
        match storage::save_job(id, &stored) {
            Ok(()) => {
                storage::clear_draft(id);
                self.base.set(Some(revision));
                self.storage_works();
            }
            Err(e) => self.storage_notice(e),
        }
        self.jobs
            .update(|jobs| match jobs.iter_mut().find(|e| e.id == id) {
                Some(e) => e.stored = stored,
                None => jobs.insert(
                    0,
                    Entry {
                        id: id.to_string(),
                        stored,
                    },
                ),
            });
    }

    /// Resolves a conflict by saving this tab's version over the other one (or again, when the
    /// other tab deleted it).
    pub fn keep_mine(&self) {
        let Some(id) = self.open_id.get_untracked() else {
            return;
        };
        let Some(c) = self.conflict.get_untracked() else {
            return;
        };
        self.conflict.set(None);
        let revision = match c {
            Conflict::Changed(theirs) => theirs.revision + 1,
            Conflict::Deleted => 1,
        };
        if self.job.with_untracked(Result::is_ok) {
            self.write(&id, self.draft.get_untracked(), revision);
        } else {
            // Still invalid: the draft stays kept, and the next valid edit saves over theirs.
            self.base.set(Some(revision - 1));
        }
    }

    /// Resolves a conflict by taking the version the other tab saved, or, when it deleted the
    /// job, by closing it here too.
    pub fn take_theirs(&self) {
        let Some(id) = self.open_id.get_untracked() else {
            return;
        };
        match self.conflict.get_untracked() {
            Some(Conflict::Changed(theirs)) => {
                storage::clear_draft(&id);
                self.base.set(Some(theirs.revision));
                self.draft.set(theirs.job.clone());
                self.jobs.update(|jobs| {
                    if let Some(e) = jobs.iter_mut().find(|e| e.id == id) {
                        e.stored = *theirs;
                    }
                });
                self.structure.update(|s| *s += 1);
            }
            Some(Conflict::Deleted) => {
                storage::clear_draft(&id);
                self.jobs.update(|jobs| jobs.retain(|e| e.id != id));
                self.open_id.set(None);
                self.go(Route::Jobs);
            }
            None => {}
        }
        self.conflict.set(None);
    }

    /// Duplicates a saved job.
    pub fn duplicate(&self, id: &str) {
        if let Some(e) = self
            .jobs
            .with_untracked(|j| j.iter().find(|e| e.id == id).cloned())
        {
            let entry = Entry {
                id: new_id(),
                stored: StoredJob::first(edit::duplicate(&e.stored.job), now_ms()),
            };
            if let Err(err) = storage::save_job(&entry.id, &entry.stored) {
                self.storage_notice(err);
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
                e.stored.revision += 1;
                found = Some(e.stored.clone());
            }
        });
        if let Some(stored) = found {
            if let Err(e) = storage::save_job(id, &stored) {
                self.storage_notice(e);
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
                self.storage_notice(e);
            }
            self.deleted.set(Some(entry));
        }
    }

    /// Restores the last deleted job.
    pub fn undo_delete(&self) {
        if let Some(entry) = self.deleted.get_untracked() {
            if let Err(e) = storage::save_job(&entry.id, &entry.stored) {
                self.storage_notice(e);
            }
            self.jobs.update(|j| j.insert(0, entry));
            self.deleted.set(None);
        }
    }

    /// Shows a message at the top of the screen (once, however often it is raised).
    pub fn banner(&self, text: String) {
        self.notice(Notice {
            text,
            storage: false,
        });
    }

    /// Shows a storage problem in plain words; it goes once storage works again.
    pub fn storage_notice(&self, e: storage::StorageError) {
        self.notice(e.into());
    }

    fn notice(&self, n: Notice) {
        if self.banners.with_untracked(|b| !b.contains(&n)) {
            self.banners.update(|b| b.push(n));
        }
    }

    /// Clears the storage notices after a save succeeded.
    fn storage_works(&self) {
        if self.banners.with_untracked(|b| b.iter().any(|n| n.storage)) {
            self.banners.update(|b| b.retain(|n| !n.storage));
        }
    }

    /// Dismisses notice `i`.
    pub fn dismiss(&self, i: usize) {
        self.banners.update(|b| {
            if i < b.len() {
                b.remove(i);
            }
        });
    }

    /// Changes the length units.
    pub fn set_units(&self, units: edit::Units) {
        self.set_setting(|s| s.units = units.code().to_string());
        self.structure.update(|s| *s += 1);
    }

    /// Changes a setting and saves the settings.
    pub fn set_setting(&self, f: impl FnOnce(&mut Settings)) {
        self.settings.update(f);
        if let Err(e) = storage::save_settings(&self.settings.get_untracked()) {
            self.storage_notice(e);
        }
    }

    /// Records that the cautions were read.
    pub fn accept_cautions(&self) {
        self.set_setting(|s| s.cautions_seen = true);
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
        Ok(j) => match (analyze(&j), analyze(&j.with_neutral(NeutralState::Open))) {
            (Ok(now), Ok(open)) => crate::format::status_line(j.neutral(), &now, Some(&open)),
            (Err(e), _) | (_, Err(e)) => e.to_string(),
        },
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn stored(revision: u64) -> StoredJob {
        StoredJob {
            saved_ms: 1.0,
            revision,
            job: edit::new_job("t"),
        }
    }

    #[test]
    fn a_save_writes_the_next_revision_only_over_the_one_it_read() {
        assert_eq!(
            check_save(Some(3), Some(stored(3))),
            SaveCheck::Write { revision: 4 }
        );
        // Another tab saved revision 4 meanwhile: ask, never overwrite.
        assert_eq!(
            check_save(Some(3), Some(stored(4))),
            SaveCheck::Conflict(Conflict::Changed(Box::new(stored(4))))
        );
        // Another tab deleted it: not brought back without asking.
        assert_eq!(
            check_save(Some(3), None),
            SaveCheck::Conflict(Conflict::Deleted)
        );
        // A job that never got into storage is written as its first revision.
        assert_eq!(check_save(None, None), SaveCheck::Write { revision: 1 });
        assert_eq!(
            check_save(None, Some(stored(1))),
            SaveCheck::Conflict(Conflict::Changed(Box::new(stored(1))))
        );
    }

    #[test]
    fn the_status_of_a_job_with_problems_counts_them() {
        let mut job = edit::new_job("t");
        job.name = Raw::Given(String::new());
        assert!(
            status_of(&job).ends_with("field(s) to fix"),
            "{}",
            status_of(&job)
        );
        let demo = tapline_core::job::parse_job(tapline_core::demo::DEMO_JOB).unwrap();
        assert!(status_of(&demo).starts_with("neutral found loose"));
    }
}
