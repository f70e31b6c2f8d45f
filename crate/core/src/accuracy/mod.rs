//! How close automated counts are to a reference count (a manual count of the same footage, or
//! another report), with the measures of NCHRP Report 797 (2014), per screenline, direction and
//! interval. With `A` the automated and `M` the reference count of an interval:
//!
//! - APD  = mean over intervals of (A − M) / M   (signed: bias)
//! - AAPD = mean over intervals of |A − M| / M   (size of the error)
//! - WAPD = Σ|A − M| / ΣM                        (error weighted by volume)
//! - correction factor = ΣM / ΣA                 (multiply automated counts by it)
//!
//! Intervals with M = 0 cannot enter APD and AAPD (division by zero); they still enter WAPD and the
//! correction factor, and are counted in `zero_reference_intervals`.

mod tally;

pub use crate::report::{Measures, TallyCheck, TallyGroup};
pub use tally::{check, Press, Tally};

use crate::error::{Error, ErrorKind};
use crate::limits::MAX_COUNT;
use crate::text;
use serde::Serialize;
use std::collections::BTreeMap;

/// One row of a counts table: `screenline,direction,class,interval_start,interval_end,count`.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CountRow {
    pub screenline: String,
    /// The direction label (`forward`/`backward` or the plan's own labels).
    pub direction: String,
    /// `None` for a count of all classes together (empty, `all` or `*` in the file).
    pub class: Option<String>,
    pub interval_start: String,
    pub count: u64,
}

/// Reads a counts CSV with the header `screenline,direction,class,interval_start,interval_end,count`
/// (the layout `--csv` writes; a manual count in the same layout).
pub fn read_counts_csv(bytes: &[u8]) -> Result<Vec<CountRow>, Error> {
    read_counts_csv_for(bytes, None)
}

/// [`read_counts_csv`], with directions written `forward` or `backward` (as edits files and plans
/// name them) taken as `report`'s labels for them, line by line, so either way of writing them
/// compares. A row counting what an earlier one counts (after that), or all classes of an interval
/// beside a row of one class of it, is refused naming both lines.
pub fn read_counts_csv_for(
    bytes: &[u8],
    report: Option<&serde_json::Value>,
) -> Result<Vec<CountRow>, Error> {
    let text = text::as_text(bytes)?;
    let mut lines = text
        .lines()
        .enumerate()
        .filter(|(_, l)| !l.trim().is_empty() && !l.trim_start().starts_with('#'));
    let Some((header_index, header)) = lines.next() else {
        return Err(Error::new(ErrorKind::Empty, "the counts file is empty"));
    };
    let names: Vec<String> = text::split_fields(header)
        .iter()
        .map(|h| h.trim().to_ascii_lowercase())
        .collect();
    let col = |name: &str| {
        names.iter().position(|n| n == name).ok_or_else(|| {
            Error::new(
                ErrorKind::BadHeader,
                format!(
                    "the header has no `{name}` column: it must name \
                     screenline,direction,class,interval_start,interval_end,count{}",
                    if names.len() == 1 {
                        text::separator_hint(header)
                    } else {
                        ""
                    }
                ),
            )
            .at(header_index + 1, None)
        })
    };
    let (cl, cd, cc, cs, cn) = (
        col("screenline")?,
        col("direction")?,
        col("class")?,
        col("interval_start")?,
        col("count")?,
    );
    let mut rows = Vec::new();
    // The first line of each line, direction and interval, by class (`None`: all together): a
    // second is refused, as it would be compared with the same automated count again.
    type Cell = (String, String, String);
    let mut first: std::collections::HashMap<Cell, Vec<(Option<String>, usize)>> =
        std::collections::HashMap::new();
    for (i, line) in lines {
        let f = text::split_fields(line);
        if f.len() != names.len() {
            return Err(text::wrong_field_count(f.len(), names.len(), line, i + 1));
        }
        let mut row = count_row(&f, [cl, cd, cc, cs, cn], i + 1)?;
        if let Some(label) = report.and_then(|r| label_of(r, &row.screenline, &row.direction)) {
            row.direction = label;
        }
        let cell = (
            row.screenline.clone(),
            row.direction.clone(),
            row.interval_start.clone(),
        );
        let seen = first.entry(cell).or_default();
        let clash = seen
            .iter()
            .find(|(c, _)| *c == row.class || c.is_none() != row.class.is_none());
        if let Some((class, earlier)) = clash {
            return Err(repeated_row(&row, class, *earlier).at(i + 1, None));
        }
        seen.push((row.class.clone(), i + 1));
        rows.push(row);
    }
    Ok(rows)
}

