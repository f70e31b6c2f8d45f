//! Stage 1: each tracker track as a path of anchor points, one per frame (predicted boxes
//! included, those of a gap between two sightings put on the line between them), averaged over a
//! few frames either side (`rules.smooth_seconds`), the form every later stage counts on.

use crate::geometry::{BBox, Point};
use crate::plan::{Anchor, Plan, Screenline};
use crate::track::{Track, Tracks};

/// Label used for tracks without a class.
pub const UNCLASSIFIED: &str = "unclassified";

/// Where a track's anchor was in one frame.
#[derive(Debug, Clone, Copy)]
pub(super) struct PathPoint {
    pub frame: u32,
    /// The anchor point, pixels.
    pub p: Point,
    /// The box height, pixels: distances are measured in box heights.
    pub height: f64,
    pub observed: bool,
}

/// A track as counted: one or more joined tracker tracks.
#[derive(Debug, Clone)]
pub(super) struct Counted {
    /// Tracker ids, in time order; the first names the counted track.
    pub ids: Vec<u32>,
    pub class: String,
    pub points: Vec<PathPoint>,
    /// Index in `points` where each joined fragment after the first begins.
    pub joins: Vec<usize>,
}

impl Counted {
    /// Whether the step from point `k - 1` to point `k` is an inference: it touches a predicted
    /// point or bridges two joined fragments.
    pub fn step_inferred(&self, k: usize) -> bool {
        self.joins.contains(&k) || !self.points[k - 1].observed || !self.points[k].observed
    }
}

/// Every track with boxes, as a counted path of its own, averaged over `half` frames either side
/// of each point.
pub(super) fn pieces(tracks: &Tracks, anchor: Anchor, half: u32) -> Vec<Counted> {
    tracks
        .tracks
        .iter()
        .filter(|t| !t.boxes.is_empty())
        .map(|t| Counted {
            ids: vec![t.id],
            class: class_of(t),
            points: path(t, anchor, half),
            joins: Vec::new(),
        })
        .collect()
}

/// One point of a track's path as the counting sees it (see [`counted_path`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CountedPoint {
    /// 1-based.
    pub frame: u32,
    /// The count point after averaging, pixels.
    pub at: Point,
    /// Whether the tracker saw the object in this frame (else the point is inferred).
    pub observed: bool,
}

/// A track's path as the counting sees it under `plan`: its count points (the plan's anchor), a
/// gap between two sightings on the straight line between them, averaged over
/// `rules.smooth_seconds`. What the page draws for a track under review, so that the path shown is
/// the one that crossed (or did not cross) the line.
pub fn counted_path(track: &Track, plan: &Plan) -> Vec<CountedPoint> {
    let half = plan.spec.rules.smooth_half_frames(plan.spec.frame_rate);
    path(track, plan.spec.anchor, half)
        .into_iter()
        .map(|q| CountedPoint {
            frame: q.frame,
            at: q.p,
            observed: q.observed,
        })
        .collect()
}

fn anchor_of(b: &BBox, anchor: Anchor) -> Point {
    match anchor {
        Anchor::Bottom => b.bottom_centre(),
        Anchor::Centre => b.centre(),
    }
}

fn class_of(t: &Track) -> String {
    t.class.clone().unwrap_or_else(|| UNCLASSIFIED.to_string())
}

fn path(t: &Track, anchor: Anchor, half: u32) -> Vec<PathPoint> {
    let mut points: Vec<PathPoint> = t
        .boxes
        .iter()
        .map(|b| PathPoint {
            frame: b.frame,
            p: anchor_of(&b.bbox, anchor),
            height: b.bbox.h,
            observed: b.observed,
        })
        .collect();
    interpolate_gaps(&mut points);
    smooth(&mut points, half);
    points
}

/// Replaces each point's anchor and box height by their mean over the path's points at most
/// `half` frames before and after it. The window stays centred: near the path's ends, and next to a
/// frame missing from the path (tracks read from a file may skip frames), it shrinks to the frames
/// on hand on both sides, so the first and last points of each stretch stay exactly where they
/// were (a moving average that does not pull a path's start and end towards its middle). Time
/// linear in the points, whatever `half` is.
fn smooth(points: &mut [PathPoint], half: u32) {
    if half == 0 {
        return;
    }
    let mut start = 0;
    while start < points.len() {
        // One stretch of consecutive frames: the point at index k is frame `first + k`.
        let mut end = start + 1;
        while end < points.len() && points[end].frame == points[end - 1].frame + 1 {
            end += 1;
        }
        smooth_stretch(&mut points[start..end], half as usize);
        start = end;
    }
}

