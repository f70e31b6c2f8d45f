//! The WebAssembly adapter: one [`Session`] per page (or worker) holding the loaded detections, the
//! plan and the last tracks. File bytes go in unchanged and are read by the same core readers as the
//! command line; reports come back as the same JSON text; boxes for drawing come back as typed
//! arrays. Every error becomes a JS `Error` whose message says what to fix.

use js_sys::{Float32Array, Function};
use serde::Serialize;
use throughline_core::track::files as tracks_io;
use throughline_core::{detect, detections, pipeline, plan, report, track, Method};
use wasm_bindgen::prelude::*;

mod footage;
pub use footage::FootageReader;

/// Values per box in [`Session::boxes_at`]: id, x, y, w, h (pixels, top-left + size), observed (1/0).
pub const BOX_STRIDE: usize = 6;

/// Values per box in [`Session::all_boxes`]: frame (1-based), then the [`BOX_STRIDE`] values.
pub const FRAME_BOX_STRIDE: usize = 7;

fn js_error(message: impl std::fmt::Display) -> JsError {
    JsError::new(&message.to_string())
}

/// One box as [`BOX_STRIDE`] values: id, x, y, w, h, observed (1/0).
fn box_values(id: u32, b: &track::TrackBox) -> [f32; BOX_STRIDE] {
    let bb = b.bbox;
    [
        id as f32,
        bb.x as f32,
        bb.y as f32,
        bb.w as f32,
        bb.h as f32,
        f32::from(u8::from(b.observed)),
    ]
}

fn short_frame() -> JsError {
    js_error("the frame holds fewer pixels than its size says")
}

/// NV12 (luma, then interleaved U,V pairs at 4:2:0) to I420 (luma, U plane, V plane).
fn nv12_to_i420(bytes: &[u8], w: usize, h: usize) -> Option<Vec<u8>> {
    let (cw, ch) = detect::Picture::chroma_size(w, h);
    let (luma, pairs) = bytes.split_at_checked(w * h)?;
    let pairs = pairs.get(..2 * cw * ch)?;
    let mut out = Vec::with_capacity(w * h + 2 * cw * ch);
    out.extend_from_slice(luma);
    out.extend(pairs.iter().step_by(2));
    out.extend(pairs.iter().skip(1).step_by(2));
    Some(out)
}

/// Boxes (with scores) the motion detector found, one list per frame.
type FoundBoxes = Vec<Vec<detect::Found>>;

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

/// One track without its boxes, for [`Session::track_list`].
#[derive(Serialize)]
struct TrackInfo<'a> {
    id: u32,
    class: Option<&'a str>,
    first_frame: u32,
    last_frame: u32,
}

/// A tracking method as the page lists it.
#[derive(Serialize)]
struct MethodFacts {
    name: &'static str,
    label: &'static str,
    needs_embeddings: bool,
}

/// What the page takes from the core's own tables rather than writing again: the tracking
/// methods, and the crossing margins (box heights) by default and for boxes found in footage.
#[derive(Serialize)]
struct CoreFacts {
    methods: Vec<MethodFacts>,
    default_hysteresis: f64,
    footage_hysteresis: f64,
}

/// [`CoreFacts`] as a plain object: `{methods: [{name, label, needs_embeddings}],
/// default_hysteresis, footage_hysteresis}`.
#[wasm_bindgen(js_name = coreFacts)]
pub fn core_facts() -> Result<JsValue, JsError> {
    let methods = Method::ALL
        .iter()
        .map(|m| {
            let d = m.def();
            MethodFacts {
                name: d.name,
                label: d.label,
                needs_embeddings: d.needs_embeddings,
            }
        })
        .collect();
    to_js(&CoreFacts {
        methods,
        default_hysteresis: plan::DEFAULT_HYSTERESIS,
        footage_hysteresis: plan::FOOTAGE_HYSTERESIS,
    })
}

/// Plain data to a JS value; structs become plain objects.
fn to_js(value: &impl Serialize) -> Result<JsValue, JsError> {
    value
        .serialize(&serde_wasm_bindgen::Serializer::json_compatible())
        .map_err(js_error)
}

