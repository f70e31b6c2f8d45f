//! Multi-object tracking: turns per-frame detections into tracks.
//!
//! One engine ([`run_tracker`]) steps through every frame from 1 to the last frame with a
//! detection, predicting each live track, associating detections to tracks with the chosen
//! [`Method`] (see `methods.rs`), and moving tracks through their life:
//! tentative → confirmed ⇄ coasting (predicted while unseen) → ended. Only confirmed tracks are
//! output. Tracks are numbered 1, 2, 3… in the order they are confirmed (ties within a frame in the
//! order they were started), so the same input always gives the same output.

mod config;
mod methods;

pub use config::{default_method, resolve_config, ConfigError, Method, TrackerConfig};

use crate::detections::{Detection, Detections};
use crate::geometry::BBox;
use crate::kalman::{BoxMotion, KalmanFilter};
use serde::Serialize;
use std::collections::VecDeque;
use std::fmt;

/// One box of a track in one frame.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct TrackBox {
    /// Frame number, 1-based.
    pub frame: u32,
    /// Pixels, top-left x/y + width/height: the filtered state where the method has a motion model,
    /// the detection itself for `iou`.
    pub bbox: BBox,
    /// Score of the detection; 0 for a predicted box.
    pub score: f64,
    /// True when a detection was matched in this frame; false when the box was predicted.
    pub observed: bool,
}

/// A finished, confirmed track.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Track {
    /// 1, 2, 3… in order of confirmation.
    pub id: u32,
    /// The class most of its detections carried (ties: the class seen first in the file).
    pub class: Option<String>,
    /// Mean score of its observed boxes.
    pub mean_score: f64,
    /// One box per frame from its first detection to its last, gaps filled with predicted boxes.
    /// Predicted boxes after the last detection are not kept: the object was no longer seen.
    pub boxes: Vec<TrackBox>,
}

impl Track {
    pub fn first_frame(&self) -> u32 {
        self.boxes.first().map_or(0, |b| b.frame)
    }

    pub fn last_frame(&self) -> u32 {
        self.boxes.last().map_or(0, |b| b.frame)
    }
}

/// The output of a tracker run.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Tracks {
    pub config: TrackerConfig,
    /// Number of frames stepped through (the last frame with a detection).
    pub frame_count: u32,
    /// Sorted by id.
    pub tracks: Vec<Track>,
}

/// Why a tracker run could not start.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct TrackError {
    pub message: String,
}

impl fmt::Display for TrackError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

impl std::error::Error for TrackError {}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Phase {
    Tentative,
    Confirmed,
    Coasting,
}

/// A track while the run goes on.
#[derive(Debug, Clone)]
struct LiveTrack {
    id: Option<u32>,
    kf: KalmanFilter,
    /// Box of the last matched detection (what the `iou` method compares against).
    last_box: BBox,
    phase: Phase,
    hits: u32,
    /// Frames since the last match; 0 right after an update.
    unseen: u32,
    max_score: f64,
    score_sum: f64,
    class_votes: Vec<(u16, u32)>,
    boxes: Vec<TrackBox>,
    /// Unit-length appearance vectors of its latest detections (DeepSORT's gallery).
    gallery: VecDeque<Vec<f32>>,
}

impl LiveTrack {
    fn predicted_box(&self, method: Method) -> BBox {
        match method {
            Method::Iou => self.last_box,
            _ => BoxMotion::bbox(&self.kf),
        }
    }

    fn is_confirmed(&self) -> bool {
        self.phase != Phase::Tentative
    }
}

/// The state shared by every method: live tracks, the motion model and the numbering.
struct Engine<'a> {
    config: TrackerConfig,
    motion: BoxMotion,
    detections: &'a Detections,
    /// Boxed, so that removing a track from the middle shifts pointers, not whole filters.
    #[allow(clippy::vec_box)]
    live: Vec<Box<LiveTrack>>,
    finished: Vec<Track>,
    next_id: u32,
}

