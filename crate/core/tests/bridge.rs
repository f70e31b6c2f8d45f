//! Visual bridging of missed detections (V-IOU: Bochinski, Senst and Sikora, AVSS 2018) on
//! rendered scenes whose truth is known: a textured object moving over a textured background,
//! its detections taken away for some frames.
//!
//! The checks follow the method's published rule: a gap is bridged only when following the object
//! forward from the last box and backward from the next box meet; otherwise the tracks stay apart.

use throughline_core::detections::read_detections;
use throughline_core::limits::MAX_BRIDGE_PAIRS_PER_END;
use throughline_core::plan::Plan;
use throughline_core::track::bridge::Bridger;
use throughline_core::{pipeline, Tracks};

const W: usize = 160;
const H: usize = 96;

/// A fixed grey texture in 60..190 for the background (a hash of the pixel's place).
fn ground(x: usize, y: usize) -> u8 {
    let h = (x as u64).wrapping_mul(0x9E37_79B9_7F4A_7C15)
        ^ (y as u64).wrapping_mul(0xC2B2_AE3D_27D4_EB4F);
    let h = (h ^ (h >> 29)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    60 + ((h >> 32) % 130) as u8
}

/// An object `look` (0 or 1: two different patterns) of 10 × 24 pixels at `(x, y)`.
#[derive(Clone, Copy)]
struct Object {
    x: usize,
    y: usize,
    look: u8,
}

fn object_pixel(o: &Object, i: usize, j: usize) -> u8 {
    match o.look {
        // Dark head, light bands on the body.
        0 => {
            if j < 6 {
                30
            } else if (j / 3).is_multiple_of(2) {
                230
            } else {
                110 + (i as u8) * 8
            }
        }
        // Columns instead of bands.
        _ => {
            if i % 4 < 2 {
                20
            } else {
                250 - (j as u8) * 3
            }
        }
    }
}

fn render(objects: &[Object]) -> Vec<u8> {
    let mut luma: Vec<u8> = (0..W * H).map(|k| ground(k % W, k / W)).collect();
    for o in objects {
        for j in 0..24 {
            for i in 0..10 {
                if o.x + i < W && o.y + j < H {
                    luma[(o.y + j) * W + o.x + i] = object_pixel(o, i, j);
                }
            }
        }
    }
    luma
}

/// Frame `f` (1-based) of a walk to the right at 2 pixels a frame.
fn walker(f: u32, look: u8) -> Object {
    Object {
        x: 10 + 2 * (f as usize - 1),
        y: 40,
        look,
    }
}

/// Benchmark text of one box per object per frame, except the frames `missed`.
fn detections(frames: u32, objects: &dyn Fn(u32) -> Vec<Object>, missed: &[u32]) -> String {
    let mut text = String::new();
    for f in 1..=frames {
        if missed.contains(&f) {
            continue;
        }
        for o in objects(f) {
            text += &format!("{f},-1,{},{},10,24,0.9,-1,-1,-1\n", o.x, o.y);
        }
    }
    text
}

/// Tracks the detections with the IoU tracker (a 2-frame gap at most: longer gaps break tracks).
fn tracked(text: &str) -> Tracks {
    let dets = read_detections(text.as_bytes())
        .expect("detections")
        .detections;
    // Bridging is asked for in the settings (off by default).
    let settings = r#"{"bridge_frames": 25}"#;
    let config =
        pipeline::tracker_config(&dets, Some(throughline_core::Method::Iou), Some(settings))
            .expect("settings");
    pipeline::track(&dets, &config, &mut |_, _| {}).expect("tracks")
}

/// The tracks after bridging with the rendered frames.
fn bridged(
    tracks: &Tracks,
    frames: u32,
    objects: &dyn Fn(u32) -> Vec<Object>,
) -> (Tracks, throughline_core::track::bridge::BridgeSummary) {
    let mut bridger = Bridger::new(tracks, W, H);
    for f in 1..=frames {
        bridger.feed(f, &render(&objects(f)));
    }
    bridger.finish(tracks)
}

const PLAN: &str = r#"{ "frame_rate": 25, "anchor": "centre",
  "screenlines": [ { "name": "gate", "points": [[70, 0], [70, 96]] } ] }"#;

fn crossings(tracks: &Tracks) -> (u64, u64) {
    let plan = Plan::from_json(PLAN).expect("plan");
    let report = pipeline::count(tracks, &plan, None, &pipeline::Work::default()).expect("report");
    (
        report.screenlines[0].forward,
        report.screenlines[0].backward,
    )
}

