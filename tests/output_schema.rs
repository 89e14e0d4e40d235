//! Every JSON document railcheck prints is valid against the published JSON
//! Schema `docs/report.schema.json` (JSON Schema draft 2020-12), checked with
//! a general-purpose validator: findings of both examples and of every rule
//! fixture, the budgets and wire lists of the examples, and input errors of broken plans,
//! including those with no place in a file.
//!
//! The published schema lets readers meet keys added later in format
//! version 1. The checks here close it (no key the schema does not
//! describe), so a key added to the output without its documentation fails.

use assert_cmd::Command;
use serde_json::{Value, json};
use std::path::{Path, PathBuf};

const EXAMPLES: [&str; 3] = [
    "examples/first-draft.yaml",
    "examples/orchard-rover.yaml",
    "examples/greenhouse-picker.yaml",
];

fn manifest_dir() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

fn published_schema() -> Value {
    let text = std::fs::read_to_string(manifest_dir().join("docs/report.schema.json"))
        .expect("docs/report.schema.json exists");
    serde_json::from_str(&text).expect("the schema is JSON")
}

/// Adds `unevaluatedProperties: false` to every object schema that lists
/// its properties, except the envelope, which the documents extend.
fn closed(schema: &mut Value, name: Option<&str>) {
    match schema {
        Value::Object(map) => {
            let extended = name == Some("envelope");
            if map.contains_key("properties")
                && !map.contains_key("additionalProperties")
                && !extended
            {
                map.insert("unevaluatedProperties".into(), Value::Bool(false));
            }
            for (key, child) in map.iter_mut() {
                closed(child, Some(key));
            }
        }
        Value::Array(items) => items.iter_mut().for_each(|item| closed(item, None)),
        _ => {}
    }
}

fn validator(schema: &Value) -> jsonschema::Validator {
    jsonschema::validator_for(schema).expect("the schema compiles")
}

fn strict_validator() -> jsonschema::Validator {
    let mut schema = published_schema();
    closed(&mut schema, None);
    validator(&schema)
}

fn assert_valid(validator: &jsonschema::Validator, document: &Value, what: &str) {
    let errors: Vec<String> = validator
        .iter_errors(document)
        .map(|e| format!("{} at {}", e, e.instance_path()))
        .collect();
    assert!(
        errors.is_empty(),
        "{what}: not valid against docs/report.schema.json:\n{}\n{document:#}",
        errors.join("\n")
    );
}

/// Runs railcheck in the repository folder; returns stdout as JSON and the
/// exit code.
fn run(args: &[&str]) -> (Value, i32) {
    let output = Command::cargo_bin("railcheck")
        .expect("the railcheck binary is built")
        .current_dir(manifest_dir())
        .env("NO_COLOR", "1")
        .args(args)
        .output()
        .expect("railcheck runs");
    let document = serde_json::from_slice(&output.stdout).unwrap_or_else(|e| {
        panic!(
            "`railcheck {}` printed no single JSON document ({e}):\n{}",
            args.join(" "),
            String::from_utf8_lossy(&output.stdout)
        )
    });
    (document, output.status.code().expect("an exit code"))
}

/// Findings and units describe the same keys: every value states its unit.
fn assert_every_value_has_a_unit(document: &Value, what: &str) {
    for finding in document["findings"].as_array().into_iter().flatten() {
        let keys = |name: &str| -> Vec<String> {
            finding[name]
                .as_object()
                .map(|m| m.keys().cloned().collect())
                .unwrap_or_default()
        };
        assert_eq!(keys("values"), keys("units"), "{what}: {finding:#}");
    }
}

fn fixture_files() -> Vec<PathBuf> {
    let mut files = Vec::new();
    for folder in std::fs::read_dir(manifest_dir().join("tests/fixtures")).expect("fixtures") {
        let folder = folder.expect("a fixture folder").path();
        for file in std::fs::read_dir(&folder).expect("fixture files") {
            let file = file.expect("a fixture file").path();
            if file.extension().is_some_and(|e| e == "yaml") {
                files.push(file);
            }
        }
    }
    files.sort();
    files
}

#[test]
fn the_schema_is_a_valid_draft_2020_12_schema() {
    let schema = published_schema();
    assert_eq!(
        schema["$schema"],
        "https://json-schema.org/draft/2020-12/schema"
    );
    if let Err(error) = jsonschema::meta::validate(&schema) {
        panic!("docs/report.schema.json against its meta-schema: {error}");
    }
}

