//! Corrections replayed by the command line (`--edits`): an edits file and a project file give
//! the same report, each edit reported as applied or why not; a bad file is refused with its line.

mod common;

use common::*;
use std::path::Path;

fn report_of(args: &[&str]) -> serde_json::Value {
    let o = throughline(args);
    assert!(o.status.success(), "{}", stderr(&o));
    serde_json::from_slice(&o.stdout).expect("a report")
}

#[test]
fn run_replays_an_edits_file_and_a_project_file_alike() {
    let dir = scratch("edits");
    let plain = report_of(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "-q",
    ]);
    // Reject the first counted crossing, add one, and ask for a track that is not there.
    let first = plain["events"]
        .as_array()
        .unwrap()
        .iter()
        .find(|e| e["kind"] == "screenline")
        .expect("the demo counts crossings");
    let edits = serde_json::json!([
        {"edit": "reject_crossing", "screenline": first["name"], "direction": first["direction"],
         "track": first["track"], "frame": first["frame"], "reason": "checked: a shadow"},
        {"edit": "add_crossing", "screenline": "plaza midline", "direction": "forward",
         "class": "pedestrian", "frame": 300},
        {"edit": "delete_track", "track": {"id": 999, "frames": [1, 2]}}
    ]);
    let file = write(
        &dir,
        "edits.json",
        serde_json::json!({"format": "throughline-edits", "version": 1, "edits": edits})
            .to_string()
            .as_bytes(),
    );
    let plan: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(demo("plan.json")).unwrap()).unwrap();
    let project = write(
        &dir,
        "project.json",
        serde_json::json!({"format": "throughline-project", "version": 1, "plan": plan, "edits": edits})
            .to_string()
            .as_bytes(),
    );
    let run = |file: &str| {
        let o = run_demo_with_edits(file);
        (stdout(&o), stderr(&o))
    };
    let (from_edits, said) = run(&file);
    let (from_project, _) = run(&project);
    assert_eq!(from_edits, from_project);
    assert!(
        said.contains("an edit was not applied: there is no track 999"),
        "{said}"
    );
    let r: serde_json::Value = serde_json::from_str(&from_edits).unwrap();
    let applied: Vec<bool> = r["edits"]
        .as_array()
        .unwrap()
        .iter()
        .map(|e| e["applied"].as_bool().unwrap())
        .collect();
    assert_eq!(applied, vec![true, true, false]);
    assert_eq!(r["rejected_events"][0]["reason"], "checked: a shadow");
    let total = |r: &serde_json::Value| -> u64 {
        r["screenlines"]
            .as_array()
            .unwrap()
            .iter()
            .map(|l| l["forward"].as_u64().unwrap() + l["backward"].as_u64().unwrap())
            .sum()
    };
    assert_eq!(total(&r), total(&plain), "one crossing rejected, one added");
}

#[test]
fn a_bad_edits_file_is_refused_with_its_line() {
    let dir = scratch("bad-edits");
    let bad = write(
        &dir,
        "edits.json",
        b"{\"format\": \"throughline-edits\", \"version\": 1, \"edits\": [\n  {\"edit\": \"undo_everything\"}\n]}",
    );
    let o = throughline(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "--edits",
        &bad,
    ]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("edits.json: line 2") && e.contains("undo_everything"),
        "{e}"
    );
    let report = write(&dir, "report.json", b"{\"format\": \"throughline-report\"}");
    let o = throughline(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "--edits",
        &report,
    ]);
    assert!(stderr(&o).contains("not corrections"), "{}", stderr(&o));
}

