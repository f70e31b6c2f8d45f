//! Throughline's scene simulator: a footbridge plaza of our own invention, with known truth.
//!
//! [`scene`] makes people, cyclists and a service cart cross the plaza and turns their true boxes
//! into detections through a detector model; [`render`] draws the frames as YUV 4:2:0 pictures.
//! Both are deterministic for a seed ([`rng`]). The simulator is for trying settings, for tests and
//! for the bundled demo; it is not part of counting.

mod agents;
mod config;
pub mod render;
pub mod rng;
pub mod scene;

pub use scene::{
    generate, generate_with, truth_text, truth_tracks, AgentView, HardCases, Scene, SceneConfig,
    CLASSES,
};