#[test]
fn the_examples_check_and_budget_documents_are_valid() {
    let strict = strict_validator();
    for example in EXAMPLES {
        let (findings, code) = run(&["check", "--format", "json", example]);
        assert!(code == 0 || code == 1, "{example}: exit {code}");
        assert_eq!(findings["kind"], "findings");
        assert_valid(&strict, &findings, example);
        assert_every_value_has_a_unit(&findings, example);

        let (budget, code) = run(&["budget", "--format", "json", example]);
        assert_eq!(code, 0, "{example}: the budget solves");
        assert_eq!(budget["kind"], "budget");
        assert!(!budget["rails"].as_array().expect("rails").is_empty());
        assert_valid(&strict, &budget, &format!("budget of {example}"));

        let (wires, code) = run(&["wires", "--format", "json", example]);
        assert_eq!(code, 0, "{example}: the wire list is written");
        assert_eq!(wires["kind"], "wires");
        assert!(!wires["runs"].as_array().expect("runs").is_empty());
        assert_valid(&strict, &wires, &format!("wire list of {example}"));

        let (bringup, code) = run(&["bringup", "--format", "json", example]);
        assert_eq!(code, 0, "{example}: the procedure is written");
        assert_eq!(bringup["kind"], "bringup");
        assert_valid(&strict, &bringup, &format!("bring-up of {example}"));

        let (scenarios, code) = run(&["scenarios", "--format", "json", example]);
        assert_eq!(code, 0, "{example}: the scenarios are listed");
        assert_eq!(scenarios["kind"], "scenarios");
        assert_valid(&strict, &scenarios, &format!("scenarios of {example}"));
    }
}

#[test]
fn a_sweep_document_is_valid() {
    let strict = strict_validator();
    let (sweep, code) = run(&[
        "sweep",
        "examples/orchard-rover.yaml",
        "--format",
        "json",
        "--vary",
        "buck.current=2 A,5 A",
        "--vary",
        "pack=battery/lipo-3s,battery/lipo-4s",
    ]);
    assert_eq!(code, 0, "the shipped rover passes");
    assert_eq!(sweep["kind"], "sweep");
    assert_eq!(sweep["rows"].as_array().expect("rows").len(), 4);
    assert_valid(&strict, &sweep, "sweep of the rover");
}

/// `--format json-lines` writes a header line, one row per combination as it
/// finishes, in combination order, and an end line: each is valid against
/// its own definition.
#[test]
fn sweep_json_lines_are_valid_line_by_line() {
    let output = Command::cargo_bin("railcheck")
        .expect("the railcheck binary is built")
        .current_dir(manifest_dir())
        .args([
            "sweep",
            "examples/orchard-rover.yaml",
            "--format",
            "json-lines",
            "--vary",
            "buck.current=2 A,5 A",
            "--vary",
            "pack=battery/lipo-3s,battery/lipo-4s",
        ])
        .output()
        .expect("railcheck runs");
    assert_eq!(output.status.code(), Some(0), "{output:?}");
    let text = String::from_utf8(output.stdout).expect("UTF-8");
    let lines: Vec<Value> = text
        .lines()
        .map(|line| serde_json::from_str(line).expect("each line is one JSON value"))
        .collect();
    // A header, four rows (2 × 2 combinations) and an end line.
    assert_eq!(lines.len(), 6, "{text}");
    let mut schema = published_schema();
    closed(&mut schema, None);
    let against = |definition: &str| {
        let mut one = schema.clone();
        let map = one.as_object_mut().expect("the schema is an object");
        map.remove("oneOf");
        map.insert(
            "$ref".into(),
            Value::String(format!("#/$defs/{definition}")),
        );
        validator(&one)
    };
    assert_valid(&against("sweepLinesHeader"), &lines[0], "json-lines header");
    let row = against("sweepRow");
    for (i, line) in lines[1..5].iter().enumerate() {
        assert_valid(&row, line, &format!("json-lines row {}", i + 1));
        // In combination order as they finish.
        assert_eq!(line["combination"], i + 1);
    }
    assert_valid(&against("sweepLinesEnd"), &lines[5], "json-lines end");
    assert_eq!(lines[5]["checked"], 4);
}

#[test]
fn every_fixture_checks_into_a_valid_document() {
    let strict = strict_validator();
    let files = fixture_files();
    assert!(
        files.len() > 50,
        "the rule fixtures are found: {}",
        files.len()
    );
    let mut with_values = 0;
    for file in files {
        let name = file.display().to_string();
        let (document, code) = run(&["check", "--format", "json", &name]);
        assert!((0..=2).contains(&code), "{name}: exit {code}");
        assert_valid(&strict, &document, &name);
        assert_every_value_has_a_unit(&document, &name);
        with_values += document["findings"]
            .as_array()
            .into_iter()
            .flatten()
            .filter(|f| f["values"].as_object().is_some_and(|v| !v.is_empty()))
            .count();
    }
    assert!(with_values > 0, "some fixture findings carry values");
}

