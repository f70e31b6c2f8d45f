//! What one scene's tracks are judged by: the scene's description, and each method's row of
//! figures (tracking measures against the simulator's truth, counts against its true crossings,
//! speed and memory), shared by the methods' runs and the Python peer's.

use std::path::Path;

use super::core_api::read_benchmark_boxes;
use super::core_api::{count, score, tracks_to_boxes, IdBox, Plan, Tracks};
use super::measure::Measured;
use super::read;
use super::scene::{sim_plan, Sim};

/// One scene of the speed table or the grid.
pub struct SceneSpec {
    pub label: String,
    pub density: f64,
    pub width: f64,
    pub height: f64,
    pub miss: f64,
    pub frames: u32,
}

impl SceneSpec {
    /// The simulator's settings for this scene (seed 42, embeddings of 16 values for deepsort).
    pub fn sim(&self) -> Sim<'_> {
        Sim {
            folder: &self.label,
            seed: 42,
            frames: self.frames,
            density: self.density,
            width: self.width,
            height: self.height,
            miss: Some(self.miss),
            embedding_dim: 16,
            render: None,
            hard_cases: false,
            zones: false,
        }
    }
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
    pub fn load(dir: &Path, s: &SceneSpec) -> Result<Judge, String> {
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
