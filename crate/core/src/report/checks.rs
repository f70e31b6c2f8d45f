//! What a check against a hand count adds to the report: per line, direction and class the hand
//! count beside the automated one, with the measures of NCHRP Report 797 (computed in
//! `accuracy`).

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

/// The measures for one group of intervals.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Measures {
    pub intervals: usize,
    pub zero_reference_intervals: usize,
    pub automated_total: u64,
    pub reference_total: u64,
    pub apd: Option<f64>,
    pub aapd: Option<f64>,
    pub wapd: Option<f64>,
    pub correction_factor: Option<f64>,
}

/// One line, direction and class of a check.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct TallyGroup {
    pub screenline: String,
    /// The plan's label of the direction.
    pub direction: String,
    /// `all` for all classes together.
    pub class: String,
    pub manual: u64,
    pub automated: u64,
    /// Automated minus manual.
    pub difference: i64,
    pub measures: Measures,
    /// Each bin: its start label, automated and manual counts.
    pub per_bin: Vec<(String, u64, u64)>,
}

/// A tally beside the automated count of the same frames.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct TallyCheck {
    pub who: String,
    pub made: String,
    pub from_frame: u32,
    pub to_frame: u32,
    /// Clock labels of the sample's start and end.
    pub from: String,
    pub to: String,
    /// The sample's length in seconds, and the bins the measures are taken over.
    pub seconds: f64,
    pub bin_seconds: f64,
    /// Each bin's first and last frame, in the order of every group's `per_bin`.
    pub bin_frames: Vec<[u32; 2]>,
    pub groups: Vec<TallyGroup>,
    /// Every group's bins pooled (all classes together).
    pub overall: Measures,
    /// How far to trust it: the sample's size, in words.
    pub caution: String,
}
