//! The zones' part of the interval grid: entries and exits of each zone per interval (all classes
//! together, as the report tallies them per interval), below the lines' grid, or alone for a plan
//! of zones only (a footfall count in and out of an area).

use super::table::{row, Separator};
use crate::report::Report;

/// The title row of the zones' block (the page's grid view knows a block by it).
pub const ZONES_TITLE: &str = "Zones: entries and exits per interval (all classes)";

/// Whether interval `i` is one the footage ends inside: as the lines' intervals say, else (a plan
/// of zones only) from the footage's length.
pub(super) fn partial(report: &Report, i: usize) -> bool {
    match report.screenlines.first() {
        Some(l) => l.intervals.get(i).is_some_and(|iv| iv.partial),
        None => {
            let end = (i + 1) as f64 * report.plan.interval_minutes * 60.0;
            end > report.duration_seconds + 1e-9
        }
    }
}

fn note(report: &Report, i: usize) -> String {
    if partial(report, i) {
        "cut short by the end of the footage".into()
    } else {
        String::new()
    }
}

/// The zones' block, after an empty row (the header's, for a plan of zones only): nothing when
/// the plan has no zones. `wide`: a row per interval (else a row per interval, zone and way).
pub(super) fn zones_block(out: &mut String, report: &Report, wide: bool, sep: Separator) {
    let Some(first) = report.zones.first() else {
        return;
    };
    if !out.ends_with("\n\n") {
        out.push('\n');
    }
    row(out, sep, &[ZONES_TITLE.to_string()]);
    match wide {
        true => {
            let mut head = vec!["Interval start".to_string(), "Interval end".to_string()];
            for z in &report.zones {
                head.push(format!("{} entries", z.name));
                head.push(format!("{} exits", z.name));
            }
            head.push("Note".into());
            row(out, sep, &head);
            for (i, iv) in first.intervals.iter().enumerate() {
                let mut cells = vec![iv.start.clone(), iv.end.clone()];
                for z in &report.zones {
                    let at = &z.intervals[i];
                    cells.push(at.entries.to_string());
                    cells.push(at.exits.to_string());
                }
                cells.push(note(report, i));
                row(out, sep, &cells);
            }
            let mut sums = vec!["Total".to_string(), String::new()];
            for z in &report.zones {
                sums.push(z.entries.to_string());
                sums.push(z.exits.to_string());
            }
            sums.push(String::new());
            row(out, sep, &sums);
        }
        false => {
            let head = [
                "interval_start",
                "interval_end",
                "zone",
                "way",
                "count",
                "note",
            ];
            row(out, sep, &head.map(String::from));
            for (i, iv) in first.intervals.iter().enumerate() {
                for z in &report.zones {
                    let at = &z.intervals[i];
                    for (way, n) in [("entry", at.entries), ("exit", at.exits)] {
                        let cells = [iv.start.clone(), iv.end.clone(), z.name.clone(), way.into()];
                        let mut cells = cells.to_vec();
                        cells.extend([n.to_string(), note(report, i)]);
                        row(out, sep, &cells);
                    }
                }
            }
        }
    }
}
