//! Tracking metrics against the reference evaluation code: `tests/fixtures/metrics.json` holds, for
//! the real ground truth and tracker output shipped in the py-motmetrics wheel (TUD-Campus,
//! TUD-Stadtmitte) and for simulated cases with an occlusion and identity swaps, the values of
//! TrackEval (HOTA, CLEAR, Identity) and py-motmetrics; versions in the fixture's `source`. Made by
//! `tests/reference/make_metric_fixtures.py`. Where the two libraries disagree (ID switches and what
//! follows from them), TrackEval is the reference.

use serde::Deserialize;
use std::collections::BTreeMap;
use throughline_core::track::files::read_benchmark_boxes;
use throughline_eval::tracking_metrics::score;

#[derive(Deserialize)]
struct Fixture {
    source: String,
    cases: Vec<Case>,
}

#[derive(Deserialize)]
struct Case {
    name: String,
    gt: String,
    tracks: String,
    trackeval: BTreeMap<String, f64>,
    motmetrics: BTreeMap<String, f64>,
}

fn fixture() -> Fixture {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../tests/fixtures/metrics.json"
    );
    serde_json::from_str(&std::fs::read_to_string(path).expect("fixture")).expect("fixture JSON")
}

#[test]
fn metrics_equal_trackeval_to_1e_4() {
    let f = fixture();
    assert!(f.source.starts_with("trackeval "), "{}", f.source);
    for c in &f.cases {
        let gt = read_benchmark_boxes(c.gt.as_bytes()).unwrap();
        let tr = read_benchmark_boxes(c.tracks.as_bytes()).unwrap();
        let s = score(&gt, &tr).unwrap();
        let ours = [
            ("hota", s.hota),
            ("deta", s.deta),
            ("assa", s.assa),
            ("loca", s.loca),
            ("mota", s.mota),
            ("motp", s.motp),
            ("idf1", s.idf1),
            ("idp", s.idp),
            ("idr", s.idr),
            ("id_switches", s.id_switches as f64),
            ("fragmentations", s.fragmentations as f64),
            ("mostly_tracked", s.mostly_tracked as f64),
            ("mostly_lost", s.mostly_lost as f64),
            ("false_positives", s.false_positives as f64),
            ("misses", s.misses as f64),
        ];
        for (key, value) in ours {
            let want = c.trackeval[key];
            assert!(
                (value - want).abs() <= 1e-4,
                "{}: {key} = {value}, TrackEval {want}",
                c.name
            );
        }
    }
}

#[test]
fn metrics_equal_py_motmetrics_where_the_two_libraries_agree() {
    let f = fixture();
    assert!(f.source.contains("motmetrics "), "{}", f.source);
    for c in &f.cases {
        let gt = read_benchmark_boxes(c.gt.as_bytes()).unwrap();
        let tr = read_benchmark_boxes(c.tracks.as_bytes()).unwrap();
        let s = score(&gt, &tr).unwrap();
        let m = &c.motmetrics;
        // Identity metrics and detection counts do not depend on the ID-switch rule.
        for (key, value) in [
            ("idf1", s.idf1),
            ("idp", s.idp),
            ("idr", s.idr),
            ("num_false_positives", s.false_positives as f64),
            ("num_misses", s.misses as f64),
        ] {
            assert!(
                (value - m[key]).abs() <= 1e-4,
                "{}: {key} = {value}, motmetrics {}",
                c.name,
                m[key]
            );
        }
        // py-motmetrics reports MOTP as a distance, 1 - IoU.
        assert!(
            (s.motp - (1.0 - m["motp"])).abs() <= 1e-4,
            "{}: motp",
            c.name
        );
        // MOTA differs only through the ID switches, which TrackEval counts differently.
        let tp_fp_fn =
            1.0 - (s.false_positives + s.misses) as f64 / (s.true_positives + s.misses) as f64;
        let mm_switches = m["num_switches"];
        let mm_mota = tp_fp_fn - mm_switches / (s.true_positives + s.misses) as f64;
        assert!(
            (mm_mota - m["mota"]).abs() <= 1e-4,
            "{}: motmetrics MOTA from its own switches",
            c.name
        );
    }
}
