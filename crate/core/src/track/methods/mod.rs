//! The tracking methods, one file each, registered here. A method is a [`MethodDef`]: its name, its
//! default settings, whether it predicts boxes with the Kalman filter, and its association step
//! (which detection of this frame goes to which live track). Everything else (track life,
//! numbering, output) is the tracker's and the same for every method.
//!
//! Adding a method: a new file here defining its `DEF`, and in this file one `mod` line, one
//! variant of [`Method`] and its arm in [`Method::def`]. The command line, the settings search and
//! the page take the list from [`Method::ALL`].
//!
//! Costs are distances in `[0, 1]` (1 − IoU, or cosine distance) and every assignment is the optimal
//! one from [`crate::track::assign::solve_edges`]. Where a method's paper matches greedily (the IoU
//! tracker), the optimal assignment is used instead: it never does worse on the same gate.

mod bytetrack;
mod deepsort;
mod iou;
mod matching;
mod sort;

use super::tracker::Tracker;
use super::TrackerConfig;
use crate::detections::Detection;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};
use std::fmt;

/// The published tracking methods Throughline implements.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Method {
    Iou,
    Sort,
    Bytetrack,
    Deepsort,
}

impl Method {
    /// Every method, in the order help texts and the page list them.
    pub const ALL: [Method; 4] = [
        Method::Iou,
        Method::Sort,
        Method::Bytetrack,
        Method::Deepsort,
    ];

    /// What the method is and does.
    pub fn def(self) -> &'static MethodDef {
        match self {
            Method::Iou => &iou::DEF,
            Method::Sort => &sort::DEF,
            Method::Bytetrack => &bytetrack::DEF,
            Method::Deepsort => &deepsort::DEF,
        }
    }

    /// The name in settings files, on the command line and in the page.
    pub fn name(self) -> &'static str {
        self.def().name
    }

    pub fn parse(s: &str) -> Option<Method> {
        Self::ALL.into_iter().find(|m| m.name() == s)
    }

    /// Every method's name.
    pub fn names() -> Vec<&'static str> {
        Self::ALL.iter().map(|m| m.name()).collect()
    }

    /// The names as a sentence: `iou, sort, bytetrack or deepsort`.
    pub fn names_listed() -> String {
        let names = Self::names();
        match names.split_last() {
            Some((last, [])) => last.to_string(),
            Some((last, rest)) => format!("{} or {last}", rest.join(", ")),
            None => String::new(),
        }
    }
}

impl fmt::Display for Method {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// A tracking method.
pub struct MethodDef {
    /// The name in settings files, on the command line and in the page (lowercase).
    pub name: &'static str,
    /// A short name for people, as the page lists it.
    pub label: &'static str,
    /// One line for help texts: what it does, and its paper.
    pub summary: &'static str,
    /// Whether live tracks are predicted with the constant-velocity Kalman filter; without it a
    /// track is expected where its last detection was.
    pub motion: bool,
    /// Whether it needs appearance embeddings in the detections.
    pub needs_embeddings: bool,
    /// Its default settings, made from the settings every method shares.
    pub defaults: fn(TrackerConfig) -> TrackerConfig,
    /// The association step of one frame.
    pub(crate) associate: fn(&Tracker, &[Detection]) -> Association,
    /// The values the settings search (`throughline tune`) tries where the method differs from
    /// the others: frames a track may coast, and the cosine gate.
    pub search_max_age: &'static [u32],
    pub search_max_cosine_distance: &'static [f64],
}

/// A match of live track `track` (index into the tracker's live tracks) to detection `det` (index
/// into the frame's detections).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Match {
    pub track: usize,
    pub det: usize,
}

/// What a method decided for one frame.
pub(crate) struct Association {
    pub matches: Vec<Match>,
    /// Detections that may start a new track.
    pub new_tracks: Vec<usize>,
}

#[cfg(test)]
mod tests {
    use super::Method;

    #[test]
    fn every_method_is_written_by_its_name() {
        for m in Method::ALL {
            assert_eq!(
                serde_json::to_string(&m).unwrap(),
                format!("\"{}\"", m.name())
            );
            assert_eq!(Method::parse(m.name()), Some(m));
        }
        assert_eq!(Method::names_listed(), "iou, sort, bytetrack or deepsort");
    }
}
