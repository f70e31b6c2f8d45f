//! Loops among a crate's top-level modules: groups of modules that each reach the others through
//! `crate::` (strongly connected components), each reported once with one loop through it.

use std::collections::{BTreeMap, BTreeSet, VecDeque};

type Graph = BTreeMap<String, BTreeSet<String>>;

/// One message per group of modules that import each other, per crate.
pub fn problems(edges: &BTreeMap<String, Graph>) -> Vec<String> {
    let mut problems = Vec::new();
    for (krate, graph) in edges {
        let mut placed = BTreeSet::new();
        for start in graph.keys() {
            if placed.contains(start) {
                continue;
            }
            let group: BTreeSet<String> = reach(graph, start)
                .into_iter()
                .filter(|m| reach(graph, m).contains(start))
                .collect();
            placed.extend(group.iter().cloned());
            if let Some(path) = loop_through(graph, start, &group) {
                problems.push(format!(
                    "crate/{krate}: modules {} import each other ({}): move what they share into \
                     a module of its own that both use, or merge them",
                    group.iter().cloned().collect::<Vec<_>>().join(", "),
                    path.join(" -> ")
                ));
            }
        }
    }
    problems
}

/// Every module reachable from `from` in one step or more.
fn reach(graph: &Graph, from: &str) -> BTreeSet<String> {
    let mut seen = BTreeSet::new();
    let mut stack: Vec<&String> = graph.get(from).into_iter().flatten().collect();
    while let Some(m) = stack.pop() {
        if seen.insert(m.clone()) {
            stack.extend(graph.get(m).into_iter().flatten());
        }
    }
    seen
}

/// The shortest loop from `start` back to itself inside `group` (None when there is none).
fn loop_through(graph: &Graph, start: &str, group: &BTreeSet<String>) -> Option<Vec<String>> {
    let mut came_from: BTreeMap<&str, &str> = BTreeMap::new();
    let mut queue = VecDeque::from([start]);
    while let Some(m) = queue.pop_front() {
        for next in graph.get(m).into_iter().flatten() {
            if !group.contains(next) {
                continue;
            }
            if next == start {
                let mut path = vec![start.to_string()];
                let mut at = m;
                while at != start {
                    path.push(at.to_string());
                    at = came_from[at];
                }
                path.push(start.to_string());
                path.reverse();
                return Some(path);
            }
            if !came_from.contains_key(next.as_str()) {
                came_from.insert(next, m);
                queue.push_back(next);
            }
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    fn graph(edges: &[(&str, &str)]) -> BTreeMap<String, Graph> {
        let mut g = Graph::new();
        for (a, b) in edges {
            g.entry(a.to_string()).or_default().insert(b.to_string());
        }
        BTreeMap::from([("core".to_string(), g)])
    }

    #[test]
    fn loops_are_found_once_with_a_path_and_chains_are_not_loops() {
        for (edges, expected) in [
            (vec![("a", "b"), ("b", "c")], vec![]),
            (
                vec![("a", "b"), ("b", "a")],
                vec!["modules a, b import each other (a -> b -> a)"],
            ),
            (
                vec![("a", "b"), ("b", "c"), ("c", "a"), ("c", "d")],
                vec!["modules a, b, c import each other (a -> b -> c -> a)"],
            ),
        ] {
            let found = problems(&graph(&edges));
            assert_eq!(found.len(), expected.len(), "{found:?}");
            for (f, e) in found.iter().zip(expected) {
                assert!(f.starts_with("crate/core: ") && f.contains(e), "{f}");
            }
        }
    }
}
