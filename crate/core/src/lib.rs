//! Throughline's core: pictures or detections in, tracks and counts out.
//!
//! Everything here is pure computation on bytes, strings and numbers. The core knows nothing of the
//! browser, the file system, clocks or the terminal, so the command line and the WebAssembly build
//! give the same answer for the same input.
//!
//! Conventions used throughout:
//! - boxes are in pixels, **top-left x/y plus width/height** ([`geometry::BBox`]), image y pointing down;
//! - frame numbers are **1-based**, as in the benchmark text format.

#![forbid(unsafe_code)]

pub mod accuracy;
pub mod count;
pub mod detect;
pub mod detections;
pub mod edits;
pub mod error;
pub mod fingerprint;
pub mod formats;
pub mod geometry;
pub mod handin;
pub mod limits;
pub mod manifest;
pub mod pipeline;
pub mod plan;
pub mod project;
pub mod report;
pub mod review;
pub mod text;
pub mod track;

pub use detections::{read_detections, DetectionFormat, Detections, ReadReport};
pub use error::{Error, ErrorKind};
pub use geometry::BBox;
pub use track::{run_tracker, Method, TrackerConfig, Tracks};

/// Version of the core, written into every output document.
pub const VERSION: &str = env!("CARGO_PKG_VERSION");
