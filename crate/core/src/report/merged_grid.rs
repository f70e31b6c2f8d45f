//! Reading a merged counts file back (`SITE_merged-counts.csv`, as [`super::merged_counts_csv`]
//! writes it, or the zones' `SITE_merged-zones.csv`, as [`super::merged_zones_csv`] does) and
//! laying it out as an interval grid: one row per interval on the clock, one column per line and
//! direction (or zone and entry or exit), for one camera (or all together) and one class (or all
//! classes summed). What the page shows for a batch of many clips.

use crate::error::{Error, ErrorKind};
use crate::limits::{MAX_INTERVALS, MAX_PLAN_ITEMS};
use crate::text::{as_text, split_fields};
use serde::Serialize;
use std::collections::BTreeMap;

/// The header a merged counts file starts with.
const HEADER: &str =
    "site,camera,screenline,direction,class,interval_start,interval_end,count,partial,entries";

/// The header of the zones' merged file: the same columns, a zone for a line and its way in or
/// out for a direction.
const ZONES_HEADER: &str =
    "site,camera,zone,way,class,interval_start,interval_end,count,partial,clips";

/// Rows a merged counts file may hold: every interval of a year of 15-minute intervals, for many
/// lines, directions, classes and cameras.
const MAX_ROWS: usize = MAX_INTERVALS * MAX_PLAN_ITEMS / 10;

/// One row of a merged counts file.
#[derive(Debug, Clone, PartialEq)]
struct Row {
    camera: String,
    line: String,
    direction: String,
    class: String,
    start: String,
    end: String,
    count: u64,
    partial: bool,
}

/// A merged counts file, read and checked.
#[derive(Debug, Clone, PartialEq)]
pub struct MergedCounts {
    pub site: String,
    rows: Vec<Row>,
}

/// A line and direction (or a zone and `entry` or `exit`): one column of the grid.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GridColumn {
    pub screenline: String,
    pub direction: String,
}

/// One interval: its counts in the columns' order, and whether the clips cover it only in part.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GridRow {
    pub start: String,
    pub end: String,
    pub partial: bool,
    pub counts: Vec<u64>,
    pub total: u64,
}

/// The interval grid of one camera and class, with what can be chosen instead.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MergedGrid {
    pub site: String,
    /// The cameras in the file, in its order (`all cameras` last when there is more than one).
    pub cameras: Vec<String>,
    pub classes: Vec<String>,
    pub camera: String,
    /// The class shown; empty for all classes summed.
    pub class: String,
    pub columns: Vec<GridColumn>,
    pub rows: Vec<GridRow>,
}

/// Reads a merged counts file; a mistake is refused with its line and column.
pub fn read_merged_counts(bytes: &[u8]) -> Result<MergedCounts, Error> {
    let text = as_text(bytes).map_err(|_| {
        Error::new(
            ErrorKind::Binary,
            "this is not a text file: a merged counts file is the CSV `throughline batch` writes (SITE_merged-counts.csv)",
        )
    })?;
    let mut lines = text
        .lines()
        .enumerate()
        .filter(|(_, l)| !l.trim().is_empty());
    match lines.next() {
        Some((_, h)) if h.trim() == HEADER || h.trim() == ZONES_HEADER => {}
        _ => {
            return Err(Error::new(
                ErrorKind::BadHeader,
                format!("not a merged counts file: the first line should be `{HEADER}` (the SITE_merged-counts.csv that `throughline batch` writes; its SITE_merged-zones.csv begins `{ZONES_HEADER}`)"),
            )
            .at(1, None))
        }
    }
    let mut site = None;
    let mut rows = Vec::new();
    for (i, line) in lines {
        if rows.len() == MAX_ROWS {
            return Err(
                Error::new(ErrorKind::Manifest, format!("more than {MAX_ROWS} rows"))
                    .at(i + 1, None),
            );
        }
        let (this_site, row) = read_row(line, i + 1)?;
        match &site {
            None => site = Some(this_site),
            Some(s) if *s != this_site => {
                return Err(Error::new(
                    ErrorKind::Manifest,
                    format!(
                    "a second site, {this_site:?} after {s:?}: a merged counts file holds one site"
                ),
                )
                .at(i + 1, Some(1)))
            }
            Some(_) => {}
        }
        rows.push(row);
    }
    let site =
        site.ok_or_else(|| Error::new(ErrorKind::Empty, "the file has a header but no counts"))?;
    Ok(MergedCounts { site, rows })
}

/// A row, with the site it names.
fn read_row(line: &str, at: usize) -> Result<(String, Row), Error> {
    let f = split_fields(line);
    if f.len() != 10 {
        return Err(Error::new(
            ErrorKind::WrongColumnCount,
            format!("{} fields where the header names 10", f.len()),
        )
        .at(at, None));
    }
    let count = f[7]
        .parse::<u64>()
        .ok()
        .filter(|&n| n <= crate::limits::MAX_COUNT)
        .ok_or_else(|| {
            Error::new(
                ErrorKind::BadNumber,
                format!("the count {:?} is not a whole number of 0 or more", f[7]),
            )
            .at(at, Some(8))
        })?;
    let partial = match f[8] {
        "yes" => true,
        "no" => false,
        other => {
            return Err(Error::new(
                ErrorKind::BadHeader,
                format!("partial is {other:?}: yes or no"),
            )
            .at(at, Some(9)))
        }
    };
    let row = Row {
        camera: f[1].to_string(),
        line: f[2].to_string(),
        direction: f[3].to_string(),
        class: f[4].to_string(),
        start: f[5].to_string(),
        end: f[6].to_string(),
        count,
        partial,
    };
    Ok((f[0].to_string(), row))
}

