//! Whether the camera kept still. The fixed-camera detector finds objects as what differs from
//! the empty scene, so footage from a camera that pans, shakes or is carried (a phone in hand)
//! gives boxes that are not objects, and its per-pixel thresholds, learnt from that same footage,
//! grow wide enough that nothing looks wrong. So the camera's own motion is measured apart from
//! the background: every [`EVERY`] frames a small picture of block means is kept, and compared
//! with the one kept [`EVERY`] × 2 frames before at every whole shift up to [`REACH`] blocks each
//! way (global motion estimation by block matching, the least mean absolute difference). People
//! moving in front of a still camera leave most of the picture where it was, so no shift beats
//! none; a camera that moved is matched far better at a shift. When such frames are many, the
//! clip's detections carry a note saying so and where. A comparison no shift explains, far above
//! the clip's usual difference, is the picture changing all at once (a cut between shots, the
//! light switched, a hand over the lens): those places are noted too.

use std::collections::VecDeque;

/// A small picture is kept every this many frames.
const EVERY: usize = 4;

/// About this many blocks across the small picture, whatever the footage's size.
const BLOCKS_ACROSS: usize = 96;

/// Shifts tried: up to this many blocks each way, across and down.
const REACH: isize = 4;

/// A shift is the camera's motion when its difference is at most this share of no shift's...
const SHIFT_WINS: f64 = 0.6;

/// ...and no shift's mean difference is at least this (grey levels): a flat or still picture is
/// matched at any shift about alike.
const LEAST_DIFFERENCE: f64 = 3.0;

/// Comparisons showing motion at least this share of all: the note is given.
const NOTE_SHARE: f64 = 0.1;

/// Fewer comparisons than this (about 2 s at 25 frames a second): too few to tell.
const FEWEST: usize = 12;

/// A comparison no shift explains whose difference is at least this many times the clip's median
/// (and at least [`CUT_LEAST`] grey levels) is the picture changing all at once: a cut between
/// shots, or the light switched. A dense crowd in front of a still camera keeps within about 1.2
/// times its median (the simulator's 120 in view: 24 at most against a median near 20).
const CUT_TIMES_MEDIAN: f64 = 3.0;

/// See [`CUT_TIMES_MEDIAN`].
const CUT_LEAST: f64 = 20.0;

/// Comparisons kept as possible cuts at most (a clip that changes all the time is said so
/// anyway): memory does not grow with the footage.
const CUTS_KEPT: usize = 1000;

/// The small pictures kept and what the comparisons found (frames 1-based, counted from the first
/// one searched).
#[derive(Debug, Default, Clone)]
pub(crate) struct Steadiness {
    frames: usize,
    kept: VecDeque<Vec<u8>>,
    compared: usize,
    moved: usize,
    first: usize,
    last: usize,
    /// How many comparisons had each mean difference with no shift (grey levels, rounded).
    differences: Vec<u32>,
    /// Comparisons no shift explains with a large difference: (frame, difference).
    changes: Vec<(usize, f64)>,
}

impl Steadiness {
    /// One more frame searched: its luma plane, `width` × `height`, rows one after another.
    pub(crate) fn observe(&mut self, luma: &[u8], width: usize, height: usize) {
        self.frames += 1;
        if !(self.frames - 1).is_multiple_of(EVERY) {
            return;
        }
        let block = (width / BLOCKS_ACROSS).max(1);
        let small = block_means(luma, width, height, block);
        let (sw, sh) = (width / block, height / block);
        if self.kept.len() == 2 {
            let before = self.kept.pop_front().unwrap_or_default();
            self.compared += 1;
            let (still, moved) = compare(&before, &small, sw, sh);
            if self.differences.is_empty() {
                self.differences = vec![0; 256];
            }
            self.differences[(still.round() as usize).min(255)] += 1;
            if moved {
                self.moved += 1;
                if self.first == 0 {
                    self.first = self.frames.saturating_sub(2 * EVERY).max(1);
                }
                self.last = self.frames;
            } else if still >= CUT_LEAST && self.changes.len() < CUTS_KEPT {
                self.changes.push((self.frames, still));
            }
        }
        self.kept.push_back(small);
    }

