//! Stage 3a′ and 4a: a screenline's crossings as events, and its tallies from those events (after
//! the person's corrections): by direction, class and interval, with the peak hours.

use super::crossings::crossings;
use super::paths::Counted;
use super::stats::peak_hour;
use super::timeline::Timeline;
use crate::plan::{PlanSpec, Screenline};
use crate::report::{
    Direction, DirectionCounts, Event, EventKind, IntervalCount, PeakHour, ScreenlineReport,
};
use std::collections::BTreeMap;

/// A screenline's crossings as events, in counted-track order.
pub(super) fn line_events(
    line: &Screenline,
    counted: &[Counted],
    timeline: &Timeline,
    spec: &PlanSpec,
) -> Vec<Event> {
    let mut events = Vec::new();
    for c in counted {
        for x in crossings(c, line, spec.rules.hysteresis) {
            let direction = if x.forward {
                (Direction::Forward, line.forward.as_str())
            } else {
                (Direction::Backward, line.backward.as_str())
            };
            events.push(timeline.event(c, EventKind::Screenline, &line.name, direction, x.moment));
        }
    }
    events
}

/// The report of one screenline from its events: by direction, class and interval, with the
/// peak hours. `added` and `rejected` are the person's corrections to it.
pub(super) fn tally(
    line: &Screenline,
    events: &[&Event],
    (added, rejected): (u64, u64),
    timeline: &Timeline,
    spec: &PlanSpec,
) -> ScreenlineReport {
    let mut intervals: Vec<IntervalCount> = (0..timeline.count())
        .map(|i| {
            let (start, end, partial) = timeline.bounds(i);
            IntervalCount {
                start,
                end,
                partial,
                forward: 0,
                backward: 0,
                by_class: BTreeMap::new(),
            }
        })
        .collect();
    let mut by_class: BTreeMap<String, DirectionCounts> = BTreeMap::new();
    let mut total = DirectionCounts::default();
    let mut inferred = 0;
    for e in events {
        let forward = e.direction == Direction::Forward;
        let slot = &mut intervals[timeline.index(e.seconds)];
        if forward {
            slot.forward += 1;
        } else {
            slot.backward += 1;
        }
        slot.by_class
            .entry(e.class.clone())
            .or_default()
            .add(forward);
        by_class.entry(e.class.clone()).or_default().add(forward);
        total.add(forward);
        inferred += u64::from(e.inferred);
    }
    let peaks = PeakHours::of(&intervals, spec.interval_minutes);
    ScreenlineReport {
        name: line.name.clone(),
        forward_label: line.forward.clone(),
        backward_label: line.backward.clone(),
        forward: total.forward,
        backward: total.backward,
        inferred,
        added,
        rejected,
        by_class,
        peak_hour: peaks.find(&|i| i.forward + i.backward),
        peak_hour_forward: peaks.find(&|i| i.forward),
        peak_hour_backward: peaks.find(&|i| i.backward),
        intervals,
    }
}

/// The whole intervals of a line, for finding peak hours in them.
struct PeakHours<'a> {
    whole: Vec<&'a IntervalCount>,
    per_hour: usize,
    /// Peak hours need a whole number of intervals per hour.
    exact_hour: bool,
}

impl<'a> PeakHours<'a> {
    fn of(intervals: &'a [IntervalCount], interval_minutes: f64) -> Self {
        PeakHours {
            whole: intervals.iter().filter(|i| !i.partial).collect(),
            per_hour: (60.0 / interval_minutes).round() as usize,
            exact_hour: (60.0 / interval_minutes).fract() == 0.0,
        }
    }

    /// The busiest hour of the totals `f` picks from each interval.
    fn find(&self, f: &dyn Fn(&IntervalCount) -> u64) -> Option<PeakHour> {
        let totals: Vec<u64> = self.whole.iter().map(|i| f(i)).collect();
        peak_hour(&totals, self.per_hour)
            .filter(|_| self.exact_hour)
            .map(|run| PeakHour {
                start: self.whole[run.first].start.clone(),
                end: self.whole[run.first + self.per_hour - 1].end.clone(),
                volume: run.volume,
                peak_interval_volume: run.peak_interval_volume,
                phf: (run.phf * 1000.0).round() / 1000.0,
            })
    }
}
