//! `throughline track DETECTIONS -o OUT.txt` on benchmark text or CSV: the file is read, tracked
//! and written a piece at a time, so memory follows the tracks alive at once, not the length of the
//! recording (a day of one camera is millions of frames), and three threads share the work:
//! reading and parsing, the tracker, writing. The output is the same bytes as reading the whole
//! file first (`track/stream.rs` in the core says why).
//!
//! Whenever the piecewise way cannot promise that, it gives up before anything is put in place
//! and the caller reads the whole file instead: JSON, frames out of order (the whole
//! reader sorts them), a settings or method problem, any mistake in the file (the whole
//! reader's message then names it, as it always has), a pipe (it could not be read again) or an
//! output that is not a regular file (what was written could not be taken back).

use crate::files::{read_settings, Failure};
use crate::output::Outputs;
use crate::progress;
use indicatif::ProgressBar;
use std::io::Read;
use std::path::Path;
use std::sync::mpsc::{sync_channel, Receiver, SyncSender};
use throughline_core::detections::PiecesSummary;
use throughline_core::detections::{self, CsvPieces, Detection, DetectionFormat, Pieces};
use throughline_core::track::files::BenchmarkLines;
use throughline_core::track::stream::{Drained, InOrder, StreamEnd, StreamTracker};
use throughline_core::{pipeline, Detections, Method, TrackerConfig};

/// Bytes read at a time: a sixteenth of the file, so that even a small file keeps the three
/// stages busy at once, between these bounds. A line longer than a piece sends the file to the
/// whole reader.
const PIECE: usize = 1 << 20;
const LEAST_PIECE: usize = 64 << 10;

/// What a piecewise run read and found.
pub struct Streamed {
    pub format: DetectionFormat,
    pub read: PiecesSummary,
    pub end: StreamEnd,
    pub config: TrackerConfig,
}

/// How to track: what `--method`, `--config` and `--quiet` said.
pub struct How<'a> {
    pub method: Option<Method>,
    pub config: Option<&'a Path>,
    pub quiet: bool,
}

/// Tracks `path` into `output` piece by piece; `Ok(None)` when the whole reader must do it.
pub fn track_streamed(path: &Path, how: How, output: &Path) -> Result<Option<Streamed>, Failure> {
    let special = std::fs::metadata(output).is_ok_and(|m| !m.is_file());
    let Ok(mut file) = std::fs::File::open(path) else {
        return Ok(None);
    };
    // A pipe could not be read again by the whole reader if this gave up half way.
    let Some(size) = file
        .metadata()
        .ok()
        .filter(|m| m.is_file())
        .map(|m| m.len())
    else {
        return Ok(None);
    };
    let mut reader = PieceReader {
        size,
        ..PieceReader::default()
    };
    if special || !reader.fill(&mut file) {
        return Ok(None);
    }
    let Some(parser) = Parser::for_start(reader.whole_lines()) else {
        return Ok(None);
    };
    let format = parser.format();
    let settings = read_settings(how.config)?;
    // The vectors' length decides the method when none is named, as the whole reading's would.
    let ctx = Detections {
        embedding_dim: parser.embedding_dim(),
        ..Detections::default()
    };
    let Ok(config) =
        pipeline::tracker_config(&ctx, how.method, settings.as_ref().map(|s| s.1.as_str()))
    else {
        return Ok(None);
    };
    let Ok(tracker) = StreamTracker::new(&config, &ctx) else {
        return Ok(None);
    };
    let bar = progress::bar(
        how.quiet,
        size,
        "tracking {bar:30} {bytes}/{total_bytes} ({bytes_per_sec}, {eta} left)",
    );
    let mut outcome = None;
    let mut files = Outputs::new();
    files.write_from_any_thread(output, |w| {
        outcome = pipeline(file, reader, parser, tracker, w, &bar)?;
        Ok(())
    })?;
    bar.finish_and_clear();
    let Some((read, end)) = outcome else {
        return Ok(None);
    };
    files.commit()?;
    Ok(Some(Streamed {
        format,
        read,
        end,
        config,
    }))
}

/// The next rows of the file, and the class names first seen in them.
struct Batch {
    rows: Rows,
    new_classes: Vec<String>,
}

