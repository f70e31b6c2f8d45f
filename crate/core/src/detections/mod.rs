//! Readers for detection files: the benchmark text format, CSV with a header, and the JSON array of
//! detection results. The format is recognised from the content, not the file name.
//!
//! Every reader takes the whole file as bytes and returns [`Detections`] sorted by frame, with a list
//! of warnings for rows it had to pass over (each counted), or an [`Error`] naming the line and
//! column and saying what to fix. Boxes are pixels, top-left x/y + width/height; frames are 1-based.

mod benchmark;
mod csv;
mod gaps;
mod halves;
mod json;
mod notes;
mod perspective;
mod reading;
mod write;

pub use benchmark::Pieces;
pub use csv::CsvPieces;
pub use halves::{cut_in_two, cut_near, merge, Cut, Part};
pub use perspective::Perspective;
pub use reading::PiecesSummary;
pub use write::{to_benchmark_text, to_csv, to_file_text};

use crate::error::{Error, ErrorKind};
use crate::geometry::BBox;
use crate::limits::MIN_BOX_SIDE;
use crate::text::{as_text, split_fields};
use std::collections::HashMap;
use std::fmt;

/// One detected object in one frame.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Detection {
    /// Frame number, 1-based.
    pub frame: u32,
    /// Box in pixels, top-left x/y + width/height.
    pub bbox: BBox,
    /// Detector confidence, usually in `[0, 1]`.
    pub score: f64,
    /// Index into [`Detections::classes`], when the file names a class.
    pub class: Option<u16>,
    /// Index of this row's vector in [`Detections::embedding`], when the file carries embeddings.
    pub embedding: Option<u32>,
}

/// All detections of a file, sorted by frame (stable: rows of one frame keep their file order).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Detections {
    pub rows: Vec<Detection>,
    /// Class names in order of first appearance; numeric classes keep their digits as the name.
    pub classes: Vec<String>,
    /// Length of each appearance vector; 0 when the file carries none.
    pub embedding_dim: usize,
    /// All appearance vectors, one after another.
    pub embeddings: Vec<f32>,
    /// The footage's length in frames when the boxes were found in it (its last frames may hold
    /// none), or read from a file of them that records it (`# footage_frames: N`); 0 otherwise,
    /// the length then being the last frame with a box.
    pub footage_frames: u32,
}

impl Detections {
    /// The appearance vector of a detection, if it has one.
    pub fn embedding(&self, d: &Detection) -> Option<&[f32]> {
        let i = d.embedding? as usize * self.embedding_dim;
        self.embeddings.get(i..i + self.embedding_dim)
    }

    /// Name of a class index.
    pub fn class_name(&self, class: Option<u16>) -> Option<&str> {
        class
            .and_then(|c| self.classes.get(c as usize))
            .map(String::as_str)
    }

    /// Last frame that has a detection (0 when there are none).
    pub fn last_frame(&self) -> u32 {
        self.rows.last().map_or(0, |d| d.frame)
    }

    /// The frames the detections span: the footage's length when they were found in it, else
    /// their last frame with a box.
    pub fn length(&self) -> u32 {
        self.last_frame().max(self.footage_frames)
    }

    /// Detections grouped by frame: `(frame, rows)` in increasing frame order; frames without rows are
    /// not listed.
    pub fn by_frame(&self) -> impl Iterator<Item = (u32, &[Detection])> {
        self.rows
            .chunk_by(|a, b| a.frame == b.frame)
            .map(|chunk| (chunk[0].frame, chunk))
    }

    /// The class index of a class named on `line`, numbering a new name.
    pub(crate) fn class_on_line(
        &mut self,
        index: &mut HashMap<String, u16>,
        name: &str,
        line: usize,
    ) -> Result<u16, Error> {
        self.intern_class(index, name)
            .ok_or_else(|| too_many_classes(line))
    }

    /// Stores an appearance vector and returns its index; `None` for an empty one.
    pub(crate) fn push_embedding(&mut self, v: &[f32]) -> Option<u32> {
        if v.is_empty() {
            return None;
        }
        let index = (self.embeddings.len() / v.len()) as u32;
        self.embeddings.extend_from_slice(v);
        Some(index)
    }

    pub(crate) fn intern_class(
        &mut self,
        index: &mut HashMap<String, u16>,
        name: &str,
    ) -> Option<u16> {
        if let Some(&i) = index.get(name) {
            return Some(i);
        }
        let i = u16::try_from(self.classes.len()).ok()?;
        self.classes.push(name.to_string());
        index.insert(name.to_string(), i);
        Some(i)
    }

