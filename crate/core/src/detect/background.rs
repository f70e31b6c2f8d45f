//! The background model: the approximate running median of McFarlane & Schofield (1995) with a
//! running estimate of each pixel's mean absolute deviation for its threshold, formed first from the
//! per-pixel median of pictures sampled over the whole clip (or, when the footage can be read only
//! once, over the warm-up); shadows told apart by brightness ratio and chroma. See the module notes
//! of `detect` for the method and its sources.

use super::median::medians_into;
use super::pixels::{levels, lit, unlit, Band, Learning, Test, UNIT_GAIN};
use super::spread::{band_rows, Job, Spread};
use super::{DetectorConfig, Picture};
use crate::geometry::BBox;
use crate::limits;

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
    fg_run: Vec<u16>,
    /// Pictures offered from the whole clip before detection (see [`Sampler`]); `None` once the
    /// background has formed or when none were offered.
    clip: Option<Sampler>,
    /// Foreground frames in a row after which a pixel is learnt anyway ([`STILL_FRAMES`], or
    /// [`STILL_FRAMES_WHOLE_CLIP`] when the background came from the whole clip).
    still_frames: u16,
    /// The light of the picture last looked at against the background's ([`Self::gain`]).
    gain: u32,
}

/// Pictures kept from the whole clip, evenly spaced whatever its length, read once before
/// detection: every `step`-th picture from the first, the step doubling (and every other picture
/// let go) whenever more than `max_kept` would be kept. The pictures kept depend only on the clip,
/// so every adapter that offers the same frames forms the same background.
struct Sampler {
    step: usize,
    offered: usize,
    max_kept: usize,
    /// Picture index (0-based) and its luma (then chroma, when there is colour) planes.
    kept: Vec<(usize, Vec<u8>)>,
}

impl Sampler {
    fn new(frame_bytes: usize) -> Sampler {
        let fit = limits::MAX_BACKGROUND_SAMPLE_BYTES / frame_bytes.max(1);
        Sampler {
            step: 1,
            offered: 0,
            max_kept: fit.clamp(MIN_CLIP_SAMPLES, MAX_CLIP_SAMPLES),
            kept: Vec::new(),
        }
    }

    fn wants_next(&self) -> bool {
        self.offered.is_multiple_of(self.step)
    }

