//! A design sweep's results as a terminal table, CSV (one row per
//! combination) or a JSON document (the shared envelope of `json`,
//! `kind: "sweep"`).

use super::budget::table;
use super::json::{Envelope, Kind, Rounded};
use crate::sweep::{Axis, Outcome, Row, Verdict};
use crate::units::{show_current, show_share};
use serde::Serialize;
use uom::si::electric_current::ampere;
use uom::si::ratio::ratio;
use uom::si::time::hour;

/// How many distinct reasons for failing the terminal table gives below it.
const EXPLAINED: usize = 20;

fn hours(v: &Verdict) -> Option<f64> {
    v.runtime.map(|t| t.get::<hour>())
}

fn show_hours(h: f64) -> String {
    format!("{h:.2} h")
}

fn verdict_word(row: &Row, strict: bool) -> &'static str {
    match (&row.outcome, row.passes(strict)) {
        (Outcome::Unreadable(_), _) => "unreadable",
        (_, true) => "pass",
        (_, false) => "fail",
    }
}

/// Why a failing row fails: its first error (or, under strict, the
/// warnings), or why it could not be read.
fn reason(row: &Row) -> Option<String> {
    match &row.outcome {
        Outcome::Unreadable(message) => Some(format!("does not read: {message}")),
        Outcome::Checked(v) => v
            .first_error
            .as_ref()
            .map(|(rule, message)| format!("{rule}: {message}")),
    }
}

/// The sweep as a terminal table: one row per combination in the order
/// given (`sweep::order`), numbered by combination, then the first error of
/// each failing row shown.
pub fn sweep_table(file: &str, axes: &[Axis], rows: &[Row], total: usize, strict: bool) -> String {
    let passing = rows.iter().filter(|r| r.passes(strict)).count();
    let mut out = format!(
        "{file}: {total} combination{} of {}\n\n",
        if total == 1 { "" } else { "s" },
        axes.iter()
            .map(|a| format!("`{}` ({})", a.key, a.values.len()))
            .collect::<Vec<_>>()
            .join(" × ")
    );
    let mut header: Vec<&str> = vec!["#"];
    header.extend(axes.iter().map(|a| a.key.as_str()));
    header.extend([
        "verdict", "errors", "warnings", "runtime", "peak", "headroom", "at",
    ]);
    let body: Vec<Vec<String>> = rows
        .iter()
        .map(|row| {
            let mut cells = vec![(row.index + 1).to_string()];
            cells.extend(row.values.iter().cloned());
            cells.push(verdict_word(row, strict).to_string());
            match &row.outcome {
                Outcome::Checked(v) => {
                    cells.push(v.errors.to_string());
                    cells.push(v.warnings.to_string());
                    cells.push(hours(v).map_or("—".into(), show_hours));
                    cells.push(v.peak_current.map_or("—".into(), show_current));
                    match &v.headroom {
                        Some((at, share)) => {
                            cells.push(show_share(*share));
                            cells.push(at.clone());
                        }
                        None => cells.extend(["—".to_string(), "—".to_string()]),
                    }
                }
                Outcome::Unreadable(_) => {
                    cells.extend(std::iter::repeat_n("—".to_string(), 6));
                }
            }
            cells
        })
        .collect();
    if rows.is_empty() {
        out.push_str("  no combination to show\n");
    } else {
        out.push_str(&table(&header, &body, axes.len() + 1));
    }
    // Failing rows that fail for the same reason share one line.
    let mut reasons: Vec<(String, Vec<usize>)> = Vec::new();
    for row in rows.iter().filter(|r| !r.passes(strict)) {
        let why = reason(row).unwrap_or_else(|| "warnings, under --strict".into());
        match reasons.iter_mut().find(|(r, _)| *r == why) {
            Some((_, numbers)) => numbers.push(row.index + 1),
            None => reasons.push((why, vec![row.index + 1])),
        }
    }
    if !reasons.is_empty() {
        out.push_str("\nwhy the others fail (first error):\n");
        for (why, numbers) in reasons.iter().take(EXPLAINED) {
            let numbers: Vec<String> = numbers.iter().map(|n| format!("#{n}")).collect();
            out.push_str(&format!("  {}  {why}\n", numbers.join(" ")));
        }
        if reasons.len() > EXPLAINED {
            out.push_str(&format!(
                "  … and {} more reasons (`--format csv` or `json` lists every row's)\n",
                reasons.len() - EXPLAINED
            ));
        }
    }
    out.push_str(&format!(
        "\n{passing} of {total} combination{} pass{}",
        if total == 1 { "" } else { "s" },
        if passing == 1 && total == 1 { "es" } else { "" }
    ));
    match rows.first().filter(|r| r.passes(strict)) {
        Some(best) => out.push_str(&format!(
            "; the best is #{}: {}\n",
            best.index + 1,
            axes.iter()
                .zip(&best.values)
                .map(|(a, v)| format!("{} = {v}", a.key))
                .collect::<Vec<_>>()
                .join(", ")
        )),
        None => out.push('\n'),
    }
    out.push_str(
        "headroom: the smallest share of a source's current rating (regulator, pack) left at peak\n",
    );
    out
}

