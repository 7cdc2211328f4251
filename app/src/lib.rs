//! Tapline's phone app: a Leptos client-side rendered front end over `tapline-core`.
//!
//! Layout: [`state`] (signals and the memos that call the engine), [`storage`] (the only module
//! touching browser storage), [`edit`], [`format`] and [`plot`] (pure logic, tested natively),
//! [`files`] (export and import), `components/` (views only) and `pages/` (one per screen).

pub mod components;
pub mod edit;
pub mod files;
pub mod format;
pub mod messages;
pub mod nav;
pub mod owner;
pub mod pages;
pub mod plot;
pub mod route;
pub mod state;
pub mod storage;

use leptos::prelude::*;
use pages::{cautions::CautionsPage, job::JobPage, jobs::JobsPage, jobs::MissingPage};
use state::{AppState, Screen};

/// The whole app.
#[component]
pub fn App() -> impl IntoView {
    let state = AppState::new();
    provide_context(state);
    nav::start(state);
    // Another tab saved or deleted a job: the list shows what is stored now. (An open job's own
    // save checks its revision, see `state::check_save`.)
    let _ = window_event_listener(leptos::ev::storage, move |ev| {
        if ev.key().is_some_and(|k| storage::is_job_key(&k)) {
            state.refresh_jobs();
        }
    });
    view! {
        // Everything sits in a landmark (banner or main), so a screen reader can jump between them.
        <header>
            <div class="top">
                <h1 data-testid="app-title">"Tapline"</h1>
                <button class="caution-link" data-testid="open-cautions" on:click=move |_| state.go(route::Route::Cautions)>"⚠ Cautions"</button>
            </div>
            <p class="caution-line" data-testid="caution-line">"Live equipment can kill. Verify with a meter; work by qualified persons under local code."</p>
        </header>
        <main>
            <div class="banners">
                {move || state.banners.get().into_iter().enumerate().map(|(i, b)| view! {
                    <p class="banner" role="alert" data-testid="banner">
                        {b.text}
                        <button class="small" data-testid="dismiss-banner" aria-label="Dismiss" on:click=move |_| state.dismiss(i)>"✕"</button>
                    </p>
                }).collect_view()}
            </div>
            {move || match state.screen.get() {
                Screen::Jobs => view! { <JobsPage /> }.into_any(),
                Screen::Job => view! { <JobPage /> }.into_any(),
                Screen::Cautions => view! { <CautionsPage /> }.into_any(),
                Screen::Missing => view! { <MissingPage /> }.into_any(),
            }}
        </main>
    }
}

/// A small job for the tests: `kind` (`split-phase` or `wye`) at 120 V to neutral and 60 Hz,
/// with `loads`, the JSON text of its list of loads (a stiff source, no conductors).
#[cfg(test)]
pub(crate) fn test_job(kind: &str, loads: &str) -> tapline_core::validated::Job {
    let text = format!(
        r#"{{"version": 1, "name": "t", "system": {{"kind": "{kind}", "volts_to_neutral": 120, "frequency_hz": 60}}, "loads": {loads}}}"#
    );
    tapline_core::load_job(&text).unwrap().1
}

/// Mounts the app on the page.
pub fn start() {
    console_error_panic_hook::set_once();
    leptos::mount::mount_to_body(App);
}
