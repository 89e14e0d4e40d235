//! `check --format sarif` against the SARIF 2.1.0 standard: every log of the
//! examples, of every rule fixture and of broken plans is valid against the
//! OASIS SARIF 2.1.0 JSON Schema (vendored in `tests/sarif/`, source named
//! in its README), and it says what the JSON report says: the same findings
//! at the same places, with the rule catalogue as the driver's rules.

use assert_cmd::Command;
use serde_json::{Value, json};
use std::path::{Path, PathBuf};

const EXAMPLES: [&str; 2] = ["examples/first-draft.yaml", "examples/orchard-rover.yaml"];

fn manifest_dir() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// The `language` pattern (of `run` and of `toolComponent`) as the OASIS
/// file writes it: the `]` after `{2}` stands outside any class, a literal
/// `]` under ECMA-262 Annex B, which the validator's strict regex check
/// refuses.
const LANGUAGE_PATTERN: &str = "^[a-zA-Z]{2}|^[a-zA-Z]{2}-[a-zA-Z]{2}]?$";
/// The same pattern with that `]` escaped: it matches exactly what the
/// original matches.
const LANGUAGE_PATTERN_ESCAPED: &str = r"^[a-zA-Z]{2}|^[a-zA-Z]{2}-[a-zA-Z]{2}\]?$";

/// Escapes every `language` pattern; returns how many it found.
fn escape_language_patterns(schema: &mut Value) -> usize {
    match schema {
        Value::Object(map) => {
            let mut found = 0;
            for (key, child) in map.iter_mut() {
                if key == "pattern" && child == LANGUAGE_PATTERN {
                    *child = json!(LANGUAGE_PATTERN_ESCAPED);
                    found += 1;
                } else {
                    found += escape_language_patterns(child);
                }
            }
            found
        }
        Value::Array(items) => items.iter_mut().map(escape_language_patterns).sum(),
        _ => 0,
    }
}

fn sarif_validator() -> jsonschema::Validator {
    let text = std::fs::read_to_string(manifest_dir().join("tests/sarif/sarif-schema-2.1.0.json"))
        .expect("the vendored SARIF schema");
    let mut schema: Value = serde_json::from_str(&text).expect("the SARIF schema is JSON");
    assert_eq!(
        escape_language_patterns(&mut schema),
        2,
        "the vendored schema is the OASIS file"
    );
    // Formats are asserted too: `artifactLocation.uri` is a `uri-reference`.
    jsonschema::options()
        .should_validate_formats(true)
        .build(&schema)
        .expect("the SARIF schema compiles")
}

fn assert_valid(validator: &jsonschema::Validator, log: &Value, what: &str) {
    let errors: Vec<String> = validator
        .iter_errors(log)
        .map(|e| format!("{} at {}", e, e.instance_path()))
        .collect();
    assert!(
        errors.is_empty(),
        "{what}: not valid SARIF 2.1.0:\n{}",
        errors.join("\n")
    );
}

fn railcheck(args: &[&str]) -> std::process::Output {
    Command::cargo_bin("railcheck")
        .expect("the railcheck binary is built")
        .current_dir(manifest_dir())
        .env("NO_COLOR", "1")
        .args(args)
        .output()
        .expect("railcheck runs")
}

fn run(args: &[&str]) -> (Value, i32) {
    let output = railcheck(args);
    let document = serde_json::from_slice(&output.stdout).unwrap_or_else(|e| {
        panic!(
            "`railcheck {}` printed no single JSON document ({e}):\n{}",
            args.join(" "),
            String::from_utf8_lossy(&output.stdout)
        )
    });
    (document, output.status.code().expect("an exit code"))
}

fn fixture_files() -> Vec<PathBuf> {
    let mut files = Vec::new();
    for folder in std::fs::read_dir(manifest_dir().join("tests/fixtures")).expect("fixtures") {
        for file in std::fs::read_dir(folder.expect("a folder").path()).expect("fixture files") {
            let file = file.expect("a fixture file").path();
            if file.extension().is_some_and(|e| e == "yaml") {
                files.push(file);
            }
        }
    }
    files.sort();
    files
}

