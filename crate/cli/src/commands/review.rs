//! `throughline review`: the moments of a count most likely wrong, to check against the footage.

use super::track::{track_file_with, with_project, TrackingArgs};
use crate::files::{bad_input, read_plan, read_work, Failure};
use crate::progress::Timer;
use std::path::PathBuf;
use throughline_core::{pipeline, review};

/// The long help of the command (`--help`).
pub const LONG_ABOUT: &str = "List the moments of a count most likely wrong, most doubtful first.\n\n\
    Tracks and counts the detections as `run` does (with --edits, after the corrections), then lists \
    what a person should check against the footage before trusting the counts: crossings by short \
    or joined tracks, crossings just as a track begins or ends, two crossings close together, \
    crossings while hidden (the longer, the more doubtful) or barely seen, tracks that appear or \
    disappear near a line, tracks whose class changes. Each with its time, frame, tracks and why, \
    in plain words. In a crowd the list is long: check the first ones (--first N lists only \
    those), and a sample by hand. The browser app shows the same queue beside the footage.";

/// List the moments of a count most likely wrong, most doubtful first.
#[derive(clap::Args)]
pub struct Args {
    /// Detections file (as for `track`); without it, the objects are found in --footage (a fixed
    /// camera's), as `run --footage` finds them.
    #[arg(required_unless_present = "footage")]
    detections: Option<PathBuf>,
    /// Detector settings (JSON; docs/detector-settings.md) for finding objects in --footage when no
    /// detections file is given.
    #[arg(long, value_name = "FILE")]
    detector_config: Option<PathBuf>,
    /// Counting plan (JSON).
    #[arg(long, value_name = "PLAN")]
    plan: PathBuf,
    #[command(flatten)]
    tracking: TrackingArgs,
    /// Corrections made so far: an edits file or a project file saved by the page.
    #[arg(long, value_name = "FILE")]
    edits: Option<PathBuf>,
    /// The picture's size in pixels, as WIDTHxHEIGHT (e.g. 1280x720), to tell tracks that appear at
    /// the picture's edge from those that appear near a line. Default: the size the project file
    /// recorded for the footage, else the extent of the boxes.
    #[arg(long, value_name = "WxH", value_parser = picture_size)]
    picture: Option<(f64, f64)>,
    /// The footage (YUV4MPEG2, WebM, MP4, or other video ffmpeg decodes), for its picture's size
    /// and length when --picture and --frames are not given.
    #[arg(long, value_name = "FILE")]
    footage: Option<PathBuf>,
    /// The footage's length in frames, when the detections end before it does (as for `run`;
    /// default: with --edits PROJECT, its footage's duration): a track ending at the footage's
    /// end is not doubtful, one ending well before it may be.
    #[arg(long, value_name = "N")]
    frames: Option<u32>,
    /// List only the N most doubtful moments (default: every one).
    #[arg(long, value_name = "N")]
    first: Option<usize>,
    /// Print one JSON array instead of a list.
    #[arg(long)]
    json: bool,
}

pub fn run(args: Args) -> Result<(), Failure> {
    let plan = read_plan(&args.plan)?;
    let (work, project) = read_work(args.edits.as_deref())?;
    let recorded = project
        .as_ref()
        .and_then(|p| p.footage.as_ref())
        .and_then(|f| Some((f64::from(f.width?), f64::from(f.height?))));
    let project_at = args.edits.as_deref().zip(project.as_ref());
    let (how, settings) = with_project(&args.tracking, project_at)?;
    let mut tracks = review_tracks(&args, (&how, settings), project_at)?;
    let footage = footage_files(&args)?;
    super::count::with_length(&mut tracks, args.frames, |t| {
        super::count::known_length(t, project_at, &plan, footage)
    })?;
    let report = pipeline::count(&tracks, &plan, Some(&tracks.config), &work)
        .map_err(|e| bad_input(&args.plan, e))?;
    let shown = pipeline::correct_tracks(&tracks, &work.edits).0;
    let picture = args.picture.or(footage_picture(&args, &plan)?).or(recorded);
    match picture {
        Some(size) => warn_misfit(&shown, &plan, size, args.tracking.quiet),
        None if !args.tracking.quiet => eprintln!(
            "note: the picture's size is taken from the boxes' extent; give the footage (--footage \
             FILE), its size (--picture WxH), or a project file with --edits, to list what the \
             page lists"
        ),
        None => {}
    }
    let queue = review::doubts(&shown, &plan, &report, picture);
    let listed = &queue[..args.first.unwrap_or(queue.len()).min(queue.len())];
    if args.json {
        println!(
            "{}",
            serde_json::to_string_pretty(listed).unwrap_or_default()
        );
        return Ok(());
    }
    say_queue(&queue, listed, &report, project.as_ref());
    Ok(())
}

/// The tracks to review: of the detections file, else of the objects found in `--footage`.
fn review_tracks(
    args: &Args,
    (how, settings): (&super::track::TrackingArgs, crate::files::Settings),
    project: Option<(&std::path::Path, &throughline_core::project::Project)>,
) -> Result<throughline_core::Tracks, Failure> {
    Ok(match (&args.detections, &args.footage) {
        (Some(_), _) if args.detector_config.is_some() => {
            return Err(crate::files::bad_usage(
                "--detector-config is for finding objects in the footage when no detections \
                 file is given: leave one of the two out",
            ))
        }
        (Some(d), _) => track_file_with(d, how, settings, &mut Timer::new())?,
        (None, Some(f)) => {
            let file = args.detector_config.as_deref();
            let config = super::detect::detector_settings(file, project, how.quiet)?;
            super::run::found_tracks(f, config, how, settings)?
        }
        (None, None) => {
            return Err(crate::files::bad_usage(
                "give a detections file or --footage",
            ))
        }
    })
}

