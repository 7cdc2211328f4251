//! Summaries for people (`--format text`): the engine's figures, rounded and labelled, with the
//! cautions. Nothing here computes; it formats what the engine returned.

use crate::args::CAUTIONS;
use tapline_core::report::Report;
use tapline_core::tools::balance::Balance;
use tapline_core::tools::diagnose::{Diagnosis, History};
use tapline_core::tools::plan::{Plan, Side};
use tapline_core::tools::size::Sizing;
use tapline_core::tools::start::Start;
use tapline_core::whatif::WhatIf;

/// A summary followed by its notes and the cautions.
fn with_notes(mut s: String, notes: &[String]) -> String {
    for n in notes {
        s.push_str(&format!("Note: {n}\n"));
    }
    with_cautions(s)
}

/// A summary followed by the cautions.
fn with_cautions(mut s: String) -> String {
    s.push('\n');
    s.push_str(CAUTIONS);
    s.push('\n');
    s
}

fn volts(v: Option<f64>) -> String {
    v.map(|v| format!("{v:.1} V"))
        .unwrap_or_else(|| "undefined (floating)".to_string())
}

/// The report of one job.
pub fn report(r: &Report) -> String {
    let mut s = String::new();
    let neutral = match (r.neutral.state, r.neutral.ohms) {
        ("loose", Some(o)) => format!("loose ({o} Ω)"),
        (state, _) => state.to_string(),
    };
    s.push_str(&format!("{} — {}, neutral {neutral}\n", r.name, r.system));
    s.push_str(&format!("Voltage bands: {}\n", r.standard.name()));
    for (leg, l) in &r.legs {
        s.push_str(&format!(
            "  {leg}: {} to neutral, {:.1} A{}\n",
            volts(l.volts_to_neutral),
            l.current_a,
            l.band.map(|b| format!(", band {b}")).unwrap_or_default()
        ));
    }
    s.push_str(&format!(
        "  Neutral conductor: {:.1} A; earth path: {:.1} A; neutral bar {} from the transformer neutral\n",
        r.neutral_current_a,
        r.earth_current_a,
        volts(r.neutral.panel_neutral_shift_v)
    ));
    if let Some(t) = &r.transformer {
        s.push_str(&format!(
            "  Transformer {} kVA ({}), turns ratio {:.2}, loaded {:.0} %; fault at its terminals {:.0} A line to line, {:.0} A line to neutral\n",
            t.kva,
            t.connection,
            t.turns_ratio,
            t.loading_pct,
            t.fault_at_terminals.line_to_line_a,
            t.fault_at_terminals.line_to_neutral_a
        ));
    }
    if let Some(f) = &r.fault_at_service {
        s.push_str(&format!(
            "  Fault at the service equipment: {:.0} A line to line, {:.0} A line to neutral\n",
            f.line_to_line_a, f.line_to_neutral_a
        ));
    }
    s.push_str("Appliances:\n");
    for l in &r.loads {
        s.push_str(&format!(
            "  {} ({}): {} — {}: {}\n",
            l.name,
            l.connect,
            volts(l.voltage_v),
            l.outcome.label(),
            l.reason
        ));
    }
    for m in &r.multiwire {
        s.push_str(&format!("Shared neutral {}: {}\n", m.id, m.message));
    }
    with_notes(s, &r.notes)
}

/// The three neutral states side by side.
pub fn what_if(w: &WhatIf) -> String {
    let mut s = String::new();
    s.push_str(&format!(
        "{} — {}: each appliance with the neutral intact / loose ({} Ω) / open\n",
        w.intact.name,
        w.intact.system,
        w.loose.neutral.ohms.unwrap_or_default()
    ));
    for (k, l) in w.intact.loads.iter().enumerate() {
        s.push_str(&format!(
            "  {} ({}): {} {} / {} {} / {} {}\n",
            l.name,
            l.connect,
            volts(l.voltage_v),
            l.outcome.label(),
            volts(w.loose.loads[k].voltage_v),
            w.loose.loads[k].outcome.label(),
            volts(w.open.loads[k].voltage_v),
            w.open.loads[k].outcome.label()
        ));
    }
    with_cautions(s)
}

/// A diagnosis from readings.
pub fn diagnosis(d: &Diagnosis) -> String {
    let mut s = format!(
        "Neutral {:.3} ± {:.3} Ω, each hot {:.3} ± {:.3} Ω: {:?}\n  {}\n  Likely location: {} — {}\n",
        d.neutral_ohms,
        d.neutral_ohms_uncertainty,
        d.hot_ohms,
        d.hot_ohms_uncertainty,
        d.verdict,
        d.reason,
        d.likely_location,
        d.location_reason
    );
    for c in &d.cautions {
        s.push_str(&format!("  {c}\n"));
    }
    with_cautions(s)
}

