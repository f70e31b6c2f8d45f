//! A hand count beside the automated one. The worked example is written out by hand from the
//! definitions of NCHRP Report 797 (2014) as summarised in the project's trade notes (formulas from
//! memory): with A the automated and M the manual count of each interval, APD = mean (A − M)/M,
//! AAPD = mean |A − M|/M, WAPD = Σ|A − M| / ΣM, correction factor = ΣM / ΣA.

use throughline_core::accuracy::{Press, Tally};
use throughline_core::edits::Way;
use throughline_core::geometry::BBox;
use throughline_core::pipeline::{self, Work};
use throughline_core::plan::Plan;
use throughline_core::report::{Correction, Report};
use throughline_core::track::{Method, Track, TrackBox, TrackerConfig, Tracks};

/// A short walk down across the line y = 200 that crosses between frames `c` and `c + 1` (the
/// event's frame is `c + 1`).
fn crossing(id: u32, c: u32, x: f64) -> Track {
    Track {
        id,
        class: Some("pedestrian".into()),
        mean_score: 0.9,
        class_votes: Vec::new(),
        boxes: (0..25)
            .map(|k| TrackBox {
                frame: c - 12 + k,
                bbox: BBox::new(x - 10.0, 150.0 + 4.0 * f64::from(k) - 50.0, 20.0, 50.0),
                score: 0.9,
                observed: true,
            })
            .collect(),
    }
}

/// 10 frames a second: minute `i` holds frames 600i + 1 to 600(i + 1).
const PLAN: &str = r#"{"frame_rate": 10, "start": "2026-03-02T07:00:00",
    "screenlines": [{"name": "deck", "points": [[0, 200], [4000, 200]], "forward": "south", "backward": "north"}],
    "rules": {"join_seconds": 0}}"#;

/// Automated crossings per minute `per_minute`, each at its own place in its minute.
fn report_with(per_minute: &[u32], work: &Work) -> Report {
    let mut list = Vec::new();
    for (i, &n) in per_minute.iter().enumerate() {
        for k in 0..n {
            let id = list.len() as u32 + 1;
            list.push(crossing(
                id,
                600 * i as u32 + 30 + 50 * k,
                20.0 + 30.0 * f64::from(id),
            ));
        }
    }
    let tracks = Tracks {
        config: TrackerConfig::for_method(Method::Sort),
        frame_count: 600 * per_minute.len() as u32,
        tracks: list,
        crowded_frames: Vec::new(),
        length_from_footage: false,
    };
    pipeline::count(&tracks, &Plan::from_json(PLAN).unwrap(), None, work).unwrap()
}

/// A tally of `per_minute` southward presses a minute over frames 1 to 2400.
fn tally(per_minute: &[u32]) -> Tally {
    let mut presses = Vec::new();
    for (i, &n) in per_minute.iter().enumerate() {
        for k in 0..n {
            presses.push(Press {
                frame: 600 * i as u32 + 40 + 50 * k,
                screenline: "deck".into(),
                direction: Way::Forward,
                class: None,
            });
        }
    }
    Tally {
        who: "A. Counter".into(),
        made: "2026-03-05T10:00:00".into(),
        from_frame: 1,
        to_frame: 2400,
        screenlines: vec!["deck".into()],
        presses,
    }
}

