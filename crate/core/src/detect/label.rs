//! The cleaned mask's connected blobs (8-connected), found a band of rows at a time: each band
//! lists its runs of foreground (a row's unbroken stretches) and joins the runs that touch within
//! the band; then, on one thread, the runs that touch across each edge between bands are joined
//! and the blobs summed up. The blobs are the same, in the same order (by their first pixel, top to
//! bottom and left to right), however the picture is cut.

use super::mask::Blob;

/// An unbroken stretch of foreground in one row: pixels `x0..=x1` of row `y`.
#[derive(Debug, Clone, Copy)]
struct Run {
    y: u32,
    x0: u32,
    x1: u32,
}

/// One band's runs, top to bottom and left to right, each with the first run (in that order) of
/// the blob it belongs to within the band.
#[derive(Default)]
pub(super) struct BandRuns {
    runs: Vec<Run>,
    first: Vec<u32>,
}

/// Lists the runs of the band `mask` (whole rows of `w` pixels, the first of them row `y0` of the
/// picture) and joins those that touch.
pub(super) fn band_runs(mask: &[u8], w: usize, y0: usize, out: &mut BandRuns) {
    out.runs.clear();
    out.first.clear();
    let mut above = 0..0;
    for (r, row) in mask.chunks_exact(w).enumerate() {
        let start = out.runs.len();
        let y = (y0 + r) as u32;
        runs_in_row(row, |x0, x1| {
            out.runs.push(Run { y, x0, x1 });
            out.first.push(out.first.len() as u32);
        });
        join_rows(&out.runs, &mut out.first, above, start..out.runs.len());
        above = start..out.runs.len();
    }
    // Each run's `first` now points at or before itself: one pass front to back leaves the blob's
    // first run everywhere.
    for i in 0..out.first.len() {
        out.first[i] = out.first[out.first[i] as usize];
    }
}

/// The blobs of a picture cut into `bands` (in order, top to bottom), joined across the edges
/// between them. `first` is a working buffer.
pub(super) fn blobs(bands: &[BandRuns], first: &mut Vec<u32>) -> Vec<Blob> {
    let runs: Vec<Run> = bands.iter().flat_map(|b| b.runs.iter().copied()).collect();
    first.clear();
    let mut last_row = 0..0;
    for band in bands {
        let base = first.len();
        first.extend(band.first.iter().map(|&f| f + base as u32));
        // The band's first row against the row above it, the last of the band before.
        let top = band
            .runs
            .iter()
            .take_while(|r| Some(r.y) == band.runs.first().map(|f| f.y));
        let top = base..base + top.count();
        let touching = runs.get(last_row.start).zip(runs.get(top.start));
        if touching.is_some_and(|(a, b)| a.y + 1 == b.y) {
            join_rows(&runs, first, last_row.clone(), top);
        }
        if let Some(last) = band.runs.last() {
            let n = band.runs.iter().rev().take_while(|r| r.y == last.y).count();
            last_row = first.len() - n..first.len();
        }
    }
    let mut index = vec![0u32; runs.len()];
    let mut out: Vec<Blob> = Vec::new();
    for (i, run) in runs.iter().enumerate() {
        let root = find(first, i as u32) as usize;
        first[i] = root as u32;
        let (x0, x1, y) = (run.x0 as usize, run.x1 as usize, run.y as usize);
        if root == i {
            index[i] = out.len() as u32;
            out.push(Blob {
                x0,
                y0: y,
                x1,
                y1: y,
                area: 0,
            });
        }
        let b = &mut out[index[root] as usize];
        b.x0 = b.x0.min(x0);
        b.x1 = b.x1.max(x1);
        b.y1 = y;
        b.area += (x1 - x0 + 1) as u32;
    }
    out
}

/// Joins each run of `below` with the runs of `above` (the row over it) that touch it, side or
/// corner; the blob keeps its earliest run.
fn join_rows(
    runs: &[Run],
    first: &mut [u32],
    above: std::ops::Range<usize>,
    below: std::ops::Range<usize>,
) {
    let mut a = above.start;
    for b in below {
        let (b0, b1) = (runs[b].x0, runs[b].x1);
        while a < above.end && runs[a].x1 + 1 < b0 {
            a += 1;
        }
        let mut k = a;
        while k < above.end && runs[k].x0 <= b1 + 1 {
            let (ra, rb) = (find(first, k as u32), find(first, b as u32));
            let (lo, hi) = (ra.min(rb), ra.max(rb));
            first[hi as usize] = lo;
            k += 1;
        }
    }
}

/// The earliest run of `i`'s blob so far, halving the path on the way.
fn find(first: &mut [u32], mut i: u32) -> u32 {
    while first[i as usize] != i {
        first[i as usize] = first[first[i as usize] as usize];
        i = first[i as usize];
    }
    i
}

