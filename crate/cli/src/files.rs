//! Files for the commands: reading inputs and writing outputs, and the one kind of failure a
//! command returns (a message naming the file, and the exit code).

use std::path::Path;
use throughline_core::limits::MAX_TEXT_INPUT_BYTES;
use throughline_core::pipeline::Work;
use throughline_core::plan;
use throughline_core::project::{self, Project};
use throughline_core::track::{files as tracks_io, Tracks};

/// An error for the user: what went wrong, in which file, and the exit code (1 bad input, 2 bad
/// usage).
pub struct Failure {
    pub message: String,
    pub code: u8,
}

/// Bad input in `path`: exit code 1.
pub fn bad_input(path: &Path, e: impl std::fmt::Display) -> Failure {
    Failure {
        message: format!("{}: {e}", path.display()),
        code: 1,
    }
}

/// Bad usage (a command-line value out of range): exit code 2.
pub fn bad_usage(message: &str) -> Failure {
    Failure {
        message: message.to_string(),
        code: 2,
    }
}

/// A text input's bytes. Reading stops early where it cannot be text (a NUL byte in the first
/// 64 KiB: the first 64 KiB are enough for the reader to say so, naming what it expected) and past
/// [`MAX_TEXT_INPUT_BYTES`], so a device or a video given by mistake cannot fill the memory.
pub fn read_file(path: &Path) -> Result<Vec<u8>, Failure> {
    read_text(path, MAX_TEXT_INPUT_BYTES)
}

/// [`read_file`] with another limit than [`MAX_TEXT_INPUT_BYTES`].
pub fn read_text(path: &Path, limit: u64) -> Result<Vec<u8>, Failure> {
    read_limited(path, limit, true)
}

/// A binary input's bytes (a picture), refused past `limit` before more is read.
pub fn read_binary(path: &Path, limit: u64) -> Result<Vec<u8>, Failure> {
    read_limited(path, limit, false)
}

/// A file's bytes up to `limit` (more is refused, naming the limit); for `text`, no further than
/// the first 64 KiB when they hold a NUL byte (the reader then says it is not text).
fn read_limited(path: &Path, limit: u64, text: bool) -> Result<Vec<u8>, Failure> {
    use std::io::Read;
    let cannot = |e: std::io::Error| bad_input(path, format!("cannot read the file: {e}"));
    let mut reader = std::fs::File::open(path).map_err(cannot)?.take(limit + 1);
    let mut bytes = Vec::new();
    if text {
        (&mut reader)
            .take(BINARY_CHECK_BYTES)
            .read_to_end(&mut bytes)
            .map_err(cannot)?;
        if bytes.contains(&0) {
            return Ok(bytes);
        }
    }
    reader.read_to_end(&mut bytes).map_err(cannot)?;
    if bytes.len() as u64 > limit {
        return Err(bad_input(
            path,
            format!("larger than {} MiB: is this the right file?", limit >> 20),
        ));
    }
    Ok(bytes)
}

/// What is read of a text input before deciding whether it is text at all.
const BINARY_CHECK_BYTES: u64 = 1 << 16;

/// A number with its noun, singular for one: "1 detection", "2 detections".
pub fn counted(n: impl Into<u64>, noun: &str) -> String {
    let n = n.into();
    format!("{n} {noun}{}", if n == 1 { "" } else { "s" })
}

/// A file's name without its folder (`-`: standard input), as warnings kept for the hand-in files
/// and the page name it.
pub fn file_name(path: &Path) -> String {
    if path == Path::new("-") {
        return "standard input".into();
    }
    path.file_name().map_or_else(
        || path.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    )
}

/// How to name an input in messages: `-` is standard input.
pub fn name(path: &Path) -> String {
    if path == Path::new("-") {
        "standard input".into()
    } else {
        path.display().to_string()
    }
}

/// A settings file's path and text, when one was given.
/// Tracker settings: where they were read, and their JSON text.
pub type Settings<'a> = Option<(&'a Path, String)>;

pub fn read_settings(path: Option<&Path>) -> Result<Settings<'_>, Failure> {
    match path {
        Some(p) => {
            let bytes = read_file(p)?;
            Ok(Some((p, String::from_utf8_lossy(&bytes).into_owned())))
        }
        None => Ok(None),
    }
}

pub fn read_plan(path: &Path) -> Result<plan::Plan, Failure> {
    let bytes = read_file(path)?;
    let text =
        std::str::from_utf8(&bytes).map_err(|_| bad_input(path, "the plan is not UTF-8 text"))?;
    plan::Plan::from_json(text).or_else(|e| {
        // A project file saved by the page holds the plan: it is used, and said (a newcomer's
        // trial: "unknown field `format`" for the project given as the plan).
        let Ok(project) = throughline_core::project::Project::from_json(text) else {
            return Err(bad_input(path, e));
        };
        let plan = plan::Plan::from_spec(project.plan).map_err(|e| bad_input(path, e))?;
        eprintln!(
            "note: {} is a project file: the plan it holds is used{}",
            file_name(path),
            if project.edits.is_empty() {
                String::new()
            } else {
                format!(
                    "; its corrections ({}) apply only when it is also given with --edits",
                    project.edits.len()
                )
            }
        );
        Ok(plan)
    })
}

/// Whether a file's first non-blank byte opens a JSON object (a tracks document or a report).
pub fn looks_like_json_object(bytes: &[u8]) -> bool {
    first_mark(bytes) == Some(b'{')
}

/// Whether a file's first non-blank byte opens JSON, an object or an array.
pub fn looks_like_json(bytes: &[u8]) -> bool {
    matches!(first_mark(bytes), Some(b'{' | b'['))
}

fn first_mark(bytes: &[u8]) -> Option<u8> {
    bytes.iter().copied().find(|b| !b.is_ascii_whitespace())
}

/// Writes tracks as benchmark text for a `.txt` path, otherwise as the JSON document, a piece at
/// a time.
pub fn write_tracks(
    tracks: &Tracks,
    path: Option<&Path>,
    mut out: &mut dyn std::io::Write,
) -> std::io::Result<()> {
    match path {
        Some(p) if p.extension().is_some_and(|e| e.eq_ignore_ascii_case("txt")) => {
            tracks_io::write_benchmark_text(tracks, &mut out)
        }
        _ => tracks_io::write_json(tracks, &mut out),
    }
}

/// What `--edits` adds to a run: an edits file's corrections, or everything a project file
/// adds (corrections, tallies, a correction factor), with the project itself; nothing without a
/// path.
pub fn read_work(path: Option<&Path>) -> Result<(Work, Option<Project>), Failure> {
    let Some(path) = path else {
        return Ok((Work::default(), None));
    };
    let bytes = read_file(path)?;
    let text = std::str::from_utf8(&bytes)
        .map_err(|_| bad_input(path, "the edits file is not UTF-8 text"))?;
    let is_project = serde_json::from_str::<serde_json::Value>(text)
        .ok()
        .and_then(|v| v.get("format")?.as_str().map(|f| f == project::FORMAT))
        .unwrap_or(false);
    if is_project {
        let p = Project::from_json(text).map_err(|e| bad_input(path, e))?;
        return Ok((Work::of_project(&p), Some(p)));
    }
    let edits = project::edits_from_json(text).map_err(|e| bad_input(path, e))?;
    Ok((Work::edits(edits), None))
}
