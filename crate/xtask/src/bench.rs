//! `cargo xtask bench`: every method at several densities on simulated scenes, timed as whole
//! `throughline track` runs (wall clock, peak resident memory from `wait4`), scored against the
//! scene's truth, and the Python SORT peer (`tests/bench/sort_peer.py`) on the same files.
//! Results go into BENCHMARKS.md between the markers.

use super::{build_cli, cli_binary, root, run};
use std::process::Command;
use std::time::Instant;
use throughline_core::tracks_io::read_benchmark_boxes;

const BEGIN: &str = "<!-- bench:begin -->";
const END: &str = "<!-- bench:end -->";

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

const COUNTS_BEGIN: &str = "<!-- counts:begin -->";
const COUNTS_END: &str = "<!-- counts:end -->";

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

/// Count error per direction against the simulator's true crossings, for every method, at several
/// densities and miss rates. Runs the core directly (no timing here).
fn count_accuracy(quick: bool) -> Result<String, String> {
    use throughline_core::{count, plan, sim, track, tracks_io};
    let frames = if quick { 1500 } else { 7500 };
    let mut rows = Vec::new();
    for (density, miss) in [(5.0, 0.12), (30.0, 0.10), (30.0, 0.15), (120.0, 0.12)] {
        let (width, height) = if density > 60.0 {
            (1280.0, 720.0)
        } else {
            (640.0, 360.0)
        };
        let cfg = sim::SceneConfig {
            seed: 7,
            frames,
            width,
            height,
            density,
            miss_rate: miss,
            embedding_dim: 16,
            ..sim::SceneConfig::default()
        };
        let scene = sim::generate(&cfg);
        let plan = plan::Plan::from_json(&sim_plan(width, height)).map_err(|e| e.to_string())?;
        let truth = count::count(&tracks_io::boxes_to_tracks(&scene.truth), &plan, None);
        for method in track::Method::ALL {
            let config = track::TrackerConfig::for_method(method);
            let tracks = track::run_tracker(&scene.detections, &config, &mut |_, _| {})
                .map_err(|e| e.message)?;
            let counted = count::count(&tracks, &plan, Some(&config));
            let mut cells = Vec::new();
            for (t, c) in truth.screenlines.iter().zip(&counted.screenlines) {
                let err = |a: u64, m: u64| {
                    if m == 0 {
                        "n/a".to_string()
                    } else {
                        format!("{:+.1}%", 100.0 * (a as f64 - m as f64) / m as f64)
                    }
                };
                cells.push(format!(
                    "{} {}/{} → {}/{} ({}, {})",
                    t.name,
                    t.forward,
                    t.backward,
                    c.forward,
                    c.backward,
                    err(c.forward, t.forward),
                    err(c.backward, t.backward)
                ));
            }
            rows.push(format!(
                "| {density} | {:.0}% | {method} | {} |",
                miss * 100.0,
                cells.join("; ")
            ));
            eprintln!("{}", rows.last().map_or("", String::as_str));
        }
    }
    Ok(format!(
        "{COUNTS_BEGIN}\nMeasured by `cargo xtask bench{}`: {frames} frames (25 per second) of the simulated plaza \
         (640x360, or 1280x720 for 120 agents), seed 7, plan `midline` across and `divide` down the middle \
         (`sim_plan` in crate/xtask/src/bench.rs), default settings of each method. Cells: true forward/backward \
         crossings → counted forward/backward (error forward, error backward), error = (counted − true) / true.\n\n\
         | agents in view | missed | method | counts per screenline |\n|---|---|---|---|\n{}\n{COUNTS_END}",
        if quick { " --quick" } else { "" },
        rows.join("\n")
    ))
}

