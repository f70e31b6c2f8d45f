//! Review and correction in the page: the person's edits (counted again at once), the queue of
//! doubtful moments, and the project file read and written by the core, so the page and the
//! command line agree on every format.

use crate::{js_error, to_js, Session};
use serde::Serialize;
use throughline_core::edits::EditList;
use throughline_core::fingerprint::Fingerprint;
use throughline_core::project::{self, Project};
use throughline_core::{pipeline, plan, review};
use wasm_bindgen::prelude::*;

#[wasm_bindgen]
impl Session {
    /// Sets the person's corrections (an edits file's text, or a project file's) and counts again.
    /// Returns what became of each edit: `[{edit, applied, note}]` (empty before tracking).
    #[wasm_bindgen(js_name = setEdits)]
    pub fn set_edits(&mut self, json: &str) -> Result<JsValue, JsError> {
        self.work.edits = project::edits_from_json(json).map_err(js_error)?;
        self.recounted()?;
        to_js(&self.outcomes())
    }

    /// Sets everything a project file adds to the counts (corrections, tallies, a correction
    /// factor) from the project file's text, and counts again. Returns what became of each edit.
    #[wasm_bindgen(js_name = setWork)]
    pub fn set_work(&mut self, project_json: &str) -> Result<JsValue, JsError> {
        let p = Project::from_json(project_json).map_err(js_error)?;
        self.work = pipeline::Work::of_project(&p);
        self.recounted()?;
        to_js(&self.outcomes())
    }

    /// What became of each edit in the last count (none before tracking).
    fn outcomes(&self) -> Vec<throughline_core::edits::Outcome> {
        match &self.report {
            Some(Ok(r)) => r.edits.clone(),
            _ => Vec::new(),
        }
    }

    /// The corrections as an edits file (for `throughline run --edits`).
    #[wasm_bindgen(js_name = editsText)]
    pub fn edits_text(&self) -> String {
        EditList::new(self.work.edits.clone()).to_json()
    }

    /// The review queue for the tracks (after edits), plan and report: doubtful moments, most
    /// doubtful first, `[{key, kind, frame, seconds, time, tracks, crossing?, why, weight}]`.
    /// `width` and `height`: the picture's size in pixels (0 when unknown).
    pub fn doubts(&self, width: f64, height: f64) -> Result<JsValue, JsError> {
        let report = self.ready()?;
        let plan = self
            .plan
            .as_ref()
            .ok_or_else(|| js_error("open or draw a plan first"))?;
        let picture = (width > 0.0 && height > 0.0).then_some((width, height));
        to_js(&review::doubts(self.tracks()?, plan, report, picture))
    }
}

/// A project file read: the project as a plain object (as `docs/project.schema.json` describes
/// it) and how its version differs from this one's.
#[derive(Serialize)]
struct ProjectRead {
    project: Project,
    age: ProjectAge,
}

/// What a project saved by an older version needs to be counted and tracked as it was.
#[derive(Serialize)]
struct ProjectAge {
    /// Saved before paths were averaged for counting: its counts were made on the paths as the
    /// tracker gave them, with this crossing margin (`None`: saved since).
    counted_before_averaged_paths: Option<f64>,
    /// Tracked before `deepsort` kept low-score boxes: the tracker settings (JSON) that make its
    /// tracks again, the project's own over the older defaults (`None`: tracked since, or with
    /// another method).
    tracked_before_low_score_boxes: Option<String>,
}

/// Reads a project file's text; errors name the line and column. Returns `{project, age}`: the
/// project, and how its version differs from this one's (the command line asks the same of
/// [`Project`]): `{counted_before_averaged_paths: margin | null, tracked_before_low_score_boxes:
/// settings JSON | null}`. The page says so, and tracks such a project as it was tracked.
#[wasm_bindgen(js_name = readProject)]
pub fn read_project(text: &str) -> Result<JsValue, JsError> {
    let p = Project::from_json(text).map_err(js_error)?;
    let age = ProjectAge {
        counted_before_averaged_paths: p
            .saved_before_averaged_paths()
            .then_some(plan::HYSTERESIS_BEFORE_AVERAGED_PATHS),
        tracked_before_low_score_boxes: p
            .tracked_before_low_score_boxes()
            .then(|| p.tracking_settings())
            .flatten(),
    };
    to_js(&ProjectRead { project: p, age })
}

/// A project (a plain object) as the project file's text, checked against its layout.
#[wasm_bindgen(js_name = writeProject)]
pub fn write_project(project: JsValue) -> Result<String, JsError> {
    let p: Project = serde_wasm_bindgen::from_value(project).map_err(js_error)?;
    Ok(p.to_json())
}

/// A file's fingerprint: `name`, `size` in bytes, its first bytes `head` (at least the first MiB,
/// or all of a smaller file), and for footage its duration in seconds (0 when none). Returns
/// `{name, size, head_sha256, duration_seconds?}`, as project files hold it.
#[wasm_bindgen]
pub fn fingerprint(name: &str, size: f64, head: &[u8], duration: f64) -> Result<JsValue, JsError> {
    let duration = (duration > 0.0).then_some(duration);
    to_js(&Fingerprint::of(name, size as u64, head, duration))
}

/// Why a file is not the one a project was made with (`null` when it is): both fingerprints as
/// plain objects.
#[wasm_bindgen(js_name = fingerprintDiffers)]
pub fn fingerprint_differs(recorded: JsValue, opened: JsValue) -> Result<Option<String>, JsError> {
    let a: Fingerprint = serde_wasm_bindgen::from_value(recorded).map_err(js_error)?;
    let b: Fingerprint = serde_wasm_bindgen::from_value(opened).map_err(js_error)?;
    Ok(a.differs(&b))
}
