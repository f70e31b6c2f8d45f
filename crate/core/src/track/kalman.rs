//! Linear Kalman filter and the constant-velocity motion model of a box.
//!
//! [`KalmanFilter`] is the textbook filter with the equations of `filterpy.kalman.KalmanFilter`
//! (predict `x = Fx`, `P = FPFᵀ + Q`; update with the Joseph form `P = (I-KH)P(I-KH)ᵀ + KRKᵀ`), on
//! `nalgebra` fixed-size matrices. [`BoxMotion`] is the model the trackers use: the state is
//! `[cx, cy, w, h, vcx, vcy, vw, vh]` (box centre and size in pixels, and their change per frame);
//! the measurement is `[cx, cy, w, h]`. Noise scales with the box height, so a far, small person and a
//! near, large one are treated alike (the weighting of Wojke et al. 2017, applied to width and height).

use crate::geometry::BBox;
use nalgebra::{SMatrix, SVector};

pub type State = SVector<f64, 8>;
pub type StateCov = SMatrix<f64, 8, 8>;
pub type Measurement = SVector<f64, 4>;
pub type MeasurementCov = SMatrix<f64, 4, 4>;
pub type Observation = SMatrix<f64, 4, 8>;

/// 95% quantile of the chi-square distribution with 4 degrees of freedom: the usual gate on the squared
/// Mahalanobis distance of a 4-dimensional box measurement (published table value).
pub const CHI2_95_4DOF: f64 = 9.4877;

/// State and covariance of a linear Kalman filter.
#[derive(Debug, Clone, PartialEq)]
pub struct KalmanFilter {
    pub x: State,
    pub p: StateCov,
}

impl KalmanFilter {
    /// `x = F x`, `P = F P Fᵀ + Q`.
    pub fn predict(&mut self, f: &StateCov, q: &StateCov) {
        self.x = f * self.x;
        self.p = f * self.p * f.transpose() + q;
    }

    /// Measurement `z` with observation matrix `h` and noise `r`. Returns false, leaving the state as
    /// it was, when the innovation covariance cannot be inverted.
    pub fn update(&mut self, z: &Measurement, h: &Observation, r: &MeasurementCov) -> bool {
        let y = z - h * self.x;
        let pht = self.p * h.transpose();
        let s = h * pht + r;
        let Some(si) = s.try_inverse() else {
            return false;
        };
        let k = pht * si;
        self.x += k * y;
        let i_kh = StateCov::identity() - k * h;
        self.p = i_kh * self.p * i_kh.transpose() + k * r * k.transpose();
        true
    }

    /// Squared Mahalanobis distance of `z` from the predicted measurement; infinite when the
    /// innovation covariance cannot be inverted.
    pub fn mahalanobis_sq(&self, z: &Measurement, h: &Observation, r: &MeasurementCov) -> f64 {
        let y = z - h * self.x;
        let s = h * self.p * h.transpose() + r;
        match s.cholesky() {
            Some(chol) => {
                let sol = chol.solve(&y);
                y.dot(&sol)
            }
            None => f64::INFINITY,
        }
    }
}

/// Constant-velocity motion of a box, with noise proportional to its height.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BoxMotion {
    /// Standard deviation of position and size, as a fraction of the box height.
    pub position_weight: f64,
    /// Standard deviation of the change per frame, as a fraction of the box height.
    pub velocity_weight: f64,
}

impl Default for BoxMotion {
    fn default() -> Self {
        // The weights published with DeepSORT (Wojke et al. 2017): 1/20 and 1/160 of the height.
        Self {
            position_weight: 1.0 / 20.0,
            velocity_weight: 1.0 / 160.0,
        }
    }
}

/// Measurement vector `[cx, cy, w, h]` of a box.
pub fn measurement(b: &BBox) -> Measurement {
    let c = b.centre();
    Measurement::new(c.x, c.y, b.w, b.h)
}

impl BoxMotion {
    /// The transition matrix: position plus one frame of velocity.
    pub fn transition() -> StateCov {
        let mut f = StateCov::identity();
        for i in 0..4 {
            f[(i, i + 4)] = 1.0;
        }
        f
    }