/// The footage given (`--footage`), as the files whose frames tell its length.
fn footage_files(args: &Args) -> Result<super::count::FootageFiles<'_>, Failure> {
    let y4m = match args.footage.as_deref() {
        Some(f) => crate::decode::is_y4m(f)?,
        None => false,
    };
    Ok(super::count::FootageFiles {
        y4m: args.footage.as_deref().filter(|_| y4m),
        video: args.footage.as_deref().filter(|_| !y4m),
        quiet: args.tracking.quiet,
    })
}

/// The picture's size of the footage given, unless `--picture` says it (and a frame rate other than
/// the plan's, warned of).
fn footage_picture(
    args: &Args,
    plan: &throughline_core::plan::Plan,
) -> Result<Option<(f64, f64)>, Failure> {
    match (&args.picture, &args.footage) {
        (None, Some(f)) => Ok(crate::frames::footage_facts(f)?.map(|(rate, (w, h))| {
            crate::frames::rate_against_plan(f, rate, plan.spec.frame_rate);
            (f64::from(w), f64::from(h))
        })),
        _ => Ok(None),
    }
}

/// Warns when the picture's size does not fit the tracks or the plan: boxes reaching well past
/// it (a size for other footage: which moments are at the picture's edge is then misjudged), or
/// lines and zones wholly outside it (they count nothing).
fn warn_misfit(
    tracks: &throughline_core::track::Tracks,
    plan: &throughline_core::plan::Plan,
    (w, h): (f64, f64),
    quiet: bool,
) {
    if quiet {
        return;
    }
    let (right, bottom) = review::extent_of(tracks);
    if right > 1.25 * w || bottom > 1.25 * h {
        crate::warnings::warn(format!(
            "boxes reach {right:.0} × {bottom:.0} pixels, well past the picture's {w} × \
             {h}: is the picture's size right? (it decides which tracks begin or end at the \
             picture's edge)"
        ));
    }
    let outside = plan.outside_picture(w, h);
    if !outside.is_empty() {
        crate::warnings::warn(format!(
            "{} wholly outside the picture ({w} × {h}): nothing is counted there",
            outside.join(", ") + if outside.len() == 1 { " lies" } else { " lie" }
        ));
    }
}

/// `--picture WxH`: two whole numbers of pixels from 1 to 100,000.
fn picture_size(text: &str) -> Result<(f64, f64), String> {
    let bad =
        || format!("'{text}' is not a picture size: write WIDTHxHEIGHT in pixels, e.g. 1280x720");
    let (w, h) = text.split_once(['x', 'X']).ok_or_else(bad)?;
    let w: u32 = w.trim().parse().map_err(|_| bad())?;
    let h: u32 = h.trim().parse().map_err(|_| bad())?;
    if !(1..=100_000).contains(&w) || !(1..=100_000).contains(&h) {
        return Err(bad());
    }
    Ok((f64::from(w), f64::from(h)))
}

/// The queue as a list in words, the moments a project file records a decision on marked as the
/// page marks them; then how many there are and how far to go down them.
fn say_queue(
    queue: &[throughline_core::review::Doubt],
    listed: &[throughline_core::review::Doubt],
    report: &throughline_core::report::Report,
    project: Option<&throughline_core::project::Project>,
) {
    if queue.is_empty() {
        println!("Nothing doubtful found. Counts are estimates all the same: check a sample against a manual count.");
        return;
    }
    // The decisions a project file records, marked as the page marks them (a newcomer's trial: a
    // moment accepted in the page was listed as if never looked at).
    let decided = |key: &str| {
        let mark = project?.review.iter().find(|m| m.key == key)?;
        Some(if mark.decision == "rejected" {
            " \u{2717} rejected"
        } else {
            " \u{2713} accepted"
        })
    };
    for (k, d) in listed.iter().enumerate() {
        let tracks: Vec<String> = d.tracks.iter().map(u32::to_string).collect();
        let which = if tracks.len() == 1 { "track" } else { "tracks" };
        println!(
            "{}. {} (frame {}, {which} {}){}:",
            k + 1,
            d.time,
            d.frame,
            tracks.join(", "),
            decided(&d.key).unwrap_or("")
        );
        for why in &d.why {
            println!("   {why}");
        }
    }
    let crossings = report.events.iter().filter(|e| !e.added).count();
    let more = match queue.len() - listed.len() {
        0 => String::new(),
        n => format!(" ({n} more not listed: leave out --first to list every one)"),
    };
    let looked = queue.iter().filter(|d| decided(&d.key).is_some()).count();
    let looked = match (project, looked) {
        (Some(_), n) => format!(" {n} of them decided in the project."),
        (None, _) => String::new(),
    };
    println!(
        "{} of {} moments to check listed, most doubtful first{more}; {crossings} count events in all.{looked} \
         Check the first ones against the footage, and a sample of the counts by hand.",
        listed.len(),
        queue.len()
    );
    if queue.len() > 100 {
        // A long queue is not a list to finish (a newcomer's trial: 409 moments for 376
        // crossings); how far down to go, from the queue's benchmark.
        println!(
            "A long queue is not a list to finish: mistakes gather at its top (in the benchmark's \
             crowd the first 100 of 2,676 moments pointed at half the wrong or missed crossings; \
             BENCHMARKS.md, the review queue). Go down it as far as time allows, then let a hand \
             count of a sample say how far the counts can be trusted."
        );
    }
}
