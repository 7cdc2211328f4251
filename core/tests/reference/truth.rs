//! The engine's figures where a person acts on them, each against a value obtained outside the
//! engine: a hand calculation written out here (a single node equation, a series loop, a quadratic),
//! a published rule or table, or figures an independent checker computed its own way (marked
//! "independent calculation": plain complex nodal analysis in a separate script).

use crate::common::{bisect, close, report};
use serde_json::json;
use tapline_core::classify::{classify, Context, Decider, Outcome};
use tapline_core::loads::State;

/// A stiff 120/240 V job with a 1500 W heater on L1 and a 300 W heater on L2 and the given
/// neutral object.
fn heaters(neutral: serde_json::Value) -> tapline_core::report::Report {
    report(
        &json!({"system":{"kind":"split-phase"},"neutral":neutral,"loads":[
            {"name":"Big","connect":"L1-N","model":"resistive","watts":1500},
            {"name":"Small","connect":"L2-N","model":"resistive","watts":300}]})
        .to_string(),
    )
}

/// Source: hand calculation, one node equation at the panel neutral bar (Millman's theorem):
/// Z1 = 120²/1500 = 9.6 Ω, Z2 = 120²/300 = 48 Ω, and the bar joins the center tap through the
/// neutral conductor R_n and the earth R_e in parallel, G = 1/R_n + 1/R_e:
/// V_N = (120/Z1 − 120/Z2)/(1/Z1 + 1/Z2 + G). The same figures by an independent calculation:
/// (a) R_n 1000 Ω, R_e 25 Ω: 59.759 V / 180.241 V, V_N 60.241 V, 0.060241 A and 2.40964 A;
/// (b) open, 25 Ω: 59.394 / 180.606 V, earth 2.42424 A; (c) 1000 Ω, no earth: 40.635 / 199.365 V;
/// (d) open, no earth: 40 / 200 V; (e) 2 Ω, 25 Ω: 104.962 / 135.038 V, 7.5188 A and 0.601504 A.
#[test]
fn the_earth_path_is_beside_the_neutral_in_every_state() {
    let hand = |rn: Option<f64>, re: Option<f64>| {
        let g = rn.map_or(0.0, |r| 1.0 / r) + re.map_or(0.0, |r| 1.0 / r);
        let vn = (120.0 / 9.6 - 120.0 / 48.0) / (1.0 / 9.6 + 1.0 / 48.0 + g);
        (120.0 - vn, 120.0 + vn, vn)
    };
    let cases = [
        (
            json!({"state":"loose","ohms":1000,"earth_return_ohms":25}),
            Some(1000.0),
            Some(25.0),
            (59.7590, 180.241, 0.0602410, 2.40964),
        ),
        (
            json!({"state":"open","earth_return_ohms":25}),
            None,
            Some(25.0),
            (59.3939, 180.606, 0.0, 2.42424),
        ),
        (
            json!({"state":"loose","ohms":1000}),
            Some(1000.0),
            None,
            (40.6349, 199.365, 0.0793651, 0.0),
        ),
        (json!({"state":"open"}), None, None, (40.0, 200.0, 0.0, 0.0)),
        (
            json!({"state":"loose","ohms":2,"earth_return_ohms":25}),
            Some(2.0),
            Some(25.0),
            (104.962, 135.038, 7.51880, 0.601504),
        ),
    ];
    for (neutral, rn, re, (v1, v2, i_n, i_e)) in cases {
        let r = heaters(neutral.clone());
        let (h1, h2, vn) = hand(rn, re);
        close(r.loads[0].voltage_v.unwrap(), h1, 1e-9);
        close(r.loads[1].voltage_v.unwrap(), h2, 1e-9);
        close(r.neutral.panel_neutral_shift_v.unwrap(), vn, 1e-9);
        close(r.loads[0].voltage_v.unwrap(), v1, 5e-4);
        close(r.loads[1].voltage_v.unwrap(), v2, 5e-3);
        close(r.neutral_current_a, i_n, 1e-5);
        close(r.earth_current_a, i_e, 1e-5);
        // IEC 60364-4-41 (from memory): above 50 V between the bonded neutral bar and earth,
        // touching bonded metal can shock.
        assert_eq!(r.neutral.touch_voltage_warning, vn > 50.0, "{neutral}");
    }
}

