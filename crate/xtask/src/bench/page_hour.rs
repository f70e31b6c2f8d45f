//! The page's two speed goals, for the goals table: one hour of detections (90,000 frames at
//! about 30 boxes, simulated once under target/bench/page-hour) opened, tracked and counted in
//! headless Chromium as a person does it (tests/bench/page_hour.mjs), and the core's own calls
//! there (`Session.loadDetections`, `Session.track("sort")`) against the same calls natively
//! (the `read` and `track` stages of the release command line) on the same file.

use std::path::Path;

use super::measure::least_reported;
use super::scene::{simulate_scene, Sim};
use crate::sh::node_output;
use crate::site::build_with_browser_driver;

/// What the page and the core in it measured on the hour (seconds).
pub struct PageHour {
    /// Frames and boxes of the file.
    pub frames: u32,
    pub boxes: usize,
    /// From choosing the file to its summary shown, from Run to the tracks shown, from there to
    /// the counts on screen, and the whole.
    pub load: f64,
    pub track: f64,
    pub count: f64,
    pub total: f64,
    /// Samples (every 50 ms) in which the reading bar and the tracking bar were seen, and the
    /// longest time the page did not run its timer (frozen).
    pub reading_samples: u64,
    pub bar_samples: u64,
    pub longest_frozen: f64,
    /// The core's tracking and reading, in Chromium (least after a first run) and natively.
    pub wasm_track: f64,
    pub native_track: f64,
    pub wasm_read: f64,
    pub native_read: f64,
}

/// Simulates the hour (once; `quick`: a tenth of it, which says nothing of the goal), and
/// measures it in the page and natively.
pub fn page_hour(bin: &str, quick: bool) -> Result<PageHour, String> {
    let frames = if quick { 9_000 } else { 90_000 };
    let folder = if quick {
        "page-hour-quick"
    } else {
        "page-hour"
    };
    let dir = super::scene::bench_dir(folder)?;
    let file = dir.join("detections.txt");
    let plan = dir.join("plan.json");
    if !file.exists() || !plan.exists() {
        simulate_scene(bin, &hour_scene(folder, frames))?;
    }
    let (native_read, native_track) = natively(bin, &file, if quick { 1 } else { 3 })?;
    build_with_browser_driver()?;
    let runs = if quick { "1" } else { "3" };
    let boxes = super::read(&file)?.iter().filter(|&&b| b == b'\n').count();
    let out = node_output(&[
        "tests/bench/page_hour.mjs",
        &file.display().to_string(),
        &plan.display().to_string(),
        runs,
    ])?;
    let line = out
        .lines()
        .rev()
        .find(|l| l.starts_with('{'))
        .ok_or_else(|| format!("tests/bench/page_hour.mjs printed no figures: {out}"))?;
    let v: serde_json::Value = serde_json::from_str(line).map_err(|e| format!("{e}: {line}"))?;
    let num = |path: &str| {
        v.pointer(path)
            .and_then(serde_json::Value::as_f64)
            .ok_or_else(|| format!("tests/bench/page_hour.mjs gave no {path}: {line}"))
    };
    Ok(PageHour {
        frames,
        boxes,
        load: num("/load")?,
        track: num("/track")?,
        count: num("/count")?,
        total: num("/total")?,
        reading_samples: num("/progress/readingShown")? as u64,
        bar_samples: num("/progress/barShown")? as u64,
        longest_frozen: num("/progress/longestFrozen")?,
        wasm_track: num("/core/track")?,
        native_track,
        wasm_read: num("/core/read")?,
        native_read,
    })
}

/// The hour's scene: the plaza at 640 × 360, about 30 detections a frame (47 in view, 12%
/// missed), 25 frames a second, so 90,000 frames are one hour.
fn hour_scene(folder: &str, frames: u32) -> Sim<'_> {
    Sim::plaza(folder, frames, 47.0)
}

/// Reading and tracking natively with `sort`: the `read` and `track` stages of a release
/// `throughline track IN -o OUT.json --method sort --stats` (JSON out, so that the whole file is
/// read by `read_detections` and tracked by `pipeline::tracker_config` + `pipeline::track`, the
/// calls the page's Session makes; the `read` stage also reads the file from the disk's cache),
/// the least of `runs`.
fn natively(bin: &str, path: &Path, runs: usize) -> Result<(f64, f64), String> {
    let inp = path.display().to_string();
    let out = path.with_extension("native.json").display().to_string();
    let args = [
        "track", &inp, "--method", "sort", "-o", &out, "--quiet", "--stats",
    ];
    let read = least_reported(runs, bin, &args, "(read ")?;
    let track = least_reported(runs, bin, &args, ", track ")?;
    let _ = std::fs::remove_file(&out);
    Ok((read, track))
}
