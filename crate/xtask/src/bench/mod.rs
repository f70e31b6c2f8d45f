//! `cargo xtask bench`: tables in BENCHMARKS.md, rewritten in place between their markers.
//!
//! - **Speed** ([`tracking`]): every method at about 10, 50 and 200 detections per frame, timed as
//!   whole `throughline track` runs (the fastest of [`measure::RUNS`]; wall clock; peak memory as
//!   the child reports it), with the Python SORT peer ([`peer`]) on the same files.
//! - **Grid** ([`tracking`]): every method × density (5, 30, 120 agents in view) × miss rate (10%,
//!   15%): HOTA, IDF1, ID switches, count error per direction against the simulator's true
//!   crossings, speed and memory (one run each), with the peer for `sort`.
//! - **Counts** ([`counts`]; `--counts`, and after the grid in a full run): count accuracy at 30 in
//!   view summed over five scenes per miss rate, with event-level missed and extra crossings.
//! - **Detector** ([`detector`]; `--detector`): the motion detector on rendered simulator frames:
//!   speed, box recall and precision against the simulator's truth, and counts from footage alone.
//! - **Events** ([`events`]; `--events`): counted crossings matched one by one with the true ones,
//!   missed and extra against the aims of 3% and 2%, from footage alone (the simulator's hard cases
//!   through the motion detector) and from brought detections in a crowd (every method).
//! - **Queue** ([`queue`]; `--queue`): how many of the wrong and missed crossings the review
//!   queue's first moments point at, in a crowd of brought detections and from footage alone,
//!   against the same moments in a random order.
//! - **Goals** ([`goals`], [`day`]; `--goals`): the speed goals, each figure beside its goal,
//!   with the Python loop's own tracking time measured in the same run and a day of one camera
//!   tracked for the memory goal.
//! - **Page** ([`page`]; `--page`): finding objects in headless Chromium; printed, not written.
//!   The page's goals ([`page_hour`], in `--goals`): an hour of detections opened, tracked and
//!   counted in Chromium, and the core's tracking there against the same calls natively.
//! - **One crowded frame** ([`big_frame`]; `--big-frame`): 1,000, 10,000 and 100,000 overlapping
//!   boxes in one frame, tracked with `sort`: time and peak memory of the association.

use std::path::Path;

mod big_frame;
mod core_api;
mod counts;
mod day;
mod detector;
mod events;
mod goals;
mod judge;
mod measure;
mod methods;
mod page;
mod page_hour;
mod peer;
mod queue;
mod scene;
mod table;
mod tracking;

/// `bench [--quick | --grid | --counts | --detector | --events | --queue | --goals [--page-only |
/// --parse-only] | --page | --big-frame]`.
pub fn bench(args: &[String]) -> Result<(), String> {
    let has = |flag: &str| args.iter().any(|a| a == flag);
    if has("--big-frame") {
        return big_frame::big_frame_bench();
    }
    if has("--page") {
        return page::page_bench();
    }
    if has("--detector") {
        return detector::detector_bench(has("--quick"));
    }
    if has("--goals") && has("--parse-only") {
        return goals::parse_goals_bench(has("--quick"));
    }
    if has("--goals") && has("--page-only") {
        return goals::page_goals_bench(has("--quick"));
    }
    if has("--goals") {
        return goals::goals_bench(has("--quick"));
    }
    if has("--events") {
        return events::events_bench(has("--quick"));
    }
    if has("--queue") {
        return queue::queue_bench(has("--quick"));
    }
    if has("--counts") {
        return counts::counts_bench();
    }
    tracking::tracking_bench(has("--quick"), has("--grid"))?;
    if !has("--quick") {
        counts::counts_bench()?;
        goals::goals_bench(false)?;
    }
    Ok(())
}

fn read(path: &Path) -> Result<Vec<u8>, String> {
    std::fs::read(path).map_err(|e| format!("{}: {e}", path.display()))
}

fn read_json(path: &Path) -> Result<serde_json::Value, String> {
    serde_json::from_slice(&read(path)?).map_err(|e| format!("{}: {e}", path.display()))
}
