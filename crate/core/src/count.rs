//! Counting: turns tracks and a plan into the numbers people hand in, each backed by a list of events.
//!
//! Rules (see DEVELOPERS.md, "Counting rules", for the reasons and limits):
//! - A crossing is an intersection of the anchor's path (one step per frame, predicted boxes
//!   included) with a screenline segment; its direction comes from the movement across the segment.
//! - Hysteresis: a crossing is pending until an observed anchor gets `rules.hysteresis × box height`
//!   away from the line. A crossing back before that cancels both (jitter on the line, or a coasting
//!   prediction that drifted over the line and back). A pending crossing at
//!   the end of a track counts if the anchor ended at least half that distance beyond the line.
//! - Crossings on steps that touch a predicted box are counted and marked `inferred`.
//! - Fragments: a track that ends, and a new track that starts within `rules.join_seconds` where the
//!   first was heading (within `rules.join_box_heights` box heights) and across or next to a
//!   screenline, are joined into one before counting.
//! - Frames are 1-based; the time of frame `f` is `(f − 1) / frame_rate` seconds after `start`.

use crate::geometry::{Point, Segment};
use crate::plan::clock::{elapsed, LocalTime};
use crate::plan::{Anchor, Plan, Screenline, Zone};
use crate::track::{Track, TrackerConfig, Tracks};
use serde::Serialize;
use std::collections::BTreeMap;

/// Label used for tracks without a class.
pub const UNCLASSIFIED: &str = "unclassified";

/// The caution printed with every report.
pub const CAUTION: &str = "Automated counts are estimates. Before relying on them for a design or \
    operational decision, check a sample against a manual count of the same footage, and follow local \
    rules on recording people in public space. Short counts are unadjusted (no seasonal or day-of-week \
    factors).";

#[derive(Debug, Clone, Copy)]
struct PathPoint {
    frame: u32,
    p: Point,
    height: f64,
    observed: bool,
}

/// A track as counted: one or more joined tracker tracks.
#[derive(Debug, Clone)]
struct Counted {
    ids: Vec<u32>,
    class: String,
    points: Vec<PathPoint>,
    /// Index in `points` where each joined fragment after the first begins.
    joins: Vec<usize>,
}

/// One counted event: a screenline crossing or a zone entry or exit.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Event {
    /// The counted track: the id of its first fragment.
    pub track: u32,
    /// Every tracker id joined into it, in time order (one id unless fragments were joined).
    pub track_ids: Vec<u32>,
    /// `screenline` or `zone`.
    pub kind: &'static str,
    /// Name of the screenline or zone.
    pub name: String,
    /// `forward` or `backward` for screenlines; `entry` or `exit` for zones.
    pub direction: &'static str,
    /// The plan's label for the direction (for example `inbound`).
    pub label: String,
    /// First frame at or after the moment of the event (1-based).
    pub frame: u32,
    /// Seconds from frame 1 to the moment of the event (interpolated between frames).
    pub seconds: f64,
    /// Wall-clock time when the plan has a start, else elapsed `HH:MM:SS`.
    pub time: String,
    pub class: String,
    /// Where the anchor met the line or zone edge, pixels.
    pub x: f64,
    pub y: f64,
    /// True when the anchor was predicted (the object unseen) or the step bridges joined fragments.
    pub inferred: bool,
}

/// Counts in one interval.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IntervalCount {
    pub start: String,
    pub end: String,
    /// True for a last interval cut short by the end of the footage.
    pub partial: bool,
    pub forward: u64,
    pub backward: u64,
    pub by_class: BTreeMap<String, DirectionCounts>,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
pub struct DirectionCounts {
    pub forward: u64,
    pub backward: u64,
}

