//! The event-level table (`--events`): counted crossings matched one by one with the true ones
//! (`throughline_eval::events`), missed and extra as shares of the true crossings, against the
//! aims of at most 3% missed and 2% extra. Two inputs: footage alone (the simulator's hard cases
//! rendered, through the motion detector: `run --y4m`) and brought detections in a crowd (`run`
//! with each method).

use std::path::Path;

use super::core_api::{EventTally, Window};
use super::counts::{event_tally, zone_event_tally};
use super::measure::{machine_line, measure};
use super::read_json;
use super::scene::{detections_for, hard_cases_footage, simulate_scene, Sim, METHODS};
use super::table::write_section;
use crate::builds::build_cli;
use crate::paths::cli_binary;
use crate::sh::run;

/// The aims: missed and extra crossings as a percentage of the true ones, at most.
const AIM_MISSED: f64 = 3.0;
const AIM_EXTRA: f64 = 2.0;

/// The same event: same line and direction, at most one second apart (25 frames at the
/// simulator's 25 fps) and about a person's height at the front of the picture apart where the
/// anchor met the line (100 pixels at 640x360, as in the other tables; 200 at 1280x720), so a
/// crossing elsewhere on the line in the same second does not hide a miss.
pub(super) fn same_event(height: f64) -> Window {
    Window {
        frames: 25.0,
        pixels: Some(100.0 * height / 360.0),
    }
}

/// Time alone (the same line and direction within one second, anywhere on the line): shown beside,
/// as the figure a busy line flatters.
const SAME_SECOND: Window = Window {
    frames: 25.0,
    pixels: None,
};

/// Seeds of the footage scenes and of the crowd scenes.
const FOOTAGE_SEEDS: [u64; 3] = [42, 43, 44];
const CROWD_SEEDS: [u64; 2] = [42, 43];

/// One line of the table: what was counted, by which method, its tally, and frames a second
/// where footage was searched.
struct Line {
    input: &'static str,
    method: &'static str,
    tally: EventTally,
    /// The same crossings matched on time alone.
    same_second: EventTally,
    frames_per_second: Option<f64>,
}

/// The event-level table, written into BENCHMARKS.md and printed (`quick`: one short scene each).
pub fn events_bench(quick: bool) -> Result<(), String> {
    build_cli()?;
    let bin = cli_binary()?;
    let machine = machine_line();
    let (footage_seeds, crowd_seeds, frames) = if quick {
        (&FOOTAGE_SEEDS[..1], &CROWD_SEEDS[..1], 750)
    } else {
        (&FOOTAGE_SEEDS[..], &CROWD_SEEDS[..], 3000)
    };
    let mut lines = vec![footage_line(&bin, footage_seeds, frames)?];
    lines.extend(crowd_lines(&bin, crowd_seeds, frames)?);
    for line in &lines {
        print_line(line);
    }
    let command = if quick {
        "cargo xtask bench --events --quick"
    } else {
        "cargo xtask bench --events"
    };
    let seeds = |s: &[u64]| s.iter().map(u64::to_string).collect::<Vec<_>>().join(", ");
    let table = format!(
        "<!-- events:begin -->\nMeasured by `{command}` on {machine}.\n\
         Footage alone: `simulate --hard-cases` (people standing in view at frame 1, pairs side by side \
         and overtaking, pauses of 3–10 s, a third in clothes the paving's grey), 30 in view, 640x360, \
         {frames} frames at 25 fps each, seeds {}, rendered and counted by `throughline run --y4m` (the \
         detector with the two heights 34 and 91, default method `sort`); frames/s is the whole run's. \
         Brought detections: the simulator's detections of a crowd (no footage), 90 in view, 1280x720, \
         {frames} frames each, seeds {}, 15% missed boxes and 0.5 false boxes a frame, embeddings of 16 \
         values for `deepsort`, counted by `throughline run` with each method's defaults, and `deepsort` again as published: `{{\"iou_needs_appearance\": false, \"tentative_max_age\": 0, \"min_score\": 0.3, \"start_score\": 0}}`. The grid's plan \
         (`sim_plan`: two screenlines; for the crowd also two zones, `sim_plan_with_zones`, whose \
         entries and exits are matched the same way, a zone and its way in or out for a line and \
         its direction), crossings summed over both lines and the scenes. Each true \
         crossing is matched to at most one counted crossing of the same line and direction at most 25 \
         frames (one second) and about a person's height at the front of the picture (100 pixels at \
         640x360, 200 at 1280x720) apart where it met the line, one to one, as many pairs as possible \
         (`throughline_eval::events`); missed = true crossings left unmatched, extra = counted ones left \
         unmatched, both as a share of the true crossings. Aims: missed ≤ {AIM_MISSED}%, extra ≤ \
         {AIM_EXTRA}%. Time only: the same matching within one second anywhere on the line (a miss \
         and an extra elsewhere on a busy line then cancel).\n\n\
         | input | method | true crossings | counted | missed | extra | time only: missed / extra | frames/s |\n\
         |---|---|---|---|---|---|---|---|\n{}\n<!-- events:end -->",
        seeds(footage_seeds),
        seeds(crowd_seeds),
        lines.iter().map(row).collect::<Vec<_>>().join("\n")
    );
    write_section("<!-- events:begin -->", "<!-- events:end -->", &table)?;
    println!("{table}");
    Ok(())
}

