//! Moving-object detection for a fixed camera, with no learned model: an adaptive per-pixel
//! background, foreground where a pixel differs from it by more than its own usual variation, shadows
//! taken out, the mask cleaned, and the connected blobs turned into boxes the trackers take.
//!
//! Background: first the per-pixel median (and median absolute deviation) of pictures spread evenly
//! over the whole clip, read once before detection ([`Detector::sample`]; or, for footage that can
//! be read only once, over the opening `warm_up_frames`); then the approximate running median of
//! McFarlane & Schofield (1995) — each frame the background value moves one grey level towards the
//! pixel — with each pixel's usual deviation followed the same way, for its threshold. Pixels under
//! an object are not learnt, unless they stay so for a long time (5 s after an opening-frames
//! background, which may hold a ghost of whoever stood there; 60 s after a whole-clip one), so a
//! person who stands still stays foreground.
//!
//! Shadows: a pixel darker than the background by a limited ratio whose chromaticity (U, V) is about
//! the background's is a shadow, not an object (the brightness/chromaticity test of Horprasert et
//! al. 1999 and Cucchiara et al. 2003, here in YUV).
//!
//! Pictures are planar YUV 4:2:0 (as YUV4MPEG2 `C420*` frames), or luma only; boxes are pixels,
//! top-left x/y + width/height; frames 1-based.

mod background;
mod blobs;
mod classify;
mod config;
mod label;
mod mask;
mod median;
mod picture;
mod pixels;
mod spread;
mod steadiness;

pub use classify::{APPEARANCE_DIM, GUESSED_CLASSES};
pub use config::DetectorConfig;
pub use picture::{rgba_to_yuv420, Picture};
pub use spread::{InTurn, Job, Spread};

use crate::detections::{Detection, Detections};
use crate::error::{Error, ErrorKind};
use crate::geometry::BBox;
use crate::track;
use background::Background;
use label::BandRuns;
use mask::{Blob, CleanUp};
use spread::band_rows;
use steadiness::Steadiness;

/// One object found in a picture.
#[derive(Debug, Clone, PartialEq)]
pub struct Found {
    pub bbox: BBox,
    /// The share of the box that is foreground, to three decimals.
    pub score: f64,
    /// [`APPEARANCE_DIM`] values of unit length, when `appearance` is on.
    pub appearance: Option<Vec<f32>>,
}

/// The detector's state for pictures of one size: the background model and working buffers.
pub struct Detector {
    config: DetectorConfig,
    width: usize,
    height: usize,
    background: Background,
    /// 1 where the last picture differs from the background (before the clean-up).
    changed: Vec<u8>,
    /// The cleaned foreground of the last picture, which the boxes are cut from.
    mask: Vec<u8>,
    /// 1 inside a box found in the last picture (for the learning).
    covered: Vec<u8>,
    /// Each band's working buffers and runs of foreground (see `label`).
    clean_ups: Vec<CleanUp>,
    band_runs: Vec<BandRuns>,
    /// The blobs' joining across bands, a working buffer.
    first_runs: Vec<u32>,
    /// Whether the camera kept still and the picture unbroken (a camera that moved, a cut).
    steadiness: Steadiness,
}

impl Detector {
    pub fn new(config: DetectorConfig, width: usize, height: usize) -> Detector {
        let n = width * height;
        Detector {
            config,
            width,
            height,
            background: Background::new(width, height),
            changed: vec![0; n],
            mask: vec![0; n],
            covered: vec![0; n],
            clean_ups: Vec::new(),
            band_runs: Vec::new(),
            first_runs: Vec::new(),
            steadiness: Steadiness::default(),
        }
    }

