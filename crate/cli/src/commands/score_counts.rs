//! `throughline score-counts`: compare counts with a manual count (or another report).

use crate::files::{bad_input, looks_like_json_object, read_file, Failure};
use std::path::{Path, PathBuf};
use throughline_core::accuracy::{self as accuracy, Measures};

/// The long help of the command (`--help`).
pub const LONG_ABOUT: &str = "Compare automated counts with a reference count.\n\n\
    REPORT is a report from `run` or `count`. The reference (--truth) is a manual count CSV with \
    the header screenline,direction,class,interval_start,interval_end,count (class may be empty or \
    `all` for all classes together; direction uses the plan's labels), or another report. \
    Measures (NCHRP Report 797): APD = mean (A-M)/M, AAPD = mean |A-M|/M, WAPD = sum|A-M| / sum M, \
    correction factor = sum M / sum A, per screenline, direction and class over the intervals.";

/// Compare counts with a manual count (or another report): APD, AAPD, WAPD, correction factor.
#[derive(clap::Args)]
pub struct Args {
    /// Reference counts: a manual count CSV, or a report JSON.
    #[arg(long, value_name = "MANUAL")]
    truth: PathBuf,
    /// The automated report (JSON).
    report: PathBuf,
    /// Print one JSON object instead of a table.
    #[arg(long)]
    json: bool,
}

fn read_json_value(path: &Path) -> Result<serde_json::Value, Failure> {
    let bytes = read_file(path)?;
    serde_json::from_slice(&bytes).map_err(|e| bad_input(path, format!("not valid JSON: {e}")))
}

pub fn run(args: Args) -> Result<(), Failure> {
    let (truth, report) = (&args.truth, &args.report);
    let automated =
        accuracy::report_rows(&read_json_value(report)?).map_err(|e| bad_input(report, e))?;
    let bytes = read_file(truth)?;
    let reference = if looks_like_json_object(&bytes) {
        accuracy::report_rows(&read_json_value(truth)?).map_err(|e| bad_input(truth, e))?
    } else {
        accuracy::read_counts_csv(&bytes).map_err(|e| bad_input(truth, e))?
    };
    let acc = accuracy::compare(&automated, &reference);
    if acc.groups.is_empty() {
        return Err(bad_input(
            truth,
            "no reference row names a screenline and direction of the report: check the names and the \
             direction labels (they must be the plan's labels, as in the counts CSV)",
        ));
    }
    if args.json {
        println!("{}", serde_json::to_string_pretty(&acc).unwrap_or_default());
        return Ok(());
    }
    println!("screenline / direction / class: intervals, automated vs reference, APD, AAPD, WAPD, correction factor");
    for g in &acc.groups {
        println!(
            "{} / {} / {}: {}",
            g.screenline,
            g.direction,
            g.class,
            measures(&g.measures)
        );
    }
    println!("all: {}", measures(&acc.overall));
    if acc.unmatched_reference_rows > 0 {
        eprintln!(
            "warning: {} reference rows name a screenline or direction the report does not have",
            acc.unmatched_reference_rows
        );
    }
    Ok(())
}

/// One row of the table: intervals, totals, APD, AAPD, WAPD and the correction factor.
fn measures(m: &Measures) -> String {
    let pct = |v: Option<f64>| v.map_or("   n/a".to_string(), |x| format!("{:+6.1}%", 100.0 * x));
    let factor = |v: Option<f64>| v.map_or("n/a".to_string(), |x| format!("{x:.3}"));
    format!(
        "{} intervals, {} vs {}, APD {}, AAPD {}, WAPD {}, factor {}",
        m.intervals,
        m.automated_total,
        m.reference_total,
        pct(m.apd),
        pct(m.aapd),
        pct(m.wapd),
        factor(m.correction_factor)
    )
}
