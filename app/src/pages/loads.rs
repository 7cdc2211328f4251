//! Loads: add from the library or custom, grouped by leg with per-leg totals, on/off per load.

use super::runs::ConductorFields;
use crate::components::{Keyed, KeyedList, NumberField, SelectField, TextField};
use crate::edit;
use crate::edit::Run;
use crate::state::AppState;
use leptos::prelude::*;
use tapline_core::figures::fixed;
use tapline_core::library;
use tapline_core::tools::start::{start, Start};

const MODELS: [(&str, &str); 5] = [
    ("resistive", "Resistive (heater)"),
    ("impedance", "Impedance with power factor"),
    ("lamp", "Incandescent lamp"),
    ("motor", "Motor"),
    ("electronic", "Electronic supply"),
];

#[component]
pub fn LoadsTab() -> impl IntoView {
    let state = expect_context::<AppState>();
    let query = RwSignal::new(String::new());
    // The leg new appliances go on stays chosen while appliances are added.
    let target = state.add_on;
    let connects = state.draft.with_untracked(edit::connect_choices);
    let library_rows = move || {
        let found = library::search(&query.get());
        if found.is_empty() {
            return view! { <li class="empty" data-testid="library-empty">"No appliance in the library matches. Add a custom load and give it its nameplate watts."</li> }.into_any();
        }
        found
            .into_iter()
            .map(|a| {
                let label = format!(
                    "{} · {} W · {} V",
                    a.name,
                    crate::format::plain(a.watts),
                    crate::format::plain(a.rated_v)
                );
                view! {
                    <li>
                        <button class="library-pick" data-testid=format!("add-{}", a.id)
                            on:click=move |_| state.add_appliance(a, &target.get_untracked())>
                            "+ " {label}
                        </button>
                    </li>
                }
            })
            .collect_view()
            .into_any()
    };
    // Loads grouped by leg (or pair of legs), each group with its rated total and present current.
    let groups = move || {
        state.structure.track();
        state.draft.with_untracked(|d| {
            let loads = edit::loads(d);
            let mut groups: Vec<(String, Vec<usize>)> = Vec::new();
            for (i, l) in loads.iter().enumerate() {
                let g = edit::group_of(l);
                match groups.iter_mut().find(|(k, _)| *k == g) {
                    Some((_, v)) => v.push(i),
                    None => groups.push((g, vec![i])),
                }
            }
            tapline_core::order::sort_by(&mut groups, |a, b| a.0.cmp(&b.0));
            let structure = state.structure.get_untracked();
            groups
                .into_iter()
                .map(|(name, rows)| {
                    let key = format!("{structure}/{name}/{}", rows.len());
                    Keyed::new(key, move || view! { <LoadGroup name=name rows=rows /> })
                })
                .collect::<Vec<Keyed>>()
        })
    };
    view! {
        <div class="tab-body" data-testid="loads-tab">
            <fieldset>
                <legend>"Add an appliance"</legend>
                <SelectField label="Put it on".into() options=connects selected=target.get_untracked() on_pick=move |v: String| target.set(v) testid="add-target" />
                <input class="search" type="search" placeholder="Search appliances" data-testid="library-search" on:input=move |ev| query.set(event_target_value(&ev)) />
                <ul class="library">{library_rows}</ul>
                <button data-testid="add-custom" on:click=move |_| state.add_custom(&target.get_untracked())>"+ Custom appliance"</button>
                <p class="note">"Library ratings are typical values (common practice); use the nameplate when you have it."</p>
            </fieldset>
            <KeyedList rows=Box::new(groups) />
        </div>
    }
}

#[component]
fn LoadGroup(name: String, rows: Vec<usize>) -> impl IntoView {
    let state = expect_context::<AppState>();
    let key = name.clone();
    // Totals from the engine's report (the validated job), so they never disagree with the results.
    let total = move || {
        state.report.with(|r| match r {
            Some(Ok(rep)) => crate::format::group_total(rep, &key),
            _ => "Totals once the fields are fixed".to_string(),
        })
    };
    let label = if name.contains('-') {
        format!("Across {name}")
    } else {
        format!("On {name}")
    };
    view! {
        <section class="load-group" data-testid=format!("group-{name}")>
            <h3 class="group-head">{label}</h3>
            <p class="group-total" data-testid=format!("total-{name}")>{total}</p>
            <ul class="load-list">
                {rows.into_iter().map(|index| view! { <LoadRow index=index /> }).collect_view()}
            </ul>
        </section>
    }
}

