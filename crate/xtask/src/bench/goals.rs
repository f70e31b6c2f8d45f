//! The speed goals, each figure beside its goal (`cargo xtask bench --goals`, and the last table
//! of a full `cargo xtask bench`): whole `throughline track` runs against the Python SORT loop's
//! own tracking time (measured in the same run) and against reading and parsing the same file;
//! our parsing (on one thread, and in two parts on two threads) against a plain split-and-parse
//! loop; a day of one camera tracked within a memory bound. A goal whose measurement fails (no
//! browser, say) is listed as not measured.

use std::path::Path;
use std::time::Instant;

use super::judge::SceneSpec;
use super::measure::{best_of, least_reported, machine_line};
use super::peer::python_with_peers;
use super::scene::{detections_for, simulate_scene, METHODS};
use super::table::write_section;
use super::tracking::{detections_per_frame, speed_specs};
use crate::builds::build_cli;
use crate::paths::cli_binary;

/// One line of the table.
struct Line {
    figure: String,
    value: String,
    goal: &'static str,
    met: Option<bool>,
}

impl Line {
    fn cell(&self) -> &'static str {
        match self.met {
            Some(true) => "met",
            Some(false) => "not met",
            None => "not measured",
        }
    }
}

/// Measures every goal, writes the table into BENCHMARKS.md and prints it.
pub fn goals_bench(quick: bool) -> Result<(), String> {
    build_cli()?;
    let bin = cli_binary()?;
    let python = python_with_peers();
    let frames = if quick { 300 } else { 1500 };
    let mut lines = Vec::new();
    for spec in speed_specs(frames) {
        lines.extend(scene_lines(&bin, python.as_deref(), &spec, quick)?);
        eprintln!("{} measured", spec.label);
    }
    let day = super::day::day_bench(&bin, quick)?;
    lines.push(Line {
        figure: day.figure,
        value: format!("{:.1} MiB peak, {:.0} s", day.peak_mib, day.seconds),
        goal: "< 1,024 MiB",
        met: (!quick).then_some(day.peak_mib < 1024.0),
    });
    let (seconds, exact) = super::big_frame::ten_thousand(&bin)?;
    lines.push(Line {
        figure: format!(
            "one frame of 10,000 overlapping boxes after another (whole run, sort{})",
            if exact {
                ", matched exactly"
            } else {
                ", matched greedily"
            }
        ),
        value: format!("{seconds:.3} s"),
        goal: "< 1 s",
        met: Some(seconds < 1.0),
    });
    lines.extend(page_lines(&bin, quick)?);
    lines.push(page_detector_line());
    let table = render(&lines, quick);
    write_section("<!-- goals:begin -->", "<!-- goals:end -->", &table)?;
    println!("{table}");
    Ok(())
}

/// Only the page's two goals (`bench --goals --page-only`), printed and not written: a shorter
/// run while working on the page.
pub fn page_goals_bench(quick: bool) -> Result<(), String> {
    build_cli()?;
    for l in page_lines(&cli_binary()?, quick)? {
        println!("| {} | {} | {} | {} |", l.figure, l.value, l.goal, l.cell());
    }
    Ok(())
}

/// Only the parsing goals (`bench --goals --parse-only`), printed and not written: a shorter run
/// while working on the readers.
pub fn parse_goals_bench(quick: bool) -> Result<(), String> {
    build_cli()?;
    let bin = cli_binary()?;
    let runs = if quick { 1 } else { 5 };
    for spec in speed_specs(if quick { 300 } else { 1500 }) {
        let (dir, _) = simulate_scene(&bin, &spec.sim())?;
        let per_frame = detections_per_frame(&spec.label, spec.frames)?;
        for l in parse_lines(&bin, &dir.join("detections.txt"), per_frame, runs)? {
            println!("| {} | {} | {} | {} |", l.figure, l.value, l.goal, l.cell());
        }
    }
    Ok(())
}

