//! Kalman filter against filterpy: `tests/fixtures/kalman.json` holds predict and update results of
//! `filterpy.kalman.KalmanFilter` (version in the fixture's `source`) on the box model, made by
//! `tests/reference/make_kalman_fixtures.py`. They must agree to 1e-9.

use serde::Deserialize;
use throughline_core::geometry::BBox;
use throughline_core::track::kalman::{BoxMotion, KalmanFilter, StateCov};

#[derive(Deserialize)]
struct Fixture {
    source: String,
    cases: Vec<Case>,
}

#[derive(Deserialize)]
struct Case {
    name: String,
    start: [f64; 4],
    steps: Vec<Step>,
}

#[derive(Deserialize)]
struct Step {
    z: Option<[f64; 4]>,
    predicted_x: Vec<f64>,
    predicted_p: Vec<f64>,
    x: Vec<f64>,
    p: Vec<f64>,
}

fn assert_close(name: &str, what: &str, got: &[f64], want: &[f64]) {
    assert_eq!(got.len(), want.len());
    for (k, (g, w)) in got.iter().zip(want).enumerate() {
        let tol = 1e-9 * w.abs().max(1.0);
        assert!(
            (g - w).abs() <= tol,
            "{name}: {what}[{k}] = {g}, filterpy {w}"
        );
    }
}

fn row_major(p: &StateCov) -> Vec<f64> {
    let mut v = Vec::with_capacity(64);
    for r in 0..8 {
        for c in 0..8 {
            v.push(p[(r, c)]);
        }
    }
    v
}

#[test]
fn predict_and_update_equal_filterpy() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../tests/fixtures/kalman.json"
    );
    let f: Fixture =
        serde_json::from_str(&std::fs::read_to_string(path).expect("fixture")).expect("JSON");
    assert!(f.source.starts_with("filterpy "), "{}", f.source);
    let motion = BoxMotion::default();
    for case in &f.cases {
        let [cx, cy, w, h] = case.start;
        let mut kf: KalmanFilter = motion.initiate(&BBox::from_centre(cx, cy, w, h));
        for (k, step) in case.steps.iter().enumerate() {
            // The generic filter with the model's matrices, exactly as filterpy was given them.
            let q = motion.process_noise(kf.x[3]);
            kf.predict(&BoxMotion::transition(), &q);
            let label = format!("{} step {k}", case.name);
            assert_close(&label, "predicted x", kf.x.as_slice(), &step.predicted_x);
            assert_close(&label, "predicted P", &row_major(&kf.p), &step.predicted_p);
            if let Some([cx, cy, w, h]) = step.z {
                assert!(motion.update(&mut kf, &BBox::from_centre(cx, cy, w, h)));
            }
            assert_close(&label, "x", kf.x.as_slice(), &step.x);
            assert_close(&label, "P", &row_major(&kf.p), &step.p);
        }
    }
}

#[test]
fn gating_distance_is_zero_at_the_prediction_and_grows_away_from_it() {
    let motion = BoxMotion::default();
    let b = BBox::new(100.0, 100.0, 40.0, 100.0);
    let kf = motion.initiate(&b);
    assert!(motion.gating_distance(&kf, &b) < 1e-12);
    let near = motion.gating_distance(&kf, &BBox::new(103.0, 100.0, 40.0, 100.0));
    let far = motion.gating_distance(&kf, &BBox::new(160.0, 100.0, 40.0, 100.0));
    assert!(near > 0.0 && near < far);
}

#[test]
fn the_model_s_fast_predict_equals_the_generic_one() {
    let motion = BoxMotion::default();
    let mut fast = motion.initiate(&BBox::new(10.0, 20.0, 30.0, 60.0));
    for k in 0..20 {
        let mut generic = fast.clone();
        let q = motion.process_noise(generic.x[3]);
        generic.predict(&BoxMotion::transition(), &q);
        motion.predict(&mut fast);
        let close = (fast.x - generic.x).amax() < 1e-9 && (fast.p - generic.p).amax() < 1e-9;
        assert!(close, "step {k}");
        let b = BBox::new(10.0 + 2.0 * k as f64, 20.0, 30.0, 60.0 + 0.5 * k as f64);
        motion.update(&mut fast, &b);
    }
}

#[test]
fn the_model_s_fast_update_equals_the_generic_joseph_form() {
    let motion = BoxMotion::default();
    let mut fast = motion.initiate(&BBox::new(10.0, 20.0, 30.0, 60.0));
    for k in 0..30 {
        motion.predict(&mut fast);
        let mut generic = fast.clone();
        let b = BBox::new(
            10.0 + 2.0 * k as f64,
            20.0 - 0.3 * k as f64,
            30.0,
            60.0 + 0.5 * k as f64,
        );
        let r = motion.measurement_noise(generic.x[3]);
        generic.update(
            &throughline_core::track::kalman::measurement(&b),
            &BoxMotion::observation(),
            &r,
        );
        motion.update(&mut fast, &b);
        let tol = 1e-9 * generic.p.amax().max(1.0);
        assert!((fast.x - generic.x).amax() < 1e-9, "step {k}: x");
        assert!((fast.p - generic.p).amax() < tol, "step {k}: P");
    }
}
