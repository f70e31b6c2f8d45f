//! A batch manifest: one row per piece of work (a clip's detections or footage, its plan, the site,
//! camera and clock time it was recorded at, and how to track it), as CSV with a header row.
//!
//! ```text
//! name,detections,plan,site,camera,start,method
//! north-0700,north/0700.txt,plans/north.json,Elm Street,north,2026-03-02T07:00:00,sort
//! ```
//!
//! Columns (any order; only `name`, `plan` and one of `detections` or `footage` are needed):
//! `name` (the entry's output folder: letters, digits, `.`, `-`, `_`), `detections` (a detections
//! file), `footage` (YUV4MPEG2, searched by the fixed-camera detector), `plan`, `site`, `camera`,
//! `start` (the clock time of frame 1), `frames` (the clip's length, when its detections end
//! before it does), `method`, `settings` (tracker settings), `detector`
//! (detector settings, with `footage`), `edits` (an edits or project file), `still` (a picture of
//! the view for the summary). Paths are as written; the command line resolves them against the
//! manifest's folder. Blank lines and lines starting with `#` are skipped.

use crate::error::{Error, ErrorKind};
use crate::limits::{MAX_ENTRY_NAME, MAX_MANIFEST_ENTRIES};
use crate::plan::clock::LocalTime;
use crate::text::{as_text, split_fields};
use crate::track::Method;
use std::collections::HashMap;

/// The columns a manifest may have, in the order [`Entry::fields`] lists them.
pub const COLUMNS: [&str; 13] = [
    "name",
    "detections",
    "footage",
    "plan",
    "site",
    "camera",
    "start",
    "frames",
    "method",
    "settings",
    "detector",
    "edits",
    "still",
];

/// One piece of work: every column's value (`None` where the row leaves it empty).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Entry {
    /// 1-based line of the manifest it came from.
    pub line: usize,
    values: [Option<String>; COLUMNS.len()],
}

impl Entry {
    /// The value of a column of [`COLUMNS`].
    pub fn get(&self, column: &str) -> Option<&str> {
        let i = COLUMNS.iter().position(|c| *c == column)?;
        self.values[i].as_deref()
    }

    /// The entry's name (always present).
    pub fn name(&self) -> &str {
        self.get("name").unwrap_or_default()
    }

    /// The plan file (always present).
    pub fn plan(&self) -> &str {
        self.get("plan").unwrap_or_default()
    }

    /// Every column with its value, in [`COLUMNS`] order: what identifies the work asked.
    pub fn fields(&self) -> impl Iterator<Item = (&'static str, Option<&str>)> {
        COLUMNS
            .iter()
            .zip(&self.values)
            .map(|(c, v)| (*c, v.as_deref()))
    }
}

/// Reads a manifest: its entries in order, each checked (a name, a plan, detections or footage but
/// not both, names unique and usable as a folder's name).
pub fn read_manifest(bytes: &[u8]) -> Result<Vec<Entry>, Error> {
    let text = as_text(bytes).map_err(|e| match e.kind {
        ErrorKind::Binary => Error::new(
            ErrorKind::Binary,
            "this is not a text file: a manifest is CSV text, one row per clip (name,detections,plan,...)",
        ),
        _ => e,
    })?;
    let mut rows = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l))
        .filter(|(_, l)| !l.trim().is_empty() && !l.trim_start().starts_with('#'));
    let Some((header_line, header)) = rows.next() else {
        return Err(Error::new(
            ErrorKind::Empty,
            "the manifest is empty: write a header row (name,detections,plan,...) and one row per clip",
        ));
    };
    let columns = read_header(header, header_line)?;
    let mut entries: Vec<Entry> = Vec::new();
    // Names already used, in lower case (folders of names differing only in case are one folder on
    // some systems), with the line that used each.
    let mut names: HashMap<String, usize> = HashMap::new();
    for (line, row) in rows {
        if entries.len() == MAX_MANIFEST_ENTRIES {
            return Err(manifest_error(format!(
                "more than {MAX_MANIFEST_ENTRIES} entries: split the manifest in several"
            ))
            .at(line, None));
        }
        let entry = read_row(row, line, &columns)?;
        if let Some(first) = names.insert(entry.name().to_lowercase(), line) {
            return Err(manifest_error(format!(
                "the name {:?} is used twice (first on line {first}, perhaps in other capitals): each entry needs a name of its own, its output folder",
                entry.name(),
            ))
            .at(line, Some(1 + columns.iter().position(|&c| c == 0).unwrap_or(0))));
        }
        entries.push(entry);
    }
    if entries.is_empty() {
        return Err(Error::new(
            ErrorKind::Empty,
            "the manifest has a header but no entries: add one row per clip",
        ));
    }
    Ok(entries)
}

