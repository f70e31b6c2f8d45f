//! Edits on tracks: merge, split, delete, reclassify, applied in order to a copy of the tracks.

use super::{Edit, Outcome, TrackRef};
use crate::geometry::BBox;
use crate::track::{Track, TrackBox, Tracks};
use std::collections::BTreeMap;

/// The tracks after the edits on tracks, and an outcome for each of those edits (`None` for the
/// edits on counts, which the counting applies).
pub fn apply_to_tracks(tracks: &Tracks, edits: &[Edit]) -> (Tracks, Vec<Option<Outcome>>) {
    let c = corrected_tracks(tracks, edits);
    (c.tracks, c.outcomes)
}

/// What the edits on tracks made: the tracks, an outcome for each edit, and the families of the
/// tracks a person split: each piece's id with the id of the track it was first split from, so
/// that the counting never joins two pieces of one family again as fragments of one object.
pub struct CorrectedTracks {
    pub tracks: Tracks,
    pub outcomes: Vec<Option<Outcome>>,
    pub split_from: BTreeMap<u32, u32>,
    /// Each track a person deleted, as it was when deleted, with the reason they gave.
    pub deleted: Vec<(Track, Option<String>)>,
}

/// [`apply_to_tracks`], with the families of the tracks split.
pub fn corrected_tracks(tracks: &Tracks, edits: &[Edit]) -> CorrectedTracks {
    let mut out = tracks.clone();
    let mut split_from: BTreeMap<u32, u32> = BTreeMap::new();
    let mut deleted = Vec::new();
    let outcomes = edits
        .iter()
        .map(|edit| {
            if edit.is_on_counts() {
                return None;
            }
            let result = apply(&mut out.tracks, edit, &mut deleted).map(|(note, apart)| {
                if let Some([kept, new]) = apart {
                    // The new piece joins the family of the track it came from, so a second split
                    // does not let the first's pieces be joined again.
                    let first = *split_from.entry(kept).or_insert(kept);
                    split_from.insert(new, first);
                }
                note
            });
            Some(Outcome {
                edit: edit.clone(),
                applied: result.is_ok(),
                note: result.unwrap_or_else(|why| why),
            })
        })
        .collect();
    out.tracks.sort_by_key(|t| t.id);
    CorrectedTracks {
        tracks: out,
        outcomes,
        split_from,
        deleted,
    }
}

/// Applies one edit; what it did (and, for a split, the two tracks it made), or why it could not.
/// A track deleted goes to `deleted`, with the edit's reason.
fn apply(
    tracks: &mut Vec<Track>,
    edit: &Edit,
    deleted: &mut Vec<(Track, Option<String>)>,
) -> Result<(String, Option<[u32; 2]>), String> {
    let note = match edit {
        Edit::MergeTracks { track, into, .. } => merge(tracks, track, into)?,
        Edit::SplitTrack {
            track, at_frame, ..
        } => return split(tracks, track, *at_frame),
        Edit::DeleteTrack { track, reason } => {
            let i = find(tracks, track)?;
            deleted.push((tracks.remove(i), reason.clone()));
            format!("track {} left out", track.id)
        }
        Edit::SetClass { track, class, .. } => {
            let i = find(tracks, track)?;
            let t = &mut tracks[i];
            t.class = Some(class.clone());
            t.class_votes.clear();
            format!("track {} is now {class}", track.id)
        }
        Edit::RejectCrossing { .. }
        | Edit::AddCrossing { .. }
        | Edit::RejectZoneEvent { .. }
        | Edit::AddZoneEvent { .. } => String::new(),
    };
    Ok((note, None))
}

/// The index of the track `r` names, or why it is not there.
fn find(tracks: &[Track], r: &TrackRef) -> Result<usize, String> {
    let i = tracks.iter().position(|t| t.id == r.id).ok_or_else(|| {
        format!(
            "there is no track {} now (it was frames {}–{}): the tracks have changed since \
                 this edit was made (other detections or tracking settings?)",
            r.id, r.frames[0], r.frames[1]
        )
    })?;
    let t = &tracks[i];
    if [t.first_frame(), t.last_frame()] != r.frames {
        return Err(format!(
            "track {} is now frames {}–{}, not {}–{}: the tracks have changed since this edit was \
             made (other detections or tracking settings?)",
            r.id,
            t.first_frame(),
            t.last_frame(),
            r.frames[0],
            r.frames[1]
        ));
    }
    Ok(i)
}

