//! The terminal report: each finding or input error as a `miette` diagnostic
//! with its snippet, then a summary line and the safety cautions.

use super::Summary;
use crate::model::InputError;
use crate::rules::{Finding, Severity};
use crate::syntax::{SourceId, Sources, Span, floor_char_boundary, is_unsafe_on_terminal, visible};
use miette::{
    Diagnostic, GraphicalReportHandler, GraphicalTheme, LabeledSpan, MietteError,
    MietteSpanContents, SourceCode, SourceSpan, SpanContents,
};
use std::fmt;

/// Characters of a long line shown on each side of what a diagnostic marks;
/// the rest of the line becomes `…`.
pub const WINDOW_CHARS: usize = 80;
/// Lines up to this many characters are shown whole.
const WHOLE_LINE_CHARS: usize = 2 * WINDOW_CHARS;
/// Diagnostics drawn with their snippet; the rest are counted in one line
/// (the JSON and SARIF reports list every one).
pub const MAX_SHOWN: usize = 100;
/// Lines shown before and after a marked line.
const CONTEXT_LINES: usize = 1;

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
    source: Excerpt,
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

/// What a diagnostic shows of its source: the marked lines and their
/// neighbours, each long line cut to a window around its marks and every
/// unsafe character escaped, so that neither a one-line plan of megabytes nor
/// control codes in it reach the terminal. Spans are given to `miette` in the
/// excerpt's own offsets; it reads them back through `SourceCode` with the
/// source's real line numbers and columns.
#[derive(Debug)]
struct Excerpt {
    name: String,
    blocks: Vec<Block>,
}

/// A run of consecutive source lines.
#[derive(Debug)]
struct Block {
    /// Offset of the block's text in the excerpt's offsets.
    base: usize,
    /// 0-based source line of the block's first line.
    first_line: usize,
    text: String,
    lines: Vec<ShownLine>,
}

#[derive(Debug)]
struct ShownLine {
    /// Byte offset of the line in the block's text.
    start: usize,
    /// Source column (0-based, in characters) of the first character shown.
    first_column: usize,
    /// Source byte offsets of the shown characters' boundaries and the
    /// matching block offsets, in order: entry `i` is `i` characters into
    /// the window.
    map: Vec<(usize, usize)>,
}

impl ShownLine {
    /// The block offset of a source offset, clamped into the shown window.
    fn place(&self, offset: usize) -> usize {
        let i = self.map.partition_point(|&(source, _)| source < offset);
        self.map[i.min(self.map.len() - 1)].1
    }
}

/// A mark to draw: a span and its label.
struct Mark {
    span: Span,
    label: Option<String>,
    primary: bool,
}

