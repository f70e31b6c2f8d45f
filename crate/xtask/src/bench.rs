//! `cargo xtask bench`: tables in BENCHMARKS.md, rewritten in place between their markers.
//!
//! - **Speed**: every method at about 10, 50 and 200 detections per frame, timed as whole
//!   `throughline track` runs (the fastest of [`RUNS`]; wall clock; peak memory as the child reports
//!   it), with the Python SORT peer (`tests/bench/sort_peer.py`, filterpy + SciPy) on the same files.
//! - **Grid**: every method × density (5, 30, 120 agents in view) × miss rate (10%, 15%): HOTA, IDF1,
//!   ID switches, count error per direction against the simulator's true crossings, speed and memory
//!   (one run each), with the peer for `sort`.
//! - **Counts** (`--counts`, and after the grid in a full run): count accuracy at 30 in view summed
//!   over five scenes per miss rate, with event-level missed and extra crossings.
//! - **Detector** (`--detector`): the motion detector on rendered simulator frames: speed, box recall
//!   and precision against the simulator's truth, and counts from footage alone.
//! - **Page** (`--page`): finding objects in headless Chromium; printed, not written.

use super::{build_cli, cli_binary, root, run, site_and_browser_driver};
use std::path::Path;
use std::process::Command;
use std::time::Instant;
use throughline_core::geometry::{iou, BBox};
use throughline_core::track::assign::{maximise_edges, Edge};
use throughline_core::track::files as tracks_io;
use throughline_core::{count, detections, plan};

/// Timed runs per measurement in the speed table; the fastest is kept.
const RUNS: usize = 5;

struct Measured {
    seconds: f64,
    peak_mib: f64,
}

/// Runs a command that reports `peak memory N MiB` on standard error (`throughline track --stats`
/// and the Python peer both read their own `VmHWM`), returning wall time and that peak. A child's
/// own report is used because `wait4`'s figure includes the memory of the parent at fork time.
fn measure(program: &str, args: &[&str]) -> Result<Measured, String> {
    let start = Instant::now();
    let out = Command::new(program)
        .args(args)
        .current_dir(root())
        .stdout(std::process::Stdio::null())
        .output()
        .map_err(|e| format!("cannot start {program}: {e}"))?;
    let seconds = start.elapsed().as_secs_f64();
    let stderr = String::from_utf8_lossy(&out.stderr);
    if !out.status.success() {
        return Err(format!("{program} {} failed: {stderr}", args.join(" ")));
    }
    let peak_mib = stderr
        .split("peak memory ")
        .nth(1)
        .and_then(|rest| rest.split_whitespace().next())
        .and_then(|v| v.parse().ok())
        .unwrap_or(f64::NAN);
    Ok(Measured { seconds, peak_mib })
}

/// The fastest of `runs` runs (the usual way to take timings on a machine that does other things).
fn best_of(runs: usize, program: &str, args: &[&str]) -> Result<Measured, String> {
    let mut best: Option<Measured> = None;
    for _ in 0..runs {
        let m = measure(program, args)?;
        if best.as_ref().is_none_or(|b| m.seconds < b.seconds) {
            best = Some(m);
        }
    }
    best.ok_or_else(|| "no run".to_string())
}

fn python_with_peers() -> Option<String> {
    let candidates = [
        std::env::var("THROUGHLINE_BENCH_PYTHON").ok(),
        Some(
            root()
                .join("target/bench-venv/bin/python")
                .display()
                .to_string(),
        ),
    ];
    for p in candidates.into_iter().flatten() {
        let ok = Command::new(&p)
            .args(["-c", "import filterpy, scipy"])
            .status()
            .is_ok_and(|s| s.success());
        if ok {
            return Some(p);
        }
    }
    // Make one: a virtual environment with the peer's two libraries from PyPI.
    let venv = root().join("target/bench-venv");
    let venv_s = venv.display().to_string();
    if run("python3", &["-m", "venv", &venv_s]).is_ok() {
        let pip = venv.join("bin/pip").display().to_string();
        if run(&pip, &["install", "--quiet", "filterpy", "scipy"]).is_ok() {
            return Some(venv.join("bin/python").display().to_string());
        }
    }
    None
}

