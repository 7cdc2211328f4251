//! Results: legs, neutral, voltage drop and every appliance's voltage and outcome.

use crate::components::OutcomeBadge;
use crate::format;
use crate::state::AppState;
use leptos::prelude::*;
use tapline_core::figures::fixed;
use tapline_core::report::Report;

/// The list of field problems, shown instead of results while the job is invalid.
#[component]
pub fn ProblemList() -> impl IntoView {
    let state = expect_context::<AppState>();
    view! {
        <div class="problems" role="alert" data-testid="problems">
            <strong>"Fix these fields to see results (the last good version stays saved):"</strong>
            <ul>{move || state.draft.with(|d| state.problems.get().iter().map(|p| view! { <li>{format::problem_text(p, Some(d))}</li> }).collect_view())}</ul>
        </div>
    }
}

#[component]
pub fn ResultsTab() -> impl IntoView {
    let state = expect_context::<AppState>();
    view! {
        <div class="tab-body" data-testid="results-tab">
            <PrintHeader />
            <Show when=move || matches!(state.report.get(), Some(Ok(_)))>
                <super::owner::OwnerView />
            </Show>
            {move || state.report.with(|r| match r {
                None => view! { <ProblemList /> }.into_any(),
                Some(Err(e)) => view! { <p class="problems" role="alert">{format!("No solution: {e}")}</p> }.into_any(),
                Some(Ok(rep)) => view! { <ReportView report=rep.clone() /> }.into_any(),
            })}
            <PlanSection />
        </div>
    }
}

/// What a printed page starts with: the job, its address or notes, the neutral as found and when
/// it was printed (shown on paper only).
#[component]
fn PrintHeader() -> impl IntoView {
    let state = expect_context::<AppState>();
    let printed = crate::state::taken_now();
    move || {
        state.draft.with(|d| {
            let n = crate::edit::neutral::neutral_of(d);
            view! {
                <div class="print-only print-header" data-testid="print-header">
                    <h2>{crate::edit::text_of(&d.name)}</h2>
                    <p>{crate::edit::text_of(&d.notes)}</p>
                    <p>{format!("Printed {printed} · neutral as found: {}{}", n.state, if n.found.is_empty() { String::new() } else { format!(" ({})", n.found) })}</p>
                </div>
            }
        })
    }
}

/// What the planned appliances change: the job as found and with them, side by side.
#[component]
fn PlanSection() -> impl IntoView {
    let state = expect_context::<AppState>();
    move || {
        state.plan.with(|p| match p {
            None => ().into_any(),
            Some(Err(e)) => view! { <p class="problems" data-testid="plan-problem">{format!("The planned additions do not solve: {e}")}</p> }.into_any(),
            Some(Ok(p)) => {
                let legs = |m: &std::collections::BTreeMap<String, f64>| {
                    m.iter().map(|(k, v)| format!("{k} {}", format::amps(*v))).collect::<Vec<_>>().join(" · ")
                };
                let side = |title: &'static str, s: &tapline_core::tools::plan::Side, id: &'static str| {
                    view! {
                        <div class="side" data-testid=id>
                            <h4>{title}</h4>
                            <p>{legs(&s.legs_a)}</p>
                            <p>"Neutral " <strong data-testid=format!("{id}-neutral")>{format::amps(s.neutral_current_a)}</strong></p>
                            {s.transformer_loading_pct.map(|t| view! { <p>"Transformer " <strong data-testid=format!("{id}-loading")>{format!(
                                "{t} %",
                                t = fixed(t, 0)
                            )}</strong> " of its rating"</p> })}
                            {s.fault_at_service.map(|f| view! { <p>{format!(
                                "Fault at the panel {} A line to line",
                                fixed(f.line_to_line_a, 0)
                            )}</p> })}
                            <p>{s.below_nominal_pct.iter().map(|(k, v)| format!("{k} {} below nominal", format::pct(*v))).collect::<Vec<_>>().join(" · ")}</p>
                        </div>
                    }
                };
                view! {
                    <section class="plan" data-testid="plan">
                        <h3>{format!("Planned: {}", p.planned.join(", "))}</h3>
                        <div class="side-by-side">
                            {side("As found", &p.before, "plan-before")}
                            {side("With the planned appliances", &p.after, "plan-after")}
                        </div>
                        <table class="legs">
                            <thead><tr><th>"Appliance"</th><th>"As found"</th><th>"With them"</th></tr></thead>
                            <tbody>
                                {p.appliances.iter().map(|a| view! {
                                    <tr data-testid="plan-appliance" data-planned=a.planned.to_string()>
                                        <td>{a.name.clone()}</td>
                                        <td>{if a.planned { "planned".to_string() } else { format::volts(a.before_v) }}</td>
                                        <td>{format::volts(a.after_v)} " " <OutcomeBadge outcome=a.after /></td>
                                    </tr>
                                }).collect_view()}
                            </tbody>
                        </table>
                        {p.notes.iter().map(|n| view! { <p class="note">{n.clone()}</p> }).collect_view()}
                    </section>
                }
                .into_any()
            }
        })
    }
}