impl Excerpt {
    /// The excerpt for the marks that point into `source`, with the marks'
    /// labelled spans in its offsets.
    fn new(sources: &Sources, source: SourceId, marks: &[Mark]) -> (Excerpt, Vec<LabeledSpan>) {
        let text: &str = sources.text(source);
        let index = sources.lines(source);
        let last_line = index.count() - 1;
        // Each mark kept to its first line.
        let marks: Vec<(usize, usize, usize, &Mark)> = marks
            .iter()
            .filter(|m| m.span.source == source)
            .map(|m| {
                let start = floor_char_boundary(text, m.span.start);
                let line = index.line_of(start);
                let range = index.line_range(text, line);
                let start = start.min(range.end);
                let end = floor_char_boundary(text, m.span.end).clamp(start, range.end);
                (line, start, end, m)
            })
            .collect();
        let mut runs: Vec<(usize, usize)> = marks
            .iter()
            .map(|&(line, ..)| {
                (
                    line.saturating_sub(CONTEXT_LINES),
                    (line + CONTEXT_LINES).min(last_line),
                )
            })
            .collect();
        runs.sort_unstable();
        let mut merged: Vec<(usize, usize)> = Vec::new();
        for (first, last) in runs {
            match merged.last_mut() {
                Some(run) if first <= run.1 + 1 => run.1 = run.1.max(last),
                _ => merged.push((first, last)),
            }
        }
        let mut blocks = Vec::new();
        let mut base = 0;
        for (first, last) in merged {
            let mut block = Block {
                base,
                first_line: first,
                text: String::new(),
                lines: Vec::new(),
            };
            for line in first..=last {
                if line > first {
                    block.text.push('\n');
                }
                let range = index.line_range(text, line);
                let on_line = marks.iter().filter(|m| m.0 == line);
                let anchor = on_line.clone().map(|m| (m.1, m.2)).min();
                let shown = show_line(text, range, anchor, block.text.len());
                block.text.push_str(&shown.1);
                block.lines.push(shown.0);
            }
            base += block.text.len() + 1;
            blocks.push(block);
        }
        let labels = marks
            .iter()
            .map(|&(line, start, end, mark)| {
                let block = blocks
                    .iter()
                    .find(|b| b.first_line <= line && line < b.first_line + b.lines.len())
                    .expect("every mark's line is in a block");
                let shown = &block.lines[line - block.first_line];
                let (start, end) = (shown.place(start), shown.place(end));
                let span = SourceSpan::from((block.base + start, end - start));
                if mark.primary {
                    LabeledSpan::new_primary_with_span(mark.label.clone(), span)
                } else {
                    LabeledSpan::new_with_span(mark.label.clone(), span)
                }
            })
            .collect();
        let excerpt = Excerpt {
            name: visible(sources.name(source)).into_owned(),
            blocks,
        };
        (excerpt, labels)
    }
}

/// One source line as shown: whole if short, else a window from
/// `WINDOW_CHARS` before the anchor (the first mark on it) to `WINDOW_CHARS`
/// after it (a long mark counts up to `WINDOW_CHARS`), with `…` where it is
/// cut; unsafe characters escaped.
fn show_line(
    text: &str,
    range: std::ops::Range<usize>,
    anchor: Option<(usize, usize)>,
    block_offset: usize,
) -> (ShownLine, String) {
    let line = &text[range.clone()];
    let short = line.len() <= 4 * WHOLE_LINE_CHARS && line.chars().count() <= WHOLE_LINE_CHARS;
    let (from, to) = if short {
        (range.start, range.end)
    } else {
        let (start, end) = anchor.unwrap_or((range.start, range.start));
        let from = back_chars(text, range.start, start, WINDOW_CHARS);
        let end = forward_chars(text, start, end.max(start), WINDOW_CHARS);
        (from, forward_chars(text, end, range.end, WINDOW_CHARS))
    };
    let mut shown = String::new();
    if from > range.start {
        shown.push('…');
    }
    let mut map = Vec::new();
    for (i, c) in text[from..to].char_indices() {
        map.push((from + i, block_offset + shown.len()));
        if is_unsafe_on_terminal(c) {
            shown.push_str(&format!("\\u{{{:x}}}", c as u32));
        } else {
            shown.push(c);
        }
    }
    map.push((to, block_offset + shown.len()));
    if to < range.end {
        shown.push('…');
    }
    let first_column = if from > range.start {
        text[range.start..from].chars().count()
    } else {
        0
    };
    let line = ShownLine {
        start: block_offset,
        first_column,
        map,
    };
    (line, shown)
}

/// The offset `count` characters before `offset`, not before `floor`.
fn back_chars(text: &str, floor: usize, offset: usize, count: usize) -> usize {
    text[floor..offset]
        .char_indices()
        .rev()
        .nth(count.saturating_sub(1))
        .map_or(floor, |(i, _)| floor + i)
}

/// The offset `count` characters after `offset`, not past `ceiling`.
fn forward_chars(text: &str, offset: usize, ceiling: usize, count: usize) -> usize {
    let offset = offset.min(ceiling);
    text[offset..ceiling]
        .char_indices()
        .nth(count)
        .map_or(ceiling, |(i, _)| offset + i)
}