impl MergedCounts {
    /// The grid of `camera` (the first camera when it is not in the file) and `class` (all
    /// classes summed when empty or not in the file).
    pub fn grid(&self, camera: &str, class: &str) -> MergedGrid {
        let mut cameras: Vec<String> = Vec::new();
        let mut classes: Vec<String> = Vec::new();
        for r in &self.rows {
            if !cameras.contains(&r.camera) {
                cameras.push(r.camera.clone());
            }
            if !classes.contains(&r.class) {
                classes.push(r.class.clone());
            }
        }
        let camera = if cameras.iter().any(|c| c == camera) {
            camera.to_string()
        } else {
            cameras.first().cloned().unwrap_or_default()
        };
        let class = if classes.iter().any(|c| c == class) {
            class.to_string()
        } else {
            String::new()
        };
        let mut columns: Vec<GridColumn> = Vec::new();
        let mut cells: BTreeMap<(String, String), (bool, BTreeMap<usize, u64>)> = BTreeMap::new();
        for r in self
            .rows
            .iter()
            .filter(|r| r.camera == camera && (class.is_empty() || r.class == class))
        {
            let column = GridColumn {
                screenline: r.line.clone(),
                direction: r.direction.clone(),
            };
            let c = match columns.iter().position(|x| *x == column) {
                Some(c) => c,
                None => {
                    columns.push(column);
                    columns.len() - 1
                }
            };
            let cell = cells.entry((r.start.clone(), r.end.clone())).or_default();
            cell.0 |= r.partial;
            *cell.1.entry(c).or_default() += r.count;
        }
        let rows = cells
            .into_iter()
            .map(|((start, end), (partial, counts))| {
                let counts: Vec<u64> = (0..columns.len())
                    .map(|c| counts.get(&c).copied().unwrap_or(0))
                    .collect();
                GridRow {
                    start,
                    end,
                    partial,
                    total: counts.iter().sum(),
                    counts,
                }
            })
            .collect();
        MergedGrid {
            site: self.site.clone(),
            cameras,
            classes,
            camera,
            class,
            columns,
            rows,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const FILE: &str = "site,camera,screenline,direction,class,interval_start,interval_end,count,partial,entries\n\
        Plaza,north,mid,in,cyclist,2026-03-02T07:00:00,2026-03-02T07:15:00,2,no,a\n\
        Plaza,north,mid,in,pedestrian,2026-03-02T07:00:00,2026-03-02T07:15:00,5,no,a\n\
        Plaza,north,mid,out,pedestrian,2026-03-02T07:00:00,2026-03-02T07:15:00,1,no,a\n\
        Plaza,north,mid,in,pedestrian,2026-03-02T07:15:00,2026-03-02T07:30:00,4,yes,a b\n\
        Plaza,south,mid,in,pedestrian,2026-03-02T07:00:00,2026-03-02T07:15:00,9,no,c\n";

    #[test]
    fn a_camera_and_a_class_as_a_grid_of_intervals_by_line_and_direction() {
        let m = read_merged_counts(FILE.as_bytes()).unwrap();
        let g = m.grid("north", "");
        assert_eq!(
            (g.site.as_str(), g.cameras.len(), g.columns.len()),
            ("Plaza", 2, 2)
        );
        assert_eq!(g.rows[0].counts, [7, 1], "cyclists and pedestrians summed");
        assert_eq!(
            (g.rows[1].counts.clone(), g.rows[1].partial, g.rows[1].total),
            (vec![4, 0], true, 4)
        );
        let g = m.grid("north", "cyclist");
        assert_eq!(g.rows[0].counts, [2]);
        assert_eq!(
            m.grid("nowhere", "").camera,
            "north",
            "an unknown camera: the first"
        );
        assert_eq!(m.grid("south", "").rows[0].counts, [9]);
    }

    #[test]
    fn the_zones_merged_file_is_a_grid_of_zones_by_entry_and_exit() {
        let zones = "site,camera,zone,way,class,interval_start,interval_end,count,partial,clips\n\
            Plaza,north,kiosk,entry,pedestrian,2026-03-02T07:00:00,2026-03-02T07:15:00,3,no,a\n\
            Plaza,north,kiosk,exit,pedestrian,2026-03-02T07:00:00,2026-03-02T07:15:00,2,no,a\n";
        let g = read_merged_counts(zones.as_bytes()).unwrap().grid("", "");
        let heads: Vec<_> = g
            .columns
            .iter()
            .map(|c| (c.screenline.as_str(), c.direction.as_str()))
            .collect();
        assert_eq!(heads, [("kiosk", "entry"), ("kiosk", "exit")]);
        assert_eq!((g.rows[0].counts.clone(), g.rows[0].total), (vec![3, 2], 5));
    }

    #[test]
    fn a_file_that_is_not_one_is_refused_with_its_line() {
        let bad_count = FILE.replace(",2,no,a", ",two,no,a");
        let cases = [
            ("screenline,direction\n", "line 1: not a merged counts file"),
            (bad_count.as_str(), "line 2, column 8: the count \"two\""),
            (
                &FILE.replace("Plaza,south", "Park,south"),
                "line 6, column 1: a second site",
            ),
            (
                &FILE.replace(",9,no,c", ",9,maybe,c"),
                "line 6, column 9: partial is \"maybe\"",
            ),
            (HEADER, "no counts"),
        ];
        for (text, expected) in cases {
            let e = read_merged_counts(text.as_bytes()).unwrap_err().to_string();
            assert!(e.contains(expected), "{e:?} should say {expected:?}");
        }
    }
}