/// A project saved by the page records the method and settings it tracked with; `run` and
/// `review` given the project and no --method or --config track the same way (its corrections name
/// those tracks), and say so; --method still chooses otherwise.
#[test]
fn a_projects_method_and_settings_are_used_unless_the_command_line_names_its_own() {
    let dir = scratch("project_method");
    let plan: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(demo("plan.json")).unwrap()).unwrap();
    let plan_json = plan.clone();
    let project = write(
        &dir,
        "project.json",
        serde_json::json!({"format": "throughline-project", "version": 1, "plan": plan,
            "tracking": {"method": "sort", "settings": {"max_age": 40}}, "edits": []})
        .to_string()
        .as_bytes(),
    );
    let settings = write(
        &dir,
        "settings.json",
        br#"{"method": "sort", "max_age": 40}"#,
    );
    let (dets, plan) = (demo("detections.csv"), demo("plan.json"));
    let run = |more: &[&str]| {
        let mut args = vec!["run", &dets, "--plan", &plan];
        args.extend_from_slice(more);
        let o = throughline(&args);
        assert!(o.status.success(), "{}", stderr(&o));
        let report: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
        (report["tracker"].clone(), stderr(&o))
    };
    let (from_project, said) = run(&["--edits", &project]);
    assert!(said.contains("tracking as the project"), "{said}");
    assert_eq!(from_project["method"], "sort");
    assert_eq!(from_project["max_age"], 40);
    assert_eq!(from_project, run(&["--config", &settings, "-q"]).0);
    let (chosen, said) = run(&["--edits", &project, "--method", "deepsort"]);
    assert_eq!(chosen["method"], "deepsort");
    assert!(!said.contains("tracking as the project"), "{said}");
    let queue = |more: &[&str]| {
        let mut args = vec!["review", &dets, "--plan", &plan, "--json", "-q"];
        args.extend_from_slice(more);
        throughline(&args).stdout
    };
    assert_eq!(
        queue(&["--edits", &project]),
        queue(&["--config", &settings])
    );
    // A decision the project records is marked on its moment, and counted (a newcomer's trial: a
    // moment accepted in the page was listed as if never looked at).
    let first: serde_json::Value = serde_json::from_slice(&queue(&["--edits", &project])).unwrap();
    let key = first[0]["key"].as_str().unwrap().to_string();
    let decided = write(
        &dir,
        "decided.json",
        serde_json::json!({"format": "throughline-project", "version": 1, "plan": plan_json,
            "tracking": {"method": "sort", "settings": {"max_age": 40}}, "edits": [],
            "review": [{"key": key, "decision": "accepted"}]})
        .to_string()
        .as_bytes(),
    );
    let o = throughline(&["review", &dets, "--plan", &plan, "--edits", &decided, "-q"]);
    let listed = stdout(&o);
    assert!(
        listed
            .lines()
            .next()
            .unwrap()
            .ends_with("\u{2713} accepted:"),
        "{listed}"
    );
    assert!(
        listed.contains(" 1 of them decided in the project."),
        "{listed}"
    );
    // The project given as the plan: the plan it holds is used, and said (a newcomer's trial:
    // "unknown field `format`").
    let o = throughline(&["run", &dets, "--plan", &project, "--edits", &project]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("note: project.json is a project file: the plan it holds is used"),
        "{}",
        stderr(&o)
    );
    assert_eq!(
        o.stdout,
        throughline(&["run", &dets, "--plan", &plan, "--edits", &project]).stdout
    );
}

/// The counts of each line and direction in a report.
fn line_counts(r: &serde_json::Value) -> Vec<(String, u64, u64)> {
    r["screenlines"]
        .as_array()
        .unwrap()
        .iter()
        .map(|l| {
            let n = |k: &str| l[k].as_u64().unwrap();
            (
                l["name"].as_str().unwrap().to_string(),
                n("forward"),
                n("backward"),
            )
        })
        .collect()
}

/// The demo's detections carry appearance vectors, so `deepsort` is the default. Its counts of
/// each line and direction, and those of SORT and ByteTrack, are the simulator's true ones
/// (demo-site/demo/truth_report.json, from the scene's own truth), with nothing to correct.
#[test]
fn the_demo_counted_with_each_motion_method_gives_the_simulators_true_crossings() {
    let truth: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(demo("truth_report.json")).unwrap()).unwrap();
    for method in [None, Some("sort"), Some("bytetrack")] {
        let (detections, plan) = (demo("detections.csv"), demo("plan.json"));
        let mut args = vec!["run", &detections, "--plan", &plan, "-q"];
        args.extend(method.map(|m| ["--method", m]).iter().flatten());
        let counted = report_of(&args);
        assert_eq!(
            counted["tracker"]["method"],
            method.unwrap_or("deepsort"),
            "{method:?}"
        );
        assert_eq!(line_counts(&counted), line_counts(&truth), "{method:?}");
    }
}

