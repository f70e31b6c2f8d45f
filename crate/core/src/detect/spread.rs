//! How the detector's work is shared out: the core cuts each picture into bands of whole rows and
//! says what each band does, stage by stage (the picture's light, the foreground test, the clean-up
//! and the blobs' runs, the learning; once, the first background's medians); an adapter says how
//! the bands run, one after another or on several cores at once (the command line uses threads, the
//! core never does, so it runs the same in the page). A band's result is the whole picture's there
//! (the per-pixel stages read their own pixels, the clean-up reads a few rows beyond the band, and
//! blobs are joined across band edges afterwards, in order), so the boxes are the same however the
//! bands are cut and run.

/// One band's work.
pub type Job<'a> = Box<dyn FnOnce() + Send + 'a>;

/// How the detector's bands run.
pub trait Spread: Sync {
    /// How many bands to cut each picture into (1: no cutting).
    fn bands(&self) -> usize;
    /// Runs every job once, in any order or at the same time; returns when all are done.
    fn run<'a>(&self, jobs: Vec<Job<'a>>);
}

/// Bands run one after another on the caller's thread.
pub struct InTurn;

impl Spread for InTurn {
    fn bands(&self) -> usize {
        1
    }

    fn run<'a>(&self, jobs: Vec<Job<'a>>) {
        for job in jobs {
            job();
        }
    }
}

/// Rows in each band of a picture `height` rows high cut into up to `bands` bands: an even number
/// (at least 2), so each 4:2:0 chroma row lies in the band of its two luma rows.
pub(super) fn band_rows(height: usize, bands: usize) -> usize {
    height.div_ceil(bands.max(1)).next_multiple_of(2).max(2)
}
