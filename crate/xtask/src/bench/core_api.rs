//! What the benchmarks take from the library crates, in one place: when code moves between
//! crates, only these lines change.

pub use throughline_core::count::count;
pub use throughline_core::detections::{read_detections, Detection};
pub use throughline_core::geometry::{iou, BBox};
pub use throughline_core::plan::Plan;
pub use throughline_core::track::assign::{maximise_edges, Edge};
pub use throughline_core::track::files::{
    boxes_to_tracks, from_json, read_benchmark_boxes, tracks_to_boxes, IdBox,
};
pub use throughline_core::track::Tracks;
pub use throughline_eval::events::{match_crossings, tally, Crossing, EventTally, Window};
pub use throughline_eval::tracking_metrics::score;