    /// The boxes found in each picture (in the order given; frames numbered from 1) as
    /// [`Detections`] for the trackers, each with its guessed class where there is one. With
    /// `split_merged` (and a height), blobs that cover two or more tracks are first cut into one
    /// box per track ([`crate::track::cut_merged`]). Class names are listed in order of first
    /// appearance, as a detections file's reader lists them, so the detections written out and
    /// read back are the same.
    pub fn detections_from(
        &self,
        found_per_frame: impl IntoIterator<Item = Vec<Found>>,
    ) -> Detections {
        let mut out = Detections::default();
        for (k, found) in found_per_frame.into_iter().enumerate() {
            out.footage_frames = k as u32 + 1;
            for f in found {
                let embedding = f.appearance.map(|v| {
                    out.embedding_dim = v.len();
                    out.embeddings.extend(v);
                    (out.embeddings.len() / out.embedding_dim - 1) as u32
                });
                out.rows.push(Detection {
                    frame: k as u32 + 1,
                    bbox: f.bbox,
                    score: f.score,
                    class: None,
                    embedding,
                });
            }
        }
        let perspective = self.config.perspective(self.height);
        if let Some(p) = perspective.filter(|_| self.config.split_merged) {
            out.rows = track::cut_merged(&out, &p);
        }
        let mut index: [Option<u16>; GUESSED_CLASSES.len()] = [None; GUESSED_CLASSES.len()];
        for r in &mut out.rows {
            r.class = self.guess_class(&r.bbox).map(|g| {
                *index[g as usize].get_or_insert_with(|| {
                    out.classes.push(GUESSED_CLASSES[g as usize].to_string());
                    (out.classes.len() - 1) as u16
                })
            });
        }
        out
    }

    /// [`Self::detect`], each box with its appearance vector when `appearance` is on.
    pub fn detect_found(&mut self, pic: &Picture) -> Result<Vec<Found>, Error> {
        self.detect_found_spread(pic, &InTurn)
    }

    /// [`Self::detect_found`] with the work in bands run as `spread` says (on several
    /// cores, say): the same boxes however they run.
    pub fn detect_found_spread(
        &mut self,
        pic: &Picture,
        spread: &dyn Spread,
    ) -> Result<Vec<Found>, Error> {
        let boxes = self.detect_spread(pic, spread)?;
        Ok(boxes
            .into_iter()
            .map(|(bbox, score)| Found {
                appearance: self.config.appearance.then(|| self.appearance(pic, &bbox)),
                bbox,
                score,
            })
            .collect())
    }

    /// Whether detection should be preceded by a first reading of the whole clip through
    /// [`Self::sample`] (`whole_clip_background` in the settings).
    pub fn samples_whole_clip(&self) -> bool {
        self.config.whole_clip_background
    }

    /// Whether the next picture given to [`Self::sample`] is one it keeps: an adapter can skip
    /// copying the others out of a decoder and pass any picture of the right size instead.
    pub fn wants_sample(&self) -> bool {
        self.background.wants_sample()
    }

    /// Offers the next picture of a first reading of the whole clip, in order from its first
    /// frame, before any call of [`Self::detect`]. A few dozen pictures spread evenly over the clip
    /// are kept, whatever its length, and the background is their per-pixel median: an object in
    /// view at the start is foreground from the first frame, and nothing needs to warm up. Without
    /// this reading, the background forms over the first `warm_up_frames` instead.
    pub fn sample(&mut self, pic: &Picture) -> Result<(), Error> {
        self.check_size(pic)?;
        if self.background.detecting() {
            return Err(Error::new(
                ErrorKind::Unsuitable,
                "the clip is read for its background before detection starts, not after",
            ));
        }
        self.background.sample(pic);
        Ok(())
    }

    /// Counts the next picture of the first reading without giving it, when [`Self::wants_sample`]
    /// said it is not kept (a picture it wants must be given to [`Self::sample`]; passing it does
    /// nothing).
    pub fn pass_sample(&mut self) {
        if !self.background.detecting() {
            self.background.pass_sample();
        }
    }

