//! `throughline score-counts`: compare counts with a manual count (or another report).

use crate::files::{bad_input, looks_like_json_object, read_file, Failure};
use std::path::{Path, PathBuf};
use throughline_core::accuracy::{self as accuracy, Measures};
use throughline_core::project::{self, Project};
use throughline_core::report::Report;

/// The long help of the command (`--help`).
pub const LONG_ABOUT: &str = "Compare automated counts with a reference count.\n\n\
    REPORT is a report from `run` or `count`. The reference (--truth) is a manual count CSV with \
    the header screenline,direction,class,interval_start,interval_end,count (class may be empty or \
    `all` for all classes together; direction by the plan's labels or as forward/backward; one row \
    per line, direction, class and interval), another report, or a project \
    file whose hand counts (tallies, made in the page) are compared over their own frames. \
    Measures (NCHRP Report 797): APD = mean (A-M)/M, AAPD = mean |A-M|/M, WAPD = sum|A-M| / sum M, \
    correction factor = sum M / sum A, per screenline, direction and class over the intervals.";

/// Compare counts with a manual count (or another report): APD, AAPD, WAPD, correction factor.
#[derive(clap::Args)]
pub struct Args {
    /// Reference counts: a manual count CSV, a report JSON, or a project file with hand counts
    /// (tallies) made in the page.
    #[arg(long, value_name = "MANUAL")]
    truth: PathBuf,
    /// The automated report (JSON).
    report: PathBuf,
    /// Print one JSON object instead of a table.
    #[arg(long)]
    json: bool,
    /// Compare all classes together: the reference's rows of each line, direction and interval
    /// added up (done without asking when the report's tracks carry no classes).
    #[arg(long)]
    all_classes: bool,
}

fn read_json_value(path: &Path) -> Result<serde_json::Value, Failure> {
    let bytes = read_file(path)?;
    serde_json::from_slice(&bytes).map_err(|e| {
        let e = throughline_core::Error::from_json(
            throughline_core::ErrorKind::BadJson,
            &e,
            " (a report as `run` or `count` writes it; docs/report.schema.json)",
        );
        bad_input(path, e)
    })
}

pub fn run(args: Args) -> Result<(), Failure> {
    let (truth, report) = (&args.truth, &args.report);
    let bytes = read_file(truth)?;
    if is_project(&bytes) {
        if args.all_classes {
            return Err(crate::files::bad_usage(
                "--all-classes is for a manual count CSV or a report as the reference; a \
                 project's hand counts are compared as they were made (by class when a class was \
                 chosen, else all classes together)",
            ));
        }
        return tallies(truth, report, &bytes, args.json);
    }
    let report_json = read_json_value(report)?;
    let automated = accuracy::report_rows(&report_json).map_err(|e| bad_input(report, e))?;
    let reference = if looks_like_json_object(&bytes) {
        accuracy::report_rows(&read_json_value(truth)?).map_err(|e| bad_input(truth, e))?
    } else {
        accuracy::read_counts_csv_for(&bytes, Some(&report_json))
            .map_err(|e| bad_input(truth, e))?
    };
    let reference = classes_as_known(reference, &automated, &args);
    let acc = accuracy::compare(&automated, &reference);
    if acc.groups.is_empty() {
        let (left, known) = labels(&acc);
        return Err(bad_input(
            truth,
            format!(
                "no reference row names a screenline and direction of the report: check the names \
                 and the directions (the plan's labels, as in the counts CSV, or forward and backward); \
                 the reference has {left}; the report has {known}"
            ),
        ));
    }
    if args.json {
        println!("{}", serde_json::to_string_pretty(&acc).unwrap_or_default());
        return Ok(());
    }
    println!("screenline / direction / class: intervals, automated vs reference, APD, AAPD, WAPD, correction factor");
    let counted = |g: &&accuracy::GroupAccuracy| {
        g.measures.automated_total > 0 || g.measures.reference_total > 0
    };
    for g in acc.groups.iter().filter(counted) {
        println!(
            "{} / {} / {}: {}",
            g.screenline,
            g.direction,
            g.class,
            measures(&g.measures, "interval")
        );
    }
    let quiet = acc.groups.len() - acc.groups.iter().filter(counted).count();
    if quiet > 0 {
        println!("({quiet} more with no crossing in either count; --json lists them)");
    }
    println!("{}", pooled(&acc));
    if acc.automated_not_compared > 0 {
        eprintln!(
            "warning: {} of the report's counts are of classes the reference does not name for their \
             line and direction (tracks without classes count as `unclassified`), so they are left \
             out of the comparison: count tracks that carry classes (the tracks JSON, or `run`), or \
             compare all classes together with a counts CSV as the reference whose class column \
             is `all` (or empty)",
            acc.automated_not_compared
        );
    }
    if acc.unmatched_reference_rows > 0 {
        eprintln!("warning: {}", unmatched(&acc));
    }
    if let Some(apart) = &acc.intervals_apart {
        eprintln!("warning: {}", intervals_apart(apart));
    }
    Ok(())
}

