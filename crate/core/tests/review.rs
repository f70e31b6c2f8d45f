//! The review queue on hand-worked scenes: each case builds the situation a person checking the
//! footage should be sent to, and checks that the queue names it, first among what is there.

use throughline_core::geometry::BBox;
use throughline_core::pipeline;
use throughline_core::plan::Plan;
use throughline_core::review::{doubts, Doubt, DoubtKind};
use throughline_core::track::{Method, Track, TrackBox, TrackerConfig, Tracks};

/// A walk of a 20x50 box, bottom-centre from `(x0, y0)` at frame `f0`, `(dx, dy)` a frame, seen
/// with `score` in every frame.
fn walk(
    id: u32,
    f0: u32,
    frames: u32,
    (x0, y0): (f64, f64),
    (dx, dy): (f64, f64),
    score: f64,
) -> Track {
    Track {
        id,
        class: Some("pedestrian".into()),
        mean_score: score,
        class_votes: Vec::new(),
        boxes: (0..frames)
            .map(|k| {
                let (x, y) = (x0 + dx * f64::from(k), y0 + dy * f64::from(k));
                TrackBox {
                    frame: f0 + k,
                    bbox: BBox::new(x - 10.0, y - 50.0, 20.0, 50.0),
                    score,
                    observed: true,
                }
            })
            .collect(),
    }
}

/// A line at y = 200 across a 400x400 picture, 10 frames a second.
const PLAN: &str = r#"{"frame_rate": 10, "screenlines": [{"name": "deck", "points": [[0, 200], [400, 200]]}],
    "rules": {"join_seconds": 0}}"#;

fn queue(list: Vec<Track>) -> Vec<Doubt> {
    queue_with(PLAN, list)
}

/// The queue of `list` counted with the plan `plan` (JSON), in a 400x400 picture of 100 frames.
fn queue_with(plan: &str, list: Vec<Track>) -> Vec<Doubt> {
    let plan = Plan::from_json(plan).unwrap();
    let tracks = Tracks {
        config: TrackerConfig::for_method(Method::Sort),
        frame_count: 100,
        tracks: list,
        crowded_frames: Vec::new(),
        length_from_footage: false,
    };
    let report = pipeline::count(&tracks, &plan, None, &Default::default()).unwrap();
    doubts(&tracks, &plan, &report, Some((400.0, 400.0)))
}

/// Every reason given, entry by entry.
fn kinds(q: &[Doubt]) -> Vec<DoubtKind> {
    q.iter().flat_map(|d| d.kinds.iter().copied()).collect()
}

#[test]
fn a_clean_walk_from_edge_to_edge_raises_no_doubt() {
    // From the top edge (box top at y = 0) to past the bottom edge, confidently seen.
    let q = queue(vec![walk(1, 1, 90, (200.0, 50.0), (0.0, 4.0), 0.9)]);
    assert!(q.is_empty(), "{q:#?}");
}

#[test]
fn a_short_track_that_appears_and_disappears_at_the_line_is_doubted() {
    // Seen for 0.5 s around the line, in the middle of the picture.
    let q = queue(vec![walk(1, 40, 5, (200.0, 190.0), (0.0, 4.0), 0.9)]);
    let k = kinds(&q);
    assert_eq!(q[0].kinds[0], DoubtKind::ShortTrack, "{q:#?}");
    assert!(k.contains(&DoubtKind::StartsNearLine) && k.contains(&DoubtKind::EndsNearLine));
    assert!(q[0].why[0].contains("0.5 s"), "{:?}", q[0].why);
    let c = q[0].crossing.as_ref().unwrap();
    assert_eq!((c.screenline.as_str(), c.track), ("deck", 1));
}

