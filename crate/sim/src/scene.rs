//! A scene generator with known truth: people, cyclists and a small service cart crossing the
//! approach plaza of a footbridge, seen from a fixed camera above one side.
//!
//! The scene is our own invention. Agents enter at an edge of the picture and walk to another edge,
//! with slow turns, speed changes, short stops and some pairs walking side by side; perspective makes
//! agents near the top of the picture smaller. A detector model turns the true boxes into detections:
//! misses that grow with occlusion, box jitter, lower scores for partly hidden agents, false positives,
//! class confusions and optional appearance embeddings of settable quality. The hard cases
//! ([`HardCases`], off by default) make common what troubles a motion detector. Everything is
//! deterministic for a seed. Boxes are pixels, top-left x/y + width/height; frames are 1-based.

use crate::agents::{clothes_of, spawn, step_agent, Agent};
pub use crate::config::{HardCases, Occluder, SceneConfig, CLASSES, FRAME_RATE};
use crate::rng::Rng;
use throughline_core::detections::{Detection, Detections};
use throughline_core::geometry::BBox;
use throughline_core::track::files::IdBox;

/// What the renderer needs of an agent in one frame.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AgentView {
    /// Ground-truth id (1-based, in order of first appearance).
    pub id: i64,
    /// Index into [`CLASSES`].
    pub class: u16,
    /// The whole box, pixels (top-left x/y + w/h), not clipped to the picture.
    pub bbox: BBox,
    /// Clothing or paint colour, RGB 0–255.
    pub colour: [f64; 3],
}

/// A generated scene: ground truth and what the detector saw.
#[derive(Debug, Clone)]
pub struct Scene {
    pub truth: Vec<IdBox>,
    /// Class index (into [`CLASSES`]) of each true agent id, 1-based ids: `truth_classes[id - 1]`.
    pub truth_classes: Vec<u16>,
    pub detections: Detections,
}

fn visible(b: &BBox, cfg: &SceneConfig) -> Option<BBox> {
    let x0 = b.x.max(0.0);
    let y0 = b.y.max(0.0);
    let x1 = (b.x + b.w).min(cfg.width);
    let y1 = (b.y + b.h).min(cfg.height);
    (x1 > x0 && y1 > y0).then(|| BBox::new(x0, y0, x1 - x0, y1 - y0))
}

/// Generates a scene.
pub fn generate(cfg: &SceneConfig) -> Scene {
    generate_with(cfg, &mut |_, _| {})
}

/// Generates a scene, handing every frame's agents (far to near) to `on_frame`, for rendering.
pub fn generate_with(cfg: &SceneConfig, on_frame: &mut dyn FnMut(u32, &[AgentView])) -> Scene {
    let mut sim = Simulation::new(cfg);
    // Arrivals make up for the shortfall against the wanted density, so the number of agents in view
    // holds steady however long they take to cross; the warm-up fills the scene before frame 1.
    let warm_up = 400;
    for step in 0..(warm_up + cfg.frames) {
        if step == warm_up && cfg.hard_cases.standing_start {
            sim.standing_start();
        }
        sim.arrivals();
        sim.move_agents();
        if step < warm_up {
            continue;
        }
        let frame = step - warm_up + 1;
        // Nearer agents (lower in the picture) hide farther ones.
        let mut order: Vec<usize> = (0..sim.agents.len()).collect();
        order.sort_by(|&i, &j| sim.agents[j].y.total_cmp(&sim.agents[i].y));
        let boxes: Vec<Option<BBox>> = sim
            .agents
            .iter()
            .map(|a| visible(&a.bbox(cfg), cfg))
            .collect();
        for (rank, &i) in order.iter().enumerate() {
            sim.observe(frame, i, &order[..rank], &boxes);
        }
        on_frame(frame, &sim.views(&order, &boxes));
        sim.false_positives(frame);
    }
    Scene {
        truth: sim.truth,
        truth_classes: sim.truth_classes,
        detections: sim.det,
    }
}

