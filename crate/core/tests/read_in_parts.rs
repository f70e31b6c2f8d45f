//! The readers' quick reading of usual lines against their general reading, and a file read in
//! two parts against the same file read whole. No outside reference: both sides are ours, so
//! each check is a relation between two readings of the same rows. For the quick reading the
//! relation is that a space before a line changes nothing a reader returns (every line is
//! trimmed before it is read), while the quick reading never takes a line that starts with one.

use throughline_core::detections::{cut_near, merge, read_detections};

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
    "2,3,10.5,-20.25,30.,.5,1,2,x,y,z",
    "1,-1,275,71,143,57,0,86,-1,-1,-1",
    "1,-1,275,71,143,57,0,878",
    "1,-1,275,71,143,57,0,878,",
    "1,-1,275,71,143,57,0,878,1",
    "1,-1,275,71,143,57,0,12,1",
    "1,-1,275,71,143,57,0,12,0.5,7",
    "1,-1,275,71,143,57,0.0,12",
    "1,-1,275,71,143,57,0,9",
    "1,-1,10,20,30,40,0.9,-1,-1,-1,",
    "1,-1,10,20,30,40,0.9,-1,-1,-1, ,\t",
    "1,-1,10,20,30,40,0.9,-1,-1,-1,,5",
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
    "# footage_frames: 750",
    "# footage_frames: 99999999999",
    "# footage_frames: -3",
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

/// `bytes` cut after every byte in turn (the cut moves on to the next line end) and read in two
/// parts give what reading them whole gives: the same report, or the same error.
fn check_halves(bytes: &[u8]) {
    let whole = read_detections(bytes);
    let mut cuts = 0;
    for near in 0..=bytes.len() {
        let Some(cut) = cut_near(bytes, near) else {
            continue;
        };
        cuts += 1;
        let parts = merge(cut.read_first(bytes), cut.read_second(bytes));
        let text = String::from_utf8_lossy(bytes);
        assert_eq!(
            parts, whole,
            "{text:?} cut at {} (line {})",
            cut.at, cut.line
        );
    }
    assert!(
        cuts > 0,
        "{:?} was never cut",
        String::from_utf8_lossy(bytes)
    );
}

#[test]
fn benchmark_text_read_in_two_parts_reads_as_a_whole() {
    let rows = "1,-1,10,20,30,40,0.9,-1\n2,-1,11,21,30,40,0.8,3\n2,-1,12,22,30,40,0.7,5\n";
    check_halves(rows.as_bytes());
    check_halves(rows.replace('\n', "\r\n").as_bytes());
    check_halves(format!("\u{feff}{rows}").as_bytes());
    check_halves(format!("# café ☕ 1,2\n\n{rows}# é\n   \n{rows}").as_bytes());
    // The footage's length recorded at the top (boxes found in footage), or further down.
    check_halves(format!("# footage_frames: 900\n{rows}{rows}").as_bytes());
    check_halves(format!("{rows}{rows}# footage_frames: 900\n{rows}").as_bytes());
    // Frames out of order on either side of the cut: sorted, rows of a frame in file order.
    check_halves(format!("{rows}1,-1,9,9,9,9,0.5,5\n3,-1,8,8,8,8,0.5,7\n{rows}").as_bytes());
    // Classes first named in the second part, and named again there.
    check_halves(
        format!("{rows}3,-1,1,1,1,1,0.5,9\n3,-1,1,1,1,1,0.5,3\n4,-1,1,1,1,1,0.5,9").as_bytes(),
    );
    // Errors in either part, and in both (the first in the file wins).
    for bad in [
        "2,-1,x,20,30,40,0.9",
        "2,-1,10,20",
        "0,-1,10,20,30,40,0.9",
        "2,-1,10,20,-3,40,0.9",
        "2,-1,1e13,20,30,40,0.9",
    ] {
        check_halves(format!("{bad}\n{rows}{rows}").as_bytes());
        check_halves(format!("{rows}{rows}{bad}\n").as_bytes());
        check_halves(format!("{rows}{bad}\n{rows}{bad}\n{rows}").as_bytes());
    }
    // Bytes that are not UTF-8 late in the file win over a bad row early in it.
    let mut late = format!("2,-1,x,20,30,40,0.9\n{rows}{rows}").into_bytes();
    late.extend_from_slice(b"5,-1,1,1,1,1,0.5,\xff\n");
    check_halves(&late);
    let mut early = rows.as_bytes().to_vec();
    early.extend_from_slice(b"5,-1,1,1,1,1,0.5,\xff\n");
    early.extend_from_slice(rows.as_bytes());
    check_halves(&early);
}

