//! The core's one error type: what went wrong ([`ErrorKind`]), where (line and column of the input,
//! or the field of a plan or settings file), and a message that tells the user what to fix.
//!
//! Every reader and checker of outside input returns it, so the command line and the page report
//! every problem the same way: `line 3, column 2: …` for a position, `` `field`: … `` for a field.

use std::fmt;

/// What kind of problem an [`Error`] reports.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ErrorKind {
    /// The input holds nothing to read.
    Empty,
    /// Binary or not UTF-8 where text was expected.
    Binary,
    /// A field that should be a number is not one.
    BadNumber,
    /// A number is infinite or NaN.
    NotFinite,
    /// A box with a negative width or height.
    NegativeSize,
    /// A frame number that is not a whole number of 1 or more.
    BadFrame,
    /// Fewer columns (or box values) than the format needs.
    MissingColumn,
    /// A row with another number of fields than the header names.
    WrongColumnCount,
    /// A header that does not name the columns the format needs.
    BadHeader,
    /// JSON that does not parse, or is not the document expected.
    BadJson,
    /// Appearance vectors of different lengths.
    Embedding,
    /// More classes than can be numbered.
    TooManyClasses,
    /// One id twice in one frame.
    DuplicateId,
    /// A counting plan field that is missing, out of range or inconsistent.
    Plan,
    /// A tracker or detector setting that is unknown or out of range.
    Settings,
    /// Input that is valid but cannot serve what was asked (a method that needs embeddings, say).
    Unsuitable,
    /// A batch manifest's header or row: an unknown column, a missing file, a name used twice.
    Manifest,
}

/// A problem with the input, where it is, and what to fix.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Error {
    pub kind: ErrorKind,
    /// 1-based line, when the error belongs to one.
    pub line: Option<usize>,
    /// 1-based column (field number for text formats; for JSON the byte in the line, as
    /// serde_json counts).
    pub column: Option<usize>,
    /// The field of a plan or settings file it concerns, as a JSON path (`screenlines[0].points`).
    pub field: Option<String>,
    /// What is wrong and what to fix.
    pub message: String,
}

impl Error {
    pub fn new(kind: ErrorKind, message: impl Into<String>) -> Self {
        Self {
            kind,
            line: None,
            column: None,
            field: None,
            message: message.into(),
        }
    }

    /// The same error placed at a line (and column) of the input.
    pub fn at(mut self, line: usize, column: Option<usize>) -> Self {
        self.line = Some(line);
        self.column = column;
        self
    }

    /// The same error placed at a field of a plan or settings file.
    pub fn in_field(mut self, field: impl Into<String>) -> Self {
        self.field = Some(field.into());
        self
    }

    /// An error of serde_json's, placed where it says, with its own position text cut from the
    /// message and `hint` (what was expected) added.
    pub fn from_json(kind: ErrorKind, e: &serde_json::Error, hint: &str) -> Self {
        let mut message = e.to_string();
        // serde_json appends " at line L column C"; the position is reported separately.
        if let Some(cut) = message.rfind(" at line ") {
            message.truncate(cut);
        }
        let message = plain_json_words(&message);
        Error::new(kind, format!("{message}{hint}")).at(e.line().max(1), Some(e.column().max(1)))
    }
}

/// serde_json's words for what it expected, in words a person who does not program reads.
pub fn plain_json_words(message: &str) -> String {
    let mut m = message.to_string();
    for (from, to) in [
        (
            "expected ident",
            "this is not JSON here (a JSON document starts with { or [)",
        ),
        ("expected value", "a value is missing or is not JSON here"),
        (
            "EOF while parsing a value",
            "the file ends where a value should be: is it empty, or cut short?",
        ),
        (
            "EOF while parsing an object",
            "the file ends before its JSON object does (a } is missing)",
        ),
        (
            "EOF while parsing a list",
            "the file ends before its JSON list does (a ] is missing)",
        ),
        (
            "EOF while parsing a string",
            "the file ends inside a string (a closing \" is missing)",
        ),
        ("expected u32", "expected a whole number, 0 or more"),
        ("expected u64", "expected a whole number, 0 or more"),
        ("expected usize", "expected a whole number, 0 or more"),
        ("expected u16", "expected a whole number, 0 or more"),
        ("expected f64", "expected a number"),
        ("expected f32", "expected a number"),
    ] {
        if m.contains(from) {
            m = m.replace(from, to);
        }
    }
    if let Some(name) = nearest_known_field(&m) {
        m.push_str(&format!(" (did you mean `{name}`?)"));
    }
    m
}

