//! SARIF 2.1.0 output (the OASIS Static Analysis Results Interchange
//! Format), for code-scanning services that show findings beside the plan.
//!
//! One run per log: the rule catalogue as `tool.driver.rules`, each finding
//! as a `result` at its place in the plan, and input errors as tool
//! execution notifications of a run that did not succeed. Columns count
//! Unicode code points, as the other reports do, and the run says so
//! (`columnKind`).
//!
//! Not for: the JSON format of contract §8 (`json`), which keeps its own
//! versioned envelope.

use crate::model::InputError;
use crate::rules::{Finding, Rule, Severity};
use crate::syntax::{Sources, Span};
use percent_encoding::{AsciiSet, NON_ALPHANUMERIC, utf8_percent_encode};
use serde::Serialize;
use std::collections::BTreeMap;

const SARIF_VERSION: &str = "2.1.0";
const SARIF_SCHEMA: &str =
    "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json";

#[derive(Serialize)]
struct Log<'a> {
    #[serde(rename = "$schema")]
    schema: &'static str,
    version: &'static str,
    runs: [Run<'a>; 1],
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct Run<'a> {
    tool: Tool<'a>,
    invocations: [Invocation; 1],
    column_kind: &'static str,
    /// Absent when the run did not get as far as checking (input errors).
    #[serde(skip_serializing_if = "Option::is_none")]
    results: Option<Vec<ResultItem<'a>>>,
    #[serde(skip_serializing_if = "Option::is_none")]
    properties: Option<RunProperties<'a>>,
}

/// The safety cautions that apply to the plan travel with its findings.
#[derive(Serialize)]
struct RunProperties<'a> {
    cautions: &'a [&'a str],
}

#[derive(Serialize)]
struct Tool<'a> {
    driver: Driver<'a>,
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct Driver<'a> {
    name: &'static str,
    version: &'static str,
    semantic_version: &'static str,
    rules: Vec<RuleDescriptor<'a>>,
}

#[derive(Serialize)]
struct Message {
    text: String,
}

impl Message {
    fn new(text: impl Into<String>) -> Message {
        Message { text: text.into() }
    }
}

#[derive(Serialize)]
struct Described {
    text: String,
    markdown: String,
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct RuleDescriptor<'a> {
    id: &'a str,
    name: String,
    short_description: Message,
    full_description: Described,
    help: Described,
    default_configuration: Configuration,
}

