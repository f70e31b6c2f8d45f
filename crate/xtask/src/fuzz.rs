//! `cargo xtask fuzz`: the fuzz targets of crate/fuzz (`cargo fuzz`, libFuzzer, on the nightly
//! toolchain), one per reader of outside bytes. `cargo xtask test` runs each for a few seconds
//! ([`smoke`]); `cargo xtask fuzz [--runs N | --seconds S] [TARGET…]` is the longer campaign and
//! prints a table of executions and crashes for BENCHMARKS.md.
//!
//! Each run starts from the committed seeds (crate/fuzz/seeds/<target>/), small clips ffmpeg cuts
//! from the demo footage, the corpus kept from earlier runs (<target dir>/fuzz/corpus/) and every
//! input that once crashed (crate/fuzz/regressions/<target>/, run first: a crash there fails).
//! A new crash is written to <target dir>/fuzz/artifacts/<target>/.

use std::path::{Path, PathBuf};
use std::process::Command;

use crate::paths::{root, target};
use crate::sh::{run, works};

/// Every fuzz target (crate/fuzz/fuzz_targets/<name>.rs).
pub const TARGETS: [&str; 15] = [
    "detections",
    "pieces",
    "csv_pieces",
    "halves",
    "tracks",
    "plan",
    "counts",
    "work",
    "settings",
    "still",
    "y4m",
    "webm",
    "mp4",
    "manifest",
    "merged",
];

/// Seconds each target runs within `cargo xtask test`.
const SMOKE_SECONDS: u32 = 8;

/// How long a run goes on.
#[derive(Clone, Copy)]
enum Budget {
    Runs(u64),
    Seconds(u32),
}

/// How the targets are built: with AddressSanitizer (cargo fuzz's default), or `--plain`, without
/// it, several times as many runs a second (the readers are safe Rust: panics, hangs and the
/// resident-memory limit are still caught, but not a single oversized allocation that the
/// sanitizer's allocator would refuse; what AddressSanitizer adds otherwise is for unsafe code, of
/// which the readers have none).
#[derive(Clone, Copy, PartialEq)]
enum Build {
    Checked,
    Plain,
}

