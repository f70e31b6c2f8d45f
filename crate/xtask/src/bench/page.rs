//! `bench --page`: "Find moving objects" in headless Chromium on the demo re-encoded at two sizes
//! and in two containers (tests/bench/page_detector.mjs). Prints a table; BENCHMARKS.md records it
//! by hand.

use crate::sh::node_in;
use crate::site::build_with_browser_driver;

pub fn page_bench() -> Result<(), String> {
    build_with_browser_driver()?;
    node_in(".", &["tests/bench/page_detector.mjs"])
}
