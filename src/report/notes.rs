//! Build notes: one document a builder keeps beside the robot — the title
//! block, the verdict, the safety cautions, the findings with their fixes,
//! the block diagram, the power budget and runtime, the wire list and the
//! connector pinouts. HTML (self-contained: inline SVG and CSS, no scripts,
//! nothing fetched) or Markdown (with the diagram as an SVG file beside it).
//!
//! The documents come from templates (`templates/notes.html`,
//! `templates/notes.md`) through the minijinja engine, which escapes every
//! value the plan supplies: HTML-escaped in the HTML, Markdown- and
//! HTML-escaped in the Markdown. Only the diagram, which `diagram::draw`
//! escapes as it writes it, is placed as markup.

use super::Summary;
use super::budget::{BATTERY_HEADER, RAIL_HEADER};
use super::wires::{PINOUT_HEADER, RUN_HEADER, TOTAL_HEADER};
use crate::Checked;
use crate::budget::Budget;
use crate::wirelist::WireList;
use minijinja::{AutoEscape, Environment, Value};
use serde::Serialize;
use std::fmt::Write as _;

const HTML_TEMPLATE: &str = include_str!("templates/notes.html");
const MARKDOWN_TEMPLATE: &str = include_str!("templates/notes.md");

/// The printed page size of the HTML notes.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum NotesPage {
    /// ISO 216 A4, 210 × 297 mm.
    #[default]
    A4,
    /// US Letter, 8.5 × 11 in.
    Letter,
}

impl NotesPage {
    fn css(self) -> &'static str {
        match self {
            NotesPage::A4 => "A4",
            NotesPage::Letter => "letter",
        }
    }
}

#[derive(Serialize)]
struct FindingItem {
    number: usize,
    rule: &'static str,
    severity: &'static str,
    line: usize,
    message: String,
    fix: Option<String>,
}

#[derive(Serialize)]
struct StageItem {
    title: &'static str,
    steps: Vec<String>,
}

#[derive(Serialize)]
struct PinoutItem {
    name: String,
    library_id: Option<String>,
    rows: Vec<Vec<String>>,
}

#[derive(Serialize)]
struct NotesContext {
    version: &'static str,
    page: &'static str,
    title: String,
    file: String,
    revision: Option<String>,
    date: Option<String>,
    author: Option<String>,
    part_count: usize,
    summary: String,
    clean: bool,
    cautions: Vec<&'static str>,
    findings: Vec<FindingItem>,
    diagram: Value,
    diagram_file: String,
    budget_solved: bool,
    rail_header: &'static [&'static str],
    rails: Vec<Vec<String>>,
    battery_header: &'static [&'static str],
    batteries: Vec<Vec<String>>,
    runtime_notes: Vec<String>,
    run_header: &'static [&'static str],
    runs: Vec<Vec<String>>,
    total_header: &'static [&'static str],
    totals: Vec<Vec<String>>,
    pinout_header: &'static [&'static str],
    pinouts: Vec<PinoutItem>,
    bringup: Vec<StageItem>,
}

fn context(
    checked: &Checked,
    budget: &Budget,
    wires: &WireList,
    diagram: Value,
    diagram_file: &str,
    page: NotesPage,
) -> NotesContext {
    let plan = &checked.plan;
    let file = checked.sources.name(checked.plan_source).to_string();
    let summary = Summary::of(&checked.findings);
    let verdict = if summary.errors > 0 {
        "fix the errors before powering on"
    } else if summary.warnings > 0 {
        "no errors; read the warnings before powering on"
    } else {
        "no findings"
    };
    let findings = checked
        .findings
        .iter()
        .enumerate()
        .map(|(i, f)| FindingItem {
            number: i + 1,
            rule: f.rule,
            severity: f.severity.name(),
            line: checked.sources.line_column(f.span).0,
            message: f.message.clone(),
            fix: f.help.clone(),
        })
        .collect();
    let runtime_notes = budget
        .batteries
        .iter()
        .filter_map(|b| {
            b.runtime.as_ref().map(|r| {
                format!(
                    "{}: runtime from {} of capacity at the profile's mean current; {}",
                    b.name,
                    crate::units::show_share(b.usable),
                    r.method
                )
            })
        })
        .collect();
    NotesContext {
        version: env!("CARGO_PKG_VERSION"),
        page: page.css(),
        title: plan.name.clone().unwrap_or_else(|| file.clone()),
        file,
        revision: plan.revision.clone(),
        date: plan.date.clone(),
        author: plan.author.clone(),
        part_count: plan.parts.len(),
        summary: format!("{}: {verdict}.", summary.line()),
        clean: summary.errors == 0 && summary.warnings == 0,
        cautions: crate::safety::cautions(plan),
        findings,
        diagram,
        diagram_file: diagram_file.to_string(),
        budget_solved: budget.solved,
        rail_header: RAIL_HEADER,
        rails: budget.rails.iter().map(super::budget::rail_row).collect(),
        battery_header: BATTERY_HEADER,
        batteries: budget
            .batteries
            .iter()
            .map(super::budget::battery_row)
            .collect(),
        runtime_notes,
        run_header: RUN_HEADER,
        runs: wires
            .runs
            .iter()
            .enumerate()
            .map(|(i, run)| super::wires::run_row(i + 1, run))
            .collect(),
        total_header: TOTAL_HEADER,
        totals: wires.totals.iter().map(super::wires::total_row).collect(),
        pinout_header: PINOUT_HEADER,
        pinouts: wires
            .pinouts
            .iter()
            .map(|p| PinoutItem {
                name: p.connector.clone(),
                library_id: p.library_id.clone(),
                rows: super::wires::pinout_rows(p),
            })
            .collect(),
        bringup: crate::bringup::procedure(checked)
            .stages
            .into_iter()
            .map(|stage| StageItem {
                title: stage.title,
                steps: stage.steps.into_iter().map(|s| s.text).collect(),
            })
            .collect(),
    }
}