/// The SARIF log and the JSON report of one plan tell the same findings:
/// same rule, level (SARIF 2.1.0 §3.27.10 `level` values error, warning,
/// note), file, line and column, in the same order.
fn assert_agrees_with_json(plan: &str, log: &Value) {
    let (report, _) = run(&["check", "--format", "json", plan]);
    let run = &log["runs"][0];
    let rules = run["tool"]["driver"]["rules"].as_array().expect("rules");
    let results = run["results"].as_array().expect("results");
    let findings = report["findings"].as_array().expect("findings");
    assert_eq!(results.len(), findings.len(), "{plan}");
    for (result, finding) in results.iter().zip(findings) {
        assert_eq!(result["ruleId"], finding["rule"], "{plan}");
        let index = result["ruleIndex"].as_u64().expect("ruleIndex") as usize;
        assert_eq!(rules[index]["id"], finding["rule"], "{plan}");
        assert_eq!(result["level"], finding["severity"], "{plan}");
        let location = &result["locations"][0]["physicalLocation"];
        assert_eq!(location["artifactLocation"]["uri"], report["file"]);
        let region = &location["region"];
        assert_eq!(region["startLine"], finding["line"], "{plan}");
        assert_eq!(region["startColumn"], finding["column"], "{plan}");
        if let Some(end_line) = region["endLine"].as_u64() {
            let start = (region["startLine"].as_u64(), region["startColumn"].as_u64());
            let end = (Some(end_line), region["endColumn"].as_u64());
            assert!(end > start, "{plan}: the region ends after it starts");
        }
        let message = result["message"]["text"].as_str().expect("a message");
        assert!(message.starts_with(finding["message"].as_str().expect("text")));
        assert_eq!(result["properties"]["values"], finding["values"], "{plan}");
        assert_eq!(result["properties"]["units"], finding["units"], "{plan}");
    }
}

#[test]
fn the_examples_are_valid_sarif_that_agrees_with_the_json_report() {
    let validator = sarif_validator();
    for example in EXAMPLES {
        let (log, code) = run(&["check", "--format", "sarif", example]);
        let (_, json_code) = run(&["check", "--format", "json", example]);
        assert_eq!(
            code, json_code,
            "{example}: the format does not change the exit code"
        );
        assert_valid(&validator, &log, example);
        assert_eq!(log["version"], "2.1.0");
        assert_eq!(
            log["runs"][0]["invocations"][0]["executionSuccessful"],
            true
        );
        assert_agrees_with_json(example, &log);
        let (report, _) = run(&["check", "--format", "json", example]);
        assert_eq!(
            log["runs"][0]["properties"]["cautions"], report["cautions"],
            "{example}: the safety cautions stay in the report"
        );
    }
    // The first draft has findings of every severity the SARIF levels map.
    let (log, _) = run(&["check", "--format", "sarif", EXAMPLES[0]]);
    let levels: Vec<&str> = log["runs"][0]["results"]
        .as_array()
        .expect("results")
        .iter()
        .filter_map(|r| r["level"].as_str())
        .collect();
    assert!(levels.contains(&"error") && levels.contains(&"warning"));
}

#[test]
fn the_driver_describes_every_rule_from_its_own_documentation() {
    let (log, _) = run(&["check", "--format", "sarif", EXAMPLES[1]]);
    let driver = &log["runs"][0]["tool"]["driver"];
    assert_eq!(driver["name"], "railcheck");
    let described = driver["rules"].as_array().expect("rules");
    assert_eq!(described.len(), railcheck::rules::RULES.len());
    for (descriptor, rule) in described.iter().zip(railcheck::rules::RULES) {
        assert_eq!(descriptor["id"], rule.id);
        assert_eq!(descriptor["shortDescription"]["text"], rule.summary);
        let full = descriptor["fullDescription"]["text"]
            .as_str()
            .expect("text");
        assert!(full.contains(rule.doc.what) && full.contains(rule.doc.why));
        let help = descriptor["help"]["text"].as_str().expect("help");
        assert!(help.contains(rule.doc.fix), "{}", rule.id);
        assert_eq!(
            descriptor["defaultConfiguration"]["level"],
            rule.severity.name()
        );
    }
}

