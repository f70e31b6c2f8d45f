//! The `"format"` names of Throughline's own JSON documents, in one place: each document's module
//! writes its own, and the detection readers name them when one is given where detections belong.

pub const TRACKS: &str = "throughline-tracks";
pub const REPORT: &str = "throughline-report";
pub const PROJECT: &str = "throughline-project";
pub const EDITS: &str = "throughline-edits";

use crate::error::{Error, ErrorKind};

/// A document's `format` and `version` as read, against the ones this program writes: an error
/// naming what was found (`what`: "edits file", "project file", …).
pub fn check(
    what: &str,
    (format, version): (&str, u32),
    (expected, known): (&str, u32),
) -> Result<(), Error> {
    if format != expected {
        return Err(Error::new(
            ErrorKind::BadJson,
            format!("`format` is `{format}`, expected `{expected}`"),
        ));
    }
    if version != known {
        return Err(Error::new(
            ErrorKind::BadJson,
            format!(
                "{what} version {version} is not known to this program (it reads version {known})"
            ),
        ));
    }
    Ok(())
}
