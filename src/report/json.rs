//! The JSON outputs of the format reference §8, as typed documents.
//!
//! Every document shares one envelope: `format_version` (an integer, bumped
//! only when a key is renamed, dropped or changes meaning), `kind` (which
//! document follows) and `file` (the plan as given). Within a version keys
//! are only ever added. `docs/report.schema.json` describes every kind.
//!
//! Not for: the terminal report (`human`) or SARIF (`sarif`).

use super::Summary;
use crate::model::InputError;
use crate::rules::Finding;
use crate::syntax::{SourceId, Sources};
use serde::{Serialize, Serializer};
use std::collections::BTreeMap;

/// The version of the JSON output format; it changes only when a key is
/// renamed, dropped or changes meaning.
pub const FORMAT_VERSION: u32 = 1;

/// Which document an envelope holds.
#[derive(Clone, Copy, Debug, Serialize)]
#[serde(rename_all = "kebab-case")]
pub(super) enum Kind {
    Findings,
    InputErrors,
    Budget,
    Wires,
    Bringup,
    Sweep,
    Scenarios,
}

/// The keys every JSON document starts with.
#[derive(Serialize)]
pub(super) struct Envelope<'a, Body: Serialize> {
    format_version: u32,
    kind: Kind,
    file: &'a str,
    #[serde(flatten)]
    body: Body,
}

impl<'a, Body: Serialize> Envelope<'a, Body> {
    pub(super) fn new(kind: Kind, file: &'a str, body: Body) -> Self {
        Envelope {
            format_version: FORMAT_VERSION,
            kind,
            file,
            body,
        }
    }

    /// Pretty-printed, one trailing newline.
    pub(super) fn to_text(&self) -> String {
        pretty(self)
    }

    /// On one line, no trailing newline (for JSON lines).
    pub(super) fn to_line(&self) -> String {
        serde_json::to_string(self).unwrap_or_default()
    }
}

/// A number rounded to six significant figures, so output is reproducible
/// across platforms and float noise; not a number or infinite is `null`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(super) struct Rounded(pub f64);

impl Rounded {
    /// The rounded value, `None` when not finite.
    pub(super) fn finite(self) -> Option<f64> {
        self.value()
    }

    fn value(self) -> Option<f64> {
        let value = self.0;
        if !value.is_finite() {
            return None;
        }
        let magnitude = value.abs();
        let decimals = if magnitude == 0.0 {
            0
        } else {
            (5 - magnitude.log10().floor() as i32).clamp(0, 12)
        };
        let factor = 10f64.powi(decimals);
        Some((value * factor).round() / factor)
    }
}

impl Serialize for Rounded {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        self.value().serialize(serializer)
    }
}

#[derive(Serialize)]
struct Counts {
    errors: usize,
    warnings: usize,
    notes: usize,
}

#[derive(Serialize)]
struct FindingsBody<'a> {
    summary: Counts,
    findings: Vec<FindingItem<'a>>,
    /// Safety cautions that apply to the plan.
    cautions: &'a [&'a str],
}

#[derive(Serialize)]
struct FindingItem<'a> {
    rule: &'a str,
    severity: &'static str,
    message: &'a str,
    line: usize,
    column: usize,
    parts: &'a [String],
    nets: &'a [String],
    #[serde(skip_serializing_if = "Option::is_none")]
    mode: Option<&'a str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    battery: Option<&'static str>,
    /// Contract v1: plain numbers in V, A, W, ohm, Ah, m, degC.
    values: BTreeMap<&'a str, Rounded>,
    /// The unit of each number in `values`, under the same key.
    units: BTreeMap<&'a str, &'static str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    help: Option<&'a str>,
}

