//! CSV with a header naming `frame,x,y,w,h,score`, optionally `class` and appearance columns
//! `e0,e1,…` (in any order; quoted fields allowed).

use super::{
    checked_box, finish, note_score, Detection, DetectionFormat, Detections, ReadReport, Warnings,
};
use crate::error::{Error, ErrorKind};
use crate::geometry::BBox;
use crate::text::{frame_number, number, split_fields_into};
use std::collections::HashMap;

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

fn csv_columns(header: &[&str], line: usize) -> Result<CsvColumns, Error> {
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
            Error::new(
                ErrorKind::BadHeader,
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
        return Err(Error::new(
            ErrorKind::BadHeader,
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

pub(super) fn read(text: &str) -> Result<ReadReport, Error> {
    let mut out = Detections::default();
    let mut class_index = HashMap::new();
    let mut warnings = Warnings::new();
    let mut warned_score = false;
    let mut columns: Option<CsvColumns> = None;
    out.rows.reserve(super::line_count(text));
    let mut vector = Vec::new();
    // The appearance columns' names for messages, made once rather than for every value.
    let mut embedding_names: Vec<String> = Vec::new();
    let mut fields = Vec::new();
    for (i, raw) in text.lines().enumerate() {
        let line = i + 1;
        let l = crate::text::trim(raw);
        if l.is_empty() || l.starts_with('#') {
            continue;
        }
        split_fields_into(l, &mut fields);
        let Some(cols) = &columns else {
            let cols = csv_columns(&fields, line)?;
            out.embedding_dim = cols.embedding.len();
            embedding_names = (0..cols.embedding.len()).map(|k| format!("e{k}")).collect();
            columns = Some(cols);
            continue;
        };
        if fields.len() != cols.count {
            return Err(Error::new(
                ErrorKind::WrongColumnCount,
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
        for (&c, name) in cols.embedding.iter().zip(&embedding_names) {
            vector.push(get(c, name)? as f32);
        }
        let Some(bbox) = checked_box(b, line, cols.w + 1, &mut warnings)? else {
            continue;
        };
        note_score(score, line, &mut warned_score, &mut warnings);
        let class = match cols.class.map(|c| fields[c]) {
            Some(name) if !name.is_empty() => {
                Some(out.class_on_line(&mut class_index, name, line)?)
            }
            _ => None,
        };
        let embedding = out.push_embedding(&vector);
        out.rows.push(Detection {
            frame,
            bbox,
            score,
            class,
            embedding,
        });
    }
    if columns.is_none() {
        return Err(Error::new(
            ErrorKind::Empty,
            "the CSV file has a header but no rows",
        ));
    }
    finish(out, DetectionFormat::CsvWithHeader, warnings)
}
