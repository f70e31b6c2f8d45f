//! Batch manifests: read and checked; every entry's values looked at.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::manifest::read_manifest;

fuzz_target!(|data: &[u8]| {
    if let Ok(entries) = read_manifest(data) {
        for e in &entries {
            let _ = (e.name(), e.plan(), e.fields().count());
        }
    }
});
