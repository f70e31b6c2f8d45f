//! The frames listed in a movie header's sample tables (ISO/IEC 14496-12 §8.6, §8.7): each
//! table's entry count is checked against the bytes that hold it before anything is allocated.

use throughline_core::limits::MAX_FOOTAGE_FRAMES;

use super::{find, frames_fit, full_box, need, Sample};
use crate::bytes::too_short;

/// The frames of a movie header's sample tables: sizes (`stsz`/`stz2`), chunks (`stco`/`co64`,
/// `stsc`), decode times (`stts`), shown-time offsets (`ctts`) and key frames (`stss`).
pub(super) fn sample_tables(stbl: &[u8], file_size: u64) -> Result<Vec<Sample>, String> {
    let sizes = sample_sizes(stbl, file_size)?;
    if sizes.is_empty() {
        return Ok(Vec::new());
    }
    let chunks = chunk_offsets(stbl)?;
    let runs = pairs(need(stbl, "stbl", b"stsc")?, "stsc", 12)?;
    let mut samples = Vec::with_capacity(sizes.len());
    let mut run = 0;
    'chunks: for (k, &start) in chunks.iter().enumerate() {
        let number = u32::try_from(k + 1).unwrap_or(u32::MAX);
        while run + 1 < runs.len() && runs[run + 1].0 <= number {
            run += 1;
        }
        let per_chunk = runs.get(run).map_or(0, |r| r.1);
        let mut offset = start;
        for _ in 0..per_chunk {
            let Some(&size) = sizes.get(samples.len()) else {
                break 'chunks;
            };
            samples.push(Sample {
                offset,
                size,
                time: 0,
                key: true,
            });
            offset = offset.saturating_add(u64::from(size));
        }
    }
    if samples.len() < sizes.len() {
        return Err(format!(
            "its sample tables disagree: {} frames, but chunks for {} (damaged?)",
            sizes.len(),
            samples.len()
        ));
    }
    decode_times(stbl, &mut samples)?;
    if let Some(stss) = find(stbl, "stbl", b"stss")? {
        let (_, _, mut b) = full_box(stss, "stss")?;
        let count = b.u32().ok_or_else(|| too_short("stss"))? as usize;
        if count > b.left() / 4 {
            return Err(too_short("key frame table (stss)"));
        }
        samples.iter_mut().for_each(|s| s.key = false);
        for _ in 0..count {
            let n = b.u32().unwrap_or(0) as usize;
            if let Some(s) = n.checked_sub(1).and_then(|i| samples.get_mut(i)) {
                s.key = true;
            }
        }
    }
    Ok(samples)
}

/// Decode times from `stts`, plus the offsets of `ctts`: the times the frames are shown.
fn decode_times(stbl: &[u8], samples: &mut [Sample]) -> Result<(), String> {
    let mut dts = 0i64;
    let mut i = 0;
    let mut last = 0u32;
    for (count, delta) in pairs(need(stbl, "stbl", b"stts")?, "stts", 8)? {
        for _ in 0..count {
            let Some(s) = samples.get_mut(i) else { break };
            s.time = dts;
            dts = dts.saturating_add(i64::from(delta));
            i += 1;
        }
        last = delta;
    }
    for s in samples.iter_mut().skip(i) {
        s.time = dts;
        dts = dts.saturating_add(i64::from(last));
    }
    if let Some(ctts) = find(stbl, "stbl", b"ctts")? {
        let mut i = 0;
        for (count, offset) in pairs(ctts, "ctts", 8)? {
            // Signed in version 1; version 0 files with negative offsets exist, so both are read
            // as signed (common practice among readers).
            let offset = i64::from(offset as i32);
            for _ in 0..count {
                let Some(s) = samples.get_mut(i) else { break };
                s.time = s.time.saturating_add(offset);
                i += 1;
            }
        }
    }
    Ok(())
}

