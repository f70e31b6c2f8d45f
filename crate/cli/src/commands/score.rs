//! `throughline score`: score tracks against ground truth (HOTA, IDF1, MOTA…).

use crate::files::{bad_input, looks_like_json_object, read_file, Failure};
use std::path::{Path, PathBuf};
use throughline_core::track::files::{self as tracks_io, IdBox};
use throughline_eval::tracking_metrics;

/// Score tracks against ground truth (HOTA, IDF1, MOTA…).
#[derive(clap::Args)]
pub struct Args {
    /// Ground truth, benchmark text (frame,id,x,y,w,h,…).
    #[arg(long, value_name = "GT")]
    truth: PathBuf,
    /// Tracks: benchmark text or a tracks JSON document.
    tracks: PathBuf,
    /// Print one JSON object instead of a table.
    #[arg(long)]
    json: bool,
}

fn read_tracks(path: &Path) -> Result<Vec<IdBox>, Failure> {
    let bytes = read_file(path)?;
    if bytes.iter().all(u8::is_ascii_whitespace) {
        // An empty tracker output is a valid (if poor) result: everything was missed.
        return Ok(Vec::new());
    }
    if looks_like_json_object(&bytes) {
        let tracks = tracks_io::from_json(&bytes).map_err(|e| bad_input(path, e))?;
        Ok(tracks_io::tracks_to_boxes(&tracks))
    } else {
        tracks_io::read_benchmark_boxes(&bytes).map_err(|e| bad_input(path, e))
    }
}

pub fn run(args: Args) -> Result<(), Failure> {
    let truth = &args.truth;
    let gt =
        tracks_io::read_benchmark_boxes(&read_file(truth)?).map_err(|e| bad_input(truth, e))?;
    let tr = read_tracks(&args.tracks)?;
    let s = tracking_metrics::score(&gt, &tr).map_err(|e| Failure {
        message: e.message,
        code: 1,
    })?;
    if args.json {
        println!("{}", serde_json::to_string_pretty(&s).unwrap_or_default());
        return Ok(());
    }
    let pct = |v: f64| format!("{:6.2}%", 100.0 * v);
    println!(
        "HOTA  {}   DetA {}   AssA {}   LocA {}",
        pct(s.hota),
        pct(s.deta),
        pct(s.assa),
        pct(s.loca)
    );
    println!(
        "IDF1  {}   IDP  {}   IDR  {}",
        pct(s.idf1),
        pct(s.idp),
        pct(s.idr)
    );
    println!("MOTA  {}   MOTP {}", pct(s.mota), pct(s.motp));
    println!(
        "ID switches {}   fragmentations {}   false positives {}   misses {}",
        s.id_switches, s.fragmentations, s.false_positives, s.misses
    );
    println!(
        "ground-truth objects {}: mostly tracked {}, partly {}, mostly lost {}; tracker ids {}",
        s.gt_ids, s.mostly_tracked, s.partially_tracked, s.mostly_lost, s.tracker_ids
    );
    Ok(())
}
