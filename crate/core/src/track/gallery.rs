//! DeepSORT's gallery: the unit-length appearance vectors of a track's latest detections, kept in
//! one block of memory (a ring once full), so that measuring a detection against it reads memory
//! in order instead of following one pointer a vector, several vectors at a time.

use crate::detections::{Detection, Detections};

/// How many vectors are measured side by side: the vectors are kept in blocks of this many,
/// value by value (the first value of each, then the second, ...), so that one read of memory
/// serves them all and the products vectorise; sixteen `f32` sums are four registers, summed
/// independently (four vectors a block were slower: one register waits on the last addition).
const LANES: usize = 16;

/// How many vectors are summed roughly (in `f32`) before the closest of them are summed in `f64`.
const SCREEN: usize = 4 * LANES;

/// Appearance vectors of one track, at most `size` of them (the oldest goes first).
#[derive(Debug, Clone, Default)]
pub(crate) struct Gallery {
    dim: usize,
    /// How many vectors are kept.
    count: usize,
    /// Fewer than [`LANES`] vectors: one after another, vector `k`'s value `d` at `k * dim + d`
    /// (a short-lived track reserves no more than it keeps). From [`LANES`] on, in blocks of
    /// [`LANES`]: vector `k`'s value `d` at `(k / LANES) * LANES * dim + d * LANES + k % LANES`,
    /// growing a block at a time up to `size` vectors (never sized by the setting in advance);
    /// places of a block not yet used hold 0.
    data: Vec<f32>,
    /// Once full: the slot the next push overwrites (the oldest vector's).
    next: usize,
    /// The greatest length of any vector kept so far (never lowered: a bound, not a record).
    longest: f64,
}

/// The unit roundoff of `f32` (2^-24): a sum of `n` products in `f32` is within
/// `γ_n = n·u / (1 − n·u)` times the sum of the products' sizes of the exact sum (Higham, Accuracy
/// and Stability of Numerical Algorithms, 2nd ed., §3.1; from memory).
const F32_UNIT_ROUNDOFF: f64 = 5.960_464_477_539_063e-8;

impl Gallery {
    pub(crate) fn is_empty(&self) -> bool {
        self.count == 0
    }

    /// Keeps `v` (the length of the first vector kept; another length is not kept), dropping the
    /// oldest when `size` are kept already.
    pub(crate) fn push(&mut self, v: &[f32], size: usize) {
        if self.count == 0 {
            self.dim = v.len();
        }
        if v.len() != self.dim || v.is_empty() || size == 0 {
            return;
        }
        let length = v.iter().map(|&x| f64::from(x).powi(2)).sum::<f64>().sqrt();
        self.longest = self.longest.max(length);
        if self.count < size {
            let slot = self.count;
            self.count += 1;
            if slot < LANES {
                self.data.extend_from_slice(v);
                if self.count == LANES {
                    self.data = self.in_blocks();
                }
                return;
            }
            if slot.is_multiple_of(LANES) {
                self.data.resize(self.data.len() + LANES * self.dim, 0.0);
            }
            self.put(slot, v);
        } else {
            let slot = self.next;
            self.next = (self.next + 1) % size;
            self.put(slot, v);
        }
    }

    /// Whether the vectors are kept in blocks (else one after another).
    fn in_blocks_now(&self) -> bool {
        self.count >= LANES
    }

    /// The first [`LANES`] vectors, kept one after another, laid out as one block.
    fn in_blocks(&self) -> Vec<f32> {
        let mut block = vec![0.0; LANES * self.dim];
        for (k, v) in self.data.chunks_exact(self.dim).enumerate() {
            for (d, &x) in v.iter().enumerate() {
                block[d * LANES + k] = x;
            }
        }
        block
    }

    /// Writes `v` over the vector in `slot`.
    fn put(&mut self, slot: usize, v: &[f32]) {
        let dim = self.dim;
        if !self.in_blocks_now() {
            self.data[slot * dim..(slot + 1) * dim].copy_from_slice(v);
            return;
        }
        let base = (slot / LANES) * LANES * dim + slot % LANES;
        for (d, &x) in v.iter().enumerate() {
            self.data[base + d * LANES] = x;
        }
    }

    /// Cosine distance between unit vector `e` and the closest vector kept (1 − dot product, each
    /// product summed in f64 over the values in order); infinite when empty. The closest does not
    /// depend on the order the vectors are looked at in. It is taken as one minus the largest dot
    /// product, which is the least of the distances bit for bit: subtracting from one, rounded,
    /// never puts two products in the other order (the values are finite: readers refuse others).
    ///
    /// Quicker with the same bits: every vector's products are first summed in `f32` (twice as
    /// many to a register as `f64`, and no conversions), and summed again in `f64` only for the
    /// vectors whose `f32` sum comes within the rounding bound of the largest `f32` sum (about one
    /// vector in a hundred in a crowd). The vector with the largest `f64` sum is always among
    /// those (the bound is twice the worst error of either sum), so the answer is the one summing
    /// every vector in `f64` gives. Measured in BENCHMARKS.md (the notes below the goals table).
    pub(crate) fn distance(&self, e: &[f32]) -> f64 {
        let dim = self.dim;
        if self.count == 0 || dim == 0 {
            return f64::INFINITY;
        }
        // Never with one file's vectors (all of one length); a shorter one is measured over its
        // own length.
        let e = &e[..dim.min(e.len())];
        let slack = self.screening_slack(e).filter(|_| self.in_blocks_now());
        let largest = match slack {
            Some(slack) => self.largest_dot_screened(e, slack),
            None => (0..self.count)
                .map(|k| self.exact_dot(k, e))
                .fold(f64::NEG_INFINITY, f64::max),
        };
        1.0 - largest
    }

