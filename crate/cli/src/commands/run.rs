//! `throughline run`: track detections (or find them in footage), then count them against a plan.

use super::count::{stage_report, summarise, ReportPaths};
use super::detect::detect_footage;
use super::track::{track_detections, track_file_with, with_project, TrackingArgs};
use crate::bridging::{bridge_with_footage, without_footage};
use crate::cores::Cores;
use crate::files::{bad_input, bad_usage, read_plan, read_work, write_tracks, Failure};
use crate::handin;
use crate::output::{check_paths, Outputs};
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
    /// Detections file (as for `track`); or give the footage alone (--footage or --y4m) to find
    /// them in it.
    #[arg(required_unless_present_any = ["y4m", "footage"])]
    detections: Option<PathBuf>,
    /// Footage: YUV4MPEG2 (a file, or - for standard input), or any other video (WebM, MP4, …)
    /// decoded by ffmpeg. Alone: moving objects are found by the built-in detector (fixed
    /// camera). With a detections file: the footage they were found in. Either way, from a file,
    /// gaps where detections were missed are bridged by following objects in the footage (V-IOU;
    /// `bridge_frames` in the tracker settings, 0 for off).
    #[arg(long, value_name = "FILE")]
    y4m: Option<PathBuf>,
    /// Detector settings (JSON; see docs/detector-settings.md), for footage given without a
    /// detections file.
    #[arg(long, value_name = "FILE")]
    detector_config: Option<PathBuf>,
    /// Counting plan (JSON).
    #[arg(long, value_name = "PLAN")]
    plan: PathBuf,
    /// Where to write the report (JSON); without it the report goes to standard output.
    #[arg(short, long, value_name = "REPORT")]
    output: Option<PathBuf>,
    /// Also write the counts as CSV (screenline,direction,class,interval_start,interval_end,count,partial).
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
    /// next to the report (a project file's site is used when this is not given and the
    /// report goes to a file with -o).
    #[arg(long, value_name = "NAME")]
    site: Option<String>,
    /// The recording's clock time at frame 1, like 2026-03-02T07:00:00 (instead of the plan's).
    #[arg(long, value_name = "TIME")]
    start: Option<String>,
    /// The footage's length in frames, when the detections end before it does (nobody in view at
    /// the end): the last interval is then whole, not partial. Default: the frames of the --y4m
    /// file or of --footage (WebM or MP4), or with --edits PROJECT its footage's duration (boxes
    /// found with --y4m alone know theirs).
    #[arg(long, value_name = "N")]
    frames: Option<u32>,
    /// The original footage file, to name it in the outputs; a WebM or MP4's frames are counted
    /// too, for the footage's length (see --frames). Given without a detections file (and without
    /// --y4m), moving objects are found in it, as with --y4m (other than YUV4MPEG2, ffmpeg decodes
    /// it).
    #[arg(long, value_name = "FILE")]
    footage: Option<PathBuf>,
    /// A still of the footage (PNG or JPEG) for the summary.
    #[arg(long, value_name = "IMAGE")]
    still: Option<PathBuf>,
}

impl Args {
    /// Every file the command reads.
    fn inputs(&self) -> Vec<Option<&Path>> {
        vec![
            self.detections.as_deref(),
            self.y4m.as_deref(),
            self.detector_config.as_deref(),
            Some(&self.plan),
            self.tracking.config.as_deref(),
            self.edits.as_deref(),
            self.handin.footage.as_deref(),
            self.handin.still.as_deref(),
        ]
    }
}

pub fn run(mut args: Args) -> Result<(), Failure> {
    // The footage alone: objects are found in it.
    if args.detections.is_none() && args.y4m.is_none() {
        args.y4m = args.handin.footage.clone();
    }
    if args.detector_config.is_some() && args.y4m.is_none() {
        return Err(bad_usage(
            "--detector-config is for finding objects in footage: give the footage (--footage \
             FILE) and no detections file",
        ));
    }
    let outputs = [
        args.output.as_deref(),
        args.csv.as_deref(),
        args.tracks.as_deref(),
    ];
    check_paths(&args.inputs(), &outputs)?;
    // The plan is checked first: a mistake in it should not cost a whole tracking run.
    let plan = with_start(read_plan(&args.plan)?, args.handin.start.as_deref())?;
    let (work, project) = read_work(args.edits.as_deref())?;
    let project_at = args.edits.as_deref().zip(project.as_ref());
    let mut tracks = track_source(&args, &plan, project_at)?;
    let footage = super::count::FootageFiles {
        y4m: args.y4m.as_deref(),
        video: args.handin.footage.as_deref(),
        quiet: args.tracking.quiet,
    };
    super::count::with_length(&mut tracks, args.handin.frames, |t| {
        super::count::known_length(t, project_at, &plan, footage)
    })?;
    if args.y4m.is_none() && args.handin.footage.is_none() {
        warn_beyond_boxes(&tracks, &plan);
    }
    let report = pipeline::count(&tracks, &plan, Some(&tracks.config), &work)
        .map_err(|e| bad_input(&args.plan, e))?;
    let mut files = Outputs::new();
    if let Some(p) = &args.tracks {
        // The tracks as counted: after the edits on tracks, when there are edits.
        let corrected;
        let shown = if work.edits.is_empty() {
            &tracks
        } else {
            corrected = pipeline::correct_tracks(&tracks, &work.edits).0;
            &corrected
        };
        files.write_with(p, |w| write_tracks(shown, Some(p), w))?;
    }
    let paths = ReportPaths {
        report: args.output.as_deref(),
        csv: args.csv.as_deref(),
    };
    let shown = stage_report(&report, &paths, &mut files)?;
    let written = stage_handin(&args, &report, project.as_ref(), &mut files)?;
    files.commit()?;
    if let Some(json) = shown {
        println!("{json}");
    }
    summarise(&report, args.tracking.quiet);
    for path in written.iter().filter(|_| !args.tracking.quiet) {
        eprintln!("written: {path}");
    }
    Ok(())
}

