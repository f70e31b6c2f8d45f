//! `throughline simulate`: make a simulated scene with known truth.

use crate::files::{bad_usage, read_plan, Failure};
use crate::output::{check_paths, Outputs};
use indicatif::ProgressBar;
use std::io::Write;
use std::path::{Path, PathBuf};
use throughline_core::{detections, pipeline, report};
use throughline_sim::{self as sim, render};

/// Make a simulated scene with known truth: detections and ground-truth tracks.
#[derive(clap::Args)]
pub struct Args {
    /// Folder to write detections.txt, detections.csv (with embeddings if asked) and truth.txt.
    #[arg(long, value_name = "DIR")]
    out_dir: PathBuf,
    #[arg(long, default_value_t = 1)]
    seed: u64,
    /// Length in frames.
    #[arg(long, default_value_t = 750)]
    frames: u32,
    /// Mean number of agents in view.
    #[arg(long, default_value_t = 10.0)]
    density: f64,
    /// Chance that a fully visible agent is missed in a frame (0..1).
    #[arg(long, default_value_t = 0.1)]
    miss_rate: f64,
    /// Mean number of false detections per frame.
    #[arg(long, default_value_t = 0.5)]
    false_positives: f64,
    /// Length of appearance embeddings (0 for none).
    #[arg(long, default_value_t = 0)]
    embedding_dim: usize,
    /// Noise on each detection's embedding (0 = the same vector every time; 0.3 by default).
    #[arg(long, default_value_t = 0.3)]
    embedding_noise: f64,
    /// Picture width in pixels (even, for rendering).
    #[arg(long, default_value_t = 640.0)]
    width: f64,
    /// Picture height in pixels (even, for rendering).
    #[arg(long, default_value_t = 360.0)]
    height: f64,
    /// Leave out the plinth that hides people behind it.
    #[arg(long)]
    no_occluder: bool,
    /// Make common what troubles a motion detector: `all` (when given alone), or some of
    /// standing-start (people standing in view at frame 1), pairs (side by side, overtaking),
    /// long-pauses (stops of 3–10 s mid-walk), pale-clothes (clothes the paving's grey).
    #[arg(
        long,
        value_name = "CASES",
        num_args = 0..=1,
        default_missing_value = "all",
        value_delimiter = ','
    )]
    hard_cases: Vec<String>,
    /// Also render the frames, as YUV4MPEG2 (4:2:0, 25 fps) to this file (`-` for standard output).
    #[arg(long, value_name = "FILE.y4m")]
    render: Option<PathBuf>,
    /// Also count the true tracks with this plan: truth_report.json and truth_counts.csv (the true
    /// paths counted as they are: the plan's `rules.smooth_seconds` is taken as 0).
    #[arg(long, value_name = "PLAN")]
    plan: Option<PathBuf>,
}

impl Args {
    fn scene(&self) -> Result<sim::SceneConfig, Failure> {
        if !(0.0..=1.0).contains(&self.miss_rate) {
            return Err(bad_usage("--miss-rate must be between 0 and 1"));
        }
        if !(self.density >= 0.0 && self.false_positives >= 0.0 && self.embedding_noise >= 0.0) {
            return Err(bad_usage(
                "--density, --false-positives and --embedding-noise must not be negative",
            ));
        }
        let (w, h) = (self.width, self.height);
        let side = throughline_core::limits::MAX_PICTURE_SIDE as f64;
        if !(w >= 32.0 && h >= 32.0 && w <= side && h <= side) {
            return Err(bad_usage(&format!(
                "--width and --height must be between 32 and {side} pixels"
            )));
        }
        let hard_cases = if self.hard_cases.is_empty() {
            sim::HardCases::default()
        } else {
            sim::HardCases::parse(&self.hard_cases.join(","))
                .map_err(|e| bad_usage(&format!("--hard-cases: {e}")))?
        };
        Ok(sim::SceneConfig {
            seed: self.seed,
            frames: self.frames,
            width: w,
            height: h,
            density: self.density,
            miss_rate: self.miss_rate,
            false_positives: self.false_positives,
            embedding_dim: self.embedding_dim,
            embedding_noise: self.embedding_noise,
            occluder: !self.no_occluder,
            hard_cases,
            ..sim::SceneConfig::default()
        })
    }
}

