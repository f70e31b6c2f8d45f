//! The counting plan: where the screenlines and zones are, how frames map to time, and the optional
//! ground-plane calibration. Read from JSON (`docs/plan-format.md`, `docs/plan.schema.json`).
//!
//! Geometry is in image pixels (x right, y down). A screenline is a polyline `p0 → p1 → …`; a crossing
//! is `forward` when the anchor moves from the left-hand side of a segment to its right-hand side as
//! seen on screen looking from its first point to its second, i.e. when `cross(p1 − p0, q − p0)` goes
//! from negative to positive; otherwise `backward`.

mod calibration;
mod check;
pub mod clock;

pub use calibration::{Homography, PointPair};

use crate::error::{Error, ErrorKind};
use crate::geometry::{Polygon, Segment};
use clock::LocalTime;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

/// Which point of a box is tested against lines and zones.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Anchor {
    /// Bottom-centre of the box: where feet or wheels meet the ground.
    #[default]
    Bottom,
    /// Centre of the box.
    Centre,
}

/// A screenline as written in the plan.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct ScreenlineSpec {
    pub name: String,
    pub points: Vec<[f64; 2]>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub forward: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub backward: Option<String>,
}

/// A zone as written in the plan.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct ZoneSpec {
    pub name: String,
    pub polygon: Vec<[f64; 2]>,
}

/// Image-to-ground point pairs (at least 4) and the ground unit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct CalibrationSpec {
    pub pairs: Vec<PointPair>,
    #[serde(default = "default_unit")]
    pub unit: String,
}

fn default_unit() -> String {
    "m".into()
}

/// Counting rules that can be tuned; every field has a default.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields, default)]
pub struct Rules {
    /// How far beyond a line (or inside/outside a zone edge) the anchor must get before a crossing
    /// counts, as a fraction of the box height.
    pub hysteresis: f64,
    /// Longest gap, in seconds, across which an ended track and a new one may be joined near a line.
    pub join_seconds: f64,
    /// Largest distance between where the ended track was heading and where the new one starts, as a
    /// multiple of the box height.
    pub join_box_heights: f64,
    /// The hysteresis for zone edges where it should differ from `hysteresis` (lines): a zone near
    /// the edge of the picture cannot be left by much before its leaver is out of sight.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub zone_hysteresis: Option<f64>,
    /// Each track's path is counted after averaging its anchor over this many seconds centred on
    /// each frame (0: counted on the boxes as the tracker gave them), so that a box jittering on a
    /// line or beside a line's end does not decide a crossing.
    pub smooth_seconds: f64,
}

impl Rules {
    /// The hysteresis for zone entries and exits.
    pub fn zone_hysteresis(&self) -> f64 {
        self.zone_hysteresis.unwrap_or(self.hysteresis)
    }

    /// How many frames either side of each point a path is averaged over at `frame_rate`
    /// (`smooth_seconds` and the frame rate are bounded by the plan's checks).
    pub fn smooth_half_frames(&self, frame_rate: f64) -> u32 {
        (self.smooth_seconds * frame_rate / 2.0).round() as u32
    }
}

/// How far past a line a crossing must get, as a fraction of the box height, unless the plan says.
/// Measured with paths averaged over [`DEFAULT_SMOOTH_SECONDS`] (BENCHMARKS.md, "Counting on
/// averaged paths": 0.15 on the boxes as given).
pub const DEFAULT_HYSTERESIS: f64 = 0.1;

/// Over how many seconds each path is averaged before counting, unless the plan says (about 9
/// frames at 25 a second; BENCHMARKS.md, "Counting on averaged paths").
pub const DEFAULT_SMOOTH_SECONDS: f64 = 0.35;

/// How the `generator` of a document written before 0.2.0 begins (every output names its program
/// and version): those versions counted paths as the tracker gave them (no `rules.smooth_seconds`)
/// with a crossing margin of [`HYSTERESIS_BEFORE_AVERAGED_PATHS`].
pub const GENERATOR_BEFORE_AVERAGED_PATHS: &str = "throughline 0.1.";

/// The crossing margin before paths were averaged (0.1.x's default).
pub const HYSTERESIS_BEFORE_AVERAGED_PATHS: f64 = 0.15;

/// Whether a document with this `generator` was counted before paths were averaged.
pub fn counted_before_averaged_paths(generator: &str) -> bool {
    generator.starts_with(GENERATOR_BEFORE_AVERAGED_PATHS)
}

/// The larger line margin suggested for boxes found by the fixed-camera detector, whose boxes jump
/// where people join or split; zones then keep [`DEFAULT_HYSTERESIS`] (see docs/detector-settings.md).
pub const FOOTAGE_HYSTERESIS: f64 = 0.35;

/// Interval length, in minutes, unless the plan says (the usual 15-minute count interval).
pub const DEFAULT_INTERVAL_MINUTES: f64 = 15.0;

