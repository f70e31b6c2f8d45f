//! The counts CSV: one row per screenline, direction, class and interval, in the layout a manual
//! count is written in for `throughline score-counts`.

use super::Report;

/// The counts CSV: `screenline,direction,class,interval_start,interval_end,count,partial`, one row
/// per screenline, direction, class seen on that line, and interval (zeros included); `partial` is
/// `yes` for an interval the footage covers only in part (its count is not a whole interval's: a
/// flow rate worked out from it would be too low), as the hand-in grids mark it. The manual count
/// `score-counts` reads is written in the same layout, `partial` left out.
pub fn counts_csv(report: &Report) -> String {
    let mut out =
        String::from("screenline,direction,class,interval_start,interval_end,count,partial\n");
    for line in &report.screenlines {
        for (forward, label) in [(true, &line.forward_label), (false, &line.backward_label)] {
            for class in line.by_class.keys() {
                for i in &line.intervals {
                    let c = i.by_class.get(class).copied().unwrap_or_default();
                    let n = if forward { c.forward } else { c.backward };
                    out.push_str(&format!(
                        "{},{},{},{},{},{},{}\n",
                        quote(&line.name),
                        quote(label),
                        quote(class),
                        i.start,
                        i.end,
                        n,
                        if i.partial { "yes" } else { "no" }
                    ));
                }
            }
        }
    }
    out
}

/// A CSV field: in double quotes (doubled inside) when it holds a comma, a quote or a line break.
pub(super) fn quote(s: &str) -> String {
    if s.contains([',', '"', '\n']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}
