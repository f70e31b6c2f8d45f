//! The candidate pairs of an assignment split into independent problems: the connected
//! components of the rows and columns they join.

use super::Edge;

/// The edges grouped by the connected component of rows and columns they join (union-find over
/// rows `0..rows` and columns `rows..rows + cols`), in a fixed order: as indices into the edges,
/// each component's one after another, in one list for a frame (not one per component: most
/// components of a frame are one track and one box). Its memory is kept from call to call.
#[derive(Debug, Default)]
pub(super) struct Components {
    /// Indices of the edges, component after component.
    flat: Vec<usize>,
    /// Where each component ends in `flat`.
    ends: Vec<usize>,
    parent: Vec<usize>,
    roots: Vec<usize>,
}

impl Components {
    /// Groups `edges[k]` for every `k` in `kept` (in that order within a component).
    pub(super) fn group(&mut self, rows: usize, cols: usize, edges: &[Edge], kept: &[usize]) {
        fn find(parent: &mut [usize], mut i: usize) -> usize {
            while parent[i] != i {
                parent[i] = parent[parent[i]];
                i = parent[i];
            }
            i
        }
        let parent = &mut self.parent;
        parent.clear();
        parent.extend(0..rows + cols);
        for &k in kept {
            let e = &edges[k];
            let (a, b) = (find(parent, e.row), find(parent, rows + e.col));
            if a != b {
                parent[a.max(b)] = a.min(b);
            }
        }
        // The edges by root, then by their order in `kept`: a counting sort over the roots, which
        // lie in `0..rows + cols` (the order sorting the pairs (root, edge) would give).
        self.roots.clear();
        for &k in kept {
            let root = find(parent, edges[k].row);
            self.roots.push(root);
        }
        let start = parent;
        start.fill(0);
        for &r in &self.roots {
            start[r] += 1;
        }
        self.ends.clear();
        let mut at = 0;
        for count in start.iter_mut() {
            let n = *count;
            *count = at;
            at += n;
            if n > 0 {
                self.ends.push(at);
            }
        }
        self.flat.clear();
        self.flat.resize(kept.len(), 0);
        for (&r, &k) in self.roots.iter().zip(kept) {
            self.flat[start[r]] = k;
            start[r] += 1;
        }
    }

    /// Each component's edge indices, in order.
    pub(super) fn groups(&self) -> impl Iterator<Item = &[usize]> {
        let mut start = 0;
        self.ends.iter().map(move |&end| {
            let group = &self.flat[start..end];
            start = end;
            group
        })
    }
}
