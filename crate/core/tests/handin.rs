//! The hand-in outputs on hand-worked counts: the interval grid in both layouts (header block,
//! columns, totals, the peak hour and its factor worked out by hand), the clipboard's
//! tab-separated shape, the movement matrix, file names, and the summary's contents.

use throughline_core::fingerprint::Fingerprint;
use throughline_core::geometry::BBox;
use throughline_core::handin::{self, Context, GridLayout, Separator};
use throughline_core::pipeline::{self, Work};
use throughline_core::plan::Plan;
use throughline_core::report::Report;
use throughline_core::track::{Method, Track, TrackBox, TrackerConfig, Tracks};

/// A walk crossing y = 200 (and y = 300 when `far`), down or up, around frame `c`, at `x`.
fn walk(id: u32, c: u32, x: f64, down: bool, far: bool) -> Track {
    let (y0, dy) = if down {
        (150.0, 4.0)
    } else {
        (if far { 350.0 } else { 250.0 }, -4.0)
    };
    let frames = if far { 60 } else { 25 };
    Track {
        id,
        class: Some("pedestrian".into()),
        mean_score: 0.9,
        class_votes: Vec::new(),
        boxes: (0..frames)
            .map(|k| TrackBox {
                frame: c - 12 + k,
                bbox: BBox::new(x - 10.0, y0 + dy * f64::from(k) - 50.0, 20.0, 50.0),
                score: 0.9,
                observed: true,
            })
            .collect(),
    }
}

/// Two lines across a wide picture, 10 frames a second, 15-minute intervals (9,000 frames).
const PLAN: &str = r#"{"frame_rate": 10, "start": "2026-03-02T07:00:00",
    "screenlines": [{"name": "north kerb", "points": [[0, 200], [8000, 200]], "forward": "south", "backward": "north"},
                    {"name": "south kerb", "points": [[0, 300], [8000, 300]], "forward": "south", "backward": "north"}],
    "rules": {"join_seconds": 0}}"#;

/// Southward crossings of the north kerb per interval, `south`; northward walks that cross only
/// the north kerb, `north`; 75 minutes in all.
fn report(south: &[u32], north: &[u32]) -> Report {
    let mut list = Vec::new();
    for (i, (&s, &n)) in south.iter().zip(north).enumerate() {
        for k in 0..s + n {
            let id = list.len() as u32 + 1;
            let c = 9000 * i as u32 + 100 + 100 * k;
            list.push(walk(id, c, 40.0 * f64::from(id), k < s, false));
        }
    }
    let tracks = Tracks {
        config: TrackerConfig::for_method(Method::Sort),
        frame_count: 9000 * south.len() as u32,
        tracks: list,
        crowded_frames: Vec::new(),
        length_from_footage: false,
    };
    pipeline::count(
        &tracks,
        &Plan::from_json(PLAN).unwrap(),
        None,
        &Work::default(),
    )
    .unwrap()
}

fn context() -> Context {
    Context {
        site: Some("Bridge St / Main Rd (north)".into()),
        plan_name: Some("bridge-st.json".into()),
        detections: Some(Fingerprint::of("detections.csv", 3, b"abc", None)),
        ..Context::default()
    }
}

fn table_rows(text: &str) -> Vec<Vec<String>> {
    let body = text
        .split("\n\n")
        .nth(1)
        .expect("a table after the header block");
    body.lines()
        .map(|l| l.split(',').map(str::to_string).collect())
        .collect()
}

#[test]
fn the_wide_grid_has_totals_and_the_peak_hour_worked_by_hand() {
    // Per interval, south 3 5 4 6 2 and north 1 0 2 1 1: totals 4 5 6 7 3. The busiest four
    // consecutive whole intervals are the first four (22 against 21), the busiest interval in them
    // has 7, so PHF = 22 / (4 × 7) = 0.786.
    let r = report(&[3, 5, 4, 6, 2], &[1, 0, 2, 1, 1]);
    let text = handin::interval_grid(&r, &context(), GridLayout::Wide, Separator::Comma);
    assert!(
        text.starts_with(
            "Site,Bridge St / Main Rd (north)\nRecording,\"from 2026-03-02T07:00:00, 75.0 minutes"
        ),
        "{text}"
    );
    assert!(text.contains("\nDetections,detections.csv\n"));
    // Whether a person corrected the counts is said at the top (a newcomer's trial).
    assert!(text.contains("\nCorrections,none\n"), "{text}");
    let mut corrected = r.clone();
    let outcome = |applied: bool| throughline_core::edits::Outcome {
        edit: throughline_core::edits::Edit::DeleteTrack {
            track: throughline_core::edits::TrackRef {
                id: 1,
                frames: [1, 2],
            },
            reason: None,
        },
        applied,
        note: String::new(),
    };
    corrected.edits = vec![outcome(true), outcome(true), outcome(false)];
    let text2 = handin::interval_grid(&corrected, &context(), GridLayout::Wide, Separator::Comma);
    assert!(
        text2.contains("\nCorrections,2 made by a person and applied; 1 could not be applied\n"),
        "{text2}"
    );
    let rows = table_rows(&text);
    assert_eq!(
        rows[0][..4],
        [
            "Interval start",
            "Interval end",
            "north kerb south pedestrian",
            "north kerb north pedestrian"
        ]
    );
    let total_col = rows[0].iter().position(|c| c == "Total").unwrap();
    let totals: Vec<&str> = rows[1..6].iter().map(|r| r[total_col].as_str()).collect();
    assert_eq!(totals, ["4", "5", "6", "7", "3"]);
    let peaks: Vec<&str> = rows[1..6]
        .iter()
        .map(|r| r[total_col + 1].as_str())
        .collect();
    assert_eq!(peaks, ["peak", "peak", "peak", "peak", ""]);
    assert_eq!(rows[6][0], "Total");
    assert_eq!(rows[6][2..4], ["20", "5"]);
    assert_eq!(rows[6][total_col], "25");
    assert!(text.contains("Peak hour (all lines),2026-03-02T07:00:00 to 2026-03-02T08:00:00,22\nPeak hour factor,0.786,busiest interval 7\n"), "{text}");
}

