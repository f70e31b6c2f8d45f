//! `cargo xtask shape` (and the first step of `cargo xtask test`): the code's shape under
//! `crate/`: no function over [`MAX_FN_LINES`] lines, no file over [`MAX_FILE_LINES`] lines
//! (inline `#[cfg(test)]` items and `tests/` folders aside), and no two top-level modules of one
//! crate that reach each other through `crate::` (directly or round a longer loop).
//!
//! Naive brace counting over the source with comments, strings and character literals blanked
//! out: good to a line or two, not a parser.

use std::collections::{BTreeMap, BTreeSet};
use std::fs;
use std::path::{Path, PathBuf};

use crate::paths::root;

mod cycles;
mod deep;
mod paths;
mod scan;
mod strip;

pub const MAX_FN_LINES: usize = 80;
pub const MAX_FILE_LINES: usize = 500;

/// Folders not measured: integration tests, benchmarks, build output, fuzz targets.
const SKIPPED_DIRS: [&str; 4] = ["tests", "benches", "target", "fuzz"];

/// `cargo xtask shape`: prints what is over the limits; fails when anything is.
pub fn command() -> Result<(), String> {
    let found = check(&root())?;
    if found.is_clean() {
        eprintln!("shape: no function over {MAX_FN_LINES} lines, no file over {MAX_FILE_LINES}, no module loop");
        return Ok(());
    }
    for p in found.all() {
        eprintln!("  {p}");
    }
    Err(found.summary())
}

/// The breaks of the shape rules, by kind, each message saying what to fix.
#[derive(Default)]
pub struct Found {
    pub long_files: Vec<String>,
    pub long_functions: Vec<String>,
    pub module_loops: Vec<String>,
}

impl Found {
    pub fn is_clean(&self) -> bool {
        self.all().next().is_none()
    }

    pub fn all(&self) -> impl Iterator<Item = &String> {
        (self.long_files.iter())
            .chain(&self.long_functions)
            .chain(&self.module_loops)
    }

    /// "shape: files over 500 lines: 2; functions over 80 lines: 3; module loops: 1 (listed above)".
    pub fn summary(&self) -> String {
        format!(
            "shape: files over {MAX_FILE_LINES} lines: {}; functions over {MAX_FN_LINES} lines: {}; \
             module loops: {} (listed above)",
            self.long_files.len(),
            self.long_functions.len(),
            self.module_loops.len()
        )
    }
}

/// Every break of the shape rules under `repo/crate`.
pub fn check(repo: &Path) -> Result<Found, String> {
    let files = rust_files(&repo.join("crate"))?;
    let mut scanned = Vec::new();
    for path in &files {
        let src = fs::read_to_string(path).map_err(|e| format!("{}: {e}", path.display()))?;
        let rel = path.strip_prefix(repo).unwrap_or(path).to_path_buf();
        let depth = module_depth(&rel);
        scanned.push((rel, scan::scan(&strip::blank(&src), depth.unwrap_or(0))));
    }
    let test_files = test_module_files(&scanned);
    let measured = || scanned.iter().filter(|(rel, _)| !test_files.contains(rel));
    let mut found = Found::default();
    for (rel, s) in measured() {
        if s.code_lines > MAX_FILE_LINES {
            found.long_files.push(format!(
                "{}: {} lines (limit {MAX_FILE_LINES}, inline tests aside): split it into modules by what each part is for",
                rel.display(),
                s.code_lines
            ));
        }
        for (line, length, name) in s.functions.iter().filter(|f| f.1 > MAX_FN_LINES) {
            found.long_functions.push(format!(
                "{}:{line}: fn {name} is {length} lines (limit {MAX_FN_LINES}): split it into named steps",
                rel.display()
            ));
        }
    }
    found.module_loops = cycles::problems(&module_edges(measured()));
    let deep_edges = deep::edges(measured().map(|(rel, s)| (rel.as_path(), s.named.as_slice())));
    found.module_loops.extend(cycles::problems(&deep_edges));
    Ok(found)
}

