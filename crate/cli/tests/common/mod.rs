//! What the command line's tests share: running the binary, scratch folders, the demo's files,
//! and the check for ffmpeg.
#![allow(dead_code)] // each test file uses some of these

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

pub fn throughline(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_throughline"))
        .args(args)
        .output()
        .expect("the binary runs")
}

pub fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

pub fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

/// A fresh folder under the target directory for one test.
pub fn scratch(name: &str) -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join(name);
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).expect("scratch folder");
    dir
}

pub fn demo(file: &str) -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../demo-site/demo")
        .join(file)
        .display()
        .to_string()
}

/// `throughline run` on the demo's detections (CSV) and plan, with `more` arguments after them.
#[allow(dead_code)] // not every test file uses it
pub fn run_demo(more: &[&str]) -> Output {
    let (detections, plan) = (demo("detections.csv"), demo("plan.json"));
    let mut args = vec!["run", &detections, "--plan", &plan];
    args.extend_from_slice(more);
    throughline(&args)
}

/// `throughline count` of a tracks file with the demo's plan, with `more` arguments after them.
#[allow(dead_code)] // not every test file uses it
pub fn count_with_demo_plan(tracks: &str, more: &[&str]) -> Output {
    let plan = demo("plan.json");
    let mut args = vec!["count", tracks, "--plan", &plan];
    args.extend_from_slice(more);
    throughline(&args)
}

/// The demo's report, written by `throughline run` into `dir` as `report.json`; its path.
#[allow(dead_code)] // not every test file uses it
pub fn demo_report(dir: &Path) -> String {
    let report = dir.join("report.json").display().to_string();
    let o = run_demo(&["-o", &report, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    report
}

/// `throughline score-counts` of `report` against the demo's true counts, with `more` arguments.
#[allow(dead_code)] // not every test file uses it
pub fn score_against_demo_truth(report: &str, more: &[&str]) -> Output {
    let truth = demo("truth_counts.csv");
    let mut args = vec!["score-counts", "--truth", &truth, report];
    args.extend_from_slice(more);
    throughline(&args)
}

/// Whether ffmpeg and ffprobe run. When they do not, the test `name` says it is skipped (on the
/// terminal itself: the test harness keeps back what `eprintln!` prints from a passing test), or
/// fails when `THROUGHLINE_REQUIRE_FFMPEG` is `1`.
pub fn ffmpeg_or_skip(name: &str) -> bool {
    let runs = |program: &str| {
        Command::new(program)
            .arg("-version")
            .output()
            .is_ok_and(|o| o.status.success())
    };
    if runs("ffmpeg") && runs("ffprobe") {
        return true;
    }
    let required = std::env::var("THROUGHLINE_REQUIRE_FFMPEG").is_ok_and(|v| v == "1");
    assert!(
        !required,
        "{name}: ffmpeg is not installed and THROUGHLINE_REQUIRE_FFMPEG=1 (apt-get install ffmpeg)"
    );
    let _ = writeln!(
        std::io::stderr(),
        "skipped {name}: ffmpeg is not installed (apt-get install ffmpeg; `cargo xtask test` does)"
    );
    false
}

pub fn write(dir: &Path, name: &str, content: &[u8]) -> String {
    let p = dir.join(name);
    std::fs::write(&p, content).expect("write input");
    p.display().to_string()
}

/// The demo's detections (benchmark text) up to frame `last`, written to `dir` as `early.txt`:
/// a clip of detections that ends before its footage does. Its path.
#[allow(dead_code)] // not every test file uses it
pub fn demo_detections_until(dir: &Path, last: u32) -> String {
    let text = std::fs::read_to_string(demo("detections.txt")).unwrap();
    let early: String = text
        .lines()
        .filter(|l| l.split(',').next().and_then(|f| f.parse::<u32>().ok()) <= Some(last))
        .map(|l| format!("{l}\n"))
        .collect();
    write(dir, "early.txt", early.as_bytes())
}
