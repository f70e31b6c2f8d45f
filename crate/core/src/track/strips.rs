//! Boxes found by where they can overlap a given box: the index the IoU matching asks for each
//! track's candidates.

use crate::geometry::BBox;

/// Below this many tallest heights between the highest and lowest top edge, boxes are one strip.
const FEW_STRIPS: f64 = 8.0;

/// Up to this many boxes in one strip, a query looks at each of them.
const FEW_BOXES: usize = 24;

/// Boxes found by where they can overlap a given box: grouped in horizontal strips as high as the
/// tallest box (by the strip their top edge falls in), each strip sorted by left edge. A box can
/// overlap another only if its top edge lies less than the tallest height above the other's top,
/// and its left edge less than the widest width left of the other's left, so a query looks at a
/// few strips, and in each at a stretch of left edges — not at a whole column of the picture, as
/// one list sorted by left edge would in a crowd.
#[derive(Debug, Default)]
pub(crate) struct Strips {
    /// (strip, left edge, box), sorted.
    keyed: Vec<(i64, f64, usize)>,
    top: f64,
    tallest: f64,
    widest: f64,
}

impl Strips {
    /// The index of `boxes`, in place of what it held (its memory kept).
    pub(crate) fn refill(&mut self, boxes: &[BBox]) {
        let top = boxes.iter().map(|b| b.y).fold(f64::INFINITY, f64::min);
        let bottom = boxes.iter().map(|b| b.y).fold(f64::NEG_INFINITY, f64::max);
        let mut tallest = boxes.iter().map(|b| b.h).fold(0.0, f64::max);
        // Boxes whose tops span only a few heights (most pictures: people are a good share of
        // its height) are one strip: a query then costs two searches, not three per strip.
        if bottom - top < FEW_STRIPS * tallest {
            tallest = 0.0;
        }
        self.widest = boxes.iter().map(|b| b.w).fold(0.0, f64::max);
        self.top = top;
        self.tallest = tallest;
        let mut keyed = std::mem::take(&mut self.keyed);
        keyed.clear();
        keyed.extend(
            boxes
                .iter()
                .enumerate()
                .map(|(k, b)| (self.strip(b.y), b.x, k)),
        );
        // Every key holds its box's own index, so no two are equal: an unstable sort gives the
        // one order, without the stable sort's buffer.
        keyed.sort_unstable_by(|a, b| a.0.cmp(&b.0).then(a.1.total_cmp(&b.1)).then(a.2.cmp(&b.2)));
        self.keyed = keyed;
    }

    /// The strip a top edge falls in (saturating far away; one strip for all when boxes have no
    /// height).
    fn strip(&self, y: f64) -> i64 {
        if self.tallest > 0.0 {
            ((y - self.top) / self.tallest).floor() as i64
        } else {
            0
        }
    }

    /// [`Self::near`] when every box is in one strip: the stretch of left edges that can reach
    /// `b`, found by two binary searches.
    fn search_one_strip(&self, b: &BBox, out: &mut Vec<usize>) {
        let start = self.keyed.partition_point(|e| e.1 + self.widest <= b.x);
        let end = self.keyed.partition_point(|e| e.1 < b.x + b.w);
        out.extend(self.keyed[start..end.max(start)].iter().map(|e| e.2));
    }

    /// [`Self::search_one_strip`] by one pass over a few boxes: both of its tests hold on a run
    /// of the list (sorted by left edge), so the pass keeps the same boxes in the same order.
    fn scan_one_strip(&self, b: &BBox, out: &mut Vec<usize>) {
        // The searches' two tests, as they are written there (a NaN fails both alike).
        let before = |e: &(i64, f64, usize)| e.1 + self.widest <= b.x;
        let within = |e: &(i64, f64, usize)| e.1 < b.x + b.w;
        out.extend(
            self.keyed
                .iter()
                .filter(|e| !before(e) && within(e))
                .map(|e| e.2),
        );
    }

    /// Every box that can overlap `b` (and a few that cannot), into `out`.
    pub(crate) fn near(&self, b: &BBox, out: &mut Vec<usize>) {
        out.clear();
        if self.tallest == 0.0 {
            if self.keyed.len() <= FEW_BOXES {
                self.scan_one_strip(b, out);
            } else {
                self.search_one_strip(b, out);
            }
            return;
        }
        // One strip more on each side than the edges need: rounding can never lose a box.
        let first = self.strip(b.y - self.tallest).saturating_sub(1);
        let last = self.strip(b.y + b.h).saturating_add(1);
        let mut at = self.keyed.partition_point(|e| e.0 < first);
        while at < self.keyed.len() && self.keyed[at].0 <= last {
            let strip = self.keyed[at].0;
            let run = &self.keyed[at..];
            let end_of_strip = run.partition_point(|e| e.0 == strip);
            let run = &run[..end_of_strip];
            let start = run.partition_point(|e| e.1 + self.widest <= b.x);
            let end = run.partition_point(|e| e.1 < b.x + b.w);
            out.extend(run[start..end.max(start)].iter().map(|e| e.2));
            at += end_of_strip;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use throughline_sim::rng::Rng;

    #[test]
    fn strips_find_every_overlapping_box() {
        // Against the definition (common practice): every pair with a positive intersection,
        // found by comparing all pairs.
        let mut rng = Rng::new(4);
        for case in 0..200 {
            let n = 1 + rng.below(80);
            let spread = [50.0, 400.0, 1e6][case % 3];
            let mut random_box = || {
                let tall = rng.chance(0.1);
                BBox {
                    x: rng.range(-spread, spread),
                    y: rng.range(-spread, spread),
                    w: rng.range(0.01, 60.0),
                    h: if tall {
                        rng.range(100.0, 900.0)
                    } else {
                        rng.range(0.01, 60.0)
                    },
                }
            };
            let boxes: Vec<BBox> = (0..n).map(|_| random_box()).collect();
            let queries: Vec<BBox> = (0..20).map(|_| random_box()).collect();
            let mut index = Strips::default();
            index.refill(&boxes);
            let mut near = Vec::new();
            for q in &queries {
                index.near(q, &mut near);
                for (k, b) in boxes.iter().enumerate() {
                    if q.intersection(b) > 0.0 {
                        assert!(near.contains(&k), "case {case}: {q:?} misses {b:?}");
                    }
                }
            }
        }
    }

    #[test]
    fn a_few_boxes_scanned_are_those_searched() {
        // The pass over a few boxes against the two binary searches it stands in for: the same
        // boxes in the same order (their order decides ties in the matching).
        let mut rng = Rng::new(9);
        let (mut scanned, mut searched) = (Vec::new(), Vec::new());
        for case in 0..500 {
            let n = rng.below(FEW_BOXES + 1);
            let spread = [30.0, 300.0, 1e6][case % 3];
            let mut random_box = || BBox {
                x: rng.range(-spread, spread),
                y: rng.range(0.0, 20.0),
                w: rng.range(0.0, 60.0),
                h: rng.range(10.0, 60.0),
            };
            let boxes: Vec<BBox> = (0..n).map(|_| random_box()).collect();
            let mut index = Strips::default();
            index.refill(&boxes);
            assert_eq!(index.tallest, 0.0, "case {case}: one strip");
            for _ in 0..10 {
                let q = random_box();
                scanned.clear();
                searched.clear();
                index.scan_one_strip(&q, &mut scanned);
                index.search_one_strip(&q, &mut searched);
                assert_eq!(scanned, searched, "case {case}: {q:?}");
            }
        }
    }
}