/// Source: a second, simpler model written here. A 300 W electronic supply on L1 with a third
/// harmonic of 80 % of its fundamental current, a 1000 W heater on L2 (14.4 Ω), a stiff source and
/// a neutral loosened to 1000 Ω. Fundamental: every current is in phase with its voltage, so the
/// panel neutral's voltage x solves Kirchhoff's current law at the bar,
/// P/(120 − x) = (x + 120)/14.4 + x/1000 (constant power in, heater and neutral out), found here by
/// bisection on the supply's high-voltage root. Third harmonic: the hot bars sit at 0 V (stiff
/// source, no EMF at 180 Hz); the supply's Norton source I₃ = 0.8·P/(120 − x) flows into the
/// neutral bar, which leaves through G1 = P/(120 − x)² (the supply's own input as a parallel R),
/// 1/14.4 and 1/1000: V_N3 = I₃/(G1 + 1/14.4 + 1/1000), and the neutral conductor carries
/// V_N3/1000. An ideal current source would have pushed the whole I₃ (about 1 A) through 1000 Ω.
#[test]
fn harmonic_sources_have_an_impedance_and_are_solved_in_every_state() {
    let p = 300.0;
    let job = |neutral: serde_json::Value| {
        report(
            &json!({"system":{"kind":"split-phase"},"neutral":neutral,"loads":[
                {"name":"Computer","connect":"L1-N","model":"electronic","watts":p,
                 "input_min_v":40,"input_max_v":280,"harmonics":[[3,0.8]]},
                {"name":"Heater","connect":"L2-N","model":"resistive","watts":1000}]})
            .to_string(),
        )
    };
    let (gn, g2) = (1.0 / 1000.0, 1.0 / 14.4);
    let f = |x: f64| p / (120.0 - x) - (x + 120.0) * g2 - x * gn;
    let x = bisect(f, -119.0, 0.0);
    let g1 = p / (120.0 - x).powi(2);
    let i3 = 0.8 * p / (120.0 - x);
    let vn3 = i3 / (g1 + g2 + gn);
    let r = job(json!({"state":"loose","ohms":1000}));
    close(r.neutral.panel_neutral_shift_v.unwrap(), x.abs(), 1e-6);
    let third = &r.neutral_harmonics[0];
    assert_eq!(third.order, 3);
    close(third.volts.unwrap(), vn3, 1e-6);
    close(third.current_a, vn3 / 1000.0, 1e-9);
    assert!(third.current_a < 0.1 * i3, "{} of {i3}", third.current_a);
    // Open: the same orders are solved; nothing flows in the broken conductor.
    let open = job(json!({"state":"open"}));
    assert_eq!(open.neutral_harmonics.len(), 1);
    assert_eq!(open.neutral_harmonics[0].current_a, 0.0);
    assert!(open.neutral_harmonics[0].volts.unwrap() > 0.0);
    assert!(!open.notes.iter().any(|n| n.contains("not computed")));
    // Intact on a stiff source: the supply draws its whole spectrum, 0.8 × 300 W / 120 V.
    let intact = job(json!({"state":"intact"}));
    close(intact.neutral_harmonics[0].current_a, 0.8 * 2.5, 1e-9);
}

