//! The homeowner view, as pure logic: the summary in plain words and the drawing of the service,
//! both made from one engine report (the neutral as found, loose or open), so the words and the
//! picture can never say two different things. Words come from [`crate::messages`].

use crate::edit::neutral::Explore;
use crate::format;
use crate::messages::Catalogue;
use tapline_core::classify::Outcome;
use tapline_core::report::Report;
use tapline_core::tools::diagnose::{Diagnosis, Verdict};

/// The summary, line by line.
#[derive(Clone, Debug, PartialEq)]
pub struct Summary {
    pub intro: String,
    pub carries: String,
    /// Set when the neutral was found loose or open.
    pub found_bad: Option<String>,
    /// The latest measurement of the neutral, when the job has diagnosed readings.
    pub measured: Option<String>,
    pub heading: String,
    /// One line per appliance of the report shown, in job order.
    pub appliances: Vec<String>,
    pub now: Vec<String>,
    pub recommend: Vec<String>,
    pub confirm: String,
}

/// An appliance's line: its voltage against its rating and what that does, in the engine's
/// outcome.
fn appliance_line(cat: Catalogue, l: &tapline_core::report::LoadReport) -> String {
    if !l.on {
        return cat.fill("owner.appliance_off", &[("name", &l.name)]);
    }
    match (l.voltage_v, l.percent_of_rated) {
        (Some(v), Some(p)) => cat.fill(
            "owner.appliance",
            &[
                ("name", &l.name),
                ("volts", &format::volts(Some(v))),
                ("pct", &format::pct(Some(p))),
                ("outcome", cat.get(&format!("outcome.{}", l.outcome.code()))),
            ],
        ),
        _ => cat.fill("owner.appliance_float", &[("name", &l.name)]),
    }
}

/// The summary of `shown` (the job solved in the state on screen), with `found` (the job as
/// found) for the neutral's current now, `open` (the job with the neutral open) for what to
/// unplug, and whether balancing would move circuits.
pub fn summary(
    cat: Catalogue,
    found: &Report,
    shown: &Report,
    state: &Explore,
    open: Option<&Report>,
    rebalance: bool,
    measured: Option<(&str, &Diagnosis)>,
) -> Summary {
    // On a wye (three legs, or two legs of one) the legs' currents are 120° apart and only partly
    // cancel in the neutral; on a split-phase service they are opposite and cancel.
    let wye = found.system.contains("wye");
    let legs = found
        .legs
        .iter()
        .map(|(k, l)| format!("{k} {}", format::amps(l.current_a)))
        .collect::<Vec<_>>()
        .join(" · ");
    let found_bad =
        (found.neutral.state != "intact").then(|| cat.get("owner.found_bad").to_string());
    let heading = match state {
        Explore::AsFound => cat.get("owner.state.found").to_string(),
        Explore::Loose(ohms) => cat.fill("owner.state.loose", &[("ohms", ohms)]),
        Explore::Open => cat.get("owner.state.open").to_string(),
    };
    // What to unplug: what the worst case (the neutral opening) would harm, once the neutral is
    // known to be bad. With a sound neutral there is nothing to unplug.
    let at_risk: Vec<&str> = match (found_bad.is_some(), open) {
        (true, Some(open)) => open
            .loads
            .iter()
            .filter(|l| l.on && l.outcome.severity() >= 3)
            .map(|l| l.name.as_str())
            .collect(),
        _ => Vec::new(),
    };
    let mut now = Vec::new();
    if at_risk.is_empty() {
        now.push(cat.get("owner.now.nothing").to_string());
    } else {
        now.push(cat.fill("owner.now.unplug", &[("list", &at_risk.join(", "))]));
    }
    // The diagnosis placed the fault before the meter: that is the utility's to repair.
    let utility = measured.is_some_and(|(_, d)| {
        d.likely_location == "utility side"
            && matches!(d.verdict, Verdict::Suspect | Verdict::Dangerous)
    });
    if utility {
        now.push(cat.get("owner.now.utility").to_string());
    }
    now.push(cat.get("owner.now.hands_off").to_string());
    let mut recommend = Vec::new();
    if found_bad.is_some() {
        recommend.push(cat.get("owner.recommend.repair").to_string());
    }
    if rebalance {
        recommend.push(cat.get("owner.recommend.rebalance").to_string());
    }
    if recommend.is_empty() {
        recommend.push(cat.get("owner.recommend.none").to_string());
    }
    Summary {
        intro: cat
            .get(if wye {
                "owner.neutral_what_wye"
            } else {
                "owner.neutral_what"
            })
            .to_string(),
        carries: cat.fill(
            "owner.carries",
            &[
                ("amps", &format::amps(found.neutral_current_a)),
                ("legs", &legs),
            ],
        ),
        found_bad,
        measured: measured.map(|(taken, d)| {
            cat.fill(
                "owner.measured",
                &[
                    ("taken", taken),
                    ("ohms", &format::fixed(d.neutral_ohms, 3)),
                    ("unc", &format::fixed(d.neutral_ohms_uncertainty, 3)),
                    ("verdict", cat.get(&format!("verdict.{}", d.verdict.code()))),
                ],
            )
        }),
        heading,
        appliances: shown.loads.iter().map(|l| appliance_line(cat, l)).collect(),
        now,
        recommend,
        confirm: cat.get("owner.confirm").to_string(),
    }
}