/// A match of live track `track` (index into `Engine::live`) to detection `det` (index into the
/// frame's detections).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct Match {
    track: usize,
    det: usize,
}

/// What a method decided for one frame.
struct Association {
    matches: Vec<Match>,
    /// Detections that may start a new track.
    new_tracks: Vec<usize>,
}

impl<'a> Engine<'a> {
    fn new(config: TrackerConfig, detections: &'a Detections) -> Self {
        Self {
            config,
            motion: BoxMotion::default(),
            detections,
            live: Vec::new(),
            finished: Vec::new(),
            next_id: 1,
        }
    }

    fn step(&mut self, frame: u32, dets: &[Detection]) {
        if self.config.method != Method::Iou {
            for t in &mut self.live {
                self.motion.predict(&mut t.kf);
            }
        }
        let assoc = methods::associate(self, dets);
        let mut matched = vec![false; self.live.len()];
        for m in &assoc.matches {
            matched[m.track] = true;
            self.observe(m.track, frame, &dets[m.det]);
        }
        for (i, was_matched) in matched.iter().enumerate() {
            if !was_matched {
                self.miss(i, frame);
            }
        }
        for &d in &assoc.new_tracks {
            self.start(frame, &dets[d]);
        }
        self.promote();
        self.retire();
    }

    fn observe(&mut self, i: usize, frame: u32, det: &Detection) {
        if self.config.method != Method::Iou {
            self.motion.update(&mut self.live[i].kf, &det.bbox);
        }
        self.record(i, frame, det);
    }

    /// Everything an observation changes but the motion filter.
    fn record(&mut self, i: usize, frame: u32, det: &Detection) {
        let gallery_size = self.config.gallery_size as usize;
        let embedding = self.detections.embedding(det).and_then(unit_vector);
        let method = self.config.method;
        let t = &mut self.live[i];
        t.last_box = det.bbox;
        t.hits += 1;
        t.unseen = 0;
        t.max_score = t.max_score.max(det.score);
        t.score_sum += det.score;
        if let Some(c) = det.class {
            vote(&mut t.class_votes, c);
        }
        if let Some(e) = embedding {
            if t.gallery.len() == gallery_size {
                t.gallery.pop_front();
            }
            t.gallery.push_back(e);
        }
        if t.phase == Phase::Coasting {
            t.phase = Phase::Confirmed;
        }
        let bbox = match method {
            Method::Iou => det.bbox,
            _ => BoxMotion::bbox(&t.kf),
        };
        t.boxes.push(TrackBox {
            frame,
            bbox,
            score: det.score,
            observed: true,
        });
    }

    fn miss(&mut self, i: usize, frame: u32) {
        let method = self.config.method;
        let t = &mut self.live[i];
        t.unseen += 1;
        if t.phase == Phase::Confirmed {
            t.phase = Phase::Coasting;
        }
        let bbox = t.predicted_box(method);
        t.boxes.push(TrackBox {
            frame,
            bbox,
            score: 0.0,
            observed: false,
        });
    }

    /// Starts a tentative track on a detection; its filter starts on the detection's box.
    fn start(&mut self, frame: u32, det: &Detection) {
        self.live.push(Box::new(LiveTrack {
            id: None,
            kf: self.motion.initiate(&det.bbox),
            last_box: det.bbox,
            phase: Phase::Tentative,
            hits: 0,
            unseen: 0,
            max_score: f64::NEG_INFINITY,
            score_sum: 0.0,
            class_votes: Vec::new(),
            boxes: Vec::new(),
            gallery: VecDeque::new(),
        }));
        self.record(self.live.len() - 1, frame, det);
    }

