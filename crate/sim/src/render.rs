//! Pictures of a simulated scene: a simple but believable frame of the footbridge plaza for every
//! simulated frame, as YUV 4:2:0 (the YUV4MPEG2 layout ffmpeg reads and writes), so that the motion
//! detector and the demo have pixels whose truth is known.
//!
//! The picture: the river and the bridge railing at the top, stone paving in perspective, a plinth
//! that hides people behind it, figures shaded from one side with soft shadows on the ground, a slow
//! drift of the light and sensor noise. Pixels: x right, y down; the frame is `width × height`, both
//! even.

use crate::config::SceneConfig;
use crate::rng::Rng;
use crate::scene::AgentView;
use throughline_core::geometry::BBox;

/// Draws frames of one scene.
pub struct Renderer {
    width: usize,
    height: usize,
    background: Vec<[f32; 3]>,
    occluder: Option<BBox>,
    rgb: Vec<[f32; 3]>,
    rng: Rng,
}

/// The stream header of a YUV4MPEG2 file with these frames (25 frames per second, 4:2:0).
pub fn y4m_header(width: usize, height: usize) -> String {
    format!("YUV4MPEG2 W{width} H{height} F25:1 Ip A1:1 C420jpeg\n")
}

fn hash2(x: i64, y: i64) -> f32 {
    let mut h = (x as u64).wrapping_mul(0x9E37_79B9_7F4A_7C15)
        ^ (y as u64).wrapping_mul(0xC2B2_AE3D_27D4_EB4F);
    h ^= h >> 29;
    h = h.wrapping_mul(0xBF58_476D_1CE4_E5B9);
    h ^= h >> 32;
    (h & 0xFFFF) as f32 / 65535.0
}

impl Renderer {
    /// A renderer for a scene; `width` and `height` are rounded down to even numbers.
    pub fn new(cfg: &SceneConfig) -> Renderer {
        let width = (cfg.width as usize / 2 * 2).max(2);
        let height = (cfg.height as usize / 2 * 2).max(2);
        let mut background = vec![[0.0f32; 3]; width * height];
        let horizon = (height as f32 * 0.16) as usize;
        let tile = height as f32 * 0.09;
        for y in 0..height {
            let depth = 0.35 + 0.65 * y as f32 / height as f32;
            for x in 0..width {
                let c = if y < horizon {
                    // Water with slow ripples, lighter towards the far bank.
                    let ripple = 6.0
                        * ((x as f32 * 0.045 + y as f32 * 0.9).sin() + (x as f32 * 0.013).cos());
                    let t = y as f32 / horizon as f32;
                    [
                        62.0 + ripple + 20.0 * (1.0 - t),
                        88.0 + ripple + 18.0 * (1.0 - t),
                        104.0 + ripple,
                    ]
                } else if y < horizon + 4 || (y < horizon + 16 && (x % 48) < 3) {
                    // The railing and its posts.
                    [58.0, 60.0, 63.0]
                } else {
                    // Paving stones seen in perspective, with mortar joints and a little grain.
                    let gx = (x as f32 - width as f32 / 2.0) / depth / tile;
                    let gy = y as f32 / depth / tile;
                    let (ix, iy) = (gx.floor() as i64, gy.floor() as i64);
                    let stone = 150.0 + 35.0 * hash2(ix, iy);
                    let joint = gx - gx.floor() < 0.05 || gy - gy.floor() < 0.06;
                    let grain = 10.0 * (hash2(x as i64, y as i64) - 0.5);
                    let v = if joint { stone * 0.72 } else { stone } + grain;
                    [v * 1.02, v, v * 0.94]
                };
                background[y * width + x] = c;
            }
        }
        Renderer {
            width,
            height,
            rgb: background.clone(),
            background,
            occluder: cfg.occluder_box().map(|o| o.bbox),
            rng: Rng::new(cfg.seed ^ 0x5EED_F00D),
        }
    }

    pub fn width(&self) -> usize {
        self.width
    }

    pub fn height(&self) -> usize {
        self.height
    }

    fn blend(&mut self, x: i64, y: i64, colour: [f32; 3], alpha: f32) {
        if x < 0 || y < 0 || x >= self.width as i64 || y >= self.height as i64 || alpha <= 0.0 {
            return;
        }
        let p = &mut self.rgb[y as usize * self.width + x as usize];
        let a = alpha.min(1.0);
        for k in 0..3 {
            p[k] = p[k] * (1.0 - a) + colour[k] * a;
        }
    }

