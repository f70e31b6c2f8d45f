//! Stage 4b: a zone's tallies: entries and exits as events, by class and interval; tracks present
//! at the start and the end; occupancy per interval; dwell per visit.

use super::paths::Counted;
use super::stats::summary;
use super::timeline::Timeline;
use super::visits::{visits, Visit};
use crate::plan::{PlanSpec, Zone};
use crate::report::{Direction, Event, EventKind, ZoneInterval, ZoneReport};
use std::collections::BTreeMap;

/// What one zone adds to the report.
pub(super) struct ZoneTally {
    pub report: ZoneReport,
    /// Its entry and exit events, in counted-track order.
    pub events: Vec<Event>,
    /// Each counted track's meetings with the zone (for movements): the track's index in
    /// `counted`, and the seconds at which it entered, or was first seen inside.
    pub meetings: Vec<(usize, f64)>,
}

pub(super) fn zone(
    zone: &Zone,
    counted: &[Counted],
    timeline: &Timeline,
    spec: &PlanSpec,
) -> ZoneTally {
    let mut tally = ZoneTally {
        report: empty_report(zone, timeline),
        events: Vec::new(),
        meetings: Vec::new(),
    };
    // Each visit's frames inside, as +1 where it starts and -1 after it ends: occupancy is swept
    // interval by interval, never held frame by frame (footage may span billions of frames).
    let mut changes: Vec<(u64, i64)> = Vec::new();
    let mut dwell = Vec::new();
    for (ci, c) in counted.iter().enumerate() {
        for v in visits(c, zone, spec.rules.zone_hysteresis()) {
            changes.push((u64::from(v.first_frame), 1));
            changes.push((u64::from(v.last_frame) + 1, -1));
            tally.visit(ci, c, &v, zone, timeline);
            if let (Some(entry), Some(exit)) = (v.entry, v.exit) {
                dwell.push((exit.frame - entry.frame) / timeline.fps);
            }
        }
    }
    changes.sort_unstable();
    occupancy_per_interval(&mut tally.report.intervals, &changes, timeline);
    tally.report.dwell_seconds = summary(dwell);
    tally
}

impl ZoneTally {
    /// Counts one visit's entry (or presence at the start) and exit (or presence at the end).
    fn visit(&mut self, ci: usize, c: &Counted, v: &Visit, zone: &Zone, timeline: &Timeline) {
        let r = &mut self.report;
        match v.entry {
            Some(m) => {
                let entry = (Direction::Entry, "entry");
                let e = timeline.event(c, EventKind::Zone, &zone.name, entry, m);
                r.entries += 1;
                *r.entries_by_class.entry(c.class.clone()).or_default() += 1;
                r.intervals[timeline.index(e.seconds)].entries += 1;
                self.meetings.push((ci, e.seconds));
                self.events.push(e);
            }
            None => {
                r.present_at_start += 1;
                self.meetings
                    .push((ci, timeline.seconds(f64::from(v.first_frame))));
            }
        }
        match v.exit {
            Some(m) => {
                let exit = (Direction::Exit, "exit");
                let e = timeline.event(c, EventKind::Zone, &zone.name, exit, m);
                r.exits += 1;
                *r.exits_by_class.entry(c.class.clone()).or_default() += 1;
                r.intervals[timeline.index(e.seconds)].exits += 1;
                self.events.push(e);
            }
            None => r.present_at_end += 1,
        }
    }
}

fn empty_report(zone: &Zone, timeline: &Timeline) -> ZoneReport {
    ZoneReport {
        name: zone.name.clone(),
        entries: 0,
        exits: 0,
        present_at_start: 0,
        present_at_end: 0,
        entries_by_class: BTreeMap::new(),
        exits_by_class: BTreeMap::new(),
        intervals: (0..timeline.count())
            .map(|i| {
                let (start, end, _) = timeline.bounds(i);
                ZoneInterval {
                    start,
                    end,
                    entries: 0,
                    exits: 0,
                    mean_occupancy: 0.0,
                    max_occupancy: 0,
                }
            })
            .collect(),
        dwell_seconds: summary(Vec::new()),
        added: 0,
        rejected: 0,
    }
}

/// Mean and largest number inside, over the frames of each interval, from the sorted changes of
/// the number inside (`(frame, +1 or -1)`).
fn occupancy_per_interval(
    intervals: &mut [ZoneInterval],
    changes: &[(u64, i64)],
    timeline: &Timeline,
) {
    let fps = timeline.fps;
    let (mut next, mut inside) = (0, 0i64);
    for (i, slot) in intervals.iter_mut().enumerate() {
        let first = (i as f64 * timeline.interval_s * fps).floor() as u64 + 1;
        let last = (((i + 1) as f64 * timeline.interval_s * fps).floor() as u64)
            .min(u64::from(timeline.frame_count));
        while next < changes.len() && changes[next].0 <= first {
            inside += changes[next].1;
            next += 1;
        }
        if last < first {
            continue;
        }
        let (mut sum, mut max, mut from) = (0u64, inside, first);
        loop {
            let until = match changes.get(next) {
                Some(&(f, _)) if f <= last => f,
                _ => last + 1,
            };
            sum += inside.max(0) as u64 * (until - from);
            if until > last {
                break;
            }
            while next < changes.len() && changes[next].0 == until {
                inside += changes[next].1;
                next += 1;
            }
            max = max.max(inside);
            from = until;
        }
        slot.max_occupancy = max.max(0) as u64;
        let mean = sum as f64 / (last - first + 1) as f64;
        slot.mean_occupancy = (mean * 100.0).round() / 100.0;
    }
}
