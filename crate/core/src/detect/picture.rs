//! Pictures as the detector takes them: planar YUV 4:2:0 (or luma only), and the conversion from
//! the RGBA pixels a browser canvas gives.

/// One picture: luma plane, and the two chroma planes at half size when there is colour.
#[derive(Debug, Clone, Copy)]
pub struct Picture<'a> {
    pub width: usize,
    pub height: usize,
    pub y: &'a [u8],
    pub uv: Option<(&'a [u8], &'a [u8])>,
}

impl<'a> Picture<'a> {
    /// Size of each chroma plane of a 4:2:0 picture (half, rounded up).
    pub fn chroma_size(width: usize, height: usize) -> (usize, usize) {
        (width.div_ceil(2), height.div_ceil(2))
    }

    /// A picture over planar bytes: luma then, when `colour`, the two 4:2:0 chroma planes (as a
    /// YUV4MPEG2 frame holds them). `None` when `bytes` is too short.
    pub fn planar(width: usize, height: usize, bytes: &'a [u8], colour: bool) -> Option<Self> {
        let luma = width * height;
        let (cw, ch) = Self::chroma_size(width, height);
        let chroma = cw * ch;
        let need = if colour { luma + 2 * chroma } else { luma };
        if bytes.len() < need {
            return None;
        }
        Some(Picture {
            width,
            height,
            y: &bytes[..luma],
            uv: colour.then(|| {
                (
                    &bytes[luma..luma + chroma],
                    &bytes[luma + chroma..luma + 2 * chroma],
                )
            }),
        })
    }
}

/// Planar YUV 4:2:0 (BT.601 full range, as JPEG and YUV4MPEG2 `C420jpeg`) from RGBA pixels, row by
/// row from the top-left, as a browser canvas gives them; chroma is the mean of each 2x2 block.
/// Returns the three planes one after another; `None` when `rgba` is shorter than `4 * w * h`.
pub fn rgba_to_yuv420(rgba: &[u8], width: usize, height: usize) -> Option<Vec<u8>> {
    if rgba.len() < 4 * width * height {
        return None;
    }
    let (cw, ch) = Picture::chroma_size(width, height);
    let mut out = vec![0u8; width * height + 2 * cw * ch];
    let (luma, chroma) = out.split_at_mut(width * height);
    let (u_plane, v_plane) = chroma.split_at_mut(cw * ch);
    for y in 0..height {
        for x in 0..width {
            let p = &rgba[4 * (y * width + x)..][..3];
            let (r, g, b) = (f32::from(p[0]), f32::from(p[1]), f32::from(p[2]));
            luma[y * width + x] = (0.299 * r + 0.587 * g + 0.114 * b)
                .round()
                .clamp(0.0, 255.0) as u8;
        }
    }
    for cy in 0..ch {
        for cx in 0..cw {
            let (mut su, mut sv, mut n) = (0.0f32, 0.0f32, 0.0f32);
            for y in 2 * cy..(2 * cy + 2).min(height) {
                for x in 2 * cx..(2 * cx + 2).min(width) {
                    let p = &rgba[4 * (y * width + x)..][..3];
                    let (r, g, b) = (f32::from(p[0]), f32::from(p[1]), f32::from(p[2]));
                    su += -0.168_736 * r - 0.331_264 * g + 0.5 * b;
                    sv += 0.5 * r - 0.418_688 * g - 0.081_312 * b;
                    n += 1.0;
                }
            }
            u_plane[cy * cw + cx] = (128.0 + su / n).round().clamp(0.0, 255.0) as u8;
            v_plane[cy * cw + cx] = (128.0 + sv / n).round().clamp(0.0, 255.0) as u8;
        }
    }
    Some(out)
}
