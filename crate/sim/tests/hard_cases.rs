//! The simulator's hard cases (standing start, pairs, long pauses, pale clothes): each shows in the
//! truth or the pictures when on, and with all of them off the scene is the bytes it was before
//! they existed (the committed demo data, made by the simulator without them).

use std::collections::{BTreeMap, BTreeSet};
use throughline_core::detections;
use throughline_core::geometry::BBox;
use throughline_sim::render::Renderer;
use throughline_sim::{generate, generate_with, truth_text, HardCases, Scene, SceneConfig};

fn scene(seed: u64, hard_cases: HardCases) -> SceneConfig {
    SceneConfig {
        seed,
        frames: 600,
        density: 20.0,
        hard_cases,
        ..SceneConfig::default()
    }
}

/// Each true id's boxes by frame.
fn boxes_by_id(s: &Scene) -> BTreeMap<i64, BTreeMap<u32, BBox>> {
    let mut out: BTreeMap<i64, BTreeMap<u32, BBox>> = BTreeMap::new();
    for r in &s.truth {
        out.entry(r.id).or_default().insert(r.frame, r.bbox);
    }
    out
}

/// The longest run of consecutive frames with the very same true box, and the frame it starts on,
/// over every id.
fn longest_still(s: &Scene) -> (u32, u32) {
    let mut best = (0, 0);
    for boxes in boxes_by_id(s).values() {
        let mut run = (0, 0);
        let mut last: Option<(u32, BBox)> = None;
        for (&f, &b) in boxes {
            run = match last {
                Some((lf, lb)) if lf + 1 == f && lb == b => (run.0 + 1, run.1),
                _ => (1, f),
            };
            best = best.max(run);
            last = Some((f, b));
        }
    }
    best
}

#[test]
fn standing_start_puts_still_people_in_view_at_frame_1() {
    let standing = HardCases {
        standing_start: true,
        ..HardCases::default()
    };
    let (hard, plain) = (
        generate(&scene(3, standing)),
        generate(&scene(3, HardCases::default())),
    );
    // The scene starts populated either way (the simulator fills it before frame 1) ...
    for s in [&hard, &plain] {
        let at_1 = s.truth.iter().filter(|r| r.frame == 1).count();
        assert!(at_1 >= 10, "{at_1} in view at frame 1 (density 20)");
    }
    // ... and with the standing start some of them have not moved by frame 50 (2 s).
    let still = |s: &Scene| {
        boxes_by_id(s)
            .values()
            .filter(|b| b.get(&1).is_some() && b.get(&1) == b.get(&50))
            .count()
    };
    assert!(still(&hard) >= 3, "{} standing", still(&hard));
    assert!(
        still(&hard) > still(&plain),
        "{} vs {}",
        still(&hard),
        still(&plain)
    );
}

#[test]
fn long_pauses_keep_a_true_box_still_for_seconds_mid_walk() {
    let long = HardCases {
        long_pauses: true,
        ..HardCases::default()
    };
    let (frames, start) = longest_still(&generate(&scene(4, long)));
    assert!(frames >= 75, "the longest pause is {frames} frames");
    assert!(start > 1, "mid-walk, not the opening frames");
    // Without the hard case a stop lasts at most 10 + 39 frames (and the box then moves again).
    let (plain, _) = longest_still(&generate(&scene(4, HardCases::default())));
    assert!(plain < 75, "{plain}");
}

/// Pairs of true ids whose feet stay within half a person's height of each other (side by side)
/// for at least four seconds on end.
fn walking_together(s: &Scene) -> usize {
    let ids = boxes_by_id(s);
    let mut together: BTreeMap<(i64, i64), (u32, u32)> = BTreeMap::new();
    let mut by_frame: BTreeMap<u32, Vec<(i64, BBox)>> = BTreeMap::new();
    for (&id, boxes) in &ids {
        for (&f, &b) in boxes {
            by_frame.entry(f).or_default().push((id, b));
        }
    }
    let mut found = BTreeSet::new();
    for (&f, rows) in &by_frame {
        for (i, (a, ab)) in rows.iter().enumerate() {
            for (b, bb) in &rows[i + 1..] {
                let feet = |x: &BBox| (x.x + x.w / 2.0, x.y + x.h);
                let ((ax, ay), (bx, by)) = (feet(ab), feet(bb));
                if (ax - bx).hypot(ay - by) > 0.5 * ab.h.min(bb.h) {
                    continue;
                }
                let run = together.entry((*a, *b)).or_insert((f, 0));
                *run = if run.0 + run.1 == f {
                    (run.0, run.1 + 1)
                } else {
                    (f, 1)
                };
                if run.1 >= 100 {
                    found.insert((*a, *b));
                }
            }
        }
    }
    found.len()
}