    /// The observation matrix: the first four state entries.
    pub fn observation() -> Observation {
        let mut h = Observation::zeros();
        for i in 0..4 {
            h[(i, i)] = 1.0;
        }
        h
    }

    fn scale(height: f64) -> f64 {
        // A floor keeps the noise positive for collapsed boxes.
        height.abs().max(1.0)
    }

    /// Process noise for a box of the given height.
    pub fn process_noise(&self, height: f64) -> StateCov {
        let h = Self::scale(height);
        let sp = (self.position_weight * h).powi(2);
        let sv = (self.velocity_weight * h).powi(2);
        StateCov::from_diagonal(&State::from_column_slice(&[sp, sp, sp, sp, sv, sv, sv, sv]))
    }

    /// Measurement noise for a box of the given height.
    pub fn measurement_noise(&self, height: f64) -> MeasurementCov {
        let sp = (self.position_weight * Self::scale(height)).powi(2);
        MeasurementCov::from_diagonal(&Measurement::new(sp, sp, sp, sp))
    }

    /// A filter started on a first observed box, with zero velocity and a wide velocity uncertainty.
    pub fn initiate(&self, b: &BBox) -> KalmanFilter {
        let h = Self::scale(b.h);
        let z = measurement(b);
        let mut x = State::zeros();
        x.fixed_rows_mut::<4>(0).copy_from(&z);
        let sp = (2.0 * self.position_weight * h).powi(2);
        let sv = (10.0 * self.velocity_weight * h).powi(2);
        KalmanFilter {
            x,
            p: StateCov::from_diagonal(&State::from_column_slice(&[
                sp, sp, sp, sp, sv, sv, sv, sv,
            ])),
        }
    }

    /// One frame ahead. A size that would shrink below one pixel stops shrinking. The filter must
    /// be one [`Self::initiate`] started (its covariance block-diagonal; see [`Self::update`]).
    pub fn predict(&self, kf: &mut KalmanFilter) {
        debug_assert!(
            block_diagonal(&kf.p),
            "a box filter's covariance must be block-diagonal"
        );
        for i in 2..4 {
            if kf.x[i] + kf.x[i + 4] < 1.0 {
                kf.x[i + 4] = 0.0;
            }
        }
        // Same result as `kf.predict(&Self::transition(), &q)`, using the block form of the
        // transition F = [I I; 0 I]: with P = [A B; C D], F P Fᵀ = [A+B+C+D, B+D; C+D, D]; and
        // since P is block-diagonal (see [`Self::update`]) and Q diagonal, only the four 2 × 2
        // blocks change (the matrix form's other sums are exact zeros).
        let h = Self::scale(kf.x[3]);
        let sp = (self.position_weight * h).powi(2);
        let sv = (self.velocity_weight * h).powi(2);
        let p = &mut kf.p;
        for i in 0..4 {
            let (a, b, cc, d) = (p[(i, i)], p[(i, i + 4)], p[(i + 4, i)], p[(i + 4, i + 4)]);
            kf.x[i] += kf.x[i + 4];
            p[(i, i)] = a + b + cc + d + sp;
            p[(i, i + 4)] = b + d;
            p[(i + 4, i)] = cc + d;
            p[(i + 4, i + 4)] = d + sv;
        }
    }

