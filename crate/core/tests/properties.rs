//! Properties the counting must keep whatever the input: relations between two runs of the core on
//! related inputs, not values. Inputs are scenes of our own simulator (several seeds), counted with
//! the demo's plan; no number here is a reference value.
//!
//! - Reordering the rows of a detections file changes no count.
//! - A forward crossing of a line is a backward crossing of the same line drawn the other way.
//! - Footage tracked in two parts, the tracks joined end to end, counts as the whole within the
//!   boundary effect written in docs/counting-rules.md ("Footage counted in parts").

use throughline_core::count::count;
use throughline_core::detections::{read_detections, to_file_text, Detections};
use throughline_core::plan::Plan;
use throughline_core::report::Report;
use throughline_core::track::{run_tracker, Method, TrackerConfig, Tracks};
use throughline_sim::{generate, SceneConfig};

const SEEDS: [u64; 4] = [3, 17, 29, 41];

fn plan_text() -> String {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../demo-site/demo/plan.json"
    );
    std::fs::read_to_string(path).expect("the demo's plan")
}

fn scene(seed: u64) -> Detections {
    generate(&SceneConfig {
        seed,
        frames: 1500,
        embedding_dim: 8,
        ..SceneConfig::default()
    })
    .detections
}

fn track(dets: &Detections, method: Method) -> Tracks {
    run_tracker(dets, &TrackerConfig::for_method(method), &mut |_, _| {}).expect("tracker runs")
}

/// Every count of a report: the counts CSV's rows (line, direction, class, interval), and zone
/// totals.
fn counts(r: &Report) -> Vec<String> {
    let mut out: Vec<String> = throughline_core::report::counts_csv(r)
        .lines()
        .map(str::to_string)
        .collect();
    for z in &r.zones {
        out.push(format!(
            "zone {} entries {} exits {}",
            z.name, z.entries, z.exits
        ));
    }
    out
}

/// A small deterministic shuffle (xorshift), so a failure can be replayed.
fn shuffle<T>(items: &mut [T], mut state: u64) {
    for i in (1..items.len()).rev() {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        items.swap(i, (state % (i as u64 + 1)) as usize);
    }
}

#[test]
fn reordering_the_rows_of_a_detections_file_changes_no_count() {
    let plan = Plan::from_json(&plan_text()).unwrap();
    for seed in SEEDS {
        let text = to_file_text(&scene(seed));
        let mut lines: Vec<&str> = text.lines().collect();
        let header = lines.remove(0);
        shuffle(&mut lines, seed * 7919 + 1);
        let shuffled = format!("{header}\n{}\n", lines.join("\n"));
        let original = read_detections(text.as_bytes()).unwrap().detections;
        let reordered = read_detections(shuffled.as_bytes()).unwrap().detections;
        for method in [
            Method::Sort,
            Method::Bytetrack,
            Method::Iou,
            Method::Deepsort,
        ] {
            let a = count(&track(&original, method), &plan, None).unwrap();
            let b = count(&track(&reordered, method), &plan, None).unwrap();
            assert_eq!(counts(&a), counts(&b), "seed {seed}, {method}");
        }
    }
}

#[test]
fn a_forward_crossing_is_a_backward_crossing_of_the_line_drawn_the_other_way() {
    let plan = Plan::from_json(&plan_text()).unwrap();
    let mut flipped: serde_json::Value = serde_json::from_str(&plan_text()).unwrap();
    for line in flipped["screenlines"].as_array_mut().unwrap() {
        line["points"].as_array_mut().unwrap().reverse();
        let forward = line["forward"].take();
        line["forward"] = line["backward"].take();
        line["backward"] = forward;
    }
    let flipped = Plan::from_json(&flipped.to_string()).unwrap();
    for seed in SEEDS {
        let tracks = track(&scene(seed), Method::Sort);
        let mut a = counts(&count(&tracks, &plan, None).unwrap());
        let mut b = counts(&count(&tracks, &flipped, None).unwrap());
        // The same rows (each direction under its own name), listed in another order.
        a.sort();
        b.sort();
        assert_eq!(a, b, "seed {seed}");
    }
}

/// Every count of a report as one list: each line's forward and backward totals, each zone's
/// entries and exits.
fn totals(r: &Report) -> Vec<i64> {
    let lines = r.screenlines.iter().flat_map(|l| [l.forward, l.backward]);
    let zones = r.zones.iter().flat_map(|z| [z.entries, z.exits]);
    lines.chain(zones).map(|n| n as i64).collect()
}

#[test]
fn footage_tracked_in_two_parts_counts_as_the_whole_within_the_boundary_effect() {
    let plan = Plan::from_json(&plan_text()).unwrap();
    let (mut tried, mut changed) = (0, 0);
    for seed in SEEDS {
        let dets = scene(seed);
        let whole_tracks = track(&dets, Method::Sort);
        let whole = totals(&count(&whole_tracks, &plan, None).unwrap());
        for cut in (150..1400).step_by(100) {
            let (first, second) = split_at(&dets, cut);
            let joined = join_parts(
                &track(&first, Method::Sort),
                &track(&second, Method::Sort),
                cut,
            );
            let parts = totals(&count(&joined, &plan, None).unwrap());
            // The documented bound: one count more or less per object in view at the cut.
            let in_view = whole_tracks
                .tracks
                .iter()
                .filter(|t| t.first_frame() <= cut && t.last_frame() > cut)
                .count() as i64;
            let worst = whole.iter().zip(&parts).map(|(w, p)| (w - p).abs()).max();
            assert!(
                worst <= Some(in_view),
                "seed {seed}, cut at frame {cut}: whole {whole:?}, in parts {parts:?}"
            );
            tried += 1;
            changed += usize::from(worst > Some(0));
        }
    }
    // How rare it is in practice (this project's own measurement, kept with a margin: 11 of 104
    // cuts every 50 frames changed a count, each by one, on 2026-12-03): most cuts change nothing.
    assert!(
        changed * 4 <= tried,
        "{changed} of {tried} cuts changed a count"
    );
}

/// Frames up to `cut`, and the frames after it numbered from 1 as a second file would be.
fn split_at(dets: &Detections, cut: u32) -> (Detections, Detections) {
    let mut first = dets.clone();
    first.rows.retain(|d| d.frame <= cut);
    let mut second = dets.clone();
    second.rows.retain(|d| d.frame > cut);
    for d in &mut second.rows {
        d.frame -= cut;
    }
    (first, second)
}

/// Tracks of the second part after those of the first, frames and ids moved on.
fn join_parts(a: &Tracks, b: &Tracks, cut: u32) -> Tracks {
    let mut out = a.clone();
    let next = a.tracks.iter().map(|t| t.id).max().unwrap_or(0);
    for t in &b.tracks {
        let mut t = t.clone();
        t.id += next;
        for b in &mut t.boxes {
            b.frame += cut;
        }
        out.tracks.push(t);
    }
    out.frame_count = cut + b.frame_count;
    out
}
