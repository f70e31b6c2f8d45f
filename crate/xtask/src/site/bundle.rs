//! The page's ES modules as one module script, for the single file: each module becomes
//! `const __m_x = await (async () => { ...; return { exports } })();` in import order, so their
//! top-level names never meet. Imports must be one-line `import { a } from "./x.js";`.

use std::collections::{BTreeMap, HashSet};

/// One import line: `import { a, b } from "./x.js";` -> (["a", "b"], "x.js").
fn parse_import(line: &str) -> Option<(Vec<String>, String)> {
    let rest = line.strip_prefix("import {")?;
    let (names, from) = rest.split_once('}')?;
    let from = from.trim().strip_prefix("from")?.trim();
    let file = from
        .trim_end_matches(';')
        .trim_matches(|c| c == '"' || c == '\'')
        .trim_start_matches("./");
    let names = names
        .split(',')
        .map(|n| n.trim().to_string())
        .filter(|n| !n.is_empty());
    Some((names.collect(), file.to_string()))
}

/// Exported names of `export function|class|const|let|async function NAME`.
fn exported_name(line: &str) -> Option<String> {
    let rest = line.strip_prefix("export ")?;
    let rest = rest.strip_prefix("async ").unwrap_or(rest);
    let rest = ["function ", "class ", "const ", "let "]
        .iter()
        .find_map(|k| rest.strip_prefix(k))?;
    let name: String = rest
        .chars()
        .take_while(|c| c.is_alphanumeric() || *c == '_' || *c == '$')
        .collect();
    (!name.is_empty()).then_some(name)
}

/// Depth-first over the imports from `name`: every module after the modules it imports.
fn visit(
    name: &str,
    modules: &BTreeMap<String, String>,
    seen: &mut HashSet<String>,
    order: &mut Vec<String>,
) -> Result<(), String> {
    if !seen.insert(name.to_string()) {
        return Ok(());
    }
    let text = modules
        .get(name)
        .ok_or_else(|| format!("web/js/{name} is imported but missing"))?;
    for line in text.lines() {
        if let Some((_, dep)) = parse_import(line) {
            visit(&dep, modules, seen, order)?;
        } else if line.starts_with("import ") {
            return Err(format!(
                "web/js/{name}: write imports as `import {{ a, b }} from \"./x.js\";` on one line: {line}"
            ));
        }
    }
    order.push(name.to_string());
    Ok(())
}

fn var(file: &str) -> String {
    format!("__m_{}", file.trim_end_matches(".js").replace('-', "_"))
}

/// One module wrapped: its imports read from the modules before it, its exports returned.
fn wrap(name: &str, text: &str) -> String {
    let mut exports = Vec::new();
    let mut body = String::new();
    for line in text.lines() {
        if let Some((names, dep)) = parse_import(line) {
            body.push_str(&format!(
                "const {{ {} }} = {};\n",
                names.join(", "),
                var(&dep)
            ));
        } else if let Some(export) = exported_name(line) {
            exports.push(export);
            body.push_str(line.trim_start_matches("export "));
            body.push('\n');
        } else {
            body.push_str(line);
            body.push('\n');
        }
    }
    format!(
        "// web/js/{name}\nconst {} = await (async () => {{\n{body}return {{ {} }};\n}})();\n",
        var(name),
        exports.join(", ")
    )
}

/// The modules reachable from `entry`, wrapped, in import order.
pub(super) fn bundle_modules(
    modules: &BTreeMap<String, String>,
    entry: &str,
) -> Result<String, String> {
    let mut order = Vec::new();
    visit(entry, modules, &mut HashSet::new(), &mut order)?;
    Ok(order
        .iter()
        .map(|name| wrap(name, &modules[name]))
        .collect())
}