#[component]
fn ReportView(report: Report) -> impl IntoView {
    let legs = report
        .legs
        .iter()
        .map(|(name, leg)| {
            view! {
                <tr data-testid=format!("leg-{name}")>
                    <th>{name.clone()}</th>
                    <td class="big-figure">{format::amps(leg.current_a)}</td>
                    <td class="big-figure" data-testid=format!("leg-volts-{name}")>{format::volts(leg.volts_to_neutral)}</td>
                    <td>{format::below_nominal(leg.voltage_drop_v)}</td>
                    <td>{leg.ansi_range.unwrap_or("—")}</td>
                </tr>
            }
        })
        .collect_view();
    let loads = report
        .loads
        .iter()
        .map(|l| {
            view! {
                <li class="appliance" data-testid="appliance-result" data-outcome=l.outcome.code()>
                    <div class="appliance-head">
                        <span class="appliance-name">{l.name.clone()}</span>
                        <span class="appliance-connect">{l.connect.clone()}</span>
                        <OutcomeBadge outcome=l.outcome />
                    </div>
                    <div class="appliance-figures">
                        <span class="big-figure" data-testid="appliance-volts">{format::volts(l.voltage_v)}</span>
                        <span>{format::pct(l.percent_of_rated)} " of rated"</span>
                        <span>{format::amps(l.current_a)}</span>
                        <span>{format!(
                            "{} W of {} W",
                            fixed(l.power_w, 0),
                            fixed(l.rated_w, 0)
                        )}</span>
                    </div>
                    <p class="reason">{l.reason.clone()}</p>
                </li>
            }
        })
        .collect_view();
    let notes = report
        .notes
        .iter()
        .map(|n| view! { <p class="note">{n.clone()}</p> })
        .collect_view();
    let multiwire = report
        .multiwire
        .iter()
        .map(|m| {
            let loud = m.same_leg || m.overloaded;
            let opens = m
                .if_neutral_opens
                .iter()
                .map(|o| view! { <li>{o.name.clone()} " " <OutcomeBadge outcome=o.outcome /> " " {o.reason.clone()}</li> })
                .collect_view();
            view! {
                <div class="multiwire" class:alarm=loud data-testid="multiwire-result" data-same-leg=m.same_leg.to_string()>
                    <p><strong>{format!("Shared neutral {} ({})", m.id, m.legs.join(" + "))}</strong></p>
                    <p class:big-figure=loud>{m.message.clone()}</p>
                    <p class="note">"If this shared neutral opens:"</p>
                    <ul>{opens}</ul>
                </div>
            }
        })
        .collect_view();
    let neutral = format!(
        "{} · neutral bar {} from the transformer neutral",
        report.neutral.state,
        format::volts(report.neutral.panel_neutral_shift_v)
    );
    let found = match report.neutral.state {
        "loose" => "neutral found loose",
        "open" => "neutral found open",
        _ => "neutral intact",
    };
    view! {
        <h3 data-testid="results-heading">"At the panel, as found (" {found} ")"</h3>
        <p class="neutral-line" data-testid="neutral-current">"Neutral current " <strong class="big-figure">{format::amps(report.neutral_current_a)}</strong></p>
        <p class="note">{neutral}</p>
        <table class="legs">
            <thead><tr><th>"Leg"</th><th>"Current"</th><th>"To neutral"</th><th>"Below nominal"</th><th>"Service range"</th></tr></thead>
            <tbody>{legs}</tbody>
        </table>
        <p class="note">"Service range: the ANSI C84.1 service-voltage range at the panel (IEC 60038 on 50 Hz services). Each appliance is judged on the utilization range at its own terminals."</p>
        {notes}
        {multiwire}
        <h3>"Appliances"</h3>
        <ul class="appliances">{loads}</ul>
        <p class="note">"Figures are estimates from a model of this job. Verify with a meter before acting."</p>
    }
}