#[derive(Serialize)]
struct Configuration {
    level: &'static str,
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct Invocation {
    execution_successful: bool,
    #[serde(skip_serializing_if = "Vec::is_empty")]
    tool_execution_notifications: Vec<Notification>,
}

#[derive(Serialize)]
struct Notification {
    level: &'static str,
    message: Message,
    #[serde(skip_serializing_if = "Vec::is_empty")]
    locations: Vec<Location>,
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct ResultItem<'a> {
    rule_id: &'a str,
    #[serde(skip_serializing_if = "Option::is_none")]
    rule_index: Option<usize>,
    level: &'static str,
    message: Message,
    locations: Vec<Location>,
    #[serde(skip_serializing_if = "Vec::is_empty")]
    related_locations: Vec<Location>,
    properties: ResultProperties<'a>,
}

/// What the JSON report carries beside the message, for tools that read
/// the property bag.
#[derive(Serialize)]
struct ResultProperties<'a> {
    parts: &'a [String],
    nets: &'a [String],
    #[serde(skip_serializing_if = "Option::is_none")]
    mode: Option<&'a str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    battery: Option<&'static str>,
    values: BTreeMap<&'a str, super::json::Rounded>,
    units: BTreeMap<&'a str, &'static str>,
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct Location {
    #[serde(skip_serializing_if = "Option::is_none")]
    id: Option<usize>,
    physical_location: PhysicalLocation,
    #[serde(skip_serializing_if = "Option::is_none")]
    message: Option<Message>,
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct PhysicalLocation {
    artifact_location: ArtifactLocation,
    #[serde(skip_serializing_if = "Option::is_none")]
    region: Option<Region>,
}

#[derive(Serialize)]
struct ArtifactLocation {
    uri: String,
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct Region {
    start_line: usize,
    start_column: usize,
    #[serde(skip_serializing_if = "Option::is_none")]
    end_line: Option<usize>,
    #[serde(skip_serializing_if = "Option::is_none")]
    end_column: Option<usize>,
}

/// Characters kept as they are in a path turned into a URI reference: the
/// unreserved set and the path separator.
const PATH_KEEP: &AsciiSet = &NON_ALPHANUMERIC
    .remove(b'-')
    .remove(b'.')
    .remove(b'_')
    .remove(b'~')
    .remove(b'/');

/// A file name as given, as a relative URI reference (forward slashes,
/// spaces and other reserved characters percent-encoded).
fn uri(name: &str) -> String {
    utf8_percent_encode(&name.replace('\\', "/"), PATH_KEEP).to_string()
}

fn artifact(name: &str, region: Option<Region>) -> PhysicalLocation {
    PhysicalLocation {
        artifact_location: ArtifactLocation { uri: uri(name) },
        region,
    }
}

/// The region of a span; the end column is the one just past the span, as
/// SARIF counts it, and is left out for an empty span.
fn region(sources: &Sources, span: Span) -> Region {
    let (start_line, start_column) = sources.line_column(span);
    let (end_line, end_column) = if span.end > span.start {
        let (line, column) = sources.line_column_at(span.source, span.end);
        (Some(line), Some(column))
    } else {
        (None, None)
    };
    Region {
        start_line,
        start_column,
        end_line,
        end_column,
    }
}

fn located(sources: &Sources, span: Span) -> PhysicalLocation {
    artifact(sources.name(span.source), Some(region(sources, span)))
}

fn level(severity: Severity) -> &'static str {
    match severity {
        Severity::Error => "error",
        Severity::Warning => "warning",
        Severity::Note => "note",
    }
}

/// `fuse/undersized` → `FuseUndersized`: SARIF's readable rule name.
fn rule_name(id: &str) -> String {
    id.split(['/', '-'])
        .map(|word| {
            let mut chars = word.chars();
            chars.next().map_or(String::new(), |first| {
                first.to_uppercase().chain(chars).collect()
            })
        })
        .collect()
}

fn descriptor(rule: &Rule) -> RuleDescriptor<'_> {
    let doc = &rule.doc;
    RuleDescriptor {
        id: rule.id,
        name: rule_name(rule.id),
        short_description: Message::new(rule.summary),
        full_description: Described {
            text: format!("{}\n\n{}", doc.what, doc.why),
            markdown: format!("{}\n\n**Why it matters.** {}", doc.what, doc.why),
        },
        help: Described {
            text: format!(
                "Example (the rule fires):\n{}\nFix:\n{}\nReferences: {}",
                with_newline(doc.example),
                with_newline(doc.fix),
                doc.references
            ),
            markdown: format!(
                "**Example** (the rule fires):\n\n```yaml\n{}```\n\n**Fix:**\n\n```yaml\n{}```\n\n**References:** {}",
                with_newline(doc.example),
                with_newline(doc.fix),
                doc.references
            ),
        },
        default_configuration: Configuration {
            level: level(rule.severity),
        },
    }
}

fn with_newline(text: &str) -> String {
    if text.ends_with('\n') {
        text.to_string()
    } else {
        format!("{text}\n")
    }
}

fn driver(rules: &[Rule]) -> Tool<'_> {
    Tool {
        driver: Driver {
            name: "railcheck",
            version: env!("CARGO_PKG_VERSION"),
            semantic_version: env!("CARGO_PKG_VERSION"),
            rules: rules.iter().map(descriptor).collect(),
        },
    }
}

