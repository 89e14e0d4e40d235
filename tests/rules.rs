//! Every rule against its fixtures, and the rule catalogue against the format
//! reference (`docs/format.md`).
//!
//! Each rule has a folder under `tests/fixtures/`, named for its id with `/`
//! written `__` (`power/short` → `power__short`). `fires-*.yaml` plans must
//! raise the rule exactly on the lines that carry an expectation;
//! `passes-*.yaml` plans are near misses on which it must stay silent.
//! Expectations sit beside the line a finding should point at, as a YAML
//! comment: `# expect: power/short`, several separated by commas, each
//! optionally with a severity (`# expect: voltage/under-range warning`).
//! Expectations of other rules are checked too, but only the folder's rule has
//! to be matched line for line. Each fixture's header comment carries its hand
//! calculation and the source of its numbers.
//!
//! Not for checking message wording or computed values: the verdict and the
//! line are what the format reference promises.

use railcheck::model::Library;
use railcheck::rules::{RULES, Severity};
use std::collections::BTreeSet;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// Every rule in the format reference's §7 table with its severity, as written there
/// (`voltage/under-range` is "error at `nominal`, warning at `empty` only":
/// error is its default).
const CONTRACT_RULES: &[(&str, Severity)] = &[
    ("power/short", Severity::Error),
    ("power/conflict", Severity::Error),
    ("power/unfed", Severity::Error),
    ("power/loop", Severity::Error),
    ("voltage/over-max", Severity::Error),
    ("voltage/over-range", Severity::Warning),
    ("voltage/under-range", Severity::Error),
    ("regulator/dropout", Severity::Warning),
    ("current/over-rating", Severity::Error),
    ("current/derating", Severity::Warning),
    ("driver/stall", Severity::Error),
    ("thermal/overheat", Severity::Error),
    ("thermal/unrated", Severity::Note),
    ("battery/discharge", Severity::Error),
    ("battery/no-cutoff", Severity::Warning),
    ("ground/floating", Severity::Error),
    ("ground/not-shared", Severity::Error),
    ("logic/overvoltage", Severity::Error),
    ("logic/high-margin", Severity::Error),
    ("logic/low-margin", Severity::Error),
    ("logic/contention", Severity::Error),
    ("logic/undriven", Severity::Warning),
    ("logic/unpowered-input", Severity::Error),
    ("fuse/missing", Severity::Error),
    ("fuse/undersized", Severity::Warning),
    ("fuse/oversized", Severity::Error),
    ("fuse/voltage", Severity::Error),
    ("fuse/nuisance", Severity::Warning),
    ("switch/voltage", Severity::Error),
    ("fault/short-circuit", Severity::Error),
    ("fault/fuse-distance", Severity::Warning),
    ("fault/inrush", Severity::Warning),
    ("fault/regeneration", Severity::Warning),
    ("wire/ampacity", Severity::Error),
    ("wire/drop", Severity::Warning),
    ("safety/no-stop", Severity::Warning),
    ("scenario/back-feed", Severity::Error),
    ("scenario/phantom-power", Severity::Error),
    ("ground/offset", Severity::Warning),
    ("analysis/no-convergence", Severity::Error),
];

const EXPECT_MARK: &str = "# expect:";

fn fixtures_root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures")
}

fn folder_of(rule_id: &str) -> String {
    rule_id.replace('/', "__")
}

#[derive(Clone, Copy, PartialEq, Eq)]
enum Verdict {
    Fires,
    Passes,
}

struct Fixture {
    /// Relative to the crate root, for messages.
    shown: String,
    rule_id: &'static str,
    verdict: Verdict,
    text: String,
}

/// A finding as the fixture sees it: line in the plan (`None` when it points
/// into a library part file instead), rule, severity and message.
struct Seen {
    line: Option<usize>,
    column: usize,
    rule: &'static str,
    severity: Severity,
    text: String,
}

impl Seen {
    fn describe(&self) -> String {
        let at = match self.line {
            Some(line) => format!("line {line}:{}", self.column),
            None => "outside the plan".to_string(),
        };
        format!(
            "{at}: {} {} — {}",
            self.rule,
            self.severity.name(),
            self.text
        )
    }
}

struct Expectation {
    line: usize,
    rule: String,
    severity: Option<Severity>,
}

impl Expectation {
    fn describe(&self) -> String {
        match self.severity {
            Some(s) => format!("{} {} at line {}", self.rule, s.name(), self.line),
            None => format!("{} at line {}", self.rule, self.line),
        }
    }

    fn met_by(&self, seen: &Seen) -> bool {
        seen.line == Some(self.line)
            && seen.rule == self.rule
            && self.severity.is_none_or(|s| s == seen.severity)
    }
}

fn severity_named(name: &str) -> Option<Severity> {
    [Severity::Error, Severity::Warning, Severity::Note]
        .into_iter()
        .find(|s| s.name() == name)
}

