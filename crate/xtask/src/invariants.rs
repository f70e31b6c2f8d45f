//! Cheap invariants, checked first by `cargo xtask test`: each failure says what to fix.
//!
//! - The core depends on no platform crate ([`CORE_DEPENDENCIES`]).
//! - The code's shape ([`crate::shape`]): function and file lengths, no module loops.

use crate::paths::{metadata, root};
use crate::shape;

/// The core crate, whose dependencies are held to [`CORE_DEPENDENCIES`].
const CORE: &str = "throughline-core";

/// The only crates the core may depend on. The core is pure (DEVELOPERS.md, "Invariants"): no file
/// system, clock, terminal, thread or browser API, so that the same code runs in the command line
/// and in WebAssembly and gives one answer. These are plain computation and data: matrices
/// (nalgebra), assignment (pathfinding), serialisation (serde, serde_json), the JSON Schemas
/// generated from the document types (schemars) and SHA-256 of inputs (sha2). Anything that reaches
/// a platform (I/O, async runtimes, wasm-bindgen, js-sys, progress bars) belongs in an adapter.
const CORE_DEPENDENCIES: [&str; 6] = [
    "nalgebra",
    "pathfinding",
    "schemars",
    "serde",
    "serde_json",
    "sha2",
];

/// Every invariant; all problems are listed before failing.
pub fn check() -> Result<(), String> {
    let dependencies = core_dependencies()?;
    let shape = shape::check(&root())?;
    if dependencies.is_empty() && shape.is_clean() {
        eprintln!("invariants: the core's dependencies and the code's shape are as they should be");
        return Ok(());
    }
    for p in dependencies.iter().chain(shape.all()) {
        eprintln!("  {p}");
    }
    let mut broken = Vec::new();
    if !dependencies.is_empty() {
        broken.push(format!(
            "{CORE} has {} dependencies off its allow-list",
            dependencies.len()
        ));
    }
    if !shape.is_clean() {
        broken.push(format!(
            "{} (`cargo xtask shape` checks it alone)",
            shape.summary()
        ));
    }
    Err(format!("invariants broken: {}", broken.join("; ")))
}

/// The core's normal dependencies (any platform) outside the allow-list, from `cargo metadata`.
fn core_dependencies() -> Result<Vec<String>, String> {
    let packages = metadata()?["packages"]
        .as_array()
        .cloned()
        .unwrap_or_default();
    let core = packages
        .iter()
        .find(|p| p["name"] == CORE)
        .ok_or_else(|| format!("no package {CORE} in the workspace (cargo metadata)"))?;
    let normal = core["dependencies"]
        .as_array()
        .into_iter()
        .flatten()
        .filter(|d| d["kind"].is_null());
    Ok(normal
        .filter_map(|d| d["name"].as_str())
        .filter(|name| !CORE_DEPENDENCIES.contains(name))
        .map(|name| {
            format!(
                "crate/core/Cargo.toml: {CORE} depends on `{name}`, which is not on its allow-list \
                 ({}; crate/xtask/src/invariants.rs). The core stays pure: move the code that \
                 needs `{name}` into an adapter (crate/cli, crate/wasm), or, if `{name}` is plain \
                 computation with no platform in it, add it to the list with the reason",
                CORE_DEPENDENCIES.join(", ")
            )
        })
        .collect())
}
