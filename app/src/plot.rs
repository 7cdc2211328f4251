//! Geometry of the neutral sweep plot: engine sweep in, SVG coordinates out. Components only
//! draw what this returns.
//!
//! x: the sweep's points in order, evenly spaced; they are log-spaced in ohms from 0.01 Ω to
//! 1 kΩ between "0" at the left edge and "open" at the right, so the axis reads as a log scale.
//! y: each appliance's voltage as a percentage of its own rating, 0 % at the bottom.

use tapline_core::classify::ansi;
use tapline_core::whatif::Sweep;

/// Drawing size in SVG user units (the SVG scales to the screen width).
pub const WIDTH: f64 = 360.0;
pub const HEIGHT: f64 = 240.0;
const LEFT: f64 = 40.0;
const RIGHT: f64 = 8.0;
const TOP: f64 = 8.0;
const BOTTOM: f64 = 28.0;

/// A shaded band of percentages with its meaning.
#[derive(Clone, Debug, PartialEq)]
pub struct Band {
    pub y: f64,
    pub height: f64,
    pub class: &'static str,
    pub label: &'static str,
}

/// One appliance's line.
#[derive(Clone, Debug, PartialEq)]
pub struct Line {
    pub name: String,
    pub path: String,
    /// Index into the plot's palette, so the legend and the line match.
    pub series: usize,
}

/// An axis tick.
#[derive(Clone, Debug, PartialEq)]
pub struct Tick {
    pub pos: f64,
    pub label: String,
}

/// Everything the plot component draws.
#[derive(Clone, Debug, PartialEq)]
pub struct Plot {
    pub bands: Vec<Band>,
    pub lines: Vec<Line>,
    pub x_ticks: Vec<Tick>,
    pub y_ticks: Vec<Tick>,
    pub marker_x: Option<f64>,
    pub plot_left: f64,
    pub plot_right: f64,
    pub plot_top: f64,
    pub plot_bottom: f64,
}

/// Highest percentage on the y axis.
const Y_MAX: f64 = 200.0;

fn y_of(pct: f64) -> f64 {
    let h = HEIGHT - TOP - BOTTOM;
    TOP + h * (1.0 - pct.clamp(0.0, Y_MAX) / Y_MAX)
}

fn x_of(k: usize, n: usize) -> f64 {
    let w = WIDTH - LEFT - RIGHT;
    LEFT + w * (k as f64) / ((n.max(2) - 1) as f64)
}