fn merge(tracks: &mut Vec<Track>, a: &TrackRef, b: &TrackRef) -> Result<String, String> {
    let (ia, ib) = (find(tracks, a)?, find(tracks, b)?);
    if ia == ib {
        return Err(format!("track {} cannot be merged with itself", a.id));
    }
    let (early, late) = if tracks[ia].first_frame() <= tracks[ib].first_frame() {
        (ia, ib)
    } else {
        (ib, ia)
    };
    let (e, l) = (&tracks[early], &tracks[late]);
    if l.first_frame() <= e.last_frame() {
        return Err(format!(
            "tracks {} and {} are both seen in frames {}–{}: they are two objects, not one",
            e.id,
            l.id,
            l.first_frame(),
            e.last_frame().min(l.last_frame())
        ));
    }
    let merged = joined(e, l);
    let note = format!(
        "tracks {} and {} are one track, {} (frames {}–{} predicted)",
        e.id,
        l.id,
        e.id,
        e.last_frame() + 1,
        l.first_frame() - 1
    );
    tracks[early] = merged;
    tracks.remove(late);
    Ok(note)
}

/// Track `e` followed by track `l`, the frames between filled with boxes interpolated between
/// `e`'s last and `l`'s first (predicted: not observed).
fn joined(e: &Track, l: &Track) -> Track {
    let (from, to) = (e.boxes[e.boxes.len() - 1], l.boxes[0]);
    let span = f64::from(to.frame - from.frame);
    let mut boxes = e.boxes.clone();
    for frame in from.frame + 1..to.frame {
        let t = f64::from(frame - from.frame) / span;
        let lerp = |a: f64, b: f64| a + t * (b - a);
        let (p, q) = (from.bbox, to.bbox);
        boxes.push(TrackBox {
            frame,
            bbox: BBox::new(
                lerp(p.x, q.x),
                lerp(p.y, q.y),
                lerp(p.w, q.w),
                lerp(p.h, q.h),
            ),
            score: 0.0,
            observed: false,
        });
    }
    boxes.extend_from_slice(&l.boxes);
    let mut votes = e.class_votes.clone();
    for (class, n) in &l.class_votes {
        match votes.iter_mut().find(|(c, _)| c == class) {
            Some((_, m)) => *m += n,
            None => votes.push((class.clone(), *n)),
        }
    }
    // Most votes first; among equals the earlier track's order stands (a stable sort).
    votes.sort_by_key(|v| std::cmp::Reverse(v.1));
    let (seen_e, seen_l) = (observed(e), observed(l));
    let class = match votes.first() {
        Some((c, _)) => Some(c.clone()),
        None if seen_l > seen_e => l.class.clone().or(e.class.clone()),
        None => e.class.clone().or(l.class.clone()),
    };
    let total = (seen_e + seen_l).max(1) as f64;
    Track {
        id: e.id,
        class,
        mean_score: (e.mean_score * seen_e as f64 + l.mean_score * seen_l as f64) / total,
        class_votes: votes,
        boxes,
    }
}

fn observed(t: &Track) -> usize {
    t.boxes.iter().filter(|b| b.observed).count()
}

fn split(
    tracks: &mut Vec<Track>,
    r: &TrackRef,
    at: u32,
) -> Result<(String, Option<[u32; 2]>), String> {
    let i = find(tracks, r)?;
    let t = &tracks[i];
    if at <= t.first_frame() || at > t.last_frame() {
        return Err(format!(
            "track {} (frames {}–{}) cannot be split at frame {at}: choose a frame after its first \
             and up to its last",
            t.id,
            t.first_frame(),
            t.last_frame()
        ));
    }
    let (before, after): (Vec<TrackBox>, Vec<TrackBox>) =
        t.boxes.iter().partition(|b| b.frame < at);
    let (before, after) = (trimmed(before), trimmed(after));
    if before.is_empty() || after.is_empty() {
        return Err(format!(
            "track {} was not seen on one side of frame {at} (only predicted there): split it at a \
             frame where it was seen on both sides",
            t.id
        ));
    }
    let new_id = tracks.iter().map(|t| t.id).max().unwrap_or(0) + 1;
    let part = |id: u32, boxes: Vec<TrackBox>| Track {
        id,
        class: t.class.clone(),
        mean_score: mean_score(&boxes),
        class_votes: Vec::new(),
        boxes,
    };
    let (first, second) = (part(t.id, before), part(new_id, after));
    let note = format!(
        "track {} is two: {} (frames {}–{}) and {} (frames {}–{}), never joined again as pieces \
         of one object",
        t.id,
        first.id,
        first.first_frame(),
        first.last_frame(),
        second.id,
        second.first_frame(),
        second.last_frame()
    );
    let apart = [first.id, second.id];
    tracks[i] = first;
    tracks.push(second);
    Ok((note, Some(apart)))
}

/// Boxes without the predicted ones at either end: a track starts and ends where it was seen.
fn trimmed(mut boxes: Vec<TrackBox>) -> Vec<TrackBox> {
    while boxes.last().is_some_and(|b| !b.observed) {
        boxes.pop();
    }
    let first_seen = boxes.iter().position(|b| b.observed).unwrap_or(boxes.len());
    boxes.drain(..first_seen);
    boxes
}

fn mean_score(boxes: &[TrackBox]) -> f64 {
    let seen: Vec<f64> = boxes
        .iter()
        .filter(|b| b.observed)
        .map(|b| b.score)
        .collect();
    seen.iter().sum::<f64>() / seen.len().max(1) as f64
}
