//! Counting on hand-worked tracks: each case draws a small path across a line or zone and states
//! what a person counting by eye would write down.

use throughline_core::count::{count, counted_path, peak_hour, percentile};
use throughline_core::geometry::BBox;
use throughline_core::plan::Plan;
use throughline_core::report::{counts_csv, Direction, Report};
use throughline_core::track::{Method, Track, TrackBox, TrackerConfig, Tracks};

/// A track whose box bottom-centre follows `path` (frame, x, y, observed); boxes are 20x50 pixels.
fn track(id: u32, class: &str, path: &[(u32, f64, f64, bool)]) -> Track {
    Track {
        id,
        class: Some(class.to_string()),
        mean_score: 0.9,
        class_votes: Vec::new(),
        boxes: path
            .iter()
            .map(|&(frame, x, y, observed)| TrackBox {
                frame,
                bbox: BBox::new(x - 10.0, y - 50.0, 20.0, 50.0),
                score: if observed { 0.9 } else { 0.0 },
                observed,
            })
            .collect(),
    }
}

/// A straight walk sampled every frame from `(x0, y0)` at frame `f0` by `(dx, dy)` per frame.
fn walk(f0: u32, frames: u32, x0: f64, y0: f64, dx: f64, dy: f64) -> Vec<(u32, f64, f64, bool)> {
    (0..frames)
        .map(|k| (f0 + k, x0 + dx * f64::from(k), y0 + dy * f64::from(k), true))
        .collect()
}

fn tracks(list: Vec<Track>) -> Tracks {
    let frame_count = list.iter().map(|t| t.last_frame()).max().unwrap_or(0);
    Tracks {
        config: TrackerConfig::for_method(Method::Sort),
        frame_count,
        tracks: list,
        crowded_frames: Vec::new(),
        length_from_footage: false,
    }
}

/// A horizontal screenline at y = 200 from x = 0 to x = 400: forward is downwards on screen.
const LINE: &str = r#"{"frame_rate": 10, "screenlines": [{"name": "deck", "points": [[0, 200], [400, 200]],
    "forward": "south", "backward": "north"}]}"#;

fn run(plan: &str, list: Vec<Track>) -> Report {
    count(
        &tracks(list),
        &Plan::from_json(plan).expect("valid plan"),
        None,
    )
    .expect("countable")
}

fn check_line(report: &Report, forward: u64, backward: u64) {
    let l = &report.screenlines[0];
    assert_eq!(
        (l.forward, l.backward),
        (forward, backward),
        "events: {:#?}",
        report.events
    );
}

#[test]
fn one_crossing_downwards_is_one_forward() {
    let r = run(
        LINE,
        vec![track(1, "pedestrian", &walk(1, 30, 100.0, 150.0, 0.0, 4.0))],
    );
    check_line(&r, 1, 0);
    let e = &r.events[0];
    assert_eq!(
        (e.direction, e.label.as_str(), e.class.as_str()),
        (Direction::Forward, "south", "pedestrian")
    );
    // y = 150 + 4k reaches 200 at k = 12.5, between frames 13 and 14: the event is at frame 14,
    // 1.25 s after frame 1 (10 frames per second).
    assert_eq!(e.frame, 14);
    assert!((e.seconds - 1.25).abs() < 1e-9);
    assert_eq!((e.x, e.y), (100.0, 200.0));
    assert!(!e.inferred);
}

#[test]
fn crossing_and_crossing_back_counts_both() {
    let mut path = walk(1, 20, 100.0, 150.0, 0.0, 5.0); // down to y = 245
    path.extend(walk(21, 20, 100.0, 245.0, 0.0, -5.0)); // back up to y = 150
    let r = run(LINE, vec![track(1, "pedestrian", &path)]);
    check_line(&r, 1, 1);
}

