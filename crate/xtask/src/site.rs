//! The browser app's builds and a local server for them.
//!
//! - `demo-site/`: `web/` as it is plus the core compiled to wasm (wasm-bindgen `no-modules`
//!   output, so one classic worker script serves both builds), next to the bundled demo.
//! - `demo-site/throughline-offline.html`: one self-contained file (styles, modules, worker, wasm and
//!   the demo embedded) that works opened from disk with no server and no network.
//!
//! The page's source stays plain ES modules with no build step; the single file is made by wrapping
//! each module in a function that returns its exports, in import order.

use base64::Engine as _;
use sha2::{Digest, Sha256};
use std::collections::{BTreeMap, HashSet};
use std::fs;
use std::io::{BufRead, BufReader, Write};
use std::net::{TcpListener, TcpStream};
use std::path::{Path, PathBuf};

use crate::{build_wasm, root, run};

/// The served site's policy: its own files only; wasm may be compiled; footage plays from blob URLs.
const SITE_CSP: &str =
    "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; style-src 'self'; \
img-src 'self' blob: data:; media-src 'self' blob:; worker-src 'self'; connect-src 'self'; \
object-src 'none'; base-uri 'none'; form-action 'none'";

pub const SITE_DIR: &str = "demo-site";
pub const OFFLINE_FILE: &str = "throughline-offline.html";

/// Builds both forms of the app into demo-site/.
pub fn build() -> Result<(), String> {
    build_wasm()?;
    run(
        "wasm-bindgen",
        &[
            "--target",
            "no-modules",
            "--no-typescript",
            "--out-dir",
            "target/site-pkg",
            "target/wasm32-unknown-unknown/release/throughline_wasm.wasm",
        ],
    )?;
    let root = root();
    let web = root.join("web");
    let site = root.join(SITE_DIR);
    let read = |p: &Path| fs::read_to_string(p).map_err(|e| format!("{}: {e}", p.display()));
    let write = |p: &Path, bytes: &[u8]| {
        if let Some(dir) = p.parent() {
            fs::create_dir_all(dir).map_err(|e| format!("{}: {e}", dir.display()))?;
        }
        fs::write(p, bytes).map_err(|e| format!("{}: {e}", p.display()))
    };

    let index = read(&web.join("index.html"))?;
    write(
        &site.join("index.html"),
        index.replace("{{CSP}}", SITE_CSP).as_bytes(),
    )?;
    for name in ["style.css", "worker.js"] {
        write(&site.join(name), read(&web.join(name))?.as_bytes())?;
    }
    let mut modules = BTreeMap::new();
    for entry in fs::read_dir(web.join("js")).map_err(|e| format!("web/js: {e}"))? {
        let path = entry.map_err(|e| e.to_string())?.path();
        if path.extension().is_some_and(|x| x == "js") {
            let name = path
                .file_name()
                .unwrap_or_default()
                .to_string_lossy()
                .into_owned();
            let text = read(&path)?;
            write(&site.join("js").join(&name), text.as_bytes())?;
            modules.insert(name, text);
        }
    }
    let pkg = root.join("target/site-pkg");
    let glue = read(&pkg.join("throughline_wasm.js"))?;
    let wasm = fs::read(pkg.join("throughline_wasm_bg.wasm")).map_err(|e| e.to_string())?;
    write(&site.join("pkg/throughline_wasm.js"), glue.as_bytes())?;
    write(&site.join("pkg/throughline_wasm_bg.wasm"), &wasm)?;

    // The single file.
    let bundle = bundle_modules(&modules, "app.js")?;
    let css = read(&web.join("style.css"))?;
    let worker = format!("{glue}\n{}", read(&web.join("worker.js"))?);
    let b64 = |bytes: &[u8]| base64::engine::general_purpose::STANDARD.encode(bytes);
    let demo = root.join(SITE_DIR).join("demo");
    let mut embedded = serde_json::json!({ "wasm": b64(&wasm) });
    let demo_files = ["footage.webm", "detections.csv", "plan.json"];
    if demo_files.iter().all(|f| demo.join(f).exists()) {
        let mut files = serde_json::Map::new();
        for f in demo_files {
            let bytes = fs::read(demo.join(f)).map_err(|e| e.to_string())?;
            files.insert(f.to_string(), b64(&bytes).into());
        }
        embedded["demo"] = files.into();
    }
    for (what, text) in [("bundle", &bundle), ("worker", &worker), ("styles", &css)] {
        if text.to_ascii_lowercase().contains("</script") || text.contains("</style") {
            return Err(format!(
                "the {what} holds a closing tag and cannot be inlined; split it in the source"
            ));
        }
    }
    let hash = |text: &str| b64(&Sha256::digest(text.as_bytes()));
    let csp = format!(
        "default-src 'none'; script-src 'sha256-{}' 'wasm-unsafe-eval'; style-src 'sha256-{}'; \
         img-src blob: data:; media-src blob:; worker-src blob:; connect-src 'none'; \
         object-src 'none'; base-uri 'none'; form-action 'none'",
        hash(&bundle),
        hash(&css)
    );
    let single = index
        .replace("{{CSP}}", &csp)
        .replace(
            r#"<link rel="stylesheet" href="style.css">"#,
            &format!("<style>{css}</style>"),
        )
        .replace(
            r#"<script type="module" src="js/app.js"></script>"#,
            &format!(
                "<script type=\"application/json\" id=\"tl-embedded\">{embedded}</script>\n\
                 <script type=\"text/plain\" id=\"tl-worker\">{worker}</script>\n\
                 <script type=\"module\">{bundle}</script>"
            ),
        );
    if single.contains("src=\"js/app.js\"") || single.contains("href=\"style.css\"") {
        return Err(
            "web/index.html changed: update the single-file build in xtask/src/site.rs".into(),
        );
    }
    write(&site.join(OFFLINE_FILE), single.as_bytes())?;
    eprintln!(
        "site built in {SITE_DIR}/ ({} KB of wasm); single file {SITE_DIR}/{OFFLINE_FILE} ({} KB)",
        wasm.len() / 1024,
        single.len() / 1024
    );
    Ok(())
}

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