/// The report's label for a line's direction written `forward` or `backward`; `None` for a label
/// (or a line the report lacks).
fn label_of(report: &serde_json::Value, line: &str, direction: &str) -> Option<String> {
    let key = match direction {
        "forward" => "forward_label",
        "backward" => "backward_label",
        _ => return None,
    };
    let lines = report["screenlines"].as_array()?;
    let found = lines.iter().find(|l| l["name"].as_str() == Some(line))?;
    found[key].as_str().map(str::to_string)
}

/// One row of a counts CSV from its fields, the columns of screenline, direction, class,
/// interval_start and count given; errors name `line`.
fn count_row(f: &[&str], [cl, cd, cc, cs, cn]: [usize; 5], line: usize) -> Result<CountRow, Error> {
    let count: u64 = f[cn]
        .trim()
        .parse()
        .ok()
        .filter(|&n| n <= MAX_COUNT)
        .ok_or_else(|| {
            Error::new(
                ErrorKind::BadNumber,
                format!(
                    "count `{}` is not a whole number from 0 to {MAX_COUNT}",
                    f[cn]
                ),
            )
            .at(line, Some(cn + 1))
        })?;
    let class = match f[cc].trim() {
        "" | "all" | "*" => None,
        c => Some(c.to_string()),
    };
    Ok(CountRow {
        screenline: f[cl].trim().to_string(),
        direction: f[cd].trim().to_string(),
        class,
        // `7:00` or `00:15` as a spreadsheet saves `07:00:00`, `00:15:00`: as a report writes it.
        interval_start: crate::plan::clock::as_report_writes(f[cs]),
        count,
    })
}

/// Why a row counting what an earlier one (on line `earlier`, of `class`) counts is refused: the
/// same class again, or all classes beside one class of the same interval.
fn repeated_row(row: &CountRow, class: &Option<String>, earlier: usize) -> Error {
    let what = |c: &Option<String>| c.as_deref().unwrap_or("all classes").to_string();
    let (line, way, from) = (&row.screenline, &row.direction, &row.interval_start);
    let message = if *class == row.class {
        format!(
            "this row counts {line} {way} ({}) from {from} again, as line {earlier} does: add the \
             two counts into one row (or correct the line, direction, class or interval)",
            what(class)
        )
    } else {
        format!(
            "this row counts {line} {way} ({}) from {from}, and line {earlier} counts {} of the \
             same interval: give a row per class, or one row of all classes, not both",
            what(&row.class),
            what(class)
        )
    };
    Error::new(ErrorKind::Unsuitable, message)
}

/// The per-class interval counts of a report JSON document (as `throughline run` writes it).
pub fn report_rows(report: &serde_json::Value) -> Result<Vec<CountRow>, String> {
    let lines = report["screenlines"]
        .as_array()
        .ok_or("this is not a Throughline report: it has no `screenlines` list")?;
    let mut rows = Vec::new();
    for l in lines {
        let name = l["name"].as_str().unwrap_or_default().to_string();
        let labels = [
            ("forward", l["forward_label"].as_str().unwrap_or("forward")),
            (
                "backward",
                l["backward_label"].as_str().unwrap_or("backward"),
            ),
        ];
        for i in l["intervals"].as_array().into_iter().flatten() {
            let start = i["start"].as_str().unwrap_or_default().to_string();
            for (class, c) in i["by_class"].as_object().into_iter().flatten() {
                for (key, label) in labels {
                    rows.push(CountRow {
                        screenline: name.clone(),
                        direction: label.to_string(),
                        class: Some(class.clone()),
                        interval_start: start.clone(),
                        count: c[key].as_u64().unwrap_or(0),
                    });
                }
            }
        }
    }
    Ok(rows)
}

