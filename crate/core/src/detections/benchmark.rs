//! The benchmark text format: `frame,id,x,y,w,h,score[,class,…]`, one detection per line, no
//! header; id -1 for plain detections; a positive eighth column is a class number.
//!
//! [`read`] takes a whole file; [`Pieces`] takes it a piece at a time (whole lines) for files too
//! large to hold, with the same rows, warnings and errors line for line.

use super::reading::{PiecesSummary, Reading};
use super::{Detection, DetectionFormat, Detections, ReadReport};
use crate::error::{Error, ErrorKind};
use crate::geometry::BBox;
use crate::limits::in_range;
use crate::text::{frame_number, line_at, number, plain_decimal_prefix};

const BENCHMARK_COLUMNS: [&str; 7] = ["frame", "id", "x", "y", "w", "h", "score"];
/// Columns a row of benchmark text may have: the seven, then a class or the three world
/// coordinates. More is a mistake (most often decimal commas), never read as shifted values.
const MOST_COLUMNS: usize = 10;

pub(super) fn read(text: &str) -> Result<ReadReport, Error> {
    let (r, error) = read_part(text, 1);
    r.report(DetectionFormat::BenchmarkText, error)
}

/// Reads the lines of `text`, the part of a file from line `first_line` on: the rows in file
/// order, and the first error, which stopped the reading (what was read before it is kept: its
/// classes are needed to merge parts).
pub(super) fn read_part(text: &str, first_line: usize) -> (Reading, Option<Error>) {
    let mut lines = Lines::new(first_line);
    let mut rows = Vec::with_capacity(super::line_count(text));
    let read = lines.read(text, &mut rows);
    lines.r.out.rows = rows;
    (lines.r, read.err())
}

/// The reader's state between lines: the line number, classes seen, warnings.
struct Lines {
    /// Rows are not kept here: [`read`] and [`Pieces`] take them as they come.
    r: Reading,
}

impl Lines {
    /// A reading from line `first_line` (1-based) on.
    fn new(first_line: usize) -> Self {
        Self {
            r: Reading::new(first_line),
        }
    }

    /// Reads the rows on the lines of `text` (whole lines, the next ones of the file) onto
    /// `rows`. The usual line is read by [`quick_row`]; any other (a comment, a blank line, white
    /// space, another way of writing a number, a mistake) by [`Lines::next_row`], so that what is
    /// read and every message are the general reading's.
    fn read(&mut self, text: &str, rows: &mut Vec<Detection>) -> Result<(), Error> {
        let bytes = text.as_bytes();
        let mut at = 0;
        while let Some(rest) = bytes.get(at..).filter(|r| !r.is_empty()) {
            let row = match quick_row(rest) {
                Some((values, class, columns, taken)) => {
                    at += taken;
                    self.r.line += 1;
                    self.row(values, class, columns)?
                }
                None => {
                    let (raw, taken) = line_at(text, at);
                    at += taken;
                    self.next_row(raw)?
                }
            };
            if let Some(d) = row {
                self.r.note_frame(d.frame);
                rows.push(d);
            }
        }
        self.r.note_end(text);
        Ok(())
    }

    /// The detection on the next line, if it holds one (blank lines, comments and passed-over
    /// rows give `None`).
    fn next_row(&mut self, raw: &str) -> Result<Option<Detection>, Error> {
        self.r.line += 1;
        let line = self.r.line;
        let l = crate::text::trim(raw);
        if l.is_empty() || l.starts_with('#') {
            self.r.note_comment(l);
            return Ok(None);
        }
        let (cut, count) = cut_fields(l);
        let fields = &cut[..count.min(cut.len())];
        if fields.len() < 7 {
            return Err(Error::new(
                ErrorKind::MissingColumn,
                format!(
                    "{count} column{}, but the benchmark text format needs at least 7: frame,id,x,y,w,h,score{}",
                    if count == 1 { "" } else { "s" },
                    if count == 1 { crate::text::separator_hint(l) } else { "" }
                ),
            )
            .at(line, None));
        }
        // Empty fields ending the line (`…,-1,`) are no columns.
        let columns = 1 + commas_before_empty_end(l.as_bytes());
        if columns > MOST_COLUMNS {
            return Err(Error::new(
                ErrorKind::WrongColumnCount,
                format!(
                    "{columns} columns, but the benchmark text format has at most \
                     {MOST_COLUMNS} (frame,id,x,y,w,h,score, then a class or x,y,z): numbers \
                     written with a decimal comma (`143,57` for `143.57`) make more, so write \
                     decimals with a full stop; or leave out the columns after the tenth"
                ),
            )
            .at(line, None));
        }
        let mut v = [0.0; 7];
        for (k, name) in BENCHMARK_COLUMNS.iter().enumerate() {
            v[k] = number(fields[k], name, line, k + 1)?;
        }
        self.row(
            v,
            fields.get(7).and_then(|f| f.parse::<i64>().ok()),
            columns,
        )
    }