#[component]
fn LoadRow(index: usize) -> impl IntoView {
    let state = expect_context::<AppState>();
    let load = state
        .draft
        .with_untracked(|d| edit::loads(d).get(index).cloned().unwrap_or_default());
    let connects = state.draft.with_untracked(edit::connect_choices);
    let models = crate::components::choices(&MODELS);
    let on = load.on.given().copied().unwrap_or(true);
    let planned = load.planned.given().copied().unwrap_or(false);
    let is_motor = load.model.given().map(String::as_str) == Some("motor");
    let path = move |field: &str| format!("loads[{index}].{field}");
    let problem = move |field: &'static str| {
        let p = path(field);
        Signal::derive(move || state.problem(&p))
    };
    let outcome = move || {
        state.report.with(|r| match r {
            Some(Ok(rep)) => match rep.loads.iter().find(|l| l.index == index) {
                Some(l) => Some(view! { <span class="row-result"><crate::components::OutcomeBadge outcome=l.outcome /> " " {crate::format::volts(l.voltage_v)}</span> }.into_any()),
                None => Some(view! { <span class="row-result" data-testid="load-planned-tag">"planned"</span> }.into_any()),
            },
            _ => None,
        })
    };
    // The one line: name, leg chip, watts and outcome; tapping it opens the details. A line just
    // added from the library opens, scrolls into view and takes the focus.
    let line_ref = NodeRef::<leptos::html::Summary>::new();
    // A line opens when it was just added, or when a field in it has a problem to show.
    let prefix = format!("loads[{index}]");
    let has_problem = move || {
        state
            .problems
            .with(|p| p.iter().any(|p| p.path.starts_with(&prefix)))
    };
    let just_added = state.added.get_untracked() == Some(index)
        || has_problem()
        || state.route.with_untracked(|r| r.detail() == Some(index));
    Effect::new(move |_| {
        if let Some(el) = line_ref.get() {
            if state.added.get_untracked() == Some(index) {
                el.scroll_into_view();
                let _ = el.focus();
                state.added.set(None);
            }
        }
    });
    // An appliance opened by a tap gets its own address, so the back button closes it first.
    let details_ref = NodeRef::<leptos::html::Details>::new();
    let on_line = move |_| {
        let Some(el) = details_ref.get_untracked() else {
            return;
        };
        // The click toggles the details after this handler: closed now means opening.
        let route = state.route.get_untracked();
        if !el.open() {
            if let crate::route::Route::Job { id, tab, .. } = route {
                state.go(crate::route::Route::Job {
                    id,
                    tab,
                    detail: Some(index),
                });
            }
        } else if route.detail() == Some(index) {
            crate::nav::back();
        }
    };
    // Back (or any move away from this appliance's address) closes it.
    Effect::new(move |was_mine: Option<bool>| {
        let mine = state.route.with(|r| r.detail() == Some(index));
        if was_mine == Some(true) && !mine {
            if let Some(el) = details_ref.get_untracked() {
                el.set_open(false);
            }
        }
        mine
    });
    // Read once per edit for the three parts of the line.
    let line_text = Memo::new(move |_| {
        state.draft.with(|d| {
            let l = edit::loads(d).get(index).cloned().unwrap_or_default();
            (
                edit::text_of(&l.name),
                edit::text_of(&l.connect),
                edit::text_of_number(&l.watts),
            )
        })
    });
    let leg_class = move || {
        let c = line_text.with(|t| t.1.clone());
        format!(
            "chip chip-{}",
            c.split('-').next().unwrap_or("").to_ascii_lowercase()
        )
    };
    view! {
        <li class="load-row" data-testid="load-row">
            <div class="load-head">
                <label class="check big">
                    <input type="checkbox" prop:checked=on data-testid="load-on" aria-label="On"
                        on:change=move |ev| { let v = event_target_checked(&ev); state.edit(|j| edit::set_load(j, index, edit::LoadEdit::On(v))) } />
                </label>
                <details class="load-details" open=just_added node_ref=details_ref>
                    <summary class="load-line" class:bad=has_problem data-testid="load-line" node_ref=line_ref on:click=on_line>
                        <span class="appliance-name">{move || line_text.with(|t| t.0.clone())}</span>
                        <span class=leg_class>{move || line_text.with(|t| t.1.clone())}</span>
                        <span class="watts">{move || format!("{} W", line_text.with(|t| t.2.clone()))}</span>
                        {outcome}
                    </summary>
                    <button class="danger small" data-testid="remove-load" on:click=move |_| state.remove_load(index)>"Remove"</button>
            <TextField label="Name".into() initial=edit::text_of(&load.name) problem=problem("name")
                on_text=move |t: String| state.edit(|j| edit::set_load(j, index, edit::LoadEdit::Name(t))) testid="load-name" />
            <div class="two">
                <SelectField label="Connected".into() options=connects selected=edit::text_of(&load.connect)
                    on_pick=move |v: String| state.edit_structure(|j| edit::set_load(j, index, edit::LoadEdit::Connect(v))) testid="load-connect" />
                <NumberField label="Watts".into() unit="W".to_string() initial=edit::text_of_number(&load.watts) problem=problem("watts")
                    on_text=move |t: String| state.edit(|j| edit::set_load(j, index, edit::LoadEdit::Watts(t))) testid="load-watts" />
            </div>
            <div class="two">
                <SelectField label="Behaves as".into() options=models selected=edit::text_of(&load.model)
                    on_pick=move |v: String| state.edit_structure(|j| edit::set_load(j, index, edit::LoadEdit::Model(v))) testid="load-model" />
                <NumberField label="Power factor".into() initial=edit::text_of_number(&load.power_factor) problem=problem("power_factor")
                    on_text=move |t: String| state.edit(|j| edit::set_load(j, index, edit::LoadEdit::PowerFactor(t))) testid="load-pf" />
            </div>
            <TextField label="Shared-neutral circuit (blank if none)".into() initial=edit::text_of(&load.multiwire) problem=problem("multiwire")
                on_text=move |t: String| state.edit(|j| edit::set_load(j, index, edit::LoadEdit::Multiwire(t))) testid="load-multiwire" />
            <label class="check">
                <input type="checkbox" prop:checked=planned data-testid="load-planned"
                    on:change=move |ev| state.edit(|j| edit::set_planned(j, index, event_target_checked(&ev))) />
                "Planned, not installed yet (shown on the results as what the addition changes)"
            </label>
            <details class="branch-run">
                <summary>"Branch circuit"</summary>
                <ConductorFields run=Run::Branch(index) title="Branch circuit to this appliance" toggle="Include its branch circuit (size and length)" />
            </details>
            {is_motor.then(|| view! { <StartPanel index=index /> })}
                </details>
            </div>
            <p class="field-error">{move || { let p = path("connect"); state.problem(&p).unwrap_or_default() }}</p>
        </li>
    }
}