/// The figures of one density: every method against the peer's loop and against parsing.
fn scene_lines(
    bin: &str,
    python: Option<&str>,
    s: &SceneSpec,
    quick: bool,
) -> Result<Vec<Line>, String> {
    let (dir, _) = simulate_scene(bin, &s.sim())?;
    let runs = if quick { 1 } else { 5 };
    let per_frame = detections_per_frame(&s.label, s.frames)?;
    let mut lines = Vec::new();
    let peer = match python {
        Some(py) => Some(peer_tracking_seconds(py, &dir, runs.min(3))?),
        None => None,
    };
    for method in METHODS {
        let inp = detections_for(&dir, method);
        let out = dir.join(format!("goal-{method}.txt")).display().to_string();
        let args = ["track", &inp, "--method", method, "-o", &out, "--quiet"];
        let whole = best_of(runs, bin, &args)?.seconds;
        let parse = parse_seconds(bin, Path::new(&inp), runs)?;
        let at = format!("{method}, {per_frame:.0} boxes a frame");
        if let Some(p) = peer {
            let ratio = p / whole;
            lines.push(Line {
                figure: format!("{at}: Python loop's tracking time / whole run"),
                value: format!("{ratio:.0}x ({p:.3} s / {whole:.3} s)"),
                goal: "≥ 60x",
                met: Some(ratio >= 60.0),
            });
        }
        let ratio = whole / parse;
        lines.push(Line {
            figure: format!("{at}: whole run / reading and parsing the file"),
            value: format!("{ratio:.1}x ({whole:.3} s / {parse:.3} s)"),
            goal: "≤ 1.5x",
            met: Some(ratio <= 1.5),
        });
    }
    lines.extend(parse_lines(
        bin,
        &dir.join("detections.txt"),
        per_frame,
        runs,
    )?);
    Ok(lines)
}

/// Our parsing of benchmark text against the plain loop (one thread): on one thread (the
/// command pinned to one core, so that it reads the file whole), and as it runs, in two parts
/// on two threads for a file of 1 MiB or more.
fn parse_lines(bin: &str, txt: &Path, per_frame: f64, runs: usize) -> Result<Vec<Line>, String> {
    let floor = floor_seconds(txt, runs)?;
    let mib = std::fs::metadata(txt).map_or(0.0, |m| m.len() as f64 / f64::from(1 << 20));
    let at = format!("{per_frame:.0} boxes a frame ({mib:.1} MiB)");
    let line = |figure: String, parse: Option<f64>| Line {
        figure,
        value: parse.map_or("—".into(), |p| {
            format!("{:.2}x ({p:.3} s / {floor:.3} s)", p / floor)
        }),
        goal: "≤ 1.0x",
        met: parse.map(|p| p <= floor),
    };
    let one = if crate::sh::works("taskset", "--version") {
        Some(parse_seconds_on(bin, txt, runs, true)?)
    } else {
        eprintln!("no taskset: parsing on one thread was not measured");
        None
    };
    let two = parse_seconds_on(bin, txt, runs, false)?;
    Ok(vec![
        line(
            format!(
                "parsing benchmark text on one thread, {at}, against a plain split-and-parse loop"
            ),
            one,
        ),
        line(
            format!(
                "parsing benchmark text in two parts on two threads ({}), {at}, against the \
                 plain loop on one thread",
                if mib >= 1.0 {
                    "files of 1 MiB or more"
                } else {
                    "not for this file: under 1 MiB, read whole"
                }
            ),
            Some(two),
        ),
    ])
}

/// The Python loop's own tracking time (it prints `stats: tracking N s`), the least of `runs`.
fn peer_tracking_seconds(python: &str, dir: &Path, runs: usize) -> Result<f64, String> {
    let inp = dir.join("detections.txt").display().to_string();
    let out = dir.join("goal-peer.txt").display().to_string();
    let args = ["tests/bench/sort_peer.py", &inp, &out];
    least_reported(runs, python, &args, "stats: tracking ")
}

/// Reading the file and parsing it with Throughline's reader: the `read` stage of a release
/// `throughline track --stats` (JSON output, so that the stages are timed apart), the least of
/// `runs`.
fn parse_seconds(bin: &str, path: &Path, runs: usize) -> Result<f64, String> {
    parse_seconds_on(bin, path, runs, false)
}

/// [`parse_seconds`], on one core (`taskset -c 0`: the command then sees one core and reads the
/// file whole on one thread) or on all.
fn parse_seconds_on(bin: &str, path: &Path, runs: usize, one_core: bool) -> Result<f64, String> {
    let inp = path.display().to_string();
    let out = path.with_extension("goal.json").display().to_string();
    let args = ["track", &inp, "-o", &out, "--quiet", "--stats"];
    let seconds = match one_core {
        true => least_reported(
            runs,
            "taskset",
            &[&["-c", "0", bin], &args[..]].concat(),
            "(read ",
        ),
        false => least_reported(runs, bin, &args, "(read "),
    };
    let _ = std::fs::remove_file(&out);
    seconds
}

