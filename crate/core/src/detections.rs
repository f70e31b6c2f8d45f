//! Readers for detection files: the benchmark text format, CSV with a header, and the JSON array of
//! detection results. The format is recognised from the content, not the file name.
//!
//! Every reader takes the whole file as bytes and returns [`Detections`] sorted by frame, with a list
//! of warnings for rows it had to pass over (each counted), or a [`ReadError`] naming the line and
//! column and saying what to fix. Boxes are pixels, top-left x/y + width/height; frames are 1-based.

use crate::geometry::BBox;
use serde::de::{self, DeserializeSeed, SeqAccess, Visitor};
use std::cell::RefCell;
use std::collections::HashMap;
use std::fmt;

/// One detected object in one frame.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Detection {
    /// Frame number, 1-based.
    pub frame: u32,
    /// Box in pixels, top-left x/y + width/height.
    pub bbox: BBox,
    /// Detector confidence, usually in `[0, 1]`.
    pub score: f64,
    /// Index into [`Detections::classes`], when the file names a class.
    pub class: Option<u16>,
    /// Index of this row's vector in [`Detections::embedding`], when the file carries embeddings.
    pub embedding: Option<u32>,
}

/// All detections of a file, sorted by frame (stable: rows of one frame keep their file order).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Detections {
    pub rows: Vec<Detection>,
    /// Class names in order of first appearance; numeric classes keep their digits as the name.
    pub classes: Vec<String>,
    /// Length of each appearance vector; 0 when the file carries none.
    pub embedding_dim: usize,
    /// All appearance vectors, one after another.
    pub embeddings: Vec<f32>,
}

impl Detections {
    /// The appearance vector of a detection, if it has one.
    pub fn embedding(&self, d: &Detection) -> Option<&[f32]> {
        let i = d.embedding? as usize * self.embedding_dim;
        self.embeddings.get(i..i + self.embedding_dim)
    }

    /// Name of a class index.
    pub fn class_name(&self, class: Option<u16>) -> Option<&str> {
        class
            .and_then(|c| self.classes.get(c as usize))
            .map(String::as_str)
    }

    /// Last frame that has a detection (0 when there are none).
    pub fn last_frame(&self) -> u32 {
        self.rows.last().map_or(0, |d| d.frame)
    }

    /// Detections grouped by frame: `(frame, rows)` in increasing frame order; frames without rows are
    /// not listed.
    pub fn by_frame(&self) -> impl Iterator<Item = (u32, &[Detection])> {
        self.rows
            .chunk_by(|a, b| a.frame == b.frame)
            .map(|chunk| (chunk[0].frame, chunk))
    }

    fn intern_class(&mut self, index: &mut HashMap<String, u16>, name: &str) -> Option<u16> {
        if let Some(&i) = index.get(name) {
            return Some(i);
        }
        let i = u16::try_from(self.classes.len()).ok()?;
        self.classes.push(name.to_string());
        index.insert(name.to_string(), i);
        Some(i)
    }

    fn sort_by_frame(&mut self) {
        if !self.rows.is_sorted_by_key(|d| d.frame) {
            self.rows.sort_by_key(|d| d.frame);
        }
    }
}

/// The formats the readers recognise.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum DetectionFormat {
    /// `frame,id,x,y,w,h,score[,class…]`, no header.
    BenchmarkText,
    /// CSV whose header names `frame,x,y,w,h,score` (and optionally `class`, `e0,e1,…`).
    CsvWithHeader,
    /// JSON array of `{image_id, category_id, bbox: [x,y,w,h], score}`.
    JsonResults,
}

impl fmt::Display for DetectionFormat {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Self::BenchmarkText => "benchmark text (frame,id,x,y,w,h,score)",
            Self::CsvWithHeader => "CSV with header",
            Self::JsonResults => "JSON detection results",
        })
    }
}

/// A row the reader passed over, and why.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Warning {
    /// 1-based line, when known (JSON warnings name the element in the message instead).
    pub line: Option<usize>,
    pub message: String,
}

