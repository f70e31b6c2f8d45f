//! The interval grid a count is handed in as: one row per interval (the recording's clock time),
//! one column per line × direction × class, row and column totals, and the peak hour of the grid's
//! total with its peak hour factor marked. Or, for spreadsheet users who pivot, one row per
//! interval, line, direction and class. The zones' entries and exits follow (`zone_grid`).

use super::table::{header, row, Separator};
use super::{header_block, Context};
use crate::count::{peak_hour, HourRun};
use crate::report::{IntervalCount, Report};

/// The grid's layout.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum GridLayout {
    /// One row per interval, one column per line, direction and class.
    Wide,
    /// One row per interval, line, direction and class.
    Long,
}

/// One column of the grid: a line, a direction (its label) and a class.
struct Column {
    line: usize,
    forward: bool,
    label: String,
    class: String,
}

fn columns(report: &Report) -> Vec<Column> {
    let mut out = Vec::new();
    for (k, l) in report.screenlines.iter().enumerate() {
        for (forward, label) in [(true, &l.forward_label), (false, &l.backward_label)] {
            for class in l.by_class.keys() {
                out.push(Column {
                    line: k,
                    forward,
                    label: format!("{} {} {}", l.name, label, class),
                    class: class.clone(),
                });
            }
        }
    }
    out
}

/// Every column's count in every interval: `counts[interval][column]`.
fn counts(report: &Report, cols: &[Column]) -> Vec<Vec<u64>> {
    let n = report.screenlines.first().map_or(0, |l| l.intervals.len());
    (0..n)
        .map(|i| {
            cols.iter()
                .map(|c| {
                    let d = report.screenlines[c.line].intervals[i]
                        .by_class
                        .get(&c.class)
                        .copied()
                        .unwrap_or_default();
                    if c.forward {
                        d.forward
                    } else {
                        d.backward
                    }
                })
                .collect()
        })
        .collect()
}

/// Intervals per hour, when a whole number of intervals makes an hour.
fn per_hour(report: &Report) -> Option<usize> {
    let n = 60.0 / report.plan.interval_minutes;
    (n.fract() == 0.0 && n >= 1.0).then_some(n as usize)
}

/// The counts laid out: columns, counts per interval and column, row totals, and the peak hour of
/// the row totals over whole intervals (its run, and intervals per hour).
struct Grid<'a> {
    intervals: &'a [IntervalCount],
    cols: Vec<Column>,
    table: Vec<Vec<u64>>,
    totals: Vec<u64>,
    /// Indices of the whole (not cut short) intervals.
    whole: Vec<usize>,
    peak: Option<(HourRun, usize)>,
}