/// Source: Kirchhoff's current law with harmonic phasors (derived; the triplen rule of G. M.
/// Masters, eq. 2.102): three line-to-neutral loads on L1, L2, L3 of a 208Y/120 wye each take
/// 13 A at the fundamental (1560 W at 120 V) with a third harmonic of 85 %, 11.05 A. The
/// fundamentals cancel in their shared neutral; the thirds are in phase and add: 3 × 11.05 =
/// 33.15 A, over a 12 AWG conductor's 20 A (NEC Table 310.16, 60 °C column, from memory).
#[test]
fn triplens_of_a_three_phase_shared_neutral_add() {
    let r = report(
        &json!({"system":{"kind":"wye","volts_to_neutral":120},
            "multiwire":[{"id":"office","material":"cu","size":"12","column_c":60}],
            "loads":[
            {"name":"PC 1","connect":"L1-N","model":"electronic","watts":1560,"harmonics":[[3,0.85]],"multiwire":"office"},
            {"name":"PC 2","connect":"L2-N","model":"electronic","watts":1560,"harmonics":[[3,0.85]],"multiwire":"office"},
            {"name":"PC 3","connect":"L3-N","model":"electronic","watts":1560,"harmonics":[[3,0.85]],"multiwire":"office"}]})
        .to_string(),
    );
    let m = &r.multiwire[0];
    close(m.neutral_fundamental_a, 0.0, 1e-9);
    close(m.neutral_current_a, 3.0 * 0.85 * 13.0, 1e-9);
    assert!(m.overloaded, "{}", m.message);
}

/// Source: NEC Chapter 9 Table 9 (12 AWG uncoated copper in PVC: R 2.0 Ω/kft, X_L 0.054 Ω/kft),
/// and an independent calculation by nodal analysis: one 100 ft cable, hot A from L1 and hot B
/// from L2 to their loads, one shared neutral back to a solid neutral bar. (a) Two 1800 W heaters:
/// 117.073 V each and no neutral current (a private out-and-back loop each would give 114.286 V).
/// (b) 1800 W and 600 W: 115.245 V and 120.867 V, 9.3695 A in the shared neutral. (d) Case (b)
/// with the shared neutral open: the heaters are in series across 240 V, 59.259 V and 177.778 V.
#[test]
fn a_shared_neutral_is_one_conductor_of_its_cable() {
    let job = |w2: f64| {
        report(
            &json!({"system":{"kind":"split-phase"},
                "multiwire":[{"id":"A","material":"cu","size":"12","length_ft":100,"column_c":60}],
                "loads":[
                {"name":"Heater A","connect":"L1-N","model":"resistive","watts":1800,"multiwire":"A"},
                {"name":"Heater B","connect":"L2-N","model":"resistive","watts":w2,"multiwire":"A"}]})
            .to_string(),
        )
    };
    let a = job(1800.0);
    close(a.loads[0].voltage_v.unwrap(), 117.073, 5e-4);
    close(a.loads[1].voltage_v.unwrap(), 117.073, 5e-4);
    close(a.multiwire[0].neutral_current_a, 0.0, 1e-9);
    let b = job(600.0);
    close(b.loads[0].voltage_v.unwrap(), 115.245, 5e-4);
    close(b.loads[1].voltage_v.unwrap(), 120.867, 5e-4);
    close(b.multiwire[0].neutral_current_a, 9.3695, 5e-4);
    let open = &b.multiwire[0].if_neutral_opens;
    close(open[0].voltage_v.unwrap(), 59.2593, 5e-4);
    close(open[1].voltage_v.unwrap(), 177.778, 5e-3);
    // The same heater on its own 100 ft out-and-back loop: 120·8/(8 + 2·(0.2 + j0.0054)).
    let private = report(
        &json!({"system":{"kind":"split-phase"},"loads":[
            {"connect":"L1-N","model":"resistive","watts":1800,
             "branch":{"material":"cu","size":"12","length_ft":100}}]})
        .to_string(),
    );
    close(private.loads[0].voltage_v.unwrap(), 114.286, 5e-4);
}