#[test]
fn a_bridged_gap_keeps_one_identity_and_one_crossing() {
    // The walker's centre passes x = 70 at frame 28.5, inside the 8 frames without detections.
    let objects = |f| vec![walker(f, 0)];
    let missed: Vec<u32> = (25..=32).collect();
    let tracks = tracked(&detections(50, &objects, &missed));
    assert_eq!(
        tracks.tracks.len(),
        2,
        "the gap breaks the IoU tracker's track"
    );
    let (out, summary) = bridged(&tracks, 50, &objects);
    assert_eq!(out.tracks.len(), 1, "{summary:?}");
    let t = &out.tracks[0];
    assert_eq!(t.id, tracks.tracks[0].id, "the first track's id is kept");
    assert_eq!((t.first_frame(), t.last_frame()), (1, 50));
    // One box a frame; the bridged ones are where the walker was (it moves 2 pixels a frame).
    assert_eq!(t.boxes.len(), 50);
    for b in t.boxes.iter().filter(|b| (25..=32).contains(&b.frame)) {
        assert!(!b.observed && b.score == 0.0);
        let truth = walker(b.frame, 0);
        assert!(
            (b.bbox.x - truth.x as f64).abs() <= 1.0,
            "frame {}: {:?}",
            b.frame,
            b.bbox
        );
        assert!(
            (b.bbox.y - truth.y as f64).abs() <= 1.0,
            "frame {}: {:?}",
            b.frame,
            b.bbox
        );
    }
    assert_eq!(summary.joins.len(), 1);
    assert_eq!(
        (summary.joins[0].first_frame, summary.joins[0].last_frame),
        (25, 32)
    );
    // Left to right across a line drawn downwards: one crossing, of the backward direction.
    assert_eq!(crossings(&out), (0, 1));
}

#[test]
fn followings_that_do_not_meet_leave_the_tracks_apart() {
    // One object leaves the picture's content at frame 24 (it is no longer drawn); another, of a
    // different look, appears at frame 33 where the first would have been.
    let objects = |f: u32| match f {
        1..=24 => vec![walker(f, 0)],
        25..=32 => vec![],
        _ => vec![walker(f, 1)],
    };
    let tracks = tracked(&detections(50, &objects, &[]));
    assert_eq!(tracks.tracks.len(), 2);
    let (out, summary) = bridged(&tracks, 50, &objects);
    assert_eq!(
        summary.followed, 1,
        "the gap is plausible by place and size: {summary:?}"
    );
    assert_eq!(summary.met, 0);
    assert_eq!(out, tracks);
}

#[test]
fn without_footage_or_when_switched_off_nothing_changes() {
    let objects = |f| vec![walker(f, 0)];
    let missed: Vec<u32> = (25..=32).collect();
    let mut tracks = tracked(&detections(50, &objects, &missed));
    // No frames given: no gap followed.
    let (out, summary) = Bridger::new(&tracks, W, H).finish(&tracks);
    assert_eq!(out, tracks);
    assert_eq!((summary.followed, summary.not_followed), (0, 1));
    // `bridge_frames: 0` in the settings.
    tracks.config.bridge_frames = 0;
    let (out, summary) = bridged(&tracks, 50, &objects);
    assert_eq!(out, tracks);
    assert_eq!(summary.followed + summary.not_followed, 0);
    // A gap longer than `bridge_frames` is not tried.
    tracks.config.bridge_frames = 7;
    assert_eq!(bridged(&tracks, 50, &objects).1.followed, 0);
}

#[test]
fn hostile_tracks_cost_bounded_work() {
    // A thousand tracks end at frame 3 and a thousand start at frame 6 in the same place; boxes
    // far larger than the picture and far outside it; a short luma plane. Each end is tried with
    // at most MAX_BRIDGE_PAIRS_PER_END starts; nothing panics.
    let mut text = String::new();
    for f in [1u32, 2, 3] {
        for k in 0..1000 {
            text += &format!("{f},-1,{},{},10,24,0.9,-1,-1,-1\n", k % 7, 40);
        }
        text += &format!("{f},-1,-5e9,3e9,4e9,9e9,0.9,-1,-1,-1\n");
    }
    for f in [6u32, 7, 8] {
        for k in 0..1000 {
            text += &format!("{f},-1,{},{},10,24,0.9,-1,-1,-1\n", k % 7, 40);
        }
    }
    let tracks = tracked(&text);
    let mut bridger = Bridger::new(&tracks, W, H);
    assert!(bridger.last_frame_needed() <= 8);
    for f in 1..=8 {
        let luma = if f == 4 { vec![7u8; 10] } else { render(&[]) };
        bridger.feed(f, &luma);
    }
    let (out, summary) = bridger.finish(&tracks);
    assert!(summary.followed <= tracks.tracks.len() * MAX_BRIDGE_PAIRS_PER_END);
    assert!(out.tracks.len() <= tracks.tracks.len());
}

#[test]
fn bridge_frames_beyond_its_limit_is_refused_naming_the_field() {
    use throughline_core::track::TrackerConfig;
    let e = TrackerConfig::from_json(r#"{"bridge_frames": 251}"#, throughline_core::Method::Sort)
        .unwrap_err();
    assert!(e.to_string().contains("`bridge_frames` is 251"), "{e}");
    let ok = TrackerConfig::from_json(r#"{"bridge_frames": 0}"#, throughline_core::Method::Sort);
    assert_eq!(ok.map(|c| c.bridge_frames).ok(), Some(0));
}
