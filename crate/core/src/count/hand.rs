//! Events of the person's corrections to the counts, for lines and zones alike: where a counted
//! event a rejection names is, and an event added by hand.

use super::timeline::Timeline;
use crate::report::{Direction, Event, EventKind};

/// Where the counted event (not one added by hand) of this kind, line or zone and direction, by
/// counted track `track` at `frame`, is among the events.
pub(super) fn counted_at(
    events: &[Event],
    (kind, name, direction): (EventKind, &str, Direction),
    (track, frame): (u32, u32),
) -> Option<usize> {
    events.iter().position(|e| {
        e.kind == kind
            && !e.added
            && e.name == name
            && e.direction == direction
            && e.track == track
            && e.frame == frame
    })
}

/// Why an event cannot be added at `frame`, when it is not in the footage.
pub(super) fn in_footage(frame: u32, timeline: &Timeline) -> Result<(), String> {
    if frame == 0 || frame > timeline.frame_count {
        return Err(format!(
            "frame {frame} is not in the footage (frames 1 to {})",
            timeline.frame_count
        ));
    }
    Ok(())
}

/// An event a person added by hand: a crossing of a line or a zone's entry or exit, at `frame`,
/// drawn at `x`, `y`.
pub(super) fn added_event(
    (kind, name): (EventKind, &str),
    (direction, label): (Direction, String),
    class: &str,
    (frame, x, y): (u32, f64, f64),
    reason: &Option<String>,
    timeline: &Timeline,
) -> Event {
    let seconds = timeline.seconds(f64::from(frame));
    Event {
        track: 0,
        track_ids: Vec::new(),
        kind,
        name: name.to_string(),
        direction,
        label,
        frame,
        seconds: (seconds * 1000.0).round() / 1000.0,
        time: timeline.label(seconds),
        class: class.to_string(),
        x: (x * 100.0).round() / 100.0,
        y: (y * 100.0).round() / 100.0,
        inferred: false,
        added: true,
        reason: reason.clone(),
    }
}

/// Why an edit naming a line or zone the plan lacks is not applied, with those it has: `kind` as
/// the plan names it (`screenline`, `zone`), `short` as a person says it (`line`, `zone`).
pub(super) fn not_in_plan<'a>(
    (kind, short): (&str, &str),
    name: &str,
    names: impl Iterator<Item = &'a str>,
) -> String {
    let names: Vec<String> = names.map(|n| format!("`{n}`")).collect();
    format!(
        "the plan has no {kind} named `{name}` (it has {}): was the {short} renamed, or the edit \
         made with another plan?",
        if names.is_empty() {
            "none".to_string()
        } else {
            names.join(", ")
        }
    )
}
