//! What a person hands in, made from a report: the interval grid (`grid`), the origin–destination
//! matrix of movements (`matrix`) and a client summary (`summary`, a printable page). Each is a
//! pure function of the report and a [`Context`] (the site, the input files), so the page and the
//! command line write the same bytes. File names come from the site's name and the recording's
//! date ([`file_stem`]).

mod grid;
mod matrix;
mod said;
mod sketch;
mod summary;
mod table;
mod zone_grid;

pub use grid::{interval_grid, GridLayout};
pub use matrix::movement_matrix;
pub use said::{frame_rate_warning, past_footage_warning, InputNote};
pub use summary::summary_html;
pub use table::Separator;
pub use zone_grid::ZONES_TITLE;

use crate::edits::EditList;
use crate::fingerprint::{sha256_hex, Fingerprint};
use crate::report::Report;

/// What the hand-in outputs say about where the counts come from.
#[derive(Debug, Clone, Default, PartialEq, serde::Deserialize)]
#[serde(default)]
pub struct Context {
    /// The site's name, as the person typed it.
    pub site: Option<String>,
    /// The plan's file name (no folder), when it came from a file.
    pub plan_name: Option<String>,
    pub footage: Option<Fingerprint>,
    pub detections: Option<Fingerprint>,
    /// A still of the footage as a `data:image/...` URL, for the summary.
    pub still: Option<String>,
    /// The project file's name, for the command line that reproduces the counts.
    pub project_name: Option<String>,
    /// The still's own size in pixels (its file's header says), when the footage's is not known.
    pub still_size: Option<(u32, u32)>,
    /// The boxes were found in the footage by the built-in detector (no detections file).
    pub found_in_footage: bool,
    /// … in the page, whose detector settings are no file: the command line needs the boxes as
    /// the page's Export detections saves them.
    pub found_in_page: bool,
    /// The detector settings file's name, when the boxes were found with one (command line).
    pub detector_settings: Option<String>,
    /// What was said about the inputs while counting (a camera that moved, frames missing, a
    /// frame rate other than the plan's…): each heads the grid and the summary, as a person
    /// signing the counts needs to know it.
    pub warnings: Vec<String>,
}

impl Context {
    /// The picture's size in pixels: the footage's fingerprint's, else the still's, when known.
    pub fn picture(&self) -> Option<(f64, f64)> {
        let from_footage = self
            .footage
            .as_ref()
            .and_then(|f| Some((f.width?, f.height?)));
        let (w, h) = from_footage.or(self.still_size)?;
        Some((f64::from(w), f64::from(h)))
    }
}

/// The size of a PNG or JPEG picture from its header (PNG: the IHDR chunk; JPEG: the first
/// start-of-frame segment), without decoding it. `None` for anything else.
pub fn picture_size(bytes: &[u8]) -> Option<(u32, u32)> {
    let be16 = |i: usize| Some(u16::from_be_bytes([*bytes.get(i)?, *bytes.get(i + 1)?]));
    let be32 = |i: usize| Some(u32::from_be_bytes(bytes.get(i..i + 4)?.try_into().ok()?));
    let size = if bytes.starts_with(b"\x89PNG\r\n\x1a\n") && bytes.get(12..16) == Some(b"IHDR") {
        (be32(16)?, be32(20)?)
    } else if bytes.starts_with(&[0xFF, 0xD8]) {
        // Segments: 0xFF, a marker, a 16-bit length (counting itself); each step moves on.
        let mut i = 2;
        loop {
            if *bytes.get(i)? != 0xFF {
                return None;
            }
            let marker = *bytes.get(i + 1)?;
            let length = usize::from(be16(i + 2)?);
            let start_of_frame =
                matches!(marker, 0xC0..=0xCF) && !matches!(marker, 0xC4 | 0xC8 | 0xCC);
            if start_of_frame {
                break (u32::from(be16(i + 7)?), u32::from(be16(i + 5)?));
            }
            if length < 2 {
                return None;
            }
            i += 2 + length;
        }
    } else {
        return None;
    };
    (size.0 > 0 && size.1 > 0).then_some(size)
}

/// A file name stem from the site and the recording's date: `footbridge-plaza_2026-03-02`
/// (lowercase letters, digits and dashes; `counts` without a site, `undated` without a start).
pub fn file_stem(report: &Report, ctx: &Context) -> String {
    let site = ctx.site.as_deref().map(slug).filter(|s| !s.is_empty());
    let date = report
        .plan
        .start
        .as_deref()
        .and_then(|s| s.get(..10))
        .filter(|d| d.bytes().all(|b| b.is_ascii_digit() || b == b'-'))
        .unwrap_or("undated");
    format!("{}_{date}", site.as_deref().unwrap_or("counts"))
}

