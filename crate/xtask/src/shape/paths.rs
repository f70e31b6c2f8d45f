//! The module paths a file names, at every depth: `crate::a::b::C`, `crate::{a, b::{c, d}}` and
//! `super::super::x::Y`, for the module-loop check below the top level (`deep`). Works on source
//! blanked by [`super::strip::blank`].

/// A path as written: how many `super`s start it (`None` for `crate::`), then its names.
pub type Named = (Option<usize>, Vec<String>);

/// Every `crate::` or `super::` path in a line, each `{…}` group opened into one path per item.
pub fn named(line: &str) -> Vec<Named> {
    let mut out = Vec::new();
    for (start, _) in line
        .match_indices("crate::")
        .chain(line.match_indices("super::"))
    {
        let before = line[..start].chars().next_back();
        if before.is_some_and(|c| c.is_alphanumeric() || c == '_' || c == ':') {
            continue; // part of a longer name, or a `super::` after another `super::`
        }
        let mut rest = &line[start..];
        let climbs = if let Some(r) = rest.strip_prefix("crate::") {
            rest = r;
            None
        } else {
            let mut n = 0;
            while let Some(r) = rest.strip_prefix("super::") {
                rest = r;
                n += 1;
            }
            Some(n)
        };
        for names in expand(rest, 0) {
            out.push((climbs, names));
        }
    }
    out
}

/// The paths a path's tail names: `a::b::C` one, `a::{b, c::D}` two (`self` in a group is the
/// group's own path). Groups nested deeper than a few levels are read as their prefix.
fn expand(text: &str, depth: usize) -> Vec<Vec<String>> {
    let mut names = Vec::new();
    let mut rest = text.trim_start();
    loop {
        let name: String = rest
            .chars()
            .take_while(|c| c.is_alphanumeric() || *c == '_')
            .collect();
        if name.is_empty() {
            break;
        }
        rest = &rest[name.len()..];
        if name != "self" {
            names.push(name);
        }
        match rest.strip_prefix("::") {
            Some(r) => rest = r.trim_start(),
            None => return vec![names],
        }
    }
    let Some(group) = rest.strip_prefix('{').filter(|_| depth < 4) else {
        return vec![names];
    };
    group_items(group)
        .into_iter()
        .flat_map(|item| expand(item, depth + 1))
        .map(|tail| names.iter().cloned().chain(tail).collect())
        .collect()
}

/// The items of a `{…}` group (the text after its `{`), split at its own commas.
fn group_items(group: &str) -> Vec<&str> {
    let (mut depth, mut items, mut start) = (0usize, Vec::new(), 0);
    for (i, c) in group.char_indices() {
        match c {
            '{' => depth += 1,
            '}' if depth == 0 => {
                items.push(&group[start..i]);
                break;
            }
            '}' => depth -= 1,
            ',' if depth == 0 => {
                items.push(&group[start..i]);
                start = i + 1;
            }
            _ => {}
        }
    }
    items.retain(|t| !t.trim().is_empty());
    items
}

#[cfg(test)]
mod tests {
    use super::named;

    fn strings(v: &[&str]) -> Vec<String> {
        v.iter().map(|s| s.to_string()).collect()
    }

    #[test]
    fn paths_are_read_whole_with_their_groups_opened() {
        assert_eq!(
            named("use crate::a::b::{C, d::{E, self}};"),
            vec![
                (None, strings(&["a", "b", "C"])),
                (None, strings(&["a", "b", "d", "E"])),
                (None, strings(&["a", "b", "d"])),
            ]
        );
        assert_eq!(
            named("let x = super::super::m::f(y); z::crate::q;"),
            vec![(Some(2), strings(&["m", "f"]))]
        );
        assert_eq!(named("use super::{tracker::Step, TrackerConfig};").len(), 2);
    }
}
