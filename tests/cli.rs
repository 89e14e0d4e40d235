//! The `railcheck` command seen from outside: exit codes, the JSON and
//! terminal reports of the format reference (§7 rules, §8 outputs), and the two
//! example plans, a clean rover and its first draft full of classic mistakes.
//!
//! Not for the rules' own logic case by case: the rule fixtures cover that.
//! Here every expectation comes from the format reference or from a value worked out
//! by hand from published figures, named beside the check.

#[path = "common/command.rs"]
mod command;

use command::railcheck;
use predicates::prelude::*;
use serde_json::Value;
use std::collections::BTreeSet;
use std::path::{Path, PathBuf};

const ROVER: &str = "examples/orchard-rover.yaml";
const DRAFT: &str = "examples/first-draft.yaml";

/// The user modes of the first draft; `typical` and `worst` always exist
/// (format reference §6).
const DRAFT_MODES: [&str; 3] = ["parked", "cruise", "climb"];

/// Every rule id of format reference §7 with the severities it may carry.
const CONTRACT_RULES: &[(&str, &[&str])] = &[
    ("power/short", &["error"]),
    ("power/conflict", &["error"]),
    ("power/unfed", &["error"]),
    ("power/loop", &["error"]),
    ("voltage/over-max", &["error"]),
    ("voltage/over-range", &["warning"]),
    // "error at `nominal`, warning at `empty` only"
    ("voltage/under-range", &["error", "warning"]),
    ("regulator/dropout", &["warning"]),
    ("current/over-rating", &["error"]),
    ("current/derating", &["warning"]),
    ("driver/stall", &["error"]),
    ("thermal/overheat", &["error"]),
    ("thermal/unrated", &["note"]),
    ("battery/discharge", &["error"]),
    ("battery/no-cutoff", &["warning"]),
    ("ground/floating", &["error"]),
    ("ground/not-shared", &["error"]),
    ("logic/overvoltage", &["error"]),
    ("logic/high-margin", &["error"]),
    ("logic/low-margin", &["error"]),
    ("logic/contention", &["error"]),
    ("logic/undriven", &["warning"]),
    ("logic/unpowered-input", &["error"]),
    ("fuse/missing", &["error"]),
    ("fuse/undersized", &["warning"]),
    ("fuse/oversized", &["error"]),
    ("fuse/voltage", &["error"]),
    ("fuse/nuisance", &["warning"]),
    ("switch/voltage", &["error"]),
    ("fault/short-circuit", &["error", "warning"]),
    ("fault/fuse-distance", &["warning"]),
    ("fault/inrush", &["warning"]),
    ("fault/regeneration", &["warning"]),
    ("wire/ampacity", &["error"]),
    ("wire/drop", &["warning"]),
    ("safety/no-stop", &["warning"]),
    ("scenario/back-feed", &["error"]),
    ("scenario/phantom-power", &["error", "warning"]),
    ("ground/offset", &["warning"]),
    ("analysis/no-convergence", &["error"]),
];

/// Rules decided on the graph alone (format reference §7: "Shorts and loops are found
/// on the graph before the operating point is solved"; conflicts, unfed rails
/// and ground topology likewise depend on no current): their findings carry
/// no `mode` or `battery` (format reference §8).
const GRAPH_RULES: &[&str] = &[
    "power/short",
    "power/conflict",
    "power/unfed",
    "power/loop",
    "ground/floating",
    "ground/not-shared",
];

/// Rules that judge a solved operating point: their findings name the mode
/// and battery state where the limit is broken (format reference §6 and §8).
const OPERATING_POINT_RULES: &[&str] = &[
    "voltage/over-max",
    "voltage/over-range",
    "voltage/under-range",
    "regulator/dropout",
    "current/over-rating",
    "current/derating",
    "driver/stall",
    "analysis/no-convergence",
];

// ----- helpers ---------------------------------------------------------------

