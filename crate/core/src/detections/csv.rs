//! CSV with a header naming `frame,x,y,w,h,score`, optionally `class` and appearance columns
//! `e0,e1,…` (in any order; quoted fields allowed).

use super::reading::{PiecesSummary, Reading};
use super::{Detection, DetectionFormat, Detections, ReadReport};
use crate::error::{likely_meant, Error, ErrorKind};
use crate::geometry::BBox;
use crate::limits::in_range;
use crate::text::{frame_number, line_at, number, plain_decimal_prefix, split_fields_into};

struct CsvColumns {
    frame: usize,
    x: usize,
    y: usize,
    w: usize,
    h: usize,
    score: usize,
    class: Option<usize>,
    /// A column not read whose name is likely `class` misspelt (`clas`), when there is no `class`.
    class_misspelt: Option<String>,
    embedding: Vec<usize>,
    count: usize,
}

/// The names of the columns read (appearance columns aside).
const COLUMNS: [&str; 7] = ["frame", "x", "y", "w", "h", "score", "class"];

/// What a header missing a required column may have got wrong, from its look: another separator,
/// corners for a box, long names.
fn header_hint(header: &[&str], names: &[String]) -> &'static str {
    let any = |these: &[&str]| names.iter().any(|n| these.contains(&n.as_str()));
    let other = if header.len() == 1 {
        crate::text::separator_hint(header[0])
    } else {
        ""
    };
    if !other.is_empty() {
        other
    } else if any(&["x2", "x_max", "xmax"]) {
        " (boxes must be top-left x,y and width,height: compute w = x2 - x1 and h = y2 - y1)"
    } else if any(&["width", "height", "conf", "confidence"]) {
        " (the columns are named short: `w` for the width, `h` for the height, `score` for the confidence)"
    } else {
        ""
    }
}

fn csv_columns(header: &[&str], line: usize) -> Result<CsvColumns, Error> {
    let names: Vec<String> = header
        .iter()
        .map(|h| h.trim().to_ascii_lowercase())
        .collect();
    let find = |name: &str| names.iter().position(|n| n == name);
    let hint = header_hint(header, &names);
    let class = find("class");
    // A name written for one of the columns read, misspelt (`scroe`, `clas`).
    let misspelt = |name: &str| {
        names
            .iter()
            .position(|n| !COLUMNS.contains(&n.as_str()) && likely_meant(n, &[name]).is_some())
    };
    let required = |name: &str| {
        find(name).ok_or_else(|| {
            let meant = misspelt(name).map_or(String::new(), |i| {
                format!(" (is `{}` meant to be `{name}`?)", header[i].trim())
            });
            Error::new(
                ErrorKind::BadHeader,
                format!(
                    "the header has no `{name}` column{meant}: it must name frame,x,y,w,h,score \
                     (class and e0,e1,… optional); found: {}{hint}",
                    header.join(",")
                ),
            )
            .at(line, None)
        })
    };
    let mut embedding = Vec::new();
    while let Some(i) = find(&format!("e{}", embedding.len())) {
        embedding.push(i);
    }
    let stray = names.iter().position(|n| {
        n.len() > 1
            && n.starts_with('e')
            && n[1..].parse::<usize>().is_ok_and(|k| k >= embedding.len())
    });
    if let Some(i) = stray {
        return Err(Error::new(
            ErrorKind::BadHeader,
            format!(
                "embedding column `{}` found, but embedding columns must run e0,e1,e2,… without gaps \
                 (the last unbroken one is e{})",
                names[i],
                embedding.len() as i64 - 1
            ),
        )
        .at(line, Some(i + 1)));
    }
    Ok(CsvColumns {
        frame: required("frame")?,
        x: required("x")?,
        y: required("y")?,
        w: required("w")?,
        h: required("h")?,
        score: required("score")?,
        class,
        class_misspelt: class
            .is_none()
            .then(|| misspelt("class").map(|i| header[i].trim().to_string()))
            .flatten(),
        embedding,
        count: names.len(),
    })
}

pub(super) fn read(text: &str) -> Result<ReadReport, Error> {
    let (r, error) = read_part(text, 1, None);
    r.report(DetectionFormat::CsvWithHeader, error)
}

