//! `cargo xtask bench --big-frame`: one crowded frame. A grid of 1,000, 10,000 and 100,000 boxes,
//! each overlapping the 48 around it (about a dozen of them at IoU ≥ 0.3, SORT's gate), then the
//! same boxes moved a little, tracked with `sort` by the release build of `throughline track
//! --stats` (two frames: the second is one association of every track with every box). Printed and
//! written into BENCHMARKS.md between its markers.

use std::fmt::Write as _;
use std::process::Command;

use super::measure::machine_line;
use super::scene::bench_dir;
use super::table::write_section;
use crate::builds::build_cli;
use crate::paths::{cli_binary, root};

/// Boxes per frame in the three runs.
const SIZES: [usize; 3] = [1_000, 10_000, 100_000];

/// Timed runs per size; the fastest is kept.
const RUNS: usize = 3;

/// What one run of `track --stats` reported.
struct Stats {
    total: f64,
    track: f64,
    peak_mib: f64,
    crowded: bool,
}

pub fn big_frame_bench() -> Result<(), String> {
    build_cli()?;
    let bin = cli_binary()?;
    let dir = bench_dir("big-frame")?;
    std::fs::create_dir_all(&dir).map_err(|e| format!("{}: {e}", dir.display()))?;
    let mut table = format!(
        "<!-- big-frame:begin -->\nMeasured by `cargo xtask bench --big-frame` on {}.\n\n\
         | boxes per frame | whole run s | tracking s | peak MiB | exact |\n|---|---|---|---|---|\n",
        machine_line()
    );
    for n in SIZES {
        let s = measure_frame(&bin, &dir, n)?;
        let _ = writeln!(
            table,
            "| {n} | {:.3} | {:.3} | {:.1} | {} |",
            s.total,
            s.track,
            s.peak_mib,
            if s.crowded {
                "no (crowd warning)"
            } else {
                "yes"
            }
        );
    }
    table.push_str("<!-- big-frame:end -->");
    write_section("<!-- big-frame:begin -->", "<!-- big-frame:end -->", &table)?;
    println!("{table}");
    Ok(())
}

/// The fastest of [`RUNS`] runs on two frames of `n` boxes: the JSON tracks document is written,
/// so that `--stats` times the tracking stage on its own (benchmark text output is read, tracked
/// and written at once, in pieces).
fn measure_frame(bin: &str, dir: &std::path::Path, n: usize) -> Result<Stats, String> {
    let input = dir.join(format!("boxes-{n}.txt"));
    std::fs::write(&input, two_frames(n)).map_err(|e| format!("{}: {e}", input.display()))?;
    let output = dir.join(format!("tracks-{n}.json"));
    let args = [
        "track",
        &input.display().to_string(),
        "--method",
        "sort",
        "--stats",
        "-o",
        &output.display().to_string(),
    ]
    .map(String::from);
    let mut best: Option<Stats> = None;
    for _ in 0..RUNS {
        let s = run(bin, &args)?;
        if best.as_ref().is_none_or(|b| s.total < b.total) {
            best = Some(s);
        }
    }
    best.ok_or_else(|| "no run".to_string())
}

/// For the goals table: the whole run on one frame of 10,000 overlapping boxes (after a first
/// frame of the same), in seconds, and whether it was matched exactly.
pub fn ten_thousand(bin: &str) -> Result<(f64, bool), String> {
    let dir = bench_dir("big-frame")?;
    std::fs::create_dir_all(&dir).map_err(|e| format!("{}: {e}", dir.display()))?;
    let s = measure_frame(bin, &dir, 10_000)?;
    Ok((s.total, !s.crowded))
}

/// Benchmark text of two frames of `n` boxes on a square grid 10 pixels apart, 40 pixels wide and
/// high; each box and its place are jittered by up to 4 pixels, independently in each frame, and
/// the second frame is moved 4 pixels right and 3 down. The jitter comes from a fixed hash, so the
/// file is the same on every run.
pub fn two_frames(n: usize) -> String {
    let side = (n as f64).sqrt().ceil() as usize;
    let mut text = String::with_capacity(n * 2 * 40);
    for frame in 1..=2u64 {
        let shift = if frame == 1 { (0.0, 0.0) } else { (4.0, 3.0) };
        for k in 0..n {
            let j = |which: u64| jitter(frame * 8 + which, k as u64) * 4.0;
            let x = 100.0 + (k % side) as f64 * 10.0 + shift.0 + j(0);
            let y = 100.0 + (k / side) as f64 * 10.0 + shift.1 + j(1);
            let (w, h) = (40.0 + j(2), 40.0 + j(3));
            let _ = writeln!(text, "{frame},-1,{x:.2},{y:.2},{w:.2},{h:.2},0.9");
        }
    }
    text
}

/// A number in [-1, 1) from two integers (the SplitMix64 finaliser, common practice for hashing).
fn jitter(a: u64, b: u64) -> f64 {
    let mut z = a
        .wrapping_mul(0x9E37_79B9_7F4A_7C15)
        .wrapping_add(b)
        .wrapping_add(0x9E37_79B9_7F4A_7C15);
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^= z >> 31;
    (z >> 11) as f64 / (1u64 << 52) as f64 - 1.0
}

/// One run of `throughline track --stats`: its stats line (`stats: T s (read a s, track b s, …),
/// peak memory M MiB`) and whether it warned of a crowd matched greedily.
fn run(bin: &str, args: &[String]) -> Result<Stats, String> {
    let out = Command::new(bin)
        .args(args)
        .current_dir(root())
        .stdout(std::process::Stdio::null())
        .output()
        .map_err(|e| format!("cannot start {bin}: {e}"))?;
    let stderr = String::from_utf8_lossy(&out.stderr);
    if !out.status.success() {
        return Err(format!("{bin} {} failed: {stderr}", args.join(" ")));
    }
    let after = |key: &str| -> f64 {
        stderr
            .split(key)
            .nth(1)
            .and_then(|rest| rest.split_whitespace().next())
            .and_then(|v| v.trim_end_matches(',').parse().ok())
            .unwrap_or(f64::NAN)
    };
    Ok(Stats {
        total: after("stats: "),
        track: after(", track "),
        peak_mib: after("peak memory "),
        crowded: stderr.contains("cheapest pair first"),
    })
}
