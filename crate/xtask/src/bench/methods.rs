//! Every tracking method (and the Python peer after `sort`) on one simulated scene: quality
//! against the simulator's truth, counts against its true crossings, speed and memory.

use std::path::Path;

use super::core_api::read_benchmark_boxes;
use super::core_api::{count, from_json, score, tracks_to_boxes, IdBox, Plan, Tracks};
use super::measure::{best_of, measure, Measured};
use super::scene::{detections_for, sim_plan, simulate_scene, Sim, METHODS};
use super::{peer, read};

/// One scene of the speed table or the grid.
pub struct SceneSpec {
    pub label: String,
    pub density: f64,
    pub width: f64,
    pub height: f64,
    pub miss: f64,
    pub frames: u32,
}

/// Per screenline: (name, true forward, true backward, counted forward, counted backward).
pub type LineCounts = Vec<(String, u64, u64, u64, u64)>;

/// One method's figures on one scene.
pub struct Row {
    pub hota: f64,
    pub idf1: f64,
    pub id_switches: u64,
    pub fps: f64,
    pub peak_mib: f64,
    pub counts: LineCounts,
}

/// Tracks of one scene judged against its truth: the tracking measures and the counts per line.
pub struct Judge {
    truth: Vec<IdBox>,
    truth_report: serde_json::Value,
    plan: Plan,
}

impl Judge {
    fn load(dir: &Path, s: &SceneSpec) -> Result<Judge, String> {
        let truth =
            read_benchmark_boxes(&read(&dir.join("truth.txt"))?).map_err(|e| e.to_string())?;
        let truth_report = serde_json::from_slice(&read(&dir.join("truth_report.json"))?)
            .map_err(|e| e.to_string())?;
        let plan = Plan::from_json(&sim_plan(s.width, s.height)).map_err(|e| e.to_string())?;
        Ok(Judge {
            truth,
            truth_report,
            plan,
        })
    }

    /// The row of tracks that took `m` to make over `frames` frames.
    pub fn row(&self, tracks: &Tracks, frames: u32, m: &Measured) -> Result<Row, String> {
        let sc = score(&self.truth, &tracks_to_boxes(tracks)).map_err(|e| e.message)?;
        let report = count(tracks, &self.plan, None).map_err(|e| e.message)?;
        let counts = report
            .screenlines
            .iter()
            .enumerate()
            .map(|(k, l)| {
                let t = &self.truth_report["screenlines"][k];
                (
                    l.name.clone(),
                    t["forward"].as_u64().unwrap_or(0),
                    t["backward"].as_u64().unwrap_or(0),
                    l.forward,
                    l.backward,
                )
            })
            .collect();
        Ok(Row {
            hota: sc.hota,
            idf1: sc.idf1,
            id_switches: sc.id_switches,
            fps: f64::from(frames) / m.seconds,
            peak_mib: m.peak_mib,
            counts,
        })
    }
}

/// Simulates a scene into files, then runs every method (and the peer) on it.
pub fn measure_scene(
    bin: &str,
    python: Option<&str>,
    s: &SceneSpec,
    runs: usize,
) -> Result<Vec<(String, Row)>, String> {
    let (dir, _) = simulate_scene(
        bin,
        &Sim {
            folder: &s.label,
            seed: 42,
            frames: s.frames,
            density: s.density,
            width: s.width,
            height: s.height,
            miss: Some(s.miss),
            embedding_dim: 16,
            render: None,
        },
    )?;
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
