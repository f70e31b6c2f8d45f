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
/// methods, the crossing margins (box heights) by default and for boxes found in footage, and the
/// longest gap (frames) the tracker settings' `bridge_frames` may ask to bridge.
#[derive(Serialize)]
struct CoreFacts {
    methods: Vec<MethodFacts>,
    default_hysteresis: f64,
    footage_hysteresis: f64,
    max_bridge_frames: u32,
}

/// [`CoreFacts`] as a plain object: `{methods: [{name, label, needs_embeddings}],
/// default_hysteresis, footage_hysteresis, max_bridge_frames}`.
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
        max_bridge_frames: limits::MAX_BRIDGE_FRAMES,
    })
}