/// The state of one page: detections, plan, tracks.
#[wasm_bindgen]
#[derive(Default)]
pub struct Session {
    detections: Option<detections::ReadReport>,
    plan: Option<plan::Plan>,
    tracks: Option<track::Tracks>,
    /// The report of the last tracks and plan, made once when both are there.
    report: Option<report::Report>,
    /// The motion detector while footage is being searched, and the boxes found so far.
    detector: Option<(detect::Detector, FoundBoxes)>,
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

    /// Starts finding moving objects in footage of `width` x `height` pixels (fixed camera);
    /// `settings` is a detector settings file's text (may be empty). Frames then go in one by one,
    /// in order, with [`Session::detect_rgba`]; [`Session::finish_detection`] makes them the
    /// session's detections.
    #[wasm_bindgen(js_name = startDetection)]
    pub fn start_detection(
        &mut self,
        width: u32,
        height: u32,
        settings: &str,
    ) -> Result<(), JsError> {
        let config = if settings.trim().is_empty() {
            detect::DetectorConfig::default()
        } else {
            detect::DetectorConfig::from_json(settings).map_err(js_error)?
        };
        if width == 0 || height == 0 || width > 8192 || height > 8192 {
            return Err(js_error(format!(
                "footage of {width}x{height} pixels cannot be searched"
            )));
        }
        let detector = detect::Detector::new(config, width as usize, height as usize);
        self.detector = Some((detector, Vec::new()));
        Ok(())
    }

    /// The next frame as RGBA pixels (a canvas's `getImageData().data`). Returns the number of
    /// objects found in it.
    #[wasm_bindgen(js_name = detectRgba)]
    pub fn detect_rgba(&mut self, rgba: &[u8], width: u32, height: u32) -> Result<u32, JsError> {
        let (w, h) = (width as usize, height as usize);
        let yuv = detect::rgba_to_yuv420(rgba, w, h).ok_or_else(short_frame)?;
        self.detect_planar(&yuv, w, h)
    }

    /// The next frame as a decoded video frame's own bytes (`VideoFrame.copyTo` over its visible
    /// rectangle): `layout` "I420" (luma, then the two 4:2:0 chroma planes) or "NV12" (luma, then
    /// one plane of interleaved chroma pairs). Returns the number of objects found in it.
    #[wasm_bindgen(js_name = detectYuv)]
    pub fn detect_yuv(
        &mut self,
        bytes: &[u8],
        width: u32,
        height: u32,
        layout: &str,
    ) -> Result<u32, JsError> {
        let (w, h) = (width as usize, height as usize);
        match layout {
            "I420" => self.detect_planar(bytes, w, h),
            "NV12" => {
                let planar = nv12_to_i420(bytes, w, h).ok_or_else(short_frame)?;
                self.detect_planar(&planar, w, h)
            }
            other => Err(js_error(format!(
                "frames laid out as {other} cannot be searched directly; draw them as RGBA"
            ))),
        }
    }

    fn detect_planar(&mut self, yuv: &[u8], w: usize, h: usize) -> Result<u32, JsError> {
        let (detector, found) = self
            .detector
            .as_mut()
            .ok_or_else(|| js_error("start detection first"))?;
        let picture = detect::Picture::planar(w, h, yuv, true).ok_or_else(short_frame)?;
        let boxes = detector.detect_found(&picture).map_err(js_error)?;
        let n = boxes.len() as u32;
        found.push(boxes);
        Ok(n)
    }

