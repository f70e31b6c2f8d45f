//! Footage other than YUV4MPEG2 on the command line: WebM and MP4 decoded by ffmpeg in a child
//! process. The reference is Debian's ffmpeg itself: the boxes found in a video given as it is
//! must be those found in ffmpeg's own YUV4MPEG2 decoding of it, byte for byte (which the page's
//! WebCodecs decoding matches: `tests/browser/app.test.mjs`).

mod common;
use common::{demo, ffmpeg_or_skip, scratch, stderr, throughline};
use std::path::Path;
use std::process::Command;

/// Runs ffmpeg (quiet, overwriting) with `args`; asserts it succeeded.
fn ffmpeg(args: &[&str]) {
    let status = Command::new("ffmpeg")
        .args(["-loglevel", "error", "-y"])
        .args(args)
        .status()
        .expect("ffmpeg runs (cargo xtask test installs it)");
    assert!(status.success(), "ffmpeg {args:?}");
}

/// The demo footage's first 100 frames: as WebM (VP9, copied), as H.264 MP4 (encoded here), and
/// as ffmpeg decodes each into YUV4MPEG2.
struct Clips {
    webm: String,
    mp4: String,
    webm_y4m: String,
    mp4_y4m: String,
}

fn clips(dir: &Path) -> Clips {
    let p = |name: &str| dir.join(name).display().to_string();
    let c = Clips {
        webm: p("clip.webm"),
        mp4: p("clip.mp4"),
        webm_y4m: p("clip-webm.y4m"),
        mp4_y4m: p("clip-mp4.y4m"),
    };
    let footage = demo("footage.webm");
    ffmpeg(&["-i", &footage, "-frames:v", "100", "-c", "copy", &c.webm]);
    let h264 = [
        "-c:v", "libx264", "-pix_fmt", "yuv420p", "-preset", "veryfast",
    ];
    ffmpeg(&[&["-i", &footage, "-frames:v", "100"][..], &h264, &[&c.mp4]].concat());
    let to_y4m = ["-pix_fmt", "yuv420p", "-f", "yuv4mpegpipe"];
    ffmpeg(&[&["-i", &c.webm][..], &to_y4m, &[&c.webm_y4m]].concat());
    ffmpeg(&[&["-i", &c.mp4][..], &to_y4m, &[&c.mp4_y4m]].concat());
    c
}

/// `throughline detect` of `footage` (given with `flag`); the detections' text.
fn detect(flag: &str, footage: &str, out: &Path) -> String {
    let o = throughline(&["detect", flag, footage, "-o", out.to_str().unwrap()]);
    assert!(o.status.success(), "{}", stderr(&o));
    std::fs::read_to_string(out).unwrap()
}

#[test]
fn webm_and_mp4_give_the_boxes_of_their_ffmpeg_decoding() {
    if !ffmpeg_or_skip("webm_and_mp4_give_the_boxes_of_their_ffmpeg_decoding") {
        return;
    }
    let dir = scratch("video-detect");
    let c = clips(&dir);
    for (video, y4m) in [(&c.webm, &c.webm_y4m), (&c.mp4, &c.mp4_y4m)] {
        let direct = detect("--footage", video, &dir.join("direct.txt"));
        let decoded = detect("--y4m", y4m, &dir.join("decoded.txt"));
        assert_eq!(direct, decoded, "{video}");
        assert!(direct.starts_with("# footage_frames: 100\n"), "{video}");
        assert!(direct.lines().count() > 500, "{video}: boxes found");
    }
}