/// Lays out the plot of a sweep; `marker_ohms` marks the job's present neutral resistance
/// (`Some(None)` for open).
pub fn layout(sweep: &Sweep, marker_ohms: Option<Option<f64>>) -> Plot {
    let n = sweep.neutral_ohms.len();
    let band = |lo: f64, hi: f64, class, label| Band {
        y: y_of(hi),
        height: y_of(lo) - y_of(hi),
        class,
        label,
    };
    let bands = vec![
        band(
            ansi::UTILIZATION_B.1 * 100.0,
            Y_MAX,
            "band-high",
            "over-voltage",
        ),
        band(
            ansi::UTILIZATION_A.1 * 100.0,
            ansi::UTILIZATION_B.1 * 100.0,
            "band-marginal",
            "Range B",
        ),
        band(
            ansi::UTILIZATION_A_MIN_NONLIGHTING * 100.0,
            ansi::UTILIZATION_A.1 * 100.0,
            "band-normal",
            "Range A",
        ),
        band(
            ansi::UTILIZATION_B_MIN_NONLIGHTING * 100.0,
            ansi::UTILIZATION_A_MIN_NONLIGHTING * 100.0,
            "band-marginal",
            "Range B",
        ),
        band(
            0.0,
            ansi::UTILIZATION_B_MIN_NONLIGHTING * 100.0,
            "band-low",
            "under-voltage",
        ),
    ];
    let lines = sweep
        .loads
        .iter()
        .enumerate()
        .map(|(i, s)| {
            let mut path = String::new();
            let mut pen_down = false;
            for (k, v) in s.volts.iter().enumerate() {
                match v {
                    Some(v) => {
                        let cmd = if pen_down { 'L' } else { 'M' };
                        path.push_str(&format!(
                            "{cmd}{:.1} {:.1} ",
                            x_of(k, n),
                            y_of(v / s.rated_v * 100.0)
                        ));
                        pen_down = true;
                    }
                    None => pen_down = false,
                }
            }
            Line {
                name: s.name.clone(),
                path: path.trim_end().to_string(),
                series: i,
            }
        })
        .collect();
    let mut x_ticks = vec![Tick {
        pos: x_of(0, n),
        label: "0".to_string(),
    }];
    for (ohms, label) in [(0.1, "0.1"), (1.0, "1"), (10.0, "10"), (100.0, "100")] {
        if let Some(k) = nearest(sweep, ohms) {
            x_ticks.push(Tick {
                pos: x_of(k, n),
                label: label.to_string(),
            });
        }
    }
    x_ticks.push(Tick {
        pos: x_of(n - 1, n),
        label: "open".to_string(),
    });
    let y_ticks = [0.0, 50.0, 100.0, 150.0, 200.0]
        .iter()
        .map(|p| Tick {
            pos: y_of(*p),
            label: format!("{p:.0}%"),
        })
        .collect();
    let marker_x = marker_ohms.map(|m| match m {
        None => x_of(n - 1, n),
        Some(o) => nearest(sweep, o).map(|k| x_of(k, n)).unwrap_or(x_of(0, n)),
    });
    Plot {
        bands,
        lines,
        x_ticks,
        y_ticks,
        marker_x,
        plot_left: LEFT,
        plot_right: WIDTH - RIGHT,
        plot_top: TOP,
        plot_bottom: HEIGHT - BOTTOM,
    }
}

/// The index of the sweep point nearest `ohms` on a log scale (0 Ω matches the first point).
fn nearest(sweep: &Sweep, ohms: f64) -> Option<usize> {
    if ohms <= 0.0 {
        return Some(0);
    }
    sweep
        .neutral_ohms
        .iter()
        .enumerate()
        .filter_map(|(k, o)| {
            o.filter(|o| *o > 0.0)
                .map(|o| (k, (o.ln() - ohms.ln()).abs()))
        })
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .map(|(k, _)| k)
}

#[cfg(test)]
mod tests {
    use super::*;
    use tapline_core::whatif::{sweep, sweep_points};

    #[test]
    fn lines_span_the_plot_and_the_light_leg_rises() {
        let (_, job) = tapline_core::load_job(tapline_core::demo::DEMO_JOB).unwrap();
        let s = sweep(&job, &sweep_points(100)).unwrap();
        let p = layout(&s, Some(Some(1.5)));
        assert_eq!(p.lines.len(), job.loads().len());
        let heater = &p.lines[2]; // the aquarium heater on the lightly loaded leg
        assert!(heater.path.starts_with(&format!("M{:.1} ", LEFT)));
        let ys: Vec<f64> = heater
            .path
            .split(['M', 'L'])
            .filter(|t| !t.trim().is_empty())
            .map(|t| t.split_whitespace().nth(1).unwrap().parse().unwrap())
            .collect();
        // Higher voltage is higher on screen: y falls from left to right.
        assert!(ys.first().unwrap() > ys.last().unwrap());
        assert_eq!(p.x_ticks.last().unwrap().label, "open");
        let m = p.marker_x.unwrap();
        assert!(m > LEFT && m < WIDTH - RIGHT);
    }

    #[test]
    fn bands_stack_without_gaps() {
        let (_, job) = tapline_core::load_job(tapline_core::demo::DEMO_JOB).unwrap();
        let s = sweep(&job, &sweep_points(10)).unwrap();
        let p = layout(&s, None);
        for pair in p.bands.windows(2) {
            assert!((pair[0].y + pair[0].height - pair[1].y).abs() < 1e-9);
        }
    }
}
