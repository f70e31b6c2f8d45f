//! The builds the tasks share: the command line (release) and the WebAssembly adapter (release,
//! wasm32), with the tools the latter needs.

use std::process::Command;

use crate::sh::run;

/// The wasm-bindgen version pinned in crate/wasm/Cargo.toml.
pub const WASM_BINDGEN: &str = "0.2.130";

/// The wasm32 target and the wasm-bindgen tool of exactly the pinned version (about 4 min to build
/// the tool on a fresh machine; nothing is done when they are there).
pub fn ensure_wasm_tools() -> Result<(), String> {
    run("rustup", &["target", "add", "wasm32-unknown-unknown"])?;
    let have_bindgen = Command::new("wasm-bindgen")
        .arg("--version")
        .output()
        .is_ok_and(|o| String::from_utf8_lossy(&o.stdout).contains(WASM_BINDGEN));
    if !have_bindgen {
        run(
            "cargo",
            &["install", "wasm-bindgen-cli", "--version", WASM_BINDGEN],
        )?;
    }
    Ok(())
}

/// The WebAssembly adapter, release build for wasm32, with the tools it needs installed.
pub fn build_wasm() -> Result<(), String> {
    ensure_wasm_tools()?;
    run(
        "cargo",
        &[
            "build",
            "-p",
            "throughline-wasm",
            "--target",
            "wasm32-unknown-unknown",
            "--release",
            "--quiet",
        ],
    )
}

/// The command line, release build ([`crate::paths::cli_binary`]).
pub fn build_cli() -> Result<(), String> {
    run(
        "cargo",
        &["build", "--release", "--quiet", "-p", "throughline"],
    )
}
