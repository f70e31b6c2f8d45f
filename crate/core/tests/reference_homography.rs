//! Ground-plane calibration against OpenCV: `tests/fixtures/homography.json` holds point pairs and
//! the matrices of `cv2.findHomography(method=0)` (opencv-python-headless; version in the fixture's
//! `source`), made by `tests/reference/make_homography_fixtures.py`.

use serde::Deserialize;
use throughline_core::plan::Homography;
use throughline_core::plan::PointPair;

#[derive(Deserialize)]
struct Fixture {
    source: String,
    cases: Vec<Case>,
}

#[derive(Deserialize)]
struct Case {
    name: String,
    noise_px: f64,
    pairs: Vec<PointPair>,
    h: Vec<f64>,
    probes: Vec<[f64; 2]>,
    probes_ground: Vec<[f64; 2]>,
}

#[test]
fn homography_equals_opencv_find_homography() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../tests/fixtures/homography.json"
    );
    let f: Fixture = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    assert!(
        f.source.starts_with("opencv-python-headless "),
        "{}",
        f.source
    );
    for c in &f.cases {
        let h = Homography::from_pairs(&c.pairs).unwrap_or_else(|e| panic!("{}: {e}", c.name));
        if c.noise_px == 0.0 {
            // Exact correspondences: one homography fits, and both must find it.
            for (k, want) in c.h.iter().enumerate() {
                let got = h.h[(k / 3, k % 3)];
                assert!(
                    (got - want).abs() <= 1e-6 * want.abs().max(1.0),
                    "{}: h[{k}] {got} vs {want}",
                    c.name
                );
            }
        }
        // With noise OpenCV refines the algebraic fit by Levenberg-Marquardt and the normalised DLT
        // does not, so the mapped points may differ slightly: within 2 cm on a 10 m plaza.
        let tolerance = if c.noise_px == 0.0 { 1e-6 } else { 0.02 };
        for (p, want) in c.probes.iter().zip(&c.probes_ground) {
            let (x, y) = h.to_ground(p[0], p[1]);
            assert!(
                (x - want[0]).abs() <= tolerance && (y - want[1]).abs() <= tolerance,
                "{}: {p:?} -> ({x}, {y}), OpenCV {want:?}",
                c.name
            );
        }
    }
}

#[test]
fn degenerate_point_sets_are_refused() {
    let pair = |ix: f64, iy: f64, gx: f64, gy: f64| PointPair {
        image: [ix, iy],
        ground: [gx, gy],
    };
    let three = [
        pair(0.0, 0.0, 0.0, 0.0),
        pair(1.0, 0.0, 1.0, 0.0),
        pair(0.0, 1.0, 0.0, 1.0),
    ];
    assert!(Homography::from_pairs(&three)
        .unwrap_err()
        .contains("at least 4"));
    let collinear = [
        pair(0.0, 0.0, 0.0, 0.0),
        pair(10.0, 0.0, 1.0, 0.0),
        pair(20.0, 0.0, 2.0, 0.0),
        pair(0.0, 10.0, 0.0, 1.0),
    ];
    assert!(Homography::from_pairs(&collinear)
        .unwrap_err()
        .contains("one line"));
    let same = [pair(5.0, 5.0, 1.0, 1.0); 5];
    assert!(Homography::from_pairs(&same).is_err());
}