/// Why no interval of the reference (`m0` to `m1`) is among the report's (`a0` to `a1`), and what
/// to check.
fn intervals_apart([m0, m1, a0, a1]: &[String; 4]) -> String {
    // A date on one side only: the times are written differently, not apart.
    let dated = |t: &str| t.contains('T');
    let how = if dated(m0) != dated(a0) {
        format!(
            "write the manual count's interval_start as the report writes them (like {a0}): \
             with a date when the plan has a start, as elapsed HH:MM:SS when it has none"
        )
    } else {
        "check the start time of the plan and of the manual count (a clock 12 hours apart, or \
         another date?); interval_start is HH:MM:SS, or a date and a time"
            .to_string()
    };
    format!(
        "none of the reference's intervals ({m0} to {m1}) is among the report's ({a0} to {a1}), so \
         every count compared reads as missed: {how}"
    )
}

/// The reference with all its classes added up, line by line, when asked (`--all-classes`) or when
/// the report's tracks carry no classes (said in a note).
fn classes_as_known(
    reference: Vec<accuracy::CountRow>,
    automated: &[accuracy::CountRow],
    args: &Args,
) -> Vec<accuracy::CountRow> {
    let unclassified = accuracy::only_unclassified(automated);
    if !args.all_classes && !unclassified {
        return reference;
    }
    if !args.all_classes {
        // On standard error, so that it is seen with --json too.
        eprintln!(
            "note: the report's tracks carry no classes (all `unclassified`: detections without \
             classes, or footage searched without the two heights?), so all classes are compared \
             together, the reference's rows of each line, direction and interval added up"
        );
    }
    accuracy::all_classes(&reference)
}

/// The pooled line: every compared cell together, the totals' own difference, and whether
/// reference rows were left out.
fn pooled(acc: &accuracy::Accuracy) -> String {
    let o = &acc.overall;
    let totals = (o.reference_total > 0).then(|| {
        let d = o.automated_total as f64 / o.reference_total as f64 - 1.0;
        let how = if o.automated_total == o.reference_total {
            // Equal totals can hide errors that cancel between cells.
            "the totals are equal, though errors in the cells may cancel (AAPD)".to_string()
        } else {
            format!("the totals differ by {:+.1}%", 100.0 * d)
        };
        format!("; {how} (APD and AAPD are means over the cells)")
    });
    let left_out = match acc.unmatched_reference_rows {
        0 => String::new(),
        1 => " — INCOMPLETE: 1 reference row left out (see the warning)".to_string(),
        n => format!(" — INCOMPLETE: {n} reference rows left out (see the warning)"),
    };
    format!(
        "all rows pooled: {}{}{left_out}",
        measures(o, "line, direction, class and interval cell"),
        totals.unwrap_or_default()
    )
}

