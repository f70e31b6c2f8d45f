//! Matching steps shared by the methods: the gated optimal assignment on IoU between lists of live
//! tracks and detections, and the one-stage association of IoU chaining and SORT.

use super::{Association, Match};
use crate::detections::{Detection, Detections};
use crate::geometry::BBox;
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
    let boxes: Vec<BBox> = dets.iter().map(|&d| all[d].bbox).collect();
    let index = Strips::new(&boxes);
    let gate = 1.0 - min_iou;
    let mut edges = Vec::new();
    let mut mine = Vec::new();
    let mut near = Vec::new();
    for (r, &t) in tracks.iter().enumerate() {
        let tb = tracker.predicted_box(t);
        index.near(&tb, &mut near);
        mine.clear();
        for &c in &near {
            let iou = tb.iou(&boxes[c]);
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

/// Below this many tallest heights between the highest and lowest top edge, boxes are one strip.
const FEW_STRIPS: f64 = 8.0;

/// Boxes found by where they can overlap a given box: grouped in horizontal strips as high as the
/// tallest box (by the strip their top edge falls in), each strip sorted by left edge. A box can
/// overlap another only if its top edge lies less than the tallest height above the other's top,
/// and its left edge less than the widest width left of the other's left, so a query looks at a
/// few strips, and in each at a stretch of left edges — not at a whole column of the picture, as
/// one list sorted by left edge would in a crowd.
struct Strips {
    /// (strip, left edge, box), sorted.
    keyed: Vec<(i64, f64, usize)>,
    top: f64,
    tallest: f64,
    widest: f64,
}

impl Strips {
    fn new(boxes: &[BBox]) -> Self {
        let top = boxes.iter().map(|b| b.y).fold(f64::INFINITY, f64::min);
        let bottom = boxes.iter().map(|b| b.y).fold(f64::NEG_INFINITY, f64::max);
        let mut tallest = boxes.iter().map(|b| b.h).fold(0.0, f64::max);
        // Boxes whose tops span only a few heights (most pictures: people are a good share of
        // its height) are one strip: a query then costs two searches, not three per strip.
        if bottom - top < FEW_STRIPS * tallest {
            tallest = 0.0;
        }
        let widest = boxes.iter().map(|b| b.w).fold(0.0, f64::max);
        let mut s = Self {
            keyed: Vec::with_capacity(boxes.len()),
            top,
            tallest,
            widest,
        };
        s.keyed = boxes
            .iter()
            .enumerate()
            .map(|(k, b)| (s.strip(b.y), b.x, k))
            .collect();
        // Every key holds its box's own index, so no two are equal: an unstable sort gives the
        // one order, without the stable sort's buffer.
        s.keyed
            .sort_unstable_by(|a, b| a.0.cmp(&b.0).then(a.1.total_cmp(&b.1)).then(a.2.cmp(&b.2)));
        s
    }

    /// The strip a top edge falls in (saturating far away; one strip for all when boxes have no
    /// height).
    fn strip(&self, y: f64) -> i64 {
        if self.tallest > 0.0 {
            ((y - self.top) / self.tallest).floor() as i64
        } else {
            0
        }
    }

    /// Every box that can overlap `b` (and a few that cannot), into `out`.
    fn near(&self, b: &BBox, out: &mut Vec<usize>) {
        out.clear();
        if self.tallest == 0.0 {
            let start = self.keyed.partition_point(|e| e.1 + self.widest <= b.x);
            let end = self.keyed.partition_point(|e| e.1 < b.x + b.w);
            out.extend(self.keyed[start..end.max(start)].iter().map(|e| e.2));
            return;
        }
        // One strip more on each side than the edges need: rounding can never lose a box.
        let first = self.strip(b.y - self.tallest).saturating_sub(1);
        let last = self.strip(b.y + b.h).saturating_add(1);
        let mut at = self.keyed.partition_point(|e| e.0 < first);
        while at < self.keyed.len() && self.keyed[at].0 <= last {
            let strip = self.keyed[at].0;
            let run = &self.keyed[at..];
            let end_of_strip = run.partition_point(|e| e.0 == strip);
            let run = &run[..end_of_strip];
            let start = run.partition_point(|e| e.1 + self.widest <= b.x);
            let end = run.partition_point(|e| e.1 < b.x + b.w);
            out.extend(run[start..end.max(start)].iter().map(|e| e.2));
            at += end_of_strip;
        }
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

#[cfg(test)]
mod tests {
    use super::*;
    use throughline_sim::rng::Rng;

    #[test]
    fn strips_find_every_overlapping_box() {
        // Against the definition (common practice): every pair with a positive intersection,
        // found by comparing all pairs.
        let mut rng = Rng::new(4);
        for case in 0..200 {
            let n = 1 + rng.below(80);
            let spread = [50.0, 400.0, 1e6][case % 3];
            let mut random_box = || {
                let tall = rng.chance(0.1);
                BBox {
                    x: rng.range(-spread, spread),
                    y: rng.range(-spread, spread),
                    w: rng.range(0.01, 60.0),
                    h: if tall {
                        rng.range(100.0, 900.0)
                    } else {
                        rng.range(0.01, 60.0)
                    },
                }
            };
            let boxes: Vec<BBox> = (0..n).map(|_| random_box()).collect();
            let queries: Vec<BBox> = (0..20).map(|_| random_box()).collect();
            let index = Strips::new(&boxes);
            let mut near = Vec::new();
            for q in &queries {
                index.near(q, &mut near);
                for (k, b) in boxes.iter().enumerate() {
                    if q.intersection(b) > 0.0 {
                        assert!(near.contains(&k), "case {case}: {q:?} misses {b:?}");
                    }
                }
            }
        }
    }
}