/// A plan for the simulated plaza of a given size: a midline across and a divide down the middle.
fn sim_plan(width: f64, height: f64) -> String {
    format!(
        r#"{{"frame_rate": 25, "screenlines": [
            {{"name": "midline", "points": [[{x0}, {ym}], [{x1}, {ym}]]}},
            {{"name": "divide", "points": [[{xm}, {y0}], [{xm}, {y1}]]}}]}}"#,
        x0 = width * 0.03,
        x1 = width * 0.97,
        ym = height * 0.64,
        xm = width * 0.5,
        y0 = height * 0.25,
        y1 = height * 0.97
    )
}

fn write_section(begin: &str, end: &str, table: &str) -> Result<(), String> {
    let path = root().join("BENCHMARKS.md");
    let old = std::fs::read_to_string(&path).unwrap_or_default();
    let new = match (old.find(begin), old.find(end)) {
        (Some(a), Some(b)) if a < b => format!("{}{table}{}", &old[..a], &old[b + end.len()..]),
        _ => format!("{old}\n{table}\n"),
    };
    std::fs::write(&path, new).map_err(|e| e.to_string())
}

struct SceneSpec {
    label: String,
    density: f64,
    width: f64,
    height: f64,
    miss: f64,
    frames: u32,
}

/// Per screenline: (name, true forward, true backward, counted forward, counted backward).
type LineCounts = Vec<(String, u64, u64, u64, u64)>;

/// One method's figures on one scene.
struct Row {
    hota: f64,
    idf1: f64,
    id_switches: u64,
    fps: f64,
    peak_mib: f64,
    counts: LineCounts,
}

fn error(counted: u64, truth: u64) -> String {
    if truth == 0 {
        "n/a".into()
    } else {
        format!(
            "{:+.1}%",
            100.0 * (counted as f64 - truth as f64) / truth as f64
        )
    }
}

fn read(path: &Path) -> Result<Vec<u8>, String> {
    std::fs::read(path).map_err(|e| format!("{}: {e}", path.display()))
}

/// A simulated scene for the benchmarks: its folder under target/bench and the simulator's settings
/// (the simulator's default miss rate where `miss` is None).
struct Sim<'a> {
    folder: &'a str,
    seed: u64,
    frames: u32,
    density: f64,
    width: f64,
    height: f64,
    miss: Option<f64>,
    /// Length of the appearance vectors (0: none). It changes the random draws, so the scene too.
    embedding_dim: u32,
    /// Also render the frames as YUV4MPEG2 to this file.
    render: Option<&'a Path>,
}

/// Writes the grid's plan and simulates the scene into its folder; returns the folder and the
/// plan's path.
fn simulate_scene(bin: &str, sim: &Sim) -> Result<(std::path::PathBuf, String), String> {
    let dir = root().join("target/bench").join(sim.folder);
    std::fs::create_dir_all(&dir).map_err(|e| e.to_string())?;
    let plan = dir.join("plan.json");
    std::fs::write(&plan, sim_plan(sim.width, sim.height)).map_err(|e| e.to_string())?;
    let text = |v: &dyn std::fmt::Display| v.to_string();
    let mut args: Vec<String> = [
        "simulate",
        "--out-dir",
        &text(&dir.display()),
        "--seed",
        &text(&sim.seed),
        "--frames",
        &text(&sim.frames),
        "--density",
        &text(&sim.density),
        "--width",
        &text(&sim.width),
        "--height",
        &text(&sim.height),
        "--embedding-dim",
        &text(&sim.embedding_dim),
        "--plan",
        &text(&plan.display()),
    ]
    .map(String::from)
    .to_vec();
    if let Some(m) = sim.miss {
        args.extend(["--miss-rate".into(), m.to_string()]);
    }
    if let Some(r) = sim.render {
        args.extend(["--render".into(), r.display().to_string()]);
    }
    run(bin, &args.iter().map(String::as_str).collect::<Vec<_>>())?;
    Ok((dir, plan.display().to_string()))
}