/// What a reader returns: the detections, the format it recognised, and what it passed over.
#[derive(Debug, Clone, PartialEq)]
pub struct ReadReport {
    pub detections: Detections,
    pub format: DetectionFormat,
    /// The first few warnings, in file order.
    pub warnings: Vec<Warning>,
    /// How many rows were passed over in all (may exceed `warnings.len()`).
    pub skipped_rows: usize,
}

/// At most this many warnings are kept; the rest are only counted.
pub const MAX_WARNINGS: usize = 20;

/// What went wrong while reading.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ReadErrorKind {
    Empty,
    Binary,
    BadNumber,
    NotFinite,
    NegativeSize,
    BadFrame,
    MissingColumn,
    WrongColumnCount,
    BadHeader,
    BadJson,
    Embedding,
    TooManyClasses,
}

/// A reading error with the place in the input where it applies.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ReadError {
    pub kind: ReadErrorKind,
    /// 1-based line, when the error belongs to one.
    pub line: Option<usize>,
    /// 1-based column (field number for text formats, character for JSON).
    pub column: Option<usize>,
    /// What is wrong and what to fix.
    pub message: String,
}

impl ReadError {
    pub fn new(kind: ReadErrorKind, message: impl Into<String>) -> Self {
        Self {
            kind,
            line: None,
            column: None,
            message: message.into(),
        }
    }

    pub fn at(mut self, line: usize, column: Option<usize>) -> Self {
        self.line = Some(line);
        self.column = column;
        self
    }
}

impl fmt::Display for ReadError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match (self.line, self.column) {
            (Some(l), Some(c)) => write!(f, "line {l}, column {c}: {}", self.message),
            (Some(l), None) => write!(f, "line {l}: {}", self.message),
            _ => f.write_str(&self.message),
        }
    }
}

impl std::error::Error for ReadError {}

struct Warnings {
    kept: Vec<Warning>,
    count: usize,
}

impl Warnings {
    fn new() -> Self {
        Self {
            kept: Vec::new(),
            count: 0,
        }
    }

    fn push(&mut self, line: Option<usize>, message: impl Into<String>) {
        self.count += 1;
        if self.kept.len() < MAX_WARNINGS {
            self.kept.push(Warning {
                line,
                message: message.into(),
            });
        }
    }
}

/// Reads detections from a whole file, recognising the format from its content.
pub fn read_detections(bytes: &[u8]) -> Result<ReadReport, ReadError> {
    let text = as_text(bytes)?;
    let body = text.trim_start();
    if body.is_empty() {
        return Err(ReadError::new(
            ReadErrorKind::Empty,
            "the file is empty: expected detections as benchmark text (frame,id,x,y,w,h,score), \
             CSV with a header, or a JSON array",
        ));
    }
    if body.starts_with('[') || body.starts_with('{') {
        return read_json(text);
    }
    let first = text
        .lines()
        .map(str::trim)
        .find(|l| !l.is_empty() && !l.starts_with('#'))
        .unwrap_or("");
    let is_header = split_fields(first)
        .iter()
        .any(|f| !f.is_empty() && f.parse::<f64>().is_err());
    if is_header {
        read_csv_with_header(text)
    } else {
        read_benchmark_text(text)
    }
}

pub fn as_text(bytes: &[u8]) -> Result<&str, ReadError> {
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    let looks_binary = bytes.iter().take(1 << 16).any(|&b| b == 0);
    if looks_binary {
        return Err(ReadError::new(
            ReadErrorKind::Binary,
            "this is a binary file, not a detections file: expected text (benchmark text, CSV) or JSON; \
             a video goes in as footage, not as detections",
        ));
    }
    std::str::from_utf8(bytes).map_err(|e| {
        let line = bytes[..e.valid_up_to()]
            .iter()
            .filter(|&&b| b == b'\n')
            .count()
            + 1;
        ReadError::new(
            ReadErrorKind::Binary,
            "the file is not UTF-8 text: save it as UTF-8 (plain ASCII digits and commas are fine)",
        )
        .at(line, None)
    })
}

