//! The hand-in outputs from the command line: `run --site --start` writes the grid, the matrix
//! and the summary next to the report, named from the site and date; a project file brings its
//! hand counts (tallies) into the report and `score-counts` compares them.

mod common;

use common::*;

#[test]
fn run_with_a_site_writes_the_hand_in_files_next_to_the_report() {
    let dir = scratch("handin");
    let report = dir.join("report.json").display().to_string();
    let o = throughline(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "-o",
        &report,
        "--site",
        "Footbridge Plaza (east)",
        "--start",
        "2026-04-01T16:30:00",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    for suffix in ["grid.csv", "grid-long.csv", "movements.csv", "summary.html"] {
        let name = format!("footbridge-plaza-east_2026-04-01_{suffix}");
        assert!(
            dir.join(&name).exists(),
            "{name} missing; stderr: {}",
            stderr(&o)
        );
    }
    let grid =
        std::fs::read_to_string(dir.join("footbridge-plaza-east_2026-04-01_grid.csv")).unwrap();
    assert!(
        grid.starts_with("Site,Footbridge Plaza (east)\nRecording,\"from 2026-04-01T16:30:00"),
        "{grid}"
    );
    assert!(grid.contains("\nInterval start,Interval end,"), "{grid}");
    let summary =
        std::fs::read_to_string(dir.join("footbridge-plaza-east_2026-04-01_summary.html")).unwrap();
    assert!(summary.contains("<h1>Counts at Footbridge Plaza (east)</h1>"));
    // A bad start time is a usage error naming the option.
    let o = throughline(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "--start",
        "half past four",
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("--start"), "{}", stderr(&o));
}

#[test]
fn a_projects_tallies_are_checked_in_the_report_and_by_score_counts() {
    let dir = scratch("tallies");
    let plan: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(demo("plan.json")).unwrap()).unwrap();
    // A hand count of the first 20 s of the demo's east-west divide, made from its true crossings
    // (demo-site/demo/truth_report.json, the simulator's truth).
    let truth: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(demo("truth_report.json")).unwrap()).unwrap();
    let presses: Vec<serde_json::Value> = truth["events"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|e| e["name"] == "east-west divide" && e["frame"].as_u64().unwrap() <= 500)
        .map(|e| serde_json::json!({"frame": e["frame"], "screenline": "east-west divide", "direction": e["direction"]}))
        .collect();
    let project = serde_json::json!({
        "format": "throughline-project", "version": 1, "plan": plan, "site": "Footbridge plaza",
        "tallies": [{"who": "R. Tester", "made": "2026-12-03T09:00:00", "from_frame": 1, "to_frame": 500,
                     "screenlines": ["east-west divide"], "presses": presses}]
    });
    let project_path = write(&dir, "project.json", project.to_string().as_bytes());
    let report = dir.join("report.json").display().to_string();
    let o = throughline(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "--edits",
        &project_path,
        "-o",
        &report,
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let r: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&report).unwrap()).unwrap();
    let check = &r["checks"][0];
    assert_eq!(check["who"], "R. Tester");
    let by_hand: u64 = check["groups"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|g| g["class"] == "all")
        .map(|g| g["manual"].as_u64().unwrap())
        .sum();
    assert_eq!(by_hand, presses.len() as u64);
    // The project's site names the hand-in files.
    assert!(dir
        .join("footbridge-plaza_2026-03-02_summary.html")
        .exists());
    // With the report on standard output, nothing is written unasked into the working folder.
    let elsewhere = scratch("handin-stdout");
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_throughline"))
        .args(["run", &demo("detections.csv"), "--plan", &demo("plan.json")])
        .args(["--edits", &project_path, "-q"])
        .current_dir(&elsewhere)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(std::fs::read_dir(&elsewhere).unwrap().count(), 0);
    let o = throughline(&["score-counts", "--truth", &project_path, &report]);
    assert!(o.status.success(), "{}", stderr(&o));
    let out = stdout(&o);
    assert!(
        out.contains("hand count by R. Tester") && out.contains("loose estimate"),
        "{out}"
    );
}

