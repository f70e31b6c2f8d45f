//! `throughline`: the command line. Glue only: arguments, files, progress and exit codes; all the
//! work is done by `throughline-core`.
//!
//! Exit codes: 0 success, 1 bad input (a file that cannot be read or understood), 2 bad usage.

use clap::{Parser, Subcommand};
use indicatif::{ProgressBar, ProgressStyle};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use throughline_core::track::files as tracks_io;
use throughline_core::{count, detect, detections, plan, report, track};
use throughline_eval::tracking_metrics as score;
use throughline_footage::y4m;
use throughline_sim as sim;

#[derive(Parser)]
#[command(
    name = "throughline",
    version,
    about = "Turn detections from video into tracks, on your own computer.",
    long_about = "Turn detections from video into tracks, on your own computer.\n\n\
                  Nothing is uploaded: every file stays where it is. Boxes are pixels, top-left x,y then \
                  width,height; frames are numbered from 1."
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Link per-frame detections into tracks.
    #[command(long_about = "Link per-frame detections into tracks.\n\n\
        DETECTIONS may be benchmark text (frame,id,x,y,w,h,score[,class]), CSV with a header naming \
        frame,x,y,w,h,score (class and e0,e1,… optional), or a JSON array of \
        {image_id, category_id, bbox:[x,y,w,h], score}; the format is recognised from the content.\n\n\
        OUT ending in .txt gets benchmark text (frame,id,x,y,w,h,score,-1,-1,-1); any other name gets \
        the JSON tracks document (docs/tracks-format.md). Without -o the JSON goes to standard output.")]
    Track {
        /// Detections file.
        detections: PathBuf,
        /// Where to write the tracks (.txt: benchmark text; otherwise JSON).
        #[arg(short, long, value_name = "OUT")]
        output: Option<PathBuf>,
        /// Tracking method [default: deepsort when the detections carry embeddings, else sort].
        #[arg(long, value_parser = ["iou", "sort", "bytetrack", "deepsort"])]
        method: Option<String>,
        /// Settings file (JSON object of tracker settings; see docs/tracker-settings.md).
        #[arg(long, value_name = "FILE")]
        config: Option<PathBuf>,
        /// Print no summary and no progress.
        #[arg(short, long)]
        quiet: bool,
        /// Print the time taken and the peak memory on standard error at the end.
        #[arg(long)]
        stats: bool,
    },
    /// Track detections, then count them against a plan (screenlines, zones, intervals).
    #[command(long_about = "Track detections, then count them against a plan.\n\n\
        PLAN is a JSON counting plan (docs/plan-format.md): frame rate, screenlines, zones, intervals, \
        calibration. The report (JSON) holds counts by line, direction, class and interval, zone \
        entries, exits and dwell, movements, speeds, and every event behind the counts. \
        Counts are estimates: check a sample against a manual count before relying on them.")]
    Run {
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
        /// Also write the tracks (.txt: benchmark text; otherwise JSON).
        #[arg(long, value_name = "FILE")]
        tracks: Option<PathBuf>,
        /// Tracking method [default: deepsort when the detections carry embeddings, else sort].
        #[arg(long, value_parser = ["iou", "sort", "bytetrack", "deepsort"])]
        method: Option<String>,
        /// Settings file (JSON object of tracker settings; see docs/tracker-settings.md).
        #[arg(long, value_name = "FILE")]
        config: Option<PathBuf>,
        /// Print no summary and no progress.
        #[arg(short, long)]
        quiet: bool,
    },
    /// Find moving objects in footage from a fixed camera, without any model.
    #[command(
        long_about = "Find moving objects in footage from a fixed camera, without any model.\n\n\
        Reads YUV4MPEG2 (4:2:0 or mono, 8 bits), as `ffmpeg -i INPUT -pix_fmt yuv420p -f yuv4mpegpipe -` \
        writes it, from a file or from standard input (-), and writes detections for `track` and `run`: \
        CSV (frame,x,y,w,h,score,class) when classes are guessed (with far_height/near_height set), \
        else the benchmark text format (frame,-1,x,y,w,h,score,-1,-1,-1). The background forms over the \
        first second (warm_up_frames); nothing is reported meanwhile. Settings: docs/detector-settings.md."
    )]
    Detect {
        /// Footage as YUV4MPEG2, or - for standard input.
        #[arg(long, value_name = "FILE")]
        y4m: PathBuf,
        /// Where to write the detections; without it they go to standard output.
        #[arg(short, long, value_name = "OUT")]
        output: Option<PathBuf>,
        /// Detector settings (JSON object; see docs/detector-settings.md).
        #[arg(long, value_name = "FILE")]
        config: Option<PathBuf>,
        /// Print no summary and no progress.
        #[arg(short, long)]
        quiet: bool,
        /// Print the time taken and the peak memory on standard error at the end.
        #[arg(long)]
        stats: bool,
    },
    /// Count existing tracks against a plan.
    Count {
        /// Tracks: a tracks JSON document, or benchmark text (then every box counts as observed).
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
    },
    /// Make a simulated scene with known truth: detections and ground-truth tracks.
    Simulate {
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
        /// Also render the frames, as YUV4MPEG2 (4:2:0, 25 fps) to this file (`-` for standard output).
        #[arg(long, value_name = "FILE.y4m")]
        render: Option<PathBuf>,
        /// Also count the true tracks with this plan: truth_report.json and truth_counts.csv.
        #[arg(long, value_name = "PLAN")]
        plan: Option<PathBuf>,
    },
    /// Compare counts with a manual count (or another report): APD, AAPD, WAPD, correction factor.
    #[command(
        name = "score-counts",
        long_about = "Compare automated counts with a reference count.\n\n\
        REPORT is a report from `run` or `count`. The reference (--truth) is a manual count CSV with \
        the header screenline,direction,class,interval_start,interval_end,count (class may be empty or \
        `all` for all classes together; direction uses the plan's labels), or another report. \
        Measures (NCHRP Report 797): APD = mean (A-M)/M, AAPD = mean |A-M|/M, WAPD = sum|A-M| / sum M, \
        correction factor = sum M / sum A, per screenline, direction and class over the intervals."
    )]
    ScoreCounts {
        /// Reference counts: a manual count CSV, or a report JSON.
        #[arg(long, value_name = "MANUAL")]
        truth: PathBuf,
        /// The automated report (JSON).
        report: PathBuf,
        /// Print one JSON object instead of a table.
        #[arg(long)]
        json: bool,
    },
    /// Search tracker settings that score best against ground truth; prints a settings file.
    Tune {
        /// Detections file.
        detections: PathBuf,
        /// Ground truth, benchmark text (frame,id,x,y,w,h,…).
        #[arg(long, value_name = "GT")]
        truth: PathBuf,
        /// What to maximise.
        #[arg(long, default_value = "hota", value_parser = ["hota", "idf1", "mota"])]
        metric: String,
        /// Only this method (default: every method the detections allow).
        #[arg(long, value_parser = ["iou", "sort", "bytetrack", "deepsort"])]
        method: Option<String>,
        /// Where to write the best settings (JSON, for --config); without it they go to standard output.
        #[arg(short, long, value_name = "FILE")]
        output: Option<PathBuf>,
    },
    /// Score tracks against ground truth (HOTA, IDF1, MOTA…).
    Score {
        /// Ground truth, benchmark text (frame,id,x,y,w,h,…).
        #[arg(long, value_name = "GT")]
        truth: PathBuf,
        /// Tracks: benchmark text or a tracks JSON document.
        tracks: PathBuf,
        /// Print one JSON object instead of a table.
        #[arg(long)]
        json: bool,
    },
}