    /// Correct the filter with an observed box. Returns false, leaving the state as it was, when the
    /// innovation covariance cannot be inverted.
    ///
    /// Same result as `kf.update(&measurement(b), &Self::observation(), &r)` to rounding. The
    /// filter's covariance stays block-diagonal: each of the four measured values and its velocity
    /// form a 2 × 2 block no other value touches (the start, the process noise and the measurement
    /// noise are diagonal, and the transition pairs a value only with its velocity), so the innovation
    /// covariance S = P₁₁ + R is diagonal and the update is four scalar updates. The arithmetic is
    /// that of the matrix form bit for bit (S⁻¹ by the cofactors nalgebra's 4 × 4 inverse uses;
    /// the terms the matrix form adds are exact zeros), checked against it in the tests.
    ///
    /// The filter must be one [`Self::initiate`] started and only this motion model's `predict`
    /// and `update` changed: with any other covariance the result would be wrong.
    pub fn update(&self, kf: &mut KalmanFilter, b: &BBox) -> bool {
        debug_assert!(
            block_diagonal(&kf.p),
            "a box filter's covariance must be block-diagonal"
        );
        let r = self.measurement_noise(kf.x[3])[(0, 0)];
        let s = [0, 1, 2, 3].map(|i| kf.p[(i, i)] + r);
        // nalgebra's 4 × 4 inverse of a diagonal matrix: each diagonal cofactor, times 1 / det.
        let cofactors = [
            s[1] * s[2] * s[3],
            s[0] * s[2] * s[3],
            s[0] * s[1] * s[3],
            s[0] * s[1] * s[2],
        ];
        let det = s[0] * cofactors[0];
        if det == 0.0 {
            return false;
        }
        let inv_det = 1.0 / det;
        let z = measurement(b);
        for (i, cofactor) in cofactors.into_iter().enumerate() {
            let s_inv = cofactor * inv_det;
            let (a, bv, c) = (kf.p[(i, i)], kf.p[(i + 4, i)], kf.p[(i + 4, i + 4)]);
            let (k1, k2) = (a * s_inv, bv * s_inv);
            let y = z[i] - kf.x[i];
            kf.x[i] += k1 * y;
            kf.x[i + 4] += k2 * y;
            kf.p[(i, i)] = a - k1 * a;
            let off = bv - k1 * bv;
            kf.p[(i, i + 4)] = off;
            kf.p[(i + 4, i)] = off;
            kf.p[(i + 4, i + 4)] = c - k2 * bv;
        }
        true
    }

    /// The predicted measurement and the factor of its covariance, for measuring many boxes against
    /// one filter (see [`MotionGate`]).
    pub fn gate(&self, kf: &KalmanFilter, max_sq: f64) -> Option<MotionGate> {
        let r = self.measurement_noise(kf.x[3]);
        let s: MeasurementCov = kf.p.fixed_view::<4, 4>(0, 0).into_owned() + r;
        let bounds = Measurement::from_fn(|i, _| (max_sq * s[(i, i)]).sqrt());
        let chol = s.cholesky()?;
        Some(MotionGate {
            mean: kf.x.fixed_rows::<4>(0).into_owned(),
            chol,
            bounds,
            max_sq,
        })
    }

    /// Squared Mahalanobis distance of a box from the filter's predicted box.
    pub fn gating_distance(&self, kf: &KalmanFilter, b: &BBox) -> f64 {
        let r = self.measurement_noise(kf.x[3]);
        kf.mahalanobis_sq(&measurement(b), &Self::observation(), &r)
    }

    /// The box the filter currently believes in.
    pub fn bbox(kf: &KalmanFilter) -> BBox {
        let (w, h) = (kf.x[2].max(0.0), kf.x[3].max(0.0));
        BBox::from_centre(kf.x[0], kf.x[1], w, h)
    }
}

/// Whether every entry off the four (value, velocity) blocks is zero.
fn block_diagonal(p: &StateCov) -> bool {
    (0..8).all(|i| (0..8).all(|j| i % 4 == j % 4 || p[(i, j)] == 0.0))
}

/// A Mahalanobis gate around one filter's predicted box, prepared once per frame.
#[derive(Debug, Clone)]
pub struct MotionGate {
    mean: Measurement,
    chol: nalgebra::Cholesky<f64, nalgebra::Const<4>>,
    /// A box farther than this from the mean in any one coordinate cannot pass the gate (each
    /// coordinate's own squared distance is at most the whole squared Mahalanobis distance).
    bounds: Measurement,
    max_sq: f64,
}

impl MotionGate {
    /// Whether a box whose centre is at `x` may pass the gate as far as x alone says: the first
    /// test [`Self::distance_sq`] makes, made the same way (so no box it lets pass is left out).
    /// Over centres in increasing order the answer is false, then true, then false.
    pub fn centre_x_within(&self, x: f64) -> std::cmp::Ordering {
        let y = x - self.mean[0];
        if y < -self.bounds[0] {
            std::cmp::Ordering::Less
        } else if y > self.bounds[0] {
            std::cmp::Ordering::Greater
        } else {
            std::cmp::Ordering::Equal
        }
    }

