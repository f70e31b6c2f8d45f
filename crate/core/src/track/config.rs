//! Tracker settings: which method, and its parameters, with per-method defaults.
//!
//! A settings file (JSON) names any subset of the fields; the rest take the chosen method's
//! defaults. Unknown fields are an error, so a misspelt setting is never silently ignored.

use super::Method;
use crate::error::{Error, ErrorKind};
use crate::limits::{MAX_AGE_FRAMES, MAX_BRIDGE_FRAMES, MAX_GALLERY};
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

/// The method used when none is named: `deepsort` when the detections carry appearance embeddings,
/// `sort` otherwise. See docs/tracking.md ("Choice of the default method") for the measurements behind
/// it.
pub fn default_method(has_embeddings: bool) -> Method {
    if has_embeddings {
        Method::Deepsort
    } else {
        Method::Sort
    }
}

/// The settings a run uses, resolved as the command line and the browser both do: the method is
/// `method` if given, else the settings file's `method`, else [`default_method`]; the settings are
/// that method's defaults overridden by the file's fields.
pub fn resolve_config(
    method: Option<Method>,
    settings_json: Option<&str>,
    has_embeddings: bool,
) -> Result<TrackerConfig, Error> {
    let named = match settings_json {
        Some(text) => TrackerConfig::method_in_json(text)?,
        None => None,
    };
    let method = method
        .or(named)
        .unwrap_or_else(|| default_method(has_embeddings));
    match settings_json {
        Some(text) => TrackerConfig::from_json(text, method),
        None => Ok(TrackerConfig::for_method(method)),
    }
}

/// Every setting of every method. Fields a method does not use are ignored by it. When written out
/// (reports, tracks files, `tune`), the settings added after the first release appear only where
/// a file without them would be read otherwise.
#[derive(Debug, Clone, PartialEq, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct TrackerConfig {
    pub method: Method,
    /// Detections scoring below this are not used at all.
    pub min_score: f64,
    /// Least IoU for a match between a track's (predicted) box and a detection.
    pub min_iou: f64,
    /// Observations needed before a tentative track is confirmed and numbered.
    pub min_hits: u32,
    /// Frames a confirmed track may go unseen (coasting) before it ends.
    pub max_age: u32,
    /// A track is confirmed only once one of its detections scored at least this (`iou`: σ_h).
    pub confirm_score: f64,
    /// `bytetrack`: detections at or above this score are "high"; between `min_score` and this, "low".
    pub high_score: f64,
    /// `bytetrack`: least score of a detection that starts a new track.
    pub new_track_score: f64,
    /// `bytetrack`: least IoU when matching low-score detections in the second stage.
    pub low_min_iou: f64,
    /// `deepsort`: largest cosine distance between a detection and a track's gallery for a match.
    pub max_cosine_distance: f64,
    /// `deepsort`: embeddings kept per track.
    pub gallery_size: u32,
    /// `deepsort`: largest squared Mahalanobis distance for a match (chi-square 95%, 4 d.o.f.).
    pub max_mahalanobis: f64,
    /// With footage: the longest gap, in frames, between a track's last detection and another
    /// track's first that is bridged by following the object in the pictures (V-IOU); 0 turns
    /// bridging off. Written out only when it differs from the default, so settings, tracks and
    /// reports made without it keep their bytes.
    #[serde(default = "default_bridge_frames")]
    pub bridge_frames: u32,
    /// `deepsort`: the IoU stage (tentative tracks, and tracks missed in the appearance stage)
    /// refuses a pair further apart in appearance than `max_cosine_distance`, as the appearance
    /// stage does (not in the published method; on by default for `deepsort`). Written out when
    /// on, or off for a method whose default is on.
    #[serde(default)]
    pub iou_needs_appearance: bool,
    /// Frames a tentative track may go unseen and still be confirmed later (0: it ends at its
    /// first missed frame, as in the published methods). While it waits, a track seen in the
    /// frame whose box covers its predicted box (IoU at least `tracker::TAKEN_IOU`) ends it: its
    /// person went to that track. Written out when not 0, or 0 for a method whose default is not.
    #[serde(default)]
    pub tentative_max_age: u32,
    /// Least score of a detection that starts a new track; one scoring from `min_score` up to this
    /// only continues a track already followed (as ByteTrack's second stage keeps low-score boxes,
    /// which are mostly people partly hidden). 0: every detection used may start one. `bytetrack`
    /// starts tracks at `new_track_score` besides. Written out when not 0, or 0 for a method whose
    /// default is not.
    #[serde(default)]
    pub start_score: f64,
}