#[test]
fn the_pairs_case_makes_two_agents_walking_together_common() {
    let pairs = HardCases {
        pairs: true,
        ..HardCases::default()
    };
    // 80 s of footage: about a hundred people, enough for the shares to show.
    let long = |hard_cases| SceneConfig {
        frames: 2000,
        ..scene(5, hard_cases)
    };
    let hard = generate(&long(pairs));
    let plain = generate(&long(HardCases::default()));
    let (h, p) = (walking_together(&hard), walking_together(&plain));
    assert!(
        h >= 10 && h >= 2 * p,
        "pairs: {h} with the hard case, {p} without"
    );
}

#[test]
fn pale_clothes_are_the_pavings_grey_for_some_people() {
    let pale = HardCases {
        pale_clothes: true,
        ..HardCases::default()
    };
    let mut colours = Vec::new();
    generate_with(&scene(6, pale), &mut |_, agents| {
        colours.extend(agents.iter().map(|a| a.colour));
    });
    // The paving stones are drawn from 150 to 185 with red 2% above and blue 6% below (render.rs).
    let paving = |c: &[f64; 3]| {
        (150.0..=185.0).contains(&c[1])
            && (c[0] - 1.02 * c[1]).abs() < 1.0
            && (c[2] - 0.94 * c[1]).abs() < 1.0
    };
    let share = colours.iter().filter(|c| paving(c)).count() as f64 / colours.len() as f64;
    assert!(share > 0.15 && share < 0.6, "{share}");
    let mut plain = Vec::new();
    generate_with(&scene(6, HardCases::default()), &mut |_, agents| {
        plain.extend(agents.iter().map(|a| a.colour));
    });
    assert!(!plain.iter().any(paving));
}

#[test]
fn hard_cases_are_read_from_their_names() {
    assert_eq!(HardCases::parse("all"), Ok(HardCases::ALL));
    let two = HardCases::parse("pairs, pale-clothes").unwrap();
    assert!(two.pairs && two.pale_clothes && !two.standing_start && !two.long_pauses);
    let bad = HardCases::parse("pairs,crowds").unwrap_err();
    assert!(
        bad.contains("`crowds`") && bad.contains("long-pauses"),
        "{bad}"
    );
}

/// With no hard case the simulator gives the committed demo data byte for byte
/// (`cargo xtask demo-data`'s settings: seed 2026, 750 frames, 12 in view, 10% missed, embeddings
/// of 8), so adding the cases changed no random draw of the default scene.
#[test]
fn without_hard_cases_the_demo_data_is_the_same_bytes() {
    let cfg = SceneConfig {
        seed: 2026,
        frames: 750,
        density: 12.0,
        miss_rate: 0.1,
        embedding_dim: 8,
        ..SceneConfig::default()
    };
    let s = generate(&cfg);
    let demo = concat!(env!("CARGO_MANIFEST_DIR"), "/../../demo-site/demo/");
    let committed = |name: &str| std::fs::read_to_string(format!("{demo}{name}")).unwrap();
    assert!(truth_text(&s) == committed("truth.txt"), "truth.txt");
    assert!(
        detections::to_benchmark_text(&s.detections) == committed("detections.txt"),
        "detections.txt"
    );
    assert!(
        detections::to_csv(&s.detections) == committed("detections.csv"),
        "detections.csv"
    );
}

/// And the pictures: a hash (64-bit FNV-1a) of the first 30 frames of a small default scene,
/// recorded from the simulator as it was before the hard cases were added.
#[test]
fn without_hard_cases_the_pictures_are_the_same_bytes() {
    let cfg = SceneConfig {
        seed: 9,
        frames: 30,
        ..SceneConfig::default()
    };
    let mut renderer = Renderer::new(&cfg);
    let mut hash: u64 = 0xcbf2_9ce4_8422_2325;
    generate_with(&cfg, &mut |frame, agents| {
        for &byte in &renderer.frame(frame, agents) {
            hash = (hash ^ u64::from(byte)).wrapping_mul(0x0100_0000_01b3);
        }
    });
    assert_eq!(hash, 9_022_807_274_911_484_448);
}
