//! The people, cyclists and carts of the scene: where they enter and leave, and how they walk,
//! ride, turn, stop and step around the plinth, one frame at a time.

use crate::config::{Occluder, SceneConfig};
use crate::rng::Rng;
use throughline_core::geometry::BBox;

/// A colour from a small palette of clothing and paint, chosen by the agent's id.
pub(crate) fn colour_of(id: i64) -> [f64; 3] {
    const PALETTE: [[f64; 3]; 10] = [
        [180.0, 40.0, 40.0],
        [40.0, 70.0, 150.0],
        [60.0, 120.0, 60.0],
        [200.0, 170.0, 60.0],
        [90.0, 90.0, 95.0],
        [230.0, 230.0, 225.0],
        [30.0, 30.0, 35.0],
        [150.0, 90.0, 160.0],
        [210.0, 110.0, 40.0],
        [70.0, 150.0, 170.0],
    ];
    let h = (id as u64).wrapping_mul(0x9E37_79B9_7F4A_7C15) >> 60;
    PALETTE[(h % 10) as usize]
}

/// The colour an agent is drawn in: its palette colour, or with the pale-clothes hard case, for a
/// third of the people and riders (chosen by id, so no random number is drawn), a grey of the
/// paving stones' own range and tint (`render`: 150–185, a little warm).
pub(crate) fn clothes_of(id: i64, class: u16, pale_clothes: bool) -> [f64; 3] {
    let h = (id as u64).wrapping_mul(0xD6E8_FEB8_6659_FD93);
    if pale_clothes && class < 2 && (h >> 40).is_multiple_of(3) {
        let v = 150.0 + ((h >> 20) % 36) as f64;
        return [v * 1.02, v, v * 0.94];
    }
    colour_of(id)
}

#[derive(Debug, Clone)]
pub(crate) struct Agent {
    pub(crate) id: i64,
    /// Dense ground-truth id, given when the agent first comes into view.
    pub(crate) truth_id: Option<i64>,
    pub(crate) class: u16,
    /// Ground point (bottom-centre of the box), pixels.
    pub(crate) x: f64,
    pub(crate) y: f64,
    pub(crate) heading: f64,
    pub(crate) speed: f64,
    pub(crate) target: (f64, f64),
    pub(crate) stop_frames: u32,
    pub(crate) appearance: Vec<f64>,
}

impl Agent {
    pub(crate) fn bbox(&self, cfg: &SceneConfig) -> BBox {
        // Perspective: height grows linearly from the top of the picture to the bottom.
        let depth = 0.35 + 0.65 * (self.y / cfg.height).clamp(0.0, 1.2);
        let (h, aspect) = match self.class {
            0 => (0.26, 0.38),
            1 => (0.28, 0.62),
            _ => (0.22, 1.5),
        };
        let h = h * cfg.height * depth;
        let w = h * aspect;
        BBox::new(self.x - w / 2.0, self.y - h, w, h)
    }
}

fn edge_point(rng: &mut Rng, cfg: &SceneConfig, edge: usize) -> (f64, f64) {
    let (w, h) = (cfg.width, cfg.height);
    match edge {
        0 => (rng.range(0.1, 0.9) * w, h * 0.18),
        1 => (w + 10.0, rng.range(0.25, 0.95) * h),
        2 => (rng.range(0.1, 0.9) * w, h + 40.0),
        _ => (-10.0, rng.range(0.25, 0.95) * h),
    }
}