/// Reads every `# expect:` comment; a malformed one is a fixture error.
fn expectations(text: &str) -> Result<Vec<Expectation>, String> {
    let mut found = Vec::new();
    for (index, line) in text.lines().enumerate() {
        let Some(at) = line.find(EXPECT_MARK) else {
            continue;
        };
        let line_number = index + 1;
        for item in line[at + EXPECT_MARK.len()..].split(',') {
            let words: Vec<&str> = item.split_whitespace().collect();
            let (rule, severity) = match words.as_slice() {
                [rule] => (*rule, None),
                [rule, severity] => match severity_named(severity) {
                    Some(s) => (*rule, Some(s)),
                    None => {
                        return Err(format!(
                            "line {line_number}: `{severity}` is not a severity (error, warning, note)"
                        ));
                    }
                },
                _ => {
                    return Err(format!(
                        "line {line_number}: cannot read expectation `{}`; write `# expect: rule/id [severity], …`",
                        item.trim()
                    ));
                }
            };
            if !RULES.iter().any(|r| r.id == rule) {
                return Err(format!("line {line_number}: `{rule}` is not a rule id"));
            }
            found.push(Expectation {
                line: line_number,
                rule: rule.to_string(),
                severity,
            });
        }
    }
    Ok(found)
}

/// Every fixture file, in a stable order; misnamed folders and files are
/// reported as problems rather than skipped.
fn fixtures(problems: &mut Vec<String>) -> Vec<Fixture> {
    let root = fixtures_root();
    let mut folders: Vec<PathBuf> = match std::fs::read_dir(&root) {
        Ok(entries) => entries.filter_map(|e| e.ok().map(|e| e.path())).collect(),
        Err(e) => {
            problems.push(format!("cannot read {}: {e}", root.display()));
            return Vec::new();
        }
    };
    folders.sort();
    let mut found = Vec::new();
    for folder in folders {
        let folder_name = folder
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default();
        let Some(rule) = RULES.iter().find(|r| folder_of(r.id) == folder_name) else {
            problems.push(format!(
                "tests/fixtures/{folder_name}: no rule has this id (folders are rule ids with `/` written `__`)"
            ));
            continue;
        };
        let mut files: Vec<PathBuf> = match std::fs::read_dir(&folder) {
            Ok(entries) => entries.filter_map(|e| e.ok().map(|e| e.path())).collect(),
            Err(e) => {
                problems.push(format!("cannot read {}: {e}", folder.display()));
                continue;
            }
        };
        files.sort();
        for file in files {
            let file_name = file
                .file_name()
                .map(|n| n.to_string_lossy().into_owned())
                .unwrap_or_default();
            let shown = format!("tests/fixtures/{folder_name}/{file_name}");
            let verdict = if !file_name.ends_with(".yaml") {
                None
            } else if file_name.starts_with("fires-") {
                Some(Verdict::Fires)
            } else if file_name.starts_with("passes-") {
                Some(Verdict::Passes)
            } else {
                None
            };
            let Some(verdict) = verdict else {
                problems.push(format!(
                    "{shown}: fixture names are `fires-*.yaml` or `passes-*.yaml`"
                ));
                continue;
            };
            match std::fs::read_to_string(&file) {
                Ok(text) => found.push(Fixture {
                    shown,
                    rule_id: rule.id,
                    verdict,
                    text,
                }),
                Err(e) => problems.push(format!("{shown}: cannot read: {e}")),
            }
        }
    }
    found
}

/// Checks one fixture; returns a description of what went wrong, if anything.
fn check_fixture(fixture: &Fixture, library: &Library) -> Option<String> {
    let expected = match expectations(&fixture.text) {
        Ok(e) => e,
        Err(e) => return Some(format!("{}: bad expectation: {e}", fixture.shown)),
    };
    let own_expected = expected
        .iter()
        .filter(|e| e.rule == fixture.rule_id)
        .count();
    match fixture.verdict {
        Verdict::Fires if own_expected == 0 => {
            return Some(format!(
                "{}: a `fires-` fixture needs at least one `# expect: {}`",
                fixture.shown, fixture.rule_id
            ));
        }
        Verdict::Passes if own_expected > 0 => {
            return Some(format!(
                "{}: a `passes-` fixture must not expect its own rule `{}`",
                fixture.shown, fixture.rule_id
            ));
        }
        _ => {}
    }

    let checked = match railcheck::check(&fixture.shown, &fixture.text, library) {
        Ok(c) => c,
        Err(failure) => {
            let mut report = format!("{}: the plan could not be read:", fixture.shown);
            for error in &failure.errors {
                let (line, column) = failure.sources.line_column(error.span);
                let _ = write!(report, "\n    line {line}:{column}: {}", error.message);
            }
            return Some(report);
        }
    };
    let seen: Vec<Seen> = checked
        .findings
        .iter()
        .map(|f| {
            let (line, column) = checked.sources.line_column(f.span);
            let in_plan = f.span.source == checked.plan_source;
            let mut text = f.message.clone();
            if let (Some(mode), Some(battery)) = (&f.mode, f.battery) {
                let _ = write!(text, " [{mode}, {} battery]", battery.name());
            }
            Seen {
                line: in_plan.then_some(line),
                column,
                rule: f.rule,
                severity: f.severity,
                text,
            }
        })
        .collect();

    let mut wrong = Vec::new();
    for expectation in &expected {
        if !seen.iter().any(|s| expectation.met_by(s)) {
            wrong.push(format!("expected {}, not found", expectation.describe()));
        }
    }
    for finding in seen.iter().filter(|s| s.rule == fixture.rule_id) {
        let expected_here = expected
            .iter()
            .any(|e| e.rule == finding.rule && Some(e.line) == finding.line);
        if !expected_here {
            let why = match fixture.verdict {
                Verdict::Fires => "found where no expectation asks for it",
                Verdict::Passes => "found in a near miss that must not raise it",
            };
            wrong.push(format!("{why}: {}", finding.describe()));
        }
    }
    if wrong.is_empty() {
        return None;
    }
    let mut report = format!("{}:", fixture.shown);
    for w in &wrong {
        let _ = write!(report, "\n    {w}");
    }
    let _ = write!(report, "\n  findings produced:");
    if seen.is_empty() {
        let _ = write!(report, " none");
    }
    for s in &seen {
        let _ = write!(report, "\n    {}", s.describe());
    }
    Some(report)
}

