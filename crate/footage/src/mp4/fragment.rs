//! The frames of a fragmented MP4 file's movie fragments (ISO/IEC 14496-12 §8.8).

use throughline_core::limits::MAX_FOOTAGE_FRAMES;

use super::{children, claim, find, full_box, need, Sample, Track};
use crate::bytes::too_short;

/// The frames of one movie fragment that belong to the video track (ISO/IEC 14496-12 §8.8:
/// `traf` with its `tfhd` defaults, `tfdt` start time and `trun` runs of frames).
pub(super) fn fragment(
    moof: &[u8],
    moof_start: u64,
    track: &mut Track,
    file_size: u64,
) -> Result<(), String> {
    for (kind, traf) in children(moof, "moof")? {
        if &kind != b"traf" {
            continue;
        }
        let (_, flags, mut h) = full_box(need(traf, "traf", b"tfhd")?, "tfhd")?;
        let mut next = || h.u32().ok_or_else(|| too_short("tfhd"));
        if next()? != track.id {
            continue;
        }
        let base = if flags & 0x1 != 0 {
            (u64::from(next()?) << 32) | u64::from(next()?)
        } else {
            moof_start
        };
        if flags & 0x2 != 0 {
            next()?;
        }
        let (mut duration, mut size, mut sample_flags) = track.defaults;
        if flags & 0x8 != 0 {
            duration = next()?;
        }
        if flags & 0x10 != 0 {
            size = next()?;
        }
        if flags & 0x20 != 0 {
            sample_flags = next()?;
        }
        if let Some(tfdt) = find(traf, "traf", b"tfdt")? {
            let (version, _, mut t) = full_box(tfdt, "tfdt")?;
            let time = if version == 1 {
                t.u64()
            } else {
                t.u32().map(u64::from)
            };
            let time = time.ok_or_else(|| too_short("tfdt"))?;
            track.next_dts = i64::try_from(time).unwrap_or(i64::MAX);
        }
        let defaults = (duration, size, sample_flags);
        let mut data_at = base;
        for (kind, trun) in children(traf, "traf")? {
            if &kind == b"trun" {
                data_at = track_run(trun, base, data_at, defaults, track, file_size)?;
            }
        }
    }
    Ok(())
}

/// One run of frames (`trun`); where the next run's data starts when it does not say.
fn track_run(
    trun: &[u8],
    base: u64,
    data_at: u64,
    (duration, size, sample_flags): (u32, u32, u32),
    track: &mut Track,
    file_size: u64,
) -> Result<u64, String> {
    let (_, flags, mut b) = full_box(trun, "trun")?;
    let count = b.u32().ok_or_else(|| too_short("trun"))? as usize;
    let mut at = data_at;
    if flags & 0x1 != 0 {
        let offset = i64::from(b.u32().ok_or_else(|| too_short("trun"))? as i32);
        at = base
            .checked_add_signed(offset)
            .ok_or("a run of frames starts before the file (damaged?)")?;
    }
    let first_flags = if flags & 0x4 != 0 {
        Some(b.u32().ok_or_else(|| too_short("trun"))?)
    } else {
        None
    };
    let per_frame = 4 * (flags & 0xF00).count_ones() as usize;
    if per_frame > 0 && count > b.left() / per_frame {
        return Err(too_short("run of frames (trun)"));
    }
    if count > MAX_FOOTAGE_FRAMES - track.samples.len().min(MAX_FOOTAGE_FRAMES) {
        return Err(format!("more than {MAX_FOOTAGE_FRAMES} frames"));
    }
    // Frames of the default size, or at least a byte each, all of them in the file.
    let each = if flags & 0x200 != 0 { 1 } else { size };
    track.claimed = claim(track.claimed, count, each, file_size)?;
    let mut dts = track.next_dts;
    for j in 0..count {
        let mut field = |bit: u32, default: u32| {
            if flags & bit != 0 {
                b.u32().unwrap_or(default)
            } else {
                default
            }
        };
        let d = field(0x100, duration);
        let s = field(0x200, size);
        let f = field(
            0x400,
            if j == 0 {
                first_flags.unwrap_or(sample_flags)
            } else {
                sample_flags
            },
        );
        let shown = i64::from(field(0x800, 0) as i32);
        track.samples.push(Sample {
            offset: at,
            size: s,
            time: dts.saturating_add(shown),
            // sample_is_non_sync_sample (§8.8.3.1).
            key: f & 0x0001_0000 == 0,
        });
        at = at.saturating_add(u64::from(s));
        dts = dts.saturating_add(i64::from(d));
    }
    track.next_dts = dts;
    Ok(at)
}
