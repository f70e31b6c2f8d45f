//! Checking a plan as written: every number in range, every name present and unique, every line
//! and zone with enough distinct points, the calibration solvable. Each error names the field.

use super::clock::LocalTime;
use super::{Homography, Plan, PlanSpec, Rules, Screenline, ScreenlineSpec, Zone, ZoneSpec};
use crate::error::{Error, ErrorKind};
use crate::geometry::{Point, Polygon, Segment};
use crate::limits::{
    MAX_FRAME_RATE, MAX_HYSTERESIS, MAX_INTERVAL_MINUTES, MAX_PLAN_ITEMS, MAX_POINTS,
    MAX_SMOOTH_SECONDS, MAX_YEAR, MIN_FRAME_RATE, MIN_INTERVAL_MINUTES, MIN_YEAR,
};
use std::collections::HashSet;

fn err(field: impl Into<String>, message: impl Into<String>) -> Error {
    Error::new(ErrorKind::Plan, message).in_field(field)
}

fn point(p: [f64; 2]) -> Point {
    Point::new(p[0], p[1])
}

/// The checked plan, or the first problem found.
pub(super) fn plan(spec: PlanSpec) -> Result<Plan, Error> {
    let start = timing(&spec)?;
    sizes(&spec)?;
    rules(&spec.rules)?;
    let mut names = HashSet::new();
    let screenlines = spec
        .screenlines
        .iter()
        .enumerate()
        .map(|(i, l)| screenline(i, l, &mut names))
        .collect::<Result<Vec<_>, _>>()?;
    let zones = spec
        .zones
        .iter()
        .enumerate()
        .map(|(i, z)| zone(i, z, &mut names))
        .collect::<Result<Vec<_>, _>>()?;
    let calibration = match &spec.calibration {
        None => None,
        Some(c) => Some(Homography::from_pairs(&c.pairs).map_err(|m| err("calibration.pairs", m))?),
    };
    Ok(Plan {
        spec,
        start,
        screenlines,
        zones,
        calibration,
    })
}

/// The frame rate, the interval and the recording start.
fn timing(spec: &PlanSpec) -> Result<Option<LocalTime>, Error> {
    if !(MIN_FRAME_RATE..=MAX_FRAME_RATE).contains(&spec.frame_rate) {
        return Err(err(
            "frame_rate",
            format!(
                "must be the footage's frames per second, from one a minute ({MIN_FRAME_RATE:.4}) to \
                 {MAX_FRAME_RATE} (for example 25)"
            ),
        ));
    }
    if !(MIN_INTERVAL_MINUTES..=MAX_INTERVAL_MINUTES).contains(&spec.interval_minutes) {
        return Err(err(
            "interval_minutes",
            format!(
                "must be from {MIN_INTERVAL_MINUTES} to {MAX_INTERVAL_MINUTES} minutes (15 is usual)"
            ),
        ));
    }
    match &spec.start {
        None => Ok(None),
        Some(s) => LocalTime::parse(s).map(Some).ok_or_else(|| {
            err(
                "start",
                format!(
                    "`{s}` is not a local time like 2026-03-02T07:00:00 (years {MIN_YEAR} to {MAX_YEAR})"
                ),
            )
        }),
    }
}

/// How many lines and zones, and how many points each: the limits.
fn sizes(spec: &PlanSpec) -> Result<(), Error> {
    let items = spec.screenlines.len() + spec.zones.len();
    if items > MAX_PLAN_ITEMS {
        return Err(err(
            "screenlines",
            format!("{items} screenlines and zones: a plan holds at most {MAX_PLAN_ITEMS}"),
        ));
    }
    let lines = spec
        .screenlines
        .iter()
        .map(|l| ("screenlines", l.points.len()));
    let zones = spec.zones.iter().map(|z| ("zones", z.polygon.len()));
    for (k, (field, n)) in lines.chain(zones).enumerate() {
        if n > MAX_POINTS {
            let i = if field == "zones" {
                k - spec.screenlines.len()
            } else {
                k
            };
            return Err(err(
                format!("{field}[{i}]"),
                format!("{n} points: a line or zone has at most {MAX_POINTS}"),
            ));
        }
    }
    Ok(())
}

