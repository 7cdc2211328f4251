//! The neutral sweep plot, drawn from [`crate::plot::Plot`].

use crate::plot::{Plot, HEIGHT, WIDTH};
use leptos::prelude::*;

/// Line colours by series (identity only; outcomes are shown by the bands and the list).
pub const PALETTE: [&str; 8] = [
    "#0b3d91", "#b5179e", "#2a9d8f", "#e76f51", "#6a4c93", "#264653", "#d62828", "#7f5539",
];

/// The SVG plot with its legend.
#[component]
pub fn SweepPlot(plot: Plot) -> impl IntoView {
    let view_box = format!("0 0 {WIDTH} {HEIGHT}");
    let (l, r, t, b) = (
        plot.plot_left,
        plot.plot_right,
        plot.plot_top,
        plot.plot_bottom,
    );
    let bands = plot
        .bands
        .iter()
        .map(|band| view! { <rect class=band.class x=l y=band.y width=r - l height=band.height><title>{band.label}</title></rect> })
        .collect_view();
    let lines = plot
        .lines
        .iter()
        .map(|line| {
            let colour = PALETTE[line.series % PALETTE.len()];
            let dash = if (line.series / PALETTE.len()) % 2 == 1 { "6 3" } else { "" };
            view! { <path d=line.path.clone() stroke=colour stroke-dasharray=dash fill="none" stroke-width="2.5"><title>{line.name.clone()}</title></path> }
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
            view! { <text class="tick" x=tick.pos y=b + 16.0 text-anchor=anchor>{tick.label.clone()}</text> }
        })
        .collect_view();
    let y_ticks = plot
        .y_ticks
        .iter()
        .map(|tick| view! { <text class="tick" x=l - 4.0 y=tick.pos + 4.0 text-anchor="end">{tick.label.clone()}</text> })
        .collect_view();
    let marker = plot
        .marker_x
        .map(|x| view! { <line class="marker" x1=x x2=x y1=t y2=b /> });
    let legend = plot
        .lines
        .iter()
        .map(|line| {
            // A class, not an inline style: the Content-Security-Policy allows no inline styles.
            let class = format!("swatch series-{}", line.series % PALETTE.len());
            view! { <li><span class=class></span>{line.name.clone()}</li> }
        })
        .collect_view();
    view! {
        <figure class="plot" data-testid="sweep-plot">
            <svg viewBox=view_box role="img" aria-label="Appliance voltage as a percentage of rating against neutral resistance">
                {bands}
                <rect class="frame" x=l y=t width=r - l height=b - t fill="none" />
                {lines}
                {marker}
                {x_ticks}
                {y_ticks}
            </svg>
            <figcaption>"Voltage at each appliance, % of its rating, as the neutral goes from solid (0 Ω) to open. Bands: ANSI C84.1 ranges."</figcaption>
            <ul class="legend">{legend}</ul>
        </figure>
    }
}
