//! The counts of several reports of one site, merged on the real clock: every counted crossing
//! is placed in the interval of the clock it falls in (intervals of the plans' length counted from
//! midnight of the first clip's day: 07:00, 07:15, ... whatever time each clip starts at), so
//! consecutive clips of one camera add up in the interval a cut falls in, and several cameras of
//! one site are listed each on its own and, line by line (by the lines' names), all together.
//! Clips of one camera that overlap in time are refused: their crossings would count twice.
//!
//! The events behind the merged counts are listed too, each with its entry and camera; the zones'
//! entries and exits are merged the same way, in a table of their own.
//!
//! An interval is marked partial unless the clips of that camera cover it whole (the clips'
//! recording start and duration, to the whole second); in the rows of all cameras together, when
//! it is partial for any camera.

use super::csv::quote;
use super::{EventKind, Report};
use crate::error::{Error, ErrorKind};
use crate::plan::clock::LocalTime;
use std::collections::{BTreeMap, BTreeSet};

/// One report to merge, with the entry it came from and its camera (empty: the site's one camera).
pub struct Part<'a> {
    pub entry: &'a str,
    pub camera: &'a str,
    pub report: &'a Report,
}

/// What the merged rows are keyed by: the camera ([`ALL`]: all together), the line and direction
/// in order of first appearance, the class and the interval's number on the clock.
type Key = (usize, usize, String, i64);

/// The camera of the rows of all cameras together (after every camera's own rows).
const ALL: usize = usize::MAX;

/// A merged row's count and the entries that gave it.
#[derive(Default)]
struct Cell {
    count: u64,
    entries: Vec<String>,
}

/// What the parts of one camera recorded: the stretches of clock time (with the entry of each),
/// and the line directions and classes its reports list (each with a row per interval, zeros
/// included).
#[derive(Default)]
struct Camera<'a> {
    name: &'a str,
    spans: Vec<(LocalTime, LocalTime, &'a str)>,
    rows: BTreeSet<(usize, String)>,
}

impl Camera<'_> {
    /// Sorts the clips by start; refuses two that overlap.
    fn order(&mut self) -> Result<(), Error> {
        self.spans.sort();
        for pair in self.spans.windows(2) {
            let ((a0, a1, a), (b0, b1, b)) = (pair[0], pair[1]);
            if b0 < a1 {
                let camera = match self.name {
                    "" => "both with no camera named".to_string(),
                    name => format!("both of camera {name:?}"),
                };
                return Err(unsuitable(format!(
                    "{a} ({a0} to {a1}) and {b} ({b0} to {b1}) overlap, {camera}: their crossings would be counted twice; give each clip its own start time, or each camera its own name (the manifest's camera column)"
                )));
            }
        }
        Ok(())
    }

    /// Whether the clips (sorted, apart) cover the interval from `from` to `to` whole.
    fn covers(&self, from: LocalTime, to: LocalTime) -> bool {
        let first = self.spans.partition_point(|s| s.1 <= from);
        let mut reached = from;
        for &(start, end, _) in &self.spans[first..] {
            if start > reached {
                return false;
            }
            reached = end;
            if reached >= to {
                return true;
            }
        }
        false
    }
}

/// The merged counts as CSV: `site,camera,screenline,direction,class,interval_start,interval_end,
/// count,partial,entries`, the rows of each camera first (in the order the cameras first appear),
/// then, with more than one camera, the rows of all cameras together (camera `all cameras`).
pub fn merged_counts_csv(site: &str, parts: &[Part]) -> Result<String, Error> {
    merged_csv(site, parts, EventKind::Screenline)
}

/// The zones' entries and exits merged as the crossings are: `site,camera,zone,way,class,
/// interval_start,interval_end,count,partial,clips` (`way`: `entry` or `exit`; `clips`: the
/// entries of the manifest that gave the count). Empty when no report has a zone.
pub fn merged_zones_csv(site: &str, parts: &[Part]) -> Result<String, Error> {
    if parts.iter().all(|p| p.report.zones.is_empty()) {
        return Ok(String::new());
    }
    merged_csv(site, parts, EventKind::Zone)
}

fn merged_csv(site: &str, parts: &[Part], kind: EventKind) -> Result<String, Error> {
    let Some(first) = parts.first() else {
        return Ok(String::new());
    };
    let minutes = first.report.plan.interval_minutes;
    let mut earliest = clock_start(first)?;
    for part in parts {
        earliest = earliest.min(clock_start(part)?);
    }
    let mut merge = Merge {
        kind,
        origin: earliest.seconds().div_euclid(86_400) * 86_400,
        length: (minutes * 60.0).round() as i64,
        cameras: Vec::new(),
        lines: Vec::new(),
        cells: BTreeMap::new(),
    };
    for part in parts {
        if (part.report.plan.interval_minutes - minutes).abs() > 1e-9 || merge.length < 1 {
            return Err(unsuitable(format!(
                "{}: intervals of {} minutes where {} has {minutes}: the clips of one site need one interval length",
                part.entry, part.report.plan.interval_minutes, first.entry
            )));
        }
        merge.add(part)?;
    }
    for camera in &mut merge.cameras {
        camera.order()?;
    }
    merge.add_zeros();
    Ok(merge.csv(site))
}

