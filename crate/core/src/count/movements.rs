//! Stage 4c: movements, origin → destination. A counted track's origin is the first screenline or
//! zone it meets and its destination the last (the same name for a U-turn); tracks that meet only
//! one are counted apart, as having no destination.

use super::paths::Counted;
use crate::report::{Event, EventKind, Movement};
use std::collections::BTreeMap;

/// The movements by origin, destination and class, and the number of tracks that met exactly one
/// screenline or zone. `zone_meetings[i]` holds counted track `i`'s zone meetings (seconds, zone
/// name) in zone order; `events` are the screenline and zone events in the order they were made.
pub(super) fn movements(
    counted: &[Counted],
    zone_meetings: Vec<Vec<(f64, String)>>,
    events: &[Event],
) -> (Vec<Movement>, u64) {
    let mut meetings = zone_meetings;
    for e in events
        .iter()
        .filter(|e| e.kind == EventKind::Screenline && !e.added)
    {
        if let Ok(ci) = counted.binary_search_by_key(&e.track, |c| c.ids[0]) {
            meetings[ci].push((e.seconds, e.name.clone()));
        }
    }
    let mut counts: BTreeMap<(String, String, String), u64> = BTreeMap::new();
    let mut single = 0;
    for (ci, m) in meetings.iter_mut().enumerate() {
        m.sort_by(|a, b| a.0.total_cmp(&b.0));
        match m.len() {
            0 => {}
            1 => single += 1,
            _ => {
                let key = (
                    m[0].1.clone(),
                    m[m.len() - 1].1.clone(),
                    counted[ci].class.clone(),
                );
                *counts.entry(key).or_default() += 1;
            }
        }
    }
    let movements = counts
        .into_iter()
        .map(|((origin, destination, class), count)| Movement {
            u_turn: origin == destination,
            origin,
            destination,
            class,
            count,
        })
        .collect();
    (movements, single)
}