/// Text as Markdown shows it literally: characters Markdown or the HTML
/// inside it would read as markup become escapes or entities, and line
/// breaks (which would end a table row) become spaces.
pub(super) fn markdown_escaped(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '\\' | '`' | '*' | '_' | '[' | ']' | '|' | '#' | '~' | '!' | '(' | ')' => {
                out.push('\\');
                out.push(c);
            }
            '\n' | '\r' => out.push(' '),
            c if c.is_control() => {
                let _ = write!(out, "\\u{{{:04X}}}", c as u32);
            }
            c => out.push(c),
        }
    }
    out
}

fn environment() -> Environment<'static> {
    let mut env = Environment::new();
    env.set_auto_escape_callback(|name| {
        if name.ends_with(".html") {
            AutoEscape::Html
        } else if name.ends_with(".md") {
            AutoEscape::Custom("markdown")
        } else {
            AutoEscape::None
        }
    });
    env.set_formatter(|out, state, value| {
        if state.auto_escape() == AutoEscape::Custom("markdown") && !value.is_safe() {
            let text = value.to_string();
            return out
                .write_str(&markdown_escaped(&text))
                .map_err(minijinja::Error::from);
        }
        minijinja::escape_formatter(out, state, value)
    });
    // Both templates are part of the program: a failure to parse is a bug
    // the tests catch, not a user's input.
    env.add_template("notes.html", HTML_TEMPLATE)
        .expect("the HTML notes template parses");
    env.add_template("notes.md", MARKDOWN_TEMPLATE)
        .expect("the Markdown notes template parses");
    env
}

fn render(name: &str, context: &NotesContext) -> String {
    environment()
        .get_template(name)
        .and_then(|template| template.render(context))
        .unwrap_or_else(|e| panic!("the {name} template renders: {e:#}"))
}

/// The build notes as one self-contained HTML document: inline SVG and CSS,
/// no script and nothing fetched from elsewhere, with print rules for the
/// chosen page size.
pub fn notes_html(checked: &Checked, page: NotesPage) -> String {
    let budget = crate::budget::budget(checked);
    let wires = crate::wirelist::wire_list(checked);
    let svg = crate::diagram::draw(checked);
    // The diagram's own XML prologue has no place inside HTML.
    let inline = svg
        .find("<svg")
        .map_or(svg.as_str(), |start| &svg[start..])
        .to_string();
    let context = context(
        checked,
        &budget,
        &wires,
        Value::from_safe_string(inline),
        "",
        page,
    );
    render("notes.html", &context)
}

/// The build notes as Markdown, with the diagram as an image link to
/// `diagram_file` (written beside the notes by the caller).
pub fn notes_markdown(checked: &Checked, diagram_file: &str) -> String {
    let budget = crate::budget::budget(checked);
    let wires = crate::wirelist::wire_list(checked);
    let context = context(
        checked,
        &budget,
        &wires,
        Value::from(""),
        diagram_file,
        NotesPage::A4,
    );
    render("notes.md", &context)
}

#[cfg(test)]
mod tests {
    use super::markdown_escaped;

    #[test]
    fn markdown_markup_is_shown_literally() {
        // CommonMark: a backslash before ASCII punctuation makes it literal;
        // entities stand for `<`, `>` and `&` so no raw HTML gets through.
        assert_eq!(
            markdown_escaped("<script>*x*|[a](b)"),
            "&lt;script&gt;\\*x\\*\\|\\[a\\]\\(b\\)"
        );
        assert_eq!(markdown_escaped("a\nb"), "a b");
    }
}
