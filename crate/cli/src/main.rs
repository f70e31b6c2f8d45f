//! `throughline`: the command line. Glue only: arguments, files, progress and exit codes; all the
//! work is done by `throughline-core` (through its `pipeline`) and the footage, simulator and
//! evaluation crates. One file per command in `commands/`.
//!
//! Exit codes: 0 success, 1 bad input (a file that cannot be read or understood), 2 bad usage.

mod bridging;
mod commands;
mod cores;
mod decode;
mod files;
mod frames;
mod handin;
mod output;
mod progress;
mod reading;
mod streaming;
mod warnings;

use clap::{Parser, Subcommand};
use commands::{batch, count, detect, review, run, score, score_counts, simulate, track, tune};
use std::process::ExitCode;

#[derive(Parser)]
#[command(
    name = "throughline",
    version,
    about = "Turn detections from video, or the footage itself, into tracks and counts by line, direction, class and interval, on your own computer.",
    long_about = "Turn detections from video, or the footage itself, into tracks and counts by line, \
    direction, class and interval, on your own computer.\n\n\
                  Nothing is uploaded: every file stays where it is. Boxes are pixels, top-left x,y then \
                  width,height; frames are numbered from 1."
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Link per-frame detections into tracks.
    #[command(long_about = track::LONG_ABOUT)]
    Track(track::Args),
    /// Track detections, then count them against a plan (screenlines, zones, intervals).
    #[command(long_about = run::LONG_ABOUT)]
    Run(run::Args),
    /// Find moving objects in footage from a fixed camera, without any model.
    #[command(long_about = detect::LONG_ABOUT)]
    Detect(detect::Args),
    /// Count existing tracks against a plan.
    Count(count::Args),
    /// List the moments of a count most likely wrong, to check against the footage.
    #[command(long_about = review::LONG_ABOUT)]
    Review(review::Args),
    /// Make a simulated scene with known truth: detections and ground-truth tracks.
    Simulate(simulate::Args),
    /// Compare counts with a manual count (or another report): APD, AAPD, WAPD, correction factor.
    #[command(long_about = score_counts::LONG_ABOUT)]
    ScoreCounts(score_counts::Args),
    /// Search tracker settings that score best against ground truth; prints a settings file.
    Tune(tune::Args),
    /// Score tracks against ground truth (HOTA, IDF1, MOTA…).
    Score(score::Args),
    /// Count many clips: every entry of a manifest, on all cores, resuming after an interruption.
    #[command(long_about = batch::LONG_ABOUT)]
    Batch(batch::Args),
}

/// A closed pipe on standard output (`throughline track … | head`) ends the program quietly, as it
/// ends any filter, instead of a panic on the next print.
fn quiet_on_closed_pipe() {
    #[cfg(unix)]
    // SAFETY: restoring the default action of one signal, before any thread is started.
    unsafe {
        libc::signal(libc::SIGPIPE, libc::SIG_DFL);
    }
}

fn main() -> ExitCode {
    quiet_on_closed_pipe();
    let result = match Cli::parse().command {
        Command::Track(args) => track::run(args),
        Command::Run(args) => run::run(args),
        Command::Detect(args) => detect::run(args),
        Command::Count(args) => count::run(args),
        Command::Review(args) => review::run(args),
        Command::Simulate(args) => simulate::run(args),
        Command::ScoreCounts(args) => score_counts::run(args),
        Command::Tune(args) => tune::run(args),
        Command::Score(args) => score::run(args),
        Command::Batch(args) => batch::run(args),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(f) => {
            eprintln!("error: {}", f.message);
            ExitCode::from(f.code)
        }
    }
}
