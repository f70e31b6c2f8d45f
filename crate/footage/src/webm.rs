//! The video track of a WebM file (Matroska, IETF RFC 9559; elements coded in EBML, RFC 8794):
//! the track list, then each block of the video track in file order.
//!
//! The file is read front to back, element by element: the segment and its clusters are entered,
//! block groups and the header elements needed are read whole (below a size limit), everything
//! else is stepped over by its size. Each step moves forward by at least an element header and the
//! number of steps is limited, so no file can make the reader go round for ever; the index at the
//! end of the file (cues) is never needed, so footage cut short still gives the frames it holds.

use std::io::{Read, Seek};

use throughline_core::limits::{
    MAX_CODED_FRAME_BYTES, MAX_CONTAINER_ELEMENTS, MAX_CONTAINER_HEADER_BYTES, MAX_PICTURE_SIDE,
};

use crate::bytes::{io_message, read_exact_vec, seek_to, too_short, Bytes};
use crate::codec::{av1_codec, avc_codec, hevc_codec, vp9_codec, Chunk, VideoTrack};

const EBML: u32 = 0x1A45_DFA3;
const DOC_TYPE: u32 = 0x4282;
const SEGMENT: u32 = 0x1853_8067;
const INFO: u32 = 0x1549_A966;
const TIMESTAMP_SCALE: u32 = 0x2A_D7B1;
const TRACKS: u32 = 0x1654_AE6B;
const TRACK_ENTRY: u32 = 0xAE;
const TRACK_NUMBER: u32 = 0xD7;
const TRACK_TYPE: u32 = 0x83;
const CODEC_ID: u32 = 0x86;
const CODEC_PRIVATE: u32 = 0x63A2;
const CONTENT_ENCODINGS: u32 = 0x6D80;
const VIDEO: u32 = 0xE0;
const PIXEL_WIDTH: u32 = 0xB0;
const PIXEL_HEIGHT: u32 = 0xBA;
const CLUSTER: u32 = 0x1F43_B675;
const TIMESTAMP: u32 = 0xE7;
const SIMPLE_BLOCK: u32 = 0xA3;
const BLOCK_GROUP: u32 = 0xA0;
const BLOCK: u32 = 0xA1;
const REFERENCE_BLOCK: u32 = 0xFB;

/// Skips up to this many bytes by reading them, not seeking: a buffered reader keeps its buffer.
const READ_OVER: u64 = 64 << 10;

/// An element's header: its ID, and the size of its data (`None`: unknown, until its parent ends).
struct Header {
    id: u32,
    size: Option<u64>,
}

/// Where the reader is in the file, and what it knows of the video track.
pub(crate) struct WebM {
    pos: u64,
    /// The segment's end, when its size is given (a live recording's may be unknown).
    segment_end: Option<u64>,
    steps: usize,
    track: u64,
    /// Nanoseconds per unit of the file's timestamps.
    scale_ns: u64,
    cluster_time: u64,
}

/// The video track's entry in the track list.
struct Entry {
    number: u64,
    codec_id: String,
    private: Option<Vec<u8>>,
    width: u64,
    height: u64,
}

impl WebM {
    /// Where the segment says it ends, if that lies past a file of `size` bytes: the file is cut
    /// short (an interrupted copy or recording).
    pub(crate) fn declared_end_past(&self, size: u64) -> Option<u64> {
        self.segment_end.filter(|&end| end > size)
    }

    /// Reads up to the first frame of the video track: what the decoder is told, and that frame.
    pub(crate) fn open<R: Read + Seek>(
        reader: &mut R,
    ) -> Result<(WebM, VideoTrack, Chunk), String> {
        let mut w = WebM {
            pos: 0,
            segment_end: None,
            steps: 0,
            track: 0,
            scale_ns: 1_000_000,
            cluster_time: 0,
        };
        seek_to(reader, 0)?;
        let head = w.header(reader)?.ok_or_else(|| too_short("header"))?;
        if head.id != EBML {
            return Err("it does not start with an EBML header".into());
        }
        let doc = w.body(reader, &head, "EBML header")?;
        let doc_type = elements(&doc)?
            .into_iter()
            .find(|(id, _)| *id == DOC_TYPE)
            .map(|(_, d)| {
                String::from_utf8_lossy(d)
                    .trim_end_matches('\0')
                    .to_string()
            });
        if !matches!(doc_type.as_deref(), Some("webm" | "matroska")) {
            return Err("its EBML header names no WebM or Matroska document".into());
        }
        let segment = w.header(reader)?.ok_or_else(|| too_short("file"))?;
        if segment.id != SEGMENT {
            return Err("no segment after the EBML header".into());
        }
        w.segment_end = segment.size.and_then(|s| w.pos.checked_add(s));
        let entry = w.read_track_list(reader)?;
        let (codec, description, first) = w.codec(reader, &entry)?;
        let info = VideoTrack {
            container: "webm",
            codec,
            description,
            coded_width: picture_side(entry.width)?,
            coded_height: picture_side(entry.height)?,
            frames: None,
        };
        Ok((w, info, first))
    }

