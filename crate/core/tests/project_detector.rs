//! The project file's record of the detector's settings.

/// A project file records the detector's settings the page found objects with; they are checked
/// as a settings file is, and a mistake is named with the field (docs/detector-settings.md).
#[test]
fn a_projects_detector_settings_are_read_and_checked() {
    use throughline_core::project::Project;
    let project = |detector: &str| {
        format!(
            r#"{{"format": "throughline-project", "version": 1, "plan": {{"frame_rate": 10}}, "detector": {detector}}}"#
        )
    };
    let p = Project::from_json(&project(r#"{"far_height": 34, "near_height": 91}"#)).unwrap();
    let c = p.detector_config().unwrap().unwrap();
    assert_eq!((c.far_height, c.near_height), (Some(34.0), Some(91.0)));
    let e = Project::from_json(&project(r#"{"far_height": -3}"#))
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("detector") && e.contains("far_height must be a height in pixels > 0"),
        "{e}"
    );
    let e = Project::from_json(&project(r#"{"far_heigth": 3}"#))
        .unwrap_err()
        .to_string();
    assert!(e.contains("far_heigth"), "{e}");
}
