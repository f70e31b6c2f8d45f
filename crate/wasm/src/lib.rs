//! The WebAssembly adapter: one [`Session`] per page (or worker) holding the loaded detections, the
//! plan and the last tracks. File bytes go in unchanged and are read by the same core readers as the
//! command line; reports come back as the same JSON text; boxes for drawing come back as typed
//! arrays. Every error becomes a JS `Error` whose message says what to fix.

use js_sys::Function;
use serde::Serialize;
use throughline_core::{detect, detections, pipeline, plan, project, report, track, Method};
use wasm_bindgen::prelude::*;

mod boxes;
mod bridging;
mod corrections;
mod detecting;
mod facts;
mod footage;
mod handin;

pub use boxes::{BOX_STRIDE, FRAME_BOX_STRIDE};
pub use bridging::FootageBridge;
pub use facts::core_facts;
pub use footage::FootageReader;

fn js_error(message: impl std::fmt::Display) -> JsError {
    JsError::new(&message.to_string())
}

/// What [`Session::load_detections`] found, as a plain JS object (snake_case fields).
#[derive(Serialize)]
struct DetectionSummary {
    rows: usize,
    /// The last frame number (1-based).
    frames: u32,
    format: String,
    classes: Vec<String>,
    embedding_dim: usize,
    skipped_rows: usize,
    /// "line N: message" for rows passed over, and other notes.
    warnings: Vec<String>,
    /// The largest right and bottom edge of any box, in pixels: to compare with the video's size.
    max_x: f64,
    max_y: f64,
}

/// Plain data to a JS value; structs become plain objects.
fn to_js(value: &impl Serialize) -> Result<JsValue, JsError> {
    value
        .serialize(&serde_wasm_bindgen::Serializer::json_compatible())
        .map_err(js_error)
}

/// Checks a plan file's text before the page takes it: JSON, unknown or misspelt fields and
/// values of the wrong kind, each named at its line and column in that text (the page's own copy
/// of a plan is laid out anew). What the page can mend (a name used twice, a line of one point)
/// is found when the plan is set, as before.
#[wasm_bindgen(js_name = checkPlan)]
pub fn check_plan(text: &str) -> Result<(), JsError> {
    plan::Plan::spec_from_json(text)
        .map(|_| ())
        .map_err(js_error)
}

/// The state of one page: detections, plan, tracks.
#[wasm_bindgen]
#[derive(Default)]
pub struct Session {
    detections: Option<detections::ReadReport>,
    plan: Option<plan::Plan>,
    tracks: Option<track::Tracks>,
    /// How many times [`Session::track`] made tracks: a [`FootageBridge`] joins only the tracks
    /// of the run it was made from.
    tracking_runs: u32,
    /// The person's corrections (in order), tallies and correction factor; they apply to every
    /// tracks and plan given after.
    work: pipeline::Work,
    /// The tracks after the edits on tracks, when there are edits (what the page draws).
    edited: Option<track::Tracks>,
    /// The report of the last tracks, plan and edits, made once when tracks and plan are there
    /// (or why it could not be made).
    report: Option<Result<report::Report, String>>,
    /// The detector while footage is being searched, and the boxes found so far.
    detector: Option<(detect::Detector, detecting::FoundBoxes)>,
    /// The duration in seconds of the footage the work is on, as its fingerprint records it (0:
    /// none, or not known): detections from a file that end before it are counted to its end at
    /// the plan's frame rate, as a replay of the project does (`Project::footage_frames`).
    footage_seconds: f64,
    /// The frames the last tracks span by themselves (before the footage's length is applied).
    tracks_length: u32,
}

#[wasm_bindgen]
impl Session {
    #[wasm_bindgen(constructor)]
    pub fn new() -> Session {
        Session::default()
    }

