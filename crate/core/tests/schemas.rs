//! The documents' JSON Schemas against what the code reads and writes:
//! - `docs/report.schema.json`, `docs/project.schema.json` and `docs/edits.schema.json` are
//!   generated from their types (schemars) and must be what is committed; the demo's report, made here, must validate against it with an independent
//!   validator (the `jsonschema` crate), and must read back into the same bytes;
//! - `docs/plan.schema.json` is written by hand (with the ranges the checks apply): its fields must
//!   be exactly the fields of the `PlanSpec` type, its examples must validate, and values it
//!   forbids must be refused by the plan's checks.
//!
//! To rewrite them after changing the types:
//! `THROUGHLINE_WRITE_SCHEMAS=1 cargo test -p throughline-core --test schemas`.

use serde_json::Value;
use std::collections::{BTreeMap, BTreeSet};
use std::path::PathBuf;
use throughline_core::edits::EditList;
use throughline_core::plan::Plan;
use throughline_core::project::Project;
use throughline_core::report::Report;
use throughline_core::{pipeline, read_detections};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../..")
}

fn read(path: &str) -> String {
    std::fs::read_to_string(root().join(path)).unwrap_or_else(|e| panic!("{path}: {e}"))
}

fn json(path: &str) -> Value {
    serde_json::from_str(&read(path)).unwrap_or_else(|e| panic!("{path}: {e}"))
}

fn demo_report() -> Report {
    let dets = read_detections(read("demo-site/demo/detections.csv").as_bytes()).unwrap();
    let plan = Plan::from_json(&read("demo-site/demo/plan.json")).unwrap();
    let config = pipeline::tracker_config(&dets.detections, None, None).unwrap();
    pipeline::run(&dets.detections, &plan, &config, &mut |_, _| {})
        .unwrap()
        .1
}

fn validate(schema: &Value, instance: &Value, what: &str) {
    let validator = jsonschema::validator_for(schema).expect("the schema compiles");
    let errors: Vec<String> = validator
        .iter_errors(instance)
        .map(|e| format!("{} at {}", e, e.instance_path()))
        .collect();
    assert!(errors.is_empty(), "{what}: {errors:#?}");
}

#[test]
fn the_document_schemas_are_generated_from_the_types() {
    let documents = [
        ("docs/report.schema.json", Report::schema()),
        ("docs/project.schema.json", Project::schema()),
        ("docs/edits.schema.json", EditList::schema()),
    ];
    for (path, schema) in documents {
        let generated = format!("{}\n", serde_json::to_string_pretty(&schema).unwrap());
        let file = root().join(path);
        if std::env::var_os("THROUGHLINE_WRITE_SCHEMAS").is_some() {
            std::fs::write(&file, &generated).unwrap();
        }
        let committed = std::fs::read_to_string(&file).unwrap_or_default();
        assert!(
            committed == generated,
            "{path} is not the schema of its type: rewrite it with \
             THROUGHLINE_WRITE_SCHEMAS=1 cargo test -p throughline-core --test schemas"
        );
    }
}

