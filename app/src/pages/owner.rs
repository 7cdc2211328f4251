//! The homeowner view on the results: a drawing of the service and a summary in plain words,
//! both from one engine report in the neutral state chosen (as found, works loose, opens, the
//! what-if's own state, never saved into the job), in the language chosen, and a page to leave
//! behind when printed.

use crate::edit::neutral::Explore;
use crate::format::coord;
use crate::messages::{Catalogue, LANGS};
use crate::owner::{self, Drawing};
use crate::state::{AppState, Explored};
use leptos::prelude::*;

#[component]
pub fn OwnerView() -> impl IntoView {
    let state = expect_context::<AppState>();
    let cat = move || Catalogue::of(&state.settings.with(|s| s.lang.clone()));
    let selected = RwSignal::new(None::<usize>);
    let toggle = move |which: &'static str, id: &'static str| {
        let pick = move |_| {
            state.explore.set(match which {
                "as-found" => Explore::AsFound,
                "loose" => Explore::loose_from(
                    &state.draft.with_untracked(crate::edit::neutral::neutral_of),
                ),
                _ => Explore::Open,
            })
        };
        view! { <button class="tab" class:active=move || state.explore.with(|e| e.code() == which) data-testid=format!("owner-{which}") on:click=pick>{move || cat().get(id)}</button> }
    };
    let body = move || {
        // The state on screen, solved (the explored memo reuses the job's own report as found
        // and the open-neutral solve).
        let shown = state.explore.get();
        let Some(Explored::Ready { report, .. }) = state.explored.get() else {
            return ().into_any();
        };
        let c = cat();
        let Some(Ok(found)) = state.report.get() else {
            return ().into_any();
        };
        let open = state.open.get().and_then(Result::ok);
        let rebalance = state
            .balance
            .with(|b| b.as_ref().is_some_and(|b| !b.moves.is_empty()));
        // The latest set of readings that gave a diagnosis.
        let latest = state.diagnosis.with(|h| {
            h.as_ref().and_then(|h| {
                h.sets
                    .iter()
                    .rev()
                    .find_map(|s| s.diagnosis.clone().map(|d| (s.taken.clone(), d)))
            })
        });
        let s = owner::summary(
            c,
            &found,
            &report,
            &shown,
            open.as_ref(),
            rebalance,
            latest.as_ref().map(|(t, d)| (t.as_str(), d)),
        );
        let drawing = owner::drawing(&report);
        let lines = s.appliances.clone();
        let explain = move || {
            selected
                .get()
                .and_then(|i| lines.get(i).cloned())
                .unwrap_or_else(|| c.get("owner.explain").to_string())
        };
        view! {
            <ServiceDrawing drawing=drawing cat=c selected=selected />
            <p class="owner-explain" data-testid="owner-explain" aria-live="polite">{explain}</p>
            <div class="owner-summary" data-testid="owner-summary">
                <p>{s.intro}</p>
                <p data-testid="owner-carries">{s.carries}</p>
                {s.found_bad.map(|t| view! { <p data-testid="owner-urgent"><strong>{t}</strong></p> })}
                {s.measured.map(|t| view! { <p data-testid="owner-measured">{t}</p> })}
                <h4 data-testid="owner-heading">{s.heading}</h4>
                <ul>{s.appliances.into_iter().map(|a| view! { <li data-testid="owner-appliance">{a}</li> }).collect_view()}</ul>
                <h4>{c.get("owner.now.title")}</h4>
                <ul>{s.now.into_iter().map(|a| view! { <li data-testid="owner-now">{a}</li> }).collect_view()}</ul>
                <h4>{c.get("owner.recommend.title")}</h4>
                <ul>{s.recommend.into_iter().map(|a| view! { <li data-testid="owner-recommend">{a}</li> }).collect_view()}</ul>
                <p class="note">{s.confirm}</p>
            </div>
        }
        .into_any()
    };
    let langs: Vec<(String, String)> = LANGS
        .iter()
        .map(|(code, name, _)| (code.to_string(), name.to_string()))
        .collect();
    let settings = state.settings.get_untracked();
    let wire_choices = move || {
        vec![
            ("na".to_string(), cat().get("settings.wires.na").to_string()),
            (
                "iec".to_string(),
                cat().get("settings.wires.iec").to_string(),
            ),
        ]
    };
    let prepared = move || {
        state.settings.with(|s| {
            (!s.tech_name.trim().is_empty()).then(|| {
                cat().fill(
                    "print.prepared",
                    &[("name", s.tech_name.trim()), ("licence", s.licence.trim())],
                )
            })
        })
    };
    view! {
        <section class="homeowner" data-testid="homeowner-summary" lang=move || state.settings.with(|s| s.lang.clone())>
            <h3>{move || cat().get("owner.title")}</h3>
            <nav class="tabs owner-toggle" aria-label="Neutral state shown">
                {toggle("as-found", "toggle.found")}
                {toggle("loose", "toggle.loose")}
                {toggle("open", "toggle.open")}
            </nav>
            {body}
            <p class="print-prepared" data-testid="print-prepared">{prepared}</p>
            <div class="print-only print-cautions"><crate::components::CautionList /></div>
            <div class="print-only sign-space">
                <p>{move || cat().get("print.notes")}</p>
                <div class="write-here"></div>
                <p>{move || cat().get("print.signature")}</p>
                <div class="write-here short"></div>
            </div>
            <details class="owner-settings">
                <summary>{move || format!("{} · {} · {}", cat().get("settings.language"), cat().get("settings.wires"), cat().get("settings.tech_name"))}</summary>
                <crate::components::SelectField label="Language / Idioma".into() options=langs selected=settings.lang.clone()
                    on_pick=move |v: String| state.set_setting(|s| s.lang = v) testid="owner-lang" />
                {move || view! {
                    <crate::components::SelectField label=cat().get("settings.wires").to_string() options=wire_choices() selected=state.settings.with_untracked(|s| s.wires.clone())
                        on_pick=move |v: String| state.set_setting(|s| s.wires = v) testid="owner-wires" />
                }}
                <crate::components::TextField label="Technician / Técnico".into() initial=settings.tech_name.clone() problem=Signal::derive(|| None::<String>)
                    on_text=move |t: String| state.set_setting(|s| s.tech_name = t) testid="owner-tech" />
                <crate::components::TextField label="Licence / Licencia".into() initial=settings.licence.clone() problem=Signal::derive(|| None::<String>)
                    on_text=move |t: String| state.set_setting(|s| s.licence = t) testid="owner-licence" />
            </details>
            <button data-testid="print" on:click=move |_| { if let Some(w) = web_sys::window() { let _ = w.print(); } }>"Print"</button>
        </section>
    }
}

