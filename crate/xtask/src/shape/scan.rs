//! One Rust file measured: its lines of code (inline `#[cfg(test)]` items aside), its functions'
//! lengths, and the crate's top-level modules it names through `crate::` (or `super::` up to the
//! crate root). Works on the source blanked by [`super::strip::blank`].

/// What one file holds, for the shape checks.
pub struct Scanned {
    /// Lines outside `#[cfg(test)]` items.
    pub code_lines: usize,
    /// (first line, 1-based; length in lines; name) of every function with a body.
    pub functions: Vec<(usize, usize, String)>,
    /// The names after `crate::` (and `super::` that reach the crate root), outside test items.
    pub crate_names: Vec<String>,
    /// `#[cfg(test)] mod NAME;`: test modules kept in files of their own.
    pub test_file_modules: Vec<String>,
    /// Every `crate::` and `super::` path, outside test items (for loops at every depth).
    pub named: Vec<super::paths::Named>,
}

/// Measures a file whose comments and literals are blanked; `depth` is how many modules deep the
/// file is below the crate root (src/x.rs and src/x/mod.rs: 1; src/x/y.rs: 2).
pub fn scan(blanked: &str, depth: usize) -> Scanned {
    let lines: Vec<&str> = blanked.lines().collect();
    let (in_test, test_file_modules) = test_items(&lines);
    let code: Vec<&str> = lines
        .iter()
        .zip(&in_test)
        .map(|(l, &t)| if t { "" } else { *l })
        .collect();
    let mut functions = Vec::new();
    for (k, line) in code.iter().enumerate() {
        for (at, name) in fn_names(line) {
            if let Some(end) = body_end(&code, k, at) {
                functions.push((k + 1, end - k + 1, name));
            }
        }
    }
    let crate_names = code.iter().flat_map(|l| crate_names(l, depth)).collect();
    let named = code.iter().flat_map(|l| super::paths::named(l)).collect();
    Scanned {
        code_lines: in_test.iter().filter(|&&t| !t).count(),
        functions,
        crate_names,
        test_file_modules,
        named,
    }
}

/// Which lines belong to an item marked `#[cfg(test)]` (from the attribute to the item's closing
/// brace or semicolon), and the names of such items that are `mod NAME;`.
fn test_items(lines: &[&str]) -> (Vec<bool>, Vec<String>) {
    let mut in_test = vec![false; lines.len()];
    let mut file_modules = Vec::new();
    let mut k = 0;
    while k < lines.len() {
        if lines[k].trim_start().starts_with("#[cfg(test)]") {
            let (end, semicolon) = item_end(lines, k);
            if semicolon {
                let item: String = lines[k..=end].concat();
                if let Some(name) = item.split("mod ").nth(1) {
                    file_modules.push(name.trim().trim_end_matches(';').trim().to_string());
                }
            }
            in_test[k..=end].iter_mut().for_each(|t| *t = true);
            k = end + 1;
        } else {
            k += 1;
        }
    }
    (in_test, file_modules)
}

/// The line where the item starting at line `k` ends, and whether it ended with `;` (no body).
fn item_end(lines: &[&str], k: usize) -> (usize, bool) {
    let mut depth = 0usize;
    let mut opened = false;
    // Brackets of the attribute itself (`#[cfg(test)]`) are skipped by starting after it.
    let skip = lines[k]
        .find("#[cfg(test)]")
        .map_or(0, |i| i + "#[cfg(test)]".len());
    for (j, line) in lines.iter().enumerate().skip(k) {
        let text = if j == k { &line[skip..] } else { line };
        for c in text.chars() {
            match c {
                ';' if !opened => return (j, true),
                '{' => {
                    depth += 1;
                    opened = true;
                }
                '}' => {
                    depth = depth.saturating_sub(1);
                    if opened && depth == 0 {
                        return (j, false);
                    }
                }
                _ => {}
            }
        }
    }
    (lines.len() - 1, false)
}

/// Every `fn NAME` on a line: the byte just after the name, and the name.
fn fn_names(line: &str) -> Vec<(usize, String)> {
    let mut found = Vec::new();
    let mut from = 0;
    while let Some(i) = line[from..].find("fn").map(|i| i + from) {
        from = i + 2;
        let before_ok = line[..i].chars().next_back().is_none_or(|c| !is_ident(c));
        let rest = &line[i + 2..];
        let gap = rest.len() - rest.trim_start().len();
        let name: String = rest
            .trim_start()
            .chars()
            .take_while(|&c| is_ident(c))
            .collect();
        let starts_ok = name.chars().next().is_some_and(|c| !c.is_ascii_digit());
        if before_ok && gap > 0 && starts_ok {
            found.push((i + 2 + gap + name.len(), name));
        }
    }
    found
}

