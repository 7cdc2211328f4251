//! Conductor runs: the fields of a service or branch run, and the sizing panel that lists every
//! standard size side by side and puts the chosen one into the job with one tap.

use crate::components::{choices, NumberField, SelectField};
use crate::edit::sizing::{form_for, run_file, SizingForm};
use crate::edit::{self, Run};
use crate::format;
use crate::state::AppState;
use leptos::prelude::*;
use tapline_core::figures::fixed;
use tapline_core::tools::size::{appliance_load, service_load, size, validate_run, Sizing};
use tapline_core::validate::Problem;

fn size_options() -> Vec<(String, String)> {
    tapline_core::conductors::Size::all()
        .map(|s| (s.code(), s.label()))
        .collect()
}

/// A run's material, size and one-way length, with a sizing panel beneath.
#[component]
pub fn ConductorFields(run: Run, title: &'static str, toggle: &'static str) -> impl IntoView {
    let state = expect_context::<AppState>();
    let units = state.units();
    let present = edit::has_conductor(&state.draft.get_untracked(), run);
    let key = run.key();
    let lp = edit::length_path(run, units);
    let size_path = format!("{}.size", run.path());
    view! {
        <fieldset>
            <legend>{title}</legend>
            <label class="check">
                <input type="checkbox" prop:checked=present data-testid=format!("{key}-present")
                    on:change=move |ev| state.edit_structure(|j| edit::set_conductor_present(j, run, event_target_checked(&ev))) />
                {toggle}
            </label>
            <Show when=move || present>
                <SelectField label="Material".into() options=choices(&[("al", "Aluminum"), ("cu", "Copper")])
                    selected=edit::conductor_text(&state.draft.get_untracked(), run, edit::ConductorField::Material)
                    on_pick=move |v: String| state.edit(|j| edit::set_conductor_text(j, run, edit::ConductorField::Material, &v)) testid=format!("{key}-material") />
                <SelectField label="Size".into() options=size_options()
                    selected=edit::conductor_text(&state.draft.get_untracked(), run, edit::ConductorField::Size)
                    on_pick=move |v: String| state.edit(|j| edit::set_conductor_text(j, run, edit::ConductorField::Size, &v)) testid=format!("{key}-size") />
                <NumberField label="One-way length".into() unit=units.code().to_string()
                    initial=edit::length_text(&state.draft.get_untracked(), run, units)
                    problem=Signal::derive({ let lp = lp.clone(); move || state.problem(&lp) })
                    on_text=move |t: String| state.edit(|j| edit::set_length(j, run, &t, units)) testid=format!("{key}-length") />
                <p class="field-error">{let p = size_path.clone(); move || state.problem(&p).unwrap_or_default()}</p>
                {(run != Run::Neutral).then(|| view! { <SizingPanel run=run /> })}
            </Show>
        </fieldset>
    }
}

