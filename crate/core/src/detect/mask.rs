//! The foreground mask's clean-up (3x3 opening, then closing), a band of rows at a time, and the
//! blobs it leaves (found in `label`).

/// A blob found in one picture, before it becomes a detection.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Blob {
    pub(super) x0: usize,
    pub(super) y0: usize,
    pub(super) x1: usize, // inclusive
    pub(super) y1: usize, // inclusive
    pub(super) area: u32,
}

impl Blob {
    pub(super) fn w(&self) -> usize {
        self.x1 - self.x0 + 1
    }
    pub(super) fn h(&self) -> usize {
        self.y1 - self.y0 + 1
    }
}

/// Rows above and below a band that its clean-up reads: each of the six passes reaches one row.
const HALO: usize = 6;

/// Working buffers of one band's clean-up.
#[derive(Default)]
pub(super) struct CleanUp {
    rows: Vec<u8>,
    tmp: Vec<u8>,
}

/// Cleans the rows of `raw` (a whole 0/1 mask `w` wide and `h` high) from `y0`, as many as `out`
/// holds, into `out`: opening removes specks, closing fills small holes and joins near pixels. The
/// band is cleaned with [`HALO`] rows of its neighbours around it, so it comes out as it would from
/// the whole mask cleaned at once (edges repeated at the picture's edges only).
pub(super) fn clean(raw: &[u8], out: &mut [u8], w: usize, h: usize, y0: usize, buf: &mut CleanUp) {
    if w == 0 {
        return;
    }
    let y1 = y0 + out.len() / w;
    let (a, b) = (y0.saturating_sub(HALO), (y1 + HALO).min(h));
    buf.rows.clear();
    buf.rows.extend_from_slice(&raw[a * w..b * w]);
    buf.tmp.resize(buf.rows.len(), 0);
    let (m, t) = (&mut buf.rows, &mut buf.tmp);
    erode(m, t, w, b - a);
    dilate(m, t, w, b - a);
    dilate(m, t, w, b - a);
    dilate(m, t, w, b - a);
    erode(m, t, w, b - a);
    erode(m, t, w, b - a);
    out.copy_from_slice(&m[(y0 - a) * w..(y1 - a) * w]);
}

/// 3x3 erosion of a 0/1 mask, as a row pass then a column pass.
fn erode(mask: &mut [u8], tmp: &mut [u8], w: usize, h: usize) {
    morph::<false>(mask, tmp, w, h);
}

/// 3x3 dilation of a 0/1 mask.
fn dilate(mask: &mut [u8], tmp: &mut [u8], w: usize, h: usize) {
    morph::<true>(mask, tmp, w, h);
}

/// Max (`DILATE`) or min of each 3x3 neighbourhood, edges repeated. Written as whole-row slice
/// operations so the compiler vectorises them.
fn morph<const DILATE: bool>(mask: &mut [u8], tmp: &mut [u8], w: usize, h: usize) {
    #[inline(always)]
    fn op<const DILATE: bool>(a: u8, b: u8, c: u8) -> u8 {
        if DILATE {
            a | b | c
        } else {
            a & b & c
        }
    }
    if w < 2 || h == 0 {
        return;
    }
    for (r, t) in mask.chunks_exact(w).zip(tmp.chunks_exact_mut(w)) {
        t[0] = op::<DILATE>(r[0], r[0], r[1]);
        t[w - 1] = op::<DILATE>(r[w - 2], r[w - 1], r[w - 1]);
        for ((o, a), (b, c)) in t[1..w - 1]
            .iter_mut()
            .zip(&r[..w - 2])
            .zip(r[1..w - 1].iter().zip(&r[2..]))
        {
            *o = op::<DILATE>(*a, *b, *c);
        }
    }
    for y in 0..h {
        let up = &tmp[y.saturating_sub(1) * w..][..w];
        let mid = &tmp[y * w..][..w];
        let down = &tmp[(y + 1).min(h - 1) * w..][..w];
        let out = &mut mask[y * w..][..w];
        for (o, ((a, b), c)) in out.iter_mut().zip(up.iter().zip(mid).zip(down)) {
            *o = op::<DILATE>(*a, *b, *c);
        }
    }
}
