//! The video track of an MP4 file (ISO base media file format, ISO/IEC 14496-12): where each coded
//! frame lies, how long, when it is shown and whether it is a key frame, from the movie header
//! (`moov`) and, for fragmented files, from each movie fragment (`moof`).
//!
//! Every box is found by stepping over the boxes before it, never by searching: each step moves
//! forward by at least a box header, the number of steps is limited, headers are read whole only
//! below a size limit, and every table is checked against the bytes that hold it before anything
//! is allocated for it (`throughline_core::limits`).

use std::io::{Read, Seek};

use throughline_core::limits::{
    MAX_CONTAINER_ELEMENTS, MAX_CONTAINER_HEADER_BYTES, MAX_PICTURE_SIDE,
};

mod fragment;
mod tables;

use fragment::fragment;
use tables::{end_of_decoding, sample_tables};

use crate::bytes::{read_exact_vec, read_up_to, seek_to, too_short, Bytes};
use crate::codec::{av1_codec, avc_codec, hevc_codec, VideoTrack};

/// One coded frame: where it lies, and when it is shown (in the track's time units, the first
/// frame shown at 0).
#[derive(Debug, Clone, Copy)]
pub(crate) struct Sample {
    pub offset: u64,
    pub size: u32,
    pub time: i64,
    pub key: bool,
}

/// The video track: what the decoder is told, its frames in file order, and its time units.
pub(crate) struct Movie {
    pub info: VideoTrack,
    pub samples: Vec<Sample>,
    pub timescale: u32,
}

type FourCc = [u8; 4];

/// The video track being read: from the movie header, then each fragment's frames.
struct Track {
    id: u32,
    timescale: u32,
    info: VideoTrack,
    samples: Vec<Sample>,
    /// The defaults of a fragment's frames (`trex`): duration, size and flags.
    defaults: (u32, u32, u32),
    /// Decode time after the last frame read, for a fragment that does not give its own.
    next_dts: i64,
    /// What the edit list moves the track's times by (in the track's units).
    shift: i64,
    /// Bytes the fragments' runs of frames claim so far (at least one a frame).
    claimed: u64,
}

/// Reads the video track of an MP4 file of `size` bytes.
pub(crate) fn read_movie<R: Read + Seek>(reader: &mut R, size: u64) -> Result<Movie, String> {
    let mut track: Option<Track> = None;
    let mut pos = 0u64;
    let mut steps = 0usize;
    while pos < size {
        steps += 1;
        if steps > MAX_CONTAINER_ELEMENTS {
            return Err(format!(
                "more than {MAX_CONTAINER_ELEMENTS} boxes (damaged?)"
            ));
        }
        let Some((kind, header, length)) = box_at(reader, pos, size)? else {
            break;
        };
        let body = length - header;
        match &kind {
            b"moov" | b"moof" => {
                if pos + length > size {
                    return Err("the file ends early (cut short?)".into());
                }
                if body > MAX_CONTAINER_HEADER_BYTES {
                    return Err(format!(
                        "its {} box is larger than {} MB",
                        name(&kind),
                        MAX_CONTAINER_HEADER_BYTES >> 20
                    ));
                }
                let data = read_exact_vec(reader, body)?;
                if &kind == b"moov" {
                    track = Some(movie_header(&data, size)?);
                } else {
                    let t = track
                        .as_mut()
                        .ok_or("a movie fragment comes before the movie header")?;
                    fragment(&data, pos, t, size)?;
                }
            }
            _ => {}
        }
        pos = pos.saturating_add(length);
    }
    let mut t = track.ok_or("no movie header (moov box): not a whole MP4 file")?;
    if t.samples.is_empty() {
        return Err("the MP4's video track has no frames".into());
    }
    for s in &mut t.samples {
        s.time = s.time.saturating_sub(t.shift);
    }
    t.info.frames = u32::try_from(t.samples.len()).ok();
    Ok(Movie {
        info: t.info,
        samples: t.samples,
        timescale: t.timescale,
    })
}