/// Simulates a scene into files, then runs every method (and the peer) on it.
fn measure_scene(
    bin: &str,
    python: Option<&str>,
    s: &SceneSpec,
    runs: usize,
) -> Result<Vec<(String, Row)>, String> {
    let (dir, _) = simulate_scene(
        bin,
        &Sim {
            folder: &s.label,
            seed: 42,
            frames: s.frames,
            density: s.density,
            width: s.width,
            height: s.height,
            miss: Some(s.miss),
            embedding_dim: 16,
            render: None,
        },
    )?;
    let truth = tracks_io::read_benchmark_boxes(&read(&dir.join("truth.txt"))?)
        .map_err(|e| e.to_string())?;
    let truth_report: serde_json::Value =
        serde_json::from_slice(&read(&dir.join("truth_report.json"))?)
            .map_err(|e| e.to_string())?;
    let plan = plan::Plan::from_json(&sim_plan(s.width, s.height)).map_err(|e| e.to_string())?;
    let mut rows = Vec::new();
    let score_counts =
        |tracks: &throughline_core::track::Tracks| -> Result<(f64, f64, u64, LineCounts), String> {
            let sc = throughline_eval::tracking_metrics::score(
                &truth,
                &tracks_io::tracks_to_boxes(tracks),
            )
            .map_err(|e| e.message)?;
            let report = count::count(tracks, &plan, None);
            let counts = report
                .screenlines
                .iter()
                .enumerate()
                .map(|(k, l)| {
                    let t = &truth_report["screenlines"][k];
                    (
                        l.name.clone(),
                        t["forward"].as_u64().unwrap_or(0),
                        t["backward"].as_u64().unwrap_or(0),
                        l.forward,
                        l.backward,
                    )
                })
                .collect();
            Ok((sc.hota, sc.idf1, sc.id_switches, counts))
        };
    for method in METHODS {
        let inp = detections_for(&dir, method);
        // Timed with benchmark text output, as the peer writes; then once more, untimed, as JSON for
        // scoring and counting (it keeps classes and the observed/predicted flags).
        let txt = dir.join(format!("{method}.txt")).display().to_string();
        let m = best_of(
            runs,
            bin,
            &[
                "track", &inp, "--method", method, "-o", &txt, "--quiet", "--stats",
            ],
        )?;
        let out = dir.join(format!("{method}.json"));
        let o = out.display().to_string();
        measure(
            bin,
            &[
                "track", &inp, "--method", method, "-o", &o, "--quiet", "--stats",
            ],
        )?;
        let tracks = tracks_io::from_json(&read(&out)?).map_err(|e| e.to_string())?;
        let (hota, idf1, id_switches, counts) = score_counts(&tracks)?;
        rows.push((
            method.to_string(),
            Row {
                hota,
                idf1,
                id_switches,
                fps: f64::from(s.frames) / m.seconds,
                peak_mib: m.peak_mib,
                counts,
            },
        ));
        if method == "sort" {
            if let Some(py) = python {
                let peer_out = dir.join("peer.txt");
                let po = peer_out.display().to_string();
                let m = best_of(runs, py, &["tests/bench/sort_peer.py", &inp, &po])?;
                let boxes = tracks_io::read_benchmark_boxes(&read(&peer_out)?)
                    .map_err(|e| e.to_string())?;
                let (hota, idf1, id_switches, counts) =
                    score_counts(&tracks_io::boxes_to_tracks(&boxes))?;
                rows.push((
                    "Python SORT peer".to_string(),
                    Row {
                        hota,
                        idf1,
                        id_switches,
                        fps: f64::from(s.frames) / m.seconds,
                        peak_mib: m.peak_mib,
                        counts,
                    },
                ));
            }
        }
    }
    Ok(rows)
}

fn detections_per_frame(label: &str, frames: u32) -> f64 {
    let path = root()
        .join("target/bench")
        .join(label)
        .join("detections.txt");
    let lines = std::fs::read_to_string(path).map_or(0, |t| t.lines().count());
    lines as f64 / f64::from(frames)
}

fn ratio_cell(rows: &[(String, Row)]) -> String {
    let fps = |name: &str| rows.iter().find(|(n, _)| n == name).map(|(_, r)| r.fps);
    match (fps("sort"), fps("Python SORT peer")) {
        (Some(a), Some(b)) if b > 0.0 => format!("{:.0}x", a / b),
        _ => "n/a".into(),
    }
}

