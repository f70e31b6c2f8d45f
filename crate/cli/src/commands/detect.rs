//! `throughline detect`: find moving objects in footage from a fixed camera, without any model.

use crate::cores::Cores;
use crate::files::{bad_input, name, read_settings, Failure};
use crate::frames::{each_frame, next_frame, open_y4m};
use crate::output::{check_paths, Outputs};
use crate::progress::{self, Timer};
use std::io::BufReader;
use std::path::{Path, PathBuf};
use throughline_core::detect::{Detector, DetectorConfig, Picture};
use throughline_core::{detections, Detections};
use throughline_footage::y4m;

/// The long help of the command (`--help`).
pub const LONG_ABOUT: &str = "Find moving objects in footage from a fixed camera, without any model.\n\n\
    Reads YUV4MPEG2 (4:2:0 or mono, 8 bits), as `ffmpeg -i INPUT -pix_fmt yuv420p -f yuv4mpegpipe -` \
    writes it, from a file or from standard input (-); any other video file (WebM, MP4, …) is decoded \
    by ffmpeg when it is installed, at its constant frame rate (frames a camera dropped are filled, \
    and said), so the boxes are the page's. It writes detections for `track` and `run`: \
    CSV (frame,x,y,w,h,score,class) when classes are guessed (with far_height/near_height set), \
    else the benchmark text format (frame,-1,x,y,w,h,score,-1,-1,-1). A file is read twice: first for \
    the background (pictures sampled over the whole clip), then to find objects from its first frame. \
    From standard input the background forms over the first two seconds (warm_up_frames), where nothing \
    is reported. Give a person's height at the picture's top and bottom edges (far_height, \
    near_height) if you can: without them, fragments and noise are not told from people, and no \
    class is guessed. Settings: docs/detector-settings.md.";

/// Find moving objects in footage from a fixed camera, without any model.
#[derive(clap::Args)]
pub struct Args {
    /// Footage: YUV4MPEG2 (or - for standard input), or any other video (WebM, MP4, …) decoded by
    /// ffmpeg.
    #[arg(long = "footage", visible_alias = "y4m", value_name = "FILE")]
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
    /// Threads to search each frame with (the boxes are the same for any number); by default one
    /// a core.
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u16).range(1..=64))]
    threads: Option<u16>,
}

pub fn run(args: Args) -> Result<(), Failure> {
    progress::timed(args.stats, |timer: &mut Timer| {
        let footage = &args.y4m;
        let output = args.output.as_deref();
        check_paths(&[Some(footage), args.config.as_deref()], &[output])?;
        let cores = Cores::new(args.threads.map(usize::from));
        let config = detector_settings(args.config.as_deref(), None, args.quiet)?;
        let dets = detect_footage(footage, config, &cores, args.quiet)?;
        timer.lap("detect");
        let text = detections::to_file_text(&dets);
        match output {
            Some(p) => {
                let mut files = Outputs::new();
                files.write(p, &text)?;
                files.commit()?;
            }
            None => print!("{text}"),
        }
        timer.lap("write");
        if !args.quiet {
            eprintln!(
                "{}: {} over {}{}",
                name(footage),
                crate::files::counted(dets.rows.len() as u64, "detection"),
                crate::files::counted(dets.length(), "frame"),
                output.map_or(String::new(), |p| format!(", written to {}", p.display()))
            );
            if dets.rows.is_empty() {
                eprintln!(
                    "note: nothing moving was found in its {} frames (a fixed camera's footage \
                     with nobody passing, or settings that find too little: \
                     docs/detector-settings.md)",
                    dets.length()
                );
            }
        }
        Ok(())
    })
}

/// The detector's settings: the file given (`--detector-config`), else those a project file records
/// (the heights typed in the page, said so), else the defaults.
pub fn detector_settings(
    file: Option<&Path>,
    project: Option<(&Path, &throughline_core::project::Project)>,
    quiet: bool,
) -> Result<DetectorConfig, Failure> {
    if let Some((p, text)) = read_settings(file)? {
        return DetectorConfig::from_json(&text).map_err(|e| bad_input(p, e));
    }
    let Some((path, project)) = project else {
        return Ok(DetectorConfig::default());
    };
    match project.detector_config().map_err(|e| bad_input(path, e))? {
        Some(config) => {
            if !quiet {
                eprintln!(
                    "note: finding objects with the detector settings {} records (the page's)",
                    crate::files::file_name(path)
                );
            }
            Ok(config)
        }
        None => Ok(DetectorConfig::default()),
    }
}