/// A vertical wire of the drawing: a leg or the neutral.
#[derive(Clone, Debug, PartialEq)]
pub struct Bus {
    /// `L1`, `L2`, `L3` or `N`.
    pub label: String,
    pub x: f64,
    /// The current on it, as text.
    pub current: String,
}

/// An appliance of the drawing: a box between its two wires.
#[derive(Clone, Debug, PartialEq)]
pub struct Item {
    /// Index into the report's loads.
    pub index: usize,
    pub name: String,
    pub connect: String,
    /// The wires it hangs between.
    pub from_x: f64,
    pub to_x: f64,
    pub y: f64,
    pub volts: String,
    pub outcome: Outcome,
    /// On the series path through two legs that an open neutral makes.
    pub series: bool,
}

/// The drawing.
#[derive(Clone, Debug, PartialEq)]
pub struct Drawing {
    pub width: f64,
    pub height: f64,
    pub buses: Vec<Bus>,
    /// Where the windings end (the top of the buses) and the service begins.
    pub top: f64,
    pub neutral_x: f64,
    pub items: Vec<Item>,
    /// `intact`, `loose` or `open`: how the neutral between transformer and panel is drawn.
    pub neutral: &'static str,
    /// The loose connection's resistance, ohms.
    pub neutral_ohms: Option<f64>,
}

/// One appliance's box height and the gap between rows, drawing units.
pub const ROW: f64 = 46.0;
const FIRST_ROW: f64 = 92.0;

