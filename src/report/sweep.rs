//! A design sweep's results as a terminal table, CSV (one row per
//! combination), a JSON document (the shared envelope of `json`,
//! `kind: "sweep"`) or JSON lines (one object per line, streamed).
//!
//! CSV and JSON lines are written a row at a time ([`sweep_csv_header`],
//! [`sweep_csv_record`], [`sweep_jsonl_start`], [`sweep_jsonl_row`],
//! [`sweep_jsonl_end`]), so a sweep of any size streams them without
//! holding its rows.

use super::budget::table;
use super::json::{Envelope, Kind, Rounded};
use crate::rules::{Margin, Unit};
use crate::sweep::{Axis, Outcome, Row, Summary, Verdict};
use crate::units::{show_current, show_mass, show_share, show_voltage};
use serde::Serialize;
use uom::si::electric_current::ampere;
use uom::si::electric_potential::ElectricPotential;
use uom::si::f64::{ElectricCurrent, Ratio};
use uom::si::mass::kilogram;
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

/// A margin's left-over amount in its unit (`0.3 A`, `212 mV`).
fn show_left(m: &Margin) -> String {
    let left = m.left();
    match m.unit {
        Unit::Ampere => show_current(ElectricCurrent::new::<ampere>(left)),
        Unit::Volt => show_voltage(ElectricPotential::new::<uom::si::electric_potential::volt>(
            left,
        )),
        unit => format!("{left:.3} {}", unit.symbol()),
    }
}

/// `12 % (0.3 A)`: what is left of the tightest limit.
fn show_margin(m: &Margin) -> String {
    match m.share() {
        Some(share) => format!(
            "{} ({})",
            show_share(Ratio::new::<uom::si::ratio::ratio>(share)),
            show_left(m)
        ),
        None => show_left(m),
    }
}

/// `wire ampacity, net VMOT (climb, empty)`: which limit, where, when.
fn show_tightest(m: &Margin) -> String {
    let when: Vec<&str> = m
        .mode
        .as_deref()
        .into_iter()
        .chain(m.battery.map(|b| b.name()))
        .collect();
    let mut text = format!("{}, {}", m.kind.name(), m.at);
    if !when.is_empty() {
        text.push_str(&format!(" ({})", when.join(", ")));
    }
    text
}

/// A sum some parts are missing from reads as a lower bound: `≥ 1.2 kg`.
fn partial(text: String, missing: usize) -> String {
    if missing > 0 {
        format!("≥ {text}")
    } else {
        text
    }
}

fn show_cost(cost: f64) -> String {
    let text = format!("{cost:.2}");
    text.trim_end_matches('0').trim_end_matches('.').to_string()
}

