//! Valid-shaped jobs with extreme numbers through every entry point: solve, what-if, sweep,
//! motor start and the diagnosis of the job's reading sets. The same job gives the same verdict
//! through solve and through the what-if's matching state, and the same report solved after
//! every input before it as on a fresh thread; every answer holds only finite numbers or
//! documented nulls.
#![no_main]
use libfuzzer_sys::fuzz_target;
use tapline_core::validate::NeutralState;

fuzz_target!(|data: &[u8]| {
    let Some((value, job)) = tapline_fuzz::valid_job(data) else {
        return;
    };
    let file = tapline_core::job::parse_job(&value.to_string()).unwrap();
    let history = tapline_core::tools::diagnose::history(&job, &file);
    tapline_fuzz::assert_documented(&serde_json::to_value(&history).unwrap(), "");
    let solved = tapline_core::report::analyze(&job);
    if let Ok(r) = &solved {
        tapline_fuzz::assert_documented(&serde_json::to_value(r).unwrap(), "");
    }
    // The solver keeps its buffers from one solve to the next on a thread (every input before
    // this one was solved in them): the report must be exactly the one a fresh thread gives.
    let alone = {
        let job = job.clone();
        std::thread::spawn(move || format!("{:?}", tapline_core::report::analyze(&job)))
            .join()
            .unwrap()
    };
    assert_eq!(
        format!("{solved:?}"),
        alone,
        "a solve depends on the one before it"
    );
    if let Ok(w) = tapline_core::whatif::what_if(&job) {
        tapline_fuzz::assert_documented(&serde_json::to_value(&w).unwrap(), "");
        if let (Ok(r), NeutralState::Intact) = (&solved, job.neutral()) {
            assert_eq!(
                r.worst_outcome, w.intact.worst_outcome,
                "solve and what-if disagree"
            );
        }
    }
    if let Ok(s) = tapline_core::whatif::sweep(&job, &tapline_core::whatif::sweep_points(5)) {
        tapline_fuzz::assert_documented(&serde_json::to_value(&s).unwrap(), "");
    }
    if let Some(motor) = job
        .loads()
        .iter()
        .find(|l| l.model() == tapline_core::loads::Model::Motor)
    {
        if let Ok(s) = tapline_core::tools::start::start(&job, motor.name(), 4.0) {
            tapline_fuzz::assert_documented(&serde_json::to_value(&s).unwrap(), "");
        }
    }
});
