//! The state of one tracker run: the live tracks, the motion model and the numbering, stepped one
//! frame at a time. The chosen method decides only the association (see `methods/`); everything
//! else about a track's life is the same for every method.

use super::assign::{self, Edge};
use super::gallery::{Gallery, Units};
use super::kalman::{BoxMotion, KalmanFilter};
use super::merges;
use super::strips::Strips;
use super::{Track, TrackBox, TrackerConfig, Tracks};
use crate::detections::{Detection, Detections, Perspective};
use crate::geometry::BBox;
use std::cell::{Cell, RefCell};

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Phase {
    Tentative,
    Confirmed,
    Coasting,
}

/// A track while the run goes on.
#[derive(Debug, Clone)]
pub(crate) struct LiveTrack {
    id: Option<u32>,
    pub(crate) kf: KalmanFilter,
    /// Box of the last matched detection (what the `iou` method compares against).
    last_box: BBox,
    phase: Phase,
    hits: u32,
    /// Frames since the last match; 0 right after an update.
    pub(crate) unseen: u32,
    max_score: f64,
    score_sum: f64,
    class_votes: Vec<(u16, u32)>,
    boxes: Vec<TrackBox>,
    /// Unit-length appearance vectors of its latest detections (DeepSORT's gallery).
    pub(crate) gallery: Gallery,
}

impl LiveTrack {
    /// Where the track is expected in this frame: the filter's box, or with no motion model the
    /// box of its last detection.
    pub(crate) fn predicted_box(&self, motion: bool) -> BBox {
        if motion {
            BoxMotion::bbox(&self.kf)
        } else {
            self.last_box
        }
    }

    pub(crate) fn is_confirmed(&self) -> bool {
        self.phase != Phase::Tentative
    }
}

/// A match of live track `track` (index into the tracker's live tracks) to detection `det` (index
/// into the frame's detections).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Match {
    pub track: usize,
    pub det: usize,
}

/// What a method decided for one frame.
pub(crate) struct Association {
    pub matches: Vec<Match>,
    /// Detections that may start a new track.
    pub new_tracks: Vec<usize>,
}

/// A method's association step for one frame (`methods/`: the tracker is given it, and does not
/// know the methods).
/// It is given the frame's detections and what they refer to (their appearance vectors).
pub(crate) type Step = fn(&Tracker, &[Detection], &Detections) -> Association;

/// What the tracker needs of the chosen method: its association step, and whether live tracks
/// are predicted with the Kalman filter.
#[derive(Clone, Copy)]
pub(crate) struct MethodSteps {
    pub associate: Step,
    pub motion: bool,
    /// Whether it compares appearance: the frame's vectors are made unit length and kept in each
    /// track's gallery.
    pub appearance: bool,
}

/// The state shared by every method: live tracks, the motion model and the numbering.
pub(crate) struct Tracker {
    pub(crate) config: TrackerConfig,
    /// The chosen method.
    def: MethodSteps,
    pub(crate) motion: BoxMotion,
    /// Boxed, so that removing a track from the middle shifts pointers, not whole filters.
    #[allow(clippy::vec_box)]
    pub(crate) live: Vec<Box<LiveTrack>>,
    /// Set by the association when this frame's crowd was matched greedily.
    crowded: Cell<bool>,
    /// Frames whose crowd was matched greedily.
    crowded_frames: Vec<u32>,
    finished: Vec<Track>,
    next_id: u32,
    /// Memory the association reuses from frame to frame.
    pub(crate) reuse: RefCell<Reuse>,
    /// This frame's appearance vectors, unit length (methods that compare appearance only).
    pub(crate) units: Units,
    /// The expected size of a person at each row, set only by [`super::cut_merged`] (boxes found
    /// in footage): a box that covers the predictions of two or more tracks is cut into one box
    /// per track (`merges`).
    pub(crate) perspective: Option<Perspective>,
    /// With a perspective: every frame's detections as associated (blobs cut), in frame order.
    pub(crate) cut_rows: Vec<Detection>,
}

/// A tentative track waiting unseen (`tentative_max_age`) ends when a track seen in the frame
/// covers its predicted box at least this much (IoU): its person went to that track, and two
/// tracks on one person would both be confirmed.
pub(crate) const TAKEN_IOU: f64 = 0.7;

/// A track guides the cutting of a merged blob while it is confirmed and seen within this many
/// frames (a prediction long unseen has drifted from where the person is).
const GUIDE_UNSEEN: u32 = 5;

/// Memory the association reuses from frame to frame (cleared, never shrunk): once a run has
/// warmed up, the frame's boxes, their index, the candidate pairs and the assignment's groups
/// take no new memory (the lists of matches and of what is left over still do).
#[derive(Debug, Default)]
pub(crate) struct Reuse {
    /// The frame's boxes being matched, and their index by place.
    pub boxes: Vec<BBox>,
    pub index: Strips,
    /// Candidate pairs: the frame's, one track's, and the boxes near a track.
    pub edges: Vec<Edge>,
    pub mine: Vec<Edge>,
    pub near: Vec<usize>,
    pub assign: assign::Buffers,
    /// Which tracks and detections of a matching were used.
    pub used: Vec<bool>,
}

