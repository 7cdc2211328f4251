//! Geometry of the neutral sweep plot: engine sweep in, SVG coordinates out. Components only
//! draw what this returns.
//!
//! x: the sweep's points in order, evenly spaced; they are log-spaced in ohms from 0.01 Ω to
//! 1 kΩ between "0" at the left edge and "open" at the right, so the axis reads as a log scale.
//! y: each appliance's voltage as a percentage of its own rating, 0 % at the bottom.
//!
//! Appliances on one connection whose curves agree within [`SAME_LINE_PCT`] at every point share
//! a line, so none hides another: each line lists its appliances, carries a label at its end and
//! a dash pattern of its own, and a readout gives every appliance's figure at any point.

use tapline_core::classify::ansi;
use tapline_core::figures::fixed;
use tapline_core::whatif::Sweep;

/// Drawing size in SVG user units (the SVG scales to the screen width).
pub const WIDTH: f64 = 360.0;
pub const HEIGHT: f64 = 240.0;
const LEFT: f64 = 40.0;
/// Room at the right for each line's end label.
const RIGHT: f64 = 44.0;
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

/// Two appliances share a line when their voltages, in % of rating, differ by less than this at
/// every point of the sweep (half a step of the 1 % a person reads off the plot).
pub const SAME_LINE_PCT: f64 = 0.5;

/// Dash patterns, one per line in turn, so lines are told apart without colour.
pub const DASHES: [&str; 4] = ["", "7 4", "2 3", "9 3 2 3"];

/// One line of the plot: the appliances of one connection that see the same voltage.
#[derive(Clone, Debug, PartialEq)]
pub struct Line {
    /// The end label: the connection (`L1-N`), with a letter when it has more than one line.
    pub label: String,
    /// The appliances on the line, in job order.
    pub names: Vec<String>,
    pub path: String,
    /// Index into the plot's palette and dash patterns, so the legend and the line match.
    pub series: usize,
    /// Where the end label goes (the line's last drawn point).
    pub end: Option<(f64, f64)>,
}

impl Line {
    /// The line's dash pattern.
    pub fn dash(&self) -> &'static str {
        DASHES[self.series % DASHES.len()]
    }
}

/// Every appliance's figure at one point of the sweep.
#[derive(Clone, Debug, PartialEq)]
pub struct Readout {
    /// The neutral resistance at the point, as text (`3.2 Ω`, `open`).
    pub ohms: String,
    /// (appliance, connection, volts or `None` while its neutral floats, outcome).
    pub rows: Vec<(String, String, Option<f64>, tapline_core::classify::Outcome)>,
}

/// The readout at sweep point `k` (clamped to the sweep).
pub fn readout(sweep: &Sweep, k: usize) -> Readout {
    let k = k.min(sweep.neutral_ohms.len().saturating_sub(1));
    let ohms = match sweep.neutral_ohms.get(k).copied().flatten() {
        None => "open".to_string(),
        Some(0.0) => "0 Ω (solid)".to_string(),
        Some(o) if o < 1.0 => format!("{o} Ω", o = fixed(o, 2)),
        Some(o) if o < 100.0 => format!("{o} Ω", o = fixed(o, 1)),
        Some(o) => format!("{o} Ω", o = fixed(o, 0)),
    };
    Readout {
        ohms,
        rows: sweep
            .loads
            .iter()
            .map(|s| {
                (
                    s.name.clone(),
                    s.connect.clone(),
                    s.volts.get(k).copied().flatten(),
                    s.outcomes
                        .get(k)
                        .copied()
                        .unwrap_or(tapline_core::classify::Outcome::Off),
                )
            })
            .collect(),
    }
}

/// The sweep point under `x` (SVG user units) on a plot of `n` points.
pub fn index_at(x: f64, n: usize) -> usize {
    let w = WIDTH - LEFT - RIGHT;
    let t = ((x - LEFT) / w).clamp(0.0, 1.0);
    (t * (n.max(2) - 1) as f64).round() as usize
}