/// Source: hand calculation, a constant-power load P behind a resistance R from an EMF E has an
/// operating point only when E² ≥ 4RP. A 5000 W and a 20 W supply on L1 behind 1 Ω: 4·1·5020 =
/// 20 080 > 14 400, so the supply collapses and the larger gives way (to its 1 % standby, a
/// 288 Ω resistor). Then the 20 W supply runs at the high root of V²(1 + 1/288) − 120·V + 20 = 0.
/// Listing the loads in either order gives the same answer.
#[test]
fn collapse_drops_the_largest_load_and_the_small_one_runs() {
    let run = |big_first: bool| {
        let big = json!({"name":"Charger","connect":"L1-N","model":"electronic","watts":5000});
        let small = json!({"name":"Clock","connect":"L1-N","model":"electronic","watts":20});
        let loads = if big_first {
            json!([big, small])
        } else {
            json!([small, big])
        };
        report(
            &json!({"system":{"kind":"split-phase"},
                "service":{"hot":{"r_ohm":1.0},"neutral":{"r_ohm":0.0}},"loads":loads})
            .to_string(),
        )
    };
    let a = 1.0 + 1.0 / 288.0;
    let v = (120.0 + (120.0f64 * 120.0 - 4.0 * a * 20.0).sqrt()) / (2.0 * a);
    for big_first in [true, false] {
        let r = run(big_first);
        let (big, small) = if big_first { (0, 1) } else { (1, 0) };
        assert_eq!(r.loads[big].state, "dropped_out");
        assert_eq!(r.loads[small].state, "running");
        close(r.loads[small].voltage_v.unwrap(), v, 1e-6);
    }
}

/// Source: ANSI C84.1 (from memory): Range A for 120 V utilization is 108–125 V without lighting,
/// and the standard refers to the system nominal voltage; NEMA MG 1 §12.44 (from memory): a motor
/// runs within ±10 % of its nameplate. A 115 V motor on a 120 V circuit at 120 V is normal on both
/// counts.
#[test]
fn a_115_volt_motor_at_120_volts_is_normal() {
    let r = report(
        &json!({"system":{"kind":"split-phase"},"loads":[
            {"connect":"L1-N","model":"motor","watts":500,"power_factor":0.8,"rated_v":115}]})
        .to_string(),
    );
    assert_eq!(r.loads[0].outcome, Outcome::Normal, "{}", r.loads[0].reason);
    close(r.loads[0].nominal_v, 120.0, 0.0);
}

/// Source: IEC 60038 (from memory): 230/400 V systems are held within ±10 % at the supply
/// terminals (207–253 V), with a further 4 % allowed inside the installation. A 50 Hz service at
/// 246 V is normal there (ANSI's 5 % would call it high).
#[test]
fn a_50_hz_service_is_judged_by_iec_60038() {
    let r = report(
        &json!({"system":{"kind":"wye","volts_to_neutral":246,"frequency_hz":50},"loads":[
            {"connect":"L1-N","model":"resistive","watts":2000,"rated_v":230}]})
        .to_string(),
    );
    assert_eq!(r.standard.name(), "IEC 60038");
    assert_eq!(r.legs["L1"].band, Some("A"));
    assert_eq!(r.legs["L1"].ansi_range, None);
    assert_eq!(r.loads[0].outcome, Outcome::Normal, "{}", r.loads[0].reason);
}

