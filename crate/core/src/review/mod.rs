//! The review queue: the moments of a count most likely wrong, most doubtful first, each saying in
//! plain words why, so a person checks those against the footage before signing the count. The
//! signs and their thresholds are our own rules of thumb (stated with each), not a published
//! method: they point at the mistakes trackers make near a line (a walker broken in two, two
//! walkers joined, a shadow, someone unseen in a crowd).

use std::collections::HashMap;

use crate::edits::Way;
use crate::geometry::{BBox, Point};
use crate::plan::{Anchor, Plan};
use crate::report::{Direction, Event, EventKind, Report};
use crate::track::{Track, Tracks};
use schemars::JsonSchema;
use serde::Serialize;

/// Why a moment is doubtful.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum DoubtKind {
    /// Counted from a track seen less than a second (or fewer than 8 boxes).
    ShortTrack,
    /// Counted after joining tracks the tracker had lost and found.
    JoinedTrack,
    /// Two crossings of one line within a second and a box height of each other.
    CloseTogether,
    /// Counted while the object was hidden: its position at the line was predicted.
    Hidden,
    /// The detector barely saw it near the line (low confidence).
    BarelySeen,
    /// A track that appears or disappears near a line, away from the picture's edge.
    StartsNearLine,
    EndsNearLine,
    /// A counted track whose boxes were given different classes.
    ClassChanges,
}

/// The crossing a doubt is about, as a reject edit names it.
#[derive(Debug, Clone, PartialEq, Serialize, JsonSchema)]
pub struct CrossingRef {
    pub screenline: String,
    pub direction: Way,
    pub track: u32,
    pub frame: u32,
}

/// One moment to check, with every reason to doubt it.
#[derive(Debug, Clone, PartialEq, Serialize, JsonSchema)]
pub struct Doubt {
    /// Stable while the tracks and plan stay the same: for keeping the person's decision.
    pub key: String,
    /// The reasons, most weighty first (at least one).
    pub kinds: Vec<DoubtKind>,
    /// Where to look: frame (1-based), seconds from frame 1, and its clock label.
    pub frame: u32,
    pub seconds: f64,
    pub time: String,
    /// The tracks concerned (counted tracks are named by their first id).
    pub tracks: Vec<u32>,
    /// The crossing concerned, when it is one (to reject it).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub crossing: Option<CrossingRef>,
    /// Each reason in plain words, one sentence each, in the order of `kinds`.
    pub why: Vec<String>,
    /// Higher is more doubtful (the reasons' weights added): the queue's order.
    pub weight: u32,
}

/// Thresholds of the rules of thumb (our own choice).
const SHORT_SECONDS: f64 = 1.0;
const SHORT_BOXES: usize = 8;
const CLOSE_SECONDS: f64 = 1.0;
const LOW_SCORE: f64 = 0.45;
const NEAR_LINE_HEIGHTS: f64 = 1.0;
const EDGE_SHARE: f64 = 0.03;
const CLASS_SHARE: f64 = 0.7;

/// The queue for tracks (after the person's edits on tracks), the plan and the report made from
/// them. `picture`: width and height in pixels, when known (else the extent of the boxes).
pub fn doubts(
    tracks: &Tracks,
    plan: &Plan,
    report: &Report,
    picture: Option<(f64, f64)>,
) -> Vec<Doubt> {
    let fps = plan.spec.frame_rate;
    let crossings: Vec<&Event> = report
        .events
        .iter()
        .filter(|e| e.kind == EventKind::Screenline && !e.added)
        .collect();
    let mut by_id: HashMap<u32, &Track> = HashMap::new();
    for t in &tracks.tracks {
        by_id.entry(t.id).or_insert(t);
    }
    // In time order (as the report writes them), the crossings more than CLOSE_SECONDS before one
    // cannot be close to it nor to any after it, so they are passed over for good.
    let in_time_order = crossings.windows(2).all(|w| w[0].seconds <= w[1].seconds);
    let mut from = 0;
    let mut out = Vec::new();
    for (k, e) in crossings.iter().enumerate() {
        while in_time_order && e.seconds - crossings[from].seconds > CLOSE_SECONDS {
            from += 1;
        }
        crossing_doubts(e, &crossings[from..k], &by_id, fps, &mut out);
    }
    let extent = picture.unwrap_or_else(|| extent_of(tracks));
    let footage = (fps, report.frame_count);
    for t in &tracks.tracks {
        line_end_doubts(t, plan, report, (extent, footage), &mut out);
        class_doubt(t, report, &mut out);
    }
    let mut queue = grouped(out);
    queue.sort_by(|a, b| {
        b.weight
            .cmp(&a.weight)
            .then(a.seconds.total_cmp(&b.seconds))
    });
    queue
}

