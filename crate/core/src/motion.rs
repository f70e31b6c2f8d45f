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

use crate::detections::{Detection, Detections};
use crate::geometry::BBox;
use serde::{Deserialize, Serialize};

/// Settings of the detector. Heights are pixels of an upright person (or the objects to count).
/// A settings file is a JSON object with any of these fields (docs/detector-settings.md).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct MotionConfig {
    /// Frames during which the background forms and nothing is reported.
    pub warm_up_frames: u32,
    /// Least difference from the background (grey levels) that can count as foreground.
    pub min_difference: u8,
    /// Foreground also needs a difference above this many times the pixel's usual deviation.
    pub deviation_factor: f32,
    /// A darker pixel with `shadow_low <= Y / background <= shadow_high` and chroma within
    /// `shadow_chroma` of the background's is a shadow.
    pub shadow_low: f32,
    pub shadow_high: f32,
    pub shadow_chroma: u8,
    /// Expected height of an object whose bottom is at the top row and at the bottom row of the
    /// picture; in between it is interpolated. `None`: no perspective rule, only `min_area`.
    pub far_height: Option<f64>,
    pub near_height: Option<f64>,
    /// Least blob area in pixels (after clean-up).
    pub min_area: u32,
    /// Width of one object as a fraction of its expected height; a blob wider than 1.7 times this
    /// with a clear waist in its column profile is split in two.
    pub width_ratio: f64,
    /// Guess each box's class from its shape and size against the expected height
    /// ([`MotionDetector::guess_class`]); needs `far_height` or `near_height`.
    pub guess_class: bool,
    /// Give each box a colour histogram ([`MotionDetector::appearance`]) as its appearance
    /// vector, so the `deepsort` method can use clothes to tell people apart. Off by default: on
    /// the simulator's footage it made the counts worse (BENCHMARKS.md).
    pub appearance: bool,
}

impl Default for MotionConfig {
    fn default() -> Self {
        Self {
            warm_up_frames: 50,
            min_difference: 18,
            deviation_factor: 3.0,
            shadow_low: 0.4,
            shadow_high: 0.93,
            shadow_chroma: 8,
            far_height: None,
            near_height: None,
            min_area: 60,
            width_ratio: 0.35,
            guess_class: true,
            appearance: false,
        }
    }
}

impl MotionConfig {
    /// Reads a settings file's text; unknown or mistyped fields are named in the error.
    pub fn from_json(text: &str) -> Result<MotionConfig, String> {
        let c: MotionConfig = serde_json::from_str(text).map_err(|e| {
            format!("detector settings: {e} (fields are listed in docs/detector-settings.md)")
        })?;
        if !(c.shadow_low > 0.0 && c.shadow_low < c.shadow_high && c.shadow_high <= 1.0) {
            return Err("detector settings: need 0 < shadow_low < shadow_high <= 1".into());
        }
        if !(c.deviation_factor.is_finite() && c.deviation_factor >= 0.0) {
            return Err("detector settings: deviation_factor must be a number >= 0".into());
        }
        for (name, v) in [("far_height", c.far_height), ("near_height", c.near_height)] {
            if v.is_some_and(|h| !(h.is_finite() && h > 0.0)) {
                return Err(format!(
                    "detector settings: {name} must be a height in pixels > 0"
                ));
            }
        }
        if !(c.width_ratio.is_finite() && c.width_ratio > 0.0) {
            return Err("detector settings: width_ratio must be > 0".into());
        }
        Ok(c)
    }
}

/// Length of [`MotionDetector::appearance`] vectors: for the upper and the lower half of a box,
/// 9 colour bins (U and V each below, near and above grey) and 3 brightness bins.
pub const APPEARANCE_DIM: usize = 24;

/// One object found in a picture.
#[derive(Debug, Clone, PartialEq)]
pub struct Found {
    pub bbox: BBox,
    /// The share of the box that is foreground, to three decimals.
    pub score: f64,
    /// [`APPEARANCE_DIM`] values of unit length, when `appearance` is on.
    pub appearance: Option<Vec<f32>>,
}

/// The classes [`MotionDetector::guess_class`] tells apart (trade terms).
pub const GUESSED_CLASSES: [&str; 3] = ["pedestrian", "cyclist", "vehicle"];

