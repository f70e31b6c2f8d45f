//! `bench --page`: "Find moving objects" in headless Chromium on the demo re-encoded at two sizes
//! and in two containers (tests/bench/page_detector.mjs). Prints a table; BENCHMARKS.md records it
//! by hand. The goals table takes its 1280x720 figures from the same script ([`page_720p`]).

use crate::paths::target;
use crate::sh::node_in;
use crate::site::build_with_browser_driver;

pub fn page_bench() -> Result<(), String> {
    build_with_browser_driver()?;
    node_in(".", &["tests/bench/page_detector.mjs"])
}

/// Frames a second found in the page at 1280x720, for each container (`webm`, `mp4`), as the
/// page's status line gives them; `None` where the page could not decode with WebCodecs.
pub fn page_720p() -> Result<Vec<(String, Option<f64>)>, String> {
    build_with_browser_driver()?;
    let out = target("page-bench-720p.json")?;
    let path = out.display().to_string();
    node_in(
        ".",
        &[
            "tests/bench/page_detector.mjs",
            "--only",
            "1280x720",
            "--json",
            &path,
        ],
    )?;
    let text = std::fs::read_to_string(&out).map_err(|e| format!("{path}: {e}"))?;
    let figures: serde_json::Value =
        serde_json::from_str(&text).map_err(|e| format!("{path}: {e}"))?;
    let rows = figures.as_array().ok_or(format!("{path}: not a list"))?;
    Ok(rows
        .iter()
        .map(|r| {
            let rate = r["frames"].as_f64().zip(r["seconds"].as_f64());
            let rate = rate.filter(|_| r["webCodecs"] == true).map(|(f, s)| f / s);
            (r["container"].as_str().unwrap_or("?").to_string(), rate)
        })
        .collect())
}
