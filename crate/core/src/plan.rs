//! The counting plan: where the screenlines and zones are, how frames map to time, and the optional
//! ground-plane calibration. Read from JSON (`docs/plan-format.md`, `docs/plan.schema.json`).
//!
//! Geometry is in image pixels (x right, y down). A screenline is a polyline `p0 → p1 → …`; a crossing
//! is `forward` when the anchor moves from the left-hand side of a segment to its right-hand side as
//! seen on screen looking from its first point to its second, i.e. when `cross(p1 − p0, q − p0)` goes
//! from negative to positive; otherwise `backward`.

use crate::clock::LocalTime;
use crate::geometry::{Point, Polygon, Segment};
use serde::{Deserialize, Serialize};
use std::fmt;

/// Which point of a box is tested against lines and zones.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "lowercase")]
pub enum Anchor {
    /// Bottom-centre of the box: where feet or wheels meet the ground.
    #[default]
    Bottom,
    /// Centre of the box.
    Centre,
}

/// A screenline as written in the plan.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
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
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ZoneSpec {
    pub name: String,
    pub polygon: Vec<[f64; 2]>,
}

/// One image point and where it lies on the ground.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PointPair {
    pub image: [f64; 2],
    pub ground: [f64; 2],
}

/// Image-to-ground point pairs (at least 4) and the ground unit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
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
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
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
}

impl Rules {
    /// The hysteresis for zone entries and exits.
    pub fn zone_hysteresis(&self) -> f64 {
        self.zone_hysteresis.unwrap_or(self.hysteresis)
    }
}

impl Default for Rules {
    fn default() -> Self {
        Self {
            hysteresis: 0.15,
            join_seconds: 2.0,
            join_box_heights: 1.0,
            zone_hysteresis: None,
        }
    }
}

/// The plan file as written.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
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
    15.0
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
    pub calibration: Option<crate::calibrate::Homography>,
}

/// A plan problem: the field it concerns (a JSON path such as `screenlines[0].points[2]`), and what to fix.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PlanError {
    pub field: String,
    pub message: String,
    /// 1-based line and column in the file, for syntax and type errors.
    pub position: Option<(usize, usize)>,
}

impl fmt::Display for PlanError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if let Some((l, c)) = self.position {
            write!(f, "line {l}, column {c}: ")?;
        }
        if self.field.is_empty() {
            f.write_str(&self.message)
        } else {
            write!(f, "`{}`: {}", self.field, self.message)
        }
    }
}

impl std::error::Error for PlanError {}

fn err(field: impl Into<String>, message: impl Into<String>) -> PlanError {
    PlanError {
        field: field.into(),
        message: message.into(),
        position: None,
    }
}

fn point(p: [f64; 2]) -> Point {
    Point::new(p[0], p[1])
}

impl Plan {
    /// Reads and checks a plan from JSON text.
    pub fn from_json(text: &str) -> Result<Plan, PlanError> {
        let spec: PlanSpec = serde_json::from_str(text).map_err(|e| {
            let mut message = e.to_string();
            if let Some(cut) = message.rfind(" at line ") {
                message.truncate(cut);
            }
            PlanError {
                field: String::new(),
                message: format!("{message} (see docs/plan-format.md)"),
                position: Some((e.line().max(1), e.column().max(1))),
            }
        })?;
        Plan::from_spec(spec)
    }

