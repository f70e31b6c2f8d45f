//! The detector's bands run on several cores at once (the core says what each band does and never
//! starts a thread itself: `detect::Spread`).

use throughline_core::detect::{Job, Spread};

/// Bands run on `threads` threads: the caller's and `threads - 1` started for each batch of jobs.
pub struct Cores {
    threads: usize,
}

impl Cores {
    /// `threads` threads (at least one); `None` for as many as the machine has cores, up to 8.
    pub fn new(threads: Option<usize>) -> Cores {
        let machine = std::thread::available_parallelism().map_or(1, |n| n.get().min(8));
        Cores {
            threads: threads.unwrap_or(machine).max(1),
        }
    }
}

impl Spread for Cores {
    fn bands(&self) -> usize {
        self.threads
    }

    fn run<'a>(&self, jobs: Vec<Job<'a>>) {
        if self.threads == 1 {
            return jobs.into_iter().for_each(|job| job());
        }
        // Job k to thread k mod threads: the core lists each kind of band in order, so each thread
        // gets one band of each kind.
        let mut lanes: Vec<Vec<Job<'a>>> = (0..self.threads).map(|_| Vec::new()).collect();
        for (k, job) in jobs.into_iter().enumerate() {
            lanes[k % self.threads].push(job);
        }
        let mut lanes = lanes.into_iter();
        let own = lanes.next().unwrap_or_default();
        std::thread::scope(|s| {
            for lane in lanes.filter(|l| !l.is_empty()) {
                s.spawn(move || lane.into_iter().for_each(|job| job()));
            }
            own.into_iter().for_each(|job| job());
        });
    }
}