    /// Ends detection: the boxes found become the session's detections (frames from 1 in the
    /// order given). Returns the same summary as [`Session::load_detections`].
    #[wasm_bindgen(js_name = finishDetection)]
    pub fn finish_detection(&mut self) -> Result<JsValue, JsError> {
        let (detector, found) = self
            .detector
            .take()
            .ok_or_else(|| js_error("start detection first"))?;
        let report = detections::ReadReport {
            detections: detector.detections_from(found),
            format: detections::DetectionFormat::BenchmarkText,
            warnings: Vec::new(),
            skipped_rows: 0,
        };
        self.take_detections(report, "found by the motion detector".into())
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
            frames: d.last_frame(),
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

    /// Sets the counting plan from its JSON text; errors name the field to fix.
    #[wasm_bindgen(js_name = setPlan)]
    pub fn set_plan(&mut self, json: &str) -> Result<(), JsError> {
        self.plan = Some(plan::Plan::from_json(json).map_err(js_error)?);
        self.recount();
        Ok(())
    }

    /// Tracks the loaded detections. `method` may be empty for the default; `settings` is an optional
    /// settings file's text. `progress(done, total)` is called every few hundred frames. Returns the
    /// number of tracks.
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
        self.tracks = Some(tracks);
        self.recount();
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

    /// The last tracks in the benchmark text format.
    #[wasm_bindgen(js_name = tracksText)]
    pub fn tracks_text(&self) -> Result<String, JsError> {
        Ok(tracks_io::to_benchmark_text(self.tracks()?))
    }

    /// Boxes of the last tracks in one frame (1-based), [`BOX_STRIDE`] values each.
    #[wasm_bindgen(js_name = boxesAt)]
    pub fn boxes_at(&self, frame: u32) -> Float32Array {
        let mut out = Vec::new();
        for t in self.tracks.iter().flat_map(|t| &t.tracks) {
            if frame < t.first_frame() || frame > t.last_frame() {
                continue;
            }
            if let Some(b) = t.boxes.get((frame - t.first_frame()) as usize) {
                out.extend_from_slice(&box_values(t.id, b));
            }
        }
        Float32Array::from(out.as_slice())
    }

    /// Every box of the last tracks, ordered by frame then track id, [`FRAME_BOX_STRIDE`] values
    /// each: frame (1-based), id, x, y, w, h (pixels, top-left + size), observed (1/0). The page
    /// keeps this one array to draw boxes and trails without asking again for every frame.
    #[wasm_bindgen(js_name = allBoxes)]
    pub fn all_boxes(&self) -> Float32Array {
        let mut rows: Vec<[f32; FRAME_BOX_STRIDE]> = Vec::new();
        for t in self.tracks.iter().flat_map(|t| &t.tracks) {
            for b in &t.boxes {
                let mut row = [b.frame as f32; FRAME_BOX_STRIDE];
                row[1..].copy_from_slice(&box_values(t.id, b));
                rows.push(row);
            }
        }
        rows.sort_by(|a, b| a[0].total_cmp(&b[0]).then(a[1].total_cmp(&b[1])));
        Float32Array::from(rows.concat().as_slice())
    }

    /// The last tracks without their boxes: `[{id, class, first_frame, last_frame}]`.
    #[wasm_bindgen(js_name = trackList)]
    pub fn track_list(&self) -> Result<JsValue, JsError> {
        let list: Vec<TrackInfo> = self
            .tracks
            .iter()
            .flat_map(|t| &t.tracks)
            .map(|t| TrackInfo {
                id: t.id,
                class: t.class.as_deref(),
                first_frame: t.first_frame(),
                last_frame: t.last_frame(),
            })
            .collect();
        to_js(&list)
    }

    /// Counts again when the tracks or the plan changed and both are there.
    fn recount(&mut self) {
        self.report = match (&self.tracks, &self.plan) {
            (Some(tracks), Some(plan)) => Some(pipeline::count(tracks, plan, Some(&tracks.config))),
            _ => None,
        };
    }

    fn tracks(&self) -> Result<&track::Tracks, JsError> {
        self.tracks
            .as_ref()
            .ok_or_else(|| js_error("run tracking first"))
    }

    fn ready(&self) -> Result<&report::Report, JsError> {
        self.tracks()?;
        self.report
            .as_ref()
            .ok_or_else(|| js_error("open or draw a plan first"))
    }
}

#[cfg(test)]
mod tests {
    use super::nv12_to_i420;

    #[test]
    fn nv12_chroma_pairs_become_two_planes() {
        // A 4x2 picture: 8 luma bytes, then 2x1 chroma pairs (U, V).
        let nv12 = [1, 2, 3, 4, 5, 6, 7, 8, 10, 20, 11, 21];
        assert_eq!(
            nv12_to_i420(&nv12, 4, 2).unwrap(),
            vec![1, 2, 3, 4, 5, 6, 7, 8, 10, 11, 20, 21]
        );
        // 3x3 rounds the chroma up to 2x2: four pairs.
        let odd: Vec<u8> = (0..9).chain([1, 2, 3, 4, 5, 6, 7, 8]).collect();
        let planar = nv12_to_i420(&odd, 3, 3).unwrap();
        assert_eq!(&planar[9..], &[1, 3, 5, 7, 2, 4, 6, 8]);
        assert_eq!(
            nv12_to_i420(&odd[..16], 3, 3),
            None,
            "one chroma byte short"
        );
    }
}