pub fn run(args: Args) -> Result<(), Failure> {
    let cfg = args.scene()?;
    let dir = &args.out_dir;
    let names = [
        "truth.txt",
        "detections.txt",
        "detections.csv",
        "truth_report.json",
        "truth_counts.csv",
    ];
    let targets: Vec<PathBuf> = names.iter().map(|n| dir.join(n)).collect();
    let mut outputs: Vec<Option<&Path>> = targets.iter().map(|p| Some(p.as_path())).collect();
    outputs.push(args.render.as_deref());
    // The scene's own folder is made here, once the other outputs are known to be fine; any
    // other folder must be there already (frames rendered into the scene's folder are checked
    // once it is made).
    let plain = |p: &Path| -> PathBuf {
        p.components()
            .filter(|c| *c != std::path::Component::CurDir)
            .collect()
    };
    let render_elsewhere = args
        .render
        .as_deref()
        .filter(|r| r.parent().map(plain) != Some(plain(dir)));
    check_paths(&[args.plan.as_deref()], &[render_elsewhere])?;
    std::fs::create_dir_all(dir).map_err(|e| Failure {
        message: format!("{}: cannot create the folder: {e}", dir.display()),
        code: 1,
    })?;
    check_paths(&[args.plan.as_deref()], &outputs)?;
    let plan = args.plan.as_deref().map(read_plan).transpose()?;
    let mut files = Outputs::new();
    let scene = match &args.render {
        None => sim::generate(&cfg),
        Some(path) => render_scene(&cfg, path, &mut files)?,
    };
    files.write(&targets[0], &sim::truth_text(&scene))?;
    files.write(
        &targets[1],
        &detections::to_benchmark_text(&scene.detections),
    )?;
    files.write(&targets[2], &detections::to_csv(&scene.detections))?;
    if let Some(plan) = &plan {
        // The true paths have no jitter to average away: counted as they are.
        let mut plan = plan.clone();
        plan.spec.rules.smooth_seconds = 0.0;
        let report = pipeline::count(&sim::truth_tracks(&scene), &plan, None, &Default::default())
            .map_err(|e| Failure {
                message: e.to_string(),
                code: 1,
            })?;
        files.write(&targets[3], &report.to_json())?;
        files.write(&targets[4], &report::counts_csv(&report))?;
    }
    files.commit()?;
    if plan.is_none() {
        warn_of_stale_truth(dir, &names[3..], &targets[3..]);
    }
    let written = if plan.is_some() {
        &names[..]
    } else {
        &names[..3]
    };
    eprintln!(
        "simulated {} frames: {} true boxes of {} agents, {} detections, written to {} ({}{})",
        cfg.frames,
        scene.truth.len(),
        scene.truth_classes.len(),
        scene.detections.rows.len(),
        dir.display(),
        written.join(", "),
        match &plan {
            Some(_) => "; the last two are the true counts, to compare with `score-counts`",
            None => "; give --plan to have the true counts too",
        }
    );
    Ok(())
}

/// True counts of an earlier scene left beside this one (written without a plan) would be taken
/// for its own: named, with what to do.
fn warn_of_stale_truth(dir: &Path, names: &[&str], paths: &[PathBuf]) {
    let stale: Vec<&str> = names
        .iter()
        .zip(paths)
        .filter(|(_, p)| p.exists())
        .map(|(n, _)| *n)
        .collect();
    if !stale.is_empty() {
        eprintln!(
            "warning: {} holds {}, which this run did not write (no --plan): they may be of an \
             earlier scene; give --plan to write this scene's, or remove them before comparing \
             counts",
            dir.display(),
            throughline_core::text::listed(&stale, "and")
        );
    }
}

/// Simulates while rendering every frame into a YUV4MPEG2 stream (a file, among the outputs, or
/// standard output for `-`).
fn render_scene(
    cfg: &sim::SceneConfig,
    path: &Path,
    files: &mut Outputs,
) -> Result<sim::Scene, Failure> {
    let cannot = |e: std::io::Error| Failure {
        message: format!("{}: cannot write the frames: {e}", path.display()),
        code: 1,
    };
    let mut scene = None;
    let mut fill = |out: &mut dyn Write| -> std::io::Result<()> {
        scene = Some(render_into(cfg, out)?);
        Ok(())
    };
    if path == Path::new("-") {
        let mut out = std::io::BufWriter::new(std::io::stdout().lock());
        fill(&mut out).and_then(|()| out.flush()).map_err(cannot)?;
    } else {
        files.write_with(path, fill)?;
    }
    Ok(scene.unwrap_or_else(|| sim::generate(cfg)))
}

/// Simulates, writing each frame's picture as it is made.
fn render_into(cfg: &sim::SceneConfig, out: &mut dyn Write) -> std::io::Result<sim::Scene> {
    let mut renderer = render::Renderer::new(cfg);
    let header = render::y4m_header(renderer.width(), renderer.height());
    out.write_all(header.as_bytes())?;
    let bar = ProgressBar::new(u64::from(cfg.frames));
    let mut failure = None;
    let scene = sim::generate_with(cfg, &mut |frame, agents| {
        if failure.is_some() {
            return;
        }
        let pixels = renderer.frame(frame, agents);
        if let Err(e) = out
            .write_all(b"FRAME\n")
            .and_then(|()| out.write_all(&pixels))
        {
            failure = Some(e);
        }
        bar.set_position(u64::from(frame));
    });
    bar.finish_and_clear();
    match failure {
        Some(e) => Err(e),
        None => Ok(scene),
    }
}