/// Reads the lines of `text`, the part of a file from line `first_line` on (after the header
/// when its `columns` are given): the rows in file order, and the first error, which stopped the
/// reading (what was read before it is kept: its classes are needed to merge parts).
pub(super) fn read_part(
    text: &str,
    first_line: usize,
    columns: Option<Header>,
) -> (Reading, Option<Error>) {
    let mut lines = CsvLines::new(first_line, columns);
    lines.r.out.rows.reserve(super::line_count(text));
    let read = lines.read(text).and_then(|()| match lines.columns {
        Some(_) => Ok(()),
        None => Err(Error::new(
            ErrorKind::Empty,
            "the CSV file has a header but no rows",
        )),
    });
    (lines.r, read.err())
}

/// CSV read a piece at a time, for a file too large to hold (`throughline track -o OUT.txt`):
/// give it whole lines in file order ([`CsvPieces::read`]). Each batch it gives out holds whole
/// frames with their own appearance vectors (numbered from 0 in the batch), so that a batch can
/// be tracked and dropped: the last frame read is kept until a later line shows it has ended.
/// The rows, warnings and errors are those of reading the whole file at once as long as frames
/// never go back ([`CsvPieces::out_of_order`] says when one did).
pub struct CsvPieces {
    lines: CsvLines,
    /// Rows read so far (given out or kept).
    rows: usize,
}

impl Default for CsvPieces {
    fn default() -> Self {
        Self::new()
    }
}

impl CsvPieces {
    pub fn new() -> Self {
        Self {
            lines: CsvLines::new(1, None),
            rows: 0,
        }
    }

    /// Reads the rows on the lines of `text` (whole lines, the next ones of the file) and puts
    /// in `batch`, in place of what it held, the rows of every frame before the last one read,
    /// their vectors and the vectors' length; the class names are [`Self::classes`]'.
    pub fn read(&mut self, text: &str, batch: &mut Detections) -> Result<(), Error> {
        let kept = self.lines.r.out.rows.len();
        self.lines.read(text)?;
        let rows = &self.lines.r.out.rows;
        self.rows += rows.len() - kept;
        let last = rows.last().map(|d| d.frame);
        let last_starts = rows
            .iter()
            .rposition(|d| Some(d.frame) != last)
            .map_or(0, |k| k + 1);
        self.give_out(last_starts, batch);
        Ok(())
    }

    /// Whether a row's frame came before an earlier row's.
    pub fn out_of_order(&self) -> bool {
        self.lines.r.out_of_order
    }

    /// The classes named so far, in order of first appearance (the rows' class indices).
    pub fn classes(&self) -> &Detections {
        &self.lines.r.out
    }

    /// The length of the appearance vectors, once the header is read (0: none).
    pub fn embedding_dim(&self) -> Option<usize> {
        self.lines.columns.as_ref().map(Header::embedding_dim)
    }

    /// Ends the file: the last frame's rows into `batch` as [`Self::read`] gives out rows, and
    /// the totals, or the whole-file reader's error for a file without rows.
    pub fn finish(mut self, batch: &mut Detections) -> Result<PiecesSummary, Error> {
        self.give_out(self.lines.r.out.rows.len(), batch);
        if self.lines.columns.is_none() {
            return Err(Error::new(
                ErrorKind::Empty,
                "the CSV file has a header but no rows",
            ));
        }
        self.lines
            .r
            .summary(self.rows, DetectionFormat::CsvWithHeader)
    }

    /// Moves the rows before `end` (and their vectors) into `batch`; the rest stay, their vectors
    /// numbered again from 0.
    fn give_out(&mut self, end: usize, batch: &mut Detections) {
        let out = &mut self.lines.r.out;
        batch.classes.clear();
        batch.embedding_dim = out.embedding_dim;
        batch.rows.clear();
        batch.embeddings.clear();
        std::mem::swap(&mut batch.rows, &mut out.rows);
        std::mem::swap(&mut batch.embeddings, &mut out.embeddings);
        let dim = out.embedding_dim;
        let first_kept = batch.rows[end..].iter().find_map(|d| d.embedding);
        for mut d in batch.rows.drain(end..) {
            if let Some(e) = d.embedding {
                let at = e as usize * dim;
                d.embedding = out.push_embedding(&batch.embeddings[at..at + dim]);
            }
            out.rows.push(d);
        }
        if let Some(e) = first_kept {
            batch.embeddings.truncate(e as usize * dim);
        }
    }
}

