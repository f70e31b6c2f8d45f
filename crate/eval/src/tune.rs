//! Choosing tracker settings against ground truth: a grid over the settings that matter most, each
//! candidate run and scored, best first. Deterministic: ties keep the grid's order.

use crate::tracking_metrics::{score, Scores};
use throughline_core::detections::Detections;
use throughline_core::pipeline;
use throughline_core::track::files::{tracks_to_boxes, IdBox};
use throughline_core::track::{Method, TrackerConfig};

/// What to maximise.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Metric {
    Hota,
    Idf1,
    Mota,
}

impl Metric {
    pub fn parse(s: &str) -> Option<Metric> {
        match s {
            "hota" => Some(Metric::Hota),
            "idf1" => Some(Metric::Idf1),
            "mota" => Some(Metric::Mota),
            _ => None,
        }
    }

    pub fn of(self, s: &Scores) -> f64 {
        match self {
            Metric::Hota => s.hota,
            Metric::Idf1 => s.idf1,
            Metric::Mota => s.mota,
        }
    }
}

/// One tried setting and how it scored.
#[derive(Debug, Clone)]
pub struct Trial {
    pub config: TrackerConfig,
    pub value: f64,
    pub scores: Scores,
}

/// The grid: detection score floor, IoU gate, coasting length and confirmation hits for every
/// method, with the values of coasting length and cosine gate each method's definition gives
/// (`MethodDef::search_*`); other settings keep the method's defaults.
pub fn candidates(methods: &[Method]) -> Vec<TrackerConfig> {
    let mut out = Vec::new();
    for &method in methods {
        let def = method.def();
        let (ages, cosines) = (def.search_max_age, def.search_max_cosine_distance);
        for &min_score in &[0.1, 0.3, 0.5] {
            for &min_iou in &[0.2, 0.3, 0.5] {
                for &max_age in ages {
                    for &min_hits in &[2, 3] {
                        for &max_cosine_distance in cosines {
                            out.push(TrackerConfig {
                                min_score,
                                min_iou,
                                max_age,
                                min_hits,
                                max_cosine_distance,
                                ..TrackerConfig::for_method(method)
                            });
                        }
                    }
                }
            }
        }
    }
    out
}

/// Runs and scores every candidate; returns the trials best first. `progress(done, total)` after each.
pub fn tune(
    detections: &Detections,
    truth: &[IdBox],
    metric: Metric,
    candidates: &[TrackerConfig],
    progress: &mut dyn FnMut(usize, usize),
) -> Result<Vec<Trial>, String> {
    let mut trials = Vec::with_capacity(candidates.len());
    for (k, config) in candidates.iter().enumerate() {
        let tracks = pipeline::track(detections, config, &mut |_, _| {}).map_err(|e| e.message)?;
        let scores = score(truth, &tracks_to_boxes(&tracks)).map_err(|e| e.message)?;
        trials.push(Trial {
            config: config.clone(),
            value: metric.of(&scores),
            scores,
        });
        progress(k + 1, candidates.len());
    }
    // Stable sort: among equal values the earlier candidate (closer to the defaults' order) wins.
    trials.sort_by(|a, b| b.value.total_cmp(&a.value));
    Ok(trials)
}
