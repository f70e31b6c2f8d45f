//! The command line as a user meets it: real files in a temporary folder, exit codes, messages.
//! The checks that decode footage need Debian's ffmpeg: without it they print a line saying they
//! were skipped, unless `THROUGHLINE_REQUIRE_FFMPEG=1` (`cargo xtask test` sets it, after
//! installing ffmpeg), when a missing ffmpeg fails them.

mod common;

use common::*;
use std::process::Command;

#[test]
fn every_command_has_help() {
    for args in [
        vec!["--help"],
        vec!["track", "--help"],
        vec!["simulate", "--help"],
        vec!["score", "--help"],
        vec!["detect", "--help"],
        vec!["run", "--help"],
        vec!["batch", "--help"],
    ] {
        let o = throughline(&args);
        assert!(o.status.success(), "{args:?}");
        assert!(stdout(&o).contains("Usage"), "{args:?}");
    }
    assert!(
        stdout(&throughline(&["track", "--help"])).contains("top-left")
            || stdout(&throughline(&["--help"])).contains("top-left")
    );
}

#[test]
fn bad_usage_exits_with_2() {
    assert_eq!(throughline(&[]).status.code(), Some(2));
    assert_eq!(throughline(&["track"]).status.code(), Some(2));
    let o = throughline(&["track", "x.txt", "--method", "hungarian"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("bytetrack"), "{}", stderr(&o));
}

#[test]
fn tracks_the_demo_to_json_on_stdout_and_to_benchmark_text() {
    let o = throughline(&["track", &demo("detections.txt"), "--quiet"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let doc: serde_json::Value = serde_json::from_slice(&o.stdout).expect("JSON on stdout");
    assert_eq!(doc["format"], "throughline-tracks");
    assert_eq!(
        doc["settings"]["method"], "sort",
        "no embeddings: sort is the default"
    );
    assert!(doc["tracks"].as_array().is_some_and(|t| t.len() > 10));

    let dir = scratch("track_txt");
    let out = dir.join("tracks.txt").display().to_string();
    let o = throughline(&["track", &demo("detections.csv"), "-o", &out]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("deepsort"),
        "embeddings present: deepsort is the default"
    );
    let text = std::fs::read_to_string(&out).unwrap();
    let first = text.lines().next().unwrap();
    assert_eq!(first.split(',').count(), 10, "{first}");
    assert!(first.ends_with(",-1,-1,-1"));
}

#[test]
fn bad_input_exits_with_1_and_names_file_line_and_fix() {
    let dir = scratch("bad_input");
    let cases: [(&str, &[u8], &str); 5] = [
        (
            "negative.txt",
            b"1,-1,10,20,30,40,0.9\n2,-1,10,20,-3,40,0.9\n",
            "line 2, column 5",
        ),
        ("empty.txt", b"", "empty"),
        ("footage.webm", b"\x1aE\xdf\xa3\x00\x00\x00\x00", "binary"),
        (
            "junk.csv",
            b"frame,x,y,w,h,score\n1,2,3,four,5,0.5\n",
            "`four` in column `w`",
        ),
        (
            "zero.json",
            br#"[{"image_id": 0, "bbox": [1,2,3,4], "score": 0.5}]"#,
            "add 1",
        ),
    ];
    for (name, content, hint) in cases {
        let path = write(&dir, name, content);
        let o = throughline(&["track", &path]);
        assert_eq!(o.status.code(), Some(1), "{name}");
        let e = stderr(&o);
        assert!(e.contains(name) && e.contains(hint), "{name}: {e}");
        assert!(!e.contains("panicked"), "{name}: {e}");
    }
    let o = throughline(&["track", &dir.join("missing.txt").display().to_string()]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("cannot read"));
}

#[test]
fn settings_file_overrides_defaults_and_rejects_unknown_fields() {
    let dir = scratch("settings");
    let good = write(
        &dir,
        "good.json",
        br#"{"method": "bytetrack", "max_age": 12}"#,
    );
    let o = throughline(&["track", &demo("detections.txt"), "--config", &good, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let doc: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(doc["settings"]["method"], "bytetrack");
    assert_eq!(doc["settings"]["max_age"], 12);
    // --method wins over the file's method.
    let o = throughline(&[
        "track",
        &demo("detections.txt"),
        "--config",
        &good,
        "--method",
        "iou",
        "-q",
    ]);
    let doc: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(doc["settings"]["method"], "iou");

    let bad = write(&dir, "bad.json", br#"{"max_agee": 12}"#);
    let o = throughline(&["track", &demo("detections.txt"), "--config", &bad]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("max_agee"), "{}", stderr(&o));
    let range = write(&dir, "range.json", br#"{"min_iou": 3}"#);
    let o = throughline(&["track", &demo("detections.txt"), "--config", &range]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("min_iou"), "{}", stderr(&o));
}

#[test]
fn deepsort_on_detections_without_embeddings_is_refused_clearly() {
    let o = throughline(&["track", &demo("detections.txt"), "--method", "deepsort"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("embedding"), "{}", stderr(&o));
}

#[test]
fn simulate_then_score_round_trip() {
    let dir = scratch("simulate");
    let d = dir.display().to_string();
    let o = throughline(&[
        "simulate",
        "--out-dir",
        &d,
        "--frames",
        "120",
        "--seed",
        "3",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let tracks = dir.join("tracks.json").display().to_string();
    let dets = dir.join("detections.txt").display().to_string();
    assert!(throughline(&["track", &dets, "-o", &tracks, "-q"])
        .status
        .success());
    let truth = dir.join("truth.txt").display().to_string();
    let o = throughline(&["score", "--truth", &truth, &tracks, "--json"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    for key in [
        "mota",
        "motp",
        "idf1",
        "idp",
        "idr",
        "id_switches",
        "hota",
        "deta",
        "assa",
        "loca",
    ] {
        assert!(s.get(key).is_some(), "{key}");
    }
    assert!(s["hota"].as_f64().unwrap() > 0.3);
    let o = throughline(&["simulate", "--out-dir", &d, "--miss-rate", "2"]);
    assert_eq!(o.status.code(), Some(2));
    // True counts of an earlier scene left in the folder are named when a new scene without a
    // plan is written there (a newcomer's trial: score-counts would have used them).
    let plan = demo("plan.json");
    let args = [
        "simulate",
        "--out-dir",
        &d,
        "--frames",
        "20",
        "--plan",
        &plan,
    ];
    assert!(throughline(&args).status.success());
    let o = throughline(&["simulate", "--out-dir", &d, "--frames", "20", "--seed", "5"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        stderr(&o)
            .contains("holds truth_report.json and truth_counts.csv, which this run did not write"),
        "{}",
        stderr(&o)
    );
}

#[test]
fn simulate_hard_cases_all_or_by_name_and_an_unknown_one_named() {
    let dir = scratch("simulate-hard");
    let read = |name: &str| std::fs::read(dir.join(name)).unwrap();
    let sim = |extra: &[&str]| {
        let d = dir.display().to_string();
        let mut args = vec![
            "simulate",
            "--out-dir",
            &d,
            "--frames",
            "100",
            "--seed",
            "4",
        ];
        args.extend_from_slice(extra);
        let o = throughline(&args);
        assert!(o.status.success(), "{}", stderr(&o));
        read("truth.txt")
    };
    let plain = sim(&[]);
    let all = sim(&["--hard-cases"]);
    assert_ne!(plain, all, "the hard cases change the scene");
    assert_eq!(
        sim(&["--hard-cases=standing-start,pairs,long-pauses,pale-clothes"]),
        all
    );
    assert_eq!(sim(&[]), plain, "and without them it is the same again");
    let d = dir.display().to_string();
    let o = throughline(&["simulate", "--out-dir", &d, "--hard-cases=pairs,crowds"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("`crowds`"), "{}", stderr(&o));
}

#[test]
fn run_tracks_and_counts_with_a_plan_writing_report_and_csv() {
    let dir = scratch("run");
    let report = dir.join("report.json").display().to_string();
    let csv = dir.join("counts.csv").display().to_string();
    let tracks = dir.join("tracks.json").display().to_string();
    let o = throughline(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "-o",
        &report,
        "--csv",
        &csv,
        "--tracks",
        &tracks,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stderr(&o).contains("manual count"), "the caution is shown");
    // Which way each line's forward goes on screen, so that labels swapped with their opposites
    // show (a newcomer's trial: a line drawn top to bottom had eastbound and westbound swapped).
    // The demo's midline is drawn left to right (forward: down), its divide top to bottom (left).
    assert!(
        stderr(&o).contains(" towards camera (moving down on screen), "),
        "{}",
        stderr(&o)
    );
    assert!(
        stderr(&o).contains(" westbound (moving left on screen), "),
        "{}",
        stderr(&o)
    );
    let r: serde_json::Value = serde_json::from_slice(&std::fs::read(&report).unwrap()).unwrap();
    assert_eq!(r["format"], "throughline-report");
    assert_eq!(r["tracker"]["method"], "deepsort");
    let line = &r["screenlines"][0];
    for key in ["name", "forward", "backward", "by_class", "intervals"] {
        assert!(line.get(key).is_some(), "{key}");
    }
    assert!(line["forward"].is_u64() && line["backward"].is_u64());
    let header = std::fs::read_to_string(&csv).unwrap();
    assert!(header
        .starts_with("screenline,direction,class,interval_start,interval_end,count,partial\n"));
    // count on the written tracks gives the same counts as run.
    let report2 = dir.join("report2.json").display().to_string();
    let o = count_with_demo_plan(&tracks, &["-o", &report2, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    // The tracker's boxes are rounded as the tracks file writes them (0.01 pixel) before `run`
    // counts them, so counting the written tracks gives `run`'s report, byte for byte.
    assert_eq!(
        std::fs::read_to_string(&report).unwrap(),
        std::fs::read_to_string(&report2).unwrap()
    );
    let key = |e: &serde_json::Value| {
        format!(
            "{} {} {} {} {} {}",
            e["frame"], e["track"], e["name"], e["direction"], e["x"], e["y"]
        )
    };
    let events = |r: &serde_json::Value| {
        r["events"]
            .as_array()
            .unwrap()
            .iter()
            .map(key)
            .collect::<Vec<_>>()
    };
    // The same tracks as benchmark text (no classes; predicted boxes with score 0, read back as
    // predicted) count the same crossings by the same tracks, at the same places and in the same
    // order: the format cannot carry classes, which here decide no join.
    let text = dir.join("tracks.txt").display().to_string();
    let o = throughline(&["track", &demo("detections.csv"), "-o", &text, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let report3 = dir.join("report3.json").display().to_string();
    let plan = demo("plan.json");
    let o = throughline(&["count", &text, "--plan", &plan, "-o", &report3]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stderr(&o).contains("carries no classes"), "{}", stderr(&o));
    let r3: serde_json::Value = serde_json::from_slice(&std::fs::read(&report3).unwrap()).unwrap();
    assert_eq!(events(&r), events(&r3));
}

#[test]
fn a_bad_plan_is_refused_before_tracking_and_names_the_field() {
    let dir = scratch("bad_plan");
    let plan = write(
        &dir,
        "plan.json",
        br#"{"frame_rate": 25, "screenlines": [{"name": "a", "points": [[1, 2]]}]}"#,
    );
    let o = throughline(&["run", &demo("detections.txt"), "--plan", &plan]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("screenlines[0].points") && e.contains("at least 2 points"),
        "{e}"
    );
    assert!(!e.contains("detections ("), "tracking did not start: {e}");
    let typo = write(
        &dir,
        "typo.json",
        br#"{"frame_rate": 25, "screenline": []}"#,
    );
    let o = throughline(&["count", &demo("truth.txt"), "--plan", &typo]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("screenline"), "{}", stderr(&o));
    // A value of the wrong kind names its field as well as where it is (a newcomer's trial
    // found only the line and column).
    let quoted = write(
        &dir,
        "quoted.json",
        b"{\n  \"frame_rate\": \"25\",\n  \"screenlines\": []\n}\n",
    );
    let o = throughline(&["count", &demo("truth.txt"), "--plan", &quoted]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("line 2, column 20: `frame_rate`: invalid type"),
        "{e}"
    );
    assert!(e.contains("expected a number"), "{e}");
    // A misspelt field inside a zone is not blamed on the field before it (a newcomer's trial
    // found "`name`: unknown field `poligon`").
    let zone = write(
        &dir,
        "zone.json",
        b"{\n  \"frame_rate\": 25,\n  \"zones\": [{\"name\": \"kiosk\", \"poligon\": [[0,0],[9,0],[9,9]]}]\n}\n",
    );
    let o = throughline(&["count", &demo("truth.txt"), "--plan", &zone]);
    let e = stderr(&o);
    assert!(e.contains("unknown field `poligon`"), "{e}");
    assert!(!e.contains("`name`: unknown"), "{e}");
}

#[test]
fn a_plan_without_lines_or_zones_says_so() {
    let dir = scratch("empty_plan");
    let plan = write(&dir, "plan.json", br#"{"frame_rate": 25}"#);
    let o = throughline(&[
        "count",
        &demo("truth.txt"),
        "--plan",
        &plan,
        "-o",
        &dir.join("r.json").display().to_string(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("no screenlines and no zones"),
        "{}",
        stderr(&o)
    );
}

#[test]
fn simulate_renders_frames_that_ffmpeg_decodes_and_counts_the_truth() {
    let dir = scratch("render");
    let d = dir.display().to_string();
    let y4m = dir.join("frames.y4m").display().to_string();
    let o = throughline(&[
        "simulate",
        "--out-dir",
        &d,
        "--frames",
        "40",
        "--render",
        &y4m,
        "--plan",
        &demo("plan.json"),
        "--seed",
        "5",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let bytes = std::fs::read(&y4m).unwrap();
    let header = b"YUV4MPEG2 W640 H360 F25:1 Ip A1:1 C420jpeg\n";
    assert!(bytes.starts_with(header));
    assert_eq!(bytes.len(), header.len() + 40 * (6 + 640 * 360 * 3 / 2));
    assert!(dir.join("truth_report.json").exists() && dir.join("truth_counts.csv").exists());
    // Real decoding: ffmpeg (installed by `cargo xtask test`) reads every frame.
    if !ffmpeg_or_skip("simulate_renders_frames_that_ffmpeg_decodes_and_counts_the_truth") {
        return;
    }
    let probe = Command::new("ffprobe")
        .args([
            "-v",
            "error",
            "-count_frames",
            "-select_streams",
            "v:0",
            "-show_entries",
            "stream=nb_read_frames",
        ])
        .args(["-of", "csv=p=0", &y4m])
        .output()
        .expect("ffprobe runs (cargo xtask test installs ffmpeg)");
    assert_eq!(String::from_utf8_lossy(&probe.stdout).trim(), "40");
}

#[test]
fn the_committed_demo_footage_decodes_and_matches_its_detections() {
    if !ffmpeg_or_skip("the_committed_demo_footage_decodes_and_matches_its_detections") {
        return;
    }
    let probe = Command::new("ffprobe")
        .args(["-v", "error", "-count_frames", "-select_streams", "v:0"])
        .args([
            "-show_entries",
            "stream=codec_name,width,height,nb_read_frames",
            "-of",
            "csv=p=0",
        ])
        .arg(demo("footage.webm"))
        .output()
        .expect("ffprobe runs (cargo xtask test installs ffmpeg)");
    let info = String::from_utf8_lossy(&probe.stdout).trim().to_string();
    let dets = std::fs::read_to_string(demo("detections.txt")).unwrap();
    let last_frame: u32 = dets
        .lines()
        .filter_map(|l| l.split(',').next()?.parse().ok())
        .max()
        .unwrap();
    assert_eq!(
        info,
        format!("vp9,640,360,{last_frame}"),
        "footage and detections describe the same clip"
    );
}

#[test]
fn score_counts_compares_a_report_with_a_manual_count() {
    let dir = scratch("score_counts");
    let report = demo_report(&dir);
    // The simulator's true counts, in the counts CSV layout, stand in for a manual count.
    let o = score_against_demo_truth(&report, &["--json"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let a: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    for key in [
        "apd",
        "aapd",
        "wapd",
        "correction_factor",
        "automated_total",
        "reference_total",
    ] {
        assert!(a["overall"].get(key).is_some(), "{key}");
    }
    assert!(a["groups"].as_array().unwrap().len() >= 4);
    // Two reports compare too (a report with itself is exact).
    let o = throughline(&["score-counts", "--truth", &report, &report, "--json"]);
    let a: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(a["overall"]["wapd"], 0.0);
    // Equal totals are said to be equal, not to differ by +0.0%.
    let o = throughline(&["score-counts", "--truth", &report, &report]);
    let table = String::from_utf8_lossy(&o.stdout);
    assert!(
        table.contains("; the totals are equal, though errors in the cells may cancel (AAPD) ("),
        "{table}"
    );
    // A reference that names nothing of the report is an error that says what to check.
    let other = write(
        &dir,
        "other.csv",
        b"screenline,direction,class,interval_start,interval_end,count\nnowhere,in,,a,b,4\n",
    );
    let o = throughline(&["score-counts", "--truth", &other, &report]);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        stderr(&o).contains("the plan's labels, as in the counts CSV, or forward and backward"),
        "{}",
        stderr(&o)
    );
    assert!(
        stderr(&o).contains("the reference has `nowhere` / `in` (1 row); the report has `"),
        "{}",
        stderr(&o)
    );
    // A report with no screenlines at all (a plan of zones): its list reads "none", not nothing.
    let zones_plan = write(
        &dir,
        "zones.json",
        br#"{"frame_rate": 25, "zones": [{"name": "z", "polygon": [[0, 0], [99, 0], [99, 99], [0, 99]]}]}"#,
    );
    let zones_report = dir.join("zones-report.json").display().to_string();
    let o = throughline(&[
        "run",
        &demo("detections.txt"),
        "--plan",
        &zones_plan,
        "-o",
        &zones_report,
        "--quiet",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let o = throughline(&["score-counts", "--truth", &other, &zones_report]);
    assert!(
        stderr(&o).ends_with("the report has none\n"),
        "{}",
        stderr(&o)
    );
    // A label misspelt in some rows of a manual count: those rows are named and the pooled line
    // says the comparison is incomplete (a newcomer's trial: `south` for `southbound` left a
    // real miss out of a score that read as perfect).
    let truth = std::fs::read_to_string(demo("truth_counts.csv")).unwrap();
    let typo = write(
        &dir,
        "typo.csv",
        truth
            .replace(",towards camera,", ",towards camra,")
            .as_bytes(),
    );
    let o = throughline(&["score-counts", "--truth", &typo, &report]);
    assert!(o.status.success(), "{}", stderr(&o));
    let (out, err) = (String::from_utf8_lossy(&o.stdout), stderr(&o));
    assert!(out.contains("INCOMPLETE: "), "{out}");
    assert!(err.contains("`plaza midline` / `towards camra` ("), "{err}");
    assert!(err.contains("the report has `"), "{err}");
    // A manual count on a clock apart from the report's: said, not read as everything missed.
    let late = write(&dir, "late.csv", truth.replace("T07:", "T19:").as_bytes());
    let o = throughline(&["score-counts", "--truth", &late, &report]);
    assert!(
        stderr(&o).contains("none of the reference's intervals (2026-03-02T19:00:00"),
        "{}",
        stderr(&o)
    );
    assert!(
        stderr(&o).contains("check the start time"),
        "{}",
        stderr(&o)
    );
}

/// The table a person reads: rows with no crossing either way are left out (and said to be), the
/// pooled row says what it pools; counts from tracks without classes against a count by class
/// are compared with all classes together, and said to be (newcomers' trials: "0 vs 33, APD
/// -100.0%" and nothing else, then a table of -100% explained only below it); counts of a class
/// the reference lacks are said to be left out.
#[test]
fn score_counts_table_reads_plainly_and_says_what_it_leaves_out() {
    let dir = scratch("score_counts_plain");
    let o = score_against_demo_truth(&demo_report(&dir), &[]);
    let table = String::from_utf8_lossy(&o.stdout).to_string();
    assert!(!table.contains(" 0 vs 0,"), "{table}");
    assert!(
        table.contains("more with no crossing in either count"),
        "{table}"
    );
    assert!(table.contains("all rows pooled: "), "{table}");
    // Tracks as benchmark text carry no classes: their counts are `unclassified`.
    let tracks = dir.join("tracks.txt").display().to_string();
    let o = throughline(&["track", &demo("detections.csv"), "-o", &tracks, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let plain = dir.join("plain.json").display().to_string();
    let o = count_with_demo_plan(&tracks, &["-o", &plain, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let o = score_against_demo_truth(&plain, &[]);
    assert!(
        stderr(&o).contains("so all classes are compared together"),
        "{}",
        stderr(&o)
    );
    let table = String::from_utf8_lossy(&o.stdout).to_string();
    assert!(table.contains(" / all: "), "{table}");
    assert!(table.contains(", 14 vs 14, "), "{table}");
    // A reference by class without the report's cyclists: their counts are said to be left out,
    // and --all-classes compares the lines as wholes.
    let truth = std::fs::read_to_string(demo("truth_counts.csv")).unwrap();
    let no_cyclists: String = truth
        .lines()
        .filter(|l| !l.contains(",cyclist,"))
        .map(|l| format!("{l}\n"))
        .collect();
    let reference = write(&dir, "no-cyclists.csv", no_cyclists.as_bytes());
    let report = demo_report(&dir);
    let o = throughline(&["score-counts", "--truth", &reference, &report]);
    assert!(
        stderr(&o).contains("of classes the reference does not name for their line and direction"),
        "{}",
        stderr(&o)
    );
    let o = throughline(&[
        "score-counts",
        "--truth",
        &reference,
        &report,
        "--all-classes",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(String::from_utf8_lossy(&o.stdout).contains(" / all: "));
}

#[test]
fn tune_prints_a_settings_file_that_track_accepts() {
    let dir = scratch("tune");
    let d = dir.display().to_string();
    assert!(throughline(&[
        "simulate",
        "--out-dir",
        &d,
        "--frames",
        "150",
        "--seed",
        "9"
    ])
    .status
    .success());
    let best = dir.join("best.json").display().to_string();
    let dets = dir.join("detections.txt").display().to_string();
    let truth = dir.join("truth.txt").display().to_string();
    let o = throughline(&[
        "tune", &dets, "--truth", &truth, "--method", "sort", "-o", &best,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stderr(&o).contains("best"), "{}", stderr(&o));
    let o = throughline(&["track", &dets, "--config", &best, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let doc: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(doc["settings"]["method"], "sort");
}

#[test]
fn scoring_an_empty_tracks_file_counts_every_box_as_missed() {
    let dir = scratch("empty_tracks");
    let empty = write(&dir, "empty.txt", b"");
    let o = throughline(&["score", "--truth", &demo("truth.txt"), &empty, "--json"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(s["hota"], 0.0);
    assert_eq!(s["false_positives"], 0);
    assert!(s["misses"].as_u64().unwrap() > 1000);
}

#[test]
fn detect_finds_moving_objects_in_footage_from_a_file_and_from_standard_input() {
    if !ffmpeg_or_skip("detect_finds_moving_objects_in_footage_from_a_file_and_from_standard_input")
    {
        return;
    }
    // The demo footage decoded by Debian's ffmpeg into YUV4MPEG2, as a user would pipe it.
    let dir = scratch("detect");
    let y4m = dir.join("demo.y4m");
    let status = Command::new("ffmpeg")
        .args([
            "-loglevel",
            "error",
            "-y",
            "-i",
            &demo("footage.webm"),
            "-frames:v",
            "120",
        ])
        .args(["-pix_fmt", "yuv420p", "-f", "yuv4mpegpipe"])
        .arg(&y4m)
        .status()
        .expect("ffmpeg runs (cargo xtask test installs it)");
    assert!(status.success());
    let out = dir.join("found.txt");
    let o = throughline(&[
        "detect",
        "--y4m",
        y4m.to_str().unwrap(),
        "-o",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = std::fs::read_to_string(&out).unwrap();
    // No heights given: no class guess, so the benchmark text format, after the footage's length.
    let (length, body) = text.split_once('\n').unwrap();
    assert_eq!(length, "# footage_frames: 120");
    let rows: Vec<&str> = body.lines().collect();
    assert!(rows.len() > 200, "{} boxes", rows.len());
    let first_frame =
        |rows: &[&str]| -> u32 { rows[0].split(',').next().unwrap().parse().unwrap() };
    // A file is read first for the background (the whole clip): people in view are found at once.
    assert_eq!(first_frame(&rows), 1, "boxes from the first frame");
    assert!(
        stderr(&o).contains("detections over 120 frames"),
        "{}",
        stderr(&o)
    );

    // Standard input is read once: the background forms over the first 50 frames, as with
    // `whole_clip_background` off for a file, and a note says so; --stats reports time and
    // memory, even with -q.
    let opening = dir.join("opening.json");
    std::fs::write(&opening, r#"{"whole_clip_background": false}"#).unwrap();
    let from_file = throughline(&["detect", "--y4m", y4m.to_str().unwrap(), "-q"]);
    let off = throughline(&[
        "detect",
        "--y4m",
        y4m.to_str().unwrap(),
        "--config",
        opening.to_str().unwrap(),
        "-q",
    ]);
    let piped = Command::new(env!("CARGO_BIN_EXE_throughline"))
        .args(["detect", "--y4m", "-", "-q", "--stats"])
        .stdin(std::fs::File::open(&y4m).unwrap())
        .output()
        .unwrap();
    assert!(piped.status.success());
    assert_eq!(stdout(&from_file), text);
    assert_eq!(stdout(&piped), stdout(&off));
    let piped_text = stdout(&piped);
    let piped_rows: Vec<&str> = piped_text.lines().skip(1).collect();
    assert!(
        first_frame(&piped_rows) > 50,
        "nothing during the 50-frame warm-up"
    );
    let said = stderr(&piped);
    assert!(
        said.starts_with("stats: ") && said.contains("detect ") && said.contains("peak memory"),
        "{said}"
    );
    let noted = Command::new(env!("CARGO_BIN_EXE_throughline"))
        .args(["detect", "--y4m", "-"])
        .stdin(std::fs::File::open(&y4m).unwrap())
        .output()
        .unwrap();
    assert!(stderr(&noted).contains("give a file"), "{}", stderr(&noted));

    // Straight to counts.
    let report = dir.join("report.json");
    let plan = demo("plan.json");
    let o = throughline(&[
        "run",
        "--y4m",
        y4m.to_str().unwrap(),
        "--plan",
        &plan,
        "-o",
        report.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(std::fs::read_to_string(&report)
        .unwrap()
        .contains("\"screenlines\""));
    // The demo plan keeps the default margin: the note suggests the steadier one for footage.
    assert!(
        stderr(&o).contains("rules.hysteresis 0.35"),
        "{}",
        stderr(&o)
    );

    // With the two heights each box gets a guessed class, so detect writes CSV with a class
    // column; detect then run gives the report run --y4m gives. Likewise with colour histograms
    // (24 values a box, tracked with deepsort).
    for (settings, columns) in [
        (&br#"{"far_height": 34, "near_height": 91}"#[..], 7),
        (
            &br#"{"far_height": 34, "near_height": 91, "appearance": true}"#[..],
            31,
        ),
    ] {
        let heights = write(&dir, "heights.json", settings);
        let classed = dir.join("classed.csv");
        let o = throughline(&[
            "detect",
            "--y4m",
            y4m.to_str().unwrap(),
            "--config",
            &heights,
            "-o",
            classed.to_str().unwrap(),
            "-q",
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        let text = std::fs::read_to_string(&classed).unwrap();
        let csv = text
            .strip_prefix("# footage_frames: 120\n")
            .expect("the footage's length first");
        assert!(
            csv.starts_with("frame,x,y,w,h,score,class"),
            "{}",
            &csv[..40]
        );
        assert!(csv.lines().all(|l| l.split(',').count() == columns));
        let classes: std::collections::BTreeSet<&str> = csv
            .lines()
            .skip(1)
            .map(|l| l.split(',').nth(6).unwrap())
            .collect();
        assert!(classes.contains("pedestrian"), "{classes:?}");
        assert!(classes
            .iter()
            .all(|c| ["pedestrian", "cyclist", "vehicle"].contains(c)));
        let (via_file, direct) = (dir.join("via-file.json"), dir.join("direct.json"));
        let o = throughline(&[
            "run",
            classed.to_str().unwrap(),
            "--plan",
            &plan,
            "-o",
            via_file.to_str().unwrap(),
            "-q",
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        let o = throughline(&[
            "run",
            "--y4m",
            y4m.to_str().unwrap(),
            "--detector-config",
            &heights,
            "--plan",
            &plan,
            "-o",
            direct.to_str().unwrap(),
            "-q",
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        assert_eq!(
            std::fs::read_to_string(&via_file).unwrap(),
            std::fs::read_to_string(&direct).unwrap()
        );
        // A project file saved by the page records the heights typed there: given with --edits,
        // its settings find the same boxes, and it says so (a newcomer's trial: the heights were
        // saved in no file, so the count could not be repeated from the files handed in).
        let read = |p: &str| -> serde_json::Value {
            serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap()
        };
        let project = serde_json::json!({"format": "throughline-project", "version": 1,
            "plan": read(&plan), "detector": read(&heights)});
        let project = write(&dir, "project.json", project.to_string().as_bytes());
        let from_project = dir.join("from-project.json");
        let o = throughline(&[
            "run",
            "--y4m",
            y4m.to_str().unwrap(),
            "--edits",
            &project,
            "--plan",
            &plan,
            "-o",
            from_project.to_str().unwrap(),
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        assert!(
            stderr(&o)
                .contains("note: finding objects with the detector settings project.json records"),
            "{}",
            stderr(&o)
        );
        let report = |p: &std::path::Path| -> serde_json::Value {
            serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap()
        };
        assert_eq!(report(&from_project)["events"], report(&direct)["events"]);
    }

    // A stream cut short keeps what its whole frames gave, and says so; a file that is no video
    // is refused naming it (a WebM or MP4 is decoded by ffmpeg: tests/video.rs).
    let bytes = std::fs::read(&y4m).unwrap();
    let cut = write(&dir, "cut.y4m", &bytes[..bytes.len() - 1000]);
    let o = throughline(&["detect", "--y4m", &cut]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("ends inside frame 120; frames 1 to 119 are used"),
        "{}",
        stderr(&o)
    );
    let kept_text = stdout(&o);
    let kept: Vec<&str> = kept_text.lines().collect();
    let whole: Vec<&str> = text.lines().filter(|l| !l.starts_with("120,")).collect();
    assert_eq!(kept[0], "# footage_frames: 119", "the frames searched");
    assert_eq!(kept[1..], whole[1..]);
    let not_video = throughline(&["detect", "--y4m", &demo("plan.json")]);
    assert_eq!(not_video.status.code(), Some(1));
    let said = stderr(&not_video);
    assert!(
        said.contains("plan.json: ffmpeg could not decode it"),
        "{said}"
    );
    let settings = write(&dir, "bad.json", br#"{"near_heigth": 90}"#);
    let o = throughline(&["detect", "--y4m", &cut, "--config", &settings]);
    assert!(stderr(&o).contains("near_heigth"), "{}", stderr(&o));
    // Both a detections file and footage: the detections are tracked and the footage bridges
    // their gaps, as far as the (cut) stream goes (tests/bridge.rs).
    let both = throughline(&[
        "run",
        &demo("detections.txt"),
        "--y4m",
        &cut,
        "--plan",
        &plan,
    ]);
    assert_eq!(both.status.code(), Some(0), "{}", stderr(&both));
}

#[test]
fn detect_on_several_threads_writes_the_bytes_of_one() {
    // A relation between runs (no outside value): each frame's work cut into bands on threads,
    // the next frames read meanwhile, gives the one-thread boxes, byte for byte, with and without the heights.
    let dir = scratch("detect-threads");
    let d = dir.display().to_string();
    let y4m = dir.join("frames.y4m").display().to_string();
    let o = throughline(&[
        "simulate",
        "--out-dir",
        &d,
        "--frames",
        "60",
        "--width",
        "320",
        "--height",
        "180",
        "--density",
        "14",
        "--render",
        &y4m,
        "--seed",
        "9",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let heights = write(
        &dir,
        "heights.json",
        br#"{"far_height": 17, "near_height": 46}"#,
    );
    for config in [None, Some(heights.as_str())] {
        let found = |threads: &str| {
            let mut args = vec!["detect", "--y4m", &y4m, "-q", "--threads", threads];
            args.extend(config.map(|c| ["--config", c]).into_iter().flatten());
            let o = throughline(&args);
            assert!(o.status.success(), "{}", stderr(&o));
            o.stdout
        };
        let one = found("1");
        assert!(one.len() > 1000, "{} bytes of boxes", one.len());
        for threads in ["2", "3"] {
            assert!(found(threads) == one, "{threads} threads, {config:?}");
        }
    }
    let o = throughline(&["detect", "--y4m", &y4m, "--threads", "0"]);
    assert!(!o.status.success() && stderr(&o).contains("--threads"));
}

#[test]
fn an_empty_plan_and_a_tracks_box_of_negative_width_say_what_is_wrong() {
    // Found by a newcomer's trial: an empty plan once said "EOF while parsing a value", and a
    // tracks file's negative width named neither the side nor its value.
    let dir = scratch("empty_plan_negative_tracks");
    let plan = write(&dir, "plan.json", b"");
    let o = throughline(&["run", &demo("detections.txt"), "--plan", &plan]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("plan.json") && e.contains("is it empty, or cut short?"),
        "{e}"
    );
    let tracks = write(
        &dir,
        "tracks.txt",
        b"1,1,10,20,30,40,1,-1,-1,-1\n2,1,12,20,-30,40,1,-1,-1,-1\n",
    );
    let o = throughline(&["count", &tracks, "--plan", &demo("plan.json")]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("tracks.txt") && e.contains("line 2, column 5"),
        "{e}"
    );
    assert!(
        e.contains("box w is -30: sizes must not be negative"),
        "{e}"
    );
    // The same box in a tracks document names its frame, the side and its value (a later trial:
    // it said "box 1 has a negative width or height", numbering boxes from 0).
    let json = dir.join("tracks.json").display().to_string();
    let o = throughline(&["track", &demo("detections.csv"), "-o", &json, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let mut doc: serde_json::Value =
        serde_json::from_slice(&std::fs::read(&json).unwrap()).unwrap();
    doc["tracks"][0]["boxes"][1][3] = serde_json::json!(-30);
    std::fs::write(&json, doc.to_string()).unwrap();
    let o = throughline(&["count", &json, "--plan", &demo("plan.json")]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("tracks.json")
            && e.contains("the box of frame 2 has w -30: sizes must not be negative"),
        "{e}"
    );
}

#[test]
fn count_and_run_say_the_file_is_empty() {
    // Found by a newcomer's trial: `run` said "the file is empty" and `count` "no rows found".
    let dir = scratch("empty_inputs");
    let empty = write(&dir, "empty.txt", b"\n");
    for args in [
        vec!["run", &empty, "--plan", &demo("plan.json")],
        vec!["count", &empty, "--plan", &demo("plan.json")],
    ] {
        let o = throughline(&args);
        assert_eq!(o.status.code(), Some(1));
        let e = stderr(&o);
        assert!(
            e.contains("empty.txt: the file is empty: expected "),
            "{args:?}: {e}"
        );
    }
    let comments = write(&dir, "comments.txt", b"# frame,id,x,y,w,h\n");
    let o = throughline(&["count", &comments, "--plan", &demo("plan.json")]);
    assert!(stderr(&o).contains("comments.txt: the file has only comments, no rows: expected "));
    assert!(
        stderr(&o).contains("or the tracks JSON that `throughline track -o tracks.json` writes")
    );
    // A JSON array is read as JSON, and told what a tracks document is.
    let array = write(&dir, "array.json", b"[]");
    let o = throughline(&["count", &array, "--plan", &demo("plan.json")]);
    assert!(
        stderr(&o).contains("expected a Throughline tracks document"),
        "{}",
        stderr(&o)
    );
    // Ground truth is benchmark text only: `score` does not offer the JSON.
    let tracks = write(&dir, "t.txt", b"1,1,10,20,30,40,1,-1,-1,-1\n");
    let o = throughline(&["score", &tracks, "--truth", &empty]);
    assert!(
        stderr(&o).contains("empty.txt: the file is empty"),
        "{}",
        stderr(&o)
    );
    assert!(!stderr(&o).contains("tracks JSON"), "{}", stderr(&o));
}

#[test]
fn count_given_a_tracking_method_says_where_it_belongs() {
    // Found by a newcomer's trial: clap's own tip was "to pass '--method' as a value, use
    // '-- --method'", which leads nowhere.
    let o = throughline(&[
        "count",
        &demo("detections.txt"),
        "--plan",
        &demo("plan.json"),
        "--method",
        "sort",
    ]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.contains("counts tracks already made") && e.contains("throughline track"),
        "{e}"
    );
}

/// A clip of detections ends at its last box; a quiet end made its last interval look partial.
/// `--frames` gives the footage's whole length (and one shorter than the boxes is refused).
#[test]
fn frames_gives_the_clips_length_when_the_detections_end_early() {
    let dir = scratch("frames");
    let dets = demo_detections_until(&dir, 700);
    // Intervals of 15 s: 750 frames at 25 fps make two whole ones.
    let plan = std::fs::read_to_string(demo("plan.json"))
        .unwrap()
        .replace("\"interval_minutes\": 15", "\"interval_minutes\": 0.25");
    assert!(plan.contains("0.25"));
    let plan = write(&dir, "plan.json", plan.as_bytes());
    let partial = |extra: &[&str]| {
        let report = dir.join("r.json").display().to_string();
        let mut args = vec!["run", &dets, "--plan", &plan, "-o", &report, "-q"];
        args.extend_from_slice(extra);
        let o = throughline(&args);
        assert!(o.status.success(), "{}", stderr(&o));
        let r: serde_json::Value =
            serde_json::from_slice(&std::fs::read(&report).unwrap()).unwrap();
        let intervals = r["screenlines"][0]["intervals"].as_array().unwrap().clone();
        intervals
            .iter()
            .map(|i| i["partial"] == true)
            .collect::<Vec<_>>()
    };
    assert_eq!(partial(&[]), vec![false, true], "ends at its last box");
    assert_eq!(partial(&["--frames", "750"]), vec![false, false]);
    // The original footage named with --footage tells it too: the demo's WebM has 750 frames, as
    // the page counts it (a newcomer's trial: it was named in the outputs, its length unread).
    let webm = demo("footage.webm");
    assert_eq!(partial(&["--footage", &webm]), vec![false, false]);
    if ffmpeg_or_skip("frames_gives_the_clips_length_when_the_detections_end_early (MP4)") {
        let mp4 = dir.join("footage.mp4").display().to_string();
        let o = std::process::Command::new("ffmpeg")
            .args([
                "-v",
                "error",
                "-y",
                "-i",
                &webm,
                "-c:v",
                "libx264",
                "-preset",
                "ultrafast",
            ])
            .args(["-an", &mp4])
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", stderr(&o));
        assert_eq!(
            partial(&["--footage", &mp4]),
            vec![false, false],
            "an MP4's frames"
        );
    }
    // Its length is its duration at the plan's frame rate, as the page takes it: a plan at another
    // rate than the footage's is named (30 s of 25 fps footage are 150 frames at 5 a second).
    let slow = write(
        &dir,
        "plan-5fps.json",
        std::fs::read_to_string(&plan)
            .unwrap()
            .replace("\"frame_rate\": 25", "\"frame_rate\": 5")
            .as_bytes(),
    );
    let report = dir.join("r.json").display().to_string();
    let o = throughline(&[
        "run",
        &dets,
        "--plan",
        &slow,
        "--footage",
        &webm,
        "-o",
        &report,
    ]);
    let e = stderr(&o);
    // … warned of, as for --y4m (a newcomer's trial: detections of their own and --footage at
    // another rate than the plan's said nothing), once (it was said twice in other words).
    assert_eq!(
        e.matches(
            "footage.webm: the footage runs at 25 frames a second, the plan says 5 \
                   (`frame_rate`): times, intervals, speeds and the footage's length in frames \
                   follow the plan's"
        )
        .count(),
        1,
        "{e}"
    );
    assert!(!e.contains("frames a second, the plan at"), "{e}");
    // `review` with the footage says it too.
    let o = throughline(&["review", &dets, "--plan", &slow, "--footage", &webm]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        stderr(&o)
            .contains("footage.webm: the footage runs at 25 frames a second, the plan says 5"),
        "{}",
        stderr(&o)
    );
    // Boxes past the footage's end (one mistyped frame, or another clip's boxes) are named.
    let far = write(
        &dir,
        "far.txt",
        format!(
            "{}4000000,-1,10,10,20,40,0.9\n",
            std::fs::read_to_string(&dets).unwrap()
        )
        .as_bytes(),
    );
    let o = throughline(&[
        "run",
        &far,
        "--plan",
        &plan,
        "--footage",
        &webm,
        "-o",
        &report,
    ]);
    let e = stderr(&o);
    assert!(
        e.contains("the boxes go on to frame 4000000, past the footage's 750 frames"),
        "{e}"
    );
    // Footage it cannot read (here not a video at all) is named, its length left to --frames.
    let other = write(&dir, "clip.avi", b"RIFF....AVI not really");
    let report = dir.join("r.json").display().to_string();
    let o = throughline(&[
        "run",
        &dets,
        "--plan",
        &plan,
        "--footage",
        &other,
        "-o",
        &report,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let e = stderr(&o);
    assert!(
        e.contains("clip.avi: its length is not taken (not WebM or MP4)")
            && e.contains("--frames N"),
        "{e}"
    );
    let o = throughline(&["run", &dets, "--plan", &plan, "--frames", "600", "-q"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("--frames 600: the tracks go on to frame"),
        "{}",
        stderr(&o)
    );
}

/// Boxes found in footage know its length: a clip whose last two seconds show nobody is counted
/// to its end by `run --y4m` (as the page's Find does), and `detect -o` says what `--frames` to
/// give the boxes it writes.
#[test]
fn footage_found_boxes_keep_the_clips_length() {
    let dir = scratch("footage-length");
    let (w, h, frames) = (160usize, 120usize, 100usize);
    let mut y4m = format!("YUV4MPEG2 W{w} H{h} F25:1 Ip A1:1 C420jpeg\n").into_bytes();
    for k in 0..frames {
        y4m.extend_from_slice(b"FRAME\n");
        let mut luma: Vec<u8> = (0..w * h)
            .map(|i| 120 + ((i * 7 + i / w * 3) % 5) as u8)
            .collect();
        // A dark figure walks down across the picture in the first 50 frames, then leaves.
        if k < 50 {
            let top = 2 * k;
            for y in top..(top + 26).min(h) {
                for x in 70..80 {
                    luma[y * w + x] = 40;
                }
            }
        }
        y4m.extend_from_slice(&luma);
        y4m.extend(std::iter::repeat_n(128u8, 2 * (w / 2) * (h / 2)));
    }
    let footage = write(&dir, "quiet-end.y4m", &y4m);
    let plan = write(
        &dir,
        "plan.json",
        br#"{ "frame_rate": 25, "screenlines": [ { "name": "mid", "points": [[0, 60], [160, 60]] } ] }"#,
    );
    let report = dir.join("r.json").display().to_string();
    let o = throughline(&[
        "run", "--y4m", &footage, "--plan", &plan, "-o", &report, "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let r: serde_json::Value = serde_json::from_slice(&std::fs::read(&report).unwrap()).unwrap();
    assert_eq!(
        r["frame_count"], 100,
        "the footage's length, not its last box's frame"
    );
    let found = dir.join("found.txt").display().to_string();
    let o = throughline(&["detect", "--y4m", &footage, "-o", &found]);
    assert!(o.status.success(), "{}", stderr(&o));
    let e = stderr(&o);
    assert!(e.contains("over 100 frames"), "{e}");
    let frame_count = |args: &[&str]| {
        let o = throughline(&[args, &["--plan", &plan, "-o", &report, "-q"]].concat());
        assert!(o.status.success(), "{}", stderr(&o));
        let r: serde_json::Value =
            serde_json::from_slice(&std::fs::read(&report).unwrap()).unwrap();
        r["frame_count"].clone()
    };
    // The file records the footage's length, so counting it reaches the end.
    let text = std::fs::read_to_string(&found).unwrap();
    assert!(text.starts_with("# footage_frames: 100\n"), "{text}");
    assert_eq!(frame_count(&["run", &found]), 100, "the file's own record");
    // A project's footage duration (here 10 s: 250 frames) does not override that record, as the
    // page, counting boxes it found, does not.
    let plan_json: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&plan).unwrap()).unwrap();
    let project = serde_json::json!({"format": "throughline-project", "version": 1,
        "plan": plan_json, "footage": {"name": "quiet-end.webm", "size": 1, "head_sha256": "0",
        "duration_seconds": 10.0}});
    let project = write(&dir, "project.json", project.to_string().as_bytes());
    assert_eq!(frame_count(&["run", &found, "--edits", &project]), 100);
    // A tracks file made from them says so too, and counting it keeps the footage's length.
    let tracks = dir.join("tracks.json").display().to_string();
    let o = throughline(&["track", &found, "-o", &tracks, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let doc: serde_json::Value = serde_json::from_slice(&std::fs::read(&tracks).unwrap()).unwrap();
    assert_eq!(
        (doc["frame_count"].clone(), doc["footage_frames"].clone()),
        (100.into(), 100.into())
    );
    assert_eq!(frame_count(&["count", &tracks, "--edits", &project]), 100);
    let edited = write(
        &dir,
        "edited.json",
        std::fs::read_to_string(&tracks)
            .unwrap()
            .replace("\"footage_frames\":100", "\"footage_frames\":90")
            .as_bytes(),
    );
    let o = throughline(&["count", &edited, "--plan", &plan]);
    let e = stderr(&o);
    assert!(
        !o.status.success() && e.contains("footage_frames is 90 but frame_count is 100"),
        "{e}"
    );
    // Without that line (boxes from elsewhere), the footage given to bridge tells it.
    let plain = write(
        &dir,
        "plain.txt",
        text.replace("# footage_frames: 100\n", "").as_bytes(),
    );
    assert_eq!(frame_count(&["run", &plain]), 50, "the last box");
    assert_eq!(
        frame_count(&["run", &plain, "--y4m", &footage]),
        100,
        "the --y4m file's frames"
    );
}

/// Scores written with a decimal comma and a column after the class (`…,0,944,1`) read as score
/// 0: the reader names the first such row and, when nothing is tracked, the note says every
/// score is under `min_score` and why that may be (a newcomer's trial: it suggested `min_hits`).
#[test]
fn scores_all_under_min_score_are_named_with_the_decimal_comma() {
    let dir = scratch("comma-scores");
    let rows: String = (1..=30)
        .map(|f| format!("{f},-1,{},205,33,85,0,944,1\n", 100 + 3 * f))
        .collect();
    let dets = write(&dir, "comma.txt", rows.as_bytes());
    let o = throughline(&["track", &dets]);
    assert!(o.status.success(), "{}", stderr(&o));
    let e = stderr(&o);
    assert!(e.contains("score 0 then 944 in the eighth column"), "{e}");
    assert!(
        e.contains("every one of its 30 detections scores under 0.3 (`min_score`), the highest 0")
            && e.contains("decimal comma"),
        "{e}"
    );
    assert!(!e.contains("min_hits"), "{e}");
    // The same when the file is read a piece at a time (tracks written as benchmark text).
    let out = dir.join("tracks.txt").display().to_string();
    let o = throughline(&["track", &dets, "-o", &out]);
    let e = stderr(&o);
    assert!(
        e.contains("every one of its 30 detections scores under 0.3") && !e.contains("min_hits"),
        "{e}"
    );
}

/// A manual count whose times a spreadsheet saved short (`2026-03-02 7:00` for
/// `2026-03-02T07:00:00`) is compared as written in full; times without their date against a
/// report whose have one are named as written differently, with how to write them (a newcomer's
/// trial: every cell read -100% with a warning about clocks 12 hours apart).
#[test]
fn manual_count_times_written_short_are_compared() {
    let dir = scratch("short-times");
    let report = demo_report(&dir);
    let truth = std::fs::read_to_string(demo("truth_counts.csv")).unwrap();
    let short = write(
        &dir,
        "short.csv",
        truth
            .replace("2026-03-02T07:00:00", "2026-03-02 7:00")
            .as_bytes(),
    );
    let json = |truth: &str| {
        let o = throughline(&["score-counts", "--truth", truth, &report, "--json"]);
        assert!(o.status.success(), "{}", stderr(&o));
        serde_json::from_slice::<serde_json::Value>(&o.stdout).unwrap()
    };
    assert_eq!(
        json(&short)["overall"],
        json(&demo("truth_counts.csv"))["overall"]
    );
    // A dated manual count against an undated report is the same mistake the other way round.
    let plan_text = std::fs::read_to_string(demo("plan.json")).unwrap();
    let mut plan_value: serde_json::Value = serde_json::from_str(&plan_text).unwrap();
    plan_value.as_object_mut().unwrap().remove("start");
    let undated_plan = write(&dir, "undated-plan.json", plan_value.to_string().as_bytes());
    let undated_report = dir.join("undated-report.json").display().to_string();
    let o = throughline(&[
        "run",
        &demo("detections.txt"),
        "--plan",
        &undated_plan,
        "-o",
        &undated_report,
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let o = throughline(&[
        "score-counts",
        "--truth",
        &demo("truth_counts.csv"),
        &undated_report,
    ]);
    assert!(
        stderr(&o).contains("as the report writes them (like 00:00:00)"),
        "{}",
        stderr(&o)
    );
    let undated = write(
        &dir,
        "undated.csv",
        truth.replace("2026-03-02T07:00:00", "07:00").as_bytes(),
    );
    let o = throughline(&["score-counts", "--truth", &undated, &report]);
    let e = stderr(&o);
    assert!(
        e.contains("(07:00:00 to 07:00:00)")
            && e.contains("write the manual count's interval_start as the report writes them (like 2026-03-02T07:00:00)"),
        "{e}"
    );
}

/// Footage that disagrees with the plan is said to before the work: its frame rate (times and
/// intervals follow the plan's) and a line wholly outside its picture (a newcomer's trial: both
/// went unsaid, the line counting 0).
#[test]
fn footage_and_plan_that_disagree_are_named() {
    let dir = scratch("footage-plan");
    let (w, h) = (64usize, 48usize);
    let mut y4m = format!("YUV4MPEG2 W{w} H{h} F30:1 Ip A1:1 C420jpeg\n").into_bytes();
    for _ in 0..3 {
        y4m.extend_from_slice(b"FRAME\n");
        y4m.extend(std::iter::repeat_n(120u8, w * h + 2 * (w / 2) * (h / 2)));
    }
    let footage = write(&dir, "f30.y4m", &y4m);
    let plan = write(
        &dir,
        "plan.json",
        br#"{ "frame_rate": 25, "screenlines": [
              { "name": "in view", "points": [[0, 20], [64, 20]] },
              { "name": "far off", "points": [[1000, 0], [1000, 48]] } ] }"#,
    );
    let o = throughline(&["run", "--y4m", &footage, "--plan", &plan]);
    assert!(o.status.success(), "{}", stderr(&o));
    let e = stderr(&o);
    assert!(
        e.contains("the footage runs at 30 frames a second, the plan says 25 (`frame_rate`)"),
        "{e}"
    );
    assert!(
        e.contains("line `far off` lies wholly outside the picture (64 × 48)"),
        "{e}"
    );
    assert!(!e.contains("in view` lies"), "{e}");
    // Nothing moves in it: said so, not "the last box is in frame 0".
    let found = dir.join("found.txt").display().to_string();
    let o = throughline(&["detect", "--y4m", &footage, "-o", &found]);
    let e = stderr(&o);
    assert!(
        e.contains("nothing moving was found in its 3 frames"),
        "{e}"
    );
    assert!(!e.contains("--frames"), "{e}");
}

/// A plan line wholly beyond every box, with no footage to check the plan against, is warned of
/// (a newcomer's trial: a plan drawn for a larger picture counted 0 and 0 there without a word);
/// lines the boxes reach are not.
#[test]
fn a_line_beyond_every_box_is_warned_of_without_footage() {
    let dir = scratch("beyond-boxes");
    let plan = write(
        &dir,
        "plan.json",
        br#"{"frame_rate": 25, "screenlines": [
            {"name": "gate", "points": [[100, 900], [500, 900]]},
            {"name": "mid", "points": [[0, 200], [640, 200]]}]}"#,
    );
    let o = throughline(&["run", &demo("detections.csv"), "--plan", &plan, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(
        stderr(&o).trim(),
        "warning: line `gate` lies wholly beyond every box (the boxes reach 673 × 384 pixels): \
         nothing can be counted there; was the plan drawn on footage of another size?"
    );
}