/// An error for the user: what went wrong, in which file, and the exit code.
struct Failure {
    message: String,
    code: u8,
}

fn bad_input(path: &Path, e: impl std::fmt::Display) -> Failure {
    Failure {
        message: format!("{}: {e}", path.display()),
        code: 1,
    }
}

fn read_file(path: &Path) -> Result<Vec<u8>, Failure> {
    std::fs::read(path).map_err(|e| bad_input(path, format!("cannot read the file: {e}")))
}

fn write_file(path: &Path, text: &str) -> Result<(), Failure> {
    std::fs::write(path, text).map_err(|e| Failure {
        message: format!("{}: cannot write the file: {e}", path.display()),
        code: 1,
    })
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Track {
            detections,
            output,
            method,
            config,
            quiet,
            stats,
        } => timed(stats, |timer| {
            run_track(
                &detections,
                output.as_deref(),
                method.as_deref(),
                config.as_deref(),
                quiet,
                timer,
            )
        }),
        Command::Run {
            detections,
            y4m,
            detector_config,
            plan,
            output,
            csv,
            tracks,
            method,
            config,
            quiet,
        } => run_run(
            match (&detections, &y4m) {
                (_, Some(footage)) => Source::Footage(footage, detector_config.as_deref()),
                (Some(d), None) => Source::Detections(d),
                // clap requires one of the two.
                (None, None) => Source::Detections(Path::new("-")),
            },
            &plan,
            Outputs {
                report: output.as_deref(),
                csv: csv.as_deref(),
                tracks: tracks.as_deref(),
            },
            method.as_deref(),
            config.as_deref(),
            quiet,
        ),
        Command::Detect {
            y4m,
            output,
            config,
            quiet,
            stats,
        } => timed(stats, |timer| {
            run_detect(&y4m, output.as_deref(), config.as_deref(), quiet, timer)
        }),
        Command::Count {
            tracks,
            plan,
            output,
            csv,
            quiet,
        } => run_count(
            &tracks,
            &plan,
            Outputs {
                report: output.as_deref(),
                csv: csv.as_deref(),
                tracks: None,
            },
            quiet,
        ),
        Command::Simulate {
            out_dir,
            seed,
            frames,
            density,
            miss_rate,
            false_positives,
            embedding_dim,
            embedding_noise,
            width,
            height,
            no_occluder,
            render,
            plan,
        } => run_simulate(
            &out_dir,
            sim::SceneConfig {
                seed,
                frames,
                width,
                height,
                density,
                miss_rate,
                false_positives,
                embedding_dim,
                embedding_noise,
                occluder: !no_occluder,
                ..sim::SceneConfig::default()
            },
            render.as_deref(),
            plan.as_deref(),
        ),
        Command::ScoreCounts {
            truth,
            report,
            json,
        } => run_score_counts(&truth, &report, json),
        Command::Tune {
            detections,
            truth,
            metric,
            method,
            output,
        } => run_tune(
            &detections,
            &truth,
            &metric,
            method.as_deref(),
            output.as_deref(),
        ),
        Command::Score {
            truth,
            tracks,
            json,
        } => run_score(&truth, &tracks, json),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(f) => {
            eprintln!("error: {}", f.message);
            ExitCode::from(f.code)
        }
    }
}