/// Measures for one screenline, direction and class (`all` when the reference has no classes).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroupAccuracy {
    pub screenline: String,
    pub direction: String,
    pub class: String,
    #[serde(flatten)]
    pub measures: Measures,
    /// Every interval compared: start, automated, reference.
    pub per_interval: Vec<(String, u64, u64)>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Accuracy {
    pub groups: Vec<GroupAccuracy>,
    /// All compared intervals pooled.
    pub overall: Measures,
    /// Reference rows whose screenline and direction the automated counts do not have.
    pub unmatched_reference_rows: usize,
    /// Their screenlines and directions, each with how many rows name it (in order of names).
    pub unmatched_labels: Vec<(String, String, usize)>,
    /// The screenlines and directions the automated counts have (in order of names).
    pub known_labels: Vec<(String, String)>,
    /// When no interval of the reference is an interval of the automated counts (which have
    /// some): the first and last interval start of each, reference first. A clock set apart (a
    /// start time of 07:45 for 17:45) then reads as nothing counted.
    pub intervals_apart: Option<[String; 4]>,
    /// Automated counts left out for their class: of a class no reference row of their screenline
    /// and direction names, where no reference row counts all classes together (e.g. unclassified
    /// counts from tracks without classes, against a manual count by class). Counts of intervals
    /// the reference lacks are not among them.
    pub automated_not_compared: u64,
}

/// Counts of all classes together: the rows of each screenline, direction and interval added up
/// into one with no class (to compare with counts whose classes are not known).
pub fn all_classes(rows: &[CountRow]) -> Vec<CountRow> {
    let mut sums: BTreeMap<(String, String, String), u64> = BTreeMap::new();
    for r in rows {
        let key = (
            r.screenline.clone(),
            r.direction.clone(),
            r.interval_start.clone(),
        );
        let sum = sums.entry(key).or_default();
        *sum = sum.saturating_add(r.count);
    }
    sums.into_iter()
        .map(
            |((screenline, direction, interval_start), count)| CountRow {
                screenline,
                direction,
                class: None,
                interval_start,
                count,
            },
        )
        .collect()
}

/// Whether every count of `rows` is of tracks without a class (the fixed-camera detector without
/// the two heights gives none).
pub fn only_unclassified(rows: &[CountRow]) -> bool {
    !rows.is_empty()
        && rows
            .iter()
            .all(|r| r.class.as_deref() == Some(crate::count::UNCLASSIFIED))
}

/// The measures over pairs of (automated, reference) counts, one pair per interval.
pub fn measures(pairs: &[(u64, u64)]) -> Measures {
    let with_m: Vec<f64> = pairs
        .iter()
        .filter(|(_, m)| *m > 0)
        .map(|&(a, m)| (a as f64 - m as f64) / m as f64)
        .collect();
    // Saturating: sums of many large counts must not overflow (each count is at most MAX_COUNT).
    let sum_a: u64 = pairs.iter().fold(0u64, |s, p| s.saturating_add(p.0));
    let sum_m: u64 = pairs.iter().fold(0u64, |s, p| s.saturating_add(p.1));
    let sum_abs: f64 = pairs
        .iter()
        .map(|&(a, m)| (a as f64 - m as f64).abs())
        .sum();
    let n = with_m.len() as f64;
    Measures {
        intervals: pairs.len(),
        zero_reference_intervals: pairs.len() - with_m.len(),
        automated_total: sum_a,
        reference_total: sum_m,
        apd: (n > 0.0).then(|| with_m.iter().sum::<f64>() / n),
        aapd: (n > 0.0).then(|| with_m.iter().map(|d| d.abs()).sum::<f64>() / n),
        wapd: (sum_m > 0).then(|| sum_abs / sum_m as f64),
        // None when either total is 0: no count to scale, or no reference to scale it to.
        correction_factor: (sum_a > 0 && sum_m > 0).then(|| sum_m as f64 / sum_a as f64),
    }
}