    /// The detection of the current line from its seven numbers and the eighth column's whole
    /// number, if any; the line has `columns` columns.
    fn row(
        &mut self,
        v: [f64; 7],
        class: Option<i64>,
        columns: usize,
    ) -> Result<Option<Detection>, Error> {
        let frame = frame_number(v[0], self.r.line, 1)?;
        let Some(bbox) = self.r.checked_box(BBox::new(v[2], v[3], v[4], v[5]), 5)? else {
            return Ok(None);
        };
        self.r.note_score(v[6]);
        self.r.note_id(v[1]);
        if let Some(c) = class {
            self.r.note_comma(v[6], c, columns);
        }
        // Column 8 holds a class in ground-truth style files; -1 (or a world coordinate) means none.
        let class = match class {
            Some(c) if c > 0 => Some(self.r.class(&c.to_string())?),
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

/// The usual line, read in one pass over its bytes: seven plain decimals (as
/// [`plain_decimal_prefix`] reads them, within [`in_range`]) between single commas, then
/// perhaps a comma and a whole number (`[-]digits`) ending the line or followed by a comma and
/// anything. Gives the seven numbers, the whole number, the line's columns, and the bytes taken
/// up to and including the line's end; `None` for any other line, left to the general reading.
fn quick_row(b: &[u8]) -> Option<([f64; 7], Option<i64>, usize, usize)> {
    let mut v = [0.0; 7];
    let mut at = 0;
    for (k, slot) in v.iter_mut().enumerate() {
        let (x, taken) = plain_decimal_prefix(b.get(at..)?)?;
        if !in_range(x) {
            return None;
        }
        *slot = x;
        at += taken;
        if k < 6 {
            (b.get(at) == Some(&b',')).then_some(())?;
            at += 1;
        }
    }
    if let Some(end) = line_end(b, at) {
        return Some((v, None, 7, end));
    }
    (b.get(at) == Some(&b',')).then_some(())?;
    at += 1;
    let (class, taken) = whole_number_prefix(b.get(at..)?)?;
    at += taken;
    if let Some(end) = line_end(b, at) {
        return Some((v, Some(class), 8, end));
    }
    (b.get(at) == Some(&b',')).then_some(())?;
    let rest = b.get(at..)?;
    let end = rest.iter().position(|&c| c == b'\n').unwrap_or(rest.len());
    // Eight columns so far, and one more after each comma: more than the format has is left to
    // the general reading, which names the mistake.
    let columns = 8 + commas_before_empty_end(&rest[..end]);
    if columns > MOST_COLUMNS {
        return None;
    }
    Some((v, Some(class), columns, at + (end + 1).min(rest.len())))
}

/// The commas of a line (or of its end past some column), leaving out the empty fields that end
/// it (`…,-1,`, spaces, a `\r`): those are no columns.
fn commas_before_empty_end(line: &[u8]) -> usize {
    let empty = line
        .iter()
        .rev()
        .take_while(|&&c| matches!(c, b',' | b' ' | b'\t' | b'\r'))
        .count();
    line[..line.len() - empty]
        .iter()
        .filter(|&&c| c == b',')
        .count()
}

/// Where the next line starts when `b` has a line end (`\n`, `\r\n`, or the end of the text)
/// at `at`.
fn line_end(b: &[u8], at: usize) -> Option<usize> {
    match b.get(at) {
        None => Some(at),
        Some(b'\n') => Some(at + 1),
        Some(b'\r') if b.get(at + 1) == Some(&b'\n') => Some(at + 2),
        _ => None,
    }
}

/// `[-]digits` (1 to 18 digits: no `i64` overflows) at the start of `b`, as `str::parse::<i64>`
/// reads it, and how many bytes it takes.
fn whole_number_prefix(b: &[u8]) -> Option<(i64, usize)> {
    let negative = b.first() == Some(&b'-');
    let start = usize::from(negative);
    let digits = b
        .get(start..)?
        .iter()
        .take(19)
        .take_while(|c| c.is_ascii_digit())
        .count();
    if digits == 0 || digits > 18 {
        return None;
    }
    let n = b[start..start + digits]
        .iter()
        .fold(0i64, |n, &c| n * 10 + i64::from(c - b'0'));
    Some((if negative { -n } else { n }, start + digits))
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
}

impl Default for Pieces {
    fn default() -> Self {
        Self::new()
    }
}

impl Pieces {
    pub fn new() -> Self {
        Self {
            lines: Lines::new(1),
            rows: 0,
        }
    }

    /// Reads the rows on the lines of `text` (whole lines, the next ones of the file), replacing
    /// the contents of `rows`.
    pub fn read(&mut self, text: &str, rows: &mut Vec<Detection>) -> Result<(), Error> {
        rows.clear();
        self.lines.read(text, rows)?;
        self.rows += rows.len();
        Ok(())
    }

    /// Whether a row's frame came before an earlier row's.
    pub fn out_of_order(&self) -> bool {
        self.lines.r.out_of_order
    }

    /// The classes named so far, in order of first appearance (the detections' class indices).
    pub fn classes(&self) -> &Detections {
        &self.lines.r.out
    }

    /// The totals, or the whole-file reader's error for a file without a detection row.
    pub fn finish(self) -> Result<PiecesSummary, Error> {
        self.lines
            .r
            .summary(self.rows, DetectionFormat::BenchmarkText)
    }
}
