//! Reading YUV4MPEG2 footage for the detector, from a file or standard input, and frames in
//! flight: a thread of its own reads the next frames while the caller searches the one before, so
//! reading the file (about a tenth of the detector's time on one core) overlaps the search. The
//! frames reach the caller one at a time and in order, so what is found does not change.

use crate::decode::{decode, is_y4m};
use crate::files::{bad_input, Failure};
use std::io::{BufRead, BufReader, Read};
use std::path::Path;
use std::sync::mpsc;
use throughline_core::limits::MAX_FOOTAGE_FRAMES;
use throughline_footage::y4m;

/// A YUV4MPEG2 stream being read.
pub type Y4m = y4m::Reader<BufReader<Box<dyn Read + Send>>>;

/// Frames read ahead of the one being searched.
const AHEAD: usize = 3;

/// A YUV4MPEG2 reader over footage: a YUV4MPEG2 file, standard input for `-`, or any other video
/// decoded by ffmpeg ([`crate::decode`]).
pub fn open_y4m(footage: &Path) -> Result<Y4m, Failure> {
    let input: Box<dyn Read + Send> = if footage == Path::new("-") {
        Box::new(std::io::stdin())
    } else if is_y4m(footage)? {
        Box::new(
            std::fs::File::open(footage)
                .map_err(|e| bad_input(footage, format!("cannot read the file: {e}")))?,
        )
    } else {
        Box::new(decode(footage)?)
    };
    y4m::Reader::new(BufReader::with_capacity(1 << 20, input)).map_err(|e| bad_input(footage, e))
}

/// The next whole frame, or `None` at the end; a stream cut inside a frame ends at the frame
/// before (said once, when `warn`).
pub fn next_frame<'a, R: BufRead>(
    reader: &'a mut y4m::Reader<R>,
    footage: &Path,
    warn: bool,
) -> Result<Option<&'a [u8]>, Failure> {
    let k = reader.frames_read() + 1;
    match reader.next_frame().map_err(|e| bad_input(footage, e))? {
        y4m::Next::Frame(frame) => Ok(Some(frame)),
        y4m::Next::End => Ok(None),
        y4m::Next::CutShort => {
            // Keep what was found in the whole frames rather than lose it (with none, the
            // caller's "holds no frames" says it all).
            if warn && k > 1 {
                crate::warnings::warn(format!(
                    "{}: the stream ends inside frame {k}; frames 1 to {} are used",
                    crate::files::file_name(footage),
                    k - 1
                ));
            }
            Ok(None)
        }
    }
}

/// Calls `each` with every whole frame of `reader`, in order, the frames read ahead in a thread
/// of their own (a cut-short end said as [`next_frame`] says it). Stops at the first error, of
/// the reading or of `each`.
pub fn each_frame(
    reader: &mut Y4m,
    footage: &Path,
    mut each: impl FnMut(&[u8]) -> Result<(), Failure>,
) -> Result<(), Failure> {
    let (full, read) = mpsc::sync_channel::<Result<Vec<u8>, Failure>>(AHEAD);
    let (done, spare) = mpsc::channel::<Vec<u8>>();
    std::thread::scope(|s| {
        s.spawn(move || loop {
            let frame = match next_frame(reader, footage, true) {
                Ok(Some(frame)) => {
                    // A buffer the caller has finished with, or a new one while few are out.
                    let mut buf = spare.try_recv().unwrap_or_default();
                    buf.clear();
                    buf.extend_from_slice(frame);
                    Ok(buf)
                }
                Ok(None) => break,
                Err(e) => Err(e),
            };
            let failed = frame.is_err();
            // A send fails when the caller has stopped: then there is nothing more to read for.
            if full.send(frame).is_err() || failed {
                break;
            }
        });
        // Owned here, so an early return lets go of the channel and the reading thread ends.
        let read = read;
        for frame in read.iter() {
            let frame = frame?;
            each(&frame)?;
            done.send(frame).ok();
        }
        Ok(())
    })
}

