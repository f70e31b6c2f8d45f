//! Detections files in any of the three layouts: read, and what was read written and read again
//! to the same rows. For benchmark text and CSV, the same file with a space before every line
//! (which the quick reading of usual lines never takes, and the general reading trims away)
//! reads the same.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::detections::{read_detections, to_file_text};

fuzz_target!(|data: &[u8]| {
    check_quick_reading(data);
    let Ok(report) = read_detections(data) else { return };
    // A file whose every row was passed over reads as no detections: nothing to write back.
    if report.detections.rows.is_empty() {
        return;
    }
    let text = to_file_text(&report.detections);
    let again = read_detections(text.as_bytes()).expect("written detections read back");
    assert_eq!(again.detections.rows.len(), report.detections.rows.len());
});

/// The file as it is and with a space before every line give the same reading (JSON aside: its
/// errors name characters, which the spaces move; short files only, so that the spaces cannot
/// move a NUL byte out of the first 64 KiB the binary check looks at).
fn check_quick_reading(data: &[u8]) {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let body = text.strip_prefix('\u{feff}').unwrap_or(text);
    let first = body.trim_start().chars().next();
    if data.len() > 32 << 10 || matches!(first, Some('[' | '{')) {
        return;
    }
    let bom = &text[..text.len() - body.len()];
    let spaced: String = body.split_inclusive('\n').map(|l| format!(" {l}")).collect();
    let quick = read_detections(data);
    let general = read_detections(format!("{bom}{spaced}").as_bytes());
    match (quick, general) {
        (Ok(a), Ok(b)) => assert_eq!(a, b),
        (Err(a), Err(b)) => assert_eq!(a, b),
        (a, b) => panic!("quick {a:?}, general {b:?}"),
    }
}
