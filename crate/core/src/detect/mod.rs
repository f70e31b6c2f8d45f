//! Moving-object detection for a fixed camera, with no learned model: an adaptive per-pixel
//! background, foreground where a pixel differs from it by more than its own usual variation, shadows
//! taken out, the mask cleaned, and the connected blobs turned into boxes the trackers take.
//!
//! Background: the approximate running median of McFarlane & Schofield (1995) — each frame the
//! background value moves one grey level towards the pixel (faster while it forms) — with a running
//! estimate of each pixel's mean absolute deviation, the same way, for its threshold. Pixels under a
//! moving object update 16 times more slowly, so a person who stops is absorbed only after a while
//! (about 255 × 16 / 25 s at 25 fps for the largest difference).
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
mod mask;
mod picture;

pub use classify::{APPEARANCE_DIM, GUESSED_CLASSES};
pub use config::DetectorConfig;
pub use picture::{rgba_to_yuv420, Picture};

use crate::detections::{Detection, Detections};
use crate::error::{Error, ErrorKind};
use crate::geometry::BBox;
use background::Background;

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
    mask: Vec<u8>,
    scratch: Vec<u8>,
    labels: Vec<u32>,
}

impl Detector {
    pub fn new(config: DetectorConfig, width: usize, height: usize) -> Detector {
        let n = width * height;
        Detector {
            config,
            width,
            height,
            background: Background::new(width, height),
            mask: vec![0; n],
            scratch: vec![0; n],
            labels: vec![0; n],
        }
    }

    /// The boxes found in each picture (in the order given; frames numbered from 1) as
    /// [`Detections`] for the trackers, each with its guessed class where there is one. Class
    /// names are listed in order of first appearance, as a detections file's reader lists them, so
    /// the detections written out and read back are the same.
    pub fn detections_from(
        &self,
        found_per_frame: impl IntoIterator<Item = Vec<Found>>,
    ) -> Detections {
        let mut out = Detections::default();
        let mut index: [Option<u16>; GUESSED_CLASSES.len()] = [None; GUESSED_CLASSES.len()];
        for (k, found) in found_per_frame.into_iter().enumerate() {
            for f in found {
                let class = self.guess_class(&f.bbox).map(|g| {
                    *index[g as usize].get_or_insert_with(|| {
                        out.classes.push(GUESSED_CLASSES[g as usize].to_string());
                        (out.classes.len() - 1) as u16
                    })
                });
                let embedding = f.appearance.map(|v| {
                    out.embedding_dim = v.len();
                    out.embeddings.extend(v);
                    (out.embeddings.len() / out.embedding_dim - 1) as u32
                });
                out.rows.push(Detection {
                    frame: k as u32 + 1,
                    bbox: f.bbox,
                    score: f.score,
                    class,
                    embedding,
                });
            }
        }
        out
    }

    /// [`Self::detect`], each box with its appearance vector when `appearance` is on.
    pub fn detect_found(&mut self, pic: &Picture) -> Result<Vec<Found>, Error> {
        let boxes = self.detect(pic)?;
        Ok(boxes
            .into_iter()
            .map(|(bbox, score)| Found {
                appearance: self.config.appearance.then(|| self.appearance(pic, &bbox)),
                bbox,
                score,
            })
            .collect())
    }

    /// Expected object height (pixels) for an object standing at row `y`, if perspective is set.
    fn expected_height(&self, y: f64) -> Option<f64> {
        let c = &self.config;
        match (c.far_height, c.near_height) {
            (Some(f), Some(n)) => Some(f + (n - f) * (y / self.height.max(1) as f64)),
            (Some(h), None) | (None, Some(h)) => Some(h),
            (None, None) => None,
        }
    }

    /// Finds the moving objects in the next picture: `(box, score)` with the score the share of the
    /// box that is foreground. A picture of another size than the detector's is refused.
    pub fn detect(&mut self, pic: &Picture) -> Result<Vec<(BBox, f64)>, Error> {
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
        if !self.background.ready(pic, self.config.warm_up_frames) {
            return Ok(Vec::new());
        }
        self.background
            .foreground(pic, &self.config, &mut self.mask);
        // Clean-up: opening removes specks, closing fills small holes and joins near pixels.
        mask::erode(&mut self.mask, &mut self.scratch, self.width, self.height);
        mask::dilate(&mut self.mask, &mut self.scratch, self.width, self.height);
        mask::dilate(&mut self.mask, &mut self.scratch, self.width, self.height);
        mask::dilate(&mut self.mask, &mut self.scratch, self.width, self.height);
        mask::erode(&mut self.mask, &mut self.scratch, self.width, self.height);
        mask::erode(&mut self.mask, &mut self.scratch, self.width, self.height);
        let blobs = mask::label_components(&self.mask, &mut self.labels, self.width, self.height);
        Ok(self.boxes(blobs))
    }
}