/// One picture: luma plane, and the two chroma planes at half size when there is colour.
#[derive(Debug, Clone, Copy)]
pub struct Picture<'a> {
    pub width: usize,
    pub height: usize,
    pub y: &'a [u8],
    pub uv: Option<(&'a [u8], &'a [u8])>,
}

impl<'a> Picture<'a> {
    /// Size of each chroma plane of a 4:2:0 picture (half, rounded up).
    pub fn chroma_size(width: usize, height: usize) -> (usize, usize) {
        (width.div_ceil(2), height.div_ceil(2))
    }

    /// A picture over planar bytes: luma then, when `colour`, the two 4:2:0 chroma planes (as a
    /// YUV4MPEG2 frame holds them). `None` when `bytes` is too short.
    pub fn planar(width: usize, height: usize, bytes: &'a [u8], colour: bool) -> Option<Self> {
        let luma = width * height;
        let (cw, ch) = Self::chroma_size(width, height);
        let chroma = cw * ch;
        let need = if colour { luma + 2 * chroma } else { luma };
        if bytes.len() < need {
            return None;
        }
        Some(Picture {
            width,
            height,
            y: &bytes[..luma],
            uv: colour.then(|| {
                (
                    &bytes[luma..luma + chroma],
                    &bytes[luma + chroma..luma + 2 * chroma],
                )
            }),
        })
    }
}

/// The detector's state: the background model and working buffers, for pictures of one size.
pub struct MotionDetector {
    config: MotionConfig,
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
    mask: Vec<u8>,
    scratch: Vec<u8>,
    labels: Vec<u32>,
}

/// A blob found in one picture, before it becomes a detection.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Blob {
    x0: usize,
    y0: usize,
    x1: usize, // inclusive
    y1: usize, // inclusive
    area: u32,
}

impl Blob {
    fn w(&self) -> usize {
        self.x1 - self.x0 + 1
    }
    fn h(&self) -> usize {
        self.y1 - self.y0 + 1
    }
}

impl MotionDetector {
    pub fn new(config: MotionConfig, width: usize, height: usize) -> MotionDetector {
        let n = width * height;
        let (cw, ch) = Picture::chroma_size(width, height);
        MotionDetector {
            config,
            width,
            height,
            frames_seen: 0,
            bg: Vec::new(),
            dev: vec![4; n],
            bg_u: vec![128; cw * ch],
            bg_v: vec![128; cw * ch],
            fg_run: vec![0; n],
            samples: Vec::new(),
            samples_uv: Vec::new(),
            mask: vec![0; n],
            scratch: vec![0; n],
            labels: vec![0; n],
        }
    }

