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
//! [`solve_gated`] adds gating as trackers need it: the result is that of clamping entries above the
//! gate to just above it, solving, and dropping the pairs above the gate, computed component by
//! component. When no entry passes the gate nothing is matched. The trackers' assignments
//! ([`assign_edges`]) solve each component with the sparse solver of `assign/sparse.rs`, in time and
//! memory that follow the candidate pairs.

mod components;
mod sparse;
#[cfg(test)]
mod tests;

use crate::limits::MAX_ASSIGNMENT_STEPS;
use components::Components;
use pathfinding::kuhn_munkres::kuhn_munkres_min;
use pathfinding::matrix::Matrix;
use std::borrow::Borrow;

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

/// A candidate pair for [`solve_edges`]: row, column and cost.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Edge {
    pub row: usize,
    pub col: usize,
    pub cost: f64,
}

/// Least-cost assignment keeping only pairs whose cost is at most `gate`.
pub fn solve_gated(cost: &CostMatrix, gate: f64) -> Vec<(usize, usize)> {
    let mut edges = Vec::new();
    for row in 0..cost.rows {
        for col in 0..cost.cols {
            edges.push(Edge {
                row,
                col,
                cost: cost.get(row, col),
            });
        }
    }
    solve_edges(cost.rows, cost.cols, &edges, gate)
}

/// Least-cost assignment over the listed candidate pairs only (every other pair is impossible),
/// keeping pairs whose cost is at most `gate`; the result of [`solve_gated`] on the matrix the
/// edges describe (see [`assign_edges`], which also says whether the search ran out of steps and
/// finished greedily).
pub fn solve_edges(rows: usize, cols: usize, edges: &[Edge], gate: f64) -> Vec<(usize, usize)> {
    assign_edges(rows, cols, edges, gate).pairs
}

/// What [`assign_edges`] found.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Assignment {
    pub pairs: Vec<(usize, usize)>,
    /// True when the exact search ran out of its budget of [`MAX_ASSIGNMENT_STEPS`] (far beyond
    /// any real crowd) and the rows it had not placed were matched greedily, cheapest pairs first.
    pub greedy: bool,
}

/// [`solve_edges`], saying whether part of it was matched greedily.
///
/// The optimum equals clamping every entry above the gate to one value just above it, solving the
/// whole matrix, and dropping the clamped pairs: that objective is a maximum-weight matching on the
/// edges that pass the gate (weight = clamp value − cost), which splits exactly over the connected
/// components of those edges. Each component is solved on its own, so a frame with hundreds of
/// far-apart tracks costs many tiny problems instead of one large one, by the sparse solver
/// (`assign/sparse.rs`: time and memory follow the edges, never rows × columns).
///
/// The sparse solver is used at every size: on components of 10 to 400 rows it took as long as
/// the dense one ([`solve`]) or up to 20 times less, and 1–3 µs either way below 10 rows
/// (BENCHMARKS.md, "One crowded frame"). It solves the integer problem [`solve`] would, so the total is the same; among equally
/// good matchings (ties) the two may pick different ones. On every scene compared when it
/// replaced the dense solver (the demo and simulated scenes up to 294 people in view, every
/// method) the tracks stayed byte for byte the same.
pub fn assign_edges(rows: usize, cols: usize, edges: &[Edge], gate: f64) -> Assignment {
    assign(rows, cols, edges, gate, MAX_ASSIGNMENT_STEPS)
}

/// [`assign_edges`] within a budget of `steps`.
fn assign(rows: usize, cols: usize, edges: &[Edge], gate: f64, steps: u64) -> Assignment {
    let mut buffers = Buffers::default();
    let greedy = assign_reusing(rows, cols, edges, gate, steps, &mut buffers);
    Assignment {
        pairs: buffers.pairs,
        greedy,
    }
}

/// What an assignment works in, kept by a caller that assigns every frame so that, once the run
/// has warmed up, a frame allocates nothing but for components of more than one edge.
#[derive(Debug, Default)]
pub struct Buffers {
    /// The pairs found, sorted: the answer of the last call.
    pub pairs: Vec<(usize, usize)>,
    /// Indices of the edges that pass the gate.
    kept: Vec<usize>,
    components: Components,
    scratch: Scratch,
}

