//! SORT (Bewley et al. 2016): Kalman prediction of every live track, then one optimal assignment
//! of tracks to detections on IoU.

use super::{matching, MethodDef};
use crate::track::TrackerConfig;

pub(super) const DEF: MethodDef = MethodDef {
    name: "sort",
    label: "SORT (Kalman filter)",
    summary: "Kalman prediction + Hungarian assignment on IoU (Bewley et al. 2016)",
    motion: true,
    needs_embeddings: false,
    defaults,
    associate: matching::single_stage,
    search_max_age: &[5, 30, 60],
    search_max_cosine_distance: &[0.2],
};

fn defaults(base: TrackerConfig) -> TrackerConfig {
    base
}