/// Every .rs file under `dir`, sorted, outside the [`SKIPPED_DIRS`] and hidden folders.
fn rust_files(dir: &Path) -> Result<Vec<PathBuf>, String> {
    let mut files = Vec::new();
    let mut stack = vec![dir.to_path_buf()];
    while let Some(d) = stack.pop() {
        for entry in fs::read_dir(&d).map_err(|e| format!("{}: {e}", d.display()))? {
            let path = entry.map_err(|e| e.to_string())?.path();
            let name = path.file_name().unwrap_or_default().to_string_lossy();
            if path.is_dir() {
                if !SKIPPED_DIRS.contains(&name.as_ref()) && !name.starts_with('.') {
                    stack.push(path);
                }
            } else if name.ends_with(".rs") {
                files.push(path);
            }
        }
    }
    files.sort();
    Ok(files)
}

/// For `crate/NAME/src/...`: the crate and the path below src/.
fn crate_and_module(rel: &Path) -> Option<(String, Vec<String>)> {
    let parts: Vec<String> = rel
        .iter()
        .map(|p| p.to_string_lossy().into_owned())
        .collect();
    match parts.as_slice() {
        [top, krate, src, rest @ ..] if top == "crate" && src == "src" && !rest.is_empty() => {
            Some((krate.clone(), rest.to_vec()))
        }
        _ => None,
    }
}

/// How many modules deep below the crate root a file is: src/main.rs 0, src/x.rs and src/x/mod.rs
/// 1, src/x/y.rs 2. None outside a crate's src/ or under src/bin/ (each file there is a root).
fn module_depth(rel: &Path) -> Option<usize> {
    let (_, module) = crate_and_module(rel)?;
    let last = module.last()?;
    if module[0] == "bin" {
        return None;
    }
    let own_file =
        last == "mod.rs" || (module.len() == 1 && (last == "lib.rs" || last == "main.rs"));
    Some(module.len() - usize::from(own_file))
}

/// The top-level module a file belongs to (None for the crate root and src/bin/).
fn top_module(rel: &Path) -> Option<(String, String)> {
    let (krate, module) = crate_and_module(rel)?;
    (module_depth(rel)? > 0).then(|| (krate, module[0].trim_end_matches(".rs").to_string()))
}

/// Files of test modules declared `#[cfg(test)] mod NAME;`: measured with the tests, not the code.
fn test_module_files(scanned: &[(PathBuf, scan::Scanned)]) -> BTreeSet<PathBuf> {
    let mut files = BTreeSet::new();
    for (rel, s) in scanned {
        let name = rel.file_name().unwrap_or_default().to_string_lossy();
        let parent = rel.parent().unwrap_or(Path::new(""));
        let children = if ["mod.rs", "lib.rs", "main.rs"].contains(&name.as_ref()) {
            parent.to_path_buf()
        } else {
            parent.join(name.trim_end_matches(".rs"))
        };
        for m in &s.test_file_modules {
            files.insert(children.join(format!("{m}.rs")));
            files.insert(children.join(m).join("mod.rs"));
        }
    }
    files
}

/// Per crate: which top-level module names which other top-level module.
fn module_edges<'a>(
    scanned: impl Iterator<Item = &'a (PathBuf, scan::Scanned)> + Clone,
) -> BTreeMap<String, BTreeMap<String, BTreeSet<String>>> {
    let mut modules: BTreeMap<String, BTreeSet<String>> = BTreeMap::new();
    for (rel, _) in scanned.clone() {
        if let Some((krate, module)) = top_module(rel) {
            modules.entry(krate).or_default().insert(module);
        }
    }
    let mut edges: BTreeMap<String, BTreeMap<String, BTreeSet<String>>> = BTreeMap::new();
    for (rel, s) in scanned {
        let Some((krate, from)) = top_module(rel) else {
            continue;
        };
        let known = &modules[&krate];
        let to: Vec<String> = (s.crate_names.iter())
            .filter(|n| known.contains(*n) && **n != from)
            .cloned()
            .collect();
        edges
            .entry(krate)
            .or_default()
            .entry(from)
            .or_default()
            .extend(to);
    }
    edges
}