/// The dip at the instant this motor starts: every appliance's voltage before and during, visible
/// flicker at the chosen starting rate, and whether the motor itself can start.
#[component]
fn StartPanel(index: usize) -> impl IntoView {
    let state = expect_context::<AppState>();
    let per_hour = RwSignal::new("4".to_string());
    let result = move || -> Result<Start, String> {
        let rate = match edit::number_from_text(&per_hour.get()) {
            tapline_core::job::Raw::Given(r) if (0.01..=3600.0).contains(&r) => r,
            _ => return Err("Starts per hour: must be a number from 0.01 to 3600.".to_string()),
        };
        state.job.with(|j| {
            let j = j
                .as_ref()
                .map_err(|_| "Fix the job's fields first.".to_string())?;
            // A planned motor starts on the job with its planned appliances added.
            match j.planned().iter().find(|l| l.file_index() == index) {
                Some(l) => start(&j.with_planned(), l.name(), rate),
                None => {
                    let l = j
                        .loads()
                        .iter()
                        .find(|l| l.file_index() == index)
                        .ok_or("Fix the job's fields first.")?;
                    start(j, l.name(), rate)
                }
            }
            .map_err(|e| e.to_string())
        })
    };
    let body = move || {
        match &result() {
            Err(e) => view! { <p class="problems" data-testid="start-problem">{e.clone()}</p> }.into_any(),
            Ok(s) => view! {
                <p data-testid="start-motor">{format!(
                    "{} A locked rotor ({}); the motor gets {} at the instant of starting",
                    fixed(s.locked_rotor_a, 0),
                    s.locked_rotor_basis,
                    crate::format::volts(s.motor_v)
                )}
                    {s.starting_torque_pct.map(|t| format!(
                        ", {t} % of full-load torque",
                        t = fixed(t, 0)
                    ))}
                    <strong data-testid="start-can">{if s.can_start { ": it can start." } else { ": it may not start." }}</strong></p>
                <ul class="dips">
                    {s.appliances.iter().map(|d| view! {
                        <li data-testid="start-dip" data-flicker=d.flicker_visible.to_string()>
                            {format!("{}: {} → {}", d.name, crate::format::volts(d.before_v), crate::format::volts(d.during_v))}
                            {d.dip_pct.map(|p| if p >= 0.0 { format!(
                                " (dips {p} %)",
                                p = fixed(p, 1)
                            ) } else { format!(
                                " (rises {} %)",
                                fixed(-p, 1)
                            ) })}
                            {d.flicker_visible.then_some(" · lights flicker visibly")}
                        </li>
                    }).collect_view()}
                </ul>
                <p class="note">{format!(
                    "Flicker threshold {} % at {} starts per hour ({}).",
                    fixed(s.flicker_threshold_pct, 1),
                    crate::format::plain(s.starts_per_hour),
                    s.flicker_source
                )}</p>
                {s.notes.iter().map(|n| view! { <p class="note">{n.clone()}</p> }).collect_view()}
            }
            .into_any(),
        }
    };
    view! {
        <details class="start-panel" data-testid="start-panel">
            <summary>"Start it: the dip when it starts"</summary>
            <NumberField label="Starts per hour".into() initial="4".to_string() problem=Signal::derive(|| None::<String>) on_text=move |t: String| per_hour.set(t) testid="start-rate" />
            {body}
        </details>
    }
}
