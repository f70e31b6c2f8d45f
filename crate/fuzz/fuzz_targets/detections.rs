//! Detections files in any of the three layouts: read, and what was read written and read again
//! to the same rows.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::detections::{read_detections, to_file_text};

fuzz_target!(|data: &[u8]| {
    let Ok(report) = read_detections(data) else { return };
    // A file whose every row was passed over reads as no detections: nothing to write back.
    if report.detections.rows.is_empty() {
        return;
    }
    let text = to_file_text(&report.detections);
    let again = read_detections(text.as_bytes()).expect("written detections read back");
    assert_eq!(again.detections.rows.len(), report.detections.rows.len());
});