/// The warning about reference rows left out for their line or direction, naming them and the
/// report's own (a typo in a label, or a capital letter, left rows out of a score that looked
/// perfect).
fn unmatched(acc: &accuracy::Accuracy) -> String {
    let (left, known) = labels(acc);
    let rows = match acc.unmatched_reference_rows {
        1 => "1 reference row names a screenline and direction the report does not have, so it is"
            .to_string(),
        n => format!(
            "{n} reference rows name a screenline and direction the report does not have, so they are"
        ),
    };
    format!(
        "{rows} left out and the comparison is incomplete: {left}; the report has {known} (check \
         the spelling and capital letters, as in the counts CSV)"
    )
}

/// The reference's lines and directions the report lacks (with their rows), and the report's
/// own, each a list of at most ten named.
fn labels(acc: &accuracy::Accuracy) -> (String, String) {
    let quoted = |l: &str, d: &str| format!("`{l}` / `{d}`");
    // At most this many of each list are named; the rest are counted.
    const NAMED: usize = 10;
    let listed = |names: Vec<String>| {
        if names.is_empty() {
            return "none".to_string();
        }
        let more = names.len().saturating_sub(NAMED);
        let mut text = names.into_iter().take(NAMED).collect::<Vec<_>>().join(", ");
        if more > 0 {
            text.push_str(&format!(" and {more} more"));
        }
        text
    };
    let left = acc.unmatched_labels.iter().map(|(l, d, n)| {
        let rows = if *n == 1 { "row" } else { "rows" };
        format!("{} ({n} {rows})", quoted(l, d))
    });
    let known = acc.known_labels.iter().map(|(l, d)| quoted(l, d));
    (listed(left.collect()), listed(known.collect()))
}

/// One row of the table: intervals, totals, APD, AAPD, WAPD and the correction factor.
fn measures(m: &Measures, what: &str) -> String {
    let pct = |v: Option<f64>| v.map_or("   n/a".to_string(), |x| format!("{:+6.1}%", 100.0 * x));
    let factor = |v: Option<f64>| v.map_or("n/a".to_string(), |x| format!("{x:.3}"));
    let plural = if m.intervals == 1 { "" } else { "s" };
    format!(
        "{} {what}{plural}, {} vs {}, APD {}, AAPD {}, WAPD {}, factor {}",
        m.intervals,
        m.automated_total,
        m.reference_total,
        pct(m.apd),
        pct(m.aapd),
        pct(m.wapd),
        factor(m.correction_factor)
    )
}

/// Whether the reference is a project file (its tallies are the hand counts).
fn is_project(bytes: &[u8]) -> bool {
    serde_json::from_slice::<serde_json::Value>(bytes)
        .ok()
        .and_then(|v| v.get("format")?.as_str().map(|f| f == project::FORMAT))
        .unwrap_or(false)
}

/// Each tally of a project file beside the report's counts of the same frames.
fn tallies(truth: &Path, report_path: &Path, bytes: &[u8], json: bool) -> Result<(), Failure> {
    let text = std::str::from_utf8(bytes).map_err(|_| bad_input(truth, "not UTF-8 text"))?;
    let project = Project::from_json(text).map_err(|e| bad_input(truth, e))?;
    if project.tallies.is_empty() {
        return Err(bad_input(
            truth,
            "the project holds no hand counts (tallies) to compare with",
        ));
    }
    let report_text = String::from_utf8_lossy(&read_file(report_path)?).into_owned();
    let report = Report::from_json(&report_text).map_err(|e| bad_input(report_path, e))?;
    let checks: Vec<_> = project
        .tallies
        .iter()
        .map(|t| accuracy::check(t, &report))
        .collect();
    if json {
        println!(
            "{}",
            serde_json::to_string_pretty(&checks).unwrap_or_default()
        );
        return Ok(());
    }
    for c in &checks {
        println!(
            "hand count by {} ({}), {} to {}:",
            c.who, c.made, c.from, c.to
        );
        for g in &c.groups {
            println!(
                "  {} / {} / {}: {} by hand, {} automated; {}",
                g.screenline,
                g.direction,
                g.class,
                g.manual,
                g.automated,
                measures(&g.measures, "interval")
            );
        }
        println!("  all: {}", measures(&c.overall, "interval"));
        println!("  {}", c.caution);
    }
    Ok(())
}