    /// Reads the segment's header elements up to the first cluster: the timestamp scale and the
    /// video track's entry.
    fn read_track_list<R: Read + Seek>(&mut self, reader: &mut R) -> Result<Entry, String> {
        let mut entry = None;
        loop {
            self.step()?;
            let h = self
                .header(reader)?
                .ok_or("the file ends before its first frame (cut short?)")?;
            match h.id {
                INFO => {
                    let data = self.body(reader, &h, "segment information")?;
                    if let Some((_, d)) = elements(&data)?
                        .into_iter()
                        .find(|(id, _)| *id == TIMESTAMP_SCALE)
                    {
                        self.scale_ns = Bytes::new(d)
                            .uint(d.len())
                            .filter(|&s| s > 0)
                            .ok_or("its timestamp scale is not a positive number")?;
                    }
                }
                TRACKS => entry = Some(video_entry(&self.body(reader, &h, "track list")?)?),
                CLUSTER => break,
                _ => self.skip(reader, &h)?,
            }
        }
        let entry = entry.ok_or("no track list before the first frame")?;
        entry.ok_or_else(|| "the WebM holds no video track".to_string())
    }

    /// The codec string and configuration record, and the first frame (VP9's profile is in it).
    #[allow(clippy::type_complexity)]
    fn codec<R: Read + Seek>(
        &mut self,
        reader: &mut R,
        entry: &Entry,
    ) -> Result<(String, Option<Vec<u8>>, Chunk), String> {
        self.track = entry.number;
        let first = self
            .next_frame(reader, true)?
            .ok_or("the WebM's video track has no frames")?;
        let private = entry.private.clone();
        let record = |what: &str| {
            private
                .clone()
                .ok_or_else(|| format!("the {what} track has no configuration record"))
        };
        let (codec, description) = match entry.codec_id.as_str() {
            "V_VP8" => ("vp8".to_string(), None),
            "V_VP9" => (vp9_codec(&first.data), None),
            "V_AV1" => {
                let r = record("AV1")?;
                (
                    av1_codec(&r).ok_or("the AV1 track's record is too short")?,
                    Some(r),
                )
            }
            "V_MPEG4/ISO/AVC" => {
                let r = record("H.264")?;
                (
                    avc_codec(&r).ok_or("the H.264 track's record is too short")?,
                    Some(r),
                )
            }
            "V_MPEGH/ISO/HEVC" => {
                let r = record("HEVC")?;
                let codec = hevc_codec("hvc1", &r).ok_or("the HEVC track's record is too short")?;
                (codec, Some(r))
            }
            other => {
                return Err(format!(
                    "its video codec {other} is not one the page decodes"
                ))
            }
        };
        Ok((codec, description, first))
    }

    /// The next frame of the video track, `None` at the end of the segment.
    pub(crate) fn next_frame<R: Read + Seek>(
        &mut self,
        reader: &mut R,
        first: bool,
    ) -> Result<Option<Chunk>, String> {
        loop {
            self.step()?;
            if self.segment_end.is_some_and(|end| self.pos >= end) {
                return Ok(None);
            }
            let Some(h) = self.header(reader)? else {
                return match self.segment_end {
                    Some(_) => Err("the file ends early (cut short?)".into()),
                    None => Ok(None),
                };
            };
            match h.id {
                SEGMENT => {}
                CLUSTER => self.cluster_time = 0,
                TIMESTAMP => {
                    let data = self.body(reader, &h, "cluster timestamp")?;
                    self.cluster_time = Bytes::new(&data)
                        .uint(data.len())
                        .ok_or("a cluster timestamp longer than 8 bytes")?;
                }
                SIMPLE_BLOCK => {
                    let data = self.body(reader, &h, "block")?;
                    if let Some(chunk) = self.block(&data, None)? {
                        return Ok(Some(chunk));
                    }
                }
                BLOCK_GROUP => {
                    let data = self.body(reader, &h, "block group")?;
                    let children = elements(&data)?;
                    let referenced = children.iter().any(|(id, _)| *id == REFERENCE_BLOCK);
                    if let Some((_, block)) = children.iter().find(|(id, _)| *id == BLOCK) {
                        if let Some(chunk) = self.block(block, Some(!referenced || first))? {
                            return Ok(Some(chunk));
                        }
                    }
                }
                _ => self.skip(reader, &h)?,
            }
        }
    }

