//! Every input the fuzzer once found breaking a reader of the core (crate/fuzz/regressions/<target>/),
//! run through the same checks as its fuzz target, in plain `cargo test` (no nightly needed). The
//! footage targets' finds are run in crate/footage/tests/hostile_footage.rs.

use std::path::Path;

use throughline_core::detections::{read_detections, to_file_text};

fn regressions(target: &str) -> Vec<(String, Vec<u8>)> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../fuzz/regressions")
        .join(target);
    let Ok(entries) = std::fs::read_dir(&dir) else {
        return Vec::new();
    };
    let mut files: Vec<(String, Vec<u8>)> = entries
        .filter_map(Result::ok)
        .map(|e| {
            let name = e.file_name().to_string_lossy().into_owned();
            (name, std::fs::read(e.path()).expect("a regression input"))
        })
        .collect();
    files.sort();
    files
}

#[test]
fn detections_read_write_and_read_back_alike() {
    for (name, data) in regressions("detections") {
        let Ok(report) = read_detections(&data) else {
            continue;
        };
        if report.detections.rows.is_empty() {
            continue;
        }
        let text = to_file_text(&report.detections);
        let again = read_detections(text.as_bytes())
            .unwrap_or_else(|e| panic!("{name}: written detections do not read back: {e}"));
        assert_eq!(
            again.detections.rows.len(),
            report.detections.rows.len(),
            "{name}"
        );
    }
}

#[test]
fn plans_projects_and_settings_end_in_an_answer() {
    use throughline_core::pipeline::{self, Work};
    use throughline_core::plan::Plan;
    use throughline_core::project::{edits_from_json, Project};
    let tracks = throughline_core::track::files::boxes_to_tracks(
        &throughline_core::track::files::read_benchmark_boxes(
            b"1,1,10,10,20,40\n2,1,14,20,20,40\n3,1,18,30,20,40\n8,2,22,40,20,40\n9,2,22,50,20,40\n",
        )
        .expect("fixed tracks"),
    );
    for (_, data) in regressions("plan") {
        if let Ok(plan) = Plan::from_json(&String::from_utf8_lossy(&data)) {
            let _ = throughline_core::count::count(&tracks, &plan, None);
        }
    }
    let plan = Plan::from_json(
        r#"{"frame_rate": 10, "screenlines": [{"name": "l", "points": [[0, 60], [200, 60]]}]}"#,
    )
    .expect("a plan");
    for (_, data) in regressions("work") {
        let text = String::from_utf8_lossy(&data);
        let work = match Project::from_json(&text) {
            Ok(p) => Work::of_project(&p),
            Err(_) => match edits_from_json(&text) {
                Ok(edits) => Work::edits(edits),
                Err(_) => continue,
            },
        };
        let _ = pipeline::count(&tracks, &plan, None, &work);
    }
    for (_, data) in regressions("settings") {
        let text = String::from_utf8_lossy(&data);
        let _ = throughline_core::track::resolve_config(None, Some(&text), true);
        let _ = throughline_core::detect::DetectorConfig::from_json(&text);
    }
    for (_, data) in regressions("still") {
        let _ = throughline_core::handin::picture_size(&data);
    }
}