impl Build {
    /// The build folder (under the target directory) and the cargo fuzz flags.
    fn folder_and_flags(self) -> (&'static str, &'static [&'static str]) {
        match self {
            Build::Checked => ("fuzz/build", &[]),
            Build::Plain => ("fuzz/build-plain", &["--sanitizer", "none"]),
        }
    }
}

/// One target's result.
struct Outcome {
    target: &'static str,
    executions: u64,
    seconds: f64,
    crashed: Option<String>,
}

/// The short run of every target, as part of the test suite.
pub fn smoke() -> Result<(), String> {
    let outcomes = campaign(&TARGETS, Budget::Seconds(SMOKE_SECONDS), Build::Checked)?;
    report(&outcomes)
}

/// `cargo xtask fuzz [--runs N | --seconds S] [--plain] [TARGET…]`.
pub fn command(args: &[String]) -> Result<(), String> {
    let mut budget = Budget::Runs(10_000_000);
    let mut build = Build::Checked;
    let mut chosen: Vec<&'static str> = Vec::new();
    let mut it = args.iter();
    while let Some(a) = it.next() {
        let mut number = |what: &str| {
            it.next()
                .and_then(|v| v.parse::<u64>().ok())
                .ok_or(format!("{what} takes a whole number"))
        };
        match a.as_str() {
            "--runs" => budget = Budget::Runs(number("--runs")?),
            "--plain" => build = Build::Plain,
            "--seconds" => {
                let s = number("--seconds")?;
                budget = Budget::Seconds(u32::try_from(s).map_err(|_| "--seconds: too many")?);
            }
            name => chosen.push(
                TARGETS
                    .iter()
                    .find(|t| **t == name)
                    .copied()
                    .ok_or(format!(
                        "no fuzz target {name}; they are: {}",
                        TARGETS.join(" ")
                    ))?,
            ),
        }
    }
    let targets = if chosen.is_empty() {
        TARGETS.to_vec()
    } else {
        chosen
    };
    let outcomes = campaign(&targets, budget, build)?;
    println!("| target | executions | seconds | executions a second | crashes |");
    println!("|---|---:|---:|---:|---|");
    for o in &outcomes {
        println!(
            "| `{}` | {} | {:.0} | {:.0} | {} |",
            o.target,
            o.executions,
            o.seconds,
            o.executions as f64 / o.seconds.max(0.001),
            o.crashed.as_deref().unwrap_or("none")
        );
    }
    report(&outcomes)
}

fn report(outcomes: &[Outcome]) -> Result<(), String> {
    let crashed: Vec<String> = outcomes
        .iter()
        .filter_map(|o| o.crashed.as_ref().map(|c| format!("{}: {c}", o.target)))
        .collect();
    if crashed.is_empty() {
        Ok(())
    } else {
        Err(format!(
            "fuzzing found crashes:\n  {}",
            crashed.join("\n  ")
        ))
    }
}

fn campaign(targets: &[&'static str], budget: Budget, how: Build) -> Result<Vec<Outcome>, String> {
    ensure_tools()?;
    let (folder, flags) = how.folder_and_flags();
    let build = target(folder)?.display().to_string();
    run_fuzz(&[&["build"], flags].concat(), &build)?;
    let footage = footage_seeds()?;
    let mut out = Vec::new();
    for &t in targets {
        out.push(one(t, budget, (&build, flags), &footage)?);
    }
    Ok(out)
}

/// The nightly toolchain and cargo-fuzz, installed when missing (toolchain.md: both are on the
/// test machines; a fresh machine gets them from rustup and crates.io).
fn ensure_tools() -> Result<(), String> {
    if !works_with("rustup", &["run", "nightly", "cargo", "--version"]) {
        run(
            "rustup",
            &["toolchain", "install", "nightly", "--profile", "minimal"],
        )?;
    }
    if !works_with("cargo", &["+nightly", "fuzz", "--version"]) {
        run(
            "cargo",
            &["install", "cargo-fuzz", "--version", "0.13.1", "--locked"],
        )?;
    }
    Ok(())
}

fn works_with(program: &str, args: &[&str]) -> bool {
    Command::new(program)
        .args(args)
        .output()
        .is_ok_and(|o| o.status.success())
}

/// `cargo +nightly fuzz <args>` on crate/fuzz, building in its own folder (its flags differ).
fn run_fuzz(args: &[&str], build: &str) -> Result<std::process::Output, String> {
    let mut all = vec!["+nightly", "fuzz"];
    all.extend_from_slice(&args[..1]);
    all.extend_from_slice(&["--fuzz-dir", "crate/fuzz"]);
    all.extend_from_slice(&args[1..]);
    eprintln!("+ cargo {}", all.join(" "));
    let output = Command::new("cargo")
        .args(&all)
        .env("CARGO_TARGET_DIR", build)
        .current_dir(root())
        .output()
        .map_err(|e| format!("cannot start cargo fuzz: {e}"))?;
    if args[0] == "build" && !output.status.success() {
        return Err(format!(
            "cargo fuzz build failed:\n{}",
            String::from_utf8_lossy(&output.stderr)
        ));
    }
    Ok(output)
}

/// Runs one target; its executions, time and any crash.
fn one(
    t: &'static str,
    budget: Budget,
    (build, flags): (&str, &[&str]),
    footage: &Path,
) -> Result<Outcome, String> {
    let corpus = fresh_dir(&target(&format!("fuzz/corpus/{t}"))?, false)?;
    let artifacts = fresh_dir(&target(&format!("fuzz/artifacts/{t}"))?, true)?;
    let mut dirs = vec![corpus];
    for extra in [
        root().join("crate/fuzz/seeds").join(t),
        footage.join(t),
        root().join("crate/fuzz/regressions").join(t),
    ] {
        if extra.is_dir() {
            dirs.push(extra);
        }
    }
    let limit = match budget {
        Budget::Runs(n) => format!("-runs={n}"),
        Budget::Seconds(s) => format!("-max_total_time={s}"),
    };
    let prefix = format!("-artifact_prefix={}/", artifacts.display());
    let mut args: Vec<String> = vec!["run".into()];
    args.extend(flags.iter().map(|f| f.to_string()));
    args.push(t.into());
    args.extend(dirs.iter().map(|d| d.display().to_string()));
    args.extend(
        [
            "--",
            "-timeout=10",
            "-rss_limit_mb=2048",
            "-max_len=65536",
            "-print_final_stats=1",
        ]
        .map(String::from),
    );
    args.push(limit);
    args.push(prefix);
    let started = std::time::Instant::now();
    let refs: Vec<&str> = args.iter().map(String::as_str).collect();
    let output = run_fuzz(&refs, build)?;
    let seconds = started.elapsed().as_secs_f64();
    let log = String::from_utf8_lossy(&output.stderr);
    let executions = log
        .lines()
        .find_map(|l| l.strip_prefix("stat::number_of_executed_units:"))
        .and_then(|v| v.trim().parse().ok())
        .unwrap_or(0);
    let crashed = (!output.status.success()).then(|| {
        let saved = std::fs::read_dir(&artifacts)
            .map(|d| {
                d.filter_map(Result::ok)
                    .map(|e| e.path().display().to_string())
                    .collect::<Vec<_>>()
                    .join(", ")
            })
            .unwrap_or_default();
        let why = log
            .lines()
            .find(|l| l.contains("panicked at") || l.contains("ERROR: libFuzzer"))
            .unwrap_or("the fuzzer stopped")
            .trim()
            .to_string();
        format!("{why} (input: {saved})")
    });
    eprintln!("fuzz {t}: {executions} executions in {seconds:.0} s");
    Ok(Outcome {
        target: t,
        executions,
        seconds,
        crashed,
    })
}

/// A folder, made if missing (emptied first when `empty`).
fn fresh_dir(dir: &Path, empty: bool) -> Result<PathBuf, String> {
    if empty {
        let _ = std::fs::remove_dir_all(dir);
    }
    std::fs::create_dir_all(dir).map_err(|e| format!("{}: {e}", dir.display()))?;
    Ok(dir.to_path_buf())
}

/// One small frame, for a still.
const ONE: [&str; 4] = ["-frames:v", "1", "-vf", "scale=48:32"];

/// Small clips of the demo footage in each container and codec the page reads, and stills, cut
/// by ffmpeg (installed by the test task): seeds for the footage targets. The WebM seeds lack the
/// four bytes of the EBML magic and the MP4 seeds lack nothing (the targets add the magic).
fn footage_seeds() -> Result<PathBuf, String> {
    let dir = target("fuzz/footage-seeds")?;
    if dir.join("done").exists() {
        return Ok(dir);
    }
    if !works("ffmpeg", "-version") {
        eprintln!("fuzz: no ffmpeg, so no footage seeds (the committed seeds only)");
        return Ok(dir);
    }
    let demo = root()
        .join("demo-site/demo/footage.webm")
        .display()
        .to_string();
    let small = ["-frames:v", "3", "-vf", "scale=48:32", "-an"];
    let clips: [(&str, &str, &[&str]); 8] = [
        ("webm", "vp9.webm", &["-c:v", "libvpx-vp9", "-b:v", "50k"]),
        ("webm", "vp8.webm", &["-c:v", "libvpx", "-b:v", "50k"]),
        (
            "webm",
            "av1.webm",
            &["-c:v", "libaom-av1", "-cpu-used", "8"],
        ),
        ("mp4", "h264.mp4", &["-c:v", "libx264", "-bf", "2"]),
        (
            "mp4",
            "frag.mp4",
            &["-c:v", "libx264", "-movflags", "frag_keyframe+empty_moov"],
        ),
        ("mp4", "hevc.mp4", &["-c:v", "libx265", "-tag:v", "hvc1"]),
        ("y4m", "small.y4m", &["-pix_fmt", "yuv420p"]),
        ("still", "still.png", &[]),
    ];
    for (t, name, codec) in clips {
        std::fs::create_dir_all(dir.join(t)).map_err(|e| e.to_string())?;
        let out = dir.join(t).join(name);
        let mut args = vec!["-v", "error", "-y", "-i", &demo];
        // A still is one frame; a clip three.
        args.extend_from_slice(if t == "still" { &ONE } else { &small });
        args.extend_from_slice(codec);
        let path = out.display().to_string();
        args.push(&path);
        if !works_with("ffmpeg", &args) {
            eprintln!("fuzz: ffmpeg could not make the seed {name}; going on without it");
            continue;
        }
        if t == "webm" {
            let bytes = std::fs::read(&out).map_err(|e| e.to_string())?;
            std::fs::write(&out, bytes.get(4..).unwrap_or_default()).map_err(|e| e.to_string())?;
        }
    }
    let jpeg = dir.join("still/still.jpg").display().to_string();
    let mut args = vec!["-v", "error", "-y", "-i", &demo];
    args.extend_from_slice(&ONE);
    args.push(&jpeg);
    let _ = works_with("ffmpeg", &args);
    std::fs::write(dir.join("done"), "").map_err(|e| e.to_string())?;
    Ok(dir)
}
