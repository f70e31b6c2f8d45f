//! Writing and reading tracks: the benchmark text format and Throughline's JSON tracks document.
//!
//! Benchmark text: one line per box, `frame,id,x,y,w,h,score,-1,-1,-1`, sorted by frame then id,
//! frames 1-based, boxes in pixels (top-left x/y + width/height). Observed and predicted boxes of
//! confirmed tracks are written; predicted boxes carry score 0.
//!
//! The JSON tracks document is described in `docs/tracks-format.md`.

use crate::error::{Error, ErrorKind};
use crate::geometry::BBox;
use crate::text;
use crate::track::lines::{self, round};
pub use crate::track::lines::{write_decimal, BenchmarkLines};
use crate::track::{Track, TrackBox, TrackerConfig, Tracks};
use serde::{Deserialize, Serialize};

/// Identifies a Throughline tracks document.
pub const TRACKS_FORMAT: &str = crate::formats::TRACKS;
/// Version of the tracks document layout.
pub const TRACKS_VERSION: u32 = 1;

/// Writes tracks in the benchmark text format.
pub fn to_benchmark_text(tracks: &Tracks) -> String {
    let mut out = Vec::new();
    // Writing into memory cannot fail, and every piece written is ASCII.
    let _ = write_benchmark_text(tracks, &mut out);
    String::from_utf8(out).unwrap_or_default()
}

/// Writes tracks in the benchmark text format to `out`, a piece at a time: memory beyond the
/// tracks is one pointer per box (for the order) and a small buffer, however long the output.
pub fn write_benchmark_text(tracks: &Tracks, out: &mut impl std::io::Write) -> std::io::Result<()> {
    let mut rows: Vec<(u32, u32, &TrackBox)> = tracks
        .tracks
        .iter()
        .flat_map(|t| t.boxes.iter().map(move |b| (b.frame, t.id, b)))
        .collect();
    // (frame, id) pairs are unique, so an unstable sort gives the same order.
    rows.sort_unstable_by_key(|&(f, id, _)| (f, id));
    let mut lines = BenchmarkLines::new(out);
    for (frame, id, b) in rows {
        lines.push(frame, id, b)?;
    }
    lines.flush()
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct TracksDocument {
    format: String,
    version: u32,
    generator: String,
    settings: TrackerConfig,
    frame_count: u32,
    /// Present (equal to `frame_count`) when that is the footage's own length.
    #[serde(default)]
    footage_frames: Option<u32>,
    box_layout: Vec<String>,
    tracks: Vec<TrackEntry>,
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct TrackEntry {
    id: u32,
    class: Option<String>,
    mean_score: f64,
    first_frame: u32,
    last_frame: u32,
    observed_boxes: usize,
    /// `[frame, x, y, w, h, score, observed (1 or 0)]`
    boxes: Vec<(u32, f64, f64, f64, f64, f64, u8)>,
}

const BOX_LAYOUT: [&str; 7] = ["frame", "x", "y", "w", "h", "score", "observed"];

/// The document as written: the same fields as [`TracksDocument`], borrowing the boxes.
#[derive(Serialize)]
struct TracksOut<'a> {
    format: &'static str,
    version: u32,
    generator: String,
    settings: &'a TrackerConfig,
    frame_count: u32,
    #[serde(skip_serializing_if = "Option::is_none")]
    footage_frames: Option<u32>,
    box_layout: [&'static str; 7],
    tracks: Vec<TrackOut<'a>>,
}

#[derive(Serialize)]
struct TrackOut<'a> {
    id: u32,
    class: &'a Option<String>,
    mean_score: f64,
    first_frame: u32,
    last_frame: u32,
    observed_boxes: usize,
    boxes: BoxesOut<'a>,
}

const BOX_PLACES: i32 = lines::BOX_PLACES as i32;
const SCORE_PLACES: i32 = lines::SCORE_PLACES as i32;

/// Rounds every box and score as the tracks files write them, so that tracks written by `track`
/// and read back by `count` are the very values `run` counts: the same report either way.
/// ([`crate::pipeline::track`] and bridging's joins give tracks so rounded.)
pub(crate) fn round_as_written(tracks: &mut Tracks) {
    for t in &mut tracks.tracks {
        t.mean_score = round(t.mean_score, SCORE_PLACES);
        for b in &mut t.boxes {
            (b.bbox, b.score) = as_written(b);
        }
    }
}

/// A box and its score rounded as the tracks files write them.
fn as_written(b: &TrackBox) -> (BBox, f64) {
    let r = |v: f64| round(v, BOX_PLACES);
    let bb = b.bbox;
    (
        BBox::new(r(bb.x), r(bb.y), r(bb.w), r(bb.h)),
        round(b.score, SCORE_PLACES),
    )
}

/// A track's boxes as `[frame, x, y, w, h, score, observed]` arrays, rounded as they are read back.
struct BoxesOut<'a>(&'a [TrackBox]);