#[test]
fn run_counts_footage_given_alone_as_its_ffmpeg_decoding() {
    if !ffmpeg_or_skip("run_counts_footage_given_alone_as_its_ffmpeg_decoding") {
        return;
    }
    let dir = scratch("video-run");
    let c = clips(&dir);
    let plan = demo("plan.json");
    let report = |footage: &[&str], name: &str| -> serde_json::Value {
        let out = dir.join(name).display().to_string();
        let args = [&["run", "--plan", &plan, "-o", &out, "-q"][..], footage].concat();
        let o = throughline(&args);
        assert!(o.status.success(), "{}", stderr(&o));
        serde_json::from_str(&std::fs::read_to_string(&out).unwrap()).unwrap()
    };
    let from_mp4 = report(&["--footage", &c.mp4], "mp4.json");
    assert_eq!(from_mp4, report(&["--y4m", &c.mp4_y4m], "mp4-y4m.json"));
    assert_eq!(from_mp4["frame_count"], 100);
    let tracks = from_mp4["tracks_counted"].as_u64();
    assert!(tracks.is_some_and(|n| n > 5), "{tracks:?}");
    // --y4m takes other video too, and a batch's footage column.
    assert_eq!(
        report(&["--y4m", &c.webm], "webm.json"),
        report(&["--y4m", &c.webm_y4m], "webm-y4m.json")
    );
    let manifest = dir.join("clips.csv");
    let rows = format!("name,footage,plan\nphone,clip.mp4,{plan}\n");
    std::fs::write(&manifest, rows).unwrap();
    let out = dir.join("batch").display().to_string();
    let o = throughline(&["batch", manifest.to_str().unwrap(), "--out", &out, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let batch: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(dir.join("batch/phone/report.json")).unwrap(),
    )
    .unwrap();
    assert_eq!(batch["screenlines"], from_mp4["screenlines"]);
}

#[test]
fn video_ffmpeg_cannot_read_is_named_and_a_cut_one_is_used_to_its_cut() {
    if !ffmpeg_or_skip("video_ffmpeg_cannot_read_is_named_and_a_cut_one_is_used_to_its_cut") {
        return;
    }
    let dir = scratch("video-bad");
    let c = clips(&dir);
    // Not a video at all.
    let o = throughline(&["detect", "--footage", &demo("plan.json")]);
    assert_eq!(o.status.code(), Some(1));
    let said = stderr(&o);
    assert!(
        said.contains("plan.json: ffmpeg could not decode it ("),
        "{said}"
    );
    assert!(!said.contains("panicked"), "{said}");
    // Cut part way, as an interrupted copy leaves it: the frames before the cut are used, and
    // ffmpeg's complaint is said once (the file is read twice).
    let bytes = std::fs::read(&c.webm).unwrap();
    let cut = dir.join("cut.webm");
    std::fs::write(&cut, &bytes[..bytes.len() / 2]).unwrap();
    let o = throughline(&["detect", "--footage", cut.to_str().unwrap(), "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let said = stderr(&o);
    assert_eq!(
        said.matches("ffmpeg, decoding it, said:").count(),
        1,
        "{said}"
    );
    let first = String::from_utf8_lossy(&o.stdout)
        .lines()
        .next()
        .map(str::to_owned);
    let frames: u32 = first
        .unwrap()
        .trim_start_matches("# footage_frames: ")
        .parse()
        .unwrap();
    assert!((10..100).contains(&frames), "{frames} frames");
    // In a batch the clip is counted, its warning said with its name and kept beside its report
    // (a newcomer's re-trial: a cut clip was handed in as done, the warning lost).
    let manifest = dir.join("cut.csv");
    let plan = demo("plan.json");
    std::fs::write(
        &manifest,
        format!("name,footage,plan\ncut,cut.webm,{plan}\n"),
    )
    .unwrap();
    let out = dir.join("batch").display().to_string();
    let o = throughline(&["batch", manifest.to_str().unwrap(), "--out", &out, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let said = stderr(&o);
    assert!(
        said.contains("warning: cut: ") && said.contains("cut.webm: ffmpeg, decoding it, said:"),
        "{said}"
    );
    let kept = std::fs::read_to_string(dir.join("batch/cut/warnings.txt")).unwrap();
    assert!(kept.contains("ffmpeg, decoding it, said:"), "{kept}");
    // No ffmpeg on the PATH: how to get it, or how to convert the footage.
    let o = Command::new(env!("CARGO_BIN_EXE_throughline"))
        .args(["detect", "--footage", &c.mp4])
        .env("PATH", dir.join("no-tools"))
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1));
    let said = stderr(&o);
    assert!(said.contains("not YUV4MPEG2, and ffmpeg, which decodes it, is not installed"));
    assert!(said.contains("-f yuv4mpegpipe footage.y4m"), "{said}");
}

/// Footage from a camera that turns is said to be so, with where (the fixed-camera detector's
/// boxes there are not objects): the demo's plaza seen through a window that pans across it, made
/// by ffmpeg's `crop` with a moving offset. The demo footage itself, from a still camera, is not.
#[test]
fn a_camera_that_pans_is_said_to_move_and_a_still_one_is_not() {
    if !ffmpeg_or_skip("a_camera_that_pans_is_said_to_move_and_a_still_one_is_not") {
        return;
    }
    let dir = scratch("video-pan");
    let pan = dir.join("pan.mp4").display().to_string();
    // Still for the first 2 s, then turning 100 pixels a second for 4 s (frames 51–150), still again.
    ffmpeg(&[
        "-i",
        &demo("footage.webm"),
        "-t",
        "8",
        "-vf",
        "scale=1280:720,crop=640:360:'100*min(max(t-2,0),4)':180",
        "-c:v",
        "libx264",
        "-pix_fmt",
        "yuv420p",
        "-preset",
        "veryfast",
        &pan,
    ]);
    // Counted and handed in: the warning heads the grid and the summary too (a newcomer's trial:
    // it was said on the terminal only, and the files handed in looked clean).
    let out = dir.join("counts");
    std::fs::create_dir_all(&out).unwrap();
    let o = throughline(&[
        "run",
        "--footage",
        &pan,
        "--plan",
        &demo("plan.json"),
        "--site",
        "Turning camera",
        "-o",
        out.join("report.json").to_str().unwrap(),
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let said = stderr(&o);
    let grid = std::fs::read_to_string(out.join("turning-camera_2026-03-02_grid.csv")).unwrap();
    assert!(
        grid.contains("\nWarning,\"") && grid.contains("pan.mp4: the camera seems to move"),
        "{grid}"
    );
    let summary =
        std::fs::read_to_string(out.join("turning-camera_2026-03-02_summary.html")).unwrap();
    assert!(
        summary.contains("<h2>Before relying on these counts</h2>")
            && summary.contains("pan.mp4: the camera seems to move"),
        "{summary}"
    );
    let warning = said
        .lines()
        .find(|l| l.starts_with("warning: "))
        .unwrap_or_else(|| panic!("{said}"));
    assert!(
        warning.contains("pan.mp4: the camera seems to move (pan, shake or be carried) in about"),
        "{warning}"
    );
    let between = warning.split("between frames ").nth(1).unwrap();
    let frames: Vec<usize> = between
        .split(['.', ' '])
        .filter_map(|w| w.parse().ok())
        .take(2)
        .collect();
    assert!(
        (40..=60).contains(&frames[0]) && (140..=160).contains(&frames[1]),
        "{warning}"
    );
    // The demo's first 150 frames as they are (a still camera, people walking).
    let still = dir.join("still.webm").display().to_string();
    ffmpeg(&[
        "-i",
        &demo("footage.webm"),
        "-frames:v",
        "150",
        "-c",
        "copy",
        &still,
    ]);
    let o = throughline(&["detect", "--footage", &still, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(!stderr(&o).contains("camera"), "{}", stderr(&o));
}

/// Footage with frames missing (here the demo's frames 101–150 left out, the others keeping their
/// times, as a recorder that dropped them writes it): decoded at a constant frame rate, each gap
/// filled as ffmpeg fills it, so the clip keeps its 750 frames and its clock, and said. Before,
/// every frame after the gap was numbered 50 too early.
#[test]
fn frames_missing_from_footage_are_filled_and_said() {
    if !ffmpeg_or_skip("frames_missing_from_footage_are_filled_and_said") {
        return;
    }
    let dir = scratch("video-gaps");
    let gap = dir.join("dropped.webm").display().to_string();
    ffmpeg(&[
        "-i",
        &demo("footage.webm"),
        "-vf",
        "select='not(between(n\\,100\\,149))'",
        "-fps_mode",
        "passthrough",
        "-c:v",
        "libvpx-vp9",
        "-deadline",
        "realtime",
        &gap,
    ]);
    let out = dir.join("found.txt");
    let o = throughline(&["detect", "--footage", &gap, "-o", out.to_str().unwrap()]);
    assert!(o.status.success(), "{}", stderr(&o));
    let said = stderr(&o);
    assert_eq!(
        said.matches("dropped.webm: 50 frames missing from it were filled with the pictures either side (it was recorded at a variable frame rate, or the camera or recorder dropped frames), so that frame numbers and times follow its clock").count(),
        1,
        "said once, though the file is read twice: {said}"
    );
    assert!(said.contains("over 750 frames"), "{said}");
    assert!(std::fs::read_to_string(&out)
        .unwrap()
        .starts_with("# footage_frames: 750\n"));
}

/// `review --footage` alone finds the objects in the footage as `run --footage` does, and lists
/// the doubtful moments of that count (a newcomer's trial: it was refused for want of a
/// detections file, though `run` took the footage alone).
#[test]
fn review_takes_footage_alone_as_run_does() {
    if !ffmpeg_or_skip("review_takes_footage_alone_as_run_does") {
        return;
    }
    let dir = scratch("video-review");
    let clip = dir.join("clip.webm").display().to_string();
    ffmpeg(&[
        "-i",
        &demo("footage.webm"),
        "-frames:v",
        "150",
        "-c",
        "copy",
        &clip,
    ]);
    let heights = dir.join("heights.json");
    std::fs::write(&heights, r#"{"far_height": 34, "near_height": 91}"#).unwrap();
    let heights = heights.display().to_string();
    let args = ["--footage", &clip, "--plan", &demo("plan.json")];
    let o = throughline(
        &[
            &["review"][..],
            &args,
            &["--detector-config", &heights, "--json", "-q"],
        ]
        .concat(),
    );
    assert!(o.status.success(), "{}", stderr(&o));
    let queue: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let frames: Vec<u64> = queue
        .as_array()
        .unwrap()
        .iter()
        .map(|d| d["frame"].as_u64().unwrap())
        .collect();
    assert!(
        !frames.is_empty() && frames.iter().all(|f| (1..=150).contains(f)),
        "{frames:?}"
    );
    // With a detections file too, the detector's settings have nothing to do: refused.
    let o = throughline(
        &[
            &["review", &demo("detections.csv")][..],
            &args,
            &["--detector-config", &heights],
        ]
        .concat(),
    );
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("--detector-config is for finding objects"),
        "{}",
        stderr(&o)
    );
}
