//! Every tracking method (and the Python peer after `sort`) on one simulated scene: quality
//! against the simulator's truth, counts against its true crossings, speed and memory.

use std::path::Path;

use super::core_api::from_json;
use super::judge::{Judge, Row, SceneSpec};
use super::measure::{best_of, measure};
use super::scene::{detections_for, simulate_scene, METHODS};
use super::{peer, read};

/// Simulates a scene into files, then runs every method (and the peer) on it.
pub fn measure_scene(
    bin: &str,
    python: Option<&str>,
    s: &SceneSpec,
    runs: usize,
) -> Result<Vec<(String, Row)>, String> {
    let (dir, _) = simulate_scene(bin, &s.sim())?;
    let judge = Judge::load(&dir, s)?;
    let mut rows = Vec::new();
    for method in METHODS {
        let row = method_row(bin, &dir, method, s.frames, runs, &judge)?;
        rows.push((method.to_string(), row));
        if let (Some(py), "sort") = (python, method) {
            let inp = detections_for(&dir, method);
            let row = peer::peer_row(py, &inp, &dir, s.frames, runs, &judge)?;
            rows.push((peer::PEER.to_string(), row));
        }
    }
    Ok(rows)
}

/// One method: timed with benchmark text output, as the peer writes; then once more, untimed, as
/// JSON for scoring and counting (it keeps classes and the observed/predicted flags).
fn method_row(
    bin: &str,
    dir: &Path,
    method: &str,
    frames: u32,
    runs: usize,
    judge: &Judge,
) -> Result<Row, String> {
    let inp = detections_for(dir, method);
    let txt = dir.join(format!("{method}.txt")).display().to_string();
    let m = best_of(
        runs,
        bin,
        &[
            "track", &inp, "--method", method, "-o", &txt, "--quiet", "--stats",
        ],
    )?;
    let out = dir.join(format!("{method}.json"));
    let o = out.display().to_string();
    measure(
        bin,
        &[
            "track", &inp, "--method", method, "-o", &o, "--quiet", "--stats",
        ],
    )?;
    let tracks = from_json(&read(&out)?).map_err(|e| e.to_string())?;
    judge.row(&tracks, frames, &m)
}