impl Serialize for BoxesOut<'_> {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_seq(self.0.iter().map(|b| {
            let (bb, score) = as_written(b);
            (b.frame, bb.x, bb.y, bb.w, bb.h, score, u8::from(b.observed))
        }))
    }
}

fn document(tracks: &Tracks) -> TracksOut<'_> {
    TracksOut {
        format: TRACKS_FORMAT,
        version: TRACKS_VERSION,
        generator: format!("throughline {}", crate::VERSION),
        settings: &tracks.config,
        frame_count: tracks.frame_count,
        footage_frames: tracks.length_from_footage.then_some(tracks.frame_count),
        box_layout: BOX_LAYOUT,
        tracks: tracks
            .tracks
            .iter()
            .map(|t| TrackOut {
                id: t.id,
                class: &t.class,
                mean_score: round(t.mean_score, SCORE_PLACES),
                first_frame: t.first_frame(),
                last_frame: t.last_frame(),
                observed_boxes: t.boxes.iter().filter(|b| b.observed).count(),
                boxes: BoxesOut(&t.boxes),
            })
            .collect(),
    }
}

/// Writes the JSON tracks document (pretty-printed at the top level, one box per array).
pub fn to_json(tracks: &Tracks) -> String {
    serde_json::to_string(&document(tracks)).unwrap_or_default()
}

/// Writes the JSON tracks document to `out` as it is made, without holding its text.
pub fn write_json(tracks: &Tracks, out: &mut impl std::io::Write) -> std::io::Result<()> {
    serde_json::to_writer(out, &document(tracks)).map_err(std::io::Error::other)
}

/// Reads a JSON tracks document written by [`to_json`].
pub fn from_json(bytes: &[u8]) -> Result<Tracks, Error> {
    let text = text::as_text(bytes)?;
    let doc: TracksDocument = serde_json::from_str(text).map_err(|e| {
        Error::from_json(
            ErrorKind::BadJson,
            &e,
            "; expected a Throughline tracks document (see docs/tracks-format.md)",
        )
    })?;
    crate::formats::check(
        "tracks document",
        (&doc.format, doc.version),
        (TRACKS_FORMAT, TRACKS_VERSION),
    )?;
    check_document(&doc)?;
    let tracks = doc
        .tracks
        .into_iter()
        .map(|t| Track {
            id: t.id,
            class: t.class,
            mean_score: t.mean_score,
            class_votes: Vec::new(),
            boxes: t
                .boxes
                .into_iter()
                .map(|(frame, x, y, w, h, score, observed)| TrackBox {
                    frame,
                    bbox: BBox::new(x, y, w, h),
                    score,
                    observed: observed != 0,
                })
                .collect(),
        })
        .collect();
    Ok(Tracks {
        config: doc.settings,
        frame_count: doc.frame_count,
        tracks,
        crowded_frames: Vec::new(),
        length_from_footage: doc.footage_frames.is_some(),
    })
}

/// A tracks document's tracks make sense: ids unique, each track's boxes in increasing frames from
/// 1, sizes finite and not negative. Errors name the track and the box.
fn check_document(doc: &TracksDocument) -> Result<(), Error> {
    if let Some(n) = doc.footage_frames.filter(|&n| n != doc.frame_count) {
        return Err(Error::new(
            ErrorKind::BadJson,
            format!(
                "footage_frames is {n} but frame_count is {}: the tracks file gives the footage's \
                 length in both (or leave footage_frames out when the length is not the footage's)",
                doc.frame_count
            ),
        ));
    }
    let mut ids = std::collections::HashSet::new();
    for (k, t) in doc.tracks.iter().enumerate() {
        let bad = |message: String| {
            Error::new(
                ErrorKind::BadJson,
                format!("tracks[{k}] (id {}): {message}", t.id),
            )
        };
        if !ids.insert(t.id) {
            return Err(bad(
                "this id is used by another track too: ids must differ".into()
            ));
        }
        let mut last = 0;
        for (b, &(frame, x, y, w, h, score, _)) in t.boxes.iter().enumerate() {
            if frame <= last {
                return Err(bad(format!(
                    "box {} is at frame {frame}, after frame {last}: boxes go one a frame, in increasing frames from 1",
                    b + 1
                )));
            }
            last = frame;
            if ![x, y, w, h, score].into_iter().all(crate::limits::in_range) {
                return Err(bad(format!(
                    "the box of frame {frame} has a value that is not a finite number within ±10^12"
                )));
            }
            if let Some((side, v)) = [("w", w), ("h", h)].into_iter().find(|(_, v)| *v < 0.0) {
                return Err(bad(format!(
                    "the box of frame {frame} has {side} {v}: sizes must not be negative (boxes are \
                     [frame, x, y, w, h, score, observed]: top-left x, y then width, height, not \
                     two corners)"
                )));
            }
        }
    }
    Ok(())
}

/// One row of a benchmark text file read as tracks or ground truth.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct IdBox {
    pub frame: u32,
    pub id: i64,
    pub bbox: BBox,
    /// The seventh column, a tracker's score, on a line of the form Throughline writes (ten
    /// columns, the last three `-1`; 0 for a predicted box) when it is a number; else 1 (ground
    /// truth's seventh column is a flag, not a score).
    pub score: f64,
}

