//! The neutral what-if: cautions first, then the neutral's state, the sweep plot and what each
//! appliance gets if the neutral opens.

use super::results::ProblemList;
use crate::components::{CautionList, NumberField, OutcomeBadge, SweepPlot};
use crate::edit;
use crate::format;
use crate::plot;
use crate::state::AppState;
use leptos::prelude::*;

#[component]
pub fn WhatIfTab() -> impl IntoView {
    let state = expect_context::<AppState>();
    view! {
        <div class="tab-body" data-testid="whatif-tab">
            {move || if state.settings.with(|s| s.cautions_seen) {
                view! { <WhatIfBody /> }.into_any()
            } else {
                view! {
                    <div class="caution-gate" data-testid="caution-gate">
                        <h3>"Read before using the neutral what-if"</h3>
                        <CautionList />
                        <button class="primary" data-testid="accept-cautions" on:click=move |_| state.accept_cautions()>"I understand"</button>
                    </div>
                }.into_any()
            }}
        </div>
    }
}

#[component]
fn WhatIfBody() -> impl IntoView {
    let state = expect_context::<AppState>();
    let (neutral_state, ohms, earth) = state.draft.with_untracked(edit::neutral_of);
    let current = RwSignal::new(neutral_state);
    let pick = move |s: &'static str| {
        current.set(s.to_string());
        state.edit(|j| edit::set_neutral_state(j, s));
    };
    let state_button = move |s: &'static str, label: &'static str| {
        view! { <button class="tab" class:active=move || current.get() == s data-testid=format!("neutral-{s}") on:click=move |_| pick(s)>{label}</button> }
    };
    let marker = move || {
        state.draft.with(|d| {
            let (s, o, _) = edit::neutral_of(d);
            match s.as_str() {
                "open" => Some(None),
                "loose" => edit::number_from_text(&o).given().map(|v| Some(*v)),
                _ => Some(Some(0.0)),
            }
        })
    };
    let plot = move || {
        state.sweep.with(|s| match s {
            Some(Ok(sw)) => view! { <SweepPlot plot=plot::layout(sw, marker()) /> }.into_any(),
            Some(Err(e)) => {
                view! { <p class="problems">{format!("No solution: {e}")}</p> }.into_any()
            }
            None => view! { <ProblemList /> }.into_any(),
        })
    };
    let if_open = move || {
        state.what_if.with(|w| match w {
            Some(Ok(w)) => w
                .open
                .loads
                .iter()
                .zip(&w.intact.loads)
                .filter(|(o, _)| o.on)
                .map(|(o, i)| {
                    view! {
                        <li class="appliance" data-testid="if-open" data-outcome=o.outcome.code()>
                            <div class="appliance-head">
                                <span class="appliance-name">{o.name.clone()}</span>
                                <OutcomeBadge outcome=o.outcome />
                            </div>
                            <p class="reason">
                                {format!("Now {}; if the neutral opens it ", format::volts(i.voltage_v))}
                                {o.reason.clone()}
                            </p>
                        </li>
                    }
                })
                .collect_view()
                .into_any(),
            _ => ().into_any(),
        })
    };
    view! {
        <p class="warning">"An open or loose neutral is a hazard: these are estimates to explain it, not a reason to leave it. Verify with a meter."</p>
        <nav class="tabs">
            {state_button("intact", "Intact")}
            {state_button("loose", "Loose")}
            {state_button("open", "Open")}
        </nav>
        <Show when=move || current.get() == "loose">
            <NumberField label="Loose-connection resistance".into() unit="Ω".to_string() initial=ohms.clone()
                problem=Signal::derive(move || state.problem("neutral.ohms"))
                on_text=move |t: String| state.edit(|j| edit::set_neutral_number(j, "ohms", &t)) testid="neutral-ohms" />
        </Show>
        <Show when=move || current.get() == "open">
            <NumberField label="Earth return through the grounding electrode (blank for none)".into() unit="Ω".to_string() initial=earth.clone()
                problem=Signal::derive(move || state.problem("neutral.earth_return_ohms"))
                on_text=move |t: String| state.edit(|j| edit::set_neutral_number(j, "earth_return_ohms", &t)) testid="neutral-earth" />
        </Show>
        {plot}
        <h3>"If the neutral opens"</h3>
        <ul class="appliances">{if_open}</ul>
    }
}