/// Lays out the drawing of `report`: the windings across the top (a center tap for split-phase,
/// three windings for a wye), a vertical wire per leg and the neutral, each labelled with its
/// current, and each appliance as a box between its wires with its voltage and outcome.
pub fn drawing(report: &Report) -> Drawing {
    let width = 360.0;
    let three = report.legs.len() == 3;
    let xs: Vec<(&str, f64)> = if three {
        vec![("N", 30.0), ("L1", 130.0), ("L2", 225.0), ("L3", 320.0)]
    } else {
        vec![("L1", 40.0), ("N", 180.0), ("L2", 320.0)]
    };
    let x_of = |label: &str| xs.iter().find(|(l, _)| *l == label).map(|(_, x)| *x);
    let buses = xs
        .iter()
        .map(|(label, x)| Bus {
            label: label.to_string(),
            x: *x,
            current: format::amps(if *label == "N" {
                report.neutral_current_a
            } else {
                report.legs.get(*label).map(|l| l.current_a).unwrap_or(0.0)
            }),
        })
        .collect();
    let open = report.neutral.state == "open";
    // Split-phase: an appliance on L1 and one on L2 share a row; across and wye ones get their
    // own.
    let mut items = Vec::new();
    let (mut left, mut right, mut own) = (0usize, 0usize, 0usize);
    let mut rows = Vec::new();
    for (i, l) in report.loads.iter().enumerate() {
        let ends: Vec<&str> = l.connect.split('-').collect();
        let (a, b) = match ends.as_slice() {
            [a, b] => (*a, *b),
            _ => continue,
        };
        let (Some(xa), Some(xb)) = (x_of(a), x_of(b)) else {
            continue;
        };
        let row = if !three && b == "N" && a == "L1" {
            left += 1;
            left - 1
        } else if !three && b == "N" && a == "L2" {
            right += 1;
            right - 1
        } else {
            own += 1;
            usize::MAX - own
        };
        rows.push((i, row));
        items.push(Item {
            index: i,
            name: l.name.clone(),
            connect: l.connect.clone(),
            from_x: xa.min(xb),
            to_x: xa.max(xb),
            y: 0.0,
            volts: format::volts(l.voltage_v),
            outcome: l.outcome,
            series: open && b == "N",
        });
    }
    // Rows: the paired ones first, then one row each for the rest, in job order.
    let paired = left.max(right);
    let mut next = paired;
    for (item, (_, row)) in items.iter_mut().zip(&rows) {
        let r = if *row < usize::MAX / 2 {
            *row
        } else {
            next += 1;
            next - 1
        };
        item.y = FIRST_ROW + r as f64 * ROW;
    }
    Drawing {
        width,
        height: FIRST_ROW + next.max(1) as f64 * ROW + 10.0,
        buses,
        top: 58.0,
        neutral_x: x_of("N").unwrap_or(180.0),
        items,
        neutral: match report.neutral.state {
            "open" => "open",
            "loose" => "loose",
            _ => "intact",
        },
        neutral_ohms: report.neutral.ohms,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use tapline_core::validated::NeutralState;

    fn demo() -> (tapline_core::validated::Job, Report, Report) {
        let (_, job) = tapline_core::load_job(tapline_core::demo::DEMO_JOB).unwrap();
        let found = tapline_core::report::analyze(&job).unwrap();
        let open = tapline_core::report::analyze(&job.with_neutral(NeutralState::Open)).unwrap();
        (job, found, open)
    }

    #[test]
    fn the_summary_names_every_appliance_with_the_engines_outcome_in_every_language() {
        let (_, found, open) = demo();
        for (code, _, _) in crate::messages::LANGS {
            let cat = Catalogue::of(code);
            for (shown, state) in [(&found, Explore::AsFound), (&open, Explore::Open)] {
                let s = summary(cat, &found, shown, &state, Some(&open), false, None);
                assert_eq!(s.appliances.len(), shown.loads.len());
                for (line, l) in s.appliances.iter().zip(&shown.loads) {
                    assert!(line.starts_with(&l.name), "{line}");
                    if l.on && l.voltage_v.is_some() {
                        let word = cat.get(&format!("outcome.{}", l.outcome.code()));
                        assert!(line.contains(word), "{code}: {line} lacks {word}");
                        // No other outcome's words in the same line.
                        for other in ["normal", "stall", "likely_damage", "over_voltage"] {
                            if other != l.outcome.code() {
                                let w = cat.get(&format!("outcome.{other}"));
                                assert!(!line.contains(w), "{code}: {line} also says {w}");
                            }
                        }
                    }
                }
                // The demo's neutral was found loose: urgent, repair recommended, and the
                // appliances an open neutral would harm are to be unplugged, those only.
                assert!(s.found_bad.is_some());
                assert!(s.recommend[0] == cat.get("owner.recommend.repair"));
                let harmed: Vec<&str> = open
                    .loads
                    .iter()
                    .filter(|l| l.on && l.outcome.severity() >= 3)
                    .map(|l| l.name.as_str())
                    .collect();
                assert!(!harmed.is_empty());
                for name in &harmed {
                    assert!(s.now[0].contains(name), "{}", s.now[0]);
                }
                for l in open.loads.iter().filter(|l| l.outcome.severity() < 3) {
                    assert!(!s.now[0].contains(&format!(" {},", l.name)), "{}", s.now[0]);
                }
            }
        }
    }

    #[test]
    fn a_sound_neutral_asks_nothing_to_be_unplugged() {
        let (job, _, open) = demo();
        let intact =
            tapline_core::report::analyze(&job.with_neutral(NeutralState::Intact)).unwrap();
        let cat = Catalogue::of("en");
        let as_found = |rebalance| {
            summary(
                cat,
                &intact,
                &intact,
                &Explore::AsFound,
                Some(&open),
                rebalance,
                None,
            )
        };
        let s = as_found(false);
        assert_eq!(s.found_bad, None);
        assert_eq!(s.now[0], cat.get("owner.now.nothing"));
        assert_eq!(s.recommend, [cat.get("owner.recommend.none")]);
        assert_eq!(
            as_found(true).recommend,
            [cat.get("owner.recommend.rebalance")]
        );
    }

    #[test]
    fn the_measurement_is_reported_and_a_fault_before_the_meter_sends_them_to_the_utility() {
        use tapline_core::tools::diagnose::{diagnose, parse_readings};
        let (_, found, open) = demo();
        let text = include_str!("../../core/tests/data/readings-loose.json");
        let mut d = diagnose(&parse_readings(text).unwrap()).unwrap();
        let cat = Catalogue::of("en");
        let utility = cat.get("owner.now.utility");
        let measured = |d: &Diagnosis| {
            let s = summary(
                cat,
                &found,
                &found,
                &Explore::AsFound,
                Some(&open),
                false,
                Some(("2026-12-01 09:40", d)),
            );
            let calls_utility = s.now.iter().any(|l| l == utility);
            (s.measured.unwrap(), calls_utility)
        };
        d.likely_location = "building side";
        let (m, calls) = measured(&d);
        assert!(
            m.starts_with("Measured 2026-12-01 09:40: the neutral path is "),
            "{m}"
        );
        assert!(
            m.contains(cat.get(&format!("verdict.{}", d.verdict.code()))),
            "{m}"
        );
        assert!(!calls);
        d.likely_location = "utility side";
        d.verdict = Verdict::Dangerous;
        assert!(measured(&d).1);
        // A healthy neutral measured before the meter is nobody's fault.
        d.verdict = Verdict::Healthy;
        assert!(!measured(&d).1);
    }

    #[test]
    fn the_drawing_has_one_wire_per_leg_and_the_neutral_and_one_box_per_appliance() {
        let (_, found, open) = demo();
        let d = drawing(&found);
        let labels: Vec<&str> = d.buses.iter().map(|b| b.label.as_str()).collect();
        assert_eq!(labels, ["L1", "N", "L2"]);
        assert_eq!(d.items.len(), found.loads.len());
        assert_eq!(d.neutral, "loose");
        assert!(d.items.iter().all(|i| !i.series));
        // Boxes never overlap: distinct rows, or the two halves of one row.
        for (a, i) in d.items.iter().enumerate() {
            for j in &d.items[a + 1..] {
                assert!(
                    i.y != j.y || i.to_x <= j.from_x || j.to_x <= i.from_x,
                    "{i:?} {j:?}"
                );
            }
            assert!(i.y + ROW <= d.height);
        }
        // Open: the leg-to-neutral appliances are on the series path, the 240 V ones are not,
        // and each box carries the engine's outcome for that state.
        let d = drawing(&open);
        assert_eq!(d.neutral, "open");
        for (item, l) in d.items.iter().zip(&open.loads) {
            assert_eq!(item.series, l.connect.ends_with("-N"));
            assert_eq!(item.outcome, l.outcome);
        }
    }

    #[test]
    fn a_wye_service_is_drawn_with_three_legs() {
        let job = crate::test_job(
            "wye",
            r#"[
                  {"name": "A", "connect": "L1-N", "model": "resistive", "watts": 1000, "rated_v": 120},
                  {"name": "B", "connect": "L3-N", "model": "resistive", "watts": 500, "rated_v": 120},
                  {"name": "C", "connect": "L1-L2", "model": "resistive", "watts": 2000, "rated_v": 208}]"#,
        );
        let r = tapline_core::report::analyze(&job).unwrap();
        let cat = Catalogue::of("en");
        let s = summary(cat, &r, &r, &Explore::AsFound, None, false, None);
        assert_eq!(s.intro, cat.get("owner.neutral_what_wye"));
        let d = drawing(&r);
        assert_eq!(d.buses.len(), 4);
        assert_eq!(d.items.len(), 3);
        let ys: Vec<f64> = d.items.iter().map(|i| i.y).collect();
        assert!(ys[0] < ys[1] && ys[1] < ys[2], "{ys:?}");
    }
}