/// The busiest hour: consecutive whole intervals with the highest total, and its peak hour factor
/// PHF = V_hour / (n × V_max), n intervals per hour (4 for 15-minute intervals).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PeakHour {
    pub start: String,
    pub end: String,
    pub volume: u64,
    pub peak_interval_volume: u64,
    pub phf: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ScreenlineReport {
    pub name: String,
    pub forward_label: String,
    pub backward_label: String,
    /// Totals over the whole footage.
    pub forward: u64,
    pub backward: u64,
    pub inferred: u64,
    pub by_class: BTreeMap<String, DirectionCounts>,
    pub intervals: Vec<IntervalCount>,
    /// Busiest hour of both directions together, and of each direction; `None` for footage shorter
    /// than one hour of whole intervals.
    pub peak_hour: Option<PeakHour>,
    pub peak_hour_forward: Option<PeakHour>,
    pub peak_hour_backward: Option<PeakHour>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Summary {
    pub count: usize,
    pub mean: Option<f64>,
    pub median: Option<f64>,
    pub p85: Option<f64>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ZoneInterval {
    pub start: String,
    pub end: String,
    pub entries: u64,
    pub exits: u64,
    pub mean_occupancy: f64,
    pub max_occupancy: u64,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ZoneReport {
    pub name: String,
    pub entries: u64,
    pub exits: u64,
    /// Tracks already inside when first seen, and tracks still inside when last seen.
    pub present_at_start: u64,
    pub present_at_end: u64,
    pub entries_by_class: BTreeMap<String, u64>,
    pub exits_by_class: BTreeMap<String, u64>,
    pub intervals: Vec<ZoneInterval>,
    /// Seconds inside per visit, over visits with both an entry and an exit.
    pub dwell_seconds: Summary,
}

/// Origin → destination counts: origin is the first screenline or zone a track meets, destination
/// the last (the same name for a U-turn).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Movement {
    pub origin: String,
    pub destination: String,
    pub class: String,
    pub count: u64,
    pub u_turn: bool,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SpeedReport {
    pub unit: String,
    /// Per class: distance per second in the plan's ground unit.
    pub by_class: BTreeMap<String, Summary>,
    /// All classes together.
    pub all: Summary,
    /// km/h equivalents of `all`, when the unit is metres.
    pub all_kmh: Option<Summary>,
    pub tracks: Vec<TrackSpeed>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TrackSpeed {
    pub track: u32,
    pub class: String,
    pub distance: f64,
    pub seconds: f64,
    pub speed: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Join {
    /// The earlier and the later tracker id.
    pub tracks: [u32; 2],
    pub gap_frames: u32,
}

/// The whole report.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Report {
    pub format: &'static str,
    pub version: u32,
    pub generator: String,
    pub caution: &'static str,
    pub plan: crate::plan::PlanSpec,
    pub tracker: Option<TrackerConfig>,
    pub frame_count: u32,
    pub duration_seconds: f64,
    pub tracks_counted: usize,
    pub screenlines: Vec<ScreenlineReport>,
    pub zones: Vec<ZoneReport>,
    pub movements: Vec<Movement>,
    /// Tracks that met exactly one screenline or zone (no destination).
    pub single_feature_tracks: u64,
    pub speeds: Option<SpeedReport>,
    pub joins: Vec<Join>,
    pub events: Vec<Event>,
}

/// How frames become times and interval labels.
struct Timeline {
    fps: f64,
    start: Option<LocalTime>,
    interval_s: f64,
    duration_s: f64,
}

impl Timeline {
    fn seconds(&self, frame: f64) -> f64 {
        (frame - 1.0) / self.fps
    }

    fn label(&self, seconds: f64) -> String {
        match self.start {
            Some(t) => t.plus_seconds(seconds.floor() as i64).to_string(),
            None => elapsed(seconds),
        }
    }

    fn count(&self) -> usize {
        ((self.duration_s / self.interval_s).ceil() as usize).max(1)
    }

    fn index(&self, seconds: f64) -> usize {
        ((seconds / self.interval_s).floor().max(0.0) as usize).min(self.count() - 1)
    }

    fn bounds(&self, i: usize) -> (String, String, bool) {
        let a = i as f64 * self.interval_s;
        let b = a + self.interval_s;
        (self.label(a), self.label(b), b > self.duration_s + 1e-9)
    }
}

fn anchor_of(b: &crate::geometry::BBox, anchor: Anchor) -> Point {
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

fn distance_to_line(line: &Screenline, q: &Point) -> f64 {
    line.segments
        .iter()
        .map(|s| s.distance_to(q))
        .fold(f64::INFINITY, f64::min)
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

/// Joins fragments near screenlines (see the module notes), greedily by distance.
fn join_fragments(mut pieces: Vec<Counted>, plan: &Plan, joins: &mut Vec<Join>) -> Vec<Counted> {
    let rules = plan.spec.rules;
    let max_gap = (rules.join_seconds * plan.spec.frame_rate).round() as u32;
    if max_gap == 0 || plan.screenlines.is_empty() || rules.join_box_heights == 0.0 {
        return pieces;
    }
    pieces.sort_by_key(|c| (c.points[0].frame, c.ids[0]));
    let mut candidates: Vec<(f64, usize, usize, u32)> = Vec::new();
    for (i, a) in pieces.iter().enumerate() {
        let last = a.points[a.points.len() - 1];
        let (vx, vy) = end_velocity(&a.points);
        for (j, b) in pieces.iter().enumerate() {
            let first = b.points[0];
            if i == j || first.frame <= last.frame || first.frame - last.frame > max_gap {
                continue;
            }
            if a.class != b.class && a.class != UNCLASSIFIED && b.class != UNCLASSIFIED {
                continue;
            }
            let gap = f64::from(first.frame - last.frame);
            let expected = Point::new(last.p.x + vx * gap, last.p.y + vy * gap);
            let distance = expected.distance(&first.p);
            let limit = rules.join_box_heights * last.height.max(first.height);
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
            if near_line {
                candidates.push((distance, i, j, first.frame - last.frame));
            }
        }
    }
    candidates.sort_by(|x, y| x.0.total_cmp(&y.0).then((x.1, x.2).cmp(&(y.1, y.2))));
    let mut next: Vec<Option<usize>> = vec![None; pieces.len()];
    let mut has_prev = vec![false; pieces.len()];
    for (_, i, j, gap) in candidates {
        if next[i].is_none() && !has_prev[j] {
            next[i] = Some(j);
            has_prev[j] = true;
            joins.push(Join {
                tracks: [pieces[i].ids[0], pieces[j].ids[0]],
                gap_frames: gap,
            });
        }
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
        let mut merged = pieces[chain[0]].clone();
        taken[chain[0]] = true;
        let mut best_class = (
            merged.points.iter().filter(|p| p.observed).count(),
            merged.class.clone(),
        );
        for &k in &chain[1..] {
            taken[k] = true;
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
        out.push(merged);
    }
    out
}

struct Pending {
    forward: bool,
    frame_f: f64,
    at: Point,
    inferred: bool,
}

/// Crossings of one counted track with one screenline.
fn crossings(c: &Counted, line: &Screenline, hysteresis: f64) -> Vec<(bool, f64, Point, bool)> {
    let mut out = Vec::new();
    let mut pending: Option<Pending> = None;
    for k in 1..c.points.len() {
        let (a, b) = (c.points[k - 1], c.points[k]);
        let bridge = c.joins.contains(&k);
        let inferred = bridge || !a.observed || !b.observed;
        let mut hits: Vec<(f64, bool)> = Vec::new();
        for s in &line.segments {
            if let Some(t) = s.intersect_param(&a.p, &b.p) {
                let (sa, sb) = (s.side(&a.p), s.side(&b.p));
                if sa == sb {
                    continue;
                }
                hits.push((t, sb > sa));
            }
        }
        hits.sort_by(|x, y| x.0.total_cmp(&y.0));
        for (t, forward) in hits {
            match &pending {
                None => {
                    pending = Some(Pending {
                        forward,
                        frame_f: f64::from(a.frame) + t * f64::from(b.frame - a.frame),
                        at: Point::new(a.p.x + t * (b.p.x - a.p.x), a.p.y + t * (b.p.y - a.p.y)),
                        inferred,
                    })
                }
                // Same direction again before getting clear (a vertex, or touching twice): one crossing.
                Some(p) if p.forward == forward => {}
                // Back across before getting clear: jitter, neither counts.
                Some(_) => pending = None,
            }
        }
        // Confirmation needs a seen position: a prediction that drifts over the line and back while
        // the object is unseen must not count twice.
        if let Some(p) = &pending {
            if b.observed && distance_to_line(line, &b.p) >= hysteresis * b.height {
                out.push((p.forward, p.frame_f, p.at, p.inferred));
                pending = None;
            }
        }
    }
    if let (Some(p), Some(last)) = (&pending, c.points.last()) {
        if distance_to_line(line, &last.p) >= 0.5 * hysteresis * last.height {
            out.push((p.forward, p.frame_f, p.at, p.inferred));
        }
    }
    out
}

/// Zone visits of one counted track: entry and exit events (with hysteresis) and the frames inside.
struct Visit {
    entry: Option<(f64, Point, bool)>,
    exit: Option<(f64, Point, bool)>,
    first_frame: u32,
    last_frame: u32,
}

fn visits(c: &Counted, zone: &Zone, hysteresis: f64) -> Vec<Visit> {
    let mut out: Vec<Visit> = Vec::new();
    let Some(first) = c.points.first() else {
        return out;
    };
    let mut inside = zone.polygon.contains(&first.p);
    if inside {
        out.push(Visit {
            entry: None,
            exit: None,
            first_frame: first.frame,
            last_frame: first.frame,
        });
    }
    // Where the anchor last crossed the edge, waiting to get clear of it.
    let mut edge_crossing: Option<(f64, Point, bool)> = None;
    for k in 1..c.points.len() {
        let (a, b) = (c.points[k - 1], c.points[k]);
        let inferred = c.joins.contains(&k) || !a.observed || !b.observed;
        let now_inside = zone.polygon.contains(&b.p);
        if now_inside != zone.polygon.contains(&a.p) && edge_crossing.is_none() {
            let n = zone.polygon.corners.len();
            let t = (0..n)
                .filter_map(|i| {
                    Segment::new(zone.polygon.corners[i], zone.polygon.corners[(i + 1) % n])
                        .intersect_param(&a.p, &b.p)
                })
                .fold(1.0, f64::min);
            edge_crossing = Some((
                f64::from(a.frame) + t * f64::from(b.frame - a.frame),
                Point::new(a.p.x + t * (b.p.x - a.p.x), a.p.y + t * (b.p.y - a.p.y)),
                inferred,
            ));
        }
        if now_inside == inside {
            // Back on the side it was on: an edge crossing not yet confirmed is jitter.
            edge_crossing = None;
        } else if zone.polygon.distance_to_edge(&b.p) >= hysteresis * b.height {
            let at = edge_crossing
                .take()
                .unwrap_or((f64::from(b.frame), b.p, inferred));
            if now_inside {
                out.push(Visit {
                    entry: Some(at),
                    exit: None,
                    first_frame: b.frame,
                    last_frame: b.frame,
                });
            } else if let Some(v) = out.last_mut() {
                v.exit = Some(at);
            }
            inside = now_inside;
        }
        if inside {
            if let Some(v) = out.last_mut() {
                v.last_frame = b.frame;
            }
        }
    }
    out
}

/// Percentile with linear interpolation between order statistics (NumPy's default method).
pub fn percentile(sorted: &[f64], p: f64) -> Option<f64> {
    if sorted.is_empty() {
        return None;
    }
    let rank = p * (sorted.len() - 1) as f64;
    let (lo, hi) = (rank.floor() as usize, rank.ceil() as usize);
    Some(sorted[lo] + (sorted[hi] - sorted[lo]) * (rank - lo as f64))
}

fn summary(mut values: Vec<f64>) -> Summary {
    values.retain(|v| v.is_finite());
    values.sort_by(f64::total_cmp);
    let n = values.len();
    Summary {
        count: n,
        mean: (n > 0).then(|| values.iter().sum::<f64>() / n as f64),
        median: percentile(&values, 0.5),
        p85: percentile(&values, 0.85),
    }
}

/// Peak hour over interval totals: the run of `per_hour` consecutive whole intervals with the highest
/// sum (the earliest among equals).
pub fn peak_hour(totals: &[u64], per_hour: usize) -> Option<(usize, u64, u64, f64)> {
    if per_hour == 0 || totals.len() < per_hour {
        return None;
    }
    let mut best: Option<(usize, u64)> = None;
    for s in 0..=totals.len() - per_hour {
        let v: u64 = totals[s..s + per_hour].iter().sum();
        if best.is_none_or(|(_, b)| v > b) {
            best = Some((s, v));
        }
    }
    let (s, volume) = best?;
    let max = totals[s..s + per_hour].iter().copied().max().unwrap_or(0);
    let phf = if max > 0 {
        volume as f64 / (per_hour as f64 * max as f64)
    } else {
        0.0
    };
    Some((s, volume, max, phf))
}

/// Counts tracks against a plan.
pub fn count(tracks: &Tracks, plan: &Plan, tracker: Option<&TrackerConfig>) -> Report {
    let spec = &plan.spec;
    let fps = spec.frame_rate;
    let frame_count = tracks.frame_count.max(
        tracks
            .tracks
            .iter()
            .map(Track::last_frame)
            .max()
            .unwrap_or(0),
    );
    let timeline = Timeline {
        fps,
        start: plan.start,
        interval_s: spec.interval_minutes * 60.0,
        duration_s: f64::from(frame_count) / fps,
    };
    let n_intervals = timeline.count();
    let hysteresis = spec.rules.hysteresis;

    let pieces: Vec<Counted> = tracks
        .tracks
        .iter()
        .filter(|t| !t.boxes.is_empty())
        .map(|t| Counted {
            ids: vec![t.id],
            class: class_of(t),
            points: path(t, spec.anchor),
            joins: Vec::new(),
        })
        .collect();
    let mut joins = Vec::new();
    let mut counted = join_fragments(pieces, plan, &mut joins);
    counted.sort_by_key(|c| c.ids[0]);

    let make_event = |c: &Counted,
                      kind,
                      name: &str,
                      direction,
                      label: &str,
                      frame_f: f64,
                      at: Point,
                      inferred| {
        let seconds = timeline.seconds(frame_f);
        Event {
            track: c.ids[0],
            track_ids: c.ids.clone(),
            kind,
            name: name.to_string(),
            direction,
            label: label.to_string(),
            frame: frame_f.ceil() as u32,
            seconds: (seconds * 1000.0).round() / 1000.0,
            time: timeline.label(seconds),
            class: c.class.clone(),
            x: (at.x * 100.0).round() / 100.0,
            y: (at.y * 100.0).round() / 100.0,
            inferred,
        }
    };

    let mut events = Vec::new();
    let mut screenlines = Vec::new();
    for line in &plan.screenlines {
        let mut per_interval: Vec<IntervalCount> = (0..n_intervals)
            .map(|i| {
                let (start, end, partial) = timeline.bounds(i);
                IntervalCount {
                    start,
                    end,
                    partial,
                    forward: 0,
                    backward: 0,
                    by_class: BTreeMap::new(),
                }
            })
            .collect();
        let mut by_class: BTreeMap<String, DirectionCounts> = BTreeMap::new();
        let (mut forward, mut backward, mut inferred_n) = (0, 0, 0);
        for c in &counted {
            for (is_forward, frame_f, at, inferred) in crossings(c, line, hysteresis) {
                let (direction, label) = if is_forward {
                    ("forward", line.forward.as_str())
                } else {
                    ("backward", line.backward.as_str())
                };
                let e = make_event(
                    c,
                    "screenline",
                    &line.name,
                    direction,
                    label,
                    frame_f,
                    at,
                    inferred,
                );
                let slot = &mut per_interval[timeline.index(e.seconds)];
                let cls = slot.by_class.entry(c.class.clone()).or_default();
                let total = by_class.entry(c.class.clone()).or_default();
                if is_forward {
                    forward += 1;
                    slot.forward += 1;
                    cls.forward += 1;
                    total.forward += 1;
                } else {
                    backward += 1;
                    slot.backward += 1;
                    cls.backward += 1;
                    total.backward += 1;
                }
                inferred_n += u64::from(inferred);
                events.push(e);
            }
        }
        let per_hour = (60.0 / spec.interval_minutes).round() as usize;
        let whole: Vec<&IntervalCount> = per_interval.iter().filter(|i| !i.partial).collect();
        let peak = |f: &dyn Fn(&IntervalCount) -> u64| {
            let exact_hour = (60.0 / spec.interval_minutes).fract() == 0.0;
            let totals: Vec<u64> = whole.iter().map(|i| f(i)).collect();
            peak_hour(&totals, per_hour)
                .filter(|_| exact_hour)
                .map(|(s, volume, max, phf)| PeakHour {
                    start: whole[s].start.clone(),
                    end: whole[s + per_hour - 1].end.clone(),
                    volume,
                    peak_interval_volume: max,
                    phf: (phf * 1000.0).round() / 1000.0,
                })
        };
        screenlines.push(ScreenlineReport {
            name: line.name.clone(),
            forward_label: line.forward.clone(),
            backward_label: line.backward.clone(),
            forward,
            backward,
            inferred: inferred_n,
            by_class,
            peak_hour: peak(&|i| i.forward + i.backward),
            peak_hour_forward: peak(&|i| i.forward),
            peak_hour_backward: peak(&|i| i.backward),
            intervals: per_interval,
        });
    }

    let mut zones = Vec::new();
    // Per counted track, its zone visits, for movements.
    let mut zone_meetings: Vec<Vec<(f64, String)>> = vec![Vec::new(); counted.len()];
    for zone in &plan.zones {
        let mut report = ZoneReport {
            name: zone.name.clone(),
            entries: 0,
            exits: 0,
            present_at_start: 0,
            present_at_end: 0,
            entries_by_class: BTreeMap::new(),
            exits_by_class: BTreeMap::new(),
            intervals: (0..n_intervals)
                .map(|i| {
                    let (start, end, _) = timeline.bounds(i);
                    ZoneInterval {
                        start,
                        end,
                        entries: 0,
                        exits: 0,
                        mean_occupancy: 0.0,
                        max_occupancy: 0,
                    }
                })
                .collect(),
            dwell_seconds: summary(Vec::new()),
        };
        let mut occupancy = vec![0u64; frame_count as usize + 2];
        let mut dwell = Vec::new();
        for (ci, c) in counted.iter().enumerate() {
            for v in visits(c, zone, spec.rules.zone_hysteresis()) {
                for f in v.first_frame..=v.last_frame {
                    if let Some(o) = occupancy.get_mut(f as usize) {
                        *o += 1;
                    }
                }
                match v.entry {
                    Some((frame_f, at, inferred)) => {
                        let e = make_event(
                            c, "zone", &zone.name, "entry", "entry", frame_f, at, inferred,
                        );
                        report.entries += 1;
                        *report.entries_by_class.entry(c.class.clone()).or_default() += 1;
                        report.intervals[timeline.index(e.seconds)].entries += 1;
                        zone_meetings[ci].push((e.seconds, zone.name.clone()));
                        events.push(e);
                    }
                    None => {
                        report.present_at_start += 1;
                        zone_meetings[ci].push((
                            timeline.seconds(f64::from(v.first_frame)),
                            zone.name.clone(),
                        ));
                    }
                }
                match v.exit {
                    Some((frame_f, at, inferred)) => {
                        let e = make_event(
                            c, "zone", &zone.name, "exit", "exit", frame_f, at, inferred,
                        );
                        report.exits += 1;
                        *report.exits_by_class.entry(c.class.clone()).or_default() += 1;
                        report.intervals[timeline.index(e.seconds)].exits += 1;
                        if let Some((entry_f, _, _)) = v.entry {
                            dwell.push((frame_f - entry_f) / fps);
                        }
                        events.push(e);
                    }
                    None => report.present_at_end += 1,
                }
            }
        }
        for (i, slot) in report.intervals.iter_mut().enumerate() {
            let first = (i as f64 * timeline.interval_s * fps).floor() as usize + 1;
            let last = (((i + 1) as f64 * timeline.interval_s * fps).floor() as usize)
                .min(frame_count as usize);
            if last >= first {
                let frames = &occupancy[first..=last];
                slot.max_occupancy = frames.iter().copied().max().unwrap_or(0);
                let mean = frames.iter().sum::<u64>() as f64 / frames.len() as f64;
                slot.mean_occupancy = (mean * 100.0).round() / 100.0;
            }
        }
        report.dwell_seconds = summary(dwell);
        zones.push(report);
    }

    // Movements: every screenline crossing and zone meeting of a track, in time order.
    let mut meetings: Vec<Vec<(f64, String)>> = zone_meetings;
    for e in events.iter().filter(|e| e.kind == "screenline") {
        if let Ok(ci) = counted.binary_search_by_key(&e.track, |c| c.ids[0]) {
            meetings[ci].push((e.seconds, e.name.clone()));
        }
    }
    let mut movement_counts: BTreeMap<(String, String, String), u64> = BTreeMap::new();
    let mut single = 0;
    for (ci, m) in meetings.iter_mut().enumerate() {
        m.sort_by(|a, b| a.0.total_cmp(&b.0));
        match m.len() {
            0 => {}
            1 => single += 1,
            _ => {
                let key = (
                    m[0].1.clone(),
                    m[m.len() - 1].1.clone(),
                    counted[ci].class.clone(),
                );
                *movement_counts.entry(key).or_default() += 1;
            }
        }
    }
    let movements = movement_counts
        .into_iter()
        .map(|((origin, destination, class), count)| Movement {
            u_turn: origin == destination,
            origin,
            destination,
            class,
            count,
        })
        .collect();

    let speeds = plan.calibration.as_ref().map(|h| {
        let unit = spec
            .calibration
            .as_ref()
            .map_or("m".to_string(), |c| c.unit.clone());
        let step = (fps.round() as usize).max(1);
        let mut per_track = Vec::new();
        for c in &counted {
            // Sample the path about once a second, so that box jitter does not add distance.
            let mut samples: Vec<&PathPoint> = c.points.iter().step_by(step).collect();
            if let Some(last) = c.points.last() {
                if samples.last().is_none_or(|s| s.frame != last.frame) {
                    samples.push(last);
                }
            }
            let ground: Vec<(f64, f64)> =
                samples.iter().map(|s| h.to_ground(s.p.x, s.p.y)).collect();
            let distance: f64 = ground
                .windows(2)
                .map(|w| (w[1].0 - w[0].0).hypot(w[1].1 - w[0].1))
                .sum();
            let seconds = f64::from(c.points[c.points.len() - 1].frame - c.points[0].frame) / fps;
            if seconds >= 1.0 && distance.is_finite() {
                per_track.push(TrackSpeed {
                    track: c.ids[0],
                    class: c.class.clone(),
                    distance: (distance * 100.0).round() / 100.0,
                    seconds: (seconds * 100.0).round() / 100.0,
                    speed: ((distance / seconds) * 1000.0).round() / 1000.0,
                });
            }
        }
        let mut by_class: BTreeMap<String, Vec<f64>> = BTreeMap::new();
        for t in &per_track {
            by_class.entry(t.class.clone()).or_default().push(t.speed);
        }
        let all = summary(per_track.iter().map(|t| t.speed).collect());
        let kmh = |v: Option<f64>| v.map(|x| (x * 3.6 * 100.0).round() / 100.0);
        let all_kmh = (unit == "m").then(|| Summary {
            count: all.count,
            mean: kmh(all.mean),
            median: kmh(all.median),
            p85: kmh(all.p85),
        });
        SpeedReport {
            unit,
            by_class: by_class.into_iter().map(|(k, v)| (k, summary(v))).collect(),
            all,
            all_kmh,
            tracks: per_track,
        }
    });

    events.sort_by(|a, b| {
        a.seconds
            .total_cmp(&b.seconds)
            .then(a.track.cmp(&b.track))
            .then(a.name.cmp(&b.name))
    });
    Report {
        format: "throughline-report",
        version: 1,
        generator: format!("throughline {}", crate::VERSION),
        caution: CAUTION,
        plan: spec.clone(),
        tracker: tracker.cloned(),
        frame_count,
        duration_seconds: (timeline.duration_s * 1000.0).round() / 1000.0,
        tracks_counted: counted.len(),
        screenlines,
        zones,
        movements,
        single_feature_tracks: single,
        speeds,
        joins,
        events,
    }
}

/// The report as JSON text, exactly as every adapter writes it.
pub fn report_json(report: &Report) -> String {
    serde_json::to_string_pretty(report).unwrap_or_default()
}

/// The counts CSV: `screenline,direction,class,interval_start,interval_end,count`, one row per
/// screenline, direction, class seen on that line, and interval (zeros included).
pub fn counts_csv(report: &Report) -> String {
    let mut out = String::from("screenline,direction,class,interval_start,interval_end,count\n");
    let quote = |s: &str| {
        if s.contains([',', '"', '\n']) {
            format!("\"{}\"", s.replace('"', "\"\""))
        } else {
            s.to_string()
        }
    };
    for line in &report.screenlines {
        for (forward, label) in [(true, &line.forward_label), (false, &line.backward_label)] {
            for class in line.by_class.keys() {
                for i in &line.intervals {
                    let c = i.by_class.get(class).copied().unwrap_or_default();
                    let n = if forward { c.forward } else { c.backward };
                    out.push_str(&format!(
                        "{},{},{},{},{},{}\n",
                        quote(&line.name),
                        quote(label),
                        quote(class),
                        i.start,
                        i.end,
                        n
                    ));
                }
            }
        }
    }
    out
}
