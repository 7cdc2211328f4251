//! Panel balancing for the open job: before and after, and the moves as a checklist.

use crate::edit;
use crate::format;
use crate::state::AppState;
use leptos::prelude::*;
use std::collections::BTreeMap;

fn legs_line(legs: &BTreeMap<String, f64>) -> String {
    legs.iter()
        .map(|(k, v)| format!("{k} {}", format::amps(*v)))
        .collect::<Vec<_>>()
        .join(" · ")
}

#[component]
pub fn PanelTab() -> impl IntoView {
    let state = expect_context::<AppState>();
    let body = move || {
        state.balance.with(|b| match b {
            None => view! { <super::results::ProblemList /> }.into_any(),
            Some(b) => {
                let moves = b.moves.clone();
                let swaps = b
                    .swaps
                    .iter()
                    .map(|s| view! { <li><label class="check"><input type="checkbox" data-testid="swap-done" />{s.text.clone()}</label></li> })
                    .collect_view();
                let notes = b.notes.iter().map(|n| view! { <p class="note">{n.clone()}</p> }).collect_view();
                let none = b.moves.is_empty();
                view! {
                    <table class="legs" data-testid="balance-table">
                        <thead><tr><th></th><th>"Neutral"</th><th>"Legs"</th></tr></thead>
                        <tbody>
                            <tr><th>"Now"</th><td class="big-figure" data-testid="balance-before">{format::amps(b.before.neutral_current_a)}</td><td>{legs_line(&b.before.legs)}</td></tr>
                            <tr><th>"After"</th><td class="big-figure" data-testid="balance-after">{format::amps(b.after.neutral_current_a)}</td><td>{legs_line(&b.after.legs)}</td></tr>
                        </tbody>
                    </table>
                    <p class="note">{format!("Every load at its rated current; the best arrangement within {} A, with the fewest moves.", b.within_a)}</p>
                    {if none {
                        view! { <p data-testid="no-moves">"This panel is already as balanced as its movable circuits allow."</p> }.into_any()
                    } else {
                        view! {
                            <h3>"Moves (turn the breakers off first)"</h3>
                            <ul class="checklist" data-testid="moves">{swaps}</ul>
                            <button class="primary" data-testid="apply-moves" on:click=move |_| state.edit_structure(|j| edit::apply_moves(j, &moves))>"Apply these moves to the job"</button>
                        }.into_any()
                    }}
                    {notes}
                }
                .into_any()
            }
        })
    };
    view! {
        <div class="tab-body" data-testid="panel-tab">
            <p class="note">"Movable 120 V circuits only; 240 V loads and circuits marked not movable stay put. Loads given the same circuit move together, as on one breaker."</p>
            <label class="check">
                <input type="checkbox" prop:checked=state.flipped.get_untracked() data-testid="flip-layout" on:change=move |ev| state.flipped.set(event_target_checked(&ev)) />
                "Position 1 is on L2 in this panel (flip the usual layout)"
            </label>
            {body}
        </div>
    }
}
