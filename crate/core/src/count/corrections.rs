//! The person's corrections to the counts: a rejected crossing leaves the events (kept apart, with
//! its reason), an added one joins them. Applied to the screenline events before they are tallied,
//! so every total, interval and peak hour follows; a zone's entries and exits, to the zone's
//! tally (`zone_corrections`).

use super::hand::{added_event, counted_at, in_footage, not_in_plan};
use super::timeline::Timeline;
use super::zone_corrections;
use crate::edits::{Edit, Outcome, Way};
use crate::plan::{Plan, Screenline};
use crate::report::{Direction, Event, EventKind, ZoneReport};

/// The events after the corrections, the rejected events, and an outcome for each edit on counts
/// (`None` for the edits on tracks).
pub(super) struct Corrected {
    pub rejected: Vec<Event>,
    pub outcomes: Vec<Option<Outcome>>,
}

/// Applies the edits on counts, in order, to the events (crossings, entries and exits) and to the
/// zones' tallies (`zones`; the lines are tallied from the events after).
pub(super) fn correct(
    (events, zones): (&mut Vec<Event>, &mut [ZoneReport]),
    edits: &[Edit],
    plan: &Plan,
    timeline: &Timeline,
) -> Corrected {
    let mut rejected = Vec::new();
    let outcomes = edits
        .iter()
        .map(|edit| {
            let result = match edit {
                Edit::RejectCrossing { .. } => reject(events, edit, plan, &mut rejected),
                Edit::AddCrossing { .. } => add(events, edit, plan, timeline),
                Edit::RejectZoneEvent { .. } => {
                    zone_corrections::reject(events, zones, edit, plan, (timeline, &mut rejected))
                }
                Edit::AddZoneEvent { .. } => {
                    zone_corrections::add(events, zones, edit, plan, timeline)
                }
                _ => return None,
            };
            Some(Outcome {
                edit: edit.clone(),
                applied: result.is_ok(),
                note: result.unwrap_or_else(|why| why),
            })
        })
        .collect();
    Corrected { rejected, outcomes }
}

fn direction(way: Way) -> Direction {
    match way {
        Way::Forward => Direction::Forward,
        Way::Backward => Direction::Backward,
    }
}

fn reject(
    events: &mut Vec<Event>,
    edit: &Edit,
    plan: &Plan,
    rejected: &mut Vec<Event>,
) -> Result<String, String> {
    let Edit::RejectCrossing {
        screenline,
        direction: way,
        track,
        frame,
        reason,
    } = edit
    else {
        return Err(String::new());
    };
    if !plan.screenlines.iter().any(|l| l.name == *screenline) {
        return Err(no_such_line(screenline, plan));
    }
    let what = (EventKind::Screenline, screenline.as_str(), direction(*way));
    let i = counted_at(events, what, (*track, *frame)).ok_or_else(|| {
        format!(
            "no crossing of `{screenline}` by track {track} at frame {frame} is counted now: \
                 the tracks or the plan have changed since this edit was made"
        )
    })?;
    let mut e = events.remove(i);
    e.reason = reason.clone();
    rejected.push(e);
    Ok(format!(
        "the crossing of `{screenline}` by track {track} at frame {frame} is not counted"
    ))
}

fn add(
    events: &mut Vec<Event>,
    edit: &Edit,
    plan: &Plan,
    timeline: &Timeline,
) -> Result<String, String> {
    let Edit::AddCrossing {
        screenline,
        direction: way,
        class,
        frame,
        x,
        y,
        reason,
    } = edit
    else {
        return Err(String::new());
    };
    let line = plan
        .screenlines
        .iter()
        .find(|l| l.name == *screenline)
        .ok_or_else(|| no_such_line(screenline, plan))?;
    if let (Some(px), Some(py)) = (x, y) {
        // An added crossing lies on its line; a place far from it (off the picture, another
        // line's) would put the event, and its picture on the evidence sheet, elsewhere.
        let off = super::paths::distance_to_line(line, &crate::geometry::Point::new(*px, *py));
        let length: f64 = line.segments.iter().map(|s| s.length()).sum();
        if off > (0.25 * length).max(20.0) {
            return Err(format!(
                "x, y ({px}, {py}) lie {off:.0} pixels from `{screenline}`: an added crossing is \
                 on its line (leave x and y out to place it at the line's middle)"
            ));
        }
    }
    in_footage(*frame, timeline)?;
    let (mx, my) = middle(line);
    let label = match way {
        Way::Forward => line.forward.clone(),
        Way::Backward => line.backward.clone(),
    };
    events.push(added_event(
        (EventKind::Screenline, &line.name),
        (direction(*way), label),
        class,
        (*frame, x.unwrap_or(mx), y.unwrap_or(my)),
        reason,
        timeline,
    ));
    Ok(format!(
        "a {class} crossing of `{screenline}` added at frame {frame}"
    ))
}

/// Why an edit naming a line the plan lacks is not applied, with the lines it has.
fn no_such_line(name: &str, plan: &Plan) -> String {
    let names = plan.screenlines.iter().map(|l| l.name.as_str());
    not_in_plan(("screenline", "line"), name, names)
}

/// The middle of a line's first segment: where an added crossing is drawn when no place is given.
fn middle(line: &Screenline) -> (f64, f64) {
    line.segments.first().map_or((0.0, 0.0), |s| {
        ((s.a.x + s.b.x) / 2.0, (s.a.y + s.b.y) / 2.0)
    })
}
