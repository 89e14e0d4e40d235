//! Safety: a stop switch in every motor supply path.
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

pub const NO_STOP: Rule = Rule {
    id: "safety/no-stop",
    severity: Severity::Warning,
    summary: "motors with no stop switch in their supply path",
    doc: TODO_DOC,
    needs_operating_point: true,
    check: not_yet,
};
