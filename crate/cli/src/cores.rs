//! The detector's bands run on several cores at once, in a pool of threads (rayon's, one thread a
//! core): each picture is cut into a few bands a thread and a free thread takes the next, so a
//! core that is busy with something else holds back only its own share. The core says what each
//! band does and never starts a thread itself (`detect::Spread`).

use throughline_core::detect::{Job, Spread};

/// Bands a thread, so a thread that is free takes over from one that is not.
const BANDS_A_THREAD: usize = 4;

/// Bands run on a pool of threads, or in turn on the caller's thread for one.
pub struct Cores {
    pool: Option<rayon::ThreadPool>,
    bands: usize,
}

impl Cores {
    /// `threads` threads (at least one); `None` for as many as the machine has cores, up to 8. A
    /// pool that cannot be started leaves the work to the caller's thread alone.
    pub fn new(threads: Option<usize>) -> Cores {
        let machine = std::thread::available_parallelism().map_or(1, |n| n.get().min(8));
        let threads = threads.unwrap_or(machine).max(1);
        let pool = (threads > 1)
            .then(|| {
                rayon::ThreadPoolBuilder::new()
                    .num_threads(threads)
                    .build()
                    .ok()
            })
            .flatten();
        Cores {
            bands: if pool.is_some() {
                threads * BANDS_A_THREAD
            } else {
                1
            },
            pool,
        }
    }
}

impl Cores {
    /// Runs `work` on one of the pool's threads (on the caller's without a pool), so the bands it
    /// hands out are taken by that thread too while it waits, rather than by the others alone
    /// while it sleeps: fewer threads woken a frame.
    pub fn within<R: Send>(&self, work: impl FnOnce() -> R + Send) -> R {
        match &self.pool {
            Some(pool) => pool.install(work),
            None => work(),
        }
    }
}

impl Spread for Cores {
    fn bands(&self) -> usize {
        self.bands
    }

    fn run<'a>(&self, jobs: Vec<Job<'a>>) {
        match &self.pool {
            Some(pool) => pool.scope(|s| {
                for job in jobs {
                    s.spawn(move |_| job());
                }
            }),
            None => jobs.into_iter().for_each(|job| job()),
        }
    }
}
