//! `cargo xtask test`: the whole suite, as CI runs it (`.ci/run`). Cheap invariants first, then the
//! installs (every step idempotent, so a fresh machine and a warm one run the same script), format
//! check, lints, every test, a batch through a one-node Slurm cluster, a short run of every fuzz
//! target, the wasm32 builds, the adapter against the command line in Node and in
//! headless Chromium, and the page end to end.

use std::path::Path;

use crate::builds::{build_cli, build_wasm, ensure_wasm_tools};
use crate::paths::{adapter_wasm, root, target};
use crate::sh::{node_in, run, run_in, works};
use crate::{invariants, site};

/// Set for `cargo test` by this task: the tests that need ffmpeg fail when it is missing instead
/// of skipping (crate/cli/tests/cli.rs, crate/footage/tests/demux.rs read it).
const REQUIRE_FFMPEG_ENV: &str = "THROUGHLINE_REQUIRE_FFMPEG";

pub fn test() -> Result<(), String> {
    invariants::check()?;
    install()?;
    run("cargo", &["fmt", "--all", "--check"])?;
    let lints = ["--workspace", "--all-targets", "--", "-D", "warnings"];
    run("cargo", &[&["clippy"][..], &lints].concat())?;
    run_in(
        ".",
        "cargo",
        &["test", "--workspace"],
        &[(REQUIRE_FFMPEG_ENV, "1")],
    )?;
    // Batch work spread by a real Slurm scheduler: a one-node cluster on this machine.
    crate::slurm::check()?;
    // Every reader of outside bytes under the fuzzer for a few seconds, its past crashes first.
    crate::fuzz::smoke()?;
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

/// The page itself, end to end, in Debian's Chromium driven by playwright-core; before it, the type
/// check of the page's scripts where tests/browser/package.json has one.
fn page_end_to_end() -> Result<(), String> {
    site::build_with_browser_driver()?;
    if has_npm_script(&root().join("tests/browser/package.json"), "typecheck")? {
        run_in("tests/browser", "npm", &["run", "typecheck"], &[])?;
    }
    node_in("tests/browser", &["--test"])
}

/// Whether the npm package described by `package_json` has the script `name`.
fn has_npm_script(package_json: &Path, name: &str) -> Result<bool, String> {
    let shown = package_json.display();
    let text = std::fs::read_to_string(package_json).map_err(|e| format!("{shown}: {e}"))?;
    let json: serde_json::Value =
        serde_json::from_str(&text).map_err(|e| format!("{shown}: {e}"))?;
    Ok(json["scripts"][name].is_string())
}

#[cfg(test)]
mod tests {
    use super::has_npm_script;

    #[test]
    fn the_type_check_runs_only_where_package_json_has_one() {
        let dir = std::env::temp_dir().join(format!("xtask-npm-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let file = dir.join("package.json");
        for (json, has) in [
            (
                r#"{"scripts": {"test": "node --test", "typecheck": "tsc"}}"#,
                true,
            ),
            (r#"{"scripts": {"test": "node --test"}}"#, false),
            (r#"{"name": "x"}"#, false),
        ] {
            std::fs::write(&file, json).unwrap();
            assert_eq!(has_npm_script(&file, "typecheck"), Ok(has), "{json}");
        }
        std::fs::write(&file, "{").unwrap();
        assert!(has_npm_script(&file, "typecheck")
            .unwrap_err()
            .contains("package.json"));
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
