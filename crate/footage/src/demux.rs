//! The coded frames of WebM and MP4 footage, for the browser's own video decoder (WebCodecs
//! `VideoDecoder`): which codec the video track uses, in the form `VideoDecoder.configure` takes,
//! and its frames one by one with their time and whether they start a group of pictures.
//!
//! Generic over `Read + Seek` so the same code reads a `File` in the page (a few bytes at a time,
//! never the whole footage in memory) and a file on disk in the native tests. Only the video track
//! is read; sound and subtitles are skipped.

use std::io::{Read, Seek, SeekFrom};

use throughline_core::limits::MAX_CODED_FRAME_BYTES;

use crate::bytes::{io_message, read_up_to, seek_to};
use crate::mp4::{read_movie, Sample};
use crate::webm::WebM;

/// What the video decoder must be told before the first frame.
#[derive(Debug, Clone, PartialEq)]
pub struct VideoTrack {
    /// "webm" or "mp4".
    pub container: &'static str,
    /// The codec string of the WebCodecs registry, e.g. `vp09.00.10.08` or `avc1.64001F`.
    pub codec: String,
    /// The codec's configuration record (`avcC`, `av1C`, ...) where the container carries one.
    pub description: Option<Vec<u8>>,
    pub coded_width: u32,
    pub coded_height: u32,
    /// Number of frames, where the container says so up front (MP4 does, WebM does not).
    pub frames: Option<u32>,
}

/// One coded frame.
#[derive(Debug, Clone, PartialEq)]
pub struct Chunk {
    pub data: Vec<u8>,
    /// Presentation time in microseconds from the start of the footage.
    pub timestamp_us: i64,
    /// A key frame: decodable without the frames before it.
    pub key: bool,
}

/// Reads the video track of a WebM or MP4 file.
pub struct Demuxer<R: Read + Seek> {
    reader: R,
    kind: Kind,
}

enum Kind {
    WebM {
        state: WebM,
        /// The first frame, read ahead while opening (the VP9 profile is in its header).
        pending: Option<Chunk>,
    },
    Mp4 {
        samples: Vec<Sample>,
        timescale: u32,
        next: usize,
        /// The file's size: a frame said to reach past it is refused before anything is allocated.
        size: u64,
    },
}

/// Why footage cannot be read this way. The page then falls back to drawing the frames one by one.
pub type DemuxError = String;

impl<R: Read + Seek> Demuxer<R> {
    /// Opens footage of `size` bytes; tells WebM from MP4 by its first bytes.
    pub fn open(mut reader: R, size: u64) -> Result<(Self, VideoTrack), DemuxError> {
        let mut head = [0u8; 12];
        let n = read_up_to(&mut reader, &mut head).map_err(|e| format!("cannot read: {e}"))?;
        seek_to(&mut reader, 0)?;
        if n >= 4 && head[..4] == [0x1A, 0x45, 0xDF, 0xA3] {
            let (state, info, first) =
                WebM::open(&mut reader).map_err(|e| format!("not a readable WebM: {e}"))?;
            let kind = Kind::WebM {
                state,
                pending: Some(first),
            };
            Ok((Demuxer { reader, kind }, info))
        } else if n >= 8 && &head[4..8] == b"ftyp" {
            let movie =
                read_movie(&mut reader, size).map_err(|e| format!("not a readable MP4: {e}"))?;
            let kind = Kind::Mp4 {
                samples: movie.samples,
                timescale: movie.timescale,
                next: 0,
                size,
            };
            Ok((Demuxer { reader, kind }, movie.info))
        } else {
            Err("neither WebM nor MP4 (the page reads those two itself)".into())
        }
    }

    /// The next coded frame of the video track in file order, `None` at the end.
    pub fn next_chunk(&mut self) -> Result<Option<Chunk>, DemuxError> {
        match &mut self.kind {
            Kind::WebM { state, pending } => match pending.take() {
                Some(first) => Ok(Some(first)),
                None => state
                    .next_frame(&mut self.reader, false)
                    .map_err(|e| format!("the WebM is damaged after its last good frame: {e}")),
            },
            Kind::Mp4 {
                samples,
                timescale,
                next,
                size,
            } => {
                let Some(&sample) = samples.get(*next) else {
                    return Ok(None);
                };
                *next += 1;
                let n = *next;
                let end = sample.offset.saturating_add(u64::from(sample.size));
                if end > *size {
                    return Err(format!("frame {n} lies outside the file; is it cut short?"));
                }
                if u64::from(sample.size) > MAX_CODED_FRAME_BYTES {
                    return Err(format!(
                        "frame {n} is larger than {} MB (damaged?)",
                        MAX_CODED_FRAME_BYTES >> 20
                    ));
                }
                let broken = |e: std::io::Error| {
                    format!(
                        "frame {n} lies outside the file ({}); is it cut short?",
                        io_message(e)
                    )
                };
                self.reader
                    .seek(SeekFrom::Start(sample.offset))
                    .map_err(broken)?;
                let mut data = vec![0u8; sample.size as usize];
                self.reader.read_exact(&mut data).map_err(broken)?;
                Ok(Some(Chunk {
                    data,
                    timestamp_us: to_micros(sample.time, *timescale),
                    key: sample.key,
                }))
            }
        }
    }
}

