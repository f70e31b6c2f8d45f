//! The sparse solver against the dense one. The dense route on the whole clamped matrix is the
//! definition of the gated assignment (and is itself checked against SciPy's
//! `linear_sum_assignment` in tests/reference_assignment.rs); the sparse route must reach the same
//! total on every instance. Among equally good matchings the two may pick different ones, so the
//! pairs themselves are compared only where the optimum is unique.

use super::*;
use throughline_sim::rng::Rng;

/// What the definition gives: clamp every entry above the gate (and every pair not listed) to just
/// above it, solve the whole matrix densely, drop the clamped pairs.
fn by_definition(rows: usize, cols: usize, edges: &[Edge], gate: f64) -> Vec<(usize, usize)> {
    let above = gate + gate.abs().max(1.0) * 1e-5;
    let mut m = CostMatrix::filled(rows, cols, above);
    for e in edges {
        if e.cost.is_finite() && e.cost <= gate {
            m.set(e.row, e.col, e.cost);
        }
    }
    solve(&m)
        .into_iter()
        .filter(|&(r, c)| m.get(r, c) <= gate)
        .collect()
}

/// The objective both routes minimise: the cost of the pairs plus `above` for every row of the
/// smaller side left unmatched, i.e. minus the total of (above − cost) over the pairs.
fn weight(edges: &[Edge], gate: f64, pairs: &[(usize, usize)]) -> f64 {
    let above = gate + gate.abs().max(1.0) * 1e-5;
    pairs
        .iter()
        .map(|&(r, c)| {
            let e = edges.iter().find(|e| (e.row, e.col) == (r, c));
            let e = e.expect("a pair that was listed");
            assert!(e.cost <= gate, "a pair above the gate: {e:?}");
            above - e.cost
        })
        .sum()
}

fn assert_matching(pairs: &[(usize, usize)]) {
    let mut rows: Vec<usize> = pairs.iter().map(|p| p.0).collect();
    let mut cols: Vec<usize> = pairs.iter().map(|p| p.1).collect();
    rows.sort_unstable();
    rows.dedup();
    cols.sort_unstable();
    cols.dedup();
    assert_eq!(rows.len(), pairs.len(), "a row used twice: {pairs:?}");
    assert_eq!(cols.len(), pairs.len(), "a column used twice: {pairs:?}");
}

/// A random sparse instance: each pair listed with chance `density`, its cost drawn from a few
/// values (many ties, some exactly at the gate, some above it) or uniformly.
fn instance(rng: &mut Rng, rows: usize, cols: usize, density: f64, ties: bool) -> Vec<Edge> {
    const LEVELS: [f64; 6] = [0.0, 0.1, 0.25, 0.5, 0.7, 0.9];
    let mut edges = Vec::new();
    for row in 0..rows {
        for col in 0..cols {
            if rng.chance(density) {
                let cost = if ties {
                    LEVELS[rng.below(LEVELS.len())]
                } else {
                    rng.uniform()
                };
                edges.push(Edge { row, col, cost });
            }
        }
    }
    edges
}

/// The sparse route (every component with more than one row and column) against the definition.
fn check(rows: usize, cols: usize, edges: &[Edge], gate: f64, case: &str) {
    let sparse = assign(rows, cols, edges, gate, u64::MAX);
    assert!(!sparse.greedy, "{case}");
    assert_matching(&sparse.pairs);
    let dense = by_definition(rows, cols, edges, gate);
    let (a, b) = (
        weight(edges, gate, &sparse.pairs),
        weight(edges, gate, &dense),
    );
    assert!((a - b).abs() < 1e-9, "{case}: sparse {a} vs dense {b}");
    assert_eq!(assign_edges(rows, cols, edges, gate), sparse, "{case}");
}

#[test]
fn sparse_totals_equal_dense_on_random_sparse_instances() {
    let mut rng = Rng::new(18);
    for case in 0..2_000 {
        let (rows, cols) = (1 + rng.below(30), 1 + rng.below(30));
        let density = [0.05, 0.15, 0.4, 1.0][case % 4];
        let ties = case % 3 != 0;
        let edges = instance(&mut rng, rows, cols, density, ties);
        check(rows, cols, &edges, 0.7, &format!("case {case}"));
    }
}

#[test]
fn sparse_totals_equal_dense_with_negative_costs_and_other_gates() {
    let mut rng = Rng::new(7);
    for case in 0..500 {
        let (rows, cols) = (1 + rng.below(20), 1 + rng.below(20));
        let mut edges = instance(&mut rng, rows, cols, 0.3, case % 2 == 0);
        for e in &mut edges {
            e.cost = e.cost * 4.0 - 2.0;
        }
        let gate = [-1.0, 0.0, 0.8, 5.0][case % 4];
        check(rows, cols, &edges, gate, &format!("case {case}"));
    }
}