/// For serde's "unknown field `foward`, expected one of `name`, `forward`, …" (or "expected
/// `a` or `b`"): the expected name nearest the unknown one, when it is a likely typo (at most two
/// letters apart, case aside, or the same but for case).
fn nearest_known_field(message: &str) -> Option<&str> {
    let rest = message.strip_prefix("unknown field `")?;
    let (unknown, expected) = rest.split_once("`, expected ")?;
    let names: Vec<&str> = expected.split('`').skip(1).step_by(2).collect();
    likely_meant(unknown, &names)
}

/// Among `known`, the name `written` is likely a misspelling of: at most two letters apart (case
/// aside: `Score` is `score` misspelt), fewer than `written` has, and not `written` itself.
pub(crate) fn likely_meant<'a>(written: &str, known: &[&'a str]) -> Option<&'a str> {
    let length = written.chars().count();
    // Names more than two letters longer or shorter are more than two apart: not measured (a
    // name of any length costs no more than the known names' own).
    if known.iter().all(|k| k.chars().count().abs_diff(length) > 2) {
        return None;
    }
    let lower = written.to_lowercase();
    known
        .iter()
        .filter(|k| k.chars().count().abs_diff(length) <= 2)
        .filter(|&&k| k != written)
        .map(|&k| (k, edit_distance(&lower, &k.to_lowercase())))
        .filter(|&(_, d)| d <= 2 && d < length)
        .min_by_key(|&(_, d)| d)
        .map(|(k, _)| k)
}

/// Levenshtein distance over characters (names are short: a field name, not file contents).
pub(crate) fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut row: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut diagonal = row[0];
        row[0] = i + 1;
        for (j, cb) in b.iter().enumerate() {
            let above = row[j + 1];
            row[j + 1] = (above + 1)
                .min(row[j] + 1)
                .min(diagonal + usize::from(ca != *cb));
            diagonal = above;
        }
    }
    row[b.len()]
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match (self.line, self.column) {
            (Some(l), Some(c)) => write!(f, "line {l}, column {c}: ")?,
            (Some(l), None) => write!(f, "line {l}: ")?,
            _ => {}
        }
        match &self.field {
            Some(field) => write!(f, "`{field}`: {}", self.message),
            None => f.write_str(&self.message),
        }
    }
}

impl std::error::Error for Error {}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn json_mistakes_in_plain_words_and_the_setting_named() {
        let e = serde_json::from_str::<serde_json::Value>("not json").unwrap_err();
        let e = Error::from_json(ErrorKind::BadJson, &e, "");
        assert_eq!(
            e.to_string(),
            "line 1, column 2: this is not JSON here (a JSON document starts with { or [)"
        );
        let e = crate::TrackerConfig::from_json(r#"{"max_age": "x"}"#, crate::Method::Sort)
            .unwrap_err()
            .to_string();
        assert!(
            e.starts_with("`max_age` in the settings file: invalid type: string \"x\", expected a whole number"),
            "{e}"
        );
    }

    #[test]
    fn a_misspelt_field_is_named_with_the_nearest_known_one() {
        // serde's own words for a plan's misspelt field (the plan reader passes them here; a
        // test through it is in tests/schemas.rs).
        let e = plain_json_words(
            "unknown field `foward`, expected one of `name`, `points`, `forward`, `backward`",
        );
        assert!(e.contains("unknown field `foward`"), "{e}");
        assert!(e.contains("(did you mean `forward`?)"), "{e}");
        // Nothing near: no guess.
        let e = plain_json_words("unknown field `colour`, expected one of `frame_rate`, `start`");
        assert!(!e.contains("did you mean"), "{e}");
        assert_eq!(edit_distance("frame_rat", "frame_rate"), 1);
        assert_eq!(edit_distance("", "ab"), 2);
    }
}
