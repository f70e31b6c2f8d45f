//! Writing detections: the benchmark text format, or CSV with a header when they carry classes or
//! appearance vectors.

use super::Detections;

fn trimmed(v: f64) -> String {
    let r = (v * 100.0).round() / 100.0;
    if r == 0.0 {
        "0".into()
    } else {
        format!("{r}")
    }
}

/// The comment line that records the footage's length in a file of boxes found in it (its last
/// frames may hold none): `# footage_frames: 750`; read back by the readers ([`super::Detections`]'s
/// `footage_frames`), so a count of the file reaches the footage's end.
pub const FOOTAGE_FRAMES_COMMENT: &str = "# footage_frames: ";

fn length_line(d: &Detections) -> String {
    match d.footage_frames {
        0 => String::new(),
        n => format!("{FOOTAGE_FRAMES_COMMENT}{n}\n"),
    }
}

/// Writes detections in the benchmark text format: `frame,-1,x,y,w,h,score,-1,-1,-1` (after the
/// footage's length, for boxes found in footage).
pub fn to_benchmark_text(d: &Detections) -> String {
    use std::fmt::Write as _;
    let mut out = String::with_capacity(d.rows.len() * 40);
    out.push_str(&length_line(d));
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

/// Writes detections as CSV with a header: `frame,x,y,w,h,score,class[,e0,e1,…]` (after the
/// footage's length, for boxes found in footage).
pub fn to_csv(d: &Detections) -> String {
    use std::fmt::Write as _;
    let mut out = length_line(d);
    out.push_str("frame,x,y,w,h,score,class");
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