impl Serialize for TrackerConfig {
    /// Every field in order, except the later settings (`bridge_frames`, `iou_needs_appearance`,
    /// `tentative_max_age`, `start_score`) where they have the value a file without them reads as
    /// and the method's default is that value too: so files written before those settings keep
    /// their bytes, and a file written now, read back as settings over the method's defaults
    /// (`--config`), gives these settings again. A new field goes here too (the test
    /// `written_settings_name_every_field_of_the_settings` fails until it does).
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let d = TrackerConfig::for_method(self.method);
        let mut out = s.serialize_struct("TrackerConfig", 16)?;
        out.serialize_field("method", &self.method)?;
        out.serialize_field("min_score", &self.min_score)?;
        out.serialize_field("min_iou", &self.min_iou)?;
        out.serialize_field("min_hits", &self.min_hits)?;
        out.serialize_field("max_age", &self.max_age)?;
        out.serialize_field("confirm_score", &self.confirm_score)?;
        out.serialize_field("high_score", &self.high_score)?;
        out.serialize_field("new_track_score", &self.new_track_score)?;
        out.serialize_field("low_min_iou", &self.low_min_iou)?;
        out.serialize_field("max_cosine_distance", &self.max_cosine_distance)?;
        out.serialize_field("gallery_size", &self.gallery_size)?;
        out.serialize_field("max_mahalanobis", &self.max_mahalanobis)?;
        // Each with the value a file without it reads as.
        later(
            &mut out,
            "bridge_frames",
            &self.bridge_frames,
            &d.bridge_frames,
            &DEFAULT_BRIDGE_FRAMES,
        )?;
        later(
            &mut out,
            "iou_needs_appearance",
            &self.iou_needs_appearance,
            &d.iou_needs_appearance,
            &false,
        )?;
        later(
            &mut out,
            "tentative_max_age",
            &self.tentative_max_age,
            &d.tentative_max_age,
            &0,
        )?;
        later(
            &mut out,
            "start_score",
            &self.start_score,
            &d.start_score,
            &0.0,
        )?;
        out.end()
    }
}

/// A setting added after the first release: skipped where both it and the method's default are
/// `unset`, the value a file without it reads as; else written.
fn later<S: serde::ser::SerializeStruct, T: Serialize + PartialEq>(
    out: &mut S,
    name: &'static str,
    value: &T,
    default: &T,
    unset: &T,
) -> Result<(), S::Error> {
    match value == unset && default == unset {
        true => out.skip_field(name),
        false => out.serialize_field(name, value),
    }
}

/// Frames bridged by default: none. Bridging is asked for in the settings (25, one second at 25
/// frames a second, is a good start); it stays off by default because it moved the event-level
/// errors little where measured (BENCHMARKS.md, "Visual bridging of missed detections") and costs
/// a second reading of the footage.
pub const DEFAULT_BRIDGE_FRAMES: u32 = 0;

fn default_bridge_frames() -> u32 {
    DEFAULT_BRIDGE_FRAMES
}

impl TrackerConfig {
    /// The defaults of a method: the settings every method shares, changed where the method's own
    /// file says.
    pub fn for_method(method: Method) -> Self {
        let base = TrackerConfig {
            method,
            min_score: 0.3,
            min_iou: 0.3,
            min_hits: 3,
            max_age: 30,
            confirm_score: 0.0,
            high_score: 0.6,
            new_track_score: 0.7,
            low_min_iou: 0.5,
            max_cosine_distance: 0.2,
            gallery_size: 100,
            max_mahalanobis: super::kalman::CHI2_95_4DOF,
            bridge_frames: DEFAULT_BRIDGE_FRAMES,
            iou_needs_appearance: false,
            tentative_max_age: 0,
            start_score: 0.0,
        };
        (method.def().defaults)(base)
    }