/// Splits a CSV line on commas, honouring double quotes around a field.
pub fn split_fields(line: &str) -> Vec<&str> {
    let mut fields = Vec::new();
    let mut start = 0;
    let mut in_quotes = false;
    for (i, ch) in line.char_indices() {
        match ch {
            '"' => in_quotes = !in_quotes,
            ',' if !in_quotes => {
                fields.push(unquote(&line[start..i]));
                start = i + 1;
            }
            _ => {}
        }
    }
    fields.push(unquote(&line[start..]));
    fields
}

fn unquote(field: &str) -> &str {
    let f = field.trim();
    f.strip_prefix('"')
        .and_then(|f| f.strip_suffix('"'))
        .unwrap_or(f)
}

/// Parses the common plain form `[-]digits[.digits]` with at most 15 significant digits exactly:
/// the digits form an integer below 2^53 (exact in f64) and one division by an exact power of ten
/// rounds correctly (Clinger's fast path). Anything else returns `None` and goes to `str::parse`.
fn parse_plain_decimal(field: &str) -> Option<f64> {
    const POW10: [f64; 16] = [
        1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
    ];
    let bytes = field.as_bytes();
    let (negative, digits) = match bytes.first() {
        Some(b'-') => (true, &bytes[1..]),
        _ => (false, bytes),
    };
    if digits.is_empty() || digits.len() > 16 {
        return None;
    }
    let mut mantissa: u64 = 0;
    let mut count = 0;
    let mut decimals = None;
    for (i, &b) in digits.iter().enumerate() {
        match b {
            b'0'..=b'9' => {
                mantissa = mantissa * 10 + u64::from(b - b'0');
                count += 1;
            }
            b'.' if decimals.is_none() => decimals = Some(digits.len() - i - 1),
            _ => return None,
        }
    }
    let decimals = decimals.unwrap_or(0);
    if count == 0 || count > 15 || decimals >= POW10.len() {
        return None;
    }
    let v = mantissa as f64 / POW10[decimals];
    Some(if negative { -v } else { v })
}

pub fn number(field: &str, name: &str, line: usize, column: usize) -> Result<f64, ReadError> {
    let parsed = match parse_plain_decimal(field) {
        Some(v) => Ok(v),
        None => field.parse::<f64>(),
    };
    let v: f64 = parsed.map_err(|_| {
        ReadError::new(
            ReadErrorKind::BadNumber,
            format!("`{field}` in column `{name}` is not a number"),
        )
        .at(line, Some(column))
    })?;
    if !v.is_finite() {
        return Err(ReadError::new(
            ReadErrorKind::NotFinite,
            format!("column `{name}` is `{field}`: every value must be a finite number"),
        )
        .at(line, Some(column)));
    }
    Ok(v)
}

pub fn frame_number(v: f64, line: usize, column: usize) -> Result<u32, ReadError> {
    if v.fract() != 0.0 || v < 0.0 || v > u32::MAX as f64 {
        return Err(ReadError::new(
            ReadErrorKind::BadFrame,
            format!("frame `{v}` is not a whole number of 1 or more"),
        )
        .at(line, Some(column)));
    }
    if v == 0.0 {
        return Err(ReadError::new(
            ReadErrorKind::BadFrame,
            "frame 0 found, but frames are numbered from 1: if the file counts from 0, add 1 to every frame",
        )
        .at(line, Some(column)));
    }
    Ok(v as u32)
}

/// Checks a box; `Ok(None)` (with a warning) for a zero-size box, an error for a negative size.
fn checked_box(
    b: BBox,
    line: usize,
    w_column: usize,
    warnings: &mut Warnings,
) -> Result<Option<BBox>, ReadError> {
    for (v, name, col) in [(b.w, "w", w_column), (b.h, "h", w_column + 1)] {
        if v < 0.0 {
            return Err(ReadError::new(
                ReadErrorKind::NegativeSize,
                format!(
                    "box {name} is {v}: sizes must not be negative (boxes are top-left x,y then width,height, \
                     not two corners)"
                ),
            )
            .at(line, Some(col)));
        }
    }
    if b.w == 0.0 || b.h == 0.0 {
        warnings.push(Some(line), "box with zero width or height passed over");
        return Ok(None);
    }
    Ok(Some(b))
}