#[test]
fn the_summary_draws_the_plan_at_the_stills_own_size() {
    if !ffmpeg_or_skip("the_summary_draws_the_plan_at_the_stills_own_size") {
        return;
    }
    // Stills of the demo footage at half size, as PNG and as JPEG, by ffmpeg; their size read
    // from their headers must be ffmpeg's (320×180), so the plan is drawn over them in place.
    let dir = scratch("still-size");
    for name in ["still.png", "still.jpg"] {
        let still = dir.join(name);
        let status = std::process::Command::new("ffmpeg")
            .args(["-v", "error", "-y", "-i", &demo("footage.webm")])
            .args(["-frames:v", "1", "-vf", "scale=320:180"])
            .arg(&still)
            .status()
            .unwrap();
        assert!(status.success());
        let report = dir.join("report.json").display().to_string();
        let o = throughline(&[
            "run",
            &demo("detections.csv"),
            "--plan",
            &demo("plan.json"),
            "-o",
            &report,
            "-q",
            "--site",
            "Still",
            "--still",
            &still.display().to_string(),
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        let summary = std::fs::read_to_string(dir.join("still_2026-03-02_summary.html")).unwrap();
        assert!(
            summary.contains("viewBox=\"0 0 320 180\""),
            "{name}: {}",
            &summary[summary.find("<svg").unwrap_or(0)..][..200]
        );
        assert!(!summary.contains(" style=\""), "no inline style attributes");
        // The whole picture is in it (a still's bytes hold NULs: read as a picture, not as text).
        use base64::Engine as _;
        let whole =
            base64::engine::general_purpose::STANDARD.encode(std::fs::read(&still).unwrap());
        assert!(summary.contains(&whole), "{name}: the still embedded whole");
    }
}

/// The command a summary gives to reproduce its numbers, as the summary writes it.
fn summary_command(summary: &str) -> Vec<String> {
    let start = summary.find("<code>throughline run ").expect("the command") + "<code>".len();
    let end = start + summary[start..].find("</code>").unwrap();
    summary[start..end].split(' ').map(str::to_string).collect()
}

#[test]
fn boxes_found_in_footage_are_named_and_the_summarys_command_gives_the_same_report() {
    // A newcomer's trial: `run --y4m` with detector settings handed in "Footage: not given" and
    // a command naming DETECTIONS; and the command, run where the summary lay, replaced it.
    let dir = scratch("handin-found");
    let d = dir.display().to_string();
    let o = throughline(&[
        "simulate",
        "--out-dir",
        &d,
        "--seed",
        "3",
        "--frames",
        "120",
        "--density",
        "5",
        "--width",
        "320",
        "--height",
        "180",
        "--render",
        &format!("{d}/frames.y4m"),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    write(
        &dir,
        "heights.json",
        br#"{"far_height": 17, "near_height": 46}"#,
    );
    let plan = write(
        &dir,
        "plan.json",
        br#"{"frame_rate": 25, "start": "2026-04-01T08:00:00",
            "screenlines": [{"name": "mid", "points": [[10, 100], [310, 100]]}]}"#,
    );
    let report = dir.join("report.json").display().to_string();
    let o = throughline(&[
        "run",
        "--footage",
        &format!("{d}/frames.y4m"),
        "--detector-config",
        &format!("{d}/heights.json"),
        "--plan",
        &plan,
        "-o",
        &report,
        "--site",
        "Gate",
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let grid = std::fs::read_to_string(dir.join("gate_2026-04-01_grid.csv")).unwrap();
    assert!(grid.contains("\nFootage,frames.y4m\n"), "{grid}");
    assert!(
        grid.contains("\nDetections,\"found in the footage, detector settings heights.json\"\n"),
        "{grid}"
    );
    let summary = std::fs::read_to_string(dir.join("gate_2026-04-01_summary.html")).unwrap();
    let command = summary_command(&summary);
    assert_eq!(
        command.join(" "),
        "throughline run --footage frames.y4m --detector-config heights.json --plan plan.json --site Gate --start 2026-04-01T08:00:00 -o check/report.json"
    );
    // Run where the files are, in the folder it names: the same report, the summary left alone.
    std::fs::create_dir_all(dir.join("check")).unwrap();
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_throughline"))
        .args(&command[1..])
        .arg("-q")
        .current_dir(&dir)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(
        std::fs::read_to_string(dir.join("check/report.json")).unwrap(),
        std::fs::read_to_string(&report).unwrap()
    );
    assert_eq!(
        std::fs::read_to_string(dir.join("gate_2026-04-01_summary.html")).unwrap(),
        summary
    );
    // Its own hand-in files are in check/, the grid the same bytes.
    assert_eq!(
        std::fs::read_to_string(dir.join("check/gate_2026-04-01_grid.csv")).unwrap(),
        grid
    );
}
