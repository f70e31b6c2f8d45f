//! Ground-plane calibration: a homography from image pixels to ground coordinates, estimated from
//! four or more point pairs by the normalised direct linear transform (Hartley & Zisserman,
//! "Multiple View Geometry", algorithm 4.2), with `nalgebra`'s SVD.

use nalgebra::{DMatrix, Matrix3, Vector3};
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

/// One image point and where it lies on the ground.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct PointPair {
    pub image: [f64; 2],
    pub ground: [f64; 2],
}

/// A plane-to-plane projective map from image pixels to ground units.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Homography {
    /// Row-major 3×3 matrix, scaled so that its bottom-right entry is 1 where possible.
    pub h: Matrix3<f64>,
}

/// Similarity that moves the points' centroid to the origin and their mean distance to √2.
fn normaliser(points: &[[f64; 2]]) -> Option<Matrix3<f64>> {
    let n = points.len() as f64;
    let cx = points.iter().map(|p| p[0]).sum::<f64>() / n;
    let cy = points.iter().map(|p| p[1]).sum::<f64>() / n;
    let mean = points
        .iter()
        .map(|p| (p[0] - cx).hypot(p[1] - cy))
        .sum::<f64>()
        / n;
    if !(mean > 0.0 && mean.is_finite()) {
        return None;
    }
    let s = std::f64::consts::SQRT_2 / mean;
    Some(Matrix3::new(
        s,
        0.0,
        -s * cx,
        0.0,
        s,
        -s * cy,
        0.0,
        0.0,
        1.0,
    ))
}

fn apply(m: &Matrix3<f64>, p: [f64; 2]) -> [f64; 2] {
    let v = m * Vector3::new(p[0], p[1], 1.0);
    [v[0] / v[2], v[1] / v[2]]
}

/// Whether any three of the points lie on one line (within a relative tolerance): the homography
/// then cannot be pinned down by four of them.
fn has_collinear_triple(points: &[[f64; 2]]) -> bool {
    let scale = points
        .iter()
        .flat_map(|p| [p[0].abs(), p[1].abs()])
        .fold(1.0, f64::max);
    let n = points.len();
    if n != 4 {
        return false;
    }
    for i in 0..n {
        for j in i + 1..n {
            for k in j + 1..n {
                let (a, b, c) = (points[i], points[j], points[k]);
                let area = (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]);
                if area.abs() <= 1e-9 * scale * scale {
                    return true;
                }
            }
        }
    }
    false
}

/// Finite points, no three of them on one line (in the picture or on the ground).
fn check_spread(image: &[[f64; 2]], ground: &[[f64; 2]]) -> Result<(), String> {
    if image
        .iter()
        .chain(ground)
        .any(|p| !(crate::limits::in_range(p[0]) && crate::limits::in_range(p[1])))
    {
        return Err("every point must have finite coordinates within ±10^12".into());
    }
    if has_collinear_triple(image) || has_collinear_triple(ground) {
        return Err(
            "three of the four points lie on one line: choose points that span the ground area, \
                    such as four corners of a marked rectangle"
                .into(),
        );
    }
    Ok(())
}

impl Homography {
    /// Estimates the homography from image → ground pairs. Errors say what is wrong with the points.
    pub fn from_pairs(pairs: &[PointPair]) -> Result<Homography, String> {
        if pairs.len() < 4 {
            return Err(format!(
                "calibration needs at least 4 point pairs (image and ground), found {}",
                pairs.len()
            ));
        }
        let image: Vec<[f64; 2]> = pairs.iter().map(|p| p.image).collect();
        let ground: Vec<[f64; 2]> = pairs.iter().map(|p| p.ground).collect();
        check_spread(&image, &ground)?;
        let (Some(ti), Some(tg)) = (normaliser(&image), normaliser(&ground)) else {
            return Err(
                "the points all coincide: choose points spread over the ground area".into(),
            );
        };
        let n = pairs.len();
        let rows = (2 * n).max(9);
        let mut a = DMatrix::<f64>::zeros(rows, 9);
        for (k, (p, q)) in image.iter().zip(&ground).enumerate() {
            let [x, y] = apply(&ti, *p);
            let [u, v] = apply(&tg, *q);
            let r = 2 * k;
            a.row_mut(r)
                .copy_from_slice(&[-x, -y, -1.0, 0.0, 0.0, 0.0, u * x, u * y, u]);
            a.row_mut(r + 1)
                .copy_from_slice(&[0.0, 0.0, 0.0, -x, -y, -1.0, v * x, v * y, v]);
        }
        let svd = a.svd(false, true);
        let Some(v_t) = svd.v_t else {
            return Err("the point pairs could not be solved".into());
        };
        let mut order: Vec<usize> = (0..svd.singular_values.len()).collect();
        order.sort_by(|&i, &j| svd.singular_values[i].total_cmp(&svd.singular_values[j]));
        let (smallest, second) = (order[0], order[1]);
        let largest = svd.singular_values.max();
        if svd.singular_values[second] <= 1e-10 * largest {
            return Err(
                "the point pairs do not determine a single mapping (points in a line or repeated)"
                    .into(),
            );
        }
        let hv = v_t.row(smallest);
        let hn = Matrix3::new(
            hv[0], hv[1], hv[2], hv[3], hv[4], hv[5], hv[6], hv[7], hv[8],
        );
        let Some(tg_inv) = tg.try_inverse() else {
            return Err("the ground points could not be normalised".into());
        };
        let mut h = tg_inv * hn * ti;
        if h[(2, 2)].abs() > 1e-12 {
            h /= h[(2, 2)];
        }
        if h.determinant().abs() < 1e-15 * h.norm().powi(3) {
            return Err(
                "the mapping found is degenerate: check that image and ground points correspond"
                    .into(),
            );
        }
        // Every calibration point must be in front of the camera (the same sign of w).
        let signs: Vec<bool> = image
            .iter()
            .map(|p| (h * Vector3::new(p[0], p[1], 1.0))[2] > 0.0)
            .collect();
        if signs.iter().any(|&s| s != signs[0]) {
            return Err(
                "the pairs fold the ground over (a point given in the wrong order?)".into(),
            );
        }
        Ok(Homography { h })
    }

    /// Ground coordinates of an image point.
    pub fn to_ground(&self, x: f64, y: f64) -> (f64, f64) {
        let [u, v] = apply(&self.h, [x, y]);
        (u, v)
    }
}