/// Lowercase letters and digits (of any script: "Café Ünïcode" is `café-ünïcode`, not
/// `caf-n-code`), other runs of characters as one dash.
pub fn slug(text: &str) -> String {
    let mut out = String::new();
    for c in text.chars().flat_map(char::to_lowercase) {
        if c.is_alphanumeric() {
            out.push(c);
        } else if !out.ends_with('-') && !out.is_empty() {
            out.push('-');
        }
    }
    out.trim_end_matches('-').to_string()
}

/// SHA-256 of the inputs that the report writes itself (plan, tracker settings, edits), as compact
/// JSON, and of the files the context names: the first twelve hex digits of each, by name.
pub fn short_hashes(report: &Report, ctx: &Context) -> Vec<(&'static str, String)> {
    fn sha<T: serde::Serialize>(v: &T) -> String {
        sha256_hex(serde_json::to_string(v).unwrap_or_default().as_bytes())[..12].to_string()
    }
    let edits = EditList::new(report.edits.iter().map(|o| o.edit.clone()).collect());
    let mut out = Vec::new();
    if let Some(f) = &ctx.footage {
        out.push(("footage (first MiB)", f.short().to_string()));
    }
    if let Some(f) = &ctx.detections {
        out.push(("detections (first MiB)", f.short().to_string()));
    }
    out.push(("plan", sha(&report.plan)));
    out.push(("tracker settings", sha(&report.tracker)));
    out.push(("edits", sha(&edits)));
    out
}

/// The one command line that gives the same counts from the same files: with the footage named,
/// so the count reaches its end when the detections stop before it (as the page counted); boxes
/// the command line found in the footage found there again, with the same detector settings. It
/// writes into a folder `check` (its hand-in files have the names of those it reproduces), at the
/// report's start time (given on the command line, it is not in the plan's file).
pub fn command_line(report: &Report, ctx: &Context) -> String {
    let plan = &shell_word(ctx.plan_name.as_deref().unwrap_or("plan.json"));
    let mut cmd = match (&ctx.footage, found_again(ctx)) {
        (Some(f), true) => {
            let settings = ctx.detector_settings.as_ref().map_or(String::new(), |d| {
                format!(" --detector-config {}", shell_word(d))
            });
            let footage = shell_word(&f.name);
            format!("throughline run --footage {footage}{settings} --plan {plan}")
        }
        (footage, _) => {
            let detections = ctx
                .detections
                .as_ref()
                .map_or("DETECTIONS".to_string(), |f| shell_word(&f.name));
            let footage = footage.as_ref().map_or(String::new(), |f| {
                format!(" --footage {}", shell_word(&f.name))
            });
            format!("throughline run {detections} --plan {plan}{footage}")
        }
    };
    if let Some(p) = &ctx.project_name {
        cmd.push_str(&format!(" --edits {}", shell_word(p)));
    }
    if let Some(site) = &ctx.site {
        cmd.push_str(&format!(" --site {}", shell_word(site)));
    }
    if let Some(start) = &report.plan.start {
        cmd.push_str(&format!(" --start {start}"));
    }
    cmd.push_str(" -o check/report.json");
    cmd
}

/// A word as a shell reads it back whole: as it is when it holds only letters, digits and
/// `._-/+:,=@`, else in single quotes (a name like `my clip (1).mp4`, pasted, must stay one word).
pub fn shell_word(word: &str) -> String {
    let plain = !word.is_empty()
        && word
            .chars()
            .all(|c| c.is_ascii_alphanumeric() || "._-/+:,=@".contains(c));
    if plain {
        word.to_string()
    } else {
        format!("'{}'", word.replace('\'', "'\\''"))
    }
}

/// Whether the command line finds the boxes in the footage again: they were found there, the
/// footage is named, and the detector's settings are in a file (the command line's own, or the
/// project file the page saves, which records the page's).
fn found_again(ctx: &Context) -> bool {
    ctx.footage.is_some()
        && ctx.found_in_footage
        && (!ctx.found_in_page || ctx.project_name.is_some())
}