impl<'a> Grid<'a> {
    fn of(report: &'a Report) -> Option<Grid<'a>> {
        let intervals = &report.screenlines.first()?.intervals;
        let cols = columns(report);
        let table = counts(report, &cols);
        let totals: Vec<u64> = table.iter().map(|r| r.iter().sum()).collect();
        let whole: Vec<usize> = (0..intervals.len())
            .filter(|&i| !intervals[i].partial)
            .collect();
        let whole_totals: Vec<u64> = whole.iter().map(|&i| totals[i]).collect();
        let peak = per_hour(report).and_then(|n| peak_hour(&whole_totals, n).map(|r| (r, n)));
        Some(Grid {
            intervals,
            cols,
            table,
            totals,
            whole,
            peak,
        })
    }

    fn in_peak(&self, i: usize) -> bool {
        self.peak
            .is_some_and(|(r, n)| self.whole[r.first..r.first + n].contains(&i))
    }

    fn wide(&self, out: &mut String, sep: Separator) {
        let mut head = vec!["Interval start".to_string(), "Interval end".to_string()];
        head.extend(self.cols.iter().map(|c| c.label.clone()));
        head.extend(["Total", "Peak hour", "Note"].map(String::from));
        row(out, sep, &head);
        for (i, iv) in self.intervals.iter().enumerate() {
            let mut cells = vec![iv.start.clone(), iv.end.clone()];
            cells.extend(self.table[i].iter().map(u64::to_string));
            cells.push(self.totals[i].to_string());
            cells.push(if self.in_peak(i) {
                "peak".into()
            } else {
                String::new()
            });
            cells.push(note(iv).into());
            row(out, sep, &cells);
        }
        let mut sums = vec!["Total".to_string(), String::new()];
        for c in 0..self.cols.len() {
            sums.push(self.table.iter().map(|r| r[c]).sum::<u64>().to_string());
        }
        sums.push(self.totals.iter().sum::<u64>().to_string());
        sums.extend([String::new(), String::new()]);
        row(out, sep, &sums);
    }

    fn long(&self, out: &mut String, sep: Separator, report: &Report) {
        let head = [
            "interval_start",
            "interval_end",
            "screenline",
            "direction",
            "class",
            "count",
            "peak_hour",
            "note",
        ];
        row(out, sep, &head.map(String::from));
        for (i, iv) in self.intervals.iter().enumerate() {
            for (c, col) in self.cols.iter().enumerate() {
                let l = &report.screenlines[col.line];
                let label = if col.forward {
                    &l.forward_label
                } else {
                    &l.backward_label
                };
                let peak = if self.in_peak(i) { "yes" } else { "no" };
                row(
                    out,
                    sep,
                    &[
                        iv.start.clone(),
                        iv.end.clone(),
                        l.name.clone(),
                        label.clone(),
                        col.class.clone(),
                        self.table[i][c].to_string(),
                        peak.into(),
                        note(iv).into(),
                    ],
                );
            }
        }
    }

    /// The peak hour of all lines together and its factor, below the table.
    fn peak_rows(&self, out: &mut String, sep: Separator) {
        match self.peak {
            Some((r, n)) => {
                let first = &self.intervals[self.whole[r.first]];
                let last = &self.intervals[self.whole[r.first + n - 1]];
                row(
                    out,
                    sep,
                    &[
                        "Peak hour (all lines)".into(),
                        format!("{} to {}", first.start, last.end),
                        r.volume.to_string(),
                    ],
                );
                row(
                    out,
                    sep,
                    &[
                        "Peak hour factor".into(),
                        format!("{:.3}", r.phf),
                        format!("busiest interval {}", r.peak_interval_volume),
                    ],
                );
            }
            None => row(
                out,
                sep,
                &[
                    "Peak hour (all lines)".into(),
                    "none: the footage holds less than one hour of whole intervals".into(),
                ],
            ),
        }
    }
}

/// An interval's note: said of one the footage ends inside (its count is of part of it).
fn note(iv: &crate::report::IntervalCount) -> &'static str {
    if iv.partial {
        "cut short by the end of the footage"
    } else {
        ""
    }
}

/// The grid as CSV or tab-separated text, headed by the site, recording, plan, inputs and caution.
pub fn interval_grid(report: &Report, ctx: &Context, layout: GridLayout, sep: Separator) -> String {
    let mut out = String::new();
    header(&mut out, sep, &header_block(report, ctx));
    match Grid::of(report) {
        Some(grid) => {
            match layout {
                GridLayout::Wide => grid.wide(&mut out, sep),
                GridLayout::Long => grid.long(&mut out, sep, report),
            }
            out.push('\n');
            grid.peak_rows(&mut out, sep);
        }
        // A plan of zones only: their block alone (a footfall count in and out of an area).
        None if !report.zones.is_empty() => {}
        None => {
            let why = "The plan has no lines or zones: nothing to tabulate.";
            row(&mut out, sep, &[why.into()]);
            return out;
        }
    }
    let wide = layout == GridLayout::Wide;
    super::zone_grid::zones_block(&mut out, report, wide, sep);
    out
}
