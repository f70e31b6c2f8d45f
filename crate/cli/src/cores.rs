//! The detector's bands run on several cores at once: the caller's thread and a few helper threads
//! take the bands of each stage one at a time, so a core that is busy with something else holds
//! back only its own share. The core says what each band does and never starts a thread itself
//! (`detect::Spread`).
//!
//! A picture at 640×360 takes about a millisecond, in four stages, so the handing out matters: a
//! helper with nothing to do keeps looking for the next stage's bands (giving up its core to
//! any other thread that wants it) for a while before it sleeps, since waking a thread that
//! sleeps takes about as long as one band's work.

use std::any::Any;
use std::panic::{catch_unwind, resume_unwind, AssertUnwindSafe};
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::{Arc, Condvar, Mutex, MutexGuard, PoisonError};
use std::thread::JoinHandle;
use std::time::{Duration, Instant};
use throughline_core::detect::{Job, Spread};

/// Bands a thread, so a thread that is free takes over from one that is not.
const BANDS_A_THREAD: usize = 4;

/// How long a helper with nothing to do looks for work before it sleeps: a few frames' time.
const LOOK_FOR: Duration = Duration::from_millis(5);

/// Bands run on the caller's thread and helper threads, or in turn on the caller's alone.
pub struct Cores {
    crew: Option<Arc<Crew>>,
    helpers: Vec<JoinHandle<()>>,
    bands: usize,
}

/// What the caller and its helpers share: the stage being run.
#[derive(Default)]
struct Crew {
    /// The stage's bands not taken yet, their lifetime set aside (see [`Cores::run`]).
    jobs: Mutex<Vec<Job<'static>>>,
    /// How many `jobs` holds, read without the lock by helpers looking for work.
    waiting: AtomicUsize,
    /// The stage's bands not finished yet.
    unfinished: AtomicUsize,
    /// What the first band to panic panicked with, for the caller to panic with in turn.
    panic: Mutex<Option<Box<dyn Any + Send>>>,
    /// Helpers asleep, and where they sleep.
    asleep: Mutex<usize>,
    wake: Condvar,
    /// One stage at a time.
    stage: Mutex<()>,
    quit: AtomicBool,
}

fn lock<T>(m: &Mutex<T>) -> MutexGuard<'_, T> {
    // No band runs while a lock is held, so a poisoned lock holds nothing half-done.
    m.lock().unwrap_or_else(PoisonError::into_inner)
}

impl Crew {
    /// Takes one band waiting and runs it; `false` when none was waiting.
    fn take_one(&self) -> bool {
        if self.waiting.load(Ordering::Acquire) == 0 {
            return false;
        }
        let job = {
            let mut jobs = lock(&self.jobs);
            let job = jobs.pop();
            self.waiting.store(jobs.len(), Ordering::Release);
            job
        };
        let Some(job) = job else {
            return false;
        };
        if let Err(p) = catch_unwind(AssertUnwindSafe(job)) {
            lock(&self.panic).get_or_insert(p);
        }
        self.unfinished.fetch_sub(1, Ordering::AcqRel);
        true
    }

    /// A helper's life: bands as they come, looking for more for [`LOOK_FOR`], then asleep until
    /// woken.
    fn help(&self) {
        let mut idle_since = Instant::now();
        while !self.quit.load(Ordering::Acquire) {
            if self.take_one() {
                idle_since = Instant::now();
            } else if idle_since.elapsed() < LOOK_FOR {
                std::thread::yield_now();
            } else {
                let mut asleep = lock(&self.asleep);
                // Checked under the lock the caller takes to wake sleepers, so no wake is lost.
                if self.waiting.load(Ordering::Acquire) == 0 && !self.quit.load(Ordering::Acquire) {
                    *asleep += 1;
                    asleep = self
                        .wake
                        .wait(asleep)
                        .unwrap_or_else(PoisonError::into_inner);
                    *asleep -= 1;
                }
                idle_since = Instant::now();
            }
        }
    }

    fn wake_all(&self) {
        let asleep = lock(&self.asleep);
        if *asleep > 0 {
            self.wake.notify_all();
        }
    }
}

impl Cores {
    /// `threads` threads (at least one, the caller's among them); `None` for as many as the
    /// machine has cores, up to 8. Helpers that cannot be started leave the work to the others.
    pub fn new(threads: Option<usize>) -> Cores {
        let machine = std::thread::available_parallelism().map_or(1, |n| n.get().min(8));
        let threads = threads.unwrap_or(machine).max(1);
        let crew = Arc::new(Crew::default());
        let helpers: Vec<JoinHandle<()>> = (1..threads)
            .filter_map(|k| {
                let crew = Arc::clone(&crew);
                std::thread::Builder::new()
                    .name(format!("bands-{k}"))
                    .spawn(move || crew.help())
                    .ok()
            })
            .collect();
        let working = helpers.len() + 1;
        Cores {
            crew: (working > 1).then_some(crew),
            helpers,
            bands: if working > 1 {
                working * BANDS_A_THREAD
            } else {
                1
            },
        }
    }
}

