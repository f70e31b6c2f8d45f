//! Where things are: the repository root, and cargo's target folder as `cargo metadata` reports it
//! (so `CARGO_TARGET_DIR` and `build.target-dir` are honoured), with what the tasks build there.

use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::OnceLock;

/// The environment variable that tells the Node tests (tests/wasm, tests/browser, tests/bench)
/// where the target folder is; they fall back to `target/` under the repository root.
pub const TARGET_DIR_ENV: &str = "THROUGHLINE_TARGET_DIR";

pub fn root() -> PathBuf {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("../..");
    std::fs::canonicalize(&root).unwrap_or(root)
}

/// `cargo metadata --no-deps` of the workspace, read once: the workspace's own packages (with the
/// dependencies their manifests declare) and the target folder.
pub fn metadata() -> Result<&'static serde_json::Value, String> {
    static METADATA: OnceLock<Result<serde_json::Value, String>> = OnceLock::new();
    METADATA
        .get_or_init(|| {
            let out = Command::new(std::env::var("CARGO").unwrap_or_else(|_| "cargo".into()))
                .args(["metadata", "--format-version", "1", "--no-deps"])
                .current_dir(root())
                .output()
                .map_err(|e| format!("cannot start `cargo metadata`: {e}"))?;
            if !out.status.success() {
                return Err(format!(
                    "`cargo metadata` failed: {}",
                    String::from_utf8_lossy(&out.stderr).trim()
                ));
            }
            serde_json::from_slice(&out.stdout)
                .map_err(|e| format!("`cargo metadata` printed something unexpected: {e}"))
        })
        .as_ref()
        .map_err(Clone::clone)
}

/// Cargo's target folder (absolute).
pub fn target_dir() -> Result<PathBuf, String> {
    metadata()?["target_directory"]
        .as_str()
        .map(PathBuf::from)
        .ok_or_else(|| "`cargo metadata` gave no target_directory".into())
}

/// A path inside the target folder, e.g. `target("bench")`.
pub fn target(rel: &str) -> Result<PathBuf, String> {
    Ok(target_dir()?.join(rel))
}

/// The release build of the command line.
pub fn cli_binary() -> Result<String, String> {
    Ok(target("release/throughline")?.display().to_string())
}

/// The release build of the WebAssembly adapter, before wasm-bindgen.
pub fn adapter_wasm() -> Result<String, String> {
    let wasm = target("wasm32-unknown-unknown/release/throughline_wasm.wasm")?;
    Ok(wasm.display().to_string())
}
