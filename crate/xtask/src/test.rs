//! `cargo xtask test`: the whole suite, as CI runs it (`.ci/run`). Cheap invariants first, then the
//! installs (every step idempotent, so a fresh machine and a warm one run the same script), format
//! check, lints, every test, the wasm32 builds, the adapter against the command line in Node and in
//! headless Chromium, and the page end to end.

use crate::builds::{build_cli, build_wasm, ensure_wasm_tools};
use crate::paths::{adapter_wasm, target};
use crate::sh::{node_in, run, run_in, works};
use crate::{invariants, site};

pub fn test() -> Result<(), String> {
    invariants::check()?;
    install()?;
    run("cargo", &["fmt", "--all", "--check"])?;
    let lints = ["--workspace", "--all-targets", "--", "-D", "warnings"];
    run("cargo", &[&["clippy"][..], &lints].concat())?;
    run("cargo", &["test", "--workspace"])?;
    ensure_wasm_tools()?;
    // The core must stay free of the browser, files, clocks and the terminal: prove it builds for wasm.
    let wasm32 = ["--target", "wasm32-unknown-unknown", "--release"];
    run(
        "cargo",
        &[&["build", "-p", "throughline-core"][..], &wasm32].concat(),
    )?;
    adapter_in_node()?;
    // The adapter in headless Chromium (wasm-bindgen-test-runner reads crate/wasm/webdriver.json).
    run_in(
        "crate/wasm",
        "cargo",
        &["test", "--target", "wasm32-unknown-unknown"],
        &[(
            "CARGO_TARGET_WASM32_UNKNOWN_UNKNOWN_RUNNER",
            "wasm-bindgen-test-runner",
        )],
    )?;
    page_end_to_end()?;
    let artefacts = target("browser-artefacts")?;
    eprintln!(
        "all checks passed (browser screenshots in {}/)",
        artefacts.display()
    );
    Ok(())
}

/// The tools the checks need: rustfmt and clippy; Debian's ffmpeg (it decodes the rendered and the
/// committed footage in the tests), Chromium and its driver (the browser tests; no tool may
/// download a browser of its own).
fn install() -> Result<(), String> {
    run("rustup", &["component", "add", "rustfmt", "clippy"])?;
    if !(works("ffprobe", "-version")
        && works("ffmpeg", "-version")
        && works("chromium", "--version")
        && works("chromedriver", "--version"))
    {
        run("apt-get", &["update", "-qq"])?;
        let packages = ["ffmpeg", "chromium", "chromium-driver"];
        run(
            "apt-get",
            &[&["install", "-y", "-qq"][..], &packages].concat(),
        )?;
    }
    Ok(())
}

/// The WebAssembly adapter must give the command line's report byte for byte: build both and
/// compare them in Node (wasm-bindgen's tool must match the pinned crate version exactly).
fn adapter_in_node() -> Result<(), String> {
    build_wasm()?;
    let out = target("wasm-node")?.display().to_string();
    let wasm = adapter_wasm()?;
    run(
        "wasm-bindgen",
        &["--target", "nodejs", "--out-dir", &out, &wasm],
    )?;
    build_cli()?;
    node_in(".", &["--test", "tests/wasm/"])
}

/// The page itself, end to end, in Debian's Chromium driven by playwright-core.
fn page_end_to_end() -> Result<(), String> {
    site::build_with_browser_driver()?;
    node_in("tests/browser", &["--test"])
}
