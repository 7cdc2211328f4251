//! Small pieces of the results: an outcome badge and the list of cautions.

use leptos::prelude::*;
use tapline_core::classify::Outcome;

/// An appliance's outcome as a word with a symbol, so it reads without colour.
#[component]
pub fn OutcomeBadge(outcome: Outcome) -> impl IntoView {
    let symbol = crate::format::outcome_symbol(outcome);
    let class = format!("badge badge-{}", outcome.code());
    view! { <span class=class data-outcome=outcome.code()>{symbol} " " {outcome.label()}</span> }
}

/// The safety cautions, in full.
#[component]
pub fn CautionList() -> impl IntoView {
    view! {
        <ul class="cautions">
            <li><strong>"Energized equipment can kill."</strong> " Treat every conductor as live until you have tested it dead, and wear the protective equipment the task calls for."</li>
            <li><strong>"Open and loose neutrals are dangerous."</strong> " Metal parts and the neutral itself can carry voltage, and appliances can fail or catch fire. Keep people and pets clear until it is repaired."</li>
            <li><strong>"Verify with a meter."</strong> " These figures are estimates from a model. Measure before you touch, before you decide and after you repair."</li>
            <li><strong>"Qualified persons only."</strong> " Work on services, panels and neutrals is for qualified, licensed electricians. The utility owns the service drop and the meter: call them for faults on their side."</li>
            <li><strong>"Local rules govern."</strong> " Follow local codes, the authority having jurisdiction and licensed practice; this tool does not replace them."</li>
        </ul>
    }
}