#[test]
fn the_long_grid_has_one_row_per_interval_line_direction_and_class() {
    let r = report(&[3, 5, 4, 6, 2], &[1, 0, 2, 1, 1]);
    let text = handin::interval_grid(&r, &context(), GridLayout::Long, Separator::Comma);
    let rows = table_rows(&text);
    assert_eq!(
        rows[0],
        [
            "interval_start",
            "interval_end",
            "screenline",
            "direction",
            "class",
            "count",
            "peak_hour",
            "note"
        ]
    );
    // 5 intervals × (north kerb: 2 directions; south kerb: no crossings, no class columns).
    assert_eq!(rows.len() - 1, 5 * 2);
    assert_eq!(rows[1][5..], ["3", "yes", ""]);
    assert_eq!(rows[10][5..], ["1", "no", ""]);
}

#[test]
fn the_clipboard_text_pastes_as_cells() {
    let r = report(&[3, 5, 4, 6, 2], &[1, 0, 2, 1, 1]);
    let text = handin::interval_grid(&r, &context(), GridLayout::Wide, Separator::Tab);
    let table: Vec<&str> = text.split("\n\n").nth(1).unwrap().lines().collect();
    let widths: Vec<usize> = table.iter().map(|l| l.split('\t').count()).collect();
    assert!(widths.iter().all(|&w| w == widths[0]), "{widths:?}");
    assert!(!text.contains('"'), "no CSV quoting in tab-separated text");
}

#[test]
fn movements_become_an_origin_destination_matrix() {
    // Three walk south across both kerbs, one walks north across both, one only the north kerb.
    let tracks = Tracks {
        config: TrackerConfig::for_method(Method::Sort),
        frame_count: 2000,
        tracks: vec![
            walk(1, 100, 40.0, true, true),
            walk(2, 300, 80.0, true, true),
            walk(3, 500, 120.0, true, true),
            walk(4, 700, 160.0, false, true),
            walk(5, 900, 200.0, true, false),
        ],
        crowded_frames: Vec::new(),
        length_from_footage: false,
    };
    let r = pipeline::count(
        &tracks,
        &Plan::from_json(PLAN).unwrap(),
        None,
        &Work::default(),
    )
    .unwrap();
    let text = handin::movement_matrix(&r, &context(), Separator::Comma);
    assert!(text.contains("All classes\nFrom \\ To,north kerb,south kerb,Total\nnorth kerb,0,3,3\nsouth kerb,1,0,1\nTotal,1,3,4\n"), "{text}");
    assert!(text.ends_with("(no destination),1\n"), "{text}");
    // One line alone: no matrix of the line to itself, but why (a newcomer's re-trial).
    let mut one_line = r.clone();
    one_line.screenlines.truncate(1);
    let text = handin::movement_matrix(&one_line, &context(), Separator::Comma);
    assert!(
        text.ends_with("need two or more in the plan; this plan has one\n"),
        "{text}"
    );
    assert!(!text.contains("From \\ To"), "{text}");
}

#[test]
fn file_names_come_from_the_site_and_date() {
    let r = report(&[1], &[0]);
    assert_eq!(
        handin::file_stem(&r, &context()),
        "bridge-st-main-rd-north_2026-03-02"
    );
    // Letters of any script are kept (a newcomer's re-trial: "Café" lost its "é").
    assert_eq!(handin::slug("Café Ünïcode / Nord"), "café-ünïcode-nord");
    let mut bare = r.clone();
    bare.plan.start = None;
    assert_eq!(
        handin::file_stem(&bare, &Context::default()),
        "counts_undated"
    );
}