impl SourceCode for Excerpt {
    fn read_span<'a>(
        &'a self,
        span: &SourceSpan,
        context_lines_before: usize,
        context_lines_after: usize,
    ) -> Result<Box<dyn SpanContents<'a> + 'a>, MietteError> {
        let block = self
            .blocks
            .iter()
            .rev()
            .find(|b| b.base <= span.offset())
            .ok_or(MietteError::OutOfBounds)?;
        let local = span.offset() - block.base;
        if local + span.len() > block.text.len() {
            return Err(MietteError::OutOfBounds);
        }
        let inner = block.text.as_str().read_span(
            &SourceSpan::from((local, span.len())),
            context_lines_before,
            context_lines_after,
        )?;
        let shown = &block.lines[inner.line().min(block.lines.len() - 1)];
        // `miette` counts a column in bytes of the shown text; the report
        // counts characters of the source line.
        let at = shown.start + inner.column();
        let column = shown.first_column
            + shown
                .map
                .partition_point(|&(_, b)| b < at)
                .min(shown.map.len() - 1);
        Ok(Box::new(MietteSpanContents::new_named(
            self.name.clone(),
            inner.data(),
            SourceSpan::from((inner.span().offset() + block.base, inner.span().len())),
            block.first_line + inner.line(),
            column,
            inner.line_count(),
        )))
    }
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
    plan_source: SourceId,
    findings: &[Finding],
    cautions: &[&str],
    style: HumanStyle,
) -> String {
    let mut out = String::new();
    let name = visible(sources.name(plan_source)).into_owned();
    for finding in findings.iter().take(MAX_SHOWN) {
        let (line, _) = sources.line_column(finding.span);
        let mut marks = vec![Mark {
            span: finding.span,
            label: Some(format!("line {line}")),
            primary: true,
        }];
        marks.extend(finding.labels.iter().map(|(span, text)| Mark {
            span: *span,
            label: Some(visible(text).into_owned()),
            primary: false,
        }));
        // Findings point into the plan; labels elsewhere are not drawn.
        let (source, labels) = Excerpt::new(sources, plan_source, &marks);
        let report = Report {
            message: visible(&finding.message).into_owned(),
            code: Some(finding.rule.to_string()),
            severity: match finding.severity {
                Severity::Error => miette::Severity::Error,
                Severity::Warning => miette::Severity::Warning,
                Severity::Note => miette::Severity::Advice,
            },
            help: finding.help.as_deref().map(|h| visible(h).into_owned()),
            labels,
            source,
        };
        render(&report, style, &mut out);
        out.push('\n');
    }
    out.push_str(&more_line(findings.len(), "finding"));
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

/// "… and N more" once more than `MAX_SHOWN` diagnostics were found.
fn more_line(total: usize, what: &str) -> String {
    if total <= MAX_SHOWN {
        return String::new();
    }
    let more = total - MAX_SHOWN;
    format!(
        "… and {more} more {what}{} not shown here (`--format json` lists every one)\n\n",
        if more == 1 { "" } else { "s" }
    )
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
    for error in errors.iter().take(MAX_SHOWN) {
        let (line, column) = sources.line_column(error.span);
        let mark = Mark {
            span: error.span,
            label: Some(format!("line {line}, column {column}")),
            primary: true,
        };
        let (source, labels) = Excerpt::new(sources, error.span.source, &[mark]);
        let report = Report {
            message: visible(&error.message).into_owned(),
            code: Some("input".to_string()),
            severity: miette::Severity::Error,
            help: error.hint.as_deref().map(|h| visible(h).into_owned()),
            labels,
            source,
        };
        render(&report, style, &mut out);
        out.push('\n');
    }
    out.push_str(&more_line(errors.len(), "input problem"));
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