/// Source: ANSI C84.1 (from memory): utilization Range A tops out at 125/120 of the system
/// nominal, Range B at 127/120. On a 480Y/277 V service whose primary runs 4 % high (open circuit
/// 288 V), a 277 V heater (104 % of both its nameplate and the nominal) is normal, a 250 V ballast
/// (115 % of its nameplate) is likely damaged by its nameplate's rule; at 7 % high (296 V, 107 %,
/// above Range B) a supply rated 100–300 V is near its own limit (marginal) but the system band is
/// worse and decides.
#[test]
fn the_report_says_which_rule_decided() {
    let job = |supply: f64| {
        report(
            &json!({"system":{"kind":"wye","volts_to_neutral":277},
                "transformer":{"kva":500,"primary_v":12470,"impedance_pct":2,"supply_v":supply},
                "loads":[
                {"connect":"L1-N","model":"resistive","watts":100,"rated_v":277},
                {"connect":"L2-N","model":"impedance","watts":100,"power_factor":0.9,"rated_v":250},
                {"connect":"L3-N","model":"electronic","watts":100,"rated_v":277,
                 "input_min_v":100,"input_max_v":300}]})
            .to_string(),
        )
    };
    let r = job(12_470.0 * 1.04);
    assert_eq!(r.loads[0].outcome, Outcome::Normal, "{}", r.loads[0].reason);
    assert_eq!(r.loads[1].outcome, Outcome::LikelyDamage);
    assert_eq!(r.loads[1].decided_by, Decider::Nameplate);
    let high = job(12_470.0 * 1.07);
    assert_eq!(high.loads[2].outcome, Outcome::OverVoltage);
    assert_eq!(high.loads[2].decided_by, Decider::SystemBand);
    assert!(
        high.loads[2].reason.contains("ANSI C84.1"),
        "{}",
        high.loads[2].reason
    );
}

/// Source: an independent calculation for a 50 kVA, 7200 V : 120/240 V unit at 2.0 % and X/R 2
/// (Z_LL = 0.0103038 + j0.0206076 Ω on 240 V), infinite primary, with service conductors of
/// 0.0200 + j0.0060 Ω each: at the terminals 10 416.7 A line to line and, with the half winding at
/// 1.5R + j1.2X, 16 459.9 A line to neutral (Bussmann's point-to-point rule of 1.5 × gives
/// 15 625 A, from memory); at the service equipment 240/|Z_LL + 2Z_hot| = 4003.49 A and
/// 120/|Z_LN + Z_hot + Z_n| = 2527.22 A. The point-to-point method, which adds magnitudes, gives
/// 3704 A and about 2430 A there: within 10 %. At the terminals line to neutral is larger; at the
/// end of this long service line to line is (NEC 110.24 asks for the service's figure).
#[test]
fn fault_current_at_the_terminals_and_at_the_service() {
    let r = report(
        &json!({"system":{"kind":"split-phase"},
            "transformer":{"kva":50,"primary_v":7200,"impedance_pct":2.0,"x_over_r":2.0},
            "service":{"hot":{"r_ohm":0.02,"x_ohm":0.006},"neutral":{"r_ohm":0.02,"x_ohm":0.006}}})
        .to_string(),
    );
    let t = r.transformer.unwrap().fault_at_terminals;
    let s = r.fault_at_service.unwrap();
    close(t.line_to_line_a, 10_416.7, 0.1);
    close(t.line_to_neutral_a, 16_459.9, 0.1);
    close(s.line_to_line_a, 4003.49, 0.01);
    close(s.line_to_neutral_a, 2527.22, 0.01);
    assert!((s.line_to_line_a / 3703.63 - 1.0).abs() < 0.10);
    assert!((s.line_to_neutral_a / 2427.12 - 1.0).abs() < 0.10);
    assert!(t.line_to_neutral_a > t.line_to_line_a);
    assert!(s.line_to_line_a > s.line_to_neutral_a);
}

