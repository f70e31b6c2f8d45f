//! CSV read a piece at a time (`throughline track -o OUT.txt` on a long CSV) against the same
//! text read whole: the first byte says how many lines go in a piece, the rest is the file.
//! Where the whole reader takes the file as CSV, the pieces give the same rows, appearance
//! vectors and warnings (frames in order), batches of whole frames, or the same error.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::detections::{csv_start, read_detections, CsvPieces, Detections};

fuzz_target!(|data: &[u8]| {
    let Some((&first, body)) = data.split_first() else { return };
    if csv_start(body).is_none() {
        return;
    }
    let Ok(text) = std::str::from_utf8(body) else { return };
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let per_piece = usize::from(first % 9) + 1;
    let lines: Vec<&str> = text.split_inclusive('\n').collect();
    let mut pieces = CsvPieces::new();
    let mut batch = Detections::default();
    // Each row with its vector, as the whole reading would give them.
    let mut all: Vec<(u32, Option<Vec<f32>>)> = Vec::new();
    let mut last_frames = Vec::new();
    let mut error = None;
    for chunk in lines.chunks(per_piece) {
        if let Err(e) = pieces.read(&chunk.concat(), &mut batch) {
            error = Some(e);
            break;
        }
        take(&batch, &mut all, &mut last_frames);
    }
    let whole = read_detections(body);
    if let Some(e) = error {
        let w = whole.expect_err("a piece refused what the whole reader took");
        assert_eq!(e.to_string(), w.to_string());
        return;
    }
    let out_of_order = pieces.out_of_order();
    match (pieces.finish(&mut batch), whole) {
        (Ok(read), Ok(w)) => {
            take(&batch, &mut all, &mut last_frames);
            assert_eq!(read.rows, w.detections.rows.len());
            assert_eq!(read.skipped_rows, w.skipped_rows);
            assert_eq!(read.warnings, w.warnings);
            if !out_of_order {
                let d = &w.detections;
                let want: Vec<_> = d
                    .rows
                    .iter()
                    .map(|r| (r.frame, d.embedding(r).map(<[f32]>::to_vec)))
                    .collect();
                assert_eq!(all.len(), want.len());
                for (a, b) in all.iter().zip(&want) {
                    assert_eq!(a.0, b.0);
                    assert_eq!(format!("{:?}", a.1), format!("{:?}", b.1));
                }
                // Whole frames a batch: a frame never starts in one batch and goes on in the next.
                assert!(last_frames.windows(2).all(|w| w[0] < w[1]));
            }
        }
        (Err(a), Err(b)) => assert_eq!(a.to_string(), b.to_string()),
        (a, b) => panic!("pieces {:?} but whole {:?}", a.is_ok(), b.is_ok()),
    }
});

/// The rows of a batch with their vectors, and the batch's first and last frames.
fn take(batch: &Detections, all: &mut Vec<(u32, Option<Vec<f32>>)>, frames: &mut Vec<u32>) {
    all.extend(
        batch
            .rows
            .iter()
            .map(|r| (r.frame, batch.embedding(r).map(<[f32]>::to_vec))),
    );
    if let (Some(a), Some(b)) = (batch.rows.first(), batch.rows.last()) {
        frames.push(a.frame);
        if b.frame != a.frame {
            frames.push(b.frame);
        }
    }
}