fn result<'a>(sources: &Sources, rules: &[Rule], finding: &'a Finding) -> ResultItem<'a> {
    let mut text = finding.message.clone();
    if let Some(help) = &finding.help {
        text.push_str("\nhelp: ");
        text.push_str(help);
    }
    ResultItem {
        rule_id: finding.rule,
        rule_index: rules.iter().position(|r| r.id == finding.rule),
        level: level(finding.severity),
        message: Message::new(text),
        locations: vec![Location {
            id: None,
            physical_location: located(sources, finding.span),
            message: None,
        }],
        related_locations: finding
            .labels
            .iter()
            .enumerate()
            .map(|(index, (span, label))| Location {
                id: Some(index + 1),
                physical_location: located(sources, *span),
                message: Some(Message::new(label.clone())),
            })
            .collect(),
        properties: ResultProperties {
            parts: &finding.parts,
            nets: &finding.nets,
            mode: finding.mode.as_deref(),
            battery: finding.battery.map(|b| b.name()),
            values: finding
                .values
                .iter()
                .map(|(key, value)| (key.as_str(), super::json::Rounded(*value)))
                .collect(),
            units: finding
                .units
                .iter()
                .map(|(key, unit)| (key.as_str(), unit.symbol()))
                .collect(),
        },
    }
}

fn to_text(log: &Log) -> String {
    // Serializing cannot fail: every map key is a string.
    let mut text = serde_json::to_string_pretty(log).unwrap_or_default();
    text.push('\n');
    text
}

/// A SARIF log of the findings of a checked plan, with every rule of
/// `rules` described and the plan's safety cautions in the run's
/// properties.
pub fn findings_sarif(
    sources: &Sources,
    rules: &[Rule],
    findings: &[Finding],
    cautions: &[&str],
) -> String {
    to_text(&Log {
        schema: SARIF_SCHEMA,
        version: SARIF_VERSION,
        runs: [Run {
            tool: driver(rules),
            invocations: [Invocation {
                execution_successful: true,
                tool_execution_notifications: Vec::new(),
            }],
            column_kind: "unicodeCodePoints",
            results: Some(findings.iter().map(|f| result(sources, rules, f)).collect()),
            properties: Some(RunProperties { cautions }),
        }],
    })
}

fn failed_run(rules: &[Rule], notifications: Vec<Notification>) -> String {
    to_text(&Log {
        schema: SARIF_SCHEMA,
        version: SARIF_VERSION,
        runs: [Run {
            tool: driver(rules),
            invocations: [Invocation {
                execution_successful: false,
                tool_execution_notifications: notifications,
            }],
            column_kind: "unicodeCodePoints",
            results: None,
            properties: None,
        }],
    })
}

/// A SARIF log of a plan that could not be checked: each input problem is an
/// error notification at its place, and the run did not succeed.
pub fn input_errors_sarif(sources: &Sources, rules: &[Rule], errors: &[InputError]) -> String {
    let notifications = errors
        .iter()
        .map(|e| {
            let mut text = e.message.clone();
            if let Some(hint) = &e.hint {
                text.push_str("\nhint: ");
                text.push_str(hint);
            }
            Notification {
                level: "error",
                message: Message::new(text),
                locations: vec![Location {
                    id: None,
                    physical_location: located(sources, e.span),
                    message: None,
                }],
            }
        })
        .collect();
    failed_run(rules, notifications)
}

/// A SARIF log for a problem with no place in a file (a plan or parts folder
/// that cannot be read): one error notification naming the file.
pub fn unplaced_input_error_sarif(file: &str, rules: &[Rule], message: &str) -> String {
    failed_run(
        rules,
        vec![Notification {
            level: "error",
            message: Message::new(message),
            locations: vec![Location {
                id: None,
                physical_location: artifact(file, None),
                message: None,
            }],
        }],
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rule_names_are_the_ids_in_pascal_case() {
        assert_eq!(rule_name("fuse/undersized"), "FuseUndersized");
        assert_eq!(
            rule_name("analysis/no-convergence"),
            "AnalysisNoConvergence"
        );
    }

    #[test]
    fn paths_become_relative_uri_references() {
        // RFC 3986 §2.3 unreserved characters stay; a space is %20 (§2.1).
        assert_eq!(
            uri("examples/first-draft.yaml"),
            "examples/first-draft.yaml"
        );
        assert_eq!(uri("my plans\\rover v2.yaml"), "my%20plans/rover%20v2.yaml");
    }
}
