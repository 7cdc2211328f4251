//! The service: system, transformer and service conductors.

use super::runs::ConductorFields;
use crate::components::{choices, NumberField, SelectField, TextField};
use crate::edit::neutral::{self, NeutralEdit};
use crate::edit::{self, Preset, Run, Units};
use crate::format;
use crate::state::AppState;
use leptos::prelude::*;

#[component]
pub fn ServiceTab() -> impl IntoView {
    let state = expect_context::<AppState>();
    let job = state.draft.get_untracked();
    let units = state.units();
    let preset = edit::preset_of(&job);
    let custom = matches!(preset, Preset::CustomSplit | Preset::CustomWye);
    let presets: Vec<(String, String)> = Preset::ALL
        .iter()
        .map(|p| (p.code().to_string(), p.label().to_string()))
        .collect();
    let has_t = job.transformer.given().is_some();
    let problem = move |path: &'static str| Signal::derive(move || state.problem(path));

    let figures = move || {
        state.report.with(|r| match r {
            Some(Ok(rep)) => rep.transformer.as_ref().map(|t| {
                view! {
                    <dl class="figures" data-testid="transformer-figures">
                        <dt>"Turns ratio"</dt><dd data-testid="turns-ratio">{format::fixed(t.turns_ratio, 1)} " : 1"</dd>
                        <dt>"Full-load current"</dt><dd>{format::amps(t.full_load_a)}</dd>
                        <dt>"Fault at the transformer terminals, line to line"</dt><dd data-testid="fault-ll">{format::fixed(t.fault_at_terminals.line_to_line_a, 0)} " A"</dd>
                        <dt>"Fault at the transformer terminals, line to neutral"</dt><dd>{format::fixed(t.fault_at_terminals.line_to_neutral_a, 0)} " A"</dd>
                        {rep.fault_at_service.map(|f| view! {
                            <dt>"Fault at the service equipment, line to line"</dt><dd data-testid="fault-service-ll">{format::fixed(f.line_to_line_a, 0)} " A"</dd>
                            <dt>"Fault at the service equipment, line to neutral"</dt><dd data-testid="fault-service-ln">{format::fixed(f.line_to_neutral_a, 0)} " A"</dd>
                        })}
                        <dt>"Loading now"</dt><dd>{format::pct(Some(t.loading_pct))}</dd>
                    </dl>
                }
            }),
            _ => None,
        })
    };

    view! {
        <div class="tab-body" data-testid="service-tab">
            <TextField label="Job name".into() initial=edit::text_of(&job.name) problem=problem("name")
                on_text=move |t: String| state.edit(|j| j.name = tapline_core::job::Raw::Given(t)) testid="job-name" />
            <TextField label="Address or notes".into() initial=edit::text_of(&job.notes) problem=problem("notes")
                on_text=move |t: String| state.edit(|j| j.notes = tapline_core::job::Raw::Given(t)) testid="job-notes" />
            <fieldset>
                <legend>"System"</legend>
                <SelectField label="Service".into() options=presets selected=preset.code().to_string()
                    on_pick=move |code: String| if let Some(p) = Preset::from_code(&code) { state.edit_structure(|j| edit::set_preset(j, p)) }
                    testid="system-preset" />
                <Show when=move || custom>
                    <NumberField label="Volts, leg to neutral".into() unit="V".to_string()
                        initial=job.system.given().map(|s| edit::text_of_number(&s.volts_to_neutral)).unwrap_or_default()
                        problem=problem("system.volts_to_neutral") on_text=move |t: String| state.edit(|j| edit::set_volts(j, &t)) testid="system-volts" />
                </Show>
            </fieldset>
            <fieldset>
                <legend>"Transformer"</legend>
                <label class="check">
                    <input type="checkbox" prop:checked=has_t data-testid="transformer-present"
                        on:change=move |ev| state.edit_structure(|j| edit::set_transformer(j, event_target_checked(&ev))) />
                    "Model the transformer (otherwise a stiff source at nominal voltage)"
                </label>
                <Show when=move || has_t>
                    <NumberField label="Rating".into() unit="kVA".to_string() initial=edit::transformer_text(&state.draft.get_untracked(), edit::TransformerField::Kva)
                        problem=problem("transformer.kva") on_text=move |t: String| state.edit(|j| edit::set_transformer_field(j, edit::TransformerField::Kva, &t)) testid="transformer-kva" />
                    <NumberField label="Primary voltage".into() unit="V".to_string() initial=edit::transformer_text(&state.draft.get_untracked(), edit::TransformerField::PrimaryV)
                        problem=problem("transformer.primary_v") on_text=move |t: String| state.edit(|j| edit::set_transformer_field(j, edit::TransformerField::PrimaryV, &t)) testid="transformer-primary" />
                    <NumberField label="Impedance".into() unit="%Z".to_string() initial=edit::transformer_text(&state.draft.get_untracked(), edit::TransformerField::ImpedancePct)
                        problem=problem("transformer.impedance_pct") on_text=move |t: String| state.edit(|j| edit::set_transformer_field(j, edit::TransformerField::ImpedancePct, &t)) testid="transformer-z" />
                    <NumberField label="X/R".into() initial=edit::transformer_text(&state.draft.get_untracked(), edit::TransformerField::XOverR)
                        problem=problem("transformer.x_over_r") on_text=move |t: String| state.edit(|j| edit::set_transformer_field(j, edit::TransformerField::XOverR, &t)) testid="transformer-xr" />
                    {figures}
                </Show>
            </fieldset>
            <ConductorFields run=Run::Hot title="Service hot conductors" toggle="Include service hot conductors" />
            <ConductorFields run=Run::Neutral title="Service neutral conductor" toggle="Give the neutral its own size (otherwise as the hots)" />
            <NeutralFound />
            <MultiwireSection />
            <fieldset>
                <legend>"Units"</legend>
                <SelectField label="Lengths in".into() options=choices(&[("ft", "feet"), ("m", "metres")]) selected=units.code().to_string()
                    on_pick=move |v: String| state.set_units(Units::parse(&v)) testid="units" />
            </fieldset>
        </div>
    }
}

