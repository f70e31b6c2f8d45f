//! The gaps worth bridging: a track that ends, and a track that starts a few frames later near
//! where the first would be by then, of the same class and a like size. Only these are followed in
//! the footage, so the cost is the number of broken tracks, not the number of frames.

use super::follow::{Region, Start, MAX_RADIUS, TEMPLATE_SIDE};
use crate::geometry::BBox;
use crate::limits::{MAX_BRIDGE_PAIRS_PER_END, MAX_BRIDGE_REGION_SIDE};
use crate::track::Track;

/// One gap to try: track `a` (index in the tracks) last seen at frame `from`, track `b` first seen
/// at frame `to`, with `to - from - 1` frames between them; boxes in picture pixels (top-left
/// x/y + width/height), velocities in picture pixels per frame forward in time.
#[derive(Debug, Clone)]
pub(super) struct Gap {
    pub a: usize,
    pub b: usize,
    pub from: u32,
    pub to: u32,
    pub a_box: BBox,
    pub b_box: BBox,
    pub a_velocity: (f64, f64),
    pub b_velocity: (f64, f64),
    pub region: Region,
}

impl Gap {
    /// Where following forward starts: `a`'s last box in the region's working pixels.
    pub fn forward_start(&self) -> Start {
        self.start(&self.a_box, self.a_velocity, 1.0)
    }

    /// Where following backward starts: `b`'s first box, moving back in time.
    pub fn backward_start(&self) -> Start {
        self.start(&self.b_box, self.b_velocity, -1.0)
    }

    fn start(&self, b: &BBox, v: (f64, f64), sign: f64) -> Start {
        let r = &self.region;
        let s = r.scale as f64;
        Start {
            x: ((b.x - r.x0 as f64) / s).round() as i32,
            y: ((b.y - r.y0 as f64) / s).round() as i32,
            w: (b.w / s).round().max(1.0) as usize,
            h: (b.h / s).round().max(1.0) as usize,
            vx: sign * v.0 / s,
            vy: sign * v.1 / s,
        }
    }
}

/// The ends of observed tracks this many frames apart or less give the velocity at an end.
const VELOCITY_SPAN: u32 = 10;

/// Every gap of 1 to `max_gap` unseen frames between the end of one track and the start of
/// another, plausible by class, size and place; for each ending track at most
/// [`MAX_BRIDGE_PAIRS_PER_END`], the shortest gaps first, then the nearest. In order of the frame
/// the gap begins, then of the tracks' order.
pub(super) fn find(tracks: &[Track], max_gap: u32, width: usize, height: usize) -> Vec<Gap> {
    if max_gap == 0 {
        return Vec::new();
    }
    let mut by_start: Vec<(u32, usize)> = (0..tracks.len())
        .filter(|&k| !tracks[k].boxes.is_empty())
        .map(|k| (tracks[k].first_frame(), k))
        .collect();
    by_start.sort_unstable();
    let mut gaps = Vec::new();
    for (a, ta) in tracks.iter().enumerate() {
        let Some(last) = ta.boxes.last() else {
            continue;
        };
        let from = last.frame;
        let lo = by_start.partition_point(|&(f, _)| f < from.saturating_add(2));
        let mut near: Vec<(u32, f64, Gap)> = by_start[lo..]
            .iter()
            .take_while(|&&(f, _)| f - from - 1 <= max_gap)
            .filter_map(|&(to, b)| {
                let gap = plausible(ta, &tracks[b], (from, to), (width, height))?;
                let distance = gap.a_box.centre().distance(&gap.b_box.centre());
                Some((to, distance, Gap { a, b, ..gap }))
            })
            .collect();
        near.sort_by(|x, y| x.0.cmp(&y.0).then(x.1.total_cmp(&y.1)));
        gaps.extend(
            near.into_iter()
                .take(MAX_BRIDGE_PAIRS_PER_END)
                .map(|(_, _, g)| g),
        );
    }
    gaps.sort_by_key(|g| (g.from, g.a));
    gaps
}