fn note_score(score: f64, line: usize, warned: &mut bool, warnings: &mut Warnings) {
    if !(0.0..=1.0).contains(&score) && !*warned {
        *warned = true;
        // Not a skipped row: counted as a warning but the row is kept.
        warnings.kept.push(Warning {
            line: Some(line),
            message: format!(
                "score {score} is outside 0..1; score thresholds assume 0..1 (first such row; rows kept)"
            ),
        });
    }
}

fn finish(
    mut detections: Detections,
    format: DetectionFormat,
    warnings: Warnings,
) -> Result<ReadReport, ReadError> {
    if detections.rows.is_empty() && warnings.count == 0 {
        return Err(ReadError::new(
            ReadErrorKind::Empty,
            format!("the {format} file has no detection rows"),
        ));
    }
    detections.sort_by_frame();
    Ok(ReadReport {
        detections,
        format,
        warnings: warnings.kept,
        skipped_rows: warnings.count,
    })
}

const BENCHMARK_COLUMNS: [&str; 7] = ["frame", "id", "x", "y", "w", "h", "score"];

fn read_benchmark_text(text: &str) -> Result<ReadReport, ReadError> {
    let mut out = Detections::default();
    let mut class_index = HashMap::new();
    let mut warnings = Warnings::new();
    let mut warned_score = false;
    out.rows.reserve(text.len() / 40);
    for (i, raw) in text.lines().enumerate() {
        let line = i + 1;
        let l = raw.trim();
        if l.is_empty() || l.starts_with('#') {
            continue;
        }
        // Benchmark text has no quoting: fields are cut in place in one pass over the line's bytes,
        // without a vector per line. Cutting at ASCII commas keeps every piece valid UTF-8.
        let mut cut = [""; 8];
        let mut count = 0;
        let mut start = 0;
        for (k, &b) in l
            .as_bytes()
            .iter()
            .chain(std::iter::once(&b','))
            .enumerate()
        {
            if b == b',' {
                if count < cut.len() {
                    cut[count] = l.get(start..k).unwrap_or("").trim();
                }
                count += 1;
                start = k + 1;
            }
        }
        let fields = &cut[..count.min(cut.len())];
        if fields.len() < 7 {
            return Err(ReadError::new(
                ReadErrorKind::MissingColumn,
                format!(
                    "{count} columns, but the benchmark text format needs at least 7: frame,id,x,y,w,h,score"
                ),
            )
            .at(line, None));
        }
        let mut v = [0.0; 7];
        for (k, name) in BENCHMARK_COLUMNS.iter().enumerate() {
            v[k] = number(fields[k], name, line, k + 1)?;
        }
        let frame = frame_number(v[0], line, 1)?;
        let Some(bbox) = checked_box(BBox::new(v[2], v[3], v[4], v[5]), line, 5, &mut warnings)?
        else {
            continue;
        };
        note_score(v[6], line, &mut warned_score, &mut warnings);
        // Column 8 holds a class in ground-truth style files; -1 (or a world coordinate) means none.
        let class = match fields.get(7).map(|f| f.parse::<i64>()) {
            Some(Ok(c)) if c > 0 => {
                let class = out.intern_class(&mut class_index, &c.to_string());
                if class.is_none() {
                    return Err(too_many_classes(line));
                }
                class
            }
            _ => None,
        };
        out.rows.push(Detection {
            frame,
            bbox,
            score: v[6],
            class,
            embedding: None,
        });
    }
    finish(out, DetectionFormat::BenchmarkText, warnings)
}

