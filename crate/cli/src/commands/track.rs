//! `throughline track`: link per-frame detections into tracks.

use crate::bridging::{bridge_with_footage, no_footage_note, without_footage};
use crate::files::{bad_input, read_file, read_settings, write_tracks, Failure, Settings};
use crate::output::{check_paths, Outputs};
use crate::progress::{self, Timer};
use crate::streaming;
use std::path::{Path, PathBuf};
use throughline_core::{detections, pipeline, Detections, Method, TrackerConfig, Tracks};

/// The long help of the command (`--help`).
pub const LONG_ABOUT: &str = "Link per-frame detections into tracks.\n\n\
    DETECTIONS may be benchmark text (frame,id,x,y,w,h,score[,class]), CSV with a header naming \
    frame,x,y,w,h,score (class and e0,e1,… optional), or a JSON array of \
    {image_id, category_id, bbox:[x,y,w,h], score}; the format is recognised from the content.\n\n\
    OUT ending in .txt gets benchmark text (frame,id,x,y,w,h,score,-1,-1,-1); any other name gets \
    the JSON tracks document (docs/tracks-format.md). Without -o the JSON goes to standard output.";

/// Link per-frame detections into tracks.
#[derive(clap::Args)]
pub struct Args {
    /// Detections file.
    detections: PathBuf,
    /// The footage the detections were found in (YUV4MPEG2, or other video decoded by ffmpeg):
    /// gaps where detections were missed are bridged by following objects in it (V-IOU;
    /// `bridge_frames` in the settings).
    #[arg(long, value_name = "FILE")]
    y4m: Option<PathBuf>,
    /// Where to write the tracks (.txt: benchmark text; otherwise JSON).
    #[arg(short, long, value_name = "OUT")]
    output: Option<PathBuf>,
    #[command(flatten)]
    tracking: TrackingArgs,
    /// Print the time taken and the peak memory on standard error at the end.
    #[arg(long)]
    stats: bool,
}

/// How to track: the options `track` and `run` share.
#[derive(clap::Args, Clone)]
pub struct TrackingArgs {
    /// Tracking method [default: deepsort when the detections carry embeddings, else sort].
    #[arg(long, value_parser = super::method_parser())]
    pub method: Option<Method>,
    /// Settings file (JSON object of tracker settings; see docs/tracker-settings.md).
    #[arg(long, value_name = "FILE")]
    pub config: Option<PathBuf>,
    /// Print no summary and no progress.
    #[arg(short, long)]
    pub quiet: bool,
}

pub fn run(args: Args) -> Result<(), Failure> {
    progress::timed(args.stats, |timer| {
        let path = &args.detections;
        let output = args.output.as_deref();
        let inputs = [
            Some(path.as_path()),
            args.tracking.config.as_deref(),
            args.y4m.as_deref(),
        ];
        check_paths(&inputs, &[output])?;
        if let Some(p) = output.filter(|p| is_text_output(p) && args.y4m.is_none()) {
            let how = streaming::How {
                method: args.tracking.method,
                config: args.tracking.config.as_deref(),
                quiet: args.tracking.quiet,
            };
            if let Some(done) = streaming::track_streamed(path, how, p)? {
                timer.lap("read, track and write");
                report_streamed(path, p, &args.tracking, &done);
                return Ok(());
            }
        }
        let tracks = track_file(path, &args.tracking, timer)?;
        let tracks = match &args.y4m {
            Some(footage) => {
                let bridged = bridge_with_footage(tracks, footage, args.tracking.quiet)?;
                timer.lap("bridge");
                bridged
            }
            None => without_footage(tracks, args.tracking.quiet),
        };
        match output {
            Some(p) => {
                let mut files = Outputs::new();
                files.write_with(p, |w| write_tracks(&tracks, output, w))?;
                files.commit()?;
            }
            None => {
                use std::io::Write;
                let mut out = std::io::BufWriter::new(std::io::stdout().lock());
                write_tracks(&tracks, None, &mut out)
                    .and_then(|()| writeln!(out))
                    .and_then(|()| out.flush())
                    .map_err(|e| Failure {
                        message: format!("cannot write the tracks to standard output: {e}"),
                        code: 1,
                    })?;
            }
        }
        timer.lap("write");
        if !args.tracking.quiet {
            eprintln!(
                "{}: {} with {}{}",
                path.display(),
                track_count(tracks.tracks.len()),
                tracks.config.method,
                output.map_or(String::new(), |p| format!(", written to {}", p.display()))
            );
        }
        Ok(())
    })
}