/// How long the video of a WebM or MP4 file lasts, in frames at the plan's `frame_rate` (as the page
/// takes an open footage's duration): its frames are passed over as the page reads them, and the
/// duration is their span plus one frame's time. `None`, with a note unless `quiet`, for other
/// footage, a file damaged part way or one of a single frame (then `--frames` tells the length).
pub fn video_frames(footage: &Path, frame_rate: f64, quiet: bool) -> Result<Option<u32>, Failure> {
    let note = |what: String| {
        if !quiet {
            eprintln!("note: {}: {what}", footage.display());
        }
    };
    let unread = |why: &str| {
        note(format!(
            "its length is not taken ({why}); if the detections end before the footage does, \
             give --frames N"
        ));
        Ok(None)
    };
    let (n, first, last) = match video_times(footage, MAX_FOOTAGE_FRAMES as u64)? {
        Ok(times) => times,
        Err(why) => return unread(&why),
    };
    if n < 2 || last <= first {
        return unread("fewer than two frames with their times");
    }
    let span = (last - first) as f64 / 1e6;
    let seconds = span * n as f64 / (n - 1) as f64;
    let Some(frames) = throughline_core::project::footage_frames(seconds, frame_rate) else {
        return unread("longer than footage may be at the plan's frame rate");
    };
    // A rate other than the plan's is warned of where the footage meets the plan
    // ([`footage_against_plan`]), once.
    Ok(Some(frames))
}

/// Warns when the footage's frame rate (when known) is not the plan's.
pub fn rate_against_plan(footage: &Path, rate: Option<f64>, planned: f64) {
    let name = crate::files::file_name(footage);
    let said = rate.and_then(|r| throughline_core::handin::frame_rate_warning(&name, r, planned));
    if let Some(text) = said {
        crate::warnings::warn(text);
    }
}

/// Warnings when the footage (a file: standard input is read once, by the detector) and the plan
/// disagree: its frame rate and the plan's (times, intervals and speeds follow the plan's), lines
/// or zones wholly outside its picture (nothing is counted there).
pub fn footage_against_plan(
    footage: &Path,
    plan: &throughline_core::plan::Plan,
) -> Result<(), Failure> {
    let Some((rate, (w, h))) = footage_facts(footage)? else {
        return Ok(());
    };
    rate_against_plan(footage, rate, plan.spec.frame_rate);
    let name = crate::files::file_name(footage);
    let (w, h) = (f64::from(w), f64::from(h));
    let outside = plan.outside_picture(w, h);
    if !outside.is_empty() {
        crate::warnings::warn(format!(
            "{name}: {} wholly outside the picture ({w} × {h}): nothing is counted there; \
             was the plan drawn on footage of another size?",
            outside.join(", ") + if outside.len() == 1 { " lies" } else { " lie" }
        ));
    }
    Ok(())
}

/// The first `limit` video frames of a WebM or MP4 file, passed over as the page reads them: how
/// many, and the first and last one's time (µs). The inner error says why they could not be read
/// (`neither` WebM nor MP4, damaged, more than footage may have).
fn video_times(footage: &Path, limit: u64) -> Result<Result<(u64, i64, i64), String>, Failure> {
    use throughline_footage::demux::Demuxer;
    let file = std::fs::File::open(footage)
        .map_err(|e| bad_input(footage, format!("cannot read the file: {e}")))?;
    let size = file.metadata().map_or(0, |m| m.len());
    let mut video = match Demuxer::open(BufReader::with_capacity(1 << 16, file), size) {
        Ok((video, _)) => video,
        Err(why) if why.starts_with("neither") => return Ok(Err("not WebM or MP4".into())),
        Err(why) => return Ok(Err(why)),
    };
    let (mut n, mut first, mut last) = (0u64, i64::MAX, i64::MIN);
    loop {
        match video.next_chunk() {
            Ok(Some(c)) if n < MAX_FOOTAGE_FRAMES as u64 => {
                n += 1;
                (first, last) = (first.min(c.timestamp_us), last.max(c.timestamp_us));
                if n == limit {
                    return Ok(Ok((n, first, last)));
                }
            }
            Ok(Some(_)) => return Ok(Err("more frames than footage may have".into())),
            Ok(None) => return Ok(Ok((n, first, last))),
            Err(why) => return Ok(Err(why)),
        }
    }
}