fn manifest_dir() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// Runs `railcheck check --format json FILE`, returning the parsed document
/// and the exit code.
fn check_json(file: &Path) -> (Value, i32) {
    let output = railcheck()
        .args(["check", "--format", "json"])
        .arg(file)
        .output()
        .expect("railcheck runs");
    let document: Value = serde_json::from_slice(&output.stdout).unwrap_or_else(|e| {
        panic!(
            "stdout of {} is not JSON ({e}):\n{}",
            file.display(),
            String::from_utf8_lossy(&output.stdout)
        )
    });
    (document, output.status.code().expect("exit code"))
}

fn findings(document: &Value) -> &Vec<Value> {
    document["findings"]
        .as_array()
        .expect("`findings` is an array")
}

fn rule_of(finding: &Value) -> &str {
    finding["rule"].as_str().expect("`rule` is a string")
}

fn line_of(finding: &Value) -> u64 {
    finding["line"].as_u64().expect("`line` is a whole number")
}

fn value_of(finding: &Value, key: &str) -> f64 {
    finding["values"][key]
        .as_f64()
        .unwrap_or_else(|| panic!("finding has no number `values.{key}`: {finding}"))
}

/// The one finding of `rule` in a document.
fn only<'a>(document: &'a Value, rule: &str) -> &'a Value {
    let hits: Vec<&Value> = findings(document)
        .iter()
        .filter(|f| rule_of(f) == rule)
        .collect();
    assert_eq!(hits.len(), 1, "expected one {rule} finding, got {hits:?}");
    hits[0]
}

/// `(line, rule)` for every `# mistake: rule[ + rule] — why` comment of a
/// plan, lines counted from 1.
fn mistakes(text: &str) -> Vec<(u64, String)> {
    let mut out = Vec::new();
    for (index, line) in text.lines().enumerate() {
        let Some((_, comment)) = line.split_once("# mistake:") else {
            continue;
        };
        let rules = comment.split('—').next().unwrap_or_default();
        for rule in rules.split('+') {
            out.push((index as u64 + 1, rule.trim().to_string()));
        }
    }
    out
}

/// Writes a plan into a fresh temporary folder.
fn plan_file(name: &str, text: &str) -> (tempfile::TempDir, PathBuf) {
    let dir = tempfile::tempdir().expect("a temporary folder");
    let path = dir.path().join(name);
    std::fs::write(&path, text).expect("the plan is written");
    (dir, path)
}