#[test]
fn every_fixture_gives_a_valid_log() {
    let validator = sarif_validator();
    let files = fixture_files();
    assert!(files.len() > 50, "the rule fixtures are found");
    let mut results = 0;
    for file in files {
        let name = file.display().to_string();
        let (log, code) = run(&["check", "--format", "sarif", &name]);
        assert!((0..=2).contains(&code), "{name}: exit {code}");
        assert_valid(&validator, &log, &name);
        results += log["runs"][0]["results"].as_array().map_or(0, Vec::len);
    }
    assert!(
        results > 50,
        "the fixtures' findings are results: {results}"
    );
}

#[test]
fn input_errors_are_notifications_of_a_run_that_did_not_succeed() {
    let validator = sarif_validator();
    let folder = tempfile::tempdir().expect("a temporary folder");
    let broken = folder.path().join("broken.yaml");
    std::fs::write(
        &broken,
        "railcheck: 1\nname: lab bench\nparts:\n  pack: { use: battery/no-such-pack }\nnets: {}\n",
    )
    .expect("the plan is written");
    let broken = broken.display().to_string();
    let missing = folder.path().join("absent.yaml").display().to_string();

    for (plan, placed) in [(&broken, true), (&missing, false)] {
        let (log, code) = run(&["check", "--format", "sarif", plan]);
        assert_eq!(code, 2, "{plan}");
        assert_valid(&validator, &log, plan);
        let run = &log["runs"][0];
        let invocation = &run["invocations"][0];
        assert_eq!(invocation["executionSuccessful"], false);
        let notifications = invocation["toolExecutionNotifications"]
            .as_array()
            .expect("notifications");
        assert!(!notifications.is_empty());
        for notification in notifications {
            assert_eq!(notification["level"], "error");
            let location = &notification["locations"][0]["physicalLocation"];
            assert!(location["artifactLocation"]["uri"].is_string());
            assert_eq!(location["region"]["startLine"].is_u64(), placed, "{plan}");
        }
        assert!(run.get("results").is_none(), "no results when nothing ran");
    }
}

#[test]
fn the_schema_rejects_a_log_that_breaks_it() {
    // The validation above can fail: a level outside SARIF's four, or a log
    // without its version, is refused.
    let validator = sarif_validator();
    let (good, _) = run(&["check", "--format", "sarif", EXAMPLES[0]]);
    assert!(validator.is_valid(&good));
    let mut bad_level = good.clone();
    bad_level["runs"][0]["results"][0]["level"] = json!("fatal");
    assert!(!validator.is_valid(&bad_level));
    let mut no_version = good.clone();
    no_version.as_object_mut().expect("a log").remove("version");
    assert!(!validator.is_valid(&no_version));
    let mut line_zero = good.clone();
    line_zero["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["region"]["startLine"] =
        json!(0);
    assert!(!validator.is_valid(&line_zero));
    let mut spaced_uri = good;
    spaced_uri["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["artifactLocation"]["uri"] =
        json!("my plans/rover v2.yaml");
    assert!(
        !validator.is_valid(&spaced_uri),
        "a space is no URI character"
    );
}

#[test]
fn a_plan_path_with_spaces_becomes_a_percent_encoded_uri() {
    // RFC 3986 §2.1: a space in a URI reference is written `%20`.
    let validator = sarif_validator();
    let folder = tempfile::tempdir().expect("a temporary folder");
    let plans = folder.path().join("my plans");
    std::fs::create_dir(&plans).expect("a folder with a space");
    std::fs::copy(
        manifest_dir().join(EXAMPLES[0]),
        plans.join("rover v2.yaml"),
    )
    .expect("the plan is copied");
    let output = Command::cargo_bin("railcheck")
        .expect("the railcheck binary is built")
        .current_dir(folder.path())
        .args(["check", "--format", "sarif", "my plans/rover v2.yaml"])
        .output()
        .expect("railcheck runs");
    let log: Value = serde_json::from_slice(&output.stdout).expect("a SARIF log");
    assert_valid(&validator, &log, "a plan path with spaces");
    let uri = &log["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["artifactLocation"]
        ["uri"];
    assert_eq!(uri, "my%20plans/rover%20v2.yaml");
}

#[test]
fn budget_has_no_sarif_form() {
    let output = railcheck(&["budget", "--format", "sarif", EXAMPLES[1]]);
    assert_eq!(output.status.code(), Some(2), "a usage error");
    assert!(output.stdout.is_empty());
    let stderr = String::from_utf8_lossy(&output.stderr);
    assert!(stderr.contains("SARIF"), "{stderr}");
}