/// Every set of a job's readings, and the re-test against the first test.
pub fn history(h: &History) -> String {
    let mut s = String::new();
    for set in &h.sets {
        let when = if set.taken.is_empty() {
            format!("Set {}", set.index + 1)
        } else {
            format!("Set {} ({})", set.index + 1, set.taken)
        };
        s.push_str(&format!(
            "{when}{}\n",
            if set.note.is_empty() {
                String::new()
            } else {
                format!(": {}", set.note)
            }
        ));
        match &set.diagnosis {
            Some(d) => s.push_str(&format!(
                "  Neutral {:.3} ± {:.3} Ω, each hot {:.3} ± {:.3} Ω: {:?}\n  {}\n",
                d.neutral_ohms,
                d.neutral_ohms_uncertainty,
                d.hot_ohms,
                d.hot_ohms_uncertainty,
                d.verdict,
                d.reason
            )),
            None => {
                for p in &set.problems {
                    s.push_str(&format!("  {p}\n"));
                }
            }
        }
    }
    if let Some(c) = &h.comparison {
        s.push_str(&format!("{c}\n"));
    }
    with_cautions(s)
}

/// A balancing plan.
pub fn balance(b: &Balance) -> String {
    let mut s = format!(
        "Neutral current {:.1} A now, {:.1} A after {} move(s) (bus layout {}).\n",
        b.before.neutral_current_a,
        b.after.neutral_current_a,
        b.moves.len(),
        b.layout
    );
    for w in &b.swaps {
        s.push_str(&format!("  {}\n", w.text));
    }
    s.push_str("Move breakers only with the main off and the panel tested dead.\n");
    with_notes(s, &b.notes)
}

/// A plan: the job as found and with its planned appliances.
pub fn plan(p: &Plan) -> String {
    let side = |title: &str, x: &Side| {
        let legs: Vec<String> = x
            .legs_a
            .iter()
            .map(|(k, v)| format!("{k} {v:.1} A"))
            .collect();
        let loading = x
            .transformer_loading_pct
            .map(|t| format!(", transformer {t:.0} % loaded"))
            .unwrap_or_default();
        format!(
            "  {title}: {}, neutral {:.1} A{loading}\n",
            legs.join(", "),
            x.neutral_current_a
        )
    };
    let mut s = format!(
        "Planned: {}\n",
        if p.planned.is_empty() {
            "nothing".to_string()
        } else {
            p.planned.join(", ")
        }
    );
    s.push_str(&side("As found", &p.before));
    s.push_str(&side("With them", &p.after));
    for a in &p.appliances {
        s.push_str(&format!(
            "  {:<24} {} -> {} {}\n",
            a.name,
            if a.planned {
                "(planned)".to_string()
            } else {
                volts(a.before_v)
            },
            volts(a.after_v),
            a.after.label()
        ));
    }
    with_notes(s, &p.notes)
}

/// A motor start.
pub fn start(st: &Start) -> String {
    let mut s = format!(
        "Starting {}: {:.0} A locked rotor ({}), power factor {:.2}; it gets {} at the instant of starting{}\n",
        st.motor,
        st.locked_rotor_a,
        st.locked_rotor_basis,
        st.start_pf,
        volts(st.motor_v),
        if st.can_start { "" } else { " and may not start" }
    );
    for a in &st.appliances {
        s.push_str(&format!(
            "  {} ({}): {} → {}{}{}\n",
            a.name,
            a.connect,
            volts(a.before_v),
            volts(a.during_v),
            a.dip_pct
                .map(|p| if p < 0.0 {
                    format!(", rises {:.1} %", -p)
                } else {
                    format!(", dip {p:.1} %")
                })
                .unwrap_or_default(),
            if a.flicker_visible {
                ", visible flicker"
            } else {
                ""
            }
        ));
    }
    with_notes(s, &st.notes)
}

/// A sizing table.
pub fn sizing(t: &Sizing) -> String {
    let mut s = format!(
        "{:.1} A at power factor {:.2} over {:.0} ft, {:.0} V circuit, target {} %:\n",
        t.amps, t.power_factor, t.length_ft, t.circuit_v, t.target_pct
    );
    for c in &t.candidates {
        s.push_str(&format!(
            "  {:>10}: drop {:.2} V ({:.2} %){}{}\n",
            c.size,
            c.drop_v,
            c.drop_pct,
            c.ampacity_a
                .map(|a| format!(", {a:.0} A at {:.0} °C", t.column_c))
                .unwrap_or_default(),
            if c.meets_drop && c.meets_ampacity != Some(false) {
                "  ok"
            } else {
                ""
            }
        ));
    }
    s.push_str(&format!(
        "Smallest that meets both: {}\n",
        t.smallest.as_deref().unwrap_or("none")
    ));
    with_notes(s, &t.notes)
}