fn run_track(
    path: &Path,
    output: Option<&Path>,
    method: Option<&str>,
    config_path: Option<&Path>,
    quiet: bool,
    timer: &mut Timer,
) -> Result<(), Failure> {
    let tracks = track_file(path, method, config_path, quiet, timer)?;
    let text = tracks_text(&tracks, output);
    match output {
        Some(p) => write_file(p, &text)?,
        None => println!("{text}"),
    }
    timer.lap("write");
    if !quiet {
        eprintln!(
            "{}: {} tracks with {}{}",
            path.display(),
            tracks.tracks.len(),
            tracks.config.method,
            output.map_or(String::new(), |p| format!(", written to {}", p.display()))
        );
    }
    Ok(())
}

/// Tracks as benchmark text for a `.txt` path, otherwise as the JSON document.
fn tracks_text(tracks: &track::Tracks, path: Option<&Path>) -> String {
    match path {
        Some(p) if p.extension().is_some_and(|e| e.eq_ignore_ascii_case("txt")) => {
            tracks_io::to_benchmark_text(tracks)
        }
        _ => tracks_io::to_json(tracks),
    }
}

/// A settings file's path and text, when one was given.
fn read_settings(path: Option<&Path>) -> Result<Option<(&Path, String)>, Failure> {
    match path {
        Some(p) => {
            let bytes = read_file(p)?;
            Ok(Some((p, String::from_utf8_lossy(&bytes).into_owned())))
        }
        None => Ok(None),
    }
}

