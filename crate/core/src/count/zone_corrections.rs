//! The person's corrections to a zone's entries and exits: a rejected one leaves the events (kept
//! apart, with its reason) and the zone's totals, by class and by interval; an added one joins
//! them. Occupancy, dwell times and movements follow the tracks, as before any correction.

use super::hand::{added_event, counted_at, in_footage, not_in_plan};
use super::timeline::Timeline;
use crate::edits::{Edit, ZoneWay};
use crate::plan::{Plan, Zone};
use crate::report::{Direction, Event, EventKind, ZoneReport};

fn direction(way: ZoneWay) -> Direction {
    match way {
        ZoneWay::Entry => Direction::Entry,
        ZoneWay::Exit => Direction::Exit,
    }
}

fn way_word(way: ZoneWay) -> &'static str {
    match way {
        ZoneWay::Entry => "entry",
        ZoneWay::Exit => "exit",
    }
}

/// The zone named `name` and its report, or why an edit naming it is not applied.
fn zone_named<'a>(
    name: &str,
    plan: &'a Plan,
    reports: &'a mut [ZoneReport],
) -> Result<(&'a Zone, &'a mut ZoneReport), String> {
    let zone = plan.zones.iter().find(|z| z.name == name);
    let report = reports.iter_mut().find(|r| r.name == name);
    zone.zip(report).ok_or_else(|| {
        let names = plan.zones.iter().map(|z| z.name.as_str());
        not_in_plan(("zone", "zone"), name, names)
    })
}

pub(super) fn reject(
    events: &mut Vec<Event>,
    reports: &mut [ZoneReport],
    edit: &Edit,
    plan: &Plan,
    (timeline, rejected): (&Timeline, &mut Vec<Event>),
) -> Result<String, String> {
    let Edit::RejectZoneEvent {
        zone,
        way,
        track,
        frame,
        reason,
    } = edit
    else {
        return Err(String::new());
    };
    let (_, report) = zone_named(zone, plan, reports)?;
    let what = (EventKind::Zone, zone.as_str(), direction(*way));
    let i = counted_at(events, what, (*track, *frame)).ok_or_else(|| {
        format!(
            "no {} of `{zone}` by track {track} at frame {frame} is counted now: the tracks \
                 or the plan have changed since this edit was made",
            way_word(*way)
        )
    })?;
    let mut e = events.remove(i);
    count(report, *way, &e.class, e.seconds, timeline, false);
    report.rejected += 1;
    e.reason = reason.clone();
    rejected.push(e);
    Ok(format!(
        "the {} of `{zone}` by track {track} at frame {frame} is not counted",
        way_word(*way)
    ))
}

pub(super) fn add(
    events: &mut Vec<Event>,
    reports: &mut [ZoneReport],
    edit: &Edit,
    plan: &Plan,
    timeline: &Timeline,
) -> Result<String, String> {
    let Edit::AddZoneEvent {
        zone,
        way,
        class,
        frame,
        reason,
    } = edit
    else {
        return Err(String::new());
    };
    let (z, report) = zone_named(zone, plan, reports)?;
    in_footage(*frame, timeline)?;
    let (x, y) = middle(z);
    let e = added_event(
        (EventKind::Zone, &z.name),
        (direction(*way), way_word(*way).to_string()),
        class,
        (*frame, x, y),
        reason,
        timeline,
    );
    count(report, *way, class, e.seconds, timeline, true);
    report.added += 1;
    events.push(e);
    Ok(format!(
        "a {class} {} of `{zone}` added at frame {frame}",
        way_word(*way)
    ))
}

/// One more (`up`) or one fewer of `way` for `class`, in the zone's totals and in the interval at
/// `seconds`; a class whose count comes to nothing leaves the zone's list.
fn count(
    report: &mut ZoneReport,
    way: ZoneWay,
    class: &str,
    seconds: f64,
    timeline: &Timeline,
    up: bool,
) {
    let step = |n: &mut u64| *n = if up { *n + 1 } else { n.saturating_sub(1) };
    let (total, by_class) = match way {
        ZoneWay::Entry => (&mut report.entries, &mut report.entries_by_class),
        ZoneWay::Exit => (&mut report.exits, &mut report.exits_by_class),
    };
    step(total);
    let n = by_class.entry(class.to_string()).or_default();
    step(n);
    if *n == 0 {
        by_class.remove(class);
    }
    if let Some(iv) = report.intervals.get_mut(timeline.index(seconds)) {
        match way {
            ZoneWay::Entry => step(&mut iv.entries),
            ZoneWay::Exit => step(&mut iv.exits),
        }
    }
}

/// Where an added entry or exit is drawn: the mean of the zone's corners.
fn middle(zone: &Zone) -> (f64, f64) {
    let c = &zone.polygon.corners;
    if c.is_empty() {
        return (0.0, 0.0);
    }
    let n = c.len() as f64;
    (
        c.iter().map(|p| p.x).sum::<f64>() / n,
        c.iter().map(|p| p.y).sum::<f64>() / n,
    )
}