/// The sweep as a terminal table: one row per combination in the order
/// given (`sweep::order`), numbered by combination, then the first error of
/// each failing row shown. `checked` is how many combinations were checked
/// (fewer than `total` when the sweep was interrupted).
pub fn sweep_table(
    file: &str,
    axes: &[Axis],
    rows: &[Row],
    (checked, total): (usize, usize),
    strict: bool,
) -> String {
    let passing = rows.iter().filter(|r| r.passes(strict)).count();
    let mut out = format!(
        "{file}: {total} combination{} of {}\n\n",
        if total == 1 { "" } else { "s" },
        axes.iter()
            .map(|a| format!("`{}` ({})", a.key, a.values.len()))
            .collect::<Vec<_>>()
            .join(" × ")
    );
    let verdicts = || rows.iter().filter_map(Row::verdict);
    let with_mass = verdicts().any(|v| v.mass.is_some());
    let with_cost = verdicts().any(|v| v.cost.is_some());
    let mut header: Vec<&str> = vec!["#"];
    header.extend(axes.iter().map(|a| a.key.as_str()));
    header.extend(["verdict", "errors", "warnings", "runtime", "peak"]);
    if with_mass {
        header.push("mass");
    }
    if with_cost {
        header.push("cost");
    }
    header.extend(["margin", "tightest"]);
    let body: Vec<Vec<String>> = rows
        .iter()
        .map(|row| {
            let mut cells = vec![(row.index + 1).to_string()];
            cells.extend(row.values.iter().cloned());
            cells.push(verdict_word(row, strict).to_string());
            let dash = || "—".to_string();
            match &row.outcome {
                Outcome::Checked(v) => {
                    cells.push(v.errors.to_string());
                    cells.push(v.warnings.to_string());
                    cells.push(hours(v).map_or_else(dash, show_hours));
                    cells.push(v.peak_current.map_or_else(dash, show_current));
                    if with_mass {
                        cells.push(
                            v.mass
                                .map_or_else(dash, |m| partial(show_mass(m), v.without_mass)),
                        );
                    }
                    if with_cost {
                        cells.push(
                            v.cost
                                .map_or_else(dash, |c| partial(show_cost(c), v.without_cost)),
                        );
                    }
                    match &v.margin {
                        Some(m) => {
                            cells.push(show_margin(m));
                            cells.push(show_tightest(m));
                        }
                        None => cells.extend([dash(), dash()]),
                    }
                }
                Outcome::Unreadable(_) => {
                    let n = header.len() - cells.len();
                    cells.extend(std::iter::repeat_n(dash(), n));
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
    if checked < total {
        out.push_str(&format!(
            "\ninterrupted: {checked} of {total} combinations were checked; the rest are not shown"
        ));
    }
    out.push_str(&format!(
        "\n{passing} of {checked} combination{} checked pass{}",
        if checked == 1 { "" } else { "s" },
        if passing == 1 { "es" } else { "" }
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
        "margin: what is left of the tightest rating or limit the checks compare against \
         (current ratings, ampacity, wire drop, fuse, supply and logic voltages)\n",
    );
    if with_mass || with_cost {
        out.push_str("≥: some parts give no mass or cost, and the sum leaves them out\n");
    }
    out
}

/// The CSV columns after the axes.
const CSV_COLUMNS: [&str; 22] = [
    "passes",
    "errors",
    "warnings",
    "notes",
    "runtime_h",
    "peak_current_a",
    "mass_kg",
    "parts_without_mass",
    "cost",
    "parts_without_cost",
    "margin",
    "margin_left",
    "margin_unit",
    "margin_value",
    "margin_limit",
    "margin_rating",
    "margin_at",
    "margin_mode",
    "margin_battery",
    "first_error_rule",
    "first_error_message",
    "unreadable",
];

fn csv_line(record: &[String]) -> String {
    let mut writer = csv::Writer::from_writer(Vec::new());
    // Writing into a Vec cannot fail.
    let _ = writer.write_record(record);
    let bytes = writer.into_inner().unwrap_or_default();
    String::from_utf8(bytes).unwrap_or_default()
}

fn number(value: Option<f64>) -> String {
    value
        .and_then(|v| Rounded(v).finite())
        .map_or(String::new(), |v| v.to_string())
}

/// The CSV header line: `combination`, one column per axis, the figures.
pub fn sweep_csv_header(axes: &[Axis]) -> String {
    let mut header: Vec<String> = vec!["combination".into()];
    header.extend(axes.iter().map(|a| a.key.clone()));
    header.extend(CSV_COLUMNS.map(String::from));
    csv_line(&header)
}

/// One row as a CSV line; numbers in h, A, kg, the margin's own unit and
/// fractions of 1, empty when unknown.
pub fn sweep_csv_record(row: &Row, strict: bool) -> String {
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
            record.push(number(v.mass.map(|m| m.get::<kilogram>())));
            record.push(v.without_mass.to_string());
            record.push(number(v.cost));
            record.push(v.without_cost.to_string());
            match &v.margin {
                Some(m) => record.extend([
                    number(m.share()),
                    number(Some(m.left())),
                    m.unit.symbol().to_string(),
                    number(Some(m.value)),
                    number(Some(m.limit)),
                    m.kind.name().to_string(),
                    m.at.clone(),
                    m.mode.clone().unwrap_or_default(),
                    m.battery.map(|b| b.name().to_string()).unwrap_or_default(),
                ]),
                None => record.extend(std::iter::repeat_n(String::new(), 9)),
            }
            let (rule, message) = v.first_error.clone().unwrap_or_default();
            record.push(rule);
            record.push(message);
            record.push(String::new());
        }
        Outcome::Unreadable(message) => {
            record.extend(std::iter::repeat_n(String::new(), CSV_COLUMNS.len() - 2));
            record.push(message.clone());
        }
    }
    csv_line(&record)
}

/// The sweep as CSV: a header, then one record per combination in the
/// order given.
pub fn sweep_csv(axes: &[Axis], rows: &[Row], strict: bool) -> String {
    let mut out = sweep_csv_header(axes);
    for row in rows {
        out.push_str(&sweep_csv_record(row, strict));
    }
    out
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
struct MarginItem<'a> {
    rating: &'static str,
    rule: &'static str,
    at: &'a str,
    value: Rounded,
    limit: Rounded,
    left: Rounded,
    share: Option<Rounded>,
    unit: &'static str,
    mode: Option<&'a str>,
    battery: Option<&'static str>,
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
    margin: Option<MarginItem<'a>>,
    mass_kg: Option<Rounded>,
    parts_without_mass: Option<usize>,
    cost: Option<Rounded>,
    parts_without_cost: Option<usize>,
    first_error: Option<FirstError<'a>>,
    unreadable: Option<&'a str>,
}

fn row_item(row: &Row, strict: bool) -> RowItem<'_> {
    let v = match &row.outcome {
        Outcome::Checked(v) => Some(&**v),
        Outcome::Unreadable(_) => None,
    };
    let margin = v.and_then(|v| v.margin.as_ref());
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
        headroom: margin.and_then(Margin::share).map(Rounded),
        headroom_at: margin.map(|m| m.at.as_str()),
        margin: margin.map(|m| MarginItem {
            rating: m.kind.name(),
            rule: m.rule,
            at: &m.at,
            value: Rounded(m.value),
            limit: Rounded(m.limit),
            left: Rounded(m.left()),
            share: m.share().map(Rounded),
            unit: m.unit.symbol(),
            mode: m.mode.as_deref(),
            battery: m.battery.map(|b| b.name()),
        }),
        mass_kg: v.and_then(|v| v.mass).map(|m| Rounded(m.get::<kilogram>())),
        parts_without_mass: v.map(|v| v.without_mass),
        cost: v.and_then(|v| v.cost).map(Rounded),
        parts_without_cost: v.map(|v| v.without_cost),
        first_error: v
            .and_then(|v| v.first_error.as_ref())
            .map(|(rule, message)| FirstError { rule, message }),
        unreadable: match &row.outcome {
            Outcome::Unreadable(m) => Some(m.as_str()),
            Outcome::Checked(_) => None,
        },
    }
}

fn units() -> std::collections::BTreeMap<&'static str, &'static str> {
    [
        ("runtime_h", "h"),
        ("peak_current", "A"),
        ("headroom", "1"),
        ("mass_kg", "kg"),
    ]
    .into_iter()
    .collect()
}

#[derive(Serialize)]
struct SweepBody<'a> {
    combinations: usize,
    checked: usize,
    interrupted: bool,
    passing: usize,
    strict: bool,
    axes: Vec<AxisItem<'a>>,
    rows: Vec<RowItem<'a>>,
    units: std::collections::BTreeMap<&'static str, &'static str>,
}

