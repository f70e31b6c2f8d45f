//! The background model: the approximate running median of McFarlane & Schofield (1995) with a
//! running estimate of each pixel's mean absolute deviation for its threshold, formed first from the
//! median of pictures sampled over the warm-up; shadows told apart by brightness ratio and chroma.
//! See the module notes of `detect` for the method and its sources.

use super::{DetectorConfig, Picture};

/// Background, deviation and chroma background of one picture size, with the pictures kept while
/// the first background forms.
pub(super) struct Background {
    width: usize,
    height: usize,
    frames_seen: u32,
    bg: Vec<u8>,
    dev: Vec<u8>,
    bg_u: Vec<u8>,
    bg_v: Vec<u8>,
    /// Pictures kept during the warm-up (luma, and chroma when there is colour).
    samples: Vec<Vec<u8>>,
    samples_uv: Vec<(Vec<u8>, Vec<u8>)>,
    /// Frames each pixel has been foreground in a row (saturating).
    fg_run: Vec<u8>,
}

impl Background {
    pub(super) fn new(width: usize, height: usize) -> Background {
        let n = width * height;
        let (cw, ch) = Picture::chroma_size(width, height);
        Background {
            width,
            height,
            frames_seen: 0,
            bg: Vec::new(),
            dev: vec![4; n],
            bg_u: vec![128; cw * ch],
            bg_v: vec![128; cw * ch],
            samples: Vec::new(),
            samples_uv: Vec::new(),
            fg_run: vec![0; n],
        }
    }

    /// Takes the next picture into the warm-up; `false` while the background is still forming
    /// (nothing can be reported for this picture), `true` once it can tell foreground.
    pub(super) fn ready(&mut self, pic: &Picture, warm_up: u32) -> bool {
        let n = self.width * self.height;
        let (cw, ch) = Picture::chroma_size(self.width, self.height);
        self.frames_seen += 1;
        if self.frames_seen <= warm_up {
            // The first background is the per-pixel median of pictures sampled over the warm-up,
            // so objects that move during it are left out of it.
            let stride = warm_up.div_ceil(WARM_UP_SAMPLES).max(1);
            if (self.frames_seen - 1).is_multiple_of(stride) {
                self.samples.push(pic.y[..n].to_vec());
                if let Some((u, v)) = pic.uv {
                    self.samples_uv
                        .push((u[..cw * ch].to_vec(), v[..cw * ch].to_vec()));
                }
            }
            if self.frames_seen == warm_up {
                self.form_background(n, cw * ch);
            }
            return false;
        }
        if self.bg.is_empty() {
            // No warm-up asked for: start from this picture.
            self.samples = vec![pic.y[..n].to_vec()];
            if let Some((u, v)) = pic.uv {
                self.samples_uv = vec![(u[..cw * ch].to_vec(), v[..cw * ch].to_vec())];
            }
            self.form_background(n, cw * ch);
        }
        true
    }

    /// The background and each pixel's usual deviation from the warm-up pictures (medians); the
    /// pictures are then let go.
    fn form_background(&mut self, n: usize, nc: usize) {
        let median = |planes: &[&Vec<u8>], i: usize, buf: &mut Vec<u8>| {
            buf.clear();
            buf.extend(planes.iter().map(|p| p[i]));
            let mid = buf.len() / 2;
            *buf.select_nth_unstable(mid).1
        };
        let mut buf = Vec::with_capacity(WARM_UP_SAMPLES as usize);
        let luma: Vec<&Vec<u8>> = self.samples.iter().collect();
        self.bg = (0..n).map(|i| median(&luma, i, &mut buf)).collect();
        for i in 0..n {
            let b = self.bg[i];
            buf.clear();
            buf.extend(luma.iter().map(|p| p[i].abs_diff(b)));
            let mid = buf.len() / 2;
            self.dev[i] = (*buf.select_nth_unstable(mid).1).max(2);
        }
        if !self.samples_uv.is_empty() {
            let us: Vec<&Vec<u8>> = self.samples_uv.iter().map(|p| &p.0).collect();
            let vs: Vec<&Vec<u8>> = self.samples_uv.iter().map(|p| &p.1).collect();
            for i in 0..nc {
                self.bg_u[i] = median(&us, i, &mut buf);
                self.bg_v[i] = median(&vs, i, &mut buf);
            }
        }
        self.samples = Vec::new();
        self.samples_uv = Vec::new();
    }

