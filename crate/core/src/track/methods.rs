//! The association step of each method: which detection of this frame goes to which live track.
//!
//! Costs are distances in `[0, 1]` (1 − IoU, or cosine distance) and every assignment is the optimal
//! one from [`crate::assign::solve_gated`]. Where a method's paper matches greedily (the IoU tracker),
//! the optimal assignment is used instead: it never does worse on the same gate.

use super::{Association, Engine, Match, Method};
use crate::assign::{solve_edges, Edge};
use crate::detections::Detection;

pub(super) fn associate(engine: &Engine, dets: &[Detection]) -> Association {
    match engine.config.method {
        Method::Iou | Method::Sort => single_stage(engine, dets),
        Method::Bytetrack => bytetrack(engine, dets),
        Method::Deepsort => deepsort(engine, dets),
    }
}

/// Matches `tracks` to `dets` (both lists of indices) on 1 − IoU with a least IoU; returns the
/// matches and the tracks and detections left over, in their original order.
fn match_iou(
    engine: &Engine,
    tracks: &[usize],
    dets: &[usize],
    all: &[Detection],
    min_iou: f64,
) -> (Vec<Match>, Vec<usize>, Vec<usize>) {
    let method = engine.config.method;
    // Only boxes that overlap can have a positive IoU: with detections sorted by their left edge,
    // each track looks only at those starting left of its right edge.
    let mut by_left: Vec<(f64, usize)> = dets
        .iter()
        .enumerate()
        .map(|(k, &d)| (all[d].bbox.x, k))
        .collect();
    by_left.sort_by(|a, b| a.0.total_cmp(&b.0));
    let widest = dets.iter().map(|&d| all[d].bbox.w).fold(0.0, f64::max);
    let mut edges = Vec::new();
    for (r, &t) in tracks.iter().enumerate() {
        let tb = engine.live[t].predicted_box(method);
        let start = by_left.partition_point(|&(x, _)| x + widest <= tb.x);
        let end = by_left.partition_point(|&(x, _)| x < tb.x + tb.w);
        for &(_, c) in &by_left[start..end.max(start)] {
            let iou = tb.iou(&all[dets[c]].bbox);
            if iou > 0.0 {
                edges.push(Edge {
                    row: r,
                    col: c,
                    cost: 1.0 - iou,
                });
            }
        }
    }
    split(
        solve_edges(tracks.len(), dets.len(), &edges, 1.0 - min_iou),
        tracks,
        dets,
    )
}

