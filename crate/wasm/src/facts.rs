//! What the page takes from the core's own tables rather than writing them again.

use crate::to_js;
use serde::Serialize;
use throughline_core::{limits, plan, Method};
use wasm_bindgen::prelude::*;

/// A tracking method as the page lists it.
#[derive(Serialize)]
struct MethodFacts {
    name: &'static str,
    label: &'static str,
    needs_embeddings: bool,
}

/// What the page takes from the core's own tables rather than writing again: the tracking
/// methods, the crossing margins (box heights) by default, for boxes found in footage and at most, the
/// seconds paths are averaged over by default and at most, the longest gap (frames) the tracker
/// settings' `bridge_frames` may ask to bridge. (What an older project needs is answered for each
/// project, by `readProject`.)
#[derive(Serialize)]
struct CoreFacts {
    methods: Vec<MethodFacts>,
    default_hysteresis: f64,
    footage_hysteresis: f64,
    max_hysteresis: f64,
    default_smooth_seconds: f64,
    max_smooth_seconds: f64,
    max_bridge_frames: u32,
}

/// [`CoreFacts`] as a plain object: `{methods: [{name, label, needs_embeddings}],
/// default_hysteresis, footage_hysteresis, max_hysteresis, default_smooth_seconds, max_smooth_seconds,
/// max_bridge_frames}`.
#[wasm_bindgen(js_name = coreFacts)]
pub fn core_facts() -> Result<JsValue, JsError> {
    let methods = Method::ALL
        .iter()
        .map(|m| {
            let d = m.def();
            MethodFacts {
                name: d.name,
                label: d.label,
                needs_embeddings: d.needs_embeddings,
            }
        })
        .collect();
    to_js(&CoreFacts {
        methods,
        default_hysteresis: plan::DEFAULT_HYSTERESIS,
        footage_hysteresis: plan::FOOTAGE_HYSTERESIS,
        max_hysteresis: limits::MAX_HYSTERESIS,
        default_smooth_seconds: plan::DEFAULT_SMOOTH_SECONDS,
        max_smooth_seconds: limits::MAX_SMOOTH_SECONDS,
        max_bridge_frames: limits::MAX_BRIDGE_FRAMES,
    })
}
