//! Tracker and detector settings files.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::detect::DetectorConfig;
use throughline_core::track::resolve_config;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let _ = resolve_config(None, Some(text), true);
    let _ = DetectorConfig::from_json(text);
});
