//! Stage 1: each tracker track as a path of anchor points, one per frame (predicted boxes
//! included), the form every later stage counts on.

use crate::geometry::{BBox, Point};
use crate::plan::{Anchor, Screenline};
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

/// Every track with boxes, as a counted path of its own.
pub(super) fn pieces(tracks: &Tracks, anchor: Anchor) -> Vec<Counted> {
    tracks
        .tracks
        .iter()
        .filter(|t| !t.boxes.is_empty())
        .map(|t| Counted {
            ids: vec![t.id],
            class: class_of(t),
            points: path(t, anchor),
            joins: Vec::new(),
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

fn path(t: &Track, anchor: Anchor) -> Vec<PathPoint> {
    t.boxes
        .iter()
        .map(|b| PathPoint {
            frame: b.frame,
            p: anchor_of(&b.bbox, anchor),
            height: b.bbox.h,
            observed: b.observed,
        })
        .collect()
}

/// Distance from a point to the nearest segment of a screenline, pixels.
pub(super) fn distance_to_line(line: &Screenline, q: &Point) -> f64 {
    line.segments
        .iter()
        .map(|s| s.distance_to(q))
        .fold(f64::INFINITY, f64::min)
}