/// A scene while it is being generated: the agents, the random generator, and the truth and
/// detections so far.
struct Simulation<'a> {
    cfg: &'a SceneConfig,
    occluder: Option<Occluder>,
    rng: Rng,
    agents: Vec<Agent>,
    next_id: i64,
    next_truth_id: i64,
    truth: Vec<IdBox>,
    truth_classes: Vec<u16>,
    det: Detections,
}

impl<'a> Simulation<'a> {
    fn new(cfg: &'a SceneConfig) -> Self {
        Simulation {
            cfg,
            occluder: cfg.occluder_box(),
            rng: Rng::new(cfg.seed),
            agents: Vec::new(),
            next_id: 1,
            next_truth_id: 1,
            truth: Vec::new(),
            truth_classes: Vec::new(),
            det: Detections {
                classes: CLASSES.iter().map(|s| s.to_string()).collect(),
                embedding_dim: cfg.embedding_dim,
                ..Detections::default()
            },
        }
    }

    /// New agents at the edges, as many as the density is short of, over about a second.
    fn arrivals(&mut self) {
        let cfg = self.cfg;
        let mut births = (cfg.density - self.agents.len() as f64).max(0.0) / 25.0;
        while births > 0.0 {
            if self.rng.chance(births.min(1.0)) {
                spawn(
                    &mut self.rng,
                    cfg,
                    &mut self.next_id,
                    &mut self.agents,
                    cfg.embedding_dim,
                );
            }
            births -= 1.0;
        }
    }

    /// The standing-start hard case, just before frame 1: about half the people in view stand
    /// still for 2–8 s (those already stopping keep the longer of the two).
    fn standing_start(&mut self) {
        let cfg = self.cfg;
        for a in &mut self.agents {
            if a.class == 0 && visible(&a.bbox(cfg), cfg).is_some() && self.rng.chance(0.5) {
                a.stop_frames = a.stop_frames.max(50 + self.rng.below(150) as u32);
            }
        }
    }

    /// Every agent one step on; those that arrived or left the picture are gone.
    fn move_agents(&mut self) {
        let cfg = self.cfg;
        for a in &mut self.agents {
            step_agent(a, &mut self.rng, self.occluder, cfg.hard_cases.long_pauses);
        }
        self.agents.retain(|a| {
            let b = a.bbox(cfg);
            let near = b.x + b.w > -40.0 && b.x < cfg.width + 40.0 && b.y < cfg.height + 80.0;
            let arrived = (a.x - a.target.0).hypot(a.y - a.target.1) < 2.0 * a.speed + 2.0;
            near && !arrived && b.y + b.h > cfg.height * 0.1
        });
    }

    /// Agent `i`'s true box in this frame and, unless the detector model misses it, its
    /// detection. `nearer` are the agents in front of it; `boxes` every agent's visible box.
    fn observe(&mut self, frame: u32, i: usize, nearer: &[usize], boxes: &[Option<BBox>]) {
        let Some(b) = boxes[i] else { return };
        let full = self.agents[i].bbox(self.cfg);
        if b.area() < 0.3 * full.area() {
            return;
        }
        let id = self.truth_id(i);
        self.truth.push(IdBox {
            frame,
            id,
            bbox: b,
            score: 1.0,
        });
        let hidden: f64 = nearer
            .iter()
            .filter_map(|&j| boxes[j])
            .map(|o| o.intersection(&b))
            .sum::<f64>()
            / b.area();
        // The plinth hides whoever stands behind it (farther up the picture than its base).
        let a_y = self.agents[i].y;
        let behind = self
            .occluder
            .filter(|o| a_y < o.bbox.y + o.bbox.h)
            .map_or(0.0, |o| o.bbox.intersection(&b) / b.area());
        let occlusion = (hidden + behind).min(1.0);
        let p_miss = (self.cfg.miss_rate + 0.8 * occlusion.powf(1.5)).min(1.0);
        if self.rng.chance(p_miss) {
            return;
        }
        self.detect(frame, i, b, occlusion);
    }

    /// The dense ground-truth id of agent `i`, given in order of first appearance in view.
    fn truth_id(&mut self, i: usize) -> i64 {
        if let Some(id) = self.agents[i].truth_id {
            return id;
        }
        let id = self.next_truth_id;
        self.next_truth_id += 1;
        self.truth_classes.push(self.agents[i].class);
        self.agents[i].truth_id = Some(id);
        id
    }

