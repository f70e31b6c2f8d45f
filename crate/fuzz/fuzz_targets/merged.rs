//! Merged counts files (`throughline batch`'s SITE_merged-counts.csv), read and laid out as the
//! page's grid for each camera and class.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::report::read_merged_counts;

fuzz_target!(|data: &[u8]| {
    if let Ok(m) = read_merged_counts(data) {
        let g = m.grid("", "");
        for camera in g.cameras.iter().take(3) {
            for class in g.classes.iter().take(3) {
                let _ = m.grid(camera, class);
            }
        }
    }
});