pub fn bench(args: &[String]) -> Result<(), String> {
    if args.iter().any(|a| a == "--page") {
        return page_bench();
    }
    if args.iter().any(|a| a == "--detector") {
        return detector_bench(args.iter().any(|a| a == "--quick"));
    }
    if args.iter().any(|a| a == "--counts") {
        return counts_bench();
    }
    let quick = args.iter().any(|a| a == "--quick");
    build_cli()?;
    let bin = cli_binary().display().to_string();
    let python = python_with_peers();
    let machine = machine_line();
    let command = if quick {
        "cargo xtask bench --quick"
    } else {
        "cargo xtask bench"
    };

    let only_grid = args.iter().any(|a| a == "--grid");
    // Speed: about 10, 50 and 200 detections per frame. Wider pictures hold the crowd at a similar
    // spacing, so that occlusion does not cap the number of detections.
    let frames = if quick { 300 } else { 1500 };
    let mut lines = Vec::new();
    let speed_scenes: &[(&str, f64, f64)] = if only_grid {
        &[]
    } else {
        &[
            ("speed-10", 13.0, 640.0),
            ("speed-50", 65.0, 1920.0),
            ("speed-200", 265.0, 5120.0),
        ]
    };
    for &(label, density, width) in speed_scenes {
        let spec = SceneSpec {
            label: label.into(),
            density,
            width,
            height: 360.0,
            miss: 0.12,
            frames,
        };
        let rows = measure_scene(&bin, python.as_deref(), &spec, if quick { 1 } else { RUNS })?;
        let per_frame = detections_per_frame(label, frames);
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
    let speed = format!(
        "<!-- speed:begin -->\nMeasured by `{command}` on {machine}.\nScenes: {frames} frames of the simulated \
         footbridge plaza, 360 pixels high and 640, 1920 and 5120 wide, seed 42, 12% missed detections (more \
         under occlusion), embeddings of 16 values for deepsort. Speed is whole `throughline track` runs \
         (reading, tracking, writing benchmark text like the peer), frames per second of wall time, the fastest of {} runs (the Python \
         peer likewise); memory is peak resident set size.\n\n\
         | detections per frame | method | HOTA % | IDF1 % | ID switches | frames/s | peak MiB |\n\
         |---|---|---|---|---|---|---|\n{}\n<!-- speed:end -->",
        if quick { 1 } else { RUNS },
        lines.join("\n")
    );
    if !only_grid {
        write_section("<!-- speed:begin -->", "<!-- speed:end -->", &speed)?;
    }

    // The grid: densities x miss rates, quality, counts and speed.
    let frames = if quick { 750 } else { 3000 };
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
            let rows = measure_scene(&bin, python.as_deref(), &spec, 1)?;
            for (method, r) in &rows {
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
                ratio_cell(&rows)
            ));
            eprintln!("{}", lines.last().map_or("", String::as_str));
        }
    }
    let grid = format!(
        "<!-- grid:begin -->\nMeasured by `{command}` on {machine}.\nScenes: {frames} frames (25 per second) of the \
         simulated plaza, 640x360 (1280x720 for 120 agents in view), seed 42, with the plinth occluder; plan: \
         `midline` across and `divide` down the middle (`sim_plan` in crate/xtask/src/bench.rs); default settings \
         of each method. Crossings are summed over both screenlines: true forward/backward → counted \
         forward/backward, error = (counted − true) / true per direction. Speed is one run of `throughline \
         track` (benchmark text output).\n\n\
         | agents in view | missed | method | HOTA % | IDF1 % | ID switches | crossings | error forward | error backward | frames/s | peak MiB |\n\
         |---|---|---|---|---|---|---|---|---|---|---|\n{}\n<!-- grid:end -->",
        lines.join("\n")
    );
    write_section("<!-- grid:begin -->", "<!-- grid:end -->", &grid)?;
    println!("{speed}\n\n{grid}");
    if !quick {
        counts_bench()?;
    }
    Ok(())
}

/// Every tracking method, in the tables' order.
const METHODS: [&str; 4] = ["iou", "sort", "bytetrack", "deepsort"];

/// The simulator's detections for `method`: with appearance vectors (CSV) for deepsort, else the
/// benchmark text.
fn detections_for(dir: &Path, method: &str) -> String {
    let file = if method == "deepsort" {
        "detections.csv"
    } else {
        "detections.txt"
    };
    dir.join(file).display().to_string()
}

/// One method's count accuracy summed over the scenes of one miss rate.
#[derive(Clone, Copy, Default)]
struct Tally {
    /// True forward, true backward, counted forward, counted backward.
    crossings: [u64; 4],
    /// The largest error of one direction in one scene, %.
    worst: f64,
    missed: usize,
    extra: usize,
}

/// Seeds of the count-accuracy table: five scenes of two minutes each per miss rate.
const COUNT_SEEDS: [u64; 5] = [42, 43, 44, 45, 46];

