//! The settings of a simulated scene, and what they imply: its classes, frame rate and plinth.

use throughline_core::geometry::BBox;

/// The classes of the scene, in the order of their class index.
pub const CLASSES: [&str; 3] = ["pedestrian", "cyclist", "cart"];

/// Settings of a simulated scene.
#[derive(Debug, Clone, PartialEq)]
pub struct SceneConfig {
    pub seed: u64,
    pub frames: u32,
    pub width: f64,
    pub height: f64,
    /// Mean number of agents in view.
    pub density: f64,
    /// Chance that a fully visible agent is missed in a frame.
    pub miss_rate: f64,
    /// Mean number of false detections per frame.
    pub false_positives: f64,
    /// Standard deviation of box corner noise, as a fraction of the box height.
    pub jitter: f64,
    /// Length of appearance vectors; 0 for none.
    pub embedding_dim: usize,
    /// Noise added to an agent's appearance vector in each detection (0 = perfect re-identification).
    pub embedding_noise: f64,
    /// Whether the plaza has its sculpture plinth, a static occluder that hides people behind it.
    pub occluder: bool,
    /// Situations that trouble a motion detector, made common (none by default).
    pub hard_cases: HardCases,
}

/// Situations that trouble a motion detector, each made common when on. All are off by default,
/// and then the scene draws exactly the random numbers it drew before they existed, so its truth,
/// detections and pictures stay the same bytes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct HardCases {
    /// About half the people in view at frame 1 stand still there for the first 2–8 s, as if the
    /// recording began among them. (Every scene starts populated; this makes the start still.)
    pub standing_start: bool,
    /// 60% of people walk in pairs (25% otherwise), closer side by side, and a third of those who
    /// walk alone have someone faster coming up behind them on the same way, who overtakes.
    pub pairs: bool,
    /// People who stop mid-walk stand for 3–10 s (0.4–2 s otherwise), then walk on.
    pub long_pauses: bool,
    /// A third of the people and riders wear clothes of about the paving's grey.
    pub pale_clothes: bool,
}

impl HardCases {
    /// Every hard case on.
    pub const ALL: HardCases = HardCases {
        standing_start: true,
        pairs: true,
        long_pauses: true,
        pale_clothes: true,
    };

    /// The names the command line takes, each with its case.
    pub const NAMES: [&'static str; 4] = ["standing-start", "pairs", "long-pauses", "pale-clothes"];

    /// Reads `all` or a comma-separated list of [`HardCases::NAMES`]; the error names the word
    /// that is neither.
    pub fn parse(list: &str) -> Result<HardCases, String> {
        let mut cases = HardCases::default();
        for word in list.split(',').map(str::trim) {
            match word {
                "all" => cases = HardCases::ALL,
                "standing-start" => cases.standing_start = true,
                "pairs" => cases.pairs = true,
                "long-pauses" => cases.long_pauses = true,
                "pale-clothes" => cases.pale_clothes = true,
                _ => {
                    return Err(format!(
                        "unknown hard case `{word}`: use all or some of {}",
                        Self::NAMES.join(", ")
                    ))
                }
            }
        }
        Ok(cases)
    }
}

/// Frames per second of simulated footage (speeds are set per frame for this rate).
pub const FRAME_RATE: f64 = 25.0;

/// The static occluder of the plaza, in pixels: a plinth whose base stands at `base_y`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Occluder {
    pub bbox: BBox,
}

impl SceneConfig {
    /// The occluder of this scene, if it has one.
    pub fn occluder_box(&self) -> Option<Occluder> {
        self.occluder.then(|| Occluder {
            bbox: BBox::new(
                self.width * 0.60,
                self.height * 0.30,
                self.width * 0.09,
                self.height * 0.28,
            ),
        })
    }
}

impl Default for SceneConfig {
    fn default() -> Self {
        Self {
            seed: 1,
            frames: 750,
            width: 640.0,
            height: 360.0,
            density: 10.0,
            miss_rate: 0.1,
            false_positives: 0.5,
            jitter: 0.04,
            embedding_dim: 0,
            embedding_noise: 0.3,
            occluder: true,
            hard_cases: HardCases::default(),
        }
    }
}