#[test]
fn every_fixture_gets_its_expected_findings() {
    let library = Library::builtin();
    let mut problems = Vec::new();
    let all = fixtures(&mut problems);
    assert!(!all.is_empty(), "no fixtures found under tests/fixtures");
    for fixture in &all {
        if let Some(problem) = check_fixture(fixture, &library) {
            problems.push(problem);
        }
    }
    assert!(
        problems.is_empty(),
        "{} of {} fixtures failed:\n\n{}\n",
        problems.len(),
        all.len(),
        problems.join("\n\n")
    );
}

#[test]
fn expectation_comments_are_read_as_written() {
    // The harness's own parser: a mistake here would silently weaken every
    // fixture, so it is pinned on a small text.
    let text = "a: 1\nb: 2  # expect: power/short\nc: 3  # expect: voltage/over-max, voltage/under-range warning\n";
    let read = expectations(text).expect("well-formed expectations");
    let summary: Vec<String> = read.iter().map(Expectation::describe).collect();
    assert_eq!(
        summary,
        [
            "power/short at line 2",
            "voltage/over-max at line 3",
            "voltage/under-range warning at line 3"
        ]
    );
    assert!(expectations("x: 1  # expect: power/shrot\n").is_err());
    assert!(expectations("x: 1  # expect: power/short loud\n").is_err());
}

#[test]
fn catalogue_matches_the_contract_and_the_fixtures() {
    let mut problems = Vec::new();

    let mut ids = BTreeSet::new();
    for rule in RULES {
        if !ids.insert(rule.id) {
            problems.push(format!("`{}` is listed twice in RULES", rule.id));
        }
    }

    // Every id of the format reference's §7 table is implemented.
    for (id, _) in CONTRACT_RULES {
        if !ids.contains(id) {
            problems.push(format!(
                "format reference §7 rule `{id}` is missing from RULES"
            ));
        }
    }

    for rule in RULES {
        match CONTRACT_RULES.iter().find(|(id, _)| *id == rule.id) {
            None => problems.push(format!(
                "`{}` is not a rule id of the format reference's §7 table",
                rule.id
            )),
            Some((_, severity)) if *severity != rule.severity => problems.push(format!(
                "`{}` has severity {}, the format reference says {}",
                rule.id,
                rule.severity.name(),
                severity.name()
            )),
            Some(_) => {}
        }

        let doc = &rule.doc;
        for (field, text) in [
            ("summary", rule.summary),
            ("what", doc.what),
            ("why", doc.why),
            ("example", doc.example),
            ("fix", doc.fix),
            ("references", doc.references),
        ] {
            if text.trim().is_empty() {
                problems.push(format!("`{}` has an empty `{field}`", rule.id));
            }
        }

        let folder = fixtures_root().join(folder_of(rule.id));
        let names: Vec<String> = std::fs::read_dir(&folder)
            .map(|entries| {
                entries
                    .filter_map(|e| e.ok())
                    .map(|e| e.file_name().to_string_lossy().into_owned())
                    .filter(|n| n.ends_with(".yaml"))
                    .collect()
            })
            .unwrap_or_default();
        for prefix in ["fires-", "passes-"] {
            if !names.iter().any(|n| n.starts_with(prefix)) {
                problems.push(format!(
                    "`{}` has no `{prefix}*.yaml` fixture in tests/fixtures/{}",
                    rule.id,
                    folder_of(rule.id)
                ));
            }
        }
    }

    assert!(
        problems.is_empty(),
        "rule catalogue problems:\n  {}",
        problems.join("\n  ")
    );
}
