//! Boxes in two stretches far apart: one mistyped frame number makes a report of weeks.

use super::Detections;

/// A gap between boxes longer than this (an hour at 25 frames a second) may be a mistyped frame
/// number ([`Detections::far_apart`]).
const FAR_APART_FRAMES: u32 = 90_000;

impl Detections {
    /// A warning when the boxes fall in two stretches far apart: a gap with no box longer than
    /// [`FAR_APART_FRAMES`] and more than ten times all the frames on either side of it, as one
    /// mistyped frame number makes (a report then spans weeks of empty intervals, with a peak
    /// hour among them). A quiet night in a day's recording is not so long against the rest.
    pub fn far_apart(&self) -> Option<String> {
        let (first, last) = (self.rows.first()?.frame, self.last_frame());
        let (a, b) = self
            .rows
            .windows(2)
            .map(|w| (w[0].frame, w[1].frame))
            .max_by_key(|&(a, b)| b - a)?;
        let gap = b - a;
        let rest = (last - first) - gap;
        if gap <= FAR_APART_FRAMES || u64::from(gap) <= 10 * u64::from(rest.max(1)) {
            return None;
        }
        let after = self.rows.iter().filter(|d| d.frame >= b).count();
        let before = self.rows.len() - after;
        Some(format!(
            "no box between frames {a} and {b}: {before} boxes lie in frames {first} to {a}, and \
             {after} from frame {b} on, {gap} frames later; is a frame number wrong? The count \
             spans every frame up to {last}, empty ones too"
        ))
    }
}
