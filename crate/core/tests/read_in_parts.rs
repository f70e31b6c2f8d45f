//! The readers' quick reading of usual lines against their general reading, and a file read in
//! two parts against the same file read whole. No outside reference: both sides are ours, so
//! each check is a relation between two readings of the same rows. For the quick reading the
//! relation is that a space before a line changes nothing a reader returns (every line is
//! trimmed before it is read), while the quick reading never takes a line that starts with one.

use throughline_core::detections::read_detections;

/// The same text with a space before every line (after a byte-order mark): the quick reading
/// never takes such a line, the general one trims the space away.
fn spaced(text: &str) -> String {
    let (bom, body) = match text.strip_prefix('\u{feff}') {
        Some(b) => ("\u{feff}", b),
        None => ("", text),
    };
    let lines: String = body
        .split_inclusive('\n')
        .map(|l| format!(" {l}"))
        .collect();
    format!("{bom}{lines}")
}

/// `text` read as it is (usual lines read quickly) and read with every line left to the
/// general reading give the same rows, warnings and counts, or the same error.
fn check_quick(text: &str) {
    let quick = read_detections(text.as_bytes());
    let general = read_detections(spaced(text).as_bytes());
    match (quick, general) {
        (Ok(a), Ok(b)) => assert_eq!(a, b, "{text:?}"),
        (Err(a), Err(b)) => assert_eq!(a, b, "{text:?}"),
        (a, b) => panic!("{text:?}: quick {a:?}, general {b:?}"),
    }
}

const BENCHMARK_LINES: &[&str] = &[
    "1,-1,10,20,30,40,0.9",
    "1,-1,10,20,30,40,0.9,-1,-1,-1",
    "2,3,10.5,-20.25,30.,.5,1,2",
    "2,3,10.5,-20.25,30.,.5,1,2,x,y",
    "3,-1,10,20,30,40,0.9,007",
    "3,-1,10,20,30,40,0.9,+3",
    "3,-1,10,20,30,40,0.9,-0",
    "3,-1,10,20,30,40,0.9,",
    "3,-1,10,20,30,40,0.9,1234567890123456789",
    "3,-1,10,20,30,40,0.9,99999999999999999999",
    "4,-1,1e1,20,30,40,0.9",
    "4,-1,-.5,20,30,40,0.9",
    "4,-1,-,20,30,40,0.9",
    "4,-1,1.2.3,20,30,40,0.9",
    "4,-1,12345678901234567,20,30,40,0.9",
    "4,-1,0.0000000000000001,20,30,40,0.9",
    "4,-1,1000000000001,20,30,40,0.9",
    "4,-1,999999999999,20,30,40,0.9",
    "4,-1,nan,20,30,40,0.9",
    "5,-1,10,20,-30,40,0.9",
    "5,-1,10,20,0.001,40,0.9",
    "5,-1,10,20,30,40,1.5",
    "0,-1,10,20,30,40,0.9",
    "1.5,-1,10,20,30,40,0.9",
    "5,-1,10,20,30",
    "5,-1,10, 20,30,40,0.9",
    "5,-1,10,20,30,40,0.9 ",
    "5,-1,10,20,30,40,0.9\t,-1",
    "5,-1,10,20,30,40,0.9\r",
    "5,-1,1é,20,30,40,0.9",
    "# a comment, 1,2,3",
    "",
    "   ",
];

#[test]
fn benchmark_text_quick_lines_read_as_the_general_reading() {
    let good = "1,-1,1,2,3,4,0.5\n";
    for line in BENCHMARK_LINES {
        for end in ["\n", "\r\n", ""] {
            check_quick(&format!("{good}{line}{end}{good}"));
            check_quick(&format!("{good}{line}{end}"));
            check_quick(&format!("\u{feff}{line}{end}{good}"));
        }
    }
    // Every line at once, and many passed-over rows (more than the warnings kept).
    let good_ones: Vec<&str> = BENCHMARK_LINES
        .iter()
        .copied()
        .filter(|l| read_detections(format!("{l}\n").as_bytes()).is_ok())
        .collect();
    check_quick(&good_ones.join("\n"));
    check_quick(&"1,-1,1,2,0,4,0.5\n".repeat(30));
}

const CSV_HEADERS: &[&str] = &[
    "frame,x,y,w,h,score",
    "frame,x,y,w,h,score,class",
    "score,h,w,y,x,frame,class,note",
    "frame,x,y,w,h,score,class,e1,e0",
    "frame,x,y,w,h,score,e0,e1,e2",
];

/// Rows for a header: every column a value, then each column in turn made unusual.
fn csv_rows(header: &str) -> Vec<String> {
    let names: Vec<&str> = header.split(',').collect();
    let usual = |name: &str| match name {
        "frame" => "3",
        "class" => "pedestrian",
        "note" => "seen twice",
        "score" => "0.75",
        n if n.starts_with('e') => "-0.125",
        _ => "12.5",
    };
    let row = |k: usize, v: &str| {
        let fields: Vec<&str> = (0..names.len())
            .map(|i| if i == k { v } else { usual(names[i]) })
            .collect();
        fields.join(",")
    };
    let mut rows = vec![row(usize::MAX, "")];
    let odd = [
        "",
        " 7",
        "7 ",
        "\"7\"",
        "\"a,b\"",
        "1e2",
        "-0.001",
        "0",
        "2000000000000",
        "piéton",
        "# no",
        "1.5",
        "-3",
        "ab\"c",
    ];
    for k in 0..names.len() {
        for v in odd {
            rows.push(row(k, v));
        }
    }
    rows.push(format!("{},extra", row(usize::MAX, "")));
    rows.push(names[..names.len() - 1].join(","));
    rows
}

#[test]
fn csv_quick_lines_read_as_the_general_reading() {
    for header in CSV_HEADERS {
        let rows = csv_rows(header);
        let good = &rows[0];
        for row in &rows {
            for end in ["\n", "\r\n"] {
                check_quick(&format!("{header}{end}{good}{end}{row}{end}{good}"));
                check_quick(&format!("# first\n\n{header}\n{row}"));
            }
        }
        let fine: Vec<&String> = rows
            .iter()
            .filter(|r| read_detections(format!("{header}\n{r}\n").as_bytes()).is_ok())
            .collect();
        let all: Vec<&str> = fine.iter().map(|r| r.as_str()).collect();
        check_quick(&format!("{header}\n{}\n", all.join("\n")));
    }
}