    /// Takes the next picture's planes (`planes` is called only when it is kept).
    fn offer(&mut self, planes: impl FnOnce() -> Vec<u8>) {
        if self.wants_next() {
            self.kept.push((self.offered, planes()));
            if self.kept.len() > self.max_kept {
                self.step *= 2;
                let step = self.step;
                self.kept.retain(|(i, _)| i.is_multiple_of(step));
            }
        }
        self.offered += 1;
    }
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
            clip: None,
            still_frames: STILL_FRAMES,
            gain: UNIT_GAIN,
        }
    }

    /// Whether the next picture offered to [`Self::sample`] would be kept (an adapter can skip
    /// copying the others).
    pub(super) fn wants_sample(&self) -> bool {
        self.clip.as_ref().is_none_or(Sampler::wants_next) && !self.detecting()
    }

    /// Whether detection has started (a picture went to [`Self::ready`]).
    pub(super) fn detecting(&self) -> bool {
        self.frames_seen > 0
    }

    /// Offers the next picture of the clip, read through once before detection starts. After the
    /// last one, detection starts at the clip's first picture with a background from them all.
    pub(super) fn sample(&mut self, pic: &Picture) {
        let n = self.width * self.height;
        let (cw, ch) = Picture::chroma_size(self.width, self.height);
        let nc = if pic.uv.is_some() { 2 * cw * ch } else { 0 };
        // Sized as for colour pictures either way, so the pictures kept depend on the size only.
        let clip = self
            .clip
            .get_or_insert_with(|| Sampler::new(n + 2 * cw * ch));
        clip.offer(|| {
            let mut planes = Vec::with_capacity(n + nc);
            planes.extend_from_slice(&pic.y[..n]);
            if let Some((u, v)) = pic.uv {
                planes.extend_from_slice(&u[..cw * ch]);
                planes.extend_from_slice(&v[..cw * ch]);
            }
            planes
        });
    }

    /// Counts the next picture of the clip without taking it (one [`Self::wants_sample`] declined).
    pub(super) fn pass_sample(&mut self) {
        let n = self.width * self.height;
        let (cw, ch) = Picture::chroma_size(self.width, self.height);
        let clip = self
            .clip
            .get_or_insert_with(|| Sampler::new(n + 2 * cw * ch));
        if clip.wants_next() {
            // Only a picture the sampler declines may be passed over: keep the spacing even.
            return;
        }
        clip.offered += 1;
    }

    /// The pictures a reading of `total` pictures would keep: every `step`-th from the first, the
    /// step the least power of two that keeps no more than the sampler holds.
    pub(super) fn clip_frames(&self, total: usize) -> Vec<usize> {
        let (cw, ch) = Picture::chroma_size(self.width, self.height);
        let max_kept = Sampler::new(self.width * self.height + 2 * cw * ch).max_kept;
        let mut step = 1;
        while total.div_ceil(step) > max_kept {
            step *= 2;
        }
        (0..total).step_by(step).collect()
    }

    /// Pictures kept so far by [`Self::sample`].
    pub(super) fn samples_kept(&self) -> usize {
        self.clip.as_ref().map_or(0, |c| c.kept.len())
    }

    /// Takes the next picture into the warm-up; `false` while the background is still forming
    /// (nothing can be reported for this picture), `true` once it can tell foreground.
    pub(super) fn ready(&mut self, pic: &Picture, warm_up: u32, spread: &dyn Spread) -> bool {
        let n = self.width * self.height;
        let (cw, ch) = Picture::chroma_size(self.width, self.height);
        self.frames_seen += 1;
        if let Some(clip) = self.clip.take().filter(|c| !c.kept.is_empty()) {
            // Whole-clip samples: no warm-up, the background holds from the first picture.
            let nc = cw * ch;
            for (_, mut planes) in clip.kept {
                if planes.len() == n + 2 * nc {
                    let (u, v) = planes[n..].split_at(nc);
                    self.samples_uv.push((u.to_vec(), v.to_vec()));
                }
                planes.truncate(n);
                self.samples.push(planes);
            }
            self.still_frames = STILL_FRAMES_WHOLE_CLIP;
            self.form_background(spread);
            return true;
        }
        if self.frames_seen <= warm_up && self.bg.is_empty() {
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
                self.form_background(spread);
            }
            return false;
        }
        if self.bg.is_empty() {
            // No warm-up asked for: start from this picture.
            self.samples = vec![pic.y[..n].to_vec()];
            if let Some((u, v)) = pic.uv {
                self.samples_uv = vec![(u[..cw * ch].to_vec(), v[..cw * ch].to_vec())];
            }
            self.form_background(spread);
        }
        true
    }

    /// The background and each pixel's usual deviation from the warm-up pictures (medians), in
    /// bands run as `spread` says; the pictures are then let go.
    fn form_background(&mut self, spread: &dyn Spread) {
        let (w, h) = (self.width, self.height);
        let (cw, ch) = Picture::chroma_size(w, h);
        let rows = band_rows(h, spread.bands());
        self.bg = vec![0; w * h];
        let luma: &Vec<&[u8]> = &self.samples.iter().map(Vec::as_slice).collect();
        let us: &Vec<&[u8]> = &self.samples_uv.iter().map(|p| p.0.as_slice()).collect();
        let vs: &Vec<&[u8]> = &self.samples_uv.iter().map(|p| p.1.as_slice()).collect();
        let size = (rows * w).max(1);
        let bands = self.bg.chunks_mut(size).zip(self.dev.chunks_mut(size));
        let mut jobs: Vec<Job> = (bands.enumerate())
            .map(|(k, (bg, dev))| Box::new(move || medians(luma, k * size, bg, dev)) as Job)
            .collect();
        if !us.is_empty() {
            let size = (rows / 2 * cw).max(1);
            let planes = self.bg_u[..cw * ch]
                .chunks_mut(size)
                .zip(self.bg_v.chunks_mut(size));
            jobs.extend(planes.enumerate().map(|(k, (bu, bv))| {
                Box::new(move || {
                    medians_into(us, k * size, None, bu);
                    medians_into(vs, k * size, None, bv);
                }) as Job
            }));
        }
        spread.run(jobs);
        self.samples = Vec::new();
        self.samples_uv = Vec::new();
    }

    /// Marks foreground pixels in `mask` (after the warm-up: see [`Self::ready`]); then
    /// [`Self::learn`] moves the background towards this picture. The rows are cut into bands,
    /// run as `spread` says.
    pub(super) fn foreground(
        &mut self,
        pic: &Picture,
        c: &DetectorConfig,
        mask: &mut [u8],
        spread: &dyn Spread,
    ) {
        let n = self.width * self.height;
        // The background is kept at one light; this picture's light against it (a cloud, a
        // camera's exposure) is measured over the pixels that were background in the last one.
        self.gain = self.gain(pic, spread);
        let gain = self.gain;
        let test = &Test {
            pic: *pic,
            bg: &self.bg,
            dev: &self.dev,
            bg_u: &self.bg_u,
            bg_v: &self.bg_v,
            gain,
            // The threshold in sixteenths, so the per-pixel test stays in integers.
            factor: (c.deviation_factor * 16.0).round().clamp(0.0, 4096.0) as u32,
            min_difference: u32::from(c.min_difference),
            shadow_low: c.shadow_low,
            shadow_high: c.shadow_high,
            shadow_chroma: c.shadow_chroma,
        };
        let rows = band_rows(self.height, spread.bands());
        let bands = mask[..n].chunks_mut(rows * self.width);
        let runs = self.fg_run.chunks_mut(rows * self.width);
        let jobs = (bands.zip(runs).enumerate())
            .map(|(k, (mask, run))| Box::new(move || test.rows(k * rows, mask, run)) as Job)
            .collect();
        spread.run(jobs);
    }

    /// Moves the background towards the picture [`Self::foreground`] last looked at, by one level
    /// (at the background's light), where it was background and outside every object's box: the
    /// parts of a person that look like the paving are not learnt, or they would leave a ghost. A
    /// pixel that has been foreground for `still_frames` in a row is a stopped object or a ghost
    /// and is learnt, faster. `covered` is a working buffer of one byte a pixel.
    pub(super) fn learn(
        &mut self,
        pic: &Picture,
        objects: &[BBox],
        covered: &mut [u8],
        spread: &dyn Spread,
    ) {
        let (w, h) = (self.width, self.height);
        let gain = self.gain;
        let learning = &Learning {
            pic: *pic,
            fg_run: &self.fg_run,
            objects,
            lit_level: levels(|l| lit(l, gain)),
            unlit_level: levels(|l| unlit(l, gain)),
            // Inside a box, background-like pixels are learnt on one frame in COVERED_PACE only:
            // the parts of a person that look like the paving barely move it, but a box that is
            // no object (the background gone wrong there) still heals.
            slow_turn: self.frames_seen.is_multiple_of(COVERED_PACE),
            still_frames: self.still_frames,
        };
        let rows = band_rows(h, spread.bands());
        let (cw, _) = Picture::chroma_size(w, h);
        let luma = self
            .bg
            .chunks_mut(rows * w)
            .zip(self.dev.chunks_mut(rows * w));
        let chroma = (self.bg_u.chunks_mut(rows / 2 * cw)).zip(self.bg_v.chunks_mut(rows / 2 * cw));
        let jobs = (luma
            .zip(chroma)
            .zip(covered.chunks_mut(rows * w))
            .enumerate())
        .map(|(k, (((bg, dev), (bg_u, bg_v)), covered))| {
            let planes = Band {
                bg,
                dev,
                bg_u,
                bg_v,
            };
            Box::new(move || learning.band(k * rows, planes, covered)) as Job
        })
        .collect();
        spread.run(jobs);
    }
}

