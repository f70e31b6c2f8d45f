//! Manual count files (the counts CSV layout) and reports read back for comparison.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::accuracy::{compare, read_counts_csv, report_rows};

fuzz_target!(|data: &[u8]| {
    if let Ok(rows) = read_counts_csv(data) {
        let _ = compare(&rows, &rows);
    }
    if let Ok(value) = serde_json::from_slice::<serde_json::Value>(data) {
        let _ = report_rows(&value);
    }
    if let Ok(text) = std::str::from_utf8(data) {
        let _ = throughline_core::report::Report::from_json(text);
    }
});
