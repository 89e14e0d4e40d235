//! Output formats: the terminal report (via `miette`), JSON (format reference §8,
//! in one versioned envelope shared by every document) and SARIF 2.1.0.
//!
//! The only module that knows how findings and input errors look on the
//! outside. It returns strings; the binary decides where they go.

mod bringup;
mod budget;
mod catalogue;
mod human;
mod json;
mod notes;
mod parts;
mod quiet;
mod reference;
mod sarif;
mod scenarios;
mod schema;
mod sweep;
mod wires;

pub use bringup::{bringup_json, bringup_markdown, bringup_text};
pub use budget::{budget_json, budget_table};
pub use catalogue::{rule_explanation, rule_list};
pub use human::{HumanStyle, MAX_SHOWN, WINDOW_CHARS, render_findings, render_input_errors};
pub use json::{FORMAT_VERSION, findings_json, input_errors_json, unplaced_input_error_json};
pub use notes::{NotesPage, notes_html, notes_markdown};
pub use parts::{UnknownPart, part_sheet, parts_list};
pub use quiet::{quiet_budget, quiet_findings};
pub use reference::{describe, fill_generated_blocks, format_tables};
pub use sarif::{findings_sarif, input_errors_sarif, unplaced_input_error_sarif};
pub use scenarios::{scenarios_json, scenarios_table};
pub use schema::{plan_schema, plan_schema_text};
pub use sweep::{
    sweep_csv, sweep_csv_header, sweep_csv_record, sweep_json, sweep_jsonl_end, sweep_jsonl_row,
    sweep_jsonl_start, sweep_table,
};
pub use wires::{wires_csv, wires_json, wires_table};

use crate::rules::{Finding, Severity};

/// Counts by severity.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Summary {
    /// How many errors.
    pub errors: usize,
    /// How many warnings.
    pub warnings: usize,
    /// How many notes.
    pub notes: usize,
}

impl Summary {
    /// Counts these findings by severity.
    pub fn of(findings: &[Finding]) -> Summary {
        let mut s = Summary::default();
        for f in findings {
            match f.severity {
                Severity::Error => s.errors += 1,
                Severity::Warning => s.warnings += 1,
                Severity::Note => s.notes += 1,
            }
        }
        s
    }

    /// The counts as the report's closing line writes them:
    /// `1 error, 0 warnings, 2 notes`.
    pub fn line(&self) -> String {
        fn count(n: usize, word: &str) -> String {
            format!("{n} {word}{}", if n == 1 { "" } else { "s" })
        }
        format!(
            "{}, {}, {}",
            count(self.errors, "error"),
            count(self.warnings, "warning"),
            count(self.notes, "note")
        )
    }
}