#[test]
fn jitter_on_the_line_does_not_multiply_counts() {
    // Approaches, wobbles ±3 px around the line for 20 frames (the margin is 0.1 × 50 = 5 px),
    // then walks on: one crossing.
    let mut path = walk(1, 10, 100.0, 160.0, 0.0, 4.0);
    for k in 0..20u32 {
        let y = if k % 2 == 0 { 197.0 } else { 203.0 };
        path.push((11 + k, 100.0, y, true));
    }
    path.extend(walk(31, 10, 100.0, 204.0, 0.0, 4.0));
    let r = run(LINE, vec![track(1, "pedestrian", &path)]);
    check_line(&r, 1, 0);
    // A person who only stands on the line and leaves the way they came is not counted.
    let mut stay = walk(1, 10, 100.0, 160.0, 0.0, 4.0);
    for k in 0..20u32 {
        stay.push((11 + k, 100.0, if k % 2 == 0 { 197.0 } else { 203.0 }, true));
    }
    stay.extend(walk(31, 10, 100.0, 197.0, 0.0, -4.0));
    check_line(&run(LINE, vec![track(1, "pedestrian", &stay)]), 0, 0);
}

/// [`LINE`] with its rules replaced by `rules` (a JSON object's inside).
fn line_with(rules: &str) -> String {
    LINE.replace(
        r#""frame_rate": 10,"#,
        &format!(r#""frame_rate": 10, "rules": {{{rules}}},"#),
    )
}

#[test]
fn a_box_jumping_to_either_side_of_the_line_is_counted_once_on_its_averaged_path() {
    // Walks down across the line, but for 12 frames around it the box jumps 10 px above and below
    // the steady path in turn (two people's boxes swapping, a box grown by a shadow), most jumps
    // past the 5 px margin. Counted on the boxes as given, every jump is a crossing confirmed; on
    // the path averaged over 0.5 s (3 frames either side at 10 a second) the jumps cancel and one
    // crossing is left, where the steady path crosses (y = 170 + 2.5k meets 200 at k = 12).
    let path: Vec<(u32, f64, f64, bool)> = (0..30u32)
        .map(|k| {
            let steady = 170.0 + 2.5 * f64::from(k);
            let jump = match k {
                6..=17 if k % 2 == 0 => -10.0,
                6..=17 => 10.0,
                _ => 0.0,
            };
            (1 + k, 100.0, steady + jump, true)
        })
        .collect();
    let as_given = run(
        &line_with(r#""smooth_seconds": 0"#),
        vec![track(1, "p", &path)],
    );
    let l = &as_given.screenlines[0];
    assert!(l.forward + l.backward > 1, "{:#?}", as_given.events);
    let averaged = run(
        &line_with(r#""smooth_seconds": 0.5"#),
        vec![track(1, "p", &path)],
    );
    check_line(&averaged, 1, 0);
    assert!(
        (11..=15).contains(&averaged.events[0].frame),
        "{:#?}",
        averaged.events
    );
    // The default averages too (0.35 s: 2 frames either side at 10 a second).
    check_line(&run(LINE, vec![track(1, "p", &path)]), 1, 0);
}

#[test]
fn the_path_drawn_for_review_is_the_averaged_path_that_was_counted() {
    // The jumping box of the test above: the path the page draws for a track under review
    // (`counted_path`) crosses the line once, where the one crossing was counted, while the boxes'
    // own count points cross it 7 times.
    let path: Vec<(u32, f64, f64, bool)> = (0..30u32)
        .map(|k| {
            let jump = match k {
                6..=17 if k % 2 == 0 => -10.0,
                6..=17 => 10.0,
                _ => 0.0,
            };
            (1 + k, 100.0, 170.0 + 2.5 * f64::from(k) + jump, true)
        })
        .collect();
    let plan = Plan::from_json(&line_with(r#""smooth_seconds": 0.5"#)).expect("valid plan");
    let drawn = counted_path(&track(1, "p", &path), &plan);
    let sides = |ys: Vec<f64>| {
        ys.windows(2)
            .filter(|w| (w[0] < 200.0) != (w[1] < 200.0))
            .count()
    };
    assert_eq!(sides(path.iter().map(|p| p.2).collect()), 7);
    assert_eq!(sides(drawn.iter().map(|q| q.at.y).collect()), 1);
    let report = run(
        &line_with(r#""smooth_seconds": 0.5"#),
        vec![track(1, "p", &path)],
    );
    let cross = drawn
        .windows(2)
        .position(|w| w[1].at.y >= 200.0)
        .expect("crosses")
        + 2;
    assert_eq!(report.events[0].frame, cross as u32, "{drawn:?}");
    // One point a frame, from the first box to the last, all seen; x is where the boxes were.
    assert_eq!(drawn.len(), 30);
    assert!(drawn
        .iter()
        .enumerate()
        .all(|(k, q)| q.frame == 1 + k as u32 && q.observed && q.at.x == 100.0));
}

#[test]
fn averaging_keeps_where_a_path_ends() {
    // Ends 8 px past the line, just over the margin: the last point is not pulled back towards the
    // path's middle, so the crossing is still confirmed at the end of the track.
    let path = walk(1, 13, 100.0, 160.0, 0.0, 4.0);
    assert_eq!(path.last().map(|p| p.2), Some(208.0));
    check_line(
        &run(
            &line_with(r#""smooth_seconds": 2"#),
            vec![track(1, "p", &path)],
        ),
        1,
        0,
    );
}

#[test]
fn a_shallow_walk_along_the_line_is_timed_where_it_crosses_not_at_its_last_touch() {
    // Drifts 0.4 px a frame across the line while the box jitters ±3 px (the margin is 5 px):
    // the anchor touches the line again and again between frames 13 and 28; the steady path
    // crosses at frame 21. Common practice: the moment of a crossing is where the path's middle
    // passes the line, not the last jitter across it.
    let path: Vec<(u32, f64, f64, bool)> = (1..=50u32)
        .map(|f| {
            let jitter = if f % 2 == 0 { 3.0 } else { -3.0 };
            (
                f,
                10.0 * f64::from(f),
                192.0 + 0.4 * f64::from(f - 1) + jitter,
                true,
            )
        })
        .collect();
    // Counted on the boxes as given (the averaging, on by default, would take most of the jitter
    // away before the rule is needed).
    let r = run(
        &line_with(r#""smooth_seconds": 0"#),
        vec![track(1, "pedestrian", &path)],
    );
    check_line(&r, 1, 0);
    let e = &r.events[0];
    assert!(
        (19..=23).contains(&e.frame),
        "timed at frame {}: {e:#?}",
        e.frame
    );
}

#[test]
fn coasting_across_the_line_counts_and_says_inferred() {
    let mut path = walk(1, 30, 100.0, 150.0, 0.0, 4.0);
    for p in path.iter_mut().filter(|p| (12..=16).contains(&p.0)) {
        p.3 = false; // unseen while crossing
    }
    let r = run(LINE, vec![track(1, "cyclist", &path)]);
    check_line(&r, 1, 0);
    assert!(r.events[0].inferred);
    assert_eq!(r.screenlines[0].inferred, 1);
}

#[test]
fn a_gap_is_counted_on_the_straight_line_between_where_it_was_seen() {
    // Seen walking down 4 px a frame to y = 176 (frame 7), unseen for 20 frames while the tracker's
    // prediction ran on at the old pace and turned back (as a prediction far from any detection
    // may), then seen again at y = 256 (frame 28) walking on. Between the two sightings it went
    // 80 px in 21 frames: over the line at y = 200 at frame 7 + 24 / 80 × 21 = 13.3 (the event
    // names the first frame after it, 14), where a person counting from the pictures would put it.
    // The predicted path touches the line at frames 13, 21 and 27.3 (forward, back, forward).
    let mut path = walk(1, 7, 100.0, 152.0, 0.0, 4.0);
    for k in 1..=20u32 {
        let drift = if k <= 10 {
            4.0 * f64::from(k)
        } else {
            4.0 * f64::from(20 - k)
        };
        path.push((7 + k, 100.0, 176.0 + drift, false));
    }
    path.extend(walk(28, 10, 100.0, 256.0, 0.0, 4.0));
    let r = run(LINE, vec![track(1, "pedestrian", &path)]);
    check_line(&r, 1, 0);
    let e = &r.events[0];
    assert!(e.inferred);
    assert_eq!(e.frame, 14, "{e:#?}");
}

#[test]
fn polyline_segments_and_a_vertex_count_once() {
    // A bent line: (0,200) -> (200,200) -> (400,300).
    let plan = r#"{"frame_rate": 10, "screenlines": [{"name": "bend", "points": [[0,200],[200,200],[400,300]]}]}"#;
    // Crosses the first segment.
    check_line(
        &run(
            plan,
            vec![track(1, "p", &walk(1, 30, 100.0, 150.0, 0.0, 4.0))],
        ),
        1,
        0,
    );
    // Crosses the second segment (at x = 300 the line is at y = 250).
    check_line(
        &run(
            plan,
            vec![track(1, "p", &walk(1, 40, 300.0, 200.0, 0.0, 4.0))],
        ),
        1,
        0,
    );
    // Straight through the vertex (200, 200): one crossing, not two.
    check_line(
        &run(
            plan,
            vec![track(1, "p", &walk(1, 30, 200.0, 152.0, 0.0, 4.0))],
        ),
        1,
        0,
    );
    // Leftwards along y = 240 meets only the second segment, at x = 280. That segment points
    // down-right, so its right-hand side on screen is the lower-left: moving left crosses from its
    // left-hand side to its right-hand side, which is forward.
    let left = walk(1, 50, 380.0, 240.0, -4.0, 0.0);
    check_line(&run(plan, vec![track(1, "p", &left)]), 1, 0);
}

#[test]
fn a_point_exactly_on_the_line_is_one_crossing_not_two() {
    // y goes 180, 190, 200 (on the line), 210, 220, 230.
    let r = run(
        LINE,
        vec![track(1, "p", &walk(1, 6, 100.0, 180.0, 0.0, 10.0))],
    );
    check_line(&r, 1, 0);
    assert_eq!(r.events[0].frame, 3, "the anchor is on the line at frame 3");
    // Touching the line and turning back is no crossing.
    let touch: Vec<_> = [180.0, 190.0, 200.0, 190.0, 180.0]
        .iter()
        .enumerate()
        .map(|(k, &y)| (k as u32 + 1, 100.0, y, true))
        .collect();
    check_line(&run(LINE, vec![track(1, "p", &touch)]), 0, 0);
}

#[test]
fn a_track_passing_beyond_the_end_of_the_line_is_not_counted() {
    check_line(
        &run(
            LINE,
            vec![track(1, "p", &walk(1, 30, 450.0, 150.0, 0.0, 4.0))],
        ),
        0,
        0,
    );
}

#[test]
fn a_fragment_starting_past_the_line_is_joined_and_counted_once() {
    // Track 1 walks down and ends 10 px before the line; track 2 starts 6 frames later 14 px past it,
    // where track 1 was heading (4 px a frame): one person, one crossing.
    let a = track(1, "pedestrian", &walk(1, 10, 100.0, 154.0, 0.0, 4.0)); // ends at y = 190
    let b = track(2, "pedestrian", &walk(16, 10, 100.0, 250.0, 0.0, 4.0));
    let r = run(LINE, vec![a.clone(), b.clone()]);
    check_line(&r, 1, 0);
    assert_eq!(r.joins.len(), 1);
    assert_eq!(r.joins[0].tracks, [1, 2]);
    assert_eq!(r.events[0].track_ids, vec![1, 2]);
    assert!(r.events[0].inferred, "the crossing happened in the gap");
    // Somebody else appearing far away is not joined (and is not counted: no crossing).
    let far = track(2, "pedestrian", &walk(16, 10, 330.0, 250.0, 0.0, 4.0));
    let r = run(LINE, vec![a, far]);
    check_line(&r, 0, 0);
    assert!(r.joins.is_empty());
}

#[test]
fn fragments_are_joined_up_to_the_join_gap_and_not_one_frame_more() {
    // docs/counting-rules.md: a track starting at most `join_seconds` (2 s: 20 frames at 10 fps)
    // after one ended. Track 1 ends at frame 10 at y = 190 heading down 4 px a frame; the later
    // piece starts where it would be. Others start before, during and long after, far away.
    let a = track(1, "pedestrian", &walk(1, 10, 100.0, 154.0, 0.0, 4.0));
    let others = [(1, 3), (5, 4), (12, 5), (200, 6)]
        .map(|(f0, id)| track(id, "pedestrian", &walk(f0, 10, 380.0, 20.0, 0.0, 1.0)));
    for (gap, joined) in [(20, true), (21, false)] {
        let later = track(
            2,
            "pedestrian",
            &walk(10 + gap, 10, 100.0, 190.0 + 4.0 * f64::from(gap), 0.0, 4.0),
        );
        let mut list = vec![a.clone(), later];
        list.extend(others.iter().cloned());
        let r = run(LINE, list);
        let joins: Vec<[u32; 2]> = r.joins.iter().map(|j| j.tracks).collect();
        assert_eq!(
            joins,
            if joined { vec![[1, 2]] } else { vec![] },
            "gap {gap}"
        );
        check_line(&r, u64::from(joined), 0);
    }
}

#[test]
fn intervals_carry_wall_clock_labels_and_classes() {
    // 10 frames per second, 1-minute intervals, 3 minutes of footage.
    let plan = r#"{"frame_rate": 10, "start": "2026-03-02T07:59:30", "interval_minutes": 1,
        "screenlines": [{"name": "deck", "points": [[0,200],[400,200]]}]}"#;
    let list = vec![
        track(1, "pedestrian", &walk(1, 30, 100.0, 150.0, 0.0, 4.0)), // crosses at 1.25 s
        track(2, "cyclist", &walk(700, 30, 200.0, 150.0, 0.0, 4.0)),  // at 70.15 s
        track(3, "pedestrian", &walk(1200, 30, 300.0, 250.0, 0.0, -4.0)), // at 120.15 s, backward
        track(4, "pedestrian", &walk(1771, 30, 50.0, 150.0, 0.0, 4.0)), // ends frame 1800
    ];
    let r = run(plan, list);
    let l = &r.screenlines[0];
    assert_eq!(l.intervals.len(), 3);
    assert_eq!(l.intervals[0].start, "2026-03-02T07:59:30");
    assert_eq!(l.intervals[1].start, "2026-03-02T08:00:30");
    assert_eq!(l.intervals[2].end, "2026-03-02T08:02:30");
    let counts: Vec<(u64, u64)> = l
        .intervals
        .iter()
        .map(|i| (i.forward, i.backward))
        .collect();
    assert_eq!(counts, vec![(1, 0), (1, 0), (1, 1)]);
    assert_eq!(l.by_class["pedestrian"].forward, 2);
    assert_eq!(l.by_class["cyclist"].forward, 1);
    let csv = counts_csv(&r);
    let mut lines = csv.lines();
    assert_eq!(
        lines.next(),
        Some("screenline,direction,class,interval_start,interval_end,count,partial")
    );
    assert!(csv.contains("deck,forward,cyclist,2026-03-02T08:00:30,2026-03-02T08:01:30,1,no\n"));
    assert!(csv.contains("deck,backward,pedestrian,2026-03-02T08:01:30,2026-03-02T08:02:30,1,no\n"));
    // 2 directions x 2 classes x 3 intervals, zeros included.
    assert_eq!(csv.lines().count(), 1 + 12);

    // Footage that ends halfway through the third minute: that interval's rows say so, as the
    // hand-in grids do (an 80-second count was read as a whole interval's in a newcomer's trial).
    let r = run(
        plan,
        vec![track(
            1,
            "pedestrian",
            &walk(1471, 30, 100.0, 150.0, 0.0, 4.0),
        )],
    );
    let csv = counts_csv(&r);
    assert!(
        csv.contains("deck,forward,pedestrian,2026-03-02T08:01:30,2026-03-02T08:02:30,1,yes\n"),
        "{csv}"
    );
    assert!(
        csv.contains("deck,forward,pedestrian,2026-03-02T07:59:30,2026-03-02T08:00:30,0,no\n"),
        "{csv}"
    );
}

#[test]
fn peak_hour_factor_matches_a_published_worked_example() {
    // University of Idaho NIATT traffic engineering lab manual, "Peak Hour Factor" example problem:
    // 15-minute volumes 900, 1000, 1200, 850 (5:00-6:00 p.m.) give V = 3950, V15 = 1200 and
    // PHF = 3950 / (4 x 1200) = 0.82.
    let run = peak_hour(&[900, 1000, 1200, 850], 4).unwrap();
    assert_eq!(
        (run.first, run.volume, run.peak_interval_volume),
        (0, 3950, 1200)
    );
    assert!((run.phf - 3950.0 / 4800.0).abs() < 1e-12);
    assert_eq!((run.phf * 100.0).round() / 100.0, 0.82);
    // The busiest four consecutive intervals are chosen (common practice: the peak hour is the four
    // consecutive 15-minute intervals with the highest total).
    let run = peak_hour(&[10, 900, 1000, 1200, 850, 20], 4).unwrap();
    assert_eq!((run.first, run.volume), (1, 3950));
    assert!(
        peak_hour(&[1, 2, 3], 4).is_none(),
        "less than an hour has no peak hour"
    );
}

#[test]
fn percentile_interpolates_like_numpy() {
    // numpy.percentile([1, 2, 3, 4], 85) = 3.55 (linear interpolation, NumPy's default: rank
    // 0.85 x 3 = 2.55 between the values 3 and 4).
    assert!((percentile(&[1.0, 2.0, 3.0, 4.0], 0.85).unwrap() - 3.55).abs() < 1e-12);
    assert_eq!(percentile(&[5.0], 0.85), Some(5.0));
    assert_eq!(percentile(&[], 0.5), None);
}

#[test]
fn zones_count_entries_exits_and_dwell() {
    let plan = r#"{"frame_rate": 10, "zones": [{"name": "queue", "polygon": [[100,100],[300,100],[300,300],[100,300]]}]}"#;
    // Walks in from the left at x = 50, through the zone (x 100..300) and out at the right.
    let through = track(1, "pedestrian", &walk(1, 100, 50.0, 200.0, 4.0, 0.0));
    // Starts inside and stays.
    let stays = track(2, "pedestrian", &walk(1, 50, 200.0, 250.0, 0.1, 0.0));
    let r = run(plan, vec![through, stays]);
    let z = &r.zones[0];
    assert_eq!(
        (z.entries, z.exits, z.present_at_start, z.present_at_end),
        (1, 1, 1, 1)
    );
    // Inside from x = 100 (k = 12.5) to x = 300 (k = 62.5): 50 frames = 5 s.
    assert_eq!(z.dwell_seconds.count, 1);
    assert!((z.dwell_seconds.mean.unwrap() - 5.0).abs() < 1e-9);
    assert_eq!(z.intervals[0].max_occupancy, 2);
}

#[test]
fn movements_from_first_to_last_feature_with_u_turns() {
    let plan = r#"{"frame_rate": 10, "screenlines": [
        {"name": "north", "points": [[0,100],[400,100]]},
        {"name": "south", "points": [[0,300],[400,300]]}]}"#;
    let through = track(1, "car", &walk(1, 60, 100.0, 60.0, 0.0, 5.0)); // north then south
    let mut u = walk(1, 20, 200.0, 60.0, 0.0, 4.0); // crosses north down to y = 136
    u.extend(walk(21, 20, 200.0, 136.0, 0.0, -4.0)); // and back up across north
    let r = run(plan, vec![through, track(2, "car", &u)]);
    let m: Vec<(String, String, bool, u64)> = r
        .movements
        .iter()
        .map(|m| (m.origin.clone(), m.destination.clone(), m.u_turn, m.count))
        .collect();
    assert_eq!(
        m,
        vec![
            ("north".into(), "north".into(), true, 1),
            ("north".into(), "south".into(), false, 1)
        ]
    );
}

#[test]
fn plan_errors_name_the_field() {
    let cases = [
        (r#"{"screenlines": []}"#, "frame_rate"),
        (r#"{"frame_rate": 0}"#, "frame_rate"),
        (r#"{"frame_rate": 25, "colour": "red"}"#, "colour"),
        (
            r#"{"frame_rate": 25, "screenlines": [{"name": "a", "points": [[1,2]]}]}"#,
            "screenlines[0].points",
        ),
        (
            r#"{"frame_rate": 25, "screenlines": [{"name": "a", "points": [[1,2],[1,2]]}]}"#,
            "screenlines[0].points[1]",
        ),
        (
            r#"{"frame_rate": 25, "screenlines": [{"name": "a", "points": [[1,2],[3,4]], "colour": 1}]}"#,
            "colour",
        ),
        (
            r#"{"frame_rate": 25, "zones": [{"name": "z", "polygon": [[0,0],[1,1]]}]}"#,
            "zones[0].polygon",
        ),
        (
            r#"{"frame_rate": 25, "zones": [{"name": "z", "polygon": [[0,0],[1,1],[2,2]]}]}"#,
            "all on one line",
        ),
        // A bow tie: its halves cancel to no area, but its corners are not on one line (a
        // newcomer's trial: it was asked whether they were).
        (
            r#"{"frame_rate": 25, "zones": [{"name": "z", "polygon": [[0,0],[10,10],[10,0],[0,10]]}]}"#,
            "the edge from corner 0 to 1 crosses the edge from corner 2 to 3",
        ),
        (
            r#"{"frame_rate": 25, "screenlines": [{"name": "a", "points": [[1,2],[3,4]]}], "zones": [{"name": "a", "polygon": [[0,0],[9,0],[0,9]]}]}"#,
            "used twice",
        ),
        (r#"{"frame_rate": 25, "start": "07:00"}"#, "start"),
        (
            r#"{"frame_rate": 25, "rules": {"hysteresis": -1}}"#,
            "rules.hysteresis",
        ),
        (
            r#"{"frame_rate": 25, "rules": {"smooth_seconds": 1e9}}"#,
            "rules.smooth_seconds",
        ),
        (
            r#"{"frame_rate": 25, "calibration": {"pairs": [{"image": [0,0], "ground": [0,0]}]}}"#,
            "at least 4",
        ),
        (
            r#"{"frame_rate": 25, "calibration": {"pairs": [{"image": [0,0], "ground": [0,0]}, {"image": [1,0], "ground": [1,0]}, {"image": [2,0], "ground": [2,0]}, {"image": [0,5], "ground": [0,5]}]}}"#,
            "one line",
        ),
        ("[1, 2]", "line 1"),
    ];
    for (plan, hint) in cases {
        let e = Plan::from_json(plan).expect_err(plan);
        assert!(
            e.to_string().contains(hint),
            "{plan}: `{e}` should mention `{hint}`"
        );
    }
}

#[test]
fn report_carries_plan_caution_and_every_event() {
    let r = run(
        LINE,
        vec![track(1, "pedestrian", &walk(1, 30, 100.0, 150.0, 0.0, 4.0))],
    );
    let json = serde_json::to_value(&r).unwrap();
    assert_eq!(json["format"], "throughline-report");
    assert!(json["caution"].as_str().unwrap().contains("manual count"));
    assert_eq!(json["plan"]["frame_rate"], 10.0);
    assert_eq!(json["screenlines"][0]["forward"], 1);
    assert!(json["screenlines"][0]["by_class"]["pedestrian"].is_object());
    assert_eq!(json["events"].as_array().unwrap().len(), 1);
}

#[test]
fn zone_edges_can_have_their_own_hysteresis() {
    // A zone whose bottom edge is y = 300; a walker (box height 50) goes down from inside it to
    // y = 312, 12 px = 0.24 box heights past the edge, and is then lost (the edge of the picture).
    // The line rule 0.35 asks for 17.5 px: no exit. With zone_hysteresis 0.15 (7.5 px) it exits.
    let zone =
        r#""zones": [{"name": "kiosk", "polygon": [[100,200],[300,200],[300,300],[100,300]]}]"#;
    let path = walk(1, 29, 200.0, 250.0, 0.0, 2.2); // y 250 .. 311.6
    let exits = |rules: &str| {
        let plan = format!(r#"{{"frame_rate": 10, {zone}, "rules": {rules}}}"#);
        run(&plan, vec![track(1, "pedestrian", &path)]).zones[0].exits
    };
    assert_eq!(exits(r#"{"hysteresis": 0.35}"#), 0);
    assert_eq!(exits(r#"{"hysteresis": 0.35, "zone_hysteresis": 0.15}"#), 1);
    assert_eq!(
        exits(r#"{"hysteresis": 0.15}"#),
        1,
        "without it, zones follow hysteresis"
    );
    let bad = Plan::from_json(&format!(
        r#"{{"frame_rate": 10, {zone}, "rules": {{"zone_hysteresis": 3}}}}"#
    ));
    assert!(bad
        .unwrap_err()
        .to_string()
        .contains("rules.zone_hysteresis"));
}
