//! The sizing form: what a person sets for one run (length, material, ampacity column, target
//! drop), turned into the sizing tool's input with the load the engine says the run carries.

use super::{conductor_text, length_text, number_from_text, Run, Units};
use tapline_core::job::{JobFile, Raw};
use tapline_core::tools::size::{RunFields, RunFile, RunLoad};

/// The sizing form as typed.
#[derive(Clone, Debug, PartialEq)]
pub struct SizingForm {
    pub length: String,
    /// `cu` or `al`.
    pub material: String,
    /// `60`, `75` or `90`.
    pub column: String,
    /// Percent of the circuit's voltage.
    pub target: String,
}

/// The form as it opens: the run's length and material from the job, the 75 °C column, and the
/// NEC informational notes' targets (3 % for a branch, 5 % for the service with its branches).
pub fn form_for(job: &JobFile, run: Run, units: Units) -> SizingForm {
    let material = conductor_text(job, run, super::ConductorField::Material);
    SizingForm {
        length: length_text(job, run, units),
        material: if material.is_empty() {
            "cu".to_string()
        } else {
            material
        },
        column: "75".to_string(),
        target: match run {
            Run::Branch(_) => "3",
            _ => "5",
        }
        .to_string(),
    }
}

/// The sizing tool's input for the run: the form, the job's system and the load it carries
/// (`connect` is the load's connection for a branch; the service is sized hot and neutral).
pub fn run_file(
    job: &JobFile,
    run: Run,
    form: &SizingForm,
    load: RunLoad,
    connect: &str,
    units: Units,
    metric: bool,
) -> RunFile {
    let length = number_from_text(&form.length);
    let (length_ft, length_m) = match units {
        Units::Feet => (length, Raw::Absent),
        Units::Metres => (Raw::Absent, length),
    };
    RunFile {
        version: Raw::Given(1),
        system: job.system.clone(),
        run: Raw::Given(RunFields {
            kind: Raw::Given(match run {
                Run::Branch(_) => "branch".to_string(),
                _ => "service".to_string(),
            }),
            connect: Raw::Given(connect.to_string()),
            amps: Raw::Given(load.amps),
            power_factor: Raw::Given(load.power_factor),
            length_ft,
            length_m,
            material: Raw::Given(form.material.clone()),
            column_c: number_from_text(&form.column),
            target_pct: number_from_text(&form.target),
            neutral_amps: load.neutral_amps.map(Raw::Given).unwrap_or(Raw::Absent),
            units: Raw::Given(if metric { "metric" } else { "awg" }.to_string()),
            ..RunFields::default()
        }),
        unknown: Default::default(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::edit::{add_custom, new_job, set_conductor_present, set_length};
    use tapline_core::tools::size::{size, validate_run};

    /// Source: NEC Chapter 9 Table 9, uncoated copper in PVC conduit, ohms to neutral per 1000 ft
    /// (read: 12 AWG 2.0, 10 AWG 1.2, 8 AWG 0.78) and VD ≈ 2·I·R·L for a two-wire run at unity
    /// power factor (IEEE Std 141): 16 A over 100 ft drops 2 × 16 × 0.2 = 6.4 V (5.3 % of 120 V)
    /// on 12 AWG, 3.84 V (3.2 %) on 10 AWG and 2.50 V (2.1 %) on 8 AWG, so 8 AWG is the smallest
    /// within 3 %.
    #[test]
    fn a_branch_run_is_sized_from_the_form_and_the_engine_load() {
        let mut job = new_job("Test");
        add_custom(&mut job);
        set_conductor_present(&mut job, Run::Branch(0), true);
        set_length(&mut job, Run::Branch(0), "100", Units::Feet);
        let form = form_for(&job, Run::Branch(0), Units::Feet);
        assert_eq!(
            (form.length.as_str(), form.material.as_str()),
            ("100", "cu")
        );
        let load = RunLoad {
            amps: 16.0,
            power_factor: 1.0,
            neutral_amps: None,
        };
        let file = run_file(
            &job,
            Run::Branch(0),
            &form,
            load,
            "L1-N",
            Units::Feet,
            false,
        );
        let sizing = size(&validate_run(&file).unwrap());
        let drop = |code: &str| {
            let c = sizing.candidates.iter().find(|c| c.code == code).unwrap();
            (c.drop_v, c.meets_drop)
        };
        let close = |a: f64, b: f64| assert!((a - b).abs() < 0.05, "{a} vs {b}");
        close(drop("12").0, 6.4);
        close(drop("10").0, 3.84);
        close(drop("8").0, 2.50);
        assert_eq!(
            (drop("12").1, drop("10").1, drop("8").1),
            (false, false, true)
        );
        assert_eq!(sizing.smallest.as_deref(), Some("8 AWG"));
        // A bad length is named by the sizing tool's own path.
        let bad = SizingForm {
            length: "far".into(),
            ..form
        };
        let problems = validate_run(&run_file(
            &job,
            Run::Branch(0),
            &bad,
            load,
            "L1-N",
            Units::Feet,
            false,
        ))
        .unwrap_err();
        assert_eq!(problems[0].path, "run.length_ft");
    }
}
