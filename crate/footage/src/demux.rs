//! The coded frames of WebM and MP4 footage, for the browser's own video decoder (WebCodecs
//! `VideoDecoder`): which codec the video track uses, in the form `VideoDecoder.configure` takes,
//! and its frames one by one with their time and whether they start a group of pictures.
//!
//! Generic over `Read + Seek` so the same code reads a `File` in the page (a few bytes at a time,
//! never the whole footage in memory) and a file on disk in the native tests. Only the video track
//! is read; sound and subtitles are skipped.

use std::io::{Read, Seek, SeekFrom};

use matroska_demuxer::{Frame, MatroskaFile, TrackType};

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
pub enum Demuxer<R: Read + Seek> {
    WebM {
        file: Box<MatroskaFile<R>>,
        track: u64,
        /// Nanoseconds per unit of the file's timestamps.
        scale_ns: u64,
        /// The first frame, read ahead while opening (the VP9 profile is in its header).
        pending: Option<Chunk>,
    },
    Mp4 {
        reader: R,
        samples: Vec<re_mp4::Sample>,
        timescale: u64,
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
        reader
            .seek(SeekFrom::Start(0))
            .map_err(|e| format!("cannot read: {e}"))?;
        if n >= 4 && head[..4] == [0x1A, 0x45, 0xDF, 0xA3] {
            open_webm(reader)
        } else if n >= 8 && &head[4..8] == b"ftyp" {
            open_mp4(reader, size)
        } else {
            Err("neither WebM nor MP4 (the page reads those two itself)".into())
        }
    }

    /// The next coded frame of the video track in file order, `None` at the end.
    pub fn next_chunk(&mut self) -> Result<Option<Chunk>, DemuxError> {
        match self {
            Demuxer::WebM {
                file,
                track,
                scale_ns,
                pending,
            } => match pending.take() {
                Some(first) => Ok(Some(first)),
                None => next_webm_frame(file, *track, *scale_ns, false),
            },
            Demuxer::Mp4 {
                reader,
                samples,
                timescale,
                next,
                size,
            } => {
                let Some(sample) = samples.get(*next) else {
                    return Ok(None);
                };
                *next += 1;
                let broken = |e: std::io::Error| {
                    format!(
                        "frame {} lies outside the file ({e}); is it cut short?",
                        *next
                    )
                };
                if sample.offset.saturating_add(sample.size) > *size {
                    return Err(format!(
                        "frame {} lies outside the file; is it cut short?",
                        *next
                    ));
                }
                reader
                    .seek(SeekFrom::Start(sample.offset))
                    .map_err(broken)?;
                let len = usize::try_from(sample.size).map_err(|e| e.to_string())?;
                let mut data = vec![0u8; len];
                reader.read_exact(&mut data).map_err(broken)?;
                Ok(Some(Chunk {
                    data,
                    timestamp_us: to_micros(sample.composition_timestamp, *timescale),
                    key: sample.is_sync,
                }))
            }
        }
    }
}

fn read_up_to(reader: &mut impl Read, buf: &mut [u8]) -> std::io::Result<usize> {
    let mut filled = 0;
    while filled < buf.len() {
        match reader.read(&mut buf[filled..])? {
            0 => break,
            n => filled += n,
        }
    }
    Ok(filled)
}

/// The demuxer's message, with its input errors spelt out (they print as "None" otherwise).
fn webm_error(e: matroska_demuxer::DemuxError) -> String {
    match e {
        matroska_demuxer::DemuxError::IoError(io)
            if io.kind() == std::io::ErrorKind::UnexpectedEof =>
        {
            "the file ends early (cut short?)".into()
        }
        matroska_demuxer::DemuxError::IoError(io) => io.to_string(),
        other => other.to_string(),
    }
}

fn to_micros(time: i64, timescale: u64) -> i64 {
    let scale = i128::from(timescale.max(1));
    (i128::from(time) * 1_000_000 / scale) as i64
}

