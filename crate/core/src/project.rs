//! The project file: one piece of work, kept and reopened. It holds the plan, the tracking
//! method and settings, the person's edits and review decisions, and what the footage and the
//! detections were (a fingerprint: name, size, duration, a SHA-256 of the first megabyte), so a
//! project opened against other files can say so. The page writes it; the command line reads its
//! edits (`--edits`) and plan.

use crate::accuracy::Tally;
use crate::edits::{self, Edit};
use crate::error::{Error, ErrorKind};
use crate::fingerprint::Fingerprint;
use crate::limits::MAX_FOOTAGE_FRAMES;
use crate::plan::PlanSpec;
use crate::report::Correction;
use crate::track::Method;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

/// Identifies a project file.
pub const FORMAT: &str = crate::formats::PROJECT;

/// Version of the project file's layout.
pub const VERSION: u32 = 1;

/// How the `generator` of a project tracked before `deepsort` kept low-score boxes begins (0.2.x;
/// 0.1.x's `deepsort` differed in more than this, and its projects are tracked with today's).
pub const GENERATORS_BEFORE_LOW_SCORE_BOXES: [&str; 1] = ["throughline 0.2."];

/// The tracker settings of those versions' `deepsort` where today's differ: boxes used from 0.3,
/// and any of them may start a track.
pub const SETTINGS_BEFORE_LOW_SCORE_BOXES: &str = r#"{"min_score":0.3,"start_score":0}"#;

/// The tracking the project uses: a method (or the default for the detections) and settings.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Tracking {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub method: Option<Method>,
    /// A tracker settings object (docs/tracker-settings.md), when not the method's defaults.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub settings: Option<serde_json::Value>,
}

/// A person's decision on one doubtful moment of the review queue.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct ReviewMark {
    /// The doubt's key, as the queue gives it.
    pub key: String,
    /// `accepted` (the count stands) or `rejected` (it was corrected).
    pub decision: String,
}

/// A project file.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Project {
    /// Always `throughline-project` (filled in when written).
    #[serde(default)]
    pub format: String,
    #[serde(default)]
    pub version: u32,
    /// The program and version that wrote it.
    #[serde(default)]
    pub generator: String,
    pub plan: PlanSpec,
    #[serde(default)]
    pub tracking: Tracking,
    #[serde(default)]
    pub edits: Vec<Edit>,
    #[serde(default)]
    pub review: Vec<ReviewMark>,
    /// The site's name, for the hand-in outputs and their file names.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub site: Option<String>,
    /// Hand counts of samples, to check the automated count against.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub tallies: Vec<Tally>,
    /// A correction factor the person chose to apply (never applied otherwise).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub correction: Option<Correction>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub footage: Option<Fingerprint>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub detections: Option<Fingerprint>,
    /// The detector's settings the page finds moving objects with (a detector settings file's
    /// fields, docs/detector-settings.md: the two heights), so that `throughline run --footage
    /// FILE --edits PROJECT` finds the same boxes without a settings file of its own (a
    /// newcomer's trial: the heights typed in the page were saved in no file).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub detector: Option<serde_json::Map<String, serde_json::Value>>,
}

impl Project {
    /// The footage's length in frames at `frame_rate`, from the duration recorded with it (the
    /// page counts detections from a file that end before the footage to its end, and so does a
    /// replay of its project; [`footage_frames`]); `None` without a duration, an error naming it
    /// when it is longer than footage may be.
    pub fn footage_frames(&self, frame_rate: f64) -> Result<Option<u32>, Error> {
        let Some(seconds) = self.footage.as_ref().and_then(|f| f.duration_seconds) else {
            return Ok(None);
        };
        match footage_frames(seconds, frame_rate) {
            Some(0) => Ok(None),
            Some(n) => Ok(Some(n)),
            None => Err(Error::new(
                ErrorKind::Unsuitable,
                format!(
                    "footage.duration_seconds {seconds} at {frame_rate} frames a second is more than \
                     the {MAX_FOOTAGE_FRAMES} frames footage may have: is the project's footage \
                     record right?"
                ),
            )
            .in_field("footage.duration_seconds")),
        }
    }

    /// Reads a project file; errors name the line and column.
    pub fn from_json(text: &str) -> Result<Project, Error> {
        let p: Project = serde_json::from_str(text).map_err(|e| {
            Error::from_json(
                ErrorKind::BadJson,
                &e,
                "; expected a Throughline project file",
            )
        })?;
        crate::formats::check("project file", (&p.format, p.version), (FORMAT, VERSION))?;
        edits::check(&p.edits)?;
        p.detector_config()?;
        Ok(p)
    }