/// Every structural promise of format reference §8 for a findings document.
fn assert_findings_document(document: &Value, file: &str, user_modes: &[&str]) {
    let top: BTreeSet<&str> = document
        .as_object()
        .expect("a JSON object")
        .keys()
        .map(String::as_str)
        .collect();
    // Format reference §8's three keys, plus the safety cautions and the versioned
    // envelope (`format_version`, `kind`) railcheck adds.
    assert_eq!(
        top,
        BTreeSet::from([
            "format_version",
            "kind",
            "file",
            "summary",
            "findings",
            "cautions"
        ])
    );
    assert_eq!(document["format_version"], 1);
    assert_eq!(document["kind"], "findings");
    assert_eq!(document["file"], file);
    let cautions = document["cautions"].as_array().expect("`cautions` list");
    assert!(
        cautions
            .iter()
            .any(|c| c.as_str().is_some_and(|c| c.contains("qualified practice"))),
        "{cautions:?}"
    );

    let summary = document["summary"].as_object().expect("`summary` object");
    let summary_keys: BTreeSet<&str> = summary.keys().map(String::as_str).collect();
    assert_eq!(
        summary_keys,
        BTreeSet::from(["errors", "warnings", "notes"])
    );

    let mut counted = [0u64; 3];
    for finding in findings(document) {
        let rule = rule_of(finding);
        let severity = finding["severity"].as_str().expect("`severity` string");
        let allowed = CONTRACT_RULES
            .iter()
            .find(|(id, _)| *id == rule)
            .unwrap_or_else(|| panic!("`{rule}` is not a rule id of format reference §7"))
            .1;
        assert!(
            allowed.contains(&severity),
            "`{rule}` reported as {severity}; format reference §7 allows {allowed:?}"
        );
        match severity {
            "error" => counted[0] += 1,
            "warning" => counted[1] += 1,
            "note" => counted[2] += 1,
            other => panic!("severity `{other}` is not error, warning or note"),
        }
        assert!(
            finding["message"]
                .as_str()
                .is_some_and(|m| !m.trim().is_empty()),
            "`message` is a non-empty string: {finding}"
        );
        assert!(line_of(finding) >= 1, "lines count from 1: {finding}");
        assert!(
            finding["column"].as_u64().is_some_and(|c| c >= 1),
            "columns count from 1: {finding}"
        );
        for list in ["parts", "nets"] {
            let items = finding[list]
                .as_array()
                .unwrap_or_else(|| panic!("`{list}` is an array: {finding}"));
            assert!(items.iter().all(Value::is_string), "`{list}` holds names");
        }
        let values = finding["values"].as_object().expect("`values` object");
        assert!(
            values.values().all(Value::is_number),
            "quantities in `values` are plain numbers: {finding}"
        );

        let has_mode = finding.get("mode").is_some();
        let has_battery = finding.get("battery").is_some();
        if GRAPH_RULES.contains(&rule) {
            assert!(
                !has_mode && !has_battery,
                "`{rule}` does not depend on mode or battery, so neither is given: {finding}"
            );
        }
        if OPERATING_POINT_RULES.contains(&rule) {
            let mode = finding["mode"].as_str().expect("`mode` string");
            assert!(
                mode == "typical" || mode == "worst" || user_modes.contains(&mode),
                "mode `{mode}` is neither built in nor the plan's"
            );
            let battery = finding["battery"].as_str().expect("`battery` string");
            assert!(
                ["full", "nominal", "empty"].contains(&battery),
                "battery state `{battery}`"
            );
        }
    }
    assert_eq!(
        [
            summary["errors"].as_u64(),
            summary["warnings"].as_u64(),
            summary["notes"].as_u64()
        ],
        counted.map(Some),
        "summary counts equal the findings by severity"
    );
}

// ----- exit codes (format reference §8) ----------------------------------------------

#[test]
fn the_orchard_rover_passes_even_when_strict() {
    // Format reference §8: exit 0 with no errors; `--strict` fails on warnings, so 0
    // there means no warnings either.
    railcheck()
        .args(["check", ROVER])
        .assert()
        .code(0)
        .stdout(predicate::str::contains("0 errors, 0 warnings"));
    railcheck()
        .args(["check", "--strict", ROVER])
        .assert()
        .code(0);

    let (document, code) = check_json(Path::new(ROVER));
    assert_eq!(code, 0);
    assert_findings_document(&document, ROVER, &["parked", "cruise", "climb"]);
    assert_eq!(findings(&document).len(), 0, "{document:#}");
}

#[test]
fn the_first_draft_fails() {
    // Format reference §8: exit 1 when there are errors.
    railcheck().args(["check", DRAFT]).assert().code(1);
}

#[test]
fn a_missing_file_is_an_input_error() {
    // Format reference §8: exit 2 when the input cannot be used; the message names it.
    let dir = tempfile::tempdir().expect("a temporary folder");
    let missing = dir.path().join("no-such-plan.yaml");
    railcheck()
        .arg("check")
        .arg(&missing)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("no-such-plan.yaml"));
}

