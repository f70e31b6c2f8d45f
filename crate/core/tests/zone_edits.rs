//! A person's corrections of a zone's entries and exits (common practice for footfall counted in
//! and out of an area: a wrong entry struck out, a missed one added by hand, each kept with its
//! reason). Hand-worked walks: what the person changes, and what the zone's counts must then be.

use throughline_core::edits::{Edit, EditList, ZoneWay};
use throughline_core::geometry::BBox;
use throughline_core::pipeline::{self, Work};
use throughline_core::plan::Plan;
use throughline_core::report::{Direction, Report};
use throughline_core::track::{Method, Track, TrackBox, TrackerConfig, Tracks};

/// A straight walk of a 20x50 box whose bottom-centre starts at `(x0, y0)` at frame `f0` and moves
/// by `dy` a frame downwards, seen in every frame.
fn walk(id: u32, class: &str, f0: u32, frames: u32, (x0, y0): (f64, f64), dy: f64) -> Track {
    Track {
        id,
        class: Some(class.to_string()),
        mean_score: 0.9,
        class_votes: Vec::new(),
        boxes: (0..frames)
            .map(|k| {
                let y = y0 + dy * f64::from(k);
                TrackBox {
                    frame: f0 + k,
                    bbox: BBox::new(x0 - 10.0, y - 50.0, 20.0, 50.0),
                    score: 0.9,
                    observed: true,
                }
            })
            .collect(),
    }
}

/// A zone across the walks (y 250–350), 10 frames a second, 1-minute intervals.
const PLAN: &str = r#"{"frame_rate": 10, "interval_minutes": 1,
    "zones": [{"name": "kiosk", "polygon": [[0, 250], [400, 250], [400, 350], [0, 350]]}]}"#;

fn count(edits: Vec<Edit>) -> Report {
    let t = Tracks {
        config: TrackerConfig::for_method(Method::Sort),
        frame_count: 900,
        tracks: vec![
            walk(1, "pedestrian", 1, 60, (100.0, 150.0), 4.0), // in at about frame 26, out at 51
            walk(2, "pedestrian", 1, 60, (300.0, 150.0), 4.0),
        ],
        crowded_frames: Vec::new(),
        length_from_footage: false,
    };
    let plan = Plan::from_json(PLAN).unwrap();
    pipeline::count(&t, &plan, None, &Work::edits(edits)).unwrap()
}

fn entry_of(report: &Report, track: u32) -> u32 {
    let e = report
        .events
        .iter()
        .find(|e| e.track == track && e.direction == Direction::Entry);
    e.unwrap().frame
}

#[test]
fn a_rejected_entry_and_an_added_exit_change_the_zones_counts_and_nothing_else() {
    let before = count(Vec::new());
    let z = &before.zones[0];
    assert_eq!((z.entries, z.exits, z.added, z.rejected), (2, 2, 0, 0));
    let frame = entry_of(&before, 2);
    let edits = vec![
        Edit::RejectZoneEvent {
            zone: "kiosk".into(),
            way: ZoneWay::Entry,
            track: 2,
            frame,
            reason: Some("a reflection in the window".into()),
        },
        Edit::AddZoneEvent {
            zone: "kiosk".into(),
            way: ZoneWay::Exit,
            class: "cyclist".into(),
            frame: 700, // 69.9 s: the second one-minute interval
            reason: Some("left behind the van".into()),
        },
    ];
    let after = count(edits);
    assert!(after.edits.iter().all(|e| e.applied), "{:?}", after.edits);
    let z = &after.zones[0];
    assert_eq!((z.entries, z.exits, z.added, z.rejected), (1, 3, 1, 1));
    assert_eq!(z.entries_by_class["pedestrian"], 1);
    assert_eq!(z.exits_by_class["cyclist"], 1);
    assert_eq!((z.intervals[0].entries, z.intervals[1].exits), (1, 1));
    // Occupancy and dwell follow the tracks, as before the corrections.
    let b = &before.zones[0];
    assert_eq!(z.intervals[0].mean_occupancy, b.intervals[0].mean_occupancy);
    assert_eq!(z.dwell_seconds, b.dwell_seconds);
    assert_eq!(after.rejected_events.len(), 1);
    let gone = &after.rejected_events[0];
    assert_eq!(
        (gone.track, gone.frame, gone.reason.as_deref()),
        (2, frame, Some("a reflection in the window"))
    );
    let added = after.events.iter().find(|e| e.added).unwrap();
    // At the zone's middle, at the frame's time.
    assert_eq!(
        (added.x, added.y, added.label.as_str()),
        (200.0, 300.0, "exit")
    );
}

#[test]
fn zone_edits_that_do_not_fit_say_why_and_round_trip_as_written() {
    let edits = vec![
        Edit::RejectZoneEvent {
            zone: "kiosk".into(),
            way: ZoneWay::Exit,
            track: 2,
            frame: 3,
            reason: None,
        },
        Edit::AddZoneEvent {
            zone: "gate".into(),
            way: ZoneWay::Entry,
            class: "pedestrian".into(),
            frame: 5,
            reason: None,
        },
        Edit::AddZoneEvent {
            zone: "kiosk".into(),
            way: ZoneWay::Entry,
            class: "pedestrian".into(),
            frame: 5000,
            reason: None,
        },
    ];
    let report = count(edits.clone());
    let notes: Vec<&str> = report.edits.iter().map(|e| e.note.as_str()).collect();
    assert!(report.edits.iter().all(|e| !e.applied));
    assert!(
        notes[0].contains("no exit of `kiosk` by track 2 at frame 3"),
        "{}",
        notes[0]
    );
    assert!(
        notes[1].contains("no zone named `gate` (it has `kiosk`)"),
        "{}",
        notes[1]
    );
    assert!(
        notes[2].contains("frame 5000 is not in the footage"),
        "{}",
        notes[2]
    );
    assert_eq!(report.zones[0].entries, 2);
    // As an edits file writes them, and read back.
    let text = EditList::new(edits.clone()).to_json();
    assert!(
        text.contains(r#""edit": "reject_zone_event""#) && text.contains(r#""way": "exit""#),
        "{text}"
    );
    assert_eq!(EditList::from_json(&text).unwrap().edits, edits);
    // A blank class is refused, naming the field.
    let blank = text.replace(r#""class": "pedestrian""#, r#""class": " ""#);
    let e = EditList::from_json(&blank).unwrap_err().to_string();
    assert!(e.contains("edits[1].class"), "{e}");
}