/// Whether the command names no detections file but the placeholder `DETECTIONS`.
pub fn detections_unnamed(ctx: &Context) -> bool {
    ctx.detections.is_none() && !found_again(ctx)
}

/// How the hand-in names the detections: a file, or found in the footage (and how).
fn detections_named(ctx: &Context) -> String {
    match (&ctx.detections, ctx.found_in_footage) {
        (Some(f), _) => f.name.clone(),
        (None, true) if ctx.found_in_page && ctx.project_name.is_some() => {
            "found in the footage in the page, with the detector settings the project file \
             records (its Export detections saves the boxes)"
                .into()
        }
        (None, true) if ctx.found_in_page => {
            "found in the footage in the page (its Export detections saves them)".into()
        }
        (None, true) => match &ctx.detector_settings {
            Some(d) => format!("found in the footage, detector settings {d}"),
            None => "found in the footage, the detector's default settings".into(),
        },
        (None, false) => "not given".into(),
    }
}

/// The lines at the top of a hand-in table: what was counted, where, from what, and the caution.
fn header_block(report: &Report, ctx: &Context) -> Vec<(String, String)> {
    let mut rows = vec![
        (
            "Site".to_string(),
            ctx.site.clone().unwrap_or_else(|| "not named".into()),
        ),
        ("Recording".into(), recording(report, false)),
        (
            "Plan".into(),
            ctx.plan_name
                .clone()
                .unwrap_or_else(|| "drawn in the page".into()),
        ),
    ];
    let name = |f: &Option<Fingerprint>| {
        f.as_ref()
            .map_or("not given".to_string(), |f| f.name.clone())
    };
    rows.push(("Footage".into(), name(&ctx.footage)));
    rows.push(("Detections".into(), detections_named(ctx)));
    rows.push(("Counted with".into(), report.generator.clone()));
    rows.push(("Corrections".into(), corrections(report)));
    if let Some(note) = partial_note(report) {
        rows.push(("Last interval".into(), note));
    }
    rows.extend(ctx.warnings.iter().map(|w| ("Warning".into(), w.clone())));
    rows.push(("Caution".into(), report.caution.clone()));
    rows
}

/// When the footage ends inside an interval: that interval and how much of it the footage covers,
/// so a count of part of an interval is not read as a whole one (a flow rate worked out from it
/// would be too low). `None` when every interval is whole.
pub(super) fn partial_note(report: &Report) -> Option<String> {
    // The lines' intervals, else (a plan of zones only) the zones'.
    let (n, start, end) = match (report.screenlines.first(), report.zones.first()) {
        (Some(l), _) => l
            .intervals
            .last()
            .map(|iv| (l.intervals.len(), &iv.start, &iv.end))?,
        (None, Some(z)) => z
            .intervals
            .last()
            .map(|iv| (z.intervals.len(), &iv.start, &iv.end))?,
        (None, None) => return None,
    };
    if !zone_grid::partial(report, n - 1) {
        return None;
    }
    let whole = report.plan.interval_minutes * 60.0;
    let covered = report.duration_seconds - whole * (n - 1) as f64;
    Some(format!(
        "{} to {} covers only {:.1} of its {} minutes (the footage ends inside it): its counts are \
         of that part, not of a whole interval",
        start,
        end,
        covered.max(0.0) / 60.0,
        report.plan.interval_minutes
    ))
}

/// The person's corrections behind the counts, in a few words ("none" when there are none).
fn corrections(report: &Report) -> String {
    let applied = report.edits.iter().filter(|e| e.applied).count();
    let left = report.edits.len() - applied;
    let mut text = match applied {
        0 => "none".to_string(),
        n => format!("{n} made by a person and applied"),
    };
    if left > 0 {
        text.push_str(&format!("; {left} could not be applied"));
    }
    text
}

/// When the footage was recorded: its start clock time (when the plan gives it) and its length.
/// `for_people`: the start as a date and a time ("2026-03-02 07:00:00", for the summary); else as
/// the plan and the grid's rows write it ("2026-03-02T07:00:00").
pub(super) fn recording(report: &Report, for_people: bool) -> String {
    let length = format!(
        "{:.1} minutes ({} frames at {} fps)",
        report.duration_seconds / 60.0,
        report.frame_count,
        report.plan.frame_rate
    );
    match &report.plan.start {
        Some(start) if for_people => format!("from {}, {length}", start.replacen('T', " ", 1)),
        Some(start) => format!("from {start}, {length}"),
        None => format!("start not given, {length}"),
    }
}
