//! A detections file's bytes read into detections; a large file in two parts at once, on two
//! threads: the core cuts it at a line end, reads each part and merges them into exactly what
//! reading it whole gives (the same rows, warnings and first error).

use throughline_core::detections::{self, ReadReport};
use throughline_core::Error;

/// Files from this size on are read in two parts on two threads: smaller ones take a few
/// milliseconds or less, and a second thread would save little more than it costs to start.
pub const TWO_PARTS_FROM: usize = 1 << 20;

/// [`detections::read_detections`], in two parts on two threads when the file is large and the
/// machine has two cores or more.
pub fn read_detections(bytes: &[u8]) -> Result<ReadReport, Error> {
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
    let cut = if bytes.len() >= TWO_PARTS_FROM && cores > 1 {
        detections::cut_in_two(bytes)
    } else {
        None
    };
    let Some(cut) = cut else {
        return detections::read_detections(bytes);
    };
    std::thread::scope(|s| {
        let second = s.spawn(|| cut.read_second(bytes));
        let first = cut.read_first(bytes);
        match second.join() {
            Ok(second) => detections::merge(first, second),
            // Not expected: the whole reader then gives the answer (or the same failure).
            Err(_) => detections::read_detections(bytes),
        }
    })
}