fn manifest_error(message: impl Into<String>) -> Error {
    Error::new(ErrorKind::Manifest, message)
}

/// The header: for each field of a row, its column in [`COLUMNS`].
fn read_header(header: &str, line: usize) -> Result<Vec<usize>, Error> {
    let mut columns = Vec::new();
    for (k, name) in split_fields(header).into_iter().enumerate() {
        let name = name.to_ascii_lowercase();
        let Some(c) = COLUMNS.iter().position(|&known| known == name) else {
            let hint = if name.contains([';', '\t']) {
                " (the columns must be separated by commas: save the sheet as CSV with commas)"
            } else {
                ""
            };
            return Err(Error::new(
                ErrorKind::BadHeader,
                format!(
                    "unknown column {name:?}: the columns are {}{hint}",
                    COLUMNS.join(", ")
                ),
            )
            .at(line, Some(k + 1)));
        };
        if columns.contains(&c) {
            return Err(Error::new(
                ErrorKind::BadHeader,
                format!("the column {name:?} is named twice"),
            )
            .at(line, Some(k + 1)));
        }
        columns.push(c);
    }
    for needed in ["name", "plan"] {
        if !columns.iter().any(|&c| COLUMNS[c] == needed) {
            return Err(Error::new(
                ErrorKind::BadHeader,
                format!("the header has no {needed:?} column: each entry needs a {needed}"),
            )
            .at(line, None));
        }
    }
    if !columns
        .iter()
        .any(|&c| matches!(COLUMNS[c], "detections" | "footage"))
    {
        return Err(Error::new(
            ErrorKind::BadHeader,
            "the header has neither a \"detections\" nor a \"footage\" column: each entry needs one",
        )
        .at(line, None));
    }
    Ok(columns)
}

/// One row, checked.
fn read_row(row: &str, line: usize, columns: &[usize]) -> Result<Entry, Error> {
    let fields = split_fields(row);
    if fields.len() != columns.len() {
        return Err(Error::new(
            ErrorKind::WrongColumnCount,
            format!(
                "{} fields where the header names {} columns (a comma inside a value needs double quotes around it)",
                fields.len(),
                columns.len()
            ),
        )
        .at(line, None));
    }
    let mut values: [Option<String>; COLUMNS.len()] = Default::default();
    for (&c, value) in columns.iter().zip(fields) {
        values[c] = (!value.is_empty()).then(|| value.to_string());
    }
    let entry = Entry { line, values };
    let column_of = |name: &str| {
        let c = COLUMNS.iter().position(|&k| k == name).unwrap_or(0);
        columns.iter().position(|&k| k == c).map(|k| k + 1)
    };
    let missing = |name: &str, what: &str| {
        manifest_error(format!("no {name}: {what}")).at(line, column_of(name))
    };
    let name = entry.name();
    if name.is_empty() {
        return Err(missing(
            "name",
            "each entry needs a name, the folder its outputs go in",
        ));
    }
    check_name(name).map_err(|e| e.at(line, column_of("name")))?;
    if entry.plan().is_empty() {
        return Err(missing("plan", "each entry needs a counting plan"));
    }
    check_values(&entry).map_err(|(e, column)| e.at(line, column_of(column)))?;
    match (entry.get("detections"), entry.get("footage")) {
        (None, None) => Err(missing(
            "detections",
            "give a detections file, or footage (YUV4MPEG2) in the footage column",
        )),
        (Some(_), Some(_)) => Err(manifest_error(
            "both detections and footage: give one of the two (footage is searched for moving objects, detections are tracked as they are)",
        )
        .at(line, column_of("footage"))),
        _ if entry.get("detector").is_some() && entry.get("footage").is_none() => {
            Err(manifest_error("detector settings without footage: they apply only to the footage column")
                .at(line, column_of("detector")))
        }
        _ => Ok(entry),
    }
}