#[test]
fn the_summary_names_the_site_counts_checks_and_what_reproduces_them() {
    let r = report(&[3, 5, 4, 6, 2], &[1, 0, 2, 1, 1]);
    let mut ctx = context();
    ctx.still = Some("data:image/png;base64,AAAA".into());
    ctx.project_name = Some("bridge-st_2026-03-02.throughline.json".into());
    let html = handin::summary_html(&r, &ctx);
    for needle in [
        "<h1>Counts at Bridge St / Main Rd (north)</h1>",
        "<td>north kerb</td><td>20 south</td><td>5 north</td><td>25</td>",
        "peak hour factor 0.786",
        "Not checked against a hand count",
        "No correction factor applied",
        "Automated counts are estimates.",
        "<image href=\"data:image/png;base64,AAAA\"",
        "throughline run detections.csv --plan bridge-st.json --edits bridge-st_2026-03-02.throughline.json --site 'Bridge St / Main Rd (north)' --start 2026-03-02T07:00:00 -o check/report.json",
        "detections (first MiB): <code>ba7816bf8f01</code>",
        // For a person: the start as a date and a time; the project file named for what it is.
        "<p>Recorded from 2026-03-02 07:00:00, 75.0 minutes",
        "the project file the page's Save project writes",
    ] {
        assert!(html.contains(needle), "missing {needle}");
    }
    // With the footage named, the command names it too: the count then reaches its end where the
    // detections stop before it, as the page counted (a newcomer's re-trial: it stopped at the
    // last box).
    ctx.footage = Some(Fingerprint::of("north.webm", 3, b"abc", Some(30.0)));
    assert!(handin::summary_html(&r, &ctx).contains(
        "throughline run detections.csv --plan bridge-st.json --footage north.webm --edits"
    ));
    // Boxes the command line found in the footage: found there again, with the same settings (a
    // newcomer's trial: the command named DETECTIONS and no footage); found in the page: the
    // placeholder, saying where the boxes come from.
    ctx.detections = None;
    ctx.found_in_footage = true;
    ctx.detector_settings = Some("heights.json".into());
    let found = handin::summary_html(&r, &ctx);
    assert!(found.contains(
        "throughline run --footage north.webm --detector-config heights.json --plan bridge-st.json --edits"
    ));
    let grid = handin::interval_grid(&r, &ctx, GridLayout::Wide, Separator::Comma);
    assert!(
        grid.contains("Detections,\"found in the footage, detector settings heights.json\""),
        "{grid}"
    );
    ctx.found_in_page = true;
    // Without a project file the page's detector settings are in no file: the boxes are needed.
    let kept = ctx.project_name.take();
    let found = handin::summary_html(&r, &ctx);
    assert!(found.contains("throughline run DETECTIONS --plan bridge-st.json --footage north.webm"));
    assert!(found.contains(
        "DETECTIONS is the boxes found in the page, as its Export detections saves them."
    ));
    // … unless a project file goes with them: it records the page's detector settings, so the
    // command line finds the same boxes in the footage again.
    ctx.project_name = Some("bridge-project.json".into());
    let settings = ctx.detector_settings.take();
    let found = handin::summary_html(&r, &ctx);
    assert!(
        found.contains("throughline run --footage north.webm --plan bridge-st.json --edits bridge-project.json"),
        "{found}"
    );
    assert!(!found.contains("DETECTIONS"), "{found}");
    (ctx.project_name, ctx.detector_settings) = (kept, settings);
    // A name with spaces or brackets is one word when pasted into a shell.
    ctx.found_in_page = false;
    ctx.footage = Some(Fingerprint::of("my clip (1).mp4", 3, b"abc", None));
    ctx.detector_settings = Some("it's.json".into());
    assert!(handin::summary_html(&r, &ctx)
        .contains("throughline run --footage 'my clip (1).mp4' --detector-config 'it'\\''s.json'"));
    // Self-contained: nothing is fetched, nothing runs.
    assert!(
        !html.contains("<script") && !html.contains("src=\"http") && !html.contains("href=\"http")
    );
}

/// The summary's drawing names each line's two directions on their sides (a newcomer's trial: the
/// teeth alone did not tell a manager which way was IN): the forward label on the side the teeth
/// point to (below a line drawn left to right, y down), the backward one above.
#[test]
fn the_summary_sketch_names_each_lines_directions_on_their_sides() {
    let r = report(&[1, 2], &[]);
    let html = handin::summary_html(&r, &context());
    let line = &r.screenlines[0];
    let at = |label: &str| -> f64 {
        let i = html
            .find(&format!(">{label}</text>"))
            .unwrap_or_else(|| panic!("{label} not drawn"));
        let y = &html[..i];
        let y = &y[y.rfind(" y=\"").unwrap() + 4..];
        y[..y.find('"').unwrap()].parse().unwrap()
    };
    let plan_y = r.plan.screenlines[0].points[0][1];
    assert!(at(&line.forward_label) > plan_y, "forward below the line");
    assert!(at(&line.backward_label) < plan_y, "backward above it");
}
