//! From the blobs of the cleaned mask to boxes: size rules against the expected height, fragments
//! of one body joined, side-by-side pairs split at a waist in the column profile.

use super::mask::Blob;
use super::Detector;
use crate::geometry::BBox;

impl Detector {
    /// Blobs to boxes: size rules, joining fragments of one body, splitting side-by-side pairs.
    pub(super) fn boxes(&self, blobs: Vec<Blob>) -> Vec<(BBox, f64)> {
        let c = &self.config;
        let mut kept: Vec<Blob> = blobs
            .into_iter()
            .filter(|b| b.area >= c.min_area / 2)
            .collect();
        self.join_fragments(&mut kept);
        let mut out = Vec::new();
        for b in kept {
            for part in self.split(b) {
                let h = part.h() as f64;
                if part.area < c.min_area {
                    continue;
                }
                if let Some(expected) = self.expected_height(part.y1 as f64) {
                    if h < 0.3 * expected || h > 2.5 * expected {
                        continue;
                    }
                }
                // Kept to the three decimals the detections files hold, so boxes found here and
                // boxes read back from `detect`'s output track the same.
                let fill = f64::from(part.area) / (part.w() * part.h()) as f64;
                let score = (fill.clamp(0.05, 1.0) * 1000.0).round() / 1000.0;
                out.push((
                    BBox {
                        x: part.x0 as f64,
                        y: part.y0 as f64,
                        w: part.w() as f64,
                        h,
                    },
                    score,
                ));
            }
        }
        out
    }

    /// Fragments of one body (a head apart from the legs, a body cut by a railing) become one blob:
    /// blobs that overlap horizontally by most of the narrower one and lie within a quarter height.
    fn join_fragments(&self, kept: &mut Vec<Blob>) {
        let mut merged = true;
        while merged {
            merged = false;
            'outer: for i in 0..kept.len() {
                for j in i + 1..kept.len() {
                    let (a, b) = (kept[i], kept[j]);
                    let overlap = a.x1.min(b.x1) as i64 - a.x0.max(b.x0) as i64 + 1;
                    let narrow = a.w().min(b.w()) as i64;
                    let gap = a.y0.max(b.y0) as i64 - a.y1.min(b.y1) as i64 - 1;
                    let bottom = a.y1.max(b.y1) as f64;
                    let reach = self
                        .expected_height(bottom)
                        .unwrap_or(a.h().max(b.h()) as f64)
                        * 0.25;
                    let joined_h = (a.y1.max(b.y1) - a.y0.min(b.y0) + 1) as f64;
                    let joined_w = (a.x1.max(b.x1) - a.x0.min(b.x0) + 1) as f64;
                    // The joined box must still look like one object.
                    let tall_enough = match self.expected_height(bottom) {
                        Some(h) => joined_h <= 1.3 * h,
                        None => {
                            joined_h <= 1.6 * a.h().max(b.h()) as f64
                                && joined_w <= 1.2 * a.w().max(b.w()) as f64
                        }
                    };
                    // ... and be mostly foreground, so scattered specks never chain into a box.
                    let fill = f64::from(a.area + b.area) / (joined_w * joined_h);
                    if overlap * 10 >= narrow * 6
                        && (gap as f64) <= reach
                        && tall_enough
                        && fill >= 0.3
                    {
                        kept[i] = Blob {
                            x0: a.x0.min(b.x0),
                            y0: a.y0.min(b.y0),
                            x1: a.x1.max(b.x1),
                            y1: a.y1.max(b.y1),
                            area: a.area + b.area,
                        };
                        kept.remove(j);
                        merged = true;
                        break 'outer;
                    }
                }
            }
        }
    }

    /// A blob as wide as two objects, with a waist in its column profile, becomes two blobs.
    fn split(&self, b: Blob) -> Vec<Blob> {
        let Some(expected) = self.expected_height(b.y1 as f64) else {
            return vec![b];
        };
        let one = expected * self.config.width_ratio;
        if (b.w() as f64) < 1.7 * one || b.w() < 6 {
            return vec![b];
        }
        let mut cols = vec![0u32; b.w()];
        for y in b.y0..=b.y1 {
            let row = &self.mask[y * self.width..(y + 1) * self.width];
            for (k, x) in (b.x0..=b.x1).enumerate() {
                cols[k] += u32::from(row[x]);
            }
        }
        let lo = b.w() / 4;
        let hi = b.w() - b.w() / 4;
        let (cut, waist) = (lo..hi)
            .map(|k| (k, cols[k]))
            .min_by_key(|&(_, v)| v)
            .unwrap_or((b.w() / 2, 0));
        let left_peak = cols[..cut].iter().copied().max().unwrap_or(0);
        let right_peak = cols[cut..].iter().copied().max().unwrap_or(0);
        if f64::from(waist) > 0.6 * f64::from(left_peak.min(right_peak)) {
            return vec![b];
        }
        let part = |x0: usize, x1: usize| -> Option<Blob> {
            let (mut y0, mut y1, mut area) = (usize::MAX, 0, 0u32);
            for y in b.y0..=b.y1 {
                let row = &self.mask[y * self.width + x0..=y * self.width + x1];
                let n: u32 = row.iter().map(|&m| u32::from(m)).sum();
                if n > 0 {
                    y0 = y0.min(y);
                    y1 = y1.max(y);
                    area += n;
                }
            }
            (area > 0).then_some(Blob {
                x0,
                y0,
                x1,
                y1,
                area,
            })
        };
        [part(b.x0, b.x0 + cut - 1), part(b.x0 + cut, b.x1)]
            .into_iter()
            .flatten()
            .flat_map(|p| {
                if p.w() < b.w() {
                    self.split(p)
                } else {
                    vec![p]
                }
            })
            .collect()
    }
}
