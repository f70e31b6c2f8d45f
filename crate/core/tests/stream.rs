//! Tracking a file a piece at a time (`track::stream`, used by `throughline track -o OUT.txt`)
//! gives the same benchmark text, byte for byte, as reading the whole file, tracking and writing
//! (`run_tracker` then `write_benchmark_text`), however the file is cut into pieces. This is a
//! consistency check of the two ways through the same tracker; the tracker itself is checked
//! against outside references elsewhere (reference_kalman.rs, reference_assignment.rs).

use throughline_core::detections::{read_detections, to_benchmark_text, Pieces};
use throughline_core::track::files::{write_benchmark_text, BenchmarkLines};
use throughline_core::track::stream::StreamTracker;
use throughline_core::track::{run_tracker, Method, TrackerConfig};
use throughline_sim::{generate, SceneConfig};

/// The whole way: read, track, write.
fn whole(text: &str, config: &TrackerConfig) -> Vec<u8> {
    let dets = read_detections(text.as_bytes()).unwrap().detections;
    let tracks = run_tracker(&dets, config, &mut |_, _| {}).unwrap();
    let mut out = Vec::new();
    write_benchmark_text(&tracks, &mut out).unwrap();
    out
}

/// The piecewise way, `lines_per_piece` lines at a time; also the number of tracks it counted.
fn piecewise(text: &str, config: &TrackerConfig, lines_per_piece: usize) -> (Vec<u8>, u32) {
    let mut pieces = Pieces::new();
    let mut tracker = StreamTracker::new(config, pieces.classes()).unwrap();
    let mut out = Vec::new();
    let mut lines = BenchmarkLines::new(&mut out);
    let mut write = |f, id, b: &_| lines.push(f, id, b).unwrap();
    let all: Vec<&str> = text.split_inclusive('\n').collect();
    let mut rows = Vec::new();
    for chunk in all.chunks(lines_per_piece) {
        pieces.read(&chunk.concat(), &mut rows).unwrap();
        assert!(!pieces.out_of_order());
        tracker.rows(&rows, pieces.classes());
        tracker.settled(&mut write);
    }
    let end = tracker.finish(pieces.classes(), &mut write);
    lines.flush().unwrap();
    (out, end.tracks)
}

fn scene_text(seed: u64, density: f64, miss_rate: f64) -> String {
    let scene = generate(&SceneConfig {
        seed,
        frames: 400,
        density,
        miss_rate,
        ..SceneConfig::default()
    });
    to_benchmark_text(&scene.detections)
}

#[test]
fn the_demo_tracked_piece_by_piece_is_the_same_text() {
    let text = include_str!("../../../demo-site/demo/detections.txt");
    for method in [Method::Iou, Method::Sort, Method::Bytetrack] {
        let config = TrackerConfig::for_method(method);
        let expected = whole(text, &config);
        for lines in [1, 7, 1000, usize::MAX] {
            let (got, _) = piecewise(text, &config, lines);
            assert!(got == expected, "{method}, {lines} lines a piece");
        }
    }
}

#[test]
fn crowded_scenes_with_gaps_tracked_piece_by_piece_are_the_same_text() {
    for (seed, density, miss) in [(3, 40.0, 0.2), (8, 5.0, 0.4)] {
        let text = scene_text(seed, density, miss);
        for method in [Method::Sort, Method::Bytetrack] {
            let config = TrackerConfig {
                max_age: 12,
                ..TrackerConfig::for_method(method)
            };
            let expected = whole(&text, &config);
            let dets = read_detections(text.as_bytes()).unwrap().detections;
            let tracks = run_tracker(&dets, &config, &mut |_, _| {}).unwrap();
            for lines in [13, 4096] {
                let (got, count) = piecewise(&text, &config, lines);
                assert!(
                    got == expected,
                    "seed {seed}, {method}, {lines} lines a piece"
                );
                assert_eq!(count as usize, tracks.tracks.len());
            }
        }
    }
}

#[test]
fn frames_that_go_back_are_noticed() {
    let mut pieces = Pieces::new();
    let mut rows = Vec::new();
    pieces.read("2,-1,1,1,5,5,0.9\n", &mut rows).unwrap();
    assert!(!pieces.out_of_order());
    pieces.read("1,-1,1,1,5,5,0.9\n", &mut rows).unwrap();
    assert!(pieces.out_of_order());
}

#[test]
fn a_mistake_in_a_later_piece_names_its_line_in_the_file() {
    let mut pieces = Pieces::new();
    let mut rows = Vec::new();
    pieces.read("1,-1,1,1,5,5,0.9\n\n", &mut rows).unwrap();
    let e = pieces.read("2,-1,1,1,5\n", &mut rows).unwrap_err();
    let whole = read_detections(b"1,-1,1,1,5,5,0.9\n\n2,-1,1,1,5\n").unwrap_err();
    assert_eq!(e.to_string(), whole.to_string());
    assert!(e.to_string().contains("line 3"), "{e}");
}
