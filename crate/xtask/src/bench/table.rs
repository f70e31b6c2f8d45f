//! Writing a table into BENCHMARKS.md between its markers, and the cells the tables share.

use crate::paths::root;

/// Replaces the text from `begin` to `end` in BENCHMARKS.md with `table` (appended when the
/// markers are missing).
pub fn write_section(begin: &str, end: &str, table: &str) -> Result<(), String> {
    let path = root().join("BENCHMARKS.md");
    let old = std::fs::read_to_string(&path).unwrap_or_default();
    let new = match (old.find(begin), old.find(end)) {
        (Some(a), Some(b)) if a < b => format!("{}{table}{}", &old[..a], &old[b + end.len()..]),
        _ => format!("{old}\n{table}\n"),
    };
    std::fs::write(&path, new).map_err(|e| e.to_string())
}

/// The count error cell: (counted − true) / true as a signed percentage, "n/a" when true is 0.
pub fn error(counted: u64, truth: u64) -> String {
    if truth == 0 {
        "n/a".into()
    } else {
        format!(
            "{:+.1}%",
            100.0 * (counted as f64 - truth as f64) / truth as f64
        )
    }
}