#[test]
fn input_errors_exit_2_with_every_problem_in_file_order() {
    // Format reference §2: a bare number where a unit is needed is an input error;
    // §7: every input problem other than YAML syntax is reported in the same
    // run; §8: `{"file", "error", "errors"}`, `error` the first of `errors`,
    // exit code 2.
    let text = "railcheck: 1
name: two input problems
parts:
  pack: { use: battery/lipo-3s, with: { capacity: 5 } }
  buck: { use: regulator/buck-9v-3a }
nets:
  BATT+: [pack.pos, buck.vin]
  GND: [pack.neg, buck.gnd]
";
    let (_dir, path) = plan_file("bad.yaml", text);
    railcheck()
        .arg("check")
        .arg(&path)
        .assert()
        .code(2)
        .stdout(predicate::str::contains("unit"));

    let (document, code) = check_json(&path);
    assert_eq!(code, 2);
    let top: BTreeSet<&str> = document
        .as_object()
        .expect("a JSON object")
        .keys()
        .map(String::as_str)
        .collect();
    assert_eq!(
        top,
        BTreeSet::from(["format_version", "kind", "file", "error", "errors"])
    );
    assert_eq!(document["format_version"], 1);
    assert_eq!(document["kind"], "input-errors");
    assert_eq!(document["file"], path.display().to_string());
    let errors = document["errors"].as_array().expect("`errors` array");
    assert!(errors.len() >= 2, "both problems reported: {document:#}");
    assert_eq!(document["error"], errors[0]);
    for error in errors {
        assert!(error["message"].as_str().is_some_and(|m| !m.is_empty()));
        assert!(error["line"].as_u64().is_some_and(|l| l >= 1));
        assert!(error["column"].as_u64().is_some_and(|c| c >= 1));
    }
    let positions: Vec<(u64, u64)> = errors
        .iter()
        .map(|e| (e["line"].as_u64().unwrap(), e["column"].as_u64().unwrap()))
        .collect();
    assert!(
        positions.windows(2).all(|w| w[0] <= w[1]),
        "in file order: {positions:?}"
    );
    // The unitless `5` is line 4; its column, counted from 1, is read off the
    // text itself.
    let line_4 = text.lines().nth(3).unwrap();
    let column = line_4.find("capacity: 5").unwrap() + "capacity: ".len() + 1;
    assert_eq!(positions[0], (4, column as u64));
    // The unknown library part is on line 5.
    assert!(
        positions.iter().any(|&(line, _)| line == 5),
        "{positions:?}"
    );
}

#[test]
fn strict_turns_a_warnings_only_plan_into_a_failure() {
    // A 3S lithium pack is 3 × 4.20 V = 12.6 V when full (handbook cell
    // window, format reference §3), above the 7–12 V operating range of the 5 V
    // board's input and below its 20 V absolute maximum: `voltage/over-range`,
    // a warning (format reference §7). Exit 0 plain, 1 with `--strict` (§8).
    let text = "railcheck: 1
name: 3S pack straight into a 7-12 V board input
parts:
  pack: { use: battery/lipo-3s, with: { cutoff: true } }
  fuse: { use: fuse/blade-1a }
  board: { use: board/mcu-8bit-5v }
nets:
  BATT+: [pack.pos, fuse.a]
  VIN: [fuse.b, board.vin]
  GND: [pack.neg, board.gnd]
";
    let (_dir, path) = plan_file("warn.yaml", text);
    railcheck().arg("check").arg(&path).assert().code(0);
    railcheck()
        .args(["check", "--strict"])
        .arg(&path)
        .assert()
        .code(1);

    let (document, _) = check_json(&path);
    assert_findings_document(&document, &path.display().to_string(), &[]);
    assert_eq!(document["summary"]["errors"], 0);
    let over = only(&document, "voltage/over-range");
    assert_eq!(line_of(over), 9, "reported where `board.vin` is wired");
    // Highest voltage: the full pack sagging by the board's 50 mA typical
    // draw through the pack's 15 mohm (Ohm's law): 12.6 - 0.05 × 0.015 =
    // 12.59925 V.
    assert!(
        (value_of(over, "voltage") - 12.59925).abs() < 2e-4,
        "{over}"
    );
    assert_eq!(value_of(over, "range_max"), 12.0);
}