enum Rows {
    /// Benchmark text: rows, whose last frame may go on in the next batch.
    Text(Vec<Detection>),
    /// CSV: whole frames with their own appearance vectors.
    Frames(Detections),
}

/// The reading of pieces of one of the two formats read piecewise, and how many class names it
/// has sent on.
struct Parser {
    format: Format,
    sent_classes: usize,
}

enum Format {
    Text(Pieces),
    Csv { pieces: CsvPieces, dim: usize },
}

impl Parser {
    /// The parser for a file that starts with `first` (whole lines), if it can be read piecewise.
    fn for_start(first: &[u8]) -> Option<Parser> {
        let format = if detections::benchmark_text_start(first).is_some() {
            Format::Text(Pieces::new())
        } else {
            let dim = detections::csv_start(first)?;
            Format::Csv {
                pieces: CsvPieces::new(),
                dim,
            }
        };
        Some(Parser {
            format,
            sent_classes: 0,
        })
    }

    fn format(&self) -> DetectionFormat {
        match self.format {
            Format::Text(_) => DetectionFormat::BenchmarkText,
            Format::Csv { .. } => DetectionFormat::CsvWithHeader,
        }
    }

    fn embedding_dim(&self) -> usize {
        match self.format {
            Format::Text(_) => 0,
            Format::Csv { dim, .. } => dim,
        }
    }

    /// The rows of the next piece; `None` to give up (a mistake, frames out of order, a header
    /// read otherwise than at the start).
    fn read(&mut self, text: &str) -> Option<Batch> {
        let (rows, named) = match &mut self.format {
            Format::Text(pieces) => {
                let mut rows = Vec::new();
                if pieces.read(text, &mut rows).is_err() || pieces.out_of_order() {
                    return None;
                }
                (Rows::Text(rows), pieces.classes())
            }
            Format::Csv { pieces, dim } => {
                let mut batch = Detections::default();
                let same = pieces.read(text, &mut batch).is_ok()
                    && !pieces.out_of_order()
                    && pieces.embedding_dim() == Some(*dim);
                if !same {
                    return None;
                }
                (Rows::Frames(batch), pieces.classes())
            }
        };
        let new_classes = named.classes[self.sent_classes..].to_vec();
        self.sent_classes = named.classes.len();
        Some(Batch { rows, new_classes })
    }

    /// The rows still held (CSV's last frame, whose class names were sent with the rows before
    /// it) and the totals; `None` to give up.
    fn finish(self) -> Option<(Option<Batch>, PiecesSummary)> {
        match self.format {
            Format::Text(pieces) => Some((None, pieces.finish().ok()?)),
            Format::Csv { pieces, .. } => {
                let mut batch = Detections::default();
                let read = pieces.finish(&mut batch).ok()?;
                let last = Batch {
                    rows: Rows::Frames(batch),
                    new_classes: Vec::new(),
                };
                Some((Some(last), read))
            }
        }
    }
}

/// Three stages at once, so that a long file keeps both cores busy: reading and parsing, the
/// tracker (this thread), and putting the boxes in order and writing the text. `Ok(None)` when
/// the reading gave up (nothing is put in place).
fn pipeline(
    file: std::fs::File,
    reader: PieceReader,
    parser: Parser,
    mut tracker: StreamTracker,
    w: &mut (dyn std::io::Write + Send),
    bar: &ProgressBar,
) -> std::io::Result<Option<(PiecesSummary, StreamEnd)>> {
    std::thread::scope(|s| {
        let (rows_in, rows_out) = sync_channel::<Batch>(2);
        let (boxes_in, boxes_out) = sync_channel::<Drained>(2);
        let reading = s.spawn(move || read_rows(file, reader, parser, rows_in, bar));
        let writing = s.spawn(move || write_boxes(w, boxes_out));
        let mut ctx = Detections::default();
        for batch in rows_out {
            ctx.classes.extend(batch.new_classes);
            match batch.rows {
                Rows::Text(rows) => tracker.rows(&rows, &ctx),
                Rows::Frames(mut frames) => {
                    // The batch's own vectors with every class named so far, lent and taken back.
                    frames.classes = std::mem::take(&mut ctx.classes);
                    tracker.frames(&frames.rows, &frames);
                    ctx.classes = frames.classes;
                }
            }
            if boxes_in.send(tracker.drain()).is_err() {
                break;
            }
        }
        let read = reading.join().unwrap_or(None);
        if let Some(read) = read {
            let (rest, end) = tracker.finish_drained(&ctx);
            // A failed send means the writer stopped: its join below gives the reason.
            let _ = boxes_in.send(rest);
            drop(boxes_in);
            join_writer(writing)?;
            return Ok(Some((read, end)));
        }
        drop(boxes_in);
        join_writer(writing)?;
        Ok(None)
    })
}

