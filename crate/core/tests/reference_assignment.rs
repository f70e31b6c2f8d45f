//! Assignment against SciPy: `tests/fixtures/assignment.json` holds cost matrices with the pairs and
//! totals of `scipy.optimize.linear_sum_assignment` (version in the fixture's `source`), made by
//! `tests/reference/make_assignment_fixtures.py`.

use serde::Deserialize;
use throughline_core::track::assign::{solve, solve_gated, total_cost, CostMatrix};

#[derive(Deserialize)]
struct Fixture {
    source: String,
    cases: Vec<Case>,
}

#[derive(Deserialize)]
struct Case {
    name: String,
    rows: usize,
    cols: usize,
    cost: Vec<f64>,
    pairs: Vec<(usize, usize)>,
    total: f64,
}

fn fixture() -> Fixture {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../tests/fixtures/assignment.json"
    );
    serde_json::from_str(&std::fs::read_to_string(path).expect("fixture")).expect("fixture JSON")
}

#[test]
fn totals_and_pairs_equal_scipy_linear_sum_assignment() {
    let f = fixture();
    assert!(f.source.starts_with("scipy "), "{}", f.source);
    for case in &f.cases {
        let cost = CostMatrix {
            rows: case.rows,
            cols: case.cols,
            data: case.cost.clone(),
        };
        let pairs = solve(&cost);
        assert_eq!(
            pairs.len(),
            case.pairs.len(),
            "{}: number of pairs",
            case.name
        );
        let total = total_cost(&cost, &pairs);
        let tolerance = 1e-9 * case.total.abs().max(1.0);
        assert!(
            (total - case.total).abs() <= tolerance,
            "{}: total {total} vs scipy {}",
            case.name,
            case.total
        );
        // Random real-valued matrices have a unique optimum: the pairs themselves must agree.
        if case.name.starts_with("uniform") || case.name.starts_with("negative") {
            assert_eq!(pairs, case.pairs, "{}", case.name);
        }
        let mut rows: Vec<_> = pairs.iter().map(|p| p.0).collect();
        let mut cols: Vec<_> = pairs.iter().map(|p| p.1).collect();
        rows.dedup();
        cols.sort_unstable();
        cols.dedup();
        assert_eq!(rows.len(), pairs.len(), "{}: a row used twice", case.name);
        assert_eq!(
            cols.len(),
            pairs.len(),
            "{}: a column used twice",
            case.name
        );
    }
}

#[test]
fn empty_and_fully_gated_matrices_match_nothing() {
    assert!(solve(&CostMatrix::filled(0, 5, 1.0)).is_empty());
    assert!(solve(&CostMatrix::filled(4, 0, 1.0)).is_empty());
    assert!(solve_gated(&CostMatrix::filled(3, 3, 0.9), 0.5).is_empty());
    let nan = CostMatrix::filled(2, 2, f64::NAN);
    assert!(solve_gated(&nan, 0.5).is_empty());
}

#[test]
fn gating_drops_pairs_above_the_gate_but_keeps_the_rest_optimal() {
    // Row 0 can only take column 1; row 1 prefers column 1 but must not steal it at a gated cost.
    let cost = CostMatrix {
        rows: 2,
        cols: 2,
        data: vec![0.9, 0.1, 0.9, 0.2],
    };
    assert_eq!(solve_gated(&cost, 0.5), vec![(0, 1)]);
    let cost = CostMatrix {
        rows: 2,
        cols: 3,
        data: vec![0.2, 0.3, 0.9, 0.25, 0.9, 0.4],
    };
    assert_eq!(solve_gated(&cost, 0.5), vec![(0, 1), (1, 0)]);
}

#[test]
fn infinite_costs_are_treated_as_the_worst() {
    let cost = CostMatrix {
        rows: 2,
        cols: 2,
        data: vec![f64::INFINITY, 1.0, 2.0, f64::INFINITY],
    };
    assert_eq!(solve(&cost), vec![(0, 1), (1, 0)]);
}

#[test]
fn component_by_component_gating_equals_clamping_the_whole_matrix() {
    // The dense route is the definition; the split route must reach the same total on sparse,
    // IoU-like matrices where most pairs fail the gate.
    let mut rng = throughline_sim::rng::Rng::new(99);
    for case in 0..300 {
        let (rows, cols) = (1 + rng.below(12), 1 + rng.below(12));
        let cost = CostMatrix::from_fn(rows, cols, |_, _| {
            if rng.chance(0.25) {
                rng.uniform()
            } else {
                1.0
            }
        });
        let gate = 0.7;
        let above = gate + 1e-5;
        let clamped = CostMatrix {
            rows,
            cols,
            data: cost
                .data
                .iter()
                .map(|&c| if c <= gate { c } else { above })
                .collect(),
        };
        let dense: Vec<_> = solve(&clamped)
            .into_iter()
            .filter(|&(r, c)| cost.get(r, c) <= gate)
            .collect();
        let split = solve_gated(&cost, gate);
        assert_eq!(split.len(), dense.len(), "case {case}");
        let (a, b) = (total_cost(&cost, &split), total_cost(&cost, &dense));
        assert!((a - b).abs() < 1e-9, "case {case}: {a} vs {b}");
    }
}
