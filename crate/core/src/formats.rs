//! The `"format"` names of Throughline's own JSON documents, in one place: each document's module
//! writes its own, and the detection readers name them when one is given where detections belong.

pub const TRACKS: &str = "throughline-tracks";
pub const REPORT: &str = "throughline-report";
pub const PROJECT: &str = "throughline-project";
pub const EDITS: &str = "throughline-edits";