fn is_ident(c: char) -> bool {
    c.is_alphanumeric() || c == '_'
}

/// The line of the brace that closes the body of the function whose name ends at byte `at` of
/// line `k`; None for a declaration without a body (`fn f();` in a trait).
fn body_end(code: &[&str], k: usize, at: usize) -> Option<usize> {
    let (mut braces, mut parens) = (0usize, 0usize);
    for (j, line) in code.iter().enumerate().skip(k) {
        let text = if j == k { &line[at..] } else { line };
        for c in text.chars() {
            match c {
                '(' | '[' => parens += 1,
                ')' | ']' => parens = parens.saturating_sub(1),
                ';' if braces == 0 && parens == 0 => return None,
                '{' => braces += 1,
                '}' => {
                    braces = braces.checked_sub(1)?;
                    if braces == 0 {
                        return Some(j);
                    }
                }
                _ => {}
            }
        }
    }
    None
}

/// The top-level names a line reaches from the crate root: `crate::a`, `crate::{a, b::c}`, and
/// `super::a` where the `super`s climb `depth` modules to the root.
fn crate_names(line: &str, depth: usize) -> Vec<String> {
    let mut names = Vec::new();
    for (start, _) in line
        .match_indices("crate::")
        .chain(line.match_indices("super::"))
    {
        let before_ok = line[..start]
            .chars()
            .next_back()
            .is_none_or(|c| !is_ident(c) && c != ':');
        let prefix = if line[start..].starts_with("crate::") {
            Some("crate::".len())
        } else {
            supers(&line[start..], depth)
        };
        if let (true, Some(len)) = (before_ok, prefix) {
            names.extend(path_heads(&line[start + len..]));
        }
    }
    names
}

/// The length of `super::super::…` at the start of `text` when it climbs exactly `depth` modules.
fn supers(text: &str, depth: usize) -> Option<usize> {
    const SUPER: &str = "super::";
    let mut n = 0;
    while text[n * SUPER.len()..].starts_with(SUPER) {
        n += 1;
    }
    (n == depth).then_some(n * SUPER.len())
}

/// The first name of a path, or each first name of a `{a, b::c}` group.
fn path_heads(text: &str) -> Vec<String> {
    let head = |t: &str| -> String {
        t.trim_start()
            .chars()
            .take_while(|&c| is_ident(c))
            .collect()
    };
    let Some(group) = text.strip_prefix('{') else {
        return vec![head(text)];
    };
    let (mut depth, mut names, mut item_start) = (0usize, Vec::new(), 0);
    for (i, c) in group.char_indices() {
        match c {
            '{' => depth += 1,
            '}' if depth == 0 => {
                names.push(head(&group[item_start..i]));
                break;
            }
            '}' => depth -= 1,
            ',' if depth == 0 => {
                names.push(head(&group[item_start..i]));
                item_start = i + 1;
            }
            _ => {}
        }
    }
    names.retain(|n| !n.is_empty());
    names
}

#[cfg(test)]
mod tests {
    use super::scan;
    use crate::shape::strip::blank;

    #[test]
    fn functions_are_measured_from_fn_to_closing_brace_and_tests_are_set_aside() {
        let src = "use crate::{a, b::c};\nfn one() {\n    let s = \"}\";\n}\n\
                   trait T {\n    fn declared(&self) -> [u8; 2];\n}\n\
                   fn two<const N: usize>(x: [u8; N]) -> u8 { x[0] }\n\
                   #[cfg(test)]\nmod tests {\n    fn helper() {}\n    use crate::d;\n}\n\
                   #[cfg(test)]\nmod more;\nfn three() {\n}\n";
        let s = scan(&blank(src), 1);
        let fns: Vec<(usize, usize, &str)> = (s.functions.iter())
            .map(|(line, n, name)| (*line, *n, name.as_str()))
            .collect();
        assert_eq!(fns, [(2, 3, "one"), (8, 1, "two"), (16, 2, "three")]);
        // 17 lines, of which 5 (the test module) and 2 (`mod more;` with its attribute) are tests.
        assert_eq!(s.code_lines, 10);
        assert_eq!(s.crate_names, ["a", "b"]);
        assert_eq!(s.test_file_modules, ["more"]);
    }

    #[test]
    fn super_counts_only_when_it_climbs_to_the_crate_root() {
        let src =
            "use super::x;\nuse super::super::{y, z};\nfn f() { super::super::super::w(); }\n";
        assert_eq!(scan(&blank(src), 1).crate_names, ["x"]);
        assert_eq!(scan(&blank(src), 2).crate_names, ["y", "z"]);
        assert_eq!(scan(&blank(src), 3).crate_names, ["w"]);
    }
}
