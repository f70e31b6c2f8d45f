//! Stage 2: fragments of one object, broken near a screenline or a zone's edge (or inside a zone),
//! joined into one counted track before counting: the pairs of an ended and a new track that qualify (docs/counting-rules.md, "Fragments
//! joined"), taken nearest first, each end used once, chained.

use super::paths::{distance_to_line, Counted, PathPoint, UNCLASSIFIED};
use crate::geometry::{Point, Segment};
use crate::plan::Plan;
use crate::report::Join;
use std::collections::BTreeMap;

/// A possible join: how far the later piece started from where the earlier was heading, the two
/// pieces (indices), and the gap in frames.
struct Candidate {
    distance: f64,
    earlier: usize,
    later: usize,
    gap: u32,
}

/// The counted tracks after joining, sorted by their first id, and the joins made; two pieces of
/// one track a person split (`split_from`: piece → the track first split) are never joined.
pub(super) fn join_fragments(
    mut pieces: Vec<Counted>,
    plan: &Plan,
    split_from: &BTreeMap<u32, u32>,
) -> (Vec<Counted>, Vec<Join>) {
    let mut joins = Vec::new();
    let rules = plan.spec.rules;
    let max_gap = (rules.join_seconds * plan.spec.frame_rate).round() as u32;
    let mut counted = if max_gap == 0
        || (plan.screenlines.is_empty() && plan.zones.is_empty())
        || rules.join_box_heights == 0.0
    {
        pieces
    } else {
        pieces.sort_by_key(|c| (c.points[0].frame, c.ids[0]));
        let family = |k: usize| split_from.get(&pieces[k].ids[0]);
        let mut candidates = candidates(&pieces, plan, max_gap);
        candidates.retain(|c| match (family(c.earlier), family(c.later)) {
            (Some(a), Some(b)) => a != b,
            _ => true,
        });
        let next = link(&pieces, candidates, &mut joins);
        merge_chains(&pieces, &next)
    };
    counted.sort_by_key(|c| c.ids[0]);
    (counted, joins)
}

/// Heading of a track's end: anchor velocity per frame over its last observed points.
fn end_velocity(points: &[PathPoint]) -> (f64, f64) {
    let observed: Vec<&PathPoint> = points.iter().filter(|p| p.observed).collect();
    let n = observed.len();
    if n < 2 {
        return (0.0, 0.0);
    }
    let a = observed[n.saturating_sub(10)];
    let b = observed[n - 1];
    let df = f64::from(b.frame - a.frame).max(1.0);
    ((b.p.x - a.p.x) / df, (b.p.y - a.p.y) / df)
}

/// Every pair of pieces that may be one object, nearest first. `pieces` are sorted by their first
/// frame, so the pieces that start within `max_gap` frames after one ends are a run of them, found
/// by halving: an hour of a busy scene (about 13,000 pieces) then costs a few pieces a piece, not
/// every pair.
fn candidates(pieces: &[Counted], plan: &Plan, max_gap: u32) -> Vec<Candidate> {
    let join_box_heights = plan.spec.rules.join_box_heights;
    let starts: Vec<u32> = pieces.iter().map(|p| p.points[0].frame).collect();
    let mut out: Vec<Candidate> = Vec::new();
    for (i, a) in pieces.iter().enumerate() {
        let last = a.points[a.points.len() - 1];
        let (vx, vy) = end_velocity(&a.points);
        let from = starts.partition_point(|&f| f <= last.frame);
        let to = starts.partition_point(|&f| f <= last.frame.saturating_add(max_gap));
        for (j, b) in pieces.iter().enumerate().take(to).skip(from) {
            let first = b.points[0];
            if a.class != b.class && a.class != UNCLASSIFIED && b.class != UNCLASSIFIED {
                continue;
            }
            let gap = f64::from(first.frame - last.frame);
            let expected = Point::new(last.p.x + vx * gap, last.p.y + vy * gap);
            let distance = expected.distance(&first.p);
            let limit = join_box_heights * last.height.max(first.height);
            if distance > limit {
                continue;
            }
            let bridge = Segment::new(last.p, first.p);
            let near_line = plan.screenlines.iter().any(|l| {
                l.segments
                    .iter()
                    .any(|s| s.intersect_param(&bridge.a, &bridge.b).is_some())
                    || distance_to_line(l, &first.p) <= limit
            });
            // A zone's edge likewise, or a gap inside a zone (a person hidden there: their
            // visit is one, not a "last seen inside" and a "first seen inside").
            let near_zone = plan.zones.iter().any(|z| {
                let inside = z.polygon.contains(&last.p) && z.polygon.contains(&first.p);
                inside
                    || crosses_edge(&z.polygon, &bridge)
                    || z.polygon.distance_to_edge(&first.p) <= limit
            });
            if near_line || near_zone {
                out.push(Candidate {
                    distance,
                    earlier: i,
                    later: j,
                    gap: first.frame - last.frame,
                });
            }
        }
    }
    out.sort_by(|x, y| {
        x.distance
            .total_cmp(&y.distance)
            .then((x.earlier, x.later).cmp(&(y.earlier, y.later)))
    });
    out
}

