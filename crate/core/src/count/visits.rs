//! Stage 3b: the visits of a counted path to a zone: entries and exits confirmed with the zone's
//! margin, and the frames inside (docs/counting-rules.md, "Zones").

use super::crossings::Moment;
use super::paths::Counted;
use crate::geometry::{Point, Segment};
use crate::plan::Zone;

/// One stay inside a zone.
pub(super) struct Visit {
    pub entry: Option<Moment>,
    pub exit: Option<Moment>,
    pub first_frame: u32,
    pub last_frame: u32,
}

pub(super) fn visits(c: &Counted, zone: &Zone, hysteresis: f64) -> Vec<Visit> {
    let mut out: Vec<Visit> = Vec::new();
    let Some(first) = c.points.first() else {
        return out;
    };
    let mut inside = zone.polygon.contains(&first.p);
    if inside {
        out.push(Visit {
            entry: None,
            exit: None,
            first_frame: first.frame,
            last_frame: first.frame,
        });
    }
    // Where the anchor last crossed the edge, waiting to get clear of it.
    let mut edge_crossing: Option<Moment> = None;
    for k in 1..c.points.len() {
        let (a, b) = (c.points[k - 1], c.points[k]);
        let inferred = c.step_inferred(k);
        let now_inside = zone.polygon.contains(&b.p);
        if now_inside != zone.polygon.contains(&a.p) && edge_crossing.is_none() {
            let n = zone.polygon.corners.len();
            let t = (0..n)
                .filter_map(|i| {
                    Segment::new(zone.polygon.corners[i], zone.polygon.corners[(i + 1) % n])
                        .intersect_param(&a.p, &b.p)
                })
                .fold(1.0, f64::min);
            edge_crossing = Some(Moment {
                frame: f64::from(a.frame) + t * f64::from(b.frame - a.frame),
                at: Point::new(a.p.x + t * (b.p.x - a.p.x), a.p.y + t * (b.p.y - a.p.y)),
                inferred,
            });
        }
        if now_inside == inside {
            // Back on the side it was on: an edge crossing not yet confirmed is jitter.
            edge_crossing = None;
        } else if zone.polygon.distance_to_edge(&b.p) >= hysteresis * b.height {
            let at = edge_crossing.take().unwrap_or(Moment {
                frame: f64::from(b.frame),
                at: b.p,
                inferred,
            });
            if now_inside {
                out.push(Visit {
                    entry: Some(at),
                    exit: None,
                    first_frame: b.frame,
                    last_frame: b.frame,
                });
            } else if let Some(v) = out.last_mut() {
                v.exit = Some(at);
            }
            inside = now_inside;
        }
        if inside {
            if let Some(v) = out.last_mut() {
                v.last_frame = b.frame;
            }
        }
    }
    out
}