impl<'a> FindingItem<'a> {
    fn new(sources: &Sources, finding: &'a Finding) -> FindingItem<'a> {
        let (line, column) = sources.line_column(finding.span);
        FindingItem {
            rule: finding.rule,
            severity: finding.severity.name(),
            message: &finding.message,
            line,
            column,
            parts: &finding.parts,
            nets: &finding.nets,
            mode: finding.mode.as_deref(),
            battery: finding.battery.map(|b| b.name()),
            values: finding
                .values
                .iter()
                .map(|(key, value)| (key.as_str(), Rounded(*value)))
                .collect(),
            units: finding
                .units
                .iter()
                .map(|(key, unit)| (key.as_str(), unit.symbol()))
                .collect(),
            help: finding.help.as_deref(),
        }
    }
}

/// The findings document of format reference §8, plus the safety `cautions` that
/// apply to the plan and the `units` of each finding's values (added keys).
///
/// ```
/// use railcheck::model::Library;
/// use railcheck::report::{FORMAT_VERSION, findings_json};
///
/// // A warehouse beacon rated 12 V at most, straight on a 3S lithium-polymer pack.
/// let plan = "\
/// railcheck: 1
/// parts:
///   pack: { use: battery/lipo-3s }
///   beacon:
///     class: load
///     pins:
///       vin: { role: supply-in, range: 10 V..12 V, max: 12 V, draw: { idle: 0 A, typical: 0.2 A } }
///       gnd: { role: ground }
/// nets:
///   BATT+: [pack.pos, beacon.vin]
///   GND: [pack.neg, beacon.gnd]
/// modes:
///   parked: { beacon: idle }
/// ";
/// let checked = railcheck::check("beacon.yaml", plan, &Library::builtin()).unwrap();
/// let cautions = railcheck::safety::cautions(&checked.plan);
/// let text = findings_json(&checked.sources, checked.plan_source, &checked.findings, &cautions);
///
/// let json: serde_json::Value = serde_json::from_str(&text).expect("the output is JSON");
/// assert_eq!(json["format_version"], FORMAT_VERSION);
/// assert_eq!(json["format_version"], 1);
/// assert_eq!(json["kind"], "findings");
/// assert_eq!(json["file"], "beacon.yaml");
/// let findings = json["findings"].as_array().unwrap();
/// assert_eq!(json["summary"]["errors"], findings.iter().filter(|f| f["severity"] == "error").count());
/// let over = findings.iter().find(|f| f["rule"] == "voltage/over-max").unwrap();
/// // Full pack, idle beacon: 3 × 4.20 V = 12.6 V (Linden & Reddy, Handbook of
/// // Batteries), in volts, on the `BATT+` line.
/// assert_eq!(over["values"]["voltage"], 12.6);
/// assert_eq!(over["units"]["voltage"], "V");
/// assert_eq!(over["line"], 10);
/// // A lithium pack brings its safety caution.
/// assert!(json["cautions"].as_array().unwrap().iter().any(|c| c.as_str().unwrap().starts_with("Lithium")));
/// ```
pub fn findings_json(
    sources: &Sources,
    plan_source: SourceId,
    findings: &[Finding],
    cautions: &[&str],
) -> String {
    let summary = Summary::of(findings);
    let body = FindingsBody {
        summary: Counts {
            errors: summary.errors,
            warnings: summary.warnings,
            notes: summary.notes,
        },
        findings: findings
            .iter()
            .map(|f| FindingItem::new(sources, f))
            .collect(),
        cautions,
    };
    Envelope::new(Kind::Findings, sources.name(plan_source), body).to_text()
}

#[derive(Clone, Serialize)]
struct InputErrorItem<'a> {
    message: &'a str,
    /// Absent when the problem has no place in a file (a file that cannot
    /// be read at all); then `column` is absent too.
    #[serde(skip_serializing_if = "Option::is_none")]
    line: Option<usize>,
    #[serde(skip_serializing_if = "Option::is_none")]
    column: Option<usize>,
    #[serde(skip_serializing_if = "Option::is_none")]
    hint: Option<&'a str>,
    /// The file the problem is in, when it is not the plan (a part file).
    #[serde(skip_serializing_if = "Option::is_none")]
    source: Option<&'a str>,
}

#[derive(Serialize)]
struct InputErrorsBody<'a> {
    /// The first of `errors`.
    error: Option<InputErrorItem<'a>>,
    errors: Vec<InputErrorItem<'a>>,
}

impl<'a> InputErrorsBody<'a> {
    fn new(errors: Vec<InputErrorItem<'a>>) -> Self {
        InputErrorsBody {
            error: errors.first().cloned(),
            errors,
        }
    }
}

/// The input-errors document of contract §8 (exit code 2).
pub fn input_errors_json(
    sources: &Sources,
    plan_source: SourceId,
    errors: &[InputError],
) -> String {
    let items = errors
        .iter()
        .map(|e| {
            let (line, column) = sources.line_column(e.span);
            InputErrorItem {
                message: &e.message,
                line: Some(line),
                column: Some(column),
                hint: e.hint.as_deref(),
                source: (e.span.source != plan_source).then(|| sources.name(e.span.source)),
            }
        })
        .collect();
    Envelope::new(
        Kind::InputErrors,
        sources.name(plan_source),
        InputErrorsBody::new(items),
    )
    .to_text()
}

/// An input-errors document for a problem with no place in any file, such
/// as a plan or parts folder that cannot be read: no `line` or `column`.
pub fn unplaced_input_error_json(file: &str, message: &str) -> String {
    let item = InputErrorItem {
        message,
        line: None,
        column: None,
        hint: None,
        source: None,
    };
    Envelope::new(Kind::InputErrors, file, InputErrorsBody::new(vec![item])).to_text()
}

fn pretty(value: &impl Serialize) -> String {
    // Serializing these documents cannot fail: every map key is a string.
    let mut text = serde_json::to_string_pretty(value).unwrap_or_default();
    text.push('\n');
    text
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    fn rounded(value: f64) -> serde_json::Value {
        serde_json::to_value(Rounded(value)).expect("a number serializes")
    }

    #[test]
    fn values_keep_six_significant_figures() {
        assert_eq!(rounded(12.599999999), json!(12.6));
        assert_eq!(rounded(0.0794111), json!(0.0794111));
        assert_eq!(rounded(474.0000001), json!(474.0));
        assert_eq!(rounded(123456.7), json!(123457.0));
        assert_eq!(rounded(f64::NAN), json!(null));
        assert_eq!(rounded(f64::INFINITY), json!(null));
    }

    #[test]
    fn an_unplaced_error_has_no_position() {
        let text = unplaced_input_error_json("plan.yaml", "cannot read plan.yaml");
        let document: serde_json::Value = serde_json::from_str(&text).expect("JSON");
        assert_eq!(document["format_version"], json!(1));
        assert_eq!(document["kind"], json!("input-errors"));
        assert_eq!(
            document["error"],
            json!({ "message": "cannot read plan.yaml" })
        );
        assert_eq!(document["errors"], json!([document["error"]]));
    }
}
