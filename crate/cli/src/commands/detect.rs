//! `throughline detect`: find moving objects in footage from a fixed camera, without any model.

use crate::files::{bad_input, name, read_settings, Failure};
use crate::output::{check_paths, Outputs};
use crate::progress::{self, Timer};
use std::io::{BufReader, Read};
use std::path::{Path, PathBuf};
use throughline_core::detect::{Detector, DetectorConfig, Picture};
use throughline_core::{detections, Detections};
use throughline_footage::y4m;

/// The long help of the command (`--help`).
pub const LONG_ABOUT: &str = "Find moving objects in footage from a fixed camera, without any model.\n\n\
    Reads YUV4MPEG2 (4:2:0 or mono, 8 bits), as `ffmpeg -i INPUT -pix_fmt yuv420p -f yuv4mpegpipe -` \
    writes it, from a file or from standard input (-), and writes detections for `track` and `run`: \
    CSV (frame,x,y,w,h,score,class) when classes are guessed (with far_height/near_height set), \
    else the benchmark text format (frame,-1,x,y,w,h,score,-1,-1,-1). The background forms over the \
    first second (warm_up_frames); nothing is reported meanwhile. Settings: docs/detector-settings.md.";

/// Find moving objects in footage from a fixed camera, without any model.
#[derive(clap::Args)]
pub struct Args {
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
}

pub fn run(args: Args) -> Result<(), Failure> {
    progress::timed(args.stats, |timer: &mut Timer| {
        let footage = &args.y4m;
        let output = args.output.as_deref();
        check_paths(&[Some(footage), args.config.as_deref()], &[output])?;
        let dets = detect_footage(footage, args.config.as_deref(), args.quiet)?;
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
                "{}: {} detections over {} frames{}",
                name(footage),
                dets.rows.len(),
                dets.last_frame(),
                output.map_or(String::new(), |p| format!(", written to {}", p.display()))
            );
        }
        Ok(())
    })
}

/// Reads YUV4MPEG2 frames from a file or standard input (`-`) and runs the detector on each.
pub fn detect_footage(
    footage: &Path,
    config: Option<&Path>,
    quiet: bool,
) -> Result<Detections, Failure> {
    let config = match read_settings(config)? {
        Some((p, text)) => DetectorConfig::from_json(&text).map_err(|e| bad_input(p, e))?,
        None => DetectorConfig::default(),
    };
    let input: Box<dyn Read> = if footage == Path::new("-") {
        Box::new(std::io::stdin().lock())
    } else {
        Box::new(
            std::fs::File::open(footage)
                .map_err(|e| bad_input(footage, format!("cannot read the file: {e}")))?,
        )
    };
    let mut reader = y4m::Reader::new(BufReader::with_capacity(1 << 20, input))
        .map_err(|e| bad_input(footage, e))?;
    let header = *reader.header();
    let mut detector = Detector::new(config, header.width, header.height);
    let bar = progress::spinner(quiet, "detecting {spinner} frame {pos} ({per_sec})");
    let mut per_frame = Vec::new();
    loop {
        let frame = match reader.next_frame().map_err(|e| bad_input(footage, e))? {
            y4m::Next::Frame(frame) => frame,
            y4m::Next::End => break,
            y4m::Next::CutShort => {
                // Keep what was found in the whole frames rather than lose it.
                let k = reader.frames_read() + 1;
                eprintln!(
                    "warning: {}: the stream ends inside frame {k}; frames 1 to {} are used",
                    name(footage),
                    k - 1
                );
                break;
            }
        };
        let colour = header.layout == y4m::Layout::Yuv420;
        // `frame` holds exactly `header.frame_bytes()`, which is what `planar` needs.
        let Some(pic) = Picture::planar(header.width, header.height, frame, colour) else {
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
