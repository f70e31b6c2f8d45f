//! Exact assignment on a list of candidate pairs, in memory linear in the pairs: successive
//! shortest augmenting paths (Dijkstra on reduced costs, with column prices as dual potentials, as
//! in the Jonker–Volgenant method) over the sparse graph itself, never a dense matrix.
//!
//! The problem: every row either takes one of its listed columns (each column at most once), at
//! that pair's cost, or stays unmatched at the cost `unmatched`, which is above every pair's cost;
//! the total is least. Leaving a row unmatched is modelled as a column of its own (its "dummy"),
//! reachable from that row only, so every row is always matched to something and the classical
//! row-by-row method applies unchanged:
//!
//! - Prices `p` start at zero. A row matched to column `j` at cost `c` has the value
//!   `u = c + p[j]`, the least `c' + p[j']` over its pairs (reduced costs `c' + p[j'] − u` are never
//!   negative); a free column keeps price zero. Under these conditions the matching is optimal for
//!   the rows placed so far (complementary slackness), and prices stay within twice the range of
//!   the costs.
//! - First each row takes its cheapest column when that column is still free (this keeps the
//!   conditions). Then each row left over is placed by the shortest alternating path to a free
//!   column, found by Dijkstra over reduced costs (ties by column), and the prices of the columns
//!   finished before it are raised by how much shorter their paths were.
//!
//! Work is counted in steps (one per pair looked at); when the caller's budget runs out the rows
//! still unplaced are matched cheapest pair first among free columns, and the result says so.

use std::cmp::Reverse;
use std::collections::BinaryHeap;

/// No row or column.
const NONE: u32 = u32::MAX;

/// Least total cost over the `edges` `(row, col, cost)` with rows `0..rows` and columns
/// `0..cols`, a row left unmatched costing `unmatched` (which must exceed every edge's cost):
/// the pairs `(row, col)`, by row, added to `pairs`; returns whether the budget of work `steps`
/// (decreased by what this call uses) ran out, the rows placed after that matched greedily. The
/// edges are read twice (counted, then placed), never copied whole. Works in the memory of `s`,
/// kept by a caller that solves many components (it holds nothing between calls).
pub(super) fn solve_in<E>(
    s: &mut State,
    (rows, cols): (usize, usize),
    edges: E,
    unmatched: i64,
    steps: &mut u64,
    pairs: &mut Vec<(usize, usize)>,
) -> bool
where
    E: Iterator<Item = (usize, usize, i64)> + Clone,
{
    s.refill(rows, cols, edges, unmatched);
    s.cheapest_free_first();
    let mut out_of_steps = false;
    for row in 0..rows {
        if s.mate[row] == NONE && !s.place(row, steps) {
            out_of_steps = true;
            break;
        }
    }
    if out_of_steps {
        s.place_rest_greedily();
    }
    pairs.extend(
        (0..rows)
            .filter(|&r| (s.mate[r] as usize) < cols)
            .map(|r| (r, s.mate[r] as usize)),
    );
    out_of_steps
}

/// The graph (rows' pairs in compressed rows, each row's dummy column being `cols + row`), the
/// matching and prices, and Dijkstra's scratch space, reset after each search.
#[derive(Debug, Default)]
pub(super) struct State {
    cols: usize,
    start: Vec<usize>,
    col: Vec<u32>,
    cost: Vec<i64>,
    unmatched: i64,
    /// Per column (real, then dummies): price, owning row.
    price: Vec<i64>,
    owner: Vec<u32>,
    /// Per row: its column (real or dummy) and that pair's cost.
    mate: Vec<u32>,
    mate_cost: Vec<i64>,
    /// Per column: distance, the row it was reached from and that pair's cost, whether finished.
    dist: Vec<i64>,
    from: Vec<u32>,
    from_cost: Vec<i64>,
    done: Vec<bool>,
    touched: Vec<usize>,
    heap: BinaryHeap<Reverse<(i64, u32)>>,
}

impl State {
    /// The graph of `edges`, with no row matched, in place of what the state held (its memory
    /// kept).
    fn refill<E>(&mut self, rows: usize, cols: usize, edges: E, unmatched: i64)
    where
        E: Iterator<Item = (usize, usize, i64)> + Clone,
    {
        let start = &mut self.start;
        start.clear();
        start.resize(rows + 1, 0);
        for (r, _, _) in edges.clone() {
            start[r + 1] += 1;
        }
        for r in 0..rows {
            start[r + 1] += start[r];
        }
        let n = start[rows];
        refilled(&mut self.col, n, 0);
        refilled(&mut self.cost, n, 0);
        // Each row's start serves as its next free place while the pairs are placed; it then
        // holds the next row's start, and moving every start down one row puts them back.
        for (r, c, w) in edges {
            self.col[start[r]] = c as u32;
            self.cost[start[r]] = w;
            start[r] += 1;
        }
        start.copy_within(..rows, 1);
        start[0] = 0;
        let all = cols + rows;
        self.cols = cols;
        self.unmatched = unmatched;
        refilled(&mut self.price, all, 0);
        refilled(&mut self.owner, all, NONE);
        refilled(&mut self.mate, rows, NONE);
        refilled(&mut self.mate_cost, rows, 0);
        refilled(&mut self.dist, all, i64::MAX);
        refilled(&mut self.from, all, NONE);
        refilled(&mut self.from_cost, all, 0);
        refilled(&mut self.done, all, false);
        self.heap.clear();
    }