impl Default for Rules {
    fn default() -> Self {
        Self {
            hysteresis: DEFAULT_HYSTERESIS,
            join_seconds: 2.0,
            join_box_heights: 1.0,
            zone_hysteresis: None,
            smooth_seconds: DEFAULT_SMOOTH_SECONDS,
        }
    }
}

/// The plan file as written.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct PlanSpec {
    pub frame_rate: f64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub start: Option<String>,
    #[serde(default = "default_interval")]
    pub interval_minutes: f64,
    #[serde(default)]
    pub anchor: Anchor,
    #[serde(default)]
    pub screenlines: Vec<ScreenlineSpec>,
    #[serde(default)]
    pub zones: Vec<ZoneSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub calibration: Option<CalibrationSpec>,
    #[serde(default)]
    pub rules: Rules,
}

fn default_interval() -> f64 {
    DEFAULT_INTERVAL_MINUTES
}

/// A screenline ready for counting.
#[derive(Debug, Clone, PartialEq)]
pub struct Screenline {
    pub name: String,
    pub segments: Vec<Segment>,
    pub forward: String,
    pub backward: String,
}

/// A zone ready for counting.
#[derive(Debug, Clone, PartialEq)]
pub struct Zone {
    pub name: String,
    pub polygon: Polygon,
}

/// A checked plan.
#[derive(Debug, Clone, PartialEq)]
pub struct Plan {
    pub spec: PlanSpec,
    pub start: Option<LocalTime>,
    pub screenlines: Vec<Screenline>,
    pub zones: Vec<Zone>,
    pub calibration: Option<Homography>,
}

impl Plan {
    /// Reads and checks a plan from JSON text. Errors name the field (or the line and column of a
    /// syntax error) and say what to fix.
    pub fn from_json(text: &str) -> Result<Plan, Error> {
        Plan::from_spec(Plan::spec_from_json(text)?)
    }

    /// Reads a plan's fields from JSON text, without the checks of their values: the mistakes
    /// only the file can mend (JSON, unknown or misspelt fields, values of the wrong kind), each
    /// at its line and column. The page takes a file that passes this, and shows what the checks
    /// find for the person to mend there.
    pub fn spec_from_json(text: &str) -> Result<PlanSpec, Error> {
        serde_json::from_str(text).map_err(|e| {
            let err = Error::from_json(ErrorKind::Plan, &e, " (see docs/plan-format.md)");
            // A value of the wrong kind (`"frame_rate": "25"`): serde_json says where, not
            // which field; the key written before it on its line says. (Not for an unknown or
            // missing field: the key before is another field, or the object's own.)
            let wrong_value = e.is_data() && e.to_string().starts_with("invalid ");
            let key = wrong_value.then(|| crate::text::key_before(text, e.line(), e.column()));
            match key.flatten() {
                Some(k) => err.in_field(k),
                None => err,
            }
        })
    }

    /// The JSON Schema of a plan file's fields, generated from [`PlanSpec`] (without the ranges
    /// and patterns the checks apply; `docs/plan.schema.json` has those and is tested against it).
    pub fn schema() -> serde_json::Value {
        serde_json::to_value(schemars::schema_for!(PlanSpec)).unwrap_or_default()
    }

    /// Checks a plan given as a structure.
    pub fn from_spec(spec: PlanSpec) -> Result<Plan, Error> {
        check::plan(spec)
    }

    /// The lines and zones lying wholly beyond one edge of a picture of `width` × `height`
    /// pixels, named ("line `a`", "zone `b`"): a plan drawn for other footage counts nothing
    /// there, and says nothing of it.
    pub fn outside_picture(&self, width: f64, height: f64) -> Vec<String> {
        let beyond = |points: &[[f64; 2]]| {
            !points.is_empty()
                && (points.iter().all(|p| p[0] < 0.0)
                    || points.iter().all(|p| p[0] > width)
                    || points.iter().all(|p| p[1] < 0.0)
                    || points.iter().all(|p| p[1] > height))
        };
        let lines = self.spec.screenlines.iter().filter(|l| beyond(&l.points));
        let zones = self.spec.zones.iter().filter(|z| beyond(&z.polygon));
        lines
            .map(|l| format!("line `{}`", l.name))
            .chain(zones.map(|z| format!("zone `{}`", z.name)))
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::Plan;

    #[test]
    fn lines_and_zones_beyond_the_picture_are_named() {
        let plan = Plan::from_json(
            r#"{"frame_rate": 25, "screenlines": [
                {"name": "in", "points": [[-50, 100], [700, 100]]},
                {"name": "below", "points": [[60, 400], [600, 420]]}],
              "zones": [{"name": "far", "polygon": [[650, 10], [700, 10], [700, 50]]}]}"#,
        )
        .unwrap();
        assert_eq!(
            plan.outside_picture(640.0, 360.0),
            vec!["line `below`", "zone `far`"]
        );
        assert!(plan.outside_picture(1024.0, 576.0).is_empty());
    }
}
