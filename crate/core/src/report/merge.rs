//! The counts of several reports of one site, merged on the real clock: consecutive clips of one
//! camera add up in the intervals they share (the one a cut falls in gets its part from each),
//! and several cameras of one site are listed each on its own and, line by line, all together.
//!
//! An interval is marked partial unless the clips of that camera cover it whole (the clips'
//! recording start and duration, to the whole second); in the rows of all cameras together, when
//! it is partial for any camera.

use super::csv::quote;
use super::Report;
use crate::error::{Error, ErrorKind};
use crate::plan::clock::LocalTime;
use std::collections::BTreeMap;

/// One report to merge, with the entry it came from and its camera.
pub struct Part<'a> {
    pub entry: &'a str,
    pub camera: &'a str,
    pub report: &'a Report,
}

/// What the merged rows are keyed by: the camera ([`ALL`]: all together), the line and direction
/// in order of first appearance, the class and the interval.
type Key = (usize, usize, String, String, String);

/// The camera of the rows of all cameras together (after every camera's own rows).
const ALL: usize = usize::MAX;

/// A merged row's count and the entries that gave it.
#[derive(Default)]
struct Cell {
    count: u64,
    entries: Vec<String>,
}

/// The merged counts as CSV: `site,camera,screenline,direction,class,interval_start,interval_end,
/// count,partial,entries`, the rows of each camera first (in the order the cameras first appear),
/// then, with more than one camera, the rows of all cameras together (camera `all cameras`).
pub fn merged_counts_csv(site: &str, parts: &[Part]) -> Result<String, Error> {
    let mut cameras: Vec<&str> = Vec::new();
    let mut lines: Vec<(String, String)> = Vec::new();
    let mut covered: Vec<Vec<(LocalTime, LocalTime)>> = Vec::new();
    let mut cells: BTreeMap<Key, Cell> = BTreeMap::new();
    for part in parts {
        let r = part.report;
        let start = r.plan.start.as_deref().and_then(LocalTime::parse).ok_or_else(|| {
            Error::new(
                ErrorKind::Unsuitable,
                format!(
                    "{}: no recording start, so its counts cannot be placed on the clock beside the others: give the start column in the manifest (or the plan's start)",
                    part.entry
                ),
            )
        })?;
        let cam = index_of(&mut cameras, part.camera);
        if covered.len() < cameras.len() {
            covered.push(Vec::new());
        }
        covered[cam].push((start, start.plus_seconds(r.duration_seconds.floor() as i64)));
        for line in &r.screenlines {
            for (forward, label) in [(true, &line.forward_label), (false, &line.backward_label)] {
                let l = index_of(&mut lines, (line.name.clone(), label.clone()));
                for class in line.by_class.keys() {
                    for i in &line.intervals {
                        let c = i.by_class.get(class).copied().unwrap_or_default();
                        let n = if forward { c.forward } else { c.backward };
                        for camera in [cam, ALL] {
                            let key = (camera, l, class.clone(), i.start.clone(), i.end.clone());
                            let cell = cells.entry(key).or_default();
                            cell.count += n;
                            if !cell.entries.iter().any(|e| e == part.entry) {
                                cell.entries.push(part.entry.to_string());
                            }
                        }
                    }
                }
            }
        }
    }
    let mut out = String::from(
        "site,camera,screenline,direction,class,interval_start,interval_end,count,partial,entries\n",
    );
    for ((camera, l, class, start, end), cell) in &cells {
        if *camera == ALL && cameras.len() < 2 {
            continue;
        }
        let partial = match covered.get(*camera) {
            Some(spans) => !covers(spans, start, end),
            None => covered.iter().any(|spans| !covers(spans, start, end)),
        };
        let (line, label) = &lines[*l];
        let fields = [
            site,
            cameras.get(*camera).copied().unwrap_or("all cameras"),
            line,
            label,
            class,
            start,
            end,
        ];
        let quoted: Vec<String> = fields.iter().map(|f| quote(f)).collect();
        out.push_str(&format!(
            "{},{},{},{}\n",
            quoted.join(","),
            cell.count,
            if partial { "yes" } else { "no" },
            quote(&cell.entries.join(" "))
        ));
    }
    Ok(out)
}

/// The place of `item` in `list`, added at the end when new.
fn index_of<T: PartialEq>(list: &mut Vec<T>, item: T) -> usize {
    match list.iter().position(|x| *x == item) {
        Some(i) => i,
        None => {
            list.push(item);
            list.len() - 1
        }
    }
}

/// Whether the spans (recorded stretches) cover the interval from `start` to `end` whole.
fn covers(spans: &[(LocalTime, LocalTime)], start: &str, end: &str) -> bool {
    let (Some(mut from), Some(to)) = (LocalTime::parse(start), LocalTime::parse(end)) else {
        return false;
    };
    let mut sorted = spans.to_vec();
    sorted.sort();
    for (a, b) in sorted {
        if a > from {
            return false;
        }
        if b > from {
            from = b;
        }
        if from >= to {
            return true;
        }
    }
    from >= to
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn an_interval_is_whole_only_where_the_clips_cover_it_without_a_gap() {
        let t = |s: &str| LocalTime::parse(s).unwrap();
        let first = (t("2026-03-02T07:00:00"), t("2026-03-02T07:07:30"));
        let second = (t("2026-03-02T07:07:30"), t("2026-03-02T07:20:00"));
        let late = (t("2026-03-02T07:08:00"), t("2026-03-02T07:20:00"));
        let (a, b) = ("2026-03-02T07:00:00", "2026-03-02T07:15:00");
        assert!(covers(&[second, first], a, b), "back to back, in any order");
        assert!(
            !covers(&[first, late], a, b),
            "half a minute missing at 07:07:30"
        );
        assert!(!covers(&[second], a, b), "the first half missing");
        assert!(!covers(&[first, second], a, "not a time"));
    }
}
