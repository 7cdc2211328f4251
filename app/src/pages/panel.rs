//! The panel: a schedule by breaker position (editable with a thumb), balancing before and after
//! side by side, and the moves as a checklist that can be applied and undone.

use crate::components::{Keyed, KeyedList, NumberField, TextField};
use crate::edit::{self, panel as pe, panel::CircuitEdit};
use crate::format;
use crate::state::AppState;
use leptos::prelude::*;
use std::collections::BTreeMap;
use tapline_core::figures::fixed;
use tapline_core::tools::balance::{Layout, Row};

fn legs_line(legs: &BTreeMap<String, f64>) -> String {
    legs.iter()
        .map(|(k, v)| format!("{k} {}", format::amps(*v)))
        .collect::<Vec<_>>()
        .join(" · ")
}

fn positions_text(r: &Row) -> String {
    if r.positions.is_empty() {
        "–".to_string()
    } else {
        r.positions
            .iter()
            .map(u32::to_string)
            .collect::<Vec<_>>()
            .join("/")
    }
}

#[component]
pub fn PanelTab() -> impl IntoView {
    let state = expect_context::<AppState>();
    view! {
        <div class="tab-body" data-testid="panel-tab">
            <label class="check">
                <input type="checkbox" prop:checked=state.flipped.get_untracked() data-testid="flip-layout" on:change=move |ev| state.flipped.set(event_target_checked(&ev)) />
                "Position 1 is on L2 in this panel (flip the usual layout)"
            </label>
            <p class="note" data-testid="layout-text">{move || state.balance.with(|b| b.as_ref().map(|b| format!("Bus layout assumed: {}.", b.layout)))}</p>
            <Schedule />
            <AddCircuit />
            <Balancing />
        </div>
    }
}

/// One line per breaker position; tapping a line opens its fields.
#[component]
fn Schedule() -> impl IntoView {
    let state = expect_context::<AppState>();
    let rows = move || {
        let rows = state.schedule.get().unwrap_or_default();
        rows.into_iter()
            .map(|row| {
                // Every field of the line, so a line is rebuilt whenever anything on it changes.
                let key = serde_json::to_string(&row).unwrap_or_default();
                Keyed::new(key, move || view! { <ScheduleLine row=row /> })
            })
            .collect::<Vec<Keyed>>()
    };
    view! {
        <h3>"Schedule"</h3>
        <Show when=move || state.schedule.with(|s| s.is_none())>
            <super::results::ProblemList />
        </Show>
        <ul class="schedule" data-testid="schedule">
            <KeyedList rows=Box::new(rows) />
        </ul>
    }
}

#[component]
fn ScheduleLine(row: Row) -> impl IntoView {
    let state = expect_context::<AppState>();
    let id = row.circuit.clone();
    // Where balancing would put this breaker: the panel after the moves, line by line.
    let after = move || {
        state.balance.with(|b| {
            b.as_ref()?
                .moves
                .iter()
                .find(|m| m.circuit == id)
                .map(|m| match m.to_slot {
                    Some(p) => format!("→ {} at {p}", m.to),
                    None => format!("→ {}", m.to),
                })
        })
    };
    let chip = format!("chip chip-{}", row.leg.to_ascii_lowercase());
    let mut tags = Vec::new();
    if let Some(m) = &row.multiwire {
        tags.push(format!("shared neutral {m}"));
    }
    if row.stays {
        tags.push("stays".to_string());
    }
    let positions = positions_text(&row);
    let positions_attr = positions.clone();
    let loads = row.loads.clone();
    view! {
        <li class="schedule-line" data-testid="schedule-line" data-positions=positions_attr data-leg=row.leg.clone() data-circuit=row.circuit.clone()>
            <details>
                <summary>
                    <span class="pos">{positions}</span>
                    <span class=chip>{row.leg.clone()}</span>
                    <span class="what">{row.appliances.join(", ")}</span>
                    <span class="watts">{format!("{} W", fixed(row.watts, 0))}</span>
                    <span class="tags" data-testid="schedule-tags">{tags.join(" · ")}</span>
                    <span class="after" data-testid="schedule-after">{after}</span>
                </summary>
                {row.mismatch.clone().map(|m| view! { <p class="problems" data-testid="schedule-mismatch">{m}</p> })}
                {loads.into_iter().map(|i| view! { <CircuitFields index=i /> }).collect_view()}
            </details>
        </li>
    }
}

