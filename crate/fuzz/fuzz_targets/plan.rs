//! Counting plans: checked, and a valid one used to count a small fixed set of tracks.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::plan::Plan;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    if let Ok(plan) = Plan::from_json(text) {
        let tracks = throughline_core::track::files::boxes_to_tracks(
            &throughline_core::track::files::read_benchmark_boxes(
                b"1,1,10,10,20,40\n2,1,14,30,20,40\n3,1,18,50,20,40\n4,1,22,70,20,40\n",
            )
            .expect("fixed tracks"),
        );
        let _ = throughline_core::count::count(&tracks, &plan, None);
    }
});