/// Source: turns-ratio test practice (the ratio is read across the two windings on one core leg;
/// IEEE C57.12.90, from memory) and an independent calculation: 4160 V delta to 208Y/120 reads
/// 4160/120 = 34.67 with a line-voltage ratio of 20; 12 470Y/7200 wye-wye to 480Y/277 reads
/// 7200/277.1 = 25.98, the same as its line ratio; 7200 V to 120/240 V reads 30 (60 per half).
#[test]
fn the_turns_ratio_is_the_winding_ratio() {
    let t = |system: serde_json::Value, primary: f64, connection: &str| {
        report(
            &json!({"system":system,"transformer":{"kva":75,"primary_v":primary,
                "impedance_pct":3,"connection":connection}})
            .to_string(),
        )
        .transformer
        .unwrap()
    };
    let dy = t(
        json!({"kind":"wye","volts_to_neutral":120}),
        4160.0,
        "delta-wye",
    );
    close(dy.turns_ratio, 34.667, 5e-4);
    close(dy.line_voltage_ratio, 4160.0 / (120.0 * 3f64.sqrt()), 1e-9);
    close(dy.line_voltage_ratio, 20.0, 0.02);
    let yy = t(
        json!({"kind":"wye","volts_to_neutral":480.0 / 3f64.sqrt()}),
        12_470.0,
        "wye-wye",
    );
    close(yy.turns_ratio, 25.979, 5e-4);
    close(yy.line_voltage_ratio, 25.979, 5e-4);
    let single = t(json!({"kind":"split-phase"}), 7200.0, "single-phase");
    close(single.turns_ratio, 30.0, 1e-12);
    close(single.half_winding_ratio.unwrap(), 60.0, 1e-12);
}

/// Source: common practice, no source: an appliance with next to no voltage does not run, a lamp
/// at a few percent gives no light, a stalled motor at a few volts draws little current, and an
/// open switch with 240 V across it leaves live terminals. The sentences say so.
#[test]
fn sentences_are_right_at_the_extremes() {
    let j = crate::common::job(
        &json!({"system":{"kind":"split-phase"},"loads":[
            {"connect":"L1-N","model":"resistive","watts":1500},
            {"connect":"L1-N","model":"lamp","watts":60},
            {"connect":"L1-N","model":"motor","watts":500,"power_factor":0.8}]})
        .to_string(),
    );
    let system = *j.system();
    let ctx = |k: usize| Context::of(&system, &j.loads()[k]);
    let (o, why, _) = classify(&j.loads()[0], 0.0, State::Running, true, ctx(0));
    assert_eq!(o, Outcome::UnderVoltage);
    assert!(why.to_string().contains("gets no voltage"), "{why}");
    let (_, why, _) = classify(&j.loads()[1], 7.2, State::Running, true, ctx(1));
    assert!(why.to_string().ends_with("dark"), "{why}");
    let (_, why, _) = classify(&j.loads()[2], 4.0, State::Stalled, true, ctx(2));
    assert!(!why.to_string().contains("locked-rotor current"), "{why}");
    let (o, why, _) = classify(&j.loads()[0], 144.0, State::Running, true, ctx(0));
    assert_eq!(o, Outcome::LikelyDamage);
    assert!(!why.to_string().contains("minutes"), "{why}");
    let (o, why, _) = classify(&j.loads()[0], 240.0, State::Running, false, ctx(0));
    assert_eq!(o, Outcome::Off);
    assert!(why.to_string().contains("terminals are live"), "{why}");
}

/// Source: hand calculation: with the neutral open and no earth path, a 1500 W heater on L1
/// (9.6 Ω) in series with a 25 W lamp on L2 leaves the switched-off appliance on L2 with nearly
/// the whole 240 V across its switch, since its terminals sit between L2 and a neutral bar pulled
/// almost to L1.
#[test]
fn an_off_appliance_on_the_light_leg_of_an_open_neutral_is_live() {
    let r = report(
        &json!({"system":{"kind":"split-phase"},"neutral":{"state":"open"},"loads":[
            {"name":"Heater","connect":"L1-N","model":"resistive","watts":1500},
            {"name":"Lamp","connect":"L2-N","model":"resistive","watts":25},
            {"name":"Dryer","connect":"L2-N","model":"resistive","watts":600,"on":false}]})
        .to_string(),
    );
    // 240·576/(576 + 9.6) = 236.1 V across the lamp's 576 Ω, and so across the open switch.
    close(r.loads[2].voltage_v.unwrap(), 240.0 * 576.0 / 585.6, 1e-6);
    assert!(r.loads[2].reason.contains("terminals are live"));
    assert!(r.neutral.touch_voltage_warning);
}

