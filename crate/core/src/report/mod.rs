//! The report: everything a count hands in, as one typed document. The command line writes it,
//! the page shows and exports the same bytes, and it reads back ([`Report::from_json`]) for
//! comparisons and merging. Its JSON Schema (`docs/report.schema.json`) is generated from these
//! types and checked by a test. The counts CSV is in [`csv`].
//!
//! Frames are 1-based; times are seconds from frame 1 or clock labels; positions are pixels.

mod checks;
mod csv;
mod merge;
mod merged_grid;

pub use checks::{Measures, TallyCheck, TallyGroup};
pub use csv::counts_csv;
pub use merge::{merged_counts_csv, merged_events_csv, merged_zones_csv, Part};
pub use merged_grid::{read_merged_counts, GridColumn, GridRow, MergedCounts, MergedGrid};

use crate::edits::Outcome;
use crate::plan::PlanSpec;
use crate::track::TrackerConfig;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// Identifies a Throughline report.
pub const FORMAT: &str = crate::formats::REPORT;

/// Version of the report's layout.
pub const VERSION: u32 = 1;

/// The caution printed with every report.
pub const CAUTION: &str = "Automated counts are estimates. Before relying on them for a design or \
    operational decision, check a sample against a manual count of the same footage, and follow local \
    rules on recording people in public space. Short counts are unadjusted (no seasonal or day-of-week \
    factors).";

/// What an event counts.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum EventKind {
    Screenline,
    Zone,
}

/// Which way an event went: across a screenline (forward as the plan draws it, or backward),
/// or into or out of a zone.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Direction {
    Forward,
    Backward,
    Entry,
    Exit,
}

/// One counted event: a screenline crossing or a zone entry or exit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Event {
    /// The counted track: the id of its first fragment.
    pub track: u32,
    /// Every tracker id joined into it, in time order (one id unless fragments were joined).
    pub track_ids: Vec<u32>,
    /// What was counted: a screenline crossing, or a zone entry or exit.
    pub kind: EventKind,
    /// Name of the screenline or zone.
    pub name: String,
    /// `forward` or `backward` for screenlines; `entry` or `exit` for zones.
    pub direction: Direction,
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
    /// True for a crossing a person added (the tool missed it); it has no track (0).
    #[serde(default, skip_serializing_if = "is_false")]
    pub added: bool,
    /// Why a person added or rejected it (or deleted its track), when they said.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reason: Option<String>,
}

fn is_false(b: &bool) -> bool {
    !*b
}

fn is_zero(n: &u64) -> bool {
    *n == 0
}

/// Counts in one interval.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct IntervalCount {
    pub start: String,
    pub end: String,
    /// True for a last interval cut short by the end of the footage.
    pub partial: bool,
    pub forward: u64,
    pub backward: u64,
    pub by_class: BTreeMap<String, DirectionCounts>,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize, JsonSchema)]
pub struct DirectionCounts {
    pub forward: u64,
    pub backward: u64,
}

impl DirectionCounts {
    /// Counts one crossing.
    pub fn add(&mut self, forward: bool) {
        if forward {
            self.forward += 1;
        } else {
            self.backward += 1;
        }
    }
}