    fn sort_by_frame(&mut self) {
        if !self.rows.is_sorted_by_key(|d| d.frame) {
            self.rows.sort_by_key(|d| d.frame);
        }
    }
}

/// The formats the readers recognise.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum DetectionFormat {
    /// `frame,id,x,y,w,h,score[,class…]`, no header.
    BenchmarkText,
    /// CSV whose header names `frame,x,y,w,h,score` (and optionally `class`, `e0,e1,…`).
    CsvWithHeader,
    /// JSON array of `{image_id, category_id, bbox: [x,y,w,h], score}`.
    JsonResults,
}

impl fmt::Display for DetectionFormat {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Self::BenchmarkText => "benchmark text (frame,id,x,y,w,h,score)",
            Self::CsvWithHeader => "CSV with header",
            Self::JsonResults => "JSON detection results",
        })
    }
}

/// A row the reader passed over, and why.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Warning {
    /// 1-based line, when known (JSON warnings name the element in the message instead).
    pub line: Option<usize>,
    pub message: String,
}

/// What a reader returns: the detections, the format it recognised, and what it passed over.
#[derive(Debug, Clone, PartialEq)]
pub struct ReadReport {
    pub detections: Detections,
    pub format: DetectionFormat,
    /// The first few warnings: the one about a last row perhaps cut short first, then the others
    /// in file order, then how many rows were passed over in all when not all are listed.
    pub warnings: Vec<Warning>,
    /// How many rows were passed over in all (may exceed `warnings.len()`).
    pub skipped_rows: usize,
}

/// At most this many warnings are kept (and the one about the file's end, when given, and a last
/// one saying how many rows were passed over in all when not all are listed); the rest are only
/// counted.
pub use crate::limits::MAX_WARNINGS;

pub(crate) struct Warnings {
    kept: Vec<Warning>,
    count: usize,
    /// How many of the `count` rows passed over have a warning in `kept`.
    listed: usize,
    /// Where in `kept` the one warning about scores outside 0..1 is, once given.
    score_at: Option<usize>,
    /// Where in `kept` the one warning about object ids in benchmark text is, once given.
    id_at: Option<usize>,
    /// Where in `kept` the one warning about a score perhaps written with a decimal comma is.
    comma_at: Option<usize>,
    /// The warning about a last row with no line break after it (given after all others).
    open_end: Option<Warning>,
}

impl Warnings {
    pub(crate) fn new() -> Self {
        Self {
            kept: Vec::new(),
            count: 0,
            listed: 0,
            score_at: None,
            id_at: None,
            comma_at: None,
            open_end: None,
        }
    }

    /// The warnings kept: the one about the file's end first (a row that may be incomplete matters
    /// more than any row passed over, and a list cut short for the page's room must not hide it),
    /// then the others in file order, then, when not every row passed over is listed, how many
    /// were in all.
    pub(crate) fn into_kept(self) -> Vec<Warning> {
        let mut kept: Vec<Warning> = self.open_end.into_iter().collect();
        kept.extend(self.kept);
        if self.count > self.listed {
            kept.push(Warning {
                line: None,
                message: format!(
                    "{} passed over in all (the first {} listed)",
                    self.count, self.listed
                ),
            });
        }
        kept
    }

    /// Notes whether `text`, the file's text read so far from its last piece, ends inside a row:
    /// a file cut short (copied or saved in part) can end inside a field and still read (a class
    /// `pedestria`), so such a last row is named, kept, and not counted as passed over.
    pub(crate) fn note_end(&mut self, text: &str, line: usize) {
        let Some(last) = text.rsplit('\n').next().filter(|_| !text.is_empty()) else {
            return;
        };
        let row = crate::text::trim(last);
        self.open_end = (!row.is_empty() && !row.starts_with('#')).then(|| {
            let shown: String = row.chars().take(60).collect();
            let more = if shown.len() < row.len() { "…" } else { "" };
            Warning {
                line: Some(line),
                message: format!(
                    "the file ends without a line break after its last row (\"{shown}{more}\"): \
                     if the file was cut short (copied or saved only in part), that row may be \
                     incomplete (a class or a number cut off); check it against the source"
                ),
            }
        });
    }

    /// A warning about the file, not about a row passed over (not counted as one).
    pub(crate) fn note(&mut self, line: Option<usize>, message: impl Into<String>) {
        self.kept.push(Warning {
            line,
            message: message.into(),
        });
    }