/// A share against its aim: "4.2% (aim ≤ 3%: not met)".
fn against_aim(share: f64, aim: f64) -> String {
    let verdict = if share <= aim { "met" } else { "not met" };
    format!("{share:.1}% (aim ≤ {aim}%: {verdict})")
}

fn row(l: &Line) -> String {
    let (t, s) = (&l.tally, &l.same_second);
    format!(
        "| {} | {} | {} | {} | {}: {} | {}: {} | {:.1}% / {:.1}% | {} |",
        l.input,
        l.method,
        t.truth,
        t.counted,
        t.missed(),
        against_aim(t.share(t.missed()), AIM_MISSED),
        t.extra(),
        against_aim(t.share(t.extra()), AIM_EXTRA),
        s.share(s.missed()),
        s.share(s.extra()),
        l.frames_per_second
            .map_or_else(|| "–".to_string(), |f| format!("{f:.0}")),
    )
}

fn print_line(l: &Line) {
    let t = &l.tally;
    eprintln!(
        "{}, {}: missed {}, extra {}",
        l.input,
        l.method,
        against_aim(t.share(t.missed()), AIM_MISSED),
        against_aim(t.share(t.extra()), AIM_EXTRA)
    );
}

/// Footage alone: each seed's scene rendered with the hard cases, counted by `run --y4m` (timed),
/// the rendered frames deleted once counted.
fn footage_line(bin: &str, seeds: &[u64], frames: u32) -> Result<Line, String> {
    let (mut tally, mut same_second, mut seconds) =
        (EventTally::default(), EventTally::default(), 0.0);
    for &seed in seeds {
        let folder = format!("events-footage-{seed}");
        let scene = hard_cases_footage(bin, &folder, seed, frames)?;
        let (dir, plan, y4m, config) = (scene.dir, scene.plan, scene.y4m, scene.config);
        let height = scene.size.1;
        let report = dir.join("report.json");
        let (y, c, r) = (shown(&y4m), shown(&config), shown(&report));
        let m = measure(
            bin,
            &[
                "run",
                "--y4m",
                &y,
                "--detector-config",
                &c,
                "--plan",
                &plan,
                "-o",
                &r,
                "--quiet",
            ],
        );
        // The frames are large (about 0.35 MB each): keep only the results, even after a failure.
        std::fs::remove_file(&y4m).ok();
        seconds += m?.seconds;
        let (truth, counted) = (
            read_json(&dir.join("truth_report.json"))?,
            read_json(&report)?,
        );
        tally += event_tally(&truth, &counted, same_event(height));
        same_second += event_tally(&truth, &counted, SAME_SECOND);
    }
    Ok(Line {
        input: "footage alone, hard cases, 30 in view",
        method: "sort (default)",
        tally,
        same_second,
        frames_per_second: Some(f64::from(frames) * seeds.len() as f64 / seconds),
    })
}