/// Count accuracy at 30 in view over five scenes per miss rate (ten minutes of footage): summed
/// crossings per direction against the truth, the worst single scene, and count events with no
/// true match (missed) or no counted match (extra).
fn counts_bench() -> Result<(), String> {
    build_cli()?;
    let bin = cli_binary().display().to_string();
    let machine = machine_line();
    let (width, height) = (640.0, 360.0);
    let mut lines = Vec::new();
    for miss in [0.10, 0.15] {
        let mut tallies = [Tally::default(); METHODS.len()];
        for seed in COUNT_SEEDS {
            let (dir, p) = simulate_scene(
                &bin,
                &Sim {
                    folder: &format!("counts-{miss}-{seed}"),
                    seed,
                    frames: 3000,
                    density: 30.0,
                    width,
                    height,
                    miss: Some(miss),
                    embedding_dim: 16,
                    render: None,
                },
            )?;
            let truth = read_json(&dir.join("truth_report.json"))?;
            for (tally, method) in tallies.iter_mut().zip(METHODS) {
                let inp = detections_for(&dir, method);
                let out = dir.join(format!("{method}-report.json"));
                let o = out.display().to_string();
                run(
                    &bin,
                    &[
                        "run", &inp, "--plan", &p, "--method", method, "-o", &o, "--quiet",
                    ],
                )?;
                let counted = read_json(&out)?;
                let (tf, tb, cf, cb) = crossing_sums(&truth, &counted);
                let (missed, extra) = event_errors(&truth, &counted);
                let pct = |c: u64, t: u64| 100.0 * (c as f64 - t as f64).abs() / (t.max(1) as f64);
                tally.worst = tally.worst.max(pct(cf, tf).max(pct(cb, tb)));
                for (sum, n) in tally.crossings.iter_mut().zip([tf, tb, cf, cb]) {
                    *sum += n;
                }
                tally.missed += missed;
                tally.extra += extra;
            }
        }
        for (t, method) in tallies.iter().zip(METHODS) {
            let [tf, tb, cf, cb] = t.crossings;
            let (worst, missed, extra) = (t.worst, t.missed, t.extra);
            lines.push(format!(
                "| {:.0}% | {method} | {tf}/{tb} → {cf}/{cb} | {} | {} | {worst:.1}% | {missed} | {extra} |",
                miss * 100.0,
                error(cf, tf),
                error(cb, tb),
            ));
        }
    }
    let table = format!(
        "<!-- counts:begin -->\nMeasured by `cargo xtask bench --counts` on {machine}.\nScenes: 30 in view, \
         640x360, 3000 frames (2 minutes) each, seeds {}, the grid's plan; default settings of each method. \
         Crossings summed over both lines and the five scenes (10 minutes of footage per miss rate); error per \
         direction on the sums; worst scene = the largest error of one direction in one scene; missed and \
         extra = count events with no true event of the same line and direction within 25 frames and 100 pixels \
         (matched one to one, most pairs first), and the reverse.\n\n\
         | missed detections | method | crossings (true → counted) | error forward | error backward | worst scene | missed | extra |\n\
         |---|---|---|---|---|---|---|---|\n{}\n<!-- counts:end -->",
        COUNT_SEEDS.map(|s| s.to_string()).join(", "),
        lines.join("\n")
    );
    write_section("<!-- counts:begin -->", "<!-- counts:end -->", &table)?;
    println!("{table}");
    Ok(())
}

fn machine_line() -> String {
    let cpu = std::fs::read_to_string("/proc/cpuinfo")
        .ok()
        .and_then(|s| {
            s.lines()
                .find(|l| l.starts_with("model name"))
                .and_then(|l| l.split(':').nth(1))
                .map(|s| s.trim().to_string())
        })
        .unwrap_or_else(|| "an unknown CPU".into());
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
    let date = Command::new("date")
        .arg("+%Y-%m-%d")
        .output()
        .ok()
        .map(|o| String::from_utf8_lossy(&o.stdout).trim().to_string())
        .unwrap_or_default();
    format!("{cpu}, {cores} cores, {date}")
}

/// "Find moving objects" in headless Chromium on the demo re-encoded at two sizes and in two
/// containers (tests/bench/page_detector.mjs). Prints a table; BENCHMARKS.md records it by hand.
fn page_bench() -> Result<(), String> {
    site_and_browser_driver()?;
    run("node", &["tests/bench/page_detector.mjs"])
}