    pub(crate) fn push(&mut self, line: Option<usize>, message: impl Into<String>) {
        self.count += 1;
        if self.kept.len() < MAX_WARNINGS {
            self.listed += 1;
            self.kept.push(Warning {
                line,
                message: message.into(),
            });
        }
    }

    /// Warns about the first row of benchmark text that carries an object id (column 2 not -1):
    /// tracks or a ground truth given as detections, read as detections and tracked again.
    pub(crate) fn note_id(&mut self, id: f64, line: usize) {
        if id >= 0.0 && self.id_at.is_none() {
            self.id_at = Some(self.kept.len());
            self.kept.push(Warning {
                line: Some(line),
                message: format!(
                    "column 2 holds an object id ({id}), not -1: this looks like tracks or a ground \
                     truth, read here as detections and tracked again (to count tracks as they are: \
                     `throughline count FILE --plan PLAN`) (first such row; rows kept)"
                ),
            });
        }
    }

    /// Warns about the first row of benchmark text whose score is 0 and whose class looks like
    /// the score's decimals: 10 or more on a row of eight columns, 100 or more on a longer one
    /// (ground truth's rows of nine carry classes up to 12 after a 0 or 1). Most likely a score
    /// written with a decimal comma (`0,878` read as score 0 and class 878), which the tracker's
    /// `min_score` then drops without a word.
    pub(crate) fn note_comma(&mut self, score: f64, class: i64, columns: usize, line: usize) {
        let like_decimals = class >= 100 || (class >= 10 && columns == 8);
        if score == 0.0 && like_decimals && self.comma_at.is_none() {
            self.comma_at = Some(self.kept.len());
            self.kept.push(Warning {
                line: Some(line),
                message: format!(
                    "score 0 then {class} in the eighth column, read as class {class}: if the score \
                     is written with a decimal comma (`0,{class}` for `0.{class}`), write decimals \
                     with a full stop, or every such box scores 0 and is not tracked (first such \
                     row; rows kept)"
                ),
            });
        }
    }

    /// Warns about the first score outside 0..1, on `line` (text) or in element `element` (JSON,
    /// `line` None).
    pub(crate) fn note_score(&mut self, score: f64, line: Option<usize>, element: usize) {
        if !(0.0..=1.0).contains(&score) && self.score_at.is_none() {
            self.score_at = Some(self.kept.len());
            let (place, what) = match line {
                Some(_) => (String::new(), "row"),
                None => (format!("element {element}: "), "element"),
            };
            // A score above 1 and up to 100 may be a percentage; one below 0 is not.
            let hint = if score > 1.0 && score <= 100.0 {
                " (a percentage?)"
            } else {
                ""
            };
            // Not a skipped row: counted as a warning but the row is kept.
            self.kept.push(Warning {
                line,
                message: format!(
                    "{place}score {score} is outside 0..1{hint}; score thresholds assume 0..1 \
                     (first such {what}; all kept)"
                ),
            });
        }
    }
}

/// Reads detections from a whole file, recognising the format from its content.
pub fn read_detections(bytes: &[u8]) -> Result<ReadReport, Error> {
    let text = as_text(bytes)?;
    match recognise(text)? {
        DetectionFormat::JsonResults => json::read(text),
        DetectionFormat::CsvWithHeader => csv::read(text),
        DetectionFormat::BenchmarkText => benchmark::read(text),
    }
}

/// The format of a file that starts with `text` (its whole text, or its start up to the end of
/// its first line that is not blank or a comment: nothing after that line is looked at).
fn recognise(text: &str) -> Result<DetectionFormat, Error> {
    let body = text.trim_start();
    if body.is_empty() {
        return Err(Error::new(
            ErrorKind::Empty,
            "the file is empty: expected detections as benchmark text (frame,id,x,y,w,h,score), \
             CSV with a header, or a JSON array",
        ));
    }
    if body.starts_with('[') || body.starts_with('{') {
        return Ok(DetectionFormat::JsonResults);
    }
    let first = first_row(text).unwrap_or("");
    let is_header = split_fields(first)
        .iter()
        .any(|f| !f.is_empty() && f.parse::<f64>().is_err());
    Ok(match is_header {
        true => DetectionFormat::CsvWithHeader,
        false => DetectionFormat::BenchmarkText,
    })
}

