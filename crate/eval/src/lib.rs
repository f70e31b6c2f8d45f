//! How good Throughline's results are: [`tracking_metrics`] scores tracks against ground truth
//! (CLEAR MOT, IDF1, HOTA), [`count_accuracy`] compares counts with a manual count (APD, AAPD, WAPD,
//! correction factor) and [`tune`] searches tracker settings against ground truth.

pub mod count_accuracy;
pub mod tracking_metrics;
pub mod tune;