    /// Expected object height (pixels) for an object standing at row `y`, if perspective is set.
    /// The class of an object with box `b`, guessed from common proportions (not a learned model),
    /// with `h` the expected height of one person whose feet are at the box's bottom:
    /// - a vehicle is wider than it is tall and at least `0.9 h` wide;
    /// - a cyclist (rider and bicycle seen from the side or at an angle) is at least `0.5 h` wide,
    ///   at least `0.45` times as wide as tall, and at least `0.8 h` tall;
    /// - anything else is a pedestrian.
    ///
    /// A cyclist seen head-on looks like a pedestrian, and two people side by side that were not
    /// split look like a cyclist; the tracker's majority vote over a track's boxes evens out some
    /// of this. `None` without an expected height or with `guess_class` off. Indices into
    /// [`GUESSED_CLASSES`].
    pub fn guess_class(&self, b: &BBox) -> Option<u16> {
        if !self.config.guess_class || b.w <= 0.0 || b.h <= 0.0 {
            return None;
        }
        let h = self.expected_height(b.y + b.h)?;
        Some(if b.w >= b.h && b.w >= 0.9 * h {
            2
        } else if b.w >= 0.5 * h && b.w >= 0.45 * b.h && b.h >= 0.8 * h {
            1
        } else {
            0
        })
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

    /// A cheap appearance vector for box `b` of the picture just given to [`Self::detect`]: over
    /// the box's foreground pixels, a histogram of colour (U and V each in three ranges: below,
    /// near and above grey) and of brightness (three ranges), for the upper and the lower half of
    /// the box apart (clothes above and below the waist), each half summing to one, then scaled
    /// to unit length for the cosine distance DeepSORT uses. A picture without colour gives the
    /// brightness bins only.
    pub fn appearance(&self, pic: &Picture, b: &BBox) -> Vec<f32> {
        let mut v = vec![0f32; APPEARANCE_DIM];
        let (cw, _) = Picture::chroma_size(self.width, self.height);
        let clamp = |p: f64, n: usize| (p.max(0.0) as usize).min(n);
        let (x0, x1) = (clamp(b.x, self.width), clamp(b.x + b.w, self.width));
        let (y0, y1) = (clamp(b.y, self.height), clamp(b.y + b.h, self.height));
        let mid = y0 + (y1 - y0) / 2;
        let third = |c: u8| match c {
            0..=117 => 0,
            118..=138 => 1,
            _ => 2,
        };
        for y in y0..y1 {
            let half = if y < mid { 0 } else { APPEARANCE_DIM / 2 };
            for x in x0..x1 {
                let i = y * self.width + x;
                if self.mask.get(i) != Some(&1) {
                    continue;
                }
                v[half + 9 + usize::from(pic.y[i]) * 3 / 256] += 1.0;
                if let Some((u, w)) = pic.uv {
                    let c = (y / 2) * cw + x / 2;
                    v[half + 3 * third(u[c]) + third(w[c])] += 1.0;
                }
            }
        }
        for half in v.chunks_mut(APPEARANCE_DIM / 2) {
            let total: f32 = half[9..].iter().sum();
            if total > 0.0 {
                half.iter_mut().for_each(|x| *x /= total);
            }
        }
        let norm = v.iter().map(|x| x * x).sum::<f32>().sqrt();
        if norm > 0.0 {
            v.iter_mut()
                .for_each(|x| *x = (*x / norm * 1e4).round() / 1e4);
        }
        v
    }

    /// [`Self::detect`], each box with its appearance vector when `appearance` is on.
    pub fn detect_found(&mut self, pic: &Picture) -> Result<Vec<Found>, String> {
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
    pub fn detect(&mut self, pic: &Picture) -> Result<Vec<(BBox, f64)>, String> {
        let n = self.width * self.height;
        let (cw, ch) = Picture::chroma_size(self.width, self.height);
        if pic.width != self.width || pic.height != self.height || pic.y.len() < n {
            return Err(format!(
                "picture is {}x{}, the detector was started for {}x{}",
                pic.width, pic.height, self.width, self.height
            ));
        }
        if let Some((u, v)) = pic.uv {
            if u.len() < cw * ch || v.len() < cw * ch {
                return Err("chroma planes are shorter than 4:2:0 needs".into());
            }
        }
        self.frames_seen += 1;
        let warm_up = self.config.warm_up_frames;
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
            return Ok(Vec::new());
        }
        if self.bg.is_empty() {
            // No warm-up asked for: start from this picture.
            self.samples = vec![pic.y[..n].to_vec()];
            if let Some((u, v)) = pic.uv {
                self.samples_uv = vec![(u[..cw * ch].to_vec(), v[..cw * ch].to_vec())];
            }
            self.form_background(n, cw * ch);
        }
        self.foreground(pic);
        // Clean-up: opening removes specks, closing fills small holes and joins near pixels.
        erode(&mut self.mask, &mut self.scratch, self.width, self.height);
        dilate(&mut self.mask, &mut self.scratch, self.width, self.height);
        dilate(&mut self.mask, &mut self.scratch, self.width, self.height);
        dilate(&mut self.mask, &mut self.scratch, self.width, self.height);
        erode(&mut self.mask, &mut self.scratch, self.width, self.height);
        erode(&mut self.mask, &mut self.scratch, self.width, self.height);
        let blobs = label_components(&self.mask, &mut self.labels, self.width, self.height);
        Ok(self.boxes(blobs))
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

    /// Marks foreground pixels in `mask` and moves the background towards this picture.
    fn foreground(&mut self, pic: &Picture) {
        let c = &self.config;
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
                self.mask[i] = u8::from(fg);
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

    /// Blobs to boxes: size rules, joining fragments of one body, splitting side-by-side pairs.
    fn boxes(&self, blobs: Vec<Blob>) -> Vec<(BBox, f64)> {
        let c = &self.config;
        let mut kept: Vec<Blob> = blobs
            .into_iter()
            .filter(|b| b.area >= c.min_area / 2)
            .collect();
        // Fragments of one body (a head apart from the legs, a body cut by a railing): blobs that
        // overlap horizontally by most of the narrower one and lie within a quarter height.
        let mut merged = true;
        while merged {
            merged = false;
            'outer: for i in 0..kept.len() {
                for j in i + 1..kept.len() {
                    let (a, b) = (kept[i], kept[j]);
                    let overlap = a.x1.min(b.x1) as i64 - a.x0.max(b.x0) as i64 + 1;
                    let narrow = a.w().min(b.w()) as i64;
                    let gap = a.y0.max(b.y0) as i64 - a.y1.min(b.y1) as i64 - 1;
                    let bottom = a.y1.max(b.y1) as f64;
                    let reach = self
                        .expected_height(bottom)
                        .unwrap_or(a.h().max(b.h()) as f64)
                        * 0.25;
                    let joined_h = (a.y1.max(b.y1) - a.y0.min(b.y0) + 1) as f64;
                    let joined_w = (a.x1.max(b.x1) - a.x0.min(b.x0) + 1) as f64;
                    // The joined box must still look like one object.
                    let tall_enough = match self.expected_height(bottom) {
                        Some(h) => joined_h <= 1.3 * h,
                        None => {
                            joined_h <= 1.6 * a.h().max(b.h()) as f64
                                && joined_w <= 1.2 * a.w().max(b.w()) as f64
                        }
                    };
                    // ... and be mostly foreground, so scattered specks never chain into a box.
                    let fill = f64::from(a.area + b.area) / (joined_w * joined_h);
                    if overlap * 10 >= narrow * 6
                        && (gap as f64) <= reach
                        && tall_enough
                        && fill >= 0.3
                    {
                        kept[i] = Blob {
                            x0: a.x0.min(b.x0),
                            y0: a.y0.min(b.y0),
                            x1: a.x1.max(b.x1),
                            y1: a.y1.max(b.y1),
                            area: a.area + b.area,
                        };
                        kept.remove(j);
                        merged = true;
                        break 'outer;
                    }
                }
            }
        }
        let mut out = Vec::new();
        for b in kept {
            for part in self.split(b) {
                let h = part.h() as f64;
                if part.area < c.min_area {
                    continue;
                }
                if let Some(expected) = self.expected_height(part.y1 as f64) {
                    if h < 0.3 * expected || h > 2.5 * expected {
                        continue;
                    }
                }
                // Kept to the three decimals the detections files hold, so boxes found here and
                // boxes read back from `detect`'s output track the same.
                let fill = f64::from(part.area) / (part.w() * part.h()) as f64;
                let score = (fill.clamp(0.05, 1.0) * 1000.0).round() / 1000.0;
                out.push((
                    BBox {
                        x: part.x0 as f64,
                        y: part.y0 as f64,
                        w: part.w() as f64,
                        h,
                    },
                    score,
                ));
            }
        }
        out
    }

    /// A blob as wide as two objects, with a waist in its column profile, becomes two blobs.
    fn split(&self, b: Blob) -> Vec<Blob> {
        let Some(expected) = self.expected_height(b.y1 as f64) else {
            return vec![b];
        };
        let one = expected * self.config.width_ratio;
        if (b.w() as f64) < 1.7 * one || b.w() < 6 {
            return vec![b];
        }
        let mut cols = vec![0u32; b.w()];
        for y in b.y0..=b.y1 {
            let row = &self.mask[y * self.width..(y + 1) * self.width];
            for (k, x) in (b.x0..=b.x1).enumerate() {
                cols[k] += u32::from(row[x]);
            }
        }
        let lo = b.w() / 4;
        let hi = b.w() - b.w() / 4;
        let (cut, waist) = (lo..hi)
            .map(|k| (k, cols[k]))
            .min_by_key(|&(_, v)| v)
            .unwrap_or((b.w() / 2, 0));
        let left_peak = cols[..cut].iter().copied().max().unwrap_or(0);
        let right_peak = cols[cut..].iter().copied().max().unwrap_or(0);
        if f64::from(waist) > 0.6 * f64::from(left_peak.min(right_peak)) {
            return vec![b];
        }
        let part = |x0: usize, x1: usize| -> Option<Blob> {
            let (mut y0, mut y1, mut area) = (usize::MAX, 0, 0u32);
            for y in b.y0..=b.y1 {
                let row = &self.mask[y * self.width + x0..=y * self.width + x1];
                let n: u32 = row.iter().map(|&m| u32::from(m)).sum();
                if n > 0 {
                    y0 = y0.min(y);
                    y1 = y1.max(y);
                    area += n;
                }
            }
            (area > 0).then_some(Blob {
                x0,
                y0,
                x1,
                y1,
                area,
            })
        };
        [part(b.x0, b.x0 + cut - 1), part(b.x0 + cut, b.x1)]
            .into_iter()
            .flatten()
            .flat_map(|p| {
                if p.w() < b.w() {
                    self.split(p)
                } else {
                    vec![p]
                }
            })
            .collect()
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

/// Connected components (8-connected) of a 0/1 mask by two passes with union-find; `labels` gets
/// each pixel's component number (0 = background).
fn label_components(mask: &[u8], labels: &mut [u32], w: usize, h: usize) -> Vec<Blob> {
    let mut parent: Vec<u32> = vec![0];
    fn find(parent: &mut [u32], mut a: u32) -> u32 {
        while parent[a as usize] != a {
            parent[a as usize] = parent[parent[a as usize] as usize];
            a = parent[a as usize];
        }
        a
    }
    for y in 0..h {
        for x in 0..w {
            let i = y * w + x;
            if mask[i] == 0 {
                labels[i] = 0;
                continue;
            }
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
        for x in 0..w {
            let i = y * w + x;
            if labels[i] == 0 {
                continue;
            }
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

/// Planar YUV 4:2:0 (BT.601 full range, as JPEG and YUV4MPEG2 `C420jpeg`) from RGBA pixels, row by
/// row from the top-left, as a browser canvas gives them; chroma is the mean of each 2x2 block.
/// Returns the three planes one after another; `None` when `rgba` is shorter than `4 * w * h`.
pub fn rgba_to_yuv420(rgba: &[u8], width: usize, height: usize) -> Option<Vec<u8>> {
    if rgba.len() < 4 * width * height {
        return None;
    }
    let (cw, ch) = Picture::chroma_size(width, height);
    let mut out = vec![0u8; width * height + 2 * cw * ch];
    let (luma, chroma) = out.split_at_mut(width * height);
    let (u_plane, v_plane) = chroma.split_at_mut(cw * ch);
    for y in 0..height {
        for x in 0..width {
            let p = &rgba[4 * (y * width + x)..][..3];
            let (r, g, b) = (f32::from(p[0]), f32::from(p[1]), f32::from(p[2]));
            luma[y * width + x] = (0.299 * r + 0.587 * g + 0.114 * b)
                .round()
                .clamp(0.0, 255.0) as u8;
        }
    }
    for cy in 0..ch {
        for cx in 0..cw {
            let (mut su, mut sv, mut n) = (0.0f32, 0.0f32, 0.0f32);
            for y in 2 * cy..(2 * cy + 2).min(height) {
                for x in 2 * cx..(2 * cx + 2).min(width) {
                    let p = &rgba[4 * (y * width + x)..][..3];
                    let (r, g, b) = (f32::from(p[0]), f32::from(p[1]), f32::from(p[2]));
                    su += -0.168_736 * r - 0.331_264 * g + 0.5 * b;
                    sv += 0.5 * r - 0.418_688 * g - 0.081_312 * b;
                    n += 1.0;
                }
            }
            u_plane[cy * cw + cx] = (128.0 + su / n).round().clamp(0.0, 255.0) as u8;
            v_plane[cy * cw + cx] = (128.0 + sv / n).round().clamp(0.0, 255.0) as u8;
        }
    }
    Some(out)
}