/// What each column of a row is, for the quick reading of a line.
#[derive(Clone, Copy)]
enum Role {
    /// frame, x, y, w, h, score: the place of the value in [`Values`].
    Number(usize),
    /// The appearance vector's value of this index.
    Embedding(usize),
    Class,
    /// A column the reader does not use.
    Other,
}

/// The header's columns, and what is made of them once for every row.
pub(super) struct Header {
    cols: CsvColumns,
    roles: Vec<Role>,
    /// The appearance columns' names for messages, made once rather than for every value.
    embedding_names: Vec<String>,
}

impl Header {
    /// The columns named by a header line (its fields), or the error naming what is missing.
    pub(super) fn new(fields: &[&str], line: usize) -> Result<Header, Error> {
        let cols = csv_columns(fields, line)?;
        let mut roles = vec![Role::Other; cols.count];
        let numbers = [cols.frame, cols.x, cols.y, cols.w, cols.h, cols.score];
        // Distinct names are at distinct columns, so no column has two roles.
        if let Some(c) = cols.class {
            roles[c] = Role::Class;
        }
        for (k, &c) in cols.embedding.iter().enumerate() {
            roles[c] = Role::Embedding(k);
        }
        for (k, &c) in numbers.iter().enumerate() {
            roles[c] = Role::Number(k);
        }
        let embedding_names = (0..cols.embedding.len()).map(|k| format!("e{k}")).collect();
        Ok(Header {
            cols,
            roles,
            embedding_names,
        })
    }

    /// The length of the appearance vectors the header names (0: none).
    pub(super) fn embedding_dim(&self) -> usize {
        self.cols.embedding.len()
    }
}

/// The numbers of one row: frame, x, y, w, h, score (the appearance vector is kept apart).
type Values = [f64; 6];

/// The reader's state between lines.
struct CsvLines {
    r: Reading,
    /// `None` until the header is read.
    columns: Option<Header>,
    vector: Vec<f32>,
}

impl CsvLines {
    /// A reading from line `first_line`, of a part of the file after its header when `columns`
    /// are given.
    fn new(first_line: usize, columns: Option<Header>) -> Self {
        let mut lines = Self {
            r: Reading::new(first_line),
            columns: None,
            vector: Vec::new(),
        };
        if let Some(h) = columns {
            lines.set_header(h);
        }
        lines
    }

    fn set_header(&mut self, h: Header) {
        self.r.out.embedding_dim = h.cols.embedding.len();
        self.columns = Some(h);
    }

    /// Reads the lines of `text`. The usual line is read by [`quick_row`]; any other (a
    /// comment, a blank line, quotes, white space, another way of writing a number, a mistake)
    /// by [`CsvLines::next_row`], so that what is read and every message are the general
    /// reading's.
    fn read(&mut self, text: &str) -> Result<(), Error> {
        let bytes = text.as_bytes();
        let mut fields = Vec::new();
        let mut at = 0;
        while let Some(rest) = bytes.get(at..).filter(|r| !r.is_empty()) {
            if let Some(h) = &self.columns {
                if let Some((values, class, taken)) = quick_row(h, rest, &mut self.vector) {
                    self.r.line += 1;
                    let class = text.get(at + class.0..at + class.1).unwrap_or_default();
                    at += taken;
                    self.row(values, class)?;
                    continue;
                }
            }
            let (raw, taken) = line_at(text, at);
            at += taken;
            self.next_row(raw, &mut fields)?;
        }
        self.r.note_end(text);
        Ok(())
    }