fn open_webm<R: Read + Seek>(reader: R) -> Result<(Demuxer<R>, VideoTrack), DemuxError> {
    let file = MatroskaFile::open(reader)
        .map_err(|e| format!("not a readable WebM: {}", webm_error(e)))?;
    let entry = file
        .tracks()
        .iter()
        .find(|t| t.track_type() == TrackType::Video)
        .ok_or("the WebM holds no video track")?;
    let video = entry.video().ok_or("the WebM's video track has no size")?;
    let (coded_width, coded_height) = (
        u32::try_from(video.pixel_width().get()).map_err(|e| e.to_string())?,
        u32::try_from(video.pixel_height().get()).map_err(|e| e.to_string())?,
    );
    let codec_id = entry.codec_id().to_string();
    let private = entry.codec_private().map(<[u8]>::to_vec);
    let track = entry.track_number().get();
    let scale_ns = file.info().timestamp_scale().get();
    let mut file = Box::new(file);
    let first = next_webm_frame(&mut file, track, scale_ns, true)?
        .ok_or("the WebM's video track has no frames")?;
    let (codec, description) = match codec_id.as_str() {
        "V_VP8" => ("vp8".to_string(), None),
        "V_VP9" => (vp9_codec(&first.data), None),
        "V_AV1" => (
            private
                .as_deref()
                .and_then(av1_codec)
                .ok_or("the AV1 track has no usable configuration record")?,
            private,
        ),
        "V_MPEG4/ISO/AVC" => (
            private
                .as_deref()
                .and_then(avc_codec)
                .ok_or("the H.264 track has no usable configuration record")?,
            private,
        ),
        other => {
            return Err(format!(
                "its video codec {other} is not one the page decodes"
            ))
        }
    };
    let info = VideoTrack {
        container: "webm",
        codec,
        description,
        coded_width,
        coded_height,
        frames: None,
    };
    let demuxer = Demuxer::WebM {
        file,
        track,
        scale_ns,
        pending: Some(first),
    };
    Ok((demuxer, info))
}

/// The next frame of `track`, skipping other tracks' frames and frames never shown. A block group
/// does not say whether it is a key frame; the first frame always is.
fn next_webm_frame<R: Read + Seek>(
    file: &mut MatroskaFile<R>,
    track: u64,
    scale_ns: u64,
    first: bool,
) -> Result<Option<Chunk>, DemuxError> {
    let mut frame = Frame::default();
    loop {
        let more = file.next_frame(&mut frame).map_err(|e| {
            format!(
                "the WebM is damaged after its last good frame: {}",
                webm_error(e)
            )
        })?;
        if !more {
            return Ok(None);
        }
        if frame.track != track {
            continue;
        }
        let ns = i128::from(frame.timestamp) * i128::from(scale_ns);
        return Ok(Some(Chunk {
            data: std::mem::take(&mut frame.data),
            timestamp_us: (ns / 1000) as i64,
            key: frame.is_keyframe.unwrap_or(first),
        }));
    }
}

/// VP9's codec string from the profile in a frame's first byte (VP9 bitstream specification,
/// uncompressed header: frame marker, then the profile's low and high bits). Profiles 2 and 3 are
/// the high-bit-depth ones; 10 bits is assumed for them.
fn vp9_codec(frame: &[u8]) -> String {
    let byte = frame.first().copied().unwrap_or(0);
    let profile = ((byte >> 5) & 1) | (((byte >> 4) & 1) << 1);
    let depth = if profile >= 2 { 10 } else { 8 };
    format!("vp09.{profile:02}.10.{depth:02}")
}

/// `avc1.PPCCLL` from an AVCDecoderConfigurationRecord (ISO/IEC 14496-15): profile, constraint
/// flags and level are its bytes 1 to 3.
fn avc_codec(record: &[u8]) -> Option<String> {
    let [_, profile, constraints, level, ..] = record else {
        return None;
    };
    Some(format!("avc1.{profile:02X}{constraints:02X}{level:02X}"))
}

/// `av01.P.LLT.DD` from an AV1CodecConfigurationRecord (AV1 ISOBMFF binding, section 2.3).
fn av1_codec(record: &[u8]) -> Option<String> {
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

fn open_mp4<R: Read + Seek>(
    mut reader: R,
    size: u64,
) -> Result<(Demuxer<R>, VideoTrack), DemuxError> {
    let mp4 =
        re_mp4::Mp4::read(&mut reader, size).map_err(|e| format!("not a readable MP4: {e}"))?;
    let track = mp4
        .tracks()
        .values()
        .find(|t| t.kind == Some(re_mp4::TrackKind::Video))
        .ok_or("the MP4 holds no video track")?;
    let codec = track
        .codec_string(&mp4)
        .ok_or("the MP4's video codec is not one the page decodes")?;
    if track.samples.is_empty() {
        return Err("the MP4's video track has no frames".into());
    }
    // VP8 and VP9 take no description in WebCodecs; H.264, HEVC and AV1 take their record.
    let vpx = codec == "vp8" || codec.starts_with("vp09");
    let info = VideoTrack {
        container: "mp4",
        description: track.raw_codec_config(&mp4).filter(|_| !vpx),
        codec,
        coded_width: u32::from(track.width),
        coded_height: u32::from(track.height),
        frames: u32::try_from(track.samples.len()).ok(),
    };
    reader
        .seek(SeekFrom::Start(0))
        .map_err(|e| format!("cannot read: {e}"))?;
    let demuxer = Demuxer::Mp4 {
        reader,
        samples: track.samples.clone(),
        timescale: track.timescale,
        next: 0,
        size,
    };
    Ok((demuxer, info))
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
