//! The JSON array of detection results: `{"image_id": frame, "category_id": class, "bbox": [x, y,
//! w, h], "score": s}` per element, optionally `"embedding": [...]`. Read element by element, so a
//! large file is never held twice.

use super::{finish, Detection, DetectionFormat, Detections, ReadReport, Warnings};
use crate::error::{Error, ErrorKind};
use crate::geometry::BBox;
use crate::limits::MIN_BOX_SIDE;
use serde::de::{self, DeserializeSeed, SeqAccess, Visitor};
use std::cell::RefCell;
use std::collections::HashMap;
use std::fmt;

/// One element of the JSON results array, as written by detectors.
#[derive(serde::Deserialize)]
struct JsonDetection {
    image_id: serde_json::Value,
    #[serde(default)]
    category_id: Option<serde_json::Value>,
    bbox: Vec<f64>,
    score: f64,
    #[serde(default)]
    embedding: Option<Vec<f32>>,
}

struct JsonSink<'a> {
    out: &'a mut Detections,
    classes: HashMap<String, u16>,
    warnings: &'a mut Warnings,
    /// A validation error raised inside the visitor (its kind and the element's field it is
    /// about), to keep it apart from syntax errors; and the number of the element being read.
    failure: &'a RefCell<Failure>,
}

/// Where reading the array stopped: the element being read (1-based; 0 before the first), and
/// for a validation error its kind and the field concerned.
#[derive(Default)]
struct Failure {
    element: usize,
    problem: Option<(ErrorKind, &'static str)>,
}

/// A problem with one element: its kind, message (the element number included) and the field
/// it is about.
type Problem = (ErrorKind, String, &'static str);

impl JsonSink<'_> {
    fn push<E: de::Error>(&mut self, n: usize, d: JsonDetection) -> Result<(), E> {
        self.take(n, d).map_err(|(kind, message, field)| {
            self.failure.borrow_mut().problem = Some((kind, field));
            E::custom(message)
        })
    }

    fn take(&mut self, n: usize, d: JsonDetection) -> Result<(), Problem> {
        let frame = frame_of(n, &d.image_id)?;
        if !d.bbox.iter().all(|v| crate::limits::in_range(*v)) {
            return Err((
                ErrorKind::BadNumber,
                format!("element {n}: bbox values must be numbers within ±10^12"),
                "bbox",
            ));
        }
        if !crate::limits::in_range(d.score) {
            return Err((
                ErrorKind::BadNumber,
                format!("element {n}: score must be a number within ±10^12"),
                "score",
            ));
        }
        let Some(bbox) = self.bbox_of(n, &d.bbox)? else {
            return Ok(());
        };
        self.warnings.note_score(d.score, None, n);
        let class = self.class_of(d.category_id.as_ref())?;
        let embedding = match d.embedding {
            None => None,
            Some(v) => Some(self.embedding_of(n, &v)?),
        };
        self.out.rows.push(Detection {
            frame,
            bbox,
            score: d.score,
            class,
            embedding,
        });
        Ok(())
    }

    /// The box, or `None` (with a warning) for a zero-size one.
    fn bbox_of(&mut self, n: usize, bbox: &[f64]) -> Result<Option<BBox>, Problem> {
        if bbox.len() != 4 {
            return Err((
                ErrorKind::MissingColumn,
                format!(
                    "element {n}: bbox must have 4 numbers [x, y, w, h], found {}",
                    bbox.len()
                ),
                "bbox",
            ));
        }
        let b = BBox::new(bbox[0], bbox[1], bbox[2], bbox[3]);
        if b.w < 0.0 || b.h < 0.0 {
            return Err((
                ErrorKind::NegativeSize,
                format!(
                    "element {n}: bbox width and height must not be negative (bbox is [x, y, w, h], \
                     not two corners)"
                ),
                "bbox",
            ));
        }
        if b.w < MIN_BOX_SIDE || b.h < MIN_BOX_SIDE {
            self.warnings.push(
                None,
                format!("element {n}: box with zero width or height (under a hundredth of a pixel) passed over"),
            );
            return Ok(None);
        }
        Ok(Some(b))
    }

    /// The class index of `category_id`: a string is the class name, a number its digits.
    fn class_of(&mut self, category: Option<&serde_json::Value>) -> Result<Option<u16>, Problem> {
        let name = match category {
            None | Some(serde_json::Value::Null) => return Ok(None),
            Some(serde_json::Value::String(s)) => s.clone(),
            Some(v) => v.to_string(),
        };
        match self.out.intern_class(&mut self.classes, &name) {
            Some(c) => Ok(Some(c)),
            None => Err((
                ErrorKind::TooManyClasses,
                "more than 65535 classes".into(),
                "category_id",
            )),
        }
    }

    /// Stores an appearance vector; its index. Every vector must have the first one's length.
    fn embedding_of(&mut self, n: usize, v: &[f32]) -> Result<u32, Problem> {
        if self.out.embedding_dim == 0 {
            self.out.embedding_dim = v.len();
        }
        if v.is_empty() || v.len() != self.out.embedding_dim {
            return Err((
                ErrorKind::Embedding,
                format!(
                    "element {n}: embedding has {} values, earlier ones have {}: every embedding \
                     must have the same length",
                    v.len(),
                    self.out.embedding_dim
                ),
                "embedding",
            ));
        }
        if v.iter().any(|x| !crate::limits::in_range(f64::from(*x))) {
            return Err((
                ErrorKind::NotFinite,
                format!("element {n}: embedding values must be finite numbers within ±10^12"),
                "embedding",
            ));
        }
        let index = (self.out.embeddings.len() / v.len()) as u32;
        self.out.embeddings.extend_from_slice(v);
        Ok(index)
    }
}

/// The frame number of `image_id`: a whole number of 1 or more.
fn frame_of(n: usize, image_id: &serde_json::Value) -> Result<u32, Problem> {
    match image_id.as_f64() {
        Some(v) if v.fract() == 0.0 && v >= 1.0 && v <= u32::MAX as f64 => Ok(v as u32),
        Some(0.0) => Err((
            ErrorKind::BadFrame,
            format!(
                "element {n}: image_id 0, but frames are numbered from 1: if the file counts \
                 from 0, add 1 to every image_id"
            ),
            "image_id",
        )),
        _ => Err((
            ErrorKind::BadFrame,
            format!("element {n}: image_id must be the frame number, a whole number of 1 or more"),
            "image_id",
        )),
    }
}

impl<'de> DeserializeSeed<'de> for JsonSink<'_> {
    type Value = ();
    fn deserialize<D: de::Deserializer<'de>>(self, deserializer: D) -> Result<(), D::Error> {
        deserializer.deserialize_seq(self)
    }
}