#[test]
fn input_errors_are_valid_documents_with_or_without_a_place() {
    let strict = strict_validator();
    let folder = tempfile::tempdir().expect("a temporary folder");
    let write = |name: &str, text: &str| {
        let path = folder.path().join(name);
        std::fs::write(&path, text).expect("the plan is written");
        path.display().to_string()
    };
    let broken_yaml = write("broken.yaml", "railcheck: 1\nparts: [unclosed\n");
    let unknown_part = write(
        "unknown.yaml",
        "railcheck: 1\nname: lab bench\nparts:\n  pack: { use: battery/no-such-pack }\nnets: {}\n",
    );
    let unitless = write(
        "unitless.yaml",
        "railcheck: 1\nname: greenhouse fan\nparts:\n  pack: { use: battery/lipo-3s, capacity: 5 }\nnets: {}\n",
    );
    let missing = folder.path().join("absent.yaml").display().to_string();
    let rover = manifest_dir().join(EXAMPLES[1]).display().to_string();
    let no_parts = folder.path().join("no-parts-here").display().to_string();
    let unwritable = folder
        .path()
        .join("no-folder/plan.svg")
        .display()
        .to_string();

    let runs: Vec<(Vec<&str>, bool)> = vec![
        (vec!["check", "--format", "json", &broken_yaml], true),
        (vec!["check", "--format", "json", &unknown_part], true),
        (vec!["check", "--format", "json", &unitless], true),
        (vec!["budget", "--format", "json", &unknown_part], true),
        (vec!["wires", "--format", "json", &unknown_part], true),
        (vec!["bringup", "--format", "json", &unknown_part], true),
        (vec!["scenarios", "--format", "json", &unknown_part], true),
        (vec!["check", "--format", "json", &missing], false),
        (vec!["budget", "--format", "json", &missing], false),
        (
            vec!["check", "--format", "json", "--parts", &no_parts, &rover],
            false,
        ),
        (
            vec![
                "check",
                "--format",
                "json",
                "--diagram",
                &unwritable,
                &rover,
            ],
            false,
        ),
    ];
    for (args, placed) in runs {
        let what = args.join(" ");
        let (document, code) = run(&args);
        assert_eq!(code, 2, "{what}");
        assert_eq!(document["kind"], "input-errors", "{what}");
        assert_valid(&strict, &document, &what);
        let first = &document["error"];
        assert_eq!(first, &document["errors"][0], "{what}");
        assert_eq!(first["line"].is_u64(), placed, "{what}: {document:#}");
        assert_eq!(first["column"].is_u64(), placed, "{what}: {document:#}");
    }
}

#[test]
fn finding_units_in_the_schema_are_the_librarys() {
    let schema = published_schema();
    let listed: Vec<&str> = schema["$defs"]["findingUnit"]["enum"]
        .as_array()
        .expect("findingUnit lists its units")
        .iter()
        .map(|u| u.as_str().expect("a unit symbol"))
        .collect();
    let library: Vec<&str> = railcheck::rules::Unit::ALL
        .iter()
        .map(|u| u.symbol())
        .collect();
    assert_eq!(listed, library);
}

/// A valid findings document to break in the negative tests.
fn a_findings_document() -> Value {
    let (document, _) = run(&["check", "--format", "json", EXAMPLES[0]]);
    document
}

#[test]
fn documents_without_a_format_version_or_with_a_wrong_type_are_rejected() {
    let published = validator(&published_schema());
    let strict = strict_validator();
    let good = a_findings_document();
    assert!(published.is_valid(&good) && strict.is_valid(&good));

    let mut missing = good.clone();
    missing
        .as_object_mut()
        .expect("an object")
        .remove("format_version");
    let mut as_text = good.clone();
    as_text["format_version"] = json!("1");
    let mut fractional = good.clone();
    fractional["format_version"] = json!(1.5);
    let mut future = good.clone();
    future["format_version"] = json!(2);
    let mut unknown_kind = good.clone();
    unknown_kind["kind"] = json!("verdict");
    let mut line_as_text = good.clone();
    line_as_text["findings"][0]["line"] = json!("17");
    let mut unknown_unit = good.clone();
    unknown_unit["findings"][1]["units"]["rating"] = json!("amps");
    let mut no_summary = good.clone();
    no_summary
        .as_object_mut()
        .expect("an object")
        .remove("summary");

    for (what, document) in [
        ("no format_version", missing),
        ("format_version as text", as_text),
        ("fractional format_version", fractional),
        ("format_version 2", future),
        ("unknown kind", unknown_kind),
        ("line as text", line_as_text),
        ("unknown unit", unknown_unit),
        ("no summary", no_summary),
    ] {
        assert!(!published.is_valid(&document), "{what} is accepted");
        assert!(!strict.is_valid(&document), "{what} is accepted (closed)");
    }
}

#[test]
fn an_undocumented_key_passes_the_published_schema_but_not_the_closed_one() {
    // Readers of format version 1 must tolerate added keys; the tests must
    // not, so every key that reaches the output is documented.
    let mut document = a_findings_document();
    document["findings"][0]["undocumented"] = json!(true);
    assert!(validator(&published_schema()).is_valid(&document));
    assert!(!strict_validator().is_valid(&document));
}