/// One rendered scene for the detector table: size, the two person heights for the detector (None:
/// defaults), frames.
#[derive(Clone, Copy)]
struct DetectorScene {
    label: &'static str,
    width: u32,
    height: u32,
    heights: Option<(f64, f64)>,
    /// Colour histograms as appearance vectors (then `run` picks `deepsort`).
    appearance: bool,
    /// The plan's `rules.hysteresis` for counting, where not the default.
    hysteresis: Option<f64>,
    frames: u32,
}

/// A box and its class name (empty when none), per frame (index = frame − 1).
type FrameBoxes = Vec<Vec<(BBox, String)>>;

fn boxes_by_frame(rows: impl Iterator<Item = (u32, BBox, String)>, frames: u32) -> FrameBoxes {
    let mut out = vec![Vec::new(); frames as usize];
    for (f, b, class) in rows {
        if let Some(v) = out.get_mut(f.saturating_sub(1) as usize) {
            v.push((b, class));
        }
    }
    out
}

/// The simulator's truth file (`frame,id,x,y,w,h,1,class,1`, class numbered from 1 in the order of
/// `sim::CLASSES`) with class names; the service cart is what the detector calls a vehicle.
fn truth_with_classes(text: &str) -> Vec<(u32, BBox, String)> {
    text.lines()
        .filter_map(|line| {
            let f: Vec<&str> = line.split(',').collect();
            let n = |i: usize| f.get(i).and_then(|v| v.parse::<f64>().ok());
            let class = match n(7)? as usize {
                1 => "pedestrian",
                2 => "cyclist",
                _ => "vehicle",
            };
            Some((
                n(0)? as u32,
                BBox::new(n(2)?, n(3)?, n(4)?, n(5)?),
                class.to_string(),
            ))
        })
        .collect()
}

/// Recall and precision of `found` against `truth` at IoU 0.5 (one-to-one, maximum total IoU per
/// frame, as the CLEAR MOT matching does), over frames after `skip`; and per true class, the share
/// of its matched boxes given that class, as "pedestrian 97%, …" (None when `found` has no classes).
fn recall_precision(
    truth: &FrameBoxes,
    found: &FrameBoxes,
    skip: usize,
) -> (f64, f64, Option<String>) {
    let (mut hits, mut n_truth, mut n_found) = (0usize, 0usize, 0usize);
    // true class -> (matched boxes, of which given that class)
    let mut by_class: std::collections::BTreeMap<&str, (usize, usize)> = Default::default();
    for (t, f) in truth.iter().zip(found).skip(skip) {
        n_truth += t.len();
        n_found += f.len();
        let edges: Vec<Edge> = t
            .iter()
            .enumerate()
            .flat_map(|(i, a)| {
                f.iter().enumerate().filter_map(move |(j, b)| {
                    let v = iou(&a.0, &b.0);
                    (v >= 0.5).then_some(Edge {
                        row: i,
                        col: j,
                        cost: v,
                    })
                })
            })
            .collect();
        let pairs = maximise_edges(t.len(), f.len(), &edges);
        hits += pairs.len();
        for (i, j) in pairs {
            let e = by_class.entry(t[i].1.as_str()).or_default();
            e.0 += 1;
            e.1 += usize::from(t[i].1 == f[j].1);
        }
    }
    let ratio = |a: usize, b: usize| if b == 0 { 0.0 } else { a as f64 / b as f64 };
    let classed = found.iter().flatten().any(|b| !b.1.is_empty());
    let classes = by_class
        .iter()
        .map(|(c, (n, right))| format!("{c} {:.0}% of {n}", 100.0 * ratio(*right, *n)))
        .collect::<Vec<_>>()
        .join(", ");
    (
        ratio(hits, n_truth),
        ratio(hits, n_found),
        classed.then_some(classes),
    )
}

