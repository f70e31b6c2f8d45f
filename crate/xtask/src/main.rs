//! Project chores, run as `cargo xtask <task>`, one module per task:
//!
//! - `demo`: build the command line and run the main job on the bundled demo, then build the browser
//!   app and serve it on 127.0.0.1 (`--no-serve`: build only); `demo-data`: regenerate the bundled
//!   demo with the simulator ([`demo`]);
//! - `site`: build the browser app into demo-site/ (and its single-file form) ([`site`]); `serve`:
//!   and serve it ([`serve`]);
//! - `test`: cheap invariants, then install what the checks need, then format check, lints, every
//!   test, the wasm32 builds, the browser tests ([`test`], [`invariants`]);
//! - `bench`: speed, memory and quality of every method on simulated scenes, with a Python peer,
//!   written into BENCHMARKS.md (`--counts`, `--detector`, `--events`, `--queue`, `--goals`, `--big-frame`: one
//!   table each); `bench --page`: speed of finding objects in the page (Chromium) ([`bench`]);
//! - `shape`: function and file lengths and module loops under crate/ ([`shape`]);
//! - `fuzz`: every fuzz target for ten million runs (or as told), a table of the results
//!   ([`fuzz`]); `test` runs each for a few seconds.
//!
//! Build output is found through `cargo metadata` ([`paths`]), so `CARGO_TARGET_DIR` is honoured.

use std::process::ExitCode;

mod bench;
mod builds;
mod demo;
mod fuzz;
mod invariants;
mod paths;
mod serve;
mod sh;
mod shape;
mod site;
mod slurm;
mod test;

const USAGE: &str = "usage: cargo xtask <demo [--no-serve] | site | serve [--no-build] [--port N] | test | bench [--quick | --grid | --counts | --detector | --events | --queue | --goals [--page-only | --parse-only] | --page | --big-frame] | demo-data | shape | fuzz [--runs N | --seconds S] [--plain] [TARGET...] | slurm>";

/// What each task does, printed with [`USAGE`] for `--help`.
const TASKS: &str = "\
demo        build the command line, count the bundled demo and compare with its truth, build the page
            and serve it on 127.0.0.1 (--no-serve: build only, no server)
site        build the page into demo-site/ and its single offline file
serve       serve demo-site/ on 127.0.0.1 (--no-build: as it is)
test        every check: invariants, installs, format, lints, Rust, wasm and browser tests
bench       speed, memory and quality, written into BENCHMARKS.md (one table with a flag)
demo-data   make the bundled demo again with the simulator
shape       the longest functions and files, and any module loop
fuzz        every fuzz target (or those named) for ten million runs, or as told
slurm       the batch on a real Slurm scheduler";

fn main() -> ExitCode {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let rest = args.get(1..).unwrap_or_default();
    // Asked for help, no task runs (`cargo xtask demo --help` once ran the whole demo).
    if args
        .iter()
        .any(|a| a == "--help" || a == "-h" || a == "help")
    {
        println!("{USAGE}\n\n{TASKS}");
        return ExitCode::SUCCESS;
    }
    let result = match args.first().map(String::as_str) {
        Some("demo") => demo::demo(rest),
        Some("site") => site::build(),
        Some("serve") => serve::command(rest),
        Some("test") => test::test(),
        Some("bench") => bench::bench(rest),
        Some("demo-data") => demo::demo_data(),
        Some("shape") => shape::command(),
        Some("fuzz") => fuzz::command(rest),
        Some("slurm") => slurm::check(),
        _ => Err(USAGE.into()),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("xtask: {e}");
            ExitCode::FAILURE
        }
    }
}
