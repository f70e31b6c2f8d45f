//! The hand-in grid of a count in and out of an area: each zone's entries and exits per interval,
//! below the lines' grid, or alone for a plan of zones only (a newcomer's trial: a zone's counts
//! reached no hand-in file, and a plan of zones only gave "nothing to tabulate"). Worked by hand
//! from two walks through the zone (common practice: the grid's rows are the clock's intervals).

use throughline_core::geometry::BBox;
use throughline_core::handin::{interval_grid, Context, GridLayout, Separator, ZONES_TITLE};
use throughline_core::pipeline::{self, Work};
use throughline_core::plan::Plan;
use throughline_core::report::Report;
use throughline_core::track::{Method, Track, TrackBox, TrackerConfig, Tracks};

/// A walk down the picture from y0, 4 pixels a frame, seen in every frame.
fn walk(id: u32, f0: u32, x: f64) -> Track {
    Track {
        id,
        class: Some("pedestrian".into()),
        mean_score: 0.9,
        class_votes: Vec::new(),
        boxes: (0..60)
            .map(|k| TrackBox {
                frame: f0 + k,
                bbox: BBox::new(x - 10.0, 100.0 + 4.0 * f64::from(k), 20.0, 50.0),
                score: 0.9,
                observed: true,
            })
            .collect(),
    }
}

fn count(plan: &str) -> Report {
    let t = Tracks {
        config: TrackerConfig::for_method(Method::Sort),
        frame_count: 900, // 90 s at 10 a second: one whole minute, and half of the next
        tracks: vec![walk(1, 1, 100.0), walk(2, 700, 300.0)],
        crowded_frames: Vec::new(),
        length_from_footage: false,
    };
    pipeline::count(&t, &Plan::from_json(plan).unwrap(), None, &Work::default()).unwrap()
}

const ZONE: &str = r#"{"name": "kiosk", "polygon": [[0, 250], [400, 250], [400, 300], [0, 300]]}"#;

fn after_title(grid: &str) -> Vec<&str> {
    let at = grid
        .find(ZONES_TITLE)
        .unwrap_or_else(|| panic!("no zones' block:\n{grid}"));
    grid[at..].lines().skip(1).collect()
}

#[test]
fn a_plan_of_zones_only_hands_in_their_entries_and_exits_per_interval() {
    let plan = format!(
        r#"{{"frame_rate": 10, "interval_minutes": 1, "start": "2026-03-02T09:00:00", "zones": [{ZONE}]}}"#
    );
    let report = count(&plan);
    let ctx = Context::default();
    let wide = interval_grid(&report, &ctx, GridLayout::Wide, Separator::Comma);
    assert!(!wide.contains("nothing to tabulate"), "{wide}");
    assert!(wide.contains("Last interval,\"2026-03-02T09:01:00 to 2026-03-02T09:02:00 covers only 0.5 of its 1 minutes"), "{wide}");
    assert_eq!(
        after_title(&wide),
        [
            "Interval start,Interval end,kiosk entries,kiosk exits,Note",
            "2026-03-02T09:00:00,2026-03-02T09:01:00,1,1,",
            "2026-03-02T09:01:00,2026-03-02T09:02:00,1,1,cut short by the end of the footage",
            "Total,,2,2,",
        ]
    );
    let long = interval_grid(&report, &ctx, GridLayout::Long, Separator::Comma);
    assert_eq!(
        after_title(&long),
        [
            "interval_start,interval_end,zone,way,count,note",
            "2026-03-02T09:00:00,2026-03-02T09:01:00,kiosk,entry,1,",
            "2026-03-02T09:00:00,2026-03-02T09:01:00,kiosk,exit,1,",
            "2026-03-02T09:01:00,2026-03-02T09:02:00,kiosk,entry,1,cut short by the end of the footage",
            "2026-03-02T09:01:00,2026-03-02T09:02:00,kiosk,exit,1,cut short by the end of the footage",
        ]
    );
}

#[test]
fn zones_follow_the_lines_grid_which_is_as_it_was() {
    let line = r#"{"name": "deck", "points": [[0, 200], [400, 200]]}"#;
    let with = count(&format!(
        r#"{{"frame_rate": 10, "interval_minutes": 1, "screenlines": [{line}], "zones": [{ZONE}]}}"#
    ));
    let without = count(&format!(
        r#"{{"frame_rate": 10, "interval_minutes": 1, "screenlines": [{line}]}}"#
    ));
    let ctx = Context::default();
    for layout in [GridLayout::Wide, GridLayout::Long] {
        let a = interval_grid(&with, &ctx, layout, Separator::Comma);
        let b = interval_grid(&without, &ctx, layout, Separator::Comma);
        // The header names the plan's contents alike; the lines' table and peak rows are the same.
        let lines_part = |g: &str| g[g.find("\n\n").unwrap()..].to_string();
        assert!(lines_part(&a).starts_with(&lines_part(&b)), "{a}\n---\n{b}");
        assert!(!b.contains(ZONES_TITLE));
        assert!(a.contains(ZONES_TITLE));
    }
    let plan = r#"{"frame_rate": 10, "screenlines": [], "zones": []}"#;
    if let Ok(p) = Plan::from_json(plan) {
        let t = Tracks {
            config: TrackerConfig::for_method(Method::Sort),
            frame_count: 10,
            tracks: Vec::new(),
            crowded_frames: Vec::new(),
            length_from_footage: false,
        };
        let r = pipeline::count(&t, &p, None, &Work::default()).unwrap();
        let g = interval_grid(&r, &ctx, GridLayout::Wide, Separator::Comma);
        assert!(
            g.contains("The plan has no lines or zones: nothing to tabulate."),
            "{g}"
        );
    }
}
