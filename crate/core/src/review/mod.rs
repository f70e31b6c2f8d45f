//! The review queue: the moments of a count most likely wrong, most doubtful first, each saying in
//! plain words why, so a person checks those against the footage before signing the count. The
//! signs and their thresholds are our own rules of thumb (stated with each), not a published
//! method: they point at the mistakes trackers make near a line (a walker broken in two, two
//! walkers joined, a shadow, someone unseen in a crowd).

use std::collections::HashMap;

use crate::edits::Way;
use crate::geometry::BBox;
use crate::plan::Plan;
use crate::report::{Direction, Event, EventKind, Report};
use crate::track::{Track, Tracks};
use schemars::JsonSchema;
use serde::Serialize;

mod signs;
mod zones;
use signs::{class_doubt, crossing_doubts, line_end_doubts};

/// Why a moment is doubtful.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum DoubtKind {
    /// Counted from a track seen less than a second (or fewer than 8 boxes).
    ShortTrack,
    /// Counted within moments of where its track begins or ends (not where the footage itself
    /// starts or ends): the tracker may have lost someone there, or swapped two people.
    AtTrackEnd,
    /// Counted after joining tracks the tracker had lost and found.
    JoinedTrack,
    /// Two crossings of one line within a second and a box height of each other.
    CloseTogether,
    /// Counted while the object was hidden: its position at the line was predicted.
    Hidden,
    /// The detector barely saw it near the line (low confidence).
    BarelySeen,
    /// A track that appears or disappears near a line, away from the picture's edge (and not
    /// because the footage starts or ends).
    StartsNearLine,
    EndsNearLine,
    /// A track on a line as the footage starts (or ends) that leaves it, with no crossing of that
    /// line counted: it may have been crossing.
    OnLineAtFootageEdge,
    /// A counted track whose boxes were given different classes.
    ClassChanges,
    /// A track that appears (or disappears) inside a zone, away from the picture's edge and not
    /// as the footage starts (or ends): first (or last) seen inside, with no entry (or exit)
    /// counted, though someone may have come in (or left) unseen.
    StartsInsideZone,
    EndsInsideZone,
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
    /// For two crossings close together, the other one (either may be the one counted twice).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub close_to: Option<CrossingRef>,
    /// Each reason in plain words, one sentence each, in the order of `kinds`.
    pub why: Vec<String>,
    /// Higher is more doubtful (the reasons' weights added): the queue's order.
    pub weight: u32,
}

/// Thresholds of the rules of thumb (our own choice). The weights that order the queue were
/// chosen from how often each sign pointed at a wrong or missed crossing in simulated crowds
/// (BENCHMARKS.md, "The review queue"): a long time hidden at the line and a crossing at a
/// track's very end point at mistakes far more often than two crossings close together or a
/// track that appears near a line, which a busy line has by the hundred.
const SHORT_SECONDS: f64 = 1.0;
/// Hidden at the line this long or longer: doubted more (seconds), and most.
const HIDDEN_LONG: [f64; 2] = [0.4, 1.2];
/// A crossing this close to its track's first or last box (seconds): doubted, and more so.
const AT_END_SECONDS: [f64; 2] = [1.6, 0.8];
const SHORT_BOXES: usize = 8;
const CLOSE_SECONDS: f64 = 1.0;
const LOW_SCORE: f64 = 0.45;
const NEAR_LINE_HEIGHTS: f64 = 1.0;
/// On a line: this close to it, in box heights (a track there as the footage starts or ends).
const ON_LINE_HEIGHTS: f64 = 0.25;
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
    let scene = Scene {
        fps: plan.spec.frame_rate,
        size: picture.unwrap_or_else(|| extent_of(tracks)),
        frame_count: report.frame_count,
    };
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
        crossing_doubts(e, &crossings[from..k], &by_id, &scene, &mut out);
    }
    for t in &tracks.tracks {
        line_end_doubts(t, plan, report, &scene, &mut out);
        zones::zone_end_doubts(t, plan, report, &scene, &mut out);
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

/// What the signs need of the footage: its frame rate, the picture's size in pixels and its
/// length in frames.
struct Scene {
    fps: f64,
    size: (f64, f64),
    frame_count: u32,
}

impl Scene {
    /// Whether a box touches the picture's edge (where people come into view and leave it).
    fn at_edge(&self, b: &BBox) -> bool {
        let (w, h) = self.size;
        b.x <= EDGE_SHARE * w
            || b.y <= EDGE_SHARE * h
            || b.x + b.w >= (1.0 - EDGE_SHARE) * w
            || b.y + b.h >= (1.0 - EDGE_SHARE) * h
    }

    /// Whether a track that begins (`starts`) or ends at `frame` does so because the footage
    /// does: within its first second, or its last.
    fn at_footage_edge(&self, frame: u32, starts: bool) -> bool {
        let second = self.fps.round().max(1.0) as u32;
        if starts {
            frame <= second
        } else {
            frame.saturating_add(second) > self.frame_count
        }
    }
}

/// One entry per moment: the doubts about one crossing (or one track's end) become one entry with
/// all their reasons, most weighty first, and the weights added.
fn grouped(doubts: Vec<Doubt>) -> Vec<Doubt> {
    let mut out: Vec<Doubt> = Vec::new();
    // Each entry's reasons with their own weights, to order them once all are in.
    let mut reasons: Vec<Vec<(u32, DoubtKind, String)>> = Vec::new();
    // Where each key's entry is in `out`: an hour of a busy scene has thousands of moments.
    let mut at: HashMap<String, usize> = HashMap::new();
    for mut d in doubts {
        let these: Vec<_> = d
            .kinds
            .drain(..)
            .zip(d.why.drain(..))
            .map(|(k, w)| (d.weight, k, w))
            .collect();
        match at.get(&d.key) {
            Some(&k) => {
                let o = &mut out[k];
                o.weight += d.weight;
                o.close_to = o.close_to.take().or(d.close_to);
                reasons[k].extend(these);
                for t in d.tracks {
                    if !o.tracks.contains(&t) {
                        o.tracks.push(t);
                    }
                }
            }
            None => {
                at.insert(d.key.clone(), out.len());
                out.push(d);
                reasons.push(these);
            }
        }
    }
    for (o, mut r) in out.iter_mut().zip(reasons) {
        r.sort_by_key(|reason| std::cmp::Reverse(reason.0));
        (o.kinds, o.why) = r.into_iter().map(|(_, k, w)| (k, w)).unzip();
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
        crossing: Some(crossing_ref(e)),
        close_to: None,
        why: vec![why],
        weight,
    }
}

/// A doubt about one end of track `track` (it appears or disappears at `frame`), with one reason.
fn end_doubt(
    (key, kind): (String, DoubtKind),
    (track, frame): (u32, u32),
    why: String,
    (fps, report): (f64, &Report),
) -> Doubt {
    let seconds = (f64::from(frame) - 1.0) / fps;
    Doubt {
        key,
        kinds: vec![kind],
        frame,
        seconds: (seconds * 1000.0).round() / 1000.0,
        time: signs::label_at(report, seconds),
        tracks: vec![track],
        crossing: None,
        close_to: None,
        why: vec![why],
        weight: 1,
    }
}

/// A crossing as a reject edit names it.
fn crossing_ref(e: &Event) -> CrossingRef {
    CrossingRef {
        screenline: e.name.clone(),
        direction: way(e.direction),
        track: e.track,
        frame: e.frame,
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

/// The picture's size as far as the boxes reach: the queue's picture when none is given, and
/// what a given size is checked against.
pub fn extent_of(tracks: &Tracks) -> (f64, f64) {
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