/// Count events matched one to one with the true ones: same line and direction, at most
/// [`EVENT_FRAMES`] frames and [`EVENT_PIXELS`] pixels apart (where the anchor met the line), with
/// the most pairs and then the closest (maximum-weight assignment, so a nearby crossing of
/// someone else is not taken first). Returns (missed, extra).
fn event_errors(truth: &serde_json::Value, counted: &serde_json::Value) -> (usize, usize) {
    struct Crossing {
        line: String,
        direction: String,
        frame: f64,
        x: f64,
        y: f64,
    }
    let crossings = |r: &serde_json::Value| -> Vec<Crossing> {
        r["events"]
            .as_array()
            .into_iter()
            .flatten()
            .filter(|e| e["kind"] == "screenline")
            .map(|e| Crossing {
                line: e["name"].as_str().unwrap_or_default().to_string(),
                direction: e["direction"].as_str().unwrap_or_default().to_string(),
                frame: e["frame"].as_f64().unwrap_or(0.0),
                x: e["x"].as_f64().unwrap_or(0.0),
                y: e["y"].as_f64().unwrap_or(0.0),
            })
            .collect()
    };
    let (t, c) = (crossings(truth), crossings(counted));
    let mut edges = Vec::new();
    for (i, a) in t.iter().enumerate() {
        for (j, b) in c.iter().enumerate() {
            let frames = (a.frame - b.frame).abs();
            let pixels = (a.x - b.x).hypot(a.y - b.y);
            if a.line == b.line
                && a.direction == b.direction
                && frames <= EVENT_FRAMES
                && pixels <= EVENT_PIXELS
            {
                // Every pair outweighs any closeness: first as many pairs as possible.
                let closeness = 1.0 - (frames / EVENT_FRAMES + pixels / EVENT_PIXELS) / 2.0;
                edges.push(Edge {
                    row: i,
                    col: j,
                    cost: 1000.0 + closeness,
                });
            }
        }
    }
    let matched = maximise_edges(t.len(), c.len(), &edges).len();
    (t.len() - matched, c.len() - matched)
}

/// Event matching window: one second at 25 fps ...
const EVENT_FRAMES: f64 = 25.0;
/// ... and a little more than a person's height at the front of a 640x360 picture.
const EVENT_PIXELS: f64 = 100.0;

/// Sums of (true forward, true backward, counted forward, counted backward) over the screenlines.
fn crossing_sums(truth: &serde_json::Value, counted: &serde_json::Value) -> (u64, u64, u64, u64) {
    let sum = |r: &serde_json::Value, key: &str| -> u64 {
        r["screenlines"]
            .as_array()
            .into_iter()
            .flatten()
            .map(|l| l[key].as_u64().unwrap_or(0))
            .sum()
    };
    (
        sum(truth, "forward"),
        sum(truth, "backward"),
        sum(counted, "forward"),
        sum(counted, "backward"),
    )
}

fn read_json(path: &Path) -> Result<serde_json::Value, String> {
    serde_json::from_slice(&read(path)?).map_err(|e| format!("{}: {e}", path.display()))
}

