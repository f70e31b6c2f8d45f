//! The hand-in outputs in the page, written by the core from the session's report: the interval
//! grid (CSV or tab-separated for the clipboard, wide or long), the movement matrix, the client
//! summary and their file names. The context is a plain object: `{site?, plan_name?, footage?,
//! detections?, still?, project_name?, notes?}` (fingerprints as `fingerprint` gives them; `still` a
//! `data:image/...` URL; `notes` the warnings about the inputs, as [`InputNote`]s).

use crate::{js_error, Session};
use throughline_core::handin::{self, Context, GridLayout, InputNote, Separator};
use wasm_bindgen::prelude::*;

/// The context as the page gives it: the warnings about its inputs as facts or sentences
/// (`notes`), which the core puts into the command line's words.
#[derive(serde::Deserialize)]
struct PageContext {
    #[serde(flatten)]
    context: Context,
    #[serde(default)]
    notes: Vec<InputNote>,
}

fn context(value: JsValue) -> Result<Context, JsError> {
    if value.is_undefined() || value.is_null() {
        return Ok(Context::default());
    }
    let page: PageContext = serde_wasm_bindgen::from_value(value).map_err(js_error)?;
    let mut ctx = page.context;
    ctx.warnings = page.notes.iter().filter_map(InputNote::words).collect();
    Ok(ctx)
}

fn separator(name: &str) -> Result<Separator, JsError> {
    match name {
        "comma" => Ok(Separator::Comma),
        "tab" => Ok(Separator::Tab),
        other => Err(js_error(format!(
            "unknown separator `{other}`: comma or tab"
        ))),
    }
}

#[wasm_bindgen]
impl Session {
    /// The interval grid: `layout` "wide" (a row per interval) or "long" (a row per interval, line,
    /// direction and class); `separator` "comma" (CSV) or "tab" (for the clipboard).
    #[wasm_bindgen(js_name = intervalGrid)]
    pub fn interval_grid(
        &self,
        layout: &str,
        separator_name: &str,
        ctx: JsValue,
    ) -> Result<String, JsError> {
        let layout = match layout {
            "wide" => GridLayout::Wide,
            "long" => GridLayout::Long,
            other => return Err(js_error(format!("unknown layout `{other}`: wide or long"))),
        };
        Ok(handin::interval_grid(
            self.ready()?,
            &context(ctx)?,
            layout,
            separator(separator_name)?,
        ))
    }

    /// The origin–destination matrix of movements.
    #[wasm_bindgen(js_name = movementMatrix)]
    pub fn movement_matrix(&self, separator_name: &str, ctx: JsValue) -> Result<String, JsError> {
        Ok(handin::movement_matrix(
            self.ready()?,
            &context(ctx)?,
            separator(separator_name)?,
        ))
    }

    /// The client summary, a self-contained printable HTML page.
    #[wasm_bindgen(js_name = summaryHtml)]
    pub fn summary_html(&self, ctx: JsValue) -> Result<String, JsError> {
        Ok(handin::summary_html(self.ready()?, &context(ctx)?))
    }

    /// The stem of the hand-in files' names: site and date, like `footbridge-plaza_2026-03-02`.
    #[wasm_bindgen(js_name = fileStem)]
    pub fn file_stem(&self, ctx: JsValue) -> Result<String, JsError> {
        Ok(handin::file_stem(self.ready()?, &context(ctx)?))
    }
}

/// The interval grid of a merged counts file (`throughline batch`'s SITE_merged-counts.csv) for one
/// camera (the first when empty or unknown) and class (all classes summed when empty): `{site,
/// cameras, classes, camera, class, columns: [{screenline, direction}], rows: [{start, end,
/// partial, counts, total}]}`.
#[wasm_bindgen(js_name = mergedGrid)]
pub fn merged_grid(bytes: &[u8], camera: &str, class: &str) -> Result<JsValue, JsError> {
    let merged = throughline_core::report::read_merged_counts(bytes).map_err(js_error)?;
    crate::to_js(&merged.grid(camera, class))
}
