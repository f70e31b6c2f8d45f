//! A day of one camera (2,000,000 frames at about 30 boxes) tracked by `throughline track -o
//! OUT.txt`, for the memory goal: 20,000 simulated frames (density 42, 12% missed) repeated
//! 100 times one after another, written once under target/bench/day (2.9 GB; `--quick`: 10
//! times, 200,000 frames, which says nothing of the goal and is marked so).

use std::io::Write;
use std::path::Path;

use super::measure::measure;
use super::scene::{bench_dir, simulate_scene, Sim};

/// What the day's run measured.
pub struct Day {
    pub figure: String,
    pub peak_mib: f64,
    pub seconds: f64,
}

const SEGMENT_FRAMES: u32 = 20_000;

pub fn day_bench(bin: &str, quick: bool) -> Result<Day, String> {
    let repeats = if quick { 10 } else { 100 };
    let dir = bench_dir("day")?;
    std::fs::create_dir_all(&dir).map_err(|e| format!("{}: {e}", dir.display()))?;
    let file = dir.join(format!("day-{repeats}.txt"));
    if !file.exists() {
        let (seg, _) = simulate_scene(bin, &Sim::plaza("day-segment", SEGMENT_FRAMES, 42.0))?;
        repeat(&seg.join("detections.txt"), &file, repeats)?;
    }
    let out = dir.join("day-tracks.txt");
    let (inp, o) = (file.display().to_string(), out.display().to_string());
    let m = measure(bin, &["track", &inp, "-o", &o, "--quiet", "--stats"])?;
    let _ = std::fs::remove_file(&out);
    let frames = u64::from(SEGMENT_FRAMES) * repeats;
    let bytes = std::fs::metadata(&file).map_or(0, |m| m.len());
    Ok(Day {
        figure: format!(
            "{frames} frames of detections ({:.1} GB of benchmark text{}) tracked with sort",
            bytes as f64 / 1e9,
            if quick {
                "; --quick: not the goal's size"
            } else {
                ""
            }
        ),
        peak_mib: m.peak_mib,
        seconds: m.seconds,
    })
}

/// Writes `segment`'s rows `repeats` times, each time `SEGMENT_FRAMES` frames later, to `out`
/// (through a temporary file, so a stopped run leaves no half file to be taken for a whole one).
fn repeat(segment: &Path, out: &Path, repeats: u64) -> Result<(), String> {
    let text =
        std::fs::read_to_string(segment).map_err(|e| format!("{}: {e}", segment.display()))?;
    let rows: Vec<(u64, &str)> = text
        .lines()
        .filter_map(|l| {
            let (frame, rest) = l.split_once(',')?;
            Some((frame.parse().ok()?, rest))
        })
        .collect();
    let temp = out.with_extension("part");
    let file = std::fs::File::create(&temp).map_err(|e| format!("{}: {e}", temp.display()))?;
    let mut w = std::io::BufWriter::with_capacity(1 << 20, file);
    for r in 0..repeats {
        let offset = r * u64::from(SEGMENT_FRAMES);
        for (frame, rest) in &rows {
            writeln!(w, "{},{rest}", frame + offset).map_err(|e| e.to_string())?;
        }
    }
    w.flush().map_err(|e| e.to_string())?;
    drop(w);
    std::fs::rename(&temp, out).map_err(|e| e.to_string())
}
