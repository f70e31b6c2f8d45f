//! The YUV4MPEG2 stream header (as ffmpeg writes with `-f yuv4mpegpipe`): picture size, frame rate
//! and colour layout, so a reader knows how many bytes each frame holds. The bytes themselves are
//! read by the adapter; this module only parses text.

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
        let (tag, value) = p.split_at(1);
        match tag {
            "W" => width = value.parse::<usize>().ok().filter(|&w| w > 0),
            "H" => height = value.parse::<usize>().ok().filter(|&h| h > 0),
            "F" => {
                let (n, d) = value.split_once(':').unwrap_or((value, "1"));
                if let (Ok(n), Ok(d)) = (n.parse::<f64>(), d.parse::<f64>()) {
                    frame_rate = (n > 0.0 && d > 0.0).then_some(n / d);
                }
            }
            "C" => {
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
        (Some(width), Some(height)) if width <= 16384 && height <= 16384 => Ok(Header {
            width,
            height,
            frame_rate,
            layout,
        }),
        _ => Err("the YUV4MPEG2 header lacks a valid size (W… H…, up to 16384)".into()),
    }
}
