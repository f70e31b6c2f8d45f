//! `throughline count`: count existing tracks against a plan; and the report writing `run` shares.

use crate::files::{
    bad_input, bad_usage, looks_like_json, read_file, read_plan, read_work, Failure,
};
use crate::output::{check_paths, Outputs};
use std::path::{Path, PathBuf};
use throughline_core::handin::past_footage_warning;
use throughline_core::pipeline;
use throughline_core::report::{self, Report};
use throughline_core::track::files as tracks_io;

/// Count existing tracks against a plan.
#[derive(clap::Args)]
pub struct Args {
    /// Tracks: a tracks JSON document, or benchmark text (then, on lines of the form `track`
    /// writes, a box with score 0 counts as predicted, unless every box has score 0; every other
    /// box as observed).
    tracks: PathBuf,
    /// Counting plan (JSON).
    #[arg(long, value_name = "PLAN")]
    plan: PathBuf,
    /// Where to write the report (JSON); without it the report goes to standard output.
    #[arg(short, long, value_name = "REPORT")]
    output: Option<PathBuf>,
    /// Also write the counts as CSV.
    #[arg(long, value_name = "FILE")]
    csv: Option<PathBuf>,
    /// Print no summary.
    #[arg(short, long)]
    quiet: bool,
    /// Corrections to replay: an edits file or a project file saved by the page.
    #[arg(long, value_name = "FILE")]
    edits: Option<PathBuf>,
    /// The footage's length in frames, when the tracks end before it does (nobody in view at the
    /// end): the last interval is then whole, not partial. Default: with --edits PROJECT, its
    /// footage's duration.
    #[arg(long, value_name = "N")]
    frames: Option<u32>,
    /// Not `count`'s (its tracks are already made): accepted only to say where it belongs.
    #[arg(long, hide = true, value_name = "METHOD")]
    method: Option<String>,
    /// Not `count`'s, as `method`.
    #[arg(long, hide = true, value_name = "FILE")]
    config: Option<PathBuf>,
}

pub fn run(args: Args) -> Result<(), Failure> {
    if args.method.is_some() || args.config.is_some() {
        return Err(bad_usage(
            "`count` counts tracks already made, so it takes no tracking method or settings: \
             give `--method` or `--config` to `throughline track` when making the tracks, or use \
             `throughline run DETECTIONS --plan PLAN --method …`, which tracks and counts in one step",
        ));
    }
    let path = &args.tracks;
    check_paths(
        &[Some(path), Some(&args.plan), args.edits.as_deref()],
        &[args.output.as_deref(), args.csv.as_deref()],
    )?;
    let plan = read_plan(&args.plan)?;
    let (work, project) = read_work(args.edits.as_deref())?;
    let bytes = read_file(path)?;
    // A JSON array is no tracks document either, but the JSON reader says what one is.
    let (mut tracks, tracker) = if looks_like_json(&bytes) {
        let t = tracks_io::from_json(&bytes).map_err(|e| bad_input(path, e))?;
        let config = t.config.clone();
        (t, Some(config))
    } else {
        let boxes = tracks_io::read_benchmark_boxes(&bytes).map_err(|mut e| {
            if e.kind == throughline_core::error::ErrorKind::Empty {
                e.message += ", or the tracks JSON that `throughline track -o tracks.json` writes";
            }
            bad_input(path, e)
        })?;
        if !args.quiet {
            eprintln!(
                "note: {}: benchmark text carries no classes, so every count is unclassified; \
                 the tracks as JSON (`throughline track … -o tracks.json`) keep them",
                path.display()
            );
        }
        (tracks_io::boxes_to_tracks(&boxes), None)
    };
    let project_at = args.edits.as_deref().zip(project.as_ref());
    with_length(&mut tracks, args.frames, |t| {
        known_length(t, project_at, &plan, FootageFiles::default())
    })?;
    let report = pipeline::count(&tracks, &plan, tracker.as_ref(), &work)
        .map_err(|e| bad_input(&args.plan, e))?;
    let paths = ReportPaths {
        report: args.output.as_deref(),
        csv: args.csv.as_deref(),
    };
    let mut files = Outputs::new();
    let shown = stage_report(&report, &paths, &mut files)?;
    files.commit()?;
    if let Some(json) = shown {
        println!("{json}");
    }
    summarise(&report, args.quiet);
    Ok(())
}

/// Where `run` and `count` write the report and the counts CSV.
pub struct ReportPaths<'a> {
    pub report: Option<&'a Path>,
    pub csv: Option<&'a Path>,
}

/// Writes the CSV and the report among the command's outputs; the report's text when it goes to
/// standard output instead (printed once every file is in place).
pub fn stage_report(
    report: &Report,
    paths: &ReportPaths,
    files: &mut Outputs,
) -> Result<Option<String>, Failure> {
    let json = report.to_json();
    if let Some(p) = paths.csv {
        files.write(p, &report::counts_csv(report))?;
    }
    match paths.report {
        Some(p) => {
            files.write(p, &json)?;
            Ok(None)
        }
        None => Ok(Some(json)),
    }
}

/// Footage files given beside the tracks, whose frames tell the footage's length: a `--y4m` file
/// and the original footage (`--footage`, WebM or MP4).
#[derive(Default, Clone, Copy)]
pub struct FootageFiles<'a> {
    pub y4m: Option<&'a std::path::Path>,
    pub video: Option<&'a std::path::Path>,
    /// No note when the video's length cannot be read.
    pub quiet: bool,
}

