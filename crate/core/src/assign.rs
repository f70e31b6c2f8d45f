//! Optimal one-to-one assignment of rows (tracks) to columns (detections) by cost.
//!
//! [`solve`] is the rectangular linear sum assignment problem, the same problem as SciPy's
//! `linear_sum_assignment`: it returns `min(rows, cols)` pairs of least total cost. It runs
//! `pathfinding`'s Kuhn–Munkres (Hungarian) solver, which works on integers and needs
//! `rows <= cols`, so:
//!
//! - **Scaling.** Costs are mapped to integers by `round(c * 2^40 / max|c|)`, a resolution of about
//!   1e-12 of the largest cost. Totals over up to millions of rows stay far below `i64::MAX`.
//!   Two assignments whose totals differ by less than that resolution are treated as equal.
//! - **Rectangular matrices.** A matrix with more rows than columns is solved transposed.
//! - **Non-finite costs** (NaN, ±∞) are replaced by one more than the largest finite cost.
//!
//! [`solve_gated`] adds gating as trackers need it: entries above the gate are clamped to just above
//! it, the matrix is solved, and pairs above the gate are dropped. When no entry passes the gate the
//! solver is not run at all and nothing is matched.

use pathfinding::kuhn_munkres::kuhn_munkres_min;
use pathfinding::matrix::Matrix;

/// A dense cost matrix in row-major order.
#[derive(Debug, Clone, PartialEq)]
pub struct CostMatrix {
    pub rows: usize,
    pub cols: usize,
    pub data: Vec<f64>,
}

impl CostMatrix {
    /// A matrix filled with `value`.
    pub fn filled(rows: usize, cols: usize, value: f64) -> Self {
        Self {
            rows,
            cols,
            data: vec![value; rows * cols],
        }
    }

    /// A matrix from a function of (row, column).
    pub fn from_fn(rows: usize, cols: usize, mut f: impl FnMut(usize, usize) -> f64) -> Self {
        let mut data = Vec::with_capacity(rows * cols);
        for r in 0..rows {
            for c in 0..cols {
                data.push(f(r, c));
            }
        }
        Self { rows, cols, data }
    }

    pub fn get(&self, r: usize, c: usize) -> f64 {
        self.data[r * self.cols + c]
    }

    pub fn set(&mut self, r: usize, c: usize, v: f64) {
        self.data[r * self.cols + c] = v;
    }
}

/// Largest magnitude that a scaled cost may take.
const INTEGER_RANGE: f64 = (1u64 << 40) as f64;

/// Least-cost assignment: `min(rows, cols)` pairs `(row, col)`, sorted by row.
pub fn solve(cost: &CostMatrix) -> Vec<(usize, usize)> {
    if cost.rows == 0 || cost.cols == 0 {
        return Vec::new();
    }
    let max_finite = cost
        .data
        .iter()
        .copied()
        .filter(|c| c.is_finite())
        .fold(0.0_f64, |m, c| m.max(c.abs()));
    let replacement = max_finite + 1.0;
    let value = |c: f64| if c.is_finite() { c } else { replacement };
    let max_abs = cost
        .data
        .iter()
        .fold(0.0_f64, |m, &c| m.max(value(c).abs()));
    let scale = if max_abs > 0.0 {
        INTEGER_RANGE / max_abs
    } else {
        1.0
    };
    let to_int = |c: f64| (value(c) * scale).round() as i64;

    let transposed = cost.rows > cost.cols;
    let (n, m) = if transposed {
        (cost.cols, cost.rows)
    } else {
        (cost.rows, cost.cols)
    };
    let mut ints = Vec::with_capacity(n * m);
    for i in 0..n {
        for j in 0..m {
            let c = if transposed {
                cost.get(j, i)
            } else {
                cost.get(i, j)
            };
            ints.push(to_int(c));
        }
    }
    let Ok(matrix) = Matrix::from_vec(n, m, ints) else {
        return Vec::new();
    };
    let (_, cols_of_rows) = kuhn_munkres_min(&matrix);
    let mut pairs: Vec<(usize, usize)> = cols_of_rows
        .into_iter()
        .enumerate()
        .map(|(i, j)| if transposed { (j, i) } else { (i, j) })
        .collect();
    pairs.sort_unstable();
    pairs
}

/// Least-cost assignment keeping only pairs whose cost is at most `gate`.
pub fn solve_gated(cost: &CostMatrix, gate: f64) -> Vec<(usize, usize)> {
    let passes = |c: f64| c.is_finite() && c <= gate;
    if !cost.data.iter().any(|&c| passes(c)) {
        return Vec::new();
    }
    let above = gate + gate.abs().max(1.0) * 1e-5;
    let clamped = CostMatrix {
        rows: cost.rows,
        cols: cost.cols,
        data: cost
            .data
            .iter()
            .map(|&c| if passes(c) { c } else { above })
            .collect(),
    };
    solve(&clamped)
        .into_iter()
        .filter(|&(r, c)| passes(cost.get(r, c)))
        .collect()
}

/// Total cost of a set of pairs.
pub fn total_cost(cost: &CostMatrix, pairs: &[(usize, usize)]) -> f64 {
    pairs.iter().map(|&(r, c)| cost.get(r, c)).sum()
}