/// Source: common practice, no source: a loose connection of 1e-200 Ω and a reactance of 1e-30 Ω
/// are solid connections; the answer equals the intact job's, and nothing is called "no path".
#[test]
fn tiny_values_solve_like_solid_connections() {
    let base = json!({"system":{"kind":"split-phase"},
        "service":{"hot":{"r_ohm":0.02,"x_ohm":1e-30}},
        "loads":[{"connect":"L1-N","model":"resistive","watts":1500},
                 {"connect":"L2-N","model":"motor","watts":400,"power_factor":0.8}]});
    let intact = report(&base.to_string());
    let mut loose = base.clone();
    loose["neutral"] = json!({"state":"loose","ohms":1e-200});
    let tiny = report(&loose.to_string());
    for k in 0..2 {
        close(
            tiny.loads[k].voltage_v.unwrap(),
            intact.loads[k].voltage_v.unwrap(),
            1e-9,
        );
    }
}

/// Source: NEC Table 430.7(B) (from memory: code letter G, 5.6–6.29 kVA per horsepower; the top of
/// the range is used) and a hand calculation of the starting instant. A 1 hp code G motor at 120 V
/// draws 6290/120 = 52.42 A at locked rotor, power factor 0.35, so it is the impedance
/// Z_lr = 120/52.42 ∠acos 0.35. Beside a 1500 W heater (9.6 Ω) on L1, behind a hot and a neutral of
/// 0.1 + j0.05 Ω each on a stiff source: before, the heater gets 120·|9.6/(9.6 + Z_loop)|; while
/// the motor starts, 120·|Z_p/(Z_p + Z_loop)| with Z_p = 9.6 ∥ Z_lr and Z_loop = 0.2 + j0.1 Ω. The
/// motor's starting torque is (V/120)² × 150 % of full-load torque (NEMA design B, from memory).
#[test]
fn the_dip_when_a_motor_starts() {
    use num_complex::Complex64;
    let j = crate::common::job(
        &json!({"system":{"kind":"split-phase"},
            "service":{"hot":{"r_ohm":0.1,"x_ohm":0.05},"neutral":{"r_ohm":0.1,"x_ohm":0.05}},
            "loads":[
            {"name":"Heater","connect":"L1-N","model":"resistive","watts":1500},
            {"name":"Pump","connect":"L1-N","model":"motor","watts":746,"power_factor":0.75,
             "code_letter":"G","hp":1}]})
        .to_string(),
    );
    let s = tapline_core::tools::start::start(&j, "Pump", 4.0).unwrap();
    close(s.locked_rotor_a, 6290.0 / 120.0, 1e-9);
    let z_loop = Complex64::new(0.2, 0.1);
    let z_lr = Complex64::from_polar(120.0 / (6290.0 / 120.0), 0.35f64.acos());
    let r = Complex64::new(9.6, 0.0);
    let z_p = r * z_lr / (r + z_lr);
    let before = 120.0 * (r / (r + z_loop)).norm();
    let during = 120.0 * (z_p / (z_p + z_loop)).norm();
    let heater = &s.appliances[0];
    close(heater.before_v.unwrap(), before, 1e-9);
    close(heater.during_v.unwrap(), during, 1e-9);
    close(
        heater.dip_pct.unwrap(),
        (before - during) / before * 100.0,
        1e-9,
    );
    close(s.motor_v.unwrap(), during, 1e-9);
    close(
        s.starting_torque_pct.unwrap(),
        (during / 120.0).powi(2) * 150.0,
        1e-9,
    );
    assert_eq!(s.can_start, (during / 120.0).powi(2) * 1.5 >= 1.0);
}