#[test]
fn a_four_minute_tally_worked_by_hand() {
    // A = 9, 11, 10, 8 and M = 10, 10, 10, 10 a minute:
    // (A − M)/M = −0.1, 0.1, 0, −0.2 → APD = −0.2/4 = −0.05, AAPD = 0.4/4 = 0.1;
    // WAPD = (1 + 1 + 0 + 2)/40 = 0.1; factor = 40/38 = 1.0526…
    let work = Work {
        tallies: vec![tally(&[10, 10, 10, 10])],
        ..Work::default()
    };
    let report = report_with(&[9, 11, 10, 8], &work);
    let check = &report.checks[0];
    assert_eq!((check.seconds, check.bin_seconds), (240.0, 60.0));
    assert_eq!(
        (check.from.as_str(), check.to.as_str()),
        ("2026-03-02T07:00:00", "2026-03-02T07:04:00")
    );
    let south = check
        .groups
        .iter()
        .find(|g| g.direction == "south")
        .unwrap();
    assert_eq!(
        (south.automated, south.manual, south.difference),
        (38, 40, -2)
    );
    let m = &south.measures;
    assert!((m.apd.unwrap() + 0.05).abs() < 1e-12, "{m:?}");
    assert!((m.aapd.unwrap() - 0.1).abs() < 1e-12);
    assert!((m.wapd.unwrap() - 0.1).abs() < 1e-12);
    assert!((m.correction_factor.unwrap() - 40.0 / 38.0).abs() < 1e-12);
    let bins: Vec<(u64, u64)> = south.per_bin.iter().map(|b| (b.1, b.2)).collect();
    assert_eq!(bins, vec![(9, 10), (11, 10), (10, 10), (8, 10)]);
    assert_eq!(south.per_bin[1].0, "2026-03-02T07:01:00");
    // Minute i holds frames 600i + 1 to 600(i + 1) at 10 frames a second.
    assert_eq!(
        check.bin_frames,
        vec![[1, 600], [601, 1200], [1201, 1800], [1801, 2400]]
    );
    // The other direction: nothing by hand, nothing automated.
    let north = check
        .groups
        .iter()
        .find(|g| g.direction == "north")
        .unwrap();
    assert_eq!((north.automated, north.manual), (0, 0));
    assert!(
        check.caution.contains("4.0 minutes and 40 crossings"),
        "{}",
        check.caution
    );
}

#[test]
fn a_correction_factor_is_applied_only_when_chosen_and_beside_the_counts() {
    let plain = report_with(&[9, 11, 10, 8], &Work::default());
    assert!(plain.correction.is_none() && plain.checks.is_empty());
    let work = Work {
        correction: Some(Correction {
            factor: 40.0 / 38.0,
            screenlines: vec!["deck".into()],
            reason: Some("hand count of 07:00-07:04".into()),
        }),
        ..Work::default()
    };
    let report = report_with(&[9, 11, 10, 8], &work);
    assert_eq!(
        report.screenlines[0].forward, 38,
        "the counts stay as counted"
    );
    let c = report.correction.as_ref().unwrap();
    assert_eq!((c.adjusted[0].forward, c.adjusted[0].backward), (40.0, 0.0));
}

#[test]
fn classes_pressed_are_compared_class_by_class() {
    let mut t = tally(&[2]);
    t.to_frame = 600;
    t.presses[0].class = Some("pedestrian".into());
    t.presses[1].class = Some("cyclist".into());
    let report = report_with(
        &[2],
        &Work {
            tallies: vec![t],
            ..Work::default()
        },
    );
    let groups: Vec<(&str, &str, u64, u64)> = report.checks[0]
        .groups
        .iter()
        .map(|g| {
            (
                g.direction.as_str(),
                g.class.as_str(),
                g.automated,
                g.manual,
            )
        })
        .collect();
    assert_eq!(
        groups,
        vec![
            ("south", "all", 2, 2),
            ("south", "pedestrian", 2, 1),
            ("south", "cyclist", 0, 1),
            ("north", "all", 0, 0)
        ]
    );
}

#[test]
fn a_short_sample_is_told_in_seconds_and_frames_past_the_footage_are_not_counted() {
    let mut hand = tally(&[3]);
    hand.to_frame = 150;
    let report = report_with(
        &[3],
        &Work {
            tallies: vec![hand.clone()],
            ..Work::default()
        },
    );
    let check = &report.checks[0];
    assert!(check.caution.contains("15 seconds"), "{}", check.caution);
    assert_eq!(check.bin_frames, vec![[1, 150]]);
    // A tally said to run to the last possible frame is cut at the footage's end (600 frames).
    hand.to_frame = u32::MAX;
    let report = report_with(
        &[3],
        &Work {
            tallies: vec![hand],
            ..Work::default()
        },
    );
    assert_eq!(report.checks[0].to_frame, 600);
    assert_eq!(report.checks[0].bin_frames, vec![[1, 600]]);
}