fn join_writer(
    writing: std::thread::ScopedJoinHandle<'_, std::io::Result<()>>,
) -> std::io::Result<()> {
    writing
        .join()
        .unwrap_or_else(|_| Err(std::io::Error::other("the writing stopped")))
}

/// The reading stage: pieces parsed into rows, sent on; the totals, or `None` when it gave up
/// (a mistake, frames out of order, a line longer than a piece, bytes that are not UTF-8).
fn read_rows(
    mut file: std::fs::File,
    mut reader: PieceReader,
    mut parser: Parser,
    send: SyncSender<Batch>,
    bar: &ProgressBar,
) -> Option<PiecesSummary> {
    let mut first = true;
    loop {
        let text = reader.text(first)?;
        first = false;
        send.send(parser.read(text)?).ok()?;
        bar.set_position(reader.done);
        if reader.at_end {
            let (last, read) = parser.finish()?;
            if let Some(batch) = last {
                send.send(batch).ok()?;
            }
            return Some(read);
        }
        if !reader.fill(&mut file) {
            return None;
        }
    }
}

/// The writing stage: the tracker's boxes put in order and written as benchmark text.
fn write_boxes(
    w: &mut (dyn std::io::Write + Send),
    boxes: Receiver<Drained>,
) -> std::io::Result<()> {
    let mut lines = BenchmarkLines::new(w);
    let mut in_order = InOrder::default();
    let mut failed = None;
    for batch in boxes {
        in_order.give_out(batch, &mut |f, id, b| {
            if failed.is_none() {
                failed = lines.push(f, id, b).err();
            }
        });
        if let Some(e) = failed.take() {
            return Err(e);
        }
    }
    lines.flush()
}

/// The file's bytes a piece at a time, each cut after its last line end (the rest is carried
/// to the next piece).
#[derive(Default)]
struct PieceReader {
    buf: Vec<u8>,
    /// Bytes of `buf` that end at a line end (all of them at the end of the file).
    cut: usize,
    at_end: bool,
    /// Bytes read so far.
    done: u64,
    /// The file's size when it was opened.
    size: u64,
}

impl PieceReader {
    /// Drops the last piece and reads the next one; false when reading failed or a line is
    /// longer than a piece.
    fn fill(&mut self, file: &mut std::fs::File) -> bool {
        self.buf.drain(..self.cut);
        let had = self.buf.len();
        // No bigger than what is left of the file (and one byte to see its end); a file grown
        // past its size at opening is read on in whole pieces.
        let piece = usize::try_from(self.size / 16).map_or(PIECE, |p| p.clamp(LEAST_PIECE, PIECE));
        let size = match usize::try_from(self.size.saturating_sub(self.done)) {
            Ok(left) if left > 0 => piece.min(had + left + 1),
            _ => piece,
        };
        self.buf.resize(size, 0);
        let mut filled = had;
        while filled < size {
            match file.read(&mut self.buf[filled..]) {
                Ok(0) => {
                    self.at_end = true;
                    break;
                }
                Ok(n) => filled += n,
                Err(e) if e.kind() == std::io::ErrorKind::Interrupted => {}
                Err(_) => return false,
            }
        }
        self.buf.truncate(filled);
        self.done += (filled - had) as u64;
        self.cut = if self.at_end {
            filled
        } else {
            match self.buf.iter().rposition(|&b| b == b'\n') {
                Some(i) => i + 1,
                None => return false,
            }
        };
        true
    }

    fn whole_lines(&self) -> &[u8] {
        &self.buf[..self.cut]
    }

    /// The piece as text (the first without its byte-order mark); `None` if it is not UTF-8.
    fn text(&self, first: bool) -> Option<&str> {
        let bytes = self.whole_lines();
        let bytes = match first {
            true => bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes),
            false => bytes,
        };
        std::str::from_utf8(bytes).ok()
    }
}