impl Tracker {
    pub(crate) fn new(config: TrackerConfig, def: MethodSteps) -> Self {
        Self {
            def,
            config,
            motion: BoxMotion::default(),
            live: Vec::new(),
            crowded: Cell::new(false),
            crowded_frames: Vec::new(),
            finished: Vec::new(),
            next_id: 1,
            reuse: RefCell::default(),
            units: Units::default(),
            perspective: None,
            cut_rows: Vec::new(),
        }
    }

    /// How many tracks have been confirmed (numbered) so far.
    pub(crate) fn confirmed(&self) -> u32 {
        self.next_id - 1
    }

    /// Whether no track is alive (nothing to predict or end).
    pub(crate) fn is_idle(&self) -> bool {
        self.live.is_empty()
    }

    /// Notes that this frame's association ran out of steps and matched the rest greedily (see
    /// `assign::assign_edges`).
    pub(crate) fn note_crowd(&self, greedy: bool) {
        if greedy {
            self.crowded.set(true);
        }
    }

    /// Where live track `t` is expected in this frame.
    pub(crate) fn predicted_box(&self, t: usize) -> BBox {
        self.live[t].predicted_box(self.def.motion)
    }

    /// One frame: `dets` are its detections, `ctx` what they refer to (appearance vectors, class
    /// names).
    pub(crate) fn step(&mut self, frame: u32, dets: &[Detection], ctx: &Detections) {
        if self.def.motion {
            for t in &mut self.live {
                self.motion.predict(&mut t.kf);
            }
        }
        let cut;
        let dets = match &self.perspective {
            Some(p) => {
                cut = merges::split_merged(&self.guides(), dets, p);
                let dets = cut.as_deref().unwrap_or(dets);
                self.cut_rows.extend_from_slice(dets);
                dets
            }
            None => dets,
        };
        match self.def.appearance {
            true => self.units.fill(dets, ctx),
            false => self.units.clear(),
        }
        let assoc: Association = (self.def.associate)(self, dets, ctx);
        if self.crowded.take() {
            self.crowded_frames.push(frame);
        }
        // The matching's marks are free again: their memory serves here.
        let mut matched = std::mem::take(&mut self.reuse.get_mut().used);
        matched.clear();
        matched.resize(self.live.len(), false);
        for m in &assoc.matches {
            matched[m.track] = true;
            self.observe(m.track, frame, dets, m.det);
        }
        for (i, was_matched) in matched.iter().enumerate() {
            if !was_matched {
                self.miss(i, frame);
            }
        }
        self.reuse.get_mut().used = matched;
        for &d in &assoc.new_tracks {
            if dets[d].score >= self.config.start_score {
                self.start(frame, dets, d);
            }
        }
        self.promote();
        self.retire(ctx);
    }

    /// The predicted boxes of the tracks that may guide the cutting of a merged blob.
    fn guides(&self) -> Vec<BBox> {
        (0..self.live.len())
            .filter(|&t| self.live[t].is_confirmed() && self.live[t].unseen <= GUIDE_UNSEEN)
            .map(|t| self.predicted_box(t))
            .collect()
    }

    /// Track `i` matched to detection `d` of the frame's `dets`.
    fn observe(&mut self, i: usize, frame: u32, dets: &[Detection], d: usize) {
        if self.def.motion {
            self.motion.update(&mut self.live[i].kf, &dets[d].bbox);
        }
        self.record(i, frame, dets, d);
    }

    /// Everything an observation changes but the motion filter.
    fn record(&mut self, i: usize, frame: u32, dets: &[Detection], d: usize) {
        let gallery_size = self.config.gallery_size as usize;
        let det = &dets[d];
        let motion = self.def.motion;
        let t = &mut self.live[i];
        t.last_box = det.bbox;
        t.hits += 1;
        t.unseen = 0;
        t.max_score = t.max_score.max(det.score);
        t.score_sum += det.score;
        if let Some(c) = det.class {
            vote(&mut t.class_votes, c);
        }
        if let Some(e) = self.units.get(d) {
            t.gallery.push(e, gallery_size);
        }
        if t.phase == Phase::Coasting {
            t.phase = Phase::Confirmed;
        }
        let bbox = if motion {
            BoxMotion::bbox(&t.kf)
        } else {
            det.bbox
        };
        t.boxes.push(TrackBox {
            frame,
            bbox,
            score: det.score,
            observed: true,
        });
    }

    fn miss(&mut self, i: usize, frame: u32) {
        let motion = self.def.motion;
        let t = &mut self.live[i];
        t.unseen += 1;
        if t.phase == Phase::Confirmed {
            t.phase = Phase::Coasting;
        }
        let bbox = t.predicted_box(motion);
        t.boxes.push(TrackBox {
            frame,
            bbox,
            score: 0.0,
            observed: false,
        });
    }