    /// What to tell the person when the camera moved in many of the frames searched, or the
    /// picture changed all at once, else `None`.
    pub(crate) fn note(&self) -> Option<String> {
        let notes: Vec<String> = [self.moved_note(), self.cuts_note()]
            .into_iter()
            .flatten()
            .collect();
        (!notes.is_empty()).then(|| notes.join(". Also, "))
    }

    /// The places where the picture changed all at once (a cut, the light), each the first frame
    /// of a run of such comparisons.
    fn cuts(&self) -> Vec<usize> {
        let half = self.compared.div_ceil(2) as u32;
        let mut seen = 0;
        let median = self.differences.iter().position(|&n| {
            seen += n;
            seen >= half
        });
        let least = median.map_or(f64::INFINITY, |m| {
            (CUT_TIMES_MEDIAN * m as f64).max(CUT_LEAST)
        });
        let mut starts: Vec<usize> = Vec::new();
        let mut last = 0;
        for &(frame, _) in self.changes.iter().filter(|c| c.1 >= least) {
            if last == 0 || frame > last + EVERY {
                // Compared with the picture 2 × EVERY frames before: the change lies between them.
                starts.push(frame.saturating_sub(2 * EVERY).max(1));
            }
            last = frame;
        }
        starts
    }

    fn cuts_note(&self) -> Option<String> {
        if self.compared < FEWEST {
            return None;
        }
        let cuts = self.cuts();
        let first: Vec<String> = cuts.iter().take(5).map(usize::to_string).collect();
        (!cuts.is_empty()).then(|| {
            format!(
                "the picture changes all at once in {} place{} (just after frame{} {}{}): footage \
                 cut together from several shots, the light switched, or something passing close \
                 in front of the camera. The fixed-camera detector needs one unbroken shot from a \
                 camera that keeps still and a clear view: boxes around those frames are not \
                 objects",
                cuts.len(),
                if cuts.len() == 1 { "" } else { "s" },
                if cuts.len() == 1 { "" } else { "s" },
                first.join(", "),
                if cuts.len() > 5 { ", …" } else { "" }
            )
        })
    }

    fn moved_note(&self) -> Option<String> {
        if self.compared < FEWEST || (self.moved as f64) < NOTE_SHARE * self.compared as f64 {
            return None;
        }
        Some(format!(
            "the camera seems to move (pan, shake or be carried) in about {:.0}% of the footage, \
             between frames {} and {}. The fixed-camera detector needs a camera that keeps \
             still: where it moves, the boxes found are not objects and counts from them are not \
             to be trusted. Use footage from a camera on a mount, or bring detections from a \
             detector that works on single pictures",
            100.0 * self.moved as f64 / self.compared as f64,
            self.first,
            self.last
        ))
    }
}

/// The mean of each whole `block` × `block` square of the picture, row after row.
fn block_means(luma: &[u8], width: usize, height: usize, block: usize) -> Vec<u8> {
    let (sw, sh) = (width / block, height / block);
    let mut sums = vec![0u32; sw * sh];
    for (y, row) in luma.chunks_exact(width).take(sh * block).enumerate() {
        let out = &mut sums[(y / block) * sw..][..sw];
        for (s, cells) in out.iter_mut().zip(row.chunks_exact(block)) {
            *s += cells.iter().map(|&v| u32::from(v)).sum::<u32>();
        }
    }
    let area = (block * block) as u32;
    sums.iter().map(|&s| (s / area) as u8).collect()
}

