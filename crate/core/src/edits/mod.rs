//! Corrections a person makes after looking at the footage, as a readable list that the page
//! writes and the command line replays (`throughline run --edits FILE`), so both give the same
//! report. Edits on tracks (merge, split, delete, reclassify) apply before counting
//! ([`apply_to_tracks`]); edits on counts (reject a crossing or a zone's entry or exit, add a missed
//! one) apply to the events (`count`). Edits apply in order; one that no longer fits the tracks or counts (tracks renumbered
//! after a settings change, say) is not applied and the report says why.
//!
//! A track is named by its id and, to tell a renumbered track apart, its first and last frame
//! (1-based). Frames are 1-based throughout; positions are pixels.

mod tracks;

pub use tracks::{apply_to_tracks, corrected_tracks, CorrectedTracks};

use crate::error::{Error, ErrorKind};
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

/// Identifies an edits file.
pub const FORMAT: &str = crate::formats::EDITS;

/// Version of the edits file's layout.
pub const VERSION: u32 = 1;

/// A track as the person saw it when making an edit: its id, first and last frame.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct TrackRef {
    pub id: u32,
    /// First and last frame of the track, 1-based.
    pub frames: [u32; 2],
}

/// Which way a crossing went, as the plan draws the line.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Way {
    Forward,
    Backward,
}

/// Which way a zone was passed: in (an entry) or out (an exit).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum ZoneWay {
    Entry,
    Exit,
}

/// One correction.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(tag = "edit", rename_all = "snake_case", deny_unknown_fields)]
pub enum Edit {
    /// One object broken into two tracks: `track` joins `into`. The joined track keeps the id of
    /// the earlier one; the frames between them are filled with predicted boxes (so crossings
    /// there are inferred). Tracks seen in the same frame cannot be merged.
    MergeTracks {
        track: TrackRef,
        into: TrackRef,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        reason: Option<String>,
    },
    /// Two objects in one track: from `at_frame` on, its boxes become a new track (numbered after
    /// the highest id).
    SplitTrack {
        track: TrackRef,
        at_frame: u32,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        reason: Option<String>,
    },
    /// Not an object to count (a shadow, a reflection): the track is left out.
    DeleteTrack {
        track: TrackRef,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        reason: Option<String>,
    },
    /// The track's class, as the person sees it.
    SetClass {
        track: TrackRef,
        class: String,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        reason: Option<String>,
    },
    /// A counted crossing that is wrong: the crossing of `screenline` by counted track `track`
    /// (its first id) in direction `direction` at `frame` is not counted.
    RejectCrossing {
        screenline: String,
        direction: Way,
        track: u32,
        frame: u32,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        reason: Option<String>,
    },
    /// A crossing the tool missed, counted as the person saw it: at `frame`, optionally at `x`,
    /// `y` (pixels) on the line.
    AddCrossing {
        screenline: String,
        direction: Way,
        class: String,
        frame: u32,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        x: Option<f64>,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        y: Option<f64>,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        reason: Option<String>,
    },
    /// A counted entry to or exit from a zone that is wrong: the `way` (entry or exit) of `zone`
    /// by counted track `track` (its first id) at `frame` is not counted.
    RejectZoneEvent {
        zone: String,
        way: ZoneWay,
        track: u32,
        frame: u32,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        reason: Option<String>,
    },
    /// An entry or exit the tool missed, counted as the person saw it, at `frame`.
    AddZoneEvent {
        zone: String,
        way: ZoneWay,
        class: String,
        frame: u32,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        reason: Option<String>,
    },
}

impl Edit {
    /// Whether it applies to the events rather than to the tracks.
    pub fn is_on_counts(&self) -> bool {
        matches!(
            self,
            Edit::RejectCrossing { .. }
                | Edit::AddCrossing { .. }
                | Edit::RejectZoneEvent { .. }
                | Edit::AddZoneEvent { .. }
        )
    }
}

/// What became of an edit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Outcome {
    pub edit: Edit,
    pub applied: bool,
    /// What it did, or why it could not be applied.
    pub note: String,
}

/// The edits file: `{"format": "throughline-edits", "version": 1, "edits": [...]}`.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct EditList {
    pub format: String,
    pub version: u32,
    pub edits: Vec<Edit>,
}

impl EditList {
    pub fn new(edits: Vec<Edit>) -> Self {
        EditList {
            format: FORMAT.to_string(),
            version: VERSION,
            edits,
        }
    }

    /// The edits file's JSON Schema, generated from these types: `docs/edits.schema.json`.
    pub fn schema() -> serde_json::Value {
        serde_json::to_value(schemars::schema_for!(EditList)).unwrap_or_default()
    }

    pub fn to_json(&self) -> String {
        serde_json::to_string_pretty(self).unwrap_or_default()
    }

    /// Reads an edits file; errors name the line and column. (A project file's edits:
    /// `project::edits_from_json`, which takes either.)
    pub fn from_json(text: &str) -> Result<EditList, Error> {
        let list: EditList = serde_json::from_str(text).map_err(|e| {
            Error::from_json(
                ErrorKind::BadJson,
                &e,
                "; expected an edits file (see docs/edits-format.md)",
            )
        })?;
        crate::formats::check(
            "edits file",
            (&list.format, list.version),
            (FORMAT, VERSION),
        )?;
        check(&list.edits)?;
        Ok(list)
    }
}

/// What serde cannot say of a list of edits: a class named must not be blank.
pub(crate) fn check(edits: &[Edit]) -> Result<(), Error> {
    for (i, e) in edits.iter().enumerate() {
        if let Edit::SetClass { class, .. }
        | Edit::AddCrossing { class, .. }
        | Edit::AddZoneEvent { class, .. } = e
        {
            if class.trim().is_empty() {
                return Err(Error::new(
                    ErrorKind::BadJson,
                    "the class is empty: name it as the report names classes (pedestrian, \
                     cyclist, …)",
                )
                .in_field(format!("edits[{i}].class")));
            }
        }
    }
    Ok(())
}
