//! The background model's per-pixel work on a band of rows (see `spread`): the foreground test and
//! the learning, and the arithmetic of light levels they share. The method is in `background`.

use super::Picture;
use crate::geometry::BBox;

/// The foreground test of one picture against the background: what every band reads.
pub(super) struct Test<'a> {
    pub(super) pic: Picture<'a>,
    pub(super) bg: &'a [u8],
    pub(super) dev: &'a [u8],
    pub(super) bg_u: &'a [u8],
    pub(super) bg_v: &'a [u8],
    /// This picture's light against the background's, in 65536ths.
    pub(super) gain: u32,
    /// The threshold's factor on the deviation, in sixteenths.
    pub(super) factor: u32,
    pub(super) min_difference: u32,
    pub(super) shadow_low: f32,
    pub(super) shadow_high: f32,
    pub(super) shadow_chroma: u8,
}

impl Test<'_> {
    /// Marks the foreground of the rows from `y0` (as many as `mask` holds) and counts each pixel's
    /// frames in a row changed (`run`, the same rows). Two passes a row: the test against the
    /// threshold, branch-free so it vectorises; then shadows taken out of the few pixels marked.
    pub(super) fn rows(&self, y0: usize, mask: &mut [u8], run: &mut [u16]) {
        let w = self.pic.width;
        let (cw, _) = Picture::chroma_size(w, self.pic.height);
        let (factor, least, gain) = (self.factor, self.min_difference, self.gain);
        for (r, (mask, run)) in mask.chunks_mut(w).zip(run.chunks_mut(w)).enumerate() {
            let at = (y0 + r) * w;
            let (y, bg) = (&self.pic.y[at..at + w], &self.bg[at..at + w]);
            let pixels = (mask.iter_mut().zip(run.iter_mut()))
                .zip(y.iter().zip(bg).zip(&self.dev[at..at + w]));
            for ((m, run), ((&p, &b), &dev)) in pixels {
                let d = p.abs_diff(lit(b, gain));
                let limit = ((u32::from(dev) * factor) >> 4).max(least);
                // `changed`: not the background (an object or its shadow). Shadows are left out of
                // the mask but not learnt either, or a lingering shadow would leave a ghost.
                let changed = u32::from(d) > limit;
                *m = u8::from(changed);
                *run = if changed { run.saturating_add(1) } else { 0 };
            }
            if let Some((u, v)) = self.pic.uv {
                let crow = ((y0 + r) / 2) * cw;
                for (xx, m) in mask.iter_mut().enumerate().filter(|(_, m)| **m != 0) {
                    let (p, b) = (y[xx], lit(bg[xx], gain));
                    let ci = crow + xx / 2;
                    let ratio = f32::from(p) / f32::from(b.max(1));
                    if p < b
                        && ratio >= self.shadow_low
                        && ratio <= self.shadow_high
                        && u[ci].abs_diff(self.bg_u[ci]) <= self.shadow_chroma
                        && v[ci].abs_diff(self.bg_v[ci]) <= self.shadow_chroma
                    {
                        *m = 0;
                    }
                }
            }
        }
    }
}

