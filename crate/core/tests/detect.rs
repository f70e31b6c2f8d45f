//! The moving-object detector: hand-made pictures whose right answer is known exactly, and the
//! simulator's rendered frames against its ground truth.

use throughline_core::detect::{Detector, DetectorConfig, Picture};
use throughline_core::geometry::{iou, BBox};
use throughline_sim::{self as sim, render};

const W: usize = 160;
const H: usize = 120;

/// A grey picture (with a fixed fine texture, as paving has) and grey chroma.
fn background() -> (Vec<u8>, Vec<u8>, Vec<u8>) {
    let y = (0..W * H)
        .map(|i| 120 + ((i * 7 + i / W * 3) % 5) as u8)
        .collect();
    let (cw, ch) = Picture::chroma_size(W, H);
    (y, vec![128; cw * ch], vec![128; cw * ch])
}

/// Paints a rectangle (pixels, top-left + size) with a luma value and a chroma pair.
fn paint(
    pic: &mut (Vec<u8>, Vec<u8>, Vec<u8>),
    r: (usize, usize, usize, usize),
    luma: u8,
    uv: (u8, u8),
) {
    let (x0, y0, w, h) = r;
    let (cw, _) = Picture::chroma_size(W, H);
    for y in y0..y0 + h {
        for x in x0..x0 + w {
            pic.0[y * W + x] = luma;
            pic.1[(y / 2) * cw + x / 2] = uv.0;
            pic.2[(y / 2) * cw + x / 2] = uv.1;
        }
    }
}

/// Runs the detector over `frames` pictures made by `draw(frame_index, picture)` and returns the
/// boxes of the last one.
fn last_boxes(
    config: DetectorConfig,
    frames: usize,
    draw: impl Fn(usize, &mut (Vec<u8>, Vec<u8>, Vec<u8>)),
) -> Vec<(BBox, f64)> {
    let mut det = Detector::new(config, W, H);
    let mut last = Vec::new();
    for k in 0..frames {
        let mut pic = background();
        draw(k, &mut pic);
        last = det
            .detect(&Picture {
                width: W,
                height: H,
                y: &pic.0,
                uv: Some((&pic.1, &pic.2)),
            })
            .expect("same size");
    }
    last
}

fn quick() -> DetectorConfig {
    DetectorConfig {
        warm_up_frames: 10,
        min_area: 20,
        ..DetectorConfig::default()
    }
}

#[test]
fn a_moving_block_is_found_where_it_is() {
    // A 12x30 bright block that comes in after the warm-up and moves 2 px a frame: its box is the
    // block itself (the clean-up opens and closes with 3x3 and 5x5 squares, which leave a
    // rectangle unchanged).
    let boxes = last_boxes(quick(), 30, |k, pic| {
        if k >= 10 {
            paint(pic, (20 + 2 * k, 40, 12, 30), 220, (100, 160));
        }
    });
    assert_eq!(boxes.len(), 1, "{boxes:?}");
    let b = boxes[0].0;
    assert_eq!((b.x, b.y, b.w, b.h), (78.0, 40.0, 12.0, 30.0));
    assert!(boxes[0].1 > 0.95, "a solid block fills its box");
}

#[test]
fn nothing_is_reported_while_the_background_forms() {
    let boxes = last_boxes(quick(), 10, |k, pic| {
        paint(pic, (20 + 2 * k, 40, 12, 30), 220, (128, 128))
    });
    assert!(boxes.is_empty());
}

#[test]
fn an_object_present_during_the_warm_up_is_not_learnt_into_the_background() {
    // The block moves through the warm-up; the median of the sampled pictures is the empty scene,
    // so at frame 30 there is one box, not a ghost where the block started.
    let boxes = last_boxes(quick(), 30, |k, pic| {
        paint(pic, (10 + 3 * k, 50, 10, 25), 30, (128, 128))
    });
    assert_eq!(boxes.len(), 1, "{boxes:?}");
    assert_eq!(boxes[0].0.x, 97.0);
}

