//! The YUV4MPEG2 header as ffmpeg writes it (`-f yuv4mpegpipe`), and what is refused.

use throughline_footage::y4m;

#[test]
fn y4m_headers_as_ffmpeg_writes_them() {
    let h = y4m::parse_header("YUV4MPEG2 W768 H576 F10:1 Ip A1:1 C420jpeg XYSCSS=420JPEG").unwrap();
    assert_eq!(
        (h.width, h.height, h.frame_rate, h.layout),
        (768, 576, Some(10.0), y4m::Layout::Yuv420)
    );
    assert_eq!(h.frame_bytes(), 768 * 576 * 3 / 2);
    let h = y4m::parse_header("YUV4MPEG2 W641 H361 F30000:1001 Cmono").unwrap();
    assert_eq!(h.layout, y4m::Layout::Mono);
    assert_eq!(h.frame_bytes(), 641 * 361);
    assert!((h.frame_rate.unwrap() - 29.97).abs() < 0.01);
    // Without a C tag the stream is 4:2:0 (the format's default); odd sizes round chroma up.
    assert_eq!(
        y4m::parse_header("YUV4MPEG2 W3 H3").unwrap().frame_bytes(),
        9 + 2 * 4
    );
    assert!(y4m::parse_header("YUV4MPEG2 W640 H360 C444")
        .unwrap_err()
        .contains("yuv420p"));
    assert!(y4m::parse_header("YUV4MPEG2 W640 H360 C420p10")
        .unwrap_err()
        .contains("8 bits"));
    assert!(y4m::parse_header("YUV4MPEG2 H360")
        .unwrap_err()
        .contains("size"));
    assert!(y4m::parse_header("RIFF....AVI")
        .unwrap_err()
        .contains("ffmpeg"));
}

#[test]
fn frames_passed_over_leave_the_next_ones_whole() {
    // A 2x2 mono stream of four frames, the last cut short (the format's own layout: a FRAME line
    // before each frame's bytes).
    let mut bytes = b"YUV4MPEG2 W2 H2 Cmono\n".to_vec();
    for k in 1..=3u8 {
        bytes.extend_from_slice(b"FRAME\n");
        bytes.extend_from_slice(&[k; 4]);
    }
    bytes.extend_from_slice(b"FRAME\n\x04\x04");
    let mut r = y4m::Reader::new(std::io::Cursor::new(bytes)).unwrap();
    assert_eq!(r.pass_frame(), Ok(true));
    assert_eq!(r.next_frame(), Ok(y4m::Next::Frame(&[2; 4][..])));
    assert_eq!(r.pass_frame(), Ok(true));
    assert_eq!(r.frames_read(), 3);
    // The cut-short frame is passed over as if whole; then the end.
    assert_eq!(r.pass_frame(), Ok(true));
    assert_eq!(r.pass_frame(), Ok(false));
    let mut bad = y4m::Reader::new(std::io::Cursor::new(
        b"YUV4MPEG2 W2 H2 Cmono\nFRAMX\n".to_vec(),
    ))
    .unwrap();
    assert!(bad.pass_frame().unwrap_err().contains("FRAME"));
}