/// Refuses `count` frames of `each` bytes (at least one) where the file cannot hold them: tables
/// that give one size for every frame, or runs of frames with a default size, are a few bytes
/// whatever the count they claim, so the count is checked against the file before a frame is
/// listed.
fn frames_fit(count: usize, each: u32, file_size: u64) -> Result<(), String> {
    claim(0, count, each, file_size).map(|_| ())
}

/// [`frames_fit`] for a run of frames after others that claimed `before` bytes: the bytes all of
/// them claim.
fn claim(before: u64, count: usize, each: u32, file_size: u64) -> Result<u64, String> {
    let bytes = (count as u64)
        .saturating_mul(u64::from(each.max(1)))
        .saturating_add(before);
    if bytes > file_size {
        return Err(format!(
            "it claims {count} frames of {} bytes, more than its {file_size} bytes hold (damaged?)",
            each.max(1)
        ));
    }
    Ok(bytes)
}

/// The box at `pos`: its type, header length and whole length (a box of size 0 runs to the end of
/// the file). `None` at the end, or where fewer bytes than a header are left.
fn box_at<R: Read + Seek>(
    reader: &mut R,
    pos: u64,
    size: u64,
) -> Result<Option<(FourCc, u64, u64)>, String> {
    seek_to(reader, pos)?;
    let mut head = [0u8; 16];
    let n = read_up_to(reader, &mut head).map_err(crate::bytes::io_message)?;
    if n < 8 {
        return Ok(None);
    }
    let declared = u64::from(u32::from_be_bytes([head[0], head[1], head[2], head[3]]));
    let kind: FourCc = [head[4], head[5], head[6], head[7]];
    let (header, length) = match declared {
        0 => (8, size - pos),
        1 if n == 16 => (
            16,
            u64::from_be_bytes(head[8..16].try_into().unwrap_or([0; 8])),
        ),
        1 => return Err(too_short("box header")),
        s => (8, s),
    };
    if length < header {
        return Err(format!(
            "a box ({}) at byte {pos} says it is smaller than its own header (damaged?)",
            name(&kind)
        ));
    }
    seek_to(reader, pos + header)?;
    Ok(Some((kind, header, length)))
}

fn name(kind: &FourCc) -> String {
    kind.iter()
        .map(|&b| if b.is_ascii_graphic() { b as char } else { '?' })
        .collect()
}

/// The boxes inside a box held in memory, in order.
fn children<'a>(data: &'a [u8], parent: &str) -> Result<Vec<(FourCc, &'a [u8])>, String> {
    let mut out = Vec::new();
    let mut b = Bytes::new(data);
    while b.left() >= 8 {
        let declared = b.u32().unwrap_or(0);
        let kind: FourCc = b.take(4).and_then(|k| k.try_into().ok()).unwrap_or([0; 4]);
        let body = match declared {
            0 => b.left(),
            1 => {
                let large = b.u64().ok_or_else(|| too_short(parent))?;
                usize::try_from(large.saturating_sub(16)).unwrap_or(usize::MAX)
            }
            s if s < 8 => {
                return Err(format!(
                    "its {parent} box holds a box of size {s} (damaged?)"
                ))
            }
            s => s as usize - 8,
        };
        let inner = b.take(body).ok_or_else(|| {
            format!("its {parent} box holds a box that runs past its end (damaged?)")
        })?;
        out.push((kind, inner));
    }
    Ok(out)
}

/// The first box of a kind inside a box.
fn find<'a>(data: &'a [u8], parent: &str, kind: &FourCc) -> Result<Option<&'a [u8]>, String> {
    Ok(children(data, parent)?
        .into_iter()
        .find(|(k, _)| k == kind)
        .map(|(_, d)| d))
}

fn need<'a>(data: &'a [u8], parent: &str, kind: &FourCc) -> Result<&'a [u8], String> {
    find(data, parent, kind)?.ok_or_else(|| format!("its {parent} box has no {} box", name(kind)))
}

