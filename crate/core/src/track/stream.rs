//! Tracking an input too long to hold, written out as it goes: rows go in a batch at a time in
//! frame order ([`StreamTracker::rows`]), boxes come out as soon as no later frame can change
//! them ([`StreamTracker::settled`]), in the order of the benchmark text format (frame, then
//! track number). Memory follows the live tracks and the boxes not yet settled (about
//! `max_age` frames of them), not the length of the input.
//!
//! Putting the boxes in order is a stage of its own ([`InOrder`]), so that a program can run it
//! beside the tracker: [`StreamTracker::drain`] hands out the boxes as they leave the tracker.
//!
//! Every box, number and order is that of [`super::run_tracker`] on the same rows followed by
//! [`super::files::write_benchmark_text`]: the same tracker is stepped through the same frames.

use super::tracker::Tracker;
use super::{TrackBox, TrackerConfig};
use crate::detections::{Detection, Detections};
use crate::error::Error;

/// A tracker fed rows in frame order, giving out settled boxes.
pub struct StreamTracker {
    tracker: Tracker,
    /// The next frame to step (frames before it are done).
    next: u32,
    /// Rows of the last frame of the latest batch: it may go on in the next batch.
    carry: Vec<Detection>,
    /// Boxes out of the tracker, not yet given out (for [`Self::settled`]).
    in_order: InOrder,
}

/// A box out of the tracker: `(frame, track number, box)`.
pub type OutBox = (u32, u32, TrackBox);

/// Boxes as they left the tracker, in no order, and the first frame that may still gain a box:
/// every box of an earlier frame has left.
#[derive(Debug, Default)]
pub struct Drained {
    pub boxes: Vec<OutBox>,
    pub open_from: u32,
}

/// Puts drained boxes in benchmark text order (frame, then track number) and gives out those of
/// the frames no later box can join.
#[derive(Debug, Default)]
pub struct InOrder {
    pending: Vec<OutBox>,
    /// The pending boxes' (frame, number) keys and places, sorted.
    keys: Vec<(u64, usize)>,
}

impl InOrder {
    /// Takes a drained batch; hands to `write`, in order, every box of a frame before its
    /// `open_from`.
    pub fn give_out(&mut self, mut d: Drained, write: &mut dyn FnMut(u32, u32, &TrackBox)) {
        if self.pending.is_empty() {
            std::mem::swap(&mut self.pending, &mut d.boxes);
        } else {
            self.pending.append(&mut d.boxes);
        }
        // Sorted by a key and place, not moved about: a box is as large as eight keys.
        // (frame, number) pairs are unique, so an unstable sort gives the one order.
        let key = |&(f, id, _): &OutBox| (u64::from(f) << 32) | u64::from(id);
        self.keys.clear();
        self.keys
            .extend(self.pending.iter().enumerate().map(|(k, b)| (key(b), k)));
        self.keys.sort_unstable();
        let open_from = u64::from(d.open_from) << 32;
        let settled = self.keys.partition_point(|&(k, _)| k < open_from);
        for &(_, k) in &self.keys[..settled] {
            let (f, id, b) = &self.pending[k];
            write(*f, *id, b);
        }
        if settled > 0 {
            self.pending.retain(|b| key(b) >= open_from);
        }
    }
}

/// What a finished stream found: what `run_tracker`'s [`super::Tracks`] would say of itself.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct StreamEnd {
    pub tracks: u32,
    pub last_frame: u32,
    /// Frames whose crowd was matched cheapest pair first.
    pub crowded_frames: Vec<u32>,
}

impl StreamTracker {
    /// A tracker for `config`, refused as [`super::run_tracker`] refuses it. `ctx` is what the
    /// rows refer to (class names): the detections without their rows.
    pub fn new(config: &TrackerConfig, ctx: &Detections) -> Result<Self, Error> {
        super::check_run(config, ctx)?;
        Ok(Self {
            tracker: super::tracker_for(config),
            next: 1,
            carry: Vec::new(),
            in_order: InOrder::default(),
        })
    }

