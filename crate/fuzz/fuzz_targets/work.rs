//! Project files and edits files: read, and their edits applied to a small fixed set of tracks.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::pipeline::{self, Work};
use throughline_core::plan::Plan;
use throughline_core::project::{edits_from_json, Project};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let work = match Project::from_json(text) {
        Ok(p) => Work::of_project(&p),
        Err(_) => match edits_from_json(text) {
            Ok(edits) => Work::edits(edits),
            Err(_) => return,
        },
    };
    let plan = Plan::from_json(r#"{"frame_rate": 10, "screenlines": [{"name": "l", "points": [[0, 60], [200, 60]]}]}"#).unwrap();
    let tracks = throughline_core::track::files::boxes_to_tracks(
        &throughline_core::track::files::read_benchmark_boxes(
            b"1,1,10,10,20,40\n2,1,14,20,20,40\n3,1,18,30,20,40\n8,2,22,40,20,40\n9,2,22,50,20,40\n",
        )
        .unwrap(),
    );
    let _ = pipeline::count(&tracks, &plan, None, &work);
});
