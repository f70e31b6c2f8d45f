//! A person hidden for a moment inside a zone, or as they pass its edge, is one visit: the two
//! pieces of their track are joined as they are near a line (docs/counting-rules.md, "Fragments
//! joined"), so a zone's counts no longer depend on whether the plan also has a line (a newcomer's
//! trial on real footage: 12 entries with a line, 8 without; 31 "first seen inside" where at most
//! six were ever inside at once). Hand-worked walks.

use throughline_core::geometry::BBox;
use throughline_core::pipeline::{self, Work};
use throughline_core::plan::Plan;
use throughline_core::report::Report;
use throughline_core::track::{Method, Track, TrackBox, TrackerConfig, Tracks};

/// Frames `from..to` of one walk down the picture, 4 pixels a frame from y = 100 at frame 1.
fn piece(id: u32, from: u32, to: u32) -> Track {
    Track {
        id,
        class: Some("pedestrian".into()),
        mean_score: 0.9,
        class_votes: Vec::new(),
        boxes: (from..to)
            .map(|f| TrackBox {
                frame: f,
                bbox: BBox::new(190.0, 50.0 + 4.0 * f64::from(f - 1), 20.0, 50.0),
                score: 0.9,
                observed: true,
            })
            .collect(),
    }
}

fn count(plan: &str, tracks: Vec<Track>) -> Report {
    let t = Tracks {
        config: TrackerConfig::for_method(Method::Sort),
        frame_count: 200,
        tracks,
        crowded_frames: Vec::new(),
        length_from_footage: false,
    };
    pipeline::count(&t, &Plan::from_json(plan).unwrap(), None, &Work::default()).unwrap()
}

const ZONE: &str = r#"{"name": "kiosk", "polygon": [[0, 200], [400, 200], [400, 400], [0, 400]]}"#;

#[test]
fn a_walk_lost_for_a_moment_inside_a_zone_is_one_visit_with_or_without_a_line() {
    // The feet (box bottoms) are inside y 200–400 from frame 26 to 75; unseen frames 41–48.
    let broken = || vec![piece(1, 1, 41), piece(2, 49, 100)];
    let zone_only = count(
        &format!(r#"{{"frame_rate": 10, "zones": [{ZONE}]}}"#),
        broken(),
    );
    let z = &zone_only.zones[0];
    assert_eq!(
        (z.entries, z.exits, z.present_at_start, z.present_at_end),
        (1, 1, 0, 0)
    );
    assert_eq!(z.dwell_seconds.count, 1);
    assert_eq!(zone_only.joins.len(), 1);
    let line = r#"{"name": "far", "points": [[0, 20], [400, 20]]}"#;
    let with_line = count(
        &format!(r#"{{"frame_rate": 10, "screenlines": [{line}], "zones": [{ZONE}]}}"#),
        broken(),
    );
    assert_eq!(with_line.zones, zone_only.zones);
    // Whole, the same walk gives the same zone counts.
    let whole = count(
        &format!(r#"{{"frame_rate": 10, "zones": [{ZONE}]}}"#),
        vec![piece(1, 1, 100)],
    );
    assert_eq!(whole.zones[0].entries, 1);
    assert_eq!(whole.zones[0].dwell_seconds.count, 1);
}
