//! Batteries: discharge current against rating, lithium packs without cut-off.
//!
//! STUB: rules registered, checks and documentation to be written.

use super::{Context, Finding, Rule, RuleDoc, Severity};

const TODO_DOC: RuleDoc = RuleDoc {
    what: "",
    why: "",
    example: "",
    fix: "",
    references: "",
};

fn not_yet(_: &Context, _: &mut Vec<Finding>) {}

pub const DISCHARGE: Rule = Rule {
    id: "battery/discharge",
    severity: Severity::Error,
    summary: "total peak current above the battery's maximum discharge",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};

pub const NO_CUTOFF: Rule = Rule {
    id: "battery/no-cutoff",
    severity: Severity::Warning,
    summary: "lithium battery with no low-voltage cutoff",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};