/// The page's modules as one module script: each becomes `const __m_x = await (async () => { ...;
/// return { exports } })();` in import order, so their top-level names never meet.
fn bundle_modules(modules: &BTreeMap<String, String>, entry: &str) -> Result<String, String> {
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
    let mut order = Vec::new();
    visit(entry, modules, &mut HashSet::new(), &mut order)?;
    let var = |file: &str| format!("__m_{}", file.trim_end_matches(".js").replace('-', "_"));
    let mut out = String::new();
    for name in &order {
        let mut exports = Vec::new();
        let mut body = String::new();
        for line in modules[name].lines() {
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
        out.push_str(&format!(
            "// web/js/{name}\nconst {} = await (async () => {{\n{body}return {{ {} }};\n}})();\n",
            var(name),
            exports.join(", ")
        ));
    }
    Ok(out)
}

fn content_type(path: &Path) -> &'static str {
    match path.extension().and_then(|x| x.to_str()).unwrap_or("") {
        "html" => "text/html; charset=utf-8",
        "js" | "mjs" => "text/javascript; charset=utf-8",
        "css" => "text/css; charset=utf-8",
        "json" => "application/json",
        "wasm" => "application/wasm",
        "webm" => "video/webm",
        "mp4" => "video/mp4",
        "csv" => "text/csv; charset=utf-8",
        "txt" => "text/plain; charset=utf-8",
        "png" => "image/png",
        _ => "application/octet-stream",
    }
}

/// Serves demo-site/ on 127.0.0.1 until stopped (Ctrl-C). Only GET and HEAD; nothing is written.
pub fn serve(port: u16) -> Result<(), String> {
    let dir = root().join(SITE_DIR);
    let listener = (port..port.saturating_add(20))
        .find_map(|p| TcpListener::bind(("127.0.0.1", p)).ok())
        .ok_or_else(|| {
            format!(
                "no free port on 127.0.0.1 from {port} to {}",
                port.saturating_add(19)
            )
        })?;
    let addr = listener.local_addr().map_err(|e| e.to_string())?;
    println!("\nThe browser app is served at  http://{addr}/");
    println!(
        "Open it in a browser on this computer; the demo opens by itself. Ctrl-C stops the server."
    );
    println!(
        "For a client's site without a server: {}/{SITE_DIR}/{OFFLINE_FILE} works opened from disk.",
        root().display()
    );
    for stream in listener.incoming().flatten() {
        let dir = dir.clone();
        std::thread::spawn(move || {
            let _ = answer(stream, &dir);
        });
    }
    Ok(())
}

fn answer(mut stream: TcpStream, dir: &Path) -> std::io::Result<()> {
    let mut reader = BufReader::new(stream.try_clone()?);
    let mut request = String::new();
    reader.read_line(&mut request)?;
    // Skip the headers.
    let mut line = String::new();
    while reader.read_line(&mut line)? > 2 {
        line.clear();
    }
    let mut parts = request.split_whitespace();
    let method = parts.next().unwrap_or("");
    let target = parts.next().unwrap_or("/");
    let path = target.split(['?', '#']).next().unwrap_or("/");
    let path = percent_decode(path);
    let mut file: PathBuf = dir.to_path_buf();
    for part in path.split('/').filter(|p| !p.is_empty()) {
        if part == ".." || part.contains('\\') {
            return respond(
                &mut stream,
                "400 Bad Request",
                "text/plain",
                b"bad path",
                true,
            );
        }
        file.push(part);
    }
    if file.is_dir() {
        file.push("index.html");
    }
    if method != "GET" && method != "HEAD" {
        return respond(
            &mut stream,
            "405 Method Not Allowed",
            "text/plain",
            b"read only",
            true,
        );
    }
    match fs::read(&file) {
        Ok(bytes) => respond(
            &mut stream,
            "200 OK",
            content_type(&file),
            &bytes,
            method == "GET",
        ),
        Err(_) => respond(
            &mut stream,
            "404 Not Found",
            "text/plain",
            b"not found",
            true,
        ),
    }
}

fn respond(
    stream: &mut TcpStream,
    status: &str,
    kind: &str,
    body: &[u8],
    with_body: bool,
) -> std::io::Result<()> {
    write!(
        stream,
        "HTTP/1.1 {status}\r\nContent-Type: {kind}\r\nContent-Length: {}\r\n\
         Content-Security-Policy: {SITE_CSP}\r\nCache-Control: no-store\r\nConnection: close\r\n\r\n",
        body.len()
    )?;
    if with_body {
        stream.write_all(body)?;
    }
    stream.flush()
}

fn percent_decode(s: &str) -> String {
    let bytes = s.as_bytes();
    let mut out = Vec::with_capacity(bytes.len());
    let mut i = 0;
    while i < bytes.len() {
        if bytes[i] == b'%' && i + 2 < bytes.len() {
            if let Ok(v) = u8::from_str_radix(&s[i + 1..i + 3], 16) {
                out.push(v);
                i += 3;
                continue;
            }
        }
        out.push(bytes[i]);
        i += 1;
    }
    String::from_utf8_lossy(&out).into_owned()
}