impl Drop for Cores {
    fn drop(&mut self) {
        if let Some(crew) = &self.crew {
            crew.quit.store(true, Ordering::Release);
            crew.wake_all();
        }
        for helper in self.helpers.drain(..) {
            helper.join().ok();
        }
    }
}

impl Spread for Cores {
    fn bands(&self) -> usize {
        self.bands
    }

    fn run<'a>(&self, jobs: Vec<Job<'a>>) {
        let Some(crew) = self.crew.as_ref().filter(|_| jobs.len() > 1) else {
            jobs.into_iter().for_each(|job| job());
            return;
        };
        let _stage = lock(&crew.stage);
        crew.unfinished.store(jobs.len(), Ordering::Release);
        // SAFETY: only the lifetime changes (the same type otherwise). The helpers reach these
        // jobs through `crew.jobs` alone, and this function returns only once `unfinished` is
        // zero, that is once every job has been taken out, run (or has panicked, caught) and
        // dropped: nothing borrowed for 'a is touched after 'a ends.
        let jobs: Vec<Job<'static>> = unsafe { std::mem::transmute(jobs) };
        {
            let mut waiting = lock(&crew.jobs);
            *waiting = jobs;
            crew.waiting.store(waiting.len(), Ordering::Release);
        }
        crew.wake_all();
        while crew.take_one() {}
        let mut spins = 0u32;
        while crew.unfinished.load(Ordering::Acquire) > 0 {
            // The last bands are being run by helpers: wait nearby, then give up the core.
            spins += 1;
            if spins < 200 {
                std::hint::spin_loop();
            } else {
                std::thread::yield_now();
            }
        }
        if let Some(p) = lock(&crew.panic).take() {
            resume_unwind(p);
        }
    }
}

#[cfg(test)]
mod tests {
    // Relations of the pool with itself (no outside value): every band runs once, whatever the
    // threads; a band's panic reaches the caller; helpers asleep are woken for the next stage.
    use super::*;
    use std::sync::atomic::AtomicU32;

    /// Runs `stages` stages of `bands` bands on `threads` threads, each band adding one to its
    /// own counter; returns the counters.
    fn counts(threads: usize, stages: usize, bands: usize) -> Vec<u32> {
        let cores = Cores::new(Some(threads));
        let counters: Vec<AtomicU32> = (0..bands).map(|_| AtomicU32::new(0)).collect();
        for _ in 0..stages {
            let jobs = (counters.iter())
                .map(|c| {
                    Box::new(move || {
                        c.fetch_add(1, Ordering::Relaxed);
                    }) as Job
                })
                .collect();
            cores.run(jobs);
        }
        counters.iter().map(|c| c.load(Ordering::Relaxed)).collect()
    }

    #[test]
    fn every_band_runs_once_a_stage() {
        for threads in [1, 2, 3] {
            for bands in [0, 1, 2, 7, 16] {
                assert_eq!(
                    counts(threads, 50, bands),
                    vec![50; bands],
                    "{threads} threads"
                );
            }
        }
    }

    #[test]
    fn bands_that_write_their_own_rows_write_them_all() {
        let cores = Cores::new(Some(2));
        let mut rows = vec![0u32; 1000];
        let jobs = (rows.chunks_mut(37).enumerate())
            .map(|(k, band)| {
                Box::new(move || band.iter_mut().for_each(|r| *r = k as u32 + 1)) as Job
            })
            .collect();
        cores.run(jobs);
        let expected: Vec<u32> = (0..1000).map(|i| i / 37 + 1).collect();
        assert_eq!(rows, expected);
    }

    #[test]
    fn a_band_that_panics_panics_the_caller_and_the_pool_goes_on() {
        let cores = Cores::new(Some(2));
        let jobs: Vec<Job> = (0..8)
            .map(|k| {
                Box::new(move || {
                    assert!(k != 5, "band five");
                }) as Job
            })
            .collect();
        let caught = catch_unwind(AssertUnwindSafe(|| cores.run(jobs)));
        assert!(caught.is_err());
        let done = AtomicU32::new(0);
        let jobs = (0..8)
            .map(|_| {
                Box::new(|| {
                    done.fetch_add(1, Ordering::Relaxed);
                }) as Job
            })
            .collect();
        cores.run(jobs);
        assert_eq!(done.load(Ordering::Relaxed), 8);
    }

    #[test]
    fn helpers_asleep_are_woken_for_the_next_stage() {
        let cores = Cores::new(Some(3));
        let seen = Mutex::new(std::collections::HashSet::new());
        // Long enough for every helper to fall asleep between stages.
        for _ in 0..3 {
            std::thread::sleep(LOOK_FOR * 3);
            let jobs = (0..64)
                .map(|_| {
                    Box::new(|| {
                        std::thread::sleep(Duration::from_millis(1));
                        lock(&seen).insert(std::thread::current().id());
                    }) as Job
                })
                .collect();
            cores.run(jobs);
        }
        assert!(lock(&seen).len() > 1, "the helpers took no band");
    }
}
