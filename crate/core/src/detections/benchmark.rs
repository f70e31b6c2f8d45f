//! The benchmark text format: `frame,id,x,y,w,h,score[,class,…]`, one detection per line, no
//! header; id -1 for plain detections; a positive eighth column is a class number.
//!
//! [`read`] takes a whole file; [`Pieces`] takes it a piece at a time (whole lines) for files too
//! large to hold, with the same rows, warnings and errors line for line.

use super::{
    checked_box, finish, note_score, Detection, DetectionFormat, Detections, ReadReport, Warning,
    Warnings,
};
use crate::error::{Error, ErrorKind};
use crate::geometry::BBox;
use crate::text::{frame_number, number};
use std::collections::HashMap;

const BENCHMARK_COLUMNS: [&str; 7] = ["frame", "id", "x", "y", "w", "h", "score"];

pub(super) fn read(text: &str) -> Result<ReadReport, Error> {
    let mut lines = Lines::new();
    lines.out.rows.reserve(super::line_count(text));
    for raw in text.lines() {
        if let Some(d) = lines.next_row(raw)? {
            lines.out.rows.push(d);
        }
    }
    finish(lines.out, DetectionFormat::BenchmarkText, lines.warnings)
}

/// The reader's state between lines: the line number, classes seen, warnings.
struct Lines {
    line: usize,
    /// Rows are not kept here by [`Pieces`]; its class names are.
    out: Detections,
    class_index: HashMap<String, u16>,
    warnings: Warnings,
    warned_score: bool,
}

impl Lines {
    fn new() -> Self {
        Self {
            line: 0,
            out: Detections::default(),
            class_index: HashMap::new(),
            warnings: Warnings::new(),
            warned_score: false,
        }
    }

    /// The detection on the next line, if it holds one (blank lines, comments and passed-over
    /// rows give `None`).
    fn next_row(&mut self, raw: &str) -> Result<Option<Detection>, Error> {
        self.line += 1;
        let line = self.line;
        let l = crate::text::trim(raw);
        if l.is_empty() || l.starts_with('#') {
            return Ok(None);
        }
        let (cut, count) = cut_fields(l);
        let fields = &cut[..count.min(cut.len())];
        if fields.len() < 7 {
            return Err(Error::new(
                ErrorKind::MissingColumn,
                format!(
                    "{count} columns, but the benchmark text format needs at least 7: frame,id,x,y,w,h,score"
                ),
            )
            .at(line, None));
        }
        let mut v = [0.0; 7];
        for (k, name) in BENCHMARK_COLUMNS.iter().enumerate() {
            v[k] = number(fields[k], name, line, k + 1)?;
        }
        let frame = frame_number(v[0], line, 1)?;
        let Some(bbox) = checked_box(
            BBox::new(v[2], v[3], v[4], v[5]),
            line,
            5,
            &mut self.warnings,
        )?
        else {
            return Ok(None);
        };
        note_score(v[6], line, &mut self.warned_score, &mut self.warnings);
        // Column 8 holds a class in ground-truth style files; -1 (or a world coordinate) means none.
        let class = match fields.get(7).map(|f| f.parse::<i64>()) {
            Some(Ok(c)) if c > 0 => Some(self.out.class_on_line(
                &mut self.class_index,
                &c.to_string(),
                line,
            )?),
            _ => None,
        };
        Ok(Some(Detection {
            frame,
            bbox,
            score: v[6],
            class,
            embedding: None,
        }))
    }
}

/// Benchmark text has no quoting: fields are cut in place in one pass over the line's bytes,
/// without a vector per line (the first 8, and how many there are). Cutting at ASCII commas keeps
/// every piece valid UTF-8.
fn cut_fields(l: &str) -> ([&str; 8], usize) {
    let mut cut = [""; 8];
    let mut count = 0;
    let mut start = 0;
    for (k, &b) in l
        .as_bytes()
        .iter()
        .chain(std::iter::once(&b','))
        .enumerate()
    {
        if b == b',' {
            if count < cut.len() {
                cut[count] = crate::text::trim(l.get(start..k).unwrap_or(""));
            }
            count += 1;
            start = k + 1;
        }
    }
    (cut, count)
}

/// Benchmark text read a piece at a time, for a file too large to hold: give it whole lines in
/// file order ([`Pieces::read`]); rows come out as read. The rows, warnings and errors are those
/// of reading the whole file at once as long as frames never go back ([`Pieces::out_of_order`]
/// says when one did: the caller then reads the whole file instead, which sorts them).
pub struct Pieces {
    lines: Lines,
    rows: usize,
    last_frame: u32,
    out_of_order: bool,
}

/// What [`Pieces`] saw in all.
#[derive(Debug, Clone, PartialEq)]
pub struct PiecesSummary {
    pub rows: usize,
    pub last_frame: u32,
    /// The first few warnings, in file order, and how many rows were passed over in all.
    pub warnings: Vec<Warning>,
    pub skipped_rows: usize,
}

impl Default for Pieces {
    fn default() -> Self {
        Self::new()
    }
}

impl Pieces {
    pub fn new() -> Self {
        Self {
            lines: Lines::new(),
            rows: 0,
            last_frame: 0,
            out_of_order: false,
        }
    }

    /// Reads the rows on the lines of `text` (whole lines, the next ones of the file), replacing
    /// the contents of `rows`.
    pub fn read(&mut self, text: &str, rows: &mut Vec<Detection>) -> Result<(), Error> {
        rows.clear();
        for raw in text.lines() {
            if let Some(d) = self.lines.next_row(raw)? {
                self.out_of_order |= d.frame < self.last_frame;
                self.last_frame = self.last_frame.max(d.frame);
                rows.push(d);
            }
        }
        self.rows += rows.len();
        Ok(())
    }

    /// Whether a row's frame came before an earlier row's.
    pub fn out_of_order(&self) -> bool {
        self.out_of_order
    }

    /// The classes named so far, in order of first appearance (the detections' class indices).
    pub fn classes(&self) -> &Detections {
        &self.lines.out
    }

    /// The totals, or the whole-file reader's error for a file without a detection row.
    pub fn finish(self) -> Result<PiecesSummary, Error> {
        if self.rows == 0 && self.lines.warnings.count == 0 {
            return Err(Error::new(
                ErrorKind::Empty,
                format!(
                    "the {} file has no detection rows",
                    DetectionFormat::BenchmarkText
                ),
            ));
        }
        Ok(PiecesSummary {
            rows: self.rows,
            last_frame: self.last_frame,
            warnings: self.lines.warnings.kept,
            skipped_rows: self.lines.warnings.count,
        })
    }
}