    /// A block's frame if it belongs to the video track. `key`: what a block group says (a
    /// simple block carries its own flag).
    fn block(&self, data: &[u8], key: Option<bool>) -> Result<Option<Chunk>, String> {
        let mut b = Bytes::new(data);
        let track = vint(&mut b).ok_or_else(|| too_short("block"))?.0;
        if track != self.track {
            return Ok(None);
        }
        let (Some(relative), Some(flags)) = (b.u16(), b.u8()) else {
            return Err(too_short("block"));
        };
        if flags & 0x06 != 0 {
            return Err(
                "its video blocks hold several frames each (lacing), which the page does not read"
                    .into(),
            );
        }
        let time = i128::from(self.cluster_time) + i128::from(relative as i16);
        let ns = time * i128::from(self.scale_ns);
        Ok(Some(Chunk {
            data: b.take(b.left()).unwrap_or_default().to_vec(),
            timestamp_us: i64::try_from(ns / 1000).unwrap_or(i64::MAX),
            key: key.unwrap_or(flags & 0x80 != 0),
        }))
    }

    fn step(&mut self) -> Result<(), String> {
        self.steps += 1;
        if self.steps > MAX_CONTAINER_ELEMENTS {
            return Err(format!(
                "more than {MAX_CONTAINER_ELEMENTS} elements (damaged?)"
            ));
        }
        Ok(())
    }

    /// The element header at the reader's position; `None` at the end of the file.
    fn header<R: Read>(&mut self, reader: &mut R) -> Result<Option<Header>, String> {
        let mut first = [0u8; 1];
        if crate::bytes::read_up_to(reader, &mut first).map_err(io_message)? == 0 {
            return Ok(None);
        }
        let id_len = first[0].leading_zeros() as usize + 1;
        if id_len > 4 {
            return Err(format!(
                "damaged at byte {}: no element starts there",
                self.pos
            ));
        }
        let mut head = [0u8; 12];
        head[0] = first[0];
        reader
            .read_exact(&mut head[1..id_len + 1])
            .map_err(io_message)?;
        let size_len = head[id_len].leading_zeros() as usize + 1;
        if size_len > 8 {
            return Err(format!(
                "damaged at byte {}: an element size of more than 8 bytes",
                self.pos
            ));
        }
        reader
            .read_exact(&mut head[id_len + 1..id_len + size_len])
            .map_err(io_message)?;
        let id = head[..id_len]
            .iter()
            .fold(0u32, |v, &x| (v << 8) | u32::from(x));
        let mut b = Bytes::new(&head[id_len..id_len + size_len]);
        let (size, unknown) = vint(&mut b).ok_or_else(|| too_short("element"))?;
        self.pos += (id_len + size_len) as u64;
        Ok(Some(Header {
            id,
            size: (!unknown).then_some(size),
        }))
    }

    /// An element's data, read whole (below the limit for its kind).
    fn body<R: Read>(&mut self, reader: &mut R, h: &Header, what: &str) -> Result<Vec<u8>, String> {
        let limit = if matches!(h.id, SIMPLE_BLOCK | BLOCK_GROUP) {
            MAX_CODED_FRAME_BYTES + 4096
        } else {
            MAX_CONTAINER_HEADER_BYTES
        };
        let size = h
            .size
            .ok_or_else(|| format!("its {what} has no size (damaged?)"))?;
        if size > limit {
            return Err(format!(
                "its {what} at byte {} is larger than {} MB (damaged?)",
                self.pos,
                limit >> 20
            ));
        }
        let data = read_exact_vec(reader, size)?;
        self.pos += size;
        Ok(data)
    }