fn axis_items(axes: &[Axis]) -> Vec<AxisItem<'_>> {
    axes.iter()
        .map(|a| AxisItem {
            key: &a.key,
            values: &a.values,
        })
        .collect()
}

/// The sweep as a JSON document: the axes, how many combinations, how many
/// were checked (fewer when interrupted) and how many pass, and the rows in
/// the order given.
pub fn sweep_json(
    file: &str,
    axes: &[Axis],
    rows: &[Row],
    (checked, total): (usize, usize),
    strict: bool,
) -> String {
    let body = SweepBody {
        combinations: total,
        checked,
        interrupted: checked < total,
        passing: rows.iter().filter(|r| r.passes(strict)).count(),
        strict,
        axes: axis_items(axes),
        rows: rows.iter().map(|row| row_item(row, strict)).collect(),
        units: units(),
    };
    Envelope::new(Kind::Sweep, file, body).to_text()
}

#[derive(Serialize)]
struct StartLine<'a> {
    combinations: usize,
    strict: bool,
    axes: Vec<AxisItem<'a>>,
    units: std::collections::BTreeMap<&'static str, &'static str>,
}

/// JSON lines: the first line, the envelope with the axes and how many
/// combinations there are.
pub fn sweep_jsonl_start(file: &str, axes: &[Axis], total: usize, strict: bool) -> String {
    let body = StartLine {
        combinations: total,
        strict,
        axes: axis_items(axes),
        units: units(),
    };
    let mut line = Envelope::new(Kind::Sweep, file, body).to_line();
    line.push('\n');
    line
}

/// JSON lines: one row, an object on one line (the keys of a row of the
/// JSON document).
pub fn sweep_jsonl_row(row: &Row, strict: bool) -> String {
    let mut line = serde_json::to_string(&row_item(row, strict)).unwrap_or_default();
    line.push('\n');
    line
}

#[derive(Serialize)]
struct EndLine {
    end: bool,
    checked: usize,
    interrupted: bool,
    passing: usize,
    best: Option<usize>,
}

/// JSON lines: the last line, `{"end": true, …}` with how many were checked
/// and pass, whether the sweep was interrupted and the best combination.
pub fn sweep_jsonl_end(summary: &Summary, total: usize) -> String {
    let line = EndLine {
        end: true,
        checked: summary.checked,
        interrupted: summary.checked < total,
        passing: summary.passing,
        best: summary.best_passing().map(|r| r.index + 1),
    };
    let mut text = serde_json::to_string(&line).unwrap_or_default();
    text.push('\n');
    text
}
