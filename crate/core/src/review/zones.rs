//! The signs that a zone's count may be wrong (a rule of thumb of our own, weighted as a track
//! appearing near a line is): a track that appears or disappears inside a zone, away from the
//! picture's edge and not because the footage starts or ends, is first (or last) seen inside with
//! no entry (or exit) counted, though someone may have come in (or left) while hidden, or the
//! tracker lost and found them. Ends joined to another piece by the counting are one visit and
//! are passed over.

use super::signs::anchor;
use super::{end_doubt, Doubt, DoubtKind, Scene};
use crate::plan::Plan;
use crate::report::Report;
use crate::track::Track;

pub(super) fn zone_end_doubts(
    t: &Track,
    plan: &Plan,
    report: &Report,
    scene: &Scene,
    out: &mut Vec<Doubt>,
) {
    let (Some(first), Some(last)) = (t.boxes.first(), t.boxes.last()) else {
        return;
    };
    for (tb, starts) in [(first, true), (last, false)] {
        if scene.at_edge(&tb.bbox) || scene.at_footage_edge(tb.frame, starts) {
            continue;
        }
        let joined = report.joins.iter().any(|j| {
            let [earlier, later] = j.tracks;
            if starts {
                later == t.id
            } else {
                earlier == t.id
            }
        });
        if joined {
            continue;
        }
        let p = anchor(&tb.bbox, plan.spec.anchor);
        let Some(zone) = plan.zones.iter().find(|z| z.polygon.contains(&p)) else {
            continue;
        };
        let (kind, why) = if starts {
            (
                DoubtKind::StartsInsideZone,
                format!(
                    "Track {} appears inside `{}`, not at the picture's edge: it is counted as first \
                     seen inside, with no entry. If someone came in unseen, add their entry (Events, \
                     Add an entry or exit), or merge this track with the one it goes on from.",
                    t.id, zone.name
                ),
            )
        } else {
            (
                DoubtKind::EndsInsideZone,
                format!(
                    "Track {} disappears inside `{}`, not at the picture's edge: it is counted as \
                     last seen inside, with no exit. If someone left unseen, add their exit (Events, \
                     Add an entry or exit), or merge this track with the one that goes on.",
                    t.id, zone.name
                ),
            )
        };
        let key = format!("{kind:?}:{}:{}", t.id, tb.frame);
        let fps = plan.spec.frame_rate;
        out.push(end_doubt((key, kind), (t.id, tb.frame), why, (fps, report)));
    }
}
