//! DeepSORT's gallery: the unit-length appearance vectors of a track's latest detections, kept in
//! one block of memory (a ring once full), so that measuring a detection against it reads memory
//! in order instead of following one pointer a vector.

/// Appearance vectors of one track, at most `size` of them (the oldest goes first).
#[derive(Debug, Clone, Default)]
pub(crate) struct Gallery {
    dim: usize,
    /// The vectors one after another; grows with each push up to `size` vectors (never sized by
    /// the setting in advance).
    data: Vec<f32>,
    /// Once full: the slot the next push overwrites (the oldest vector's).
    next: usize,
}

impl Gallery {
    pub(crate) fn is_empty(&self) -> bool {
        self.data.is_empty()
    }

    fn len(&self) -> usize {
        self.data.len().checked_div(self.dim).unwrap_or(0)
    }

    /// Keeps `v` (the length of the first vector kept; another length is not kept), dropping the
    /// oldest when `size` are kept already.
    pub(crate) fn push(&mut self, v: &[f32], size: usize) {
        if self.data.is_empty() {
            self.dim = v.len();
        }
        if v.len() != self.dim || v.is_empty() || size == 0 {
            return;
        }
        if self.len() < size {
            self.data.extend_from_slice(v);
        } else {
            let at = self.next * self.dim;
            self.data[at..at + self.dim].copy_from_slice(v);
            self.next = (self.next + 1) % size;
        }
    }

    /// Cosine distance between unit vector `e` and the closest vector kept (1 − dot product, each
    /// product summed in f64 over the values in order); infinite when empty. The closest does not
    /// depend on the order the vectors are looked at in.
    pub(crate) fn distance(&self, e: &[f32]) -> f64 {
        let dim = self.dim;
        if dim == 0 {
            return f64::INFINITY;
        }
        let plain = |g: &[f32]| -> f64 {
            let dot: f64 = g
                .iter()
                .zip(e)
                .map(|(a, b)| f64::from(*a) * f64::from(*b))
                .sum();
            1.0 - dot
        };
        if e.len() < dim {
            // Never with one file's vectors (all of one length); kept to the shorter length.
            return self
                .data
                .chunks_exact(dim)
                .map(plain)
                .fold(f64::INFINITY, f64::min);
        }
        // Four vectors at a time: four sums in flight instead of one chain of additions, each
        // summed in the order one vector alone would be (the closest is the same).
        let mut closest = f64::INFINITY;
        let mut four = self.data.chunks_exact(4 * dim);
        for g in &mut four {
            let mut dots = [0.0f64; 4];
            for (d, &x) in e[..dim].iter().enumerate() {
                let x = f64::from(x);
                for (j, dot) in dots.iter_mut().enumerate() {
                    *dot += f64::from(g[j * dim + d]) * x;
                }
            }
            for dot in dots {
                closest = closest.min(1.0 - dot);
            }
        }
        for g in four.remainder().chunks_exact(dim) {
            closest = closest.min(plain(g));
        }
        closest
    }
}

#[cfg(test)]
mod tests {
    use super::Gallery;
    use std::collections::VecDeque;

    #[test]
    fn keeps_the_latest_vectors_as_a_queue_would() {
        // Against a plain queue of vectors (the form it replaced): the same distances after every
        // push, full or not.
        let size = 9;
        let (mut g, mut q) = (Gallery::default(), VecDeque::<Vec<f32>>::new());
        for k in 0..12u8 {
            let v = [f32::from(k).sin(), f32::from(k).cos()];
            g.push(&v, size);
            if q.len() == size {
                q.pop_front();
            }
            q.push_back(v.to_vec());
            for probe in [[1.0f32, 0.0], [0.0, 1.0], [0.6, 0.8]] {
                let want = q
                    .iter()
                    .map(|v| {
                        1.0 - v
                            .iter()
                            .zip(&probe)
                            .map(|(a, b)| f64::from(*a) * f64::from(*b))
                            .sum::<f64>()
                    })
                    .fold(f64::INFINITY, f64::min);
                assert_eq!(g.distance(&probe).to_bits(), want.to_bits());
            }
        }
        assert_eq!(Gallery::default().distance(&[1.0]), f64::INFINITY);
    }
}
