//! The review queue's table (`--queue`): of the crossings counted wrongly or missed, how many the
//! queue's first moments point at (`throughline review`), against the same moments in a random
//! order. A moment points at an extra crossing when it is about that crossing, and at a missed one
//! when it is within a second and a person's height of it (the events table's window), on the
//! same line when it names one.

use std::collections::{HashMap, HashSet};
use std::path::Path;

use super::core_api::{match_crossings, Window};
use super::counts::events_of;
use super::events::{same_event, shown};
use super::measure::machine_line;
use super::read_json;
use super::scene::{detections_for, hard_cases_footage, simulate_scene, Sim};
use super::table::write_section;
use crate::builds::build_cli;
use crate::paths::cli_binary;
use crate::sh::{output, run};

/// How many of the queue's first moments each column looks at.
const FIRST: [usize; 5] = [10, 25, 50, 100, 200];
/// Random orders averaged for the "by chance" figures.
const SHUFFLES: u64 = 200;

/// One line of the table, summed over its scenes.
#[derive(Default)]
struct Tally {
    counted: usize,
    /// Missed and extra crossings.
    errors: usize,
    moments: usize,
    /// Errors some moment of the queue points at.
    pointed: usize,
    found: [usize; FIRST.len()],
    by_chance: [f64; FIRST.len()],
}

/// The table, written into BENCHMARKS.md and printed (`quick`: one short scene each).
pub fn queue_bench(quick: bool) -> Result<(), String> {
    build_cli()?;
    let bin = cli_binary()?;
    let (crowd, footage, frames): (&[u64], &[u64], u32) = if quick {
        (&[42], &[42], 750)
    } else {
        (&[42, 43, 44, 45], &[42, 43], 3000)
    };
    let mut crowd_tally = Tally::default();
    for &seed in crowd {
        crowd_scene(&bin, seed, frames, &mut crowd_tally)?;
    }
    let mut footage_tally = Tally::default();
    for &seed in footage {
        footage_scene(&bin, seed, frames, &mut footage_tally)?;
    }
    let command = match quick {
        true => "cargo xtask bench --queue --quick",
        false => "cargo xtask bench --queue",
    };
    let seeds = |s: &[u64]| s.iter().map(u64::to_string).collect::<Vec<_>>().join(", ");
    let heads: Vec<String> = FIRST.iter().map(|n| format!("first {n}")).collect();
    let table = format!(
        "<!-- queue:begin -->\nMeasured by `{command}` on {}.\n\
         Brought detections: the events table's crowd (90 in view, 1280x720, 15% missed boxes, \
         appearance vectors), {frames} frames each, seeds {}, `deepsort`. Footage alone: the events \
         table's hard cases (30 in view, 640x360), seeds {}, found by `throughline detect` (heights \
         34 and 91), `sort`. Plan `sim_plan` (two screenlines); `throughline review --picture` with \
         the picture's size, as the page does. Wrong or missed: true crossings left \
         unmatched and counted ones left unmatched, one to one within one second and a person's \
         height (as in the events table). Each cell: the wrong or missed crossings the queue's first \
         N moments point at, then (in brackets) the same in a random order, the mean of {SHUFFLES}.\n\n\
         | input | counted | wrong or missed | moments | pointed at by any | {} |\n\
         |---|---|---|---|---|{}\n{}\n{}\n<!-- queue:end -->",
        machine_line(),
        seeds(crowd),
        seeds(footage),
        heads.join(" | "),
        "---|".repeat(FIRST.len()),
        row("brought detections, crowd", &crowd_tally),
        row("footage alone, hard cases", &footage_tally),
    );
    write_section("<!-- queue:begin -->", "<!-- queue:end -->", &table)?;
    println!("{table}");
    Ok(())
}

fn row(input: &str, t: &Tally) -> String {
    let cells: Vec<String> = t
        .found
        .iter()
        .zip(t.by_chance)
        .map(|(f, c)| format!("{f} ({c:.1})"))
        .collect();
    format!(
        "| {input} | {} | {} | {} | {} | {} |",
        t.counted,
        t.errors,
        t.moments,
        t.pointed,
        cells.join(" | ")
    )
}

