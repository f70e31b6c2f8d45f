//! What a reader of rows of text (benchmark text, CSV) keeps from line to line: the line number,
//! the rows and classes read, and the warnings. A file may be read in parts that start at any
//! line ([`super::halves`]), so each part also notes where each class was first named and which
//! warning is the one about scores, for the parts to be merged into the whole file's reading.

use super::{checked_box, finish, DetectionFormat, Detections, ReadReport, Warning, Warnings};
use crate::error::{Error, ErrorKind};
use crate::geometry::BBox;
use std::collections::HashMap;

/// What a reading a piece at a time ([`super::Pieces`], [`super::CsvPieces`]) saw in all.
#[derive(Debug, Clone, PartialEq)]
pub struct PiecesSummary {
    pub rows: usize,
    pub last_frame: u32,
    /// The first few warnings, in file order, and how many rows were passed over in all.
    pub warnings: Vec<Warning>,
    pub skipped_rows: usize,
    /// The highest score of a row read (`f64::MIN` when none was).
    pub highest_score: f64,
}

pub(crate) struct Reading {
    /// The number of the line last read (one before the first line, to begin with).
    pub line: usize,
    /// The rows in file order (not yet sorted by frame), the classes and appearance vectors.
    pub out: Detections,
    class_index: HashMap<String, u16>,
    /// The line where each class of `out.classes` was first named.
    pub class_lines: Vec<usize>,
    pub warnings: Warnings,
    /// The greatest frame of a row so far, and whether a row's frame came before an earlier's.
    pub last_frame: u32,
    pub out_of_order: bool,
    /// The highest score of a row read so far.
    pub highest_score: f64,
}

impl Reading {
    /// A reading whose first line is `first_line` (1-based).
    pub fn new(first_line: usize) -> Self {
        Self {
            line: first_line.saturating_sub(1),
            out: Detections::default(),
            class_index: HashMap::new(),
            class_lines: Vec::new(),
            warnings: Warnings::new(),
            last_frame: 0,
            out_of_order: false,
            highest_score: f64::MIN,
        }
    }

    /// The index of the class named on the current line, numbering a new name.
    pub fn class(&mut self, name: &str) -> Result<u16, Error> {
        self.class_at(name, self.line)
    }

    /// The index of a class first named on `line`, numbering a new name.
    pub fn class_at(&mut self, name: &str, line: usize) -> Result<u16, Error> {
        let known = self.out.classes.len();
        let class = self.out.class_on_line(&mut self.class_index, name, line)?;
        if self.out.classes.len() > known {
            self.class_lines.push(line);
        }
        Ok(class)
    }

    /// Notes the frame of a row read.
    pub fn note_frame(&mut self, frame: u32) {
        self.out_of_order |= frame < self.last_frame;
        self.last_frame = self.last_frame.max(frame);
    }

    /// [`checked_box`] on the current line.
    pub fn checked_box(&mut self, b: BBox, w_column: usize) -> Result<Option<BBox>, Error> {
        checked_box(b, self.line, w_column, &mut self.warnings)
    }

    /// Warns once about a row carrying an object id (the row is kept).
    pub fn note_id(&mut self, id: f64) {
        self.warnings.note_id(id, self.line);
    }

    /// Warns once about a score outside 0..1 (the row is kept).
    pub fn note_score(&mut self, score: f64) {
        self.highest_score = self.highest_score.max(score);
        self.warnings.note_score(score, Some(self.line), 0);
    }

    /// Warns once about a score of 0 before a class that looks like its decimals, on a row of
    /// `columns` columns (see [`Warnings::note_comma`]; the row is kept).
    pub fn note_comma(&mut self, score: f64, class: i64, columns: usize) {
        self.warnings.note_comma(score, class, columns, self.line);
    }

    /// Reads a comment line: the footage's length it may record (`# footage_frames: N`, written
    /// with boxes found in footage; at most [`crate::limits::MAX_FOOTAGE_FRAMES`], else passed
    /// over as any comment).
    pub fn note_comment(&mut self, line: &str) {
        let length = line
            .strip_prefix(super::write::FOOTAGE_FRAMES_COMMENT)
            .map(str::trim)
            .filter(|n| n.bytes().all(|b| b.is_ascii_digit()))
            .and_then(|n| n.parse::<u32>().ok())
            .filter(|&n| n as usize <= crate::limits::MAX_FOOTAGE_FRAMES);
        if let Some(n) = length {
            self.out.footage_frames = self.out.footage_frames.max(n);
        }
    }

    /// Notes whether the text just read ends inside a row (see [`Warnings::note_end`]).
    pub fn note_end(&mut self, text: &str) {
        self.warnings.note_end(text, self.line);
    }

    /// The report of a whole file read in one part, or `error` if the reading stopped at one.
    pub fn report(
        self,
        format: DetectionFormat,
        error: Option<Error>,
    ) -> Result<ReadReport, Error> {
        match error {
            Some(e) => Err(e),
            None => finish(self.out, format, self.warnings, !self.out_of_order),
        }
    }

    /// The totals of a reading a piece at a time that gave out `rows` rows, or the whole-file
    /// reader's error for a file without a detection row.
    pub fn summary(self, rows: usize, format: DetectionFormat) -> Result<PiecesSummary, Error> {
        if rows == 0 && self.warnings.count == 0 {
            return Err(Error::new(
                ErrorKind::Empty,
                format!("the file ({format}) has no detection rows"),
            ));
        }
        Ok(PiecesSummary {
            rows,
            last_frame: self.last_frame,
            skipped_rows: self.warnings.count,
            warnings: self.warnings.into_kept(),
            highest_score: self.highest_score,
        })
    }
}
