//! The signs that a moment may be wrong, each a rule of thumb of our own (the thresholds and
//! weights are in the parent module): about a crossing (a short track, joined pieces, two crossings
//! close together, hidden, barely seen, at a track's end) and about a track (appearing or
//! vanishing near a line, a class that changes).

use std::collections::HashMap;

use super::{
    boxes_of, crossing_ref, doubt, end_doubt, Doubt, DoubtKind, Scene, AT_END_SECONDS, CLASS_SHARE,
    CLOSE_SECONDS, HIDDEN_LONG, LOW_SCORE, NEAR_LINE_HEIGHTS, ON_LINE_HEIGHTS, SHORT_BOXES,
    SHORT_SECONDS,
};
use crate::geometry::{BBox, Point};
use crate::plan::{Anchor, Plan};
use crate::report::{Event, EventKind, Report};
use crate::track::Track;

/// The doubts about crossing `e`; `earlier` holds the crossings before it that may be close to it.
pub(super) fn crossing_doubts(
    e: &Event,
    earlier: &[&Event],
    by_id: &HashMap<u32, &Track>,
    scene: &Scene,
    out: &mut Vec<Doubt>,
) {
    let ids = &e.track_ids;
    let boxes: Vec<_> = boxes_of(by_id, ids).collect();
    let seen = boxes.iter().filter(|b| b.observed).count();
    let first = boxes.iter().min_by_key(|b| b.frame);
    let last = boxes.iter().max_by_key(|b| b.frame);
    let span = match (first, last) {
        (Some(a), Some(b)) => f64::from(b.frame - a.frame + 1) / scene.fps,
        _ => 0.0,
    };
    if span < SHORT_SECONDS || seen < SHORT_BOXES {
        let why = format!(
            "Counted from a track seen for only {span:.1} s ({seen} boxes): it may be a piece of \
             someone counted already, or not {} at all.",
            a_noun(&e.class)
        );
        out.push(doubt(DoubtKind::ShortTrack, e, ids.clone(), why, 6));
    } else if let (Some(a), Some(b)) = (first, last) {
        at_track_end(e, (a, b), scene, out);
    }
    if ids.len() > 1 {
        let list: Vec<String> = ids.iter().map(u32::to_string).collect();
        let named = crate::text::listed(&list, "and");
        let why = format!(
            "Counted after joining tracks {named} that the tracker lost and found again near the \
             line: check that they are one {}.",
            noun(&e.class)
        );
        out.push(doubt(DoubtKind::JoinedTrack, e, ids.clone(), why, 2));
    }
    close_together(e, earlier, &boxes, out);
    if e.inferred {
        hidden(e, &boxes, scene.fps, out);
    }
    let near: Vec<f64> = boxes
        .iter()
        .filter(|b| b.observed && b.frame.abs_diff(e.frame) <= 12)
        .map(|b| b.score)
        .collect();
    let score = near.iter().sum::<f64>() / near.len().max(1) as f64;
    if !near.is_empty() && score < LOW_SCORE {
        let why = format!(
            "The detector barely saw it at the line (confidence {score:.2}): check it is {}.",
            a_noun(&e.class)
        );
        out.push(doubt(DoubtKind::BarelySeen, e, ids.clone(), why, 3));
    }
}

/// A crossing counted while hidden, doubted the more the longer it was unseen around the line:
/// the frames between its last box seen before the crossing and its first seen after.
fn hidden(e: &Event, boxes: &[&crate::track::TrackBox], fps: f64, out: &mut Vec<Doubt>) {
    let seen = boxes.iter().filter(|b| b.observed);
    // The crossing's frame is the first at or past the line: the step into it may be the one
    // where the track is seen again.
    let before = seen
        .clone()
        .filter(|b| b.frame < e.frame)
        .map(|b| b.frame)
        .max();
    let after = seen.filter(|b| b.frame >= e.frame).map(|b| b.frame).min();
    let frames = match (before, after) {
        (Some(a), Some(b)) => b - a - 1,
        _ => 0,
    };
    let unseen = f64::from(frames) / fps;
    let weight = match unseen {
        u if u >= HIDDEN_LONG[1] => 6,
        u if u >= HIDDEN_LONG[0] => 3,
        _ => 1,
    };
    let how_long = match frames {
        0 => String::new(),
        1 => " for 1 frame".to_string(),
        n if unseen < 0.1 => format!(" for {n} frames"),
        n => format!(" for {n} frames ({unseen:.1} s)"),
    };
    let likely = if weight > 1 {
        "; the longer unseen, the likelier the track came back on someone else"
    } else {
        ""
    };
    let why = format!(
        "Counted {} on `{}` while hidden{how_long}: where track {} crossed was predicted, not \
         seen{likely}.",
        e.label, e.name, e.track
    );
    out.push(doubt(
        DoubtKind::Hidden,
        e,
        e.track_ids.clone(),
        why,
        weight,
    ));
}