/// "1 track", "30 tracks".
fn track_count(n: usize) -> String {
    format!("{n} track{}", if n == 1 { "" } else { "s" })
}

/// Whether tracks written to `p` are benchmark text (else the JSON tracks document).
fn is_text_output(p: &Path) -> bool {
    p.extension().is_some_and(|e| e.eq_ignore_ascii_case("txt"))
}

/// What a piecewise run prints: what a whole run prints, in the same order.
fn report_streamed(path: &Path, out: &Path, how: &TrackingArgs, done: &streaming::Streamed) {
    if how.quiet {
        return;
    }
    print_warning_list(path, &done.read.warnings);
    print_crowded(path, &done.end.crowded_frames);
    eprintln!(
        "{}: {} ({}) over {}",
        path.display(),
        crate::files::counted(done.read.rows as u64, "detection"),
        done.format,
        crate::files::counted(done.read.last_frame, "frame"),
    );
    if done.config.bridge_frames > 0 {
        eprintln!("{}", no_footage_note(done.config.bridge_frames));
    }
    if done.end.tracks == 0 && done.read.rows > 0 {
        let scores = (done.read.rows, done.read.highest_score);
        eprintln!("{}", nothing_kept_note(path, &done.config, scores));
    }
    eprintln!(
        "{}: {} with {}, written to {}",
        path.display(),
        track_count(done.end.tracks as usize),
        done.config.method,
        out.display()
    );
}

/// The tracking options and settings (where they were read, their JSON text) for `run` and
/// `review` given corrections: the command line's; but when it names neither a method nor a
/// settings file, those a project file records (what the page tracked with), so that the
/// project's corrections meet the tracks they were made on (a project tracked before `deepsort`
/// kept low-score boxes, with the settings it was tracked with). A project saved before paths
/// were averaged for counting gets a note saying how to count as it did.
pub fn with_project<'a>(
    how: &'a TrackingArgs,
    project: Option<(&'a Path, &throughline_core::project::Project)>,
) -> Result<(TrackingArgs, Settings<'a>), Failure> {
    if let Some((path, p)) = project.filter(|(_, p)| !how.quiet && p.saved_before_averaged_paths())
    {
        use throughline_core::plan::{
            DEFAULT_HYSTERESIS, DEFAULT_SMOOTH_SECONDS, HYSTERESIS_BEFORE_AVERAGED_PATHS as OLD,
        };
        eprintln!(
            "note: {} was saved by {}, which counted paths as the tracker gave them with a \
             crossing margin of {OLD}; by default this version averages them over \
             {DEFAULT_SMOOTH_SECONDS} s first, with a margin of {DEFAULT_HYSTERESIS} \
             (docs/counting-rules.md), so counts, and \
             the crossings its corrections name, may differ. To count as it did, give the plan \
             \"rules\": {{\"smooth_seconds\": 0, \"hysteresis\": {OLD}}}",
            path.display(),
            p.generator
        );
    }
    let chosen_here = how.method.is_some() || how.config.is_some();
    if let Some((path, p)) =
        project.filter(|(_, p)| !how.quiet && chosen_here && p.tracked_before_low_score_boxes())
    {
        eprintln!(
            "note: {} was tracked by {}, whose `deepsort` used no box scoring under 0.3 and let any \
             box it used start a track; with --method or --config given here, this version's \
             defaults apply where those are silent, so some of its corrections may not meet their \
             tracks. To track as it did, put {} in the settings file",
            path.display(),
            p.generator,
            throughline_core::project::SETTINGS_BEFORE_LOW_SCORE_BOXES
        );
    }
    let recorded = project.filter(|(_, p)| {
        how.method.is_none()
            && how.config.is_none()
            && (p.tracking.method.is_some()
                || p.tracking.settings.is_some()
                || p.tracked_before_low_score_boxes())
    });
    let Some((path, p)) = recorded else {
        return Ok((how.clone(), read_settings(how.config.as_deref())?));
    };
    let settings = p.tracking_settings().map(|v| (path, v));
    if !how.quiet {
        let method = p
            .tracking
            .method
            .map_or("its default".to_string(), |m| m.to_string());
        let with = match (p.tracked_before_low_score_boxes(), settings.is_some()) {
            (true, _) => format!(
                ", with the settings {} tracked with (`deepsort` then used no box scoring under \
                 0.3, and any box it used could start a track: {})",
                p.generator,
                throughline_core::project::SETTINGS_BEFORE_LOW_SCORE_BOXES
            ),
            (false, true) => ", with its settings".to_string(),
            (false, false) => String::new(),
        };
        eprintln!(
            "note: tracking as the project {} says: {method}{with} (give --method or --config to \
             choose otherwise)",
            path.display(),
        );
    }
    let chosen = TrackingArgs {
        method: p.tracking.method,
        ..how.clone()
    };
    Ok((chosen, settings))
}

