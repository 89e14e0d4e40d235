//! The terminal report: each finding or input error as a `miette` diagnostic
//! with its snippet, then a summary line and the safety cautions.

use super::Summary;
use crate::model::InputError;
use crate::rules::{Finding, Severity};
use crate::syntax::{Sources, Span, floor_char_boundary};
use miette::{
    Diagnostic, GraphicalReportHandler, GraphicalTheme, LabeledSpan, NamedSource, SourceSpan,
};
use std::fmt;

/// How the terminal report is drawn.
#[derive(Clone, Copy, Debug)]
pub struct HumanStyle {
    /// Whether to colour it with terminal escape codes.
    pub color: bool,
    /// The width to wrap it to, in terminal columns.
    pub width: usize,
}

impl Default for HumanStyle {
    fn default() -> Self {
        HumanStyle {
            color: false,
            width: 100,
        }
    }
}

#[derive(Debug)]
struct Report {
    message: String,
    code: Option<String>,
    severity: miette::Severity,
    help: Option<String>,
    labels: Vec<LabeledSpan>,
    source: NamedSource<String>,
}

impl fmt::Display for Report {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

impl std::error::Error for Report {}

impl Diagnostic for Report {
    fn code<'a>(&'a self) -> Option<Box<dyn fmt::Display + 'a>> {
        self.code
            .as_ref()
            .map(|c| Box::new(c) as Box<dyn fmt::Display>)
    }
    fn severity(&self) -> Option<miette::Severity> {
        Some(self.severity)
    }
    fn help<'a>(&'a self) -> Option<Box<dyn fmt::Display + 'a>> {
        self.help
            .as_ref()
            .map(|h| Box::new(h) as Box<dyn fmt::Display>)
    }
    fn source_code(&self) -> Option<&dyn miette::SourceCode> {
        Some(&self.source)
    }
    fn labels(&self) -> Option<Box<dyn Iterator<Item = LabeledSpan> + '_>> {
        Some(Box::new(self.labels.iter().cloned()))
    }
}

/// A span clamped into its text and onto character boundaries, so `miette`
/// can always draw it.
fn source_span(sources: &Sources, span: Span) -> SourceSpan {
    let text = sources.text(span.source);
    let start = floor_char_boundary(text, span.start);
    let end = floor_char_boundary(text, span.end.max(start));
    (start, end - start).into()
}

fn handler(style: HumanStyle) -> GraphicalReportHandler {
    let theme = if style.color {
        GraphicalTheme::unicode()
    } else {
        GraphicalTheme::unicode_nocolor()
    };
    GraphicalReportHandler::new_themed(theme)
        .with_width(style.width)
        .with_links(false)
}

fn render(report: &Report, style: HumanStyle, out: &mut String) {
    // Rendering into a String cannot fail; a formatting error would only drop
    // this one snippet, so fall back to the plain message.
    if handler(style).render_report(out, report).is_err() {
        out.push_str(&report.message);
        out.push('\n');
    }
}

/// The whole terminal report of a checked plan.
pub fn render_findings(
    sources: &Sources,
    plan_source: crate::syntax::SourceId,
    findings: &[Finding],
    cautions: &[&str],
    style: HumanStyle,
) -> String {
    let mut out = String::new();
    let name = sources.name(plan_source).to_string();
    let text = sources.text(plan_source).to_string();
    for finding in findings {
        let (line, _) = sources.line_column(finding.span);
        let mut labels = vec![LabeledSpan::new_primary_with_span(
            Some(format!("line {line}")),
            source_span(sources, finding.span),
        )];
        for (span, text) in &finding.labels {
            if span.source == plan_source {
                labels.push(LabeledSpan::new_with_span(
                    Some(text.clone()),
                    source_span(sources, *span),
                ));
            }
        }
        let report = Report {
            message: finding.message.clone(),
            code: Some(finding.rule.to_string()),
            severity: match finding.severity {
                Severity::Error => miette::Severity::Error,
                Severity::Warning => miette::Severity::Warning,
                Severity::Note => miette::Severity::Advice,
            },
            help: finding.help.clone(),
            labels,
            source: NamedSource::new(&name, text.clone()),
        };
        render(&report, style, &mut out);
        out.push('\n');
    }
    let summary = Summary::of(findings);
    out.push_str(&format!("{name}: {}\n", summary.line()));
    if !cautions.is_empty() {
        out.push_str("\nBefore you power on:\n");
        for caution in cautions {
            out.push_str(&wrap_bullet(caution, style.width));
        }
    }
    out
}

/// A caution as a list item wrapped to the terminal width (never under 40
/// columns), continuation lines indented under its first word. Long words
/// (a path, a command) stay whole: cut, they could not be copied.
fn wrap_bullet(text: &str, width: usize) -> String {
    // First fit works in time linear in the text, whatever its words.
    let options = textwrap::Options::new(width.max(40))
        .wrap_algorithm(textwrap::WrapAlgorithm::FirstFit)
        .word_separator(textwrap::WordSeparator::AsciiSpace)
        // Breaks only at spaces: `buck-5v-3a` stays one word.
        .word_splitter(textwrap::WordSplitter::NoHyphenation)
        .break_words(false)
        .initial_indent("  - ")
        .subsequent_indent("    ");
    let mut out = textwrap::fill(text.trim(), options);
    out.push('\n');
    out
}

/// Input problems, each at its line, then how many there were.
pub fn render_input_errors(sources: &Sources, errors: &[InputError], style: HumanStyle) -> String {
    let mut out = String::new();
    for error in errors {
        let (line, column) = sources.line_column(error.span);
        let report = Report {
            message: error.message.clone(),
            code: Some("input".to_string()),
            severity: miette::Severity::Error,
            help: error.hint.clone(),
            labels: vec![LabeledSpan::new_primary_with_span(
                Some(format!("line {line}, column {column}")),
                source_span(sources, error.span),
            )],
            source: NamedSource::new(
                sources.name(error.span.source),
                sources.text(error.span.source).to_string(),
            ),
        };
        render(&report, style, &mut out);
        out.push('\n');
    }
    let n = errors.len();
    out.push_str(&format!(
        "{n} input problem{} — nothing was checked\n",
        if n == 1 { "" } else { "s" }
    ));
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bullets_wrap_by_columns_not_bytes() {
        // `°` takes one terminal column (Unicode East Asian Width: Ambiguous,
        // narrow outside CJK text) but two bytes in UTF-8, so the first line
        // holds exactly 40 columns.
        let text = "keep the pack between 0 °C and 45 °C when charging, and let it cool";
        let wrapped = wrap_bullet(text, 40);
        let lines: Vec<&str> = wrapped.lines().collect();
        assert_eq!(lines[0], "  - keep the pack between 0 °C and 45 °C");
        assert_eq!(lines[1], "    when charging, and let it cool");
        assert_eq!(lines.len(), 2);
    }

    #[test]
    fn a_word_longer_than_the_line_stays_whole() {
        let path = format!("/{}", "d".repeat(60));
        let wrapped = wrap_bullet(&format!("see {path} first"), 40);
        assert!(wrapped.lines().any(|line| line.trim() == path), "{wrapped}");
    }
}
