//! `throughline batch`: every entry of a manifest counted once, on all cores, each in its own
//! folder; an interrupted batch run again does only what was left.
//!
//! Each entry is one `throughline run` in a child process (a crash or a bad file in one entry
//! cannot stop the others), its outputs written whole or not at all. The entry's record
//! (`entry.json`, with the fingerprint of its inputs and settings) is written last: an entry whose
//! record matches the inputs as they are now is skipped.

use crate::files::{bad_input, bad_usage, read_text, Failure};
use crate::progress;
use entry::{Job, Outcome};
use indicatif::{MultiProgress, ProgressBar};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::mpsc;
use std::time::Duration;
use throughline_core::limits::MAX_MANIFEST_BYTES;
use throughline_core::manifest::read_manifest;

mod entry;
mod merge;
mod slurm;

/// The long help of the command (`--help`).
pub const LONG_ABOUT: &str = "Count many clips: every entry of a manifest, on all cores.\n\n\
    MANIFEST is CSV with a header row; each row is one clip: name (its output folder), detections \
    or footage (YUV4MPEG2, or other video such as WebM or MP4, decoded by ffmpeg), plan, and optionally site, camera, start, method, settings, detector, \
    edits, still. Paths are relative to the manifest's folder. Each entry's report.json and \
    counts.csv (and, with a site, the hand-in files) go in OUT/NAME/, with entry.json written last. \
    Run the same command again after an interruption: entries done with the same inputs and \
    settings are skipped. A failed entry is reported (OUT/NAME/failed.txt) and the others go on; \
    the exit code is 1 when any failed. Counts are estimates: check a sample of each site against \
    a manual count.";

/// Count many clips: every entry of a manifest, on all cores.
#[derive(clap::Args)]
pub struct Args {
    /// The manifest (CSV): one row per clip (see --help).
    manifest: PathBuf,
    /// The folder the entries' outputs go in (made if missing).
    #[arg(long, value_name = "DIR")]
    out: PathBuf,
    /// Entries counted at once [default: the number of cores].
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u16).range(1..=256))]
    jobs: Option<u16>,
    /// Only this entry (its row among the entries, from 1): one task of a cluster's array job.
    #[arg(long, value_name = "INDEX", value_parser = clap::value_parser!(u32).range(1..))]
    only: Option<u32>,
    /// Print only failures and the closing summary.
    #[arg(short, long)]
    quiet: bool,
    /// Count nothing here: write OUT/slurm/ with an array job (one task per entry) for the Slurm
    /// scheduler, a merge job that runs after it, and submit.sh that submits both.
    #[arg(long, conflicts_with_all = ["only", "jobs"])]
    emit_slurm: bool,
}

pub fn run(args: Args) -> Result<(), Failure> {
    let bytes = read_text(&args.manifest, MAX_MANIFEST_BYTES)?;
    let entries = read_manifest(&bytes).map_err(|e| bad_input(&args.manifest, e))?;
    let base = args
        .manifest
        .parent()
        .map_or_else(PathBuf::new, Path::to_path_buf);
    let chosen: Vec<usize> = match args.only {
        Some(k) if k as usize > entries.len() => {
            return Err(bad_usage(&format!(
                "--only {k}: the manifest has {} entries",
                entries.len()
            )))
        }
        Some(k) => vec![k as usize - 1],
        None => (0..entries.len()).collect(),
    };
    std::fs::create_dir_all(&args.out)
        .map_err(|e| bad_input(&args.out, format!("cannot make the output folder: {e}")))?;
    if args.emit_slurm {
        return slurm::emit(&args.manifest, &args.out, entries.len());
    }
    let jobs: Vec<Job> = chosen
        .iter()
        .map(|&i| Job::new(&entries[i], &base, &args.out))
        .collect();
    let workers = args.jobs.map_or_else(
        || std::thread::available_parallelism().map_or(1, |n| n.get()),
        usize::from,
    );
    let outcomes = run_all(&jobs, workers, args.quiet);
    let summary = Summary::of(&jobs, &outcomes);
    let mut unmerged = Vec::new();
    if args.only.is_none() {
        summary.write(&args.out)?;
        let merged = merge::merge_sites(&jobs, &outcomes, &args.out)?;
        for path in merged.written.iter().filter(|_| !args.quiet) {
            eprintln!("merged: {}", path.display());
        }
        for line in &merged.unmerged {
            eprintln!("{line}");
        }
        unmerged = merged.unmerged;
    }
    eprintln!("{}", summary.line());
    let mut problems = Vec::new();
    if !summary.failed.is_empty() {
        problems.push(format!(
            "{} of {} entries failed: {}",
            summary.failed.len(),
            jobs.len(),
            summary.failed.join(", ")
        ));
    }
    if !unmerged.is_empty() {
        problems.push(format!("{} site(s) not merged", unmerged.len()));
    }
    if problems.is_empty() {
        Ok(())
    } else {
        Err(Failure {
            message: problems.join("; "),
            code: 1,
        })
    }
}

