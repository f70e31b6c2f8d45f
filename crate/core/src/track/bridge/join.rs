//! Joining bridged tracks: each track continued by at most one and continuing at most one, the
//! earliest gap first; a chain of joined tracks becomes one track with the first one's id.

use super::gaps::Gap;
use crate::geometry::BBox;
use crate::track::{Track, TrackBox, Tracks};

/// A gap whose followings met: the gap's index and its boxes, one per unseen frame.
pub(super) struct Met {
    pub gap: usize,
    pub boxes: Vec<BBox>,
    pub iou: f64,
}

/// One join made: track `joined` continues track `track` (which keeps its id) after the unseen
/// frames `first_frame..=last_frame` (1-based), bridged with boxes followed in the footage; `iou`
/// is where the forward and backward followings met best.
#[derive(Debug, Clone, PartialEq)]
pub struct Join {
    pub track: u32,
    pub joined: u32,
    pub first_frame: u32,
    pub last_frame: u32,
    pub iou: f64,
}

/// The tracks with the bridges of `met` (in order of their gaps) kept where both ends are free.
pub(super) fn apply(tracks: &Tracks, gaps: &[Gap], met: &[Met]) -> (Tracks, Vec<Join>) {
    let n = tracks.tracks.len();
    let mut next: Vec<Option<&Met>> = vec![None; n];
    let mut continues = vec![false; n];
    for m in met {
        let g = &gaps[m.gap];
        if next[g.a].is_none() && !continues[g.b] {
            next[g.a] = Some(m);
            continues[g.b] = true;
        }
    }
    let mut joins = Vec::new();
    let mut out = Vec::with_capacity(n);
    for head in (0..n).filter(|&k| !continues[k]) {
        let mut track = tracks.tracks[head].clone();
        let mut observed = seen(&track);
        let mut score_sum = track.mean_score * observed as f64;
        let mut at = head;
        while let Some(m) = next[at] {
            let g = &gaps[m.gap];
            let b = &tracks.tracks[g.b];
            joins.push(Join {
                track: track.id,
                joined: b.id,
                first_frame: g.from + 1,
                last_frame: g.to - 1,
                iou: m.iou,
            });
            track.boxes.extend(
                m.boxes
                    .iter()
                    .zip(g.from + 1..)
                    .map(|(&bbox, frame)| TrackBox {
                        frame,
                        bbox,
                        score: 0.0,
                        observed: false,
                    }),
            );
            track.boxes.extend_from_slice(&b.boxes);
            observed += seen(b);
            score_sum += b.mean_score * seen(b) as f64;
            merge_votes(&mut track, b);
            at = g.b;
        }
        track.mean_score = score_sum / observed.max(1) as f64;
        out.push(track);
    }
    joins.sort_by_key(|j| (j.first_frame, j.track));
    let bridged = Tracks {
        tracks: out,
        ..tracks.clone()
    };
    (bridged, joins)
}

fn seen(t: &Track) -> usize {
    t.boxes.iter().filter(|b| b.observed).count()
}

/// `b`'s class votes added to `t`'s, most first (ties: the class `t` had first, then `b`'s order);
/// the class is the one with most votes, or the first known when no votes are kept.
fn merge_votes(t: &mut Track, b: &Track) {
    for (class, n) in &b.class_votes {
        match t.class_votes.iter_mut().find(|(c, _)| c == class) {
            Some((_, m)) => *m += n,
            None => t.class_votes.push((class.clone(), *n)),
        }
    }
    t.class_votes.sort_by_key(|v| std::cmp::Reverse(v.1));
    t.class = t
        .class_votes
        .first()
        .map(|(c, _)| c.clone())
        .or_else(|| t.class.clone())
        .or_else(|| b.class.clone());
}
