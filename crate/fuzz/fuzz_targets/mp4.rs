//! MP4 footage as the page reads it for the browser's video decoder: whether it is cut short, and
//! every coded frame.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_footage::demux::Demuxer;

fuzz_target!(|data: &[u8]| {
    let mut with_magic = vec![0, 0, 0, 16, b'f', b't', b'y', b'p', b'i', b's', b'o', b'm', 0, 0, 2, 0];
    with_magic.extend_from_slice(data);
    let size = with_magic.len() as u64;
    if let Ok((mut d, _)) = Demuxer::open(std::io::Cursor::new(with_magic), size) {
        let _ = d.cut_short();
        while let Ok(Some(_)) = d.next_chunk() {}
    }
});
