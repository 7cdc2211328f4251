//! One job: its tabs.

use super::{
    loads::LoadsTab, panel::PanelTab, readings::ReadingsTab, results::ResultsTab,
    service::ServiceTab, whatif::WhatIfTab,
};
use crate::edit;
use crate::files;
use crate::route::Route;
use crate::state::{AppState, Conflict, Tab};
use leptos::prelude::*;
use tapline_core::job::job_to_json;

#[component]
pub fn JobPage() -> impl IntoView {
    let state = expect_context::<AppState>();
    let tab_button = move |tab: Tab, label: &'static str, testid: &'static str| {
        view! {
            <button class="tab" class:active=move || state.tab.get() == tab data-testid=testid on:click=move |_| { if let Some(id) = state.open_id.get_untracked() { state.go(Route::job(&id, tab)) } }>{label}</button>
        }
    };
    let export = move |_| {
        let job = state.draft.get_untracked();
        let name = files::file_name(&edit::text_of(&job.name));
        if let Err(e) = files::download(&name, &job_to_json(&job)) {
            state.banner(e);
        }
    };
    view! {
        <section class="page" data-testid="job-page">
            // The job's name and its tabs stay on screen while scrolling, so results are one tap
            // away from anywhere in a long list.
            <div class="job-bar" data-testid="job-bar">
                <div class="job-head">
                    <button data-testid="back-to-jobs" on:click=move |_| state.go(Route::Jobs)>"‹ Jobs"</button>
                    <h2 data-testid="job-title">{move || state.draft.with(|d| edit::text_of(&d.name))}</h2>
                    <button data-testid="export-open-job" on:click=export>"Export"</button>
                </div>
                <nav class="tabs">
                    {tab_button(Tab::Service, "Service", "tab-service")}
                    {tab_button(Tab::Loads, "Appliances", "tab-loads")}
                    {tab_button(Tab::Results, "Results", "tab-results")}
                    {tab_button(Tab::WhatIf, "What-if", "tab-whatif")}
                    {tab_button(Tab::Panel, "Panel", "tab-panel")}
                    {tab_button(Tab::Readings, "Readings", "tab-readings")}
                </nav>
            </div>
            {move || state.conflict.with(|c| c.as_ref().map(|c| {
                let (what, mine, theirs) = match c {
                    Conflict::Changed(_) => ("This job was saved in another tab or window since you opened it here. Your edits here are kept but not saved yet.", "Save mine over it", "Load the other version"),
                    Conflict::Deleted => ("This job was deleted in another tab or window. Your edits here are kept but not saved.", "Keep it (save mine again)", "Close it"),
                };
                view! {
                    <div class="conflict" role="alert" data-testid="conflict">
                        <p>{what}</p>
                        <button data-testid="keep-mine" on:click=move |_| state.keep_mine()>{mine}</button>
                        <button data-testid="take-theirs" on:click=move |_| state.take_theirs()>{theirs}</button>
                    </div>
                }
            }))}
            <Show when=move || state.undo.with(|u| u.is_some())>
                <div class="undo" data-testid="undo-edit-bar">
                    {move || state.undo.with(|u| u.as_ref().map(|(what, _)| what.clone()).unwrap_or_default())}
                    <button data-testid="undo-edit" on:click=move |_| state.undo_edit()>"Undo"</button>
                </div>
            </Show>
            {move || {
                // Re-drawn when the tab or the job's structure changes, so fields start from the job.
                state.structure.track();
                match state.tab.get() {
                    Tab::Service => view! { <ServiceTab /> }.into_any(),
                    Tab::Loads => view! { <LoadsTab /> }.into_any(),
                    Tab::Results => view! { <ResultsTab /> }.into_any(),
                    Tab::WhatIf => view! { <WhatIfTab /> }.into_any(),
                    Tab::Panel => view! { <PanelTab /> }.into_any(),
                    Tab::Readings => view! { <ReadingsTab /> }.into_any(),
                }
            }}
        </section>
    }
}