impl<'de> Visitor<'de> for JsonSink<'_> {
    type Value = ();
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("an array of {image_id, category_id, bbox: [x, y, w, h], score}")
    }

    fn visit_seq<A: SeqAccess<'de>>(mut self, mut seq: A) -> Result<(), A::Error> {
        let mut n = 0;
        loop {
            self.failure.borrow_mut().element = n + 1;
            let Some(d) = seq.next_element::<JsonDetection>()? else {
                break;
            };
            n += 1;
            self.push(n, d)?;
        }
        Ok(())
    }
}

/// What takes a project or edits file.
const WITH_EDITS: &str = "give it with `--edits` beside the detections it was made from";

/// Throughline's own documents, by their `"format"`: what each is, and what takes it.
const OWN_DOCUMENTS: [(&str, &str, &str); 4] = [
    (
        crate::formats::TRACKS,
        "a tracks file",
        "count it with `throughline count FILE --plan PLAN`, or score it with `throughline score`",
    ),
    (
        crate::formats::REPORT,
        "a report of counts",
        "compare it with a reference using `throughline score-counts`",
    ),
    (crate::formats::PROJECT, "a project file", WITH_EDITS),
    (crate::formats::EDITS, "an edits file", WITH_EDITS),
];

/// The error for a JSON object where the array of detections belongs: one of Throughline's own
/// documents (its `"format"` near the start says which) named, with what takes it instead.
fn not_an_array(text: &str) -> Error {
    let head = &text[..text.floor_char_boundary(400)];
    let own = OWN_DOCUMENTS
        .iter()
        .find(|(format, ..)| head.contains(&format!("\"{format}\"")));
    let message = match own {
        Some((format, name, what)) => format!(
            "this is {name} of Throughline (\"format\": \"{format}\"), not detections: {what}; \
             `track`, `run`, `review` and `tune` take detections"
        ),
        None => "this JSON is an object; detections in JSON are a JSON array of \
                 {\"image_id\": frame, \"category_id\": class, \"bbox\": [x, y, w, h], \"score\": s}"
            .to_string(),
    };
    Error::new(ErrorKind::BadJson, message).at(1, Some(1))
}