#[test]
fn a_shadow_is_not_an_object_but_a_dark_coloured_thing_is() {
    // Shadow: 70% of the background's brightness, same chroma. A dark red block: the same
    // brightness, chroma far from grey.
    let after_warm_up = |luma: u8, uv: (u8, u8)| {
        move |k: usize, pic: &mut (Vec<u8>, Vec<u8>, Vec<u8>)| {
            if k >= 10 {
                paint(pic, (20 + 2 * k, 40, 20, 10), luma, uv);
            }
        }
    };
    let shadow = last_boxes(quick(), 30, after_warm_up(85, (128, 128)));
    assert!(shadow.is_empty(), "{shadow:?}");
    let red = last_boxes(quick(), 30, after_warm_up(85, (100, 190)));
    assert_eq!(red.len(), 1, "{red:?}");
}

#[test]
fn two_objects_side_by_side_are_split_where_the_shape_says_so() {
    // Two 12x40 blocks 6 px apart, joined at their shoulders only (a bridge 4 px high): one blob, two objects
    // when the expected height says one object is about 40 px tall and 14 px wide.
    let config = DetectorConfig {
        far_height: Some(40.0),
        near_height: Some(40.0),
        ..quick()
    };
    let draw = |k: usize, pic: &mut (Vec<u8>, Vec<u8>, Vec<u8>)| {
        paint(pic, (30 + k, 40, 12, 40), 220, (128, 128));
        paint(pic, (48 + k, 40, 12, 40), 220, (128, 128));
        paint(pic, (42 + k, 44, 6, 4), 220, (128, 128));
    };
    let boxes = last_boxes(config.clone(), 30, draw);
    assert_eq!(boxes.len(), 2, "{boxes:?}");
    let no_rule = last_boxes(quick(), 30, draw);
    assert_eq!(
        no_rule.len(),
        1,
        "without an expected size the pair stays one blob"
    );
}

#[test]
fn a_picture_of_another_size_is_refused() {
    let mut det = Detector::new(DetectorConfig::default(), W, H);
    let y = vec![0u8; 10];
    let e = det
        .detect(&Picture {
            width: 5,
            height: 2,
            y: &y,
            uv: None,
        })
        .unwrap_err();
    assert!(e.message.contains("160x120"), "{e}");
}

