//! `throughline tune`: search tracker settings that score best against ground truth.

use crate::files::{bad_input, read_file, Failure};
use crate::output::{check_paths, Outputs};
use crate::progress;
use std::path::PathBuf;
use throughline_core::track::files as tracks_io;
use throughline_core::Method;
use throughline_eval::tune;

/// Search tracker settings that score best against ground truth; prints a settings file.
#[derive(clap::Args)]
pub struct Args {
    /// Detections file.
    detections: PathBuf,
    /// Ground truth, benchmark text (frame,id,x,y,w,h,…).
    #[arg(long, value_name = "GT")]
    truth: PathBuf,
    /// What to maximise.
    #[arg(long, default_value = "hota", value_parser = ["hota", "idf1", "mota"])]
    metric: String,
    /// Only this method (default: every method the detections allow).
    #[arg(long, value_parser = super::method_parser())]
    method: Option<Method>,
    /// Where to write the best settings (JSON, for --config); without it they go to standard output.
    #[arg(short, long, value_name = "FILE")]
    output: Option<PathBuf>,
}

pub fn run(args: Args) -> Result<(), Failure> {
    let (detections, truth) = (&args.detections, &args.truth);
    check_paths(&[Some(detections), Some(truth)], &[args.output.as_deref()])?;
    let metric = tune::Metric::parse(&args.metric).unwrap_or(tune::Metric::Hota);
    let dets = crate::reading::read_detections(&read_file(detections)?)
        .map_err(|e| bad_input(detections, e))?;
    let gt =
        tracks_io::read_benchmark_boxes(&read_file(truth)?).map_err(|e| bad_input(truth, e))?;
    let methods: Vec<Method> = match args.method {
        Some(m) => vec![m],
        None => Method::ALL
            .iter()
            .copied()
            .filter(|m| !m.def().needs_embeddings || dets.detections.embedding_dim > 0)
            .collect(),
    };
    let candidates = tune::candidates(&methods);
    let bar = progress::bar(
        false,
        candidates.len() as u64,
        "tuning {bar:30} {pos}/{len} settings ({eta} left)",
    );
    let trials = tune::tune(
        &dets.detections,
        &gt,
        metric,
        &candidates,
        &mut |done, _| bar.set_position(done as u64),
    )
    .map_err(|e| bad_input(detections, e))?;
    bar.finish_and_clear();
    let Some(best) = trials.first() else {
        return Err(bad_input(detections, "no settings could be tried"));
    };
    eprintln!(
        "best {} settings of {} tried (HOTA, IDF1, MOTA):",
        trials.len().min(5),
        trials.len()
    );
    for t in trials.iter().take(5) {
        eprintln!(
            "  {:.2}% {:.2}% {:.2}%  {} min_score {} min_iou {} max_age {} min_hits {}",
            100.0 * t.scores.hota,
            100.0 * t.scores.idf1,
            100.0 * t.scores.mota,
            t.config.method,
            t.config.min_score,
            t.config.min_iou,
            t.config.max_age,
            t.config.min_hits
        );
    }
    let text = serde_json::to_string_pretty(&best.config).unwrap_or_default();
    match &args.output {
        Some(p) => {
            let mut files = Outputs::new();
            files.write(p, &format!("{text}\n"))?;
            files.commit()?;
        }
        None => println!("{text}"),
    }
    Ok(())
}
