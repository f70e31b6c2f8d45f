//! The one flow every adapter runs: detections and settings → tracks → (with a plan) report. The
//! command line and the page call these functions and nothing else to track and count, so they
//! cannot drift apart: the same files give the same report, byte for byte.

pub use crate::count::{counted_path, CountedPoint};

use crate::accuracy::{self, Tally};
use crate::count;
use crate::detections::Detections;
use crate::edits::{self, Edit, Outcome};
use crate::error::Error;
use crate::plan::Plan;
use crate::project::Project;
use crate::report::{AdjustedTotals, AppliedCorrection, Correction, Report};
use crate::track::bridge::Bridger;
use crate::track::{self, Method, TrackerConfig, Tracks};

/// The settings a run uses: `method` if given, else the settings file's `method`, else the default
/// for these detections (`deepsort` with embeddings, `sort` without); that method's defaults
/// overridden by the settings file's fields.
pub fn tracker_config(
    detections: &Detections,
    method: Option<Method>,
    settings_json: Option<&str>,
) -> Result<TrackerConfig, Error> {
    track::resolve_config(method, settings_json, detections.embedding_dim > 0)
}

/// Tracks the detections; `progress(done, total)` in frames. The boxes are rounded as the tracks
/// files write them (hundredths of a pixel), so that `track` then `count` gives `run`'s report.
pub fn track(
    detections: &Detections,
    config: &TrackerConfig,
    progress: &mut dyn FnMut(u32, u32),
) -> Result<Tracks, Error> {
    let mut tracks = track::run_tracker(detections, config, progress)?;
    track::files::round_as_written(&mut tracks);
    Ok(tracks)
}

/// Bridging of missed detections in footage of `width × height` pixels (V-IOU): feed it the
/// footage's luma planes in order ([`Bridger::feed`]), then [`Bridger::finish`] gives the tracks
/// with bridged gaps joined. Without footage the tracks are counted as they are.
pub fn bridger(tracks: &Tracks, width: usize, height: usize) -> Bridger {
    Bridger::new(tracks, width, height)
}

/// Marks tracks whose gaps no footage bridged although the settings asked for it (no footage
/// was given, or it could not be read): their settings say `bridge_frames` 0 from then on, so
/// that the report does not name a bridging that did not happen. Returns the gap length that was
/// asked for (0: none). The command line and the page call it alike.
pub fn not_bridged(tracks: &mut Tracks) -> u32 {
    std::mem::take(&mut tracks.config.bridge_frames)
}

/// The tracks after the person's edits on tracks (merge, split, delete, reclassify), and what
/// became of each of those edits (`None` for the edits on counts).
pub fn correct_tracks(tracks: &Tracks, edits: &[Edit]) -> (Tracks, Vec<Option<Outcome>>) {
    edits::apply_to_tracks(tracks, edits)
}

/// What a person adds to a run's counts: corrections, hand counts of samples, a correction
/// factor. A project file holds it (with the plan, settings, site and fingerprints).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Work {
    pub edits: Vec<Edit>,
    pub tallies: Vec<Tally>,
    pub correction: Option<Correction>,
}

impl Work {
    /// Only corrections.
    pub fn edits(edits: Vec<Edit>) -> Work {
        Work {
            edits,
            ..Work::default()
        }
    }

    /// What a project file adds to a run.
    pub fn of_project(p: &Project) -> Work {
        Work {
            edits: p.edits.clone(),
            tallies: p.tallies.clone(),
            correction: p.correction.clone(),
        }
    }

    fn is_empty(&self) -> bool {
        *self == Work::default()
    }
}

/// Counts tracks against a plan, with the person's work: edits on tracks first, then on counts;
/// the report lists every edit with what it did or why it could not be applied, each tally beside
/// the automated count, and a chosen correction factor beside the counts. `tracker`: the settings
/// the tracks were made with, when known (tracks read from a benchmark text file carry none).
/// An error when the footage would span more intervals than a report may hold.
pub fn count(
    tracks: &Tracks,
    plan: &Plan,
    tracker: Option<&TrackerConfig>,
    work: &Work,
) -> Result<Report, Error> {
    if work.is_empty() {
        return count::count(tracks, plan, tracker);
    }
    let edited = edits::corrected_tracks(tracks, &work.edits);
    let (mut report, on_counts) = count::corrected(
        &edited.tracks,
        plan,
        tracker,
        (&work.edits, &edited.split_from),
    )?;
    report.edits = edited
        .outcomes
        .into_iter()
        .zip(on_counts)
        .filter_map(|(a, b)| a.or(b))
        .collect();
    report.deleted_events = deleted_events(edited.deleted, tracks, plan, tracker)?;
    report.checks = work
        .tallies
        .iter()
        .map(|t| accuracy::check(t, &report))
        .collect();
    report.correction = work
        .correction
        .as_ref()
        .map(|c| corrected_totals(c, &report));
    Ok(report)
}

/// What the tracks a person deleted would have counted: those tracks counted alone, each event
/// with the deletion's reason.
fn deleted_events(
    deleted: Vec<(crate::track::Track, Option<String>)>,
    tracks: &Tracks,
    plan: &Plan,
    tracker: Option<&TrackerConfig>,
) -> Result<Vec<crate::report::Event>, Error> {
    if deleted.is_empty() {
        return Ok(Vec::new());
    }
    let reasons: Vec<(u32, Option<String>)> =
        deleted.iter().map(|(t, r)| (t.id, r.clone())).collect();
    let alone = Tracks {
        config: tracks.config.clone(),
        frame_count: tracks.frame_count,
        tracks: deleted.into_iter().map(|(t, _)| t).collect(),
        crowded_frames: Vec::new(),
        length_from_footage: tracks.length_from_footage,
    };
    let mut events = count::count(&alone, plan, tracker)?.events;
    for e in &mut events {
        let why = reasons
            .iter()
            .find(|(id, _)| e.track_ids.contains(id))
            .and_then(|(_, r)| r.clone());
        e.reason = why;
    }
    Ok(events)
}

/// The counts of the lines a correction factor applies to, multiplied by it (one decimal).
fn corrected_totals(c: &Correction, report: &Report) -> AppliedCorrection {
    let round = |v: f64| (v * 10.0).round() / 10.0;
    AppliedCorrection {
        factor: c.factor,
        reason: c.reason.clone(),
        adjusted: report
            .screenlines
            .iter()
            .filter(|l| c.screenlines.is_empty() || c.screenlines.contains(&l.name))
            .map(|l| AdjustedTotals {
                screenline: l.name.clone(),
                forward: round(l.forward as f64 * c.factor),
                backward: round(l.backward as f64 * c.factor),
            })
            .collect(),
    }
}

/// Tracks, then counts with the settings the tracks were made with.
pub fn run(
    detections: &Detections,
    plan: &Plan,
    config: &TrackerConfig,
    progress: &mut dyn FnMut(u32, u32),
) -> Result<(Tracks, Report), Error> {
    let tracks = track(detections, config, progress)?;
    let report = count(&tracks, plan, Some(&tracks.config), &Work::default())?;
    Ok((tracks, report))
}