    /// The next rows of the input, in frame order (a frame's rows may be cut between batches);
    /// `ctx` names their classes. Frames must not go back ([`crate::detections::Pieces`] says
    /// when they did): a row of an earlier frame would be tracked as if it came later.
    pub fn rows(&mut self, rows: &[Detection], ctx: &Detections) {
        let mut rest = rows;
        if let (Some(c), Some(r)) = (self.carry.first(), rest.first()) {
            if c.frame == r.frame {
                let n = rest.iter().take_while(|d| d.frame == c.frame).count();
                self.carry.extend_from_slice(&rest[..n]);
                rest = &rest[n..];
            }
        }
        if rest.is_empty() {
            return;
        }
        let mut carried = self.step_carried(ctx);
        let mut frames = rest.chunk_by(|a, b| a.frame == b.frame).peekable();
        while let Some(dets) = frames.next() {
            if frames.peek().is_none() {
                carried.clear();
                carried.extend_from_slice(dets);
                self.carry = carried;
                return;
            }
            self.frame(dets[0].frame, dets, ctx);
        }
    }

    /// The next rows of the input, whole frames in frame order: no later batch goes on with
    /// their last frame ([`crate::detections::CsvPieces`] gives batches so), so every frame is
    /// stepped now and `ctx` (their classes and appearance vectors, which may be this batch's
    /// own) is not looked at again. Not for a stream fed by [`Self::rows`].
    pub fn frames(&mut self, rows: &[Detection], ctx: &Detections) {
        self.step_carried(ctx);
        for dets in rows.chunk_by(|a, b| a.frame == b.frame) {
            self.frame(dets[0].frame, dets, ctx);
        }
    }

    /// Steps through the carried frame, if any, and gives back its buffer for reuse.
    fn step_carried(&mut self, ctx: &Detections) -> Vec<Detection> {
        let carried = std::mem::take(&mut self.carry);
        if let Some(first) = carried.first() {
            self.frame(first.frame, &carried, ctx);
        }
        carried
    }

    /// Steps through `frame`: the empty frames before it while a track is alive (with none
    /// alive they change nothing), then the frame with its detections.
    fn frame(&mut self, frame: u32, dets: &[Detection], ctx: &Detections) {
        while self.next < frame && !self.tracker.is_idle() {
            self.tracker.step(self.next, &[], ctx);
            self.next += 1;
        }
        self.tracker.step(frame, dets, ctx);
        self.next = frame + 1;
    }

    /// The boxes that no later row can change, in benchmark text order, handed to `write`
    /// one at a time.
    pub fn settled(&mut self, write: &mut dyn FnMut(u32, u32, &TrackBox)) {
        let d = self.drain();
        self.in_order.give_out(d, write);
    }

    /// The boxes that left the tracker since the last call, in no order ([`InOrder`] orders
    /// them).
    pub fn drain(&mut self) -> Drained {
        let mut boxes = Vec::new();
        let open_from = self.tracker.drain_settled(self.next, &mut boxes);
        Drained { boxes, open_from }
    }

    /// Ends the input: the rest of the boxes, in order, and what the run found.
    pub fn finish(self, ctx: &Detections, write: &mut dyn FnMut(u32, u32, &TrackBox)) -> StreamEnd {
        let (rest, end) = self.finish_drained(ctx);
        InOrder::default().give_out(rest, write);
        end
    }

    /// Ends the input: the rest of the boxes (every frame settled, those [`Self::settled`] still
    /// held included), and what the run found.
    pub fn finish_drained(mut self, ctx: &Detections) -> (Drained, StreamEnd) {
        self.step_carried(ctx);
        let last_frame = self.next.saturating_sub(1);
        let mut boxes = std::mem::take(&mut self.in_order.pending);
        self.tracker.drain_settled(self.next, &mut boxes);
        let tracks = self.tracker.confirmed();
        let rest = self.tracker.close(last_frame, ctx);
        for t in &rest.tracks {
            boxes.extend(t.boxes.iter().map(|&b| (b.frame, t.id, b)));
        }
        let end = StreamEnd {
            tracks,
            last_frame,
            crowded_frames: rest.crowded_frames,
        };
        (
            Drained {
                boxes,
                open_from: u32::MAX,
            },
            end,
        )
    }
}
