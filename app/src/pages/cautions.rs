//! The cautions screen, one tap away from everywhere.

use crate::components::CautionList;
use crate::state::{AppState, Screen};
use leptos::prelude::*;

#[component]
pub fn CautionsPage() -> impl IntoView {
    let state = expect_context::<AppState>();
    let back = move |_| {
        state
            .screen
            .set(if state.open_id.get_untracked().is_some() {
                Screen::Job
            } else {
                Screen::Jobs
            })
    };
    view! {
        <section class="page" data-testid="cautions-page">
            <h2>"Before you work"</h2>
            <CautionList />
            <button class="primary" data-testid="cautions-back" on:click=back>"Back"</button>
        </section>
    }
}
