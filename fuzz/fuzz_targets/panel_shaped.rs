//! Panels of many circuits, often identical, with shared neutrals: balancing never makes the
//! neutral worse (unless it must move a shared neutral's hots apart, which comes first), never
//! puts a shared neutral's hots on one leg, and always finishes (the fuzzer's time limit per
//! input catches a search that does not); each move's new position is on its new leg, and no
//! two breakers are sent to one position.
#![no_main]
use libfuzzer_sys::fuzz_target;
use tapline_core::tools::balance::{balance, schedule, Layout};

fuzz_target!(|data: &[u8]| {
    let Some((value, job)) = tapline_fuzz::valid_job(data) else {
        return;
    };
    let b = balance(&job, Layout::Standard);
    if !b.separates_shared_neutral {
        assert!(
            b.after.neutral_current_a <= b.before.neutral_current_a + 1e-9,
            "worse: {} -> {} for {value}",
            b.before.neutral_current_a,
            b.after.neutral_current_a
        );
    }
    tapline_fuzz::assert_documented(&serde_json::to_value(&b).unwrap(), "");
    // When no two breakers share a position and every position agrees with the layout (a swap
    // takes its partner's position, on the partner's leg as the job connects it), every breaker
    // that moves goes to a position of its own on its new leg.
    let rows = schedule(&job, Layout::Standard);
    tapline_fuzz::assert_documented(&serde_json::to_value(&rows).unwrap(), "");
    let mut used: Vec<u32> = rows.iter().flat_map(|r| r.positions.clone()).collect();
    let count = used.len();
    used.sort_unstable();
    used.dedup();
    if used.len() != count || rows.iter().any(|r| r.mismatch.is_some()) {
        return;
    }
    let legs = job.system().legs();
    let mut targets: Vec<u32> = Vec::new();
    for m in &b.moves {
        if let Some(p) = m.to_slot {
            assert_eq!(
                Layout::Standard.leg_of_slot(p, legs).name(),
                m.to,
                "{value}"
            );
            targets.push(p);
        }
    }
    let n = targets.len();
    targets.sort_unstable();
    targets.dedup();
    assert_eq!(
        targets.len(),
        n,
        "two breakers sent to one position: {value}"
    );
});