#[test]
fn two_crossings_close_together_are_doubted_once() {
    let q = queue(vec![
        walk(1, 1, 90, (200.0, 50.0), (0.0, 4.0), 0.9),
        walk(2, 3, 90, (210.0, 50.0), (0.0, 4.0), 0.9),
    ]);
    let close: Vec<&Doubt> = q
        .iter()
        .filter(|d| d.kinds.contains(&DoubtKind::CloseTogether))
        .collect();
    assert_eq!(close.len(), 1, "{q:#?}");
    assert_eq!(close[0].tracks, vec![1, 2]);
    assert!(close[0].why[0].contains("0.2 s"), "{:?}", close[0].why);
    // Both crossings are named, so the person can reject either (a review: the page looked for
    // the other among the tracks and found a joined track's own piece).
    let (this, other) = (
        close[0].crossing.as_ref().unwrap(),
        close[0].close_to.as_ref().unwrap(),
    );
    assert_eq!((this.track, other.track), (2, 1));
    assert_eq!(
        (this.screenline.as_str(), other.screenline.as_str()),
        ("deck", "deck")
    );
    assert!(other.frame < this.frame);
}

#[test]
fn crossings_within_a_second_are_close_and_a_later_one_is_not() {
    // Three walkers on one path: the second crosses 0.9 s after the first (close), the third
    // 1.2 s after the second and 2.1 s after the first (close to neither).
    let q = queue(vec![
        walk(1, 1, 90, (200.0, 50.0), (0.0, 4.0), 0.9),
        walk(2, 10, 80, (200.0, 50.0), (0.0, 4.0), 0.9),
        walk(3, 22, 70, (200.0, 50.0), (0.0, 4.0), 0.9),
    ]);
    assert_eq!(close_pairs(&q), vec![&vec![1, 2]], "{q:#?}");
}

/// The tracks of each entry doubted as two crossings close together.
fn close_pairs(q: &[Doubt]) -> Vec<&Vec<u32>> {
    q.iter()
        .filter(|d| d.kinds.contains(&DoubtKind::CloseTogether))
        .map(|d| &d.tracks)
        .collect()
}

#[test]
fn crossings_exactly_a_second_apart_are_close_in_any_order() {
    // The queue's own rule (review/mod.rs, `CLOSE_SECONDS`: within one second, our rule of thumb):
    // the second walker crosses 10 frames, exactly 1.0 s, after the first. Listed in time order
    // (as counting writes them) and in reverse (the queue then compares every pair), the same
    // pair is found.
    let plan = Plan::from_json(PLAN).unwrap();
    let tracks = Tracks {
        config: TrackerConfig::for_method(Method::Sort),
        frame_count: 100,
        tracks: vec![
            walk(1, 1, 90, (200.0, 50.0), (0.0, 4.0), 0.9),
            walk(2, 11, 80, (200.0, 50.0), (0.0, 4.0), 0.9),
        ],
        crowded_frames: Vec::new(),
        length_from_footage: false,
    };
    let mut report = pipeline::count(&tracks, &plan, None, &Default::default()).unwrap();
    for _ in 0..2 {
        let q = doubts(&tracks, &plan, &report, Some((400.0, 400.0)));
        assert_eq!(close_pairs(&q), vec![&vec![1, 2]], "{q:#?}");
        report.events.reverse();
    }
}

#[test]
fn a_crossing_the_detector_barely_saw_is_doubted() {
    let q = queue(vec![walk(1, 1, 90, (200.0, 50.0), (0.0, 4.0), 0.3)]);
    assert_eq!(kinds(&q), vec![DoubtKind::BarelySeen], "{q:#?}");
    assert!(q[0].why[0].contains("0.30"), "{:?}", q[0].why);
}

#[test]
fn a_crossing_while_hidden_and_a_changing_class_are_doubted() {
    let mut t = walk(1, 1, 90, (200.0, 50.0), (0.0, 4.0), 0.9);
    for b in &mut t.boxes[35..45] {
        b.observed = false;
    }
    t.class_votes = vec![("pedestrian".into(), 45), ("cyclist".into(), 35)];
    let k = kinds(&queue(vec![t]));
    assert!(
        k.contains(&DoubtKind::Hidden) && k.contains(&DoubtKind::ClassChanges),
        "{k:?}"
    );
}