/// [`smooth`] over points of consecutive frames.
fn smooth_stretch(points: &mut [PathPoint], half: usize) {
    let n = points.len();
    // sums[k]: x, y and height summed over points[..k], each less the first point's (so that the
    // differences below keep their precision far from the picture's origin).
    let origin = (points[0].p, points[0].height);
    let mut sums = Vec::with_capacity(n + 1);
    let mut acc = [0.0f64; 3];
    sums.push(acc);
    for q in points.iter() {
        acc[0] += q.p.x - origin.0.x;
        acc[1] += q.p.y - origin.0.y;
        acc[2] += q.height - origin.1;
        sums.push(acc);
    }
    for (k, q) in points.iter_mut().enumerate() {
        let w = half.min(k).min(n - 1 - k);
        if w == 0 {
            continue;
        }
        let (lo, hi) = (k - w, k + w + 1);
        let count = (hi - lo) as f64;
        let mean = |c: usize| (sums[hi][c] - sums[lo][c]) / count;
        q.p = Point::new(origin.0.x + mean(0), origin.0.y + mean(1));
        q.height = origin.1 + mean(2);
    }
}

/// Puts the predicted points of each gap between two observed points on the straight line between
/// those two, by frame: the tracker's predictions were made before the object was found again and
/// drift with the velocity it had when lost, whereas the two ends are where it was seen. The
/// points stay unobserved (a crossing among them is inferred).
fn interpolate_gaps(points: &mut [PathPoint]) {
    let mut last_seen: Option<usize> = None;
    for k in 0..points.len() {
        if !points[k].observed {
            continue;
        }
        if let Some(i) = last_seen.filter(|&i| k > i + 1) {
            let (a, b) = (points[i], points[k]);
            let span = f64::from(b.frame - a.frame);
            for q in &mut points[i + 1..k] {
                let t = f64::from(q.frame - a.frame) / span;
                q.p = Point::new(a.p.x + t * (b.p.x - a.p.x), a.p.y + t * (b.p.y - a.p.y));
                q.height = a.height + t * (b.height - a.height);
            }
        }
        last_seen = Some(k);
    }
}

/// Distance from a point to the nearest segment of a screenline, pixels.
pub(super) fn distance_to_line(line: &Screenline, q: &Point) -> f64 {
    line.segments
        .iter()
        .map(|s| s.distance_to(q))
        .fold(f64::INFINITY, f64::min)
}

#[cfg(test)]
mod tests {
    use super::{smooth, PathPoint};
    use crate::geometry::Point;

    fn at(frame: u32, y: f64) -> PathPoint {
        PathPoint {
            frame,
            p: Point::new(100.0, y),
            height: 50.0,
            observed: true,
        }
    }

    #[test]
    fn each_point_is_the_mean_of_a_centred_window_that_shrinks_at_ends_and_gaps() {
        // Worked by hand, half-window 2: frames 1-5 then 9-10 (frames 6-8 missing, as a tracks file
        // may have them). Frame 1 keeps its place (no point before it), frame 2 averages 1-3,
        // frame 3 averages 1-5, frame 4 averages 3-5, frame 5 (next to the gap) and 9 and 10 keep
        // theirs: nothing is pulled across the gap.
        let ys = [0.0, 10.0, 40.0, 20.0, 30.0, 90.0, 70.0];
        let frames = [1, 2, 3, 4, 5, 9, 10];
        let mut path: Vec<PathPoint> = frames.iter().zip(ys).map(|(&f, y)| at(f, y)).collect();
        smooth(&mut path, 2);
        let got: Vec<f64> = path.iter().map(|q| q.p.y).collect();
        assert_eq!(
            got,
            [0.0, 50.0 / 3.0, 20.0, 30.0, 30.0, 90.0, 70.0],
            "{got:?}"
        );
        assert!(path.iter().all(|q| q.p.x == 100.0 && q.height == 50.0));
        // Half-window 0 leaves every point as it was.
        let mut same: Vec<PathPoint> = frames.iter().zip(ys).map(|(&f, y)| at(f, y)).collect();
        smooth(&mut same, 0);
        assert_eq!(same.iter().map(|q| q.p.y).collect::<Vec<_>>(), ys);
    }
}
