//! The `tapline` command: good jobs, each class of bad input, and exit codes.

use std::io::Write;
use std::process::{Command, Output, Stdio};

fn tapline(args: &[&str], stdin: Option<&str>) -> Output {
    let mut child = Command::new(env!("CARGO_BIN_EXE_tapline"))
        .args(args)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    if let Some(text) = stdin {
        // The command may exit before reading (a usage error); a broken pipe is then expected.
        let _ = child.stdin.take().unwrap().write_all(text.as_bytes());
    }
    drop(child.stdin.take());
    child.wait_with_output().unwrap()
}

fn data(name: &str) -> String {
    format!("{}/../core/tests/data/{name}", env!("CARGO_MANIFEST_DIR"))
}

/// Asserts a zero exit, printing standard error otherwise.
#[track_caller]
fn assert_ok(out: &Output) {
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

fn stdout_json(out: &Output) -> serde_json::Value {
    serde_json::from_slice(&out.stdout).unwrap_or_else(|e| {
        panic!(
            "stdout is not JSON ({e}): {}",
            String::from_utf8_lossy(&out.stdout)
        )
    })
}

#[test]
fn solve_prints_the_report_fields_the_format_promises() {
    let out = tapline(&["solve", &data("alder-court.json")], None);
    assert_ok(&out);
    let r = stdout_json(&out);
    for leg in ["L1", "L2"] {
        assert!(r["legs"][leg]["current_a"].as_f64().unwrap() > 0.0);
        assert!(r["legs"][leg]["volts_to_neutral"].as_f64().unwrap() > 0.0);
    }
    assert!(r["neutral_current_a"].as_f64().unwrap() > 0.0);
    assert_eq!(r["transformer"]["turns_ratio"].as_f64().unwrap(), 30.0);
    assert!(r["transformer"]["full_load_a"].as_f64().unwrap() > 100.0);
    let terminals = &r["transformer"]["fault_at_terminals"];
    assert!(
        terminals["line_to_neutral_a"].as_f64().unwrap()
            > terminals["line_to_line_a"].as_f64().unwrap()
    );
    assert!(r["fault_at_service"]["line_to_line_a"].as_f64().unwrap() > 0.0);
    let loads = r["loads"].as_array().unwrap();
    assert_eq!(loads[0]["name"], "Space heater");
    assert_eq!(loads[1]["name"], "Freezer");
    for l in loads {
        for field in ["voltage_v", "current_a", "percent_of_rated"] {
            assert!(l[field].is_number(), "{field} in {l}");
        }
        assert!(l["outcome"].is_string());
    }
    // The loose neutral lowers the heavy leg and raises the light one.
    assert!(loads[0]["voltage_v"].as_f64().unwrap() < 120.0);
    assert!(loads[1]["voltage_v"].as_f64().unwrap() > 120.0);
}

#[test]
fn solve_reads_standard_input() {
    let text = std::fs::read_to_string(data("alder-court.json")).unwrap();
    let out = tapline(&["solve", "-"], Some(&text));
    assert_eq!(out.status.code(), Some(0));
    assert_eq!(stdout_json(&out)["name"], "14 Alder Court");
}

#[test]
fn bad_fields_exit_2_with_one_line_per_problem_and_nothing_on_stdout() {
    let job = r#"{"version":1,"system":{"kind":"split-phase"},"loads":[
        {"connect":"L1-N","model":"resistive","watts":1500},
        {"connect":"L1-N","model":"resistive","watts":100},
        {"connect":"L3-N","model":"toaster","watts":-5}]}"#;
    let out = tapline(&["solve", "-"], Some(job));
    assert_eq!(out.status.code(), Some(2));
    assert!(out.stdout.is_empty());
    let err = String::from_utf8_lossy(&out.stderr);
    let lines: Vec<&str> = err.lines().collect();
    assert!(
        lines.iter().any(|l| l.starts_with("loads[2].connect: ")),
        "{err}"
    );
    assert!(
        lines.iter().any(|l| l.starts_with("loads[2].model: ")),
        "{err}"
    );
    assert!(
        lines
            .iter()
            .any(|l| l.starts_with("loads[2].watts: must be a number from 0.1 to")),
        "{err}"
    );
    assert_eq!(lines.len(), 3, "{err}");
    assert!(!err.contains("panicked"));
}