#[test]
fn the_queue_is_ordered_most_doubtful_first_then_by_time() {
    let q = queue(vec![
        walk(1, 1, 90, (200.0, 50.0), (0.0, 4.0), 0.3), // barely seen: weight 3, at 3.8 s
        walk(2, 40, 5, (100.0, 190.0), (0.0, 4.0), 0.9), // short: weight 6, at 4.2 s
    ]);
    assert_eq!(q[0].kinds[0], DoubtKind::ShortTrack);
    assert!(q.windows(2).all(|w| w[0].weight >= w[1].weight));
    let keys: std::collections::HashSet<&str> = q.iter().map(|d| d.key.as_str()).collect();
    assert_eq!(keys.len(), q.len(), "keys are unique");
}

#[test]
fn the_reasons_about_one_crossing_make_one_entry() {
    // Hidden at the line and close to another crossing: one moment, two reasons, weights added.
    let mut a = walk(2, 3, 90, (210.0, 50.0), (0.0, 4.0), 0.9);
    for b in &mut a.boxes[33..43] {
        b.observed = false;
    }
    let q = queue(vec![walk(1, 1, 90, (200.0, 50.0), (0.0, 4.0), 0.9), a]);
    assert_eq!(q.len(), 1, "{q:#?}");
    // Most weighty first: a second unseen at the line weighs 3, two crossings close together 2.
    assert_eq!(
        q[0].kinds,
        vec![DoubtKind::Hidden, DoubtKind::CloseTogether]
    );
    assert_eq!((q[0].weight, q[0].why.len()), (5, 2));
    assert!(
        q[0].why[0].contains("hidden for 10 frames (1.0 s): where track 2 crossed"),
        "{:?}",
        q[0].why
    );
}

/// The longer a track was unseen around the line, the likelier it came back on someone else: in
/// simulated crowds a crossing hidden over a second pointed at a mistake five times as often as
/// one hidden a moment (BENCHMARKS.md, "The review queue"; our own measure).
#[test]
fn a_crossing_hidden_longer_is_more_doubtful() {
    let mut brief = walk(1, 1, 90, (100.0, 50.0), (0.0, 4.0), 0.9);
    let mut long = walk(2, 1, 90, (300.0, 50.0), (0.0, 4.0), 0.9);
    for b in &mut brief.boxes[37..39] {
        b.observed = false;
    }
    for b in &mut long.boxes[30..45] {
        b.observed = false;
    }
    let q = queue(vec![brief, long]);
    let hidden: Vec<&Doubt> = q
        .iter()
        .filter(|d| d.kinds == [DoubtKind::Hidden])
        .collect();
    assert_eq!(hidden.len(), 2, "{q:#?}");
    assert_eq!((hidden[0].tracks[0], hidden[1].tracks[0]), (2, 1));
    assert!(hidden[0].weight > hidden[1].weight);
    assert!(
        hidden[0].why[0].contains("on `deck` while hidden for 15 frames (1.5 s)"),
        "{:?}",
        hidden[0].why
    );
    // Crossed on the very step where the track is seen again: as long unseen (a review found it
    // counted as unseen for no time).
    let mut back = walk(3, 1, 90, (300.0, 50.0), (0.0, 4.0), 0.9);
    for b in &mut back.boxes[23..38] {
        b.observed = false;
    }
    let q = queue(vec![back]);
    assert_eq!(q[0].kinds, vec![DoubtKind::Hidden], "{q:#?}");
    assert!(
        q[0].why[0].contains("hidden for 15 frames (1.5 s)"),
        "{:?}",
        q[0].why
    );
}

/// A crossing moments after its track begins, mid-picture and mid-footage: someone the tracker may
/// have lost just before the line. One there because the footage starts is not doubted for it.
#[test]
fn a_crossing_just_after_its_track_begins_is_doubted() {
    let q = queue(vec![walk(1, 30, 60, (200.0, 180.0), (0.0, 4.0), 0.9)]);
    assert_eq!(q[0].kinds, vec![DoubtKind::AtTrackEnd], "{q:#?}");
    assert!(
        q[0].why[0].contains("0.5 s after its track begins"),
        "{:?}",
        q[0].why
    );
    assert!(kinds(&q).contains(&DoubtKind::StartsNearLine));
    let q = queue(vec![walk(1, 1, 60, (200.0, 180.0), (0.0, 4.0), 0.9)]);
    assert!(!kinds(&q).contains(&DoubtKind::AtTrackEnd), "{q:#?}");
}