impl Background {
    /// The light of `pic` against the background's, in 65536ths: the ratio of their sums over
    /// every seventh pixel that was background in the last picture (all pixels at first), within
    /// a half and twice.
    fn gain(&self, pic: &Picture, spread: &dyn Spread) -> u32 {
        let size = (band_rows(self.height, spread.bands()) * self.width).max(1);
        let mut sums = vec![(0u64, 0u64); self.bg.len().div_ceil(size)];
        let (bg, fg_run) = (&self.bg, &self.fg_run);
        let jobs = (sums.iter_mut().enumerate())
            .map(|(k, sum)| {
                Box::new(move || {
                    // Every seventh pixel of the picture, counted from its first.
                    let i0 = (k * size).next_multiple_of(7);
                    for i in (i0..bg.len().min((k + 1) * size)).step_by(7) {
                        if fg_run[i] == 0 {
                            sum.0 += u64::from(pic.y[i]);
                            sum.1 += u64::from(bg[i]);
                        }
                    }
                }) as Job
            })
            .collect();
        spread.run(jobs);
        let (now, then) = sums.iter().fold((0, 0), |(a, b), &(c, d)| (a + c, b + d));
        if then == 0 {
            return UNIT_GAIN;
        }
        ((now << 16) / then).clamp(u64::from(UNIT_GAIN / 2), u64::from(UNIT_GAIN * 2)) as u32
    }
}

/// The per-pixel median of the pictures `planes` from pixel `i0` (as many as `bg` holds) into
/// `bg`, and the median of their distances from it (at least 2) into `dev`.
fn medians(planes: &[&[u8]], i0: usize, bg: &mut [u8], dev: &mut [u8]) {
    medians_into(planes, i0, None, bg);
    medians_into(planes, i0, Some(bg), dev);
    dev.iter_mut().for_each(|d| *d = (*d).max(2));
}

/// Frames per step of learning inside an object's box.
const COVERED_PACE: u32 = 8;

/// Pictures kept to form the first background (sampled evenly over the warm-up).
const WARM_UP_SAMPLES: u32 = 25;

/// Frames in a row (5 s at 25 fps) after which a foreground pixel is learnt into the background
/// anyway, three levels a frame. Long enough that a person walking slowly towards the camera, who
/// covers a pixel for a few seconds, is not learnt.
const STILL_FRAMES: u16 = 125;

/// The same when the background came from the whole clip (60 s at 25 fps): no ghost of the opening
/// frames is left to clear, so a person who stands still stays foreground; only a lasting change
/// (a parked vehicle, a moved bench) is learnt.
const STILL_FRAMES_WHOLE_CLIP: u16 = 1_500;

/// Least and most pictures kept from the whole clip (fewer for large pictures, within
/// [`limits::MAX_BACKGROUND_SAMPLE_BYTES`]).
const MIN_CLIP_SAMPLES: usize = 4;
const MAX_CLIP_SAMPLES: usize = 64;
