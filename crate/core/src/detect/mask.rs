//! The foreground mask's clean-up (3x3 opening and closing) and its connected blobs.

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

/// 3x3 erosion of a 0/1 mask, as a row pass then a column pass.
pub(super) fn erode(mask: &mut [u8], tmp: &mut [u8], w: usize, h: usize) {
    morph::<false>(mask, tmp, w, h);
}

/// 3x3 dilation of a 0/1 mask.
pub(super) fn dilate(mask: &mut [u8], tmp: &mut [u8], w: usize, h: usize) {
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

/// Connected components (8-connected) of a 0/1 mask by two passes with union-find; `labels` gets
/// each pixel's component number (0 = background).
pub(super) fn label_components(mask: &[u8], labels: &mut [u32], w: usize, h: usize) -> Vec<Blob> {
    let mut parent: Vec<u32> = vec![0];
    fn find(parent: &mut [u32], mut a: u32) -> u32 {
        while parent[a as usize] != a {
            parent[a as usize] = parent[parent[a as usize] as usize];
            a = parent[a as usize];
        }
        a
    }
    labels[..w * h].fill(0);
    for y in 0..h {
        for x in foreground_in_row(&mask[y * w..][..w]) {
            let i = y * w + x;
            let mut neighbours = [0u32; 4];
            if x > 0 {
                neighbours[0] = labels[i - 1];
            }
            if y > 0 {
                let up = i - w;
                neighbours[1] = labels[up];
                if x > 0 {
                    neighbours[2] = labels[up - 1];
                }
                if x + 1 < w {
                    neighbours[3] = labels[up + 1];
                }
            }
            let mut label = 0;
            for &n in neighbours.iter().filter(|&&n| n != 0) {
                let r = find(&mut parent, n);
                if label == 0 {
                    label = r;
                } else if r != label {
                    let (lo, hi) = (label.min(r), label.max(r));
                    parent[hi as usize] = lo;
                    label = lo;
                }
            }
            if label == 0 {
                label = parent.len() as u32;
                parent.push(label);
            }
            labels[i] = label;
        }
    }
    let mut blobs: Vec<Option<Blob>> = vec![None; parent.len()];
    for y in 0..h {
        for x in foreground_in_row(&mask[y * w..][..w]) {
            let i = y * w + x;
            let root = find(&mut parent, labels[i]);
            labels[i] = root;
            let b = blobs[root as usize].get_or_insert(Blob {
                x0: x,
                y0: y,
                x1: x,
                y1: y,
                area: 0,
            });
            b.x0 = b.x0.min(x);
            b.x1 = b.x1.max(x);
            b.y1 = y;
            b.area += 1;
        }
    }
    blobs.into_iter().flatten().collect()
}

/// The places of a row's foreground pixels, left to right, passing over background a span of
/// [`SPAN`] at a time where it can (most of a picture is background).
fn foreground_in_row(row: &[u8]) -> impl Iterator<Item = usize> + '_ {
    row.chunks(SPAN).enumerate().flat_map(|(k, span)| {
        let quiet = span.iter().all(|&m| m == 0);
        let places = span.iter().enumerate().filter(|(_, &m)| m != 0);
        places
            .map(move |(x, _)| k * SPAN + x)
            .take(if quiet { 0 } else { SPAN })
    })
}

/// Pixels of a row looked at together when passing over background.
const SPAN: usize = 32;