/// By a line drawn near the picture's edge (a doorway), every crossing comes moments after its
/// track comes into view: a lesser doubt (weight 1), saying so, so that such crossings do not
/// crowd out the likelier mistakes (a review: six clean walkers at a doorway came first, weight 5).
/// The reasons name an object without a class as an "object".
#[test]
fn a_crossing_just_after_coming_into_view_at_the_edge_weighs_little() {
    let door = |list: Vec<Track>| {
        queue_with(
            r#"{"frame_rate": 10, "screenlines": [{"name": "door", "points": [[30, 0], [30, 400]]}],
                "rules": {"join_seconds": 0}}"#,
            list,
        )
    };
    let mut doorway = walk(1, 30, 40, (4.0, 300.0), (4.0, 0.0), 0.9);
    doorway.class = None;
    let q = door(vec![doorway]);
    let at_edge = q
        .iter()
        .find(|d| d.tracks == [1])
        .expect("the doorway crossing");
    assert_eq!(at_edge.kinds, vec![DoubtKind::AtTrackEnd], "{q:#?}");
    assert_eq!(at_edge.weight, 1, "{q:#?}");
    assert!(
        at_edge.why[0].contains(
            "comes into view at the picture's edge: which side of the line \
             this object came from was not seen"
        ),
        "{:?}",
        at_edge.why
    );
    // Leaving the picture at its edge just after the line: the same lesser doubt.
    let q = door(vec![walk(1, 10, 37, (160.0, 300.0), (-4.0, 0.0), 0.9)]);
    let leaving = q.iter().find(|d| d.tracks == [1]).expect("the crossing");
    assert_eq!(
        (leaving.kinds[0], leaving.weight),
        (DoubtKind::AtTrackEnd, 1),
        "{q:#?}"
    );
    assert!(leaving.why[0].contains("before its track leaves the picture at its edge"));
    // In at the edge 1.3 s before the line, lost mid-picture 0.5 s after it: the lost end is
    // the doubt, weight 5 (a review: the nearer end alone was weighed, and hid it).
    let q = door(vec![walk(1, 30, 19, (4.0, 300.0), (2.0, 0.0), 0.9)]);
    let lost = q.iter().find(|d| d.tracks == [1]).expect("the crossing");
    assert_eq!(
        (lost.kinds[0], lost.weight),
        (DoubtKind::AtTrackEnd, 5),
        "{q:#?}"
    );
    assert!(
        lost.why[0].contains("before its track ends"),
        "{:?}",
        lost.why
    );
}

#[test]
fn tracks_there_when_the_footage_starts_or_ends_are_not_doubted_for_it() {
    // In the middle of the picture, next to the line, from frame 1 to the footage's last frame.
    let q = queue(vec![walk(1, 1, 100, (200.0, 195.0), (0.0, 0.0), 0.9)]);
    assert!(q.is_empty(), "{q:#?}");
}