    /// Marks foreground pixels in `mask` and moves the background towards this picture (after the
    /// warm-up: see [`Self::ready`]).
    pub(super) fn foreground(&mut self, pic: &Picture, c: &DetectorConfig, mask: &mut [u8]) {
        let w = self.width;
        let (cw, _) = Picture::chroma_size(self.width, self.height);
        // The background follows each pixel by one level a frame; a pixel under an object (or its
        // shadow) is left alone, unless it has been so for `STILL_FRAMES` in a row: then it is a
        // stopped object or a ghost (where an object stood while the background formed) and is
        // learnt, faster.
        let step: i16 = 1;
        // The threshold in sixteenths, so the per-pixel test stays in integers.
        let factor = (c.deviation_factor * 16.0).round().clamp(0.0, 4096.0) as u32;
        let min_difference = u32::from(c.min_difference);
        for yy in 0..self.height {
            let row = yy * w;
            let crow = (yy / 2) * cw;
            for xx in 0..w {
                let i = row + xx;
                let p = pic.y[i];
                let b = self.bg[i];
                let d = p.abs_diff(b);
                let limit = ((u32::from(self.dev[i]) * factor) >> 4).max(min_difference);
                // `changed`: not the background (an object or its shadow). Shadows are left out of
                // the mask but not learnt either, or a lingering shadow would leave a ghost.
                let changed = u32::from(d) > limit;
                let mut fg = changed;
                if fg && p < b {
                    if let Some((u, v)) = pic.uv {
                        let ci = crow + xx / 2;
                        let ratio = f32::from(p) / f32::from(b.max(1));
                        if ratio >= c.shadow_low
                            && ratio <= c.shadow_high
                            && u[ci].abs_diff(self.bg_u[ci]) <= c.shadow_chroma
                            && v[ci].abs_diff(self.bg_v[ci]) <= c.shadow_chroma
                        {
                            fg = false;
                        }
                    }
                }
                mask[i] = u8::from(fg);
                self.fg_run[i] = if changed {
                    self.fg_run[i].saturating_add(1)
                } else {
                    0
                };
                if !changed {
                    self.bg[i] = toward(b, p, step);
                    self.dev[i] = toward(self.dev[i], d, 1).max(2);
                } else if self.fg_run[i] >= STILL_FRAMES {
                    self.bg[i] = toward(b, p, 3);
                }
            }
        }
        if let Some((u, v)) = pic.uv {
            for (i, (bu, bv)) in self.bg_u.iter_mut().zip(self.bg_v.iter_mut()).enumerate() {
                let li = (i / cw) * 2 * w + (i % cw) * 2;
                if self
                    .fg_run
                    .get(li)
                    .is_none_or(|&r| r == 0 || r >= STILL_FRAMES)
                {
                    *bu = toward(*bu, u[i], step);
                    *bv = toward(*bv, v[i], step);
                }
            }
        }
    }
}

/// Pictures kept to form the first background (sampled evenly over the warm-up).
const WARM_UP_SAMPLES: u32 = 25;

/// Frames in a row (5 s at 25 fps) after which a foreground pixel is learnt into the background
/// anyway, three levels a frame. Long enough that a person walking slowly towards the camera, who
/// covers a pixel for a few seconds, is not learnt.
const STILL_FRAMES: u8 = 125;

/// Moves `from` up to `step` levels towards `to`.
fn toward(from: u8, to: u8, step: i16) -> u8 {
    let d = i16::from(to) - i16::from(from);
    (i16::from(from) + d.clamp(-step, step)) as u8
}
