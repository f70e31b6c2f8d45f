//! Review and correction in the page: the person's edits (counted again at once), the queue of
//! doubtful moments, and the project file read and written by the core, so the page and the
//! command line agree on every format.

use crate::{js_error, to_js, Session};
use throughline_core::edits::EditList;
use throughline_core::project::{self, Project};
use throughline_core::review;
use wasm_bindgen::prelude::*;

#[wasm_bindgen]
impl Session {
    /// Sets the person's corrections (an edits file's text, or a project file's) and counts again.
    /// Returns what became of each edit: `[{edit, applied, note}]` (empty before tracking).
    #[wasm_bindgen(js_name = setEdits)]
    pub fn set_edits(&mut self, json: &str) -> Result<JsValue, JsError> {
        self.work.edits = project::edits_from_json(json).map_err(js_error)?;
        self.recount();
        let outcomes = self
            .report
            .as_ref()
            .map(|r| r.edits.clone())
            .unwrap_or_default();
        to_js(&outcomes)
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

/// Reads a project file's text; errors name the line and column. Returns the project as a plain
/// object (as `docs/project.schema.json` describes it).
#[wasm_bindgen(js_name = readProject)]
pub fn read_project(text: &str) -> Result<JsValue, JsError> {
    to_js(&Project::from_json(text).map_err(js_error)?)
}

/// A project (a plain object) as the project file's text, checked against its layout.
#[wasm_bindgen(js_name = writeProject)]
pub fn write_project(project: JsValue) -> Result<String, JsError> {
    let p: Project = serde_wasm_bindgen::from_value(project).map_err(js_error)?;
    Ok(p.to_json())
}