/// One entry per moment: the doubts about one crossing (or one track's end) become one entry with
/// all their reasons, and the weights added.
fn grouped(doubts: Vec<Doubt>) -> Vec<Doubt> {
    let mut out: Vec<Doubt> = Vec::new();
    // Where each key's entry is in `out`: an hour of a busy scene has thousands of moments.
    let mut at: HashMap<String, usize> = HashMap::new();
    for d in doubts {
        match at.get(&d.key) {
            Some(&k) => {
                let o = &mut out[k];
                o.weight += d.weight;
                o.kinds.extend(d.kinds);
                o.why.extend(d.why);
                for t in d.tracks {
                    if !o.tracks.contains(&t) {
                        o.tracks.push(t);
                    }
                }
            }
            None => {
                at.insert(d.key.clone(), out.len());
                out.push(d);
            }
        }
    }
    out
}

fn way(d: Direction) -> Way {
    if d == Direction::Backward {
        Way::Backward
    } else {
        Way::Forward
    }
}

/// A doubt about crossing `e`; every doubt about one crossing shares its key.
fn doubt(kind: DoubtKind, e: &Event, tracks: Vec<u32>, why: String, weight: u32) -> Doubt {
    Doubt {
        key: format!("crossing:{}:{}:{}", e.name, e.track, e.frame),
        kinds: vec![kind],
        frame: e.frame,
        seconds: e.seconds,
        time: e.time.clone(),
        tracks,
        crossing: Some(CrossingRef {
            screenline: e.name.clone(),
            direction: way(e.direction),
            track: e.track,
            frame: e.frame,
        }),
        why: vec![why],
        weight,
    }
}

/// The boxes of a counted track (all its tracker ids), from the tracks by id.
fn boxes_of<'a>(
    by_id: &'a HashMap<u32, &'a Track>,
    ids: &'a [u32],
) -> impl Iterator<Item = &'a crate::track::TrackBox> {
    ids.iter()
        .filter_map(|id| by_id.get(id))
        .flat_map(|t| &t.boxes)
}

/// The doubts about crossing `e`; `earlier` holds the crossings before it that may be close to it.
fn crossing_doubts(
    e: &Event,
    earlier: &[&Event],
    by_id: &HashMap<u32, &Track>,
    fps: f64,
    out: &mut Vec<Doubt>,
) {
    let ids = &e.track_ids;
    let boxes: Vec<_> = boxes_of(by_id, ids).collect();
    let seen = boxes.iter().filter(|b| b.observed).count();
    let span = match (boxes.first(), boxes.last()) {
        (Some(a), Some(b)) => f64::from(b.frame - a.frame + 1) / fps,
        _ => 0.0,
    };
    if span < SHORT_SECONDS || seen < SHORT_BOXES {
        let why = format!(
            "Counted from a track seen for only {span:.1} s ({seen} boxes): it may be a piece of \
             someone counted already, or not a {} at all.",
            e.class
        );
        out.push(doubt(DoubtKind::ShortTrack, e, ids.clone(), why, 4));
    }
    if ids.len() > 1 {
        let list: Vec<String> = ids.iter().map(u32::to_string).collect();
        let why = format!(
            "Counted after joining tracks {} that the tracker lost and found again near the line: \
             check that they are one {}.",
            list.join(" and "),
            e.class
        );
        out.push(doubt(DoubtKind::JoinedTrack, e, ids.clone(), why, 3));
    }
    close_together(e, earlier, &boxes, out);
    if e.inferred {
        let why = "Counted while hidden: where it crossed the line was predicted, not seen.".into();
        out.push(doubt(DoubtKind::Hidden, e, ids.clone(), why, 2));
    }
    let near: Vec<f64> = boxes
        .iter()
        .filter(|b| b.observed && b.frame.abs_diff(e.frame) <= 12)
        .map(|b| b.score)
        .collect();
    let score = near.iter().sum::<f64>() / near.len().max(1) as f64;
    if !near.is_empty() && score < LOW_SCORE {
        let why = format!(
            "The detector barely saw it at the line (confidence {score:.2}): check it is a {}.",
            e.class
        );
        out.push(doubt(DoubtKind::BarelySeen, e, ids.clone(), why, 2));
    }
}

/// Another crossing of the same line less than a second before, within a box height.
fn close_together(
    e: &Event,
    earlier: &[&Event],
    boxes: &[&crate::track::TrackBox],
    out: &mut Vec<Doubt>,
) {
    let height = boxes
        .iter()
        .min_by_key(|b| b.frame.abs_diff(e.frame))
        .map_or(0.0, |b| b.bbox.h);
    let near = earlier.iter().rev().find(|o| {
        o.name == e.name
            && o.track != e.track
            && (e.seconds - o.seconds).abs() <= CLOSE_SECONDS
            && (o.x - e.x).hypot(o.y - e.y) <= height.max(1.0)
    });
    if let Some(o) = near {
        // Named in time order (the list is in time order but for a report put together by hand).
        let (first, then): (&Event, &Event) = if o.seconds <= e.seconds {
            (o, e)
        } else {
            (e, o)
        };
        let why = format!(
            "Two crossings of `{}` {:.1} s and {:.0} px apart (tracks {} and {}): one person \
             counted twice, or two people close together?",
            e.name,
            then.seconds - first.seconds,
            (o.x - e.x).hypot(o.y - e.y),
            first.track,
            then.track
        );
        out.push(doubt(
            DoubtKind::CloseTogether,
            e,
            vec![first.track, then.track],
            why,
            4,
        ));
    }
}