/// Reading the file and parsing it with the plainest loop there is (split lines, split commas,
/// parse seven numbers, keep them): the floor a reader is measured against (xtask is built
/// optimised for it, see the workspace's Cargo.toml).
fn floor_seconds(path: &Path, runs: usize) -> Result<f64, String> {
    least_of(runs, || {
        let bytes = std::fs::read(path).map_err(|e| format!("{}: {e}", path.display()))?;
        let text = std::str::from_utf8(&bytes).map_err(|e| e.to_string())?;
        let mut rows: Vec<[f64; 7]> = Vec::new();
        for line in text.lines() {
            let mut row = [0.0; 7];
            for (v, field) in row.iter_mut().zip(line.split(',')) {
                *v = field
                    .trim()
                    .parse()
                    .map_err(|_| format!("bad number {field}"))?;
            }
            rows.push(row);
        }
        Ok(rows.len())
    })
}

/// The least wall time of `runs` calls of `work` (which returns how much it did, kept so the
/// work is not optimised away).
fn least_of(runs: usize, mut work: impl FnMut() -> Result<usize, String>) -> Result<f64, String> {
    let mut best = f64::INFINITY;
    for _ in 0..runs.max(1) {
        let start = Instant::now();
        std::hint::black_box(work()?);
        best = best.min(start.elapsed().as_secs_f64());
    }
    Ok(best)
}

/// The page's two goals on one hour of detections ([`super::page_hour`]).
fn page_lines(bin: &str, quick: bool) -> Result<Vec<Line>, String> {
    let h = super::page_hour::page_hour(bin, quick)?;
    let size = format!(
        "{} frames, {:.1} boxes a frame{}",
        h.frames,
        h.boxes as f64 / f64::from(h.frames),
        if quick {
            "; --quick: not the goal's size"
        } else {
            ""
        }
    );
    let ratio = h.wasm_track / h.native_track;
    Ok(vec![
        Line {
            figure: format!(
                "wasm build in Chromium / native, same input: tracking with sort ({size}; \
                 reading the file {:.1}x: {:.2} s / {:.2} s)",
                h.wasm_read / h.native_read,
                h.wasm_read,
                h.native_read
            ),
            value: format!(
                "{ratio:.2}x ({:.2} s / {:.2} s)",
                h.wasm_track, h.native_track
            ),
            goal: "≤ 1.5x",
            met: Some(ratio <= 1.5),
        },
        Line {
            figure: format!(
                "one hour of detections loaded, tracked and counted in the page ({size}; open \
                 {:.1} s, track {:.1} s, count {:.1} s; sampled every 50 ms, the reading bar \
                 seen {} times, the tracking bar {} times, the page never still for more than \
                 {:.2} s)",
                h.load, h.track, h.count, h.reading_samples, h.bar_samples, h.longest_frozen
            ),
            value: format!("{:.1} s", h.total),
            goal: "< 10 s",
            met: (!quick).then_some(h.total < 10.0),
        },
    ])
}

/// 720p footage (25 fps) searched in the page, VP9 WebM and H.264 MP4 (`bench --page`'s script):
/// the slower container against twice real time; "not measured" when the browser run fails.
fn page_detector_line() -> Line {
    let figure = "720p footage (25 fps) searched by the fixed-camera detector in the page".into();
    let goal = "≥ 2x real time (50 frames/s)";
    let rates = match super::page::page_720p() {
        Ok(rates) => rates,
        Err(e) => {
            eprintln!("the page's detector was not measured: {e}");
            Vec::new()
        }
    };
    let slowest = rates.iter().map(|(_, r)| r.unwrap_or(0.0)).reduce(f64::min);
    let value = rates
        .iter()
        .map(|(c, r)| match r {
            Some(r) => format!("{r:.0} frames/s ({c}, {:.1}x)", r / 25.0),
            None => format!("{c}: not decoded in the page"),
        })
        .collect::<Vec<_>>()
        .join(", ");
    Line {
        figure,
        value: if value.is_empty() {
            "—".into()
        } else {
            value
        },
        goal,
        met: slowest.map(|r| r >= 50.0),
    }
}

fn render(lines: &[Line], quick: bool) -> String {
    let rows: Vec<String> = lines
        .iter()
        .map(|l| format!("| {} | {} | {} | {} |", l.figure, l.value, l.goal, l.cell()))
        .collect();
    format!(
        "<!-- goals:begin -->\nMeasured by `cargo xtask bench {}` on {}. Scenes as in the speed \
         table; whole runs are `throughline track IN -o OUT.txt --quiet`, wall time, the least of \
         {} runs; the Python loop's time is its own tracking loop (reading and writing excluded), \
         measured in this run.\n\n| figure | measured | goal | |\n|---|---|---|---|\n{}\n<!-- goals:end -->",
        if quick { "--goals --quick" } else { "--goals" },
        machine_line(),
        if quick { 1 } else { 5 },
        rows.join("\n")
    )
}
