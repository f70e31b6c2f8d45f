//! The detector table (`--detector`): rendered simulator scenes (seed 11, 12 in view) through
//! `throughline detect` (speed, best of 3; box recall and precision against the simulator's truth;
//! the class guess) and `throughline run --y4m` (counts from footage alone, default method).

use std::collections::BTreeMap;
use std::path::Path;

use super::core_api::{iou, maximise_edges, read_detections, BBox, Detection, Edge};
use super::counts::{crossing_sums, event_errors};
use super::measure::{machine_line, measure};
use super::scene::{bench_dir, simulate_scene, Sim};
use super::table::write_section;
use super::{read, read_json};
use crate::builds::build_cli;
use crate::paths::cli_binary;
use crate::sh::run;

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

/// The table's scenes (a quarter of the frames with `quick`).
fn scenes(quick: bool) -> [DetectorScene; 6] {
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
    let large = DetectorScene {
        label: "1280x720",
        width: 1280,
        height: 720,
        heights: Some((68.0, 182.0)),
        frames: 600 / scale,
        ..small
    };
    [
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
        large,
        DetectorScene {
            label: "1280x720, rules.hysteresis 0.35",
            hysteresis: Some(0.35),
            ..large
        },
    ]
}

/// The detector table, written into BENCHMARKS.md and printed.
pub fn detector_bench(quick: bool) -> Result<(), String> {
    build_cli()?;
    let bin = cli_binary()?;
    let machine = machine_line();
    let load_before = load_average();
    let mut lines = Vec::new();
    for s in &scenes(quick) {
        lines.push(detector_line(&bin, s, quick)?);
        eprintln!("{}", lines.last().map_or("", String::as_str));
    }
    let command = if quick {
        "cargo xtask bench --detector --quick"
    } else {
        "cargo xtask bench --detector"
    };
    let table = format!(
        "<!-- detector:begin -->\nMeasured by `{command}` on {machine} (load average {load_before} at the start, {} at the end).\nScenes: the simulated plaza rendered \
         as footage (`simulate --render`, seed 11, 12 in view, 25 fps; pedestrians, cyclists and a service cart), with the grid's plan (`sim_plan`). Speed is \
         whole `throughline detect` runs (reading the YUV4MPEG2 file, detecting, writing), the fastest of {} \
         runs, with `--threads 1` and `--threads 2` in turn (and their ratio); memory is peak resident set size (two threads). Recall and precision: detector boxes against the simulator's \
         visible-part truth at IoU 0.5, after the 50-frame warm-up; class right = for each true class, the \
         share of its matched boxes given that class (the cart is a vehicle; the detector guesses only with the \
         two heights). Crossings: `throughline run --y4m` (default \
         method: `sort`, or `deepsort` with colour histograms) against the true crossings, summed over both lines; missed and extra are count events \
         with no true event of the same line and direction within 25 frames and 100 pixels (matched one to one, \
         most pairs first), and the reverse.\n\n\
         | footage | frames | frames/s, one thread | two threads | two / one | peak MiB | recall | precision | class right | crossings (true → counted) | missed | extra |\n\
         |---|---|---|---|---|---|---|---|---|---|---|---|\n{}\n<!-- detector:end -->",
        load_average(),
        if quick { 1 } else { 3 },
        lines.join("\n")
    );
    write_section("<!-- detector:begin -->", "<!-- detector:end -->", &table)?;
    println!("{table}");
    Ok(())
}

/// The machine's load over the last minute (`/proc/loadavg`), or "unknown".
fn load_average() -> String {
    std::fs::read_to_string("/proc/loadavg")
        .ok()
        .and_then(|s| s.split_whitespace().next().map(str::to_string))
        .unwrap_or_else(|| "unknown".into())
}