/// Reads a detections file and tracks it, reporting warnings and progress on stderr.
fn track_file(
    path: &Path,
    method: Option<&str>,
    config_path: Option<&Path>,
    quiet: bool,
    timer: &mut Timer,
) -> Result<track::Tracks, Failure> {
    let flag_method = method.and_then(track::Method::parse);
    let settings = read_settings(config_path)?;
    let bytes = read_file(path)?;
    let report = detections::read_detections(&bytes).map_err(|e| bad_input(path, e))?;
    drop(bytes);
    timer.lap("read");
    if !quiet {
        for w in &report.warnings {
            match w.line {
                Some(l) => eprintln!("warning: {}: line {l}: {}", path.display(), w.message),
                None => eprintln!("warning: {}: {}", path.display(), w.message),
            }
        }
        if report.skipped_rows > report.warnings.len() {
            eprintln!(
                "warning: {} rows passed over in all ({} listed above)",
                report.skipped_rows,
                report.warnings.len()
            );
        }
    }
    let tracks = track_detections(
        &report.detections,
        path,
        flag_method,
        settings,
        quiet,
        timer,
    )?;
    if !quiet {
        let dets = &report.detections;
        eprintln!(
            "{}: {} detections ({}) over {} frames",
            path.display(),
            dets.rows.len(),
            report.format,
            dets.last_frame(),
        );
    }
    Ok(tracks)
}

/// Tracks detections (read from `path` or found in it), with a progress bar on stderr.
fn track_detections(
    dets: &detections::Detections,
    path: &Path,
    flag_method: Option<track::Method>,
    settings: Option<(&Path, String)>,
    quiet: bool,
    timer: &mut Timer,
) -> Result<track::Tracks, Failure> {
    let has_embeddings = dets.embedding_dim > 0;
    let config = track::resolve_config(
        flag_method,
        settings.as_ref().map(|s| s.1.as_str()),
        has_embeddings,
    )
    .map_err(|e| match &settings {
        Some((p, _)) => bad_input(p, e),
        None => bad_input(path, e),
    })?;
    let bar = if quiet {
        ProgressBar::hidden()
    } else {
        let bar = ProgressBar::new(u64::from(dets.last_frame()));
        bar.set_style(
            ProgressStyle::with_template(
                "tracking {bar:30} {pos}/{len} frames ({per_sec}, {eta} left)",
            )
            .unwrap_or_else(|_| ProgressStyle::default_bar()),
        );
        bar
    };
    let tracks = track::run_tracker(dets, &config, &mut |done, _| {
        bar.set_position(u64::from(done))
    })
    .map_err(|e| bad_input(path, e))?;
    bar.finish_and_clear();
    timer.lap("track");
    Ok(tracks)
}

/// Where `run` and `count` write.
struct Outputs<'a> {
    report: Option<&'a Path>,
    csv: Option<&'a Path>,
    tracks: Option<&'a Path>,
}

fn run_detect(
    footage: &Path,
    output: Option<&Path>,
    config: Option<&Path>,
    quiet: bool,
    timer: &mut Timer,
) -> Result<(), Failure> {
    let dets = detect_footage(footage, config, quiet)?;
    timer.lap("detect");
    let text = detections::to_file_text(&dets);
    match output {
        Some(p) => write_file(p, &text)?,
        None => print!("{text}"),
    }
    timer.lap("write");
    if !quiet {
        eprintln!(
            "{}: {} detections over {} frames{}",
            name(footage),
            dets.rows.len(),
            dets.last_frame(),
            output.map_or(String::new(), |p| format!(", written to {}", p.display()))
        );
    }
    Ok(())
}

/// How to name an input in messages: `-` is standard input.
fn name(path: &Path) -> String {
    if path == Path::new("-") {
        "standard input".into()
    } else {
        path.display().to_string()
    }
}

/// Reads one YUV4MPEG2 header or FRAME line into `line`: at most 4 KiB, so a stream without
/// newlines is never read whole. Returns the bytes read (0 at the end).
fn short_line(input: &mut impl std::io::BufRead, line: &mut Vec<u8>) -> std::io::Result<usize> {
    use std::io::{BufRead, Read};
    line.clear();
    input.by_ref().take(4096).read_until(b'\n', line)
}