/// The gap between `a`'s end and `b`'s start when `b` could be `a` again: the same class (or one
/// unknown), heights within a factor of two, and `b`'s first box within reach of where `a` would be
/// at its velocity (half a box, and a tenth of a box more for each frame of the gap).
fn plausible(a: &Track, b: &Track, (from, to): (u32, u32), size: (usize, usize)) -> Option<Gap> {
    if let (Some(ca), Some(cb)) = (&a.class, &b.class) {
        if ca != cb {
            return None;
        }
    }
    let (a_box, b_box) = (a.boxes.last()?.bbox, b.boxes.first()?.bbox);
    let (lo, hi) = (a_box.h.min(b_box.h), a_box.h.max(b_box.h));
    if !(lo > 0.0 && hi <= 2.0 * lo && a_box.w > 0.0 && b_box.w > 0.0) {
        return None;
    }
    let a_velocity = end_velocity(a, true);
    let frames = f64::from(to - from);
    let side = a_box.w.max(a_box.h).max(b_box.w).max(b_box.h);
    let (ca, cb) = (a_box.centre(), b_box.centre());
    let (ex, ey) = (
        ca.x + a_velocity.0 * frames - cb.x,
        ca.y + a_velocity.1 * frames - cb.y,
    );
    if ex.hypot(ey) > side * (0.5 + 0.1 * frames) {
        return None;
    }
    let region = region(&a_box, &b_box, side, size)?;
    Some(Gap {
        a: 0,
        b: 0,
        from,
        to,
        a_box,
        b_box,
        a_velocity,
        b_velocity: end_velocity(b, false),
        region,
    })
}

/// The velocity at a track's end (`last`) or start, pixels per frame forward in time, from its
/// observed boxes at most [`VELOCITY_SPAN`] frames from that end; zero with one box.
fn end_velocity(t: &Track, last: bool) -> (f64, f64) {
    let seen: Vec<_> = t.boxes.iter().filter(|b| b.observed).collect();
    let (Some(&first), Some(&end)) = (seen.first(), seen.last()) else {
        return (0.0, 0.0);
    };
    let (p, q) = if last {
        let p = seen
            .iter()
            .find(|b| end.frame - b.frame <= VELOCITY_SPAN)
            .copied()
            .unwrap_or(end);
        (p, end)
    } else {
        let q = seen
            .iter()
            .rev()
            .find(|b| b.frame - first.frame <= VELOCITY_SPAN)
            .copied()
            .unwrap_or(first);
        (first, q)
    };
    if q.frame == p.frame {
        return (0.0, 0.0);
    }
    let dt = f64::from(q.frame - p.frame);
    let (cp, cq) = (p.bbox.centre(), q.bbox.centre());
    ((cq.x - cp.x) / dt, (cq.y - cp.y) / dt)
}

/// The part of the picture searched over a gap: both boxes and the way between them, with half a
/// box and the search window around, clipped to the picture. `None` when it would be larger than
/// [`MAX_BRIDGE_REGION_SIDE`] working pixels, too small to hold a box, or the box is larger than
/// the picture.
fn region(a: &BBox, b: &BBox, side: f64, (width, height): (usize, usize)) -> Option<Region> {
    // A box larger than the picture cannot be followed in it (and bounds the reduction factor,
    // hence the work of one crop, by the picture's size).
    if side.is_nan() || side > width.max(height) as f64 {
        return None;
    }
    let scale = (side / TEMPLATE_SIDE).ceil().max(1.0) as usize;
    let margin = 0.5 * side + f64::from(MAX_RADIUS + 1) * scale as f64;
    let x0 = (a.x.min(b.x) - margin).max(0.0).floor();
    let y0 = (a.y.min(b.y) - margin).max(0.0).floor();
    let x1 = (a.x + a.w).max(b.x + b.w) + margin;
    let y1 = (a.y + a.h).max(b.y + b.h) + margin;
    let x1 = x1.min(width as f64);
    let y1 = y1.min(height as f64);
    if !(x1 > x0 && y1 > y0) {
        return None;
    }
    let w = ((x1 - x0) as usize) / scale;
    let h = ((y1 - y0) as usize) / scale;
    if w < 4 || h < 4 || w > MAX_BRIDGE_REGION_SIDE || h > MAX_BRIDGE_REGION_SIDE {
        return None;
    }
    Some(Region {
        x0: x0 as usize,
        y0: y0 as usize,
        w,
        h,
        scale,
    })
}
