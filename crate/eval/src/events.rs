//! Counts judged one event at a time: each true crossing of a screenline matched to at most one
//! counted crossing of the same line and direction, close in time (and, when asked, in place), one
//! to one. What stays unmatched is a missed crossing (true) or an extra one (counted), so errors
//! that cancel in the totals still show.

use throughline_core::track::assign::{maximise_edges, Edge};

/// One screenline crossing: its line, direction, frame (1-based) and where the anchor met the
/// line (pixels, x right, y down).
#[derive(Debug, Clone, PartialEq)]
pub struct Crossing {
    pub line: String,
    pub direction: String,
    pub frame: f64,
    pub x: f64,
    pub y: f64,
}

/// How close a counted crossing must be to a true one to be the same event: at most `frames`
/// apart in time and, when `pixels` is given, at most that far apart on the picture.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Window {
    pub frames: f64,
    pub pixels: Option<f64>,
}

/// The outcome of matching: how many true and counted crossings, and how many pairs.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct EventTally {
    pub truth: usize,
    pub counted: usize,
    pub matched: usize,
}

impl EventTally {
    /// True crossings with no counted one.
    pub fn missed(&self) -> usize {
        self.truth - self.matched
    }

    /// Counted crossings with no true one.
    pub fn extra(&self) -> usize {
        self.counted - self.matched
    }

    /// `n` as a percentage of the true crossings (0 when there are none).
    pub fn share(&self, n: usize) -> f64 {
        if self.truth == 0 {
            0.0
        } else {
            100.0 * n as f64 / self.truth as f64
        }
    }
}

/// Tallies of several scenes add up.
impl std::ops::AddAssign for EventTally {
    fn add_assign(&mut self, other: EventTally) {
        self.truth += other.truth;
        self.counted += other.counted;
        self.matched += other.matched;
    }
}

/// The pairs (index into `truth`, index into `counted`) of the one-to-one matching: same line and
/// direction, within the window; first as many pairs as possible, then the closest (a
/// maximum-weight assignment, so a nearby crossing of someone else is not taken first and does
/// not leave the right one unmatched). Pairs come in the order of `truth`.
pub fn match_crossings(
    truth: &[Crossing],
    counted: &[Crossing],
    window: Window,
) -> Vec<(usize, usize)> {
    let mut edges = Vec::new();
    for (i, a) in truth.iter().enumerate() {
        for (j, b) in counted.iter().enumerate() {
            if a.line != b.line || a.direction != b.direction {
                continue;
            }
            let frames = (a.frame - b.frame).abs();
            let pixels = (a.x - b.x).hypot(a.y - b.y);
            let near = window.pixels.is_none_or(|p| pixels <= p);
            if frames > window.frames || !near {
                continue;
            }
            // Closeness in 0..=1; every pair outweighs any closeness, so the count comes first.
            let closeness = match window.pixels {
                Some(p) => 1.0 - (frames / window.frames + pixels / p) / 2.0,
                None => 1.0 - frames / window.frames,
            };
            edges.push(Edge {
                row: i,
                col: j,
                cost: 1000.0 + closeness,
            });
        }
    }
    let mut pairs = maximise_edges(truth.len(), counted.len(), &edges);
    pairs.sort_unstable();
    pairs
}

/// Matches and tallies: true, counted and matched crossings.
pub fn tally(truth: &[Crossing], counted: &[Crossing], window: Window) -> EventTally {
    EventTally {
        truth: truth.len(),
        counted: counted.len(),
        matched: match_crossings(truth, counted, window).len(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn at(line: &str, direction: &str, frame: f64, x: f64) -> Crossing {
        Crossing {
            line: line.into(),
            direction: direction.into(),
            frame,
            x,
            y: 200.0,
        }
    }

    const SECOND: Window = Window {
        frames: 25.0,
        pixels: None,
    };

    /// Worked by hand. True: A fwd at 100, B fwd at 120, C back at 300, D fwd on another line at
    /// 500, E fwd at 900. Counted: a fwd at 110 (within a second of A and of B), b fwd at 140
    /// (within a second of B only, 20 frames), c fwd at 300 (right time, wrong direction for C),
    /// d fwd on the other line at 526 (26 frames: a frame too late), f fwd at 2000 (nothing near).
    /// Greedy by closeness would pair a with A (10) or B (10) first; taking a–B leaves b with
    /// nothing and A unmatched. The one-to-one matching with the most pairs is a–A, b–B: 2 pairs.
    /// Missed: C, D, E (3 of 5 = 60%); extra: c, d, f (3 of 5).
    #[test]
    fn a_hand_worked_example() {
        let truth = [
            at("mid", "forward", 100.0, 50.0),
            at("mid", "forward", 120.0, 300.0),
            at("mid", "backward", 300.0, 50.0),
            at("side", "forward", 500.0, 50.0),
            at("mid", "forward", 900.0, 50.0),
        ];
        let counted = [
            at("mid", "forward", 110.0, 300.0),
            at("mid", "forward", 140.0, 300.0),
            at("mid", "forward", 300.0, 50.0),
            at("side", "forward", 526.0, 50.0),
            at("mid", "forward", 2000.0, 50.0),
        ];
        assert_eq!(match_crossings(&truth, &counted, SECOND), [(0, 0), (1, 1)]);
        let t = tally(&truth, &counted, SECOND);
        assert_eq!((t.missed(), t.extra()), (3, 3));
        assert_eq!(t.share(t.missed()), 60.0);
        // With a place gate of 100 pixels, a (x 300) is too far from A (x 50): only a–B or b–B,
        // the closer in time, a–B (10 frames against 20).
        let placed = Window {
            frames: 25.0,
            pixels: Some(100.0),
        };
        assert_eq!(match_crossings(&truth, &counted, placed), [(1, 0)]);
    }

    #[test]
    fn exactly_one_second_apart_still_matches_and_nothing_matches_nothing() {
        let one = [at("mid", "forward", 100.0, 0.0)];
        let later = [at("mid", "forward", 125.0, 0.0)];
        assert_eq!(tally(&one, &later, SECOND).matched, 1);
        let none = tally(&[], &[], SECOND);
        assert_eq!((none.missed(), none.extra(), none.share(0)), (0, 0, 0.0));
        let all_extra = tally(&[], &one, SECOND);
        assert_eq!(all_extra.extra(), 1);
    }
}
