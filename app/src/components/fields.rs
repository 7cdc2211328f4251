//! Form fields. Number fields are text inputs with a decimal keypad, so whatever was typed can be
//! kept and reported by the engine's validation instead of being silently dropped by the browser.
//! Callbacks are `Callback`s rather than generic closures so each field is compiled once, which
//! keeps the download small.

use leptos::prelude::*;

/// A field's problem, shown once the person has typed in the field or left it, so a form is not
/// red before anyone touched it. A field that comes back already holding a value with a problem
/// (a draft restored after a reload) counts as touched.
#[derive(Clone, Copy)]
struct Shown {
    touched: RwSignal<bool>,
    problem: Signal<Option<String>>,
}

impl Shown {
    fn touch(self) {
        if !self.touched.get_untracked() {
            self.touched.set(true);
        }
    }
    fn get(self) -> Option<String> {
        if self.touched.get() {
            self.problem.get()
        } else {
            None
        }
    }
}

fn shown_after_touch(problem: Signal<Option<String>>, initial: &str) -> Shown {
    Shown {
        touched: RwSignal::new(!initial.trim().is_empty() && problem.get_untracked().is_some()),
        problem,
    }
}

/// A labelled number input with the validation message for its JSON path.
#[component]
pub fn NumberField(
    label: String,
    /// The value when the field is drawn; the field is not re-filled while the user types.
    initial: String,
    #[prop(into)] problem: Signal<Option<String>>,
    #[prop(into)] on_text: Callback<String>,
    #[prop(into)] testid: String,
    #[prop(optional, into)] unit: String,
) -> impl IntoView {
    let shown = shown_after_touch(problem, &initial);
    view! {
        <label class="field" class:bad=move || shown.get().is_some()>
            <span class="field-label">{label}</span>
            <span class="field-row">
                <input
                    type="text"
                    inputmode="decimal"
                    autocomplete="off"
                    prop:value=initial
                    data-testid=testid
                    on:input=move |ev| { shown.touch(); on_text.run(event_target_value(&ev)) }
                    on:blur=move |_| shown.touch()
                />
                <span class="unit">{unit}</span>
            </span>
            <span class="field-error" role="alert">{move || shown.get().unwrap_or_default()}</span>
        </label>
    }
}

/// A labelled text input.
#[component]
pub fn TextField(
    label: String,
    initial: String,
    #[prop(into)] problem: Signal<Option<String>>,
    #[prop(into)] on_text: Callback<String>,
    #[prop(into)] testid: String,
) -> impl IntoView {
    let shown = shown_after_touch(problem, &initial);
    view! {
        <label class="field" class:bad=move || shown.get().is_some()>
            <span class="field-label">{label}</span>
            <input type="text" prop:value=initial data-testid=testid on:blur=move |_| shown.touch()
                on:input=move |ev| { shown.touch(); on_text.run(event_target_value(&ev)) } />
            <span class="field-error" role="alert">{move || shown.get().unwrap_or_default()}</span>
        </label>
    }
}

/// (value, label) pairs for a [`SelectField`] from a fixed table.
pub fn choices(items: &[(&str, &str)]) -> Vec<(String, String)> {
    items
        .iter()
        .map(|(v, l)| (v.to_string(), l.to_string()))
        .collect()
}

/// A labelled select of (value, label) options.
#[component]
pub fn SelectField(
    label: String,
    options: Vec<(String, String)>,
    selected: String,
    #[prop(into)] on_pick: Callback<String>,
    #[prop(into)] testid: String,
) -> impl IntoView {
    let options = options
        .into_iter()
        .map(|(value, text)| {
            let is = value == selected;
            view! { <option value=value selected=is>{text}</option> }
        })
        .collect_view();
    view! {
        <label class="field">
            <span class="field-label">{label}</span>
            <select data-testid=testid on:change=move |ev| on_pick.run(event_target_value(&ev))>
                {options}
            </select>
        </label>
    }
}
