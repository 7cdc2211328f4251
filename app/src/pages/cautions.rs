//! The cautions screen, one tap away from everywhere.

use crate::components::CautionList;

use leptos::prelude::*;

#[component]
pub fn CautionsPage() -> impl IntoView {
    // Back to wherever the cautions were opened from (the job list when opened by a link).
    let back = move |_| crate::nav::back();
    view! {
        <section class="page" data-testid="cautions-page">
            <h2>"Before you work"</h2>
            <CautionList />
            <button class="primary" data-testid="cautions-back" on:click=back>"Back"</button>
        </section>
    }
}