/// Without footage to check the plan against (`footage_against_plan`), lines and zones wholly
/// beyond every box are warned of: nothing can be counted there (a plan drawn on footage of
/// another size; a newcomer's trial counted 0 and 0 there without a word).
fn warn_beyond_boxes(tracks: &throughline_core::Tracks, plan: &Plan) {
    if tracks.tracks.is_empty() {
        return;
    }
    let (w, h) = throughline_core::review::extent_of(tracks);
    let beyond = plan.outside_picture(w, h);
    if !beyond.is_empty() {
        crate::warnings::warn(format!(
            "{} wholly beyond every box (the boxes reach {:.0} × {:.0} pixels): nothing can be \
             counted there; was the plan drawn on footage of another size?",
            beyond.join(", ") + if beyond.len() == 1 { " lies" } else { " lie" },
            w,
            h
        ));
    }
}

/// The tracks: of the detections file, or of the objects found in the footage; with footage,
/// bridged where detections were missed.
fn track_source(
    args: &Args,
    plan: &Plan,
    project: Option<(&Path, &throughline_core::project::Project)>,
) -> Result<throughline_core::Tracks, Failure> {
    let mut timer = Timer::new();
    let (how, settings) = with_project(&args.tracking, project)?;
    let how = &how;
    // Said even when quiet, as every warning is (and kept for the hand-in files).
    if let Some(footage) = args.y4m.as_ref().or(args.handin.footage.as_ref()) {
        crate::frames::footage_against_plan(footage, plan)?;
    }
    match (&args.y4m, &args.detections) {
        (Some(footage), None) => {
            let default_margin = plan.spec.rules.hysteresis < FOOTAGE_HYSTERESIS;
            if !how.quiet && !plan.screenlines.is_empty() && default_margin {
                eprintln!(
                    "note: boxes found in footage jump where people join or split near a line; \
                     rules.hysteresis {FOOTAGE_HYSTERESIS} in the plan (zone_hysteresis {}) counts \
                     them more steadily (docs/detector-settings.md)",
                    throughline_core::plan::DEFAULT_HYSTERESIS
                );
            }
            let file = args.detector_config.as_deref();
            let config = super::detect::detector_settings(file, project, how.quiet)?;
            found_tracks(footage, config, how, settings)
        }
        (Some(footage), Some(path)) => {
            if args.detector_config.is_some() {
                return Err(bad_usage(
                    "--detector-config is for finding objects in the footage; with a detections \
                     file the footage only bridges missed detections: leave one of the two out",
                ));
            }
            let tracks = track_file_with(path, how, settings, &mut timer)?;
            bridge_with_footage(tracks, footage, how.quiet)
        }
        (None, Some(path)) => Ok(without_footage(
            track_file_with(path, how, settings, &mut timer)?,
            how.quiet,
        )),
        // clap requires one of the two.
        (None, None) => Ok(without_footage(
            track_file_with(Path::new("-"), how, settings, &mut timer)?,
            how.quiet,
        )),
    }
}

/// The tracks of the objects found in `footage` (a fixed camera's), bridged with it where the
/// detector missed them: what `run --footage` and `review --footage` count without detections.
pub(super) fn found_tracks(
    footage: &Path,
    config: throughline_core::detect::DetectorConfig,
    how: &TrackingArgs,
    settings: crate::files::Settings,
) -> Result<throughline_core::Tracks, Failure> {
    let cores = Cores::new(None);
    let dets = detect_footage(footage, config, &cores, how.quiet)?;
    let tracks = track_detections(&dets, footage, how, settings, &mut Timer::new())?;
    bridge_with_footage(tracks, footage, how.quiet)
}

/// With a site's name (given, or the project's), the hand-in files next to the report; their paths.
fn stage_handin(
    args: &Args,
    report: &throughline_core::report::Report,
    project: Option<&throughline_core::project::Project>,
    files: &mut Outputs,
) -> Result<Vec<String>, Failure> {
    // Asked for by --site; or by a project that names its site, when the report goes to a file
    // (with the report on standard output there is no folder to put them in unasked).
    let site_in_project = project.is_some_and(|p| p.site.is_some());
    if args.handin.site.is_none() && !(site_in_project && args.output.is_some()) {
        return Ok(Vec::new());
    }
    // The footage: named, else the one the boxes were found in or bridged with (a file).
    let y4m = args.y4m.as_deref().filter(|p| *p != Path::new("-"));
    let inputs = handin::Inputs {
        site: args.handin.site.as_deref(),
        plan: &args.plan,
        detections: args.detections.as_deref(),
        footage: args.handin.footage.as_deref().or(y4m),
        still: args.handin.still.as_deref(),
        project: args.edits.as_deref().zip(project),
        found_with: args
            .detections
            .is_none()
            .then_some(args.detector_config.as_deref()),
    };
    let ctx = handin::context(&inputs)?;
    let dir = args
        .output
        .as_deref()
        .and_then(Path::parent)
        .unwrap_or(Path::new(""));
    let planned = handin::planned(report, &ctx, dir);
    let mut outputs: Vec<Option<&Path>> = vec![
        args.output.as_deref(),
        args.csv.as_deref(),
        args.tracks.as_deref(),
    ];
    outputs.extend(planned.iter().map(|(p, _)| Some(p.as_path())));
    check_paths(&args.inputs(), &outputs)?;
    for (path, text) in &planned {
        files.write(path, text)?;
    }
    Ok(planned
        .iter()
        .map(|(p, _)| p.display().to_string())
        .collect())
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
