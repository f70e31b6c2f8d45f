//! Module loops at every depth: which module (one per file) names which other module of its
//! crate through `crate::` or `super::` paths, so two sub-modules that import each other are found
//! too, not only two top-level modules. The crate root is left out (it declares and re-exports
//! everything).

use super::paths::Named;
use std::collections::{BTreeMap, BTreeSet};
use std::path::Path;

type Graph = BTreeMap<String, BTreeSet<String>>;

/// For `crate/NAME/src/a/b.rs` (or `a/b/mod.rs`): the crate and the module path `[a, b]`; the
/// crate root is `[]`. None outside a crate's src/ and for src/bin/.
pub fn module_path(rel: &Path) -> Option<(String, Vec<String>)> {
    let parts: Vec<String> = rel
        .iter()
        .map(|p| p.to_string_lossy().into_owned())
        .collect();
    let [top, krate, src, rest @ ..] = parts.as_slice() else {
        return None;
    };
    if top != "crate" || src != "src" || rest.is_empty() || rest[0] == "bin" {
        return None;
    }
    let mut module: Vec<String> = rest
        .iter()
        .map(|p| p.trim_end_matches(".rs").to_string())
        .collect();
    let own_file = module.last().is_some_and(|l| l == "mod")
        || (module.len() == 1 && (module[0] == "lib" || module[0] == "main"));
    if own_file {
        module.pop();
    }
    Some((krate.clone(), module))
}

/// Per crate, the edges between its modules (named `a::b`) from each file's paths.
pub fn edges<'a>(
    files: impl Iterator<Item = (&'a Path, &'a [Named])> + Clone,
) -> BTreeMap<String, Graph> {
    let mut known: BTreeMap<String, BTreeSet<Vec<String>>> = BTreeMap::new();
    for (rel, _) in files.clone() {
        if let Some((krate, module)) = module_path(rel) {
            known.entry(krate).or_default().insert(module);
        }
    }
    let mut graphs: BTreeMap<String, Graph> = BTreeMap::new();
    for (rel, named) in files {
        let Some((krate, from)) = module_path(rel) else {
            continue;
        };
        if from.is_empty() {
            continue;
        }
        let modules = &known[&krate];
        let to: BTreeSet<String> = named
            .iter()
            .filter_map(|(climbs, names)| {
                let base = match climbs {
                    None => &[][..],
                    Some(n) => from.get(..from.len().checked_sub(*n)?)?,
                };
                let full: Vec<String> = base.iter().chain(names).cloned().collect();
                // The module a path names: its longest start that is a module (a file).
                (1..=full.len())
                    .rev()
                    .map(|k| full[..k].to_vec())
                    .find(|m| modules.contains(m))
            })
            .filter(|m| *m != from)
            .map(|m| m.join("::"))
            .collect();
        graphs
            .entry(krate)
            .or_default()
            .entry(from.join("::"))
            .or_default()
            .extend(to);
    }
    graphs
}

#[cfg(test)]
mod tests {
    use super::{edges, module_path};
    use crate::shape::{cycles, paths::named};
    use std::path::{Path, PathBuf};

    #[test]
    fn sub_modules_that_import_each_other_are_a_loop() {
        let files: Vec<(PathBuf, Vec<_>)> = [
            ("crate/k/src/lib.rs", "pub mod t;"),
            ("crate/k/src/t/mod.rs", "mod a; mod b; use a::X;"),
            ("crate/k/src/t/a.rs", "use super::b::Y; use crate::t::c::Z;"),
            ("crate/k/src/t/b.rs", "use crate::t::a::{X, self};"),
            ("crate/k/src/t/c.rs", "use super::super::t::b;"),
        ]
        .iter()
        .map(|(p, src)| (PathBuf::from(p), named(src)))
        .collect();
        assert_eq!(
            module_path(Path::new("crate/k/src/t/mod.rs")).unwrap().1,
            ["t"]
        );
        let graphs = edges(files.iter().map(|(p, n)| (p.as_path(), n.as_slice())));
        let g = &graphs["k"];
        assert_eq!(g["t::a"].iter().collect::<Vec<_>>(), ["t::b", "t::c"]);
        assert_eq!(g["t::c"].iter().collect::<Vec<_>>(), ["t::b"]);
        let problems = cycles::problems(&graphs);
        assert_eq!(problems.len(), 1, "{problems:?}");
        assert!(problems[0].contains("t::a, t::b"), "{problems:?}");
    }
}