// ----- JSON shape (format reference §8) ----------------------------------------------

#[test]
fn the_first_draft_json_follows_the_contract() {
    let (document, code) = check_json(Path::new(DRAFT));
    assert_eq!(code, 1);
    assert_findings_document(&document, DRAFT, &DRAFT_MODES);
    let text = std::fs::read_to_string(manifest_dir().join(DRAFT)).expect("the draft");
    for mode in DRAFT_MODES {
        assert!(
            text.contains(&format!("  {mode}: {{")),
            "mode `{mode}` is declared"
        );
    }
    // The draft has findings of both kinds, so both halves of the mode and
    // battery rule above were exercised.
    let rules: BTreeSet<&str> = findings(&document).iter().map(rule_of).collect();
    assert!(rules.iter().any(|r| GRAPH_RULES.contains(r)));
    assert!(rules.iter().any(|r| OPERATING_POINT_RULES.contains(r)));
}

#[test]
fn a_short_carries_no_mode_or_battery() {
    // Format reference §7: a supply output and a ground on one node (a fuse passes
    // the pack's positive straight to its negative) is `power/short`; §8: a
    // short does not depend on mode or battery, so neither key is present.
    let text = "railcheck: 1
name: fuse output wired to the pack negative
parts:
  pack: { use: battery/lipo-3s }
  main_fuse: { use: fuse/blade-10a }
nets:
  BATT+: [pack.pos, main_fuse.a]
  OOPS: [main_fuse.b, pack.neg]
";
    let (_dir, path) = plan_file("short.yaml", text);
    let (document, code) = check_json(&path);
    assert_eq!(code, 1);
    assert_findings_document(&document, &path.display().to_string(), &[]);
    let short = only(&document, "power/short");
    assert!(short.get("mode").is_none() && short.get("battery").is_none());
    assert_eq!(short["severity"], "error");
}

// ----- the first draft's mistakes ----------------------------------------------

#[test]
fn every_mistake_in_the_first_draft_is_reported_at_its_line() {
    // Each `# mistake:` comment names the rule (format reference §7 id) that must
    // report it at that line of the plan (§8: findings carry their line).
    let text = std::fs::read_to_string(manifest_dir().join(DRAFT)).expect("the draft");
    let expected = mistakes(&text);
    let distinct: BTreeSet<&str> = expected.iter().map(|(_, r)| r.as_str()).collect();
    assert!(
        distinct.len() >= 6,
        "the draft shows at least six rules, has {distinct:?}"
    );
    let (document, _) = check_json(Path::new(DRAFT));
    let reported: BTreeSet<(u64, &str)> = findings(&document)
        .iter()
        .map(|f| (line_of(f), rule_of(f)))
        .collect();
    for (line, rule) in &expected {
        assert!(
            CONTRACT_RULES.iter().any(|(id, _)| id == rule),
            "line {line}: `{rule}` is not a format reference §7 rule id"
        );
        assert!(
            reported.contains(&(*line, rule.as_str())),
            "line {line}: expected `{rule}`; reported {reported:?}"
        );
    }
}