/// The learning from one picture: what every band reads.
pub(super) struct Learning<'a> {
    pub(super) pic: Picture<'a>,
    pub(super) fg_run: &'a [u16],
    /// The boxes of the objects found in the picture.
    pub(super) objects: &'a [BBox],
    /// The background's level at this picture's light.
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

    /// Learns the band of rows from `y0` (as many as `bg` holds; `bg_u` and `bg_v` hold its
    /// chroma rows): marks the objects' boxes in `covered` (one byte a pixel of the band), then
    /// moves the luma and the chroma background.
    pub(super) fn band(&self, y0: usize, planes: Band, covered: &mut [u8]) {
        let w = self.pic.width;
        self.cover(y0, covered);
        self.luma(y0 * w, planes.bg, planes.dev, covered);
        self.chroma(y0 / 2, planes.bg_u, planes.bg_v, covered);
    }

    /// 1 in `covered` (the band of rows from `y0`) inside an object's box, else 0.
    fn cover(&self, y0: usize, covered: &mut [u8]) {
        let (w, h) = (self.pic.width, self.pic.height);
        let y1 = y0 + covered.len() / w.max(1);
        covered.fill(0);
        for b in self.objects {
            let (x0, top) = (b.x.max(0.0) as usize, b.y.max(0.0) as usize);
            let (x1, bottom) = (((b.x + b.w) as usize).min(w), ((b.y + b.h) as usize).min(h));
            for y in top.max(y0)..bottom.min(y1) {
                covered[(y - y0) * w..][x0.min(x1)..x1].fill(1);
            }
        }
    }

    /// Moves the background and deviation of the luma pixels from `i0` (as many as `bg` holds;
    /// `covered` from the same pixel). Each pixel's three outcomes are worked out and one chosen,
    /// without branches, so it vectorises; a picture's levels go through the table first, a piece
    /// at a time.
    fn luma(&self, i0: usize, bg: &mut [u8], dev: &mut [u8], covered: &[u8]) {
        const PIECE: usize = 256;
        let (mut target, mut seen) = ([0u8; PIECE], [0u8; PIECE]);
        let pieces = bg.chunks_mut(PIECE).zip(dev.chunks_mut(PIECE));
        for (k, ((bg, dev), covered)) in pieces.zip(covered.chunks(PIECE)).enumerate() {
            let (at, n) = (i0 + k * PIECE, bg.len());
            let y = &self.pic.y[at..at + n];
            for ((t, s), (&p, &b)) in target.iter_mut().zip(&mut seen).zip(y.iter().zip(&*bg)) {
                *t = self.unlit_level[usize::from(p)];
                *s = self.lit_level[usize::from(b)];
            }
            // Every slice cut to `n` and indexed: the bounds checks go and the loop vectorises.
            let (bg, dev, y) = (&mut bg[..n], &mut dev[..n], &y[..n]);
            let (run, covered) = (&self.fg_run[at..at + n], &covered[..n]);
            let (target, seen) = (&target[..n], &seen[..n]);
            let (slow_turn, still_frames) = (self.slow_turn, self.still_frames);
            for x in 0..n {
                // `&` and `|`, not `&&` and `||`: no branch.
                let calm = (run[x] == 0) & ((covered[x] == 0) | slow_turn);
                let still = run[x] >= still_frames;
                let b = bg[x];
                let d = y[x].abs_diff(seen[x]);
                let (one, three) = (toward(b, target[x], 1), toward(b, target[x], 3));
                dev[x] = if calm {
                    toward(dev[x], d, 1).max(2)
                } else {
                    dev[x]
                };
                bg[x] = if calm {
                    one
                } else if still {
                    three
                } else {
                    b
                };
            }
        }
    }

    /// Moves the chroma background of the chroma rows from `cy0` (as many as `bg_u` holds), where
    /// the top-left luma pixel of each is learnt; `covered` starts at luma row `2 * cy0`.
    fn chroma(&self, cy0: usize, bg_u: &mut [u8], bg_v: &mut [u8], covered: &[u8]) {
        let Some((u, v)) = self.pic.uv else { return };
        let w = self.pic.width;
        let (cw, _) = Picture::chroma_size(w, self.pic.height);
        for (r, (bu, bv)) in bg_u.chunks_mut(cw).zip(bg_v.chunks_mut(cw)).enumerate() {
            let cy = cy0 + r;
            let (u, v) = (&u[cy * cw..][..cw], &v[cy * cw..][..cw]);
            for (cx, ((bu, bv), (&u, &v))) in bu.iter_mut().zip(bv).zip(u.iter().zip(v)).enumerate()
            {
                let (li, local) = (cy * 2 * w + cx * 2, r * 2 * w + cx * 2);
                let learn = match (self.fg_run.get(li), covered.get(local)) {
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

/// One band's share of the background's planes, learnt by [`Learning::band`].
pub(super) struct Band<'a> {
    pub(super) bg: &'a mut [u8],
    pub(super) dev: &'a mut [u8],
    pub(super) bg_u: &'a mut [u8],
    pub(super) bg_v: &'a mut [u8],
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

/// Moves `from` up to `step` levels towards `to` (in saturating bytes, which vectorise).
pub(super) fn toward(from: u8, to: u8, step: u8) -> u8 {
    let up = to.saturating_sub(from).min(step);
    let down = from.saturating_sub(to).min(step);
    from + up - down
}