/// The panel fields of one appliance: position, circuit, stays, shared-neutral circuit.
#[component]
fn CircuitFields(index: usize) -> impl IntoView {
    let state = expect_context::<AppState>();
    let load = state
        .draft
        .with_untracked(|d| edit::loads(d).get(index).cloned().unwrap_or_default());
    let name = edit::text_of(&load.name);
    let circuit = edit::text_of(&load.circuit);
    let multiwire = edit::text_of(&load.multiwire);
    let stays = load.movable.given() == Some(&false);
    let ids: Vec<String> = state.draft.with_untracked(|d| {
        edit::multiwire_list(d)
            .iter()
            .map(|m| edit::text_of(&m.id))
            .collect()
    });
    let set = move |f: fn(String) -> CircuitEdit| {
        move |t: String| state.edit(|j| pe::edit_circuit(j, index, f(t)))
    };
    let problem = move |field: &'static str| {
        let path = format!("loads[{index}].{field}");
        Signal::derive(move || state.problem(&path))
    };
    let options = std::iter::once((String::new(), "none".to_string()))
        .chain(
            ids.into_iter()
                .map(|id| (id.clone(), format!("circuit {id}"))),
        )
        .map(|(value, text)| {
            let is = value == multiwire;
            view! { <option value=value selected=is>{text}</option> }
        })
        .collect_view();
    view! {
        <fieldset class="circuit-fields" data-testid="circuit-fields">
            <legend>{name}</legend>
            <div class="two">
                <NumberField label="Breaker position".into() initial=pe::position_text(&load) problem=problem("slot") on_text=set(CircuitEdit::Position) testid="circuit-position" />
                <TextField label="Circuit (same on one breaker)".into() initial=circuit problem=problem("circuit") on_text=set(CircuitEdit::Circuit) testid="circuit-id" />
            </div>
            <label class="field">
                <span class="field-label">"Shared neutral"</span>
                <select data-testid="circuit-multiwire" on:change=move |ev| state.edit_structure(|j| pe::edit_circuit(j, index, CircuitEdit::Multiwire(event_target_value(&ev))))>
                    {options}
                </select>
                <span class="field-error" role="alert">{move || state.problem(&format!("loads[{index}].multiwire")).unwrap_or_default()}</span>
            </label>
            <label class="check">
                <input type="checkbox" prop:checked=stays data-testid="circuit-stays" on:change=move |ev| state.edit(|j| pe::edit_circuit(j, index, CircuitEdit::Stays(event_target_checked(&ev)))) />
                "Stays where it is (never moved by balancing)"
            </label>
        </fieldset>
    }
}