/// The picture's size as far as the boxes reach.
fn extent_of(tracks: &Tracks) -> (f64, f64) {
    tracks
        .tracks
        .iter()
        .flat_map(|t| &t.boxes)
        .fold((0.0, 0.0), |(w, h), b| {
            (
                f64::max(w, b.bbox.x + b.bbox.w),
                f64::max(h, b.bbox.y + b.bbox.h),
            )
        })
}

fn anchor(b: &BBox, a: Anchor) -> Point {
    match a {
        Anchor::Bottom => b.bottom_centre(),
        Anchor::Centre => b.centre(),
    }
}

/// A track that appears or disappears within a box height of a line, away from the picture's
/// edge, may be someone the tracker lost and found: counted twice, or not at all. Tracks there
/// from the footage's first second, or to its last, are left out: they appear and disappear
/// because the footage starts and ends.
fn line_end_doubts(
    t: &Track,
    plan: &Plan,
    report: &Report,
    ((w, h), (fps, frame_count)): ((f64, f64), (f64, u32)),
    out: &mut Vec<Doubt>,
) {
    let (Some(first), Some(last)) = (t.boxes.first(), t.boxes.last()) else {
        return;
    };
    let at_edge = |b: &BBox| {
        b.x <= EDGE_SHARE * w
            || b.y <= EDGE_SHARE * h
            || b.x + b.w >= (1.0 - EDGE_SHARE) * w
            || b.y + b.h >= (1.0 - EDGE_SHARE) * h
    };
    let second = fps.round().max(1.0) as u32;
    for (tb, starts) in [(first, true), (last, false)] {
        let footage_edge = if starts {
            tb.frame <= second
        } else {
            tb.frame + second > frame_count
        };
        if at_edge(&tb.bbox) || footage_edge {
            continue;
        }
        let p = anchor(&tb.bbox, plan.spec.anchor);
        let near = plan.screenlines.iter().find_map(|l| {
            let d = l
                .segments
                .iter()
                .map(|s| s.distance_to(&p))
                .fold(f64::INFINITY, f64::min);
            (d <= NEAR_LINE_HEIGHTS * tb.bbox.h).then_some((l, d / tb.bbox.h.max(1.0)))
        });
        let Some((line, heights)) = near else {
            continue;
        };
        let seconds = (f64::from(tb.frame) - 1.0) / plan.spec.frame_rate;
        let (kind, verb) = if starts {
            (DoubtKind::StartsNearLine, "appears")
        } else {
            (DoubtKind::EndsNearLine, "disappears")
        };
        out.push(Doubt {
            key: format!("{kind:?}:{}:{}", t.id, tb.frame),
            kinds: vec![kind],
            frame: tb.frame,
            seconds: (seconds * 1000.0).round() / 1000.0,
            time: label_at(report, seconds),
            tracks: vec![t.id],
            crossing: None,
            why: vec![format!(
                "Track {} {verb} {heights:.1} box heights from `{}`, not at the picture's edge: \
                 someone lost and found again may be counted twice, or not at all.",
                t.id, line.name
            )],
            weight: 3,
        });
    }
}

/// The clock label of a moment, as the report's events write it.
fn label_at(report: &Report, seconds: f64) -> String {
    let spec = &report.plan;
    match spec
        .start
        .as_deref()
        .and_then(crate::plan::clock::LocalTime::parse)
    {
        Some(t) => t.plus_seconds(seconds.floor() as i64).to_string(),
        None => crate::plan::clock::elapsed(seconds),
    }
}

/// A counted track whose boxes were given different classes.
fn class_doubt(t: &Track, report: &Report, out: &mut Vec<Doubt>) {
    let total: u32 = t.class_votes.iter().map(|v| v.1).sum();
    let Some((top, n)) = t.class_votes.first() else {
        return;
    };
    if total < 5 || f64::from(*n) / f64::from(total) >= CLASS_SHARE {
        return;
    }
    let Some(e) = report.events.iter().find(|e| e.track_ids.contains(&t.id)) else {
        return;
    };
    let votes: Vec<String> = t
        .class_votes
        .iter()
        .map(|(c, n)| format!("{c} {n} times"))
        .collect();
    let why = format!(
        "Its boxes were called {}: it is counted as {top}; check its class.",
        votes.join(", ")
    );
    let mut d = doubt(DoubtKind::ClassChanges, e, vec![t.id], why, 1);
    d.key = format!("ClassChanges:{}", t.id);
    if e.kind != EventKind::Screenline {
        d.crossing = None;
    }
    out.push(d);
}