    /// The detector's settings it records, checked as a settings file is; `None` when it records
    /// none.
    pub fn detector_config(&self) -> Result<Option<crate::detect::DetectorConfig>, Error> {
        let Some(fields) = &self.detector else {
            return Ok(None);
        };
        let text = serde_json::Value::Object(fields.clone()).to_string();
        crate::detect::DetectorConfig::from_json(&text)
            .map(Some)
            .map_err(|e| e.in_field("detector"))
    }

    /// Whether the project was saved by a version that counted paths as the tracker gave them with
    /// a crossing margin of 0.15 (before 0.2.0; since then paths are averaged before counting and
    /// the margin is 0.1): replayed now, its counts and the crossings its corrections name may
    /// differ unless the plan sets those rules.
    pub fn saved_before_averaged_paths(&self) -> bool {
        crate::plan::counted_before_averaged_paths(&self.generator)
    }

    /// Whether the project was tracked by a version whose `deepsort` used no box scoring under
    /// 0.3 and let any box it used start a track (0.2.x), with a method that is or may be
    /// `deepsort` (none named: the default for detections with appearance vectors).
    pub fn tracked_before_low_score_boxes(&self) -> bool {
        GENERATORS_BEFORE_LOW_SCORE_BOXES
            .iter()
            .any(|g| self.generator.starts_with(g))
            && matches!(self.tracking.method, None | Some(Method::Deepsort))
    }

    /// The tracker settings (JSON) to make the project's tracks again as they were made: its own,
    /// over [`SETTINGS_BEFORE_LOW_SCORE_BOXES`] when it was tracked before low-score boxes were
    /// kept (those settings change nothing for `sort` and `iou`, the other default). `None`: the
    /// method's defaults.
    pub fn tracking_settings(&self) -> Option<String> {
        let own = self.tracking.settings.clone();
        if !self.tracked_before_low_score_boxes() {
            return own.map(|v| v.to_string());
        }
        let mut merged: serde_json::Map<String, serde_json::Value> =
            serde_json::from_str(SETTINGS_BEFORE_LOW_SCORE_BOXES).unwrap_or_default();
        if let Some(serde_json::Value::Object(fields)) = own {
            merged.extend(fields);
        }
        Some(serde_json::Value::Object(merged).to_string())
    }

    /// The project file's text, marked with its format, version and this program.
    pub fn to_json(&self) -> String {
        let mut p = self.clone();
        p.format = FORMAT.to_string();
        p.version = VERSION;
        p.generator = format!("throughline {}", crate::VERSION);
        serde_json::to_string_pretty(&p).unwrap_or_default()
    }

    /// The project file's JSON Schema, generated from these types: `docs/project.schema.json`.
    pub fn schema() -> serde_json::Value {
        serde_json::to_value(schemars::schema_for!(Project)).unwrap_or_default()
    }
}

/// The edits of an edits file or of a project file, recognised by their `format`. Errors name the
/// line and column, or say which format was expected.
pub fn edits_from_json(text: &str) -> Result<Vec<Edit>, Error> {
    let format = serde_json::from_str::<serde_json::Value>(text)
        .ok()
        .and_then(|v| v.get("format")?.as_str().map(str::to_string));
    match format.as_deref() {
        Some(FORMAT) => Ok(Project::from_json(text)?.edits),
        Some(edits::FORMAT) => Ok(edits::EditList::from_json(text)?.edits),
        Some(other) => Err(Error::new(
            ErrorKind::BadJson,
            format!(
                "this is a `{other}` file, not corrections: give an edits file (`{}`) or a \
                 project file (`{FORMAT}`)",
                edits::FORMAT
            ),
        )),
        // Not JSON, or no format: the edits file's reader says what is wrong where.
        None => Ok(edits::EditList::from_json(text)?.edits),
    }
}

/// Footage of `seconds` at `frame_rate` in frames, rounded to the nearest (0 for none, or for a
/// duration that is not a number), as the page and a replay of its project both take it; `None`
/// beyond [`MAX_FOOTAGE_FRAMES`].
pub fn footage_frames(seconds: f64, frame_rate: f64) -> Option<u32> {
    let n = (seconds * frame_rate).round();
    match n {
        n if n.is_nan() || n < 1.0 => Some(0),
        n if n > MAX_FOOTAGE_FRAMES as f64 => None,
        n => Some(n as u32),
    }
}
