//! The detector's work cut into bands of rows (`detect::Spread`): the boxes are the ones
//! found in one piece, whatever the number of bands and the order they run in. A relation between
//! two runs on the simulator's rendered frames (no outside reference value).

use throughline_core::detect::{Detector, DetectorConfig, Found, InTurn, Job, Picture, Spread};
use throughline_sim::{self as sim, render};

/// Bands run last first, as a pool of threads might finish them.
struct Backwards(usize);

impl Spread for Backwards {
    fn bands(&self) -> usize {
        self.0
    }

    fn run<'a>(&self, jobs: Vec<Job<'a>>) {
        for job in jobs.into_iter().rev() {
            job();
        }
    }
}

/// 4:2:0 frames of a simulated scene (640x360), planar as YUV4MPEG2 holds them.
fn rendered(seed: u64, frames: u32) -> Vec<Vec<u8>> {
    let cfg = sim::SceneConfig {
        seed,
        frames,
        density: 12.0,
        ..sim::SceneConfig::default()
    };
    let mut renderer = render::Renderer::new(&cfg);
    let mut out = Vec::new();
    sim::generate_with(&cfg, &mut |k, agents| out.push(renderer.frame(k, agents)));
    out
}

/// The top-left `w` x `h` of a 640x360 planar 4:2:0 frame (an odd size gives a ragged chroma edge).
fn crop(frame: &[u8], w: usize, h: usize) -> Vec<u8> {
    let (fw, fh) = (640, 360);
    let (fcw, fch) = Picture::chroma_size(fw, fh);
    let (cw, ch) = Picture::chroma_size(w, h);
    let mut out = Vec::new();
    for y in 0..h {
        out.extend_from_slice(&frame[y * fw..][..w]);
    }
    for plane in [fw * fh, fw * fh + fcw * fch] {
        for y in 0..ch.min(fch) {
            out.extend_from_slice(&frame[plane + y * fcw..][..cw]);
        }
    }
    out
}

/// Every frame's boxes, the background from the whole clip (or, with `whole_clip` false, from the
/// opening frames), the work run as `spread` says.
fn boxes(
    frames: &[Vec<u8>],
    w: usize,
    h: usize,
    whole_clip: bool,
    spread: &dyn Spread,
) -> Vec<Vec<Found>> {
    let config = DetectorConfig {
        far_height: Some(34.0),
        near_height: Some(91.0),
        appearance: true,
        whole_clip_background: whole_clip,
        ..DetectorConfig::default()
    };
    let mut det = Detector::new(config, w, h);
    fn pic(f: &[u8], w: usize, h: usize) -> Picture<'_> {
        Picture::planar(w, h, f, true).expect("a whole 4:2:0 frame")
    }
    if whole_clip {
        for f in frames {
            det.sample(&pic(f, w, h)).expect("same size");
        }
    }
    frames
        .iter()
        .map(|f| {
            det.detect_found_spread(&pic(f, w, h), spread)
                .expect("same size")
        })
        .collect()
}

#[test]
fn bands_find_the_boxes_found_in_one_piece() {
    let frames = rendered(7, 120);
    for whole_clip in [true, false] {
        let one = boxes(&frames, 640, 360, whole_clip, &InTurn);
        assert!(
            one.iter().map(Vec::len).sum::<usize>() > 100,
            "the scene has people in it"
        );
        for bands in [2, 3, 7, 400] {
            let cut = boxes(&frames, 640, 360, whole_clip, &Backwards(bands));
            assert_eq!(cut, one, "{bands} bands, whole clip {whole_clip}");
        }
    }
}

#[test]
fn bands_of_an_odd_sized_picture_find_the_same_boxes() {
    let frames: Vec<Vec<u8>> = rendered(3, 80).iter().map(|f| crop(f, 637, 357)).collect();
    let one = boxes(&frames, 637, 357, true, &InTurn);
    assert!(
        one.iter().map(Vec::len).sum::<usize>() > 50,
        "the scene has people in it"
    );
    for bands in [2, 5] {
        assert_eq!(
            boxes(&frames, 637, 357, true, &Backwards(bands)),
            one,
            "{bands} bands"
        );
    }
}