/// Turns assignment pairs over sub-lists into matches plus what is left of each list.
fn split(
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
fn single_stage(engine: &Engine, dets: &[Detection]) -> Association {
    let c = &engine.config;
    let usable: Vec<usize> = (0..dets.len())
        .filter(|&d| dets[d].score >= c.min_score)
        .collect();
    let tracks: Vec<usize> = (0..engine.live.len()).collect();
    let (matches, _, new_tracks) = match_iou(engine, &tracks, &usable, dets, c.min_iou);
    Association {
        matches,
        new_tracks,
    }
}

/// ByteTrack: high-score detections against confirmed tracks, then low-score detections against the
/// confirmed tracks still visible last frame, then the remaining high-score detections against
/// tentative tracks. Only high-score detections above `new_track_score` start tracks.
fn bytetrack(engine: &Engine, dets: &[Detection]) -> Association {
    let c = &engine.config;
    let high: Vec<usize> = (0..dets.len())
        .filter(|&d| dets[d].score >= c.high_score)
        .collect();
    let low: Vec<usize> = (0..dets.len())
        .filter(|&d| dets[d].score >= c.min_score && dets[d].score < c.high_score)
        .collect();
    let confirmed: Vec<usize> = (0..engine.live.len())
        .filter(|&t| engine.live[t].is_confirmed())
        .collect();
    let tentative: Vec<usize> = (0..engine.live.len())
        .filter(|&t| !engine.live[t].is_confirmed())
        .collect();

    let (mut matches, left_tracks, left_high) =
        match_iou(engine, &confirmed, &high, dets, c.min_iou);
    // The second stage only tries tracks that were seen in the previous frame (ByteTrack's "tracked"
    // state); tracks already coasting wait for a high-score box.
    let visible: Vec<usize> = left_tracks
        .into_iter()
        .filter(|&t| engine.live[t].unseen == 0)
        .collect();
    let (second, _, _) = match_iou(engine, &visible, &low, dets, c.low_min_iou);
    matches.extend(second);
    let (third, _, left_high) = match_iou(engine, &tentative, &left_high, dets, c.min_iou);
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

/// Cosine distance between a unit vector and the closest vector of a gallery.
fn gallery_distance(gallery: &std::collections::VecDeque<Vec<f32>>, e: &[f32]) -> f64 {
    gallery
        .iter()
        .map(|g| {
            let dot: f64 = g
                .iter()
                .zip(e)
                .map(|(a, b)| f64::from(*a) * f64::from(*b))
                .sum();
            1.0 - dot
        })
        .fold(f64::INFINITY, f64::min)
}

/// DeepSORT: a matching cascade over confirmed tracks, most recently seen first, on appearance gated
/// by motion; then IoU for tentative tracks and tracks missed for one frame only.
fn deepsort(engine: &Engine, dets: &[Detection]) -> Association {
    let c = &engine.config;
    let usable: Vec<usize> = (0..dets.len())
        .filter(|&d| dets[d].score >= c.min_score)
        .collect();
    let embeddings: Vec<Option<Vec<f32>>> = usable
        .iter()
        .map(|&d| {
            engine
                .detections
                .embedding(&dets[d])
                .and_then(super::unit_vector)
        })
        .collect();
    let mut unmatched: Vec<usize> = (0..usable.len()).collect();
    let mut matches = Vec::new();
    let mut seen_by_cascade = vec![false; engine.live.len()];
    // `unseen` counts frames since the last match, before this frame's update: a track seen in the
    // previous frame has unseen == 0 here, so level k holds the tracks with unseen == k - 1.
    for level in 0..=c.max_age {
        if unmatched.is_empty() {
            break;
        }
        let tracks: Vec<usize> = (0..engine.live.len())
            .filter(|&t| engine.live[t].is_confirmed() && engine.live[t].unseen == level)
            .collect();
        if tracks.is_empty() {
            continue;
        }
        for &t in &tracks {
            seen_by_cascade[t] = true;
        }
        let mut edges = Vec::new();
        for (r, &ti) in tracks.iter().enumerate() {
            let t = &engine.live[ti];
            if t.gallery.is_empty() {
                continue;
            }
            let Some(gate) = engine.motion.gate(&t.kf, c.max_mahalanobis) else {
                continue;
            };
            for (k, &d) in unmatched.iter().enumerate() {
                let Some(e) = &embeddings[d] else { continue };
                if gate.distance_sq(&dets[usable[d]].bbox).is_some() {
                    edges.push(Edge {
                        row: r,
                        col: k,
                        cost: gallery_distance(&t.gallery, e),
                    });
                }
            }
        }
        let pairs = solve_edges(tracks.len(), unmatched.len(), &edges, c.max_cosine_distance);
        let (level_matches, _, left) = split(pairs, &tracks, &unmatched);
        matches.extend(level_matches.into_iter().map(|m| Match {
            track: m.track,
            det: usable[m.det],
        }));
        unmatched = left;
    }
    let matched_tracks: Vec<bool> = {
        let mut v = vec![false; engine.live.len()];
        for m in &matches {
            v[m.track] = true;
        }
        v
    };
    let iou_tracks: Vec<usize> = (0..engine.live.len())
        .filter(|&t| {
            let live = &engine.live[t];
            !matched_tracks[t] && (!live.is_confirmed() || (seen_by_cascade[t] && live.unseen == 0))
        })
        .collect();
    let left_dets: Vec<usize> = unmatched.iter().map(|&k| usable[k]).collect();
    let (iou_matches, _, new_tracks) = match_iou(engine, &iou_tracks, &left_dets, dets, c.min_iou);
    matches.extend(iou_matches);
    Association {
        matches,
        new_tracks,
    }
}
