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
pub use crate::codec::{Chunk, VideoTrack};
use crate::mp4::{read_movie, Sample};
use crate::webm::WebM;

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
        /// The file's size.
        size: u64,
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
                size,
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

    /// Why the file is cut short (an interrupted copy or recording), when its container says so
    /// before any frame is read: a WebM whose segment says it ends past the file's end, an MP4
    /// whose frames lie past it. `None` when it looks whole (a live recording's WebM may not say
    /// its length: reading it to its end is the only test then).
    pub fn cut_short(&self) -> Option<String> {
        let mb = |bytes: u64| format!("{:.1} MB", bytes as f64 / 1e6);
        match &self.kind {
            Kind::WebM { state, size, .. } => state.declared_end_past(*size).map(|end| {
                format!(
                    "it says it is {} long, but the file holds {} (about {:.0}% of it)",
                    mb(end),
                    mb(*size),
                    100.0 * *size as f64 / end as f64
                )
            }),
            Kind::Mp4 { samples, size, .. } => {
                let whole = samples
                    .iter()
                    .take_while(|s| s.offset.saturating_add(u64::from(s.size)) <= *size)
                    .count();
                (whole < samples.len()).then(|| {
                    format!(
                        "it says it holds {} frames, but only the first {whole} lie within the file",
                        samples.len()
                    )
                })
            }
        }
    }

    /// The next coded frame of the video track in file order, `None` at the end.
    pub fn next_chunk(&mut self) -> Result<Option<Chunk>, DemuxError> {
        match &mut self.kind {
            Kind::WebM { state, pending, .. } => match pending.take() {
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

#[cfg(test)]
mod tests {
    use super::*;

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