/// The crowd's trackers: each method with its defaults, then `deepsort` as published beside it
/// (the IoU stage on overlap alone, a tentative track ended at its first miss, boxes under 0.3 not
/// used): (label, method, settings).
const CROWD_TRACKERS: [(&str, &str, Option<&str>); METHODS.len() + 1] = [
    (METHODS[0], METHODS[0], None),
    (METHODS[1], METHODS[1], None),
    (METHODS[2], METHODS[2], None),
    (METHODS[3], METHODS[3], None),
    (
        "deepsort as published",
        "deepsort",
        Some(
            r#"{"iou_needs_appearance": false, "tentative_max_age": 0, "min_score": 0.3, "start_score": 0}"#,
        ),
    ),
];

/// One tracker's tallies on the crowd: screenline crossings, then zone entries and exits, each
/// within a second and a person's height, and within a second alone.
#[derive(Default, Clone, Copy)]
struct CrowdTallies {
    lines: (EventTally, EventTally),
    zones: (EventTally, EventTally),
}

/// Brought detections of a crowd, each seed's scene simulated once and counted by `run` with
/// every tracker of [`CROWD_TRACKERS`]: a line each for the screenlines' crossings, then one each
/// for the zones' entries and exits.
fn crowd_lines(bin: &str, seeds: &[u64], frames: u32) -> Result<Vec<Line>, String> {
    let mut tallies = [CrowdTallies::default(); CROWD_TRACKERS.len()];
    for &seed in seeds {
        let folder = format!("events-crowd-{seed}");
        let sim = Sim::crowd(&folder, seed, frames, true);
        let (dir, plan) = simulate_scene(bin, &sim)?;
        let truth = read_json(&dir.join("truth_report.json"))?;
        for (k, (tally, (_, method, settings))) in
            tallies.iter_mut().zip(CROWD_TRACKERS).enumerate()
        {
            let report = dir.join(format!("{k}-{method}-report.json"));
            let (inp, r) = (detections_for(&dir, method), shown(&report));
            let mut args = vec![
                "run", &inp, "--plan", &plan, "--method", method, "-o", &r, "--quiet",
            ];
            let config = dir.join(format!("{k}-settings.json"));
            let config = shown(&config);
            if let Some(text) = settings {
                std::fs::write(&config, text).map_err(|e| format!("{config}: {e}"))?;
                args.extend(["--config", &config]);
            }
            run(bin, &args)?;
            let counted = read_json(&report)?;
            let near = same_event(sim.height);
            tally.lines.0 += event_tally(&truth, &counted, near);
            tally.lines.1 += event_tally(&truth, &counted, SAME_SECOND);
            tally.zones.0 += zone_event_tally(&truth, &counted, near);
            tally.zones.1 += zone_event_tally(&truth, &counted, SAME_SECOND);
        }
    }
    let line = |input, method, (tally, same_second)| Line {
        input,
        method,
        tally,
        same_second,
        frames_per_second: None,
    };
    let crossings = CROWD_TRACKERS
        .iter()
        .zip(&tallies)
        .map(|((label, _, _), t)| {
            line("brought detections, 90 in view, 15% missed", label, t.lines)
        });
    let zones = CROWD_TRACKERS
        .iter()
        .zip(&tallies)
        .map(|((label, _, _), t)| line("the same, zone entries and exits", label, t.zones));
    Ok(crossings.chain(zones).collect())
}

pub(super) fn shown(path: &Path) -> String {
    path.display().to_string()
}