    /// Confirms tentative tracks that have earned it, numbering them in order of creation.
    fn promote(&mut self) {
        for t in &mut self.live {
            if t.phase == Phase::Tentative
                && t.hits >= self.config.min_hits
                && t.max_score >= self.config.confirm_score
            {
                t.phase = Phase::Confirmed;
                t.id = Some(self.next_id);
                self.next_id += 1;
            }
        }
    }

    /// Drops tentative tracks that missed and ends confirmed tracks unseen for too long.
    fn retire(&mut self) {
        let max_age = self.config.max_age;
        let mut i = 0;
        while i < self.live.len() {
            let t = &self.live[i];
            let gone = match t.phase {
                Phase::Tentative => t.unseen > 0,
                _ => t.unseen > max_age,
            };
            if !gone {
                i += 1;
                continue;
            }
            // `remove`, not `swap_remove`: the order of live tracks decides numbering ties.
            let t = self.live.remove(i);
            if t.is_confirmed() {
                self.finished.push(finish(*t, self.detections));
            }
        }
    }

    fn close(mut self, frame_count: u32) -> Tracks {
        for t in std::mem::take(&mut self.live) {
            if t.is_confirmed() {
                self.finished.push(finish(*t, self.detections));
            }
        }
        let mut tracks = self.finished;
        tracks.sort_by_key(|t| t.id);
        Tracks {
            config: self.config,
            frame_count,
            tracks,
        }
    }
}

fn vote(votes: &mut Vec<(u16, u32)>, class: u16) {
    match votes.iter_mut().find(|(c, _)| *c == class) {
        Some((_, n)) => *n += 1,
        None => votes.push((class, 1)),
    }
}

fn unit_vector(v: &[f32]) -> Option<Vec<f32>> {
    let norm = v.iter().map(|x| f64::from(*x).powi(2)).sum::<f64>().sqrt();
    (norm > 0.0).then(|| v.iter().map(|x| (f64::from(*x) / norm) as f32).collect())
}

fn finish(t: LiveTrack, detections: &Detections) -> Track {
    let mut boxes = t.boxes;
    while boxes.last().is_some_and(|b| !b.observed) {
        boxes.pop();
    }
    let observed = boxes.iter().filter(|b| b.observed).count().max(1);
    // Most votes wins; among equals, the class that appears first in the file (lowest index).
    let class = t
        .class_votes
        .iter()
        .max_by(|a, b| a.1.cmp(&b.1).then(b.0.cmp(&a.0)))
        .and_then(|&(c, _)| detections.class_name(Some(c)))
        .map(str::to_string);
    Track {
        id: t.id.unwrap_or(0),
        class,
        mean_score: t.score_sum / observed as f64,
        boxes,
    }
}

/// How often (in frames) the progress callback is called.
pub const PROGRESS_EVERY: u32 = 500;

/// Runs a tracker over all detections. `progress(done, total)` is called every
/// [`PROGRESS_EVERY`] frames and at the end.
pub fn run_tracker(
    detections: &Detections,
    config: &TrackerConfig,
    progress: &mut dyn FnMut(u32, u32),
) -> Result<Tracks, TrackError> {
    config
        .validate()
        .map_err(|e| TrackError { message: e.message })?;
    if config.method == Method::Deepsort && detections.embedding_dim == 0 {
        return Err(TrackError {
            message:
                "the deepsort method needs detections with appearance embeddings (CSV columns \
                      e0,e1,… or a JSON \"embedding\" array); these detections have none: use \
                      --method bytetrack or sort"
                    .into(),
        });
    }
    let total = detections.last_frame();
    let mut engine = Engine::new(config.clone(), detections);
    let mut frames = detections.by_frame().peekable();
    for frame in 1..=total {
        let dets: &[Detection] = match frames.peek() {
            Some(&(f, rows)) if f == frame => {
                frames.next();
                rows
            }
            _ => &[],
        };
        engine.step(frame, dets);
        if frame % PROGRESS_EVERY == 0 {
            progress(frame, total);
        }
    }
    progress(total, total);
    Ok(engine.close(total))
}