/// Reads `frame,id,x,y,w,h[,…]` rows (tracker output or ground truth), in file order.
pub fn read_benchmark_boxes(bytes: &[u8]) -> Result<Vec<IdBox>, Error> {
    let text = text::as_text(bytes)?;
    let mut out = Vec::new();
    let mut seen = std::collections::HashSet::new();
    for (i, raw) in text.lines().enumerate() {
        let line = i + 1;
        let l = raw.trim();
        if l.is_empty() || l.starts_with('#') {
            continue;
        }
        let fields = text::split_fields(l);
        if fields.len() < 6 {
            return Err(Error::new(
                ErrorKind::MissingColumn,
                format!(
                    "{} columns, but at least 6 are needed: frame,id,x,y,w,h",
                    fields.len()
                ),
            )
            .at(line, None));
        }
        let names = ["frame", "id", "x", "y", "w", "h"];
        let mut v = [0.0; 6];
        for (k, name) in names.iter().enumerate() {
            v[k] = text::number(fields[k], name, line, k + 1)?;
        }
        let frame = text::frame_number(v[0], line, 1)?;
        if v[1].fract() != 0.0 || !(-1.0..=f64::from(u32::MAX)).contains(&v[1]) {
            return Err(Error::new(
                ErrorKind::BadNumber,
                format!(
                    "id `{}` is not a whole number from 0 to {} (or -1 for no id)",
                    fields[1],
                    u32::MAX
                ),
            )
            .at(line, Some(2)));
        }
        let id = v[1] as i64;
        if id >= 0 && !seen.insert((frame, id)) {
            return Err(Error::new(
                ErrorKind::DuplicateId,
                format!("id {id} is in frame {frame} twice: one track has one box a frame"),
            )
            .at(line, Some(2)));
        }
        let bbox = BBox::new(v[2], v[3], v[4], v[5]);
        if let Some(e) = crate::detections::negative_side(&bbox, line, 5) {
            return Err(e);
        }
        out.push(IdBox {
            frame,
            id,
            bbox,
            score: tracker_score(&fields).unwrap_or(1.0),
        });
    }
    if out.is_empty() {
        let what = match text.trim().is_empty() {
            true => "the file is empty",
            false => "the file has only comments, no rows",
        };
        return Err(Error::new(
            ErrorKind::Empty,
            format!("{what}: expected benchmark text, lines of frame,id,x,y,w,h"),
        ));
    }
    Ok(out)
}

/// The score of a line `frame,id,x,y,w,h,score,-1,-1,-1` (as `track` writes them), if it is one.
fn tracker_score(fields: &[&str]) -> Option<f64> {
    let own_form = fields.len() == 10 && fields[7..].iter().all(|f| f.trim() == "-1");
    own_form.then(|| fields[6].trim().parse().ok()).flatten()
}

/// Tracker output as id boxes (for scoring).
pub fn tracks_to_boxes(tracks: &Tracks) -> Vec<IdBox> {
    tracks
        .tracks
        .iter()
        .flat_map(|t| {
            t.boxes.iter().map(move |b| IdBox {
                frame: b.frame,
                id: i64::from(t.id),
                bbox: b.bbox,
                score: b.score,
            })
        })
        .collect()
}

/// Tracks from benchmark-text rows (tracker output without classes or flags), ids kept. A box
/// with score 0 is taken as predicted, not seen (Throughline's `track` writes predicted boxes so,
/// and seen ones never with 0; counting draws a gap between seen boxes straight), unless every box
/// has score 0 (a file without scores); every other box as observed. Rows with a negative id are
/// passed over.
pub fn boxes_to_tracks(rows: &[IdBox]) -> Tracks {
    let with_id = || rows.iter().filter(|r| r.id >= 0);
    let scored = with_id().any(|r| r.score != 0.0);
    let mut by_id: std::collections::BTreeMap<i64, Vec<TrackBox>> = Default::default();
    for r in with_id() {
        let observed = !scored || r.score != 0.0;
        by_id.entry(r.id).or_default().push(TrackBox {
            frame: r.frame,
            bbox: r.bbox,
            score: if observed { 1.0 } else { 0.0 },
            observed,
        });
    }
    let tracks: Vec<Track> = by_id
        .into_iter()
        .map(|(id, mut boxes)| {
            boxes.sort_by_key(|b| b.frame);
            boxes.dedup_by_key(|b| b.frame);
            Track {
                id: u32::try_from(id).unwrap_or(u32::MAX),
                class: None,
                mean_score: 1.0,
                class_votes: Vec::new(),
                boxes,
            }
        })
        .collect();
    let frame_count = rows.iter().map(|r| r.frame).max().unwrap_or(0);
    Tracks {
        config: crate::track::TrackerConfig::for_method(crate::track::Method::Sort),
        frame_count,
        tracks,
        crowded_frames: Vec::new(),
        length_from_footage: false,
    }
}