/// A crossing within moments of its track's first or last box: the tracker may have picked this
/// person up again just before the line (someone counted twice), or lost them, or swapped two
/// people there. Ends where the footage itself starts or ends are left out; an end at the
/// picture's edge (someone coming into view or leaving it by a line drawn near the edge, as at a
/// doorway) is a lesser doubt, weight 1: there every crossing is near its track's end, and which
/// side it came from, or went to, was not seen. Both ends are weighed; the heavier is the doubt.
fn at_track_end(
    e: &Event,
    (first, last): (&crate::track::TrackBox, &crate::track::TrackBox),
    scene: &Scene,
    out: &mut Vec<Doubt>,
) {
    // Each end (not the footage's own) weighed; the heavier is the doubt (an end at the picture's
    // edge just before the line must not hide one lost just after it), the nearer on a tie.
    let weighed = [(first, true), (last, false)]
        .into_iter()
        .filter(|(b, starts)| !scene.at_footage_edge(b.frame, *starts))
        .filter_map(|(b, starts)| {
            let seconds = f64::from(b.frame.abs_diff(e.frame)) / scene.fps;
            let at_edge = scene.at_edge(&b.bbox);
            let weight = match seconds {
                _ if seconds >= AT_END_SECONDS[0] => return None,
                _ if at_edge => 1,
                s if s < AT_END_SECONDS[1] => 5,
                _ => 2,
            };
            Some((weight, seconds, starts, at_edge))
        })
        .max_by(|a, b| a.0.cmp(&b.0).then(b.1.total_cmp(&a.1)));
    let Some((weight, seconds, starts, at_edge)) = weighed else {
        return;
    };
    let what = noun(&e.class);
    let why = match (starts, at_edge) {
        (true, true) => format!(
            "Counted {seconds:.1} s after its track comes into view at the picture's edge: which \
             side of the line this {what} came from was not seen."
        ),
        (false, true) => format!(
            "Counted {seconds:.1} s before its track leaves the picture at its edge: which side of \
             the line this {what} went to was not seen."
        ),
        (true, false) => format!(
            "Counted {seconds:.1} s after its track begins: the tracker may have lost this {what} \
             just before the line (counted twice?), taken someone else for them, or not seen \
             which side they came from."
        ),
        (false, false) => format!(
            "Counted {seconds:.1} s before its track ends: the tracker may have lost this {what} \
             just after the line, or followed someone else across it."
        ),
    };
    out.push(doubt(
        DoubtKind::AtTrackEnd,
        e,
        e.track_ids.clone(),
        why,
        weight,
    ));
}

/// A class as a noun in the reasons' sentences ("object" for boxes without one).
fn noun(class: &str) -> &str {
    if class == crate::count::UNCLASSIFIED {
        "object"
    } else {
        class
    }
}

/// [`noun`] with "a" or "an" before it.
fn a_noun(class: &str) -> String {
    let n = noun(class);
    let vowel = n.chars().next().is_some_and(|c| "aeiouAEIOU".contains(c));
    format!("{} {n}", if vowel { "an" } else { "a" })
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
        let mut d = doubt(
            DoubtKind::CloseTogether,
            e,
            vec![first.track, then.track],
            why,
            2,
        );
        d.close_to = Some(crossing_ref(o));
        out.push(d);
    }
}

pub(super) fn anchor(b: &BBox, a: Anchor) -> Point {
    match a {
        Anchor::Bottom => b.bottom_centre(),
        Anchor::Centre => b.centre(),
    }
}

