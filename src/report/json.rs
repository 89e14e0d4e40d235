//! The JSON outputs of the format reference §8.

use super::Summary;
use crate::model::InputError;
use crate::rules::Finding;
use crate::syntax::{SourceId, Sources};
use serde_json::{Map, Value, json};

/// Numbers in `values` are rounded so output is reproducible across
/// platforms and float noise.
fn rounded(value: f64) -> Value {
    if !value.is_finite() {
        return Value::Null;
    }
    let magnitude = value.abs();
    let decimals = if magnitude == 0.0 {
        0
    } else {
        // Six significant figures.
        (5 - magnitude.log10().floor() as i32).clamp(0, 12)
    };
    let factor = 10f64.powi(decimals);
    let r = (value * factor).round() / factor;
    serde_json::Number::from_f64(r).map_or(Value::Null, Value::Number)
}

/// The findings document of format reference §8, plus the safety `cautions` that
/// apply to the plan (an added key).
pub fn findings_json(
    sources: &Sources,
    plan_source: SourceId,
    findings: &[Finding],
    cautions: &[&str],
) -> String {
    let summary = Summary::of(findings);
    let items: Vec<Value> = findings
        .iter()
        .map(|f| {
            let (line, column) = sources.line_column(f.span);
            let mut object = Map::new();
            object.insert("rule".into(), json!(f.rule));
            object.insert("severity".into(), json!(f.severity.name()));
            object.insert("message".into(), json!(f.message));
            object.insert("line".into(), json!(line));
            object.insert("column".into(), json!(column));
            object.insert("parts".into(), json!(f.parts));
            object.insert("nets".into(), json!(f.nets));
            if let Some(mode) = &f.mode {
                object.insert("mode".into(), json!(mode));
            }
            if let Some(battery) = f.battery {
                object.insert("battery".into(), json!(battery.name()));
            }
            let values: Map<String, Value> = f
                .values
                .iter()
                .map(|(k, v)| (k.clone(), rounded(*v)))
                .collect();
            object.insert("values".into(), Value::Object(values));
            if let Some(help) = &f.help {
                object.insert("help".into(), json!(help));
            }
            Value::Object(object)
        })
        .collect();
    let document = json!({
        "file": sources.name(plan_source),
        "summary": {
            "errors": summary.errors,
            "warnings": summary.warnings,
            "notes": summary.notes,
        },
        "findings": items,
        "cautions": cautions,
    });
    pretty(&document)
}

pub fn input_errors_json(
    sources: &Sources,
    plan_source: SourceId,
    errors: &[InputError],
) -> String {
    let items: Vec<Value> = errors
        .iter()
        .map(|e| {
            let (line, column) = sources.line_column(e.span);
            let mut object = Map::new();
            object.insert("message".into(), json!(e.message));
            object.insert("line".into(), json!(line));
            object.insert("column".into(), json!(column));
            if let Some(hint) = &e.hint {
                object.insert("hint".into(), json!(hint));
            }
            if e.span.source != plan_source {
                object.insert("source".into(), json!(sources.name(e.span.source)));
            }
            Value::Object(object)
        })
        .collect();
    let document = json!({
        "file": sources.name(plan_source),
        "error": items.first().cloned().unwrap_or(Value::Null),
        "errors": items,
    });
    pretty(&document)
}

fn pretty(value: &Value) -> String {
    let mut text = serde_json::to_string_pretty(value).unwrap_or_else(|_| value.to_string());
    text.push('\n');
    text
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn values_keep_six_significant_figures() {
        assert_eq!(rounded(12.599999999), json!(12.6));
        assert_eq!(rounded(0.0794111), json!(0.0794111));
        assert_eq!(rounded(474.0000001), json!(474.0));
        assert_eq!(rounded(f64::NAN), Value::Null);
    }
}
