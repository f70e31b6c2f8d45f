//! Two people who walk as one blob (the fixed-camera detector's box covers both): with the
//! detector's perspective, `cut_merged` (what the detector runs on its boxes) cuts the blob at the
//! two tracks' predicted places, so both keep their identity through the merge and both
//! crossings are counted. Hand-made sequences; what is expected is what a person counting by eye would write
//! down (common practice: two people crossing are two crossings).

use throughline_core::detections::{Detection, Detections, Perspective};
use throughline_core::geometry::BBox;
use throughline_core::pipeline;
use throughline_core::plan::Plan;
use throughline_core::track::{cut_merged, Method, TrackerConfig};

/// A person is 28 x 80 pixels at every row (one height given: 80; width 0.35 of it).
const PERSON: Perspective = Perspective {
    far_height: 80.0,
    near_height: 80.0,
    picture_height: 360.0,
    width_ratio: 0.35,
};

/// A horizontal screenline at y = 280: feet cross it walking down.
const PLAN: &str =
    r#"{"frame_rate": 25, "screenlines": [{"name": "deck", "points": [[0, 280], [640, 280]]}]}"#;

/// Frames 1 to 100, both walking down 2 px a frame, A at x 200, B at x 234 (28 px wide, 80 tall,
/// feet from row 132); in frames `merged` the detector gives one box over both.
fn pair(merged: std::ops::RangeInclusive<u32>) -> Vec<Detection> {
    let mut rows = Vec::new();
    for frame in 1..=100u32 {
        let y = 50.0 + 2.0 * f64::from(frame);
        let (a, b) = (
            BBox::new(200.0, y, 28.0, 80.0),
            BBox::new(234.0, y, 28.0, 80.0),
        );
        let boxes = if merged.contains(&frame) {
            vec![BBox::new(200.0, y, 62.0, 80.0)]
        } else {
            vec![a, b]
        };
        rows.extend(boxes.into_iter().map(|bbox| Detection {
            frame,
            bbox,
            score: 0.9,
            class: None,
            embedding: None,
        }));
    }
    rows
}

/// Tracks and counts the rows (first cut with `perspective`, when given) with `sort`'s defaults:
/// (track numbers with their first and last frames, crossings of the line).
fn counted(rows: Vec<Detection>, perspective: Option<Perspective>) -> (Vec<(u32, u32, u32)>, u64) {
    let mut dets = Detections {
        rows,
        ..Detections::default()
    };
    if let Some(p) = perspective {
        dets.rows = cut_merged(&dets, &p);
    }
    let config = TrackerConfig::for_method(Method::Sort);
    let plan = Plan::from_json(PLAN).expect("valid plan");
    let (tracks, report) = pipeline::run(&dets, &plan, &config, &mut |_, _| {}).expect("runs");
    let spans = tracks
        .tracks
        .iter()
        .map(|t| (t.id, t.first_frame(), t.last_frame()))
        .collect();
    let line = &report.screenlines[0];
    (spans, line.forward + line.backward)
}

#[test]
fn a_pair_merged_for_sixty_frames_keeps_two_tracks_and_two_crossings() {
    // Merged from frame 21 to 80; their feet cross row 280 at frame 74, inside the merge.
    let (spans, crossings) = counted(pair(21..=80), Some(PERSON));
    assert_eq!(spans, vec![(1, 1, 100), (2, 1, 100)]);
    assert_eq!(crossings, 2);
}

#[test]
fn without_the_perspective_the_same_pair_gives_one_crossing() {
    // What the cut is for: the blob goes to one track, the other coasts until it ends.
    let (spans, crossings) = counted(pair(21..=80), None);
    assert!(spans.len() >= 2, "{spans:?}");
    assert_eq!(crossings, 1);
}

#[test]
fn a_lone_wide_box_with_one_track_inside_is_left_alone() {
    // One person whose box widens to 62 px (a bag, a shadow): one track, one crossing, and the
    // boxes it was given are the detector's.
    let mut rows = pair(1..=100);
    for r in &mut rows {
        r.bbox.w = if r.frame > 20 { 62.0 } else { 28.0 };
    }
    let (spans, crossings) = counted(rows.clone(), Some(PERSON));
    assert_eq!(spans, vec![(1, 1, 100)]);
    assert_eq!(crossings, 1);
    assert_eq!(counted(rows, None), (spans, crossings));
}