    /// Checks a plan given as a structure.
    pub fn from_spec(spec: PlanSpec) -> Result<Plan, PlanError> {
        if !(spec.frame_rate.is_finite() && spec.frame_rate > 0.0 && spec.frame_rate <= 1000.0) {
            return Err(err(
                "frame_rate",
                "must be the footage's frames per second, above 0 (for example 25)",
            ));
        }
        if !(spec.interval_minutes.is_finite()
            && spec.interval_minutes > 0.0
            && spec.interval_minutes <= 1440.0)
        {
            return Err(err(
                "interval_minutes",
                "must be above 0 and at most 1440 (15 is usual)",
            ));
        }
        let start = match &spec.start {
            None => None,
            Some(s) => Some(LocalTime::parse(s).ok_or_else(|| {
                err(
                    "start",
                    format!("`{s}` is not a local time like 2026-03-02T07:00:00"),
                )
            })?),
        };
        let r = spec.rules;
        if !(r.hysteresis.is_finite() && (0.0..=2.0).contains(&r.hysteresis)) {
            return Err(err(
                "rules.hysteresis",
                "must be between 0 and 2 (a fraction of the box height)",
            ));
        }
        if r.zone_hysteresis
            .is_some_and(|h| !(h.is_finite() && (0.0..=2.0).contains(&h)))
        {
            return Err(err(
                "rules.zone_hysteresis",
                "must be between 0 and 2 (a fraction of the box height)",
            ));
        }
        if !(r.join_seconds.is_finite() && (0.0..=60.0).contains(&r.join_seconds)) {
            return Err(err(
                "rules.join_seconds",
                "must be between 0 and 60 seconds",
            ));
        }
        if !(r.join_box_heights.is_finite() && (0.0..=10.0).contains(&r.join_box_heights)) {
            return Err(err("rules.join_box_heights", "must be between 0 and 10"));
        }
        let mut names = std::collections::HashSet::new();
        let mut screenlines = Vec::new();
        for (i, l) in spec.screenlines.iter().enumerate() {
            let field = format!("screenlines[{i}]");
            if l.name.trim().is_empty() {
                return Err(err(format!("{field}.name"), "give the screenline a name"));
            }
            if !names.insert(l.name.clone()) {
                return Err(err(
                    format!("{field}.name"),
                    format!("the name `{}` is used twice: names must differ", l.name),
                ));
            }
            if l.points.len() < 2 {
                return Err(err(
                    format!("{field}.points"),
                    format!(
                        "a screenline needs at least 2 points, found {}",
                        l.points.len()
                    ),
                ));
            }
            check_points(&l.points, &format!("{field}.points"))?;
            let mut segments = Vec::new();
            for (k, w) in l.points.windows(2).enumerate() {
                let s = Segment::new(point(w[0]), point(w[1]));
                if s.length() == 0.0 {
                    return Err(err(
                        format!("{field}.points[{}]", k + 1),
                        "repeats the point before it: a zero-length segment has no direction",
                    ));
                }
                segments.push(s);
            }
            screenlines.push(Screenline {
                name: l.name.clone(),
                segments,
                forward: l.forward.clone().unwrap_or_else(|| "forward".into()),
                backward: l.backward.clone().unwrap_or_else(|| "backward".into()),
            });
        }
        let mut zones = Vec::new();
        for (i, z) in spec.zones.iter().enumerate() {
            let field = format!("zones[{i}]");
            if z.name.trim().is_empty() {
                return Err(err(format!("{field}.name"), "give the zone a name"));
            }
            if !names.insert(z.name.clone()) {
                return Err(err(
                    format!("{field}.name"),
                    format!("the name `{}` is used twice: names must differ", z.name),
                ));
            }
            if z.polygon.len() < 3 {
                return Err(err(
                    format!("{field}.polygon"),
                    format!("a zone needs at least 3 corners, found {}", z.polygon.len()),
                ));
            }
            check_points(&z.polygon, &format!("{field}.polygon"))?;
            let polygon = Polygon::new(z.polygon.iter().copied().map(point).collect());
            if polygon.area() == 0.0 {
                return Err(err(
                    format!("{field}.polygon"),
                    "the corners enclose no area (all on one line?)",
                ));
            }
            zones.push(Zone {
                name: z.name.clone(),
                polygon,
            });
        }
        let calibration = match &spec.calibration {
            None => None,
            Some(c) => Some(
                crate::calibrate::Homography::from_pairs(&c.pairs)
                    .map_err(|m| err("calibration.pairs", m))?,
            ),
        };
        Ok(Plan {
            spec,
            start,
            screenlines,
            zones,
            calibration,
        })
    }
}

fn check_points(points: &[[f64; 2]], field: &str) -> Result<(), PlanError> {
    for (k, p) in points.iter().enumerate() {
        if !(p[0].is_finite() && p[1].is_finite()) {
            return Err(err(
                format!("{field}[{k}]"),
                "coordinates must be finite numbers of pixels",
            ));
        }
    }
    Ok(())
}