/// Reads a detections file and tracks it with the settings of `how` (its settings file),
/// reporting warnings and progress on stderr.
pub fn track_file(path: &Path, how: &TrackingArgs, timer: &mut Timer) -> Result<Tracks, Failure> {
    let settings = read_settings(how.config.as_deref())?;
    track_file_with(path, how, settings, timer)
}

/// [`track_file`] with the settings given: (where they were read, their JSON text).
pub fn track_file_with(
    path: &Path,
    how: &TrackingArgs,
    settings: Settings,
    timer: &mut Timer,
) -> Result<Tracks, Failure> {
    let bytes = read_file(path)?;
    let report = crate::reading::read_detections(&bytes).map_err(|e| bad_input(path, e))?;
    drop(bytes);
    timer.lap("read");
    if !how.quiet {
        print_warnings(path, &report);
    }
    let tracks = track_detections(&report.detections, path, how, settings, timer)?;
    if !how.quiet {
        let dets = &report.detections;
        eprintln!(
            "{}: {} ({}) over {}",
            path.display(),
            crate::files::counted(dets.rows.len() as u64, "detection"),
            report.format,
            crate::files::counted(dets.last_frame(), "frame"),
        );
    }
    Ok(tracks)
}

fn print_warnings(path: &Path, report: &detections::ReadReport) {
    print_warning_list(path, &report.warnings);
    for why in report.detections.notes() {
        crate::warnings::warn(format!("{}: {why}", crate::files::file_name(path)));
    }
}

/// The reader's warnings (the last says how many rows were passed over in all, when not all are
/// listed).
fn print_warning_list(path: &Path, warnings: &[detections::Warning]) {
    for w in warnings {
        match w.line {
            Some(l) => crate::warnings::warn(format!(
                "{}: line {l}: {}",
                crate::files::file_name(path),
                w.message
            )),
            None => {
                crate::warnings::warn(format!("{}: {}", crate::files::file_name(path), w.message))
            }
        }
    }
}