/// Compares automated counts with reference counts, interval by interval.
pub fn compare(automated: &[CountRow], reference: &[CountRow]) -> Accuracy {
    type Key = (String, String, String);
    let mut auto: BTreeMap<(Key, String), u64> = BTreeMap::new();
    let mut auto_all: BTreeMap<(Key, String), u64> = BTreeMap::new();
    let mut known: std::collections::BTreeSet<(String, String)> = Default::default();
    for r in automated {
        let class = r.class.clone().unwrap_or_else(|| "all".into());
        known.insert((r.screenline.clone(), r.direction.clone()));
        let one = auto
            .entry((
                (r.screenline.clone(), r.direction.clone(), class),
                r.interval_start.clone(),
            ))
            .or_default();
        *one = one.saturating_add(r.count);
        let all = auto_all
            .entry((
                (r.screenline.clone(), r.direction.clone(), "all".into()),
                r.interval_start.clone(),
            ))
            .or_default();
        *all = all.saturating_add(r.count);
    }
    let mut groups: BTreeMap<Key, Vec<(String, u64, u64)>> = BTreeMap::new();
    let mut unmatched: BTreeMap<(String, String), usize> = BTreeMap::new();
    for r in reference {
        if !known.contains(&(r.screenline.clone(), r.direction.clone())) {
            *unmatched
                .entry((r.screenline.clone(), r.direction.clone()))
                .or_default() += 1;
            continue;
        }
        let class = r.class.clone().unwrap_or_else(|| "all".into());
        let key = (r.screenline.clone(), r.direction.clone(), class.clone());
        let source = if r.class.is_some() { &auto } else { &auto_all };
        let a = source
            .get(&(key.clone(), r.interval_start.clone()))
            .copied()
            .unwrap_or(0);
        groups
            .entry(key)
            .or_default()
            .push((r.interval_start.clone(), a, r.count));
    }
    let mut all_pairs = Vec::new();
    let groups = groups
        .into_iter()
        .map(|((screenline, direction, class), mut per_interval)| {
            per_interval.sort();
            let pairs: Vec<(u64, u64)> = per_interval.iter().map(|(_, a, m)| (*a, *m)).collect();
            all_pairs.extend_from_slice(&pairs);
            GroupAccuracy {
                screenline,
                direction,
                class,
                measures: measures(&pairs),
                per_interval,
            }
        })
        .collect();
    let not_compared = not_compared(automated, reference);
    Accuracy {
        groups,
        overall: measures(&all_pairs),
        unmatched_reference_rows: unmatched.values().sum(),
        unmatched_labels: unmatched.into_iter().map(|((l, d), n)| (l, d, n)).collect(),
        known_labels: known.into_iter().collect(),
        intervals_apart: intervals_apart(automated, reference),
        automated_not_compared: not_compared,
    }
}

/// The first and last interval starts of the reference and of the automated counts, when none of
/// the reference's is among the automated counts'.
fn intervals_apart(automated: &[CountRow], reference: &[CountRow]) -> Option<[String; 4]> {
    let starts = |rows: &[CountRow]| -> std::collections::BTreeSet<String> {
        rows.iter().map(|r| r.interval_start.clone()).collect()
    };
    let (a, m) = (starts(automated), starts(reference));
    if a.is_empty() || m.is_empty() || !a.is_disjoint(&m) {
        return None;
    }
    let ends = |s: &std::collections::BTreeSet<String>| {
        (
            s.first().cloned().unwrap_or_default(),
            s.last().cloned().unwrap_or_default(),
        )
    };
    let ((m0, m1), (a0, a1)) = (ends(&m), ends(&a));
    Some([m0, m1, a0, a1])
}

/// The automated counts no reference row compares: see [`Accuracy::automated_not_compared`].
fn not_compared(automated: &[CountRow], reference: &[CountRow]) -> u64 {
    let line = |r: &CountRow| (r.screenline.clone(), r.direction.clone());
    let all_classes: std::collections::BTreeSet<_> = reference
        .iter()
        .filter(|r| r.class.is_none())
        .map(line)
        .collect();
    let classes: std::collections::BTreeSet<_> = reference
        .iter()
        .filter_map(|r| Some((line(r), r.class.clone()?)))
        .collect();
    let lines: std::collections::BTreeSet<_> = reference.iter().map(line).collect();
    automated
        .iter()
        .filter(|r| {
            let class = r.class.clone().unwrap_or_else(|| "all".into());
            lines.contains(&line(r))
                && !all_classes.contains(&line(r))
                && !classes.contains(&(line(r), class))
        })
        .fold(0u64, |sum, r| sum.saturating_add(r.count))
}