/// A footage's frame rate (when known) and picture size (width, height).
pub type FootageFacts = (Option<f64>, (u32, u32));

/// Footage's frame rate (when it says) and picture size, to check a plan against: a YUV4MPEG2
/// file's header; a WebM's or MP4's first seconds and its coded size (no decoding); other video's
/// as ffmpeg decodes it. `None` for standard input (read once, by the detector) and for video
/// ffmpeg cannot decode (or without ffmpeg).
pub fn footage_facts(footage: &Path) -> Result<Option<FootageFacts>, Failure> {
    if footage == Path::new("-") {
        return Ok(None);
    }
    if is_y4m(footage)? {
        let header = *open_y4m(footage)?.header();
        let size = (header.width as u32, header.height as u32);
        return Ok(Some((header.frame_rate, size)));
    }
    use throughline_footage::demux::Demuxer;
    let file = std::fs::File::open(footage)
        .map_err(|e| bad_input(footage, format!("cannot read the file: {e}")))?;
    let bytes = file.metadata().map_or(0, |m| m.len());
    let Ok((mut video, track)) = Demuxer::open(BufReader::with_capacity(1 << 16, file), bytes)
    else {
        // Other video (AVI, …): the header of ffmpeg's decoding, when it decodes it.
        return Ok(open_y4m(footage).ok().map(|r| {
            let h = r.header();
            (h.frame_rate, (h.width as u32, h.height as u32))
        }));
    };
    let size = (track.coded_width, track.coded_height);
    Ok(Some((coded_rate(&mut video), size)))
}

/// The frame rate a WebM or MP4 is coded at, from the demuxer just opened on it: the median time
/// between its first 60 frames, as the page takes it (a frame missing among them does not lower it).
fn coded_rate<R: std::io::Read + std::io::Seek>(
    video: &mut throughline_footage::demux::Demuxer<R>,
) -> Option<f64> {
    let mut times = Vec::with_capacity(60);
    while times.len() < 60 {
        match video.next_chunk() {
            Ok(Some(c)) => times.push(c.timestamp_us),
            _ => break,
        }
    }
    // Coded order is not shown order where frames refer forward (H.264's B-frames).
    times.sort_unstable();
    let mut steps: Vec<i64> = times
        .windows(2)
        .map(|w| w[1] - w[0])
        .filter(|&d| d > 0)
        .collect();
    steps.sort_unstable();
    steps.get(steps.len() / 2).map(|&step| 1e6 / step as f64)
}

/// How many frames a YUV4MPEG2 file holds (passed over by seeking, not read), or other video
/// once decoded; `None` for standard input, which can be read only once.
pub fn y4m_frames(footage: &Path) -> Result<Option<u32>, Failure> {
    if footage == Path::new("-") {
        return Ok(None);
    }
    if !is_y4m(footage)? {
        // Other video is decoded to count, as it is read: at a constant frame rate, frames
        // missing from it filled (the container's count would leave them out).
        let mut reader = open_y4m(footage)?;
        let mut frames = 0u32;
        while next_frame(&mut reader, footage, false)?.is_some() {
            frames = frames.saturating_add(1);
        }
        return Ok(Some(frames));
    }
    let file = std::fs::File::open(footage)
        .map_err(|e| bad_input(footage, format!("cannot read the file: {e}")))?;
    let mut reader = y4m::Reader::new(BufReader::with_capacity(1 << 12, file))
        .map_err(|e| bad_input(footage, e))?;
    let mut frames = 0u32;
    while reader.pass_frame().map_err(|e| bad_input(footage, e))? {
        frames = frames.saturating_add(1);
    }
    Ok(Some(frames))
}
