//! DeepSORT's gallery: the unit-length appearance vectors of a track's latest detections, kept in
//! one block of memory (a ring once full), so that measuring a detection against it reads memory
//! in order instead of following one pointer a vector, several vectors at a time.

use crate::detections::{Detection, Detections};

/// How many vectors are measured side by side: the vectors are kept in blocks of this many,
/// value by value (the first value of each, then the second, ...), so that one read of memory
/// serves them all and the products vectorise.
const LANES: usize = 4;

/// Appearance vectors of one track, at most `size` of them (the oldest goes first).
#[derive(Debug, Clone, Default)]
pub(crate) struct Gallery {
    dim: usize,
    /// How many vectors are kept.
    count: usize,
    /// The vectors in blocks of [`LANES`]: vector `k`'s value `d` at
    /// `(k / LANES) * LANES * dim + d * LANES + k % LANES`; grows a block at a time up to `size`
    /// vectors (never sized by the setting in advance). Places of a block not yet used hold 0.
    data: Vec<f32>,
    /// Once full: the slot the next push overwrites (the oldest vector's).
    next: usize,
}

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
        let slot = if self.count < size {
            if self.count.is_multiple_of(LANES) {
                self.data.resize(self.data.len() + LANES * self.dim, 0.0);
            }
            self.count += 1;
            self.count - 1
        } else {
            let slot = self.next;
            self.next = (self.next + 1) % size;
            slot
        };
        let base = (slot / LANES) * LANES * self.dim + slot % LANES;
        for (d, &x) in v.iter().enumerate() {
            self.data[base + d * LANES] = x;
        }
    }

    /// Cosine distance between unit vector `e` and the closest vector kept (1 − dot product, each
    /// product summed in f64 over the values in order); infinite when empty. The closest does not
    /// depend on the order the vectors are looked at in. It is taken as one minus the largest dot
    /// product, which is the least of the distances bit for bit: subtracting from one, rounded,
    /// never puts two products in the other order (the values are finite: readers refuse others).
    pub(crate) fn distance(&self, e: &[f32]) -> f64 {
        let dim = self.dim;
        if self.count == 0 || dim == 0 {
            return f64::INFINITY;
        }
        // Never with one file's vectors (all of one length); a shorter one is measured over its
        // own length.
        let used = dim.min(e.len());
        let mut largest = f64::NEG_INFINITY;
        for (b, block) in self.data.chunks_exact(LANES * dim).enumerate() {
            // One sum a vector, each in the order one vector alone would be summed in.
            let mut dots = [0.0f64; LANES];
            for (values, &x) in block.chunks_exact(LANES).zip(&e[..used]) {
                let x = f64::from(x);
                for (dot, &g) in dots.iter_mut().zip(values) {
                    *dot += f64::from(g) * x;
                }
            }
            let kept = (self.count - b * LANES).min(LANES);
            for &dot in &dots[..kept] {
                if dot > largest {
                    largest = dot;
                }
            }
        }
        1.0 - largest
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
        for (dim, size) in [(2, 9), (1, 1), (3, 4), (5, 3), (16, 100), (16, 7)] {
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
}