/// The service neutral as found on site, and how that was found. The what-if explores other
/// states without changing this.
#[component]
fn NeutralFound() -> impl IntoView {
    let state = expect_context::<AppState>();
    let n = state.draft.with_untracked(neutral::neutral_of);
    let loose = RwSignal::new(n.state == "loose");
    let set = move |e: NeutralEdit| state.edit(|j| neutral::apply(j, e));
    let problem = move |path: &'static str| Signal::derive(move || state.problem(path));
    view! {
        <fieldset data-testid="neutral-found">
            <legend>"Service neutral as found on site"</legend>
            <SelectField label="State".into() options=choices(&[("intact", "Intact"), ("loose", "Loose connection"), ("open", "Open")]) selected=n.state.clone()
                on_pick=move |v: String| { loose.set(v == "loose"); state.edit(|j| neutral::apply(j, NeutralEdit::State(v))) } testid="found-state" />
            <Show when=move || loose.get()>
                <NumberField label="Loose-connection resistance".into() unit="Ω".to_string() initial=state.draft.with_untracked(neutral::neutral_of).ohms
                    problem=problem("neutral.ohms") on_text=move |t: String| set(NeutralEdit::Ohms(t)) testid="found-ohms" />
            </Show>
            <TextField label="How it was found (reading, date)".into() initial=n.found.clone() problem=problem("neutral.found")
                on_text=move |t: String| set(NeutralEdit::Found(t)) testid="neutral-found-how" />
            <NumberField label="Earth return through the grounding electrode (blank for none)".into() unit="Ω".to_string() initial=n.earth_ohms.clone()
                problem=problem("neutral.earth_return_ohms") on_text=move |t: String| set(NeutralEdit::EarthOhms(t)) testid="neutral-earth" />
        </fieldset>
    }
}

/// Shared-neutral (multiwire) branch circuits: their ids and neutral conductors.
#[component]
fn MultiwireSection() -> impl IntoView {
    let state = expect_context::<AppState>();
    let list = edit::multiwire_list(&state.draft.get_untracked());
    let rows = list
        .into_iter()
        .enumerate()
        .map(|(i, m)| {
            let p = move |f: &'static str| {
                let path = format!("multiwire[{i}].{f}");
                Signal::derive(move || state.problem(&path))
            };
            let sizes: Vec<(String, String)> = ["14", "12", "10", "8", "6"].iter().map(|s| (s.to_string(), format!("{s} AWG"))).collect();
            let columns: Vec<(String, String)> = ["60", "75", "90"].iter().map(|c| (c.to_string(), format!("{c} °C column"))).collect();
            let size = match &m.size {
                tapline_core::job::Raw::Given(serde_json::Value::String(s)) => s.clone(),
                _ => "12".to_string(),
            };
            view! {
                <div class="mw-row" data-testid="multiwire-row">
                    <TextField label="Circuit id (loads name it)".into() initial=edit::text_of(&m.id) problem=p("id")
                        on_text=move |t: String| state.edit(|j| edit::set_multiwire_field(j, i, edit::MultiwireField::Id, &t)) testid="multiwire-id" />
                    <div class="two">
                        <SelectField label="Material".into() options=choices(&[("cu", "Copper"), ("al", "Aluminum")]) selected=edit::text_of(&m.material)
                            on_pick=move |v: String| state.edit(|j| edit::set_multiwire_field(j, i, edit::MultiwireField::Material, &v)) testid="multiwire-material" />
                        <SelectField label="Neutral size".into() options=sizes selected=size
                            on_pick=move |v: String| state.edit(|j| edit::set_multiwire_field(j, i, edit::MultiwireField::Size, &v)) testid="multiwire-size" />
                    </div>
                    <SelectField label="Ampacity (NEC Table 310.16)".into() options=columns selected=crate::format::plain(m.column_c.given().copied().unwrap_or(60.0))
                        on_pick=move |v: String| state.edit(|j| edit::set_multiwire_field(j, i, edit::MultiwireField::ColumnC, &v)) testid="multiwire-column" />
                    <button class="danger small" data-testid="remove-multiwire" on:click=move |_| state.edit_structure(|j| edit::remove_multiwire(j, i))>"Remove"</button>
                </div>
            }
        })
        .collect_view();
    view! {
        <fieldset>
            <legend>"Shared-neutral (multiwire) circuits"</legend>
            {rows}
            <button data-testid="add-multiwire" on:click=move |_| state.edit_structure(edit::add_multiwire)>"+ Shared-neutral circuit"</button>
        </fieldset>
    }
}
