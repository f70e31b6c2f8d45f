//! Bridging missed detections with the footage (V-IOU, computed in the core): after tracking, the
//! YUV4MPEG2 file is read a second time and the core is given each frame's luma plane up to the
//! last frame a gap needs; it keeps only crops around the gaps.

use crate::files::{bad_input, name, Failure};
use crate::progress;
use std::path::Path;
use throughline_core::{pipeline, Tracks};
use throughline_footage::y4m;

/// The tracks with the gaps the footage bridges joined (the settings' `bridge_frames`; none when
/// it is 0). Standard input cannot be read twice: it is left unbridged, with a note.
pub fn bridge_with_footage(
    mut tracks: Tracks,
    footage: &Path,
    quiet: bool,
) -> Result<Tracks, Failure> {
    if tracks.config.bridge_frames == 0 {
        return Ok(tracks);
    }
    if footage == Path::new("-") {
        if !quiet {
            eprintln!(
                "note: bridging missed detections reads the footage a second time, so it needs a \
                 file: footage from standard input was not bridged (give --y4m FILE; \
                 \"bridge_frames\": 0 in the tracker settings turns bridging off)"
            );
        }
        pipeline::not_bridged(&mut tracks);
        return Ok(tracks);
    }
    let mut reader = crate::frames::open_y4m(footage)?;
    let header = *reader.header();
    let mut bridger = pipeline::bridger(&tracks, header.width, header.height);
    let last = bridger.last_frame_needed();
    let luma = header.width * header.height;
    let bar = progress::bar(
        quiet,
        u64::from(last),
        "bridging {bar:30} {pos}/{len} frames ({per_sec}, {eta} left)",
    );
    let mut frame = 0;
    while frame < last {
        match reader.next_frame().map_err(|e| bad_input(footage, e))? {
            y4m::Next::Frame(bytes) => {
                frame += 1;
                bridger.feed(frame, &bytes[..luma.min(bytes.len())]);
            }
            // Gaps after the end of the footage are not followed (the summary counts them).
            y4m::Next::End | y4m::Next::CutShort => break,
        }
        if frame % 64 == 0 {
            bar.set_position(u64::from(frame));
        }
    }
    bar.finish_and_clear();
    let (bridged, summary) = bridger.finish(&tracks);
    if !quiet {
        let missing = if summary.not_followed > 0 {
            format!(
                " ({} more not followed: footage too short or too many at once)",
                summary.not_followed
            )
        } else {
            String::new()
        };
        eprintln!(
            "{}: {} gaps between tracks followed in the footage{missing}; their followings met \
             in {}; tracks joined to the one before them: {} (bridged boxes are written as \
             predicted)",
            name(footage),
            summary.followed,
            summary.met,
            summary.joins.len(),
        );
    }
    Ok(bridged)
}

/// Tracks made without footage: gaps the settings ask to bridge are not bridged (bridging follows
/// objects in the pictures), the report says so (`bridge_frames` 0) and a note tells how.
pub fn without_footage(mut tracks: Tracks, quiet: bool) -> Tracks {
    let asked = pipeline::not_bridged(&mut tracks);
    if asked > 0 && !quiet {
        eprintln!("{}", no_footage_note(asked));
    }
    tracks
}

/// What is said when the settings ask to bridge gaps and no footage is given.
pub fn no_footage_note(asked: u32) -> String {
    format!(
        "note: the tracker settings ask to bridge gaps of up to {asked} frames, which follows \
         objects in the footage: give it with --y4m FILE; nothing was bridged"
    )
}
