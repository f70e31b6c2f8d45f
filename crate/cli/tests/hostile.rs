//! Hostile and broken input, each case one a person met or a fuzzer found: a clear message and a
//! non-zero exit (or, where the input is valid, the right answer) within seconds, never a panic, a
//! hang or runaway memory.

mod common;

use common::*;
use std::time::{Duration, Instant};

/// Runs the command line and checks it finished quickly, without a panic.
fn quick(args: &[&str]) -> std::process::Output {
    let started = Instant::now();
    let o = throughline(args);
    // Not a speed test: a guard that the case cannot hang (the work is bounded, seconds at most).
    assert!(
        started.elapsed() < Duration::from_secs(60),
        "{args:?} took {:?}",
        started.elapsed()
    );
    assert!(
        !stderr(&o).contains("panicked"),
        "{args:?} panicked: {}",
        stderr(&o)
    );
    o
}

fn fails_with(args: &[&str], needle: &str) {
    let o = quick(args);
    assert_eq!(o.status.code(), Some(1), "{args:?}: {}", stderr(&o));
    assert!(
        stderr(&o).contains(needle),
        "{args:?}: expected `{needle}` in {}",
        stderr(&o)
    );
}

#[test]
fn a_yuv4mpeg2_header_with_a_non_ascii_byte_is_refused() {
    let dir = scratch("hostile-y4m");
    let f = write(&dir, "bad.y4m", "YUV4MPEG2 é W4 H4\nFRAME\n".as_bytes());
    let o = quick(&["detect", "--y4m", &f]);
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
}