fn too_many_classes(line: usize) -> ReadError {
    ReadError::new(
        ReadErrorKind::TooManyClasses,
        "more than 65535 different classes: the class column looks like something else",
    )
    .at(line, None)
}

struct CsvColumns {
    frame: usize,
    x: usize,
    y: usize,
    w: usize,
    h: usize,
    score: usize,
    class: Option<usize>,
    embedding: Vec<usize>,
    count: usize,
}

fn csv_columns(header: &[&str], line: usize) -> Result<CsvColumns, ReadError> {
    let names: Vec<String> = header
        .iter()
        .map(|h| h.trim().to_ascii_lowercase())
        .collect();
    let find = |name: &str| names.iter().position(|n| n == name);
    let hint = if header.len() == 1 && header[0].contains(';') {
        " (the file seems to use `;` between fields: save it with commas, and `.` as the decimal point)"
    } else if names
        .iter()
        .any(|n| n == "x2" || n == "x_max" || n == "xmax")
    {
        " (boxes must be top-left x,y and width,height: compute w = x2 - x1 and h = y2 - y1)"
    } else {
        ""
    };
    let required = |name: &str| {
        find(name).ok_or_else(|| {
            ReadError::new(
                ReadErrorKind::BadHeader,
                format!(
                    "the header has no `{name}` column: it must name frame,x,y,w,h,score \
                     (class and e0,e1,… optional); found: {}{hint}",
                    header.join(",")
                ),
            )
            .at(line, None)
        })
    };
    let mut embedding = Vec::new();
    while let Some(i) = find(&format!("e{}", embedding.len())) {
        embedding.push(i);
    }
    let stray = names.iter().position(|n| {
        n.len() > 1
            && n.starts_with('e')
            && n[1..].parse::<usize>().is_ok_and(|k| k >= embedding.len())
    });
    if let Some(i) = stray {
        return Err(ReadError::new(
            ReadErrorKind::BadHeader,
            format!(
                "embedding column `{}` found, but embedding columns must run e0,e1,e2,… without gaps \
                 (the last unbroken one is e{})",
                names[i],
                embedding.len() as i64 - 1
            ),
        )
        .at(line, Some(i + 1)));
    }
    Ok(CsvColumns {
        frame: required("frame")?,
        x: required("x")?,
        y: required("y")?,
        w: required("w")?,
        h: required("h")?,
        score: required("score")?,
        class: find("class"),
        embedding,
        count: names.len(),
    })
}

fn read_csv_with_header(text: &str) -> Result<ReadReport, ReadError> {
    let mut out = Detections::default();
    let mut class_index = HashMap::new();
    let mut warnings = Warnings::new();
    let mut warned_score = false;
    let mut columns: Option<CsvColumns> = None;
    let mut vector = Vec::new();
    for (i, raw) in text.lines().enumerate() {
        let line = i + 1;
        let l = raw.trim();
        if l.is_empty() || l.starts_with('#') {
            continue;
        }
        let fields = split_fields(l);
        let Some(cols) = &columns else {
            let cols = csv_columns(&fields, line)?;
            out.embedding_dim = cols.embedding.len();
            columns = Some(cols);
            continue;
        };
        if fields.len() != cols.count {
            return Err(ReadError::new(
                ReadErrorKind::WrongColumnCount,
                format!(
                    "{} fields, but the header names {} columns",
                    fields.len(),
                    cols.count
                ),
            )
            .at(line, None));
        }
        let get = |k: usize, name: &str| number(fields[k], name, line, k + 1);
        let frame = frame_number(get(cols.frame, "frame")?, line, cols.frame + 1)?;
        let b = BBox::new(
            get(cols.x, "x")?,
            get(cols.y, "y")?,
            get(cols.w, "w")?,
            get(cols.h, "h")?,
        );
        let score = get(cols.score, "score")?;
        vector.clear();
        for (k, &c) in cols.embedding.iter().enumerate() {
            vector.push(get(c, &format!("e{k}"))? as f32);
        }
        let Some(bbox) = checked_box(b, line, cols.w + 1, &mut warnings)? else {
            continue;
        };
        note_score(score, line, &mut warned_score, &mut warnings);
        let class = match cols.class.map(|c| fields[c]) {
            Some(name) if !name.is_empty() => {
                let class = out.intern_class(&mut class_index, name);
                if class.is_none() {
                    return Err(too_many_classes(line));
                }
                class
            }
            _ => None,
        };
        let embedding = if vector.is_empty() {
            None
        } else {
            let index = (out.embeddings.len() / vector.len()) as u32;
            out.embeddings.extend_from_slice(&vector);
            Some(index)
        };
        out.rows.push(Detection {
            frame,
            bbox,
            score,
            class,
            embedding,
        });
    }
    if columns.is_none() {
        return Err(ReadError::new(
            ReadErrorKind::Empty,
            "the CSV file has a header but no rows",
        ));
    }
    finish(out, DetectionFormat::CsvWithHeader, warnings)
}

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
    /// The kind of a validation error raised inside the visitor, to keep it apart from syntax errors.
    failure: &'a RefCell<Option<ReadErrorKind>>,
}