/// Reads YUV4MPEG2 frames from a file or standard input (`-`) and runs the detector on each, its
/// work shared over `cores` (the next frames read meanwhile in a thread of their own). A file is
/// read twice: once for the background (pictures sampled over the whole clip), then to detect;
/// standard input only once, the background forming over the opening frames.
pub fn detect_footage(
    footage: &Path,
    config: DetectorConfig,
    cores: &Cores,
    quiet: bool,
) -> Result<Detections, Failure> {
    let mut reader = open_y4m(footage)?;
    let header = *reader.header();
    if !quiet && config.perspective(header.height).is_none() {
        eprintln!(
            "note: no far_height and near_height (a person's height in pixels with feet at the \
             picture's top edge, and at its bottom edge): fragments and noise are not told from \
             people, pairs are not split, and no class is guessed; give them with --config \
             (docs/detector-settings.md says how to work them out from two people)"
        );
    }
    let mut detector = Detector::new(config, header.width, header.height);
    if detector.samples_whole_clip() {
        if footage == Path::new("-") {
            if !quiet {
                eprintln!(
                    "note: footage from standard input is read once, so the background forms over \
                     its first frames (warm_up_frames) and nothing is found in them; give a file to \
                     form it from the whole clip"
                );
            }
        } else {
            sample_clip(&mut detector, footage, quiet)?;
        }
    }
    let bar = progress::spinner(quiet, "detecting {spinner} frame {pos} ({per_sec})");
    let mut per_frame = Vec::new();
    each_frame(&mut reader, footage, |frame| {
        let pic = picture(&header, frame, footage)?;
        per_frame.push(
            detector
                .detect_found_spread(&pic, cores)
                .map_err(|e| bad_input(footage, e))?,
        );
        bar.inc(1);
        Ok(())
    })?;
    bar.finish_and_clear();
    if per_frame.is_empty() {
        return Err(bad_input(footage, "the stream holds no frames"));
    }
    // Said even when quiet, as every warning is (a batch keeps it with the clip).
    if let Some(note) = detector.camera_note() {
        crate::warnings::warn(format!("{}: {note}", crate::files::file_name(footage)));
    }
    Ok(detector.detections_from(per_frame))
}

/// The first reading: every frame offered to the detector's background sampler, only the ones it
/// keeps read (the others passed over by a seek).
fn sample_clip(detector: &mut Detector, footage: &Path, quiet: bool) -> Result<(), Failure> {
    if !crate::decode::is_y4m(footage)? {
        return sample_decoded(detector, footage, quiet);
    }
    let file = std::fs::File::open(footage)
        .map_err(|e| bad_input(footage, format!("cannot read the file: {e}")))?;
    // A small buffer: most frames are passed over, and a kept frame is read past it.
    let mut reader = y4m::Reader::new(BufReader::with_capacity(1 << 12, file))
        .map_err(|e| bad_input(footage, e))?;
    let header = *reader.header();
    let bar = progress::spinner(quiet, "background {spinner} frame {pos} ({per_sec})");
    loop {
        if detector.wants_sample() {
            let Some(frame) = next_frame(&mut reader, footage, false)? else {
                break;
            };
            let pic = picture(&header, frame, footage)?;
            detector.sample(&pic).map_err(|e| bad_input(footage, e))?;
        } else if reader.pass_frame().map_err(|e| bad_input(footage, e))? {
            detector.pass_sample();
        } else {
            break;
        }
        bar.inc(1);
    }
    bar.finish_and_clear();
    Ok(())
}

/// [`sample_clip`] for video decoded by ffmpeg: every frame is decoded (a pipe cannot be sought),
/// the wanted ones given.
fn sample_decoded(detector: &mut Detector, footage: &Path, quiet: bool) -> Result<(), Failure> {
    let mut reader = open_y4m(footage)?;
    let header = *reader.header();
    let bar = progress::spinner(quiet, "background {spinner} frame {pos} ({per_sec})");
    while let Some(frame) = next_frame(&mut reader, footage, false)? {
        if detector.wants_sample() {
            let pic = picture(&header, frame, footage)?;
            detector.sample(&pic).map_err(|e| bad_input(footage, e))?;
        } else {
            detector.pass_sample();
        }
        bar.inc(1);
    }
    bar.finish_and_clear();
    Ok(())
}

/// A frame's bytes as the detector's picture.
fn picture<'a>(
    header: &y4m::Header,
    frame: &'a [u8],
    footage: &Path,
) -> Result<Picture<'a>, Failure> {
    let colour = header.layout == y4m::Layout::Yuv420;
    // `frame` holds exactly `header.frame_bytes()`, which is what `planar` needs.
    Picture::planar(header.width, header.height, frame, colour)
        .ok_or_else(|| bad_input(footage, "a frame is shorter than its header says"))
}