pub(super) fn read(text: &str) -> Result<ReadReport, Error> {
    if text.trim_start().starts_with('{') {
        return Err(not_an_array(text));
    }
    let mut out = Detections::default();
    let mut warnings = Warnings::new();
    // Before the rows' warnings: the first element is at the file's start.
    note_unread_keys(text, &mut warnings);
    let failure = RefCell::new(Failure::default());
    let sink = JsonSink {
        out: &mut out,
        classes: HashMap::new(),
        warnings: &mut warnings,
        failure: &failure,
    };
    let mut de = serde_json::Deserializer::from_str(text);
    let result = sink.deserialize(&mut de).and_then(|()| de.end());
    if let Err(e) = result {
        return Err(placed(text, &e, &failure.borrow()));
    }
    finish(out, DetectionFormat::JsonResults, warnings, false)
}

/// The error where reading stopped. A validation error is placed at its field in the element
/// (the parser has moved past it by then: its own place is the next element's); a value of the
/// wrong kind inside an element is named with its element and field; anything else is the
/// array's shape.
fn placed(text: &str, e: &serde_json::Error, failure: &Failure) -> Error {
    let element = failure.element;
    let at_field = |err: Error, field: Option<&str>| match field_place(text, element, field) {
        Some((line, column)) => err.at(line, Some(column)),
        None => err,
    };
    if let Some((kind, field)) = failure.problem {
        return at_field(Error::from_json(kind, e, ""), Some(field));
    }
    let message = e.to_string();
    if message.contains("JsonDetection") || !e.is_data() || element == 0 {
        // The array's shape: not an array, an element that is not an object, broken JSON.
        let mut err = Error::from_json(ErrorKind::BadJson, e, SHAPE);
        err.message = err.message.replace("struct JsonDetection", "an object");
        return match message.contains("JsonDetection") && element > 0 {
            true => Error {
                message: format!("element {element}: {}", err.message),
                ..err
            },
            false => err,
        };
    }
    let mut err = Error::from_json(ErrorKind::BadJson, e, "");
    err.message = format!("element {element}: {}", err.message);
    if let Some(field) = message
        .strip_prefix("missing field `")
        .and_then(|m| m.split('`').next())
    {
        err.message
            .push_str(&misspelt_key(text, element, field).unwrap_or_default());
        // Placed at the element's start: the parser is at its end by then.
        return at_field(err, None);
    }
    // A value of the wrong kind: the key written before it names it.
    match crate::text::key_before(text, e.line(), e.column()) {
        Some(key) if message.starts_with("invalid ") => err.in_field(key),
        _ => err,
    }
}

/// What the detections JSON looks like, for a mistake in its shape.
const SHAPE: &str = "; expected a JSON array of {\"image_id\": frame, \"category_id\": class, \
                     \"bbox\": [x, y, w, h], \"score\": s}";

/// The line and column (1-based) of the key `"field"` in the `element`th object of the top array
/// (or of the object's `{` when no field is given, or it is not written as a key there).
fn field_place(text: &str, element: usize, field: Option<&str>) -> Option<(usize, usize)> {
    let (start, end) = element_span(text, element)?;
    let key = match (field, end) {
        (Some(f), Some(end)) => key_at(&text[start..=end], f).unwrap_or(0),
        _ => 0,
    };
    Some(line_and_column(text, start + key))
}