/// Reads YUV4MPEG2 frames from a file or standard input (`-`) and runs the motion detector on each.
fn detect_footage(
    footage: &Path,
    config: Option<&Path>,
    quiet: bool,
) -> Result<detections::Detections, Failure> {
    use std::io::{BufReader, Read};
    let config = match read_settings(config)? {
        Some((p, text)) => detect::DetectorConfig::from_json(&text).map_err(|e| bad_input(p, e))?,
        None => detect::DetectorConfig::default(),
    };
    let input: Box<dyn Read> = if footage == Path::new("-") {
        Box::new(std::io::stdin().lock())
    } else {
        Box::new(
            std::fs::File::open(footage)
                .map_err(|e| bad_input(footage, format!("cannot read the file: {e}")))?,
        )
    };
    let mut input = BufReader::with_capacity(1 << 20, input);
    let mut line = Vec::new();
    short_line(&mut input, &mut line).map_err(|e| bad_input(footage, e))?;
    let text = String::from_utf8_lossy(&line);
    let header = y4m::parse_header(text.trim_end()).map_err(|e| bad_input(footage, e))?;
    let mut detector = detect::Detector::new(config, header.width, header.height);
    let mut frame = vec![0u8; header.frame_bytes()];
    let bar = if quiet {
        ProgressBar::hidden()
    } else {
        let bar = ProgressBar::new_spinner();
        bar.set_style(
            ProgressStyle::with_template("detecting {spinner} frame {pos} ({per_sec})")
                .unwrap_or_else(|_| ProgressStyle::default_spinner()),
        );
        bar
    };
    let mut per_frame = Vec::new();
    loop {
        if short_line(&mut input, &mut line).map_err(|e| bad_input(footage, e))? == 0 {
            break;
        }
        let k = per_frame.len() + 1;
        if !line.starts_with(b"FRAME") {
            return Err(bad_input(
                footage,
                format!(
                    "frame {k} does not start with FRAME: the stream is damaged or not YUV4MPEG2"
                ),
            ));
        }
        if input.read_exact(&mut frame).is_err() {
            // A stream cut short (ffmpeg stopped, a copy interrupted): keep what was found in the
            // whole frames rather than lose it.
            eprintln!(
                "warning: {}: the stream ends inside frame {k}; frames 1 to {} are used",
                name(footage),
                k - 1
            );
            break;
        }
        let colour = header.layout == y4m::Layout::Yuv420;
        // `frame` holds exactly `header.frame_bytes()`, which is what `planar` needs.
        let Some(pic) = detect::Picture::planar(header.width, header.height, &frame, colour) else {
            return Err(bad_input(
                footage,
                "a frame is shorter than its header says",
            ));
        };
        per_frame.push(
            detector
                .detect_found(&pic)
                .map_err(|e| bad_input(footage, e))?,
        );
        bar.inc(1);
    }
    bar.finish_and_clear();
    if per_frame.is_empty() {
        return Err(bad_input(footage, "the stream holds no frames"));
    }
    Ok(detector.detections_from(per_frame))
}

fn read_plan(path: &Path) -> Result<plan::Plan, Failure> {
    let bytes = read_file(path)?;
    let text =
        std::str::from_utf8(&bytes).map_err(|_| bad_input(path, "the plan is not UTF-8 text"))?;
    plan::Plan::from_json(text).map_err(|e| bad_input(path, e))
}

/// What `run` starts from: a detections file, or footage for the built-in detector.
enum Source<'a> {
    Detections(&'a Path),
    Footage(&'a Path, Option<&'a Path>),
}

fn run_run(
    source: Source,
    plan_path: &Path,
    out: Outputs,
    method: Option<&str>,
    config: Option<&Path>,
    quiet: bool,
) -> Result<(), Failure> {
    // The plan is checked first: a mistake in it should not cost a whole tracking run.
    let plan = read_plan(plan_path)?;
    let mut timer = Timer::new();
    let tracks = match source {
        Source::Detections(path) => track_file(path, method, config, quiet, &mut timer)?,
        Source::Footage(footage, detector_config) => {
            let settings = read_settings(config)?;
            if !quiet && !plan.screenlines.is_empty() && plan.spec.rules.hysteresis < 0.35 {
                eprintln!(
                    "note: boxes found in footage jump where people join or split near a line; \
                     rules.hysteresis 0.35 in the plan (zone_hysteresis 0.15) counts them more \
                     steadily (docs/detector-settings.md)"
                );
            }
            let dets = detect_footage(footage, detector_config, quiet)?;
            let flag_method = method.and_then(track::Method::parse);
            track_detections(&dets, footage, flag_method, settings, quiet, &mut timer)?
        }
    };
    if let Some(p) = out.tracks {
        write_file(p, &tracks_text(&tracks, Some(p)))?;
    }
    let report = count::count(&tracks, &plan, Some(&tracks.config));
    write_report(&report, &out, quiet)
}

