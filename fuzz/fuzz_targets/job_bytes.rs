//! Any bytes as a job: parse, validate, solve; and the job round trip (parse → write → parse is
//! equal). Never a panic; a report holds only finite numbers.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Ok(file) = tapline_core::job::parse_job(text) {
        let again = tapline_core::job::parse_job(&tapline_core::job::job_to_json(&file))
            .expect("a written job parses");
        assert_eq!(file, again, "round trip");
    }
    if let Ok(report) = tapline_core::solve_text(text) {
        tapline_fuzz::assert_documented(&serde_json::to_value(&report).unwrap(), "");
    }
});