    /// The method a JSON settings file names, if any.
    pub fn method_in_json(text: &str) -> Result<Option<Method>, Error> {
        let fields = Self::json_object(text)?;
        match fields.get("method") {
            None => Ok(None),
            Some(serde_json::Value::String(s)) => Method::parse(s).map(Some).ok_or_else(|| {
                settings_error(format!(
                    "unknown method `{s}` in the settings file: use {}",
                    Method::names_listed()
                ))
            }),
            Some(_) => Err(settings_error(
                "`method` in the settings file must be a string",
            )),
        }
    }

    fn json_object(text: &str) -> Result<serde_json::Map<String, serde_json::Value>, Error> {
        let value: serde_json::Value = serde_json::from_str(text)
            .map_err(|e| settings_error(format!("the settings file is not valid JSON: {e}")))?;
        match value {
            serde_json::Value::Object(fields) => Ok(fields),
            _ => Err(settings_error(
                "the settings file must be a JSON object such as {\"method\": \"sort\", \"max_age\": 20}",
            )),
        }
    }

    /// Settings from a JSON settings file for `method`: that method's defaults, overridden by every
    /// other field the file gives (its own `method` field is left to [`Self::method_in_json`]).
    pub fn from_json(text: &str, method: Method) -> Result<Self, Error> {
        let fields = Self::json_object(text)?;
        let mut merged = serde_json::to_value(Self::for_method(method))
            .map_err(|e| settings_error(e.to_string()))?;
        if let serde_json::Value::Object(m) = &mut merged {
            for (k, v) in fields.clone() {
                if k != "method" {
                    m.insert(k, v);
                }
            }
        }
        let config: TrackerConfig = serde_json::from_value(merged).map_err(|e| {
            // Which field: the first whose value alone, over the defaults, is refused.
            let field = fields.iter().find_map(|(k, v)| {
                let mut one = serde_json::to_value(Self::for_method(method)).ok()?;
                one.as_object_mut()?.insert(k.clone(), v.clone());
                serde_json::from_value::<TrackerConfig>(one)
                    .err()
                    .map(|_| k.clone())
            });
            let message = crate::error::plain_json_words(&e.to_string());
            match field {
                Some(k) => settings_error(format!("`{k}` in the settings file: {message}")),
                None => settings_error(format!("in the settings file: {message}")),
            }
        })?;
        config.validate()?;
        Ok(config)
    }

    /// Checks ranges, naming the field to fix.
    pub fn validate(&self) -> Result<(), Error> {
        // Scores are thresholds on detections' scores, which are 0..1 (the readers warn of others).
        let unit = [
            ("min_iou", self.min_iou),
            ("low_min_iou", self.low_min_iou),
            ("max_cosine_distance", self.max_cosine_distance),
            ("min_score", self.min_score),
            ("confirm_score", self.confirm_score),
            ("high_score", self.high_score),
            ("new_track_score", self.new_track_score),
            ("start_score", self.start_score),
        ];
        for (name, v) in unit {
            if !(0.0..=1.0).contains(&v) {
                if name.ends_with("_score") {
                    return Err(settings_error(format!(
                        "`{name}` is {v}, but must be between 0 and 1: scores are read as 0..1 \
                         (a percentage divided by 100)"
                    )));
                }
                return Err(settings_error(format!(
                    "`{name}` is {v}, but must be between 0 and 1"
                )));
            }
        }
        let finite = [("max_mahalanobis", self.max_mahalanobis)];
        for (name, v) in finite {
            if !v.is_finite() {
                return Err(settings_error(format!("`{name}` must be a finite number")));
            }
        }
        if self.min_hits == 0 {
            return Err(settings_error("`min_hits` must be at least 1"));
        }
        if self.gallery_size == 0 || self.gallery_size > MAX_GALLERY {
            return Err(settings_error(format!(
                "`gallery_size` must be from 1 to {MAX_GALLERY}"
            )));
        }
        if self.max_age > MAX_AGE_FRAMES {
            return Err(settings_error(format!(
                "`max_age` is {}, but a track may coast at most {MAX_AGE_FRAMES} frames",
                self.max_age
            )));
        }
        if self.bridge_frames > MAX_BRIDGE_FRAMES {
            return Err(settings_error(format!(
                "`bridge_frames` is {}, but a gap of at most {MAX_BRIDGE_FRAMES} frames may be \
                 bridged (0 turns bridging off)",
                self.bridge_frames
            )));
        }
        Ok(())
    }
}

fn settings_error(message: impl Into<String>) -> Error {
    Error::new(ErrorKind::Settings, message)
}