fn run_count(
    tracks_path: &Path,
    plan_path: &Path,
    out: Outputs,
    quiet: bool,
) -> Result<(), Failure> {
    let plan = read_plan(plan_path)?;
    let bytes = read_file(tracks_path)?;
    let is_json = looks_like_json_object(&bytes);
    let (tracks, tracker) = if is_json {
        let t = tracks_io::from_json(&bytes).map_err(|e| bad_input(tracks_path, e))?;
        let config = t.config.clone();
        (t, Some(config))
    } else {
        let boxes =
            tracks_io::read_benchmark_boxes(&bytes).map_err(|e| bad_input(tracks_path, e))?;
        (tracks_io::boxes_to_tracks(&boxes), None)
    };
    let report = count::count(&tracks, &plan, tracker.as_ref());
    write_report(&report, &out, quiet)
}

fn write_report(report: &report::Report, out: &Outputs, quiet: bool) -> Result<(), Failure> {
    let json = report.to_json();
    if let Some(p) = out.csv {
        write_file(p, &report::counts_csv(report))?;
    }
    match out.report {
        Some(p) => write_file(p, &json)?,
        None => println!("{json}"),
    }
    if !quiet {
        if report.screenlines.is_empty() && report.zones.is_empty() {
            eprintln!("note: the plan has no screenlines and no zones, so nothing was counted");
        }
        for l in &report.screenlines {
            eprintln!(
                "{}: {} {}, {} {} ({} inferred while unseen)",
                l.name, l.forward, l.forward_label, l.backward, l.backward_label, l.inferred
            );
        }
        for z in &report.zones {
            eprintln!("{}: {} entries, {} exits", z.name, z.entries, z.exits);
        }
        eprintln!("{}", report::CAUTION);
    }
    Ok(())
}

/// Runs a command with a [`Timer`]; with `--stats`, prints its laps and peak memory at the end,
/// whether the command succeeded or not.
fn timed(stats: bool, run: impl FnOnce(&mut Timer) -> Result<(), Failure>) -> Result<(), Failure> {
    let mut timer = Timer::new();
    let result = run(&mut timer);
    if stats {
        timer.print();
    }
    result
}

/// Time per stage of a run, and the peak resident memory (Linux `VmHWM`), for `--stats`.
struct Timer {
    started: std::time::Instant,
    last: std::time::Instant,
    laps: Vec<(&'static str, f64)>,
}

impl Timer {
    fn new() -> Self {
        let now = std::time::Instant::now();
        Self {
            started: now,
            last: now,
            laps: Vec::new(),
        }
    }

    fn lap(&mut self, name: &'static str) {
        let now = std::time::Instant::now();
        self.laps.push((name, (now - self.last).as_secs_f64()));
        self.last = now;
    }

