//! The detector's settings, read from a JSON settings file (docs/detector-settings.md); every
//! field has a default.

use crate::detections::Perspective;
use crate::error::{Error, ErrorKind};
use serde::{Deserialize, Serialize};

/// Settings of the detector. Heights are pixels of an upright person (or the objects to count).
/// A settings file is a JSON object with any of these fields (docs/detector-settings.md).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct DetectorConfig {
    /// Form the background from pictures sampled over the whole clip, read once before detection
    /// ([`super::Detector::sample`]), so nothing warms up and people in view at the start are
    /// found. Off, or when the footage can be read only once (a pipe), it forms over
    /// `warm_up_frames`.
    pub whole_clip_background: bool,
    /// Frames during which the background forms and nothing is reported (without the whole clip).
    pub warm_up_frames: u32,
    /// Least difference from the background (grey levels) that can count as foreground.
    pub min_difference: u8,
    /// Foreground also needs a difference above this many times the pixel's usual deviation.
    pub deviation_factor: f32,
    /// A darker pixel with `shadow_low <= Y / background <= shadow_high` and chroma within
    /// `shadow_chroma` of the background's is a shadow.
    pub shadow_low: f32,
    pub shadow_high: f32,
    pub shadow_chroma: u8,
    /// Expected height of an object whose bottom is at the top row and at the bottom row of the
    /// picture; in between it is interpolated. `None`: no perspective rule, only `min_area`.
    pub far_height: Option<f64>,
    pub near_height: Option<f64>,
    /// Least blob area in pixels (after clean-up).
    pub min_area: u32,
    /// Width of one object as a fraction of its expected height; a blob wider than 1.7 times this
    /// with a clear waist in its column profile is split in two.
    pub width_ratio: f64,
    /// Guess each box's class from its shape and size against the expected height
    /// ([`Detector::guess_class`]); needs `far_height` or `near_height`.
    pub guess_class: bool,
    /// Give each box a colour histogram ([`Detector::appearance`]) as its appearance
    /// vector, so the `deepsort` method can use clothes to tell people apart. Off by default: on
    /// the simulator's footage it made the counts worse (BENCHMARKS.md).
    pub appearance: bool,
    /// Pass the boxes found through a tracker that cuts a box covering the predicted places of
    /// two or more of its tracks, and wider than one person at its row, into one box per track
    /// (people walking side by side or overtaking seen as one blob; [`crate::track::cut_merged`]);
    /// needs `far_height` or `near_height`.
    pub split_merged: bool,
}

impl Default for DetectorConfig {
    fn default() -> Self {
        Self {
            whole_clip_background: true,
            warm_up_frames: 50,
            min_difference: 18,
            deviation_factor: 3.0,
            shadow_low: 0.4,
            shadow_high: 0.93,
            shadow_chroma: 8,
            far_height: None,
            near_height: None,
            min_area: 60,
            width_ratio: 0.35,
            guess_class: true,
            appearance: false,
            split_merged: true,
        }
    }
}

impl DetectorConfig {
    /// The expected size of a person at each row of a picture `picture_height` rows high, from the
    /// two heights (one given: the same at every row); `None` with neither.
    pub fn perspective(&self, picture_height: usize) -> Option<Perspective> {
        let (far_height, near_height) = match (self.far_height, self.near_height) {
            (Some(f), Some(n)) => (f, n),
            (Some(h), None) | (None, Some(h)) => (h, h),
            (None, None) => return None,
        };
        Some(Perspective {
            far_height,
            near_height,
            picture_height: picture_height.max(1) as f64,
            width_ratio: self.width_ratio,
        })
    }

    /// Reads a settings file's text; unknown or mistyped fields are named in the error.
    pub fn from_json(text: &str) -> Result<DetectorConfig, Error> {
        let c: DetectorConfig = serde_json::from_str(text).map_err(|e| {
            settings_error(format!(
                "detector settings: {e} (fields are listed in docs/detector-settings.md)"
            ))
        })?;
        if !(c.shadow_low > 0.0 && c.shadow_low < c.shadow_high && c.shadow_high <= 1.0) {
            return Err(settings_error(
                "detector settings: need 0 < shadow_low < shadow_high <= 1",
            ));
        }
        if !(c.deviation_factor.is_finite() && c.deviation_factor >= 0.0) {
            return Err(settings_error(
                "detector settings: deviation_factor must be a number >= 0",
            ));
        }
        for (name, v) in [("far_height", c.far_height), ("near_height", c.near_height)] {
            if v.is_some_and(|h| !(h.is_finite() && h > 0.0)) {
                return Err(settings_error(format!(
                    "detector settings: {name} must be a height in pixels > 0"
                )));
            }
        }
        if !(c.width_ratio.is_finite() && c.width_ratio > 0.0) {
            return Err(settings_error("detector settings: width_ratio must be > 0"));
        }
        Ok(c)
    }
}

fn settings_error(message: impl Into<String>) -> Error {
    Error::new(ErrorKind::Settings, message)
}
