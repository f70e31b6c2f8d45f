//! Matching steps shared by the methods: the gated optimal assignment on IoU between lists of live
//! tracks and detections, and the one-stage association of IoU chaining and SORT.

use super::{Association, Match};
use crate::detections::{Detection, Detections};
use crate::limits::MAX_CANDIDATES;
use crate::track::assign::{assign_edges, Edge};
use crate::track::tracker::Tracker;

/// Matches `tracks` to `dets` (both lists of indices) on 1 − IoU with a least IoU; returns the
/// matches and the tracks and detections left over, in their original order.
pub(super) fn match_iou(
    tracker: &Tracker,
    tracks: &[usize],
    dets: &[usize],
    all: &[Detection],
    min_iou: f64,
) -> (Vec<Match>, Vec<usize>, Vec<usize>) {
    // Only boxes that overlap can have a positive IoU: with detections sorted by their left edge,
    // each track looks only at those starting left of its right edge.
    let mut by_left: Vec<(f64, usize)> = dets
        .iter()
        .enumerate()
        .map(|(k, &d)| (all[d].bbox.x, k))
        .collect();
    by_left.sort_by(|a, b| a.0.total_cmp(&b.0));
    let widest = dets.iter().map(|&d| all[d].bbox.w).fold(0.0, f64::max);
    let gate = 1.0 - min_iou;
    let mut edges = Vec::new();
    let mut mine = Vec::new();
    for (r, &t) in tracks.iter().enumerate() {
        let tb = tracker.predicted_box(t);
        let start = by_left.partition_point(|&(x, _)| x + widest <= tb.x);
        let end = by_left.partition_point(|&(x, _)| x < tb.x + tb.w);
        mine.clear();
        for &(_, c) in &by_left[start..end.max(start)] {
            let iou = tb.iou(&all[dets[c]].bbox);
            if iou > 0.0 && 1.0 - iou <= gate {
                mine.push(Edge {
                    row: r,
                    col: c,
                    cost: 1.0 - iou,
                });
            }
        }
        keep_best(&mut mine);
        edges.extend_from_slice(&mine);
    }
    let found = assign_edges(tracks.len(), dets.len(), &edges, gate);
    tracker.note_crowd(found.greedy);
    split(found.pairs, tracks, dets)
}

/// A track's candidates cut to the [`MAX_CANDIDATES`] cheapest (ties by column), so that a crowd
/// of boxes all overlapping each other costs memory linear in the boxes.
pub(super) fn keep_best(candidates: &mut Vec<Edge>) {
    if candidates.len() > MAX_CANDIDATES {
        candidates.sort_by(|a, b| a.cost.total_cmp(&b.cost).then(a.col.cmp(&b.col)));
        candidates.truncate(MAX_CANDIDATES);
    }
}

/// Turns assignment pairs over sub-lists into matches plus what is left of each list.
pub(super) fn split(
    pairs: Vec<(usize, usize)>,
    tracks: &[usize],
    dets: &[usize],
) -> (Vec<Match>, Vec<usize>, Vec<usize>) {
    let mut track_used = vec![false; tracks.len()];
    let mut det_used = vec![false; dets.len()];
    let matches = pairs
        .into_iter()
        .map(|(r, c)| {
            track_used[r] = true;
            det_used[c] = true;
            Match {
                track: tracks[r],
                det: dets[c],
            }
        })
        .collect();
    let left_tracks = keep_unused(tracks, &track_used);
    let left_dets = keep_unused(dets, &det_used);
    (matches, left_tracks, left_dets)
}

fn keep_unused(items: &[usize], used: &[bool]) -> Vec<usize> {
    items
        .iter()
        .zip(used)
        .filter(|(_, &u)| !u)
        .map(|(&i, _)| i)
        .collect()
}

/// IoU chaining and SORT: one assignment of all live tracks to detections above `min_score`.
pub(super) fn single_stage(tracker: &Tracker, dets: &[Detection], _: &Detections) -> Association {
    let c = &tracker.config;
    let usable: Vec<usize> = (0..dets.len())
        .filter(|&d| dets[d].score >= c.min_score)
        .collect();
    let tracks: Vec<usize> = (0..tracker.live.len()).collect();
    let (matches, _, new_tracks) = match_iou(tracker, &tracks, &usable, dets, c.min_iou);
    Association {
        matches,
        new_tracks,
    }
}