    /// The detector model's box for agent `i`: jitter, a score that falls with occlusion, now
    /// and then the wrong class, and the agent's appearance vector with noise.
    fn detect(&mut self, frame: u32, i: usize, b: BBox, occlusion: f64) {
        let cfg = self.cfg;
        let rng = &mut self.rng;
        let a = &self.agents[i];
        let j = cfg.jitter * b.h;
        let nb = BBox::new(
            b.x + j * rng.normal(),
            b.y + j * rng.normal(),
            (b.w + j * rng.normal()).max(2.0),
            (b.h + j * rng.normal()).max(2.0),
        );
        let score = (0.88 - 0.55 * occlusion + 0.08 * rng.normal()).clamp(0.05, 0.99);
        let class = if rng.chance(0.04) {
            ((a.class as usize + 1 + rng.below(2)) % CLASSES.len()) as u16
        } else {
            a.class
        };
        let det = &mut self.det;
        let embedding = (cfg.embedding_dim > 0).then(|| {
            let index = (det.embeddings.len() / cfg.embedding_dim) as u32;
            let noise = cfg.embedding_noise / (cfg.embedding_dim as f64).sqrt();
            for &v in &a.appearance {
                det.embeddings
                    .push((v / (cfg.embedding_dim as f64).sqrt() + noise * rng.normal()) as f32);
            }
            index
        });
        det.rows.push(Detection {
            frame,
            bbox: nb,
            score,
            class: Some(class),
            embedding,
        });
    }

    /// What the renderer draws of this frame: the agents in view, far to near.
    fn views(&self, order: &[usize], boxes: &[Option<BBox>]) -> Vec<AgentView> {
        let mut views = Vec::with_capacity(self.agents.len());
        for &i in order.iter().rev() {
            let a = &self.agents[i];
            if boxes[i].is_some() {
                views.push(AgentView {
                    id: a.truth_id.unwrap_or(0),
                    class: a.class,
                    bbox: a.bbox(self.cfg),
                    colour: clothes_of(a.id, a.class, self.cfg.hard_cases.pale_clothes),
                });
            }
        }
        views
    }

    /// Boxes where nothing is, `false_positives` a frame on average, with random scores and
    /// classes.
    fn false_positives(&mut self, frame: u32) {
        let cfg = self.cfg;
        let rng = &mut self.rng;
        let det = &mut self.det;
        let mut fp = cfg.false_positives;
        while fp > 0.0 {
            if rng.chance(fp.min(1.0)) {
                let y = rng.range(0.2, 0.95) * cfg.height;
                let h = cfg.height * rng.range(0.06, 0.2);
                let w = h * rng.range(0.3, 1.2);
                let x = rng.range(0.0, cfg.width - w);
                let embedding = (cfg.embedding_dim > 0).then(|| {
                    let index = (det.embeddings.len() / cfg.embedding_dim) as u32;
                    for _ in 0..cfg.embedding_dim {
                        det.embeddings.push(rng.normal() as f32);
                    }
                    index
                });
                det.rows.push(Detection {
                    frame,
                    bbox: BBox::new(x, y - h, w, h),
                    score: rng.range(0.1, 0.65),
                    class: Some(rng.below(CLASSES.len()) as u16),
                    embedding,
                });
            }
            fp -= 1.0;
        }
    }
}

/// The ground truth of a scene as tracks (every box observed, classes by name), for counting the
/// true crossings of a plan.
pub fn truth_tracks(scene: &Scene) -> throughline_core::track::Tracks {
    let mut tracks = throughline_core::track::files::boxes_to_tracks(&scene.truth);
    for t in &mut tracks.tracks {
        let class = scene
            .truth_classes
            .get(t.id as usize - 1)
            .copied()
            .unwrap_or(0);
        t.class = Some(CLASSES[class as usize].to_string());
    }
    tracks
}

/// The ground truth as benchmark text: `frame,id,x,y,w,h,1,class,1` per visible box, in frame
/// order, with the class number 1-based (as ground-truth files of tracking benchmarks write it).
pub fn truth_text(scene: &Scene) -> String {
    scene
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
        .collect()
}