#[test]
fn each_class_of_bad_input_is_named() {
    let cases: &[(&str, &str)] = &[
        ("{not json", "job: not valid JSON"),
        ("[1,2]", "job: must be a JSON object"),
        (r#"{"loads":[]}"#, "system: is required"),
        (
            r#"{"system":{"kind":"delta"}}"#,
            "system.kind: must be split-phase or wye",
        ),
        (
            r#"{"system":{"kind":"split-phase","volts_to_neutral":"lots"}}"#,
            "system.volts_to_neutral: must be a number from 50 to 1000",
        ),
        (
            r#"{"version":7,"system":{"kind":"split-phase"}}"#,
            "version: job format 7 is newer",
        ),
        (
            r#"{"system":{"kind":"split-phase"},"neutral":{"state":"loose"}}"#,
            "neutral.ohms: is required",
        ),
        (
            r#"{"system":{"kind":"split-phase"},"neutral":{"state":"wobbly"}}"#,
            "neutral.state: must be intact, loose or open",
        ),
        (
            r#"{"system":{"kind":"split-phase"},"transformer":{"kva":25,"primary_v":7200}}"#,
            "transformer.impedance_pct: is required",
        ),
        (
            r#"{"system":{"kind":"split-phase"},"service":{"hot":{"material":"gold","size":"4/0","length_m":3}}}"#,
            "service.hot.material: must be cu or al",
        ),
        (
            r#"{"system":{"kind":"split-phase"},"service":{"hot":{"material":"al","size":"5/0","length_m":3}}}"#,
            "service.hot.size: \"5/0\" is not a known size",
        ),
        (
            r#"{"system":{"kind":"split-phase"},"service":{"hot":{"material":"al","size":"4/0"}}}"#,
            "service.hot.length_m: is required",
        ),
        (
            r#"{"system":{"kind":"split-phase"},"loads":[{"connect":"L1-N","model":"lamp","watts":60,"power_factor":0.5}]}"#,
            "loads[0].power_factor: a lamp load has power factor 1",
        ),
        (
            r#"{"system":{"kind":"split-phase"},"loads":[{"connect":"L1-N","model":"resistive","watts":1e9}]}"#,
            "loads[0].watts: must be a number from 0.1 to 1000000",
        ),
        (
            r#"{"version":1,"system":{"kind":"split-phase"},"loads":[{"connect":"L1-N","model":"resistive","wats":1500}]}"#,
            "loads[0].wats: unknown field (did you mean watts?)",
        ),
        (
            r#"{"version":1,"system":{"kind":"split-phase"},"neutral":{"state":"open","earth_ohms":25}}"#,
            "neutral.earth_ohms: unknown field (did you mean earth_return_ohms?)",
        ),
        (
            r#"{"version":1,"system":{"kind":"split-phase"},"transformer":{"kva":25,"primary_v":7200,"impedance_pct":2,"xr":3}}"#,
            "transformer.xr: unknown field (did you mean x_over_r?)",
        ),
        (
            r#"{"system":{"kind":"split-phase","volts_to_neutral":1e-300}}"#,
            "system.volts_to_neutral: must be a number from 50 to 1000",
        ),
        (
            r#"{"system":{"kind":"split-phase"},"loads":[{"connect":"L1-N","model":"resistive","watts":100,"rated_v":5e-324}]}"#,
            "loads[0].rated_v: must be a number from 60 to 240",
        ),
        (
            r#"{"system":{"kind":"split-phase"},"transformer":{"kva":25,"primary_v":4160,"impedance_pct":2,"connection":"delta-wye"}}"#,
            "transformer.connection: a split-phase service is fed by a single-phase",
        ),
        (
            r#"{"system":{"kind":"split-phase"},"loads":"none"}"#,
            "loads: must be a list of loads",
        ),
    ];
    for (job, expected) in cases {
        let out = tapline(&["solve", "-"], Some(job));
        assert_eq!(out.status.code(), Some(2), "{job}");
        assert!(out.stdout.is_empty(), "{job}");
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(
            err.contains(expected),
            "for {job}\nexpected {expected:?} in:\n{err}"
        );
    }
}

#[test]
fn missing_file_and_bad_usage_exit_2() {
    let out = tapline(&["solve", "/nonexistent/job.json"], None);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("/nonexistent/job.json: cannot read"));
    assert_eq!(tapline(&[], None).status.code(), Some(2));
    assert_eq!(tapline(&["frobnicate"], None).status.code(), Some(2));
    assert_eq!(
        tapline(&["sweep", "-", "--points", "2"], Some("{}"))
            .status
            .code(),
        Some(2)
    );
}