    /// Row `r`'s pairs, its dummy last: (column, cost).
    fn pairs(&self, r: usize) -> impl Iterator<Item = (usize, i64)> + '_ {
        let range = self.start[r]..self.start[r + 1];
        self.col[range.clone()]
            .iter()
            .zip(&self.cost[range])
            .map(|(&c, &w)| (c as usize, w))
            .chain(std::iter::once((self.cols + r, self.unmatched)))
    }

    fn take(&mut self, r: usize, c: usize, w: i64) {
        self.mate[r] = c as u32;
        self.mate_cost[r] = w;
        self.owner[c] = r as u32;
    }

    /// Each row in turn takes its cheapest column (the first listed among equals) if it is free.
    fn cheapest_free_first(&mut self) {
        for r in 0..self.mate.len() {
            let best = self
                .pairs(r)
                .min_by(|a, b| a.1.cmp(&b.1).then(a.0.cmp(&b.0)));
            if let Some((c, w)) = best {
                if self.owner[c] == NONE {
                    self.take(r, c, w);
                }
            }
        }
    }

    /// Places free row `r0` by the shortest augmenting path; false (nothing changed) when the
    /// budget runs out first.
    fn place(&mut self, r0: usize, steps: &mut u64) -> bool {
        let u0 = self
            .pairs(r0)
            .map(|(c, w)| w + self.price[c])
            .min()
            .unwrap_or(0);
        if !self.relax_row(r0, 0, u0, steps) {
            self.reset();
            return false;
        }
        while let Some(Reverse((d, j))) = self.heap.pop() {
            let j = j as usize;
            if self.done[j] || d > self.dist[j] {
                continue;
            }
            self.done[j] = true;
            let owner = self.owner[j];
            if owner == NONE {
                self.finish(r0, j, d);
                return true;
            }
            let r = owner as usize;
            let u = self.mate_cost[r] + self.price[j];
            if !self.relax_row(r, d, u, steps) {
                break;
            }
        }
        // Out of steps (a free row always reaches its own dummy column, so the search cannot run
        // dry otherwise).
        self.reset();
        false
    }

    /// Offers the columns of row `r`, reached at distance `d`, with row value `u`.
    fn relax_row(&mut self, r: usize, d: i64, u: i64, steps: &mut u64) -> bool {
        let n = (self.start[r + 1] - self.start[r] + 1) as u64;
        if *steps < n {
            *steps = 0;
            return false;
        }
        *steps -= n;
        for k in self.start[r]..=self.start[r + 1] {
            let (c, w) = if k < self.start[r + 1] {
                (self.col[k] as usize, self.cost[k])
            } else {
                (self.cols + r, self.unmatched)
            };
            if self.done[c] {
                continue;
            }
            let nd = d + (w + self.price[c] - u);
            if nd < self.dist[c] {
                if self.dist[c] == i64::MAX {
                    self.touched.push(c);
                }
                self.dist[c] = nd;
                self.from[c] = r as u32;
                self.from_cost[c] = w;
                self.heap.push(Reverse((nd, c as u32)));
            }
        }
        true
    }

    /// Raises the prices of the finished columns, flips the path ending at free column `end`
    /// (reached at distance `len`), and clears the scratch space.
    fn finish(&mut self, r0: usize, end: usize, len: i64) {
        for &c in &self.touched {
            if self.done[c] {
                self.price[c] += len - self.dist[c];
            }
        }
        let mut c = end;
        loop {
            let r = self.from[c] as usize;
            let previous = self.mate[r];
            self.take(r, c, self.from_cost[c]);
            if r == r0 {
                break;
            }
            c = previous as usize;
        }
        self.reset();
    }

    fn reset(&mut self) {
        for &c in &self.touched {
            self.dist[c] = i64::MAX;
            self.done[c] = false;
        }
        self.touched.clear();
        self.heap.clear();
    }

    /// Rows still free take free columns, cheapest pairs first (ties by row, then column).
    fn place_rest_greedily(&mut self) {
        let mut free: Vec<(i64, usize, usize)> = Vec::new();
        for r in 0..self.mate.len() {
            if self.mate[r] == NONE {
                free.extend(
                    self.pairs(r)
                        .filter(|&(c, _)| c < self.cols)
                        .map(|(c, w)| (w, r, c)),
                );
            }
        }
        free.sort_unstable();
        for (w, r, c) in free {
            if self.mate[r] == NONE && self.owner[c] == NONE {
                self.take(r, c, w);
            }
        }
    }
}

/// `v` as `len` copies of `value`, in its own memory.
fn refilled<T: Clone>(v: &mut Vec<T>, len: usize, value: T) {
    v.clear();
    v.resize(len, value);
}
