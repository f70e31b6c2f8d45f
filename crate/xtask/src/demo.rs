//! `cargo xtask demo [--no-serve]`: the main job on the bundled demo with the command line, its
//! comparison with the scene's truth, then the browser app built and served; and `cargo xtask
//! demo-data`: the bundled demo made again by the simulator.

use crate::builds::build_cli;
use crate::paths::{cli_binary, root, target};
use crate::serve::{serve, DEFAULT_PORT};
use crate::sh::run;
use crate::site;

pub fn demo(args: &[String]) -> Result<(), String> {
    eprintln!(
        "Building the command line (release; the first time on a fresh machine takes a few \
         minutes, with no output while it compiles)"
    );
    build_cli()?;
    std::fs::create_dir_all(root().join("out/demo"))
        .map_err(|e| format!("cannot create out/demo: {e}"))?;
    let bin = cli_binary()?;
    count_the_demo(&bin)?;
    println!("\nCounts against the scene's true crossings (as you would check a manual count):\n");
    run(
        &bin,
        &[
            "score-counts",
            "--truth",
            "demo-site/demo/truth_counts.csv",
            "out/demo/report.json",
        ],
    )?;
    println!(
        "\nFor comparing trackers: the tracks against the scene's known truth (HOTA, IDF1 and \
         MOTA near 100% are best). These score every box and every identity in every frame, \
         partly hidden people and missed boxes included, so they stay well below 100% even where \
         every crossing is counted right, as here:\n"
    );
    run(
        &bin,
        &[
            "score",
            "--truth",
            "demo-site/demo/truth.txt",
            "out/demo/tracks.txt",
        ],
    )?;
    println!(
        "\nOn your own files: {bin} run DETECTIONS --plan PLAN -o report.json --csv counts.csv\n\
         With footage and no detections (a fixed camera): {bin} run --footage VIDEO --plan PLAN \
         --detector-config HEIGHTS.json -o report.json (docs/detector-settings.md)"
    );
    println!("\nNow the browser app, which does the same in the page:");
    site::build()?;
    if args.iter().any(|a| a == "--no-serve") {
        println!(
            "To open it: `cargo xtask serve` and the address it prints, or the single file \
             demo-site/throughline-offline.html in any browser (nothing is fetched)."
        );
        return Ok(());
    }
    serve(DEFAULT_PORT)
}

/// `throughline run` on the demo into out/demo/, and what it wrote.
fn count_the_demo(bin: &str) -> Result<(), String> {
    run(
        bin,
        &[
            "run",
            "demo-site/demo/detections.csv",
            "--plan",
            "demo-site/demo/plan.json",
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
        "  out/demo/counts.csv   screenline,direction,class,interval_start,interval_end,count,partial"
    );
    println!("  out/demo/tracks.txt   the tracks (benchmark text)");
    Ok(())
}

/// `demo-data`: simulates and renders the demo (seed 2026), counts its truth with the demo's plan,
/// and encodes the footage to VP9 (without ffmpeg the committed footage is kept).
pub fn demo_data() -> Result<(), String> {
    build_cli()?;
    let bin = cli_binary()?;
    let frames = target("demo/frames.y4m")?;
    let dir = frames.parent().unwrap_or(&frames);
    std::fs::create_dir_all(dir).map_err(|e| format!("{}: {e}", dir.display()))?;
    let frames = frames.display().to_string();
    run(
        &bin,
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
            &frames,
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
            &frames,
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
