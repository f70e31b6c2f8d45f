//! `cargo xtask site`: the browser app's two builds.
//!
//! - `demo-site/`: `web/` as it is plus the core compiled to wasm (wasm-bindgen `no-modules`
//!   output, so one classic worker script serves both builds), next to the bundled demo.
//! - `demo-site/throughline-offline.html`: one self-contained file (styles, modules, worker, wasm and
//!   the demo embedded) that works opened from disk with no server and no network ([`offline`]).
//!
//! The page's source stays plain ES modules with no build step; the single file is made by wrapping
//! each module in a function that returns its exports, in import order ([`bundle`]).

use std::collections::BTreeMap;
use std::fs;
use std::path::{Path, PathBuf};

use crate::builds::build_wasm;
use crate::paths::{adapter_wasm, root, target};
use crate::sh::run_in;

mod bundle;
mod offline;

/// The served site's policy: its own files only; wasm may be compiled; footage plays from blob URLs.
pub const SITE_CSP: &str =
    "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; style-src 'self'; \
img-src 'self' blob: data:; media-src 'self' blob:; worker-src 'self'; connect-src 'self'; \
object-src 'none'; base-uri 'none'; form-action 'none'";

pub const SITE_DIR: &str = "demo-site";
pub const OFFLINE_FILE: &str = "throughline-offline.html";

/// What the two builds are made of: the page's files as text and the adapter from wasm-bindgen.
struct Parts {
    index: String,
    css: String,
    /// `web/worker.js` then `web/decoding.js`: one classic worker script.
    worker: String,
    /// web/js/*.js by file name.
    modules: BTreeMap<String, String>,
    /// wasm-bindgen's `no-modules` glue and the wasm it loads.
    glue: String,
    wasm: Vec<u8>,
}

/// Builds both forms of the app into demo-site/.
pub fn build() -> Result<(), String> {
    let parts = read_parts(&bind_adapter()?)?;
    let site = root().join(SITE_DIR);
    write(
        &site.join("index.html"),
        parts.index.replace("{{CSP}}", SITE_CSP).as_bytes(),
    )?;
    write(&site.join("style.css"), parts.css.as_bytes())?;
    write(&site.join("worker.js"), parts.worker.as_bytes())?;
    // The modules are built afresh, so a module removed from web/js/ is not served any more.
    let js = site.join("js");
    if js.exists() {
        fs::remove_dir_all(&js).map_err(|e| format!("{}: {e}", js.display()))?;
    }
    for (name, text) in &parts.modules {
        write(&site.join("js").join(name), text.as_bytes())?;
    }
    write(&site.join("pkg/throughline_wasm.js"), parts.glue.as_bytes())?;
    write(&site.join("pkg/throughline_wasm_bg.wasm"), &parts.wasm)?;
    let single = offline::single_file(&parts, &site.join("demo"))?;
    write(&site.join(OFFLINE_FILE), single.as_bytes())?;
    eprintln!(
        "site built in {SITE_DIR}/ ({} KB of wasm); single file {SITE_DIR}/{OFFLINE_FILE} ({} KB)",
        parts.wasm.len() / 1024,
        single.len() / 1024
    );
    Ok(())
}

/// The built site and the npm packages that drive Chromium (tests/browser/package-lock.json).
pub fn build_with_browser_driver() -> Result<(), String> {
    build()?;
    run_in(
        "tests/browser",
        "npm",
        &["ci", "--no-audit", "--no-fund"],
        &[],
    )
}

/// The adapter built for wasm32 and through wasm-bindgen (`no-modules`); returns the folder of
/// wasm-bindgen's output.
fn bind_adapter() -> Result<PathBuf, String> {
    build_wasm()?;
    let pkg = target("site-pkg")?;
    let (out, wasm) = (pkg.display().to_string(), adapter_wasm()?);
    let args = ["--target", "no-modules", "--no-typescript", "--out-dir"];
    run_in(
        ".",
        "wasm-bindgen",
        &[&args[..], &[&out, &wasm]].concat(),
        &[],
    )?;
    Ok(pkg)
}

fn read_parts(pkg: &Path) -> Result<Parts, String> {
    let web = root().join("web");
    let mut modules = BTreeMap::new();
    for entry in fs::read_dir(web.join("js")).map_err(|e| format!("web/js: {e}"))? {
        let path = entry.map_err(|e| e.to_string())?.path();
        if path.extension().is_some_and(|x| x == "js") {
            let name = path.file_name().unwrap_or_default().to_string_lossy();
            modules.insert(name.into_owned(), read(&path)?);
        }
    }
    let wasm_path = pkg.join("throughline_wasm_bg.wasm");
    Ok(Parts {
        index: read(&web.join("index.html"))?,
        css: read(&web.join("style.css"))?,
        // Two classic scripts of one worker, written as one (the single file needs one script).
        worker: format!(
            "{}\n{}",
            read(&web.join("worker.js"))?,
            read(&web.join("decoding.js"))?
        ),
        modules,
        glue: read(&pkg.join("throughline_wasm.js"))?,
        wasm: fs::read(&wasm_path).map_err(|e| format!("{}: {e}", wasm_path.display()))?,
    })
}

fn read(p: &Path) -> Result<String, String> {
    fs::read_to_string(p).map_err(|e| format!("{}: {e}", p.display()))
}

fn write(p: &Path, bytes: &[u8]) -> Result<(), String> {
    if let Some(dir) = p.parent() {
        fs::create_dir_all(dir).map_err(|e| format!("{}: {e}", dir.display()))?;
    }
    fs::write(p, bytes).map_err(|e| format!("{}: {e}", p.display()))
}