/// Calls `found(x0, x1)` for each run of a row, left to right, passing over background (most of a
/// picture) and the insides of wide runs eight pixels at a time.
fn runs_in_row(row: &[u8], mut found: impl FnMut(u32, u32)) {
    let word = |x: usize| {
        let mut b = [0u8; 8];
        b.copy_from_slice(&row[x..x + 8]);
        u64::from_ne_bytes(b)
    };
    let (w, mut x) = (row.len(), 0);
    while x < w {
        while x + 8 <= w && word(x) == 0 {
            x += 8;
        }
        while x < w && row[x] == 0 {
            x += 1;
        }
        if x == w {
            break;
        }
        let start = x;
        while x + 8 <= w && word(x) == u64::from_ne_bytes([1; 8]) {
            x += 8;
        }
        while x < w && row[x] != 0 {
            x += 1;
        }
        found(start as u32, x as u32 - 1);
    }
}

#[cfg(test)]
mod tests {
    use super::super::mask::{clean, CleanUp};
    use super::*;

    /// The blobs by flood fill from each unvisited foreground pixel in reading order (8
    /// neighbours): the plain way of the textbooks, common practice, to hold the runs against.
    fn flood_fill(mask: &[u8], w: usize, h: usize) -> Vec<Blob> {
        let mut seen = vec![false; w * h];
        let mut out = Vec::new();
        for start in (0..w * h).filter(|&i| mask[i] != 0) {
            if seen[start] {
                continue;
            }
            seen[start] = true;
            let (mut stack, y0) = (vec![start], start / w);
            let mut b = Blob {
                x0: start % w,
                y0,
                x1: start % w,
                y1: y0,
                area: 0,
            };
            while let Some(i) = stack.pop() {
                let (x, y) = (i % w, i / w);
                (b.x0, b.x1, b.y1, b.area) = (b.x0.min(x), b.x1.max(x), b.y1.max(y), b.area + 1);
                for (nx, ny) in
                    (0..9).map(|k| ((x + k % 3).wrapping_sub(1), (y + k / 3).wrapping_sub(1)))
                {
                    // Off the picture (a wrapped -1 included) before any index is made.
                    if nx >= w || ny >= h {
                        continue;
                    }
                    let j = ny * w + nx;
                    if mask[j] != 0 && !seen[j] {
                        seen[j] = true;
                        stack.push(j);
                    }
                }
            }
            out.push(b);
        }
        out
    }

    /// A 0/1 mask with about `fill` in 256 pixels set, from a xorshift generator.
    fn speckled(w: usize, h: usize, fill: u64, seed: u64) -> Vec<u8> {
        let mut s = seed.max(1);
        (0..w * h)
            .map(|_| {
                s ^= s << 13;
                s ^= s >> 7;
                s ^= s << 17;
                u8::from(s % 256 < fill)
            })
            .collect()
    }

    /// The blobs of `mask` with its rows cut into bands of `rows`.
    fn in_bands(mask: &[u8], w: usize, rows: usize) -> Vec<Blob> {
        let bands: Vec<BandRuns> = (mask.chunks(rows * w).enumerate())
            .map(|(k, band)| {
                let mut runs = BandRuns::default();
                band_runs(band, w, k * rows, &mut runs);
                runs
            })
            .collect();
        blobs(&bands, &mut Vec::new())
    }

    #[test]
    fn runs_in_bands_find_the_blobs_of_a_flood_fill() {
        for (w, h) in [(1, 9), (7, 1), (9, 13), (33, 40), (64, 30), (100, 7)] {
            for (fill, seed) in [(20, 1), (90, 2), (128, 3), (200, 4), (256, 5)] {
                let mask = speckled(w, h, fill, seed);
                let expected = flood_fill(&mask, w, h);
                for rows in [1, 2, 3, 6, h] {
                    assert_eq!(
                        in_bands(&mask, w, rows),
                        expected,
                        "{w}x{h}, fill {fill}, {rows} rows"
                    );
                }
            }
        }
    }

    #[test]
    fn a_mask_cleaned_in_bands_is_the_mask_cleaned_whole() {
        for (w, h) in [(2, 1), (9, 13), (40, 33), (64, 50)] {
            for (fill, seed) in [(60, 6), (128, 7), (190, 8)] {
                let raw = speckled(w, h, fill, seed);
                let mut whole = vec![0; w * h];
                clean(&raw, &mut whole, w, h, 0, &mut CleanUp::default());
                for rows in [1, 2, 5, 8] {
                    let mut cut = vec![0; w * h];
                    for (k, band) in cut.chunks_mut(rows * w).enumerate() {
                        clean(&raw, band, w, h, k * rows, &mut CleanUp::default());
                    }
                    assert_eq!(cut, whole, "{w}x{h}, fill {fill}, {rows} rows");
                }
            }
        }
    }
}
