//! The job's meter readings: dated sets (the first test, a re-test after a repair), each with its
//! diagnosis from the engine, and the latest compared with the first.

use crate::components::{CautionList, Keyed, KeyedList, NumberField, SelectField, TextField};
use crate::edit::readings::{self as rd, ReadingEdit};
use crate::state::{taken_now, AppState};
use leptos::prelude::*;
use tapline_core::figures::fixed;
use tapline_core::tools::diagnose::SetOutcome;

#[component]
pub fn ReadingsTab() -> impl IntoView {
    let state = expect_context::<AppState>();
    let sets = move || {
        state.structure.track();
        let structure = state.structure.get_untracked();
        (0..state.draft.with_untracked(|d| rd::sets(d).len()))
            .map(|s| {
                Keyed::new(
                    format!("{structure}/{s}"),
                    move || view! { <ReadingSet set=s /> },
                )
            })
            .collect::<Vec<Keyed>>()
    };
    let comparison = move || {
        state
            .diagnosis
            .with(|h| h.as_ref().and_then(|h| h.comparison.clone()))
            .map(|c| view! { <p class="comparison" data-testid="readings-comparison">{c}</p> })
    };
    view! {
        <div class="tab-body" data-testid="readings-tab">
            <details class="caution-gate">
                <summary>"Cautions: readings are taken on live equipment"</summary>
                <CautionList />
            </details>
            <ol class="steps">
                <li>"At the panel (or the meter base), read L1 to neutral and L2 to neutral with a voltmeter and both hot currents with a clamp meter (with its power factor if it shows one)."</li>
                <li>"Switch on a known load on one leg (a heater or a kettle) and read all of them again."</li>
                <li>"Optionally repeat on the other leg, and take the same readings at the meter base to tell the utility's side from the building's."</li>
            </ol>
            <Show when=move || state.diagnosis.with(|h| h.is_none())>
                <p class="problems" data-testid="readings-job-problems">"Fix the job's fields first (see the other tabs); the readings are kept meanwhile."</p>
            </Show>
            <KeyedList rows=Box::new(sets) />
            {comparison}
            <button data-testid="add-reading-set" on:click=move |_| {
                let first = state.draft.with_untracked(|d| rd::sets(d).is_empty());
                let note = if first { "first test" } else { "re-test after the repair" };
                state.edit_structure(|j| rd::add_set(j, &taken_now(), note));
            }>
                {move || if state.draft.with(|d| rd::sets(d).is_empty()) { "+ Start a set of readings" } else { "+ Re-test: a new dated set" }}
            </button>
        </div>
    }
}

#[component]
fn ReadingSet(set: usize) -> impl IntoView {
    let state = expect_context::<AppState>();
    let file = state
        .draft
        .with_untracked(|d| rd::sets(d).get(set).cloned().unwrap_or_default());
    let taken = file.taken.given().cloned().unwrap_or_default();
    let note = file.note.given().cloned().unwrap_or_default();
    let count = rd::readings_of(&file).len();
    // Earlier sets fold away under their verdicts; the latest is open for entry.
    let latest = state.draft.with_untracked(|d| rd::sets(d).len()) == set + 1;
    let outcome = Memo::new(move |_| {
        state.diagnosis.with(|h| {
            h.as_ref()
                .and_then(|h| h.sets.iter().find(|o| o.index == set).cloned())
        })
    });
    let result = move || outcome.with(|o| o.as_ref().map(set_result));
    view! {
        <section class="reading-set" data-testid="reading-set">
            <h3>{format!("Set {} · {}", set + 1, if taken.is_empty() { "undated".to_string() } else { taken.clone() })}</h3>
            <TextField label="What this set is for".into() initial=note problem=Signal::derive(|| None::<String>)
                on_text=move |t: String| state.edit(|j| rd::set_note(j, set, &t)) testid="reading-set-note" />
            <details open=latest data-testid="reading-set-entries">
                <summary>{format!("{count} readings")}</summary>
                {(0..count).map(|k| view! { <ReadingCard set=set index=k outcome=outcome /> }).collect_view()}
                <div class="actions">
                    <button data-testid="add-reading" on:click=move |_| state.edit_structure(|j| rd::add_reading(j, set))>"+ Another reading"</button>
                    <button class="danger" data-testid="remove-reading-set" on:click=move |_| state.edit_structure(|j| rd::remove_set(j, set))>"Remove this set"</button>
                </div>
            </details>
            {result}
        </section>
    }
}