    /// Reads a detections file (any of the three layouts). Returns a summary object:
    /// `{rows, frames, format, classes, embedding_dim, skipped_rows, warnings, max_x, max_y}`.
    #[wasm_bindgen(js_name = loadDetections)]
    pub fn load_detections(&mut self, bytes: &[u8]) -> Result<JsValue, JsError> {
        let report = detections::read_detections(bytes).map_err(js_error)?;
        let format = report.format.to_string();
        self.take_detections(report, format)
    }

    /// Makes `report` the session's detections (forgetting tracks made from earlier ones) and
    /// returns its summary.
    fn take_detections(
        &mut self,
        report: detections::ReadReport,
        format: String,
    ) -> Result<JsValue, JsError> {
        let d = &report.detections;
        let summary = DetectionSummary {
            rows: d.rows.len(),
            frames: d.length(),
            format,
            classes: d.classes.clone(),
            embedding_dim: d.embedding_dim,
            skipped_rows: report.skipped_rows,
            warnings: report
                .warnings
                .iter()
                .map(|w| match w.line {
                    Some(l) => format!("line {l}: {}", w.message),
                    None => w.message.clone(),
                })
                .chain(d.notes())
                .collect(),
            max_x: d
                .rows
                .iter()
                .map(|r| r.bbox.x + r.bbox.w)
                .fold(0.0, f64::max),
            max_y: d
                .rows
                .iter()
                .map(|r| r.bbox.y + r.bbox.h)
                .fold(0.0, f64::max),
        };
        let value = to_js(&summary)?;
        self.detections = Some(report);
        self.tracks = None;
        self.edited = None;
        self.report = None;
        Ok(value)
    }

    /// The loaded or found detections as a file: CSV when they carry classes or appearance
    /// vectors, else the benchmark text format (as `throughline detect` writes them).
    #[wasm_bindgen(js_name = detectionsText)]
    pub fn detections_text(&self) -> Result<String, JsError> {
        let report = self
            .detections
            .as_ref()
            .ok_or_else(|| js_error("open or find detections first"))?;
        Ok(detections::to_file_text(&report.detections))
    }

    /// The plan's lines and zones lying wholly outside a picture of `width` × `height` pixels,
    /// named (`Plan::outside_picture`); none before a plan is set.
    #[wasm_bindgen(js_name = planOutsidePicture)]
    pub fn plan_outside_picture(&self, width: f64, height: f64) -> Vec<String> {
        self.plan
            .as_ref()
            .map(|p| p.outside_picture(width, height))
            .unwrap_or_default()
    }

    /// Sets the counting plan from its JSON text; errors name the field to fix.
    #[wasm_bindgen(js_name = setPlan)]
    pub fn set_plan(&mut self, json: &str) -> Result<(), JsError> {
        let plan = plan::Plan::from_json(json).map_err(js_error)?;
        // The page gives the plan again after each run, whose tracking counted with it already:
        // the same plan over the same tracks is the same report, and an hour of tracks takes
        // seconds to count.
        if self.plan.as_ref() == Some(&plan) && self.report.is_some() {
            return match &self.report {
                Some(Err(e)) => Err(js_error(e)),
                _ => Ok(()),
            };
        }
        self.plan = Some(plan);
        self.recounted()
    }

    /// The duration in seconds of the footage the work is on (its fingerprint's; 0 when none):
    /// detections read from a file that end before it are counted to its end, as a replay of the
    /// project saved here counts them (boxes found in the footage know its length already). Give
    /// the plan after it: [`Session::set_plan`] counts again when it changed.
    #[wasm_bindgen(js_name = setFootageSeconds)]
    pub fn set_footage_seconds(&mut self, seconds: f64) {
        let seconds = if seconds.is_finite() { seconds } else { 0.0 };
        if seconds != self.footage_seconds {
            self.footage_seconds = seconds;
            self.report = None;
        }
    }

