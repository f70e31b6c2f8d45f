//! The background model's per-pixel work on a band of rows (see `spread`): the foreground test and
//! the learning, and the arithmetic of light levels they share. The method is in `background`.

use super::Picture;

/// The foreground test of one picture against the background: what every band reads.
pub(super) struct Test<'a> {
    pub(super) pic: Picture<'a>,
    pub(super) bg: &'a [u8],
    pub(super) dev: &'a [u8],
    pub(super) bg_u: &'a [u8],
    pub(super) bg_v: &'a [u8],
    /// The background's level seen at this picture's light.
    pub(super) lit_level: [u8; 256],
    /// The threshold's factor on the deviation, in sixteenths.
    pub(super) factor: u32,
    pub(super) min_difference: u32,
    pub(super) shadow_low: f32,
    pub(super) shadow_high: f32,
    pub(super) shadow_chroma: u8,
}

impl Test<'_> {
    /// Marks the foreground of the rows from `y0` (as many as `mask` holds) and counts each pixel's
    /// frames in a row changed (`run`, the same rows).
    pub(super) fn rows(&self, y0: usize, mask: &mut [u8], run: &mut [u16]) {
        let w = self.pic.width;
        let (cw, _) = Picture::chroma_size(w, self.pic.height);
        for (r, (mask, run)) in mask.chunks_mut(w).zip(run.chunks_mut(w)).enumerate() {
            let yy = y0 + r;
            let crow = (yy / 2) * cw;
            for xx in 0..w {
                let i = yy * w + xx;
                let p = self.pic.y[i];
                let b = self.lit_level[usize::from(self.bg[i])];
                let d = p.abs_diff(b);
                let limit = ((u32::from(self.dev[i]) * self.factor) >> 4).max(self.min_difference);
                // `changed`: not the background (an object or its shadow). Shadows are left out of
                // the mask but not learnt either, or a lingering shadow would leave a ghost.
                let changed = u32::from(d) > limit;
                let mut fg = changed;
                if fg && p < b {
                    if let Some((u, v)) = self.pic.uv {
                        let ci = crow + xx / 2;
                        let ratio = f32::from(p) / f32::from(b.max(1));
                        if ratio >= self.shadow_low
                            && ratio <= self.shadow_high
                            && u[ci].abs_diff(self.bg_u[ci]) <= self.shadow_chroma
                            && v[ci].abs_diff(self.bg_v[ci]) <= self.shadow_chroma
                        {
                            fg = false;
                        }
                    }
                }
                mask[xx] = u8::from(fg);
                run[xx] = if changed {
                    run[xx].saturating_add(1)
                } else {
                    0
                };
            }
        }
    }
}

/// The learning from one picture: what every band reads.
pub(super) struct Learning<'a> {
    pub(super) pic: Picture<'a>,
    pub(super) fg_run: &'a [u16],
    /// 1 inside an object's box.
    pub(super) covered: &'a [u8],
    pub(super) lit_level: [u8; 256],
    /// A picture's level at the background's light.
    pub(super) unlit_level: [u8; 256],
    /// Whether pixels inside boxes are learnt this frame.
    pub(super) slow_turn: bool,
    pub(super) still_frames: u16,
}

impl Learning<'_> {
    /// Whether a pixel is learnt one level (background now, outside boxes or on a slow turn).
    fn calm(&self, run: u16, covered: u8) -> bool {
        run == 0 && (covered == 0 || self.slow_turn)
    }

    /// Moves the background and deviation of the luma pixels from `i0` (as many as `bg` holds).
    pub(super) fn luma(&self, i0: usize, bg: &mut [u8], dev: &mut [u8]) {
        let n = bg.len();
        let pixels = (bg.iter_mut().zip(dev.iter_mut()))
            .zip(
                self.fg_run[i0..i0 + n]
                    .iter()
                    .zip(&self.covered[i0..i0 + n]),
            )
            .zip(&self.pic.y[i0..i0 + n]);
        for (((bg, dev), (&run, &c)), &p) in pixels {
            if self.calm(run, c) {
                let d = p.abs_diff(self.lit_level[usize::from(*bg)]);
                *bg = toward(*bg, self.unlit_level[usize::from(p)], 1);
                *dev = toward(*dev, d, 1).max(2);
            } else if run >= self.still_frames {
                *bg = toward(*bg, self.unlit_level[usize::from(p)], 3);
            }
        }
    }

    /// Moves the chroma background of the chroma rows from `cy0` (as many as `bg_u` holds), where
    /// the top-left luma pixel of each is learnt.
    pub(super) fn chroma(&self, cy0: usize, bg_u: &mut [u8], bg_v: &mut [u8]) {
        let Some((u, v)) = self.pic.uv else { return };
        let w = self.pic.width;
        let (cw, _) = Picture::chroma_size(w, self.pic.height);
        for (r, (bu, bv)) in bg_u.chunks_mut(cw).zip(bg_v.chunks_mut(cw)).enumerate() {
            let cy = cy0 + r;
            let (u, v) = (&u[cy * cw..][..cw], &v[cy * cw..][..cw]);
            for (cx, ((bu, bv), (&u, &v))) in bu.iter_mut().zip(bv).zip(u.iter().zip(v)).enumerate()
            {
                let li = cy * 2 * w + cx * 2;
                let learn = match (self.fg_run.get(li), self.covered.get(li)) {
                    (Some(&r), Some(&c)) => self.calm(r, c) || r >= self.still_frames,
                    _ => true,
                };
                if learn {
                    *bu = toward(*bu, u, 1);
                    *bv = toward(*bv, v, 1);
                }
            }
        }
    }
}

/// A gain of one, in 65536ths.
pub(super) const UNIT_GAIN: u32 = 1 << 16;

/// A background level seen in a picture of light `gain`.
pub(super) fn lit(level: u8, gain: u32) -> u8 {
    ((u32::from(level) * gain + UNIT_GAIN / 2) >> 16).min(255) as u8
}

/// A picture's level of light `gain` at the background's light.
pub(super) fn unlit(level: u8, gain: u32) -> u8 {
    (((u32::from(level) << 16) + gain / 2) / gain).min(255) as u8
}

/// A table of `f` over the 256 levels (made once a picture: a division a pixel cost more than all
/// the rest of the learning).
pub(super) fn levels(f: impl Fn(u8) -> u8) -> [u8; 256] {
    std::array::from_fn(|l| f(l as u8))
}

/// Moves `from` up to `step` levels towards `to`.
pub(super) fn toward(from: u8, to: u8, step: i16) -> u8 {
    let d = i16::from(to) - i16::from(from);
    (i16::from(from) + d.clamp(-step, step)) as u8
}
