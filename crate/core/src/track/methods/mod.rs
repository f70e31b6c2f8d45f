//! The tracking methods, one file each, registered here. A method is a [`MethodDef`]: its name, its
//! default settings, whether it predicts boxes with the Kalman filter, and its association step
//! (which detection of this frame goes to which live track). Everything else (track life,
//! numbering, output) is the tracker's and the same for every method.
//!
//! Adding a method: a new file here defining its `DEF`, and in this file one `mod` line, one
//! variant of [`Method`], its place in [`Method::ALL`], its arm in [`Method::def`] and its name in
//! the test below. The command line, the settings search, the schemas (a name) and the page take
//! the list from [`Method::ALL`].
//!
//! Costs are distances in `[0, 1]` (1 − IoU, or cosine distance) and every assignment is the optimal
//! one from [`crate::track::assign::solve_edges`]. Where a method's paper matches greedily (the IoU
//! tracker), the optimal assignment is used instead: it never does worse on the same gate.

mod bytetrack;
mod deepsort;
mod iou;
mod matching;
mod sort;

use super::tracker::Step;
pub(crate) use super::tracker::{Association, Match};
use super::TrackerConfig;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};
use std::fmt;

/// The published tracking methods Throughline implements.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Method {
    Iou,
    Sort,
    Bytetrack,
    Deepsort,
}

/// In the documents' schemas a method is a name (the list is [`Method::ALL`], documented in
/// docs/tracker-settings.md), so adding a method leaves the committed schemas as they are.
impl JsonSchema for Method {
    fn schema_name() -> std::borrow::Cow<'static, str> {
        "Method".into()
    }

    fn json_schema(_: &mut schemars::SchemaGenerator) -> schemars::Schema {
        schemars::json_schema!({
            "type": "string",
            "description": "A tracking method's name, as `--method` takes it (docs/tracker-settings.md)."
        })
    }
}

impl Method {
    /// Every method, in the order help texts and the page list them.
    pub const ALL: &'static [Method] = &[
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
        Self::ALL.iter().copied().find(|m| m.name() == s)
    }

    /// Every method's name.
    pub fn names() -> Vec<&'static str> {
        Self::ALL.iter().map(|m| m.name()).collect()
    }

    /// The names as a sentence: `iou, sort, bytetrack or deepsort`.
    pub fn names_listed() -> String {
        crate::text::listed(&Self::names(), "or")
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
    pub(crate) associate: Step,
    /// The values the settings search (`throughline tune`) tries where the method differs from
    /// the others: frames a track may coast, and the cosine gate.
    pub search_max_age: &'static [u32],
    pub search_max_cosine_distance: &'static [f64],
}

#[cfg(test)]
mod tests {
    use super::Method;

    #[test]
    fn every_method_is_written_by_its_name() {
        for &m in Method::ALL {
            assert_eq!(
                serde_json::to_string(&m).unwrap(),
                format!("\"{}\"", m.name())
            );
            assert_eq!(Method::parse(m.name()), Some(m));
        }
        assert_eq!(Method::names_listed(), "iou, sort, bytetrack or deepsort");
    }
}