    /// Squared Mahalanobis distance of a box, or `None` when it is beyond the gate.
    pub fn distance_sq(&self, b: &BBox) -> Option<f64> {
        let y = measurement(b) - self.mean;
        if (0..4).any(|i| y[i].abs() > self.bounds[i]) {
            return None;
        }
        let d = y.dot(&self.chol.solve(&y));
        (d <= self.max_sq).then_some(d)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use throughline_sim::rng::Rng;

    /// The update in matrix form (as it was written before the block form): the reference the
    /// block form must equal bit for bit.
    fn matrix_update(m: &BoxMotion, kf: &mut KalmanFilter, b: &BBox) -> bool {
        let r = m.measurement_noise(kf.x[3]);
        let pht: SMatrix<f64, 8, 4> = kf.p.fixed_columns::<4>(0).into_owned();
        let s: MeasurementCov = pht.fixed_rows::<4>(0).into_owned() + r;
        let Some(s_inv) = s.try_inverse() else {
            return false;
        };
        let k: SMatrix<f64, 8, 4> = pht * s_inv;
        let y = measurement(b) - kf.x.fixed_rows::<4>(0);
        kf.x += k * y;
        let p = &mut kf.p;
        for row in 0..8 {
            for col in row..8 {
                let mut d = 0.0;
                for j in 0..4 {
                    d += k[(row, j)] * pht[(col, j)];
                }
                let v = p[(row, col)] - d;
                p[(row, col)] = v;
                p[(col, row)] = v;
            }
        }
        true
    }

    /// The prediction in matrix form (as it was written before the block form).
    fn matrix_predict(m: &BoxMotion, kf: &mut KalmanFilter) {
        for i in 2..4 {
            if kf.x[i] + kf.x[i + 4] < 1.0 {
                kf.x[i + 4] = 0.0;
            }
        }
        let q = m.process_noise(kf.x[3]);
        let mut x = kf.x;
        for i in 0..4 {
            x[i] += kf.x[i + 4];
        }
        let p = &kf.p;
        let mut out = *p;
        for r in 0..4 {
            for c in 0..4 {
                let (a, b, cc, d) = (p[(r, c)], p[(r, c + 4)], p[(r + 4, c)], p[(r + 4, c + 4)]);
                out[(r, c)] = a + b + cc + d;
                out[(r, c + 4)] = b + d;
                out[(r + 4, c)] = cc + d;
            }
        }
        kf.x = x;
        kf.p = out + q;
    }

    /// Equal bit for bit, zeros off the blocks (which the matrix form may sign).
    fn assert_same(kf: &KalmanFilter, reference: &KalmanFilter) {
        for i in 0..8 {
            assert_eq!(kf.x[i].to_bits(), reference.x[i].to_bits(), "x[{i}]");
            for j in 0..8 {
                let (a, r) = (kf.p[(i, j)], reference.p[(i, j)]);
                assert!(
                    a.to_bits() == r.to_bits() || (a == 0.0 && r == 0.0),
                    "p[{i},{j}]"
                );
            }
        }
    }

    #[test]
    fn block_forms_equal_the_matrix_forms_bit_for_bit() {
        // Random walks of boxes through predict and update, from boxes of every size down to the
        // one-pixel floor; each update is compared with the matrix form on the same filter.
        let m = BoxMotion::default();
        let mut rng = Rng::new(11);
        for _ in 0..300 {
            let mut b = BBox {
                x: rng.range(-50.0, 2000.0),
                y: rng.range(-50.0, 1000.0),
                w: rng.range(0.5, 300.0),
                h: rng.range(0.5, 600.0),
            };
            let mut kf = m.initiate(&b);
            for _ in 0..40 {
                let mut reference = kf.clone();
                m.predict(&mut kf);
                matrix_predict(&m, &mut reference);
                assert_same(&kf, &reference);
                if rng.chance(0.3) {
                    continue;
                }
                b.x += rng.range(-8.0, 8.0);
                b.y += rng.range(-8.0, 8.0);
                b.w = (b.w + rng.range(-3.0, 3.0)).max(0.5);
                b.h = (b.h + rng.range(-3.0, 3.0)).max(0.5);
                let mut reference = kf.clone();
                let ok = matrix_update(&m, &mut reference, &b);
                assert_eq!(m.update(&mut kf, &b), ok);
                assert_same(&kf, &reference);
            }
        }
    }
}
