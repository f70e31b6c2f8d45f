//! Matching steps shared by the methods: the gated optimal assignment on IoU between lists of live
//! tracks and detections, and the one-stage association of IoU chaining and SORT.

use super::{Association, Match};
use crate::detections::{Detection, Detections};
use crate::limits::MAX_CANDIDATES;
use crate::track::assign::{assign_edges_reusing, Edge};
use crate::track::tracker::{Reuse, Tracker};

/// Matches `tracks` to `dets` (both lists of indices) on 1 − IoU with a least IoU; returns the
/// matches and the tracks and detections left over, in their original order. With `max_cosine`
/// (methods that compare appearance), a track with appearance vectors is not matched to a
/// detection whose vector is further than that from all of them.
pub(super) fn match_iou(
    tracker: &Tracker,
    tracks: &[usize],
    dets: &[usize],
    all: &[Detection],
    min_iou: f64,
    max_cosine: Option<f64>,
) -> (Vec<Match>, Vec<usize>, Vec<usize>) {
    let mut reuse = tracker.reuse.borrow_mut();
    let Reuse {
        boxes,
        index,
        edges,
        mine,
        near,
        assign,
        used,
    } = &mut *reuse;
    boxes.clear();
    boxes.extend(dets.iter().map(|&d| all[d].bbox));
    index.refill(boxes);
    let gate = 1.0 - min_iou;
    edges.clear();
    for (r, &t) in tracks.iter().enumerate() {
        let tb = tracker.predicted_box(t);
        index.near(&tb, near);
        mine.clear();
        for &c in near.iter() {
            let iou = tb.iou(&boxes[c]);
            // With appearance: a box that does not look like the track is not its match,
            // however well it overlaps (one person walking into another's place). Measured
            // only for the pairs the overlap lets through.
            let unlike = || {
                max_cosine.is_some_and(|most| {
                    let g = &tracker.live[t].gallery;
                    tracker
                        .units
                        .get(dets[c])
                        .is_some_and(|e| !g.is_empty() && g.distance(e) > most)
                })
            };
            if iou > 0.0 && 1.0 - iou <= gate && !unlike() {
                mine.push(Edge {
                    row: r,
                    col: c,
                    cost: 1.0 - iou,
                });
            }
        }
        keep_best(mine);
        edges.extend_from_slice(mine);
    }
    let greedy = assign_edges_reusing(tracks.len(), dets.len(), edges, gate, assign);
    tracker.note_crowd(greedy);
    split_reusing(&assign.pairs, tracks, dets, used)
}

/// A track's candidates cut to the [`MAX_CANDIDATES`] cheapest (ties by column), so that a crowd
/// of boxes all overlapping each other costs memory linear in the boxes. The cut is a selection,
/// in time linear in the candidates; only the kept ones are sorted.
pub(super) fn keep_best(candidates: &mut Vec<Edge>) {
    if candidates.len() > MAX_CANDIDATES {
        let order = |a: &Edge, b: &Edge| a.cost.total_cmp(&b.cost).then(a.col.cmp(&b.col));
        candidates.select_nth_unstable_by(MAX_CANDIDATES - 1, order);
        candidates.truncate(MAX_CANDIDATES);
        candidates.sort_by(order);
    }
}

/// Turns assignment pairs over sub-lists into matches plus what is left of each list.
pub(super) fn split(
    pairs: &[(usize, usize)],
    tracks: &[usize],
    dets: &[usize],
) -> (Vec<Match>, Vec<usize>, Vec<usize>) {
    split_reusing(pairs, tracks, dets, &mut Vec::new())
}

/// [`split`], marking what is used in `used`'s memory (the tracks' marks, then the detections').
fn split_reusing(
    pairs: &[(usize, usize)],
    tracks: &[usize],
    dets: &[usize],
    used: &mut Vec<bool>,
) -> (Vec<Match>, Vec<usize>, Vec<usize>) {
    used.clear();
    used.resize(tracks.len() + dets.len(), false);
    let (track_used, det_used) = used.split_at_mut(tracks.len());
    let matches = pairs
        .iter()
        .map(|&(r, c)| {
            track_used[r] = true;
            det_used[c] = true;
            Match {
                track: tracks[r],
                det: dets[c],
            }
        })
        .collect();
    let left_tracks = keep_unused(tracks, track_used);
    let left_dets = keep_unused(dets, det_used);
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
    let (matches, _, new_tracks) = match_iou(tracker, &tracks, &usable, dets, c.min_iou, None);
    Association {
        matches,
        new_tracks,
    }
}