    /// Starts a tentative track on a detection; its filter starts on the detection's box.
    fn start(&mut self, frame: u32, dets: &[Detection], d: usize) {
        let det = &dets[d];
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
            gallery: Gallery::default(),
        }));
        self.record(self.live.len() - 1, frame, dets, d);
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

    /// Drops tentative tracks that missed and ends confirmed tracks unseen for too long. A
    /// tentative track may wait unseen up to `tentative_max_age` frames, unless a track seen in
    /// this frame has taken its place ([`TAKEN_IOU`]).
    fn retire(&mut self, ctx: &Detections) {
        let (max_age, waiting) = (self.config.max_age, self.config.tentative_max_age);
        let motion = self.def.motion;
        let watch = self.index_seen_if_any_wait();
        let reuse = self.reuse.get_mut();
        // In order, so that the order of live tracks (which decides numbering ties) is kept.
        let ended: Vec<_> = self
            .live
            .extract_if(.., |t| match t.phase {
                Phase::Tentative => {
                    t.unseen > waiting
                        || (watch && t.unseen > 0 && {
                            let b = t.predicted_box(motion);
                            reuse.index.near(&b, &mut reuse.near);
                            reuse
                                .near
                                .iter()
                                .any(|&o| b.iou(&reuse.boxes[o]) >= TAKEN_IOU)
                        })
                }
                _ => t.unseen > max_age,
            })
            .collect();
        for t in ended {
            if t.is_confirmed() {
                self.finished.push(finish(*t, ctx));
            }
        }
    }

    /// When a tentative track waits unseen (`tentative_max_age` above 0), puts the predicted boxes
    /// of the tracks seen in this frame in the reused index, so that a crowded frame costs about
    /// one look per waiting track; says whether it did.
    fn index_seen_if_any_wait(&mut self) -> bool {
        let waits = self.config.tentative_max_age > 0
            && self
                .live
                .iter()
                .any(|t| t.phase == Phase::Tentative && t.unseen > 0);
        if waits {
            let motion = self.def.motion;
            let reuse = self.reuse.get_mut();
            reuse.boxes.clear();
            reuse.boxes.extend(
                self.live
                    .iter()
                    .filter(|t| t.unseen == 0)
                    .map(|t| t.predicted_box(motion)),
            );
            reuse.index.refill(&reuse.boxes);
        }
        waits
    }

    /// For a run written out as it goes ([`super::stream`]): moves into `out` the boxes no later
    /// frame can change, as `(frame, track number, box)`: every box of the tracks that ended,
    /// and of each live confirmed track every box up to its last observation (the predicted
    /// boxes after it are dropped if it ends unseen). Returns the first frame that may still
    /// gain or lose a box (at most `next_frame`): every box of an earlier frame is now out.
    pub(crate) fn drain_settled(
        &mut self,
        next_frame: u32,
        out: &mut Vec<(u32, u32, TrackBox)>,
    ) -> u32 {
        for t in self.finished.drain(..) {
            out.extend(t.boxes.into_iter().map(|b| (b.frame, t.id, b)));
        }
        let mut open_from = next_frame;
        for t in &mut self.live {
            if let Some(id) = t.id {
                let observed = t
                    .boxes
                    .iter()
                    .rposition(|b| b.observed)
                    .map_or(0, |i| i + 1);
                out.extend(t.boxes.drain(..observed).map(|b| (b.frame, id, b)));
            }
            if let Some(b) = t.boxes.first() {
                open_from = open_from.min(b.frame);
            }
        }
        open_from
    }

    pub(crate) fn close(mut self, frame_count: u32, ctx: &Detections) -> Tracks {
        for t in std::mem::take(&mut self.live) {
            if t.is_confirmed() {
                self.finished.push(finish(*t, ctx));
            }
        }
        let mut tracks = self.finished;
        tracks.sort_by_key(|t| t.id);
        Tracks {
            config: self.config,
            frame_count,
            tracks,
            crowded_frames: self.crowded_frames,
            length_from_footage: false,
        }
    }
}

fn vote(votes: &mut Vec<(u16, u32)>, class: u16) {
    match votes.iter_mut().find(|(c, _)| *c == class) {
        Some((_, n)) => *n += 1,
        None => votes.push((class, 1)),
    }
}

fn finish(t: LiveTrack, detections: &Detections) -> Track {
    let mut boxes = t.boxes;
    while boxes.last().is_some_and(|b| !b.observed) {
        boxes.pop();
    }
    // A finished track's boxes are kept to the end of the run: without the growth slack.
    boxes.shrink_to_fit();
    // Every observation added one observed box (boxes already written out included).
    let observed = t.hits.max(1);
    // Most votes wins; among equals, the class that appears first in the file (lowest index).
    let mut votes = t.class_votes;
    votes.sort_by(|a, b| b.1.cmp(&a.1).then(a.0.cmp(&b.0)));
    let class_votes: Vec<(String, u32)> = votes
        .iter()
        .filter_map(|&(c, n)| {
            detections
                .class_name(Some(c))
                .map(|name| (name.to_string(), n))
        })
        .collect();
    Track {
        id: t.id.unwrap_or(0),
        class: class_votes.first().map(|(name, _)| name.clone()),
        mean_score: t.score_sum / f64::from(observed),
        class_votes,
        boxes,
    }
}
