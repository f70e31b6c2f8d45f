//! Benchmark text read a piece at a time (`throughline track -o OUT.txt` on a long file) against
//! the same text read whole: the first byte says how many lines go in a piece, the rest is the
//! file. Where the whole reader takes the file as benchmark text, the pieces give the same rows
//! and warnings (frames in order) or the same error.
#![no_main]
use libfuzzer_sys::fuzz_target;
use throughline_core::detections::{benchmark_text_start, read_detections, Pieces};

fuzz_target!(|data: &[u8]| {
    let Some((&first, body)) = data.split_first() else { return };
    let Some(text) = benchmark_text_start(body) else { return };
    let per_piece = usize::from(first % 9) + 1;
    let lines: Vec<&str> = text.split_inclusive('\n').collect();
    let mut pieces = Pieces::new();
    let mut rows = Vec::new();
    let mut all = Vec::new();
    let mut error = None;
    for chunk in lines.chunks(per_piece) {
        if let Err(e) = pieces.read(&chunk.concat(), &mut rows) {
            error = Some(e);
            break;
        }
        all.extend_from_slice(&rows);
    }
    let whole = read_detections(body);
    if let Some(e) = error {
        let w = whole.expect_err("a piece refused what the whole reader took");
        assert_eq!(e.to_string(), w.to_string());
        return;
    }
    let out_of_order = pieces.out_of_order();
    match (pieces.finish(), whole) {
        (Ok(read), Ok(w)) => {
            assert_eq!(read.rows, w.detections.rows.len());
            assert_eq!(read.skipped_rows, w.skipped_rows);
            assert_eq!(read.warnings, w.warnings);
            if !out_of_order {
                assert_eq!(all, w.detections.rows);
            }
        }
        (Err(a), Err(b)) => assert_eq!(a.to_string(), b.to_string()),
        (a, b) => panic!("pieces {:?} but whole {:?}", a.is_ok(), b.is_ok()),
    }
});
