//! The Python SORT peer (`tests/bench/sort_peer.py`, filterpy + SciPy) that the speed and grid
//! tables race: a Python with its two libraries, made once in the target folder when missing.

use std::path::Path;
use std::process::Command;

use super::core_api::{boxes_to_tracks, read_benchmark_boxes};
use super::judge::{Judge, Row};
use super::measure::best_of;
use super::read;
use crate::paths::target;
use crate::sh::run;

/// A Python that imports filterpy and SciPy: `THROUGHLINE_BENCH_PYTHON`, the virtual environment
/// under target/bench-venv, or that environment made now (None when it cannot be made: the tables
/// then have no peer rows).
pub fn python_with_peers() -> Option<String> {
    let venv = target("bench-venv").ok()?;
    let candidates = [
        std::env::var("THROUGHLINE_BENCH_PYTHON").ok(),
        Some(venv.join("bin/python").display().to_string()),
    ];
    for p in candidates.into_iter().flatten() {
        let ok = Command::new(&p)
            .args(["-c", "import filterpy, scipy"])
            .status()
            .is_ok_and(|s| s.success());
        if ok {
            return Some(p);
        }
    }
    // Make one: a virtual environment with the peer's two libraries from PyPI.
    let venv_s = venv.display().to_string();
    if run("python3", &["-m", "venv", &venv_s]).is_ok() {
        let pip = venv.join("bin/pip").display().to_string();
        if run(&pip, &["install", "--quiet", "filterpy", "scipy"]).is_ok() {
            return Some(venv.join("bin/python").display().to_string());
        }
    }
    None
}

/// The peer's name in the tables.
pub const PEER: &str = "Python SORT peer";

/// The peer on the detections `inp` of the scene in `dir`: timed (the fastest of `runs`), then its
/// tracks judged like the methods'.
pub fn peer_row(
    python: &str,
    inp: &str,
    dir: &Path,
    frames: u32,
    runs: usize,
    judge: &Judge,
) -> Result<Row, String> {
    let peer_out = dir.join("peer.txt");
    let po = peer_out.display().to_string();
    let m = best_of(runs, python, &["tests/bench/sort_peer.py", inp, &po])?;
    let boxes = read_benchmark_boxes(&read(&peer_out)?).map_err(|e| e.to_string())?;
    judge.row(&boxes_to_tracks(&boxes), frames, &m)
}