/// The footage's length when it is known apart from the tracks, for [`with_length`]: none when
/// the tracks' length is the footage's own (boxes found in it); else the longest of the footage a
/// project (read from `path`) was made with, at the plan's frame rate (the page counted
/// detections from a file that end before it to its end), a `--y4m` file's frames and the
/// original footage's.
pub fn known_length(
    tracks: &throughline_core::Tracks,
    project: Option<(&std::path::Path, &throughline_core::project::Project)>,
    plan: &throughline_core::plan::Plan,
    files: FootageFiles,
) -> Result<Option<u32>, Failure> {
    if tracks.length_from_footage {
        return Ok(None);
    }
    let from_project = match project {
        Some((path, p)) => p
            .footage_frames(plan.spec.frame_rate)
            .map_err(|e| bad_input(path, e))?,
        None => None,
    };
    let from_y4m = match files.y4m {
        Some(f) => crate::frames::y4m_frames(f)?,
        None => None,
    };
    let from_video = match files.video {
        Some(f) => crate::frames::video_frames(f, plan.spec.frame_rate, files.quiet)?,
        None => None,
    };
    Ok(from_project.max(from_y4m).max(from_video))
}

/// The footage's length (`--frames`) given to the tracks: the count's intervals reach to it. Shorter
/// than the boxes or the footage already read is refused, naming what it must reach. Without it,
/// the footage's length when known otherwise (`known`, asked only then: [`known_length`]) when the
/// tracks end before it, as the page counts them; boxes past it are named.
pub fn with_length(
    tracks: &mut throughline_core::Tracks,
    frames: Option<u32>,
    known: impl FnOnce(&throughline_core::Tracks) -> Result<Option<u32>, Failure>,
) -> Result<(), Failure> {
    let Some(n) = frames else {
        let known = known(tracks)?;
        // Boxes past the footage's end: another clip's detections, or a frame mistyped.
        let past = known.and_then(|k| past_footage_warning(tracks.frame_count, k));
        if let Some(text) = past {
            crate::warnings::warn(text);
        }
        tracks.frame_count = tracks.frame_count.max(known.unwrap_or(0));
        return Ok(());
    };
    let last_box = tracks
        .tracks
        .iter()
        .flat_map(|t| t.boxes.last())
        .map(|b| b.frame)
        .max()
        .unwrap_or(0);
    let reach = last_box.max(tracks.frame_count);
    if n == 0 {
        return Err(bad_usage(
            "--frames 0: give the footage's whole length in frames, 1 or more",
        ));
    }
    if n < reach {
        return Err(bad_usage(&format!(
            "--frames {n}: the tracks go on to frame {reach}, so the footage is at least that long: \
             give its whole length in frames (its duration in seconds times the frame rate)"
        )));
    }
    if n != tracks.frame_count {
        // No longer the length of the footage the boxes were found in (a tracks file would say so).
        tracks.length_from_footage = false;
    }
    tracks.frame_count = n;
    Ok(())
}

/// The way across a line its forward crossings go on screen (y down): to the right-hand side of
/// its first point to its last, in one of eight words.
fn forward_on_screen(points: &[[f64; 2]]) -> Option<&'static str> {
    let (a, b) = (points.first()?, points.last()?);
    let (dx, dy) = (b[0] - a[0], b[1] - a[1]);
    // The right-hand side of the way from a to b, with y pointing down.
    let (nx, ny) = (-dy, dx);
    if nx == 0.0 && ny == 0.0 {
        return None;
    }
    const WAYS: [&str; 8] = [
        "right",
        "down and right",
        "down",
        "down and left",
        "left",
        "up and left",
        "up",
        "up and right",
    ];
    let eighth = (ny.atan2(nx) / std::f64::consts::FRAC_PI_4).round();
    Some(WAYS[(eighth as i64).rem_euclid(8) as usize])
}

/// The counts in a few lines, and the caution, on standard error; edits not applied even when
/// quiet.
pub fn summarise(report: &Report, quiet: bool) {
    // Said even when quiet, as every warning is: the counts are not the ones the person corrected
    // (a batch keeps it in the clip's `warnings.txt`; it was lost there).
    for e in report.edits.iter().filter(|e| !e.applied) {
        crate::warnings::warn(format!("an edit was not applied: {}", e.note));
    }
    if quiet {
        return;
    }
    if report.screenlines.is_empty() && report.zones.is_empty() {
        eprintln!("note: the plan has no screenlines and no zones, so nothing was counted");
    }
    for l in &report.screenlines {
        // Which way forward is on screen: a label swapped with its opposite is easy to miss.
        let way = report
            .plan
            .screenlines
            .iter()
            .find(|s| s.name == l.name)
            .and_then(|s| forward_on_screen(&s.points))
            .map(|w| format!(" (moving {w} on screen)"))
            .unwrap_or_default();
        eprintln!(
            "{}: {} {}{way}, {} {}; {} of them counted while hidden",
            l.name, l.forward, l.forward_label, l.backward, l.backward_label, l.inferred
        );
    }
    for z in &report.zones {
        let entries = if z.entries == 1 { "entry" } else { "entries" };
        let exits = crate::files::counted(z.exits, "exit");
        eprintln!("{}: {} {entries}, {exits}", z.name, z.entries);
    }
    eprintln!("{}", report::CAUTION);
}
