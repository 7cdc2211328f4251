//! The neutral what-if: cautions first, then the neutral's state, the sweep plot and what each
//! appliance gets if the neutral opens.

use super::results::ProblemList;
use crate::components::{CautionList, NumberField, OutcomeBadge, PlotReadout, SweepPlot};
use crate::edit;
use crate::edit::neutral::{Explore, NeutralText};
use crate::format;
use crate::plot;
use crate::state::{AppState, Explored};
use leptos::prelude::*;
use tapline_core::validated::NeutralState;

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

/// The neutral as found, in a few words: `intact`, `loose, 2.5 Ω`, `open`.
fn found_words(n: &NeutralText) -> String {
    match n.state.as_str() {
        "loose" => format!("loose, {} Ω", n.ohms),
        other => other.to_string(),
    }
}

#[component]
fn WhatIfBody() -> impl IntoView {
    let state = expect_context::<AppState>();
    let found = state.draft.with_untracked(edit::neutral::neutral_of);
    let loose_text = match state.explore.get_untracked() {
        Explore::Loose(t) => t,
        _ => Explore::loose_from(&found)
            .loose_text()
            .unwrap_or_default()
            .to_string(),
    };
    let typed = RwSignal::new(loose_text.clone());
    let state_button = move |which: &'static str, label: &'static str| {
        let pick = move |_| {
            state.explore.set(match which {
                "as-found" => Explore::AsFound,
                "loose" => Explore::Loose(typed.get_untracked()),
                _ => Explore::Open,
            })
        };
        view! { <button class="tab" class:active=move || state.explore.with(|e| e.code() == which) data-testid=format!("neutral-{which}") on:click=pick>{label}</button> }
    };
    let marker = move || {
        state.explored.with(|e| match e {
            Some(Explored::Ready { neutral, .. }) => Some(match neutral {
                NeutralState::Intact => Some(0.0),
                NeutralState::Loose { ohms } => Some(*ohms),
                NeutralState::Open => None,
            }),
            _ => None,
        })
    };
    // The sweep point read out: set by a tap or drag on the plot or by the slider under it.
    let point = RwSignal::new(None::<usize>);
    let plot = move || {
        state.sweep.with(|s| match s {
            Some(Ok(sw)) => {
                let n = sw.neutral_ohms.len();
                view! {
                    <SweepPlot plot=plot::layout(sw, marker()) point=point points=n />
                    <label class="field">
                        <span class="field-label">"Read the plot at a neutral resistance"</span>
                        <input type="range" min="0" max=n.saturating_sub(1) step="1" data-testid="plot-slider"
                            prop:value=move || point.get().unwrap_or(0)
                            on:input=move |ev| point.set(event_target_value(&ev).parse().ok()) />
                    </label>
                }
                .into_any()
            }
            Some(Err(e)) => {
                view! { <p class="problems">{format!("No solution: {e}")}</p> }.into_any()
            }
            None => view! { <ProblemList /> }.into_any(),
        })
    };
    let heading = move || match state.explore.get() {
        Explore::AsFound => format!(
            "As found: neutral {}",
            found_words(&state.draft.with(edit::neutral::neutral_of))
        ),
        Explore::Loose(t) => format!("If the neutral works loose ({t} Ω)"),
        Explore::Open => "If the neutral opens".to_string(),
    };
    let appliances = move || {
        state.explored.with(|e| match e {
            Some(Explored::Ready { report, .. }) => state.report.with(|found| {
                let Some(Ok(found)) = found else { return ().into_any() };
                report
                    .loads
                    .iter()
                    .zip(&found.loads)
                    .filter(|(o, _)| o.on)
                    .map(|(o, i)| {
                        view! {
                            <li class="appliance" data-testid="what-if-appliance" data-outcome=o.outcome.code()>
                                <div class="appliance-head">
                                    <span class="appliance-name">{o.name.clone()}</span>
                                    <OutcomeBadge outcome=o.outcome />
                                </div>
                                <p class="reason">{format!("As found {}; here it {}", format::volts(i.voltage_v), o.reason)}</p>
                            </li>
                        }
                    })
                    .collect_view()
                    .into_any()
            }),
            Some(Explored::Failed(e)) => view! { <li class="problems">{format!("No solution in this state: {e}")}</li> }.into_any(),
            _ => ().into_any(),
        })
    };
    let ohms_problem = Signal::derive(move || {
        state.explored.with(|e| match e {
            Some(Explored::Field(m)) => Some(format!("Loose-connection resistance: {m}")),
            _ => None,
        })
    });
    view! {
        <p class="warning">"An open or loose neutral is a hazard: these are estimates to explain it, not a reason to leave it. Verify with a meter."</p>
        <p class="found" data-testid="neutral-found-line">
            {move || {
                let n = state.draft.with(edit::neutral::neutral_of);
                let how = if n.found.is_empty() { String::new() } else { format!(" ({})", n.found) };
                format!("The job records the neutral as found on site: {}{how}. Change that on the Service tab; choosing a state here explores it and saves nothing.", found_words(&n))
            }}
        </p>
        <nav class="tabs" aria-label="Neutral state to explore">
            {state_button("as-found", "As found")}
            {state_button("loose", "Works loose")}
            {state_button("open", "Opens")}
        </nav>
        <Show when=move || state.explore.with(|e| matches!(e, Explore::Loose(_)))>
            <NumberField label="Loose-connection resistance (what-if)".into() unit="Ω".to_string() initial=loose_text.clone()
                problem=ohms_problem
                on_text=move |t: String| { typed.set(t.clone()); state.explore.set(Explore::Loose(t)) } testid="neutral-ohms" />
        </Show>
        {plot}
        {move || match point.get() {
            None => view! { <p class="note">"Tap or drag on the plot, or move the slider, to read every appliance's voltage at that resistance."</p> }.into_any(),
            Some(k) => state.sweep.with(|s| match s {
                Some(Ok(sw)) => view! { <PlotReadout readout=plot::readout(sw, k) /> }.into_any(),
                _ => ().into_any(),
            }),
        }}
        <h3 data-testid="what-if-heading">{heading}</h3>
        <Show when=move || state.explore.with(|e| *e != Explore::AsFound)>
            <p class="what-if-tag" data-testid="what-if-tag">"What-if, not saved: the job as found is unchanged."</p>
        </Show>
        <ul class="appliances">{appliances}</ul>
    }
}