/// Tracks detections (read from `path` or found in it), with a progress bar on stderr. A settings
/// problem is reported against the settings file when there is one.
pub fn track_detections(
    dets: &Detections,
    path: &Path,
    how: &TrackingArgs,
    settings: Settings,
    timer: &mut Timer,
) -> Result<Tracks, Failure> {
    let config =
        pipeline::tracker_config(dets, how.method, settings.as_ref().map(|s| s.1.as_str()))
            .map_err(|e| match &settings {
                Some((p, _)) => bad_input(p, e),
                None => bad_input(path, e),
            })?;
    let bar = progress::bar(
        how.quiet,
        u64::from(dets.last_frame()),
        "tracking {bar:30} {pos}/{len} frames ({per_sec}, {eta} left)",
    );
    let tracks = pipeline::track(dets, &config, &mut |done, _| {
        bar.set_position(u64::from(done))
    })
    .map_err(|e| bad_input(path, e))?;
    bar.finish_and_clear();
    timer.lap("track");
    if !how.quiet {
        print_crowded(path, &tracks.crowded_frames);
        if tracks.tracks.is_empty() && !dets.rows.is_empty() {
            let highest = dets.rows.iter().map(|r| r.score).fold(f64::MIN, f64::max);
            eprintln!(
                "{}",
                nothing_kept_note(path, &config, (dets.rows.len(), highest))
            );
        }
    }
    Ok(tracks)
}

/// Why detections gave no track, and which settings to lower (a short or low-scoring file); when
/// every one of the `rows` detections scores under `min_score` (the highest `top`), that first,
/// with the likeliest cause: a score written with a decimal comma reads as 0.
fn nothing_kept_note(path: &Path, config: &TrackerConfig, (rows, top): (usize, f64)) -> String {
    if top < config.min_score {
        // Only a score of 0 can be a decimal comma's (`0,87` read as 0, then 87).
        let comma = match top == 0.0 {
            true => {
                " If the scores are written with a decimal comma (`0,87` for `0.87`) they \
                 read as 0 and the decimals as the next column: write decimals with a full \
                 stop."
            }
            false => "",
        };
        return format!(
            "note: {}: no track was kept: every one of its {} detections scores under {} \
             (`min_score`), the highest {top}.{comma} If the scores are truly this low, lower \
             `min_score` in a settings file given with --config (docs/tracker-settings.md).",
            path.display(),
            rows,
            config.min_score
        );
    }
    let confirm = if config.confirm_score > config.min_score {
        format!(
            " and one of its detections scored at least {} (`confirm_score`)",
            config.confirm_score
        )
    } else {
        String::new()
    };
    format!(
        "note: {}: no track was kept. With these settings a track is kept once it has been seen \
         in {} frames in a row (`min_hits`){confirm}; {}. For a short file or low scores, lower \
         them in a settings file given with --config, such as one holding {{\"min_hits\": 1}} \
         (docs/tracker-settings.md).",
        path.display(),
        config.min_hits,
        score_rule(config)
    )
}

/// Which scores are used and which start tracks, naming the settings that decide.
fn score_rule(config: &TrackerConfig) -> String {
    let used = format!(
        "detections scoring under {} are not used (`min_score`)",
        config.min_score
    );
    let (mut start, mut name) = (config.start_score, "`start_score`");
    if config.method == Method::Bytetrack && config.new_track_score > start {
        (start, name) = (config.new_track_score, "`new_track_score`");
    }
    match start > config.min_score {
        true => format!("{used}, and only those scoring at least {start} start a track ({name})"),
        false => used,
    }
}

/// The warning for frames whose crowd was matched cheapest pair first.
fn print_crowded(path: &Path, crowded_frames: &[u32]) {
    if crowded_frames.is_empty() {
        return;
    }
    let first: Vec<String> = crowded_frames.iter().take(5).map(u32::to_string).collect();
    crate::warnings::warn(format!(
        "{}: {} frames (frame {}{}) held so many overlapping boxes that they were \
         matched cheapest pair first rather than optimally; check the detections there",
        crate::files::file_name(path),
        crowded_frames.len(),
        first.join(", "),
        if crowded_frames.len() > 5 {
            ", …"
        } else {
            ""
        }
    ));
}