/// The crowd of brought detections, tracked with `deepsort`.
fn crowd_scene(bin: &str, seed: u64, frames: u32, tally: &mut Tally) -> Result<(), String> {
    let folder = format!("queue-crowd-{seed}");
    let sim = Sim::crowd(&folder, seed, frames, false);
    let (dir, plan) = simulate_scene(bin, &sim)?;
    let detections = detections_for(&dir, "deepsort");
    let args = ["--method", "deepsort"];
    let size = (sim.width, sim.height);
    queue_of(bin, (&dir, &plan, &detections), &args, size, tally)
}

/// The hard cases rendered and searched by the motion detector, tracked with the default method.
fn footage_scene(bin: &str, seed: u64, frames: u32, tally: &mut Tally) -> Result<(), String> {
    let folder = format!("queue-footage-{seed}");
    let scene = hard_cases_footage(bin, &folder, seed, frames)?;
    let (dir, plan, y4m, config) = (scene.dir, scene.plan, scene.y4m, scene.config);
    let size = scene.size;
    let found = shown(&dir.join("found.csv"));
    let searched = run(
        bin,
        &[
            "detect",
            "--y4m",
            &shown(&y4m),
            "--config",
            &shown(&config),
            "-o",
            &found,
            "--quiet",
        ],
    );
    // The frames are large: keep only the results, even after a failure.
    std::fs::remove_file(&y4m).ok();
    searched?;
    queue_of(bin, (&dir, &plan, &found), &[], size, tally)
}

/// Counts, reviews (with the picture's size, as the page does) and tracks one scene's detections
/// and adds its figures to `tally`.
fn queue_of(
    bin: &str,
    (dir, plan, detections): (&Path, &str, &str),
    method: &[&str],
    (width, height): (f64, f64),
    tally: &mut Tally,
) -> Result<(), String> {
    let report = shown(&dir.join("queue-report.json"));
    let tracks = shown(&dir.join("queue-tracks.json"));
    let args = |command: &str, rest: &[&str]| -> Vec<String> {
        [command, detections]
            .iter()
            .chain(rest)
            .chain(method)
            .map(|s| s.to_string())
            .collect()
    };
    let counting = args("run", &["--plan", plan, "-o", &report, "--quiet"]);
    run(bin, &refs(&counting))?;
    run(bin, &refs(&args("track", &["-o", &tracks, "--quiet"])))?;
    let picture = format!("{width}x{height}");
    let reviewing = args(
        "review",
        &["--plan", plan, "--picture", &picture, "--json", "--quiet"],
    );
    let doubts = output(bin, &refs(&reviewing))?;
    let doubts: Vec<serde_json::Value> =
        serde_json::from_slice(&doubts).map_err(|e| format!("review --json: {e}"))?;
    let (truth, counted) = (
        read_json(&dir.join("truth_report.json"))?,
        read_json(Path::new(&report))?,
    );
    let tracks = read_json(Path::new(&tracks))?;
    let labels = Labels::new(&truth, &counted, &tracks, same_event(height));
    let pointed: Vec<Vec<usize>> = doubts.iter().map(|d| labels.pointed(d)).collect();
    add(
        tally,
        &pointed,
        labels.errors(),
        counted_crossings(&counted),
    );
    Ok(())
}

fn counted_crossings(report: &serde_json::Value) -> usize {
    events_of(report, "screenline").len()
}

/// Adds one scene's queue, each moment with the errors it points at, to the tally.
fn add(tally: &mut Tally, pointed: &[Vec<usize>], errors: usize, counted: usize) {
    tally.counted += counted;
    tally.errors += errors;
    tally.moments += pointed.len();
    tally.pointed += pointed.iter().flatten().collect::<HashSet<_>>().len();
    let order: Vec<usize> = (0..pointed.len()).collect();
    for (k, n) in FIRST.iter().enumerate() {
        tally.found[k] += found_in(pointed, &order, *n);
    }
    let mut state = 0x9E37_79B9_7F4A_7C15_u64;
    for _ in 0..SHUFFLES {
        let mut order = order.clone();
        for i in (1..order.len()).rev() {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            order.swap(i, (state % (i as u64 + 1)) as usize);
        }
        for (k, n) in FIRST.iter().enumerate() {
            tally.by_chance[k] += found_in(pointed, &order, *n) as f64 / SHUFFLES as f64;
        }
    }
}

/// The errors the first `n` moments of `order` point at.
fn found_in(pointed: &[Vec<usize>], order: &[usize], n: usize) -> usize {
    order
        .iter()
        .take(n)
        .flat_map(|&k| &pointed[k])
        .collect::<HashSet<_>>()
        .len()
}