/// The drawing: windings, a wire per leg and the neutral with its current, and each appliance's
/// box with its voltage and outcome (symbol and word as well as colour). Tapping a box shows its
/// line of the summary.
#[component]
fn ServiceDrawing(
    drawing: Drawing,
    cat: Catalogue,
    selected: RwSignal<Option<usize>>,
) -> impl IntoView {
    let state = expect_context::<AppState>();
    let d = drawing;
    let view_box = format!("0 0 {} {}", coord(d.width), coord(d.height));
    let bottom = d.height - 6.0;
    let top = d.top;
    let nx = d.neutral_x;
    let wires = d
        .buses
        .iter()
        .map(|b| {
            let class = format!("wire wire-{}", b.label);
            // The neutral between the transformer and the panel is drawn as found or explored.
            let start = if b.label == "N" { top + 16.0 } else { top };
            view! {
                <g data-testid=if b.label == "N" { "diagram-neutral" } else { "diagram-leg" } data-leg=b.label.clone()>
                    <line class=class x1=coord(b.x) y1=coord(start) x2=coord(b.x) y2=coord(bottom) />
                    <text class="wire-label" x=coord(b.x) y=coord(top - 8.0) text-anchor="middle">{format!("{} {}", b.label, b.current)}</text>
                </g>
            }
        })
        .collect_view();
    let xs: Vec<f64> = d
        .buses
        .iter()
        .filter(|b| b.label != "N")
        .map(|b| b.x)
        .collect();
    let (lo, hi) = (
        xs.iter().cloned().fold(f64::INFINITY, f64::min).min(nx),
        xs.iter().cloned().fold(f64::NEG_INFINITY, f64::max).max(nx),
    );
    let winding = view! {
        <rect class="winding" x=coord(lo - 6.0) y="4" width=coord(hi - lo + 12.0) height="22" rx="11" />
        <text class="winding-label" x=coord((lo + hi) / 2.0) y="19" text-anchor="middle">{cat.get("diagram.transformer")}</text>
    };
    let neutral_link = match d.neutral {
        "open" => view! {
            <g class="neutral-open" data-testid="diagram-neutral-open">
                <line class="wire wire-N" x1=coord(nx) y1="26" x2=coord(nx) y2=coord(top - 18.0) />
                <text class="break-mark" x=coord(nx) y=coord(top + 2.0) text-anchor="middle">"✕"</text>
                <text class="break-label" x=coord(nx + 12.0) y=coord(top + 2.0)>{cat.get("diagram.open")}</text>
            </g>
        }
        .into_any(),
        "loose" => view! {
            <g class="neutral-loose">
                <line class="wire wire-N" x1=coord(nx) y1="26" x2=coord(nx) y2=coord(top + 16.0) />
                <path class="resistor" d=format!(
                    "M{} {} l6 3 l-12 6 l12 6 l-12 6 l6 3",
                    coord(nx),
                    coord(top - 16.0)
                ) />
                <text class="break-label" x=coord(nx + 12.0) y=coord(top)>{cat.fill("diagram.loose", &[("ohms", &d.neutral_ohms.map(crate::format::plain).unwrap_or_default())])}</text>
            </g>
        }
        .into_any(),
        _ => view! { <line class="wire wire-N" x1=coord(nx) y1="26" x2=coord(nx) y2=coord(top + 16.0) /> }.into_any(),
    };
    let boxes = d
        .items
        .into_iter()
        .map(|it| {
            let w = it.to_x - it.from_x - 16.0;
            let x = it.from_x + 8.0;
            let class = format!("appliance-box outcome-{}", it.outcome.code());
            let i = it.index;
            let short = cat.get(&format!("short.{}", it.outcome.code()));
            let name: String = it.name.chars().take(if w > 200.0 { 34 } else { 16 }).collect();
            view! {
                <g class="diagram-appliance" class:series=it.series data-testid="diagram-appliance" data-outcome=it.outcome.code() data-connect=it.connect.clone()
                    role="button" tabindex="0" aria-label=it.name.clone() on:click=move |_| selected.set(Some(i))>
                    <line class="stub" x1=coord(it.from_x) y1=coord(it.y + 20.0) x2=coord(x) y2=coord(it.y + 20.0) />
                    <line class="stub" x1=coord(x + w) y1=coord(it.y + 20.0) x2=coord(it.to_x) y2=coord(it.y + 20.0) />
                    <rect class=class x=coord(x) y=coord(it.y) width=coord(w) height="40" rx="6" />
                    <text class="box-name" x=coord(x + 5.0) y=coord(it.y + 16.0)>{name}</text>
                    <text class="box-figure" x=coord(x + 5.0) y=coord(it.y + 33.0)>{format!("{} {} {}", it.volts, crate::format::outcome_symbol(it.outcome), short)}</text>
                </g>
            }
        })
        .collect_view();
    let region = move || {
        format!(
            "service-drawing wires-{}",
            state.settings.with(|s| s.wires.clone())
        )
    };
    view! {
        <svg class=region viewBox=view_box role="group" aria-label=cat.get("diagram.label") data-testid="service-drawing">
            {winding}
            {neutral_link}
            {wires}
            {boxes}
        </svg>
    }
}