/// An entry's name: usable as a folder's name, and none of the batch's own files.
fn check_name(name: &str) -> Result<(), Error> {
    let usable = name.len() <= MAX_ENTRY_NAME
        && !name.starts_with('.')
        && name
            .chars()
            .all(|ch| ch.is_ascii_alphanumeric() || matches!(ch, '.' | '-' | '_'));
    if !usable {
        return Err(manifest_error(format!(
            "the name {name:?} cannot be a folder's name: use up to {MAX_ENTRY_NAME} letters, digits, '.', '-' and '_', not starting with '.'"
        )));
    }
    let lower = name.to_ascii_lowercase();
    if lower == "slurm" || lower.ends_with(".csv") {
        return Err(manifest_error(format!(
            "the name {name:?} is kept for the batch's own files (slurm/, batch.csv, the merged CSVs): choose another"
        )));
    }
    Ok(())
}

/// The values that must be known ones: the method, the start time; a camera only with a site. The
/// error with the column it concerns.
fn check_values(entry: &Entry) -> Result<(), (Error, &'static str)> {
    if let Some(m) = entry.get("method").filter(|m| Method::parse(m).is_none()) {
        return Err((manifest_error(format!(
            "unknown method {m:?}: the methods are {} (or leave it empty for the best for the detections)",
            Method::names().join(", ")
        )), "method"));
    }
    if let Some(t) = entry.get("start").filter(|t| LocalTime::parse(t).is_none()) {
        return Err((manifest_error(format!(
            "the start {t:?} is not a clock time: write the time of the clip's first frame like 2026-03-02T07:00:00"
        )), "start"));
    }
    let whole = |f: &str| f.parse::<u32>().is_ok_and(|n| n > 0);
    if let Some(f) = entry.get("frames").filter(|f| !whole(f)) {
        return Err((manifest_error(format!(
            "the frames {f:?} are not a length in frames: write the clip's whole length as a whole number (its duration in seconds times the frame rate), or leave it empty"
        )), "frames"));
    }
    if entry.get("camera").is_some() && entry.get("site").is_none() {
        return Err((
            manifest_error(
                "a camera without a site: cameras are merged site by site, so give the site too",
            ),
            "camera",
        ));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rows_in_any_column_order() {
        let m = b"# a comment\nplan,name,detections,site\n\np.json,a,a.txt,\"Elm Street, north\"\np.json,b,b.txt,\n";
        let e = read_manifest(m).unwrap();
        assert_eq!(e.len(), 2);
        assert_eq!(e[0].name(), "a");
        assert_eq!(e[0].line, 4);
        assert_eq!(e[0].get("site"), Some("Elm Street, north"));
        assert_eq!(e[1].get("site"), None);
        assert_eq!(e[1].get("detections"), Some("b.txt"));
    }

    #[test]
    fn mistakes_name_their_line_and_column() {
        let cases: [(&[u8], &str); 16] = [
            (b"", "empty"),
            (b"name,plan,detections\n", "no entries"),
            (
                b"name,plan,detections,colour\n",
                "line 1, column 4: unknown column \"colour\"",
            ),
            (b"name,plan\na,p.json\n", "neither"),
            (b"name,plan,detections\na,p.json\n", "line 2: 2 fields"),
            (
                b"name,plan,detections\na,p.json,x\na,p.json,y\n",
                "line 3, column 1: the name \"a\" is used twice (first on line 2",
            ),
            (
                b"name,plan,detections\n../up,p.json,x\n",
                "cannot be a folder's name",
            ),
            (
                b"name,plan,detections,footage\na,p.json,x,y.y4m\n",
                "line 2, column 4: both detections and footage",
            ),
            (
                b"name,plan,detections\nA,p.json,x\na,p.json,y\n",
                "used twice (first on line 2, perhaps in other capitals)",
            ),
            (
                b"name,plan,detections\nslurm,p.json,x\n",
                "kept for the batch's own files",
            ),
            (
                b"name,plan,detections,method\na,p.json,x,kalman\n",
                "line 2, column 4: unknown method \"kalman\"",
            ),
            (
                b"name,plan,detections,start\na,p.json,x,yesterday\n",
                "line 2, column 4: the start \"yesterday\" is not a clock time",
            ),
            (
                b"name,plan,detections,frames\na,p.json,x,90.5\n",
                "line 2, column 4: the frames \"90.5\" are not a length in frames",
            ),
            (
                b"name,plan,detections,camera\na,p.json,x,north\n",
                "a camera without a site",
            ),
            (b"name;plan;detections\n", "separated by commas"),
            (b"\0\0\0", "not a text file"),
        ];
        for (bytes, expected) in cases {
            let e = read_manifest(bytes).unwrap_err().to_string();
            assert!(e.contains(expected), "{e:?} should say {expected:?}");
        }
    }
}
