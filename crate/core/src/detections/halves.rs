//! A detections file read in two parts at once (an adapter runs each part on a thread of its
//! own): the file is cut at a line end ([`cut_in_two`]), each part read from its first line's
//! number ([`Cut::read_first`], [`Cut::read_second`]) and the parts merged ([`merge`]) into
//! exactly what reading the whole file gives: the same rows in the same order, classes numbered
//! in order of first appearance, the same warnings and counts, and the same first error.

use super::reading::Reading;
use super::{benchmark, csv, finish, first_row, recognise, DetectionFormat, ReadReport, Warnings};
use super::{newlines, Detection, MAX_WARNINGS};
use crate::error::Error;
use crate::text::{as_text, looks_binary, part_as_text, split_fields, without_bom};

/// Where a file is cut, and what the second part needs to know of the first.
#[derive(Debug, Clone)]
pub struct Cut {
    /// The byte where the second part starts (the first byte of a line).
    pub at: usize,
    /// The 1-based number of that line.
    pub line: usize,
    format: DetectionFormat,
    /// The first line that is neither blank nor a comment: a CSV file's header.
    header: String,
}

/// What one part read: its reading so far and the error that stopped it, if any.
pub struct Part {
    format: DetectionFormat,
    reading: Option<Reading>,
    /// A part that is not UTF-8: the whole file is refused for it before any row is read.
    not_text: Option<Error>,
    error: Option<Error>,
}

/// [`cut_near`] two fifths into the file: the first part's thread also makes room for the
/// second part's rows while the other reads ([`Cut::read_first`]), so the parts take about as
/// long.
pub fn cut_in_two(bytes: &[u8]) -> Option<Cut> {
    cut_near(bytes, bytes.len() / 5 * 2)
}

/// A cut after the first line end at or after byte `near`, and after the file's first row (or
/// header). `None` when the file is better read whole: JSON, no text at its start (the whole
/// reader then says why), no row, or nothing after the cut.
pub fn cut_near(bytes: &[u8], near: usize) -> Option<Cut> {
    if looks_binary(bytes) {
        return None;
    }
    let bom = bytes.len() - without_bom(bytes).len();
    let first_row_end = first_row_end(bytes, bom)?;
    let start = as_text(&bytes[..first_row_end]).ok()?;
    let format = recognise(start).ok()?;
    let header = first_row(start)?.to_string();
    if format == DetectionFormat::JsonResults {
        return None;
    }
    let from = near.max(first_row_end).max(1) - 1;
    let at = from + bytes.get(from..)?.iter().position(|&b| b == b'\n')? + 1;
    if at >= bytes.len() {
        return None;
    }
    let line = newlines(&bytes[..at]) + 1;
    Some(Cut {
        at,
        line,
        format,
        header,
    })
}

/// Where the line ends (after its `\n`) that holds the first thing that is neither blank nor a
/// comment; `None` when there is none, it is the last line, or a line before it is not UTF-8.
fn first_row_end(bytes: &[u8], from: usize) -> Option<usize> {
    let mut at = from;
    loop {
        let rest = bytes.get(at..)?;
        let end = at + rest.iter().position(|&b| b == b'\n')? + 1;
        let line = std::str::from_utf8(&bytes[at..end]).ok()?.trim();
        if !line.is_empty() && !line.starts_with('#') {
            return Some(end);
        }
        at = end;
    }
}

impl Cut {
    /// Reads the first part (the file's start up to the cut), and makes room after its rows for
    /// the second part's.
    pub fn read_first(&self, bytes: &[u8]) -> Part {
        let text = bytes.get(..self.at).ok_or_else(shorter);
        let mut part = match text.and_then(as_text) {
            Ok(text) => self.read(text, 1, None),
            Err(e) => return self.part(None, Some(e), None),
        };
        if let (Some(r), None) = (&mut part.reading, &part.error) {
            make_room(
                &mut r.out.rows,
                bytes.get(self.at..).map_or(0, newlines) + 1,
            );
        }
        part
    }

    /// Reads the second part (from the cut to the end), numbering its lines from the cut's.
    pub fn read_second(&self, bytes: &[u8]) -> Part {
        let text = bytes.get(self.at..).ok_or_else(shorter);
        let text = match text.and_then(|t| part_as_text(t, self.line)) {
            Ok(t) => t,
            Err(e) => return self.part(None, Some(e), None),
        };
        let header = match self.format {
            DetectionFormat::CsvWithHeader => {
                match csv::Header::new(&split_fields(&self.header), 1) {
                    Ok(h) => Some(h),
                    // The first part stops at the same header first.
                    Err(e) => return self.part(None, None, Some(e)),
                }
            }
            _ => None,
        };
        self.read(text, self.line, header)
    }