pub(crate) fn spawn(
    rng: &mut Rng,
    cfg: &SceneConfig,
    next_id: &mut i64,
    agents: &mut Vec<Agent>,
    dim: usize,
) {
    let class = match rng.uniform() {
        u if u < 0.8 => 0,
        u if u < 0.96 => 1,
        _ => 2,
    };
    let from = rng.below(4);
    let to = (from + 1 + rng.below(3)) % 4;
    let start = edge_point(rng, cfg, from);
    let target = edge_point(rng, cfg, to);
    let base_speed = match class {
        0 => rng.range(0.9, 1.6),
        1 => rng.range(2.5, 4.0),
        _ => rng.range(1.5, 2.2),
    } * cfg.height
        / 360.0;
    let mut make = |x: f64, y: f64, rng: &mut Rng| {
        let appearance: Vec<f64> = (0..dim).map(|_| rng.normal()).collect();
        let a = Agent {
            id: *next_id,
            truth_id: None,
            class,
            x,
            y,
            heading: (target.1 - y).atan2(target.0 - x),
            speed: base_speed,
            target,
            stop_frames: 0,
            appearance,
        };
        *next_id += 1;
        a
    };
    let first = make(start.0, start.1, rng);
    // With the pairs hard case, pairs are more common and closer; the draws stay the same in number.
    let hard = cfg.hard_cases.pairs;
    let pair = class == 0 && rng.chance(if hard { 0.6 } else { 0.25 });
    let heading = first.heading;
    agents.push(first);
    if pair {
        // A companion walking side by side, offset across the direction of walking.
        let off = cfg.height * if hard { 0.035 } else { 0.05 };
        let (px, py) = (-heading.sin() * off, heading.cos() * off);
        let mut companion = make(start.0 + px, start.1 + py, rng);
        companion.target = (target.0 + px, target.1 + py);
        agents.push(companion);
    } else if hard && class == 0 && rng.chance(1.0 / 3.0) {
        // Someone faster a few steps behind on nearly the same way, who will overtake.
        let (back, side) = (cfg.height * 0.12, cfg.height * 0.025);
        let (dx, dy) = (heading.cos(), heading.sin());
        let (px, py) = (-dy * side, dx * side);
        let mut overtaker = make(start.0 - dx * back + px, start.1 - dy * back + py, rng);
        overtaker.target = (target.0 + px, target.1 + py);
        overtaker.speed = base_speed * 1.4;
        agents.push(overtaker);
    }
}

/// One frame of an agent's walk or ride. People stop now and then: for 0.4–2 s, or 3–10 s with
/// `long_pauses` (the same draws either way, so the default scene is unchanged).
pub(crate) fn step_agent(
    a: &mut Agent,
    rng: &mut Rng,
    occluder: Option<Occluder>,
    long_pauses: bool,
) {
    if a.stop_frames > 0 {
        a.stop_frames -= 1;
        return;
    }
    if a.class == 0 && rng.chance(0.002) {
        let (shortest, spread) = if long_pauses { (75, 175) } else { (10, 40) };
        a.stop_frames = shortest + rng.below(spread) as u32;
    }
    let want = (a.target.1 - a.y).atan2(a.target.0 - a.x);
    let mut turn = want - a.heading;
    while turn > std::f64::consts::PI {
        turn -= 2.0 * std::f64::consts::PI;
    }
    while turn < -std::f64::consts::PI {
        turn += 2.0 * std::f64::consts::PI;
    }
    let distance = (a.target.0 - a.x).hypot(a.target.1 - a.y);
    if distance < 25.0 * a.speed {
        // Close to the exit: head straight for it, or the slow turning would circle around it.
        a.heading = want;
    } else {
        a.heading += 0.05 * turn + 0.02 * rng.normal();
    }
    a.speed *= 1.0 + 0.01 * rng.normal();
    // Perspective also slows apparent motion far away.
    let depth = 0.35 + 0.65 * (a.y / 360.0_f64.max(a.target.1.abs())).clamp(0.0, 1.0);
    let (nx, ny) = (
        a.x + a.heading.cos() * a.speed * depth,
        a.y + a.heading.sin() * a.speed * depth,
    );
    // Nobody walks through the plinth: on reaching its footprint, step sideways around it.
    if let Some(o) = occluder {
        let b = o.bbox;
        let base = b.y + b.h;
        let inside =
            nx > b.x - 4.0 && nx < b.x + b.w + 4.0 && ny > base - b.h * 0.25 && ny < base + 2.0;
        if inside {
            let left = (nx - b.x).abs() < (nx - b.x - b.w).abs();
            a.x += if left { -a.speed } else { a.speed };
            return;
        }
    }
    a.x = nx;
    a.y = ny;
}