/// What one component of more than one edge is solved in, kept from component to component.
#[derive(Debug, Default)]
struct Scratch {
    group: Vec<Edge>,
    rs: Vec<usize>,
    cs: Vec<usize>,
    state: sparse::State,
}

/// [`assign_edges`] into `buffers.pairs`, reusing the buffers' memory; returns whether part of it
/// was matched greedily.
pub fn assign_edges_reusing(
    rows: usize,
    cols: usize,
    edges: &[Edge],
    gate: f64,
    buffers: &mut Buffers,
) -> bool {
    assign_reusing(rows, cols, edges, gate, MAX_ASSIGNMENT_STEPS, buffers)
}

fn assign_reusing(
    rows: usize,
    cols: usize,
    edges: &[Edge],
    gate: f64,
    mut steps: u64,
    buffers: &mut Buffers,
) -> bool {
    let passes = |c: f64| c.is_finite() && c <= gate;
    let Buffers {
        pairs,
        kept,
        components,
        scratch,
    } = buffers;
    kept.clear();
    kept.extend((0..edges.len()).filter(|&i| {
        let e = &edges[i];
        passes(e.cost) && e.row < rows && e.col < cols
    }));
    let above = gate + gate.abs().max(1.0) * 1e-5;
    pairs.clear();
    let mut greedy = false;
    components.group(rows, cols, edges, kept);
    // Most components of a tracking frame are one track and one box.
    for indices in components.groups() {
        if let [i] = indices[..] {
            pairs.push((edges[i].row, edges[i].col));
            continue;
        }
        let Scratch {
            group,
            rs,
            cs,
            state,
        } = &mut *scratch;
        group.clear();
        group.extend(indices.iter().map(|&i| edges[i]));
        rows_and_cols_into(group, rs, cs);
        if rs.len() == 1 || cs.len() == 1 {
            // One row or one column: the cheapest edge is the optimum (first listed among equals).
            let best = group.iter().min_by(|a, b| {
                a.cost
                    .total_cmp(&b.cost)
                    .then((a.row, a.col).cmp(&(b.row, b.col)))
            });
            pairs.extend(best.map(|e| (e.row, e.col)));
            continue;
        }
        let edge_cost = |e: &Edge| e.cost;
        greedy |= sparse_component_in(state, group, (rs, cs), above, edge_cost, &mut steps, pairs);
    }
    pairs.sort_unstable();
    greedy
}

/// Components of [`maximise_edges`] with at most this many rows and columns are solved by the
/// dense solver, so that the scores stay pair for pair those checked against the reference
/// libraries; larger ones by the sparse one.
pub const DENSE_UP_TO: usize = 400;

/// One component, its rows `rs` and columns `cs` (sorted), by the dense solver: the least-cost
/// matching of `value(edge)`, a row left unmatched costing `fill` (above every value). Returns
/// pairs of the caller's rows and columns.
fn dense_component(
    group: &[&Edge],
    rs: &[usize],
    cs: &[usize],
    fill: f64,
    value: impl Fn(&Edge) -> f64,
) -> Vec<(usize, usize)> {
    let mut sub = CostMatrix::filled(rs.len(), cs.len(), fill);
    for e in group {
        let (i, j) = local(e, rs, cs);
        sub.set(i, j, value(e));
    }
    solve(&sub)
        .into_iter()
        .filter(|&(i, j)| sub.get(i, j) < fill)
        .map(|(i, j)| (rs[i], cs[j]))
        .collect()
}

/// [`dense_component`] by the sparse solver, on the integers the dense one would use, within a
/// budget of `steps`.
fn sparse_component<G: Borrow<Edge>>(
    group: &[G],
    rs: &[usize],
    cs: &[usize],
    fill: f64,
    value: impl Fn(&Edge) -> f64,
    steps: &mut u64,
) -> Vec<(usize, usize)> {
    let mut pairs = Vec::new();
    let mut state = sparse::State::default();
    sparse_component_in(&mut state, group, (rs, cs), fill, value, steps, &mut pairs);
    pairs
}