/// One scene rendered, searched by `detect` (timed, and its boxes scored) and counted by
/// `run --y4m`: the table's line.
fn detector_line(bin: &str, s: &DetectorScene, quick: bool) -> Result<String, String> {
    // One folder per row, named from its label, so each row's files stay for a look afterwards.
    let slug: String = s
        .label
        .chars()
        .map(|c| if c.is_ascii_alphanumeric() { c } else { '-' })
        .collect();
    let folder = format!("detector-{slug}");
    let y4m = bench_dir(&folder)?.join("frames.y4m");
    let (dir, p) = simulate_scene(
        bin,
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
            hard_cases: false,
            zones: false,
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
    let runs = if quick { 1 } else { 3 };
    let detect = [
        "detect", "--y4m", &y, "--config", &c, "-o", &found, "--quiet",
    ];
    // One and two threads in turn, so a spell of load from elsewhere falls on both.
    let (mut one, mut two) = (f64::INFINITY, f64::INFINITY);
    let mut peak_mib = 0.0;
    for _ in 0..runs {
        one =
            one.min(measure(bin, &[&detect[..], &["--stats", "--threads", "1"]].concat())?.seconds);
        let m = measure(bin, &[&detect[..], &["--stats", "--threads", "2"]].concat())?;
        (two, peak_mib) = (two.min(m.seconds), m.peak_mib);
    }
    let (recall, precision, class_right) = found_against_truth(&dir, Path::new(&found), s.frames)?;
    let class_cell = class_right.unwrap_or_else(|| "–".to_string());
    let (t, c) = counted_from_footage(bin, &dir, &p, &y, &c, s.hysteresis)?;
    let (tf, tb, cf, cb) = crossing_sums(&t, &c);
    let (missed, extra) = event_errors(&t, &c);
    // The rendered frames are large (about 0.35 MB a frame at 640x360): keep only the results.
    std::fs::remove_file(&y4m).ok();
    Ok(format!(
        "| {} | {} | {:.0} | {:.0} | {:.2}x | {:.0} | {:.2} | {:.2} | {class_cell} | {tf}/{tb} → {cf}/{cb} | {missed} | {extra} |",
        s.label,
        s.frames,
        f64::from(s.frames) / one,
        f64::from(s.frames) / two,
        one / two,
        peak_mib,
        recall,
        precision,
    ))
}

/// `run --y4m` on the rendered frames with the scene's plan (its `rules.hysteresis` set first
/// where given): the true report and the counted one.
fn counted_from_footage(
    bin: &str,
    dir: &Path,
    plan: &str,
    y4m: &str,
    config: &str,
    hysteresis: Option<f64>,
) -> Result<(serde_json::Value, serde_json::Value), String> {
    if let Some(h) = hysteresis {
        let mut value: serde_json::Value = read_json(Path::new(plan))?;
        value["rules"] = serde_json::json!({ "hysteresis": h });
        std::fs::write(plan, value.to_string()).map_err(|e| e.to_string())?;
    }
    let report = dir.join("report.json");
    let r = report.display().to_string();
    run(
        bin,
        &[
            "run",
            "--y4m",
            y4m,
            "--detector-config",
            config,
            "--plan",
            plan,
            "-o",
            &r,
            "--quiet",
        ],
    )?;
    Ok((
        read_json(&dir.join("truth_report.json"))?,
        read_json(&report)?,
    ))
}

/// The detector's boxes in `found` against the scene's truth, after the 50-frame warm-up.
fn found_against_truth(
    dir: &Path,
    found: &Path,
    frames: u32,
) -> Result<(f64, f64, Option<String>), String> {
    let truth_text = String::from_utf8_lossy(&read(&dir.join("truth.txt"))?).into_owned();
    let dets = read_detections(&read(found)?)
        .map_err(|e| e.to_string())?
        .detections;
    let named = |r: &Detection| dets.class_name(r.class).unwrap_or("").to_string();
    Ok(recall_precision(
        &boxes_by_frame(truth_with_classes(&truth_text).into_iter(), frames),
        &boxes_by_frame(
            dets.rows.iter().map(|r| (r.frame, r.bbox, named(r))),
            frames,
        ),
        50,
    ))
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
    let mut by_class: BTreeMap<&str, (usize, usize)> = Default::default();
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
