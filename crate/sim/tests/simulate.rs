//! The simulator and its pictures: determinism, the detector model's effects, and frames laid out as
//! YUV4MPEG2 4:2:0 expects.

use throughline_core::count::count;
use throughline_core::plan::Plan;
use throughline_sim::render::{y4m_header, Renderer};
use throughline_sim::{generate, generate_with, truth_tracks, SceneConfig, CLASSES};

fn small(seed: u64) -> SceneConfig {
    SceneConfig {
        seed,
        frames: 200,
        density: 8.0,
        ..SceneConfig::default()
    }
}

#[test]
fn the_same_seed_gives_the_same_scene_and_another_seed_another() {
    let (a, b, c) = (
        generate(&small(3)),
        generate(&small(3)),
        generate(&small(4)),
    );
    assert_eq!(a.truth, b.truth);
    assert_eq!(a.detections, b.detections);
    assert_ne!(a.truth, c.truth);
}

#[test]
fn the_detector_model_misses_more_when_asked_and_adds_false_positives() {
    let base = SceneConfig {
        frames: 400,
        false_positives: 0.0,
        ..small(5)
    };
    let few = generate(&SceneConfig {
        miss_rate: 0.02,
        ..base.clone()
    });
    let many = generate(&SceneConfig {
        miss_rate: 0.4,
        ..base.clone()
    });
    let ratio = |s: &throughline_sim::Scene| s.detections.rows.len() as f64 / s.truth.len() as f64;
    assert!(
        ratio(&few) > ratio(&many) + 0.25,
        "{} vs {}",
        ratio(&few),
        ratio(&many)
    );
    // Occlusion adds misses beyond the base rate: even at 2% the ratio stays below 0.98.
    assert!(ratio(&few) < 0.98);
    let fp = generate(&SceneConfig {
        false_positives: 2.0,
        ..base
    });
    assert!(fp.detections.rows.len() > few.detections.rows.len());
}

#[test]
fn agents_keep_their_class_and_truth_tracks_carry_it() {
    let scene = generate(&small(6));
    let tracks = truth_tracks(&scene);
    assert_eq!(tracks.tracks.len(), scene.truth_classes.len());
    for t in &tracks.tracks {
        let class = t.class.as_deref().unwrap();
        assert!(CLASSES.contains(&class));
    }
}

#[test]
fn true_crossings_of_a_plan_come_from_the_truth() {
    let scene = generate(&SceneConfig {
        frames: 1500,
        ..small(7)
    });
    let plan = Plan::from_json(r#"{"frame_rate": 25, "screenlines": [{"name": "mid", "points": [[10, 230], [630, 230]]}]}"#)
        .unwrap();
    let report = count(&truth_tracks(&scene), &plan, None).unwrap();
    let l = &report.screenlines[0];
    assert!(
        l.forward + l.backward > 5,
        "people cross the middle of the plaza"
    );
    assert_eq!(l.inferred, 0, "true tracks are never unseen");
}

#[test]
fn frames_are_yuv420_with_the_header_ffmpeg_reads() {
    assert_eq!(
        y4m_header(640, 360),
        "YUV4MPEG2 W640 H360 F25:1 Ip A1:1 C420jpeg\n"
    );
    let cfg = small(8);
    let mut renderer = Renderer::new(&cfg);
    let mut frames = Vec::new();
    generate_with(&cfg, &mut |frame, agents| {
        if frame <= 3 {
            frames.push((renderer.frame(frame, agents), agents.to_vec()));
        }
    });
    let (pixels, agents) = &frames[2];
    assert_eq!(pixels.len(), 640 * 360 * 3 / 2);
    assert!(!agents.is_empty());
    // Where a person stands the picture differs from the empty plaza.
    let mut empty = Renderer::new(&cfg);
    let background = empty.frame(3, &[]);
    let a = agents.last().unwrap().bbox;
    let (x, y) = ((a.x + a.w / 2.0) as usize, (a.y + a.h * 0.4) as usize);
    if x < 640 && y < 360 {
        let d = (i32::from(pixels[y * 640 + x]) - i32::from(background[y * 640 + x])).abs();
        assert!(d > 10, "the figure shows: luma differs by {d}");
    }
    // Sensor noise: two renderings of the same moment differ a little, not a lot.
    let mut again = Renderer::new(&cfg);
    let first = again.frame(3, agents);
    let second = again.frame(3, agents);
    let mean_diff: f64 = first[..640 * 360]
        .iter()
        .zip(&second[..640 * 360])
        .map(|(a, b)| f64::from((i32::from(*a) - i32::from(*b)).abs()))
        .sum::<f64>()
        / (640.0 * 360.0);
    assert!(mean_diff > 0.5 && mean_diff < 6.0, "{mean_diff}");
}
