//! The visual single-object tracker of the bridge: template matching by normalised
//! cross-correlation (NCC) in a small search window around a constant-velocity prediction.
//!
//! The template is the object's box in the frame where it was last (or first) detected, taken once
//! and never updated, so the follower cannot drift onto the background over a short gap; the
//! search runs on a reduced copy of the picture (the "working pixels", the box at most
//! [`TEMPLATE_SIDE`] long), so its cost per frame is bounded whatever the box's size: at most
//! `TEMPLATE_SIDE² × (2 × MAX_RADIUS + 1)²` multiply-adds (about 300,000).

/// The longer side of a followed box in working pixels: larger boxes are followed on a picture
/// reduced by a whole factor (the mean of each block of pixels).
pub(super) const TEMPLATE_SIDE: f64 = 32.0;

/// The search window's half-width, in working pixels, around the predicted place: a quarter of
/// the box's longer side, from 2 to 8.
pub(super) const MIN_RADIUS: i32 = 2;
pub(super) const MAX_RADIUS: i32 = 8;

/// The least NCC of the best match for the object to count as still followed: below it the
/// follower stops (the object is hidden, or left the picture), as a visual tracker reports a loss.
pub(super) const MIN_NCC: f32 = 0.5;

/// A template whose grey levels vary less than this (standard deviation) is too flat to follow.
const MIN_TEMPLATE_SPREAD: f32 = 2.0;

/// A rectangle of the picture kept for one gap: `x0, y0` in picture pixels, `w × h` working pixels,
/// each the mean of a `scale × scale` block.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Region {
    pub x0: usize,
    pub y0: usize,
    pub w: usize,
    pub h: usize,
    pub scale: usize,
}

impl Region {
    /// Bytes of one crop.
    pub fn bytes(&self) -> usize {
        self.w * self.h
    }

    /// The region's pixels in one luma plane (`width` pixels a row), reduced to working pixels.
    /// The region lies inside the picture by construction; a short plane gives zeros.
    pub fn crop(&self, luma: &[u8], width: usize) -> Vec<u8> {
        let s = self.scale;
        let mut out = vec![0u8; self.w * self.h];
        let area = (s * s) as u32;
        for (j, row) in out.chunks_mut(self.w).enumerate() {
            for (i, px) in row.iter_mut().enumerate() {
                let (x, y) = (self.x0 + i * s, self.y0 + j * s);
                let mut sum = 0u32;
                for yy in y..y + s {
                    let start = yy * width + x;
                    if let Some(block) = luma.get(start..start + s) {
                        sum += block.iter().map(|&v| u32::from(v)).sum::<u32>();
                    }
                }
                *px = ((sum + area / 2) / area) as u8;
            }
        }
        out
    }
}

/// Where following starts: the box's top-left and size in working pixels of the region, and its
/// velocity in working pixels per frame (in the direction followed).
#[derive(Debug, Clone, Copy)]
pub(super) struct Start {
    pub x: i32,
    pub y: i32,
    pub w: usize,
    pub h: usize,
    pub vx: f64,
    pub vy: f64,
}

/// Follows the box of `start` through `frames` (crops of one region, `w × h` working pixels, in
/// the order followed; `frames[0]` holds the start box). One entry per later frame: the box's
/// top-left shift from the start, in working pixels, or `None` from the frame where it was lost.
pub(super) fn follow(
    frames: &[&[u8]],
    w: usize,
    h: usize,
    start: &Start,
) -> Vec<Option<(i32, i32)>> {
    let mut out = vec![None; frames.len().saturating_sub(1)];
    let Some(template) = frames.first().and_then(|f| Template::cut(f, w, h, start)) else {
        return out;
    };
    let radius = ((start.w.max(start.h) as f64 / 4.0).ceil() as i32).clamp(MIN_RADIUS, MAX_RADIUS);
    let (mut px, mut py) = (f64::from(template.x), f64::from(template.y));
    for (k, frame) in frames.iter().enumerate().skip(1) {
        let (cx, cy) = (
            (px + start.vx).round() as i32,
            (py + start.vy).round() as i32,
        );
        let Some((bx, by, score)) = template.best_match(frame, w, h, cx, cy, radius) else {
            break;
        };
        if score < MIN_NCC {
            break;
        }
        out[k - 1] = Some((bx - template.x, by - template.y));
        (px, py) = (f64::from(bx), f64::from(by));
    }
    out
}

/// A template: its place in the first crop and its zero-mean grey levels.
struct Template {
    x: i32,
    y: i32,
    w: usize,
    h: usize,
    values: Vec<f32>,
    norm: f32,
}

impl Template {
    /// The start box's pixels (clipped to the region); `None` when empty or too flat to follow.
    fn cut(crop: &[u8], w: usize, h: usize, s: &Start) -> Option<Template> {
        let x0 = s.x.clamp(0, w as i32);
        let y0 = s.y.clamp(0, h as i32);
        let x1 = (s.x + s.w as i32).clamp(0, w as i32);
        let y1 = (s.y + s.h as i32).clamp(0, h as i32);
        let (tw, th) = ((x1 - x0) as usize, (y1 - y0) as usize);
        if tw < 2 || th < 2 {
            return None;
        }
        let mut values = Vec::with_capacity(tw * th);
        for y in y0 as usize..y1 as usize {
            values.extend(
                crop[y * w + x0 as usize..][..tw]
                    .iter()
                    .map(|&v| f32::from(v)),
            );
        }
        let mean = values.iter().sum::<f32>() / values.len() as f32;
        values.iter_mut().for_each(|v| *v -= mean);
        let norm = values.iter().map(|v| v * v).sum::<f32>().sqrt();
        if norm / (values.len() as f32).sqrt() < MIN_TEMPLATE_SPREAD {
            return None;
        }
        Some(Template {
            x: x0,
            y: y0,
            w: tw,
            h: th,
            values,
            norm,
        })
    }

    /// The best NCC within `radius` of `(cx, cy)` (top-left, working pixels) with the template
    /// wholly inside the crop; ties go to the first in row order. `None` when no place fits.
    fn best_match(
        &self,
        crop: &[u8],
        w: usize,
        h: usize,
        cx: i32,
        cy: i32,
        radius: i32,
    ) -> Option<(i32, i32, f32)> {
        let mut best: Option<(i32, i32, f32)> = None;
        for y in cy - radius..=cy + radius {
            for x in cx - radius..=cx + radius {
                if x < 0 || y < 0 || x as usize + self.w > w || y as usize + self.h > h {
                    continue;
                }
                let score = self.ncc(crop, w, x as usize, y as usize);
                if best.is_none_or(|b| score > b.2) {
                    best = Some((x, y, score));
                }
            }
        }
        best
    }

    /// NCC of the template with the crop's pixels at `(x, y)`: from -1 to 1; 0 for a flat patch.
    fn ncc(&self, crop: &[u8], w: usize, x: usize, y: usize) -> f32 {
        let (mut sum, mut sum_sq, mut cross) = (0.0f32, 0.0f32, 0.0f32);
        for (j, row) in self.values.chunks(self.w).enumerate() {
            let patch = &crop[(y + j) * w + x..][..self.w];
            for (&t, &p) in row.iter().zip(patch) {
                let p = f32::from(p);
                sum += p;
                sum_sq += p * p;
                cross += t * p;
            }
        }
        let n = self.values.len() as f32;
        let spread = (sum_sq - sum * sum / n).max(0.0).sqrt();
        if spread < 1e-3 {
            return 0.0;
        }
        // The template is zero-mean, so the patch's mean drops out of the cross term.
        cross / (self.norm * spread)
    }
}
