//! Text for numbers and results. Formatting only: every value comes from the engine's report.

use tapline_core::report::Report;
use tapline_core::validated::NeutralState;

/// An outcome's symbol, so badges and the drawing read without colour.
pub fn outcome_symbol(o: tapline_core::classify::Outcome) -> &'static str {
    use tapline_core::classify::Outcome;
    match o {
        Outcome::Off => "○",
        Outcome::Normal => "✓",
        Outcome::Marginal => "~",
        Outcome::UnderVoltage => "▼",
        Outcome::OverVoltage => "▲",
        Outcome::Stall => "■",
        Outcome::LikelyDamage => "✕",
    }
}

/// Volts with one decimal, or a dash when undefined.
pub fn volts(v: Option<f64>) -> String {
    v.map(|v| format!("{v} V", v = fixed(v, 1)))
        .unwrap_or_else(|| "—".to_string())
}

/// Amperes with one decimal.
pub fn amps(a: f64) -> String {
    format!("{a} A", a = fixed(a, 1))
}

/// A percentage with no decimals, or a dash.
pub fn pct(p: Option<f64>) -> String {
    p.map(|p| format!("{p} %", p = fixed(p, 0)))
        .unwrap_or_else(|| "—".to_string())
}

/// How far a voltage sits below nominal (`voltage_drop_v` of the report: nominal minus actual,
/// volts), said the way round it is: `2.4 V`, or `1.3 V above` when the voltage is over nominal.
pub fn below_nominal(drop_v: Option<f64>) -> String {
    match drop_v {
        None => "—".to_string(),
        Some(d) if d < -0.05 => format!("{} V above", fixed(-d, 1)),
        Some(d) => format!("{} V", fixed(d.max(0.0), 1)),
    }
}

/// A field's JSON path (`loads[2].watts`) as the screen names it: "Appliance 3 (Kettle), watts".
/// The job gives the appliance's name when it has one.
pub fn field_label(path: &str, job: Option<&tapline_core::job::JobFile>) -> String {
    let word = |key: &str| -> String {
        match key {
            "watts" => "watts".into(),
            "rated_v" => "rated volts".into(),
            "power_factor" => "power factor".into(),
            "connect" => "connected".into(),
            "volts_to_neutral" => "volts, leg to neutral".into(),
            "frequency_hz" => "frequency".into(),
            "kva" => "rating (kVA)".into(),
            "primary_v" => "primary voltage".into(),
            "impedance_pct" => "impedance (%Z)".into(),
            "x_over_r" => "X/R".into(),
            "ohms" => "loose-connection resistance".into(),
            "earth_return_ohms" => "earth return".into(),
            "found" => "how it was found".into(),
            "length_ft" | "length_m" => "length".into(),
            "column_c" => "ampacity column".into(),
            "multiwire" => "shared-neutral circuit".into(),
            "hot" => "service hot conductors".into(),
            other => other.replace('_', " "),
        }
    };
    let mut parts = path.split('.');
    let head = parts.next().unwrap_or_default();
    let rest: Vec<String> = parts.map(word).collect();
    let place = if let Some(i) = head
        .strip_prefix("loads[")
        .and_then(|t| t.strip_suffix(']'))
        .and_then(|t| t.parse::<usize>().ok())
    {
        let name = job
            .and_then(|j| j.loads.given())
            .and_then(|l| l.get(i))
            .and_then(|l| l.given())
            .map(|l| crate::edit::text_of(&l.name))
            .filter(|n| !n.trim().is_empty());
        match name {
            Some(n) => format!("Appliance {} ({n})", i + 1),
            None => format!("Appliance {}", i + 1),
        }
    } else {
        match head {
            "system" => "System".to_string(),
            "transformer" => "Transformer".to_string(),
            "service" => "Service".to_string(),
            "neutral" => "Neutral as found".to_string(),
            "name" => "Job name".to_string(),
            "notes" => "Address or notes".to_string(),
            other => {
                let mut w = word(other);
                if let Some(c) = w.get_mut(0..1) {
                    c.make_ascii_uppercase();
                }
                w
            }
        }
    };
    if rest.is_empty() {
        place
    } else {
        format!("{place}, {}", rest.join(", "))
    }
}

/// A problem as a person reads it: the field as the screen names it, then what is wrong.
pub fn problem_text(
    p: &tapline_core::validate::Problem,
    job: Option<&tapline_core::job::JobFile>,
) -> String {
    format!("{}: {}", field_label(&p.path, job), p.message)
}

/// The total line of a group of appliances (`L1`, or `L1-L2` for those across two legs): the
/// rated watts of those switched on, from the report's loads, and the leg's present current.
pub fn group_total(report: &Report, group: &str) -> String {
    let watts: f64 = report
        .loads
        .iter()
        .filter(|l| l.on && l.connect.strip_suffix("-N").unwrap_or(&l.connect) == group)
        .map(|l| l.rated_w)
        .sum();
    let leg = report
        .legs
        .get(group)
        .map(|l| format!(" · leg now {}", amps(l.current_a)))
        .unwrap_or_default();
    format!("{watts} W rated on{leg}", watts = fixed(watts, 0))
}

/// A coordinate or length of a drawing as its SVG attribute: the fewest digits that read back to
/// it (tachys would print an f64 attribute with the standard library's float printing, which the
/// app leaves out; see `tapline_core::figures`).
pub fn coord(v: f64) -> String {
    plain(v)
}

/// A number in the fewest digits that read back to it, as `{}` prints it (`1.5`, `1500`).
pub fn plain(v: f64) -> String {
    tapline_core::figures::plain(v).to_string()
}