    /// The pictures (0-based) that a first reading of a clip of `total` pictures keeps: giving
    /// only these to [`Self::sample`], in order, forms the same background (for footage that is
    /// sought rather than read through).
    pub fn background_frames(&self, total: usize) -> Vec<usize> {
        self.background.clip_frames(total)
    }

    /// Pictures kept so far from the first reading of the clip.
    pub fn samples_kept(&self) -> usize {
        self.background.samples_kept()
    }

    /// What to tell the person when the camera seems to have moved in many of the frames searched
    /// so far, or the picture changed all at once somewhere (a cut, the light), else `None`.
    pub fn camera_note(&self) -> Option<String> {
        self.steadiness.note()
    }

    /// Expected object height (pixels) for an object standing at row `y`, if perspective is set.
    fn expected_height(&self, y: f64) -> Option<f64> {
        self.config.perspective(self.height).map(|p| p.height_at(y))
    }

    /// Finds the moving objects in the next picture: `(box, score)` with the score the share of the
    /// box that is foreground. A picture of another size than the detector's is refused.
    pub fn detect(&mut self, pic: &Picture) -> Result<Vec<(BBox, f64)>, Error> {
        self.detect_spread(pic, &InTurn)
    }

    /// [`Self::detect`] with the work in bands run as `spread` says.
    pub fn detect_spread(
        &mut self,
        pic: &Picture,
        spread: &dyn Spread,
    ) -> Result<Vec<(BBox, f64)>, Error> {
        self.check_size(pic)?;
        if !self
            .background
            .ready(pic, self.config.warm_up_frames, spread)
        {
            return Ok(Vec::new());
        }
        self.background
            .foreground(pic, &self.config, &mut self.changed, spread);
        self.steadiness.observe(pic.y, self.width, self.height);
        let blobs = self.blobs(spread);
        let found = self.boxes(blobs);
        let objects: Vec<BBox> = found.iter().map(|(b, _)| *b).collect();
        self.background
            .learn(pic, &objects, &mut self.covered, spread);
        Ok(found)
    }

    /// The blobs of the foreground just marked: each band of rows cleaned into `mask` and its runs
    /// listed, the bands run as `spread` says; then the runs joined across the bands' edges.
    fn blobs(&mut self, spread: &dyn Spread) -> Vec<Blob> {
        let (w, h) = (self.width, self.height);
        if w * h == 0 {
            return Vec::new();
        }
        let rows = band_rows(h, spread.bands());
        let bands = h.div_ceil(rows);
        self.clean_ups.resize_with(bands, CleanUp::default);
        self.band_runs.resize_with(bands, BandRuns::default);
        let changed = &self.changed;
        let work = self.clean_ups.iter_mut().zip(&mut self.band_runs);
        let jobs = (self.mask[..w * h]
            .chunks_mut(rows * w)
            .zip(work)
            .enumerate())
        .map(|(k, (out, (clean_up, runs)))| {
            Box::new(move || {
                mask::clean(changed, out, w, h, k * rows, clean_up);
                label::band_runs(out, w, k * rows, runs);
            }) as Job
        })
        .collect();
        spread.run(jobs);
        label::blobs(&self.band_runs, &mut self.first_runs)
    }

    /// Refuses a picture of another size than the detector's, or with planes too short.
    fn check_size(&self, pic: &Picture) -> Result<(), Error> {
        let n = self.width * self.height;
        let (cw, ch) = Picture::chroma_size(self.width, self.height);
        if pic.width != self.width || pic.height != self.height || pic.y.len() < n {
            return Err(Error::new(
                ErrorKind::Unsuitable,
                format!(
                    "picture is {}x{}, the detector was started for {}x{}",
                    pic.width, pic.height, self.width, self.height
                ),
            ));
        }
        if let Some((u, v)) = pic.uv {
            if u.len() < cw * ch || v.len() < cw * ch {
                return Err(Error::new(
                    ErrorKind::Unsuitable,
                    "chroma planes are shorter than 4:2:0 needs",
                ));
            }
        }
        Ok(())
    }
}
