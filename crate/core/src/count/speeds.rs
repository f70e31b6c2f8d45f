//! Stage 4d: speeds on the ground plane, when the plan is calibrated: each counted track's
//! distance over its time in view, by class, with mean, median and 85th percentile.

use super::paths::{Counted, PathPoint};
use super::stats::summary;
use crate::plan::{Homography, Plan};
use crate::report::{SpeedReport, Summary, TrackSpeed};
use std::collections::BTreeMap;

/// Speeds of the counted tracks, or `None` without a calibration.
pub(super) fn speeds(counted: &[Counted], plan: &Plan) -> Option<SpeedReport> {
    let h = plan.calibration.as_ref()?;
    let unit = plan
        .spec
        .calibration
        .as_ref()
        .map_or("m".to_string(), |c| c.unit.clone());
    let fps = plan.spec.frame_rate;
    let per_track: Vec<TrackSpeed> = counted
        .iter()
        .filter_map(|c| track_speed(c, h, fps))
        .collect();
    let mut by_class: BTreeMap<String, Vec<f64>> = BTreeMap::new();
    for t in &per_track {
        by_class.entry(t.class.clone()).or_default().push(t.speed);
    }
    let all = summary(per_track.iter().map(|t| t.speed).collect());
    let kmh = |v: Option<f64>| v.map(|x| (x * 3.6 * 100.0).round() / 100.0);
    let all_kmh = (unit == "m").then(|| Summary {
        count: all.count,
        mean: kmh(all.mean),
        median: kmh(all.median),
        p85: kmh(all.p85),
    });
    Some(SpeedReport {
        unit,
        by_class: by_class.into_iter().map(|(k, v)| (k, summary(v))).collect(),
        all,
        all_kmh,
        tracks: per_track,
    })
}

/// One track's distance and speed, for tracks in view at least a second.
fn track_speed(c: &Counted, h: &Homography, fps: f64) -> Option<TrackSpeed> {
    // Sample the path about once a second, so that box jitter does not add distance.
    let step = (fps.round() as usize).max(1);
    let mut samples: Vec<&PathPoint> = c.points.iter().step_by(step).collect();
    if let Some(last) = c.points.last() {
        if samples.last().is_none_or(|s| s.frame != last.frame) {
            samples.push(last);
        }
    }
    let ground: Vec<(f64, f64)> = samples.iter().map(|s| h.to_ground(s.p.x, s.p.y)).collect();
    let distance: f64 = ground
        .windows(2)
        .map(|w| (w[1].0 - w[0].0).hypot(w[1].1 - w[0].1))
        .sum();
    let seconds = f64::from(c.points[c.points.len() - 1].frame - c.points[0].frame) / fps;
    (seconds >= 1.0 && distance.is_finite()).then(|| TrackSpeed {
        track: c.ids[0],
        class: c.class.clone(),
        distance: (distance * 100.0).round() / 100.0,
        seconds: (seconds * 100.0).round() / 100.0,
        speed: ((distance / seconds) * 1000.0).round() / 1000.0,
    })
}
