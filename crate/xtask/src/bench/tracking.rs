//! The speed table (every method at about 10, 50 and 200 detections per frame) and the grid
//! (density × miss rate: quality, counts, speed, memory), with the Python peer beside `sort`.

use super::judge::{Row, SceneSpec};
use super::measure::{machine_line, RUNS};
use super::methods::measure_scene;
use super::peer::{python_with_peers, PEER};
use super::scene::bench_dir;
use super::table::{error, write_section};
use crate::builds::build_cli;
use crate::paths::cli_binary;

/// What every scene of one run shares.
struct Run {
    bin: String,
    python: Option<String>,
    machine: String,
    /// The command as the tables name it.
    command: &'static str,
    quick: bool,
}

/// The speed table (unless `only_grid`) and the grid, written into BENCHMARKS.md and printed.
pub fn tracking_bench(quick: bool, only_grid: bool) -> Result<(), String> {
    build_cli()?;
    let run = Run {
        bin: cli_binary()?,
        python: python_with_peers(),
        machine: machine_line(),
        command: if quick {
            "cargo xtask bench --quick"
        } else {
            "cargo xtask bench"
        },
        quick,
    };
    let speed = speed_table(&run, only_grid)?;
    if !only_grid {
        write_section("<!-- speed:begin -->", "<!-- speed:end -->", &speed)?;
    }
    let grid = grid_table(&run)?;
    write_section("<!-- grid:begin -->", "<!-- grid:end -->", &grid)?;
    println!("{speed}\n\n{grid}");
    Ok(())
}

/// Speed: about 10, 50 and 200 detections per frame. Wider pictures hold the crowd at a similar
/// spacing, so that occlusion does not cap the number of detections.
fn speed_table(run: &Run, only_grid: bool) -> Result<String, String> {
    let frames = if run.quick { 300 } else { 1500 };
    let runs = if run.quick { 1 } else { RUNS };
    let mut lines = Vec::new();
    let specs = if only_grid {
        Vec::new()
    } else {
        speed_specs(frames)
    };
    for spec in &specs {
        let label = spec.label.as_str();
        let rows = measure_scene(&run.bin, run.python.as_deref(), spec, runs)?;
        let per_frame = detections_per_frame(label, frames)?;
        for (method, r) in &rows {
            lines.push(format!(
                "| {per_frame:.0} | {method} | {:.1} | {:.1} | {} | {:.0} | {:.1} |",
                100.0 * r.hota,
                100.0 * r.idf1,
                r.id_switches,
                r.fps,
                r.peak_mib
            ));
        }
        lines.push(format!(
            "| {per_frame:.0} | speed ratio sort / peer | | | | {} | |",
            ratio_cell(&rows)
        ));
        eprintln!("{}", lines.join("\n"));
    }
    Ok(format!(
        "<!-- speed:begin -->\nMeasured by `{}` on {}.\nScenes: {frames} frames of the simulated \
         footbridge plaza, 360 pixels high and 640, 1920 and 5120 wide, seed 42, 12% missed detections (more \
         under occlusion), embeddings of 16 values for deepsort. Speed is whole `throughline track` runs \
         (reading, tracking, writing benchmark text like the peer), frames per second of wall time, the fastest of {runs} runs (the Python \
         peer likewise); memory is peak resident set size.\n\n\
         | detections per frame | method | HOTA % | IDF1 % | ID switches | frames/s | peak MiB |\n\
         |---|---|---|---|---|---|---|\n{}\n<!-- speed:end -->",
        run.command,
        run.machine,
        lines.join("\n")
    ))
}

/// The speed table's scenes: about 10, 50 and 200 detections a frame, wider pictures holding the
/// crowd at a similar spacing so that occlusion does not cap the number of detections.
pub(super) fn speed_specs(frames: u32) -> Vec<SceneSpec> {
    [
        ("speed-10", 13.0, 640.0),
        ("speed-50", 65.0, 1920.0),
        ("speed-200", 265.0, 5120.0),
    ]
    .into_iter()
    .map(|(label, density, width)| SceneSpec {
        label: label.into(),
        density,
        width,
        height: 360.0,
        miss: 0.12,
        frames,
    })
    .collect()
}

