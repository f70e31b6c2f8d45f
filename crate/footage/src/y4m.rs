//! The YUV4MPEG2 stream (as ffmpeg writes with `-f yuv4mpegpipe`): its header (picture size, frame
//! rate and colour layout, so a reader knows how many bytes each frame holds), then frames, each a
//! `FRAME` line and the planes. [`Reader`] reads them one at a time from any `BufRead` (a file or
//! standard input), so footage is never held whole.

use std::io::{BufRead, Read, Seek, SeekFrom};
use throughline_core::limits::{self, MAX_PICTURE_SIDE as MAX_SIDE};

/// Colour layout of the frames.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Layout {
    /// 4:2:0: a luma plane, then two chroma planes of half width and height (rounded up).
    Yuv420,
    /// Luma only.
    Mono,
}

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Header {
    pub width: usize,
    pub height: usize,
    /// Frames per second, when the header says (`F30000:1001`).
    pub frame_rate: Option<f64>,
    pub layout: Layout,
}

impl Header {
    /// Bytes of one frame's pictures (without the `FRAME` line).
    pub fn frame_bytes(&self) -> usize {
        let luma = self.width * self.height;
        match self.layout {
            Layout::Mono => luma,
            Layout::Yuv420 => luma + 2 * self.width.div_ceil(2) * self.height.div_ceil(2),
        }
    }
}

/// Parses the header line (without its newline). Errors say what to fix.
pub fn parse_header(line: &str) -> Result<Header, String> {
    let mut parts = line.split(' ');
    if parts.next() != Some("YUV4MPEG2") {
        return Err(
            "not a YUV4MPEG2 stream (it must start with `YUV4MPEG2`); make one with \
                    `ffmpeg -i INPUT -pix_fmt yuv420p -f yuv4mpegpipe OUTPUT.y4m`"
                .into(),
        );
    }
    let (mut width, mut height, mut frame_rate) = (None, None, None);
    let mut layout = Layout::Yuv420;
    for p in parts.filter(|p| !p.is_empty()) {
        let mut chars = p.chars();
        let tag = chars.next().unwrap_or(' ');
        let value = chars.as_str();
        match tag {
            'W' => width = value.parse::<usize>().ok().filter(|&w| w > 0),
            'H' => height = value.parse::<usize>().ok().filter(|&h| h > 0),
            'F' => {
                let (n, d) = value.split_once(':').unwrap_or((value, "1"));
                if let (Ok(n), Ok(d)) = (n.parse::<f64>(), d.parse::<f64>()) {
                    frame_rate = (n > 0.0 && d > 0.0).then_some(n / d);
                }
            }
            'C' => {
                layout = if value.starts_with("420") {
                    Layout::Yuv420
                } else if value.starts_with("mono") {
                    Layout::Mono
                } else {
                    return Err(format!(
                        "colour layout C{value} is not supported (4:2:0 or mono are); \
                         convert with ffmpeg's `-pix_fmt yuv420p`"
                    ));
                };
                if value.contains("p10") || value.contains("p12") || value.contains("p16") {
                    return Err(format!(
                        "C{value} has more than 8 bits per sample; convert with `-pix_fmt yuv420p`"
                    ));
                }
            }
            _ => {}
        }
    }
    match (width, height) {
        (Some(width), Some(height)) if width <= MAX_SIDE && height <= MAX_SIDE => Ok(Header {
            width,
            height,
            frame_rate,
            layout,
        }),
        _ => Err(format!(
            "the YUV4MPEG2 header lacks a valid size (W… H…, up to {MAX_SIDE})"
        )),
    }
}

/// The longest header or `FRAME` line read: a stream without newlines is never read whole.
const MAX_LINE: u64 = limits::MAX_Y4M_LINE;

/// What [`Reader::next_frame`] found.
#[derive(Debug, PartialEq, Eq)]
pub enum Next<'a> {
    /// The next frame's planes (exactly [`Header::frame_bytes`]).
    Frame(&'a [u8]),
    /// The stream ended after a whole frame.
    End,
    /// The stream ended inside a frame (ffmpeg stopped, a copy interrupted): the frames before it
    /// are whole and can be kept.
    CutShort,
}

/// Frames of a YUV4MPEG2 stream, one at a time.
pub struct Reader<R: BufRead> {
    input: R,
    header: Header,
    line: Vec<u8>,
    frame: Vec<u8>,
    frames_read: usize,
}

impl<R: BufRead> Reader<R> {
    /// Reads the header. Errors say what to fix.
    pub fn new(mut input: R) -> Result<Self, String> {
        let mut line = Vec::new();
        short_line(&mut input, &mut line).map_err(|e| e.to_string())?;
        let text = String::from_utf8_lossy(&line);
        let header = parse_header(text.trim_end())?;
        Ok(Reader {
            input,
            frame: vec![0u8; header.frame_bytes()],
            header,
            line,
            frames_read: 0,
        })
    }

    pub fn header(&self) -> &Header {
        &self.header
    }

    /// Frames read whole so far.
    pub fn frames_read(&self) -> usize {
        self.frames_read
    }

    /// The next frame. An error for a stream that cannot be read or is damaged (a frame that does
    /// not start with `FRAME`).
    pub fn next_frame(&mut self) -> Result<Next<'_>, String> {
        if short_line(&mut self.input, &mut self.line).map_err(|e| e.to_string())? == 0 {
            return Ok(Next::End);
        }
        let k = self.frames_read + 1;
        if !self.line.starts_with(b"FRAME") {
            return Err(format!(
                "frame {k} does not start with FRAME: the stream is damaged or not YUV4MPEG2"
            ));
        }
        if self.input.read_exact(&mut self.frame).is_err() {
            return Ok(Next::CutShort);
        }
        self.frames_read = k;
        Ok(Next::Frame(&self.frame))
    }
}

impl<R: BufRead + Seek> Reader<R> {
    /// Passes over the next frame without reading its planes (a seek past them): `false` at the
    /// end. For a first reading that needs only some frames; a frame cut short at the very end is
    /// passed over as if whole (a reading with [`Self::next_frame`] finds it cut short).
    pub fn pass_frame(&mut self) -> Result<bool, String> {
        if short_line(&mut self.input, &mut self.line).map_err(|e| e.to_string())? == 0 {
            return Ok(false);
        }
        let k = self.frames_read + 1;
        if !self.line.starts_with(b"FRAME") {
            return Err(format!(
                "frame {k} does not start with FRAME: the stream is damaged or not YUV4MPEG2"
            ));
        }
        let bytes = i64::try_from(self.frame.len()).map_err(|e| e.to_string())?;
        self.input
            .seek(SeekFrom::Current(bytes))
            .map_err(|e| e.to_string())?;
        self.frames_read = k;
        Ok(true)
    }
}

/// Reads one header or FRAME line into `line` (at most [`MAX_LINE`] bytes). Returns the bytes read
/// (0 at the end).
fn short_line(input: &mut impl BufRead, line: &mut Vec<u8>) -> std::io::Result<usize> {
    line.clear();
    input.by_ref().take(MAX_LINE).read_until(b'\n', line)
}