#[test]
fn the_mast_regulator_drops_out_by_the_handbook_numbers() {
    // The draft's mast: a 2S pack at empty is 2 × 3.00 V = 6.00 V (handbook
    // cell window, format reference §3). In `worst` the rangefinder draws its 20 mA
    // peak and the linear regulator passes it plus 5 mA quiescent (linear
    // input current = output + Iq, energy balance). That 25 mA sags through
    // the pack's 25 mohm and 0.3 m of 22 AWG out and 0.3 m back
    // (53.0 mohm/m, ASTM B258 gauge with annealed-copper resistivity):
    //   6.00 - 0.025 × (0.025 + 2 × 0.3 × 0.0530) = 5.99858 V,
    // below the 7.0 V that a 5 V output with 2 V dropout needs, so the output
    // follows Vin - 2 V = 3.99858 V (format reference §3 dropout).
    let (document, _) = check_json(Path::new(DRAFT));
    let dropout = only(&document, "regulator/dropout");
    assert_eq!(dropout["mode"], "worst");
    assert_eq!(dropout["battery"], "empty");
    let input = value_of(dropout, "input_voltage");
    assert!((input - 5.99858).abs() < 1e-4, "{dropout}");
    assert!((value_of(dropout, "output_voltage") - (input - 2.0)).abs() < 1e-4);
    assert_eq!(value_of(dropout, "dropout"), 2.0);
}

#[test]
fn the_draft_motors_stall_by_ohms_law() {
    // A stalled motor has no back-EMF, so I = V / R_winding, with R = 12 V /
    // 5 A = 2.4 ohm for this gearmotor (stall current at rated voltage).
    // Through a bipolar bridge dropping 2 V from at most a full 3S pack
    // (12.6 V) the winding sees at most 10.6 V, 4.42 A; any stall above the
    // driver's 3 A channel peak is `driver/stall`.
    let (document, _) = check_json(Path::new(DRAFT));
    let stalls: Vec<&Value> = findings(&document)
        .iter()
        .filter(|f| rule_of(f) == "driver/stall")
        .collect();
    assert_eq!(stalls.len(), 2, "one per motor");
    for stall in stalls {
        let current = value_of(stall, "stall_current");
        let voltage = value_of(stall, "voltage");
        assert!((current * 2.4 - voltage).abs() < 1e-3, "{stall}");
        assert!(voltage <= 12.6 - 2.0 + 1e-9, "{stall}");
        assert!(current > value_of(stall, "channel_peak"));
    }
}

// ----- the terminal report (format reference §8) ----------------------------------------

#[test]
fn the_terminal_report_shows_every_finding_and_ends_with_the_cautions() {
    // Format reference §8: each finding is printed with the YAML line it concerns.
    // The report then closes with the safety cautions, the last of which
    // defers to local codes and qualified practice.
    let output = railcheck()
        .args(["check", DRAFT])
        .output()
        .expect("railcheck runs");
    let human = String::from_utf8(output.stdout).expect("UTF-8 report");
    let (document, _) = check_json(Path::new(DRAFT));
    for finding in findings(&document) {
        let rule = rule_of(finding);
        let line = line_of(finding);
        assert!(human.contains(rule), "`{rule}` shown");
        assert!(human.contains(&format!("line {line}")), "line {line} shown");
    }
    let summary = &document["summary"];
    let plural = |n: &Value, word: &str| {
        let n = n.as_u64().unwrap();
        format!("{n} {word}{}", if n == 1 { "" } else { "s" })
    };
    assert!(human.contains(&format!(
        "{}, {}, {}",
        plural(&summary["errors"], "error"),
        plural(&summary["warnings"], "warning"),
        plural(&summary["notes"], "note")
    )));

    let (_, cautions) = human
        .rsplit_once("Before you power on:")
        .expect("the cautions follow the findings");
    let bullets: Vec<String> = cautions
        .split("\n  - ")
        .skip(1)
        .map(|b| b.split_whitespace().collect::<Vec<_>>().join(" "))
        .collect();
    assert!(bullets.len() >= 2, "{cautions}");
    let last = bullets.last().unwrap();
    assert!(
        last.contains("local electrical codes") && last.contains("qualified practice"),
        "last caution: {last}"
    );
    // Nothing follows it: every line after the bullet's first is its own
    // indented continuation.
    let raw_last = cautions.rsplit("\n  - ").next().unwrap().trim_end();
    assert!(
        raw_last.lines().skip(1).all(|l| l.starts_with("    ")),
        "the report ends with the last caution: {raw_last}"
    );
}
