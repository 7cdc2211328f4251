//! Panels of many circuits, often identical, with shared neutrals: balancing never makes the
//! neutral worse (unless it must move a shared neutral's hots apart, which comes first), never
//! puts a shared neutral's hots on one leg, and always finishes (the fuzzer's time limit per
//! input catches a search that does not).
#![no_main]
use libfuzzer_sys::fuzz_target;
use tapline_core::tools::balance::{balance, Layout};

fuzz_target!(|data: &[u8]| {
    let Some((value, job)) = tapline_fuzz::valid_job(data) else {
        return;
    };
    let b = balance(&job, Layout::Standard);
    let must_separate = b
        .notes
        .iter()
        .any(|n| n.contains("it is moved so its hots are on different legs"));
    if !must_separate {
        assert!(
            b.after.neutral_current_a <= b.before.neutral_current_a + 1e-9,
            "worse: {} -> {} for {value}",
            b.before.neutral_current_a,
            b.after.neutral_current_a
        );
    }
    tapline_fuzz::assert_documented(&serde_json::to_value(&b).unwrap(), "");
});