/// The x of sweep point `k` of `n`, SVG user units.
pub fn x_at(k: usize, n: usize) -> f64 {
    x_of(k, n)
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
    let lines = group(sweep)
        .into_iter()
        .enumerate()
        .map(|(series, (label, members))| {
            let first = &sweep.loads[members[0]];
            let mut path = String::new();
            let mut pen_down = false;
            let mut end = None;
            for (k, v) in first.volts.iter().enumerate() {
                match v {
                    Some(v) => {
                        let cmd = if pen_down { 'L' } else { 'M' };
                        let (x, y) = (x_of(k, n), y_of(v / first.rated_v * 100.0));
                        path.push_str(&format!("{cmd}{x} {y} ", x = fixed(x, 1), y = fixed(y, 1)));
                        pen_down = true;
                        end = Some((x, y));
                    }
                    None => pen_down = false,
                }
            }
            Line {
                label,
                names: members
                    .iter()
                    .map(|&i| sweep.loads[i].name.clone())
                    .collect(),
                path: path.trim_end().to_string(),
                series,
                end,
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
            label: format!("{p}%", p = fixed(*p, 0)),
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

/// The appliances grouped into lines: per connection, those whose curves agree within
/// [`SAME_LINE_PCT`] everywhere (and float at the same points) share one. Returns each line's
/// label and its members' indices.
fn group(sweep: &Sweep) -> Vec<(String, Vec<usize>)> {
    let pct = |i: usize| -> Vec<Option<f64>> {
        let s = &sweep.loads[i];
        s.volts
            .iter()
            .map(|v| v.map(|v| v / s.rated_v * 100.0))
            .collect()
    };
    let same = |a: &[Option<f64>], b: &[Option<f64>]| {
        a.iter().zip(b).all(|(x, y)| match (x, y) {
            (Some(x), Some(y)) => (x - y).abs() < SAME_LINE_PCT,
            (None, None) => true,
            _ => false,
        })
    };
    let mut groups: Vec<(String, Vec<usize>, Vec<Option<f64>>)> = Vec::new();
    for i in 0..sweep.loads.len() {
        let curve = pct(i);
        let connect = &sweep.loads[i].connect;
        match groups
            .iter_mut()
            .find(|(c, _, g)| c == connect && same(g, &curve))
        {
            Some(g) => g.1.push(i),
            None => groups.push((connect.clone(), vec![i], curve)),
        }
    }
    // A connection with more than one line gets letters: L1-N a, L1-N b.
    let labels: Vec<String> = groups
        .iter()
        .map(|(c, members, _)| {
            let same_connect: Vec<&Vec<usize>> =
                groups.iter().filter(|g| &g.0 == c).map(|g| &g.1).collect();
            if same_connect.len() == 1 {
                c.clone()
            } else {
                let k = same_connect.iter().position(|m| *m == members).unwrap_or(0);
                format!("{c} {}", (b'a' + (k % 26) as u8) as char)
            }
        })
        .collect();
    groups
        .into_iter()
        .zip(labels)
        .map(|((_, members, _), label)| (label, members))
        .collect()
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
        // Every appliance is on exactly one line.
        let mut all: Vec<&String> = p.lines.iter().flat_map(|l| &l.names).collect();
        all.sort();
        let mut names: Vec<&String> = s.loads.iter().map(|l| &l.name).collect();
        names.sort();
        assert_eq!(all, names);
        let heater = p
            .lines
            .iter()
            .find(|l| l.names.iter().any(|n| n == "Aquarium heater"))
            .unwrap(); // on the lightly loaded leg
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

    /// Two 120 V resistive appliances on L1 with no branch conductors see the same voltage at
    /// every neutral resistance (they share the panel's L1 bus; common practice, no source), so
    /// they share a line; one on L2 and a 240 V appliance each get their own.
    #[test]
    fn appliances_that_see_one_voltage_share_a_line_and_others_do_not() {
        let job = crate::test_job(
            "split-phase",
            r#"[
                  {"name": "Kettle", "connect": "L1-N", "model": "resistive", "watts": 1500, "rated_v": 120},
                  {"name": "Lamp", "connect": "L1-N", "model": "resistive", "watts": 60, "rated_v": 120},
                  {"name": "Heater", "connect": "L2-N", "model": "resistive", "watts": 500, "rated_v": 120},
                  {"name": "Dryer", "connect": "L1-L2", "model": "resistive", "watts": 4000, "rated_v": 240}]"#,
        );
        let s = sweep(&job, &sweep_points(40)).unwrap();
        let p = layout(&s, None);
        let labels: Vec<&str> = p.lines.iter().map(|l| l.label.as_str()).collect();
        assert_eq!(labels, ["L1-N", "L2-N", "L1-L2"]);
        assert_eq!(p.lines[0].names, ["Kettle", "Lamp"]);
        assert_ne!(p.lines[0].dash(), p.lines[1].dash());
        assert!(p.lines.iter().all(|l| l.end.is_some()));
        // Open: the light leg (L2 heater) rises, the heavy leg falls; the readout gives every
        // appliance by name at the last point.
        let r = readout(&s, index_at(WIDTH, s.neutral_ohms.len()));
        assert_eq!(r.ohms, "open");
        assert_eq!(r.rows.len(), 4);
        let v = |name: &str| r.rows.iter().find(|row| row.0 == name).unwrap().2.unwrap();
        // Hand check: 1560 W on L1 and 500 W on L2 at 120 V are 9.23 Ω and 28.8 Ω in series
        // across 240 V: L1 gets 240·9.23/38.03 = 58.2 V, L2 181.8 V (the dryer keeps 240 V).
        assert!((v("Kettle") - 58.2).abs() < 0.3, "{}", v("Kettle"));
        assert!((v("Heater") - 181.8).abs() < 0.3, "{}", v("Heater"));
        assert!((v("Dryer") - 240.0).abs() < 1e-6);
        assert_eq!(index_at(0.0, 40), 0);
        assert_eq!(readout(&s, 0).ohms, "0 Ω (solid)");
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