/// A track that appears or disappears within a box height of a line, away from the picture's
/// edge, may be someone the tracker lost and found: counted twice, or not at all. Tracks there
/// from the footage's first second, or to its last, appear and disappear because the footage
/// starts and ends: they are doubted only when on the line itself, leaving it, with no crossing
/// of it counted (someone crossing as the recording began is not counted: a newcomer's trial).
pub(super) fn line_end_doubts(
    t: &Track,
    plan: &Plan,
    report: &Report,
    scene: &Scene,
    out: &mut Vec<Doubt>,
) {
    let (Some(first), Some(last)) = (t.boxes.first(), t.boxes.last()) else {
        return;
    };
    for (tb, starts) in [(first, true), (last, false)] {
        if scene.at_edge(&tb.bbox) {
            continue;
        }
        let h = tb.bbox.h.max(1.0);
        // The nearest line, in box heights.
        let nearest = plan
            .screenlines
            .iter()
            .map(|l| (l, distance(&tb.bbox, l, plan.spec.anchor) / h))
            .min_by(|a, b| a.1.total_cmp(&b.1));
        let Some((line, heights)) = nearest.filter(|n| n.1 <= NEAR_LINE_HEIGHTS) else {
            continue;
        };
        let at_footage_edge = scene.at_footage_edge(tb.frame, starts);
        let why = if at_footage_edge {
            match on_the_line_as_footage_ends(t, line, (heights, h), starts, (plan, report)) {
                Some(why) => why,
                None => continue,
            }
        } else {
            let verb = if starts { "appears" } else { "disappears" };
            format!(
                "Track {} {verb} close to `{}` ({heights:.1} times its box's height away), not at \
                 the picture's edge: someone lost and found again may be counted twice, or not at \
                 all.",
                t.id, line.name
            )
        };
        // The key names the end (a person's decisions on a moment are kept by its key).
        let end = if starts {
            DoubtKind::StartsNearLine
        } else {
            DoubtKind::EndsNearLine
        };
        let kind = if at_footage_edge {
            DoubtKind::OnLineAtFootageEdge
        } else {
            end
        };
        let key = format!("{end:?}:{}:{}", t.id, tb.frame);
        let fps = plan.spec.frame_rate;
        out.push(end_doubt((key, kind), (t.id, tb.frame), why, (fps, report)));
    }
}

/// How far a box's anchor is from a line, in pixels.
fn distance(b: &BBox, line: &crate::plan::Screenline, a: Anchor) -> f64 {
    let p = anchor(b, a);
    line.segments
        .iter()
        .map(|s| s.distance_to(&p))
        .fold(f64::INFINITY, f64::min)
}

/// Why a track there as the footage starts (or ends) is doubted: on the line itself (`heights`
/// from it; `h` its box's height), leaving it, with no crossing of it counted, it may have been
/// crossing. `None` otherwise: it appears or disappears because the footage starts or ends.
fn on_the_line_as_footage_ends(
    t: &Track,
    line: &crate::plan::Screenline,
    (heights, h): (f64, f64),
    starts: bool,
    (plan, report): (&Plan, &Report),
) -> Option<String> {
    if heights > ON_LINE_HEIGHTS {
        return None;
    }
    let anchor = plan.spec.anchor;
    let leaves = || {
        t.boxes
            .iter()
            .any(|b| distance(&b.bbox, line, anchor) > ON_LINE_HEIGHTS * h)
    };
    let counted = || {
        report
            .events
            .iter()
            .any(|e| e.name == line.name && e.track_ids.contains(&t.id))
    };
    if !leaves() || counted() {
        return None;
    }
    let (when, how) = match starts {
        true => ("starts", "if it had just crossed"),
        false => ("ends", "if it was crossing"),
    };
    Some(format!(
        "Track {} is on `{}` as the footage {when}: {how}, that crossing is not counted (which \
         side it came from or went to was not seen).",
        t.id, line.name
    ))
}

/// The clock label of a moment, as the report's events write it.
pub(super) fn label_at(report: &Report, seconds: f64) -> String {
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
pub(super) fn class_doubt(t: &Track, report: &Report, out: &mut Vec<Doubt>) {
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