/// Where the `element`th object of the top array begins (its `{`) and ends (its `}`, when the
/// text holds it), found by a scan that skips strings.
fn element_span(text: &str, element: usize) -> Option<(usize, Option<usize>)> {
    let (mut depth, mut count, mut in_string, mut escaped) = (0usize, 0usize, false, false);
    let mut start = None;
    for (at, c) in text.char_indices() {
        if in_string {
            (escaped, in_string) = match (escaped, c) {
                (true, _) => (false, true),
                (false, '\\') => (true, true),
                (false, '"') => (false, false),
                _ => (false, true),
            };
            continue;
        }
        match c {
            '"' => in_string = true,
            '[' | '{' => {
                depth += 1;
                if c == '{' && depth == 2 {
                    count += 1;
                    if count == element {
                        start = Some(at);
                    }
                }
            }
            ']' | '}' => {
                depth = depth.saturating_sub(1);
                if let (Some(s), 1) = (start, depth) {
                    return Some((s, Some(at)));
                }
            }
            _ => {}
        }
    }
    start.map(|s| (s, None))
}

/// For an element missing `field`: the key it holds instead that is likely a misspelling of it
/// (not one of the fields read, at most two letters apart), as " (is `box` meant to be `bbox`?)".
fn misspelt_key(text: &str, element: usize, field: &str) -> Option<String> {
    let key = element_keys(text, element)?
        .into_iter()
        .filter(|k| !READ.contains(&k.as_str()))
        .find(|k| crate::error::likely_meant(k, &[field]).is_some())?;
    Some(format!(" (is `{key}` meant to be `{field}`?)"))
}

/// The fields an element may have that the reader reads.
const READ: [&str; 5] = ["image_id", "category_id", "bbox", "score", "embedding"];

/// The keys of the `element`th object of the top array, when it is one.
fn element_keys(text: &str, element: usize) -> Option<Vec<String>> {
    let (start, end) = element_span(text, element)?;
    let object: serde_json::Map<String, serde_json::Value> =
        serde_json::from_str(&text[start..=end?]).ok()?;
    Some(object.into_iter().map(|(k, _)| k).collect())
}

/// Keys of the first element that are not read but are likely misspellings of fields that are
/// (`catgory_id`): a file's elements are written alike, so one warning says it for all, and what
/// the field would have given is lost without it (classes, appearance).
fn note_unread_keys(text: &str, warnings: &mut Warnings) {
    let Some(keys) = element_keys(text, 1) else {
        return;
    };
    // Fields the element lacks (one it has is read, whatever else is near it: `scores`).
    let lacking: Vec<&str> = ["category_id", "embedding"]
        .into_iter()
        .filter(|f| !keys.iter().any(|k| k == f))
        .collect();
    for key in keys.iter().filter(|k| !READ.contains(&k.as_str())) {
        if let Some(field) = crate::error::likely_meant(key, &lacking) {
            let line = field_place(text, 1, Some(key)).map(|(l, _)| l);
            warnings.note(
                line,
                format!(
                    "element 1: `{key}` is not a field this reader reads: is it meant to be \
                     `{field}`? Without it, {} (the other elements alike)",
                    lost_without(field)
                ),
            );
        }
    }
}

/// What an element without `field` goes without (a required field missing is an error, said
/// with its near name by [`misspelt_key`]).
fn lost_without(field: &str) -> &'static str {
    match field {
        "category_id" => "every box is unclassified",
        _ => "the boxes carry no appearance vectors",
    }
}

/// Where `"field"` is written as a key in `object` (followed by a colon): a value that happens to
/// read the same is not taken for it.
fn key_at(object: &str, field: &str) -> Option<usize> {
    let quoted = format!("\"{field}\"");
    object
        .match_indices(&quoted)
        .map(|(k, _)| k)
        .find(|&k| object[k + quoted.len()..].trim_start().starts_with(':'))
}

/// The 1-based line and column of byte `at` of `text`, the column in bytes as serde_json counts.
fn line_and_column(text: &str, at: usize) -> (usize, usize) {
    let before = &text[..at];
    let line = before.matches('\n').count() + 1;
    let column = at - before.rfind('\n').map_or(0, |n| n + 1) + 1;
    (line, column)
}
