//! Counting: turns tracks and a plan into the numbers people hand in, each backed by a list of
//! events. The work goes in stages, each a file, each taking the previous stage's plain data:
//!
//! 1. `paths`: every track as a path of anchor points (bottom-centre or centre of its box);
//! 2. `joins`: fragments of one object, broken near a screenline, joined into one counted track;
//! 3. `crossings` and `visits`: when and where each path crossed each screenline (with hysteresis)
//!    and entered and left each zone;
//! 4. tallies: `lines` (by direction, class and interval, peak hours), `zones` (entries, exits,
//!    occupancy, dwell), `movements` (origin → destination) and `speeds` (on the calibrated
//!    ground plane); `timeline` turns frames into times and interval labels;
//! 5. the [`Report`], with every event sorted by time.
//!
//! The rules, with their reasons and limits, are written once, in `docs/counting-rules.md`; the
//! stages' own notes say only how they are done.

mod corrections;
mod crossings;
mod hand;
mod joins;
mod lines;
mod movements;
mod paths;
mod speeds;
mod stats;
mod timeline;
mod visits;
mod zone_corrections;
mod zones;

pub use paths::{counted_path, CountedPoint, UNCLASSIFIED};
pub use stats::{peak_hour, percentile, HourRun};

use crate::edits::{Edit, Outcome};
use crate::error::Error;
use crate::plan::Plan;
use crate::report::{Event, EventKind, Report, ZoneReport, CAUTION, FORMAT, VERSION};
use crate::track::{TrackerConfig, Tracks};
use std::collections::BTreeMap;
use timeline::Timeline;

/// Counts tracks against a plan. `tracker` is recorded in the report as the settings the tracks
/// were made with.
pub fn count(
    tracks: &Tracks,
    plan: &Plan,
    tracker: Option<&TrackerConfig>,
) -> Result<Report, Error> {
    Ok(corrected(tracks, plan, tracker, (&[], &BTreeMap::new()))?.0)
}

/// Counts tracks against a plan with the person's corrections to the counts (`edits`: the edits
/// on counts are applied, the others passed over), never joining as fragments of one object two
/// pieces of a track the person split (`split_from`, piece → track); the report, and an outcome for
/// each edit on counts (`None` for the others). An error when the footage would span more
/// intervals than a report may hold.
pub fn corrected(
    tracks: &Tracks,
    plan: &Plan,
    tracker: Option<&TrackerConfig>,
    (edits, split_from): (&[Edit], &BTreeMap<u32, u32>),
) -> Result<(Report, Vec<Option<Outcome>>), Error> {
    let timeline = Timeline::new(tracks, plan)?;
    let half = plan.spec.rules.smooth_half_frames(plan.spec.frame_rate);
    let pieces = paths::pieces(tracks, plan.spec.anchor, half);
    let (counted, joins) = joins::join_fragments(pieces, plan, split_from);
    let mut events: Vec<Event> = plan
        .screenlines
        .iter()
        .flat_map(|line| lines::line_events(line, &counted, &timeline, &plan.spec))
        .collect();
    let mut zone_meetings = vec![Vec::new(); counted.len()];
    let mut zones: Vec<ZoneReport> = plan
        .zones
        .iter()
        .map(|zone| {
            let tally = zones::zone(zone, &counted, &timeline, &plan.spec);
            events.extend(tally.events);
            for (ci, seconds) in tally.meetings {
                zone_meetings[ci].push((seconds, zone.name.clone()));
            }
            tally.report
        })
        .collect();
    let fixes = corrections::correct((&mut events, &mut zones), edits, plan, &timeline);
    let on_line = |e: &&Event, line: &str| e.kind == EventKind::Screenline && e.name == line;
    let screenlines = plan
        .screenlines
        .iter()
        .map(|line| {
            let mine: Vec<&Event> = events.iter().filter(|e| on_line(e, &line.name)).collect();
            let added = mine.iter().filter(|e| e.added).count() as u64;
            let rejected = fixes
                .rejected
                .iter()
                .filter(|e| on_line(e, &line.name))
                .count() as u64;
            lines::tally(line, &mine, (added, rejected), &timeline, &plan.spec)
        })
        .collect();
    let (movements, single) = movements::movements(&counted, zone_meetings, &events);
    let speeds = speeds::speeds(&counted, plan);
    events.sort_by(by_time);
    let mut rejected_events = fixes.rejected;
    rejected_events.sort_by(by_time);
    let report = Report {
        format: FORMAT.to_string(),
        version: VERSION,
        generator: format!("throughline {}", crate::VERSION),
        caution: CAUTION.to_string(),
        plan: plan.spec.clone(),
        tracker: tracker.cloned(),
        frame_count: timeline.frame_count,
        duration_seconds: (timeline.duration_s * 1000.0).round() / 1000.0,
        tracks_counted: counted.len(),
        screenlines,
        zones,
        movements,
        single_feature_tracks: single,
        speeds,
        joins,
        events,
        edits: Vec::new(),
        rejected_events,
        deleted_events: Vec::new(),
        checks: Vec::new(),
        correction: None,
    };
    Ok((report, fixes.outcomes))
}

/// Events in time order; among equals by counted track, then by line or zone name.
fn by_time(a: &Event, b: &Event) -> std::cmp::Ordering {
    a.seconds
        .total_cmp(&b.seconds)
        .then(a.track.cmp(&b.track))
        .then(a.name.cmp(&b.name))
}
