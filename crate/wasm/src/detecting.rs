//! Finding moving objects in the page: frames go to the core's fixed-camera detector one by one
//! (RGBA from a canvas, or a decoded frame's own I420/NV12 bytes) and become the detections.

use crate::{js_error, Session};
use throughline_core::{detect, detections};
use wasm_bindgen::prelude::*;

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

/// Boxes (with scores) the detector found, one list per frame.
pub(crate) type FoundBoxes = Vec<Vec<detect::Found>>;

#[wasm_bindgen]
impl Session {
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
        let side = throughline_core::limits::MAX_PICTURE_SIDE as u32;
        if width == 0 || height == 0 || width > side || height > side {
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
        let (detector, found) = self.started_detector()?;
        let picture = detect::Picture::planar(w, h, yuv, true).ok_or_else(short_frame)?;
        let boxes = detector.detect_found(&picture).map_err(js_error)?;
        let n = boxes.len() as u32;
        found.push(boxes);
        Ok(n)
    }

    fn started_detector(&mut self) -> Result<&mut (detect::Detector, FoundBoxes), JsError> {
        self.detector
            .as_mut()
            .ok_or_else(|| js_error("start detection first"))
    }

    /// Whether the clip should be read once for its background before its frames go to
    /// [`Session::detect_yuv`]: each frame, in order from the first, to [`Session::sample_yuv`]
    /// when [`Session::wants_sample`] says so, else [`Session::pass_sample`] (the command line
    /// reads a file the same way, so both find the same boxes).
    #[wasm_bindgen(js_name = wholeClipBackground)]
    pub fn whole_clip_background(&mut self) -> Result<bool, JsError> {
        Ok(self.started_detector()?.0.samples_whole_clip())
    }

    /// Whether the next frame of the first reading is one the background keeps.
    #[wasm_bindgen(js_name = wantsSample)]
    pub fn wants_sample(&mut self) -> Result<bool, JsError> {
        Ok(self.started_detector()?.0.wants_sample())
    }

    /// The next frame of the first reading, as [`Session::detect_yuv`] takes it.
    #[wasm_bindgen(js_name = sampleYuv)]
    pub fn sample_yuv(
        &mut self,
        bytes: &[u8],
        width: u32,
        height: u32,
        layout: &str,
    ) -> Result<(), JsError> {
        let (w, h) = (width as usize, height as usize);
        let planar = match layout {
            "I420" => None,
            "NV12" => Some(nv12_to_i420(bytes, w, h).ok_or_else(short_frame)?),
            other => {
                return Err(js_error(format!(
                    "frames laid out as {other} cannot be read directly; draw them as RGBA"
                )))
            }
        };
        self.sample_planar(planar.as_deref().unwrap_or(bytes), w, h)
    }

    /// The next frame of the first reading as RGBA pixels.
    #[wasm_bindgen(js_name = sampleRgba)]
    pub fn sample_rgba(&mut self, rgba: &[u8], width: u32, height: u32) -> Result<(), JsError> {
        let (w, h) = (width as usize, height as usize);
        let yuv = detect::rgba_to_yuv420(rgba, w, h).ok_or_else(short_frame)?;
        self.sample_planar(&yuv, w, h)
    }

    /// The frames (from 1) a first reading of a clip of `total` frames keeps for the background,
    /// for footage whose frames are drawn one by one: giving just these to
    /// [`Session::sample_rgba`] forms the same background as reading every frame. Empty when the
    /// background forms over the opening frames instead.
    #[wasm_bindgen(js_name = backgroundFrames)]
    pub fn background_frames(&mut self, total: u32) -> Result<Vec<u32>, JsError> {
        let detector = &self.started_detector()?.0;
        if !detector.samples_whole_clip() {
            return Ok(Vec::new());
        }
        Ok(detector
            .background_frames(total as usize)
            .into_iter()
            .map(|i| i as u32 + 1)
            .collect())
    }

    /// Counts the next frame of the first reading without giving it (one not wanted).
    #[wasm_bindgen(js_name = passSample)]
    pub fn pass_sample(&mut self) -> Result<(), JsError> {
        self.started_detector()?.0.pass_sample();
        Ok(())
    }

    fn sample_planar(&mut self, yuv: &[u8], w: usize, h: usize) -> Result<(), JsError> {
        let (detector, _) = self.started_detector()?;
        let picture = detect::Picture::planar(w, h, yuv, true).ok_or_else(short_frame)?;
        detector.sample(&picture).map_err(js_error)
    }

    /// Ends detection: the boxes found become the session's detections (frames from 1 in the
    /// order given). Returns the same summary as [`Session::load_detections`].
    #[wasm_bindgen(js_name = finishDetection)]
    pub fn finish_detection(&mut self) -> Result<JsValue, JsError> {
        let (detector, found) = self
            .detector
            .take()
            .ok_or_else(|| js_error("start detection first"))?;
        // A camera that moved is said as the command line says it (its summary's warnings).
        let warnings = detector
            .camera_note()
            .map(|message| detections::Warning {
                line: None,
                message,
            })
            .into_iter()
            .collect();
        let report = detections::ReadReport {
            detections: detector.detections_from(found),
            format: detections::DetectionFormat::BenchmarkText,
            warnings,
            skipped_rows: 0,
        };
        self.take_detections(report, "found by the motion detector".into())
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
