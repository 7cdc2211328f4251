//! The list of saved jobs: search, create, import, open, duplicate, rename, export, delete, undo.

use crate::components::{Keyed, KeyedList};
use crate::edit;
use crate::files;
use crate::format;
use crate::state::{status_of, AppState, Entry};
use leptos::prelude::*;
use tapline_core::job::job_to_json;

#[component]
pub fn JobsPage() -> impl IntoView {
    let state = expect_context::<AppState>();
    let query = RwSignal::new(String::new());
    let file_input: NodeRef<leptos::html::Input> = NodeRef::new();
    let offset = js_sys::Date::new_0().get_timezone_offset();

    let on_import = move |_| {
        let Some(input) = file_input.get_untracked() else {
            return;
        };
        leptos::task::spawn_local(async move {
            let text = files::read_chosen(&input).await;
            input.set_value("");
            match text.map_err(|e| vec![e]).and_then(|t| {
                tapline_core::load_job(&t).map_err(|e| match e {
                    // Each problem named as the screen names the field.
                    tapline_core::EngineError::Invalid(problems) => {
                        let file = tapline_core::job::parse_job(&t).ok();
                        problems
                            .iter()
                            .map(|p| crate::format::problem_text(p, file.as_ref()))
                            .collect()
                    }
                    other => other.to_string().lines().map(str::to_string).collect(),
                })
            }) {
                Ok((file, _)) => {
                    state.import_problems.set(Vec::new());
                    state.add_and_open(file, crate::state::Tab::Results);
                }
                Err(lines) => state.import_problems.set(lines),
            }
        });
    };

    let visible = move || {
        let q = folded(&query.get());
        state.jobs.with(|jobs| {
            jobs.iter()
                .filter(|e| {
                    q.is_empty()
                        || folded(&edit::text_of(&e.stored.job.name)).contains(&q)
                        || folded(&edit::text_of(&e.stored.job.notes)).contains(&q)
                })
                .map(|e| {
                    let entry = e.clone();
                    let key = format!("{}/{}", e.id, e.stored.saved_ms.to_bits());
                    Keyed::new(key, move || view! { <JobCard entry=entry offset=offset /> })
                })
                .collect::<Vec<Keyed>>()
        })
    };

    view! {
        <section class="page" data-testid="jobs-page">
            <div class="actions">
                <button class="primary" data-testid="new-job" on:click=move |_| state.add_and_open(edit::new_job("New job"), crate::state::Tab::Loads)>"New job"</button>
                <label class="button">
                    "Import job"
                    <input type="file" accept=".json,application/json" class="hidden-file" data-testid="import-file" node_ref=file_input on:change=on_import />
                </label>
                <button data-testid="open-diagnose" on:click=move |_| state.new_diagnosis()>"Diagnose a neutral"</button>
            </div>
            <Show when=move || !state.import_problems.get().is_empty()>
                <div class="problems" role="alert" data-testid="import-problems">
                    <strong>"That file was not imported; nothing was changed:"</strong>
                    <ul>{move || state.import_problems.get().into_iter().map(|p| view! { <li>{p}</li> }).collect_view()}</ul>
                </div>
            </Show>
            <Show when=move || state.deleted.get().is_some()>
                <div class="undo" data-testid="undo-bar">
                    {move || format!("Deleted “{}”.", state.deleted.get().map(|e| edit::text_of(&e.stored.job.name)).unwrap_or_default())}
                    <button data-testid="undo-delete" on:click=move |_| state.undo_delete()>"Undo"</button>
                </div>
            </Show>
            <input class="search" type="search" placeholder="Search jobs" data-testid="job-search" on:input=move |ev| query.set(event_target_value(&ev)) />
            <ul class="job-list">
                <KeyedList rows=Box::new(visible) />
            </ul>
            <Show when=move || state.jobs.with(|j| j.is_empty())>
                <p class="empty">"No saved jobs yet. Start a new one or import a job file."</p>
            </Show>
        </section>
    }
}

/// `text` in lower case by the browser's own Unicode tables (`String.prototype.toLowerCase`),
/// which the module then need not carry: a job's name and notes are the user's words, in any
/// script.
fn folded(text: &str) -> String {
    js_sys::JsString::from(text).to_lower_case().into()
}

#[component]
fn JobCard(entry: Entry, offset: f64) -> impl IntoView {
    let state = expect_context::<AppState>();
    let renaming = RwSignal::new(false);
    let name = edit::text_of(&entry.stored.job.name);
    let notes = edit::text_of(&entry.stored.job.notes);
    let status = status_of(&entry.stored.job);
    let when = format::when(entry.stored.saved_ms, offset);
    let id = StoredValue::new(entry.id.clone());
    let new_name = RwSignal::new(name.clone());
    let export_name = files::file_name(&name);
    // Written out only when exported: the list opens without serializing every job.
    let job = StoredValue::new(entry.stored.job.clone());
    view! {
        <li class="job-card" data-testid="job-card">
            <button class="job-open" data-testid="open-job" on:click=move |_| state.go(crate::route::Route::job(&id.get_value(), crate::state::Tab::Results))>
                <span class="job-name">{name.clone()}</span>
                <span class="job-notes">{notes}</span>
                <span class="job-status" data-testid="job-status">{status}</span>
                <span class="job-when">"changed " {when}</span>
            </button>
            <Show when=move || renaming.get()>
                <div class="rename">
                    <input type="text" prop:value=new_name.get_untracked() data-testid="rename-input" on:input=move |ev| new_name.set(event_target_value(&ev)) />
                    <button data-testid="rename-save" on:click=move |_| { state.rename(&id.get_value(), &new_name.get_untracked()); renaming.set(false); }>"Save name"</button>
                </div>
            </Show>
            <div class="job-actions">
                <button data-testid="duplicate-job" on:click=move |_| state.duplicate(&id.get_value())>"Duplicate"</button>
                <button data-testid="rename-job" on:click=move |_| renaming.update(|r| *r = !*r)>"Rename"</button>
                <button data-testid="export-job" on:click=move |_| {
                    if let Err(e) = files::download(&export_name, &job.with_value(job_to_json)) { state.banner(e) }
                }>"Export"</button>
                <button class="danger" data-testid="delete-job" on:click=move |_| state.delete(&id.get_value())>"Delete"</button>
            </div>
        </li>
    }
}

/// An address named a job that is not on this phone (deleted, or opened from someone else's link).
#[component]
pub fn MissingPage() -> impl IntoView {
    let state = expect_context::<AppState>();
    view! {
        <section class="page" data-testid="missing-page">
            <h2>"That job is not on this phone"</h2>
            <p>"The address names a job this phone does not have: it was deleted, or the link came from another phone. Jobs move between phones by export and import."</p>
            <button class="primary" data-testid="missing-to-jobs" on:click=move |_| state.go(crate::route::Route::Jobs)>"Job list"</button>
        </section>
    }
}
