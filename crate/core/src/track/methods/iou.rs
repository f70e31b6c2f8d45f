//! IoU chaining of detections frame to frame (Bochinski, Eiselein and Sikora 2017), with no motion
//! model: a track is expected where its last detection was.

use super::{matching, MethodDef};
use crate::track::TrackerConfig;

pub(super) const DEF: MethodDef = MethodDef {
    name: "iou",
    label: "IoU matching",
    summary: "IoU chaining of detections frame to frame (Bochinski et al. 2017), no motion model",
    motion: false,
    needs_embeddings: false,
    defaults,
    associate: matching::single_stage,
    search_max_age: &[0, 2, 5],
    search_max_cosine_distance: &[0.2],
};

/// σ_l = 0.3, σ_h = 0.5, σ_IoU = 0.5 and a minimum length, as in the IoU tracker paper's setting for
/// good detectors; a short gap is allowed since simulated and real detectors miss.
fn defaults(base: TrackerConfig) -> TrackerConfig {
    TrackerConfig {
        min_iou: 0.5,
        confirm_score: 0.5,
        max_age: 2,
        ..base
    }
}