/// A crossing as a review moment names it: line, track, frame.
type EventKey = (String, u64, u64);

/// A scene's wrong and missed crossings: the extra ones by their event, the missed ones by line,
/// frame and place; and where each counted crossing met its line and each track's boxes were, to
/// place the moments.
struct Labels<'a> {
    extra: HashMap<EventKey, usize>,
    missed: Vec<(String, f64, f64, f64)>,
    window: Window,
    places: HashMap<EventKey, (f64, f64)>,
    tracks: HashMap<u64, &'a serde_json::Value>,
}

impl<'a> Labels<'a> {
    fn new(
        truth: &serde_json::Value,
        counted: &serde_json::Value,
        tracks: &'a serde_json::Value,
        window: Window,
    ) -> Self {
        let (t, c) = (
            events_of(truth, "screenline"),
            events_of(counted, "screenline"),
        );
        let pairs = match_crossings(&t, &c, window);
        let (true_matched, counted_matched): (HashSet<usize>, HashSet<usize>) =
            pairs.iter().copied().unzip();
        let events: Vec<&serde_json::Value> = counted["events"]
            .as_array()
            .into_iter()
            .flatten()
            .filter(|e| e["kind"] == "screenline")
            .collect();
        let extra = (0..c.len())
            .filter(|j| !counted_matched.contains(j))
            .enumerate()
            .map(|(k, j)| (event_key(events[j]), k))
            .collect();
        let missed = (0..t.len())
            .filter(|i| !true_matched.contains(i))
            .map(|i| (t[i].line.clone(), t[i].frame, t[i].x, t[i].y))
            .collect();
        let places = events
            .iter()
            .zip(&c)
            .map(|(e, c)| (event_key(e), (c.x, c.y)))
            .collect();
        let tracks = tracks["tracks"]
            .as_array()
            .into_iter()
            .flatten()
            .filter_map(|t| Some((t["id"].as_u64()?, t)))
            .collect();
        Self {
            extra,
            missed,
            window,
            places,
            tracks,
        }
    }

    fn errors(&self) -> usize {
        self.extra.len() + self.missed.len()
    }

    /// The errors a moment points at (extra ones numbered first, then the missed ones).
    fn pointed(&self, d: &serde_json::Value) -> Vec<usize> {
        let mut out = Vec::new();
        let frame = d["frame"].as_f64().unwrap_or(0.0);
        let crossing = &d["crossing"];
        let (line, place) = if crossing.is_object() {
            let key = (
                crossing["screenline"]
                    .as_str()
                    .unwrap_or_default()
                    .to_string(),
                crossing["track"].as_u64().unwrap_or(0),
                crossing["frame"].as_u64().unwrap_or(0),
            );
            out.extend(self.extra.get(&key).copied());
            (Some(key.0.clone()), self.places.get(&key).copied())
        } else {
            let track = d["tracks"][0].as_u64().unwrap_or(0);
            let boxes = self.tracks.get(&track).map(|t| &t["boxes"]);
            (None, boxes.and_then(|b| box_place(b, frame)))
        };
        let Some((x, y)) = place else {
            return out;
        };
        let pixels = self.window.pixels.unwrap_or(f64::INFINITY);
        for (k, (l, f, mx, my)) in self.missed.iter().enumerate() {
            let same_line = line.as_ref().is_none_or(|n| n == l);
            if same_line
                && (f - frame).abs() <= self.window.frames
                && (mx - x).hypot(my - y) <= pixels
            {
                out.push(self.extra.len() + k);
            }
        }
        out
    }
}

fn event_key(e: &serde_json::Value) -> EventKey {
    (
        e["name"].as_str().unwrap_or_default().to_string(),
        e["track"].as_u64().unwrap_or(0),
        e["frame"].as_u64().unwrap_or(0),
    )
}

/// The bottom centre of a track's box in a frame (tracks JSON: boxes as [frame, x, y, w, h, ...]).
fn box_place(boxes: &serde_json::Value, frame: f64) -> Option<(f64, f64)> {
    let b = boxes
        .as_array()?
        .iter()
        .find(|b| b[0].as_f64() == Some(frame))?;
    Some((
        b[1].as_f64()? + b[3].as_f64()? / 2.0,
        b[2].as_f64()? + b[4].as_f64()?,
    ))
}

fn refs(v: &[String]) -> Vec<&str> {
    v.iter().map(String::as_str).collect()
}