fn rules(r: &Rules) -> Result<(), Error> {
    let margin = format!("must be between 0 and {MAX_HYSTERESIS} (a fraction of the box height)");
    let within = |h: f64| h.is_finite() && (0.0..=MAX_HYSTERESIS).contains(&h);
    if !within(r.hysteresis) {
        return Err(err("rules.hysteresis", &margin));
    }
    if r.zone_hysteresis.is_some_and(|h| !within(h)) {
        return Err(err("rules.zone_hysteresis", &margin));
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
    if !(r.smooth_seconds.is_finite() && (0.0..=MAX_SMOOTH_SECONDS).contains(&r.smooth_seconds)) {
        return Err(err(
            "rules.smooth_seconds",
            format!("must be between 0 and {MAX_SMOOTH_SECONDS} seconds (0: no averaging)"),
        ));
    }
    Ok(())
}

/// A line's or zone's name: present, and not used by another line or zone.
fn name(field: &str, kind: &str, name: &str, names: &mut HashSet<String>) -> Result<(), Error> {
    if name.trim().is_empty() {
        return Err(err(
            format!("{field}.name"),
            format!("give the {kind} a name"),
        ));
    }
    if !names.insert(name.to_string()) {
        return Err(err(
            format!("{field}.name"),
            format!("the name `{name}` is used twice: names must differ"),
        ));
    }
    Ok(())
}

fn screenline(
    i: usize,
    l: &ScreenlineSpec,
    names: &mut HashSet<String>,
) -> Result<Screenline, Error> {
    let field = format!("screenlines[{i}]");
    name(&field, "screenline", &l.name, names)?;
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
    Ok(Screenline {
        name: l.name.clone(),
        segments,
        forward: l.forward.clone().unwrap_or_else(|| "forward".into()),
        backward: l.backward.clone().unwrap_or_else(|| "backward".into()),
    })
}

fn zone(i: usize, z: &ZoneSpec, names: &mut HashSet<String>) -> Result<Zone, Error> {
    let field = format!("zones[{i}]");
    name(&field, "zone", &z.name, names)?;
    if z.polygon.len() < 3 {
        return Err(err(
            format!("{field}.polygon"),
            format!("a zone needs at least 3 corners, found {}", z.polygon.len()),
        ));
    }
    check_points(&z.polygon, &format!("{field}.polygon"))?;
    let polygon = Polygon::new(z.polygon.iter().copied().map(point).collect());
    let [x0, y0] = z.polygon[0];
    // Every corner on the line through the first corner and the first other one (or all one point).
    let on_one_line = z
        .polygon
        .iter()
        .find(|&&p| p != [x0, y0])
        .is_none_or(|&[x1, y1]| {
            z.polygon
                .iter()
                .all(|&[x, y]| (x1 - x0) * (y - y0) == (x - x0) * (y1 - y0))
        });
    if on_one_line {
        return Err(err(
            format!("{field}.polygon"),
            format!(
                "zone `{}`: the corners are all on one line, so they enclose no area",
                z.name
            ),
        ));
    }
    // Edges that cross first: a bow tie's two halves can cancel to no area.
    if let Some((a, b)) = polygon.crossing_edges() {
        let n = z.polygon.len();
        return Err(err(
            format!("{field}.polygon"),
            format!(
                "zone `{}`: the edge from corner {a} to {} crosses the edge from corner {b} to {}: \
                 list the corners in order around the zone",
                z.name,
                (a + 1) % n,
                (b + 1) % n
            ),
        ));
    }
    if polygon.area() == 0.0 {
        return Err(err(
            format!("{field}.polygon"),
            format!("zone `{}`: the corners enclose no area", z.name),
        ));
    }
    Ok(Zone {
        name: z.name.clone(),
        polygon,
    })
}

fn check_points(points: &[[f64; 2]], field: &str) -> Result<(), Error> {
    for (k, p) in points.iter().enumerate() {
        if !(crate::limits::in_range(p[0]) && crate::limits::in_range(p[1])) {
            return Err(err(
                format!("{field}[{k}]"),
                "coordinates must be finite numbers of pixels, within ±10^12",
            ));
        }
    }
    Ok(())
}