#[test]
fn sweep_prints_json_and_csv_from_solid_to_open() {
    let out = tapline(
        &["sweep", &data("alder-court.json"), "--points", "50"],
        None,
    );
    assert_eq!(out.status.code(), Some(0));
    let s = stdout_json(&out);
    let ohms = s["neutral_ohms"].as_array().unwrap();
    assert_eq!(ohms.len(), 50);
    assert_eq!(ohms[0], 0.0);
    assert!(ohms[49].is_null());
    let heater = s["loads"][0]["volts"].as_array().unwrap();
    assert!(heater[0].as_f64().unwrap() > heater[49].as_f64().unwrap());

    let out = tapline(
        &[
            "sweep",
            &data("alder-court.json"),
            "--csv",
            "--points",
            "10",
        ],
        None,
    );
    let csv = String::from_utf8(out.stdout).unwrap();
    let rows: Vec<&str> = csv.lines().collect();
    assert_eq!(rows[0], "neutral_ohms,Space heater,Freezer");
    assert_eq!(rows.len(), 11);
    assert!(rows[10].starts_with("open,"));
}

#[test]
fn whatif_library_and_demo() {
    let out = tapline(&["whatif", &data("alder-court.json")], None);
    assert_eq!(out.status.code(), Some(0));
    let w = stdout_json(&out);
    assert_eq!(w["intact"]["neutral"]["state"], "intact");
    assert_eq!(w["open"]["neutral"]["state"], "open");
    let lib = stdout_json(&tapline(&["library"], None));
    assert!(lib.as_array().unwrap().len() >= 15);
    let demo = tapline(&["demo"], None);
    let solved = tapline(
        &["solve", "-"],
        Some(&String::from_utf8(demo.stdout).unwrap()),
    );
    assert_eq!(solved.status.code(), Some(0));
}

#[test]
fn diagnose_prints_resistances_and_a_verdict() {
    let out = tapline(&["diagnose", &data("readings-loose.json")], None);
    assert_ok(&out);
    let d = stdout_json(&out);
    assert!(d["neutral_ohms"].as_f64().unwrap() > 0.1);
    assert!(d["hot_ohms"].as_f64().unwrap() > 0.0);
    assert_eq!(d["verdict"], "suspect");
    let bad = tapline(
        &["diagnose", "-"],
        Some(
            r#"{"system":{"kind":"split-phase"},"readings":[{"l1_n_v":120,"l2_n_v":120,"l1_a":-1,"l2_a":0}]}"#,
        ),
    );
    assert_eq!(bad.status.code(), Some(2));
    assert!(bad.stdout.is_empty());
    assert!(
        String::from_utf8_lossy(&bad.stderr).contains("readings[0].l1_a: must be a number from 0")
    );
}

/// A job file with dated sets of readings: each set diagnosed, the re-test compared with the
/// first. Hand check of the second set: the kettle adds 12.5 A to L1 and to the neutral, and L2
/// rises 0.4 V, so the neutral is about 0.4 / 12.5 = 0.032 Ω (Ohm's law).
#[test]
fn diagnose_takes_a_job_with_its_reading_sets() {
    let out = tapline(&["diagnose", &data("retest.json")], None);
    assert_ok(&out);
    let h = stdout_json(&out);
    let sets = h["sets"].as_array().unwrap();
    assert_eq!(sets.len(), 2);
    assert_eq!(sets[1]["taken"], "2026-12-02 09:40");
    let after = sets[1]["diagnosis"]["neutral_ohms"].as_f64().unwrap();
    assert!((after - 0.032).abs() < 0.002, "{after}");
    assert_eq!(sets[1]["diagnosis"]["verdict"], "healthy");
    assert!(h["comparison"].as_str().unwrap().contains("less"));
    let text = tapline(
        &["diagnose", &data("retest.json"), "--format", "text"],
        None,
    );
    assert!(String::from_utf8_lossy(&text.stdout).contains("Set 2 (2026-12-02 09:40)"));
    let none = tapline(
        &["diagnose", "-"],
        Some(r#"{"system":{"kind":"split-phase"},"loads":[]}"#),
    );
    assert_eq!(none.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&none.stderr).contains("readings: the job has no sets"));
}

