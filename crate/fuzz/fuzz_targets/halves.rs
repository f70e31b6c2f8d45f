//! A detections file read in two parts (`throughline` reads a large file so, on two threads)
//! against the same file read whole: the first two bytes say where to cut (the cut moves on to
//! the next line end), the rest is the file. The merged parts give the same report, or the same
//! error, as the whole reader.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::detections::{cut_near, merge, read_detections};

fuzz_target!(|data: &[u8]| {
    let Some((near, body)) = data.split_first_chunk::<2>() else { return };
    let near = usize::from(u16::from_le_bytes(*near)) % (body.len() + 1);
    let Some(cut) = cut_near(body, near) else { return };
    assert!(cut.at > 0 && cut.at < body.len() && body[cut.at - 1] == b'\n');
    let parts = merge(cut.read_first(body), cut.read_second(body));
    assert_eq!(parts, read_detections(body));
});
