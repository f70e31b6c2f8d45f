//! Stage 3a: the crossings of a counted path with a screenline: direction from the movement across
//! each segment, confirmed once an observed anchor is the margin (`rules.hysteresis` box heights)
//! clear of the line, cancelled by a crossing back before that, timed at the middle of its touches
//! of the line (docs/counting-rules.md).

use super::paths::{distance_to_line, Counted};
use crate::geometry::Point;
use crate::plan::Screenline;

/// When and where a path met a line or a zone edge.
#[derive(Debug, Clone, Copy)]
pub(super) struct Moment {
    /// Fractional frame number (1-based), interpolated along the step.
    pub frame: f64,
    /// Where, pixels.
    pub at: Point,
    /// Whether the step touched a predicted position or bridged joined fragments.
    pub inferred: bool,
}

/// A counted crossing of a screenline.
#[derive(Debug, Clone, Copy)]
pub(super) struct Crossing {
    pub forward: bool,
    pub moment: Moment,
}

/// Crossings of one counted track with one screenline.
pub(super) fn crossings(c: &Counted, line: &Screenline, hysteresis: f64) -> Vec<Crossing> {
    let mut out = Vec::new();
    let mut pending: Option<Crossing> = None;
    // Every touch of the line since the path was last seen clear of it.
    let mut touches: Vec<Moment> = Vec::new();
    for k in 1..c.points.len() {
        let (a, b) = (c.points[k - 1], c.points[k]);
        let inferred = c.step_inferred(k);
        let mut hits: Vec<(f64, bool)> = Vec::new();
        for s in &line.segments {
            if let Some(t) = s.intersect_param(&a.p, &b.p) {
                let (sa, sb) = (s.side(&a.p), s.side(&b.p));
                if sa == sb {
                    continue;
                }
                hits.push((t, sb > sa));
            }
        }
        hits.sort_by(|x, y| x.0.total_cmp(&y.0));
        for (t, forward) in hits {
            let moment = Moment {
                frame: f64::from(a.frame) + t * f64::from(b.frame - a.frame),
                at: Point::new(a.p.x + t * (b.p.x - a.p.x), a.p.y + t * (b.p.y - a.p.y)),
                inferred,
            };
            touches.push(moment);
            match &pending {
                None => pending = Some(Crossing { forward, moment }),
                // Same direction again before getting clear (a vertex, or touching twice): one crossing.
                Some(p) if p.forward == forward => {}
                // Back across before getting clear: jitter, neither counts.
                Some(_) => pending = None,
            }
        }
        // Confirmation needs a seen position: a prediction that drifts over the line and back while
        // the object is unseen must not count twice.
        if b.observed && distance_to_line(line, &b.p) >= hysteresis * b.height {
            if let Some(p) = pending.take() {
                out.push(timed_mid(p, &touches));
            }
            touches.clear();
        }
    }
    if let (Some(p), Some(last)) = (pending, c.points.last()) {
        if distance_to_line(line, &last.p) >= 0.5 * hysteresis * last.height {
            out.push(timed_mid(p, &touches));
        }
    }
    out
}

/// A crossing timed at the middle touch of its run of touches: a path that wanders along the
/// line (jitter, a shallow angle) meets it many times, and its true crossing lies among them, not
/// at the last.
fn timed_mid(mut p: Crossing, touches: &[Moment]) -> Crossing {
    if let Some(m) = touches.get(touches.len().saturating_sub(1) / 2) {
        p.moment = *m;
    }
    p
}
