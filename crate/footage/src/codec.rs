//! What the browser's video decoder is told about a video track and given for each frame, and
//! the WebCodecs codec strings built from the codecs' own configuration records. Shared by the
//! WebM and MP4 readers.

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
}