/// What a worker tells the thread that shows progress.
enum Event {
    Started(usize),
    Finished(usize, Outcome),
}

/// Runs the jobs on `workers` threads (each job a child process); their outcomes, in job order.
fn run_all(jobs: &[Job], workers: usize, quiet: bool) -> Vec<Outcome> {
    let next = AtomicUsize::new(0);
    let (tx, rx) = mpsc::channel();
    let mut outcomes: Vec<Option<Outcome>> = vec![None; jobs.len()];
    std::thread::scope(|scope| {
        for _ in 0..workers.min(jobs.len()) {
            let tx = tx.clone();
            let next = &next;
            scope.spawn(move || loop {
                let i = next.fetch_add(1, Ordering::Relaxed);
                let Some(job) = jobs.get(i) else { break };
                let _ = tx.send(Event::Started(i));
                let _ = tx.send(Event::Finished(i, job.run()));
            });
        }
        drop(tx);
        let shown = Shown::new(jobs.len(), quiet);
        let mut running: Vec<Option<ProgressBar>> = vec![None; jobs.len()];
        for event in rx {
            match event {
                Event::Started(i) => running[i] = Some(shown.start(&jobs[i])),
                Event::Finished(i, outcome) => {
                    shown.finish(&jobs[i], running[i].take(), &outcome);
                    outcomes[i] = Some(outcome);
                }
            }
        }
    });
    outcomes
        .into_iter()
        .map(|o| o.unwrap_or_else(|| Outcome::Failed("the worker stopped".into())))
        .collect()
}

/// The terminal's view of a batch: one bar over the whole batch and a spinner per running entry
/// (drawn only on a terminal), and one line per finished entry.
struct Shown {
    bars: MultiProgress,
    overall: ProgressBar,
    quiet: bool,
}

impl Shown {
    fn new(total: usize, quiet: bool) -> Shown {
        let bars = MultiProgress::new();
        let overall = bars.add(progress::bar(
            quiet,
            total as u64,
            "batch {bar:30} {pos}/{len} entries, {elapsed} ({eta} left)",
        ));
        Shown {
            bars,
            overall,
            quiet,
        }
    }

    fn start(&self, job: &Job) -> ProgressBar {
        let spinner = self
            .bars
            .add(progress::spinner(self.quiet, "  {spinner} {msg} {elapsed}"));
        spinner.set_message(job.name.clone());
        spinner.enable_steady_tick(Duration::from_millis(200));
        spinner
    }

    fn finish(&self, job: &Job, spinner: Option<ProgressBar>, outcome: &Outcome) {
        if let Some(s) = spinner {
            s.finish_and_clear();
            self.bars.remove(&s);
        }
        self.overall.inc(1);
        let line = match outcome {
            Outcome::Done(seconds) => format!("done     {} ({seconds:.1} s)", job.name),
            Outcome::Skipped => format!("skipped  {} (done before, inputs unchanged)", job.name),
            Outcome::Failed(why) => format!("FAILED   {}: {why}", job.name),
        };
        if self.quiet && !matches!(outcome, Outcome::Failed(_)) {
            return;
        }
        if self.bars.is_hidden() {
            eprintln!("{line}");
        } else {
            let _ = self.bars.println(line);
        }
    }
}

/// The batch's result: each entry's name and outcome.
struct Summary {
    rows: Vec<(String, String, Option<String>)>,
    done: usize,
    skipped: usize,
    failed: Vec<String>,
}

impl Summary {
    fn of(jobs: &[Job], outcomes: &[Outcome]) -> Summary {
        let mut s = Summary {
            rows: Vec::new(),
            done: 0,
            skipped: 0,
            failed: Vec::new(),
        };
        for (job, outcome) in jobs.iter().zip(outcomes) {
            let (status, why) = match outcome {
                Outcome::Done(_) => ("done", None),
                Outcome::Skipped => ("skipped", None),
                Outcome::Failed(why) => ("failed", Some(why.clone())),
            };
            match outcome {
                Outcome::Done(_) => s.done += 1,
                Outcome::Skipped => s.skipped += 1,
                Outcome::Failed(_) => s.failed.push(job.name.clone()),
            }
            s.rows.push((job.name.clone(), status.into(), why));
        }
        s
    }

    fn line(&self) -> String {
        format!(
            "batch: {} done, {} skipped (done before, unchanged), {} failed",
            self.done,
            self.skipped,
            self.failed.len()
        )
    }

    /// `OUT/batch.csv`: each entry's name, status and reason (written whole or not at all).
    fn write(&self, out: &Path) -> Result<(), Failure> {
        let mut text = String::from("name,status,reason\n");
        for (name, status, why) in &self.rows {
            let why = why.as_deref().unwrap_or("").replace('"', "'");
            text.push_str(&format!("{name},{status},\"{why}\"\n"));
        }
        let mut files = crate::output::Outputs::new();
        files.write(&out.join("batch.csv"), &text)?;
        files.commit()
    }
}