#[test]
fn settings_files_name_what_is_wrong() {
    assert!(DetectorConfig::from_json(r#"{"far_height": 30, "near_height": 90}"#).is_ok());
    let e = DetectorConfig::from_json(r#"{"far_hieght": 30}"#).unwrap_err();
    assert!(e.message.contains("far_hieght"), "{e}");
    let e = DetectorConfig::from_json(r#"{"shadow_low": 0.95}"#).unwrap_err();
    assert!(e.message.contains("shadow_low"), "{e}");
}

/// Recall and precision at IoU 0.5 (greedy matching by IoU, highest first) per frame.
fn recall_precision(truth: &[Vec<BBox>], found: &[Vec<BBox>]) -> (f64, f64) {
    let (mut tp, mut n_truth, mut n_found) = (0usize, 0usize, 0usize);
    for (t, f) in truth.iter().zip(found) {
        n_truth += t.len();
        n_found += f.len();
        let mut pairs: Vec<(f64, usize, usize)> = t
            .iter()
            .enumerate()
            .flat_map(|(i, a)| f.iter().enumerate().map(move |(j, b)| (iou(a, b), i, j)))
            .filter(|p| p.0 >= 0.5)
            .collect();
        pairs.sort_by(|a, b| b.0.total_cmp(&a.0));
        let (mut used_t, mut used_f) = (vec![false; t.len()], vec![false; f.len()]);
        for (_, i, j) in pairs {
            if !used_t[i] && !used_f[j] {
                used_t[i] = true;
                used_f[j] = true;
                tp += 1;
            }
        }
    }
    (
        tp as f64 / n_truth.max(1) as f64,
        tp as f64 / n_found.max(1) as f64,
    )
}

#[test]
fn finds_most_people_in_the_simulated_plaza() {
    // Own measurement, not an outside reference: on 400 frames of seed 7 at 12 in view the
    // detector had recall 0.71 and precision 0.66 at IoU 0.5 against the simulator's visible-part
    // truth (BENCHMARKS.md). The floors below hold that with margin for this shorter scene.
    let cfg = sim::SceneConfig {
        seed: 7,
        frames: 160,
        density: 12.0,
        ..sim::SceneConfig::default()
    };
    let mut renderer = render::Renderer::new(&cfg);
    let (w, h) = (renderer.width(), renderer.height());
    let config = DetectorConfig {
        far_height: Some(34.0),
        near_height: Some(91.0),
        ..DetectorConfig::default()
    };
    let warm_up = config.warm_up_frames as usize;
    let mut det = Detector::new(config, w, h);
    let mut found = Vec::new();
    let scene = sim::generate_with(&cfg, &mut |k, agents| {
        // The frame number drives the light's drift, as in `throughline simulate --render`.
        let frame = renderer.frame(k, agents);
        let pic = Picture::planar(w, h, &frame, true).expect("a whole 4:2:0 frame");
        found.push(
            det.detect(&pic)
                .unwrap()
                .into_iter()
                .map(|(b, _)| b)
                .collect::<Vec<_>>(),
        );
    });
    let mut truth = vec![Vec::new(); found.len()];
    for t in &scene.truth {
        truth[t.frame as usize - 1].push(t.bbox);
    }
    let (recall, precision) = recall_precision(&truth[warm_up..], &found[warm_up..]);
    assert!(recall >= 0.6, "recall {recall:.3}");
    assert!(precision >= 0.55, "precision {precision:.3}");
}

#[test]
fn class_guess_from_shape_against_the_expected_height() {
    // Expected person height: 40 px at the top row, 100 px at the bottom (row 200 of 200), so 100
    // for every box below, whose bottoms are all at y = 200. Hand-worked against the rules in
    // `Detector::guess_class`.
    let config = DetectorConfig {
        far_height: Some(40.0),
        near_height: Some(100.0),
        ..DetectorConfig::default()
    };
    let det = Detector::new(config.clone(), 320, 200);
    let at_bottom = |w: f64, h: f64| BBox::new(10.0, 200.0 - h, w, h);
    let guess = |b: BBox| {
        det.guess_class(&b)
            .map(|c| throughline_core::detect::GUESSED_CLASSES[c as usize])
    };
    assert_eq!(
        guess(at_bottom(35.0, 95.0)),
        Some("pedestrian"),
        "narrow and person-tall"
    );
    assert_eq!(
        guess(at_bottom(65.0, 100.0)),
        Some("cyclist"),
        "0.65 wide for its height, tall"
    );
    assert_eq!(
        guess(at_bottom(150.0, 80.0)),
        Some("vehicle"),
        "wider than tall, 1.5 heights wide"
    );
    assert_eq!(
        guess(at_bottom(60.0, 50.0)),
        Some("pedestrian"),
        "wide but small: too short for a cyclist, too narrow for a vehicle"
    );
    assert_eq!(
        guess(at_bottom(49.0, 100.0)),
        Some("pedestrian"),
        "just under half a height wide"
    );
    // Without heights, or switched off: no guess.
    let plain = Detector::new(DetectorConfig::default(), 320, 200);
    assert_eq!(plain.guess_class(&at_bottom(150.0, 80.0)), None);
    let off = Detector::new(
        DetectorConfig {
            guess_class: false,
            ..config
        },
        320,
        200,
    );
    assert_eq!(off.guess_class(&at_bottom(150.0, 80.0)), None);
    // Class names in order of first appearance, as a file reader lists them.
    let found = |b: BBox, score: f64| throughline_core::detect::Found {
        bbox: b,
        score,
        appearance: None,
    };
    let d = det.detections_from(vec![
        vec![found(at_bottom(150.0, 80.0), 0.9)],
        vec![
            found(at_bottom(35.0, 95.0), 0.8),
            found(at_bottom(150.0, 80.0), 0.9),
        ],
    ]);
    assert_eq!(d.classes, ["vehicle", "pedestrian"]);
    let named: Vec<_> = d
        .rows
        .iter()
        .map(|r| (r.frame, d.class_name(r.class).unwrap()))
        .collect();
    assert_eq!(named, [(1, "vehicle"), (2, "pedestrian"), (2, "vehicle")]);
}

#[test]
fn appearance_is_a_colour_and_brightness_histogram_of_each_half() {
    // A 12x32 block, red-ish above (U 90, V 200, luma 80) and blue-ish below (U 200, V 100, luma
    // 40), boxed exactly (as in a_moving_block_is_found_where_it_is) at y = 40, so its halves meet
    // at y = 56, an even row: the 4:2:0 chroma rows do not straddle them. Hand-worked bins: upper
    // half colour (U below grey, V above) = 3 * 0 + 2 = bin 2, brightness 80 * 3 / 256 = 0, bin
    // 9; lower half colour (U above, V below) = 12 + 6, brightness 12 + 9. Each half sums to one,
    // then unit length: four values of 0.5.
    let config = DetectorConfig {
        appearance: true,
        ..quick()
    };
    let mut det = Detector::new(config, W, H);
    let mut found = Vec::new();
    for k in 0..30 {
        let mut pic = background();
        if k >= 10 {
            paint(&mut pic, (20 + 2 * k, 40, 12, 16), 80, (90, 200));
            paint(&mut pic, (20 + 2 * k, 56, 12, 16), 40, (200, 100));
        }
        found = det
            .detect_found(&Picture {
                width: W,
                height: H,
                y: &pic.0,
                uv: Some((&pic.1, &pic.2)),
            })
            .expect("same size");
    }
    assert_eq!(found.len(), 1, "{found:?}");
    let b = found[0].bbox;
    assert_eq!((b.x, b.y, b.w, b.h), (78.0, 40.0, 12.0, 32.0));
    let mut want = [0f32; throughline_core::detect::APPEARANCE_DIM];
    for i in [2, 9, 18, 21] {
        want[i] = 0.5;
    }
    assert_eq!(found[0].appearance.as_deref(), Some(&want[..]));
    // Off by default: the same boxes, without a vector.
    let mut plain = Detector::new(quick(), W, H);
    let pic = background();
    let still = Picture {
        width: W,
        height: H,
        y: &pic.0,
        uv: Some((&pic.1, &pic.2)),
    };
    for _ in 0..10 {
        plain.detect_found(&still).unwrap();
    }
    let mut moved = background();
    paint(&mut moved, (78, 40, 12, 32), 80, (90, 200));
    let f = plain
        .detect_found(&Picture {
            width: W,
            height: H,
            y: &moved.0,
            uv: Some((&moved.1, &moved.2)),
        })
        .unwrap();
    assert_eq!(f.len(), 1);
    assert_eq!(f[0].appearance, None);
}

#[test]
fn the_footage_length_is_kept_when_its_last_frames_hold_no_one() {
    use throughline_core::detect::Found;
    use throughline_core::pipeline;
    use throughline_core::track::{Method, TrackerConfig};
    // Someone walks through in frames 1-20 of a 75-frame clip (three seconds at 25 a second);
    // nobody is in view after. The clip is 75 frames long, not 20: the count's last interval,
    // and a `--frames` for the same boxes read from a file, reach to its end.
    let found = |k: usize| Found {
        bbox: BBox::new(10.0 + 4.0 * k as f64, 40.0, 10.0, 26.0),
        score: 1.0,
        appearance: None,
    };
    let per_frame: Vec<Vec<Found>> = (0..75)
        .map(|k| if k < 20 { vec![found(k)] } else { Vec::new() })
        .collect();
    let detector = Detector::new(quick(), W, H);
    let dets = detector.detections_from(per_frame);
    assert_eq!((dets.last_frame(), dets.length()), (20, 75));
    let config = TrackerConfig::for_method(Method::Sort);
    let tracks = pipeline::track(&dets, &config, &mut |_, _| {}).unwrap();
    assert_eq!(tracks.frame_count, 75);
    // Written to a file and read back, they keep it (a comment line records it).
    let text = throughline_core::detections::to_file_text(&dets);
    assert!(text.starts_with("# footage_frames: 75\n"), "{text}");
    let read = throughline_core::detections::read_detections(text.as_bytes()).unwrap();
    assert_eq!(read.detections.length(), 75);
    // Boxes of a file without it know no length beyond their last box.
    let plain = text.replace("# footage_frames: 75\n", "");
    let read = throughline_core::detections::read_detections(plain.as_bytes()).unwrap();
    assert_eq!(read.detections.length(), 20);
}