    fn print(&self) {
        let peak = std::fs::read_to_string("/proc/self/status")
            .ok()
            .and_then(|s| {
                s.lines()
                    .find(|l| l.starts_with("VmHWM:"))
                    .and_then(|l| l.split_whitespace().nth(1))
                    .and_then(|kib| kib.parse::<f64>().ok())
            });
        let laps: Vec<String> = self
            .laps
            .iter()
            .map(|(n, t)| format!("{n} {t:.3} s"))
            .collect();
        let total = self.started.elapsed().as_secs_f64();
        let memory = peak.map_or(String::new(), |kib| {
            format!(", peak memory {:.1} MiB", kib / 1024.0)
        });
        eprintln!("stats: {total:.3} s ({}){memory}", laps.join(", "));
    }
}

fn run_simulate(
    dir: &Path,
    cfg: sim::SceneConfig,
    render: Option<&Path>,
    plan_path: Option<&Path>,
) -> Result<(), Failure> {
    let usage = |m: &str| Failure {
        message: m.to_string(),
        code: 2,
    };
    if !(0.0..=1.0).contains(&cfg.miss_rate) {
        return Err(usage("--miss-rate must be between 0 and 1"));
    }
    if !(cfg.density >= 0.0 && cfg.false_positives >= 0.0 && cfg.embedding_noise >= 0.0) {
        return Err(usage(
            "--density, --false-positives and --embedding-noise must not be negative",
        ));
    }
    if !(cfg.width >= 32.0 && cfg.height >= 32.0 && cfg.width <= 8192.0 && cfg.height <= 8192.0) {
        return Err(usage(
            "--width and --height must be between 32 and 8192 pixels",
        ));
    }
    let plan = plan_path.map(read_plan).transpose()?;
    std::fs::create_dir_all(dir).map_err(|e| Failure {
        message: format!("{}: cannot create the folder: {e}", dir.display()),
        code: 1,
    })?;
    let scene = match render {
        None => sim::generate(&cfg),
        Some(path) => render_scene(&cfg, path)?,
    };
    let truth: String = scene
        .truth
        .iter()
        .map(|r| {
            format!(
                "{},{},{:.2},{:.2},{:.2},{:.2},1,{},1\n",
                r.frame,
                r.id,
                r.bbox.x,
                r.bbox.y,
                r.bbox.w,
                r.bbox.h,
                scene.truth_classes[(r.id - 1) as usize] + 1
            )
        })
        .collect();
    write_file(&dir.join("truth.txt"), &truth)?;
    write_file(
        &dir.join("detections.txt"),
        &detections::to_benchmark_text(&scene.detections),
    )?;
    write_file(
        &dir.join("detections.csv"),
        &detections::to_csv(&scene.detections),
    )?;
    if let Some(plan) = &plan {
        let report = count::count(&sim::truth_tracks(&scene), plan, None);
        let json = report.to_json();
        write_file(&dir.join("truth_report.json"), &json)?;
        write_file(&dir.join("truth_counts.csv"), &report::counts_csv(&report))?;
    }
    eprintln!(
        "simulated {} frames: {} true boxes of {} agents, {} detections, written to {}",
        cfg.frames,
        scene.truth.len(),
        scene.truth_classes.len(),
        scene.detections.rows.len(),
        dir.display()
    );
    Ok(())
}

/// Simulates while rendering every frame into a YUV4MPEG2 stream.
fn render_scene(cfg: &sim::SceneConfig, path: &Path) -> Result<sim::Scene, Failure> {
    use std::io::Write;
    let cannot = |e: std::io::Error| Failure {
        message: format!("{}: cannot write the frames: {e}", path.display()),
        code: 1,
    };
    let sink: Box<dyn Write> = if path == Path::new("-") {
        Box::new(std::io::stdout().lock())
    } else {
        Box::new(std::fs::File::create(path).map_err(cannot)?)
    };
    let mut out = std::io::BufWriter::new(sink);
    let mut renderer = throughline_sim::render::Renderer::new(cfg);
    let header = throughline_sim::render::y4m_header(renderer.width(), renderer.height());
    out.write_all(header.as_bytes()).map_err(cannot)?;
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
    if let Some(e) = failure {
        return Err(cannot(e));
    }
    out.flush().map_err(cannot)?;
    Ok(scene)
}

/// Whether a file's first non-blank byte opens a JSON object (a tracks document or a report).
fn looks_like_json_object(bytes: &[u8]) -> bool {
    bytes.iter().find(|b| !b.is_ascii_whitespace()) == Some(&b'{')
}

fn read_tracks(path: &Path) -> Result<Vec<tracks_io::IdBox>, Failure> {
    let bytes = read_file(path)?;
    if bytes.iter().all(u8::is_ascii_whitespace) {
        // An empty tracker output is a valid (if poor) result: everything was missed.
        return Ok(Vec::new());
    }
    let is_json = looks_like_json_object(&bytes);
    if is_json {
        let tracks = tracks_io::from_json(&bytes).map_err(|e| bad_input(path, e))?;
        Ok(tracks_io::tracks_to_boxes(&tracks))
    } else {
        tracks_io::read_benchmark_boxes(&bytes).map_err(|e| bad_input(path, e))
    }
}

fn read_json_value(path: &Path) -> Result<serde_json::Value, Failure> {
    let bytes = read_file(path)?;
    serde_json::from_slice(&bytes).map_err(|e| bad_input(path, format!("not valid JSON: {e}")))
}

fn run_score_counts(truth: &Path, report: &Path, json: bool) -> Result<(), Failure> {
    use throughline_eval::count_accuracy as accuracy;
    let automated =
        accuracy::report_rows(&read_json_value(report)?).map_err(|e| bad_input(report, e))?;
    let bytes = read_file(truth)?;
    let is_json = looks_like_json_object(&bytes);
    let reference = if is_json {
        accuracy::report_rows(&read_json_value(truth)?).map_err(|e| bad_input(truth, e))?
    } else {
        accuracy::read_counts_csv(&bytes).map_err(|e| bad_input(truth, e))?
    };
    let acc = accuracy::compare(&automated, &reference);
    if acc.groups.is_empty() {
        return Err(bad_input(
            truth,
            "no reference row names a screenline and direction of the report: check the names and the \
             direction labels (they must be the plan's labels, as in the counts CSV)",
        ));
    }
    if json {
        println!("{}", serde_json::to_string_pretty(&acc).unwrap_or_default());
        return Ok(());
    }
    let pct = |v: Option<f64>| v.map_or("   n/a".to_string(), |x| format!("{:+6.1}%", 100.0 * x));
    let factor = |v: Option<f64>| v.map_or("n/a".to_string(), |x| format!("{x:.3}"));
    println!("screenline / direction / class: intervals, automated vs reference, APD, AAPD, WAPD, correction factor");
    for g in &acc.groups {
        let m = &g.measures;
        println!(
            "{} / {} / {}: {} intervals, {} vs {}, APD {}, AAPD {}, WAPD {}, factor {}",
            g.screenline,
            g.direction,
            g.class,
            m.intervals,
            m.automated_total,
            m.reference_total,
            pct(m.apd),
            pct(m.aapd),
            pct(m.wapd),
            factor(m.correction_factor)
        );
    }
    let m = &acc.overall;
    println!(
        "all: {} intervals, {} vs {}, APD {}, AAPD {}, WAPD {}, factor {}",
        m.intervals,
        m.automated_total,
        m.reference_total,
        pct(m.apd),
        pct(m.aapd),
        pct(m.wapd),
        factor(m.correction_factor)
    );
    if acc.unmatched_reference_rows > 0 {
        eprintln!(
            "warning: {} reference rows name a screenline or direction the report does not have",
            acc.unmatched_reference_rows
        );
    }
    Ok(())
}

fn run_tune(
    detections: &Path,
    truth: &Path,
    metric: &str,
    method: Option<&str>,
    output: Option<&Path>,
) -> Result<(), Failure> {
    use throughline_eval::tune;
    let metric = tune::Metric::parse(metric).unwrap_or(tune::Metric::Hota);
    let dets = detections::read_detections(&read_file(detections)?)
        .map_err(|e| bad_input(detections, e))?;
    let gt =
        tracks_io::read_benchmark_boxes(&read_file(truth)?).map_err(|e| bad_input(truth, e))?;
    let methods: Vec<track::Method> = match method.and_then(track::Method::parse) {
        Some(m) => vec![m],
        None => track::Method::ALL
            .into_iter()
            .filter(|m| !m.def().needs_embeddings || dets.detections.embedding_dim > 0)
            .collect(),
    };
    let candidates = tune::candidates(&methods);
    let bar = ProgressBar::new(candidates.len() as u64);
    bar.set_style(
        ProgressStyle::with_template("tuning {bar:30} {pos}/{len} settings ({eta} left)")
            .unwrap_or_else(|_| ProgressStyle::default_bar()),
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
    match output {
        Some(p) => write_file(p, &format!("{text}\n"))?,
        None => println!("{text}"),
    }
    Ok(())
}

fn run_score(truth: &Path, tracks: &Path, json: bool) -> Result<(), Failure> {
    let gt =
        tracks_io::read_benchmark_boxes(&read_file(truth)?).map_err(|e| bad_input(truth, e))?;
    let tr = read_tracks(tracks)?;
    let s = score::score(&gt, &tr).map_err(|e| Failure {
        message: e.message,
        code: 1,
    })?;
    if json {
        println!("{}", serde_json::to_string_pretty(&s).unwrap_or_default());
    } else {
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
    }
    Ok(())
}