pub fn bench(args: &[String]) -> Result<(), String> {
    let quick = args.iter().any(|a| a == "--quick");
    if args.iter().any(|a| a == "--counts") {
        let table = count_accuracy(quick)?;
        println!("{table}");
        return write_section(COUNTS_BEGIN, COUNTS_END, &table);
    }
    build_cli()?;
    let bin = cli_binary().display().to_string();
    let dir = root().join("target/bench");
    std::fs::create_dir_all(&dir).map_err(|e| e.to_string())?;
    let python = python_with_peers();
    let frames = if quick { "300" } else { "1500" };
    // About 10, 50 and 200 detections per frame. Wider pictures hold the crowd at a similar
    // spacing, so that occlusion does not cap the number of detections.
    let scenes = [
        ("10", "13", "640"),
        ("50", "65", "1920"),
        ("200", "265", "5120"),
    ];
    let mut rows = Vec::new();
    for (label, density, width) in scenes {
        let scene = dir.join(format!("d{label}"));
        let s = scene.display().to_string();
        run(
            &bin,
            &[
                "simulate",
                "--out-dir",
                &s,
                "--seed",
                "42",
                "--frames",
                frames,
                "--density",
                density,
                "--miss-rate",
                "0.12",
                "--embedding-dim",
                "16",
                "--width",
                width,
            ],
        )?;
        let truth = std::fs::read(scene.join("truth.txt")).map_err(|e| e.to_string())?;
        let truth = read_benchmark_boxes(&truth).map_err(|e| e.to_string())?;
        let dets =
            std::fs::read_to_string(scene.join("detections.txt")).map_err(|e| e.to_string())?;
        let n_frames: f64 = frames.parse().unwrap_or(1.0);
        let per_frame = dets.lines().count() as f64 / n_frames;
        for method in ["iou", "sort", "bytetrack", "deepsort"] {
            let input = if method == "deepsort" {
                "detections.csv"
            } else {
                "detections.txt"
            };
            let out = scene.join(format!("{method}.txt")).display().to_string();
            let inp = scene.join(input).display().to_string();
            let m = best_of(
                3,
                &bin,
                &[
                    "track", &inp, "--method", method, "-o", &out, "--quiet", "--stats",
                ],
            )?;
            let tracks = read_benchmark_boxes(&std::fs::read(&out).map_err(|e| e.to_string())?)
                .map_err(|e| e.to_string())?;
            let s = throughline_core::score::score(&truth, &tracks).map_err(|e| e.message)?;
            rows.push(format!(
                "| {label} ({per_frame:.0}) | {method} | {:.1} | {:.1} | {} | {:.0} | {:.1} |",
                100.0 * s.hota,
                100.0 * s.idf1,
                s.id_switches,
                n_frames / m.seconds,
                m.peak_mib
            ));
            eprintln!("{}", rows.last().map_or("", String::as_str));
            if method == "sort" {
                if let Some(py) = &python {
                    let peer_out = scene.join("peer.txt").display().to_string();
                    let peer = best_of(3, py, &["tests/bench/sort_peer.py", &inp, &peer_out])?;
                    let tracks =
                        read_benchmark_boxes(&std::fs::read(&peer_out).map_err(|e| e.to_string())?)
                            .map_err(|e| e.to_string())?;
                    let ps =
                        throughline_core::score::score(&truth, &tracks).map_err(|e| e.message)?;
                    rows.push(format!(
                        "| {label} ({per_frame:.0}) | Python SORT peer | {:.1} | {:.1} | {} | {:.0} | {:.1} |",
                        100.0 * ps.hota,
                        100.0 * ps.idf1,
                        ps.id_switches,
                        n_frames / peer.seconds,
                        peer.peak_mib
                    ));
                    rows.push(format!(
                        "| {label} ({per_frame:.0}) | speed ratio sort / peer | | | | {:.0}x | |",
                        peer.seconds / m.seconds
                    ));
                    eprintln!("{}", rows.last().map_or("", String::as_str));
                }
            }
        }
    }
    let machine = machine_line();
    let table = format!(
        "{BEGIN}\nMeasured by `cargo xtask bench{}` on {machine}.\nScenes: {frames} frames of the simulated \
         footbridge plaza, 360 pixels high and 640, 1920 and 5120 wide, seed 42, 12% missed detections (more under occlusion), embeddings of \
         16 values for deepsort. Speed is whole `throughline track` runs (reading, tracking, writing), \
         frames per second of wall time, the fastest of 3 runs (the Python peer likewise); memory is peak resident set size.\n\n\
         | detections per frame (measured) | method | HOTA % | IDF1 % | ID switches | frames/s | peak MiB |\n\
         |---|---|---|---|---|---|---|\n{}\n{END}",
        if quick { " --quick" } else { "" },
        rows.join("\n")
    );
    write_section(BEGIN, END, &table)?;
    println!("{table}");
    let counts = count_accuracy(quick)?;
    println!("{counts}");
    write_section(COUNTS_BEGIN, COUNTS_END, &counts)
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
