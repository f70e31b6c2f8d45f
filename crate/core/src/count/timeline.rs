//! How frames become times, interval labels and events. Frames are 1-based; the time of frame `f`
//! is `(f − 1) / frame_rate` seconds after the plan's `start` (or after the footage's start when
//! the plan has none).

use super::crossings::Moment;
use super::paths::Counted;
use crate::error::{Error, ErrorKind};
use crate::limits::MAX_INTERVALS;
use crate::plan::clock::{elapsed, whole_seconds, LocalTime};
use crate::plan::Plan;
use crate::report::{Direction, Event, EventKind};
use crate::track::{Track, Tracks};

pub(super) struct Timeline {
    pub fps: f64,
    pub start: Option<LocalTime>,
    pub interval_s: f64,
    pub duration_s: f64,
    /// The last frame of the footage: of the tracks' run or of their last box.
    pub frame_count: u32,
}

impl Timeline {
    /// The timeline of tracks counted with a plan; an error when the footage would span more
    /// intervals than a report may hold.
    pub fn new(tracks: &Tracks, plan: &Plan) -> Result<Timeline, Error> {
        let fps = plan.spec.frame_rate;
        let frame_count = tracks.frame_count.max(
            tracks
                .tracks
                .iter()
                .map(Track::last_frame)
                .max()
                .unwrap_or(0),
        );
        let t = Timeline {
            fps,
            start: plan.start,
            interval_s: plan.spec.interval_minutes * 60.0,
            duration_s: f64::from(frame_count) / fps,
            frame_count,
        };
        let intervals = (t.duration_s / t.interval_s).ceil();
        if intervals > MAX_INTERVALS as f64 {
            return Err(Error::new(
                ErrorKind::Unsuitable,
                format!(
                    "the footage would span {intervals:.0} intervals of {} minutes (frames up to \
                     {frame_count} at {fps} frames a second): a report holds at most \
                     {MAX_INTERVALS}. Check the frame numbers and the plan's frame rate, or count \
                     in longer intervals",
                    plan.spec.interval_minutes
                ),
            ));
        }
        Ok(t)
    }

    /// Seconds from frame 1 to a (fractional) frame.
    pub fn seconds(&self, frame: f64) -> f64 {
        (frame - 1.0) / self.fps
    }

    /// A moment's label: clock time when the plan has a start, else elapsed `H:MM:SS`.
    pub fn label(&self, seconds: f64) -> String {
        match self.start {
            Some(t) => t.plus_seconds(whole_seconds(seconds)).to_string(),
            None => elapsed(seconds),
        }
    }

    /// Number of intervals (at least one; the last may be cut short by the end of the footage).
    pub fn count(&self) -> usize {
        ((self.duration_s / self.interval_s).ceil() as usize).max(1)
    }

    /// The interval holding a moment.
    pub fn index(&self, seconds: f64) -> usize {
        ((seconds / self.interval_s).floor().max(0.0) as usize).min(self.count() - 1)
    }

    /// An interval's start and end labels, and whether the footage ends inside it.
    pub fn bounds(&self, i: usize) -> (String, String, bool) {
        let a = i as f64 * self.interval_s;
        let b = a + self.interval_s;
        (self.label(a), self.label(b), b > self.duration_s + 1e-9)
    }

    /// The event of counted track `c` meeting a line or zone `name` at `m`.
    pub fn event(
        &self,
        c: &Counted,
        kind: EventKind,
        name: &str,
        (direction, label): (Direction, &str),
        m: Moment,
    ) -> Event {
        let seconds = self.seconds(m.frame);
        Event {
            track: c.ids[0],
            track_ids: c.ids.clone(),
            kind,
            name: name.to_string(),
            direction,
            label: label.to_string(),
            frame: m.frame.ceil() as u32,
            seconds: (seconds * 1000.0).round() / 1000.0,
            time: self.label(seconds),
            class: c.class.clone(),
            x: (m.at.x * 100.0).round() / 100.0,
            y: (m.at.y * 100.0).round() / 100.0,
            inferred: m.inferred,
            added: false,
            reason: None,
        }
    }
}