/// The sweep as CSV: a header, then one record per combination in the
/// order given; numbers in h, A and fractions of 1, empty when unknown.
pub fn sweep_csv(axes: &[Axis], rows: &[Row], strict: bool) -> String {
    let mut writer = csv::Writer::from_writer(Vec::new());
    let number = |value: Option<f64>| {
        value
            .and_then(|v| Rounded(v).finite())
            .map_or(String::new(), |v| v.to_string())
    };
    let mut header: Vec<String> = vec!["combination".into()];
    header.extend(axes.iter().map(|a| a.key.clone()));
    header.extend(
        [
            "passes",
            "errors",
            "warnings",
            "notes",
            "runtime_h",
            "peak_current_a",
            "headroom",
            "headroom_at",
            "first_error_rule",
            "first_error_message",
            "unreadable",
        ]
        .map(String::from),
    );
    // Writing into a Vec cannot fail.
    let _ = writer.write_record(&header);
    for row in rows {
        let mut record = vec![(row.index + 1).to_string()];
        record.extend(row.values.iter().cloned());
        record.push(row.passes(strict).to_string());
        match &row.outcome {
            Outcome::Checked(v) => {
                record.push(v.errors.to_string());
                record.push(v.warnings.to_string());
                record.push(v.notes.to_string());
                record.push(number(hours(v)));
                record.push(number(v.peak_current.map(|i| i.get::<ampere>())));
                record.push(number(v.headroom.as_ref().map(|(_, h)| h.get::<ratio>())));
                record.push(
                    v.headroom
                        .as_ref()
                        .map_or(String::new(), |(at, _)| at.clone()),
                );
                let (rule, message) = v.first_error.clone().unwrap_or_default();
                record.push(rule);
                record.push(message);
                record.push(String::new());
            }
            Outcome::Unreadable(message) => {
                record.extend(std::iter::repeat_n(String::new(), 9));
                record.push(message.clone());
            }
        }
        let _ = writer.write_record(&record);
    }
    let bytes = writer.into_inner().unwrap_or_default();
    String::from_utf8(bytes).unwrap_or_default()
}

#[derive(Serialize)]
struct AxisItem<'a> {
    key: &'a str,
    values: &'a [String],
}

#[derive(Serialize)]
struct FirstError<'a> {
    rule: &'a str,
    message: &'a str,
}

#[derive(Serialize)]
struct RowItem<'a> {
    combination: usize,
    values: &'a [String],
    passes: bool,
    errors: Option<usize>,
    warnings: Option<usize>,
    notes: Option<usize>,
    runtime_h: Option<Rounded>,
    peak_current: Option<Rounded>,
    headroom: Option<Rounded>,
    headroom_at: Option<&'a str>,
    first_error: Option<FirstError<'a>>,
    unreadable: Option<&'a str>,
}

#[derive(Serialize)]
struct SweepBody<'a> {
    combinations: usize,
    passing: usize,
    strict: bool,
    axes: Vec<AxisItem<'a>>,
    rows: Vec<RowItem<'a>>,
    units: std::collections::BTreeMap<&'static str, &'static str>,
}

/// The sweep as a JSON document: the axes, how many combinations and how
/// many pass, and the rows in the order given.
pub fn sweep_json(file: &str, axes: &[Axis], rows: &[Row], total: usize, strict: bool) -> String {
    let items = rows
        .iter()
        .map(|row| {
            let v = match &row.outcome {
                Outcome::Checked(v) => Some(v),
                Outcome::Unreadable(_) => None,
            };
            RowItem {
                combination: row.index + 1,
                values: &row.values,
                passes: row.passes(strict),
                errors: v.map(|v| v.errors),
                warnings: v.map(|v| v.warnings),
                notes: v.map(|v| v.notes),
                runtime_h: v.and_then(hours).map(Rounded),
                peak_current: v
                    .and_then(|v| v.peak_current)
                    .map(|i| Rounded(i.get::<ampere>())),
                headroom: v
                    .and_then(|v| v.headroom.as_ref())
                    .map(|(_, h)| Rounded(h.get::<ratio>())),
                headroom_at: v
                    .and_then(|v| v.headroom.as_ref())
                    .map(|(at, _)| at.as_str()),
                first_error: v
                    .and_then(|v| v.first_error.as_ref())
                    .map(|(rule, message)| FirstError { rule, message }),
                unreadable: match &row.outcome {
                    Outcome::Unreadable(m) => Some(m.as_str()),
                    Outcome::Checked(_) => None,
                },
            }
        })
        .collect();
    let body = SweepBody {
        combinations: total,
        passing: rows.iter().filter(|r| r.passes(strict)).count(),
        strict,
        axes: axes
            .iter()
            .map(|a| AxisItem {
                key: &a.key,
                values: &a.values,
            })
            .collect(),
        rows: items,
        units: [("runtime_h", "h"), ("peak_current", "A"), ("headroom", "1")]
            .into_iter()
            .collect(),
    };
    Envelope::new(Kind::Sweep, file, body).to_text()
}