/// A planned 11.5 kW, 240 V charger at 0.99 power factor draws about 11500 / (240 × 0.99) =
/// 48.4 A on each hot (a little less at the lowered voltage) and nothing in the neutral; on a
/// 25 kVA transformer (full load 25000 / 240 = 104 A) that is about 46 points more loading.
#[test]
fn plan_compares_the_job_as_found_with_its_planned_appliances() {
    let out = tapline(&["plan", &data("planned.json")], None);
    assert_ok(&out);
    let p = stdout_json(&out);
    assert_eq!(p["planned"][0], "EV charger (48 A)");
    let added = p["after"]["legs_a"]["L2"].as_f64().unwrap()
        - p["before"]["legs_a"]["L2"].as_f64().unwrap();
    assert!((45.0..48.5).contains(&added), "{added}");
    let neutral_change = p["after"]["neutral_current_a"].as_f64().unwrap()
        - p["before"]["neutral_current_a"].as_f64().unwrap();
    assert!(neutral_change.abs() < 0.5, "{neutral_change}");
    let loading = p["after"]["transformer_loading_pct"].as_f64().unwrap()
        - p["before"]["transformer_loading_pct"].as_f64().unwrap();
    assert!((43.0..47.0).contains(&loading), "{loading}");
    let text = tapline(&["plan", &data("planned.json"), "--format", "text"], None);
    assert!(String::from_utf8_lossy(&text.stdout).contains("(planned)"));
    let bad = tapline(
        &["plan", "-"],
        Some(
            r#"{"system":{"kind":"split-phase"},"loads":[{"connect":"L1-N","model":"resistive","watts":100,"planned":"yes"}]}"#,
        ),
    );
    assert_eq!(bad.status.code(), Some(2));
    assert!(
        String::from_utf8_lossy(&bad.stderr).contains("loads[0].planned"),
        "{}",
        String::from_utf8_lossy(&bad.stderr)
    );
}

#[test]
fn balance_prints_before_after_and_moves() {
    let out = tapline(&["balance", &data("panel.json")], None);
    assert_ok(&out);
    let b = stdout_json(&out);
    let before = b["before"]["neutral_current_a"].as_f64().unwrap();
    let after = b["after"]["neutral_current_a"].as_f64().unwrap();
    assert!(after < before, "{after} vs {before}");
    let moves = b["moves"].as_array().unwrap();
    assert!(!moves.is_empty());
    for m in moves {
        assert!(m["circuit"].is_string() && m["from"].is_string() && m["to"].is_string());
    }
    assert_eq!(
        tapline(&["balance", &data("panel.json"), "--flipped"], None)
            .status
            .code(),
        Some(0)
    );
}

#[test]
fn every_command_has_help_and_the_program_a_version() {
    let out = tapline(&["--help"], None);
    assert_eq!(out.status.code(), Some(0));
    let help = String::from_utf8_lossy(&out.stdout);
    for c in [
        "solve", "whatif", "sweep", "diagnose", "balance", "library", "demo",
    ] {
        assert!(help.contains(c), "{c} missing from\n{help}");
    }
    assert!(help.contains("CAUTION"), "{help}");
    for c in ["solve", "whatif", "sweep", "diagnose", "balance"] {
        let out = tapline(&[c, "--help"], None);
        assert_eq!(out.status.code(), Some(0), "{c}");
        let text = String::from_utf8_lossy(&out.stdout);
        assert!(text.contains("Usage: tapline"), "{c}: {text}");
        assert!(text.contains("verify every figure with a meter"), "{c}");
    }
    let out = tapline(&["--version"], None);
    assert_eq!(out.status.code(), Some(0));
    assert!(String::from_utf8_lossy(&out.stdout).starts_with("tapline "));
}

#[test]
fn an_unknown_option_is_an_error_naming_it() {
    let out = tapline(&["solve", "--bogus", &data("alder-court.json")], None);
    assert_eq!(out.status.code(), Some(2));
    assert!(out.stdout.is_empty());
    assert!(String::from_utf8_lossy(&out.stderr).contains("--bogus"));
}