/// Someone on the line as the footage starts, who then walks off it, may have just crossed: no
/// crossing can be counted (the side they came from was not seen), so the moment is doubted (a
/// newcomer's trial: the one miss of a new scene, a cyclist on the line at frame 3, was not in the
/// queue). Near the line but not on it, or standing on it throughout, is not doubted.
#[test]
fn a_track_on_a_line_as_the_footage_starts_and_leaving_it_is_doubted() {
    let q = queue(vec![walk(1, 1, 50, (200.0, 201.0), (0.0, 4.0), 0.9)]);
    assert_eq!(kinds(&q), vec![DoubtKind::OnLineAtFootageEdge], "{q:#?}");
    assert!(
        q[0].why[0].contains("is on `deck` as the footage starts"),
        "{:?}",
        q[0].why
    );
    // And as it ends: walking onto the line in the footage's last second, and still on it.
    let q = queue(vec![walk(1, 60, 41, (200.0, 121.0), (0.0, 2.0), 0.9)]);
    assert_eq!(kinds(&q), vec![DoubtKind::OnLineAtFootageEdge], "{q:#?}");
    assert!(
        q[0].why[0].contains("is on `deck` as the footage ends: if it was crossing"),
        "{:?}",
        q[0].why
    );
    assert_eq!(q[0].frame, 100);
    // Near the line as the footage ends, not on it: not doubted.
    let q = queue(vec![walk(1, 60, 41, (200.0, 101.0), (0.0, 2.0), 0.9)]);
    assert!(q.is_empty(), "{q:#?}");
    let q = queue(vec![walk(1, 1, 50, (200.0, 170.0), (0.0, -3.0), 0.9)]);
    assert!(q.is_empty(), "{q:#?}");
    let q = queue(vec![walk(1, 1, 100, (200.0, 201.0), (0.0, 0.0), 0.9)]);
    assert!(q.is_empty(), "standing on the line throughout: {q:#?}");
    // On the nearer of two lines a box height apart (a review found the first listed taken).
    let plan = Plan::from_json(
        r#"{"frame_rate": 10, "screenlines": [{"name": "deck", "points": [[0, 200], [400, 200]]},
            {"name": "rail", "points": [[0, 230], [400, 230]]}], "rules": {"join_seconds": 0}}"#,
    )
    .unwrap();
    let tracks = Tracks {
        config: TrackerConfig::for_method(Method::Sort),
        frame_count: 100,
        tracks: vec![walk(1, 1, 40, (200.0, 231.0), (0.0, 4.0), 0.9)],
        crowded_frames: Vec::new(),
        length_from_footage: false,
    };
    let report = pipeline::count(&tracks, &plan, None, &Default::default()).unwrap();
    let q = doubts(&tracks, &plan, &report, Some((400.0, 400.0)));
    let on_rail = q
        .iter()
        .any(|d| d.why[0].contains("is on `rail` as the footage starts"));
    assert!(on_rail, "{q:#?}");
}

/// A track that appears inside a zone and one that vanishes inside it, away from the picture's
/// edge and from the footage's first and last second, are sent to be checked: each is a
/// "first (last) seen inside" with no entry (exit) counted (a newcomer's trial: a plan of a zone
/// alone found "nothing doubtful" though 35 tracks appeared inside a zone that never held six). A
/// walk through the zone from edge to edge, and two pieces of one walk joined inside it, are not.
#[test]
fn tracks_that_appear_or_vanish_inside_a_zone_are_doubted_and_whole_visits_are_not() {
    let plan = r#"{"frame_rate": 10, "zones": [{"name": "kiosk", "polygon": [[100, 100], [300, 100], [300, 300], [100, 300]]}],
        "rules": {"join_seconds": 0}}"#;
    let q = queue_with(
        plan,
        vec![
            walk(1, 20, 70, (200.0, 150.0), (0.0, 4.0), 0.9), // appears at y 150, inside; leaves at the bottom
            walk(2, 1, 40, (150.0, 50.0), (0.0, 4.0), 0.9), // from the top edge, vanishes at y 206, inside
            walk(3, 1, 90, (250.0, 50.0), (0.0, 4.0), 0.9), // through it, edge to edge
        ],
    );
    let found: Vec<(DoubtKind, Vec<u32>)> =
        q.iter().map(|d| (d.kinds[0], d.tracks.clone())).collect();
    assert_eq!(
        found,
        vec![
            (DoubtKind::StartsInsideZone, vec![1]),
            (DoubtKind::EndsInsideZone, vec![2])
        ],
        "{q:#?}"
    );
    assert!(
        q[0].why[0].contains("inside `kiosk`, not at the picture's edge"),
        "{:?}",
        q[0].why
    );
    // Joined inside the zone by the counting (one visit): nothing to check.
    let joined = r#"{"frame_rate": 10, "zones": [{"name": "kiosk", "polygon": [[100, 100], [300, 100], [300, 300], [100, 300]]}]}"#;
    let q = queue_with(
        joined,
        vec![
            walk(1, 1, 38, (200.0, 50.0), (0.0, 4.0), 0.9),
            walk(2, 44, 46, (200.0, 222.0), (0.0, 4.0), 0.9),
        ],
    );
    assert!(
        q.iter()
            .all(|d| !d.kinds.contains(&DoubtKind::StartsInsideZone)),
        "{q:#?}"
    );
}