    fn read(&self, text: &str, first_line: usize, header: Option<csv::Header>) -> Part {
        let read = match self.format {
            DetectionFormat::CsvWithHeader => csv::read_part(text, first_line, header),
            _ => benchmark::read_part(text, first_line),
        };
        self.part(Some(read.0), None, read.1)
    }

    fn part(
        &self,
        reading: Option<Reading>,
        not_text: Option<Error>,
        error: Option<Error>,
    ) -> Part {
        Part {
            format: self.format,
            reading,
            not_text,
            error,
        }
    }
}

/// The two parts as one reading of the whole file. The first error in file order wins, as in
/// the whole reader: bytes that are not UTF-8 (refused before any row), then the first part's,
/// then too many classes (counted over both parts), then the second part's.
pub fn merge(first: Part, second: Part) -> Result<ReadReport, Error> {
    if let Some(e) = first.not_text.or(second.not_text) {
        return Err(e);
    }
    if let Some(e) = first.error {
        return Err(e);
    }
    let format = first.format;
    let (Some(mut whole), Some(mut rest)) = (first.reading, second.reading) else {
        return Err(second.error.unwrap_or_else(shorter));
    };
    let mut classes = Vec::with_capacity(rest.out.classes.len());
    for (name, &line) in rest.out.classes.iter().zip(&rest.class_lines) {
        classes.push(whole.class_at(name, line)?);
    }
    if let Some(e) = second.error {
        return Err(e);
    }
    let dim = whole.out.embedding_dim.max(1);
    let vectors = u32::try_from(whole.out.embeddings.len() / dim).unwrap_or(u32::MAX);
    whole.out.embeddings.extend_from_slice(&rest.out.embeddings);
    if !classes.is_empty() || vectors > 0 {
        for d in &mut rest.out.rows {
            d.class = d.class.and_then(|c| classes.get(usize::from(c)).copied());
            d.embedding = d.embedding.map(|e| e.saturating_add(vectors));
        }
    }
    let in_order = !whole.out_of_order
        && !rest.out_of_order
        && rest
            .out
            .rows
            .first()
            .is_none_or(|d| d.frame >= whole.last_frame);
    whole.out.footage_frames = whole.out.footage_frames.max(rest.out.footage_frames);
    whole.out.rows.extend_from_slice(&rest.out.rows);
    drop(rest.out.rows);
    merge_warnings(&mut whole.warnings, rest.warnings);
    finish(whole.out, format, whole.warnings, in_order)
}

/// The second part's warnings after the first's, kept and counted as one reading keeps them:
/// one warning about scores, one about object ids and one about decimal commas in all, at most [`MAX_WARNINGS`] of the
/// others.
fn merge_warnings(first: &mut Warnings, second: Warnings) {
    first.count += second.count;
    first.open_end = second.open_end;
    for (i, w) in second.kept.into_iter().enumerate() {
        let once = if second.score_at == Some(i) {
            Some(&mut first.score_at)
        } else if second.id_at == Some(i) {
            Some(&mut first.id_at)
        } else if second.comma_at == Some(i) {
            Some(&mut first.comma_at)
        } else {
            None
        };
        match once {
            Some(at) if at.is_none() => {
                *at = Some(first.kept.len());
                first.kept.push(w);
            }
            Some(_) => {}
            None if first.kept.len() < MAX_WARNINGS => {
                first.listed += 1;
                first.kept.push(w);
            }
            None => {}
        }
    }
}

/// For bytes other than those the cut was made in.
fn shorter() -> Error {
    Error::new(
        crate::error::ErrorKind::Empty,
        "the file is shorter than where it was cut: read it again whole",
    )
}

/// Room for `more` rows after `rows`, written once so that the memory is in place (the system
/// gives it on first touch) before the merge copies the second part's rows into it: done by the
/// first part's thread while the other still reads, not by the merge after both.
fn make_room(rows: &mut Vec<Detection>, more: usize) {
    let len = rows.len();
    let blank = Detection {
        frame: 0,
        bbox: crate::geometry::BBox::new(0.0, 0.0, 0.0, 0.0),
        score: 0.0,
        class: None,
        embedding: None,
    };
    rows.resize(len + more, blank);
    rows.truncate(len);
}