    fn darken(&mut self, x: i64, y: i64, factor: f32) {
        if x < 0 || y < 0 || x >= self.width as i64 || y >= self.height as i64 {
            return;
        }
        let p = &mut self.rgb[y as usize * self.width + x as usize];
        for v in p.iter_mut() {
            *v *= factor;
        }
    }

    /// An ellipse shaded from the left (light from the upper left), with a soft one-pixel edge.
    fn ellipse(&mut self, cx: f32, cy: f32, rx: f32, ry: f32, colour: [f32; 3]) {
        if rx <= 0.0 || ry <= 0.0 {
            return;
        }
        for y in (cy - ry - 1.0).floor() as i64..=(cy + ry + 1.0).ceil() as i64 {
            for x in (cx - rx - 1.0).floor() as i64..=(cx + rx + 1.0).ceil() as i64 {
                let (dx, dy) = ((x as f32 + 0.5 - cx) / rx, (y as f32 + 0.5 - cy) / ry);
                let r = (dx * dx + dy * dy).sqrt();
                let alpha = ((1.0 - r) * rx.min(ry)).clamp(0.0, 1.0);
                let shade = 0.75 + 0.3 * (-dx * 0.8 - dy * 0.4).clamp(-1.0, 1.0);
                self.blend(
                    x,
                    y,
                    [colour[0] * shade, colour[1] * shade, colour[2] * shade],
                    alpha,
                );
            }
        }
    }

    fn rect(&mut self, x0: f32, y0: f32, x1: f32, y1: f32, colour: [f32; 3]) {
        for y in y0.floor() as i64..y1.ceil() as i64 {
            for x in x0.floor() as i64..x1.ceil() as i64 {
                let t = ((x as f32 - x0) / (x1 - x0).max(1.0)).clamp(0.0, 1.0);
                let shade = 1.1 - 0.3 * t;
                self.blend(
                    x,
                    y,
                    [colour[0] * shade, colour[1] * shade, colour[2] * shade],
                    1.0,
                );
            }
        }
    }

    fn shadow(&mut self, b: &BBox) {
        let (cx, cy) = (b.x + b.w * 0.5 + b.h * 0.18, b.y + b.h);
        let (rx, ry) = (b.w * 0.5 + b.h * 0.15, (b.h * 0.07).max(1.5));
        for y in (cy - ry - 1.0).floor() as i64..=(cy + ry + 1.0).ceil() as i64 {
            for x in (cx - rx - 1.0).floor() as i64..=(cx + rx + 1.0).ceil() as i64 {
                let (dx, dy) = ((x as f64 + 0.5 - cx) / rx, (y as f64 + 0.5 - cy) / ry);
                let r = (dx * dx + dy * dy).sqrt();
                if r < 1.0 {
                    self.darken(x, y, (0.55 + 0.45 * r * r) as f32);
                }
            }
        }
    }

    fn figure(&mut self, a: &AgentView) {
        let b = a.bbox;
        let (x, y, w, h) = (b.x as f32, b.y as f32, b.w as f32, b.h as f32);
        let c = [a.colour[0] as f32, a.colour[1] as f32, a.colour[2] as f32];
        let skin = [196.0, 152.0, 122.0];
        let dark = [38.0, 38.0, 44.0];
        let cx = x + w / 2.0;
        match a.class {
            0 => {
                // Legs, coat, head.
                self.rect(cx - w * 0.28, y + h * 0.55, cx - w * 0.04, y + h, dark);
                self.rect(cx + w * 0.04, y + h * 0.55, cx + w * 0.28, y + h, dark);
                self.ellipse(cx, y + h * 0.4, w * 0.48, h * 0.24, c);
                self.ellipse(cx, y + h * 0.1, w * 0.24, h * 0.09, skin);
            }
            1 => {
                // Two wheels, a frame, the rider.
                let r = h * 0.17;
                self.ellipse(x + r, y + h - r, r, r, dark);
                self.ellipse(x + w - r, y + h - r, r, r, dark);
                self.rect(
                    x + r,
                    y + h * 0.68,
                    x + w - r,
                    y + h * 0.74,
                    [120.0, 120.0, 128.0],
                );
                self.ellipse(cx, y + h * 0.42, w * 0.26, h * 0.22, c);
                self.ellipse(cx + w * 0.05, y + h * 0.12, w * 0.14, h * 0.09, skin);
            }
            _ => {
                // The service cart: a body with a darker skirt, a cab window and wheels.
                self.rect(x, y + h * 0.25, x + w, y + h * 0.85, c);
                self.rect(
                    x,
                    y + h * 0.7,
                    x + w,
                    y + h * 0.85,
                    [c[0] * 0.6, c[1] * 0.6, c[2] * 0.6],
                );
                self.rect(
                    x + w * 0.65,
                    y + h * 0.05,
                    x + w * 0.95,
                    y + h * 0.3,
                    [90.0, 110.0, 125.0],
                );
                let r = h * 0.13;
                self.ellipse(x + w * 0.2, y + h - r, r, r, dark);
                self.ellipse(x + w * 0.8, y + h - r, r, r, dark);
            }
        }
    }