fn to_micros(time: i64, timescale: u32) -> i64 {
    let scale = i128::from(timescale.max(1));
    i64::try_from(i128::from(time) * 1_000_000 / scale).unwrap_or(i64::MAX)
}

/// VP9's codec string from the profile in a frame's first byte (VP9 bitstream specification,
/// uncompressed header: frame marker, then the profile's low and high bits). Profiles 2 and 3 are
/// the high-bit-depth ones; 10 bits is assumed for them.
pub(crate) fn vp9_codec(frame: &[u8]) -> String {
    let byte = frame.first().copied().unwrap_or(0);
    let profile = ((byte >> 5) & 1) | (((byte >> 4) & 1) << 1);
    let depth = if profile >= 2 { 10 } else { 8 };
    format!("vp09.{profile:02}.10.{depth:02}")
}

/// `avc1.PPCCLL` from an AVCDecoderConfigurationRecord (ISO/IEC 14496-15): profile, constraint
/// flags and level are its bytes 1 to 3.
pub(crate) fn avc_codec(record: &[u8]) -> Option<String> {
    let [_, profile, constraints, level, ..] = record else {
        return None;
    };
    Some(format!("avc1.{profile:02X}{constraints:02X}{level:02X}"))
}

/// `av01.P.LLT.DD` from an AV1CodecConfigurationRecord (AV1 ISOBMFF binding, section 2.3).
pub(crate) fn av1_codec(record: &[u8]) -> Option<String> {
    let [_, b1, b2, ..] = record else {
        return None;
    };
    let profile = b1 >> 5;
    let level = b1 & 0x1F;
    let tier = if b2 & 0x80 != 0 { 'H' } else { 'M' };
    let depth = match (b2 & 0x40 != 0, b2 & 0x20 != 0) {
        (true, true) => 12,
        (true, false) => 10,
        _ => 8,
    };
    Some(format!("av01.{profile}.{level:02}{tier}.{depth:02}"))
}

/// `hvc1.…` from an HEVCDecoderConfigurationRecord (ISO/IEC 14496-15, annex E): profile space
/// and profile, the compatibility flags bit-reversed in hex, tier and level, then the constraint
/// bytes in hex without the trailing zero bytes.
pub(crate) fn hevc_codec(prefix: &str, record: &[u8]) -> Option<String> {
    let r = record.get(..13)?;
    let space = ["", "A", "B", "C"][usize::from(r[1] >> 6)];
    let tier = if r[1] & 0x20 != 0 { 'H' } else { 'L' };
    let profile = r[1] & 0x1F;
    let compatibility = u32::from_be_bytes([r[2], r[3], r[4], r[5]]).reverse_bits();
    let mut constraints: Vec<String> = r[6..12].iter().map(|b| format!("{b:X}")).collect();
    while constraints.last().is_some_and(|c| c == "0") {
        constraints.pop();
    }
    let mut codec = format!(
        "{prefix}.{space}{profile}.{compatibility:X}.{tier}{}",
        r[12]
    );
    for c in constraints {
        codec.push('.');
        codec.push_str(&c);
    }
    Some(codec)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn codec_strings_from_headers() {
        // Profile bits of a VP9 frame's first byte: marker 0b10, profile low bit, high bit.
        assert_eq!(vp9_codec(&[0b1000_0010]), "vp09.00.10.08");
        assert_eq!(vp9_codec(&[0b1010_0010]), "vp09.01.10.08");
        assert_eq!(vp9_codec(&[0b1001_0010]), "vp09.02.10.10");
        assert_eq!(
            avc_codec(&[1, 0x64, 0x00, 0x1F, 0xFF]).unwrap(),
            "avc1.64001F"
        );
        assert_eq!(avc_codec(&[1, 0x64]), None);
        // av1C: marker/version 0x81, profile 0 level 8, main tier 8-bit.
        assert_eq!(av1_codec(&[0x81, 0x08, 0x0C, 0]).unwrap(), "av01.0.08M.08");
    }

    #[test]
    fn neither_webm_nor_mp4_is_refused() {
        let err = Demuxer::open(std::io::Cursor::new(b"YUV4MPEG2 W4 H4".to_vec()), 15)
            .err()
            .unwrap();
        assert!(err.contains("neither WebM nor MP4"), "{err}");
        let err = Demuxer::open(std::io::Cursor::new(Vec::new()), 0)
            .err()
            .unwrap();
        assert!(err.contains("neither"), "{err}");
    }
}