/// The version and flags of a full box, and a reader after them.
fn full_box<'a>(data: &'a [u8], what: &str) -> Result<(u8, u32, Bytes<'a>), String> {
    let mut b = Bytes::new(data);
    let version = b.u8().ok_or_else(|| too_short(what))?;
    let flags = b.u24().ok_or_else(|| too_short(what))?;
    Ok((version, flags, b))
}

/// The movie header: its first video track, with the frames its sample tables list.
fn movie_header(moov: &[u8], file_size: u64) -> Result<Track, String> {
    let (version, _, mut mvhd) = full_box(need(moov, "moov", b"mvhd")?, "mvhd")?;
    mvhd.skip(if version == 1 { 16 } else { 8 })
        .ok_or_else(|| too_short("mvhd"))?;
    let movie_timescale = mvhd.u32().ok_or_else(|| too_short("mvhd"))?;
    let mut track = None;
    for (kind, trak) in children(moov, "moov")? {
        if &kind == b"trak" {
            track = video_track(trak, movie_timescale, file_size)?;
            if track.is_some() {
                break;
            }
        }
    }
    let mut track = track.ok_or("the MP4 holds no video track")?;
    if let Some(mvex) = find(moov, "moov", b"mvex")? {
        for (kind, trex) in children(mvex, "mvex")? {
            if &kind != b"trex" {
                continue;
            }
            let (_, _, mut b) = full_box(trex, "trex")?;
            let mut next = || b.u32().ok_or_else(|| too_short("trex"));
            let (id, _description, duration, size, flags) =
                (next()?, next()?, next()?, next()?, next()?);
            if id == track.id {
                track.defaults = (duration, size, flags);
            }
        }
    }
    Ok(track)
}

/// A track, if it is a video track (`hdlr` says `vide`).
fn video_track(trak: &[u8], movie_timescale: u32, file_size: u64) -> Result<Option<Track>, String> {
    let mdia = need(trak, "trak", b"mdia")?;
    let (_, _, mut hdlr) = full_box(need(mdia, "mdia", b"hdlr")?, "hdlr")?;
    hdlr.skip(4).ok_or_else(|| too_short("hdlr"))?;
    if hdlr.take(4) != Some(b"vide") {
        return Ok(None);
    }
    let (version, _, mut tkhd) = full_box(need(trak, "trak", b"tkhd")?, "tkhd")?;
    tkhd.skip(if version == 1 { 16 } else { 8 })
        .ok_or_else(|| too_short("tkhd"))?;
    let id = tkhd.u32().ok_or_else(|| too_short("tkhd"))?;
    let (version, _, mut mdhd) = full_box(need(mdia, "mdia", b"mdhd")?, "mdhd")?;
    mdhd.skip(if version == 1 { 16 } else { 8 })
        .ok_or_else(|| too_short("mdhd"))?;
    let timescale = mdhd
        .u32()
        .filter(|&t| t > 0)
        .ok_or("its video track has no time scale (mdhd)")?;
    let stbl = need(need(mdia, "mdia", b"minf")?, "minf", b"stbl")?;
    let info = sample_entry(need(stbl, "stbl", b"stsd")?)?;
    let samples = sample_tables(stbl, file_size)?;
    let next_dts = end_of_decoding(stbl, &samples)?;
    let shift = match find(trak, "trak", b"edts")? {
        Some(edts) => edit_shift(edts, movie_timescale, timescale)?,
        None => 0,
    };
    Ok(Some(Track {
        id,
        timescale,
        info,
        samples,
        defaults: (0, 0, 0),
        next_dts,
        shift,
        claimed: 0,
    }))
}