/// The merge so far: the cameras, the line directions (or zones' ways), and the count of each row.
struct Merge<'a> {
    /// Crossings of screenlines, or entries and exits of zones.
    kind: EventKind,
    /// Midnight of the first clip's day, where the intervals are counted from (seconds).
    origin: i64,
    /// Interval length in seconds.
    length: i64,
    cameras: Vec<Camera<'a>>,
    lines: Vec<(String, String)>,
    cells: BTreeMap<Key, Cell>,
}

impl<'a> Merge<'a> {
    /// One report: its stretch of clock time, the rows it lists, and each crossing it counted.
    fn add(&mut self, part: &Part<'a>) -> Result<(), Error> {
        let r = part.report;
        let start = clock_start(part)?;
        let cam = match self.cameras.iter().position(|c| c.name == part.camera) {
            Some(i) => i,
            None => {
                self.cameras.push(Camera {
                    name: part.camera,
                    ..Camera::default()
                });
                self.cameras.len() - 1
            }
        };
        let end = start.plus_seconds(r.duration_seconds.floor() as i64);
        self.cameras[cam].spans.push((start, end, part.entry));
        for (name, label, classes) in rows_of(r, self.kind) {
            let l = index_of(&mut self.lines, (name.to_string(), label.to_string()));
            for class in classes {
                self.cameras[cam].rows.insert((l, class.to_string()));
            }
        }
        for e in r.events.iter().filter(|e| e.kind == self.kind) {
            let l = index_of(&mut self.lines, (e.name.clone(), e.label.clone()));
            let at = (start.seconds() - self.origin) as f64 + e.seconds;
            let bin = (at / self.length as f64).floor() as i64;
            for camera in [cam, ALL] {
                let cell = self
                    .cells
                    .entry((camera, l, e.class.clone(), bin))
                    .or_default();
                cell.count += 1;
                if !cell.entries.iter().any(|x| x == part.entry) {
                    cell.entries.push(part.entry.to_string());
                }
            }
        }
        Ok(())
    }

    /// Every interval a camera recorded in, for every line direction and class it lists: zeros too.
    fn add_zeros(&mut self) {
        for (cam, camera) in self.cameras.iter().enumerate() {
            for &(from, to, _) in &camera.spans {
                let (from, to) = (from.seconds() - self.origin, to.seconds() - self.origin);
                let first_bin = from.div_euclid(self.length);
                let last_bin = (to - 1).max(from).div_euclid(self.length);
                for bin in first_bin..=last_bin {
                    for (l, class) in &camera.rows {
                        for c in [cam, ALL] {
                            self.cells.entry((c, *l, class.clone(), bin)).or_default();
                        }
                    }
                }
            }
        }
    }

    fn csv(&self, site: &str) -> String {
        let mut out = String::from(match self.kind {
            EventKind::Screenline => "site,camera,screenline,direction,class,interval_start,interval_end,count,partial,entries\n",
            EventKind::Zone => "site,camera,zone,way,class,interval_start,interval_end,count,partial,clips\n",
        });
        for ((camera, l, class, bin), cell) in &self.cells {
            if *camera == ALL && self.cameras.len() < 2 {
                continue;
            }
            let from = LocalTime::from_seconds(self.origin + bin * self.length);
            let to = from.plus_seconds(self.length);
            let partial = match self.cameras.get(*camera) {
                Some(c) => !c.covers(from, to),
                None => self.cameras.iter().any(|c| !c.covers(from, to)),
            };
            let (line, label) = &self.lines[*l];
            let camera_name = self.cameras.get(*camera).map_or("all cameras", |c| c.name);
            let fields = [
                site,
                camera_name,
                line,
                label,
                class,
                &from.to_string(),
                &to.to_string(),
            ];
            let quoted: Vec<String> = fields.iter().map(|f| quote(f)).collect();
            out.push_str(&format!(
                "{},{},{},{}\n",
                quoted.join(","),
                cell.count,
                yes_no(partial),
                quote(&cell.entries.join(" "))
            ));
        }
        out
    }
}