    /// Tracks the loaded detections. `method` may be empty for the default; `settings` is an optional
    /// settings file's text. `progress(done, total)` is called every few hundred frames. Returns the
    /// number of tracks. When the settings bridge (`bridge_frames`), footage given to
    /// [`Session::start_bridging`]'s handle then joins tracks across missed detections.
    pub fn track(
        &mut self,
        method: &str,
        settings: &str,
        progress: Option<Function>,
    ) -> Result<u32, JsError> {
        let report = self
            .detections
            .as_ref()
            .ok_or_else(|| js_error("open a detections file first"))?;
        let method = match method {
            "" => None,
            m => Some(Method::parse(m).ok_or_else(|| js_error(format!("unknown method `{m}`")))?),
        };
        let settings = (!settings.trim().is_empty()).then_some(settings);
        let config =
            pipeline::tracker_config(&report.detections, method, settings).map_err(js_error)?;
        let mut on_progress = |done: u32, total: u32| {
            if let Some(f) = &progress {
                let _ = f.call2(&JsValue::NULL, &JsValue::from(done), &JsValue::from(total));
            }
        };
        let tracks =
            pipeline::track(&report.detections, &config, &mut on_progress).map_err(js_error)?;
        let n = tracks.tracks.len() as u32;
        self.tracks_length = tracks.frame_count;
        self.tracks = Some(tracks);
        self.tracking_runs = self.tracking_runs.wrapping_add(1);
        self.recounted()?;
        Ok(n)
    }

    /// Counts the last tracks with the plan; the report JSON, as `throughline run` writes it.
    pub fn report(&self) -> Result<String, JsError> {
        Ok(self.ready()?.to_json())
    }

    /// The counts CSV of the last tracks and plan.
    #[wasm_bindgen(js_name = countsCsv)]
    pub fn counts_csv(&self) -> Result<String, JsError> {
        Ok(report::counts_csv(self.ready()?))
    }

    /// Counts again when the tracks, the plan or the edits changed and tracks and plan are there.
    fn recount(&mut self) {
        if let (Some(t), Some(plan)) = (&mut self.tracks, &self.plan) {
            // Boxes found in the footage know its length; others reach the footage's duration.
            let footage_frames = match t.length_from_footage {
                true => 0,
                false => {
                    project::footage_frames(self.footage_seconds, plan.spec.frame_rate).unwrap_or(0)
                }
            };
            t.frame_count = self.tracks_length.max(footage_frames);
        }
        self.edited = match &self.tracks {
            Some(t) if !self.work.edits.is_empty() => {
                Some(pipeline::correct_tracks(t, &self.work.edits).0)
            }
            _ => None,
        };
        self.report = match (&self.tracks, &self.plan) {
            (Some(tracks), Some(plan)) => Some(
                pipeline::count(tracks, plan, Some(&tracks.config), &self.work)
                    .map_err(|e| e.to_string()),
            ),
            _ => None,
        };
    }

    /// Counts again (see [`Session::recount`]); the counting's error, if it failed.
    pub(crate) fn recounted(&mut self) -> Result<(), JsError> {
        self.recount();
        match &self.report {
            Some(Err(e)) => Err(js_error(e)),
            _ => Ok(()),
        }
    }

    /// The tracks as the page shows them: after the edits on tracks.
    fn tracks(&self) -> Result<&track::Tracks, JsError> {
        self.edited
            .as_ref()
            .or(self.tracks.as_ref())
            .ok_or_else(|| js_error("run tracking first"))
    }

    /// The plan last given.
    fn plan(&self) -> Result<&plan::Plan, JsError> {
        self.plan
            .as_ref()
            .ok_or_else(|| js_error("open or draw a plan first"))
    }

    /// The tracks' boxes to draw (none before tracking).
    fn shown(&self) -> impl Iterator<Item = &track::Track> {
        self.edited
            .as_ref()
            .or(self.tracks.as_ref())
            .into_iter()
            .flat_map(|t| &t.tracks)
    }

    fn ready(&self) -> Result<&report::Report, JsError> {
        self.tracks()?;
        match &self.report {
            Some(Ok(r)) => Ok(r),
            Some(Err(e)) => Err(js_error(e)),
            None => Err(js_error("open or draw a plan first")),
        }
    }
}
