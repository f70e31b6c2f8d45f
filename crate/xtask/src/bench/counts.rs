//! The count-accuracy table (`--counts`, and after the grid in a full run): every method at 30 in
//! view over five scenes per miss rate; summed crossings per direction against the truth, the worst
//! single scene, and count events with no true match (missed) or no counted match (extra).

use super::core_api::{tally, Crossing, EventTally, Window};
use super::measure::machine_line;
use super::read_json;
use super::scene::{detections_for, simulate_scene, Sim, METHODS};
use super::table::{error, write_section};
use crate::builds::build_cli;
use crate::paths::cli_binary;
use crate::sh::run;

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

/// Count accuracy at 30 in view over five scenes per miss rate (ten minutes of footage).
pub fn counts_bench() -> Result<(), String> {
    build_cli()?;
    let bin = cli_binary()?;
    let machine = machine_line();
    let mut lines = Vec::new();
    for miss in [0.10, 0.15] {
        let mut tallies = [Tally::default(); METHODS.len()];
        for seed in COUNT_SEEDS {
            tally_scene(&bin, miss, seed, &mut tallies)?;
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

/// One scene (640x360, 3000 frames, 30 in view) counted by every method, added to their tallies.
fn tally_scene(bin: &str, miss: f64, seed: u64, tallies: &mut [Tally]) -> Result<(), String> {
    let (dir, p) = simulate_scene(
        bin,
        &Sim {
            folder: &format!("counts-{miss}-{seed}"),
            seed,
            frames: 3000,
            density: 30.0,
            width: 640.0,
            height: 360.0,
            miss: Some(miss),
            embedding_dim: 16,
            render: None,
            hard_cases: false,
            zones: false,
        },
    )?;
    let truth = read_json(&dir.join("truth_report.json"))?;
    for (tally, method) in tallies.iter_mut().zip(METHODS) {
        let inp = detections_for(&dir, method);
        let out = dir.join(format!("{method}-report.json"));
        let o = out.display().to_string();
        run(
            bin,
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
    Ok(())
}

/// The event matching window of the count and detector tables: one second at 25 fps and a little
/// more than a person's height at the front of a 640x360 picture.
pub const NEAR_IN_TIME_AND_PLACE: Window = Window {
    frames: 25.0,
    pixels: Some(100.0),
};

/// The count events of one kind (`screenline`, `zone`) of a report, a zone's name as its line.
pub fn events_of(report: &serde_json::Value, kind: &str) -> Vec<Crossing> {
    report["events"]
        .as_array()
        .into_iter()
        .flatten()
        .filter(|e| e["kind"] == kind)
        .map(|e| Crossing {
            line: e["name"].as_str().unwrap_or_default().to_string(),
            direction: e["direction"].as_str().unwrap_or_default().to_string(),
            frame: e["frame"].as_f64().unwrap_or(0.0),
            x: e["x"].as_f64().unwrap_or(0.0),
            y: e["y"].as_f64().unwrap_or(0.0),
        })
        .collect()
}

/// Count events matched one to one with the true ones within `window`
/// (`throughline_eval::events`): the tally of true, counted and matched crossings.
pub fn event_tally(
    truth: &serde_json::Value,
    counted: &serde_json::Value,
    window: Window,
) -> EventTally {
    tally_of("screenline", truth, counted, window)
}

/// [`event_tally`] for zone entries and exits: the same zone and way (in or out) within `window`.
pub fn zone_event_tally(
    truth: &serde_json::Value,
    counted: &serde_json::Value,
    window: Window,
) -> EventTally {
    tally_of("zone", truth, counted, window)
}

fn tally_of(
    kind: &str,
    truth: &serde_json::Value,
    counted: &serde_json::Value,
    window: Window,
) -> EventTally {
    tally(&events_of(truth, kind), &events_of(counted, kind), window)
}

/// Missed and extra count events within [`NEAR_IN_TIME_AND_PLACE`].
pub fn event_errors(truth: &serde_json::Value, counted: &serde_json::Value) -> (usize, usize) {
    let t = event_tally(truth, counted, NEAR_IN_TIME_AND_PLACE);
    (t.missed(), t.extra())
}

/// Sums of (true forward, true backward, counted forward, counted backward) over the screenlines.
pub fn crossing_sums(
    truth: &serde_json::Value,
    counted: &serde_json::Value,
) -> (u64, u64, u64, u64) {
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