impl JsonSink<'_> {
    fn fail<E: de::Error>(&self, kind: ReadErrorKind, message: String) -> E {
        *self.failure.borrow_mut() = Some(kind);
        E::custom(message)
    }

    fn push<E: de::Error>(&mut self, n: usize, d: JsonDetection) -> Result<(), E> {
        let frame = match d.image_id.as_f64() {
            Some(v) if v.fract() == 0.0 && v >= 1.0 && v <= u32::MAX as f64 => v as u32,
            Some(0.0) => {
                return Err(self.fail(
                    ReadErrorKind::BadFrame,
                    format!(
                    "element {n}: image_id 0, but frames are numbered from 1: if the file counts \
                         from 0, add 1 to every image_id"
                ),
                ))
            }
            _ => {
                return Err(self.fail(
                    ReadErrorKind::BadFrame,
                    format!(
                    "element {n}: image_id must be the frame number, a whole number of 1 or more"
                ),
                ))
            }
        };
        if d.bbox.len() != 4 {
            return Err(self.fail(
                ReadErrorKind::MissingColumn,
                format!(
                    "element {n}: bbox must have 4 numbers [x, y, w, h], found {}",
                    d.bbox.len()
                ),
            ));
        }
        let b = BBox::new(d.bbox[0], d.bbox[1], d.bbox[2], d.bbox[3]);
        if b.w < 0.0 || b.h < 0.0 {
            return Err(self.fail(
                ReadErrorKind::NegativeSize,
                format!(
                    "element {n}: bbox width and height must not be negative (bbox is [x, y, w, h], \
                     not two corners)"
                ),
            ));
        }
        if b.w == 0.0 || b.h == 0.0 {
            self.warnings.push(
                None,
                format!("element {n}: box with zero width or height passed over"),
            );
            return Ok(());
        }
        let class = match &d.category_id {
            None | Some(serde_json::Value::Null) => None,
            Some(serde_json::Value::String(s)) => Some(s.clone()),
            Some(v) => Some(v.to_string()),
        };
        let class = match class {
            Some(name) => match self.out.intern_class(&mut self.classes, &name) {
                Some(c) => Some(c),
                None => {
                    return Err(self.fail(
                        ReadErrorKind::TooManyClasses,
                        "more than 65535 classes".into(),
                    ))
                }
            },
            None => None,
        };
        let embedding = match d.embedding {
            None => None,
            Some(v) => {
                if self.out.embedding_dim == 0 {
                    self.out.embedding_dim = v.len();
                }
                if v.is_empty() || v.len() != self.out.embedding_dim {
                    return Err(self.fail(
                        ReadErrorKind::Embedding,
                        format!(
                            "element {n}: embedding has {} values, earlier ones have {}: every embedding \
                             must have the same length",
                            v.len(),
                            self.out.embedding_dim
                        ),
                    ));
                }
                if v.iter().any(|x| !x.is_finite()) {
                    return Err(self.fail(
                        ReadErrorKind::NotFinite,
                        format!("element {n}: embedding values must be finite numbers"),
                    ));
                }
                let index = (self.out.embeddings.len() / v.len()) as u32;
                self.out.embeddings.extend_from_slice(&v);
                Some(index)
            }
        };
        self.out.rows.push(Detection {
            frame,
            bbox: b,
            score: d.score,
            class,
            embedding,
        });
        Ok(())
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
        while let Some(d) = seq.next_element::<JsonDetection>()? {
            n += 1;
            self.push(n, d)?;
        }
        Ok(())
    }
}

