//! Loose-neutral diagnosis from meter readings, step by step.

use crate::components::{CautionList, NumberField, SelectField, TextField};
use crate::edit::ReadingForm;
use crate::state::{AppState, Screen};
use leptos::prelude::*;

#[component]
pub fn DiagnosePage() -> impl IntoView {
    let state = expect_context::<AppState>();
    let indices = move || (0..state.readings.with(|r| r.len())).collect::<Vec<usize>>();
    let result = move || {
        state.diagnosis.with(|d| match d {
            Ok(d) => {
                let class = format!("verdict verdict-{}", format!("{:?}", d.verdict).to_lowercase());
                let verdict = format!("{:?}", d.verdict).to_uppercase();
                view! {
                    <div class=class data-testid="diagnosis" data-verdict=format!("{:?}", d.verdict).to_lowercase()>
                        <p class="big-figure">{verdict}</p>
                        <p>"Neutral " <strong data-testid="neutral-ohms-result">{format!("{:.3} Ω", d.neutral_ohms)}</strong>
                            {format!(" ± {:.3} Ω", d.neutral_ohms_uncertainty)}
                            " · each hot " {format!("{:.3} Ω ± {:.3} Ω", d.hot_ohms, d.hot_ohms_uncertainty)}</p>
                        <p>{d.reason.clone()}</p>
                        <p><strong>"Where: "</strong>{d.likely_location} " — " {d.location_reason.clone()}</p>
                        <p class="note">{format!("Thresholds {:.2} Ω and {:.2} Ω ({}).", d.thresholds_ohms[0], d.thresholds_ohms[1], d.thresholds_source)}</p>
                    </div>
                }
                .into_any()
            }
            Err(lines) => view! {
                <div class="problems" data-testid="diagnosis-problems">
                    <strong>"Not enough to go on yet:"</strong>
                    <ul>{lines.iter().map(|l| view! { <li>{l.clone()}</li> }).collect_view()}</ul>
                </div>
            }
            .into_any(),
        })
    };
    view! {
        <section class="page" data-testid="diagnose-page">
            <div class="job-head">
                <button data-testid="diagnose-back" on:click=move |_| state.screen.set(Screen::Jobs)>"‹ Jobs"</button>
                <h2>"Diagnose a neutral"</h2>
            </div>
            <details class="caution-gate" open=true>
                <summary>"Cautions: readings are taken on live equipment"</summary>
                <CautionList />
            </details>
            <ol class="steps">
                <li>"At the panel (or the meter base), read L1-N and L2-N with a voltmeter and both leg currents with a clamp meter."</li>
                <li>"Switch on a known load on one leg (a heater or a kettle) and read all four again."</li>
                <li>"Optionally repeat on the other leg, and take the same readings at the meter base to tell the utility side from the building side."</li>
            </ol>
            <For each=indices key=|i| *i let:index>
                <ReadingCard index=index />
            </For>
            <button data-testid="add-reading" on:click=move |_| state.readings.update(|r| r.push(ReadingForm { label: format!("Reading {}", r.len() + 1), ..Default::default() }))>"+ Another reading"</button>
            {result}
        </section>
    }
}

#[component]
fn ReadingCard(index: usize) -> impl IntoView {
    let state = expect_context::<AppState>();
    let form = state
        .readings
        .with_untracked(|r| r.get(index).cloned().unwrap_or_default());
    let set = move |f: fn(&mut ReadingForm, String)| {
        move |t: String| {
            state.readings.update(|r| {
                if let Some(x) = r.get_mut(index) {
                    f(x, t)
                }
            })
        }
    };
    let problem = move |field: &'static str| {
        let path = format!("readings[{index}].{field}");
        Signal::derive(move || {
            state.diagnosis.with(|d| match d {
                Err(lines) => lines
                    .iter()
                    .find(|l| l.starts_with(&format!("{path}:")))
                    .map(|l| l[path.len() + 1..].trim().to_string()),
                Ok(_) => None,
            })
        })
    };
    let places = vec![
        ("panel".to_string(), "at the panel".to_string()),
        ("meter".to_string(), "at the meter base".to_string()),
    ];
    view! {
        <fieldset class="reading" data-testid="reading">
            <legend>{format!("Reading {}", index + 1)}</legend>
            <TextField label="What was on".into() initial=form.label.clone() problem=Signal::derive(|| None::<String>) on_text=set(|x, t| x.label = t) testid="reading-label" />
            <SelectField label="Where".into() options=places selected=if form.at.is_empty() { "panel".to_string() } else { form.at.clone() } on_pick=set(|x, t| x.at = t) testid="reading-at" />
            <div class="two">
                <NumberField label="L1-N".into() unit="V".to_string() initial=form.l1_n_v.clone() problem=problem("l1_n_v") on_text=set(|x, t| x.l1_n_v = t) testid="reading-v1" />
                <NumberField label="L2-N".into() unit="V".to_string() initial=form.l2_n_v.clone() problem=problem("l2_n_v") on_text=set(|x, t| x.l2_n_v = t) testid="reading-v2" />
            </div>
            <div class="two">
                <NumberField label="L1 current".into() unit="A".to_string() initial=form.l1_a.clone() problem=problem("l1_a") on_text=set(|x, t| x.l1_a = t) testid="reading-i1" />
                <NumberField label="L2 current".into() unit="A".to_string() initial=form.l2_a.clone() problem=problem("l2_a") on_text=set(|x, t| x.l2_a = t) testid="reading-i2" />
            </div>
        </fieldset>
    }
}