#[test]
fn a_large_component_is_solved_exactly() {
    // 450 tracks and 470 boxes along a line, each box near a few tracks: one component, beyond
    // the size `maximise_edges` solves densely.
    let mut rng = Rng::new(3);
    let (rows, cols): (usize, usize) = (450, 470);
    let mut edges = Vec::new();
    for row in 0..rows {
        let centre = row * cols / rows;
        for col in centre.saturating_sub(3)..(centre + 4).min(cols) {
            if rng.chance(0.7) {
                let cost = (rng.uniform() * 20.0).round() / 20.0;
                edges.push(Edge { row, col, cost });
            }
        }
    }
    let (rs, cs) = rows_and_cols(&edges.iter().collect::<Vec<_>>());
    assert!(rs.len() > DENSE_UP_TO && cs.len() > DENSE_UP_TO);
    check(rows, cols, &edges, 0.7, "long line");
    let gains: Vec<Edge> = edges
        .iter()
        .map(|e| Edge {
            cost: 1.0 - e.cost,
            ..*e
        })
        .collect();
    let sparse = gain(&gains, &maximise_edges(rows, cols, &gains));
    let dense = gain(&gains, &dense_maximum(rows, cols, &gains));
    assert!((sparse - dense).abs() < 1e-9, "{sparse} vs {dense}");
}

#[test]
fn a_unique_optimum_is_found_pair_for_pair() {
    // Uniform real costs: the optimum is unique, so both routes give the same pairs.
    let mut rng = Rng::new(11);
    for case in 0..300 {
        let (rows, cols) = (2 + rng.below(25), 2 + rng.below(25));
        let edges = instance(&mut rng, rows, cols, 0.3, false);
        let sparse = assign(rows, cols, &edges, 0.7, u64::MAX).pairs;
        assert_eq!(
            sparse,
            by_definition(rows, cols, &edges, 0.7),
            "case {case}"
        );
    }
}

#[test]
fn running_out_of_steps_finishes_greedily_with_a_valid_matching() {
    let mut rng = Rng::new(5);
    let edges = instance(&mut rng, 60, 60, 0.3, true);
    let found = assign(60, 60, &edges, 0.7, 50);
    assert!(found.greedy);
    assert_matching(&found.pairs);
    assert!(found.pairs.iter().all(|&(r, c)| {
        edges
            .iter()
            .any(|e| (e.row, e.col) == (r, c) && e.cost <= 0.7)
    }));
    // Nothing is left that could still be matched: the greedy rest is maximal.
    let (mut rows, mut cols) = (vec![false; 60], vec![false; 60]);
    for &(r, c) in &found.pairs {
        rows[r] = true;
        cols[c] = true;
    }
    assert!(!edges
        .iter()
        .any(|e| e.cost <= 0.7 && !rows[e.row] && !cols[e.col]));
}

#[test]
fn maximise_edges_sparse_and_dense_agree() {
    let mut rng = Rng::new(21);
    for case in 0..300 {
        let (rows, cols) = (1 + rng.below(25), 1 + rng.below(25));
        let edges = instance(&mut rng, rows, cols, 0.25, case % 2 == 0);
        let pairs = maximise_edges(rows, cols, &edges);
        assert_matching(&pairs);
        let dense = gain(&edges, &dense_maximum(rows, cols, &edges));
        let sparse = gain(&edges, &sparse_maximum(rows, cols, &edges));
        assert!((gain(&edges, &pairs) - dense).abs() < 1e-9, "case {case}");
        assert!((sparse - dense).abs() < 1e-9, "case {case}");
    }
}

/// Total weight of pairs, zero for a pair not listed.
fn gain(edges: &[Edge], pairs: &[(usize, usize)]) -> f64 {
    let weight = |&(r, c): &(usize, usize)| {
        let e = edges.iter().find(|e| (e.row, e.col) == (r, c));
        e.map_or(0.0, |e| e.cost)
    };
    pairs.iter().map(weight).sum()
}

/// The definition of `maximise_edges`: the whole matrix of negated weights (zero where no pair is
/// listed) solved densely.
fn dense_maximum(rows: usize, cols: usize, edges: &[Edge]) -> Vec<(usize, usize)> {
    let mut w = CostMatrix::filled(rows, cols, 0.0);
    for e in edges {
        w.set(e.row, e.col, -e.cost);
    }
    solve(&w)
}

/// `maximise_edges` with every component of more than one pair solved by the sparse solver.
fn sparse_maximum(rows: usize, cols: usize, edges: &[Edge]) -> Vec<(usize, usize)> {
    let listed: Vec<usize> = (0..edges.len()).filter(|&i| edges[i].cost > 0.0).collect();
    let mut pairs = Vec::new();
    let mut components = Components::default();
    components.group(rows, cols, edges, &listed);
    for indices in components.groups() {
        let group: Vec<&Edge> = indices.iter().map(|&i| &edges[i]).collect();
        let (rs, cs) = rows_and_cols(&group);
        let mut steps = u64::MAX;
        let gain = |e: &Edge| -e.cost;
        let found = sparse_component(&group, &rs, &cs, 0.0, gain, &mut steps);
        pairs.extend(found);
    }
    pairs
}
