//! YUV4MPEG2 streams: the header and every frame, read once for the detector's background, then
//! each frame given to the detector.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::detect::{Detector, DetectorConfig, Picture};
use throughline_footage::y4m::{Layout, Next, Reader};

fuzz_target!(|data: &[u8]| {
    let Ok(mut reader) = Reader::new(std::io::Cursor::new(data)) else { return };
    let h = *reader.header();
    // Small pictures only: the detector's work grows with the picture, not with the input.
    if h.width * h.height > 1 << 16 {
        return;
    }
    let mut detector = Detector::new(DetectorConfig { warm_up_frames: 1, ..DetectorConfig::default() }, h.width, h.height);
    // The first reading, for the background from the whole clip (as the command line reads a file).
    if let Ok(mut first) = Reader::new(std::io::Cursor::new(data)) {
        while let Ok(Next::Frame(frame)) = first.next_frame() {
            match Picture::planar(h.width, h.height, frame, h.layout == Layout::Yuv420) {
                Some(pic) if detector.wants_sample() => drop(detector.sample(&pic)),
                _ => detector.pass_sample(),
            }
        }
    }
    while let Ok(Next::Frame(frame)) = reader.next_frame() {
        if let Some(pic) = Picture::planar(h.width, h.height, frame, h.layout == Layout::Yuv420) {
            let _ = detector.detect_found(&pic);
        }
    }
});
