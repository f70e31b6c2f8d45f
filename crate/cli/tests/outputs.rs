//! Nothing the user made is lost: outputs are written whole or not at all, a failed run leaves the
//! previous files as they were, and an output that is an input (or another output) is refused.

mod common;

use common::*;

#[test]
fn a_full_disk_mid_run_leaves_the_previous_outputs_intact() {
    let dir = scratch("full-disk");
    let report = dir.join("report.json");
    let report_s = report.display().to_string();
    let first = throughline(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "-o",
        &report_s,
        "-q",
    ]);
    assert!(first.status.success(), "{}", stderr(&first));
    let before = std::fs::read(&report).unwrap();
    // The counts CSV goes to a device that is always full (the kernel answers ENOSPC), so the run
    // fails after the report is written to its temporary file and before anything is put in place.
    let full = dir.join("counts.csv");
    std::os::unix::fs::symlink("/dev/full", &full).unwrap();
    let o = throughline(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "--method",
        "iou",
        "-o",
        &report_s,
        "--csv",
        &full.display().to_string(),
        "-q",
    ]);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        stderr(&o).contains("No space left on device"),
        "{}",
        stderr(&o)
    );
    assert_eq!(
        std::fs::read(&report).unwrap(),
        before,
        "the previous report stands"
    );
    let leftovers: Vec<_> = std::fs::read_dir(&dir)
        .unwrap()
        .filter_map(|e| e.ok())
        .filter(|e| e.file_name().to_string_lossy().ends_with(".partial"))
        .collect();
    assert!(leftovers.is_empty(), "temporary files left: {leftovers:?}");
}

#[test]
fn an_output_that_is_an_input_or_another_output_is_refused() {
    let dir = scratch("same-file");
    let dets = write(
        &dir,
        "d.txt",
        &std::fs::read(demo("detections.txt")).unwrap(),
    );
    let plan = write(
        &dir,
        "plan.json",
        &std::fs::read(demo("plan.json")).unwrap(),
    );
    for args in [
        vec!["track", &dets, "-o", &dets],
        vec!["run", &dets, "--plan", &plan, "-o", &plan],
        vec![
            "run", &dets, "--plan", &plan, "-o", "x.json", "--csv", "./x.json",
        ],
        vec!["tune", &dets, "--truth", &dets, "-o", &dets],
    ] {
        let o = throughline(&args);
        assert_eq!(o.status.code(), Some(2), "{args:?}: {}", stderr(&o));
        assert!(
            stderr(&o).contains("choose another") || stderr(&o).contains("same file"),
            "{}",
            stderr(&o)
        );
    }
    assert_eq!(
        std::fs::read(&dets).unwrap(),
        std::fs::read(demo("detections.txt")).unwrap()
    );
    // An output in a folder that does not exist is refused before the work, not after it (a
    // newcomer's trial: "os error 2" once everything was tracked).
    let run_to = |outputs: &[&str]| {
        let mut args = vec!["run", dets.as_str(), "--plan", plan.as_str()];
        args.extend_from_slice(outputs);
        throughline(&args)
    };
    let nowhere = dir.join("no-such-folder").join("report.json");
    let o = run_to(&["-o", &nowhere.display().to_string()]);
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("no-such-folder does not exist: create it first"),
        "{}",
        stderr(&o)
    );
    // Frames rendered into the scene's own folder, which `simulate` makes: not refused (a
    // newcomer's trial), while a folder elsewhere must be there.
    let scene = dir.join("new-scene");
    let frames = scene.join("frames.y4m").display().to_string();
    let sim = |render: &str| {
        let d = scene.display().to_string();
        throughline(&[
            "simulate",
            "--out-dir",
            &d,
            "--frames",
            "5",
            "--render",
            render,
        ])
    };
    let o = sim(&frames);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(std::path::Path::new(&frames).exists());
    let o = sim(&nowhere.with_extension("y4m").display().to_string());
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    // Writing to a device is not a clash: /dev/null takes any number of outputs.
    let o = run_to(&["-o", "/dev/null", "--csv", "/dev/null", "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
}