fn set_result(o: &SetOutcome) -> AnyView {
    match &o.diagnosis {
        Some(d) => {
            let code = d.verdict.code();
            view! {
                <div class=format!("verdict verdict-{code}") data-testid="diagnosis" data-verdict=code>
                    <p class="big-figure">{d.verdict.word().to_ascii_uppercase()}</p>
                    <p>"Neutral " <strong data-testid="neutral-ohms-result">{format!(
                        "{} Ω",
                        fixed(d.neutral_ohms, 3)
                    )}</strong>
                        {format!(" ± {} Ω", fixed(d.neutral_ohms_uncertainty, 3))}
                        " · each hot " {format!(
                            "{} Ω ± {} Ω",
                            fixed(d.hot_ohms, 3),
                            fixed(d.hot_ohms_uncertainty, 3)
                        )}</p>
                    <p>{d.reason.clone()}</p>
                    <p><strong>"Where: "</strong>{d.likely_location} " — " {d.location_reason.clone()}</p>
                    <p class="note">{format!(
                        "Thresholds {} Ω and {} Ω ({}).",
                        fixed(d.thresholds_ohms[0], 2),
                        fixed(d.thresholds_ohms[1], 2),
                        d.thresholds_source
                    )}</p>
                </div>
            }
            .into_any()
        }
        None => {
            // Problems of one reading's field are shown beside it; the rest here.
            let general: Vec<String> = o
                .problems
                .iter()
                .filter(|p| !p.path.contains("].readings["))
                .map(|p| p.message.clone())
                .collect();
            view! {
                <div class="problems" data-testid="diagnosis-problems">
                    <strong>"Not enough to go on yet:"</strong>
                    <ul>{general.into_iter().map(|l| view! { <li>{l}</li> }).collect_view()}</ul>
                    {(!o.problems.is_empty() && o.problems.iter().all(|p| p.path.contains("].readings["))).then(|| view! { <p>"See the readings marked above."</p> })}
                </div>
            }
            .into_any()
        }
    }
}

#[component]
fn ReadingCard(set: usize, index: usize, outcome: Memo<Option<SetOutcome>>) -> impl IntoView {
    let state = expect_context::<AppState>();
    let texts = state.draft.with_untracked(|d| {
        rd::sets(d)
            .get(set)
            .and_then(|s| rd::readings_of(s).get(index).cloned())
            .map(|r| rd::texts(&r))
            .unwrap_or_default()
    });
    let edit = move |f: fn(String) -> ReadingEdit| {
        move |t: String| state.edit(|j| rd::edit_reading(j, set, index, f(t)))
    };
    let problem = move |field: &'static str| {
        let path = rd::path(set, index, field);
        Signal::derive(move || {
            outcome.with(|o| {
                o.as_ref().and_then(|o| {
                    o.problems
                        .iter()
                        .find(|p| p.path == path)
                        .map(|p| p.message.clone())
                })
            })
        })
    };
    let places = vec![
        ("panel".to_string(), "at the panel".to_string()),
        ("meter".to_string(), "at the meter base".to_string()),
    ];
    let at = if texts[1].is_empty() {
        "panel".to_string()
    } else {
        texts[1].clone()
    };
    let [label, _, v1, v2, i1, i2, pf1, pf2] = texts;
    view! {
        <fieldset class="reading" data-testid="reading">
            <legend>{format!("Reading {}", index + 1)}</legend>
            <TextField label="What was on".into() initial=label problem=Signal::derive(|| None::<String>) on_text=edit(ReadingEdit::Label) testid="reading-label" />
            <SelectField label="Where".into() options=places selected=at on_pick=edit(ReadingEdit::At) testid="reading-at" />
            <div class="two">
                <NumberField label="L1 to neutral".into() unit="V".to_string() initial=v1 problem=problem("l1_n_v") on_text=edit(ReadingEdit::L1Volts) testid="reading-v1" />
                <NumberField label="L2 to neutral".into() unit="V".to_string() initial=v2 problem=problem("l2_n_v") on_text=edit(ReadingEdit::L2Volts) testid="reading-v2" />
            </div>
            <div class="two">
                <NumberField label="L1 hot current".into() unit="A".to_string() initial=i1 problem=problem("l1_a") on_text=edit(ReadingEdit::L1Amps) testid="reading-i1" />
                <NumberField label="L2 hot current".into() unit="A".to_string() initial=i2 problem=problem("l2_a") on_text=edit(ReadingEdit::L2Amps) testid="reading-i2" />
            </div>
            <div class="two">
                <NumberField label="L1 power factor (optional)".into() initial=pf1 problem=problem("l1_pf") on_text=edit(ReadingEdit::L1Pf) testid="reading-pf1" />
                <NumberField label="L2 power factor (optional)".into() initial=pf2 problem=problem("l2_pf") on_text=edit(ReadingEdit::L2Pf) testid="reading-pf2" />
            </div>
            <button class="danger" data-testid="remove-reading" on:click=move |_| state.edit_structure(|j| rd::remove_reading(j, set, index))>"Remove this reading"</button>
        </fieldset>
    }
}
