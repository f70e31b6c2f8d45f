//! The hand-in outputs `run` writes next to the report when a site is named: the interval grid
//! (wide and long), the movement matrix and the client summary, named from the site and date.

use crate::files::{bad_input, file_name, read_binary, Failure};
use std::path::{Path, PathBuf};
use throughline_core::fingerprint::{Fingerprint, HEAD_BYTES};
use throughline_core::handin::{self, Context, GridLayout, Separator};
use throughline_core::limits::MAX_STILL_BYTES;
use throughline_core::project::Project;
use throughline_core::report::Report;

/// A file's fingerprint, reading only its first MiB.
pub fn fingerprint(path: &Path) -> Result<Fingerprint, Failure> {
    use std::io::Read;
    let file = std::fs::File::open(path)
        .map_err(|e| bad_input(path, format!("cannot read the file: {e}")))?;
    let size = file.metadata().map(|m| m.len()).unwrap_or(0);
    let mut head = Vec::new();
    file.take(HEAD_BYTES as u64)
        .read_to_end(&mut head)
        .map_err(|e| bad_input(path, format!("cannot read the file: {e}")))?;
    Ok(Fingerprint::of(&file_name(path), size, &head, None))
}

/// What the outputs say about the inputs: the site, the plan's and detections' files, the footage
/// (from `--footage`, else as the project recorded it) and a still (`--still`, a PNG or JPEG).
pub struct Inputs<'a> {
    pub site: Option<&'a str>,
    pub plan: &'a Path,
    pub detections: Option<&'a Path>,
    pub footage: Option<&'a Path>,
    pub still: Option<&'a Path>,
    pub project: Option<(&'a Path, &'a Project)>,
    /// The boxes were found in the footage (no detections file), with these detector settings.
    pub found_with: Option<Option<&'a Path>>,
}

pub fn context(inputs: &Inputs) -> Result<Context, Failure> {
    let project = inputs.project.map(|(_, p)| p);
    let footage = match inputs.footage {
        Some(p) => Some(fingerprint(p)?),
        None => project.and_then(|p| p.footage.clone()),
    };
    let detections = inputs.detections.map(fingerprint).transpose()?;
    if let (Some(recorded), Some(opened)) =
        (project.and_then(|p| p.detections.as_ref()), &detections)
    {
        if let Some(why) = recorded.differs(opened) {
            crate::warnings::warn(why);
        }
    }
    let still_bytes = inputs
        .still
        .map(|p| read_binary(p, MAX_STILL_BYTES))
        .transpose()?;
    let still = match (inputs.still, &still_bytes) {
        (Some(path), Some(bytes)) => Some(still_url(path, bytes)?),
        _ => None,
    };
    Ok(Context {
        site: inputs
            .site
            .map(str::to_string)
            .or_else(|| project.and_then(|p| p.site.clone())),
        plan_name: Some(file_name(inputs.plan)),
        footage,
        detections,
        still,
        project_name: inputs.project.map(|(path, _)| file_name(path)),
        still_size: still_bytes.as_deref().and_then(handin::picture_size),
        found_in_footage: inputs.found_with.is_some(),
        found_in_page: false,
        detector_settings: inputs.found_with.flatten().map(file_name),
        warnings: crate::warnings::kept(),
    })
}

/// An image file as a `data:` URL.
fn still_url(path: &Path, bytes: &[u8]) -> Result<String, Failure> {
    let kind = if bytes.starts_with(b"\x89PNG") {
        "image/png"
    } else if bytes.starts_with(&[0xFF, 0xD8]) {
        "image/jpeg"
    } else {
        return Err(bad_input(path, "the still must be a PNG or JPEG picture"));
    };
    use base64::Engine as _;
    let encoded = base64::engine::general_purpose::STANDARD.encode(bytes);
    Ok(format!("data:{kind};base64,{encoded}"))
}

/// The four outputs and where they go in `dir`.
pub fn planned(report: &Report, ctx: &Context, dir: &Path) -> Vec<(PathBuf, String)> {
    let stem = handin::file_stem(report, ctx);
    let grid = |layout| handin::interval_grid(report, ctx, layout, Separator::Comma);
    vec![
        (dir.join(format!("{stem}_grid.csv")), grid(GridLayout::Wide)),
        (
            dir.join(format!("{stem}_grid-long.csv")),
            grid(GridLayout::Long),
        ),
        (
            dir.join(format!("{stem}_movements.csv")),
            handin::movement_matrix(report, ctx, Separator::Comma),
        ),
        (
            dir.join(format!("{stem}_summary.html")),
            handin::summary_html(report, ctx),
        ),
    ]
}