    /// The next line read field by field: the header, a row, or nothing (a comment or a blank
    /// line).
    fn next_row<'a>(&mut self, raw: &'a str, fields: &mut Vec<&'a str>) -> Result<(), Error> {
        self.r.line += 1;
        let line = self.r.line;
        let l = crate::text::trim(raw);
        if l.is_empty() || l.starts_with('#') {
            self.r.note_comment(l);
            return Ok(());
        }
        split_fields_into(l, fields);
        let Some(h) = &self.columns else {
            let h = Header::new(fields, line)?;
            if let Some(name) = &h.cols.class_misspelt {
                self.r.warnings.note(
                    Some(line),
                    format!(
                        "column `{name}` is not read: is it meant to be `class`? Without a `class` \
                         column every box is unclassified"
                    ),
                );
            }
            self.set_header(h);
            return Ok(());
        };
        let cols = &h.cols;
        if fields.len() != cols.count {
            return Err(crate::text::wrong_field_count(
                fields.len(),
                cols.count,
                l,
                line,
            ));
        }
        let get = |k: usize, name: &str| number(fields[k], name, line, k + 1);
        let frame = get(cols.frame, "frame")?;
        frame_number(frame, line, cols.frame + 1)?;
        let numbers = [
            frame,
            get(cols.x, "x")?,
            get(cols.y, "y")?,
            get(cols.w, "w")?,
            get(cols.h, "h")?,
            get(cols.score, "score")?,
        ];
        self.vector.clear();
        for (&c, name) in cols.embedding.iter().zip(&h.embedding_names) {
            self.vector.push(get(c, name)? as f32);
        }
        let class = cols.class.map_or("", |c| fields[c]);
        self.row(numbers, class)
    }

    /// The row of the current line from its numbers, the appearance vector in `self.vector` and
    /// the class column's text (empty for none).
    fn row(&mut self, v: Values, class: &str) -> Result<(), Error> {
        let Some(h) = &self.columns else {
            return Ok(());
        };
        let [frame, x, y, w, hh, score] = v;
        let frame = frame_number(frame, self.r.line, h.cols.frame + 1)?;
        let w_column = h.cols.w + 1;
        let Some(bbox) = self.r.checked_box(BBox::new(x, y, w, hh), w_column)? else {
            return Ok(());
        };
        self.r.note_score(score);
        let class = match class {
            "" => None,
            name => Some(self.r.class(name)?),
        };
        let embedding = self.r.out.push_embedding(&self.vector);
        self.r.note_frame(frame);
        self.r.out.rows.push(Detection {
            frame,
            bbox,
            score,
            class,
            embedding,
        });
        Ok(())
    }
}

/// The usual row, read in one pass over its bytes: the header's number of fields between single
/// commas, each number a plain decimal (as [`plain_decimal_prefix`] reads it, within
/// [`in_range`]) and every other field without quotes or white space at its ends. Gives the
/// numbers (the appearance vector into `vector`), where the class's text is and the bytes taken
/// up to and including the line's end; `None` for any other line, left to the general reading.
fn quick_row(
    h: &Header,
    b: &[u8],
    vector: &mut Vec<f32>,
) -> Option<(Values, (usize, usize), usize)> {
    if b.first() == Some(&b'#') {
        return None;
    }
    let mut numbers = [0.0; 6];
    let mut class = (0, 0);
    vector.clear();
    vector.resize(h.cols.embedding.len(), 0.0);
    let mut at = 0;
    for (k, role) in h.roles.iter().enumerate() {
        if k > 0 {
            (b.get(at) == Some(&b',')).then_some(())?;
            at += 1;
        }
        let field = b.get(at..)?;
        let taken = match *role {
            Role::Number(i) => {
                let (x, taken) = plain_decimal_prefix(field)?;
                numbers[i] = in_range(x).then_some(x)?;
                taken
            }
            Role::Embedding(i) => {
                let (x, taken) = plain_decimal_prefix(field)?;
                vector[i] = in_range(x).then_some(x)? as f32;
                taken
            }
            Role::Class => {
                let taken = plain_text(field)?;
                class = (at, at + taken);
                taken
            }
            Role::Other => plain_text(field)?,
        };
        at += taken;
    }
    let end = match b.get(at) {
        None => at,
        Some(b'\n') => at + 1,
        Some(b'\r') if b.get(at + 1) == Some(&b'\n') => at + 2,
        _ => return None,
    };
    Some((numbers, class, end))
}

/// The length of a field of text at the start of `b` that the general reading takes as it is:
/// no quotes, and nothing to trim (empty, or a visible ASCII character at either end).
fn plain_text(b: &[u8]) -> Option<usize> {
    let n = b
        .iter()
        .position(|&c| matches!(c, b',' | b'\n' | b'\r' | b'"'))
        .unwrap_or(b.len());
    let visible = |c: Option<&u8>| c.is_some_and(|c| (b'!'..=b'~').contains(c));
    let field = &b[..n];
    let plain = field.is_empty() || (visible(field.first()) && visible(field.last()));
    (b.get(n) != Some(&b'"') && plain).then_some(n)
}