/// The demo's plan counted on the boxes as given, with the margin used before paths were averaged
/// (tests/fixtures/demo-plan-boxes-as-given.json): with SORT one walker is counted twice on the
/// divide, a known mistake. The review queue leads to it, and rejecting it in an edits file gives
/// the simulator's true counts.
#[test]
fn the_review_queue_leads_to_a_known_double_count_and_rejecting_it_gives_the_true_count() {
    let plan = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../tests/fixtures/demo-plan-boxes-as-given.json")
        .display()
        .to_string();
    let detections = demo("detections.csv");
    let o = throughline(&[
        "review",
        &detections,
        "--plan",
        &plan,
        "--method",
        "sort",
        "--json",
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let queue: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let first = &queue[0];
    assert_eq!(first["kinds"][0], "close_together", "{first}");
    assert_eq!(first["frame"], 500, "{first}");
    let crossing = first["crossing"].clone();
    let dir = scratch("review");
    let edits = write(
        &dir,
        "edits.json",
        serde_json::json!({"format": "throughline-edits", "version": 1, "edits": [
            {"edit": "reject_crossing", "screenline": crossing["screenline"],
             "direction": crossing["direction"], "track": crossing["track"],
             "frame": crossing["frame"], "reason": "counted twice"}]})
        .to_string()
        .as_bytes(),
    );
    let counted = |extra: &[&str]| {
        let mut args = vec![
            "run",
            &detections,
            "--plan",
            &plan,
            "--method",
            "sort",
            "-q",
        ];
        args.extend_from_slice(extra);
        line_counts(&report_of(&args))
    };
    // The simulator's truth for the demo (demo-site/demo/truth_report.json).
    let truth: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(demo("truth_report.json")).unwrap()).unwrap();
    assert_ne!(
        counted(&[]),
        line_counts(&truth),
        "as counted, one line is off"
    );
    assert_eq!(counted(&["--edits", &edits]), line_counts(&truth));
}

#[test]
fn the_picture_size_comes_from_picture_or_from_the_project_and_a_bad_one_is_refused() {
    let queue = |extra: &[&str]| {
        let mut args = vec!["review", "--json", "-q", "--plan", "PLAN", "DETECTIONS"];
        let (plan, dets) = (demo("plan.json"), demo("detections.csv"));
        args[4] = &plan;
        args[5] = &dets;
        args.extend_from_slice(extra);
        let o = throughline(&args);
        assert!(o.status.success(), "{}", stderr(&o));
        serde_json::from_slice::<serde_json::Value>(&o.stdout).unwrap()
    };
    let given = queue(&["--picture", "640x360"]);
    // A project saved by the page records the footage's size with its fingerprint.
    let dir = scratch("picture");
    let plan: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(demo("plan.json")).unwrap()).unwrap();
    let project = serde_json::json!({
        "format": "throughline-project", "version": 1, "generator": "test",
        "plan": plan, "tracking": {}, "edits": [], "review": [],
        "footage": {"name": "footage.webm", "size": 1, "head_sha256": "00", "width": 640, "height": 360}
    });
    let file = write(&dir, "project.json", project.to_string().as_bytes());
    assert_eq!(queue(&["--edits", &file]), given);
    // The footage gives its own size (a newcomer's trial: the size asked for was not at hand).
    assert_eq!(queue(&["--footage", &demo("footage.webm")]), given);
    assert_ne!(
        queue(&[]),
        given,
        "the boxes' extent is not the picture on the demo"
    );
    // A size that does not fit is said not to (a newcomer's trial: a smaller picture dropped
    // moments without a word); the right one raises no warning.
    let (plan_path, dets) = (demo("plan.json"), demo("detections.csv"));
    let review = |size: &str| {
        let o = throughline(&[
            "review",
            &dets,
            "--plan",
            &plan_path,
            "--picture",
            size,
            "--first",
            "0",
        ]);
        stderr(&o)
    };
    let small = review("320x180");
    assert!(
        small.contains("well past the picture's 320 × 180"),
        "{small}"
    );
    assert!(small.contains("line `plaza midline`"), "{small}");
    assert!(
        small.contains("wholly outside the picture (320 × 180)"),
        "{small}"
    );
    assert!(!review("640x360").contains("warning"));

    let o = throughline(&[
        "review",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "--picture",
        "640",
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("WIDTHxHEIGHT"), "{}", stderr(&o));
}

/// A project saved before paths were averaged for counting (by 0.1.x) is replayed with a note
/// saying how to count as it did; one saved since gets none.
#[test]
fn a_project_saved_before_averaged_paths_gets_a_note_on_the_rules() {
    let dir = scratch("older-project");
    let plan: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(demo("plan.json")).unwrap()).unwrap();
    let stderr_for = |generator: &str| {
        let project = serde_json::json!({
            "format": "throughline-project", "version": 1, "generator": generator,
            "plan": plan, "tracking": {}, "edits": [], "review": []
        });
        let file = write(
            &dir,
            &format!("{}.json", generator.replace(' ', "-")),
            project.to_string().as_bytes(),
        );
        stderr(&run_demo_with_edits(&file))
    };
    let old = stderr_for("throughline 0.1.0");
    assert!(
        old.contains("was saved by throughline 0.1.0")
            && old.contains(r#""smooth_seconds": 0, "hysteresis": 0.15"#),
        "{old}"
    );
    assert!(!stderr_for("throughline 0.2.0").contains("was saved by"));
}

/// `throughline run` on the demo's detections and plan with an edits or project file; it must
/// succeed.
fn run_demo_with_edits(file: &str) -> std::process::Output {
    let o = throughline(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "--edits",
        file,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    o
}

/// A project the page saved with 0.2.0 (`deepsort` by default, before it kept boxes scoring
/// 0.1–0.3) is tracked again as it was, so its corrections meet their tracks: its merge of track
/// 21 into track 17 (frames 244–378 then) applies. Saved by this version, the same merge does not
/// (track 17 now lives on to frame 399, while 21 is seen) and is reported as not applied.
#[test]
fn a_project_tracked_before_low_score_boxes_is_tracked_as_it_was() {
    let dir = scratch("low-score-project");
    let plan: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(demo("plan.json")).unwrap()).unwrap();
    let merge = serde_json::json!({"edit": "merge_tracks", "track": {"id": 21, "frames": [382, 624]},
        "into": {"id": 17, "frames": [244, 378]}, "reason": "one cyclist"});
    let replay = |generator: &str| {
        let project = serde_json::json!({
            "format": "throughline-project", "version": 1, "generator": generator,
            "plan": plan, "tracking": {}, "edits": [merge], "review": []
        });
        let file = write(
            &dir,
            &format!("{}.json", generator.replace(' ', "-")),
            project.to_string().as_bytes(),
        );
        let out = dir.join("report.json").display().to_string();
        let o = run_demo(&["--edits", &file, "-o", &out]);
        assert!(o.status.success(), "{}", stderr(&o));
        let report: serde_json::Value =
            serde_json::from_str(&std::fs::read_to_string(&out).unwrap()).unwrap();
        (report["edits"][0]["applied"].as_bool(), stderr(&o))
    };
    let (applied, said) = replay("throughline 0.2.0");
    assert_eq!(applied, Some(true), "{said}");
    assert!(
        said.contains("with the settings throughline 0.2.0 tracked with")
            && said.contains(r#"{"min_score":0.3,"start_score":0}"#),
        "{said}"
    );
    let (applied, said) = replay(&format!("throughline {}", env!("CARGO_PKG_VERSION")));
    assert_eq!(applied, Some(false), "{said}");
    assert!(!said.contains("tracked with"), "{said}");
    // With settings of one's own, the older ones are not laid under them: the note says what to add.
    let settings = write(&dir, "mine.json", br#"{"max_age": 50}"#);
    let old = dir.join("throughline-0.2.0.json").display().to_string();
    let out = dir.join("mine-report.json").display().to_string();
    let o = run_demo(&["--edits", &old, "--config", &settings, "-o", &out]);
    assert!(
        stderr(&o).contains(
            r#"To track as it did, put {"min_score":0.3,"start_score":0} in the settings file"#
        ),
        "{}",
        stderr(&o)
    );
}

/// In a crowd the queue is long: `--first N` lists the N most doubtful moments and says how many
/// more there are (a list of a thousand moments told a newcomer nothing about where to stop).
#[test]
fn review_lists_the_first_moments_and_says_how_many_are_left() {
    let (dets, plan) = (demo("detections.csv"), demo("plan.json"));
    let all = throughline(&["review", &dets, "--plan", &plan, "--json", "-q"]);
    let all: serde_json::Value = serde_json::from_slice(&all.stdout).unwrap();
    let n = all.as_array().unwrap().len();
    assert!(n > 2, "{all}");
    let o = throughline(&["review", &dets, "--plan", &plan, "--first", "2", "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = String::from_utf8_lossy(&o.stdout);
    assert!(text.starts_with("1. ") && text.contains("\n2. "), "{text}");
    assert!(!text.contains("\n3. "), "{text}");
    assert!(
        text.contains(&format!(
            "2 of {n} moments to check listed, most doubtful first ({} more",
            n - 2
        )),
        "{text}"
    );
    let o = throughline(&[
        "review", &dets, "--plan", &plan, "--first", "2", "--json", "-q",
    ]);
    let two: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(two.as_array().unwrap()[..], all.as_array().unwrap()[..2]);
    assert!(
        !text.contains("not a list to finish"),
        "a short queue: {text}"
    );
    // A crowd's long queue says how far down to go (a newcomer's trial: 409 moments for 376
    // crossings and no word on it). The crowd is our simulator's, 30 s of 80 in view.
    let dir = scratch("long-queue");
    let crowd = dir.join("crowd").display().to_string();
    let o = throughline(&[
        "simulate",
        "--seed",
        "5",
        "--frames",
        "750",
        "--density",
        "80",
        "--width",
        "1280",
        "--height",
        "720",
        "--out-dir",
        &crowd,
        "--plan",
        &plan,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let dets = format!("{crowd}/detections.txt");
    let o = throughline(&["review", &dets, "--plan", &plan, "--first", "1", "-q"]);
    let text = String::from_utf8_lossy(&o.stdout);
    assert!(
        text.contains("A long queue is not a list to finish: mistakes gather at its top"),
        "{text}"
    );
}

/// A project made with footage records its duration: replayed with detections or tracks that end
/// before it, the count reaches the footage's end (as the page counted it); `--frames` still
/// decides when given, and a project without a duration changes nothing.
#[test]
fn a_projects_footage_length_reaches_the_count() {
    let dir = scratch("project-length");
    let dets = demo_detections_until(&dir, 700);
    let plan: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(demo("plan.json")).unwrap()).unwrap();
    let project = |duration: Option<f64>| {
        let mut footage =
            serde_json::json!({"name": "footage.webm", "size": 1, "head_sha256": "0"});
        if let Some(d) = duration {
            footage["duration_seconds"] = d.into();
        }
        let p = serde_json::json!({"format": "throughline-project", "version": 1, "plan": plan,
                                   "footage": footage});
        write(&dir, "project.json", p.to_string().as_bytes())
    };
    let frames = |args: &[&str]| report_of(args)["frame_count"].as_u64().unwrap();
    let plan_path = demo("plan.json");
    let with = project(Some(30.0));
    assert_eq!(frames(&["run", &dets, "--plan", &plan_path, "-q"]), 700);
    assert_eq!(
        frames(&["run", &dets, "--plan", &plan_path, "--edits", &with, "-q"]),
        750
    );
    assert_eq!(
        frames(&["run", &dets, "--plan", &plan_path, "--edits", &with, "--frames", "720", "-q"]),
        720
    );
    let tracks = dir.join("tracks.json").display().to_string();
    let o = throughline(&["track", &dets, "-o", &tracks, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(
        frames(&["count", &tracks, "--plan", &plan_path, "--edits", &with, "-q"]),
        750
    );
    // `review` counts as `run` does before listing: to the same end, and --frames as for `run`.
    let o = throughline(&[
        "review", &dets, "--plan", &plan_path, "--edits", &with, "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let o = throughline(&[
        "review", &dets, "--plan", &plan_path, "--frames", "600", "-q",
    ]);
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    // A duration no footage can have is refused, naming the project.
    let absurd = project(Some(1e9));
    let o = throughline(&["run", &dets, "--plan", &plan_path, "--edits", &absurd, "-q"]);
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("project.json") && stderr(&o).contains("footage.duration_seconds"),
        "{}",
        stderr(&o)
    );
    let without = project(None);
    assert_eq!(
        frames(&["run", &dets, "--plan", &plan_path, "--edits", &without, "-q"]),
        700
    );
}

/// An edit that does not meet the tracks is said even by a quiet run, so that a batch keeps it:
/// said with the clip's name and written to its `warnings.txt` (a batch of clips with corrections
/// handed in counts that were not the corrected ones, without a word).
#[test]
fn an_edit_not_applied_is_said_by_a_quiet_run_and_kept_by_a_batch() {
    let dir = scratch("edits-quiet");
    let edits = write(
        &dir,
        "edits.json",
        br#"{"format": "throughline-edits", "version": 1, "edits": [
            {"edit": "delete_track", "track": {"id": 999, "frames": [1, 2]}}]}"#,
    );
    let o = throughline(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "--edits",
        &edits,
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let said = stderr(&o);
    assert_eq!(
        said.trim(),
        "warning: an edit was not applied: there is no track 999 now (it was frames 1–2): the \
         tracks have changed since this edit was made (other detections or tracking settings?)",
    );
    let manifest = write(
        &dir,
        "manifest.csv",
        format!(
            "name,detections,plan,edits\nmorning,{},{},{edits}\n",
            demo("detections.csv"),
            demo("plan.json")
        )
        .as_bytes(),
    );
    let out = dir.join("out");
    let o = throughline(&["batch", &manifest, "--out", &out.display().to_string()]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("warning: morning: an edit was not applied: there is no track 999"),
        "{}",
        stderr(&o)
    );
    let kept = std::fs::read_to_string(out.join("morning/warnings.txt")).unwrap();
    assert!(
        kept.starts_with("warning: an edit was not applied: there is no track 999"),
        "{kept}"
    );
}

/// A track deleted leaves what it counted in the report's `deleted_events`, with the deletion's
/// reason, out of every count: the crossings the plain report credits to that track, the same
/// ones (a difference from a hand count can then be traced to the deletion; a newcomer's trial
/// could not tell where a crossing had gone).
#[test]
fn a_deleted_tracks_crossings_are_listed_apart_with_its_reason() {
    let dir = scratch("edits-deleted");
    let plain = report_of(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "-q",
    ]);
    let tracks = dir.join("tracks.json").display().to_string();
    let o = throughline(&["track", &demo("detections.csv"), "-o", &tracks, "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let tracks: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&tracks).unwrap()).unwrap();
    // The first track whose counted path is its own alone, and which crossed a line.
    let events = plain["events"].as_array().unwrap();
    let own = |e: &serde_json::Value| e["track_ids"].as_array().map(Vec::len) == Some(1);
    let first = events
        .iter()
        .find(|e| e["kind"] == "screenline" && own(e))
        .expect("a crossing by one track");
    let id = first["track"].as_u64().unwrap();
    let t = tracks["tracks"]
        .as_array()
        .unwrap()
        .iter()
        .find(|t| t["id"] == id)
        .unwrap();
    let edits = write(
        &dir,
        "edits.json",
        serde_json::json!({"format": "throughline-edits", "version": 1, "edits": [
            {"edit": "delete_track", "track": {"id": id, "frames": [t["first_frame"], t["last_frame"]]},
             "reason": "a shadow"}]})
        .to_string()
        .as_bytes(),
    );
    let edited = report_of(&[
        "run",
        &demo("detections.csv"),
        "--plan",
        &demo("plan.json"),
        "--edits",
        &edits,
        "-q",
    ]);
    let credited: Vec<&serde_json::Value> = events.iter().filter(|e| e["track"] == id).collect();
    let deleted = edited["deleted_events"].as_array().expect("deleted_events");
    assert_eq!(deleted.len(), credited.len(), "{deleted:?}");
    for (d, c) in deleted.iter().zip(&credited) {
        for key in ["kind", "name", "direction", "frame", "class", "track"] {
            assert_eq!(d[key], c[key], "{key}");
        }
        assert_eq!(d["reason"], "a shadow");
    }
    assert!(!edited["events"]
        .as_array()
        .unwrap()
        .iter()
        .any(|e| e["track"] == id));
    let total = |r: &serde_json::Value| -> u64 {
        r["screenlines"]
            .as_array()
            .unwrap()
            .iter()
            .map(|l| l["forward"].as_u64().unwrap() + l["backward"].as_u64().unwrap())
            .sum()
    };
    let lines = credited
        .iter()
        .filter(|e| e["kind"] == "screenline")
        .count() as u64;
    assert_eq!(total(&edited), total(&plain) - lines);
}