/// A circuit entered from the schedule: its position (the leg follows from the layout), a name
/// and its watts; it joins the job's appliances.
#[component]
fn AddCircuit() -> impl IntoView {
    let state = expect_context::<AppState>();
    let position = RwSignal::new(String::new());
    let name = RwSignal::new(String::new());
    let watts = RwSignal::new("1000".to_string());
    let parsed = move || {
        let p = position
            .get()
            .trim()
            .parse::<u32>()
            .ok()
            .filter(|p| (1..=84).contains(p));
        let w = match edit::number_from_text(&watts.get()) {
            tapline_core::job::Raw::Given(w) if w > 0.0 => Some(w),
            _ => None,
        };
        (p, w)
    };
    let leg = move || {
        let (p, _) = parsed();
        let layout = if state.flipped.get() {
            Layout::Flipped
        } else {
            Layout::Standard
        };
        state.job.with(|j| {
            let legs = j.as_ref().ok()?.system().legs();
            p.map(|p| layout.leg_of_slot(p, legs).name())
        })
    };
    let position_problem = Signal::derive(move || {
        (!position.get().trim().is_empty() && parsed().0.is_none())
            .then(|| "must be a breaker position from 1 to 84".to_string())
    });
    let watts_problem = Signal::derive(move || {
        parsed()
            .1
            .is_none()
            .then(|| "must be a positive number of watts".to_string())
    });
    // Bumped after each circuit is added, so the fields are drawn afresh (position and name
    // empty, the watts as last typed) while the form stays open for the next one.
    let generation = RwSignal::new(0u32);
    let add = move |_| {
        if let ((Some(p), Some(w)), Some(l)) = (parsed(), leg()) {
            let n = name.get_untracked();
            // A plain edit: the schedule redraws from the engine, and this form stays open.
            state.edit(|j| pe::add_at_position(j, p, l, &n, w));
            position.set(String::new());
            name.set(String::new());
            generation.update(|g| *g += 1);
        }
    };
    let fields = move || {
        generation.track();
        let watts_now = watts.get_untracked();
        view! {
            <div class="two">
                <NumberField label="Position".into() initial=String::new() problem=position_problem on_text=move |t: String| position.set(t) testid="new-circuit-position" />
                <NumberField label="Watts".into() unit="W".to_string() initial=watts_now problem=watts_problem on_text=move |t: String| watts.set(t) testid="new-circuit-watts" />
            </div>
            <TextField label="What it feeds".into() initial=String::new() problem=Signal::derive(|| None::<String>) on_text=move |t: String| name.set(t) testid="new-circuit-name" />
        }
    };
    view! {
        <details class="add-circuit" data-testid="add-circuit">
            <summary>"+ Add a circuit at a position"</summary>
            {fields}
            <p class="note" data-testid="new-circuit-leg">{move || leg().map(|l| format!("Position {} is on {l} in this layout; a resistive load is added there (open its line to change it on the appliances tab).", position.get().trim())).unwrap_or_else(|| "Give a position to see its leg.".to_string())}</p>
            <button class="primary" data-testid="new-circuit-add" prop:disabled=move || leg().is_none() || parsed().1.is_none() on:click=add>"Add this circuit"</button>
        </details>
    }
}

/// Balancing: the legs and the neutral before and after, side by side, and the moves.
#[component]
fn Balancing() -> impl IntoView {
    let state = expect_context::<AppState>();
    let body = move || {
        state.balance.with(|b| {
            let b = b.as_ref()?;
            let moves = b.moves.clone();
            let swaps = b
                .swaps
                .iter()
                .map(|s| view! { <li><label class="check"><input type="checkbox" data-testid="swap-done" />{s.text.clone()}</label></li> })
                .collect_view();
            let notes = b
                .notes
                .iter()
                .map(|n| view! { <p class="note">{n.clone()}</p> })
                .collect_view();
            let none = b.moves.is_empty();
            Some(view! {
                <h3>"Balancing"</h3>
                <div class="side-by-side" data-testid="balance-table">
                    <div class="side">
                        <h4>"Now"</h4>
                        <p class="big-figure" data-testid="balance-before">{format::amps(b.before.neutral_current_a)}</p>
                        <p>"in the neutral"</p>
                        <p>{legs_line(&b.before.legs)}</p>
                    </div>
                    <div class="side">
                        <h4>"After the moves"</h4>
                        <p class="big-figure" data-testid="balance-after">{format::amps(b.after.neutral_current_a)}</p>
                        <p>"in the neutral"</p>
                        <p>{legs_line(&b.after.legs)}</p>
                    </div>
                </div>
                <p class="note">{format!(
                    "The best arrangement within {} A, with the fewest moves. 240 V circuits and circuits marked to stay are not moved; a shared-neutral circuit moves as one handle-tied breaker.",
                    fixed(b.within_a, 2)
                )}</p>
                {if none {
                    view! { <p data-testid="no-moves">"This panel is already as balanced as its movable circuits allow."</p> }.into_any()
                } else {
                    view! {
                        <h3>"Moves (with the main off and the panel tested dead)"</h3>
                        <ul class="checklist" data-testid="moves">{swaps}</ul>
                        <button class="primary" data-testid="apply-moves" on:click=move |_| state.apply_moves(&moves)>"Apply these moves to the job"</button>
                    }.into_any()
                }}
                {notes}
            })
        })
    };
    body
}