/// [`sparse_component`] in the memory of `state`, its pairs added to `pairs`; returns whether
/// the budget ran out.
fn sparse_component_in<G: Borrow<Edge>>(
    state: &mut sparse::State,
    group: &[G],
    (rs, cs): (&[usize], &[usize]),
    fill: f64,
    value: impl Fn(&Edge) -> f64,
    steps: &mut u64,
    pairs: &mut Vec<(usize, usize)>,
) -> bool {
    // The scaling of [`solve`] on this component's matrix.
    let full = group.len() >= rs.len() * cs.len();
    let max_abs = group
        .iter()
        .map(|e| value(e.borrow()).abs())
        .fold(if full { 0.0 } else { fill.abs() }, f64::max);
    let scale = if max_abs > 0.0 {
        INTEGER_RANGE / max_abs
    } else {
        1.0
    };
    let to_int = |c: f64| (c * scale).round() as i64;
    let ints = group.iter().map(|e| {
        let e = e.borrow();
        let (i, j) = local(e, rs, cs);
        (i, j, to_int(value(e)))
    });
    let found = pairs.len();
    let dims = (rs.len(), cs.len());
    let out_of_steps = sparse::solve_in(state, dims, ints, to_int(fill), steps, pairs);
    for p in &mut pairs[found..] {
        *p = (rs[p.0], cs[p.1]);
    }
    out_of_steps
}

/// An edge's row and column within a component's sorted rows and columns.
fn local(e: &Edge, rs: &[usize], cs: &[usize]) -> (usize, usize) {
    let i = rs.binary_search(&e.row).unwrap_or(0);
    let j = cs.binary_search(&e.col).unwrap_or(0);
    (i, j)
}

/// The distinct rows and columns of a component, sorted.
fn rows_and_cols<G: Borrow<Edge>>(group: &[G]) -> (Vec<usize>, Vec<usize>) {
    let (mut rs, mut cs) = (Vec::new(), Vec::new());
    rows_and_cols_into(group, &mut rs, &mut cs);
    (rs, cs)
}

/// [`rows_and_cols`] into `rs` and `cs`, in place of what they held.
fn rows_and_cols_into<G: Borrow<Edge>>(group: &[G], rs: &mut Vec<usize>, cs: &mut Vec<usize>) {
    rs.clear();
    rs.extend(group.iter().map(|e| e.borrow().row));
    cs.clear();
    cs.extend(group.iter().map(|e| e.borrow().col));
    rs.sort_unstable();
    rs.dedup();
    cs.sort_unstable();
    cs.dedup();
}

/// Total cost of a set of pairs.
pub fn total_cost(cost: &CostMatrix, pairs: &[(usize, usize)]) -> f64 {
    pairs.iter().map(|&(r, c)| cost.get(r, c)).sum()
}

/// Maximum-weight assignment over positive-weight candidate pairs: the positive pairs of SciPy's
/// `linear_sum_assignment(-W)` on the full matrix `W` that is zero outside the listed pairs. A
/// complete assignment of `W` is a matching of the listed pairs plus zero-weight filler, so its
/// total splits over the connected components of the listed pairs; each component is solved on its
/// own, densely up to [`DENSE_UP_TO`] rows and columns, beyond that by the sparse solver.
pub fn maximise_edges(rows: usize, cols: usize, edges: &[Edge]) -> Vec<(usize, usize)> {
    let kept: Vec<usize> = (0..edges.len())
        .filter(|&i| {
            let e = &edges[i];
            e.cost.is_finite() && e.cost > 0.0 && e.row < rows && e.col < cols
        })
        .collect();
    let mut pairs = Vec::new();
    let mut steps = MAX_ASSIGNMENT_STEPS;
    let mut components = Components::default();
    components.group(rows, cols, edges, &kept);
    for indices in components.groups() {
        if let [i] = indices[..] {
            pairs.push((edges[i].row, edges[i].col));
            continue;
        }
        let group: Vec<&Edge> = indices.iter().map(|&i| &edges[i]).collect();
        let (rs, cs) = rows_and_cols(&group);
        let gain = |e: &Edge| -e.cost;
        if rs.len() <= DENSE_UP_TO && cs.len() <= DENSE_UP_TO {
            pairs.extend(dense_component(&group, &rs, &cs, 0.0, gain));
        } else {
            let found = sparse_component(&group, &rs, &cs, 0.0, gain, &mut steps);
            pairs.extend(found);
        }
    }
    pairs.sort_unstable();
    pairs
}
