//! Multi-object tracking: turns per-frame detections into tracks.
//!
//! [`run_tracker`] steps through every frame from 1 to the last frame with a detection; the
//! [`tracker`] predicts each live track, lets the chosen [`Method`] (one file each under
//! `methods/`) associate this frame's detections to tracks, and moves tracks through their life:
//! tentative → confirmed ⇄ coasting (predicted while unseen) → ended. Only confirmed tracks are
//! output. Tracks are numbered 1, 2, 3… in the order they are confirmed (ties within a frame in the
//! order they were started), so the same input always gives the same output.
//!
//! Boxes are pixels, top-left x/y + width/height; frames are 1-based.

pub mod assign;
pub mod bridge;
mod config;
pub mod files;
mod gallery;
pub mod kalman;
mod lines;
mod merges;
pub mod methods;
pub mod stream;
mod strips;
mod tracker;

pub use config::{default_method, resolve_config, TrackerConfig};
pub use methods::{Method, MethodDef};

use crate::detections::{Detection, Detections, Perspective};
use crate::error::{Error, ErrorKind};
use crate::geometry::BBox;
use serde::Serialize;

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
    /// How many of its detections carried each class, most first (ties: first seen in the file);
    /// empty where unknown (tracks read from a file).
    pub class_votes: Vec<(String, u32)>,
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
    /// Frames so crowded that the exact assignment ran out of its budget
    /// (`limits::MAX_ASSIGNMENT_STEPS`) and the tracks it had not placed were matched greedily,
    /// cheapest pairs first, instead of optimally.
    pub crowded_frames: Vec<u32>,
    /// Whether `frame_count` is the footage's own length (boxes found in it, or a file of them
    /// that records it): no other measure of the footage (a duration) overrides it.
    #[serde(skip)]
    pub length_from_footage: bool,
}

/// How often (in frames) the progress callback is called.
pub const PROGRESS_EVERY: u32 = 500;

/// Runs a tracker over all detections. `progress(done, total)` is called every
/// [`PROGRESS_EVERY`] frames and at the end.
pub fn run_tracker(
    detections: &Detections,
    config: &TrackerConfig,
    progress: &mut dyn FnMut(u32, u32),
) -> Result<Tracks, Error> {
    check_run(config, detections)?;
    let mut tracker = tracker_for(config);
    step_through(&mut tracker, detections, progress);
    let mut tracks = tracker.close(detections.length(), detections);
    tracks.length_from_footage = detections.footage_frames > 0;
    Ok(tracks)
}

/// The detections with every blob that covers the predicted boxes of two or more tracks, and is
/// wider than one person at its row by `perspective`, cut into one box per track at their
/// predicted places (`merges`): the boxes a tracker stepped through with the cut saw, in frame
/// order. The guiding tracker is `sort` with its defaults, the method footage is tracked with by
/// default; tracking the result with it gives the guiding run's tracks. For boxes found in
/// footage (the detector calls it), so a detections file written from footage holds the cut boxes.
pub fn cut_merged(detections: &Detections, perspective: &Perspective) -> Vec<Detection> {
    let mut tracker = tracker_for(&TrackerConfig::for_method(Method::Sort));
    tracker.perspective = Some(*perspective);
    step_through(&mut tracker, detections, &mut |_, _| {});
    tracker.cut_rows
}

/// Steps the tracker through every frame from 1 to the last with a detection.
fn step_through(
    tracker: &mut tracker::Tracker,
    detections: &Detections,
    progress: &mut dyn FnMut(u32, u32),
) {
    let total = detections.last_frame();
    let mut frames = detections.by_frame().peekable();
    let mut frame = 1;
    // Frame by frame from 1 to the last with a detection (none for no detections).
    while total > 0 && frame <= total {
        let dets: &[Detection] = match frames.peek() {
            Some(&(f, rows)) if f == frame => {
                frames.next();
                rows
            }
            _ => &[],
        };
        tracker.step(frame, dets, detections);
        if frame == total {
            break;
        }
        // With no track alive, empty frames change nothing: go straight to the next detection (a
        // file whose frame numbers jump by millions costs no more than one without the jump).
        let next = match frames.peek() {
            Some(&(f, _)) if tracker.is_idle() => f,
            _ => frame + 1,
        };
        if next / PROGRESS_EVERY != frame / PROGRESS_EVERY {
            progress(next, total);
        }
        frame = next;
    }
    progress(total, total);
}

/// A tracker running the configured method's steps.
fn tracker_for(config: &TrackerConfig) -> tracker::Tracker {
    let def = config.method.def();
    let steps = tracker::MethodSteps {
        associate: def.associate,
        motion: def.motion,
        appearance: def.needs_embeddings,
    };
    tracker::Tracker::new(config.clone(), steps)
}

/// The settings are valid and the detections carry what the method needs.
fn check_run(config: &TrackerConfig, detections: &Detections) -> Result<(), Error> {
    config.validate()?;
    let def = config.method.def();
    if def.needs_embeddings && detections.embedding_dim == 0 {
        return Err(Error::new(
            ErrorKind::Unsuitable,
            format!(
                "the {} method needs detections with appearance embeddings (CSV columns \
                 e0,e1,… or a JSON \"embedding\" array); these detections have none: use \
                 --method bytetrack or sort",
                def.name
            ),
        ));
    }
    Ok(())
}
