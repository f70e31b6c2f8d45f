//! The adapter in a real browser (headless Chromium through wasm-bindgen-test-runner): the demo's
//! files go in as bytes, the report and the drawing arrays come out, errors are JS errors. That the
//! report equals the command line's byte for byte is checked in Node (tests/wasm/) and in the page
//! (tests/browser/).
#![cfg(target_arch = "wasm32")]

use js_sys::Function;
use throughline_wasm::{Session, BOX_STRIDE, FRAME_BOX_STRIDE};
use wasm_bindgen::JsValue;
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

const DETECTIONS: &[u8] = include_bytes!("../../../demo-site/demo/detections.csv");
const PLAN: &str = include_str!("../../../demo-site/demo/plan.json");

fn tracked() -> Session {
    let mut s = Session::new();
    s.load_detections(DETECTIONS).expect("demo detections read");
    s.set_plan(PLAN).expect("demo plan read");
    s.track("", "", None).expect("tracking runs");
    s
}

#[wasm_bindgen_test]
fn counts_in_the_report_are_the_sum_of_its_events() {
    let report: serde_json::Value = serde_json::from_str(&tracked().report().unwrap()).unwrap();
    let events = report["events"].as_array().unwrap();
    for line in report["screenlines"].as_array().unwrap() {
        for dir in ["forward", "backward"] {
            let n = events
                .iter()
                .filter(|e| e["name"] == line["name"] && e["direction"] == dir)
                .count();
            assert_eq!(line[dir].as_u64(), Some(n as u64), "{} {dir}", line["name"]);
        }
    }
    assert_eq!(
        report["tracker"]["method"], "deepsort",
        "the demo carries embeddings"
    );
}

#[wasm_bindgen_test]
fn all_boxes_agree_with_boxes_at_each_frame() {
    let s = tracked();
    let all = s.all_boxes().to_vec();
    assert_eq!(all.len() % FRAME_BOX_STRIDE, 0);
    let frames: Vec<f32> = all.chunks(FRAME_BOX_STRIDE).map(|b| b[0]).collect();
    assert!(frames.windows(2).all(|w| w[0] <= w[1]), "ordered by frame");
    for frame in [1u32, 100, 400, 750] {
        let mut at: Vec<Vec<f32>> = s
            .boxes_at(frame)
            .to_vec()
            .chunks(BOX_STRIDE)
            .map(<[f32]>::to_vec)
            .collect();
        at.sort_by(|a, b| a[0].total_cmp(&b[0]));
        let from_all: Vec<Vec<f32>> = all
            .chunks(FRAME_BOX_STRIDE)
            .filter(|b| b[0] == frame as f32)
            .map(|b| b[1..].to_vec())
            .collect();
        assert_eq!(at, from_all, "frame {frame}");
    }
    let list = js_sys::Array::from(&s.track_list().unwrap());
    assert!(list.length() > 0);
    let ids: Vec<f64> = list
        .iter()
        .map(|t| {
            js_sys::Reflect::get(&t, &"id".into())
                .unwrap()
                .as_f64()
                .unwrap()
        })
        .collect();
    assert!(
        all.chunks(FRAME_BOX_STRIDE)
            .all(|b| ids.contains(&f64::from(b[1]))),
        "every box belongs to a listed track"
    );
}

#[wasm_bindgen_test]
fn progress_reaches_the_last_frame() {
    let mut s = Session::new();
    s.load_detections(DETECTIONS).unwrap();
    let seen = js_sys::Array::new();
    let record = Function::new_with_args("done, total", "this.push([done, total])");
    let record = record.bind0(&seen);
    s.track("sort", "", Some(record)).unwrap();
    let last = js_sys::Array::from(&seen.get(seen.length() - 1));
    assert_eq!(last.get(0), last.get(1), "last call is done == total");
    assert_eq!(last.get(1), JsValue::from(750));
}

#[wasm_bindgen_test]
fn a_changed_plan_counts_again_without_tracking_again() {
    let mut s = tracked();
    let before = s.report().unwrap();
    s.set_plan(r#"{"frame_rate": 25, "screenlines": [{"name": "only", "points": [[0, 230], [640, 230]]}]}"#)
        .unwrap();
    let after = s.report().unwrap();
    assert_ne!(before, after);
    assert!(after.contains(r#""name": "only""#) || after.contains(r#""name":"only""#));
}

#[wasm_bindgen_test]
fn bad_input_says_what_to_fix() {
    let mut s = Session::new();
    let message = |e: wasm_bindgen::JsError| {
        let v: JsValue = e.into();
        js_sys::Error::from(v).message().as_string().unwrap()
    };
    let e = s
        .load_detections(b"1,-1,10,20,-3,40,0.9\n")
        .map(|_| ())
        .unwrap_err();
    assert!(message(e).contains("line 1, column 5"));
    let e = s
        .set_plan(r#"{"frame_rate": 25, "zones": [{"name": "z", "polygon": [[0,0],[1,1]]}]}"#)
        .unwrap_err();
    assert!(message(e).contains("polygon"));
    let e = s.track("", "", None).map(|_| ()).unwrap_err();
    assert!(message(e).contains("open a detections file"));
    let e = s.report().unwrap_err();
    assert!(message(e).contains("run tracking first"));
}