fn read_json(text: &str) -> Result<ReadReport, ReadError> {
    let mut out = Detections::default();
    let mut warnings = Warnings::new();
    let failure = RefCell::new(None);
    let sink = JsonSink {
        out: &mut out,
        classes: HashMap::new(),
        warnings: &mut warnings,
        failure: &failure,
    };
    let mut de = serde_json::Deserializer::from_str(text);
    let result = sink.deserialize(&mut de).and_then(|()| de.end());
    if let Err(e) = result {
        let kind = failure.borrow().unwrap_or(ReadErrorKind::BadJson);
        let mut message = e.to_string();
        // serde_json appends " at line L column C"; the position is reported separately.
        if let Some(cut) = message.rfind(" at line ") {
            message.truncate(cut);
        }
        if kind == ReadErrorKind::BadJson {
            message = format!(
                "{message}; expected a JSON array of {{\"image_id\": frame, \"category_id\": class, \
                 \"bbox\": [x, y, w, h], \"score\": s}}"
            );
        }
        return Err(ReadError::new(kind, message).at(e.line().max(1), Some(e.column().max(1))));
    }
    finish(out, DetectionFormat::JsonResults, warnings)
}

fn trimmed(v: f64) -> String {
    let r = (v * 100.0).round() / 100.0;
    if r == 0.0 {
        "0".into()
    } else {
        format!("{r}")
    }
}

/// Writes detections in the benchmark text format: `frame,-1,x,y,w,h,score,-1,-1,-1`.
pub fn to_benchmark_text(d: &Detections) -> String {
    use std::fmt::Write as _;
    let mut out = String::with_capacity(d.rows.len() * 40);
    for r in &d.rows {
        let b = r.bbox;
        let _ = writeln!(
            out,
            "{},-1,{},{},{},{},{},-1,-1,-1",
            r.frame,
            trimmed(b.x),
            trimmed(b.y),
            trimmed(b.w),
            trimmed(b.h),
            (r.score * 1000.0).round() / 1000.0
        );
    }
    out
}

/// Detections as a file's text: CSV ([`to_csv`]) when they carry classes or appearance vectors,
/// which the benchmark text format cannot hold; the benchmark text format otherwise.
pub fn to_file_text(d: &Detections) -> String {
    if d.classes.is_empty() && d.embedding_dim == 0 {
        to_benchmark_text(d)
    } else {
        to_csv(d)
    }
}

/// Writes detections as CSV with a header: `frame,x,y,w,h,score,class[,e0,e1,…]`.
pub fn to_csv(d: &Detections) -> String {
    use std::fmt::Write as _;
    let mut out = String::from("frame,x,y,w,h,score,class");
    for k in 0..d.embedding_dim {
        let _ = write!(out, ",e{k}");
    }
    out.push('\n');
    for r in &d.rows {
        let b = r.bbox;
        let _ = write!(
            out,
            "{},{},{},{},{},{},{}",
            r.frame,
            trimmed(b.x),
            trimmed(b.y),
            trimmed(b.w),
            trimmed(b.h),
            (r.score * 1000.0).round() / 1000.0,
            d.class_name(r.class).unwrap_or("")
        );
        if let Some(e) = d.embedding(r) {
            for v in e {
                let _ = write!(out, ",{}", (v * 1e4).round() / 1e4);
            }
        }
        out.push('\n');
    }
    out
}