    /// Steps over an element's data.
    fn skip<R: Read + Seek>(&mut self, reader: &mut R, h: &Header) -> Result<(), String> {
        let size = h.size.ok_or_else(|| {
            format!(
                "damaged at byte {}: an element of unknown size where a size is needed",
                self.pos
            )
        })?;
        let to = self
            .pos
            .checked_add(size)
            .ok_or("an element larger than any file (damaged?)")?;
        if size <= READ_OVER {
            let read = std::io::copy(&mut reader.by_ref().take(size), &mut std::io::sink())
                .map_err(io_message)?;
            if read < size {
                // The end of the file: the next header says so.
                self.pos += read;
                return Ok(());
            }
        } else {
            seek_to(reader, to)?;
        }
        self.pos = to;
        Ok(())
    }
}

/// An EBML variable-size integer (RFC 8794 §4): its value, and whether all its value bits are
/// set (an unknown size).
fn vint(b: &mut Bytes) -> Option<(u64, bool)> {
    let first = b.u8()?;
    let len = first.leading_zeros() as usize + 1;
    if len > 8 {
        return None;
    }
    let marker_free = u64::from(first) & (0xFF >> len);
    let rest = b.uint(len - 1)?;
    let value = (marker_free << (8 * (len - 1))) | rest;
    let all_ones = (1u64 << (7 * len)) - 1;
    Some((value, value == all_ones))
}

/// The child elements of an element held in memory: (ID, data).
fn elements(data: &[u8]) -> Result<Vec<(u32, &[u8])>, String> {
    let mut out = Vec::new();
    let mut b = Bytes::new(data);
    while b.left() > 0 {
        let first = b.u8().unwrap_or(0);
        let id_len = first.leading_zeros() as usize + 1;
        if id_len > 4 {
            return Err("a damaged element inside a header".into());
        }
        let rest = b
            .uint(id_len - 1)
            .ok_or_else(|| too_short("header element"))?;
        let id = ((u64::from(first) << (8 * (id_len - 1))) | rest) as u32;
        let (size, unknown) = vint(&mut b).ok_or_else(|| too_short("header element"))?;
        if unknown {
            return Err("an element of unknown size inside a header (damaged?)".into());
        }
        let size = usize::try_from(size).unwrap_or(usize::MAX);
        let inner = b.take(size).ok_or_else(|| too_short("header element"))?;
        out.push((id, inner));
    }
    Ok(out)
}

fn uint_of(data: &[u8]) -> Option<u64> {
    Bytes::new(data).uint(data.len())
}

/// The first video track (type 1) of a track list, if there is one.
fn video_entry(tracks: &[u8]) -> Result<Option<Entry>, String> {
    for (id, entry) in elements(tracks)? {
        if id != TRACK_ENTRY {
            continue;
        }
        let fields = elements(entry)?;
        let get = |want: u32| fields.iter().find(|(id, _)| *id == want).map(|(_, d)| *d);
        if get(TRACK_TYPE).and_then(uint_of) != Some(1) {
            continue;
        }
        if get(CONTENT_ENCODINGS).is_some() {
            return Err("its video frames are compressed or encrypted inside the file".into());
        }
        let video = elements(get(VIDEO).ok_or("its video track has no picture size")?)?;
        let side = |want: u32| {
            video
                .iter()
                .find(|(id, _)| *id == want)
                .and_then(|(_, d)| uint_of(d))
                .ok_or("its video track has no picture size")
        };
        return Ok(Some(Entry {
            number: get(TRACK_NUMBER)
                .and_then(uint_of)
                .ok_or("its video track has no number")?,
            codec_id: String::from_utf8_lossy(get(CODEC_ID).unwrap_or_default())
                .trim_end_matches('\0')
                .to_string(),
            private: get(CODEC_PRIVATE).map(<[u8]>::to_vec),
            width: side(PIXEL_WIDTH)?,
            height: side(PIXEL_HEIGHT)?,
        }));
    }
    Ok(None)
}

fn picture_side(v: u64) -> Result<u32, String> {
    u32::try_from(v)
        .ok()
        .filter(|&s| s > 0 && s as usize <= MAX_PICTURE_SIDE)
        .ok_or_else(|| format!("its picture side of {v} pixels is outside 1 to {MAX_PICTURE_SIDE}"))
}
