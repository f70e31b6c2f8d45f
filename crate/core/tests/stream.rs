//! Tracking a file a piece at a time (`track::stream`, used by `throughline track -o OUT.txt`)
//! gives the same benchmark text, byte for byte, as reading the whole file, tracking and writing
//! (`run_tracker` then `write_benchmark_text`), however the file is cut into pieces. This is a
//! consistency check of the two ways through the same tracker; the tracker itself is checked
//! against outside references elsewhere (reference_kalman.rs, reference_assignment.rs).

use throughline_core::detections::{
    read_detections, to_benchmark_text, to_csv, CsvPieces, Detections, Pieces,
};
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

/// CSV tracked piecewise, `lines_per_piece` lines at a time, each batch of whole frames with its
/// own appearance vectors (the reading keeps none of an earlier batch's).
fn csv_piecewise(text: &str, config: &TrackerConfig, lines_per_piece: usize) -> (Vec<u8>, u32) {
    let mut pieces = CsvPieces::new();
    let mut batch = Detections::default();
    let all: Vec<&str> = text.split_inclusive('\n').collect();
    let (header, rows) = all.split_at(1);
    pieces.read(header[0], &mut batch).unwrap();
    let dim = pieces.embedding_dim().unwrap();
    let ctx = Detections {
        embedding_dim: dim,
        ..Detections::default()
    };
    let mut tracker = StreamTracker::new(config, &ctx).unwrap();
    let mut out = Vec::new();
    let mut lines = BenchmarkLines::new(&mut out);
    let mut write = |f, id, b: &_| lines.push(f, id, b).unwrap();
    let mut frames_seen = Vec::new();
    for chunk in rows.chunks(lines_per_piece) {
        pieces.read(&chunk.concat(), &mut batch).unwrap();
        assert!(!pieces.out_of_order());
        assert_eq!(batch.embeddings.len(), batch.rows.len() * dim);
        frames_seen.extend(batch.rows.iter().map(|d| d.frame));
        tracker.frames(&batch.rows, &batch);
        tracker.settled(&mut write);
    }
    let read = pieces.finish(&mut batch).unwrap();
    frames_seen.extend(batch.rows.iter().map(|d| d.frame));
    // Whole frames a batch: no frame is given out in two batches.
    assert!(frames_seen.is_sorted());
    assert_eq!(read.rows, frames_seen.len());
    tracker.frames(&batch.rows, &batch);
    let end = tracker.finish(&batch, &mut write);
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

#[test]
fn csv_with_appearance_tracked_piece_by_piece_is_the_same_text() {
    // DeepSORT's appearance vectors come with each batch and go with it: the same boxes as the
    // whole file's reading, however the lines are cut into pieces.
    for (seed, density, miss) in [(5, 20.0, 0.2), (9, 4.0, 0.3)] {
        let scene = generate(&SceneConfig {
            seed,
            frames: 300,
            density,
            miss_rate: miss,
            embedding_dim: 8,
            ..SceneConfig::default()
        });
        let text = to_csv(&scene.detections);
        for method in [Method::Deepsort, Method::Sort] {
            let config = TrackerConfig {
                max_age: 12,
                ..TrackerConfig::for_method(method)
            };
            let expected = whole(&text, &config);
            for lines in [1, 17, 5000] {
                let (got, _) = csv_piecewise(&text, &config, lines);
                assert!(
                    got == expected,
                    "seed {seed}, {method}, {lines} lines a piece"
                );
            }
        }
    }
}

#[test]
fn csv_pieces_give_the_whole_readings_warnings_and_errors() {
    let mut batch = Detections::default();
    // The last text: a file that ends with a line break, and one cut inside its last row.
    let rows = "frame,x,y,w,h,score,e0\n1,1,1,5,5,0.9,1\n1,2,2,0,5,0.9,1\n2,1,1,5,5,1.5,0";
    for text in [format!("{rows}\n"), rows.to_string()] {
        let mut pieces = CsvPieces::new();
        for line in text.split_inclusive('\n') {
            pieces.read(line, &mut batch).unwrap();
        }
        let read = pieces.finish(&mut batch).unwrap();
        let whole = read_detections(text.as_bytes()).unwrap();
        assert_eq!(read.warnings, whole.warnings);
        assert_eq!(read.skipped_rows, whole.skipped_rows);
        assert_eq!(read.rows, whole.detections.rows.len());
    }
    // Benchmark text cut inside its last row, read in pieces: the whole reading's warning.
    let text = "1,-1,1,1,5,5,0.9\n2,-1,1,1,5,5,0.9\n3,-1,1,1,5,5,0.";
    let mut pieces = Pieces::new();
    let mut rows = Vec::new();
    for line in text.split_inclusive('\n') {
        pieces.read(line, &mut rows).unwrap();
    }
    let read = pieces.finish().unwrap();
    let whole = read_detections(text.as_bytes()).unwrap();
    assert_eq!(read.warnings, whole.warnings);
    assert_eq!(read.warnings.len(), 1);
    let bad = "frame,x,y,w,h,score\n1,1,1,5,5,0.9\n\n2,1,1,5\n";
    let mut pieces = CsvPieces::new();
    pieces
        .read("frame,x,y,w,h,score\n1,1,1,5,5,0.9\n\n", &mut batch)
        .unwrap();
    let e = pieces.read("2,1,1,5\n", &mut batch).unwrap_err();
    assert_eq!(
        e.to_string(),
        read_detections(bad.as_bytes()).unwrap_err().to_string()
    );
    assert!(e.to_string().contains("line 4"), "{e}");
    let header_only = CsvPieces::new().finish(&mut batch).unwrap_err();
    assert!(header_only.to_string().contains("no rows"), "{header_only}");
}
