//! The background formed from pictures sampled over the whole clip (a first reading before
//! detection): hand-made clips whose right answer is known exactly, each against the same clip
//! with the background formed over the opening frames.

use throughline_core::detect::{Detector, DetectorConfig, Picture};
use throughline_core::geometry::BBox;

const W: usize = 160;
const H: usize = 120;

type Planes = (Vec<u8>, Vec<u8>, Vec<u8>);

/// A grey picture with a fine fixed texture (paving) and grey chroma.
fn paving() -> Planes {
    let y = (0..W * H)
        .map(|i| 120 + ((i * 7 + i / W * 3) % 5) as u8)
        .collect();
    let (cw, ch) = Picture::chroma_size(W, H);
    (y, vec![128; cw * ch], vec![128; cw * ch])
}

/// Paints a dark block (a person in dark clothes) with its top-left at `(x, y)`, 10 x 26 pixels.
fn person(pic: &mut Planes, x: usize, y: usize) {
    let (cw, _) = Picture::chroma_size(W, H);
    for yy in y..y + 26 {
        for xx in x..x + 10 {
            pic.0[yy * W + xx] = 40;
            pic.1[(yy / 2) * cw + xx / 2] = 110;
            pic.2[(yy / 2) * cw + xx / 2] = 150;
        }
    }
}

fn config(whole_clip: bool) -> DetectorConfig {
    DetectorConfig {
        whole_clip_background: whole_clip,
        warm_up_frames: 10,
        min_area: 20,
        ..DetectorConfig::default()
    }
}

/// Boxes of every frame of a clip of `frames` pictures drawn by `draw`, read first for the
/// background when `whole_clip` (as the command line and the page do with a file).
fn boxes_per_frame(
    whole_clip: bool,
    frames: usize,
    draw: impl Fn(usize, &mut Planes),
) -> Vec<Vec<BBox>> {
    let planes = |k: usize| {
        let mut p = paving();
        draw(k, &mut p);
        p
    };
    let mut det = Detector::new(config(whole_clip), W, H);
    if det.samples_whole_clip() {
        read_first(&mut det, frames, planes);
    }
    (0..frames)
        .map(|k| {
            let p = planes(k);
            det.detect(&picture(&p))
                .unwrap()
                .into_iter()
                .map(|(b, _)| b)
                .collect()
        })
        .collect()
}

/// The planes as the detector's picture.
fn picture(p: &Planes) -> Picture<'_> {
    Picture {
        width: W,
        height: H,
        y: &p.0,
        uv: Some((&p.1, &p.2)),
    }
}

/// The first reading of a clip of `frames` pictures, as the adapters do it: each picture the
/// detector keeps is given, the others passed over (and not even drawn).
fn read_first(det: &mut Detector, frames: usize, planes: impl Fn(usize) -> Planes) {
    for k in 0..frames {
        if det.wants_sample() {
            det.sample(&picture(&planes(k))).unwrap();
        } else {
            det.pass_sample();
        }
    }
}

/// A person standing at (20, 50) for the first 60 frames, then walking right 2 px a frame.
fn stands_then_walks(k: usize, pic: &mut Planes) {
    let x = if k < 60 {
        20
    } else {
        (20 + 2 * (k - 60)).min(140)
    };
    person(pic, x, 50);
}

#[test]
fn a_person_in_view_from_the_first_frame_is_found_from_the_first_frame() {
    let whole = boxes_per_frame(true, 200, stands_then_walks);
    for (k, boxes) in whole.iter().enumerate().take(60) {
        assert_eq!(boxes.len(), 1, "frame {}: {boxes:?}", k + 1);
        let b = boxes[0];
        assert_eq!(
            (b.x, b.y, b.w, b.h),
            (20.0, 50.0, 10.0, 26.0),
            "frame {}",
            k + 1
        );
    }
    // Formed over the opening frames, the standing person is the background: nothing is found
    // until they walk, and then a ghost stays where they stood.
    let opening = boxes_per_frame(false, 200, stands_then_walks);
    assert!(
        opening[..60].iter().all(Vec::is_empty),
        "{:?}",
        &opening[..60]
    );
    let ghost = |boxes: &Vec<BBox>| boxes.iter().any(|b| b.x < 32.0);
    assert!(
        ghost(&opening[100]),
        "the opening background leaves a ghost: {:?}",
        opening[100]
    );
    assert!(
        !ghost(&whole[100]),
        "no ghost from the whole clip: {:?}",
        whole[100]
    );
    assert_eq!(whole[100].len(), 1, "{:?}", whole[100]);
}

#[test]
fn a_person_who_stands_still_stays_found() {
    // Walks in, stands 250 frames (10 s at 25 fps: twice as long as the opening background takes to
    // learn a still object), walks on; the clip is 800 frames, so they are in few of its samples.
    let draw = |k: usize, pic: &mut Planes| {
        let x = match k {
            0..=99 => return,
            100..=139 => 2 * (k - 100),
            140..=389 => 80,
            _ => (80 + 2 * (k - 390)).min(150),
        };
        person(pic, x.min(148), 50);
    };
    let whole = boxes_per_frame(true, 800, draw);
    for (k, boxes) in whole.iter().enumerate().take(390).skip(140) {
        assert_eq!(boxes.len(), 1, "frame {}: {boxes:?}", k + 1);
        assert_eq!(boxes[0].x, 80.0, "frame {}", k + 1);
    }
    let opening = boxes_per_frame(false, 800, draw);
    assert!(
        opening[385].is_empty(),
        "the opening background learns them: {:?}",
        opening[385]
    );
}

#[test]
fn the_pictures_kept_are_spread_over_the_clip_whatever_its_length() {
    for (frames, least, most) in [
        (10, 10, 10),
        (64, 64, 64),
        (65, 33, 33),
        (1_000, 32, 64),
        (100_000, 32, 64),
    ] {
        let mut det = Detector::new(config(true), W, H);
        read_first(&mut det, frames, |_| paving());
        let kept = det.samples_kept();
        assert!(
            (least..=most).contains(&kept),
            "{frames} frames: {kept} kept"
        );
    }
}

#[test]
fn the_clip_is_read_for_its_background_before_detection_not_after() {
    let flat = paving();
    let pic = picture(&flat);
    let mut det = Detector::new(config(true), W, H);
    det.sample(&pic).unwrap();
    det.detect(&pic).unwrap();
    let e = det.sample(&pic).unwrap_err();
    assert!(e.to_string().contains("before detection"), "{e}");
    let small = Picture {
        width: 8,
        height: 8,
        y: &flat.0[..64],
        uv: None,
    };
    let mut fresh = Detector::new(config(true), W, H);
    assert!(
        fresh.sample(&small).is_err(),
        "a picture of another size is refused"
    );
}
