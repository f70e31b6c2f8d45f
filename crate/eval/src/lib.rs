//! How good Throughline's tracks are against ground truth: [`tracking_metrics`] scores them (CLEAR
//! MOT, IDF1, HOTA), [`events`] matches counted crossings with true ones one by one (missed and
//! extra), and [`tune`] searches tracker settings that score best. (Counts against a manual
//! count are the product's own business: `throughline_core::accuracy`.)

pub mod events;
pub mod tracking_metrics;
pub mod tune;