/// The busiest hour: consecutive whole intervals with the highest total, and its peak hour factor
/// PHF = V_hour / (n × V_max), n intervals per hour (4 for 15-minute intervals).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct PeakHour {
    pub start: String,
    pub end: String,
    pub volume: u64,
    pub peak_interval_volume: u64,
    pub phf: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct ScreenlineReport {
    pub name: String,
    pub forward_label: String,
    pub backward_label: String,
    /// Totals over the whole footage.
    pub forward: u64,
    pub backward: u64,
    pub inferred: u64,
    /// Crossings a person added, and counted crossings a person rejected (not in the totals).
    #[serde(default, skip_serializing_if = "is_zero")]
    pub added: u64,
    #[serde(default, skip_serializing_if = "is_zero")]
    pub rejected: u64,
    pub by_class: BTreeMap<String, DirectionCounts>,
    pub intervals: Vec<IntervalCount>,
    /// Busiest hour of both directions together, and of each direction; `None` for footage shorter
    /// than one hour of whole intervals.
    pub peak_hour: Option<PeakHour>,
    pub peak_hour_forward: Option<PeakHour>,
    pub peak_hour_backward: Option<PeakHour>,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Summary {
    pub count: usize,
    pub mean: Option<f64>,
    pub median: Option<f64>,
    pub p85: Option<f64>,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct ZoneInterval {
    pub start: String,
    pub end: String,
    pub entries: u64,
    pub exits: u64,
    pub mean_occupancy: f64,
    pub max_occupancy: u64,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
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
    /// Entries and exits a person added, and counted ones a person rejected (not in the totals).
    #[serde(default, skip_serializing_if = "is_zero")]
    pub added: u64,
    #[serde(default, skip_serializing_if = "is_zero")]
    pub rejected: u64,
}

/// Origin → destination counts: origin is the first screenline or zone a track meets, destination
/// the last (the same name for a U-turn).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Movement {
    pub origin: String,
    pub destination: String,
    pub class: String,
    pub count: u64,
    pub u_turn: bool,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
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

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct TrackSpeed {
    pub track: u32,
    pub class: String,
    pub distance: f64,
    pub seconds: f64,
    pub speed: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Join {
    /// The earlier and the later tracker id.
    pub tracks: [u32; 2],
    pub gap_frames: u32,
}

/// The whole report.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Report {
    /// Always `throughline-report`.
    pub format: String,
    /// The version of the report's layout (1).
    pub version: u32,
    /// The program and its version that wrote the report.
    pub generator: String,
    /// The caution that counts are estimates, and how to check them.
    pub caution: String,
    pub plan: PlanSpec,
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
    /// The person's corrections, in order, each with what it did or why it could not be applied.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub edits: Vec<Outcome>,
    /// Counted crossings a person rejected, with their reasons; not in any count.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub rejected_events: Vec<Event>,
    /// The crossings, entries and exits the tracks a person deleted made, counted as those
    /// tracks alone, each with the deletion's reason; not in any count (so a difference from a
    /// hand count can be traced to a deletion).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub deleted_events: Vec<Event>,
    /// Hand counts of samples beside the automated counts of the same frames.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub checks: Vec<TallyCheck>,
    /// A correction factor the person chose to apply, and the counts it gives; the counts above
    /// stay as counted.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub correction: Option<AppliedCorrection>,
}

/// A correction factor as the person chose it: for the lines named (all when none).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Correction {
    pub factor: f64,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub screenlines: Vec<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reason: Option<String>,
}

/// A correction factor applied: the counts of each line it applies to, multiplied by it (to one
/// decimal), beside the counted ones.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct AppliedCorrection {
    pub factor: f64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reason: Option<String>,
    pub adjusted: Vec<AdjustedTotals>,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct AdjustedTotals {
    pub screenline: String,
    pub forward: f64,
    pub backward: f64,
}

impl Report {
    /// The report as JSON text, exactly as every adapter writes it.
    pub fn to_json(&self) -> String {
        serde_json::to_string_pretty(self).unwrap_or_default()
    }

    /// The report's JSON Schema (draft 2020-12), generated from these types: `docs/report.schema.json`.
    pub fn schema() -> serde_json::Value {
        serde_json::to_value(schemars::schema_for!(Report)).unwrap_or_default()
    }

    /// Reads a report written by [`Report::to_json`]. A report written by 0.1.x was counted on
    /// paths as the tracker gave them (those versions had no `rules.smooth_seconds`): its rules
    /// read back with 0, how it was counted, not with today's default.
    pub fn from_json(text: &str) -> Result<Report, crate::error::Error> {
        let mut report: Report = serde_json::from_str(text).map_err(|e| {
            crate::error::Error::from_json(
                crate::error::ErrorKind::BadJson,
                &e,
                "; expected a Throughline report (as `throughline run` writes it)",
            )
        })?;
        if crate::plan::counted_before_averaged_paths(&report.generator) {
            report.plan.rules.smooth_seconds = 0.0;
        }
        Ok(report)
    }
}