#[test]
fn warnings_read_in_two_parts_are_kept_and_counted_as_in_one() {
    let tiny = "1,-1,1,1,0,1,0.5\n";
    let loud = "1,-1,1,1,1,1,1.5\n";
    let fine = "1,-1,1,1,1,1,0.5\n";
    check_halves(format!("{fine}{}{loud}{}", tiny.repeat(12), tiny.repeat(12)).as_bytes());
    check_halves(format!("{}{loud}{}{loud}{fine}", tiny.repeat(19), tiny.repeat(3)).as_bytes());
    check_halves(format!("{loud}{}{loud}{}", tiny.repeat(25), tiny.repeat(25)).as_bytes());
    check_halves(format!("{}{}{loud}", fine.repeat(3), tiny.repeat(40)).as_bytes());
    check_halves(tiny.repeat(30).as_bytes());
    // Rows carrying object ids (tracks given as detections): one warning in all, with the one
    // about scores, wherever the cut falls.
    let with_id = "2,7,1,1,1,1,0.5\n";
    check_halves(
        format!(
            "{}{with_id}{}{with_id}{loud}",
            tiny.repeat(19),
            tiny.repeat(3)
        )
        .as_bytes(),
    );
    check_halves(
        format!(
            "{}{with_id}{loud}{}{with_id}",
            fine.repeat(40),
            tiny.repeat(2)
        )
        .as_bytes(),
    );
    check_halves(format!("{with_id}{}{with_id}{}", tiny.repeat(25), tiny.repeat(25)).as_bytes());
    // Scores perhaps written with a decimal comma: one warning in all, wherever the cut falls.
    let comma = "3,-1,1,1,1,1,0,878\n";
    check_halves(format!("{}{comma}{}{comma}{loud}", tiny.repeat(19), fine.repeat(3)).as_bytes());
    check_halves(format!("{comma}{}{comma}{}", tiny.repeat(25), tiny.repeat(25)).as_bytes());
    // A last row with no line break after it: named last, past the kept warnings too.
    let open = "9,-1,1,1,1,1,0.5";
    check_halves(format!("{}{loud}{open}", tiny.repeat(25)).as_bytes());
    check_halves(format!("{}{open}", fine.repeat(30)).as_bytes());
}

#[test]
fn csv_read_in_two_parts_reads_as_a_whole() {
    // A header column under a near name (`clas`): said once, by the part that reads the header.
    let near = "frame,x,y,w,h,score,clas\n1,1,1,1,1,0.5,a\n2,1,1,1,0,0.5,b\n3,1,1,1,1,1.5,c\n";
    check_halves(near.as_bytes());
    check_halves(format!("{near}{}", "4,1,1,1,1,0.5,d\n".repeat(30)).as_bytes());
    let header = "# made by hand\n\nframe,x,y,w,h,score,class,e0,e1\n";
    let rows =
        "1,1,2,3,4,0.5,car,0.1,0.2\n2,1,2,3,4,0.5,,0.3,0.4\n2,1,2,3,4,0.5,\"bus, red\",0.5,0.6\n";
    check_halves(format!("{header}{rows}{rows}").as_bytes());
    check_halves(
        format!("{header}{rows}3,1,2,3,4,0.5,van,1,2\n1,5,5,5,5,0.5,car,3,4\n").as_bytes(),
    );
    check_halves(
        format!("\u{feff}{header}{rows}")
            .replace('\n', "\r\n")
            .as_bytes(),
    );
    for bad in [
        "2,1,2,3,4,0.5,car,0.1",
        "2,1,2,3,4,x,car,0.1,0.2",
        "2,1,2,0,4,0.5,car,0.1,0.2",
    ] {
        check_halves(format!("{header}{bad}\n{rows}{rows}").as_bytes());
        check_halves(format!("{header}{rows}{rows}{bad}\n").as_bytes());
    }
    check_halves(format!("frame,x,y,w,h\n{rows}").as_bytes());
}

#[test]
fn too_many_classes_over_two_parts_is_the_whole_readers_error() {
    // 40,000 classes in the first part and 30,000 more in the second: the 65,537th class is
    // the error (65,536 are numbered), before a bad row further on in the second part.
    let mut text = String::new();
    for c in 1..=70_000 {
        text.push_str(&format!("1,-1,1,1,1,1,0.5,{c}\n"));
    }
    text.push_str("1,-1,x,1,1,1,0.5\n");
    let bytes = text.as_bytes();
    let whole = read_detections(bytes).expect_err("too many classes");
    assert_eq!(whole.line, Some(65_537));
    for near in [bytes.len() / 2, bytes.len() * 4 / 7, bytes.len() - 30] {
        let cut = cut_near(bytes, near).expect("a cut");
        let parts = merge(cut.read_first(bytes), cut.read_second(bytes));
        assert_eq!(parts, Err(whole.clone()), "cut at line {}", cut.line);
    }
}

#[test]
fn files_better_read_whole_are_not_cut() {
    for text in [
        "[{\"image_id\":1,\"category_id\":1,\"bbox\":[1,2,3,4],\"score\":0.5}]\n\n",
        "1,-1,1,1,1,1,0.5",
        "# only\n# comments\n",
        "",
    ] {
        for near in 0..=text.len() {
            assert!(cut_near(text.as_bytes(), near).is_none(), "{text:?}");
        }
    }
    let mut binary = b"1,-1,1,1,1,1,0.5\n\0\n".to_vec();
    binary.extend_from_slice(b"1,-1,1,1,1,1,0.5\n");
    assert!(cut_near(&binary, 0).is_none());
}