#[test]
fn reports_validate_against_the_schema_and_read_back_byte_for_byte() {
    let schema = json("docs/report.schema.json");
    let report = demo_report();
    let text = report.to_json();
    validate(
        &schema,
        &serde_json::from_str(&text).unwrap(),
        "the demo's report",
    );
    assert_eq!(Report::from_json(&text).unwrap().to_json(), text);
    // A report made by the command line and committed (the demo's true counts) reads back too.
    let committed = read("demo-site/demo/truth_report.json");
    validate(
        &schema,
        &json("demo-site/demo/truth_report.json"),
        "truth_report.json",
    );
    assert_eq!(Report::from_json(&committed).unwrap().to_json(), committed);
    let e = Report::from_json(r#"{"format": "throughline-report"}"#).unwrap_err();
    assert!(e.to_string().contains("missing field"), "{e}");
}

#[test]
fn a_report_counted_before_averaged_paths_reads_back_with_its_own_rules() {
    // Written by 0.1.x: no `smooth_seconds` among its rules, a margin of 0.15 written out. It was
    // counted on the boxes as given, so it reads back with 0, not today's default.
    let text = demo_report().to_json();
    let old = text
        .replace(
            &format!(
                "\"generator\": \"throughline {}\"",
                throughline_core::VERSION
            ),
            "\"generator\": \"throughline 0.1.9\"",
        )
        .replace("\"hysteresis\": 0.1,", "\"hysteresis\": 0.15,");
    let mut old: Value = serde_json::from_str(&old).unwrap();
    old["plan"]["rules"]
        .as_object_mut()
        .unwrap()
        .remove("smooth_seconds");
    let read = Report::from_json(&old.to_string()).unwrap();
    assert_eq!(read.generator, "throughline 0.1.9");
    assert_eq!(read.plan.rules.smooth_seconds, 0.0);
    assert_eq!(read.plan.rules.hysteresis, 0.15);
    // This version's reports keep the rules they were counted with.
    let now = Report::from_json(&text).unwrap();
    let want = throughline_core::plan::DEFAULT_SMOOTH_SECONDS;
    assert_eq!(now.plan.rules.smooth_seconds, want);
}

/// Every object's property names and required properties, by path (`screenlines[].points`),
/// following `$ref`s into `$defs` and through `anyOf`/`oneOf` alternatives and array items.
fn shape(schema: &Value) -> BTreeMap<String, (BTreeSet<String>, BTreeSet<String>)> {
    fn walk(
        root: &Value,
        s: &Value,
        path: &str,
        out: &mut BTreeMap<String, (BTreeSet<String>, BTreeSet<String>)>,
    ) {
        if let Some(r) = s.get("$ref").and_then(Value::as_str) {
            let name = r.trim_start_matches("#/$defs/");
            return walk(root, &root["$defs"][name], path, out);
        }
        for key in ["anyOf", "oneOf", "allOf"] {
            for alt in s.get(key).and_then(Value::as_array).into_iter().flatten() {
                walk(root, alt, path, out);
            }
        }
        if let Some(items) = s.get("items") {
            walk(root, items, &format!("{path}[]"), out);
        }
        if let Some(props) = s.get("properties").and_then(Value::as_object) {
            let required = s["required"]
                .as_array()
                .into_iter()
                .flatten()
                .filter_map(|v| v.as_str().map(str::to_string))
                .collect();
            out.insert(
                path.to_string(),
                (props.keys().cloned().collect(), required),
            );
            for (name, p) in props {
                walk(root, p, &format!("{path}.{name}"), out);
            }
        }
    }
    let mut out = BTreeMap::new();
    walk(schema, schema, "", &mut out);
    out
}

#[test]
fn the_plan_schema_has_exactly_the_fields_of_the_plan_type() {
    assert_eq!(
        shape(&json("docs/plan.schema.json")),
        shape(&Plan::schema())
    );
}

#[test]
fn plan_examples_validate_and_what_the_schema_forbids_is_refused() {
    let schema = json("docs/plan.schema.json");
    for path in [
        "docs/examples/footbridge-plaza.json",
        "docs/examples/shop-entrance.json",
        "demo-site/demo/plan.json",
    ] {
        validate(&schema, &json(path), path);
        Plan::from_json(&read(path)).unwrap_or_else(|e| panic!("{path}: {e}"));
    }
    let forbidden = [
        r#"{"screenlines": []}"#,
        r#"{"frame_rate": 0}"#,
        r#"{"frame_rate": 1001}"#,
        r#"{"frame_rate": 25, "interval_minutes": 1441}"#,
        r#"{"frame_rate": 25, "rules": {"hysteresis": 2.5}}"#,
        r#"{"frame_rate": 25, "rules": {"join_seconds": 61}}"#,
        r#"{"frame_rate": 25, "rules": {"join_box_heights": -1}}"#,
        r#"{"frame_rate": 25, "anchor": "top"}"#,
        r#"{"frame_rate": 25, "start": "7 in the morning"}"#,
        r#"{"frame_rate": 25, "screenlines": [{"name": "a", "points": [[1, 2]]}]}"#,
        r#"{"frame_rate": 25, "zones": [{"name": "z", "polygon": [[1, 2], [3, 4]]}]}"#,
        r#"{"frame_rate": 25, "colour": "red"}"#,
    ];
    let validator = jsonschema::validator_for(&schema).unwrap();
    for text in forbidden {
        let value: Value = serde_json::from_str(text).unwrap();
        assert!(!validator.is_valid(&value), "the schema accepts {text}");
        assert!(Plan::from_json(text).is_err(), "the checks accept {text}");
    }
}

/// A plan's misspelt field is named with the nearest field of the plan's layout (a newcomer's
/// trial); nothing near, no guess.
#[test]
fn a_misspelt_plan_field_is_named_with_the_nearest_known_one() {
    let plan = r#"{"frame_rate": 25, "screenlines": [{"name": "a", "points": [[0, 0], [9, 9]], "foward": "in"}]}"#;
    let e = Plan::from_json(plan).unwrap_err().to_string();
    assert!(e.contains("unknown field `foward`"), "{e}");
    assert!(e.contains("(did you mean `forward`?)"), "{e}");
    let e = Plan::from_json(r#"{"frame_rate": 25, "colour": 1}"#)
        .unwrap_err()
        .to_string();
    assert!(!e.contains("did you mean"), "{e}");
}
