//! Valid-shaped readings with extreme numbers: the diagnosis answers with finite figures or a
//! named problem, never a panic.
#![no_main]
use arbitrary::Unstructured;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let mut u = Unstructured::new(data);
    let Ok(value) = tapline_fuzz::readings(&mut u) else {
        return;
    };
    if let Ok(r) = tapline_core::tools::diagnose::parse_readings(&value.to_string()) {
        if let Ok(d) = tapline_core::tools::diagnose::diagnose(&r) {
            tapline_fuzz::assert_documented(&serde_json::to_value(&d).unwrap(), "");
        }
    }
});
