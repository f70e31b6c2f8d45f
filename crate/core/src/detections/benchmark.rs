//! The benchmark text format: `frame,id,x,y,w,h,score[,class,…]`, one detection per line, no
//! header; id -1 for plain detections; a positive eighth column is a class number.

use super::{
    checked_box, finish, note_score, Detection, DetectionFormat, Detections, ReadReport, Warnings,
};
use crate::error::{Error, ErrorKind};
use crate::geometry::BBox;
use crate::text::{frame_number, number};
use std::collections::HashMap;

const BENCHMARK_COLUMNS: [&str; 7] = ["frame", "id", "x", "y", "w", "h", "score"];

pub(super) fn read(text: &str) -> Result<ReadReport, Error> {
    let mut out = Detections::default();
    let mut class_index = HashMap::new();
    let mut warnings = Warnings::new();
    let mut warned_score = false;
    out.rows.reserve(super::line_count(text));
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
            return Err(Error::new(
                ErrorKind::MissingColumn,
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
                Some(out.class_on_line(&mut class_index, &c.to_string(), line)?)
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