    /// How far below the largest `f32` sum a vector's `f32` sum may be and still have the largest
    /// `f64` sum: four times the bound on either sum's error (twice what is needed, so that the
    /// rounding of this bound itself never matters), plus a margin for products too small for
    /// `f32`. None when the sums could leave `f32`'s range or the bound is loose (a vector
    /// millions of values long): then every vector is summed in `f64`.
    fn screening_slack(&self, e: &[f32]) -> Option<f64> {
        let n = e.len() as f64 * F32_UNIT_ROUNDOFF;
        let probe = e.iter().map(|&x| f64::from(x).powi(2)).sum::<f64>().sqrt();
        let sizes = probe * self.longest;
        (n < 0.01 && sizes < 1e30).then(|| 4.0 * sizes * n / (1.0 - n) + 1e-30)
    }

    /// The largest `f64` dot product of `e` with the vectors kept, [`SCREEN`] vectors at a time:
    /// their `f32` sums, then the `f64` sum of each within `slack` of the largest `f32` sum yet.
    fn largest_dot_screened(&self, e: &[f32], slack: f64) -> f64 {
        let (mut largest, mut top) = (f64::NEG_INFINITY, f64::NEG_INFINITY);
        for (c, chunk) in self.data.chunks(SCREEN * self.dim).enumerate() {
            let mut rough = [f32::NEG_INFINITY; SCREEN];
            for (sums, block) in rough
                .chunks_exact_mut(LANES)
                .zip(chunk.chunks_exact(LANES * self.dim))
            {
                let mut dots = [0.0f32; LANES];
                for (values, &x) in block.chunks_exact(LANES).zip(e) {
                    for (dot, &g) in dots.iter_mut().zip(values) {
                        *dot += g * x;
                    }
                }
                sums.copy_from_slice(&dots);
            }
            // Places of the last block not yet used hold 0, which is no vector's sum.
            let kept = (self.count - c * SCREEN).min(SCREEN);
            rough[kept..].fill(f32::NEG_INFINITY);
            top = top.max(f64::from(
                rough.iter().copied().fold(f32::NEG_INFINITY, f32::max),
            ));
            for (k, &r) in rough[..kept].iter().enumerate() {
                if f64::from(r) >= top - slack {
                    largest = largest.max(self.exact_dot(c * SCREEN + k, e));
                }
            }
        }
        largest
    }

    /// Vector `k`'s dot product with `e`, summed in `f64` in the order of the values.
    fn exact_dot(&self, k: usize, e: &[f32]) -> f64 {
        if !self.in_blocks_now() {
            let v = &self.data[k * self.dim..(k + 1) * self.dim];
            return v
                .iter()
                .zip(e)
                .fold(0.0, |s, (&g, &x)| s + f64::from(g) * f64::from(x));
        }
        let (start, lane) = ((k / LANES) * LANES * self.dim, k % LANES);
        self.data[start..start + LANES * self.dim]
            .chunks_exact(LANES)
            .zip(e)
            .fold(0.0, |s, (values, &x)| {
                s + f64::from(values[lane]) * f64::from(x)
            })
    }
}

/// The appearance vectors of one frame's detections made unit length, once for both the
/// association and the galleries.
#[derive(Debug, Default)]
pub(crate) struct Units {
    dim: usize,
    /// Detection `d`'s vector at `d * dim` (zeros where it has none).
    values: Vec<f32>,
    /// Whether detection `d` has a vector of length above zero.
    has: Vec<bool>,
}

impl Units {
    /// The unit vectors of `dets` (their vectors in `ctx`), in place of the last frame's.
    pub(crate) fn fill(&mut self, dets: &[Detection], ctx: &Detections) {
        self.dim = ctx.embedding_dim;
        self.values.clear();
        self.has.clear();
        for d in dets {
            let v = ctx.embedding(d).unwrap_or_default();
            let norm = v.iter().map(|x| f64::from(*x).powi(2)).sum::<f64>().sqrt();
            let has = norm > 0.0 && v.len() == self.dim;
            self.has.push(has);
            match has {
                true => self
                    .values
                    .extend(v.iter().map(|x| (f64::from(*x) / norm) as f32)),
                false => self.values.resize(self.values.len() + self.dim, 0.0),
            }
        }
    }

    /// Forgets the last frame's vectors (for a method that does not compare appearance).
    pub(crate) fn clear(&mut self) {
        self.values.clear();
        self.has.clear();
    }

