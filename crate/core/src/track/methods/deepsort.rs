//! DeepSORT (Wojke, Bewley and Paulus 2017): appearance (cosine distance to a gallery of each
//! track's embeddings) gated by the Mahalanobis distance of the motion model, in a matching cascade
//! that favours recently seen tracks; then IoU for the rest.

use super::matching::{match_iou, split};
use super::{Association, Match, MethodDef};
use crate::detections::{Detection, Detections};
use crate::limits::MAX_CANDIDATES;
use crate::track::assign::{assign_edges, Edge};
use crate::track::tracker::Tracker;
use crate::track::TrackerConfig;

pub(super) const DEF: MethodDef = MethodDef {
    name: "deepsort",
    label: "DeepSORT (appearance)",
    summary: "appearance gated by motion in a matching cascade, then IoU (Wojke et al. 2017); needs embeddings",
    motion: true,
    needs_embeddings: true,
    defaults,
    associate,
    search_max_age: &[5, 30, 60],
    search_max_cosine_distance: &[0.15, 0.3],
};

/// Longer-lived tracks and quicker confirmation than the shared defaults, and appearance asked
/// for in the IoU stage too (measured in BENCHMARKS.md, "Crossings one by one"). An unseen track is
/// found again by appearance, so it may wait longer: 50 frames (2 s at 25 a second). The reference
/// implementation keeps 70 (from memory: nwojke/deep_sort, `Tracker`), but with the bundled demo's
/// short embeddings (8 values) tracks lost that long were found again on other people. A tentative
/// track ends at its first missed frame, so in a crowd where people are hidden every other frame
/// three hits in a row are rare and people went untracked: two are asked for. In the published
/// IoU stage a track whose person is hidden for a frame is matched by overlap alone to whoever
/// steps into its place (`iou_needs_appearance` refuses that: identity switches in the simulated
/// crowd 699 → 402). A person seen in about half the frames of a crowd rarely gives even two hits
/// in a row, so a tentative track may wait 25 frames (1 s) for its second (missed crossings in the
/// simulated crowd 76 → 58 of 1,233, extra 38 → 30). A person coming out from behind others is
/// often detected with a low score, and those boxes were dropped: boxes from 0.1 (ByteTrack's low
/// threshold, from memory) continue tracks, which appearance and the motion gate keep to their
/// own person, but only boxes from 0.3 (the shared `min_score`) start one, so that low-scoring
/// clutter does not become tracks (missed crossings in the crowd 46 → 31 of 1,234, extra 21 → 21).
fn defaults(base: TrackerConfig) -> TrackerConfig {
    TrackerConfig {
        max_age: 50,
        min_hits: 2,
        iou_needs_appearance: true,
        tentative_max_age: 25,
        start_score: base.min_score,
        min_score: 0.1,
        ..base
    }
}

