//! Bridging missed detections with footage on the command line (`run --y4m`, `track --y4m`):
//! footage rendered by our own simulator, whose true tracks are known; the tracks are scored with
//! the evaluation crate's IDF1 (checked against TrackEval 1.3 in `crate/eval`).

mod common;
use common::{scratch, stderr, throughline, write};

/// A rendered scene whose detector misses three boxes in ten, tracked with the IoU tracker (a
/// 2-frame gap at most), so that many tracks break where the footage still shows the person.
fn scene(dir: &std::path::Path) -> (String, String, String) {
    let d = dir.display().to_string();
    let frames = dir.join("frames.y4m").display().to_string();
    let o = throughline(&[
        "simulate",
        "--out-dir",
        &d,
        "--seed",
        "5",
        "--frames",
        "150",
        "--density",
        "6",
        "--miss-rate",
        "0.3",
        "--false-positives",
        "0",
        "--width",
        "320",
        "--height",
        "180",
        "--render",
        &frames,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let plan = write(
        dir,
        "plan.json",
        br#"{ "frame_rate": 25, "screenlines": [ { "name": "mid", "points": [[0, 110], [320, 110]] } ] }"#,
    );
    (
        dir.join("detections.txt").display().to_string(),
        frames,
        plan,
    )
}

fn idf1(dir: &std::path::Path, tracks: &str) -> f64 {
    let truth = dir.join("truth.txt").display().to_string();
    let o = throughline(&["score", "--truth", &truth, tracks, "--json"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    s["idf1"].as_f64().unwrap()
}

#[test]
fn footage_bridges_missed_detections_and_nothing_changes_without_it() {
    let dir = scratch("bridge");
    let (dets, frames, plan) = scene(&dir);
    let path = |name: &str| dir.join(name).display().to_string();
    let run = |extra: &[&str], report: &str, tracks: &str| {
        let mut args = vec!["run", &dets, "--method", "iou", "--plan", &plan];
        args.extend_from_slice(&["-o", report, "--tracks", tracks]);
        args.extend_from_slice(extra);
        let o = throughline(&args);
        assert!(o.status.success(), "{}", stderr(&o));
        stderr(&o)
    };
    let read = |p: &str| std::fs::read_to_string(p).unwrap();
    let (plain_report, plain_tracks) = (path("plain.json"), path("plain-tracks.json"));
    run(&[], &plain_report, &plain_tracks);
    // Off by default (the page does not bridge yet): footage alone changes nothing.
    let (r, t) = (path("default.json"), path("default-tracks.json"));
    run(&["--y4m", &frames], &r, &t);
    assert_eq!(read(&r), read(&plain_report));
    let on = write(&dir, "on.json", br#"{"bridge_frames": 25}"#);
    let (report, tracks) = (path("bridged.json"), path("bridged-tracks.json"));
    let said = run(&["--y4m", &frames, "--config", &on], &report, &tracks);
    assert!(
        said.contains("gaps between tracks followed in the footage"),
        "{said}"
    );
    let count = |p: &str| {
        let v: serde_json::Value = serde_json::from_str(&read(p)).unwrap();
        v["tracks"].as_array().unwrap().len()
    };
    assert!(count(&tracks) < count(&plain_tracks), "{said}");
    // Joining pieces of one person's track keeps identities (IDF1; TrackEval's definition).
    assert!(idf1(&dir, &tracks) > idf1(&dir, &plain_tracks), "{said}");

    // `track --y4m` gives the tracks `run --y4m` counted.
    let alone = path("track.json");
    let o = throughline(&[
        "track", &dets, "--method", "iou", "--y4m", &frames, "--config", &on, "-o", &alone, "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(read(&alone), read(&tracks));

    // Footage from standard input cannot be read twice: not bridged, a note says so; the report
    // is the plain one (its settings name no bridging).
    let off = write(&dir, "off.json", br#"{"bridge_frames": 0}"#);
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_throughline"))
        .args([
            "run", &dets, "--method", "iou", "--plan", &plan, "--y4m", "-", "--config", &on,
        ])
        .args(["-o", &path("piped.json")])
        .stdin(std::fs::File::open(&frames).unwrap())
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stderr(&o).contains("needs a file"), "{}", stderr(&o));
    assert_eq!(read(&path("piped.json")), read(&plain_report));

    // The detector's settings with a detections file: nothing to detect, a usage error.
    let o = throughline(&[
        "run",
        &dets,
        "--y4m",
        &frames,
        "--detector-config",
        &off,
        "--plan",
        &plan,
    ]);
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
}