/// Every standard size of the run side by side (drop at the load's power factor, NEC Table
/// 310.16 ampacity), the smallest that meets both marked, each with a button that puts it into
/// the job.
#[component]
pub fn SizingPanel(run: Run) -> impl IntoView {
    let state = expect_context::<AppState>();
    let units = state.units();
    let form = RwSignal::new(form_for(&state.draft.get_untracked(), run, units));
    let metric = RwSignal::new(units == edit::Units::Metres);
    // The engine's sizing of the run: its load from the engine (the service's legs from the
    // report, an appliance at its rating), the rest from the form.
    let sizing = Memo::new(move |_| -> Result<Sizing, Vec<Problem>> {
        let load = match run {
            Run::Branch(i) => state
                .job
                .with(|j| j.as_ref().ok().and_then(|j| appliance_load(j, i))),
            _ => state.report.with(|r| match r {
                Some(Ok(rep)) => service_load(rep),
                _ => None,
            }),
        }
        .ok_or_else(|| {
            vec![Problem {
                path: String::new(),
                message: "Fix the job's fields first: the run's load comes from the job."
                    .to_string(),
            }]
        })?;
        let connect = match run {
            Run::Branch(i) => state.draft.with(|d| {
                edit::text_of(&edit::loads(d).get(i).cloned().unwrap_or_default().connect)
            }),
            _ => "L1-N".to_string(),
        };
        let file = state
            .draft
            .with(|d| run_file(d, run, &form.get(), load, &connect, units, metric.get()));
        validate_run(&file).map(|r| size(&r))
    });
    // The form's own fields show their problems beside them; the rest are listed under the form.
    const BESIDE: [&str; 2] = ["run.length_", "run.target_pct"];
    let set = move |f: fn(&mut SizingForm, String)| move |t: String| form.update(|x| f(x, t));
    let problem = move |prefix: &'static str| {
        Signal::derive(move || {
            sizing.with(|s| {
                s.as_ref()
                    .err()?
                    .iter()
                    .find(|p| p.path.starts_with(prefix))
                    .map(|p| p.message.clone())
            })
        })
    };
    let table = move || {
        sizing.with(|s| match s {
            Err(ps) => view! {
                <ul class="problems" data-testid="sizing-problems">
                    {ps.iter().filter(|p| !BESIDE.iter().any(|b| p.path.starts_with(b))).map(|p| view! { <li>{p.message.clone()}</li> }).collect_view()}
                </ul>
            }
            .into_any(),
            Ok(s) => {
                let rows = s
                    .candidates
                    .iter()
                    .map(|c| {
                        let best = s.smallest.as_deref() == Some(c.size.as_str());
                        let code = c.code.clone();
                        let material = form.with_untracked(|f| f.material.clone());
                        let meets = c.meets_drop && c.meets_ampacity != Some(false);
                        view! {
                            <tr class:best=best data-testid="sizing-row" data-size=c.code.clone() data-meets=meets.to_string()>
                                <td>{c.size.clone()} {best.then_some(" ★")}</td>
                                <td>{format!(
                                    "{} V · {} %",
                                    fixed(c.drop_v, 1),
                                    fixed(c.drop_pct, 1)
                                )}</td>
                                <td>{c.ampacity_a.map(|a| format!(
                                    "{a} A",
                                    a = fixed(a, 0)
                                )).unwrap_or_else(|| "–".to_string())}</td>
                                <td><button class="small" data-testid="sizing-use" on:click=move |_| {
                                    let (code, material) = (code.clone(), material.clone());
                                    state.edit_structure(|j| {
                                        edit::set_conductor_text(j, run, edit::ConductorField::Material, &material);
                                        edit::set_conductor_text(j, run, edit::ConductorField::Size, &code);
                                    });
                                }>"Use"</button></td>
                            </tr>
                        }
                    })
                    .collect_view();
                view! {
                    <p data-testid="sizing-summary">{format!(
                        "{} at power factor {}, target {} % of {} V. ",
                        format::amps(s.amps),
                        fixed(s.power_factor, 2),
                        crate::format::plain(s.target_pct),
                        fixed(s.circuit_v, 0)
                    )}
                        <strong data-testid="sizing-smallest">{s.smallest.clone().map(|x| format!("Smallest that meets both: {x}.")).unwrap_or_else(|| "No standard size meets both.".to_string())}</strong></p>
                    <table class="sizing" data-testid="sizing-table">
                        <thead><tr><th>"Size"</th><th>"Drop"</th><th>"Ampacity"</th><th></th></tr></thead>
                        <tbody>{rows}</tbody>
                    </table>
                    {s.notes.iter().map(|n| view! { <p class="note">{n.clone()}</p> }).collect_view()}
                }
                .into_any()
            }
        })
    };
    let f = form.get_untracked();
    view! {
        <details class="sizing-panel" data-testid="sizing-panel">
            <summary>"Size this run for its drop"</summary>
            <div class="two">
                <NumberField label="One-way length".into() unit=units.code().to_string() initial=f.length problem=problem(BESIDE[0]) on_text=set(|x, t| x.length = t) testid="sizing-length" />
                <NumberField label="Target drop".into() unit="%".to_string() initial=f.target problem=problem(BESIDE[1]) on_text=set(|x, t| x.target = t) testid="sizing-target" />
            </div>
            <div class="two">
                <SelectField label="Material".into() options=choices(&[("cu", "Copper"), ("al", "Aluminum")]) selected=f.material on_pick=set(|x, t| x.material = t) testid="sizing-material" />
                <SelectField label="Ampacity column".into() options=choices(&[("60", "60 °C"), ("75", "75 °C"), ("90", "90 °C")]) selected=f.column on_pick=set(|x, t| x.column = t) testid="sizing-column" />
            </div>
            <label class="check">
                <input type="checkbox" prop:checked=metric.get_untracked() data-testid="sizing-metric" on:change=move |ev| metric.set(event_target_checked(&ev)) />
                "Metric sizes (IEC 60228)"
            </label>
            {table}
        </details>
    }
}