/// Appearance costs between one cascade level's tracks and the detections still unmatched, for the
/// pairs inside each track's motion gate (in a crowd, only the `MAX_CANDIDATES` nearest by motion).
fn appearance_edges(
    tracker: &Tracker,
    dets: &[Detection],
    tracks: &[usize],
    unmatched: &[usize],
    usable: &[usize],
) -> Vec<Edge> {
    // The frame's vectors, unit length (made once by the tracker for this and the galleries).
    let unit = |k: usize| tracker.units.get(usable[k]);
    let c = &tracker.config;
    let mut edges = Vec::new();
    let mut near: Vec<(f64, usize)> = Vec::new();
    // The unmatched detections with an appearance vector by centre x, so that each track measures
    // only those within its gate's reach in x (then in order, as if all had been measured).
    let mut by_x: Vec<(f64, usize)> = unmatched
        .iter()
        .enumerate()
        .filter(|&(_, &d)| unit(d).is_some())
        .map(|(k, &d)| (dets[usable[d]].bbox.centre().x, k))
        .collect();
    by_x.sort_unstable_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
    let mut reach: Vec<usize> = Vec::new();
    for (r, &ti) in tracks.iter().enumerate() {
        let t = &tracker.live[ti];
        if t.gallery.is_empty() {
            continue;
        }
        let Some(gate) = tracker.motion.gate(&t.kf, c.max_mahalanobis) else {
            continue;
        };
        let start = by_x.partition_point(|e| gate.centre_x_within(e.0).is_lt());
        let end = by_x.partition_point(|e| gate.centre_x_within(e.0).is_le());
        reach.clear();
        reach.extend(by_x[start..end.max(start)].iter().map(|e| e.1));
        reach.sort_unstable();
        near.clear();
        for &k in &reach {
            if let Some(m) = gate.distance_sq(&dets[usable[unmatched[k]]].bbox) {
                near.push((m, k));
            }
        }
        if near.len() > MAX_CANDIDATES {
            near.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
            near.truncate(MAX_CANDIDATES);
            near.sort_by_key(|&(_, k)| k);
        }
        for &(_, k) in &near {
            if let Some(e) = unit(unmatched[k]) {
                edges.push(Edge {
                    row: r,
                    col: k,
                    cost: t.gallery.distance(e),
                });
            }
        }
    }
    edges
}

/// DeepSORT: a matching cascade over confirmed tracks, most recently seen first, on appearance gated
/// by motion; then IoU for tentative tracks and tracks missed for one frame only (with
/// `iou_needs_appearance`, only pairs the appearance stage would not refuse).
fn associate(tracker: &Tracker, dets: &[Detection], _: &Detections) -> Association {
    let c = &tracker.config;
    let usable: Vec<usize> = (0..dets.len())
        .filter(|&d| dets[d].score >= c.min_score)
        .collect();
    let mut unmatched: Vec<usize> = (0..usable.len()).collect();
    let mut matches = Vec::new();
    let mut seen_by_cascade = vec![false; tracker.live.len()];
    // `unseen` counts frames since the last match, before this frame's update: a track seen in the
    // previous frame has unseen == 0 here, so level k holds the tracks with unseen == k - 1.
    for level in 0..=c.max_age {
        if unmatched.is_empty() {
            break;
        }
        let tracks: Vec<usize> = (0..tracker.live.len())
            .filter(|&t| tracker.live[t].is_confirmed() && tracker.live[t].unseen == level)
            .collect();
        if tracks.is_empty() {
            continue;
        }
        for &t in &tracks {
            seen_by_cascade[t] = true;
        }
        let edges = appearance_edges(tracker, dets, &tracks, &unmatched, &usable);
        let found = assign_edges(tracks.len(), unmatched.len(), &edges, c.max_cosine_distance);
        tracker.note_crowd(found.greedy);
        let (level_matches, _, left) = split(&found.pairs, &tracks, &unmatched);
        matches.extend(level_matches.into_iter().map(|m| Match {
            track: m.track,
            det: usable[m.det],
        }));
        unmatched = left;
    }
    let matched_tracks: Vec<bool> = {
        let mut v = vec![false; tracker.live.len()];
        for m in &matches {
            v[m.track] = true;
        }
        v
    };
    let iou_tracks: Vec<usize> = (0..tracker.live.len())
        .filter(|&t| {
            let live = &tracker.live[t];
            !matched_tracks[t] && (!live.is_confirmed() || (seen_by_cascade[t] && live.unseen == 0))
        })
        .collect();
    let left_dets: Vec<usize> = unmatched.iter().map(|&k| usable[k]).collect();
    let (iou_matches, _, new_tracks) = match_iou(
        tracker,
        &iou_tracks,
        &left_dets,
        dets,
        c.min_iou,
        c.iou_needs_appearance.then_some(c.max_cosine_distance),
    );
    matches.extend(iou_matches);
    Association {
        matches,
        new_tracks,
    }
}
