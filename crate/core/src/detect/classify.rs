//! What the detector says about each box beyond its place: a class guessed from its shape against
//! the expected height of a person, and a cheap colour histogram as an appearance vector.

use super::{Detector, Picture};
use crate::geometry::BBox;

/// Length of [`Detector::appearance`] vectors: for the upper and the lower half of a box,
/// 9 colour bins (U and V each below, near and above grey) and 3 brightness bins.
pub const APPEARANCE_DIM: usize = 24;

/// The classes [`Detector::guess_class`] tells apart (trade terms).
pub const GUESSED_CLASSES: [&str; 3] = ["pedestrian", "cyclist", "vehicle"];

impl Detector {
    /// The class of an object with box `b`, guessed from common proportions (not a learned model),
    /// with `h` the expected height of one person whose feet are at the box's bottom:
    /// - a vehicle is wider than it is tall and at least `0.9 h` wide;
    /// - a cyclist (rider and bicycle seen from the side or at an angle) is at least `0.5 h` wide,
    ///   at least `0.45` times as wide as tall, and at least `0.8 h` tall;
    /// - anything else is a pedestrian.
    ///
    /// A cyclist seen head-on looks like a pedestrian, and two people side by side that were not
    /// split look like a cyclist; the tracker's majority vote over a track's boxes evens out some
    /// of this. `None` without an expected height or with `guess_class` off. Indices into
    /// [`GUESSED_CLASSES`].
    pub fn guess_class(&self, b: &BBox) -> Option<u16> {
        if !self.config.guess_class || b.w <= 0.0 || b.h <= 0.0 {
            return None;
        }
        let h = self.expected_height(b.y + b.h)?;
        Some(if b.w >= b.h && b.w >= 0.9 * h {
            2
        } else if b.w >= 0.5 * h && b.w >= 0.45 * b.h && b.h >= 0.8 * h {
            1
        } else {
            0
        })
    }

    /// A cheap appearance vector for box `b` of the picture just given to [`Self::detect`]: over
    /// the box's foreground pixels, a histogram of colour (U and V each in three ranges: below,
    /// near and above grey) and of brightness (three ranges), for the upper and the lower half of
    /// the box apart (clothes above and below the waist), each half summing to one, then scaled
    /// to unit length for the cosine distance DeepSORT uses. A picture without colour gives the
    /// brightness bins only.
    pub fn appearance(&self, pic: &Picture, b: &BBox) -> Vec<f32> {
        let mut v = vec![0f32; APPEARANCE_DIM];
        let (cw, _) = Picture::chroma_size(self.width, self.height);
        let clamp = |p: f64, n: usize| (p.max(0.0) as usize).min(n);
        let (x0, x1) = (clamp(b.x, self.width), clamp(b.x + b.w, self.width));
        let (y0, y1) = (clamp(b.y, self.height), clamp(b.y + b.h, self.height));
        let mid = y0 + (y1 - y0) / 2;
        let third = |c: u8| match c {
            0..=117 => 0,
            118..=138 => 1,
            _ => 2,
        };
        for y in y0..y1 {
            let half = if y < mid { 0 } else { APPEARANCE_DIM / 2 };
            for x in x0..x1 {
                let i = y * self.width + x;
                if self.mask.get(i) != Some(&1) {
                    continue;
                }
                v[half + 9 + usize::from(pic.y[i]) * 3 / 256] += 1.0;
                if let Some((u, w)) = pic.uv {
                    let c = (y / 2) * cw + x / 2;
                    v[half + 3 * third(u[c]) + third(w[c])] += 1.0;
                }
            }
        }
        for half in v.chunks_mut(APPEARANCE_DIM / 2) {
            let total: f32 = half[9..].iter().sum();
            if total > 0.0 {
                half.iter_mut().for_each(|x| *x /= total);
            }
        }
        let norm = v.iter().map(|x| x * x).sum::<f32>().sqrt();
        if norm > 0.0 {
            v.iter_mut()
                .for_each(|x| *x = (*x / norm * 1e4).round() / 1e4);
        }
        v
    }
}