/// The first line that is neither blank nor a comment, trimmed.
fn first_row(text: &str) -> Option<&str> {
    text.lines()
        .map(str::trim)
        .find(|l| !l.is_empty() && !l.starts_with('#'))
}

/// Whether a file that starts with `first` (its first bytes, cut at a line end) is benchmark
/// text, which can be read a piece at a time ([`Pieces`]); `None` when [`read_detections`] would
/// take it otherwise or refuse it. The byte-order mark, if any, is dropped from the returned text.
pub fn benchmark_text_start(first: &[u8]) -> Option<&str> {
    let text = as_text(first).ok()?;
    first_row(text)?;
    (recognise(text).ok()? == DetectionFormat::BenchmarkText).then_some(text)
}

/// Whether a file that starts with `first` (its first bytes, cut at a line end) is CSV with a
/// header whose rows can be read a piece at a time ([`CsvPieces`]), and the length of its
/// appearance vectors; `None` when [`read_detections`] would take it otherwise or refuse its
/// header.
pub fn csv_start(first: &[u8]) -> Option<usize> {
    let text = as_text(first).ok()?;
    let header = first_row(text)?;
    (recognise(text).ok()? == DetectionFormat::CsvWithHeader).then_some(())?;
    let fields = split_fields(header);
    csv::Header::new(&fields, 1).ok().map(|h| h.embedding_dim())
}

/// The error for a box of line `line` with a negative width or height (its width in column
/// `w_column`, 1-based), naming which, its value and its column; none for other boxes.
pub(crate) fn negative_side(b: &BBox, line: usize, w_column: usize) -> Option<Error> {
    [(b.w, "w", w_column), (b.h, "h", w_column + 1)]
        .into_iter()
        .find(|(v, ..)| *v < 0.0)
        .map(|(v, name, col)| {
            Error::new(
                ErrorKind::NegativeSize,
                format!(
                    "box {name} is {v}: sizes must not be negative (boxes are top-left x,y then \
                     width,height, not two corners)"
                ),
            )
            .at(line, Some(col))
        })
}

/// Checks a box; `Ok(None)` (with a warning) for a zero-size box, an error for a negative size.
pub(crate) fn checked_box(
    b: BBox,
    line: usize,
    w_column: usize,
    warnings: &mut Warnings,
) -> Result<Option<BBox>, Error> {
    // The usual box, decided at once: sides of at least a hundredth of a pixel are not negative.
    if b.w >= MIN_BOX_SIDE && b.h >= MIN_BOX_SIDE {
        return Ok(Some(b));
    }
    if let Some(e) = negative_side(&b, line, w_column) {
        return Err(e);
    }
    if b.w < MIN_BOX_SIDE || b.h < MIN_BOX_SIDE {
        warnings.push(
            Some(line),
            "box with zero width or height (under a hundredth of a pixel) passed over",
        );
        return Ok(None);
    }
    Ok(Some(b))
}

/// Lines in a text: room for one row each, so a large file's rows are held without slack (a
/// bound from the file's size, not from a number written in it).
pub(crate) fn line_count(text: &str) -> usize {
    newlines(text.as_bytes()) + 1
}

/// How many `\n` bytes there are, counted a block at a time into a byte (a block of 192 holds
/// at most 192), which compilers turn into a few vector instructions a block.
pub(crate) fn newlines(bytes: &[u8]) -> usize {
    bytes
        .chunks(192)
        .map(|block| usize::from(block.iter().fold(0u8, |n, &b| n + u8::from(b == b'\n'))))
        .sum()
}

/// The report of a reading: an error for a file without rows, else the rows sorted by frame
/// (`in_order`: known to be sorted already).
pub(crate) fn finish(
    mut detections: Detections,
    format: DetectionFormat,
    warnings: Warnings,
    in_order: bool,
) -> Result<ReadReport, Error> {
    if detections.rows.is_empty() && warnings.count == 0 {
        return Err(Error::new(
            ErrorKind::Empty,
            format!("the file ({format}) has no detection rows"),
        ));
    }
    if !in_order {
        detections.sort_by_frame();
    }
    detections.rows.shrink_to_fit();
    Ok(ReadReport {
        detections,
        format,
        skipped_rows: warnings.count,
        warnings: warnings.into_kept(),
    })
}

fn too_many_classes(line: usize) -> Error {
    Error::new(
        ErrorKind::TooManyClasses,
        "more than 65535 different classes: the class column looks like something else",
    )
    .at(line, None)
}
