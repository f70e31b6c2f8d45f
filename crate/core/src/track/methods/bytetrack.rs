//! ByteTrack (Zhang et al. 2022): two-stage association that keeps low-score boxes for tracks
//! already being followed.

use super::matching::match_iou;
use super::{Association, MethodDef};
use crate::detections::{Detection, Detections};
use crate::track::tracker::Tracker;
use crate::track::TrackerConfig;

pub(super) const DEF: MethodDef = MethodDef {
    name: "bytetrack",
    label: "ByteTrack (low-score boxes too)",
    summary:
        "two-stage association: high-score boxes first, then low-score ones (Zhang et al. 2022)",
    motion: true,
    needs_embeddings: false,
    defaults,
    associate,
    search_max_age: &[5, 30, 60],
    search_max_cosine_distance: &[0.2],
};

/// ByteTrack keeps low-score boxes for its second stage.
fn defaults(base: TrackerConfig) -> TrackerConfig {
    TrackerConfig {
        min_score: 0.1,
        min_iou: 0.2,
        min_hits: 2,
        ..base
    }
}

/// ByteTrack: high-score detections against confirmed tracks, then low-score detections against the
/// confirmed tracks still visible last frame, then the remaining high-score detections against
/// tentative tracks. Only high-score detections above `new_track_score` start tracks.
fn associate(tracker: &Tracker, dets: &[Detection], _: &Detections) -> Association {
    let c = &tracker.config;
    let high: Vec<usize> = (0..dets.len())
        .filter(|&d| dets[d].score >= c.high_score)
        .collect();
    let low: Vec<usize> = (0..dets.len())
        .filter(|&d| dets[d].score >= c.min_score && dets[d].score < c.high_score)
        .collect();
    let confirmed: Vec<usize> = (0..tracker.live.len())
        .filter(|&t| tracker.live[t].is_confirmed())
        .collect();
    let tentative: Vec<usize> = (0..tracker.live.len())
        .filter(|&t| !tracker.live[t].is_confirmed())
        .collect();

    let (mut matches, left_tracks, left_high) =
        match_iou(tracker, &confirmed, &high, dets, c.min_iou, None);
    // The second stage only tries tracks that were seen in the previous frame (ByteTrack's "tracked"
    // state); tracks already coasting wait for a high-score box.
    let visible: Vec<usize> = left_tracks
        .into_iter()
        .filter(|&t| tracker.live[t].unseen == 0)
        .collect();
    let (second, _, _) = match_iou(tracker, &visible, &low, dets, c.low_min_iou, None);
    matches.extend(second);
    let (third, _, left_high) = match_iou(tracker, &tentative, &left_high, dets, c.min_iou, None);
    matches.extend(third);
    let new_tracks = left_high
        .into_iter()
        .filter(|&d| dets[d].score >= c.new_track_score)
        .collect();
    Association {
        matches,
        new_tracks,
    }
}
