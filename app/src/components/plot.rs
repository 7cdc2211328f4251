//! The neutral sweep plot, drawn from [`crate::plot::Plot`], with its readout.

use crate::format::coord;
use crate::plot::{Plot, Readout, HEIGHT, WIDTH};
use leptos::prelude::*;
use wasm_bindgen::JsCast;

/// Line colours by series (identity only; outcomes are shown by the bands and the readout, and
/// each line also has its own dash pattern and end label).
pub const PALETTE: [&str; 8] = [
    "#0b3d91", "#b5179e", "#2a9d8f", "#e76f51", "#6a4c93", "#264653", "#d62828", "#7f5539",
];

/// The SVG plot with its legend. A tap or drag on the plot sets `point`, the sweep point to
/// read out.
#[component]
pub fn SweepPlot(plot: Plot, point: RwSignal<Option<usize>>, points: usize) -> impl IntoView {
    let view_box = format!("0 0 {} {}", coord(WIDTH), coord(HEIGHT));
    let (l, r, t, b) = (
        plot.plot_left,
        plot.plot_right,
        plot.plot_top,
        plot.plot_bottom,
    );
    let bands = plot
        .bands
        .iter()
        .map(|band| view! { <rect class=band.class x=coord(l) y=coord(band.y) width=coord(r - l) height=coord(band.height)><title>{band.label}</title></rect> })
        .collect_view();
    let lines = plot
        .lines
        .iter()
        .map(|line| {
            let colour = PALETTE[line.series % PALETTE.len()];
            let label = line.end.map(|(x, y)| {
                view! { <text class="end-label" x=coord(x + 3.0) y=coord(y + 4.0) fill=colour>{line.label.clone()}</text> }
            });
            view! {
                <path d=line.path.clone() stroke=colour stroke-dasharray=line.dash() fill="none" stroke-width="2.5"><title>{line.names.join(", ")}</title></path>
                {label}
            }
        })
        .collect_view();
    let last = plot.x_ticks.len().saturating_sub(1);
    let x_ticks = plot
        .x_ticks
        .iter()
        .enumerate()
        .map(|(k, tick)| {
            // Keep the end labels inside the drawing.
            let anchor = if k == 0 { "start" } else if k == last { "end" } else { "middle" };
            view! { <text class="tick" x=coord(tick.pos) y=coord(b + 18.0) text-anchor=anchor>{tick.label.clone()}</text> }
        })
        .collect_view();
    let y_ticks = plot
        .y_ticks
        .iter()
        .map(|tick| view! { <text class="tick" x=coord(l - 4.0) y=coord(tick.pos + 4.0) text-anchor="end">{tick.label.clone()}</text> })
        .collect_view();
    let marker = plot
        .marker_x
        .map(|x| view! { <line class="marker" x1=coord(x) x2=coord(x) y1=coord(t) y2=coord(b) /> });
    let cursor = move || {
        point.get().map(|k| {
            let x = crate::plot::x_at(k, points);
            view! { <line class="cursor" x1=coord(x) x2=coord(x) y1=coord(t) y2=coord(b) /> }
        })
    };
    let legend = plot
        .lines
        .iter()
        .map(|line| {
            let colour = PALETTE[line.series % PALETTE.len()];
            view! {
                <li data-testid="plot-line">
                    <svg class="swatch" viewBox="0 0 28 8" width="28" height="8" aria-hidden="true">
                        <line x1="0" y1="4" x2="28" y2="4" stroke=colour stroke-width="3" stroke-dasharray=line.dash() />
                    </svg>
                    <strong>{line.label.clone()}</strong> ": " {line.names.join(", ")}
                </li>
            }
        })
        .collect_view();
    // The pointer's x in the drawing's own units, whatever size the plot is shown at.
    let pick = move |ev: web_sys::PointerEvent| {
        let Some(el) = ev
            .current_target()
            .and_then(|t| t.dyn_into::<web_sys::Element>().ok())
        else {
            return;
        };
        let rect = el.get_bounding_client_rect();
        if rect.width() > 0.0 {
            let x = (f64::from(ev.client_x()) - rect.left()) * WIDTH / rect.width();
            point.set(Some(crate::plot::index_at(x, points)));
        }
    };
    let drag = move |ev: web_sys::PointerEvent| {
        if ev.buttons() > 0 {
            pick(ev)
        }
    };
    view! {
        <figure class="plot" data-testid="sweep-plot">
            <svg viewBox=view_box role="img" aria-label="Appliance voltage as a percentage of rating against neutral resistance"
                on:pointerdown=pick on:pointermove=drag>
                {bands}
                <rect class="frame" x=coord(l) y=coord(t) width=coord(r - l) height=coord(b - t) fill="none" />
                {lines}
                {marker}
                {cursor}
                {x_ticks}
                {y_ticks}
            </svg>
            <figcaption>"Voltage at each appliance, % of its rating, as the neutral goes from solid (0 Ω) to open. Bands: ANSI C84.1 utilization ranges. The dotted line is the state explored; tap or drag to read every appliance."</figcaption>
            <ul class="legend">{legend}</ul>
        </figure>
    }
}

/// Every appliance's voltage and outcome at the point read out.
#[component]
pub fn PlotReadout(readout: Readout) -> impl IntoView {
    let rows = readout
        .rows
        .into_iter()
        .map(|(name, connect, volts, outcome)| {
            view! {
                <li data-testid="readout-row" data-outcome=outcome.code()>
                    <span class="appliance-name">{name}</span> " " <span class="appliance-connect">{connect}</span>
                    " " <strong>{crate::format::volts(volts)}</strong> " " <super::OutcomeBadge outcome=outcome />
                </li>
            }
        })
        .collect_view();
    view! {
        <section class="readout" data-testid="plot-readout" aria-live="polite">
            <h4>"With the neutral at " <span data-testid="readout-ohms">{readout.ohms}</span></h4>
            <ul class="appliances">{rows}</ul>
        </section>
    }
}