    /// Detection `d`'s unit vector, if it has one.
    pub(crate) fn get(&self, d: usize) -> Option<&[f32]> {
        let at = d * self.dim;
        self.has
            .get(d)
            .copied()
            .unwrap_or(false)
            .then(|| &self.values[at..at + self.dim])
    }
}

#[cfg(test)]
mod tests {
    use super::Gallery;
    use std::collections::VecDeque;
    use throughline_sim::rng::Rng;

    /// The closest of `q` to `probe` as a plain queue of vectors measures it (the form the gallery
    /// replaced): each dot product summed in f64 over the values both have, in order.
    fn queue_distance(q: &VecDeque<Vec<f32>>, probe: &[f32]) -> f64 {
        q.iter()
            .map(|v| {
                1.0 - v
                    .iter()
                    .zip(probe)
                    .map(|(a, b)| f64::from(*a) * f64::from(*b))
                    .sum::<f64>()
            })
            .fold(f64::INFINITY, f64::min)
    }

    #[test]
    fn keeps_the_latest_vectors_as_a_queue_would() {
        // Against a plain queue: bit for bit the same distances after every push, full or not,
        // for galleries that fill whole blocks of vectors and parts of one, and a probe shorter
        // than the vectors kept.
        let mut rng = Rng::new(3);
        for (dim, size) in [
            (2, 9),
            (1, 1),
            (3, 4),
            (5, 3),
            (16, 100),
            (16, 7),
            (4, 16),
            (3, 17),
        ] {
            let (mut g, mut q) = (Gallery::default(), VecDeque::<Vec<f32>>::new());
            for _ in 0..(size * 5 / 2 + 1) {
                let v: Vec<f32> = (0..dim).map(|_| rng.range(-1.0, 1.0) as f32).collect();
                g.push(&v, size);
                if q.len() == size {
                    q.pop_front();
                }
                q.push_back(v);
                for _ in 0..3 {
                    let probe: Vec<f32> = (0..dim).map(|_| rng.range(-1.0, 1.0) as f32).collect();
                    let want = queue_distance(&q, &probe);
                    assert_eq!(g.distance(&probe).to_bits(), want.to_bits(), "{dim} {size}");
                    let short = &probe[..dim / 2];
                    let want = queue_distance(&q, short);
                    assert_eq!(g.distance(short).to_bits(), want.to_bits(), "{dim} {size}");
                }
            }
        }
        assert_eq!(Gallery::default().distance(&[1.0]), f64::INFINITY);
    }

    /// Pushes `vectors` into a gallery of `size` and a plain queue, checking after each push that
    /// both measure every probe to the same bits.
    fn same_as_a_queue(vectors: &[Vec<f32>], size: usize, probes: &[Vec<f32>]) {
        let (mut g, mut q) = (Gallery::default(), VecDeque::<Vec<f32>>::new());
        for v in vectors {
            g.push(v, size);
            if q.len() == size {
                q.pop_front();
            }
            q.push_back(v.clone());
            for p in probes {
                let want = queue_distance(&q, p);
                assert_eq!(
                    g.distance(p).to_bits(),
                    want.to_bits(),
                    "{} {size}",
                    v.len()
                );
            }
        }
    }

    #[test]
    fn near_ties_in_f32_are_settled_as_f64_settles_them() {
        // Vectors a few units in the last place apart (f32 sums tie or come out in the other
        // order), probes nearly along them; and vectors whose f32 products overflow or fall
        // below f32's smallest normal, and the longest vectors allowed.
        let mut rng = Rng::new(11);
        let unit = |v: Vec<f32>| -> Vec<f32> {
            let n = v.iter().map(|x| f64::from(*x).powi(2)).sum::<f64>().sqrt();
            v.iter().map(|x| (f64::from(*x) / n) as f32).collect()
        };
        let base = unit((0..16).map(|_| rng.range(-1.0, 1.0) as f32).collect());
        let nudged: Vec<Vec<f32>> = (0..150u32)
            .map(|i| {
                let mut v = base.clone();
                let d = (i as usize * 7) % 16;
                v[d] = f32::from_bits(v[d].to_bits().wrapping_add(i % 9).wrapping_sub(4));
                v
            })
            .collect();
        let mut probes = vec![base.clone()];
        probes.extend(nudged.iter().step_by(37).cloned());
        same_as_a_queue(&nudged, 100, &probes);
        for scale in [1e20f32, 1e-20, 1e-30] {
            let scaled: Vec<Vec<f32>> = nudged[..40]
                .iter()
                .map(|v| v.iter().map(|x| x * scale).collect())
                .collect();
            same_as_a_queue(&scaled, 30, &[base.clone(), scaled[3].clone()]);
        }
        let dim = crate::limits::MAX_EMBEDDING_DIM;
        let long: Vec<Vec<f32>> = (0..20)
            .map(|_| unit((0..dim).map(|_| rng.range(-1.0, 1.0) as f32).collect()))
            .collect();
        same_as_a_queue(&long, 17, &[long[0].clone(), long[19].clone()]);
    }
}