/// The grid: densities x miss rates, quality, counts and speed.
fn grid_table(run: &Run) -> Result<String, String> {
    let frames = if run.quick { 750 } else { 3000 };
    let mut lines = Vec::new();
    for density in [5.0, 30.0, 120.0] {
        for miss in [0.10, 0.15] {
            let (width, height) = if density > 60.0 {
                (1280.0, 720.0)
            } else {
                (640.0, 360.0)
            };
            let label = format!("grid-{density}-{miss}");
            let spec = SceneSpec {
                label,
                density,
                width,
                height,
                miss,
                frames,
            };
            let rows = measure_scene(&run.bin, run.python.as_deref(), &spec, 1)?;
            lines.extend(grid_lines(density, miss, &rows));
            eprintln!("{}", lines.last().map_or("", String::as_str));
        }
    }
    Ok(format!(
        "<!-- grid:begin -->\nMeasured by `{}` on {}.\nScenes: {frames} frames (25 per second) of the \
         simulated plaza, 640x360 (1280x720 for 120 agents in view), seed 42, with the plinth occluder; plan: \
         `midline` across and `divide` down the middle (`sim_plan` in crate/xtask/src/bench/scene.rs); default settings \
         of each method. Crossings are summed over both screenlines: true forward/backward → counted \
         forward/backward, error = (counted − true) / true per direction. Speed is one run of `throughline \
         track` (benchmark text output).\n\n\
         | agents in view | missed | method | HOTA % | IDF1 % | ID switches | crossings | error forward | error backward | frames/s | peak MiB |\n\
         |---|---|---|---|---|---|---|---|---|---|---|\n{}\n<!-- grid:end -->",
        run.command,
        run.machine,
        lines.join("\n")
    ))
}

/// The grid's lines for one scene: one per method (and the peer), then the speed ratio.
fn grid_lines(density: f64, miss: f64, rows: &[(String, Row)]) -> Vec<String> {
    let mut lines = Vec::new();
    for (method, r) in rows {
        let (tf, tb, cf, cb) = r.counts.iter().fold((0, 0, 0, 0), |a, c| {
            (a.0 + c.1, a.1 + c.2, a.2 + c.3, a.3 + c.4)
        });
        lines.push(format!(
            "| {density} | {:.0}% | {method} | {:.1} | {:.1} | {} | {tf}/{tb} → {cf}/{cb} | {} | {} | {:.0} | {:.1} |",
            miss * 100.0,
            100.0 * r.hota,
            100.0 * r.idf1,
            r.id_switches,
            error(cf, tf),
            error(cb, tb),
            r.fps,
            r.peak_mib
        ));
    }
    lines.push(format!(
        "| {density} | {:.0}% | speed ratio sort / peer | | | | | | | {} | |",
        miss * 100.0,
        ratio_cell(rows)
    ));
    lines
}

/// Detections a frame in the scene `label` of `frames` frames.
pub(super) fn detections_per_frame(label: &str, frames: u32) -> Result<f64, String> {
    let path = bench_dir(label)?.join("detections.txt");
    let lines = std::fs::read_to_string(path).map_or(0, |t| t.lines().count());
    Ok(lines as f64 / f64::from(frames))
}

/// How many times faster `sort` ran than the peer on one scene.
fn ratio_cell(rows: &[(String, Row)]) -> String {
    let fps = |name: &str| rows.iter().find(|(n, _)| n == name).map(|(_, r)| r.fps);
    match (fps("sort"), fps(PEER)) {
        (Some(a), Some(b)) if b > 0.0 => format!("{:.0}x", a / b),
        _ => "n/a".into(),
    }
}