/// Source: common practice, no source (Kirchhoff's laws): with the neutral loose, the starting
/// current also crosses the loose neutral, so the motor's own leg dips further and the other leg
/// rises; with the neutral sound the other leg barely moves.
#[test]
fn a_loose_neutral_deepens_the_dip_and_raises_the_other_leg() {
    let job = |neutral: serde_json::Value| {
        crate::common::job(
            &json!({"system":{"kind":"split-phase"},
                "transformer":{"kva":25,"primary_v":7200,"impedance_pct":2.0},
                "service":{"hot":{"r_ohm":0.03,"x_ohm":0.01},"neutral":{"r_ohm":0.03,"x_ohm":0.01}},
                "neutral":neutral,"loads":[
                {"name":"Lamp 1","connect":"L1-N","model":"lamp","watts":60},
                {"name":"Lamp 2","connect":"L2-N","model":"lamp","watts":60},
                {"name":"Compressor","connect":"L1-N","model":"motor","watts":1200,"power_factor":0.8,
                 "locked_rotor_a":60}]})
            .to_string(),
        )
    };
    let sound =
        tapline_core::tools::start::start(&job(json!({"state":"intact"})), "Compressor", 4.0)
            .unwrap();
    let loose = tapline_core::tools::start::start(
        &job(json!({"state":"loose","ohms":1.0})),
        "Compressor",
        4.0,
    )
    .unwrap();
    let dip = |s: &tapline_core::tools::start::Start, k: usize| s.appliances[k].dip_pct.unwrap();
    assert!(
        dip(&loose, 0) > dip(&sound, 0) + 1.0,
        "{} vs {}",
        dip(&loose, 0),
        dip(&sound, 0)
    );
    assert!(
        dip(&loose, 1) < -1.0,
        "the other leg rises: {}",
        dip(&loose, 1)
    );
    assert!(dip(&sound, 1).abs() < 1.0);
    assert!(loose.appliances[0].flicker_visible);
}

/// Source: NEC Chapter 9 Table 9 (uncoated copper in PVC: 14 AWG 3.1, 12 AWG 2.0, 10 AWG 1.2,
/// 8 AWG 0.78 Ω/kft; read), IEEE Std 141's drop VD ≈ I·(R cos θ + X sin θ) and NEC 210.19(A)
/// Informational Note No. 4 (3 % for a branch circuit). 16 A at unity power factor over 100 ft,
/// out and back: 12 AWG drops 2 × 16 × 0.200 = 6.40 V, 10 AWG 3.84 V (over 3.6 V), 8 AWG 2.50 V:
/// the smallest to meet 3 % of 120 V is 8 AWG. On a balanced multiwire run the neutral carries
/// nothing, so 12 AWG drops only its hot's 3.20 V and meets it.
#[test]
fn sizing_a_branch_run_for_three_percent() {
    let run = |extra: &str| {
        tapline_core::tools::size::parse_run(&format!(
            r#"{{"version":1,"system":{{"kind":"split-phase"}},"run":{{"connect":"L1-N","amps":16,"length_ft":100{extra}}}}}"#
        ))
        .unwrap()
    };
    let t = tapline_core::tools::size::size(&run(""));
    let drop = |size: &str| t.candidates.iter().find(|c| c.size == size).unwrap().drop_v;
    close(drop("12 AWG"), 2.0 * 16.0 * 0.200, 1e-9);
    close(drop("10 AWG"), 2.0 * 16.0 * 0.120, 1e-9);
    close(drop("8 AWG"), 2.0 * 16.0 * 0.078, 1e-9);
    assert_eq!(t.smallest.as_deref(), Some("8 AWG"));
    let shared = tapline_core::tools::size::size(&run(r#","neutral_amps":0"#));
    assert_eq!(shared.smallest.as_deref(), Some("12 AWG"));
    close(shared.candidates[1].drop_v, 16.0 * 0.200, 1e-9);
}
