//! The one flow every adapter runs: detections and settings → tracks → (with a plan) report. The
//! command line and the page call these functions and nothing else to track and count, so they
//! cannot drift apart: the same files give the same report, byte for byte.

use crate::count;
use crate::detections::Detections;
use crate::edits::{self, Edit, Outcome};
use crate::error::Error;
use crate::plan::Plan;
use crate::report::Report;
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

/// Tracks the detections; `progress(done, total)` in frames.
pub fn track(
    detections: &Detections,
    config: &TrackerConfig,
    progress: &mut dyn FnMut(u32, u32),
) -> Result<Tracks, Error> {
    track::run_tracker(detections, config, progress)
}

/// The tracks after the person's edits on tracks (merge, split, delete, reclassify), and what
/// became of each of those edits (`None` for the edits on counts).
pub fn correct_tracks(tracks: &Tracks, edits: &[Edit]) -> (Tracks, Vec<Option<Outcome>>) {
    edits::apply_to_tracks(tracks, edits)
}

/// Counts tracks against a plan, with the person's edits: those on tracks first, then those on
/// counts; the report lists every edit with what it did or why it could not be applied.
/// `tracker`: the settings the tracks were made with, when known (tracks read from a benchmark
/// text file carry none).
pub fn count(
    tracks: &Tracks,
    plan: &Plan,
    tracker: Option<&TrackerConfig>,
    edits: &[Edit],
) -> Report {
    if edits.is_empty() {
        return count::count(tracks, plan, tracker);
    }
    let (edited, on_tracks) = correct_tracks(tracks, edits);
    let (mut report, on_counts) = count::corrected(&edited, plan, tracker, edits);
    report.edits = on_tracks
        .into_iter()
        .zip(on_counts)
        .filter_map(|(a, b)| a.or(b))
        .collect();
    report
}

/// Tracks, then counts with the settings the tracks were made with.
pub fn run(
    detections: &Detections,
    plan: &Plan,
    config: &TrackerConfig,
    progress: &mut dyn FnMut(u32, u32),
) -> Result<(Tracks, Report), Error> {
    let tracks = track(detections, config, progress)?;
    let report = count(&tracks, plan, Some(&tracks.config), &[]);
    Ok((tracks, report))
}