    fn plinth(&mut self, o: BBox) {
        let (x0, y0, x1, y1) = (
            o.x as f32,
            o.y as f32,
            (o.x + o.w) as f32,
            (o.y + o.h) as f32,
        );
        self.shadow(&BBox::new(o.x, o.y + o.h * 0.4, o.w, o.h * 0.6));
        self.rect(x0, y0 + (y1 - y0) * 0.35, x1, y1, [142.0, 136.0, 124.0]);
        self.ellipse(
            (x0 + x1) / 2.0,
            y0 + (y1 - y0) * 0.2,
            (x1 - x0) * 0.35,
            (y1 - y0) * 0.22,
            [92.0, 70.0, 48.0],
        );
    }

    /// Draws one frame with `agents` (far to near) and returns it as planar YUV 4:2:0 bytes
    /// (BT.601 full range, as `C420jpeg` declares).
    pub fn frame(&mut self, frame: u32, agents: &[AgentView]) -> Vec<u8> {
        self.rgb.copy_from_slice(&self.background);
        for a in agents {
            self.shadow(&a.bbox);
        }
        let base = self.occluder.map(|o| o.y + o.h);
        let mut plinth_drawn = false;
        for a in agents {
            if let (Some(o), Some(base)) = (self.occluder, base) {
                if !plinth_drawn && a.bbox.y + a.bbox.h >= base {
                    self.plinth(o);
                    plinth_drawn = true;
                }
            }
            self.figure(a);
        }
        if let (Some(o), false) = (self.occluder, plinth_drawn) {
            self.plinth(o);
        }
        // The light drifts slowly (clouds), and the sensor adds noise.
        let t = f64::from(frame) / 25.0;
        let gain = (1.0
            + 0.07 * (t / 40.0 * std::f64::consts::TAU).sin()
            + 0.03 * (t / 9.0 * std::f64::consts::TAU).sin()) as f32;
        let (w, h) = (self.width, self.height);
        let mut out = vec![0u8; w * h * 3 / 2];
        let (luma, chroma) = out.split_at_mut(w * h);
        let (u_plane, v_plane) = chroma.split_at_mut(w * h / 4);
        for y in 0..h {
            for x in 0..w {
                let [r, g, b] = self.rgb[y * w + x];
                let noise = 2.5 * self.rng.normal() as f32;
                let yv = (0.299 * r + 0.587 * g + 0.114 * b) * gain + noise;
                luma[y * w + x] = yv.round().clamp(0.0, 255.0) as u8;
            }
        }
        for y in 0..h / 2 {
            for x in 0..w / 2 {
                let mut sum = [0.0f32; 3];
                for (dx, dy) in [(0, 0), (1, 0), (0, 1), (1, 1)] {
                    let p = self.rgb[(2 * y + dy) * w + 2 * x + dx];
                    for k in 0..3 {
                        sum[k] += p[k] * gain / 4.0;
                    }
                }
                let [r, g, b] = sum;
                let u = 128.0 - 0.168_736 * r - 0.331_264 * g + 0.5 * b;
                let v = 128.0 + 0.5 * r - 0.418_688 * g - 0.081_312 * b;
                u_plane[y * (w / 2) + x] = u.round().clamp(0.0, 255.0) as u8;
                v_plane[y * (w / 2) + x] = v.round().clamp(0.0, 255.0) as u8;
            }
        }
        out
    }
}
