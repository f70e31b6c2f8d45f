//! `throughline run`: track detections (or find them in footage), then count them against a plan.

use super::count::{write_report, Outputs};
use super::detect::detect_footage;
use super::track::{track_detections, track_file, TrackingArgs};
use crate::files::{
    bad_input, bad_usage, read_plan, read_settings, read_work, tracks_text, write_file, Failure,
};
use crate::handin;
use crate::progress::Timer;
use std::path::{Path, PathBuf};
use throughline_core::pipeline;
use throughline_core::plan::{Plan, FOOTAGE_HYSTERESIS};

/// The long help of the command (`--help`).
pub const LONG_ABOUT: &str = "Track detections, then count them against a plan.\n\n\
    PLAN is a JSON counting plan (docs/plan-format.md): frame rate, screenlines, zones, intervals, \
    calibration. The report (JSON) holds counts by line, direction, class and interval, zone \
    entries, exits and dwell, movements, speeds, and every event behind the counts. \
    Counts are estimates: check a sample against a manual count before relying on them.";

/// Track detections, then count them against a plan (screenlines, zones, intervals).
#[derive(clap::Args)]
pub struct Args {
    /// Detections file (as for `track`); or give --y4m to find them in footage.
    #[arg(required_unless_present = "y4m", conflicts_with = "y4m")]
    detections: Option<PathBuf>,
    /// Footage as YUV4MPEG2 (a file, or - for standard input) instead of a detections file:
    /// moving objects are found by the built-in detector (fixed camera).
    #[arg(long, value_name = "FILE")]
    y4m: Option<PathBuf>,
    /// Detector settings (JSON; see docs/detector-settings.md), with --y4m.
    #[arg(long, value_name = "FILE", requires = "y4m")]
    detector_config: Option<PathBuf>,
    /// Counting plan (JSON).
    #[arg(long, value_name = "PLAN")]
    plan: PathBuf,
    /// Where to write the report (JSON); without it the report goes to standard output.
    #[arg(short, long, value_name = "REPORT")]
    output: Option<PathBuf>,
    /// Also write the counts as CSV (screenline,direction,class,interval_start,interval_end,count).
    #[arg(long, value_name = "FILE")]
    csv: Option<PathBuf>,
    /// Also write the tracks, as counted (after --edits) (.txt: benchmark text; otherwise JSON).
    #[arg(long, value_name = "FILE")]
    tracks: Option<PathBuf>,
    #[command(flatten)]
    tracking: TrackingArgs,
    /// Corrections to replay: an edits file or a project file saved by the page.
    #[arg(long, value_name = "FILE")]
    edits: Option<PathBuf>,
    #[command(flatten)]
    handin: HandinArgs,
}

/// The hand-in outputs: with a site's name, the interval grid, the movement matrix and the summary
/// are written next to the report.
#[derive(clap::Args)]
struct HandinArgs {
    /// The site's name: writes SITE_DATE_grid.csv, _grid-long.csv, _movements.csv and _summary.html
    /// next to the report (a project file's site is used when this is not given).
    #[arg(long, value_name = "NAME")]
    site: Option<String>,
    /// The recording's clock time at frame 1, like 2026-03-02T07:00:00 (instead of the plan's).
    #[arg(long, value_name = "TIME")]
    start: Option<String>,
    /// The original footage file, to name it in the outputs (only its first MiB is read).
    #[arg(long, value_name = "FILE")]
    footage: Option<PathBuf>,
    /// A still of the footage (PNG or JPEG) for the summary.
    #[arg(long, value_name = "IMAGE")]
    still: Option<PathBuf>,
}

pub fn run(args: Args) -> Result<(), Failure> {
    // The plan is checked first: a mistake in it should not cost a whole tracking run.
    let plan = with_start(read_plan(&args.plan)?, args.handin.start.as_deref())?;
    let (work, project) = read_work(args.edits.as_deref())?;
    let mut timer = Timer::new();
    let how = &args.tracking;
    let tracks = match (&args.y4m, &args.detections) {
        (Some(footage), _) => {
            let settings = read_settings(how.config.as_deref())?;
            let default_margin = plan.spec.rules.hysteresis < FOOTAGE_HYSTERESIS;
            if !how.quiet && !plan.screenlines.is_empty() && default_margin {
                eprintln!(
                    "note: boxes found in footage jump where people join or split near a line; \
                     rules.hysteresis {FOOTAGE_HYSTERESIS} in the plan (zone_hysteresis {}) counts \
                     them more steadily (docs/detector-settings.md)",
                    throughline_core::plan::DEFAULT_HYSTERESIS
                );
            }
            let dets = detect_footage(footage, args.detector_config.as_deref(), how.quiet)?;
            track_detections(&dets, footage, how, settings, &mut timer)?
        }
        (None, Some(path)) => track_file(path, how, &mut timer)?,
        // clap requires one of the two.
        (None, None) => track_file(Path::new("-"), how, &mut timer)?,
    };
    if let Some(p) = &args.tracks {
        // The tracks as counted: after the edits on tracks, when there are edits.
        let text = if work.edits.is_empty() {
            tracks_text(&tracks, Some(p))
        } else {
            tracks_text(&pipeline::correct_tracks(&tracks, &work.edits).0, Some(p))
        };
        write_file(p, &text)?;
    }
    let report = pipeline::count(&tracks, &plan, Some(&tracks.config), &work)
        .map_err(|e| bad_input(&args.plan, e))?;
    let out = Outputs {
        report: args.output.as_deref(),
        csv: args.csv.as_deref(),
    };
    write_report(&report, &out, how.quiet)?;
    let site = args.handin.site.is_some() || project.as_ref().is_some_and(|p| p.site.is_some());
    if site {
        let inputs = handin::Inputs {
            site: args.handin.site.as_deref(),
            plan: &args.plan,
            detections: args.detections.as_deref(),
            footage: args.handin.footage.as_deref(),
            still: args.handin.still.as_deref(),
            project: args.edits.as_deref().zip(project.as_ref()),
        };
        let ctx = handin::context(&inputs)?;
        let dir = args
            .output
            .as_deref()
            .and_then(Path::parent)
            .unwrap_or(Path::new(""));
        for path in handin::write_all(&report, &ctx, dir)? {
            if !how.quiet {
                eprintln!("written: {path}");
            }
        }
    }
    Ok(())
}

/// The plan with the recording's start given on the command line, checked again.
fn with_start(plan: Plan, start: Option<&str>) -> Result<Plan, Failure> {
    let Some(start) = start else {
        return Ok(plan);
    };
    let mut spec = plan.spec;
    spec.start = Some(start.to_string());
    Plan::from_spec(spec).map_err(|e| bad_usage(&format!("--start: {}", e.message)))
}
