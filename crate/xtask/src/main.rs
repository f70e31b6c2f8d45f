//! Project chores, run as `cargo xtask <task>`:
//!
//! - `demo`: build the command line and run the main job on the bundled demo, then build the browser
//!   app and serve it on 127.0.0.1 (`--no-serve`: build only);
//! - `site`: build the browser app into demo-site/ (and its single-file form); `serve`: and serve it;
//! - `test`: install what the checks need, then format check, lints, every test, the wasm32 build;
//! - `bench`: speed, memory and quality of every method on simulated scenes, with a Python peer,
//!   written into BENCHMARKS.md (`--counts`, `--detector`: one table each); `bench --page`: speed
//!   of finding objects in the page (Chromium);
//! - `demo-data`: regenerate the bundled demo with the simulator.

use std::path::{Path, PathBuf};
use std::process::{Command, ExitCode};

mod bench;
mod site;

/// The wasm-bindgen version pinned in crate/wasm/Cargo.toml.
const WASM_BINDGEN: &str = "0.2.130";

fn root() -> PathBuf {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("../..");
    std::fs::canonicalize(&root).unwrap_or(root)
}

/// The wasm32 target and the wasm-bindgen tool of exactly the pinned version (about 4 min to build
/// the tool on a fresh machine; nothing is done when they are there).
fn ensure_wasm_tools() -> Result<(), String> {
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
fn build_wasm() -> Result<(), String> {
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

/// Runs a command from the repository root, echoing it; fails with its description.
fn run(program: &str, args: &[&str]) -> Result<(), String> {
    eprintln!("+ {program} {}", args.join(" "));
    let status = Command::new(program)
        .args(args)
        .current_dir(root())
        .status()
        .map_err(|e| format!("cannot start `{program}`: {e}"))?;
    if status.success() {
        Ok(())
    } else {
        Err(format!("`{program} {}` failed ({status})", args.join(" ")))
    }
}

/// Like [`run`], from a folder of the repository and with extra environment variables.
fn run_in(dir: &str, program: &str, args: &[&str], env: &[(&str, &str)]) -> Result<(), String> {
    eprintln!("+ (cd {dir}) {program} {}", args.join(" "));
    let status = Command::new(program)
        .args(args)
        .envs(env.iter().copied())
        .current_dir(root().join(dir))
        .status()
        .map_err(|e| format!("cannot start `{program}`: {e}"))?;
    if status.success() {
        Ok(())
    } else {
        Err(format!(
            "`{program} {}` in {dir} failed ({status})",
            args.join(" ")
        ))
    }
}

fn cli_binary() -> PathBuf {
    root().join("target/release/throughline")
}

fn build_cli() -> Result<(), String> {
    run(
        "cargo",
        &["build", "--release", "--quiet", "-p", "throughline"],
    )
}

fn demo(args: &[String]) -> Result<(), String> {
    build_cli()?;
    let out = root().join("out/demo");
    std::fs::create_dir_all(&out).map_err(|e| format!("cannot create out/demo: {e}"))?;
    let bin = cli_binary();
    let bin = bin.to_str().unwrap_or("throughline");
    let dets = "demo-site/demo/detections.csv";
    let plan = "demo-site/demo/plan.json";
    run(
        bin,
        &[
            "run",
            dets,
            "--plan",
            plan,
            "-o",
            "out/demo/report.json",
            "--csv",
            "out/demo/counts.csv",
            "--tracks",
            "out/demo/tracks.txt",
        ],
    )?;
    println!("\nThe bundled demo (a simulated footbridge plaza) was tracked and counted:");
    println!("  out/demo/report.json  counts by line, direction, class and interval, zones, movements, speeds, events");
    println!(
        "  out/demo/counts.csv   screenline,direction,class,interval_start,interval_end,count"
    );
    println!("  out/demo/tracks.txt   the tracks (benchmark text)");
    println!("\nTracks against the scene's known truth:\n");
    run(
        bin,
        &[
            "score",
            "--truth",
            "demo-site/demo/truth.txt",
            "out/demo/tracks.txt",
        ],
    )?;
    println!("\nCounts against the scene's true crossings (as you would check a manual count):\n");
    run(
        bin,
        &[
            "score-counts",
            "--truth",
            "demo-site/demo/truth_counts.csv",
            "out/demo/report.json",
        ],
    )?;
    println!(
        "\nOn your own files: {bin} run DETECTIONS --plan PLAN -o report.json --csv counts.csv"
    );
    println!("\nNow the browser app, which does the same in the page:");
    site::build()?;
    if args.iter().any(|a| a == "--no-serve") {
        return Ok(());
    }
    site::serve(8000)
}

fn test() -> Result<(), String> {
    // Installs: every step is idempotent, so a fresh machine and a warm one run the same script.
    run("rustup", &["component", "add", "rustfmt", "clippy"])?;
    // Debian's packages: ffmpeg decodes the rendered and the committed footage in the tests; Chromium
    // and its driver run the browser tests (no tool may download a browser of its own).
    let have = |program: &str, arg: &str| {
        Command::new(program)
            .arg(arg)
            .output()
            .is_ok_and(|o| o.status.success())
    };
    if !(have("ffprobe", "-version")
        && have("chromium", "--version")
        && have("chromedriver", "--version"))
    {
        run("apt-get", &["update", "-qq"])?;
        run(
            "apt-get",
            &[
                "install",
                "-y",
                "-qq",
                "ffmpeg",
                "chromium",
                "chromium-driver",
            ],
        )?;
    }
    run("cargo", &["fmt", "--all", "--check"])?;
    run(
        "cargo",
        &[
            "clippy",
            "--workspace",
            "--all-targets",
            "--",
            "-D",
            "warnings",
        ],
    )?;
    run("cargo", &["test", "--workspace"])?;
    ensure_wasm_tools()?;
    // The core must stay free of the browser, files, clocks and the terminal: prove it builds for wasm.
    run(
        "cargo",
        &[
            "build",
            "-p",
            "throughline-core",
            "--target",
            "wasm32-unknown-unknown",
            "--release",
        ],
    )?;
    // The WebAssembly adapter must give the command line's report byte for byte: build both and
    // compare them in Node (wasm-bindgen's tool must match the pinned crate version exactly).
    build_wasm()?;
    run(
        "wasm-bindgen",
        &[
            "--target",
            "nodejs",
            "--out-dir",
            "target/wasm-node",
            "target/wasm32-unknown-unknown/release/throughline_wasm.wasm",
        ],
    )?;
    build_cli()?;
    run("node", &["--test", "tests/wasm/"])?;
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
    // The page itself, end to end, in Debian's Chromium driven by playwright-core.
    site_and_browser_driver()?;
    run_in("tests/browser", "node", &["--test"], &[])?;
    eprintln!("all checks passed (browser screenshots in target/browser-artefacts/)");
    Ok(())
}

/// `serve [--no-build] [--port N]`: builds the site (unless `--no-build`) and serves it from port N
/// (8000 by default) or the next free one; `--port 0` takes any free port. The browser tests serve
/// the page this way, so they see the same server and headers as a user of `cargo xtask demo`.
fn serve(args: &[String]) -> Result<(), String> {
    let mut port = 8000;
    let mut build = true;
    let mut rest = args.iter();
    while let Some(a) = rest.next() {
        match a.as_str() {
            "--no-build" => build = false,
            "--port" => {
                port = rest
                    .next()
                    .and_then(|p| p.parse().ok())
                    .ok_or("--port needs a port number (0 for any free port)")?;
            }
            other => return Err(format!("serve: unknown option {other}")),
        }
    }
    if build {
        site::build()?;
    }
    site::serve(port)
}

/// The built site and the npm packages that drive Chromium (tests/browser/package-lock.json).
fn site_and_browser_driver() -> Result<(), String> {
    site::build()?;
    run_in(
        "tests/browser",
        "npm",
        &["ci", "--no-audit", "--no-fund"],
        &[],
    )
}

fn demo_data() -> Result<(), String> {
    build_cli()?;
    let bin = cli_binary();
    let bin = bin.to_str().unwrap_or("throughline");
    std::fs::create_dir_all(root().join("target/demo")).map_err(|e| e.to_string())?;
    run(
        bin,
        &[
            "simulate",
            "--out-dir",
            "demo-site/demo",
            "--seed",
            "2026",
            "--frames",
            "750",
            "--density",
            "12",
            "--miss-rate",
            "0.1",
            "--embedding-dim",
            "8",
            "--plan",
            "demo-site/demo/plan.json",
            "--render",
            "target/demo/frames.y4m",
        ],
    )?;
    // The footage for the browser: VP9 in WebM, a few MB. Without ffmpeg the committed copy stays.
    let encoded = run(
        "ffmpeg",
        &[
            "-loglevel",
            "error",
            "-y",
            "-i",
            "target/demo/frames.y4m",
            "-c:v",
            "libvpx-vp9",
            "-b:v",
            "0",
            "-crf",
            "38",
            "-row-mt",
            "1",
            "-deadline",
            "good",
            "-cpu-used",
            "4",
            "-an",
            "demo-site/demo/footage.webm",
        ],
    );
    if let Err(e) = encoded {
        eprintln!("note: {e}; demo-site/demo/footage.webm was left as it was (install ffmpeg to remake it)");
    }
    Ok(())
}

fn main() -> ExitCode {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let result = match args.first().map(String::as_str) {
        Some("demo") => demo(&args[1..]),
        Some("site") => site::build(),
        Some("serve") => serve(&args[1..]),
        Some("test") => test(),
        Some("bench") => bench::bench(&args[1..]),
        Some("demo-data") => demo_data(),
        _ => Err("usage: cargo xtask <demo [--no-serve] | site | serve [--no-build] [--port N] | test | bench [--quick | --grid | --counts | --detector | --page] | demo-data>".into()),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("xtask: {e}");
            ExitCode::FAILURE
        }
    }
}