#[test]
fn plans_that_would_make_huge_tables_are_refused() {
    let dir = scratch("hostile-plan");
    for (plan, field) in [
        (r#"{"frame_rate": 1e-300}"#, "frame_rate"),
        (
            r#"{"frame_rate": 25, "interval_minutes": 1e-9}"#,
            "interval_minutes",
        ),
        (
            r#"{"frame_rate": 25, "start": "99999999999-01-01T00:00:00"}"#,
            "start",
        ),
        (
            r#"{"frame_rate": 25, "zones": [{"name": "bow", "polygon": [[0,0],[100,100],[100,0],[0,100]]}]}"#,
            "zones[0].polygon",
        ),
    ] {
        let p = write(&dir, "plan.json", plan.as_bytes());
        fails_with(&["run", &demo("detections.txt"), "--plan", &p], field);
    }
}

#[test]
fn a_detection_at_the_last_possible_frame_is_quick_and_bounded() {
    let dir = scratch("hostile-frame");
    let dets = write(&dir, "d.txt", b"1,-1,10,10,20,40,0.9\n2,-1,11,10,20,40,0.9\n3,-1,12,10,20,40,0.9\n4294967295,-1,10,10,20,40,0.9\n");
    // 4,294,967,295 frames at 25 a second are 5 years: too many 15-minute intervals to tabulate.
    let plan = write(&dir, "plan.json", br#"{"frame_rate": 25, "zones": [{"name": "z", "polygon": [[0,0],[50,0],[50,60],[0,60]]}]}"#);
    fails_with(&["run", &dets, "--plan", &plan], "intervals");
    // At 1000 a second in day-long intervals they are 50 days: counted, quickly, in little memory.
    let plan = write(&dir, "day.json", br#"{"frame_rate": 1000, "interval_minutes": 1440, "zones": [{"name": "z", "polygon": [[0,0],[50,0],[50,60],[0,60]]}]}"#);
    let o = quick(&["run", &dets, "--plan", &plan, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
}

#[test]
fn broken_tracks_files_are_refused_naming_the_track() {
    let dir = scratch("hostile-tracks");
    let plan = demo("plan.json");
    let doc = |boxes: &str| {
        format!(
            r#"{{"format":"throughline-tracks","version":1,"generator":"x","settings":{{"method":"sort","min_score":0.3,"min_iou":0.3,"min_hits":3,"max_age":30,"confirm_score":0.0,"high_score":0.6,"new_track_score":0.7,"low_min_iou":0.5,"max_cosine_distance":0.2,"gallery_size":100,"max_mahalanobis":9.4877}},"frame_count":10,"box_layout":["frame","x","y","w","h","score","observed"],"tracks":[{{"id":1,"class":null,"mean_score":0.9,"first_frame":1,"last_frame":5,"observed_boxes":2,"boxes":{boxes}}}]}}"#
        )
    };
    let unordered = write(
        &dir,
        "unordered.json",
        doc("[[5,0,0,10,10,0.9,1],[2,0,0,10,10,0.9,1]]").as_bytes(),
    );
    fails_with(&["count", &unordered, "--plan", &plan], "increasing frames");
    let negative = write(
        &dir,
        "negative.json",
        doc("[[1,0,0,-10,10,0.9,1]]").as_bytes(),
    );
    fails_with(
        &["count", &negative, "--plan", &plan],
        "has w -10: sizes must not be negative",
    );
    let twice = write(&dir, "twice.txt", b"1,7,0,0,10,10\n1,7,5,5,10,10\n");
    fails_with(
        &["count", &twice, "--plan", &plan],
        "line 2, column 2: id 7 is in frame 1 twice",
    );
}

#[test]
fn manual_counts_too_large_to_be_counts_are_refused_and_the_header_line_is_right() {
    let dir = scratch("hostile-counts");
    let report = dir.join("report.json").display().to_string();
    assert!(throughline(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "-o",
        &report,
        "-q"
    ])
    .status
    .success());
    let huge = write(&dir, "huge.csv", b"screenline,direction,class,interval_start,interval_end,count\nplaza midline,towards camera,,2026-03-02T07:00:00,x,18446744073709551615\nplaza midline,towards camera,,2026-03-02T07:00:00,x,18446744073709551615\n");
    fails_with(
        &["score-counts", "--truth", &huge, &report],
        "line 2, column 6",
    );
    let late_header = write(
        &dir,
        "late.csv",
        b"# a manual count\n\nscreenline,direction,interval_start,count\n",
    );
    fails_with(
        &["score-counts", "--truth", &late_header, &report],
        "line 3:",
    );
}

#[test]
fn a_frame_where_every_box_overlaps_every_other_costs_bounded_time() {
    let dir = scratch("hostile-crowd");
    let mut text = String::new();
    for frame in 1..=4 {
        for k in 0..3000 {
            text.push_str(&format!("{frame},-1,{},100,40,80,0.9\n", 100 + k % 7));
        }
    }
    let dets = write(&dir, "crowd.txt", text.as_bytes());
    let o = quick(&[
        "track",
        &dets,
        "-o",
        &dir.join("t.txt").display().to_string(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    // The sparse solver matches even this crowd exactly, well within its step budget: no frame is
    // reported as matched greedily.
    assert!(
        !stderr(&o).contains("cheapest pair first"),
        "{}",
        stderr(&o)
    );
}

#[test]
fn a_reader_that_goes_away_ends_the_program_quietly() {
    // `throughline track … | head -c 10`: the pipe closes after the first bytes. Filters end
    // quietly then (common practice on Unix: the default action of SIGPIPE), never with a panic.
    use std::io::Read;
    use std::process::{Command, Stdio};
    let mut child = Command::new(env!("CARGO_BIN_EXE_throughline"))
        .args(["track", &demo("detections.txt"), "-q"])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("the binary runs");
    let mut first = [0u8; 10];
    child
        .stdout
        .take()
        .unwrap()
        .read_exact(&mut first)
        .expect("the first bytes");
    // The reader is gone (dropped above); the rest of the output has nowhere to go.
    let o = child.wait_with_output().expect("the program ends");
    let err = stderr(&o);
    assert!(!err.contains("panicked"), "{err}");
    assert_ne!(o.status.code(), Some(101), "{err}");
}

/// A device given as detections (`/dev/zero` never ends): read only as far as the bytes show it is
/// not text, then refused by name. It used to be read whole, gigabytes of memory a few seconds.
#[cfg(unix)]
#[test]
fn an_endless_device_as_detections_is_refused_without_reading_it_all() {
    let o = throughline(&["run", "/dev/zero", "--plan", &demo("plan.json"), "-q"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        stderr(&o).contains("/dev/zero: this is a binary file, not a detections file"),
        "{}",
        stderr(&o)
    );
    let dir = scratch("hostile-dev-zero");
    let o = throughline(&["batch", "/dev/zero", "--out", &dir.display().to_string()]);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        stderr(&o).contains("/dev/zero: this is not a text file"),
        "{}",
        stderr(&o)
    );
}
