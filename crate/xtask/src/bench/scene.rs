//! The simulated scenes the benchmarks run on: one folder each under the target folder's bench/,
//! with the simulator's detections, truth and the grid's plan.

use std::path::{Path, PathBuf};

use crate::paths::target;
use crate::sh::run;

/// Every tracking method, in the tables' order.
pub const METHODS: [&str; 4] = ["iou", "sort", "bytetrack", "deepsort"];

/// A simulated scene for the benchmarks: its folder under target/bench and the simulator's settings
/// (the simulator's default miss rate where `miss` is None).
pub struct Sim<'a> {
    pub folder: &'a str,
    pub seed: u64,
    pub frames: u32,
    pub density: f64,
    pub width: f64,
    pub height: f64,
    pub miss: Option<f64>,
    /// Length of the appearance vectors (0: none). It changes the random draws, so the scene too.
    pub embedding_dim: u32,
    /// Also render the frames as YUV4MPEG2 to this file.
    pub render: Option<&'a Path>,
    /// Every hard case of the simulator on (`simulate --hard-cases`).
    pub hard_cases: bool,
    /// Two zones in the plan besides its two screenlines ([`sim_plan_with_zones`]).
    pub zones: bool,
}

impl<'a> Sim<'a> {
    /// The plain plaza at 640 × 360, seed 7, 12% missed detections, no footage, no appearance
    /// vectors: the long recordings (a day of one camera, an hour in the page) are made of it.
    pub fn plaza(folder: &'a str, frames: u32, density: f64) -> Self {
        Self {
            folder,
            seed: 7,
            frames,
            density,
            width: 640.0,
            height: 360.0,
            miss: Some(0.12),
            embedding_dim: 0,
            render: None,
            hard_cases: false,
            zones: false,
        }
    }

    /// The crowd of brought detections of the events and queue tables: 90 in view at 1280 × 720,
    /// 15% of boxes missed, appearance vectors of 16 values; `zones`: two zones in the plan too.
    pub fn crowd(folder: &'a str, seed: u64, frames: u32, zones: bool) -> Self {
        Self {
            folder,
            seed,
            frames,
            density: 90.0,
            width: 1280.0,
            height: 720.0,
            miss: Some(0.15),
            embedding_dim: 16,
            render: None,
            hard_cases: false,
            zones,
        }
    }
}

/// A footage scene as [`hard_cases_footage`] makes it.
pub struct FootageScene {
    pub dir: PathBuf,
    /// The plan's path.
    pub plan: String,
    /// The rendered frames (YUV4MPEG2).
    pub y4m: PathBuf,
    /// The motion detector's settings.
    pub config: PathBuf,
    /// The picture's width and height.
    pub size: (f64, f64),
}

/// The footage scene of the events and queue tables, simulated: the hard cases at 30 in view,
/// 640 × 360, rendered to `frames.y4m` in its folder, with the motion detector's settings (the
/// two heights 34 and 91) in `detector.json` beside it.
pub fn hard_cases_footage(
    bin: &str,
    folder: &str,
    seed: u64,
    frames: u32,
) -> Result<FootageScene, String> {
    let y4m = bench_dir(folder)?.join("frames.y4m");
    let sim = Sim {
        folder,
        seed,
        frames,
        density: 30.0,
        width: 640.0,
        height: 360.0,
        miss: None,
        embedding_dim: 0,
        render: Some(&y4m),
        hard_cases: true,
        zones: false,
    };
    let (size, (dir, plan)) = ((sim.width, sim.height), simulate_scene(bin, &sim)?);
    let config = dir.join("detector.json");
    std::fs::write(&config, r#"{"far_height": 34, "near_height": 91}"#)
        .map_err(|e| e.to_string())?;
    Ok(FootageScene {
        dir,
        plan,
        y4m,
        config,
        size,
    })
}

/// The folder of a scene (or of anything else a benchmark keeps) under target/bench.
pub fn bench_dir(folder: &str) -> Result<PathBuf, String> {
    Ok(target("bench")?.join(folder))
}

/// A plan for the simulated plaza of a given size: a midline across and a divide down the middle.
pub fn sim_plan(width: f64, height: f64) -> String {
    format!(
        r#"{{"frame_rate": 25, "screenlines": [
            {{"name": "midline", "points": [[{x0}, {ym}], [{x1}, {ym}]]}},
            {{"name": "divide", "points": [[{xm}, {y0}], [{xm}, {y1}]]}}]}}"#,
        x0 = width * 0.03,
        x1 = width * 0.97,
        ym = height * 0.64,
        xm = width * 0.5,
        y0 = height * 0.25,
        y1 = height * 0.97
    )
}

/// [`sim_plan`] with two zones as well: a court west of the divide, astride the midline, and a
/// terrace east of it, behind the midline (each a rectangle, its sides in fractions of the picture).
pub fn sim_plan_with_zones(width: f64, height: f64) -> String {
    let rectangle = |x0: f64, y0: f64, x1: f64, y1: f64| {
        let (x0, x1, y0, y1) = (x0 * width, x1 * width, y0 * height, y1 * height);
        serde_json::json!([[x0, y0], [x1, y0], [x1, y1], [x0, y1]])
    };
    let mut plan: serde_json::Value =
        serde_json::from_str(&sim_plan(width, height)).unwrap_or_default();
    plan["zones"] = serde_json::json!([
        {"name": "west court", "polygon": rectangle(0.156, 0.347, 0.4375, 0.833)},
        {"name": "east terrace", "polygon": rectangle(0.594, 0.208, 0.922, 0.583)},
    ]);
    plan.to_string()
}

/// Writes the grid's plan and simulates the scene into its folder; returns the folder and the
/// plan's path.
pub fn simulate_scene(bin: &str, sim: &Sim) -> Result<(PathBuf, String), String> {
    let dir = bench_dir(sim.folder)?;
    std::fs::create_dir_all(&dir).map_err(|e| e.to_string())?;
    let plan = dir.join("plan.json");
    let text = match sim.zones {
        true => sim_plan_with_zones(sim.width, sim.height),
        false => sim_plan(sim.width, sim.height),
    };
    std::fs::write(&plan, text).map_err(|e| e.to_string())?;
    let text = |v: &dyn std::fmt::Display| v.to_string();
    let mut args: Vec<String> = [
        "simulate",
        "--out-dir",
        &text(&dir.display()),
        "--seed",
        &text(&sim.seed),
        "--frames",
        &text(&sim.frames),
        "--density",
        &text(&sim.density),
        "--width",
        &text(&sim.width),
        "--height",
        &text(&sim.height),
        "--embedding-dim",
        &text(&sim.embedding_dim),
        "--plan",
        &text(&plan.display()),
    ]
    .map(String::from)
    .to_vec();
    if let Some(m) = sim.miss {
        args.extend(["--miss-rate".into(), m.to_string()]);
    }
    if sim.hard_cases {
        args.push("--hard-cases".into());
    }
    if let Some(r) = sim.render {
        args.extend(["--render".into(), r.display().to_string()]);
    }
    run(bin, &args.iter().map(String::as_str).collect::<Vec<_>>())?;
    Ok((dir, plan.display().to_string()))
}

/// The simulator's detections for `method`: with appearance vectors (CSV) for deepsort, else the
/// benchmark text.
pub fn detections_for(dir: &Path, method: &str) -> String {
    let file = if method == "deepsort" {
        "detections.csv"
    } else {
        "detections.txt"
    };
    dir.join(file).display().to_string()
}
