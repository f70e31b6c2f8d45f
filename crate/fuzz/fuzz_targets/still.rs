//! The still's header (PNG or JPEG), read for its size.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Some((w, h)) = throughline_core::handin::picture_size(data) {
        assert!(w > 0 && h > 0);
    }
});