/// The decode time after the last frame of the sample tables (where a first fragment starts).
pub(super) fn end_of_decoding(stbl: &[u8], samples: &[Sample]) -> Result<i64, String> {
    let stts = pairs(need(stbl, "stbl", b"stts")?, "stts", 8)?;
    let mut left = samples.len() as u64;
    let mut dts = 0i64;
    for (count, delta) in stts {
        let n = u64::from(count).min(left);
        dts = dts.saturating_add((n as i64).saturating_mul(i64::from(delta)));
        left -= n;
    }
    Ok(dts)
}

/// A table of pairs of 32-bit numbers after a full box's entry count (`stts`, `ctts`; `stsc`
/// with `width` 12 keeps its first two of three).
fn pairs(data: &[u8], what: &str, width: usize) -> Result<Vec<(u32, u32)>, String> {
    let (_, _, mut b) = full_box(data, what)?;
    let count = b.u32().ok_or_else(|| too_short(what))? as usize;
    if count > b.left() / width {
        return Err(too_short(&format!("{what} table")));
    }
    let mut out = Vec::with_capacity(count);
    for _ in 0..count {
        let row = b.take(width).unwrap_or_default();
        let word = |k: usize| u32::from_be_bytes([row[k], row[k + 1], row[k + 2], row[k + 3]]);
        out.push((word(0), word(4)));
    }
    Ok(out)
}

/// Each frame's size, from `stsz` or the compact `stz2`.
fn sample_sizes(stbl: &[u8], file_size: u64) -> Result<Vec<u32>, String> {
    let too_many = || format!("more than {MAX_FOOTAGE_FRAMES} frames");
    if let Some(stsz) = find(stbl, "stbl", b"stsz")? {
        let (_, _, mut b) = full_box(stsz, "stsz")?;
        let (Some(same), Some(count)) = (b.u32(), b.u32()) else {
            return Err(too_short("stsz"));
        };
        let count = count as usize;
        if count > MAX_FOOTAGE_FRAMES {
            return Err(too_many());
        }
        if same != 0 {
            frames_fit(count, same, file_size)?;
            return Ok(vec![same; count]);
        }
        if count > b.left() / 4 {
            return Err(too_short("frame size table (stsz)"));
        }
        return Ok((0..count).map(|_| b.u32().unwrap_or(0)).collect());
    }
    let stz2 = need(stbl, "stbl", b"stz2")?;
    let (_, _, mut b) = full_box(stz2, "stz2")?;
    let (Some(field), Some(count)) = (b.u24().map(|v| v & 0xFF), b.u32()) else {
        return Err(too_short("stz2"));
    };
    let count = count as usize;
    if count > MAX_FOOTAGE_FRAMES {
        return Err(too_many());
    }
    let bits = match field {
        4 | 8 | 16 => field as usize,
        _ => {
            return Err(format!(
                "its stz2 box has fields of {field} bits (4, 8 or 16 expected)"
            ))
        }
    };
    let bytes = b
        .take((count * bits).div_ceil(8))
        .ok_or_else(|| too_short("stz2"))?;
    Ok((0..count)
        .map(|i| match bits {
            4 => {
                let shift = if i % 2 == 0 { 4 } else { 0 };
                u32::from((bytes[i / 2] >> shift) & 0x0F)
            }
            8 => u32::from(bytes[i]),
            _ => u32::from(u16::from_be_bytes([bytes[2 * i], bytes[2 * i + 1]])),
        })
        .collect())
}

/// Where each chunk starts, from `stco` or `co64`.
fn chunk_offsets(stbl: &[u8]) -> Result<Vec<u64>, String> {
    let (data, wide) = match find(stbl, "stbl", b"stco")? {
        Some(d) => (d, false),
        None => (need(stbl, "stbl", b"co64")?, true),
    };
    let what = if wide { "co64" } else { "stco" };
    let (_, _, mut b) = full_box(data, what)?;
    let count = b.u32().ok_or_else(|| too_short(what))? as usize;
    let width = if wide { 8 } else { 4 };
    if count > b.left() / width {
        return Err(too_short(&format!("chunk table ({what})")));
    }
    Ok((0..count)
        .map(|_| {
            if wide {
                b.u64().unwrap_or(0)
            } else {
                u64::from(b.u32().unwrap_or(0))
            }
        })
        .collect())
}