/// A plain number with a fixed number of decimals.
pub fn fixed(v: f64, decimals: usize) -> String {
    tapline_core::figures::fixed(v, decimals).to_string()
}

/// The one-line status shown for a job in the list: the neutral as found when it is not intact,
/// the neutral current as found, and which appliance would get the highest voltage if the neutral
/// opened, with that voltage.
pub fn status_line(found: NeutralState, now: &Report, if_open: Option<&Report>) -> String {
    let mut s = match found {
        NeutralState::Intact => String::new(),
        NeutralState::Loose { ohms } => format!("neutral found loose ({} Ω) · ", plain(ohms)),
        NeutralState::Open => "neutral found open · ".to_string(),
    };
    s.push_str(&format!("neutral {} A", fixed(now.neutral_current_a, 0)));
    if let Some(open) = if_open {
        let worst = open
            .loads
            .iter()
            .filter(|l| l.on)
            .filter_map(|l| Some((l, l.percent_of_rated?)))
            .max_by(|a, b| a.1.total_cmp(&b.1));
        if let Some((l, p)) = worst {
            if p > 110.0 {
                s.push_str(&format!(
                    " · if it opens: {} gets {} V",
                    l.name,
                    fixed(l.voltage_v.unwrap_or(0.0), 0)
                ));
            } else {
                s.push_str(" · if it opens: no appliance over 110 %");
            }
        }
    }
    s
}

/// A moment as `YYYY-MM-DD HH:MM` in local time, from milliseconds since 1970 (UTC) and the
/// browser's offset in minutes (UTC minus local, as JavaScript's `getTimezoneOffset` gives it).
pub fn when(ms: f64, offset_minutes: f64) -> String {
    let local_min = (ms / 60_000.0).floor() as i64 - offset_minutes as i64;
    let days = local_min.div_euclid(1440);
    let min_of_day = local_min.rem_euclid(1440);
    let (y, m, d) = civil_from_days(days);
    format!(
        "{y:04}-{m:02}-{d:02} {:02}:{:02}",
        min_of_day / 60,
        min_of_day % 60
    )
}

/// Days since 1970-01-01 to a proleptic Gregorian date (H. Hinnant's civil-from-days algorithm).
fn civil_from_days(z: i64) -> (i64, u32, u32) {
    let z = z + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z.rem_euclid(146_097);
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let m = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    (yoe + era * 400 + i64::from(m <= 2), m, d)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers() {
        assert_eq!(volts(Some(118.44)), "118.4 V");
        assert_eq!(volts(None), "—");
        assert_eq!(amps(9.96), "10.0 A");
        assert_eq!(pct(Some(167.6)), "168 %");
        assert_eq!(below_nominal(Some(2.44)), "2.4 V");
        assert_eq!(below_nominal(Some(-1.3)), "1.3 V above");
        assert_eq!(below_nominal(Some(-0.01)), "0.0 V");
        assert_eq!(below_nominal(None), "—");
    }

    #[test]
    fn fields_are_named_as_the_screen_names_them() {
        let job = tapline_core::job::parse_job(tapline_core::demo::DEMO_JOB).unwrap();
        assert_eq!(
            field_label("loads[0].watts", Some(&job)),
            "Appliance 1 (Electric kettle), watts"
        );
        assert_eq!(
            field_label("loads[7].rated_v", None),
            "Appliance 8, rated volts"
        );
        assert_eq!(
            field_label("neutral.ohms", None),
            "Neutral as found, loose-connection resistance"
        );
        assert_eq!(
            field_label("service.hot.length_ft", None),
            "Service, service hot conductors, length"
        );
        assert_eq!(field_label("name", None), "Job name");
        assert_eq!(field_label("readings", None), "Readings");
    }

    #[test]
    fn group_totals_count_the_appliances_switched_on() {
        let job = crate::test_job(
            "split-phase",
            r#"[
                  {"name": "A", "connect": "L1-N", "model": "resistive", "watts": 1000, "rated_v": 120},
                  {"name": "B", "connect": "L1-N", "model": "resistive", "watts": 500, "rated_v": 120, "on": false},
                  {"name": "C", "connect": "L1-L2", "model": "resistive", "watts": 4000, "rated_v": 240}]"#,
        );
        let r = tapline_core::report::analyze(&job).unwrap();
        // L1 carries A (1000 W / 120 V = 8.33 A) and C (4000 W / 240 V = 16.67 A): 25.0 A.
        assert_eq!(group_total(&r, "L1"), "1000 W rated on · leg now 25.0 A");
        assert_eq!(group_total(&r, "L1-L2"), "4000 W rated on");
    }

    #[test]
    fn dates_in_local_time() {
        // 2026-12-01 17:31 UTC is 1 796 146 260 000 ms; five hours west of UTC it is 12:31.
        assert_eq!(when(1_796_146_260_000.0, 0.0), "2026-12-01 17:31");
        assert_eq!(when(1_796_146_260_000.0, 300.0), "2026-12-01 12:31");
        assert_eq!(when(0.0, 0.0), "1970-01-01 00:00");
    }

    #[test]
    fn status_names_the_appliance_that_suffers_most_when_the_neutral_opens() {
        let (_, job) = tapline_core::load_job(tapline_core::demo::DEMO_JOB).unwrap();
        let w = tapline_core::whatif::what_if(&job).unwrap();
        let line = status_line(NeutralState::Intact, &w.intact, Some(&w.open));
        assert!(line.starts_with("neutral "), "{line}");
        let line = status_line(job.neutral(), &w.intact, Some(&w.open));
        assert!(
            line.starts_with("neutral found loose (1.5 Ω) · neutral "),
            "{line}"
        );
        assert!(line.contains("if it opens: "), "{line}");
    }
}