/// How much `now` differs from `before` in place (mean, grey levels), and whether it is `before`
/// moved by the camera: some shift matches far better than none.
fn compare(before: &[u8], now: &[u8], w: usize, h: usize) -> (f64, bool) {
    let r = REACH as usize;
    if w <= 2 * r || h <= 2 * r {
        return (0.0, false);
    }
    // The middle of `now`, compared with `before` shifted: every shift sees the same pixels of now.
    let difference = |dx: isize, dy: isize| -> f64 {
        let mut total = 0u64;
        for y in r..h - r {
            let other = (y as isize + dy) as usize;
            let a = &now[y * w + r..y * w + w - r];
            let b = &before[other * w..][..w];
            let b = &b[(r as isize + dx) as usize..][..a.len()];
            total += a
                .iter()
                .zip(b)
                .map(|(&p, &q)| u64::from(p.abs_diff(q)))
                .sum::<u64>();
        }
        total as f64 / ((w - 2 * r) * (h - 2 * r)) as f64
    };
    let still = difference(0, 0);
    if still < LEAST_DIFFERENCE {
        return (still, false);
    }
    let best = (-REACH..=REACH)
        .flat_map(|dy| (-REACH..=REACH).map(move |dx| (dx, dy)))
        .filter(|&s| s != (0, 0))
        .map(|(dx, dy)| difference(dx, dy))
        .fold(f64::INFINITY, f64::min);
    (still, best <= SHIFT_WINS * still)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A textured scene (common practice for such tests: a pattern with detail at every scale, so
    /// that a shift changes most pixels), seen through a window of `w` × `h` whose top-left corner
    /// is at (`x0`, `y0`), with a dark square of side 30 at (`sx`, `sy`) in the window (a person).
    fn view(w: usize, h: usize, x0: usize, y0: usize, square: (usize, usize)) -> Vec<u8> {
        let texture = |x: usize, y: usize| {
            let v = (x * 7 + y * 13) % 64 + ((x / 9 + y / 5) % 7) * 20 + ((x * y) % 11) * 3;
            (v % 256) as u8
        };
        let mut out = vec![0u8; w * h];
        for y in 0..h {
            for x in 0..w {
                let inside = (square.0..square.0 + 30).contains(&x)
                    && (square.1..square.1 + 30).contains(&y);
                out[y * w + x] = if inside { 20 } else { texture(x + x0, y + y0) };
            }
        }
        out
    }

    #[test]
    fn a_panning_camera_is_noted_with_where_and_a_still_one_is_not() {
        let (w, h) = (320, 180);
        let mut panning = Steadiness::default();
        let mut still = Steadiness::default();
        for k in 0..200 {
            // Someone walks across; the panning camera turns 2 pixels a frame for frames 61–140.
            let person = (k % 280, 80);
            let pan = 2 * k.clamp(60, 140) - 120;
            panning.observe(&view(w, h, pan, 0, person), w, h);
            still.observe(&view(w, h, 0, 0, person), w, h);
        }
        assert_eq!(still.note(), None);
        let note = panning.note().expect("the pan is seen");
        assert!(note.starts_with("the camera seems to move"), "{note}");
        // 80 of 200 frames turn; what is compared reaches 8 frames back.
        let share: f64 = note[note.find("about ").unwrap() + 6..]
            .split('%')
            .next()
            .unwrap()
            .parse()
            .unwrap();
        assert!((35.0..=45.0).contains(&share), "{note}");
        assert!(note.contains("between frames 5"), "{note}");
    }

    #[test]
    fn footage_cut_from_shots_is_noted_with_where() {
        let (w, h) = (320, 180);
        // Three shots of a still camera (frames 1–100, 101–200, 201–300): smooth scenes of broad
        // shapes, unlike one another at any small shift.
        let scene = |phase: f64| -> Vec<u8> {
            (0..w * h)
                .map(|i| {
                    let (x, y) = ((i % w) as f64, (i / w) as f64);
                    let v = 128.0
                        + 60.0 * (x / 23.0 + phase).sin()
                        + 50.0 * (y / 17.0 + x / 41.0 + 2.0 * phase).cos();
                    v as u8
                })
                .collect()
        };
        let shots = [scene(0.0), scene(1.9), scene(4.1)];
        let mut cut = Steadiness::default();
        for k in 0..300 {
            cut.observe(&shots[k / 100], w, h);
        }
        let note = cut.note().expect("two cuts");
        assert!(
            note.starts_with("the picture changes all at once in 2 places (just after frames 9"),
            "{note}"
        );
        assert!(!note.contains("seems to move"), "{note}");
    }

    #[test]
    fn a_short_clip_or_a_flat_picture_is_not_noted() {
        let (w, h) = (160, 90);
        let mut short = Steadiness::default();
        for k in 0..30 {
            short.observe(&view(w, h, 3 * k, 0, (0, 0)), w, h);
        }
        assert_eq!(short.note(), None, "30 frames are too few to tell");
        let mut flat = Steadiness::default();
        for k in 0..200 {
            let mut grey = vec![128u8; w * h];
            grey[(k % h) * w..][..w].fill(130);
            flat.observe(&grey, w, h);
        }
        assert_eq!(flat.note(), None);
    }
}
