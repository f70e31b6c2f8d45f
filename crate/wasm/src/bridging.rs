//! Bridging missed detections in the page (V-IOU, computed in the core's [`pipeline::bridger`]):
//! after tracking, the page decodes the footage again and gives each frame's luma plane, in order
//! from frame 1, to a [`FootageBridge`] made from the session's tracks; its `finish` makes the
//! bridged tracks the session's and counts them, as `throughline run --y4m` does with a file.

use crate::{js_error, to_js, Session};
use serde::Serialize;
use throughline_core::{detect, limits, pipeline, track};
use wasm_bindgen::prelude::*;

/// Bridges the gaps of one tracking run's tracks, given the footage frame by frame.
#[wasm_bindgen]
pub struct FootageBridge {
    bridger: track::bridge::Bridger,
    width: usize,
    height: usize,
    /// The session's tracking run the gaps were found in (see [`Session::start_bridging`]).
    run: u32,
}

/// What [`FootageBridge::finish`] did, as a plain JS object (snake_case fields).
#[derive(Serialize)]
struct BridgeSummary {
    /// Gaps between a track's end and a later track's start followed in the footage.
    followed: usize,
    /// Of those, gaps whose forward and backward followings met.
    met: usize,
    /// Gaps not followed (the footage ended first, or too many at once).
    not_followed: usize,
    /// Gaps bridged: tracks joined to the one before them.
    joined: usize,
}

#[wasm_bindgen]
impl Session {
    /// After [`Session::track`] without footage to bridge with (none is open, or it cannot be
    /// decoded here): the tracks' settings then say no gap was bridged (`bridge_frames` 0), as
    /// `throughline run` without `--y4m` writes them, and the counts are made again. Returns the
    /// gap length the settings asked for (0: none; nothing changes then).
    #[wasm_bindgen(js_name = notBridged)]
    pub fn not_bridged(&mut self) -> Result<u32, JsError> {
        let Some(tracks) = self.tracks.as_mut() else {
            return Ok(0);
        };
        let asked = pipeline::not_bridged(tracks);
        if asked > 0 {
            self.recounted()?;
        }
        Ok(asked)
    }

    /// After [`Session::track`], when its settings bridge (`bridge_frames` above 0): a handle that
    /// takes the footage's frames (`width` x `height` pixels, the detections' picture) and joins
    /// the tracks across the gaps it bridges. `undefined` when the settings do not bridge.
    #[wasm_bindgen(js_name = startBridging)]
    pub fn start_bridging(
        &self,
        width: u32,
        height: u32,
    ) -> Result<Option<FootageBridge>, JsError> {
        let tracks = self
            .tracks
            .as_ref()
            .ok_or_else(|| js_error("run tracking first"))?;
        if tracks.config.bridge_frames == 0 {
            return Ok(None);
        }
        let side = limits::MAX_PICTURE_SIDE as u32;
        if width == 0 || height == 0 || width > side || height > side {
            return Err(js_error(format!(
                "footage of {width}x{height} pixels: open footage with a picture of 1 to {side} \
                 pixels a side"
            )));
        }
        let (width, height) = (width as usize, height as usize);
        Ok(Some(FootageBridge {
            bridger: pipeline::bridger(tracks, width, height),
            width,
            height,
            run: self.tracking_runs,
        }))
    }
}

#[wasm_bindgen]
impl FootageBridge {
    /// The last frame (1-based) the gaps need; 0 when none needs footage. Decoding may stop after it.
    #[wasm_bindgen(js_name = lastFrameNeeded)]
    pub fn last_frame_needed(&self) -> u32 {
        self.bridger.last_frame_needed()
    }

    /// Frame `frame` (1-based, in order, none skipped) as its luma plane: `width` bytes a row
    /// from the top-left, the first `width * height` bytes of an I420 or NV12 frame.
    pub fn feed(&mut self, frame: u32, luma: &[u8]) {
        self.bridger.feed(frame, luma);
    }

    /// Frame `frame` as RGBA pixels (a canvas's `getImageData().data`), for frames the page had to
    /// draw; their luma is the detector's conversion of them.
    #[wasm_bindgen(js_name = feedRgba)]
    pub fn feed_rgba(&mut self, frame: u32, rgba: &[u8]) -> Result<(), JsError> {
        let yuv = detect::rgba_to_yuv420(rgba, self.width, self.height)
            .ok_or_else(|| js_error("the frame holds fewer pixels than its size says"))?;
        self.bridger.feed(frame, &yuv[..self.width * self.height]);
        Ok(())
    }

    /// Ends bridging: the session's tracks become the bridged ones and are counted again. Returns
    /// `{followed, met, not_followed, joined}`. Fails when the session has tracked again since.
    pub fn finish(self, session: &mut Session) -> Result<JsValue, JsError> {
        if session.tracking_runs != self.run {
            return Err(js_error(
                "the tracks changed while the footage was read: run tracking again",
            ));
        }
        let tracks = session
            .tracks
            .take()
            .ok_or_else(|| js_error("run tracking first"))?;
        let (bridged, summary) = self.bridger.finish(&tracks);
        session.tracks = Some(bridged);
        session.recounted()?;
        to_js(&BridgeSummary {
            followed: summary.followed,
            met: summary.met,
            not_followed: summary.not_followed,
            joined: summary.joins.len(),
        })
    }
}