/// Whether the segment crosses an edge of the polygon.
fn crosses_edge(polygon: &crate::geometry::Polygon, bridge: &Segment) -> bool {
    let c = &polygon.corners;
    (0..c.len()).any(|k| {
        Segment::new(c[k], c[(k + 1) % c.len()])
            .intersect_param(&bridge.a, &bridge.b)
            .is_some()
    })
}

/// Takes candidates nearest first while each piece has at most one successor and one
/// predecessor; returns each piece's successor, and records the joins.
fn link(
    pieces: &[Counted],
    candidates: Vec<Candidate>,
    joins: &mut Vec<Join>,
) -> Vec<Option<usize>> {
    let mut next: Vec<Option<usize>> = vec![None; pieces.len()];
    let mut has_prev = vec![false; pieces.len()];
    for c in candidates {
        if next[c.earlier].is_none() && !has_prev[c.later] {
            next[c.earlier] = Some(c.later);
            has_prev[c.later] = true;
            joins.push(Join {
                tracks: [pieces[c.earlier].ids[0], pieces[c.later].ids[0]],
                gap_frames: c.gap,
            });
        }
    }
    next
}

/// Follows each chain of successors from its first piece and merges it into one counted track,
/// whose class is that of its piece seen most often.
fn merge_chains(pieces: &[Counted], next: &[Option<usize>]) -> Vec<Counted> {
    let mut has_prev = vec![false; pieces.len()];
    for n in next.iter().flatten() {
        has_prev[*n] = true;
    }
    let mut out = Vec::new();
    let mut taken = vec![false; pieces.len()];
    for start in 0..pieces.len() {
        if has_prev[start] || taken[start] {
            continue;
        }
        let mut chain = vec![start];
        while let Some(n) = next[*chain.last().unwrap_or(&start)] {
            if taken[n] || chain.contains(&n) {
                break;
            }
            chain.push(n);
        }
        for &k in &chain {
            taken[k] = true;
        }
        out.push(merge(pieces, &chain));
    }
    out
}

fn merge(pieces: &[Counted], chain: &[usize]) -> Counted {
    let mut merged = pieces[chain[0]].clone();
    let mut best_class = (
        merged.points.iter().filter(|p| p.observed).count(),
        merged.class.clone(),
    );
    for &k in &chain[1..] {
        let piece = &pieces[k];
        merged.joins.push(merged.points.len());
        merged.points.extend_from_slice(&piece.points);
        merged.ids.extend_from_slice(&piece.ids);
        let seen = piece.points.iter().filter(|p| p.observed).count();
        if seen > best_class.0 && piece.class != UNCLASSIFIED {
            best_class = (seen, piece.class.clone());
        }
    }
    merged.class = best_class.1;
    merged
}
