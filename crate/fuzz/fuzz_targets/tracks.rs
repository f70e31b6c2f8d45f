//! Tracks files: the JSON tracks document and benchmark text; what reads is counted with a plan.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::plan::Plan;
use throughline_core::track::files::{boxes_to_tracks, from_json, read_benchmark_boxes};

const PLAN: &str = r#"{"frame_rate": 25, "screenlines": [{"name": "l", "points": [[0, 100], [640, 100]]}],
    "zones": [{"name": "z", "polygon": [[0, 0], [100, 0], [100, 100], [0, 100]]}]}"#;

fuzz_target!(|data: &[u8]| {
    let plan = Plan::from_json(PLAN).expect("the plan is valid");
    let tracks = match from_json(data) {
        Ok(t) => Some(t),
        Err(_) => read_benchmark_boxes(data).ok().map(|b| boxes_to_tracks(&b)),
    };
    if let Some(t) = tracks {
        let _ = throughline_core::count::count(&t, &plan, None);
    }
});