/// How far the edit list (`elst`, ISO/IEC 14496-12 §8.6.6) moves the shown times back: the first
/// edit that shows media starts at its media time, after any empty edits before it (their
/// durations are in the movie's units). Later edits (cuts within the footage) are not applied.
fn edit_shift(edts: &[u8], movie_timescale: u32, timescale: u32) -> Result<i64, String> {
    let Some(elst) = find(edts, "edts", b"elst")? else {
        return Ok(0);
    };
    let (version, _, mut b) = full_box(elst, "elst")?;
    let count = b.u32().ok_or_else(|| too_short("elst"))?;
    let mut delay = 0i64;
    for _ in 0..count {
        let (duration, media_time) = if version == 1 {
            (b.u64(), b.u64().map(|t| t as i64))
        } else {
            (b.u32().map(u64::from), b.u32().map(|t| i64::from(t as i32)))
        };
        let (Some(duration), Some(media_time), Some(_rate)) = (duration, media_time, b.u32())
        else {
            return Err(too_short("edit list (elst)"));
        };
        if media_time >= 0 {
            return Ok(media_time.saturating_sub(delay));
        }
        // An empty edit: nothing shown for its duration.
        let units =
            i128::from(duration) * i128::from(timescale) / i128::from(movie_timescale.max(1));
        delay = delay.saturating_add(i64::try_from(units).unwrap_or(i64::MAX));
    }
    Ok(0)
}

/// What the decoder is told: from the first sample entry of `stsd` (ISO/IEC 14496-12 §12.1.3,
/// a visual sample entry: 78 bytes of fields, then boxes such as the codec's configuration).
fn sample_entry(stsd: &[u8]) -> Result<VideoTrack, String> {
    let (_, _, mut b) = full_box(stsd, "stsd")?;
    b.skip(4).ok_or_else(|| too_short("stsd"))?;
    let rest = b.take(b.left()).unwrap_or_default();
    let (kind, entry) = children(rest, "stsd")?
        .into_iter()
        .next()
        .ok_or("its video track describes no codec (stsd)")?;
    let mut e = Bytes::new(entry);
    e.skip(24).ok_or_else(|| too_short("sample entry"))?;
    let width = u32::from(e.u16().ok_or_else(|| too_short("sample entry"))?);
    let height = u32::from(e.u16().ok_or_else(|| too_short("sample entry"))?);
    e.skip(50).ok_or_else(|| too_short("sample entry"))?;
    let boxes = e.take(e.left()).unwrap_or_default();
    let side = MAX_PICTURE_SIDE as u32;
    if width == 0 || height == 0 || width > side || height > side {
        return Err(format!(
            "its picture is {width}×{height}; the page reads pictures of 1 to {side} pixels a side"
        ));
    }
    let config = |k: &FourCc| need(boxes, "sample entry", k);
    let (codec, description) = match &kind {
        b"avc1" | b"avc3" => {
            let record = config(b"avcC")?;
            let codec = avc_codec(record).ok_or("its H.264 configuration (avcC) is too short")?;
            (
                codec.replacen("avc1", &name(&kind), 1),
                Some(record.to_vec()),
            )
        }
        b"hvc1" | b"hev1" => {
            let record = config(b"hvcC")?;
            let codec = hevc_codec(&name(&kind), record)
                .ok_or("its HEVC configuration (hvcC) is too short")?;
            (codec, Some(record.to_vec()))
        }
        b"av01" => {
            let record = config(b"av1C")?;
            let codec = av1_codec(record).ok_or("its AV1 configuration (av1C) is too short")?;
            (codec, Some(record.to_vec()))
        }
        b"vp08" => ("vp8".to_string(), None),
        b"vp09" => {
            let (_, _, mut v) = full_box(config(b"vpcC")?, "vpcC")?;
            let (profile, level, depth) = (v.u8(), v.u8(), v.u8().map(|d| d >> 4));
            let (Some(p), Some(l), Some(d)) = (profile, level, depth) else {
                return Err(too_short("VP9 configuration (vpcC)"));
            };
            (format!("vp09.{p:02}.{l:02}.{d:02}"), None)
        }
        b"encv" => return Err("its video is encrypted".into()),
        other => {
            return Err(format!(
                "its video codec {} is not one the page decodes",
                name(other)
            ))
        }
    };
    Ok(VideoTrack {
        container: "mp4",
        codec,
        description,
        coded_width: width,
        coded_height: height,
        frames: None,
    })
}
