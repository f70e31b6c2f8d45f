//! The single file `throughline-offline.html`: styles inline, the page's modules bundled into one
//! module script, the worker (wasm-bindgen glue + `worker.js`) and the wasm and the demo as base64
//! in data blocks. Its CSP names the script and the style by SHA-256 and allows no connection.

use base64::Engine as _;
use sha2::{Digest, Sha256};
use std::fs;
use std::path::Path;

use super::{bundle::bundle_modules, Parts};

/// The demo files embedded when all of them are there (the page opens on them).
const DEMO_FILES: [&str; 3] = ["footage.webm", "detections.csv", "plan.json"];

/// The single file's HTML, from the built parts and the demo folder.
pub(super) fn single_file(parts: &Parts, demo: &Path) -> Result<String, String> {
    let bundle = bundle_modules(&parts.modules, "app.js")?;
    let worker = format!("{}\n{}", parts.glue, parts.worker);
    let css = &parts.css;
    for (what, text) in [("bundle", &bundle), ("worker", &worker), ("styles", css)] {
        if text.to_ascii_lowercase().contains("</script") || text.contains("</style") {
            return Err(format!(
                "the {what} holds a closing tag and cannot be inlined; split it in the source"
            ));
        }
    }
    let embedded = embedded(&parts.wasm, demo)?;
    let single = parts
        .index
        .replace("{{CSP}}", &csp(&bundle, css))
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
            "web/index.html changed: update the single-file build in xtask/src/site/offline.rs"
                .into(),
        );
    }
    Ok(single)
}

fn b64(bytes: &[u8]) -> String {
    base64::engine::general_purpose::STANDARD.encode(bytes)
}

/// The data block: `{"wasm": base64, "demo": {file: base64}}` (no `demo` when a file is missing).
fn embedded(wasm: &[u8], demo: &Path) -> Result<serde_json::Value, String> {
    let mut embedded = serde_json::json!({ "wasm": b64(wasm) });
    if DEMO_FILES.iter().all(|f| demo.join(f).exists()) {
        let mut files = serde_json::Map::new();
        for f in DEMO_FILES {
            let path = demo.join(f);
            let bytes = fs::read(&path).map_err(|e| format!("{}: {e}", path.display()))?;
            files.insert(f.to_string(), b64(&bytes).into());
        }
        embedded["demo"] = files.into();
    }
    Ok(embedded)
}

/// The single file's policy: the one module script and the one style by hash, nothing fetched.
fn csp(bundle: &str, css: &str) -> String {
    let hash = |text: &str| b64(&Sha256::digest(text.as_bytes()));
    format!(
        "default-src 'none'; script-src 'sha256-{}' 'wasm-unsafe-eval'; style-src 'sha256-{}'; \
         img-src blob: data:; media-src blob:; worker-src blob:; connect-src 'none'; \
         object-src 'none'; base-uri 'none'; form-action 'none'",
        hash(bundle),
        hash(css)
    )
}