/// The detector table: rendered simulator scenes (seed 7, 12 in view) through `throughline detect`
/// (speed, best of 3) and `throughline run --y4m` (counts from footage alone, default method).
fn detector_bench(quick: bool) -> Result<(), String> {
    build_cli()?;
    let bin = cli_binary().display().to_string();
    let machine = machine_line();
    let scale = if quick { 4 } else { 1 };
    let small = DetectorScene {
        label: "640x360",
        width: 640,
        height: 360,
        heights: Some((34.0, 91.0)),
        appearance: false,
        hysteresis: None,
        frames: 1500 / scale,
    };
    let scenes = [
        small,
        DetectorScene {
            label: "640x360, rules.hysteresis 0.35",
            hysteresis: Some(0.35),
            ..small
        },
        DetectorScene {
            label: "640x360, colour histograms (deepsort)",
            appearance: true,
            ..small
        },
        DetectorScene {
            label: "640x360, no heights",
            heights: None,
            ..small
        },
        DetectorScene {
            label: "1280x720",
            width: 1280,
            height: 720,
            heights: Some((68.0, 182.0)),
            frames: 600 / scale,
            ..small
        },
        DetectorScene {
            label: "1280x720, rules.hysteresis 0.35",
            width: 1280,
            height: 720,
            heights: Some((68.0, 182.0)),
            hysteresis: Some(0.35),
            frames: 600 / scale,
            ..small
        },
    ];
    let mut lines = Vec::new();
    for s in &scenes {
        // One folder per row, named from its label, so each row's files stay for a look afterwards.
        let slug: String = s
            .label
            .chars()
            .map(|c| if c.is_ascii_alphanumeric() { c } else { '-' })
            .collect();
        let folder = format!("detector-{slug}");
        let y4m = root().join("target/bench").join(&folder).join("frames.y4m");
        let (dir, p) = simulate_scene(
            &bin,
            &Sim {
                folder: &folder,
                seed: 11,
                frames: s.frames,
                density: 12.0,
                width: f64::from(s.width),
                height: f64::from(s.height),
                miss: None,
                embedding_dim: 0,
                render: Some(&y4m),
            },
        )?;
        let y = y4m.display().to_string();
        let config = dir.join("detector.json");
        let settings = match s.heights {
            Some((far, near)) => format!(
                r#"{{"far_height": {far}, "near_height": {near}, "appearance": {}}}"#,
                s.appearance
            ),
            None => "{}".into(),
        };
        std::fs::write(&config, settings).map_err(|e| e.to_string())?;
        let c = config.display().to_string();
        let found = dir.join("found.txt").display().to_string();
        let m = best_of(
            if quick { 1 } else { 3 },
            &bin,
            &[
                "detect", "--y4m", &y, "--config", &c, "-o", &found, "--quiet", "--stats",
            ],
        )?;
        let truth_text = String::from_utf8_lossy(&read(&dir.join("truth.txt"))?).into_owned();
        let dets = detections::read_detections(&read(Path::new(&found))?)
            .map_err(|e| e.to_string())?
            .detections;
        let named = |r: &detections::Detection| dets.class_name(r.class).unwrap_or("").to_string();
        let (recall, precision, class_right) = recall_precision(
            &boxes_by_frame(truth_with_classes(&truth_text).into_iter(), s.frames),
            &boxes_by_frame(
                dets.rows.iter().map(|r| (r.frame, r.bbox, named(r))),
                s.frames,
            ),
            50,
        );
        let class_cell = class_right.unwrap_or_else(|| "–".to_string());
        if let Some(h) = s.hysteresis {
            let mut plan: serde_json::Value = read_json(Path::new(&p))?;
            plan["rules"] = serde_json::json!({ "hysteresis": h });
            std::fs::write(&p, plan.to_string()).map_err(|e| e.to_string())?;
        }
        let report = dir.join("report.json");
        let r = report.display().to_string();
        run(
            &bin,
            &[
                "run",
                "--y4m",
                &y,
                "--detector-config",
                &c,
                "--plan",
                &p,
                "-o",
                &r,
                "--quiet",
            ],
        )?;
        let (t, c) = (
            read_json(&dir.join("truth_report.json"))?,
            read_json(&report)?,
        );
        let (tf, tb, cf, cb) = crossing_sums(&t, &c);
        let (missed, extra) = event_errors(&t, &c);
        lines.push(format!(
            "| {} | {} | {:.0} | {:.0} | {:.2} | {:.2} | {class_cell} | {tf}/{tb} → {cf}/{cb} | {missed} | {extra} |",
            s.label,
            s.frames,
            f64::from(s.frames) / m.seconds,
            m.peak_mib,
            recall,
            precision,
        ));
        eprintln!("{}", lines.last().map_or("", String::as_str));
        // The rendered frames are large (about 0.35 MB a frame at 640x360): keep only the results.
        std::fs::remove_file(&y4m).ok();
    }
    let command = if quick {
        "cargo xtask bench --detector --quick"
    } else {
        "cargo xtask bench --detector"
    };
    let table = format!(
        "<!-- detector:begin -->\nMeasured by `{command}` on {machine}.\nScenes: the simulated plaza rendered \
         as footage (`simulate --render`, seed 11, 12 in view, 25 fps; pedestrians, cyclists and a service cart), with the grid's plan (`sim_plan`). Speed is \
         whole `throughline detect` runs (reading the YUV4MPEG2 file, detecting, writing), the fastest of {} \
         runs; memory is peak resident set size. Recall and precision: detector boxes against the simulator's \
         visible-part truth at IoU 0.5, after the 50-frame warm-up; class right = for each true class, the \
         share of its matched boxes given that class (the cart is a vehicle; the detector guesses only with the \
         two heights). Crossings: `throughline run --y4m` (default \
         method: `sort`, or `deepsort` with colour histograms) against the true crossings, summed over both lines; missed and extra are count events \
         with no true event of the same line and direction within 25 frames and 100 pixels (matched one to one, \
         most pairs first), and the reverse.\n\n\
         | footage | frames | frames/s | peak MiB | recall | precision | class right | crossings (true → counted) | missed | extra |\n\
         |---|---|---|---|---|---|---|---|---|---|\n{}\n<!-- detector:end -->",
        if quick { 1 } else { 3 },
        lines.join("\n")
    );
    write_section("<!-- detector:begin -->", "<!-- detector:end -->", &table)?;
    println!("{table}");
    Ok(())
}