/// The rows a report lists for merging, each with its classes (a row per interval, zeros too): a
/// line's two directions by their labels, or a zone's entries and exits (each with every class
/// either counted, so both ways list the same classes).
fn rows_of(r: &Report, kind: EventKind) -> Vec<(&str, &str, Vec<&str>)> {
    match kind {
        EventKind::Screenline => r
            .screenlines
            .iter()
            .flat_map(|line| {
                let classes: Vec<&str> = line.by_class.keys().map(String::as_str).collect();
                [&line.forward_label, &line.backward_label]
                    .map(|label| (line.name.as_str(), label.as_str(), classes.clone()))
            })
            .collect(),
        EventKind::Zone => r
            .zones
            .iter()
            .flat_map(|z| {
                let classes: BTreeSet<&str> = z
                    .entries_by_class
                    .keys()
                    .chain(z.exits_by_class.keys())
                    .map(String::as_str)
                    .collect();
                let classes: Vec<&str> = classes.into_iter().collect();
                ["entry", "exit"].map(|way| (z.name.as_str(), way, classes.clone()))
            })
            .collect(),
    }
}

/// Every counted crossing and zone event of the site's reports, with the entry and camera it came
/// from, in clock order (ties in entry order): `site,camera,entry,time,kind,name,direction,class,
/// track,frame,inferred,added,reason`. What a person checks a merged count against: each event
/// leads back to its clip's report and frame, and the corrections behind it (added by a person,
/// or counted while hidden) are marked.
pub fn merged_events_csv(site: &str, parts: &[Part]) -> Result<String, Error> {
    let mut rows: Vec<(f64, usize, String)> = Vec::new();
    for (k, part) in parts.iter().enumerate() {
        let start = clock_start(part)?;
        for e in &part.report.events {
            let at = start.seconds() as f64 + e.seconds;
            let clock = LocalTime::from_seconds(at.floor() as i64);
            let tenths = ((at - at.floor()) * 10.0).floor() as i64;
            let kind = match e.kind {
                EventKind::Screenline => "screenline",
                EventKind::Zone => "zone",
            };
            let fields = [
                quote(site),
                quote(part.camera),
                quote(part.entry),
                format!("{clock}.{tenths}"),
                kind.to_string(),
                quote(&e.name),
                quote(&e.label),
                quote(&e.class),
                e.track.to_string(),
                e.frame.to_string(),
                yes_no(e.inferred).to_string(),
                yes_no(e.added).to_string(),
                quote(e.reason.as_deref().unwrap_or("")),
            ];
            rows.push((at, k, fields.join(",")));
        }
    }
    rows.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
    let mut out = String::from(
        "site,camera,entry,time,kind,name,direction,class,track,frame,inferred,added,reason\n",
    );
    for (_, _, row) in rows {
        out.push_str(&row);
        out.push('\n');
    }
    Ok(out)
}

fn yes_no(b: bool) -> &'static str {
    if b {
        "yes"
    } else {
        "no"
    }
}

/// The clock time of a part's frame 1.
fn clock_start(part: &Part) -> Result<LocalTime, Error> {
    part.report.plan.start.as_deref().and_then(LocalTime::parse).ok_or_else(|| {
        unsuitable(format!(
            "{}: no recording start, so its counts cannot be placed on the clock beside the others: give the start column in the manifest (or the plan's start)",
            part.entry
        ))
    })
}

fn unsuitable(message: String) -> Error {
    Error::new(ErrorKind::Unsuitable, message)
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn an_interval_is_whole_only_where_the_clips_cover_it_without_a_gap() {
        let t = |s: &str| LocalTime::parse(s).unwrap();
        let camera = |spans: &[(&str, &str)]| {
            let mut c = Camera {
                spans: spans.iter().map(|&(a, b)| (t(a), t(b), "clip")).collect(),
                ..Camera::default()
            };
            c.order().map(|()| c)
        };
        let (a, b) = (t("2026-03-02T07:00:00"), t("2026-03-02T07:15:00"));
        let back_to_back = [
            ("2026-03-02T07:07:30", "2026-03-02T07:20:00"),
            ("2026-03-02T07:00:00", "2026-03-02T07:07:30"),
        ];
        assert!(
            camera(&back_to_back).unwrap().covers(a, b),
            "back to back, in any order"
        );
        let gap = [
            ("2026-03-02T07:00:00", "2026-03-02T07:07:30"),
            ("2026-03-02T07:08:00", "2026-03-02T07:20:00"),
        ];
        assert!(
            !camera(&gap).unwrap().covers(a, b),
            "half a minute missing at 07:07:30"
        );
        assert!(
            !camera(&back_to_back[..1]).unwrap().covers(a, b),
            "the first half missing"
        );
        let earlier = [
            ("2026-03-02T06:00:00", "2026-03-02T06:10:00"),
            ("2026-03-02T07:00:00", "2026-03-02T07:20:00"),
        ];
        assert!(
            camera(&earlier).unwrap().covers(a, b),
            "an earlier clip does not matter"
        );
        let overlap = [
            ("2026-03-02T07:00:00", "2026-03-02T07:08:00"),
            ("2026-03-02T07:07:30", "2026-03-02T07:20:00"),
        ];
        let e = camera(&overlap).err().unwrap().to_string();
        assert!(e.contains("overlap") && e.contains("counted twice"), "{e}");
    }
}
