//! What the page draws: the tracks' boxes as typed arrays (no JSON on the hot path), and the
//! track list. After edits, these are the edited tracks.

use crate::{to_js, Session};
use js_sys::Float32Array;
use serde::Serialize;
use throughline_core::track::files as tracks_io;
use throughline_core::{pipeline, track};
use wasm_bindgen::prelude::*;

/// Values per box in [`Session::boxes_at`]: id, x, y, w, h (pixels, top-left + size), observed (1/0).
pub const BOX_STRIDE: usize = 6;

/// Values per box in [`Session::all_boxes`]: frame (1-based), then the [`BOX_STRIDE`] values.
pub const FRAME_BOX_STRIDE: usize = 7;

/// Values per point in [`Session::counted_paths`]: id, frame (1-based), x, y (pixels), observed (1/0).
pub const PATH_STRIDE: usize = 5;

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

/// One track without its boxes, for [`Session::track_list`].
#[derive(Serialize)]
struct TrackInfo<'a> {
    id: u32,
    class: Option<&'a str>,
    first_frame: u32,
    last_frame: u32,
    /// Frames in which it was seen (not predicted).
    seen: usize,
    /// Its first and last box, `[x, y, w, h]` pixels: where it appeared and disappeared.
    first_box: [f64; 4],
    last_box: [f64; 4],
    /// How many of its detections carried each class, most first (empty when unknown).
    class_votes: &'a [(String, u32)],
}

fn xywh(b: Option<&track::TrackBox>) -> [f64; 4] {
    b.map_or([0.0; 4], |b| [b.bbox.x, b.bbox.y, b.bbox.w, b.bbox.h])
}

#[wasm_bindgen]
impl Session {
    /// The last tracks in the benchmark text format.
    #[wasm_bindgen(js_name = tracksText)]
    pub fn tracks_text(&self) -> Result<String, JsError> {
        Ok(tracks_io::to_benchmark_text(self.tracks()?))
    }

    /// Boxes of the last tracks in one frame (1-based), [`BOX_STRIDE`] values each.
    #[wasm_bindgen(js_name = boxesAt)]
    pub fn boxes_at(&self, frame: u32) -> Float32Array {
        let mut out = Vec::new();
        for t in self.shown() {
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
        // Sorted by an integer key (frame, id), which is unique, so an unstable sort gives the
        // one order; then copied once into the array (an hour of boxes is millions of them).
        let mut rows: Vec<(u64, &track::TrackBox, u32)> = self
            .shown()
            .flat_map(|t| {
                t.boxes
                    .iter()
                    .map(|b| ((u64::from(b.frame) << 32) | u64::from(t.id), b, t.id))
            })
            .collect();
        rows.sort_unstable_by_key(|r| r.0);
        let mut values = Vec::with_capacity(rows.len() * FRAME_BOX_STRIDE);
        for (_, b, id) in rows {
            values.push(b.frame as f32);
            values.extend_from_slice(&box_values(id, b));
        }
        Float32Array::from(values.as_slice())
    }

    /// The paths of the tracks `ids` (after edits) as the counting sees them under the plan: count
    /// points averaged over `rules.smooth_seconds`, one a frame, [`PATH_STRIDE`] values each, track
    /// by track in the order of `ids` (an id with no track is left out). The page draws these for
    /// the tracks under review, so the path it shows is the one that was counted.
    #[wasm_bindgen(js_name = countedPaths)]
    pub fn counted_paths(&self, ids: &[u32]) -> Result<Float32Array, JsError> {
        let plan = self.plan()?;
        let tracks = self.tracks()?;
        let mut values = Vec::new();
        for &id in ids {
            let Some(t) = tracks.tracks.iter().find(|t| t.id == id) else {
                continue;
            };
            for q in pipeline::counted_path(t, plan) {
                let point: [f32; PATH_STRIDE] = [
                    id as f32,
                    q.frame as f32,
                    q.at.x as f32,
                    q.at.y as f32,
                    f32::from(u8::from(q.observed)),
                ];
                values.extend_from_slice(&point);
            }
        }
        Ok(Float32Array::from(values.as_slice()))
    }

    /// How many tracks the tracker made (before the person's corrections).
    #[wasm_bindgen(js_name = trackedCount)]
    pub fn tracked_count(&self) -> usize {
        self.tracks.as_ref().map_or(0, |t| t.tracks.len())
    }

    /// The tracks (after edits) without their boxes: `[{id, class, first_frame, last_frame, seen,
    /// first_box, last_box, class_votes}]`.
    #[wasm_bindgen(js_name = trackList)]
    pub fn track_list(&self) -> Result<JsValue, JsError> {
        let list: Vec<TrackInfo> = self
            .shown()
            .map(|t| TrackInfo {
                id: t.id,
                class: t.class.as_deref(),
                first_frame: t.first_frame(),
                last_frame: t.last_frame(),
                seen: t.boxes.iter().filter(|b| b.observed).count(),
                first_box: xywh(t.boxes.first()),
                last_box: xywh(t.boxes.last()),
                class_votes: &t.class_votes,
            })
            .collect();
        to_js(&list)
    }
}