#[test]
fn text_format_is_a_summary_with_the_cautions() {
    let out = tapline(
        &["solve", "--format", "text", &data("alder-court.json")],
        None,
    );
    assert_eq!(out.status.code(), Some(0));
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("Appliances:"), "{text}");
    assert!(text.contains("Space heater"), "{text}");
    assert!(text.contains("CAUTION: electrical work can kill"), "{text}");
    assert!(text.contains("authority having jurisdiction"), "{text}");
}

/// Several files, or a stream of one job per line, give one result per input tagged with it; the
/// exit code is the worst of them.
#[test]
fn bulk_checks_tag_each_result_with_its_input() {
    let good = data("alder-court.json");
    let out = tapline(&["solve", &good, "/nonexistent/job.json"], None);
    assert_eq!(out.status.code(), Some(2));
    let lines: Vec<serde_json::Value> = String::from_utf8_lossy(&out.stdout)
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    assert_eq!(lines.len(), 2);
    assert_eq!(lines[0]["input"], good.as_str());
    assert_eq!(lines[0]["exit"], 0);
    assert!(lines[0]["result"]["loads"].is_array());
    assert_eq!(lines[1]["exit"], 2);
    assert!(lines[1]["problems"][0]
        .as_str()
        .unwrap()
        .contains("cannot read"));

    let stream = concat!(
        r#"{"system":{"kind":"split-phase"},"loads":[{"connect":"L1-N","model":"resistive","watts":1500}]}"#,
        "\n",
        r#"{"system":{"kind":"split-phase"},"loads":[{"connect":"L1-N","model":"resistive","wats":1500}]}"#,
        "\n"
    );
    let out = tapline(&["solve", "--lines", "-"], Some(stream));
    assert_eq!(out.status.code(), Some(2));
    let lines: Vec<serde_json::Value> = String::from_utf8_lossy(&out.stdout)
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    assert_eq!(lines[0]["input"], "standard input:1");
    assert_eq!(lines[0]["exit"], 0);
    assert_eq!(lines[1]["input"], "standard input:2");
    let problems: Vec<&str> = lines[1]["problems"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(|p| p.as_str())
        .collect();
    assert!(
        problems
            .iter()
            .any(|p| p.contains("loads[0].wats: unknown field (did you mean watts?)")),
        "{problems:?}"
    );
}

#[test]
fn start_reports_the_dip_and_names_a_bad_load() {
    let out = tapline(
        &["start", "--load", "Freezer", &data("alder-court.json")],
        None,
    );
    assert_ok(&out);
    let r = stdout_json(&out);
    assert!(r["locked_rotor_a"].as_f64().unwrap() > 0.0);
    assert!(r["appliances"]
        .as_array()
        .unwrap()
        .iter()
        .all(|a| a["dip_pct"].is_number()));
    let out = tapline(
        &["start", "--load", "Nope", &data("alder-court.json")],
        None,
    );
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr)
        .contains("--load: the job has no appliance named \"Nope\""));
    let out = tapline(
        &["start", "--load", "Space heater", &data("alder-court.json")],
        None,
    );
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("is not a motor"));
}

#[test]
fn balance_can_count_only_what_runs() {
    let out = tapline(&["balance", "--running-only", &data("panel.json")], None);
    assert_eq!(out.status.code(), Some(0));
    assert_eq!(stdout_json(&out)["basis"], "running");
}

#[test]
fn size_prints_the_table_and_names_bad_fields() {
    let good = r#"{"version":1,"system":{"kind":"split-phase"},"run":{"connect":"L1-N","amps":16,"length_ft":100}}"#;
    let out = tapline(&["size", "-"], Some(good));
    assert_ok(&out);
    assert_eq!(stdout_json(&out)["smallest"], "8 AWG");
    let bad = r#"{"version":1,"system":{"kind":"split-phase"},"run":{"connect":"L1-N","amp":16,"length_ft":100}}"#;
    let out = tapline(&["size", "-"], Some(bad));
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("run.amp: unknown field (did you mean amps?)"),
        "{err}"
    );
    assert!(err.contains("run.amps: is required (or watts)"), "{err}");
}
